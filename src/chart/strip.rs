//! `angle-strip`: the colour at every angle as one continuous band over a
//! labelled angle axis, with swatches and their values at chosen angles.
//! Angles whose colour lies outside the RGB gamut are hatched in a marker
//! row under the band and named in a legend line; the band is drawn with
//! [`SoftEdge`] so that no false edge appears where colours leave the gamut.

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::canvas::{Canvas, Svg};
use super::gamut::{self, Shown, SoftEdge, hatch};
use super::style::{
    self, Caption, FRAME, INK, MUTED, SERIES, Style, capitalised, frame, num, swatch,
};
use super::{Chart, DrawResult};
use crate::angle_colour::{Viewing, angle_colours, side_by_side};
use crate::colorimetry::Colour;
use crate::error::{Error, Result};
use crate::scene::Scene;

/// Most swatches under a strip (more would not leave room for their values).
pub const MAX_TICKS: usize = 12;

/// Samples over the angle range, at least.
const SAMPLES: usize = 720;

/// Samples for an anisotropic scene, whose every angle is a 4×4
/// computation (helices sliced finely) costing far more.
const SAMPLES_4X4: usize = 90;

/// The colour at one angle of the strip.
#[derive(Debug, Clone, PartialEq)]
pub struct Sample {
    /// Angle of incidence in degrees.
    pub angle_deg: f64,
    /// The colour, as `lamella color` reports it.
    pub colour: Colour,
    /// Whether the angle is one of the scene's grid angles or ticks (drawn
    /// exactly at its column).
    pub exact: bool,
    /// What the band shows.
    pub shown: Shown,
}

/// One row of the strip: the colour under one viewing.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    /// What the row shows ("unpolarized", "through a left analyser").
    pub label: String,
    /// Angles in increasing order with their colours.
    pub samples: Vec<Sample>,
    /// Angles with a swatch and their colours.
    pub ticks: Vec<(f64, Colour)>,
    /// Angle ranges (from, to) whose colours lie outside the RGB gamut, with
    /// the edges interpolated between samples.
    pub outside: Vec<(f64, f64)>,
}

/// The colour along the angle range of a scene: one row, or for a scene
/// whose left and right differ one row per view of [`side_by_side`].
#[derive(Debug, Clone, PartialEq)]
pub struct AngleStrip {
    /// Header text.
    pub caption: Caption,
    /// The rows, the viewing asked for first.
    pub rows: Vec<Row>,
    /// The label of out-of-gamut swatches ("outside sRGB").
    pub outside_label: String,
    /// The legend line of the out-of-gamut marks ("outside sRGB: shown clipped").
    pub legend: String,
}

impl AngleStrip {
    /// Computes the colour at about `SAMPLES` angles (`SAMPLES_4X4` for an
    /// anisotropic scene) spanning the scene's
    /// angle grid (every grid angle included) and at `ticks` (default: a
    /// round step giving at most nine).
    pub fn compute(scene: &Scene, viewing: &Viewing, ticks: Option<&[f64]>) -> Result<Self> {
        let samples = if scene.anisotropic() {
            SAMPLES_4X4
        } else {
            SAMPLES
        };
        Self::compute_sampled(scene, viewing, ticks, samples)
    }

