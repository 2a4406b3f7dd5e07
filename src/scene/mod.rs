//! Scene files: the validated description of a coating problem, built from
//! JSON in one place so that everything downstream can trust it.

pub(crate) mod json;
mod media;
mod stack;

use num_complex::Complex64;
use serde_json::Value;

use crate::error::{Error, Result};
use crate::grid::Range;
use crate::optics::{self, Behind, Exit, Spectra};
use json::Obj;
pub use media::Medium;
pub use stack::{Item, Layer, Repeat, Sigma, realise};

/// Reads a file named in a scene (a CSV table), relative to the scene file.
/// Returns the text or a one-line reason.
pub type Loader<'a> = dyn Fn(&str) -> std::result::Result<String, String> + 'a;

/// Most layers a stack may hold once disorder or grading expand its repeats.
pub const MAX_EXPANDED_LAYERS: u64 = 2_000_000;

/// Most periods one repeat group may have, and most times nested groups may
/// repeat any one layer (the product of their counts).
pub const MAX_REPEAT: u64 = 100_000_000;

/// Largest magnitude |n + ik| of a refractive index (its inverse is the
/// smallest): far beyond any material (metals in the far infrared reach a
/// few hundred, from memory), and close enough to 1 that every admittance
/// product stays within floating-point range.
pub const MAX_INDEX: f64 = 1e6;

/// Shortest wavelength a scene or a measurement may hold, in nm: below it no
/// optical-constant model here applies, and far below it 2π/λ overflows.
pub const MIN_WAVELENGTH_NM: f64 = 1.0;

/// Ensemble settings for thickness disorder.
#[derive(Debug, Clone, PartialEq)]
pub struct Disorder {
    /// Jitter for layers that do not set their own.
    pub sigma: Option<Sigma>,
    /// Number of random realisations averaged.
    pub realizations: usize,
    /// Seed of the random generator.
    pub seed: u64,
}

/// The substrate: a semi-infinite medium or a thick incoherent sheet.
#[derive(Debug, Clone, PartialEq)]
pub enum Substrate {
    /// Semi-infinite medium (index into [`Scene::media`]).
    Medium(usize),
    /// A thick sheet treated incoherently, with a medium or a black backing behind it.
    Sheet {
        /// Medium of the sheet.
        medium: usize,
        /// Thickness in µm.
        thickness_um: f64,
        /// Medium behind the sheet; `None` for a black backing.
        behind: Option<usize>,
    },
}

/// A validated scene.
#[derive(Debug, Clone)]
pub struct Scene {
    /// Free text.
    pub title: String,
    /// Every medium the scene uses, each once.
    pub media: Vec<Medium>,
    /// Index of the incident medium.
    pub incident: usize,
    /// The layer design, incident side first.
    pub stack: Vec<Item>,
    /// What is behind the stack.
    pub substrate: Substrate,
    /// Wavelength grid in nm.
    pub wavelengths_nm: Vec<f64>,
    /// Angles of incidence in degrees.
    pub angles_deg: Vec<f64>,
    /// Illuminant name as written (or `"custom"` with [`Scene::illuminant_csv`]).
    pub illuminant: String,
    /// Custom illuminant table text (`wavelength_nm,power`), when given.
    pub illuminant_csv: Option<String>,
    /// Observer name as written.
    pub observer: String,
    /// Thickness disorder, when any layer is jittered.
    pub disorder: Option<Disorder>,
    /// The document as parsed, kept so that edited scenes keep every key.
    pub document: Value,
}

const TOP_KEYS: &[&str] = &[
    "title",
    "notes",
    "incident",
    "stack",
    "substrate",
    "materials",
    "wavelengths_nm",
    "angles_deg",
    "illuminant",
    "observer",
    "disorder",
    "preview",
    "coating",
];

