//! Design tools on effect-pigment coatings: the restricted model against the
//! full one, matching geometry targets, tolerance at geometries, fitting
//! platelet thicknesses to multi-geometry reflectance factors.

use lamella::angle_colour::Viewing;
use lamella::colorimetry::{ColourOptions, Weights, delta_e2000};
use lamella::design::coating::{At, CoatingEvaluator, with_coating};
use lamella::design::variables::varying_in;
use lamella::pigment::{Geometry, Model, colours, parse_geometries};
use lamella::scene::Scene;

fn scene(json: &str) -> Scene {
    Scene::from_json(json, &|p: &str| Err(format!("no file {p}"))).expect("valid scene")
}

/// An invented pearl: TiO2 on both faces of a mica core in a clear binder.
fn pearl(disorder: &str, background: &str, sigma: f64, step: f64) -> Scene {
    scene(&format!(
        r#"{{"materials": {{"clear": {{"n": 1.5}}}},
            "coating": {{"binder": "clear",
              "platelet": [{{"material": "tio2", "thickness_nm": 70, "vary_nm": [30, 200]}},
                           {{"material": "mica", "thickness_nm": 400{disorder}}},
                           {{"material": "tio2", "thickness_nm": 70, "vary_nm": [30, 200]}}],
              {dis}"tilt_sigma_deg": {sigma}, "platelet_coverage": 1.2,
              "background": {background}, "geometries": "45"}},
            "wavelengths_nm": {{"from": 380, "to": 780, "step": {step}}},
            "illuminant": "D65", "observer": "CIE1964_10"}}"#,
        dis = if disorder.is_empty() {
            ""
        } else {
            r#""disorder": {"realizations": 16, "seed": 7}, "#
        },
    ))
}

fn weights(s: &Scene) -> Weights {
    Viewing::of_scene(s)
        .unwrap()
        .weights(&s.wavelengths_nm)
        .unwrap()
}

/// The model restricted to the coating's geometries (fine table only near
/// each mirror angle, coarse transmittance table for the extinction) gives
/// the colours of the full model within ΔE00 < 0.1, for narrow and wide
/// tilt spreads, with and without disorder and a reflecting background.
#[test]
fn restricted_model_agrees_with_the_full_model() {
    let cases = [
        (", \"sigma_pct\": 35", "\"black\"", 8.0),
        ("", "\"black\"", 3.0),
        ("", "{\"reflectance\": 0.4}", 15.0),
        ("", "\"white\"", 30.0),
    ];
    for (disorder, background, sigma) in cases {
        let s = pearl(disorder, background, sigma, 10.0);
        let (s, coating) = with_coating(&s).unwrap();
        let coating = coating.unwrap();
        let vars = varying_in(&s, &coating.platelet);
        let mut geometries = coating.geometries.clone();
        geometries.extend(
            parse_geometries(
                &serde_json::json!(["15as-30", "15as10", "15as40", "25as60"]),
                "g",
            )
            .unwrap(),
        );
        geometries.push(Geometry::directions(45.0, 30.0, 60.0).unwrap());
        let eval = CoatingEvaluator::new(&s, &coating, vars, &geometries).unwrap();
        let w = weights(&s);
        let x = [95.0, 140.0];
        let fast = eval.spectra(&x, None);
        let mut edited = coating.clone();
        edited.platelet = lamella::design::variables::with_thicknesses(
            &coating.platelet,
            &varying_in(&s, &coating.platelet),
            &x,
        );
        let full = Model::with_platelet(&s, &edited, &edited.platelet).unwrap();
        let reference = colours(&full, &geometries, &w, &ColourOptions::default());
        for (g, rf) in reference.iter().zip(&fast) {
            let lab = lamella::colorimetry::xyz_to_lab(w.xyz(rf), w.white());
            let de = delta_e2000(g.colour.lab, lab);
            assert!(
                de < 0.1,
                "σ = {sigma}, {background}: {} ΔE00 {de}",
                g.geometry.name
            );
        }
    }
}

