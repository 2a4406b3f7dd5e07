//! Effective-medium mixing rules for two-phase layers (porous films, blends).
//! Both take and return relative permittivities ε = (n + i·k)².

use num_complex::Complex64;

/// Maxwell Garnett rule for spherical inclusions of permittivity `eps_guest`
/// at volume fraction `f` in a host `eps_host` (Maxwell Garnett, Phil. Trans.
/// R. Soc. A 203, 385, 1904; in the form of Niklasson, Granqvist & Hunderi,
/// "Effective medium models for the optical properties of inhomogeneous
/// materials", Applied Optics 20, 26, 1981, eq. 2):
/// ε = ε_h (ε_g + 2ε_h + 2f(ε_g − ε_h)) / (ε_g + 2ε_h − f(ε_g − ε_h)).
pub fn maxwell_garnett(eps_host: Complex64, eps_guest: Complex64, f: f64) -> Complex64 {
    let d = eps_guest - eps_host;
    eps_host * (eps_guest + 2.0 * eps_host + 2.0 * f * d) / (eps_guest + 2.0 * eps_host - f * d)
}

/// Bruggeman's symmetric rule for spheres (Bruggeman, Ann. Phys. 416, 636,
/// 1935; Niklasson et al. 1981, eq. 3): f(ε_g − ε)/(ε_g + 2ε) +
/// (1 − f)(ε_h − ε)/(ε_h + 2ε) = 0, i.e. 2ε² − bε − ε_h ε_g = 0 with
/// b = (3f − 1)ε_g + (2 − 3f)ε_h. Of the two roots, the physical one has
/// Im ε ≥ 0 and, for lossless phases, Re ε > 0.
pub fn bruggeman(eps_host: Complex64, eps_guest: Complex64, f: f64) -> Complex64 {
    let b = (3.0 * f - 1.0) * eps_guest + (2.0 - 3.0 * f) * eps_host;
    let root = (b * b + 8.0 * eps_host * eps_guest).sqrt();
    let (e1, e2) = ((b + root) / 4.0, (b - root) / 4.0);
    // Rank by imaginary part first (with a tolerance for lossless phases),
    // then by real part.
    let score = |e: Complex64| (e.im >= -1e-12 * e.norm(), e.re);
    if score(e1) >= score(e2) { e1 } else { e2 }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64) -> Complex64 {
        Complex64::new(re, 0.0)
    }

    #[test]
    fn limits_give_the_pure_phases() {
        for rule in [bruggeman, maxwell_garnett] {
            assert!((rule(c(2.25), c(4.0), 0.0) - c(2.25)).norm() < 1e-12);
            assert!((rule(c(2.25), c(4.0), 1.0) - c(4.0)).norm() < 1e-12);
        }
    }

    #[test]
    fn bruggeman_satisfies_its_equation_for_absorbing_guest() {
        let (eh, eg, f) = (c(2.1), Complex64::new(-10.0, 1.5), 0.3);
        let e = bruggeman(eh, eg, f);
        let res = f * (eg - e) / (eg + 2.0 * e) + (1.0 - f) * (eh - e) / (eh + 2.0 * e);
        assert!(res.norm() < 1e-12 && e.im >= 0.0, "{e} {res}");
    }

    #[test]
    fn maxwell_garnett_dilute_limit() {
        // To first order in f: ε ≈ ε_h + 3f ε_h (ε_g − ε_h)/(ε_g + 2ε_h).
        let (eh, eg, f) = (c(2.0), c(6.0), 1e-6);
        let lin = eh + 3.0 * f * eh * (eg - eh) / (eg + 2.0 * eh);
        assert!((maxwell_garnett(eh, eg, f) - lin).norm() < 1e-10);
    }
}
