//! The house style shared by every chart: palette, type sizes scaled to the
//! image, the header (scene title and viewing conditions), axis styling and
//! the per-scene colour trajectory that several kinds plot.

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::DrawResult;
use crate::angle_colour::{Side, Viewing, angle_colours, side_by_side};
use crate::colorimetry::{Colour, Observer};
use crate::error::Result;
use crate::scene::Scene;

/// Text and data ink.
pub const INK: RGBColor = RGBColor(0x1b, 0x23, 0x30);
/// Secondary text.
pub const MUTED: RGBColor = RGBColor(0x5a, 0x64, 0x73);
/// Grid lines.
pub const GRID: RGBColor = RGBColor(0xe4, 0xe7, 0xec);
/// Frames and reference lines.
pub const FRAME: RGBColor = RGBColor(0x9a, 0xa3, 0xae);
/// The accent of the header rule.
pub const ACCENT: RGBColor = RGBColor(0x0b, 0x6e, 0x69);

/// Series colours: the Okabe–Ito palette (M. Okabe and K. Ito, "Color
/// Universal Design", 2008), distinguishable with common colour-vision
/// deficiencies and in greyscale print by its lightness spread.
pub const SERIES: [RGBColor; 7] = [
    RGBColor(0x00, 0x72, 0xb2),
    RGBColor(0xd5, 0x5e, 0x00),
    RGBColor(0x00, 0x9e, 0x73),
    RGBColor(0xcc, 0x79, 0xa7),
    RGBColor(0xe6, 0x9f, 0x00),
    RGBColor(0x56, 0xb4, 0xe9),
    RGBColor(0x00, 0x00, 0x00),
];

/// `c` faded toward white, keeping the fraction `keep` of its colour
/// (opaque, so neighbouring cells show no seams).
pub fn faded(c: RGBColor, keep: f64) -> RGBColor {
    let fade = |v: u8| (255.0 - keep * (255.0 - v as f64)).round() as u8;
    RGBColor(fade(c.0), fade(c.1), fade(c.2))
}

/// A chart with numbers on both axes.
pub type Plot<'a, DB> = ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// Sizes scaled to the image: every length is given for a 1200 × 800 chart.
#[derive(Debug, Clone, Copy)]
pub struct Style {
    k: f64,
}

impl Style {
    /// The scale for an area of `size` pixels.
    pub fn new(size: (u32, u32)) -> Self {
        Style {
            k: (size.0 as f64 / 1200.0).min(size.1 as f64 / 800.0),
        }
    }

    /// A length in pixels.
    pub fn px(&self, v: f64) -> i32 {
        (v * self.k).round().max(1.0) as i32
    }

    /// A line width in pixels.
    pub fn line(&self, v: f64) -> u32 {
        self.px(v) as u32
    }

    /// The pixel size of text of nominal size `pt` (never below 10 pixels).
    pub fn size(&self, pt: f64) -> f64 {
        (pt * self.k).max(10.0)
    }

    /// Text of nominal size `pt` in `colour`.
    pub fn text(&self, pt: f64, colour: RGBColor) -> TextStyle<'static> {
        ("sans-serif", self.size(pt)).into_font().color(&colour)
    }

    /// Bold text.
    pub fn bold(&self, pt: f64, colour: RGBColor) -> TextStyle<'static> {
        ("sans-serif", self.size(pt), FontStyle::Bold)
            .into_font()
            .color(&colour)
    }

    /// Tick labels.
    pub fn tick(&self) -> TextStyle<'static> {
        self.text(15.0, MUTED)
    }

    /// Axis titles.
    pub fn axis(&self) -> TextStyle<'static> {
        self.text(17.0, INK)
    }
}

/// What a chart states about itself in its header.
#[derive(Debug, Clone, PartialEq)]
pub struct Caption {
    /// The scene title (or the designs compared).
    pub title: String,
    /// What is plotted.
    pub subject: String,
    /// Light, observer, side and polarization.
    pub viewing: String,
}

