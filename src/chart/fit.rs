//! `fit`: measured against fitted spectra, each with its residual panel
//! below on the same wavelength axis; one pair of panels per measured angle
//! or geometry.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::style::{self, Caption, FRAME, INK, MUTED, SERIES, Style, faded, frame, mesh};
use super::{Chart, DrawResult};
use crate::design::fit::{FitOutcome, Measured};
use crate::error::{Error, Result};

/// The fitted model's colour; the measured data are drawn in ink.
const FITTED: RGBColor = SERIES[1];

/// One measured angle or geometry with its fit, in %.
#[derive(Debug, Clone, PartialEq)]
pub struct FitPanel {
    /// The angle (`45°`) or geometry name (`45as15`).
    pub label: String,
    /// Root-mean-square residual, % (percentage points).
    pub rms: f64,
    /// Wavelengths, nm.
    pub wavelengths_nm: Vec<f64>,
    /// Measured values, %.
    pub measured: Vec<f64>,
    /// Fitted model values (the scale applied), %.
    pub fitted: Vec<f64>,
}

/// Measured and fitted spectra with residuals.
#[derive(Debug, Clone, PartialEq)]
pub struct FitChart {
    /// Header text.
    pub caption: Caption,
    /// Title of the spectra's value axis.
    pub quantity: String,
    /// Whether the values are reflectance factors (which may exceed 100 %).
    pub factor: bool,
    /// One panel pair per measured angle or geometry.
    pub panels: Vec<FitPanel>,
}

/// Most panels one chart holds legibly.
pub const MOST_PANELS: usize = 12;

impl FitChart {
    /// The chart of `outcome`, the fit of the scene titled `title` to
    /// `measured` (the data the fit was given).
    pub fn new(title: &str, outcome: &FitOutcome, measured: &[Measured]) -> Result<Self> {
        Self::check(measured)?;
        let coating = measured.iter().any(|m| m.at.geometry().is_some());
        let pct = |v: &[f64]| v.iter().map(|x| 100.0 * x).collect::<Vec<_>>();
        let panels = measured
            .iter()
            .zip(&outcome.fitted)
            .enumerate()
            .map(|(i, (m, f))| FitPanel {
                label: match &m.at {
                    crate::design::coating::At::Angle(a) => format!("{}°", style::tick(a)),
                    crate::design::coating::At::Geometry(g) => g.name.clone(),
                },
                rms: 100.0 * outcome.rms_of(i, measured),
                wavelengths_nm: m.wavelengths_nm.clone(),
                measured: pct(&m.r),
                fitted: pct(f),
            })
            .collect();
        let mut viewing = format!(
            "rms residual {} % over {} points · {} thickness{} fitted",
            style::num(100.0 * outcome.rms, 3),
            outcome.points,
            outcome.variables.len(),
            if outcome.variables.len() == 1 {
                ""
            } else {
                "es"
            }
        );
        if let Some((scale, _)) = outcome.scale {
            viewing.push_str(&format!(" · intensity scale {}", style::num(scale, 3)));
        }
        Ok(FitChart {
            caption: Caption {
                title: if title.trim().is_empty() {
                    "Untitled scene".into()
                } else {
                    title.into()
                },
                subject: if coating {
                    "Measured and fitted reflectance factor at each geometry, with residuals"
                } else {
                    "Measured and fitted unpolarized reflectance, with residuals"
                }
                .into(),
                viewing,
            },
            quantity: if coating {
                "Reflectance factor (%)"
            } else {
                "Reflectance (%)"
            }
            .into(),
            factor: coating,
            panels,
        })
    }

    /// Ok when a chart can hold `measured`: 1 to [`MOST_PANELS`] angles or
    /// geometries (front ends check before fitting).
    pub fn check(measured: &[Measured]) -> Result<()> {
        if measured.is_empty() || measured.len() > MOST_PANELS {
            return Err(Error::invalid(
                "measured",
                format!("{} angles or geometries", measured.len()),
                format!("a fit chart draws 1 to {MOST_PANELS} of them"),
            ));
        }
        Ok(())
    }

    /// Columns and rows of the panel grid.
    fn grid(&self) -> (usize, usize) {
        let n = self.panels.len();
        let cols = match n {
            0..=3 => n.max(1),
            4 => 2,
            _ => 3,
        };
        (cols, n.div_ceil(cols))
    }

    /// A size that gives each row of panels about the height of a
    /// single-row chart's: 1200 × 800 for one row, taller for more.
    pub fn default_size(&self) -> (u32, u32) {
        let (_, rows) = self.grid();
        (1200, 800 + 420 * (rows as u32 - 1))
    }

