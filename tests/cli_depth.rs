//! `spectrum --layer-absorption`, `field` and `bands` end to end: headers,
//! consistency with the engine, the physics they must show, and bad input
//! (exit code 2, one line naming the key and the value).

mod common;

use common::{lamella, temp_dir};

use std::path::{Path, PathBuf};

use lamella::scene::Scene;
use num_complex::Complex64;
use serde_json::Value;

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn scene_of(path: &Path) -> Scene {
    Scene::from_json(&std::fs::read_to_string(path).unwrap(), &|_| {
        Err("no files".into())
    })
    .unwrap()
}

/// A mirror with an absorbing layer after its repeat group.
const MIRROR: &str = r#"{
  "title": "mirror with absorber",
  "stack": [
    {"material": "hi", "thickness_nm": 58},
    {"repeat": 4, "stack": [
      {"material": "lo", "thickness_nm": 94},
      {"material": "hi", "thickness_nm": 58}
    ]},
    {"material": "dark", "thickness_nm": 40},
    {"material": "lo", "thickness_nm": 70}
  ],
  "substrate": "glass",
  "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}, "dark": {"n": 1.7, "k": 0.1}, "glass": {"n": 1.52}},
  "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
  "angles_deg": [0, 30, 60]
}"#;

fn ok(args: &[&str]) -> String {
    let out = lamella(args);
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

fn refused(args: &[&str], says: &str) {
    let out = lamella(args);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    assert!(err.contains(says), "{args:?}: {err}");
    assert!(!err.contains("panicked"), "{err}");
}

fn rows(csv: &str) -> (Vec<String>, Vec<Vec<f64>>) {
    let mut lines = csv.lines();
    let header = lines.next().unwrap().split(',').map(String::from).collect();
    let rows = lines
        .map(|l| l.split(',').map(|v| v.parse().unwrap()).collect())
        .collect();
    (header, rows)
}

/// The A_j columns follow A, add up to it to 1e-12, are the engine's
/// numbers bit for bit, and leave the other columns as plain `spectrum`
/// prints them.
#[test]
fn layer_absorption_columns_add_up_to_a() {
    let dir = temp_dir("depth-absorption");
    let scene = write(&dir, "m.json", MIRROR);
    let s = scene.to_str().unwrap();
    let (header, with) = rows(&ok(&["spectrum", s, "--layer-absorption"]));
    assert_eq!(
        header.join(","),
        "wavelength_nm,angle_deg,R_s,R_p,R,T_s,T_p,T,A,A_1,A_2,A_3,A_4,A_5"
    );
    let (_, plain) = rows(&ok(&["spectrum", s]));
    let engine = scene_of(&scene).layer_absorption().unwrap();
    let nw = 31;
    assert_eq!(with.len(), 3 * nw);
    for (i, (r, p)) in with.iter().zip(&plain).enumerate() {
        assert_eq!(&r[..9], &p[..], "row {i}");
        let sum: f64 = r[9..].iter().sum();
        assert!((sum - r[8]).abs() < 1e-12, "row {i}: Σ {sum} vs A {}", r[8]);
        assert_eq!(&r[9..], &engine.values[i / nw][i % nw][..], "row {i}");
        assert!(r[12] > 0.0);
    }
    let doc: Value = serde_json::from_str(&ok(&[
        "spectrum",
        s,
        "--layer-absorption",
        "--format",
        "json",
    ]))
    .unwrap();
    for (c, name) in engine.columns.iter().enumerate() {
        let v = doc[name][1][7].as_f64().unwrap();
        assert_eq!(v, engine.values[1][7][c], "{name}");
    }
}

/// A substrate sheet with a black backing gets A_substrate and A_backing.
#[test]
fn layer_absorption_names_the_sheet_and_backing() {
    let dir = temp_dir("depth-sheet");
    let text = MIRROR.replace(
        r#""substrate": "glass""#,
        r#""substrate": {"material": "glass", "thickness_um": 50, "behind": "black"}"#,
    );
    let scene = write(&dir, "sheet.json", &text);
    let (header, rows) = rows(&ok(&[
        "spectrum",
        scene.to_str().unwrap(),
        "--layer-absorption",
    ]));
    assert_eq!(
        &header[9..],
        [
            "A_1",
            "A_2",
            "A_3",
            "A_4",
            "A_5",
            "A_substrate",
            "A_backing"
        ]
    );
    for r in &rows {
        let sum: f64 = r[9..].iter().sum();
        assert!((sum - r[8]).abs() < 1e-12);
    }
}

#[test]
fn layer_absorption_of_a_lossless_stack_is_zero_and_coatings_are_refused() {
    let dir = temp_dir("depth-lossless");
    let scene = write(
        &dir,
        "clear.json",
        &MIRROR.replace(r#""k": 0.1"#, r#""k": 0"#),
    );
    let (_, rows) = rows(&ok(&[
        "spectrum",
        scene.to_str().unwrap(),
        "--layer-absorption",
    ]));
    assert!(rows.iter().all(|r| r[8..].iter().all(|&a| a == 0.0)));
    refused(
        &[
            "spectrum",
            "scenes/pearl_compact_lid.json",
            "--layer-absorption",
        ],
        "coating",
    );
}

/// In the incident medium before one interface the s field is the
/// standing wave |1 + r e^{2ik_z z}|² of the Fresnel r (z < 0), the CSV is
/// `z_nm,layer,E2`, and JSON carries the same numbers.
#[test]
fn field_before_one_interface_is_the_standing_wave() {
    let dir = temp_dir("depth-field");
    let scene = write(
        &dir,
        "one.json",
        r#"{"stack": [{"material": "hi", "thickness_nm": 100}], "substrate": "hi",
            "materials": {"hi": {"n": 2.0}}, "wavelengths_nm": [500], "angles_deg": [0]}"#,
    );
    let s = scene.to_str().unwrap();
    let (wl, deg) = (500.0f64, 35.0f64);
    let csv = ok(&[
        "field",
        s,
        "--wavelength",
        "500",
        "--angle",
        "35",
        "--polarization",
        "s",
        "--points",
        "300",
    ]);
    let (header, rows) = rows(&csv);
    assert_eq!(header.join(","), "z_nm,layer,E2");
    let (n0, n1) = (1.0f64, 2.0f64);
    let (c0, s0) = (deg.to_radians().cos(), deg.to_radians().sin());
    let c1 = (1.0 - (n0 * s0 / n1).powi(2)).sqrt();
    // Fresnel s amplitude (Born & Wolf, Principles of Optics, 7th ed., §1.5.2).
    let r = (n0 * c0 - n1 * c1) / (n0 * c0 + n1 * c1);
    let kz = 2.0 * std::f64::consts::PI / wl * n0 * c0;
    let mut checked = 0;
    for p in rows.iter().filter(|p| p[0] < 0.0) {
        assert_eq!(p[1], 0.0);
        let e = Complex64::new(1.0, 0.0) + r * Complex64::from_polar(1.0, 2.0 * kz * p[0]);
        assert!(
            (p[2] - e.norm_sqr()).abs() < 1e-10,
            "{p:?}: {}",
            e.norm_sqr()
        );
        checked += 1;
    }
    assert!(checked > 10);
    let doc: Value = serde_json::from_str(&ok(&[
        "field",
        s,
        "--wavelength",
        "500",
        "--angle",
        "35",
        "--points",
        "300",
        "--format",
        "json",
    ]))
    .unwrap();
    assert_eq!(doc["polarization"], "s");
    assert_eq!(doc["layers"][0]["material"], "hi");
    let e2: Vec<f64> = doc["E2"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect();
    assert_eq!(e2, rows.iter().map(|r| r[2]).collect::<Vec<_>>());
}

/// The CLI prints the engine's profile, layer numbers as written.
#[test]
fn field_matches_the_engine() {
    let dir = temp_dir("depth-field-engine");
    let scene = write(&dir, "m.json", MIRROR);
    let csv = ok(&[
        "field",
        scene.to_str().unwrap(),
        "--wavelength",
        "550",
        "--angle",
        "20",
        "--polarization",
        "p",
    ]);
    let (_, rows) = rows(&csv);
    let engine = scene_of(&scene)
        .field_profile(550.0, 20.0, 1, 1000)
        .unwrap();
    assert_eq!(rows.len(), engine.len());
    for (r, p) in rows.iter().zip(&engine) {
        assert_eq!((r[0], r[1] as usize, r[2]), (p.z_nm, p.layer, p.e2));
    }
    assert_eq!(rows.last().unwrap()[1], 6.0);
}

#[test]
fn field_refuses_bad_input() {
    let dir = temp_dir("depth-field-bad");
    let scene = write(&dir, "m.json", MIRROR);
    let s = scene.to_str().unwrap();
    refused(
        &["field", s, "--wavelength", "550", "--angle", "90"],
        "--angle = 90",
    );
    refused(
        &["field", s, "--wavelength", "550", "--points", "1"],
        "--points = 1",
    );
    refused(&["field", s, "--wavelength", "-3"], "--wavelength");
    refused(&["field", s, "--wavelength", "nan"], "--wavelength");
    refused(
        &[
            "field",
            s,
            "--wavelength",
            "550",
            "--polarization",
            "unpolarized",
        ],
        "unpolarized",
    );
    // A built-in material outside the range its source vouches for.
    refused(
        &[
            "field",
            "scenes/quarter_wave_mirror.json",
            "--wavelength",
            "200",
        ],
        "380–1000 nm",
    );
    // A table outside its data.
    write(&dir, "nk.csv", "wavelength_nm,n,k\n400,2.0,0\n800,2.1,0\n");
    let table = write(
        &dir,
        "table.json",
        &MIRROR.replace(
            r#""dark": {"n": 1.7, "k": 0.1}"#,
            r#""dark": {"table": "nk.csv"}"#,
        ),
    );
    refused(
        &["field", table.to_str().unwrap(), "--wavelength", "300"],
        "400–800 nm",
    );
    let sheet = write(
        &dir,
        "sheet.json",
        &MIRROR.replace(
            r#""substrate": "glass""#,
            r#""substrate": {"material": "glass", "thickness_um": 50}"#,
        ),
    );
    refused(
        &["field", sheet.to_str().unwrap(), "--wavelength", "550"],
        "coherent stacks",
    );
    refused(
        &[
            "field",
            "scenes/pearl_compact_lid.json",
            "--wavelength",
            "550",
        ],
        "coating",
    );
}

/// The quarter-wave demo's stop band at normal incidence has the width
/// Δg = (4/π) arcsin((n_H − n_L)/(n_H + n_L)) in g = λ₀/λ (H. A. Macleod,
/// *Thin-Film Optical Filters*, 4th ed., 2010, §6.1), with n_H and n_L at
/// the band's centre; both formats give the engine's numbers.
#[test]
fn bands_of_the_quarter_wave_demo() {
    let path = Path::new("scenes/quarter_wave_mirror.json");
    let engine = scene_of(path).bands().unwrap();
    let (header, grid) = rows(&ok(&["bands", "scenes/quarter_wave_mirror.json"]));
    assert_eq!(
        header.join(","),
        "wavelength_nm,angle_deg,half_trace_s,half_trace_p"
    );
    let nw = engine.wavelengths_nm.len();
    assert_eq!(grid.len(), nw * engine.angles_deg.len());
    for (i, r) in grid.iter().enumerate() {
        let (a, w) = (i / nw, i % nw);
        assert_eq!(
            r[..],
            [
                engine.wavelengths_nm[w],
                engine.angles_deg[a],
                engine.half_trace[0][a][w],
                engine.half_trace[1][a][w]
            ]
        );
    }
    let text = ok(&["bands", "scenes/quarter_wave_mirror.json", "--stop-bands"]);
    let mut lines = text.lines();
    assert_eq!(
        lines.next().unwrap(),
        "angle_deg,polarization,from_nm,to_nm"
    );
    let first: Vec<&str> = lines.next().unwrap().split(',').collect();
    let band = engine.stop_bands[0];
    assert_eq!(first[1], "s");
    let (from, to): (f64, f64) = (first[2].parse().unwrap(), first[3].parse().unwrap());
    assert_eq!((from, to), (band.from_nm, band.to_nm));
    // Widths in g against the published form with the indices at 560 nm.
    let scene = scene_of(path);
    let n = scene.indices(&[560.0]).unwrap();
    let index = |name: &str| n[scene.medium(name).unwrap()][0].re;
    let (nh, nl) = (index("tio2"), index("sio2_film"));
    let published = 4.0 / std::f64::consts::PI * ((nh - nl) / (nh + nl)).asin();
    let centre = 2.0 / (1.0 / from + 1.0 / to);
    let width = centre / from - centre / to;
    // Dispersion and layers a little off a quarter wave move it slightly.
    assert!((width - published).abs() < 0.03, "{width} vs {published}");
    let doc: Value = serde_json::from_str(&ok(&[
        "bands",
        "scenes/quarter_wave_mirror.json",
        "--format",
        "json",
    ]))
    .unwrap();
    assert_eq!(doc["group"], "stack[0]");
    assert_eq!(doc["stop_bands"][1]["polarization"], "p");
    assert_eq!(doc["stop_bands"][0]["from_nm"].as_f64().unwrap(), from);
    assert_eq!(
        doc["half_trace_p"][3][40].as_f64().unwrap(),
        engine.half_trace[1][3][40]
    );
}

#[test]
fn bands_refuse_a_stack_without_a_repeat_group() {
    refused(&["bands", "scenes/kestrel_ink_print.json"], "repeat group");
    refused(&["bands", "scenes/pearl_compact_lid.json"], "coating");
}

/// `chart --kind field` needs a wavelength and one polarization; `--kind
/// bands` needs a repeat group; both write the file asked for.
#[test]
fn field_and_bands_charts_from_the_command_line() {
    let dir = temp_dir("depth-charts");
    let png = dir.join("field.png");
    let svg = dir.join("bands.svg");
    let (png, svg) = (png.to_str().unwrap(), svg.to_str().unwrap());
    let mirror = "scenes/quarter_wave_mirror.json";
    ok(&[
        "chart",
        mirror,
        "--kind",
        "field",
        "--wavelength",
        "560",
        "--angle",
        "20",
        "--polarization",
        "p",
        "-o",
        png,
        "--size",
        "480x320",
    ]);
    assert!(std::fs::read(png).unwrap().starts_with(b"\x89PNG"));
    ok(&[
        "chart",
        mirror,
        "--kind",
        "bands",
        "--with-reflectance",
        "-o",
        svg,
        "--size",
        "480x320",
    ]);
    assert!(std::fs::read_to_string(svg).unwrap().contains("<svg"));
    refused(
        &[
            "chart",
            mirror,
            "--kind",
            "field",
            "--polarization",
            "s",
            "-o",
            png,
        ],
        "--wavelength",
    );
    refused(
        &[
            "chart",
            mirror,
            "--kind",
            "field",
            "--wavelength",
            "560",
            "-o",
            png,
        ],
        "unpolarized",
    );
    refused(
        &[
            "chart",
            "scenes/kestrel_ink_print.json",
            "--kind",
            "bands",
            "-o",
            svg,
        ],
        "repeat group",
    );
}

/// The report draws the stop bands for a scene with a repeat group and
/// tabulates the absorption per layer for an absorbing stack.
#[test]
fn report_adds_bands_and_absorption_where_they_apply() {
    let dir = temp_dir("depth-report");
    let out = dir.join("print");
    ok(&[
        "report",
        "scenes/kestrel_ink_print.json",
        "--size",
        "480x320",
        "-o",
        out.to_str().unwrap(),
    ]);
    let html = std::fs::read_to_string(out.join("index.html")).unwrap();
    assert!(html.contains("Absorption per layer") && html.contains("<td>melanin</td>"));
    assert!(!out.join("bands.png").exists());
}

/// A stack too long to resolve layer by layer is refused before any work.
#[test]
fn layer_by_layer_views_refuse_very_long_stacks() {
    let dir = temp_dir("depth-long");
    let long = write(
        &dir,
        "long.json",
        &MIRROR.replace(r#""repeat": 4"#, r#""repeat": 10000000"#),
    );
    let s = long.to_str().unwrap();
    refused(&["spectrum", s, "--layer-absorption"], "layer by layer");
    refused(&["field", s, "--wavelength", "550"], "layer by layer");
}
