//! Colour differences and the colour travel of a sequence of angles.

use palette::Lab;
use palette::color_difference::DeltaE;
use palette::white_point::E;

use crate::error::{Error, Result};

use super::colour::lab_to_lch;

fn lab(v: [f64; 3]) -> Lab<E, f64> {
    Lab::new(v[0], v[1], v[2])
}

/// ΔE*ab, the CIE 1976 colour difference: Euclidean distance in CIELAB
/// (CIE 015:2018; computed by `palette`).
pub fn delta_e76(lab1: [f64; 3], lab2: [f64; 3]) -> f64 {
    lab(lab1).delta_e(lab(lab2))
}

/// ΔE*94 with the graphic-arts weights kL = kC = kH = 1, K1 = 0.045,
/// K2 = 0.015 (CIE 116-1995, "Industrial colour-difference evaluation").
/// Not symmetric: `reference` supplies C*ab in S_C and S_H.
pub fn delta_e94(reference: [f64; 3], sample: [f64; 3]) -> f64 {
    const K1: f64 = 0.045;
    const K2: f64 = 0.015;
    let c1 = reference[1].hypot(reference[2]);
    let c2 = sample[1].hypot(sample[2]);
    let dl = reference[0] - sample[0];
    let dc = c1 - c2;
    let (da, db) = (reference[1] - sample[1], reference[2] - sample[2]);
    let dh2 = (da * da + db * db - dc * dc).max(0.0);
    let sc = 1.0 + K1 * c1;
    let sh = 1.0 + K2 * c1;
    (dl * dl + (dc / sc).powi(2) + dh2 / (sh * sh)).sqrt()
}

/// ΔE00, the CIEDE2000 colour difference with kL = kC = kH = 1, as written out in
/// G. Sharma, W. Wu, E. N. Dalal, "The CIEDE2000 color-difference formula:
/// implementation notes, supplementary test data, and mathematical
/// observations", Color Res. Appl. 30(1), 21–30 (2005).
///
/// Written out rather than taken from `palette` 0.7.7, whose mean hue h̄′ for
/// |h′₁ − h′₂| > 180° is always (h′₁ + h′₂ + 360°)/2, leaving out the case
/// h′₁ + h′₂ ≥ 360° of the paper; the rotation term then differs (by up to about
/// 1e-5 in ΔE00, e.g. for L*a*b* (53.9, 2.35, 8.29) against (10.2, 36.1, −56.4)).
pub fn delta_e2000(lab1: [f64; 3], lab2: [f64; 3]) -> f64 {
    let [l1, a1, b1] = lab1;
    let [l2, a2, b2] = lab2;
    let c_mean = 0.5 * (a1.hypot(b1) + a2.hypot(b2));
    let c7 = c_mean.powi(7);
    let g = 0.5 * (1.0 - (c7 / (c7 + 25f64.powi(7))).sqrt());
    let (a1p, a2p) = ((1.0 + g) * a1, (1.0 + g) * a2);
    let (c1p, c2p) = (a1p.hypot(b1), a2p.hypot(b2));
    let hue = |b: f64, ap: f64| {
        if b == 0.0 && ap == 0.0 {
            0.0
        } else {
            b.atan2(ap).to_degrees().rem_euclid(360.0)
        }
    };
    let (h1p, h2p) = (hue(b1, a1p), hue(b2, a2p));
    let chromatic = c1p * c2p != 0.0;
    let dh = h2p - h1p;
    let dhp = if !chromatic {
        0.0
    } else if dh.abs() <= 180.0 {
        dh
    } else if dh > 180.0 {
        dh - 360.0
    } else {
        dh + 360.0
    };
    let dlp = l2 - l1;
    let dcp = c2p - c1p;
    let dhp_big = 2.0 * (c1p * c2p).sqrt() * (0.5 * dhp).to_radians().sin();
    let l_mean = 0.5 * (l1 + l2);
    let cp_mean = 0.5 * (c1p + c2p);
    let hp_mean = if !chromatic {
        h1p + h2p
    } else if dh.abs() <= 180.0 {
        0.5 * (h1p + h2p)
    } else if h1p + h2p < 360.0 {
        0.5 * (h1p + h2p + 360.0)
    } else {
        0.5 * (h1p + h2p - 360.0)
    };
    let cos = |deg: f64| deg.to_radians().cos();
    let t = 1.0 - 0.17 * cos(hp_mean - 30.0)
        + 0.24 * cos(2.0 * hp_mean)
        + 0.32 * cos(3.0 * hp_mean + 6.0)
        - 0.20 * cos(4.0 * hp_mean - 63.0);
    let d_theta = 30.0 * (-((hp_mean - 275.0) / 25.0).powi(2)).exp();
    let cp7 = cp_mean.powi(7);
    let r_c = 2.0 * (cp7 / (cp7 + 25f64.powi(7))).sqrt();
    let l50 = (l_mean - 50.0).powi(2);
    let s_l = 1.0 + 0.015 * l50 / (20.0 + l50).sqrt();
    let s_c = 1.0 + 0.045 * cp_mean;
    let s_h = 1.0 + 0.015 * cp_mean * t;
    let r_t = -(2.0 * d_theta).to_radians().sin() * r_c;
    let (tl, tc, th) = (dlp / s_l, dcp / s_c, dhp_big / s_h);
    (tl * tl + tc * tc + th * th + r_t * tc * th).sqrt()
}

