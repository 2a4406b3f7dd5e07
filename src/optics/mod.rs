//! Thin-film optics by the characteristic-matrix (Abelès) method: coherent
//! stacks with repeat groups, absorbing and evanescent layers, thick
//! incoherent sheets, for s and p polarization at oblique incidence.
//!
//! The method follows Macleod, *Thin-Film Optical Filters* (4th ed., 2010),
//! ch. 2, and Born & Wolf, *Principles of Optics* (7th ed., 1999), §1.6.

pub mod aniso;
mod bands;
mod batch;
mod double_double;
mod exact;
mod field;
mod flux;
mod matrix;
mod medium;
mod simd;
mod spectra;
mod stack;
mod trig;

pub use bands::half_trace;
pub use batch::Batch;
pub use field::FieldPoint;
pub use flux::Absorption;
pub use medium::{MediumTerms, Probe, Sine, Wavenumber};
pub use spectra::{CIRCULAR_COLUMNS, Circular, LINEAR_COLUMNS, Rows, Spectra, compute};
pub use stack::{Behind, Exit, LANES, Node, Rt, Stack};
