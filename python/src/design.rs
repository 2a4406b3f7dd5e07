//! The design tools: `match`, `tolerance`, `fit` and the sweep behind
//! `lamella.sweep`, with the command line's options as keyword arguments and
//! its reports as dicts (built by the engine's `design::report`).

use std::time::Instant;

use lamella::angle_colour::Viewing;
use lamella::chart::FitChart;
use lamella::colorimetry::{rgb_to_xyz_under, xyz_to_lab};
use lamella::design::coating::At;
use lamella::design::evaluator::Evaluator;
use lamella::design::fit::{FitSettings, Measured, fit_with_progress};
use lamella::design::matching::{Goal, MIN_GAIN_DELTA_E, MatchSettings, match_colour};
use lamella::design::report::{fit_report, match_report, tolerance_report};
use lamella::design::search::Budget;
use lamella::design::sweep::{Plan, evaluate, shard};
use lamella::design::tolerance::{ToleranceSettings, tolerance_with_progress};
use lamella::design::variables::{edited_document, varying};
use lamella::measured::{Quantity, ReadOptions, from_columns, read};
use lamella::scene::Sigma;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList, PyString, PyTuple};
use rayon::prelude::*;
use serde_json::{Map, Value, json};

use crate::convert::{array1, array2, dict, floats};
use crate::errors::{Failure, Outcome};
use crate::interrupt::run;
use crate::scene::Scene;
use crate::view::ViewArgs;

/// Three finite numbers L*, a*, b* from a sequence.
fn lab(obj: &Bound<'_, PyAny>, key: &str) -> Outcome<[f64; 3]> {
    match floats(obj, key)?[..] {
        [l, a, b] => Ok([l, a, b]),
        _ => Err(Failure::input(format!(
            "{key} = {obj}: expected three numbers L*, a*, b*"
        ))),
    }
}

/// The target's CIELAB from `target_lab`, or from `target_hex` (#RRGGBB,
/// taken as `color` renders sRGB under the viewing's illuminant).
fn target(
    viewing: &Viewing,
    wavelengths_nm: &[f64],
    target_lab: Option<&Bound<'_, PyAny>>,
    target_hex: Option<&str>,
) -> Outcome<Option<[f64; 3]>> {
    if let Some(t) = target_lab {
        return lab(t, "target_lab").map(Some);
    }
    let Some(hex) = target_hex else {
        return Ok(None);
    };
    let digits = hex.trim_start_matches('#');
    let bad = || Failure::input(format!("target_hex = {hex:?}: expected #RRGGBB"));
    let rgb = lamella::colorimetry::rgb_of_hex(digits).ok_or_else(bad)?;
    let white = viewing
        .weights(wavelengths_nm)
        .map_err(|e| Failure::input(format!("target_hex: {e}")))?
        .white();
    Ok(Some(xyz_to_lab(
        rgb_to_xyz_under(rgb, white, viewing.options.space),
        white,
    )))
}

/// One geometry name (`45as15`) as a point.
fn geometry(name: &str, key: &str) -> Outcome<At> {
    match lamella::pigment::parse_name(name, key)
        .map_err(|e| Failure::input(e.to_string()))?
        .as_slice()
    {
        [g] => Ok(At::Geometry(g.clone())),
        _ => Err(Failure::input(format!(
            "{key} = {name}: expected one geometry such as 45as15, not a set"
        ))),
    }
}

/// A goal's point: an angle (a number) or a geometry (a name).
fn point(obj: &Bound<'_, PyAny>, key: &str) -> Outcome<At> {
    if let Ok(s) = obj.cast::<PyString>() {
        return geometry(&s.to_string(), key);
    }
    match obj.extract::<f64>() {
        Ok(a) if a.is_finite() => Ok(At::Angle(a)),
        _ => Err(Failure::input(format!(
            "{key} = {obj}: expected an angle in degrees or a geometry name such as 45as15"
        ))),
    }
}

