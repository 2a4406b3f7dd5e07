//! Scene files: the validated description of a coating problem, built from
//! JSON in one place so that everything downstream can trust it.

mod aniso;
mod coating;
mod inside;
pub(crate) mod json;
mod media;
mod preview;
mod stack;
mod warnings;

use num_complex::Complex64;
use serde_json::Value;

use crate::colorimetry::{Illuminant, Observer, Weights};
use crate::error::{Error, Result};
use crate::grid::Range;
use crate::optics::{self, Behind, Exit, Rt, Spectra};
use crate::pigment::Coating;
use crate::render::{Mesh, Settings, Shape};
pub use aniso::{Anisotropy, Crystal, CrystalKind, Helix};
pub use coating::KEYS as COATING_KEYS;
pub use inside::{Bands, FIELD_POINTS, LayerAbsorption, MAX_RESOLVED_LAYERS, StopBand};
use json::Obj;
pub use media::Medium;
pub use stack::{Item, Layer, Repeat, Sigma, realise};
pub use warnings::{COARSEST_COLOUR_STEP_NM, THICKEST_COHERENT_NM, Warning, WarningKind};

/// Reads a file named in a scene (a CSV table), relative to the scene file.
/// Returns the text or a one-line reason.
pub type Loader<'a> = dyn Fn(&str) -> std::result::Result<String, String> + 'a;

/// Most layers a stack may hold once disorder or grading expand its repeats.
pub const MAX_EXPANDED_LAYERS: u64 = 2_000_000;

/// Most layers all the realisations of a disordered stack may hold together.
pub const MAX_ENSEMBLE_LAYERS: u64 = 20_000_000;

/// Most periods one repeat group may have, and most times nested groups may
/// repeat any one layer (the product of their counts).
pub const MAX_REPEAT: u64 = 100_000_000;

/// Most memory (bytes) a result held whole over a grid may take; larger work
/// is refused before it starts.
pub const MAX_GRID_BYTES: u64 = 4 << 30;

