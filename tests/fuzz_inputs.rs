//! The document readers under seeded mutations of real documents (scene
//! JSON, measured CSV, OBJ meshes): any input gives a value that keeps the
//! reader's guarantees or a one-line error naming the key, never a panic.
//! The same checks run under libFuzzer in `fuzz/` (see `fuzz/README.md`);
//! here a fixed seed and a bounded number of cases keep them in CI.

#[path = "input_checks/documents.rs"]
mod documents;
#[path = "input_checks/mutate.rs"]
mod mutate;

use std::path::{Path, PathBuf};

/// Mutated documents per reader: a few seconds in all in release mode.
const CASES: u32 = 20_000;

/// Every file in the given folders of the repository (sorted), with the
/// given extension.
fn seeds(folders: &[&str], ext: &str) -> Vec<Vec<u8>> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut paths: Vec<PathBuf> = folders
        .iter()
        .flat_map(|f| std::fs::read_dir(root.join(f)).expect("seed folder"))
        .map(|e| e.expect("entry").path())
        .filter(|p| p.extension().is_some_and(|e| e == ext))
        .collect();
    paths.sort();
    assert!(!paths.is_empty(), "no seeds in {folders:?}");
    paths
        .iter()
        .map(|p| std::fs::read(p).expect("seed"))
        .collect()
}

/// Runs `check` on every seed as it is, then on `cases` mutated seeds.
fn fuzz(seeds: &[Vec<u8>], fragments: &[&str], cases: u32, check: impl Fn(&[u8])) {
    for s in seeds {
        check(s);
    }
    let strategy = (0..seeds.len(), mutate::edits());
    mutate::runner(cases)
        .run(&strategy, |(i, edits)| {
            check(&mutate::apply(&seeds[i], &edits, fragments));
            Ok(())
        })
        .unwrap();
}

#[test]
fn mutated_scenes_are_read_or_refused_by_key() {
    let seeds = seeds(
        &[
            "scenes",
            "bench",
            "tests/data",
            "tests/input_checks/fixtures",
            "fuzz/seeds/scene",
        ],
        "json",
    );
    let fragments = [
        "\"",
        "{",
        "}",
        "[",
        "]",
        ",",
        ":",
        "\\n",
        "\"repeat\": 99999999,",
        "\"k\": -1,",
        "\"vary_nm\": [5, 1],",
        "\"stack\": [],",
        "\"material\": \"nk.csv\",",
        "\u{0}",
        "\u{2028}",
    ];
    fuzz(&seeds, &fragments, CASES, |doc| {
        documents::check_scene(&String::from_utf8_lossy(doc))
    });
}

#[test]
fn mutated_measurements_are_read_or_refused_by_line() {
    let seeds = seeds(
        &["tests/input_checks/fixtures", "fuzz/seeds/measured"],
        "csv",
    );
    let fragments = [
        ",",
        "\n",
        "\r\n",
        "#",
        "angle_deg",
        "geometry",
        "45as15",
        "45as",
        "as",
        "R",
        "nan",
        "wavelength_nm,R\n",
        ",,",
        " ",
    ];
    fuzz(&seeds, &fragments, CASES, |doc| {
        let text = String::from_utf8_lossy(doc);
        for angle in [0.0, 89.9, -45.0, 90.0, f64::NAN, f64::INFINITY] {
            documents::check_measured(&text, angle);
        }
    });
}

#[test]
fn mutated_meshes_are_read_or_refused() {
    let seeds = seeds(&["tests/data", "fuzz/seeds/obj"], "obj");
    let fragments = [
        "\nf 1 2 3\n",
        "\nf -1 -2 -3\n",
        "\nf 0 0 0\n",
        "\nf 1/1/1 2/2/2 3/3/3\n",
        "\nvn 0 0 0\n",
        "\nv 1e30 1e30 1e30\n",
        "\nv 1e-30 0 0\n",
        "\nvt 0.5 0.5\n",
        "\no x\n",
        "\ng\n",
        "\\\n",
        "\nmtllib a.mtl\n",
        "\nusemtl m\n",
        "/",
        " ",
    ];
    fuzz(&seeds, &fragments, CASES, documents::check_obj);
}

// Problems the fuzz targets found, each pinned by the input that showed it.

