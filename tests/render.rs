//! Preview renders: the physics check against `lamella color`, symmetry,
//! silhouette size, an OBJ cube's faces, and the command line.

use std::path::PathBuf;

mod common;

use common::{hit_sphere, lab_of, lamella};
use glam::{Vec2, Vec3};
use lamella::angle_colour::Viewing;
use lamella::colorimetry::{Colour, ColourOptions, delta_e2000};
use lamella::optics;
use lamella::render::{
    Base, Camera, Image, Light, Mesh, Preview, Settings, Source, View, builtin_mesh,
};
use lamella::scene::Scene;

fn data(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(name)
}

fn scene() -> Scene {
    let text = std::fs::read_to_string(data("render_film.json")).unwrap();
    Scene::from_json(&text, &|_: &str| Err("no tables".to_string())).unwrap()
}

/// A uniform white sky of intensity 1 only, a mirror film on a black base,
/// exposure 1 and no tone curve, viewed level from the front.
fn physics_settings(size: u32) -> Settings {
    Settings {
        width: size,
        height: size,
        ssaa: 1,
        exposure: 1.0,
        tone: false,
        roughness_deg: 0.0,
        base: Base::Black,
        lights: vec![Light {
            source: Source::Sky,
            intensity: 1.0,
            illuminant: None,
        }],
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

/// The sRGB that `lamella color` gives for the scene at each angle.
fn colour_at(scene: &Scene, angles: &[f64]) -> Vec<[f64; 3]> {
    let wl = &scene.wavelengths_nm;
    let spectra = optics::compute(
        &scene.realisations(&scene.stack),
        &scene.indices(wl).unwrap(),
        wl,
        angles,
    );
    let viewing = Viewing::of_scene(scene).unwrap();
    let weights = viewing.weights(wl).unwrap();
    (0..angles.len())
        .map(|a| {
            let r: Vec<f64> = spectra.at_angle(a).iter().map(|x| x.r()).collect();
            Colour::new(weights.xyz(&r), weights.white(), &ColourOptions::default()).rgb
        })
        .collect()
}

/// Physics check: in a uniform white (D65) sky of intensity 1 with a
/// mirror-smooth film over a black base, exposure 1 and no tone curve, the
/// radiance toward the eye is the sky's times the film's reflectance R(θ)
/// at the angle θ between the surface normal and the view direction (the
/// mirror reflects one sky direction, and the sky is the same everywhere).
/// So the pixel has the colour that `lamella color` reports at θ, to within
/// ΔE00 ≤ 1 (CIEDE2000, CIE 015:2018) — the rest is tessellation, table
/// interpolation and 8-bit rounding.
#[test]
fn mirror_film_in_a_white_sky_shows_the_colour_of_lamella_color_at_each_angle() {
    let scene = scene();
    let mesh = Mesh::sphere();
    let settings = physics_settings(96);
    let preview = Preview::new(&scene, &mesh, &settings).unwrap();
    let image = preview.render(0, &|_| {});
    let camera = Camera::new(&preview.view(0), 96, 96);
    let mut samples = Vec::new();
    for y in 0..96 {
        for x in 0..96 {
            let dir = camera.ray(Vec2::new(x as f32 + 0.5, y as f32 + 0.5));
            if let Some(p) = hit_sphere(camera.eye, dir) {
                let theta = p.normalize().dot(-dir).clamp(0.0, 1.0).acos().to_degrees() as f64;
                if theta <= 80.0 {
                    samples.push((x, y, theta));
                }
            }
        }
    }
    assert!(samples.len() > 4000, "{}", samples.len());
    let angles: Vec<f64> = samples.iter().map(|s| s.2).collect();
    let expected = colour_at(&scene, &angles);
    let mut worst = (0.0, 0.0);
    for ((x, y, theta), want) in samples.iter().zip(&expected) {
        let de = delta_e2000(bytes_lab(pixel(&image, *x, *y)), lab_of(*want));
        if de > worst.0 {
            worst = (de, *theta);
        }
    }
    assert!(worst.0 <= 1.0, "ΔE00 {} at θ = {}°", worst.0, worst.1);
    // The film's colour does travel over these angles, so the check has teeth.
    let travel = delta_e2000(lab_of(expected[0]), lab_of(colour_at(&scene, &[70.0])[0]));
    assert!(travel > 10.0, "{travel}");
}

fn symmetric_settings() -> Settings {
    Settings {
        width: 80,
        height: 80,
        ssaa: 2,
        roughness_deg: 6.0,
        base: "#4080c0".parse().unwrap(),
        lights: vec![
            "sky,intensity=0.5".parse().unwrap(),
            "area,azimuth_deg=0,elevation_deg=35,size_deg=20,intensity=2,illuminant=A"
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
    }
}

#[test]
fn symmetric_shapes_under_symmetric_light_give_mirror_symmetric_images() {
    let scene = scene();
    let settings = symmetric_settings();
    for shape in ["sphere", "cylinder", "torus", "bottle"] {
        let mesh = builtin_mesh(&shape.parse().unwrap()).unwrap();
        let image = Preview::new(&scene, &mesh, &settings)
            .unwrap()
            .render(0, &|_| {});
        let (mut worst, mut total, mut count) = (0i32, 0i64, 0i64);
        for y in 0..80 {
            for x in 0..40 {
                let (a, b) = (pixel(&image, x, y), pixel(&image, 79 - x, y));
                for c in 0..3 {
                    let d = (a[c] as i32 - b[c] as i32).abs();
                    worst = worst.max(d);
                    total += d as i64;
                    count += 1;
                }
            }
        }
        // Mirror-image meshes rasterize the same up to sample ties on edges.
        assert!(worst <= 3, "{shape}: channel differs by {worst}");
        assert!((total as f64 / count as f64) < 0.05, "{shape}");
    }
}

#[test]
fn sphere_silhouette_matches_its_projected_radius() {
    let scene = scene();
    let mesh = Mesh::sphere();
    let settings = Settings {
        width: 160,
        height: 120,
        ssaa: 4,
        ..physics_settings(0)
    };
    let preview = Preview::new(&scene, &mesh, &settings).unwrap();
    let image = preview.render(0, &|_| {});
    let radius = Camera::new(&preview.view(0), 160, 120).sphere_radius_px(1.0);
    let area: f32 = image.coverage.iter().sum();
    let from_area = (area / std::f32::consts::PI).sqrt();
    assert!((from_area - radius).abs() < 1.0, "{from_area} vs {radius}");
    // Width of the middle rows.
    let row = |y: usize| -> f32 { image.coverage[y * 160..(y + 1) * 160].iter().sum() };
    let mid = 0.5 * (row(59) + row(60));
    assert!(
        (mid - 2.0 * radius).abs() < 1.0,
        "{mid} vs {}",
        2.0 * radius
    );
    // Centred.
    let cx: f32 = image
        .coverage
        .iter()
        .enumerate()
        .map(|(i, c)| c * ((i % 160) as f32 + 0.5))
        .sum::<f32>()
        / area;
    assert!((cx - 80.0).abs() < 0.1, "{cx}");
}

/// Slab intersection of a ray with the cube [−s, s]³: the face's outward
/// normal and the distance, if it is hit.
fn hit_cube(eye: Vec3, dir: Vec3, s: f32) -> Option<Vec3> {
    let (mut near, mut far, mut normal) = (f32::NEG_INFINITY, f32::INFINITY, Vec3::ZERO);
    for axis in 0..3 {
        let (o, d) = (eye[axis], dir[axis]);
        let (t1, t2) = ((-s - o) / d, (s - o) / d);
        let (lo, hi) = (t1.min(t2), t1.max(t2));
        if lo > near {
            near = lo;
            normal = Vec3::ZERO;
            normal[axis] = if t1 < t2 { -1.0 } else { 1.0 };
        }
        far = far.min(hi);
    }
    (near <= far && near > 0.0).then_some(normal)
}

/// A cube read from OBJ text (no normals) seen from a corner: every pixel
/// well inside a face shows that face's mirror colour in the white sky (the
/// face the ray meets first, whose normal gives θ), and pixels off the cube
/// show the backdrop. Hidden faces would show other angles.
#[test]
fn obj_cube_renders_the_faces_it_should() {
    let scene = scene();
    let text = std::fs::read(data("cube.obj")).unwrap();
    let mesh = Mesh::from_obj("cube.obj", &text).unwrap();
    let settings = Settings {
        view: View {
            orbit_deg: 35.0,
            elevation_deg: 25.0,
            fov_deg: 30.0,
            distance: None,
        },
        ..physics_settings(64)
    };
    let preview = Preview::new(&scene, &mesh, &settings).unwrap();
    let image = preview.render(0, &|_| {});
    let camera = Camera::new(&preview.view(0), 64, 64);
    let half = 1.0 / 3f32.sqrt(); // framed: corners at distance 1
    let face = |x: f32, y: f32| hit_cube(camera.eye, camera.ray(Vec2::new(x, y)), half);
    let (mut checked, mut faces) = (0, Vec::new());
    for y in 0..64 {
        for x in 0..64 {
            let (cx, cy) = (x as f32 + 0.5, y as f32 + 0.5);
            let here = face(cx, cy);
            let steady = [(-1.0, 0.0), (1.0, 0.0), (0.0, -1.0), (0.0, 1.0)]
                .iter()
                .all(|(dx, dy)| face(cx + dx, cy + dy) == here);
            if !steady {
                continue;
            }
            match here {
                None => assert_eq!(image.coverage[y * 64 + x], 0.0),
                Some(n) => {
                    let dir = camera.ray(Vec2::new(cx, cy));
                    let theta = n.dot(-dir).acos().to_degrees() as f64;
                    let want = colour_at(&scene, &[theta])[0];
                    let de = delta_e2000(bytes_lab(pixel(&image, x, y)), lab_of(want));
                    assert!(de <= 1.0, "({x}, {y}) face {n}: ΔE00 {de}");
                    checked += 1;
                    if !faces.contains(&n) {
                        faces.push(n);
                    }
                }
            }
        }
    }
    assert_eq!(faces.len(), 3, "{faces:?}");
    assert!(checked > 800, "{checked}");
}

fn temp(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("lamella-render-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

#[test]
fn cli_writes_pngs_and_turntable_frames() {
    let scene = data("render_film.json");
    let out = temp("bottle.png");
    let o = lamella(&[
        "render",
        scene.to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
        "--shape",
        "bottle",
        "--size",
        "48x40",
        "--ssaa",
        "1",
        "--base",
        "white",
        "--roughness",
        "10",
        "--light",
        "sky,intensity=0.4",
        "--light",
        "area,azimuth_deg=-30,elevation_deg=20,size_deg=15,illuminant=D50",
        "--orbit",
        "-20",
        "--elevation",
        "-10",
        "--tone",
        "off",
        "--exposure",
        "1.3",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let png = std::fs::read(&out).unwrap();
    assert_eq!(&png[1..4], b"PNG");
    // IHDR width and height, big-endian.
    assert_eq!(&png[16..24], &[0, 0, 0, 48, 0, 0, 0, 40]);

    let frames = temp("spin.png");
    let mesh = data("cube.obj");
    let o = lamella(&[
        "render",
        scene.to_str().unwrap(),
        "-o",
        frames.to_str().unwrap(),
        "--shape",
        &format!("mesh:{}", mesh.display()),
        "--size",
        "24x24",
        "--turntable",
        "3",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    for i in 0..3 {
        assert!(temp(&format!("spin-00{i}.png")).exists());
    }
}

#[test]
fn cli_refuses_bad_input_with_exit_code_2() {
    let scene = data("render_film.json");
    let s = scene.to_str().unwrap();
    let out = temp("never.png");
    let o = out.to_str().unwrap();
    for (args, needle) in [
        (vec!["--shape", "cube"], "shape"),
        (vec!["--size", "12"], "size"),
        (vec!["--ssaa", "0"], "ssaa"),
        (vec!["--base", "#12345"], "base"),
        (vec!["--light", "lamp"], "light"),
        (vec!["--light", "area,colour=red"], "colour"),
        (vec!["--light", "sky,illuminant=Z9"], "Z9"),
        (vec!["--roughness", "90"], "roughness_deg"),
        (vec!["--distance", "0.5"], "distance"),
        (
            vec!["--shape", "mesh:/nonexistent/x.obj"],
            "cannot read mesh",
        ),
    ] {
        let mut all = vec!["render", s, "-o", o];
        all.extend(args);
        let r = lamella(&all);
        let err = String::from_utf8_lossy(&r.stderr);
        assert_eq!(r.status.code(), Some(2), "{all:?}: {err}");
        assert!(err.contains(needle), "{all:?}: {err}");
        assert_eq!(err.lines().count(), 1, "{err}");
    }
    assert!(!out.exists());
    // Unknown keys in the scene's preview object.
    let bad = temp("bad_preview.json");
    let mut doc: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&scene).unwrap()).unwrap();
    doc["preview"] = serde_json::json!({"shape": "sphere", "zoom": 2});
    std::fs::write(&bad, doc.to_string()).unwrap();
    let r = lamella(&["render", bad.to_str().unwrap(), "-o", o]);
    let err = String::from_utf8_lossy(&r.stderr);
    assert_eq!(r.status.code(), Some(2), "{err}");
    assert!(err.contains("preview.zoom"), "{err}");
}
