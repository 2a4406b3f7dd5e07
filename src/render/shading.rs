//! Spectral shading through lookup tables. The film's reflectance R(θ) and
//! transmittance T(θ) are computed once on a fine angle grid from the real
//! multilayer, weighted by each light's spectrum and the observer into
//! linear display RGB per angle; a pixel then costs a few table look-ups,
//! whatever the number of layers or wavelengths.
//!
//! Radiance scale: a sky or disc light of intensity 1 renders a white diffuser
//! facing it at linear value 1 (Y = 100), so the mirror film in a sky of
//! intensity 1 renders at the R(θ)-weighted tristimulus values relative to
//! the light's white, exactly what `lamella color` reports at θ.

use glam::Vec3;
use rayon::prelude::*;

use super::camera::Camera;
use super::floor::Floor;
use super::pigment::{Body, Convert, Lobe};
use super::settings::{Base, Light, Settings, Source};
use super::surround::{Inputs, Surround, SurroundFrame};
use crate::angle_colour::{Side, Viewing};
use crate::colorimetry::{RgbDisplay, RgbSpace, Weights};
use crate::error::Result;
use crate::pigment::Model;
use crate::scene::{GRID_BYTES_PER_POINT, Scene};

/// Angle step of the reflectance tables in degrees.
pub(super) const STEP: f64 = 0.25;
/// The narrowest highlight: a directional light is drawn as a disc of 2°
/// (a point reflected in a mirror would cover no pixel).
const MIN_SLOPE: f32 = 0.008_727; // tan(0.5°), the Beckmann slope of a 2° disc
/// Angle step of the two-angle transmission tables in degrees.
const STEP_2D: f64 = 0.5;

/// Values on the grid 0, STEP, …, 90° with linear interpolation.
#[derive(Debug, Clone)]
pub(super) struct Table {
    pub(super) step: f32,
    pub(super) values: Vec<Vec3>,
}

impl Table {
    pub(super) fn at(&self, theta_deg: f32) -> Vec3 {
        let x = (theta_deg / self.step).clamp(0.0, (self.values.len() - 1) as f32);
        let i = (x as usize).min(self.values.len() - 2);
        let f = x - i as f32;
        self.values[i].lerp(self.values[i + 1], f)
    }
}

/// Values on a square grid of two angles (light, view) with bilinear interpolation.
#[derive(Debug, Clone)]
pub(super) struct Table2 {
    n: usize,
    values: Vec<Vec3>,
}

impl Table2 {
    pub(super) fn at(&self, a_deg: f32, b_deg: f32) -> Vec3 {
        let step = STEP_2D as f32;
        let last = (self.n - 1) as f32;
        let (x, y) = (
            (a_deg / step).clamp(0.0, last),
            (b_deg / step).clamp(0.0, last),
        );
        let (i, j) = ((x as usize).min(self.n - 2), (y as usize).min(self.n - 2));
        let (fx, fy) = (x - i as f32, y - j as f32);
        let v = |i: usize, j: usize| self.values[i * self.n + j];
        let lo = v(i, j).lerp(v(i, j + 1), fy);
        let hi = v(i + 1, j).lerp(v(i + 1, j + 1), fy);
        lo.lerp(hi, fx)
    }
}

/// One disc light's tables.
#[derive(Debug, Clone)]
struct Disc {
    azimuth_deg: f64,
    elevation_deg: f64,
    /// Beckmann rms slope of the highlight: roughness widened by the disc.
    slope: f32,
    /// Intensity × RGB of R(θ) under the light.
    reflect: Table,
    /// Intensity × RGB of T(θ_light)·T(θ_view), when the base is not black.
    through: Option<Table2>,
    /// The coating's lobe under this light, for a scene with a `coating`.
    lobe: Option<Lobe>,
}

