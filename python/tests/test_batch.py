"""reflectance_batch against per-design Scene.spectrum (the same engine path) to 1e-13."""

import numpy as np
import pytest

import lamella

WAVELENGTHS = np.linspace(400.0, 720.0, 33)  # 33: the last block of four is short
ANGLES = [0.0, 35.0, 70.0]


def scene_of(indices, thicknesses):
    """A scene with layers of constant complex index (one material per layer)."""
    inc, *layers, sub = indices
    materials = {"inc": {"n": inc.real, "k": inc.imag}, "sub": {"n": sub.real, "k": sub.imag}}
    stack = []
    for j, (z, t) in enumerate(zip(layers, thicknesses)):
        materials[f"m{j}"] = {"n": z.real, "k": z.imag}
        stack.append({"material": f"m{j}", "thickness_nm": float(t)})
    return lamella.Scene.from_dict(
        {
            "incident": "inc",
            "stack": stack,
            "substrate": "sub",
            "materials": materials,
            "wavelengths_nm": WAVELENGTHS.tolist(),
            "angles_deg": ANGLES,
        }
    )


def random_media(rng, layers, absorbing):
    n = rng.uniform(1.2, 2.6, layers + 2).astype(complex)
    n[0] = rng.uniform(1.0, 1.5)
    if absorbing:
        n[1:] += 1j * rng.uniform(0.0, 0.8, layers + 1)
    return n


@pytest.mark.parametrize("absorbing", [False, True])
def test_shared_media_agree_with_scene_spectrum(absorbing):
    rng = np.random.default_rng(7)
    layers, designs = 5, 12
    n = random_media(rng, layers, absorbing)
    media = np.tile(n, (len(WAVELENGTHS), 1))
    t = rng.uniform(0.0, 300.0, (designs, layers))
    t[0, 2] = 0.0  # a layer of zero thickness
    out = lamella.reflectance_batch(media, t, WAVELENGTHS, ANGLES)
    for key in ("R_s", "R_p", "R", "T_s", "T_p", "T"):
        assert out[key].shape == (designs, len(ANGLES), len(WAVELENGTHS))
    for d in range(designs):
        s = scene_of(n, t[d]).spectrum()
        for key in ("R_s", "R_p", "R", "T_s", "T_p", "T"):
            np.testing.assert_allclose(out[key][d], getattr(s, key), rtol=0, atol=1e-13)


def test_per_design_media_agree_with_scene_spectrum():
    rng = np.random.default_rng(11)
    layers, designs = 3, 6
    ns = [random_media(rng, layers, True) for _ in range(designs)]
    media = np.stack([np.tile(n, (len(WAVELENGTHS), 1)) for n in ns])
    t = rng.uniform(10.0, 250.0, (designs, layers))
    out = lamella.reflectance_batch(media, t, WAVELENGTHS, ANGLES)
    for d in range(designs):
        s = scene_of(ns[d], t[d]).spectrum()
        np.testing.assert_allclose(out["R_p"][d], s.R_p, rtol=0, atol=1e-13)
        np.testing.assert_allclose(out["T_s"][d], s.T_s, rtol=0, atol=1e-13)


def test_dispersive_media_from_a_scene_agree():
    """Media varying with wavelength: the indices of a built-in material per wavelength."""
    rng = np.random.default_rng(3)
    w = WAVELENGTHS
    n_hi = 2.3 + 3.0e4 / w**2  # a Cauchy-like invented dispersion, for a demo
    media = np.stack([np.ones_like(w), n_hi, np.full_like(w, 1.46), n_hi, np.full_like(w, 1.52)], axis=1)
    t = rng.uniform(50.0, 150.0, (4, 3))
    out = lamella.reflectance_batch(media.astype(complex), t, w, [0.0])
    for d in range(4):
        # The same stack at each wavelength alone (a scene has one index per material).
        for i in (0, 16, 32):
            s = scene_of(media[i].astype(complex), t[d]).spectrum(wavelengths_nm=[w[i]], angles_deg=[0.0])
            assert abs(out["R"][d, 0, i] - s.R[0, 0]) <= 1e-13


def test_one_design_and_defaults():
    out = lamella.reflectance_batch(np.array([[1.0, 1.38, 1.52]]), [99.6], [550.0])
    # Quarter-wave MgF2 on glass at 550 nm: R = ((n0 ns - n1²)/(n0 ns + n1²))² (Macleod,
    # Thin-Film Optical Filters, 4th ed. 2010, §3.2).
    expected = ((1.52 - 1.38**2) / (1.52 + 1.38**2)) ** 2
    assert out["R"].shape == (1, 1, 1)
    assert abs(out["R"][0, 0, 0] - expected) < 1e-6
    assert abs(out["R"][0, 0, 0] + out["T"][0, 0, 0] - 1) < 1e-12


@pytest.mark.parametrize(
    "kwargs, key",
    [
        (dict(media=np.ones((3, 4)), thicknesses_nm=np.ones((2, 3))), "media: shape"),
        (dict(media=np.ones((3, 5)), thicknesses_nm=-np.ones((2, 3))), r"thicknesses_nm\[0, 0\]"),
        (dict(media=np.ones((3, 5)), thicknesses_nm=np.full((2, 3), np.nan)), r"thicknesses_nm\[0, 0\]"),
        (dict(media=np.full((3, 5), 1.5 - 0.1j), thicknesses_nm=np.ones((2, 3))), r"media\[0, 0\]"),
        (dict(media=np.full((3, 5), 1.5 + 0.1j), thicknesses_nm=np.ones((2, 3))), "incident medium"),
        (dict(media=np.ones((3, 5)), thicknesses_nm=np.ones((2, 3)), angles_deg=[95.0]), r"angles_deg\[0\]"),
    ],
)
def test_bad_input_names_the_argument(kwargs, key):
    kwargs.setdefault("wavelengths_nm", [450.0, 550.0, 650.0])
    with pytest.raises(lamella.SceneError, match=key):
        lamella.reflectance_batch(**kwargs)


def test_bad_wavelengths():
    with pytest.raises(lamella.SceneError, match=r"wavelengths_nm\[1\]"):
        lamella.reflectance_batch(np.ones((2, 3)), np.ones((1, 1)), [500.0, -1.0])