/// A pearl without disorder on a 10 nm grid with two free layers: the TiO2
/// on one face and the mica core.
fn two_free_layers() -> Scene {
    scene(
        r#"{"materials": {"clear": {"n": 1.5}},
            "coating": {"binder": "clear",
              "platelet": [{"material": "tio2", "thickness_nm": 60, "vary_nm": [30, 200]},
                           {"material": "mica", "thickness_nm": 350, "vary_nm": [250, 450]},
                           {"material": "tio2", "thickness_nm": 60}],
              "tilt_sigma_deg": 10, "platelet_coverage": 1,
              "background": {"reflectance": 0.1}, "geometries": ["45as15", "45as45", "45as110"]},
            "wavelengths_nm": {"from": 380, "to": 780, "step": 10},
            "illuminant": "D65", "observer": "CIE1964_10"}"#,
    )
}

/// The scene with thicknesses `x` written at the platelet's variables, re-read.
fn with_design(s: &Scene, x: &[f64]) -> Scene {
    let (full, coating) = with_coating(s).unwrap();
    let vars = varying_in(&full, &coating.unwrap().platelet);
    let doc = lamella::design::variables::edited_document(&s.document, &vars, x).unwrap();
    scene(&doc.to_string())
}

/// Lab at `geometries` by the full model of the scene's own coating.
fn labs(s: &Scene, geometries: &[Geometry]) -> Vec<[f64; 3]> {
    let s = s.clone();
    let coating = lamella::pigment::Coating::from_scene(&s).unwrap();
    let model = Model::new(&s, &coating).unwrap();
    colours(&model, geometries, &weights(&s), &ColourOptions::default())
        .into_iter()
        .map(|g| g.colour.lab)
        .collect()
}

fn geometry(name: &str) -> Geometry {
    lamella::pigment::parse_name(name, "g").unwrap().remove(0)
}

/// Targets at 45as15 and 45as110 made by a known platelet are matched within
/// ΔE00 ≤ 1, judged by the full model on the written scene.
#[test]
fn match_reaches_targets_at_two_geometries() {
    use lamella::design::matching::{Goal, MatchSettings, match_colour};
    use lamella::design::search::Budget;
    let s = two_free_layers();
    let at = [geometry("45as15"), geometry("45as110")];
    let target = labs(&with_design(&s, &[120.0, 300.0]), &at);
    let settings = MatchSettings {
        goals: at
            .iter()
            .zip(&target)
            .map(|(g, lab)| Goal {
                at: At::Geometry(g.clone()),
                lab: *lab,
            })
            .collect(),
        max_total_nm: None,
        brightness_weight: 0.0,
        budget: Budget {
            max_evals: 4000,
            good_enough: 0.03,
            handover: 0.5,
            min_gain: 0.05,
            seed: 1,
        },
    };
    let out = match_colour(&s, &Viewing::of_scene(&s).unwrap(), &settings, &|_, _| {}).unwrap();
    let got = labs(&with_design(&s, &out.thicknesses_nm), &at);
    for ((t, g), reported) in target.iter().zip(&got).zip(&out.goals) {
        let de = delta_e2000(*t, *g);
        assert!(de <= 1.0, "ΔE00 {de} at {:?}", out.thicknesses_nm);
        assert!(
            (de - reported.delta_e00).abs() < 0.1,
            "{de} vs {}",
            reported.delta_e00
        );
    }
    assert!(out.reachable);
    // A film's angle is refused for a coating.
    let mut angle = settings.clone();
    angle.goals[0].at = At::Angle(0.0);
    assert!(match_colour(&s, &Viewing::of_scene(&s).unwrap(), &angle, &|_, _| {}).is_err());
}

