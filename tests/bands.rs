//! Photonic bands of periodic stacks: the quarter-wave stop-band width, the
//! band edges of a long finite stack, and the band centre's shift with angle.

mod common;

use common::{c, layer, rt_at, stack};
use lamella::optics::{MediumTerms, Node, Probe, half_trace};
use num_complex::Complex64;

const NH: f64 = 2.35;
const NL: f64 = 1.46;
const CENTRE_NM: f64 = 550.0;

fn media() -> Vec<Complex64> {
    vec![c(1.0, 0.0), c(NH, 0.0), c(NL, 0.0), c(1.52, 0.0)]
}

/// A quarter-wave pair at 550 nm.
fn period() -> Vec<Node> {
    vec![
        layer(1, CENTRE_NM / (4.0 * NH)),
        layer(2, CENTRE_NM / (4.0 * NL)),
    ]
}

/// |½ tr M| − 1 of the period at `wl` and `deg` for polarization `pol`.
fn excess(wl: f64, deg: f64, pol: usize) -> f64 {
    let at = Probe::new(wl, 1.0, deg);
    let terms: Vec<MediumTerms> = media()
        .iter()
        .map(|&n| MediumTerms::new(n, at.beta()))
        .collect();
    half_trace(&period(), &terms, &at)[pol].re.abs() - 1.0
}

/// The first-order band edges (nm) by bisection between `lo` and `hi`.
fn edges(deg: f64, pol: usize) -> (f64, f64) {
    let bisect = |mut a: f64, mut b: f64| {
        for _ in 0..200 {
            let m = 0.5 * (a + b);
            if (excess(m, deg, pol) > 0.0) == (excess(a, deg, pol) > 0.0) {
                a = m
            } else {
                b = m
            }
        }
        0.5 * (a + b)
    };
    let centre = 2.0 * CENTRE_NM / (1.0 + 1.0) * deg.to_radians().cos().sqrt().max(0.8);
    assert!(
        excess(centre, deg, pol) > 0.0,
        "{centre} nm is not in the band"
    );
    (bisect(380.0, centre), bisect(centre, 900.0))
}

/// At normal incidence the stop band of a quarter-wave stack spans
/// Δg = (4/π)·arcsin((n_H − n_L)/(n_H + n_L)) in g = λ₀/λ (Macleod,
/// *Thin-Film Optical Filters*, 4th ed. 2010, §6.1).
#[test]
fn quarter_wave_stop_band_has_the_published_width() {
    let (short, long) = edges(0.0, 0);
    let width = CENTRE_NM / short - CENTRE_NM / long;
    let published = 4.0 / std::f64::consts::PI * ((NH - NL) / (NH + NL)).asin();
    assert!((width - published).abs() < 1e-12, "{width} vs {published}");
    // At normal incidence s and p are the same wave.
    assert_eq!(edges(0.0, 1), (short, long));
}

/// A long finite stack (1000 periods) reflects more than half just inside
/// each band edge and its reflectance first crosses ½ right at the edge
/// (the pass-band fringes shrink toward it as 1/N²).
#[test]
fn a_long_stack_reflects_half_at_the_band_edges() {
    let finite = stack(
        0,
        vec![Node::Repeat {
            count: 1000,
            nodes: period(),
        }],
        3,
    );
    for deg in [0.0, 45.0] {
        let (short, long) = edges(deg, 0);
        for (edge, inward) in [(short, 1.0), (long, -1.0)] {
            let r = |wl: f64| rt_at(&finite, &media(), wl, deg).rs;
            assert!(r(edge + inward * 0.01) > 0.99, "inside {edge}");
            // Walk outward until R first drops below ½: within 0.05 nm.
            let mut wl = edge + inward * 0.01;
            while r(wl) > 0.5 {
                wl -= inward * 1e-4;
            }
            assert!(
                (wl - edge).abs() < 0.05,
                "{deg}°: R crosses ½ at {wl}, edge {edge}"
            );
        }
    }
}

/// The band centre moves to shorter wavelengths with angle, where the
/// period's phase thickness at oblique incidence is π:
/// λ = 2(n_H d_H cos θ_H + n_L d_L cos θ_L) (common practice), within 1 % in
/// frequency.
#[test]
fn the_band_centre_follows_the_bragg_condition() {
    let mut previous = f64::INFINITY;
    for deg in [0.0, 20.0, 40.0, 60.0] {
        for pol in 0..2 {
            let (short, long) = edges(deg, pol);
            let centre = 2.0 / (1.0 / short + 1.0 / long);
            let s = deg.to_radians().sin();
            let cos = |n: f64| (1.0 - (s / n).powi(2)).sqrt();
            let bragg = 2.0 * (CENTRE_NM / 4.0 * cos(NH) + CENTRE_NM / 4.0 * cos(NL));
            assert!(
                (centre / bragg - 1.0).abs() < 0.01,
                "{deg}° pol {pol}: {centre} vs {bragg}"
            );
            if pol == 0 {
                assert!(centre < previous);
                previous = centre;
            }
        }
    }
}
