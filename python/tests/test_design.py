"""The design tools and multiangle against the command line's reports."""

import json

import numpy as np
import pytest

import lamella
from conftest import BENCH, COATING_SCENES, SCENES

# Keys only a front end knows (file names, its own wall time).
CONTEXT = {"scene", "out_scene", "wall_time_s", "chart"}


def same_report(py, cli_report):
    mine = {k: v for k, v in py.items() if k not in CONTEXT}
    theirs = {k: v for k, v in cli_report.items() if k not in CONTEXT}
    assert mine == theirs


@pytest.mark.parametrize(
    "name, args, kwargs",
    [
        (
            "teal_label_foil.json",
            ["--target-lab", "60,20,-30", "--seed", "3"],
            dict(target_lab=(60, 20, -30), seed=3),
        ),
        (
            "../bench/design_5layer.json",
            ["--target-hex", "#3366CC", "--angle", "10", "--goal", "45:55,-10,-35", "--max-total-nm", "900"],
            dict(target_hex="#3366CC", angle=10, goals=[(45, (55, -10, -35))], max_total_nm=900),
        ),
        (
            "pearl_compact_lid.json",
            ["--target-lab", "78,3,22", "--geometry", "45as15", "--max-evals", "60"],
            dict(target_lab=(78, 3, 22), geometry="45as15", max_evals=60),
        ),
    ],
)
def test_match_is_the_cli_match(cli, tmp_path, name, args, kwargs):
    path = SCENES / name
    out_scene = tmp_path / "matched.json"
    run = cli("match", path, *args, "--out-scene", out_scene)
    assert run.code in (0, 3), run.stderr
    report = lamella.match(lamella.Scene.load(path), **kwargs)
    same_report(report, run.json())
    assert report["scene"].to_dict() == json.loads(out_scene.read_text())
    assert isinstance(report["scene"], lamella.Scene)


def test_tolerance_is_the_cli_tolerance(cli):
    path = SCENES / "teal_label_foil.json"
    run = cli("tolerance", path, "--sigma-pct", "2", "--sigma-n", "0.01", "--samples", "300",
              "--yield-angles", "0,15,30", "--seed", "5")
    assert run.code == 0, run.stderr
    report = lamella.tolerance(lamella.Scene.load(path), sigma_pct=2, sigma_n=0.01, samples=300,
                               yield_angles=[0, 15, 30], seed=5)
    same_report(report, run.json())


def test_tolerance_of_a_coating_is_the_cli_tolerance(cli):
    path = SCENES / "pearl_compact_lid.json"
    run = cli("tolerance", path, "--sigma-nm", "3", "--samples", "40", "--yield-geometries", "45as15,45as45")
    assert run.code == 0, run.stderr
    report = lamella.tolerance(lamella.Scene.load(path), sigma_nm=3, samples=40,
                               yield_geometries=["45as15", "45as45"])
    same_report(report, run.json())


def measured_csv(tmp_path):
    """A 'measurement' made from a known design of the five-layer bench film (invented)."""
    scene = lamella.Scene.load(BENCH / "design_5layer.json")
    known = {v["pointer"]: v["low"] + 0.37 * (v["high"] - v["low"]) for v in scene.variables}
    s = scene.with_thicknesses(known).spectrum(wavelengths_nm=np.arange(400.0, 761.0, 5.0), angles_deg=[0.0])
    path = tmp_path / "measured.csv"
    lines = ["wavelength_nm,R"] + [f"{w!r},{r!r}" for w, r in zip(s.wavelength_nm.tolist(), s.R[0].tolist())]
    path.write_text("\n".join(lines) + "\n")
    return scene, path, s


