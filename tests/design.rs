//! Design tools: recovery of known designs by match and fit, how the search
//! stops, limits refused up front, tolerance behaviour (shared and
//! per-period errors, the angles that count), sweep sharding, and colours
//! that cannot be computed.

use lamella::angle_colour::{Viewing, angle_colours};
use lamella::colorimetry::delta_e2000;
use lamella::design::coating::At;
use lamella::design::matching::{Goal, MatchSettings, match_colour};
use lamella::design::search::{Budget, Stopped};
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
            min_gain: 0.05,
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
            assert_eq!(out.stopped, Stopped::Reached);
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
            min_gain: 1e-5,
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
            per_period: false,
            yield_at: vec![],
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
        let whole: Vec<u8> = lines(&eval, plan, 0..total, Some([50.0, 0.0, 0.0]))
            .unwrap()
            .concat();
        let parts: Vec<u8> = (1..=3)
            .flat_map(|i| {
                lines(
                    &eval,
                    plan,
                    shard(total, i, 3).unwrap(),
                    Some([50.0, 0.0, 0.0]),
                )
                .unwrap()
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

/// A target no design of the bounds comes near stops once restarts stop
/// paying, well before the budget, and says so.
#[test]
fn unreachable_target_stops_before_the_budget() {
    let scene = five_layer(r#"{"from": 0, "to": 0, "step": 1}"#);
    let mut s = settings(
        vec![Goal {
            at: At::Angle(0.0),
            lab: [20.0, 80.0, 80.0],
        }],
        1,
    );
    s.budget.max_evals = 60_000;
    let out = match_colour(&scene, &Viewing::of_scene(&scene).unwrap(), &s, &|_, _| {}).unwrap();
    assert!(!out.reachable && out.goals[0].delta_e00 > 1.0);
    assert_eq!(out.stopped, Stopped::NoImprovement);
    assert!(
        out.evaluations < s.budget.max_evals / 2,
        "{}",
        out.evaluations
    );
    // The same seed stops at the same place with the same design.
    let again = match_colour(&scene, &Viewing::of_scene(&scene).unwrap(), &s, &|_, _| {}).unwrap();
    assert_eq!(out.thicknesses_nm, again.thicknesses_nm);
    assert_eq!(out.evaluations, again.evaluations);
}

/// Two periods of two free layers, 30–150 nm each, over one fixed 100 nm
/// layer: totals run from 2·(30 + 30) + 100 = 220 to 2·(150 + 150) + 100 = 700 nm.
fn repeat_scene() -> Scene {
    let text = r#"{
  "materials": {"hi": {"n": 2.3}, "lo": {"n": 1.45}},
  "stack": [{"repeat": 2, "stack": [
      {"material": "hi", "thickness_nm": 60, "vary_nm": [30, 150]},
      {"material": "lo", "thickness_nm": 90, "vary_nm": [30, 150]}]},
    {"material": "hi", "thickness_nm": 100}],
  "substrate": "lo",
  "wavelengths_nm": {"from": 380, "to": 780, "step": 5}
}"#;
    Scene::from_json(text, &|_| Err("no files".into())).unwrap()
}

/// A thickness limit below the smallest total the bounds allow (periods
/// counted) is refused before the search starts: progress, which the search
/// reports after every generation, is never called.
#[test]
fn infeasible_thickness_limit_is_refused_before_any_evaluation() {
    let scene = repeat_scene();
    let viewing = Viewing::of_scene(&scene).unwrap();
    let mut s = settings(
        vec![Goal {
            at: At::Angle(0.0),
            lab: [50.0, 0.0, 0.0],
        }],
        1,
    );
    s.max_total_nm = Some(219.0);
    let calls = std::sync::atomic::AtomicUsize::new(0);
    let count = |_: usize, _: f64| {
        calls.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    };
    let e = match_colour(&scene, &viewing, &s, &count).unwrap_err();
    assert_eq!(calls.load(std::sync::atomic::Ordering::Relaxed), 0);
    let text = e.to_string();
    assert!(
        text.starts_with("max_total_nm = 219") && text.contains("is 220 nm"),
        "{text}"
    );
    // At the smallest total the limit can be met; the report gives the range.
    s.max_total_nm = Some(220.0);
    s.budget.max_evals = 200;
    let out = match_colour(&scene, &viewing, &s, &count).unwrap();
    assert!(calls.load(std::sync::atomic::Ordering::Relaxed) > 0);
    assert_eq!(out.total_range_nm, (220.0, 700.0));
    // A film's lightness cannot pass 100 nor fall below 0.
    s.goals[0].lab = [101.0, 0.0, 0.0];
    assert!(match_colour(&scene, &viewing, &s, &|_, _| panic!("evaluated")).is_err());
    s.goals[0].lab = [-1.0, 0.0, 0.0];
    assert!(match_colour(&scene, &viewing, &s, &|_, _| panic!("evaluated")).is_err());
}

fn tolerance_settings(
    sigma_nm: f64,
    per_period: bool,
    yield_at: Vec<At>,
) -> lamella::design::tolerance::ToleranceSettings {
    lamella::design::tolerance::ToleranceSettings {
        thickness: lamella::scene::Sigma::Nm(sigma_nm),
        sigma_n: 0.0,
        per_period,
        yield_at,
        samples: 300,
        limit: 1.0,
        seed: 3,
    }
}

/// Property: a 30-period quarter-wave mirror (550 nm) with a 2 nm σ. When
/// every period shares one error, the whole stop band moves with it and the
/// reflected colour follows; when each deposited layer draws its own, the
/// band's position follows roughly the mean of 60 independent errors
/// (σ/√60), so the colour spreads less (though not √60 times less:
/// independent errors also disturb the spectrum in ways a shared one does
/// not, beyond the band's position).
#[test]
fn per_period_errors_average_out_in_a_many_period_stack() {
    use lamella::design::tolerance::tolerance;
    let text = r#"{
  "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}},
  "stack": [{"repeat": 30, "stack": [
      {"material": "hi", "thickness_nm": 58.5},
      {"material": "lo", "thickness_nm": 94.2}]}],
  "substrate": "lo",
  "wavelengths_nm": {"from": 380, "to": 780, "step": 5},
  "angles_deg": [0]
}"#;
    let scene = Scene::from_json(text, &|_| Err("no files".into())).unwrap();
    let viewing = Viewing::of_scene(&scene).unwrap();
    let shared = tolerance(&scene, &viewing, &tolerance_settings(2.0, false, vec![])).unwrap();
    let own = tolerance(&scene, &viewing, &tolerance_settings(2.0, true, vec![])).unwrap();
    assert_eq!((shared.deposited_layers, own.deposited_layers), (2, 60));
    assert!(
        own.overall.p95 < 0.8 * shared.overall.p95,
        "per period {} vs shared {}",
        own.overall.p95,
        shared.overall.p95
    );
    // Sensitivity stays per layer as written (each moved in every period).
    assert_eq!(own.sensitivity.len(), 2);
}

/// The written-out periods of a graded repeat reproduce the scene's own
/// expansion: at σ = 0 the nominal colour equals the ordinary spectrum →
/// colour path, and every sample equals it.
#[test]
fn per_period_expansion_matches_the_scene() {
    use lamella::design::tolerance::tolerance;
    let text = r#"{
  "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}},
  "stack": [{"repeat": 5, "chirp_scale": 1.3, "stack": [
      {"material": "hi", "thickness_nm": 58.5},
      {"repeat": 2, "stack": [{"material": "lo", "thickness_nm": 47.1}]}]},
    {"material": "hi", "thickness_nm": 20}],
  "substrate": "lo",
  "wavelengths_nm": {"from": 380, "to": 780, "step": 5},
  "angles_deg": [0, 40]
}"#;
    let scene = Scene::from_json(text, &|_| Err("no files".into())).unwrap();
    let viewing = Viewing::of_scene(&scene).unwrap();
    let want = labs(&scene);
    for per_period in [false, true] {
        let out = tolerance(
            &scene,
            &viewing,
            &tolerance_settings(0.0, per_period, vec![]),
        )
        .unwrap();
        for (got, want) in out.nominal_lab.iter().zip(&want) {
            assert!(delta_e2000(*got, *want) < 1e-9, "{got:?} vs {want:?}");
        }
        assert_eq!(out.overall.max, 0.0);
    }
}

