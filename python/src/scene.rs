//! `lamella.Scene`: a validated scene, read the way the command line reads
//! it, with its spectrum and colour.

use std::cell::RefCell;
use std::collections::BTreeMap;
use std::ffi::CString;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use lamella::design::variables::{Variable, edited_document, every_layer, varying};
use lamella::scene::{Scene as Engine, WarningKind};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList, PyTuple};
use serde_json::Value;

use crate::colour::{Colours, colours};
use crate::convert::{from_json, to_json};
use crate::errors::{Failure, Outcome, SceneWarning};
use crate::spectrum::{Spectrum, spectrum};
use crate::view::ViewArgs;

/// A validated scene: layers, media, grids, light and observer (and an
/// effect-pigment coating or preview settings when the scene has them).
///
/// Build one with `Scene.load(path)` or `Scene.from_dict(d)`; both validate
/// exactly as the command line does and raise `SceneError` naming the key
/// and the value. A scene never changes: `with_thicknesses` returns a new one.
/// Scenes can be pickled (the tables they read travel with them), so they can
/// be sent to Dask workers.
#[pyclass(module = "lamella", frozen)]
pub struct Scene {
    /// The engine's scene.
    pub inner: Arc<Engine>,
    /// The scene file as given, for messages; empty for a scene from a dict.
    pub label: String,
    /// The folder the files a scene names are relative to.
    base: PathBuf,
    /// The text of every file the scene named (tables, light, mesh), by the
    /// name it was given, so that copies and edits never read them again.
    files: Arc<BTreeMap<String, String>>,
}

/// Reads the file `rel` relative to `base` (as the command line's loader does),
/// or takes it from `known`; returns the engine's scene and every file read.
fn build(
    text: &str,
    base: &Path,
    known: &BTreeMap<String, String>,
) -> Result<(Engine, BTreeMap<String, String>), lamella::Error> {
    let read = RefCell::new(known.clone());
    let load = |rel: &str| {
        if let Some(t) = read.borrow().get(rel) {
            return Ok(t.clone());
        }
        let path = base.join(rel);
        let t = std::fs::read_to_string(&path)
            .map_err(|e| format!("cannot read {}: {e}", path.display()))?;
        read.borrow_mut().insert(rel.to_string(), t.clone());
        Ok(t)
    };
    let scene = Engine::from_json(text, &load)?;
    Ok((scene, read.into_inner()))
}

impl Scene {
    fn new(
        py: Python<'_>,
        text: &str,
        label: String,
        base: PathBuf,
        known: &BTreeMap<String, String>,
        warn: bool,
    ) -> PyResult<Scene> {
        let (inner, files) =
            build(text, &base, known).map_err(|e| PyErr::from(Failure::engine(&label, e)))?;
        let scene = Scene {
            inner: Arc::new(inner),
            label,
            base,
            files: Arc::new(files),
        };
        if warn {
            scene.warn(py, false)?;
        }
        Ok(scene)
    }

    /// Issues the scene's warnings as `SceneWarning`s (those about colour
    /// only when `colour`, the others otherwise), as the command line prints
    /// them on stderr.
    pub fn warn(&self, py: Python<'_>, colour: bool) -> PyResult<()> {
        let category = py.get_type::<SceneWarning>();
        for w in &self.inner.warnings {
            if (w.kind == WarningKind::CoarseStep) != colour {
                continue;
            }
            let text = if self.label.is_empty() {
                w.to_string()
            } else {
                format!("{}: {w}", self.label)
            };
            let text = CString::new(text.replace('\0', " ")).unwrap_or_default();
            PyErr::warn(py, &category, &text, 2)?;
        }
        Ok(())
    }

    /// A changed copy from an edited document (same files, same label).
    pub fn edited(&self, py: Python<'_>, doc: &Value) -> PyResult<Scene> {
        let text = serde_json::to_string(doc).map_err(crate::errors::internal)?;
        Scene::new(
            py,
            &text,
            self.label.clone(),
            self.base.clone(),
            &self.files,
            false,
        )
    }

