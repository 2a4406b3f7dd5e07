//! `bands`: the stop bands of a repeat group's period over wavelength ×
//! angle for s and p, optionally beside the finite stack's reflectance.

use plotters::coord::Shift;
use plotters::prelude::*;

use super::map::{ReflectanceMap, edges};
use super::style::{self, Caption, FRAME, GRID, SERIES, Style, frame, titled};
use super::{Chart, DrawResult};
use crate::angle_colour::Viewing;
use crate::error::Result;
use crate::scene::{Scene, StopBand};

/// The stop bands of one period, and the finite stack's map when asked for.
#[derive(Debug, Clone, PartialEq)]
pub struct BandsChart {
    /// Header text.
    pub caption: Caption,
    /// Wavelengths in nm.
    pub wavelengths: Vec<f64>,
    /// Angles in degrees.
    pub angles: Vec<f64>,
    /// The stop bands (|½ tr M| > 1), as [`Scene::bands`] finds them.
    pub stop_bands: Vec<StopBand>,
    /// The whole stack's reflectance (or transmittance) over the same grid.
    pub reflectance: Option<ReflectanceMap>,
}

impl BandsChart {
    /// The bands of `scene`'s first repeat group; with `reflectance`, also
    /// the stack's map for that viewing's side and polarization.
    pub fn compute(scene: &Scene, reflectance: Option<&Viewing>) -> Result<Self> {
        let bands = scene.bands()?;
        let map = reflectance
            .map(|v| ReflectanceMap::compute(scene, v))
            .transpose()?;
        let title = if scene.title.trim().is_empty() {
            "Untitled scene".to_string()
        } else {
            scene.title.clone()
        };
        let mut viewing = format!(
            "Stop bands: |½ tr M| > 1 for one period of {} (Yeh, Yariv & Hong 1977)",
            bands.group
        );
        if let Some(m) = &map {
            viewing.push_str(&format!(
                " · right: {} of the whole stack, {}",
                m.quantity.to_lowercase(),
                m.caption
                    .viewing
                    .rsplit(" · ")
                    .next()
                    .unwrap_or("unpolarized")
            ));
        }
        Ok(BandsChart {
            caption: Caption {
                title,
                subject: "Photonic stop bands of the repeating period over wavelength and angle of incidence"
                    .into(),
                viewing,
            },
            wavelengths: bands.wavelengths_nm,
            angles: bands.angles_deg,
            stop_bands: bands.stop_bands,
            reflectance: map,
        })
    }

    fn panel<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
        pol: usize,
        x_labels: usize,
    ) -> DrawResult<DB> {
        let (we, ae) = (edges(&self.wavelengths), edges(&self.angles));
        let mut chart = ChartBuilder::on(area)
            .margin_top(s.px(8.0))
            .margin_right(s.px(16.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(74.0))
            .build_cartesian_2d(we[0]..we[we.len() - 1], ae[0]..ae[ae.len() - 1])?;
        chart
            .configure_mesh()
            .x_desc("Wavelength (nm)")
            .y_desc("Angle of incidence (degrees)")
            .axis_desc_style(s.axis())
            .label_style(s.tick())
            .x_label_formatter(&|v| style::num(*v, 0))
            .y_label_formatter(&|v| format!("{}°", style::tick(v)))
            .bold_line_style(GRID.stroke_width(1))
            .light_line_style(TRANSPARENT)
            .axis_style(FRAME.stroke_width(1))
            .set_all_tick_mark_size(s.px(5.0))
            .x_labels(x_labels)
            .y_labels(10)
            .draw()?;
        let colour = style::faded(SERIES[pol], 0.8);
        chart.draw_series(
            self.stop_bands
                .iter()
                .filter(|b| b.polarization == pol)
                .map(|b| {
                    let a = self
                        .angles
                        .iter()
                        .position(|&x| x == b.angle_deg)
                        .unwrap_or(0);
                    Rectangle::new([(b.from_nm, ae[a]), (b.to_nm, ae[a + 1])], colour.filled())
                }),
        )?;
        Ok(())
    }
}

impl Chart for BandsChart {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let (w, _) = body.dim_in_pixel();
        let Some(map) = &self.reflectance else {
            let (left, right) = body.split_horizontally(w as i32 / 2);
            self.panel(&titled(&left, &s, "s-polarized (TE)")?, &s, 0, 8)?;
            return self.panel(&titled(&right, &s, "p-polarized (TM)")?, &s, 1, 8);
        };
        let third = (w as i32 - s.px(150.0)) / 3;
        let (first, rest) = body.split_horizontally(third);
        let (second, rest) = rest.split_horizontally(third);
        let (heat, bar) = rest.split_horizontally(third);
        self.panel(&titled(&first, &s, "Stop bands, s (TE)")?, &s, 0, 5)?;
        self.panel(&titled(&second, &s, "Stop bands, p (TM)")?, &s, 1, 5)?;
        let heat = titled(&heat, &s, &format!("{} · ● s  ○ p edges", map.quantity))?;
        let mut chart = map.heat(&heat, &s, 5)?;
        let r = s.px(3.5);
        for b in &self.stop_bands {
            for x in [b.from_nm, b.to_nm] {
                let at = (x, b.angle_deg);
                if b.polarization == 0 {
                    chart.draw_series(std::iter::once(Circle::new(at, r, WHITE.filled())))?;
                } else {
                    chart.draw_series(std::iter::once(Circle::new(
                        at,
                        r + 1,
                        WHITE.stroke_width(s.line(1.5)),
                    )))?;
                }
            }
        }
        map.colour_bar(&titled(&bar, &s, "")?, &s)
    }
}
