//! `lamella`: structural colour design. Thin-film optics by the
//! characteristic-matrix method, optical constants, colorimetry and the
//! design tools built on them. The library does no file or terminal I/O.
//!
//! A scene is parsed and validated once, into a typed [`scene::Scene`];
//! everything downstream trusts it. A quarter-wave pair of layers on glass,
//! its reflectance and its colour at normal incidence:
//!
//! ```
//! use lamella::angle_colour::{Viewing, angle_colours};
//! use lamella::scene::Scene;
//!
//! let text = r#"{
//!   "materials": {"low": {"n": 1.46}, "high": {"n": 2.35}, "glass": {"n": 1.52}},
//!   "stack": [{"repeat": 4, "stack": [
//!     {"material": "high", "thickness_nm": 58.5},
//!     {"material": "low", "thickness_nm": 94.2}]}],
//!   "substrate": "glass",
//!   "wavelengths_nm": {"from": 380, "to": 780, "step": 5},
//!   "angles_deg": [0, 45]
//! }"#;
//! // The scene names no files, so the loader is never called.
//! let scene = Scene::from_json(text, &|path| Err(format!("{path}: no files here")))?;
//! let spectra = scene.spectra()?;
//! // At normal incidence the stop band is centred on 4 n d = 550 nm.
//! let at_550 = spectra.wavelengths_nm.iter().position(|&w| w == 550.0).unwrap();
//! assert!(spectra.at_angle(0)[at_550].r() > 0.8);
//!
//! let colours = angle_colours(&spectra, &Viewing::of_scene(&scene)?)?;
//! assert_eq!(colours.len(), 2);
//! println!("0°: L*a*b* {:?}, {}", colours[0].lab, colours[0].hex);
//! # Ok::<(), lamella::Error>(())
//! ```

// `!(x > 0.0)` is written on purpose throughout: it also rejects NaN.
#![deny(missing_docs)]
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod angle_colour;
pub mod chart;
pub mod colorimetry;
pub mod compare;
pub mod design;
pub mod error;
pub mod grid;
pub mod materials;
pub mod measured;
pub mod optics;
pub mod pigment;
pub mod raster;
pub mod render;
pub mod report;
pub mod scene;
pub mod tabulated;

pub use error::{Error, Result};
