//! Reflectance and transmittance over a grid of wavelengths and angles,
//! averaged over an ensemble of stack realisations, in parallel or one row
//! (angle) at a time for callers that stream.

use std::array::from_fn;

use num_complex::Complex64;
use rayon::prelude::*;

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
}

impl Spectra {
    /// The values at angle index `a`, one per wavelength.
    pub fn at_angle(&self, a: usize) -> &[Rt] {
        let nw = self.wavelengths_nm.len();
        &self.rt[a * nw..(a + 1) * nw]
    }
}

impl Rt {
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

    /// All rows, in parallel over angles and wavelengths.
    pub fn all(&self) -> Spectra {
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
