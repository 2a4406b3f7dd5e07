//! Every command on extreme but valid scenes (10⁸ periods, 89.99°, a 10⁶ nm
//! absorbing layer, 10⁴ layers, metals at grazing incidence, a coating):
//! each must exit 0 with every number in every output finite (no NaN,
//! infinity or null). Grids are small to keep the run short.

mod common;

use common::{lamella, temp_dir};

use std::process::Output;

use lamella::angle_colour::{Viewing, angle_colours};
use lamella::scene::Scene;
use proptest::prelude::*;

/// Words that stand for a number that is not one.
fn bad_token(text: &str) -> Option<String> {
    text.split(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
        .find(|t| {
            matches!(
                t.to_ascii_lowercase().as_str(),
                "nan" | "inf" | "infinity" | "null"
            )
        })
        .map(str::to_string)
}

/// Every number of a JSON document is finite and nothing is null.
fn check_json(v: &serde_json::Value, what: &str) {
    match v {
        serde_json::Value::Null => panic!("{what}: null in the output"),
        serde_json::Value::Number(n) => {
            assert!(n.as_f64().is_some_and(f64::is_finite), "{what}: {n}")
        }
        serde_json::Value::Array(xs) => xs.iter().for_each(|x| check_json(x, what)),
        serde_json::Value::Object(m) => m.values().for_each(|x| check_json(x, what)),
        _ => {}
    }
}

/// Every CSV cell that reads as a number is finite; no cell is NaN or inf.
fn check_csv(text: &str, what: &str) {
    for cell in text.lines().skip(1).flat_map(|l| l.split(',')) {
        if let Ok(x) = cell.trim().parse::<f64>() {
            assert!(x.is_finite(), "{what}: cell {cell}");
        }
    }
    assert_eq!(bad_token(text), None, "{what}");
}

/// Runs a command that must succeed; `match` may also report (exit 3) that
/// its target was not reached, with its outputs written all the same.
fn run_ok(args: &[&str], what: &str) -> Output {
    let out = lamella(args);
    let reported = args[0] == "match" && out.status.code() == Some(3);
    assert!(
        out.status.success() || reported,
        "{what}: {args:?} exited {:?}: {}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

fn stdout(out: &Output) -> String {
    String::from_utf8(out.stdout.clone()).unwrap()
}

/// Runs every film command on `scene` (which has one `vary_nm` layer);
/// `tolerance` says whether to include the Monte Carlo tolerance, which
/// gives every layer its own medium and is too slow for 10⁴ layers here.
fn every_film_command(name: &str, scene: &str, tolerance: bool) {
    let dir = temp_dir(name);
    let path = dir.join("scene.json");
    std::fs::write(&path, scene).unwrap();
    let p = path.to_str().unwrap();
    let file = |f: &str| dir.join(f).to_str().unwrap().to_string();
    let what = |cmd: &str| format!("{name}: {cmd}");

    check_csv(
        &stdout(&run_ok(&["spectrum", p], name)),
        &what("spectrum csv"),
    );
    let json = stdout(&run_ok(&["spectrum", p, "--format", "json"], name));
    check_json(
        &serde_json::from_str(&json).unwrap(),
        &what("spectrum json"),
    );
    let json = stdout(&run_ok(
        &["color", p, "--format", "json", "--display-p3"],
        name,
    ));
    check_json(&serde_json::from_str(&json).unwrap(), &what("color json"));
    check_csv(
        &stdout(&run_ok(&["color", p, "--format", "csv"], name)),
        &what("color csv"),
    );
    let table = stdout(&run_ok(&["color", p], name));
    assert_eq!(bad_token(&table), None, "{}", what("color table"));

    for kind in [
        "angle-strip",
        "thickness-angle",
        "spectra",
        "map",
        "chromaticity",
        "ab-travel",
    ] {
        let out = file(&format!("{kind}.svg"));
        run_ok(
            &["chart", p, "--kind", kind, "-o", &out, "--size", "480x320"],
            name,
        );
        let svg = std::fs::read_to_string(&out).unwrap();
        assert_eq!(bad_token(&svg), None, "{}", what(kind));
    }
    let report = file("report");
    run_ok(&["report", p, "-o", &report, "--size", "480x320"], name);
    for entry in std::fs::read_dir(&report).unwrap() {
        let f = entry.unwrap().path();
        if f.extension().is_some_and(|e| e == "svg" || e == "html") {
            let text = std::fs::read_to_string(&f).unwrap();
            assert_eq!(
                bad_token(&text),
                None,
                "{}: {}",
                what("report"),
                f.display()
            );
        }
    }
    run_ok(
        &[
            "render",
            p,
            "-o",
            &file("r.png"),
            "--size",
            "48x48",
            "--ssaa",
            "1",
        ],
        name,
    );

    let report = stdout(&run_ok(
        &[
            "match",
            p,
            "--target-lab",
            "50,10,-10",
            "--max-evals",
            "20",
            "--out-scene",
            &file("matched.json"),
        ],
        name,
    ));
    check_json(&serde_json::from_str(&report).unwrap(), &what("match"));
    if tolerance {
        let report = stdout(&run_ok(
            &[
                "tolerance",
                p,
                "--sigma-nm",
                "1",
                "--sigma-n",
                "0.01",
                "--samples",
                "16",
                "--format",
                "json",
            ],
            name,
        ));
        check_json(&serde_json::from_str(&report).unwrap(), &what("tolerance"));
    }
    let measured = file("measured.csv");
    std::fs::write(
        &measured,
        "wavelength_nm,R\n400,0.2\n500,0.3\n600,0.1\n700,0.2\n",
    )
    .unwrap();
    let report = stdout(&run_ok(
        &[
            "fit",
            p,
            "--measured",
            &measured,
            "--scale",
            "--max-evals",
            "20",
            "--out-scene",
            &file("fitted.json"),
        ],
        name,
    ));
    check_json(&serde_json::from_str(&report).unwrap(), &what("fit"));
    let lines = stdout(&run_ok(&["sweep", p, "--grid", "3"], name));
    for line in lines.lines() {
        check_json(&serde_json::from_str(line).unwrap(), &what("sweep"));
    }
}

const GRID: &str = r#""wavelengths_nm": {"from": 400, "to": 700, "step": 50}"#;

#[test]
fn hundred_million_periods() {
    every_film_command(
        "periods",
        &format!(
            r#"{{"stack": [{{"repeat": 100000000, "stack": [
                {{"material": "hi", "thickness_nm": 58, "vary_nm": [40, 80]}},
                {{"material": "lo", "thickness_nm": 94}}]}}],
              "substrate": "glass", "materials": {{"hi": {{"n": 2.35}}, "lo": {{"n": 1.46}}}},
              {GRID}, "angles_deg": [0, 30, 60, 89.99]}}"#
        ),
        true,
    );
}

