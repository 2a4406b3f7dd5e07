//! Radiative model of an effect-pigment coating: platelets (thin-film stacks)
//! with a spread of orientations in a clear binder over a diffuse background.
//!
//! The quantity computed is the **reflectance factor** R_F(λ) of the coating
//! for one illumination direction ω_i and one detection direction ω_o: the
//! radiance from the sample divided by the radiance a perfect reflecting
//! diffuser would send toward ω_o under the same irradiance (CIE 015:2018,
//! reflectance factor), i.e. R_F = π·f_r with f_r the BRDF in air. So Y = 100
//! is the perfect white diffuser; near the platelets' mirror directions R_F
//! can exceed 1.
//!
//! Terms (all per wavelength; n the binder index, primes for directions
//! inside the binder, μ' = cos θ'):
//!
//! 1. **Binder surface.** Both directions refract by Snell's law
//!    (sin θ = n sin θ'). The power transmittances T_s, T_p of the flat top
//!    surface follow from the Fresnel coefficients (Born & Wolf, *Principles
//!    of Optics*, 7th ed. 1999, §1.5.2–1.5.3), equal in both directions.
//!    Radiance crossing the surface keeps L/n² times T (Nicodemus,
//!    "Radiance", Am. J. Phys. 31, 368, 1963), so leaving the binder costs a
//!    factor T/n². The surface's own mirror reflection (gloss) goes only to
//!    the exact specular direction and is excluded from R_F, as instruments
//!    exclude it; [`Model::surface_reflectance`] reports it separately.
//! 2. **Platelet reflection (single scattering).** The platelet that sends
//!    ω_i' into ω_o' has normal m = (ω_i' + ω_o')/|ω_i' + ω_o'| and is hit at
//!    cos θ_d = ω_i'·m. With p(m) the density of platelet normals per unit
//!    solid angle (∫ p dω = 1) and c the platelet area per unit coating
//!    area, the half-vector Jacobian dω_m/dω_o = 1/(4 cos θ_d) (Torrance &
//!    Sparrow, JOSA 57, 1105, 1967; Walter et al., "Microfacet models for
//!    refraction through rough surfaces", EGSR 2007, eq. 14) gives the BRDF
//!    inside the binder f' = c_eff p(m) Q / (4 μ_i' μ_o'), where Q is the
//!    platelet reflectance R(θ_d) with the surface transmittances on the way
//!    in and out, per polarization:
//!    Q = ½ Σ T_out·C(β)·R·C(α)·T_in, with C the intensity rotation between the
//!    s/p frames of the surface and of the platelet (exact in the plane of
//!    incidence; out of it the coherence between s and p is neglected). With
//!    the surface: R_F,platelet = π c_eff p(m) Q / (4 n² μ_i' μ_o').
//! 3. **Attenuation in the platelet layer.** Platelets sit at random depths
//!    (Poisson overlaps). A ray along ω' is removed from the direct beam by
//!    reflection or absorption in the platelets it crosses, at the rate
//!    a(ω') = (1/μ') ∫ |ω'·m| p(m) (1 − T_pl(θ_d)) dω_m per unit c
//!    (platelet transmission goes straight on). The single-scattering
//!    depth integral for a plane-parallel layer (Chandrasekhar, *Radiative
//!    Transfer*, 1960, ch. I) turns c into
//!    c_eff = (1 − e^{−c(a_i + a_o)}) / (a_i + a_o); light scattered by more
//!    than one platelet is neglected.
//! 4. **Background.** A Lambertian reflector of reflectance ρ under the
//!    platelet layer, reached with transmittance t(ω') = e^{−c a(ω')} each
//!    way: R_F,background = ρ M T_in t_i t_o T_out / n² (unpolarized T), with
//!    the diffuse interreflection between background and the inside of the
//!    top surface M = 1 / (1 − ρ r_i t_d²) (Saunderson, JOSA 32, 727, 1942),
//!    r_i the cosine-weighted internal reflectance of the surface (total
//!    internal reflection included) and t_d the cosine-weighted mean of
//!    t(ω') (t_d² stands in for the mean of t² over the diffuse round trip,
//!    an approximation). Platelet scattering of that diffuse light is neglected.
//!
//! Every term is symmetric in ω_i and ω_o, so R_F obeys Helmholtz
//! reciprocity. Platelets lie face up or face down with equal probability: for
//! an asymmetric stack R and T are the means over both faces. The binder is
//! lossless; its thickness does not enter.
//!
//! Cost: the platelet's R and T are computed once on a grid of internal
//! angles (every [`TABLE_STEP_DEG`]°, quadratic interpolation) and the extinction a(θ') on a coarser
//! grid, so one geometry costs a few dozen operations per wavelength. A
//! [`Template`] for a few geometries computes only the table nodes they read,
//! which is what design tools evaluating thousands of platelets use.

