//! Colour sign-off: a reference against a sample at every angle (films) or
//! geometry (coatings) present in both, with ΔE2000, ΔE*ab, ΔE*94 and
//! CMC(l:c), the ΔL*, ΔC*, ΔH* components in words, tolerances per point and
//! a second light for metamerism.
//!
//! Both sides are spectra per point ([`Measured`] groups): measured files as
//! read by [`crate::measured`], scenes through [`scene_spectra`]. Colour is
//! computed from each spectrum on its own wavelengths, so a scene's colour is
//! exactly what `lamella color` or `lamella multiangle` reports.

use serde_json::{Map, Value, json};

use crate::angle_colour::{Side, Viewing, check_colour};
use crate::colorimetry::{
    Colour, Illuminant, LabComponents, delta_e_cmc, delta_e76, delta_e94, delta_e2000_weighted,
    describe, lab_components,
};
use crate::design::coating::At;
use crate::error::{Error, Result};
use crate::measured::Measured;
use crate::pigment::Model;
use crate::scene::Scene;

/// The colour-difference formula a tolerance is judged by.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Formula {
    /// CIEDE2000 with the chosen parametric factors.
    #[default]
    De00,
    /// ΔE*ab, CIE 1976.
    De76,
    /// ΔE*94, CIE 116-1995 (graphic arts).
    De94,
    /// CMC(l:c), Clarke, McDonald & Rigg 1984.
    Cmc,
}

impl Formula {
    /// `de00`, `de76`, `de94` or `cmc`.
    pub fn name(self) -> &'static str {
        match self {
            Formula::De00 => "de00",
            Formula::De76 => "de76",
            Formula::De94 => "de94",
            Formula::Cmc => "cmc",
        }
    }

    /// The formula called `name`.
    pub fn parse(name: &str, key: &str) -> Result<Formula> {
        match name {
            "de00" => Ok(Formula::De00),
            "de76" => Ok(Formula::De76),
            "de94" => Ok(Formula::De94),
            "cmc" => Ok(Formula::Cmc),
            _ => Err(Error::invalid(
                key,
                format!("\"{name}\""),
                "expected de00, de76, de94 or cmc",
            )),
        }
    }
}

/// Parametric factors of the formulas.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Factors {
    /// CIEDE2000 kL, kC, kH.
    pub k: [f64; 3],
    /// CMC lightness weight l.
    pub cmc_l: f64,
    /// CMC chroma weight c.
    pub cmc_c: f64,
}

impl Default for Factors {
    /// 1:1:1 for CIEDE2000, 2:1 for CMC.
    fn default() -> Self {
        Factors {
            k: [1.0; 3],
            cmc_l: 2.0,
            cmc_c: 1.0,
        }
    }
}

impl Factors {
    /// Refuses factors that are not positive finite numbers.
    pub fn check(&self) -> Result<()> {
        let named = [
            ("kl", self.k[0]),
            ("kc", self.k[1]),
            ("kh", self.k[2]),
            ("cmc-l", self.cmc_l),
            ("cmc-c", self.cmc_c),
        ];
        match named.iter().find(|(_, v)| !(v.is_finite() && *v > 0.0)) {
            Some((k, v)) => Err(Error::invalid(*k, v, "a weighting factor must be positive")),
            None => Ok(()),
        }
    }
}

/// Every colour difference between two CIELAB colours.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Differences {
    /// CIEDE2000 with the chosen factors.
    pub de00: f64,
    /// ΔE*ab.
    pub de76: f64,
    /// ΔE*94 (graphic arts), the reference as the standard.
    pub de94: f64,
    /// CMC(l:c), the reference as the standard.
    pub cmc: f64,
    /// ΔL*, ΔC*, ΔH*, Δa*, Δb*, sample minus reference.
    pub components: LabComponents,
}

impl Differences {
    /// From `reference` to `sample` (L*a*b*).
    pub fn between(reference: [f64; 3], sample: [f64; 3], f: &Factors) -> Differences {
        Differences {
            de00: delta_e2000_weighted(reference, sample, f.k),
            de76: delta_e76(reference, sample),
            de94: delta_e94(reference, sample),
            cmc: delta_e_cmc(reference, sample, f.cmc_l, f.cmc_c),
            components: lab_components(reference, sample),
        }
    }

    /// The difference by `formula`.
    pub fn by(&self, formula: Formula) -> f64 {
        match formula {
            Formula::De00 => self.de00,
            Formula::De76 => self.de76,
            Formula::De94 => self.de94,
            Formula::Cmc => self.cmc,
        }
    }
}