/// The hue angle difference `to − from` in degrees, wrapped to (−180, 180].
pub fn hue_difference_deg(from: f64, to: f64) -> f64 {
    let w = (to - from + 180.0).rem_euclid(360.0) - 180.0;
    if w == -180.0 { 180.0 } else { w }
}

/// The colour travel at one sample of a sequence ([`travel_points`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TravelPoint {
    /// h_ab here minus h_ab at the first sample, wrapped to (−180, 180].
    pub hue_shift_deg: f64,
    /// ΔE00 from the first sample.
    pub delta_e00_from_first: f64,
    /// ΔE00 per degree toward the next sample (from the previous one at the
    /// last sample; 0 for a single sample).
    pub delta_e00_per_deg: f64,
}

/// The travel at every sample of (angle in degrees, L*a*b*) pairs, in
/// order of angle.
pub fn travel_points(samples: &[(f64, [f64; 3])]) -> Vec<TravelPoint> {
    let Some(&(_, first)) = samples.first() else {
        return Vec::new();
    };
    let first_hue = lab_to_lch(first)[2];
    (0..samples.len())
        .map(|i| {
            let (j, k) = if i + 1 < samples.len() {
                (i, i + 1)
            } else {
                (i.saturating_sub(1), i)
            };
            let rate = if j == k {
                0.0
            } else {
                let ((a0, lab0), (a1, lab1)) = (samples[j], samples[k]);
                delta_e2000(lab0, lab1) / (a1 - a0).abs()
            };
            let lab = samples[i].1;
            TravelPoint {
                hue_shift_deg: hue_difference_deg(first_hue, lab_to_lch(lab)[2]),
                delta_e00_from_first: delta_e2000(first, lab),
                delta_e00_per_deg: rate,
            }
        })
        .collect()
}

/// How the colour changes along a sequence of angles.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Travel {
    /// h_ab(last) − h_ab(first) in degrees, wrapped to (−180, 180].
    pub hue_change_deg: f64,
    /// ΔE00 between the first and the last colour.
    pub delta_e2000: f64,
    /// Midpoint of the angle interval where ΔE00 per degree between
    /// consecutive samples is largest.
    pub steepest_angle_deg: f64,
    /// That largest ΔE00 per degree.
    pub steepest_rate_per_deg: f64,
}