impl Caption {
    /// The caption for scenes titled `titles`.
    pub fn new(titles: &[&str], subject: &str, viewing: &Viewing) -> Self {
        let title = match titles {
            [one] if one.trim().is_empty() => "Untitled scene".to_string(),
            [one] => one.to_string(),
            many => format!("{} designs compared", many.len()),
        };
        Caption {
            title,
            subject: subject.to_string(),
            viewing: describe(viewing),
        }
    }
}

/// "Illuminant D65 · CIE 1931 2° observer".
pub fn light(v: &Viewing) -> String {
    format!(
        "Illuminant {} · {} observer",
        v.illuminant.name(),
        observer_name(v.observer)
    )
}

/// "Illuminant D65 · CIE 1931 2° observer · reflected light · unpolarized".
pub fn describe(v: &Viewing) -> String {
    describe_all(std::slice::from_ref(v))
}

/// [`describe`] for viewings shown side by side (same light and side):
/// "… · reflected light · unpolarized, through a left analyser and through
/// a right analyser".
pub fn describe_all(views: &[Viewing]) -> String {
    let v = &views[0];
    let seen: Vec<String> = views.iter().map(Viewing::seen).collect();
    let seen = match seen.split_last() {
        Some((last, rest)) if !rest.is_empty() => format!("{} and {last}", rest.join(", ")),
        _ => seen.join(""),
    };
    format!(
        "{} · {} light · {seen}",
        light(v),
        match v.side {
            Side::Reflect => "reflected",
            Side::Transmit => "transmitted",
        },
    )
}

/// "CIE 1931 2°" or "CIE 1964 10°".
pub fn observer_name(o: Observer) -> &'static str {
    match o {
        Observer::Cie1931_2 => "CIE 1931 2°",
        Observer::Cie1964_10 => "CIE 1964 10°",
    }
}

/// Draws the header (title, subject, viewing line and accent rule) and a
/// footer tag; returns the area left for the chart body.
pub fn frame<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    caption: &Caption,
    s: &Style,
) -> std::result::Result<DrawingArea<DB, Shift>, DrawingAreaErrorKind<DB::ErrorType>> {
    root.fill(&WHITE)?;
    let (w, h) = root.dim_in_pixel();
    let (w, h) = (w as i32, h as i32);
    let left = s.px(36.0);
    root.draw(&Rectangle::new(
        [(left, s.px(22.0)), (left + s.px(5.0), s.px(84.0))],
        ACCENT.filled(),
    ))?;
    let x = left + s.px(16.0);
    root.draw(&Text::new(
        fitted(&caption.title, s.size(27.0), (w - x - s.px(24.0)) as f64),
        (x, s.px(22.0)),
        s.bold(27.0, INK).pos(Pos::new(HPos::Left, VPos::Top)),
    ))?;
    root.draw(&Text::new(
        caption.subject.clone(),
        (x, s.px(58.0)),
        s.text(17.0, INK).pos(Pos::new(HPos::Left, VPos::Top)),
    ))?;
    root.draw(&Text::new(
        caption.viewing.clone(),
        (x, s.px(82.0)),
        s.text(14.0, MUTED).pos(Pos::new(HPos::Left, VPos::Top)),
    ))?;
    root.draw(&Text::new(
        "lamella",
        (w - s.px(16.0), h - s.px(12.0)),
        s.text(12.0, FRAME).pos(Pos::new(HPos::Right, VPos::Bottom)),
    ))?;
    Ok(root.margin(s.px(112.0), s.px(34.0), s.px(24.0), s.px(30.0)))
}

/// `text` in bold at `size` pixels, cut at a word with an ellipsis where it
/// would be wider than `room` pixels.
fn fitted(text: &str, size: f64, room: f64) -> String {
    let wide = |t: &str| super::font::width(t, size, FontStyle::Bold) > room;
    if !wide(text) {
        return text.to_string();
    }
    let mut cut = text.to_string();
    while !cut.is_empty() && wide(&format!("{cut}…")) {
        cut = match cut.trim_end().rsplit_once(' ') {
            Some((head, _)) if !head.is_empty() => head.to_string(),
            _ => {
                cut.pop();
                cut
            }
        };
    }
    format!("{}…", cut.trim_end_matches([' ', ':', ',', ';']))
}

