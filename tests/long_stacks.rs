//! Long periodic stacks against a 50-digit reference: every repeat count a
//! scene accepts (1 to 10⁸ periods), lossless and weakly absorbing, inside,
//! outside and at the edges of the stop band, at 0°, 30° and 60°.
//!
//! Reference: `reference_data/long_stacks/long_stack_reference.json`, made by
//! `make_long_stack_reference.py` beside it with mpmath 1.3.0 (PyPI) at 50
//! digits, powering the period by Abelès' closed form (Born & Wolf,
//! *Principles of Optics*, 7th ed. 1999, §1.6.5) rather than by squaring.
//! The bound is |ΔR|, |ΔT| ≤ 1e-9 + 1e-14·N: double-precision inputs make
//! the total phase of N periods uncertain by about N·1e-16.

use std::collections::BTreeMap;

use lamella::scene::Scene;
use serde_json::{Value, json};

const REFERENCE: &str = include_str!("../reference_data/long_stacks/long_stack_reference.json");

fn no_files(_: &str) -> Result<String, String> {
    Err("no files".into())
}

fn bound(periods: u64) -> f64 {
    1e-9 + 1e-14 * periods as f64
}

/// A scene of the reference stack `stack` with its periods written as
/// nested groups `counts` (outermost first), at `wavelengths` and `angle`.
fn scene(stack: &Value, counts: &[u64], wavelengths: &[f64], angle: f64) -> Scene {
    let mut materials = serde_json::Map::new();
    let mut material = |layer: &Value| {
        let name = format!("m{}", materials.len());
        materials.insert(name.clone(), json!({"n": layer["n"], "k": layer["k"]}));
        json!({"material": name, "thickness_nm": layer["thickness_nm"]})
    };
    let cap = material(&stack["cap"]);
    let mut group: Vec<Value> = stack["period"]
        .as_array()
        .unwrap()
        .iter()
        .map(&mut material)
        .collect();
    for &count in counts.iter().rev() {
        group = vec![json!({"repeat": count, "stack": group})];
    }
    materials.insert("sub".into(), json!({"n": stack["substrate_n"]}));
    let doc = json!({
        "stack": [cap, group[0]],
        "substrate": "sub",
        "materials": materials,
        "wavelengths_nm": wavelengths,
        "angles_deg": [angle],
    });
    Scene::from_json(&doc.to_string(), &no_files).expect("valid scene")
}

/// Cases grouped by (stack, period count, angle).
type Groups<'a> = BTreeMap<(String, u64, i64), Vec<&'a Value>>;

fn groups(reference: &Value) -> Groups<'_> {
    let mut out = Groups::new();
    for case in reference["cases"].as_array().unwrap() {
        let key = (
            case["stack"].as_str().unwrap().to_string(),
            case["count"].as_u64().unwrap(),
            case["angle_deg"].as_f64().unwrap() as i64,
        );
        out.entry(key).or_default().push(case);
    }
    out
}

/// Checks one way of writing the periods; returns the largest deviation
/// relative to the bound.
fn check(
    reference: &Value,
    name: &str,
    count: u64,
    angle: i64,
    cases: &[&Value],
    nesting: &[u64],
) -> f64 {
    let wavelengths: Vec<f64> = cases
        .iter()
        .map(|c| c["wavelength_nm"].as_f64().unwrap())
        .collect();
    let spectra = scene(
        &reference["stacks"][name],
        nesting,
        &wavelengths,
        angle as f64,
    )
    .spectra()
    .unwrap();
    let mut worst = 0.0f64;
    for (case, x) in cases.iter().zip(&spectra.rt) {
        let at = format!(
            "{name}, N = {count} as {nesting:?}, {} nm, {angle}°",
            case["wavelength_nm"]
        );
        for (got, key) in [(x.rs, "R_s"), (x.rp, "R_p"), (x.ts, "T_s"), (x.tp, "T_p")] {
            assert!(got.is_finite(), "{key} = {got} at {at}");
            let want = case[key].as_f64().unwrap();
            let dev = (got - want).abs();
            assert!(
                dev <= bound(count),
                "{key} = {got}, reference {want} (Δ {dev:e}) at {at}"
            );
            worst = worst.max(dev / bound(count));
        }
        if name == "lossless" {
            for (r, t) in [(x.rs, x.ts), (x.rp, x.tp)] {
                assert!(
                    (r + t - 1.0).abs() <= bound(count),
                    "R + T = {} at {at}",
                    r + t
                );
            }
        }
        if angle == 0 {
            assert!((x.rs - x.rp).abs() <= bound(count), "R_s ≠ R_p at {at}");
        }
    }
    worst
}

#[test]
fn single_repeat_groups_match_the_50_digit_reference() {
    let reference: Value = serde_json::from_str(REFERENCE).unwrap();
    let mut worst = BTreeMap::new();
    for ((name, count, angle), cases) in &groups(&reference) {
        let w = check(&reference, name, *count, *angle, cases, &[*count]);
        let e = worst.entry((name.clone(), *count)).or_insert(0.0f64);
        *e = e.max(w);
    }
    // Every count and stack of the reference was exercised; the deviations
    // are printed with `cargo test --release --test long_stacks -- --nocapture`.
    assert_eq!(worst.len(), 20);
    for ((name, count), w) in &worst {
        let b = bound(*count);
        println!(
            "{name:>16} N = {count:>9}: largest |Δ| = {:.1e} (bound {b:.1e})",
            w * b
        );
    }
}

/// The same periods written as nested groups (10⁶ = 1000 × 1000 =
/// 100 × 100 × 100, 10⁸ = 10⁴ × 10⁴) give the same numbers.
#[test]
fn nested_repeat_groups_match_the_50_digit_reference() {
    let reference: Value = serde_json::from_str(REFERENCE).unwrap();
    for ((name, count, angle), cases) in &groups(&reference) {
        let nestings: &[&[u64]] = match count {
            1_000_000 => &[&[1000, 1000], &[100, 100, 100], &[2, 500_000]],
            100_000_000 => &[&[10_000, 10_000]],
            1000 => &[&[10, 100], &[100, 10]],
            _ => &[],
        };
        for nesting in nestings {
            check(&reference, name, *count, *angle, cases, nesting);
        }
    }
}

/// Nested groups repeat their layers by the product of their counts; more
/// than 10⁸ in all is refused when the scene is read, naming the total.
#[test]
fn nested_groups_beyond_the_limit_are_refused_with_the_total() {
    let reference: Value = serde_json::from_str(REFERENCE).unwrap();
    let stack = &reference["stacks"]["lossless"];
    let mut materials = serde_json::Map::new();
    materials.insert("hi".into(), json!({"n": 2.35}));
    let doc = json!({
        "stack": [{"repeat": 100_000, "stack": [{"repeat": 10_000, "stack": [
            {"material": "hi", "thickness_nm": stack["cap"]["thickness_nm"]}]}]}],
        "substrate": "hi",
        "materials": materials,
    });
    let err = Scene::from_json(&doc.to_string(), &no_files)
        .unwrap_err()
        .to_string();
    assert!(err.contains("stack[0].repeat"), "{err}");
    assert!(err.contains("1000000000 periods in all"), "{err}");
    assert!(err.contains("100000000"), "{err}");
}
