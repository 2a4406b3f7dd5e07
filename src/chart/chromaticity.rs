//! `chromaticity`: the colour trajectory over angle on the CIE xy diagram,
//! with the spectrum locus, the sRGB gamut and the light's white point; the
//! whole diagram on the left, the region of the data enlarged on the right.

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::canvas::{Canvas, Svg};
use super::style::{
    self, Caption, INK, MUTED, SERIES, Series, Style, clip, frame, legend, mesh, swatch,
};
use super::{Chart, DrawResult};
use crate::angle_colour::Viewing;
use crate::colorimetry::{Observer, chromaticity};
use crate::error::Result;
use crate::scene::Scene;

/// Chromaticities of the sRGB primaries red, green, blue
/// (IEC 61966-2-1:1999, from ITU-R BT.709).
pub const SRGB_PRIMARIES: [(f64, f64); 3] = [(0.64, 0.33), (0.30, 0.60), (0.15, 0.06)];

/// Wavelengths (nm) labelled on the locus.
const LOCUS_LABELS: [f64; 13] = [
    450.0, 470.0, 480.0, 490.0, 500.0, 510.0, 520.0, 540.0, 560.0, 580.0, 600.0, 620.0, 700.0,
];

/// Trajectories on the chromaticity diagram.
#[derive(Debug, Clone, PartialEq)]
pub struct Chromaticity {
    /// Header text.
    pub caption: Caption,
    /// The observer (its locus and its xy).
    pub observer: Observer,
    /// The spectrum locus (wavelength, x, y).
    pub locus: Vec<(f64, f64, f64)>,
    /// The white point of the light.
    pub white: [f64; 2],
    /// Name of the light.
    pub light: String,
    /// One trajectory per scene.
    pub series: Vec<Series>,
}

type Xy = Cartesian2d<RangedCoordf64, RangedCoordf64>;

impl Chromaticity {
    /// The trajectory of each scene; the first scene's viewing gives the
    /// light, observer and white point.
    pub fn compute(scenes: &[(&Scene, &Viewing)]) -> Result<Self> {
        let (first, viewing) = scenes[0];
        let (series, seen) = Series::of_scenes(scenes)?;
        let white = viewing.weights(&first.wavelengths_nm)?.white();
        let titles: Vec<&str> = scenes.iter().map(|(s, _)| s.title.as_str()).collect();
        Ok(Chromaticity {
            caption: Caption {
                viewing: seen,
                ..Caption::new(
                    &titles,
                    &format!(
                        "Chromaticity against angle of incidence ({} xy diagram)",
                        style::observer_name(viewing.observer)
                    ),
                    viewing,
                )
            },
            observer: viewing.observer,
            locus: viewing.observer.spectrum_locus(),
            white: chromaticity(white, white),
            light: viewing.illuminant.name().to_string(),
            series,
        })
    }

    /// The pixel of chromaticity `xy` on the whole diagram (left panel) in
    /// an image of `size`.
    pub fn pixel_of(&self, size: (u32, u32), xy: (f64, f64)) -> (i32, i32) {
        let mut svg = Svg::default();
        let root = Canvas::new(&mut svg, size).into_drawing_area();
        let s = Style::new(size);
        let body = frame(&root, &self.caption, &s).expect("SVG drawing cannot fail");
        let (full, _) = self.panels(&body, &s);
        let (xr, yr) = whole(&full, &s);
        let chart = self
            .build(&full, &s, xr, yr)
            .expect("SVG drawing cannot fail");
        chart.backend_coord(&xy)
    }

    /// Left square-ish panel for the whole diagram, the rest for the enlargement.
    fn panels<DB: DrawingBackend>(
        &self,
        body: &DrawingArea<DB, Shift>,
        s: &Style,
    ) -> (DrawingArea<DB, Shift>, DrawingArea<DB, Shift>) {
        let (w, h) = body.dim_in_pixel();
        let plot_h = h as i32 - s.px(62.0) - s.px(8.0);
        let left = (plot_h as f64 * 0.8 / 0.9) as i32 + s.px(74.0) + s.px(30.0);
        body.split_horizontally(left.min(w as i32 * 52 / 100))
    }

