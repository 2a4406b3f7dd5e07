//! Helicoidal layers: principal axes turning about the normal by 360° per
//! pitch. The tangential fields are carried through in the frame that turns
//! with the helix, Ψ = Q(ψ) Ψ′ (Q rotates the tangential E and H by ψ), where
//! dΨ′/dz = A′(z) Ψ′ with A′ = Qᵀ (i k₀ Δ) Q − ψ′ K and K = Qᵀ dQ/dψ (common
//! practice). At normal incidence A′ is constant and one exponential is the
//! exact solution (as for the cholesteric reflection band of de Vries,
//! Acta Cryst. 4, 219, 1951); otherwise only the in-plane wavevector's
//! terms vary, and A′ is integrated by fourth-order Magnus steps (two Gauss
//! points: Ω = h(A₁ + A₂)/2 + (√3/12) h² [A₂, A₁]; Blanes, Casas, Oteo & Ros,
//! "The Magnus expansion and some of its applications", Phys. Rep. 470, 151,
//! 2009, §4.2), raised to sixth order by Richardson extrapolation.

use nalgebra::{Matrix3, Matrix4};
use num_complex::Complex64 as C;

use super::modes::delta;

/// The tensor `eps` turned about the normal (z) by `psi` radians.
pub fn turned(eps: &Matrix3<C>, psi: f64) -> Matrix3<C> {
    let (s, c) = psi.sin_cos();
    let r = Matrix3::new(c, -s, 0.0, s, c, 0.0, 0.0, 0.0, 1.0).map(|x| C::new(x, 0.0));
    r * eps * r.transpose()
}

/// The rotation of Ψ = (E_x, H_y, E_y, −H_x) that turns E and H about z by ψ.
fn q(psi: f64) -> Matrix4<C> {
    let (s, c) = psi.sin_cos();
    Matrix4::new(
        c, 0.0, -s, 0.0, //
        0.0, c, 0.0, -s, //
        s, 0.0, c, 0.0, //
        0.0, s, 0.0, c,
    )
    .map(|x| C::new(x, 0.0))
}

/// The product of two 4×4 complex matrices, written out on the column-major
/// entries (the hot loop of the helix integration; nalgebra's generic
/// product does not vectorise for complex entries).
fn mul(a: &Matrix4<C>, b: &Matrix4<C>) -> Matrix4<C> {
    let (x, y) = (a.as_slice(), b.as_slice());
    let mut out = [C::new(0.0, 0.0); 16];
    for j in 0..4 {
        for k in 0..4 {
            let bkj = y[4 * j + k];
            for i in 0..4 {
                out[4 * j + i] += x[4 * k + i] * bkj;
            }
        }
    }
    Matrix4::from_column_slice(&out)
}

/// exp(A) of a 4×4 matrix by scaling and squaring (Moler & Van Loan,
/// "Nineteen dubious ways to compute the exponential of a matrix, twenty-five
/// years later", SIAM Rev. 45, 3, 2003, §3): A/2^s with ‖A/2^s‖∞ ≤ ½, its
/// Taylor polynomial of degree 15 (remainder below ½¹⁶/16! ≈ 7e-19) in six
/// matrix products by the Paterson–Stockmeyer scheme (Paterson & Stockmeyer,
/// SIAM J. Comput. 2, 60, 1973), then s squarings.
pub fn exp4(a: &Matrix4<C>) -> Matrix4<C> {
    let norm = a.iter().fold(0.0f64, |m, z| m.max(z.norm_sqr())).sqrt() * 4.0;
    let squarings = if norm > 0.5 {
        (norm / 0.5).log2().ceil() as i32
    } else {
        0
    };
    let x = a * C::new(0.5f64.powi(squarings), 0.0);
    let x2 = mul(&x, &x);
    let x3 = mul(&x2, &x);
    let x4 = mul(&x2, &x2);
    // 1/k! for k = 0 … 15.
    let mut inv_fact = [1.0f64; 16];
    for k in 1..16 {
        inv_fact[k] = inv_fact[k - 1] / k as f64;
    }
    // Σ_{i<4} X^i/(4j + i)!, the coefficient of (X⁴)^j.
    let (p1, p2, p3) = (x.as_slice(), x2.as_slice(), x3.as_slice());
    let block = |j: usize| {
        let c = &inv_fact[4 * j..4 * j + 4];
        let mut b = [C::new(0.0, 0.0); 16];
        for (k, e) in b.iter_mut().enumerate() {
            *e = p1[k] * c[1] + p2[k] * c[2] + p3[k] * c[3];
        }
        for k in 0..4 {
            b[5 * k] += c[0];
        }
        Matrix4::from_column_slice(&b)
    };
    let mut sum = block(3);
    for j in (0..3).rev() {
        sum = mul(&sum, &x4) + block(j);
    }
    for _ in 0..squarings {
        sum = mul(&sum, &sum);
    }
    sum
}

