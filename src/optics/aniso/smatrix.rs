//! Scattering matrices of parts of a stack, combined by the Redheffer star
//! product, so that thick, absorbing and evanescent layers stay stable
//! (L. Li, "Formulation and comparison of two recursive matrix algorithms
//! for modeling layered diffraction gratings", J. Opt. Soc. Am. A 13, 1024,
//! 1996).
//!
//! A part's S-matrix maps the amplitudes that enter it — forward waves at
//! its front face, backward waves at its back face — to those that leave —
//! backward waves at the front, forward waves at the back — each in the
//! wave basis of [`super::modes::Modes`] on its side. Every amplitude is
//! referenced at the face it crosses, so a layer contributes only
//! exp(i k₀ d G₊) and exp(−i k₀ d G₋), whose entries never exceed 1.

use nalgebra::{Matrix2, Matrix4};
use num_complex::Complex64 as C;

use super::modes::{Modes, exp2};

/// A scattering matrix, in 2×2 blocks.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct S {
    /// Reflection of forward light arriving at the front.
    pub r_front: Matrix2<C>,
    /// Transmission front to back.
    pub t_forward: Matrix2<C>,
    /// Transmission back to front.
    pub t_backward: Matrix2<C>,
    /// Reflection of backward light arriving at the back.
    pub r_back: Matrix2<C>,
}

/// Why parts could not be combined: a singular block (never for physical
/// inputs; the caller reports the point).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Singular;

fn inverse(m: Matrix2<C>) -> Result<Matrix2<C>, Singular> {
    m.try_inverse().ok_or(Singular)
}

impl S {
    /// Nothing: everything passes unchanged.
    pub fn identity() -> S {
        let (z, i) = (Matrix2::zeros(), Matrix2::identity());
        S {
            r_front: z,
            t_forward: i,
            t_backward: i,
            r_back: z,
        }
    }

    /// A homogeneous layer of thickness `d` nm at vacuum wavenumber `k0`.
    pub fn layer(modes: &Modes, k0: f64, d: f64) -> S {
        let i = C::new(0.0, 1.0);
        S {
            r_front: Matrix2::zeros(),
            t_forward: exp2(&(modes.g_forward * (i * k0 * d))),
            t_backward: exp2(&(modes.g_backward * (-i * k0 * d))),
            r_back: Matrix2::zeros(),
        }
    }

    /// The interface from a medium with waves `front` to one with waves
    /// `back`: continuity of Ψ, W_f a_f = W_b a_b.
    pub fn interface(front: &Modes, back: &Modes) -> Result<S, Singular> {
        S::of_amplitude_map(&(front.w_inv * back.w))
    }

    /// The S-matrix of a map M from the back amplitudes to the front ones,
    /// [a₊; a₋]_front = M [a₊; a₋]_back (an interface, or the inverse of a
    /// transfer).
    pub fn of_amplitude_map(m: &Matrix4<C>) -> Result<S, Singular> {
        let blk = |r: usize, c: usize| m.fixed_view::<2, 2>(r, c).into_owned();
        let (m11, m12, m21, m22) = (blk(0, 0), blk(0, 2), blk(2, 0), blk(2, 2));
        let inv11 = inverse(m11)?;
        Ok(S {
            r_front: m21 * inv11,
            t_forward: inv11,
            t_backward: m22 - m21 * inv11 * m12,
            r_back: -inv11 * m12,
        })
    }

    /// The S-matrix of a transfer T in wave amplitudes from the front face
    /// to the back, [a₊; a₋]_back = T [a₊; a₋]_front.
    pub fn of_transfer(t: &Matrix4<C>) -> Result<S, Singular> {
        let blk = |r: usize, c: usize| t.fixed_view::<2, 2>(r, c).into_owned();
        let (t11, t12, t21, t22) = (blk(0, 0), blk(0, 2), blk(2, 0), blk(2, 2));
        let inv22 = inverse(t22)?;
        Ok(S {
            r_front: -inv22 * t21,
            t_forward: t11 - t12 * inv22 * t21,
            t_backward: inv22,
            r_back: t12 * inv22,
        })
    }

    /// `self` followed by `next` (the Redheffer star product).
    pub fn then(&self, next: &S) -> Result<S, Singular> {
        let i = Matrix2::identity();
        let x = inverse(i - next.r_front * self.r_back)?;
        let y = inverse(i - self.r_back * next.r_front)?;
        Ok(S {
            r_front: self.r_front + self.t_backward * x * next.r_front * self.t_forward,
            t_forward: next.t_forward * y * self.t_forward,
            t_backward: self.t_backward * x * next.t_backward,
            r_back: next.r_back + next.t_forward * y * self.r_back * next.t_backward,
        })
    }

    /// `count` copies in a row, by squaring (the star product is
    /// associative).
    pub fn pow(&self, mut count: u64) -> Result<S, Singular> {
        let (mut base, mut acc) = (*self, S::identity());
        while count > 0 {
            if count & 1 == 1 {
                acc = acc.then(&base)?;
            }
            count >>= 1;
            if count > 0 {
                base = base.then(&base)?;
            }
        }
        Ok(acc)
    }
}
