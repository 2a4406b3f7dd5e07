//! `multiangle`: the colour of an effect-pigment coating at the multi-angle
//! measurement geometries, as `lamella multiangle` reports it.

use lamella::pigment::{Coating, Model, TABLE_STEP_DEG, measure, parse_name};
use lamella::scene::GRID_BYTES_PER_POINT;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList, PyString};

use crate::convert::{array1, array2};
use crate::errors::{Failure, Outcome};
use crate::interrupt::run;
use crate::scene::Scene;
use crate::view::ViewArgs;

/// Geometry names: a list of names (or sets such as "45"), or one
/// comma-separated string as on the command line.
fn geometry_names(obj: &Bound<'_, PyAny>) -> Outcome<Vec<String>> {
    if let Ok(s) = obj.cast::<PyString>() {
        return Ok(s.to_string().split(',').map(str::to_string).collect());
    }
    obj.extract::<Vec<String>>().map_err(|_| {
        Failure::input(format!(
            "geometries = {obj}: expected names such as [\"45as15\", \"45as110\"] or \"45\""
        ))
    })
}

/// multiangle(scene, geometries=None, spectra=False, illuminant=None,
/// observer=None, gamut="clip") -> dict
///
/// Colour of the scene's effect-pigment `coating` at measurement geometries
/// (names such as "45as15": illumination 45° from the normal, detection 15°
/// from the specular direction toward the normal), as `lamella multiangle`.
/// `geometries` overrides the coating's own (a list of names, the set "45",
/// or a comma-separated string).
///
/// Returns a dict: `title`, `illuminant`, `observer`; per geometry (arrays of
/// shape (G,)) `name` (list), `illumination_deg`, `aspecular_deg`,
/// `in_plane`, `X, Y, Z` (reflectance factor relative to the perfect white
/// diffuser under the same geometry, so Y = 100 for it), `L, a, b, C, h`,
/// `srgb` (G, 3), `hex`, `in_gamut`; with `spectra`, `reflectance_factor`
/// (G, W) and `wavelength_nm`; the flop index `flop_index` (or `flop_note`
/// saying why it is undefined), `hue_travel_deg` (two or more geometries) and
/// `surface_gloss_Y` (the binder's mirror gloss, excluded above).
#[pyfunction]
#[pyo3(signature = (scene, geometries=None, spectra=false, illuminant=None, observer=None, gamut="clip"))]
pub fn multiangle<'py>(
    py: Python<'py>,
    scene: &Scene,
    geometries: Option<&Bound<'py, PyAny>>,
    spectra: bool,
    illuminant: Option<String>,
    observer: Option<String>,
    gamut: &str,
) -> PyResult<Bound<'py, PyDict>> {
    scene.warn(py, true)?;
    let s = &scene.inner;
    let bad = |e| PyErr::from(scene.failure(e));
    let mut coating = Coating::from_scene(s).map_err(bad)?;
    s.check_grid_size(
        (90.0 / TABLE_STEP_DEG) as usize + 1,
        GRID_BYTES_PER_POINT,
        "multiangle",
    )
    .map_err(bad)?;
    if let Some(g) = geometries {
        coating.geometries = geometry_names(g)?
            .iter()
            .map(|t| parse_name(t, "geometries"))
            .collect::<Result<Vec<_>, _>>()
            .map_err(|e| Failure::input(e.to_string()))?
            .concat();
    }
    let viewing = scene.viewing(&ViewArgs {
        illuminant,
        observer,
        side: "reflect".into(),
        polarization: "unpolarized".into(),
        gamut: gamut.into(),
        analyzer: None,
    })?;
    let m = run(py, true, |stop| {
        let weights = viewing
            .weights(&s.wavelengths_nm)
            .map_err(|e| scene.failure(e))?;
        let model = Model::new(s, &coating).map_err(|e| scene.failure(e))?;
        stop.check()?;
        measure(&model, &coating.geometries, &weights, &viewing.options)
            .map_err(|e| scene.failure(e))
    })?;
    let list = &m.geometries;
    let n = list.len();
    let col = |f: &dyn Fn(usize) -> f64| array1(py, (0..n).map(f).collect());
    let out = PyDict::new(py);
    out.set_item("title", &s.title)?;
    out.set_item("illuminant", viewing.illuminant.name())?;
    out.set_item("observer", viewing.observer.name())?;
    out.set_item(
        "name",
        PyList::new(py, list.iter().map(|g| g.geometry.name.as_str()))?,
    )?;
    out.set_item(
        "illumination_deg",
        col(&|i| list[i].geometry.illumination_deg),
    )?;
    out.set_item("aspecular_deg", col(&|i| list[i].geometry.aspecular_deg))?;
    out.set_item(
        "in_plane",
        numpy::PyArray1::from_vec(py, list.iter().map(|g| g.geometry.in_plane).collect()),
    )?;
    for (k, f) in [
        (
            "X",
            (|c: &lamella::colorimetry::Colour| c.xyz[0]) as fn(&_) -> f64,
        ),
        ("Y", |c| c.xyz[1]),
        ("Z", |c| c.xyz[2]),
        ("L", |c| c.lab[0]),
        ("a", |c| c.lab[1]),
        ("b", |c| c.lab[2]),
        ("C", |c| c.lch[1]),
        ("h", |c| c.lch[2]),
    ] {
        out.set_item(k, col(&|i| f(&list[i].colour)))?;
    }
    out.set_item(
        "srgb",
        array2(py, (n, 3), list.iter().flat_map(|g| g.colour.rgb).collect())?,
    )?;
    out.set_item(
        "hex",
        PyList::new(py, list.iter().map(|g| g.colour.hex.as_str()))?,
    )?;
    out.set_item(
        "in_gamut",
        numpy::PyArray1::from_vec(py, list.iter().map(|g| g.colour.in_gamut).collect()),
    )?;
    if spectra {
        let nw = s.wavelengths_nm.len();
        out.set_item(
            "reflectance_factor",
            array2(
                py,
                (n, nw),
                list.iter()
                    .flat_map(|g| g.reflectance_factor.iter().copied())
                    .collect(),
            )?,
        )?;
        out.set_item("wavelength_nm", array1(py, s.wavelengths_nm.clone()))?;
    }
    // A summary that is undefined is left out (its note says why).
    match (m.flop_index, &m.flop_note) {
        (Some(f), _) => out.set_item("flop_index", f)?,
        (None, Some(note)) => out.set_item("flop_note", note)?,
        (None, None) => {}
    }
    if let Some(h) = m.hue_travel_deg {
        out.set_item("hue_travel_deg", h)?;
    }
    let gloss = PyList::empty(py);
    for (a, y) in &m.surface_gloss_y {
        let d = PyDict::new(py);
        d.set_item("illumination_deg", a)?;
        d.set_item("Y", y)?;
        gloss.append(d)?;
    }
    out.set_item("surface_gloss_Y", gloss)?;
    Ok(out)
}