use std::f64::consts::PI;

use num_complex::Complex64;
use rayon::prelude::*;

use super::coating::{Coating, Orientation, interpolate};
use super::geometry::Geometry;
use crate::error::{Error, Result};
use crate::optics::{self, Exit, Node, Rt, Stack};
use crate::scene::{Item, Scene, realise};

/// Step of the platelet reflectance table in internal angle, degrees.
pub const TABLE_STEP_DEG: f64 = 0.5;
const TABLE_ANGLES: usize = 180;
/// Step of the extinction table in internal polar angle, degrees (0–90).
const EXTINCTION_STEP_DEG: f64 = 2.0;
const EXTINCTION_ANGLES: usize = 46;
/// Quadrature nodes over platelet tilt and azimuth for the extinction.
const TILT_NODES: usize = 24;
const AZIMUTH_NODES: usize = 24;

/// Power transmittances (T_s, T_p) of a flat interface between lossless
/// media n1 → n2 for cos θ1 and cos θ2 (Fresnel equations, Born & Wolf,
/// *Principles of Optics*, 7th ed. 1999, §1.5.2–1.5.3); T = 1 − R.
fn fresnel_t(n1: f64, n2: f64, c1: f64, c2: f64) -> (f64, f64) {
    let rs = (n1 * c1 - n2 * c2) / (n1 * c1 + n2 * c2);
    let rp = (n2 * c1 - n1 * c2) / (n2 * c1 + n1 * c2);
    (1.0 - rs * rs, 1.0 - rp * rp)
}

/// Unpolarized reflectance of the binder's top surface seen from inside at
/// cos θ' = `mu` (1 beyond the critical angle; Born & Wolf §1.5.4).
fn internal_reflectance(n: f64, mu: f64) -> f64 {
    let s2 = n * n * (1.0 - mu * mu);
    if s2 >= 1.0 {
        return 1.0;
    }
    let (ts, tp) = fresnel_t(n, 1.0, mu, (1.0 - s2).sqrt());
    1.0 - 0.5 * (ts + tp)
}

/// The normalised density of platelet normals per unit solid angle.
#[derive(Debug, Clone)]
struct Density {
    orientation: Orientation,
    max_tilt: f64,
    inv_norm: f64,
}

impl Density {
    fn new(orientation: &Orientation) -> Density {
        let max_tilt = match orientation {
            Orientation::Gaussian { sigma_deg } => (6.0 * sigma_deg.to_radians()).min(PI / 2.0),
            Orientation::Density(points) => points[points.len() - 1].0.to_radians(),
        };
        let mut d = Density {
            orientation: orientation.clone(),
            max_tilt,
            inv_norm: 1.0,
        };
        // 2π ∫ p sin θ dθ by the midpoint rule on a fine grid.
        let n = 4000;
        let h = max_tilt / n as f64;
        let norm: f64 = (0..n)
            .map(|k| {
                let t = (k as f64 + 0.5) * h;
                d.raw(t) * t.sin()
            })
            .sum::<f64>()
            * h
            * 2.0
            * PI;
        d.inv_norm = 1.0 / norm;
        d
    }

    fn raw(&self, tilt: f64) -> f64 {
        if tilt > self.max_tilt {
            return 0.0;
        }
        match &self.orientation {
            Orientation::Gaussian { sigma_deg } => {
                let s = sigma_deg.to_radians();
                (-0.5 * (tilt / s).powi(2)).exp()
            }
            Orientation::Density(points) => interpolate(points, tilt.to_degrees()).unwrap_or(0.0),
        }
    }

