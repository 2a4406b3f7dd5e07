//! Absorption in each layer and the field profile: energy balance, the
//! Airy sum, the standing wave before an interface, continuity, and the
//! volume integral of ε″|E|².

mod common;

use std::f64::consts::PI;

use common::{airy, c, layer, stack};
use lamella::optics::{Behind, Exit, MediumTerms, Node, Probe, Stack};
use num_complex::Complex64;
use proptest::prelude::*;

fn terms(media: &[Complex64], incident: usize, wl: f64, deg: f64) -> (Vec<MediumTerms>, Probe) {
    let at = Probe::new(wl, media[incident].re, deg);
    let t = media
        .iter()
        .map(|&n| MediumTerms::new(n, at.beta()))
        .collect();
    (t, at)
}

fn medium() -> impl Strategy<Value = Complex64> + Clone {
    (1.1f64..3.0, prop_oneof![Just(0.0), 0.0f64..1.5]).prop_map(|(n, k)| c(n, k))
}

/// Random stacks: coherent layers with a repeat group, and optionally a
/// thick layer in the middle and a substrate sheet (medium or black behind).
fn structure() -> impl Strategy<Value = (Vec<Complex64>, Stack)> {
    (
        prop::collection::vec((medium(), 1.0f64..250.0), 1..7),
        1u64..5,
        prop::option::of((1.3f64..1.7, 0.0f64..1e-4, 1e3f64..1e5)),
        prop::collection::vec((medium(), 1.0f64..250.0), 0..3),
        0u8..3,
        1.0f64..2.0,
    )
        .prop_map(|(front, count, thick, back, exit_kind, nx)| {
            let mut media = vec![c(1.0, 0.0)];
            let run = |ls: &[(Complex64, f64)], media: &mut Vec<Complex64>| -> Vec<Node> {
                ls.iter()
                    .map(|&(n, d)| {
                        media.push(n);
                        layer(media.len() - 1, d)
                    })
                    .collect()
            };
            let mut nodes = run(&front, &mut media);
            let tail = nodes.split_off(nodes.len() / 2);
            nodes.push(Node::Repeat { count, nodes: tail });
            if let Some((n, k, d)) = thick {
                media.push(c(n, k));
                nodes.push(Node::Incoherent {
                    medium: media.len() - 1,
                    thickness_nm: d,
                });
            }
            nodes.extend(run(&back, &mut media));
            media.push(c(nx, 0.0));
            let m = media.len() - 1;
            media.push(c(1.5, 2e-5));
            let sheet = media.len() - 1;
            let exit = match exit_kind {
                0 => Exit::Medium(m),
                1 => Exit::Sheet {
                    medium: sheet,
                    thickness_nm: 5e4,
                    behind: Behind::Medium(m),
                },
                _ => Exit::Sheet {
                    medium: sheet,
                    thickness_nm: 5e4,
                    behind: Behind::Black,
                },
            };
            (
                media,
                Stack {
                    incident: 0,
                    nodes,
                    exit,
                },
            )
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// The layers' absorptances (and the black backing's) add up to
    /// 1 − R − T, each is ≥ 0, and a lossless layer absorbs nothing
    /// (its normal flux is the same at both faces).
    #[test]
    fn absorption_adds_up_to_one_minus_r_minus_t((media, s) in structure(), wl in 380.0f64..780.0, deg in 0.0f64..80.0) {
        let (t, at) = terms(&media, 0, wl, deg);
        let x = s.rt(&t, &at);
        let a = s.absorption(&t, &at);
        for (pol, (r, tr)) in [(x.rs, x.ts), (x.rp, x.tp)].into_iter().enumerate() {
            let sum: f64 = a.layers.iter().map(|l| l[pol]).sum::<f64>() + a.backing[pol];
            prop_assert!((sum - (1.0 - r - tr)).abs() < 1e-11, "pol {pol}: Σ {sum} vs {}", 1.0 - r - tr);
            for l in &a.layers {
                prop_assert!(l[pol] >= -1e-12 && l[pol].is_finite(), "{l:?}");
            }
        }
        // Layer numbers follow the written layer nodes: the lossless ones are zero.
        let mut written = Vec::new();
        fn leaves(nodes: &[Node], out: &mut Vec<usize>) {
            for n in nodes {
                match n {
                    Node::Layer { medium, .. } | Node::Incoherent { medium, .. } => out.push(*medium),
                    Node::Repeat { nodes, .. } => leaves(nodes, out),
                }
            }
        }
        leaves(&s.nodes, &mut written);
        for (j, m) in written.iter().enumerate() {
            if media[*m].im == 0.0 {
                prop_assert!(a.layers[j][0].abs() < 1e-13 && a.layers[j][1].abs() < 1e-13, "layer {j}: {:?}", a.layers[j]);
            }
        }
    }
}

/// A single absorbing film on a substrate: its absorptance is the flux
/// that the Airy amplitudes leave in it, 1 − R − T (Born & Wolf,
/// *Principles of Optics*, 7th ed. 1999, §1.6.4 and §13.4).
#[test]
fn a_single_absorbing_film_absorbs_what_the_airy_sum_leaves() {
    for (n1, d) in [
        (c(2.0, 0.3), 80.0),
        (c(0.15, 3.2), 12.0),
        (c(1.7, 0.02), 400.0),
    ] {
        let media = [c(1.0, 0.0), n1, c(1.52, 0.0)];
        let s = stack(0, vec![layer(1, d)], 2);
        for deg in [0.0, 40.0, 75.0] {
            for wl in [420.0, 560.0, 690.0] {
                let (t, at) = terms(&media, 0, wl, deg);
                let a = s.absorption(&t, &at);
                let y = airy(1.0, n1, media[2], d, wl, deg);
                assert!((a.layers[0][0] - (1.0 - y.rs - y.ts)).abs() < 1e-12);
                assert!((a.layers[0][1] - (1.0 - y.rp - y.tp)).abs() < 1e-12);
            }
        }
    }
}

/// Before a single interface the s field is the standing wave
/// |E|² = |1 + r e^{−2ik₀q₀z}|² with the Fresnel r = (q₀ − q₁)/(q₀ + q₁)
/// (Hecht, *Optics*, 5th ed. 2017, §4.6), and beyond it the transmitted
/// |t|² = |1 + r|².
#[test]
fn the_field_before_one_interface_is_the_standing_wave() {
    let media = [c(1.0, 0.0), c(1.0, 0.0), c(2.1, 0.4)];
    let s = stack(0, vec![layer(1, 0.0)], 2);
    let (wl, deg) = (600.0, 35.0);
    let (t, at) = terms(&media, 0, wl, deg);
    let z: Vec<f64> = (0..200).map(|i| -300.0 + 1.5 * i as f64).collect();
    let field = s.field(&t, &at, 0, &z).unwrap();
    let (q0, q1) = (t[0].q, t[2].q);
    let r = (q0 - q1) / (q0 + q1);
    let k0 = 2.0 * PI / wl;
    for p in &field {
        let want = if p.z_nm < 0.0 {
            (1.0 + r * (Complex64::i() * (-2.0 * k0 * q0 * p.z_nm)).exp()).norm_sqr()
        } else {
            (1.0 + r).norm_sqr() * (-2.0 * k0 * q1.im * p.z_nm).exp()
        };
        assert!(
            (p.e2 - want).abs() < 1e-12 * want.max(1.0),
            "{p:?} vs {want}"
        );
    }
}

fn mirror_with_absorber() -> (Vec<Complex64>, Stack) {
    let media = vec![
        c(1.0, 0.0),
        c(2.35, 0.0),
        c(1.46, 0.0),
        c(1.8, 0.25),
        c(1.52, 0.0),
    ];
    let nodes = vec![
        Node::Repeat {
            count: 4,
            nodes: vec![layer(1, 58.0), layer(2, 94.0)],
        },
        layer(3, 40.0),
        layer(1, 70.0),
    ];
    (media, stack(0, nodes, 4))
}

/// The tangential fields are continuous at every interface: for s that is
/// all of E, so |E|² has no jump.
#[test]
fn the_s_field_is_continuous_at_interfaces() {
    let (media, s) = mirror_with_absorber();
    let (t, at) = terms(&media, 0, 530.0, 20.0);
    let thicknesses = [58.0, 94.0, 58.0, 94.0, 58.0, 94.0, 58.0, 94.0, 40.0, 70.0];
    let mut z = 0.0;
    for d in thicknesses {
        z += d;
        let pair = s.field(&t, &at, 0, &[z - 1e-9, z + 1e-9]).unwrap();
        assert!(
            (pair[0].e2 - pair[1].e2).abs() < 1e-7 * pair[0].e2.max(1e-3),
            "at {z} nm: {pair:?}"
        );
        assert_ne!(pair[0].layer, pair[1].layer);
    }
}

/// The power a layer absorbs is k₀∫ε″|E|² dz over the incident flux
/// n₀ cos θ₀ (Poynting's theorem; Born & Wolf §1.1.4), for s and p, so the
/// field profile and the flux differences agree.
#[test]
fn absorbed_power_is_the_integral_of_eps_imag_times_e2() {
    let (media, s) = mirror_with_absorber();
    let start = 4.0 * (58.0 + 94.0);
    for (wl, deg) in [(530.0, 0.0), (610.0, 50.0)] {
        let (t, at) = terms(&media, 0, wl, deg);
        let a = s.absorption(&t, &at);
        for pol in 0..2 {
            // Simpson's rule on 2001 points across the 40 nm absorber.
            let n = 2000;
            let h = 40.0 / n as f64;
            // The last point just inside the back face (E_z jumps there for p).
            let mut z: Vec<f64> = (0..=n).map(|i| start + h * i as f64).collect();
            z[n] -= 1e-9;
            let f = s.field(&t, &at, pol, &z).unwrap();
            assert!(f.iter().all(|p| p.layer == 3), "{:?}", f[0]);
            let sum: f64 = f
                .iter()
                .enumerate()
                .map(|(i, p)| {
                    p.e2 * if i == 0 || i == n {
                        1.0
                    } else if i % 2 == 1 {
                        4.0
                    } else {
                        2.0
                    }
                })
                .sum::<f64>()
                * h
                / 3.0;
            let eps_imag = (media[3] * media[3]).im;
            let k0 = 2.0 * PI / wl;
            let integral = k0 * eps_imag * sum / deg.to_radians().cos();
            assert!(
                (integral - a.layers[2][pol]).abs() < 1e-7,
                "pol {pol}: ∫ {integral} vs {}",
                a.layers[2][pol]
            );
        }
    }
}
