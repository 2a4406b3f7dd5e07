//! `lamella field`: |E|² against depth through the stack at one wavelength,
//! angle and polarization.

use std::path::{Path, PathBuf};

use lamella::design::variables::every_layer;
use lamella::optics::FieldPoint;
use lamella::scene::{FIELD_POINTS, Scene, Substrate};
use serde_json::{Value, json};

use super::DataFormat;
use super::choices::WaveChoice;
use super::{CliResult, Failure, load_spectral_scene, write_out};

/// Flags of `lamella field` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// Scene file (JSON) with a film `stack` on a substrate material.
    pub scene: PathBuf,
    /// Vacuum wavelength in nm.
    #[arg(long)]
    pub wavelength: f64,
    /// Angle of incidence in degrees (below 90).
    #[arg(long, default_value_t = 0.0)]
    pub angle: f64,
    /// Polarization of the incident wave.
    #[arg(long, value_enum, default_value = "s")]
    pub polarization: WaveChoice,
    /// Depths sampled evenly over the stack and a margin of the incident
    /// and exit media (2–1000000); both sides of every interface are added.
    #[arg(long, default_value_t = FIELD_POINTS)]
    pub points: usize,
    /// Output format.
    #[arg(long, value_enum, default_value = "csv")]
    pub format: DataFormat,
    /// Write to this file (atomically) instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
}

/// The field profile asked for.
pub fn profile(
    path: &Path,
    scene: &Scene,
    wavelength_nm: f64,
    angle_deg: f64,
    pol: WaveChoice,
    points: usize,
) -> Result<Vec<FieldPoint>, Failure> {
    scene
        .field_profile(wavelength_nm, angle_deg, pol.index(), points)
        .map_err(|e| Failure::scene(path, e))
}

/// Runs the command.
pub fn run(args: &Args) -> CliResult {
    let scene = load_spectral_scene(&args.scene)?;
    let field = profile(
        &args.scene,
        &scene,
        args.wavelength,
        args.angle,
        args.polarization,
        args.points,
    )?;
    let text = match args.format {
        DataFormat::Csv => csv(&field),
        DataFormat::Json => json(&scene, args, &field),
    };
    write_out(args.output.as_deref(), &[text.into_bytes()])
}

/// `z_nm,layer,E2` rows, numbers in shortest round-trip form.
fn csv(field: &[FieldPoint]) -> String {
    let mut out = String::from("z_nm,layer,E2\n");
    let mut num = zmij::Buffer::new();
    for p in field {
        out.push_str(num.format(p.z_nm));
        out.push(',');
        out.push_str(&p.layer.to_string());
        out.push(',');
        out.push_str(num.format(p.e2));
        out.push('\n');
    }
    out
}

/// The profile as arrays, with the point it was computed at and the media
/// and layers the layer numbers refer to.
fn json(scene: &Scene, args: &Args, field: &[FieldPoint]) -> String {
    let layers: Vec<Value> = every_layer(scene, &scene.stack)
        .iter()
        .enumerate()
        .map(|(i, l)| {
            json!({"layer": i + 1, "pointer": l.pointer, "material": l.material, "thickness_nm": l.nominal_nm})
        })
        .collect();
    let substrate = match scene.substrate {
        Substrate::Medium(m) | Substrate::Sheet { medium: m, .. } => &scene.media[m].name,
    };
    let doc = json!({
        "title": scene.title,
        "wavelength_nm": args.wavelength,
        "angle_deg": args.angle,
        "polarization": args.polarization.name(),
        "incident": scene.media[scene.incident].name,
        "substrate": substrate,
        "layers": layers,
        "z_nm": field.iter().map(|p| p.z_nm).collect::<Vec<_>>(),
        "layer": field.iter().map(|p| p.layer).collect::<Vec<_>>(),
        "E2": field.iter().map(|p| p.e2).collect::<Vec<_>>(),
    });
    serde_json::to_string(&doc).expect("finite numbers serialise")
}
