//! Reflectance and transmittance over a grid of wavelengths and angles,
//! averaged over an ensemble of stack realisations, in parallel or one row
//! (angle) at a time for callers that stream.

use std::array::from_fn;

use num_complex::Complex64;
use rayon::prelude::*;

use super::aniso::{Gridded, Jones};
use super::medium::{MediumTerms, Probe, Sine, Wavenumber};
use super::stack::{Behind, Exit, LANES, Rt, Stack};

/// R and T per polarization on a wavelength × angle grid. Arrays are
/// angle-major: the value at angle `a`, wavelength `w` is at `a * nw + w`.
#[derive(Debug, Clone, PartialEq)]
pub struct Spectra {
    /// Wavelengths in nm.
    pub wavelengths_nm: Vec<f64>,
    /// Angles of incidence in degrees.
    pub angles_deg: Vec<f64>,
    /// Values at every grid point.
    pub rt: Vec<Rt>,
    /// The reflection and transmission Jones matrices at every grid point
    /// (same layout), when the grid was computed through the 4×4 path.
    pub jones: Option<Vec<Jones>>,
}

impl Spectra {
    /// The values at angle index `a`, one per wavelength.
    pub fn at_angle(&self, a: usize) -> &[Rt] {
        let nw = self.wavelengths_nm.len();
        &self.rt[a * nw..(a + 1) * nw]
    }

    /// The Jones matrices at angle index `a`, when the grid has them.
    pub fn jones_at_angle(&self, a: usize) -> Option<&[Jones]> {
        let nw = self.wavelengths_nm.len();
        self.jones.as_ref().map(|j| &j[a * nw..(a + 1) * nw])
    }
}

/// Column names of a spectrum table in the s and p basis: the grid point,
/// then [`Rt::columns`].
pub const LINEAR_COLUMNS: [&str; 9] = [
    "wavelength_nm",
    "angle_deg",
    "R_s",
    "R_p",
    "R",
    "T_s",
    "T_p",
    "T",
    "A",
];

/// Column names of a spectrum table in the circular basis: the grid point,
/// then [`Circular::columns`].
pub const CIRCULAR_COLUMNS: [&str; 9] = [
    "wavelength_nm",
    "angle_deg",
    "R_L",
    "R_R",
    "R",
    "T_L",
    "T_R",
    "T",
    "A",
];

/// Total reflectance and transmittance for left- and right-handed
/// circularly polarized incident light (co- plus cross-polarized).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Circular {
    /// R for left-handed incident light.
    pub rl: f64,
    /// R for right-handed incident light.
    pub rr: f64,
    /// T for left-handed incident light.
    pub tl: f64,
    /// T for right-handed incident light.
    pub tr: f64,
}

impl Circular {
    /// The totals of one point's Jones matrices.
    pub fn of(j: &Jones) -> Circular {
        let [rl, rr, tl, tr] = j.circular().powers();
        Circular { rl, rr, tl, tr }
    }

    /// The totals of a stack that never mixes s and p (isotropic layers
    /// only): both handednesses see the mean of s and p, since left and
    /// right light carry half their power in each.
    pub fn of_isotropic(x: &Rt) -> Circular {
        Circular {
            rl: x.r(),
            rr: x.r(),
            tl: x.t(),
            tr: x.t(),
        }
    }

    /// Unpolarized reflectance, the mean of the two handednesses.
    pub fn r(&self) -> f64 {
        0.5 * (self.rl + self.rr)
    }

    /// Unpolarized transmittance, the mean of the two handednesses.
    pub fn t(&self) -> f64 {
        0.5 * (self.tl + self.tr)
    }

    /// The seven result columns of a table in the circular basis:
    /// R_L, R_R, R, T_L, T_R, T, A (A as in [`Rt::a`]).
    pub fn columns(&self, lossless: bool) -> [f64; 7] {
        let a = if lossless {
            0.0
        } else {
            1.0 - self.r() - self.t()
        };
        [self.rl, self.rr, self.r(), self.tl, self.tr, self.t(), a]
    }
}

