//! `lamella chart`: one chart of a scene (or several scenes) as PNG or SVG.

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use lamella::angle_colour::{Polarization, Viewing};
use lamella::chart::{
    self, AbTravel, AngleStrip, BandsChart, Chromaticity, FieldChart, Format, ReflectanceMap,
    SpectraChart, ThicknessAngle, Variation,
};
use lamella::scene::Scene;

use lamella::optics::aniso::Handedness;

use super::choices::{HandednessChoice, PolarizationChoice};
use super::color::ViewArgs;
use super::design_args::Progress;
use super::{CliResult, Failure, film_scene, load_scene, write_out};

/// The kind of chart.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Kind {
    /// The colour at every angle as a continuous strip, with swatches and
    /// their values at chosen angles (--ticks).
    AngleStrip,
    /// The colour as a continuous field over one layer's thickness
    /// (--layer, --thickness-range) or a scale on all thicknesses
    /// (--scale-range) (across) and angle (up), with the design marked and
    /// out-of-gamut regions hatched.
    ThicknessAngle,
    /// R (and with --transmittance T) against wavelength at --angles, for
    /// the polarizations in --curves.
    Spectra,
    /// Heat map of reflectance (or transmittance with --side transmit) over
    /// wavelength and angle, with a colour bar.
    Map,
    /// The angle trajectory on the CIE xy chromaticity diagram.
    Chromaticity,
    /// The angle trajectory on the CIELAB a*b* plane, with L* against angle.
    AbTravel,
    /// |E|² against depth through the stack over shaded bands for its
    /// media, at --wavelength, --angle and --polarization (s or p).
    Field,
    /// The stop bands of the first repeat group's period over wavelength
    /// and angle, for s and p (with --with-reflectance beside the whole
    /// stack's reflectance map).
    Bands,
}

impl Kind {
    /// Whether the kind can compare several scenes.
    fn compares(self) -> bool {
        matches!(self, Kind::Spectra | Kind::Chromaticity | Kind::AbTravel)
    }
}

/// Flags of `lamella chart` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// Scene files (JSON). Several only for spectra, chromaticity and ab-travel.
    #[arg(required_unless_present = "scene")]
    pub scenes: Vec<PathBuf>,
    /// Another scene to compare (repeatable); adds to the positional ones.
    #[arg(long = "scene")]
    pub scene: Vec<PathBuf>,
    /// What to draw.
    #[arg(long, value_enum)]
    pub kind: Kind,
    /// Output file; the format follows its extension (.png or .svg).
    #[arg(short = 'o', long = "output")]
    pub output: PathBuf,
    /// Image size in pixels, WIDTHxHEIGHT.
    #[arg(long, default_value = "1200x800", value_parser = parse_size)]
    pub size: (u32, u32),
    #[command(flatten)]
    pub view: ViewArgs,
    /// angle-strip: angles (degrees) that get a swatch with its values,
    /// e.g. 0,20,40,60 (default: a round step, at most nine).
    #[arg(long, value_delimiter = ',')]
    pub ticks: Option<Vec<f64>>,
    /// spectra: angles of incidence in degrees.
    #[arg(long, value_delimiter = ',', default_value = "0,30,60")]
    pub angles: Vec<f64>,
    /// spectra: polarizations drawn (unpolarized solid, s dashed, p dotted,
    /// left-circular long dashes, right-circular short dashes; default
    /// unpolarized,s,p, or unpolarized,left,right for a scene whose left
    /// and right differ).
    #[arg(long, value_enum, value_delimiter = ',')]
    pub curves: Option<Vec<PolarizationChoice>>,
    /// Unpolarized light, seen through an ideal circular analyser passing
    /// this handedness (angle-strip, thickness-angle, map, chromaticity,
    /// ab-travel). Without it and without --polarization, a scene whose
    /// left and right differ is shown unpolarized and through a left and a
    /// right analyser side by side.
    #[arg(long, value_enum)]
    pub analyzer: Option<HandednessChoice>,
    /// spectra: also draw transmittance, in a second panel.
    #[arg(long)]
    pub transmittance: bool,
    /// thickness-angle: vary the thickness of this layer. Layers are numbered
    /// from 1 in the order they appear in the scene's stack, depth first (a
    /// repeat group's layers are counted once, and changing one changes it in
    /// every period).
    #[arg(long, conflicts_with = "scale_range")]
    pub layer: Option<usize>,
    /// thickness-angle: thickness range of --layer in nm, FROM,TO
    /// (default: 50 % to 150 % of the design thickness).
    #[arg(long, value_name = "FROM,TO", value_parser = parse_pair, requires = "layer")]
    pub thickness_range: Option<(f64, f64)>,
    /// thickness-angle: scale all thicknesses (and helix pitches) together over FROM,TO
    /// (the default when --layer is not given: 0.8,1.2).
    #[arg(long, value_name = "FROM,TO", value_parser = parse_pair)]
    pub scale_range: Option<(f64, f64)>,
    /// field: the vacuum wavelength in nm.
    #[arg(long)]
    pub wavelength: Option<f64>,
    /// field: the angle of incidence in degrees.
    #[arg(long, default_value_t = 0.0)]
    pub angle: f64,
    /// bands: also draw the whole stack's reflectance map (transmittance
    /// with --side transmit; --polarization applies), with the stop-band
    /// edges marked on it.
    #[arg(long)]
    pub with_reflectance: bool,
    /// thickness-angle: number of thickness samples (2–200); the field is
    /// interpolated between them, and the design value is always one.
    /// (Default 61, or 15 for a scene with anisotropic layers, whose
    /// every sample is a 4×4 computation.)
    #[arg(long)]
    pub steps: Option<usize>,
}