/// Grid and tick styling for a Cartesian chart, with axis titles.
pub fn mesh<DB: DrawingBackend>(
    chart: &mut ChartContext<DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    s: &Style,
    x_desc: &str,
    y_desc: &str,
    x_fmt: &dyn Fn(&f64) -> String,
    y_fmt: &dyn Fn(&f64) -> String,
) -> DrawResult<DB> {
    chart
        .configure_mesh()
        .x_desc(x_desc)
        .y_desc(y_desc)
        .axis_desc_style(s.axis())
        .label_style(s.tick())
        .x_label_formatter(x_fmt)
        .y_label_formatter(y_fmt)
        .bold_line_style(GRID.stroke_width(1))
        .light_line_style(TRANSPARENT)
        .axis_style(FRAME.stroke_width(1))
        .set_all_tick_mark_size(s.px(5.0))
        .x_labels(10)
        .y_labels(8)
        .draw()
}

/// A number with a typographic minus sign and `digits` decimals.
pub fn num(v: f64, digits: usize) -> String {
    let t = format!("{:.*}", digits, v);
    let t = if t
        .trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        t.trim_start_matches('-').to_string()
    } else {
        t
    };
    t.replace('-', "−")
}

/// Axis tick labels without trailing zeros: 0.5, 1, 1.5.
pub fn tick(v: &f64) -> String {
    let t = format!("{:.3}", v);
    let t = t.trim_end_matches('0').trim_end_matches('.');
    num(
        t.parse().unwrap_or(*v),
        t.split('.').nth(1).map_or(0, str::len),
    )
}

/// The colour of one scene at each of its angles.
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// The scene's title.
    pub label: String,
    /// Angles of incidence in degrees.
    pub angles: Vec<f64>,
    /// The colour at each angle.
    pub colours: Vec<Colour>,
    /// The points' labels along the trajectory (geometry names); empty:
    /// the angles in degrees.
    pub names: Vec<String>,
}

impl Series {
    /// The colour at every angle of the scene's grid.
    pub fn of_scene(scene: &Scene, viewing: &Viewing) -> Result<Self> {
        let spectra = viewing.spectra_of(scene, &scene.angles_deg)?;
        Ok(Series {
            label: untitled(&scene.title),
            angles: spectra.angles_deg.clone(),
            colours: angle_colours(&spectra, viewing)?,
            names: Vec::new(),
        })
    }

    /// One series per viewing of [`side_by_side`], with the viewings:
    /// labelled by the scene's title, or for a scene whose left and right
    /// differ by what is seen ("Unpolarized", "Through a left analyser"),
    /// after the shortened title when `titled`.
    pub fn side_by_side(
        scene: &Scene,
        viewing: &Viewing,
        titled: bool,
    ) -> Result<Vec<(Self, Viewing)>> {
        let spectra = viewing.spectra_of(scene, &scene.angles_deg)?;
        let views = side_by_side(viewing, &spectra);
        let several = views.len() > 1;
        views
            .into_iter()
            .map(|v| {
                let label = match (several, titled) {
                    (false, _) => untitled(&scene.title),
                    (true, false) => capitalised(&v.seen()),
                    (true, true) => format!("{} · {}", short(&scene.title), v.seen()),
                };
                let series = Series {
                    label,
                    angles: spectra.angles_deg.clone(),
                    colours: angle_colours(&spectra, &v)?,
                    names: Vec::new(),
                };
                Ok((series, v))
            })
            .collect()
    }

    /// The series of every scene side by side ([`Series::side_by_side`]),
    /// with the viewing line of a caption naming every view shown.
    pub fn of_scenes(scenes: &[(&Scene, &Viewing)]) -> Result<(Vec<Self>, String)> {
        let mut out = Vec::new();
        let mut views: Vec<Viewing> = Vec::new();
        for (scene, viewing) in scenes {
            for (series, v) in Series::side_by_side(scene, viewing, scenes.len() > 1)? {
                if views.iter().all(|w| w.seen() != v.seen()) {
                    views.push(v);
                }
                out.push(series);
            }
        }
        Ok((out, describe_all(&views)))
    }
}

