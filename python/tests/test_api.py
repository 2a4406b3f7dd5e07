"""The package's surface: scenes as dicts, edits, pickling, warnings, docs and stubs."""

import ast
import pickle
import warnings
from pathlib import Path

import numpy as np
import pytest

import lamella
from conftest import ANISOTROPIC_SCENES, FILM_SCENES, SCENES


def test_from_dict_of_to_dict_is_the_same_scene():
    scene = lamella.Scene.load(SCENES / "teal_label_foil.json")
    again = lamella.Scene.from_dict(scene.to_dict())
    assert again.to_dict() == scene.to_dict()
    assert np.array_equal(again.spectrum().R, scene.spectrum().R)
    assert scene.title.startswith("Quillon") and scene.illuminant == "D65" and scene.observer == "CIE1931_2"
    assert scene.path.endswith("teal_label_foil.json") and again.path is None


def test_with_thicknesses_is_the_edited_document():
    scene = lamella.Scene.load(SCENES / "teal_label_foil.json")
    moved = scene.with_thicknesses({"/stack/0/stack/0": 150.0, "/stack/1": 160.0})
    doc = scene.to_dict()
    doc["stack"][0]["stack"][0]["thickness_nm"] = 150.0
    doc["stack"][1]["thickness_nm"] = 160.0
    assert moved.to_dict() == doc
    assert np.array_equal(moved.spectrum().R, lamella.Scene.from_dict(doc).spectrum().R)
    assert scene.to_dict()["stack"][1]["thickness_nm"] == 157.0  # the original is unchanged
    assert [v["pointer"] for v in scene.variables] == ["/stack/0/stack/0", "/stack/0/stack/1"]
    assert [v["pointer"] for v in scene.layers] == ["/stack/0/stack/0", "/stack/0/stack/1", "/stack/1"]


def test_scene_with_a_table_pickles_without_its_files(tmp_path):
    (tmp_path / "nk.csv").write_text("wavelength_nm,n,k\n380,1.50,0\n780,1.60,0.01\n")
    doc = {"stack": [{"material": "m", "thickness_nm": 120}], "substrate": "glass",
           "materials": {"m": {"table": "nk.csv"}}}
    scene = lamella.Scene.from_dict(doc, base_dir=tmp_path)
    blob = pickle.dumps(scene)
    (tmp_path / "nk.csv").unlink()  # a remote worker does not have the file
    copy = pickle.loads(blob)
    assert np.array_equal(copy.spectrum().R, scene.spectrum().R)
    assert np.array_equal(copy.with_thicknesses({"/stack/0": 90.0}).spectrum().T,
                          scene.with_thicknesses({"/stack/0": 90.0}).spectrum().T)


def test_warnings_are_scene_warnings():
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        scene = lamella.Scene.load(SCENES / "teal_label_foil.json")
    assert any(issubclass(w.category, lamella.SceneWarning) and "zns" in str(w.message) for w in caught)
    assert scene.warnings and {"kind", "key", "message"} <= set(scene.warnings[0])
    coarse = {"stack": [{"material": "glass", "thickness_nm": 100}], "substrate": "glass",
              "wavelengths_nm": {"from": 380, "to": 780, "step": 20}}
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        s = lamella.Scene.from_dict(coarse)
        s.spectrum()
        assert not caught  # a coarse step matters only for colour
        s.color()
    assert any("step" in str(w.message) for w in caught)


PUBLIC = ["Scene.load", "Scene.from_dict", "Scene.to_dict", "Scene.with_thicknesses", "Scene.spectrum",
          "Scene.color", "reflectance_batch", "match", "tolerance", "fit", "sweep", "multiangle",
          "render", "chart", "Spectrum.to_pandas", "Colors.to_pandas", "Chart.save"]


@pytest.mark.parametrize("name", PUBLIC)
def test_every_function_has_a_useful_docstring(name):
    obj = lamella
    for part in name.split("."):
        obj = getattr(obj, part)
    doc = obj.__doc__ or ""
    assert len(doc) > 80, name
    if name in ("Scene.spectrum", "reflectance_batch", "render", "match", "fit", "sweep"):
        assert any(u in doc for u in ("nm", "degrees", "°")), name


def test_help_of_spectrum_is_useful_on_its_own():
    import pydoc

    text = pydoc.render_doc(lamella.Scene.spectrum, renderer=pydoc.plaintext)
    for word in ("wavelengths_nm", "angles_deg", "R_s", "(A, W)", "nm", "degrees", "lamella spectrum"):
        assert word in text, word


def test_stubs_name_every_public_function():
    stub = Path(lamella.__file__).with_name("_lamella.pyi")
    tree = ast.parse(stub.read_text())
    names = {n.name for n in tree.body if isinstance(n, (ast.FunctionDef, ast.ClassDef))}
    for name in ("Scene", "Spectrum", "Colors", "Chart", "SceneError", "NotComputableError",
                 "reflectance_batch", "match", "tolerance", "fit", "multiangle", "render", "chart"):
        assert name in names, name
    assert (Path(lamella.__file__).with_name("py.typed")).exists()


def test_every_demo_scene_loads():
    for name in FILM_SCENES:
        assert len(lamella.Scene.load(SCENES / name).color()) > 0


@pytest.mark.parametrize("name", ANISOTROPIC_SCENES)
def test_anisotropic_scenes_refuse_only_the_isotropic_analyses(name):
    scene = lamella.Scene.load(SCENES / name)
    assert scene.spectrum(wavelengths_nm=[550.0], angles_deg=[0.0]).r_jones.shape == (1, 1, 2, 2)
    # The field and band analyses handle isotropic layers only, and say so.
    with pytest.raises(lamella.SceneError, match="isotropic layers only"):
        scene.field(550.0)
    with pytest.raises(lamella.SceneError, match="isotropic layers only|repeat group"):
        scene.bands()
