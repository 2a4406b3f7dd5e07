//! `Scene.spectrum`: R, T and A on a grid in the linear or circular basis,
//! with the Jones matrices, bit for bit those of `lamella spectrum`.

use lamella::optics::aniso::Jones;
use lamella::optics::{CIRCULAR_COLUMNS, Circular, LINEAR_COLUMNS};
use lamella::scene::{GRID_BYTES_PER_POINT, MAX_GRID_BYTES};
use num_complex::Complex64;
use pyo3::prelude::*;
use pyo3::types::PyDict;

use crate::convert::{array1, array2, arrayd, floats};
use crate::errors::{Failure, Outcome};
use crate::grid::{Grid, SMALL_WORK, computed, work_per_point};
use crate::interrupt::run;
use crate::scene::Scene;

/// Reflectance, transmittance and absorptance on a wavelength × angle grid.
///
/// Attributes (float64 numpy arrays): `wavelength_nm` (W,) in nm, `angle_deg`
/// (A,) in degrees of incidence, and seven columns of shape (A, W),
/// fractions of the incident power: in the linear basis `R_s`, `R_p`, `R`,
/// `T_s`, `T_p`, `T`, `A`; in the circular basis `R_L`, `R_R`, `R`, `T_L`,
/// `T_R`, `T`, `A` (R_L: the total reflectance, co- plus cross-polarized,
/// for left-handed incident light). R and T are for unpolarized light,
/// A = 1 − R − T (exactly 0 where nothing absorbs). `basis` names the
/// basis; `r_jones` and `t_jones` are the complex 2×2 reflection and
/// transmission Jones matrices (A, W, 2, 2) in it, rows (outgoing) and
/// columns (incident) in the order of `jones_basis`, or None.
#[pyclass(module = "lamella", frozen)]
pub struct Spectrum {
    /// Wavelengths, nm (W,).
    wavelength_nm: Py<PyAny>,
    /// Angles of incidence, degrees (A,).
    angle_deg: Py<PyAny>,
    /// The polarization basis.
    basis: Basis,
    /// The seven result columns (A, W), named by the basis.
    columns: [Py<PyAny>; 7],
    /// Reflection Jones matrices (A, W, 2, 2), when computed.
    r_jones: Option<Py<PyAny>>,
    /// Transmission Jones matrices (A, W, 2, 2), when computed.
    t_jones: Option<Py<PyAny>>,
}

/// The polarization basis of a spectrum.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Basis {
    /// s and p.
    Linear,
    /// Left- and right-handed circular.
    Circular,
}

impl Basis {
    /// `linear` or `circular` (the argument `basis`).
    fn parse(s: &str) -> Outcome<Basis> {
        match s {
            "linear" => Ok(Basis::Linear),
            "circular" => Ok(Basis::Circular),
            _ => Err(Failure::input(format!(
                "basis = {s:?}: expected \"linear\" or \"circular\""
            ))),
        }
    }

    /// `linear` or `circular`.
    fn name(self) -> &'static str {
        match self {
            Basis::Linear => "linear",
            Basis::Circular => "circular",
        }
    }

    /// The table's column names, as in `lamella spectrum --basis`.
    fn names(self) -> &'static [&'static str; 9] {
        match self {
            Basis::Linear => &LINEAR_COLUMNS,
            Basis::Circular => &CIRCULAR_COLUMNS,
        }
    }

    /// The order of the Jones matrices' rows and columns, as in `lamella
    /// spectrum --format json`'s `jones_basis`.
    fn jones_order(self) -> (&'static str, &'static str) {
        match self {
            Basis::Linear => ("p", "s"),
            Basis::Circular => ("L", "R"),
        }
    }

    /// A point's Jones matrices in this basis.
    fn jones(self, j: &Jones) -> Jones {
        match self {
            Basis::Linear => *j,
            Basis::Circular => j.circular(),
        }
    }
}

#[pymethods]
impl Spectrum {
    /// Wavelengths, nm (W,).
    #[getter]
    fn wavelength_nm(&self, py: Python<'_>) -> Py<PyAny> {
        self.wavelength_nm.clone_ref(py)
    }

    /// Angles of incidence, degrees (A,).
    #[getter]
    fn angle_deg(&self, py: Python<'_>) -> Py<PyAny> {
        self.angle_deg.clone_ref(py)
    }

