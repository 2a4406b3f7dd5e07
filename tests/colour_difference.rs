//! The colour-difference formulas against outside numbers: colour-science
//! 0.4.7 (`colour.delta_E`, saved with its script in
//! `reference_data/colour_difference/`) on seeded random CIELAB pairs, and
//! the published CIEDE2000 pairs of Sharma, Wu & Dalal, "The CIEDE2000
//! color-difference formula: implementation notes, supplementary test data,
//! and mathematical observations", Color Res. Appl. 30(1), 21–30 (2005).

use lamella::colorimetry::{
    delta_e_cmc, delta_e76, delta_e94, delta_e2000, delta_e2000_weighted, lab_components,
};
use serde_json::Value;

fn lab(v: &Value) -> [f64; 3] {
    let a: Vec<f64> = serde_json::from_value(v.clone()).unwrap();
    [a[0], a[1], a[2]]
}

#[test]
fn colour_differences_agree_with_colour_science() {
    let data: Value = serde_json::from_str(include_str!(
        "../reference_data/colour_difference/colour_difference_reference.json"
    ))
    .unwrap();
    let mut worst = std::collections::BTreeMap::new();
    for p in data["pairs"].as_array().unwrap() {
        let (r, s) = (lab(&p["reference"]), lab(&p["sample"]));
        for (key, got) in [
            ("de76", delta_e76(r, s)),
            ("de94", delta_e94(r, s)),
            ("cmc_2_1", delta_e_cmc(r, s, 2.0, 1.0)),
            ("cmc_1_1", delta_e_cmc(r, s, 1.0, 1.0)),
            ("de00", delta_e2000(r, s)),
            ("de00_textiles", delta_e2000_weighted(r, s, [2.0, 1.0, 1.0])),
        ] {
            let want = p[key].as_f64().unwrap();
            let e: &mut f64 = worst.entry(key).or_insert(0.0);
            *e = e.max((got - want).abs());
        }
    }
    println!("largest deviation from colour-science: {worst:?}");
    for (key, e) in worst {
        assert!(e < 1e-10, "{key}: {e}");
    }
}

/// Sharma, Wu & Dalal (2005), Table 1, with kL = kC = kH = 1 through the
/// weighted form.
#[test]
fn weighted_ciede2000_at_unit_factors_is_the_published_formula() {
    let text = include_str!("../reference_data/cie/ciede2000_sharma2005.csv");
    for line in text.lines().filter(|l| !l.starts_with('#')).skip(1) {
        let v: Vec<f64> = line.split(',').map(|s| s.parse().unwrap()).collect();
        let got = delta_e2000_weighted([v[1], v[2], v[3]], [v[4], v[5], v[6]], [1.0; 3]);
        assert!(
            (got - v[7]).abs() < 1e-4,
            "pair {}: {got} vs {}",
            v[0],
            v[7]
        );
    }
}

/// Property: ΔL*, ΔC*, ΔH* recombine to ΔE*ab (ΔE*ab² = ΔL*² + ΔC*² + ΔH*²,
/// CIE 015:2018 §8.2.1).
#[test]
fn components_recombine_to_delta_e76() {
    let data: Value = serde_json::from_str(include_str!(
        "../reference_data/colour_difference/colour_difference_reference.json"
    ))
    .unwrap();
    for p in data["pairs"].as_array().unwrap() {
        let (r, s) = (lab(&p["reference"]), lab(&p["sample"]));
        let d = lab_components(r, s);
        let e = (d.dl * d.dl + d.dc * d.dc + d.dh * d.dh).sqrt();
        assert!((e - delta_e76(r, s)).abs() < 1e-9, "{r:?} {s:?}");
    }
}