impl Rt {
    /// The totals of one point's Jones matrices: R_s is the power reflected
    /// (co- plus cross-polarized) for s-polarized incident light, and so on.
    pub fn of_jones(j: &Jones) -> Rt {
        let [rp, rs, tp, ts] = j.powers();
        Rt { rs, rp, ts, tp }
    }

    /// Unpolarized reflectance (R_s + R_p)/2.
    pub fn r(&self) -> f64 {
        0.5 * (self.rs + self.rp)
    }

    /// Unpolarized transmittance (T_s + T_p)/2.
    pub fn t(&self) -> f64 {
        0.5 * (self.ts + self.tp)
    }

    /// Unpolarized absorptance A = 1 − R − T. Where nothing absorbs
    /// (`lossless`, see [`Rows::lossless`]) it is 0 exactly: energy is
    /// conserved and the difference would be rounding only.
    pub fn a(&self, lossless: bool) -> f64 {
        if lossless {
            0.0
        } else {
            1.0 - self.r() - self.t()
        }
    }

    /// The seven result columns of a table in the s and p basis:
    /// R_s, R_p, R, T_s, T_p, T, A.
    pub fn columns(&self, lossless: bool) -> [f64; 7] {
        [
            self.rs,
            self.rp,
            self.r(),
            self.ts,
            self.tp,
            self.t(),
            self.a(lossless),
        ]
    }
}

/// A grid computation ready to run: the stacks, every medium's index on the
/// wavelength grid (`index[m][w]`) and the angles. Rows (one angle, a run of
/// wavelengths) are independent, so they can be computed in any order.
pub struct Rows<'a> {
    realisations: &'a [Stack],
    index: &'a [Vec<Complex64>],
    wavelengths_nm: &'a [f64],
    angles_deg: &'a [f64],
    /// sin θ₀ per angle.
    sines: Vec<Sine>,
    /// Vacuum wavenumber 2π/λ per wavelength.
    k0: Vec<Wavenumber>,
    /// Whether nothing absorbs at each wavelength.
    lossless: Vec<bool>,
    /// The same design as a 4×4 stack, when it has one (a coherent stack),
    /// with every medium's index per wavelength (`[w][m]`).
    four: Option<(&'a Gridded, Vec<Vec<Complex64>>)>,
    /// Whether R and T come from the 4×4 stack (a stack with anisotropic
    /// layers) rather than the 2×2 realisations.
    routed: bool,
}

impl<'a> Rows<'a> {
    /// Prepares the grid; the incident medium must be lossless and every
    /// angle below 90°.
    pub fn new(
        realisations: &'a [Stack],
        index: &'a [Vec<Complex64>],
        wavelengths_nm: &'a [f64],
        angles_deg: &'a [f64],
    ) -> Self {
        let black = realisations.iter().any(|s| {
            matches!(
                s.exit,
                Exit::Sheet {
                    behind: Behind::Black,
                    ..
                }
            )
        });
        let lossless = (0..wavelengths_nm.len())
            .map(|w| !black && index.iter().all(|n| n[w].im == 0.0))
            .collect();
        Rows {
            realisations,
            index,
            wavelengths_nm,
            angles_deg,
            sines: angles_deg.iter().map(|&a| Probe::sine(a)).collect(),
            k0: wavelengths_nm
                .iter()
                .map(|&w| Probe::wavenumber(w))
                .collect(),
            lossless,
            four: None,
            routed: false,
        }
    }

    /// Attaches the design as a 4×4 stack, so that Jones matrices can be
    /// computed; with `routed` R and T come from it as well (a design with
    /// anisotropic layers, which the 2×2 realisations cannot hold).
    pub fn with_four(mut self, four: &'a Gridded, routed: bool) -> Self {
        let by_wavelength = (0..self.wavelengths_nm.len())
            .map(|w| self.index.iter().map(|n| n[w]).collect())
            .collect();
        self.four = Some((four, by_wavelength));
        self.routed = routed;
        self
    }

