//! The design tools on anisotropic and chiral scenes: the design evaluator's
//! 4×4 path against the scene computed afresh from the edited document
//! (seeded random designs, every polarization, analyser and side), helix
//! pitches as variables (`vary_nm` inside `helix`), and `match`,
//! `tolerance`, `fit` and `sweep` recovering or reporting them.

mod common;

use common::{lamella, temp_dir};
use lamella::angle_colour::{Polarization, Side, Viewing, angle_colours};
use lamella::design::evaluator::Evaluator;
use lamella::design::variables::{edited_document, varying};
use lamella::optics::aniso::Handedness;
use lamella::scene::Scene;
use serde_json::{Value, json};

fn scene(v: &Value) -> Scene {
    Scene::from_json(&v.to_string(), &|_| Err("no files".into())).unwrap()
}

/// A cholesteric film over a tilted uniaxial retarder and a weakly
/// absorbing isotropic layer, every thickness and the pitch free.
fn chiral_design() -> Value {
    json!({
        "title": "chiral design",
        "incident": "air",
        "materials": {
            "lc": {"uniaxial": {"ordinary": {"n": 1.52}, "extraordinary": {"n": 1.68}}},
            "film": {"uniaxial": {"ordinary": {"n": 1.49}, "extraordinary": {"n": 1.53}}},
            "dye": {"n": 1.6, "k": 0.02},
            "glass": {"n": 1.5}
        },
        "stack": [
            {"material": "lc", "thickness_nm": 2000, "vary_nm": [1500, 2500],
             "helix": {"pitch_nm": 340, "handedness": "right", "vary_nm": [300, 400]}},
            {"material": "film", "thickness_nm": 600, "vary_nm": [400, 900],
             "orientation": {"polar_deg": 60, "azimuth_deg": 25}},
            {"material": "dye", "thickness_nm": 80, "vary_nm": [20, 150]}
        ],
        "substrate": "glass",
        "wavelengths_nm": {"from": 400, "to": 700, "step": 15},
        "angles_deg": {"from": 0, "to": 40, "step": 40}
    })
}

