//! `lamella fit`: fit the `vary_nm` thicknesses to a measured reflectance
//! spectrum, or a coating's platelet to measured reflectance factors.

use std::path::PathBuf;
use std::time::Instant;

use lamella::chart::FitChart;
use lamella::design::fit::{FitSettings, fit};
use lamella::design::report::fit_report;
use lamella::design::search::Budget;
use lamella::design::variables::edited_document;
use lamella::measured::{Quantity, ReadOptions};
use serde_json::{Value, json};

use super::chart::format_of;
use super::design_args::{Format, json_bytes};
use super::measured::read_file;
use super::{CliResult, Failure, load_scene, write_out};

/// Flags of `lamella fit` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct FitArgs {
    /// Scene file (JSON); layers with `vary_nm: [low, high]` are fitted (with
    /// a `coating` section, the platelet's).
    pub scene: PathBuf,
    /// Measured unpolarized reflectance: a table with a header naming a
    /// wavelength column and an R column (R as a fraction unless the header
    /// says percent, e.g. `R (%)`, or --percent is given; a fraction above
    /// 1.5 is refused as percent), optionally `angle_deg`, or one column per
    /// angle (`R@0,R@45`); or a CGATS file. For a coating, a `geometry`
    /// column (names such as 45as15) instead, and R the reflectance factor:
    /// 1 is the perfect white diffuser (Y = 100 in `multiangle`). Accepted
    /// forms: see the README, "Measured data".
    #[arg(long, value_name = "FILE")]
    pub measured: PathBuf,
    /// The measured values are in percent whatever the header says.
    #[arg(long)]
    pub percent: bool,
    /// Angle of incidence of rows without an `angle_deg` column, degrees.
    #[arg(long, default_value_t = 0.0, allow_hyphen_values = true)]
    pub angle: f64,
    /// Also fit a multiplicative intensity scale on the model reflectance.
    #[arg(long)]
    pub scale: bool,
    /// Seed of the global search.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Most model evaluations in the global search (which also ends when a
    /// restart no longer lowers the rms residual by 1e-5).
    #[arg(long, default_value_t = 20_000)]
    pub max_evals: usize,
    /// Write the scene with the fitted thicknesses here (atomically).
    #[arg(long, value_name = "FILE")]
    pub out_scene: PathBuf,
    /// Report format.
    #[arg(long, value_enum, default_value = "json")]
    pub format: Format,
    /// Write the report here instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
    /// Also draw measured against fitted spectra with their residuals
    /// (a panel pair per angle or geometry) into this file, PNG or SVG by
    /// its extension; the report names it under `chart`.
    #[arg(long, value_name = "FILE")]
    pub chart: Option<PathBuf>,
    /// Size of the --chart in pixels, WIDTHxHEIGHT (default 1200x800 for up
    /// to three panel pairs, taller for more rows).
    #[arg(long, value_parser = super::chart::parse_size, requires = "chart")]
    pub chart_size: Option<(u32, u32)>,
}

/// Runs the command.
pub fn run(args: &FitArgs) -> CliResult {
    let started = Instant::now();
    let chart_format = args.chart.as_deref().map(format_of).transpose()?;
    let scene = load_scene(&args.scene)?;
    let reading = read_file(
        &args.measured,
        &ReadOptions {
            default_angle_deg: args.angle,
            percent: args.percent,
        },
    )?;
    if reading.quantity != Quantity::Reflectance {
        return Err(Failure::input(format!(
            "{}: {} = transmittance: fit works on reflectance (an R column)",
            args.measured.display(),
            reading.quantity.symbol()
        )));
    }
    let measured = reading.groups;
    if args.chart.is_some() {
        FitChart::check(&measured)
            .map_err(|e| Failure::input(format!("{}: {e}", args.measured.display())))?;
    }
    let settings = FitSettings {
        fit_scale: args.scale,
        budget: Budget {
            max_evals: args.max_evals.max(1),
            good_enough: 1e-5,
            handover: 0.0,
            min_gain: 1e-5,
            seed: args.seed,
        },
    };
    let bad = |e: lamella::Error| Failure::scene(&args.scene, e);
    let out = fit(&scene, &measured, &settings).map_err(bad)?;
    let doc = edited_document(&scene.document, &out.variables, &out.thicknesses_nm).map_err(bad)?;
    write_out(Some(&args.out_scene), &[json_bytes(&doc)])?;
    let mut report = fit_report(&out, &measured);
    if let (Some(path), Some(format)) = (&args.chart, chart_format) {
        let chart = FitChart::new(&scene.title, &out, &measured).map_err(bad)?;
        let size = args.chart_size.unwrap_or_else(|| chart.default_size());
        let bytes = lamella::chart::render(&chart, size, format).map_err(bad)?;
        write_out(Some(path), &[bytes])?;
        report.insert("chart".into(), json!(path.display().to_string()));
    }
    report.insert("wall_time_s".into(), json!(started.elapsed().as_secs_f64()));
    report.insert("seed".into(), json!(args.seed));
    write_out(
        args.output.as_deref(),
        &[json_bytes(&Value::Object(report))],
    )
}
