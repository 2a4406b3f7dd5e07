//! Per-medium terms at one wavelength and one angle of incidence: the normal
//! component of the wave vector and the tilted optical admittances.

use num_complex::Complex64;

use super::double_double::Dd;

/// The point at which a stack is evaluated: the vacuum wavenumber
/// k₀ = 2π/λ and Snell's invariant β = n₀ sin θ₀, both held to
/// double-double precision so that long repeat groups can be powered
/// without amplifying the rounding of their inputs
/// ([`crate::optics`] uses the doubles nearest to them everywhere else).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Probe {
    k0: Dd,
    sine: Dd,
    incident_n: f64,
}

impl Probe {
    /// The point at `wavelength_nm` for light arriving from a medium of
    /// (real) index `incident_n` at `angle_deg` from the normal.
    pub fn new(wavelength_nm: f64, incident_n: f64, angle_deg: f64) -> Probe {
        Probe::of(
            Probe::wavenumber(wavelength_nm),
            incident_n,
            Probe::sine(angle_deg),
        )
    }

    /// [`Probe::new`] from parts computed once: the wavenumber of one
    /// wavelength ([`Probe::wavenumber`]) and sin θ₀ of one angle
    /// ([`Probe::sine`]), for callers that visit a grid.
    #[inline]
    pub fn of(k0: Wavenumber, incident_n: f64, sine: Sine) -> Probe {
        Probe {
            k0: k0.0,
            sine: sine.0,
            incident_n,
        }
    }

    /// k₀ = 2π/λ of a wavelength in nm, to double-double precision.
    pub fn wavenumber(wavelength_nm: f64) -> Wavenumber {
        Wavenumber(Dd::wavenumber(wavelength_nm))
    }

    /// sin θ₀ of an angle in degrees, to double-double precision.
    pub fn sine(angle_deg: f64) -> Sine {
        Sine(Dd::sin_deg(angle_deg))
    }

    /// k₀ = 2π/λ in nm⁻¹.
    #[inline(always)]
    pub fn k0(&self) -> f64 {
        self.k0.hi
    }

    /// β = n₀ sin θ₀.
    #[inline(always)]
    pub fn beta(&self) -> f64 {
        self.sine.hi * self.incident_n
    }

    pub(super) fn k0_dd(&self) -> Dd {
        self.k0
    }

    pub(super) fn beta_dd(&self) -> Dd {
        self.sine.mul_f64(self.incident_n)
    }
}

/// sin θ₀ to double-double precision (from [`Probe::sine`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sine(Dd);

/// k₀ = 2π/λ to double-double precision (from [`Probe::wavenumber`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Wavenumber(Dd);

/// The terms every layer of one medium shares at a given (λ, angle).
#[derive(Debug, Clone, Copy)]
pub struct MediumTerms {
    /// The medium's complex index n + ik.
    pub n: Complex64,
    /// q = n·cos θ = √(n² − β²), on the branch with Im q ≥ 0 (decay away from
    /// the incident side) and Re q ≥ 0 when Im q = 0.
    pub q: Complex64,
    /// Tilted admittance for s: η_s = q (units of the free-space admittance).
    pub eta_s: Complex64,
    /// Tilted admittance for p: η_p = n²/q.
    pub eta_p: Complex64,
    /// 1/η_s, so layers multiply instead of divide.
    pub inv_eta_s: Complex64,
    /// 1/η_p.
    pub inv_eta_p: Complex64,
    /// True when n and q are real: the layer is lossless and the wave
    /// propagates, so the cheap real path applies.
    pub real: bool,
}

impl MediumTerms {
    /// Terms for index `n` at invariant β = n₀ sin θ₀ (complex Snell's law).
    ///
    /// Source: Macleod, *Thin-Film Optical Filters* (4th ed., 2010), §2.4–2.6
    /// (tilted admittances η_s = y n cos θ, η_p = y n / cos θ); branch of
    /// n cos θ for absorbing and evanescent media: Born & Wolf, *Principles of
    /// Optics* (7th ed., 1999), §1.5.4 and §13.2.
    #[inline(always)]
    pub fn new(n: Complex64, beta: f64) -> Self {
        let n2 = n.re * n.re;
        if n.im == 0.0 && n2 > beta * beta {
            let q = (n2 - beta * beta).sqrt();
            // One division serves all three quotients: 1/q, n²/q and q/n².
            let inv = 1.0 / (q * n2);
            let re = |x: f64| Complex64::new(x, 0.0);
            return MediumTerms {
                n,
                q: re(q),
                eta_s: re(q),
                eta_p: re(n2 * n2 * inv),
                inv_eta_s: re(n2 * inv),
                inv_eta_p: re(q * q * inv),
                real: true,
            };
        }
        Self::lossy_or_evanescent(n, beta)
    }

    /// [`MediumTerms::new`] where n is complex or the wave is evanescent.
    fn lossy_or_evanescent(n: Complex64, beta: f64) -> Self {
        let n2 = n * n;
        let arg = n2 - beta * beta;
        // Force +0 on the imaginary part so a lossless evanescent wave gets +i·|q|.
        let arg = Complex64::new(arg.re, if arg.im == 0.0 { 0.0 } else { arg.im });
        let mut q = arg.sqrt();
        if q.im < 0.0 || (q.im == 0.0 && q.re < 0.0) {
            q = -q;
        }
        if q == Complex64::ZERO {
            // Exactly at a lossless medium's critical angle q = 0 would make
            // η_p and 1/η_s infinite. Take the limit from the evanescent side,
            // one rounding step of n² − β² away: an exit medium then reflects
            // everything, the value R tends to at the critical angle.
            q = Complex64::new(0.0, (n2.re * f64::EPSILON).sqrt());
        }
        let real = n.im == 0.0 && q.im == 0.0;
        let eta_p = n2 / q;
        MediumTerms {
            n,
            q,
            eta_s: q,
            eta_p,
            inv_eta_s: 1.0 / q,
            inv_eta_p: 1.0 / eta_p,
            real,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn branch_decays_in_absorbing_and_evanescent_media() {
        let absorbing = MediumTerms::new(Complex64::new(2.0, 0.3), 0.9);
        assert!(absorbing.q.im > 0.0 && absorbing.q.re > 0.0);
        let evanescent = MediumTerms::new(Complex64::new(1.0, 0.0), 1.2);
        assert!(evanescent.q.re.abs() < 1e-15 && evanescent.q.im > 0.0 && !evanescent.real);
        let metal = MediumTerms::new(Complex64::new(0.05, 3.5), 0.5);
        assert!(metal.q.im > 0.0);
        let clear = MediumTerms::new(Complex64::new(1.5, 0.0), 0.5);
        assert!(clear.real && (clear.q.re - (2.25f64 - 0.25).sqrt()).abs() < 1e-15);
    }
}
