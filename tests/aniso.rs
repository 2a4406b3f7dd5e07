//! The 4×4 path: isotropic layers against the 2×2 engine, a uniaxial slab
//! against closed forms, a retarder between crossed polarizers, chiral
//! nematics against de Vries, energy balance, mirror symmetry and reciprocity
//! of transmission.

mod common;

use std::f64::consts::PI;

use common::{c, layer, rt_at, stack};
use lamella::optics::Probe;
use lamella::optics::aniso::{Jones, Layer4, Stack4, helix};
use nalgebra::Matrix3;
use num_complex::Complex64;
use proptest::prelude::*;

fn iso_tensor(n: Complex64) -> Matrix3<Complex64> {
    Matrix3::from_diagonal_element(n * n)
}

/// ε of a uniaxial medium with optic axis at `polar` from the normal and
/// `azimuth` from the plane of incidence (radians): ε_o I + (ε_e − ε_o) ĉĉᵀ.
fn uniaxial(no: Complex64, ne: Complex64, polar: f64, azimuth: f64) -> Matrix3<Complex64> {
    let axis = [
        polar.sin() * azimuth.cos(),
        polar.sin() * azimuth.sin(),
        polar.cos(),
    ];
    let (eo, ee) = (no * no, ne * ne);
    Matrix3::from_fn(|i, j| {
        let delta = if i == j { 1.0 } else { 0.0 };
        eo * delta + (ee - eo) * axis[i] * axis[j]
    })
}

fn jones(s: &Stack4, n: &[Complex64], tensors: &[Matrix3<Complex64>], wl: f64, deg: f64) -> Jones {
    let at = Probe::new(wl, n[s.incident].re, deg);
    s.jones(n, tensors, &at).unwrap()
}

/// Layers (index, thickness) appended to `media`, written both as
/// isotropic runs and as the same layers given as tensors ε = n²I (tensor
/// m is medium m's).
fn both_ways(
    media: &mut Vec<Complex64>,
    layers: impl Iterator<Item = (Complex64, f64)>,
) -> (Vec<Layer4>, Vec<Layer4>) {
    layers
        .map(|(n, thickness_nm)| {
            media.push(n);
            let m = media.len() - 1;
            (
                Layer4::Isotropic {
                    medium: m,
                    thickness_nm,
                },
                Layer4::Tensor {
                    tensor: m,
                    thickness_nm,
                },
            )
        })
        .unzip()
}

