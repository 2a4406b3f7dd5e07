"""Scene.layer_absorption, Scene.field and Scene.bands against the command line, bit for bit."""

import csv
import io

import numpy as np
import pytest

import lamella
from conftest import SCENES


def table(run):
    assert run.code == 0, run.stderr
    rows = list(csv.reader(io.StringIO(run.stdout)))
    return rows[0], rows[1:]


@pytest.mark.parametrize("name", ["kestrel_ink_print.json", "teal_label_foil.json", "quarter_wave_mirror.json"])
def test_layer_absorption_is_the_cli_bit_for_bit(cli, name):
    path = SCENES / name
    scene = lamella.Scene.load(path)
    a = scene.layer_absorption()
    header, rows = table(cli("spectrum", path, "--layer-absorption"))
    assert header[9:] == a.columns
    na, nw = len(a.angle_deg), len(a.wavelength_nm)
    assert a.values.shape == (na, nw, len(a.columns)) and a.values.dtype == np.float64
    cli_values = np.array([[float(x) for x in r[9:]] for r in rows])
    assert np.array_equal(cli_values, a.values.reshape(na * nw, -1))
    # The columns add up to A.
    assert np.max(np.abs(a.values.sum(axis=2) - scene.spectrum().A)) < 1e-12


def test_field_is_the_cli_bit_for_bit(cli):
    path = SCENES / "quarter_wave_mirror.json"
    f = lamella.Scene.load(path).field(560.0, 30.0, polarization="p", points=400)
    header, rows = table(
        cli("field", path, "--wavelength", "560", "--angle", "30", "--polarization", "p", "--points", "400")
    )
    assert header == ["z_nm", "layer", "E2"]
    assert np.array_equal(f.z_nm, [float(r[0]) for r in rows])
    assert np.array_equal(f.layer, [int(r[1]) for r in rows])
    assert np.array_equal(f.E2, [float(r[2]) for r in rows])
    assert f.polarization == "p" and f.layer[0] == 0 and f.layer[-1] == 3


def test_bands_are_the_cli_bit_for_bit(cli):
    path = SCENES / "quarter_wave_mirror.json"
    b = lamella.Scene.load(path).bands()
    _, rows = table(cli("bands", path))
    na, nw = len(b.angle_deg), len(b.wavelength_nm)
    grid = np.array([[float(x) for x in r] for r in rows])
    assert np.array_equal(grid[:, 2], b.half_trace_s.ravel())
    assert np.array_equal(grid[:, 3], b.half_trace_p.ravel())
    assert b.half_trace_s.shape == (na, nw)
    header, stops = table(cli("bands", path, "--stop-bands"))
    assert header == ["angle_deg", "polarization", "from_nm", "to_nm"]
    assert [(float(r[0]), r[1], float(r[2]), float(r[3])) for r in stops] == [
        (s["angle_deg"], s["polarization"], s["from_nm"], s["to_nm"]) for s in b.stop_bands
    ]


def test_inside_views_refuse_what_they_cannot_show():
    with pytest.raises(lamella.SceneError, match="repeat group"):
        lamella.Scene.load(SCENES / "kestrel_ink_print.json").bands()
    mirror = lamella.Scene.load(SCENES / "quarter_wave_mirror.json")
    with pytest.raises(lamella.SceneError, match="below 90"):
        mirror.field(560.0, 90.0)
    with pytest.raises(lamella.SceneError, match="380–1000 nm"):
        mirror.field(200.0)
    with pytest.raises(lamella.SceneError, match="polarization"):
        mirror.field(560.0, polarization="unpolarized")
    with pytest.raises(lamella.SceneError, match="coating"):
        lamella.Scene.load(SCENES / "pearl_compact_lid.json").layer_absorption()


def test_field_and_bands_charts():
    mirror = lamella.Scene.load(SCENES / "quarter_wave_mirror.json")
    field = lamella.chart(mirror, kind="field", wavelength=560.0, polarization="s", size=(640, 420))
    assert field.png().startswith(b"\x89PNG")
    bands = lamella.chart(mirror, kind="bands", with_reflectance=True, size=(640, 420))
    assert "<svg" in bands.svg()
    with pytest.raises(lamella.SceneError, match="wavelength"):
        lamella.chart(mirror, kind="field", polarization="s")