    /// Like [`AngleStrip::compute`] with about `samples` angles (at least
    /// one between grid angles): fewer for a quick view, as on a page that
    /// redraws while a slider moves.
    pub fn compute_sampled(
        scene: &Scene,
        viewing: &Viewing,
        ticks: Option<&[f64]>,
        samples: usize,
    ) -> Result<Self> {
        let grid = &scene.angles_deg;
        let (lo, hi) = grid
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &a| {
                (l.min(a), h.max(a))
            });
        if !(hi > lo) {
            return Err(Error::invalid(
                "angles_deg",
                format!("{lo}"),
                "an angle strip needs a range of angles (at least two)",
            ));
        }
        let ticks = match ticks {
            Some(t) => {
                if let Some(&bad) = t.iter().find(|&&a| !(a >= lo && a <= hi)) {
                    return Err(Error::invalid(
                        "ticks",
                        bad,
                        format!("outside the scene's angle range {lo}–{hi}°"),
                    ));
                }
                if t.is_empty() || t.len() > MAX_TICKS {
                    return Err(Error::invalid(
                        "ticks",
                        t.len(),
                        format!("give 1 to {MAX_TICKS} angles"),
                    ));
                }
                t.to_vec()
            }
            None => default_ticks(lo, hi),
        };
        let mut sorted = grid.clone();
        sorted.sort_by(f64::total_cmp);
        sorted.dedup();
        let sub = samples.div_ceil(sorted.len() - 1).max(1);
        let mut angles: Vec<(f64, bool)> = sorted
            .windows(2)
            .flat_map(|w| {
                (0..sub).map(move |j| (w[0] + (w[1] - w[0]) * j as f64 / sub as f64, j == 0))
            })
            .chain([(hi, true)])
            .chain(ticks.iter().map(|&t| (t, true)))
            .collect();
        angles.sort_by(|a, b| a.0.total_cmp(&b.0).then(b.1.cmp(&a.1)));
        angles.dedup_by(|b, a| a.0 == b.0);
        let list: Vec<f64> = angles.iter().map(|a| a.0).collect();
        let spectra = viewing.spectra_of(scene, &list)?;
        let soft = SoftEdge::new(viewing, &scene.wavelengths_nm)?;
        let views = side_by_side(viewing, &spectra);
        let rows = views
            .iter()
            .map(|v| {
                let colours = angle_colours(&spectra, v)?;
                let samples: Vec<Sample> = angles
                    .iter()
                    .zip(colours)
                    .map(|(&(angle_deg, exact), colour)| Sample {
                        angle_deg,
                        shown: soft.show(&colour),
                        colour,
                        exact,
                    })
                    .collect();
                let ticks = ticks
                    .iter()
                    .map(|&t| {
                        let i = list.partition_point(|&a| a < t);
                        (t, samples[i].colour.clone())
                    })
                    .collect();
                Ok(Row {
                    label: v.seen(),
                    outside: outside_spans(&samples),
                    samples,
                    ticks,
                })
            })
            .collect::<Result<Vec<_>>>()?;
        Ok(AngleStrip {
            caption: Caption {
                viewing: style::describe_all(&views),
                ..Caption::new(
                    &[&scene.title],
                    "Colour against angle of incidence",
                    viewing,
                )
            },
            rows,
            outside_label: gamut::outside_label(viewing),
            legend: gamut::legend(viewing),
        })
    }

    /// The pixel at the middle of row `row`'s band where angle `a` is
    /// drawn, for an image of `size`.
    pub fn pixel_of(&self, size: (u32, u32), row: usize, a: f64) -> (i32, i32) {
        let (x, band, _) = self.rows_of(size, row, a);
        (x, (band.0 + band.1) / 2)
    }

    /// For an image of `size`: the column where angle `a` is drawn, and row
    /// `row`'s band's first and last pixel rows and its marker row's.
    pub fn rows_of(&self, size: (u32, u32), row: usize, a: f64) -> (i32, (i32, i32), (i32, i32)) {
        let mut svg = Svg::default();
        let root = Canvas::new(&mut svg, size).into_drawing_area();
        let s = Style::new(size);
        let (chart, _) = self.layout(&root, &s).expect("SVG drawing cannot fail");
        let (x, _) = chart.backend_coord(&(a, 0.5));
        let (_, ys) = chart.plotting_area().get_pixel_range();
        let (band, marks) = rows(ys.start, ys.end, &s, self.rows.len())[row];
        (x, band, marks)
    }

    fn range(&self) -> (f64, f64) {
        let samples = &self.rows[0].samples;
        (samples[0].angle_deg, samples[samples.len() - 1].angle_deg)
    }

    /// The left margin: room for the row labels when there are several.
    fn label_width(&self, s: &Style) -> i32 {
        if self.rows.len() > 1 {
            s.px(210.0)
        } else {
            s.px(14.0)
        }
    }

    #[allow(clippy::type_complexity)]
    fn layout<'a, DB: DrawingBackend>(
        &self,
        root: &'a DrawingArea<DB, Shift>,
        s: &Style,
    ) -> std::result::Result<
        (
            ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
            DrawingArea<DB, Shift>,
        ),
        DrawingAreaErrorKind<DB::ErrorType>,
    > {
        let body = frame(root, &self.caption, s)?;
        let (_, h) = body.dim_in_pixel();
        let (top, bottom) = body.split_vertically(h as i32 * 45 / 100);
        let (lo, hi) = self.range();
        let mut chart = ChartBuilder::on(&top)
            .margin_top(s.px(26.0))
            .margin_left(self.label_width(s))
            .margin_right(s.px(14.0))
            .x_label_area_size(s.px(62.0))
            .build_cartesian_2d(lo..hi, 0.0..1.0)?;
        chart
            .configure_mesh()
            .disable_x_mesh()
            .disable_y_mesh()
            .disable_y_axis()
            .x_desc("Angle of incidence (degrees)")
            .axis_desc_style(s.axis())
            .label_style(s.tick())
            .x_label_formatter(&|v| format!("{}°", style::tick(v)))
            .axis_style(FRAME.stroke_width(1))
            .set_all_tick_mark_size(s.px(5.0))
            .x_labels(12)
            .draw()?;
        Ok((chart, bottom))
    }
}

