//! `Scene.layer_absorption`, `Scene.field` and `Scene.bands`: what happens
//! inside the stack, as the engine computes it for `lamella spectrum
//! --layer-absorption`, `lamella field` and `lamella bands`.

use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};

use crate::convert::{array1, array2, array3};
use crate::errors::Failure;
use crate::interrupt::run;
use crate::scene::Scene;

/// Absorptance of each layer over the scene's grid (unpolarized).
///
/// Attributes: `columns` (list of str: `A_1` … `A_K` for the layers as
/// written, depth first, a layer in a repeat group summed over its periods;
/// then `A_substrate` and `A_backing` for a substrate sheet and a black
/// backing), `values` (float64 array (A, W, C) in the order of `columns`;
/// the columns of a point add up to `Spectrum.A`), `wavelength_nm` (W,) and
/// `angle_deg` (A,).
#[pyclass(module = "lamella", frozen, get_all)]
pub struct LayerAbsorption {
    /// Column names.
    columns: Vec<String>,
    /// Absorptance (A, W, C).
    values: Py<PyAny>,
    /// Wavelengths, nm (W,).
    wavelength_nm: Py<PyAny>,
    /// Angles of incidence, degrees (A,).
    angle_deg: Py<PyAny>,
}

#[pymethods]
impl LayerAbsorption {
    fn __repr__(&self) -> String {
        format!("<lamella.LayerAbsorption: {}>", self.columns.join(", "))
    }
}

/// |E|² against depth at one wavelength, angle and polarization.
///
/// Attributes: `z_nm` (N,) depth in nm from the first interface (negative
/// in the incident medium), `layer` (N,) int64 (0 the incident medium, 1 …
/// K the layers as written, K + 1 the substrate), `E2` (N,) |E|² relative
/// to the incident wave, and `wavelength_nm`, `angle_deg`, `polarization`.
#[pyclass(module = "lamella", frozen, get_all)]
pub struct FieldProfile {
    /// Depths, nm (N,).
    z_nm: Py<PyAny>,
    /// Layer numbers (N,).
    layer: Py<PyAny>,
    /// |E|² relative to the incident wave (N,).
    #[pyo3(name = "E2")]
    e2: Py<PyAny>,
    /// Vacuum wavelength, nm.
    wavelength_nm: f64,
    /// Angle of incidence, degrees.
    angle_deg: f64,
    /// "s" or "p".
    polarization: String,
}

#[pymethods]
impl FieldProfile {
    fn __repr__(&self, py: Python<'_>) -> PyResult<String> {
        Ok(format!(
            "<lamella.FieldProfile: {} depths at {} nm, {}°, {}>",
            self.z_nm.bind(py).len()?,
            self.wavelength_nm,
            self.angle_deg,
            self.polarization
        ))
    }
}

/// The photonic bands of the first repeat group's period.
///
/// Attributes: `group` (its key, e.g. "stack[0]"), `wavelength_nm` (W,),
/// `angle_deg` (A,), `half_trace_s` and `half_trace_p` (A, W): cos KΛ =
/// ½ tr M of the period (Yeh, Yariv & Hong, J. Opt. Soc. Am. 67, 423,
/// 1977), and `stop_bands`: a list of dicts {angle_deg, polarization,
/// from_nm, to_nm} where |½ tr M| > 1.
#[pyclass(module = "lamella", frozen, get_all)]
pub struct Bands {
    /// The group's key.
    group: String,
    /// Wavelengths, nm (W,).
    wavelength_nm: Py<PyAny>,
    /// Angles of incidence, degrees (A,).
    angle_deg: Py<PyAny>,
    /// ½ tr M for s (A, W).
    half_trace_s: Py<PyAny>,
    /// ½ tr M for p (A, W).
    half_trace_p: Py<PyAny>,
    /// The stop bands.
    stop_bands: Py<PyList>,
}

#[pymethods]
impl Bands {
    fn __repr__(&self, py: Python<'_>) -> String {
        format!(
            "<lamella.Bands of {}: {} stop bands>",
            self.group,
            self.stop_bands.bind(py).len()
        )
    }
}

/// The polarization number of "s" or "p".
pub fn wave(polarization: &str) -> Result<usize, Failure> {
    match polarization {
        "s" => Ok(0),
        "p" => Ok(1),
        other => Err(Failure::input(format!(
            "polarization = {other:?}: expected \"s\" or \"p\" (a field profile follows one wave)"
        ))),
    }
}

/// `Scene.layer_absorption()`.
pub fn layer_absorption(py: Python<'_>, scene: &Scene) -> PyResult<LayerAbsorption> {
    let s = &scene.inner;
    let a = run(py, true, |_| {
        s.layer_absorption().map_err(|e| scene.failure(e))
    })?;
    let (na, nw, nc) = (s.angles_deg.len(), s.wavelengths_nm.len(), a.columns.len());
    let flat: Vec<f64> = a.values.into_iter().flatten().flatten().collect();
    Ok(LayerAbsorption {
        columns: a.columns,
        values: array3(py, (na, nw, nc), flat)?.unbind(),
        wavelength_nm: array1(py, s.wavelengths_nm.clone()).into_any().unbind(),
        angle_deg: array1(py, s.angles_deg.clone()).into_any().unbind(),
    })
}

/// `Scene.field(...)`.
pub fn field(
    py: Python<'_>,
    scene: &Scene,
    wavelength_nm: f64,
    angle_deg: f64,
    polarization: &str,
    points: usize,
) -> PyResult<FieldProfile> {
    let pol = wave(polarization)?;
    let s = &scene.inner;
    let profile = run(py, false, |_| {
        s.field_profile(wavelength_nm, angle_deg, pol, points)
            .map_err(|e| scene.failure(e))
    })?;
    Ok(FieldProfile {
        z_nm: array1(py, profile.iter().map(|p| p.z_nm).collect())
            .into_any()
            .unbind(),
        layer: numpy::IntoPyArray::into_pyarray(
            profile.iter().map(|p| p.layer as i64).collect::<Vec<_>>(),
            py,
        )
        .into_any()
        .unbind(),
        e2: array1(py, profile.iter().map(|p| p.e2).collect())
            .into_any()
            .unbind(),
        wavelength_nm,
        angle_deg,
        polarization: polarization.to_string(),
    })
}

/// `Scene.bands()`.
pub fn bands(py: Python<'_>, scene: &Scene) -> PyResult<Bands> {
    let s = &scene.inner;
    let b = run(py, true, |_| s.bands().map_err(|e| scene.failure(e)))?;
    let (na, nw) = (b.angles_deg.len(), b.wavelengths_nm.len());
    let [hs, hp] = b
        .half_trace
        .map(|h| array2(py, (na, nw), h.into_iter().flatten().collect()));
    let stop = PyList::empty(py);
    for band in &b.stop_bands {
        let d = PyDict::new(py);
        d.set_item("angle_deg", band.angle_deg)?;
        d.set_item(
            "polarization",
            if band.polarization == 0 { "s" } else { "p" },
        )?;
        d.set_item("from_nm", band.from_nm)?;
        d.set_item("to_nm", band.to_nm)?;
        stop.append(d)?;
    }
    Ok(Bands {
        group: b.group,
        wavelength_nm: array1(py, b.wavelengths_nm).into_any().unbind(),
        angle_deg: array1(py, b.angles_deg).into_any().unbind(),
        half_trace_s: hs?.unbind(),
        half_trace_p: hp?.unbind(),
        stop_bands: stop.unbind(),
    })
}
