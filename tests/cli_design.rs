//! The design commands end to end: reports, written scenes, bad input.

mod common;

use common::lamella;

const SCENE: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/bench/design_5layer.json");

fn tmp(name: &str) -> String {
    let dir = std::env::temp_dir().join(format!("lamella-design-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name).to_string_lossy().into_owned()
}

#[test]
fn match_writes_report_and_scene() {
    let out_scene = tmp("matched.json");
    let o = lamella(&[
        "match",
        SCENE,
        "--target-lab",
        "60,20,-30",
        "--out-scene",
        &out_scene,
        "--format",
        "json",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let r: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for key in [
        "delta_e00",
        "reachable",
        "goals",
        "thicknesses_nm",
        "evaluations",
        "wall_time_s",
        "seed",
    ] {
        assert!(!r[key].is_null(), "missing {key}");
    }
    assert!(r["delta_e00"].as_f64().unwrap() <= 1.0 && r["reachable"] == true);
    // The written scene colours as reported.
    let c = lamella(&["color", &out_scene, "--format", "json"]);
    let colours: serde_json::Value = serde_json::from_slice(&c.stdout).unwrap();
    let achieved = &r["goals"][0]["achieved"];
    assert!((colours[0]["L"].as_f64().unwrap() - achieved["L"].as_f64().unwrap()).abs() < 1e-9);
    // Same seed, same design.
    let again = lamella(&[
        "match",
        SCENE,
        "--target-lab",
        "60,20,-30",
        "--out-scene",
        &out_scene,
    ]);
    let r2: serde_json::Value = serde_json::from_slice(&again.stdout).unwrap();
    assert_eq!(r["thicknesses_nm"], r2["thicknesses_nm"]);
}

/// An unreachable target: exit code 3, the closest design still written and
/// reported, and the search ended by the stop rule, not the budget.
#[test]
fn unreachable_target_exits_3_and_keeps_the_result() {
    let out_scene = tmp("far.json");
    let _ = std::fs::remove_file(&out_scene);
    let o = lamella(&[
        "match",
        SCENE,
        "--target-lab",
        "20,80,80",
        "--out-scene",
        &out_scene,
    ]);
    assert_eq!(o.status.code(), Some(3));
    let r: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(r["reachable"], false);
    assert!(r["delta_e00"].as_f64().unwrap() > 1.0);
    assert_eq!(r["stopped"], "no_improvement");
    assert!(r["evaluations"].as_u64().unwrap() < r["max_evals"].as_u64().unwrap());
    assert!(std::path::Path::new(&out_scene).exists());
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("not reached") && err.trim_end().lines().count() == 1,
        "{err}"
    );
    // The exit codes are documented in the help.
    let help = String::from_utf8(lamella(&["match", "--help"]).stdout).unwrap();
    assert!(
        help.contains("Exit codes") && help.contains("3 it was not"),
        "{help}"
    );
}

/// A thickness limit the bounds cannot meet (three periods of at least
/// 120 + 220 nm plus a fixed 157 nm layer: 1177 nm) is refused at once with
/// exit code 2, naming the limit and the smallest total; nothing is written.
#[test]
fn infeasible_thickness_limit_exits_2() {
    let teal = concat!(env!("CARGO_MANIFEST_DIR"), "/scenes/teal_label_foil.json");
    let out_scene = tmp("never-teal.json");
    let o = lamella(&[
        "match",
        teal,
        "--target-hex",
        "#3366CC",
        "--max-total-nm",
        "900",
        "--out-scene",
        &out_scene,
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("--max-total-nm 900") && err.contains("1177 nm"),
        "{err}"
    );
    assert!(o.stdout.is_empty() && !std::path::Path::new(&out_scene).exists());
}

/// A scene whose colour could not be computed (an index of 1e200 would
/// overflow) is refused when it is read: every design command exits 2 with
/// one line naming the material, and prints no number. (Colours that are not
/// finite are refused with exit 1 naming the angle: tests/design.rs.)
#[test]
fn unphysical_index_is_refused_by_every_design_tool() {
    let scene = tmp("huge.json");
    std::fs::write(
        &scene,
        r#"{"materials": {"huge": {"n": 1e200}, "glass": {"n": 1.52}},
 "stack": [{"material": "huge", "thickness_nm": 100, "vary_nm": [50, 150]}],
 "substrate": "glass", "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
 "angles_deg": [0, 30]}"#,
    )
    .unwrap();
    let measured = tmp("huge.csv");
    std::fs::write(
        &measured,
        "wavelength_nm,R\n400,0.1\n500,0.2\n600,0.1\n700,0.3\n",
    )
    .unwrap();
    let out = tmp("huge-out.json");
    for args in [
        vec![
            "match",
            &scene,
            "--target-lab",
            "50,0,0",
            "--max-evals",
            "200",
            "--out-scene",
            &out,
        ],
        vec!["tolerance", &scene, "--sigma-nm", "1", "--samples", "10"],
        vec!["sweep", &scene, "--grid", "3"],
        vec![
            "fit",
            &scene,
            "--measured",
            &measured,
            "--max-evals",
            "200",
            "--out-scene",
            &out,
        ],
    ] {
        let o = lamella(&args);
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {err}");
        assert!(
            err.contains("materials.huge")
                && err.contains("1e200")
                && err.trim_end().lines().count() == 1,
            "{err}"
        );
        assert!(o.stdout.is_empty(), "{args:?}");
    }
}

#[test]
fn tolerance_fit_and_sweep_run() {
    let t = lamella(&[
        "tolerance",
        SCENE,
        "--sigma-pct",
        "1",
        "--samples",
        "100",
        "--format",
        "json",
    ]);
    assert!(t.status.success());
    let r: serde_json::Value = serde_json::from_slice(&t.stdout).unwrap();
    for key in [
        "delta_e00_p50",
        "delta_e00_p95",
        "delta_e00_max",
        "yield",
        "sensitivity",
        "angles",
    ] {
        assert!(!r[key].is_null(), "missing {key}");
    }
    let csv = tmp("measured.csv");
    let spectrum = lamella(&["spectrum", SCENE]);
    let text = String::from_utf8(spectrum.stdout).unwrap();
    let mut rows = String::from("wavelength_nm,angle_deg,R\n");
    for line in text.lines().skip(1) {
        let cells: Vec<&str> = line.split(',').collect();
        let angle: f64 = cells[1].parse().unwrap();
        if angle == 0.0 || angle == 30.0 {
            rows.push_str(&format!("{},{},{}\n", cells[0], cells[1], cells[4]));
        }
    }
    std::fs::write(&csv, rows).unwrap();
    let fitted = tmp("fitted.json");
    let f = lamella(&[
        "fit",
        SCENE,
        "--measured",
        &csv,
        "--out-scene",
        &fitted,
        "--format",
        "json",
    ]);
    assert!(f.status.success(), "{}", String::from_utf8_lossy(&f.stderr));
    let r: serde_json::Value = serde_json::from_slice(&f.stdout).unwrap();
    assert!(r["rms"].as_f64().unwrap() < 1e-3, "{r}");
    let lines = tmp("sweep.jsonl");
    let s = lamella(&[
        "sweep",
        SCENE,
        "--grid",
        "2",
        "--target-hex",
        "#3366CC",
        "--shard",
        "2/2",
        "-o",
        &lines,
    ]);
    assert!(s.status.success());
    assert_eq!(std::fs::read_to_string(&lines).unwrap().lines().count(), 16);
}

#[test]
fn bad_input_exits_2() {
    let out = tmp("never.json");
    for args in [
        vec!["match", SCENE, "--out-scene", &out],
        vec![
            "match",
            SCENE,
            "--target-hex",
            "#12345",
            "--out-scene",
            &out,
        ],
        vec!["match", SCENE, "--target-lab", "1,2", "--out-scene", &out],
        vec![
            "match",
            SCENE,
            "--target-lab",
            "50,0,0",
            "--goal",
            "x:1,2,3",
            "--out-scene",
            &out,
        ],
        vec!["sweep", SCENE, "--grid", "3", "--shard", "0/2"],
        vec!["sweep", SCENE, "--grid", "0"],
        vec!["tolerance", SCENE, "--samples", "10"],
        vec![
            "tolerance",
            SCENE,
            "--sigma-nm",
            "1",
            "--yield-angles",
            "20",
        ],
        vec![
            "tolerance",
            SCENE,
            "--sigma-nm",
            "1",
            "--yield-angles",
            "0,x",
        ],
        vec![
            "tolerance",
            SCENE,
            "--sigma-nm",
            "1",
            "--yield-geometries",
            "45as15",
        ],
        vec![
            "match",
            SCENE,
            "--target-lab",
            "120,0,0",
            "--out-scene",
            &out,
        ],
        vec![
            "match",
            SCENE,
            "--target-lab",
            "50,0,0",
            "--max-evals",
            "0",
            "--out-scene",
            &out,
        ],
        vec![
            "fit",
            SCENE,
            "--measured",
            "/nonexistent.csv",
            "--out-scene",
            &out,
        ],
    ] {
        let o = lamella(&args);
        assert_eq!(
            o.status.code(),
            Some(2),
            "{args:?}: {}",
            String::from_utf8_lossy(&o.stderr)
        );
    }
}

/// Readings in percent are refused with the file, line, value and a hint.
#[test]
fn percent_readings_exit_2() {
    let csv = tmp("percent.csv");
    std::fs::write(&csv, "wavelength_nm,R\n400,0.5\n410,15.4\n").unwrap();
    let o = lamella(&[
        "fit",
        SCENE,
        "--measured",
        &csv,
        "--out-scene",
        &tmp("never-fit.json"),
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("percent.csv")
            && err.contains("line 3")
            && err.contains("15.4")
            && err.contains("looks like percent: divide by 100"),
        "{err}"
    );
}

/// `--yield-angles` picks the angles of the overall yield (all still
/// reported); `--per-period` gives every deposited layer its own error.
#[test]
fn tolerance_yield_angles_and_per_period() {
    let o = lamella(&[
        "tolerance",
        SCENE,
        "--sigma-nm",
        "2",
        "--samples",
        "50",
        "--yield-angles",
        "0,30",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let r: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(r["yield_angles_deg"], serde_json::json!([0.0, 30.0]));
    let in_yield: Vec<bool> = r["angles"]
        .as_array()
        .unwrap()
        .iter()
        .map(|a| a["in_yield"].as_bool().unwrap())
        .collect();
    assert_eq!(in_yield, [true, false, true, false, false]);
    let teal = concat!(env!("CARGO_MANIFEST_DIR"), "/scenes/teal_label_foil.json");
    let o = lamella(&[
        "tolerance",
        teal,
        "--sigma-nm",
        "2",
        "--samples",
        "20",
        "--per-period",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let r: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(r["per_period"], true);
    assert_eq!(r["deposited_layers"], 7);
    assert_eq!(r["sensitivity"].as_array().unwrap().len(), 3);
}
