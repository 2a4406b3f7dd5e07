//! Charts: pixel checks against the colour pipeline and the CIE tables, file
//! formats and sizes, the chart and report commands.

use std::path::{Path, PathBuf};
use std::process::Command;

use lamella::angle_colour::Viewing;
use lamella::chart::{self, AbTravel, AngleStrip, Chromaticity, ReflectanceMap, SpectraChart};
use lamella::chart::{ThicknessAngle, Variation};
use lamella::scene::Scene;

/// A five-period quarter-wave mirror on a coarse grid (fast in debug builds).
const MIRROR: &str = r#"{"title":"Test: green mirror","incident":"air",
 "stack":[{"repeat":5,"stack":[{"material":"tio2","thickness_nm":57},{"material":"sio2_film","thickness_nm":94}]}],
 "substrate":"glass","wavelengths_nm":{"from":380,"to":780,"step":10},"angles_deg":{"from":0,"to":80,"step":10}}"#;

/// The same design, thinner.
const BLUE: &str = r#"{"title":"Test: blue mirror","incident":"air",
 "stack":[{"repeat":4,"stack":[{"material":"tio2","thickness_nm":46},{"material":"sio2_film","thickness_nm":77}]}],
 "substrate":"glass","wavelengths_nm":{"from":380,"to":780,"step":10},"angles_deg":{"from":0,"to":80,"step":10}}"#;

fn scene(text: &str) -> Scene {
    Scene::from_json(text, &|_| Err("no files".into())).unwrap()
}

fn dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("lamella-charts-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn write_scene(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn lamella(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_lamella"))
        .args(args)
        .output()
        .unwrap()
}

fn pixel(rgb: &[u8], size: (u32, u32), (x, y): (i32, i32)) -> [u8; 3] {
    let i = 3 * (y as usize * size.0 as usize + x as usize);
    [rgb[i], rgb[i + 1], rgb[i + 2]]
}