/// The report dict with the front end's own keys added.
fn report<'py>(
    py: Python<'py>,
    mut m: Map<String, Value>,
    extra: Value,
) -> PyResult<Bound<'py, PyDict>> {
    if let Value::Object(e) = extra {
        m.extend(e);
    }
    dict(py, &m)
}

/// match(scene, target_lab=None, target_hex=None, angle=None, geometry=None,
/// goals=None, max_total_nm=None, brightness_weight=0.0, seed=1,
/// max_evals=60000, illuminant=None, observer=None, side="reflect",
/// polarization="unpolarized", gamut="clip", analyzer=None) -> dict
///
/// Optimises the scene's `vary_nm` thicknesses toward a target colour
/// (CIEDE2000), as `lamella match` does; the same seed gives the same design.
///
/// - target_lab: (L*, a*, b*) under the scene's (or the given) light and
///   observer; or target_hex: "#RRGGBB" (sRGB, as `color` renders it).
/// - angle: angle of incidence of the main target in degrees (films;
///   default 0); geometry: its measurement geometry such as "45as15"
///   (coatings).
/// - goals: further targets, a list of (angle or geometry, (L*, a*, b*)).
/// - max_total_nm: upper limit on the total physical thickness, nm.
/// - brightness_weight: adds w·(1 − Y/100) at the main target (ΔE00 units).
/// - seed, max_evals: the search's seed and its most evaluations.
/// - illuminant, observer, side, polarization, gamut, analyzer: as for
///   `Scene.color` (a goal under one handedness: polarization="left" or
///   analyzer="left").
///
/// Returns the command's report as a dict (`delta_e00`, `reachable`,
/// `goals`, `thicknesses_nm`, `total_thickness_nm`, `evaluations`,
/// `stopped`, …) with `scene`, the matched `Scene`. An unreachable target is
/// not an error: `reachable` is False and the closest design is returned.
#[pyfunction(name = "match")]
#[pyo3(signature = (scene, target_lab=None, target_hex=None, angle=None, geometry=None, goals=None,
    max_total_nm=None, brightness_weight=0.0, seed=1, max_evals=60000, illuminant=None,
    observer=None, side="reflect", polarization="unpolarized", gamut="clip", analyzer=None))]
