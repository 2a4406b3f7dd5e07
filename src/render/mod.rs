//! Preview renders of objects wearing the coating: a CPU rasterizer with a
//! depth buffer and a perspective camera, shaded spectrally through look-up
//! tables of the film's reflectance and transmittance (module `shading`).
//! The library returns an sRGB byte buffer; encoding it is the caller's job.

pub mod camera;
pub mod mesh;
mod pigment;
mod raster;
pub mod settings;
mod shading;
mod tone;

use rayon::prelude::*;

pub use camera::{Camera, View};
pub use mesh::Mesh;
pub use settings::{Base, Light, PREVIEW_KEYS, SIZE_LIMITS, Settings, Shape, Source, parse_tone};

use crate::error::Result;
use crate::scene::Scene;
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
        Shape::Mesh(_) => None,
    }
}

impl<'a> Preview<'a> {
    /// Checks `settings` and builds the film's tables for `scene`.
    pub fn new(scene: &Scene, mesh: &'a Mesh, settings: &Settings) -> Result<Self> {
        settings.check()?;
        Ok(Preview {
            shader: Shader::new(scene, settings)?,
            mesh,
            settings: settings.clone(),
        })
    }

    /// Number of frames: the turntable's, or 1.
    pub fn frames(&self) -> u32 {
        self.settings.turntable.max(1)
    }

    /// The view of frame `index`: the orbit advanced by 360°·index/frames.
    pub fn view(&self, index: u32) -> View {
        View {
            orbit_deg: self.settings.view.orbit_deg + 360.0 * index as f64 / self.frames() as f64,
            ..self.settings.view
        }
    }

    /// Renders frame `index`; `progress` is told the number of image rows
    /// finished, band by band, from worker threads (it may panic to abandon
    /// the render).
    pub fn render(&self, index: u32, progress: &(dyn Fn(usize) + Sync)) -> Image {
        let s = &self.settings;
        let (w, h, k) = (s.width as usize, s.height as usize, s.ssaa as usize);
        let camera = Camera::new(&self.view(index), (w * k) as u32, (h * k) as u32);
        let raster = Raster::new(self.mesh, &camera, w * k, h * k, BAND_ROWS * k);
        let frame = self.shader.frame(&camera);
        let (exposure, tone) = (s.exposure as f32, s.tone);
        let per_pixel = 1.0 / (k * k) as f32;
        // `progress` may panic to abandon the render; the fuse then stops the
        // other threads at once.
        let bands: Vec<(Vec<u8>, Vec<f32>)> = (0..raster.bands())
            .into_par_iter()
            .panic_fuse()
            .map(|b| {
                let surfaces = raster.band(b);
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
                                    Some(surface) => {
                                        seen += 1;
                                        let c = frame.shade(surface.position, surface.normal);
                                        tone::map(c, exposure, tone)
                                    }
                                    None => {
                                        tone::background((rows.start + sy) as f32 / (h * k) as f32)
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
        let (rgb, coverage) = bands.into_iter().fold(
            (Vec::with_capacity(w * h * 3), Vec::with_capacity(w * h)),
            |(mut a, mut c), (x, y)| {
                a.extend(x);
                c.extend(y);
                (a, c)
            },
        );
        Image {
            width: s.width,
            height: s.height,
            rgb,
            coverage,
        }
    }
}
