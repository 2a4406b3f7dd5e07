//! sin and cos of a layer's phase thickness, evaluated together. The phases of
//! visible-light layers are moderate (|δ| ≲ 10⁵ rad), where a Cody–Waite
//! reduction plus Taylor polynomials is exact to about an ulp and several
//! times cheaper than the general library routine.

/// π/2 split into three parts, each of the first two with 33 significant bits,
/// so that k·P1 and k·P2 are exact for |k| < 2²⁰ (Cody & Waite, *Software
/// Manual for the Elementary Functions*, 1980, ch. 8). Computed from π by
/// Machin's formula in exact rational arithmetic.
const P1: f64 = 1.570_796_326_734_125_6;
const P2: f64 = 6.077_100_506_303_966e-11;
const P3: f64 = 2.022_266_248_795_950_6e-21;

/// Beyond this the reduction above loses accuracy; fall back to libm.
const LIMIT: f64 = 1e5;

/// (sin x, cos x).
#[inline]
pub fn sin_cos(x: f64) -> (f64, f64) {
    if !(x.abs() < LIMIT) {
        return x.sin_cos();
    }
    reduced(x)
}

/// (sin x, cos x) for `N` arguments side by side; the branch-free core lets
/// the compiler use vector instructions across the lanes.
#[inline(always)]
pub fn sin_cos_lanes<const N: usize>(x: [f64; N]) -> ([f64; N], [f64; N]) {
    if x.iter().any(|v| !(v.abs() < LIMIT)) {
        let mut s = [0.0; N];
        let mut c = [0.0; N];
        for l in 0..N {
            (s[l], c[l]) = sin_cos(x[l]);
        }
        return (s, c);
    }
    reduced_lanes(x)
}

/// Taylor coefficients of (sin r − r)/r³ in powers of r², lowest first.
const SIN: [f64; 8] = [
    -1.0 / 6.0,
    1.0 / 120.0,
    -1.0 / 5040.0,
    1.0 / 362_880.0,
    -1.0 / 39_916_800.0,
    1.0 / 6_227_020_800.0,
    -1.0 / 1_307_674_368_000.0,
    1.0 / 355_687_428_096_000.0,
];

/// Taylor coefficients of (cos r − 1)/r² in powers of r², lowest first.
const COS: [f64; 9] = [
    -0.5,
    1.0 / 24.0,
    -1.0 / 720.0,
    1.0 / 40_320.0,
    -1.0 / 3_628_800.0,
    1.0 / 479_001_600.0,
    -1.0 / 87_178_291_200.0,
    1.0 / 20_922_789_888_000.0,
    -1.0 / 6_402_373_705_728_000.0,
];

/// (sin x, cos x) for one argument below [`LIMIT`], without branches.
#[inline(always)]
fn reduced(x: f64) -> (f64, f64) {
    let ([s], [c]) = reduced_lanes([x]);
    (s, c)
}

