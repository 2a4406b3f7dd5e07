//! Manufacturing tolerance: Monte Carlo over independent Gaussian errors in
//! each layer's thickness (and optionally its refractive index), the
//! CIEDE2000 from the nominal colour at each angle (or, for a coating's
//! platelet, at each of the coating's geometries), the yield at a ΔE00
//! limit, and which layer's error moves the colour most.
//!
//! Each layer as written in the scene draws one error; a layer inside a
//! repeat group carries the same error into every period (the period is
//! what a coater repeats).

use rand::SeedableRng;
use rand::rngs::StdRng;
use rand_distr::{Distribution, StandardNormal};
use rayon::prelude::*;

use super::coating::{At, Colours, with_coating};
use super::variables::{Variable, every_layer, walk_mut};
use crate::angle_colour::Viewing;
use crate::colorimetry::{delta_e2000, xyz_to_lab};
use crate::error::{Error, Result};
use crate::scene::{Scene, Sigma};

/// Error model and sampling.
#[derive(Debug, Clone, Copy)]
pub struct ToleranceSettings {
    /// Standard deviation of each layer's thickness (nm or % of nominal).
    pub thickness: Sigma,
    /// Standard deviation of each layer's real refractive index (0 = none).
    pub sigma_n: f64,
    /// Number of Monte Carlo samples.
    pub samples: usize,
    /// ΔE00 limit for the yield.
    pub limit: f64,
    /// Seed of the random draws.
    pub seed: u64,
}

/// Distribution of ΔE00 over the samples.
#[derive(Debug, Clone, PartialEq)]
pub struct Stats {
    /// Median.
    pub p50: f64,
    /// 95th percentile.
    pub p95: f64,
    /// Largest.
    pub max: f64,
    /// Fraction of samples within the limit.
    pub yield_fraction: f64,
}

/// One layer's share of the colour error.
#[derive(Debug, Clone)]
pub struct Sensitivity {
    /// The layer.
    pub layer: Variable,
    /// Its thickness σ in nm.
    pub sigma_nm: f64,
    /// ΔE00 (largest over the points, mean of +σ and −σ) for a one-σ
    /// thickness error in this layer alone.
    pub delta_e00_thickness: f64,
    /// The same for a one-σ index error, when index errors are modelled.
    pub delta_e00_index: Option<f64>,
}

/// The tolerance analysis.
#[derive(Debug, Clone)]
pub struct ToleranceOutcome {
    /// Where the colour is judged: the scene's angles of incidence, or its
    /// coating's geometries.
    pub points: Vec<At>,
    /// Nominal Lab at each point.
    pub nominal_lab: Vec<[f64; 3]>,
    /// ΔE00 statistics per point.
    pub per_point: Vec<Stats>,
    /// Statistics of each sample's worst point (a sample passes only if it
    /// passes at every point).
    pub overall: Stats,
    /// Layers ranked by their one-σ effect, largest first.
    pub sensitivity: Vec<Sensitivity>,
}

