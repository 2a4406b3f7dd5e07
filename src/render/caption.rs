//! The caption strip under a render: what it shows and where it came from
//! (scene title, environment, illuminant, observer, lamella version), in the
//! embedded DejaVu Sans face the charts use.

use plotters::style::{FontStyle, IntoFont, RGBColor, TextStyle};
use plotters_backend::BackendTextStyle;
use plotters_backend::text_anchor::{HPos, Pos, VPos};

use crate::chart::canvas::{Raster, Surface};
use crate::chart::font;

/// Height of the strip for an image `width` pixels wide.
pub fn strip_height(width: u32) -> u32 {
    (width / 28).clamp(14, 48)
}

/// The strip as packed 8-bit RGB of `width` × [`strip_height`] pixels:
/// light grey text on near-black, `title · details` on one line. When it
/// does not fit, the title is shortened first (with an ellipsis), so the
/// provenance in `details` stays readable; then the details.
pub fn strip(width: u32, title: &str, details: &str) -> Vec<u8> {
    font::register();
    let height = strip_height(width);
    let mut raster = Raster::new((width, height)).expect("a non-empty strip");
    raster
        .pixmap
        .fill(tiny_skia::Color::from_rgba8(18, 18, 20, 255));
    let size = 0.55 * height as f64;
    let style: TextStyle = ("sans-serif", size)
        .into_font()
        .color(&RGBColor(214, 214, 210))
        .pos(Pos::new(HPos::Left, VPos::Center));
    let room = width as f64 - 0.8 * height as f64;
    let fits = |t: &str| font::width(t, size, FontStyle::Normal) <= room;
    let mut kept: Vec<char> = title.chars().collect();
    let mut line = format!("{title} · {details}");
    while !fits(&line) && !kept.is_empty() {
        kept.pop();
        line = format!(
            "{}… · {details}",
            kept.iter().collect::<String>().trim_end()
        );
    }
    let mut chars: Vec<char> = line.chars().collect();
    while !fits(&line) && !chars.is_empty() {
        chars.pop();
        line = chars.iter().collect::<String>() + "…";
    }
    let pos = ((0.4 * height as f64) as i32, (height / 2) as i32);
    raster.fill(
        &font::outline(&line, &style, pos),
        BackendTextStyle::color(&style),
    );
    raster.rgb()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_strip_has_its_size_and_some_text() {
        let rgb = strip(
            300,
            "Teal label foil",
            "studio · D65 · CIE1931_2 · lamella 0.1",
        );
        assert_eq!(rgb.len(), 300 * strip_height(300) as usize * 3);
        assert!(rgb.iter().any(|&c| c > 150));
        // A long text is cut to fit, never spilling past the edge.
        let long = strip(60, &"x".repeat(400), "studio");
        assert_eq!(long.len(), 60 * strip_height(60) as usize * 3);
    }
}