/// "Through a left analyser" from "through a left analyser".
pub fn capitalised(t: &str) -> String {
    let mut c = t.chars();
    c.next()
        .map(|f| f.to_uppercase().chain(c).collect())
        .unwrap_or_default()
}

/// The heading of a panel of incident light `v`: "Left-circular incident
/// light".
pub fn incident_heading(v: &Viewing) -> String {
    format!("{} incident light", capitalised(&v.seen()))
}

/// The title, or "Untitled scene" when it is blank.
pub fn untitled(title: &str) -> String {
    if title.trim().is_empty() {
        "Untitled scene".into()
    } else {
        title.to_string()
    }
}

/// The 8-bit colour of an encoded sRGB triple.
pub fn swatch(c: &Colour) -> RGBColor {
    let [r, g, b] = c.rgb.map(|v| (v * 255.0).round() as u8);
    RGBColor(r, g, b)
}

/// Indices of points to label so that labels lie at least `gap` pixels
/// apart along the way (first and last always).
pub fn sparse_labels(points: &[(i32, i32)], gap: f64) -> Vec<usize> {
    let mut keep: Vec<usize> = Vec::new();
    let far = |a: (i32, i32), b: (i32, i32)| {
        let (dx, dy) = ((a.0 - b.0) as f64, (a.1 - b.1) as f64);
        dx.hypot(dy) >= gap
    };
    for (i, &p) in points.iter().enumerate() {
        if keep.iter().all(|&j| far(points[j], p)) {
            keep.push(i);
        }
    }
    let last = points.len().saturating_sub(1);
    if !points.is_empty() && !keep.contains(&last) {
        keep.retain(|&j| far(points[j], points[last]));
        keep.push(last);
    }
    keep
}

/// The part of segment a–b inside the box [x0, x1] × [y0, y1]
/// (Liang–Barsky clipping).
pub fn clip(
    a: (f64, f64),
    b: (f64, f64),
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
) -> Option<((f64, f64), (f64, f64))> {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let (mut t0, mut t1) = (0.0f64, 1.0f64);
    for (p, q) in [
        (-dx, a.0 - x0),
        (dx, x1 - a.0),
        (-dy, a.1 - y0),
        (dy, y1 - a.1),
    ] {
        if p == 0.0 {
            if q < 0.0 {
                return None;
            }
        } else {
            let r = q / p;
            if p < 0.0 {
                t0 = t0.max(r);
            } else {
                t1 = t1.min(r);
            }
        }
    }
    (t0 <= t1).then_some((
        (a.0 + t0 * dx, a.1 + t0 * dy),
        (a.0 + t1 * dx, a.1 + t1 * dy),
    ))
}

/// A scene title cut to fit a legend.
pub fn short(title: &str) -> String {
    let t = if title.trim().is_empty() {
        "Untitled scene"
    } else {
        title.trim()
    };
    if t.chars().count() > 26 {
        format!("{}…", t.chars().take(25).collect::<String>())
    } else {
        t.to_string()
    }
}

/// A boxed legend of scene lines at the top left of a plot.
pub fn legend<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    s: &Style,
    series: &[Series],
) -> DrawResult<DB> {
    let line = s.px(24.0);
    let width = series
        .iter()
        .map(|x| super::font::width(&short(&x.label), s.size(14.0), FontStyle::Normal) as i32)
        .max()
        .unwrap_or(0)
        + s.px(64.0);
    let (x0, y0) = (s.px(10.0), s.px(10.0));
    area.draw(&Rectangle::new(
        [
            (x0, y0),
            (x0 + width, y0 + line * series.len() as i32 + s.px(10.0)),
        ],
        WHITE.mix(0.92).filled(),
    ))?;
    area.draw(&Rectangle::new(
        [
            (x0, y0),
            (x0 + width, y0 + line * series.len() as i32 + s.px(10.0)),
        ],
        FRAME.stroke_width(1),
    ))?;
    for (k, x) in series.iter().enumerate() {
        let y = y0 + s.px(5.0) + line * k as i32 + line / 2;
        area.draw(&PathElement::new(
            vec![(x0 + s.px(10.0), y), (x0 + s.px(44.0), y)],
            SERIES[k % SERIES.len()].stroke_width(s.line(3.0)),
        ))?;
        area.draw(&Text::new(
            short(&x.label),
            (x0 + s.px(54.0), y),
            s.text(14.0, INK).pos(Pos::new(HPos::Left, VPos::Center)),
        ))?;
    }
    Ok(())
}

