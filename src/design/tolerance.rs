//! Manufacturing tolerance: Monte Carlo over independent Gaussian errors in
//! each layer's thickness (and optionally its refractive index), the
//! CIEDE2000 from the nominal colour at each angle (or, for a coating's
//! platelet, at each of the coating's geometries), the yield at a ΔE00
//! limit, and which layer's error moves the colour most.
//!
//! By default each layer as written in the scene draws one error, and a
//! layer inside a repeat group carries the same error into every period (a
//! drift of the coater's recipe). With `per_period`, every deposited layer
//! (each period of each repeat group) draws its own (run-to-run scatter).

use rand::SeedableRng;
use rand::rngs::StdRng;
use rand_distr::{Distribution, StandardNormal};
use rayon::prelude::*;

use super::coating::{At, Colours, with_coating};
use super::finite::check_finite;
use super::variables::{Variable, every_layer_and_pitch, walk_mut};
use crate::angle_colour::Viewing;
use crate::colorimetry::{delta_e2000, xyz_to_lab};
use crate::error::{Error, Result};
use crate::scene::{Item, Scene, Sigma};

/// Most deposited layers a `per_period` analysis expands repeat groups to.
pub const MAX_DEPOSITED_LAYERS: u64 = 100_000;

/// Error model and sampling.
#[derive(Debug, Clone)]
pub struct ToleranceSettings {
    /// Standard deviation of each layer's thickness (nm or % of nominal).
    pub thickness: Sigma,
    /// Standard deviation of each layer's real refractive index (0 = none).
    pub sigma_n: f64,
    /// Whether every period of a repeat group draws its own errors (else a
    /// layer written once in a group shares one error across its periods).
    pub per_period: bool,
    /// The points (scene angles, or coating geometries) that count toward
    /// the overall statistics, the yield and the sensitivity; empty = all.
    pub yield_at: Vec<At>,
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
    /// The layer as written (in a repeat group: all its periods).
    pub layer: Variable,
    /// Its thickness σ in nm.
    pub sigma_nm: f64,
    /// ΔE00 (largest over the counted points, mean of +σ and −σ) for a
    /// one-σ thickness error in this layer alone.
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
    /// Whether each point counts toward `overall` and the sensitivity.
    pub counted: Vec<bool>,
    /// Nominal Lab at each point.
    pub nominal_lab: Vec<[f64; 3]>,
    /// ΔE00 statistics per point.
    pub per_point: Vec<Stats>,
    /// Statistics of each sample's worst counted point (a sample passes only
    /// if it passes at every counted point).
    pub overall: Stats,
    /// Layers as written, ranked by their one-σ effect, largest first.
    pub sensitivity: Vec<Sensitivity>,
    /// Independent error sources: layers as written, or deposited layers
    /// with `per_period`.
    pub deposited_layers: usize,
}

/// The layers of `items` as deposited: every period of every repeat group
/// written out (graded groups scaled from 1 to `chirp_scale`, as the scene
/// expands them), each layer's pointer marked `@period` per enclosing group
/// so that every deposited layer is a variable of its own.
fn deposited(items: &[Item], scale: f64, mark: &str, out: &mut Vec<Item>) {
    for item in items {
        match item {
            Item::Layer(l) => {
                let mut l = l.clone();
                l.thickness_nm *= scale;
                // A helix in a graded group keeps its turns per layer.
                if let Some(h) = l.anisotropy.as_mut().and_then(|a| a.helix.as_mut()) {
                    h.pitch_nm *= scale;
                }
                l.pointer.push_str(mark);
                out.push(Item::Layer(l));
            }
            Item::Repeat(r) => {
                let steps = (r.count.max(2) - 1) as f64;
                for p in 0..r.count {
                    let s = scale * (1.0 + (r.chirp_scale - 1.0) * p as f64 / steps);
                    deposited(&r.items, s, &format!("{mark}@{}", p + 1), out);
                }
            }
        }
    }
}

/// Deposited layers of `items`, counting every period.
fn deposited_count(items: &[Item]) -> u64 {
    items
        .iter()
        .map(|i| match i {
            Item::Layer(_) => 1,
            Item::Repeat(r) => r.count.saturating_mul(deposited_count(&r.items)),
        })
        .fold(0, u64::saturating_add)
}

