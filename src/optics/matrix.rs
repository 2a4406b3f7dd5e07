//! 2×2 characteristic matrices and field vectors with a separate logarithmic
//! scale, so that thick absorbing layers, evanescent layers and long stop-band
//! stacks neither overflow nor underflow.

use num_complex::Complex64;

/// Entries beyond this magnitude are renormalised into the scale.
const BIG: f64 = 1e100;

/// Phase terms of one layer, shared by both polarizations: cos δ and sin δ
/// divided by e^{Im δ}, with `log_scale` = Im δ.
#[derive(Debug, Clone, Copy)]
pub struct Phase {
    /// cos δ · e^{−Im δ}.
    pub cos: Complex64,
    /// sin δ · e^{−Im δ}.
    pub sin: Complex64,
    /// Im δ ≥ 0, the factor taken out.
    pub log_scale: f64,
}

impl Phase {
    /// Phase thickness δ = (2π/λ)·d·q for a layer; `k0d` = 2π d / λ.
    pub fn new(k0d: f64, q: Complex64) -> Self {
        let (a, b) = (k0d * q.re, k0d * q.im);
        let (sa, ca) = super::trig::sin_cos(a);
        if b == 0.0 {
            return Phase {
                cos: Complex64::new(ca, 0.0),
                sin: Complex64::new(sa, 0.0),
                log_scale: 0.0,
            };
        }
        // cos(a+ib) = cos a cosh b − i sin a sinh b; sin(a+ib) = sin a cosh b + i cos a sinh b.
        // With the factor e^{−b} taken out: cosh b → (1 + e^{−2b})/2, sinh b → (1 − e^{−2b})/2.
        let e = (-2.0 * b).exp();
        let (ch, sh) = (0.5 * (1.0 + e), 0.5 * (1.0 - e));
        Phase {
            cos: Complex64::new(ca * ch, -sa * sh),
            sin: Complex64::new(sa * ch, ca * sh),
            log_scale: b,
        }
    }
}

/// A field vector (B, C) = (E, H) tangential amplitudes with a scale e^{log}.
#[derive(Debug, Clone, Copy)]
pub struct Field {
    /// Normalised vector.
    pub v: [Complex64; 2],
    /// Natural log of the factor taken out.
    pub log: f64,
}

impl Field {
    /// (1, η) at the exit medium.
    pub fn exit(eta: Complex64) -> Self {
        Field {
            v: [Complex64::new(1.0, 0.0), eta],
            log: 0.0,
        }
    }

    /// Multiplies by the layer matrix [[cos δ, −i sin δ/η], [−i η sin δ, cos δ]]
    /// (Born & Wolf, *Principles of Optics*, 7th ed. 1999, §1.6.2 eq. 33; the
    /// signs of i belong to the n + i·k convention used throughout, where
    /// Macleod's n − i·k convention writes +i).
    #[inline]
    pub fn through_layer(&mut self, ph: &Phase, eta: Complex64, inv_eta: Complex64, real: bool) {
        let [b, c] = self.v;
        if real {
            let (cs, sn) = (ph.cos.re, ph.sin.re);
            let (x, y) = (sn * inv_eta.re, sn * eta.re);
            self.v = [
                b * cs + Complex64::new(x * c.im, -x * c.re),
                Complex64::new(y * b.im, -y * b.re) + c * cs,
            ];
        } else {
            let is = -Complex64::i() * ph.sin;
            self.v = [b * ph.cos + is * inv_eta * c, is * eta * b + c * ph.cos];
            self.log += ph.log_scale;
        }
    }

    /// Multiplies by a scaled matrix.
    pub fn through(&mut self, m: &Mat) {
        self.v = m.apply(self.v);
        self.log += m.log;
        self.renormalise();
    }

    /// Moves a large magnitude into the scale. [`Field::through_layer`] leaves
    /// this to the caller, who calls it every few layers: one lossless layer
    /// multiplies the magnitude by at most max(|η|, 1/|η|) + 1.
    #[inline]
    pub fn renormalise(&mut self) {
        let big = self
            .v
            .iter()
            .fold(0.0f64, |acc, z| acc.max(z.re.abs()).max(z.im.abs()));
        if big > BIG || (big < 1.0 / BIG && big > 0.0) {
            let inv = 1.0 / big;
            self.v = [self.v[0] * inv, self.v[1] * inv];
            self.log += big.ln();
        }
    }
}

