//! Two plotters drawing backends over one geometry: an SVG writer and an
//! anti-aliased raster (tiny-skia). Text becomes glyph outlines in both, so a
//! chart looks the same in either format and needs no fonts where it is shown.

use std::convert::Infallible;
use std::fmt::Write;

use base64::Engine;
use plotters::element::{Drawable, PointCollection};
use plotters_backend::{
    BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingBackend, DrawingErrorKind,
};
use tiny_skia::{FillRule, Paint, PathBuilder, Pixmap, PixmapPaint, Stroke, Transform};

use super::font;

/// One step of an outline.
#[derive(Debug, Clone, Copy)]
pub enum Seg {
    /// Starts a contour.
    Move((f32, f32)),
    /// Straight to a point.
    Line((f32, f32)),
    /// Quadratic Bézier: control, end.
    Quad((f32, f32), (f32, f32)),
    /// Cubic Bézier: controls, end.
    Cubic((f32, f32), (f32, f32), (f32, f32)),
    /// Closes the contour.
    Close,
}

/// An outline in pixel coordinates.
#[derive(Debug, Clone, Default)]
pub struct Path(pub Vec<Seg>);

impl Path {
    fn polyline(points: impl IntoIterator<Item = (f32, f32)>, closed: bool) -> Path {
        let mut segs: Vec<Seg> = points
            .into_iter()
            .enumerate()
            .map(|(i, p)| if i == 0 { Seg::Move(p) } else { Seg::Line(p) })
            .collect();
        if closed {
            segs.push(Seg::Close);
        }
        Path(segs)
    }

    fn rect(x0: f32, y0: f32, x1: f32, y1: f32) -> Path {
        Path::polyline([(x0, y0), (x1, y0), (x1, y1), (x0, y1)], true)
    }

    fn circle(cx: f32, cy: f32, r: f32) -> Path {
        // Four cubic arcs; k = 4(√2 − 1)/3 approximates a quarter circle (common practice).
        let k = 0.552_284_8 * r;
        Path(vec![
            Seg::Move((cx + r, cy)),
            Seg::Cubic((cx + r, cy + k), (cx + k, cy + r), (cx, cy + r)),
            Seg::Cubic((cx - k, cy + r), (cx - r, cy + k), (cx - r, cy)),
            Seg::Cubic((cx - r, cy - k), (cx - k, cy - r), (cx, cy - r)),
            Seg::Cubic((cx + k, cy - r), (cx + r, cy - k), (cx + r, cy)),
            Seg::Close,
        ])
    }
}

/// Where outlines and images are painted.
pub trait Surface {
    /// Fills with the non-zero rule.
    fn fill(&mut self, path: &Path, colour: BackendColor);
    /// Strokes with round joins and caps.
    fn stroke(&mut self, path: &Path, colour: BackendColor, width: f32);
    /// Paints packed 8-bit RGB pixels, `size.0 × size.1` row by row, with the
    /// top-left corner at pixel `pos`.
    fn image(&mut self, pos: (i32, i32), size: (u32, u32), rgb: &[u8]);
}

/// A block of packed 8-bit RGB pixels drawn at a pixel position: a raster
/// image in PNG output, an embedded PNG image in SVG.
#[derive(Debug, Clone, PartialEq)]
pub struct Pixels {
    /// Top-left corner, in the coordinates of the area it is drawn on.
    pub pos: (i32, i32),
    /// Width and height in pixels.
    pub size: (u32, u32),
    /// RGB bytes, row by row (`3 × width × height`).
    pub rgb: Vec<u8>,
}

impl<'a> PointCollection<'a, (i32, i32)> for &'a Pixels {
    type Point = &'a (i32, i32);
    type IntoIter = std::iter::Once<&'a (i32, i32)>;
    fn point_iter(self) -> Self::IntoIter {
        std::iter::once(&self.pos)
    }
}

impl<DB: DrawingBackend> Drawable<DB> for Pixels {
    fn draw<I: Iterator<Item = BackendCoord>>(
        &self,
        mut points: I,
        backend: &mut DB,
        _: (u32, u32),
    ) -> Result<(), DrawingErrorKind<DB::ErrorType>> {
        match points.next() {
            Some(p) if self.rgb.len() == 3 * self.size.0 as usize * self.size.1 as usize => {
                backend.blit_bitmap(p, self.size, &self.rgb)
            }
            _ => Ok(()),
        }
    }
}

/// A plotters backend painting on a [`Surface`]. Pixel `(x, y)` of plotters
/// is the unit square from `(x, y)`; strokes run through pixel centres.
pub struct Canvas<'a, S> {
    surface: &'a mut S,
    size: (u32, u32),
}

impl<'a, S: Surface> Canvas<'a, S> {
    /// A canvas of `size` pixels drawing on `surface`.
    pub fn new(surface: &'a mut S, size: (u32, u32)) -> Self {
        font::register();
        Canvas { surface, size }
    }
}

