//! Measurement geometries of multi-angle colour: illumination and detection
//! directions above the coating, named by illumination and aspecular angle
//! (`45as15`) as in the multi-angle colour standards (ASTM E2194, ASTM E2539,
//! DIN 6175-2), or given as explicit, possibly out-of-plane, directions.
//!
//! Frame: z is the coating normal (up); the light comes from the −x side, so
//! the plane of incidence is x–z and the specular direction of an
//! illumination at θ is (sin θ, 0, cos θ). Direction vectors point away from
//! the coating (toward the source, toward the detector).

use serde_json::Value;

use crate::error::{Error, Result};

/// Aspecular angles of the built-in set `"45"`, all with illumination at 45°
/// in the plane of incidence: −15, 15, 25, 45, 75, 110, the in-plane
/// geometries of ASTM E2194 (multiangle colour of metal-flake pigmented
/// materials) and DIN 6175-2, with 45as-15 on the far side of the specular
/// direction as used for interference pigments (ASTM E2539). The angles are
/// from memory of these standards. Other geometries are listed by the user
/// (names such as `45as15` or objects), see [`parse`].
pub const SET_45: [f64; 6] = [-15.0, 15.0, 25.0, 45.0, 75.0, 110.0];

/// What a `geometries` value may be, for error messages.
pub const ACCEPTED: &str = "expected the set \"45\" (45as-15, 45as15, 45as25, 45as45, 45as75, 45as110: \
ASTM E2194 / DIN 6175-2), a name ILLUMINATIONasASPECULAR such as 45as15 or 45as-15, or (in a scene) a list of \
names and objects {illumination_deg, aspecular_deg} or {illumination_deg, detection_deg, \
detection_azimuth_deg}";

/// Detection directions must stay this far above the surface (degrees from
/// the normal, exclusive).
pub const MAX_POLAR_DEG: f64 = 89.0;

/// One illumination/detection pair.
#[derive(Debug, Clone, PartialEq)]
pub struct Geometry {
    /// Name in reports: `45as15`, or the user's name, or `45:30/90` for an
    /// explicit pair (illumination polar : detection polar / detection azimuth).
    pub name: String,
    /// Polar angle of the illumination from the normal, degrees.
    pub illumination_deg: f64,
    /// Signed in-plane aspecular angle (positive toward the normal and the
    /// source), or for out-of-plane pairs the unsigned angle between the
    /// detection and the specular direction.
    pub aspecular_deg: f64,
    /// Whether detection lies in the plane of incidence.
    pub in_plane: bool,
    /// Unit vector toward the source.
    pub illumination: [f64; 3],
    /// Unit vector toward the detector.
    pub detection: [f64; 3],
}

fn dir(polar_deg: f64, azimuth_deg: f64) -> [f64; 3] {
    let (st, ct) = polar_deg.to_radians().sin_cos();
    let (sp, cp) = azimuth_deg.to_radians().sin_cos();
    [st * cp, st * sp, ct]
}

fn check_polar(key: &str, polar_deg: f64) -> Result<()> {
    if polar_deg.abs() < MAX_POLAR_DEG {
        Ok(())
    } else {
        Err(Error::invalid(
            key,
            polar_deg,
            format!("the direction must lie less than {MAX_POLAR_DEG}° from the normal"),
        ))
    }
}

impl Geometry {
    /// In-plane geometry: illumination at `illumination_deg` from the normal,
    /// detection `aspecular_deg` away from the specular direction, positive
    /// toward the normal (ASTM E2194 notation: `45as15` detects at 30° on
    /// the specular side, `45as110` at 65° on the illumination side).
    pub fn aspecular(illumination_deg: f64, aspecular_deg: f64) -> Result<Geometry> {
        let name = format!("{illumination_deg}as{aspecular_deg}");
        if !(0.0..MAX_POLAR_DEG).contains(&illumination_deg) {
            return Err(Error::invalid(
                &name,
                illumination_deg,
                format!("the illumination angle must lie in 0–{MAX_POLAR_DEG}°"),
            ));
        }
        let detection_deg = illumination_deg - aspecular_deg;
        check_polar(&name, detection_deg)?;
        Ok(Geometry {
            name,
            illumination_deg,
            aspecular_deg,
            in_plane: true,
            illumination: dir(illumination_deg, 180.0),
            detection: dir(detection_deg, 0.0),
        })
    }