/// The strip shows, at each angle, the sRGB that `lamella color` reports there.
#[test]
fn strip_pixels_equal_the_color_command() {
    let d = dir("strip");
    let path = write_scene(&d, "mirror.json", MIRROR);
    let out = lamella(&["color", path.to_str().unwrap(), "--format", "json"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let records: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let s = scene(MIRROR);
    let strip = AngleStrip::compute(&s, &Viewing::of_scene(&s).unwrap(), None).unwrap();
    let size = (640, 400);
    let rgb = chart::rgb(&strip, size).unwrap();
    for r in records.as_array().unwrap() {
        let angle = r["angle_deg"].as_f64().unwrap();
        let want: Vec<i32> = r["srgb"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| (v.as_f64().unwrap() * 255.0).round() as i32)
            .collect();
        let at = strip.pixel_of(size, angle);
        let got = pixel(&rgb, size, at);
        for (g, w) in got.iter().zip(&want) {
            assert!((*g as i32 - w).abs() <= 1, "{angle}°: {got:?} vs {want:?}");
        }
    }
}

/// Chromaticities x, y of the CIE 1931 colour-matching functions as
/// tabulated in CIE 015:2018 (`reference_data/cie/cmf_cie1931_2.csv`).
fn tabulated_locus() -> Vec<(f64, f64, f64)> {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("reference_data/cie/cmf_cie1931_2.csv"),
    )
    .unwrap();
    text.lines()
        .filter(|l| l.starts_with(|c: char| c.is_ascii_digit()))
        .map(|l| {
            let v: Vec<f64> = l.split(',').map(|x| x.trim().parse().unwrap()).collect();
            let sum = v[1] + v[2] + v[3];
            (v[0], v[1] / sum, v[2] / sum)
        })
        .collect()
}

/// The drawn spectrum locus passes through the tabulated chromaticities.
#[test]
fn chromaticity_locus_passes_through_the_cmf_chromaticities() {
    let s = scene(MIRROR);
    let v = Viewing::of_scene(&s).unwrap();
    let xy = Chromaticity::compute(&[(&s, &v)]).unwrap();
    let size = (900, 600);
    let rgb = chart::rgb(&xy, size).unwrap();
    let dark = |p: (i32, i32)| {
        (-1..=1).any(|dx| {
            (-1..=1).any(|dy| {
                let [r, g, b] = pixel(&rgb, size, (p.0 + dx, p.1 + dy));
                (r as u32 + g as u32 + b as u32) < 300
            })
        })
    };
    let locus = tabulated_locus();
    let mut checked = 0;
    for &(wl, x, y) in &locus {
        if (440.0..=640.0).contains(&wl) && wl % 10.0 == 0.0 {
            assert!(dark(xy.pixel_of(size, (x, y))), "{wl} nm at ({x}, {y})");
            checked += 1;
        }
    }
    assert_eq!(checked, 21);
    // And the accessor returns the same table.
    let got = lamella::colorimetry::Observer::Cie1931_2.spectrum_locus();
    assert_eq!(got.len(), locus.len());
    for (a, b) in got.iter().zip(&locus) {
        assert!((a.1 - b.1).abs() < 1e-12 && (a.2 - b.2).abs() < 1e-12);
    }
    // Away from the locus, inside the diagram, nothing dark is drawn.
    assert!(!dark(xy.pixel_of(size, (0.45, 0.52))));
}

fn all_kinds() -> Vec<(&'static str, String, Vec<u8>)> {
    let (a, b) = (scene(MIRROR), scene(BLUE));
    let (va, vb) = (
        Viewing::of_scene(&a).unwrap(),
        Viewing::of_scene(&b).unwrap(),
    );
    let both = [(&a, &va), (&b, &vb)];
    let size = (480, 320);
    let mut out = Vec::new();
    macro_rules! both_formats {
        ($name:expr, $c:expr) => {{
            let c = $c;
            out.push((
                $name,
                chart::svg(&c, size).unwrap(),
                chart::png(&c, size).unwrap(),
            ));
        }};
    }
    both_formats!(
        "angle-strip",
        AngleStrip::compute(&a, &va, Some(&[0.0, 45.0, 80.0])).unwrap()
    );
    both_formats!(
        "thickness-angle",
        ThicknessAngle::compute(
            &a,
            &va,
            &Variation::Layer {
                layer: 2,
                range_nm: None
            },
            5,
            &|| {}
        )
        .unwrap()
    );
    let pols = [
        lamella::angle_colour::Polarization::S,
        lamella::angle_colour::Polarization::P,
    ];
    both_formats!(
        "spectra",
        SpectraChart::compute(&both, &[0.0, 60.0], &pols, true).unwrap()
    );
    both_formats!("map", ReflectanceMap::compute(&a, &va).unwrap());
    both_formats!("chromaticity", Chromaticity::compute(&both).unwrap());
    both_formats!("ab-travel", AbTravel::compute(&both).unwrap());
    out
}

/// Every kind gives well-formed SVG with text as outlines, and PNG of the size asked.
#[test]
fn every_kind_renders_valid_svg_and_png() {
    for (name, svg, png) in all_kinds() {
        let mut reader = quick_xml::Reader::from_str(&svg);
        let mut root = None;
        let mut elements = 0;
        loop {
            match reader.read_event() {
                Ok(quick_xml::events::Event::Eof) => break,
                Ok(quick_xml::events::Event::Start(e) | quick_xml::events::Event::Empty(e)) => {
                    elements += 1;
                    let tag = e.name().as_ref().to_string();
                    assert_ne!(tag, "text", "{name}: text must be outlines");
                    root.get_or_insert(tag);
                }
                Ok(_) => {}
                Err(e) => panic!("{name}: SVG does not parse: {e}"),
            }
        }
        assert_eq!(root.as_deref(), Some("svg"), "{name}");
        assert!(elements > 50, "{name}: only {elements} elements");
        assert!(svg.contains("width=\"480\" height=\"320\""), "{name}");
        let img = image::load_from_memory(&png).unwrap();
        assert_eq!((img.width(), img.height()), (480, 320), "{name}");
    }
}

/// The thickness-angle row at the design thickness equals the scene's own colours.
#[test]
fn thickness_grid_contains_the_design() {
    let s = scene(MIRROR);
    let v = Viewing::of_scene(&s).unwrap();
    let own = lamella::angle_colour::angle_colours(&s.spectra().unwrap(), &v).unwrap();
    for variation in [
        Variation::Scale { from: 0.9, to: 1.1 },
        Variation::Layer {
            layer: 1,
            range_nm: Some((47.0, 67.0)),
        },
    ] {
        let g = ThicknessAngle::compute(&s, &v, &variation, 3, &|| {}).unwrap();
        assert_eq!(g.rows[1], g.nominal, "{variation:?}");
        for (a, b) in g.cells[1].iter().zip(&own) {
            assert_eq!(a.hex, b.hex, "{variation:?}");
        }
        assert_ne!(g.cells[0][0].hex, g.cells[2][0].hex);
    }
    let err = ThicknessAngle::compute(
        &s,
        &v,
        &Variation::Layer {
            layer: 3,
            range_nm: None,
        },
        3,
        &|| {},
    )
    .unwrap_err();
    assert!(err.to_string().contains("layers 1–2"), "{err}");
}

#[test]
fn chart_command_writes_png_and_svg_and_refuses_bad_requests() {
    let d = dir("cli");
    let a = write_scene(&d, "a.json", MIRROR);
    let b = write_scene(&d, "b.json", BLUE);
    let (a, b) = (a.to_str().unwrap(), b.to_str().unwrap());
    let png = d.join("strip.png");
    let out = lamella(&[
        "chart",
        a,
        "--kind",
        "angle-strip",
        "--size",
        "500x340",
        "-o",
        png.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(out.stderr.is_empty(), "piped: no progress output");
    let img = image::open(&png).unwrap();
    assert_eq!((img.width(), img.height()), (500, 340));
    for extra in [
        vec!["--layer", "2", "--thickness-range", "60,120"],
        vec!["--scale-range", "0.9,1.1"],
    ] {
        let t = d.join("t.svg");
        let mut args = vec![
            "chart",
            a,
            "--kind",
            "thickness-angle",
            "--steps",
            "3",
            "-o",
            t.to_str().unwrap(),
        ];
        args.extend(extra);
        let out = lamella(&args);
        assert!(
            out.status.success(),
            "{args:?}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let svg = d.join("ab.svg");
    let out = lamella(&[
        "chart",
        a,
        "--scene",
        b,
        "--kind",
        "ab-travel",
        "--size",
        "500x340",
        "-o",
        svg.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(std::fs::read_to_string(&svg).unwrap().starts_with("<?xml"));
    for (args, needle) in [
        (
            vec!["chart", a, "--kind", "map", "-o", "x.jpg"],
            ".png or .svg",
        ),
        (
            vec!["chart", a, b, "--kind", "map", "-o", "x.png"],
            "give one scene",
        ),
        (
            vec![
                "chart",
                a,
                "--kind",
                "thickness-angle",
                "--layer",
                "9",
                "-o",
                "x.png",
            ],
            "layer = 9",
        ),
        (
            vec![
                "chart", a, "--kind", "spectra", "--angles", "95", "-o", "x.png",
            ],
            "below 90",
        ),
        (
            vec![
                "chart", a, "--kind", "map", "--size", "10x10", "-o", "x.png",
            ],
            "pixels",
        ),
    ] {
        let out = lamella(&args);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
        assert!(err.contains(needle), "{args:?}: {err}");
    }
}

#[test]
fn report_writes_every_chart_and_one_html_page() {
    let d = dir("report");
    let a = write_scene(&d, "a.json", MIRROR);
    let out_dir = d.join("report");
    let out = lamella(&[
        "report",
        a.to_str().unwrap(),
        "--size",
        "480x320",
        "-o",
        out_dir.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    for kind in [
        "angle-strip",
        "thickness-angle",
        "spectra",
        "map",
        "chromaticity",
        "ab-travel",
    ] {
        for ext in ["png", "svg"] {
            assert!(
                out_dir.join(format!("{kind}.{ext}")).is_file(),
                "{kind}.{ext}"
            );
        }
    }
    let html = std::fs::read_to_string(out_dir.join("index.html")).unwrap();
    for needle in [
        "Test: green mirror",
        "<svg",
        "tio2",
        "#F0FFA6",
        "Colour travel",
        "outside sRGB",
        "approximation",
        "measured sample",
    ] {
        assert!(html.contains(needle), "report lacks {needle}");
    }
}