impl Scene {
    /// Parses and validates scene JSON; `load` reads files the scene names.
    pub fn from_json(text: &str, load: &Loader) -> Result<Scene> {
        let document: Value = serde_json::from_str(text).map_err(|e| Error::Syntax {
            line: e.line(),
            column: e.column(),
            message: e
                .to_string()
                .split(" at line")
                .next()
                .unwrap_or_default()
                .to_string(),
        })?;
        let top = Obj::new(&document, "")?;
        top.only(TOP_KEYS)?;
        let mut media = media::Registry::new(top.get("materials"), load)?;

        let incident = media.resolve(top.str("incident")?.unwrap_or("air"), "incident")?;
        // An effect-pigment scene may describe its optics in `coating` alone:
        // then the scene-level stack is empty and the substrate is the
        // incident medium.
        let coating = top.get("coating");
        let stack = match (top.get("stack"), coating) {
            (Some(v), _) => stack::parse_items(v, "stack", &mut media)?,
            (None, Some(_)) => Vec::new(),
            (None, None) => return Err(top.missing("stack", "a list of layers")),
        };
        if let Some(c) = coating {
            coating_media(c, &mut media)?;
        }
        let substrate = match top.get("substrate") {
            None if coating.is_some() => Substrate::Medium(incident),
            None => return Err(top.missing("substrate", "a material name or a sheet object")),
            Some(Value::String(name)) => Substrate::Medium(media.resolve(name, "substrate")?),
            Some(v) => {
                let o = Obj::new(v, "substrate")?;
                o.only(&["material", "thickness_um", "behind"])?;
                let name = o
                    .str("material")?
                    .ok_or_else(|| o.missing("material", "the sheet's material"))?;
                let medium = media.resolve(name, &o.key("material"))?;
                let thickness_um = o.req_f64("thickness_um")?;
                if thickness_um <= 0.0 {
                    return Err(Error::invalid(
                        o.key("thickness_um"),
                        thickness_um,
                        "must be greater than zero",
                    ));
                }
                let behind = match o.str("behind")?.unwrap_or("air") {
                    b if b.eq_ignore_ascii_case("black") => None,
                    b => Some(media.resolve(b, &o.key("behind"))?),
                };
                Substrate::Sheet {
                    medium,
                    thickness_um,
                    behind,
                }
            }
        };
        let wavelengths_nm = grid(
            &top,
            "wavelengths_nm",
            Range {
                from: 380.0,
                to: 780.0,
                step: 1.0,
            },
        )?;
        if let Some(&w) = wavelengths_nm.iter().find(|&&w| w < MIN_WAVELENGTH_NM) {
            return Err(Error::invalid(
                "wavelengths_nm.from",
                w,
                format!("wavelengths must be at least {MIN_WAVELENGTH_NM} nm"),
            ));
        }
        let angles_deg = grid(
            &top,
            "angles_deg",
            Range {
                from: 0.0,
                to: 80.0,
                step: 10.0,
            },
        )?;
        if let Some(&a) = angles_deg.iter().find(|&&a| a.abs() >= 90.0) {
            return Err(Error::invalid(
                "angles_deg",
                a,
                "angles of incidence must lie below 90°",
            ));
        }
        let (illuminant, illuminant_csv) = match top.get("illuminant") {
            None => ("D65".to_string(), None),
            Some(Value::String(s)) => (s.clone(), None),
            Some(v) => {
                let o = Obj::new(v, "illuminant")?;
                o.only(&["csv"])?;
                let path = o
                    .str("csv")?
                    .ok_or_else(|| o.missing("csv", "path of a wavelength_nm,power table"))?;
                let text = load(path).map_err(|why| Error::invalid(o.key("csv"), path, why))?;
                ("custom".to_string(), Some(text))
            }
        };
        let observer = top.str("observer")?.unwrap_or("CIE1931_2").to_string();
        let disorder = stack::parse_disorder(top.get("disorder"), "disorder", &stack)?;
        let scene = Scene {
            title: top.str("title")?.unwrap_or("").to_string(),
            media: media.into_media(),
            incident,
            stack,
            substrate,
            wavelengths_nm,
            angles_deg,
            illuminant,
            illuminant_csv,
            observer,
            disorder,
            document,
        };
        scene.check_expansion()?;
        Ok(scene)
    }

    /// Complex index of every medium at every grid wavelength (`[medium][w]`).
    /// Fails for tables that do not cover the grid and for an absorbing
    /// incident medium.
    pub fn indices(&self, wavelengths_nm: &[f64]) -> Result<Vec<Vec<Complex64>>> {
        let table: Vec<Vec<Complex64>> = self
            .media
            .iter()
            .map(|m| {
                wavelengths_nm
                    .iter()
                    .map(|&w| {
                        let n = m.dispersion.index(w).map_err(|e| e.within(&m.key))?;
                        let size = n.norm();
                        if !(n.re > 0.0
                            && n.im >= 0.0
                            && (1.0 / MAX_INDEX..=MAX_INDEX).contains(&size))
                        {
                            return Err(Error::invalid(
                                &m.key,
                                format!("n = {n} at {w} nm"),
                                format!(
                                    "the model gives an unphysical index (needs n > 0, k ≥ 0 \
                                     and |n + ik| from {:e} to {MAX_INDEX:e})",
                                    1.0 / MAX_INDEX
                                ),
                            ));
                        }
                        Ok(n)
                    })
                    .collect()
            })
            .collect::<Result<_>>()?;
        let inc = &self.media[self.incident];
        if let Some((w, n)) = wavelengths_nm
            .iter()
            .zip(&table[self.incident])
            .find(|(_, n)| n.im != 0.0)
        {
            return Err(Error::invalid(
                "incident",
                &inc.name,
                format!(
                    "the incident medium must be lossless (k = {} at {w} nm)",
                    n.im
                ),
            ));
        }
        Ok(table)
    }

