//! `render`: a preview image of an object wearing the scene's coating, as
//! `lamella render` draws it, returned as a uint8 array.

use lamella::render::{
    Base, Light, Mesh, Preview, SIZE_LIMITS, Settings, Shape, builtin_mesh, parse_tone,
};
use numpy::PyArrayMethods;
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyString};

use crate::errors::{Failure, Outcome};
use crate::interrupt::run;
use crate::scene::Scene;

/// The options of a render; each overrides the same key of the scene's
/// `preview` object.
pub struct Options<'py> {
    pub shape: Option<String>,
    pub size: Option<Bound<'py, PyAny>>,
    pub ssaa: Option<u32>,
    pub exposure: Option<f64>,
    pub tone: Option<Bound<'py, PyAny>>,
    pub roughness_deg: Option<f64>,
    pub base: Option<String>,
    pub lights: Option<Vec<String>>,
    pub orbit_deg: Option<f64>,
    pub elevation_deg: Option<f64>,
    pub fov_deg: Option<f64>,
    pub distance: Option<f64>,
    pub turntable: Option<u32>,
}

/// An image size: (W, H) or "WxH".
fn size(obj: &Bound<'_, PyAny>) -> Outcome<(u32, u32)> {
    let text = match obj.cast::<PyString>() {
        Ok(s) => s.to_string(),
        Err(_) => match obj.extract::<(i64, i64)>() {
            Ok((w, h)) => format!("{w}x{h}"),
            Err(_) => {
                return Err(Failure::input(format!(
                    "size = {obj}: expected (width, height)"
                )));
            }
        },
    };
    lamella::raster::parse_size(&text, SIZE_LIMITS).map_err(|e| Failure::input(e.to_string()))
}

impl Options<'_> {
    /// The scene's preview settings with these options applied.
    fn settings(&self, scene: &Scene) -> Outcome<Settings> {
        let mut s = scene.inner.preview.clone().unwrap_or_default();
        let flag = |name: &str, e: lamella::Error| Failure::input(format!("{name}: {e}"));
        if let Some(t) = &self.shape {
            s.shape = t.parse().map_err(|e| flag("shape", e))?;
        }
        if let Some(t) = &self.size {
            (s.width, s.height) = size(t)?;
        }
        if let Some(t) = &self.tone {
            s.tone = match t.cast::<PyBool>() {
                Ok(b) => b.is_true(),
                Err(_) => parse_tone(&t.to_string()).map_err(|e| flag("tone", e))?,
            };
        }
        if let Some(t) = &self.base {
            s.base = t.parse::<Base>().map_err(|e| flag("base", e))?;
        }
        if let Some(lights) = &self.lights {
            s.lights = lights
                .iter()
                .map(|l| l.parse::<Light>().map_err(|e| flag("lights", e)))
                .collect::<Result<_, _>>()?;
        }
        s.ssaa = self.ssaa.unwrap_or(s.ssaa);
        s.exposure = self.exposure.unwrap_or(s.exposure);
        s.roughness_deg = self.roughness_deg.unwrap_or(s.roughness_deg);
        s.view.orbit_deg = self.orbit_deg.unwrap_or(s.view.orbit_deg);
        s.view.elevation_deg = self.elevation_deg.unwrap_or(s.view.elevation_deg);
        s.view.fov_deg = self.fov_deg.unwrap_or(s.view.fov_deg);
        s.view.distance = self.distance.or(s.view.distance);
        s.turntable = self.turntable.unwrap_or(s.turntable);
        s.check().map_err(|e| Failure::input(e.to_string()))?;
        Ok(s)
    }
}

