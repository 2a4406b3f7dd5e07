//! Preview renders of effect-pigment coatings: pixels against the platelet
//! model and `multiangle`, and mirror symmetry.

mod common;

use common::{hit_sphere, lab_of};
use glam::{Vec2, Vec3};
use lamella::colorimetry::{Colour, ColourOptions, delta_e2000};
use lamella::pigment::{Coating, Model, colours, parse_name};
use lamella::render::{Base, Camera, Image, Light, Mesh, Preview, Settings, Source, View};
use lamella::scene::Scene;

/// An invented blue-violet interference pearl in a binder of index 1.5.
fn coating_scene(background: &str) -> Scene {
    let text = format!(
        r#"{{"materials": {{"clear": {{"n": 1.5}}}},
            "coating": {{"binder": "clear",
              "platelet": [{{"material": "tio2", "thickness_nm": 150}},
                           {{"material": "mica", "thickness_nm": 300}},
                           {{"material": "tio2", "thickness_nm": 150}}],
              "tilt_sigma_deg": 10, "platelet_coverage": 1, "background": {background}}},
            "wavelengths_nm": {{"from": 380, "to": 780, "step": 10}},
            "illuminant": "D65", "observer": "CIE1964_10"}}"#
    );
    Scene::from_json(&text, &|p: &str| Err(format!("no file {p}"))).unwrap()
}

fn pixel(image: &Image, x: usize, y: usize) -> [u8; 3] {
    let k = 3 * (y * image.width as usize + x);
    [image.rgb[k], image.rgb[k + 1], image.rgb[k + 2]]
}

