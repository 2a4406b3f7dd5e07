//! `lamella spectrum`: R, T and A per polarization on the scene's grid.

use std::path::Path;

use lamella::optics::Spectra;
use rayon::prelude::*;

use std::io::{self, Write};

use super::{CliResult, Failure, load_scene, output};

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
    let written = match format {
        Format::Csv => output::emit_with(out, |w| write_csv(&spectra, w)),
        Format::Json => output::emit(out, &[json(&scene.title, &spectra).into_bytes()]),
    };
    written.map_err(|e| Failure::io(out.unwrap_or(Path::new("<stdout>")), e))
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

/// Writes the CSV: blocks of angles formatted in parallel into reused
/// buffers, then written in order. Numbers print in the shortest form that
/// reads back to the same f64.
fn write_csv(s: &Spectra, out: &mut dyn Write) -> io::Result<()> {
    out.write_all(COLUMNS.join(",").as_bytes())?;
    out.write_all(b"\n")?;
    let mut num = zmij::Buffer::new();
    let wavelengths: Vec<String> = s
        .wavelengths_nm
        .iter()
        .map(|&w| num.format(w).to_string())
        .collect();
    let mut buffers =
        vec![Vec::with_capacity(wavelengths.len() * 190); 8 * rayon::current_num_threads()];
    for first in (0..s.angles_deg.len()).step_by(buffers.len()) {
        let count = buffers.len().min(s.angles_deg.len() - first);
        buffers[..count]
            .par_iter_mut()
            .enumerate()
            .for_each(|(i, buf)| {
                let a = first + i;
                let mut num = zmij::Buffer::new();
                let angle = num.format(s.angles_deg[a]).to_string();
                buf.clear();
                for (w, wl) in wavelengths.iter().enumerate() {
                    buf.extend_from_slice(wl.as_bytes());
                    buf.push(b',');
                    buf.extend_from_slice(angle.as_bytes());
                    for v in &row_values(s, a, w)[2..] {
                        buf.push(b',');
                        buf.extend_from_slice(num.format(*v).as_bytes());
                    }
                    buf.push(b'\n');
                }
            });
        buffers[..count].iter().try_for_each(|b| out.write_all(b))?;
    }
    Ok(())
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