/// With σ = 0 every sample is the nominal design (ΔE00 = 0 everywhere); the
/// spread grows with σ; the tolerance runs at the coating's geometries.
#[test]
fn tolerance_at_geometries_grows_with_sigma() {
    use lamella::design::tolerance::{ToleranceSettings, tolerance};
    use lamella::scene::Sigma;
    let s = two_free_layers();
    let viewing = Viewing::of_scene(&s).unwrap();
    let run = |sigma: f64| {
        tolerance(
            &s,
            &viewing,
            &ToleranceSettings {
                thickness: Sigma::Nm(sigma),
                sigma_n: 0.0,
                per_period: false,
                yield_at: vec![],
                samples: 40,
                limit: 1.0,
                seed: 5,
            },
        )
        .unwrap()
    };
    let zero = run(0.0);
    assert_eq!(zero.points.len(), 3);
    assert_eq!(zero.points[0].geometry().unwrap().name, "45as15");
    assert!(zero.overall.max == 0.0 && zero.overall.yield_fraction == 1.0);
    assert!(zero.per_point.iter().all(|p| p.max == 0.0));
    let (small, large) = (run(2.0), run(6.0));
    assert!(small.overall.p95 > 0.0);
    assert!(large.overall.p50 > small.overall.p50 && large.overall.p95 > small.overall.p95);
    // Three platelet layers ranked (pointers under /coating/platelet).
    assert_eq!(large.sensitivity.len(), 3);
    assert!(
        large
            .sensitivity
            .iter()
            .all(|v| v.layer.pointer.starts_with("/coating/platelet/"))
    );
}

/// Reflectance factors of a known platelet at the three geometries, with
/// seeded noise (σ = 0.002), are fitted back within 2 nm per layer.
#[test]
fn fit_recovers_platelet_thicknesses_from_multi_geometry_data() {
    use lamella::design::fit::{FitSettings, Measured, fit};
    use lamella::design::search::Budget;
    use rand::SeedableRng;
    use rand_distr::{Distribution, Normal};
    let s = two_free_layers();
    let truth = [135.0, 320.0];
    let known = with_design(&s, &truth);
    let k = known.clone();
    let coating = lamella::pigment::Coating::from_scene(&k).unwrap();
    let model = Model::new(&k, &coating).unwrap();
    let noise = Normal::new(0.0, 0.002).unwrap();
    let mut rng = rand::rngs::StdRng::seed_from_u64(4);
    let measured: Vec<Measured> = coating
        .geometries
        .iter()
        .map(|g| {
            let mut rf = vec![0.0; k.wavelengths_nm.len()];
            model.reflectance_factor(g.illumination, g.detection, &mut rf);
            Measured {
                at: At::Geometry(g.clone()),
                wavelengths_nm: k.wavelengths_nm.clone(),
                r: rf.iter().map(|r| r + noise.sample(&mut rng)).collect(),
            }
        })
        .collect();
    let settings = FitSettings {
        fit_scale: true,
        budget: Budget {
            max_evals: 1500,
            good_enough: 1e-5,
            handover: 0.0,
            min_gain: 1e-5,
            seed: 1,
        },
    };
    let out = fit(&s, &measured, &settings).unwrap();
    for (got, want) in out.thicknesses_nm.iter().zip(truth) {
        assert!(
            (got - want).abs() < 2.0,
            "{:?} vs {truth:?}",
            out.thicknesses_nm
        );
    }
    let (scale, _) = out.scale.unwrap();
    assert!((scale - 1.0).abs() < 0.02, "{scale}");
    assert!(out.rms < 0.004, "{}", out.rms);
}

