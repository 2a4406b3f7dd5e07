//! Design tools: recovery of known designs by match and fit, tolerance
//! behaviour, sweep sharding.

use lamella::angle_colour::{Viewing, angle_colours};
use lamella::colorimetry::delta_e2000;
use lamella::design::matching::{Goal, MatchSettings, match_colour};
use lamella::design::search::Budget;
use lamella::design::variables::{edited_document, varying};
use lamella::scene::Scene;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};

/// Five layers of invented high/low index films on glass, every thickness free.
fn five_layer(angles: &str) -> Scene {
    let text = format!(
        r#"{{
  "title": "five free layers",
  "materials": {{"hi": {{"n": 2.35}}, "lo": {{"n": 1.46}}, "glass": {{"n": 1.52}}}},
  "stack": [
    {{"material": "hi", "thickness_nm": 60, "vary_nm": [20, 200]}},
    {{"material": "lo", "thickness_nm": 90, "vary_nm": [20, 200]}},
    {{"material": "hi", "thickness_nm": 60, "vary_nm": [20, 200]}},
    {{"material": "lo", "thickness_nm": 90, "vary_nm": [20, 200]}},
    {{"material": "hi", "thickness_nm": 60, "vary_nm": [20, 200]}}
  ],
  "substrate": "glass",
  "wavelengths_nm": {{"from": 380, "to": 780, "step": 5}},
  "angles_deg": {angles}
}}"#
    );
    Scene::from_json(&text, &|_| Err("no files".into())).unwrap()
}

/// The scene with thicknesses `x` written in, re-read from its document.
fn with_design(scene: &Scene, x: &[f64]) -> Scene {
    let doc = edited_document(&scene.document, &varying(scene), x).unwrap();
    Scene::from_json(&doc.to_string(), &|_| Err("no files".into())).unwrap()
}

/// Lab at every scene angle by the ordinary spectrum → colour path.
fn labs(scene: &Scene) -> Vec<[f64; 3]> {
    let v = Viewing::of_scene(scene).unwrap();
    angle_colours(&scene.spectra().unwrap(), &v)
        .unwrap()
        .into_iter()
        .map(|c| c.lab)
        .collect()
}

fn settings(goals: Vec<Goal>, seed: u64) -> MatchSettings {
    MatchSettings {
        goals,
        max_total_nm: None,
        brightness_weight: 0.0,
        budget: Budget {
            max_evals: 40_000,
            good_enough: 0.03,
            handover: 0.5,
            seed,
        },
    }
}

/// Targets made from random designs inside the bounds are feasible; at least
/// 90 % of them must be matched within ΔE00 ≤ 1, judged on the written scene.
#[test]
fn random_feasible_targets_are_reached() {
    let scene = five_layer(r#"{"from": 0, "to": 0, "step": 1}"#);
    let mut rng = StdRng::seed_from_u64(7);
    let cases = 16;
    let mut reached = 0;
    for case in 0..cases {
        let x: Vec<f64> = (0..5).map(|_| rng.random_range(20.0..200.0)).collect();
        let target = labs(&with_design(&scene, &x))[0];
        let goals = vec![Goal {
            angle_deg: 0.0,
            lab: target,
        }];
        let out = match_colour(
            &scene,
            &Viewing::of_scene(&scene).unwrap(),
            &settings(goals, case),
            &|_, _| {},
        )
        .unwrap();
        let got = labs(&with_design(&scene, &out.thicknesses_nm))[0];
        let de = delta_e2000(target, got);
        assert!((de - out.goals[0].delta_e00).abs() < 1e-6, "{de} vs report");
        if de <= 1.0 {
            reached += 1;
        } else {
            eprintln!(
                "case {case}: ΔE00 {de:.3} after {} evaluations",
                out.evaluations
            );
        }
    }
    assert!(reached * 10 >= cases * 9, "{reached}/{cases} reached");
}
