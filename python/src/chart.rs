//! `chart`: the charts of `lamella chart`, as an object Jupyter shows inline
//! (SVG and PNG) and that can be saved.

use std::path::PathBuf;

use lamella::angle_colour::{Polarization, Viewing};
use lamella::chart::{
    self, AbTravel, AngleStrip, BandsChart, Chromaticity, FieldChart, FitChart, Format,
    ReflectanceMap, SpectraChart, ThicknessAngle, Variation,
};
use pyo3::prelude::*;
use pyo3::types::PyBytes;

use crate::errors::{Failure, Outcome};
use crate::interrupt::run;
use crate::scene::Scene;
use crate::view::ViewArgs;

/// A computed chart of any kind.
enum Kind {
    Strip(AngleStrip),
    Thickness(ThicknessAngle),
    Spectra(SpectraChart),
    Map(ReflectanceMap),
    Chromaticity(Chromaticity),
    Ab(AbTravel),
    Field(FieldChart),
    Bands(BandsChart),
    Fit(FitChart),
}

impl Kind {
    fn render(&self, size: (u32, u32), format: Format) -> lamella::Result<Vec<u8>> {
        match self {
            Kind::Strip(c) => chart::render(c, size, format),
            Kind::Thickness(c) => chart::render(c, size, format),
            Kind::Spectra(c) => chart::render(c, size, format),
            Kind::Map(c) => chart::render(c, size, format),
            Kind::Chromaticity(c) => chart::render(c, size, format),
            Kind::Ab(c) => chart::render(c, size, format),
            Kind::Field(c) => chart::render(c, size, format),
            Kind::Bands(c) => chart::render(c, size, format),
            Kind::Fit(c) => chart::render(c, size, format),
        }
    }

    fn rgb(&self, size: (u32, u32)) -> lamella::Result<Vec<u8>> {
        match self {
            Kind::Strip(c) => chart::rgb(c, size),
            Kind::Thickness(c) => chart::rgb(c, size),
            Kind::Spectra(c) => chart::rgb(c, size),
            Kind::Map(c) => chart::rgb(c, size),
            Kind::Chromaticity(c) => chart::rgb(c, size),
            Kind::Ab(c) => chart::rgb(c, size),
            Kind::Field(c) => chart::rgb(c, size),
            Kind::Bands(c) => chart::rgb(c, size),
            Kind::Fit(c) => chart::rgb(c, size),
        }
    }
}

/// A chart of a scene (or of several, compared), computed once and drawn on
/// demand: Jupyter shows it inline; `svg()`, `png()` and `to_array()` give
/// the drawing, `save(path)` writes it (.svg or .png by the extension).
#[pyclass(module = "lamella", frozen)]
pub struct Chart {
    kind: Kind,
    /// Width and height in pixels.
    #[pyo3(get)]
    size: (u32, u32),
    /// The kind's name, e.g. "angle-strip".
    #[pyo3(get)]
    name: String,
}

impl Chart {
    fn draw(&self, py: Python<'_>, format: Format) -> PyResult<Vec<u8>> {
        let size = self.size;
        let kind = &self.kind;
        run(py, false, |_| {
            kind.render(size, format)
                .map_err(|e| Failure::engine("", e))
        })
    }
}

impl Chart {
    /// The chart of a fit (`lamella.fit`'s `chart`), at its default size.
    pub fn of_fit(chart: FitChart) -> Chart {
        Chart {
            size: chart.default_size(),
            kind: Kind::Fit(chart),
            name: "fit".into(),
        }
    }
}

#[pymethods]
impl Chart {
    /// svg() -> str: the chart as an SVG document (text as outlines).
    fn svg(&self, py: Python<'_>) -> PyResult<String> {
        String::from_utf8(self.draw(py, Format::Svg)?).map_err(crate::errors::internal)
    }

    /// png() -> bytes: the chart as PNG (8-bit RGB).
    fn png<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyBytes>> {
        Ok(PyBytes::new(py, &self.draw(py, Format::Png)?))
    }

