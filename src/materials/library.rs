//! The built-in material library. Each entry names its source; values
//! recalled without a document at hand are marked "from memory". Full
//! citations are collected in `reference_data/materials/SOURCES.md`.

use super::{Dispersion, Material, Oscillator};

fn entry(name: &str, dispersion: Dispersion, valid_nm: (f64, f64), source: &str) -> Material {
    Material {
        name: name.to_string(),
        dispersion,
        valid_nm,
        source: source.to_string(),
    }
}

/// Transparent Sellmeier model n² = A + Σ B λ²/(λ² − C), pairs (B, C in µm²).
fn sellmeier(a: f64, terms: &[(f64, f64)]) -> Dispersion {
    Dispersion::Sellmeier {
        a,
        terms: terms.to_vec(),
        k: 0.0,
    }
}

/// The pole form n² = A₀ + Σ D/(λ² − C) (λ, √C in µm), rewritten exactly as a
/// Sellmeier model: D/(λ² − C) = (D/C)·λ²/(λ² − C) − D/C.
fn pole_form(a0: f64, poles: &[(f64, f64)]) -> Dispersion {
    let terms: Vec<(f64, f64)> = poles.iter().map(|&(d, c)| (d / c, c)).collect();
    let a = a0 - terms.iter().map(|(b, _)| b).sum::<f64>();
    sellmeier(a, &terms)
}

/// Transparent Cauchy model n = A + B/λ² + C/λ⁴ (λ in µm).
fn cauchy(a: f64, b: f64, c: f64) -> Dispersion {
    Dispersion::Cauchy { a, b, c, k: 0.0 }
}

/// Lorentz–Drude model with ε∞ = 1 from the parameters as tabulated by
/// Rakić, Djurišić, Elazar & Majewski (Applied Optics 37, 5271, 1998):
/// plasma energy ħω_p, Drude f₀ and Γ₀, and per oscillator
/// (f_j, Γ_j, ω_j), all energies in eV.
fn rakic(plasma_ev: f64, f0: f64, gamma0_ev: f64, oscillators: &[(f64, f64, f64)]) -> Dispersion {
    Dispersion::DrudeLorentz {
        eps_inf: 1.0,
        plasma_ev,
        drude_strength: f0,
        drude_damping_ev: gamma0_ev,
        oscillators: oscillators
            .iter()
            .map(|&(strength, damping_ev, energy_ev)| Oscillator {
                strength,
                energy_ev,
                damping_ev,
            })
            .collect(),
    }
}

const RAKIC: &str = "Rakić, Djurišić, Elazar & Majewski, Optical properties of metallic films, Appl. Opt. 37, 5271 (1998), Lorentz–Drude fit";
/// 0.1–5 eV, the span of the Lorentz–Drude fits (from memory).
const RAKIC_NM: (f64, f64) = (248.0, 12400.0);
const SULTANOVA: &str = "Sultanova, Kasarova & Nikolov, Dispersion properties of optical polymers, Acta Phys. Pol. A 116, 585 (2009)";
const SULTANOVA_NM: (f64, f64) = (436.0, 1052.0);
const LEERTOUWER: &str = "Leertouwer, Wilts & Stavenga, Opt. Express 19, 24061 (2011)";
/// Visible and near-infrared span used for the entries recalled from memory.
const TYPICAL_NM: (f64, f64) = (380.0, 1000.0);

