//! The colour of a scene at each angle: spectra from the engine weighed by an
//! illuminant and observer, on the reflected or transmitted side.

use std::str::FromStr;

use crate::colorimetry::{Colour, ColourOptions, Illuminant, Observer, Weights};
use crate::error::{Error, Result};
use crate::optics::{Rt, Spectra};
use crate::scene::{Scene, check_spectra};

/// Which light reaches the observer.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Side {
    /// Light reflected by the coating.
    #[default]
    Reflect,
    /// Light transmitted through the coating and substrate.
    Transmit,
}

/// Polarization of the illumination.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Polarization {
    /// Unpolarized: the mean of s and p.
    #[default]
    Unpolarized,
    /// s (TE) only.
    S,
    /// p (TM) only.
    P,
}

impl FromStr for Side {
    type Err = Error;
    fn from_str(s: &str) -> Result<Self> {
        match s {
            "reflect" => Ok(Side::Reflect),
            "transmit" => Ok(Side::Transmit),
            _ => Err(Error::invalid("side", s, "expected reflect or transmit")),
        }
    }
}

impl Side {
    /// `reflect` or `transmit`.
    pub fn name(self) -> &'static str {
        match self {
            Side::Reflect => "reflect",
            Side::Transmit => "transmit",
        }
    }
}

impl Polarization {
    /// The fraction of light on `side` for this polarization.
    pub fn of(self, x: &Rt, side: Side) -> f64 {
        match (side, self) {
            (Side::Reflect, Polarization::Unpolarized) => x.r(),
            (Side::Reflect, Polarization::S) => x.rs,
            (Side::Reflect, Polarization::P) => x.rp,
            (Side::Transmit, Polarization::Unpolarized) => x.t(),
            (Side::Transmit, Polarization::S) => x.ts,
            (Side::Transmit, Polarization::P) => x.tp,
        }
    }

    /// `unpolarized`, `s` or `p`.
    pub fn name(self) -> &'static str {
        match self {
            Polarization::Unpolarized => "unpolarized",
            Polarization::S => "s",
            Polarization::P => "p",
        }
    }
}

impl FromStr for Polarization {
    type Err = Error;
    fn from_str(s: &str) -> Result<Self> {
        match s {
            "unpolarized" | "both" => Ok(Polarization::Unpolarized),
            "s" => Ok(Polarization::S),
            "p" => Ok(Polarization::P),
            _ => Err(Error::invalid(
                "polarization",
                s,
                "expected unpolarized, s or p",
            )),
        }
    }
}

/// How a scene is looked at: light, observer, side, polarization and RGB rendering.
#[derive(Debug, Clone)]
pub struct Viewing {
    /// The light source.
    pub illuminant: Illuminant,
    /// The standard observer.
    pub observer: Observer,
    /// Reflected or transmitted light.
    pub side: Side,
    /// Polarization of the light.
    pub polarization: Polarization,
    /// RGB space and gamut mapping.
    pub options: ColourOptions,
}

impl Viewing {
    /// The scene's own illuminant and observer, reflected unpolarized light,
    /// sRGB. (Kept fallible for callers; a validated scene always has both.)
    pub fn of_scene(scene: &Scene) -> Result<Viewing> {
        Ok(Viewing {
            illuminant: scene.illuminant.clone(),
            observer: scene.observer,
            side: Side::Reflect,
            polarization: Polarization::Unpolarized,
            options: ColourOptions::default(),
        })
    }

    /// Colour weights on a wavelength grid.
    pub fn weights(&self, wavelengths_nm: &[f64]) -> Result<Weights> {
        Weights::new(wavelengths_nm, &self.illuminant, self.observer)
    }

    /// The colour of one angle's spectrum.
    pub fn colour(&self, weights: &Weights, rt: &[Rt], scratch: &mut Vec<f64>) -> Colour {
        scratch.clear();
        scratch.extend(rt.iter().map(|x| self.polarization.of(x, self.side)));
        Colour::new(weights.xyz(scratch), weights.white(), &self.options)
    }
}

/// The colour at every angle of `spectra`; a spectrum value that is not a
/// finite number is an error naming its wavelength and angle.
pub fn angle_colours(spectra: &Spectra, viewing: &Viewing) -> Result<Vec<Colour>> {
    let weights = viewing.weights(&spectra.wavelengths_nm)?;
    check_spectra(spectra)?;
    let mut scratch = Vec::with_capacity(spectra.wavelengths_nm.len());
    (0..spectra.angles_deg.len())
        .map(|a| {
            let colour = viewing.colour(&weights, spectra.at_angle(a), &mut scratch);
            check_colour(&colour, &format!("{}°", spectra.angles_deg[a]))?;
            Ok(colour)
        })
        .collect()
}

/// Refuses a colour with any value that is not a finite number (`at` names
/// the angle or geometry).
pub fn check_colour(c: &Colour, at: &str) -> Result<()> {
    let values = c
        .xyz
        .iter()
        .chain(&c.xy)
        .chain(&c.lab)
        .chain(&c.lch)
        .chain(&c.rgb);
    match values.copied().find(|v| !v.is_finite()) {
        Some(v) => Err(Error::not_computable("colour", at, v)),
        None => Ok(()),
    }
}