/// Only the chosen angles count toward the overall statistics and yield;
/// an angle off the scene's grid is refused.
#[test]
fn yield_angles_choose_what_counts() {
    use lamella::design::tolerance::tolerance;
    let scene = five_layer(r#"{"from": 0, "to": 60, "step": 30}"#);
    let viewing = Viewing::of_scene(&scene).unwrap();
    let all = tolerance(&scene, &viewing, &tolerance_settings(2.0, false, vec![])).unwrap();
    assert_eq!(all.counted, vec![true; 3]);
    for (i, a) in [0.0, 30.0, 60.0].iter().enumerate() {
        let one = tolerance(
            &scene,
            &viewing,
            &tolerance_settings(2.0, false, vec![At::Angle(*a)]),
        )
        .unwrap();
        // Same draws, so the per-angle statistics are unchanged.
        assert_eq!(one.per_point, all.per_point);
        assert_eq!(one.overall, one.per_point[i]);
        assert!(one.overall.yield_fraction >= all.overall.yield_fraction);
    }
    let e = tolerance(
        &scene,
        &viewing,
        &tolerance_settings(2.0, false, vec![At::Angle(20.0)]),
    )
    .unwrap_err();
    assert!(e.to_string().starts_with("yield_angles = 20"), "{e}");
}

/// An index too large to compute with is refused where the scene is read,
/// naming the material; at the largest accepted index every design tool
/// still gives finite numbers (the tools' own guard against colours that
/// are not finite is tested in `design::finite`).
#[test]
fn extreme_indices_are_refused_or_finite() {
    use lamella::design::evaluator::Evaluator;
    use lamella::design::sweep::{Plan, lines};
    use lamella::design::tolerance::tolerance;
    let scene_with = |n: &str| {
        let text = format!(
            r#"{{
  "materials": {{"huge": {{"n": {n}}}, "glass": {{"n": 1.52}}}},
  "stack": [{{"material": "huge", "thickness_nm": 100, "vary_nm": [50, 150]}}],
  "substrate": "glass",
  "wavelengths_nm": {{"from": 400, "to": 700, "step": 10}},
  "angles_deg": [0, 30]
}}"#
        );
        Scene::from_json(&text, &|_| Err("no files".into()))
    };
    let e = scene_with("1e200").unwrap_err().to_string();
    assert!(e.contains("materials.huge") && e.contains("1e200"), "{e}");
    let scene = scene_with("1e6").unwrap();
    let viewing = Viewing::of_scene(&scene).unwrap();
    let s = settings(
        vec![Goal {
            at: At::Angle(0.0),
            lab: [50.0, 0.0, 0.0],
        }],
        1,
    );
    let mut small = s.clone();
    small.budget.max_evals = 100;
    let matched = match_colour(&scene, &viewing, &small, &|_, _| {}).unwrap();
    assert!(matched.goals.iter().all(|g| g.delta_e00.is_finite()));
    let tol = tolerance(&scene, &viewing, &tolerance_settings(1.0, false, vec![])).unwrap();
    assert!((0.0..=1.0).contains(&tol.overall.yield_fraction));
    let eval = Evaluator::colour(&scene, varying(&scene), &[0.0], &viewing).unwrap();
    let rows = lines(&eval, Plan::Grid(2), 0..2, None).unwrap();
    assert!(!rows.is_empty());
}

