//! `lamella`: structural colour design. Thin-film optics by the
//! characteristic-matrix method, optical constants, colorimetry and the
//! design tools built on them. The library does no file or terminal I/O.

// `!(x > 0.0)` is written on purpose throughout: it also rejects NaN.
#![deny(missing_docs)]
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod angle_colour;
pub mod chart;
pub mod colorimetry;
pub mod design;
pub mod error;
pub mod grid;
pub mod materials;
pub mod optics;
pub mod pigment;
pub mod raster;
pub mod render;
pub mod report;
pub mod scene;
pub mod tabulated;

pub use error::{Error, Result};