    /// Explicit pair: illumination at `illumination_deg` in the x–z plane and
    /// detection at polar `detection_deg`, azimuth `detection_azimuth_deg`
    /// measured from the specular half-plane (0 = specular side of the plane
    /// of incidence, 180 = the illumination side).
    pub fn directions(
        illumination_deg: f64,
        detection_deg: f64,
        detection_azimuth_deg: f64,
    ) -> Result<Geometry> {
        let name = format!("{illumination_deg}:{detection_deg}/{detection_azimuth_deg}");
        check_polar(&name, illumination_deg)?;
        check_polar(&name, detection_deg)?;
        if illumination_deg < 0.0 || detection_deg < 0.0 {
            return Err(Error::invalid(
                &name,
                "negative polar angle",
                "polar angles are ≥ 0; use the azimuth for the side",
            ));
        }
        let illumination = dir(illumination_deg, 180.0);
        let detection = dir(detection_deg, detection_azimuth_deg);
        let specular = dir(illumination_deg, 0.0);
        let cos: f64 = (0..3).map(|k| specular[k] * detection[k]).sum();
        let in_plane = detection[1].abs() < 1e-12;
        let aspecular_deg = if in_plane {
            illumination_deg - detection_deg.copysign(detection[0])
        } else {
            cos.clamp(-1.0, 1.0).acos().to_degrees()
        };
        Ok(Geometry {
            name,
            illumination_deg,
            aspecular_deg,
            in_plane,
            illumination,
            detection,
        })
    }

    /// The same directions with illumination and detection exchanged (for
    /// reciprocity checks); named `NAME~`.
    pub fn swapped(&self) -> Geometry {
        Geometry {
            name: format!("{}~", self.name),
            illumination: self.detection,
            detection: self.illumination,
            ..self.clone()
        }
    }
}

/// Parses one geometry name (`45as15`, `45as-15`, `25as40`) or the built-in
/// set name `45` ([`SET_45`]) into geometries.
pub fn parse_name(text: &str, key: &str) -> Result<Vec<Geometry>> {
    let t = text.trim();
    if t == "45" {
        return SET_45
            .iter()
            .map(|&a| Geometry::aspecular(45.0, a))
            .collect();
    }
    let bad = || Error::invalid(key, format!("\"{t}\""), ACCEPTED);
    let (ill, asp) = t.split_once("as").ok_or_else(bad)?;
    let ill: f64 = ill.trim().parse().map_err(|_| bad())?;
    let asp: f64 = asp.trim().parse().map_err(|_| bad())?;
    if !(ill.is_finite() && asp.is_finite()) {
        return Err(bad());
    }
    Geometry::aspecular(ill, asp)
        .map(|g| vec![g])
        .map_err(|e| e.within(key))
}

/// A `geometries` value: a set name, a geometry name, or a list of names and
/// objects `{"illumination_deg", "aspecular_deg", "name"?}` (in-plane) or
/// `{"illumination_deg", "detection_deg", "detection_azimuth_deg", "name"?}`
/// (any pair). Geometries keep their listed order.
pub fn parse(v: &Value, key: &str) -> Result<Vec<Geometry>> {
    let list = match v {
        Value::String(s) => return parse_name(s, key),
        Value::Number(n) => return parse_name(&n.to_string(), key),
        Value::Array(xs) => xs,
        other => return Err(Error::invalid(key, other, ACCEPTED)),
    };
    if list.is_empty() {
        return Err(Error::invalid(key, "[]", "list at least one geometry"));
    }
    let mut out = Vec::new();
    for (i, item) in list.iter().enumerate() {
        let k = format!("{key}[{i}]");
        match item {
            Value::String(_) | Value::Number(_) => out.extend(parse(item, &k)?),
            Value::Object(map) => out.push(parse_object(map, &k)?),
            other => {
                return Err(Error::invalid(
                    k,
                    other,
                    "expected a name or a geometry object",
                ));
            }
        }
    }
    Ok(out)
}

