//! From tristimulus values to the numbers a designer reads: chromaticity,
//! CIELAB, LCh(ab) and display RGB with a gamut flag and optional gamut mapping.

use std::str::FromStr;

use palette::convert::FromColorUnclamped;
use palette::encoding::{self, FromLinear, IntoLinear};
use palette::lms::matrix::{Bradford, XyzToLms};
use palette::matrix::{matrix_inverse, multiply_3x3, multiply_3x3_and_vec3, rgb_to_xyz_matrix};
use palette::white_point::{D65, E, WhitePoint};
use palette::{Lab, Lch, Mat3, Xyz};

use crate::error::{Error, Result};

/// Slack on linear RGB when judging "inside the gamut" (round-off only).
const GAMUT_TOLERANCE: f64 = 1e-9;

/// CIELAB L*, a*, b* of `xyz` relative to the reference white `white` (both
/// on one scale), CIE 015:2018 (computed by `palette`,
/// with the tristimulus values divided by the white beforehand so that
/// palette's equal-energy white point E = (1, 1, 1) stands for any white).
pub fn xyz_to_lab(xyz: [f64; 3], white: [f64; 3]) -> [f64; 3] {
    let rel = Xyz::<E, f64>::new(xyz[0] / white[0], xyz[1] / white[1], xyz[2] / white[2]);
    let lab = Lab::<E, f64>::from_color_unclamped(rel);
    [lab.l, lab.a, lab.b]
}

/// Inverse of [`xyz_to_lab`]: tristimulus values on the scale of `white`
/// (CIE 015:2018, the inverse equations).
pub fn lab_to_xyz(lab: [f64; 3], white: [f64; 3]) -> [f64; 3] {
    let rel = Xyz::<E, f64>::from_color_unclamped(Lab::<E, f64>::new(lab[0], lab[1], lab[2]));
    [rel.x * white[0], rel.y * white[1], rel.z * white[2]]
}

/// L*, C*ab, h_ab (degrees in [0, 360)) from L*, a*, b* (CIE 015:2018;
/// computed by `palette`).
pub fn lab_to_lch(lab: [f64; 3]) -> [f64; 3] {
    let lch = Lch::<E, f64>::from_color_unclamped(Lab::<E, f64>::new(lab[0], lab[1], lab[2]));
    [lch.l, lch.chroma, lch.hue.into_positive_degrees() % 360.0]
}

/// L*, a*, b* from L*, C*ab and h_ab in degrees.
fn lch_to_lab([l, c, h]: [f64; 3]) -> [f64; 3] {
    let (s, co) = h.to_radians().sin_cos();
    [l, c * co, c * s]
}

/// Chromaticity x, y = X/(X+Y+Z), Y/(X+Y+Z) (CIE 015:2018);
/// for black (X+Y+Z = 0) that of `white`.
pub fn chromaticity(xyz: [f64; 3], white: [f64; 3]) -> [f64; 2] {
    let sum = xyz[0] + xyz[1] + xyz[2];
    if sum > 0.0 {
        [xyz[0] / sum, xyz[1] / sum]
    } else {
        chromaticity(white, [1.0; 3])
    }
}

/// The display RGB space of [`Colour::rgb`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum RgbSpace {
    /// sRGB, IEC 61966-2-1:1999 (primaries, D65 white, transfer curve).
    #[default]
    Srgb,
    /// Display P3: DCI-P3 primaries (SMPTE EG 432-1) with the D65 white and
    /// the sRGB transfer curve.
    DisplayP3,
}

impl FromStr for RgbSpace {
    type Err = Error;

    /// `srgb` or `display-p3` (also `displayp3`, `p3`), any case.
    fn from_str(s: &str) -> Result<Self> {
        match s.trim().to_ascii_lowercase().as_str() {
            "srgb" => Ok(RgbSpace::Srgb),
            "display-p3" | "displayp3" | "display_p3" | "p3" => Ok(RgbSpace::DisplayP3),
            _ => Err(Error::invalid(
                "rgb_space",
                s,
                "expected srgb or display-p3",
            )),
        }
    }
}

/// What to do with a colour outside the RGB gamut.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum GamutMapping {
    /// Clip each linear RGB component to 0–1 (hue and lightness may shift).
    #[default]
    Clip,
    /// Reduce CIELAB chroma at constant L* and h_ab by bisection until the
    /// colour fits, then clip the round-off (common practice).
    Chroma,
}

