//! `lamella spectrum`: R, T and A per polarization on the scene's grid,
//! optionally with the absorptance of each layer.

use std::path::Path;

use std::io::{self, Write};
use std::sync::Mutex;

use lamella::optics::aniso::Jones;
use lamella::optics::{CIRCULAR_COLUMNS, Circular, LINEAR_COLUMNS, Rows, Rt};
use lamella::scene::{LayerAbsorption, check_point, check_spectra};
use rayon::prelude::*;

use super::{CliResult, Failure, load_spectral_scene, output};

/// Output format of the spectrum.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum Format {
    /// One row per (angle, wavelength).
    Csv,
    /// Arrays indexed [angle][wavelength].
    Json,
    /// CGATS.17 text: unpolarized reflectance per angle in percent, one
    /// data set per angle.
    Cgats,
}

/// Polarization basis of the columns and Jones matrices.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Basis {
    /// s and p: R_s, R_p, T_s, T_p (Jones matrices in the order p, s).
    Linear,
    /// Left- and right-handed circular: R_L, R_R, T_L, T_R (Jones matrices
    /// in the order L, R).
    Circular,
}

impl Basis {
    fn columns(self) -> &'static [&'static str; 9] {
        match self {
            Basis::Linear => &LINEAR_COLUMNS,
            Basis::Circular => &CIRCULAR_COLUMNS,
        }
    }
}

/// Runs the command in polarization basis `basis`; with `layers`, the
/// absorptance of each layer as written follows A.
pub fn run(
    scene_path: &Path,
    format: Format,
    basis: Basis,
    layers: bool,
    out: Option<&Path>,
) -> CliResult {
    let scene = load_spectral_scene(scene_path)?;
    let at_scene = |e| Failure::scene(scene_path, e);
    scene.require_film().map_err(at_scene)?;
    let per_layer = if layers {
        scene
            .check_grid_size(
                scene.angles_deg.len(),
                LAYER_BYTES_PER_POINT,
                "spectrum --layer-absorption",
            )
            .map_err(at_scene)?;
        Some(scene.layer_absorption().map_err(at_scene)?)
    } else {
        None
    };
    let per_layer = per_layer.as_ref();
    let written = match format {
        Format::Csv => scene
            .with_rows(|rows| output::emit_with(out, |w| write_csv(rows, basis, per_layer, w)))
            .map_err(at_scene)?,
        Format::Json => {
            let text = json_document(&scene, basis, per_layer).map_err(at_scene)?;
            output::emit(out, &[text.into_bytes()])
        }
        Format::Cgats => {
            let text = cgats(&scene).map_err(at_scene)?;
            output::emit(out, &[text.into_bytes()])
        }
    };
    written.map_err(|e| match engine_error(e) {
        Ok(why) => Failure::scene(scene_path, why),
        Err(e) => Failure::io(out.unwrap_or(Path::new("<stdout>")), e),
    })
}

/// Bytes a grid point takes in the JSON form: R and T, seven numbers as
/// JSON values and as text, and the two Jones matrices (sixteen numbers).
const JSON_BYTES_PER_POINT: u64 = 1400;

/// Bytes a grid point takes with absorption per layer: its columns held
/// whole (a generous allowance for a few dozen layers).
const LAYER_BYTES_PER_POINT: u64 = 800;

/// The engine error inside an I/O error from [`write_csv`], or the I/O
/// error itself.
fn engine_error(e: io::Error) -> Result<lamella::Error, io::Error> {
    if !e
        .get_ref()
        .is_some_and(|inner| inner.is::<lamella::Error>())
    {
        return Err(e);
    }
    let inner = e.into_inner().expect("checked above");
    Ok(*inner.downcast().expect("checked above"))
}