#[allow(clippy::too_many_arguments)]
pub fn match_<'py>(
    py: Python<'py>,
    scene: &Scene,
    target_lab: Option<&Bound<'py, PyAny>>,
    target_hex: Option<&str>,
    angle: Option<f64>,
    geometry: Option<&str>,
    goals: Option<&Bound<'py, PyAny>>,
    max_total_nm: Option<f64>,
    brightness_weight: f64,
    seed: u64,
    max_evals: usize,
    illuminant: Option<String>,
    observer: Option<String>,
    side: &str,
    polarization: &str,
    gamut: &str,
    analyzer: Option<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let started = Instant::now();
    scene.warn(py, true)?;
    let s = &scene.inner;
    let viewing = scene.viewing(&view(
        illuminant,
        observer,
        side,
        polarization,
        gamut,
        analyzer,
    ))?;
    let lab0 = target(&viewing, &s.wavelengths_nm, target_lab, target_hex)?
        .ok_or_else(|| Failure::input("give target_lab=(L, a, b) or target_hex=\"#RRGGBB\""))?;
    let main = match (geometry, angle) {
        (Some(_), Some(_)) => {
            return Err(
                Failure::input("give angle (films) or geometry (coatings), not both").into(),
            );
        }
        (Some(g), _) => self::geometry(g, "geometry")?,
        (None, _) if s.coating.is_some() => {
            return Err(Failure::input(
                "this scene has a coating: give the target's geometry (e.g. geometry=\"45as15\")",
            )
            .into());
        }
        (None, a) => At::Angle(a.unwrap_or(0.0)),
    };
    let mut list = vec![Goal {
        at: main,
        lab: lab0,
    }];
    if let Some(goals) = goals {
        for (i, g) in goals.try_iter()?.enumerate() {
            let g = g?;
            let key = format!("goals[{i}]");
            let pair: Option<Vec<Bound<'py, PyAny>>> = (g.cast::<PyString>().is_err())
                .then(|| g.try_iter().ok()?.collect::<PyResult<Vec<_>>>().ok())
                .flatten()
                .filter(|p| p.len() == 2);
            let Some(pair) = pair else {
                return Err(Failure::input(format!(
                    "{key} = {g}: expected (angle or geometry, (L, a, b))"
                ))
                .into());
            };
            list.push(Goal {
                at: point(&pair[0], &key)?,
                lab: lab(&pair[1], &format!("{key}[1]"))?,
            });
        }
    }
    if let Some(l) = max_total_nm.filter(|l| !(*l > 0.0)) {
        return Err(
            Failure::input(format!("max_total_nm = {l}: must be greater than zero")).into(),
        );
    }
    if !brightness_weight.is_finite() || brightness_weight < 0.0 {
        return Err(Failure::input(format!(
            "brightness_weight = {brightness_weight}: must be a finite number ≥ 0"
        ))
        .into());
    }
    if max_evals == 0 {
        return Err(Failure::input("max_evals = 0: must be at least 1").into());
    }
    let settings = MatchSettings {
        goals: list,
        max_total_nm,
        brightness_weight,
        budget: Budget {
            max_evals,
            good_enough: 0.03,
            handover: 0.5,
            min_gain: MIN_GAIN_DELTA_E,
            seed,
        },
    };
    let out = run(py, true, |stop| {
        match_colour(s, &viewing, &settings, &|_, _| stop.unwind_if_requested())
            .map_err(|e| scene.failure(e))
    })?;
    let doc = edited_document(&s.document, &out.variables, &out.thicknesses_nm)
        .map_err(|e| PyErr::from(scene.failure(e)))?;
    let matched = Py::new(py, scene.edited(py, &doc)?)?;
    let d = report(
        py,
        match_report(&out),
        json!({"max_evals": max_evals, "seed": seed, "wall_time_s": started.elapsed().as_secs_f64()}),
    )?;
    d.set_item("scene", matched)?;
    Ok(d)
}

fn view(
    illuminant: Option<String>,
    observer: Option<String>,
    side: &str,
    polarization: &str,
    gamut: &str,
    analyzer: Option<String>,
) -> ViewArgs {
    ViewArgs {
        illuminant,
        observer,
        side: side.into(),
        polarization: polarization.into(),
        gamut: gamut.into(),
        analyzer,
    }
}

/// tolerance(scene, sigma_nm=None, sigma_pct=None, sigma_n=0.0,
/// per_period=False, yield_angles=None, yield_geometries=None, samples=1000,
/// limit=1.0, seed=1, illuminant=None, observer=None, side="reflect",
/// polarization="unpolarized", gamut="clip", analyzer=None) -> dict
///
/// Monte Carlo tolerance of a design, as `lamella tolerance`: every layer as
/// written draws a Gaussian thickness error of `sigma_nm` (nm) or
/// `sigma_pct` (% of its thickness) — one of the two is required — and, with
/// `sigma_n`, an error in its real index. A layer in a repeat group carries
/// one error into every period unless `per_period`. Returns the report as a
/// dict: ΔE00 from the nominal colour (`delta_e00_p50`, `_p95`, `_max`),
/// `yield` within `limit` (ΔE00), per angle (`angles`) or geometry
/// (`geometries`, for a coating), and the layers ranked in `sensitivity`.
/// `yield_angles` (degrees on the scene's grid) or `yield_geometries`
/// (names) choose the points that count. The viewing options are as for
/// `Scene.color`, `analyzer` included.
#[pyfunction]
#[pyo3(signature = (scene, sigma_nm=None, sigma_pct=None, sigma_n=0.0, per_period=false,
    yield_angles=None, yield_geometries=None, samples=1000, limit=1.0, seed=1, illuminant=None,
    observer=None, side="reflect", polarization="unpolarized", gamut="clip", analyzer=None))]