/// Which of `points` count: all when `chosen` is empty, else those listed
/// (each must be one of the points; angles compared to 1e-9°).
fn counted_points(points: &[At], chosen: &[At]) -> Result<Vec<bool>> {
    if chosen.is_empty() {
        return Ok(vec![true; points.len()]);
    }
    let same = |a: &At, b: &At| match (a, b) {
        (At::Angle(x), At::Angle(y)) => (x - y).abs() < 1e-9,
        (At::Geometry(g), At::Geometry(h)) => {
            g.name == h.name
                || (g.in_plane == h.in_plane
                    && (g.illumination_deg - h.illumination_deg).abs() < 1e-9
                    && (g.aspecular_deg - h.aspecular_deg).abs() < 1e-9)
        }
        _ => false,
    };
    for c in chosen {
        if !points.iter().any(|p| same(p, c)) {
            let list = points
                .iter()
                .map(|p| match p {
                    At::Angle(a) => a.to_string(),
                    At::Geometry(g) => g.name.clone(),
                })
                .collect::<Vec<_>>()
                .join(", ");
            return Err(match c {
                At::Angle(a) => Error::invalid(
                    "yield_angles",
                    a,
                    format!("not an angle of the scene's grid ({list})"),
                ),
                At::Geometry(g) => Error::invalid(
                    "yield_geometries",
                    &g.name,
                    format!("not one of the coating's geometries ({list})"),
                ),
            });
        }
    }
    Ok(points
        .iter()
        .map(|p| chosen.iter().any(|c| same(p, c)))
        .collect())
}

/// Runs the analysis at the scene's angles as `viewing` sees them; when the
/// scene has a `coating`, on the platelet's layers at the coating's geometries.
pub fn tolerance(
    scene: &Scene,
    viewing: &Viewing,
    settings: &ToleranceSettings,
) -> Result<ToleranceOutcome> {
    tolerance_with_progress(scene, viewing, settings, &|_| {})
}

