//! Fast evaluation of many designs of one scene: the per-medium terms of
//! every (angle, wavelength) are computed once; each design only rewrites the
//! layer thicknesses of a reused stack and runs the transfer matrices.
//! Designs with anisotropic layers, and colours seen through a circular
//! analyser, are computed by the 4×4 path from each design's own stack.

use std::sync::Mutex;

use num_complex::Complex64;

use super::variables::{Variable, with_thicknesses};
use crate::angle_colour::{Polarization, Side, Viewing, seen_in_jones};
use crate::colorimetry::{ColourOptions, Weights};
use crate::error::{Error, Result};
use crate::optics::aniso::{Handedness, Jones};
use crate::optics::{MediumTerms, Node, Probe, Stack};
use crate::scene::Scene;

/// A layer node's thickness as a function of the variables: `base + coef·x[var]`.
#[derive(Debug, Clone, Copy)]
struct Slot {
    base: f64,
    var: Option<(usize, f64)>,
}

/// The ideal (single-realisation) design: a stack template whose layer
/// thicknesses are affine in the variables (repeats and grading only scale
/// thicknesses), so a design is written in by one pass over its layers.
#[derive(Debug, Clone)]
struct Fast {
    stack: Stack,
    slots: Vec<Slot>,
}

/// Buffers one thread reuses between designs.
pub struct Workspace {
    stack: Option<Stack>,
    terms: Vec<MediumTerms>,
    spectrum: Vec<f64>,
    xyz: Vec<[f64; 3]>,
}

/// The results of one evaluation.
pub struct Output<'a> {
    /// Reflectance or transmittance (as viewed), angle-major: `[a * nw + w]`.
    pub spectrum: &'a [f64],
    /// X, Y, Z per angle (0–100), when the evaluator has colour weights.
    pub xyz: &'a [[f64; 3]],
}

/// Evaluates designs of one scene on a fixed wavelength grid and angle list.
pub struct Evaluator {
    scene: Box<Scene>,
    vars: Vec<Variable>,
    index: Vec<Vec<Complex64>>,
    wavelengths_nm: Vec<f64>,
    angles_deg: Vec<f64>,
    /// The evaluation point of every (angle, wavelength), angle-major.
    probes: Vec<Probe>,
    /// Per-medium terms of each distinct index (angle-major, then
    /// wavelength, then distinct medium).
    terms: Vec<MediumTerms>,
    /// The distinct index each medium shares terms with, when some media
    /// repeat another's index (as the per-layer copies of a tolerance
    /// analysis do); `None` when all differ.
    shared: Option<Vec<usize>>,
    /// Number of distinct indices.
    distinct: usize,
    side: Side,
    polarization: Polarization,
    /// A circular analyser in front of the observer (colour evaluators).
    analyzer: Option<Handedness>,
    /// True when designs go through the 4×4 path: anisotropic layers or an
    /// analyser.
    four: bool,
    colour: Option<(Weights, ColourOptions)>,
    fast: Option<Fast>,
    pool: Mutex<Vec<Workspace>>,
}

impl Evaluator {
    /// Spectra of the designs on `wavelengths_nm` at `angles_deg`.
    pub fn spectral(
        scene: &Scene,
        vars: Vec<Variable>,
        wavelengths_nm: &[f64],
        angles_deg: &[f64],
        side: Side,
        polarization: Polarization,
    ) -> Result<Self> {
        let index = scene.indices(wavelengths_nm)?;
        let nw = wavelengths_nm.len();
        // Media with bit-identical indices share one set of terms.
        let mut first = std::collections::HashMap::new();
        let mut distinct: Vec<&[Complex64]> = Vec::new();
        let class: Vec<usize> = index
            .iter()
            .map(|n| {
                let bits: Vec<(u64, u64)> =
                    n.iter().map(|z| (z.re.to_bits(), z.im.to_bits())).collect();
                *first.entry(bits).or_insert_with(|| {
                    distinct.push(n);
                    distinct.len() - 1
                })
            })
            .collect();
        let shared = (distinct.len() < index.len()).then_some(class);
        let distinct_count = distinct.len();
        let mut probes = Vec::with_capacity(angles_deg.len() * nw);
        let mut terms = Vec::with_capacity(angles_deg.len() * nw * distinct.len());
        for &a in angles_deg {
            let sine = Probe::sine(a);
            for (w, &wavelength) in wavelengths_nm.iter().enumerate() {
                let k0 = Probe::wavenumber(wavelength);
                let at = Probe::of(k0, index[scene.incident][w].re, sine);
                probes.push(at);
                terms.extend(distinct.iter().map(|n| MediumTerms::new(n[w], at.beta())));
            }
        }
        let fast = scene
            .disorder
            .is_none()
            .then(|| fast_template(scene, &vars));
        Ok(Evaluator {
            scene: Box::new(scene.clone()),
            vars,
            index,
            wavelengths_nm: wavelengths_nm.to_vec(),
            angles_deg: angles_deg.to_vec(),
            probes,
            terms,
            shared,
            distinct: distinct_count,
            side,
            polarization,
            analyzer: None,
            four: scene.anisotropic(),
            colour: None,
            fast,
            pool: Mutex::new(Vec::new()),
        })
    }