/// Fills `out` with the result columns at angle index `a` for the
/// wavelengths from `first_w`, refusing a value that is not finite.
fn fill_values(
    rows: &Rows,
    basis: Basis,
    a: usize,
    first_w: usize,
    out: &mut [[f64; 7]],
) -> lamella::Result<()> {
    let (wavelengths, angle) = (rows.wavelengths_nm(), rows.angles_deg()[a]);
    match basis {
        Basis::Linear => {
            let mut rt = vec![Rt::default(); out.len()];
            rows.fill(a, first_w, &mut rt);
            for ((w, x), o) in (first_w..).zip(&rt).zip(out.iter_mut()) {
                check_point(x, wavelengths[w], angle)?;
                *o = x.columns(rows.lossless(w));
            }
        }
        Basis::Circular => {
            let mut c = vec![Circular::default(); out.len()];
            rows.fill_circular(a, first_w, &mut c);
            for ((w, x), o) in (first_w..).zip(&c).zip(out.iter_mut()) {
                *o = x.columns(rows.lossless(w));
                if let Some((name, v)) = CIRCULAR_COLUMNS[2..]
                    .iter()
                    .zip(*o)
                    .find(|(_, v)| !v.is_finite())
                {
                    return Err(lamella::Error::not_computable(
                        *name,
                        format!("{} nm, {angle}°", wavelengths[w]),
                        v,
                    ));
                }
            }
        }
    }
    Ok(())
}

/// Wavelengths per piece of work: a piece is one angle and a run of up to
/// this many wavelengths, computed and formatted on one thread.
const PIECE: usize = 512;

/// Writes the CSV. Pieces of the grid are computed and formatted in parallel
/// into reused buffers, a batch at a time, then written in order, so memory
/// stays bounded however large the grid. Numbers print in the shortest form
/// that reads back to the same f64. A value that is not finite stops the
/// output before its batch is written, with the engine error (naming the
/// point) inside the I/O error.
fn write_csv(
    rows: &Rows,
    basis: Basis,
    layers: Option<&LayerAbsorption>,
    out: &mut dyn Write,
) -> io::Result<()> {
    out.write_all(basis.columns().join(",").as_bytes())?;
    for c in layers.iter().flat_map(|l| &l.columns) {
        out.write_all(b",")?;
        out.write_all(c.as_bytes())?;
    }
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
    let failed = Mutex::new(None);
    for first in (0..pieces).step_by(buffers.len()) {
        let count = buffers.len().min(pieces - first);
        buffers[..count].par_iter_mut().enumerate().for_each_init(
            || {
                (
                    vec![[0.0; 7]; PIECE.min(nw)],
                    [(); 7].map(|_| zmij::Buffer::new()),
                )
            },
            |(values_buf, nums), (i, buf)| {
                let (a, w0) = ((first + i) / per_angle, (first + i) % per_angle * PIECE);
                let piece = &mut values_buf[..PIECE.min(nw - w0)];
                buf.clear();
                if let Err(e) = fill_values(rows, basis, a, w0, piece) {
                    *failed.lock().expect("no panics while held") = Some(e);
                    return;
                }
                for (w, x) in (w0..).zip(piece.iter()) {
                    buf.extend_from_slice(wavelengths[w].as_bytes());
                    buf.push(b',');
                    buf.extend_from_slice(angles[a].as_bytes());
                    // All seven are formatted before any is copied: reading
                    // a number's text right after it is written stalls.
                    let mut texts = [""; 7];
                    for ((t, n), v) in texts.iter_mut().zip(nums.iter_mut()).zip(*x) {
                        *t = n.format(v);
                    }
                    for t in texts {
                        buf.push(b',');
                        buf.extend_from_slice(t.as_bytes());
                    }
                    for &v in layers.iter().flat_map(|l| &l.values[a][w]) {
                        buf.push(b',');
                        buf.extend_from_slice(nums[0].format(v).as_bytes());
                    }
                    buf.push(b'\n');
                }
            },
        );
        if let Some(e) = failed.lock().expect("no panics while held").take() {
            return Err(io::Error::other(e));
        }
        buffers[..count].iter().try_for_each(|b| out.write_all(b))?;
    }
    Ok(())
}

/// `lamella spectrum --format json` of a film scene: the grid size checked,
/// then [`json`].
pub fn json_document(
    scene: &lamella::scene::Scene,
    basis: Basis,
    per_layer: Option<&LayerAbsorption>,
) -> lamella::Result<String> {
    scene.check_grid_size(
        scene.angles_deg.len(),
        JSON_BYTES_PER_POINT,
        "spectrum --format json",
    )?;
    scene
        .with_jones_rows(|rows| json(&scene.title, rows, basis, per_layer))
        .and_then(|t| t)
}

