//! Image-based lighting: the film's colour tables per region of the
//! environment, the environment's maps (sharp, blurred for rough films,
//! irradiance for diffuse light), and the floor that replaces the lower
//! hemisphere when there is one.
//!
//! A mirror film toward the eye at angle θ shows the environment's radiance
//! L(r) in the mirror direction r times R(θ); per region i with spectrum
//! S_i(λ) and scalar radiance L_i(r), the pixel is Σ_i L_i(r)·RGB[R(θ,λ) S_i(λ)],
//! so a few tables hold the whole spectral product. A rough film uses the
//! facet-averaged table with the environment blurred by the reflection lobe
//! (the split-sum approximation: B. Karis, "Real shading in Unreal Engine 4",
//! SIGGRAPH 2013 course notes). Transmitted light comes straight through a
//! thin clear shell: L_i(−v)·RGB[T(θ_front)·T(θ_back)·S_i] for a closed
//! object, one pass for an open one.

use glam::{Mat3, Vec3};
use rayon::prelude::*;

use super::environment::{BAKE_WIDTH, Baked, Environment};
use super::floor::{Floor, FloorFrame};
use super::maps::{Maps, Texel};
use super::pigment::{Body, Convert};
use super::settings::ViewMode;
use super::shading::{PerAngle, STEP, Table, Table2, facet_average, hemispherical, products};
use crate::angle_colour::Viewing;
use crate::colorimetry::{RgbDisplay, RgbSpace, Weights};
use crate::error::{Error, Result};

/// One region's light as linear display RGB of a spectrum.
type Region = Box<Convert<'static>>;

/// The environment's part of the shading.
pub(super) struct Surround {
    whites: Vec<Vec3>,
    sharp: Maps,
    blurred: Option<Maps>,
    irradiance: Maps,
    coarse: Maps,
    reflect: Vec<Table>,
    through: Vec<Table>,
    body_sky: Vec<Table>,
    transmit: Vec<(Table, Table2)>,
    mode: ViewMode,
}

/// What [`Surround::new`] needs from the shader.
pub(super) struct Inputs<'a> {
    pub(super) r: &'a PerAngle,
    pub(super) t: &'a PerAngle,
    pub(super) slope: f32,
    pub(super) base: bool,
    pub(super) body: Option<&'a Body>,
    pub(super) mode: ViewMode,
    /// The display's white (the scene's illuminant, for [`RgbDisplay::new`]).
    pub(super) display_white: [f64; 3],
    pub(super) viewing: &'a Viewing,
    pub(super) wavelengths_nm: &'a [f64],
    pub(super) floor: Option<f64>,
}

impl Surround {
    /// The maps and tables of `env` for the film `r`, `t`.
    pub(super) fn new(env: &Environment, x: Inputs) -> Result<Surround> {
        Surround::from_baked(env, env.bake(BAKE_WIDTH), x)
    }