#[allow(clippy::too_many_arguments)]
pub fn tolerance<'py>(
    py: Python<'py>,
    scene: &Scene,
    sigma_nm: Option<f64>,
    sigma_pct: Option<f64>,
    sigma_n: f64,
    per_period: bool,
    yield_angles: Option<&Bound<'py, PyAny>>,
    yield_geometries: Option<Vec<String>>,
    samples: usize,
    limit: f64,
    seed: u64,
    illuminant: Option<String>,
    observer: Option<String>,
    side: &str,
    polarization: &str,
    gamut: &str,
    analyzer: Option<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let started = Instant::now();
    scene.warn(py, true)?;
    let s = &scene.inner;
    let viewing = scene.viewing(&view(
        illuminant,
        observer,
        side,
        polarization,
        gamut,
        analyzer,
    ))?;
    let thickness = match (sigma_nm, sigma_pct) {
        (Some(x), None) => Sigma::Nm(x),
        (None, Some(p)) => Sigma::Pct(p),
        _ => return Err(Failure::input("give one of sigma_nm or sigma_pct").into()),
    };
    if !(limit >= 0.0) {
        return Err(Failure::input(format!("limit = {limit}: must be ≥ 0")).into());
    }
    let coating = s.coating.is_some();
    let yield_at = match (yield_angles, &yield_geometries) {
        (Some(_), _) if coating => {
            return Err(Failure::input(
                "yield_angles: this scene has a coating: choose geometries with yield_geometries",
            )
            .into());
        }
        (_, Some(_)) if !coating => {
            return Err(Failure::input(
                "yield_geometries: needs a scene with a `coating` section; choose angles with yield_angles",
            )
            .into());
        }
        (Some(list), _) => floats(list, "yield_angles")?
            .into_iter()
            .map(At::Angle)
            .collect(),
        (_, Some(list)) => list
            .iter()
            .enumerate()
            .map(|(i, g)| geometry(g, &format!("yield_geometries[{i}]")))
            .collect::<Outcome<Vec<_>>>()?,
        (None, None) => Vec::new(),
    };
    let settings = ToleranceSettings {
        thickness,
        sigma_n,
        per_period,
        yield_at,
        samples,
        limit,
        seed,
    };
    let out = run(py, true, |stop| {
        tolerance_with_progress(s, &viewing, &settings, &|_| stop.unwind_if_requested())
            .map_err(|e| scene.failure(e))
    })?;
    report(
        py,
        tolerance_report(&out, &settings),
        json!({"seed": seed, "wall_time_s": started.elapsed().as_secs_f64()}),
    )
}

