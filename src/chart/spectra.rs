//! `spectra`: reflectance (and transmittance) against wavelength at chosen
//! angles and polarizations, for one or several scenes.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::style::{self, Caption, INK, SERIES, Style, frame, mesh, short};
use super::{Chart, DrawResult};
use crate::angle_colour::{Polarization, Side, Viewing, handed};
use crate::error::{Error, Result};
use crate::optics::Spectra;
use crate::scene::Scene;

/// One (scene, angle, polarization) curve.
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    /// Index into [`SpectraChart::legend`].
    pub series: usize,
    /// Polarization.
    pub polarization: Polarization,
    /// (wavelength nm, R in %) points.
    pub r: Vec<(f64, f64)>,
    /// (wavelength nm, T in %) points.
    pub t: Vec<(f64, f64)>,
}

/// Spectra of several scenes at several angles.
#[derive(Debug, Clone, PartialEq)]
pub struct SpectraChart {
    /// Header text.
    pub caption: Caption,
    /// Heading of the legend's series.
    pub legend_heading: String,
    /// Label of each (scene, angle) series, in colour order.
    pub legend: Vec<String>,
    /// Polarizations drawn.
    pub polarizations: Vec<Polarization>,
    /// The curves.
    pub curves: Vec<Curve>,
    /// Whether a transmittance panel is drawn.
    pub transmittance: bool,
    /// Whether the values are a coating's reflectance factors (the
    /// perfect white diffuser is 100 %; near the specular direction they
    /// may pass 100 %).
    pub factor: bool,
}

fn dash(p: Polarization) -> (u32, u32) {
    match p {
        Polarization::Unpolarized => (0, 0),
        Polarization::S => (11, 7),
        Polarization::P => (2, 6),
        Polarization::Left => (16, 4),
        Polarization::Right => (6, 3),
    }
}

impl SpectraChart {
    /// Spectra of each scene at `angles` (degrees) on the scene's own
    /// wavelength grid for `polarizations` (by default unpolarized, s and
    /// p, or unpolarized, left- and right-circular when a scene's left and
    /// right differ, see [`handed`]); the first scene's viewing names the
    /// light.
    pub fn compute(
        scenes: &[(&Scene, &Viewing)],
        angles: &[f64],
        polarizations: Option<&[Polarization]>,
        transmittance: bool,
    ) -> Result<Self> {
        if let Some(&a) = angles.iter().find(|a| !(a.abs() < 90.0)) {
            return Err(Error::invalid(
                "angles",
                a,
                "angles of incidence must lie below 90°",
            ));
        }
        let all: Vec<Spectra> = scenes
            .iter()
            .map(|(scene, _)| scene.spectra_at(angles))
            .collect::<Result<_>>()?;
        let polarizations = polarizations.unwrap_or(if all.iter().any(handed) {
            &[
                Polarization::Unpolarized,
                Polarization::Left,
                Polarization::Right,
            ]
        } else {
            &[Polarization::Unpolarized, Polarization::S, Polarization::P]
        });
        if angles.is_empty() || polarizations.is_empty() {
            return Err(Error::invalid(
                "angles",
                "(none)",
                "give at least one angle and polarization",
            ));
        }
        let n = scenes.len() * angles.len();
        if n > SERIES.len() {
            return Err(Error::invalid(
                "angles",
                format!("{} scenes × {} angles", scenes.len(), angles.len()),
                format!(
                    "at most {} curves per polarization stay distinguishable",
                    SERIES.len()
                ),
            ));
        }
        let mut legend = Vec::new();
        let mut curves = Vec::new();
        for ((scene, _), spectra) in scenes.iter().zip(&all) {
            for (a, angle) in angles.iter().enumerate() {
                let series = legend.len();
                legend.push(if scenes.len() == 1 {
                    format!("{}°", style::tick(angle))
                } else {
                    format!("{} · {}°", short(&scene.title), style::tick(angle))
                });
                for &p in polarizations {
                    let jones = spectra.jones_at_angle(a);
                    let points = |side| {
                        spectra
                            .wavelengths_nm
                            .iter()
                            .zip(spectra.at_angle(a))
                            .enumerate()
                            .map(|(w, (&nm, x))| {
                                (nm, 100.0 * p.of_point(x, jones.map(|j| &j[w]), side))
                            })
                            .collect()
                    };
                    curves.push(Curve {
                        series,
                        polarization: p,
                        r: points(Side::Reflect),
                        t: points(Side::Transmit),
                    });
                }
            }
        }
        let titles: Vec<&str> = scenes.iter().map(|(s, _)| s.title.as_str()).collect();
        let mut caption = Caption::new(
            &titles,
            if transmittance {
                "Reflectance and transmittance against wavelength"
            } else {
                "Reflectance against wavelength"
            },
            scenes[0].1,
        );
        caption.viewing = format!(
            "{} · {} light · {}",
            style::light(scenes[0].1),
            if transmittance {
                "reflected and transmitted"
            } else {
                "reflected"
            },
            pol_list(polarizations)
        );
        let legend_heading = if legend.iter().any(|l| l.contains(" · ")) {
            "Design · angle of incidence"
        } else {
            "Angle of incidence"
        }
        .to_owned();
        Ok(SpectraChart {
            caption,
            legend_heading,
            legend,
            polarizations: polarizations.to_vec(),
            curves,
            transmittance,
            factor: false,
        })
    }

