//! `thickness-angle`: colour swatches over angle (across) and one layer's
//! thickness or a scale on every thickness (down).

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use rayon::prelude::*;

use super::style::{self, Caption, FRAME, INK, Style, frame, swatch};
use super::{Chart, DrawResult};
use crate::angle_colour::{Viewing, angle_colours};
use crate::colorimetry::Colour;
use crate::error::{Error, Result};
use crate::optics;
use crate::scene::{Item, Layer, Repeat, Scene};

/// Most rows of thickness.
pub const MAX_STEPS: usize = 200;

/// What changes from row to row.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Variation {
    /// The thickness of one layer, numbered from 1 in the order the layers
    /// appear in the stack, depth first (a repeat group's layers once).
    Layer {
        /// 1-based layer number.
        layer: usize,
        /// Thickness range in nm (default: 50–150 % of the design value).
        range_nm: Option<(f64, f64)>,
    },
    /// A factor on every thickness.
    Scale {
        /// First factor.
        from: f64,
        /// Last factor.
        to: f64,
    },
}

/// Colours on a (thickness, angle) grid.
#[derive(Debug, Clone, PartialEq)]
pub struct ThicknessAngle {
    /// Header text.
    pub caption: Caption,
    /// Title of the vertical axis.
    pub axis: String,
    /// The varied value of each row.
    pub rows: Vec<f64>,
    /// The design's own value.
    pub nominal: f64,
    /// Angles of the columns (the scene's grid).
    pub angles: Vec<f64>,
    /// Colour per row, then per angle.
    pub cells: Vec<Vec<Colour>>,
}

/// Copies `items` with each layer's thickness replaced by `f(number, layer)`,
/// numbering layers from 1 depth first.
fn map_layers(items: &[Item], next: &mut usize, f: &dyn Fn(usize, &Layer) -> f64) -> Vec<Item> {
    items
        .iter()
        .map(|item| match item {
            Item::Layer(l) => {
                *next += 1;
                Item::Layer(Layer {
                    thickness_nm: f(*next, l),
                    ..l.clone()
                })
            }
            Item::Repeat(r) => Item::Repeat(Repeat {
                items: map_layers(&r.items, next, f),
                ..r.clone()
            }),
        })
        .collect()
}

/// The layers in stack order, depth first.
fn layers(items: &[Item], out: &mut Vec<Layer>) {
    for item in items {
        match item {
            Item::Layer(l) => out.push(l.clone()),
            Item::Repeat(r) => layers(&r.items, out),
        }
    }
}

impl ThicknessAngle {
    /// Computes `steps` rows over the variation; `progress` is called after each row.
    pub fn compute(
        scene: &Scene,
        viewing: &Viewing,
        variation: &Variation,
        steps: usize,
        progress: &(dyn Fn() + Sync),
    ) -> Result<Self> {
        if !(2..=MAX_STEPS).contains(&steps) {
            return Err(Error::invalid(
                "steps",
                steps,
                format!("must lie within 2–{MAX_STEPS}"),
            ));
        }
        let mut all = Vec::new();
        layers(&scene.stack, &mut all);
        let (from, to, nominal, axis) = match *variation {
            Variation::Layer { layer, range_nm } => {
                let l = all.get(layer.wrapping_sub(1)).ok_or_else(|| {
                    Error::invalid(
                        "layer",
                        layer,
                        format!("the stack has layers 1–{}", all.len()),
                    )
                })?;
                let (a, b) = range_nm.unwrap_or((0.5 * l.thickness_nm, 1.5 * l.thickness_nm));
                if !(a >= 0.0 && b > a && b.is_finite()) {
                    return Err(Error::invalid(
                        "thickness_range",
                        format!("{a},{b}"),
                        "expected 0 ≤ FROM < TO (nm)",
                    ));
                }
                let name = &scene.media[l.medium].name;
                (
                    a,
                    b,
                    l.thickness_nm,
                    format!("Thickness of layer {layer}, {name} (nm)"),
                )
            }
            Variation::Scale { from, to } => {
                if !(from > 0.0 && to > from && to.is_finite()) {
                    return Err(Error::invalid(
                        "scale_range",
                        format!("{from},{to}"),
                        "expected 0 < FROM < TO",
                    ));
                }
                (
                    from,
                    to,
                    1.0,
                    "Scale on every thickness (× design)".to_string(),
                )
            }
        };
        let rows: Vec<f64> = (0..steps)
            .map(|i| from + (to - from) * i as f64 / (steps - 1) as f64)
            .collect();
        let index = scene.indices(&scene.wavelengths_nm)?;
        let cells = rows
            .par_iter()
            .map(|&v| {
                let items = map_layers(&scene.stack, &mut 0, &|n, l| match *variation {
                    Variation::Layer { layer, .. } if n == layer => v,
                    Variation::Layer { .. } => l.thickness_nm,
                    Variation::Scale { .. } => l.thickness_nm * v,
                });
                let spectra = optics::compute(
                    &scene.realisations(&items),
                    &index,
                    &scene.wavelengths_nm,
                    &scene.angles_deg,
                );
                let colours = angle_colours(&spectra, viewing);
                progress();
                colours
            })
            .collect::<Result<Vec<_>>>()?;
        Ok(ThicknessAngle {
            caption: Caption::new(
                &[&scene.title],
                "Colour against angle of incidence and layer thickness",
                viewing,
            ),
            axis,
            rows,
            nominal,
            angles: scene.angles_deg.clone(),
            cells,
        })
    }
}

