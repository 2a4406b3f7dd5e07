//! Fitting the `vary_nm` thicknesses (and optionally an intensity scale) to a
//! measured reflectance spectrum (or, for a coating's platelet, to measured
//! reflectance factors at geometries) by least squares: a seeded global search
//! against the interference fringes' local minima, then Levenberg–Marquardt
//! with uncertainties from the Jacobian.

use super::coating::{CoatingEvaluator, design_items, with_coating};
use super::evaluator::Evaluator;
use super::finite::check_finite;
use super::search::{self, Budget};
use super::variables::{Variable, varying_in};
use crate::angle_colour::{Polarization, Side};
use crate::error::{Error, Result};
use crate::scene::Scene;

pub use crate::measured::Measured;

/// How to fit.
#[derive(Debug, Clone, Copy)]
pub struct FitSettings {
    /// Also fit a multiplicative intensity scale on the model.
    pub fit_scale: bool,
    /// Budget and seed of the global stage.
    pub budget: Budget,
}

/// The fitted design.
#[derive(Debug, Clone)]
pub struct FitOutcome {
    /// The variables, in the order of the thicknesses.
    pub variables: Vec<Variable>,
    /// Fitted thickness of each variable, nm.
    pub thicknesses_nm: Vec<f64>,
    /// Approximate 1σ uncertainty of each, nm (`None` when not determined).
    pub uncertainties_nm: Vec<Option<f64>>,
    /// Fitted scale and its 1σ uncertainty, when fitted.
    pub scale: Option<(f64, Option<f64>)>,
    /// Root-mean-square residual in reflectance (or reflectance factor).
    pub rms: f64,
    /// Number of measured points.
    pub points: usize,
    /// Model evaluations spent.
    pub evaluations: usize,
    /// The fitted model (the scale applied) at each measured point, one
    /// list per measured group in the order of the measured data.
    pub fitted: Vec<Vec<f64>>,
}

impl FitOutcome {
    /// Root-mean-square residual of measured group `i` (`measured[i]`, the
    /// data the fit was given).
    pub fn rms_of(&self, i: usize, measured: &[Measured]) -> f64 {
        let (m, f) = (&measured[i].r, &self.fitted[i]);
        let sse: f64 = m.iter().zip(f).map(|(a, b)| (a - b).powi(2)).sum();
        (sse / m.len().max(1) as f64).sqrt()
    }
}

/// Model values at the measured points for thicknesses `x`.
type Predict<'a> = Box<dyn Fn(&[f64]) -> Vec<f64> + Sync + 'a>;

/// Film: unpolarized reflectance at each measured angle and wavelength.
fn film_model<'a>(
    scene: &'a Scene,
    vars: &[Variable],
    measured: &'a [Measured],
) -> Result<Predict<'a>> {
    let models = measured
        .iter()
        .map(|m| {
            let angle = m.at.angle_deg().ok_or_else(|| {
                Error::invalid(
                    "measured",
                    "geometry",
                    "geometries need a scene with a `coating` section",
                )
            })?;
            Evaluator::spectral(
                scene,
                vars.to_vec(),
                &m.wavelengths_nm,
                &[angle],
                Side::Reflect,
                Polarization::Unpolarized,
            )
        })
        .collect::<Result<Vec<_>>>()?;
    Ok(Box::new(move |x: &[f64]| {
        let mut out = Vec::new();
        for m in &models {
            m.eval(x, None, |o| out.extend_from_slice(o.spectrum));
        }
        out
    }))
}

