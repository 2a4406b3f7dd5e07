//! Scene features that expand into optics stacks: graded repeats, thickness
//! disorder, incoherent sheets; each checked against an equivalent written-out
//! scene or an analytic limit.

use lamella::scene::Scene;
use serde_json::{Value, json};

fn no_files(_: &str) -> Result<String, String> {
    Err("no files".into())
}

fn scene(v: Value) -> Scene {
    Scene::from_json(&v.to_string(), &no_files).unwrap()
}

fn base(stack: Value) -> Value {
    json!({
        "incident": "air", "substrate": "glass", "stack": stack,
        "materials": {"hi": {"n": 2.3}, "lo": {"n": 1.45}, "glass": {"n": 1.52}},
        "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
        "angles_deg": [0, 35, 70]
    })
}

fn reflectance(s: &Scene) -> Vec<f64> {
    s.spectra().unwrap().rt.iter().map(|x| x.r()).collect()
}

#[test]
fn graded_repeat_equals_its_written_out_layers() {
    let graded = base(json!([{"repeat": 5, "chirp_scale": 1.4, "stack": [
        {"material": "hi", "thickness_nm": 60}, {"material": "lo", "thickness_nm": 95}]}]));
    let written: Vec<Value> = (0..5)
        .flat_map(|p| {
            let s = 1.0 + 0.4 * p as f64 / 4.0;
            [
                json!({"material": "hi", "thickness_nm": 60.0 * s}),
                json!({"material": "lo", "thickness_nm": 95.0 * s}),
            ]
        })
        .collect();
    let (a, b) = (
        reflectance(&scene(graded)),
        reflectance(&scene(base(Value::Array(written)))),
    );
    assert!(a.iter().zip(&b).all(|(x, y)| (x - y).abs() < 1e-12));
}

#[test]
fn zero_disorder_equals_the_ideal_design_and_seeds_reproduce() {
    let stack = json!([{"repeat": 8, "stack": [{"material": "hi", "thickness_nm": 60}, {"material": "lo", "thickness_nm": 95}]}]);
    let mut zero = base(stack.clone());
    zero["disorder"] = json!({"sigma_nm": 0, "realizations": 4});
    let ideal = reflectance(&scene(base(stack.clone())));
    assert!(
        reflectance(&scene(zero))
            .iter()
            .zip(&ideal)
            .all(|(x, y)| (x - y).abs() < 1e-12)
    );

    let with_seed = |seed: u64| {
        let mut v = base(stack.clone());
        v["disorder"] = json!({"sigma_pct": 8, "realizations": 16, "seed": seed});
        reflectance(&scene(v))
    };
    assert_eq!(with_seed(3), with_seed(3));
    assert_ne!(with_seed(3), with_seed(4));
}

/// Common practice: random thickness errors wash out interference fringes, so
/// a thick film's reflectance spectrum flattens toward its incoherent mean.
#[test]
fn disorder_smooths_fringes_of_a_thick_film() {
    let fringe_spread = |sigma: f64| {
        let mut v = base(json!([{"material": "hi", "thickness_nm": 3000, "sigma_nm": sigma}]));
        v["disorder"] = json!({"realizations": 200, "seed": 1});
        v["angles_deg"] = json!([0]);
        let r = reflectance(&scene(v));
        let mean = r.iter().sum::<f64>() / r.len() as f64;
        (r.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / r.len() as f64).sqrt()
    };
    let (sharp, blurred) = (fringe_spread(0.0), fringe_spread(200.0));
    assert!(blurred < 0.2 * sharp, "{sharp} → {blurred}");
}

#[test]
fn incoherent_sheet_scene_matches_the_bare_slab_formula() {
    // Harbecke, Appl. Phys. B 39, 165 (1986): a bare lossless slab in air,
    // R = 2R₁/(1 + R₁) at normal incidence.
    let v = json!({
        "incident": "air", "stack": [],
        "substrate": {"material": "film", "thickness_um": 50, "behind": "air"},
        "materials": {"film": {"n": 1.6}},
        "wavelengths_nm": [550], "angles_deg": [0]
    });
    let r1 = (0.6f64 / 2.6).powi(2);
    let r = reflectance(&scene(v))[0];
    assert!((r - 2.0 * r1 / (1.0 + r1)).abs() < 1e-14);
}

#[test]
fn effective_medium_layer_uses_the_mixing_rule() {
    // Bruggeman at f = 0 and 1 reproduces the pure phases.
    let mk = |f: f64| {
        let mut v = base(json!([{"material": "porous", "thickness_nm": 120}]));
        v["materials"]["porous"] =
            json!({"mix": "bruggeman", "host": "lo", "guest": "air", "fraction": f});
        reflectance(&scene(v))
    };
    let pure = {
        let v = base(json!([{"material": "lo", "thickness_nm": 120}]));
        reflectance(&scene(v))
    };
    assert!(
        mk(0.0)
            .iter()
            .zip(&pure)
            .all(|(x, y)| (x - y).abs() < 1e-12)
    );
    assert!(mk(0.4).iter().zip(&pure).any(|(x, y)| (x - y).abs() > 1e-3));
}
