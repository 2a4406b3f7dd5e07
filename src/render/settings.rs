//! Preview settings: defaults, ranges, and the `key=value` light notation
//! shared by the scene's `preview` object (read with the scene) and the
//! command line.

use std::str::FromStr;

use serde_json::Value;

use super::camera::View;
use crate::colorimetry::{Illuminant, srgb_decode};
use crate::error::{Error, Result};
use crate::scene::json::show;

/// The object wearing the coating.
#[derive(Debug, Clone, PartialEq)]
pub enum Shape {
    /// A sphere.
    Sphere,
    /// A cylinder with flat caps.
    Cylinder,
    /// A torus.
    Torus,
    /// A bottle (surface of revolution).
    Bottle,
    /// A wavy sheet (height field).
    Sheet,
    /// A Wavefront OBJ file (path as written; the caller reads it).
    Mesh(String),
}

impl FromStr for Shape {
    type Err = Error;
    fn from_str(s: &str) -> Result<Self> {
        Ok(match s {
            "sphere" => Shape::Sphere,
            "cylinder" => Shape::Cylinder,
            "torus" => Shape::Torus,
            "bottle" => Shape::Bottle,
            "sheet" => Shape::Sheet,
            _ => match s.strip_prefix("mesh:") {
                Some(path) if !path.is_empty() => Shape::Mesh(path.to_string()),
                _ => {
                    return Err(Error::invalid(
                        "shape",
                        s,
                        "expected sphere, cylinder, torus, bottle, sheet or mesh:PATH.obj",
                    ));
                }
            },
        })
    }
}

/// What lies under the film.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Base {
    /// Absorbs all the light the film transmits.
    Black,
    /// A diffuse colour (linear sRGB reflectances 0–1); white is (1, 1, 1).
    Diffuse([f64; 3]),
}

impl FromStr for Base {
    type Err = Error;
    fn from_str(s: &str) -> Result<Self> {
        let bad = || Error::invalid("base", s, "expected black, white or #RRGGBB");
        match s {
            "black" => Ok(Base::Black),
            "white" => Ok(Base::Diffuse([1.0; 3])),
            _ => {
                let rgb = s
                    .strip_prefix('#')
                    .and_then(crate::colorimetry::rgb_of_hex)
                    .ok_or_else(bad)?;
                Ok(Base::Diffuse(rgb.map(srgb_decode)))
            }
        }
    }
}

/// Where a light comes from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Source {
    /// Uniform radiance from every direction.
    Sky,
    /// A distant disc of angular diameter `size_deg` (0: a directional light),
    /// `azimuth_deg` to the right of the line of sight and `elevation_deg` above it,
    /// seen from the object; fixed to the camera.
    Disc {
        /// Degrees to the right of the direction toward the eye.
        azimuth_deg: f64,
        /// Degrees above it.
        elevation_deg: f64,
        /// Angular diameter in degrees.
        size_deg: f64,
    },
}

/// A light with its strength and spectrum.
#[derive(Debug, Clone, PartialEq)]
pub struct Light {
    /// Direction and extent.
    pub source: Source,
    /// Strength: a white diffuser facing a disc light of intensity 1, or in a
    /// sky of intensity 1, renders at linear value 1 (Y = 100).
    pub intensity: f64,
    /// A built-in illuminant; `None`: the scene's illuminant.
    pub illuminant: Option<Illuminant>,
}

const LIGHT_KEYS: &[&str] = &[
    "type",
    "azimuth_deg",
    "elevation_deg",
    "size_deg",
    "intensity",
    "illuminant",
];

