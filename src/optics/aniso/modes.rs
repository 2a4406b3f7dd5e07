//! The waves of one homogeneous layer in Berreman's 4×4 formulation.
//!
//! Inside a layer of dielectric tensor ε (non-magnetic), the tangential
//! fields Ψ = (E_x, H_y, E_y, −H_x) at the in-plane wavevector ξ = n₀ sin θ₀
//! (in units of k₀, x in the plane of incidence, z along the normal, H in
//! units of the free-space admittance) obey dΨ/dz = i k₀ Δ Ψ with
//!
//! ```text
//! Δ = | −ξ ε₃₁/ε₃₃         1 − ξ²/ε₃₃   −ξ ε₃₂/ε₃₃              0 |
//!     | ε₁₁ − ε₁₃ε₃₁/ε₃₃   −ξ ε₁₃/ε₃₃   ε₁₂ − ε₁₃ε₃₂/ε₃₃        0 |
//!     | 0                  0            0                       1 |
//!     | ε₂₁ − ε₂₃ε₃₁/ε₃₃   −ξ ε₂₃/ε₃₃   ε₂₂ − ξ² − ε₂₃ε₃₂/ε₃₃   0 |
//! ```
//!
//! (Berreman, "Optics in stratified and anisotropic media: 4×4-matrix
//! formulation", J. Opt. Soc. Am. 62, 502, 1972, eq. 11 and 16). Its four
//! eigenvalues are the normal wavevector components q of the layer's waves:
//! two travel or decay toward +z (forward), two toward −z. Rather than the
//! eigenvectors themselves, which are ill-conditioned where two waves
//! become degenerate (an isotropic layer, an optic axis along the wave), the
//! two invariant subspaces are used: the forward one is the column space of
//! (Δ − q₃)(Δ − q₄) for the backward q₃, q₄, and within it Δ acts as a 2×2
//! generator, so forward amplitudes advance by exp(i k₀ z G₊) whatever the
//! degeneracy.

use nalgebra::{Matrix2, Matrix3, Matrix4, Vector4};
use num_complex::Complex64 as C;

use super::isotropic::Waves;

/// Relative size of Im q below which a wave counts as propagating, and its
/// direction is taken from its energy flux.
const PROPAGATING: f64 = 1e-10;

/// The waves of a layer: a basis of the forward and backward subspaces and
/// the generators within them.
#[derive(Debug, Clone)]
pub struct Modes {
    /// Columns 0 and 1 span the forward waves, 2 and 3 the backward ones.
    pub w: Matrix4<C>,
    /// The inverse of `w`.
    pub w_inv: Matrix4<C>,
    /// Forward amplitudes a(z) = exp(i k₀ z G₊) a(0).
    pub g_forward: Matrix2<C>,
    /// Backward amplitudes a(z) = exp(i k₀ z G₋) a(0).
    pub g_backward: Matrix2<C>,
}

/// Why a layer's waves could not be found (a degenerate or unphysical
/// tensor: never for a valid scene's layers).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct NoModes;

/// Normal energy flux Re(E_x H̄_y − E_y H̄_x) of a field vector.
pub fn flux(v: &Vector4<C>) -> f64 {
    (v[0] * v[1].conj() + v[2] * v[3].conj()).re
}

/// Berreman's Δ for tensor `eps` at in-plane wavevector `xi` (module notes).
pub fn delta(eps: &Matrix3<C>, xi: f64) -> Matrix4<C> {
    let e = |i: usize, j: usize| eps[(i, j)];
    let e33 = e(2, 2);
    let z = C::new(0.0, 0.0);
    let one = C::new(1.0, 0.0);
    Matrix4::new(
        -xi * e(2, 0) / e33,
        one - xi * xi / e33,
        -xi * e(2, 1) / e33,
        z,
        e(0, 0) - e(0, 2) * e(2, 0) / e33,
        -xi * e(0, 2) / e33,
        e(0, 1) - e(0, 2) * e(2, 1) / e33,
        z,
        z,
        z,
        z,
        one,
        e(1, 0) - e(1, 2) * e(2, 0) / e33,
        -xi * e(1, 2) / e33,
        e(1, 1) - xi * xi - e(1, 2) * e(2, 1) / e33,
        z,
    )
}

impl Modes {
    /// The waves of an isotropic medium of index `n`: p and s, forward
    /// (Ψ = (q/n, n, 0, 0) and (0, 0, 1, q)) and backward (q → −q), each
    /// scaled to unit normal flux where it carries any, so that squared
    /// amplitudes are powers. q = √(n² − ξ²) on the decaying branch.
    pub fn isotropic(n: C, xi: f64) -> Modes {
        Modes::of_waves(&Waves::new(n, xi))
    }

    /// The 4×4 wave basis of an isotropic medium's [`Waves`]: p waves in
    /// rows 0, 1 (columns 0, 2), s waves in rows 2, 3 (columns 1, 3).
    pub fn of_waves(waves: &Waves) -> Modes {
        let mut w = Matrix4::zeros();
        let mut w_inv = Matrix4::zeros();
        for (k, (rows, cols)) in [([0, 1], [0, 2]), ([2, 3], [1, 3])].into_iter().enumerate() {
            for i in 0..2 {
                for j in 0..2 {
                    w[(rows[i], cols[j])] = waves.blocks[k][(i, j)];
                    w_inv[(cols[i], rows[j])] = waves.inverses[k][(i, j)];
                }
            }
        }
        Modes {
            w,
            w_inv,
            g_forward: Matrix2::from_diagonal_element(waves.q),
            g_backward: Matrix2::from_diagonal_element(-waves.q),
        }
    }

