//! The design tools' results as JSON values, so that every front end (the
//! command line, the Python package) reports the same keys and numbers.
//! Front ends add what only they know: file names, wall time, the seed and
//! budget they were given.

use serde_json::{Map, Value, json};

use super::coating::At;
use super::fit::{FitOutcome, Measured};
use super::matching::{MatchOutcome, REACHABLE_DELTA_E};
use super::tolerance::{Stats, ToleranceOutcome, ToleranceSettings};
use crate::colorimetry::Colour;
use crate::scene::Sigma;

/// The point of a goal or measurement as JSON fields: `angle_deg`, or
/// `geometry` with its illumination and aspecular angles.
pub fn point_json(at: &At) -> Map<String, Value> {
    let mut m = Map::new();
    match at {
        At::Angle(a) => {
            m.insert("angle_deg".into(), json!(a));
        }
        At::Geometry(g) => {
            m.insert("geometry".into(), json!(g.name));
            m.insert("illumination_deg".into(), json!(g.illumination_deg));
            m.insert("aspecular_deg".into(), json!(g.aspecular_deg));
        }
    }
    m
}

/// L*, a*, b*, sRGB, hex and gamut of a colour.
fn colour_json(c: &Colour) -> Value {
    json!({"L": c.lab[0], "a": c.lab[1], "b": c.lab[2], "srgb": c.rgb, "hex": c.hex, "in_gamut": c.in_gamut})
}

/// A match: ΔE00 (main goal and worst), whether it is reachable, each goal
/// with target and achieved colour, the thicknesses with their bounds, the
/// total thickness and its range, evaluations spent and why the search
/// stopped.
pub fn match_report(out: &MatchOutcome) -> Map<String, Value> {
    let worst = out.goals.iter().map(|g| g.delta_e00).fold(0.0, f64::max);
    let goals: Vec<Value> = out
        .goals
        .iter()
        .map(|g| {
            let mut v = point_json(&g.goal.at);
            v.insert(
                "target".into(),
                json!({"L": g.goal.lab[0], "a": g.goal.lab[1], "b": g.goal.lab[2]}),
            );
            v.insert("achieved".into(), colour_json(&g.achieved));
            v.insert("delta_e00".into(), json!(g.delta_e00));
            Value::Object(v)
        })
        .collect();
    let thicknesses: Vec<Value> = out
        .variables
        .iter()
        .zip(&out.thicknesses_nm)
        .map(|(v, t)| {
            json!({
                "pointer": v.pointer, "quantity": v.quantity(), "material": v.material, "value": t,
                "low": v.low_nm, "high": v.high_nm,
            })
        })
        .collect();
    let mut m = Map::new();
    m.insert("delta_e00".into(), json!(out.goals[0].delta_e00));
    m.insert("delta_e00_max".into(), json!(worst));
    m.insert("reachable".into(), json!(out.reachable));
    m.insert("reachable_limit_delta_e00".into(), json!(REACHABLE_DELTA_E));
    m.insert("goals".into(), Value::Array(goals));
    m.insert("thicknesses_nm".into(), Value::Array(thicknesses));
    m.insert("total_thickness_nm".into(), json!(out.total_nm));
    m.insert(
        "total_thickness_range_nm".into(),
        json!([out.total_range_nm.0, out.total_range_nm.1]),
    );
    m.insert("evaluations".into(), json!(out.evaluations));
    m.insert("stopped".into(), json!(out.stopped.name()));
    m
}

fn stats_json(s: &Stats) -> Map<String, Value> {
    let mut m = Map::new();
    m.insert("delta_e00_p50".into(), json!(s.p50));
    m.insert("delta_e00_p95".into(), json!(s.p95));
    m.insert("delta_e00_max".into(), json!(s.max));
    m.insert("yield".into(), json!(s.yield_fraction));
    m
}

