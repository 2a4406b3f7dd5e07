//! `lamella serve`: the server time of a slider move on a 20-layer design
//! (401 wavelengths × 16 angles): the live answer with the colour per
//! angle, the strip with its swatches and the a*b* chart, against the page's
//! 50 ms budget. The thickness of the first free layer is swept across its
//! bounds as a drag would, one request after another; the server reports
//! its own time (`server_ms`), and the round trip is timed here.

#[path = "../tests/common/served.rs"]
mod served;

use std::path::Path;
use std::time::Instant;

use serde_json::json;

/// The page's budget for a slider move, ms of server time.
const BUDGET_MS: f64 = 50.0;

fn percentile(sorted: &[f64], p: f64) -> f64 {
    sorted[((sorted.len() - 1) as f64 * p).round() as usize]
}

fn main() {
    let scene = Path::new(env!("CARGO_MANIFEST_DIR")).join("bench/serve_20layers.json");
    let mut doc: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&scene).unwrap()).unwrap();
    let server = served::Served::start(
        Path::new(env!("CARGO_BIN_EXE_lamella")),
        &[scene.to_str().unwrap()],
    );
    let (low, high) = (
        doc["stack"][0]["vary_nm"][0].as_f64().unwrap(),
        doc["stack"][0]["vary_nm"][1].as_f64().unwrap(),
    );
    let mut move_to = |t: f64| {
        doc["stack"][0]["thickness_nm"] = json!(t);
        let started = Instant::now();
        // As the page asks while a slider moves: the strip at the width shown.
        let r = server.post(
            "/api/live",
            &json!({"scene": doc, "target": {"hex": "#2A9D8F"}, "strip_width": 820}),
        );
        let round = started.elapsed().as_secs_f64() * 1e3;
        assert_eq!(r.status, 200, "{}", String::from_utf8_lossy(&r.body));
        (r.json()["server_ms"].as_f64().unwrap(), round)
    };
    for t in [low, high, low] {
        move_to(t);
    }
    let steps = 60;
    let (mut server_ms, mut round_ms) = (Vec::new(), Vec::new());
    for i in 0..steps {
        let (s, r) = move_to(low + (high - low) * i as f64 / (steps - 1) as f64);
        server_ms.push(s);
        round_ms.push(r);
    }
    server_ms.sort_by(f64::total_cmp);
    round_ms.sort_by(f64::total_cmp);
    let median = percentile(&server_ms, 0.5);
    println!(
        "serve: slider move on 20 layers, 401 λ × 16 angles ({steps} moves): server time median \
         {median:.1} ms, 90th percentile {:.1} ms, best {:.1} ms; round trip median {:.1} ms",
        percentile(&server_ms, 0.9),
        server_ms[0],
        percentile(&round_ms, 0.5),
    );
    println!(
        "serve: median / {BUDGET_MS} ms budget = {:.2} (best / budget = {:.2})",
        median / BUDGET_MS,
        server_ms[0] / BUDGET_MS
    );
}
