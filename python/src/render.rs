//! `render`: a preview image of an object wearing the scene's coating, as
//! `lamella render` draws it, returned as a uint8 array.

use std::sync::Arc;

use lamella::colorimetry::Illuminant;
use lamella::render::{
    EnvImage, Environment, Mesh, Overrides, Preview, Settings, Shape, builtin_environment,
    builtin_mesh,
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
    pub environment: Option<Bound<'py, PyAny>>,
    pub environment_white: Option<String>,
    pub view: Option<String>,
    pub floor: Option<Bound<'py, PyAny>>,
    pub shadow: Option<Bound<'py, PyAny>>,
    pub analyzer: Option<String>,
    pub caption: Option<Bound<'py, PyAny>>,
    pub orbit_elevation_deg: Option<(f64, f64)>,
}

/// An image size: (W, H) or "WxH".
fn size(obj: &Bound<'_, PyAny>) -> Outcome<String> {
    match obj.cast::<PyString>() {
        Ok(s) => Ok(s.to_string()),
        Err(_) => match obj.extract::<(i64, i64)>() {
            Ok((w, h)) => Ok(format!("{w}x{h}")),
            Err(_) => Err(Failure::input(format!(
                "size = {obj}: expected (width, height)"
            ))),
        },
    }
}

/// A switch: True/False or "on"/"off".
fn switch(obj: &Bound<'_, PyAny>) -> String {
    match obj.cast::<PyBool>() {
        Ok(b) => if b.is_true() { "on" } else { "off" }.to_string(),
        Err(_) => obj.to_string(),
    }
}

/// An environment: a built-in name, or linear RGB pixels as a float array
/// of shape (H, W, 3) (equirectangular, centre column behind the object).
fn environment(obj: &Bound<'_, PyAny>, white: Option<&str>) -> Outcome<Environment> {
    let named = |e: lamella::Error| Failure::input(format!("environment: {e}"));
    if let Ok(text) = obj.cast::<PyString>() {
        if white.is_some() {
            return Err(Failure::input(
                "environment_white: states the white of an environment image; pass the image as an array",
            ));
        }
        let text = text.to_string();
        return match builtin_environment(&text) {
            Some(e) => e.map_err(named),
            None => Err(Failure::input(format!(
                "environment = {text}: read the image yourself (e.g. with imageio) and pass its pixels as a float array of shape (H, W, 3)"
            ))),
        };
    }
    let array = obj
        .extract::<numpy::PyReadonlyArray3<'_, f32>>()
        .map_err(|_| {
            Failure::input(
                "environment: expected a built-in name or a float32 array of shape (H, W, 3)",
            )
        })?;
    let shape = array.as_array().shape().to_vec();
    if shape[2] != 3 {
        return Err(Failure::input(format!(
            "environment: an array of shape {shape:?}; expected (H, W, 3)"
        )));
    }
    let white = Illuminant::builtin(white.unwrap_or("D65"))
        .map_err(|e| Failure::input(format!("environment_white: {e}")))?;
    let pixels: Vec<f32> = array.as_array().iter().copied().collect();
    let image =
        EnvImage::new("array", (shape[1] as u32, shape[0] as u32), pixels, white).map_err(named)?;
    Ok(Environment::Image(Arc::new(image)))
}

impl Options<'_> {
    /// The scene's preview settings with these options applied.
    fn settings(&self, scene: &Scene) -> Outcome<Settings> {
        let overrides = Overrides {
            shape: self.shape.clone(),
            size: self.size.as_ref().map(size).transpose()?,
            ssaa: self.ssaa,
            exposure: self.exposure,
            tone: self.tone.as_ref().map(switch),
            roughness_deg: self.roughness_deg,
            base: self.base.clone(),
            lights: self.lights.clone(),
            orbit_deg: self.orbit_deg,
            elevation_deg: self.elevation_deg,
            fov_deg: self.fov_deg,
            distance: self.distance,
            turntable: self.turntable,
            environment: self
                .environment
                .as_ref()
                .map(|e| environment(e, self.environment_white.as_deref()))
                .transpose()?,
            view: self.view.clone(),
            floor: self.floor.as_ref().map(|f| match f.cast::<PyBool>() {
                Ok(b) if !b.is_true() => "off".to_string(),
                _ => f.to_string(),
            }),
            shadow: self.shadow.as_ref().map(switch),
            analyzer: self.analyzer.clone(),
            caption: self.caption.as_ref().map(switch),
            orbit_elevation_deg: self.orbit_elevation_deg.map(|(a, b)| format!("{a}:{b}")),
        };
        if self.environment_white.is_some() && self.environment.is_none() {
            return Err(Failure::input(
                "environment_white: states the white of an environment image; pass environment too",
            ));
        }
        let base = scene.inner.preview.clone().unwrap_or_default();
        overrides.apply(base).map_err(|e| match e.key {
            Some(key) => Failure::input(format!("{key}: {}", e.error)),
            None => Failure::input(e.error.to_string()),
        })
    }
}

