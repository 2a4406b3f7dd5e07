//! The `lamella` Python package's native module: thin bindings of the
//! structural-colour engine. Every computation is the engine's; this crate
//! converts arguments and results, releases the GIL for long calls and stops
//! them on Ctrl-C.

// `!(x > 0.0)` is written on purpose: it also rejects NaN.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

mod batch;
mod chart;
mod colour;
mod convert;
mod design;
mod errors;
mod files;
mod grid;
mod inside;
mod interrupt;
mod pigment;
mod render;
mod scene;
mod spectrum;
mod view;

use pyo3::prelude::*;

#[pymodule]
fn _lamella(m: &Bound<'_, PyModule>) -> PyResult<()> {
    let py = m.py();
    m.add("SceneError", py.get_type::<errors::SceneError>())?;
    m.add(
        "NotComputableError",
        py.get_type::<errors::NotComputableError>(),
    )?;
    m.add("SceneWarning", py.get_type::<errors::SceneWarning>())?;
    m.add_class::<scene::Scene>()?;
    m.add_class::<spectrum::Spectrum>()?;
    m.add_class::<colour::Colours>()?;
    m.add_class::<inside::LayerAbsorption>()?;
    m.add_class::<inside::FieldProfile>()?;
    m.add_class::<inside::Bands>()?;
    m.add_function(wrap_pyfunction!(scene::_scene_from_state, m)?)?;
    m.add_function(wrap_pyfunction!(batch::reflectance_batch, m)?)?;
    m.add_function(wrap_pyfunction!(design::match_, m)?)?;
    m.add_function(wrap_pyfunction!(design::tolerance, m)?)?;
    m.add_function(wrap_pyfunction!(design::fit, m)?)?;
    m.add_function(wrap_pyfunction!(design::_sweep, m)?)?;
    m.add_function(wrap_pyfunction!(design::_sweep_size, m)?)?;
    m.add_function(wrap_pyfunction!(design::_shard_range, m)?)?;
    m.add_function(wrap_pyfunction!(pigment::multiangle, m)?)?;
    m.add_function(wrap_pyfunction!(render::render, m)?)?;
    m.add_class::<chart::Chart>()?;
    m.add_function(wrap_pyfunction!(chart::chart_of, m)?)?;
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    Ok(())
}
