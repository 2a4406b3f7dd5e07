//! `lamella render`: a preview image of an object wearing the scene's coating.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use indicatif::{ProgressBar, ProgressStyle};
use std::sync::Arc;

use lamella::colorimetry::Illuminant;
use lamella::render::{
    EnvImage, Environment, Mesh, Overrides, Preview, Settings, Shape, builtin_environment,
    builtin_mesh,
};
use lamella::scene::Scene;

use super::{CliResult, Failure, load_scene, write_out};

/// Flags of `lamella render` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct RenderArgs {
    /// Scene file (JSON); its optional `preview` object holds defaults for
    /// every flag below (keys shape, size, ssaa, exposure, tone,
    /// roughness_deg, base, lights, orbit_deg, elevation_deg, fov_deg,
    /// distance, turntable, environment (a built-in name), view, floor,
    /// shadow, analyzer, caption, orbit_elevation_deg as [FROM, TO]).
    /// Anisotropic and chiral scenes render too (their tables at the
    /// scene's azimuth 0). A scene with a `coating` section is shaded with
    /// its platelet model (the colour `multiangle` reports, for every pair of
    /// light and view directions) over the coating's own background, plus
    /// the binder surface's gloss.
    pub scene: PathBuf,
    /// Output PNG file. With --turntable N it is an animated PNG of the
    /// turn (15 frames per second, looping), and the frames also go to
    /// FILE-000.png, FILE-001.png, …
    #[arg(short = 'o', long = "output")]
    pub output: PathBuf,
    /// Object: sphere, cylinder, torus, bottle, sheet, pane (a flat square
    /// facing the camera at orbit 0), or mesh:PATH for a
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
    /// Write N frames of a full turn of the object (camera, lights and
    /// environment fixed), 1–3600, as an animated PNG and numbered frames.
    #[arg(long, value_parser = clap::value_parser!(u32).range(1..=3600))]
    pub turntable: Option<u32>,
    /// With --turntable: sweep the camera elevation from FROM to TO degrees
    /// and back over the turn (e.g. 10:45), to show the colour travel.
    #[arg(long = "orbit-elevation", allow_hyphen_values = true)]
    pub orbit_elevation: Option<String>,
    /// Image-based lighting: a built-in environment, studio (softboxes over
    /// a floor, in the scene's illuminant, with a rim strip of illuminant
    /// A), booth (grey walls under a ceiling diffuser), overcast (CIE
    /// overcast sky in D65), lighttable (a backlit panel behind the object)
    /// or uniform, each as NAME[,intensity=X][,illuminant=NAME]; or an
    /// equirectangular Radiance .hdr file (centre column behind the object,
    /// top row up). Given without --light it replaces the preview's lights;
    /// lights given with it are added.
    #[arg(long)]
    pub environment: Option<String>,
    /// The built-in illuminant that an environment image's RGB (1, 1, 1)
    /// stands for (its white balance); its R, G, B are read as weights of
    /// that light's spectrum cut at 490 and 580 nm. [default: D65]
    #[arg(long = "environment-white")]
    pub environment_white: Option<String>,
    /// The film's light shown: reflect, transmit (the light from behind that
    /// the film passes; the object is clear, with no base) or both.
    /// [default: reflect]
    #[arg(long)]
    pub view: Option<String>,
    /// A matte neutral floor under the object with this reflectance (0–1),
    /// or off; needs an environment. [default: off]
    #[arg(long)]
    pub floor: Option<String>,
    /// The object's soft contact shadow on the floor: on or off. [default: on]
    #[arg(long)]
    pub shadow: Option<String>,
    /// Look through an ideal circular analyser (circular-polarizer
    /// glasses): left or right; needs a coherent stack (no incoherent
    /// layer, substrate sheet or disorder).
    #[arg(long)]
    pub analyzer: Option<String>,
    /// A caption strip under the image: scene title, environment,
    /// illuminant, observer and lamella version. `--caption` alone is on.
    #[arg(long, num_args = 0..=1, default_missing_value = "on")]
    pub caption: Option<String>,
}