/// Runs the analysis at the scene's angles as `viewing` sees them; when the
/// scene has a `coating`, on the platelet's layers at the coating's geometries.
pub fn tolerance(
    scene: &Scene,
    viewing: &Viewing,
    settings: &ToleranceSettings,
) -> Result<ToleranceOutcome> {
    if settings.samples == 0 {
        return Err(Error::invalid("samples", 0, "need at least one sample"));
    }
    let (Sigma::Nm(s) | Sigma::Pct(s)) = settings.thickness;
    for (key, v) in [("sigma", s), ("sigma_n", settings.sigma_n)] {
        if !(v >= 0.0 && v.is_finite()) {
            return Err(Error::invalid(key, v, "must be a finite number ≥ 0"));
        }
    }
    // Each layer gets a medium of its own so that its index can move alone.
    let (mut own, mut coating) = with_coating(scene)?;
    let mut items = match &coating {
        Some(c) => c.platelet.clone(),
        None => own.stack.clone(),
    };
    let mut layer_medium = Vec::new();
    walk_mut(&mut items, &mut |l| {
        own.media.push(own.media[l.medium].clone());
        l.medium = own.media.len() - 1;
        layer_medium.push(l.medium);
    });
    let vars = every_layer(&own, &items);
    let points: Vec<At> = match &mut coating {
        Some(c) => {
            c.platelet = items;
            c.geometries.iter().cloned().map(At::Geometry).collect()
        }
        None => {
            own.stack = items;
            own.angles_deg.iter().map(|&a| At::Angle(a)).collect()
        }
    };
    let sigma: Vec<f64> = vars
        .iter()
        .map(|v| match settings.thickness {
            Sigma::Nm(s) => s,
            Sigma::Pct(p) => v.nominal_nm * p / 100.0,
        })
        .collect();
    let eval = Colours::new(&own, coating.as_ref(), vars.clone(), &points, viewing)?;
    let (white, _) = eval.white();
    let nominal: Vec<f64> = vars.iter().map(|v| v.nominal_nm).collect();
    let labs = |x: &[f64], dn: Option<&[f64]>| -> Vec<[f64; 3]> {
        eval.xyz(x, dn)
            .iter()
            .map(|&c| xyz_to_lab(c, white))
            .collect()
    };
    let nominal_lab = labs(&nominal, None);
    let worst = |l: &[[f64; 3]]| -> f64 {
        l.iter()
            .zip(&nominal_lab)
            .map(|(a, b)| delta_e2000(*b, *a))
            .fold(0.0, f64::max)
    };
    let media = own.media.len();
    let with_index = settings.sigma_n > 0.0;
    // Sample i draws from its own seeded stream, so results do not depend on
    // the thread count.
    let samples: Vec<Vec<f64>> = (0..settings.samples)
        .into_par_iter()
        .map(|i| {
            let mut rng = StdRng::seed_from_u64(
                settings.seed ^ (i as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15),
            );
            let mut normal = || -> f64 { StandardNormal.sample(&mut rng) };
            let x: Vec<f64> = nominal
                .iter()
                .zip(&sigma)
                .map(|(t, s)| (t + s * normal()).max(0.0))
                .collect();
            let dn = with_index.then(|| {
                let mut dn = vec![0.0; media];
                for &m in &layer_medium {
                    dn[m] = settings.sigma_n * normal();
                }
                dn
            });
            labs(&x, dn.as_deref())
                .iter()
                .zip(&nominal_lab)
                .map(|(a, b)| delta_e2000(*b, *a))
                .collect()
        })
        .collect();
    let per_point = (0..points.len())
        .map(|a| stats(samples.iter().map(|s| s[a]).collect(), settings.limit))
        .collect();
    let overall = stats(
        samples
            .iter()
            .map(|s| s.iter().copied().fold(0.0, f64::max))
            .collect(),
        settings.limit,
    );
    // One layer at a time, ±1σ.
    let mut sensitivity: Vec<Sensitivity> = (0..vars.len())
        .into_par_iter()
        .map(|i| {
            let moved = |d: f64| {
                let mut x = nominal.clone();
                x[i] = (x[i] + d).max(0.0);
                worst(&labs(&x, None))
            };
            let index = with_index.then(|| {
                let moved_n = |d: f64| {
                    let mut dn = vec![0.0; media];
                    dn[layer_medium[i]] = d;
                    worst(&labs(&nominal, Some(&dn)))
                };
                0.5 * (moved_n(settings.sigma_n) + moved_n(-settings.sigma_n))
            });
            Sensitivity {
                layer: vars[i].clone(),
                sigma_nm: sigma[i],
                delta_e00_thickness: 0.5 * (moved(sigma[i]) + moved(-sigma[i])),
                delta_e00_index: index,
            }
        })
        .collect();
    let size = |s: &Sensitivity| {
        s.delta_e00_thickness
            .hypot(s.delta_e00_index.unwrap_or(0.0))
    };
    sensitivity.sort_by(|a, b| size(b).total_cmp(&size(a)));
    Ok(ToleranceOutcome {
        points,
        nominal_lab,
        per_point,
        overall,
        sensitivity,
    })
}

/// Median, 95th percentile (linear interpolation between order statistics,
/// common practice), maximum and the fraction within `limit`.
fn stats(mut v: Vec<f64>, limit: f64) -> Stats {
    v.sort_by(f64::total_cmp);
    let q = |p: f64| {
        let r = p * (v.len() - 1) as f64;
        let (lo, hi) = (r.floor() as usize, r.ceil() as usize);
        v[lo] + (v[hi] - v[lo]) * (r - lo as f64)
    };
    Stats {
        p50: q(0.5),
        p95: q(0.95),
        max: v[v.len() - 1],
        yield_fraction: v.iter().filter(|&&d| d <= limit).count() as f64 / v.len() as f64,
    }
}
