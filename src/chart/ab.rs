//! `ab-travel`: the colour trajectory over angle on the CIELAB a*b* plane,
//! with lightness L* against angle beside it, for one or several designs.

use plotters::coord::Shift;
use plotters::prelude::*;

use super::style::{self, Caption, FRAME, SERIES, Series, Style, frame, legend, mesh, swatch};
use super::{Chart, DrawResult};
use crate::angle_colour::Viewing;
use crate::error::Result;
use crate::pigment::Measurement;
use crate::scene::Scene;

/// Trajectories on the a*b* plane.
#[derive(Debug, Clone, PartialEq)]
pub struct AbTravel {
    /// Header text.
    pub caption: Caption,
    /// One trajectory per scene.
    pub series: Vec<Series>,
    /// Title of the lightness panel's angle axis.
    pub angle_axis: String,
}

impl AbTravel {
    /// The trajectory of each scene.
    pub fn compute(scenes: &[(&Scene, &Viewing)]) -> Result<Self> {
        let (series, seen) = Series::of_scenes(scenes)?;
        let titles: Vec<&str> = scenes.iter().map(|(s, _)| s.title.as_str()).collect();
        Ok(AbTravel {
            caption: Caption {
                viewing: seen,
                ..Caption::new(
                    &titles,
                    "CIELAB a*, b* and lightness L* against angle of incidence",
                    scenes[0].1,
                )
            },
            series,
            angle_axis: "Angle of incidence (degrees)".into(),
        })
    }

    /// The trajectory of a coating across its geometries (in their order),
    /// each point labelled with its geometry's name, and L* against the
    /// aspecular angle; `title` heads the chart and `viewing` names the light.
    pub fn of_coating(title: &str, m: &Measurement, viewing: &Viewing) -> Self {
        let mut caption = Caption::new(
            &[title],
            "CIELAB a*, b* across the geometries and lightness L* against aspecular angle",
            viewing,
        );
        caption.viewing = format!(
            "{} · reflectance factor, surface gloss excluded",
            style::light(viewing)
        );
        AbTravel {
            caption,
            series: vec![Series {
                label: title.to_owned(),
                angles: m
                    .geometries
                    .iter()
                    .map(|g| g.geometry.aspecular_deg)
                    .collect(),
                colours: m.geometries.iter().map(|g| g.colour.clone()).collect(),
                names: m
                    .geometries
                    .iter()
                    .map(|g| g.geometry.name.clone())
                    .collect(),
            }],
            angle_axis: "Aspecular angle (degrees)".into(),
        }
    }

    /// a*, b* range holding the data and the neutral point, padded, with
    /// equal scales for a plot of `w` × `h` pixels.
    fn range(&self, w: f64, h: f64) -> ((f64, f64), (f64, f64)) {
        let (mut a0, mut a1, mut b0, mut b1) = (0.0f64, 0.0f64, 0.0f64, 0.0f64);
        for c in self.series.iter().flat_map(|s| &s.colours) {
            (a0, a1) = (a0.min(c.lab[1]), a1.max(c.lab[1]));
            (b0, b1) = (b0.min(c.lab[2]), b1.max(c.lab[2]));
        }
        let span = ((a1 - a0).max(b1 - b0) * 1.2).max(10.0);
        let (ca, cb) = ((a0 + a1) / 2.0, (b0 + b1) / 2.0);
        let (sa, sb) = if w >= h {
            (span * w / h, span)
        } else {
            (span, span * h / w)
        };
        (
            (ca - sa / 2.0, ca + sa / 2.0),
            (cb - sb / 2.0, cb + sb / 2.0),
        )
    }
}

