//! What the readers of user documents promise for any input whatsoever: a
//! value that keeps the reader's documented guarantees, or an error that
//! prints as one line and names where the problem is. Never a panic.
//!
//! Shared by the fuzz targets (`fuzz/fuzz_targets/`) and the seeded mutation
//! tests (`tests/fuzz_inputs.rs`); every check panics on a broken promise.

use lamella::Error;
use lamella::angle_colour::{Viewing, angle_colours};
use lamella::design::coating::At;
use lamella::measured::{MIN_MEASURED, ReadOptions, read};
use lamella::render::Mesh;
use lamella::scene::{Item, Scene};

/// A material table scenes may name as `"table": "nk.csv"`.
pub const NK_CSV: &str = include_str!("fixtures/nk.csv");

/// An illuminant table scenes may name as `"illuminant": {"csv": "light.csv"}`.
pub const LIGHT_CSV: &str = include_str!("fixtures/light.csv");

/// Spectra are computed only for scenes below this many layer evaluations,
/// so that one input stays far below a millisecond.
const MAX_WORK: u64 = 50_000;

/// Serves the two fixture tables; any other name is a missing file.
fn load(name: &str) -> Result<String, String> {
    match name {
        "nk.csv" => Ok(NK_CSV.to_string()),
        "light.csv" => Ok(LIGHT_CSV.to_string()),
        _ => Err(format!("cannot read {name}: no such file")),
    }
}

/// An engine error must be one non-empty line that names a key (or, for
/// malformed JSON, a line and column).
pub fn check_error(e: &Error, reader: &str) {
    let text = e.to_string();
    assert!(
        one_line(&text),
        "{reader}: the error is not one line: {text:?}"
    );
    match e {
        Error::Invalid { key, .. }
        | Error::UnknownMaterial { key, .. }
        | Error::OutOfRange { key, .. } => {
            assert!(
                !key.trim().is_empty(),
                "{reader}: the error names no key: {text:?}"
            )
        }
        Error::NotComputable { what, at, .. } => {
            assert!(
                !what.trim().is_empty() && !at.trim().is_empty(),
                "{reader}: the error names no point: {text:?}"
            )
        }
        Error::Syntax { line, column, .. } => {
            assert!(*line >= 1, "{reader}: no position ({column}): {text:?}")
        }
    }
}

/// Whether a message is one non-empty line of printable text (nothing for
/// `one_line` to escape).
pub fn one_line(text: &str) -> bool {
    !text.trim().is_empty() && lamella::error::one_line(text) == text
}

/// Scene JSON: `Scene::from_json`, then the readers of the same document
/// downstream (`coating`, `preview`, the viewing); for small scenes also the
/// spectra and colours, which must be finite and physical.
pub fn check_scene(text: &str) {
    let scene = match Scene::from_json(text, &load) {
        Ok(s) => s,
        Err(e) => return check_error(&e, "scene"),
    };
    // The coating and preview sections were read with the scene; a preview
    // still passes its own range checks.
    if let Some(Err(e)) = scene.preview.as_ref().map(|s| s.check()) {
        check_error(&e, "preview");
    }
    let viewing = match Viewing::of_scene(&scene) {
        Ok(v) => v,
        Err(e) => return check_error(&e, "viewing"),
    };
    if work(&scene) > MAX_WORK {
        return;
    }
    let spectra = match scene.spectra() {
        Ok(s) => s,
        Err(e) => return check_error(&e, "spectra"),
    };
    let tolerance = 1e-9;
    for x in &spectra.rt {
        let [rs, rp, ts, tp] = [x.rs, x.rp, x.ts, x.tp];
        for v in [rs, rp, ts, tp] {
            assert!(
                v.is_finite() && (-tolerance..=1.0 + tolerance).contains(&v),
                "R or T outside 0–1: {x:?} in\n{text}"
            );
        }
        assert!(
            rs + ts <= 1.0 + 1e-6 && rp + tp <= 1.0 + 1e-6,
            "R + T above 1: {x:?} in\n{text}"
        );
    }
    match angle_colours(&spectra, &viewing) {
        Ok(colours) => {
            for c in colours {
                let numbers = c.xyz.iter().chain(&c.xy).chain(&c.lab).chain(&c.lch);
                assert!(
                    numbers.chain(&c.rgb).all(|v| v.is_finite()),
                    "a colour is not finite: {c:?} in\n{text}"
                );
                assert!(c.hex.len() == 7 && c.hex.starts_with('#'), "{c:?}");
            }
        }
        Err(e) => check_error(&e, "colour"),
    }
}

