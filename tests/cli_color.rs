//! The `color` command end to end.

mod common;

use common::lamella;

fn scene_file(name: &str, text: &str) -> String {
    let dir = std::env::temp_dir().join(format!("lamella-color-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.to_string_lossy().into_owned()
}

/// Total internal reflection is a perfect mirror (Born & Wolf, *Principles of
/// Optics*, §1.5.4), so it must give the perfect reflector's colour: Lab
/// (100, 0, 0), sRGB (1, 1, 1), #FFFFFF under every illuminant (the CIELAB
/// white is the perfect reflector on the same grid, CIE 015:2018 §8).
#[test]
fn total_internal_reflection_is_white() {
    let s = scene_file(
        "tir.json",
        r#"{"incident": "prism", "stack": [{"material": "hi", "thickness_nm": 80}], "substrate": "air",
            "materials": {"prism": {"n": 1.5}, "hi": {"n": 2.2}},
            "wavelengths_nm": {"from": 380, "to": 780, "step": 5}, "angles_deg": [50, 60, 70]}"#,
    );
    for illuminant in ["D65", "A", "F11"] {
        let out = lamella(&["color", &s, "--format", "json", "--illuminant", illuminant]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let records: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        for r in records.as_array().unwrap() {
            assert!((r["L"].as_f64().unwrap() - 100.0).abs() < 1e-9, "{r}");
            assert!(r["a"].as_f64().unwrap().abs() < 1e-9 && r["b"].as_f64().unwrap().abs() < 1e-9);
            assert!((r["Y"].as_f64().unwrap() - 100.0).abs() < 1e-9);
            assert_eq!(r["hex"], "#FFFFFF");
            assert_eq!(r["in_gamut"], true);
        }
    }
}

#[test]
fn json_and_csv_carry_the_contract_keys() {
    let s = scene_file(
        "qw.json",
        r#"{"stack": [{"repeat": 4, "stack": [{"material": "tio2", "thickness_nm": 57}, {"material": "sio2_film", "thickness_nm": 94}]}],
            "substrate": "glass", "wavelengths_nm": {"from": 380, "to": 780, "step": 5}, "angles_deg": {"from": 0, "to": 60, "step": 20},
            "illuminant": "D50", "observer": "CIE1964_10"}"#,
    );
    let out = lamella(&["color", &s, "--format", "json"]);
    let records: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let records = records.as_array().unwrap();
    assert_eq!(records.len(), 4);
    for key in [
        "angle_deg",
        "X",
        "Y",
        "Z",
        "x",
        "y",
        "L",
        "a",
        "b",
        "srgb",
        "hex",
        "in_gamut",
        "C",
        "h",
    ] {
        assert!(records[0].get(key).is_some(), "missing {key}");
    }
    assert_eq!(records[0]["srgb"].as_array().unwrap().len(), 3);
    let hex = records[0]["hex"].as_str().unwrap();
    assert!(hex.len() == 7 && hex.starts_with('#'));
    let csv = String::from_utf8(lamella(&["color", &s, "--format", "csv"]).stdout).unwrap();
    let header = csv.lines().next().unwrap();
    assert!(header.starts_with("angle_deg,X,Y,Z,x,y,L,a,b,C,h,srgb_r,srgb_g,srgb_b,hex,in_gamut"));
    assert_eq!(csv.lines().count(), 5);
    // The table ends with the colour travel summary and has no escape codes when piped.
    let table = String::from_utf8(lamella(&["color", &s]).stdout).unwrap();
    assert!(table.contains("colour travel 0°→60°") && !table.contains('\x1b'));
}

/// A bare lossless glass plate seen in transmission: T is flat across the
/// visible (Hecht, *Optics*, Fresnel at two faces), so the colour is neutral.
#[test]
fn transmitted_side_of_clear_glass_is_neutral() {
    let s = scene_file(
        "plate.json",
        r#"{"stack": [], "substrate": {"material": "g", "thickness_um": 1000, "behind": "air"},
            "materials": {"g": {"n": 1.5}}, "wavelengths_nm": {"from": 380, "to": 780, "step": 5}, "angles_deg": [0]}"#,
    );
    let out = lamella(&["color", &s, "--format", "json", "--side", "transmit"]);
    let r: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let r = &r[0];
    let t = 2.0 * 1.5 / (1.5f64 * 1.5 + 1.0); // (1 − R₁)/(1 + R₁) for n = 1.5
    assert!((r["Y"].as_f64().unwrap() - 100.0 * t).abs() < 1e-9, "{r}");
    assert!(r["a"].as_f64().unwrap().abs() < 1e-9 && r["b"].as_f64().unwrap().abs() < 1e-9);
}

#[test]
fn bad_viewing_options_exit_2() {
    let s = scene_file("ok.json", r#"{"stack": [], "substrate": "glass"}"#);
    for args in [
        vec!["color", &s, "--illuminant", "D99"],
        vec!["color", &s, "--observer", "CIE2031_5"],
        vec!["color", &s, "--illuminant", "/nonexistent/booth.csv"],
    ] {
        let out = lamella(&args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        assert_eq!(
            String::from_utf8_lossy(&out.stderr)
                .trim_end()
                .lines()
                .count(),
            1
        );
    }
    // Values outside a flag's choices are refused by the argument parser.
    assert_eq!(
        lamella(&["color", &s, "--side", "sideways"]).status.code(),
        Some(2)
    );
    let bad_scene = scene_file(
        "bad_obs.json",
        r#"{"stack": [], "substrate": "glass", "observer": "owl"}"#,
    );
    let out = lamella(&["color", &bad_scene]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("observer"));
}
