//! How a scene is looked at: the keyword arguments shared by every function
//! that turns spectra into colour, read as the command line reads its flags.

use lamella::angle_colour::{Polarization, Side, Viewing};
use lamella::colorimetry::{ColourOptions, GamutMapping, Illuminant, RgbSpace};
use lamella::render::parse_analyzer;
use lamella::scene::Scene;

use crate::errors::{Failure, Outcome};

/// The viewing options of a call.
#[derive(Debug, Clone)]
pub struct ViewArgs {
    /// Built-in name or a `wavelength_nm,power` CSV file; `None`: the scene's.
    pub illuminant: Option<String>,
    /// `CIE1931_2` or `CIE1964_10`; `None`: the scene's.
    pub observer: Option<String>,
    /// `reflect` or `transmit`.
    pub side: String,
    /// `unpolarized`, `s`, `p`, `left` or `right`.
    pub polarization: String,
    /// `clip` or `chroma`.
    pub gamut: String,
    /// `left` or `right`: an ideal circular analyser before the observer,
    /// with unpolarized light.
    pub analyzer: Option<String>,
}

impl ViewArgs {
    /// The scene's viewing with these overrides (errors name the argument
    /// and its value).
    pub fn viewing(&self, scene: &Scene) -> Outcome<Viewing> {
        let bad = |_: &str, e: lamella::Error| Failure::input(e.to_string());
        let mut v = Viewing::of_scene(scene).map_err(|e| bad("scene", e))?;
        if let Some(name) = &self.illuminant {
            v.illuminant = if name.to_ascii_lowercase().ends_with(".csv") {
                let text = std::fs::read_to_string(name)
                    .map_err(|e| Failure::input(format!("illuminant {name}: {e}")))?;
                Illuminant::from_csv(name, &text).map_err(|e| bad("illuminant", e))?
            } else {
                Illuminant::builtin(name).map_err(|e| bad("illuminant", e))?
            };
        }
        if let Some(o) = &self.observer {
            v.observer = o.parse().map_err(|e| bad("observer", e))?;
        }
        v.side = self.side.parse::<Side>().map_err(|e| bad("side", e))?;
        v.polarization = self
            .polarization
            .parse::<Polarization>()
            .map_err(|e| bad("polarization", e))?;
        if let Some(h) = &self.analyzer {
            if v.polarization != Polarization::Unpolarized {
                return Err(Failure::input(format!(
                    "analyzer = {h:?}: the analyser is for unpolarized light; leave out polarization"
                )));
            }
            v.analyzer = Some(parse_analyzer(h).map_err(|e| bad("analyzer", e))?);
        }
        v.options = ColourOptions {
            space: RgbSpace::Srgb,
            gamut: self
                .gamut
                .parse::<GamutMapping>()
                .map_err(|e| bad("gamut", e))?,
        };
        Ok(v)
    }
}
