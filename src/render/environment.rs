//! Environments for image-based lighting: what surrounds the object, as
//! radiance over every direction. Each environment is a few spectral
//! regions, each a light spectrum (an illuminant, optionally cut to a
//! wavelength band) times a scalar radiance over directions, so the film's
//! reflection of it stays spectral: a region costs one colour table, whatever
//! the picture looks like.
//!
//! Directions are taken in the environment's frame, which turns with the
//! camera's orbit (like the lights) but stays level: y up, −z the direction
//! the camera looks (toward the backdrop), +x to its right. An environment
//! image is equirectangular in that frame: its centre column lies along −z,
//! its top row straight up.

use std::str::FromStr;
use std::sync::Arc;

use glam::Vec3;
use serde_json::Value;

use super::maps::Maps;
use crate::colorimetry::Illuminant;
use crate::error::{Error, Result};

/// The built-in environments, each of our own design.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Studio {
    /// Softboxes over a floor: a large top light, a tall key strip at the
    /// front left, a dimmer fill strip at the front right, a graded grey
    /// sweep behind, all in the studio's illuminant; a narrow rim strip of
    /// CIE illuminant A (a tungsten kicker) behind on the right.
    Softboxes,
    /// A colour-matching booth: neutral grey walls and floor under a diffuser
    /// panel in the ceiling, all in the booth's illuminant, open toward the
    /// viewer.
    Booth,
    /// An overcast sky with the CIE standard overcast luminance gradation
    /// over a ground of reflectance 0.2, in CIE illuminant D65.
    Overcast,
    /// A large uniform backlit panel filling the view behind the object
    /// (within 65° of the line of sight) in a dim room: for filters and
    /// windows seen in transmission.
    LightTable,
    /// The same radiance from every direction: the physics checks' furnace.
    Uniform,
}

/// Names of the built-in environments, as written on the command line.
pub const STUDIO_NAMES: &[&str] = &["studio", "booth", "overcast", "lighttable", "uniform"];

impl Studio {
    /// The name used on the command line and in the `preview` object.
    pub fn name(self) -> &'static str {
        match self {
            Studio::Softboxes => "studio",
            Studio::Booth => "booth",
            Studio::Overcast => "overcast",
            Studio::LightTable => "lighttable",
            Studio::Uniform => "uniform",
        }
    }
}

/// A built-in environment with its strength and light.
#[derive(Debug, Clone, PartialEq)]
pub struct Procedural {
    /// Which one.
    pub studio: Studio,
    /// Scale on every radiance: at 1, the uniform environment lights a white
    /// diffuser to linear value 1 (Y = 100), like a sky light of intensity 1.
    pub intensity: f64,
    /// The light of the main region (studio, booth, light table, uniform);
    /// `None`: the scene's illuminant. The overcast sky is always D65 and the
    /// studio's rim always A.
    pub illuminant: Option<Illuminant>,
}

/// An equirectangular environment image (linear RGB, for example from a
/// Radiance HDR file) with its white balance.
#[derive(Debug, Clone, PartialEq)]
pub struct EnvImage {
    /// Where it came from (a file name), for captions and messages.
    pub name: String,
    /// Width in pixels.
    pub width: u32,
    /// Height in pixels.
    pub height: u32,
    /// Linear R, G, B of each pixel, row-major from the top.
    pub rgb: Vec<f32>,
    /// The light whose colour the image's (1, 1, 1) stands for.
    pub white: Illuminant,
}

impl EnvImage {
    /// Checks the sizes and values: at least 2 × 1 pixels, one RGB triple
    /// each, every value finite and not negative.
    pub fn new(
        name: &str,
        (width, height): (u32, u32),
        rgb: Vec<f32>,
        white: Illuminant,
    ) -> Result<EnvImage> {
        let key = "environment";
        if width < 2 || height < 1 || rgb.len() != 3 * width as usize * height as usize {
            return Err(Error::invalid(
                key,
                name,
                format!(
                    "an environment image of {width}×{height} pixels with {} values",
                    rgb.len()
                ),
            ));
        }
        if let Some(i) = rgb.iter().position(|v| !(v.is_finite() && *v >= 0.0)) {
            return Err(Error::invalid(
                key,
                name,
                format!(
                    "pixel ({}, {}) has value {}; radiance must be finite and not negative",
                    (i / 3) % width as usize,
                    (i / 3) / width as usize,
                    rgb[i]
                ),
            ));
        }
        Ok(EnvImage {
            name: name.to_string(),
            width,
            height,
            rgb,
            white,
        })
    }
}