/// Measured reflectance in percent is refused with the line and the value.
#[test]
fn percent_readings_are_refused() {
    use lamella::measured::{ReadOptions, read};
    let options = ReadOptions::default();
    assert!(read("wavelength_nm,R\n500,1.5\n", &options).is_ok());
    let e = read("wavelength_nm,R\n500,0.2\n510,45.2\n", &options).unwrap_err();
    let text = e.to_string();
    assert!(
        text.contains("line 3")
            && text.contains("45.2")
            && text.contains("looks like percent: divide by 100"),
        "{text}"
    );
}

/// Media with identical indices share the evaluator's precomputed terms;
/// on seeded random stacks mixing such twins (and an absorbing layer) the
/// evaluator agrees with the scene's ordinary spectra, with and without
/// index shifts given to one twin.
#[test]
fn twin_media_share_terms_without_changing_spectra() {
    use lamella::angle_colour::{Polarization, Side};
    use lamella::design::evaluator::Evaluator;
    let mut rng = StdRng::seed_from_u64(21);
    for _ in 0..8 {
        let names = ["a", "a_twin", "b", "metal"];
        // Both twins are always used; the other layers are drawn.
        let layers: Vec<String> = (0..5)
            .map(|i| {
                format!(
                    r#"{{"material": "{}", "thickness_nm": {:.1}}}"#,
                    if i < 2 {
                        names[i]
                    } else {
                        names[rng.random_range(0..4)]
                    },
                    rng.random_range(5.0..150.0)
                )
            })
            .collect();
        let text = format!(
            r#"{{"materials": {{"a": {{"n": 2.1}}, "a_twin": {{"n": 2.1}}, "b": {{"n": 1.4}},
                "metal": {{"n": 0.2, "k": 3.0}}, "glass": {{"n": 1.52}}}},
              "stack": [{}], "substrate": "glass",
              "wavelengths_nm": {{"from": 400, "to": 700, "step": 20}}, "angles_deg": [0, 50]}}"#,
            layers.join(",")
        );
        let scene = Scene::from_json(&text, &|_| Err("no files".into())).unwrap();
        let want = scene.spectra().unwrap();
        let eval = Evaluator::spectral(
            &scene,
            vec![],
            &scene.wavelengths_nm,
            &scene.angles_deg,
            Side::Reflect,
            Polarization::Unpolarized,
        )
        .unwrap();
        let nw = scene.wavelengths_nm.len();
        let media = scene.media.len();
        let twin = scene.medium("a_twin").unwrap();
        let zero = vec![0.0; media];
        let mut shifted = zero.clone();
        shifted[twin] = 1e-12;
        for dn in [None, Some(zero.as_slice()), Some(shifted.as_slice())] {
            eval.eval(&[], dn, |o| {
                for a in 0..2 {
                    for (w, rt) in want.at_angle(a).iter().enumerate() {
                        let got = o.spectrum[a * nw + w];
                        assert!((got - rt.r()).abs() < 1e-9, "{got} vs {}", rt.r());
                    }
                }
            });
        }
    }
}