/// Summarises (angle in degrees, L*a*b*) samples in order of angle: at least
/// two, with strictly increasing angles.
pub fn travel(samples: &[(f64, [f64; 3])]) -> Result<Travel> {
    let (Some(first), Some(last)) = (samples.first(), samples.last()) else {
        return Err(Error::invalid(
            "angles",
            0,
            "colour travel needs at least two angles",
        ));
    };
    if samples.len() < 2 {
        return Err(Error::invalid(
            "angles",
            1,
            "colour travel needs at least two angles",
        ));
    }
    let mut steepest = (f64::NAN, f64::NEG_INFINITY);
    for pair in samples.windows(2) {
        let ((a0, lab0), (a1, lab1)) = (pair[0], pair[1]);
        if !(a1 > a0) {
            return Err(Error::invalid(
                "angles",
                format!("{a0}, {a1}"),
                "must increase strictly",
            ));
        }
        let rate = delta_e2000(lab0, lab1) / (a1 - a0);
        if rate > steepest.1 {
            steepest = (0.5 * (a0 + a1), rate);
        }
    }
    Ok(Travel {
        hue_change_deg: hue_difference_deg(lab_to_lch(first.1)[2], lab_to_lch(last.1)[2]),
        delta_e2000: delta_e2000(first.1, last.1),
        steepest_angle_deg: steepest.0,
        steepest_rate_per_deg: steepest.1,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The 34 CIEDE2000 test pairs of Sharma, Wu & Dalal, "The CIEDE2000
    /// color-difference formula: implementation notes, supplementary test data,
    /// and mathematical observations", Color Res. Appl. 30(1), 21–30 (2005), Table 1.
    #[test]
    fn ciede2000_matches_sharma_wu_dalal_2005() {
        let text = include_str!("../../reference_data/cie/ciede2000_sharma2005.csv");
        let mut count = 0;
        for line in text.lines().filter(|l| !l.starts_with('#')).skip(1) {
            let v: Vec<f64> = line.split(',').map(|s| s.parse().unwrap()).collect();
            let (l1, l2) = ([v[1], v[2], v[3]], [v[4], v[5], v[6]]);
            let got = delta_e2000(l1, l2);
            assert!(
                (got - v[7]).abs() < 1e-4,
                "pair {}: {got} vs {}",
                v[0],
                v[7]
            );
            assert!(
                (delta_e2000(l2, l1) - got).abs() < 1e-12,
                "pair {} not symmetric",
                v[0]
            );
            count += 1;
        }
        assert_eq!(count, 34);
    }

    #[test]
    fn delta_e76_is_euclidean() {
        assert!((delta_e76([50.0, 0.0, 0.0], [53.0, 4.0, 0.0]) - 5.0).abs() < 1e-12);
    }

    #[test]
    fn travel_finds_hue_change_and_steepest_interval() {
        // Hue 350° → 10° is +20°, not −340°; the step 20°→30° is the fastest.
        let at = |h: f64, c: f64| {
            let (s, co) = h.to_radians().sin_cos();
            [50.0, c * co, c * s]
        };
        let samples = [
            (0.0, at(350.0, 30.0)),
            (10.0, at(355.0, 30.0)),
            (20.0, at(358.0, 30.0)),
            (30.0, at(10.0, 30.0)),
        ];
        let t = travel(&samples).unwrap();
        assert!((t.hue_change_deg - 20.0).abs() < 1e-9, "{t:?}");
        assert_eq!(t.steepest_angle_deg, 25.0);
        let expected_rate = delta_e2000(samples[2].1, samples[3].1) / 10.0;
        assert!((t.steepest_rate_per_deg - expected_rate).abs() < 1e-12);
        assert!((t.delta_e2000 - delta_e2000(samples[0].1, samples[3].1)).abs() < 1e-12);
        let back: Vec<_> = samples
            .iter()
            .rev()
            .enumerate()
            .map(|(i, s)| (i as f64, s.1))
            .collect();
        assert!((travel(&back).unwrap().hue_change_deg + 20.0).abs() < 1e-9);
    }

    #[test]
    fn hue_differences_wrap_to_the_short_way_round() {
        assert_eq!(hue_difference_deg(350.0, 10.0), 20.0);
        assert_eq!(hue_difference_deg(10.0, 350.0), -20.0);
        assert_eq!(hue_difference_deg(0.0, 180.0), 180.0);
        assert_eq!(hue_difference_deg(180.0, 0.0), 180.0);
        assert_eq!(hue_difference_deg(40.0, 40.0), 0.0);
    }

    #[test]
    fn travel_points_measure_from_the_first_and_toward_the_next() {
        let samples = [
            (0.0, [50.0, 40.0, 0.0]),
            (10.0, [50.0, 0.0, 40.0]),
            (30.0, [50.0, -40.0, 0.0]),
        ];
        let t = travel_points(&samples);
        assert_eq!(t.len(), 3);
        assert!(
            (t[1].hue_shift_deg - 90.0).abs() < 1e-12 && (t[2].hue_shift_deg - 180.0).abs() < 1e-12
        );
        assert_eq!(t[0].delta_e00_from_first, 0.0);
        let step = |i: usize, j: usize| {
            delta_e2000(samples[i].1, samples[j].1) / (samples[j].0 - samples[i].0)
        };
        assert_eq!(t[0].delta_e00_per_deg, step(0, 1));
        assert_eq!(t[1].delta_e00_per_deg, step(1, 2));
        assert_eq!(t[2].delta_e00_per_deg, step(1, 2));
        assert!(travel_points(&[]).is_empty());
        assert_eq!(travel_points(&samples[..1])[0].delta_e00_per_deg, 0.0);
    }

    #[test]
    fn travel_refuses_short_or_unordered_input() {
        assert!(travel(&[]).is_err());
        assert!(travel(&[(0.0, [50.0, 0.0, 0.0])]).is_err());
        assert!(travel(&[(10.0, [50.0, 0.0, 0.0]), (10.0, [50.0, 1.0, 0.0])]).is_err());
        assert!(travel(&[(10.0, [50.0, 0.0, 0.0]), (f64::NAN, [50.0, 1.0, 0.0])]).is_err());
    }
}