    /// "linear" (R_s, R_p, T_s, T_p) or "circular" (R_L, R_R, T_L, T_R).
    #[getter]
    fn basis(&self) -> &'static str {
        self.basis.name()
    }

    /// The order of the Jones matrices' rows (outgoing) and columns
    /// (incident): ("p", "s") or ("L", "R").
    #[getter]
    fn jones_basis(&self) -> (&'static str, &'static str) {
        self.basis.jones_order()
    }

    /// Complex reflection Jones matrices (A, W, 2, 2), flux-normalized
    /// (|entry|² is a fraction of the incident power), or None.
    #[getter]
    fn r_jones(&self, py: Python<'_>) -> Option<Py<PyAny>> {
        self.r_jones.as_ref().map(|j| j.clone_ref(py))
    }

    /// Complex transmission Jones matrices (A, W, 2, 2), flux-normalized,
    /// or None.
    #[getter]
    fn t_jones(&self, py: Python<'_>) -> Option<Py<PyAny>> {
        self.t_jones.as_ref().map(|j| j.clone_ref(py))
    }

    /// The result columns by name (`R_s` … in the linear basis, `R_L` … in
    /// the circular one).
    fn __getattr__(&self, py: Python<'_>, name: &str) -> PyResult<Py<PyAny>> {
        let names = &self.basis.names()[2..];
        match names.iter().position(|n| *n == name) {
            Some(i) => Ok(self.columns[i].clone_ref(py)),
            None => Err(pyo3::exceptions::PyAttributeError::new_err(format!(
                "a Spectrum in the {} basis has no attribute {name:?} (its columns: {})",
                self.basis.name(),
                names.join(", ")
            ))),
        }
    }

    fn __dir__(&self) -> Vec<&'static str> {
        let mut names = vec![
            "wavelength_nm",
            "angle_deg",
            "basis",
            "jones_basis",
            "r_jones",
            "t_jones",
            "to_pandas",
        ];
        names.extend(&self.basis.names()[2..]);
        names
    }

    /// to_pandas() -> pandas.DataFrame
    ///
    /// One row per (angle, wavelength), angles as the outer loop, with the
    /// columns of `lamella spectrum`'s CSV in this basis: wavelength_nm,
    /// angle_deg, then R_s, R_p, R, T_s, T_p, T, A (or R_L, R_R, R, T_L,
    /// T_R, T, A). Needs pandas.
    fn to_pandas<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        let np = py.import("numpy")?;
        let w = self.wavelength_nm.bind(py);
        let a = self.angle_deg.bind(py);
        let (na, nw) = (a.len()?, w.len()?);
        let names = self.basis.names();
        let cols = PyDict::new(py);
        cols.set_item(names[0], np.call_method1("tile", (w, na))?)?;
        cols.set_item(names[1], np.call_method1("repeat", (a, nw))?)?;
        for (name, v) in names[2..].iter().zip(&self.columns) {
            cols.set_item(*name, v.bind(py).call_method0("ravel")?)?;
        }
        py.import("pandas")?.call_method1("DataFrame", (cols,))
    }

    fn __repr__(&self, py: Python<'_>) -> PyResult<String> {
        Ok(format!(
            "<lamella.Spectrum: {} angles × {} wavelengths, {} basis>",
            self.angle_deg.bind(py).len()?,
            self.wavelength_nm.bind(py).len()?,
            self.basis.name()
        ))
    }
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
    basis: &str,
    jones: Option<bool>,
) -> PyResult<Spectrum> {
    let s = &scene.inner;
    let refused = |e| PyErr::from(scene.failure(e));
    s.require_film().map_err(refused)?;
    let basis = Basis::parse(basis)?;
    let aniso = s.anisotropic();
    let jones = jones.unwrap_or(aniso);
    if jones {
        s.require_coherent().map_err(refused)?;
    }
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
            .map_err(refused)?;
    }
    let large = nw * na * work_per_point(s) > SMALL_WORK;
    let Grid { spectra, lossless } = run(py, large, |stop| {
        computed(s, &scene.label, &w, &a, jones, stop)
    })?;
    let mut cols: [Vec<f64>; 7] = std::array::from_fn(|_| Vec::with_capacity(nw * na));
    for (i, x) in spectra.rt.iter().enumerate() {
        let lossless = lossless[i % nw];
        // As `lamella spectrum` tabulates them: circular totals from the
        // Jones matrices where the layers mix polarizations, else from s and p.
        let values = match (basis, &spectra.jones) {
            (Basis::Linear, _) => x.columns(lossless),
            (Basis::Circular, Some(j)) if aniso => Circular::of(&j[i]).columns(lossless),
            (Basis::Circular, _) => Circular::of_isotropic(x).columns(lossless),
        };
        for (c, v) in cols.iter_mut().zip(values) {
            c.push(v);
        }
    }
    let [c0, c1, c2, c3, c4, c5, c6] = cols.map(|c| array2(py, (na, nw), c).map(Bound::unbind));
    let (r_jones, t_jones) = match &spectra.jones {
        Some(list) => {
            // Each point's matrices turned into the basis once; then the
            // reflection and transmission entries, row-major per point.
            let turned: Vec<Jones> = list.iter().map(|j| basis.jones(j)).collect();
            let entries = |reflection: bool| -> Vec<Complex64> {
                turned
                    .iter()
                    .flat_map(|j| {
                        let m = if reflection { j.r } else { j.t };
                        [m[(0, 0)], m[(0, 1)], m[(1, 0)], m[(1, 1)]]
                    })
                    .collect()
            };
            let shape = [na, nw, 2, 2];
            (
                Some(arrayd(py, &shape, entries(true))?.unbind()),
                Some(arrayd(py, &shape, entries(false))?.unbind()),
            )
        }
        None => (None, None),
    };
    Ok(Spectrum {
        wavelength_nm: array1(py, w).into_any().unbind(),
        angle_deg: array1(py, a).into_any().unbind(),
        basis,
        columns: [c0?, c1?, c2?, c3?, c4?, c5?, c6?],
        r_jones,
        t_jones,
    })
}