/// What surrounds the object.
#[derive(Debug, Clone, PartialEq)]
pub enum Environment {
    /// A built-in environment.
    Procedural(Procedural),
    /// An equirectangular image, read by the caller.
    Image(Arc<EnvImage>),
}

impl Environment {
    /// A short description for captions: `studio`, `booth (A)`, `sky.hdr (white D65)`.
    pub fn describe(&self) -> String {
        match self {
            Environment::Procedural(p) => match &p.illuminant {
                Some(i) => format!("{} ({})", p.studio.name(), i.name()),
                None => p.studio.name().to_string(),
            },
            Environment::Image(i) => format!("{} (white {})", i.name, i.white.name()),
        }
    }
}

const KEYS: &[&str] = &["type", "intensity", "illuminant"];

impl Procedural {
    /// From `(key, value)` pairs: `type` (a name of [`STUDIO_NAMES`]),
    /// `intensity` (0–1e6, default 1), `illuminant` (a built-in name).
    /// `path` names errors.
    pub(crate) fn from_pairs(pairs: &[(String, Value)], path: &str) -> Result<Procedural> {
        let key = |k: &str| format!("{path}.{k}");
        let get = |k: &str| pairs.iter().find(|(n, _)| n == k).map(|(_, v)| v);
        let text = |v: &Value| {
            v.as_str()
                .map(str::to_string)
                .unwrap_or_else(|| v.to_string())
        };
        if let Some((k, v)) = pairs.iter().find(|(k, _)| !KEYS.contains(&k.as_str())) {
            return Err(Error::invalid(
                key(k),
                text(v),
                format!("unknown key (expected one of: {})", KEYS.join(", ")),
            ));
        }
        let kind = get("type").map(text).unwrap_or_default();
        let studio = match kind.as_str() {
            "studio" => Studio::Softboxes,
            "booth" => Studio::Booth,
            "overcast" => Studio::Overcast,
            "lighttable" => Studio::LightTable,
            "uniform" => Studio::Uniform,
            _ => {
                return Err(Error::invalid(
                    path,
                    &kind,
                    format!(
                        "expected one of {} or an equirectangular .hdr file",
                        STUDIO_NAMES.join(", ")
                    ),
                ));
            }
        };
        let intensity = match get("intensity") {
            None => 1.0,
            Some(v) => match v.as_f64().or_else(|| v.as_str()?.parse().ok()) {
                Some(x) if (0.0..=1e6).contains(&x) => x,
                _ => {
                    return Err(Error::invalid(
                        key("intensity"),
                        text(v),
                        "expected a number from 0 to 1e6",
                    ));
                }
            },
        };
        let illuminant = get("illuminant")
            .map(|v| Illuminant::builtin(&text(v)).map_err(|e| e.within(path)))
            .transpose()?;
        if illuminant.is_some() && studio == Studio::Overcast {
            return Err(Error::invalid(
                key("illuminant"),
                text(get("illuminant").expect("present")),
                "the overcast sky is CIE D65 daylight; choose another environment for another light",
            ));
        }
        Ok(Procedural {
            studio,
            intensity,
            illuminant,
        })
    }
}

impl FromStr for Procedural {
    type Err = Error;

    /// `NAME[,intensity=X][,illuminant=NAME]`, e.g. `booth,illuminant=A`.
    fn from_str(s: &str) -> Result<Procedural> {
        let mut parts = s.split(',').map(str::trim);
        let kind = parts.next().unwrap_or_default();
        let mut pairs = vec![("type".to_string(), Value::String(kind.to_string()))];
        for part in parts {
            let (k, v) = part.split_once('=').ok_or_else(|| {
                Error::invalid("environment", s, format!("`{part}` is not key=value"))
            })?;
            pairs.push((k.trim().to_string(), Value::String(v.trim().to_string())));
        }
        Procedural::from_pairs(&pairs, "environment")
    }
}

