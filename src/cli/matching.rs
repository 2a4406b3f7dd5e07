//! `lamella match`: optimise the `vary_nm` thicknesses toward a target colour
//! (at angles for a film, at geometries for a coating's platelet).

use std::path::PathBuf;
use std::time::Instant;

use lamella::design::coating::At;
use lamella::design::matching::{
    Goal, MIN_GAIN_DELTA_E, MatchOutcome, MatchSettings, REACHABLE_DELTA_E, match_colour,
};
use lamella::design::report::match_report;
use lamella::design::search::Budget;
use lamella::design::variables::edited_document;
use serde_json::{Value, json};

use super::color::{AnalyzerArgs, ViewArgs};
use super::design_args::{Format, Progress, TargetArgs, json_bytes, parse_lab};
use super::{CliResult, Failure, load_scene, write_out};

/// Flags of `lamella match` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct MatchArgs {
    /// Scene file (JSON); layers with `vary_nm: [low, high]` are optimised
    /// (a layer in a repeat group is one variable for all its periods). With
    /// a `coating` section, the platelet's `vary_nm` layers are optimised and
    /// targets are given at geometries (--geometry, GEOMETRY:L,a,b goals),
    /// the colour being that of the coating's reflectance factor there.
    pub scene: PathBuf,
    #[command(flatten)]
    pub target: TargetArgs,
    /// Angle of incidence of the main target, degrees (films). [default: 0]
    #[arg(long, allow_hyphen_values = true, conflicts_with = "geometry")]
    pub angle: Option<f64>,
    /// Geometry of the main target (coatings): ILLUMINATIONasASPECULAR, e.g.
    /// 45as15 (illumination 45° from the normal, detection 15° from the
    /// specular direction toward the normal).
    #[arg(long, allow_hyphen_values = true)]
    pub geometry: Option<String>,
    /// A further target `ANGLE:L,a,b` (films) or `GEOMETRY:L,a,b` (coatings,
    /// e.g. 45as110:40,5,20), repeatable, to shape the colour travel.
    #[arg(
        long = "goal",
        value_name = "ANGLE|GEOMETRY:L,a,b",
        allow_hyphen_values = true
    )]
    pub goals: Vec<String>,
    /// Upper limit on the total physical thickness of the stack (or of the
    /// coating's platelet), nm.
    #[arg(long)]
    pub max_total_nm: Option<f64>,
    /// Pull toward bright reflectance: adds W·(1 − Y/100) at the main target
    /// to the cost, in ΔE00 units (0 = colour only).
    #[arg(long, default_value_t = 0.0)]
    pub brightness_weight: f64,
    /// Seed of the search (same seed, same result).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Most design evaluations (the search usually stops well before; see
    /// below).
    #[arg(long, default_value_t = 60_000)]
    pub max_evals: usize,
    /// Write the scene with the optimised thicknesses here (atomically).
    #[arg(long, value_name = "FILE")]
    pub out_scene: PathBuf,
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
pub fn run(args: &MatchArgs) -> CliResult {
    let started = Instant::now();
    let scene = load_scene(&args.scene)?;
    let mut viewing = args.view.viewing(&scene, &args.scene)?;
    args.analyzer.apply(&args.view, &mut viewing)?;
    let lab = args
        .target
        .lab(&viewing, &scene.wavelengths_nm)?
        .ok_or_else(|| Failure::input("give --target-lab L,a,b or --target-hex #RRGGBB"))?;
    let main = main_point(&scene, args.geometry.as_deref(), args.angle)?;
    let mut goals = vec![Goal { at: main, lab }];
    for g in &args.goals {
        let bad = |why: String| Failure::input(format!("--goal {g}: {why}"));
        let (at, lab) = g
            .split_once(':')
            .ok_or_else(|| bad("expected ANGLE:L,a,b or GEOMETRY:L,a,b".into()))?;
        let at = if at.contains("as") {
            geometry(at, "--goal")?
        } else {
            At::Angle(
                at.trim()
                    .parse::<f64>()
                    .map_err(|_| bad(format!("`{at}` is not an angle or a geometry")))?,
            )
        };
        goals.push(Goal {
            at,
            lab: parse_lab(lab).map_err(bad)?,
        });
    }
    if let Some(l) = args.max_total_nm.filter(|l| !(*l > 0.0)) {
        return Err(Failure::input(format!(
            "--max-total-nm {l}: must be greater than zero"
        )));
    }
    if !args.brightness_weight.is_finite() || args.brightness_weight < 0.0 {
        return Err(Failure::input(
            "--brightness-weight: must be a finite number ≥ 0",
        ));
    }
    if args.max_evals == 0 {
        return Err(Failure::input("--max-evals 0: must be at least 1"));
    }
    let settings = MatchSettings {
        goals,
        max_total_nm: args.max_total_nm,
        brightness_weight: args.brightness_weight,
        budget: budget(args.max_evals, args.seed),
    };
    let bar = Progress::new(settings.budget.max_evals as u64, "match");
    let bad = |e: lamella::Error| match e {
        lamella::Error::Invalid { key, value, why } if key == "max_total_nm" => {
            Failure::input(format!("--max-total-nm {value}: {why}"))
        }
        e => Failure::scene(&args.scene, e),
    };
    let out = match_colour(&scene, &viewing, &settings, &|n, best| {
        bar.set(n as u64, format!("cost {best:.3}"))
    })
    .map_err(bad)?;
    bar.finish();
    let doc = edited_document(&scene.document, &out.variables, &out.thicknesses_nm).map_err(bad)?;
    write_out(Some(&args.out_scene), &[json_bytes(&doc)])?;
    let report = report(&out, args, started.elapsed().as_secs_f64());
    write_out(args.output.as_deref(), &[json_bytes(&report)])?;
    if out.reachable {
        return Ok(());
    }
    let worst = out
        .goals
        .iter()
        .max_by(|a, b| a.delta_e00.total_cmp(&b.delta_e00))
        .expect("at least one goal");
    let why = if worst.delta_e00 > REACHABLE_DELTA_E {
        format!(
            "closest ΔE00 {:.3} at {}",
            worst.delta_e00,
            worst.goal.at.describe()
        )
    } else {
        format!(
            "the closest design is {:.1} nm thick, over --max-total-nm",
            out.total_nm
        )
    };
    Err(Failure {
        message: format!(
            "target not reached: {why} (stopped: {}; design and report written)",
            out.stopped.name()
        ),
        code: 3,
    })
}