    /// Wavelength range, spectrum top and residual half-range over all panels.
    fn ranges(&self) -> ((f64, f64), f64, f64) {
        let (mut lo, mut hi, mut top, mut res) = (f64::INFINITY, f64::NEG_INFINITY, 0.0f64, 0.0f64);
        for p in &self.panels {
            for ((&w, &m), &f) in p.wavelengths_nm.iter().zip(&p.measured).zip(&p.fitted) {
                (lo, hi) = (lo.min(w), hi.max(w));
                top = top.max(m).max(f);
                res = res.max((m - f).abs());
            }
        }
        if hi <= lo {
            (lo, hi) = (lo - 1.0, lo + 1.0);
        }
        // Reflectance tops out at 100 %; a reflectance factor need not.
        let top = if self.factor || top > 100.0 {
            nice_up(top * 1.08)
        } else {
            nice_up(top * 1.08).min(100.0)
        };
        ((lo, hi), top.max(1.0), nice_up(res * 1.15).max(0.1))
    }

    fn cell<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
        p: &FitPanel,
        (x, top, res): ((f64, f64), f64, f64),
        bottom_row: bool,
    ) -> DrawResult<DB> {
        let (_, h) = area.dim_in_pixel();
        let head = s.px(30.0);
        area.draw(&Text::new(
            p.label.clone(),
            (s.px(8.0), s.px(4.0)),
            s.bold(15.0, INK).pos(Pos::new(HPos::Left, VPos::Top)),
        ))?;
        let label_w = super::font::width(&p.label, s.size(15.0), FontStyle::Bold).round() as i32;
        area.draw(&Text::new(
            format!("rms {} %", style::num(p.rms, 2)),
            (s.px(8.0) + label_w + s.px(12.0), s.px(5.0)),
            s.text(14.0, MUTED).pos(Pos::new(HPos::Left, VPos::Top)),
        ))?;
        let body = area.margin(head, 0, 0, 0);
        let upper = ((h as i32 - head) as f64 * 0.64) as i32;
        let (spectrum, residual) = body.split_vertically(upper);
        let y_area = s.px(74.0);
        let mut chart = ChartBuilder::on(&spectrum)
            .margin_top(s.px(4.0))
            .margin_right(s.px(14.0))
            .x_label_area_size(s.px(10.0))
            .y_label_area_size(y_area)
            .build_cartesian_2d(x.0..x.1, 0.0..top)?;
        mesh(
            &mut chart,
            s,
            "",
            &self.quantity,
            &|_| String::new(),
            &|v| style::tick(v),
        )?;
        let measured: Vec<(f64, f64)> = p
            .wavelengths_nm
            .iter()
            .copied()
            .zip(p.measured.iter().copied())
            .collect();
        let fitted: Vec<(f64, f64)> = p
            .wavelengths_nm
            .iter()
            .copied()
            .zip(p.fitted.iter().copied())
            .collect();
        if self.markers() {
            let r = s.px(3.5) as u32;
            chart.draw_series(measured.iter().map(|&q| {
                EmptyElement::at(q)
                    + Circle::new((0, 0), r, WHITE.filled())
                    + Circle::new((0, 0), r, INK.stroke_width(s.line(1.5)))
            }))?;
        } else {
            chart.draw_series(LineSeries::new(
                measured,
                faded(INK, 0.35).stroke_width(s.line(6.0)),
            ))?;
        }
        chart.draw_series(LineSeries::new(fitted, FITTED.stroke_width(s.line(2.0))))?;
        let mut chart = ChartBuilder::on(&residual)
            .margin_top(s.px(6.0))
            .margin_right(s.px(14.0))
            .x_label_area_size(if bottom_row { s.px(50.0) } else { s.px(30.0) })
            .y_label_area_size(y_area)
            .build_cartesian_2d(x.0..x.1, -res..res)?;
        chart
            .configure_mesh()
            .x_desc(if bottom_row { "Wavelength (nm)" } else { "" })
            .y_desc("Residual (%)")
            .axis_desc_style(s.axis())
            .label_style(s.tick())
            .x_label_formatter(&|v| style::num(*v, 0))
            .y_label_formatter(&|v| style::tick(v))
            .bold_line_style(style::GRID.stroke_width(1))
            .light_line_style(TRANSPARENT)
            .axis_style(FRAME.stroke_width(1))
            .set_all_tick_mark_size(s.px(5.0))
            .x_labels(8)
            .y_labels(5)
            .draw()?;
        chart.draw_series([PathElement::new(
            vec![(x.0, 0.0), (x.1, 0.0)],
            FITTED.stroke_width(s.line(1.5)),
        )])?;
        let residuals: Vec<(f64, f64)> = p
            .wavelengths_nm
            .iter()
            .zip(p.measured.iter().zip(&p.fitted))
            .map(|(&w, (m, f))| (w, m - f))
            .collect();
        chart.draw_series(LineSeries::new(
            residuals.clone(),
            INK.stroke_width(s.line(1.2)),
        ))?;
        if self.markers() {
            let r = s.px(2.5) as u32;
            chart.draw_series(residuals.iter().map(|&q| Circle::new(q, r, INK.filled())))?;
        }
        Ok(())
    }

    /// Whether measured points are drawn as markers (else as a band):
    /// when no panel has more than 60 points.
    fn markers(&self) -> bool {
        self.panels.iter().all(|p| p.wavelengths_nm.len() <= 60)
    }

    /// The measured data's mark at `at`: a hollow marker or a band piece.
    fn measured_mark<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
        (x, y): (i32, i32),
    ) -> DrawResult<DB> {
        if self.markers() {
            area.draw(&Circle::new(
                (x + s.px(13.0), y),
                s.px(3.5) as u32,
                INK.stroke_width(s.line(1.5)),
            ))
        } else {
            area.draw(&PathElement::new(
                vec![(x, y), (x + s.px(26.0), y)],
                faded(INK, 0.35).stroke_width(s.line(6.0)),
            ))
        }
    }

    /// The key above the panels: measured, fitted, residual.
    fn key<DB: DrawingBackend>(&self, area: &DrawingArea<DB, Shift>, s: &Style) -> DrawResult<DB> {
        let y = s.px(12.0);
        let label = Pos::new(HPos::Left, VPos::Center);
        let width = |t: &str| super::font::width(t, s.size(14.0), FontStyle::Normal).round() as i32;
        let mut x = s.px(8.0);
        self.measured_mark(area, s, (x, y))?;
        x += s.px(34.0);
        area.draw(&Text::new("measured", (x, y), s.text(14.0, INK).pos(label)))?;
        x += width("measured") + s.px(24.0);
        area.draw(&PathElement::new(
            vec![(x, y), (x + s.px(26.0), y)],
            FITTED.stroke_width(s.line(2.0)),
        ))?;
        x += s.px(34.0);
        area.draw(&Text::new(
            "fitted model",
            (x, y),
            s.text(14.0, INK).pos(label),
        ))?;
        x += width("fitted model") + s.px(36.0);
        area.draw(&Text::new(
            "Residual = measured − fitted, in percentage points",
            (x, y),
            s.text(14.0, MUTED).pos(label),
        ))?;
        Ok(())
    }
}

