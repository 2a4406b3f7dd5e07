//! `lamella tolerance`: Monte Carlo yield and layer sensitivity.

use std::path::PathBuf;
use std::time::Instant;

use lamella::design::tolerance::{Stats, ToleranceSettings, tolerance};
use lamella::scene::Sigma;
use serde_json::{Value, json};

use super::color::ViewArgs;
use super::design_args::{Format, json_bytes};
use super::matching::point_json;
use super::{CliResult, Failure, load_scene, write_out};

/// Flags of `lamella tolerance`.
///
/// Every layer as written in the scene draws an independent Gaussian
/// thickness error (a layer in a repeat group carries the same error into
/// each period) and, with --sigma-n, an independent error in its real
/// index. The report gives ΔE00 from the nominal colour at each scene angle
/// (median, 95th percentile, maximum, yield within --limit) and overall
/// (each sample's worst angle). Sensitivity: each layer alone is moved by
/// +1σ and −1σ; its ΔE00 (worst angle, mean of the two) ranks the layers,
/// largest first (combined with the index effect when --sigma-n is given).
/// With a `coating` section the layers are the platelet's (each error shared
/// by every platelet of the batch) and the colour is judged at each of the
/// coating's geometries instead of angles (report key `geometries`).
#[derive(Debug, Clone, clap::Args)]
#[command(group(clap::ArgGroup::new("sigma").required(true).args(["sigma_nm", "sigma_pct"])))]
pub struct ToleranceArgs {
    /// Scene file (JSON).
    pub scene: PathBuf,
    /// Thickness σ of every layer in nm.
    #[arg(long)]
    pub sigma_nm: Option<f64>,
    /// Thickness σ of every layer in percent of its thickness.
    #[arg(long)]
    pub sigma_pct: Option<f64>,
    /// σ of every layer's real refractive index (absolute).
    #[arg(long, default_value_t = 0.0)]
    pub sigma_n: f64,
    /// Number of Monte Carlo samples.
    #[arg(long, default_value_t = 1000)]
    pub samples: usize,
    /// ΔE00 limit for the yield.
    #[arg(long, default_value_t = 1.0)]
    pub limit: f64,
    /// Seed of the random draws.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Report format.
    #[arg(long, value_enum, default_value = "json")]
    pub format: Format,
    #[command(flatten)]
    pub view: ViewArgs,
    /// Write the report here instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
}

fn stats_json(s: &Stats) -> Value {
    json!({
        "delta_e00_p50": s.p50, "delta_e00_p95": s.p95, "delta_e00_max": s.max,
        "yield": s.yield_fraction,
    })
}

/// Runs the command.
pub fn run(args: &ToleranceArgs) -> CliResult {
    let started = Instant::now();
    let scene = load_scene(&args.scene)?;
    let viewing = args.view.viewing(&scene, &args.scene)?;
    let thickness = match (args.sigma_nm, args.sigma_pct) {
        (Some(s), _) => Sigma::Nm(s),
        (_, Some(p)) => Sigma::Pct(p),
        _ => unreachable!("clap requires one of them"),
    };
    if !(args.limit >= 0.0) {
        return Err(Failure::input(format!(
            "--limit {}: must be ≥ 0",
            args.limit
        )));
    }
    let settings = ToleranceSettings {
        thickness,
        sigma_n: args.sigma_n,
        samples: args.samples,
        limit: args.limit,
        seed: args.seed,
    };
    let out = tolerance(&scene, &viewing, &settings)
        .map_err(|e| Failure::input(format!("{}: {e}", args.scene.display())))?;
    let mut report = stats_json(&out.overall);
    let obj = report.as_object_mut().expect("an object");
    obj.insert("limit_delta_e00".into(), json!(args.limit));
    obj.insert("samples".into(), json!(args.samples));
    obj.insert(
        "sigma".into(),
        match thickness {
            Sigma::Nm(s) => json!({"nm": s, "n": args.sigma_n}),
            Sigma::Pct(p) => json!({"pct": p, "n": args.sigma_n}),
        },
    );
    let coating = out.points.iter().any(|p| p.geometry().is_some());
    obj.insert(
        if coating { "geometries" } else { "angles" }.into(),
        out.points
            .iter()
            .zip(&out.per_point)
            .zip(&out.nominal_lab)
            .map(|((p, s), lab)| {
                let mut v = stats_json(s);
                let o = v.as_object_mut().expect("an object");
                o.extend(point_json(p));
                o.insert("nominal_lab".into(), json!(lab));
                v
            })
            .collect(),
    );
    obj.insert(
        "sensitivity".into(),
        out.sensitivity
            .iter()
            .enumerate()
            .map(|(rank, s)| {
                json!({
                    "rank": rank + 1,
                    "pointer": s.layer.pointer,
                    "material": s.layer.material,
                    "thickness_nm": s.layer.nominal_nm,
                    "sigma_nm": s.sigma_nm,
                    "delta_e00_per_sigma_thickness": s.delta_e00_thickness,
                    "delta_e00_per_sigma_index": s.delta_e00_index,
                })
            })
            .collect(),
    );
    obj.insert("seed".into(), json!(args.seed));
    obj.insert("wall_time_s".into(), json!(started.elapsed().as_secs_f64()));
    write_out(args.output.as_deref(), &[json_bytes(&report)])
}