    /// p at this tilt (radians), per steradian.
    fn at(&self, tilt: f64) -> f64 {
        self.raw(tilt) * self.inv_norm
    }
}

/// The platelet's R and T (both polarizations) with the binder on both
/// sides, on a grid of internal angles of incidence × the scene's
/// wavelengths; nodes left out of a restricted table hold zeros.
#[derive(Debug, Clone)]
struct PlateletTable {
    step_deg: f64,
    count: usize,
    nw: usize,
    rt: Vec<Rt>,
}

fn reversed(nodes: &[Node]) -> Vec<Node> {
    nodes
        .iter()
        .rev()
        .map(|n| match n {
            Node::Layer { .. } | Node::Incoherent { .. } => n.clone(),
            Node::Repeat { count, nodes } => Node::Repeat {
                count: *count,
                nodes: reversed(nodes),
            },
        })
        .collect()
}

/// The platelet `items` in the binder, one stack per disorder realisation
/// and face (both faces of an asymmetric stack, equally likely).
fn platelet_stacks(coating: &Coating, items: &[Item]) -> Vec<Stack> {
    let binder = coating.binder;
    let mut stacks: Vec<Stack> = Vec::new();
    for nodes in realise(items, coating.disorder.as_ref()) {
        let back = reversed(&nodes);
        let symmetric = back == nodes;
        for n in [Some(nodes), (!symmetric).then_some(back)]
            .into_iter()
            .flatten()
        {
            stacks.push(Stack {
                incident: binder,
                nodes: n,
                exit: Exit::Medium(binder),
            });
        }
    }
    stacks
}

/// The node about which [`PlateletTable::at`] interpolates for `theta`
/// (radians), and the offset from it in steps.
fn stencil(step_deg: f64, count: usize, theta: f64) -> (usize, f64) {
    let x = (theta.to_degrees() / step_deg).clamp(0.0, (count - 1) as f64);
    let k = (x.round() as usize).clamp(1, count - 2);
    (k, x - k as f64)
}

impl PlateletTable {
    /// R and T of `stacks` (averaged) every `step_deg` from 0, `count`
    /// nodes; only the nodes in `needed` when given.
    fn compute(
        stacks: &[Stack],
        index: &[Vec<Complex64>],
        wavelengths_nm: &[f64],
        step_deg: f64,
        count: usize,
        needed: Option<&[usize]>,
    ) -> PlateletTable {
        let nw = wavelengths_nm.len();
        let nodes: Vec<usize> = needed.map_or_else(|| (0..count).collect(), <[usize]>::to_vec);
        let angles: Vec<f64> = nodes.iter().map(|&k| k as f64 * step_deg).collect();
        let spectra = optics::compute(stacks, index, wavelengths_nm, &angles);
        let rt = if needed.is_none() {
            spectra.rt
        } else {
            let mut rt = vec![Rt::default(); count * nw];
            for (j, &k) in nodes.iter().enumerate() {
                rt[k * nw..(k + 1) * nw].copy_from_slice(spectra.at_angle(j));
            }
            rt
        };
        PlateletTable {
            step_deg,
            count,
            nw,
            rt,
        }
    }

    /// R and T at internal angle `theta` (radians) and wavelength index `w`
    /// by three-point (quadratic) Lagrange interpolation about the nearest
    /// node, which follows the quadratic bottom of an interference minimum;
    /// angles beyond the last node take its values.
    fn at(&self, theta: f64, w: usize) -> Rt {
        let (k, l) = self.lagrange(theta);
        self.mix(k, &l, w)
    }

    /// The centre node and the three Lagrange weights for `theta` (radians).
    fn lagrange(&self, theta: f64) -> (usize, [f64; 3]) {
        let (k, u) = stencil(self.step_deg, self.count, theta);
        (k, [0.5 * u * (u - 1.0), 1.0 - u * u, 0.5 * u * (u + 1.0)])
    }