/// Number of samples that determine A′(ψ) exactly: its entries are
/// trigonometric polynomials of degree at most 4 in ψ (Δ's entries are of
/// degree ≤ 2 in the turned tensor, ε₃₃ being invariant under a turn about
/// z, and the frame rotation adds 2), so 9 equally spaced samples fix them
/// (discrete Fourier interpolation, common practice).
const SAMPLES: usize = 9;

/// A′ as a function of the axes' azimuth ψ, from its Fourier coefficients
/// C_k (k = −4 … 4): A′(ψ) = Σ C_k e^{ikψ}.
struct Generator {
    /// C_0, then (C_k, C_−k) for k = 1 … 4.
    c0: Matrix4<C>,
    pairs: [(Matrix4<C>, Matrix4<C>); 4],
}

impl Generator {
    fn of(f: impl Fn(f64) -> Matrix4<C>) -> Generator {
        let samples: Vec<(f64, Matrix4<C>)> = (0..SAMPLES)
            .map(|j| {
                let psi = std::f64::consts::TAU * j as f64 / SAMPLES as f64;
                (psi, f(psi))
            })
            .collect();
        let coefficient = |k: i32| {
            samples.iter().fold(Matrix4::<C>::zeros(), |acc, (psi, m)| {
                acc + m * C::from_polar(1.0 / SAMPLES as f64, -(k as f64) * psi)
            })
        };
        Generator {
            c0: coefficient(0),
            pairs: std::array::from_fn(|k| {
                (coefficient(k as i32 + 1), coefficient(-(k as i32) - 1))
            }),
        }
    }

    fn at(&self, psi: f64) -> Matrix4<C> {
        let e = C::from_polar(1.0, psi);
        let mut power = C::new(1.0, 0.0);
        let mut out = self.c0;
        for (plus, minus) in &self.pairs {
            power *= e;
            out += plus * power + minus * power.conj();
        }
        out
    }
}

/// The transfer of Ψ through a helix from depth `from` to `to` (nm from the
/// layer's front), for base tensor `eps` (its orientation at ψ = 0), axis
/// angle ψ(z) = `start` + `turn`·2π z/`pitch` (turn = +1 for a right-handed
/// helix, −1 for a left-handed one), in-plane wavevector `xi`, vacuum
/// wavenumber `k0` and `steps_per_pitch` Magnus steps per pitch (exact at
/// normal incidence).
#[allow(clippy::too_many_arguments)]
pub fn transfer(
    eps: &Matrix3<C>,
    start: f64,
    turn: f64,
    pitch: f64,
    from: f64,
    to: f64,
    xi: f64,
    k0: f64,
    steps_per_pitch: usize,
) -> Matrix4<C> {
    let rate = turn * std::f64::consts::TAU / pitch;
    let psi = |z: f64| start + rate * z;
    let i = C::new(0.0, 1.0);
    // In the turning frame: A′(z) = Qᵀ A(z) Q − ψ′ K, constant at normal incidence.
    let spin = dq0() * C::new(rate, 0.0);
    let generator = |p: f64| {
        let turn_by = q(p);
        turn_by.transpose() * delta(&turned(eps, p), xi) * turn_by * (i * k0) - spin
    };
    let fourier = (xi != 0.0).then(|| Generator::of(generator));
    let a = |z: f64| match &fourier {
        Some(g) => g.at(psi(z)),
        None => generator(psi(z)),
    };
    // Fourth-order Magnus steps across [from, to].
    let magnus = |steps: usize| {
        let h = (to - from) / steps as f64;
        let offset = 3f64.sqrt() / 6.0;
        let mut t = Matrix4::<C>::identity();
        for n in 0..steps {
            let z0 = from + h * n as f64;
            let (a1, a2) = (a(z0 + h * (0.5 - offset)), a(z0 + h * (0.5 + offset)));
            let omega = (a1 + a2) * C::new(0.5 * h, 0.0)
                + (mul(&a2, &a1) - mul(&a1, &a2)) * C::new(3f64.sqrt() / 12.0 * h * h, 0.0);
            t = mul(&exp4(&omega), &t);
        }
        t
    };
    let inner = if xi == 0.0 {
        magnus(1)
    } else {
        // The method is symmetric, so its error runs in even powers of the
        // step: Richardson's combination of n and n/2 steps cancels the h⁴
        // term (Hairer, Lubich & Wanner, *Geometric Numerical Integration*,
        // 2nd ed. 2006, §II.4).
        let steps = 2
            * ((to - from) / pitch * steps_per_pitch as f64 / 2.0)
                .ceil()
                .max(1.0) as usize;
        (magnus(steps) * C::new(16.0, 0.0) - magnus(steps / 2)) / C::new(15.0, 0.0)
    };
    q(psi(to)) * inner * q(psi(from)).transpose()
}