/// A band's and its marker row's first and last pixel rows.
type Rows = ((i32, i32), (i32, i32));

/// The band's and the marker row's first and last pixel rows of each of `n`
/// rows stacked within the plotting rows `top..bottom`.
fn rows(top: i32, bottom: i32, s: &Style, n: usize) -> Vec<Rows> {
    let mark = s.px(14.0).max(6);
    let gap = s.px(5.0).max(2);
    let between = if n > 1 { s.px(12.0).max(4) } else { 0 };
    let n = n as i32;
    let height = (bottom - top - between * (n - 1)) / n;
    (0..n)
        .map(|k| {
            let t = top + k * (height + between);
            let b = t + height;
            ((t, b - mark - gap - 1), (b - mark, b - 1))
        })
        .collect()
}

/// Runs of samples outside the gamut, each edge placed where the relative
/// chroma crosses 1 between the neighbouring samples.
fn outside_spans(samples: &[Sample]) -> Vec<(f64, f64)> {
    let edge = |p: &Sample, q: &Sample| {
        let (e0, e1) = (p.shown.excess, q.shown.excess);
        let t = if (e0 - e1).abs() > 0.0 && e0.is_finite() && e1.is_finite() {
            (e0 / (e0 - e1)).clamp(0.0, 1.0)
        } else {
            0.5
        };
        p.angle_deg + t * (q.angle_deg - p.angle_deg)
    };
    let mut spans = Vec::new();
    let mut start: Option<f64> = None;
    for (i, x) in samples.iter().enumerate() {
        let out = !x.colour.in_gamut;
        match (out, start) {
            (true, None) => {
                start = Some(if i == 0 {
                    x.angle_deg
                } else {
                    edge(&samples[i - 1], x)
                })
            }
            (false, Some(a)) => {
                spans.push((a, edge(&samples[i - 1], x)));
                start = None;
            }
            _ => {}
        }
    }
    if let (Some(a), Some(last)) = (start, samples.last()) {
        spans.push((a, last.angle_deg));
    }
    spans
}

/// "0°–38.6°, 70°–75°" (at most three ranges, then "…").
fn span_list(spans: &[(f64, f64)]) -> String {
    let one = |&(a, b): &(f64, f64)| {
        if (b - a).abs() < 0.05 {
            format!("{}°", num(a, 1).trim_end_matches(".0"))
        } else {
            format!(
                "{}°–{}°",
                num(a, 1).trim_end_matches(".0"),
                num(b, 1).trim_end_matches(".0")
            )
        }
    };
    let mut parts: Vec<String> = spans.iter().take(3).map(one).collect();
    if spans.len() > 3 {
        parts.push("…".into());
    }
    parts.join(", ")
}

