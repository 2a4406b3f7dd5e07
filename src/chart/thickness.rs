//! `thickness-angle`: the colour over one layer's thickness or a scale on
//! every thickness (across) and the angle of incidence (up), as a
//! continuous field interpolated between computed samples. The design's
//! value is a dashed line with a notch above the field; colours outside the
//! RGB gamut are hatched and edged by the contour where they leave it. For
//! unpolarized light on a scene whose left and right differ, one field per
//! incident handedness, side by side on the same axes.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use rayon::prelude::*;

use super::canvas::{Canvas, Pixels, Svg};
use super::gamut::{self, Shown, SoftEdge};
use super::style::{
    self, Caption, FRAME, INK, Plot, Style, describe_all, frame, incident_heading, titled,
};
use super::{Chart, DrawResult};
use crate::angle_colour::{Viewing, angle_colours, handed, handed_lights, incident_views};
use crate::colorimetry::Colour;
use crate::error::{Error, Result};
use crate::scene::{Item, Layer, Repeat, Scene};

/// Most thickness samples.
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
    /// A factor on every thickness and helix pitch (the whole structure
    /// dilated).
    Scale {
        /// First factor.
        from: f64,
        /// Last factor.
        to: f64,
    },
}

/// Angle samples across the scene's range, at most (every grid angle kept).
const ANGLE_SAMPLES: usize = 31;

/// Angle samples at most for an anisotropic scene, whose every sample is a
/// 4×4 computation (helices sliced finely) costing far more.
const ANGLE_SAMPLES_4X4: usize = 13;

/// One field of a [`ThicknessAngle`] chart: the colours for one viewing.
#[derive(Debug, Clone, PartialEq)]
pub struct ThicknessField {
    /// The heading drawn over the field when fields stand side by side
    /// ("Left-circular incident light").
    pub heading: String,
    /// Colour per value, then per angle.
    pub cells: Vec<Vec<Colour>>,
    /// What the field shows at each sample.
    pub shown: Vec<Vec<Shown>>,
}

/// Colours over (thickness, angle): computed at `values` × `angles` and
/// drawn as a continuous field interpolated between them, in one field or,
/// for a scene whose left and right differ, one per incident handedness.
#[derive(Debug, Clone, PartialEq)]
pub struct ThicknessAngle {
    /// Header text.
    pub caption: Caption,
    /// Title of the thickness axis.
    pub axis: String,
    /// The varied value of each sample, increasing (evenly spaced, with the
    /// design value added when it lies inside the range).
    pub values: Vec<f64>,
    /// The design's own value.
    pub nominal: f64,
    /// The design marker's label ("design 157 nm").
    pub nominal_label: String,
    /// Angles of incidence of the samples: the scene's grid, subdivided.
    pub angles: Vec<f64>,
    /// The fields drawn side by side: one for the viewing asked for or, for
    /// unpolarized light on a scene whose left and right differ somewhere
    /// ([`handed`]), left- then right-circular incident light.
    pub fields: Vec<ThicknessField>,
    /// The legend line of the out-of-gamut marks.
    pub legend: String,
}

/// Copies `items` with each layer replaced by `f(number, layer)`,
/// numbering layers from 1 depth first.
fn map_layers(items: &[Item], next: &mut usize, f: &dyn Fn(usize, &Layer) -> Layer) -> Vec<Item> {
    items
        .iter()
        .map(|item| match item {
            Item::Layer(l) => {
                *next += 1;
                Item::Layer(f(*next, l))
            }
            Item::Repeat(r) => Item::Repeat(Repeat {
                items: map_layers(&r.items, next, f),
                ..r.clone()
            }),
        })
        .collect()
}

/// `l` with its thickness, and its helix pitch when it has one, times `v`
/// (the whole structure dilated).
fn scaled(l: &Layer, v: f64) -> Layer {
    let mut out = l.clone();
    out.thickness_nm *= v;
    if let Some(h) = out.anisotropy.as_mut().and_then(|a| a.helix.as_mut()) {
        h.pitch_nm *= v;
    }
    out
}

