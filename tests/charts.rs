//! Charts: pixel checks against the colour pipeline and the CIE tables, file
//! formats and sizes, the chart and report commands.

mod common;

use common::lamella;

use std::path::{Path, PathBuf};

use lamella::angle_colour::{Polarization, Viewing};
use lamella::chart::{self, AbTravel, AngleStrip, Chromaticity, ReflectanceMap, SpectraChart};
use lamella::chart::{BandsChart, FieldChart, ThicknessAngle, Variation};
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

fn pixel(rgb: &[u8], size: (u32, u32), (x, y): (i32, i32)) -> [u8; 3] {
    let i = 3 * (y as usize * size.0 as usize + x as usize);
    [rgb[i], rgb[i + 1], rgb[i + 2]]
}

/// The strip shows, at each angle, the sRGB that `lamella color` reports
/// there, except near the gamut edge, where it shows the softened colour it
/// computed (relative chroma 0.95–1.1, see `chart::gamut`).
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
    let mut exact = 0;
    for r in records.as_array().unwrap() {
        let angle = r["angle_deg"].as_f64().unwrap();
        let want: Vec<i32> = r["srgb"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| (v.as_f64().unwrap() * 255.0).round() as i32)
            .collect();
        let sample = strip.rows[0]
            .samples
            .iter()
            .find(|x| x.angle_deg == angle)
            .unwrap();
        let shown = sample.shown.colour();
        let shown = [shown.0 as i32, shown.1 as i32, shown.2 as i32];
        let got = pixel(&rgb, size, strip.pixel_of(size, 0, angle));
        for k in 0..3 {
            assert!(
                (got[k] as i32 - shown[k]).abs() <= 1,
                "{angle}°: {got:?} vs {shown:?}"
            );
        }
        if sample.shown.rgb == sample.colour.rgb {
            exact += 1;
            assert_eq!(shown.to_vec(), want, "{angle}°");
        }
    }
    assert!(exact >= 6, "only {exact} angles away from the gamut edge");
}

/// A scene with strong out-of-gamut colours (the demo label foil).
fn teal() -> Scene {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/teal_label_foil.json"),
    )
    .unwrap();
    scene(&text)
}

/// A pale single-layer antireflection coating: every colour inside sRGB.
const PALE: &str = r#"{"title":"Test: pale coating","incident":"air",
 "stack":[{"material":"sio2_film","thickness_nm":100}],
 "substrate":"glass","wavelengths_nm":{"from":380,"to":780,"step":10},"angles_deg":{"from":0,"to":60,"step":10}}"#;

/// The hatch tint of out-of-gamut marks in SVG.
const HATCH_TINT: &str = "fill=\"#1b2330\" fill-opacity=\"0.100\"";

fn dark(p: [u8; 3]) -> bool {
    p.iter().map(|&v| v as u32).sum::<u32>() < 250
}

/// Out-of-gamut angles are hatched in the marker row under the band (and
/// only those), swatches outside the gamut get a hatched tag, and a legend
/// line appears; an in-gamut scene shows none of these.
#[test]
fn strip_marks_out_of_gamut_angles_and_only_those() {
    let s = teal();
    let v = Viewing::of_scene(&s).unwrap();
    let strip = AngleStrip::compute(&s, &v, None).unwrap();
    assert_eq!(
        strip.rows[0].outside.len(),
        1,
        "{:?}",
        strip.rows[0].outside
    );
    let (a, b) = strip.rows[0].outside[0];
    assert_eq!(a, 0.0);
    assert!(b > 35.0 && b < 42.0, "{b}");
    for x in &strip.rows[0].samples {
        assert_eq!(
            !x.colour.in_gamut,
            x.angle_deg <= b,
            "{}° in_gamut {}",
            x.angle_deg,
            x.colour.in_gamut
        );
    }
    let size = (1200, 800);
    let rgb = chart::rgb(&strip, size).unwrap();
    let marked = |angle: f64| {
        let (x, _, (m0, m1)) = strip.rows_of(size, 0, angle);
        (m0..=m1).any(|y| (x - 4..=x + 4).any(|xx| dark(pixel(&rgb, size, (xx, y)))))
    };
    for angle in [2.0, 10.0, 25.0, b - 2.0] {
        assert!(marked(angle), "{angle}° is outside sRGB but not marked");
    }
    for angle in [b + 3.0, 50.0, 70.0] {
        assert!(!marked(angle), "{angle}° is inside sRGB but marked");
    }
    let svg = chart::svg(&strip, size).unwrap();
    assert!(svg.contains(HATCH_TINT));

    let pale = scene(PALE);
    let v = Viewing::of_scene(&pale).unwrap();
    let strip = AngleStrip::compute(&pale, &v, None).unwrap();
    assert!(strip.rows[0].samples.iter().all(|x| x.colour.in_gamut));
    assert!(strip.rows[0].outside.is_empty());
    let rgb = chart::rgb(&strip, size).unwrap();
    let (x0, _, (m0, m1)) = strip.rows_of(size, 0, 0.0);
    let (x1, _, _) = strip.rows_of(size, 0, 60.0);
    for y in m0..=m1 {
        for x in x0..=x1 {
            assert_eq!(pixel(&rgb, size, (x, y)), [255; 3], "mark at ({x}, {y})");
        }
    }
    // No legend line at the bottom left either.
    for y in 760..800 {
        for x in 0..400 {
            assert_eq!(pixel(&rgb, size, (x, y)), [255; 3], "legend at ({x}, {y})");
        }
    }
    assert!(!chart::svg(&strip, size).unwrap().contains(HATCH_TINT));
}

