//! Preview settings: defaults, ranges, and the `key=value` light notation
//! shared by the scene's `preview` object (read with the scene) and the
//! command line.

use std::str::FromStr;

use serde_json::Value;

use super::camera::View;
use super::environment::{Environment, Procedural};
use crate::colorimetry::{Illuminant, srgb_decode};
use crate::error::{Error, Result};
use crate::optics::aniso::Handedness;
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
    /// A flat square pane facing the camera (a window or filter), open, so
    /// light crosses the film once.
    Pane,
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
            "pane" => Shape::Pane,
            _ => match s.strip_prefix("mesh:") {
                Some(path) if !path.is_empty() => Shape::Mesh(path.to_string()),
                _ => {
                    return Err(Error::invalid(
                        "shape",
                        s,
                        "expected sphere, cylinder, torus, bottle, sheet, pane or mesh:PATH.obj",
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
    /// Image-based lighting around the object (added to the lights).
    pub environment: Option<Environment>,
    /// Which light of the film is shown.
    pub mode: ViewMode,
    /// Reflectance of a matte floor under the object (needs an environment);
    /// `None`: no floor.
    pub floor: Option<f64>,
    /// Whether the object casts its soft shadow on the floor.
    pub shadow: bool,
    /// A circular analyser in front of the eye (circular-polarizer glasses).
    pub analyzer: Option<Handedness>,
    /// Whether a caption strip with the render's provenance is added below.
    pub caption: bool,
    /// With a turntable: the camera elevation swept from the first value to
    /// the second and back over the turn, in degrees.
    pub orbit_elevation_deg: Option<(f64, f64)>,
}

/// Which light of the film reaches the eye.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum ViewMode {
    /// Light the film reflects (over its base).
    #[default]
    Reflect,
    /// Light from behind that the film transmits: the object is clear (the
    /// film on a thin clear shell, no base).
    Transmit,
    /// Both, on a clear object.
    Both,
}

impl ViewMode {
    /// `reflect`, `transmit` or `both`.
    pub fn name(self) -> &'static str {
        match self {
            ViewMode::Reflect => "reflect",
            ViewMode::Transmit => "transmit",
            ViewMode::Both => "both",
        }
    }

    /// Whether reflected light is shown.
    pub fn reflects(self) -> bool {
        self != ViewMode::Transmit
    }

    /// Whether transmitted light is shown (the object is then clear).
    pub fn transmits(self) -> bool {
        self != ViewMode::Reflect
    }
}

impl FromStr for ViewMode {
    type Err = Error;
    fn from_str(s: &str) -> Result<Self> {
        match s {
            "reflect" => Ok(ViewMode::Reflect),
            "transmit" => Ok(ViewMode::Transmit),
            "both" => Ok(ViewMode::Both),
            _ => Err(Error::invalid(
                "view",
                s,
                "expected reflect, transmit or both",
            )),
        }
    }
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
    "environment",
    "view",
    "floor",
    "shadow",
    "analyzer",
    "caption",
    "orbit_elevation_deg",
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
            environment: None,
            mode: ViewMode::Reflect,
            floor: None,
            shadow: true,
            analyzer: None,
            caption: false,
            orbit_elevation_deg: None,
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
        if self.lights.is_empty() && self.environment.is_none() {
            return Err(Error::invalid(
                "lights",
                "[]",
                "at least one light or an environment is needed",
            ));
        }
        if let Some(f) = self.floor {
            if !(0.0..=1.0).contains(&f) {
                return Err(Error::invalid("floor", f, "a reflectance from 0 to 1"));
            }
            if self.environment.is_none() {
                return Err(Error::invalid(
                    "floor",
                    f,
                    "a floor is lit by an environment; choose one (e.g. studio)",
                ));
            }
        }
        if let Some((a, b)) = self.orbit_elevation_deg {
            if !(a.abs() <= 89.0 && b.abs() <= 89.0) {
                return Err(Error::invalid(
                    "orbit_elevation_deg",
                    format!("{a}:{b}"),
                    "both elevations must lie within ±89°",
                ));
            }
            if self.turntable == 0 {
                return Err(Error::invalid(
                    "orbit_elevation_deg",
                    format!("{a}:{b}"),
                    "sweeps the elevation over a turntable; give turntable frames too",
                ));
            }
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

/// `on`/`off` (also true/false, yes/no) for the tone curve.
pub fn parse_tone(s: &str) -> Result<bool> {
    parse_switch("tone", s)
}

/// `on`/`off` (also true/false, yes/no) for the setting `key`.
pub fn parse_switch(key: &str, s: &str) -> Result<bool> {
    match s {
        "on" | "true" | "yes" => Ok(true),
        "off" | "false" | "no" => Ok(false),
        _ => Err(Error::invalid(key, s, "expected on or off")),
    }
}

/// A floor: `off`, or its reflectance from 0 to 1.
pub fn parse_floor(s: &str) -> Result<Option<f64>> {
    if s == "off" {
        return Ok(None);
    }
    match s.parse::<f64>() {
        Ok(x) if (0.0..=1.0).contains(&x) => Ok(Some(x)),
        _ => Err(Error::invalid(
            "floor",
            s,
            "expected off or a reflectance from 0 to 1, e.g. 0.5",
        )),
    }
}

/// An analyser: `left` or `right`.
pub fn parse_analyzer(s: &str) -> Result<Handedness> {
    match s {
        "left" => Ok(Handedness::Left),
        "right" => Ok(Handedness::Right),
        _ => Err(Error::invalid("analyzer", s, "expected left or right")),
    }
}

/// An elevation sweep `FROM:TO` in degrees.
pub fn parse_sweep(s: &str) -> Result<(f64, f64)> {
    let bad = || {
        Error::invalid(
            "orbit_elevation_deg",
            s,
            "expected FROM:TO in degrees, e.g. 10:40",
        )
    };
    let (a, b) = s.split_once(':').ok_or_else(bad)?;
    let number = |t: &str| t.trim().parse::<f64>().ok().filter(|x| x.is_finite());
    Ok((number(a).ok_or_else(bad)?, number(b).ok_or_else(bad)?))
}

/// Settings given by a front end (command-line flags, Python keywords) over
/// a scene's preview, as written (text where the notation is shared); each
/// field overrides the setting of the same name.
#[derive(Debug, Clone, Default)]
pub struct Overrides {
    /// `shape` notation of [`Shape`].
    pub shape: Option<String>,
    /// `WxH`.
    pub size: Option<String>,
    /// Supersampling.
    pub ssaa: Option<u32>,
    /// Exposure.
    pub exposure: Option<f64>,
    /// `on`/`off`.
    pub tone: Option<String>,
    /// Roughness in degrees.
    pub roughness_deg: Option<f64>,
    /// `black`, `white` or `#RRGGBB`.
    pub base: Option<String>,
    /// Lights in the notation of [`Light`]; they replace the preview's.
    pub lights: Option<Vec<String>>,
    /// Camera azimuth.
    pub orbit_deg: Option<f64>,
    /// Camera elevation.
    pub elevation_deg: Option<f64>,
    /// Field of view.
    pub fov_deg: Option<f64>,
    /// Camera distance.
    pub distance: Option<f64>,
    /// Turntable frames.
    pub turntable: Option<u32>,
    /// An environment (an image is read by the front end). Given without
    /// `lights`, it replaces the preview's lights too.
    pub environment: Option<Environment>,
    /// `reflect`, `transmit` or `both`.
    pub view: Option<String>,
    /// `off` or a reflectance.
    pub floor: Option<String>,
    /// `on`/`off`.
    pub shadow: Option<String>,
    /// `left` or `right`.
    pub analyzer: Option<String>,
    /// `on`/`off`.
    pub caption: Option<String>,
    /// `FROM:TO`.
    pub orbit_elevation_deg: Option<String>,
}

/// An override that was refused: the setting's key and why.
#[derive(Debug)]
pub struct OverrideError {
    /// The setting (a key of [`PREVIEW_KEYS`]); `None` for a check of the
    /// settings together.
    pub key: Option<&'static str>,
    /// What is wrong.
    pub error: Error,
}

impl Overrides {
    /// `base` with these overrides applied, every range checked.
    pub fn apply(&self, mut s: Settings) -> std::result::Result<Settings, OverrideError> {
        fn at<T>(key: &'static str, r: Result<T>) -> std::result::Result<T, OverrideError> {
            r.map_err(|error| OverrideError {
                key: Some(key),
                error,
            })
        }
        if let Some(t) = &self.shape {
            s.shape = at("shape", t.parse())?;
        }
        if let Some(t) = &self.size {
            (s.width, s.height) = at("size", crate::raster::parse_size(t, SIZE_LIMITS))?;
        }
        if let Some(t) = &self.tone {
            s.tone = at("tone", parse_tone(t))?;
        }
        if let Some(t) = &self.base {
            s.base = at("base", t.parse())?;
        }
        if let Some(lights) = &self.lights {
            s.lights = lights
                .iter()
                .map(|l| at("lights", l.parse::<Light>()))
                .collect::<std::result::Result<_, _>>()?;
        } else if self.environment.is_some() {
            s.lights.clear();
        }
        if let Some(e) = &self.environment {
            s.environment = Some(e.clone());
        }
        if let Some(t) = &self.view {
            s.mode = at("view", t.parse())?;
        }
        if let Some(t) = &self.floor {
            s.floor = at("floor", parse_floor(t))?;
        }
        if let Some(t) = &self.shadow {
            s.shadow = at("shadow", parse_switch("shadow", t))?;
        }
        if let Some(t) = &self.analyzer {
            s.analyzer = Some(at("analyzer", parse_analyzer(t))?);
        }
        if let Some(t) = &self.caption {
            s.caption = at("caption", parse_switch("caption", t))?;
        }
        if let Some(t) = &self.orbit_elevation_deg {
            s.orbit_elevation_deg = Some(at("orbit_elevation_deg", parse_sweep(t))?);
        }
        s.ssaa = self.ssaa.unwrap_or(s.ssaa);
        s.exposure = self.exposure.unwrap_or(s.exposure);
        s.roughness_deg = self.roughness_deg.unwrap_or(s.roughness_deg);
        s.view.orbit_deg = self.orbit_deg.unwrap_or(s.view.orbit_deg);
        s.view.elevation_deg = self.elevation_deg.unwrap_or(s.view.elevation_deg);
        s.view.fov_deg = self.fov_deg.unwrap_or(s.view.fov_deg);
        s.view.distance = self.distance.or(s.view.distance);
        s.turntable = self.turntable.unwrap_or(s.turntable);
        s.check()
            .map_err(|error| OverrideError { key: None, error })?;
        Ok(s)
    }
}

/// A built-in environment in its notation (`studio`, `booth,illuminant=A`,
/// …); `None` when `text` names a file (it ends in `.hdr` or `.pic`, any case).
pub fn builtin_environment(text: &str) -> Option<Result<Environment>> {
    let lower = text.to_ascii_lowercase();
    if lower.ends_with(".hdr") || lower.ends_with(".pic") {
        return None;
    }
    Some(text.parse::<Procedural>().map(Environment::Procedural))
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
