//! Engine benchmarks: the two bench scenes of `bench/` through the library
//! (no process start, no output formatting), and the cost of colour for every
//! angle on top of the spectrum.

use std::hint::black_box;
use std::time::Instant;

use criterion::{Criterion, criterion_group};
use lamella::angle_colour::{Viewing, angle_colours};
use lamella::scene::Scene;

fn load(name: &str) -> Scene {
    let path = format!("{}/bench/{name}.json", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path).expect("bench scene");
    Scene::from_json(&text, &|_: &str| Err("no tables".to_string())).expect("valid scene")
}

fn engine(c: &mut Criterion) {
    let mut group = c.benchmark_group("spectrum 401 wavelengths x 90 angles");
    group.sample_size(20);
    for name in ["periodic", "irregular"] {
        let scene = load(name);
        group.bench_function(name, |b| b.iter(|| black_box(scene.spectra().unwrap())));
    }
    group.finish();
}

fn colour(c: &mut Criterion) {
    let scene = load("periodic");
    let viewing = Viewing::of_scene(&scene).unwrap();
    let spectra = scene.spectra().unwrap();
    c.bench_function("colour for 90 angles of a 401-point spectrum", |b| {
        b.iter(|| black_box(angle_colours(&spectra, &viewing).unwrap()))
    });
}

/// Fastest wall time of `f` over `n` runs, in seconds (the least disturbed
/// by other work on the machine).
fn fastest(n: usize, mut f: impl FnMut()) -> f64 {
    (0..n)
        .map(|_| {
            let start = Instant::now();
            f();
            start.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

/// Prints the cost of colour for every angle relative to the spectrum, for
/// both bench scenes.
fn colour_overhead_ratio() {
    for name in ["periodic", "irregular"] {
        let scene = load(name);
        let viewing = Viewing::of_scene(&scene).unwrap();
        let spectra = scene.spectra().unwrap();
        let spectrum = fastest(31, || {
            black_box(scene.spectra().unwrap());
        });
        let colour = fastest(31, || {
            black_box(angle_colours(&spectra, &viewing).unwrap());
        });
        println!(
            "{name}: colour for every angle costs {:.1} % on top of the spectrum",
            100.0 * colour / spectrum
        );
    }
}

// No plots: the charts' font setup is not registered inside criterion.
criterion_group! {
    name = benches;
    config = Criterion::default().without_plots();
    targets = engine, colour
}

fn main() {
    benches();
    criterion::Criterion::default()
        .configure_from_args()
        .final_summary();
    colour_overhead_ratio();
}