    /// R and T on the scene's grid (averaged over the disorder ensemble).
    pub fn spectra(&self) -> Result<Spectra> {
        self.with_rows(|rows| rows.all())
    }

    /// Runs `f` on the scene's grid computation, for callers that take the
    /// spectra row by row rather than whole.
    pub fn with_rows<T>(&self, f: impl FnOnce(&optics::Rows) -> T) -> Result<T> {
        let index = self.indices(&self.wavelengths_nm)?;
        let stacks = self.realisations(&self.stack);
        Ok(f(&optics::Rows::new(
            &stacks,
            &index,
            &self.wavelengths_nm,
            &self.angles_deg,
        )))
    }

    /// Parses a list of layer items (the `stack` syntax, repeats included)
    /// found elsewhere in the document at `path` (e.g. `coating.platelet`),
    /// resolving material names among the scene's media and the built-in
    /// library; library materials not used before are added to
    /// [`Scene::media`]. Materials defined under `materials` must already be
    /// in use (the coating's are resolved when the scene is read).
    pub fn parse_items(&mut self, v: &Value, path: &str) -> Result<Vec<Item>> {
        let mut media = media::Registry::with_media(std::mem::take(&mut self.media));
        let items = stack::parse_items(v, path, &mut media);
        self.media = media.into_media();
        items
    }

    /// Thickness disorder of `items` from a `disorder`-syntax object at `path`
    /// (defaults as for the scene's own `disorder`).
    pub fn parse_disorder(
        &self,
        v: Option<&Value>,
        path: &str,
        items: &[Item],
    ) -> Result<Option<Disorder>> {
        stack::parse_disorder(v, path, items)
    }

    /// Index of the medium called `name` in [`Scene::media`].
    pub fn medium(&self, name: &str) -> Option<usize> {
        self.media.iter().position(|m| m.name == name)
    }

    /// The optics stacks for a design: one, or one per disorder realisation.
    pub fn realisations(&self, items: &[Item]) -> Vec<optics::Stack> {
        let exit = match self.substrate {
            Substrate::Medium(m) => Exit::Medium(m),
            Substrate::Sheet {
                medium,
                thickness_um,
                behind,
            } => Exit::Sheet {
                medium,
                thickness_nm: thickness_um * 1e3,
                behind: behind.map_or(Behind::Black, Behind::Medium),
            },
        };
        stack::realise(items, self.disorder.as_ref())
            .into_iter()
            .map(|nodes| optics::Stack {
                incident: self.incident,
                nodes,
                exit,
            })
            .collect()
    }

    fn check_expansion(&self) -> Result<()> {
        let jittered = self.disorder.is_some();
        let layers = stack::expanded_layers(&self.stack, jittered);
        if layers > MAX_EXPANDED_LAYERS {
            return Err(Error::invalid(
                "stack",
                format!("{layers} layers once expanded"),
                format!(
                    "disorder or chirp_scale expand repeats layer by layer; keep it under {MAX_EXPANDED_LAYERS}"
                ),
            ));
        }
        Ok(())
    }
}

/// A grid written as `{"from", "to", "step"}` or as a list of increasing values.
/// Resolves the media an effect-pigment `coating` names (its binder and the
/// platelet's layers) while the scene's `materials` and file loader are at
/// hand; the section itself is validated by the pigment model.
fn coating_media(v: &Value, media: &mut media::Registry) -> Result<()> {
    let o = Obj::new(v, "coating")?;
    if let Some(name) = o.str("binder")? {
        media.resolve(name, &o.key("binder"))?;
    }
    if let Some(items) = o.get("platelet") {
        stack::parse_items(items, &o.key("platelet"), media)?;
    }
    Ok(())
}

fn grid(top: &Obj, key: &str, default: Range) -> Result<Vec<f64>> {
    let range = match top.get(key) {
        None => default,
        Some(Value::Array(xs)) => {
            let points = xs
                .iter()
                .enumerate()
                .map(|(i, x)| json::number(x, &format!("{key}[{i}]")))
                .collect::<Result<Vec<f64>>>()?;
            if points.is_empty() {
                return Err(Error::invalid(key, "[]", "needs at least one value"));
            }
            if let Some(i) = points.windows(2).position(|w| w[1] <= w[0]) {
                return Err(Error::invalid(
                    format!("{key}[{}]", i + 1),
                    points[i + 1],
                    "values must increase strictly",
                ));
            }
            return Ok(points);
        }
        Some(v) => {
            let o = Obj::new(v, key)?;
            o.only(&["from", "to", "step"])?;
            Range {
                from: o.req_f64("from")?,
                to: o.req_f64("to")?,
                step: o.req_f64("step")?,
            }
        }
    };
    range.points(key)
}