/// Tolerances: a formula and a limit per point.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Tolerances {
    /// The formula limits are judged by.
    pub formula: Formula,
    /// The limits.
    pub limits: Limits,
}

/// Which points have which limit.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum Limits {
    /// No tolerance: every point passes and no limit is reported.
    #[default]
    None,
    /// One limit for every point.
    All(f64),
    /// A limit per point, as written (an angle in degrees such as `"45"`,
    /// or a geometry name such as `"45as15"`), and one for points not
    /// listed.
    Per {
        /// (key as written, limit).
        limits: Vec<(String, f64)>,
        /// The limit of points not listed.
        default: Option<f64>,
    },
}

fn check_limit(key: &str, v: &Value) -> Result<f64> {
    match v.as_f64() {
        Some(x) if x.is_finite() && x >= 0.0 => Ok(x),
        _ => Err(Error::invalid(
            key,
            v,
            "a tolerance is a colour difference ≥ 0",
        )),
    }
}

impl Tolerances {
    /// One limit by `formula` for every point.
    pub fn single(formula: Formula, limit: f64) -> Result<Tolerances> {
        if !(limit.is_finite() && limit >= 0.0) {
            return Err(Error::invalid(
                "tolerance",
                limit,
                "a tolerance is a colour difference ≥ 0",
            ));
        }
        Ok(Tolerances {
            formula,
            limits: Limits::All(limit),
        })
    }

    /// A tolerance document: `{"formula": "de00", "limits": {"0": 1.0,
    /// "45": 1.5}, "default": 2.0}` (`formula` optional, default de00;
    /// `limits` keyed by angle in degrees or geometry name; `default`
    /// optional, the limit of points not listed).
    pub fn from_json(text: &str) -> Result<Tolerances> {
        // The scenes' strict parse: a key given twice is refused, not
        // silently overwritten.
        let doc: Value = crate::scene::json::parse(text)?;
        let obj = doc
            .as_object()
            .ok_or_else(|| Error::invalid("(document)", &doc, "expected a JSON object"))?;
        if let Some(k) = obj
            .keys()
            .find(|k| !["formula", "limits", "default"].contains(&k.as_str()))
        {
            return Err(Error::invalid(
                k,
                &obj[k],
                "unknown key (expected formula, limits, default)",
            ));
        }
        let formula = match obj.get("formula") {
            None => Formula::De00,
            Some(Value::String(s)) => Formula::parse(s, "formula")?,
            Some(v) => return Err(Error::invalid("formula", v, "expected a string")),
        };
        let default = obj
            .get("default")
            .map(|v| check_limit("default", v))
            .transpose()?;
        let empty = serde_json::Map::new();
        let limits = match obj.get("limits") {
            // A default alone holds for every point.
            None if default.is_some() => &empty,
            v => v.and_then(Value::as_object).ok_or_else(|| {
                Error::invalid(
                    "limits",
                    v.map_or("(missing)".into(), Value::to_string),
                    "expected an object of limits by angle or geometry, e.g. {\"0\": 1.0, \"45\": 1.5} (or a \"default\" for every point)",
                )
            })?,
        }
        .iter()
        .map(|(k, v)| Ok((k.clone(), check_limit(&format!("limits.{k}"), v)?)))
        .collect::<Result<Vec<_>>>()?;
        Ok(Tolerances {
            formula,
            limits: Limits::Per { limits, default },
        })
    }

    /// The limit of each of `points`, in order; a listed key that names none
    /// of them, or a point with no limit, is an error.
    fn of(&self, points: &[At]) -> Result<Vec<Option<f64>>> {
        match &self.limits {
            Limits::None => Ok(vec![None; points.len()]),
            Limits::All(l) => Ok(vec![Some(*l); points.len()]),
            Limits::Per { limits, default } => {
                let names = || points.iter().map(point_name).collect::<Vec<_>>().join(", ");
                let mut out = vec![*default; points.len()];
                let mut keys: Vec<Option<&str>> = vec![None; points.len()];
                for (k, l) in limits {
                    let i = points
                        .iter()
                        .position(|p| point_matches(p, k))
                        .ok_or_else(|| {
                            Error::invalid(
                                format!("limits.{k}"),
                                l,
                                format!(
                                    "no such angle or geometry in both REFERENCE and SAMPLE (in both: {})",
                                    names()
                                ),
                            )
                        })?;
                    if let Some(first) = keys[i] {
                        return Err(Error::invalid(
                            format!("limits.{k}"),
                            l,
                            format!(
                                "a second limit for {} (limits.{first} gives one)",
                                points[i].describe()
                            ),
                        ));
                    }
                    keys[i] = Some(k);
                    out[i] = Some(*l);
                }
                if let Some(i) = out.iter().position(Option::is_none) {
                    return Err(Error::invalid(
                        format!("limits.{}", point_name(&points[i])),
                        "(missing)",
                        "no limit for this point: add it or a \"default\"",
                    ));
                }
                Ok(out)
            }
        }
    }
}

