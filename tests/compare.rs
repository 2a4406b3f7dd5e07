//! `lamella compare`: against itself every ΔE is 0; against a changed scene
//! the ΔE2000 is that of the two `lamella color` results (Sharma, Wu & Dalal
//! 2005 formula, `colorimetry::delta_e2000`); tolerances decide the exit
//! code; bad input exits 2 with one line naming the file, key and value.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use lamella::colorimetry::delta_e2000;
use serde_json::Value;

const FOIL: &str = "scenes/teal_label_foil.json";
const BATCH: &str = "scenes/measured/teal_label_foil_batch.csv";

fn lamella(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_lamella"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(args)
        .output()
        .unwrap()
}

fn json(out: &Output) -> Value {
    serde_json::from_slice(&out.stdout)
        .unwrap_or_else(|e| panic!("{e}: {}", String::from_utf8_lossy(&out.stderr)))
}

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("lamella-compare-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

/// The foil scene with the first ZnS layer changed, at three angles.
fn changed_foil(zns_nm: f64) -> PathBuf {
    let text = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(FOIL)).unwrap();
    let mut doc: Value = serde_json::from_str(&text).unwrap();
    doc["stack"][0]["stack"][0]["thickness_nm"] = zns_nm.into();
    doc["angles_deg"] = serde_json::json!([0, 15, 45]);
    let path = scratch(&format!("foil-{zns_nm}.json"));
    std::fs::write(&path, doc.to_string()).unwrap();
    path
}

