//! The 4×4 path against the 2×2 engine and against itself: an isotropic
//! 100-layer stack (`bench/irregular.json`, 401 wavelengths × 90 angles)
//! forced through the 4×4 path versus the 2×2 engine on the same grid, and
//! a 20-pitch chiral film versus a single pitch at the same slicing (the
//! slicing criterion picks the steps per pitch from the grid's most
//! demanding point, which both share). Both sides are timed in one run and
//! the ratios printed (fastest of a few runs each: the machine is shared).

use std::hint::black_box;
use std::time::Instant;

use lamella::optics::Rows;
use lamella::optics::aniso::Layer4;
use lamella::scene::Scene;

fn scene(text: &str) -> Scene {
    Scene::from_json(text, &|_: &str| Err("no tables".to_string())).expect("valid scene")
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

/// The scene's spectra through the 4×4 path, whatever its layers.
fn through_4x4(s: &Scene) -> f64 {
    let index = s.indices(&s.wavelengths_nm).unwrap();
    let stacks = s.realisations(&s.stack);
    let four = s
        .gridded(&index, &s.wavelengths_nm, &s.angles_deg)
        .expect("a coherent stack");
    let rows = Rows::new(&stacks, &index, &s.wavelengths_nm, &s.angles_deg).with_four(&four, true);
    fastest(3, || {
        black_box(rows.all());
    })
}

fn isotropic_100_layers() {
    let path = format!("{}/bench/irregular.json", env!("CARGO_MANIFEST_DIR"));
    let s = scene(&std::fs::read_to_string(path).expect("bench scene"));
    let two = fastest(5, || {
        black_box(s.spectra().unwrap());
    });
    let four = through_4x4(&s);
    println!(
        "isotropic 100 layers, 401 λ × 90 angles: 2×2 {two:.3} s, 4×4 {four:.3} s, ratio {:.1}× (target ≤ 8×)",
        four / two
    );
}

fn chiral(pitches: u32) -> Scene {
    scene(&format!(
        r#"{{"incident": "air",
            "materials": {{"lc": {{"uniaxial": {{"ordinary": {{"n": 1.5}}, "extraordinary": {{"n": 1.6}}}}}}}},
            "stack": [{{"material": "lc", "thickness_nm": {},
                        "helix": {{"pitch_nm": 350, "handedness": "left"}}}}],
            "substrate": "glass",
            "wavelengths_nm": {{"from": 380, "to": 780, "step": 1}},
            "angles_deg": {{"from": 0, "to": 89, "step": 1}}}}"#,
        350 * pitches
    ))
}

fn steps_per_pitch(s: &Scene) -> usize {
    let index = s.indices(&s.wavelengths_nm).unwrap();
    let four = s.gridded(&index, &s.wavelengths_nm, &s.angles_deg).unwrap();
    match four.stack.nodes[0] {
        Layer4::Helix {
            steps_per_pitch, ..
        } => steps_per_pitch,
        _ => unreachable!("the bench film is one helix"),
    }
}

fn chiral_20_pitches() {
    let (one, twenty) = (chiral(1), chiral(20));
    let steps = (steps_per_pitch(&one), steps_per_pitch(&twenty));
    let single = fastest(2, || {
        black_box(one.spectra().unwrap());
    });
    let many = fastest(2, || {
        black_box(twenty.spectra().unwrap());
    });
    println!(
        "chiral film, 401 λ × 90 angles, {} Magnus steps per pitch (single) / {} (20 pitches): 1 pitch {single:.2} s, 20 pitches {many:.2} s, ratio {:.2}× (target ≤ 3×)",
        steps.0,
        steps.1,
        many / single
    );
}

fn main() {
    isotropic_100_layers();
    chiral_20_pitches();
}
