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

/// ΔE00, the CIEDE2000 colour difference with kL = kC = kH = 1
/// ([`delta_e2000_weighted`]).
pub fn delta_e2000(lab1: [f64; 3], lab2: [f64; 3]) -> f64 {
    delta_e2000_weighted(lab1, lab2, [1.0; 3])
}

/// ΔE00, the CIEDE2000 colour difference with parametric factors
/// `k = [kL, kC, kH]` dividing the lightness, chroma and hue terms, as
/// written out in G. Sharma, W. Wu, E. N. Dalal, "The CIEDE2000
/// color-difference formula: implementation notes, supplementary test data,
/// and mathematical observations", Color Res. Appl. 30(1), 21–30 (2005),
/// eq. (1)–(22).
///
/// Written out rather than taken from `palette` 0.7.7, whose mean hue h̄′ for
/// |h′₁ − h′₂| > 180° is always (h′₁ + h′₂ + 360°)/2, leaving out the case
/// h′₁ + h′₂ ≥ 360° of the paper; the rotation term then differs (by up to about
/// 1e-5 in ΔE00, e.g. for L*a*b* (53.9, 2.35, 8.29) against (10.2, 36.1, −56.4)).
pub fn delta_e2000_weighted(lab1: [f64; 3], lab2: [f64; 3], k: [f64; 3]) -> f64 {
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
    let (tl, tc, th) = (
        dlp / (k[0] * s_l),
        dcp / (k[1] * s_c),
        dhp_big / (k[2] * s_h),
    );
    (tl * tl + tc * tc + th * th + r_t * tc * th).sqrt()
}

/// ΔE CMC(l:c), the colour difference of F. J. J. Clarke, R. McDonald and
/// B. Rigg, "Modification to the JPC79 colour-difference formula", J. Soc.
/// Dyers Colour. 100, 128–132 (1984): lightness weight `l` and chroma weight
/// `c` (2:1 for acceptability, 1:1 for perceptibility). Not symmetric:
/// `reference` supplies L*, C*ab and h_ab in S_L, S_C and S_H.
pub fn delta_e_cmc(reference: [f64; 3], sample: [f64; 3], l: f64, c: f64) -> f64 {
    let [l1, a1, b1] = reference;
    let c1 = a1.hypot(b1);
    let c2 = sample[1].hypot(sample[2]);
    let (dl, dc) = (l1 - sample[0], c1 - c2);
    let (da, db) = (a1 - sample[1], b1 - sample[2]);
    let dh2 = (da * da + db * db - dc * dc).max(0.0);
    let s_l = if l1 < 16.0 {
        0.511
    } else {
        0.040975 * l1 / (1.0 + 0.01765 * l1)
    };
    let s_c = 0.0638 * c1 / (1.0 + 0.0131 * c1) + 0.638;
    let h1 = b1.atan2(a1).to_degrees().rem_euclid(360.0);
    let cos = |deg: f64| deg.to_radians().cos();
    let t = if (164.0..=345.0).contains(&h1) {
        0.56 + (0.2 * cos(h1 + 168.0)).abs()
    } else {
        0.36 + (0.4 * cos(h1 + 35.0)).abs()
    };
    let c4 = c1.powi(4);
    let f = (c4 / (c4 + 1900.0)).sqrt();
    let s_h = s_c * (f * t + 1.0 - f);
    ((dl / (l * s_l)).powi(2) + (dc / (c * s_c)).powi(2) + dh2 / (s_h * s_h)).sqrt()
}

/// The CIELAB components of a difference, sample minus reference.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct LabComponents {
    /// ΔL*: positive when the sample is lighter.
    pub dl: f64,
    /// ΔC*ab: positive when the sample is more chromatic.
    pub dc: f64,
    /// ΔH*ab = 2 √(C*₁ C*₂) sin(Δh_ab / 2) (CIE 015:2018, §8.2.1): positive
    /// when the sample's hue turns counterclockwise in the a*b* plane.
    pub dh: f64,
    /// Δa*: positive toward red.
    pub da: f64,
    /// Δb*: positive toward yellow.
    pub db: f64,
}

/// The components of the difference from `reference` to `sample`.
pub fn lab_components(reference: [f64; 3], sample: [f64; 3]) -> LabComponents {
    let (lch1, lch2) = (lab_to_lch(reference), lab_to_lch(sample));
    let dh_angle = hue_difference_deg(lch1[2], lch2[2]);
    LabComponents {
        dl: sample[0] - reference[0],
        dc: lch2[1] - lch1[1],
        dh: 2.0 * (lch1[1] * lch2[1]).sqrt() * (0.5 * dh_angle).to_radians().sin(),
        da: sample[1] - reference[1],
        db: sample[2] - reference[2],
    }
}

