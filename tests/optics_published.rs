//! The engine against published formulas and values. Each test names its source.

mod common;

use common::{airy, c, layer, rt_at, stack};
use lamella::optics::{Node, Rt};
use std::f64::consts::PI;

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

/// Hecht, *Optics* (5th ed., 2017), §4.6.2: R = ((n−1)/(n+1))² = 4 % for n = 1.5.
#[test]
fn glass_in_air_reflects_four_percent_at_normal_incidence() {
    let s = stack(0, vec![], 1);
    let x = rt_at(&s, &[c(1.0, 0.0), c(1.5, 0.0)], 550.0, 0.0);
    assert!(
        close(x.r(), 0.04, 1e-15) && close(x.t(), 0.96, 1e-15),
        "{x:?}"
    );
}

/// Hecht, *Optics* (2017), §4.6.3: at Brewster's angle arctan(n₂/n₁) R_p = 0,
/// and the Fresnel equations (eq. 4.42–4.45) hold at every angle.
#[test]
fn brewster_angle_and_fresnel_equations() {
    let n = 1.5f64;
    let s = stack(0, vec![], 1);
    let media = [c(1.0, 0.0), c(n, 0.0)];
    let theta_b = n.atan().to_degrees();
    let x = rt_at(&s, &media, 600.0, theta_b);
    assert!(x.rp < 1e-28, "R_p at Brewster = {}", x.rp);
    for deg in [0.0, 10.0, 30.0, 45.0, 70.0, 89.0] {
        let ti = f64::to_radians(deg);
        let tt = (ti.sin() / n).asin();
        let rs = ((ti.cos() - n * tt.cos()) / (ti.cos() + n * tt.cos())).powi(2);
        let rp = ((n * ti.cos() - tt.cos()) / (n * ti.cos() + tt.cos())).powi(2);
        let x = rt_at(&s, &media, 600.0, deg);
        assert!(
            close(x.rs, rs, 1e-13) && close(x.rp, rp, 1e-13),
            "{deg}: {x:?} vs {rs} {rp}"
        );
        assert!(close(x.rs + x.ts, 1.0, 1e-14) && close(x.rp + x.tp, 1.0, 1e-14));
    }
}

/// Macleod, *Thin-Film Optical Filters* (4th ed., 2010), §4.1: a quarter-wave
/// layer gives R = ((n₀n_s − n₁²)/(n₀n_s + n₁²))²; MgF₂ (1.38) on glass (1.52) ≈ 1.26 %.
#[test]
fn quarter_wave_antireflection_layer() {
    let (n1, ns, wl) = (1.38, 1.52, 550.0);
    let s = stack(0, vec![layer(1, wl / (4.0 * n1))], 2);
    let x = rt_at(&s, &[c(1.0, 0.0), c(n1, 0.0), c(ns, 0.0)], wl, 0.0);
    let expected = ((ns - n1 * n1) / (ns + n1 * n1)).powi(2);
    assert!(close(x.r(), expected, 1e-14), "{} vs {expected}", x.r());
    assert!(close(x.r(), 0.0126, 1e-4));
}

/// Macleod (2010), §5.2: a quarter-wave stack (HL)ᴺH on a substrate has peak
/// R = ((1 − Y)/(1 + Y))² with Y = (n_H/n_L)^{2N} n_H²/n_s.
#[test]
fn quarter_wave_stack_peak_reflectance() {
    let (nh, nl, ns, wl) = (2.35, 1.46, 1.52, 550.0);
    for n_pairs in [1u64, 3, 6, 10] {
        let h = layer(1, wl / (4.0 * nh));
        let l = layer(2, wl / (4.0 * nl));
        let s = stack(
            0,
            vec![
                Node::Repeat {
                    count: n_pairs,
                    nodes: vec![h.clone(), l],
                },
                h,
            ],
            3,
        );
        let x = rt_at(
            &s,
            &[c(1.0, 0.0), c(nh, 0.0), c(nl, 0.0), c(ns, 0.0)],
            wl,
            0.0,
        );
        let y = (nh / nl).powi(2 * n_pairs as i32) * nh * nh / ns;
        let expected = ((1.0 - y) / (1.0 + y)).powi(2);
        assert!(
            close(x.r(), expected, 1e-12),
            "N={n_pairs}: {} vs {expected}",
            x.r()
        );
    }
}

/// Macleod (2010), §5.2: the high-reflectance zone of a quarter-wave stack
/// spans g = λ₀/λ ∈ 1 ± Δg/2 with Δg = (4/π)·arcsin((n_H − n_L)/(n_H + n_L)).
#[test]
fn quarter_wave_stack_stop_band_width() {
    let (nh, nl, l0) = (2.35f64, 1.46f64, 550.0);
    let half = 2.0 / PI * ((nh - nl) / (nh + nl)).asin();
    let media = [c(1.0, 0.0), c(nh, 0.0), c(nl, 0.0), c(1.52, 0.0)];
    let s = stack(
        0,
        vec![Node::Repeat {
            count: 200,
            nodes: vec![layer(1, l0 / (4.0 * nh)), layer(2, l0 / (4.0 * nl))],
        }],
        3,
    );
    let r_at = |g: f64| rt_at(&s, &media, l0 / g, 0.0).r();
    for side in [-1.0, 1.0] {
        assert!(r_at(1.0 + side * 0.98 * half) > 0.999, "inside edge {side}");
        // Outside the band the average over a small window falls well below 1.
        let mean: f64 = (0..50)
            .map(|i| r_at(1.0 + side * (1.02 + 0.001 * i as f64) * half))
            .sum::<f64>()
            / 50.0;
        assert!(mean < 0.8, "outside edge {side}: mean R {mean}");
    }
}