/// Layer evaluations of the scene's spectra (a bound, not a count). A
/// layer on the 4×4 path costs about as much as 20 on the 2×2 path, and a
/// helix, integrated in steps through each pitch, about as much as 10⁴.
fn work(scene: &Scene) -> u64 {
    fn items(list: &[Item], expand: bool) -> u64 {
        list.iter()
            .map(|item| match item {
                Item::Layer(l) => match &l.anisotropy {
                    None => 1,
                    Some(a) if a.helix.is_some() => 10_000,
                    Some(_) => 20,
                },
                Item::Repeat(r) if expand || r.chirp_scale != 1.0 => {
                    r.count.saturating_mul(items(&r.items, expand))
                }
                Item::Repeat(r) => {
                    let powers = 2 * u64::from(64 - r.count.leading_zeros());
                    powers.saturating_mul(items(&r.items, expand))
                }
            })
            .fold(0, u64::saturating_add)
    }
    let realizations = scene.disorder.as_ref().map_or(1, |d| d.realizations as u64);
    let grid = (scene.wavelengths_nm.len() * scene.angles_deg.len()) as u64;
    items(&scene.stack, scene.disorder.is_some())
        .saturating_add(1)
        .saturating_mul(grid)
        .saturating_mul(realizations)
}

/// Measured spectra (`lamella fit --measured`, `lamella compare`): non-empty
/// groups of finite, physical points at distinct angles or geometries, with
/// wavelengths increasing strictly in each group, read alike as fractions
/// and (when `percent`) as percent.
pub fn check_measured(text: &str, default_angle: f64) {
    for percent in [false, true] {
        check_measured_as(text, default_angle, percent);
    }
}

fn check_measured_as(text: &str, default_angle: f64, percent: bool) {
    let options = ReadOptions {
        default_angle_deg: default_angle,
        percent,
    };
    let groups = match read(text, &options) {
        Ok(g) => g.groups,
        Err(e) => {
            check_error(&e, "measured");
            let text = e.to_string();
            assert!(text.starts_with("measured"), "{text:?}");
            return;
        }
    };
    assert!(!groups.is_empty());
    for (i, g) in groups.iter().enumerate() {
        assert!(!g.r.is_empty() && g.r.len() == g.wavelengths_nm.len());
        let shortest = lamella::scene::MIN_WAVELENGTH_NM;
        assert!(
            g.wavelengths_nm
                .iter()
                .all(|w| w.is_finite() && *w >= shortest)
        );
        assert!(g.r.iter().all(|r| r.is_finite() && *r >= MIN_MEASURED));
        assert!(g.wavelengths_nm.windows(2).all(|p| p[1] > p[0]));
        match &g.at {
            At::Angle(a) => assert!(a.abs() < 90.0, "angle {a}"),
            At::Geometry(geo) => {
                let numbers = [geo.illumination_deg, geo.aspecular_deg];
                let vectors = geo.illumination.iter().chain(&geo.detection);
                assert!(
                    numbers.iter().chain(vectors).all(|v| v.is_finite()),
                    "{geo:?}"
                );
            }
        }
        assert!(groups[..i].iter().all(|h| h.at != g.at), "{:?} twice", g.at);
    }
}

/// Wavefront OBJ text (`--shape mesh:FILE`): a triangle mesh with one unit
/// normal per vertex, centred and scaled to a bounding sphere of radius 1.
pub fn check_obj(bytes: &[u8]) {
    let mesh = match Mesh::from_obj("fuzz.obj", bytes) {
        Ok(m) => m,
        Err(e) => return check_error(&e, "obj"),
    };
    let n = mesh.positions.len();
    assert_eq!(mesh.normals.len(), n);
    assert!(!mesh.triangles.is_empty());
    let mut radius = 0.0f32;
    for p in &mesh.positions {
        assert!(p.is_finite(), "vertex {p}");
        radius = radius.max(p.length());
    }
    assert!((radius - 1.0).abs() < 1e-3, "bounding radius {radius}");
    for t in &mesh.triangles {
        assert!(t.iter().all(|&i| (i as usize) < n), "triangle {t:?}");
        let [a, b, c] = t.map(|i| mesh.positions[i as usize]);
        // Faces of no area (up to rounding in the framing) have no normal.
        let flat = (b - a).cross(c - a).length() < 1e-6;
        for &i in t {
            let normal = mesh.normals[i as usize];
            let unit = (normal.length() - 1.0).abs() < 1e-3;
            assert!(unit || (flat && normal.length() == 0.0), "normal {normal}");
        }
    }
}