/// True when a layer of `items` is a helix.
fn helical(items: &[Item]) -> bool {
    let mut all = Vec::new();
    layers(items, &mut all);
    all.iter()
        .any(|l| l.anisotropy.as_ref().is_some_and(|a| a.helix.is_some()))
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
    /// Thickness samples when none are asked for.
    pub const DEFAULT_STEPS: usize = 61;

    /// Thickness samples when none are asked for on an anisotropic scene
    /// (each sample is a 4×4 computation of the whole angle range).
    pub const DEFAULT_STEPS_4X4: usize = 15;

    /// [`ThicknessAngle::DEFAULT_STEPS`], or
    /// [`ThicknessAngle::DEFAULT_STEPS_4X4`] for an anisotropic scene.
    pub fn default_steps(scene: &Scene) -> usize {
        if scene.anisotropic() {
            Self::DEFAULT_STEPS_4X4
        } else {
            Self::DEFAULT_STEPS
        }
    }

    /// Computes `steps` thickness samples over the variation (plus the design
    /// value), each at the scene's angles subdivided to about 31; `progress`
    /// is called after each thickness (it may panic to abandon the chart).
    /// For unpolarized light with no analyser, each thickness's one
    /// computation also gives the colours for left- and right-circular
    /// light, shown instead when the spectra at some thickness are
    /// [`handed`].
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
        let (from, to, nominal, axis, nominal_label) = match *variation {
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
                    format!("design {} nm", style::tick(&l.thickness_nm)),
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
                    if helical(&scene.stack) {
                        "Scale on every thickness and helix pitch (× design)"
                    } else {
                        "Scale on every thickness (× design)"
                    }
                    .to_string(),
                    "design ×1".to_string(),
                )
            }
        };
        let mut values: Vec<f64> = (0..steps)
            .map(|i| from + (to - from) * i as f64 / (steps - 1) as f64)
            .collect();
        if nominal > from
            && nominal < to
            && values
                .iter()
                .all(|v| (v - nominal).abs() > 1e-9 * (to - from))
        {
            values.push(nominal);
            values.sort_by(f64::total_cmp);
        }
        let angles = subdivide(
            &scene.angles_deg,
            if scene.anisotropic() {
                ANGLE_SAMPLES_4X4
            } else {
                ANGLE_SAMPLES
            },
        );
        let index = scene.indices(&scene.wavelengths_nm)?;
        let jones = viewing.analyzer.is_some();
        if jones {
            scene.require_coherent()?;
        }
        let lights = handed_lights(viewing);
        // `progress` may panic to abandon the chart; the fuse then stops the
        // other threads at once.
        let rows = values
            .par_iter()
            .panic_fuse()
            .map(|&v| {
                let items = map_layers(&scene.stack, &mut 0, &|n, l| match *variation {
                    Variation::Layer { layer, .. } if n == layer => Layer {
                        thickness_nm: v,
                        ..l.clone()
                    },
                    Variation::Layer { .. } => l.clone(),
                    Variation::Scale { .. } => scaled(l, v),
                });
                let spectra = scene.rows_of(&items, &index, &angles, jones, |rows| {
                    if jones {
                        rows.all_with_jones()
                    } else {
                        rows.all()
                    }
                });
                let own = angle_colours(&spectra, viewing)?;
                // Spectra without Jones matrices are never handed.
                let both = match &lights {
                    Some(lights) if spectra.jones.is_some() => lights
                        .iter()
                        .map(|v| angle_colours(&spectra, v))
                        .collect::<Result<Vec<_>>>()?,
                    _ => Vec::new(),
                };
                progress();
                Ok((handed(&spectra), own, both))
            })
            .collect::<Result<Vec<_>>>()?;
        let views = incident_views(viewing, rows.iter().any(|(h, _, _)| *h));
        let mut per_view: Vec<Vec<Vec<Colour>>> = vec![Vec::new(); views.len()];
        for (_, own, both) in rows {
            if views.len() > 1 {
                for (cells, colours) in per_view.iter_mut().zip(both) {
                    cells.push(colours);
                }
            } else {
                per_view[0].push(own);
            }
        }
        let soft = SoftEdge::new(viewing, &scene.wavelengths_nm)?;
        let fields = views
            .iter()
            .zip(per_view)
            .map(|(v, cells)| ThicknessField {
                heading: incident_heading(v),
                shown: cells
                    .iter()
                    .map(|row| row.iter().map(|c| soft.show(c)).collect())
                    .collect(),
                cells,
            })
            .collect();
        Ok(ThicknessAngle {
            caption: Caption {
                viewing: describe_all(&views),
                ..Caption::new(
                    &[&scene.title],
                    "Colour over layer thickness and angle of incidence",
                    viewing,
                )
            },
            axis,
            values,
            nominal,
            nominal_label,
            angles,
            fields,
            legend: gamut::legend(viewing),
        })
    }

    /// Whether any sample of any field lies outside the gamut.
    pub fn any_outside(&self) -> bool {
        self.fields
            .iter()
            .flat_map(|f| f.cells.iter().flatten())
            .any(|c| !c.in_gamut)
    }

    /// The pixel where (value, angle) is drawn in field `field` of an image
    /// of `size`.
    pub fn pixel_of(&self, size: (u32, u32), field: usize, at: (f64, f64)) -> (i32, i32) {
        let mut svg = Svg::default();
        let root = Canvas::new(&mut svg, size).into_drawing_area();
        let s = Style::new(size);
        let plots = self.plots(&root, &s).expect("SVG drawing cannot fail");
        plots[field].0.backend_coord(&at)
    }

    /// The angle range drawn (half a degree either side of a single angle).
    fn angle_range(&self) -> (f64, f64) {
        let (a0, a1) = (self.angles[0], self.angles[self.angles.len() - 1]);
        if a1 > a0 {
            (a0, a1)
        } else {
            (a0 - 0.5, a1 + 0.5)
        }
    }

    /// The header on `root`, then each field's axes side by side under it
    /// (headed when there are several), with how far right (in pixels of
    /// `root`) the design's label may reach.
    #[allow(clippy::type_complexity)]
    fn plots<'a, DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        s: &Style,
    ) -> std::result::Result<Vec<(Plot<'a, DB>, i32)>, DrawingAreaErrorKind<DB::ErrorType>> {
        let body = frame(root, &self.caption, s)?;
        let (_, h) = body.dim_in_pixel();
        let (main, _) = body.split_vertically(h as i32 - s.px(26.0));
        let n = self.fields.len();
        if n == 1 {
            let (rw, _) = root.dim_in_pixel();
            return Ok(vec![(self.axes(&main, s, 10)?, rw as i32 - s.px(10.0))]);
        }
        let base = root.get_base_pixel().0;
        main.split_evenly((1, n))
            .iter()
            .zip(&self.fields)
            .map(|(area, field)| {
                let (x, w) = (area.get_base_pixel().0 - base, area.dim_in_pixel().0);
                let plot = self.axes(&titled(area, s, &field.heading)?, s, 10 / n)?;
                Ok((plot, x + w as i32 - s.px(10.0)))
            })
            .collect()
    }

    /// Axes over the values and angles on `area`, `x_labels` value ticks.
    fn axes<'a, DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        s: &Style,
        x_labels: usize,
    ) -> std::result::Result<Plot<'a, DB>, DrawingAreaErrorKind<DB::ErrorType>> {
        let (a0, a1) = self.angle_range();
        let (v0, v1) = (self.values[0], self.values[self.values.len() - 1]);
        let mut chart = ChartBuilder::on(area)
            .margin_top(s.px(34.0))
            .margin_right(s.px(30.0))
            .x_label_area_size(s.px(62.0))
            .y_label_area_size(s.px(84.0))
            .build_cartesian_2d(v0..v1, a0..a1)?;
        let digits = if v1 < 10.0 { 2 } else { 0 };
        chart
            .configure_mesh()
            .disable_x_mesh()
            .disable_y_mesh()
            .x_desc(self.axis.as_str())
            .y_desc("Angle of incidence (degrees)")
            .axis_desc_style(s.axis())
            .label_style(s.tick())
            .x_label_formatter(&|v| style::num(*v, digits))
            .y_label_formatter(&|v| format!("{}°", style::tick(v)))
            .axis_style(FRAME.stroke_width(1))
            .set_all_tick_mark_size(s.px(5.0))
            .x_labels(x_labels)
            .y_labels(10)
            .draw()?;
        Ok(chart)
    }

    /// The field as packed RGB, `w × h` pixels: bilinear between the samples
    /// (value across, angle up), hatched where the interpolated relative
    /// chroma exceeds the gamut edge.
    fn pixels(&self, field: &ThicknessField, (w, h): (usize, usize), s: &Style) -> Vec<u8> {
        let (a0, a1) = self.angle_range();
        let (v0, v1) = (self.values[0], self.values[self.values.len() - 1]);
        let cols: Vec<(usize, f64)> = (0..w)
            .map(|x| locate(&self.values, v0 + (v1 - v0) * (x as f64 + 0.5) / w as f64))
            .collect();
        let period = 2.0 * gamut::hatch_period(s);
        let mut out = Vec::with_capacity(3 * w * h);
        for y in 0..h {
            let (j, u) = locate(&self.angles, a1 - (a1 - a0) * (y as f64 + 0.5) / h as f64);
            let j1 = (j + 1).min(self.angles.len() - 1);
            for (x, &(i, t)) in cols.iter().enumerate() {
                let i1 = (i + 1).min(self.values.len() - 1);
                let at = |f: &dyn Fn(&Shown) -> f64| {
                    let g = |r: usize, c: usize| f(&field.shown[r][c]);
                    (1.0 - t) * ((1.0 - u) * g(i, j) + u * g(i, j1))
                        + t * ((1.0 - u) * g(i1, j) + u * g(i1, j1))
                };
                let mut rgb: [f64; 3] = std::array::from_fn(|k| at(&|p| p.rgb[k]));
                if at(&|p| p.excess.min(1.0)) > 0.0 {
                    // Dark and light lines in turn, legible on any colour.
                    let (x, y) = (x as f64, y as f64);
                    let dark = gamut::hatch_coverage(x, y, period);
                    let light = gamut::hatch_coverage(x + period / 2.0, y, period);
                    let ink = [INK.0, INK.1, INK.2].map(|c| c as f64 / 255.0);
                    for k in 0..3 {
                        rgb[k] += 0.6 * dark * (ink[k] - rgb[k]);
                        rgb[k] += 0.6 * light * (1.0 - rgb[k]);
                    }
                }
                out.extend(rgb.map(|v| (v.clamp(0.0, 1.0) * 255.0).round() as u8));
            }
        }
        out
    }

    /// Segments of the gamut-edge contour (relative chroma 1) in data
    /// coordinates, by marching squares on the sample grid.
    fn edge_segments(&self, field: &ThicknessField) -> Vec<[(f64, f64); 2]> {
        let e = |i: usize, j: usize| field.shown[i][j].excess.min(1.0);
        let mut out = Vec::new();
        let (nv, na) = (self.values.len(), self.angles.len());
        if na < 2 {
            return out;
        }
        for i in 0..nv - 1 {
            for j in 0..na - 1 {
                let corners = [(i, j), (i + 1, j), (i + 1, j + 1), (i, j + 1)];
                let mut cuts = Vec::new();
                for k in 0..4 {
                    let (p, q) = (corners[k], corners[(k + 1) % 4]);
                    let (ep, eq) = (e(p.0, p.1), e(q.0, q.1));
                    if (ep > 0.0) != (eq > 0.0) {
                        let f = ep / (ep - eq);
                        let lerp = |a: f64, b: f64| a + f * (b - a);
                        cuts.push((
                            lerp(self.values[p.0], self.values[q.0]),
                            lerp(self.angles[p.1], self.angles[q.1]),
                        ));
                    }
                }
                for pair in cuts.chunks_exact(2) {
                    out.push([pair[0], pair[1]]);
                }
            }
        }
        out
    }

    /// Draws `field` on its axes `chart` (on `root`): the colours, the gamut
    /// edge and the design's line, notch and label, which ends left of
    /// `reach` (pixels of `root`) or else stands left of the notch.
    fn draw_field<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        s: &Style,
        chart: &mut Plot<'_, DB>,
        field: &ThicknessField,
        reach: i32,
    ) -> DrawResult<DB> {
        let (xs, ys) = chart.plotting_area().get_pixel_range();
        let base = root.get_base_pixel();
        let (w, h) = ((xs.end - xs.start) as usize, (ys.end - ys.start) as usize);
        root.draw(&Pixels {
            pos: (xs.start - base.0, ys.start - base.1),
            size: (w as u32, h as u32),
            rgb: self.pixels(field, (w, h), s),
        })?;
        // The gamut edge: ink over a white halo, legible on any colour.
        let segments = self.edge_segments(field);
        for (colour, width) in [(WHITE, 3.0), (INK, 1.4)] {
            chart.draw_series(
                segments
                    .iter()
                    .map(|seg| PathElement::new(seg.to_vec(), colour.stroke_width(s.line(width)))),
            )?;
        }
        // The design: a dashed line across the field and a notch above it.
        let (a0, a1) = self.angle_range();
        let (x, top) = chart.backend_coord(&(self.nominal, a1));
        let (_, bottom) = chart.backend_coord(&(self.nominal, a0));
        let (x, top, bottom) = (x - base.0, top - base.1, bottom - base.1);
        let (dash, gap) = (s.px(9.0), s.px(6.0));
        for (colour, width) in [(WHITE, 3.0), (INK, 1.4)] {
            let mut y = top;
            while y < bottom {
                root.draw(&PathElement::new(
                    vec![(x, y), (x, (y + dash).min(bottom))],
                    colour.stroke_width(s.line(width)),
                ))?;
                y += dash + gap;
            }
        }
        let m = s.px(7.0);
        root.draw(&Polygon::new(
            vec![
                (x - m, top - 2 * m - s.px(3.0)),
                (x + m, top - 2 * m - s.px(3.0)),
                (x, top - s.px(3.0)),
            ],
            INK.filled(),
        ))?;
        let label_w = super::font::width(&self.nominal_label, s.size(14.0), FontStyle::Normal);
        let right = (x + m + s.px(6.0)) as f64 + label_w < reach as f64;
        root.draw(&Text::new(
            self.nominal_label.clone(),
            if right {
                (x + m + s.px(6.0), top - m - s.px(3.0))
            } else {
                (x - m - s.px(6.0), top - m - s.px(3.0))
            },
            s.text(14.0, INK).pos(Pos::new(
                if right { HPos::Left } else { HPos::Right },
                VPos::Center,
            )),
        ))?;
        Ok(())
    }
}

