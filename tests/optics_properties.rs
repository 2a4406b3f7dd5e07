//! Properties every stack must have (energy balance, reciprocity, stability),
//! and the fast paths against the plain layer-by-layer oracle.

mod common;

use common::{airy, c, layer, naive_rt, rt_at, stack};
use lamella::optics::{Behind, Exit, Node, Rt, Stack};
use num_complex::Complex64;
use proptest::prelude::*;

fn medium() -> impl Strategy<Value = Complex64> + Clone {
    (1.0f64..3.0, prop_oneof![Just(0.0), 0.0f64..2.0]).prop_map(|(n, k)| c(n, k))
}

/// Media list [incident, layers…, exit] and a stack through them.
fn random_stack(
    layer_media: impl Strategy<Value = Complex64> + Clone,
) -> impl Strategy<Value = (Vec<Complex64>, Stack)> {
    (
        1.0f64..1.8,
        prop::collection::vec((layer_media.clone(), 0.0f64..400.0), 0..12),
        layer_media,
    )
        .prop_map(|(n0, layers, exit)| {
            let mut media = vec![c(n0, 0.0)];
            let nodes = layers
                .iter()
                .map(|&(n, d)| {
                    media.push(n);
                    layer(media.len() - 1, d)
                })
                .collect();
            media.push(exit);
            let exit_index = media.len() - 1;
            (media, stack(0, nodes, exit_index))
        })
}

fn finite_unit(x: &Rt) -> bool {
    [x.rs, x.rp, x.ts, x.tp]
        .iter()
        .all(|v| v.is_finite() && (-1e-12..=1.0 + 1e-12).contains(v))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    /// Energy balance: A = 1 − R − T ≥ 0, with equality for lossless stacks
    /// (Born & Wolf 1999, §1.5.3 and §13.4).
    #[test]
    fn energy_is_conserved_or_absorbed((media, s) in random_stack(medium()), wl in 380.0f64..780.0, deg in 0.0f64..89.9) {
        let x = rt_at(&s, &media, wl, deg);
        prop_assert!(finite_unit(&x), "{x:?}");
        let lossy = media.iter().any(|n| n.im > 0.0);
        for (r, t) in [(x.rs, x.ts), (x.rp, x.tp)] {
            let a = 1.0 - r - t;
            if lossy { prop_assert!(a >= -1e-10, "A = {a}"); } else { prop_assert!(a.abs() < 1e-10, "A = {a}"); }
        }
    }

    /// Reciprocity: T is the same in both directions through any stack between
    /// lossless media, absorbing layers included (Potton, "Reciprocity in
    /// optics", Rep. Prog. Phys. 67, 717, 2004).
    #[test]
    fn transmittance_is_reciprocal((mut media, s) in random_stack(medium()), wl in 380.0f64..780.0, deg in 0.0f64..80.0, n_exit in 1.0f64..2.5) {
        let last = media.len() - 1;
        media[last] = c(n_exit, 0.0);
        let n0 = media[0].re;
        let sin_exit = n0 * deg.to_radians().sin() / n_exit;
        prop_assume!(sin_exit < 0.999);
        let forward = rt_at(&s, &media, wl, deg);
        let mut reversed = s.clone();
        reversed.nodes.reverse();
        reversed.incident = last;
        reversed.exit = Exit::Medium(0);
        let backward = rt_at(&reversed, &media, wl, sin_exit.asin().to_degrees());
        prop_assert!((forward.ts - backward.ts).abs() < 1e-9 && (forward.tp - backward.tp).abs() < 1e-9, "{forward:?} {backward:?}");
    }

    /// Repeat groups (binary powering) equal the same layers written out.
    #[test]
    fn repeat_powering_equals_the_expanded_stack(period in prop::collection::vec((medium(), 1.0f64..300.0), 1..4), count in 1u64..40, wl in 380.0f64..780.0, deg in 0.0f64..85.0) {
        let mut media = vec![c(1.0, 0.0)];
        let nodes: Vec<Node> = period.iter().map(|&(n, d)| { media.push(n); layer(media.len() - 1, d) }).collect();
        media.push(c(1.52, 0.0));
        let exit = media.len() - 1;
        let powered = stack(0, vec![Node::Repeat { count, nodes: nodes.clone() }], exit);
        let expanded = stack(0, (0..count).flat_map(|_| nodes.clone()).collect(), exit);
        let (a, b) = (rt_at(&powered, &media, wl, deg), rt_at(&expanded, &media, wl, deg));
        for (x, y) in [(a.rs, b.rs), (a.rp, b.rp), (a.ts, b.ts), (a.tp, b.tp)] {
            prop_assert!((x - y).abs() < 1e-9, "{a:?} vs {b:?}");
        }
    }
}