/// All built-in materials, in listing order.
pub fn all() -> Vec<Material> {
    vec![
        // Ambient media.
        entry(
            "air",
            Dispersion::Constant { n: 1.0, k: 0.0 },
            (200.0, 2500.0),
            "n = 1 exactly, by definition of this library",
        ),
        entry(
            "water",
            sellmeier(
                1.0,
                &[
                    (5.684_027_565e-1, 5.101_829_712e-3),
                    (1.726_177_391e-1, 1.821_153_936e-2),
                    (2.086_189_578e-2, 2.620_722_293e-2),
                    (1.130_748_688e-1, 1.069_792_721e1),
                ],
            ),
            (182.0, 1129.0),
            "Daimon & Masumura, Refractive index of distilled water, Appl. Opt. 46, 3811 (2007), 20 °C fit",
        ),
        // Glasses and crystals.
        entry(
            "fused_silica",
            sellmeier(
                1.0,
                &[
                    (0.696_166_3, 0.068_404_3f64.powi(2)),
                    (0.407_942_6, 0.116_241_4f64.powi(2)),
                    (0.897_479_4, 9.896_161f64.powi(2)),
                ],
            ),
            (210.0, 3710.0),
            "Malitson, Interspecimen comparison of the refractive index of fused silica, JOSA 55, 1205 (1965)",
        ),
        entry(
            "glass",
            sellmeier(
                1.0,
                &[
                    (1.039_612_12, 6.000_698_67e-3),
                    (0.231_792_344, 2.001_791_44e-2),
                    (1.010_469_45, 103.560_653),
                ],
            ),
            (300.0, 2500.0),
            "BK7-type crown glass: SCHOTT optical glass data sheet N-BK7, Sellmeier coefficients",
        ),
        entry(
            "mgf2",
            sellmeier(
                1.0,
                &[
                    (0.487_551_08, 0.043_384_08f64.powi(2)),
                    (0.398_750_31, 0.094_614_42f64.powi(2)),
                    (2.312_035_3, 23.793_604f64.powi(2)),
                ],
            ),
            (200.0, 7000.0),
            "Dodge, Refractive properties of magnesium fluoride, Appl. Opt. 23, 1980 (1984), ordinary ray",
        ),
        entry(
            "al2o3",
            sellmeier(
                1.0,
                &[
                    (1.431_349_3, 0.072_663_1f64.powi(2)),
                    (0.650_547_13, 0.119_324_2f64.powi(2)),
                    (5.341_402_1, 18.028_251f64.powi(2)),
                ],
            ),
            (200.0, 5000.0),
            "Malitson, Refraction and dispersion of synthetic sapphire, JOSA 52, 1377 (1962), ordinary ray",
        ),
        entry(
            "tio2",
            Dispersion::Cauchy {
                a: 2.26,
                b: 0.0425,
                c: 0.0,
                k: 0.0,
            },
            TYPICAL_NM,
            "typical evaporated rutile-like TiO2 film, n(550 nm) ≈ 2.40, below bulk rutile (from memory)",
        ),
        entry(
            "rutile",
            pole_form(5.913, &[(0.2441, 0.0803)]),
            (430.0, 1530.0),
            "DeVore, Refractive indices of rutile and sphalerite, JOSA 41, 416 (1951), rutile ordinary ray",
        ),
        entry(
            "zns",
            pole_form(
                8.393,
                &[(0.143_83, 0.2421f64.powi(2)), (4430.99, 36.71f64.powi(2))],
            ),
            (405.0, 13000.0),
            "Debenham, Refractive indices of zinc sulfide in the 0.405–13 µm range, Appl. Opt. 23, 2238 (1984)",
        ),
        entry(
            "mica",
            Dispersion::Constant { n: 1.60, k: 0.0 },
            TYPICAL_NM,
            "muscovite, in-plane (β, γ) index ≈ 1.60 as listed in mineralogy handbooks (from memory)",
        ),
        // Deposited oxide films.
        entry(
            "sio2_film",
            cauchy(1.450, 0.0036, 0.0),
            TYPICAL_NM,
            "typical evaporated SiO2 film, n(550 nm) ≈ 1.46 (from memory)",
        ),
        entry(
            "zro2",
            cauchy(1.980, 0.020, 0.0),
            TYPICAL_NM,
            "typical evaporated ZrO2 film, n(550 nm) ≈ 2.05 (from memory)",
        ),
        entry(
            "ta2o5",
            cauchy(2.040, 0.020, 0.0010),
            TYPICAL_NM,
            "typical sputtered or ion-assisted Ta2O5 film, n(550 nm) ≈ 2.12 (from memory)",
        ),
        entry(
            "nb2o5",
            cauchy(2.180, 0.030, 0.0020),
            TYPICAL_NM,
            "typical sputtered Nb2O5 film, n(550 nm) ≈ 2.30 (from memory)",
        ),
        // Polymers.
        entry(
            "pet",
            cauchy(1.620, 0.0105, 0.0),
            TYPICAL_NM,
            "biaxially oriented PET film, in-plane n(589 nm) ≈ 1.65; amorphous PET ≈ 1.575 (from memory)",
        ),
        entry(
            "pmma",
            sellmeier(1.0, &[(1.1819, 0.011_313)]),
            SULTANOVA_NM,
            SULTANOVA,
        ),
        entry(
            "polystyrene",
            sellmeier(1.0, &[(1.4435, 0.020_216)]),
            SULTANOVA_NM,
            SULTANOVA,
        ),
        entry(
            "polycarbonate",
            sellmeier(1.0, &[(1.4182, 0.021_304)]),
            SULTANOVA_NM,
            SULTANOVA,
        ),
        // Biological materials.
        entry(
            "chitin",
            cauchy(1.517, 8.80e-3, 0.0),
            (400.0, 700.0),
            LEERTOUWER,
        ),
        entry(
            "keratin",
            cauchy(1.532, 5.89e-3, 0.0),
            (400.0, 700.0),
            LEERTOUWER,
        ),
        entry(
            "guanine",
            Dispersion::Constant { n: 1.83, k: 0.0 },
            TYPICAL_NM,
            "anhydrous guanine crystal plates, n ≈ 1.83: Land, The physics and biology of animal reflectors, Prog. Biophys. 24, 75 (1972) (from memory)",
        ),
        entry(
            "cytoplasm",
            Dispersion::Constant { n: 1.33, k: 0.0 },
            TYPICAL_NM,
            "cytoplasm spacer between guanine plates, n ≈ 1.33 as used by Land, Prog. Biophys. 24, 75 (1972) (from memory)",
        ),
        entry(
            "melanin",
            Dispersion::CauchyExpK {
                a: 1.648,
                b: 2.37e-2,
                c: 0.0,
                k0: 0.56,
                k_decay_um: 0.270,
            },
            (400.0, 700.0),
            "Stavenga, Leertouwer, Osorio & Wilts, High refractive index of melanin, Light Sci. Appl. 4, e243 (2015); parameters from memory",
        ),
        // Metals.
        entry(
            "silver",
            rakic(
                9.01,
                0.845,
                0.048,
                &[
                    (0.065, 3.886, 0.816),
                    (0.124, 0.452, 4.481),
                    (0.011, 0.065, 8.185),
                    (0.840, 0.916, 9.083),
                    (5.646, 2.419, 20.29),
                ],
            ),
            RAKIC_NM,
            RAKIC,
        ),
        entry(
            "aluminium",
            rakic(
                14.98,
                0.523,
                0.047,
                &[
                    (0.227, 0.333, 0.162),
                    (0.050, 0.312, 1.544),
                    (0.166, 1.351, 1.808),
                    (0.030, 3.382, 3.473),
                ],
            ),
            RAKIC_NM,
            RAKIC,
        ),
        entry(
            "gold",
            rakic(
                9.03,
                0.760,
                0.053,
                &[
                    (0.024, 0.241, 0.415),
                    (0.010, 0.345, 0.830),
                    (0.071, 0.870, 2.969),
                    (0.601, 2.494, 4.304),
                    (4.384, 2.214, 13.32),
                ],
            ),
            RAKIC_NM,
            RAKIC,
        ),
        entry(
            "chromium",
            rakic(
                10.75,
                0.168,
                0.047,
                &[
                    (0.151, 3.175, 0.121),
                    (0.150, 1.305, 0.543),
                    (1.149, 2.676, 1.970),
                    (0.825, 1.335, 8.775),
                ],
            ),
            RAKIC_NM,
            RAKIC,
        ),
    ]
}

