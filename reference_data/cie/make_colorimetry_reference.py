"""Writes `colorimetry_reference.json`: XYZ, CIELAB and sRGB of random reflectance
spectra computed by colour-science 0.4.7 (PyPI), for checking `src/colorimetry/`.

The computation is aligned with the one under test so both evaluate the same sum:

* the colour-matching functions (`cmf_*.csv`) and the illuminant
  (`illuminant_*.csv`, written by `extract_cie_tables.py`) are put onto the
  spectrum's grid by linear interpolation (`colour.LinearInterpolator`) before
  `colour.sd_to_XYZ(..., method="Integration")` sees them, so colour-science does
  no reshaping (its default would be Sprague or cubic-spline interpolation);
* `k` is left to colour-science: 100 / sum(S ybar dλ), i.e. Y = 100 for the
  perfect reflecting diffuser;
* CIELAB uses the computed white of the same grid, illuminant and observer;
* ΔE*ab, ΔE*94 (graphic arts) and ΔE00 between consecutive samples by
  `colour.delta_E` (methods "CIE 1976", "CIE 1994", "CIE 2000");
* sRGB: Bradford adaptation from that white to the sRGB white (0.95047, 1, 1.08883)
  and the matrices derived from the IEC 61966-2-1 primaries and that white
  (the 4-decimal matrix printed in IEC 61966-2-1 differs by up to 1e-4).

Run: python3 reference_data/cie/make_colorimetry_reference.py
"""

import json
from pathlib import Path

import numpy as np
import colour

HERE = Path(__file__).resolve().parent
GRIDS = [(380.0, 780.0, 1.0), (380.0, 780.0, 5.0), (360.0, 830.0, 5.0)]
ILLUMINANTS = ["D65", "D50", "A"]
OBSERVERS = {"CIE1931_2": "cmf_cie1931_2.csv", "CIE1964_10": "cmf_cie1964_10.csv"}
SPECTRA_PER_GRID = 5


def load(name):
    data = np.loadtxt(HERE / name, delimiter=",", skiprows=1)
    return data[:, 0], data[:, 1:]


def on_grid(name, wl):
    x, y = load(name)
    return np.stack([colour.LinearInterpolator(x, y[:, j])(wl) for j in range(y.shape[1])], axis=1)


def random_spectrum(rng, wl):
    """A smooth reflectance in [0, 1]: a few Gaussian bumps on a base level."""
    r = np.full_like(wl, rng.uniform(0.0, 0.3))
    for _ in range(rng.integers(1, 4)):
        r += rng.uniform(-0.3, 0.9) * np.exp(-0.5 * ((wl - rng.uniform(380, 780)) / rng.uniform(15, 80)) ** 2)
    return np.round(np.clip(r, 0.0, 1.0), 6)


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

rng = np.random.default_rng(20240607)
out = {"source": "colour-science 0.4.7, see make_colorimetry_reference.py", "grids": [], "cases": []}
for gi, (lo, hi, step) in enumerate(GRIDS):
    shape = colour.SpectralShape(lo, hi, step)
    wl = shape.wavelengths
    spectra = [random_spectrum(rng, wl) for _ in range(SPECTRA_PER_GRID)]
    spectra[0][:] = 1.0  # the perfect reflecting diffuser
    spectra[1][:] = np.round(np.exp(-0.5 * ((wl - 520.0) / 12.0) ** 2), 6)  # a narrow green band
    out["grids"].append({"from": lo, "to": hi, "step": step, "spectra": [s.tolist() for s in spectra]})
    for obs, cmf_file in OBSERVERS.items():
        cmfs = colour.MultiSpectralDistributions(on_grid(cmf_file, wl), wl)
        for ill in ILLUMINANTS:
            illuminant = colour.SpectralDistribution(on_grid(f"illuminant_{ill.lower()}.csv", wl)[:, 0], wl)
            white = colour.sd_to_XYZ(colour.SpectralDistribution(np.ones_like(wl), wl), cmfs, illuminant,
                                     method="Integration")
            white_xy = colour.XYZ_to_xy(white / 100)
            expected = []
            for s in spectra:
                xyz = colour.sd_to_XYZ(colour.SpectralDistribution(s, wl), cmfs, illuminant, method="Integration")
                lab = colour.XYZ_to_Lab(xyz / 100, white_xy)
                linear = colour.XYZ_to_RGB(xyz / 100, SRGB, white_xy, chromatic_adaptation_transform="Bradford")
                srgb = colour.XYZ_to_RGB(xyz / 100, SRGB, white_xy, chromatic_adaptation_transform="Bradford",
                                         apply_cctf_encoding=True)
                expected.append({"xyz": xyz.tolist(), "lab": lab.tolist(), "linear_srgb": linear.tolist(),
                                 "srgb": srgb.tolist()})
            out["cases"].append({"grid": gi, "illuminant": ill, "observer": obs, "white": white.tolist(),
                                 "expected": expected})

# Colour differences between consecutive samples of every case, by colour.delta_E.
out["differences"] = []
for case in out["cases"]:
    labs = [e["lab"] for e in case["expected"]]
    for lab1, lab2 in zip(labs, labs[1:]):
        out["differences"].append({
            "lab1": lab1, "lab2": lab2,
            **{key: float(colour.delta_E(np.array(lab1), np.array(lab2), method=method))
               for key, method in [("de76", "CIE 1976"), ("de94", "CIE 1994"), ("de2000", "CIE 2000")]},
        })

with open(HERE / "colorimetry_reference.json", "w") as f:
    json.dump(out, f, indent=None, separators=(",", ":"))
    f.write("\n")