/// The scene's angles (sorted, unique), each interval cut into equal parts
/// so that there are at most `most` (or the grid itself, when it has more).
fn subdivide(grid: &[f64], most: usize) -> Vec<f64> {
    let mut sorted = grid.to_vec();
    sorted.sort_by(f64::total_cmp);
    sorted.dedup();
    if sorted.len() < 2 {
        return sorted;
    }
    let sub = ((most - 1) / (sorted.len() - 1)).max(1);
    sorted
        .windows(2)
        .flat_map(|w| (0..sub).map(move |k| w[0] + (w[1] - w[0]) * k as f64 / sub as f64))
        .chain(sorted.last().copied())
        .collect()
}

/// The interval of increasing `xs` holding `v` and the fraction across it.
fn locate(xs: &[f64], v: f64) -> (usize, f64) {
    if xs.len() < 2 {
        return (0, 0.0);
    }
    let i = xs.partition_point(|&x| x <= v).clamp(1, xs.len() - 1) - 1;
    let t = ((v - xs[i]) / (xs[i + 1] - xs[i])).clamp(0.0, 1.0);
    (i, t)
}

impl Chart for ThicknessAngle {
    fn caption(&self) -> &style::Caption {
        &self.caption
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        let s = Style::new(root.dim_in_pixel());
        for ((mut plot, reach), field) in self.plots(root, &s)?.into_iter().zip(&self.fields) {
            self.draw_field(root, &s, &mut plot, field, reach)?;
        }
        if self.any_outside() {
            gamut::legend_line(root, &s, &self.legend)?;
        }
        Ok(())
    }
}