/// The film's look-up tables for one scene and one set of settings.
pub struct Shader {
    /// Sky term per view angle: reflection averaged over the facet normals.
    sky: Option<Table>,
    /// Sky light transmitted to the base and back out, per view angle.
    sky_through: Option<Table>,
    discs: Vec<Disc>,
    base: Option<Vec3>,
    /// The coating's platelet model, for a scene with a `coating`.
    body: Option<Body>,
    /// The environment's part, if there is one.
    surround: Option<Surround>,
    /// Without an environment, a clear object's transmission of the scene's
    /// illuminant (one pass, two passes) and the radiance behind it: the
    /// backdrop plus every sky light.
    clear: Option<(Table, Table2, f32)>,
    /// Whether reflected light is shown.
    reflects: bool,
}

/// A spectrum per angle of the table grid.
pub(super) type PerAngle = Vec<Vec<f64>>;

/// RGB of T(θ_a)·T(θ_b) on the coarse grid of [`Table2`].
pub(super) fn products(t: &PerAngle, rgb: &Convert) -> Table2 {
    let every = (STEP_2D / STEP).round() as usize;
    let coarse: Vec<&Vec<f64>> = t.iter().step_by(every).collect();
    let n = coarse.len();
    let values = (0..n * n)
        .into_par_iter()
        .map(|ij| {
            let (a, b) = (coarse[ij / n], coarse[ij % n]);
            rgb(&a.iter().zip(b).map(|(x, y)| x * y).collect::<Vec<_>>())
        })
        .collect();
    Table2 { n, values }
}

/// R and T (unpolarized) per angle of the grid 0…90° in steps of `STEP`,
/// per wavelength. The last row is the grazing limit R = 1, T = 0, which any
/// stack reaches as cos θ₀ → 0 with a lossless incident medium (the Fresnel
/// coefficients of the first interface tend to −1; Born & Wolf, *Principles
/// of Optics*, 7th ed. 1999, §1.5.2).
/// With an analyser, R and T are the powers that pass it
/// ([`Viewing::fraction`]), from the Jones matrices.
fn film(scene: &Scene, body: Option<&Body>, viewing: &Viewing) -> Result<(PerAngle, PerAngle)> {
    let wl = &scene.wavelengths_nm;
    let n = (90.0 / STEP).round() as usize;
    let angles: Vec<f64> = (0..n).map(|i| i as f64 * STEP).collect();
    if let Some(body) = body {
        let mut r = body.gloss(&angles);
        r.push(vec![1.0; wl.len()]);
        return Ok((r, vec![vec![0.0; wl.len()]; n + 1]));
    }
    // The 4×4 path is costly: an anisotropic film is computed every 1° and
    // interpolated linearly onto the table's grid.
    let every = if scene.anisotropic() || viewing.analyzer.is_some() {
        (1.0 / STEP).round() as usize
    } else {
        1
    };
    let computed: Vec<f64> = angles.iter().step_by(every).copied().collect();
    let spectra = match viewing.analyzer {
        None => scene.spectra_at(&computed)?,
        Some(_) => scene.spectra_with_jones_at(&computed)?,
    };
    let side = |side| Viewing {
        side,
        ..viewing.clone()
    };
    let (reflect, transmit) = (side(Side::Reflect), side(Side::Transmit));
    let (r, t): (PerAngle, PerAngle) = (0..computed.len())
        .map(|a| match spectra.jones_at_angle(a) {
            Some(js) if viewing.analyzer.is_some() => (
                js.iter().map(|j| reflect.of_jones(j)).collect(),
                js.iter().map(|j| transmit.of_jones(j)).collect(),
            ),
            _ => {
                let rt = spectra.at_angle(a);
                (
                    rt.iter().map(|x| x.r()).collect(),
                    rt.iter().map(|x| x.t()).collect(),
                )
            }
        })
        .unzip();
    let onto_grid = |coarse: PerAngle, grazing: f64| -> PerAngle {
        let mut rows: PerAngle = (0..n)
            .map(|i| {
                let (k, f) = (i / every, (i % every) as f64 / every as f64);
                let next = coarse.get(k + 1);
                coarse[k]
                    .iter()
                    .enumerate()
                    .map(|(w, &a)| {
                        let b = next.map_or(grazing, |row| row[w]);
                        a + f * (b - a)
                    })
                    .collect()
            })
            .collect();
        rows.push(vec![grazing; wl.len()]);
        rows
    };
    Ok((onto_grid(r, 1.0), onto_grid(t, 0.0)))
}

