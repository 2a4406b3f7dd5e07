//! Double-double arithmetic: a value is the unevaluated sum `hi + lo` of two
//! doubles with |lo| ≤ ulp(hi)/2, about 32 significant digits, with the
//! exponent range of a double. The engine uses it where double rounding
//! would be amplified beyond what the result tolerates: the powers of long
//! repeat groups, whose rounding grows with the number of periods.
//!
//! The building blocks are error-free transformations: TwoSum (Knuth, *The
//! Art of Computer Programming*, vol. 2, 3rd ed. 1997, §4.2.2, Theorem B),
//! FastTwoSum and TwoProduct with Veltkamp's splitting (Dekker, "A
//! floating-point technique for extending the available precision", Numer.
//! Math. 18, 224–242, 1971), which needs no fused multiply–add (the
//! baseline x86-64 target has none, and the library call is slow). Sums, products and quotients of double-words follow
//! Joldes, Muller & Popescu, "Tight and rigorous error bounds for basic
//! building blocks of double-word arithmetic", ACM Trans. Math. Softw. 44(2),
//! 2017: relative errors a few units of 2⁻¹⁰⁶.

use std::ops::{Add, Div, Mul, Neg, Sub};

/// A double-double number `hi + lo`.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Dd {
    /// The leading double: the value rounded to double precision.
    pub hi: f64,
    /// The rounding error of `hi`.
    pub lo: f64,
}

/// s + e = a + b exactly (Knuth's TwoSum).
#[inline(always)]
fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

/// s + e = a + b exactly, for |a| ≥ |b| (Dekker's FastTwoSum).
#[inline(always)]
fn fast_two_sum(a: f64, b: f64) -> Dd {
    let s = a + b;
    Dd {
        hi: s,
        lo: b - (s - a),
    }
}

/// a = hi + lo with each half of 26 significant bits (Veltkamp's splitting).
#[inline(always)]
fn split(a: f64) -> (f64, f64) {
    const FACTOR: f64 = 134_217_729.0; // 2²⁷ + 1
    let t = FACTOR * a;
    let hi = t - (t - a);
    (hi, a - hi)
}

/// p + e = a·b exactly (Dekker's TwoProduct), for |a·b| well inside the
/// double range.
#[inline(always)]
fn two_prod(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    let ((ah, al), (bh, bl)) = (split(a), split(b));
    (p, ((ah * bh - p) + ah * bl + al * bh) + al * bl)
}

// The constants below are π/2, π/180, ln 2 and 2π split into doubles
// (hi = the double nearest, each further term the double nearest the rest),
// from mpmath 1.3.0 at 60 digits.

/// 2π to double-double precision.
const TWO_PI: Dd = Dd {
    hi: std::f64::consts::TAU,
    lo: 2.4492935982947064e-16,
};
/// π/2 to triple-double precision, for argument reduction.
const FRAC_PI_2: [f64; 3] = [
    std::f64::consts::FRAC_PI_2,
    6.123233995736766e-17,
    -1.4973849048591698e-33,
];
/// π/180 to double-double precision.
const RADIANS_PER_DEGREE: Dd = Dd {
    hi: 0.017453292519943295,
    lo: 2.9486522708701687e-19,
};
/// ln 2 to triple-double precision.
const LN_2: [f64; 3] = [
    std::f64::consts::LN_2,
    2.3190468138462996e-17,
    5.707708438416212e-34,
];

impl Dd {
    /// Zero.
    pub const ZERO: Dd = Dd { hi: 0.0, lo: 0.0 };
    /// One.
    pub const ONE: Dd = Dd { hi: 1.0, lo: 0.0 };

    /// A double, exactly.
    #[inline(always)]
    pub const fn from_f64(x: f64) -> Dd {
        Dd { hi: x, lo: 0.0 }
    }

    /// The value rounded to a double.
    #[inline(always)]
    pub fn to_f64(self) -> f64 {
        self.hi + self.lo
    }

    /// |self|.
    #[inline(always)]
    pub fn abs(self) -> Dd {
        if self.hi < 0.0 { -self } else { self }
    }

    /// self · 2^k, exactly (barring underflow).
    #[inline(always)]
    pub fn scale_pow2(self, k: i32) -> Dd {
        let s = 2f64.powi(k);
        Dd {
            hi: self.hi * s,
            lo: self.lo * s,
        }
    }

