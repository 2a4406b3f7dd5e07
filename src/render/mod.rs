//! Preview renders of objects wearing the coating: a CPU rasterizer with a
//! depth buffer and a perspective camera, shaded spectrally through look-up
//! tables of the film's reflectance and transmittance (module `shading`).
//! The library returns an sRGB byte buffer; encoding it is the caller's job.
//!
//! Light comes from the settings' lights (a uniform sky, discs fixed to the
//! camera) and from an environment ([`environment`]): built-in studios or an
//! equirectangular image, reflected by the film, lighting its base, seen
//! through a clear object, and lighting an optional floor with the object's
//! soft shadow.

pub mod camera;
mod caption;
pub mod environment;
mod floor;
mod maps;
pub mod mesh;
mod pigment;
mod raster;
pub mod settings;
mod shading;
mod surround;
mod tone;

use glam::Vec2;
use rayon::prelude::*;

pub use camera::{Camera, View};
pub use environment::{EnvImage, Environment, Procedural, STUDIO_NAMES, Studio};
pub use mesh::Mesh;
pub use settings::{
    Base, Light, OverrideError, Overrides, PREVIEW_KEYS, SIZE_LIMITS, Settings, Shape, Source,
    ViewMode, builtin_environment, parse_analyzer, parse_floor, parse_sweep, parse_switch,
    parse_tone,
};

use crate::error::Result;
use crate::scene::Scene;
use floor::Floor;
use raster::Raster;
use shading::Shader;

/// Output rows per band of work.
const BAND_ROWS: usize = 8;

/// An sRGB image, 8 bits per channel, rows top to bottom.
#[derive(Debug, Clone, PartialEq)]
pub struct Image {
    /// Width in pixels.
    pub width: u32,
    /// Height in pixels.
    pub height: u32,
    /// R, G, B bytes of each pixel, row-major.
    pub rgb: Vec<u8>,
    /// Fraction of each pixel's samples that see the object.
    pub coverage: Vec<f32>,
}

/// A scene's film ready to render on one mesh: tables built once, then any
/// number of frames.
pub struct Preview<'a> {
    shader: Shader,
    mesh: &'a Mesh,
    settings: Settings,
    floor: Option<Floor>,
    /// The caption's title and details.
    caption: Option<(String, String)>,
}

/// The mesh of a built-in shape; `None` for [`Shape::Mesh`], which the
/// caller reads and passes to [`Mesh::from_obj`].
pub fn builtin_mesh(shape: &Shape) -> Option<Mesh> {
    match shape {
        Shape::Sphere => Some(Mesh::sphere()),
        Shape::Cylinder => Some(Mesh::cylinder()),
        Shape::Torus => Some(Mesh::torus()),
        Shape::Bottle => Some(Mesh::bottle()),
        Shape::Sheet => Some(Mesh::sheet()),
        Shape::Pane => Some(Mesh::pane()),
        Shape::Mesh(_) => None,
    }
}

impl<'a> Preview<'a> {
    /// Checks `settings` and builds the film's tables for `scene`.
    pub fn new(scene: &Scene, mesh: &'a Mesh, settings: &Settings) -> Result<Self> {
        settings.check()?;
        let caption = settings.caption.then(|| {
            let lighting = match &settings.environment {
                Some(e) => e.describe(),
                None => format!("{} lights", settings.lights.len()),
            };
            let title = if scene.title.is_empty() {
                "untitled scene"
            } else {
                &scene.title
            };
            let mut parts = vec![
                lighting,
                format!("illuminant {}", scene.illuminant.name()),
                format!("observer {}", scene.observer.name()),
            ];
            if settings.mode != ViewMode::Reflect {
                parts.push(format!("view {}", settings.mode.name()));
            }
            if let Some(h) = settings.analyzer {
                parts.push(format!("{} analyser", h.name()));
            }
            parts.push(format!("lamella {}", crate::report::VERSION));
            (title.to_string(), parts.join(" · "))
        });
        Ok(Preview {
            shader: Shader::new(scene, settings)?,
            mesh,
            floor: settings
                .floor
                .map(|albedo| Floor::new(mesh, albedo, settings.shadow)),
            settings: settings.clone(),
            caption,
        })
    }

