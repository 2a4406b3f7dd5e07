//! Display colours for the continuous charts (the angle strip's band and the
//! thickness field) and the hatching that marks colours outside the gamut.
//!
//! A gamut mapping that leaves in-gamut colours alone cannot join them
//! smoothly to the mapped ones: where a colour path leaves the gamut, the
//! shown colour's rate of change jumps (a clipped channel stops at 0 while
//! its neighbour was still falling), which the eye sees as a line across a
//! smooth band. [`SoftEdge`] shows the colour that `lamella color` reports
//! everywhere except in a zone around the gamut edge, measured by the
//! relative chroma r = C*ab / C*max (C*max: the largest chroma that fits at
//! the same L* and h_ab): from r = 0.9 chroma is compressed by a knee with
//! slope 1 that approaches the edge (common practice in gamut compression;
//! an in-gamut colour loses at most 2.4 % of its chroma), and from r = 1 to
//! r = 1.2 the result blends smoothly into the gamut-mapped colour (clipped
//! or chroma-reduced), which is shown unchanged beyond. Swatches and hex
//! codes keep the reported colour.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::DrawResult;
use super::style::{INK, Style, clip};
use crate::angle_colour::Viewing;
use crate::colorimetry::{Colour, GamutMapping, RgbDisplay, RgbSpace, srgb_encode};
use crate::error::Result;

/// Relative chroma where the knee starts.
pub const KNEE: f64 = 0.9;

/// Relative chroma from which the gamut-mapped colour is shown unchanged.
pub const BLEND_END: f64 = 1.2;

/// Upper end of the chroma search (far beyond any display gamut).
const CHROMA_LIMIT: f64 = 400.0;

/// What a continuous chart shows for one colour.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Shown {
    /// Encoded RGB, each 0–1.
    pub rgb: [f64; 3],
    /// Relative chroma − 1, with the sign of the colour's gamut flag:
    /// positive outside the gamut, negative or zero inside.
    pub excess: f64,
}

impl Shown {
    /// The 8-bit colour.
    pub fn colour(&self) -> RGBColor {
        let [r, g, b] = self.rgb.map(|v| (v * 255.0).round() as u8);
        RGBColor(r, g, b)
    }
}

/// The display rule of the continuous charts for one light and RGB space.
pub struct SoftEdge {
    display: RgbDisplay,
    white: [f64; 3],
}

impl SoftEdge {
    /// For colours computed under `viewing` on the wavelength grid `grid`.
    pub fn new(viewing: &Viewing, grid: &[f64]) -> Result<Self> {
        let white = viewing.weights(grid)?.white();
        Ok(SoftEdge {
            display: RgbDisplay::new(white, viewing.options.space),
            white,
        })
    }

    /// C*ab over the largest chroma that fits at the colour's L* and h_ab
    /// (infinite when even the neutral does not fit).
    pub fn relative_chroma(&self, c: &Colour) -> f64 {
        let [l, chroma, h] = c.lch;
        if chroma == 0.0 {
            return 0.0;
        }
        let max = self
            .display
            .max_chroma(l, h, self.white, CHROMA_LIMIT.max(chroma));
        if max > 0.0 {
            chroma / max
        } else {
            f64::INFINITY
        }
    }

    /// The colour as a continuous chart shows it (see the module notes).
    pub fn show(&self, c: &Colour) -> Shown {
        let r = self.relative_chroma(c);
        let excess = if c.in_gamut {
            (r - 1.0).min(0.0)
        } else {
            (r - 1.0).max(f64::MIN_POSITIVE)
        };
        let rgb = if r <= KNEE || r >= BLEND_END {
            c.rgb
        } else {
            let [l, chroma, h] = c.lch;
            let k = knee(r) * chroma / r;
            let linear = self.display.linear_lch([l, k, h], self.white);
            let kneed = linear.map(|v| srgb_encode(v.clamp(0.0, 1.0)));
            if r <= 1.0 {
                kneed
            } else {
                let w = smoothstep((r - 1.0) / (BLEND_END - 1.0));
                std::array::from_fn(|i| kneed[i] + w * (c.rgb[i] - kneed[i]))
            }
        };
        Shown { rgb, excess }
    }
}

