//! Matching a target colour: the `vary_nm` thicknesses that bring the
//! design's colour closest (CIEDE2000) to one or more targets at given
//! angles (a film) or measurement geometries (a coating's platelet), with
//! optional limits on total thickness and a pull toward bright reflectance.

use std::sync::atomic::{AtomicUsize, Ordering};

use super::coating::{At, Colours, design_items, with_coating};
use super::finite::check_finite;
use super::search::{self, Budget, Stopped};
use super::variables::{Variable, total_thickness, varying_in, with_thicknesses};
use crate::angle_colour::Viewing;
use crate::colorimetry::{Colour, delta_e2000, xyz_to_lab};
use crate::error::{Error, Result};
use crate::scene::Scene;

/// A target colour at one angle of incidence or geometry.
#[derive(Debug, Clone, PartialEq)]
pub struct Goal {
    /// Where: an angle for a film, a geometry for a coating.
    pub at: At,
    /// Target CIELAB L*, a*, b* (under the viewing's illuminant and observer).
    pub lab: [f64; 3],
}

/// What to match and how hard to try.
#[derive(Debug, Clone)]
pub struct MatchSettings {
    /// The targets; the first is the main one.
    pub goals: Vec<Goal>,
    /// Upper limit on the total physical thickness of the stack (or of the
    /// platelet), nm.
    pub max_total_nm: Option<f64>,
    /// Weight of brightness: adds `w·(1 − Y/100)` at the first goal to the
    /// cost (ΔE00 units).
    pub brightness_weight: f64,
    /// Evaluation budget, stopping level and seed.
    pub budget: Budget,
}

/// Largest ΔE00 still counted as reaching a target (common practice: about
/// one just-noticeable difference).
pub const REACHABLE_DELTA_E: f64 = 1.0;

/// Least fall of the best cost (ΔE00 units) that counts as progress of the
/// search: a twentieth of [`REACHABLE_DELTA_E`].
pub const MIN_GAIN_DELTA_E: f64 = 0.05;

/// Cost added per nm of total thickness beyond the limit, in ΔE00 units.
const THICKNESS_PENALTY_PER_NM: f64 = 1.0;

/// The outcome at one goal.
#[derive(Debug, Clone)]
pub struct GoalOutcome {
    /// The goal.
    pub goal: Goal,
    /// The colour the design reaches there.
    pub achieved: Colour,
    /// CIEDE2000 between target and achieved colour.
    pub delta_e00: f64,
}

/// The matched design.
#[derive(Debug, Clone)]
pub struct MatchOutcome {
    /// The variables, in the order of `thicknesses_nm`.
    pub variables: Vec<Variable>,
    /// Optimised thickness of each variable, nm.
    pub thicknesses_nm: Vec<f64>,
    /// One entry per goal.
    pub goals: Vec<GoalOutcome>,
    /// Total physical thickness of the optimised stack or platelet, nm.
    pub total_nm: f64,
    /// Whether every goal is within [`REACHABLE_DELTA_E`] and the thickness
    /// limit holds.
    pub reachable: bool,
    /// Smallest and largest total thickness the `vary_nm` bounds allow, nm.
    pub total_range_nm: (f64, f64),
    /// Cost evaluations spent.
    pub evaluations: usize,
    /// Why the search ended.
    pub stopped: Stopped,
}