    /// Reflectance spectra given as labelled series (fractions on their own
    /// wavelengths, such as a measured reference and sample), each drawn
    /// solid in its own colour; `titles` head the chart and `viewing` names
    /// the light.
    pub fn of_series(
        titles: &[&str],
        heading: &str,
        series: &[(String, &crate::measured::Measured)],
        viewing: &Viewing,
    ) -> Result<Self> {
        if series.is_empty() || series.len() > SERIES.len() {
            return Err(Error::invalid(
                "series",
                series.len(),
                format!("give 1 to {} series", SERIES.len()),
            ));
        }
        let curves = series
            .iter()
            .enumerate()
            .map(|(i, (_, m))| Curve {
                series: i,
                polarization: Polarization::Unpolarized,
                r: m.wavelengths_nm
                    .iter()
                    .zip(&m.r)
                    .map(|(&w, &v)| (w, 100.0 * v))
                    .collect(),
                t: Vec::new(),
            })
            .collect();
        let mut caption = Caption::new(titles, heading, viewing);
        caption.viewing = style::light(viewing);
        Ok(SpectraChart {
            caption,
            legend_heading: "Spectrum".to_owned(),
            legend: series.iter().map(|(l, _)| l.clone()).collect(),
            polarizations: vec![Polarization::Unpolarized],
            curves,
            transmittance: false,
            factor: false,
        })
    }

    /// A coating's reflectance factor spectra on `wavelengths_nm` (the
    /// scene's grid) at `geometries` (at most seven), labelled with the
    /// geometry names; `title` heads the chart and `viewing` names the light.
    pub fn of_coating(
        title: &str,
        wavelengths_nm: &[f64],
        geometries: &[crate::pigment::GeometryColour],
        viewing: &Viewing,
    ) -> Result<Self> {
        let spectra: Vec<crate::measured::Measured> = geometries
            .iter()
            .map(|g| crate::measured::Measured {
                at: crate::design::coating::At::Geometry(g.geometry.clone()),
                wavelengths_nm: wavelengths_nm.to_vec(),
                r: g.reflectance_factor.clone(),
            })
            .collect();
        let series: Vec<(String, &crate::measured::Measured)> = geometries
            .iter()
            .zip(&spectra)
            .map(|(g, m)| (g.geometry.name.clone(), m))
            .collect();
        let mut chart = Self::of_series(
            &[title],
            "Reflectance factor against wavelength at each geometry",
            &series,
            viewing,
        )?;
        chart.caption.viewing = format!(
            "{} · reflectance factor (perfect white diffuser = 100 %), surface gloss excluded",
            style::light(viewing)
        );
        chart.legend_heading = "Geometry".into();
        chart.factor = true;
        Ok(chart)
    }

    /// Top of the value axis: 100 %, or for reflectance factors above
    /// that, the next multiple of 20 %.
    fn top(&self) -> f64 {
        let most = (self.curves.iter().flat_map(|c| c.r.iter().chain(&c.t)))
            .map(|p| p.1)
            .fold(100.0, f64::max);
        if self.factor {
            (most / 20.0).ceil() * 20.0
        } else {
            100.0
        }
    }