    /// The weighted sum of the three nodes about `k` at wavelength `w`,
    /// each component clamped to 0–1.
    fn mix(&self, k: usize, l: &[f64; 3], w: usize) -> Rt {
        let node = |j: usize| self.rt[(k + j - 1) * self.nw + w];
        let (a, b, c) = (node(0), node(1), node(2));
        let mix = |p: f64, q: f64, r: f64| (l[0] * p + l[1] * q + l[2] * r).clamp(0.0, 1.0);
        Rt {
            rs: mix(a.rs, b.rs, c.rs),
            rp: mix(a.rp, b.rp, c.rp),
            ts: mix(a.ts, b.ts, c.ts),
            tp: mix(a.tp, b.tp, c.tp),
        }
    }
}

/// Unit cross product length squared and vector.
fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// cos² of the angle between the s directions of two planes of incidence
/// containing `d` (normals `n1`, `n2`); 1 when either plane is undefined.
fn s_alignment(d: [f64; 3], n1: [f64; 3], n2: [f64; 3]) -> f64 {
    let (s1, s2) = (cross(d, n1), cross(d, n2));
    let (l1, l2) = (dot(s1, s1), dot(s2, s2));
    if l1 < 1e-20 || l2 < 1e-20 {
        1.0
    } else {
        dot(s1, s2).powi(2) / (l1 * l2)
    }
}

/// A pair of outside directions carried into a binder of index n: the
/// refracted directions (Snell's law), the platelet normal m that mirrors
/// one into the other, and cos θ_d = ω_i'·m.
struct Inside {
    di: [f64; 3],
    do_: [f64; 3],
    m: [f64; 3],
    cos_d: f64,
}

impl Inside {
    fn new(n: f64, illumination: [f64; 3], detection: [f64; 3]) -> Inside {
        let refract = |d: [f64; 3]| {
            let (x, y) = (d[0] / n, d[1] / n);
            [x, y, (1.0 - x * x - y * y).max(0.0).sqrt()]
        };
        let (di, do_) = (refract(illumination), refract(detection));
        let h = [di[0] + do_[0], di[1] + do_[1], di[2] + do_[2]];
        let len = dot(h, h).sqrt();
        let m = [h[0] / len, h[1] / len, h[2] / len];
        Inside {
            di,
            do_,
            m,
            cos_d: dot(di, m).clamp(0.0, 1.0),
        }
    }
}

/// Step of the coarse transmittance table behind the extinction of a
/// model restricted to a few geometries, degrees. The extinction averages
/// the platelet's transmittance over the tilt distribution, which smooths
/// its angular fringes (the restricted model agrees with the full one to
/// ΔE00 < 0.1; see the tests).
const COARSE_STEP_DEG: f64 = 4.0;
const COARSE_ANGLES: usize = 23;

/// Which nodes of the tables a restricted model computes.
#[derive(Debug, Clone)]
struct Plan {
    /// Nodes of the fine R/T table.
    fine: Vec<usize>,
    /// Nodes of the coarse table the extinction reads.
    coarse: Vec<usize>,
    /// Nodes of the extinction table.
    extinction: Vec<usize>,
}

/// The parts of a coating's model that do not depend on the platelet's
/// layer thicknesses: design tools build one and then a [`Model`] per
/// design. A template made for a list of geometries computes only the
/// table nodes those geometries read (the platelet's R near each mirror
/// angle; its T on a coarse grid for the extinction along each direction),
/// so its models are valid at those geometries only.
#[derive(Debug, Clone)]
pub struct Template {
    coating: Coating,
    wavelengths_nm: Vec<f64>,
    index: Vec<Vec<Complex64>>,
    n: Vec<f64>,
    background: Vec<f64>,
    density: Density,
    /// Platelet normals and normalised weights for the extinction.
    normals: Vec<([f64; 3], f64)>,
    plan: Option<Plan>,
}

fn sorted(mut v: Vec<usize>) -> Vec<usize> {
    v.sort_unstable();
    v.dedup();
    v
}