/// The field vectors of both polarizations for `N` wavelengths at once, in
/// structure-of-arrays form (s: B re, B im, C re, C im, then p likewise), so
/// that lossless layers shared by all lanes run in vector registers.
#[derive(Debug, Clone, Copy)]
pub struct FieldLanes<const N: usize> {
    v: [[f64; N]; 8],
    log: [[f64; N]; 2],
}

impl<const N: usize> FieldLanes<N> {
    /// Packs per-lane fields.
    pub fn load(fs: &[Field; N], fp: &[Field; N]) -> Self {
        let mut out = FieldLanes {
            v: [[0.0; N]; 8],
            log: [[0.0; N]; 2],
        };
        for (pol, fields) in [fs, fp].into_iter().enumerate() {
            for (l, f) in fields.iter().enumerate() {
                let [b, c] = f.v;
                for (j, x) in [b.re, b.im, c.re, c.im].into_iter().enumerate() {
                    out.v[4 * pol + j][l] = x;
                }
                out.log[pol][l] = f.log;
            }
        }
        out
    }

    /// Unpacks into per-lane fields.
    pub fn store(&self, fs: &mut [Field; N], fp: &mut [Field; N]) {
        for (pol, fields) in [fs, fp].into_iter().enumerate() {
            for (l, f) in fields.iter_mut().enumerate() {
                let at = |j: usize| self.v[4 * pol + j][l];
                f.v = [Complex64::new(at(0), at(1)), Complex64::new(at(2), at(3))];
                f.log = self.log[pol][l];
            }
        }
    }

    /// [`Field::through_layer`] for a lossless, propagating layer on every
    /// lane: phase k0·d·q, admittances `eta` and their inverses per polarization.
    #[inline(always)]
    pub fn through_real(
        &mut self,
        k0d: [f64; N],
        q: [f64; N],
        eta: [[f64; N]; 2],
        inv_eta: [[f64; N]; 2],
    ) {
        let delta: [f64; N] = std::array::from_fn(|l| k0d[l] * q[l]);
        let (sn, cs) = super::trig::sin_cos_lanes(delta);
        for pol in 0..2 {
            let [br, bi, cr, ci] = [0, 1, 2, 3].map(|j| self.v[4 * pol + j]);
            for l in 0..N {
                let (x, y) = (sn[l] * inv_eta[pol][l], sn[l] * eta[pol][l]);
                self.v[4 * pol][l] = br[l] * cs[l] + x * ci[l];
                self.v[4 * pol + 1][l] = bi[l] * cs[l] - x * cr[l];
                self.v[4 * pol + 2][l] = y * bi[l] + cr[l] * cs[l];
                self.v[4 * pol + 3][l] = ci[l] * cs[l] - y * br[l];
            }
        }
    }

    /// Multiplies every lane by its real-form matrix: `m` holds lane
    /// `pol · N + l` for polarization `pol` (s = 0, p = 1) and wavelength `l`;
    /// `M` must be `2 · N`.
    #[inline]
    pub fn through_real_matrix<const M: usize>(&mut self, m: &RealLanes<M>) {
        debug_assert_eq!(M, 2 * N);
        for pol in 0..2 {
            let [br, bi, cr, ci] = [0, 1, 2, 3].map(|j| self.v[4 * pol + j]);
            for l in 0..N {
                let k = pol * N + l;
                let (a, b, c, d) = (m.a[k], m.b[k], m.c[k], m.d[k]);
                // B' = a B − i b C, C' = −i c B + d C.
                self.v[4 * pol][l] = a * br[l] + b * ci[l];
                self.v[4 * pol + 1][l] = a * bi[l] - b * cr[l];
                self.v[4 * pol + 2][l] = c * bi[l] + d * cr[l];
                self.v[4 * pol + 3][l] = d * ci[l] - c * br[l];
                self.log[pol][l] += m.log[k];
            }
        }
    }