/// Beckmann distribution of facet normals with rms slope `m` at cos θ_h
/// (P. Beckmann and A. Spizzichino, *The Scattering of Electromagnetic Waves
/// from Rough Surfaces*, 1963; normalised so that ∫ D cos θ_h dω = 1).
fn beckmann(cos_h: f32, m: f32) -> f32 {
    if cos_h <= 0.0 {
        return 0.0;
    }
    let c2 = cos_h * cos_h;
    let tan2 = (1.0 - c2) / c2;
    (-tan2 / (m * m)).exp() / (std::f32::consts::PI * m * m * c2 * c2)
}

/// Smith masking of the Beckmann distribution for a direction at cos θ from
/// the normal, by the rational approximation of B. Walter, S. R. Marschner,
/// H. Li, K. E. Torrance, "Microfacet models for refraction through rough
/// surfaces", EGSR 2007, eq. 27.
fn smith_g1(cos: f32, m: f32) -> f32 {
    let tan = (1.0 - cos * cos).max(0.0).sqrt() / cos.max(1e-6);
    let a = 1.0 / (m * tan).max(1e-12);
    if a >= 1.6 {
        1.0
    } else {
        (3.535 * a + 2.181 * a * a) / (1.0 + 2.276 * a + 2.577 * a * a)
    }
}

/// The mean of `reflect` over facet normals drawn from the Beckmann
/// distribution as seen from a view at each grid angle: facets weighted by
/// D(m) cos θ_m · max(0, m·v) (projected area of the visible facets; E. Heitz,
/// "Understanding the masking-shadowing function in microfacet-based BRDFs",
/// JCGT 3(2), 2014), each a mirror whose Fresnel angle is that between m and v.
pub(super) fn facet_average(reflect: &Table, m: f32) -> Table {
    let (n_theta, n_phi) = (64, 96);
    let top = (3.5 * m).atan().min(89.0f32.to_radians());
    let facets: Vec<(Vec3, f32)> = (0..n_theta)
        .flat_map(|i| {
            let t = top * (i as f32 + 0.5) / n_theta as f32;
            let w = beckmann(t.cos(), m) * t.cos() * t.sin();
            (0..n_phi).map(move |j| {
                let p = std::f32::consts::TAU * (j as f32 + 0.5) / n_phi as f32;
                (Vec3::new(t.sin() * p.cos(), t.sin() * p.sin(), t.cos()), w)
            })
        })
        .collect();
    let values = (0..reflect.values.len())
        .into_par_iter()
        .map(|k| {
            let tv = (k as f32 * reflect.step).to_radians();
            let v = Vec3::new(tv.sin(), 0.0, tv.cos());
            let (mut sum, mut weight) = (Vec3::ZERO, 0.0);
            for &(normal, w) in &facets {
                let c = normal.dot(v);
                if c > 0.0 {
                    sum += w * c * reflect.at(c.min(1.0).acos().to_degrees());
                    weight += w * c;
                }
            }
            sum / weight
        })
        .collect();
    Table {
        step: reflect.step,
        values,
    }
}

