//! The floor under the object: a matte, spectrally neutral plane touching
//! the mesh's lowest point, lit by the environment's upper hemisphere, with
//! a soft contact shadow from shadow rays against the object.
//!
//! The object is seen by the rays as columns: on a grid over the floor, the
//! lowest and highest point of the mesh above each cell (an orthographic
//! height map from below and above, so a torus keeps its hole). The floor's
//! radiance is computed per frame on a texture around the object, as the
//! mean of the environment radiance over cosine-distributed directions that
//! reach the sky, times the floor's reflectance.

use glam::{Mat3, Vec3};
use rayon::prelude::*;

use super::maps::{Maps, Texel};
use super::mesh::Mesh;

/// Cells per side of the column grid over x, z in [−1, 1].
const CELLS: usize = 96;
/// Texels per side of the floor texture and its half-extent in object radii.
const TEXELS: usize = 128;
const EXTENT: f32 = 2.5;
/// Shadow rays per texel: rings × sectors of the cosine-weighted hemisphere.
const RINGS: usize = 4;
const SECTORS: usize = 16;

/// Lowest and highest point of the mesh over each cell (`lo > hi`: empty).
struct Columns {
    lo: Vec<f32>,
    hi: Vec<f32>,
}

impl Columns {
    fn new(mesh: &Mesh) -> Columns {
        let cell = 2.0 / CELLS as f32;
        let index = |v: f32| (((v + 1.0) / cell) as isize).clamp(0, CELLS as isize - 1) as usize;
        let mut lo = vec![f32::INFINITY; CELLS * CELLS];
        let mut hi = vec![f32::NEG_INFINITY; CELLS * CELLS];
        let mut mark = |x: f32, z: f32, y: f32| {
            let k = index(z) * CELLS + index(x);
            lo[k] = lo[k].min(y);
            hi[k] = hi[k].max(y);
        };
        for p in &mesh.positions {
            mark(p.x, p.z, p.y);
        }
        for tri in &mesh.triangles {
            let [a, b, c] = tri.map(|v| mesh.positions[v as usize]);
            let area = (b.x - a.x) * (c.z - a.z) - (c.x - a.x) * (b.z - a.z);
            if area.abs() < 1e-9 {
                continue;
            }
            let (x0, x1) = (a.x.min(b.x).min(c.x), a.x.max(b.x).max(c.x));
            let (z0, z1) = (a.z.min(b.z).min(c.z), a.z.max(b.z).max(c.z));
            for iz in index(z0)..=index(z1) {
                for ix in index(x0)..=index(x1) {
                    let (x, z) = (
                        -1.0 + (ix as f32 + 0.5) * cell,
                        -1.0 + (iz as f32 + 0.5) * cell,
                    );
                    let l0 = ((b.x - x) * (c.z - z) - (c.x - x) * (b.z - z)) / area;
                    let l1 = ((c.x - x) * (a.z - z) - (a.x - x) * (c.z - z)) / area;
                    let l2 = 1.0 - l0 - l1;
                    if l0 >= 0.0 && l1 >= 0.0 && l2 >= 0.0 {
                        mark(x, z, l0 * a.y + l1 * b.y + l2 * c.y);
                    }
                }
            }
        }
        Columns { lo, hi }
    }

    /// Whether the ray from `p` along `d` (d.y > 0) meets a column before it
    /// rises above the object.
    fn blocked(&self, p: Vec3, d: Vec3) -> bool {
        // Clip to the object's box [−1, 1]² × [p.y, 1].
        let (mut t0, mut t1) = (1e-4f32, (1.0 - p.y) / d.y);
        for (o, v) in [(p.x, d.x), (p.z, d.z)] {
            if v.abs() < 1e-9 {
                if o.abs() > 1.0 {
                    return false;
                }
                continue;
            }
            let (a, b) = ((-1.0 - o) / v, (1.0 - o) / v);
            t0 = t0.max(a.min(b));
            t1 = t1.min(a.max(b));
        }
        if t0 >= t1 {
            return false;
        }
        let cell = 2.0 / CELLS as f32;
        let across = (d.x * d.x + d.z * d.z).sqrt().max(1e-3);
        let dt = (0.7 * cell / across).max((t1 - t0) / 256.0);
        let mut t = t0;
        while t <= t1 {
            let q = p + t * d;
            let ix = (((q.x + 1.0) / cell) as usize).min(CELLS - 1);
            let iz = (((q.z + 1.0) / cell) as usize).min(CELLS - 1);
            let k = iz * CELLS + ix;
            if q.y >= self.lo[k] - 0.5 * cell && q.y <= self.hi[k] {
                return true;
            }
            t += dt;
        }
        false
    }
}

/// The floor of a preview.
pub(super) struct Floor {
    /// Height of the plane (the mesh's lowest point).
    pub(super) y: f32,
    /// Reflectance, the same at every wavelength.
    pub(super) albedo: f32,
    /// The object as shadow rays see it; `None`: no contact shadow.
    columns: Option<Columns>,
}

/// The floor's radiance per region for one frame.
pub(super) struct FloorFrame {
    /// Far from the object: albedo × E/π of the open sky.
    open: Texel,
    /// Around the object, with its shadow; `None` without shadow.
    texture: Option<Vec<Texel>>,
}

/// A small integer hash (for per-texel rotations of the shadow rays).
fn hash(mut x: u32) -> f32 {
    x ^= x >> 16;
    x = x.wrapping_mul(0x7feb_352d);
    x ^= x >> 15;
    x = x.wrapping_mul(0x846c_a68b);
    x ^= x >> 16;
    x as f32 / u32::MAX as f32
}