/// The compressed relative chroma: r up to the knee, then a tanh curve
/// with slope 1 at the knee that approaches 1 (the gamut edge).
fn knee(r: f64) -> f64 {
    KNEE + (1.0 - KNEE) * ((r - KNEE) / (1.0 - KNEE)).tanh()
}

/// 3t² − 2t³ on 0–1: rises from 0 to 1 with zero slope at both ends.
fn smoothstep(t: f64) -> f64 {
    let t = t.clamp(0.0, 1.0);
    t * t * (3.0 - 2.0 * t)
}

/// "sRGB" or "Display P3".
pub fn space_name(space: RgbSpace) -> &'static str {
    match space {
        RgbSpace::Srgb => "sRGB",
        RgbSpace::DisplayP3 => "Display P3",
    }
}

/// "outside sRGB": the label of out-of-gamut colours.
pub fn outside_label(viewing: &Viewing) -> String {
    format!("outside {}", space_name(viewing.options.space))
}

/// The legend line for out-of-gamut marks: "outside sRGB: shown clipped".
pub fn legend(viewing: &Viewing) -> String {
    format!(
        "{}: shown {}",
        outside_label(viewing),
        match viewing.options.gamut {
            GamutMapping::Clip => "clipped",
            GamutMapping::Chroma => "chroma-reduced",
        }
    )
}

/// Spacing of hatch lines for the style `s`, in pixels.
pub fn hatch_period(s: &Style) -> f64 {
    s.px(8.0).max(5) as f64
}

/// Hatches the pixel box [x0, x1] × [y0, y1] of `area` (a light tint, thin
/// diagonal ink lines and an outline): the mark of out-of-gamut colours.
pub fn hatch<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    s: &Style,
    (x0, x1): (i32, i32),
    (y0, y1): (i32, i32),
) -> DrawResult<DB> {
    area.draw(&Rectangle::new([(x0, y0), (x1, y1)], INK.mix(0.1).filled()))?;
    let p = hatch_period(s);
    let (fx0, fx1, fy0, fy1) = (x0 as f64, x1 as f64, y0 as f64, y1 as f64);
    let h = fy1 - fy0;
    let mut x = fx0 - h;
    let lines: Vec<Vec<(i32, i32)>> = std::iter::from_fn(|| {
        x += p;
        (x <= fx1).then_some(x)
    })
    .filter_map(|x| clip((x, fy1), (x + h, fy0), (fx0, fx1), (fy0, fy1)))
    .map(|(a, b)| {
        vec![
            (a.0.round() as i32, a.1.round() as i32),
            (b.0.round() as i32, b.1.round() as i32),
        ]
    })
    .collect();
    for l in lines {
        area.draw(&PathElement::new(l, INK.stroke_width(1)))?;
    }
    area.draw(&Rectangle::new([(x0, y0), (x1, y1)], INK.stroke_width(1)))
}

/// The hatched key and `text` at the bottom left of a chart.
pub fn legend_line<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    s: &Style,
    text: &str,
) -> DrawResult<DB> {
    let (_, h) = root.dim_in_pixel();
    let y = h as i32 - s.px(14.0);
    let x = s.px(36.0);
    let kh = s.px(14.0).max(6);
    hatch(root, s, (x, x + s.px(30.0).max(12)), (y - kh, y))?;
    root.draw(&Text::new(
        text.to_string(),
        (x + s.px(40.0).max(16), y - kh / 2),
        s.text(14.0, INK).pos(Pos::new(HPos::Left, VPos::Center)),
    ))?;
    Ok(())
}

