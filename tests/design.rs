//! Design tools: recovery of known designs by match and fit, tolerance
//! behaviour, sweep sharding.

use lamella::angle_colour::{Viewing, angle_colours};
use lamella::colorimetry::delta_e2000;
use lamella::design::coating::At;
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
            at: At::Angle(0.0),
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

/// A known design's spectrum with seeded Gaussian noise (σ = 0.002 in R) is
/// fitted back within 2 nm per layer.
#[test]
fn fit_recovers_a_noisy_synthetic_spectrum() {
    use lamella::design::fit::{FitSettings, Measured, fit};
    use rand_distr::{Distribution, Normal};
    let scene = five_layer(r#"{"from": 0, "to": 0, "step": 1}"#);
    let truth = [85.0, 140.0, 62.0, 110.0, 150.0];
    let s = with_design(&scene, &truth).spectra().unwrap();
    let noise = Normal::new(0.0, 0.002).unwrap();
    let mut rng = StdRng::seed_from_u64(3);
    let measured = vec![Measured {
        at: At::Angle(0.0),
        wavelengths_nm: s.wavelengths_nm.clone(),
        r: s.at_angle(0)
            .iter()
            .map(|x| x.r() + noise.sample(&mut rng))
            .collect(),
    }];
    let settings = FitSettings {
        fit_scale: false,
        budget: Budget {
            max_evals: 20_000,
            good_enough: 1e-5,
            handover: 0.0,
            seed: 1,
        },
    };
    let out = fit(&scene, &measured, &settings).unwrap();
    for ((got, want), u) in out
        .thicknesses_nm
        .iter()
        .zip(truth)
        .zip(&out.uncertainties_nm)
    {
        assert!(
            (got - want).abs() < 2.0,
            "{:?} vs {truth:?}",
            out.thicknesses_nm
        );
        assert!(
            u.is_some_and(|u| u > 0.0 && u < 2.0),
            "{:?}",
            out.uncertainties_nm
        );
    }
    assert!(out.rms < 0.003, "rms {}", out.rms);
}

/// σ = 0 reproduces the nominal colour exactly; p95 grows with σ.
#[test]
fn tolerance_is_zero_at_zero_sigma_and_grows_with_sigma() {
    use lamella::design::tolerance::{ToleranceSettings, tolerance};
    use lamella::scene::Sigma;
    let scene = five_layer(r#"{"from": 0, "to": 45, "step": 45}"#);
    let viewing = Viewing::of_scene(&scene).unwrap();
    let run = |s: f64, dn: f64| {
        let settings = ToleranceSettings {
            thickness: Sigma::Nm(s),
            sigma_n: dn,
            samples: 200,
            limit: 1.0,
            seed: 5,
        };
        tolerance(&scene, &viewing, &settings).unwrap()
    };
    let zero = run(0.0, 0.0);
    assert_eq!(zero.overall.max, 0.0);
    assert_eq!(zero.overall.yield_fraction, 1.0);
    let p95: Vec<f64> = [0.5, 1.0, 2.0, 4.0]
        .iter()
        .map(|&s| run(s, 0.0).overall.p95)
        .collect();
    assert!(p95.windows(2).all(|w| w[1] > w[0]), "{p95:?}");
    let with_index = run(1.0, 0.01);
    assert!(with_index.overall.p95 > run(1.0, 0.0).overall.p95);
    let ranked = &with_index.sensitivity;
    assert_eq!(ranked.len(), 5);
    assert!(ranked.iter().all(|s| s.delta_e00_index.is_some()));
}

/// A layer inside a repeat group is one variable; matching a colour made by
/// a known period reaches it, and the thickness limit is respected.
#[test]
fn repeat_group_layer_is_one_shared_variable() {
    let text = r#"{
  "materials": {"hi": {"n": 2.3}, "lo": {"n": 1.45}},
  "stack": [{"repeat": 4, "stack": [
      {"material": "hi", "thickness_nm": 60, "vary_nm": [30, 150]},
      {"material": "lo", "thickness_nm": 90, "vary_nm": [30, 150]}]}],
  "substrate": "lo",
  "wavelengths_nm": {"from": 380, "to": 780, "step": 5}
}"#;
    let scene = Scene::from_json(text, &|_| Err("no files".into())).unwrap();
    assert_eq!(varying(&scene).len(), 2);
    let target = labs(&with_design(&scene, &[75.0, 120.0]))[0];
    let mut s = settings(
        vec![Goal {
            at: At::Angle(0.0),
            lab: target,
        }],
        1,
    );
    s.max_total_nm = Some(4.0 * 200.0);
    let out = match_colour(&scene, &Viewing::of_scene(&scene).unwrap(), &s, &|_, _| {}).unwrap();
    assert!(
        out.goals[0].delta_e00 <= 1.0,
        "{:?}",
        out.goals[0].delta_e00
    );
    assert!(out.total_nm <= 800.0 + 1e-6 && out.reachable);
    let got = labs(&with_design(&scene, &out.thicknesses_nm))[0];
    assert!(delta_e2000(target, got) <= 1.0);
}

/// Several goal angles: a colour travel made by a known design is reached.
#[test]
fn targets_at_two_angles_are_reached() {
    let scene = five_layer(r#"{"from": 0, "to": 45, "step": 45}"#);
    let truth = [120.0, 60.0, 95.0, 150.0, 40.0];
    let l = labs(&with_design(&scene, &truth));
    let goals = vec![
        Goal {
            at: At::Angle(0.0),
            lab: l[0],
        },
        Goal {
            at: At::Angle(45.0),
            lab: l[1],
        },
    ];
    let out = match_colour(
        &scene,
        &Viewing::of_scene(&scene).unwrap(),
        &settings(goals, 2),
        &|_, _| {},
    )
    .unwrap();
    for g in &out.goals {
        assert!(
            g.delta_e00 <= 1.0,
            "{:?}",
            out.goals.iter().map(|g| g.delta_e00).collect::<Vec<_>>()
        );
    }
}

/// Sweep shards concatenated in order equal the whole sweep; grids hit the bounds.
#[test]
fn sweep_shards_concatenate_to_the_whole() {
    use lamella::design::evaluator::Evaluator;
    use lamella::design::sweep::{Plan, lines, shard};
    let scene = five_layer(r#"{"from": 0, "to": 0, "step": 1}"#);
    let eval = Evaluator::colour(
        &scene,
        varying(&scene),
        &[0.0],
        &Viewing::of_scene(&scene).unwrap(),
    )
    .unwrap();
    for plan in [
        Plan::Grid(3),
        Plan::Random {
            samples: 1000,
            seed: 9,
        },
    ] {
        let total = plan.count(5).unwrap();
        let whole: Vec<u8> = lines(&eval, plan, 0..total, Some([50.0, 0.0, 0.0])).concat();
        let parts: Vec<u8> = (1..=3)
            .flat_map(|i| {
                lines(
                    &eval,
                    plan,
                    shard(total, i, 3).unwrap(),
                    Some([50.0, 0.0, 0.0]),
                )
                .concat()
            })
            .collect();
        assert_eq!(whole, parts);
        let text = String::from_utf8(whole).unwrap();
        assert_eq!(text.lines().count() as u64, total);
        for line in text.lines() {
            let v: serde_json::Value = serde_json::from_str(line).unwrap();
            assert!(v["delta_e00"].is_number() && v["hex"].is_string());
        }
    }
    assert!(shard(10, 0, 3).is_err() && shard(10, 4, 3).is_err() && shard(10, 1, 0).is_err());
    assert_eq!(Plan::Grid(3).count(5).unwrap(), 243);
}