/// Physics check: one directional light of intensity k = √2 at 75° to the
/// right of the line of sight (a distant camera), no sky, no tone curve, exposure 1. The
/// radiance toward the eye is k·R_F·cos θ_light (R_F = π·BRDF, CIE 015:2018
/// reflectance factor), with no gloss off the exact mirror direction. So a
/// sphere pixel whose local geometry is 45as15 (light 45° from the normal,
/// view 30° on the specular side in the plane of incidence) has
/// k·cos 45° = 1 times the colour `multiangle` reports there, and every lit
/// pixel has the colour of the full model at its own directions: both within
/// ΔE00 ≤ 2 (CIEDE2000, CIE 015:2018) — the rest is table interpolation,
/// tessellation and 8-bit rounding.
#[test]
fn directional_light_pixels_follow_the_platelet_model_and_multiangle() {
    let size = 128u32;
    let scene = coating_scene("{\"reflectance\": 0.2}");
    let s = scene.clone();
    let coating = Coating::from_scene(&s).unwrap();
    let model = Model::new(&s, &coating).unwrap();
    let weights = lamella::angle_colour::Viewing::of_scene(&s)
        .unwrap()
        .weights(&s.wavelengths_nm)
        .unwrap();
    let k = std::f64::consts::SQRT_2;
    let settings = Settings {
        width: size,
        height: size,
        ssaa: 1,
        exposure: 1.0,
        tone: false,
        roughness_deg: 0.0,
        base: Base::Black,
        lights: vec![Light {
            source: Source::Disc {
                azimuth_deg: 75.0,
                elevation_deg: 0.0,
                size_deg: 0.0,
            },
            intensity: k,
            illuminant: None,
        }],
        // Far and narrow: nearly parallel view rays, so the light keeps its
        // 75° to the view across the sphere.
        view: View {
            orbit_deg: 0.0,
            elevation_deg: 0.0,
            fov_deg: 5.0,
            distance: Some(25.0),
        },
        ..Settings::default()
    };
    let mesh = Mesh::sphere();
    let preview = Preview::new(&scene, &mesh, &settings).unwrap();
    let image = preview.render(0, &|_| {});
    let camera = Camera::new(&preview.view(0), size, size);
    let l = camera.direction(75.0, 0.0).normalize();
    let mut rf = vec![0.0; s.wavelengths_nm.len()];
    let (mut worst, mut checked) = (0.0f64, 0);
    let mut nearest = (f64::INFINITY, [0u8; 3]);
    for y in 0..size as usize {
        for x in 0..size as usize {
            let dir = camera.ray(Vec2::new(x as f32 + 0.5, y as f32 + 0.5));
            let Some(p) = hit_sphere(camera.eye, dir) else {
                continue;
            };
            let n = p.normalize();
            let v = (camera.eye - p).normalize();
            let (cos_l, cos_v) = (n.dot(l), n.dot(v));
            if cos_l < 0.2 || cos_v < 0.2 {
                continue;
            }
            // Local frame: x along the light's tangent direction.
            let ex = (l - n * cos_l).normalize();
            let ey = n.cross(ex);
            let local = |d: Vec3| [d.dot(ex) as f64, d.dot(ey) as f64, d.dot(n) as f64];
            let (ill, det) = (local(l), local(v));
            model.reflectance_factor(ill, det, &mut rf);
            let scaled: Vec<f64> = rf.iter().map(|r| r * k * cos_l as f64).collect();
            let want = Colour::new(
                weights.xyz(&scaled),
                weights.white(),
                &ColourOptions::default(),
            );
            let got = lab_of(pixel(&image, x, y).map(|c| c as f64 / 255.0));
            if want.lab[0] > 5.0 && want.in_gamut {
                worst = worst.max(delta_e2000(lab_of(want.rgb), got));
                checked += 1;
            }
            // Distance from 45as15 in degrees.
            let angle = |a: [f64; 3], b: [f64; 3]| {
                (a[0] * b[0] + a[1] * b[1] + a[2] * b[2])
                    .clamp(-1.0, 1.0)
                    .acos()
                    .to_degrees()
            };
            let g = &parse_name("45as15", "g").unwrap()[0];
            let mirror = |d: [f64; 3]| [-d[0], -d[1], d[2]];
            let off = angle(mirror(ill), g.illumination) + angle(mirror(det), g.detection);
            if off < nearest.0 {
                nearest = (off, pixel(&image, x, y));
            }
        }
    }
    assert!(checked > 2000, "{checked}");
    assert!(worst <= 2.0, "worst ΔE00 {worst}");
    assert!(nearest.0 < 2.0, "nearest pixel {}° from 45as15", nearest.0);
    let g = parse_name("45as15", "g").unwrap();
    let reported = &colours(&model, &g, &weights, &ColourOptions::default())[0].colour;
    let de = delta_e2000(
        lab_of(reported.rgb),
        lab_of(nearest.1.map(|c| c as f64 / 255.0)),
    );
    assert!(de <= 2.0, "ΔE00 {de} against multiangle at 45as15");
}

/// A sphere wearing the coating under a sky and a light straight above the
/// line of sight renders mirror-symmetric left to right.
#[test]
fn coated_sphere_under_symmetric_light_is_mirror_symmetric() {
    let scene = coating_scene("\"black\"");
    let settings = Settings {
        width: 80,
        height: 80,
        ssaa: 2,
        roughness_deg: 4.0,
        lights: vec![
            "sky,intensity=0.5".parse().unwrap(),
            "area,azimuth_deg=0,elevation_deg=35,size_deg=10,intensity=2"
                .parse()
                .unwrap(),
        ],
        view: View {
            orbit_deg: 0.0,
            elevation_deg: 25.0,
            fov_deg: 30.0,
            distance: None,
        },
        ..Settings::default()
    };
    let mesh = Mesh::sphere();
    let image = Preview::new(&scene, &mesh, &settings)
        .unwrap()
        .render(0, &|_| {});
    let (mut worst, mut lit) = (0i32, 0);
    for y in 0..80 {
        for x in 0..40 {
            let (a, b) = (pixel(&image, x, y), pixel(&image, 79 - x, y));
            for c in 0..3 {
                worst = worst.max((a[c] as i32 - b[c] as i32).abs());
            }
            lit += (a.iter().map(|&c| c as u32).sum::<u32>() > 60) as usize;
        }
    }
    assert!(worst <= 3, "channel differs by {worst}");
    assert!(lit > 300, "{lit} lit pixels: the coating shows");
}

