//! Reflectance and transmittance over a grid of wavelengths and angles,
//! averaged over an ensemble of stack realisations, in parallel.

use std::array::from_fn;
use std::f64::consts::PI;

use num_complex::Complex64;
use rayon::prelude::*;

use super::medium::MediumTerms;
use super::stack::{LANES, Rt, Stack};

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
    let nw = wavelengths_nm.len();
    // Wavelengths go in blocks of LANES (the last block repeats its final
    // wavelength to fill up; the extra results are dropped).
    let incident = realisations[0].incident;
    let weight = 1.0 / realisations.len() as f64;
    let sines: Vec<f64> = angles_deg.iter().map(|a| a.to_radians().sin()).collect();
    let mut rt = vec![Rt::default(); angles_deg.len() * nw];
    rt.par_chunks_mut(nw).enumerate().for_each(|(a, row)| {
        row.par_chunks_mut(LANES)
            .enumerate()
            .with_min_len(8)
            .for_each_init(
                || vec![Vec::with_capacity(index.len()); LANES],
                |terms: &mut Vec<Vec<MediumTerms>>, (b, out)| {
                    let ws: [usize; LANES] = from_fn(|l| (b * LANES + l).min(nw - 1));
                    for (t, &w) in terms.iter_mut().zip(&ws) {
                        let beta = index[incident][w].re * sines[a];
                        t.clear();
                        t.extend(index.iter().map(|n| MediumTerms::new(n[w], beta)));
                    }
                    let lanes: [&[MediumTerms]; LANES] = from_fn(|l| terms[l].as_slice());
                    let k0 = ws.map(|w| 2.0 * PI / wavelengths_nm[w]);
                    for stack in realisations {
                        for (acc, x) in out.iter_mut().zip(stack.rt_lanes(lanes, k0)) {
                            acc.rs += x.rs * weight;
                            acc.rp += x.rp * weight;
                            acc.ts += x.ts * weight;
                            acc.tp += x.tp * weight;
                        }
                    }
                },
            );
    });
    Spectra {
        wavelengths_nm: wavelengths_nm.to_vec(),
        angles_deg: angles_deg.to_vec(),
        rt,
    }
}