    /// R and T on every lane, `[R, T][polarization]`, where the incident
    /// admittances `eta0` and the exit admittances `eta_m` (per polarization
    /// and lane) are real: r = (η₀B − C)/(η₀B + C), R = |r|² and
    /// T = 4η₀η_m/|η₀B + C|², with the field's scale e^{log} divided out of T
    /// (Macleod, *Thin-Film Optical Filters*, 2010, eq. 2.99–2.100).
    #[inline(always)]
    pub fn reflect_transmit(
        &self,
        eta0: [[f64; N]; 2],
        eta_m: [[f64; N]; 2],
    ) -> [[[f64; N]; 2]; 2] {
        let mut out = [[[0.0; N]; 2]; 2];
        for pol in 0..2 {
            let [br, bi, cr, ci] = [0, 1, 2, 3].map(|j| self.v[4 * pol + j]);
            for l in 0..N {
                let (e0, em) = (eta0[pol][l], eta_m[pol][l]);
                let (dr, di) = (e0 * br[l] + cr[l], e0 * bi[l] + ci[l]);
                let (nr, ni) = (e0 * br[l] - cr[l], e0 * bi[l] - ci[l]);
                let inv_den2 = 1.0 / (dr * dr + di * di);
                out[0][pol][l] = (nr * nr + ni * ni) * inv_den2;
                out[1][pol][l] = 4.0 * e0 * em * inv_den2;
            }
            for (t, &log) in out[1][pol].iter_mut().zip(&self.log[pol]) {
                if log != 0.0 {
                    *t *= (-2.0 * log).exp();
                }
            }
        }
        out
    }

    /// [`Field::renormalise`] on every lane and polarization.
    #[inline(always)]
    pub fn renormalise(&mut self) {
        for pol in 0..2 {
            let v = &self.v[4 * pol..4 * pol + 4];
            let mut big = [0.0; N];
            for (l, m) in big.iter_mut().enumerate() {
                *m = larger(
                    larger(v[0][l].abs(), v[1][l].abs()),
                    larger(v[2][l].abs(), v[3][l].abs()),
                );
            }
            for_each_out_of_range(&big, |l, m| {
                let inv = 1.0 / m;
                for j in 0..4 {
                    self.v[4 * pol + j][l] *= inv;
                }
                self.log[pol][l] += m.ln();
            });
        }
    }
}

/// A 2×2 complex matrix `m` times e^{log}.
#[derive(Debug, Clone, Copy)]
pub struct Mat {
    /// Row-major entries.
    pub m: [[Complex64; 2]; 2],
    /// Natural log of the factor taken out.
    pub log: f64,
}

impl Mat {
    /// The identity.
    pub fn identity() -> Self {
        let (o, z) = (Complex64::new(1.0, 0.0), Complex64::new(0.0, 0.0));
        Mat {
            m: [[o, z], [z, o]],
            log: 0.0,
        }
    }

    /// The characteristic matrix of one layer (same form as [`Field::through_layer`]).
    pub fn layer(ph: &Phase, eta: Complex64, inv_eta: Complex64) -> Self {
        let is = -Complex64::i() * ph.sin;
        Mat {
            m: [[ph.cos, is * inv_eta], [is * eta, ph.cos]],
            log: ph.log_scale,
        }
    }

    fn apply(&self, v: [Complex64; 2]) -> [Complex64; 2] {
        let m = &self.m;
        [
            m[0][0] * v[0] + m[0][1] * v[1],
            m[1][0] * v[0] + m[1][1] * v[1],
        ]
    }

    /// The product `self · rhs` (rhs nearer the exit side).
    pub fn mul(&self, rhs: &Mat) -> Mat {
        let (a, b) = (&self.m, &rhs.m);
        let mut out = Mat {
            m: [
                [
                    a[0][0] * b[0][0] + a[0][1] * b[1][0],
                    a[0][0] * b[0][1] + a[0][1] * b[1][1],
                ],
                [
                    a[1][0] * b[0][0] + a[1][1] * b[1][0],
                    a[1][0] * b[0][1] + a[1][1] * b[1][1],
                ],
            ],
            log: self.log + rhs.log,
        };
        out.renormalise();
        out
    }

