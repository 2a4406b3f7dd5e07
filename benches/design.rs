//! Criterion: one evaluation of a five-layer design at a 5 nm grid (the unit
//! cost of match, tolerance and sweep).

use criterion::{Criterion, criterion_group, criterion_main};
use lamella::angle_colour::Viewing;
use lamella::design::evaluator::Evaluator;
use lamella::design::variables::varying;
use lamella::scene::Scene;

fn five_layer(c: &mut Criterion) {
    let text = include_str!("../bench/design_5layer.json");
    let scene = Scene::from_json(text, &|_| Err("no files".into())).unwrap();
    let viewing = Viewing::of_scene(&scene).unwrap();
    let eval = Evaluator::colour(&scene, varying(&scene), &[0.0], &viewing).unwrap();
    let mut ws = eval.workspace();
    let x = [85.0, 140.0, 62.0, 110.0, 150.0];
    c.bench_function("design_eval_5_layers_5nm_one_angle", |b| {
        b.iter(|| eval.eval_in(&mut ws, std::hint::black_box(&x), None, |o| o.xyz[0]))
    });
}

// No plots: the charts' font setup is not registered inside criterion.
criterion_group! {
    name = benches;
    config = Criterion::default().without_plots();
    targets = five_layer
}
criterion_main!(benches);