impl Light {
    /// A light from `(key, value)` pairs with keys from [`LIGHT_KEYS`]:
    /// `type` (sky, area or directional), `azimuth_deg`, `elevation_deg`,
    /// `size_deg` (area only), `intensity`, `illuminant`. `path` names errors.
    pub(crate) fn from_pairs(pairs: &[(String, Value)], path: &str) -> Result<Light> {
        let key = |k: &str| format!("{path}.{k}");
        let get = |k: &str| pairs.iter().find(|(n, _)| n == k).map(|(_, v)| v);
        if let Some((k, v)) = pairs
            .iter()
            .find(|(k, _)| !LIGHT_KEYS.contains(&k.as_str()))
        {
            return Err(Error::invalid(
                key(k),
                show(v),
                format!("unknown key (expected one of: {})", LIGHT_KEYS.join(", ")),
            ));
        }
        let number = |k: &str, default: f64| -> Result<f64> {
            match get(k) {
                None => Ok(default),
                Some(v) => match v.as_f64().or_else(|| v.as_str()?.parse().ok()) {
                    Some(x) if x.is_finite() => Ok(x),
                    _ => Err(Error::invalid(key(k), show(v), "expected a finite number")),
                },
            }
        };
        let text = |v: &Value| v.as_str().map(str::to_string).unwrap_or_else(|| show(v));
        let kind = get("type")
            .map(text)
            .ok_or_else(|| Error::invalid(key("type"), "(missing)", "sky, area or directional"))?;
        let intensity = number("intensity", 1.0)?;
        if !(0.0..=1e6).contains(&intensity) {
            return Err(Error::invalid(
                key("intensity"),
                intensity,
                "must lie from 0 to 1e6",
            ));
        }
        let only =
            |allowed: &[&str]| match pairs.iter().find(|(k, _)| !allowed.contains(&k.as_str())) {
                Some((k, v)) => Err(Error::invalid(
                    key(k),
                    show(v),
                    format!("not a key of a {kind} light"),
                )),
                None => Ok(()),
            };
        let source = match kind.as_str() {
            "sky" => {
                only(&["type", "intensity", "illuminant"])?;
                Source::Sky
            }
            "area" | "directional" => {
                let size_deg = if kind == "area" {
                    number("size_deg", 20.0)?
                } else {
                    only(&[
                        "type",
                        "azimuth_deg",
                        "elevation_deg",
                        "intensity",
                        "illuminant",
                    ])?;
                    0.0
                };
                if !(0.0..=120.0).contains(&size_deg) {
                    return Err(Error::invalid(
                        key("size_deg"),
                        size_deg,
                        "must lie from 0° to 120°",
                    ));
                }
                Source::Disc {
                    azimuth_deg: number("azimuth_deg", 0.0)?,
                    elevation_deg: number("elevation_deg", 0.0)?,
                    size_deg,
                }
            }
            _ => {
                return Err(Error::invalid(
                    key("type"),
                    &kind,
                    "expected sky, area or directional",
                ));
            }
        };
        Ok(Light {
            source,
            intensity,
            illuminant: get("illuminant")
                .map(|v| Illuminant::builtin(&text(v)).map_err(|e| e.within(path)))
                .transpose()?,
        })
    }
}

impl FromStr for Light {
    type Err = Error;

    /// `TYPE[,key=value…]`, e.g. `area,azimuth_deg=-40,elevation_deg=30,size_deg=20,intensity=2,illuminant=A`.
    fn from_str(s: &str) -> Result<Light> {
        let mut parts = s.split(',').map(str::trim);
        let kind = parts.next().unwrap_or_default();
        let mut pairs = vec![("type".to_string(), Value::String(kind.to_string()))];
        for part in parts {
            let (k, v) = part
                .split_once('=')
                .ok_or_else(|| Error::invalid("light", s, format!("`{part}` is not key=value")))?;
            pairs.push((k.trim().to_string(), Value::String(v.trim().to_string())));
        }
        Light::from_pairs(&pairs, "light")
    }
}

/// Everything a preview render needs besides the scene and the mesh.
#[derive(Debug, Clone, PartialEq)]
pub struct Settings {
    /// The object.
    pub shape: Shape,
    /// Image width in pixels.
    pub width: u32,
    /// Image height in pixels.
    pub height: u32,
    /// Supersampling factor per axis (1–8).
    pub ssaa: u32,
    /// Linear scale applied before the tone curve.
    pub exposure: f64,
    /// Whether the highlight-compressing tone curve is applied.
    pub tone: bool,
    /// Width of the microfacet (or flake) orientation distribution in degrees:
    /// arctan of the rms slope; 0 is a mirror-smooth film.
    pub roughness_deg: f64,
    /// What lies under the film.
    pub base: Base,
    /// The lights.
    pub lights: Vec<Light>,
    /// The camera.
    pub view: View,
    /// Frames of a full turn (0: one still).
    pub turntable: u32,
}