/// An angle as its number (`45`), a geometry as its name (`45as15`).
pub fn point_name(at: &At) -> String {
    match at {
        At::Angle(a) => a.to_string(),
        At::Geometry(g) => g.name.clone(),
    }
}

fn point_matches(at: &At, key: &str) -> bool {
    match at {
        At::Angle(a) => key.trim().parse::<f64>().is_ok_and(|k| k == *a),
        At::Geometry(g) => {
            g.name == key.trim()
                || crate::pigment::parse_name(key, "limits")
                    .is_ok_and(|gs| gs.len() == 1 && gs[0] == *g)
        }
    }
}

/// The spectra of a scene on its own grid under `viewing`: per angle
/// (side and polarization of `viewing`) for a film, the reflectance factor
/// per geometry for a scene with a `coating` section.
pub fn scene_spectra(scene: &Scene, viewing: &Viewing) -> Result<Vec<Measured>> {
    match &scene.coating {
        None => {
            let spectra = scene.spectra()?;
            Ok((0..spectra.angles_deg.len())
                .map(|a| Measured {
                    at: At::Angle(spectra.angles_deg[a]),
                    wavelengths_nm: spectra.wavelengths_nm.clone(),
                    r: spectra
                        .at_angle(a)
                        .iter()
                        .map(|x| viewing.polarization.of(x, viewing.side))
                        .collect(),
                })
                .collect())
        }
        Some(coating) => {
            if viewing.side == Side::Transmit {
                return Err(Error::invalid(
                    "side",
                    "transmit",
                    "a coating is seen in reflection at its geometries",
                ));
            }
            let model = Model::new(scene, coating)?;
            coating
                .geometries
                .iter()
                .map(|g| {
                    let mut rf = vec![0.0; model.wavelengths_nm().len()];
                    model.reflectance_factor(g.illumination, g.detection, &mut rf);
                    if let Some((w, v)) = model
                        .wavelengths_nm()
                        .iter()
                        .zip(&rf)
                        .find(|(_, v)| !v.is_finite())
                    {
                        return Err(Error::not_computable(
                            "reflectance factor",
                            format!("{}, {w} nm", g.name),
                            *v,
                        ));
                    }
                    Ok(Measured {
                        at: At::Geometry(g.clone()),
                        wavelengths_nm: model.wavelengths_nm().to_vec(),
                        r: rf,
                    })
                })
                .collect()
        }
    }
}

/// The colour of a spectrum on its own wavelengths.
pub fn colour_of(m: &Measured, viewing: &Viewing) -> Result<Colour> {
    let weights = viewing.weights(&m.wavelengths_nm)?;
    let c = Colour::new(weights.xyz(&m.r), weights.white(), &viewing.options);
    check_colour(&c, &m.at.describe())?;
    Ok(c)
}