    /// An engine error about this scene.
    pub fn failure(&self, e: lamella::Error) -> Failure {
        Failure::engine(&self.label, e)
    }

    /// The scene's viewing with the call's overrides.
    pub fn viewing(&self, view: &ViewArgs) -> Outcome<lamella::angle_colour::Viewing> {
        view.viewing(&self.inner)
    }
}

fn variable_dict<'py>(py: Python<'py>, v: &Variable) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    d.set_item("pointer", &v.pointer)?;
    d.set_item("material", &v.material)?;
    d.set_item("thickness_nm", v.nominal_nm)?;
    d.set_item("low", v.low_nm)?;
    d.set_item("high", v.high_nm)?;
    Ok(d)
}

#[pymethods]
impl Scene {
    /// Scene.load(path) -> Scene
    ///
    /// Reads and validates a scene file (JSON), as every `lamella` command
    /// does. Tables, illuminant files and meshes it names are read relative
    /// to the file. Warnings (a material used outside the range its source
    /// vouches for, a very thick coherent layer) are issued as
    /// `SceneWarning`; those about colour alone (a coarse wavelength step)
    /// when colour is computed.
    ///
    /// Raises `SceneError` with the command line's message
    /// (`path: key = value: why`).
    #[staticmethod]
    #[pyo3(signature = (path))]
    fn load(py: Python<'_>, path: PathBuf) -> PyResult<Scene> {
        let label = path.display().to_string();
        let text = std::fs::read_to_string(&path)
            .map_err(|e| Failure::input(format!("{label}: cannot read scene: {e}")))?;
        let base = path.parent().map(Path::to_path_buf).unwrap_or_default();
        Scene::new(py, &text, label, base, &BTreeMap::new(), true)
    }

    /// Scene.from_dict(d, base_dir=None) -> Scene
    ///
    /// Validates a scene given as a dict (the JSON document: the keys of a
    /// scene file; numpy numbers and arrays are accepted as values). Files it
    /// names (tables, an illuminant CSV, a mesh) are read relative to
    /// `base_dir` (default: the current folder). Raises `SceneError` naming
    /// the key and the value.
    #[staticmethod]
    #[pyo3(signature = (d, base_dir=None))]
    fn from_dict(
        py: Python<'_>,
        d: &Bound<'_, PyAny>,
        base_dir: Option<PathBuf>,
    ) -> PyResult<Scene> {
        let doc = to_json(d, "")?;
        let text = serde_json::to_string(&doc).map_err(crate::errors::internal)?;
        Scene::new(
            py,
            &text,
            String::new(),
            base_dir.unwrap_or_default(),
            &BTreeMap::new(),
            true,
        )
    }