    fn panel<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
        transmitted: bool,
    ) -> DrawResult<DB> {
        let (lo, hi) = self
            .curves
            .iter()
            .flat_map(|c| c.r.iter().map(|p| p.0))
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), w| {
                (l.min(w), h.max(w))
            });
        let mut chart = ChartBuilder::on(area)
            .margin_top(s.px(8.0))
            .margin_right(s.px(12.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(74.0))
            .build_cartesian_2d(lo..hi, 0.0..self.top())?;
        let y = if transmitted {
            "Transmittance (%)"
        } else if self.factor {
            "Reflectance factor (%)"
        } else {
            "Reflectance (%)"
        };
        mesh(
            &mut chart,
            s,
            "Wavelength (nm)",
            y,
            &|v| style::num(*v, 0),
            &|v| style::num(*v, 0),
        )?;
        for c in &self.curves {
            let colour = SERIES[c.series];
            let style = colour.stroke_width(s.line(2.0));
            let points = if transmitted {
                c.t.clone()
            } else {
                c.r.clone()
            };
            match dash(c.polarization) {
                (0, _) => {
                    chart.draw_series(LineSeries::new(points, style))?;
                }
                (on, off) => {
                    chart.draw_series(DashedLineSeries::new(
                        points,
                        s.px(on as f64) as u32,
                        s.px(off as f64) as u32,
                        style,
                    ))?;
                }
            }
        }
        Ok(())
    }

    fn draw_legend<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
    ) -> DrawResult<DB> {
        let left = s.px(16.0);
        let line = s.px(26.0);
        let mut y = s.px(14.0);
        let label = Pos::new(HPos::Left, VPos::Center);
        area.draw(&Text::new(
            self.legend_heading.as_str(),
            (left, y),
            s.bold(14.0, INK).pos(label),
        ))?;
        y += line;
        for (i, name) in self.legend.iter().enumerate() {
            area.draw(&PathElement::new(
                vec![(left, y), (left + s.px(34.0), y)],
                SERIES[i].stroke_width(s.line(3.0)),
            ))?;
            area.draw(&Text::new(
                name.clone(),
                (left + s.px(44.0), y),
                s.text(14.0, INK).pos(label),
            ))?;
            y += line;
        }
        if self.factor {
            // A coating's reflectance factor is for unpolarized light only.
            return Ok(());
        }
        y += line / 2;
        area.draw(&Text::new(
            "Polarization",
            (left, y),
            s.bold(14.0, INK).pos(label),
        ))?;
        y += line;
        for &p in &self.polarizations {
            let seg = vec![(left, y), (left + s.px(34.0), y)];
            let st = INK.stroke_width(s.line(2.0));
            match dash(p) {
                (0, _) => area.draw(&PathElement::new(seg, st))?,
                (on, off) => {
                    let (on, off) = (s.px(on as f64), s.px(off as f64));
                    let mut x = left;
                    while x < left + s.px(34.0) {
                        let end = (x + on).min(left + s.px(34.0));
                        area.draw(&PathElement::new(vec![(x, y), (end, y)], st))?;
                        x += on + off;
                    }
                }
            }
            area.draw(&Text::new(
                p.label(),
                (left + s.px(44.0), y),
                s.text(14.0, INK).pos(label),
            ))?;
            y += line;
        }
        Ok(())
    }
}

/// "unpolarized (solid), s-polarized (dashed)" for the header.
fn pol_list(p: &[Polarization]) -> String {
    let names: Vec<String> = p
        .iter()
        .map(|&p| {
            let how = match p {
                Polarization::Unpolarized => "solid",
                Polarization::S => "dashed",
                Polarization::P => "dotted",
                Polarization::Left => "long dashes",
                Polarization::Right => "short dashes",
            };
            format!("{} ({how})", p.label())
        })
        .collect();
    names.join(", ")
}

impl Chart for SpectraChart {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let (w, h) = body.dim_in_pixel();
        let (plots, legend) = body.split_horizontally(w as i32 - s.px(250.0).min(w as i32 / 3));
        self.draw_legend(&legend, &s)?;
        if self.transmittance {
            let (top, bottom) = plots.split_vertically(h as i32 / 2);
            self.panel(&top, &s, false)?;
            self.panel(&bottom, &s, true)
        } else {
            self.panel(&plots, &s, false)
        }
    }
}
