//! The `spectrum` and `materials` commands end to end, and bad input: exit code
//! 2 with one line naming the file, key and value, never a panic.

mod common;

use common::{lamella, temp_dir};

use std::path::{Path, PathBuf};

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

const GOOD: &str = r#"{
  "title": "two-layer test",
  "incident": "air",
  "stack": [
    {"material": "hi", "thickness_nm": 58.0},
    {"repeat": 3, "stack": [
      {"material": "lo", "thickness_nm": 94.0},
      {"material": "hi", "thickness_nm": 58.0, "vary_nm": [20, 200]}
    ]}
  ],
  "substrate": "glass",
  "materials": {"hi": {"n": 2.35, "k": 0.0}, "lo": {"n": 1.46}, "glass": {"n": 1.52}},
  "wavelengths_nm": {"from": 400, "to": 700, "step": 50},
  "angles_deg": {"from": 0, "to": 60, "step": 30},
  "illuminant": "D65",
  "observer": "CIE1931_2"
}"#;

#[test]
fn csv_has_the_contract_header_and_a_row_per_angle_and_wavelength() {
    let dir = temp_dir("csv");
    let scene = write(&dir, "s.json", GOOD);
    let out = lamella(&["spectrum", scene.to_str().unwrap(), "--format", "csv"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let mut lines = text.lines();
    assert_eq!(
        lines.next().unwrap(),
        "wavelength_nm,angle_deg,R_s,R_p,R,T_s,T_p,T,A"
    );
    let rows: Vec<Vec<f64>> = lines
        .map(|l| l.split(',').map(|v| v.parse().unwrap()).collect())
        .collect();
    assert_eq!(rows.len(), 7 * 3);
    // Angles are the outer loop; R is the mean of R_s and R_p; nothing in
    // this stack absorbs, so A is 0 exactly and R + T = 1 to rounding.
    assert_eq!((rows[0][0], rows[0][1]), (400.0, 0.0));
    assert_eq!((rows[7][0], rows[7][1]), (400.0, 30.0));
    for r in &rows {
        assert!((r[4] - 0.5 * (r[2] + r[3])).abs() < 1e-15);
        assert_eq!(r[8], 0.0);
        assert!((r[4] + r[7] - 1.0).abs() < 1e-13);
    }
}

#[test]
fn absorbing_stacks_report_a_as_one_minus_r_minus_t() {
    let dir = temp_dir("absorbing");
    let scene = write(
        &dir,
        "s.json",
        &GOOD.replace(
            r#""hi": {"n": 2.35, "k": 0.0}"#,
            r#""hi": {"n": 2.35, "k": 0.05}"#,
        ),
    );
    let out = lamella(&["spectrum", scene.to_str().unwrap()]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    for line in text.lines().skip(1) {
        let r: Vec<f64> = line.split(',').map(|v| v.parse().unwrap()).collect();
        assert!(r[8] > 1e-3 && r[8] == 1.0 - r[4] - r[7], "{line}");
    }
}

#[test]
fn output_file_is_written_and_json_matches_csv() {
    let dir = temp_dir("json");
    let scene = write(&dir, "s.json", GOOD);
    let target = dir.join("out.json");
    let out = lamella(&[
        "spectrum",
        scene.to_str().unwrap(),
        "--format",
        "json",
        "-o",
        target.to_str().unwrap(),
    ]);
    assert!(out.status.success() && out.stdout.is_empty());
    let doc: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&target).unwrap()).unwrap();
    assert_eq!(doc["wavelength_nm"].as_array().unwrap().len(), 7);
    assert_eq!(doc["angle_deg"].as_array().unwrap().len(), 3);
    let csv = String::from_utf8(lamella(&["spectrum", scene.to_str().unwrap()]).stdout).unwrap();
    let second: Vec<f64> = csv
        .lines()
        .nth(2)
        .unwrap()
        .split(',')
        .map(|v| v.parse().unwrap())
        .collect();
    assert_eq!(doc["R_p"][0][1].as_f64().unwrap(), second[3]);
    // No temporary files are left beside the output.
    let leftovers = std::fs::read_dir(&dir)
        .unwrap()
        .filter(|e| {
            e.as_ref()
                .unwrap()
                .file_name()
                .to_string_lossy()
                .ends_with(".tmp")
        })
        .count();
    assert_eq!(leftovers, 0);
}

#[test]
fn materials_lists_the_library_with_sources() {
    let out = lamella(&["materials"]);
    let text = String::from_utf8(out.stdout).unwrap();
    for name in [
        "air",
        "tio2",
        "mgf2",
        "chitin",
        "guanine",
        "melanin",
        "silver",
        "gold",
        "chromium",
        "aluminium",
    ] {
        assert!(text.lines().any(|l| l.starts_with(name)), "{name} missing");
    }
    assert!(text.contains("Malitson") && text.contains("Rakić"));
}

/// Each bad scene must fail with exit code 2 and a single stderr line that
/// names the file and contains the given fragment (the key or value).
#[test]
fn bad_input_exits_2_with_one_line() {
    let dir = temp_dir("bad");
    write(
        &dir,
        "bad_table.csv",
        "wavelength_nm,n,k\n400,1.5,0\n500,abc,0\n",
    );
    write(
        &dir,
        "short_table.csv",
        "wavelength_nm,n,k\n500,1.5,0\n600,1.6,0\n",
    );
    let with = |patch: &str| GOOD.replacen("\"title\": \"two-layer test\",", patch, 1);
    let cases: Vec<(String, &str)> = vec![
        ("{ not json".into(), "malformed JSON"),
        (GOOD.replace("\"material\": \"lo\"", "\"material\": \"unobtainium\""), "unobtainium"),
        (GOOD.replace("\"thickness_nm\": 94.0", "\"thickness_nm\": -94.0"), "stack[1].stack[0].thickness_nm"),
        (GOOD.replace("\"step\": 50", "\"step\": 0"), "wavelengths_nm.step"),
        (GOOD.replace("\"from\": 400, \"to\": 700", "\"from\": 700, \"to\": 400"), "wavelengths_nm.to"),
        (GOOD.replace("\"to\": 60", "\"to\": 90"), "angles_deg"),
        (GOOD.replace("\"incident\": \"air\"", "\"incident\": \"ink\"").replace("\"glass\": {", "\"ink\": {\"n\": 1.5, \"k\": 0.1}, \"glass\": {"), "incident"),
        (GOOD.replace("\"repeat\": 3", "\"repeat\": 0"), "repeat"),
        (GOOD.replace("\"repeat\": 3", "\"repeat\": 1000000000000"), "repeat"),
        (GOOD.replace("\"repeat\": 3", "\"repeat\": 2.5"), "repeat"),
        (GOOD.replace("\"lo\": {\"n\": 1.46}", "\"lo\": {\"table\": \"missing.csv\"}"), "materials.lo.table"),
        (GOOD.replace("\"lo\": {\"n\": 1.46}", "\"lo\": {\"table\": \"bad_table.csv\"}"), "abc"),
        (GOOD.replace("\"lo\": {\"n\": 1.46}", "\"lo\": {\"table\": \"short_table.csv\"}"), "outside the material's table"),
        (GOOD.replace("\"thickness_nm\": 58.0}", "\"thickness\": 58.0}"), "thickness"),
        (GOOD.replace("\"angles_deg\": {\"from\": 0, \"to\": 60, \"step\": 30}", "\"angles_deg\": \"lots\""), "angles_deg"),
        (GOOD.replace("\"lo\": {\"n\": 1.46}", "\"lo\": {\"n\": -1.46}"), "materials.lo"),
        (GOOD.replace("\"lo\": {\"n\": 1.46}", "\"lo\": {\"n\": 1.46, \"k\": -0.2}"), "materials.lo"),
        (GOOD.replace("\"substrate\": \"glass\"", "\"substrate\": {\"material\": \"glass\", \"thickness_um\": 0}"), "substrate.thickness_um"),
        (GOOD.replace("\"lo\": {\"n\": 1.46}", "\"lo\": {\"mix\": \"bruggeman\", \"host\": \"lo\", \"guest\": \"air\", \"fraction\": 0.3}"), "refers to itself"),
        (GOOD.replace("\"lo\": {\"n\": 1.46}", "\"lo\": {\"mix\": \"bruggeman\", \"host\": \"hi\", \"guest\": \"air\", \"fraction\": 1.3}"), "fraction"),
        (GOOD.replace("\"stack\": [\n    {\"material\": \"hi\", \"thickness_nm\": 58.0},", "\"stack\": [\n    {\"material\": \"hi\", \"thickness_nm\": 1e999},"), "malformed JSON"),
        (with("\"disorder\": {\"sigma_nm\": 3, \"realizations\": 0},"), "disorder.realizations"),
        (with("\"wobble\": 3,"), "wobble"),
    ];
    for (i, (text, fragment)) in cases.iter().enumerate() {
        let scene = write(&dir, &format!("bad{i}.json"), text);
        let out = lamella(&["spectrum", scene.to_str().unwrap()]);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "case {i}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "case {i}: {err}");
        assert!(
            err.contains(&format!("bad{i}.json")) && err.contains(fragment),
            "case {i}: expected {fragment:?} in {err}"
        );
        assert!(!err.contains("panicked"), "case {i}: {err}");
    }
    let missing = lamella(&["spectrum", dir.join("nope.json").to_str().unwrap()]);
    assert_eq!(missing.status.code(), Some(2));
    let bad_flag = lamella(&["spectrum", "x.json", "--format", "xml"]);
    assert_eq!(bad_flag.status.code(), Some(2));
}