impl Template {
    /// A template valid at every pair of directions (`geometries` = `None`)
    /// or at the listed geometries only.
    pub fn new(
        scene: &Scene,
        coating: &Coating,
        geometries: Option<&[Geometry]>,
    ) -> Result<Template> {
        let wavelengths_nm = scene.wavelengths_nm.clone();
        let index = scene.indices(&wavelengths_nm)?;
        // The scene checked that the binder is lossless with n ≥ 1.
        let n: Vec<f64> = index[coating.binder].iter().map(|z| z.re).collect();
        let density = Density::new(&coating.orientation);
        let normals = normals(&density);
        if !(density.inv_norm.is_finite() && density.inv_norm > 0.0) || normals.is_empty() {
            return Err(Error::invalid(
                "coating.tilt_density",
                "(weights)",
                "too narrow to resolve: give the spread over at least a few degrees, with non-zero weights on a range of tilts",
            ));
        }
        let background = coating.background.on(&wavelengths_nm)?;
        let mut template = Template {
            coating: coating.clone(),
            wavelengths_nm,
            index,
            n,
            normals,
            density,
            background,
            plan: None,
        };
        if let Some(list) = geometries {
            template.plan = Some(template.plan(list));
        }
        Ok(template)
    }

    /// The wavelength grid of the models.
    pub fn wavelengths_nm(&self) -> &[f64] {
        &self.wavelengths_nm
    }

    /// The table nodes that the geometries read.
    fn plan(&self, geometries: &[Geometry]) -> Plan {
        let (mut fine, mut extinction) = (Vec::new(), Vec::new());
        for g in geometries {
            if g.illumination[2] <= 0.0 || g.detection[2] <= 0.0 {
                continue;
            }
            for &n in &self.n {
                let inside = Inside::new(n, g.illumination, g.detection);
                let (k, _) = stencil(TABLE_STEP_DEG, TABLE_ANGLES, inside.cos_d.acos());
                fine.extend(k - 1..=k + 1);
                for mu in [inside.di[2], inside.do_[2]] {
                    let (k, _) = extinction_node(mu);
                    extinction.extend([k, k + 1]);
                }
            }
        }
        // The interreflection with a reflecting background reads them all.
        if self.background.iter().any(|&r| r > 0.0) {
            extinction = (0..EXTINCTION_ANGLES).collect();
        }
        let extinction = sorted(extinction);
        let mut coarse = Vec::new();
        for &a in &extinction {
            let d = extinction_direction(a);
            for (m, _) in &self.normals {
                let theta = dot(d, *m).abs().min(1.0).acos();
                let (k, _) = stencil(COARSE_STEP_DEG, COARSE_ANGLES, theta);
                coarse.extend(k - 1..=k + 1);
            }
        }
        Plan {
            fine: sorted(fine),
            coarse: sorted(coarse),
            extinction,
        }
    }

    /// The model with the platelet layers `items` (the coating's, or an
    /// edited design with the same layers), and when `dn` is given the real
    /// index of medium m shifted by `dn[m]` in the platelet.
    pub fn model(&self, items: &[Item], dn: Option<&[f64]>) -> Model {
        let shifted;
        let index = match dn {
            None => &self.index,
            Some(dn) => {
                shifted = self
                    .index
                    .iter()
                    .zip(dn)
                    .map(|(n, d)| n.iter().map(|z| z + d).collect())
                    .collect::<Vec<Vec<Complex64>>>();
                &shifted
            }
        };
        let stacks = platelet_stacks(&self.coating, items);
        let wl = &self.wavelengths_nm;
        let nw = wl.len();
        let plan = self.plan.as_ref();
        let table = PlateletTable::compute(
            &stacks,
            index,
            wl,
            TABLE_STEP_DEG,
            TABLE_ANGLES,
            plan.map(|p| p.fine.as_slice()),
        );
        let extinction = match plan {
            None => extinction_table(&table, &self.normals, nw, None),
            Some(p) => {
                let coarse = PlateletTable::compute(
                    &stacks,
                    index,
                    wl,
                    COARSE_STEP_DEG,
                    COARSE_ANGLES,
                    Some(&p.coarse),
                );
                extinction_table(&coarse, &self.normals, nw, Some(&p.extinction))
            }
        };
        let mut model = Model {
            wavelengths_nm: wl.clone(),
            n: self.n.clone(),
            background: self.background.clone(),
            interreflection: Vec::new(),
            density: self.density.clone(),
            coverage: self.coating.coverage,
            table,
            extinction,
        };
        model.interreflection = (0..nw)
            .map(|w| {
                let rho = model.background[w];
                if rho == 0.0 {
                    return 1.0;
                }
                // Cosine-weighted means over the hemisphere: ∫ f(μ) d(μ²).
                let mean = |f: &dyn Fn(f64) -> f64, k: usize| {
                    (0..k)
                        .map(|j| f(((j as f64 + 0.5) / k as f64).sqrt()))
                        .sum::<f64>()
                        / k as f64
                };
                let r_i = mean(&|mu| internal_reflectance(model.n[w], mu), 512);
                let t_d = mean(&|mu| model.transmittance(mu, w), 64);
                1.0 / (1.0 - rho * r_i * t_d * t_d)
            })
            .collect();
        model
    }
}