/// Coating: the reflectance factor at each measured geometry and
/// wavelength, the model built on the union of the measured wavelengths.
fn coating_model<'a>(
    scene: &Scene,
    coating: &crate::pigment::Coating,
    vars: &[Variable],
    measured: &'a [Measured],
) -> Result<Predict<'a>> {
    let geometries = measured
        .iter()
        .map(|m| {
            m.at.geometry().cloned().ok_or_else(|| {
                Error::invalid(
                    "measured",
                    "angle_deg",
                    "this scene has a coating: give a geometry column (names such as 45as15)",
                )
            })
        })
        .collect::<Result<Vec<_>>>()?;
    let mut grid: Vec<f64> = measured
        .iter()
        .flat_map(|m| m.wavelengths_nm.iter().copied())
        .collect();
    grid.sort_by(f64::total_cmp);
    grid.dedup();
    let picks: Vec<Vec<usize>> = measured
        .iter()
        .map(|m| {
            m.wavelengths_nm
                .iter()
                .map(|w| grid.partition_point(|g| g < w))
                .collect()
        })
        .collect();
    let mut on_grid = scene.clone();
    on_grid.wavelengths_nm = grid;
    let eval = CoatingEvaluator::new(&on_grid, coating, vars.to_vec(), &geometries)?;
    Ok(Box::new(move |x: &[f64]| {
        eval.spectra(x, None)
            .iter()
            .zip(&picks)
            .flat_map(|(rf, pick)| pick.iter().map(|&i| rf[i]))
            .collect()
    }))
}

/// Fits the scene's `vary_nm` thicknesses to `measured` (unpolarized
/// reflectance at angles; when the scene has a `coating`, the platelet's
/// `vary_nm` layers to reflectance factors at geometries).
pub fn fit(scene: &Scene, measured: &[Measured], settings: &FitSettings) -> Result<FitOutcome> {
    fit_with_progress(scene, measured, settings, &|_, _| {})
}

/// [`fit`], calling `progress(evaluations, best rms)` after every
/// generation and local refinement of the global search, and at least every
/// 0.1 s while models are evaluated (the refinement included). It may panic
/// to abandon the fit.
pub fn fit_with_progress(
    scene: &Scene,
    measured: &[Measured],
    settings: &FitSettings,
    progress: &(dyn Fn(usize, f64) + Sync),
) -> Result<FitOutcome> {
    let (scene, coating) = with_coating(scene)?;
    let vars = varying_in(&scene, design_items(&scene, coating.as_ref()));
    if vars.is_empty() {
        return Err(Error::invalid(
            if coating.is_some() {
                "coating.platelet"
            } else {
                "stack"
            },
            "(no vary_nm)",
            "mark the layers to fit with \"vary_nm\": [low, high]",
        ));
    }
    let predict = match &coating {
        None => film_model(&scene, &vars, measured)?,
        Some(c) => coating_model(&scene, c, &vars, measured)?,
    };
    let data: Vec<f64> = measured.iter().flat_map(|m| m.r.iter().copied()).collect();
    let points = data.len();
    let parameters = vars.len() + usize::from(settings.fit_scale);
    if points <= parameters {
        return Err(Error::invalid(
            "measured",
            format!("{points} points"),
            format!("a fit of {parameters} parameters needs more points than that"),
        ));
    }
    let count = std::sync::atomic::AtomicUsize::new(0);
    let model = |x: &[f64]| -> Vec<f64> {
        count.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        predict(x)
    };
    // Best scale for a model spectrum: linear least squares in closed form.
    let best_scale = |r: &[f64]| {
        let num: f64 = r.iter().zip(&data).map(|(a, b)| a * b).sum();
        let den: f64 = r.iter().map(|a| a * a).sum();
        if settings.fit_scale && den > 0.0 {
            num / den
        } else {
            1.0
        }
    };
    let sse =
        |r: &[f64], s: f64| -> f64 { r.iter().zip(&data).map(|(a, b)| (s * a - b).powi(2)).sum() };
    let to_x = |u: &[f64]| -> Vec<f64> {
        vars.iter()
            .zip(u)
            .map(|(v, u)| v.low_nm + u * (v.high_nm - v.low_nm))
            .collect()
    };
    let rms_at = |u: &[f64]| {
        let r = model(&to_x(u));
        (sse(&r, best_scale(&r)) / points as f64).sqrt()
    };
    let found = search::minimise(&rms_at, vars.len(), settings.budget, &|_| false, progress);
    // Levenberg–Marquardt on (thicknesses, scale), still reporting progress.
    let mut p = to_x(&found.u);
    p.push(best_scale(&model(&p)));
    let pulse = search::Pulse::new(progress);
    pulse.seen(found.cost);
    let lm = levenberg_marquardt(&vars, settings.fit_scale, p, &|p: &[f64]| {
        pulse.before(count.load(std::sync::atomic::Ordering::Relaxed));
        let r = model(&p[..vars.len()]);
        r.iter()
            .zip(&data)
            .map(|(a, b)| p[vars.len()] * a - b)
            .collect()
    });
    let n = vars.len();
    let rms = (lm.sse / points as f64).sqrt();
    let model = predict(&lm.p[..n]);
    let mut fitted = Vec::with_capacity(measured.len());
    let mut start = 0;
    for m in measured {
        let end = start + m.r.len();
        // Name the first point where the fitted model cannot be computed.
        check_finite(&model[start..end], &m.at, "", "the model reflectance")?;
        fitted.push(model[start..end].iter().map(|v| lm.p[n] * v).collect());
        start = end;
    }
    if !rms.is_finite() || !lm.p[n].is_finite() {
        return Err(Error::NotComputable {
            what: "the residual".into(),
            at: "the fit".into(),
            why: "not a finite number".into(),
        });
    }
    let finite = |s: Option<f64>| s.filter(|s| s.is_finite());
    Ok(FitOutcome {
        thicknesses_nm: lm.p[..n].to_vec(),
        uncertainties_nm: lm.sigma[..n].iter().map(|&s| finite(s)).collect(),
        scale: settings.fit_scale.then(|| (lm.p[n], finite(lm.sigma[n]))),
        variables: vars,
        rms,
        points,
        evaluations: found.evaluations + count.load(std::sync::atomic::Ordering::Relaxed),
        fitted,
    })
}