    /// `self^n` by binary powering: O(log n) products.
    pub fn pow(&self, n: u64) -> Mat {
        power(*self, n, Mat::identity(), Mat::mul)
    }

    /// The matrix of the same layers in reverse order. Every layer matrix has
    /// equal diagonal entries, so M_k…M_1 = J (M_1…M_k)ᵀ J with J the exchange
    /// matrix: swap the diagonal.
    pub fn reversed(&self) -> Mat {
        let m = &self.m;
        Mat {
            m: [[m[1][1], m[0][1]], [m[1][0], m[0][0]]],
            log: self.log,
        }
    }

    fn renormalise(&mut self) {
        let big = self
            .m
            .iter()
            .flatten()
            .fold(0.0f64, |acc, z| acc.max(z.re.abs()).max(z.im.abs()));
        if big > BIG || (big < 1.0 / BIG && big > 0.0) {
            let inv = 1.0 / big;
            for z in self.m.iter_mut().flatten() {
                *z *= inv;
            }
            self.log += big.ln();
        }
    }
}

/// Characteristic matrices of lossless, propagating layers, several at once
/// (lanes: s and p, and for [`RealLanes::<8>`] four wavelengths of each):
/// [[a, −i·b], [−i·c, d]] with a, b, c, d real, times e^{log} (a scale per
/// lane: in a long stop band the lanes grow at different rates). Products of
/// such matrices keep the form, so a quarter of the complex arithmetic
/// suffices, and the lanes run side by side in vector registers.
#[derive(Debug, Clone, Copy)]
pub struct RealLanes<const M: usize> {
    a: [f64; M],
    b: [f64; M],
    c: [f64; M],
    d: [f64; M],
    log: [f64; M],
}

/// One wavelength: lane 0 is s, lane 1 is p.
pub type RealPair = RealLanes<2>;

impl<const M: usize> RealLanes<M> {
    /// The identity.
    pub fn identity() -> Self {
        RealLanes {
            a: [1.0; M],
            b: [0.0; M],
            c: [0.0; M],
            d: [1.0; M],
            log: [0.0; M],
        }
    }

    /// One lossless layer: cos δ and sin δ per lane, admittances and their inverses.
    #[inline]
    pub fn layer(cos: [f64; M], sin: [f64; M], eta: [f64; M], inv_eta: [f64; M]) -> Self {
        RealLanes {
            a: cos,
            b: std::array::from_fn(|i| sin[i] * inv_eta[i]),
            c: std::array::from_fn(|i| sin[i] * eta[i]),
            d: cos,
            log: [0.0; M],
        }
    }

    /// The product `self · rhs`, lane by lane.
    #[inline]
    pub fn mul(&self, r: &RealLanes<M>) -> RealLanes<M> {
        let mut out = *self;
        out.mul_assign::<true>(r);
        out
    }

    /// `self = self · rhs` in place, with the lanes' magnitudes moved into
    /// the scale where they leave range (when `RESCALE`).
    #[inline(always)]
    fn mul_assign<const RESCALE: bool>(&mut self, r: &RealLanes<M>) {
        for i in 0..M {
            let (a, b, c, d) = (self.a[i], self.b[i], self.c[i], self.d[i]);
            self.a[i] = a * r.a[i] - b * r.c[i];
            self.b[i] = a * r.b[i] + b * r.d[i];
            self.c[i] = c * r.a[i] + d * r.c[i];
            self.d[i] = d * r.d[i] - c * r.b[i];
            self.log[i] += r.log[i];
        }
        if RESCALE {
            self.rescale();
        }
    }

    /// `self = self · self`: with t = a + d, the square of [[a, −ib], [−ic, d]]
    /// is [[a² − bc, −i·b·t], [−i·c·t, d² − bc]].
    #[inline(always)]
    fn square_assign<const RESCALE: bool>(&mut self) {
        for i in 0..M {
            let (a, b, c, d) = (self.a[i], self.b[i], self.c[i], self.d[i]);
            let (t, bc) = (a + d, b * c);
            self.a[i] = a * a - bc;
            self.b[i] = b * t;
            self.c[i] = c * t;
            self.d[i] = d * d - bc;
            self.log[i] += self.log[i];
        }
        if RESCALE {
            self.rescale();
        }
    }