    /// Colours of the designs on the scene's wavelength grid at `angles_deg`,
    /// as `viewing` sees them.
    pub fn colour(
        scene: &Scene,
        vars: Vec<Variable>,
        angles_deg: &[f64],
        viewing: &Viewing,
    ) -> Result<Self> {
        let weights = viewing.weights(&scene.wavelengths_nm)?;
        let mut e = Evaluator::spectral(
            scene,
            vars,
            &scene.wavelengths_nm,
            angles_deg,
            viewing.side,
            viewing.polarization,
        )?;
        if let Some(h) = viewing.analyzer {
            if !scene.coherent() {
                return Err(Error::invalid(
                    "analyzer",
                    h.name(),
                    "a circular analyser needs a coherent stack: no incoherent layer, \
                     substrate sheet or thickness disorder",
                ));
            }
            e.analyzer = Some(h);
            e.four = true;
        }
        e.colour = Some((weights, viewing.options));
        Ok(e)
    }

    /// The variables, in the order of `x`.
    pub fn variables(&self) -> &[Variable] {
        &self.vars
    }

    /// The angles evaluated.
    pub fn angles_deg(&self) -> &[f64] {
        &self.angles_deg
    }

    /// The scene the designs belong to.
    pub fn scene(&self) -> &Scene {
        &self.scene
    }

    /// The reference white (X, Y, Z) and RGB options of a colour evaluator.
    pub fn white(&self) -> Option<([f64; 3], ColourOptions)> {
        self.colour.as_ref().map(|(w, o)| (w.white(), *o))
    }

    /// Evaluates the design with thicknesses `x` (nm, one per variable) and,
    /// when `dn` is given, the real index of medium m shifted by `dn[m]`
    /// (never the incident medium's); hands the results to `f`.
    /// Buffers are taken from a shared pool; hot loops that own a
    /// [`Workspace`] call [`Evaluator::eval_in`] instead.
    pub fn eval<R>(&self, x: &[f64], dn: Option<&[f64]>, f: impl FnOnce(&Output) -> R) -> R {
        let mut ws = self
            .pool
            .lock()
            .expect("pool lock")
            .pop()
            .unwrap_or_else(|| self.workspace());
        let r = self.eval_in(&mut ws, x, dn, f);
        self.pool.lock().expect("pool lock").push(ws);
        r
    }

    /// [`Evaluator::eval`] with the caller's buffers.
    pub fn eval_in<R>(
        &self,
        ws: &mut Workspace,
        x: &[f64],
        dn: Option<&[f64]>,
        f: impl FnOnce(&Output) -> R,
    ) -> R {
        self.fill(x, dn, ws);
        f(&Output {
            spectrum: &ws.spectrum,
            xyz: &ws.xyz,
        })
    }

    /// Fresh buffers for [`Evaluator::eval_in`].
    pub fn workspace(&self) -> Workspace {
        Workspace {
            stack: self.fast.as_ref().map(|f| f.stack.clone()),
            terms: Vec::with_capacity(self.index.len()),
            spectrum: vec![0.0; self.angles_deg.len() * self.wavelengths_nm.len()],
            xyz: vec![[0.0; 3]; self.angles_deg.len()],
        }
    }

    fn fill(&self, x: &[f64], dn: Option<&[f64]>, ws: &mut Workspace) {
        if self.four {
            self.fill_four(x, dn, &mut ws.spectrum);
        } else {
            self.fill_two(x, dn, ws);
        }
        let nw = self.wavelengths_nm.len();
        if let Some((weights, _)) = &self.colour {
            for (a, xyz) in ws.xyz.iter_mut().enumerate() {
                *xyz = weights.xyz(&ws.spectrum[a * nw..(a + 1) * nw]);
            }
        }
    }

