//! Renders in environments: transmission through a clear pane, the energy of
//! a white base, the highlight of a single light, image environments on the
//! command line, animation, captions and the circular analyser.

use std::path::PathBuf;
use std::sync::Arc;

mod common;

use common::{hit_sphere, lab_of, lamella, temp_dir};
use glam::Vec2;
use lamella::angle_colour::{Side, Viewing};
use lamella::colorimetry::{Illuminant, delta_e2000, srgb_decode};
use lamella::optics::aniso::Handedness;
use lamella::render::{
    Base, Camera, EnvImage, Environment, Image, Light, Mesh, Preview, Procedural, Settings, View,
    ViewMode, builtin_mesh,
};
use lamella::scene::Scene;

fn data(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(name)
}

fn scene_of(text: &str) -> Scene {
    Scene::from_json(text, &|_: &str| Err("no tables".to_string())).unwrap()
}

fn film() -> Scene {
    scene_of(&std::fs::read_to_string(data("tests/data/render_film.json")).unwrap())
}

fn uniform(intensity: f64) -> Environment {
    Environment::Procedural(Procedural {
        intensity,
        .."uniform".parse().unwrap()
    })
}

/// Level view from the front, 1 sample per pixel, no tone curve, lit by
/// `environment` alone.
fn furnace(size: u32, environment: Environment) -> Settings {
    Settings {
        width: size,
        height: size,
        ssaa: 1,
        tone: false,
        lights: Vec::new(),
        environment: Some(environment),
        view: View {
            orbit_deg: 0.0,
            elevation_deg: 0.0,
            fov_deg: 30.0,
            distance: None,
        },
        ..Settings::default()
    }
}

fn pixel(image: &Image, x: usize, y: usize) -> [u8; 3] {
    let k = 3 * (y * image.width as usize + x);
    [image.rgb[k], image.rgb[k + 1], image.rgb[k + 2]]
}

fn bytes_lab(p: [u8; 3]) -> [f64; 3] {
    lab_of(p.map(|c| c as f64 / 255.0))
}

/// Transmission check: a flat pane (the test film on glass) in front of a
/// uniform white environment of radiance 1, shown in transmission, sends
/// toward the eye the environment's radiance times T(θ) at the angle θ
/// between the pane's normal and the line of sight (light from behind comes
/// straight through a thin pane). So every pixel on the pane has the colour
/// `lamella color --side transmit` gives at that θ (the same library call),
/// within ΔE00 1 (CIEDE2000, CIE 015:2018).
#[test]
fn a_pane_before_a_white_backlight_shows_the_transmitted_colour_of_lamella_color() {
    let scene = film();
    let mesh = Mesh::pane();
    let settings = Settings {
        mode: ViewMode::Transmit,
        view: View {
            orbit_deg: 35.0,
            elevation_deg: 25.0,
            fov_deg: 30.0,
            distance: None,
        },
        ..furnace(64, uniform(1.0))
    };
    let preview = Preview::new(&scene, &mesh, &settings).unwrap();
    let image = preview.render(0, &|_| {});
    let camera = Camera::new(&preview.view(0), 64, 64);
    let viewing = Viewing {
        side: Side::Transmit,
        ..Viewing::of_scene(&scene).unwrap()
    };
    let weights = viewing.weights(&scene.wavelengths_nm).unwrap();
    let half = 1.0 / 2f32.sqrt(); // framed: corners at distance 1
    let (mut worst, mut checked) = (0.0f64, 0);
    for y in 0..64 {
        for x in 0..64 {
            let dir = camera.ray(Vec2::new(x as f32 + 0.5, y as f32 + 0.5));
            let t = -camera.eye.z / dir.z;
            let p = camera.eye + t * dir;
            if !(t > 0.0 && p.x.abs() < 0.95 * half && p.y.abs() < 0.95 * half) {
                continue;
            }
            let theta = dir.z.abs().acos().to_degrees() as f64;
            let spectra = scene.spectra_at(&[theta]).unwrap();
            let mut scratch = Vec::new();
            let want = viewing.colour(&weights, spectra.at_angle(0), None, &mut scratch);
            let de = delta_e2000(bytes_lab(pixel(&image, x, y)), lab_of(want.rgb));
            worst = worst.max(de);
            checked += 1;
        }
    }
    assert!(checked > 600, "{checked}");
    assert!(worst <= 1.0, "ΔE00 {worst}");
    eprintln!("pane in transmission: worst ΔE00 {worst:.3} over {checked} pixels");
}

