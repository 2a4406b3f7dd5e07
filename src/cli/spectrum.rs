//! `lamella spectrum`: R, T and A per polarization on the scene's grid.

use std::path::Path;

use lamella::optics::{Rows, Rt};
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
    let written = scene
        .with_rows(|rows| match format {
            Format::Csv => output::emit_with(out, |w| write_csv(rows, w)),
            Format::Json => output::emit(out, &[json(&scene.title, rows).into_bytes()]),
        })
        .map_err(|e| Failure::input(format!("{}: {e}", scene_path.display())))?;
    written.map_err(|e| Failure::io(out.unwrap_or(Path::new("<stdout>")), e))
}

/// The seven result columns after wavelength and angle.
fn values(x: &Rt, lossless: bool) -> [f64; 7] {
    [x.rs, x.rp, x.r(), x.ts, x.tp, x.t(), x.a(lossless)]
}

/// Wavelengths per piece of work: a piece is one angle and a run of up to
/// this many wavelengths, computed and formatted on one thread.
const PIECE: usize = 512;

/// Writes the CSV. Pieces of the grid are computed and formatted in parallel
/// into reused buffers, a batch at a time, then written in order, so memory
/// stays bounded however large the grid. Numbers print in the shortest form
/// that reads back to the same f64.
fn write_csv(rows: &Rows, out: &mut dyn Write) -> io::Result<()> {
    out.write_all(COLUMNS.join(",").as_bytes())?;
    out.write_all(b"\n")?;
    let (nw, na) = (rows.wavelengths_nm().len(), rows.angles_deg().len());
    let mut num = zmij::Buffer::new();
    let text = |v: &[f64], num: &mut zmij::Buffer| -> Vec<String> {
        v.iter().map(|&x| num.format(x).to_string()).collect()
    };
    let wavelengths = text(rows.wavelengths_nm(), &mut num);
    let angles = text(rows.angles_deg(), &mut num);
    let per_angle = nw.div_ceil(PIECE);
    let pieces = na * per_angle;
    let mut buffers = vec![Vec::new(); 4 * rayon::current_num_threads()];
    for first in (0..pieces).step_by(buffers.len()) {
        let count = buffers.len().min(pieces - first);
        buffers[..count].par_iter_mut().enumerate().for_each_init(
            || {
                (
                    vec![Rt::default(); PIECE.min(nw)],
                    [(); 7].map(|_| zmij::Buffer::new()),
                )
            },
            |(values_buf, nums), (i, buf)| {
                let (a, w0) = ((first + i) / per_angle, (first + i) % per_angle * PIECE);
                let piece = &mut values_buf[..PIECE.min(nw - w0)];
                rows.fill(a, w0, piece);
                buf.clear();
                for (w, x) in (w0..).zip(piece.iter()) {
                    buf.extend_from_slice(wavelengths[w].as_bytes());
                    buf.push(b',');
                    buf.extend_from_slice(angles[a].as_bytes());
                    // All seven are formatted before any is copied: reading
                    // a number's text right after it is written stalls.
                    let mut texts = [""; 7];
                    for ((t, n), v) in texts
                        .iter_mut()
                        .zip(nums.iter_mut())
                        .zip(values(x, rows.lossless(w)))
                    {
                        *t = n.format(v);
                    }
                    for t in texts {
                        buf.push(b',');
                        buf.extend_from_slice(t.as_bytes());
                    }
                    buf.push(b'\n');
                }
            },
        );
        buffers[..count].iter().try_for_each(|b| out.write_all(b))?;
    }
    Ok(())
}

fn json(title: &str, rows: &Rows) -> String {
    let s = rows.all();
    let per_angle = |col: usize| -> serde_json::Value {
        (0..s.angles_deg.len())
            .map(|a| {
                s.at_angle(a)
                    .iter()
                    .enumerate()
                    .map(|(w, x)| values(x, rows.lossless(w))[col])
                    .collect::<Vec<f64>>()
            })
            .collect::<Vec<_>>()
            .into()
    };
    let mut doc = serde_json::Map::new();
    doc.insert("title".into(), title.into());
    doc.insert("wavelength_nm".into(), s.wavelengths_nm.clone().into());
    doc.insert("angle_deg".into(), s.angles_deg.clone().into());
    for (col, name) in COLUMNS[2..].iter().enumerate() {
        doc.insert((*name).into(), per_angle(col));
    }
    serde_json::to_string(&serde_json::Value::Object(doc)).expect("finite numbers serialise")
}