/// One compared point.
#[derive(Debug, Clone)]
pub struct Point {
    /// The angle or geometry.
    pub at: At,
    /// The reference's colour.
    pub reference: Colour,
    /// The sample's colour.
    pub sample: Colour,
    /// The differences.
    pub differences: Differences,
    /// Words for lightness, chroma and hue ([`describe`]).
    pub words: [&'static str; 3],
    /// The limit, when tolerances are given.
    pub limit: Option<f64>,
    /// Within the limit (always, without one).
    pub pass: bool,
    /// The differences under the check illuminant.
    pub check: Option<Differences>,
}

/// A whole comparison.
#[derive(Debug, Clone)]
pub struct Comparison {
    /// Every point passes.
    pub pass: bool,
    /// The tolerances used.
    pub tolerances: Tolerances,
    /// The factors used.
    pub factors: Factors,
    /// The name of the check illuminant, when given.
    pub check_illuminant: Option<String>,
    /// The points, in the reference's order.
    pub points: Vec<Point>,
}

/// Compares `sample` to `reference` at every point present in both (in the
/// reference's order) under `viewing`, and under `check` too when given;
/// no point in common is an error listing both sides' points.
pub fn compare(
    reference: &[Measured],
    sample: &[Measured],
    viewing: &Viewing,
    check: Option<&Illuminant>,
    factors: &Factors,
    tolerances: &Tolerances,
) -> Result<Comparison> {
    factors.check()?;
    let pairs: Vec<(&Measured, &Measured)> = reference
        .iter()
        .filter_map(|r| sample.iter().find(|s| s.at == r.at).map(|s| (r, s)))
        .collect();
    if pairs.is_empty() {
        let list = |ms: &[Measured]| {
            ms.iter()
                .map(|m| m.at.describe())
                .collect::<Vec<_>>()
                .join(", ")
        };
        return Err(Error::invalid(
            "points",
            format!("REFERENCE: {}; SAMPLE: {}", list(reference), list(sample)),
            "REFERENCE and SAMPLE have no angle or geometry in common",
        ));
    }
    let ats: Vec<At> = pairs.iter().map(|(r, _)| r.at.clone()).collect();
    let limits = tolerances.of(&ats)?;
    let checking = check.map(|ill| Viewing {
        illuminant: ill.clone(),
        ..viewing.clone()
    });
    let mut points = Vec::new();
    for ((r, s), limit) in pairs.into_iter().zip(limits) {
        let (rc, sc) = (colour_of(r, viewing)?, colour_of(s, viewing)?);
        let differences = Differences::between(rc.lab, sc.lab, factors);
        let check = checking
            .as_ref()
            .map(|v| {
                let (a, b) = (colour_of(r, v)?, colour_of(s, v)?);
                Ok::<_, Error>(Differences::between(a.lab, b.lab, factors))
            })
            .transpose()?;
        let pass = limit.is_none_or(|l| differences.by(tolerances.formula) <= l);
        points.push(Point {
            at: r.at.clone(),
            words: describe(rc.lab, sc.lab),
            reference: rc,
            sample: sc,
            differences,
            limit,
            pass,
            check,
        });
    }
    Ok(Comparison {
        pass: points.iter().all(|p| p.pass),
        tolerances: tolerances.clone(),
        factors: *factors,
        check_illuminant: checking.map(|v| v.illuminant.name().to_string()),
        points,
    })
}

fn colour_json(c: &Colour) -> Value {
    json!({
        "L": c.lab[0], "a": c.lab[1], "b": c.lab[2], "C": c.lch[1], "h": c.lch[2],
        "X": c.xyz[0], "Y": c.xyz[1], "Z": c.xyz[2],
        "hex": c.hex, "in_gamut": c.in_gamut,
    })
}

fn differences_json(d: &Differences) -> Map<String, Value> {
    let c = &d.components;
    let mut m = Map::new();
    for (k, v) in [
        ("delta_e00", d.de00),
        ("delta_e76", d.de76),
        ("delta_e94", d.de94),
        ("delta_e_cmc", d.cmc),
        ("dL", c.dl),
        ("dC", c.dc),
        ("dH", c.dh),
        ("da", c.da),
        ("db", c.db),
    ] {
        m.insert(k.into(), json!(v));
    }
    m
}

/// The comparison as the JSON object `lamella compare --format json` prints
/// (the front ends add the file names): `pass`, `formula`, `factors`,
/// `check_illuminant` (when given) and `points`, each with `angle_deg` or
/// `geometry`, the differences, `description`, `limit` (only with
/// tolerances), `pass`, the `reference` and `sample` colours and, with a
/// check illuminant, `check` (its differences).
pub fn report(c: &Comparison) -> Map<String, Value> {
    let mut m = Map::new();
    m.insert("pass".into(), json!(c.pass));
    m.insert("formula".into(), json!(c.tolerances.formula.name()));
    m.insert(
        "factors".into(),
        json!({"kl": c.factors.k[0], "kc": c.factors.k[1], "kh": c.factors.k[2],
               "cmc_l": c.factors.cmc_l, "cmc_c": c.factors.cmc_c}),
    );
    if let Some(name) = &c.check_illuminant {
        m.insert("check_illuminant".into(), json!(name));
    }
    let points = c
        .points
        .iter()
        .map(|p| {
            let mut o = Map::new();
            match &p.at {
                At::Angle(a) => o.insert("angle_deg".into(), json!(a)),
                At::Geometry(g) => o.insert("geometry".into(), json!(g.name)),
            };
            o.extend(differences_json(&p.differences));
            o.insert("description".into(), json!(p.words.join(", ")));
            if let Some(l) = p.limit {
                o.insert("limit".into(), json!(l));
            }
            o.insert("pass".into(), json!(p.pass));
            o.insert("reference".into(), colour_json(&p.reference));
            o.insert("sample".into(), colour_json(&p.sample));
            if let Some(d) = &p.check {
                o.insert("check".into(), Value::Object(differences_json(d)));
            }
            Value::Object(o)
        })
        .collect();
    m.insert("points".into(), Value::Array(points));
    m
}