impl Floor {
    /// The floor under `mesh` with reflectance `albedo`, shadowed if `shadow`.
    pub(super) fn new(mesh: &Mesh, albedo: f64, shadow: bool) -> Floor {
        let y = mesh
            .positions
            .iter()
            .map(|p| p.y)
            .fold(f32::INFINITY, f32::min);
        Floor {
            y,
            albedo: albedo as f32,
            columns: shadow.then(|| Columns::new(mesh)),
        }
    }

    /// The floor's radiance for a frame whose world-to-environment rotation
    /// is `to_env`, lit by `light` (environment frame, a coarse copy).
    /// Directions per texel are stratified over the cosine-weighted
    /// hemisphere (Malley's method: uniform on the disc, lifted; common
    /// practice) and turned by a per-texel random angle.
    pub(super) fn frame(&self, light: &Maps, to_env: Mat3) -> FloorFrame {
        let directions = |turn: f32, jitter: f32| {
            (0..RINGS * SECTORS).map(move |s| {
                let (i, j) = (s / SECTORS, s % SECTORS);
                let r = ((i as f32 + 0.5 + 0.4 * (jitter - 0.5)) / RINGS as f32).sqrt();
                let phi = std::f32::consts::TAU * (j as f32 + turn) / SECTORS as f32;
                Vec3::new(r * phi.cos(), (1.0 - r * r).max(0.0).sqrt(), r * phi.sin())
            })
        };
        let n = (RINGS * SECTORS) as f32;
        let a = self.albedo;
        let radiance = |d: Vec3| light.at(to_env * d);
        let mut open = [0.0; 3];
        for d in directions(0.5, 0.5) {
            let l = radiance(d);
            (0..3).for_each(|c| open[c] += a * l[c] / n);
        }
        let texture = self.columns.as_ref().map(|columns| {
            let step = 2.0 * EXTENT / TEXELS as f32;
            let raw: Vec<Texel> = (0..TEXELS * TEXELS)
                .into_par_iter()
                .map(|k| {
                    let p = Vec3::new(
                        -EXTENT + ((k % TEXELS) as f32 + 0.5) * step,
                        self.y,
                        -EXTENT + ((k / TEXELS) as f32 + 0.5) * step,
                    );
                    // The open value times the fraction of light that gets
                    // through, so texels nothing shadows equal it exactly.
                    let (mut seen, mut all) = ([0.0f32; 3], [0.0f32; 3]);
                    let (turn, jitter) = (hash(2 * k as u32), hash(2 * k as u32 + 1));
                    for d in directions(turn, jitter) {
                        let l = radiance(d);
                        let open_ray = !columns.blocked(p, d);
                        for c in 0..3 {
                            all[c] += l[c];
                            if open_ray {
                                seen[c] += l[c];
                            }
                        }
                    }
                    let mut sum = open;
                    for c in 0..3 {
                        if all[c].abs() > 1e-12 {
                            sum[c] *= seen[c] / all[c];
                        }
                    }
                    sum
                })
                .collect();
            // A 3 × 3 box filter evens out the rays' noise.
            (0..TEXELS * TEXELS)
                .map(|k| {
                    let (x, z) = ((k % TEXELS) as isize, (k / TEXELS) as isize);
                    let mut sum = [0.0; 3];
                    let mut count = 0.0;
                    for dz in -1..=1 {
                        for dx in -1..=1 {
                            let (xx, zz) = (x + dx, z + dz);
                            if (0..TEXELS as isize).contains(&xx)
                                && (0..TEXELS as isize).contains(&zz)
                            {
                                let v = raw[zz as usize * TEXELS + xx as usize];
                                (0..3).for_each(|c| sum[c] += v[c]);
                                count += 1.0;
                            }
                        }
                    }
                    sum.map(|s| s / count)
                })
                .collect()
        });
        FloorFrame { open, texture }
    }
}

impl FloorFrame {
    /// Radiance per region at floor point `p` (bilinear in the texture,
    /// the open value beyond it).
    pub(super) fn at(&self, p: Vec3) -> Texel {
        let Some(tex) = &self.texture else {
            return self.open;
        };
        let step = 2.0 * EXTENT / TEXELS as f32;
        let (x, z) = ((p.x + EXTENT) / step - 0.5, (p.z + EXTENT) / step - 0.5);
        let last = (TEXELS - 1) as f32;
        if !(0.0..last).contains(&x) || !(0.0..last).contains(&z) {
            return self.open;
        }
        let (i, j) = (x as usize, z as usize);
        let (fx, fz) = (x - i as f32, z - j as f32);
        let v = |i: usize, j: usize| tex[j * TEXELS + i];
        let mut out = [0.0; 3];
        for (ii, jj, w) in [
            (i, j, (1.0 - fx) * (1.0 - fz)),
            (i + 1, j, fx * (1.0 - fz)),
            (i, j + 1, (1.0 - fx) * fz),
            (i + 1, j + 1, fx * fz),
        ] {
            let t = v(ii, jj);
            (0..3).for_each(|c| out[c] += w * t[c]);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_sphere_shadows_the_floor_beneath_it_and_not_far_away() {
        let mesh = Mesh::sphere();
        let floor = Floor::new(&mesh, 1.0, true);
        let light = Maps::from_fn(64, |_| [1.0, 0.0, 0.0]);
        let frame = floor.frame(&light, Mat3::IDENTITY);
        assert!((frame.open[0] - 1.0).abs() < 1e-5);
        let under = frame.at(Vec3::new(0.05, floor.y, 0.05))[0];
        let far = frame.at(Vec3::new(2.4, floor.y, 0.0))[0];
        assert!(under < 0.2, "{under}");
        assert!(far > 0.9, "{far}");
    }
}
