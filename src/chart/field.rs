//! `field`: |E|² against depth through the stack at one wavelength, angle
//! and polarization, over shaded bands for the media it crosses.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::style::{self, Caption, FRAME, INK, MUTED, SERIES, Style, frame, mesh};
use super::{Chart, DrawResult};
use crate::design::variables::every_layer;
use crate::error::Result;
use crate::scene::{Scene, Substrate};

/// Depths sampled for the chart.
pub const POINTS: usize = 2000;

/// A stretch of depth inside one medium.
#[derive(Debug, Clone, PartialEq)]
pub struct Region {
    /// Where it starts (nm from the first interface).
    pub from_nm: f64,
    /// Where it ends.
    pub to_nm: f64,
    /// Index into [`FieldChart::materials`].
    pub material: usize,
}

/// The field profile with the media it runs through.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldChart {
    /// Header text.
    pub caption: Caption,
    /// (depth nm, |E|² relative to the incident wave) points.
    pub points: Vec<(f64, f64)>,
    /// The incident medium, each layer crossed and the substrate, in depth
    /// order.
    pub regions: Vec<Region>,
    /// Material names, in order of first appearance.
    pub materials: Vec<String>,
}

impl FieldChart {
    /// The profile of `scene` at `wavelength_nm`, `angle_deg`, polarization
    /// `pol` (0 = s, 1 = p), as [`Scene::field_profile`] gives it.
    pub fn compute(scene: &Scene, wavelength_nm: f64, angle_deg: f64, pol: usize) -> Result<Self> {
        let field = scene.field_profile(wavelength_nm, angle_deg, pol, POINTS)?;
        let substrate = match scene.substrate {
            Substrate::Medium(m) | Substrate::Sheet { medium: m, .. } => &scene.media[m].name,
        };
        let mut names = vec![scene.media[scene.incident].name.clone()];
        names.extend(
            every_layer(scene, &scene.stack)
                .into_iter()
                .map(|l| l.material),
        );
        names.push(substrate.clone());
        let mut materials: Vec<String> = Vec::new();
        let mut regions: Vec<Region> = Vec::new();
        let mut last = usize::MAX;
        for p in &field {
            if p.layer != last {
                let name = &names[p.layer];
                let material = match materials.iter().position(|m| m == name) {
                    Some(i) => i,
                    None => {
                        materials.push(name.clone());
                        materials.len() - 1
                    }
                };
                if let Some(r) = regions.last_mut() {
                    r.to_nm = p.z_nm;
                }
                regions.push(Region {
                    from_nm: p.z_nm,
                    to_nm: p.z_nm,
                    material,
                });
                last = p.layer;
            }
        }
        if let (Some(r), Some(p)) = (regions.last_mut(), field.last()) {
            r.to_nm = p.z_nm;
        }
        let title = if scene.title.trim().is_empty() {
            "Untitled scene".to_string()
        } else {
            scene.title.clone()
        };
        let polarization = if pol == 0 { "s" } else { "p" };
        Ok(FieldChart {
            caption: Caption {
                title,
                subject: format!(
                    "Electric field intensity |E|² against depth at {} nm, {}° incidence, {polarization}-polarized",
                    style::tick(&wavelength_nm),
                    style::tick(&angle_deg)
                ),
                viewing: format!(
                    "|E|² relative to the incident wave · light enters from {} (left) · substrate {} (right) · nominal thicknesses",
                    names[0], substrate
                ),
            },
            points: field.iter().map(|p| (p.z_nm, p.e2)).collect(),
            regions,
            materials,
        })
    }
}

/// The band colour of material `i`: a series colour faded toward white.
fn tint(i: usize) -> RGBColor {
    style::faded(SERIES[i % SERIES.len()], 0.22)
}

impl Chart for FieldChart {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let (w, _) = body.dim_in_pixel();
        let (plot, legend) = body.split_horizontally(w as i32 - s.px(220.0).min(w as i32 / 3));
        let (z0, z1) = (
            self.points.first().map_or(0.0, |p| p.0),
            self.points.last().map_or(1.0, |p| p.0),
        );
        let top = self
            .points
            .iter()
            .map(|p| p.1)
            .fold(0.0, f64::max)
            .max(1e-6)
            * 1.1;
        let mut chart = ChartBuilder::on(&plot)
            .margin_top(s.px(8.0))
            .margin_right(s.px(12.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(74.0))
            .build_cartesian_2d(z0..z1, 0.0..top)?;
        chart.draw_series(self.regions.iter().map(|r| {
            Rectangle::new(
                [(r.from_nm, 0.0), (r.to_nm, top)],
                tint(r.material).filled(),
            )
        }))?;
        // Interfaces.
        for r in self.regions.iter().skip(1) {
            chart.draw_series(LineSeries::new(
                [(r.from_nm, 0.0), (r.from_nm, top)],
                FRAME.stroke_width(1),
            ))?;
        }
        mesh(
            &mut chart,
            &s,
            "Depth from the first interface (nm)",
            "|E|² / |E₀|²",
            &|v| style::num(*v, 0),
            &|v| style::tick(v),
        )?;
        chart.draw_series(LineSeries::new(
            self.points.iter().copied(),
            INK.stroke_width(s.line(2.5)),
        ))?;
        // Material names over the bands wide enough to hold them.
        let label = s.text(13.0, MUTED);
        for r in &self.regions {
            let name = &self.materials[r.material];
            let (a, b) = (
                chart.backend_coord(&(r.from_nm, top)),
                chart.backend_coord(&(r.to_nm, top)),
            );
            let width = super::font::width(name, s.size(13.0), FontStyle::Normal) as i32;
            if b.0 - a.0 > width + s.px(8.0) {
                chart.draw_series(std::iter::once(
                    EmptyElement::at((0.5 * (r.from_nm + r.to_nm), top))
                        + Text::new(
                            name.clone(),
                            (0, s.px(6.0)),
                            label.clone().pos(Pos::new(HPos::Center, VPos::Top)),
                        ),
                ))?;
            }
        }
        // Legend: the materials.
        let left = s.px(16.0);
        let line = s.px(26.0);
        let mut y = s.px(14.0);
        let at = Pos::new(HPos::Left, VPos::Center);
        legend.draw(&Text::new("Media", (left, y), s.bold(14.0, INK).pos(at)))?;
        y += line;
        for (i, m) in self.materials.iter().enumerate() {
            legend.draw(&Rectangle::new(
                [(left, y - s.px(8.0)), (left + s.px(28.0), y + s.px(8.0))],
                tint(i).filled(),
            ))?;
            legend.draw(&Rectangle::new(
                [(left, y - s.px(8.0)), (left + s.px(28.0), y + s.px(8.0))],
                FRAME.stroke_width(1),
            ))?;
            legend.draw(&Text::new(
                m.clone(),
                (left + s.px(40.0), y),
                s.text(14.0, INK).pos(at),
            ))?;
            y += line;
        }
        Ok(())
    }
}