/// The smallest ranges holding `x` and `y` (centred) that give equal data
/// units per pixel on a plot of `w` × `h` pixels.
pub fn equal_scales(x: (f64, f64), y: (f64, f64), w: f64, h: f64) -> ((f64, f64), (f64, f64)) {
    let per_px = ((x.1 - x.0) / w).max((y.1 - y.0) / h);
    let (cx, cy) = ((x.0 + x.1) / 2.0, (y.0 + y.1) / 2.0);
    let (hx, hy) = (per_px * w / 2.0, per_px * h / 2.0);
    ((cx - hx, cx + hx), (cy - hy, cy + hy))
}

/// A box x0, y0, x1, y1 in pixels.
type Box4 = (f64, f64, f64, f64);

/// A label's anchor point and text anchor.
type Placed = ((i32, i32), Pos);

/// Places text labels beside points of polylines so that they avoid the
/// points, the lines and each other as far as possible: for each wanted
/// label, the first of eight directions (left of the direction of travel
/// first) with the fewest collisions. `lines` are polylines in pixels;
/// `wanted` are (line, point, text, text width, text height). Returns the
/// anchor point and text anchor of each label.
pub fn place_labels(
    lines: &[Vec<(i32, i32)>],
    wanted: &[(usize, usize, f64, f64)],
    radius: f64,
    gap: f64,
) -> Vec<Placed> {
    let mut boxes: Vec<Box4> = Vec::new();
    let mut out = Vec::new();
    for &(l, i, w, h) in wanted {
        let line = &lines[l];
        let p = line[i];
        let (a, b) = (line[i.saturating_sub(1)], line[(i + 1).min(line.len() - 1)]);
        let (dx, dy) = ((b.0 - a.0) as f64, (b.1 - a.1) as f64);
        let n = dx.hypot(dy);
        let (nx, ny) = if n > 0.0 {
            (dy / n, -dx / n)
        } else {
            (1.0, 0.0)
        };
        let turn = |c: f64, s: f64| (nx * c - ny * s, nx * s + ny * c);
        let r2 = std::f64::consts::FRAC_1_SQRT_2;
        let dirs = [
            (nx, ny),
            (-nx, -ny),
            turn(r2, r2),
            turn(r2, -r2),
            turn(-r2, r2),
            turn(-r2, -r2),
            turn(0.0, 1.0),
            turn(0.0, -1.0),
        ];
        let mut best: Option<(usize, Box4, Placed)> = None;
        for (ux, uy) in dirs {
            let (ax, ay) = (p.0 as f64 + ux * gap, p.1 as f64 + uy * gap);
            let hp = if ux > 0.35 {
                HPos::Left
            } else if ux < -0.35 {
                HPos::Right
            } else {
                HPos::Center
            };
            let vp = if uy > 0.35 {
                VPos::Top
            } else if uy < -0.35 {
                VPos::Bottom
            } else {
                VPos::Center
            };
            let x0 = match hp {
                HPos::Left => ax,
                HPos::Right => ax - w,
                HPos::Center => ax - w / 2.0,
            };
            let y0 = match vp {
                VPos::Top => ay,
                VPos::Bottom => ay - h,
                VPos::Center => ay - h / 2.0,
            };
            let bx = (x0 - 2.0, y0 - 2.0, x0 + w + 2.0, y0 + h + 2.0);
            let hits_box =
                |o: &(f64, f64, f64, f64)| bx.0 < o.2 && o.0 < bx.2 && bx.1 < o.3 && o.1 < bx.3;
            let mut hits = boxes.iter().filter(|o| hits_box(o)).count() * 3;
            for ln in lines {
                for q in ln {
                    let o = (
                        q.0 as f64 - radius,
                        q.1 as f64 - radius,
                        q.0 as f64 + radius,
                        q.1 as f64 + radius,
                    );
                    hits += usize::from(hits_box(&o)) * 2;
                }
                for seg in ln.windows(2) {
                    let f = |q: (i32, i32)| (q.0 as f64, q.1 as f64);
                    hits += usize::from(
                        clip(f(seg[0]), f(seg[1]), (bx.0, bx.2), (bx.1, bx.3)).is_some(),
                    );
                }
            }
            if best.as_ref().is_none_or(|b| hits < b.0) {
                best = Some((
                    hits,
                    bx,
                    ((ax.round() as i32, ay.round() as i32), Pos::new(hp, vp)),
                ));
            }
        }
        let (_, bx, placed) = best.expect("eight candidates");
        boxes.push(bx);
        out.push(placed);
    }
    out
}