fn temp(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("lamella-pigment-design-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

/// The command line: geometry targets in `match`, the geometry column in
/// `fit`, per-geometry `tolerance`, and clear refusals.
#[test]
fn cli_takes_geometry_targets_and_measurements() {
    let run = |args: &[&str]| {
        std::process::Command::new(env!("CARGO_BIN_EXE_lamella"))
            .args(args)
            .output()
            .unwrap()
    };
    let s = two_free_layers();
    let path = temp("coating.json");
    std::fs::write(&path, s.document.to_string()).unwrap();
    let p = path.to_str().unwrap();
    let out_scene = temp("matched.json");
    let o = run(&[
        "match",
        p,
        "--target-lab",
        "60,0,10",
        "--geometry",
        "45as15",
        "--goal",
        "45as110:5,0,1",
        "--max-evals",
        "200",
        "--out-scene",
        out_scene.to_str().unwrap(),
    ]);
    // 200 evaluations may end short of the target (exit 3); the report and
    // the scene are written either way.
    let report: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(
        o.status.code(),
        Some(if report["reachable"] == true { 0 } else { 3 }),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    assert_eq!(report["goals"][0]["geometry"], "45as15");
    assert_eq!(report["goals"][1]["aspecular_deg"], 110.0);
    assert!(report["goals"][0].get("angle_deg").is_none());
    assert_eq!(
        report["thicknesses_nm"][0]["pointer"],
        "/coating/platelet/0"
    );
    // The written scene reads back with the new thicknesses.
    let written: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&out_scene).unwrap()).unwrap();
    assert_eq!(
        written["coating"]["platelet"][0]["thickness_nm"],
        report["thicknesses_nm"][0]["value"]
    );
    // A coating needs --geometry; a film refuses geometry goals.
    let o = run(&[
        "match",
        p,
        "--target-lab",
        "60,0,10",
        "--out-scene",
        out_scene.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("--geometry"));
    let o = run(&[
        "match",
        p,
        "--target-lab",
        "60,0,10",
        "--geometry",
        "45",
        "--out-scene",
        out_scene.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    // Tolerance reports per geometry.
    let o = run(&["tolerance", p, "--sigma-nm", "2", "--samples", "20"]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let report: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(report["geometries"].as_array().unwrap().len(), 3);
    assert_eq!(report["geometries"][2]["geometry"], "45as110");
    assert!(report["geometries"][0]["delta_e00_p95"].as_f64().unwrap() > 0.0);
    // Only the chosen geometries count toward the overall yield.
    let o = run(&[
        "tolerance",
        p,
        "--sigma-nm",
        "2",
        "--samples",
        "20",
        "--yield-geometries",
        "45as110",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let chosen: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(chosen["yield_geometries"], serde_json::json!(["45as110"]));
    assert_eq!(chosen["geometries"][2]["in_yield"], true);
    assert_eq!(chosen["geometries"][0]["in_yield"], false);
    assert_eq!(
        chosen["delta_e00_p95"],
        chosen["geometries"][2]["delta_e00_p95"]
    );
    for bad in [
        vec!["--yield-geometries", "45as25"],
        vec!["--yield-geometries", "45"],
        vec!["--yield-angles", "0"],
    ] {
        let mut args = vec!["tolerance", p, "--sigma-nm", "2", "--samples", "5"];
        args.extend(bad.iter().copied());
        let o = run(&args);
        assert_eq!(
            o.status.code(),
            Some(2),
            "{bad:?}: {}",
            String::from_utf8_lossy(&o.stderr)
        );
    }
    // Fit: a geometry column of reflectance factors.
    let k = s.clone();
    let coating = lamella::pigment::Coating::from_scene(&k).unwrap();
    let model = Model::new(&k, &coating).unwrap();
    let mut csv = String::from("geometry,wavelength_nm,R\n");
    for g in &coating.geometries {
        let mut rf = vec![0.0; k.wavelengths_nm.len()];
        model.reflectance_factor(g.illumination, g.detection, &mut rf);
        for (w, r) in k.wavelengths_nm.iter().zip(&rf) {
            csv.push_str(&format!("{},{w},{r}\n", g.name));
        }
    }
    let measured = temp("readings.csv");
    std::fs::write(&measured, csv).unwrap();
    let fitted = temp("fitted.json");
    let o = run(&[
        "fit",
        p,
        "--measured",
        measured.to_str().unwrap(),
        "--max-evals",
        "300",
        "--out-scene",
        fitted.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let report: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(report["geometries"][0], "45as15");
    assert!(report["rms"].as_f64().unwrap() < 1e-3, "{}", report["rms"]);
    // Bad geometry names are refused with exit code 2.
    std::fs::write(&measured, "geometry,wavelength_nm,R\n45as200,500,0.1\n").unwrap();
    let o = run(&[
        "fit",
        p,
        "--measured",
        measured.to_str().unwrap(),
        "--out-scene",
        fitted.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
}