    /// self · b for a double b.
    #[inline(always)]
    pub fn mul_f64(self, b: f64) -> Dd {
        let (p, e) = two_prod(self.hi, b);
        fast_two_sum(p, self.lo * b + e)
    }

    /// self / b for a double b.
    #[inline(always)]
    pub fn div_f64(self, b: f64) -> Dd {
        let q1 = self.hi / b;
        let (p, e) = two_prod(q1, b);
        let r = (self.hi - p - e + self.lo) / b;
        fast_two_sum(q1, r)
    }

    /// √self for self ≥ 0 (0 for anything else): one Newton step on the
    /// double square root.
    pub fn sqrt(self) -> Dd {
        if !(self.hi > 0.0) {
            return Dd::ZERO;
        }
        let s = self.hi.sqrt();
        let (p, e) = two_prod(s, s);
        let r = ((self.hi - p) - e + self.lo) / (2.0 * s);
        fast_two_sum(s, r)
    }

    /// sin and cos of an angle in radians. The argument is reduced by
    /// multiples of π/2 held to triple-double precision (Cody & Waite,
    /// *Software Manual for the Elementary Functions*, 1980, ch. 8), then the
    /// Taylor series of sin is summed to below 2⁻¹⁰⁸ of its value on
    /// |r| ≤ π/4, where cos = √(1 − sin²) ≥ 1/√2 is well conditioned.
    /// Beyond 2⁵⁰ rad (layers kilometres thick) the multiple k of π/2 is no
    /// longer exact, and the f64 rounding of the thickness alone leaves the
    /// phase uncertain by a tenth of a radian: the library routine on the
    /// leading part is then as good as it gets (and NaN stays NaN).
    pub fn sin_cos(self) -> (Dd, Dd) {
        if !(self.hi.abs() < 1.125_899_906_842_624e15) {
            let (s, c) = self.hi.sin_cos();
            return (Dd::from_f64(s), Dd::from_f64(c));
        }
        let k = (self.hi / FRAC_PI_2[0]).round();
        let mut r = self;
        for part in FRAC_PI_2 {
            let (p, e) = two_prod(k, part);
            r = r - Dd { hi: p, lo: e };
        }
        let r2 = r * r;
        let (mut sum, mut term) = (r, r);
        let mut j = 1.0;
        loop {
            term = -(term * r2).div_f64((2.0 * j) * (2.0 * j + 1.0));
            sum = sum + term;
            if term.hi.abs() <= 1e-34 * sum.hi.abs() {
                break;
            }
            j += 1.0;
        }
        let (s, c) = (sum, (Dd::ONE - sum * sum).sqrt());
        match (k as i64).rem_euclid(4) {
            0 => (s, c),
            1 => (c, -s),
            2 => (-s, -c),
            _ => (-c, s),
        }
    }

    /// e^self. Reduced by multiples of ln 2 and then by 2⁸, summed as
    /// e^s − 1 by its Taylor series and squared back as m ↦ 2m + m², which
    /// keeps the small part's relative accuracy (common practice).
    pub fn exp(self) -> Dd {
        if self.hi < -745.0 {
            return Dd::ZERO;
        }
        let k = (self.hi / LN_2[0]).round();
        let mut r = self;
        for part in LN_2 {
            let (p, e) = two_prod(k, part);
            r = r - Dd { hi: p, lo: e };
        }
        let s = r.scale_pow2(-8);
        let (mut m, mut term) = (s, s);
        let mut j = 2.0;
        while term.hi.abs() > 1e-36 {
            term = (term * s).div_f64(j);
            m = m + term;
            j += 1.0;
        }
        for _ in 0..8 {
            m = m.mul_f64(2.0) + m * m;
        }
        (Dd::ONE + m).scale_pow2(k as i32)
    }

    /// The vacuum wavenumber 2π/λ in nm⁻¹.
    pub fn wavenumber(wavelength_nm: f64) -> Dd {
        TWO_PI / Dd::from_f64(wavelength_nm)
    }

    /// sin of an angle given in degrees.
    pub fn sin_deg(angle_deg: f64) -> Dd {
        RADIANS_PER_DEGREE.mul_f64(angle_deg).sin_cos().0
    }
}

impl Neg for Dd {
    type Output = Dd;
    #[inline(always)]
    fn neg(self) -> Dd {
        Dd {
            hi: -self.hi,
            lo: -self.lo,
        }
    }
}

