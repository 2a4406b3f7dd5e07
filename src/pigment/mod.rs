//! Effect-pigment coatings: interference platelets in a clear binder over a
//! background, and their colour at the multi-angle measurement geometries.
//!
//! Typical use: `Model::new(&scene, coating)` with the scene's validated
//! [`crate::scene::Scene::coating`], then [`measure`] at the coating's
//! geometries. Design tools
//! build a [`Template`] for the geometries they target, a model per edited
//! platelet from it, and call [`colours`]; renderers tabulate
//! [`Model::reflectance_parts`] over pairs of directions.

mod coating;
mod geometry;
mod model;

pub use coating::{Background, Coating, Orientation};
pub use geometry::{Geometry, SET_45, parse as parse_geometries, parse_name};
pub use model::{Model, TABLE_STEP_DEG, Template};

use crate::angle_colour::check_colour;
use crate::colorimetry::{Colour, ColourOptions, Weights, hue_difference_deg};
use crate::error::{Error, Result};

/// The colour of the coating at one geometry.
#[derive(Debug, Clone)]
pub struct GeometryColour {
    /// The geometry.
    pub geometry: Geometry,
    /// Reflectance factor per wavelength (perfect diffuser = 1).
    pub reflectance_factor: Vec<f64>,
    /// Its colour (XYZ with the perfect diffuser at Y = 100).
    pub colour: Colour,
}

/// Multi-angle colour of a coating with the trade's summary numbers.
#[derive(Debug, Clone)]
pub struct Measurement {
    /// One entry per geometry, in the order given.
    pub geometries: Vec<GeometryColour>,
    /// Lightness flop index from 45as15, 45as45 and 45as110, when all three
    /// are present and L*15 > L*110.
    pub flop_index: Option<f64>,
    /// Why the flop index is missing.
    pub flop_note: Option<String>,
    /// Net hue change following the geometries in order (sum of the
    /// consecutive h_ab differences, each wrapped to (−180°, 180°]).
    pub hue_travel_deg: Option<f64>,
    /// Per distinct illumination angle: the CIE Y of the binder surface's
    /// mirror reflection, excluded from every geometry.
    pub surface_gloss_y: Vec<(f64, f64)>,
}

/// The colour at each of `geometries`.
pub fn colours(
    model: &Model,
    geometries: &[Geometry],
    weights: &Weights,
    options: &ColourOptions,
) -> Vec<GeometryColour> {
    geometries
        .iter()
        .map(|g| {
            let mut rf = vec![0.0; model.wavelengths_nm().len()];
            model.reflectance_factor(g.illumination, g.detection, &mut rf);
            let colour = Colour::new(weights.xyz(&rf), weights.white(), options);
            GeometryColour {
                geometry: g.clone(),
                reflectance_factor: rf,
                colour,
            }
        })
        .collect()
}

/// Lightness flop index 2.69 (L*15 − L*110)^1.11 / (L*45)^0.86 from the
/// L* at 45as15, 45as45 and 45as110 (common practice); `None` unless
/// L*15 > L*110 and L*45 > 0.
pub fn flop_index(l15: f64, l45: f64, l110: f64) -> Option<f64> {
    (l15 > l110 && l45 > 0.0).then(|| 2.69 * (l15 - l110).powf(1.11) / l45.powf(0.86))
}

/// Colours at every geometry, the flop index, the hue travel and the
/// surface gloss; a reflectance factor or colour that is not a finite number
/// is an error naming its geometry.
pub fn measure(
    model: &Model,
    geometries: &[Geometry],
    weights: &Weights,
    options: &ColourOptions,
) -> Result<Measurement> {
    let list = colours(model, geometries, weights, options);
    for g in &list {
        let at = &g.geometry.name;
        let wavelengths = model.wavelengths_nm();
        if let Some((w, rf)) = wavelengths
            .iter()
            .zip(&g.reflectance_factor)
            .find(|(_, rf)| !rf.is_finite())
        {
            return Err(Error::not_computable(
                "reflectance factor",
                format!("{at}, {w} nm"),
                *rf,
            ));
        }
        check_colour(&g.colour, at)?;
    }
    let lightness = |asp: f64| {
        list.iter()
            .find(|g| {
                g.geometry.in_plane
                    && g.geometry.illumination_deg == 45.0
                    && g.geometry.aspecular_deg == asp
            })
            .map(|g| g.colour.lab[0])
    };
    let (flop_index, flop_note) = match (lightness(15.0), lightness(45.0), lightness(110.0)) {
        (Some(a), Some(b), Some(c)) => match flop_index(a, b, c) {
            Some(f) => (Some(f), None),
            None => (
                None,
                Some(format!(
                    "undefined: needs L*15 > L*110 and L*45 > 0 (L* = {a:.2}, {b:.2}, {c:.2})"
                )),
            ),
        },
        _ => (
            None,
            Some("needs the geometries 45as15, 45as45 and 45as110".to_string()),
        ),
    };
    let hue_travel_deg = (list.len() >= 2).then(|| {
        list.windows(2)
            .map(|p| hue_difference_deg(p[0].colour.lch[2], p[1].colour.lch[2]))
            .sum()
    });
    let mut angles: Vec<f64> = geometries.iter().map(|g| g.illumination_deg).collect();
    angles.sort_by(f64::total_cmp);
    angles.dedup();
    let surface_gloss_y: Vec<(f64, f64)> = angles
        .into_iter()
        .map(|a| (a, weights.xyz(&model.surface_reflectance(a))[1]))
        .collect();
    if let Some((a, y)) = surface_gloss_y.iter().find(|(_, y)| !y.is_finite()) {
        return Err(Error::not_computable(
            "surface gloss Y",
            format!("{a}° illumination"),
            *y,
        ));
    }
    Ok(Measurement {
        geometries: list,
        flop_index,
        flop_note,
        hue_travel_deg,
        surface_gloss_y,
    })
}