    /// [`Surround::new`] from `env` baked.
    fn from_baked(env: &Environment, baked: Baked, x: Inputs) -> Result<Surround> {
        let wl = x.wavelengths_nm;
        let regions: Vec<Region> = baked
            .regions
            .iter()
            .map(|region| {
                let weights = match &region.illuminant {
                    None => x.viewing.weights(wl)?,
                    Some(i) => Weights::new(wl, i, x.viewing.observer)?,
                };
                let mask: Vec<f64> = wl
                    .iter()
                    .map(|&l| match region.band_nm {
                        Some((a, b)) if !(a..b).contains(&l) => 0.0,
                        _ => 1.0,
                    })
                    .collect();
                let display = RgbDisplay::new(x.display_white, RgbSpace::Srgb);
                Ok(Box::new(move |s: &[f64]| {
                    let cut: Vec<f64> = s.iter().zip(&mask).map(|(a, m)| a * m).collect();
                    Vec3::from(display.linear(weights.xyz(&cut)).map(|c| c as f32))
                }) as Region)
            })
            .collect::<Result<_>>()?;
        let ones = vec![1.0; wl.len()];
        let whites: Vec<Vec3> = regions.iter().map(|c| c(&ones)).collect();
        let mut maps = baked.maps;
        if baked.is_image {
            // Pixel RGB → weights of the three band spectra: the bands'
            // own colours are the columns of M, so (1, 1, 1) stays the white.
            let m = Mat3::from_cols(whites[0], whites[1], whites[2]);
            if m.determinant().abs() < 1e-6 {
                return Err(Error::invalid(
                    "environment",
                    env.describe(),
                    "the image's white gives no colour in some band on this wavelength grid",
                ));
            }
            let inv = m.inverse();
            maps.values
                .par_iter_mut()
                .for_each(|v| *v = (inv * Vec3::from(*v)).to_array());
        }
        if let Some(albedo) = x.floor {
            // Below the horizon: the floor, lit by the sky above it.
            let e = maps.irradiance().at(Vec3::Y).map(|v| v * albedo as f32);
            for row in 0..maps.height {
                if maps.direction(0, row).y < 0.0 {
                    let w = maps.width;
                    maps.values[row * w..(row + 1) * w].fill(e);
                }
            }
        }
        let irradiance = maps.irradiance();
        let mut coarse = maps.clone();
        while coarse.width > 64 {
            coarse = coarse.halved();
        }
        let blurred = (x.slope > 0.0).then(|| maps.blurred(std::f32::consts::SQRT_2 * x.slope));
        let table = |values: Vec<Vec3>| Table {
            step: STEP as f32,
            values,
        };
        let reflect = regions
            .iter()
            .map(|c| {
                let t = table(x.r.par_iter().map(|s| c(s)).collect());
                if x.slope > 0.0 {
                    facet_average(&t, x.slope)
                } else {
                    t
                }
            })
            .collect();
        let through = if x.base && x.body.is_none() && !x.mode.transmits() {
            let hemi = hemispherical(x.t);
            regions
                .iter()
                .map(|c| {
                    table(
                        x.t.par_iter()
                            .map(|tv| {
                                c(&hemi.iter().zip(tv).map(|(a, b)| a * b).collect::<Vec<_>>())
                            })
                            .collect(),
                    )
                })
                .collect()
        } else {
            Vec::new()
        };
        let body_sky = match x.body {
            Some(body) => {
                let refs: Vec<&Convert> = regions.iter().map(|c| c.as_ref()).collect();
                body.lobes(&refs)
                    .iter()
                    .map(|lobe| body.sky(lobe, STEP))
                    .collect()
            }
            None => Vec::new(),
        };
        let transmit = if x.mode.transmits() && x.body.is_none() {
            regions
                .iter()
                .map(|c| {
                    (
                        table(x.t.par_iter().map(|s| c(s)).collect()),
                        products(x.t, c),
                    )
                })
                .collect()
        } else {
            Vec::new()
        };
        Ok(Surround {
            whites,
            sharp: maps,
            blurred,
            irradiance,
            coarse,
            reflect,
            through,
            body_sky,
            transmit,
            mode: x.mode,
        })
    }

    /// The shading for a camera at `orbit_deg`, with the floor's shadow.
    pub(super) fn frame(&self, orbit_deg: f64, floor: Option<&Floor>) -> SurroundFrame<'_> {
        let to_env = Mat3::from_rotation_y(-(orbit_deg.to_radians() as f32));
        SurroundFrame {
            surround: self,
            to_env,
            floor: floor.map(|f| (f.y, f.frame(&self.coarse, to_env))),
        }
    }
}

/// Distances from the object's centre (object radii) over which the floor
/// fades into the horizon.
const FADE_FROM: f32 = 2.5;
const FADE_TO: f32 = 9.0;
/// The lowest direction (its y) at which the backdrop above a floor is read.
const HORIZON: f32 = 0.02;

/// The environment placed for one frame.
pub(super) struct SurroundFrame<'a> {
    surround: &'a Surround,
    to_env: Mat3,
    floor: Option<(f32, FloorFrame)>,
}

fn sum(v: Texel, tables: impl Iterator<Item = Vec3>) -> Vec3 {
    tables.zip(v).fold(Vec3::ZERO, |acc, (t, w)| acc + w * t)
}

