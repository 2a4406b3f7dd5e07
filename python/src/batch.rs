//! `reflectance_batch`: R and T of many designs that share a layer sequence,
//! for inverse design and machine learning, through the engine's
//! [`Batch`]: the per-medium terms are computed and packed once when the
//! media are shared, so a design costs only the phases of its own layers.

use lamella::optics::{Batch, Rt};
use num_complex::Complex64;
use numpy::{AllowTypeChange, PyArrayLikeDyn};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use rayon::prelude::*;

use crate::convert::{array1, array3, floats};
use crate::errors::{Failure, Outcome};
use crate::interrupt::{Stop, run};

/// Designs per piece of parallel work (and between checks for Ctrl-C).
const DESIGNS_PER_PIECE: usize = 64;

/// Media of the batch: one index table for every design, or one per design.
struct Media {
    /// `n[(d * nw + w) * m + j]` (d = 0 when shared).
    n: Vec<Complex64>,
    /// Whether each design has its own table.
    per_design: bool,
    /// Media per design: incident, layers, exit.
    m: usize,
}

/// Reads and checks the media argument: shape (W, M) or (D, W, M).
fn read_media(obj: &Bound<'_, PyAny>, designs: usize, nw: usize, layers: usize) -> Outcome<Media> {
    let arr = obj
        .extract::<PyArrayLikeDyn<'_, Complex64, AllowTypeChange>>()
        .map_err(|_| {
            Failure::input("media: expected complex indices n + ik, shape (W, L+2) or (D, W, L+2)")
        })?;
    let view = arr.as_array();
    let shape = view.shape().to_vec();
    let m = layers + 2;
    let per_design = match shape[..] {
        [w, mm] if w == nw && mm == m => false,
        [d, w, mm] if d == designs && w == nw && mm == m => true,
        _ => {
            return Err(Failure::input(format!(
                "media: shape {shape:?}: expected (W, L+2) = ({nw}, {m}) or (D, W, L+2) = ({designs}, {nw}, {m}) \
                 for {designs} designs of {layers} layers on {nw} wavelengths (incident medium, layers, substrate)"
            )));
        }
    };
    let n: Vec<Complex64> = view.iter().copied().collect();
    for (i, z) in n.iter().enumerate() {
        let (j, w, d) = (i % m, (i / m) % nw, i / (m * nw));
        let key = if per_design {
            format!("media[{d}, {w}, {j}]")
        } else {
            format!("media[{w}, {j}]")
        };
        if !(z.re.is_finite() && z.im.is_finite() && z.re > 0.0 && z.im >= 0.0) {
            return Err(Failure::input(format!(
                "{key} = {z}: needs a finite index with n > 0 and k ≥ 0"
            )));
        }
        if j == 0 && z.im != 0.0 {
            return Err(Failure::input(format!(
                "{key} = {z}: the incident medium (column 0) must be lossless (k = 0)"
            )));
        }
    }
    Ok(Media { n, per_design, m })
}

/// reflectance_batch(media, thicknesses_nm, wavelengths_nm, angles_deg=(0,)) -> dict
///
/// R and T of D designs that share one layer sequence, each with its own
/// thicknesses, by the engine's transfer-matrix kernel (the code path of
/// `Scene.spectrum`, to which it agrees to rounding).
///
/// - media: complex refractive indices n + ik, shape (W, L+2) for media
///   shared by every design, or (D, W, L+2) per design: column 0 is the
///   incident medium (lossless), columns 1..L the layers from the incident
///   side, column L+1 the semi-infinite substrate.
/// - thicknesses_nm: (D, L) physical thicknesses in nm (≥ 0); a 1-D (L,)
///   array is one design.
/// - wavelengths_nm: (W,) vacuum wavelengths in nm (> 0).
/// - angles_deg: (A,) angles of incidence in degrees (|θ| < 90); default 0.
///
/// Returns a dict of float64 arrays of shape (D, A, W): `R_s`, `R_p`, `T_s`,
/// `T_p` and the unpolarized means `R`, `T`, plus `wavelength_nm` and
/// `angle_deg`. Raises `SceneError` naming the argument and index of a bad
/// value. Releases the GIL and runs on every core; Ctrl-C stops it.
#[pyfunction]
#[pyo3(signature = (media, thicknesses_nm, wavelengths_nm, angles_deg=None))]
pub fn reflectance_batch<'py>(
    py: Python<'py>,
    media: &Bound<'py, PyAny>,
    thicknesses_nm: &Bound<'py, PyAny>,
    wavelengths_nm: &Bound<'py, PyAny>,
    angles_deg: Option<&Bound<'py, PyAny>>,
) -> PyResult<Bound<'py, PyDict>> {
    let wavelengths = floats(wavelengths_nm, "wavelengths_nm")?;
    let angles = match angles_deg {
        Some(a) => floats(a, "angles_deg")?,
        None => vec![0.0],
    };
    if let Some((i, w)) = wavelengths.iter().enumerate().find(|(_, w)| !(**w > 0.0)) {
        return Err(Failure::input(format!(
            "wavelengths_nm[{i}] = {w}: must be greater than zero"
        ))
        .into());
    }
    if let Some((i, a)) = angles.iter().enumerate().find(|(_, a)| !(a.abs() < 90.0)) {
        return Err(Failure::input(format!(
            "angles_deg[{i}] = {a}: angles of incidence must lie below 90°"
        ))
        .into());
    }
    let t = thicknesses_nm
        .extract::<PyArrayLikeDyn<'_, f64, AllowTypeChange>>()
        .map_err(|_| Failure::input("thicknesses_nm: expected numbers, shape (D, L)"))?;
    let view = t.as_array();
    let (designs, layers) = match view.shape() {
        [l] => (1, *l),
        [d, l] => (*d, *l),
        s => {
            return Err(
                Failure::input(format!("thicknesses_nm: shape {s:?}: expected (D, L)")).into(),
            );
        }
    };
    let thick: Vec<f64> = view.iter().copied().collect();
    if let Some((i, x)) = thick
        .iter()
        .enumerate()
        .find(|(_, x)| !(x.is_finite() && **x >= 0.0))
    {
        let (d, l) = (i / layers.max(1), i % layers.max(1));
        return Err(Failure::input(format!(
            "thicknesses_nm[{d}, {l}] = {x}: must be a finite thickness ≥ 0"
        ))
        .into());
    }
    let (nw, na) = (wavelengths.len(), angles.len());
    let media = read_media(media, designs, nw, layers)?;
    let per = na * nw;
    let total = designs
        .checked_mul(per)
        .filter(|n| *n as u64 * 48 <= lamella::scene::MAX_GRID_BYTES);
    let Some(total) = total else {
        return Err(Failure::input(format!(
            "thicknesses_nm: {designs} designs × {na} angles × {nw} wavelengths would need more than {} GiB",
            lamella::scene::MAX_GRID_BYTES >> 30
        ))
        .into());
    };
    let large = total * (layers + 2) > crate::grid::SMALL_WORK;
    let [rs, rp, r, ts, tp, t] = run(py, large, |stop| {
        compute(&media, &thick, designs, layers, &wavelengths, &angles, stop)
    })?;
    let out = PyDict::new(py);
    let shape = (designs, na, nw);
    for (k, v) in [
        ("R_s", rs),
        ("R_p", rp),
        ("R", r),
        ("T_s", ts),
        ("T_p", tp),
        ("T", t),
    ] {
        out.set_item(k, array3(py, shape, v)?)?;
    }
    out.set_item("wavelength_nm", array1(py, wavelengths))?;
    out.set_item("angle_deg", array1(py, angles))?;
    Ok(out)
}