/// [`tolerance`], calling `progress(samples done)` from worker threads as
/// the Monte Carlo samples finish (in no particular order).
pub fn tolerance_with_progress(
    scene: &Scene,
    viewing: &Viewing,
    settings: &ToleranceSettings,
    progress: &(dyn Fn(usize) + Sync),
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
    let (mut own, mut coating) = with_coating(scene)?;
    let written_items = match &coating {
        Some(c) => c.platelet.clone(),
        None => own.stack.clone(),
    };
    let written = every_layer_and_pitch(&own, &written_items);
    let mut items = if settings.per_period {
        let n = deposited_count(&written_items);
        if n > MAX_DEPOSITED_LAYERS {
            return Err(Error::invalid(
                "per_period",
                format!("{n} deposited layers"),
                format!("keep the expanded stack under {MAX_DEPOSITED_LAYERS} layers"),
            ));
        }
        let mut out = Vec::new();
        deposited(&written_items, 1.0, "", &mut out);
        out
    } else {
        written_items
    };
    // Each deposited layer gets media of its own so that its index can move
    // alone (an anisotropic layer a copy of its material, whose principal
    // indices move together).
    let mut layer_media = Vec::new();
    walk_mut(&mut items, &mut |l| {
        let mut own_copy = |m: usize| {
            own.media.push(own.media[m].clone());
            own.media.len() - 1
        };
        l.medium = own_copy(l.medium);
        let mut moved = vec![l.medium];
        if let Some(a) = l.anisotropy.as_mut() {
            let mut crystal = own.crystals[a.crystal].clone();
            let originals = crystal.principal;
            for (i, m) in originals.iter().enumerate() {
                crystal.principal[i] = match originals[..i].iter().position(|p| p == m) {
                    Some(j) => crystal.principal[j],
                    None => own_copy(*m),
                };
            }
            moved = crystal.principal.to_vec();
            moved.dedup();
            own.crystals.push(crystal);
            a.crystal = own.crystals.len() - 1;
        }
        layer_media.push(moved);
    });
    let vars = every_layer_and_pitch(&own, &items);
    // The media each variable's index error moves: its layer's for a
    // thickness, none for a pitch.
    let mut layers = layer_media.into_iter();
    let var_media: Vec<Vec<usize>> = vars
        .iter()
        .map(|v| match v.pitch_of() {
            Some(_) => Vec::new(),
            None => layers.next().expect("one variable per layer"),
        })
        .collect();
    // The written layer (or pitch) each deposited one comes from.
    let source: Vec<usize> = vars
        .iter()
        .map(|v| {
            let written_pointer = as_written(v);
            written
                .iter()
                .position(|w| w.pointer == written_pointer)
                .expect("every deposited layer comes from a written one")
        })
        .collect();
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
    let counted = counted_points(&points, &settings.yield_at)?;
    let sigma_of = |v: &Variable| match settings.thickness {
        Sigma::Nm(s) => s,
        Sigma::Pct(p) => v.nominal_nm * p / 100.0,
    };
    let sigma: Vec<f64> = vars.iter().map(sigma_of).collect();
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
    for (lab, p) in nominal_lab.iter().zip(&points) {
        check_finite(lab, p, "", "the nominal design's colour")?;
    }
    // ΔE00 at every point; the colour of a sample must be finite.
    let deltas = |l: &[[f64; 3]], context: &dyn Fn() -> String| -> Result<Vec<f64>> {
        l.iter()
            .zip(&nominal_lab)
            .zip(&points)
            .map(|((a, b), p)| {
                check_finite(a, p, &context(), "the colour")?;
                Ok(delta_e2000(*b, *a))
            })
            .collect()
    };
    let worst = |d: &[f64]| -> f64 {
        d.iter()
            .zip(&counted)
            .filter(|(_, c)| **c)
            .map(|(d, _)| *d)
            .fold(0.0, f64::max)
    };
    let media = own.media.len();
    let with_index = settings.sigma_n > 0.0;
    // Sample i draws from its own seeded stream, so results do not depend on
    // the thread count.
    let done = std::sync::atomic::AtomicUsize::new(0);
    // `progress` may panic to abandon the analysis; the fuse then stops the
    // other threads at once.
    let samples: Vec<Vec<f64>> = (0..settings.samples)
        .into_par_iter()
        .panic_fuse()
        .map(|i| {
            progress(done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1);
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
                for moved in var_media.iter().filter(|m| !m.is_empty()) {
                    let d = settings.sigma_n * normal();
                    for &m in moved {
                        dn[m] = d;
                    }
                }
                dn
            });
            deltas(&labs(&x, dn.as_deref()), &|| format!("sample {}, ", i + 1))
        })
        .collect::<Result<_>>()?;
    let per_point = (0..points.len())
        .map(|a| stats(samples.iter().map(|s| s[a]).collect(), settings.limit))
        .collect();
    let overall = stats(samples.iter().map(|s| worst(s)).collect(), settings.limit);
    // One layer as written at a time (all its deposited copies), ±1σ.
    let nominal_context = || String::from("one-σ change, ");
    let mut sensitivity: Vec<Sensitivity> = (0..written.len())
        .into_par_iter()
        .map(|j| {
            let copies: Vec<usize> = (0..vars.len()).filter(|&c| source[c] == j).collect();
            let moved = |sign: f64| -> Result<f64> {
                let mut x = nominal.clone();
                for &c in &copies {
                    x[c] = (x[c] + sign * sigma[c]).max(0.0);
                }
                Ok(worst(&deltas(&labs(&x, None), &nominal_context)?))
            };
            let has_index = copies.iter().any(|&c| !var_media[c].is_empty());
            let index = (with_index && has_index)
                .then(|| -> Result<f64> {
                    let moved_n = |d: f64| -> Result<f64> {
                        let mut dn = vec![0.0; media];
                        for &c in &copies {
                            for &m in &var_media[c] {
                                dn[m] = d;
                            }
                        }
                        Ok(worst(&deltas(
                            &labs(&nominal, Some(&dn)),
                            &nominal_context,
                        )?))
                    };
                    Ok(0.5 * (moved_n(settings.sigma_n)? + moved_n(-settings.sigma_n)?))
                })
                .transpose()?;
            Ok(Sensitivity {
                layer: written[j].clone(),
                sigma_nm: sigma_of(&written[j]),
                delta_e00_thickness: 0.5 * (moved(1.0)? + moved(-1.0)?),
                delta_e00_index: index,
            })
        })
        .collect::<Result<_>>()?;
    let size = |s: &Sensitivity| {
        s.delta_e00_thickness
            .hypot(s.delta_e00_index.unwrap_or(0.0))
    };
    sensitivity.sort_by(|a, b| size(b).total_cmp(&size(a)));
    Ok(ToleranceOutcome {
        points,
        counted,
        nominal_lab,
        per_point,
        overall,
        sensitivity,
        deposited_layers: vars.len(),
    })
}

/// The pointer of the written layer (or pitch) a deposited one comes
/// from: without the period marks (`/stack/1/stack/0@3` → `/stack/1/stack/0`).
fn as_written(v: &Variable) -> String {
    let unmarked = |p: &str| p.split('@').next().unwrap_or(p).to_string();
    match v.pitch_of() {
        Some(layer) => format!("{}{}", unmarked(layer), &v.pointer[layer.len()..]),
        None => unmarked(&v.pointer),
    }
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