/// The whole grid as one JSON object, with the columns of `layers` after
/// A and the Jones matrices where the design is coherent; a value that is
/// not finite is an error naming its point.
fn json(
    title: &str,
    rows: &Rows,
    basis: Basis,
    layers: Option<&LayerAbsorption>,
) -> lamella::Result<String> {
    let s = if rows.has_jones() {
        rows.all_with_jones()
    } else {
        rows.all()
    };
    check_spectra(&s)?;
    let nw = s.wavelengths_nm.len();
    let point = |a: usize, w: usize| -> [f64; 7] {
        match (basis, &s.jones) {
            (Basis::Linear, _) => s.at_angle(a)[w].columns(rows.lossless(w)),
            (Basis::Circular, Some(j)) => Circular::of(&j[a * nw + w]).columns(rows.lossless(w)),
            (Basis::Circular, None) => {
                Circular::of_isotropic(&s.at_angle(a)[w]).columns(rows.lossless(w))
            }
        }
    };
    let table: Vec<Vec<[f64; 7]>> = (0..s.angles_deg.len())
        .map(|a| (0..nw).map(|w| point(a, w)).collect())
        .collect();
    let per_angle = |col: usize| -> serde_json::Value {
        table
            .iter()
            .map(|row| row.iter().map(|v| v[col]).collect::<Vec<f64>>())
            .collect::<Vec<_>>()
            .into()
    };
    let mut doc = serde_json::Map::new();
    doc.insert("title".into(), title.into());
    doc.insert("wavelength_nm".into(), s.wavelengths_nm.clone().into());
    doc.insert("angle_deg".into(), s.angles_deg.clone().into());
    for (col, name) in basis.columns()[2..].iter().enumerate() {
        doc.insert((*name).into(), per_angle(col));
    }
    for (c, name) in layers.iter().flat_map(|l| l.columns.iter().enumerate()) {
        let values = layers.expect("columns come from it").values.iter();
        let column: Vec<Vec<f64>> = values
            .map(|row| row.iter().map(|cols| cols[c]).collect())
            .collect();
        doc.insert(name.clone(), column.into());
    }
    if let Some(jones) = &s.jones {
        let order = match basis {
            Basis::Linear => ["p", "s"],
            Basis::Circular => ["L", "R"],
        };
        doc.insert("jones_basis".into(), order.to_vec().into());
        let in_basis = |j: &Jones| match basis {
            Basis::Linear => *j,
            Basis::Circular => j.circular(),
        };
        let matrices = |pick: fn(&Jones) -> &nalgebra::Matrix2<num_complex::Complex64>| {
            serde_json::Value::from(
                jones
                    .chunks(nw)
                    .map(|row| {
                        row.iter()
                            .map(|j| {
                                let m = *pick(&in_basis(j));
                                [(0, 0), (0, 1), (1, 0), (1, 1)]
                                    .map(|ij| [m[ij].re, m[ij].im])
                                    .to_vec()
                            })
                            .collect::<Vec<_>>()
                    })
                    .collect::<Vec<_>>(),
            )
        };
        doc.insert("jones_r".into(), matrices(|j| &j.r));
        doc.insert("jones_t".into(), matrices(|j| &j.t));
    }
    Ok(serde_json::to_string(&serde_json::Value::Object(doc)).expect("finite numbers serialise"))
}

/// Unpolarized reflectance per angle as CGATS text.
fn cgats(scene: &lamella::scene::Scene) -> lamella::Result<String> {
    use lamella::design::coating::At;
    use lamella::measured::{Measured, Quantity, cgats};
    scene.check_grid_size(
        scene.angles_deg.len(),
        JSON_BYTES_PER_POINT,
        "spectrum --format cgats",
    )?;
    let s = scene.spectra()?;
    check_spectra(&s)?;
    let groups: Vec<Measured> = (0..s.angles_deg.len())
        .map(|a| Measured {
            at: At::Angle(s.angles_deg[a]),
            wavelengths_nm: s.wavelengths_nm.clone(),
            r: s.at_angle(a).iter().map(Rt::r).collect(),
        })
        .collect();
    let created = super::report::Provenance::of_this_run().date;
    Ok(cgats::spectra_document(&scene.title, &created, Quantity::Reflectance, &groups)?.write())
}
