//! Effect-pigment coatings: the platelet model against the engine, the
//! lightness flop, reciprocity, the TiO2-on-mica colour sequence and the
//! `multiangle` command.

mod common;

use common::lamella;

use lamella::colorimetry::{ColourOptions, Illuminant, Observer, Weights};
use lamella::optics::{self, Exit, Stack};
use lamella::pigment::{Coating, Geometry, Model, measure};
use lamella::scene::{Scene, realise};

fn scene(json: &str) -> Scene {
    Scene::from_json(json, &|p: &str| Err(format!("no file {p}"))).expect("valid scene")
}

fn coating_scene(binder_n: f64, coating: &str, step: f64) -> String {
    format!(
        r#"{{"materials": {{"clear": {{"n": {binder_n}}}}},
            "coating": {coating},
            "wavelengths_nm": {{"from": 380, "to": 780, "step": {step}}},
            "illuminant": "D65", "observer": "CIE1964_10"}}"#
    )
}

/// Fresnel power transmittances (T_s, T_p) from air into index n at
/// incidence `theta` (Born & Wolf, *Principles of Optics*, 7th ed. 1999,
/// §1.5.2–1.5.3).
fn fresnel_t(n: f64, theta: f64) -> (f64, f64) {
    let c1 = theta.cos();
    let c2 = (1.0 - (theta.sin() / n).powi(2)).sqrt();
    let rs = (c1 - n * c2) / (c1 + n * c2);
    let rp = (n * c1 - c2) / (n * c1 + c2);
    (1.0 - rs * rs, 1.0 - rp * rp)
}

/// max/min − 1 of the ratio of two spectra: 0 for proportional shapes.
fn shape_mismatch(a: &[f64], b: &[f64]) -> f64 {
    let ratios: Vec<f64> = a.iter().zip(b).map(|(x, y)| x / y).collect();
    let max = ratios.iter().cloned().fold(f64::MIN, f64::max);
    let min = ratios.iter().cloned().fold(f64::MAX, f64::min);
    max / min - 1.0
}

/// With σ = 0.5° the coating's spectrum at 45° illumination and detection
/// 0.6° off specular is the platelet's reflectance at the mirror angle
/// inside the binder, times the surface transmittances in and out per
/// polarization. A small coverage (0.002) keeps the attenuation's own
/// spectral shape below 0.1 %.
#[test]
fn narrow_spread_follows_the_engine_at_the_mirror_angle() {
    for n in [1.0, 1.5] {
        let s = scene(&coating_scene(
            n,
            r#"{"binder": "clear", "platelet": [{"material": "tio2", "thickness_nm": 120}],
                "tilt_sigma_deg": 0.5, "platelet_coverage": 0.002, "background": "black"}"#,
            5.0,
        ));
        let coating = Coating::from_scene(&s).unwrap();
        let model = Model::new(&s, &coating).unwrap();
        let (ti, to) = (45f64.to_radians(), 44.4f64.to_radians());
        let g = Geometry::aspecular(45.0, 0.6).unwrap();
        let mut rf = vec![0.0; s.wavelengths_nm.len()];
        model.reflectance_factor(g.illumination, g.detection, &mut rf);
        // Internal angles and the mirror angle (in-plane: their mean).
        let (ti_in, to_in) = ((ti.sin() / n).asin(), (to.sin() / n).asin());
        let mirror = 0.5 * (ti_in + to_in);
        let index = s.indices(&s.wavelengths_nm).unwrap();
        let stack = Stack {
            incident: coating.binder,
            nodes: realise(&coating.platelet, None).remove(0),
            exit: Exit::Medium(coating.binder),
        };
        let engine = optics::compute(&[stack], &index, &s.wavelengths_nm, &[mirror.to_degrees()]);
        let ((is, ip), (os, op)) = (fresnel_t(n, ti), fresnel_t(n, to));
        let expected: Vec<f64> = engine
            .rt
            .iter()
            .map(|x| 0.5 * (is * x.rs * os + ip * x.rp * op))
            .collect();
        let mismatch = shape_mismatch(&rf, &expected);
        assert!(mismatch < 0.01, "n = {n}: shapes differ by {mismatch}");
        assert!(rf.iter().all(|&r| r > 0.0));
    }
}

fn l_star(m: &lamella::pigment::Measurement, name: &str) -> f64 {
    m.geometries
        .iter()
        .find(|g| g.geometry.name == name)
        .unwrap()
        .colour
        .lab[0]
}