    /// The 4×4 path: the design's own stack (thicknesses and pitches from
    /// `x`, indices shifted by `dn`), Jones matrices at every point; a
    /// point the path cannot compute gives a value that is not finite,
    /// which the tools refuse.
    fn fill_four(&self, x: &[f64], dn: Option<&[f64]>, spectrum: &mut [f64]) {
        let items = with_thicknesses(&self.scene.stack, &self.vars, x);
        let shifted: Vec<Vec<Complex64>>;
        let index = match dn {
            None => &self.index,
            Some(dn) => {
                shifted = self
                    .index
                    .iter()
                    .zip(dn)
                    .map(|(n, &d)| n.iter().map(|z| z + d).collect())
                    .collect();
                &shifted
            }
        };
        let four = self
            .scene
            .gridded_design(&items, index, &self.wavelengths_nm, &self.angles_deg)
            .expect("the 4×4 path is taken by coherent designs only");
        let nw = self.wavelengths_nm.len();
        let mut n = Vec::with_capacity(index.len());
        for w in 0..nw {
            n.clear();
            n.extend(index.iter().map(|m| m[w]));
            for a in 0..self.angles_deg.len() {
                let at = a * nw + w;
                let j = four
                    .stack
                    .jones(&n, &four.tensors[w], &self.probes[at])
                    .unwrap_or_else(|_| Jones::not_computable());
                spectrum[at] = seen_in_jones(&j, self.side, self.polarization, self.analyzer);
            }
        }
    }

    /// The 2×2 path: the reused stack (or the disorder ensemble).
    fn fill_two(&self, x: &[f64], dn: Option<&[f64]>, ws: &mut Workspace) {
        let nw = self.wavelengths_nm.len();
        let nd = self.distinct;
        let ensemble;
        let stacks: &[Stack] = match (&self.fast, &mut ws.stack) {
            (Some(fast), Some(stack)) => {
                let mut i = 0;
                for_each_thickness(&mut stack.nodes, &mut |t| {
                    let s = fast.slots[i];
                    *t = s.base + s.var.map_or(0.0, |(v, c)| c * x[v]);
                    i += 1;
                });
                std::slice::from_ref(stack)
            }
            _ => {
                let items = with_thicknesses(&self.scene.stack, &self.vars, x);
                ensemble = self.scene.realisations(&items);
                &ensemble
            }
        };
        let weight = 1.0 / stacks.len() as f64;
        for a in 0..self.angles_deg.len() {
            for w in 0..nw {
                let at = a * nw + w;
                let fixed = &self.terms[at * nd..(at + 1) * nd];
                let terms = match (dn, &self.shared) {
                    (None, None) => fixed,
                    _ => {
                        ws.terms.clear();
                        ws.terms.extend((0..self.index.len()).map(|m| {
                            let d = dn.map_or(0.0, |dn| dn[m]);
                            if d == 0.0 {
                                fixed[self.shared.as_ref().map_or(m, |c| c[m])]
                            } else {
                                MediumTerms::new(self.index[m][w] + d, self.probes[at].beta())
                            }
                        }));
                        &ws.terms
                    }
                };
                ws.spectrum[at] = stacks
                    .iter()
                    .map(|s| {
                        self.polarization
                            .of(&s.rt(terms, &self.probes[at]), self.side)
                    })
                    .sum::<f64>()
                    * weight;
            }
        }
    }
}

/// Visits every layer thickness of `nodes` in depth-first order.
fn for_each_thickness(nodes: &mut [Node], f: &mut dyn FnMut(&mut f64)) {
    for n in nodes {
        match n {
            Node::Layer { thickness_nm, .. } | Node::Incoherent { thickness_nm, .. } => {
                f(thickness_nm)
            }
            Node::Repeat { nodes, .. } => for_each_thickness(nodes, f),
        }
    }
}

/// The ideal stack with each layer's thickness as an affine function of the
/// variables, found by expanding the design with every variable at zero and
/// then with each variable at one (expansion is linear in the thicknesses).
fn fast_template(scene: &Scene, vars: &[Variable]) -> Fast {
    let thicknesses = |x: &[f64]| {
        let mut stack = scene
            .realisations(&with_thicknesses(&scene.stack, vars, x))
            .swap_remove(0);
        let mut out = Vec::new();
        for_each_thickness(&mut stack.nodes, &mut |t| out.push(*t));
        (stack, out)
    };
    let zero = vec![0.0; vars.len()];
    let (stack, base) = thicknesses(&zero);
    let mut slots: Vec<Slot> = base.iter().map(|&b| Slot { base: b, var: None }).collect();
    for v in 0..vars.len() {
        let mut unit = zero.clone();
        unit[v] = 1.0;
        for (slot, t) in slots.iter_mut().zip(thicknesses(&unit).1) {
            if t != slot.base {
                slot.var = Some((v, t - slot.base));
            }
        }
    }
    Fast { stack, slots }
}
