//! Bounded minimisation shared by the design tools: a seeded global stage
//! (differential evolution from `metaheuristics-nature`) over the unit box,
//! then Nelder–Mead refinements (from `argmin`) started at the best distinct
//! members of the population, repeated with fresh seeds while the budget
//! lasts and the goal is not met.

use std::sync::atomic::{AtomicUsize, Ordering};

use argmin::core::{CostFunction, Executor, State};
use argmin::solver::neldermead::NelderMead;
use metaheuristics_nature::{Bounded, De, ObjFunc, Solver};

/// A cost over the unit box [0, 1]^dim.
pub type Cost<'a> = dyn Fn(&[f64]) -> f64 + Sync + 'a;

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
    /// Seed of the global stage; the search is deterministic for a seed.
    pub seed: u64,
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
}

struct Counted<'a, 'c> {
    cost: &'c Cost<'a>,
    count: &'c AtomicUsize,
    bounds: Vec<[f64; 2]>,
}

impl Counted<'_, '_> {
    fn at(&self, u: &[f64]) -> f64 {
        self.count.fetch_add(1, Ordering::Relaxed);
        let c = (self.cost)(u);
        if c.is_nan() { f64::INFINITY } else { c }
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

/// Minimises `cost` over [0, 1]^dim. `progress(evaluations, best)` is called
/// after each stage.
pub fn minimise(
    cost: &Cost,
    dim: usize,
    budget: Budget,
    progress: &(dyn Fn(usize, f64) + Sync),
) -> Found {
    let count = AtomicUsize::new(0);
    let f = Counted {
        cost,
        count: &count,
        bounds: vec![[0.0, 1.0]; dim],
    };
    let evals = || count.load(Ordering::Relaxed);
    if dim == 0 {
        let cost = f.at(&[]);
        return Found {
            u: vec![],
            cost,
            evaluations: 1,
        };
    }
    let pop = (10 * dim).clamp(20, 60);
    let mut best = Found {
        u: vec![0.5; dim],
        cost: f64::INFINITY,
        evaluations: 0,
    };
    for round in 0u64.. {
        // Global stage: until it is close enough for a local method to
        // finish, stalls, or the budget is spent.
        let mut last = (f64::INFINITY, 0u64);
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
            if b < last.0 * 0.99 {
                last = (b, ctx.r#gen);
            }
            b < budget.handover || ctx.r#gen - last.1 > 30 || evals() >= budget.max_evals
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
            if c < best.cost {
                best.u = u;
                best.cost = c;
            }
            progress(evals(), best.cost);
            if best.cost < budget.good_enough || evals() >= budget.max_evals {
                best.evaluations = evals();
                return best;
            }
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