struct LmResult {
    p: Vec<f64>,
    sse: f64,
    sigma: Vec<Option<f64>>,
}

/// Levenberg–Marquardt (Marquardt, "An algorithm for least-squares estimation
/// of nonlinear parameters", J. SIAM 11, 431, 1963) with steps clipped to the
/// bounds and a forward-difference Jacobian; the last parameter is the scale,
/// held fixed unless `fit_scale`. Uncertainties: the covariance
/// s²(JᵀJ)⁻¹ with s² = SSE/(m − p) (Press et al., *Numerical Recipes*, 3rd ed.
/// 2007, §15.5), for parameters not sitting on a bound.
fn levenberg_marquardt(
    vars: &[Variable],
    fit_scale: bool,
    mut p: Vec<f64>,
    residuals: &dyn Fn(&[f64]) -> Vec<f64>,
) -> LmResult {
    let free: Vec<usize> = (0..vars.len())
        .filter(|&i| vars[i].high_nm > vars[i].low_nm)
        .chain(fit_scale.then_some(vars.len()))
        .collect();
    let clamp = |i: usize, v: f64| {
        if i < vars.len() {
            v.clamp(vars[i].low_nm, vars[i].high_nm)
        } else {
            v
        }
    };
    let sse_of = |r: &[f64]| r.iter().map(|v| v * v).sum::<f64>();
    let mut r = residuals(&p);
    let mut sse = sse_of(&r);
    let mut lambda = 1e-3;
    let jacobian = |p: &[f64], r: &[f64]| -> Vec<Vec<f64>> {
        free.iter()
            .map(|&i| {
                let h = if i < vars.len() { 1e-3 } else { 1e-6 };
                let mut q = p.to_vec();
                let sign = if i < vars.len() && q[i] + h > vars[i].high_nm {
                    -1.0
                } else {
                    1.0
                };
                q[i] += sign * h;
                residuals(&q)
                    .iter()
                    .zip(r)
                    .map(|(a, b)| (a - b) / (sign * h))
                    .collect()
            })
            .collect()
    };
    let normal = |j: &[Vec<f64>], r: &[f64]| {
        let k = j.len();
        let mut a = vec![vec![0.0; k]; k];
        let mut g = vec![0.0; k];
        for x in 0..k {
            for y in 0..=x {
                let v: f64 = j[x].iter().zip(&j[y]).map(|(a, b)| a * b).sum();
                a[x][y] = v;
                a[y][x] = v;
            }
            g[x] = -j[x].iter().zip(r).map(|(a, b)| a * b).sum::<f64>();
        }
        (a, g)
    };
    for _ in 0..50 {
        let j = jacobian(&p, &r);
        let (a, g) = normal(&j, &r);
        let mut improved = false;
        while lambda < 1e12 {
            let mut damped = a.clone();
            for (i, row) in damped.iter_mut().enumerate() {
                row[i] += lambda * a[i][i].max(1e-12);
            }
            let Some(step) = solve(damped, g.clone()) else {
                lambda *= 10.0;
                continue;
            };
            let mut q = p.clone();
            for (k, &i) in free.iter().enumerate() {
                q[i] = clamp(i, q[i] + step[k]);
            }
            let rq = residuals(&q);
            let sq = sse_of(&rq);
            if sq < sse {
                let gain = sse - sq;
                p = q;
                r = rq;
                sse = sq;
                lambda = (lambda / 10.0).max(1e-12);
                improved = gain > 1e-15 * sse.max(1e-300);
                break;
            }
            lambda *= 10.0;
        }
        if !improved {
            break;
        }
    }
    // Covariance from the Jacobian at the solution.
    let j = jacobian(&p, &r);
    let (a, _) = normal(&j, &r);
    let dof = r.len().saturating_sub(free.len()).max(1) as f64;
    let s2 = sse / dof;
    let inverse = invert(a);
    let mut sigma = vec![None; p.len()];
    if let Some(inv) = inverse {
        for (k, &i) in free.iter().enumerate() {
            let at_bound =
                i < vars.len() && (p[i] - vars[i].low_nm < 1e-6 || vars[i].high_nm - p[i] < 1e-6);
            if !at_bound && inv[k][k] >= 0.0 {
                sigma[i] = Some((s2 * inv[k][k]).sqrt());
            }
        }
    }
    LmResult { p, sse, sigma }
}

