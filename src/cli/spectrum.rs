//! `lamella spectrum`: R, T and A per polarization on the scene's grid.

use std::path::Path;

use lamella::optics::Spectra;
use rayon::prelude::*;

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
    let chunks = match format {
        Format::Csv => csv(&spectra),
        Format::Json => vec![json(&scene.title, &spectra).into_bytes()],
    };
    write_out(out, &chunks)
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

/// Rows per angle block, formatted in parallel; numbers print in the
/// shortest form that reads back to the same f64.
fn csv(s: &Spectra) -> Vec<Vec<u8>> {
    let mut header = COLUMNS.join(",").into_bytes();
    header.push(b'\n');
    let mut num = zmij::Buffer::new();
    let wavelengths: Vec<String> = s
        .wavelengths_nm
        .iter()
        .map(|&w| num.format(w).to_string())
        .collect();
    let blocks = (0..s.angles_deg.len()).into_par_iter().map(|a| {
        let mut num = zmij::Buffer::new();
        let angle = num.format(s.angles_deg[a]).to_string();
        let mut out = Vec::with_capacity(wavelengths.len() * 190);
        for (w, wl) in wavelengths.iter().enumerate() {
            out.extend_from_slice(wl.as_bytes());
            out.push(b',');
            out.extend_from_slice(angle.as_bytes());
            for v in &row_values(s, a, w)[2..] {
                out.push(b',');
                out.extend_from_slice(num.format(*v).as_bytes());
            }
            out.push(b'\n');
        }
        out
    });
    std::iter::once(header)
        .chain(blocks.collect::<Vec<_>>())
        .collect()
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
