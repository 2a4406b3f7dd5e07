//! Equirectangular maps of up to three channels over all directions (the
//! environment frame of [`super::environment`]): bilinear look-ups, box
//! down-sampling, a blur for rough reflection and the cosine-weighted
//! irradiance for diffuse light.

use std::f32::consts::{PI, TAU};

use glam::Vec3;
use rayon::prelude::*;

use super::environment::EnvImage;

/// Channels per texel.
pub(super) type Texel = [f32; 3];

/// A map of `width` × `height` texels, row-major from the top (elevation
/// +90°), the centre column along −z.
#[derive(Debug, Clone)]
pub(super) struct Maps {
    pub(super) width: usize,
    pub(super) height: usize,
    pub(super) values: Vec<Texel>,
}

fn add(a: Texel, b: Texel, w: f32) -> Texel {
    [a[0] + w * b[0], a[1] + w * b[1], a[2] + w * b[2]]
}

impl Maps {
    /// Unit direction through the centre of texel (`col`, `row`).
    pub(super) fn direction(&self, col: usize, row: usize) -> Vec3 {
        let az = ((col as f32 + 0.5) / self.width as f32 - 0.5) * TAU;
        let el = (0.5 - (row as f32 + 0.5) / self.height as f32) * PI;
        Vec3::new(el.cos() * az.sin(), el.sin(), -el.cos() * az.cos())
    }

    /// Elevation of the centre of `row` in radians.
    fn elevation(&self, row: usize) -> f32 {
        (0.5 - (row as f32 + 0.5) / self.height as f32) * PI
    }

    /// `f` at every texel centre of a `width` × `width/2` grid.
    pub(super) fn from_fn(width: usize, f: impl Fn(Vec3) -> Texel + Sync) -> Maps {
        let height = width / 2;
        let mut maps = Maps {
            width,
            height,
            values: vec![[0.0; 3]; width * height],
        };
        let values = (0..width * height)
            .into_par_iter()
            .map(|i| f(maps.direction(i % width, i / width)))
            .collect();
        maps.values = values;
        maps
    }

    /// An image resampled to `width` × `width/2`: the mean of the pixels
    /// each texel covers, or bilinear where the image is coarser.
    pub(super) fn from_image(width: usize, image: &EnvImage) -> Maps {
        let source = Maps {
            width: image.width as usize,
            height: image.height as usize,
            values: image
                .rgb
                .chunks_exact(3)
                .map(|p| [p[0], p[1], p[2]])
                .collect(),
        };
        let mut out = source;
        while out.width >= 2 * width && out.height >= width {
            out = out.halved();
        }
        Maps::from_fn(width, |d| out.at(d))
    }

    /// Half the width and height, each texel the solid-angle-weighted mean
    /// of the 2 × 2 it covers.
    pub(super) fn halved(&self) -> Maps {
        let (w, h) = ((self.width / 2).max(1), (self.height / 2).max(1));
        let values = (0..w * h)
            .into_par_iter()
            .map(|i| {
                let (c, r) = (i % w, i / w);
                let (mut sum, mut weight) = ([0.0; 3], 0.0);
                for rr in (2 * r)..(2 * r + 2).min(self.height) {
                    let wt = self.elevation(rr).cos().max(1e-6);
                    for cc in (2 * c)..(2 * c + 2).min(self.width) {
                        sum = add(sum, self.values[rr * self.width + cc], wt);
                        weight += wt;
                    }
                }
                sum.map(|v| v / weight)
            })
            .collect();
        Maps {
            width: w,
            height: h,
            values,
        }
    }

    /// Bilinear value toward unit direction `d` (wrapping in azimuth).
    pub(super) fn at(&self, d: Vec3) -> Texel {
        let az = d.x.atan2(-d.z);
        let el = d.y.clamp(-1.0, 1.0).asin();
        let x = (az / TAU + 0.5) * self.width as f32 - 0.5;
        let y = ((0.5 - el / PI) * self.height as f32 - 0.5).clamp(0.0, (self.height - 1) as f32);
        let (x0, y0) = (x.floor(), y.floor());
        let (fx, fy) = (x - x0, y - y0);
        let w = self.width as isize;
        let c0 = (x0 as isize).rem_euclid(w) as usize;
        let c1 = (x0 as isize + 1).rem_euclid(w) as usize;
        let r0 = y0 as usize;
        let r1 = (r0 + 1).min(self.height - 1);
        let v = |r: usize, c: usize| self.values[r * self.width + c];
        let mut out = [0.0; 3];
        out = add(out, v(r0, c0), (1.0 - fx) * (1.0 - fy));
        out = add(out, v(r0, c1), fx * (1.0 - fy));
        out = add(out, v(r1, c0), (1.0 - fx) * fy);
        add(out, v(r1, c1), fx * fy)
    }