/// A tolerance analysis: overall ΔE00 statistics and yield, the settings
/// that shaped them, the counted points, statistics per angle (`angles`) or
/// geometry (`geometries`) with the nominal colour, and the layers ranked by
/// sensitivity.
pub fn tolerance_report(
    out: &ToleranceOutcome,
    settings: &ToleranceSettings,
) -> Map<String, Value> {
    let coating = out.points.iter().any(|p| p.geometry().is_some());
    let mut m = stats_json(&out.overall);
    m.insert("limit_delta_e00".into(), json!(settings.limit));
    m.insert("per_period".into(), json!(settings.per_period));
    m.insert("deposited_layers".into(), json!(out.deposited_layers));
    m.insert("samples".into(), json!(settings.samples));
    m.insert(
        "sigma".into(),
        match settings.thickness {
            Sigma::Nm(s) => json!({"nm": s, "n": settings.sigma_n}),
            Sigma::Pct(p) => json!({"pct": p, "n": settings.sigma_n}),
        },
    );
    let counted = out.points.iter().zip(&out.counted).filter(|(_, c)| **c);
    m.insert(
        if coating {
            "yield_geometries"
        } else {
            "yield_angles_deg"
        }
        .into(),
        counted
            .map(|(p, _)| match p {
                At::Angle(a) => json!(a),
                At::Geometry(g) => json!(g.name),
            })
            .collect(),
    );
    m.insert(
        if coating { "geometries" } else { "angles" }.into(),
        out.points
            .iter()
            .zip(&out.per_point)
            .zip(&out.nominal_lab)
            .zip(&out.counted)
            .map(|(((p, s), lab), counted)| {
                let mut o = stats_json(s);
                o.extend(point_json(p));
                o.insert("nominal_lab".into(), json!(lab));
                o.insert("in_yield".into(), json!(counted));
                Value::Object(o)
            })
            .collect(),
    );
    m.insert(
        "sensitivity".into(),
        out.sensitivity
            .iter()
            .enumerate()
            .map(|(rank, s)| {
                let mut entry = json!({
                    "rank": rank + 1,
                    "pointer": s.layer.pointer,
                    "quantity": s.layer.quantity(),
                    "material": s.layer.material,
                    "thickness_nm": s.layer.nominal_nm,
                    "sigma_nm": s.sigma_nm,
                    "delta_e00_per_sigma_thickness": s.delta_e00_thickness,
                });
                // Only with an index error (left out, never null, without it).
                if let Some(d) = s.delta_e00_index {
                    entry["delta_e00_per_sigma_index"] = json!(d);
                }
                entry
            })
            .collect(),
    );
    m
}

/// A fit: rms residual, points, the thicknesses with bounds and (where the
/// fit determines it) their uncertainty, evaluations spent, the scale when
/// fitted, and the measured angles (`angles_deg`) or geometries
/// (`geometries`).
pub fn fit_report(out: &FitOutcome, measured: &[Measured]) -> Map<String, Value> {
    // An uncertainty the fit cannot determine is left out, never null.
    let with_uncertainty = |mut v: Value, u: Option<f64>| {
        if let Some(u) = u {
            v["uncertainty"] = json!(u);
        }
        v
    };
    let mut m = Map::new();
    m.insert("rms".into(), json!(out.rms));
    m.insert("points".into(), json!(out.points));
    m.insert(
        "thicknesses_nm".into(),
        out.variables
            .iter()
            .zip(&out.thicknesses_nm)
            .zip(&out.uncertainties_nm)
            .map(|((v, t), u)| {
                with_uncertainty(
                    json!({
                        "pointer": v.pointer, "quantity": v.quantity(), "material": v.material, "value": t,
                        "low": v.low_nm, "high": v.high_nm,
                    }),
                    *u,
                )
            })
            .collect(),
    );
    m.insert("evaluations".into(), json!(out.evaluations));
    if let Some((s, u)) = out.scale {
        m.insert("scale".into(), with_uncertainty(json!({ "value": s }), u));
    }
    let geometries = measured.first().is_some_and(|m| m.at.geometry().is_some());
    m.insert(
        if geometries {
            "geometries"
        } else {
            "angles_deg"
        }
        .into(),
        measured
            .iter()
            .map(|m| match &m.at {
                At::Angle(a) => json!(a),
                At::Geometry(g) => json!(g.name),
            })
            .collect(),
    );
    m
}