/// Measured data from a path, a mapping with columns, or a tuple of arrays.
fn measured(py: Python<'_>, obj: &Bound<'_, PyAny>, angle: f64) -> Outcome<Vec<Measured>> {
    let is_path = obj.cast::<PyString>().is_ok() || obj.hasattr("__fspath__").unwrap_or(false);
    if is_path {
        let path: std::path::PathBuf = obj
            .extract()
            .map_err(|_| Failure::input("measured: expected a file path"))?;
        let text = std::fs::read_to_string(&path)
            .map_err(|e| Failure::input(format!("{}: cannot read: {e}", path.display())))?;
        let options = ReadOptions {
            default_angle_deg: angle,
            percent: false,
        };
        let reading = read(&text, &options)
            .map_err(|e| Failure::input(format!("{}: {e}", path.display())))?;
        if reading.quantity != Quantity::Reflectance {
            return Err(Failure::input(format!(
                "{}: T = transmittance: fit works on reflectance (an R column)",
                path.display()
            )));
        }
        let category = py.get_type::<crate::errors::SceneWarning>();
        for w in &reading.warnings {
            let text =
                std::ffi::CString::new(format!("{}: {w}", path.display()).replace('\0', " "))
                    .unwrap_or_default();
            PyErr::warn(py, &category, &text, 2).map_err(|e| Failure::input(e.to_string()))?;
        }
        return Ok(reading.groups);
    }
    let bad = || {
        Failure::input(
            "measured: expected a CSV path, a mapping with wavelength_nm and R (and \
             optionally angle_deg or geometry) columns, or a tuple (wavelength_nm, R[, angle_deg or geometry])",
        )
    };
    let column = |name: &str| -> Option<Bound<'_, PyAny>> {
        obj.contains(name)
            .ok()
            .filter(|c| *c)
            .and_then(|_| obj.get_item(name).ok())
    };
    let (w, r, third) = if let Ok(t) = obj.cast::<PyTuple>() {
        match t.len() {
            2 => (t.get_item(0).ok(), t.get_item(1).ok(), None),
            3 => (t.get_item(0).ok(), t.get_item(1).ok(), t.get_item(2).ok()),
            _ => return Err(bad()),
        }
    } else {
        let third = column("angle_deg").or_else(|| column("geometry"));
        (column("wavelength_nm"), column("R"), third)
    };
    let (Some(w), Some(r)) = (w, r) else {
        return Err(bad());
    };
    let w = floats(&w, "measured wavelength_nm")?;
    let r = floats(&r, "measured R")?;
    let at: Vec<At> = match third {
        None => vec![At::Angle(angle); w.len()],
        Some(c) => {
            let list = c.call_method0("tolist").unwrap_or(c);
            let names: Option<Vec<String>> = list.extract().ok();
            match names {
                Some(names) => names
                    .iter()
                    .enumerate()
                    .map(|(i, n)| geometry(n, &format!("measured[{i}] geometry")))
                    .collect::<Outcome<_>>()?,
                None => floats(&list, "measured angle_deg")?
                    .into_iter()
                    .map(At::Angle)
                    .collect(),
            }
        }
    };
    from_columns(&w, &r, &at)
        .map(|reading| reading.groups)
        .map_err(|e| Failure::input(e.to_string()))
}

/// fit(scene, measured, angle=0.0, scale=False, seed=1, max_evals=20000) -> dict
///
/// Fits the scene's `vary_nm` thicknesses to a measured unpolarized
/// reflectance spectrum (R as a fraction), as `lamella fit` does.
///
/// - measured: a CSV file (`wavelength_nm,R[,angle_deg]`, or
///   `wavelength_nm,R,geometry` for a coating's reflectance factors), a
///   mapping or DataFrame with those columns, or a tuple of arrays
///   (wavelength_nm, R[, angle_deg or geometry names]). R above 1.5 is
///   refused as percent.
/// - angle: angle of incidence of points without one, degrees.
/// - scale: also fit a multiplicative intensity scale.
/// - seed, max_evals: the global search's seed and its most evaluations.
///
/// - chart: also write the chart of measured against fitted spectra with
///   residuals to this path (.png or .svg), as `lamella fit --chart` does
///   (for 1 to 12 measured angles or geometries).
///
/// Returns the report as a dict (`rms`, `points`, `thicknesses_nm` with
/// `uncertainty` where determined, `scale`, `evaluations`, …) with `scene`,
/// the fitted `Scene`, and `chart`, that chart as a `lamella.Chart` (shown
/// inline in Jupyter; `save`, `png`, `svg`; left out beyond 12 angles or
/// geometries).
#[pyfunction]
#[pyo3(signature = (scene, measured, angle=0.0, scale=false, seed=1, max_evals=20000, chart=None))]
#[allow(clippy::too_many_arguments)]
pub fn fit<'py>(
    py: Python<'py>,
    scene: &Scene,
    measured: &Bound<'py, PyAny>,
    angle: f64,
    scale: bool,
    seed: u64,
    max_evals: usize,
    chart: Option<std::path::PathBuf>,
) -> PyResult<Bound<'py, PyDict>> {
    if let Some(path) = &chart {
        crate::chart::format_of(path)?;
    }
    let started = Instant::now();
    let s = &scene.inner;
    let data = self::measured(py, measured, angle)?;
    if chart.is_some() {
        FitChart::check(&data).map_err(|e| Failure::input(e.to_string()))?;
    }
    let settings = FitSettings {
        fit_scale: scale,
        budget: Budget {
            max_evals: max_evals.max(1),
            good_enough: 1e-5,
            handover: 0.0,
            min_gain: 1e-5,
            seed,
        },
    };
    let out = run(py, true, |stop| {
        fit_with_progress(s, &data, &settings, &|_, _| stop.unwind_if_requested())
            .map_err(|e| scene.failure(e))
    })?;
    let doc = edited_document(&s.document, &out.variables, &out.thicknesses_nm)
        .map_err(|e| PyErr::from(scene.failure(e)))?;
    let fitted = Py::new(py, scene.edited(py, &doc)?)?;
    let d = report(
        py,
        fit_report(&out, &data),
        json!({"seed": seed, "wall_time_s": started.elapsed().as_secs_f64()}),
    )?;
    d.set_item("scene", fitted)?;
    // More angles than a chart holds: no `chart` (checked above when asked for).
    if let Ok(drawn) = FitChart::new(&s.title, &out, &data) {
        let drawn = crate::chart::Chart::of_fit(drawn);
        if let Some(path) = &chart {
            drawn.save(py, path.clone())?;
        }
        d.set_item("chart", Py::new(py, drawn)?)?;
    }
    Ok(d)
}

