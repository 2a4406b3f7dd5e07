//! `fit --chart` and `lamella.fit`'s chart: the fitted values it draws are
//! the engine's spectrum of the fitted design (the fit's own rms follows
//! from them), one panel pair per measured angle, PNG and SVG, and bad
//! requests are refused before any fitting.

mod common;

use common::{lamella, temp_dir};

use lamella::chart::{self, FitChart, Format};
use lamella::design::coating::At;
use lamella::design::fit::{FitSettings, Measured, fit};
use lamella::design::search::Budget;
use lamella::design::variables::edited_document;
use lamella::scene::Scene;

const TWO_LAYERS: &str = r#"{"title": "Test: two-layer film", "incident": "air",
 "stack": [{"material": "tio2", "thickness_nm": 100, "vary_nm": [60, 160]},
           {"material": "sio2_film", "thickness_nm": 150, "vary_nm": [100, 200]}],
 "substrate": "glass", "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
 "angles_deg": [0, 30, 45, 60]}"#;

fn scene(text: &str) -> Scene {
    Scene::from_json(text, &|_| Err("no files".into())).unwrap()
}

/// The design's unpolarized reflectance at `angles` with a small seeded
/// ripple (so the fit leaves residuals), as measured data.
fn measured(scene: &Scene, angles: &[f64]) -> Vec<Measured> {
    let s = scene.spectra_at(angles).unwrap();
    (0..angles.len())
        .map(|a| Measured {
            at: At::Angle(angles[a]),
            wavelengths_nm: s.wavelengths_nm.clone(),
            r: s.at_angle(a)
                .iter()
                .enumerate()
                .map(|(i, x)| x.r() + 0.004 * ((i * 7 + a * 3) as f64).sin())
                .collect(),
        })
        .collect()
}

fn settings() -> FitSettings {
    FitSettings {
        fit_scale: false,
        budget: Budget {
            max_evals: 4000,
            good_enough: 1e-5,
            handover: 0.0,
            min_gain: 1e-5,
            seed: 1,
        },
    }
}

/// The fitted values are the spectrum `Scene::spectra_at` gives for the
/// fitted scene, the groups' rms values combine to the fit's rms, and the
/// chart shows them panel by panel.
#[test]
fn the_chart_draws_the_fitted_designs_own_spectrum() {
    let truth = scene(&TWO_LAYERS.replace("100, \"vary", "112, \"vary"));
    let start = scene(TWO_LAYERS);
    let angles = [0.0, 45.0];
    let data = measured(&truth, &angles);
    let out = fit(&start, &data, &settings()).unwrap();
    let doc = edited_document(&start.document, &out.variables, &out.thicknesses_nm).unwrap();
    let fitted = scene(&doc.to_string()).spectra_at(&angles).unwrap();
    assert_eq!(out.fitted.len(), 2);
    for (a, f) in out.fitted.iter().enumerate() {
        for (got, x) in f.iter().zip(fitted.at_angle(a)) {
            assert!((got - x.r()).abs() < 1e-9, "{got} vs {}", x.r());
        }
    }
    let n = out.points as f64;
    let combined: f64 = (0..2)
        .map(|i| out.rms_of(i, &data).powi(2) * data[i].r.len() as f64 / n)
        .sum::<f64>()
        .sqrt();
    assert!(
        (combined - out.rms).abs() < 1e-12,
        "{combined} vs {}",
        out.rms
    );
    assert!(out.rms > 0.001 && out.rms < 0.01, "rms {}", out.rms);

    let c = FitChart::new(&start.title, &out, &data).unwrap();
    let labels: Vec<&str> = c.panels.iter().map(|p| p.label.as_str()).collect();
    assert_eq!(labels, ["0°", "45°"]);
    assert!((c.panels[1].rms - 100.0 * out.rms_of(1, &data)).abs() < 1e-12);
    assert_eq!(c.quantity, "Reflectance (%)");
    assert_eq!(c.default_size(), (1200, 800));
    // The fitted line's colour (Okabe–Ito vermillion) is drawn.
    let rgb = chart::rgb(&c, (1200, 800)).unwrap();
    let orange = rgb
        .chunks(3)
        .filter(|p| p[0] > 190 && (70..120).contains(&p[1]) && p[2] < 40)
        .count();
    assert!(orange > 500, "{orange} fitted-line pixels");
    let svg = chart::svg(&c, (1200, 800)).unwrap();
    assert!(
        svg.contains("Test: two-layer film"),
        "no title in the SVG label"
    );
}