def test_fit_is_the_cli_fit_from_a_file_and_from_arrays(cli, tmp_path):
    scene, path, s = measured_csv(tmp_path)
    out_scene = tmp_path / "fitted.json"
    run = cli("fit", BENCH / "design_5layer.json", "--measured", path, "--max-evals", "3000",
              "--out-scene", out_scene)
    assert run.code == 0, run.stderr
    from_file = lamella.fit(scene, str(path), max_evals=3000)
    same_report(from_file, run.json())
    assert from_file["scene"].to_dict() == json.loads(out_scene.read_text())
    from_arrays = lamella.fit(scene, (s.wavelength_nm, s.R[0]), max_evals=3000)
    from_mapping = lamella.fit(scene, {"wavelength_nm": s.wavelength_nm, "R": s.R[0]}, max_evals=3000)
    for other in (from_arrays, from_mapping):
        assert {k: v for k, v in other.items() if k not in CONTEXT} == {
            k: v for k, v in from_file.items() if k not in CONTEXT
        }


def test_fit_chart_is_the_cli_chart(cli, tmp_path):
    scene, path, _ = measured_csv(tmp_path)
    run = cli("fit", BENCH / "design_5layer.json", "--measured", path, "--max-evals", "3000",
              "--out-scene", tmp_path / "fitted.json", "--chart", tmp_path / "cli.svg")
    assert run.code == 0, run.stderr
    out = lamella.fit(scene, path, max_evals=3000, chart=tmp_path / "py.svg")
    assert (tmp_path / "py.svg").read_bytes() == (tmp_path / "cli.svg").read_bytes()
    chart = out["chart"]
    assert isinstance(chart, lamella.Chart)
    assert (chart.name, chart.size) == ("fit", (1200, 800))
    assert chart.svg().encode() == (tmp_path / "cli.svg").read_bytes()
    assert chart._repr_png_()[:8] == b"\x89PNG\r\n\x1a\n"
    assert chart.to_array().shape == (800, 1200, 3)


def test_fit_refuses_a_chart_it_cannot_write_before_fitting(tmp_path):
    scene, path, _ = measured_csv(tmp_path)
    with pytest.raises(lamella.SceneError, match=r"fit\.jpg: output extension = jpg: charts are written as \.png or \.svg"):
        lamella.fit(scene, path, max_evals=3000, chart=tmp_path / "fit.jpg")
    assert not (tmp_path / "fit.jpg").exists()


def test_fit_chart_holds_at_most_twelve_angles(tmp_path):
    scene, _, s = measured_csv(tmp_path)
    n = len(s.wavelength_nm)
    data = (np.tile(s.wavelength_nm, 13), np.tile(s.R[0], 13), np.repeat(np.arange(13.0), n))
    with pytest.raises(lamella.SceneError, match="measured = 13 angles or geometries: a fit chart draws 1 to 12"):
        lamella.fit(scene, data, max_evals=50, chart=tmp_path / "fit.png")
    assert not (tmp_path / "fit.png").exists()
    assert "chart" not in lamella.fit(scene, data, max_evals=50)


def test_fit_refuses_percent_readings(tmp_path):
    scene, path, s = measured_csv(tmp_path)
    with pytest.raises(lamella.SceneError, match=r"measured\[3\] = 45: .*looks like percent"):
        r = s.R[0].copy()
        r[3] = 45.0
        lamella.fit(scene, (s.wavelength_nm, r))
    path.write_text("wavelength_nm,R\n500,45\n510,0.3\n")
    with pytest.raises(lamella.SceneError, match="measured line 2"):
        lamella.fit(scene, path)


