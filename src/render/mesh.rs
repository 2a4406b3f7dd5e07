//! Triangle meshes of the preview shapes: surfaces of revolution (sphere,
//! capped cylinder, torus, bottle), a wavy height field, and Wavefront OBJ
//! text. Every mesh is centred and scaled to a bounding sphere of radius 1.

use std::f32::consts::{PI, TAU};
use std::io::BufReader;

use glam::{DVec3, Vec2, Vec3};

use crate::error::{Error, Result};

/// An indexed triangle mesh with one normal per vertex (vertices on sharp
/// edges are repeated, one copy per face).
#[derive(Debug, Clone, PartialEq)]
pub struct Mesh {
    /// Vertex positions.
    pub positions: Vec<Vec3>,
    /// Unit vertex normals, one per position.
    pub normals: Vec<Vec3>,
    /// Vertex indices of each triangle.
    pub triangles: Vec<[u32; 3]>,
}

/// Segments around the axis of the surfaces of revolution.
const AROUND: usize = 128;

/// One smooth piece of a profile in the (radius, height) half-plane, with its
/// outward normals; pieces meet at sharp edges.
struct Piece {
    points: Vec<Vec2>,
    normals: Vec<Vec2>,
}

impl Piece {
    /// A polyline traversed with the outside on its right: normals from the
    /// central difference (Δy, −Δr), one-sided at the ends.
    fn from_points(points: Vec<Vec2>) -> Piece {
        let n = points.len();
        let normals = (0..n)
            .map(|i| {
                let d = points[(i + 1).min(n - 1)] - points[i.saturating_sub(1)];
                Vec2::new(d.y, -d.x).normalize()
            })
            .collect();
        Piece { points, normals }
    }

    /// A flat disc or ring at height `y` from radius `r0` to `r1` (outward
    /// normal down when r grows, up when it shrinks).
    fn flat(y: f32, r0: f32, r1: f32) -> Piece {
        Piece::from_points(vec![Vec2::new(r0, y), Vec2::new(r1, y)])
    }
}

impl Mesh {
    /// A unit sphere.
    pub fn sphere() -> Mesh {
        let n = 96;
        let (points, normals) = (0..=n)
            .map(|i| {
                let t = PI * i as f32 / n as f32;
                let p = Vec2::new(t.sin(), -t.cos());
                (p, p)
            })
            .unzip();
        revolve(&[Piece { points, normals }])
    }

    /// A cylinder of height 1.6 and radius 0.6 with flat caps.
    pub fn cylinder() -> Mesh {
        let (r, h) = (0.6, 0.8);
        let side = (0..=24)
            .map(|i| Vec2::new(r, -h + 2.0 * h * i as f32 / 24.0))
            .collect();
        revolve(&[
            Piece::flat(-h, 0.0, r),
            Piece::from_points(side),
            Piece::flat(h, r, 0.0),
        ])
    }

    /// A torus with tube radius 0.3 around a circle of radius 0.8.
    pub fn torus() -> Mesh {
        let n = 64;
        let (points, normals) = (0..=n)
            .map(|i| {
                let t = -PI / 2.0 + TAU * i as f32 / n as f32;
                let dir = Vec2::new(t.cos(), t.sin());
                (Vec2::new(0.8, 0.0) + 0.3 * dir, dir)
            })
            .unzip();
        revolve(&[Piece { points, normals }])
    }

    /// A bottle: flat base with a rounded heel, straight body, a smooth
    /// shoulder into a neck and a flat closure on top.
    pub fn bottle() -> Mesh {
        let (body, neck, heel) = (0.42f32, 0.14f32, 0.06f32);
        let mut profile = Vec::new();
        for i in 0..=8 {
            let t = -PI / 2.0 + PI / 2.0 * i as f32 / 8.0;
            profile.push(Vec2::new(body - heel, -1.0 + heel) + heel * Vec2::new(t.cos(), t.sin()));
        }
        let (shoulder_from, shoulder_to) = (0.25f32, 0.65f32);
        let steps = 60;
        for i in 1..=steps {
            let y = -1.0 + heel + (0.95 - (-1.0 + heel)) * i as f32 / steps as f32;
            let r = if y <= shoulder_from {
                body
            } else if y >= shoulder_to {
                neck
            } else {
                let s = (y - shoulder_from) / (shoulder_to - shoulder_from);
                neck + (body - neck) * 0.5 * (1.0 + (PI * s).cos())
            };
            profile.push(Vec2::new(r, y));
        }
        revolve(&[
            Piece::flat(-1.0, 0.0, body - heel),
            Piece::from_points(profile),
            Piece::flat(0.95, neck, neck + 0.03),
            Piece::from_points(vec![
                Vec2::new(neck + 0.03, 0.95),
                Vec2::new(neck + 0.03, 1.0),
            ]),
            Piece::flat(1.0, neck + 0.03, 0.0),
        ])
    }