/// Other spellings accepted by [`find`], with the entry they stand for.
pub const ALIASES: &[(&str, &str)] = &[
    ("sio2", "sio2_film"),
    ("bk7", "glass"),
    ("aluminum", "aluminium"),
];

/// Looks up a built-in material by name or alias (case-insensitive).
pub fn find(name: &str) -> Option<Material> {
    let name = ALIASES
        .iter()
        .find(|(alias, _)| alias.eq_ignore_ascii_case(name))
        .map_or(name, |(_, target)| target);
    all()
        .into_iter()
        .find(|m| m.name.eq_ignore_ascii_case(name))
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;

    fn nk(name: &str, wl_nm: f64) -> Complex64 {
        find(name).unwrap().dispersion.index(wl_nm).unwrap()
    }

    fn assert_near(name: &str, wl_nm: f64, want: f64, tol: f64) {
        let n = nk(name, wl_nm).re;
        assert!(
            (n - want).abs() <= tol,
            "{name} n({wl_nm} nm) = {n:.5}, expected {want} ± {tol}"
        );
    }

    #[test]
    fn every_entry_is_physical_across_its_range() {
        for m in all() {
            m.dispersion.validate().unwrap();
            let (lo, hi) = m.valid_nm;
            assert!(0.0 < lo && lo < hi, "{}: range {lo}–{hi}", m.name);
            for i in 0..=200 {
                let wl = lo * (hi / lo).powf(i as f64 / 200.0);
                let n = m.dispersion.index(wl).unwrap();
                assert!(
                    n.re.is_finite() && n.im.is_finite() && n.re > 0.0 && n.im >= 0.0,
                    "{} at {wl} nm: {n}",
                    m.name
                );
            }
        }
    }

    #[test]
    fn names_are_unique_keys_and_sources_are_single_lines() {
        let all = all();
        for (i, m) in all.iter().enumerate() {
            assert!(
                m.name
                    .chars()
                    .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_'),
                "{}",
                m.name
            );
            assert!(
                all[..i].iter().all(|o| o.name != m.name),
                "duplicate {}",
                m.name
            );
            let s = m.source.trim();
            assert!(!s.is_empty() && !s.contains('\n'), "{}: {s:?}", m.name);
            assert!(s.chars().count() <= 160, "{}: source too long", m.name);
        }
        for (alias, target) in ALIASES {
            assert!(
                all.iter().all(|m| m.name != *alias),
                "alias {alias} shadows"
            );
            assert_eq!(find(alias).unwrap().name, *target);
        }
    }

    #[test]
    fn scene_keys_resolve() {
        for key in [
            "air",
            "water",
            "fused_silica",
            "mgf2",
            "sio2_film",
            "tio2",
            "al2o3",
            "zro2",
            "ta2o5",
            "nb2o5",
            "zns",
            "pet",
            "pmma",
            "polystyrene",
            "polycarbonate",
            "mica",
            "chitin",
            "keratin",
            "guanine",
            "cytoplasm",
            "melanin",
            "silver",
            "aluminium",
            "gold",
            "chromium",
            "glass",
            "SiO2",
            "Gold",
        ] {
            assert!(find(key).is_some(), "{key}");
        }
        assert!(find("unobtainium").is_none());
    }

    #[test]
    fn glasses_and_crystals_match_their_sources() {
        // Malitson 1965: n = 1.4585 at the helium d line (587.6 nm).
        assert_near("fused_silica", 587.6, 1.4585, 1e-4);
        // Water at 20 °C and 589.3 nm: n = 1.3330 (IAPWS release on the
        // refractive index of ordinary water, 1997; from memory). The
        // Daimon & Masumura 2007 fit agrees to within 5e-4.
        assert_near("water", 589.3, 1.3330, 5e-4);
        // N-BK7 data sheet: n_d = 1.5168 at 587.56 nm.
        assert_near("glass", 587.56, 1.5168, 1e-4);
        // Dodge 1984: ordinary index of MgF2 at 587.6 nm is 1.378.
        assert_near("mgf2", 587.6, 1.378, 1e-3);
        // Malitson 1962: ordinary index of sapphire at 587.6 nm is 1.768.
        assert_near("al2o3", 587.6, 1.768, 1e-3);
        // Rutile ordinary ray n = 2.613 at 589 nm (DeVore 1951).
        assert_near("rutile", 589.0, 2.613, 3e-3);
        // Cubic ZnS n = 2.368 at 589 nm (Debenham 1984).
        assert_near("zns", 589.0, 2.368, 3e-3);
    }

    #[test]
    fn polymers_match_common_sodium_d_indices() {
        // n_D of PMMA 1.491, polystyrene 1.590, polycarbonate 1.585
        // (common practice; the Sultanova et al. 2009 fits reproduce them).
        assert_near("pmma", 589.3, 1.491, 3e-3);
        assert_near("polystyrene", 589.3, 1.590, 3e-3);
        assert_near("polycarbonate", 589.3, 1.585, 3e-3);
    }

    #[test]
    fn chitin_and_keratin_match_measured_points() {
        // Leertouwer, Wilts & Stavenga 2011, abstract: chitin (insect scale)
        // 1.572, 1.552, 1.541 and keratin (goose barbules) 1.569, 1.556, 1.548
        // at 400, 500 and 600 nm.
        for (wl, chitin, keratin) in [
            (400.0, 1.572, 1.569),
            (500.0, 1.552, 1.556),
            (600.0, 1.541, 1.548),
        ] {
            assert_near("chitin", wl, chitin, 2e-3);
            assert_near("keratin", wl, keratin, 2e-3);
        }
    }

    #[test]
    fn melanin_is_high_index_and_absorbs_more_in_the_blue() {
        // Stavenga et al. 2015, abstract: melanin n is 1.7–1.8 in the visible
        // (two decimals, so 1.695–1.805).
        let mut last_k = f64::INFINITY;
        for wl in [400.0, 450.0, 500.0, 550.0, 600.0, 650.0, 700.0] {
            let n = nk("melanin", wl);
            assert!((1.695..=1.805).contains(&n.re), "n({wl}) = {}", n.re);
            assert!(n.im > 0.0 && n.im < last_k, "k({wl}) = {}", n.im);
            last_k = n.im;
        }
    }

    #[test]
    fn metals_at_550_nm() {
        // Silver: the Rakić et al. 1998 Lorentz–Drude fit gives n ≈ 0.13,
        // k ≈ 3.17 at 550 nm. Johnson & Christy (Phys. Rev. B 6, 4370, 1972)
        // measured n = 0.06, k = 3.59 at 2.26 eV (549 nm; from memory): the
        // fit stays within 0.1 in n and 0.5 in k of that film.
        let ag = nk("silver", 550.0);
        assert!(
            (0.10..=0.16).contains(&ag.re) && (3.0..=3.4).contains(&ag.im),
            "{ag}"
        );
        assert!(
            (ag.re - 0.06).abs() < 0.1 && (ag.im - 3.59).abs() < 0.5,
            "{ag}"
        );
        // Aluminium: n ≈ 0.96, k ≈ 6.69 at 550 nm (Rakić, Appl. Opt. 34, 4755,
        // 1995; from memory).
        let al = nk("aluminium", 550.0);
        assert!(
            (0.8..=1.2).contains(&al.re) && (6.2..=7.0).contains(&al.im),
            "{al}"
        );
        // Chromium: published films at 550 nm span n ≈ 2.8–3.2, k ≈ 3.3–4.4
        // (Johnson & Christy, Phys. Rev. B 9, 5056, 1974, and others; from
        // memory); the fit must fall in that band.
        let cr = nk("chromium", 550.0);
        assert!(
            (2.7..=3.3).contains(&cr.re) && (3.3..=4.5).contains(&cr.im),
            "{cr}"
        );
    }

    #[test]
    fn gold_absorbs_interband_in_the_blue() {
        // Interband transitions (Rakić et al. 1998, Au oscillators at 2.97 and
        // 4.30 eV) give gold a low k and high n in the blue, hence its colour.
        let (blue, red) = (nk("gold", 450.0), nk("gold", 650.0));
        assert!(
            blue.im < red.im,
            "k(450) = {}, k(650) = {}",
            blue.im,
            red.im
        );
        assert!(blue.re > red.re && blue.re > 1.0, "{blue} {red}");
    }
}