/// Largest second difference of colours at evenly spaced angles (the
/// strip's samples are), in CIELAB units.
fn bend(labs: &[[f64; 3]]) -> f64 {
    labs.windows(3)
        .map(|w| {
            (0..3)
                .map(|k| (w[0][k] - 2.0 * w[1][k] + w[2][k]).abs())
                .fold(0.0, f64::max)
        })
        .fold(0.0, f64::max)
}

/// No seam where the colours return into the gamut: across the edge the
/// band's colour (as displayed, in CIELAB) bends far less than the reported
/// clipped colours, which kink there, and not much more than over the
/// in-gamut angles beyond; adjacent columns of the drawn band differ there
/// by no more than anywhere else along it.
#[test]
fn strip_has_no_seam_at_the_gamut_edge() {
    use lamella::colorimetry::{RgbSpace, rgb_to_xyz_under, xyz_to_lab};
    let s = teal();
    let v = Viewing::of_scene(&s).unwrap();
    let strip = AngleStrip::compute(&s, &v, None).unwrap();
    let white = v.weights(&s.wavelengths_nm).unwrap().white();
    let edge = strip.rows[0].outside[0].1;
    let lab = |rgb: [f64; 3]| xyz_to_lab(rgb_to_xyz_under(rgb, white, RgbSpace::Srgb), white);
    let window = |lo: f64, hi: f64, shown: bool| -> Vec<[f64; 3]> {
        strip.rows[0]
            .samples
            .iter()
            .filter(|x| x.angle_deg >= lo && x.angle_deg <= hi)
            .map(|x| lab(if shown { x.shown.rgb } else { x.colour.rgb }))
            .collect()
    };
    let at_edge = bend(&window(edge - 3.0, edge + 3.0, true));
    let beyond = bend(&window(edge + 3.0, 75.0, true));
    let clipped = bend(&window(edge - 3.0, edge + 3.0, false));
    assert!(
        at_edge < clipped / 5.0,
        "bend {at_edge} at the edge, {clipped} when clipped"
    );
    assert!(
        at_edge < 5.0 * beyond,
        "bend {at_edge} at the edge, {beyond} beyond"
    );

    let size = (1200, 800);
    let rgb = chart::rgb(&strip, size).unwrap();
    let (xe, (y0, y1), _) = strip.rows_of(size, 0, edge);
    let (xa, _, _) = strip.rows_of(size, 0, 0.0);
    let (xb, _, _) = strip.rows_of(size, 0, 75.0);
    let y = (y0 + y1) / 2;
    let step = |x: i32| -> i32 {
        let (p, q) = (pixel(&rgb, size, (x, y)), pixel(&rgb, size, (x + 1, y)));
        (0..3)
            .map(|k| (p[k] as i32 - q[k] as i32).abs())
            .max()
            .unwrap()
    };
    let near = (xe - 40..xe + 40).map(step).max().unwrap();
    let elsewhere = (xa + 1..xb - 1)
        .filter(|x| (x - xe).abs() >= 40)
        .map(step)
        .max()
        .unwrap();
    assert!(
        near <= elsewhere,
        "steps {near} at the edge, {elsewhere} elsewhere"
    );
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
        SpectraChart::compute(&both, &[0.0, 60.0], Some(&pols), true).unwrap()
    );
    both_formats!("map", ReflectanceMap::compute(&a, &va).unwrap());
    both_formats!("chromaticity", Chromaticity::compute(&both).unwrap());
    both_formats!("ab-travel", AbTravel::compute(&both).unwrap());
    both_formats!("field", FieldChart::compute(&a, 550.0, 30.0, 1).unwrap());
    both_formats!("bands", BandsChart::compute(&a, None).unwrap());
    both_formats!(
        "bands-with-reflectance",
        BandsChart::compute(&a, Some(&va)).unwrap()
    );
    out
}