#[test]
fn scene_key_with_a_line_break_is_refused_on_one_line() {
    let text = "{\"\\nilluminant\": \"D65\", \"stack\": [], \"substrate\": \"glass\"}";
    let e = lamella::scene::Scene::from_json(text, &|_| Err("none".into())).unwrap_err();
    assert!(e.to_string().starts_with(r#""\nilluminant" = "#), "{e}");
    documents::check_scene(text);
}

#[test]
fn empty_or_blank_key_and_non_object_document_are_named() {
    let load = |_: &str| Err("none".to_string());
    let e = lamella::scene::Scene::from_json(r#"{"stack": [], "": "owl"}"#, &load).unwrap_err();
    assert!(
        e.to_string().starts_with(r#""" = "owl": unknown key"#),
        "{e}"
    );
    let e = lamella::scene::Scene::from_json(r#"{"stack": [], "  ": 1}"#, &load).unwrap_err();
    assert!(e.to_string().starts_with(r#""  " = 1: unknown key"#), "{e}");
    let e = lamella::scene::Scene::from_json("5", &load).unwrap_err();
    assert_eq!(e.to_string(), "(document) = 5: expected a JSON object");
}

#[test]
fn measured_line_with_a_carriage_return_is_refused_on_one_line() {
    let text = "R,wavelength_nm\r\n0.1,380\r\u{b}0.2,780\r\n";
    let e = lamella::measured::read(text, &Default::default()).unwrap_err();
    assert!(e.to_string().contains("0.1,380\\r\\u{b}0.2,780"), "{e}");
    documents::check_measured(text, 0.0);
}

#[test]
fn obj_with_coordinates_of_1e30_keeps_its_bounding_sphere() {
    documents::check_obj(b"v 0 0 0\nv 1 1 1\nv 1e30 1e30 1e30\nf 1 2 3\n");
}

#[test]
fn sheet_beyond_its_critical_angle_reflects_everything_instead_of_nan() {
    let text = r#"{"stack": [{"material": "x", "thickness_nm": 100}],
        "materials": {"x": {"n": 1.5}, "s": {"n": 0.52}},
        "substrate": {"material": "s", "thickness_um": 500, "behind": "glass"},
        "wavelengths_nm": [500], "angles_deg": [20, 40, 60]}"#;
    let scene = lamella::scene::Scene::from_json(text, &|_| Err("none".into())).unwrap();
    let spectra = scene.spectra().unwrap();
    // sin 40° = 0.64 > 0.52: total internal reflection at the sheet.
    for x in &spectra.rt[1..] {
        assert!(
            (x.rs - 1.0).abs() < 1e-12 && (x.rp - 1.0).abs() < 1e-12,
            "{x:?}"
        );
        assert_eq!((x.ts, x.tp), (0.0, 0.0));
    }
    assert!(spectra.rt[0].ts > 0.1, "{:?}", spectra.rt[0]);
    documents::check_scene(text);
}

#[test]
fn absurd_refractive_index_is_refused_instead_of_nan() {
    for n in ["1e94", "1e20", "1000001"] {
        let text = format!(
            r#"{{"stack": [{{"material": "hi", "thickness_nm": 50}}], "wavelengths_nm": [500],
                "substrate": {{"material": "glass", "thickness_um": 1000}},
                "materials": {{"hi": {{"n": 2.35}}, "glass": {{"n": {n}}}}}}}"#
        );
        let e = lamella::scene::Scene::from_json(&text, &|_| Err("none".into()))
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("materials.glass = n = ") && e.contains("unphysical"),
            "{e}"
        );
    }
}

#[test]
fn exactly_at_the_critical_angle_reflects_everything_instead_of_nan() {
    // sin 30° = 0.5 exactly: the substrate's wave grazes (q = 0).
    for (substrate, layer) in [(0.5, 1.46), (1.46, 0.5)] {
        let text = format!(
            r#"{{"stack": [{{"material": "hi", "thickness_nm": 24}}, {{"material": "mid", "thickness_nm": 100}}],
                "substrate": "sub", "wavelengths_nm": [400, 550, 700], "angles_deg": [29.9, 30, 30.1],
                "materials": {{"hi": {{"n": 2.35}}, "mid": {{"n": {layer}}}, "sub": {{"n": {substrate}}}}}}}"#
        );
        documents::check_scene(&text);
        let scene = lamella::scene::Scene::from_json(&text, &|_| Err("none".into())).unwrap();
        let spectra = scene.spectra().unwrap();
        let at = |a: usize| spectra.at_angle(a).to_vec();
        for ((below, at30), above) in at(0).iter().zip(at(1)).zip(at(2)) {
            if substrate == 0.5 {
                assert!(
                    (at30.rs - 1.0).abs() < 1e-12 && (at30.rp - 1.0).abs() < 1e-12,
                    "{at30:?}"
                );
                assert!((above.rs - 1.0).abs() < 1e-12, "{above:?}");
            }
            // R is continuous through the critical angle.
            for (b, x, a) in [(below.rs, at30.rs, above.rs), (below.rp, at30.rp, above.rp)] {
                assert!(x >= b.min(a) - 0.05 && x <= b.max(a) + 0.05, "{b} {x} {a}");
            }
        }
    }
}

#[test]
fn layer_of_1e80_nm_in_a_long_repeat_finishes_with_finite_values() {
    // 64 periods or more are powered in double-double, whose sine reduction
    // used to spin forever on a phase of 1e78 rad.
    let text = r#"{"stack": [{"repeat": 72, "stack": [{"material": "tio2", "thickness_nm": 43},
        {"material": "sio2_film", "thickness_nm": 7.8e80}]}],
        "substrate": "glass", "wavelengths_nm": [616, 700], "angles_deg": [0, 45]}"#;
    documents::check_scene(text);
}

