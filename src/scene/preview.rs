//! The scene's `preview` object: the render settings a scene carries.

use serde_json::Value;

use super::json::{Obj, show};
use crate::error::{Error, Result};
use crate::raster;
use crate::render::{
    Environment, Light, PREVIEW_KEYS, Procedural, SIZE_LIMITS, Settings, parse_analyzer,
    parse_floor, parse_switch, parse_tone,
};

/// The default settings overridden by the `preview` object `v`, with every
/// range checked.
pub(super) fn parse(v: &Value) -> Result<Settings> {
    let mut s = Settings::default();
    let o = Obj::new(v, "preview")?;
    o.only(PREVIEW_KEYS)?;
    let within = |e: Error| e.within("preview");
    if let Some(t) = o.str("shape")? {
        s.shape = t.parse().map_err(within)?;
    }
    if let Some(t) = o.str("size")? {
        (s.width, s.height) = raster::parse_size(t, SIZE_LIMITS).map_err(within)?;
    }
    if let Some(n) = o.u64("ssaa")? {
        s.ssaa = n.min(u32::MAX as u64) as u32;
    }
    if let Some(x) = o.f64("exposure")? {
        s.exposure = x;
    }
    match o.get("tone") {
        None => {}
        Some(Value::Bool(b)) => s.tone = *b,
        Some(Value::String(t)) => s.tone = parse_tone(t).map_err(within)?,
        Some(other) => {
            return Err(Error::invalid(
                o.key("tone"),
                show(other),
                "expected on or off",
            ));
        }
    }
    if let Some(x) = o.f64("roughness_deg")? {
        s.roughness_deg = x;
    }
    if let Some(t) = o.str("base")? {
        s.base = t.parse().map_err(within)?;
    }
    if let Some(v) = o.get("lights") {
        let list = v
            .as_array()
            .ok_or_else(|| Error::invalid(o.key("lights"), show(v), "expected a list of lights"))?;
        s.lights = list
            .iter()
            .enumerate()
            .map(|(i, l)| {
                let path = format!("preview.lights[{i}]");
                let obj = Obj::new(l, path.clone())?;
                let pairs: Vec<(String, Value)> = obj
                    .map
                    .iter()
                    .map(|(k, v)| (k.clone(), v.clone()))
                    .collect();
                Light::from_pairs(&pairs, &path)
            })
            .collect::<Result<_>>()?;
    }
    if let Some(x) = o.f64("orbit_deg")? {
        s.view.orbit_deg = x;
    }
    if let Some(x) = o.f64("elevation_deg")? {
        s.view.elevation_deg = x;
    }
    if let Some(x) = o.f64("fov_deg")? {
        s.view.fov_deg = x;
    }
    if let Some(x) = o.f64("distance")? {
        s.view.distance = Some(x);
    }
    if let Some(n) = o.u64("turntable")? {
        if n == 0 {
            return Err(Error::invalid(
                o.key("turntable"),
                n,
                "at least 1 frame (leave the key out for a single image)",
            ));
        }
        s.turntable = n.min(u32::MAX as u64) as u32;
    }
    if let Some(v) = o.get("environment") {
        let path = "preview.environment";
        let env = match v {
            Value::String(t) => t.parse::<Procedural>().map_err(within)?,
            Value::Object(_) => {
                let obj = Obj::new(v, path)?;
                let pairs: Vec<(String, Value)> = obj
                    .map
                    .iter()
                    .map(|(k, v)| (k.clone(), v.clone()))
                    .collect();
                Procedural::from_pairs(&pairs, path)?
            }
            other => {
                return Err(Error::invalid(
                    path,
                    show(other),
                    "expected a built-in environment name or {\"type\": NAME, …}",
                ));
            }
        };
        s.environment = Some(Environment::Procedural(env));
        if o.get("lights").is_none() {
            s.lights.clear();
        }
    }
    if let Some(t) = o.str("view")? {
        s.mode = t.parse().map_err(within)?;
    }
    match o.get("floor") {
        None | Some(Value::Bool(false)) => {}
        Some(Value::String(t)) => s.floor = parse_floor(t).map_err(within)?,
        Some(v) => s.floor = parse_floor(&show(v)).map_err(within)?,
    }
    for (key, field) in [("shadow", &mut s.shadow), ("caption", &mut s.caption)] {
        match o.get(key) {
            None => {}
            Some(Value::Bool(b)) => *field = *b,
            Some(Value::String(t)) => *field = parse_switch(key, t).map_err(within)?,
            Some(other) => {
                return Err(Error::invalid(
                    o.key(key),
                    show(other),
                    "expected on or off",
                ));
            }
        }
    }
    if let Some(t) = o.str("analyzer")? {
        s.analyzer = Some(parse_analyzer(t).map_err(within)?);
    }
    if let Some(v) = o.get("orbit_elevation_deg") {
        let pair = v
            .as_array()
            .filter(|a| a.len() == 2)
            .and_then(|a| Some((a[0].as_f64()?, a[1].as_f64()?)));
        s.orbit_elevation_deg = Some(pair.ok_or_else(|| {
            Error::invalid(
                o.key("orbit_elevation_deg"),
                show(v),
                "expected [FROM, TO] in degrees",
            )
        })?);
    }
    s.check().map_err(|e| e.within("preview"))?;
    Ok(s)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::render::{Base, Shape};
    use serde_json::json;

    #[test]
    fn preview_object_overrides_defaults() {
        let doc = json!({"preview": {
            "shape": "torus", "size": "320x200", "ssaa": 3, "exposure": 1.5, "tone": "off",
            "roughness_deg": 8, "base": "#808080", "orbit_deg": 15, "elevation_deg": 30,
            "fov_deg": 40, "distance": 5, "turntable": 12,
            "lights": [{"type": "sky", "intensity": 0.5},
                       {"type": "area", "azimuth_deg": 30, "size_deg": 10, "illuminant": "A"}]
        }});
        let s = parse(&doc["preview"]).unwrap();
        assert_eq!(s.shape, Shape::Torus);
        assert_eq!((s.width, s.height, s.ssaa, s.turntable), (320, 200, 3, 12));
        assert!(!s.tone && s.exposure == 1.5 && s.roughness_deg == 8.0);
        let Base::Diffuse(grey) = s.base else {
            panic!()
        };
        assert!((grey[0] - 0.2158605).abs() < 1e-6, "{grey:?}"); // IEC 61966-2-1 decode of 128/255
        assert_eq!(s.lights.len(), 2);
        assert_eq!(s.lights[1].illuminant.as_ref().map(|i| i.name()), Some("A"));
        assert_eq!(s.view.distance, Some(5.0));
        s.check().unwrap();
        let doc = json!({"preview": {
            "environment": {"type": "booth", "illuminant": "A"}, "view": "both",
            "floor": 0.4, "shadow": false, "analyzer": "left", "caption": true,
            "turntable": 8, "orbit_elevation_deg": [10, 40]
        }});
        let s = parse(&doc["preview"]).unwrap();
        assert!(
            s.lights.is_empty(),
            "an environment without lights replaces them"
        );
        assert_eq!(s.mode, crate::render::ViewMode::Both);
        assert_eq!((s.floor, s.shadow, s.caption), (Some(0.4), false, true));
        assert_eq!(s.orbit_elevation_deg, Some((10.0, 40.0)));
        assert_eq!(s.environment.unwrap().describe(), "booth (A)");
    }

    #[test]
    fn unknown_or_bad_preview_keys_are_named() {
        for (doc, needle) in [
            (json!({"preview": {"shap": "sphere"}}), "preview.shap"),
            (json!({"preview": {"shape": "cube"}}), "preview.shape"),
            (json!({"preview": {"size": "100"}}), "preview.size"),
            (
                json!({"preview": {"lights": [{"type": "area", "colour": 1}]}}),
                "preview.lights[0].colour",
            ),
            (
                json!({"preview": {"lights": [{"type": "sky", "size_deg": 3}]}}),
                "preview.lights[0].size_deg",
            ),
            (json!({"preview": {"base": "grey"}}), "preview.base"),
            (json!({"preview": {"tone": 3}}), "preview.tone"),
            (
                json!({"preview": {"environment": "garden"}}),
                "preview.environment",
            ),
            (
                json!({"preview": {"environment": {"type": "studio", "glow": 1}}}),
                "preview.environment.glow",
            ),
            (json!({"preview": {"floor": 0.5}}), "preview.floor"),
            (json!({"preview": {"view": "through"}}), "preview.view"),
            (json!({"preview": {"analyzer": "up"}}), "preview.analyzer"),
            (
                json!({"preview": {"orbit_elevation_deg": [10, 40]}}),
                "preview.orbit_elevation_deg",
            ),
        ] {
            let err = parse(&doc["preview"]).unwrap_err().to_string();
            assert!(err.contains(needle), "{err}");
        }
    }
}
