//! Bounded minimisation shared by the design tools: a seeded global stage
//! (differential evolution from `metaheuristics-nature`) over the unit box,
//! then Nelder–Mead refinements (from `argmin`) started at the best distinct
//! members of the population, restarted with fresh seeds until the goal is
//! met, [`PATIENCE_ROUNDS`] restarts in a row bring no progress, or the
//! budget is spent.

use std::panic::{AssertUnwindSafe, catch_unwind, resume_unwind};
use std::sync::Mutex;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::time::{Duration, Instant};

use argmin::core::{CostFunction, Executor, State};
use argmin::solver::neldermead::NelderMead;
use metaheuristics_nature::{Bounded, De, ObjFunc, Solver};

/// The global stage has stalled when its best cost has not fallen by 1 %
/// for this many generations.
pub const STALL_GENERATIONS: u64 = 10;

/// The search ends after this many restarts in a row that did not lower
/// the best cost by [`Budget::min_gain`].
pub const PATIENCE_ROUNDS: u32 = 4;

/// A cost over the unit box [0, 1]^dim.
pub type Cost<'a> = dyn Fn(&[f64]) -> f64 + Sync + 'a;

/// Whether the caller's goal is met at a point of the unit box.
pub type Met<'a> = dyn Fn(&[f64]) -> bool + Sync + 'a;

/// Limits of a search.
#[derive(Debug, Clone, Copy)]
pub struct Budget {
    /// Most cost evaluations (the search stops at the first check past it).
    pub max_evals: usize,
    /// Stop as soon as the cost falls below this.
    pub good_enough: f64,
    /// The global stage hands over to local refinement once its best cost
    /// falls below this (or when it stalls).
    pub handover: f64,
    /// Least fall of the best cost that counts as progress (cost units):
    /// [`PATIENCE_ROUNDS`] restarts in a row that do not lower the best cost
    /// by this much end the search.
    pub min_gain: f64,
    /// Seed of the global stage; the search is deterministic for a seed.
    pub seed: u64,
}

/// Why a search ended.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stopped {
    /// The caller's goal was met (or the cost fell below `good_enough`).
    Reached,
    /// [`PATIENCE_ROUNDS`] restarts in a row did not lower the best cost by
    /// `min_gain`.
    NoImprovement,
    /// The evaluation budget was spent.
    Budget,
}

impl Stopped {
    /// The name in reports: `reached`, `no_improvement` or `budget`.
    pub fn name(self) -> &'static str {
        match self {
            Stopped::Reached => "reached",
            Stopped::NoImprovement => "no_improvement",
            Stopped::Budget => "budget",
        }
    }
}

/// The best point found.
#[derive(Debug, Clone)]
pub struct Found {
    /// Position in the unit box.
    pub u: Vec<f64>,
    /// Its cost.
    pub cost: f64,
    /// Cost evaluations spent.
    pub evaluations: usize,
    /// Why the search ended.
    pub stopped: Stopped,
}

/// While evaluations run, progress is reported at least this often (as
/// well as after every generation and refinement), so that a caller hears
/// from a search whose evaluations are slow.
const PULSE: Duration = Duration::from_millis(100);

/// Reports progress from inside the evaluations, at most every [`PULSE`].
/// A progress callback may panic to abandon the search: the panic is passed
/// on, and the evaluations still queued (in parallel, by the global stage)
/// are skipped, so that it reaches the caller promptly.
pub(super) struct Pulse<'p> {
    progress: &'p (dyn Fn(usize, f64) + Sync),
    /// Time of the last report and the best cost seen.
    state: Mutex<(Instant, f64)>,
    abandoned: AtomicBool,
}

impl<'p> Pulse<'p> {
    pub(super) fn new(progress: &'p (dyn Fn(usize, f64) + Sync)) -> Self {
        Pulse {
            progress,
            state: Mutex::new((Instant::now(), f64::INFINITY)),
            abandoned: AtomicBool::new(false),
        }
    }