#[test]
fn grazing_incidence() {
    every_film_command(
        "grazing",
        &format!(
            r#"{{"stack": [{{"material": "tio2", "thickness_nm": 120, "vary_nm": [50, 200]}},
                {{"material": "mgf2", "thickness_nm": 95}}],
              "substrate": "glass", {GRID}, "angles_deg": [0, 45, 89, 89.99]}}"#
        ),
        true,
    );
}

#[test]
fn million_nm_absorbing_layer() {
    every_film_command(
        "thick",
        &format!(
            r#"{{"stack": [{{"material": "clear", "thickness_nm": 80, "vary_nm": [40, 160]}},
                {{"material": "dark", "thickness_nm": 1000000}}],
              "substrate": "glass", "materials": {{"dark": {{"n": 2, "k": 5}}, "clear": {{"n": 1.4}}}},
              {GRID}, "angles_deg": [0, 60, 89.99]}}"#
        ),
        true,
    );
}

#[test]
fn ten_thousand_layers() {
    let layers: Vec<String> = (0..10_000)
        .map(|i| {
            let (m, d) = if i % 2 == 0 { ("hi", 58) } else { ("lo", 94) };
            let vary = if i == 0 {
                r#", "vary_nm": [40, 80]"#
            } else {
                ""
            };
            format!(r#"{{"material": "{m}", "thickness_nm": {d}{vary}}}"#)
        })
        .collect();
    every_film_command(
        "layers",
        &format!(
            r#"{{"stack": [{}], "substrate": "glass",
              "materials": {{"hi": {{"n": 2.35}}, "lo": {{"n": 1.46}}}},
              {GRID}, "angles_deg": [0, 45, 89.99]}}"#,
            layers.join(",")
        ),
        false,
    );
}

#[test]
fn metals_at_grazing_incidence() {
    every_film_command(
        "metals",
        &format!(
            r#"{{"stack": [{{"material": "silver", "thickness_nm": 30, "vary_nm": [5, 60]}},
                {{"material": "sio2_film", "thickness_nm": 150}},
                {{"material": "aluminium", "thickness_nm": 100}}],
              "substrate": "glass", {GRID}, "angles_deg": [0, 70, 89, 89.99]}}"#
        ),
        true,
    );
}

