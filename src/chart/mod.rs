//! Charts of colour against angle, of spectra (and of a fit's residuals)
//! and of what happens inside the stack: drawn into a plotters backend from computed data, returned as
//! an SVG document, an RGB buffer or PNG bytes (no file I/O).
//!
//! Each kind has a data type that computes what it shows from a scene and a
//! [`Viewing`](crate::angle_colour::Viewing) and implements [`Chart`]; the same
//! drawing code serves both formats (see [`canvas`]).

mod ab;
mod bands;
pub mod canvas;
mod chromaticity;
mod field;
mod fit;
pub(crate) mod font;
pub mod gamut;
mod map;
mod spectra;
mod strip;
mod style;
mod thickness;

use plotters::coord::Shift;
use plotters::prelude::*;

pub use ab::AbTravel;
pub use bands::BandsChart;
pub use chromaticity::Chromaticity;
pub use field::{FieldChart, Region};
pub use fit::{FitChart, FitPanel, MOST_PANELS};
pub use map::ReflectanceMap;
pub use spectra::SpectraChart;
pub use strip::AngleStrip;
pub use style::{Caption, Series, describe, light};
pub use thickness::{ThicknessAngle, ThicknessField, Variation};

use crate::error::{Error, Result};
use canvas::{Canvas, Raster, Svg};

/// Result of drawing on backend `DB`.
pub type DrawResult<DB> =
    std::result::Result<(), DrawingAreaErrorKind<<DB as DrawingBackend>::ErrorType>>;

/// Something that draws itself on a plotters drawing area.
pub trait Chart {
    /// Draws the whole chart on `root` (which is already white).
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB>;

    /// The chart's title block.
    fn caption(&self) -> &style::Caption;

    /// One line describing the chart (SVG title and accessible label).
    fn label(&self) -> String {
        let c = self.caption();
        format!("{}: {}", c.title, c.subject)
    }
}

/// Output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// PNG, 8-bit RGB.
    Png,
    /// SVG with text as outlines.
    Svg,
}

impl Format {
    /// The format named by a file extension (`png`, `svg`, any case).
    pub fn from_extension(ext: &str) -> Result<Format> {
        match ext.to_ascii_lowercase().as_str() {
            "png" => Ok(Format::Png),
            "svg" => Ok(Format::Svg),
            _ => Err(Error::invalid(
                "output extension",
                ext,
                "charts are written as .png or .svg",
            )),
        }
    }
}

/// Most series a chart tells apart by colour.
pub const MOST_SERIES: usize = style::SERIES.len();

/// Smallest and largest chart side in pixels.
pub const SIZE_LIMITS: (u32, u32) = (320, 8000);

/// Checks a chart size against [`SIZE_LIMITS`].
pub fn check_size(size: (u32, u32)) -> Result<()> {
    let (lo, hi) = SIZE_LIMITS;
    if size.0 < lo || size.1 < lo || size.0 > hi || size.1 > hi {
        return Err(Error::invalid(
            "size",
            format!("{}x{}", size.0, size.1),
            format!("each side must lie within {lo}–{hi} pixels"),
        ));
    }
    Ok(())
}

fn failed(e: impl std::fmt::Display) -> Error {
    Error::invalid("chart", "drawing", e.to_string())
}

/// The chart as an SVG document of `size` pixels.
pub fn svg(chart: &impl Chart, size: (u32, u32)) -> Result<String> {
    check_size(size)?;
    let mut svg = Svg::default();
    {
        let root = Canvas::new(&mut svg, size).into_drawing_area();
        chart.draw(&root).map_err(failed)?;
    }
    Ok(svg.document(size, &chart.label()))
}

/// The chart as packed 8-bit RGB, `size.0 × size.1` pixels row by row.
pub fn rgb(chart: &impl Chart, size: (u32, u32)) -> Result<Vec<u8>> {
    check_size(size)?;
    let mut raster = Raster::new(size).ok_or_else(|| failed("empty raster"))?;
    {
        let root = Canvas::new(&mut raster, size).into_drawing_area();
        chart.draw(&root).map_err(failed)?;
    }
    Ok(raster.rgb())
}

/// The chart as PNG bytes.
pub fn png(chart: &impl Chart, size: (u32, u32)) -> Result<Vec<u8>> {
    crate::raster::png(size, &rgb(chart, size)?).ok_or_else(|| failed("PNG encoding"))
}

/// The chart in `format`, as bytes to write.
pub fn render(chart: &impl Chart, size: (u32, u32), format: Format) -> Result<Vec<u8>> {
    match format {
        Format::Png => png(chart, size),
        Format::Svg => svg(chart, size).map(String::into_bytes),
    }
}
