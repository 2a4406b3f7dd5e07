//! Shading of an effect-pigment coating (a scene's `coating` section) from
//! its platelet model: the reflectance factor split as R_F = p(m)·F + G
//! ([`Model::reflectance_parts`]), with F and G weighted into linear RGB
//! per light on a grid of (θ_light, θ_view, Δφ) once, and the sharp density
//! of platelet normals p(m) evaluated per pixel. A pixel costs a table
//! look-up and one density evaluation per light, whatever the number of
//! layers, realisations or wavelengths.
//!
//! Radiance toward the eye under a directional light of intensity k (a
//! white diffuser facing it renders at k) is k·R_F·cos θ_light (R_F = π·BRDF;
//! CIE 015:2018 reflectance factor); under a uniform sky of intensity k it is
//! (k/π)∫R_F cos θ_i dω_i, integrated once per view angle.

use glam::Vec3;
use rayon::prelude::*;

use super::shading::Table;
use crate::pigment::Model;

/// Grid steps of the lobe tables in degrees: polar angles 0–90°, azimuth
/// difference 0–180°.
const STEP_THETA: f64 = 2.0;
const N_THETA: usize = 46;
const STEP_PHI: f64 = 5.0;
const N_PHI: usize = 37;
/// Quadrature nodes over the platelet normals (tilt × azimuth) for the sky.
const SKY_TILT_NODES: usize = 64;
const SKY_AZIMUTH_NODES: usize = 96;
/// Quadrature nodes over the illumination polar angle for the background's sky term.
const SKY_POLAR_NODES: usize = 90;

/// Linear RGB of a spectrum under one light (intensity included).
pub(super) type Convert<'a> = dyn Fn(&[f64]) -> Vec3 + Sync + 'a;

/// The unit vectors toward the light and the eye for polar angles `tl`,
/// `tv` and azimuth difference `dphi` (radians); Δφ = π is the mirror side.
fn pair(tl: f64, tv: f64, dphi: f64) -> ([f64; 3], [f64; 3]) {
    (
        [tl.sin(), 0.0, tl.cos()],
        [tv.sin() * dphi.cos(), tv.sin() * dphi.sin(), tv.cos()],
    )
}

/// F and G in linear RGB under one light on the (θ_l, θ_v, Δφ) grid.
#[derive(Debug, Clone)]
pub(super) struct Lobe {
    values: Vec<(Vec3, Vec3)>,
}

impl Lobe {
    /// Trilinear interpolation at angles in degrees.
    fn at(&self, tl: f64, tv: f64, dphi: f64) -> (Vec3, Vec3) {
        let cell = |x: f64, step: f64, n: usize| {
            let x = (x / step).clamp(0.0, (n - 1) as f64);
            let i = (x as usize).min(n - 2);
            (i, (x - i as f64) as f32)
        };
        let (i, fi) = cell(tl, STEP_THETA, N_THETA);
        let (j, fj) = cell(tv, STEP_THETA, N_THETA);
        let (k, fk) = cell(dphi, STEP_PHI, N_PHI);
        let (mut f, mut g) = (Vec3::ZERO, Vec3::ZERO);
        for (di, wi) in [(0, 1.0 - fi), (1, fi)] {
            for (dj, wj) in [(0, 1.0 - fj), (1, fj)] {
                for (dk, wk) in [(0, 1.0 - fk), (1, fk)] {
                    let w = wi * wj * wk;
                    let (a, b) = self.values[((i + di) * N_THETA + j + dj) * N_PHI + k + dk];
                    f += w * a;
                    g += w * b;
                }
            }
        }
        (f, g)
    }
}

/// The coating's model with the reference index for the per-pixel density.
#[derive(Debug, Clone)]
pub(super) struct Body {
    model: Model,
    n_ref: f64,
}

impl Body {
    /// The binder index nearest 560 nm serves as the reference (exact for a
    /// non-dispersive binder).
    pub(super) fn new(model: Model) -> Body {
        let wl = model.wavelengths_nm();
        let nearest = (0..wl.len())
            .min_by(|&a, &b| (wl[a] - 560.0).abs().total_cmp(&(wl[b] - 560.0).abs()))
            .expect("a wavelength grid");
        let n_ref = model.binder_index()[nearest];
        Body { model, n_ref }
    }

    /// The surface gloss R(θ) (unpolarized Fresnel reflectance of the binder
    /// surface) per angle of `angles_deg`, per wavelength.
    pub(super) fn gloss(&self, angles_deg: &[f64]) -> Vec<Vec<f64>> {
        angles_deg
            .iter()
            .map(|&a| self.model.surface_reflectance(a))
            .collect()
    }