impl RenderArgs {
    /// The flags as overrides of the scene's preview (an environment file
    /// is read here).
    fn overrides(&self) -> Result<Overrides, Failure> {
        let environment = match &self.environment {
            None => None,
            Some(text) => Some(match builtin_environment(text) {
                Some(e) => e.map_err(|e| Failure::input(format!("--environment: {e}")))?,
                None => Environment::Image(Arc::new(read_hdr(
                    Path::new(text),
                    self.environment_white.as_deref().unwrap_or("D65"),
                )?)),
            }),
        };
        if self.environment_white.is_some() && !matches!(environment, Some(Environment::Image(_))) {
            return Err(Failure::input(
                "--environment-white: states the white of an environment image; give --environment FILE.hdr",
            ));
        }
        Ok(Overrides {
            shape: self.shape.clone(),
            size: self.size.clone(),
            ssaa: self.ssaa,
            exposure: self.exposure,
            tone: self.tone.clone(),
            roughness_deg: self.roughness_deg,
            base: self.base.clone(),
            lights: (!self.lights.is_empty()).then(|| self.lights.clone()),
            orbit_deg: self.orbit_deg,
            elevation_deg: self.elevation_deg,
            fov_deg: self.fov_deg,
            distance: self.distance,
            turntable: self.turntable,
            environment,
            view: self.view.clone(),
            floor: self.floor.clone(),
            shadow: self.shadow.clone(),
            analyzer: self.analyzer.clone(),
            caption: self.caption.clone(),
            orbit_elevation_deg: self.orbit_elevation.clone(),
        })
    }

    /// The scene's preview settings with these flags applied.
    fn settings(&self, scene: &Scene) -> Result<Settings, Failure> {
        let base = scene.preview.clone().unwrap_or_default();
        let at_scene = |m: String| Failure::input(format!("{}: {m}", self.scene.display()));
        self.overrides()?.apply(base).map_err(|e| match e.key {
            Some(key) => at_scene(format!("--{}: {}", flag(key), e.error)),
            None => at_scene(e.error.to_string()),
        })
    }
}

/// The flag that sets a preview key.
fn flag(key: &str) -> &str {
    match key {
        "lights" => "light",
        "roughness_deg" => "roughness",
        "orbit_elevation_deg" => "orbit-elevation",
        other => other,
    }
}

/// Largest environment image read, in pixels.
const MAX_HDR_PIXELS: u64 = 1 << 26;

/// An equirectangular Radiance HDR file as an environment whose (1, 1, 1)
/// is the built-in illuminant `white`.
fn read_hdr(path: &Path, white: &str) -> Result<EnvImage, Failure> {
    use image::ImageDecoder;
    let at = |m: String| Failure::input(format!("{}: {m}", path.display()));
    let white = Illuminant::builtin(white)
        .map_err(|e| Failure::input(format!("--environment-white: {e}")))?;
    let bytes = std::fs::read(path).map_err(|e| at(format!("cannot read environment: {e}")))?;
    let decoder = image::codecs::hdr::HdrDecoder::new(std::io::Cursor::new(&bytes))
        .map_err(|e| at(format!("not a Radiance HDR image: {e}")))?;
    let (w, h) = decoder.dimensions();
    if w as u64 * h as u64 > MAX_HDR_PIXELS {
        return Err(at(format!(
            "{w}×{h} pixels is more than 2^26; scale the environment image down"
        )));
    }
    let mut raw = vec![0u8; decoder.total_bytes() as usize];
    decoder.read_image(&mut raw).map_err(|e| {
        at(format!(
            "the Radiance HDR image is damaged or cut short: {e}"
        ))
    })?;
    let rgb: Vec<f32> = raw
        .chunks_exact(4)
        .map(|b| f32::from_ne_bytes([b[0], b[1], b[2], b[3]]))
        .collect();
    EnvImage::new(&path.display().to_string(), (w, h), rgb, white).map_err(|e| at(e.to_string()))
}

/// Runs the command.
pub fn run(args: &RenderArgs) -> CliResult {
    let scene = load_scene(&args.scene)?;
    let settings = args.settings(&scene)?;
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
    let unencoded = |path: &Path| {
        Failure::io(
            path,
            std::io::Error::other("the image could not be encoded"),
        )
    };
    let mut all = Vec::new();
    let mut size = (0, 0);
    for index in 0..frames {
        let image = preview.render(index, &|rows| bar.inc(rows as u64));
        let path = if settings.turntable > 0 {
            frame_path(&args.output, index)
        } else {
            args.output.clone()
        };
        size = (image.width, image.height);
        let png = lamella::raster::png(size, &image.rgb).ok_or_else(|| unencoded(&path))?;
        write_out(Some(&path), &[png])?;
        if settings.turntable > 0 {
            all.push(image.rgb);
        }
    }
    if settings.turntable > 0 {
        let apng = lamella::raster::apng(size, &all, FRAMES_PER_SECOND)
            .ok_or_else(|| unencoded(&args.output))?;
        write_out(Some(&args.output), &[apng])?;
    }
    bar.finish_and_clear();
    Ok(())
}

/// Frame rate of the animated PNG of a turntable.
const FRAMES_PER_SECOND: u16 = 15;

/// `dir/name.png` → `dir/name-007.png`.
fn frame_path(output: &Path, index: u32) -> PathBuf {
    let stem = output.file_stem().unwrap_or_default().to_string_lossy();
    let ext = output
        .extension()
        .map_or("png".into(), |e| e.to_string_lossy());
    output.with_file_name(format!("{stem}-{index:03}.{ext}"))
}