/// The light of one region: an illuminant (`None`: the scene's) over a
/// wavelength band (`None`: every wavelength).
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Region {
    pub(super) illuminant: Option<Illuminant>,
    pub(super) band_nm: Option<(f64, f64)>,
}

/// Band edges that split the spectrum of an image's white into three parts
/// standing for its blue, green and red channels (box functions, a simple
/// form of spectral upsampling; common practice).
pub(super) const BANDS_NM: [(f64, f64); 3] = [(0.0, 490.0), (490.0, 580.0), (580.0, 1e9)];

/// An environment sampled on an equirectangular grid, one channel per region.
pub(super) struct Baked {
    pub(super) regions: Vec<Region>,
    pub(super) maps: Maps,
    /// For an image: its channels are R, G, B, still to be turned into band
    /// weights once the bands' colours are known.
    pub(super) is_image: bool,
}

/// Width of the baked maps (height is half); 0.35° per texel.
pub(super) const BAKE_WIDTH: usize = 1024;

/// `1 − smoothstep(a, b, x)`: 1 below `a`, 0 above `b`.
fn fade(a: f32, b: f32, x: f32) -> f32 {
    let t = ((x - a) / (b - a)).clamp(0.0, 1.0);
    1.0 - t * t * (3.0 - 2.0 * t)
}

/// The direction at azimuth `az_deg` (from the line of sight, positive to the
/// right) and elevation `el_deg` in the environment's frame.
pub(super) fn direction(az_deg: f32, el_deg: f32) -> Vec3 {
    let (az, el) = (az_deg.to_radians(), el_deg.to_radians());
    Vec3::new(el.cos() * az.sin(), el.sin(), -el.cos() * az.cos())
}

/// A flat rectangular light panel seen from the object: centred at
/// (`az_deg`, `el_deg`), half-sizes in degrees across and along, with soft
/// edges (1 inside, 0 outside).
fn panel(d: Vec3, az_deg: f32, el_deg: f32, half_across: f32, half_along: f32) -> f32 {
    let c = direction(az_deg, el_deg);
    let cos = d.dot(c);
    if cos <= 0.0 {
        return 0.0;
    }
    let across = c.cross(Vec3::Y).normalize();
    let along = across.cross(c);
    let p = d / cos;
    let (x, y) = (
        p.dot(across).abs() / half_across.to_radians().tan(),
        p.dot(along).abs() / half_along.to_radians().tan(),
    );
    fade(0.9, 1.0, x) * fade(0.9, 1.0, y)
}

/// Radiance of each region of a built-in environment toward direction `d`
/// (unit, environment frame), before the intensity.
fn radiance(studio: Studio, d: Vec3) -> [f32; 3] {
    let el = d.y.clamp(-1.0, 1.0).asin().to_degrees();
    match studio {
        Studio::Softboxes => {
            // A grey sweep: brightest near the horizon, darker upward; the
            // floor as bright as the sweep's foot, so they meet seamlessly.
            let sweep = if el >= 0.0 {
                0.04 + 0.26 * (-el / 14.0).exp()
            } else {
                0.30
            };
            let lights = 4.0 * panel(d, 180.0, 62.0, 34.0, 22.0)
                + 5.0 * panel(d, -128.0, 18.0, 9.0, 34.0)
                + 1.8 * panel(d, 122.0, 14.0, 8.0, 30.0);
            let rim = 3.0 * panel(d, 38.0, 24.0, 4.0, 26.0);
            [sweep + lights, rim, 0.0]
        }
        Studio::Booth => {
            let ceiling = 2.6 * (1.0 - fade(50.0, 56.0, el));
            // Walls of a box open toward the viewer (+z): the front is the
            // dimmer room outside.
            let front = 1.0 - fade(0.2, 0.5, d.z);
            let walls = 0.42 * (1.0 - front) + 0.12 * front;
            let floor = 0.48;
            let v = if el < 0.0 {
                floor
            } else {
                ceiling + walls * fade(50.0, 56.0, el)
            };
            [v, 0.0, 0.0]
        }
        Studio::Overcast => {
            // P. Moon and D. E. Spencer, "Illumination from a non-uniform
            // sky", Illuminating Engineering 37, 707 (1942): L(γ) =
            // L_z (1 + 2 sin γ)/3 at elevation γ, the CIE standard overcast
            // sky since 1955. Zenith L_z = 1. The ground (reflectance 0.2,
            // common practice) is lit by E_h = 7πL_z/9 and sends ρE_h/π.
            let v = if el >= 0.0 {
                (1.0 + 2.0 * d.y) / 3.0
            } else {
                0.2 * 7.0 / 9.0
            };
            [v, 0.0, 0.0]
        }
        Studio::LightTable => {
            let off_axis = (-d.z).clamp(-1.0, 1.0).acos().to_degrees();
            [0.05 + 0.95 * fade(62.0, 66.0, off_axis), 0.0, 0.0]
        }
        Studio::Uniform => [1.0, 0.0, 0.0],
    }
}