    /// The map seen through a Gaussian lobe of angular width `sigma`
    /// (radians; weight e^{−α²/2σ²} at angle α from the look-up direction),
    /// applied as two passes, along each parallel with its width widened by
    /// 1/cos(elevation) (the whole parallel's mean near the poles) and then
    /// along the meridians (an
    /// approximation of the spherical blur; common practice). Works on a
    /// copy down-sampled until a texel is about σ/3, at least 64 × 32.
    /// A uniform map stays uniform.
    pub(super) fn blurred(&self, sigma: f32) -> Maps {
        let mut m = self.clone();
        while m.width > 64 && TAU / (m.width as f32 / 2.0) < sigma / 3.0 {
            m = m.halved();
        }
        let (w, h) = (m.width, m.height);
        let row_step = PI / h as f32;
        let kernel = |spread: f32, n: usize| -> Vec<f32> {
            let k: Vec<f32> = (0..=n)
                .map(|i| (-0.5 * (i as f32 / spread).powi(2)).exp())
                .collect();
            let total: f32 = k[0] + 2.0 * k[1..].iter().sum::<f32>();
            k.into_iter().map(|x| x / total).collect()
        };
        // Along the parallels, wrapping.
        let horizontal: Vec<Texel> = (0..h)
            .into_par_iter()
            .flat_map_iter(|r| {
                let cos = m.elevation(r).cos().max(1e-3);
                let spread = sigma / (TAU / w as f32) / cos;
                let row = &m.values[r * w..(r + 1) * w];
                let out: Vec<Texel> = if spread > w as f32 / 2.0 {
                    let mean = row.iter().fold([0.0; 3], |a, b| add(a, *b, 1.0 / w as f32));
                    vec![mean; w]
                } else {
                    let n = ((3.0 * spread).ceil() as usize).clamp(1, w / 2);
                    let k = kernel(spread, n);
                    (0..w)
                        .map(|c| {
                            let mut sum = row[c].map(|v| v * k[0]);
                            for (j, &kj) in k.iter().enumerate().skip(1) {
                                sum = add(sum, row[(c + j) % w], kj);
                                sum = add(sum, row[(c + w - j % w) % w], kj);
                            }
                            sum
                        })
                        .collect()
                };
                out
            })
            .collect();
        // Along the meridians (clamped at the poles).
        let s_rows = sigma / row_step;
        let n_rows = ((3.0 * s_rows).ceil() as usize).max(1);
        let kr = kernel(s_rows, n_rows);
        let values: Vec<Texel> = (0..w * h)
            .into_par_iter()
            .map(|i| {
                let (c, r) = (i % w, i / w);
                let mut sum = horizontal[i].map(|v| v * kr[0]);
                for (j, &k) in kr.iter().enumerate().skip(1) {
                    let up = r.saturating_sub(j);
                    let down = (r + j).min(h - 1);
                    sum = add(sum, horizontal[up * w + c], k);
                    sum = add(sum, horizontal[down * w + c], k);
                }
                sum
            })
            .collect();
        Maps {
            width: w,
            height: h,
            values,
        }
    }

    /// E/π toward each texel's direction as the normal: the cosine-weighted
    /// mean radiance of the hemisphere around it (a white Lambertian surface
    /// facing that way sends this radiance), on a 32 × 16 grid from a
    /// 64 × 32 copy. A uniform map of radiance L gives L.
    pub(super) fn irradiance(&self) -> Maps {
        let mut src = self.clone();
        while src.width > 64 {
            src = src.halved();
        }
        let texels: Vec<(Vec3, f32, Texel)> = (0..src.width * src.height)
            .map(|i| {
                let (c, r) = (i % src.width, i / src.width);
                let d_omega =
                    (TAU / src.width as f32) * (PI / src.height as f32) * src.elevation(r).cos();
                (src.direction(c, r), d_omega, src.values[i])
            })
            .collect();
        let mut out = Maps {
            width: 32,
            height: 16,
            values: Vec::new(),
        };
        out.values = (0..32 * 16)
            .into_par_iter()
            .map(|i| {
                let n = out.direction(i % 32, i / 32);
                let (mut sum, mut weight) = ([0.0; 3], 0.0);
                for &(d, w, v) in &texels {
                    let c = n.dot(d);
                    if c > 0.0 {
                        sum = add(sum, v, c * w);
                        weight += c * w;
                    }
                }
                // Normalised by the quadrature's own ∫cos dω (π exactly).
                sum.map(|s| s / weight)
            })
            .collect();
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn directions_and_lookups_agree() {
        let m = Maps::from_fn(64, |d| [d.x, d.y, d.z]);
        for d in [Vec3::new(0.3, 0.5, -0.8), Vec3::new(-0.9, -0.1, 0.4)] {
            let d = d.normalize();
            let v = m.at(d);
            assert!((Vec3::from(v) - d).length() < 0.05, "{v:?} {d}");
        }
        // The centre column looks along −z, the top row up.
        assert!(m.direction(32, 8).z < -0.5);
        assert!(m.direction(0, 0).y > 0.99);
    }

    #[test]
    fn uniform_maps_stay_uniform() {
        let m = Maps::from_fn(256, |_| [2.0, 0.5, 0.0]);
        for out in [m.blurred(0.1), m.blurred(1.0), m.irradiance(), m.halved()] {
            for v in &out.values {
                assert!(
                    (v[0] - 2.0).abs() < 1e-3 && (v[1] - 0.5).abs() < 1e-3,
                    "{v:?}"
                );
            }
        }
    }

    #[test]
    fn irradiance_of_the_upper_hemisphere_is_half_at_the_horizon() {
        // Radiance 1 above the horizon: a surface facing up sees all of it,
        // one facing sideways half of its cosine-weighted hemisphere.
        let m = Maps::from_fn(128, |d| [if d.y > 0.0 { 1.0 } else { 0.0 }, 0.0, 0.0]);
        let e = m.irradiance();
        assert!((e.at(Vec3::Y)[0] - 1.0).abs() < 0.02);
        assert!((e.at(Vec3::X)[0] - 0.5).abs() < 0.03, "{:?}", e.at(Vec3::X));
    }
}
