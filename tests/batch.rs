//! The batch kernel (many designs over one layer sequence) against the grid
//! driver, bit for bit, and against the plain layer-by-layer oracle.

mod common;

use common::{c, layer, naive_rt, stack};
use lamella::optics::{Batch, Rt, Stack, compute};
use num_complex::Complex64;
use proptest::prelude::*;

/// An index from below the incident medium's (evanescent at oblique
/// angles) to high, lossless or absorbing up to `k`. Layers absorb
/// moderately so that the unscaled oracle stays within double range.
fn medium(k: f64) -> impl Strategy<Value = Complex64> + Clone {
    (1.0f64..3.0, prop_oneof![Just(0.0), 0.0f64..k]).prop_map(|(n, k)| c(n, k))
}

/// The stack of `thickness_nm` between medium 0 and medium L+1.
fn design(thickness_nm: &[f64]) -> Stack {
    let nodes = (1..).zip(thickness_nm).map(|(m, &d)| layer(m, d)).collect();
    stack(0, nodes, thickness_nm.len() + 1)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Every design of a batch equals the grid driver on its own stack bit
    /// for bit and the naive product to 1e-12, with dispersive media,
    /// absorbing layers and substrates, total internal reflection and odd
    /// grid sizes.
    #[test]
    fn batch_equals_the_grid_driver_and_the_oracle(
        n0 in 1.0f64..1.8,
        layer_media in prop::collection::vec(medium(0.5), 0..7),
        substrate in medium(3.0),
        designs in prop::collection::vec(prop::collection::vec(0.0f64..400.0, 8), 1..4),
        dispersion in -0.3f64..0.3,
        nw in 1usize..11,
        angles in prop::collection::vec(0.0f64..89.0, 1..3),
    ) {
        let layers = layer_media.len();
        let wavelengths: Vec<f64> = (0..nw).map(|i| 380.0 + 41.0 * i as f64).collect();
        // index[m][w]: each medium's index drifts with wavelength.
        let index: Vec<Vec<Complex64>> = std::iter::once(c(n0, 0.0))
            .chain(layer_media.iter().copied())
            .chain([substrate])
            .map(|n| {
                wavelengths
                    .iter()
                    .map(|w| n * (1.0 + dispersion * (w - 380.0) / 400.0).max(0.5))
                    .map(|z| if n.im == 0.0 { c(z.re, 0.0) } else { z })
                    .collect()
            })
            .collect();
        let flat: Vec<Complex64> = (0..nw).flat_map(|w| index.iter().map(move |m| m[w])).collect();
        let batch = Batch::new(&flat, layers, &wavelengths, &angles);
        prop_assert_eq!(batch.points(), nw * angles.len());
        let mut out = vec![Rt::default(); batch.points()];
        for d in &designs {
            let thickness = &d[..layers];
            batch.rt(thickness, &mut out);
            let s = design(thickness);
            let grid = compute(std::slice::from_ref(&s), &index, &wavelengths, &angles);
            for (i, (a, b)) in out.iter().zip(&grid.rt).enumerate() {
                prop_assert!(
                    [a.rs == b.rs, a.rp == b.rp, a.ts == b.ts, a.tp == b.tp].iter().all(|&e| e),
                    "point {}: batch {:?} vs grid {:?}", i, a, b
                );
                let (w, deg) = (i % nw, angles[i / nw]);
                let n: Vec<Complex64> = index.iter().map(|m| m[w]).collect();
                let o = naive_rt(&s, &n, wavelengths[w], deg);
                for (x, y) in [(a.rs, o.rs), (a.rp, o.rp), (a.ts, o.ts), (a.tp, o.tp)] {
                    prop_assert!((x - y).abs() < 1e-12, "point {}: {:?} vs oracle {:?}", i, a, o);
                }
            }
        }
    }
}

/// A batch of no layers is the bare interface.
#[test]
fn a_batch_without_layers_is_one_interface() {
    let flat = [c(1.0, 0.0), c(1.5, 0.0)];
    let batch = Batch::new(&flat, 0, &[550.0], &[0.0]);
    let mut out = [Rt::default()];
    batch.rt(&[], &mut out);
    // Normal incidence on glass: R = ((n − 1)/(n + 1))² = 0.04 (Fresnel).
    assert!((out[0].rs - 0.04).abs() < 1e-15 && (out[0].ts - 0.96).abs() < 1e-15);
}