/// Keys of the scene's `preview` object.
pub const PREVIEW_KEYS: &[&str] = &[
    "shape",
    "size",
    "ssaa",
    "exposure",
    "tone",
    "roughness_deg",
    "base",
    "lights",
    "orbit_deg",
    "elevation_deg",
    "fov_deg",
    "distance",
    "turntable",
];

impl Default for Settings {
    /// An 800 × 800 sphere on a black base, 2 × 2 supersampled, lit by a dim
    /// sky and a large key light up and to the left.
    fn default() -> Self {
        Settings {
            shape: Shape::Sphere,
            width: 800,
            height: 800,
            ssaa: 2,
            exposure: 1.0,
            tone: true,
            roughness_deg: 0.0,
            base: Base::Black,
            lights: vec![
                Light {
                    source: Source::Sky,
                    intensity: 0.6,
                    illuminant: None,
                },
                Light {
                    source: Source::Disc {
                        azimuth_deg: -35.0,
                        elevation_deg: 30.0,
                        size_deg: 24.0,
                    },
                    intensity: 1.2,
                    illuminant: None,
                },
            ],
            view: View {
                orbit_deg: 0.0,
                elevation_deg: 20.0,
                fov_deg: 30.0,
                distance: None,
            },
            turntable: 0,
        }
    }
}

/// Smallest and largest side of a render in pixels.
pub const SIZE_LIMITS: (u32, u32) = (1, 16384);

impl Settings {
    /// Checks every range (called before rendering, after flags override).
    pub fn check(&self) -> Result<()> {
        if !(1..=8).contains(&self.ssaa) {
            return Err(Error::invalid(
                "ssaa",
                self.ssaa,
                "must be a whole number from 1 to 8",
            ));
        }
        if (self.width as u64 * self.height as u64) * (self.ssaa as u64).pow(2) > 1 << 28 {
            return Err(Error::invalid(
                "size",
                format!("{}x{} with ssaa {}", self.width, self.height, self.ssaa),
                "more than 2^28 samples; lower the size or ssaa",
            ));
        }
        if !(self.exposure > 0.0 && self.exposure <= 1e6) {
            return Err(Error::invalid(
                "exposure",
                self.exposure,
                "must be above 0 and at most 1e6",
            ));
        }
        if !(0.0..=60.0).contains(&self.roughness_deg) {
            return Err(Error::invalid(
                "roughness_deg",
                self.roughness_deg,
                "must lie from 0° to 60°",
            ));
        }
        if self.lights.is_empty() {
            return Err(Error::invalid(
                "lights",
                "[]",
                "at least one light is needed",
            ));
        }
        if self.turntable > 3600 {
            return Err(Error::invalid(
                "turntable",
                self.turntable,
                "at most 3600 frames",
            ));
        }
        self.view.check()
    }
}

/// `on`/`off` (also true/false, yes/no).
pub fn parse_tone(s: &str) -> Result<bool> {
    match s {
        "on" | "true" | "yes" => Ok(true),
        "off" | "false" | "no" => Ok(false),
        _ => Err(Error::invalid("tone", s, "expected on or off")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn light_notation() {
        let l: Light = "area,azimuth_deg=-40,elevation_deg=30,size_deg=10,intensity=2"
            .parse()
            .unwrap();
        assert_eq!(
            l.source,
            Source::Disc {
                azimuth_deg: -40.0,
                elevation_deg: 30.0,
                size_deg: 10.0
            }
        );
        assert_eq!(l.intensity, 2.0);
        assert!("sky,intensity=x".parse::<Light>().is_err());
        assert!("lamp".parse::<Light>().is_err());
        assert!("directional,size_deg=3".parse::<Light>().is_err());
        let err = "sky,illuminant=D66"
            .parse::<Light>()
            .unwrap_err()
            .to_string();
        assert!(err.starts_with("light.illuminant = D66"), "{err}");
    }

    #[test]
    fn ranges_are_checked() {
        let mut s = Settings::default();
        s.check().unwrap();
        s.ssaa = 9;
        assert!(s.check().is_err());
        s = Settings {
            roughness_deg: 70.0,
            ..Settings::default()
        };
        assert!(s.check().is_err());
        s = Settings {
            exposure: 0.0,
            ..Settings::default()
        };
        assert!(s.check().is_err());
    }
}