    /// Moves the magnitude of lanes whose entries leave [1/[`BIG`], [`BIG`]]
    /// into the scale.
    #[inline(always)]
    fn rescale(&mut self) {
        let big: [f64; M] = std::array::from_fn(|i| {
            larger(
                larger(self.a[i].abs(), self.b[i].abs()),
                larger(self.c[i].abs(), self.d[i].abs()),
            )
        });
        for_each_out_of_range(&big, |i, m| {
            let inv = 1.0 / m;
            self.a[i] *= inv;
            self.b[i] *= inv;
            self.c[i] *= inv;
            self.d[i] *= inv;
            self.log[i] += m.ln();
        });
    }

    /// `self^n` by binary powering (square and multiply), every product
    /// rescaled into the per-lane log scale. The matrix itself is powered,
    /// not a scalar recurrence: in a stop band M^n is dominated by the
    /// growing Bloch wave, and a normalised product keeps that direction to
    /// rounding accuracy, where the Chebyshev pair of Abelès' formula
    /// (Born & Wolf, *Principles of Optics*, 7th ed. 1999, §1.6.5) grows like
    /// e^{nκ} in both terms and cancels. Used for groups shorter than
    /// [`super::exact::EXACT_FROM`] periods; longer ones are powered in
    /// double-double.
    ///
    /// Every lane is unimodular (det = ad + bc = 1 for lossless layers), so
    /// while no scale has been taken out, the entries of M^k stay within
    /// [1/√2, (2m)^k] for m the largest entry of M: for k < 64 and m ≤ 19
    /// that is inside [1/[`BIG`], [`BIG`]], and the products skip the range
    /// checks.
    pub fn pow(&self, n: u64) -> RealLanes<M> {
        let m = (0..M).fold(0.0, |m, i| {
            larger(
                m,
                larger(
                    larger(self.a[i].abs(), self.b[i].abs()),
                    larger(self.c[i].abs(), self.d[i].abs()),
                ),
            )
        });
        if n < 64 && m <= 19.0 && self.log.iter().all(|&l| l == 0.0) {
            self.pow_with::<false>(n)
        } else {
            self.pow_with::<true>(n)
        }
    }

    /// Square and multiply in place, the accumulator starting at the lowest
    /// set bit; products rescaled when `RESCALE`.
    #[inline(always)]
    fn pow_with<const RESCALE: bool>(&self, n: u64) -> RealLanes<M> {
        if n == 0 {
            return RealLanes::identity();
        }
        let mut base = *self;
        let mut k = n;
        while k & 1 == 0 {
            base.square_assign::<RESCALE>();
            k >>= 1;
        }
        let mut acc = base;
        k >>= 1;
        while k > 0 {
            base.square_assign::<RESCALE>();
            if k & 1 == 1 {
                acc.mul_assign::<RESCALE>(&base);
            }
            k >>= 1;
        }
        acc
    }
}

/// Calls `rescale(lane, magnitude)` for each lane whose magnitude lies
/// outside [1/[`BIG`], [`BIG`]] (and is not zero). Small magnitudes matter as
/// much as large ones: a normalised stop-band power is close to rank one,
/// and squaring it multiplies its entries by its trace, which may be far
/// below 1, so without rescaling they would underflow to 0 within a few
/// squarings. The common case, every lane in range, is one branch-free
/// reduction.
#[inline(always)]
fn for_each_out_of_range<const M: usize>(big: &[f64; M], mut rescale: impl FnMut(usize, f64)) {
    let hi = big.iter().fold(0.0, |hi, &m| larger(hi, m));
    let lo = big.iter().fold(f64::INFINITY, |lo, &m| smaller(lo, m));
    if hi > BIG || lo < 1.0 / BIG {
        for (i, &m) in big.iter().enumerate() {
            if m > BIG || (m < 1.0 / BIG && m > 0.0) {
                rescale(i, m);
            }
        }
    }
}

/// The smaller of two magnitudes, by a plain comparison so that lanes vectorize.
#[inline(always)]
fn smaller(x: f64, y: f64) -> f64 {
    if x < y { x } else { y }
}