/// The smallest of 1, 1.5, 2, 2.5, 3, 4, 5, 6, 8 × 10ᵏ at or above `v > 0`.
fn nice_up(v: f64) -> f64 {
    if !(v > 0.0) {
        return 1.0;
    }
    let e = 10f64.powf(v.log10().floor());
    [1.0, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0]
        .into_iter()
        .map(|m| m * e)
        .find(|&c| c >= v * (1.0 - 1e-12))
        .unwrap_or(10.0 * e)
}

impl Chart for FitChart {
    fn caption(&self) -> &Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let key_h = s.px(30.0);
        self.key(&body, &s)?;
        let grid = body.margin(key_h, 0, 0, 0);
        let (cols, rows) = self.grid();
        let ranges = self.ranges();
        let cells = grid.split_evenly((rows, cols));
        for (i, p) in self.panels.iter().enumerate() {
            let bottom_row = i + cols >= self.panels.len();
            let gap = if i % cols + 1 < cols { s.px(18.0) } else { 0 };
            let cell = cells[i].margin(0, if i / cols + 1 < rows { s.px(14.0) } else { 0 }, 0, gap);
            self.cell(&cell, &s, p, ranges, bottom_row)?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::nice_up;

    #[test]
    fn round_tops_hold_the_value() {
        for (v, want) in [
            (0.07, 0.08),
            (0.42, 0.5),
            (43.0, 50.0),
            (108.0, 150.0),
            (2.0, 2.0),
        ] {
            assert!((nice_up(v) - want).abs() < 1e-12, "{v}: {}", nice_up(v));
        }
    }
}