    /// Before an evaluation: reports progress when a report is due. False
    /// once a report has panicked: the evaluation is to be skipped.
    pub(super) fn before(&self, evaluations: usize) -> bool {
        if self.abandoned.load(Ordering::Relaxed) {
            return false;
        }
        let best = {
            let Ok(mut state) = self.state.try_lock() else {
                return true;
            };
            if state.0.elapsed() < PULSE {
                return true;
            }
            state.0 = Instant::now();
            state.1
        };
        if let Err(payload) = catch_unwind(AssertUnwindSafe(|| (self.progress)(evaluations, best)))
        {
            self.abandoned.store(true, Ordering::Relaxed);
            resume_unwind(payload);
        }
        true
    }

    /// After an evaluation: keeps the best cost seen for the reports.
    pub(super) fn seen(&self, cost: f64) {
        if let Ok(mut state) = self.state.try_lock() {
            state.1 = state.1.min(cost);
        }
    }
}

struct Counted<'a, 'c> {
    cost: &'c Cost<'a>,
    count: &'c AtomicUsize,
    bounds: Vec<[f64; 2]>,
    pulse: &'c Pulse<'c>,
}

impl Counted<'_, '_> {
    fn at(&self, u: &[f64]) -> f64 {
        let n = self.count.fetch_add(1, Ordering::Relaxed) + 1;
        if !self.pulse.before(n) {
            return f64::INFINITY;
        }
        let c = (self.cost)(u);
        let c = if c.is_nan() { f64::INFINITY } else { c };
        self.pulse.seen(c);
        c
    }
}

impl Bounded for Counted<'_, '_> {
    fn bound(&self) -> &[[f64; 2]] {
        &self.bounds
    }
}

impl ObjFunc for Counted<'_, '_> {
    type Ys = f64;
    fn fitness(&self, u: &[f64]) -> f64 {
        self.at(u)
    }
}

/// Nelder–Mead works on unbounded z; the box is reached through
/// u = sin²(z), which keeps every trial point inside [0, 1].
struct Unbounded<'f, 'a, 'c>(&'f Counted<'a, 'c>);

impl CostFunction for Unbounded<'_, '_, '_> {
    type Param = Vec<f64>;
    type Output = f64;
    fn cost(&self, z: &Vec<f64>) -> Result<f64, argmin::core::Error> {
        let u: Vec<f64> = z.iter().map(|z| z.sin().powi(2)).collect();
        Ok(self.0.at(&u))
    }
}

