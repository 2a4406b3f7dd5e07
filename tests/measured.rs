//! The measured-data reader (`lamella::measured`): every accepted layout of
//! the same invented readings gives the spectra of the clean CSV, every
//! refusal names its line and value (and exits 2 at the command line), and
//! CGATS text written by lamella reads back to identical numbers. The CGATS
//! layout (ANSI CGATS.17 / ISO 28178:2009) is written from memory.

use std::path::Path;
use std::process::Command;

use lamella::design::coating::At;
use lamella::measured::{Measured, Quantity, ReadOptions, Reading, cgats, read};
use lamella::scene::WarningKind;

fn data(name: &str) -> String {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/measured")
        .join(name);
    String::from_utf8(std::fs::read(path).unwrap()).unwrap()
}

fn read_as(name: &str, percent: bool) -> Reading {
    let options = ReadOptions {
        default_angle_deg: 0.0,
        percent,
    };
    read(&data(name), &options).unwrap_or_else(|e| panic!("{name}: {e}"))
}

#[test]
fn every_layout_gives_the_clean_spectra() {
    let clean = read_as("clean.csv", false);
    assert_eq!(clean.groups.len(), 2);
    assert_eq!(clean.groups[1].at, At::Angle(45.0));
    assert_eq!(clean.groups[0].wavelengths_nm.len(), 16);
    assert!(clean.warnings.is_empty());
    for (name, percent) in [
        ("tab.tsv", false),
        ("semicolon_decimal_comma.csv", false),
        ("whitespace.txt", false),
        ("comments_preamble.csv", false),
        ("synonyms.csv", false),
        ("percent_header.csv", false),
        ("percent_flag.csv", true),
        ("bom.csv", false),
        ("crlf.csv", false),
        ("wide.csv", false),
        ("cgats.txt", false),
    ] {
        let got = read_as(name, percent);
        assert_eq!(got.groups, clean.groups, "{name}");
        assert_eq!(got.quantity, Quantity::Reflectance, "{name}");
        assert!(got.warnings.is_empty(), "{name}: {:?}", got.warnings);
    }
}

#[test]
fn small_negative_readings_are_kept_and_counted() {
    let r = read_as("negative_noise.csv", false);
    assert_eq!(r.groups[0].r[1], -0.004);
    assert_eq!(r.groups[0].r[2], -0.0125);
    assert_eq!(r.warnings.len(), 1);
    assert_eq!(r.warnings[0].kind, WarningKind::NegativeReadings);
    assert!(
        r.warnings[0]
            .message
            .starts_with("2 readings below 0 (lowest -0.0125)"),
        "{}",
        r.warnings[0]
    );
}

#[test]
fn transmittance_and_unknown_columns_are_read() {
    let r = read(
        "wavelength_nm,%T,sample_id\n500,45,a\n510,46,a\n",
        &ReadOptions::default(),
    )
    .unwrap();
    assert_eq!(r.quantity, Quantity::Transmittance);
    assert_eq!(r.groups[0].r, vec![0.45, 0.46]);
    assert_eq!(r.warnings[0].kind, WarningKind::IgnoredColumns);
    let g = read(
        "wavelength_nm,R@45as15,R@45as110\n500,0.5,0.1\n",
        &ReadOptions::default(),
    )
    .unwrap();
    assert_eq!(g.groups.len(), 2);
    assert_eq!(g.groups[1].at.geometry().unwrap().name, "45as110");
}

/// Each refusal names the line (`measured line N`) and the value as written.
#[test]
fn refusals_name_the_line_and_the_value() {
    for (text, want) in [
        (
            "wavelength_nm,R\n500,0.2\n510,0.2x\n",
            "measured line 3 = 0.2x: R is not a number",
        ),
        (
            "wavelength_nm,R\n500,0.2\n490,0.2\n",
            "measured line 3 = 490: wavelengths must increase",
        ),
        (
            "wavelength_nm,R\n500,0.2\n500,0.3\n",
            "measured line 3 = 500: wavelengths must increase",
        ),
        (
            "wavelength_nm,A\n500,0.2\n",
            "measured line 1 = wavelength_nm,A: needs an R column",
        ),
        (
            "wavelength_nm,R\n500,-0.03\n",
            "measured line 2 = -0.03: R below -0.02",
        ),
        (
            "wavelength_nm,R\n500,45.2\n",
            "measured line 2 = 45.2: R is a fraction",
        ),
        ("just,some,text\n", "measured = (no header)"),
        (
            "wavelength;R\n500;0,2;1\n",
            "measured line 2 = 500;0,2;1: expected 2 columns",
        ),
    ] {
        let e = read(text, &ReadOptions::default()).unwrap_err().to_string();
        assert!(e.starts_with(want), "{text:?}: {e}");
    }
    let cgats = data("cgats.txt").replace(" 9.12 4.89", " 9.12 x4.89");
    let e = read(&cgats, &ReadOptions::default())
        .unwrap_err()
        .to_string();
    assert!(
        e.starts_with("measured line 14 = x4.89: SPECTRAL_NM420 is not a number"),
        "{e}"
    );
    let e = read(
        &data("cgats.txt").replace("NUMBER_OF_SETS 2", "NUMBER_OF_SETS 3"),
        &ReadOptions::default(),
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.starts_with("measured NUMBER_OF_SETS = 3: the file has 2"),
        "{e}"
    );
}

