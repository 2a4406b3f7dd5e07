//! Optical constants: dispersion models, effective-medium mixing and the
//! built-in library. Every model answers one question: the complex refractive
//! index `n + i·k` (k ≥ 0 for absorption) at a vacuum wavelength in nm.

mod effective;
pub mod library;
mod table;

pub use effective::{bruggeman, maxwell_garnett};
pub use table::NkTable;

use num_complex::Complex64;

use crate::error::{Error, Result};

/// hc in eV·nm, for converting wavelength to photon energy (CODATA 2018).
pub const HC_EV_NM: f64 = 1_239.841_984;

/// One Lorentz oscillator of a [`Dispersion::DrudeLorentz`] model.
#[derive(Debug, Clone, PartialEq)]
pub struct Oscillator {
    /// Oscillator strength f_j (dimensionless).
    pub strength: f64,
    /// Resonance energy ω_j in eV.
    pub energy_ev: f64,
    /// Damping Γ_j in eV.
    pub damping_ev: f64,
}

/// How a material's index depends on wavelength.
#[derive(Debug, Clone, PartialEq)]
pub enum Dispersion {
    /// The same `n + i·k` at every wavelength.
    Constant {
        /// Real part.
        n: f64,
        /// Extinction coefficient.
        k: f64,
    },
    /// Cauchy's formula n = A + B/λ² + C/λ⁴ with λ in µm, constant k
    /// (Cauchy 1836; as used in Born & Wolf, *Principles of Optics*, §2.3.4).
    Cauchy {
        /// A (dimensionless).
        a: f64,
        /// B in µm².
        b: f64,
        /// C in µm⁴.
        c: f64,
        /// Extinction coefficient.
        k: f64,
    },
    /// Cauchy's n with an extinction coefficient that decays exponentially
    /// with wavelength: n = A + B/λ² + C/λ⁴, k = k₀·exp(−λ/λ_k), λ in µm
    /// (the form fitted to melanin by Stavenga, Leertouwer, Osorio & Wilts,
    /// "High refractive index of melanin in shiny occipital feathers of a
    /// bird of paradise", Light: Science & Applications 4, e243, 2015).
    CauchyExpK {
        /// A (dimensionless).
        a: f64,
        /// B in µm².
        b: f64,
        /// C in µm⁴.
        c: f64,
        /// Extinction coefficient k₀ extrapolated to λ = 0.
        k0: f64,
        /// Decay length λ_k of k in µm (> 0).
        k_decay_um: f64,
    },
    /// Sellmeier's formula n² = A + Σ B_i λ² / (λ² − C_i) with λ in µm and
    /// C_i in µm² (Sellmeier 1871; Malitson 1965 for the form with A = 1).
    Sellmeier {
        /// Constant term A (1 for the classic form).
        a: f64,
        /// Pairs (B_i, C_i).
        terms: Vec<(f64, f64)>,
        /// Extinction coefficient.
        k: f64,
    },
    /// Linear interpolation in a table of measured n, k.
    Table(NkTable),
    /// Drude term plus Lorentz oscillators (Rakić, Djurišić, Elazar & Majewski,
    /// "Optical properties of metallic films for vertical-cavity optoelectronic
    /// devices", Applied Optics 37, 5271, 1998, eq. 1–3):
    /// ε(ω) = ε∞ − f₀ω_p² / (ω² + iΓ₀ω) + Σ f_j ω_p² / (ω_j² − ω² − iΓ_j ω).
    DrudeLorentz {
        /// High-frequency permittivity ε∞ (1 in Rakić et al.).
        eps_inf: f64,
        /// Plasma energy ħω_p in eV.
        plasma_ev: f64,
        /// Drude strength f₀.
        drude_strength: f64,
        /// Drude damping Γ₀ in eV.
        drude_damping_ev: f64,
        /// Interband oscillators.
        oscillators: Vec<Oscillator>,
    },
    /// Effective medium of two materials mixed at a volume fraction.
    Mixture {
        /// Which mixing rule.
        rule: MixingRule,
        /// The host (matrix) material.
        host: Box<Dispersion>,
        /// The inclusion material.
        guest: Box<Dispersion>,
        /// Volume fraction of the guest, 0–1.
        fraction: f64,
    },
}

/// Effective-medium rules for [`Dispersion::Mixture`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MixingRule {
    /// Symmetric rule of Bruggeman (1935).
    Bruggeman,
    /// Inclusions in a host, Maxwell Garnett (1904).
    MaxwellGarnett,
}