/// Labels the angles of every series along its trajectory (`at` gives a
/// colour's data point), sparsely and clear of the lines.
pub fn angle_labels<DB: DrawingBackend>(
    chart: &ChartContext<DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    s: &Style,
    series: &[Series],
    at: &dyn Fn(&Colour) -> (f64, f64),
) -> DrawResult<DB> {
    let lines: Vec<Vec<(i32, i32)>> = series
        .iter()
        .map(|x| {
            x.colours
                .iter()
                .map(|c| chart.backend_coord(&at(c)))
                .collect()
        })
        .collect();
    let size = s.size(13.0);
    let mut wanted = Vec::new();
    let mut texts = Vec::new();
    for (l, (line, x)) in lines.iter().zip(series).enumerate() {
        for i in sparse_labels(line, s.px(46.0) as f64) {
            let t = x
                .names
                .get(i)
                .cloned()
                .unwrap_or_else(|| format!("{}°", tick(&x.angles[i])));
            wanted.push((
                l,
                i,
                super::font::width(&t, size, FontStyle::Normal),
                super::font::cap_height(size),
            ));
            texts.push(t);
        }
    }
    let placed = place_labels(&lines, &wanted, s.px(9.0) as f64, s.px(13.0) as f64);
    let base = chart.plotting_area().get_base_pixel();
    let area = chart.plotting_area().strip_coord_spec();
    for (t, ((x, y), pos)) in texts.into_iter().zip(placed) {
        area.draw(&Text::new(
            t,
            (x - base.0, y - base.1),
            s.text(13.0, INK).pos(pos),
        ))?;
    }
    Ok(())
}

/// A bold heading over `area`; returns the area below it.
pub fn titled<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    s: &Style,
    title: &str,
) -> std::result::Result<DrawingArea<DB, Shift>, DrawingAreaErrorKind<DB::ErrorType>> {
    let (top, rest) = area.split_vertically(s.px(30.0));
    top.draw(&Text::new(
        title.to_string(),
        (s.px(74.0), s.px(4.0)),
        s.bold(15.0, INK).pos(Pos::new(HPos::Left, VPos::Top)),
    ))?;
    Ok(rest)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn clipping_keeps_the_inside_part() {
        let b = ((0.0, 1.0), (0.0, 1.0));
        assert_eq!(
            clip((-1.0, 0.5), (2.0, 0.5), b.0, b.1),
            Some(((0.0, 0.5), (1.0, 0.5)))
        );
        assert_eq!(clip((2.0, 2.0), (3.0, 3.0), b.0, b.1), None);
        assert_eq!(
            clip((0.2, 0.2), (0.4, 0.4), b.0, b.1),
            Some(((0.2, 0.2), (0.4, 0.4)))
        );
    }

    #[test]
    fn equal_scales_hold_the_ranges_with_one_unit_per_pixel() {
        let ((x0, x1), (y0, y1)) = equal_scales((0.0, 0.8), (0.0, 0.9), 400.0, 600.0);
        assert!((x1 - x0) / 400.0 - (y1 - y0) / 600.0 < 1e-12);
        assert!(x0 <= 0.0 && x1 >= 0.8 && y0 <= 0.0 && y1 >= 0.9);
    }

    #[test]
    fn numbers_use_a_minus_sign_and_no_negative_zero() {
        assert_eq!(num(-3.25, 1), "−3.2");
        assert_eq!(num(-0.01, 1), "0.0");
        assert_eq!(tick(&0.5), "0.5");
        assert_eq!(tick(&40.0), "40");
    }
}