/// The larger of two magnitudes, by a plain comparison (not `f64::max`) so
/// that lanes vectorize.
#[inline(always)]
fn larger(x: f64, y: f64) -> f64 {
    if x > y { x } else { y }
}

impl RealPair {
    /// One lossless layer with real phase `ph` and real admittances
    /// `eta` = (η_s, η_p) and their inverses.
    pub fn of_layer(ph: &Phase, eta: [f64; 2], inv_eta: [f64; 2]) -> Self {
        RealLanes::layer([ph.cos.re; 2], [ph.sin.re; 2], eta, inv_eta)
    }

    /// The two matrices (s, p) in complex form.
    pub fn complex(&self) -> (Mat, Mat) {
        let re = |x: f64| Complex64::new(x, 0.0);
        let mi = |x: f64| Complex64::new(0.0, -x);
        let lane = |i: usize| Mat {
            m: [
                [re(self.a[i]), mi(self.b[i])],
                [mi(self.c[i]), re(self.d[i])],
            ],
            log: self.log[i],
        };
        (lane(0), lane(1))
    }
}

/// `base^n` by binary powering (square and multiply) for any associative product.
#[inline]
pub(super) fn power<T: Copy>(mut base: T, mut n: u64, identity: T, mul: fn(&T, &T) -> T) -> T {
    let mut acc = identity;
    while n > 0 {
        if n & 1 == 1 {
            acc = mul(&acc, &base);
        }
        n >>= 1;
        if n > 0 {
            base = mul(&base, &base);
        }
    }
    acc
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Entry `(a, b, c, d)` of lane `i` times its scale, for comparisons.
    fn entries<const M: usize>(m: &RealLanes<M>, i: usize) -> [f64; 4] {
        let s = m.log[i].exp();
        [m.a[i] * s, m.b[i] * s, m.c[i] * s, m.d[i] * s]
    }

    /// The power by squaring equals repeated multiplication, also for
    /// matrices that are not unimodular and carry a scale of their own.
    #[test]
    fn power_equals_repeated_products() {
        let m = RealPair {
            a: [0.8, 1.9],
            b: [0.35, -0.7],
            c: [-0.9, 1.3],
            d: [1.1, 0.6],
            log: [0.0, -0.25],
        };
        for n in [0, 1, 2, 3, 7, 20, 37] {
            let mut slow = RealPair::identity();
            for _ in 0..n {
                slow.mul_assign::<true>(&m);
            }
            let fast = m.pow(n);
            for i in 0..2 {
                let (x, y) = (entries(&fast, i), entries(&slow, i));
                let size = y.iter().fold(0.0f64, |s, v| s.max(v.abs()));
                for (u, v) in x.iter().zip(&y) {
                    assert!(
                        (u - v).abs() <= 1e-12 * size,
                        "n = {n}, lane {i}: {x:?} vs {y:?}"
                    );
                }
            }
        }
    }

    /// A stop-band matrix (trace 3, unimodular) powered 10⁸ times stays
    /// finite: its magnitude grows as λ₁ⁿ with λ₁ = (3 + √5)/2 and its
    /// columns align with the growing eigenvector (common practice for
    /// matrix powers).
    #[test]
    fn stop_band_powers_stay_finite_and_grow_as_the_bloch_wave() {
        let m = RealPair {
            a: [2.0; 2],
            b: [0.5; 2],
            c: [-2.0; 2],
            d: [1.0; 2],
            log: [0.0; 2],
        };
        let lambda = (3.0 + 5f64.sqrt()) / 2.0;
        for n in [1_000u64, 65_536, 100_000_000] {
            let p = m.pow(n);
            let [a, b, c, d] = [p.a[0], p.b[0], p.c[0], p.d[0]];
            assert!([a, b, c, d, p.log[0]].iter().all(|v| v.is_finite()));
            let log_size = p.log[0] + a.abs().max(d.abs()).ln();
            assert!((log_size - n as f64 * lambda.ln()).abs() < 2.0, "n = {n}");
            // Rank one (the decaying wave is lost below rounding).
            assert!((a * d + b * c).abs() < 1e-12 * (a * d).abs().max((b * c).abs()));
        }
    }
}