/// Four measured angles take two rows of panels, and a taller default.
#[test]
fn four_angles_take_a_two_by_two_grid() {
    let start = scene(TWO_LAYERS);
    let data = measured(&start, &[0.0, 30.0, 45.0, 60.0]);
    let out = fit(&start, &data, &settings()).unwrap();
    let c = FitChart::new("", &out, &data).unwrap();
    assert_eq!(c.panels.len(), 4);
    assert_eq!(c.default_size(), (1200, 1220));
    assert_eq!(c.caption.title, "Untitled scene");
    for format in [Format::Png, Format::Svg] {
        assert!(
            !chart::render(&c, c.default_size(), format)
                .unwrap()
                .is_empty()
        );
    }
}

fn png_size(bytes: &[u8]) -> (u32, u32) {
    assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
    let be = |i: usize| u32::from_be_bytes(bytes[i..i + 4].try_into().unwrap());
    (be(16), be(20))
}

const FOIL: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/scenes/teal_label_foil.json");
const SAMPLE: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/scenes/measured/teal_label_foil_sample.csv"
);

#[test]
fn fit_command_writes_the_chart_and_names_it_in_the_report() {
    let d = temp_dir("fit-chart");
    let fitted = d.join("fitted.json");
    for (name, size) in [("fit.png", None), ("fit.svg", Some("900x700"))] {
        let path = d.join(name);
        let mut args = vec![
            "fit",
            FOIL,
            "--measured",
            SAMPLE,
            "--scale",
            "--out-scene",
            fitted.to_str().unwrap(),
            "--chart",
            path.to_str().unwrap(),
        ];
        if let Some(s) = size {
            args.extend(["--chart-size", s]);
        }
        let out = lamella(&args);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let report: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        assert_eq!(report["chart"], path.to_str().unwrap());
        let bytes = std::fs::read(&path).unwrap();
        if name.ends_with(".png") {
            // Two measured angles: one row of panel pairs.
            assert_eq!(png_size(&bytes), (1200, 800));
        } else {
            let text = String::from_utf8(bytes).unwrap();
            assert!(text.starts_with("<?xml") && text.contains("width=\"900\""));
        }
    }
}

#[test]
fn bad_chart_requests_exit_2_before_fitting() {
    let d = temp_dir("fit-chart-bad");
    let fitted = d.join("never.json");
    let jpg = d.join("fit.jpg");
    let out = lamella(&[
        "fit",
        FOIL,
        "--measured",
        SAMPLE,
        "--out-scene",
        fitted.to_str().unwrap(),
        "--chart",
        jpg.to_str().unwrap(),
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("fit.jpg: output extension = jpg: charts are written as .png or .svg"),
        "{err}"
    );
    assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    assert!(!fitted.exists() && !jpg.exists());
    // More angles than a chart holds.
    let many = d.join("thirteen.csv");
    let mut rows = String::from("wavelength_nm,R,angle_deg\n");
    for a in 0..13 {
        rows.push_str(&format!("500,0.1,{a}\n510,0.1,{a}\n"));
    }
    std::fs::write(&many, rows).unwrap();
    let png = d.join("fit.png");
    let out = lamella(&[
        "fit",
        FOIL,
        "--measured",
        many.to_str().unwrap(),
        "--out-scene",
        fitted.to_str().unwrap(),
        "--chart",
        png.to_str().unwrap(),
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains(
            "thirteen.csv: measured = 13 angles or geometries: a fit chart draws 1 to 12 of them"
        ),
        "{err}"
    );
    assert!(!fitted.exists() && !png.exists());
    // A chart size without a chart, and a size out of range.
    for extra in [
        vec!["--chart-size", "900x700"],
        vec!["--chart", "x.png", "--chart-size", "10x10"],
    ] {
        let mut args = vec![
            "fit",
            FOIL,
            "--measured",
            SAMPLE,
            "--out-scene",
            fitted.to_str().unwrap(),
        ];
        args.extend(extra.iter().copied());
        let out = lamella(&args);
        assert_eq!(out.status.code(), Some(2), "{extra:?}");
        assert!(!fitted.exists());
    }
}