/// R_s, R_p, R, T_s, T_p and T, each (D, A, W) in row-major order.
type Columns = [Vec<f64>; 6];

/// A zeroed output column of `len` numbers. A large one comes straight from
/// the kernel untouched, and on Linux it is marked for huge pages before
/// the first write: a batch's columns run to hundreds of megabytes, and
/// faulting them in 4 KiB pages costs a sixth of the computation.
fn column(len: usize) -> Vec<f64> {
    let v = vec![0.0; len];
    #[cfg(target_os = "linux")]
    if len >= 1 << 18 {
        // The advice takes whole pages: from the first page boundary inside.
        let (start, end) = (v.as_ptr() as usize, v.as_ptr() as usize + len * 8);
        let first = start.next_multiple_of(4096);
        // SAFETY: the range lies inside the vector's own allocation; the
        // advice changes only how its pages are backed, never their contents.
        unsafe {
            libc::madvise(first as *mut libc::c_void, end - first, libc::MADV_HUGEPAGE);
        }
    }
    v
}

/// R and T of every design into the six columns.
fn compute(
    media: &Media,
    thick: &[f64],
    designs: usize,
    layers: usize,
    wavelengths: &[f64],
    angles: &[f64],
    stop: &Stop,
) -> Outcome<Columns> {
    let (nw, na, m) = (wavelengths.len(), angles.len(), media.m);
    let per = na * nw;
    let batch_of = |d: usize| {
        Batch::new(
            &media.n[d * nw * m..(d + 1) * nw * m],
            layers,
            wavelengths,
            angles,
        )
    };
    let shared = (!media.per_design).then(|| batch_of(0));
    let mut columns: Columns = std::array::from_fn(|_| column(designs * per));
    let piece = (DESIGNS_PER_PIECE * per).max(1);
    let [rs, rp, r_mean, ts, tp, t_mean] = &mut columns;
    rs.par_chunks_mut(piece)
        .zip(rp.par_chunks_mut(piece))
        .zip(r_mean.par_chunks_mut(piece))
        .zip(ts.par_chunks_mut(piece))
        .zip(tp.par_chunks_mut(piece))
        .zip(t_mean.par_chunks_mut(piece))
        .enumerate()
        .try_for_each_init(
            || vec![Rt::default(); per],
            |out, (p, (((((rs, rp), r_mean), ts), tp), t_mean))| {
                stop.check()?;
                let first = p * DESIGNS_PER_PIECE;
                for k in 0..rs.len() / per.max(1) {
                    let d = first + k;
                    let own;
                    let batch = match &shared {
                        Some(b) => b,
                        None => {
                            own = batch_of(d);
                            &own
                        }
                    };
                    batch.rt(&thick[d * layers..(d + 1) * layers], out);
                    if let Some(i) = out
                        .iter()
                        .position(|x| !(x.rs + x.rp + x.ts + x.tp).is_finite())
                    {
                        let x = &out[i];
                        lamella::scene::check_point(x, wavelengths[i % nw], angles[i / nw])
                            .map_err(|e| Failure::NotComputable(format!("design {d}: {e}")))?;
                    }
                    let at = k * per..(k + 1) * per;
                    for (i, x) in at.zip(out.iter()) {
                        rs[i] = x.rs;
                        rp[i] = x.rp;
                        r_mean[i] = 0.5 * (x.rs + x.rp);
                        ts[i] = x.ts;
                        tp[i] = x.tp;
                        t_mean[i] = 0.5 * (x.ts + x.tp);
                    }
                }
                Ok(())
            },
        )?;
    Ok(columns)
}