/// A round step (1, 2, 5, 10, 15, 20, 30 or 45°) giving at most nine swatches.
fn default_ticks(lo: f64, hi: f64) -> Vec<f64> {
    let step = [1.0, 2.0, 5.0, 10.0, 15.0, 20.0, 30.0, 45.0]
        .into_iter()
        .find(|st| ((hi + 1e-9) / st).floor() - ((lo - 1e-9) / st).ceil() < 9.0)
        .unwrap_or(45.0);
    let first = ((lo - 1e-9) / step).ceil() as i64;
    let last = ((hi + 1e-9) / step).floor() as i64;
    let mut t: Vec<f64> = (first..=last).map(|i| i as f64 * step).collect();
    if t.is_empty() {
        t = vec![lo, hi];
    }
    t
}

impl Chart for AngleStrip {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let (chart, bottom) = self.layout(root, &s)?;
        let area = chart.plotting_area().strip_coord_spec();
        let (xs, ys) = area.get_pixel_range();
        let (x0, _) = area.get_base_pixel();
        let (rx, ry) = root.get_base_pixel();
        let w = (xs.end - xs.start) as usize;
        let stacked = rows(ys.start, ys.end, &s, self.rows.len());
        for (row, &(band, marks)) in self.rows.iter().zip(&stacked) {
            let h = band.1 - band.0 + 1;
            let dy = band.0 - ys.start;
            for (a, b, colour) in self.runs(row, &chart, (x0, w)) {
                area.draw(&Rectangle::new(
                    [(a as i32, dy), (b as i32, dy + h - 1)],
                    colour.filled(),
                ))?;
            }
            // The frame lies just outside, so the end columns show their colour.
            let (ax, ay) = (x0 - rx - 1, band.0 - ry - 1);
            root.draw(&Rectangle::new(
                [(ax, ay), (ax + w as i32 + 1, ay + h + 1)],
                FRAME.stroke_width(1),
            ))?;
            // The marker row: out-of-gamut angle ranges hatched.
            for &(a, b) in &row.outside {
                let (xa, _) = chart.backend_coord(&(a, 0.5));
                let (xb, _) = chart.backend_coord(&(b, 0.5));
                hatch(
                    root,
                    &s,
                    (xa - rx, (xb - rx).max(xa - rx + 2)),
                    (marks.0 - ry, marks.1 - ry),
                )?;
            }
            if self.rows.len() > 1 {
                root.draw(&Text::new(
                    capitalised(&row.label),
                    (ax - s.px(12.0), (band.0 + band.1) / 2 - ry),
                    s.bold(14.0, INK).pos(Pos::new(HPos::Right, VPos::Center)),
                ))?;
            }
        }
        match self.rows.as_slice() {
            [one] if !one.outside.is_empty() => {
                let text = format!("{} ({})", self.legend, span_list(&one.outside));
                gamut::legend_line(root, &s, &text)?;
            }
            many if many.iter().any(|r| !r.outside.is_empty()) => {
                let text = format!("{} (hatched under each row)", self.legend);
                gamut::legend_line(root, &s, &text)?;
            }
            _ => {}
        }
        // Markers above the strip at the swatch angles.
        let m = s.px(7.0);
        let base = root.get_base_pixel();
        for (a, _) in &self.rows[0].ticks {
            let (px, py) = chart.backend_coord(&(*a, 1.0));
            let (x, y) = (px - base.0, py - base.1);
            root.draw(&Polygon::new(
                vec![
                    (x - m, y - 2 * m - s.px(3.0)),
                    (x + m, y - 2 * m - s.px(3.0)),
                    (x, y - s.px(3.0)),
                ],
                INK.filled(),
            ))?;
        }
        if self.rows.len() > 1 {
            self.draw_swatch_rows(&bottom, &s, (x0, xs.end - xs.start))
        } else {
            self.draw_swatches(&bottom, &s, (x0, xs.end - xs.start))
        }
    }
}