impl FromStr for GamutMapping {
    type Err = Error;

    /// `clip` or `chroma`, any case.
    fn from_str(s: &str) -> Result<Self> {
        match s.trim().to_ascii_lowercase().as_str() {
            "clip" => Ok(GamutMapping::Clip),
            "chroma" => Ok(GamutMapping::Chroma),
            _ => Err(Error::invalid(
                "gamut_mapping",
                s,
                "expected clip or chroma",
            )),
        }
    }
}

/// How [`Colour::new`] renders RGB.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct ColourOptions {
    /// Output RGB space.
    pub space: RgbSpace,
    /// Treatment of out-of-gamut colours.
    pub gamut: GamutMapping,
}

/// The colour of one spectrum under one illuminant and observer.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Colour {
    /// X, Y, Z on the 0–100 scale (perfect reflector: Y = 100).
    pub xyz: [f64; 3],
    /// Chromaticity x, y.
    pub xy: [f64; 2],
    /// CIELAB L*, a*, b* relative to the illuminant's own computed white.
    pub lab: [f64; 3],
    /// L*, C*ab, h_ab in degrees.
    pub lch: [f64; 3],
    /// Encoded RGB in the chosen space, each 0–1 (after gamut mapping).
    pub rgb: [f64; 3],
    /// `#RRGGBB` from round(255 × encoded RGB).
    pub hex: String,
    /// Whether the colour fits the RGB gamut before any mapping (linear RGB
    /// within 0–1 up to 1e-9).
    pub in_gamut: bool,
}

impl Colour {
    /// Describes the tristimulus values `xyz` (0–100) seen under a light whose
    /// perfect reflector gives `white` (from [`super::Weights::white`]).
    ///
    /// RGB: Bradford chromatic adaptation from `white` to the RGB space's D65
    /// white (0.95047, 1, 1.08883) (common practice), applied under D65 too,
    /// where it only absorbs the small difference between the white computed
    /// on the grid and that one; so the perfect reflector is always RGB white.
    /// Then the linear RGB matrix and the transfer curve, clipping to 0–1.
    pub fn new(xyz: [f64; 3], white: [f64; 3], options: &ColourOptions) -> Colour {
        let display = RgbDisplay::new(white, options.space);
        let lab = xyz_to_lab(xyz, white);
        let lch = lab_to_lch(lab);
        let linear = display.linear(xyz);
        let in_gamut = inside(linear);
        let mapped = match options.gamut {
            GamutMapping::Clip => linear,
            GamutMapping::Chroma if in_gamut => linear,
            GamutMapping::Chroma => display.reduce_chroma(lch, white),
        };
        let rgb = mapped.map(|c| srgb_encode(c.clamp(0.0, 1.0)));
        let [r, g, b] = rgb.map(|c| (c * 255.0).round() as u8);
        Colour {
            xyz,
            xy: chromaticity(xyz, white),
            lab,
            lch,
            rgb,
            hex: format!("#{r:02X}{g:02X}{b:02X}"),
            in_gamut,
        }
    }
}

/// X, Y, Z (0–100) of an encoded RGB colour (each 0–1) as [`Colour::new`]
/// renders it for the light whose perfect reflector gives `white`: the
/// transfer curve undone (IEC 61966-2-1), then the inverse of the rendering
/// matrix, so `Colour::new(rgb_to_xyz_under(c.rgb, w, s), w, …)` gives back
/// `c.rgb` for in-gamut colours.
pub fn rgb_to_xyz_under(rgb: [f64; 3], white: [f64; 3], space: RgbSpace) -> [f64; 3] {
    let linear = rgb.map(<encoding::Srgb as encoding::IntoLinear<f64, f64>>::into_linear);
    let to_xyz = matrix_inverse(RgbDisplay::new(white, space).to_rgb);
    multiply_3x3_and_vec3(to_xyz, linear).map(|v| v * 100.0)
}

/// Linear RGB within 0–1 up to the tolerance.
fn inside(rgb: [f64; 3]) -> bool {
    rgb.iter()
        .all(|&c| (-GAMUT_TOLERANCE..=1.0 + GAMUT_TOLERANCE).contains(&c))
}

/// The sRGB transfer curve (IEC 61966-2-1: 12.92·L up to 0.0031308, else
/// 1.055·L^(1/2.4) − 0.055), shared by Display P3; computed by `palette`.
pub fn srgb_encode(linear: f64) -> f64 {
    <encoding::Srgb as FromLinear<f64, f64>>::from_linear(linear)
}