/// Born & Wolf, *Principles of Optics* (1999), §1.5.4: beyond the critical
/// angle a lossless stack reflects everything (R = 1, T = 0).
#[test]
fn total_internal_reflection() {
    let media = [c(1.5, 0.0), c(2.0, 0.0), c(1.3, 0.0), c(1.0, 0.0)];
    let s = stack(0, vec![layer(1, 80.0), layer(2, 120.0)], 3);
    for deg in [42.0, 50.0, 70.0, 89.99] {
        let x = rt_at(&s, &media, 500.0, deg);
        assert!(
            close(x.rs, 1.0, 1e-12) && close(x.rp, 1.0, 1e-12) && x.ts == 0.0 && x.tp == 0.0,
            "{deg}: {x:?}"
        );
    }
}

/// Single films, absorbing or not, at oblique incidence and in frustrated total
/// internal reflection, against the Airy sum with complex Fresnel
/// coefficients (Born & Wolf 1999, §1.6.4 and §13.4; Heavens, *Optical
/// Properties of Thin Solid Films*, 1955, ch. 4).
#[test]
fn single_film_matches_the_airy_sum() {
    let cases = [
        (1.0, c(2.0, 0.3), c(1.52, 0.0), 120.0, 40.0),
        (1.0, c(0.06, 3.4), c(1.52, 0.0), 30.0, 60.0),
        (1.52, c(1.0, 0.0), c(1.52, 0.0), 150.0, 55.0), // frustrated TIR across an air gap
        (1.0, c(1.45, 0.0), c(3.5, 0.2), 300.0, 75.0),
        (1.33, c(1.9, 1e-3), c(1.0, 0.0), 2000.0, 20.0),
    ];
    for (n0, n1, n2, d, deg) in cases {
        let s = stack(0, vec![layer(1, d)], 2);
        for wl in [400.0, 523.0, 700.0] {
            let x = rt_at(&s, &[c(n0, 0.0), n1, n2], wl, deg);
            let y: Rt = airy(n0, n1, n2, d, wl, deg);
            for (a, b) in [(x.rs, y.rs), (x.rp, y.rp), (x.ts, y.ts), (x.tp, y.tp)] {
                assert!(
                    close(a, b, 1e-12),
                    "{n1} {n2} {deg}° {wl} nm: {x:?} vs {y:?}"
                );
            }
        }
    }
}

/// Common practice: very thin layers (index ≈ 1.55, a few nm) separated by
/// 200 nm air gaps reflect most strongly at the first order
/// λ = 2·(n_air·d_air + n·d) at normal incidence, near 400 nm.
#[test]
fn thin_lamellae_with_air_gaps_peak_near_400_nm() {
    let (n, d, gap) = (1.55, 4.0, 200.0);
    let media = [c(1.0, 0.0), c(n, 0.0)];
    let s = stack(
        0,
        vec![
            Node::Repeat {
                count: 8,
                nodes: vec![layer(1, d), layer(0, gap)],
            },
            layer(1, d),
        ],
        0,
    );
    let peak = (3000..5000)
        .map(|i| i as f64 * 0.1)
        .max_by(|&a, &b| {
            rt_at(&s, &media, a, 0.0)
                .r()
                .total_cmp(&rt_at(&s, &media, b, 0.0).r())
        })
        .unwrap();
    let predicted = 2.0 * (gap + n * d);
    assert!(
        close(peak, predicted, 2.0),
        "peak {peak} nm vs {predicted} nm"
    );
}

/// Common practice: a film of index ≈ 1.33 in air goes dark in reflection as
/// it thins to nothing, and a lossless film's R and T are complementary.
#[test]
fn vanishing_film_goes_dark_and_lossless_film_is_complementary() {
    let media = [c(1.0, 0.0), c(1.33, 0.0)];
    let mut last = f64::INFINITY;
    for d in [50.0, 20.0, 10.0, 5.0, 1.0, 0.1] {
        let s = stack(0, vec![layer(1, d)], 0);
        let r = rt_at(&s, &media, 550.0, 0.0).r();
        assert!(r < last, "R must fall as the film thins");
        last = r;
    }
    assert!(last < 1e-5);
    let s = stack(0, vec![layer(1, 400.0)], 0);
    for wl in [400.0, 500.0, 600.0, 700.0] {
        let x = rt_at(&s, &media, wl, 30.0);
        assert!(close(x.r() + x.t(), 1.0, 1e-14));
    }
}