    fn build<'a, DB: DrawingBackend>(
        &self,
        area: &'a DrawingArea<DB, Shift>,
        s: &Style,
        xr: (f64, f64),
        yr: (f64, f64),
    ) -> std::result::Result<ChartContext<'a, DB, Xy>, DrawingAreaErrorKind<DB::ErrorType>> {
        let mut chart = ChartBuilder::on(area)
            .margin_top(s.px(8.0))
            .margin_right(s.px(30.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(74.0))
            .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)?;
        let (xn, yn) = if self.observer == Observer::Cie1931_2 {
            ("x", "y")
        } else {
            ("x₁₀", "y₁₀")
        };
        mesh(
            &mut chart,
            s,
            &format!("Chromaticity {xn} (dimensionless)"),
            &format!("Chromaticity {yn}"),
            &|v| style::num(*v, 2),
            &|v| style::num(*v, 2),
        )?;
        Ok(chart)
    }

    /// Locus, its closing purple line, the sRGB triangle and the white point,
    /// clipped to the chart's range.
    fn context<DB: DrawingBackend>(
        &self,
        chart: &mut ChartContext<DB, Xy>,
        s: &Style,
        labels: bool,
    ) -> DrawResult<DB> {
        let (xr, yr) = (chart.x_range(), chart.y_range());
        let bx = (xr.start, xr.end);
        let by = (yr.start, yr.end);
        let mut segments = |pts: &[(f64, f64)], style: ShapeStyle| -> DrawResult<DB> {
            let cut: Vec<_> = pts
                .windows(2)
                .filter_map(|w| clip(w[0], w[1], bx, by))
                .map(|(a, b)| PathElement::new(vec![a, b], style))
                .collect();
            chart.draw_series(cut)?;
            Ok(())
        };
        let locus: Vec<(f64, f64)> = self.locus.iter().map(|&(_, x, y)| (x, y)).collect();
        segments(&locus, INK.stroke_width(s.line(2.0)))?;
        segments(
            &[locus[0], locus[locus.len() - 1]],
            MUTED.stroke_width(s.line(1.0)),
        )?;
        let mut tri = SRGB_PRIMARIES.to_vec();
        tri.push(tri[0]);
        segments(&tri, SERIES[3].stroke_width(s.line(2.0)))?;
        if labels {
            for ((x, y), name) in SRGB_PRIMARIES.iter().zip(["R", "G", "B"]) {
                chart.draw_series(std::iter::once(Text::new(
                    name,
                    (*x, *y),
                    s.bold(13.0, SERIES[3])
                        .pos(Pos::new(HPos::Center, VPos::Center)),
                )))?;
            }
            for &wl in &LOCUS_LABELS {
                let i = self.locus.iter().position(|p| p.0 == wl);
                let Some(i) = i else { continue };
                let (a, b) = (
                    self.locus[i.saturating_sub(3)],
                    self.locus[(i + 3).min(self.locus.len() - 1)],
                );
                // Outward normal of the locus, which runs clockwise from
                // violet in xy (up the blue side, down the red side).
                let (dx, dy) = (b.1 - a.1, b.2 - a.2);
                let n = dx.hypot(dy).max(1e-12);
                let (nx, ny) = (-dy / n, dx / n);
                let p = (self.locus[i].1, self.locus[i].2);
                let (px, py) = chart.backend_coord(&p);
                let base = chart.plotting_area().get_base_pixel();
                let area = chart.plotting_area().strip_coord_spec();
                let text = format!("{}", wl as i64);
                // Outside the locus unless that would leave the plot; then inside.
                let room = px - base.0 - s.px(12.0);
                let width = super::font::width(&text, s.size(12.0), FontStyle::Normal);
                let (nx, ny) = if nx < -0.3 && (room as f64) < width {
                    (-nx, -ny)
                } else {
                    (nx, ny)
                };
                let out = s.px(8.0) as f64;
                let tip = (px + (nx * out) as i32, py - (ny * out) as i32);
                area.draw(&PathElement::new(
                    vec![(px - base.0, py - base.1), (tip.0 - base.0, tip.1 - base.1)],
                    INK.stroke_width(1),
                ))?;
                let h = if nx > 0.3 {
                    HPos::Left
                } else if nx < -0.3 {
                    HPos::Right
                } else {
                    HPos::Center
                };
                let v = if ny > 0.3 {
                    VPos::Bottom
                } else if ny < -0.3 {
                    VPos::Top
                } else {
                    VPos::Center
                };
                area.draw(&Text::new(
                    text,
                    (
                        tip.0 - base.0 + (nx * 3.0) as i32,
                        tip.1 - base.1 - (ny * 3.0) as i32,
                    ),
                    s.text(12.0, MUTED).pos(Pos::new(h, v)),
                ))?;
            }
        }
        let (wx, wy) = (self.white[0], self.white[1]);
        if wx >= bx.0 && wx <= bx.1 && wy >= by.0 && wy <= by.1 {
            let m = s.px(7.0);
            chart.draw_series(std::iter::once(
                EmptyElement::at((wx, wy))
                    + PathElement::new(vec![(-m, 0), (m, 0)], INK.stroke_width(s.line(2.0)))
                    + PathElement::new(vec![(0, -m), (0, m)], INK.stroke_width(s.line(2.0))),
            ))?;
            let (px, py) = chart.backend_coord(&(wx, wy));
            let base = chart.plotting_area().get_base_pixel();
            chart.plotting_area().strip_coord_spec().draw(&Text::new(
                format!("{} white", self.light),
                (px - base.0 + m + s.px(3.0), py - base.1 + m),
                s.text(13.0, INK).pos(Pos::new(HPos::Left, VPos::Top)),
            ))?;
        }
        Ok(())
    }

    /// Trajectories: a line per scene, points in their own colour, angles labelled.
    fn trajectories<DB: DrawingBackend>(
        &self,
        chart: &mut ChartContext<DB, Xy>,
        s: &Style,
        labels: bool,
    ) -> DrawResult<DB> {
        for (k, series) in self.series.iter().enumerate() {
            let line = SERIES[k % SERIES.len()];
            let pts: Vec<(f64, f64)> = series.colours.iter().map(|c| (c.xy[0], c.xy[1])).collect();
            chart.draw_series(LineSeries::new(pts.clone(), line.stroke_width(s.line(2.0))))?;
            let r = if labels { s.px(6.0) } else { s.px(3.0) } as u32;
            chart.draw_series(pts.iter().zip(&series.colours).map(|(&p, c)| {
                EmptyElement::at(p)
                    + Circle::new((0, 0), r, swatch(c).filled())
                    + Circle::new((0, 0), r, line.stroke_width(s.line(1.5)))
            }))?;
        }
        if labels {
            style::angle_labels(chart, s, &self.series, &|c| (c.xy[0], c.xy[1]))?;
        }
        Ok(())
    }

    /// Range of the enlargement: the data and the white point, padded, with
    /// equal scales on both axes for a plot of `w` × `h` pixels.
    fn zoom(&self, w: f64, h: f64) -> ((f64, f64), (f64, f64)) {
        let pts = self
            .series
            .iter()
            .flat_map(|s| s.colours.iter().map(|c| (c.xy[0], c.xy[1])))
            .chain([(self.white[0], self.white[1])]);
        let (mut x0, mut x1, mut y0, mut y1) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
        for (x, y) in pts {
            (x0, x1, y0, y1) = (x0.min(x), x1.max(x), y0.min(y), y1.max(y));
        }
        let span = ((x1 - x0).max(y1 - y0) * 1.3).max(0.03);
        let (cx, cy) = ((x0 + x1) / 2.0, (y0 + y1) / 2.0);
        let (sx, sy) = if w >= h {
            (span * w / h, span)
        } else {
            (span, span * h / w)
        };
        (
            (cx - sx / 2.0, cx + sx / 2.0),
            (cy - sy / 2.0, cy + sy / 2.0),
        )
    }
}

