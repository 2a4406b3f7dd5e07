//! Design tools on effect-pigment coatings: the restricted model against the
//! full one, matching geometry targets, tolerance at geometries, fitting
//! platelet thicknesses to multi-geometry reflectance factors.

use lamella::angle_colour::Viewing;
use lamella::colorimetry::{ColourOptions, Weights, delta_e2000};
use lamella::design::coating::{CoatingEvaluator, with_coating};
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
        geometries.extend(parse_geometries(&serde_json::json!("15"), "g").unwrap());
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