/// Nested repeat groups equal their expansion.
#[test]
fn nested_repeats_equal_their_expansion() {
    let media = [c(1.0, 0.0), c(2.3, 0.01), c(1.45, 0.0), c(1.6, 0.0)];
    let inner = vec![layer(1, 60.0), layer(2, 90.0)];
    let nested = stack(
        0,
        vec![Node::Repeat {
            count: 3,
            nodes: vec![
                Node::Repeat {
                    count: 4,
                    nodes: inner.clone(),
                },
                layer(3, 40.0),
            ],
        }],
        3,
    );
    let flat_nodes: Vec<Node> = (0..3)
        .flat_map(|_| (0..4).flat_map(|_| inner.clone()).chain([layer(3, 40.0)]))
        .collect();
    let flat = stack(0, flat_nodes, 3);
    for wl in [400.0, 550.0, 700.0] {
        let (a, b) = (
            rt_at(&nested, &media, wl, 35.0),
            rt_at(&flat, &media, wl, 35.0),
        );
        assert!((a.r() - b.r()).abs() < 1e-12 && (a.t() - b.t()).abs() < 1e-12);
    }
}

/// No NaN or overflow for extreme inputs: a 10⁶ nm layer with k = 5,
/// grazing 89.99°, 10⁴ written-out layers and a 10⁴-period repeat group.
#[test]
fn extreme_inputs_stay_finite() {
    let media = [
        c(1.0, 0.0),
        c(2.0, 5.0),
        c(2.35, 0.0),
        c(1.46, 0.0),
        c(1.52, 0.0),
    ];
    let thick = stack(0, vec![layer(1, 1e6)], 4);
    let many: Vec<Node> = (0..10_000)
        .map(|i| layer(2 + i % 2, 50.0 + (i % 7) as f64 * 13.0))
        .collect();
    let long = stack(0, many, 4);
    let powered = stack(
        0,
        vec![Node::Repeat {
            count: 10_000,
            nodes: vec![layer(2, 58.5), layer(3, 94.2)],
        }],
        4,
    );
    let metal_period = stack(
        0,
        vec![Node::Repeat {
            count: 10_000,
            nodes: vec![layer(1, 20.0), layer(3, 90.0)],
        }],
        4,
    );
    for s in [&thick, &long, &powered, &metal_period] {
        for deg in [0.0, 45.0, 89.99] {
            for wl in [380.0, 550.0, 780.0] {
                let x = rt_at(s, &media, wl, deg);
                assert!(finite_unit(&x), "{x:?} at {deg}° {wl} nm");
            }
        }
    }
    // The same through the grid driver, which takes lossless layers four
    // wavelengths at a time.
    let index: Vec<Vec<Complex64>> = media.iter().map(|&n| vec![n; 5]).collect();
    for s in [&thick, &long, &powered, &metal_period] {
        let grid = lamella::optics::compute(
            std::slice::from_ref(s),
            &index,
            &[380.0, 450.0, 550.0, 650.0, 780.0],
            &[0.0, 45.0, 89.99],
        );
        assert!(grid.rt.iter().all(finite_unit), "{:?}", grid.rt);
    }
    // Deep in the stop band of 10⁴ periods nothing gets through.
    let x = rt_at(&powered, &media, 550.0, 0.0);
    assert!(x.t() < 1e-300 && (x.r() - 1.0).abs() < 1e-12);
}

/// A lossless slab treated incoherently: R = 2R₁/(1 + R₁), T = (1 − R₁)/(1 + R₁);
/// with absorption α per pass T = (1 − R₁)²α/(1 − R₁²α²) (Harbecke, Appl. Phys.
/// B 39, 165, 1986, eq. 10 with one interface on each side).
#[test]
fn incoherent_slab_in_air() {
    let r1: f64 = ((1.5 - 1.0) / 2.5f64).powi(2);
    let sheet = |behind: Behind| Stack {
        incident: 0,
        nodes: vec![],
        exit: Exit::Sheet {
            medium: 1,
            thickness_nm: 50_000.0,
            behind,
        },
    };
    let x = rt_at(
        &sheet(Behind::Medium(0)),
        &[c(1.0, 0.0), c(1.5, 0.0)],
        550.0,
        0.0,
    );
    assert!(
        (x.r() - 2.0 * r1 / (1.0 + r1)).abs() < 1e-15
            && (x.t() - (1.0 - r1) / (1.0 + r1)).abs() < 1e-15
    );
    let k = 1e-6;
    let alpha = (-4.0 * std::f64::consts::PI * k * 50_000.0 / 550.0).exp();
    let x = rt_at(
        &sheet(Behind::Medium(0)),
        &[c(1.0, 0.0), c(1.5, k)],
        550.0,
        0.0,
    );
    let t = (1.0 - r1).powi(2) * alpha / (1.0 - r1 * r1 * alpha * alpha);
    assert!((x.t() - t).abs() < 1e-9, "{} vs {t}", x.t());
    // On a black backing only the front face reflects.
    let x = rt_at(
        &sheet(Behind::Black),
        &[c(1.0, 0.0), c(1.5, 0.0)],
        550.0,
        0.0,
    );
    assert!((x.r() - r1).abs() < 1e-15 && x.t() == 0.0);
}