#[test]
fn coating_at_every_geometry() {
    let dir = temp_dir("coating");
    let path = dir.join("scene.json");
    std::fs::write(
        &path,
        format!(
            r#"{{"coating": {{"binder": "lacquer",
                "platelet": [{{"material": "tio2", "thickness_nm": 60, "vary_nm": [30, 120]}},
                             {{"material": "mica", "thickness_nm": 400}},
                             {{"material": "tio2", "thickness_nm": 60}}],
                "tilt_sigma_deg": 0.05, "geometries": ["45", "15as-60", "75as75"]}},
              "materials": {{"lacquer": {{"n": 1.5}}}}, {GRID}}}"#
        ),
    )
    .unwrap();
    let p = path.to_str().unwrap();
    for format in ["json", "csv", "table"] {
        let out = stdout(&run_ok(
            &["multiangle", p, "--format", format, "--spectra"],
            "coating",
        ));
        match format {
            "json" => check_json(&serde_json::from_str(&out).unwrap(), "multiangle json"),
            "csv" => check_csv(&out, "multiangle csv"),
            _ => assert_eq!(bad_token(&out), None, "multiangle table"),
        }
    }
    let png = dir.join("r.png");
    run_ok(
        &[
            "render",
            p,
            "-o",
            png.to_str().unwrap(),
            "--size",
            "48x48",
            "--ssaa",
            "1",
        ],
        "coating",
    );
    let report = stdout(&run_ok(
        &[
            "tolerance",
            p,
            "--sigma-nm",
            "2",
            "--sigma-n",
            "0.01",
            "--samples",
            "8",
            "--format",
            "json",
        ],
        "coating",
    ));
    check_json(&serde_json::from_str(&report).unwrap(), "coating tolerance");
}

fn scene_with(stack: &str, angles: &str) -> String {
    format!(
        r#"{{"stack": [{stack}], "substrate": "glass",
          "materials": {{"hi": {{"n": 2.35}}, "lo": {{"n": 1.46}}, "dark": {{"n": 2, "k": 5}}}},
          {GRID}, "angles_deg": {angles}}}"#
    )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    /// Random mixtures of the extreme ingredients: spectra and colours are
    /// finite at every point.
    #[test]
    fn extreme_mixtures_give_finite_spectra_and_colours(
        periods in prop::sample::select(vec![1u64, 1_000, 1_000_000, 100_000_000]),
        thick in prop::sample::select(vec![0.0, 1e3, 1e6]),
        metal in prop::sample::select(vec!["silver", "aluminium", "gold", "chromium"]),
        metal_nm in 0.0f64..200.0,
        angle in prop::sample::select(vec![30.0, 60.0, 89.0, 89.9, 89.99]),
    ) {
        let stack = format!(
            r#"{{"material": "{metal}", "thickness_nm": {metal_nm}}},
               {{"repeat": {periods}, "stack": [{{"material": "hi", "thickness_nm": 58}},
                                                {{"material": "lo", "thickness_nm": 94}}]}},
               {{"material": "dark", "thickness_nm": {thick}}}"#
        );
        let text = scene_with(&stack, &format!("[0, {angle}]"));
        let scene = Scene::from_json(&text, &|_| Err("no files".into())).unwrap();
        let spectra = scene.spectra().unwrap();
        for x in &spectra.rt {
            prop_assert!([x.rs, x.rp, x.ts, x.tp].iter().all(|v| v.is_finite()), "{x:?}");
        }
        let colours = angle_colours(&spectra, &Viewing::of_scene(&scene).unwrap()).unwrap();
        for c in colours {
            prop_assert!(c.lab.iter().chain(&c.rgb).all(|v| v.is_finite()), "{c:?}");
        }
    }
}

#[test]
fn the_gate_names_the_point_of_a_value_that_cannot_be_computed() {
    // A non-finite spectrum value at 500 nm, 30° (as the engine might give).
    let scene = Scene::from_json(
        &scene_with(r#"{"material": "hi", "thickness_nm": 58}"#, "[0, 30]"),
        &|_| Err("no files".into()),
    )
    .unwrap();
    let mut spectra = scene.spectra().unwrap();
    let nw = spectra.wavelengths_nm.len();
    spectra.rt[nw + 2].rp = f64::NAN;
    let err = angle_colours(&spectra, &Viewing::of_scene(&scene).unwrap()).unwrap_err();
    assert!(matches!(err, lamella::Error::NotComputable { .. }), "{err}");
    assert_eq!(
        err.to_string(),
        "R_p cannot be computed at 500 nm, 30°: the result is NaN, not a finite number"
    );
}