    /// A square sheet with gentle waves, y = 0.12 sin(1.5πx) cos(πz) over
    /// x, z in [−1, 1], then tilted 60° about the x axis to face the default
    /// camera like a sample card on an easel; shaded on both sides.
    pub fn sheet() -> Mesh {
        let tilt = glam::Quat::from_rotation_x(60f32.to_radians());
        let n = 160;
        let (a, kx, kz) = (0.12f32, 1.5 * PI, PI);
        let mut positions = Vec::new();
        let mut normals = Vec::new();
        for j in 0..=n {
            for i in 0..=n {
                let x = -1.0 + 2.0 * i as f32 / n as f32;
                let z = -1.0 + 2.0 * j as f32 / n as f32;
                let y = a * (kx * x).sin() * (kz * z).cos();
                let dx = a * kx * (kx * x).cos() * (kz * z).cos();
                let dz = -a * kz * (kx * x).sin() * (kz * z).sin();
                positions.push(tilt * Vec3::new(x, y, z));
                normals.push(tilt * Vec3::new(-dx, 1.0, -dz).normalize());
            }
        }
        let mut triangles = Vec::new();
        let row = n as u32 + 1;
        for j in 0..n as u32 {
            for i in 0..n as u32 {
                let v = j * row + i;
                triangles.push([v, v + row, v + 1]);
                triangles.push([v + 1, v + row, v + row + 1]);
            }
        }
        Mesh {
            positions,
            normals,
            triangles,
        }
        .framed()
    }

    /// A flat square pane in the x–y plane facing +z (the camera at orbit
    /// 0), as a window or filter card stands; open, shaded on both sides.
    pub fn pane() -> Mesh {
        let n = 8u32;
        let mut positions = Vec::new();
        for j in 0..=n {
            for i in 0..=n {
                let (x, y) = (
                    -1.0 + 2.0 * i as f32 / n as f32,
                    -1.0 + 2.0 * j as f32 / n as f32,
                );
                positions.push(Vec3::new(x, y, 0.0));
            }
        }
        let mut triangles = Vec::new();
        let row = n + 1;
        for j in 0..n {
            for i in 0..n {
                let v = j * row + i;
                triangles.push([v, v + 1, v + row]);
                triangles.push([v + 1, v + row + 1, v + row]);
            }
        }
        Mesh {
            normals: vec![Vec3::Z; positions.len()],
            positions,
            triangles,
        }
        .framed()
    }

    /// Parses Wavefront OBJ text (with `tobj`); faces are triangulated, and
    /// meshes without vertex normals get flat face normals. `name` labels errors.
    pub fn from_obj(name: &str, bytes: &[u8]) -> Result<Mesh> {
        let bad = |why: String| Error::invalid("shape", format!("mesh:{name}"), why);
        let options = tobj::LoadOptions {
            triangulate: true,
            single_index: true,
            ..Default::default()
        };
        let (models, _) = tobj::load_obj_buf(&mut BufReader::new(bytes), &options, |_| {
            Ok(Default::default())
        })
        .map_err(|e| bad(format!("not a readable OBJ file: {e}")))?;
        let mut mesh = Mesh {
            positions: Vec::new(),
            normals: Vec::new(),
            triangles: Vec::new(),
        };
        for m in models.iter().map(|m| &m.mesh) {
            let point = |k: usize, v: &[f32]| Vec3::new(v[3 * k], v[3 * k + 1], v[3 * k + 2]);
            let count = m.positions.len() / 3;
            if m.indices.iter().any(|&i| i as usize >= count) {
                return Err(bad("a face refers to a vertex that does not exist".into()));
            }
            let smooth = m.normals.len() == m.positions.len();
            for face in m.indices.chunks_exact(3) {
                let face = [face[0], face[1], face[2]];
                let p = face.map(|i| point(i as usize, &m.positions));
                // In f64, so that neither huge nor tiny faces lose their normal.
                let q = p.map(Vec3::as_dvec3);
                let flat = (q[1] - q[0]).cross(q[2] - q[0]).normalize_or_zero();
                let base = mesh.positions.len() as u32;
                for (k, &i) in face.iter().enumerate() {
                    let normal = if smooth {
                        point(i as usize, &m.normals)
                            .as_dvec3()
                            .normalize_or(flat)
                            .as_vec3()
                    } else {
                        flat.as_vec3()
                    };
                    mesh.positions.push(p[k]);
                    mesh.normals.push(normal);
                }
                mesh.triangles.push([base, base + 1, base + 2]);
            }
        }
        if mesh.triangles.is_empty() {
            return Err(bad("it holds no faces".into()));
        }
        if !mesh.positions.iter().all(|p| p.is_finite()) {
            return Err(bad("a vertex coordinate is not a finite number".into()));
        }
        if mesh.positions.iter().all(|&p| p == mesh.positions[0]) {
            return Err(bad("all its vertices coincide".into()));
        }
        Ok(mesh.framed())
    }