@pytest.mark.parametrize("name", COATING_SCENES)
@pytest.mark.parametrize("geometries", [None, "45as15,45as110,25as40"])
def test_multiangle_is_the_cli_multiangle(cli, name, geometries):
    path = SCENES / name
    extra = ["--geometries", geometries] if geometries else []
    doc = cli("multiangle", path, "--format", "json", "--spectra", *extra).json()
    m = lamella.multiangle(lamella.Scene.load(path), geometries=geometries, spectra=True)
    assert m["title"] == doc["title"] and m["illuminant"] == doc["illuminant"]
    keys = ["illumination_deg", "aspecular_deg", "in_plane", "X", "Y", "Z", "L", "a", "b", "C", "h",
            "srgb", "hex", "in_gamut", "reflectance_factor"]
    for i, g in enumerate(doc["geometries"]):
        assert m["name"][i] == g["name"]
        for k in keys:
            value = m[k][i]
            assert (value.tolist() if hasattr(value, "tolist") else value) == g[k], k
    for k in ("flop_index", "flop_note", "hue_travel_deg", "surface_gloss_Y", "wavelength_nm"):
        assert (k in m) == (k in doc), k
        if k in m:
            v = m[k]
            assert (v.tolist() if hasattr(v, "tolist") else v) == doc[k], k


def test_sweep_is_the_cli_sweep_and_its_shards(cli):
    path = SCENES / "teal_label_foil.json"
    lines = cli("sweep", path, "--samples", "500", "--seed", "7", "--target-lab", "60,20,-30").stdout
    expected = [json.loads(l) for l in lines.splitlines()]
    scene = lamella.Scene.load(path)
    cols = lamella.sweep(scene, samples=500, seed=7, target_lab=(60, 20, -30), as_frame=False)
    assert cols["index"].tolist() == [e["index"] for e in expected]
    assert cols["thicknesses_nm"].tolist() == [e["thicknesses_nm"] for e in expected]
    for k in ("L", "a", "b", "delta_e00"):
        assert cols[k].tolist() == [e[k] for e in expected]
    assert cols["srgb"].tolist() == [e["srgb"] for e in expected]
    assert cols["hex"] == [e["hex"] for e in expected]
    # A shard is the CLI's shard.
    part = cli("sweep", path, "--samples", "500", "--seed", "7", "--shard", "2/3").stdout
    mine = lamella.sweep(scene, samples=500, seed=7, shard=(2, 3))
    assert mine["index"].tolist() == [json.loads(l)["index"] for l in part.splitlines()]
    assert mine["L"].tolist() == [json.loads(l)["L"] for l in part.splitlines()]


def test_sweep_grid_table_feeds_with_thicknesses():
    scene = lamella.Scene.load(SCENES / "teal_label_foil.json")
    frame = lamella.sweep(scene, grid=3)
    assert len(frame) == 9
    pointers = [v["pointer"] for v in scene.variables]
    row = frame.iloc[4]
    moved = scene.with_thicknesses({p: row[p] for p in pointers})
    c = moved.color()
    assert c.L[0] == row["L"] and c.hex[0] == row["hex"]


def test_design_tools_refuse_bad_options():
    scene = lamella.Scene.load(SCENES / "teal_label_foil.json")
    with pytest.raises(lamella.SceneError, match="target_lab"):
        lamella.match(scene)
    with pytest.raises(lamella.SceneError, match="target_hex"):
        lamella.match(scene, target_hex="#12345")
    with pytest.raises(lamella.SceneError, match="max_total_nm"):
        lamella.match(scene, target_lab=(60, 20, -30), max_total_nm=10)
    with pytest.raises(lamella.SceneError, match="sigma"):
        lamella.tolerance(scene)
    with pytest.raises(lamella.SceneError, match="yield_geometries"):
        lamella.tolerance(scene, sigma_nm=2, yield_geometries=["45as15"])
    with pytest.raises(lamella.SceneError, match="samples"):
        lamella.sweep(scene, samples=0)
    with pytest.raises(lamella.SceneError, match="shard"):
        lamella.sweep(scene, samples=10, shard=(4, 3))
    plain = lamella.Scene.from_dict({"stack": [{"material": "sio2", "thickness_nm": 90}], "substrate": "bk7"})
    with pytest.raises(lamella.SceneError, match="vary_nm"):
        lamella.sweep(plain, samples=10)
    with pytest.raises(lamella.SceneError, match="coating"):
        lamella.multiangle(scene)
