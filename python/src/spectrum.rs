//! `Scene.spectrum`: R, T and A on a grid, computed by the engine's grid
//! driver piece by piece (the pieces `lamella spectrum` computes), so the
//! numbers are the command line's bit for bit.

use lamella::optics::{LANES, Node, Rows, Rt, Spectra};
use lamella::scene::{GRID_BYTES_PER_POINT, MAX_GRID_BYTES, Scene as Engine, check_point};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use rayon::prelude::*;

use crate::convert::{array1, array2, floats};
use crate::errors::{Failure, Outcome};
use crate::interrupt::{Stop, run};
use crate::scene::Scene;

/// Wavelengths per piece of work (as in `lamella spectrum`): one angle and
/// a run of up to this many wavelengths, on one thread.
const PIECE: usize = 512;

/// Below this many points × layers a grid is computed on the calling thread
/// without the thread pool: a small call costs microseconds, not a thread.
pub const SMALL_WORK: usize = 20_000;

/// Layer evaluations per piece at most (a few milliseconds), so that a
/// stop request is seen promptly however costly each point is.
const PIECE_WORK: usize = 2_000_000;

/// Reflectance, transmittance and absorptance on a wavelength × angle grid.
///
/// Attributes (float64 numpy arrays): `wavelength_nm` (W,) in nm, `angle_deg`
/// (A,) in degrees of incidence, and `R_s`, `R_p`, `R`, `T_s`, `T_p`, `T`,
/// `A` of shape (A, W), fractions of the incident power (R = (R_s + R_p)/2,
/// T likewise, A = 1 − R − T and exactly 0 where nothing absorbs).
#[pyclass(module = "lamella", frozen, get_all)]
pub struct Spectrum {
    /// Wavelengths, nm (W,).
    wavelength_nm: Py<PyAny>,
    /// Angles of incidence, degrees (A,).
    angle_deg: Py<PyAny>,
    /// s reflectance (A, W).
    #[pyo3(name = "R_s")]
    r_s: Py<PyAny>,
    /// p reflectance (A, W).
    #[pyo3(name = "R_p")]
    r_p: Py<PyAny>,
    /// Unpolarized reflectance (A, W).
    #[pyo3(name = "R")]
    r: Py<PyAny>,
    /// s transmittance (A, W).
    #[pyo3(name = "T_s")]
    t_s: Py<PyAny>,
    /// p transmittance (A, W).
    #[pyo3(name = "T_p")]
    t_p: Py<PyAny>,
    /// Unpolarized transmittance (A, W).
    #[pyo3(name = "T")]
    t: Py<PyAny>,
    /// Unpolarized absorptance (A, W).
    #[pyo3(name = "A")]
    a: Py<PyAny>,
}

/// Column names of the long table, as in `lamella spectrum`'s CSV.
const COLUMNS: [&str; 9] = [
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

#[pymethods]
impl Spectrum {
    /// to_pandas() -> pandas.DataFrame
    ///
    /// One row per (angle, wavelength), angles as the outer loop, with the
    /// columns of `lamella spectrum`'s CSV:
    /// wavelength_nm, angle_deg, R_s, R_p, R, T_s, T_p, T, A. Needs pandas.
    fn to_pandas<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        let np = py.import("numpy")?;
        let w = self.wavelength_nm.bind(py);
        let a = self.angle_deg.bind(py);
        let (na, nw) = (a.len()?, w.len()?);
        let cols = PyDict::new(py);
        cols.set_item(COLUMNS[0], np.call_method1("tile", (w, na))?)?;
        cols.set_item(COLUMNS[1], np.call_method1("repeat", (a, nw))?)?;
        for (name, v) in COLUMNS[2..].iter().zip([
            &self.r_s, &self.r_p, &self.r, &self.t_s, &self.t_p, &self.t, &self.a,
        ]) {
            cols.set_item(*name, v.bind(py).call_method0("ravel")?)?;
        }
        py.import("pandas")?.call_method1("DataFrame", (cols,))
    }

    fn __repr__(&self, py: Python<'_>) -> PyResult<String> {
        Ok(format!(
            "<lamella.Spectrum: {} angles × {} wavelengths>",
            self.angle_deg.bind(py).len()?,
            self.wavelength_nm.bind(py).len()?
        ))
    }
}

/// Every point of `rows`, angle-major, computed in the pieces `lamella
/// spectrum` uses; large grids in parallel, stopping when asked.
pub fn grid(rows: &Rows, layers: usize, stop: &Stop) -> Outcome<Vec<Rt>> {
    let (nw, na) = (rows.wavelengths_nm().len(), rows.angles_deg().len());
    // Pieces start at multiples of the engine's four-wavelength blocks, so
    // every block (and so every number) is the one the command line computes.
    let piece = (PIECE_WORK / layers.max(1) / LANES * LANES).clamp(LANES, PIECE);
    let mut rt = vec![Rt::default(); nw * na];
    if nw == 0 {
        return Ok(rt);
    }
    if nw * na * layers.max(1) <= SMALL_WORK {
        for (a, row) in rt.chunks_mut(nw).enumerate() {
            for (p, piece) in row.chunks_mut(PIECE).enumerate() {
                rows.fill(a, p * PIECE, piece);
            }
        }
    } else {
        rt.par_chunks_mut(nw).enumerate().try_for_each(|(a, row)| {
            row.par_chunks_mut(piece)
                .enumerate()
                .try_for_each(|(p, chunk)| {
                    stop.check()?;
                    rows.fill(a, p * piece, chunk);
                    Ok(())
                })
        })?;
    }
    Ok(rt)
}