    /// Centred on its bounding box and scaled to a bounding sphere of radius 1.
    /// Worked in f64, where the squares of any f32 coordinates neither
    /// overflow (1e30) nor underflow (1e-30).
    fn framed(mut self) -> Mesh {
        let (lo, hi) = self.positions.iter().fold(
            (DVec3::splat(f64::INFINITY), DVec3::splat(f64::NEG_INFINITY)),
            |(lo, hi), &p| (lo.min(p.as_dvec3()), hi.max(p.as_dvec3())),
        );
        let centre = 0.5 * (lo + hi);
        let radius = self
            .positions
            .iter()
            .map(|&p| (p.as_dvec3() - centre).length())
            .fold(0.0, f64::max);
        for p in &mut self.positions {
            *p = ((p.as_dvec3() - centre) / radius).as_vec3();
        }
        self
    }
}

/// Sweeps profile pieces about the y axis; vertex j of a ring sits at
/// azimuth 2πj/AROUND, so the mesh is mirror-symmetric about x = 0 and z = 0.
fn revolve(pieces: &[Piece]) -> Mesh {
    let mut mesh = Mesh {
        positions: Vec::new(),
        normals: Vec::new(),
        triangles: Vec::new(),
    };
    let ring = AROUND as u32 + 1;
    for piece in pieces {
        let start = mesh.positions.len() as u32;
        for (p, n) in piece.points.iter().zip(&piece.normals) {
            for j in 0..=AROUND {
                let phi = TAU * j as f32 / AROUND as f32;
                let (s, c) = phi.sin_cos();
                mesh.positions.push(Vec3::new(p.x * c, p.y, p.x * s));
                mesh.normals
                    .push(Vec3::new(n.x * c, n.y, n.x * s).normalize());
            }
        }
        for i in 0..piece.points.len() as u32 - 1 {
            for j in 0..AROUND as u32 {
                let v = start + i * ring + j;
                mesh.triangles.push([v, v + 1, v + ring]);
                mesh.triangles.push([v + 1, v + ring + 1, v + ring]);
            }
        }
    }
    mesh.framed()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shapes_are_framed_in_the_unit_sphere_with_unit_normals() {
        for mesh in [
            Mesh::sphere(),
            Mesh::cylinder(),
            Mesh::torus(),
            Mesh::bottle(),
            Mesh::sheet(),
        ] {
            let r = mesh
                .positions
                .iter()
                .map(|p| p.length())
                .fold(0.0, f32::max);
            assert!((r - 1.0).abs() < 0.02, "{r}");
            assert!(mesh.normals.iter().all(|n| (n.length() - 1.0).abs() < 1e-4));
            let count = mesh.positions.len() as u32;
            assert!(mesh.triangles.iter().flatten().all(|&i| i < count));
        }
    }

    #[test]
    fn normals_point_outward() {
        for mesh in [Mesh::sphere(), Mesh::cylinder(), Mesh::bottle()] {
            // Convex-ish about the centre: outward normals have p·n > 0 away from the axis caps.
            let outward = mesh
                .positions
                .iter()
                .zip(&mesh.normals)
                .filter(|(p, n)| p.dot(**n) > 0.0)
                .count();
            assert!(outward as f64 > 0.95 * mesh.positions.len() as f64);
        }
    }

    #[test]
    fn obj_cube_without_normals_gets_flat_faces() {
        let text = include_str!("../../tests/data/cube.obj");
        let mesh = Mesh::from_obj("cube.obj", text.as_bytes()).unwrap();
        assert_eq!(mesh.triangles.len(), 12);
        for t in &mesh.triangles {
            let n = mesh.normals[t[0] as usize];
            let axis = n.abs().max_element();
            assert!((axis - 1.0).abs() < 1e-6, "{n}");
        }
        // Corners at distance 1 after framing.
        assert!(
            mesh.positions
                .iter()
                .all(|p| (p.length() - 1.0).abs() < 1e-6)
        );
    }

    #[test]
    fn obj_with_huge_or_tiny_coordinates_keeps_its_frame_and_normals() {
        // Squared lengths of these overflow (1e30) or underflow (1e-30) in f32.
        for scale in ["1e30", "1e-30"] {
            let text = format!("v 0 0 0\nv {scale} 0 0\nv 0 {scale} 0\nf 1 2 3\n");
            let mesh = Mesh::from_obj("x.obj", text.as_bytes()).unwrap();
            let r = mesh
                .positions
                .iter()
                .map(|p| p.length())
                .fold(0.0, f32::max);
            assert!((r - 1.0).abs() < 1e-6, "{scale}: radius {r}");
            for n in &mesh.normals {
                assert!((*n - Vec3::Z).length() < 1e-6, "{scale}: normal {n}");
            }
        }
    }

    #[test]
    fn bad_obj_text_is_an_error() {
        for text in [
            "",
            "v 0 0 0\nf 1 2 3\n",
            "v 0 0 0\nv 0 0 0\nv 0 0 0\nf 1 2 3\n",
        ] {
            let err = Mesh::from_obj("x.obj", text.as_bytes()).unwrap_err();
            assert!(err.to_string().contains("mesh:x.obj"), "{err}");
        }
    }
}