/// The encoded channels (0–1) of a hex colour's six digits `RRGGBB`
/// (without `#`), or `None` when they are not six hex digits.
pub fn rgb_of_hex(digits: &str) -> Option<[f64; 3]> {
    if digits.len() != 6 || !digits.bytes().all(|b| b.is_ascii_hexdigit()) {
        return None;
    }
    let channel = |i: usize| u8::from_str_radix(&digits[2 * i..2 * i + 2], 16).ok();
    Some([channel(0)?, channel(1)?, channel(2)?].map(|v| f64::from(v) / 255.0))
}

/// Inverse of [`srgb_encode`] (IEC 61966-2-1); computed by `palette`.
pub fn srgb_decode(encoded: f64) -> f64 {
    <encoding::Srgb as IntoLinear<f64, f64>>::into_linear(encoded)
}

/// Linear RGB matrix of a space: the RGB → XYZ matrix derived from its
/// primaries and white (SMPTE RP 177-1993; computed by `palette`).
fn rgb_to_xyz(space: RgbSpace) -> Mat3<f64> {
    match space {
        RgbSpace::Srgb => rgb_to_xyz_matrix::<encoding::Srgb, f64>(),
        RgbSpace::DisplayP3 => rgb_to_xyz_matrix::<encoding::DisplayP3, f64>(),
    }
}

/// The linearised Bradford chromatic adaptation from `white` to the D65 white
/// (0.95047, 1, 1.08883): M⁻¹ · diag(M·w_D65 / M·w) · M with M the Bradford
/// matrix (K. M. Lam, "Metamerism and colour constancy", PhD thesis, University
/// of Bradford, 1985; linearised form as in ICC.1:2010 Annex E). M from `palette`;
/// its inverse is computed rather than taken as printed so that `white` maps
/// onto the D65 white to round-off.
fn bradford_to_d65(white: [f64; 3]) -> Mat3<f64> {
    let m: Mat3<f64> = <Bradford as XyzToLms<f64>>::xyz_to_lms_matrix();
    let d65 = <D65 as WhitePoint<f64>>::get_xyz();
    let src = multiply_3x3_and_vec3(m, white.map(|v| v / white[1]));
    let dst = multiply_3x3_and_vec3(m, [d65.x, d65.y, d65.z]);
    #[rustfmt::skip]
    let gain = [
        dst[0] / src[0], 0.0, 0.0,
        0.0, dst[1] / src[1], 0.0,
        0.0, 0.0, dst[2] / src[2],
    ];
    multiply_3x3(matrix_inverse(m), multiply_3x3(gain, m))
}

/// Linear RGB rendering for one light's white: Bradford adaptation to D65
/// followed by XYZ → RGB, as one matrix. The RGB matrix is derived from the
/// primaries rather than taken as printed, so the D65 white maps to exactly
/// (1, 1, 1) and the perfect reflector is in gamut at 1e-9.
pub struct RgbDisplay {
    to_rgb: Mat3<f64>,
}

impl RgbDisplay {
    /// The rendering for a light whose perfect reflector gives `white`.
    pub fn new(white: [f64; 3], space: RgbSpace) -> Self {
        RgbDisplay {
            to_rgb: multiply_3x3(matrix_inverse(rgb_to_xyz(space)), bradford_to_d65(white)),
        }
    }

    /// Linear RGB (unclipped) of X, Y, Z on the 0–100 scale.
    pub fn linear(&self, xyz: [f64; 3]) -> [f64; 3] {
        multiply_3x3_and_vec3(self.to_rgb, xyz.map(|v| v / 100.0))
    }

    /// Linear RGB (unclipped) of L*, C*ab, h_ab relative to `white`.
    pub fn linear_lch(&self, lch: [f64; 3], white: [f64; 3]) -> [f64; 3] {
        self.linear(lab_to_xyz(lch_to_lab(lch), white))
    }

