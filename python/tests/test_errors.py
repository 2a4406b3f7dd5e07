"""Bad input raises SceneError (a ValueError) with the command line's message, naming the key."""

import json

import numpy as np
import pytest

import lamella
from conftest import SCENES

GOOD = {
    "stack": [{"material": "tio2", "thickness_nm": 60}, {"material": "sio2", "thickness_nm": 95}],
    "substrate": "glass",
}

BAD_FILES = [
    ("negative thickness", '{"stack": [{"material": "glass", "thickness_nm": -5}], "substrate": "glass"}',
     "stack[0].thickness_nm"),
    ("unknown material", '{"stack": [{"material": "unobtainium", "thickness_nm": 5}], "substrate": "glass"}',
     "stack[0].material"),
    ("unknown key", '{"stack": [], "substrate": "glass", "colour": 1}', "colour"),
    ("duplicate key", '{"stack": [{"material": "glass", "thickness_nm": 5, "thickness_nm": 6}], "substrate": "glass"}',
     "stack[0].thickness_nm"),
    ("malformed JSON", '{"stack": [', "malformed JSON"),
    ("missing table", '{"stack": [{"material": "m", "thickness_nm": 5}], "substrate": "glass", '
                      '"materials": {"m": {"table": "nowhere.csv"}}}', "materials.m"),
    ("angle of 90°", '{"stack": [], "substrate": "glass", "angles_deg": [0, 90]}', "angles_deg"),
    ("bad illuminant", '{"stack": [], "substrate": "glass", "illuminant": "D66"}', "illuminant"),
    ("bad repeat", '{"stack": [{"repeat": 0, "stack": []}], "substrate": "glass"}', "stack[0].repeat"),
]


@pytest.mark.parametrize("what, text, key", BAD_FILES, ids=[b[0] for b in BAD_FILES])
def test_load_raises_the_cli_message(cli, tmp_path, what, text, key):
    path = tmp_path / "bad.json"
    path.write_text(text)
    run = cli("spectrum", path)
    assert run.code == 2
    with pytest.raises(lamella.SceneError) as err:
        lamella.Scene.load(path)
    assert str(err.value) == run.message
    assert key in str(err.value) and str(path) in str(err.value)
    assert isinstance(err.value, ValueError)


def test_missing_file_is_the_cli_message(cli, tmp_path):
    path = tmp_path / "absent.json"
    run = cli("color", path)
    with pytest.raises(lamella.SceneError) as err:
        lamella.Scene.load(path)
    assert str(err.value) == run.message


def test_from_dict_names_the_key():
    bad = json.loads(json.dumps(GOOD))
    bad["stack"][1]["thickness_nm"] = float("nan")
    with pytest.raises(lamella.SceneError, match=r"stack\[1\]\.thickness_nm = nan"):
        lamella.Scene.from_dict(bad)
    bad["stack"][1]["thickness_nm"] = object()
    with pytest.raises(lamella.SceneError, match=r"stack\[1\]\.thickness_nm"):
        lamella.Scene.from_dict(bad)
    with pytest.raises(lamella.SceneError, match="keys must be strings"):
        lamella.Scene.from_dict({1: 2})
    # numpy values are accepted as JSON numbers.
    ok = {**GOOD, "angles_deg": np.arange(0, 50, 10), "stack": [{"material": "tio2", "thickness_nm": np.float32(60)}]}
    assert lamella.Scene.from_dict(ok).angles_deg.tolist() == [0, 10, 20, 30, 40]


def test_coating_only_scene_refused_like_the_cli(cli):
    path = SCENES / "pearl_compact_lid.json"
    run = cli("spectrum", path)
    scene = lamella.Scene.load(path)
    with pytest.raises(lamella.SceneError) as err:
        scene.spectrum()
    assert str(err.value) == run.message
    with pytest.raises(lamella.SceneError, match="stack"):
        scene.color()


def test_with_thicknesses_refuses_bad_edits():
    scene = lamella.Scene.from_dict(GOOD)
    with pytest.raises(lamella.SceneError, match="/stack/7"):
        scene.with_thicknesses({"/stack/7": 10.0})
    with pytest.raises(lamella.SceneError, match=r"stack\[0\]\.thickness_nm = -3"):
        scene.with_thicknesses({"/stack/0": -3.0})
    with pytest.raises(lamella.SceneError, match="/stack/0.thickness_nm = inf"):
        scene.with_thicknesses({"/stack/0": float("inf")})


def test_grid_arguments_are_checked():
    scene = lamella.Scene.from_dict(GOOD)
    with pytest.raises(lamella.SceneError, match=r"wavelengths_nm\[1\] = -5"):
        scene.spectrum(wavelengths_nm=[400, -5])
    with pytest.raises(lamella.SceneError, match=r"wavelengths_nm\[1\] = 400: values must increase"):
        scene.spectrum(wavelengths_nm=[500, 400])
    with pytest.raises(lamella.SceneError, match=r"angles_deg\[0\] = 90"):
        scene.spectrum(angles_deg=[90])
    with pytest.raises(lamella.SceneError, match=r"angles_deg\[1\] = NaN"):
        scene.spectrum(angles_deg=[0, np.nan])
    with pytest.raises(lamella.SceneError, match="angles_deg"):
        scene.spectrum(angles_deg="steep")


def test_a_table_outside_its_range_names_the_material(tmp_path):
    (tmp_path / "nk.csv").write_text("wavelength_nm,n,k\n450,1.5,0\n650,1.6,0\n")
    doc = {"stack": [{"material": "m", "thickness_nm": 100}], "substrate": "glass",
           "materials": {"m": {"table": "nk.csv"}}}
    scene = lamella.Scene.from_dict({**doc, "wavelengths_nm": [500, 600]}, base_dir=tmp_path)
    with pytest.raises(lamella.SceneError, match="materials.m"):
        scene.spectrum(wavelengths_nm=[400, 500])