impl Chromaticity {
    /// What the lines and marks of the whole diagram are, at its top right.
    fn key<DB: DrawingBackend>(&self, area: &DrawingArea<DB, Shift>, s: &Style) -> DrawResult<DB> {
        let (w, _) = area.dim_in_pixel();
        let line = s.px(22.0);
        let x = w as i32 - s.px(190.0);
        let mut y = s.px(14.0);
        let label = Pos::new(HPos::Left, VPos::Center);
        let entries: [(&str, RGBColor); 3] = [
            ("spectrum locus (nm)", INK),
            ("sRGB gamut", SERIES[3]),
            (
                if self.series.len() == 1 {
                    "angle trajectory"
                } else {
                    "angle trajectories"
                },
                SERIES[0],
            ),
        ];
        for (text, colour) in entries {
            area.draw(&PathElement::new(
                vec![(x, y), (x + s.px(26.0), y)],
                colour.stroke_width(s.line(2.0)),
            ))?;
            area.draw(&Text::new(
                text,
                (x + s.px(34.0), y),
                s.text(13.0, INK).pos(label),
            ))?;
            y += line;
        }
        let m = s.px(6.0);
        let cx = x + s.px(13.0);
        area.draw(&PathElement::new(
            vec![(cx - m, y), (cx + m, y)],
            INK.stroke_width(s.line(2.0)),
        ))?;
        area.draw(&PathElement::new(
            vec![(cx, y - m), (cx, y + m)],
            INK.stroke_width(s.line(2.0)),
        ))?;
        area.draw(&Text::new(
            format!("white point ({})", self.light),
            (x + s.px(34.0), y),
            s.text(13.0, INK).pos(label),
        ))?;
        Ok(())
    }
}