/// Matrix products per point of a stack (a repeat group costs its period
/// and about log₂ N squarings), a rough measure of the work.
fn products(nodes: &[Node]) -> usize {
    nodes
        .iter()
        .map(|n| match n {
            Node::Repeat { count, nodes } => {
                products(nodes) + 2 * (64 - count.leading_zeros() as usize)
            }
            _ => 1,
        })
        .sum()
}

/// Matrix products per grid point of a scene, over its disorder ensemble.
pub fn work_per_point(scene: &Engine) -> usize {
    layers_of(&scene.realisations(&scene.stack))
}

fn layers_of(stacks: &[lamella::optics::Stack]) -> usize {
    stacks
        .iter()
        .map(|s| products(&s.nodes) + 1)
        .sum::<usize>()
        .max(1)
}

/// The spectra of `scene` on its own grid, with the engine's checks.
pub fn spectra(scene: &Engine, label: &str, stop: &Stop) -> Outcome<Spectra> {
    let fail = |e| Failure::engine(label, e);
    let index = scene.indices(&scene.wavelengths_nm).map_err(fail)?;
    let stacks = scene.realisations(&scene.stack);
    let rows = Rows::new(&stacks, &index, &scene.wavelengths_nm, &scene.angles_deg);
    let rt = grid(&rows, layers_of(&stacks), stop)?;
    let s = Spectra {
        wavelengths_nm: scene.wavelengths_nm.clone(),
        angles_deg: scene.angles_deg.clone(),
        rt,
        jones: None,
    };
    lamella::scene::check_spectra(&s).map_err(fail)?;
    Ok(s)
}

/// Checks a grid given to `spectrum`: wavelengths > 0, angles below 90°,
/// both increasing strictly.
fn checked_grid(obj: &Bound<'_, PyAny>, key: &str) -> Outcome<Vec<f64>> {
    let v = floats(obj, key)?;
    if v.is_empty() {
        return Err(Failure::input(format!(
            "{key} = []: needs at least one value"
        )));
    }
    if let Some(i) = v.windows(2).position(|w| w[1] <= w[0]) {
        return Err(Failure::input(format!(
            "{key}[{}] = {}: values must increase strictly",
            i + 1,
            v[i + 1]
        )));
    }
    let refused = |x: f64| {
        if key == "wavelengths_nm" {
            (x <= 0.0).then_some("wavelengths must be greater than zero")
        } else {
            (x.abs() >= 90.0).then_some("angles of incidence must lie below 90°")
        }
    };
    if let Some((i, why)) = v
        .iter()
        .enumerate()
        .find_map(|(i, &x)| refused(x).map(|w| (i, w)))
    {
        return Err(Failure::input(format!("{key}[{i}] = {}: {why}", v[i])));
    }
    Ok(v)
}

/// `Scene.spectrum`.
pub fn spectrum(
    py: Python<'_>,
    scene: &Scene,
    wavelengths_nm: Option<&Bound<'_, PyAny>>,
    angles_deg: Option<&Bound<'_, PyAny>>,
) -> PyResult<Spectrum> {
    let s = &scene.inner;
    s.require_film()
        .map_err(|e| PyErr::from(scene.failure(e)))?;
    let w = match wavelengths_nm {
        Some(o) => checked_grid(o, "wavelengths_nm")?,
        None => s.wavelengths_nm.clone(),
    };
    let a = match angles_deg {
        Some(o) => checked_grid(o, "angles_deg")?,
        None => s.angles_deg.clone(),
    };
    let (nw, na) = (w.len(), a.len());
    if (nw as u64).saturating_mul(na as u64) * GRID_BYTES_PER_POINT > MAX_GRID_BYTES {
        let mut sized = (**s).clone();
        sized.wavelengths_nm = w.clone();
        sized
            .check_grid_size(na, GRID_BYTES_PER_POINT, "spectrum")
            .map_err(|e| PyErr::from(scene.failure(e)))?;
    }
    let layers = crate::spectrum::work_per_point(s);
    let large = nw * na * layers > SMALL_WORK;
    let label = &scene.label;
    let (rt, lossless) = run(py, large, |stop| {
        let fail = |e| Failure::engine(label, e);
        let index = s.indices(&w).map_err(fail)?;
        let stacks = s.realisations(&s.stack);
        let rows = Rows::new(&stacks, &index, &w, &a);
        let rt = grid(&rows, layers, stop)?;
        for (i, x) in rt.iter().enumerate() {
            check_point(x, w[i % nw], a[i / nw]).map_err(fail)?;
        }
        let lossless: Vec<bool> = (0..nw).map(|i| rows.lossless(i)).collect();
        Ok((rt, lossless))
    })?;
    let n = nw * na;
    let mut cols: [Vec<f64>; 7] = std::array::from_fn(|_| Vec::with_capacity(n));
    for (i, x) in rt.iter().enumerate() {
        let values = [x.rs, x.rp, x.r(), x.ts, x.tp, x.t(), x.a(lossless[i % nw])];
        for (c, v) in cols.iter_mut().zip(values) {
            c.push(v);
        }
    }
    let [r_s, r_p, r, t_s, t_p, t, a_] = cols.map(|c| array2(py, (na, nw), c).map(Bound::unbind));
    Ok(Spectrum {
        wavelength_nm: array1(py, w).into_any().unbind(),
        angle_deg: array1(py, a).into_any().unbind(),
        r_s: r_s?,
        r_p: r_p?,
        r: r?,
        t_s: t_s?,
        t_p: t_p?,
        t: t?,
        a: a_?,
    })
}
