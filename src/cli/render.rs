//! `lamella render`: a preview image of an object wearing the scene's coating.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use indicatif::{ProgressBar, ProgressStyle};
use lamella::render::{
    Base, Light, Mesh, Preview, SIZE_LIMITS, Settings, Shape, builtin_mesh, parse_tone,
};
use lamella::scene::Scene;

use super::{CliResult, Failure, load_scene, write_out};

/// Flags of `lamella render` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct RenderArgs {
    /// Scene file (JSON); its optional `preview` object holds defaults for
    /// every flag below (keys shape, size, ssaa, exposure, tone,
    /// roughness_deg, base, lights, orbit_deg, elevation_deg, fov_deg,
    /// distance, turntable). A scene with a `coating` section is shaded with
    /// its platelet model (the colour `multiangle` reports, for every pair of
    /// light and view directions) over the coating's own background, plus
    /// the binder surface's gloss.
    pub scene: PathBuf,
    /// Output PNG file. With --turntable N, frames go to FILE-000.png,
    /// FILE-001.png, …
    #[arg(short = 'o', long = "output")]
    pub output: PathBuf,
    /// Object: sphere, cylinder, torus, bottle, sheet, or mesh:PATH for a
    /// Wavefront OBJ file (a path in the scene's preview is relative to the scene).
    /// [default: sphere]
    #[arg(long)]
    pub shape: Option<String>,
    /// Image size WxH in pixels. [default: 800x800]
    #[arg(long)]
    pub size: Option<String>,
    /// Supersampling: N×N samples per pixel, 1–8. [default: 2]
    #[arg(long)]
    pub ssaa: Option<u32>,
    /// Linear brightness scale before the tone curve. [default: 1]
    #[arg(long)]
    pub exposure: Option<f64>,
    /// Highlight tone curve (a hue-keeping shoulder above linear 0.6): on or
    /// off; off clips at 1. [default: on]
    #[arg(long)]
    pub tone: Option<String>,
    /// Width of the facet orientation distribution in degrees (surface
    /// roughness); 0 is a mirror-smooth film, up to 60. For a coating it
    /// roughens only the binder surface's gloss: the platelets' spread is the
    /// coating's tilt_sigma_deg. [default: 0]
    #[arg(long = "roughness")]
    pub roughness_deg: Option<f64>,
    /// What lies under the film, lit by the light the film transmits: black,
    /// white or #RRGGBB (sRGB, a diffuse colour); not used for a coating,
    /// whose own `background` is in its model. [default: black]
    #[arg(long)]
    pub base: Option<String>,
    /// A light, repeatable; replaces the preview's lights. `sky[,intensity=X][,illuminant=NAME]`
    /// for a uniform sky, `area,azimuth_deg=A,elevation_deg=E,size_deg=S[,intensity=X][,illuminant=NAME]`
    /// for a disc (angles relative to the line of sight, seen from the
    /// object; size its angular diameter), or `directional,azimuth_deg=A,elevation_deg=E[,…]`.
    /// Intensity 1 lights a white diffuser facing the light to white; the
    /// illuminant is a built-in name (default: the scene's).
    /// [default: sky,intensity=0.6 and area,azimuth_deg=-35,elevation_deg=30,size_deg=24,intensity=1.2]
    #[arg(long = "light")]
    pub lights: Vec<String>,
    /// Camera azimuth about the vertical axis in degrees. [default: 0]
    #[arg(long = "orbit", allow_negative_numbers = true)]
    pub orbit_deg: Option<f64>,
    /// Camera elevation above the horizon in degrees (±89). [default: 20]
    #[arg(long = "elevation", allow_negative_numbers = true)]
    pub elevation_deg: Option<f64>,
    /// Field of view across the shorter image side in degrees. [default: 30]
    #[arg(long = "fov")]
    pub fov_deg: Option<f64>,
    /// Camera distance from the object's centre in object radii (the object
    /// is scaled to a bounding sphere of radius 1). [default: frames the object]
    #[arg(long)]
    pub distance: Option<f64>,
    /// Write N frames of a full turn of the object (camera and lights fixed), 1–3600.
    #[arg(long, value_parser = clap::value_parser!(u32).range(1..=3600))]
    pub turntable: Option<u32>,
}