/// Spectra written as CGATS read back to the same numbers, and writing them
/// again gives the same text.
#[test]
fn cgats_round_trip_is_exact() {
    let groups = vec![
        Measured {
            at: At::Angle(0.0),
            wavelengths_nm: vec![400.0, 412.5, 430.0],
            r: vec![0.1 + 0.2, 1.0 / 3.0, -0.0123456789],
        },
        Measured {
            at: At::Angle(45.0),
            wavelengths_nm: vec![400.0, 412.5, 430.0],
            r: vec![0.0, 0.987654321012, 1e-9],
        },
    ];
    let doc = cgats::spectra_document(
        "demo",
        "2031-04-02T00:00:00Z",
        Quantity::Reflectance,
        &groups,
    )
    .unwrap();
    let text = doc.write();
    let back = read(&text, &ReadOptions::default()).unwrap();
    assert_eq!(back.groups, groups);
    let again =
        cgats::spectra_document("demo", "2031-04-02T00:00:00Z", back.quantity, &back.groups)
            .unwrap()
            .write();
    assert_eq!(again, text);
    assert!(
        text.starts_with("CGATS.17\n") && text.contains("SPECTRAL_NM412.5"),
        "{text}"
    );
}

fn lamella(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_lamella"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(args)
        .output()
        .unwrap()
}

/// At the command line a refused file exits 2 with one line naming the file,
/// the line and the value.
#[test]
fn refused_files_exit_2_naming_file_line_and_value() {
    let dir = std::env::temp_dir().join(format!("lamella-measured-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    for (text, want) in [
        (
            "wavelength_nm,R\n500,0.2\n510,abc\n",
            "measured line 3 = abc",
        ),
        (
            "wavelength_nm,R\n500,0.2\n500,0.2\n",
            "measured line 3 = 500",
        ),
        (
            "wavelength_nm,X\n500,0.2\n",
            "measured line 1 = wavelength_nm,X",
        ),
        ("wavelength_nm,R\n500,-0.5\n", "measured line 2 = -0.5"),
    ] {
        let path = dir.join("bad.csv");
        std::fs::write(&path, text).unwrap();
        let p = path.to_str().unwrap();
        for args in [
            vec!["compare", "tests/data/measured/clean.csv", p],
            vec![
                "fit",
                "scenes/teal_label_foil.json",
                "--measured",
                p,
                "--out-scene",
                "/dev/null",
            ],
        ] {
            let out = lamella(&args);
            let err = String::from_utf8_lossy(&out.stderr);
            assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
            assert!(err.contains(&format!("{p}: {want}")), "{err}");
            let errors = err.lines().filter(|l| !l.starts_with("lamella: warning:"));
            assert_eq!(errors.count(), 1, "{err}");
        }
    }
    std::fs::remove_dir_all(&dir).unwrap();
}

/// `fit --percent` reads a percent file as the fraction file; a warning for
/// readings below zero is printed as `lamella: warning: …`.
#[test]
fn fit_reads_percent_and_warns_on_negative_readings() {
    let out = lamella(&[
        "compare",
        "tests/data/measured/negative_noise.csv",
        "tests/data/measured/negative_noise.csv",
        "--format",
        "json",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.starts_with(
            "lamella: warning: tests/data/measured/negative_noise.csv: measured: 2 readings below 0"
        ),
        "{err}"
    );
    let fitted = |file: &str, extra: &[&str]| {
        let mut args = vec![
            "fit",
            "scenes/teal_label_foil.json",
            "--measured",
            file,
            "--out-scene",
            "/dev/null",
            "--max-evals",
            "300",
        ];
        args.extend_from_slice(extra);
        let out = lamella(&args);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        v["thicknesses_nm"].clone()
    };
    assert_eq!(
        fitted("tests/data/measured/percent_flag.csv", &["--percent"]),
        fitted("tests/data/measured/clean.csv", &[])
    );
}

/// `spectrum --format cgats` reads back as the CSV's unpolarized R.
#[test]
fn spectrum_cgats_reads_back_as_the_csv() {
    let scene = "tests/input_checks/fixtures/film.json";
    let out = lamella(&["spectrum", scene, "--format", "cgats"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let back = read(
        std::str::from_utf8(&out.stdout).unwrap(),
        &ReadOptions::default(),
    )
    .unwrap();
    let csv = lamella(&["spectrum", scene]);
    let text = String::from_utf8(csv.stdout).unwrap();
    let mut n = 0;
    for line in text.lines().skip(1) {
        let v: Vec<f64> = line.split(',').map(|c| c.parse().unwrap()).collect();
        let g = back
            .groups
            .iter()
            .find(|g| g.at == At::Angle(v[1]))
            .unwrap();
        let i = g.wavelengths_nm.iter().position(|&w| w == v[0]).unwrap();
        assert_eq!(g.r[i], v[4]);
        n += 1;
    }
    assert!(n > 0);
    let colour = lamella(&["color", scene, "--format", "cgats"]);
    let text = String::from_utf8(colour.stdout).unwrap();
    assert!(
        text.contains("LAB_L") && text.contains("BEGIN_DATA"),
        "{text}"
    );
}
