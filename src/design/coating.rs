//! The design tools on an effect-pigment coating: the variables are the
//! platelet's layers (`/coating/platelet/…` pointers) and colours are taken
//! at measurement geometries through the platelet model, where a film's are
//! taken at angles of incidence.

use super::evaluator::Evaluator;
use super::variables::{Variable, with_thicknesses};
use crate::angle_colour::Viewing;
use crate::colorimetry::{ColourOptions, Weights};
use crate::error::{Error, Result};
use crate::pigment::{Coating, Geometry, Template};
use crate::scene::{Item, Scene};

/// Where a colour is judged: an angle of incidence on a film, or a
/// measurement geometry of a coating.
#[derive(Debug, Clone, PartialEq)]
pub enum At {
    /// Angle of incidence in degrees.
    Angle(f64),
    /// Illumination and detection directions.
    Geometry(Geometry),
}

impl At {
    /// The angle, for a film.
    pub fn angle_deg(&self) -> Option<f64> {
        match self {
            At::Angle(a) => Some(*a),
            At::Geometry(_) => None,
        }
    }

    /// The geometry, for a coating.
    pub fn geometry(&self) -> Option<&Geometry> {
        match self {
            At::Angle(_) => None,
            At::Geometry(g) => Some(g),
        }
    }
}

/// The scene and its coating when it has a `coating` section (the
/// platelet's materials are among the scene's media).
pub fn with_coating(scene: &Scene) -> Result<(Scene, Option<Coating>)> {
    Ok((scene.clone(), scene.coating.clone()))
}

/// The layers the design tools work on: the coating's platelet, or the
/// scene's stack.
pub fn design_items<'a>(scene: &'a Scene, coating: Option<&'a Coating>) -> &'a [Item] {
    coating.map_or(&scene.stack, |c| &c.platelet)
}

/// Reflectance factor spectra of platelet designs at a list of geometries.
pub struct CoatingEvaluator {
    platelet: Vec<Item>,
    template: Template,
    vars: Vec<Variable>,
    geometries: Vec<Geometry>,
}

impl CoatingEvaluator {
    /// Evaluates designs of `coating` (its media in `scene`, on the scene's
    /// wavelength grid) at `geometries`, with `vars` the platelet layers.
    pub fn new(
        scene: &Scene,
        coating: &Coating,
        vars: Vec<Variable>,
        geometries: &[Geometry],
    ) -> Result<CoatingEvaluator> {
        Ok(CoatingEvaluator {
            platelet: coating.platelet.clone(),
            template: Template::new(scene, coating, Some(geometries))?,
            vars,
            geometries: geometries.to_vec(),
        })
    }

    /// The reflectance factor (perfect diffuser = 1) per geometry and
    /// wavelength for thicknesses `x`, with the platelet media's real
    /// indices shifted by `dn` when given.
    pub fn spectra(&self, x: &[f64], dn: Option<&[f64]>) -> Vec<Vec<f64>> {
        let items = with_thicknesses(&self.platelet, &self.vars, x);
        let model = self.template.model(&items, dn);
        let nw = self.template.wavelengths_nm().len();
        self.geometries
            .iter()
            .map(|g| {
                let mut rf = vec![0.0; nw];
                model.reflectance_factor(g.illumination, g.detection, &mut rf);
                rf
            })
            .collect()
    }
}

/// Colours of designs at a list of points: a film's angles or a coating's
/// geometries.
pub(super) enum Colours {
    Film(Box<Evaluator>),
    Coating(Box<CoatingEvaluator>, Weights, ColourOptions),
}

impl Colours {
    /// Colours of designs of `scene` (or of its `coating`) with variables
    /// `vars` at `points`, as `viewing` sees them; the points must be angles
    /// for a film and geometries for a coating.
    pub(super) fn new(
        scene: &Scene,
        coating: Option<&Coating>,
        vars: Vec<Variable>,
        points: &[At],
        viewing: &Viewing,
    ) -> Result<Colours> {
        match coating {
            None => {
                let angles = points
                    .iter()
                    .map(|p| {
                        p.angle_deg().ok_or_else(|| {
                            Error::invalid(
                                "geometry",
                                &p.geometry().expect("not an angle").name,
                                "geometries need a scene with a `coating` section; give angles for a film",
                            )
                        })
                    })
                    .collect::<Result<Vec<f64>>>()?;
                if let Some(a) = angles.iter().find(|a| !(a.abs() < 90.0)) {
                    return Err(Error::invalid(
                        "angle",
                        a,
                        "angles of incidence must lie below 90°",
                    ));
                }
                Ok(Colours::Film(Box::new(Evaluator::colour(
                    scene, vars, &angles, viewing,
                )?)))
            }
            Some(c) => {
                let geometries = points
                    .iter()
                    .map(|p| {
                        p.geometry().cloned().ok_or_else(|| {
                            Error::invalid(
                                "angle",
                                p.angle_deg().expect("not a geometry"),
                                "this scene has a coating: give geometries such as 45as15 instead of angles",
                            )
                        })
                    })
                    .collect::<Result<Vec<Geometry>>>()?;
                let weights = viewing.weights(&scene.wavelengths_nm)?;
                Ok(Colours::Coating(
                    Box::new(CoatingEvaluator::new(scene, c, vars, &geometries)?),
                    weights,
                    viewing.options,
                ))
            }
        }
    }

    /// X, Y, Z (0–100) at each point for thicknesses `x` and index shifts `dn`.
    pub(super) fn xyz(&self, x: &[f64], dn: Option<&[f64]>) -> Vec<[f64; 3]> {
        match self {
            Colours::Film(e) => e.eval(x, dn, |o| o.xyz.to_vec()),
            Colours::Coating(e, weights, _) => {
                e.spectra(x, dn).iter().map(|rf| weights.xyz(rf)).collect()
            }
        }
    }

    /// The reference white and the RGB options.
    pub(super) fn white(&self) -> ([f64; 3], ColourOptions) {
        match self {
            Colours::Film(e) => e.white().expect("a colour evaluator"),
            Colours::Coating(_, weights, options) => (weights.white(), *options),
        }
    }
}
