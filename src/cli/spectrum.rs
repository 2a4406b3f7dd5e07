//! `lamella spectrum`: R, T and A per polarization on the scene's grid.

use std::fmt::Write as _;
use std::path::Path;

use lamella::optics::Spectra;

use super::{CliResult, Failure, load_scene, write_out};

/// Output format of the spectrum.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum Format {
    /// One row per (angle, wavelength).
    Csv,
    /// Arrays indexed [angle][wavelength].
    Json,
}

/// Column names, in order, shared by both formats.
pub const COLUMNS: [&str; 9] = [
    "wavelength_nm",
    "angle_deg",
    "R_s",
    "R_p",
    "R",
    "T_s",
    "T_p",
    "T",
    "A",
];

/// Runs the command.
pub fn run(scene_path: &Path, format: Format, out: Option<&Path>) -> CliResult {
    let scene = load_scene(scene_path)?;
    let spectra = scene
        .spectra()
        .map_err(|e| Failure::input(format!("{}: {e}", scene_path.display())))?;
    let text = match format {
        Format::Csv => csv(&spectra),
        Format::Json => json(&scene.title, &spectra),
    };
    write_out(out, text.as_bytes())
}

fn row_values(s: &Spectra, a: usize, w: usize) -> [f64; 9] {
    let x = s.at_angle(a)[w];
    let (r, t) = (x.r(), x.t());
    [
        s.wavelengths_nm[w],
        s.angles_deg[a],
        x.rs,
        x.rp,
        r,
        x.ts,
        x.tp,
        t,
        1.0 - r - t,
    ]
}

/// Numbers print in the shortest form that reads back to the same f64.
fn csv(s: &Spectra) -> String {
    let mut out = String::with_capacity(s.rt.len() * 180 + 64);
    out.push_str(&COLUMNS.join(","));
    out.push('\n');
    for a in 0..s.angles_deg.len() {
        for w in 0..s.wavelengths_nm.len() {
            for (i, v) in row_values(s, a, w).iter().enumerate() {
                if i > 0 {
                    out.push(',');
                }
                let _ = write!(out, "{v:?}");
            }
            out.push('\n');
        }
    }
    out
}

fn json(title: &str, s: &Spectra) -> String {
    let per_angle = |col: usize| -> serde_json::Value {
        (0..s.angles_deg.len())
            .map(|a| {
                (0..s.wavelengths_nm.len())
                    .map(|w| row_values(s, a, w)[col])
                    .collect::<Vec<f64>>()
            })
            .collect::<Vec<_>>()
            .into()
    };
    let mut doc = serde_json::Map::new();
    doc.insert("title".into(), title.into());
    doc.insert("wavelength_nm".into(), s.wavelengths_nm.clone().into());
    doc.insert("angle_deg".into(), s.angles_deg.clone().into());
    for (col, name) in COLUMNS.iter().enumerate().skip(2) {
        doc.insert((*name).into(), per_angle(col));
    }
    serde_json::to_string(&serde_json::Value::Object(doc)).expect("finite numbers serialise")
}
