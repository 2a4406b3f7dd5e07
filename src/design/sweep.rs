//! Sweeping a design space: many designs over the `vary_nm` ranges, on a
//! grid or seeded at random, each evaluated to Lab, sRGB and the ΔE00 to an
//! optional target, written as JSON lines. Design i is the same in every
//! run, so a sweep can be split into shards and the outputs concatenated.

use rayon::prelude::*;

use super::coating::At;
use super::evaluator::Evaluator;
use super::finite::check_finite;
use crate::colorimetry::{Colour, delta_e2000};
use crate::error::{Error, Result};

/// Which designs to evaluate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Plan {
    /// `k` evenly spaced points per variable (bounds included; one point is
    /// the middle), the last variable varying fastest.
    Grid(usize),
    /// `samples` uniform random designs from a seeded stream.
    Random {
        /// Number of designs.
        samples: u64,
        /// Seed of the stream.
        seed: u64,
    },
}

/// Most designs one sweep may describe.
pub const MAX_DESIGNS: u64 = 1 << 40;

impl Plan {
    /// Number of designs for `dim` variables.
    pub fn count(self, dim: usize) -> Result<u64> {
        match self {
            Plan::Grid(0) => Err(Error::invalid(
                "grid",
                0,
                "needs at least one point per variable",
            )),
            Plan::Grid(k) => (0..dim)
                .try_fold(1u64, |n, _| n.checked_mul(k as u64))
                .filter(|&n| n <= MAX_DESIGNS)
                .ok_or_else(|| {
                    Error::invalid(
                        "grid",
                        k,
                        format!("{k}^{dim} designs is more than {MAX_DESIGNS}"),
                    )
                }),
            Plan::Random { samples: 0, .. } => {
                Err(Error::invalid("samples", 0, "needs at least one design"))
            }
            Plan::Random { samples, .. } => Ok(samples),
        }
    }

    /// Position in the unit box of design `i` (one coordinate per variable).
    fn unit(self, i: u64, dim: usize, out: &mut [f64]) {
        match self {
            Plan::Grid(k) => {
                let mut rest = i;
                for d in (0..dim).rev() {
                    let j = rest % k as u64;
                    rest /= k as u64;
                    out[d] = if k == 1 {
                        0.5
                    } else {
                        j as f64 / (k - 1) as f64
                    };
                }
            }
            Plan::Random { seed, .. } => {
                for (d, o) in out.iter_mut().enumerate() {
                    let z =
                        splitmix64(seed ^ splitmix64(i.wrapping_mul(dim as u64 + 1) + d as u64));
                    *o = (z >> 11) as f64 / (1u64 << 53) as f64;
                }
            }
        }
    }
}

/// SplitMix64 (Steele, Lea & Flood, "Fast splittable pseudorandom number
/// generators", OOPSLA 2014): a bijective mix of a 64-bit counter.
fn splitmix64(x: u64) -> u64 {
    let mut z = x.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// Share `index` (1-based) of `count` equal contiguous shares of `total`
/// designs, so shard outputs concatenated in order equal the whole sweep.
pub fn shard(total: u64, index: u64, count: u64) -> Result<std::ops::Range<u64>> {
    if count == 0 || index == 0 || index > count {
        return Err(Error::invalid(
            "shard",
            format!("{index}/{count}"),
            "expected I/N with 1 ≤ I ≤ N",
        ));
    }
    let at = |k: u64| ((total as u128 * k as u128) / count as u128) as u64;
    Ok(at(index - 1)..at(index))
}

/// Designs per formatted chunk.
const CHUNK: u64 = 4096;

/// One evaluated design of a sweep.
#[derive(Debug, Clone, Copy)]
pub struct Design<'a> {
    /// The design's number in the whole sweep.
    pub index: u64,
    /// Thickness of each variable, nm (the evaluator's variable order).
    pub thicknesses_nm: &'a [f64],
    /// Its colour at the evaluator's angle.
    pub colour: &'a Colour,
    /// CIEDE2000 to the target, when one is given.
    pub delta_e00: Option<f64>,
}