impl Shader {
    /// The tables for `scene` under `settings` (its lights, roughness and
    /// base). The display white is that of the scene's illuminant; every light
    /// is weighted with its own spectrum, normalised to Y = 100 for the
    /// perfect reflector, and adapted to D65 like `Colour::new`.
    ///
    /// A scene with a `coating` is shaded with its platelet model instead of
    /// the film: the binder surface's Fresnel reflection is the mirror (or
    /// rough) gloss, the platelets and the coating's own background add the
    /// body colour ([`super::pigment`]), and `base` is not used. A disc
    /// light's body colour is taken from its centre direction.
    pub fn new(scene: &Scene, settings: &Settings) -> Result<Shader> {
        let wl = &scene.wavelengths_nm;
        let viewing = Viewing {
            analyzer: settings.analyzer,
            ..Viewing::of_scene(scene)?
        };
        let display = RgbDisplay::new(viewing.weights(wl)?.white(), RgbSpace::Srgb);
        // The tables hold every wavelength at each table angle.
        scene.check_grid_size((90.0 / STEP) as usize + 1, GRID_BYTES_PER_POINT, "render")?;
        let body = match &scene.coating {
            None => None,
            Some(coating) => Some(Body::new(Model::new(scene, coating)?)),
        };
        let (r, t) = film(scene, body.as_ref(), &viewing)?;
        let slope = settings.roughness_deg.to_radians().tan() as f32;
        let mode = settings.mode;
        let base = match (settings.base, &body) {
            _ if mode.transmits() => None,
            (_, Some(_)) | (Base::Black, None) => None,
            (Base::Diffuse(rgb), None) => Some(Vec3::from(rgb.map(|c| c as f32))),
        };
        let surround = match &settings.environment {
            None => None,
            Some(env) => Some(Surround::new(
                env,
                Inputs {
                    r: &r,
                    t: &t,
                    slope,
                    base: base.is_some(),
                    body: body.as_ref(),
                    mode,
                    display_white: viewing.weights(wl)?.white(),
                    viewing: &viewing,
                    wavelengths_nm: wl,
                    floor: settings.floor,
                },
            )?),
        };
        let lights = settings
            .lights
            .iter()
            .map(|light| Ok((light_weights(light, &viewing, wl)?, light.intensity as f32)))
            .collect::<Result<Vec<_>>>()?;
        let converters: Vec<Box<Convert>> = lights
            .iter()
            .map(|(weights, k)| {
                let display = &display;
                Box::new(move |spectrum: &[f64]| {
                    *k * Vec3::from(display.linear(weights.xyz(spectrum)).map(|c| c as f32))
                }) as Box<Convert>
            })
            .collect();
        let mut lobes = match &body {
            Some(b) => b
                .lobes(&converters.iter().map(|c| c.as_ref()).collect::<Vec<_>>())
                .into_iter()
                .map(Some)
                .collect(),
            None => vec![None; lights.len()],
        };
        let scene_weights = viewing.weights(wl)?;
        let clear = (mode.transmits() && surround.is_none() && body.is_none()).then(|| {
            let rgb =
                |s: &[f64]| Vec3::from(display.linear(scene_weights.xyz(s)).map(|c| c as f32));
            let skies: f64 = settings
                .lights
                .iter()
                .filter(|l| l.source == Source::Sky)
                .map(|l| l.intensity)
                .sum();
            (
                Table {
                    step: STEP as f32,
                    values: t.par_iter().map(|s| rgb(s)).collect(),
                },
                products(&t, &rgb),
                super::tone::background(0.5).x + skies as f32,
            )
        });
        let mut shader = Shader {
            sky: None,
            sky_through: None,
            discs: Vec::new(),
            base,
            body: None,
            surround,
            clear,
            reflects: mode.reflects(),
        };
        for (index, light) in settings.lights.iter().enumerate() {
            let rgb = &converters[index];
            let lobe = lobes[index].take();
            let reflect = Table {
                step: STEP as f32,
                values: r.par_iter().map(|s| rgb(s)).collect(),
            };
            match light.source {
                Source::Sky => {
                    let sky = if slope > 0.0 {
                        facet_average(&reflect, slope)
                    } else {
                        reflect
                    };
                    add(&mut shader.sky, sky);
                    if let (Some(b), Some(lobe)) = (&body, &lobe) {
                        add(&mut shader.sky, b.sky(lobe, STEP));
                    }
                    if base.is_some() && body.is_none() {
                        let hemi = hemispherical(&t);
                        let values = t
                            .par_iter()
                            .map(|tv| {
                                rgb(&hemi.iter().zip(tv).map(|(a, b)| a * b).collect::<Vec<_>>())
                            })
                            .collect();
                        add(
                            &mut shader.sky_through,
                            Table {
                                step: STEP as f32,
                                values,
                            },
                        );
                    }
                }
                Source::Disc {
                    azimuth_deg,
                    elevation_deg,
                    size_deg,
                } => {
                    let half = (size_deg / 4.0).to_radians().tan() as f32;
                    let through = (base.is_some() && body.is_none()).then(|| products(&t, rgb));
                    shader.discs.push(Disc {
                        azimuth_deg,
                        elevation_deg,
                        slope: (slope * slope + half * half).sqrt().max(MIN_SLOPE),
                        reflect,
                        through,
                        lobe,
                    });
                }
            }
        }
        shader.body = body;
        Ok(shader)
    }