/// Everything needed to evaluate the coating at any pair of directions (or,
/// from a restricted [`Template`], at its geometries).
#[derive(Debug, Clone)]
pub struct Model {
    wavelengths_nm: Vec<f64>,
    /// Binder index per wavelength (real).
    n: Vec<f64>,
    background: Vec<f64>,
    /// Saunderson factor M per wavelength.
    interreflection: Vec<f64>,
    density: Density,
    coverage: f64,
    table: PlateletTable,
    /// μ'·a(θ') on the extinction grid, `[angle][w]`.
    extinction: Vec<f64>,
}

/// The extinction node below cos θ' = `mu` and the offset from it.
fn extinction_node(mu: f64) -> (usize, f64) {
    let x = mu.clamp(0.0, 1.0).acos().to_degrees() / EXTINCTION_STEP_DEG;
    let k = (x as usize).min(EXTINCTION_ANGLES - 2);
    (k, x - k as f64)
}

/// The direction inside the binder at extinction node `a` (in the x–z plane).
fn extinction_direction(a: usize) -> [f64; 3] {
    let theta = (a as f64 * EXTINCTION_STEP_DEG).min(90.0).to_radians();
    [theta.sin(), 0.0, theta.cos()]
}

/// One pair of directions at one wavelength: p(m), the platelet term over
/// p(m), and the background term of the reflectance factor.
struct Terms {
    density: f64,
    platelet: f64,
    background: f64,
}

impl Model {
    /// The model of the scene's coating with its own platelet.
    pub fn new(scene: &Scene, coating: &Coating) -> Result<Model> {
        Model::with_platelet(scene, coating, &coating.platelet)
    }

    /// The model with the platelet layers `items` in place of the coating's.
    /// Design tools evaluating many designs build a [`Template`] once instead.
    pub fn with_platelet(scene: &Scene, coating: &Coating, items: &[Item]) -> Result<Model> {
        Ok(Template::new(scene, coating, None)?.model(items, None))
    }

    /// The wavelength grid of the spectra.
    pub fn wavelengths_nm(&self) -> &[f64] {
        &self.wavelengths_nm
    }

    /// Extinction a(θ') per unit coverage at cos θ' = `mu`, wavelength `w`.
    fn extinction(&self, mu: f64, w: usize) -> f64 {
        let (k, f) = extinction_node(mu);
        let nw = self.wavelengths_nm.len();
        let (a, b) = (
            self.extinction[k * nw + w],
            self.extinction[(k + 1) * nw + w],
        );
        (a + (b - a) * f) / mu.max(1e-6)
    }

    /// Direct transmittance of the platelet layer along cos θ' = `mu`.
    fn transmittance(&self, mu: f64, w: usize) -> f64 {
        (-self.coverage * self.extinction(mu, w)).exp()
    }