/// Designs per piece of a sweep (as the command line formats them).
const SWEEP_PIECE: u64 = 4096;

/// The columns of one piece of a sweep.
#[derive(Default)]
struct Piece {
    index: Vec<u64>,
    thicknesses: Vec<f64>,
    lab: [Vec<f64>; 3],
    srgb: Vec<f64>,
    hex: Vec<String>,
    delta_e00: Vec<f64>,
}

/// _sweep(scene, samples=None, grid=None, seed=1, target_lab=None,
/// target_hex=None, angle=0.0, shard=None, illuminant=None, observer=None,
/// side="reflect", polarization="unpolarized", gamut="clip", analyzer=None) -> dict
///
/// The designs of `lamella sweep` (share `shard` = (I, N) of them, 1 ≤ I ≤ N)
/// as columns: `index` (uint64), `thicknesses_nm` (N, V), `L`, `a`, `b`,
/// `srgb` (N, 3), `hex`, `delta_e00` (with a target), and the variables'
/// `pointers` and `materials`. `lamella.sweep` builds its table from this.
#[pyfunction]
#[pyo3(signature = (scene, samples=None, grid=None, seed=1, target_lab=None, target_hex=None,
    angle=0.0, shard=None, illuminant=None, observer=None, side="reflect",
    polarization="unpolarized", gamut="clip", analyzer=None))]