impl Add for Dd {
    type Output = Dd;
    /// The accurate double-word sum.
    #[inline(always)]
    fn add(self, o: Dd) -> Dd {
        let (s, e) = two_sum(self.hi, o.hi);
        let (t, f) = two_sum(self.lo, o.lo);
        let v = fast_two_sum(s, e + t);
        fast_two_sum(v.hi, v.lo + f)
    }
}

impl Sub for Dd {
    type Output = Dd;
    #[inline(always)]
    fn sub(self, o: Dd) -> Dd {
        self + -o
    }
}

impl Mul for Dd {
    type Output = Dd;
    #[inline(always)]
    fn mul(self, o: Dd) -> Dd {
        let (p, e) = two_prod(self.hi, o.hi);
        let e = e + (self.hi * o.lo + self.lo * o.hi);
        fast_two_sum(p, e)
    }
}

impl Div for Dd {
    type Output = Dd;
    /// Long division: two quotient digits and a correction.
    #[inline(always)]
    fn div(self, o: Dd) -> Dd {
        let q1 = self.hi / o.hi;
        let r = self - o.mul_f64(q1);
        let q2 = r.hi / o.hi;
        let r = r - o.mul_f64(q2);
        let q3 = r.hi / o.hi;
        fast_two_sum(q1, q2) + Dd::from_f64(q3)
    }
}

/// A complex number with double-double parts.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Cdd {
    /// Real part.
    pub re: Dd,
    /// Imaginary part.
    pub im: Dd,
}

impl Cdd {
    /// re + i·im.
    #[inline(always)]
    pub const fn new(re: Dd, im: Dd) -> Cdd {
        Cdd { re, im }
    }

    /// A complex double, exactly.
    #[inline(always)]
    pub fn from_c64(z: num_complex::Complex64) -> Cdd {
        Cdd::new(Dd::from_f64(z.re), Dd::from_f64(z.im))
    }

    /// The value rounded to a complex double.
    #[inline(always)]
    pub fn to_c64(self) -> num_complex::Complex64 {
        num_complex::Complex64::new(self.re.to_f64(), self.im.to_f64())
    }

    /// −i·self.
    #[inline(always)]
    pub fn times_minus_i(self) -> Cdd {
        Cdd::new(self.im, -self.re)
    }

    /// self · x for a real double-double x.
    #[inline(always)]
    pub fn scale(self, x: Dd) -> Cdd {
        Cdd::new(self.re * x, self.im * x)
    }

    /// The principal square root, Re ≥ 0, with the imaginary part's sign
    /// following Im self (+0 counts as positive), computed without
    /// cancellation: t = √((|x| + |z|)/2) (common practice).
    pub fn sqrt(self) -> Cdd {
        let (x, y) = (self.re, self.im);
        let modulus = (x * x + y * y).sqrt();
        if modulus.hi == 0.0 {
            return Cdd::default();
        }
        let t = ((x.abs() + modulus).scale_pow2(-1)).sqrt();
        let other = y.abs() / t.scale_pow2(1);
        if x.hi >= 0.0 {
            Cdd::new(t, if y.hi < 0.0 { -other } else { other })
        } else {
            let sign_negative = y.hi < 0.0 || (y.hi == 0.0 && y.hi.is_sign_negative());
            Cdd::new(other, if sign_negative { -t } else { t })
        }
    }
}

impl Add for Cdd {
    type Output = Cdd;
    #[inline(always)]
    fn add(self, o: Cdd) -> Cdd {
        Cdd::new(self.re + o.re, self.im + o.im)
    }
}

impl Sub for Cdd {
    type Output = Cdd;
    #[inline(always)]
    fn sub(self, o: Cdd) -> Cdd {
        Cdd::new(self.re - o.re, self.im - o.im)
    }
}

impl Mul for Cdd {
    type Output = Cdd;
    #[inline(always)]
    fn mul(self, o: Cdd) -> Cdd {
        Cdd::new(
            self.re * o.re - self.im * o.im,
            self.re * o.im + self.im * o.re,
        )
    }
}