impl AngleStrip {
    /// The band of `row` as runs of equal colour (first column, last
    /// column, colour) over `w` columns from `x0`: each column shows the
    /// sample mapped into it (grid angles and ticks first), or the nearest
    /// sample by angle when none falls inside.
    fn runs<DB: DrawingBackend>(
        &self,
        row: &Row,
        chart: &ChartContext<'_, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
        (x0, w): (i32, usize),
    ) -> Vec<(usize, usize, RGBColor)> {
        let samples = &row.samples;
        let mut column: Vec<Option<(usize, bool)>> = vec![None; w];
        for (i, x) in samples.iter().enumerate() {
            let (px, _) = chart.backend_coord(&(x.angle_deg, 0.5));
            let c = ((px - x0).max(0) as usize).min(w - 1);
            if column[c].is_none_or(|(_, e)| x.exact && !e) {
                column[c] = Some((i, x.exact));
            }
        }
        let (lo, hi) = self.range();
        let mut runs: Vec<(usize, usize, RGBColor)> = Vec::new();
        for (c, slot) in column.iter().enumerate() {
            let i = slot.map_or_else(
                || {
                    let a = lo + (hi - lo) * (c as f64 + 0.5) / w as f64;
                    let k = samples.partition_point(|x| x.angle_deg < a);
                    [k.saturating_sub(1), k.min(samples.len() - 1)]
                        .into_iter()
                        .min_by(|&p, &q| {
                            (samples[p].angle_deg - a)
                                .abs()
                                .total_cmp(&(samples[q].angle_deg - a).abs())
                        })
                        .unwrap_or(0)
                },
                |(i, _)| i,
            );
            let colour = samples[i].shown.colour();
            match runs.last_mut() {
                Some((_, end, last)) if *last == colour => *end = c,
                _ => runs.push((c, c, colour)),
            }
        }
        runs
    }