/// The Cody–Waite reduction and the polynomials, valid for |x| < [`LIMIT`],
/// without branches, each step over every lane so that it maps onto one
/// vector instruction.
#[inline(always)]
fn reduced_lanes<const N: usize>(x: [f64; N]) -> ([f64; N], [f64; N]) {
    // Round to the nearest integer by adding and removing 1.5·2⁵² (exact for
    // |x·2/π| < 2⁵¹); the low bits of the shifted value are then k mod 4 in
    // two's complement, the quadrant.
    const SHIFT: f64 = 6_755_399_441_055_744.0;
    let mut r = [0.0; N];
    let mut quadrant = [0u64; N];
    for l in 0..N {
        let shifted = x[l] * std::f64::consts::FRAC_2_PI + SHIFT;
        let k = shifted - SHIFT;
        quadrant[l] = shifted.to_bits() & 3;
        r[l] = ((x[l] - k * P1) - k * P2) - k * P3;
    }
    let r2: [f64; N] = std::array::from_fn(|l| r[l] * r[l]);
    // Horner's rule from the highest power down.
    let mut ps = [SIN[SIN.len() - 1]; N];
    for &a in SIN[..SIN.len() - 1].iter().rev() {
        for l in 0..N {
            ps[l] = a + r2[l] * ps[l];
        }
    }
    let mut pc = [COS[COS.len() - 1]; N];
    for &a in COS[..COS.len() - 1].iter().rev() {
        for l in 0..N {
            pc[l] = a + r2[l] * pc[l];
        }
    }
    let mut sin = [0.0; N];
    let mut cos = [0.0; N];
    for l in 0..N {
        let s = r[l] + r[l] * r2[l] * ps[l];
        let c = 1.0 + r2[l] * pc[l];
        // Quadrant 0: (s, c); 1: (c, −s); 2: (−s, −c); 3: (−c, s), by bit masks.
        let odd = 0u64.wrapping_sub(quadrant[l] & 1);
        let (sb, cb) = (s.to_bits(), c.to_bits());
        let first = (cb & odd) | (sb & !odd);
        let second = (sb & odd) | (cb & !odd);
        let sign_first = (quadrant[l] & 2) << 62;
        let sign_second = ((quadrant[l] + 1) & 2) << 62;
        sin[l] = f64::from_bits(first ^ sign_first);
        cos[l] = f64::from_bits(second ^ sign_second);
    }
    (sin, cos)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Against the standard library over the whole reduced range and far out.
    #[test]
    fn agrees_with_libm() {
        let mut worst = 0.0f64;
        let mut x = -2.0e5;
        while x < 2.0e5 {
            for y in [x, x * 1e-4, x * 1e-2] {
                let (s, c) = sin_cos(y);
                let (s0, c0) = y.sin_cos();
                worst = worst.max((s - s0).abs()).max((c - c0).abs());
            }
            x += 0.7319;
        }
        // Absolute error grows with |x| as the ulp of x does (2e5 · 2⁻⁵² ≈ 4e-11
        // is libm's own input resolution there); near the origin it is an ulp.
        assert!(worst < 1e-15, "worst {worst:e}");
    }

    /// The branch-free lane path (every argument below [`LIMIT`]) on seeded
    /// pseudo-random arguments: bit-identical to the scalar form and within
    /// an ulp-sized error of libm.
    #[test]
    fn lanes_agree_with_the_scalar_form() {
        let mut state = 0x9e37_79b9_7f4a_7c15u64;
        let mut next = || {
            // xorshift64*: a fixed sequence, so the test is reproducible.
            state ^= state >> 12;
            state ^= state << 25;
            state ^= state >> 27;
            (state.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64
        };
        for _ in 0..2000 {
            let scale = [1.0, 30.0, 3e3, 0.99 * LIMIT][(next() * 4.0) as usize];
            let x: [f64; 4] = std::array::from_fn(|_| (2.0 * next() - 1.0) * scale);
            assert!(x.iter().all(|v| v.abs() < LIMIT));
            let (s, c) = sin_cos_lanes(x);
            for l in 0..4 {
                assert_eq!((s[l], c[l]), reduced(x[l]));
                let (s0, c0) = x[l].sin_cos();
                assert!((s[l] - s0).abs() < 2e-11 && (c[l] - c0).abs() < 2e-11);
                if x[l].abs() < 100.0 {
                    assert!((s[l] - s0).abs() < 1e-15 && (c[l] - c0).abs() < 1e-15);
                }
            }
        }
    }

    /// One argument beyond [`LIMIT`] sends the whole block to the scalar form
    /// (libm for that argument).
    #[test]
    fn lanes_beyond_the_limit_fall_back_to_libm() {
        let x = [0.3, -2.9, 1e6, 12345.678];
        let (s, c) = sin_cos_lanes(x);
        for l in 0..4 {
            assert_eq!((s[l], c[l]), sin_cos(x[l]));
        }
    }

    #[test]
    fn quadrant_boundaries_and_specials() {
        for k in -8..8 {
            let x = k as f64 * std::f64::consts::FRAC_PI_4;
            let (s, c) = sin_cos(x);
            assert!((s - x.sin()).abs() < 1e-15 && (c - x.cos()).abs() < 1e-15);
        }
        assert!(sin_cos(f64::NAN).0.is_nan());
        assert_eq!(sin_cos(0.0), (0.0, 1.0));
    }
}