#[allow(clippy::too_many_arguments)]
pub fn _sweep<'py>(
    py: Python<'py>,
    scene: &Scene,
    samples: Option<u64>,
    grid: Option<usize>,
    seed: u64,
    target_lab: Option<&Bound<'py, PyAny>>,
    target_hex: Option<&str>,
    angle: f64,
    shard: Option<(u64, u64)>,
    illuminant: Option<String>,
    observer: Option<String>,
    side: &str,
    polarization: &str,
    gamut: &str,
    analyzer: Option<String>,
) -> PyResult<Bound<'py, PyDict>> {
    scene.warn(py, true)?;
    let s = &scene.inner;
    let viewing = scene.viewing(&view(
        illuminant,
        observer,
        side,
        polarization,
        gamut,
        analyzer,
    ))?;
    let target = target(&viewing, &s.wavelengths_nm, target_lab, target_hex)?;
    let vars = varying(s);
    if vars.is_empty() {
        return Err(Failure::input(format!(
            "{}stack = (no vary_nm): mark the layers to sweep with \"vary_nm\": [low, high]",
            if scene.label.is_empty() {
                String::new()
            } else {
                format!("{}: ", scene.label)
            }
        ))
        .into());
    }
    let plan = match (samples, grid) {
        (Some(samples), None) => Plan::Random { samples, seed },
        (None, Some(k)) => Plan::Grid(k),
        _ => return Err(Failure::input("give one of samples or grid").into()),
    };
    let total = plan
        .count(vars.len())
        .map_err(|e| Failure::input(e.to_string()))?;
    let range = match shard {
        None => 0..total,
        Some((i, n)) => {
            lamella::design::sweep::shard(total, i, n).map_err(|e| Failure::input(e.to_string()))?
        }
    };
    if !(angle.abs() < 90.0) {
        return Err(Failure::input(format!("angle = {angle}: must lie below 90°")).into());
    }
    let dim = vars.len();
    let pointers: Vec<String> = vars.iter().map(|v| v.pointer.clone()).collect();
    let materials: Vec<String> = vars.iter().map(|v| v.material.clone()).collect();
    let eval = Evaluator::colour(s, vars, &[angle], &viewing)
        .map_err(|e| PyErr::from(scene.failure(e)))?;
    let pieces = run(py, range.end - range.start > 256, |stop| {
        let starts: Vec<u64> = range.clone().step_by(SWEEP_PIECE as usize).collect();
        starts
            .into_par_iter()
            .map(|start| {
                stop.check()?;
                let end = (start + SWEEP_PIECE).min(range.end);
                let mut p = Piece::default();
                evaluate(&eval, plan, start..end, target, |d| {
                    p.index.push(d.index);
                    p.thicknesses.extend_from_slice(d.thicknesses_nm);
                    for (col, v) in p.lab.iter_mut().zip(d.colour.lab) {
                        col.push(v);
                    }
                    p.srgb.extend_from_slice(&d.colour.rgb);
                    p.hex.push(d.colour.hex.clone());
                    if let Some(de) = d.delta_e00 {
                        p.delta_e00.push(de);
                    }
                })
                .map_err(|e| scene.failure(e))?;
                Ok(p)
            })
            .collect::<Outcome<Vec<Piece>>>()
    })?;
    let n = (range.end - range.start) as usize;
    let mut all = Piece::default();
    for p in pieces {
        all.index.extend(p.index);
        all.thicknesses.extend(p.thicknesses);
        for (a, b) in all.lab.iter_mut().zip(p.lab) {
            a.extend(b);
        }
        all.srgb.extend(p.srgb);
        all.hex.extend(p.hex);
        all.delta_e00.extend(p.delta_e00);
    }
    let out = PyDict::new(py);
    out.set_item("index", numpy::PyArray1::from_vec(py, all.index))?;
    out.set_item("thicknesses_nm", array2(py, (n, dim), all.thicknesses)?)?;
    let [l, a, b] = all.lab;
    out.set_item("L", array1(py, l))?;
    out.set_item("a", array1(py, a))?;
    out.set_item("b", array1(py, b))?;
    out.set_item("srgb", array2(py, (n, 3), all.srgb)?)?;
    out.set_item("hex", PyList::new(py, all.hex)?)?;
    if target.is_some() {
        out.set_item("delta_e00", array1(py, all.delta_e00))?;
    }
    out.set_item("pointers", PyList::new(py, pointers)?)?;
    out.set_item("materials", PyList::new(py, materials)?)?;
    out.set_item("total", total)?;
    Ok(out)
}

/// _sweep_size(scene, samples=None, grid=None) -> int
///
/// The number of designs of a sweep (for splitting it into shards).
#[pyfunction]
#[pyo3(signature = (scene, samples=None, grid=None))]
pub fn _sweep_size(scene: &Scene, samples: Option<u64>, grid: Option<usize>) -> PyResult<u64> {
    let plan = match (samples, grid) {
        (Some(samples), None) => Plan::Random { samples, seed: 0 },
        (None, Some(k)) => Plan::Grid(k),
        _ => return Err(Failure::input("give one of samples or grid").into()),
    };
    Ok(plan
        .count(varying(&scene.inner).len())
        .map_err(|e| Failure::input(e.to_string()))?)
}

/// _shard_range(total, index, count) -> (start, end)
///
/// The designs of share `index` (1-based) of `count`, as `--shard I/N`.
#[pyfunction]
pub fn _shard_range(total: u64, index: u64, count: u64) -> PyResult<(u64, u64)> {
    let r = shard(total, index, count).map_err(|e| Failure::input(e.to_string()))?;
    Ok((r.start, r.end))
}