impl RenderArgs {
    /// The scene's preview settings with these flags applied.
    fn settings(&self, scene: &Scene) -> Result<Settings, String> {
        let mut s = scene.preview.clone().unwrap_or_default();
        let flag = |name: &str, e: lamella::Error| format!("--{name}: {e}");
        if let Some(t) = &self.shape {
            s.shape = t.parse().map_err(|e| flag("shape", e))?;
        }
        if let Some(t) = &self.size {
            (s.width, s.height) =
                lamella::raster::parse_size(t, SIZE_LIMITS).map_err(|e| flag("size", e))?;
        }
        if let Some(t) = &self.tone {
            s.tone = parse_tone(t).map_err(|e| flag("tone", e))?;
        }
        if let Some(t) = &self.base {
            s.base = t.parse::<Base>().map_err(|e| flag("base", e))?;
        }
        if !self.lights.is_empty() {
            s.lights = self
                .lights
                .iter()
                .map(|l| l.parse::<Light>().map_err(|e| flag("light", e)))
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
        s.check().map_err(|e| e.to_string())?;
        Ok(s)
    }
}

/// Runs the command.
pub fn run(args: &RenderArgs) -> CliResult {
    let scene = load_scene(&args.scene)?;
    scene
        .require_isotropic("`lamella render`")
        .map_err(|e| Failure::scene(&args.scene, e))?;
    let at_scene = |e: String| Failure::input(format!("{}: {e}", args.scene.display()));
    let settings = args.settings(&scene).map_err(at_scene)?;
    let mesh = match (builtin_mesh(&settings.shape), &settings.shape) {
        (Some(m), _) => m,
        // The scene's own mesh was read with the scene.
        (None, Shape::Mesh(_)) if args.shape.is_none() => {
            scene.preview_mesh.clone().expect("read with the preview")
        }
        (None, Shape::Mesh(path)) => {
            let bytes = std::fs::read(path)
                .map_err(|e| Failure::input(format!("{path}: cannot read mesh: {e}")))?;
            Mesh::from_obj(path, &bytes).map_err(|e| Failure::input(format!("{path}: {e}")))?
        }
        (None, _) => unreachable!("every other shape is built in"),
    };
    let preview =
        Preview::new(&scene, &mesh, &settings).map_err(|e| Failure::scene(&args.scene, e))?;
    let frames = preview.frames();
    let bar = if std::io::stderr().is_terminal() && settings.width * settings.height >= 250_000 {
        ProgressBar::new(settings.height as u64 * frames as u64)
    } else {
        ProgressBar::hidden()
    };
    bar.set_style(
        ProgressStyle::with_template("rendering {bar:40} {percent:>3}% {elapsed} (eta {eta})")
            .expect("template is valid"),
    );
    for index in 0..frames {
        let image = preview.render(index, &|rows| bar.inc(rows as u64));
        let path = if settings.turntable > 0 {
            frame_path(&args.output, index)
        } else {
            args.output.clone()
        };
        let png =
            lamella::raster::png((image.width, image.height), &image.rgb).ok_or_else(|| {
                Failure::io(
                    &path,
                    std::io::Error::other("the image could not be encoded"),
                )
            })?;
        write_out(Some(&path), &[png])?;
    }
    bar.finish_and_clear();
    Ok(())
}

/// `dir/name.png` → `dir/name-007.png`.
fn frame_path(output: &Path, index: u32) -> PathBuf {
    let stem = output.file_stem().unwrap_or_default().to_string_lossy();
    let ext = output
        .extension()
        .map_or("png".into(), |e| e.to_string_lossy());
    output.with_file_name(format!("{stem}-{index:03}.{ext}"))
}