impl Dispersion {
    /// Complex index `n + i·k` at vacuum wavelength `wl_nm`. Tables return an
    /// error outside their data; models are evaluated anywhere.
    pub fn index(&self, wl_nm: f64) -> Result<Complex64> {
        let um = wl_nm * 1e-3;
        Ok(match self {
            Dispersion::Constant { n, k } => Complex64::new(*n, *k),
            Dispersion::Cauchy { a, b, c, k } => {
                let l2 = um * um;
                Complex64::new(a + b / l2 + c / (l2 * l2), *k)
            }
            Dispersion::CauchyExpK {
                a,
                b,
                c,
                k0,
                k_decay_um,
            } => {
                let l2 = um * um;
                Complex64::new(a + b / l2 + c / (l2 * l2), k0 * (-um / k_decay_um).exp())
            }
            Dispersion::Sellmeier { a, terms, k } => {
                let l2 = um * um;
                let n2 = a + terms.iter().map(|(b, c)| b * l2 / (l2 - c)).sum::<f64>();
                Complex64::new(n2.max(0.0).sqrt(), *k)
            }
            Dispersion::Table(t) => t.index(wl_nm)?,
            Dispersion::DrudeLorentz {
                eps_inf,
                plasma_ev,
                drude_strength,
                drude_damping_ev,
                oscillators,
            } => {
                let w = Complex64::new(HC_EV_NM / wl_nm, 0.0);
                let i = Complex64::i();
                let wp2 = plasma_ev * plasma_ev;
                let mut eps = Complex64::new(*eps_inf, 0.0)
                    - drude_strength * wp2 / (w * w + i * drude_damping_ev * w);
                for o in oscillators {
                    eps += o.strength * wp2
                        / (o.energy_ev * o.energy_ev - w * w - i * o.damping_ev * w);
                }
                index_from_permittivity(eps)
            }
            Dispersion::Mixture {
                rule,
                host,
                guest,
                fraction,
            } => {
                let eh = host.index(wl_nm)?.powi(2);
                let eg = guest.index(wl_nm)?.powi(2);
                let eps = match rule {
                    MixingRule::Bruggeman => bruggeman(eh, eg, *fraction),
                    MixingRule::MaxwellGarnett => maxwell_garnett(eh, eg, *fraction),
                };
                index_from_permittivity(eps)
            }
        })
    }

    /// Short name of the model, for listings.
    pub fn model_name(&self) -> &'static str {
        match self {
            Dispersion::Constant { .. } => "constant",
            Dispersion::Cauchy { .. } => "cauchy",
            Dispersion::CauchyExpK { .. } => "cauchy-exp-k",
            Dispersion::Sellmeier { .. } => "sellmeier",
            Dispersion::Table(_) => "table",
            Dispersion::DrudeLorentz { .. } => "drude-lorentz",
            Dispersion::Mixture {
                rule: MixingRule::Bruggeman,
                ..
            } => "bruggeman",
            Dispersion::Mixture {
                rule: MixingRule::MaxwellGarnett,
                ..
            } => "maxwell-garnett",
        }
    }

    /// The wavelengths (nm) where the model holds data: a table's span, or
    /// the intersection of a mixture's parts; `None` for analytic models.
    pub fn table_span(&self) -> Option<(f64, f64)> {
        match self {
            Dispersion::Table(t) => Some(t.span()),
            Dispersion::Mixture { host, guest, .. } => {
                match (host.table_span(), guest.table_span()) {
                    (Some(a), Some(b)) => Some((a.0.max(b.0), a.1.min(b.1))),
                    (a, b) => a.or(b),
                }
            }
            _ => None,
        }
    }

    /// Checks the parameters a user may have typed: finite, k ≥ 0, fraction in 0–1.
    pub fn validate(&self) -> Result<()> {
        let finite = |key: &str, v: f64| {
            if v.is_finite() {
                Ok(())
            } else {
                Err(Error::invalid(key, v, "must be a finite number"))
            }
        };
        let nonneg_k = |k: f64| {
            finite("k", k)?;
            if k < 0.0 {
                Err(Error::invalid(
                    "k",
                    k,
                    "must be ≥ 0 (gain media are not modelled)",
                ))
            } else {
                Ok(())
            }
        };
        match self {
            Dispersion::Constant { n, k } => {
                finite("n", *n)?;
                if *n <= 0.0 {
                    return Err(Error::invalid("n", n, "must be greater than zero"));
                }
                nonneg_k(*k)
            }
            Dispersion::Cauchy { a, b, c, k } => {
                finite("cauchy.a", *a)?;
                finite("cauchy.b", *b)?;
                finite("cauchy.c", *c)?;
                nonneg_k(*k)
            }
            Dispersion::CauchyExpK {
                a,
                b,
                c,
                k0,
                k_decay_um,
            } => {
                finite("cauchy.a", *a)?;
                finite("cauchy.b", *b)?;
                finite("cauchy.c", *c)?;
                finite("k0", *k0)?;
                if *k0 < 0.0 {
                    return Err(Error::invalid(
                        "k0",
                        k0,
                        "must be ≥ 0 (gain media are not modelled)",
                    ));
                }
                finite("k_decay_um", *k_decay_um)?;
                if *k_decay_um <= 0.0 {
                    return Err(Error::invalid(
                        "k_decay_um",
                        k_decay_um,
                        "must be greater than zero",
                    ));
                }
                Ok(())
            }
            Dispersion::Sellmeier { a, terms, k } => {
                finite("sellmeier.a", *a)?;
                for (b, c) in terms {
                    finite("sellmeier.b", *b)?;
                    finite("sellmeier.c", *c)?;
                }
                nonneg_k(*k)
            }
            Dispersion::Table(_) => Ok(()),
            Dispersion::DrudeLorentz {
                eps_inf,
                plasma_ev,
                drude_strength,
                drude_damping_ev,
                oscillators,
            } => {
                for v in [eps_inf, plasma_ev, drude_strength, drude_damping_ev] {
                    finite("drude_lorentz", *v)?;
                }
                for o in oscillators {
                    for v in [o.strength, o.energy_ev, o.damping_ev] {
                        finite("drude_lorentz.oscillators", v)?;
                    }
                }
                Ok(())
            }
            Dispersion::Mixture {
                host,
                guest,
                fraction,
                ..
            } => {
                if !(0.0..=1.0).contains(fraction) {
                    return Err(Error::invalid(
                        "fraction",
                        fraction,
                        "must lie between 0 and 1",
                    ));
                }
                host.validate().map_err(|e| e.within("host"))?;
                guest.validate().map_err(|e| e.within("guest"))
            }
        }
    }
}