/// Energy check: a white Lambertian base under a film that reflects nothing
/// and passes everything (a layer of index 1 between media of index 1), in
/// a uniform environment of radiance L, sends radiance L toward the eye
/// from every point (a white diffuser in a furnace; conservation of energy).
/// So the decoded pixels are L within 1 %, with no floor, and with a white
/// floor (which sends L too) with its shadow on and off.
#[test]
fn a_white_base_in_a_uniform_environment_renders_at_its_radiance() {
    let scene = scene_of(
        r#"{"incident": "vac", "substrate": "vac",
            "materials": {"vac": {"n": 1.0, "k": 0.0}},
            "stack": [{"material": "vac", "thickness_nm": 50}]}"#,
    );
    let mesh = Mesh::sphere();
    let level = 0.4; // linear; sRGB code 170.3, so rounding stays below 0.4 %
    for (floor, shadow) in [(None, true), (Some(1.0), true), (Some(1.0), false)] {
        let settings = Settings {
            base: Base::Diffuse([1.0; 3]),
            floor,
            shadow,
            ..furnace(48, uniform(level))
        };
        let image = Preview::new(&scene, &mesh, &settings)
            .unwrap()
            .render(0, &|_| {});
        let (mut worst, mut count) = (0.0f64, 0);
        for (i, c) in image.coverage.iter().enumerate() {
            if *c == 1.0 {
                let p = pixel(&image, i % 48, i / 48);
                for v in p {
                    let lin = srgb_decode(v as f64 / 255.0);
                    worst = worst.max((lin / level - 1.0).abs());
                }
                count += 1;
            }
        }
        assert!(count > 1000);
        assert!(worst <= 0.01, "floor {floor:?} shadow {shadow}: {worst}");
        eprintln!(
            "white base, floor {floor:?}, shadow {shadow}: largest deviation {:.3} %",
            100.0 * worst
        );
    }
}

/// A single directional light (size 0) on a mirror film leaves a highlight
/// on every curved shape whose normals include the half vector between the
/// light and the eye (sphere, torus, bottle; a cylinder's side only has
/// level normals), and on a sphere it sits where the surface normal is that
/// half vector (the mirror direction; the sphere's normal found by ray
/// casting).
#[test]
fn one_directional_light_gives_a_highlight_where_the_mirror_direction_says() {
    let scene = film();
    for (az, el) in [(-35.0, 30.0), (20.0, 10.0), (50.0, -20.0)] {
        let light: Light = format!("directional,azimuth_deg={az},elevation_deg={el},intensity=1")
            .parse()
            .unwrap();
        let settings = Settings {
            width: 120,
            height: 120,
            ssaa: 1,
            tone: false,
            lights: vec![light],
            view: View {
                orbit_deg: 10.0,
                elevation_deg: 15.0,
                fov_deg: 30.0,
                distance: None,
            },
            ..Settings::default()
        };
        for shape in ["sphere", "torus", "bottle"] {
            let mesh = builtin_mesh(&shape.parse().unwrap()).unwrap();
            let preview = Preview::new(&scene, &mesh, &settings).unwrap();
            let image = preview.render(0, &|_| {});
            let (mut best, mut at) = (0u32, (0, 0));
            for y in 0..120 {
                for x in 0..120 {
                    let p = pixel(&image, x, y);
                    let sum = p.iter().map(|&c| c as u32).sum::<u32>();
                    if image.coverage[y * 120 + x] == 1.0 && sum > best {
                        (best, at) = (sum, (x, y));
                    }
                }
            }
            assert!(best >= 600, "{shape} ({az}, {el}): brightest {best}");
            if shape == "sphere" {
                let camera = Camera::new(&preview.view(0), 120, 120);
                let dir = camera.ray(Vec2::new(at.0 as f32 + 0.5, at.1 as f32 + 0.5));
                let p = hit_sphere(camera.eye, dir).expect("on the sphere");
                let l = camera.direction(az, el);
                let half = (l - dir).normalize();
                let off = p.normalize().dot(half).clamp(-1.0, 1.0).acos().to_degrees();
                assert!(
                    off < 2.5,
                    "({az}, {el}): highlight {off}° from the mirror direction"
                );
            }
        }
    }
}