/// A thick incoherent layer's thickness is fitted in µm (`vary_um`), from
/// the absorption it adds to the light returning from behind it, and the
/// fitted scene keeps it in µm.
#[test]
fn fit_recovers_a_thick_incoherent_layer_in_micrometres() {
    use lamella::design::fit::{FitSettings, Measured, fit};
    use lamella::design::variables::edited_document;
    let scene_at = |um: f64| {
        let text = format!(
            r#"{{"materials": {{"film": {{"n": 2.0}}, "tinted": {{"n": 1.5, "k": 2e-4}}, "glass": {{"n": 1.52}}}},
  "stack": [{{"material": "film", "thickness_nm": 80}},
            {{"material": "tinted", "thickness_um": {um}, "incoherent": true, "vary_um": [20, 100]}},
            {{"material": "film", "thickness_nm": 80}}],
  "substrate": "glass", "wavelengths_nm": {{"from": 400, "to": 700, "step": 10}}, "angles_deg": [0]}}"#
        );
        Scene::from_json(&text, &|_| Err("no files".into())).unwrap()
    };
    let truth = scene_at(60.0).spectra().unwrap();
    let measured = vec![Measured {
        at: At::Angle(0.0),
        wavelengths_nm: truth.wavelengths_nm.clone(),
        r: truth.at_angle(0).iter().map(|x| x.r()).collect(),
    }];
    let start = scene_at(35.0);
    let settings = FitSettings {
        fit_scale: false,
        budget: Budget {
            max_evals: 2_000,
            good_enough: 1e-9,
            handover: 0.0,
            min_gain: 1e-9,
            seed: 1,
        },
    };
    let out = fit(&start, &measured, &settings).unwrap();
    assert_eq!(
        (out.variables[0].low_nm, out.variables[0].high_nm),
        (20e3, 100e3)
    );
    assert!(
        (out.thicknesses_nm[0] - 60e3).abs() < 100.0,
        "{:?}",
        out.thicknesses_nm
    );
    let doc = edited_document(&start.document, &out.variables, &out.thicknesses_nm).unwrap();
    let layer = &doc["stack"][1];
    assert!(layer.get("thickness_nm").is_none(), "{layer}");
    assert!(
        (layer["thickness_um"].as_f64().unwrap() - 60.0).abs() < 0.1,
        "{layer}"
    );
}