/// n + i·k = √ε on the branch with k ≥ 0.
pub fn index_from_permittivity(eps: Complex64) -> Complex64 {
    // A rounding-sized negative Im ε (a lossless mixture computed from
    // complex parts) is zero, not gain.
    let eps = if eps.im < 0.0 && eps.im.abs() <= 1e-12 * eps.norm() {
        Complex64::new(eps.re, 0.0)
    } else {
        eps
    };
    let n = eps.sqrt();
    if n.im < 0.0 { -n } else { n }
}

/// A named material with its dispersion and where its numbers come from.
#[derive(Debug, Clone, PartialEq)]
pub struct Material {
    /// Key used in scene files.
    pub name: String,
    /// The index model.
    pub dispersion: Dispersion,
    /// Wavelength range (nm) where the source vouches for the model.
    pub valid_nm: (f64, f64),
    /// Paper, handbook, "from memory" or "user".
    pub source: String,
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn constant_and_cauchy_evaluate() {
        let c = Dispersion::Cauchy {
            a: 1.5,
            b: 0.01,
            c: 0.0,
            k: 0.0,
        };
        let n = c.index(500.0).unwrap();
        assert!((n.re - (1.5 + 0.01 / 0.25)).abs() < 1e-12);
        assert_eq!(
            Dispersion::Constant { n: 2.0, k: 0.1 }.index(1.0).unwrap(),
            Complex64::new(2.0, 0.1)
        );
    }

    #[test]
    fn drude_metal_absorbs() {
        // Pure Drude metal below the plasma frequency: ε < 0, so k > n.
        let d = Dispersion::DrudeLorentz {
            eps_inf: 1.0,
            plasma_ev: 9.0,
            drude_strength: 1.0,
            drude_damping_ev: 0.05,
            oscillators: vec![],
        };
        let n = d.index(550.0).unwrap();
        assert!(n.im > 0.0 && n.im > n.re, "{n}");
    }

    #[test]
    fn rounding_sized_loss_does_not_flip_the_branch() {
        // Regression: a metal host mixed to fraction 1 of air left Im ε ≈ −1e-17
        // and gave n = −1.
        let n = index_from_permittivity(Complex64::new(1.0, -1.6e-17));
        assert!((n.re - 1.0).abs() < 1e-15 && n.im >= 0.0, "{n}");
        let silver = library::find("silver").unwrap().dispersion;
        let mix = Dispersion::Mixture {
            rule: MixingRule::MaxwellGarnett,
            host: Box::new(silver),
            guest: Box::new(Dispersion::Constant { n: 1.0, k: 0.0 }),
            fraction: 1.0,
        };
        let n = mix.index(550.0).unwrap();
        assert!(n.re > 0.99 && n.im >= 0.0, "{n}");
    }

    #[test]
    fn negative_k_is_refused() {
        assert!(Dispersion::Constant { n: 1.5, k: -0.1 }.validate().is_err());
    }

    #[test]
    fn cauchy_exp_k_evaluates_and_validates() {
        let m = Dispersion::CauchyExpK {
            a: 1.6,
            b: 0.02,
            c: 0.0,
            k0: 0.5,
            k_decay_um: 0.25,
        };
        let n = m.index(500.0).unwrap();
        assert!((n.re - (1.6 + 0.02 / 0.25)).abs() < 1e-12);
        assert!((n.im - 0.5 * (-2.0f64).exp()).abs() < 1e-12);
        assert!(m.validate().is_ok());
        let zero_decay = Dispersion::CauchyExpK {
            a: 1.6,
            b: 0.0,
            c: 0.0,
            k0: 0.5,
            k_decay_um: 0.0,
        };
        assert!(zero_decay.validate().is_err());
        let negative_k0 = Dispersion::CauchyExpK {
            a: 1.6,
            b: 0.0,
            c: 0.0,
            k0: -0.1,
            k_decay_um: 0.3,
        };
        assert!(negative_k0.validate().is_err());
    }
}
