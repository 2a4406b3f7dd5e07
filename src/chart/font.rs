//! The embedded typeface (DejaVu Sans, from the `dejavu` crate) and text laid
//! out as glyph outlines, so PNG and SVG show the same letters on any machine.

use std::sync::OnceLock;

use ab_glyph::{Font, FontRef, OutlineCurve, ScaleFont};
use plotters::style::FontStyle;
use plotters_backend::text_anchor::{HPos, VPos};
use plotters_backend::{BackendTextStyle, FontTransform};

use super::canvas::{Path, Seg};

struct Faces {
    regular: FontRef<'static>,
    bold: FontRef<'static>,
}

/// The faces, registered with plotters (for its own text measurements) on first use.
fn faces() -> &'static Faces {
    static FACES: OnceLock<Faces> = OnceLock::new();
    FACES.get_or_init(|| {
        let (regular, bold) = (dejavu::sans::regular(), dejavu::sans::bold());
        for (style, bytes) in [(FontStyle::Normal, regular), (FontStyle::Bold, bold)] {
            plotters::style::register_font("sans-serif", style, bytes)
                .unwrap_or_else(|_| panic!("the embedded DejaVu Sans face is valid"));
        }
        Faces {
            regular: FontRef::try_from_slice(regular).expect("embedded face parses"),
            bold: FontRef::try_from_slice(bold).expect("embedded face parses"),
        }
    })
}

/// Makes the embedded faces available to plotters; call before drawing.
pub fn register() {
    faces();
}

fn face(style: FontStyle) -> &'static FontRef<'static> {
    match style {
        FontStyle::Bold => &faces().bold,
        _ => &faces().regular,
    }
}

/// Width in pixels of `text` at `size` (the pixel height from descender to ascender).
pub fn width(text: &str, size: f64, style: FontStyle) -> f64 {
    let font = face(style).as_scaled(size as f32);
    let mut x = 0.0f32;
    let mut prev = None;
    for c in text.chars() {
        let id = font.glyph_id(c);
        if let Some(p) = prev {
            x += font.kern(p, id);
        }
        x += font.h_advance(id);
        prev = Some(id);
    }
    x as f64
}

/// Height of capital letters and digits at `size`.
pub fn cap_height(size: f64) -> f64 {
    let font = face(FontStyle::Normal);
    let h = font
        .outline(font.glyph_id('H'))
        .map_or(0.0, |o| o.bounds.min.y as f64); // bounds.min is the top-left, y up
    h * font.as_scaled(size as f32).v_scale_factor() as f64
}

/// The outline of `text` as drawn by a plotters text style at `pos`: the
/// anchor places the line (top: top of the capitals; centre: middle of the
/// capitals; bottom: bottom of the descenders), then the style's rotation
/// turns it about `pos`.
pub fn outline<S: BackendTextStyle>(text: &str, style: &S, pos: (i32, i32)) -> Path {
    let size = style.size();
    let font = face(style.style()).as_scaled(size as f32);
    let (sx, sy) = (font.h_scale_factor(), font.v_scale_factor());
    let w = width(text, size, style.style());
    let dx = match style.anchor().h_pos {
        HPos::Left => 0.0,
        HPos::Center => -w / 2.0,
        HPos::Right => -w,
    };
    let cap = cap_height(size);
    let baseline = match style.anchor().v_pos {
        VPos::Top => cap,
        VPos::Center => cap / 2.0,
        VPos::Bottom => font.descent() as f64,
    };
    let (cos, sin) = match style.transform() {
        FontTransform::Rotate90 => (0.0, 1.0),
        FontTransform::Rotate180 => (-1.0, 0.0),
        FontTransform::Rotate270 => (0.0, -1.0),
        _ => (1.0, 0.0),
    };
    let place = |gx: f64, p: ab_glyph::Point| -> (f32, f32) {
        let x = dx + gx + (p.x * sx) as f64;
        let y = baseline - (p.y * sy) as f64;
        (
            (pos.0 as f64 + x * cos - y * sin) as f32,
            (pos.1 as f64 + x * sin + y * cos) as f32,
        )
    };
    let mut path = Path::default();
    let mut pen = 0.0f64;
    let mut prev = None;
    for c in text.chars() {
        let id = font.glyph_id(c);
        if let Some(p) = prev {
            pen += font.kern(p, id) as f64;
        }
        if let Some(o) = face(style.style()).outline(id) {
            let mut last: Option<ab_glyph::Point> = None;
            for curve in &o.curves {
                let start = match curve {
                    OutlineCurve::Line(a, _) | OutlineCurve::Quad(a, _, _) => *a,
                    OutlineCurve::Cubic(a, _, _, _) => *a,
                };
                if last != Some(start) {
                    if last.is_some() {
                        path.0.push(Seg::Close);
                    }
                    path.0.push(Seg::Move(place(pen, start)));
                }
                last = Some(match curve {
                    OutlineCurve::Line(_, b) => {
                        path.0.push(Seg::Line(place(pen, *b)));
                        *b
                    }
                    OutlineCurve::Quad(_, c1, b) => {
                        path.0.push(Seg::Quad(place(pen, *c1), place(pen, *b)));
                        *b
                    }
                    OutlineCurve::Cubic(_, c1, c2, b) => {
                        path.0
                            .push(Seg::Cubic(place(pen, *c1), place(pen, *c2), place(pen, *b)));
                        *b
                    }
                });
            }
            if last.is_some() {
                path.0.push(Seg::Close);
            }
        }
        pen += font.h_advance(id) as f64;
        prev = Some(id);
    }
    path
}
