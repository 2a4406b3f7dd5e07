//! `lamella`: the command-line front end of the structural-colour engine.

mod cli;

use std::path::PathBuf;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

/// Structural colour design: thin-film spectra, colour and design tools.
#[derive(Parser)]
#[command(name = "lamella", version, about, long_about = None)]
struct Args {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
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
        format: cli::color::Format,
        #[command(flatten)]
        view: cli::color::ViewArgs,
        /// Write to this file (atomically) instead of stdout.
        #[arg(short = 'o', long = "output")]
        output: Option<PathBuf>,
    },
    /// List the built-in materials: model, valid range, n and k at 550 nm, source.
    Materials,
    /// Draw a chart of colour against angle as PNG or SVG (format from the
    /// -o extension).
    Chart(cli::chart::Args),
    /// Write every chart of a scene and an HTML report into a folder.
    Report(cli::report::Args),
}

fn main() -> ExitCode {
    let args = match Args::try_parse() {
        Ok(a) => a,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    let result = match args.command {
        Command::Spectrum {
            scene,
            format,
            output,
        } => cli::spectrum::run(&scene, format, output.as_deref()),
        Command::Color {
            scene,
            format,
            view,
            output,
        } => cli::color::run(&scene, format, &view, output.as_ref()),
        Command::Materials => cli::materials::run(),
        Command::Chart(a) => cli::chart::run(&a),
        Command::Report(a) => cli::report::run(&a),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("lamella: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}