fn centre(p: BackendCoord) -> (f32, f32) {
    (p.0 as f32 + 0.5, p.1 as f32 + 0.5)
}

impl<S: Surface> DrawingBackend for Canvas<'_, S> {
    type ErrorType = Infallible;

    fn get_size(&self) -> (u32, u32) {
        self.size
    }

    fn ensure_prepared(&mut self) -> Result<(), DrawingErrorKind<Infallible>> {
        Ok(())
    }

    fn present(&mut self) -> Result<(), DrawingErrorKind<Infallible>> {
        Ok(())
    }

    fn draw_pixel(
        &mut self,
        p: BackendCoord,
        colour: BackendColor,
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        let (x, y) = (p.0 as f32, p.1 as f32);
        self.surface
            .fill(&Path::rect(x, y, x + 1.0, y + 1.0), colour);
        Ok(())
    }

    fn draw_line<St: BackendStyle>(
        &mut self,
        from: BackendCoord,
        to: BackendCoord,
        style: &St,
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        self.draw_path([from, to], style)
    }

    fn draw_rect<St: BackendStyle>(
        &mut self,
        ul: BackendCoord,
        br: BackendCoord,
        style: &St,
        fill: bool,
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        let (x0, x1) = (ul.0.min(br.0) as f32, ul.0.max(br.0) as f32);
        let (y0, y1) = (ul.1.min(br.1) as f32, ul.1.max(br.1) as f32);
        if fill {
            self.surface
                .fill(&Path::rect(x0, y0, x1 + 1.0, y1 + 1.0), style.color());
        } else {
            self.surface.stroke(
                &Path::rect(x0 + 0.5, y0 + 0.5, x1 + 0.5, y1 + 0.5),
                style.color(),
                style.stroke_width() as f32,
            );
        }
        Ok(())
    }

    fn draw_path<St: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        path: I,
        style: &St,
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        let path = Path::polyline(path.into_iter().map(centre), false);
        if path.0.len() > 1 {
            self.surface
                .stroke(&path, style.color(), style.stroke_width().max(1) as f32);
        }
        Ok(())
    }

    fn draw_circle<St: BackendStyle>(
        &mut self,
        c: BackendCoord,
        radius: u32,
        style: &St,
        fill: bool,
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        let (x, y) = centre(c);
        let path = Path::circle(x, y, radius as f32);
        if fill {
            self.surface.fill(&path, style.color());
        } else {
            self.surface
                .stroke(&path, style.color(), style.stroke_width().max(1) as f32);
        }
        Ok(())
    }

    fn fill_polygon<St: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        vert: I,
        style: &St,
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        let path = Path::polyline(vert.into_iter().map(centre), true);
        self.surface.fill(&path, style.color());
        Ok(())
    }

    fn draw_text<T: BackendTextStyle>(
        &mut self,
        text: &str,
        style: &T,
        pos: BackendCoord,
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        if style.color().alpha > 0.0 {
            self.surface
                .fill(&font::outline(text, style, pos), style.color());
        }
        Ok(())
    }

    fn blit_bitmap(
        &mut self,
        pos: BackendCoord,
        size: (u32, u32),
        src: &[u8],
    ) -> Result<(), DrawingErrorKind<Infallible>> {
        self.surface.image(pos, size, src);
        Ok(())
    }

    fn estimate_text_size<T: BackendTextStyle>(
        &self,
        text: &str,
        style: &T,
    ) -> Result<(u32, u32), DrawingErrorKind<Infallible>> {
        Ok((
            font::width(text, style.size(), style.style()).ceil() as u32,
            style.size().ceil() as u32,
        ))
    }
}

/// SVG elements in drawing order.
#[derive(Debug, Default)]
pub struct Svg {
    body: String,
}

/// `fill="#rrggbb"` (or `stroke=…`) with an opacity when not opaque.
fn svg_paint(attr: &str, c: BackendColor) -> String {
    let (r, g, b) = c.rgb;
    let mut s = format!("{attr}=\"#{r:02x}{g:02x}{b:02x}\"");
    if c.alpha < 1.0 {
        let _ = write!(s, " {attr}-opacity=\"{:.3}\"", c.alpha);
    }
    s
}

fn svg_d(path: &Path) -> String {
    let mut d = String::new();
    let pt = |d: &mut String, (x, y): (f32, f32)| {
        let _ = write!(d, "{} {} ", round(x), round(y));
    };
    for s in &path.0 {
        match *s {
            Seg::Move(p) => {
                d.push('M');
                pt(&mut d, p);
            }
            Seg::Line(p) => {
                d.push('L');
                pt(&mut d, p);
            }
            Seg::Quad(c, p) => {
                d.push('Q');
                pt(&mut d, c);
                pt(&mut d, p);
            }
            Seg::Cubic(c1, c2, p) => {
                d.push('C');
                pt(&mut d, c1);
                pt(&mut d, c2);
                pt(&mut d, p);
            }
            Seg::Close => d.push('Z'),
        }
    }
    d.trim_end().to_string()
}