fn parse_object(map: &serde_json::Map<String, Value>, key: &str) -> Result<Geometry> {
    const KEYS: [&str; 5] = [
        "name",
        "illumination_deg",
        "aspecular_deg",
        "detection_deg",
        "detection_azimuth_deg",
    ];
    if let Some(k) = map.keys().find(|k| !KEYS.contains(&k.as_str())) {
        return Err(Error::invalid(
            format!("{key}.{k}"),
            &map[k],
            format!("unknown key (expected one of: {})", KEYS.join(", ")),
        ));
    }
    let num = |k: &str| -> Result<Option<f64>> {
        match map.get(k) {
            None => Ok(None),
            Some(v) => match v.as_f64() {
                Some(x) if x.is_finite() => Ok(Some(x)),
                _ => Err(Error::invalid(
                    format!("{key}.{k}"),
                    v,
                    "expected a finite number",
                )),
            },
        }
    };
    let ill = num("illumination_deg")?.ok_or_else(|| {
        Error::invalid(
            format!("{key}.illumination_deg"),
            "(missing)",
            "required: the illumination's angle from the normal",
        )
    })?;
    let mut g = match (
        num("aspecular_deg")?,
        num("detection_deg")?,
        num("detection_azimuth_deg")?,
    ) {
        (Some(a), None, None) => Geometry::aspecular(ill, a),
        (None, Some(d), az) => Geometry::directions(ill, d, az.unwrap_or(0.0)),
        _ => Err(Error::invalid(
            key,
            serde_json::Value::Object(map.clone()),
            "give aspecular_deg (in-plane), or detection_deg with an optional detection_azimuth_deg",
        )),
    }
    .map_err(|e| e.within(key))?;
    match map.get("name") {
        None => {}
        Some(Value::String(s)) if !s.trim().is_empty() => g.name = s.clone(),
        Some(other) => {
            return Err(Error::invalid(
                format!("{key}.name"),
                other,
                "expected a non-empty string",
            ));
        }
    }
    Ok(g)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_follow_the_aspecular_convention() {
        let g = &parse_name("45as15", "g").unwrap()[0];
        // Detection 30° from the normal on the specular side.
        assert!((g.detection[0] - 0.5).abs() < 1e-12 && g.detection[1] == 0.0);
        let far = &parse_name("45as110", "g").unwrap()[0];
        // 65° on the illumination side.
        assert!(far.detection[0] < 0.0);
        assert!((far.detection[2] - 65f64.to_radians().cos()).abs() < 1e-12);
        assert_eq!(parse_name("45", "g").unwrap().len(), 6);
        assert_eq!(parse_name("25as40", "g").unwrap()[0].name, "25as40");
        for bad in [
            "15", "45as", "as15", "45x15", "45as200", "90as10", "45as-50",
        ] {
            assert!(parse_name(bad, "g").is_err(), "{bad}");
        }
    }

    #[test]
    fn explicit_directions_agree_with_aspecular_in_plane() {
        let a = Geometry::aspecular(45.0, 110.0).unwrap();
        let d = Geometry::directions(45.0, 65.0, 180.0).unwrap();
        assert!((d.aspecular_deg - 110.0).abs() < 1e-9 && d.in_plane);
        for k in 0..3 {
            assert!((a.detection[k] - d.detection[k]).abs() < 1e-12);
        }
        let out = Geometry::directions(45.0, 45.0, 90.0).unwrap();
        assert!(!out.in_plane);
        assert!((out.aspecular_deg - 60.0).abs() < 1e-9);
    }

    #[test]
    fn lists_mix_names_sets_and_objects() {
        let v: Value = serde_json::from_str(
            r#"["45as15", {"illumination_deg": 45, "aspecular_deg": 110, "name": "far"},
                {"illumination_deg": 45, "detection_deg": 30, "detection_azimuth_deg": 90}, "45"]"#,
        )
        .unwrap();
        let g = parse(&v, "coating.geometries").unwrap();
        assert_eq!(g.len(), 9);
        assert_eq!(g[1].name, "far");
        assert_eq!(g[2].name, "45:30/90");
        let bad: Value = serde_json::from_str(r#"[{"illumination_deg": 45}]"#).unwrap();
        assert!(parse(&bad, "g").is_err());
    }

    /// Only "45" names a set; other bare numbers are refused with the
    /// accepted forms listed.
    #[test]
    fn the_only_set_is_45() {
        for v in [r#""15""#, "15", r#"["45as15", "15"]"#, "true"] {
            let v: Value = serde_json::from_str(v).unwrap();
            let e = parse(&v, "coating.geometries").unwrap_err().to_string();
            assert!(
                e.contains("45as-15, 45as15, 45as25, 45as45, 45as75, 45as110"),
                "{e}"
            );
            assert!(
                e.contains("ASTM E2194") && e.contains("aspecular_deg"),
                "{e}"
            );
        }
    }
}
