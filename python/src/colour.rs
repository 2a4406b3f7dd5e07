//! `Scene.color`: the colour at every angle with the colour travel, as
//! `lamella color` reports it.

use lamella::angle_colour::angle_colours;
use lamella::colorimetry::travel_points;
use lamella::scene::GRID_BYTES_PER_POINT;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};

use crate::convert::{array1, array2};
use crate::grid::{SMALL_WORK, spectra, work_per_point};
use crate::interrupt::run;
use crate::scene::Scene;
use crate::view::ViewArgs;

/// The colour at every angle of a scene.
///
/// Arrays of shape (A,): `angle_deg` (degrees), `X, Y, Z` (perfect
/// reflecting diffuser Y = 100), `x, y` (chromaticity), `L, a, b` (CIELAB),
/// `C` (chroma C*ab), `h` (hue angle h_ab, degrees), `hue_shift_deg`,
/// `delta_e00_from_first` (travel from the first angle) and
/// `delta_e00_per_deg` (rate toward the next angle); `srgb` (A, 3), encoded
/// sRGB 0–1 after gamut mapping; `hex`, a list of "#RRGGBB"; `in_gamut`, a
/// bool array (judged on linear sRGB before mapping).
#[pyclass(module = "lamella", name = "Colors", frozen, get_all)]
pub struct Colours {
    angle_deg: Py<PyAny>,
    #[pyo3(name = "X")]
    big_x: Py<PyAny>,
    #[pyo3(name = "Y")]
    big_y: Py<PyAny>,
    #[pyo3(name = "Z")]
    big_z: Py<PyAny>,
    x: Py<PyAny>,
    y: Py<PyAny>,
    #[pyo3(name = "L")]
    l: Py<PyAny>,
    a: Py<PyAny>,
    b: Py<PyAny>,
    #[pyo3(name = "C")]
    c: Py<PyAny>,
    h: Py<PyAny>,
    srgb: Py<PyAny>,
    hex: Py<PyAny>,
    in_gamut: Py<PyAny>,
    hue_shift_deg: Py<PyAny>,
    delta_e00_from_first: Py<PyAny>,
    delta_e00_per_deg: Py<PyAny>,
}

/// Record keys in `lamella color`'s order (`srgb` is three columns in a table).
const KEYS: [&str; 17] = [
    "angle_deg",
    "X",
    "Y",
    "Z",
    "x",
    "y",
    "L",
    "a",
    "b",
    "C",
    "h",
    "srgb",
    "hex",
    "in_gamut",
    "hue_shift_deg",
    "delta_e00_from_first",
    "delta_e00_per_deg",
];

impl Colours {
    fn fields(&self) -> [&Py<PyAny>; 17] {
        [
            &self.angle_deg,
            &self.big_x,
            &self.big_y,
            &self.big_z,
            &self.x,
            &self.y,
            &self.l,
            &self.a,
            &self.b,
            &self.c,
            &self.h,
            &self.srgb,
            &self.hex,
            &self.in_gamut,
            &self.hue_shift_deg,
            &self.delta_e00_from_first,
            &self.delta_e00_per_deg,
        ]
    }
}

#[pymethods]
impl Colours {
    /// to_pandas() -> pandas.DataFrame
    ///
    /// One row per angle with the columns of `lamella color --format csv`
    /// (`srgb` as srgb_r, srgb_g, srgb_b). Needs pandas.
    fn to_pandas<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        let cols = PyDict::new(py);
        for (k, v) in KEYS.iter().zip(self.fields()) {
            let v = v.bind(py);
            if *k == "srgb" {
                for (i, c) in ["srgb_r", "srgb_g", "srgb_b"].iter().enumerate() {
                    let col = v.get_item((pyo3::types::PySlice::full(py), i))?;
                    cols.set_item(*c, col)?;
                }
            } else {
                cols.set_item(*k, v)?;
            }
        }
        py.import("pandas")?.call_method1("DataFrame", (cols,))
    }

    /// to_records() -> list of dict
    ///
    /// One dict per angle with the keys of `lamella color --format json`.
    fn to_records<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        let n = self.angle_deg.bind(py).len()?;
        let out = PyList::empty(py);
        for i in 0..n {
            let d = PyDict::new(py);
            for (k, v) in KEYS.iter().zip(self.fields()) {
                let item = v.bind(py).get_item(i)?;
                let item = if item.hasattr("tolist")? {
                    item.call_method0("tolist")?
                } else {
                    item
                };
                d.set_item(*k, item)?;
            }
            out.append(d)?;
        }
        Ok(out)
    }

    fn __len__(&self, py: Python<'_>) -> PyResult<usize> {
        self.angle_deg.bind(py).len()
    }

    fn __repr__(&self, py: Python<'_>) -> PyResult<String> {
        Ok(format!("<lamella.Colors: {} angles>", self.__len__(py)?))
    }
}

/// `Scene.color`.
pub fn colours(py: Python<'_>, scene: &Scene, view: &ViewArgs) -> PyResult<Colours> {
    let s = &scene.inner;
    scene.warn(py, true)?;
    s.require_film()
        .and_then(|()| s.check_grid_size(s.angles_deg.len(), GRID_BYTES_PER_POINT, "color"))
        .map_err(|e| PyErr::from(scene.failure(e)))?;
    let viewing = scene.viewing(view)?;
    let large = s.wavelengths_nm.len() * s.angles_deg.len() * work_per_point(s) > SMALL_WORK;
    let (list, travel) = run(py, large, |stop| {
        let spectra = spectra(s, &scene.label, &viewing, stop)?;
        let list = angle_colours(&spectra, &viewing).map_err(|e| scene.failure(e))?;
        let samples: Vec<(f64, [f64; 3])> = s
            .angles_deg
            .iter()
            .copied()
            .zip(list.iter().map(|c| c.lab))
            .collect();
        Ok((list, travel_points(&samples)))
    })?;
    let n = list.len();
    let col = |f: &dyn Fn(usize) -> f64| -> Py<PyAny> {
        array1(py, (0..n).map(f).collect()).into_any().unbind()
    };
    let srgb: Vec<f64> = list.iter().flat_map(|c| c.rgb).collect();
    let hex: Vec<&str> = list.iter().map(|c| c.hex.as_str()).collect();
    let in_gamut: Vec<bool> = list.iter().map(|c| c.in_gamut).collect();
    Ok(Colours {
        angle_deg: array1(py, s.angles_deg.clone()).into_any().unbind(),
        big_x: col(&|i| list[i].xyz[0]),
        big_y: col(&|i| list[i].xyz[1]),
        big_z: col(&|i| list[i].xyz[2]),
        x: col(&|i| list[i].xy[0]),
        y: col(&|i| list[i].xy[1]),
        l: col(&|i| list[i].lab[0]),
        a: col(&|i| list[i].lab[1]),
        b: col(&|i| list[i].lab[2]),
        c: col(&|i| list[i].lch[1]),
        h: col(&|i| list[i].lch[2]),
        srgb: array2(py, (n, 3), srgb)?.unbind(),
        hex: PyList::new(py, hex)?.into_any().unbind(),
        in_gamut: numpy::PyArray1::from_vec(py, in_gamut).into_any().unbind(),
        hue_shift_deg: col(&|i| travel[i].hue_shift_deg),
        delta_e00_from_first: col(&|i| travel[i].delta_e00_from_first),
        delta_e00_per_deg: col(&|i| travel[i].delta_e00_per_deg),
    })
}
