//! The scene's `coating` section (effect pigments: platelets in a binder over
//! a background) read into a [`Coating`].

use serde_json::Value;

use super::json::{Obj, number, show};
use super::media::Registry;
use super::stack;
use crate::error::{Error, Result};
use crate::pigment::{Background, Coating, Orientation, parse_geometries, parse_name};

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

/// Reads the `coating` object; the binder and the platelet's materials are
/// resolved in `media`.
pub(super) fn parse(v: &Value, media: &mut Registry) -> Result<Coating> {
    let o = Obj::new(v, "coating")?;
    o.only(&KEYS)?;
    let binder_name = o.str("binder")?.ok_or_else(|| {
        o.missing(
            "binder",
            "the binder's material name (define {\"n\": 1.5} under `materials` for a plain index)",
        )
    })?;
    let binder = media.resolve(binder_name, &o.key("binder"))?;
    let platelet_value = o
        .get("platelet")
        .ok_or_else(|| o.missing("platelet", "the platelet's layers, as in `stack`"))?;
    let platelet = stack::parse_items(platelet_value, &o.key("platelet"), media, false)?;
    if platelet.is_empty() {
        return Err(Error::invalid(
            o.key("platelet"),
            "[]",
            "a platelet needs at least one layer",
        ));
    }
    let disorder = stack::parse_disorder(o.get("disorder"), &o.key("disorder"), &platelet)?;
    let orientation = match (o.f64("tilt_sigma_deg")?, o.get("tilt_density")) {
        (Some(s), None) => {
            if !(0.05..=60.0).contains(&s) {
                return Err(Error::invalid(
                    o.key("tilt_sigma_deg"),
                    s,
                    "must lie in 0.05–60°",
                ));
            }
            Orientation::Gaussian { sigma_deg: s }
        }
        (None, Some(v)) => {
            let key = o.key("tilt_density");
            let points = pairs(v, &key, "tilt_deg, weight")?;
            if points[0].0 != 0.0
                || points.last().is_some_and(|p| p.0 > 90.0)
                || points.iter().any(|p| p.1 < 0.0)
                || !points.iter().any(|p| p.1 > 0.0)
            {
                return Err(Error::invalid(
                    key,
                    show(v),
                    "tilts run from 0 to at most 90°, weights are ≥ 0 and not all zero",
                ));
            }
            Orientation::Density(points)
        }
        (None, None) => Orientation::Gaussian { sigma_deg: 10.0 },
        (Some(_), Some(_)) => {
            return Err(Error::invalid(
                o.key("tilt_density"),
                "(with tilt_sigma_deg)",
                "give tilt_sigma_deg or tilt_density, not both",
            ));
        }
    };
    let coverage = o.f64("platelet_coverage")?.unwrap_or(1.0);
    if !(0.0..=20.0).contains(&coverage) {
        return Err(Error::invalid(
            o.key("platelet_coverage"),
            coverage,
            "must lie in 0–20 (platelet area per unit coating area)",
        ));
    }
    let background = match o.get("background") {
        None => Background::Black,
        Some(v) => background(v, &o.key("background"))?,
    };
    let geometries = match o.get("geometries") {
        None => parse_name("45", &o.key("geometries"))?,
        Some(v) => parse_geometries(v, &o.key("geometries"))?,
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

fn background(v: &Value, key: &str) -> Result<Background> {
    let bad = || {
        Error::invalid(
            key,
            show(v),
            "expected \"black\", \"white\" or {\"reflectance\": 0–1 or [[nm, R], …]}",
        )
    };
    match v {
        Value::String(s) if s.eq_ignore_ascii_case("black") => Ok(Background::Black),
        Value::String(s) if s.eq_ignore_ascii_case("white") => Ok(Background::Grey(1.0)),
        Value::Object(m) if m.len() == 1 && m.contains_key("reflectance") => {
            let key = format!("{key}.reflectance");
            match &m["reflectance"] {
                Value::Number(_) => {
                    let r = number(&m["reflectance"], &key)?;
                    if !(0.0..=1.0).contains(&r) {
                        return Err(Error::invalid(key, r, "must lie in 0–1"));
                    }
                    Ok(Background::Grey(r))
                }
                v => {
                    let points = pairs(v, &key, "wavelength_nm, reflectance")?;
                    if points.iter().any(|p| !(0.0..=1.0).contains(&p.1)) {
                        return Err(Error::invalid(key, show(v), "reflectances must lie in 0–1"));
                    }
                    Ok(Background::Spectrum(points))
                }
            }
        }
        _ => Err(bad()),
    }
}

/// A list of at least two `[x, y]` pairs with x strictly increasing.
fn pairs(v: &Value, key: &str, what: &str) -> Result<Vec<(f64, f64)>> {
    let bad = || Error::invalid(key, show(v), format!("expected a list of [{what}] pairs"));
    let points: Vec<(f64, f64)> = v
        .as_array()
        .ok_or_else(bad)?
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
            key,
            show(v),
            "needs at least two points in strictly increasing order",
        ));
    }
    Ok(points)
}