/// A coated sheet: the coherent film's own R, T (from the Airy sum) combine
/// with the back face incoherently.
#[test]
fn coated_incoherent_sheet_combines_film_and_back_face() {
    let (n_film, n_sheet, d, wl, deg) = (c(2.2, 0.05), c(1.55, 0.0), 90.0, 520.0, 30.0);
    let media = [c(1.0, 0.0), n_film, n_sheet];
    let s = Stack {
        incident: 0,
        nodes: vec![layer(1, d)],
        exit: Exit::Sheet {
            medium: 2,
            thickness_nm: 75_000.0,
            behind: Behind::Medium(0),
        },
    };
    let x = rt_at(&s, &media, wl, deg);
    // Film seen from air and from inside the sheet.
    let front = airy(1.0, n_film, n_sheet, d, wl, deg);
    let sin_sheet = deg.to_radians().sin() / n_sheet.re;
    let back_deg = sin_sheet.asin().to_degrees();
    let from_sheet = airy(n_sheet.re, n_film, c(1.0, 0.0), d, wl, back_deg);
    let bare = airy(n_sheet.re, c(1.0, 0.0), c(1.0, 0.0), 0.0, wl, back_deg);
    let combine = |rf: f64, tf: f64, rb: f64, tb: f64, rbs: f64| {
        (
            rf + tf * tb * rbs / (1.0 - rb * rbs),
            tf * (1.0 - rbs) / (1.0 - rb * rbs),
        )
    };
    let (rs, ts) = combine(front.rs, front.ts, from_sheet.rs, from_sheet.ts, bare.rs);
    let (rp, tp) = combine(front.rp, front.tp, from_sheet.rp, from_sheet.tp, bare.rp);
    for (a, b) in [(x.rs, rs), (x.ts, ts), (x.rp, rp), (x.tp, tp)] {
        assert!((a - b).abs() < 1e-12, "{x:?} vs {rs} {ts} {rp} {tp}");
    }
}