    /// Several rows: under each tick angle one swatch per row with its hex
    /// code and L*, the rows labelled at the left as over the bands.
    fn draw_swatch_rows<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
        (x0, width): (i32, i32),
    ) -> DrawResult<DB> {
        let base = area.get_base_pixel();
        let (_, h) = area.dim_in_pixel();
        let ticks = &self.rows[0].ticks;
        let cell = width / ticks.len() as i32;
        let top = s.px(24.0);
        let line = s.px(19.0);
        let first = top + s.px(26.0);
        let pitch = (h as i32 - first - s.px(30.0)) / self.rows.len() as i32;
        let side = (pitch - 2 * line - s.px(12.0))
            .min(cell * 6 / 10)
            .max(s.px(10.0));
        let centre = Pos::new(HPos::Center, VPos::Top);
        for (k, (a, _)) in ticks.iter().enumerate() {
            let cx = x0 - base.0 + cell * k as i32 + cell / 2;
            area.draw(&Text::new(
                format!("{}°", style::tick(a)),
                (cx, top),
                s.bold(15.0, INK).pos(centre),
            ))?;
        }
        for (r, row) in self.rows.iter().enumerate() {
            let sy = first + pitch * r as i32;
            area.draw(&Text::new(
                capitalised(&row.label),
                (x0 - base.0 - s.px(13.0), sy + side / 2),
                s.bold(14.0, INK).pos(Pos::new(HPos::Right, VPos::Center)),
            ))?;
            for (k, (_, c)) in row.ticks.iter().enumerate() {
                let cx = x0 - base.0 + cell * k as i32 + cell / 2;
                let square = [(cx - side / 2, sy), (cx + side / 2, sy + side)];
                area.draw(&Rectangle::new(square, swatch(c).filled()))?;
                area.draw(&Rectangle::new(square, FRAME.stroke_width(1)))?;
                if !c.in_gamut {
                    hatch(
                        area,
                        s,
                        (cx + side / 2 + s.px(3.0), cx + side / 2 + s.px(9.0)),
                        (sy, sy + side),
                    )?;
                }
                let hex = if c.in_gamut {
                    c.hex.clone()
                } else {
                    format!("≈ {}", c.hex)
                };
                let y = sy + side + s.px(4.0);
                area.draw(&Text::new(hex, (cx, y), s.text(13.0, INK).pos(centre)))?;
                area.draw(&Text::new(
                    format!("L* {}", num(c.lab[0], 1)),
                    (cx, y + line),
                    s.text(12.0, MUTED).pos(centre),
                ))?;
            }
        }
        Ok(())
    }

    fn draw_swatches<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
        (x0, width): (i32, i32),
    ) -> DrawResult<DB> {
        let base = area.get_base_pixel();
        let ticks = &self.rows[0].ticks;
        let n = ticks.len() as i32;
        let cell = width / n;
        let side = (cell * 7 / 10).min(s.px(120.0));
        let top = s.px(24.0);
        let line = s.px(22.0);
        let centre = Pos::new(HPos::Center, VPos::Top);
        for (k, (a, c)) in ticks.iter().enumerate() {
            let cx = x0 - base.0 + cell * k as i32 + cell / 2;
            area.draw(&Text::new(
                format!("{}°", style::tick(a)),
                (cx, top),
                s.bold(15.0, INK).pos(centre),
            ))?;
            let sy = top + s.px(28.0);
            area.draw(&Rectangle::new(
                [(cx - side / 2, sy), (cx + side / 2, sy + side)],
                swatch(c).filled(),
            ))?;
            area.draw(&Rectangle::new(
                [(cx - side / 2, sy), (cx + side / 2, sy + side)],
                FRAME.stroke_width(1),
            ))?;
            // Out of gamut: a hatched tag under the swatch, as in the marker row.
            if !c.in_gamut {
                hatch(
                    area,
                    s,
                    (cx - side / 2, cx + side / 2),
                    (sy + side + s.px(3.0), sy + side + s.px(13.0)),
                )?;
            }
            let mut y = sy + side + s.px(20.0);
            let mut put = |t: String, st: TextStyle<'static>| -> DrawResult<DB> {
                area.draw(&Text::new(t, (cx, y), st.pos(centre)))?;
                y += line;
                Ok(())
            };
            // Out of gamut: "≈" before the hex code where it fits the cell.
            let approx = format!("≈ {}", c.hex);
            let hex = if c.in_gamut
                || super::font::width(&approx, s.size(15.0), FontStyle::Normal) > 0.95 * cell as f64
            {
                c.hex.clone()
            } else {
                approx
            };
            put(hex, s.text(15.0, INK))?;
            put(format!("L* {}", num(c.lab[0], 1)), s.text(14.0, MUTED))?;
            put(format!("a* {}", num(c.lab[1], 1)), s.text(14.0, MUTED))?;
            put(format!("b* {}", num(c.lab[2], 1)), s.text(14.0, MUTED))?;
            // The label in full where it fits the cell, else shortened.
            let fits = |t: &str| {
                super::font::width(t, s.size(14.0), FontStyle::Bold) <= 0.95 * cell as f64
            };
            if let Some(label) = [self.outside_label.as_str(), "outside"]
                .into_iter()
                .find(|t| fits(t))
                .filter(|_| !c.in_gamut)
            {
                put(label.to_string(), s.bold(14.0, SERIES[1]))?;
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::{default_ticks, span_list};

    #[test]
    fn default_ticks_use_a_round_step_and_at_most_nine() {
        assert_eq!(
            default_ticks(0.0, 80.0),
            (0..=8).map(|i| i as f64 * 10.0).collect::<Vec<_>>()
        );
        assert_eq!(
            default_ticks(0.0, 60.0),
            vec![0.0, 10.0, 20.0, 30.0, 40.0, 50.0, 60.0]
        );
        assert_eq!(default_ticks(12.0, 14.0), vec![12.0, 13.0, 14.0]);
        assert!(default_ticks(0.0, 89.0).len() <= 9);
    }

    #[test]
    fn span_lists_are_short() {
        assert_eq!(span_list(&[(0.0, 38.64)]), "0°–38.6°");
        assert_eq!(span_list(&[(10.0, 10.0), (20.0, 30.5)]), "10°, 20°–30.5°");
        assert!(span_list(&[(1.0, 2.0); 5]).ends_with("…"));
    }
}