    /// The per-frame shading with the lights placed for `camera` (at
    /// `orbit_deg`, which turns the environment) and the floor's shadow.
    pub(super) fn frame<'a>(
        &'a self,
        camera: &'a Camera,
        orbit_deg: f64,
        floor: Option<&Floor>,
    ) -> Frame<'a> {
        Frame {
            shader: self,
            surround: self.surround.as_ref().map(|s| s.frame(orbit_deg, floor)),
            eye: camera.eye,
            directions: self
                .discs
                .iter()
                .map(|d| camera.direction(d.azimuth_deg, d.elevation_deg))
                .collect(),
        }
    }
}

/// The weights of a light's spectrum (the scene's illuminant by default).
fn light_weights(light: &Light, viewing: &Viewing, wl: &[f64]) -> Result<Weights> {
    match &light.illuminant {
        None => viewing.weights(wl),
        Some(illuminant) => Weights::new(wl, illuminant, viewing.observer),
    }
}

/// Adds a table into an optional sum (several skies add up).
fn add(sum: &mut Option<Table>, t: Table) {
    match sum {
        None => *sum = Some(t),
        Some(s) => s.values.iter_mut().zip(t.values).for_each(|(a, b)| *a += b),
    }
}

/// The fraction of a uniform sky's irradiance that the film transmits, per
/// wavelength: ∫ T(θ) sin 2θ dθ over 0…90° by the trapezoid rule (the
/// cosine-weighted hemispherical average; common practice).
pub(super) fn hemispherical(t: &[Vec<f64>]) -> Vec<f64> {
    let h = STEP.to_radians();
    let mut out = vec![0.0; t[0].len()];
    for (i, row) in t.iter().enumerate() {
        let theta = i as f64 * h;
        let w = if i == 0 || i + 1 == t.len() { 0.5 } else { 1.0 } * h * (2.0 * theta).sin();
        out.iter_mut().zip(row).for_each(|(o, x)| *o += w * x);
    }
    out
}

/// Shading for one camera position.
pub struct Frame<'a> {
    shader: &'a Shader,
    surround: Option<SurroundFrame<'a>>,
    eye: Vec3,
    directions: Vec<Vec3>,
}

