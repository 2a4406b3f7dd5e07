//! `map`: reflectance (or transmittance) over wavelength × angle as a heat
//! map with a colour bar.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::colors::colormaps::{ColorMap, ViridisRGB};

use super::style::{
    self, Caption, FRAME, Plot, Style, describe_all, frame, incident_heading, titled,
};
use super::{Chart, DrawResult};
use crate::angle_colour::{Side, Viewing, handed, incident_views};
use crate::error::Result;
use crate::scene::Scene;

/// Values on the scene's wavelength × angle grid, in one panel or, for a
/// scene whose left and right differ, one panel per handedness.
#[derive(Debug, Clone, PartialEq)]
pub struct ReflectanceMap {
    /// Header text.
    pub caption: Caption,
    /// "Reflectance" or "Transmittance".
    pub quantity: &'static str,
    /// Wavelengths in nm.
    pub wavelengths: Vec<f64>,
    /// Angles in degrees.
    pub angles: Vec<f64>,
    /// Fractions 0–1, angle-major, of the first panel.
    pub values: Vec<f64>,
    /// Further panels drawn beside the first: (heading, values); the first
    /// panel's heading is [`ReflectanceMap::heading`].
    pub beside: Vec<(String, Vec<f64>)>,
    /// The first panel's heading when panels stand side by side.
    pub heading: String,
    /// Top of the colour scale (a fraction): the smallest of 5, 10, 20, 25,
    /// 50, 75, 100 % holding the largest value, so weak features stay visible.
    pub top: f64,
}

impl ReflectanceMap {
    /// The scene's spectra for the side and polarization of `viewing`; for
    /// unpolarized light on a scene whose left and right differ
    /// ([`handed`]), two panels: left- and right-circular incident light.
    pub fn compute(scene: &Scene, viewing: &Viewing) -> Result<Self> {
        let spectra = viewing.spectra_of(scene, &scene.angles_deg)?;
        let views = incident_views(viewing, handed(&spectra));
        let nw = spectra.wavelengths_nm.len();
        let mut panels: Vec<(String, Vec<f64>)> = views
            .iter()
            .map(|v| {
                let values = spectra
                    .rt
                    .iter()
                    .enumerate()
                    .map(|(i, x)| v.fraction(x, spectra.jones.as_ref().map(|j| &j[i])))
                    .collect();
                (incident_heading(v), values)
            })
            .collect();
        debug_assert!(
            panels
                .iter()
                .all(|(_, v)| v.len() == nw * spectra.angles_deg.len())
        );
        let max = panels
            .iter()
            .flat_map(|(_, v)| v)
            .copied()
            .fold(0.0, f64::max);
        let top = [0.05, 0.1, 0.2, 0.25, 0.5, 0.75, 1.0]
            .into_iter()
            .find(|&t| max <= t + 1e-12)
            .unwrap_or(1.0);
        let quantity = match viewing.side {
            Side::Reflect => "Reflectance",
            Side::Transmit => "Transmittance",
        };
        let (heading, values) = panels.remove(0);
        Ok(ReflectanceMap {
            caption: Caption {
                viewing: describe_all(&views),
                ..Caption::new(
                    &[&scene.title],
                    &format!("{quantity} over wavelength and angle of incidence"),
                    viewing,
                )
            },
            quantity,
            wavelengths: spectra.wavelengths_nm,
            angles: spectra.angles_deg,
            values,
            beside: panels,
            heading,
            top,
        })
    }

    fn colour(&self, v: f64) -> RGBColor {
        ViridisRGB.get_color_normalized(v.min(self.top) as f32, 0.0, self.top as f32)
    }