/// Solves `a x = b` by Gaussian elimination with partial pivoting; `None` if
/// `a` is singular.
fn solve(mut a: Vec<Vec<f64>>, mut b: Vec<f64>) -> Option<Vec<f64>> {
    let n = b.len();
    for c in 0..n {
        let piv = (c..n).max_by(|&x, &y| a[x][c].abs().total_cmp(&a[y][c].abs()))?;
        if a[piv][c].abs() < 1e-300 {
            return None;
        }
        a.swap(c, piv);
        b.swap(c, piv);
        for r in c + 1..n {
            let (above, below) = a.split_at_mut(r);
            let (pivot, row) = (&above[c], &mut below[0]);
            let f = row[c] / pivot[c];
            for (x, p) in row[c..].iter_mut().zip(&pivot[c..]) {
                *x -= f * p;
            }
            b[r] -= f * b[c];
        }
    }
    let mut x = vec![0.0; n];
    for c in (0..n).rev() {
        let s: f64 = (c + 1..n).map(|k| a[c][k] * x[k]).sum();
        x[c] = (b[c] - s) / a[c][c];
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}

/// The inverse of `a`, column by column.
fn invert(a: Vec<Vec<f64>>) -> Option<Vec<Vec<f64>>> {
    let n = a.len();
    let cols = (0..n)
        .map(|c| {
            let mut e = vec![0.0; n];
            e[c] = 1.0;
            solve(a.clone(), e)
        })
        .collect::<Option<Vec<_>>>()?;
    Some(
        (0..n)
            .map(|r| (0..n).map(|c| cols[c][r]).collect())
            .collect(),
    )
}
