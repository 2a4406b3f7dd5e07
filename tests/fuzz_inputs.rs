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
    fuzz(&seeds, &fragments, 3000, |doc| {
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
    fuzz(&seeds, &fragments, 3000, |doc| {
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
    fuzz(&seeds, &fragments, 3000, documents::check_obj);
}

// Problems the fuzz targets found, each pinned by the input that showed it.

#[test]
fn scene_key_with_a_line_break_is_refused_on_one_line() {
    let text = "{\"\\nilluminant\": \"D65\", \"stack\": [], \"substrate\": \"glass\"}";
    let e = lamella::scene::Scene::from_json(text, &|_| Err("none".into())).unwrap_err();
    assert!(e.to_string().starts_with("\\nilluminant = "), "{e}");
    documents::check_scene(text);
}

#[test]
fn empty_key_and_non_object_document_are_named() {
    let load = |_: &str| Err("none".to_string());
    let e = lamella::scene::Scene::from_json(r#"{"stack": [], "": "owl"}"#, &load).unwrap_err();
    assert!(
        e.to_string().starts_with(r#""" = "owl": unknown key"#),
        "{e}"
    );
    let e = lamella::scene::Scene::from_json("5", &load).unwrap_err();
    assert_eq!(e.to_string(), "(document) = 5: expected a JSON object");
}

#[test]
fn measured_line_with_a_carriage_return_is_refused_on_one_line() {
    let text = "R,wavelength_nm\r\n0.1,380\r\u{b}0.2,780\r\n";
    let e = lamella::design::fit::parse_measured(text, 0.0).unwrap_err();
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
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains("1\\r\\n2"), "{err}");
}
