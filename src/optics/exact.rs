//! Long repeat groups, powered in double-double precision.
//!
//! Powering the period's matrix M to M^N by squaring multiplies its rounding
//! errors by about N, and near a stop-band edge (|tr M / 2| → 1) the
//! reflectance of N periods changes by order one when tr M moves by 1/N²:
//! with double rounding (2⁻⁵³ ≈ 1.1e-16) neither error stays small for
//! thousands of periods. Here the period's matrix is built from its layers'
//! phases and admittances in double-double arithmetic (about 32 digits,
//! [`super::double_double`]) from the double inputs — index, thickness,
//! wavelength and angle — and powered by squaring in the same precision, so
//! the result is exact to double precision for every count a scene accepts.
//! The method is the characteristic matrix of each layer (Born & Wolf,
//! *Principles of Optics*, 7th ed. 1999, §1.6.2) with tilted admittances
//! (Macleod, *Thin-Film Optical Filters*, 4th ed. 2010, §2.6), as in the
//! double-precision path.

use num_complex::Complex64;

use super::double_double::{Cdd, Dd};
use super::matrix::{Mat, power};
use super::medium::{MediumTerms, Probe};
use super::stack::Node;

/// Repeat groups of at least this many periods are powered in
/// double-double. Below it, double precision keeps every R and T within
/// about 1e-12 of the exact value even at a band edge (the rounding grows
/// like N² ε there).
pub const EXACT_FROM: u64 = 64;

/// Entries are rescaled by a power of two when they leave [2⁻²⁵⁶, 2²⁵⁶].
const RANGE_LOG2: i32 = 256;

/// A 2×2 complex double-double matrix times e^{log}.
#[derive(Debug, Clone, Copy)]
struct DdMat {
    m: [[Cdd; 2]; 2],
    log: f64,
}

impl DdMat {
    fn identity() -> DdMat {
        let (o, z) = (Cdd::new(Dd::ONE, Dd::ZERO), Cdd::default());
        DdMat {
            m: [[o, z], [z, o]],
            log: 0.0,
        }
    }

    fn mul(&self, r: &DdMat) -> DdMat {
        let (a, b) = (&self.m, &r.m);
        let entry = |i: usize, j: usize| a[i][0] * b[0][j] + a[i][1] * b[1][j];
        let mut out = DdMat {
            m: [[entry(0, 0), entry(0, 1)], [entry(1, 0), entry(1, 1)]],
            log: self.log + r.log,
        };
        out.rescale();
        out
    }

    /// Moves the magnitude into the scale by an exact power of two.
    fn rescale(&mut self) {
        let big = self
            .m
            .iter()
            .flatten()
            .fold(0.0f64, |acc, z| acc.max(z.re.hi.abs()).max(z.im.hi.abs()));
        let limit = 2f64.powi(RANGE_LOG2);
        if big > limit || (big < 1.0 / limit && big > 0.0) {
            let k = big.log2().floor() as i32;
            for z in self.m.iter_mut().flatten() {
                *z = Cdd::new(z.re.scale_pow2(-k), z.im.scale_pow2(-k));
            }
            self.log += f64::from(k) * std::f64::consts::LN_2;
        }
    }

    fn pow(&self, n: u64) -> DdMat {
        power(*self, n, DdMat::identity(), DdMat::mul)
    }

    fn to_mat(self) -> Mat {
        Mat {
            m: self.m.map(|row| row.map(Cdd::to_c64)),
            log: self.log,
        }
    }
}

/// The characteristic matrices (s, p) of one layer of index `n` and
/// thickness `thickness_nm`: [[cos δ, −i sin δ/η], [−i η sin δ, cos δ]] with
/// δ = k₀ d q, q = √(n² − β²) on the decaying branch (Im q ≥ 0, Re q ≥ 0
/// when Im q = 0), η_s = q and η_p = n²/q, and the factor e^{Im δ} kept in
/// the scale as in [`super::matrix::Phase`].
fn layer(n: Complex64, thickness_nm: f64, at: &Probe) -> [DdMat; 2] {
    let n = Cdd::from_c64(n);
    let n2 = n * n;
    let beta = at.beta_dd();
    let arg = n2 - Cdd::new(beta * beta, Dd::ZERO);
    let mut q = arg.sqrt();
    if q.im.hi < 0.0 || (q.im.hi == 0.0 && q.re.hi < 0.0) {
        q = Cdd::new(-q.re, -q.im);
    }
    let delta = q.scale(at.k0_dd().mul_f64(thickness_nm));
    let (sa, ca) = delta.re.sin_cos();
    let b = delta.im;
    // cos(a+ib)·e^{−b} = cos a·(1 + e^{−2b})/2 − i sin a·(1 − e^{−2b})/2, and
    // sin(a+ib)·e^{−b} = sin a·(1 + e^{−2b})/2 + i cos a·(1 − e^{−2b})/2.
    let e = if b.hi == 0.0 {
        Dd::ONE
    } else {
        (-b.mul_f64(2.0)).exp()
    };
    let (ch, sh) = ((Dd::ONE + e).scale_pow2(-1), (Dd::ONE - e).scale_pow2(-1));
    let cos = Cdd::new(ca * ch, -(sa * sh));
    let sin = Cdd::new(sa * ch, ca * sh);
    let log = b.to_f64();
    let one = Cdd::new(Dd::ONE, Dd::ZERO);
    [q, n2 / q].map(|eta| DdMat {
        m: [
            [cos, (sin * (one / eta)).times_minus_i()],
            [(eta * sin).times_minus_i(), cos],
        ],
        log,
    })
}

/// The matrices (s, p) of `nodes`, incident side first, nested repeats
/// powered in the same precision.
fn product(nodes: &[Node], terms: &[MediumTerms], at: &Probe) -> [DdMat; 2] {
    let mut acc = [DdMat::identity(); 2];
    for node in nodes {
        let next = match node {
            Node::Layer {
                medium,
                thickness_nm,
            }
            | Node::Incoherent {
                medium,
                thickness_nm,
            } => layer(terms[*medium].n, *thickness_nm, at),
            Node::Repeat { count, nodes } => product(nodes, terms, at).map(|m| m.pow(*count)),
        };
        acc = [acc[0].mul(&next[0]), acc[1].mul(&next[1])];
    }
    acc
}

/// The matrices (s, p) of `count` periods of `nodes`, computed and powered
/// in double-double and rounded to double at the end.
pub fn repeat(nodes: &[Node], count: u64, terms: &[MediumTerms], at: &Probe) -> (Mat, Mat) {
    let [s, p] = product(nodes, terms, at).map(|m| m.pow(count).to_mat());
    (s, p)
}