fn medium() -> impl Strategy<Value = Complex64> + Clone {
    (1.0f64..3.0, prop_oneof![Just(0.0), 0.0f64..1.5]).prop_map(|(n, k)| c(n, k))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Isotropic layers given as tensors ε = n²I go through the general
    /// Berreman waves and scattering matrices, and equal the 2×2 engine
    /// (s ↔ column 1, p ↔ column 0) to 1e-12: s, p, oblique, absorbing,
    /// total internal reflection, with a repeat group.
    #[test]
    fn isotropic_layers_through_the_4x4_path_equal_the_2x2_engine(
        n0 in 1.0f64..1.8,
        layers in prop::collection::vec((medium(), 0.0f64..300.0), 1..7),
        exit in 1.0f64..2.5,
        count in 1u64..4,
        wl in 380.0f64..780.0,
        deg in 0.0f64..85.0,
    ) {
        let mut media = vec![c(n0, 0.0)];
        let mut nodes2 = Vec::new();
        let mut nodes4 = Vec::new();
        for &(n, d) in &layers {
            media.push(n);
            nodes2.push(layer(media.len() - 1, d));
            nodes4.push(Layer4::Tensor { tensor: media.len() - 1, thickness_nm: d });
        }
        let tail2 = nodes2.split_off(nodes2.len() / 2);
        let tail4 = nodes4.split_off(nodes4.len() / 2);
        nodes2.push(lamella::optics::Node::Repeat { count, nodes: tail2 });
        nodes4.push(Layer4::Repeat { count, nodes: tail4 });
        media.push(c(exit, 0.0));
        let exit_index = media.len() - 1;
        let tensors: Vec<_> = media.iter().map(|&n| iso_tensor(n)).collect();
        let s4 = Stack4 { incident: 0, nodes: nodes4, exit: exit_index };
        let j = jones(&s4, &media, &tensors, wl, deg);
        let x = rt_at(&stack(0, nodes2, exit_index), &media, wl, deg);
        let [rp, rs, tp, ts] = j.powers();
        for (a, b) in [(rs, x.rs), (rp, x.rp), (ts, x.ts), (tp, x.tp)] {
            prop_assert!((a - b).abs() < 1e-12, "4×4 {:?} vs 2×2 {x:?}", j.powers());
        }
        // No coupling between s and p.
        prop_assert!(j.r[(0, 1)].norm() < 1e-12 && j.r[(1, 0)].norm() < 1e-12);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Runs of isotropic layers (combined as scalars per polarization) give
    /// the same complex Jones matrices as the same layers written as
    /// tensors ε = n²I (general Berreman waves and 2×2-block scattering
    /// matrices), to 1e-12: alone, in repeat groups, and beside a tilted
    /// uniaxial layer that mixes s and p.
    #[test]
    fn isotropic_runs_equal_the_general_4x4_waves(
        n0 in 1.0f64..1.8,
        layers in prop::collection::vec((medium(), 0.0f64..300.0), 1..7),
        exit in 1.0f64..2.5,
        count in 1u64..4,
        crystal in (1.4f64..1.7, 1.4f64..1.8, 0.0f64..1.6, 0.0f64..6.3, 10.0f64..400.0),
        with_crystal in any::<bool>(),
        wl in 380.0f64..780.0,
        deg in 0.0f64..85.0,
    ) {
        let mut media = vec![c(n0, 0.0)];
        let (mut runs, mut general) = both_ways(&mut media, layers.iter().copied());
        let mut tensors: Vec<_> = media.iter().map(|&n| iso_tensor(n)).collect();
        let (no, ne, polar, azimuth, d) = crystal;
        tensors.push(uniaxial(c(no, 0.0), c(ne, 0.0), polar, azimuth));
        let tilted = Layer4::Tensor { tensor: tensors.len() - 1, thickness_nm: d };
        let tail_runs = runs.split_off(runs.len() / 2);
        let tail_general = general.split_off(general.len() / 2);
        if with_crystal {
            runs.push(tilted.clone());
            general.push(tilted);
        }
        runs.push(Layer4::Repeat { count, nodes: tail_runs });
        general.push(Layer4::Repeat { count, nodes: tail_general });
        media.push(c(exit, 0.0));
        let exit_index = media.len() - 1;
        tensors.push(iso_tensor(c(exit, 0.0)));
        let fast = jones(&Stack4 { incident: 0, nodes: runs, exit: exit_index }, &media, &tensors, wl, deg);
        let slow = jones(&Stack4 { incident: 0, nodes: general, exit: exit_index }, &media, &tensors, wl, deg);
        for (a, b) in fast.r.iter().chain(fast.t.iter()).zip(slow.r.iter().chain(slow.t.iter())) {
            prop_assert!((a - b).norm() < 1e-12, "runs {fast:?} vs general {slow:?}");
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Runs of lossless layers with propagating waves go by the product of
    /// their characteristic matrices in real arithmetic; they equal the
    /// same layers as tensors (general Berreman waves and star products) to
    /// 1e-11 in every Jones entry, also in repeat groups of up to 69
    /// periods, beside a tilted uniaxial layer, and when one layer is
    /// evanescent or absorbing (which sends its run back to star products).
    /// The general path's rounding grows with the periods (about 1e-12 at
    /// 32 periods, where the real product equals the 2×2 engine to 1e-15).
    #[test]
    fn lossless_runs_in_real_arithmetic_equal_the_general_4x4_waves(
        layers in prop::collection::vec((1.3f64..2.6, 0.0f64..300.0), 1..9),
        count in 1u64..70,
        crystal in (1.4f64..1.7, 1.4f64..1.8, 0.0f64..1.6, 0.0f64..6.3, 10.0f64..400.0),
        odd in prop_oneof![Just(None), (0usize..8, prop_oneof![Just(c(1.0, 0.0)), Just(c(1.2, 0.4))]).prop_map(Some)],
        wl in 380.0f64..780.0,
        deg in 0.0f64..80.0,
    ) {
        let mut media = vec![c(1.0, 0.0)];
        let given = layers.iter().enumerate().map(|(i, &(n, d))| {
            (match odd { Some((j, m)) if j == i => m, _ => c(n, 0.0) }, d)
        });
        let (mut runs, mut general) = both_ways(&mut media, given);
        let mut tensors: Vec<_> = media.iter().map(|&n| iso_tensor(n)).collect();
        let (no, ne, polar, azimuth, d) = crystal;
        tensors.push(uniaxial(c(no, 0.0), c(ne, 0.0), polar, azimuth));
        let tilted = Layer4::Tensor { tensor: tensors.len() - 1, thickness_nm: d };
        let tail_runs = runs.split_off(runs.len() / 2);
        let tail_general = general.split_off(general.len() / 2);
        runs.push(Layer4::Repeat { count, nodes: tail_runs });
        general.push(Layer4::Repeat { count, nodes: tail_general });
        runs.push(tilted.clone());
        general.push(tilted);
        runs.extend(layers.iter().take(2).enumerate().map(|(i, &(_, d))| Layer4::Isotropic { medium: i + 1, thickness_nm: d }));
        general.extend(layers.iter().take(2).enumerate().map(|(i, &(_, d))| Layer4::Tensor { tensor: i + 1, thickness_nm: d }));
        media.push(c(1.52, 0.0));
        let exit = media.len() - 1;
        tensors.push(iso_tensor(c(1.52, 0.0)));
        let fast = jones(&Stack4 { incident: 0, nodes: runs, exit }, &media, &tensors, wl, deg);
        let slow = jones(&Stack4 { incident: 0, nodes: general, exit }, &media, &tensors, wl, deg);
        for (a, b) in fast.r.iter().chain(fast.t.iter()).zip(slow.r.iter().chain(slow.t.iter())) {
            prop_assert!((a - b).norm() < 1e-11, "runs {fast:?} vs general {slow:?}");
        }
    }
}

/// Deep in the stop band of a quarter-wave mirror, the 4×4 path equals the
/// 2×2 engine: R to 1e-12, T to 1e-9 relative, at normal and oblique
/// incidence; 60 pairs as one repeat (real-arithmetic product, T ≈ 5e-28),
/// 200 (star products) and 60 × 10 nested (the product rescaled past 1e100,
/// T ≈ 1e-270).
#[test]
fn stop_band_runs_equal_the_2x2_engine() {
    use lamella::optics::Node;
    let media = [c(1.0, 0.0), c(2.35, 0.0), c(1.38, 0.0), c(1.52, 0.0)];
    let tensors: Vec<_> = media.iter().map(|&n| iso_tensor(n)).collect();
    let period = [(1, 550.0 / 4.0 / 2.35), (2, 550.0 / 4.0 / 1.38)];
    let pair2: Vec<Node> = period.iter().map(|&(m, d)| layer(m, d)).collect();
    let pair4: Vec<Layer4> = period
        .iter()
        .map(|&(medium, thickness_nm)| Layer4::Isotropic {
            medium,
            thickness_nm,
        })
        .collect();
    let repeat2 = |count, nodes| vec![Node::Repeat { count, nodes }];
    let repeat4 = |count, nodes| vec![Layer4::Repeat { count, nodes }];
    let cases = [
        (
            repeat2(60, pair2.clone()),
            repeat4(60, pair4.clone()),
            1e-25,
        ),
        (
            repeat2(200, pair2.clone()),
            repeat4(200, pair4.clone()),
            1e-80,
        ),
        (
            repeat2(60, repeat2(10, pair2)),
            repeat4(60, repeat4(10, pair4)),
            1e-250,
        ),
    ];
    for (nodes2, nodes4, below) in cases {
        for (wl, deg) in [(550.0, 0.0), (540.0, 30.0), (600.0, 0.0)] {
            let x = rt_at(&stack(0, nodes2.clone(), 3), &media, wl, deg);
            let s = Stack4 {
                incident: 0,
                nodes: nodes4.clone(),
                exit: 3,
            };
            let [rp, rs, tp, ts] = jones(&s, &media, &tensors, wl, deg).powers();
            for (a, b) in [(rs, x.rs), (rp, x.rp)] {
                assert!((a - b).abs() < 1e-12, "{nodes4:?} {wl} {deg}: R {a} vs {b}");
            }
            for (a, b) in [(ts, x.ts), (tp, x.tp)] {
                assert!(
                    (a - b).abs() <= 1e-9 * b.abs(),
                    "{wl} {deg}: T {a:e} vs {b:e}"
                );
            }
            assert!(wl != 550.0 || (x.ts < below && x.ts > 0.0), "{}", x.ts);
        }
    }
}

/// One layer between media with admittances η₀, η₁, η₂ and phase δ: R and
/// T by the single-film sum (Born & Wolf, *Principles of Optics*, 7th ed.
/// 1999, §1.6.4).
fn film(eta: [Complex64; 3], delta: Complex64) -> (f64, f64) {
    let r01 = (eta[0] - eta[1]) / (eta[0] + eta[1]);
    let r12 = (eta[1] - eta[2]) / (eta[1] + eta[2]);
    let t01 = 2.0 * eta[0] / (eta[0] + eta[1]);
    let t12 = 2.0 * eta[1] / (eta[1] + eta[2]);
    let e1 = (Complex64::i() * delta).exp();
    let den = 1.0 + r01 * r12 * e1 * e1;
    let r = (r01 + r12 * e1 * e1) / den;
    let t = t01 * t12 * e1 / den;
    (r.norm_sqr(), (eta[2].re / eta[0].re) * t.norm_sqr())
}

/// A uniaxial slab with its optic axis along the normal: the ordinary wave
/// is s, with q_o = √(n_o² − ξ²) and η = q_o; the extraordinary is p, with
/// q_e = (n_o/n_e)√(n_e² − ξ²) and η = n_o²/q_e (Yeh, "Electromagnetic
/// propagation in birefringent layered media", J. Opt. Soc. Am. 69, 742,
/// 1979); they do not couple.
#[test]
fn uniaxial_slab_with_axis_along_the_normal_decouples_into_closed_forms() {
    let (no, ne) = (c(1.55, 0.0), c(1.72, 0.003));
    let (n0, n2) = (1.0, 1.5);
    let media = [c(n0, 0.0), c(n2, 0.0)];
    let tensors = [uniaxial(no, ne, 0.0, 0.0)];
    let d = 850.0;
    let s4 = Stack4 {
        incident: 0,
        nodes: vec![Layer4::Tensor {
            tensor: 0,
            thickness_nm: d,
        }],
        exit: 1,
    };
    for deg in [0.0f64, 30.0, 65.0] {
        for wl in [420.0, 555.0, 700.0] {
            let xi = n0 * deg.to_radians().sin();
            let k0 = 2.0 * PI / wl;
            let q = |n: f64| Complex64::new(n * n - xi * xi, 0.0).sqrt();
            let qo = (no * no - xi * xi).sqrt();
            let qe = no / ne * (ne * ne - xi * xi).sqrt();
            let (rs, ts) = film([q(n0), qo, q(n2)], k0 * d * qo);
            let (rp, tp) = film(
                [
                    c(n0 * n0, 0.0) / q(n0),
                    no * no / qe,
                    c(n2 * n2, 0.0) / q(n2),
                ],
                k0 * d * qe,
            );
            let j = jones(&s4, &media, &tensors, wl, deg);
            let [p_r, s_r, p_t, s_t] = j.powers();
            for (a, b) in [(s_r, rs), (s_t, ts), (p_r, rp), (p_t, tp)] {
                assert!((a - b).abs() < 1e-12, "{deg}° {wl} nm: {a} vs {b}");
            }
            assert!(j.r[(0, 1)].norm() < 1e-12 && j.t[(1, 0)].norm() < 1e-12);
        }
    }
}

/// A uniaxial plate with its axis in the plane at 45° to the plane of
/// incidence, at normal incidence, between crossed polarizers: its waves
/// polarized along and across the axis each pass as through an isotropic
/// film of n_e and n_o (Fresnel losses at both faces included), so the
/// crossed transmittance is |t_e − t_o|²/4 (Jones calculus: Jones, J. Opt.
/// Soc. Am. 31, 488, 1941).
#[test]
fn plate_at_45_degrees_between_crossed_polarizers_follows_jones_calculus() {
    let (no, ne) = (c(1.50, 0.0), c(1.60, 0.0));
    let media = [c(1.0, 0.0), c(1.0, 0.0)];
    let tensors = [uniaxial(no, ne, PI / 2.0, PI / 4.0)];
    let d = 2750.0;
    let s4 = Stack4 {
        incident: 0,
        nodes: vec![Layer4::Tensor {
            tensor: 0,
            thickness_nm: d,
        }],
        exit: 1,
    };
    for wl in [400.0, 480.0, 550.0, 640.0, 760.0] {
        let k0 = 2.0 * PI / wl;
        let amplitude = |n: Complex64| {
            let (r01, r12) = ((1.0 - n) / (1.0 + n), (n - 1.0) / (n + 1.0));
            let e1 = (Complex64::i() * k0 * d * n).exp();
            (2.0 / (1.0 + n)) * (2.0 * n / (n + 1.0)) * e1 / (1.0 + r01 * r12 * e1 * e1)
        };
        let crossed = (amplitude(ne) - amplitude(no)).norm_sqr() / 4.0;
        let j = jones(&s4, &media, &tensors, wl, 0.0);
        assert!(
            (j.t[(1, 0)].norm_sqr() - crossed).abs() < 1e-12,
            "{wl} nm: {} vs {crossed}",
            j.t[(1, 0)].norm_sqr()
        );
    }
}

/// A left-handed chiral nematic of 40 pitches at normal incidence between
/// media of its mean index: the reflection band is centred at n̄p with
/// width Δn·p (de Vries, Acta Cryst. 4, 219, 1951); inside it left-handed
/// light is reflected almost totally, right-handed light passes; outside
/// it both pass; and the mirror-image (right-handed) film swaps the two.
#[test]
fn chiral_nematic_reflects_its_own_handedness_in_the_de_vries_band() {
    let (no, ne, pitch) = (1.50f64, 1.60f64, 350.0);
    let mean = (no + ne) / 2.0;
    let media = [c(mean, 0.0), c(mean, 0.0)];
    let tensors = [uniaxial(c(no, 0.0), c(ne, 0.0), PI / 2.0, 0.0)];
    let film = |turn: f64| Stack4 {
        incident: 0,
        nodes: vec![Layer4::Helix {
            tensor: 0,
            thickness_nm: 40.0 * pitch,
            pitch_nm: pitch,
            turn,
            start_rad: 0.0,
            steps_per_pitch: 64,
        }],
        exit: 1,
    };
    let (left, right) = (film(-1.0), film(1.0));
    let centre = mean * pitch;
    let l = jones(&left, &media, &tensors, centre, 0.0).circular();
    let [r_l, r_r, _, _] = l.powers();
    assert!(r_l > 0.999, "R_L {r_l}");
    assert!(r_r < 1e-3, "R_R {r_r}");
    let r = jones(&right, &media, &tensors, centre, 0.0).circular();
    let [rr_l, rr_r, _, _] = r.powers();
    assert!((rr_l - r_r).abs() < 1e-12 && (rr_r - r_l).abs() < 1e-12);
    // Reflection keeps the handedness (by the spatial helix of E): R_L is
    // reflected as left-handed light.
    assert!(l.r[(0, 0)].norm_sqr() > 0.999);
    // The band edges: R_L is above ½ a quarter of the band width inside n_o p
    // and n_e p, and the band's flat top spans them.
    let width = (ne - no) * pitch;
    let r_left = |wl: f64| jones(&left, &media, &tensors, wl, 0.0).circular().powers()[0];
    for (edge, inward) in [(no * pitch, 1.0), (ne * pitch, -1.0)] {
        assert!(r_left(edge + inward * 0.25 * width) > 0.99, "{edge}");
        assert!(r_left(edge - inward * 0.25 * width) < 0.5, "{edge}");
    }
    for far in [centre - 2.0 * width, centre + 2.0 * width] {
        assert!(r_left(far) < 0.1, "R_L {} at {far} nm", r_left(far));
    }
}

/// The band moves to shorter wavelengths at oblique incidence (common
/// practice: the Bragg condition λ = n̄ p cos θ inside).
#[test]
fn chiral_band_moves_to_shorter_wavelengths_with_angle() {
    let (no, ne, pitch) = (1.50f64, 1.60f64, 350.0);
    let mean = (no + ne) / 2.0;
    let media = [c(1.0, 0.0), c(mean, 0.0)];
    let tensors = [uniaxial(c(no, 0.0), c(ne, 0.0), PI / 2.0, 0.0)];
    let film = Stack4 {
        incident: 0,
        nodes: vec![Layer4::Helix {
            tensor: 0,
            thickness_nm: 30.0 * pitch,
            pitch_nm: pitch,
            turn: -1.0,
            start_rad: 0.0,
            steps_per_pitch: 64,
        }],
        exit: 1,
    };
    // The band's centre: the middle of the wavelengths reflecting more than
    // 0.9 of one circular polarization (R_s + R_p > 0.9).
    let peak = |deg: f64| {
        let band: Vec<f64> = (0..600)
            .map(|i| 420.0 + 0.5 * i as f64)
            .filter(|&wl| {
                let p = jones(&film, &media, &tensors, wl, deg).powers();
                p[0] + p[1] > 0.9
            })
            .collect();
        0.5 * (band[0] + band[band.len() - 1])
    };
    let (p0, p40) = (peak(0.0), peak(40.0));
    let inside = (40f64.to_radians().sin() / mean).asin();
    assert!(p40 < p0 - 10.0, "{p0} → {p40}");
    assert!(
        (p40 / p0 - inside.cos()).abs() < 0.01,
        "{p40}/{p0} vs cos θ {}",
        inside.cos()
    );
}

/// The helix transfer through a pitch: at normal incidence it is exact in
/// the turning frame, and the sliced integration meets it as the angle
/// vanishes; at oblique incidence the sliced integration converges at
/// sixth order (the Richardson-extrapolated fourth-order Magnus steps), to
/// 1e-10 with 128 steps per pitch.
#[test]
fn sliced_helix_converges_to_the_exact_solution() {
    let eps = uniaxial(c(1.5, 0.0), c(1.65, 0.0), PI / 2.0, 0.3);
    let k0 = 2.0 * PI / 520.0;
    let t =
        |xi: f64, steps: usize| helix::transfer(&eps, 0.3, -1.0, 350.0, 0.0, 350.0, xi, k0, steps);
    let gap = |a: nalgebra::Matrix4<Complex64>, b: nalgebra::Matrix4<Complex64>| {
        (a - b).iter().fold(0.0f64, |m, z| m.max(z.norm()))
    };
    assert!(gap(t(1e-7, 64), t(0.0, 0)) < 1e-10);
    for xi in [0.5, 0.95] {
        let reference = t(xi, 8192);
        let (e32, e64, e128) = (
            gap(t(xi, 32), reference),
            gap(t(xi, 64), reference),
            gap(t(xi, 128), reference),
        );
        assert!(
            e32 / e64 > 40.0 && e64 / e128 > 40.0,
            "ξ {xi}: {e32} → {e64} → {e128}"
        );
        assert!(e128 < 1e-9, "ξ {xi}: {e128}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(60))]

    /// Random anisotropic stacks (tilted uniaxial and helix layers with
    /// isotropic ones): energy balance R + T ≤ 1 for each incident
    /// polarization, = 1 when nothing absorbs, and the mirror image of the
    /// structure (y → −y: azimuths and helix senses reversed) swaps R_L and R_R.
    #[test]
    fn anisotropic_stacks_conserve_energy_and_mirror_swaps_handedness(
        layers in prop::collection::vec((1.3f64..1.8, 0.0f64..0.15, 0.0f64..PI, -PI..PI, 20.0f64..400.0, 0u8..3), 1..4),
        k in prop_oneof![Just(0.0), 0.0f64..0.05],
        wl in 400.0f64..750.0,
        deg in 0.0f64..60.0,
    ) {
        let media = vec![c(1.0, 0.0), c(1.45, 0.0), c(1.52, 0.0)];
        let mut tensors = Vec::new();
        let mut mirrored_tensors = Vec::new();
        let (mut nodes, mut mirrored) = (Vec::new(), Vec::new());
        for &(no, dn, polar, azimuth, d, kind) in &layers {
            let (no, ne) = (c(no, k), c(no + dn, k));
            match kind {
                0 => {
                    tensors.push(uniaxial(no, ne, polar, azimuth));
                    mirrored_tensors.push(uniaxial(no, ne, polar, -azimuth));
                    nodes.push(Layer4::Tensor { tensor: tensors.len() - 1, thickness_nm: d });
                    mirrored.push(Layer4::Tensor { tensor: tensors.len() - 1, thickness_nm: d });
                }
                1 => {
                    tensors.push(uniaxial(no, ne, PI / 2.0, 0.0));
                    mirrored_tensors.push(uniaxial(no, ne, PI / 2.0, 0.0));
                    let helix = |turn: f64, start: f64| Layer4::Helix { tensor: tensors.len() - 1, thickness_nm: 3.3 * d, pitch_nm: d, turn, start_rad: start, steps_per_pitch: 128 };
                    nodes.push(helix(1.0, azimuth));
                    mirrored.push(helix(-1.0, -azimuth));
                }
                _ => {
                    nodes.push(Layer4::Isotropic { medium: 1, thickness_nm: d });
                    mirrored.push(Layer4::Isotropic { medium: 1, thickness_nm: d });
                }
            }
        }
        let s = Stack4 { incident: 0, nodes, exit: 2 };
        let m = Stack4 { incident: 0, nodes: mirrored, exit: 2 };
        let j = jones(&s, &media, &tensors, wl, deg);
        for (r, t) in [(j.powers()[0], j.powers()[2]), (j.powers()[1], j.powers()[3])] {
            let a = 1.0 - r - t;
            if k == 0.0 { prop_assert!(a.abs() < 1e-9, "A = {a}"); } else { prop_assert!(a > -1e-9, "A = {a}"); }
        }
        let (c1, c2) = (j.circular().powers(), jones(&m, &media, &mirrored_tensors, wl, deg).circular().powers());
        prop_assert!((c1[0] - c2[1]).abs() < 1e-9 && (c1[1] - c2[0]).abs() < 1e-9, "{c1:?} vs mirrored {c2:?}");
    }
}

/// The slicing criterion picks more steps for more demanding points, and
/// the steps it picks meet its own 1e-11 criterion.
#[test]
fn slicing_criterion_meets_its_tolerance() {
    let eps = uniaxial(c(1.5, 0.0), c(1.65, 0.0), PI / 2.0, 0.0);
    let (k0_red, k0_blue) = (2.0 * PI / 700.0, 2.0 * PI / 380.0);
    let easy = helix::steps_for(&eps, 350.0, 0.3, k0_red);
    let hard = helix::steps_for(&eps, 350.0, 0.99, k0_blue);
    assert!(
        hard >= easy && hard <= helix::MAX_STEPS_PER_PITCH,
        "{easy} {hard}"
    );
    assert_eq!(helix::steps_for(&eps, 350.0, 0.0, k0_blue), 1);
    let t = |steps| helix::transfer(&eps, 0.0, 1.0, 350.0, 0.0, 350.0, 0.99, k0_blue, steps);
    let gap = (t(2 * hard) - t(hard))
        .iter()
        .fold(0.0f64, |m, z| m.max(z.norm()));
    assert!(gap < 1e-11, "{hard} steps: {gap}");
}

/// ε rotated by half a turn about the y axis, (x, y, z) → (−x, y, −z):
/// the same structure seen from its back face.
fn turned(eps: &Matrix3<Complex64>) -> Matrix3<Complex64> {
    let r = Matrix3::from_diagonal(&nalgebra::Vector3::new(-1.0, 1.0, -1.0)).map(|x| c(x, 0.0));
    r * eps * r
}

/// ε of a biaxial medium with principal indices `n` whose axes are turned
/// by the z-x-z Euler angles `euler` (radians) from the stack frame.
fn biaxial(n: [Complex64; 3], euler: [f64; 3]) -> Matrix3<Complex64> {
    let rz = |a: f64| Matrix3::new(a.cos(), -a.sin(), 0.0, a.sin(), a.cos(), 0.0, 0.0, 0.0, 1.0);
    let rx = |a: f64| Matrix3::new(1.0, 0.0, 0.0, 0.0, a.cos(), -a.sin(), 0.0, a.sin(), a.cos());
    let q = (rz(euler[0]) * rx(euler[1]) * rz(euler[2])).map(|x| c(x, 0.0));
    let d = Matrix3::from_diagonal(&nalgebra::Vector3::new(
        n[0] * n[0],
        n[1] * n[1],
        n[2] * n[2],
    ));
    q * d * q.transpose()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(60))]

    /// Reciprocity of transmission (Lorentz reciprocity for a symmetric ε;
    /// Landau & Lifshitz, *Electrodynamics of Continuous Media*, 2nd ed.
    /// 1984, §89): light sent back along the transmitted wave, from the exit
    /// medium, through the same structure turned half a turn about y, has
    /// the transposed power-transmission matrix, |t′_{ab}|² = |t_{ba}|² in
    /// the (p, s) basis, with absorption, tilted biaxial layers, helices of
    /// any thickness and a repeat group. The reversed stack is built from
    /// the forward one: layers in reverse order, each tensor turned, a
    /// helix's start azimuth −(φ₀ + turn·2π·d/p), its sense unchanged.
    #[test]
    fn transmission_is_reciprocal(
        layers in prop::collection::vec((
            [1.3f64..1.8, 1.3f64..1.8, 1.3f64..1.8],
            [0.0f64..6.3, 0.0f64..3.2, 0.0f64..6.3],
            20.0f64..400.0,
            0u8..3,
        ), 1..5),
        k in prop_oneof![Just(0.0), 0.0f64..0.05],
        count in 1u64..4,
        wl in 400.0f64..750.0,
        deg in 0.0f64..70.0,
    ) {
        let media = vec![c(1.0, 0.0), c(1.45, k), c(1.52, 0.0)];
        let (mut tensors, mut nodes, mut back) = (Vec::new(), Vec::new(), Vec::new());
        for &(n, euler, d, kind) in &layers {
            let eps = biaxial(n.map(|x| c(x, k)), euler);
            tensors.push(eps);
            tensors.push(turned(&eps));
            let (t, tb) = (tensors.len() - 2, tensors.len() - 1);
            match kind {
                0 => {
                    nodes.push(Layer4::Tensor { tensor: t, thickness_nm: d });
                    back.push(Layer4::Tensor { tensor: tb, thickness_nm: d });
                }
                1 => {
                    let (pitch, thickness, turn, start) = (d, 2.3 * d, if euler[0] < PI { 1.0 } else { -1.0 }, euler[2]);
                    let helix = |tensor, start_rad| Layer4::Helix { tensor, thickness_nm: thickness, pitch_nm: pitch, turn, start_rad, steps_per_pitch: 128 };
                    nodes.push(helix(t, start));
                    back.push(helix(tb, -(start + turn * 2.0 * PI * thickness / pitch)));
                }
                _ => {
                    nodes.push(Layer4::Isotropic { medium: 1, thickness_nm: d });
                    back.push(Layer4::Isotropic { medium: 1, thickness_nm: d });
                }
            }
        }
        back.reverse();
        let forward = Stack4 { incident: 0, nodes: vec![Layer4::Repeat { count, nodes }], exit: 2 };
        let reverse = Stack4 { incident: 2, nodes: vec![Layer4::Repeat { count, nodes: back }], exit: 0 };
        let j = jones(&forward, &media, &tensors, wl, deg);
        let inside = (media[0].re * deg.to_radians().sin() / media[2].re).asin().to_degrees();
        let jb = jones(&reverse, &media, &tensors, wl, inside);
        for a in 0..2 {
            for b in 0..2 {
                let (there, back) = (j.t[(a, b)].norm_sqr(), jb.t[(b, a)].norm_sqr());
                prop_assert!((there - back).abs() < 1e-9, "|t_{a}{b}|² = {there} but back {back}: {j:?} vs {jb:?}");
            }
        }
    }
}