/// render(scene, shape=None, size=None, ssaa=None, exposure=None, tone=None,
/// roughness_deg=None, base=None, lights=None, orbit_deg=None,
/// elevation_deg=None, fov_deg=None, distance=None, turntable=None) -> ndarray
///
/// A preview image of an object wearing the scene's film (or effect-pigment
/// coating), shaded from the real spectra as `lamella render` draws it.
/// Every option overrides the scene's `preview` settings:
///
/// - shape: "sphere" (default), "cylinder", "torus", "bottle", "sheet" or
///   "mesh:PATH" (a Wavefront OBJ file).
/// - size: (width, height) in pixels, or "WxH"; default 800×800.
/// - ssaa: N×N supersampling, 1–8 (default 2); exposure: linear scale
///   (default 1); tone: the highlight tone curve, True/"on" or False/"off".
/// - roughness_deg: facet orientation spread in degrees, 0–60.
/// - base: what lies under the film: "black", "white" or "#RRGGBB".
/// - lights: list of light descriptions, e.g. "sky,intensity=0.6" or
///   "area,azimuth_deg=-35,elevation_deg=30,size_deg=24".
/// - orbit_deg, elevation_deg, fov_deg, distance: the camera (degrees; the
///   distance in object radii).
/// - turntable: N frames of a full turn.
///
/// Returns an sRGB uint8 array of shape (H, W, 3), or (N, H, W, 3) with a
/// turntable. Screen colours are approximations: judge colour on a measured
/// sample.
#[pyfunction]
#[pyo3(signature = (scene, shape=None, size=None, ssaa=None, exposure=None, tone=None,
    roughness_deg=None, base=None, lights=None, orbit_deg=None, elevation_deg=None,
    fov_deg=None, distance=None, turntable=None))]
#[allow(clippy::too_many_arguments)]
pub fn render<'py>(
    py: Python<'py>,
    scene: &Scene,
    shape: Option<String>,
    size: Option<Bound<'py, PyAny>>,
    ssaa: Option<u32>,
    exposure: Option<f64>,
    tone: Option<Bound<'py, PyAny>>,
    roughness_deg: Option<f64>,
    base: Option<String>,
    lights: Option<Vec<String>>,
    orbit_deg: Option<f64>,
    elevation_deg: Option<f64>,
    fov_deg: Option<f64>,
    distance: Option<f64>,
    turntable: Option<u32>,
) -> PyResult<Bound<'py, PyAny>> {
    scene.warn(py, true)?;
    let shape_given = shape.is_some();
    let options = Options {
        shape,
        size,
        ssaa,
        exposure,
        tone,
        roughness_deg,
        base,
        lights,
        orbit_deg,
        elevation_deg,
        fov_deg,
        distance,
        turntable,
    };
    let settings = options.settings(scene)?;
    let mesh = match (builtin_mesh(&settings.shape), &settings.shape) {
        (Some(m), _) => m,
        // The scene's own mesh was read with the scene.
        (None, Shape::Mesh(_)) if !shape_given => scene
            .inner
            .preview_mesh
            .clone()
            .ok_or_else(|| crate::errors::internal("the preview mesh was not read"))?,
        (None, Shape::Mesh(path)) => {
            let bytes = std::fs::read(path)
                .map_err(|e| Failure::input(format!("{path}: cannot read mesh: {e}")))?;
            Mesh::from_obj(path, &bytes).map_err(|e| Failure::input(format!("{path}: {e}")))?
        }
        (None, _) => return Err(crate::errors::internal("a shape without a mesh")),
    };
    let frames = run(py, true, |stop| {
        let preview = Preview::new(&scene.inner, &mesh, &settings).map_err(|e| scene.failure(e))?;
        (0..preview.frames())
            .map(|i| {
                stop.check()?;
                Ok(preview.render(i, &|_| stop.unwind_if_requested()).rgb)
            })
            .collect::<Outcome<Vec<Vec<u8>>>>()
    })?;
    let (w, h) = (settings.width as usize, settings.height as usize);
    let count = frames.len();
    let bytes: Vec<u8> = frames.into_iter().flatten().collect();
    let array = numpy::PyArray1::from_vec(py, bytes);
    let shaped = if settings.turntable > 0 {
        array.reshape([count, h, w, 3])?.into_any()
    } else {
        array.reshape([h, w, 3])?.into_any()
    };
    Ok(shaped)
}