    /// The heat map with its axes on `area`, `x_labels` wavelength ticks;
    /// returns the chart for drawing over it.
    pub(super) fn heat<'a, DB: DrawingBackend>(
        &self,
        area: &'a DrawingArea<DB, Shift>,
        s: &Style,
        x_labels: usize,
    ) -> std::result::Result<Plot<'a, DB>, DrawingAreaErrorKind<DB::ErrorType>> {
        let (we, ae) = (edges(&self.wavelengths), edges(&self.angles));
        let mut chart = ChartBuilder::on(area)
            .margin_top(s.px(8.0))
            .margin_right(s.px(16.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(74.0))
            .build_cartesian_2d(we[0]..we[we.len() - 1], ae[0]..ae[ae.len() - 1])?;
        chart
            .configure_mesh()
            .disable_x_mesh()
            .disable_y_mesh()
            .x_desc("Wavelength (nm)")
            .y_desc("Angle of incidence (degrees)")
            .axis_desc_style(s.axis())
            .label_style(s.tick())
            .x_label_formatter(&|v| style::num(*v, 0))
            .y_label_formatter(&|v| format!("{}°", style::tick(v)))
            .axis_style(FRAME.stroke_width(1))
            .set_all_tick_mark_size(s.px(5.0))
            .x_labels(x_labels)
            .y_labels(10)
            .draw()?;
        self.cells(&mut chart, &self.values)?;
        Ok(chart)
    }

    /// The heat map's cells of `values` on `chart`.
    fn cells<DB: DrawingBackend>(
        &self,
        chart: &mut Plot<'_, DB>,
        values: &[f64],
    ) -> DrawResult<DB> {
        let (we, ae) = (edges(&self.wavelengths), edges(&self.angles));
        let nw = self.wavelengths.len();
        chart.draw_series(values.iter().enumerate().map(|(i, &v)| {
            let (a, k) = (i / nw, i % nw);
            Rectangle::new(
                [(we[k], ae[a]), (we[k + 1], ae[a + 1])],
                self.colour(v).filled(),
            )
        }))?;
        Ok(())
    }

    /// The colour bar on `area`.
    pub(super) fn colour_bar<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
    ) -> DrawResult<DB> {
        let (_, bh) = area.dim_in_pixel();
        let mut bar = ChartBuilder::on(area)
            .margin_top(s.px(8.0))
            .margin_bottom(s.px(62.0))
            .margin_left(s.px(10.0))
            .margin_right(s.px(80.0))
            .y_label_area_size(0)
            .right_y_label_area_size(s.px(50.0))
            .build_cartesian_2d(0.0..1.0, 0.0..100.0 * self.top)?;
        let steps = (bh as usize).clamp(2, 128);
        bar.draw_series((0..steps).map(|i| {
            let (v0, v1) = (i as f64 / steps as f64, (i + 1) as f64 / steps as f64);
            Rectangle::new(
                [(0.0, 100.0 * self.top * v0), (1.0, 100.0 * self.top * v1)],
                self.colour(self.top * (v0 + v1) / 2.0).filled(),
            )
        }))?;
        bar.configure_mesh()
            .disable_x_mesh()
            .disable_y_mesh()
            .disable_x_axis()
            .y_desc(format!("{} (%)", self.quantity))
            .axis_desc_style(s.axis())
            .label_style(s.tick())
            .y_label_formatter(&|v| style::tick(v))
            .axis_style(FRAME.stroke_width(1))
            .set_all_tick_mark_size(s.px(5.0))
            .y_labels(6)
            .draw()?;
        Ok(())
    }
}

/// Cell edges: midpoints between values, half a spacing beyond the ends.
pub(super) fn edges(v: &[f64]) -> Vec<f64> {
    if v.len() == 1 {
        return vec![v[0] - 0.5, v[0] + 0.5];
    }
    let mut e = vec![v[0] - (v[1] - v[0]) / 2.0];
    e.extend(v.windows(2).map(|w| (w[0] + w[1]) / 2.0));
    e.push(v[v.len() - 1] + (v[v.len() - 1] - v[v.len() - 2]) / 2.0);
    e
}

impl Chart for ReflectanceMap {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let (w, _) = body.dim_in_pixel();
        let (left, right) = body.split_horizontally(w as i32 - s.px(150.0));
        self.colour_bar(&right, &s)?;
        if self.beside.is_empty() {
            self.heat(&left, &s, 10)?;
            return Ok(());
        }
        let n = self.beside.len() + 1;
        let panels = left.split_evenly((1, n));
        let labels = 10 / n;
        self.heat(&titled(&panels[0], &s, &self.heading)?, &s, labels)?;
        for (area, (heading, values)) in panels[1..].iter().zip(&self.beside) {
            let panel = titled(area, &s, heading)?;
            let mut chart = self.heat(&panel, &s, labels)?;
            self.cells(&mut chart, values)?;
        }
        Ok(())
    }
}