/// The field chart's shaded regions are the media crossed in order (air,
/// five periods of two layers, glass), joined end to end, and its stop
/// bands are the engine's.
#[test]
fn field_regions_follow_the_stack_and_bands_are_the_engines() {
    let a = scene(MIRROR);
    let c = FieldChart::compute(&a, 550.0, 0.0, 0).unwrap();
    assert_eq!(c.materials, ["air", "tio2", "sio2_film", "glass"]);
    let order: Vec<usize> = c.regions.iter().map(|r| r.material).collect();
    let mut expected = vec![0];
    expected.extend([1, 2].repeat(5));
    expected.push(3);
    assert_eq!(order, expected);
    for w in c.regions.windows(2) {
        assert_eq!(w[0].to_nm, w[1].from_nm);
    }
    assert_eq!(c.regions[1].from_nm, 0.0);
    assert!((c.regions[10].to_nm - 5.0 * (57.0 + 94.0)).abs() < 1e-6);
    let b = BandsChart::compute(&a, None).unwrap();
    assert_eq!(b.stop_bands, a.bands().unwrap().stop_bands);
    assert!(b.reflectance.is_none());
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

/// The thickness-angle field holds the design: at the design value its
/// samples at the scene's grid angles are the scene's own colours.
#[test]
fn thickness_field_contains_the_design() {
    let s = scene(MIRROR);
    let v = Viewing::of_scene(&s).unwrap();
    let own = lamella::angle_colour::angle_colours(&s.spectra().unwrap(), &v).unwrap();
    for (variation, steps) in [
        (Variation::Scale { from: 0.9, to: 1.1 }, 3),
        (
            Variation::Layer {
                layer: 1,
                range_nm: Some((47.0, 67.0)),
            },
            3,
        ),
        (
            Variation::Layer {
                layer: 1,
                range_nm: Some((40.0, 70.0)),
            },
            4,
        ),
    ] {
        let g = ThicknessAngle::compute(&s, &v, &variation, steps, &|| {}).unwrap();
        let i = g.values.iter().position(|&x| x == g.nominal).unwrap();
        assert!(g.values.windows(2).all(|w| w[0] < w[1]), "{:?}", g.values);
        for (a, c) in s.angles_deg.iter().zip(&own) {
            let j = g.angles.iter().position(|x| x == a).unwrap();
            assert_eq!(g.fields[0].cells[i][j].hex, c.hex, "{variation:?} {a}°");
        }
        assert!(g.angles.len() > s.angles_deg.len() && g.angles.len() <= 31);
        assert_ne!(
            g.fields[0].cells[0][0].hex,
            g.fields[0].cells[g.values.len() - 1][0].hex
        );
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

/// The field is hatched where the colours lie outside sRGB and only there,
/// in PNG and SVG alike; an in-gamut scene has no hatching.
#[test]
fn thickness_field_hatches_out_of_gamut_regions() {
    let s = teal();
    let v = Viewing::of_scene(&s).unwrap();
    let g = ThicknessAngle::compute(&s, &v, &Variation::Scale { from: 0.8, to: 1.2 }, 41, &|| {})
        .unwrap();
    assert!(g.any_outside());
    let size = (1200, 800);
    let rgb = chart::rgb(&g, size).unwrap();
    // Near every sample (well inside its neighbours' cell) the pixels are
    // hatched exactly when the sample and its neighbours agree on being
    // outside: the hatch lines are dark and light, so the pixels spread.
    let mut checked = (0, 0);
    for i in 1..g.values.len() - 1 {
        for j in 1..g.angles.len() - 1 {
            let around = (i - 1..=i + 1).flat_map(|a| (j - 1..=j + 1).map(move |b| (a, b)));
            let outs: Vec<bool> = around
                .map(|(a, b)| !g.fields[0].cells[a][b].in_gamut)
                .collect();
            if outs.iter().any(|&o| o != outs[0]) {
                continue;
            }
            let (x, y) = g.pixel_of(size, 0, (g.values[i], g.angles[j]));
            let (design, _) = g.pixel_of(size, 0, (g.nominal, g.angles[j]));
            if (x - design).abs() < 10 {
                continue;
            }
            let block: Vec<[u8; 3]> = (-5..=5)
                .flat_map(|dx| (-5..=5).map(move |dy| (x + dx, y + dy)))
                .map(|p| pixel(&rgb, size, p))
                .collect();
            let luma =
                |p: &[u8; 3]| 0.2126 * p[0] as f64 + 0.7152 * p[1] as f64 + 0.0722 * p[2] as f64;
            let (lo, hi) = block
                .iter()
                .map(luma)
                .fold((f64::MAX, f64::MIN), |(l, h), v| (l.min(v), h.max(v)));
            if outs[0] {
                assert!(hi - lo > 40.0, "sample ({i}, {j}) outside but not hatched");
                checked.0 += 1;
            } else {
                assert!(
                    hi - lo < 25.0,
                    "sample ({i}, {j}) inside but hatched: {lo}–{hi}"
                );
                checked.1 += 1;
            }
        }
    }
    assert!(checked.0 > 50 && checked.1 > 50, "{checked:?}");
    let svg = chart::svg(&g, size).unwrap();
    assert!(svg.contains("<image ") && svg.contains("data:image/png;base64,"));
    assert!(svg.contains(HATCH_TINT), "legend key");

    let pale = scene(PALE);
    let v = Viewing::of_scene(&pale).unwrap();
    let g = ThicknessAngle::compute(
        &pale,
        &v,
        &Variation::Scale { from: 0.9, to: 1.1 },
        5,
        &|| {},
    )
    .unwrap();
    assert!(!g.any_outside());
    assert!(!chart::svg(&g, size).unwrap().contains(HATCH_TINT));
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
        "bands",
    ] {
        for ext in ["png", "svg"] {
            assert!(
                out_dir.join(format!("{kind}.{ext}")).is_file(),
                "{kind}.{ext}"
            );
        }
    }
    let html = std::fs::read_to_string(out_dir.join("index.html")).unwrap();
    // Every caution of the README, the version, the date and the command.
    let cautions = readme_cautions();
    assert_eq!(cautions.len(), 4);
    for c in &cautions {
        assert!(
            html.contains(&lamella::chart::canvas::escape(c)),
            "report lacks the caution {c:?}"
        );
    }
    assert!(html.contains(&format!("lamella {}", env!("CARGO_PKG_VERSION"))));
    assert!(has_utc_timestamp(&html), "no ISO 8601 UTC date");
    let command = format!(
        "lamella report {} --size 480x320 -o {}",
        a.to_str().unwrap(),
        out_dir.to_str().unwrap()
    );
    assert!(
        html.contains(&lamella::chart::canvas::escape(&command)),
        "report lacks the command {command}"
    );
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

/// The bullets of the README's "Cautions" section.
fn readme_cautions() -> Vec<String> {
    let readme =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md")).unwrap();
    readme
        .lines()
        .skip_while(|l| l.trim() != "## Cautions")
        .skip(1)
        .take_while(|l| !l.starts_with("## "))
        .filter_map(|l| l.strip_prefix("- "))
        .map(|l| l.trim().to_string())
        .collect()
}

/// Whether `text` holds a UTC time `YYYY-MM-DDThh:mm:ssZ`.
fn has_utc_timestamp(text: &str) -> bool {
    let pattern = "dddd-dd-ddTdd:dd:ddZ";
    let b = text.as_bytes();
    b.windows(pattern.len()).any(|w| {
        w.iter().zip(pattern.bytes()).all(|(&c, p)| {
            if p == b'd' {
                c.is_ascii_digit()
            } else {
                c == p
            }
        })
    })
}

/// The README's cautions are the library's: one text in two places.
#[test]
fn readme_cautions_are_the_library_cautions() {
    assert_eq!(readme_cautions(), lamella::report::CAUTIONS.to_vec());
}

/// A chiral scene's strip shows unpolarized light and the views through a
/// left and a right analyser side by side, each row's swatches equal to
/// `lamella color` with that analyser; its spectra default to unpolarized,
/// left- and right-circular curves and its map to one panel per handedness.
#[test]
fn chiral_strip_rows_equal_the_color_command_per_analyser() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/cnc_giftbox_window.json");
    let s = scene(&std::fs::read_to_string(&path).unwrap());
    let v = Viewing::of_scene(&s).unwrap();
    let strip = AngleStrip::compute(&s, &v, Some(&[0.0, 15.0, 30.0, 45.0, 60.0])).unwrap();
    let labels: Vec<&str> = strip.rows.iter().map(|r| r.label.as_str()).collect();
    assert_eq!(
        labels,
        [
            "unpolarized",
            "through a left analyser",
            "through a right analyser"
        ]
    );
    for (row, analyzer) in strip.rows.iter().zip([None, Some("left"), Some("right")]) {
        let mut args = vec!["color", path.to_str().unwrap(), "--format", "json"];
        args.extend(analyzer.iter().flat_map(|a| ["--analyzer", a]));
        let out = lamella(&args);
        assert!(out.status.success());
        let records: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        let hexes: Vec<&str> = records
            .as_array()
            .unwrap()
            .iter()
            .map(|r| r["hex"].as_str().unwrap())
            .collect();
        let ticks: Vec<&str> = row.ticks.iter().map(|(_, c)| c.hex.as_str()).collect();
        assert_eq!(ticks, hexes, "{analyzer:?}");
    }
    // Left-handed film: through the left analyser it is bluer and brighter
    // at normal incidence than through the right one.
    assert!(strip.rows[1].ticks[0].1.lab[0] > strip.rows[2].ticks[0].1.lab[0] + 3.0);
    let spectra = SpectraChart::compute(&[(&s, &v)], &[0.0], None, false).unwrap();
    assert_eq!(
        spectra.polarizations,
        [
            Polarization::Unpolarized,
            Polarization::Left,
            Polarization::Right
        ]
    );
    let map = ReflectanceMap::compute(&s, &v).unwrap();
    assert_eq!(map.beside.len(), 1);
    // Isotropic scenes keep one row and the s, p curves.
    let m = scene(MIRROR);
    let vm = Viewing::of_scene(&m).unwrap();
    assert_eq!(AngleStrip::compute(&m, &vm, None).unwrap().rows.len(), 1);
    assert!(ReflectanceMap::compute(&m, &vm).unwrap().beside.is_empty());
    for (name, bytes) in [
        ("strip", chart::png(&strip, (1200, 800)).unwrap()),
        ("map", chart::png(&map, (1200, 800)).unwrap()),
    ] {
        assert!(bytes.len() > 1000, "{name}");
    }
}

/// `lamella report` takes a chiral scene: the page shows the colours
/// unpolarized and through each analyser side by side and states the
/// handedness convention; `chart --analyzer` is refused for spectra.
#[test]
fn chiral_report_shows_both_handednesses() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/cnc_giftbox_window.json");
    let d = dir("chiral-report");
    let out = lamella(&[
        "report",
        path.to_str().unwrap(),
        "-o",
        d.join("r").to_str().unwrap(),
        "--size",
        "640x400",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let html = std::fs::read_to_string(d.join("r/index.html")).unwrap();
    assert!(html.contains("Left and right circular polarization"));
    assert!(html.contains("<th colspan=2>Through a left analyser</th>"));
    assert!(html.contains("a left-handed helix reflects left-handed light at normal incidence"));
    // The layer table names the helix layer by its material, handedness and pitch.
    assert!(
        html.contains("cnc_film · left-handed helix, pitch 300 nm"),
        "layer table"
    );
    // Its thickness chart is the library's, with a field per handedness.
    let s = scene(&std::fs::read_to_string(&path).unwrap());
    let v = Viewing::of_scene(&s).unwrap();
    let g = ThicknessAngle::compute(
        &s,
        &v,
        &Variation::Scale { from: 0.9, to: 1.1 },
        ThicknessAngle::default_steps(&s),
        &|| {},
    )
    .unwrap();
    assert_eq!(g.fields.len(), 2);
    assert_eq!(
        std::fs::read_to_string(d.join("r/thickness-angle.svg")).unwrap(),
        chart::svg(&g, (640, 400)).unwrap()
    );
    let out = lamella(&[
        "chart",
        path.to_str().unwrap(),
        "--kind",
        "spectra",
        "--analyzer",
        "left",
        "-o",
        d.join("s.png").to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(2));
}

/// A chiral scene's thickness-angle chart under unpolarized light shows one
/// field per incident handedness, side by side: left then right, their
/// colours different, each the single field that `chart --polarization
/// left` (or `right`) draws, and each drawn in its own panel; any other
/// viewing, and an isotropic scene, keep one field.
#[test]
fn chiral_thickness_field_shows_each_handedness() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/cnc_giftbox_window.json");
    let s = scene(&std::fs::read_to_string(&path).unwrap());
    let v = Viewing::of_scene(&s).unwrap();
    let variation = Variation::Scale { from: 0.9, to: 1.1 };
    let g = ThicknessAngle::compute(&s, &v, &variation, 4, &|| {}).unwrap();
    let headings: Vec<&str> = g.fields.iter().map(|f| f.heading.as_str()).collect();
    assert_eq!(
        headings,
        [
            "Left-circular incident light",
            "Right-circular incident light"
        ]
    );
    assert!(
        g.caption
            .viewing
            .ends_with("left-circular and right-circular")
    );
    assert_ne!(g.fields[0].cells, g.fields[1].cells);
    // Left-handed film: left-circular light is reflected brighter at the
    // design, normal incidence.
    let i = g.values.iter().position(|&x| x == g.nominal).unwrap();
    assert!(g.fields[0].cells[i][0].lab[0] > g.fields[1].cells[i][0].lab[0] + 3.0);
    let d = dir("chiral-thickness");
    let size = (900, 600);
    for (field, p) in g.fields.iter().zip(["left", "right"]) {
        let lit = v.lit(p.parse().unwrap());
        let one = ThicknessAngle::compute(&s, &lit, &variation, 4, &|| {}).unwrap();
        assert_eq!(one.fields.len(), 1, "{p}");
        assert_eq!(one.fields[0].cells, field.cells, "{p}");
        assert_eq!(one.fields[0].shown, field.shown, "{p}");
        // The command draws that single field.
        let out_path = d.join(format!("{p}.svg"));
        let out = lamella(&[
            "chart",
            path.to_str().unwrap(),
            "--kind",
            "thickness-angle",
            "--scale-range",
            "0.9,1.1",
            "--steps",
            "4",
            "--polarization",
            p,
            "--size",
            "900x600",
            "-o",
            out_path.to_str().unwrap(),
        ]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        assert_eq!(
            std::fs::read_to_string(&out_path).unwrap(),
            chart::svg(&one, size).unwrap(),
            "{p}"
        );
    }
    // Each panel shows its own field: at an in-gamut sample away from the
    // design line, the pixel is that field's colour.
    let rgb = chart::rgb(&g, size).unwrap();
    let mut checked = 0;
    for (k, field) in g.fields.iter().enumerate() {
        let (design, _) = g.pixel_of(size, k, (g.nominal, g.angles[0]));
        for (i, j) in [(0, 1), (g.values.len() - 1, 1), (0, g.angles.len() - 2)] {
            if field.shown[i][j].excess > 0.0 {
                continue;
            }
            let (x, y) = g.pixel_of(size, k, (g.values[i], g.angles[j]));
            let (x, y) = (x + if i == 0 { 2 } else { -2 }, y);
            assert!((x - design).abs() > 10);
            let got = pixel(&rgb, size, (x, y));
            let want = field.shown[i][j].colour();
            let near = [
                got[0] as i32 - want.0 as i32,
                got[1] as i32 - want.1 as i32,
                got[2] as i32 - want.2 as i32,
            ];
            assert!(
                near.iter().all(|d| d.abs() <= 6),
                "field {k} ({i}, {j}): {got:?} vs {want:?}"
            );
            checked += 1;
        }
    }
    assert!(checked >= 4, "{checked}");
    for one in [
        v.lit(Polarization::S),
        v.through(lamella::optics::aniso::Handedness::Left),
    ] {
        let g = ThicknessAngle::compute(&s, &one, &variation, 3, &|| {}).unwrap();
        assert_eq!(g.fields.len(), 1, "{}", one.seen());
    }
    // An isotropic scene: one field, for the light asked for.
    let m = scene(MIRROR);
    let vm = Viewing::of_scene(&m).unwrap();
    let g = ThicknessAngle::compute(&m, &vm, &variation, 3, &|| {}).unwrap();
    assert_eq!(g.fields.len(), 1);
    assert_eq!(g.caption.viewing, lamella::chart::describe(&vm));
}