/// A chart size `WxH` within the chart limits (a clap value parser).
pub fn parse_size(s: &str) -> Result<(u32, u32), String> {
    lamella::raster::parse_size(s, chart::SIZE_LIMITS).map_err(|e| e.to_string())
}

fn parse_pair(s: &str) -> Result<(f64, f64), String> {
    let bad = || format!("{s}: expected FROM,TO, e.g. 0.8,1.2");
    let (a, b) = s.split_once(',').ok_or_else(bad)?;
    let p = |v: &str| {
        v.trim()
            .parse::<f64>()
            .ok()
            .filter(|v| v.is_finite())
            .ok_or_else(bad)
    };
    Ok((p(a)?, p(b)?))
}

/// The output format from a file name.
pub fn format_of(path: &Path) -> Result<Format, Failure> {
    let ext = path.extension().and_then(|e| e.to_str()).unwrap_or("");
    Format::from_extension(ext).map_err(|e| Failure::input(format!("{}: {e}", path.display())))
}

/// Refuses a scene the charts cannot draw (no film, a grid too large to
/// hold).
pub fn chartable(path: &Path, scene: &Scene) -> Result<(), Failure> {
    film_scene(path, scene, "chart")
}

/// Loads scenes with their viewings; several scenes must share light and observer.
pub fn load_all(
    paths: &[PathBuf],
    view: &ViewArgs,
    analyzer: Option<Handedness>,
) -> Result<Vec<(Scene, Viewing)>, Failure> {
    let mut out: Vec<(Scene, Viewing)> = Vec::new();
    for p in paths {
        let scene = load_scene(p)?;
        chartable(p, &scene)?;
        let viewing = view.viewing_through(&scene, p, analyzer)?;
        if let Some((_, first)) = out.first()
            && (first.illuminant.name() != viewing.illuminant.name()
                || first.observer != viewing.observer)
        {
            return Err(Failure::input(format!(
                "{}: the scenes are seen under different lights or observers ({} {}, {} {}); \
                 pass --illuminant and --observer to compare them under one",
                p.display(),
                first.illuminant.name(),
                first.observer,
                viewing.illuminant.name(),
                viewing.observer
            )));
        }
        out.push((scene, viewing));
    }
    Ok(out)
}

fn polarizations(choices: &[PolarizationChoice]) -> Vec<Polarization> {
    let mut out: Vec<Polarization> = Vec::new();
    for &c in choices {
        let p = c.into();
        if !out.contains(&p) {
            out.push(p);
        }
    }
    out
}