/// An incoherent sheet is the phase average of the coherent result: averaging
/// the coherent R and T over one fringe period of sheet thickness must give
/// the incoherent sum (common practice; Harbecke 1986 §2), also for a weakly
/// absorbing sheet at oblique incidence, which fixes the convention for power
/// flowing back out of an absorbing medium.
#[test]
fn incoherent_sheet_equals_the_phase_average_of_coherent_sheets() {
    let (wl, deg, d0) = (560.0, 40.0, 20_000.0);
    let media = [c(1.0, 0.0), c(2.1, 0.02), c(1.6, 2e-5), c(1.33, 0.0)];
    let inc = Stack {
        incident: 0,
        nodes: vec![layer(1, 70.0)],
        exit: Exit::Sheet {
            medium: 2,
            thickness_nm: d0,
            behind: Behind::Medium(3),
        },
    };
    let x = rt_at(&inc, &media, wl, deg);
    let q = (media[2] * media[2] - deg.to_radians().sin().powi(2)).sqrt();
    let period = wl / (2.0 * q.re);
    let n = 4000;
    let mut avg = Rt::default();
    for i in 0..n {
        let d = d0 + period * (i as f64 + 0.5) / n as f64;
        let y = rt_at(
            &stack(0, vec![layer(1, 70.0), layer(2, d)], 3),
            &media,
            wl,
            deg,
        );
        avg.rs += y.rs / n as f64;
        avg.rp += y.rp / n as f64;
        avg.ts += y.ts / n as f64;
        avg.tp += y.tp / n as f64;
    }
    for (a, b) in [
        (x.rs, avg.rs),
        (x.rp, avg.rp),
        (x.ts, avg.ts),
        (x.tp, avg.tp),
    ] {
        // T differs by the change of single-pass absorption across the period (≈ 4e-5).
        assert!((a - b).abs() < 1e-4, "incoherent {x:?} vs averaged {avg:?}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(120))]

    /// The grid driver evaluates several wavelengths side by side; it must
    /// equal the one-wavelength oracle for any mix of lossless, absorbing and
    /// evanescent layers, repeat groups and odd grid sizes.
    #[test]
    fn grid_driver_equals_the_single_wavelength_oracle(
        (media, s) in random_stack(medium()),
        repeat_count in 1u64..6,
        nw in 1usize..11,
        deg in 0.0f64..89.0,
    ) {
        let mut s = s;
        if s.nodes.len() > 2 {
            let tail = s.nodes.split_off(s.nodes.len() / 2);
            s.nodes.push(Node::Repeat { count: repeat_count, nodes: tail });
        }
        let wavelengths: Vec<f64> = (0..nw).map(|i| 380.0 + 37.0 * i as f64).collect();
        let index: Vec<Vec<Complex64>> = media.iter().map(|&n| vec![n; nw]).collect();
        let grid = lamella::optics::compute(std::slice::from_ref(&s), &index, &wavelengths, &[deg]);
        for (w, &wl) in wavelengths.iter().enumerate() {
            let (a, b) = (grid.rt[w], rt_at(&s, &media, wl, deg));
            for (x, y) in [(a.rs, b.rs), (a.rp, b.rp), (a.ts, b.ts), (a.tp, b.tp)] {
                prop_assert!((x - y).abs() < 1e-12, "{a:?} vs {b:?} at {wl} nm");
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(60))]

    /// Long lossless repeat groups, powered on the grid driver's lanes (and
    /// in double-double from 64 periods), equal the same periods written out
    /// (which go layer by layer), in and out of the stop band.
    #[test]
    fn long_lossless_repeats_equal_their_expansion(
        period in prop::collection::vec((1.2f64..2.6, 20.0f64..200.0), 1..4),
        count in 1u64..1500,
        deg in 0.0f64..85.0,
    ) {
        let mut media = vec![c(1.0, 0.0)];
        let nodes: Vec<Node> = period.iter().map(|&(n, d)| { media.push(c(n, 0.0)); layer(media.len() - 1, d) }).collect();
        media.push(c(1.52, 0.0));
        let exit = media.len() - 1;
        let powered = stack(0, vec![Node::Repeat { count, nodes: nodes.clone() }], exit);
        let expanded = stack(0, (0..count).flat_map(|_| nodes.clone()).collect(), exit);
        let wavelengths: Vec<f64> = (0..7).map(|i| 400.0 + 53.0 * i as f64).collect();
        let index: Vec<Vec<Complex64>> = media.iter().map(|&n| vec![n; wavelengths.len()]).collect();
        let grid = lamella::optics::compute(std::slice::from_ref(&powered), &index, &wavelengths, &[deg]);
        for (w, &wl) in wavelengths.iter().enumerate() {
            let (a, b) = (grid.rt[w], rt_at(&expanded, &media, wl, deg));
            for (x, y) in [(a.rs, b.rs), (a.rp, b.rp), (a.ts, b.ts), (a.tp, b.tp)] {
                prop_assert!((x - y).abs() < 1e-9, "{a:?} vs {b:?} at {wl} nm");
            }
        }
    }

    /// Rows computed piece by piece, from any first wavelength, equal the
    /// whole grid computed at once.
    #[test]
    fn rows_in_pieces_equal_the_whole_grid(
        (media, s) in random_stack(medium()),
        nw in 1usize..23,
        first in 0usize..22,
        angles in prop::collection::vec(0.0f64..89.0, 1..4),
    ) {
        let first = first % nw;
        let wavelengths: Vec<f64> = (0..nw).map(|i| 380.0 + 17.0 * i as f64).collect();
        let index: Vec<Vec<Complex64>> = media.iter().map(|&n| vec![n; nw]).collect();
        let stacks = std::slice::from_ref(&s);
        let rows = lamella::optics::Rows::new(stacks, &index, &wavelengths, &angles);
        let whole = rows.all();
        for a in 0..angles.len() {
            let mut piece = vec![Rt::default(); nw - first];
            rows.fill(a, first, &mut piece);
            prop_assert_eq!(&piece[..], &whole.at_angle(a)[first..]);
        }
    }
}

/// A lossless structure reports A = 0 exactly; an absorbing layer or a black
/// backing behind an incoherent sheet makes it 1 − R − T > 0.
#[test]
fn absorptance_is_zero_only_where_nothing_absorbs() {
    let wavelengths = [450.0, 550.0, 650.0];
    let clear = [c(1.0, 0.0), c(2.3, 0.0), c(1.5, 0.0)];
    let metal_in_blue = [
        c(1.0, 0.0),
        c(2.3, 0.0),
        c(1.5, 0.0),
        // Absorbing at the first wavelength only.
        c(1.8, 0.0),
    ];
    let film = stack(0, vec![layer(1, 80.0)], 2);
    let index = |media: &[Complex64]| -> Vec<Vec<Complex64>> {
        media.iter().map(|&n| vec![n; wavelengths.len()]).collect()
    };
    let clear_index = index(&clear);
    let lossless = lamella::optics::Rows::new(
        std::slice::from_ref(&film),
        &clear_index,
        &wavelengths,
        &[30.0],
    );
    for w in 0..wavelengths.len() {
        assert!(lossless.lossless(w));
        assert_eq!(lossless.all().at_angle(0)[w].a(true), 0.0);
    }
    let mut absorbing = index(&metal_in_blue);
    absorbing[3][0] = c(1.8, 0.4);
    let coated = stack(0, vec![layer(1, 80.0), layer(3, 30.0)], 2);
    let rows = lamella::optics::Rows::new(
        std::slice::from_ref(&coated),
        &absorbing,
        &wavelengths,
        &[30.0],
    );
    assert!(!rows.lossless(0) && rows.lossless(1) && rows.lossless(2));
    let x = rows.all().at_angle(0)[0];
    assert!(x.a(false) > 1e-3 && (x.a(false) - (1.0 - x.r() - x.t())).abs() == 0.0);
    let sheet = Stack {
        incident: 0,
        nodes: vec![layer(1, 80.0)],
        exit: Exit::Sheet {
            medium: 2,
            thickness_nm: 5e4,
            behind: Behind::Black,
        },
    };
    let backed = lamella::optics::Rows::new(
        std::slice::from_ref(&sheet),
        &clear_index,
        &wavelengths,
        &[30.0],
    );
    assert!(!backed.lossless(1));
    assert!(backed.all().at_angle(0)[1].a(false) > 0.5);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// The fast paths against the naive oracle (`common::naive_rt`: the
    /// plain complex product, repeats written out): `Stack::rt` and the
    /// four-wavelength grid driver, on random stacks of lossless, absorbing
    /// and evanescent layers with repeat groups, at any angle below grazing.
    /// Absorption and evanescence are kept moderate so that the unscaled
    /// oracle stays within double range.
    #[test]
    fn engine_equals_the_naive_product(
        n0 in 1.0f64..1.8,
        layers in prop::collection::vec(((1.0f64..3.0, prop_oneof![Just(0.0), 0.0f64..0.5]), 0.0f64..300.0), 0..10),
        exit in (1.0f64..2.5, prop_oneof![Just(0.0), 0.0f64..3.0]),
        split in 0usize..10,
        count in 1u64..6,
        nw in 1usize..9,
        deg in 0.0f64..89.5,
    ) {
        let mut media = vec![c(n0, 0.0)];
        let mut nodes: Vec<Node> = layers.iter().map(|&((n, k), d)| {
            media.push(c(n, k));
            layer(media.len() - 1, d)
        }).collect();
        media.push(c(exit.0, exit.1));
        let exit_index = media.len() - 1;
        if split < nodes.len() {
            let period = nodes.split_off(split);
            nodes.push(Node::Repeat { count, nodes: period });
        }
        let s = stack(0, nodes, exit_index);
        let wavelengths: Vec<f64> = (0..nw).map(|i| 380.0 + 51.0 * i as f64).collect();
        let index: Vec<Vec<Complex64>> = media.iter().map(|&n| vec![n; nw]).collect();
        let grid = lamella::optics::compute(std::slice::from_ref(&s), &index, &wavelengths, &[deg]);
        for (w, &wl) in wavelengths.iter().enumerate() {
            let naive = naive_rt(&s, &media, wl, deg);
            for x in [rt_at(&s, &media, wl, deg), grid.rt[w]] {
                for (a, b) in [(x.rs, naive.rs), (x.rp, naive.rp), (x.ts, naive.ts), (x.tp, naive.tp)] {
                    prop_assert!((a - b).abs() < 1e-10, "{x:?} vs naive {naive:?} at {wl} nm");
                }
            }
        }
    }
}