    /// to_array() -> ndarray: the chart as a uint8 array (H, W, 3).
    fn to_array<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        use numpy::PyArrayMethods;
        let size = self.size;
        let kind = &self.kind;
        let rgb = run(py, false, |_| {
            kind.rgb(size).map_err(|e| Failure::engine("", e))
        })?;
        Ok(numpy::PyArray1::from_vec(py, rgb)
            .reshape([size.1 as usize, size.0 as usize, 3])?
            .into_any())
    }

    /// save(path): writes the chart atomically, as PNG or SVG by the
    /// extension (.png, .svg).
    pub fn save(&self, py: Python<'_>, path: PathBuf) -> PyResult<()> {
        let format = format_of(&path)?;
        let bytes = self.draw(py, format)?;
        crate::files::write_atomic(&path, &bytes)
    }

    fn _repr_svg_(&self, py: Python<'_>) -> PyResult<String> {
        self.svg(py)
    }

    fn _repr_png_<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyBytes>> {
        self.png(py)
    }

    fn __repr__(&self) -> String {
        format!(
            "<lamella.Chart {} {}x{}>",
            self.name, self.size.0, self.size.1
        )
    }
}

/// The chart format a file name asks for (.png or .svg).
pub fn format_of(path: &std::path::Path) -> Outcome<Format> {
    let ext = path.extension().and_then(|e| e.to_str()).unwrap_or("");
    Format::from_extension(ext).map_err(|e| Failure::input(format!("{}: {e}", path.display())))
}

fn polarizations(names: &[String]) -> Outcome<Vec<Polarization>> {
    let mut out: Vec<Polarization> = Vec::new();
    for n in names {
        let p = n
            .parse()
            .map_err(|e: lamella::Error| Failure::input(e.to_string()))?;
        if !out.contains(&p) {
            out.push(p);
        }
    }
    Ok(out)
}

/// chart(scene, kind="angle-strip", size=(1200, 800), compare=None,
/// illuminant=None, observer=None, side="reflect",
/// polarization="unpolarized", gamut="clip", ticks=None, angles=(0, 30, 60),
/// curves=None, transmittance=False, layer=None, thickness_range=None,
/// scale_range=None, steps=None, wavelength=None, angle=0.0,
/// with_reflectance=False, analyzer=None) -> Chart
///
/// A chart of colour against angle, as `lamella chart` draws it. Kinds:
/// "angle-strip" (the colour at every angle, swatches at `ticks` degrees),
/// "thickness-angle" (colour over one layer's thickness — `layer` numbered
/// from 1 depth first, `thickness_range` (from, to) nm — or a scale on every
/// thickness, `scale_range` (from, to), and angle; `steps` samples),
/// "spectra" (R, and with `transmittance` T, against wavelength at `angles`
/// degrees for `curves`), "map" (reflectance over wavelength × angle),
/// "chromaticity" (the CIE 1931 xy trajectory) and "ab-travel" (the a*b*
/// trajectory and L* against angle), "field" (|E|² against depth at
/// `wavelength` nm, `angle` degrees and `polarization` "s" or "p") and
/// "bands" (the stop bands of the first repeat group's period, with
/// `with_reflectance` beside the stack's reflectance map). "spectra", "chromaticity" and
/// "ab-travel" compare the scenes in `compare` with `scene`. `size` is
/// (width, height) in pixels; the viewing options are as for `Scene.color`,
/// `analyzer` ("left" or "right") included for the colour charts. For a
/// scene whose left- and right-handed light differ (a helix), unpolarized
/// charts show both handednesses side by side.
#[pyfunction(name = "chart")]
#[pyo3(signature = (scene, kind="angle-strip", size=(1200, 800), compare=None, illuminant=None,
    observer=None, side="reflect", polarization="unpolarized", gamut="clip", ticks=None,
    angles=vec![0.0, 30.0, 60.0], curves=None,
    transmittance=false, layer=None, thickness_range=None, scale_range=None, steps=None,
    wavelength=None, angle=0.0, with_reflectance=false, analyzer=None))]
