//! A perspective camera orbiting the object (which sits in the unit sphere at
//! the origin, y up).

use glam::{Vec2, Vec3};

use crate::error::{Error, Result};

/// Where the camera stands and how wide it sees.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct View {
    /// Azimuth about the vertical axis in degrees (0: looking along −z).
    pub orbit_deg: f64,
    /// Height above the horizon in degrees.
    pub elevation_deg: f64,
    /// Field of view across the shorter image side, in degrees.
    pub fov_deg: f64,
    /// Distance from the centre in object radii; `None` frames the object.
    pub distance: Option<f64>,
}

/// A pinhole camera for one image size: world points to pixel coordinates
/// (x right, y down, pixel centres at half-integers).
#[derive(Debug, Clone, Copy)]
pub struct Camera {
    /// Position of the eye.
    pub eye: Vec3,
    right: Vec3,
    up: Vec3,
    forward: Vec3,
    focal: f32,
    centre: Vec2,
}

/// Margin of the default framing around the bounding sphere.
const MARGIN: f64 = 1.12;

impl View {
    /// Checks the ranges: elevation within ±89°, field of view 1–150°, and
    /// a distance that keeps the eye outside the object.
    pub fn check(&self) -> Result<()> {
        if !(self.elevation_deg.abs() <= 89.0) {
            return Err(Error::invalid(
                "elevation_deg",
                self.elevation_deg,
                "must lie within ±89°",
            ));
        }
        if !(1.0..=150.0).contains(&self.fov_deg) {
            return Err(Error::invalid(
                "fov_deg",
                self.fov_deg,
                "must lie from 1° to 150°",
            ));
        }
        if !self.orbit_deg.is_finite() {
            return Err(Error::invalid(
                "orbit_deg",
                self.orbit_deg,
                "must be finite",
            ));
        }
        match self.distance {
            Some(d) if !(d > 1.05 && d <= 1e4) => Err(Error::invalid(
                "distance",
                d,
                "must exceed 1.05 (object radii) so the eye stays outside the object, and be at most 10000",
            )),
            _ => Ok(()),
        }
    }

    /// The distance used: as given, or the one at which the bounding sphere
    /// fills the field of view with a 12 % margin.
    pub fn distance(&self) -> f64 {
        self.distance
            .unwrap_or_else(|| MARGIN / (self.fov_deg.to_radians() / 2.0).sin())
    }
}

impl Camera {
    /// The camera of `view` for a `width` × `height` image.
    pub fn new(view: &View, width: u32, height: u32) -> Camera {
        let (orbit, elevation) = (view.orbit_deg.to_radians(), view.elevation_deg.to_radians());
        let eye = view.distance()
            * glam::DVec3::new(
                elevation.cos() * orbit.sin(),
                elevation.sin(),
                elevation.cos() * orbit.cos(),
            );
        let eye = eye.as_vec3();
        let forward = (-eye).normalize();
        let right = forward.cross(Vec3::Y).normalize();
        let up = right.cross(forward);
        let half = 0.5 * width.min(height) as f32;
        Camera {
            eye,
            right,
            up,
            forward,
            focal: half / (view.fov_deg.to_radians() as f32 / 2.0).tan(),
            centre: Vec2::new(width as f32, height as f32) / 2.0,
        }
    }

    /// A world direction given relative to the view: `azimuth_deg` to the
    /// right of the line of sight (seen from the object toward the eye) and
    /// `elevation_deg` above it.
    pub fn direction(&self, azimuth_deg: f64, elevation_deg: f64) -> Vec3 {
        let (az, el) = (
            azimuth_deg.to_radians() as f32,
            elevation_deg.to_radians() as f32,
        );
        (el.cos() * az.sin() * self.right + el.sin() * self.up - el.cos() * az.cos() * self.forward)
            .normalize()
    }

    /// Pixel coordinates and depth along the line of sight of a world point.
    pub fn project(&self, p: Vec3) -> (Vec2, f32) {
        let d = p - self.eye;
        let depth = d.dot(self.forward);
        let s = self.focal / depth;
        (
            self.centre + Vec2::new(d.dot(self.right) * s, -d.dot(self.up) * s),
            depth,
        )
    }

    /// Unit direction of the ray from the eye through pixel coordinates `at`.
    pub fn ray(&self, at: Vec2) -> Vec3 {
        let o = at - self.centre;
        (self.forward * self.focal + self.right * o.x - self.up * o.y).normalize()
    }

    /// Pixel radius of the silhouette of a sphere of radius `r` at the centre
    /// (perspective: tan(asin(r/d)) times the focal length).
    pub fn sphere_radius_px(&self, r: f32) -> f32 {
        let a = (r / self.eye.length()).asin();
        self.focal * a.tan()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn view() -> View {
        View {
            orbit_deg: 30.0,
            elevation_deg: 20.0,
            fov_deg: 30.0,
            distance: None,
        }
    }

    #[test]
    fn projection_and_rays_agree() {
        let cam = Camera::new(&view(), 200, 100);
        let (c, depth) = cam.project(Vec3::ZERO);
        assert!((c - Vec2::new(100.0, 50.0)).length() < 1e-4);
        assert!((depth - cam.eye.length()).abs() < 1e-4);
        let p = Vec3::new(0.3, -0.2, 0.5);
        let (px, _) = cam.project(p);
        let dir = cam.ray(px);
        assert!(dir.dot((p - cam.eye).normalize()) > 1.0 - 1e-6);
    }

    #[test]
    fn default_distance_frames_the_bounding_sphere() {
        let cam = Camera::new(&view(), 100, 100);
        let r = cam.sphere_radius_px(1.0);
        assert!(r < 50.0 && r > 40.0, "{r}");
        assert!(view().check().is_ok());
        let near = View {
            distance: Some(1.0),
            ..view()
        };
        assert!(near.check().is_err());
    }

    #[test]
    fn light_directions_follow_the_view() {
        let cam = Camera::new(&view(), 10, 10);
        let toward_eye = cam.direction(0.0, 0.0);
        assert!(toward_eye.dot(cam.eye.normalize()) > 1.0 - 1e-6);
        let above = cam.direction(0.0, 90.0);
        assert!(above.dot(cam.up) > 1.0 - 1e-6);
        let right = cam.direction(90.0, 0.0);
        assert!(right.dot(cam.right) > 1.0 - 1e-6);
    }
}
