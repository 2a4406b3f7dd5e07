//! `lamella tolerance`: Monte Carlo yield and layer sensitivity.

use std::path::PathBuf;
use std::time::Instant;

use lamella::design::coating::At;
use lamella::design::report::tolerance_report;
use lamella::design::tolerance::{ToleranceSettings, tolerance};
use lamella::scene::Sigma;
use serde_json::{Value, json};

use super::color::{AnalyzerArgs, ViewArgs};
use super::design_args::{Format, json_bytes};
use super::{CliResult, Failure, load_scene, write_out};

/// Flags of `lamella tolerance` (the command is described in `cli::args`).
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
    /// Every deposited layer draws its own errors: each period of a repeat
    /// group independently (run-to-run scatter), instead of one error per
    /// layer as written shared by all its periods (a recipe offset).
    #[arg(long)]
    pub per_period: bool,
    /// Only these scene angles (comma-separated degrees, each on the scene's
    /// angle grid) count toward the overall statistics, the yield and the
    /// sensitivity; every angle is still reported. [default: all]
    #[arg(
        long,
        value_name = "DEG,DEG,...",
        allow_hyphen_values = true,
        conflicts_with = "yield_geometries"
    )]
    pub yield_angles: Option<String>,
    /// Coatings: only these of the coating's geometries (comma-separated
    /// names such as 45as15,45as45) count toward the yield. [default: all]
    #[arg(long, value_name = "NAME,NAME,...")]
    pub yield_geometries: Option<String>,
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
    #[command(flatten)]
    pub analyzer: AnalyzerArgs,
    /// Write the report here instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: &ToleranceArgs) -> CliResult {
    let started = Instant::now();
    let scene = load_scene(&args.scene)?;
    let mut viewing = args.view.viewing(&scene, &args.scene)?;
    args.analyzer.apply(&args.view, &mut viewing)?;
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
    let coating = scene.document.get("coating").is_some();
    let yield_at = match (&args.yield_angles, &args.yield_geometries) {
        (Some(_), _) if coating => {
            return Err(Failure::input(
                "--yield-angles: this scene has a coating: choose geometries with --yield-geometries",
            ));
        }
        (_, Some(_)) if !coating => {
            return Err(Failure::input(
                "--yield-geometries: needs a scene with a `coating` section; choose angles with --yield-angles",
            ));
        }
        (Some(list), _) => list
            .split(',')
            .map(|a| {
                a.trim()
                    .parse::<f64>()
                    .ok()
                    .filter(|a| a.is_finite())
                    .map(At::Angle)
                    .ok_or_else(|| {
                        Failure::input(format!("--yield-angles {list}: `{a}` is not an angle"))
                    })
            })
            .collect::<Result<Vec<_>, _>>()?,
        (_, Some(list)) => list
            .split(',')
            .map(|g| match lamella::pigment::parse_name(g, "--yield-geometries") {
                Ok(mut one) if one.len() == 1 => Ok(At::Geometry(one.remove(0))),
                Ok(_) => Err(Failure::input(format!(
                    "--yield-geometries {list}: `{g}` is a set; list single geometries such as 45as15"
                ))),
                Err(e) => Err(Failure::input(e.to_string())),
            })
            .collect::<Result<Vec<_>, _>>()?,
        (None, None) => Vec::new(),
    };
    let settings = ToleranceSettings {
        thickness,
        sigma_n: args.sigma_n,
        per_period: args.per_period,
        yield_at,
        samples: args.samples,
        limit: args.limit,
        seed: args.seed,
    };
    let out = tolerance(&scene, &viewing, &settings).map_err(|e| match e {
        lamella::Error::Invalid { key, value, why } if key.starts_with("yield_") => {
            Failure::input(format!("--{} {value}: {why}", key.replace('_', "-")))
        }
        lamella::Error::Invalid { key, value, why } if key == "per_period" => {
            Failure::input(format!("--per-period: {value}: {why}"))
        }
        e => Failure::scene(&args.scene, e),
    })?;
    let mut report = tolerance_report(&out, &settings);
    report.insert("seed".into(), json!(args.seed));
    report.insert("wall_time_s".into(), json!(started.elapsed().as_secs_f64()));
    write_out(
        args.output.as_deref(),
        &[json_bytes(&Value::Object(report))],
    )
}