/// Runs the command.
pub fn run(args: &Args) -> CliResult {
    let format = format_of(&args.output)?;
    let paths: Vec<PathBuf> = args.scenes.iter().chain(&args.scene).cloned().collect();
    if paths.len() > 1 && !args.kind.compares() {
        return Err(Failure::input(
            "only spectra, chromaticity and ab-travel compare several scenes; give one scene",
        ));
    }
    if let (Some(h), Kind::Spectra | Kind::Field | Kind::Bands) = (args.analyzer, args.kind) {
        return Err(Failure::input(format!(
            "--analyzer {}: chart --kind {} does not take a viewing; the analyser applies to \
             angle-strip, thickness-angle, map, chromaticity and ab-travel",
            clap::ValueEnum::to_possible_value(&h).map_or("?".into(), |v| v.get_name().to_owned()),
            clap::ValueEnum::to_possible_value(&args.kind)
                .map_or("?".into(), |v| v.get_name().to_owned()),
        )));
    }
    let scenes = load_all(&paths, &args.view, args.analyzer.map(Into::into))?;
    let pairs: Vec<(&Scene, &Viewing)> = scenes.iter().map(|(s, v)| (s, v)).collect();
    let at = |e| Failure::scene(&paths[0], e);
    let (scene, viewing) = pairs[0];
    let bytes = match args.kind {
        Kind::AngleStrip => {
            let c = AngleStrip::compute(scene, viewing, args.ticks.as_deref()).map_err(at)?;
            chart::render(&c, args.size, format)
        }
        Kind::ThicknessAngle => {
            let variation = variation(args);
            let steps = args
                .steps
                .unwrap_or_else(|| ThicknessAngle::default_steps(scene));
            let bar = Progress::new(steps as u64, "thickness samples");
            let done = AtomicU64::new(0);
            let c = ThicknessAngle::compute(scene, viewing, &variation, steps, &|| {
                bar.set(done.fetch_add(1, Ordering::Relaxed) + 1, String::new())
            })
            .map_err(at)?;
            bar.finish();
            chart::render(&c, args.size, format)
        }
        Kind::Spectra => {
            let c = SpectraChart::compute(
                &pairs,
                &args.angles,
                args.curves.as_deref().map(polarizations).as_deref(),
                args.transmittance,
            )
            .map_err(at)?;
            chart::render(&c, args.size, format)
        }
        Kind::Map => {
            let c = ReflectanceMap::compute(scene, viewing).map_err(at)?;
            chart::render(&c, args.size, format)
        }
        Kind::Chromaticity => {
            let c = Chromaticity::compute(&pairs).map_err(at)?;
            chart::render(&c, args.size, format)
        }
        Kind::AbTravel => {
            let c = AbTravel::compute(&pairs).map_err(at)?;
            chart::render(&c, args.size, format)
        }
        Kind::Field => {
            let wavelength = args.wavelength.ok_or_else(|| {
                Failure::input("chart --kind field needs --wavelength NM (and --angle, --polarization s or p)")
            })?;
            let pol = match args.view.polarization {
                PolarizationChoice::S => 0,
                PolarizationChoice::P => 1,
                other => {
                    return Err(Failure::input(format!(
                        "--polarization = {}: chart --kind field follows one linear wave; give --polarization s or p",
                        clap::ValueEnum::to_possible_value(&other).map_or("?".into(), |v| v.get_name().to_owned())
                    )));
                }
            };
            let c = FieldChart::compute(scene, wavelength, args.angle, pol).map_err(at)?;
            chart::render(&c, args.size, format)
        }
        Kind::Bands => {
            let c = BandsChart::compute(scene, args.with_reflectance.then_some(viewing))
                .map_err(at)?;
            chart::render(&c, args.size, format)
        }
    }
    .map_err(at)?;
    write_out(Some(&args.output), &[bytes])
}

/// The thickness variation the flags ask for.
fn variation(args: &Args) -> Variation {
    match (args.layer, args.scale_range) {
        (Some(layer), _) => Variation::Layer {
            layer,
            range_nm: args.thickness_range,
        },
        (None, Some((from, to))) => Variation::Scale { from, to },
        (None, None) => Variation::Scale { from: 0.8, to: 1.2 },
    }
}