    /// The waves of a layer of tensor `eps` at in-plane wavevector `xi`.
    pub fn of_tensor(eps: &Matrix3<C>, xi: f64) -> Result<Modes, NoModes> {
        let d = delta(eps, xi);
        let q = d.eigenvalues().ok_or(NoModes)?;
        let scale = q.iter().fold(1.0f64, |m, z| m.max(z.norm()));
        let id = Matrix4::<C>::identity();
        // The eigenvector of q[k] (for its flux), as the largest column of
        // Π_{j≠k}(Δ − q_j); zero when q[k] is degenerate.
        let eigenvector = |k: usize| -> Vector4<C> {
            let mut p = id;
            for (j, qj) in q.iter().enumerate() {
                if j != k {
                    p *= d - id * *qj;
                }
            }
            let best = (0..4)
                .max_by(|&a, &b| p.column(a).norm().total_cmp(&p.column(b).norm()))
                .unwrap_or(0);
            p.column(best).into_owned()
        };
        let forward: Vec<bool> = (0..4)
            .map(|k| {
                let qk = q[k];
                if qk.im.abs() > PROPAGATING * scale {
                    return qk.im > 0.0;
                }
                // A propagating wave degenerate with another (an isotropic
                // layer, or along an optic axis) travels the way its q points.
                let degenerate = (0..4).any(|j| j != k && (q[j] - qk).norm() < 1e-7 * scale);
                if degenerate {
                    return qk.re > 0.0;
                }
                let v = eigenvector(k);
                let f = flux(&v);
                if f.abs() > 1e-9 * v.norm_squared() {
                    f > 0.0
                } else {
                    qk.re > 0.0
                }
            })
            .collect();
        let (fw, bw): (Vec<usize>, Vec<usize>) = (0..4).partition(|&k| forward[k]);
        if fw.len() != 2 {
            return Err(NoModes);
        }
        let span = |others: &[usize]| -> Result<(nalgebra::Matrix4x2<C>, Matrix2<C>), NoModes> {
            let b = (d - id * q[others[0]]) * (d - id * q[others[1]]);
            let basis = two_columns(&b).ok_or(NoModes)?;
            let g = basis.adjoint() * d * basis;
            Ok((basis, g))
        };
        let (vf, gf) = span(&bw)?;
        let (vb, gb) = span(&fw)?;
        let w = Matrix4::from_columns(&[
            vf.column(0).into_owned(),
            vf.column(1).into_owned(),
            vb.column(0).into_owned(),
            vb.column(1).into_owned(),
        ]);
        let w_inv = w.try_inverse().ok_or(NoModes)?;
        Ok(Modes {
            w,
            w_inv,
            g_forward: gf,
            g_backward: gb,
        })
    }
}

/// An orthonormal basis of the column space of a rank-2 matrix, by
/// Gram–Schmidt with pivoting on the column norms.
fn two_columns(b: &Matrix4<C>) -> Option<nalgebra::Matrix4x2<C>> {
    let norms: Vec<f64> = (0..4).map(|j| b.column(j).norm()).collect();
    let first = (0..4).max_by(|&x, &y| norms[x].total_cmp(&norms[y]))?;
    if !(norms[first] > 0.0) {
        return None;
    }
    let u = b.column(first) / C::new(norms[first], 0.0);
    let residual = |j: usize| {
        let c = b.column(j);
        c - u * u.dotc(&c)
    };
    let second = (0..4)
        .filter(|&j| j != first)
        .max_by(|&x, &y| residual(x).norm().total_cmp(&residual(y).norm()))?;
    let r = residual(second);
    let rn = r.norm();
    if !(rn > 1e-12 * norms[first]) {
        return None;
    }
    let v = r / C::new(rn, 0.0);
    Some(nalgebra::Matrix4x2::from_columns(&[u, v]))
}

/// exp(A) of a 2×2 matrix by Sylvester's formula with the divided
/// difference of exp kept accurate for nearly equal eigenvalues:
/// exp(A) = e^{m}[cosh(d) I + sinh(d)/d (A − m I)], m = tr A/2,
/// d² = m² − det A (common practice). Both terms are formed from e^{λ±}, so
/// nothing overflows when the eigenvalues' real parts are ≤ 0.
pub fn exp2(a: &Matrix2<C>) -> Matrix2<C> {
    let m = (a[(0, 0)] + a[(1, 1)]) * 0.5;
    let d = (m * m - a.determinant()).sqrt();
    let (ep, em) = ((m + d).exp(), (m - d).exp());
    let cosh = (ep + em) * 0.5;
    let sinh_over_d = if d.norm() < 1e-3 {
        // e^{m}·sinh(d)/d by its series, to d⁶.
        let d2 = d * d;
        m.exp() * (1.0 + d2 / 6.0 + d2 * d2 / 120.0 + d2 * d2 * d2 / 5040.0)
    } else {
        (ep - em) / (2.0 * d)
    };
    Matrix2::identity() * cosh + (a - Matrix2::identity() * m) * sinh_over_d
}