fn weights(s: &Scene) -> Weights {
    Weights::new(
        &s.wavelengths_nm,
        &Illuminant::builtin("D65").unwrap(),
        Observer::Cie1964_10,
    )
    .unwrap()
}

/// On black, lightness falls from near-specular to far-from-specular
/// geometries of the 45° set, and the flop index grows as σ shrinks.
#[test]
fn lightness_flops_and_the_index_grows_as_the_spread_narrows() {
    let mut flops = Vec::new();
    for sigma in [20.0, 12.0, 6.0] {
        let s = scene(&coating_scene(
            1.5,
            &format!(
                r#"{{"binder": "clear", "platelet": [{{"material": "tio2", "thickness_nm": 60}},
                    {{"material": "mica", "thickness_nm": 300}}, {{"material": "tio2", "thickness_nm": 60}}],
                    "tilt_sigma_deg": {sigma}, "platelet_coverage": 1, "background": "black"}}"#
            ),
            10.0,
        ));
        let coating = Coating::from_scene(&s).unwrap();
        let model = Model::new(&s, &coating).unwrap();
        let m = measure(
            &model,
            &coating.geometries,
            &weights(&s),
            &ColourOptions::default(),
        )
        .unwrap();
        let l: Vec<f64> = ["45as15", "45as25", "45as45", "45as75", "45as110"]
            .iter()
            .map(|n| l_star(&m, n))
            .collect();
        assert!(l.windows(2).all(|p| p[0] > p[1]), "σ = {sigma}: L* {l:?}");
        flops.push(m.flop_index.expect("flop index defined"));
    }
    assert!(
        flops.windows(2).all(|p| p[1] > p[0]),
        "flop index by σ 20, 12, 6: {flops:?}"
    );
}

/// Helmholtz reciprocity: exchanging illumination and detection leaves the
/// reflectance factor unchanged, in and out of the plane of incidence, with
/// an asymmetric absorbing platelet, a dispersive binder and a white
/// background.
#[test]
fn reciprocity_holds() {
    let s = scene(
        r#"{"coating": {"binder": "pmma",
              "platelet": [{"material": "tio2", "thickness_nm": 90}, {"material": "silver", "thickness_nm": 20}],
              "tilt_sigma_deg": 15, "platelet_coverage": 0.8, "background": "white"},
            "wavelengths_nm": {"from": 400, "to": 700, "step": 20}}"#,
    );
    let coating = Coating::from_scene(&s).unwrap();
    let model = Model::new(&s, &coating).unwrap();
    let nw = s.wavelengths_nm.len();
    let pairs = [
        Geometry::aspecular(45.0, 25.0).unwrap(),
        Geometry::aspecular(15.0, 80.0).unwrap(),
        Geometry::directions(60.0, 20.0, 70.0).unwrap(),
        Geometry::directions(30.0, 75.0, 200.0).unwrap(),
    ];
    for g in pairs {
        let (mut a, mut b) = (vec![0.0; nw], vec![0.0; nw]);
        model.reflectance_factor(g.illumination, g.detection, &mut a);
        let r = g.swapped();
        model.reflectance_factor(r.illumination, r.detection, &mut b);
        for (x, y) in a.iter().zip(&b) {
            assert!(
                (x - y).abs() <= 1e-12 * x.abs().max(1e-3),
                "{}: {x} vs {y}",
                g.name
            );
        }
        assert!(a.iter().all(|&x| x > 0.0));
    }
}

