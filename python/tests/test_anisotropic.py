"""Scenes with uniaxial, biaxial and helicoidal layers through the package against the
command line, bit for bit: both polarization bases, the Jones matrices, colour per
handedness and through circular analysers, and the design tools' analyser option."""

import csv
import io

import numpy as np
import pytest

import lamella
from conftest import ANISOTROPIC_SCENES, FILM_SCENES, SCENES

CIRCULAR = ["R_L", "R_R", "R", "T_L", "T_R", "T", "A"]
LINEAR = ["R_s", "R_p", "R", "T_s", "T_p", "T", "A"]

# The pitch-graded film costs seconds per grid; the others a fraction of one.
HEAVY = "chiral_gold_film.json"


def cli_table(cli, path, *flags):
    run = cli("spectrum", path, "--format", "csv", *flags)
    assert run.code == 0, run.stderr
    rows = list(csv.reader(io.StringIO(run.stdout)))
    return rows[0], np.array([[float(x) for x in r] for r in rows[1:]])


@pytest.mark.parametrize("name", FILM_SCENES)
def test_circular_spectrum_is_the_cli_bit_for_bit(cli, name):
    path = SCENES / name
    header, table = cli_table(cli, path, "--basis", "circular")
    assert header == ["wavelength_nm", "angle_deg", *CIRCULAR]
    s = lamella.Scene.load(path).spectrum(basis="circular")
    assert s.basis == "circular"
    for j, c in enumerate(CIRCULAR):
        assert np.array_equal(table[:, 2 + j], getattr(s, c).ravel()), c
    assert list(s.to_pandas().columns) == header
    with pytest.raises(AttributeError, match="R_s"):
        _ = s.R_s


@pytest.mark.parametrize("name", ANISOTROPIC_SCENES + ["quarter_wave_mirror.json"])
@pytest.mark.parametrize("basis", ["linear", "circular"])
def test_jones_matrices_are_the_cli_json(cli, name, basis):
    if name == HEAVY and basis == "linear":
        pytest.skip("the circular case covers the heavy scene")
    path = SCENES / name
    run = cli("spectrum", path, "--format", "json", "--basis", basis)
    assert run.code == 0, run.stderr
    doc = run.json()
    s = lamella.Scene.load(path).spectrum(basis=basis, jones=True)
    shape = (len(s.angle_deg), len(s.wavelength_nm), 2, 2)
    assert list(s.jones_basis) == doc["jones_basis"]
    for mine, key in [(s.r_jones, "jones_r"), (s.t_jones, "jones_t")]:
        pairs = np.array(doc[key])  # (A, W, 4 entries, re/im)
        theirs = (pairs[..., 0] + 1j * pairs[..., 1]).reshape(shape)
        assert mine.dtype == np.complex128 and np.array_equal(mine, theirs), key
    # The JSON's circular totals of an isotropic stack come from its Jones
    # matrices; the CSV's (which the package gives) from s and p.
    if basis == "linear" or name in ANISOTROPIC_SCENES:
        for c in LINEAR if basis == "linear" else CIRCULAR:
            assert np.array_equal(np.array(doc[c]), getattr(s, c)), c


def test_jones_matrices_are_given_by_default_only_for_anisotropic_scenes():
    iso = lamella.Scene.load(SCENES / "teal_label_foil.json").spectrum()
    assert iso.r_jones is None and iso.t_jones is None
    film = lamella.Scene.load(SCENES / "cnc_giftbox_window.json")
    assert film.spectrum(jones=False).r_jones is None
    assert film.spectrum().r_jones is not None
    # A substrate sheet has no single amplitude: asking for Jones matrices is refused.
    with pytest.raises(lamella.SceneError, match="coherent stack"):
        lamella.Scene.load(SCENES / "teal_label_foil.json").spectrum(jones=True)


HANDED_VIEWS = [
    {},
    {"polarization": "left"},
    {"polarization": "right", "side": "transmit"},
    {"analyzer": "left"},
    {"analyzer": "right", "illuminant": "A"},
]


def view_id(view):
    return ",".join(f"{k}={x}" for k, x in view.items()) or "scene"


@pytest.mark.parametrize(
    "name, view",
    [(n, v) for n in ANISOTROPIC_SCENES + ["quarter_wave_mirror.json"] for v in HANDED_VIEWS
     if n != HEAVY or v in ({}, {"analyzer": "left"})],
    ids=lambda x: view_id(x) if isinstance(x, dict) else x,
)
def test_colour_per_handedness_is_the_cli_colour(cli, name, view):
    path = SCENES / name
    flags = [x for k, v in view.items() for x in (f"--{k}", v)]
    run = cli("color", path, "--format", "json", *flags)
    assert run.code == 0, run.stderr
    assert lamella.Scene.load(path).color(**view).to_records() == run.json()