    /// True when Jones matrices can be computed ([`Rows::with_four`]).
    pub fn has_jones(&self) -> bool {
        self.four.is_some()
    }

    /// The Jones matrices at angle index `a` and wavelength index `w`; a
    /// point the 4×4 path cannot compute gives [`Jones::not_computable`].
    ///
    /// # Panics
    ///
    /// When the rows have no 4×4 stack ([`Rows::has_jones`]).
    pub fn jones(&self, a: usize, w: usize) -> Jones {
        let (four, n) = self.four.as_ref().expect("rows with a 4×4 stack");
        let at = Probe::of(self.k0[w], n[w][four.stack.incident].re, self.sines[a]);
        four.stack
            .jones(&n[w], &four.tensors[w], &at)
            .unwrap_or_else(|_| Jones::not_computable())
    }

    /// Fills `out` with the Jones matrices at angle index `a` for the
    /// wavelengths `first_w ..first_w + out.len()`, on this thread.
    ///
    /// # Panics
    ///
    /// When the rows have no 4×4 stack ([`Rows::has_jones`]).
    pub fn fill_jones(&self, a: usize, first_w: usize, out: &mut [Jones]) {
        for (w, j) in (first_w..).zip(out.iter_mut()) {
            *j = self.jones(a, w);
        }
    }

    /// Fills `out` with the circular totals at angle index `a` for the
    /// wavelengths `first_w ..first_w + out.len()`: from the Jones matrices
    /// for a design with anisotropic layers, from R and T otherwise
    /// ([`Circular::of_isotropic`]).
    pub fn fill_circular(&self, a: usize, first_w: usize, out: &mut [Circular]) {
        if self.routed {
            for (w, c) in (first_w..).zip(out.iter_mut()) {
                *c = Circular::of(&self.jones(a, w));
            }
            return;
        }
        let mut rt = vec![Rt::default(); out.len()];
        self.fill(a, first_w, &mut rt);
        for (c, x) in out.iter_mut().zip(&rt) {
            *c = Circular::of_isotropic(x);
        }
    }

    /// Wavelengths in nm.
    pub fn wavelengths_nm(&self) -> &[f64] {
        self.wavelengths_nm
    }

    /// Angles of incidence in degrees.
    pub fn angles_deg(&self) -> &[f64] {
        self.angles_deg
    }

    /// True when every medium is lossless at wavelength index `w` and no
    /// black backing takes light out, so the stack cannot absorb.
    pub fn lossless(&self, w: usize) -> bool {
        self.lossless[w]
    }

    /// Fills `out` with the values at angle index `a` for the wavelengths
    /// `first_w ..first_w + out.len()`, on this thread.
    pub fn fill(&self, a: usize, first_w: usize, out: &mut [Rt]) {
        let mut terms = self.scratch();
        for (b, block) in out.chunks_mut(LANES).enumerate() {
            self.fill_block(a, first_w + b * LANES, block, &mut terms);
        }
    }

    /// All rows, in parallel over angles and wavelengths, with the Jones
    /// matrices when R and T come from the 4×4 stack.
    pub fn all(&self) -> Spectra {
        if self.routed {
            return self.all_with_jones();
        }
        let nw = self.wavelengths_nm.len();
        let mut rt = vec![Rt::default(); self.angles_deg.len() * nw];
        rt.par_chunks_mut(nw).enumerate().for_each(|(a, row)| {
            row.par_chunks_mut(LANES)
                .enumerate()
                .with_min_len(8)
                .for_each_init(
                    || self.scratch(),
                    |terms, (b, block)| self.fill_block(a, b * LANES, block, terms),
                );
        });
        Spectra {
            wavelengths_nm: self.wavelengths_nm.to_vec(),
            angles_deg: self.angles_deg.to_vec(),
            rt,
            jones: None,
        }
    }

