"""Scene.spectrum and Scene.color against the command line, bit for bit, on every demo scene."""

import csv
import io
import json

import numpy as np
import pytest

import lamella
from conftest import BENCH, FILM_SCENES, SCENES

COLUMNS = ["R_s", "R_p", "R", "T_s", "T_p", "T", "A"]


def cli_spectrum(cli, path):
    run = cli("spectrum", path, "--format", "csv")
    assert run.code == 0, run.stderr
    rows = list(csv.reader(io.StringIO(run.stdout)))
    assert rows[0] == ["wavelength_nm", "angle_deg", *COLUMNS]
    # Shortest round-trip decimals parse back to exactly the doubles printed.
    return np.array([[float(x) for x in r] for r in rows[1:]])


@pytest.mark.parametrize("name", FILM_SCENES + ["../bench/periodic.json"])
def test_spectrum_is_the_cli_spectrum_bit_for_bit(cli, name):
    path = SCENES / name
    scene = lamella.Scene.load(path)
    s = scene.spectrum()
    table = cli_spectrum(cli, path)
    na, nw = len(s.angle_deg), len(s.wavelength_nm)
    assert all(getattr(s, c).shape == (na, nw) and getattr(s, c).dtype == np.float64 for c in COLUMNS)
    assert np.array_equal(table[:, 0], np.tile(s.wavelength_nm, na))
    assert np.array_equal(table[:, 1], np.repeat(s.angle_deg, nw))
    for j, c in enumerate(COLUMNS):
        assert np.array_equal(table[:, 2 + j], getattr(s, c).ravel()), c
    frame = s.to_pandas()
    assert list(frame.columns) == ["wavelength_nm", "angle_deg", *COLUMNS]
    assert np.array_equal(frame.to_numpy(), table)


def test_spectrum_on_given_grid_is_the_cli_on_that_grid(cli, tmp_path):
    scene = lamella.Scene.load(SCENES / "teal_label_foil.json")
    w, a = np.array([401.5, 550.0, 612.25]), [0.0, 33.3]
    s = scene.spectrum(wavelengths_nm=w, angles_deg=a)
    doc = scene.to_dict()
    doc["wavelengths_nm"], doc["angles_deg"] = w.tolist(), a
    moved = tmp_path / "grid.json"  # the scene names no files, so it may move
    moved.write_text(json.dumps(doc))
    table = cli_spectrum(cli, moved)
    assert np.array_equal(table[:, 4], s.R.ravel())
    assert np.array_equal(table[:, 7], s.T.ravel())


def test_one_point_spectrum():
    scene = lamella.Scene.load(BENCH / "periodic.json")
    s = scene.spectrum(wavelengths_nm=[550.0], angles_deg=[0.0])
    assert s.R.shape == (1, 1) and 0.0 <= s.R[0, 0] <= 1.0
    # Lossless: R + T = 1 to rounding, and A is exactly 0.
    assert abs(s.R[0, 0] + s.T[0, 0] - 1.0) < 1e-12 and s.A[0, 0] == 0.0


VIEWS = [
    {},
    {"side": "transmit"},
    {"polarization": "s", "gamut": "chroma"},
    {"illuminant": "A", "observer": "CIE1964_10", "polarization": "p"},
]


def cli_flags(view):
    return [x for k, v in view.items() for x in (f"--{k}", v)]


@pytest.mark.parametrize("name", FILM_SCENES)
@pytest.mark.parametrize("view", VIEWS, ids=lambda v: ",".join(f"{k}={x}" for k, x in v.items()) or "scene")
def test_color_is_the_cli_color(cli, name, view):
    path = SCENES / name
    records = cli("color", path, "--format", "json", *cli_flags(view)).json()
    colours = lamella.Scene.load(path).color(**view)
    assert colours.to_records() == records
    assert colours.srgb.shape == (len(records), 3) and colours.in_gamut.dtype == bool
    frame = colours.to_pandas()
    csv_text = cli("color", path, "--format", "csv", *cli_flags(view)).stdout
    header = csv_text.splitlines()[0].split(",")
    assert list(frame.columns) == header


def test_color_options_are_checked():
    scene = lamella.Scene.load(SCENES / "teal_label_foil.json")
    for kwargs, key in [
        ({"side": "up"}, "side"),
        ({"polarization": "q"}, "polarization"),
        ({"gamut": "squash"}, "gamut"),
        ({"illuminant": "D66"}, "illuminant"),
        ({"observer": "CIE2000"}, "observer"),
    ]:
        with pytest.raises(lamella.SceneError, match=key):
            scene.color(**kwargs)