#[test]
fn wavelength_or_index_of_1e_320_is_refused_instead_of_nan() {
    let load = |_: &str| Err("none".to_string());
    let scene = |grid: &str, n: &str| {
        let text = format!(
            r#"{{"stack": [{{"material": "hi", "thickness_nm": 60}}], "substrate": "glass",
                "materials": {{"hi": {{"n": {n}}}}}, "wavelengths_nm": {grid}}}"#
        );
        documents::check_scene(&text);
        lamella::scene::Scene::from_json(&text, &load).and_then(|s| s.spectra().map(|_| ()))
    };
    let e = scene(r#"{"from": 1e-320, "to": 780, "step": 5}"#, "2.3").unwrap_err();
    assert_eq!(
        e.to_string(),
        "wavelengths_nm.from = 1e-320: wavelengths must be at least 1 nm"
    );
    let e = scene("[500]", "1e-320").unwrap_err().to_string();
    assert!(
        e.starts_with("materials.hi = n = ") && e.contains("unphysical"),
        "{e}"
    );
    // The measured data of `fit` holds the same floor.
    let e = lamella::measured::read("wavelength_nm,R\n1e-320,0.1\n", &Default::default());
    assert!(e.unwrap_err().to_string().contains("wavelength ≥ 1 nm"));
}

fn lamella(args: &[&str]) -> std::process::Output {
    std::process::Command::new(env!("CARGO_BIN_EXE_lamella"))
        .args(args)
        .output()
        .expect("runs")
}

#[test]
fn huge_target_lab_is_refused_instead_of_a_nan_delta_e() {
    let scene = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/input_checks/fixtures/film.json"
    );
    let out = std::env::temp_dir().join(format!("lamella-lab-{}.json", std::process::id()));
    let out = out.to_str().unwrap();
    for (flag, value) in [
        ("--target-lab", "60,-1e308,-30"),
        ("--target-lab", "-5,0,0"),
        ("--goal", "30:60,0,1e45"),
    ] {
        let mut args = vec!["match", scene, "--out-scene", out, "--max-evals", "10"];
        if flag == "--goal" {
            args.extend(["--target-lab", "50,0,0"]);
        }
        args.extend([flag, value]);
        let o = lamella(&args);
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{value}: {err}");
        assert!(err.contains("L* must lie from 0 to 1000"), "{value}: {err}");
    }
}

#[test]
fn flag_value_with_control_characters_is_refused_on_one_line() {
    let scene = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/input_checks/fixtures/film.json"
    );
    let out = std::env::temp_dir().join(format!("lamella-cr-{}.json", std::process::id()));
    let out = out.to_str().unwrap();
    let o = lamella(&[
        "match",
        scene,
        "--target-lab",
        "1\r\n2,3,4",
        "--out-scene",
        out,
    ]);
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(2), "{err}");
    // The fixture's coarse step also draws a warning line.
    let errors: Vec<&str> = err
        .lines()
        .filter(|l| !l.starts_with("lamella: warning:"))
        .collect();
    assert_eq!(errors.len(), 1, "{err}");
    assert!(errors[0].contains("1\\r\\n2"), "{err}");
}