/// render(scene, shape=None, size=None, ssaa=None, exposure=None, tone=None,
/// roughness_deg=None, base=None, lights=None, orbit_deg=None,
/// elevation_deg=None, fov_deg=None, distance=None, turntable=None,
/// environment=None, environment_white=None, view=None, floor=None,
/// shadow=None, analyzer=None, caption=None, orbit_elevation_deg=None) -> ndarray
///
/// A preview image of an object wearing the scene's film (or effect-pigment
/// coating), shaded from the real spectra as `lamella render` draws it.
/// Every option overrides the scene's `preview` settings:
///
/// - shape: "sphere" (default), "cylinder", "torus", "bottle", "sheet",
///   "pane" or "mesh:PATH" (a Wavefront OBJ file).
/// - size: (width, height) in pixels, or "WxH"; default 800×800.
/// - ssaa: N×N supersampling, 1–8 (default 2); exposure: linear scale
///   (default 1); tone: the highlight tone curve, True/"on" or False/"off".
/// - roughness_deg: facet orientation spread in degrees, 0–60.
/// - base: what lies under the film: "black", "white" or "#RRGGBB".
/// - lights: list of light descriptions, e.g. "sky,intensity=0.6" or
///   "area,azimuth_deg=-35,elevation_deg=30,size_deg=24".
/// - orbit_deg, elevation_deg, fov_deg, distance: the camera (degrees; the
///   distance in object radii).
/// - turntable: N frames of a full turn; orbit_elevation_deg: (from, to),
///   the camera elevation swept over the turn and back.
/// - environment: "studio", "booth", "overcast", "lighttable", "uniform"
///   (each with optional ",intensity=X,illuminant=NAME"), or an
///   equirectangular image as a float32 array (H, W, 3) of linear RGB whose
///   (1, 1, 1) is the illuminant environment_white (default "D65").
///   Given without lights it replaces the preview's lights.
/// - view: "reflect" (default), "transmit" or "both" (a clear object).
/// - floor: a reflectance 0–1 for a matte floor, or "off"; shadow: the
///   object's contact shadow on it (True/False).
/// - analyzer: "left" or "right", a circular analyser before the eye.
/// - caption: True adds a strip with the scene title, environment,
///   illuminant, observer and lamella version.
///
/// Returns an sRGB uint8 array of shape (H, W, 3), or (N, H, W, 3) with a
/// turntable. Screen colours are approximations: judge colour on a measured
/// sample.
#[pyfunction]
#[pyo3(signature = (scene, shape=None, size=None, ssaa=None, exposure=None, tone=None,
    roughness_deg=None, base=None, lights=None, orbit_deg=None, elevation_deg=None,
    fov_deg=None, distance=None, turntable=None, environment=None, environment_white=None,
    view=None, floor=None, shadow=None, analyzer=None, caption=None,
    orbit_elevation_deg=None))]
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
    environment: Option<Bound<'py, PyAny>>,
    environment_white: Option<String>,
    view: Option<String>,
    floor: Option<Bound<'py, PyAny>>,
    shadow: Option<Bound<'py, PyAny>>,
    analyzer: Option<String>,
    caption: Option<Bound<'py, PyAny>>,
    orbit_elevation_deg: Option<(f64, f64)>,
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
        environment,
        environment_white,
        view,
        floor,
        shadow,
        analyzer,
        caption,
        orbit_elevation_deg,
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
    let (frames, h) = run(py, true, |stop| {
        let preview = Preview::new(&scene.inner, &mesh, &settings).map_err(|e| scene.failure(e))?;
        let mut height = settings.height;
        let frames = (0..preview.frames())
            .map(|i| {
                stop.check()?;
                let image = preview.render(i, &|_| stop.unwind_if_requested());
                height = image.height;
                Ok(image.rgb)
            })
            .collect::<Outcome<Vec<Vec<u8>>>>()?;
        Ok((frames, height as usize))
    })?;
    let w = settings.width as usize;
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