/// How much of pixel (x, y) a hatch line covers (0–1), for raster images
/// hatched pixel by pixel with the same spacing and direction as [`hatch`].
pub fn hatch_coverage(x: f64, y: f64, period: f64) -> f64 {
    // Lines run up to the right: x + y constant along each.
    let u = (x + y).rem_euclid(period);
    let d = u.min(period - u) / std::f64::consts::SQRT_2;
    (1.0 - d).clamp(0.0, 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::colorimetry::{ColourOptions, lab_to_xyz};

    const D65: [f64; 3] = [95.047, 100.0, 108.883];

    fn edge() -> SoftEdge {
        SoftEdge {
            display: RgbDisplay::new(D65, RgbSpace::Srgb),
            white: D65,
        }
    }

    fn colour(l: f64, c: f64, h: f64, gamut: GamutMapping) -> Colour {
        let (s, co) = h.to_radians().sin_cos();
        let options = ColourOptions {
            gamut,
            ..ColourOptions::default()
        };
        Colour::new(lab_to_xyz([l, c * co, c * s], D65), D65, &options)
    }

    /// Along chroma ramps that leave the gamut, the shown colour (in CIELAB)
    /// bends far less than the plainly mapped one, which kinks at the edge;
    /// away from the edge zone it is the reported colour itself, and inside
    /// the gamut it loses at most 2.4 % of its chroma.
    #[test]
    fn the_shown_colour_has_no_kink_at_the_gamut_edge() {
        use crate::colorimetry::{rgb_to_xyz_under, xyz_to_lab};
        let e = edge();
        let lab = |rgb: [f64; 3]| xyz_to_lab(rgb_to_xyz_under(rgb, D65, RgbSpace::Srgb), D65);
        let bend = |v: &[[f64; 3]]| -> f64 {
            v.windows(3)
                .map(|w| {
                    (0..3)
                        .map(|k| (w[0][k] - 2.0 * w[1][k] + w[2][k]).abs())
                        .fold(0.0, f64::max)
                })
                .fold(0.0, f64::max)
        };
        for gamut in [GamutMapping::Clip, GamutMapping::Chroma] {
            for (l, h) in [(60.0, 200.0), (70.0, 160.0), (45.0, 300.0), (55.0, 40.0)] {
                let cmax = e.display.max_chroma(l, h, D65, 400.0);
                let n = 400;
                let path: Vec<Colour> = (0..=n)
                    .map(|i| colour(l, cmax * (0.6 + 0.7 * i as f64 / n as f64), h, gamut))
                    .collect();
                let shown: Vec<[f64; 3]> = path.iter().map(|c| lab(e.show(c).rgb)).collect();
                let mapped: Vec<[f64; 3]> = path.iter().map(|c| lab(c.rgb)).collect();
                // Clipping may kink again further out (a second channel
                // reaching its limit): judge the edge itself, r up to 1.05.
                let m = path
                    .iter()
                    .position(|c| e.relative_chroma(c) > 1.05)
                    .unwrap();
                let (soft, hard) = (bend(&shown[..m]), bend(&mapped[..m]));
                assert!(
                    soft < hard / 5.0,
                    "{gamut:?} L {l} h {h}: bends {soft} shown, {hard} mapped"
                );
                for (c, s) in path.iter().zip(&shown) {
                    let r = e.relative_chroma(c);
                    if r <= KNEE || r >= BLEND_END {
                        assert_eq!(e.show(c).rgb, c.rgb);
                    } else {
                        // Inside the gamut, at most the knee's 2.4 % of chroma.
                        let d = (s[1].hypot(s[2]) - c.lch[1]) / c.lch[1];
                        assert!(!c.in_gamut || (-0.025..=1e-6).contains(&d), "{r}: {d}");
                    }
                    assert_eq!(e.show(c).excess > 0.0, !c.in_gamut);
                }
            }
        }
    }

    #[test]
    fn relative_chroma_is_one_on_the_edge() {
        let e = edge();
        let cmax = e.display.max_chroma(60.0, 200.0, D65, 400.0);
        let on = colour(60.0, cmax, 200.0, GamutMapping::Clip);
        assert!((e.relative_chroma(&on) - 1.0).abs() < 1e-6);
        assert!(on.in_gamut);
        assert!(!colour(60.0, cmax * 1.01, 200.0, GamutMapping::Clip).in_gamut);
        assert_eq!(
            e.relative_chroma(&colour(50.0, 0.0, 0.0, GamutMapping::Clip)),
            0.0
        );
    }

    #[test]
    fn hatch_lines_cover_whole_pixels_on_the_line() {
        assert_eq!(hatch_coverage(0.0, 8.0, 8.0), 1.0);
        assert_eq!(hatch_coverage(4.0, 0.0, 8.0), 0.0);
    }
}