/// Pixel size of the plot [`Chromaticity::build`] makes on `area`.
fn plot_size<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, s: &Style) -> (f64, f64) {
    let (w, h) = area.dim_in_pixel();
    (
        (w as i32 - s.px(74.0) - s.px(30.0)) as f64,
        (h as i32 - s.px(62.0) - s.px(8.0)) as f64,
    )
}

/// The whole diagram (x 0–0.8, y 0–0.9) with equal scales on `area`.
fn whole<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, s: &Style) -> ((f64, f64), (f64, f64)) {
    let (w, h) = plot_size(area, s);
    let (xr, yr) = style::equal_scales((0.0, 0.8), (0.0, 0.9), w, h);
    // Keep the origin at the corner: put any extra room on the far side.
    ((0.0, xr.1 - xr.0), (0.0, yr.1 - yr.0))
}

impl Chart for Chromaticity {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let (full, rest) = self.panels(&body, &s);
        let (xr, yr) = whole(&full, &s);
        let mut chart = self.build(&full, &s, xr, yr)?;
        self.context(&mut chart, &s, true)?;
        self.trajectories(&mut chart, &s, false)?;
        self.key(&chart.plotting_area().strip_coord_spec(), &s)?;
        let (pw, ph) = plot_size(&rest, &s);
        let (zx, zy) = self.zoom(pw, ph);
        chart.draw_series(std::iter::once(Rectangle::new(
            [
                (zx.0.max(0.0), zy.0.max(0.0)),
                (zx.1.min(0.8), zy.1.min(0.9)),
            ],
            MUTED.stroke_width(1),
        )))?;
        let mut zoom = self.build(&rest, &s, zx, zy)?;
        self.context(&mut zoom, &s, false)?;
        self.trajectories(&mut zoom, &s, true)?;
        if self.series.len() > 1 {
            legend(&zoom.plotting_area().strip_coord_spec(), &s, &self.series)?;
        }
        Ok(())
    }
}
