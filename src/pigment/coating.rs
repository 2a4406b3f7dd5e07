//! The `coating` section of a scene: a clear binder holding platelets (a
//! layer stack from the engine) with a spread of orientations, over a
//! background, measured at a set of geometries.

use serde_json::{Map, Value};

use super::geometry::{self, Geometry};
use crate::error::{Error, Result};
use crate::scene::{Disorder, Item, Scene};

/// Keys of the `coating` object.
pub const KEYS: [&str; 9] = [
    "binder",
    "platelet",
    "disorder",
    "tilt_sigma_deg",
    "tilt_density",
    "platelet_coverage",
    "background",
    "geometries",
    "notes",
];

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

fn key(k: &str) -> String {
    format!("coating.{k}")
}

fn number(map: &Map<String, Value>, k: &str) -> Result<Option<f64>> {
    match map.get(k) {
        None => Ok(None),
        Some(v) => match v.as_f64() {
            Some(x) if x.is_finite() => Ok(Some(x)),
            _ => Err(Error::invalid(key(k), v, "expected a finite number")),
        },
    }
}

fn pairs(v: &Value, k: &str, what: &str) -> Result<Vec<(f64, f64)>> {
    let bad = || Error::invalid(key(k), v, format!("expected a list of [{what}] pairs"));
    let list = v.as_array().ok_or_else(bad)?;
    let points: Vec<(f64, f64)> = list
        .iter()
        .map(|p| match p.as_array().map(Vec::as_slice) {
            Some([a, b]) => match (a.as_f64(), b.as_f64()) {
                (Some(x), Some(y)) if x.is_finite() && y.is_finite() => Ok((x, y)),
                _ => Err(bad()),
            },
            _ => Err(bad()),
        })
        .collect::<Result<_>>()?;
    if points.len() < 2 || points.windows(2).any(|w| !(w[1].0 > w[0].0)) {
        return Err(Error::invalid(
            key(k),
            v,
            "needs at least two points in strictly increasing order",
        ));
    }
    Ok(points)
}

impl Coating {
    /// Reads `scene.document["coating"]`. Library materials used only by the
    /// platelet are added to the scene's media.
    pub fn from_scene(scene: &mut Scene) -> Result<Coating> {
        let document = scene.document.clone();
        let map = match document.get("coating") {
            Some(Value::Object(m)) => m,
            Some(other) => return Err(Error::invalid("coating", other, "expected a JSON object")),
            None => {
                return Err(Error::invalid(
                    "coating",
                    "(missing)",
                    "this command needs a `coating` section (binder, platelet, orientation, background, geometries)",
                ));
            }
        };
        if let Some(k) = map.keys().find(|k| !KEYS.contains(&k.as_str())) {
            return Err(Error::invalid(
                key(k),
                &map[k],
                format!("unknown key (expected one of: {})", KEYS.join(", ")),
            ));
        }
        let binder_name = match map.get("binder") {
            Some(Value::String(s)) => s.as_str(),
            Some(other) => {
                return Err(Error::invalid(
                    key("binder"),
                    other,
                    "expected a material name",
                ));
            }
            None => {
                return Err(Error::invalid(
                    key("binder"),
                    "(missing)",
                    "required: the binder's material name (define {\"n\": 1.5} under `materials` for a plain index)",
                ));
            }
        };
        let binder = scene
            .medium(binder_name)
            .ok_or_else(|| Error::invalid(key("binder"), binder_name, "unknown material"))?;
        let platelet_value = map.get("platelet").ok_or_else(|| {
            Error::invalid(
                key("platelet"),
                "(missing)",
                "required: the platelet's layers, as in `stack`",
            )
        })?;
        let platelet = scene.parse_items(platelet_value, "coating.platelet")?;
        if platelet.is_empty() {
            return Err(Error::invalid(
                key("platelet"),
                "[]",
                "a platelet needs at least one layer",
            ));
        }
        let disorder = scene.parse_disorder(map.get("disorder"), "coating.disorder", &platelet)?;

        let orientation = match (number(map, "tilt_sigma_deg")?, map.get("tilt_density")) {
            (Some(s), None) => {
                if !(0.05..=60.0).contains(&s) {
                    return Err(Error::invalid(
                        key("tilt_sigma_deg"),
                        s,
                        "must lie in 0.05–60°",
                    ));
                }
                Orientation::Gaussian { sigma_deg: s }
            }
            (None, Some(v)) => {
                let points = pairs(v, "tilt_density", "tilt_deg, weight")?;
                if points[0].0 != 0.0
                    || points.last().is_some_and(|p| p.0 > 90.0)
                    || points.iter().any(|p| p.1 < 0.0)
                    || !points.iter().any(|p| p.1 > 0.0)
                {
                    return Err(Error::invalid(
                        key("tilt_density"),
                        v,
                        "tilts run from 0 to at most 90°, weights are ≥ 0 and not all zero",
                    ));
                }
                Orientation::Density(points)
            }
            (None, None) => Orientation::Gaussian { sigma_deg: 10.0 },
            (Some(_), Some(_)) => {
                return Err(Error::invalid(
                    key("tilt_density"),
                    "(with tilt_sigma_deg)",
                    "give tilt_sigma_deg or tilt_density, not both",
                ));
            }
        };
        let coverage = number(map, "platelet_coverage")?.unwrap_or(1.0);
        if !(0.0..=20.0).contains(&coverage) {
            return Err(Error::invalid(
                key("platelet_coverage"),
                coverage,
                "must lie in 0–20 (platelet area per unit coating area)",
            ));
        }
        let background = match map.get("background") {
            None => Background::Black,
            Some(Value::String(s)) if s.eq_ignore_ascii_case("black") => Background::Black,
            Some(Value::String(s)) if s.eq_ignore_ascii_case("white") => Background::Grey(1.0),
            Some(Value::Object(o)) if o.len() == 1 && o.contains_key("reflectance") => {
                match &o["reflectance"] {
                    Value::Number(n) => match n.as_f64() {
                        Some(r) if (0.0..=1.0).contains(&r) => Background::Grey(r),
                        _ => {
                            return Err(Error::invalid(
                                key("background.reflectance"),
                                n,
                                "must lie in 0–1",
                            ));
                        }
                    },
                    v => {
                        let points =
                            pairs(v, "background.reflectance", "wavelength_nm, reflectance")?;
                        if points.iter().any(|p| !(0.0..=1.0).contains(&p.1)) {
                            return Err(Error::invalid(
                                key("background.reflectance"),
                                v,
                                "reflectances must lie in 0–1",
                            ));
                        }
                        Background::Spectrum(points)
                    }
                }
            }
            Some(other) => {
                return Err(Error::invalid(
                    key("background"),
                    other,
                    "expected \"black\", \"white\" or {\"reflectance\": 0–1 or [[nm, R], …]}",
                ));
            }
        };
        let geometries = match map.get("geometries") {
            None => geometry::parse_name("45", &key("geometries"))?,
            Some(v) => geometry::parse(v, &key("geometries"))?,
        };
        Ok(Coating {
            binder,
            platelet,
            disorder,
            orientation,
            coverage,
            background,
            geometries,
        })
    }
}