#[allow(clippy::too_many_arguments)]
pub fn chart_of(
    py: Python<'_>,
    scene: &Scene,
    kind: &str,
    size: (u32, u32),
    compare: Option<Vec<PyRef<'_, Scene>>>,
    illuminant: Option<String>,
    observer: Option<String>,
    side: &str,
    polarization: &str,
    gamut: &str,
    ticks: Option<Vec<f64>>,
    angles: Vec<f64>,
    curves: Option<Vec<String>>,
    transmittance: bool,
    layer: Option<usize>,
    thickness_range: Option<(f64, f64)>,
    scale_range: Option<(f64, f64)>,
    steps: Option<usize>,
    wavelength: Option<f64>,
    angle: f64,
    with_reflectance: bool,
    analyzer: Option<String>,
) -> PyResult<Chart> {
    let name = kind.replace('_', "-");
    if let (Some(h), "spectra" | "field" | "bands") = (&analyzer, name.as_str()) {
        return Err(Failure::input(format!(
            "analyzer = {h:?}: kind = {name:?} does not take a viewing; the analyser applies to \
             the colour charts (angle-strip, thickness-angle, map, chromaticity, ab-travel)"
        ))
        .into());
    }
    let view = ViewArgs {
        illuminant,
        observer,
        side: side.into(),
        polarization: polarization.into(),
        gamut: gamut.into(),
        analyzer,
    };
    let compares = matches!(name.as_str(), "spectra" | "chromaticity" | "ab-travel");
    let others = compare.unwrap_or_default();
    if !others.is_empty() && !compares {
        return Err(Failure::input(
            "compare: only spectra, chromaticity and ab-travel compare several scenes",
        )
        .into());
    }
    chart::check_size(size).map_err(|e| Failure::input(e.to_string()))?;
    let mut scenes: Vec<(&Scene, Viewing)> = Vec::new();
    for s in std::iter::once(scene).chain(others.iter().map(|r| &**r)) {
        s.warn(py, true)?;
        s.inner
            .require_film()
            .and_then(|()| {
                s.inner.check_grid_size(
                    s.inner.angles_deg.len(),
                    lamella::scene::GRID_BYTES_PER_POINT,
                    "chart",
                )
            })
            .map_err(|e| PyErr::from(s.failure(e)))?;
        let viewing = s.viewing(&view)?;
        if let Some((_, first)) = scenes.first()
            && (first.illuminant.name() != viewing.illuminant.name()
                || first.observer != viewing.observer)
        {
            return Err(Failure::input(format!(
                "compare: the scenes are seen under different lights or observers ({} {}, {} {}); \
                 pass illuminant and observer to compare them under one",
                first.illuminant.name(),
                first.observer,
                viewing.illuminant.name(),
                viewing.observer
            ))
            .into());
        }
        scenes.push((s, viewing));
    }
    let curves = curves.as_deref().map(polarizations).transpose()?;
    let variation = match (layer, scale_range) {
        (Some(_), Some(_)) => {
            return Err(Failure::input(
                "give layer (with thickness_range) or scale_range, not both",
            )
            .into());
        }
        (Some(layer), None) => Variation::Layer {
            layer,
            range_nm: thickness_range,
        },
        (None, Some((from, to))) => Variation::Scale { from, to },
        (None, None) => Variation::Scale { from: 0.8, to: 1.2 },
    };
    let computed = run(py, true, |stop| {
        let pairs: Vec<(&lamella::scene::Scene, &Viewing)> =
            scenes.iter().map(|(s, v)| (&*s.inner, v)).collect();
        let (first, viewing) = pairs[0];
        let at = |e| scene.failure(e);
        Ok(match name.as_str() {
            "angle-strip" => {
                Kind::Strip(AngleStrip::compute(first, viewing, ticks.as_deref()).map_err(at)?)
            }
            "thickness-angle" => Kind::Thickness(
                ThicknessAngle::compute(
                    first,
                    viewing,
                    &variation,
                    steps.unwrap_or_else(|| ThicknessAngle::default_steps(first)),
                    &|| stop.unwind_if_requested(),
                )
                .map_err(at)?,
            ),
            "spectra" => Kind::Spectra(
                SpectraChart::compute(&pairs, &angles, curves.as_deref(), transmittance)
                    .map_err(at)?,
            ),
            "map" => Kind::Map(ReflectanceMap::compute(first, viewing).map_err(at)?),
            "chromaticity" => Kind::Chromaticity(Chromaticity::compute(&pairs).map_err(at)?),
            "ab-travel" => Kind::Ab(AbTravel::compute(&pairs).map_err(at)?),
            "field" => {
                let wl = wavelength.ok_or_else(|| {
                    Failure::input("kind = \"field\" needs wavelength (nm), angle and polarization \"s\" or \"p\"")
                })?;
                let pol = crate::inside::wave(polarization)?;
                Kind::Field(FieldChart::compute(first, wl, angle, pol).map_err(at)?)
            }
            "bands" => Kind::Bands(
                BandsChart::compute(first, with_reflectance.then_some(viewing)).map_err(at)?,
            ),
            other => {
                return Err(Failure::input(format!(
                    "kind = {other:?}: expected angle-strip, thickness-angle, spectra, map, chromaticity, ab-travel, field or bands"
                )));
            }
        })
    })?;
    Ok(Chart {
        kind: computed,
        size,
        name,
    })
}
