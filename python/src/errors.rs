//! Errors as Python sees them: `SceneError` (a `ValueError`) for bad input
//! with the command line's message, `NotComputableError` (a `SceneError`)
//! for a value that is not a finite number, `KeyboardInterrupt` for Ctrl-C.

use pyo3::exceptions::{PyRuntimeError, PyValueError};
use pyo3::prelude::*;

pyo3::create_exception!(
    lamella,
    SceneError,
    PyValueError,
    "Bad input: a scene, an argument or a measured file that is refused. The \
     message names the file (when there is one), the key and the value, as the \
     command line does."
);

pyo3::create_exception!(
    lamella,
    NotComputableError,
    SceneError,
    "A result that is not a finite number, with the quantity and the point \
     (wavelength and angle, geometry or design) in the message; refused \
     rather than returned as NaN."
);

pyo3::create_exception!(
    lamella,
    SceneWarning,
    pyo3::exceptions::PyUserWarning,
    "What a valid scene may still get wrong (a material used outside the range \
     its source vouches for, a coarse wavelength step, a very thick coherent \
     layer), naming the key."
);

/// Why a call failed, before it becomes a Python exception (built without
/// the interpreter, so worker threads can return it).
#[derive(Debug)]
pub enum Failure {
    /// Bad input: `SceneError`.
    Input(String),
    /// A value that cannot be computed: `NotComputableError`.
    NotComputable(String),
    /// Ctrl-C was pressed: the pending `KeyboardInterrupt` is raised.
    Interrupted,
}

impl Failure {
    /// An engine error, with the scene's file name before it when there is
    /// one (`path: key = value: why`, as the command line prints it).
    pub fn engine(label: &str, e: lamella::Error) -> Failure {
        let message = if label.is_empty() {
            e.to_string()
        } else {
            format!("{label}: {e}")
        };
        match e {
            lamella::Error::NotComputable { .. } => Failure::NotComputable(message),
            _ => Failure::Input(message),
        }
    }

    /// Bad input described by `message`.
    pub fn input(message: impl Into<String>) -> Failure {
        Failure::Input(message.into())
    }
}

impl From<Failure> for PyErr {
    fn from(f: Failure) -> PyErr {
        match f {
            Failure::Input(m) => SceneError::new_err(m),
            Failure::NotComputable(m) => NotComputableError::new_err(m),
            // Reached only when no signal error is pending (the interrupt
            // runner raises the pending one itself).
            Failure::Interrupted => pyo3::exceptions::PyKeyboardInterrupt::new_err(()),
        }
    }
}

/// Result of the work behind a Python call.
pub type Outcome<T> = Result<T, Failure>;

/// An internal error that should never happen, as a `RuntimeError`.
pub fn internal(what: impl std::fmt::Display) -> PyErr {
    PyRuntimeError::new_err(format!("lamella: internal error: {what}"))
}