/// Half the spacing of neighbouring values (or a nominal half-width for one value).
fn half_step(v: &[f64]) -> f64 {
    if v.len() < 2 {
        0.5
    } else {
        (v[v.len() - 1] - v[0]).abs() / (v.len() - 1) as f64 / 2.0
    }
}

impl Chart for ThicknessAngle {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        let body = frame(root, &self.caption, &s)?;
        let (da, dv) = (half_step(&self.angles), half_step(&self.rows));
        let (a0, a1) = (self.angles[0] - da, self.angles[self.angles.len() - 1] + da);
        let (v0, v1) = (self.rows[0] - dv, self.rows[self.rows.len() - 1] + dv);
        let mut chart = ChartBuilder::on(&body)
            .margin_right(s.px(90.0))
            .margin_top(s.px(8.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(84.0))
            .build_cartesian_2d(a0.min(a1)..a0.max(a1), v0..v1)?;
        let digits = if self.rows[self.rows.len() - 1] < 10.0 {
            2
        } else {
            0
        };
        chart
            .configure_mesh()
            .disable_x_mesh()
            .disable_y_mesh()
            .x_desc("Angle of incidence (degrees)")
            .y_desc(self.axis.as_str())
            .axis_desc_style(s.axis())
            .label_style(s.tick())
            .x_label_formatter(&|v| format!("{}°", style::tick(v)))
            .y_label_formatter(&|v| style::num(*v, digits))
            .axis_style(FRAME.stroke_width(1))
            .set_all_tick_mark_size(s.px(5.0))
            .x_labels(10)
            .y_labels(10)
            .draw()?;
        for (row, v) in self.cells.iter().zip(&self.rows) {
            for (c, a) in row.iter().zip(&self.angles) {
                chart.draw_series(std::iter::once(Rectangle::new(
                    [(a - da, v - dv), (a + da, v + dv)],
                    swatch(c).filled(),
                )))?;
            }
        }
        // The design row: an outline and a marker with its name at the right.
        chart.draw_series(std::iter::once(Rectangle::new(
            [(a0, self.nominal - dv), (a1, self.nominal + dv)],
            INK.stroke_width(s.line(2.0)),
        )))?;
        let (x, y) = chart.backend_coord(&(a1, self.nominal));
        let m = s.px(7.0);
        let base = root.get_base_pixel();
        let (x, y) = (x - base.0 + s.px(6.0), y - base.1);
        root.draw(&Polygon::new(
            vec![(x, y), (x + m, y - m), (x + m, y + m)],
            INK.filled(),
        ))?;
        root.draw(&Text::new(
            "design",
            (x + m + s.px(5.0), y),
            s.text(14.0, INK).pos(Pos::new(HPos::Left, VPos::Center)),
        ))?;
        Ok(())
    }
}
