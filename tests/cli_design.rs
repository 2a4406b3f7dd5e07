//! The design commands end to end: reports, written scenes, bad input.

use std::process::Command;

const SCENE: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/bench/design_5layer.json");

fn lamella(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_lamella"))
        .args(args)
        .output()
        .unwrap()
}

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

#[test]
fn unreachable_target_is_reported() {
    let out_scene = tmp("far.json");
    let o = lamella(&[
        "match",
        SCENE,
        "--target-lab",
        "20,80,80",
        "--out-scene",
        &out_scene,
        "--max-evals",
        "3000",
    ]);
    assert!(o.status.success());
    let r: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(r["reachable"], false);
    assert!(r["delta_e00"].as_f64().unwrap() > 1.0);
    assert!(String::from_utf8_lossy(&o.stderr).contains("not reached"));
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