impl SurroundFrame<'_> {
    /// Light from the environment leaving a surface point with normal `n`
    /// (facing the eye) toward the eye along `v`; `theta_v` the angle
    /// between them in degrees, `theta_back` the angle at the far side of a
    /// closed clear object, `base` the diffuse colour under the film.
    pub(super) fn shade(
        &self,
        n: Vec3,
        v: Vec3,
        theta_v: f32,
        theta_back: Option<f32>,
        base: Option<Vec3>,
    ) -> Vec3 {
        let s = self.surround;
        let lobe = s.blurred.as_ref().unwrap_or(&s.sharp);
        let mut rgb = Vec3::ZERO;
        if s.mode.reflects() {
            let r = 2.0 * n.dot(v) * n - v;
            let l = lobe.at(self.to_env * r);
            rgb += sum(l, s.reflect.iter().map(|t| t.at(theta_v)));
        }
        if !s.through.is_empty() || !s.body_sky.is_empty() {
            let e = s.irradiance.at(self.to_env * n);
            if let Some(base) = base {
                rgb += base * sum(e, s.through.iter().map(|t| t.at(theta_v)));
            }
            rgb += sum(e, s.body_sky.iter().map(|t| t.at(theta_v)));
        }
        if !s.transmit.is_empty() {
            let l = lobe.at(self.to_env * -v);
            rgb += match theta_back {
                Some(b) => sum(l, s.transmit.iter().map(|(_, t2)| t2.at(theta_v, b))),
                None => sum(l, s.transmit.iter().map(|(t1, _)| t1.at(theta_v))),
            };
        }
        rgb
    }

    /// What the eye at `eye` sees along `dir` past the object: the floor
    /// (with its shadow) or the environment.
    pub(super) fn background(&self, eye: Vec3, dir: Vec3) -> Vec3 {
        let s = self.surround;
        if let Some((y, floor)) = &self.floor
            && dir.y < 0.0
        {
            let t = (y - eye.y) / dir.y;
            if t > 0.0 {
                // Far away the floor fades into the environment just above
                // the horizon, so floor and backdrop meet without an edge.
                let p = eye + t * dir;
                let far = ((p.x * p.x + p.z * p.z).sqrt() - FADE_FROM) / (FADE_TO - FADE_FROM);
                let w = far.clamp(0.0, 1.0);
                let horizon = || {
                    let level = Vec3::new(dir.x, HORIZON, dir.z).normalize();
                    s.sharp.at(self.to_env * level)
                };
                let mixed: Texel = if w <= 0.0 {
                    floor.at(p)
                } else if w >= 1.0 {
                    horizon()
                } else {
                    let (near, far) = (floor.at(p), horizon());
                    std::array::from_fn(|c| near[c] + w * (far[c] - near[c]))
                };
                return sum(mixed, s.whites.iter().copied());
            }
        }
        // Just above the horizon, the texels below it (the floor's own
        // radiance) would bleed into the bilinear look-up.
        let dir = match &self.floor {
            Some(_) if dir.y < HORIZON => Vec3::new(dir.x, HORIZON, dir.z).normalize(),
            _ => dir,
        };
        sum(s.sharp.at(self.to_env * dir), s.whites.iter().copied())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::colorimetry::{
        Colour, ColourOptions, delta_e2000, rgb_to_xyz_under, srgb_encode, xyz_to_lab,
    };
    use crate::render::environment::{EnvImage, Procedural, STUDIO_NAMES};
    use crate::scene::Scene;

    const FILM: &str = r#"{"stack": [{"repeat": 2, "stack": [
        {"material": "hi", "thickness_nm": 62}, {"material": "lo", "thickness_nm": 100}]},
        {"material": "hi", "thickness_nm": 62}],
        "substrate": "glass",
        "materials": {"hi": {"n": 2.35, "k": 0}, "lo": {"n": 1.46, "k": 0}, "glass": {"n": 1.52, "k": 0}},
        "wavelengths_nm": {"from": 380, "to": 780, "step": 5}}"#;

    /// Physics check of the whole environment path: every built-in
    /// environment (and an image) with its regions, maps and tables, its
    /// radiance made uniform white (the main region at 1, the others dark;
    /// an image at RGB 1), shows a mirror film at view angle θ (reflected)
    /// and a clear one (transmitted) as `lamella color` reports at θ on
    /// that side, within ΔE00 1 (CIEDE2000, CIE 015:2018), with and without
    /// a white floor (which then sends the same radiance).
    #[test]
    fn every_environment_reduced_to_uniform_white_shows_the_colour_of_lamella_color() {
        let scene = Scene::from_json(FILM, &|_: &str| Err("no files".to_string())).unwrap();
        let viewing = Viewing::of_scene(&scene).unwrap();
        let wl = &scene.wavelengths_nm;
        let weights = viewing.weights(wl).unwrap();
        let n = (90.0 / STEP).round() as usize;
        let angles: Vec<f64> = (0..n).map(|i| i as f64 * STEP).collect();
        let spectra = scene.spectra_at(&angles).unwrap();
        let (mut r, mut t): (PerAngle, PerAngle) = (0..n)
            .map(|a| {
                let rt = spectra.at_angle(a);
                (
                    rt.iter().map(|x| x.r()).collect(),
                    rt.iter().map(|x| x.t()).collect(),
                )
            })
            .unzip();
        r.push(vec![1.0; wl.len()]);
        t.push(vec![0.0; wl.len()]);
        let lab = |rgb: [f64; 3]| {
            xyz_to_lab(
                rgb_to_xyz_under(rgb, weights.white(), RgbSpace::Srgb),
                weights.white(),
            )
        };
        let mut envs: Vec<Environment> = STUDIO_NAMES
            .iter()
            .map(|n| Environment::Procedural(n.parse::<Procedural>().unwrap()))
            .collect();
        let d65 = crate::colorimetry::Illuminant::builtin("D65").unwrap();
        envs.push(Environment::Image(std::sync::Arc::new(
            EnvImage::new("test", (8, 4), vec![0.3; 96], d65).unwrap(),
        )));
        let mut worst = 0.0f64;
        for env in &envs {
            for (mode, floor) in [
                (ViewMode::Reflect, None),
                (ViewMode::Reflect, Some(1.0)),
                (ViewMode::Transmit, None),
            ] {
                let mut baked = env.bake(64);
                let white = if baked.is_image {
                    [1.0; 3]
                } else {
                    [1.0, 0.0, 0.0]
                };
                baked.maps.values.fill(white);
                let inputs = Inputs {
                    r: &r,
                    t: &t,
                    slope: 0.0,
                    base: false,
                    body: None,
                    mode,
                    display_white: weights.white(),
                    viewing: &viewing,
                    wavelengths_nm: wl,
                    floor,
                };
                let surround = Surround::from_baked(env, baked, inputs).unwrap();
                let frame = surround.frame(30.0, None);
                for theta in [0.0f64, 20.0, 45.0, 70.0] {
                    let rad = theta.to_radians() as f32;
                    let v = Vec3::new(rad.sin(), 0.3 * rad.cos(), rad.cos()).normalize();
                    let n = Vec3::new(0.0, 0.3, 1.0).normalize();
                    let theta_v = n.dot(v).acos().to_degrees();
                    let got = frame.shade(n, v, theta_v, None, None);
                    let spectra = scene.spectra_at(&[theta_v as f64]).unwrap();
                    let side: Vec<f64> = spectra
                        .at_angle(0)
                        .iter()
                        .map(|x| if mode.reflects() { x.r() } else { x.t() })
                        .collect();
                    let want = Colour::new(
                        weights.xyz(&side),
                        weights.white(),
                        &ColourOptions::default(),
                    );
                    let got = got
                        .to_array()
                        .map(|c| srgb_encode((c as f64).clamp(0.0, 1.0)));
                    let de = delta_e2000(lab(got), lab(want.rgb));
                    assert!(
                        de <= 1.0,
                        "{} {mode:?} {floor:?} θ {theta_v}: ΔE00 {de}",
                        env.describe()
                    );
                    worst = worst.max(de);
                }
            }
        }
        eprintln!("worst ΔE00 over the environments reduced to uniform white: {worst:.3}");
    }
}