    /// The terms at wavelength `w` for directions above the surface; the
    /// platelet term only where p(m) > 0 unless `always`.
    fn terms(&self, illumination: [f64; 3], detection: [f64; 3], w: usize, always: bool) -> Terms {
        let n = self.n[w];
        let z = [0.0, 0.0, 1.0];
        let Inside { di, do_, m, cos_d } = Inside::new(n, illumination, detection);
        let (ti_s, ti_p) = fresnel_t(1.0, n, illumination[2], di[2]);
        let (to_s, to_p) = fresnel_t(1.0, n, detection[2], do_[2]);
        let p = self.density.at(m[2].clamp(-1.0, 1.0).acos());
        let (ai, ao) = (self.extinction(di[2], w), self.extinction(do_[2], w));
        let mut platelet = 0.0;
        if (p > 0.0 || always) && self.coverage > 0.0 {
            let rt = self.table.at(cos_d.acos(), w);
            let ca = s_alignment(di, z, m);
            let cb = s_alignment(do_, m, z);
            // Intensities in the platelet's s/p frame after entry.
            let (is, ip) = (
                0.5 * (ca * ti_s + (1.0 - ca) * ti_p),
                0.5 * ((1.0 - ca) * ti_s + ca * ti_p),
            );
            let (js, jp) = (rt.rs * is, rt.rp * ip);
            let q = to_s * (cb * js + (1.0 - cb) * jp) + to_p * ((1.0 - cb) * js + cb * jp);
            let sum = ai + ao;
            let c_eff = if sum * self.coverage < 1e-12 {
                self.coverage
            } else {
                -(-self.coverage * sum).exp_m1() / sum
            };
            platelet = PI * c_eff * q / (4.0 * n * n * di[2] * do_[2]);
        }
        let rho = self.background[w];
        let mut background = 0.0;
        if rho > 0.0 {
            let t = (-self.coverage * (ai + ao)).exp();
            background =
                rho * self.interreflection[w] * 0.25 * (ti_s + ti_p) * (to_s + to_p) * t / (n * n);
        }
        Terms {
            density: p,
            platelet,
            background,
        }
    }

    /// Reflectance factor spectrum (see the module notes) for light from
    /// `illumination` seen from `detection`: unit vectors in the coating frame
    /// (z the outward normal), pointing away from the coating. Directions at
    /// or below the surface give 0. `out` gets one value per wavelength. The
    /// BRDF is `out[w] / π`; the surface gloss is not included.
    pub fn reflectance_factor(&self, illumination: [f64; 3], detection: [f64; 3], out: &mut [f64]) {
        assert_eq!(
            out.len(),
            self.wavelengths_nm.len(),
            "one value per wavelength"
        );
        if illumination[2] <= 0.0 || detection[2] <= 0.0 {
            out.fill(0.0);
            return;
        }
        for (w, o) in out.iter_mut().enumerate() {
            let t = self.terms(illumination, detection, w, false);
            *o = t.density * t.platelet + t.background;
        }
    }

    /// The reflectance factor split as R_F = p(m)·`platelet` + `background`,
    /// with p(m) the density of platelet normals at the normal that mirrors
    /// one direction into the other ([`Model::normal_density`]): the
    /// platelet part without its sharp orientation factor varies smoothly
    /// with the directions, so renderers tabulate it. Zero below the surface.
    pub fn reflectance_parts(
        &self,
        illumination: [f64; 3],
        detection: [f64; 3],
        platelet: &mut [f64],
        background: &mut [f64],
    ) {
        let nw = self.wavelengths_nm.len();
        assert!(platelet.len() == nw && background.len() == nw);
        if illumination[2] <= 0.0 || detection[2] <= 0.0 {
            platelet.fill(0.0);
            background.fill(0.0);
            return;
        }
        for w in 0..nw {
            let t = self.terms(illumination, detection, w, true);
            platelet[w] = t.platelet;
            background[w] = t.background;
        }
    }

    /// p(m) per steradian for the pair of directions, with the binder
    /// index `n` (a reference value for a dispersive binder).
    pub fn normal_density(&self, n: f64, illumination: [f64; 3], detection: [f64; 3]) -> f64 {
        let m = Inside::new(n, illumination, detection).m;
        self.density.at(m[2].clamp(-1.0, 1.0).acos())
    }

    /// The largest platelet tilt with a non-zero density, degrees.
    pub fn max_tilt_deg(&self) -> f64 {
        self.density.max_tilt.to_degrees()
    }

    /// The binder's index at each wavelength.
    pub fn binder_index(&self) -> &[f64] {
        &self.n
    }

