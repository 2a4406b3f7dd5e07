//! Many designs over one layer sequence and one set of media: the per-medium
//! terms of every (angle, wavelength) are computed and packed into
//! four-wavelength lanes once, so that a design costs only the phases of its
//! own layers. For inverse design and machine learning, where the same
//! sequence is evaluated for thousands of thickness vectors.

use std::array::from_fn;

use num_complex::Complex64;

use super::matrix::{Field, FieldLanes};
use super::medium::{MediumTerms, Probe};
use super::simd::with_wide_vectors;
use super::stack::{Exit, LANES, Node, Rt, Stack, coherent};

/// One lossless, propagating layer's terms on the lanes of a block.
#[derive(Debug, Clone, Copy)]
struct PackedLayer {
    /// Real normal component of the index, q = √(n² − β²).
    q: [f64; LANES],
    /// Admittances (s, p).
    eta: [[f64; LANES]; 2],
    /// Their inverses (s, p).
    inv_eta: [[f64; LANES]; 2],
}

/// Up to [`LANES`] wavelengths at one angle.
#[derive(Debug, Clone)]
struct Block {
    /// Points of the lanes, angle-major (a short last block repeats its
    /// final point).
    point: [usize; LANES],
    /// Probes of the lanes.
    at: [Probe; LANES],
    /// Points the block fills (≤ [`LANES`]), from `point[0]` on.
    len: usize,
    /// The layers from the incident side when every one is lossless and
    /// propagating on every lane; otherwise the block goes through
    /// [`Stack::rt_lanes`].
    packed: Option<Vec<PackedLayer>>,
    /// The exit fields (1, η) of both polarizations.
    start: FieldLanes<LANES>,
    /// Incident and exit admittances (s, p) per lane when both are real.
    outer: Option<[[[f64; LANES]; 2]; 2]>,
}

/// The media of a batch at every (angle, wavelength) point, ready for
/// [`Batch::rt`]: medium 0 is the incident medium (lossless), media
/// 1..=L the layers from the incident side, medium L+1 the substrate.
#[derive(Debug, Clone)]
pub struct Batch {
    /// Number of layers L.
    layers: usize,
    /// Medium terms, `terms[point * (L + 2) + medium]`, angle-major.
    terms: Vec<MediumTerms>,
    /// The four-wavelength blocks, angle-major.
    blocks: Vec<Block>,
}

impl Batch {
    /// The batch of `n[w * (L + 2) + j]` (medium j at wavelength w) at
    /// `wavelengths_nm` × `angles_deg`. The caller has checked every index
    /// (finite, n > 0, k ≥ 0, a lossless incident medium), every wavelength
    /// (> 0) and every angle (|θ| < 90°).
    pub fn new(n: &[Complex64], layers: usize, wavelengths_nm: &[f64], angles_deg: &[f64]) -> Self {
        let (m, nw) = (layers + 2, wavelengths_nm.len());
        let mut probes = Vec::with_capacity(angles_deg.len() * nw);
        let mut terms = Vec::with_capacity(angles_deg.len() * nw * m);
        for &a in angles_deg {
            let sine = Probe::sine(a);
            for (w, &wavelength) in wavelengths_nm.iter().enumerate() {
                let at = Probe::of(Probe::wavenumber(wavelength), n[w * m].re, sine);
                probes.push(at);
                terms.extend(
                    n[w * m..(w + 1) * m]
                        .iter()
                        .map(|&z| MediumTerms::new(z, at.beta())),
                );
            }
        }
        let mut blocks = Vec::with_capacity(angles_deg.len() * nw.div_ceil(LANES));
        for a in 0..angles_deg.len() {
            for first_w in (0..nw).step_by(LANES) {
                let len = LANES.min(nw - first_w);
                let point: [usize; LANES] = from_fn(|l| a * nw + first_w + l.min(len - 1));
                let t = |l: usize, j: usize| &terms[point[l] * m + j];
                let real = |j: usize| (0..LANES).all(|l| t(l, j).real);
                let eta = |j: usize| [from_fn(|l| t(l, j).eta_s.re), from_fn(|l| t(l, j).eta_p.re)];
                let packed = (1..=layers).all(real).then(|| {
                    (1..=layers)
                        .map(|j| PackedLayer {
                            q: from_fn(|l| t(l, j).q.re),
                            eta: eta(j),
                            inv_eta: [
                                from_fn(|l| t(l, j).inv_eta_s.re),
                                from_fn(|l| t(l, j).inv_eta_p.re),
                            ],
                        })
                        .collect()
                });
                let exit = layers + 1;
                blocks.push(Block {
                    point,
                    at: point.map(|p| probes[p]),
                    len,
                    packed,
                    start: FieldLanes::load(
                        &from_fn(|l| Field::exit(t(l, exit).eta_s)),
                        &from_fn(|l| Field::exit(t(l, exit).eta_p)),
                    ),
                    outer: real(exit).then(|| [eta(0), eta(exit)]),
                });
            }
        }
        Batch {
            layers,
            terms,
            blocks,
        }
    }