    /// All rows with the Jones matrices at every point, in parallel; R and
    /// T are their totals where the design is anisotropic and the 2×2
    /// engine's otherwise (the two agree for isotropic designs).
    ///
    /// # Panics
    ///
    /// When the rows have no 4×4 stack ([`Rows::has_jones`]).
    pub fn all_with_jones(&self) -> Spectra {
        let nw = self.wavelengths_nm.len();
        let mut jones = vec![Jones::not_computable(); self.angles_deg.len() * nw];
        jones.par_chunks_mut(nw).enumerate().for_each(|(a, row)| {
            row.par_chunks_mut(LANES)
                .enumerate()
                .for_each(|(b, block)| self.fill_jones(a, b * LANES, block))
        });
        let rt = if self.routed {
            jones.iter().map(Rt::of_jones).collect()
        } else {
            let mut s = self.with_routing(false).all();
            std::mem::take(&mut s.rt)
        };
        Spectra {
            wavelengths_nm: self.wavelengths_nm.to_vec(),
            angles_deg: self.angles_deg.to_vec(),
            rt,
            jones: Some(jones),
        }
    }

    /// A view of the same rows with R and T taken from the 2×2 engine or
    /// the 4×4 stack.
    fn with_routing(&self, routed: bool) -> Rows<'a> {
        Rows {
            realisations: self.realisations,
            index: self.index,
            wavelengths_nm: self.wavelengths_nm,
            angles_deg: self.angles_deg,
            sines: self.sines.clone(),
            k0: self.k0.clone(),
            lossless: self.lossless.clone(),
            four: self.four.clone(),
            routed,
        }
    }

    /// Scratch space for [`Rows::fill_block`]: one list of medium terms per lane.
    fn scratch(&self) -> Vec<Vec<MediumTerms>> {
        let blank = MediumTerms::new(Complex64::new(1.0, 0.0), 0.0);
        vec![vec![blank; self.index.len()]; LANES]
    }

    /// Up to [`LANES`] wavelengths from `first_w` side by side (a short block
    /// repeats its final wavelength to fill up; the extra results are dropped).
    /// `terms` is scratch space, one list per lane.
    fn fill_block(&self, a: usize, first_w: usize, out: &mut [Rt], terms: &mut [Vec<MediumTerms>]) {
        if self.routed {
            for (w, x) in (first_w..).zip(out.iter_mut()) {
                *x = Rt::of_jones(&self.jones(a, w));
            }
            return;
        }
        let last = first_w + out.len() - 1;
        let ws: [usize; LANES] = from_fn(|l| (first_w + l).min(last));
        let incident = self.realisations[0].incident;
        let at = ws.map(|w| {
            let n0 = self.index[incident][w].re;
            Probe::of(self.k0[w], n0, self.sines[a])
        });
        for (lane, (&w, p)) in terms.iter_mut().zip(ws.iter().zip(&at)) {
            for (t, n) in lane.iter_mut().zip(self.index) {
                *t = MediumTerms::new(n[w], p.beta());
            }
        }
        let lanes: [&[MediumTerms]; LANES] = from_fn(|l| terms[l].as_slice());
        let weight = 1.0 / self.realisations.len() as f64;
        out.fill(Rt::default());
        for stack in self.realisations {
            for (acc, x) in out.iter_mut().zip(stack.rt_lanes(lanes, &at)) {
                acc.rs += x.rs * weight;
                acc.rp += x.rp * weight;
                acc.ts += x.ts * weight;
                acc.tp += x.tp * weight;
            }
        }
    }
}

/// Computes R and T for every (angle, wavelength), averaging intensities over
/// `realisations` (one stack for an ideal design, several for disorder).
/// `index[m][w]` is medium m's complex index at wavelength w; the incident
/// medium must be lossless and every angle below 90°.
pub fn compute(
    realisations: &[Stack],
    index: &[Vec<Complex64>],
    wavelengths_nm: &[f64],
    angles_deg: &[f64],
) -> Spectra {
    Rows::new(realisations, index, wavelengths_nm, angles_deg).all()
}