/// Below this C*ab the reference is treated as near-neutral by
/// [`describe`]: its hue angle says little, so the hue word follows the
/// larger of Δa* and Δb* instead.
pub const NEUTRAL_CHROMA: f64 = 2.0;

/// Components smaller than this (CIELAB units) are described as "same".
pub const SAME_WITHIN: f64 = 0.005;

/// How a sample differs from its reference in words: lightness (`lighter`,
/// `darker`), chroma (`more chromatic`, `less chromatic`) and hue.
///
/// The hue word names the CIELAB hue axis the sample's hue turns toward:
/// red (+a*, 0°), yellow (+b*, 90°), green (−a*, 180°) or blue (−b*, 270°).
/// Starting from the reference's hue angle, a positive ΔH* (counterclockwise)
/// turns toward the next axis above it and a negative one toward the next
/// below it: a reference at h = 30° with ΔH* > 0 is "yellower", with
/// ΔH* < 0 "redder". For a near-neutral reference (C*ab below
/// [`NEUTRAL_CHROMA`]) the larger of |Δa*| and |Δb*| decides ("redder" or
/// "greener", "yellower" or "bluer"). A component within [`SAME_WITHIN`] is
/// "same lightness", "same chroma" or "same hue".
pub fn describe(reference: [f64; 3], sample: [f64; 3]) -> [&'static str; 3] {
    let d = lab_components(reference, sample);
    let pick = |x: f64, up: &'static str, down: &'static str, same: &'static str| {
        if x.abs() < SAME_WITHIN {
            same
        } else if x > 0.0 {
            up
        } else {
            down
        }
    };
    const AXES: [&str; 4] = ["redder", "yellower", "greener", "bluer"];
    let hue = if lab_to_lch(reference)[1] < NEUTRAL_CHROMA {
        if d.da.abs().max(d.db.abs()) < SAME_WITHIN {
            "same hue"
        } else if d.da.abs() >= d.db.abs() {
            pick(d.da, AXES[0], AXES[2], "same hue")
        } else {
            pick(d.db, AXES[1], AXES[3], "same hue")
        }
    } else if d.dh.abs() < SAME_WITHIN {
        "same hue"
    } else {
        let h = lab_to_lch(reference)[2] / 90.0;
        let axis = if d.dh > 0.0 {
            h.floor() + 1.0
        } else if h.fract() == 0.0 {
            h - 1.0
        } else {
            h.floor()
        };
        AXES[(axis as i64).rem_euclid(4) as usize]
    };
    [
        pick(d.dl, "lighter", "darker", "same lightness"),
        pick(d.dc, "more chromatic", "less chromatic", "same chroma"),
        hue,
    ]
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
    fn words_follow_the_hue_axis_turned_toward() {
        let at = |l: f64, c: f64, h: f64| {
            let (s, co) = h.to_radians().sin_cos();
            [l, c * co, c * s]
        };
        assert_eq!(
            describe(at(50.0, 30.0, 30.0), at(52.0, 32.0, 35.0)),
            ["lighter", "more chromatic", "yellower"]
        );
        assert_eq!(
            describe(at(50.0, 30.0, 30.0), at(48.0, 28.0, 25.0)),
            ["darker", "less chromatic", "redder"]
        );
        assert_eq!(
            describe(at(50.0, 30.0, 200.0), at(50.0, 30.0, 210.0))[2],
            "bluer"
        );
        assert_eq!(
            describe(at(50.0, 30.0, 350.0), at(50.0, 30.0, 5.0))[2],
            "redder"
        );
        assert_eq!(
            describe(at(50.0, 30.0, 5.0), at(50.0, 30.0, 15.0))[2],
            "yellower"
        );
        assert_eq!(
            describe(at(50.0, 30.0, 90.0), at(50.0, 30.0, 85.0))[2],
            "redder"
        );
        assert_eq!(describe([50.0, 0.5, 0.5], [50.0, 0.5, -1.5])[2], "bluer");
        let same = [50.0, 10.0, 10.0];
        assert_eq!(
            describe(same, same),
            ["same lightness", "same chroma", "same hue"]
        );
        let d = lab_components(at(50.0, 30.0, 30.0), at(50.0, 30.0, 40.0));
        assert!((d.dh - 2.0 * 30.0 * 5f64.to_radians().sin()).abs() < 1e-12);
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