    /// to_dict() -> dict
    ///
    /// The scene's JSON document as written (every key, in order), with any
    /// thicknesses changed by `with_thicknesses` or a design tool.
    fn to_dict<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        from_json(py, &self.inner.document)
    }

    /// with_thicknesses(thicknesses) -> Scene
    ///
    /// A copy with layer thicknesses changed: `thicknesses` maps a layer's
    /// JSON pointer (as `variables`, `layers` and the design tools report
    /// them, e.g. `/stack/1/stack/0`) to its new thickness in nm. The copy is
    /// validated again; an unknown pointer or a refused thickness raises
    /// `SceneError`.
    #[pyo3(signature = (thicknesses))]
    fn with_thicknesses(&self, py: Python<'_>, thicknesses: &Bound<'_, PyDict>) -> PyResult<Scene> {
        let mut vars = Vec::new();
        let mut x = Vec::new();
        for (k, v) in thicknesses.iter() {
            let pointer: String = k
                .extract()
                .map_err(|_| Failure::input("thicknesses: keys must be layer pointers (str)"))?;
            let t: f64 = v.extract().map_err(|_| {
                Failure::input(format!("{pointer}.thickness_nm = {v}: not a number"))
            })?;
            if !t.is_finite() {
                return Err(Failure::input(format!(
                    "{pointer}.thickness_nm = {t}: not a finite number"
                ))
                .into());
            }
            vars.push(Variable {
                pointer,
                material: String::new(),
                nominal_nm: t,
                low_nm: t,
                high_nm: t,
            });
            x.push(t);
        }
        let doc = edited_document(&self.inner.document, &vars, &x)
            .map_err(|e| PyErr::from(self.failure(e)))?;
        self.edited(py, &doc)
    }

    /// spectrum(wavelengths_nm=None, angles_deg=None, basis="linear", jones=None) -> Spectrum
    ///
    /// Reflectance, transmittance and absorptance for polarized and
    /// unpolarized light, computed by the engine on the scene's grid or on
    /// the given wavelengths (nm, > 0) and angles of incidence (degrees,
    /// |θ| < 90).
    ///
    /// - basis: "linear" gives `R_s, R_p, R, T_s, T_p, T, A`; "circular"
    ///   gives `R_L, R_R, R, T_L, T_R, T, A`, R_L being the total reflectance
    ///   (co- plus cross-polarized) for left-handed incident light. Light's
    ///   handedness is named by the helix its electric field traces in space
    ///   at one instant: a left-handed helix reflects left-handed light at
    ///   normal incidence.
    /// - jones: also give the complex Jones matrices `r_jones`, `t_jones`
    ///   (A, W, 2, 2) in the basis (order `jones_basis`: ("p", "s") or
    ///   ("L", "R")), as `lamella spectrum --format json` does; default: for
    ///   scenes with anisotropic layers, whose R and T come from them.
    ///
    /// Returns a `Spectrum` with float64 arrays `wavelength_nm` (W,),
    /// `angle_deg` (A,) and the seven columns of shape (A, W): fractions of
    /// the incident power, for anisotropic layers totals over the outgoing
    /// polarizations, unpolarized R the mean of the two incident ones, and
    /// A = 1 − R − T (exactly 0 where nothing absorbs). On the scene's grid
    /// the numbers are bit for bit those `lamella spectrum --basis` prints,
    /// averaged over the disorder ensemble when the scene has one.
    ///
    /// Raises `SceneError` for a coating-only scene, a bad grid or basis,
    /// Jones matrices of a stack that is not coherent, and
    /// `NotComputableError` naming the point for a value that is not finite.
    /// Releases the GIL; Ctrl-C stops a long call.
    #[pyo3(signature = (wavelengths_nm=None, angles_deg=None, basis="linear", jones=None))]
    fn spectrum(
        &self,
        py: Python<'_>,
        wavelengths_nm: Option<&Bound<'_, PyAny>>,
        angles_deg: Option<&Bound<'_, PyAny>>,
        basis: &str,
        jones: Option<bool>,
    ) -> PyResult<Spectrum> {
        spectrum(py, self, wavelengths_nm, angles_deg, basis, jones)
    }

    /// layer_absorption() -> LayerAbsorption
    ///
    /// The unpolarized absorptance of each layer as written (a layer in a
    /// repeat group summed over its periods), then of a substrate sheet and
    /// a black backing, on the scene's grid: `columns` and `values` (A, W, C),
    /// bit for bit the `A_…` columns of `lamella spectrum --layer-absorption`;
    /// they add up to `spectrum().A`. Raises `SceneError` for a coating-only
    /// scene or a stack too long to resolve layer by layer.
    fn layer_absorption(&self, py: Python<'_>) -> PyResult<crate::inside::LayerAbsorption> {
        crate::inside::layer_absorption(py, self)
    }

    /// field(wavelength_nm, angle_deg=0.0, polarization="s", points=1000) -> FieldProfile
    ///
    /// |E|² relative to the incident wave at `points` depths (2–1000000)
    /// through the stack and a margin of the incident and exit media, both
    /// sides of every interface included, as `lamella field` prints it:
    /// arrays `z_nm`, `layer`, `E2`. Raises `SceneError` for an angle of 90°
    /// or more, a wavelength outside a material's vouched range or table, or
    /// a stack with incoherent layers or a substrate sheet.
    #[pyo3(signature = (wavelength_nm, angle_deg=0.0, polarization="s", points=lamella::scene::FIELD_POINTS))]
    fn field(
        &self,
        py: Python<'_>,
        wavelength_nm: f64,
        angle_deg: f64,
        polarization: &str,
        points: usize,
    ) -> PyResult<crate::inside::FieldProfile> {
        crate::inside::field(py, self, wavelength_nm, angle_deg, polarization, points)
    }

    /// bands() -> Bands
    ///
    /// cos KΛ = ½ tr M of the first repeat group's period for s and p over
    /// the scene's grid (`half_trace_s`, `half_trace_p`, (A, W)) and the
    /// stop bands where |½ tr M| > 1, as `lamella bands` gives them. Raises
    /// `SceneError` for a scene without a repeat group.
    fn bands(&self, py: Python<'_>) -> PyResult<crate::inside::Bands> {
        crate::inside::bands(py, self)
    }

    /// color(illuminant=None, observer=None, side="reflect",
    /// polarization="unpolarized", gamut="clip", analyzer=None) -> Colors
    ///
    /// The colour at every angle of the scene, as `lamella color` reports it:
    /// CIE XYZ (perfect reflecting diffuser Y = 100), xy, CIELAB L*a*b*
    /// (white: the perfect reflector under the same light), C*ab, h_ab
    /// (degrees), encoded sRGB 0–1 (IEC 61966-2-1, Bradford-adapted to D65),
    /// hex, whether it lies in the sRGB gamut, and the colour travel.
    ///
    /// - illuminant: a built-in name (D65, D50, A, E, F2, F7, F11, LED-B1 …)
    ///   or a `wavelength_nm,power` CSV file; default: the scene's.
    /// - observer: "CIE1931_2" or "CIE1964_10"; default: the scene's.
    /// - side: "reflect" or "transmit".
    /// - polarization: "unpolarized", "s", "p", or "left" / "right" for
    ///   circularly polarized incident light.
    /// - gamut: "clip" (each channel) or "chroma" (reduce chroma at constant
    ///   L* and hue) for colours outside sRGB.
    /// - analyzer: "left" or "right": unpolarized light, the reflected (or
    ///   transmitted) light seen through an ideal circular analyser passing
    ///   that handedness, as through circular-polarizer glasses.
    ///
    /// Returns `Colors` with arrays of shape (A,) (`srgb` (A, 3), `hex` a
    /// list of str) and `.to_pandas()`. Screen colours are approximations:
    /// colour sign-off needs a measured sample.
    #[pyo3(signature = (illuminant=None, observer=None, side="reflect", polarization="unpolarized", gamut="clip", analyzer=None))]
    #[allow(clippy::too_many_arguments)]
    fn color(
        &self,
        py: Python<'_>,
        illuminant: Option<String>,
        observer: Option<String>,
        side: &str,
        polarization: &str,
        gamut: &str,
        analyzer: Option<String>,
    ) -> PyResult<Colours> {
        let view = ViewArgs {
            illuminant,
            observer,
            side: side.into(),
            polarization: polarization.into(),
            gamut: gamut.into(),
            analyzer,
        };
        colours(py, self, &view)
    }

    /// The scene's title.
    #[getter]
    fn title(&self) -> &str {
        &self.inner.title
    }

    /// The scene file as given (None for a scene built from a dict).
    #[getter]
    fn path(&self) -> Option<&str> {
        (!self.label.is_empty()).then_some(self.label.as_str())
    }

    /// The scene's wavelength grid, nm.
    #[getter]
    fn wavelengths_nm<'py>(&self, py: Python<'py>) -> Bound<'py, numpy::PyArray1<f64>> {
        crate::convert::array1(py, self.inner.wavelengths_nm.clone())
    }

    /// The scene's angles of incidence, degrees.
    #[getter]
    fn angles_deg<'py>(&self, py: Python<'py>) -> Bound<'py, numpy::PyArray1<f64>> {
        crate::convert::array1(py, self.inner.angles_deg.clone())
    }

    /// The scene's illuminant name (or the path of its CSV table).
    #[getter]
    fn illuminant(&self) -> String {
        self.inner.illuminant.name().to_string()
    }

    /// The scene's observer name.
    #[getter]
    fn observer(&self) -> String {
        self.inner.observer.name().to_string()
    }

    /// Whether the scene has an effect-pigment `coating` section.
    #[getter]
    fn has_coating(&self) -> bool {
        self.inner.coating.is_some()
    }

    /// The design variables: the layers marked `vary_nm` (of the stack, or of
    /// the coating's platelet), in document order, each a dict with
    /// `pointer`, `material`, `thickness_nm`, `low` and `high` (nm).
    #[getter]
    fn variables<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        let vars = match &self.inner.coating {
            Some(c) => lamella::design::variables::varying_in(&self.inner, &c.platelet),
            None => varying(&self.inner),
        };
        let list = PyList::empty(py);
        for v in &vars {
            list.append(variable_dict(py, v)?)?;
        }
        Ok(list)
    }

    /// Every layer as written (a layer in a repeat group once), each a dict
    /// with `pointer`, `material`, `thickness_nm` (and `low` 0, `high` inf).
    #[getter]
    fn layers<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        let items = match &self.inner.coating {
            Some(c) => &c.platelet,
            None => &self.inner.stack,
        };
        let list = PyList::empty(py);
        for v in &every_layer(&self.inner, items) {
            list.append(variable_dict(py, v)?)?;
        }
        Ok(list)
    }

    /// The scene's warnings, each a dict with `kind`, `key` and `message`.
    #[getter]
    fn warnings<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        let list = PyList::empty(py);
        for w in &self.inner.warnings {
            let d = PyDict::new(py);
            d.set_item("kind", format!("{:?}", w.kind))?;
            d.set_item("key", &w.key)?;
            d.set_item("message", w.to_string())?;
            list.append(d)?;
        }
        Ok(list)
    }

    fn __repr__(&self) -> String {
        let title = if self.inner.title.is_empty() {
            "(untitled)"
        } else {
            &self.inner.title
        };
        format!(
            "<lamella.Scene {title:?}: {} wavelengths × {} angles{}>",
            self.inner.wavelengths_nm.len(),
            self.inner.angles_deg.len(),
            if self.inner.coating.is_some() {
                ", coating"
            } else {
                ""
            }
        )
    }

    /// Pickling: the document, its label and folder, and the files it read.
    fn __reduce__<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyTuple>> {
        let restore = py
            .import("lamella._lamella")?
            .getattr("_scene_from_state")?;
        let files = PyDict::new(py);
        for (k, v) in self.files.iter() {
            files.set_item(k, v)?;
        }
        let text = serde_json::to_string(&self.inner.document).map_err(crate::errors::internal)?;
        let args = (
            text,
            self.label.clone(),
            self.base.display().to_string(),
            files,
        );
        PyTuple::new(py, [restore.into_any(), args.into_pyobject(py)?.into_any()])
    }
}

/// Rebuilds a pickled scene (see `Scene.__reduce__`).
#[pyfunction]
pub fn _scene_from_state(
    py: Python<'_>,
    text: &str,
    label: String,
    base: String,
    files: BTreeMap<String, String>,
) -> PyResult<Scene> {
    Scene::new(py, text, label, PathBuf::from(base), &files, false)
}