impl Environment {
    /// The regions and their maps on a grid of `width` × `width/2` texels.
    pub(super) fn bake(&self, width: usize) -> Baked {
        match self {
            Environment::Procedural(p) => {
                let main = Region {
                    illuminant: p.illuminant.clone(),
                    band_nm: None,
                };
                let regions = match p.studio {
                    Studio::Softboxes => vec![
                        main,
                        Region {
                            illuminant: Some(Illuminant::builtin("A").expect("built in")),
                            band_nm: None,
                        },
                    ],
                    Studio::Overcast => vec![Region {
                        illuminant: Some(Illuminant::builtin("D65").expect("built in")),
                        band_nm: None,
                    }],
                    _ => vec![main],
                };
                let k = p.intensity as f32;
                Baked {
                    regions,
                    maps: Maps::from_fn(width, |d| radiance(p.studio, d).map(|v| k * v)),
                    is_image: false,
                }
            }
            Environment::Image(image) => Baked {
                regions: BANDS_NM
                    .iter()
                    .map(|&band| Region {
                        illuminant: Some(image.white.clone()),
                        band_nm: Some(band),
                    })
                    .collect(),
                maps: Maps::from_image(width, image),
                is_image: true,
            },
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_parse_with_options() {
        let p: Procedural = "booth,illuminant=A,intensity=2".parse().unwrap();
        assert_eq!(p.studio, Studio::Booth);
        assert_eq!(p.intensity, 2.0);
        assert_eq!(p.illuminant.unwrap().name(), "A");
        for name in STUDIO_NAMES {
            assert_eq!(name.parse::<Procedural>().unwrap().studio.name(), *name);
        }
        for bad in [
            "",
            "garden",
            "studio,glow=1",
            "studio,intensity=-1",
            "overcast,illuminant=A",
        ] {
            assert!(bad.parse::<Procedural>().is_err(), "{bad}");
        }
    }

    #[test]
    fn image_values_are_checked() {
        let d65 = Illuminant::builtin("D65").unwrap();
        assert!(EnvImage::new("a", (2, 1), vec![1.0; 6], d65.clone()).is_ok());
        assert!(EnvImage::new("a", (2, 1), vec![1.0; 5], d65.clone()).is_err());
        let err = EnvImage::new("a", (2, 1), vec![1.0, 1.0, 1.0, 1.0, f32::NAN, 1.0], d65)
            .unwrap_err()
            .to_string();
        assert!(err.contains("pixel (1, 0)"), "{err}");
    }

    #[test]
    fn overcast_gradation_and_panels() {
        // Zenith three times the horizon (Moon & Spencer 1942).
        let z = radiance(Studio::Overcast, Vec3::Y)[0];
        let h = radiance(Studio::Overcast, direction(0.0, 0.0))[0];
        assert!((z / h - 3.0).abs() < 1e-5);
        assert_eq!(panel(direction(30.0, 20.0), 30.0, 20.0, 5.0, 5.0), 1.0);
        assert_eq!(panel(direction(50.0, 20.0), 30.0, 20.0, 5.0, 5.0), 0.0);
    }
}
