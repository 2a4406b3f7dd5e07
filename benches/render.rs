//! Preview renders, 1024 × 1024 with 2 × 2 supersampling on a bottle: the
//! studio environment with a floor and its contact shadow against today's
//! sky-only lighting of the same scene, and each against the layer count
//! (`bench/render_100layers.json` against `bench/render_2layers.json`).
//! Every side is timed in one run (table building and rendering, fastest of
//! three: the machine is shared) and the ratios printed. Targets: studio
//! with floor at most 4× sky only; 100 layers at most 2× 2 layers.

use std::hint::black_box;
use std::time::Instant;

use lamella::render::{Mesh, Preview, Settings, Source};
use lamella::scene::Scene;

fn scene(path: &str) -> Scene {
    let text = std::fs::read_to_string(path).expect("bench scene");
    Scene::from_json(&text, &|_: &str| Err("no tables".to_string())).expect("valid scene")
}

/// Fastest wall time of `f` over `n` runs, in seconds.
fn fastest(n: usize, mut f: impl FnMut()) -> f64 {
    (0..n)
        .map(|_| {
            let start = Instant::now();
            f();
            start.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

fn main() {
    let base = Settings {
        width: 1024,
        height: 1024,
        ssaa: 2,
        roughness_deg: 4.0,
        ..Settings::default()
    };
    let sky = Settings {
        lights: base
            .lights
            .iter()
            .filter(|l| l.source == Source::Sky)
            .cloned()
            .collect(),
        ..base.clone()
    };
    let studio = Settings {
        lights: Vec::new(),
        environment: Some(lamella::render::Environment::Procedural(
            "studio".parse().expect("built in"),
        )),
        floor: Some(0.5),
        shadow: true,
        ..base
    };
    let mesh = Mesh::bottle();
    let mut times = Vec::new();
    for path in ["bench/render_2layers.json", "bench/render_100layers.json"] {
        let scene = scene(path);
        for settings in [&sky, &studio] {
            let t = fastest(3, || {
                let preview = Preview::new(&scene, &mesh, settings).expect("renders");
                black_box(preview.render(0, &|_| {}));
            });
            times.push(t);
        }
    }
    let [sky2, studio2, sky100, studio100] = times[..] else {
        unreachable!("four timings")
    };
    println!("render 1024x1024 ssaa 2x2, bottle, roughness 4°:");
    println!("  2 layers:   sky only {sky2:.3} s   studio + floor + shadow {studio2:.3} s");
    println!("  100 layers: sky only {sky100:.3} s   studio + floor + shadow {studio100:.3} s");
    println!(
        "ratio studio+floor / sky only: {:.2} (2 layers), {:.2} (100 layers)  (target <= 4)",
        studio2 / sky2,
        studio100 / sky100
    );
    println!(
        "ratio 100 / 2 layers: {:.2} (sky only), {:.2} (studio + floor)  (target <= 2)",
        sky100 / sky2,
        studio100 / studio2
    );
}