#[test]
fn a_scene_against_itself_differs_by_nothing() {
    let out = lamella(&[
        "compare",
        FOIL,
        FOIL,
        "--format",
        "json",
        "--tolerance",
        "0",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let v = json(&out);
    assert_eq!(v["pass"], true);
    let points = v["points"].as_array().unwrap();
    assert_eq!(points.len(), 16);
    for p in points {
        for k in [
            "delta_e00",
            "delta_e76",
            "delta_e94",
            "delta_e_cmc",
            "dL",
            "dC",
            "dH",
        ] {
            assert_eq!(p[k], 0.0, "{k}: {p}");
        }
        assert_eq!(p["limit"], 0.0);
        assert_eq!(p["description"], "same lightness, same chroma, same hue");
    }
}

#[test]
fn a_changed_scene_differs_by_the_delta_e00_of_its_colours() {
    let (a, b) = (changed_foil(157.0), changed_foil(160.0));
    let (a, b) = (a.to_str().unwrap(), b.to_str().unwrap());
    let v = json(&lamella(&[
        "compare",
        a,
        b,
        "--format",
        "json",
        "--observer",
        "CIE1964_10",
    ]));
    let colour = |s: &str| {
        json(&lamella(&[
            "color",
            s,
            "--format",
            "json",
            "--observer",
            "CIE1964_10",
        ]))
    };
    let (ca, cb) = (colour(a), colour(b));
    let lab = |c: &Value| {
        [
            c["L"].as_f64().unwrap(),
            c["a"].as_f64().unwrap(),
            c["b"].as_f64().unwrap(),
        ]
    };
    let points = v["points"].as_array().unwrap();
    assert_eq!(points.len(), 3);
    for (i, p) in points.iter().enumerate() {
        let want = delta_e2000(lab(&ca[i]), lab(&cb[i]));
        assert!(want > 0.5, "{want}");
        assert_eq!(p["delta_e00"].as_f64().unwrap(), want, "{p}");
        assert_eq!(p["reference"]["hex"], ca[i]["hex"]);
        assert!(p.get("limit").is_none(), "no tolerance, no limit: {p}");
    }
    assert_eq!(v["pass"], true);
    // The same pair judged by a tolerance below its difference fails with exit code 3.
    let out = lamella(&["compare", a, b, "--tolerance", "0.2", "--format", "csv"]);
    assert_eq!(out.status.code(), Some(3));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("outside tolerance at 3 of 3 points"), "{err}");
    let csv = String::from_utf8_lossy(&out.stdout);
    assert!(
        csv.starts_with("angle_deg,delta_e00,") && csv.contains(",false,"),
        "{csv}"
    );
}

#[test]
fn measured_batch_against_its_design_with_tolerances_per_angle() {
    let tolerances = "scenes/measured/teal_label_foil_tolerances.json";
    let out = lamella(&[
        "compare",
        FOIL,
        BATCH,
        "--tolerances",
        tolerances,
        "--format",
        "json",
        "--check-illuminant",
        "A",
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v = json(&out);
    let points = v["points"].as_array().unwrap();
    let angles: Vec<f64> = points
        .iter()
        .map(|p| p["angle_deg"].as_f64().unwrap())
        .collect();
    assert_eq!(angles, [0.0, 15.0, 45.0]);
    assert_eq!(points[2]["limit"], 1.5);
    assert!(
        points
            .iter()
            .all(|p| p["check"]["delta_e00"].as_f64().unwrap() > 0.0)
    );
    assert_eq!(v["check_illuminant"], "A");
    // Tighter limits by CMC fail.
    let strict = scratch("strict.json");
    std::fs::write(
        &strict,
        r#"{"formula": "cmc", "limits": {"45": 0.1}, "default": 5}"#,
    )
    .unwrap();
    let out = lamella(&[
        "compare",
        FOIL,
        BATCH,
        "--tolerances",
        strict.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(3));
    let table = String::from_utf8_lossy(&out.stdout);
    assert!(table.contains("FAIL") && table.contains("pass"), "{table}");
}

#[test]
fn report_page_holds_swatches_table_spectra_and_cautions() {
    let dir = scratch("report");
    let out = lamella(&[
        "compare",
        FOIL,
        BATCH,
        "--tolerance",
        "1",
        "--report",
        dir.to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let html = std::fs::read_to_string(dir.join("index.html")).unwrap();
    for want in [
        "Colour sign-off",
        "<svg",
        "ΔE00",
        "class=pair",
        "lamella compare",
        lamella::report::CAUTIONS[0],
    ] {
        assert!(html.contains(want), "{want}");
    }
    assert_eq!(html.matches("<svg").count(), 3);
}

#[test]
fn bad_input_exits_2_naming_file_key_and_value() {
    let unknown = scratch("unknown.json");
    std::fs::write(&unknown, r#"{"limits": {"0": 1, "30": 1}}"#).unwrap();
    let negative = scratch("negative.json");
    std::fs::write(&negative, r#"{"limits": {"0": -1}}"#).unwrap();
    let missing = scratch("missing.json");
    std::fs::write(&missing, r#"{"limits": {"0": 1}}"#).unwrap();
    let other = scratch("other-angles.csv");
    std::fs::write(&other, "wavelength_nm,R,angle_deg\n500,0.1,7\n510,0.1,7\n").unwrap();
    let (u, n, m, o) = (
        unknown.to_str().unwrap(),
        negative.to_str().unwrap(),
        missing.to_str().unwrap(),
        other.to_str().unwrap(),
    );
    for (args, want) in [
        (vec![BATCH, BATCH, "--tolerances", u], format!("{u}: limits.30 = 1: no such angle or geometry in both")),
        (vec![BATCH, BATCH, "--tolerances", n], format!("{n}: limits.0 = -1: a tolerance is a colour difference ≥ 0")),
        (vec![BATCH, BATCH, "--tolerances", m], format!("{m}: limits.15 = (missing): no limit for this point")),
        (vec![BATCH, BATCH, "--tolerance", "-0.5"], "--tolerance = -0.5: a tolerance is".into()),
        (vec![BATCH, o], "points = REFERENCE: angle 0°, angle 15°, angle 45°; SAMPLE: angle 7°: REFERENCE and SAMPLE have no angle or geometry in common".into()),
        (vec![BATCH, BATCH, "--kl", "0"], "kl = 0: a weighting factor must be positive".into()),
    ] {
        let mut all = vec!["compare"];
        all.extend(args.iter().copied());
        let out = lamella(&all);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{all:?}: {err}");
        assert!(err.contains(&want), "{all:?}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    }
}

/// A tolerance file with only a `default` sets every point's limit; a key
/// given twice, two keys for one angle and a negative default are refused
/// with one line naming the file, key and value.
#[test]
fn tolerance_files_with_a_default_alone_and_their_refusals() {
    let only = scratch("default-only.json");
    std::fs::write(&only, r#"{"formula": "de76", "default": 0.5}"#).unwrap();
    let out = lamella(&[
        "compare",
        BATCH,
        BATCH,
        "--tolerances",
        only.to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let doc = json(&out);
    let limits: Vec<f64> = doc["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["limit"].as_f64().unwrap())
        .collect();
    assert_eq!(limits, [0.5, 0.5, 0.5]);
    let cases = [
        (
            r#"{"limits": {"0": 1, "0": 5}, "default": 1}"#,
            "limits.0 = (given again at line 1, column 23): duplicate key",
        ),
        (
            r#"{"limits": {"0": 1, "0.0": 2}, "default": 1}"#,
            "limits.0.0 = 2: a second limit for angle 0° (limits.0 gives one)",
        ),
        (
            r#"{"default": -1}"#,
            "default = -1: a tolerance is a colour difference ≥ 0",
        ),
        (
            r#"{"formula": "de00"}"#,
            "limits = (missing): expected an object of limits",
        ),
    ];
    for (i, (text, want)) in cases.iter().enumerate() {
        let path = scratch(&format!("tolerances-{i}.json"));
        std::fs::write(&path, text).unwrap();
        let p = path.to_str().unwrap();
        let out = lamella(&["compare", BATCH, BATCH, "--tolerances", p]);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{text}: {err}");
        assert!(err.contains(&format!("{p}: {want}")), "{text}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    }
}