/// Minimises `cost` over [0, 1]^dim. `met(u)` says whether the caller's goal
/// is met at the best point; it is asked after each local refinement that
/// lowers the best cost. `progress(evaluations, best)` is called after every
/// generation of the global stage and every local refinement, and at least
/// every 0.1 s while evaluations run (with the best cost seen so far). It
/// may panic to abandon the search: the evaluations still queued are then
/// skipped, so that the panic reaches the caller promptly.
pub fn minimise(
    cost: &Cost,
    dim: usize,
    budget: Budget,
    met: &Met,
    progress: &(dyn Fn(usize, f64) + Sync),
) -> Found {
    let count = AtomicUsize::new(0);
    let pulse = Pulse::new(progress);
    let f = Counted {
        cost,
        count: &count,
        bounds: vec![[0.0, 1.0]; dim],
        pulse: &pulse,
    };
    let evals = || count.load(Ordering::Relaxed);
    if dim == 0 {
        // Nothing to search: the one point is the answer.
        let cost = f.at(&[]);
        return Found {
            u: vec![],
            cost,
            evaluations: 1,
            stopped: Stopped::NoImprovement,
        };
    }
    let pop = (10 * dim).clamp(20, 60);
    let mut best = Found {
        u: vec![0.5; dim],
        cost: f64::INFINITY,
        evaluations: 0,
        stopped: Stopped::Budget,
    };
    // The best cost at the last progress, and the restarts since.
    let mut mark = f64::INFINITY;
    let mut idle = 0;
    for round in 0u64.. {
        // Global stage: until it is close enough for a local method to
        // finish, stalls, or the budget is spent.
        let mut last = (f64::INFINITY, 0u64);
        let so_far = best.cost;
        let solver = Solver::build(
            De::default(),
            Counted {
                bounds: f.bounds.clone(),
                ..f
            },
        )
        .seed(budget.seed.wrapping_add(round.wrapping_mul(0x9E37_79B9)))
        .pop_num(pop)
        .task(|ctx| {
            let b = ctx.best.get_eval();
            progress(evals(), b.min(so_far));
            if b < last.0 * 0.99 {
                last = (b, ctx.r#gen);
            }
            b < budget.handover
                || ctx.r#gen - last.1 > STALL_GENERATIONS
                || evals() >= budget.max_evals
        })
        .solve();
        // Local stage from the best few distinct members.
        let mut starts: Vec<(Vec<f64>, f64)> = solver
            .pool()
            .iter()
            .map(|u| (u.clone(), f64::NAN))
            .collect();
        let (bu, by) = solver.as_best();
        starts.insert(0, (bu.to_vec(), *by));
        let mut chosen: Vec<Vec<f64>> = Vec::new();
        for (u, _) in starts {
            if chosen.len() >= 4 {
                break;
            }
            if chosen.iter().all(|c| distance(c, &u) > 0.1) {
                chosen.push(u);
            }
        }
        for start in chosen {
            let (u, c) = nelder_mead(&f, &start, budget, &evals);
            let improved = c < best.cost;
            if improved {
                best.u = u;
                best.cost = c;
            }
            progress(evals(), best.cost);
            let stopped = if best.cost < budget.good_enough || (improved && met(&best.u)) {
                Stopped::Reached
            } else if evals() >= budget.max_evals {
                Stopped::Budget
            } else {
                continue;
            };
            best.evaluations = evals();
            best.stopped = stopped;
            return best;
        }
        // Restarts go on only while they keep paying.
        if best.cost > mark - budget.min_gain {
            idle += 1;
            if idle >= PATIENCE_ROUNDS {
                best.evaluations = evals();
                best.stopped = Stopped::NoImprovement;
                return best;
            }
        } else {
            idle = 0;
            mark = best.cost;
        }
    }
    unreachable!("the rounds end when the budget is spent")
}

fn distance(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y).powi(2))
        .sum::<f64>()
        .sqrt()
}

/// Nelder–Mead from `start` in the sin² transform; returns the best point
/// in the unit box and its cost.
fn nelder_mead(
    f: &Counted,
    start: &[f64],
    budget: Budget,
    evals: &dyn Fn() -> usize,
) -> (Vec<f64>, f64) {
    let z0: Vec<f64> = start
        .iter()
        .map(|u| u.clamp(0.0, 1.0).sqrt().asin())
        .collect();
    let mut simplex = vec![z0.clone()];
    for i in 0..z0.len() {
        let mut z = z0.clone();
        z[i] += if z[i] > 0.8 { -0.12 } else { 0.12 };
        simplex.push(z);
    }
    let left = budget.max_evals.saturating_sub(evals()).max(1);
    let iters = (200 * z0.len()).min(left) as u64;
    let solver = NelderMead::new(simplex)
        .with_sd_tolerance(1e-12)
        .expect("a positive tolerance");
    let run = Executor::new(Unbounded(f), solver)
        .configure(|s| s.max_iters(iters).target_cost(budget.good_enough * 0.5))
        .run();
    let to_u = |z: &[f64]| z.iter().map(|z| z.sin().powi(2)).collect::<Vec<f64>>();
    match run {
        Ok(r) => {
            let state = r.state();
            let cost = state.get_best_cost();
            match state.get_best_param() {
                Some(z) => (to_u(z), cost),
                None => (start.to_vec(), f.at(start)),
            }
        }
        Err(_) => (start.to_vec(), f.at(start)),
    }
}