/// Evaluates designs `range` of `plan` with `eval` (a colour evaluator at one
/// angle) in order on this thread, handing each to `visit`; a design whose
/// colour is not finite is an error naming it. [`lines`] and other callers
/// that want the numbers rather than text share it.
pub fn evaluate(
    eval: &Evaluator,
    plan: Plan,
    range: std::ops::Range<u64>,
    target: Option<[f64; 3]>,
    mut visit: impl FnMut(Design),
) -> Result<()> {
    let (white, options) = eval.white().expect("a colour evaluator");
    let at = At::Angle(eval.angles_deg()[0]);
    let vars = eval.variables();
    let dim = vars.len();
    let (mut u, mut x) = (vec![0.0; dim], vec![0.0; dim]);
    let mut ws = eval.workspace();
    for i in range {
        plan.unit(i, dim, &mut u);
        for ((x, u), v) in x.iter_mut().zip(&u).zip(vars) {
            *x = v.low_nm + u * (v.high_nm - v.low_nm);
        }
        let c = eval.eval_in(&mut ws, &x, None, |o| {
            Colour::new(o.xyz[0], white, &options)
        });
        check_finite(&c.lab, &at, &format!("design {i}, "), "the colour")?;
        visit(Design {
            index: i,
            thicknesses_nm: &x,
            colour: &c,
            delta_e00: target.map(|t| delta_e2000(t, c.lab)),
        });
    }
    Ok(())
}

/// Evaluates designs `range` of `plan` with `eval` (a colour evaluator at one
/// angle) and returns their JSON lines in chunks, in order; a design whose
/// colour is not finite is an error naming it.
pub fn lines(
    eval: &Evaluator,
    plan: Plan,
    range: std::ops::Range<u64>,
    target: Option<[f64; 3]>,
) -> Result<Vec<Vec<u8>>> {
    let dim = eval.variables().len();
    let chunks: Vec<u64> = (range.start..range.end).step_by(CHUNK as usize).collect();
    chunks
        .into_par_iter()
        .map(|start| {
            let end = (start + CHUNK).min(range.end);
            let mut out = Vec::with_capacity((end - start) as usize * (120 + 24 * dim));
            let mut num = zmij::Buffer::new();
            evaluate(eval, plan, start..end, target, |d| {
                let c = d.colour;
                out.extend_from_slice(b"{\"index\":");
                out.extend_from_slice(d.index.to_string().as_bytes());
                out.extend_from_slice(b",\"thicknesses_nm\":[");
                for (k, t) in d.thicknesses_nm.iter().enumerate() {
                    if k > 0 {
                        out.push(b',');
                    }
                    out.extend_from_slice(num.format(*t).as_bytes());
                }
                out.push(b']');
                for (key, v) in [
                    (b",\"L\":", c.lab[0]),
                    (b",\"a\":", c.lab[1]),
                    (b",\"b\":", c.lab[2]),
                ] {
                    out.extend_from_slice(key);
                    out.extend_from_slice(num.format(v).as_bytes());
                }
                out.extend_from_slice(b",\"srgb\":[");
                for (k, v) in c.rgb.iter().enumerate() {
                    if k > 0 {
                        out.push(b',');
                    }
                    out.extend_from_slice(num.format(*v).as_bytes());
                }
                out.extend_from_slice(b"],\"hex\":\"");
                out.extend_from_slice(c.hex.as_bytes());
                out.push(b'"');
                if let Some(de) = d.delta_e00 {
                    out.extend_from_slice(b",\"delta_e00\":");
                    out.extend_from_slice(num.format(de).as_bytes());
                }
                out.extend_from_slice(b"}\n");
            })?;
            Ok(out)
        })
        .collect()
}
