//! Visibility by scan conversion: triangles projected once, sorted into bands
//! of rows, and drawn band by band into a depth buffer (nearest 1/depth wins).
//! Positions and normals are interpolated perspective-correctly: screen-space
//! barycentric weights divided by depth, renormalised (common practice).

use glam::{Vec2, Vec3};

use super::camera::Camera;
use super::mesh::Mesh;

/// The surface seen through one sample.
#[derive(Debug, Clone, Copy)]
pub struct Surface {
    /// World position.
    pub position: Vec3,
    /// Interpolated unit normal (not yet turned toward the eye).
    pub normal: Vec3,
}

/// What one sample sees: the nearest surface and, when asked for, the
/// farthest one if it lies on another triangle (where a clear closed object
/// lets the line of sight out).
#[derive(Debug, Clone, Copy)]
pub struct Sample {
    /// The nearest surface.
    pub front: Surface,
    /// The farthest surface on another triangle.
    pub back: Option<Surface>,
}

/// A mesh projected onto a sample grid and binned into bands.
pub struct Raster<'a> {
    mesh: &'a Mesh,
    /// Pixel coordinates and 1/depth of each vertex.
    screen: Vec<(Vec2, f32)>,
    /// Triangles overlapping each band.
    bins: Vec<Vec<u32>>,
    width: usize,
    height: usize,
    band_rows: usize,
}

/// A visible triangle and the perspective-correct weights of its vertices.
type Hit = Option<(u32, [f32; 3])>;

impl<'a> Raster<'a> {
    /// Projects `mesh` with `camera` onto a `width` × `height` sample grid
    /// cut into bands of `band_rows` rows. The eye must be outside the mesh's
    /// bounding sphere (every vertex in front of it).
    pub fn new(
        mesh: &'a Mesh,
        camera: &Camera,
        width: usize,
        height: usize,
        band_rows: usize,
    ) -> Self {
        let screen: Vec<(Vec2, f32)> = mesh
            .positions
            .iter()
            .map(|&p| {
                let (s, depth) = camera.project(p);
                (s, 1.0 / depth)
            })
            .collect();
        let bands = height.div_ceil(band_rows);
        let mut bins = vec![Vec::new(); bands];
        for (t, tri) in mesh.triangles.iter().enumerate() {
            let ys = tri.map(|v| screen[v as usize].0.y);
            let lo = ys.iter().copied().fold(f32::INFINITY, f32::min);
            let hi = ys.iter().copied().fold(f32::NEG_INFINITY, f32::max);
            if hi < 0.0 || lo > height as f32 || !(lo.is_finite() && hi.is_finite()) {
                continue;
            }
            let first = (lo.max(0.0) as usize / band_rows).min(bands - 1);
            let last = (hi.max(0.0) as usize / band_rows).min(bands - 1);
            for bin in &mut bins[first..=last] {
                bin.push(t as u32);
            }
        }
        Raster {
            mesh,
            screen,
            bins,
            width,
            height,
            band_rows,
        }
    }

    /// Number of bands.
    pub fn bands(&self) -> usize {
        self.bins.len()
    }

    /// Sample rows of band `b`.
    pub fn rows(&self, b: usize) -> std::ops::Range<usize> {
        b * self.band_rows..((b + 1) * self.band_rows).min(self.height)
    }

    /// The surfaces seen at each sample of band `b`, row-major (`None`:
    /// background); the far side only if `back`.
    pub fn band(&self, b: usize, back: bool) -> Vec<Option<Sample>> {
        let rows = self.rows(b);
        let (w, y0) = (self.width, rows.start);
        let n = w * rows.len();
        let mut depth = vec![0.0f32; n];
        let mut hits: Vec<Hit> = vec![None; n];
        let mut far_depth = vec![f32::INFINITY; if back { n } else { 0 }];
        let mut far: Vec<Hit> = vec![None; if back { n } else { 0 }];
        for &t in &self.bins[b] {
            let tri = self.mesh.triangles[t as usize];
            let [(a, ia), (bb, ib), (c, ic)] = tri.map(|v| self.screen[v as usize]);
            let area = cross(bb - a, c - a);
            if area.abs() < 1e-12 {
                continue;
            }
            let lo = a.min(bb).min(c);
            let hi = a.max(bb).max(c);
            let x0 = (lo.x - 0.5).ceil().max(0.0) as usize;
            let x1 = ((hi.x - 0.5).floor() as isize).min(w as isize - 1);
            let ys = (lo.y - 0.5).ceil().max(y0 as f32) as usize;
            let ye = ((hi.y - 0.5).floor() as isize).min(rows.end as isize - 1);
            if x1 < x0 as isize || ye < ys as isize {
                continue;
            }
            for y in ys..=ye as usize {
                let py = y as f32 + 0.5;
                for x in x0..=x1 as usize {
                    let p = Vec2::new(x as f32 + 0.5, py);
                    let l0 = cross(c - bb, p - bb) / area;
                    let l1 = cross(a - c, p - c) / area;
                    let l2 = 1.0 - l0 - l1;
                    if l0 < 0.0 || l1 < 0.0 || l2 < 0.0 {
                        continue;
                    }
                    let inv = l0 * ia + l1 * ib + l2 * ic;
                    let k = (y - y0) * w + x;
                    let weights = || [l0 * ia / inv, l1 * ib / inv, l2 * ic / inv];
                    if inv > depth[k] {
                        depth[k] = inv;
                        hits[k] = Some((t, weights()));
                    }
                    if back && inv < far_depth[k] {
                        far_depth[k] = inv;
                        far[k] = Some((t, weights()));
                    }
                }
            }
        }
        (0..n)
            .map(|k| {
                hits[k].map(|(t, b)| Sample {
                    front: self.surface(t, b),
                    back: match far.get(k).copied().flatten() {
                        // Another triangle, clearly farther (not a neighbour
                        // sharing an edge with the nearest).
                        Some((tf, bf)) if tf != t && 1.0 / far_depth[k] - 1.0 / depth[k] > 1e-3 => {
                            Some(self.surface(tf, bf))
                        }
                        _ => None,
                    },
                })
            })
            .collect()
    }

    fn surface(&self, t: u32, b: [f32; 3]) -> Surface {
        let tri = self.mesh.triangles[t as usize];
        let mix = |v: &[Vec3]| {
            b[0] * v[tri[0] as usize] + b[1] * v[tri[1] as usize] + b[2] * v[tri[2] as usize]
        };
        let normal = mix(&self.mesh.normals);
        Surface {
            position: mix(&self.mesh.positions),
            normal: normal.normalize_or(self.mesh.normals[tri[0] as usize]),
        }
    }
}

fn cross(a: Vec2, b: Vec2) -> f32 {
    a.x * b.y - a.y * b.x
}