impl Div for Cdd {
    type Output = Cdd;
    /// (a + ib)/(c + id) = (a + ib)(c − id)/(c² + d²); double-words keep the
    /// exponent range of doubles, so the plain form is safe for the
    /// admittances and phases it is used on.
    #[inline(always)]
    fn div(self, o: Cdd) -> Cdd {
        let den = o.re * o.re + o.im * o.im;
        let num = self * Cdd::new(o.re, -o.im);
        Cdd::new(num.re / den, num.im / den)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sin_cos_of_huge_and_nan_phases_returns_at_once() {
        for x in [1e15, 1e78, f64::MAX] {
            let (s, c) = Dd::from_f64(x).sin_cos();
            assert_eq!((s.hi, c.hi), x.sin_cos(), "{x}");
        }
        let (s, c) = Dd::from_f64(f64::NAN).sin_cos();
        assert!(s.hi.is_nan() && c.hi.is_nan());
    }

    /// Reference values from mpmath 1.3.0 at 40 digits (`mp.sin(1)` and so
    /// on), split into two doubles: hi = float(v), lo = float(v − hi).
    const SIN_1: Dd = Dd {
        hi: 0.8414709848078965,
        lo: 1.776845092935536e-18,
    };

    fn close(a: Dd, b: Dd, rel: f64) -> bool {
        (a - b).to_f64().abs() <= rel * b.to_f64().abs().max(1e-300)
    }

    #[test]
    fn sine_of_one_matches_a_high_precision_value() {
        let (s, c) = Dd::ONE.sin_cos();
        assert!(close(s, SIN_1, 4e-32), "{s:?}");
        assert!(close(s * s + c * c, Dd::ONE, 4e-32));
    }

    #[test]
    fn trig_identities_hold_to_double_double_precision() {
        for x in [1e-9, 0.3, 0.785, 1.1, 2.9, -4.4, 17.0, 123.456, -9876.5] {
            let (s, c) = Dd::from_f64(x).sin_cos();
            assert!(close(s * s + c * c, Dd::ONE, 4e-32), "x = {x}");
            assert!((s.to_f64() - x.sin()).abs() < 1e-15 && (c.to_f64() - x.cos()).abs() < 1e-15);
            // Double angle: sin 2x = 2 sin x cos x.
            let (s2, _) = Dd::from_f64(x).mul_f64(2.0).sin_cos();
            let scale = if x.abs() > 1.0 { x.abs() } else { 1.0 };
            assert!(
                (s2 - (s * c).mul_f64(2.0)).to_f64().abs() < 1e-30 * scale,
                "x = {x}"
            );
        }
        // sin 30° = 1/2 and sin 90° = 1 from degrees.
        assert!(close(Dd::sin_deg(30.0), Dd::from_f64(0.5), 1e-31));
        assert!(close(Dd::sin_deg(90.0), Dd::ONE, 1e-31));
    }

    #[test]
    fn exponential_identities_hold() {
        for x in [-600.0, -30.5, -1.0, -1e-12, 0.0, 1e-10, 0.5, 3.0] {
            let (a, b) = (Dd::from_f64(x).exp(), Dd::from_f64(-x).exp());
            assert!(close(a * b, Dd::ONE, 1e-30), "x = {x}");
            assert!((a.to_f64() / x.exp() - 1.0).abs() < 1e-15);
        }
        // e^{ln 2} = 2.
        let ln2 = Dd {
            hi: LN_2[0],
            lo: LN_2[1],
        };
        assert!(close(ln2.exp(), Dd::from_f64(2.0), 1e-31));
    }

    #[test]
    fn arithmetic_is_exact_to_double_double() {
        let third = Dd::ONE / Dd::from_f64(3.0);
        assert!(close(third.mul_f64(3.0), Dd::ONE, 1e-32));
        let two = Dd::from_f64(2.0);
        let r = two.sqrt();
        assert!(close(r * r, two, 1e-31));
        let z = Cdd::new(Dd::from_f64(-3.0), Dd::from_f64(0.0));
        let q = z.sqrt();
        assert!(q.re.hi == 0.0 && close(q.im, Dd::from_f64(3.0).sqrt(), 1e-31));
        let w = Cdd::new(Dd::from_f64(2.0), Dd::from_f64(-0.7));
        let back = w.sqrt() * w.sqrt();
        assert!(close(back.re, w.re, 1e-30) && close(back.im, w.im, 1e-30));
        let quotient = (w / z) * z;
        assert!(close(quotient.re, w.re, 1e-30) && close(quotient.im, w.im, 1e-30));
    }
}