/// Bytes a grid point takes while R and T are held for a whole grid (four
/// f64), with room for what is derived from them.
pub const GRID_BYTES_PER_POINT: u64 = 48;

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
    /// Every medium the scene uses, each once (the principal indices of
    /// anisotropic materials among them).
    pub media: Vec<Medium>,
    /// The anisotropic materials the stack uses.
    pub crystals: Vec<Crystal>,
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
    /// The light colours are computed under (default D65); a custom table
    /// is labelled with its path as written.
    pub illuminant: Illuminant,
    /// The standard observer (default CIE 1931 2°).
    pub observer: Observer,
    /// Thickness disorder, when any layer is jittered.
    pub disorder: Option<Disorder>,
    /// Whether the scene describes a film (it has a `stack`); an
    /// effect-pigment scene may describe its optics in `coating` alone.
    pub film: bool,
    /// The effect-pigment coating, when the scene has a `coating` section.
    pub coating: Option<Coating>,
    /// Render settings from the `preview` section (defaults for every key
    /// left out), when the scene has one.
    pub preview: Option<Settings>,
    /// The mesh a `preview` shape `mesh:PATH` names, read with the scene.
    pub preview_mesh: Option<Mesh>,
    /// What the scene may get wrong without being invalid, each naming its
    /// key (for the caller to show).
    pub warnings: Vec<Warning>,
    /// The document as parsed, kept only so that edited scenes can be
    /// written back with every key.
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
    /// Every section is read and checked here, so every command accepts or
    /// refuses a file alike. A UTF-8 byte-order mark is skipped; a key given
    /// twice in one object is refused.
    pub fn from_json(text: &str, load: &Loader) -> Result<Scene> {
        let document = json::parse(text)?;
        let top = Obj::new(&document, "")?;
        top.only(TOP_KEYS)?;
        let mut media = media::Registry::new(top.get("materials"), load)?;

        let incident = media.resolve(top.str("incident")?.unwrap_or("air"), "incident")?;
        // An effect-pigment scene may describe its optics in `coating` alone:
        // then the scene-level stack is empty and the substrate is the
        // incident medium.
        let has_coating = top.get("coating").is_some();
        let stack = match top.get("stack") {
            Some(v) => stack::parse_items(v, "stack", &mut media, true)?,
            None if has_coating => Vec::new(),
            None => return Err(top.missing("stack", "a list of layers")),
        };
        let coating = top
            .get("coating")
            .map(|c| coating::parse(c, &mut media))
            .transpose()?;
        let substrate = match top.get("substrate") {
            None if has_coating => Substrate::Medium(incident),
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
        let illuminant = match top.get("illuminant") {
            None => Illuminant::builtin("D65")?,
            Some(Value::String(s)) => Illuminant::builtin(s)?,
            Some(v) => {
                let o = Obj::new(v, "illuminant")?;
                o.only(&["csv"])?;
                let path = o
                    .str("csv")?
                    .ok_or_else(|| o.missing("csv", "path of a wavelength_nm,power table"))?;
                let text = load(path).map_err(|why| Error::invalid(o.key("csv"), path, why))?;
                Illuminant::from_csv(path, &text)?
            }
        };
        let observer = match top.str("observer")? {
            None => Observer::Cie1931_2,
            Some(name) => name.parse()?,
        };
        Weights::check_light(&wavelengths_nm, &illuminant, observer)?;
        let disorder = stack::parse_disorder(top.get("disorder"), "disorder", &stack)?;
        let preview = top.get("preview").map(preview::parse).transpose()?;
        let preview_mesh = match preview.as_ref().map(|p| &p.shape) {
            Some(Shape::Mesh(path)) => {
                let text = load(path)
                    .map_err(|why| Error::invalid("preview.shape", format!("mesh:{path}"), why))?;
                Some(Mesh::from_obj(path, text.as_bytes()).map_err(|e| e.within("preview"))?)
            }
            _ => None,
        };
        let (media, crystals) = media.into_parts();
        let mut scene = Scene {
            title: top.str("title")?.unwrap_or("").to_string(),
            media,
            crystals,
            incident,
            stack,
            substrate,
            wavelengths_nm,
            angles_deg,
            illuminant,
            observer,
            disorder,
            film: top.get("stack").is_some(),
            coating,
            preview,
            preview_mesh,
            warnings: Vec::new(),
            document,
        };
        scene.check_expansion()?;
        scene.check_anisotropy()?;
        let index = scene.indices(&scene.wavelengths_nm)?;
        if let Some(c) = &scene.coating {
            check_coating(&scene, c, &index)?;
        }
        scene.warnings = warnings::of(&scene);
        Ok(scene)
    }

    /// True when a layer of the stack is anisotropic: the scene is computed
    /// by the 4×4 path.
    pub fn anisotropic(&self) -> bool {
        aniso::any_anisotropic(&self.stack)
    }

    /// Refuses an anisotropic scene for a command (`what`) that computes
    /// only isotropic stacks.
    pub fn require_isotropic(&self, what: &str) -> Result<()> {
        if !self.anisotropic() {
            return Ok(());
        }
        Err(Error::invalid(
            "stack",
            "(anisotropic layers)",
            format!(
                "{what} handles isotropic layers only; use `lamella spectrum` or `lamella color` \
                 for a scene with uniaxial, biaxial or helicoidal layers"
            ),
        ))
    }

    /// True when the design can be written as one coherent 4×4 stack (no
    /// incoherent layer, no substrate sheet, no disorder), so that Jones
    /// matrices exist.
    pub fn coherent(&self) -> bool {
        matches!(self.substrate, Substrate::Medium(_))
            && self.disorder.is_none()
            && !aniso::any_incoherent(&self.stack)
    }

    /// The design as a 4×4 stack with its tensors on `wavelengths_nm`
    /// (`index` from [`Scene::indices`] on the same wavelengths), helices
    /// sliced for the largest of `angles_deg`; `None` when the design is not
    /// [`Scene::coherent`].
    pub fn gridded(
        &self,
        index: &[Vec<Complex64>],
        wavelengths_nm: &[f64],
        angles_deg: &[f64],
    ) -> Option<optics::aniso::Gridded> {
        self.gridded_design(&self.stack, index, wavelengths_nm, angles_deg)
    }

    /// [`Scene::gridded`] for the design `items` (the scene's stack with
    /// other thicknesses or pitches) in place of the scene's own stack.
    pub fn gridded_design(
        &self,
        items: &[Item],
        index: &[Vec<Complex64>],
        wavelengths_nm: &[f64],
        angles_deg: &[f64],
    ) -> Option<optics::aniso::Gridded> {
        let Substrate::Medium(exit) = self.substrate else {
            return None;
        };
        self.coherent().then(|| {
            aniso::gridded(
                items,
                self.incident,
                exit,
                &self.crystals,
                index,
                wavelengths_nm,
                angles_deg,
            )
        })
    }

    /// Refuses what the 4×4 path does not take beside anisotropic layers:
    /// incoherent layers, a substrate sheet, thickness disorder, an
    /// anisotropic platelet.
    fn check_anisotropy(&self) -> Result<()> {
        if let Some(c) = &self.coating
            && aniso::any_anisotropic(&c.platelet)
        {
            return Err(Error::invalid(
                "coating.platelet",
                "(anisotropic layers)",
                "platelets take isotropic layers only",
            ));
        }
        if !self.anisotropic() {
            return Ok(());
        }
        if let Substrate::Sheet { thickness_um, .. } = self.substrate {
            return Err(Error::invalid(
                "substrate.thickness_um",
                thickness_um,
                "a substrate sheet (incoherent) cannot be combined with anisotropic layers; \
                 give the substrate as a material name (semi-infinite)",
            ));
        }
        aniso::check_periods(&self.stack, 1.0)?;
        if aniso::any_incoherent(&self.stack) {
            return Err(Error::invalid(
                "stack",
                "(an incoherent layer)",
                "incoherent layers cannot be combined with anisotropic layers",
            ));
        }
        if self.disorder.is_some() {
            return Err(Error::invalid(
                "disorder",
                "(thickness disorder)",
                "thickness disorder cannot be combined with anisotropic layers; \
                 remove `disorder` and the layers' sigma_nm / sigma_pct",
            ));
        }
        Ok(())
    }

    /// Refuses a coating-only scene (no `stack`) for a command that computes
    /// a film, pointing to the commands that take a coating.
    pub fn require_film(&self) -> Result<()> {
        if self.film {
            return Ok(());
        }
        Err(Error::invalid(
            "stack",
            "(missing)",
            "this scene describes only an effect-pigment `coating`; use `lamella multiangle` \
             (or `lamella render`) for its colour, or add a `stack` and `substrate` for a film",
        ))
    }

    /// Refuses work over `angles` angles × the scene's wavelengths that
    /// needs about `bytes_per_point` bytes a point for `what`, when it would
    /// take more than [`MAX_GRID_BYTES`]; the error gives the size.
    pub fn check_grid_size(&self, angles: usize, bytes_per_point: u64, what: &str) -> Result<()> {
        let nw = self.wavelengths_nm.len() as u64;
        let points = nw.saturating_mul(angles as u64);
        let bytes = points.saturating_mul(bytes_per_point);
        if bytes <= MAX_GRID_BYTES {
            return Ok(());
        }
        Err(Error::invalid(
            "wavelengths_nm × angles_deg",
            format!("{nw} × {angles} points"),
            format!(
                "{what} would need about {} for the whole grid, over the {} limit; use a coarser grid \
                 (`lamella spectrum --format csv` streams any size)",
                bytes_text(bytes),
                bytes_text(MAX_GRID_BYTES)
            ),
        ))
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
                                format!("n = {} at {w} nm", compact(n)),
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

    /// R and T on the scene's grid (averaged over the disorder ensemble);
    /// a value that is not finite is an error naming its point.
    pub fn spectra(&self) -> Result<Spectra> {
        self.spectra_at(&self.angles_deg)
    }

    /// R and T on the scene's wavelengths at `angles_deg` (each below 90°),
    /// checked like [`Scene::spectra`].
    pub fn spectra_at(&self, angles_deg: &[f64]) -> Result<Spectra> {
        let spectra = self.rows_at(angles_deg, false, |rows| rows.all())?;
        check_spectra(&spectra)?;
        Ok(spectra)
    }

    /// [`Scene::spectra`] with the Jones matrices at every point (through
    /// the 4×4 path, for isotropic scenes too); refused for a scene that is
    /// not [`Scene::coherent`], where light has no single amplitude.
    pub fn spectra_with_jones(&self) -> Result<Spectra> {
        self.spectra_with_jones_at(&self.angles_deg)
    }

    /// [`Scene::spectra_with_jones`] at `angles_deg` (each below 90°).
    pub fn spectra_with_jones_at(&self, angles_deg: &[f64]) -> Result<Spectra> {
        self.require_coherent()?;
        let spectra = self.rows_at(angles_deg, true, |rows| rows.all_with_jones())?;
        check_spectra(&spectra)?;
        Ok(spectra)
    }

    /// Refuses a design that is not [`Scene::coherent`] for what needs
    /// polarization amplitudes (Jones matrices, circular analysers).
    pub fn require_coherent(&self) -> Result<()> {
        if self.coherent() {
            return Ok(());
        }
        Err(Error::invalid(
            "stack",
            "(incoherent layer, substrate sheet or disorder)",
            "polarization amplitudes (Jones matrices, circular analysers) need a coherent \
             stack: no incoherent layer, substrate sheet or thickness disorder",
        ))
    }

    /// Runs `f` on the scene's grid computation, for callers that take the
    /// spectra row by row rather than whole (they check each point with
    /// [`check_point`]). The rows carry the 4×4 stack and take R and T from
    /// it when the scene is [`Scene::anisotropic`].
    pub fn with_rows<T>(&self, f: impl FnOnce(&optics::Rows) -> T) -> Result<T> {
        self.rows_at(&self.angles_deg, false, f)
    }

    /// [`Scene::with_rows`] with the 4×4 stack attached whenever the scene
    /// is [`Scene::coherent`], so that [`optics::Rows::has_jones`] holds for
    /// isotropic scenes too.
    pub fn with_jones_rows<T>(&self, f: impl FnOnce(&optics::Rows) -> T) -> Result<T> {
        self.rows_at(&self.angles_deg, true, f)
    }

    fn rows_at<T>(
        &self,
        angles_deg: &[f64],
        jones: bool,
        f: impl FnOnce(&optics::Rows) -> T,
    ) -> Result<T> {
        let index = self.indices(&self.wavelengths_nm)?;
        Ok(self.rows_of(&self.stack, &index, angles_deg, jones, f))
    }

    /// Runs `f` on the grid computation of `items` in place of the scene's
    /// stack (same media, `index` from [`Scene::indices`] on the scene's
    /// wavelengths) at `angles_deg`, through the 4×4 path when the scene is
    /// [`Scene::anisotropic`] and with the 4×4 stack attached for Jones
    /// matrices when `jones` (and the design is [`Scene::coherent`]).
    pub fn rows_of<T>(
        &self,
        items: &[Item],
        index: &[Vec<Complex64>],
        angles_deg: &[f64],
        jones: bool,
        f: impl FnOnce(&optics::Rows) -> T,
    ) -> T {
        self.rows_on(items, index, &self.wavelengths_nm, angles_deg, jones, f)
    }

    /// [`Scene::rows_of`] on `wavelengths_nm` in place of the scene's own
    /// (`index` from [`Scene::indices`] on them).
    pub fn rows_on<T>(
        &self,
        items: &[Item],
        index: &[Vec<Complex64>],
        wavelengths_nm: &[f64],
        angles_deg: &[f64],
        jones: bool,
        f: impl FnOnce(&optics::Rows) -> T,
    ) -> T {
        let stacks = self.realisations(items);
        let rows = optics::Rows::new(&stacks, index, wavelengths_nm, angles_deg);
        let four = if jones || self.anisotropic() {
            self.gridded_design(items, index, wavelengths_nm, angles_deg)
        } else {
            None
        };
        match &four {
            Some(g) => f(&rows.with_four(g, self.anisotropic())),
            None => f(&rows),
        }
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
        let platelet = self.coating.as_ref().map(|c| {
            (
                "coating.platelet",
                c.platelet.as_slice(),
                c.disorder.as_ref(),
            )
        });
        for (key, items, disorder) in [("stack", self.stack.as_slice(), self.disorder.as_ref())]
            .into_iter()
            .chain(platelet)
        {
            let layers = stack::expanded_layers(items, disorder.is_some());
            if layers > MAX_EXPANDED_LAYERS {
                return Err(Error::invalid(
                    key,
                    format!("{layers} layers once expanded"),
                    format!(
                        "disorder or chirp_scale expand repeats layer by layer; keep it under {MAX_EXPANDED_LAYERS}"
                    ),
                ));
            }
            let realizations = disorder.map_or(1, |d| d.realizations as u64);
            let total = layers.saturating_mul(realizations);
            if total > MAX_ENSEMBLE_LAYERS {
                return Err(Error::invalid(
                    key,
                    format!("{layers} layers × {realizations} realizations"),
                    format!(
                        "the disorder ensemble would hold {total} layers; keep layers × realizations under {MAX_ENSEMBLE_LAYERS}"
                    ),
                ));
            }
        }
        Ok(())
    }
}

/// Refuses spectra holding a value that is not a finite number (R, T or a
/// Jones matrix), naming the first such point.
pub fn check_spectra(spectra: &Spectra) -> Result<()> {
    for (a, &angle) in spectra.angles_deg.iter().enumerate() {
        for (x, &w) in spectra.at_angle(a).iter().zip(&spectra.wavelengths_nm) {
            check_point(x, w, angle)?;
        }
    }
    check_jones(spectra)
}

/// Refuses Jones matrices holding a value that is not a finite number,
/// naming the first such point.
pub fn check_jones(spectra: &Spectra) -> Result<()> {
    let Some(jones) = &spectra.jones else {
        return Ok(());
    };
    let nw = spectra.wavelengths_nm.len();
    for (i, j) in jones.iter().enumerate() {
        if let Some(z) =
            j.r.iter()
                .chain(j.t.iter())
                .find(|z| !(z.re.is_finite() && z.im.is_finite()))
        {
            return Err(Error::not_computable(
                "Jones matrix",
                format!(
                    "{} nm, {}°",
                    spectra.wavelengths_nm[i % nw],
                    spectra.angles_deg[i / nw]
                ),
                if z.re.is_finite() { z.im } else { z.re },
            ));
        }
    }
    Ok(())
}

/// Refuses R or T that is not a finite number at one grid point, naming it.
pub fn check_point(x: &Rt, wavelength_nm: f64, angle_deg: f64) -> Result<()> {
    for (name, v) in [("R_s", x.rs), ("R_p", x.rp), ("T_s", x.ts), ("T_p", x.tp)] {
        if !v.is_finite() {
            return Err(Error::not_computable(
                name,
                format!("{wavelength_nm} nm, {angle_deg}°"),
                v,
            ));
        }
    }
    Ok(())
}

/// Checks a coating against the scene's grid: a lossless binder with n ≥ 1
/// and a background spectrum that covers the wavelengths.
fn check_coating(scene: &Scene, coating: &Coating, index: &[Vec<Complex64>]) -> Result<()> {
    let binder = &scene.media[coating.binder];
    if let Some((z, w)) = index[coating.binder]
        .iter()
        .zip(&scene.wavelengths_nm)
        .find(|(z, _)| z.im != 0.0 || z.re < 1.0)
    {
        return Err(Error::invalid(
            "coating.binder",
            &binder.name,
            format!("the binder must be lossless with n ≥ 1 (n = {z} at {w} nm)"),
        ));
    }
    coating.background.on(&scene.wavelengths_nm)?;
    Ok(())
}

/// A byte count in bytes, KiB, MiB, GiB or TiB.
fn bytes_text(bytes: u64) -> String {
    const UNITS: [&str; 5] = ["bytes", "KiB", "MiB", "GiB", "TiB"];
    let (mut value, mut unit) = (bytes as f64, 0);
    while value >= 1024.0 && unit + 1 < UNITS.len() {
        value /= 1024.0;
        unit += 1;
    }
    if unit == 0 {
        format!("{bytes} bytes")
    } else {
        format!("{value:.1} {}", UNITS[unit])
    }
}

/// A grid written as `{"from", "to", "step"}` or as a list of increasing values.
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

/// A complex index printed briefly: extreme parts in exponent form.
fn compact(n: Complex64) -> String {
    let part = |x: f64| {
        if x != 0.0 && !(1e-4..1e6).contains(&x.abs()) {
            format!("{x:e}")
        } else {
            format!("{x}")
        }
    };
    format!(
        "{}{}{}i",
        part(n.re),
        if n.im < 0.0 { "" } else { "+" },
        part(n.im)
    )
}