    /// The caption under every frame, if the settings ask for one.
    pub fn caption(&self) -> Option<String> {
        self.caption.as_ref().map(|(t, d)| format!("{t} · {d}"))
    }

    /// Number of frames: the turntable's, or 1.
    pub fn frames(&self) -> u32 {
        self.settings.turntable.max(1)
    }

    /// The view of frame `index`: the orbit advanced by 360°·index/frames,
    /// and with an elevation sweep (a, b) the elevation
    /// a + (b − a)(1 − cos 2π·index/frames)/2, so the loop closes smoothly.
    pub fn view(&self, index: u32) -> View {
        let turn = index as f64 / self.frames() as f64;
        View {
            orbit_deg: self.settings.view.orbit_deg + 360.0 * turn,
            elevation_deg: match self.settings.orbit_elevation_deg {
                Some((a, b)) => a + (b - a) * 0.5 * (1.0 - (std::f64::consts::TAU * turn).cos()),
                None => self.settings.view.elevation_deg,
            },
            ..self.settings.view
        }
    }

    /// Renders frame `index`; `progress` is told the number of image rows
    /// finished, band by band, from worker threads (it may panic to abandon
    /// the render).
    pub fn render(&self, index: u32, progress: &(dyn Fn(usize) + Sync)) -> Image {
        let s = &self.settings;
        let (w, h, k) = (s.width as usize, s.height as usize, s.ssaa as usize);
        let view = self.view(index);
        let camera = Camera::new(&view, (w * k) as u32, (h * k) as u32);
        let raster = Raster::new(self.mesh, &camera, w * k, h * k, BAND_ROWS * k);
        let frame = self
            .shader
            .frame(&camera, view.orbit_deg, self.floor.as_ref());
        let back = s.mode.transmits();
        let (exposure, tone) = (s.exposure as f32, s.tone);
        let per_pixel = 1.0 / (k * k) as f32;
        // `progress` may panic to abandon the render; the fuse then stops the
        // other threads at once.
        let bands: Vec<(Vec<u8>, Vec<f32>)> = (0..raster.bands())
            .into_par_iter()
            .panic_fuse()
            .map(|b| {
                let surfaces = raster.band(b, back);
                let rows = raster.rows(b);
                let out_rows = rows.len() / k;
                let mut rgb = Vec::with_capacity(out_rows * w * 3);
                let mut coverage = Vec::with_capacity(out_rows * w);
                for oy in 0..out_rows {
                    for ox in 0..w {
                        let (mut sum, mut seen) = (glam::Vec3::ZERO, 0usize);
                        for sy in oy * k..(oy + 1) * k {
                            for sx in ox * k..(ox + 1) * k {
                                sum += match surfaces[sy * w * k + sx] {
                                    Some(sample) => {
                                        seen += 1;
                                        let c = frame.shade(
                                            sample.front.position,
                                            sample.front.normal,
                                            sample.back.map(|b| (b.position, b.normal)),
                                        );
                                        tone::map(c, exposure, tone)
                                    }
                                    None => {
                                        let y = (rows.start + sy) as f32;
                                        let dir = camera.ray(Vec2::new(sx as f32 + 0.5, y + 0.5));
                                        match frame.background(dir, y / (h * k) as f32) {
                                            (c, true) => tone::map(c, exposure, tone),
                                            (c, false) => c,
                                        }
                                    }
                                };
                            }
                        }
                        rgb.extend(tone::encode(sum * per_pixel));
                        coverage.push(seen as f32 * per_pixel);
                    }
                }
                progress(out_rows);
                (rgb, coverage)
            })
            .collect();
        let (mut rgb, mut coverage) = bands.into_iter().fold(
            (Vec::with_capacity(w * h * 3), Vec::with_capacity(w * h)),
            |(mut a, mut c), (x, y)| {
                a.extend(x);
                c.extend(y);
                (a, c)
            },
        );
        let mut height = s.height;
        if let Some((title, details)) = &self.caption {
            rgb.extend(caption::strip(s.width, title, details));
            let strip = caption::strip_height(s.width);
            coverage.extend(std::iter::repeat_n(0.0, (s.width * strip) as usize));
            height += strip;
        }
        Image {
            width: s.width,
            height,
            rgb,
            coverage,
        }
    }
}