/// The trade's colour sequence of TiO2-on-mica pearl pigments as the TiO2
/// layer grows: silver-white, gold, red, violet, blue, green (Pfaff &
/// Reynders, "Angle-dependent optical effects deriving from submicron
/// structures of films and pigments", Chem. Rev. 99, 1963, 1999; the
/// sequence is recalled from memory, not re-read). Swept over TiO2 40–170 nm
/// on both faces of an uneven 400 nm mica core (35 % spread), in a binder of
/// index 1.5 on black, seen at 45as15. Names by CIELAB hue: silver C* < 8;
/// gold 60–115°; red 320–60°; violet 280–320°; blue 200–280°; green 115–200°.
#[test]
fn tio2_on_mica_runs_through_the_trade_sequence() {
    let mut names: Vec<&str> = Vec::new();
    for t in (40..=170).step_by(10) {
        let s = scene(&coating_scene(
            1.5,
            &format!(
                r#"{{"binder": "clear", "platelet": [{{"material": "tio2", "thickness_nm": {t}}},
                    {{"material": "mica", "thickness_nm": 400, "sigma_pct": 35}},
                    {{"material": "tio2", "thickness_nm": {t}}}],
                    "disorder": {{"realizations": 32, "seed": 3}},
                    "tilt_sigma_deg": 10, "background": "black", "geometries": ["45as15"]}}"#
            ),
            10.0,
        ));
        let coating = Coating::from_scene(&s).unwrap();
        let model = Model::new(&s, &coating).unwrap();
        let m = measure(
            &model,
            &coating.geometries,
            &weights(&s),
            &ColourOptions::default(),
        )
        .unwrap();
        let [_, c, h] = m.geometries[0].colour.lch;
        let name = if c < 8.0 {
            "silver"
        } else if (60.0..115.0).contains(&h) {
            "gold"
        } else if !(60.0..320.0).contains(&h) {
            "red"
        } else if h >= 280.0 {
            "violet"
        } else if h >= 200.0 {
            "blue"
        } else {
            "green"
        };
        if names.last() != Some(&name) {
            names.push(name);
        }
    }
    assert_eq!(
        names,
        ["silver", "gold", "red", "violet", "blue", "green"],
        "sequence of colours as TiO2 grows"
    );
}

#[test]
fn multiangle_command_reports_every_geometry() {
    let scene = concat!(env!("CARGO_MANIFEST_DIR"), "/scenes/pearl_compact_lid.json");
    let out = lamella(&["multiangle", scene, "--format", "json", "--spectra"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let g = v["geometries"].as_array().unwrap();
    let names: Vec<&str> = g.iter().map(|r| r["name"].as_str().unwrap()).collect();
    assert_eq!(
        names,
        ["45as-15", "45as15", "45as25", "45as45", "45as75", "45as110"]
    );
    for key in [
        "X", "Y", "Z", "L", "a", "b", "C", "h", "srgb", "hex", "in_gamut",
    ] {
        assert!(g.iter().all(|r| !r[key].is_null()), "{key}");
    }
    let nw = v["wavelength_nm"].as_array().unwrap().len();
    assert!(
        g.iter()
            .all(|r| r["reflectance_factor"].as_array().unwrap().len() == nw)
    );
    assert!(v["flop_index"].as_f64().unwrap() > 1.0);
    assert!(v["hue_travel_deg"].is_number());

    let out = lamella(&[
        "multiangle",
        scene,
        "--format",
        "csv",
        "--geometries",
        "45as15,45",
    ]);
    let text = String::from_utf8(out.stdout).unwrap();
    assert_eq!(text.lines().count(), 1 + 1 + 6);
    assert!(text.starts_with("name,illumination_deg,aspecular_deg"));

    let out = lamella(&["multiangle", scene, "--geometries", "45as15"]);
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("needs the geometries 45as15, 45as45 and 45as110"));

    for list in ["45at15", "15", "45as15,15"] {
        let bad = lamella(&["multiangle", scene, "--geometries", list]);
        assert_eq!(bad.status.code(), Some(2), "{list}");
        let err = String::from_utf8_lossy(&bad.stderr);
        assert!(
            err.contains("the set \"45\" (45as-15, 45as15"),
            "{list}: {err}"
        );
    }
    let help = lamella(&["multiangle", "--help"]);
    let help = String::from_utf8(help.stdout).unwrap();
    for flag in [
        "--format",
        "--spectra",
        "--geometries",
        "--illuminant",
        "--observer",
        "--gamut",
        "--output",
        "45as15",
        "45as-15",
        "25as40",
        "ASTM E2194",
        "tilt_sigma_deg",
        "tilt_density",
        "platelet_coverage",
        "background",
        "detection_azimuth_deg",
        "flop_index",
        "hue_travel_deg",
        "surface_gloss_Y",
    ] {
        assert!(help.contains(flag), "{flag} missing from --help");
    }
}

/// The set "15" is not built in: a scene asking for it is refused (exit 2)
/// with the accepted forms listed; the same geometries listed by name work.
#[test]
fn a_scene_asking_for_the_set_15_is_refused() {
    let dir = std::env::temp_dir().join(format!("lamella-pigment-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let base: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/scenes/pearl_compact_lid.json"
        ))
        .unwrap(),
    )
    .unwrap();
    for (geometries, ok) in [
        (serde_json::json!("15"), false),
        (serde_json::json!(15), false),
        (serde_json::json!(["15as-15", "15as15", "15as45"]), true),
    ] {
        let mut s = base.clone();
        s["coating"]["geometries"] = geometries.clone();
        let path = dir.join("pearl.json");
        std::fs::write(&path, s.to_string()).unwrap();
        let out = lamella(&["multiangle", path.to_str().unwrap(), "--format", "csv"]);
        let err = String::from_utf8_lossy(&out.stderr);
        if ok {
            assert!(out.status.success(), "{geometries}: {err}");
            assert_eq!(String::from_utf8_lossy(&out.stdout).lines().count(), 4);
        } else {
            assert_eq!(out.status.code(), Some(2), "{geometries}: {err}");
            for needle in [
                "coating.geometries",
                "45as-15, 45as15, 45as25, 45as45, 45as75, 45as110",
                "ILLUMINATIONasASPECULAR",
                "detection_azimuth_deg",
            ] {
                assert!(err.contains(needle), "{geometries}: {err} lacks {needle}");
            }
        }
    }
}