/// The circular analyser: a chiral film (the demo's left-handed
/// cellulose-nanocrystal window) on a mirror sphere in a uniform white
/// environment shows at each pixel the colour `lamella color --analyzer`
/// gives at that angle (the same library call), within ΔE00 1, and the two
/// analysers differ strongly at normal view (the film reflects one
/// handedness).
#[test]
fn a_chiral_film_through_circular_analysers_shows_the_colour_of_lamella_color() {
    // The demo scene on a coarser wavelength grid, to keep the test short.
    let mut doc: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(data("scenes/cnc_giftbox_window.json")).unwrap(),
    )
    .unwrap();
    doc["wavelengths_nm"]["step"] = serde_json::json!(10);
    let scene = scene_of(&doc.to_string());
    let mesh = Mesh::sphere();
    let mut centre = Vec::new();
    for h in [Handedness::Left, Handedness::Right] {
        let settings = Settings {
            analyzer: Some(h),
            ..furnace(40, uniform(1.0))
        };
        let preview = Preview::new(&scene, &mesh, &settings).unwrap();
        let image = preview.render(0, &|_| {});
        let camera = Camera::new(&preview.view(0), 40, 40);
        let viewing = Viewing {
            analyzer: Some(h),
            ..Viewing::of_scene(&scene).unwrap()
        };
        let weights = viewing.weights(&scene.wavelengths_nm).unwrap();
        let mut worst = 0.0f64;
        for (x, y) in [(20, 20), (26, 20), (30, 14), (12, 24), (20, 31)] {
            let dir = camera.ray(Vec2::new(x as f32 + 0.5, y as f32 + 0.5));
            let p = hit_sphere(camera.eye, dir).unwrap();
            let theta = p.normalize().dot(-dir).clamp(0.0, 1.0).acos().to_degrees() as f64;
            let spectra = scene.spectra_with_jones_at(&[theta]).unwrap();
            let want = viewing.colour(
                &weights,
                spectra.at_angle(0),
                spectra.jones_at_angle(0),
                &mut Vec::new(),
            );
            let de = delta_e2000(bytes_lab(pixel(&image, x, y)), lab_of(want.rgb));
            worst = worst.max(de);
        }
        assert!(worst <= 1.0, "{h:?}: ΔE00 {worst}");
        centre.push(bytes_lab(pixel(&image, 20, 20)));
    }
    let apart = delta_e2000(centre[0], centre[1]);
    assert!(apart > 5.0, "left and right analysers: ΔE00 {apart}");
}

/// A Radiance HDR file of `w` × `h` pixels of one colour.
fn write_hdr(path: &std::path::Path, (w, h): (u32, u32), rgb: [f32; 3]) {
    let pixels: Vec<image::Rgb<f32>> = vec![image::Rgb(rgb); (w * h) as usize];
    let mut bytes = Vec::new();
    image::codecs::hdr::HdrEncoder::new(&mut bytes)
        .encode(&pixels, w as usize, h as usize)
        .unwrap();
    std::fs::write(path, bytes).unwrap();
}

