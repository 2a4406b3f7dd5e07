//! An effect-pigment coating: a clear binder holding platelets (a layer
//! stack from the engine) with a spread of orientations, over a background,
//! measured at a set of geometries. The scene's `coating` section is read
//! into it with the scene ([`crate::scene::Scene::coating`]).

use super::geometry::Geometry;
use crate::error::{Error, Result};
use crate::scene::{Disorder, Item, Scene};

/// How platelet normals are spread about the coating normal (azimuthally
/// uniform in both cases).
#[derive(Debug, Clone, PartialEq)]
pub enum Orientation {
    /// Density of normals per unit solid angle ∝ exp(−θ²/2σ²), θ the tilt.
    Gaussian {
        /// σ in degrees.
        sigma_deg: f64,
    },
    /// Density of normals per unit solid angle, tabulated as (tilt in
    /// degrees, relative weight), linear between points, zero beyond the last.
    Density(Vec<(f64, f64)>),
}

/// What lies under the binder: a Lambertian reflector.
#[derive(Debug, Clone, PartialEq)]
pub enum Background {
    /// Reflects nothing.
    Black,
    /// A constant diffuse reflectance 0–1 (`"white"` is 1).
    Grey(f64),
    /// A diffuse reflectance spectrum (wavelength nm, reflectance 0–1),
    /// linear between points.
    Spectrum(Vec<(f64, f64)>),
}

impl Background {
    /// Diffuse reflectance at each wavelength; a spectrum must cover the grid.
    pub fn on(&self, wavelengths_nm: &[f64]) -> Result<Vec<f64>> {
        match self {
            Background::Black => Ok(vec![0.0; wavelengths_nm.len()]),
            Background::Grey(r) => Ok(vec![*r; wavelengths_nm.len()]),
            Background::Spectrum(points) => wavelengths_nm
                .iter()
                .map(|&w| {
                    interpolate(points, w).ok_or_else(|| {
                        Error::invalid(
                            "coating.background.reflectance",
                            format!("{w} nm"),
                            format!(
                                "the table covers {}–{} nm, not the scene's wavelength grid",
                                points[0].0,
                                points[points.len() - 1].0
                            ),
                        )
                    })
                })
                .collect(),
        }
    }
}

/// Linear interpolation in a table sorted by x; `None` outside it.
pub(super) fn interpolate(points: &[(f64, f64)], x: f64) -> Option<f64> {
    let i = points.partition_point(|p| p.0 < x);
    if i == 0 {
        return (points[0].0 == x).then_some(points[0].1);
    }
    let (x0, y0) = points[i - 1];
    let &(x1, y1) = points.get(i)?;
    Some(y0 + (y1 - y0) * (x - x0) / (x1 - x0))
}

/// A validated `coating` section.
#[derive(Debug, Clone)]
pub struct Coating {
    /// The binder medium (index into the scene's media); lossless.
    pub binder: usize,
    /// The platelet's layers, from one face to the other; layer pointers are
    /// `/coating/platelet/…`, so design tools can edit them in the document.
    pub platelet: Vec<Item>,
    /// Thickness disorder of the platelet layers (e.g. an uneven mica core).
    pub disorder: Option<Disorder>,
    /// Spread of platelet orientations.
    pub orientation: Orientation,
    /// Platelet area per unit coating area: the mean number of platelets a
    /// line along the normal crosses.
    pub coverage: f64,
    /// What lies under the binder.
    pub background: Background,
    /// The measurement geometries, in listed order.
    pub geometries: Vec<Geometry>,
}

impl Coating {
    /// A copy of the scene's coating, or an error saying that the command
    /// needs a `coating` section.
    pub fn from_scene(scene: &Scene) -> Result<Coating> {
        scene.coating.clone().ok_or_else(|| {
            Error::invalid(
                "coating",
                "(missing)",
                "this command needs a `coating` section (binder, platelet, orientation, background, geometries)",
            )
        })
    }
}