#[test]
fn bad_coating_sections_are_refused_with_the_key() {
    for (coating, key) in [
        (r#"{"binder": "clear"}"#, "coating.platelet"),
        (
            r#"{"binder": "clear", "platelet": [{"material": "tio2", "thickness_nm": 50}], "tilt_sigma_deg": 0}"#,
            "coating.tilt_sigma_deg",
        ),
        (
            r#"{"binder": "clear", "platelet": [{"material": "tio2", "thickness_nm": 50}], "background": "grey"}"#,
            "coating.background",
        ),
        (
            r#"{"binder": "clear", "platelet": [{"material": "tio2", "thickness_nm": 50}], "geometries": ["45as140"]}"#,
            "coating.geometries[0]",
        ),
        (
            r#"{"binder": "clear", "platelet": [{"material": "tio2", "thickness_nm": 50}], "tilt": 3}"#,
            "coating.tilt",
        ),
        (
            r#"{"binder": "nothing", "platelet": [{"material": "tio2", "thickness_nm": 50}]}"#,
            "coating.binder",
        ),
    ] {
        let text = coating_scene(1.5, coating, 10.0);
        let err = Scene::from_json(&text, &|_| Err("no files".into()))
            .and_then(|s| Coating::from_scene(&s).map(|_| ()))
            .unwrap_err()
            .to_string();
        assert!(err.contains(key), "{err} should name {key}");
    }
}

/// Energy balance without platelets: a white Lambertian background under a
/// clear binder of index 1 is the perfect diffuser (R_F = 1 by the
/// definition of the reflectance factor, CIE 015:2018); under a binder of
/// index 1.5 all light that enters comes back out, so the hemispherical
/// integral of R_F cos θ / π equals the surface transmittance T(θ_i)
/// (Fresnel, Born & Wolf, *Principles of Optics*, 7th ed. 1999, §1.5.3).
#[test]
fn a_white_background_alone_conserves_energy() {
    for n in [1.0, 1.5] {
        let s = scene(&coating_scene(
            n,
            r#"{"binder": "clear", "platelet": [{"material": "tio2", "thickness_nm": 50}],
                "platelet_coverage": 0, "background": "white"}"#,
            50.0,
        ));
        let coating = Coating::from_scene(&s).unwrap();
        let model = Model::new(&s, &coating).unwrap();
        let nw = s.wavelengths_nm.len();
        let theta_i = 30f64.to_radians();
        let ill = [-theta_i.sin(), 0.0, theta_i.cos()];
        // ∫ R_F cos θ sin θ dθ · 2 = ∫ R_F d(sin² θ), midpoint rule.
        let k = 4000;
        let mut albedo = 0.0;
        let mut rf = vec![0.0; nw];
        for j in 0..k {
            let s2 = (j as f64 + 0.5) / k as f64;
            model.reflectance_factor(ill, [s2.sqrt(), 0.0, (1.0 - s2).sqrt()], &mut rf);
            if n == 1.0 {
                assert!(rf.iter().all(|r| (r - 1.0).abs() < 1e-12), "{rf:?}");
            }
            albedo += rf[0] / k as f64;
        }
        let (ts, tp) = fresnel_t(n, theta_i);
        let expected = 0.5 * (ts + tp);
        assert!(
            (albedo - expected).abs() < 2e-3,
            "n = {n}: {albedo} vs {expected}"
        );
    }
}
