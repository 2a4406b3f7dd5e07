//! `lamella sweep`: evaluate many designs over the `vary_nm` ranges, one
//! JSON line each.

use std::path::{Path, PathBuf};

use lamella::design::evaluator::Evaluator;
use lamella::design::sweep::{Plan, lines, shard};
use lamella::design::variables::varying;

use super::color::{AnalyzerArgs, ViewArgs};
use super::design_args::TargetArgs;
use super::{CliResult, Failure, load_scene, output};

/// Flags of `lamella sweep` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
#[command(group(clap::ArgGroup::new("plan").required(true).args(["samples", "grid"])))]
pub struct SweepArgs {
    /// Scene file (JSON).
    pub scene: PathBuf,
    /// Number of uniform random designs.
    #[arg(long)]
    pub samples: Option<u64>,
    /// Points per variable of a full grid (bounds included).
    #[arg(long)]
    pub grid: Option<usize>,
    #[command(flatten)]
    pub target: TargetArgs,
    /// Angle of incidence, degrees.
    #[arg(long, default_value_t = 0.0, allow_hyphen_values = true)]
    pub angle: f64,
    /// Seed of the random designs.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Evaluate only share I of N (1 ≤ I ≤ N), e.g. from a job-array index.
    #[arg(long, value_name = "I/N")]
    pub shard: Option<String>,
    #[command(flatten)]
    pub view: ViewArgs,
    #[command(flatten)]
    pub analyzer: AnalyzerArgs,
    /// Write the JSON lines here (atomically) instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: &SweepArgs) -> CliResult {
    let scene = load_scene(&args.scene)?;
    let mut viewing = args.view.viewing(&scene, &args.scene)?;
    args.analyzer.apply(&args.view, &mut viewing)?;
    let target = args.target.lab(&viewing, &scene.wavelengths_nm)?;
    let bad = |e: lamella::Error| Failure::scene(&args.scene, e);
    let vars = varying(&scene);
    if vars.is_empty() {
        return Err(Failure::input(format!(
            "{}: stack = (no vary_nm): mark the layers to sweep with \"vary_nm\": [low, high]",
            args.scene.display()
        )));
    }
    let plan = match (args.samples, args.grid) {
        (Some(samples), _) => Plan::Random {
            samples,
            seed: args.seed,
        },
        (_, Some(k)) => Plan::Grid(k),
        _ => unreachable!("clap requires one of them"),
    };
    let total = plan
        .count(vars.len())
        .map_err(|e| Failure::input(format!("--{e}")))?;
    let range = match &args.shard {
        None => 0..total,
        Some(s) => {
            let parsed = s
                .split_once('/')
                .and_then(|(i, n)| Some((i.trim().parse().ok()?, n.trim().parse().ok()?)));
            let (i, n) =
                parsed.ok_or_else(|| Failure::input(format!("--shard {s}: expected I/N")))?;
            shard(total, i, n).map_err(|e| Failure::input(format!("--{e}")))?
        }
    };
    if !(args.angle.abs() < 90.0) {
        return Err(Failure::input(format!(
            "--angle {}: must lie below 90°",
            args.angle
        )));
    }
    let eval = Evaluator::colour(&scene, vars, &[args.angle], &viewing).map_err(bad)?;
    // Streamed in batches so that a large sweep never sits in memory whole.
    let batch = 1 << 18;
    let out = args.output.as_deref();
    let mut failed = None;
    let written = output::emit_with(out, |w| {
        for start in range.clone().step_by(batch) {
            let end = (start + batch as u64).min(range.end);
            match lines(&eval, plan, start..end, target) {
                Ok(chunks) => chunks.iter().try_for_each(|c| w.write_all(c))?,
                Err(e) => {
                    failed = Some(e);
                    // Abandons the output file (never renamed into place).
                    return Err(std::io::Error::other("a colour is not finite"));
                }
            }
        }
        Ok(())
    });
    if let Some(e) = failed {
        return Err(bad(e));
    }
    written.map_err(|e| Failure::io(out.unwrap_or(Path::new("<stdout>")), e))
}
