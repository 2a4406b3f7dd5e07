//! `lamella bands`: cos KΛ = ½ tr M of a repeat group's period over the
//! scene's grid, and its stop bands.

use std::path::PathBuf;

use lamella::scene::{Bands, StopBand};
use serde_json::json;

use super::DataFormat;
use super::{CliResult, Failure, film_scene, load_spectral_scene, write_out};

/// Flags of `lamella bands` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// Scene file (JSON) whose stack holds a repeat group.
    pub scene: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value = "csv")]
    pub format: DataFormat,
    /// CSV: list the stop bands (angle_deg, polarization, from_nm, to_nm)
    /// instead of ½ tr M at every grid point.
    #[arg(long)]
    pub stop_bands: bool,
    /// Write to this file (atomically) instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
}

/// Header of the grid CSV.
pub const GRID_COLUMNS: &str = "wavelength_nm,angle_deg,half_trace_s,half_trace_p";

/// Header of the stop-band CSV.
pub const STOP_BAND_COLUMNS: &str = "angle_deg,polarization,from_nm,to_nm";

/// Runs the command.
pub fn run(args: &Args) -> CliResult {
    let scene = load_spectral_scene(&args.scene)?;
    film_scene(&args.scene, &scene, "bands")?;
    let bands = scene.bands().map_err(|e| Failure::scene(&args.scene, e))?;
    let text = match (args.format, args.stop_bands) {
        (DataFormat::Csv, false) => grid_csv(&bands),
        (DataFormat::Csv, true) => stop_band_csv(&bands.stop_bands),
        (DataFormat::Json, _) => json(&scene.title, &bands),
    };
    write_out(args.output.as_deref(), &[text.into_bytes()])
}

fn pol_name(p: usize) -> &'static str {
    if p == 0 { "s" } else { "p" }
}

fn grid_csv(b: &Bands) -> String {
    let mut out = format!("{GRID_COLUMNS}\n");
    let mut num = zmij::Buffer::new();
    for (a, &angle) in b.angles_deg.iter().enumerate() {
        for (w, &wl) in b.wavelengths_nm.iter().enumerate() {
            for (i, v) in [wl, angle, b.half_trace[0][a][w], b.half_trace[1][a][w]]
                .into_iter()
                .enumerate()
            {
                if i > 0 {
                    out.push(',');
                }
                out.push_str(num.format(v));
            }
            out.push('\n');
        }
    }
    out
}

fn stop_band_csv(bands: &[StopBand]) -> String {
    let mut out = format!("{STOP_BAND_COLUMNS}\n");
    let mut num = zmij::Buffer::new();
    for s in bands {
        out.push_str(num.format(s.angle_deg));
        out.push(',');
        out.push_str(pol_name(s.polarization));
        out.push(',');
        out.push_str(num.format(s.from_nm));
        out.push(',');
        out.push_str(num.format(s.to_nm));
        out.push('\n');
    }
    out
}

fn json(title: &str, b: &Bands) -> String {
    let stop: Vec<_> = b
        .stop_bands
        .iter()
        .map(|s| {
            json!({"angle_deg": s.angle_deg, "polarization": pol_name(s.polarization),
                   "from_nm": s.from_nm, "to_nm": s.to_nm})
        })
        .collect();
    let doc = json!({
        "title": title,
        "group": b.group,
        "wavelength_nm": b.wavelengths_nm,
        "angle_deg": b.angles_deg,
        "half_trace_s": b.half_trace[0],
        "half_trace_p": b.half_trace[1],
        "stop_bands": stop,
    });
    serde_json::to_string(&doc).expect("finite numbers serialise")
}