    /// Unpolarized mirror reflectance of the binder's top surface at
    /// illumination angle `illumination_deg` (the gloss excluded from the
    /// reflectance factor), one value per wavelength.
    pub fn surface_reflectance(&self, illumination_deg: f64) -> Vec<f64> {
        let c1 = illumination_deg.to_radians().cos();
        let s1 = illumination_deg.to_radians().sin();
        self.n
            .iter()
            .map(|&n| {
                let c2 = (1.0 - (s1 / n).powi(2)).sqrt();
                let (ts, tp) = fresnel_t(1.0, n, c1, c2);
                1.0 - 0.5 * (ts + tp)
            })
            .collect()
    }
}

/// Platelet normals for the extinction quadrature: a midpoint rule over
/// tilt and azimuth, weights normalised on the same nodes (so flat
/// platelets give exactly μ'(1 − T_pl(θ'))); nodes of zero weight dropped.
fn normals(density: &Density) -> Vec<([f64; 3], f64)> {
    let dt = density.max_tilt / TILT_NODES as f64;
    let dphi = PI / AZIMUTH_NODES as f64;
    let mut nodes = Vec::with_capacity(TILT_NODES * AZIMUTH_NODES);
    for j in 0..TILT_NODES {
        let t = (j as f64 + 0.5) * dt;
        let weight = density.raw(t) * t.sin();
        if weight <= 0.0 {
            continue;
        }
        for k in 0..AZIMUTH_NODES {
            let phi = (k as f64 + 0.5) * dphi;
            let m = [t.sin() * phi.cos(), t.sin() * phi.sin(), t.cos()];
            nodes.push((m, weight));
        }
    }
    let total: f64 = nodes.iter().map(|n| n.1).sum();
    nodes.iter_mut().for_each(|n| n.1 /= total);
    nodes
}

/// μ'·a(θ') = ∫ |ω'·m| p(m) (1 − T_pl) dω_m on the extinction grid (only
/// the nodes in `needed` when given; the others hold zeros).
fn extinction_table(
    table: &PlateletTable,
    normals: &[([f64; 3], f64)],
    nw: usize,
    needed: Option<&[usize]>,
) -> Vec<f64> {
    let nodes: Vec<usize> =
        needed.map_or_else(|| (0..EXTINCTION_ANGLES).collect(), <[usize]>::to_vec);
    let rows: Vec<(usize, Vec<f64>)> = nodes
        .into_par_iter()
        .map(|a| {
            let d = extinction_direction(a);
            let mut row = vec![0.0; nw];
            for (m, wt) in normals {
                let c = dot(d, *m).abs().min(1.0);
                let (k, l) = table.lagrange(c.acos());
                for (w, r) in row.iter_mut().enumerate() {
                    *r += wt * c * (1.0 - table.mix(k, &l, w).t());
                }
            }
            (a, row)
        })
        .collect();
    let mut out = vec![0.0; EXTINCTION_ANGLES * nw];
    for (a, row) in rows {
        out[a * nw..(a + 1) * nw].copy_from_slice(&row);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gaussian_density_is_normalised() {
        let d = Density::new(&Orientation::Gaussian { sigma_deg: 0.5 });
        // Small σ: p(0) ≈ 1/(2πσ²).
        let s = 0.5f64.to_radians();
        assert!((d.at(0.0) * 2.0 * PI * s * s - 1.0).abs() < 1e-3);
        let flat = Density::new(&Orientation::Density(vec![(0.0, 1.0), (90.0, 1.0)]));
        assert!((flat.at(0.3) - 1.0 / (2.0 * PI)).abs() < 1e-6);
    }

    #[test]
    fn internal_reflectance_of_glass() {
        // Cosine-weighted internal reflectance of an n = 1.5 surface ≈ 0.60
        // (1 − (1 − r_e)/n² with external diffuse r_e ≈ 0.092; Judd's value,
        // from memory).
        let k = 4000;
        let r: f64 = (0..k)
            .map(|j| internal_reflectance(1.5, ((j as f64 + 0.5) / k as f64).sqrt()))
            .sum::<f64>()
            / k as f64;
        assert!((r - 0.596).abs() < 0.01, "{r}");
    }
}