impl Frame<'_> {
    /// Linear display RGB leaving a surface point toward the eye.
    ///
    /// Mirror or microfacet reflection off the film (Cook–Torrance form
    /// D·F·G / (4 cos θ_l cos θ_v) with the film's R at the facet angle as F:
    /// R. L. Cook and K. E. Torrance, "A reflectance model for computer
    /// graphics", ACM TOG 1(1), 1982), plus a Lambertian base lit by the
    /// light the film transmits and seen through it (single pass; common
    /// practice). A disc light of angular radius α widens the highlight as a
    /// Beckmann lobe of slope tan(α/2) would (peak radiance R·E/(π sin²α)
    /// for small α; common practice).
    ///
    /// With an environment its light is added ([`SurroundFrame::shade`]);
    /// on a clear object (transmission shown) `back` is the far side's
    /// surface, if the line of sight leaves through another one.
    pub fn shade(&self, position: Vec3, normal: Vec3, back: Option<(Vec3, Vec3)>) -> Vec3 {
        let s = self.shader;
        let v = (self.eye - position).normalize();
        let n = if normal.dot(v) < 0.0 { -normal } else { normal };
        let cos_v = n.dot(v).clamp(0.0, 1.0);
        let theta_v = cos_v.acos().to_degrees();
        let theta_back = back.map(|(p, nb)| {
            let vb = (self.eye - p).normalize();
            nb.dot(vb).abs().min(1.0).acos().to_degrees()
        });
        let mut rgb = Vec3::ZERO;
        if let Some(f) = &self.surround {
            rgb += f.shade(n, v, theta_v, theta_back, s.base);
        }
        if let Some((t1, t2, behind)) = &s.clear {
            rgb += *behind
                * match theta_back {
                    Some(b) => t2.at(theta_v, b),
                    None => t1.at(theta_v),
                };
        }
        if !s.reflects {
            return rgb;
        }
        rgb += s.sky.as_ref().map_or(Vec3::ZERO, |t| t.at(theta_v));
        if let (Some(base), Some(t)) = (s.base, &s.sky_through) {
            rgb += base * t.at(theta_v);
        }
        for (disc, &l) in s.discs.iter().zip(&self.directions) {
            let cos_l = n.dot(l);
            if cos_l <= 0.0 {
                continue;
            }
            if disc.slope > 0.0 && cos_v > 0.0 {
                let h = (l + v).normalize();
                let d = beckmann(n.dot(h), disc.slope);
                let g = smith_g1(cos_v, disc.slope) * smith_g1(cos_l, disc.slope);
                let theta_d = h.dot(v).clamp(0.0, 1.0).acos().to_degrees();
                rgb += (std::f32::consts::PI * d * g / (4.0 * cos_v)) * disc.reflect.at(theta_d);
            }
            if let (Some(base), Some(t)) = (s.base, &disc.through) {
                let theta_l = cos_l.min(1.0).acos().to_degrees();
                rgb += cos_l * base * t.at(theta_l, theta_v);
            }
            if let (Some(body), Some(lobe)) = (&s.body, &disc.lobe) {
                rgb += body.shade(lobe, n, l, v);
            }
        }
        rgb
    }

    /// What the eye sees along `dir` past the object: the environment (or
    /// the floor), or without one the grey backdrop at height `y` (0 at the
    /// top of the image, 1 at the bottom). The second value says whether the
    /// tone curve applies (it does to an environment, not to the backdrop).
    pub fn background(&self, dir: Vec3, y: f32) -> (Vec3, bool) {
        match &self.surround {
            Some(f) => (f.background(self.eye, dir), true),
            None => (super::tone::background(y), false),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn beckmann_is_normalised() {
        // ∫ D cos θ dω = 1 (Beckmann & Spizzichino 1963).
        for m in [0.05f32, 0.2, 0.5] {
            let n = 4000;
            let mut sum = 0.0f64;
            for i in 0..n {
                let t = (i as f32 + 0.5) / n as f32 * std::f32::consts::FRAC_PI_2;
                sum += (beckmann(t.cos(), m) * t.cos() * t.sin()) as f64;
            }
            sum *= std::f64::consts::TAU * std::f64::consts::FRAC_PI_2 / n as f64;
            assert!((sum - 1.0).abs() < 2e-3, "{m}: {sum}");
        }
    }

    #[test]
    fn facet_average_of_a_constant_is_that_constant() {
        let flat = Table {
            step: STEP as f32,
            values: vec![Vec3::new(0.2, 0.4, 0.6); 361],
        };
        let avg = facet_average(&flat, 0.3);
        for v in &avg.values {
            assert!((*v - Vec3::new(0.2, 0.4, 0.6)).length() < 1e-4, "{v}");
        }
    }

    #[test]
    fn tables_interpolate_linearly() {
        let t = Table {
            step: 0.5,
            values: vec![Vec3::ZERO, Vec3::ONE, Vec3::splat(3.0)],
        };
        assert_eq!(t.at(0.25), Vec3::splat(0.5));
        assert_eq!(t.at(0.75), Vec3::splat(2.0));
        assert_eq!(t.at(5.0), Vec3::splat(3.0));
    }
}