/// Two decimals are far below a pixel.
fn round(v: f32) -> f32 {
    (v * 100.0).round() / 100.0
}

impl Surface for Svg {
    fn fill(&mut self, path: &Path, colour: BackendColor) {
        if colour.alpha > 0.0 && !path.0.is_empty() {
            let _ = writeln!(
                self.body,
                "<path d=\"{}\" {}/>",
                svg_d(path),
                svg_paint("fill", colour)
            );
        }
    }

    fn stroke(&mut self, path: &Path, colour: BackendColor, width: f32) {
        if colour.alpha > 0.0 && !path.0.is_empty() {
            let _ = writeln!(
                self.body,
                "<path d=\"{}\" fill=\"none\" {} stroke-width=\"{width}\" stroke-linejoin=\"round\" stroke-linecap=\"round\"/>",
                svg_d(path),
                svg_paint("stroke", colour)
            );
        }
    }

    fn image(&mut self, (x, y): (i32, i32), (w, h): (u32, u32), rgb: &[u8]) {
        if let Some(png) = crate::raster::png((w, h), rgb) {
            let _ = writeln!(
                self.body,
                "<image x=\"{x}\" y=\"{y}\" width=\"{w}\" height=\"{h}\" preserveAspectRatio=\"none\" xlink:href=\"data:image/png;base64,{}\"/>",
                base64::engine::general_purpose::STANDARD.encode(png)
            );
        }
    }
}

impl Svg {
    /// The finished document of `size` pixels, labelled for assistive technology.
    pub fn document(&self, size: (u32, u32), label: &str) -> String {
        let (w, h) = size;
        format!(
            "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<svg xmlns=\"http://www.w3.org/2000/svg\" xmlns:xlink=\"http://www.w3.org/1999/xlink\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"{}\">\n<title>{}</title>\n{}</svg>\n",
            escape(label),
            escape(label),
            self.body
        )
    }
}

/// Escapes text for XML content and attributes.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// An anti-aliased raster.
pub struct Raster {
    /// The pixels (premultiplied RGBA).
    pub pixmap: Pixmap,
}

impl Raster {
    /// A white raster; `None` for a zero size.
    pub fn new(size: (u32, u32)) -> Option<Self> {
        let mut pixmap = Pixmap::new(size.0, size.1)?;
        pixmap.fill(tiny_skia::Color::WHITE);
        Some(Raster { pixmap })
    }

    /// Packed 8-bit RGB, row by row (the raster is opaque: it starts white).
    pub fn rgb(&self) -> Vec<u8> {
        self.pixmap
            .pixels()
            .iter()
            .flat_map(|p| [p.red(), p.green(), p.blue()])
            .collect()
    }

    fn paint(colour: BackendColor) -> Paint<'static> {
        let mut paint = Paint::default();
        let (r, g, b) = colour.rgb;
        paint.set_color_rgba8(
            r,
            g,
            b,
            (colour.alpha.clamp(0.0, 1.0) * 255.0).round() as u8,
        );
        paint.anti_alias = true;
        paint
    }
}

fn skia_path(path: &Path) -> Option<tiny_skia::Path> {
    let mut b = PathBuilder::new();
    for s in &path.0 {
        match *s {
            Seg::Move((x, y)) => b.move_to(x, y),
            Seg::Line((x, y)) => b.line_to(x, y),
            Seg::Quad((cx, cy), (x, y)) => b.quad_to(cx, cy, x, y),
            Seg::Cubic((ax, ay), (bx, by), (x, y)) => b.cubic_to(ax, ay, bx, by, x, y),
            Seg::Close => b.close(),
        }
    }
    b.finish()
}

impl Surface for Raster {
    fn fill(&mut self, path: &Path, colour: BackendColor) {
        if let Some(p) = skia_path(path) {
            self.pixmap.fill_path(
                &p,
                &Raster::paint(colour),
                FillRule::Winding,
                Transform::identity(),
                None,
            );
        }
    }

    fn image(&mut self, (x, y): (i32, i32), (w, h): (u32, u32), rgb: &[u8]) {
        let rgba: Vec<u8> = rgb
            .chunks_exact(3)
            .flat_map(|p| [p[0], p[1], p[2], 255])
            .collect();
        let Some(size) = tiny_skia::IntSize::from_wh(w, h) else {
            return;
        };
        if let Some(src) = Pixmap::from_vec(rgba, size) {
            self.pixmap.draw_pixmap(
                x,
                y,
                src.as_ref(),
                &PixmapPaint::default(),
                Transform::identity(),
                None,
            );
        }
    }

    fn stroke(&mut self, path: &Path, colour: BackendColor, width: f32) {
        if let Some(p) = skia_path(path) {
            let stroke = Stroke {
                width,
                line_cap: tiny_skia::LineCap::Round,
                line_join: tiny_skia::LineJoin::Round,
                ..Stroke::default()
            };
            self.pixmap.stroke_path(
                &p,
                &Raster::paint(colour),
                &stroke,
                Transform::identity(),
                None,
            );
        }
    }
}