    /// The largest chroma C*ab, up to `limit`, at which lightness `l` and hue
    /// `h` (degrees) fit the gamut (bisection to 1e-9 of the range); 0 when
    /// even the neutral of that lightness does not fit.
    pub fn max_chroma(&self, l: f64, h: f64, white: [f64; 3], limit: f64) -> f64 {
        let fits = |chroma| inside(self.linear_lch([l, chroma, h], white));
        if !fits(0.0) {
            return 0.0;
        }
        if fits(limit) {
            return limit;
        }
        let (mut lo, mut hi) = (0.0, limit);
        while hi - lo > 1e-9 * limit.max(1.0) {
            let mid = 0.5 * (lo + hi);
            if fits(mid) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        lo
    }

    /// Linear RGB of the colour with the largest chroma ≤ C that fits, at the
    /// same L* and h_ab.
    fn reduce_chroma(&self, [l, c, h]: [f64; 3], white: [f64; 3]) -> [f64; 3] {
        self.linear_lch([l, self.max_chroma(l, h, white, c), h], white)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::colorimetry::{Illuminant, Observer, Weights};
    use crate::grid::Range;

    const D65_SRGB_WHITE: [f64; 3] = [95.047, 100.0, 108.883];

    fn grid(from: f64, to: f64, step: f64) -> Vec<f64> {
        Range { from, to, step }.points("w").unwrap()
    }

    /// IEC 61966-2-1: linear segment up to 0.0031308 (slope 12.92), srgb_encode(0.5) ≈ 0.7354.
    #[test]
    fn srgb_transfer_curve_matches_iec_61966_2_1() {
        assert!((srgb_encode(0.0031308) - 12.92 * 0.0031308).abs() < 1e-12);
        assert!((srgb_encode(0.0031308) - 0.040449936).abs() < 1e-8);
        assert!((srgb_encode(0.5) - 0.735356983).abs() < 1e-8);
        assert_eq!(srgb_encode(0.0), 0.0);
        assert!((srgb_encode(1.0) - 1.0).abs() < 1e-15);
    }

    /// IEC 61966-2-1 primaries: XYZ of red, green, blue = columns of
    /// [[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]
    /// (printed to 4 decimals and derived with the white x, y = 0.3127, 0.3290
    /// rather than (0.95047, 1, 1.08883), whose Z differs by 2e-4: agreement
    /// to 2.5e-4, and to 1e-4 for the red primary).
    #[test]
    fn srgb_primaries_match_iec_61966_2_1() {
        let iec = [
            0.4124, 0.3576, 0.1805, 0.2126, 0.7152, 0.0722, 0.0193, 0.1192, 0.9505,
        ];
        for (got, want) in rgb_to_xyz(RgbSpace::Srgb).iter().zip(iec) {
            assert!((got - want).abs() < 2.5e-4, "{got} vs {want}");
        }
        let m = rgb_to_xyz(RgbSpace::Srgb);
        for (got, want) in [m[0], m[3], m[6]].into_iter().zip([0.4124, 0.2126, 0.0193]) {
            assert!((got - want).abs() < 1e-4, "{got} vs {want}");
        }
        let red = RgbDisplay::new(D65_SRGB_WHITE, RgbSpace::Srgb).linear([41.24, 21.26, 1.93]);
        assert!((red[0] - 1.0).abs() < 2e-4 && red[1].abs() < 2e-4 && red[2].abs() < 2e-4);
    }

    /// SMPTE EG 432-1: Display P3 red primary x, y = 0.680, 0.320.
    #[test]
    fn display_p3_red_primary() {
        let m = rgb_to_xyz(RgbSpace::DisplayP3);
        let (x, y, z) = (m[0], m[3], m[6]);
        assert!((x / (x + y + z) - 0.680).abs() < 1e-9 && (y / (x + y + z) - 0.320).abs() < 1e-9);
    }

    #[test]
    fn perfect_reflector_under_d65_is_lab_100_0_0_and_srgb_white() {
        for step in [1.0, 5.0] {
            let g = grid(380.0, 780.0, step);
            let w = Weights::new(
                &g,
                &Illuminant::builtin("D65").unwrap(),
                Observer::Cie1931_2,
            )
            .unwrap();
            let c = Colour::new(
                w.xyz(&vec![1.0; g.len()]),
                w.white(),
                &ColourOptions::default(),
            );
            assert!(
                (c.lab[0] - 100.0).abs() < 1e-12
                    && c.lab[1].abs() < 1e-12
                    && c.lab[2].abs() < 1e-12
            );
            for v in c.rgb {
                assert!((v - 1.0).abs() < 1e-6, "{:?}", c.rgb);
            }
            assert_eq!(c.hex, "#FFFFFF");
            assert!(c.in_gamut, "{c:?}");
        }
    }

    #[test]
    fn perfect_reflector_is_lab_100_0_0_on_odd_grids_and_other_lights() {
        for name in ["A", "D50", "F2", "F11", "LED-B3", "LED-RGB1", "E"] {
            for observer in [Observer::Cie1931_2, Observer::Cie1964_10] {
                let g = grid(400.0, 700.0, 7.0);
                let w = Weights::new(&g, &Illuminant::builtin(name).unwrap(), observer).unwrap();
                let c = Colour::new(
                    w.xyz(&vec![1.0; g.len()]),
                    w.white(),
                    &ColourOptions::default(),
                );
                let [l, a, b] = c.lab;
                assert!(
                    (l - 100.0).abs() < 1e-12 && a.abs() < 1e-12 && b.abs() < 1e-12,
                    "{name}"
                );
                // Adapted to D65 the perfect reflector stays white.
                assert_eq!(c.hex, "#FFFFFF", "{name} {observer}");
            }
        }
    }

    #[test]
    fn lab_round_trips_and_lch_angles() {
        let white = [96.4, 100.0, 82.5];
        let lab = [41.0, -12.5, 33.0];
        let back = xyz_to_lab(lab_to_xyz(lab, white), white);
        for i in 0..3 {
            assert!((back[i] - lab[i]).abs() < 1e-10);
        }
        let [l, c, h] = lab_to_lch([50.0, 0.0, -10.0]);
        assert_eq!((l, c), (50.0, 10.0));
        assert!((h - 270.0).abs() < 1e-12);
        let lab2 = lch_to_lab([50.0, 10.0, 270.0]);
        assert!(lab2[1].abs() < 1e-12 && (lab2[2] + 10.0).abs() < 1e-12);
    }

    #[test]
    fn out_of_gamut_colours_are_flagged_and_mapped() {
        // A saturated green beyond sRGB but near Display P3's edge.
        let white = D65_SRGB_WHITE;
        let xyz = lab_to_xyz([70.0, -100.0, 60.0], white);
        let clip = Colour::new(xyz, white, &ColourOptions::default());
        assert!(!clip.in_gamut);
        assert!(clip.rgb.iter().all(|v| (0.0..=1.0).contains(v)));
        let chroma = Colour::new(
            xyz,
            white,
            &ColourOptions {
                space: RgbSpace::Srgb,
                gamut: GamutMapping::Chroma,
            },
        );
        assert!(!chroma.in_gamut);
        // The mapped colour keeps L* and h_ab: re-derive them from its RGB
        // (the white is sRGB's own, so no adaptation is involved).
        let lin = chroma
            .rgb
            .map(<encoding::Srgb as encoding::IntoLinear<f64, f64>>::into_linear);
        let xyz_back = multiply_3x3_and_vec3(rgb_to_xyz(RgbSpace::Srgb), lin).map(|v| v * 100.0);
        let lch_back = lab_to_lch(xyz_to_lab(xyz_back, white));
        assert!((lch_back[0] - 70.0).abs() < 1e-4, "{lch_back:?}");
        assert!(
            (lch_back[2] - clip.lch[2]).abs() < 1e-4,
            "{lch_back:?} vs {:?}",
            clip.lch
        );
        assert!(lch_back[1] < clip.lch[1]);
        // On the gamut boundary: one channel at 0 or 1.
        assert!(
            lin.iter().any(|&v| !(1e-6..=1.0 - 1e-6).contains(&v)),
            "{lin:?}"
        );
        // Display P3 is wider than sRGB.
        let p3 = Colour::new(
            lab_to_xyz([70.0, -80.0, 60.0], white),
            white,
            &ColourOptions {
                space: RgbSpace::DisplayP3,
                gamut: GamutMapping::Clip,
            },
        );
        let srgb = Colour::new(
            lab_to_xyz([70.0, -80.0, 60.0], white),
            white,
            &ColourOptions::default(),
        );
        assert!(p3.in_gamut && !srgb.in_gamut, "{p3:?} {srgb:?}");
    }

    #[test]
    fn option_names_parse() {
        assert_eq!("sRGB".parse::<RgbSpace>().unwrap(), RgbSpace::Srgb);
        assert_eq!(
            "Display-P3".parse::<RgbSpace>().unwrap(),
            RgbSpace::DisplayP3
        );
        assert_eq!(
            "CHROMA".parse::<GamutMapping>().unwrap(),
            GamutMapping::Chroma
        );
        assert!("adobe".parse::<RgbSpace>().is_err());
        assert!("compress".parse::<GamutMapping>().is_err());
    }
}