/// Where the main target is: at `geometry` (coatings, which need one) or
/// at `angle` (films; default normal incidence).
pub fn main_point(
    scene: &lamella::scene::Scene,
    geometry_name: Option<&str>,
    angle: Option<f64>,
) -> Result<At, Failure> {
    match (geometry_name, angle) {
        (Some(g), _) => geometry(g, "--geometry"),
        (None, _) if scene.coating.is_some() => Err(Failure::input(
            "this scene has a coating: give the target's geometry with --geometry (e.g. 45as15)",
        )),
        (None, a) => Ok(At::Angle(a.unwrap_or(0.0))),
    }
}

/// The search budget of `lamella match` for `max_evals` evaluations and `seed`.
pub fn budget(max_evals: usize, seed: u64) -> Budget {
    Budget {
        max_evals,
        good_enough: 0.03,
        handover: 0.5,
        min_gain: MIN_GAIN_DELTA_E,
        seed,
    }
}

/// One geometry name (`45as15`) as a point.
fn geometry(name: &str, flag: &str) -> Result<At, Failure> {
    match lamella::pigment::parse_name(name, flag)
        .map_err(|e| Failure::input(e.to_string()))?
        .as_slice()
    {
        [g] => Ok(At::Geometry(g.clone())),
        _ => Err(Failure::input(format!(
            "{flag} {name}: expected one geometry such as 45as15, not a set"
        ))),
    }
}

fn report(out: &MatchOutcome, args: &MatchArgs, wall: f64) -> Value {
    let mut m = serde_json::Map::new();
    m.insert("scene".into(), json!(args.scene.display().to_string()));
    m.insert(
        "out_scene".into(),
        json!(args.out_scene.display().to_string()),
    );
    m.extend(match_report(out));
    m.insert("max_evals".into(), json!(args.max_evals));
    m.insert("wall_time_s".into(), json!(wall));
    m.insert("seed".into(), json!(args.seed));
    Value::Object(m)
}