/// Mirror-like check of the sky integral: nearly flat platelets (σ = 0.5°)
/// at a low coverage c = 0.01 in a binder of index 1 over black, in a
/// uniform white sky of intensity 1, send each pixel the sky mirrored by the
/// platelets: radiance c_eff·R(θ) with R the platelet's reflectance from the
/// engine at the view angle θ and c_eff = c to within 1 % (the attenuation
/// c·a of the platelet layer). With exposure 1/c every pixel has the colour
/// of R(θ) within ΔE00 ≤ 2.
#[test]
fn flat_platelets_in_a_white_sky_mirror_it_with_their_reflectance() {
    use lamella::optics::{self, Exit, Stack};
    let text = r#"{"materials": {"air": {"n": 1.0}},
        "coating": {"binder": "air",
          "platelet": [{"material": "tio2", "thickness_nm": 110}],
          "tilt_sigma_deg": 0.5, "platelet_coverage": 0.01, "background": "black"},
        "wavelengths_nm": {"from": 380, "to": 780, "step": 10},
        "illuminant": "D65", "observer": "CIE1964_10"}"#;
    let scene = Scene::from_json(text, &|p: &str| Err(format!("no file {p}"))).unwrap();
    let s = scene.clone();
    let coating = Coating::from_scene(&s).unwrap();
    let size = 96u32;
    let settings = Settings {
        width: size,
        height: size,
        ssaa: 1,
        exposure: 100.0,
        tone: false,
        lights: vec!["sky,intensity=1".parse().unwrap()],
        view: View {
            orbit_deg: 0.0,
            elevation_deg: 0.0,
            fov_deg: 30.0,
            distance: None,
        },
        ..Settings::default()
    };
    let mesh = Mesh::sphere();
    let preview = Preview::new(&scene, &mesh, &settings).unwrap();
    let image = preview.render(0, &|_| {});
    let camera = Camera::new(&preview.view(0), size, size);
    let index = s.indices(&s.wavelengths_nm).unwrap();
    let stack = Stack {
        incident: coating.binder,
        nodes: lamella::scene::realise(&coating.platelet, None).remove(0),
        exit: Exit::Medium(coating.binder),
    };
    let weights = lamella::angle_colour::Viewing::of_scene(&s)
        .unwrap()
        .weights(&s.wavelengths_nm)
        .unwrap();
    let mut worst = (0.0f64, 0.0f64);
    let mut count = 0;
    for y in (0..size as usize).step_by(3) {
        for x in (0..size as usize).step_by(3) {
            let dir = camera.ray(Vec2::new(x as f32 + 0.5, y as f32 + 0.5));
            let Some(p) = hit_sphere(camera.eye, dir) else {
                continue;
            };
            let theta = p.normalize().dot(-dir).clamp(0.0, 1.0).acos().to_degrees() as f64;
            if theta > 70.0 {
                continue;
            }
            let r = optics::compute(
                std::slice::from_ref(&stack),
                &index,
                &s.wavelengths_nm,
                &[theta],
            );
            let spectrum: Vec<f64> = r.rt.iter().map(|x| x.r()).collect();
            let want = Colour::new(
                weights.xyz(&spectrum),
                weights.white(),
                &ColourOptions::default(),
            );
            let de = delta_e2000(
                lab_of(want.rgb),
                lab_of(pixel(&image, x, y).map(|c| c as f64 / 255.0)),
            );
            if de > worst.0 {
                worst = (de, theta);
            }
            count += 1;
        }
    }
    assert!(count > 300, "{count}");
    assert!(worst.0 <= 2.0, "ΔE00 {} at θ = {}°", worst.0, worst.1);
}