/// Optimises the `vary_nm` thicknesses of `scene` toward the goals, seen as
/// `viewing` sees them: the stack's layers at angles, or, when the scene has
/// a `coating`, the platelet's layers at geometries.
///
/// Goals and limits that no design can meet (a thickness limit below the
/// smallest total the bounds allow, a lightness outside 0–100) are refused
/// before any design is evaluated. The search ends as soon as every goal is
/// within [`REACHABLE_DELTA_E`] after a local refinement (unless brightness
/// is weighted, which always leaves room to improve), when
/// [`search::PATIENCE_ROUNDS`] restarts in a row have not lowered the cost by
/// the budget's `min_gain` (the command line uses [`MIN_GAIN_DELTA_E`]), or
/// when the budget is spent. `progress(evaluations, best cost)` reports along the way.
pub fn match_colour(
    scene: &Scene,
    viewing: &Viewing,
    settings: &MatchSettings,
    progress: &(dyn Fn(usize, f64) + Sync),
) -> Result<MatchOutcome> {
    let (scene, coating) = with_coating(scene)?;
    let items = design_items(&scene, coating.as_ref());
    let vars = varying_in(&scene, items);
    if vars.is_empty() {
        return Err(Error::invalid(
            if coating.is_some() {
                "coating.platelet"
            } else {
                "stack"
            },
            "(no vary_nm)",
            "mark the layers to optimise with \"vary_nm\": [low, high]",
        ));
    }
    if settings.goals.is_empty() {
        return Err(Error::invalid("goals", "(none)", "give a target colour"));
    }
    // Reflectance and transmittance of a film never exceed 1, so its
    // lightness stays within 0–100; a coating's reflectance factor may pass 1
    // near the gloss.
    let top = if coating.is_some() {
        f64::INFINITY
    } else {
        100.0 + 1e-6
    };
    if let Some(g) = settings
        .goals
        .iter()
        .find(|g| !(g.lab[0] >= -1e-6 && g.lab[0] <= top))
    {
        return Err(Error::invalid(
            format!("goal at {} L*", g.at.describe()),
            g.lab[0],
            if coating.is_some() {
                "cannot be met: L* is never below 0"
            } else {
                "cannot be met: a film's L* lies within 0–100"
            },
        ));
    }
    // Total thickness is affine in the variables (a variable in a repeat
    // group counts once per period), so its extremes lie at the bounds.
    let total_at = |x: &[f64]| total_thickness(&with_thicknesses(items, &vars, x));
    let zero = vec![0.0; vars.len()];
    let base = total_at(&zero);
    let slope: Vec<f64> = (0..vars.len())
        .map(|i| {
            let mut e = zero.clone();
            e[i] = 1.0;
            total_at(&e) - base
        })
        .collect();
    let total = |x: &[f64]| base + slope.iter().zip(x).map(|(s, x)| s * x).sum::<f64>();
    let (lows, highs): (Vec<f64>, Vec<f64>) = vars
        .iter()
        .zip(&slope)
        .map(|(v, s)| {
            if *s >= 0.0 {
                (v.low_nm, v.high_nm)
            } else {
                (v.high_nm, v.low_nm)
            }
        })
        .unzip();
    let range = (total(&lows), total(&highs));
    if let Some(limit) = settings.max_total_nm
        && limit < range.0 - 1e-9
    {
        return Err(Error::invalid(
            "max_total_nm",
            limit,
            format!(
                "cannot be met: the smallest total thickness the vary_nm bounds allow is {} nm (every period of a repeat counted)",
                round_nm(range.0)
            ),
        ));
    }
    let points: Vec<At> = settings.goals.iter().map(|g| g.at.clone()).collect();
    let eval = Colours::new(&scene, coating.as_ref(), vars.clone(), &points, viewing)?;
    let (white, options) = eval.white();
    let to_x = |u: &[f64]| -> Vec<f64> {
        vars.iter()
            .zip(u)
            .map(|(v, u)| v.low_nm + u * (v.high_nm - v.low_nm))
            .collect()
    };
    let delta_e = |x: &[f64]| -> (Vec<f64>, f64) {
        let xyz = eval.xyz(x, None);
        let des = settings
            .goals
            .iter()
            .zip(&xyz)
            .map(|(g, xyz)| delta_e2000(g.lab, xyz_to_lab(*xyz, white)))
            .collect();
        (des, xyz[0][1])
    };
    let cost = |u: &[f64]| {
        let x = to_x(u);
        let (des, y) = delta_e(&x);
        let mut c = settings.brightness_weight * (1.0 - y / 100.0) + des.iter().sum::<f64>();
        if let Some(limit) = settings.max_total_nm {
            c += THICKNESS_PENALTY_PER_NM * (total(&x) - limit).max(0.0);
        }
        c
    };
    let within = |x: &[f64], des: &[f64]| {
        des.iter().all(|d| *d <= REACHABLE_DELTA_E)
            && settings.max_total_nm.is_none_or(|l| total(x) <= l + 1e-9)
    };
    let checks = AtomicUsize::new(0);
    let met = |u: &[f64]| {
        checks.fetch_add(1, Ordering::Relaxed);
        let x = to_x(u);
        within(&x, &delta_e(&x).0)
    };
    let mut budget = settings.budget;
    let never = |_: &[f64]| false;
    let met: &search::Met = if settings.brightness_weight != 0.0 {
        budget.good_enough = f64::NEG_INFINITY;
        budget.handover = f64::NEG_INFINITY;
        &never
    } else {
        &met
    };
    let found = search::minimise(&cost, vars.len(), budget, met, progress);
    let x = to_x(&found.u);
    let goals: Vec<GoalOutcome> = settings
        .goals
        .iter()
        .zip(eval.xyz(&x, None))
        .map(|(g, xyz)| {
            check_finite(&xyz, &g.at, "", "the colour of the best design")?;
            let achieved = Colour::new(xyz, white, &options);
            Ok(GoalOutcome {
                goal: g.clone(),
                delta_e00: delta_e2000(g.lab, achieved.lab),
                achieved,
            })
        })
        .collect::<Result<_>>()?;
    let total_nm = total(&x);
    let des: Vec<f64> = goals.iter().map(|g| g.delta_e00).collect();
    Ok(MatchOutcome {
        variables: vars,
        reachable: within(&x, &des),
        thicknesses_nm: x,
        goals,
        total_nm,
        total_range_nm: range,
        evaluations: found.evaluations + checks.load(Ordering::Relaxed) + 1,
        stopped: found.stopped,
    })
}

/// A thickness rounded to 0.1 nm for messages.
fn round_nm(t: f64) -> f64 {
    (t * 10.0).round() / 10.0
}