/// A deterministic stream of numbers in [0, 1) (a 64-bit LCG, Knuth's
/// MMIX constants).
fn uniform(seed: u64) -> impl FnMut() -> f64 {
    let mut s = seed;
    move || {
        s = s
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (s >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// The evaluator's colours equal those of the scene rebuilt from the
/// edited document and computed by `Scene::spectra_with_jones` (the path
/// `lamella color` takes), for seeded random thicknesses and pitches.
#[test]
fn evaluator_matches_the_rebuilt_scene() {
    let base = scene(&chiral_design());
    let vars = varying(&base);
    assert_eq!(
        vars.iter().map(|v| v.quantity()).collect::<Vec<_>>(),
        ["thickness", "pitch", "thickness", "thickness"]
    );
    assert_eq!(vars[1].pointer, "/stack/0/helix");
    let mut rand = uniform(7);
    let viewings: Vec<(Side, Polarization, Option<Handedness>)> = vec![
        (Side::Reflect, Polarization::Unpolarized, None),
        (Side::Reflect, Polarization::Left, None),
        (Side::Transmit, Polarization::Right, None),
        (Side::Reflect, Polarization::S, None),
        (
            Side::Reflect,
            Polarization::Unpolarized,
            Some(Handedness::Right),
        ),
        (
            Side::Transmit,
            Polarization::Unpolarized,
            Some(Handedness::Left),
        ),
    ];
    let mut largest: f64 = 0.0;
    for trial in 0..4 {
        let x: Vec<f64> = vars
            .iter()
            .map(|v| v.low_nm + (v.high_nm - v.low_nm) * rand())
            .collect();
        let edited = edited_document(&base.document, &vars, &x).unwrap();
        let fresh = scene(&edited);
        let spectra = fresh.spectra_with_jones().unwrap();
        for &(side, polarization, analyzer) in &viewings {
            let mut viewing = Viewing::of_scene(&base).unwrap();
            viewing.side = side;
            viewing.polarization = polarization;
            viewing.analyzer = analyzer;
            let eval = Evaluator::colour(&base, vars.clone(), &base.angles_deg, &viewing).unwrap();
            let fast = eval.eval(&x, None, |o| o.xyz.to_vec());
            let slow = angle_colours(&spectra, &viewing).unwrap();
            for (f, s) in fast.iter().zip(&slow) {
                for (a, b) in f.iter().zip(&s.xyz) {
                    largest = largest.max((a - b).abs());
                    assert!(
                        (a - b).abs() < 1e-9,
                        "trial {trial}, {side:?} {polarization:?} {analyzer:?}: {a} vs {b}"
                    );
                }
            }
        }
    }
    eprintln!("largest |ΔXYZ| evaluator vs rebuilt scene: {largest:.2e}");
}

/// An isotropic scene seen through an analyser goes through the 4×4 path
/// in the evaluator too, and agrees with `angle_colours`.
#[test]
fn isotropic_scene_through_an_analyser() {
    let doc = json!({
        "incident": "air",
        "materials": {"hi": {"n": 2.3}, "lo": {"n": 1.45}},
        "stack": [{"repeat": 5, "stack": [
            {"material": "hi", "thickness_nm": 60, "vary_nm": [40, 90]},
            {"material": "lo", "thickness_nm": 95}]}],
        "substrate": "glass",
        "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
        "angles_deg": {"from": 0, "to": 60, "step": 30}
    });
    let base = scene(&doc);
    let vars = varying(&base);
    let mut viewing = Viewing::of_scene(&base).unwrap();
    viewing.analyzer = Some(Handedness::Left);
    let eval = Evaluator::colour(&base, vars.clone(), &base.angles_deg, &viewing).unwrap();
    let x = [71.0];
    let fast = eval.eval(&x, None, |o| o.xyz.to_vec());
    let fresh = scene(&edited_document(&base.document, &vars, &x).unwrap());
    let slow = angle_colours(&fresh.spectra_with_jones().unwrap(), &viewing).unwrap();
    for (f, s) in fast.iter().zip(&slow) {
        for (a, b) in f.iter().zip(&s.xyz) {
            assert!((a - b).abs() < 1e-9, "{a} vs {b}");
        }
    }
}

fn write(dir: &std::path::Path, name: &str, v: &Value) -> std::path::PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, serde_json::to_string_pretty(v).unwrap()).unwrap();
    p
}

fn json_out(args: &[&str]) -> (i32, Value) {
    let out = lamella(args);
    let code = out.status.code().unwrap_or(-1);
    let v = serde_json::from_slice(&out.stdout).unwrap_or_else(|_| {
        panic!(
            "{args:?} → {code}: {}",
            String::from_utf8_lossy(&out.stderr)
        )
    });
    (code, v)
}

/// The gift-box window demo with the pitch at `pitch_nm` (a coarser grid
/// for speed).
fn window(pitch_nm: f64) -> Value {
    let text = std::fs::read_to_string("scenes/cnc_giftbox_window.json").unwrap();
    let mut v: Value = serde_json::from_str(&text).unwrap();
    v["stack"][0]["helix"]["pitch_nm"] = json!(pitch_nm);
    v["wavelengths_nm"] = json!({"from": 380, "to": 780, "step": 5});
    v
}

/// `match` through a left analyser finds the pitch whose colour was taken
/// as the target, and writes it into the helix of the new scene.
#[test]
fn match_recovers_a_pitch() {
    let dir = temp_dir("aniso_match");
    let truth = write(&dir, "truth.json", &window(335.0));
    let start = write(&dir, "start.json", &window(300.0));
    let (_, colour) = json_out(&[
        "color",
        truth.to_str().unwrap(),
        "--analyzer",
        "left",
        "--format",
        "json",
    ]);
    let lab = &colour[0];
    let target = format!("{},{},{}", lab["L"], lab["a"], lab["b"]);
    let out_scene = dir.join("matched.json");
    let (code, report) = json_out(&[
        "match",
        start.to_str().unwrap(),
        "--target-lab",
        &target,
        "--analyzer",
        "left",
        "--angle",
        "0",
        "--out-scene",
        out_scene.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{report}");
    let pitch = &report["thicknesses_nm"][0];
    assert_eq!(pitch["pointer"], "/stack/0/helix");
    assert_eq!(pitch["quantity"], "pitch");
    let found = pitch["value"].as_f64().unwrap();
    assert!((found - 335.0).abs() < 0.5, "pitch {found}");
    let written: Value =
        serde_json::from_str(&std::fs::read_to_string(&out_scene).unwrap()).unwrap();
    assert_eq!(
        written["stack"][0]["helix"]["pitch_nm"].as_f64(),
        Some(found)
    );
    assert_eq!(written["stack"][0]["thickness_nm"].as_f64(), Some(4200.0));
}

/// `fit` recovers a pitch from a reflectance spectrum `lamella spectrum`
/// wrote for a known design.
#[test]
fn fit_recovers_a_pitch() {
    let dir = temp_dir("aniso_fit");
    let mut truth = window(322.0);
    truth["wavelengths_nm"] = json!({"from": 380, "to": 780, "step": 20});
    truth["angles_deg"] = json!({"from": 0, "to": 30, "step": 30});
    let truth_path = write(&dir, "truth.json", &truth);
    let out = lamella(&["spectrum", truth_path.to_str().unwrap()]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let mut csv = String::from("wavelength_nm,angle_deg,R\n");
    for line in text.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        csv.push_str(&format!("{},{},{}\n", f[0], f[1], f[4]));
    }
    let measured = dir.join("measured.csv");
    std::fs::write(&measured, csv).unwrap();
    let mut start = truth.clone();
    start["stack"][0]["helix"]["pitch_nm"] = json!(310.0);
    start["stack"][0]["helix"]["vary_nm"] = json!([300, 340]);
    let start_path = write(&dir, "start.json", &start);
    let (code, report) = json_out(&[
        "fit",
        start_path.to_str().unwrap(),
        "--measured",
        measured.to_str().unwrap(),
        "--out-scene",
        dir.join("fitted.json").to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{report}");
    let pitch = report["thicknesses_nm"][0]["value"].as_f64().unwrap();
    assert!((pitch - 322.0).abs() < 0.05, "fitted pitch {pitch}");
}

/// `tolerance` draws pitch errors as well as thickness and index errors:
/// the pitch is ranked in the sensitivity list, and an index error of the
/// anisotropic layer moves its colour.
#[test]
fn tolerance_ranks_the_pitch() {
    let dir = temp_dir("aniso_tolerance");
    let mut v = window(300.0);
    v["wavelengths_nm"] = json!({"from": 380, "to": 780, "step": 10});
    let path = write(&dir, "window.json", &v);
    let (code, report) = json_out(&[
        "tolerance",
        path.to_str().unwrap(),
        "--sigma-pct",
        "1",
        "--sigma-n",
        "0.005",
        "--samples",
        "40",
        "--analyzer",
        "left",
    ]);
    assert_eq!(code, 0, "{report}");
    let sens = report["sensitivity"].as_array().unwrap();
    assert_eq!(sens.len(), 2);
    let pitch = sens.iter().find(|s| s["quantity"] == "pitch").unwrap();
    assert_eq!(pitch["pointer"], "/stack/0/helix");
    assert!((pitch["sigma_nm"].as_f64().unwrap() - 3.0).abs() < 1e-12);
    assert!(pitch.get("delta_e00_per_sigma_index").is_none());
    let layer = sens.iter().find(|s| s["quantity"] == "thickness").unwrap();
    assert!(layer["delta_e00_per_sigma_index"].as_f64().unwrap() > 0.01);
    // A pitch error of 1 % moves a Bragg reflector's colour more than a
    // 1 % change of its thickness (which only adds a fraction of a pitch).
    assert!(
        pitch["delta_e00_per_sigma_thickness"].as_f64().unwrap()
            > layer["delta_e00_per_sigma_thickness"].as_f64().unwrap()
    );
}

/// `sweep` walks the pitch; its ΔE00 to a target is smallest at the pitch
/// the target came from.
#[test]
fn sweep_walks_the_pitch() {
    let dir = temp_dir("aniso_sweep");
    let mut v = window(300.0);
    v["stack"][0]["helix"]["vary_nm"] = json!([280, 340]);
    let path = write(&dir, "window.json", &v);
    let truth = write(&dir, "truth.json", &window(320.0));
    let (_, colour) = json_out(&["color", truth.to_str().unwrap(), "--format", "json"]);
    let lab = &colour[0];
    let target = format!("{},{},{}", lab["L"], lab["a"], lab["b"]);
    let out = lamella(&[
        "sweep",
        path.to_str().unwrap(),
        "--grid",
        "7",
        "--target-lab",
        &target,
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let rows: Vec<Value> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(rows.len(), 7);
    let best = rows
        .iter()
        .min_by(|a, b| {
            a["delta_e00"]
                .as_f64()
                .unwrap()
                .total_cmp(&b["delta_e00"].as_f64().unwrap())
        })
        .unwrap();
    assert!(best.to_string().contains("320"), "{best}");
    assert!(best["delta_e00"].as_f64().unwrap() < 1e-6, "{best}");
}

/// Bad pitch bounds and an analyser beside a polarized source: exit 2 with
/// one line naming the key and the value.
#[test]
fn refusals() {
    let dir = temp_dir("aniso_design_refusals");
    for (bounds, shown) in [
        (json!([0, 320]), "[0, 320]"),
        (json!([350, 300]), "[350, 300]"),
    ] {
        let mut v = window(300.0);
        v["stack"][0]["helix"]["vary_nm"] = bounds;
        let path = write(&dir, "bad.json", &v);
        let out = lamella(&["color", path.to_str().unwrap()]);
        assert_eq!(out.status.code(), Some(2));
        let err = String::from_utf8(out.stderr).unwrap();
        assert_eq!(err.trim().lines().count(), 1, "{err}");
        assert!(err.contains("stack[0].helix.vary_nm"), "{err}");
        assert!(err.contains(shown), "{err}");
    }
    let out = lamella(&[
        "match",
        "scenes/cnc_giftbox_window.json",
        "--target-lab",
        "40,-60,20",
        "--analyzer",
        "left",
        "--polarization",
        "s",
        "--out-scene",
        dir.join("x.json").to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("--analyzer left"), "{err}");
}