    /// One lobe table per light, spectra computed once for all lights.
    pub(super) fn lobes(&self, lights: &[&Convert]) -> Vec<Lobe> {
        let nw = self.model.wavelengths_nm().len();
        let rows: Vec<Vec<(Vec3, Vec3)>> = (0..N_THETA * N_THETA * N_PHI)
            .into_par_iter()
            .map_init(
                || (vec![0.0; nw], vec![0.0; nw]),
                |(f, g), e| {
                    let (i, j, k) = (e / (N_THETA * N_PHI), (e / N_PHI) % N_THETA, e % N_PHI);
                    let (ill, det) = pair(
                        (i as f64 * STEP_THETA).to_radians(),
                        (j as f64 * STEP_THETA).to_radians(),
                        (k as f64 * STEP_PHI).to_radians(),
                    );
                    self.model.reflectance_parts(ill, det, f, g);
                    lights.iter().map(|c| (c(f), c(g))).collect()
                },
            )
            .collect();
        (0..lights.len())
            .map(|l| Lobe {
                values: rows.iter().map(|r| r[l]).collect(),
            })
            .collect()
    }

    /// p(m) for the pair of directions.
    fn density(&self, ill: [f64; 3], det: [f64; 3]) -> f64 {
        self.model.normal_density(self.n_ref, ill, det)
    }

    /// The radiance under a uniform sky of intensity 1 (its RGB in `lobe`)
    /// per view angle 0–90° in steps of `step` degrees: (1/π)∫(p F + G) cos θ_i
    /// dω_i. The platelet part is integrated over the platelet normals m
    /// (ω_i' the mirror image of ω_o' in m; cos θ_i dω_i = n² cos θ_i' dω_i',
    /// the invariance of n² cos θ dω across a refracting surface, Nicodemus,
    /// "Radiance", Am. J. Phys. 31, 368, 1963; dω_i' = 4 (ω_o'·m) dω_m,
    /// Walter et al., EGSR 2007, eq. 14), so narrow tilt spreads are resolved.
    pub(super) fn sky(&self, lobe: &Lobe, step: f64) -> Table {
        let n = self.n_ref;
        let top = self.model.max_tilt_deg().to_radians();
        let (dt, dpsi) = (
            top / SKY_TILT_NODES as f64,
            std::f64::consts::TAU / SKY_AZIMUTH_NODES as f64,
        );
        let count = (90.0 / step).round() as usize + 1;
        let values = (0..count)
            .into_par_iter()
            .map(|a| {
                let tv = (a as f64 * step).min(89.9).to_radians();
                let det = [tv.sin(), 0.0, tv.cos()];
                let out = [det[0] / n, 0.0, (1.0 - (det[0] / n).powi(2)).sqrt()];
                let mut sum = Vec3::ZERO;
                for it in 0..SKY_TILT_NODES {
                    let t = (it as f64 + 0.5) * dt;
                    for ip in 0..SKY_AZIMUTH_NODES {
                        let psi = (ip as f64 + 0.5) * dpsi;
                        let m = [t.sin() * psi.cos(), t.sin() * psi.sin(), t.cos()];
                        let c = out[0] * m[0] + out[2] * m[2];
                        let inside = [
                            2.0 * c * m[0] - out[0],
                            2.0 * c * m[1],
                            2.0 * c * m[2] - out[2],
                        ];
                        let (x, y) = (inside[0] * n, inside[1] * n);
                        if c <= 0.0 || inside[2] <= 0.0 || x * x + y * y >= 1.0 {
                            continue;
                        }
                        let ill = [x, y, (1.0 - x * x - y * y).sqrt()];
                        let (f, _) = lobe.at(
                            ill[2].acos().to_degrees(),
                            tv.to_degrees(),
                            y.atan2(x).abs().to_degrees(),
                        );
                        let w = self.density(ill, det)
                            * n
                            * n
                            * inside[2]
                            * 4.0
                            * c
                            * t.sin()
                            * dt
                            * dpsi;
                        sum += w as f32 * f;
                    }
                }
                // The background: G has no azimuth dependence.
                let dp = std::f64::consts::FRAC_PI_2 / SKY_POLAR_NODES as f64;
                for k in 0..SKY_POLAR_NODES {
                    let ti = (k as f64 + 0.5) * dp;
                    let (_, g) = lobe.at(ti.to_degrees(), tv.to_degrees(), 0.0);
                    sum += (std::f64::consts::TAU * ti.cos() * ti.sin() * dp) as f32 * g;
                }
                sum / std::f32::consts::PI
            })
            .collect();
        Table {
            step: step as f32,
            values,
        }
    }

    /// Radiance toward `v` from a directional light along `l` of the lobe's
    /// light, on a surface with normal `n` (all unit vectors, `l` and `v`
    /// above the surface).
    pub(super) fn shade(&self, lobe: &Lobe, n: Vec3, l: Vec3, v: Vec3) -> Vec3 {
        let (cos_l, cos_v) = (n.dot(l).clamp(0.0, 1.0), n.dot(v).clamp(0.0, 1.0));
        let (tl, tv) = (cos_l.acos() as f64, cos_v.acos() as f64);
        let (pl, pv) = (l - n * cos_l, v - n * cos_v);
        let dphi = if pl.length_squared() > 1e-12 && pv.length_squared() > 1e-12 {
            pl.normalize().dot(pv.normalize()).clamp(-1.0, 1.0).acos() as f64
        } else {
            0.0
        };
        let (ill, det) = pair(tl, tv, dphi);
        let (f, g) = lobe.at(tl.to_degrees(), tv.to_degrees(), dphi.to_degrees());
        cos_l * (self.density(ill, det) as f32 * f + g)
    }
}