#[test]
fn cli_reads_hdr_environments_and_refuses_bad_ones_naming_the_file() {
    let dir = temp_dir("render-hdr");
    let scene = data("tests/data/render_film.json");
    let s = scene.to_str().unwrap();
    let good = dir.join("grey.hdr");
    write_hdr(&good, (32, 16), [0.5, 0.5, 0.5]);
    let out = dir.join("out.png");
    let o = out.to_str().unwrap();
    let r = lamella(&[
        "render",
        s,
        "-o",
        o,
        "--size",
        "24x24",
        "--environment",
        good.to_str().unwrap(),
        "--environment-white",
        "D50",
        "--floor",
        "0.5",
        "--caption",
    ]);
    assert!(r.status.success(), "{}", String::from_utf8_lossy(&r.stderr));
    let png = std::fs::read(&out).unwrap();
    // The caption strip adds 14 rows under the 24.
    assert_eq!(&png[16..24], &[0, 0, 0, 24, 0, 0, 0, 38]);

    let bytes = std::fs::read(&good).unwrap();
    let cut = dir.join("cut.hdr");
    std::fs::write(&cut, &bytes[..bytes.len() / 2]).unwrap();
    let text = dir.join("text.hdr");
    std::fs::write(&text, "this is not an image").unwrap();
    let missing = dir.join("missing.hdr");
    for (file, needle) in [
        (&missing, "cannot read"),
        (&cut, "damaged or cut short"),
        (&text, "not a Radiance HDR"),
    ] {
        let never = dir.join("never.png");
        let r = lamella(&[
            "render",
            s,
            "-o",
            never.to_str().unwrap(),
            "--size",
            "8x8",
            "--environment",
            file.to_str().unwrap(),
        ]);
        let err = String::from_utf8_lossy(&r.stderr);
        assert_eq!(r.status.code(), Some(2), "{err}");
        assert!(
            err.contains(file.to_str().unwrap()) && err.contains(needle),
            "{err}"
        );
        assert_eq!(err.lines().count(), 1, "{err}");
        assert!(!never.exists());
    }
    for (args, needle) in [
        (vec!["--environment", "garden"], "--environment"),
        (vec!["--floor", "0.5"], "floor = 0.5"),
        (vec!["--environment", "studio", "--floor", "2"], "--floor"),
        (vec!["--view", "sideways"], "--view"),
        (vec!["--analyzer", "up"], "--analyzer"),
        (vec!["--orbit-elevation", "10:40"], "turntable"),
        (vec!["--environment-white", "D50"], "--environment-white"),
    ] {
        let mut all = vec!["render", s, "-o", o, "--size", "8x8"];
        all.extend(args);
        let r = lamella(&all);
        let err = String::from_utf8_lossy(&r.stderr);
        assert_eq!(r.status.code(), Some(2), "{all:?}: {err}");
        assert!(err.contains(needle), "{all:?}: {err}");
    }
}

#[test]
fn cli_turntable_writes_an_animated_png_and_its_frames() {
    let dir = temp_dir("render-spin");
    let out = dir.join("spin.png");
    let r = lamella(&[
        "render",
        data("scenes/violet_window_filter.json").to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
        "--size",
        "20x20",
        "--environment",
        "lighttable",
        "--view",
        "both",
        "--turntable",
        "4",
        "--orbit-elevation",
        "5:40",
    ]);
    assert!(r.status.success(), "{}", String::from_utf8_lossy(&r.stderr));
    let apng = std::fs::read(&out).unwrap();
    let count = |tag: &[u8]| apng.windows(4).filter(|w| *w == tag).count();
    assert_eq!((count(b"acTL"), count(b"fcTL")), (1, 4));
    for i in 0..4 {
        assert!(dir.join(format!("spin-00{i}.png")).exists());
    }
}

/// The elevation sweep closes the loop: frame 0 at the first elevation,
/// half way at the second.
#[test]
fn the_elevation_sweep_goes_there_and_back() {
    let scene = film();
    let mesh = Mesh::sphere();
    let settings = Settings {
        turntable: 8,
        orbit_elevation_deg: Some((5.0, 45.0)),
        ..furnace(8, uniform(1.0))
    };
    let p = Preview::new(&scene, &mesh, &settings).unwrap();
    assert!((p.view(0).elevation_deg - 5.0).abs() < 1e-9);
    assert!((p.view(4).elevation_deg - 45.0).abs() < 1e-9);
    assert!((p.view(2).elevation_deg - p.view(6).elevation_deg).abs() < 1e-9);
}

/// An environment image whose pixels are all the white renders a mirror
/// film like the uniform environment (the image path end to end).
#[test]
fn a_white_environment_image_matches_the_uniform_environment() {
    let scene = film();
    let mesh = Mesh::sphere();
    let white = Illuminant::builtin("D65").unwrap();
    let image = EnvImage::new("white", (16, 8), vec![1.0; 16 * 8 * 3], white).unwrap();
    let a = Preview::new(
        &scene,
        &mesh,
        &furnace(32, Environment::Image(Arc::new(image))),
    )
    .unwrap()
    .render(0, &|_| {});
    let b = Preview::new(&scene, &mesh, &furnace(32, uniform(1.0)))
        .unwrap()
        .render(0, &|_| {});
    let worst = a
        .rgb
        .iter()
        .zip(&b.rgb)
        .map(|(x, y)| (*x as i32 - *y as i32).abs())
        .max()
        .unwrap();
    assert!(worst <= 1, "{worst}");
}
