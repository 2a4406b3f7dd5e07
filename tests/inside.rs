//! Scene-level views inside the stack: absorption per layer as written,
//! field profiles and photonic bands.

use lamella::scene::Scene;
use serde_json::{Value, json};

fn read(doc: Value) -> Scene {
    Scene::from_json(&doc.to_string(), &|_| Err("no files".into())).unwrap()
}

fn mirror(extra: Value) -> Value {
    let mut doc = json!({
        "stack": [
            {"material": "hi", "thickness_nm": 58},
            {"repeat": 5, "stack": [
                {"material": "lo", "thickness_nm": 94},
                {"material": "hi", "thickness_nm": 58}
            ]},
            {"material": "melanin", "thickness_nm": 40},
            {"material": "lo", "thickness_nm": 70}
        ],
        "substrate": "glass",
        "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}, "melanin": {"n": 1.7, "k": 0.1}, "glass": {"n": 1.52}},
        "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
        "angles_deg": [0, 45]
    });
    for (k, v) in extra.as_object().unwrap() {
        doc[k] = v.clone();
    }
    doc
}

/// The columns of every point add up to A = 1 − R − T of `spectrum`, and
/// the lossless layers absorb nothing: for a plain mirror, a graded one, a
/// disordered one and one on a sheet with a black backing.
#[test]
fn absorption_per_layer_adds_up_to_the_spectrum() {
    let graded = {
        let mut d = mirror(json!({}));
        d["stack"][1]["chirp_scale"] = json!(1.2);
        d
    };
    let cases = [
        mirror(json!({})),
        graded,
        mirror(json!({"disorder": {"sigma_nm": 3, "realizations": 5}})),
        mirror(
            json!({"substrate": {"material": "sheet", "thickness_um": 20, "behind": "black"},
            "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}, "melanin": {"n": 1.7, "k": 0.1}, "sheet": {"n": 1.58, "k": 1e-4}}}),
        ),
    ];
    for (i, doc) in cases.into_iter().enumerate() {
        let scene = read(doc);
        let spectra = scene.spectra().unwrap();
        let a = scene.layer_absorption().unwrap();
        assert_eq!(&a.columns[..5], ["A_1", "A_2", "A_3", "A_4", "A_5"]);
        if i == 3 {
            assert_eq!(&a.columns[5..], ["A_substrate", "A_backing"]);
        } else {
            assert_eq!(a.columns.len(), 5);
        }
        for (ai, row) in a.values.iter().enumerate() {
            for (w, cols) in row.iter().enumerate() {
                let x = spectra.at_angle(ai)[w];
                let total: f64 = cols.iter().sum();
                assert!(
                    (total - (1.0 - x.r() - x.t())).abs() < 1e-12,
                    "case {i}: Σ {total} vs A {}",
                    1.0 - x.r() - x.t()
                );
                // Layers 1, 2, 3 and 5 are lossless; 4 is the absorber.
                for j in [0, 1, 2, 4] {
                    assert!(cols[j].abs() < 1e-13, "case {i}: A_{} = {}", j + 1, cols[j]);
                }
                assert!(cols[3] > 0.0);
            }
        }
    }
}

#[test]
fn inside_views_refuse_what_they_cannot_show() {
    let coating = read(json!({
        "materials": {"binder": {"n": 1.5}}, "coating": {"binder": "binder", "platelet": [{"material": "tio2", "thickness_nm": 120}]}
    }));
    assert!(
        coating
            .layer_absorption()
            .unwrap_err()
            .to_string()
            .contains("multiangle")
    );
    let no_group =
        read(json!({"stack": [{"material": "tio2", "thickness_nm": 60}], "substrate": "glass"}));
    assert!(
        no_group
            .bands()
            .unwrap_err()
            .to_string()
            .contains("repeat group")
    );
    let sheet = read(mirror(
        json!({"substrate": {"material": "glass", "thickness_um": 100}}),
    ));
    assert!(
        sheet
            .field_profile(550.0, 0.0, 0, 100)
            .unwrap_err()
            .to_string()
            .contains("coherent stacks")
    );
    let scene = read(mirror(json!({})));
    assert!(scene.field_profile(550.0, 90.0, 0, 100).is_err());
    assert!(scene.field_profile(550.0, 0.0, 0, 1).is_err());
    assert!(scene.field_profile(-5.0, 0.0, 0, 100).is_err());
}

/// The profile runs from the incident medium through every layer as
/// written to the substrate, with layer numbers in order.
#[test]
fn field_profiles_name_the_layers_as_written() {
    let scene = read(mirror(json!({})));
    let field = scene.field_profile(550.0, 30.0, 1, 400).unwrap();
    assert!(field.first().unwrap().z_nm < 0.0 && field.first().unwrap().layer == 0);
    assert_eq!(field.last().unwrap().layer, 6);
    let order: Vec<usize> = field.iter().map(|p| p.layer).collect();
    // Through the repeat group the numbers go 2, 3, 2, 3, … then 4, 5.
    let mut seen: Vec<usize> = order.clone();
    seen.dedup();
    assert_eq!(&seen[..4], [0, 1, 2, 3]);
    assert_eq!(&seen[seen.len() - 4..], [3, 4, 5, 6]);
    assert!(field.iter().all(|p| p.e2.is_finite() && p.e2 >= 0.0));
}

/// The bands of a quarter-wave group at normal incidence: one stop band
/// around 550 nm whose width in g = λ₀/λ is (4/π)·arcsin((n_H − n_L)/(n_H +
/// n_L)) (Macleod, *Thin-Film Optical Filters*, 4th ed. 2010, §6.1), the
/// same for s and p.
#[test]
fn bands_of_a_quarter_wave_group() {
    let (nh, nl) = (2.35f64, 1.46f64);
    let scene = read(json!({
        "stack": [{"repeat": 10, "stack": [
            {"material": "hi", "thickness_nm": 550.0 / (4.0 * nh)},
            {"material": "lo", "thickness_nm": 550.0 / (4.0 * nl)}
        ]}],
        "substrate": "glass",
        "materials": {"hi": {"n": nh}, "lo": {"n": nl}, "glass": {"n": 1.52}},
        "wavelengths_nm": {"from": 400, "to": 780, "step": 2},
        "angles_deg": [0, 40]
    }));
    let b = scene.bands().unwrap();
    assert_eq!(b.group, "stack[0]");
    let normal: Vec<_> = b.stop_bands.iter().filter(|s| s.angle_deg == 0.0).collect();
    assert_eq!(normal.len(), 2, "{normal:?}");
    let width = 550.0 / normal[0].from_nm - 550.0 / normal[0].to_nm;
    let published = 4.0 / std::f64::consts::PI * ((nh - nl) / (nh + nl)).asin();
    assert!((width - published).abs() < 1e-9, "{width} vs {published}");
    assert_eq!(
        (normal[0].from_nm, normal[0].to_nm),
        (normal[1].from_nm, normal[1].to_nm)
    );
    // At 40° the band has moved to shorter wavelengths.
    let oblique = b
        .stop_bands
        .iter()
        .find(|s| s.angle_deg == 40.0 && s.polarization == 0)
        .unwrap();
    assert!(oblique.to_nm < normal[0].to_nm && oblique.from_nm < normal[0].from_nm);
}
