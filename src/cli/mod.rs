//! The command-line front end: argument definitions and glue.

pub mod args;
pub mod bands;
pub mod chart;
pub mod choices;
pub mod coating_report;
pub mod color;
pub mod compare;
pub mod design_args;
pub mod field;
pub mod fit;
pub mod help;
pub mod matching;
pub mod materials;
pub mod measured;
pub mod multiangle;
pub mod output;
pub mod render;
pub mod report;
pub mod serve;
pub mod spectrum;
pub mod sweep;
pub mod tolerance;

use std::path::{Path, PathBuf};

use lamella::scene::{GRID_BYTES_PER_POINT, Scene, WarningKind};

/// Output format of commands that write a table of numbers (`field`, `bands`).
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum DataFormat {
    /// Comma-separated rows with a header.
    Csv,
    /// Arrays under named keys.
    Json,
}

/// Output format of commands that print one record per angle or geometry.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum RecordFormat {
    /// JSON: the records with their keys.
    Json,
    /// One row per record.
    Csv,
    /// A readable table with a colour swatch per row on a true-colour terminal.
    Table,
    /// CGATS.17 text: XYZ and CIELAB per angle or geometry.
    Cgats,
}

/// Colours per angle or geometry as CGATS text, stamped with this run's date.
pub fn cgats_colours(
    title: &str,
    viewing: &lamella::angle_colour::Viewing,
    points: &[(lamella::design::coating::At, &lamella::colorimetry::Colour)],
) -> String {
    let created = report::Provenance::of_this_run().date;
    let light = (viewing.illuminant.name(), viewing.observer.name());
    lamella::measured::cgats::colour_document(title, &created, light, points).write()
}

/// A true-colour terminal swatch of an encoded sRGB colour (0–1 per channel).
pub fn swatch(rgb: [f64; 3]) -> String {
    let [r, g, b] = rgb.map(|x| (x * 255.0).round() as u8);
    format!("\x1b[48;2;{r};{g};{b}m        \x1b[0m")
}

/// A failure with the exit code it maps to.
#[derive(Debug)]
pub struct Failure {
    /// One line for stderr.
    pub message: String,
    /// 2 for bad input, 1 for anything else.
    pub code: u8,
}

impl Failure {
    /// Bad input (exit code 2).
    pub fn input(message: impl Into<String>) -> Self {
        Failure {
            message: lamella::error::one_line(&message.into()).into_owned(),
            code: 2,
        }
    }

    /// An engine error about the scene at `path`: exit code 1 for a value
    /// that cannot be computed, 2 (bad input) for anything else.
    pub fn scene(path: &Path, e: lamella::Error) -> Self {
        Failure {
            code: match e {
                lamella::Error::NotComputable { .. } => 1,
                _ => 2,
            },
            message: format!("{}: {e}", path.display()),
        }
    }

    /// An I/O failure writing output (exit code 1).
    pub fn io(path: &Path, e: std::io::Error) -> Self {
        Failure {
            message: lamella::error::one_line(&format!("{}: cannot write: {e}", path.display()))
                .into_owned(),
            code: 1,
        }
    }
}

/// Result of a command.
pub type CliResult = Result<(), Failure>;

/// Reads and validates a scene file for a command that computes colour;
/// table paths are relative to it. Its warnings go to stderr.
pub fn load_scene(path: &Path) -> Result<Scene, Failure> {
    load(path, true)
}

/// Reads and validates a scene file for a command that computes spectra
/// only: warnings that concern colour alone are not shown.
pub fn load_spectral_scene(path: &Path) -> Result<Scene, Failure> {
    load(path, false)
}

fn load(path: &Path, colour: bool) -> Result<Scene, Failure> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Failure::input(format!("{}: cannot read scene: {e}", path.display())))?;
    let base: PathBuf = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let load = |rel: &str| {
        std::fs::read_to_string(base.join(rel))
            .map_err(|e| format!("cannot read {}: {e}", base.join(rel).display()))
    };
    let scene = Scene::from_json(&text, &load)
        .map_err(|e| Failure::input(format!("{}: {e}", path.display())))?;
    for w in &scene.warnings {
        if colour || w.kind != WarningKind::CoarseStep {
            eprintln!("lamella: warning: {}: {w}", path.display());
        }
    }
    Ok(scene)
}

/// Refuses a coating-only scene and a grid too large to hold, before any work.
pub fn film_scene(path: &Path, scene: &Scene, what: &str) -> Result<(), Failure> {
    scene
        .require_film()
        .and_then(|()| scene.check_grid_size(scene.angles_deg.len(), GRID_BYTES_PER_POINT, what))
        .map_err(|e| Failure::scene(path, e))
}

/// Writes output, mapping failures to exit code 1.
pub fn write_out(path: Option<&Path>, chunks: &[Vec<u8>]) -> CliResult {
    output::emit(path, chunks).map_err(|e| Failure::io(path.unwrap_or(Path::new("<stdout>")), e))
}