impl Chart for AbTravel {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let (w, h) = body.dim_in_pixel();
        let (left, right) = body.split_horizontally(w as i32 * 62 / 100);
        let (lw, _) = left.dim_in_pixel();
        let pw = lw as f64 - (s.px(74.0) + s.px(30.0)) as f64;
        let ph = h as f64 - (s.px(62.0) + s.px(8.0)) as f64;
        let (ar, br) = self.range(pw, ph);
        let mut chart = ChartBuilder::on(&left)
            .margin_top(s.px(8.0))
            .margin_right(s.px(30.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(74.0))
            .build_cartesian_2d(ar.0..ar.1, br.0..br.1)?;
        mesh(
            &mut chart,
            &s,
            "a* (CIELAB; − green, + red)",
            "b* (CIELAB; − blue, + yellow)",
            &|v| style::num(*v, 0),
            &|v| style::num(*v, 0),
        )?;
        // The neutral axes.
        chart.draw_series([
            PathElement::new(
                vec![(ar.0, 0.0), (ar.1, 0.0)],
                FRAME.stroke_width(s.line(1.5)),
            ),
            PathElement::new(
                vec![(0.0, br.0), (0.0, br.1)],
                FRAME.stroke_width(s.line(1.5)),
            ),
        ])?;
        for (k, series) in self.series.iter().enumerate() {
            let line = SERIES[k % SERIES.len()];
            let pts: Vec<(f64, f64)> = series
                .colours
                .iter()
                .map(|c| (c.lab[1], c.lab[2]))
                .collect();
            chart.draw_series(LineSeries::new(pts.clone(), line.stroke_width(s.line(2.0))))?;
            let r = s.px(6.0) as u32;
            chart.draw_series(pts.iter().zip(&series.colours).enumerate().map(
                |(i, (&p, c))| {
                    let r = if i == 0 { r + r / 2 } else { r };
                    EmptyElement::at(p)
                        + Circle::new((0, 0), r, swatch(c).filled())
                        + Circle::new((0, 0), r, line.stroke_width(s.line(1.5)))
                },
            ))?;
        }
        style::angle_labels(&chart, &s, &self.series, &|c| (c.lab[1], c.lab[2]))?;
        if self.series.len() > 1 {
            legend(&chart.plotting_area().strip_coord_spec(), &s, &self.series)?;
        }
        self.lightness(&right, &s)
    }
}

impl AbTravel {
    fn lightness<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
    ) -> DrawResult<DB> {
        let (lo, hi) = self
            .series
            .iter()
            .flat_map(|x| x.angles.iter().copied())
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), a| {
                (l.min(a), h.max(a))
            });
        let hi = if hi > lo { hi } else { lo + 1.0 };
        // L* may pass 100 near the specular direction of an effect coating.
        let brightest = (self.series.iter().flat_map(|x| &x.colours))
            .map(|c| c.lab[0])
            .fold(100.0, f64::max);
        let top = (brightest / 10.0).ceil() * 10.0;
        let mut chart = ChartBuilder::on(area)
            .margin_top(s.px(8.0))
            .margin_left(s.px(20.0))
            .margin_right(s.px(26.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(64.0))
            .build_cartesian_2d(lo..hi, 0.0..top)?;
        mesh(
            &mut chart,
            s,
            &self.angle_axis,
            "Lightness L* (CIELAB)",
            &|v| format!("{}°", style::tick(v)),
            &|v| style::num(*v, 0),
        )?;
        for (k, series) in self.series.iter().enumerate() {
            let line = SERIES[k % SERIES.len()];
            let pts: Vec<(f64, f64)> = series
                .angles
                .iter()
                .zip(&series.colours)
                .map(|(&a, c)| (a, c.lab[0]))
                .collect();
            chart.draw_series(LineSeries::new(pts.clone(), line.stroke_width(s.line(2.0))))?;
            chart.draw_series(pts.iter().zip(&series.colours).map(|(&p, c)| {
                EmptyElement::at(p)
                    + Circle::new((0, 0), s.px(4.0) as u32, swatch(c).filled())
                    + Circle::new((0, 0), s.px(4.0) as u32, line.stroke_width(1))
            }))?;
        }
        Ok(())
    }
}