/// dQ/dψ at ψ = 0 (Qᵀ dQ/dψ is the same at every ψ).
fn dq0() -> Matrix4<C> {
    Matrix4::new(
        0.0, 0.0, -1.0, 0.0, //
        0.0, 0.0, 0.0, -1.0, //
        1.0, 0.0, 0.0, 0.0, //
        0.0, 1.0, 0.0, 0.0,
    )
    .map(|x| C::new(x, 0.0))
}

/// Most Magnus steps per pitch [`steps_for`] chooses.
pub const MAX_STEPS_PER_PITCH: usize = 4096;

/// The slicing criterion: the number of Magnus steps per pitch, doubled
/// from 32 until the transfer through one pitch changes by less than 1e-11
/// (largest entry) when it is doubled again, at in-plane wavevector `xi`
/// and vacuum wavenumber `k0` — the scene's most demanding point (largest
/// angle, shortest wavelength) — or [`MAX_STEPS_PER_PITCH`].
pub fn steps_for(eps: &Matrix3<C>, pitch: f64, xi: f64, k0: f64) -> usize {
    if xi == 0.0 {
        return 1;
    }
    let t = |steps| transfer(eps, 0.0, 1.0, pitch, 0.0, pitch, xi, k0, steps);
    let mut steps = 32;
    let mut current = t(steps);
    while steps < MAX_STEPS_PER_PITCH {
        let finer = t(2 * steps);
        let change = (finer - current)
            .iter()
            .fold(0.0f64, |m, z| m.max(z.norm()));
        if change < 1e-11 {
            break;
        }
        steps *= 2;
        current = finer;
    }
    steps
}

#[cfg(test)]
mod tests {
    use super::*;

    /// exp(P·D·P⁻¹) = P·e^D·P⁻¹ for diagonal D (common practice): seeded
    /// random complex eigenvalues up to |λ| = 4 (so the scaling squares
    /// up to seven times) and well-conditioned random P, to 1e-12 of the
    /// largest entry; a nilpotent N (N⁴ = 0), whose series ends, gives
    /// I + N + N²/2 + N³/6.
    #[test]
    fn exponential_equals_the_eigen_decomposition() {
        let mut seed = 0x2545_f491_4f6c_dd1du64;
        let mut uniform = move || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
        };
        for case in 0..200 {
            let size = [0.01, 0.3, 1.0, 4.0][case % 4];
            let d: Vec<C> = (0..4)
                .map(|_| C::new(uniform(), uniform()) * size)
                .collect();
            let p = Matrix4::<C>::identity()
                + Matrix4::from_fn(|_, _| C::new(uniform(), uniform()) * 0.3);
            let inv = p.try_inverse().expect("well conditioned");
            let a = p * Matrix4::from_fn(|i, j| if i == j { d[i] } else { C::default() }) * inv;
            let want =
                p * Matrix4::from_fn(|i, j| if i == j { d[i].exp() } else { C::default() }) * inv;
            let got = exp4(&a);
            let scale = want.iter().fold(0.0f64, |m, z| m.max(z.norm()));
            let err = (got - want).iter().fold(0.0f64, |m, z| m.max(z.norm()));
            assert!(err <= 1e-12 * scale, "case {case}: {err:e} of {scale}");
        }
        let n = Matrix4::from_fn(|i, j| C::new(if j == i + 1 { 2.5 } else { 0.0 }, 0.0));
        let want = Matrix4::<C>::identity()
            + n
            + n * n * C::new(0.5, 0.0)
            + n * n * n * C::new(1.0 / 6.0, 0.0);
        let err = (exp4(&n) - want)
            .iter()
            .fold(0.0f64, |m, z| m.max(z.norm()));
        assert!(err < 1e-13, "{err:e}");
    }
}
