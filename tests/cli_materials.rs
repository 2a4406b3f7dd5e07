//! `lamella materials`: the library as a table, CSV or JSON, and one
//! material's n and k against wavelength, equal to the engine's model.

mod common;

use common::lamella;
use lamella::materials::library;

#[test]
fn a_material_is_tabulated_as_the_engine_computes_it() {
    let out = lamella(&[
        "materials",
        "melanin",
        "--wavelengths",
        "400:700:50",
        "--format",
        "csv",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8(out.stdout).unwrap();
    let mut lines = text.lines();
    assert_eq!(lines.next(), Some("wavelength_nm,n,k"));
    let melanin = library::find("melanin").unwrap();
    let mut count = 0;
    for line in lines {
        let v: Vec<f64> = line.split(',').map(|x| x.parse().unwrap()).collect();
        let z = melanin.dispersion.index(v[0]).unwrap();
        assert_eq!((v[1], v[2]), (z.re, z.im), "{line}");
        count += 1;
    }
    assert_eq!(count, 7);
    let json = lamella(&["materials", "gold", "--format", "json"]);
    let doc: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    // The default grid: the vouched range in 10 nm steps.
    assert_eq!(doc["wavelength_nm"][0], 248.0);
    assert_eq!(
        doc["n"].as_array().unwrap().len(),
        doc["k"].as_array().unwrap().len()
    );
}

#[test]
fn the_library_lists_every_material_in_every_format() {
    let all = library::all();
    let csv = lamella(&["materials", "--format", "csv"]);
    assert_eq!(
        String::from_utf8(csv.stdout).unwrap().lines().count(),
        all.len() + 1
    );
    let json = lamella(&["materials", "--format", "json"]);
    let doc: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    assert_eq!(doc.as_array().unwrap().len(), all.len());
    assert_eq!(doc[0]["name"], all[0].name.as_str());
}

#[test]
fn bad_materials_requests_exit_2_with_one_line() {
    for args in [
        &["materials", "unobtainium"][..],
        &["materials", "--wavelengths", "400:700:10"],
        &["materials", "glass", "--wavelengths", "700:400:10"],
        &["materials", "glass", "--wavelengths", "400-700"],
        &["materials", "glass", "--wavelengths", "0.1:0.5:0.1"],
    ] {
        let out = lamella(args);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
        assert_eq!(err.lines().count(), 1, "{err}");
    }
    // Outside the vouched range: tabulated, with a warning.
    let out = lamella(&["materials", "tio2", "--wavelengths", "300:320:20"]);
    assert_eq!(out.status.code(), Some(0));
    assert!(String::from_utf8_lossy(&out.stderr).contains("outside 380–1000 nm"));
}
