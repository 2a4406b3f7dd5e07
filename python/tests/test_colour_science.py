"""Spectra and colour against colour-science 0.4.7 (PyPI), the general-purpose
reference library, computed live in the same process.

- Spectra: `colour.phenomena.interference.multilayer_tmm` on lossless stacks with a
  semi-infinite substrate (where it is a valid reference: see reference_data/README.md).
- Colour: `colour.sd_to_XYZ(method="Integration")`, `colour.XYZ_to_Lab`,
  `colour.XYZ_to_RGB` with Bradford adaptation, aligned with lamella's computation
  as in reference_data/cie/make_colorimetry_reference.py: the CIE tables (the CSV
  files in reference_data/cie/) put onto the scene's grid by linear interpolation.
"""

import warnings
from pathlib import Path

import numpy as np
import pytest

import lamella
from conftest import BENCH, REPO, SCENES

colour = pytest.importorskip("colour")
if colour.__version__ != "0.4.7":
    pytest.skip(f"these references are for colour-science 0.4.7, not {colour.__version__}",
                allow_module_level=True)
from colour.phenomena.interference import multilayer_tmm  # noqa: E402

warnings.filterwarnings("ignore", module="colour")
CIE = REPO / "reference_data" / "cie"


def test_periodic_bench_scene_agrees_with_multilayer_tmm():
    scene = lamella.Scene.load(BENCH / "periodic.json")
    w = np.arange(380.0, 781.0, 5.0)
    a = np.array([0.0, 30.0, 60.0, 85.0])
    s = scene.spectrum(wavelengths_nm=w, angles_deg=a)
    n = [1.0] + [2.35, 1.46] * 50 + [1.52]
    t = [58.5, 94.2] * 50
    for i, angle in enumerate(a):
        R, T = multilayer_tmm(n, t, w, angle)  # (W, 1, 1, 2): s, p
        np.testing.assert_allclose(s.R_s[i], R[:, 0, 0, 0], rtol=0, atol=1e-9)
        np.testing.assert_allclose(s.R_p[i], R[:, 0, 0, 1], rtol=0, atol=1e-9)
        np.testing.assert_allclose(s.T_s[i], T[:, 0, 0, 0], rtol=0, atol=1e-9)
        np.testing.assert_allclose(s.T_p[i], T[:, 0, 0, 1], rtol=0, atol=1e-9)


def test_batch_agrees_with_multilayer_tmm_on_random_lossless_designs():
    rng = np.random.default_rng(5)
    w = np.linspace(400.0, 700.0, 31)
    n = np.r_[1.0, rng.uniform(1.3, 2.5, 4), 1.5]
    t = rng.uniform(20.0, 250.0, (6, 4))
    out = lamella.reflectance_batch(np.tile(n, (len(w), 1)), t, w, [0.0, 40.0])
    for d in range(len(t)):
        for i, angle in enumerate((0.0, 40.0)):
            R, T = multilayer_tmm(n.tolist(), t[d].tolist(), w, angle)
            np.testing.assert_allclose(out["R_s"][d, i], R[:, 0, 0, 0], rtol=0, atol=1e-9)
            np.testing.assert_allclose(out["T_p"][d, i], T[:, 0, 0, 1], rtol=0, atol=1e-9)


def on_grid(name, wl):
    data = np.loadtxt(CIE / name, delimiter=",", skiprows=1)
    return np.stack([colour.LinearInterpolator(data[:, 0], data[:, j])(wl) for j in range(1, data.shape[1])],
                    axis=1)


D65_WHITE = np.array([0.95047, 1.0, 1.08883])
SRGB = colour.RGB_Colourspace(
    "sRGB (derived)",
    colour.RGB_COLOURSPACES["sRGB"].primaries,
    colour.XYZ_to_xy(D65_WHITE),
    use_derived_matrix_RGB_to_XYZ=True,
    use_derived_matrix_XYZ_to_RGB=True,
    cctf_encoding=colour.models.eotf_inverse_sRGB,
    cctf_decoding=colour.models.eotf_sRGB,
)


@pytest.mark.parametrize("name, illuminant, observer, cmf", [
    ("teal_label_foil.json", "D65", "CIE1931_2", "cmf_cie1931_2.csv"),
    ("chitin_lamellar_film.json", "A", "CIE1964_10", "cmf_cie1964_10.csv"),
    ("violet_window_filter.json", "D50", "CIE1931_2", "cmf_cie1931_2.csv"),
])
def test_color_agrees_with_colour_science(name, illuminant, observer, cmf):
    scene = lamella.Scene.load(SCENES / name)
    wl = scene.wavelengths_nm
    side = "transmit" if "window" in name else "reflect"
    c = scene.color(illuminant=illuminant, observer=observer, side=side)
    s = scene.spectrum()
    cmfs = colour.MultiSpectralDistributions(on_grid(cmf, wl), wl)
    light = colour.SpectralDistribution(on_grid(f"illuminant_{illuminant.lower()}.csv", wl)[:, 0], wl)
    white = colour.sd_to_XYZ(colour.SpectralDistribution(np.ones_like(wl), wl), cmfs, light,
                             method="Integration")
    white_xy = colour.XYZ_to_xy(white / 100)
    values = s.T if side == "transmit" else s.R
    for i in range(len(c)):
        xyz = colour.sd_to_XYZ(colour.SpectralDistribution(values[i], wl), cmfs, light, method="Integration")
        np.testing.assert_allclose([c.X[i], c.Y[i], c.Z[i]], xyz, rtol=1e-9, atol=1e-9)
        lab = colour.XYZ_to_Lab(xyz / 100, white_xy)
        np.testing.assert_allclose([c.L[i], c.a[i], c.b[i]], lab, rtol=0, atol=1e-7)
        if c.in_gamut[i]:
            rgb = colour.XYZ_to_RGB(xyz / 100, SRGB, white_xy, chromatic_adaptation_transform="Bradford",
                                    apply_cctf_encoding=True)
            np.testing.assert_allclose(c.srgb[i], rgb, rtol=0, atol=1e-7)


def test_travel_delta_e_agrees_with_colour_science():
    c = lamella.Scene.load(SCENES / "teal_label_foil.json").color()
    lab = np.stack([c.L, c.a, c.b], axis=1)
    expected = colour.delta_E(lab[0], lab, method="CIE 2000")  # Sharma, Wu & Dalal (2005)
    np.testing.assert_allclose(c.delta_e00_from_first, expected, rtol=0, atol=1e-9)