    /// Number of (angle, wavelength) points, angle-major.
    pub fn points(&self) -> usize {
        self.terms.len() / (self.layers + 2)
    }

    /// R and T of the design with layer thicknesses `thickness_nm` (L of
    /// them, nm) at every point, angle-major, into `out` (one per point).
    /// Every result equals, bit for bit, [`Stack::rt_lanes`] on the stack
    /// of those layers between medium 0 and medium L+1 in the same
    /// four-wavelength blocks the grid driver uses: the packed form only
    /// saves gathering the same terms again for every design.
    pub fn rt(&self, thickness_nm: &[f64], out: &mut [Rt]) {
        assert_eq!(thickness_nm.len(), self.layers, "one thickness per layer");
        assert_eq!(out.len(), self.points(), "one result per point");
        with_wide_vectors(|| self.rt_inline(thickness_nm, out));
    }

    /// The body of [`Batch::rt`], inlined into each instruction-set variant.
    #[inline(always)]
    fn rt_inline(&self, thickness_nm: &[f64], out: &mut [Rt]) {
        let m = self.layers + 2;
        let mut stack: Option<Stack> = None;
        for b in &self.blocks {
            let rt = match &b.packed {
                Some(layers) => self.packed_rt(b, layers, thickness_nm),
                None => {
                    let stack = stack.get_or_insert_with(|| Stack {
                        incident: 0,
                        nodes: (1..)
                            .zip(thickness_nm)
                            .map(|(medium, &thickness_nm)| Node::Layer {
                                medium,
                                thickness_nm,
                            })
                            .collect(),
                        exit: Exit::Medium(self.layers + 1),
                    });
                    let lanes = b.point.map(|p| &self.terms[p * m..(p + 1) * m]);
                    stack.rt_lanes(lanes, &b.at)
                }
            };
            out[b.point[0]..b.point[0] + b.len].copy_from_slice(&rt[..b.len]);
        }
    }

    /// [`Stack::rt_lanes`]'s path for lossless, propagating layers, step
    /// for step, on packed terms.
    #[inline(always)]
    fn packed_rt(&self, b: &Block, layers: &[PackedLayer], thickness_nm: &[f64]) -> [Rt; LANES] {
        let k0: [f64; LANES] = from_fn(|l| b.at[l].k0());
        let mut lanes = b.start;
        for (i, (layer, &d)) in layers.iter().zip(thickness_nm).rev().enumerate() {
            lanes.through_real(from_fn(|l| k0[l] * d), layer.q, layer.eta, layer.inv_eta);
            if i % 8 == 7 {
                lanes.renormalise();
            }
        }
        lanes.renormalise();
        if let Some([eta0, eta_m]) = b.outer {
            let [[rs, rp], [ts, tp]] = lanes.reflect_transmit(eta0, eta_m);
            return from_fn(|l| Rt {
                rs: rs[l],
                rp: rp[l],
                ts: ts[l],
                tp: tp[l],
            });
        }
        let m = self.layers + 2;
        let mut fs = [Field::exit(Complex64::new(0.0, 0.0)); LANES];
        let mut fp = fs;
        lanes.store(&mut fs, &mut fp);
        from_fn(|l| {
            let (inc, ex) = (
                &self.terms[b.point[l] * m],
                &self.terms[b.point[l] * m + m - 1],
            );
            let (rs, ts) = coherent(inc.eta_s, ex.eta_s, &fs[l]);
            let (rp, tp) = coherent(inc.eta_p, ex.eta_p, &fp[l]);
            Rt { rs, rp, ts, tp }
        })
    }
}