def test_a_left_helix_reflects_left_handed_light():
    # de Vries, Acta Cryst. 4, 219 (1951): inside the band the helix's own
    # handedness is reflected, the other sees only the interfaces.
    s = lamella.Scene.load(SCENES / "cnc_giftbox_window.json").spectrum(
        wavelengths_nm=np.arange(400.0, 701.0, 2.0), angles_deg=[0.0], basis="circular"
    )
    peak = int(np.argmax(s.R_L[0]))
    assert s.R_L[0, peak] > 0.5 and s.R_R[0, peak] < 0.15
    assert np.allclose(s.R[0], 0.5 * (s.R_L[0] + s.R_R[0]), rtol=0, atol=1e-15)


def test_analyser_options_are_checked():
    scene = lamella.Scene.load(SCENES / "cnc_giftbox_window.json")
    with pytest.raises(lamella.SceneError, match="analyzer.*up"):
        scene.color(analyzer="up")
    with pytest.raises(lamella.SceneError, match="analyzer.*unpolarized light"):
        scene.color(polarization="s", analyzer="left")
    with pytest.raises(lamella.SceneError, match="basis"):
        scene.spectrum(basis="elliptic")
    with pytest.raises(lamella.SceneError, match="analyzer.*spectra"):
        lamella.chart(scene, kind="spectra", analyzer="left")
    with pytest.raises(lamella.SceneError, match="polarization"):
        scene.color(polarization="sideways")


def test_match_through_an_analyser_is_the_cli_match(cli, tmp_path):
    path = SCENES / "cnc_giftbox_window.json"
    out_scene = tmp_path / "matched.json"
    run = cli("match", path, "--target-lab", "40.2,-67.9,28.8", "--analyzer", "left",
              "--angle", "0", "--max-evals", "150", "--seed", "4", "--out-scene", out_scene)
    assert run.code in (0, 3), run.stderr
    report = lamella.match(lamella.Scene.load(path), target_lab=(40.2, -67.9, 28.8),
                           analyzer="left", angle=0, max_evals=150, seed=4)
    keep = lambda r: {k: v for k, v in r.items() if k not in ("scene", "out_scene", "wall_time_s")}
    assert keep(report) == keep(run.json())


def test_tolerance_and_sweep_take_the_analyser(cli):
    path = SCENES / "cnc_giftbox_window.json"
    run = cli("tolerance", path, "--sigma-pct", "2", "--samples", "30", "--seed", "2",
              "--analyzer", "right")
    assert run.code == 0, run.stderr
    report = lamella.tolerance(lamella.Scene.load(path), sigma_pct=2, samples=30, seed=2,
                               analyzer="right")
    keep = lambda r: {k: v for k, v in r.items() if k != "wall_time_s"}
    assert keep(report) == keep(run.json())
    scene = lamella.Scene.load(path)
    left = lamella.sweep(scene, samples=6, seed=3, analyzer="left", as_frame=False)
    right = lamella.sweep(scene, samples=6, seed=3, analyzer="right", as_frame=False)
    assert not np.array_equal(left["L"], right["L"])


def test_charts_and_renders_of_a_chiral_scene():
    scene = lamella.Scene.load(SCENES / "cnc_giftbox_window.json")
    chart = lamella.chart(scene, kind="angle-strip", analyzer="left", size=(600, 400))
    assert chart._repr_png_()[:8] == b"\x89PNG\r\n\x1a\n"
    image = lamella.render(scene, size=(40, 40), analyzer="left")
    assert image.shape == (40, 40, 3) and image.dtype == np.uint8


def test_chiral_thickness_chart_has_a_field_per_handedness_as_the_cli(cli, tmp_path):
    path = SCENES / "cnc_giftbox_window.json"
    scene = lamella.Scene.load(path)
    svg = lamella.chart(
        scene, kind="thickness-angle", scale_range=(0.9, 1.1), steps=4, size=(900, 600)
    ).svg()
    out = tmp_path / "thickness.svg"
    run = cli(
        "chart", path, "--kind", "thickness-angle", "--scale-range", "0.9,1.1",
        "--steps", "4", "--size", "900x600", "-o", out,
    )
    assert run.code == 0, run.stderr
    assert svg == out.read_text()
    # Two fields side by side, not the single field of left-circular light.
    left = lamella.chart(
        scene, kind="thickness-angle", scale_range=(0.9, 1.1), steps=4, size=(900, 600),
        polarization="left",
    ).svg()
    assert svg != left and svg.count("<image") == 2 and left.count("<image") == 1
