//! The command line: arguments of every subcommand and the dispatch to them.

use std::path::PathBuf;

use clap::{Parser, Subcommand};

use crate::cli;
use crate::cli::CliResult;

/// Structural colour design: thin-film spectra, colour and design tools.
#[derive(Parser)]
#[command(name = "lamella", version, about, long_about = None)]
pub struct Args {
    /// The subcommand and its arguments.
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Subcommand)]
// Each subcommand's arguments are defined only when it is the one invoked.
#[command(defer = true)]
pub enum Command {
    /// Reflectance, transmittance and absorptance per polarization for every
    /// angle and wavelength of a scene.
    Spectrum {
        /// Scene file (JSON).
        scene: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value = "csv")]
        format: cli::spectrum::Format,
        /// Write to this file (atomically) instead of stdout.
        #[arg(short = 'o', long = "output")]
        output: Option<PathBuf>,
    },
    /// CIE XYZ, xy, CIELAB, LCh, sRGB and hex at every angle of a scene, with
    /// the colour travel between angles.
    Color {
        /// Scene file (JSON).
        scene: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: cli::RecordFormat,
        #[command(flatten)]
        view: cli::color::ViewArgs,
        /// Also give Display P3 values (`display_p3`, `display_p3_hex`,
        /// `display_p3_in_gamut`) beside sRGB.
        #[arg(long)]
        display_p3: bool,
        /// Write to this file (atomically) instead of stdout.
        #[arg(short = 'o', long = "output")]
        output: Option<PathBuf>,
    },
    /// Colour of an effect-pigment coating at the multi-angle geometries
    /// (45as15 …), with the flop index and hue travel.
    ///
    /// The scene's `coating` holds platelets in a binder over a background;
    /// `45as15` is illumination at 45° and detection 15° from the specular
    /// direction toward the normal. Per geometry: reflectance factor, XYZ,
    /// CIELAB, C*, h, sRGB, hex and gamut.
    #[command(after_help = cli::multiangle::HELP)]
    Multiangle {
        /// Scene file (JSON) with a `coating` section.
        scene: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: cli::RecordFormat,
        #[command(flatten)]
        args: cli::multiangle::Args,
        /// Write to this file (atomically) instead of stdout.
        #[arg(short = 'o', long = "output")]
        output: Option<PathBuf>,
    },
    /// Optimise the `vary_nm` thicknesses toward a target colour (ΔE00) at
    /// one or more angles; writes the optimised scene and a JSON report.
    Match(Box<cli::matching::MatchArgs>),
    /// Monte Carlo tolerance of a design: ΔE00 percentiles, yield and the
    /// layers the colour is most sensitive to.
    Tolerance(Box<cli::tolerance::ToleranceArgs>),
    /// Fit the `vary_nm` thicknesses to a measured reflectance spectrum.
    Fit(Box<cli::fit::FitArgs>),
    /// Evaluate many designs over the `vary_nm` ranges as JSON lines.
    Sweep(Box<cli::sweep::SweepArgs>),
    /// A preview image of an object (sphere, cylinder, torus, bottle, wavy
    /// sheet or OBJ mesh) wearing the coating, shaded from the real spectra.
    Render(cli::render::RenderArgs),
    /// List the built-in materials: model, valid range, n and k at 550 nm, source.
    Materials,
    /// Draw a chart of colour against angle as PNG or SVG (format from the
    /// -o extension).
    Chart(cli::chart::Args),
    /// Write every chart of a scene and an HTML report into a folder.
    Report(cli::report::Args),
}

/// Runs the subcommand.
pub fn run(args: Args) -> CliResult {
    match args.command {
        Command::Spectrum {
            scene,
            format,
            output,
        } => cli::spectrum::run(&scene, format, output.as_deref()),
        Command::Color {
            scene,
            format,
            view,
            display_p3,
            output,
        } => cli::color::run(&scene, format, &view, display_p3, output.as_ref()),
        Command::Multiangle {
            scene,
            format,
            args,
            output,
        } => cli::multiangle::run(&scene, format, &args, output.as_ref()),
        Command::Match(a) => cli::matching::run(&a),
        Command::Tolerance(a) => cli::tolerance::run(&a),
        Command::Fit(a) => cli::fit::run(&a),
        Command::Sweep(a) => cli::sweep::run(&a),
        Command::Render(args) => cli::render::run(&args),
        Command::Materials => cli::materials::run(),
        Command::Chart(a) => cli::chart::run(&a),
        Command::Report(a) => cli::report::run(&a),
    }
}
