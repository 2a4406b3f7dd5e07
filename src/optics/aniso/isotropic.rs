//! Runs of isotropic layers in the 4×4 path. Between isotropic media the p
//! and s waves never mix, so every 2×2 block of a run's scattering matrix
//! is diagonal in the (p, s) wave basis of [`Modes::isotropic`]: the run is
//! combined with one complex number per block and polarization, by the same
//! interface map and Redheffer star product as [`S`], written out for
//! scalars (L. Li, J. Opt. Soc. Am. A 13, 1024, 1996).
//!
//! Where every layer of a run is lossless and the waves in it propagate,
//! the run is computed as the 2×2 engine computes it: the product of the
//! layers' characteristic matrices in real arithmetic (Born & Wolf,
//! *Principles of Optics*, 7th ed. 1999, §1.6.2), turned into the
//! scattering coefficients once. That product stays accurate (it is
//! unimodular and rescaled, and in a stop band its dominant direction is
//! what the coefficients need), and costs a fraction of a star product per
//! layer.

use nalgebra::{Matrix2, Vector4};
use num_complex::Complex64 as C;

use super::super::exact::EXACT_FROM;
use super::super::matrix::{Mat, Phase, RealPair};
use super::super::medium::MediumTerms;
use super::Layer4;
use super::modes::{Modes, flux};
use super::smatrix::{S, Singular};

/// The waves of an isotropic medium, by polarization (0 p, 1 s): the
/// normal wavevector q and the 2×2 block of the wave basis W that holds
/// the polarization's forward and backward waves (and its inverse).
#[derive(Debug, Clone, Copy)]
pub struct Waves {
    /// q = √(n² − ξ²) on the decaying branch.
    pub q: C,
    /// Rows (E_x, H_y) of the p waves and (E_y, −H_x) of the s waves;
    /// columns forward, backward; each wave at unit normal flux where it
    /// carries any.
    pub blocks: [Matrix2<C>; 2],
    /// The blocks' inverses (zero where a block is singular).
    pub inverses: [Matrix2<C>; 2],
}

impl Waves {
    /// The waves of a medium of index `n` at in-plane wavevector `xi`:
    /// p waves Ψ = (±q/n, n, 0, 0), s waves Ψ = (0, 0, 1, ±q).
    pub fn new(n: C, xi: f64) -> Waves {
        let mut q = (n * n - xi * xi).sqrt();
        if q.im < 0.0 || (q.im == 0.0 && q.re < 0.0) {
            q = -q;
        }
        let one = C::new(1.0, 0.0);
        // The scale that brings a wave to unit normal flux, when it has any.
        let unit = |v: Vector4<C>| {
            let f = flux(&v).abs();
            if f > 1e-300 {
                C::new(1.0 / f.sqrt(), 0.0)
            } else {
                one
            }
        };
        let z = C::new(0.0, 0.0);
        let p = [
            unit(Vector4::new(q / n, n, z, z)),
            unit(Vector4::new(-q / n, n, z, z)),
        ];
        let s = [
            unit(Vector4::new(z, z, one, q)),
            unit(Vector4::new(z, z, one, -q)),
        ];
        let blocks = [
            Matrix2::new(q / n * p[0], -q / n * p[1], n * p[0], n * p[1]),
            Matrix2::new(s[0], s[1], q * s[0], -q * s[1]),
        ];
        let inverses = blocks.map(|b| {
            let det = b[(0, 0)] * b[(1, 1)] - b[(0, 1)] * b[(1, 0)];
            if det == z {
                return Matrix2::zeros();
            }
            let inv = one / det;
            Matrix2::new(
                b[(1, 1)] * inv,
                -b[(0, 1)] * inv,
                -b[(1, 0)] * inv,
                b[(0, 0)] * inv,
            )
        });
        Waves {
            q,
            blocks,
            inverses,
        }
    }
}

/// One polarization's scattering coefficients (the diagonal entries of
/// [`S`]'s blocks).
#[derive(Debug, Clone, Copy)]
struct Scalar {
    r_front: C,
    t_forward: C,
    t_backward: C,
    r_back: C,
}

impl Scalar {
    const IDENTITY: Scalar = Scalar {
        r_front: C::new(0.0, 0.0),
        t_forward: C::new(1.0, 0.0),
        t_backward: C::new(1.0, 0.0),
        r_back: C::new(0.0, 0.0),
    };

    /// [`S::of_amplitude_map`] for one polarization's 2×2 map.
    fn of_map(m: &Matrix2<C>) -> Result<Scalar, Singular> {
        let (m11, m12, m21, m22) = (m[(0, 0)], m[(0, 1)], m[(1, 0)], m[(1, 1)]);
        if m11 == C::new(0.0, 0.0) {
            return Err(Singular);
        }
        let inv11 = m11.inv();
        Ok(Scalar {
            r_front: m21 * inv11,
            t_forward: inv11,
            t_backward: m22 - m21 * inv11 * m12,
            r_back: -inv11 * m12,
        })
    }

    /// [`Scalar::of_map`] for the map e^{`log`}·`m` of a run whose
    /// characteristic matrix is unimodular, so that det of the map is
    /// `det`, the ratio of its media's wave determinants: the backward
    /// transmission det/m₁₁ then needs no difference of large products.
    fn of_scaled_map(m: &Matrix2<C>, log: f64, det: C) -> Result<Scalar, Singular> {
        let m11 = m[(0, 0)];
        if m11 == C::new(0.0, 0.0) {
            return Err(Singular);
        }
        let inv11 = m11.inv();
        let unscale = (-log).exp();
        Ok(Scalar {
            r_front: m[(1, 0)] * inv11,
            t_forward: inv11 * unscale,
            t_backward: det * inv11 * unscale,
            r_back: -inv11 * m[(0, 1)],
        })
    }

    /// [`S::then`] for scalars.
    fn then(&self, next: &Scalar) -> Result<Scalar, Singular> {
        let d = C::new(1.0, 0.0) - next.r_front * self.r_back;
        if d == C::new(0.0, 0.0) {
            return Err(Singular);
        }
        let x = d.inv();
        Ok(Scalar {
            r_front: self.r_front + self.t_backward * x * next.r_front * self.t_forward,
            t_forward: next.t_forward * x * self.t_forward,
            t_backward: self.t_backward * x * next.t_backward,
            r_back: next.r_back + next.t_forward * x * self.r_back * next.t_backward,
        })
    }
}

/// The p and s coefficients of a part.
#[derive(Debug, Clone, Copy)]
struct Split([Scalar; 2]);

impl Split {
    fn layer(w: &Waves, k0: f64, d: f64) -> Split {
        // Forward and backward waves both gain exp(i k₀ d q) across the layer.
        let t = (C::new(0.0, k0 * d) * w.q).exp();
        let s = Scalar {
            r_front: C::new(0.0, 0.0),
            t_forward: t,
            t_backward: t,
            r_back: C::new(0.0, 0.0),
        };
        Split([s, s])
    }

    /// `self` followed by a layer of waves `w` (no reflection inside it):
    /// the star product with r = 0, t₊ = t₋ = exp(i k₀ d q).
    fn then_layer(&self, w: &Waves, k0: f64, d: f64) -> Split {
        let t = (C::new(0.0, k0 * d) * w.q).exp();
        Split(self.0.map(|s| Scalar {
            r_front: s.r_front,
            t_forward: t * s.t_forward,
            t_backward: s.t_backward * t,
            r_back: t * s.r_back * t,
        }))
    }

    fn interface(front: &Waves, back: &Waves) -> Result<Split, Singular> {
        let one = |k: usize| Scalar::of_map(&(front.inverses[k] * back.blocks[k]));
        Ok(Split([one(0)?, one(1)?]))
    }

    /// The run between the waves `front` (its first layer's medium) and
    /// `back` (its last's) whose characteristic matrices (s, p) are `m`:
    /// the amplitude map W_front⁻¹·M·W_back per polarization.
    fn of_product(m: &RealPair, front: &Waves, back: &Waves) -> Result<Split, Singular> {
        let det = |b: &Matrix2<C>| b[(0, 0)] * b[(1, 1)] - b[(0, 1)] * b[(1, 0)];
        let one = |k: usize, lane: &Mat| {
            let [[a, b], [c, d]] = lane.m;
            let map = front.inverses[k] * Matrix2::new(a, b, c, d) * back.blocks[k];
            let ratio = det(&back.blocks[k]) * det(&front.inverses[k]);
            Scalar::of_scaled_map(&map, lane.log, ratio)
        };
        let (s, p) = m.complex();
        Ok(Split([one(0, &p)?, one(1, &s)?]))
    }

    fn then(&self, next: &Split) -> Result<Split, Singular> {
        Ok(Split([
            self.0[0].then(&next.0[0])?,
            self.0[1].then(&next.0[1])?,
        ]))
    }

    fn pow(&self, mut count: u64) -> Result<Split, Singular> {
        let (mut base, mut acc) = (*self, Split([Scalar::IDENTITY; 2]));
        while count > 0 {
            if count & 1 == 1 {
                acc = acc.then(&base)?;
            }
            count >>= 1;
            if count > 0 {
                base = base.then(&base)?;
            }
        }
        Ok(acc)
    }

    /// The full scattering matrix, blocks diagonal in (p, s).
    fn full(&self) -> S {
        let diag = |f: fn(&Scalar) -> C| {
            Matrix2::new(f(&self.0[0]), C::default(), C::default(), f(&self.0[1]))
        };
        S {
            r_front: diag(|s| s.r_front),
            t_forward: diag(|s| s.t_forward),
            t_backward: diag(|s| s.t_backward),
            r_back: diag(|s| s.r_back),
        }
    }
}

/// The waves of each medium and the interfaces between pairs of media met
/// at one point, each computed once (a stack alternates a few media).
#[derive(Debug)]
pub struct Cache {
    xi: f64,
    k0: f64,
    waves: Vec<Option<Waves>>,
    terms: Vec<Option<MediumTerms>>,
    interfaces: Vec<((usize, usize), Split)>,
}

impl Cache {
    /// An empty cache for `media` media at in-plane wavevector `xi` and
    /// vacuum wavenumber `k0`.
    pub fn new(media: usize, xi: f64, k0: f64) -> Cache {
        Cache {
            xi,
            k0,
            waves: vec![None; media],
            terms: vec![None; media],
            interfaces: Vec::new(),
        }
    }

    fn terms(&mut self, n: &[C], m: usize) -> MediumTerms {
        *self.terms[m].get_or_insert_with(|| MediumTerms::new(n[m], self.xi))
    }

    fn waves(&mut self, n: &[C], m: usize) -> Waves {
        *self.waves[m].get_or_insert_with(|| Waves::new(n[m], self.xi))
    }

    fn interface(&mut self, n: &[C], front: usize, back: usize) -> Result<Split, Singular> {
        if let Some((_, s)) = self.interfaces.iter().find(|(k, _)| *k == (front, back)) {
            return Ok(*s);
        }
        let s = Split::interface(&self.waves(n, front), &self.waves(n, back))?;
        self.interfaces.push(((front, back), s));
        Ok(s)
    }
}

/// A run of isotropic layers: its coefficients and the media of its first
/// and last layer.
#[derive(Debug, Clone, Copy)]
pub struct Run {
    front: usize,
    split: Split,
    back: usize,
}

impl Run {
    /// The run's scattering matrix and the waves on either side, as the
    /// general 4×4 path holds them.
    pub fn into_part(self, n: &[C], cache: &mut Cache) -> (Modes, S, Modes) {
        (
            Modes::of_waves(&cache.waves(n, self.front)),
            self.split.full(),
            Modes::of_waves(&cache.waves(n, self.back)),
        )
    }
}

/// True when `node` holds isotropic layers only.
pub fn is_isotropic(node: &Layer4) -> bool {
    match node {
        Layer4::Isotropic { .. } => true,
        Layer4::Repeat { nodes, .. } => nodes.iter().all(is_isotropic),
        Layer4::Tensor { .. } | Layer4::Helix { .. } => false,
    }
}

/// The run of `nodes` (each [`is_isotropic`]) at one point, `n` the
/// media's indices; `None` when there are no nodes. In real arithmetic
/// where every layer is lossless with propagating waves (and every repeat
/// shorter than the 2×2 engine's double-double threshold), else by star
/// products.
pub fn run(nodes: &[Layer4], n: &[C], cache: &mut Cache) -> Result<Option<Run>, Singular> {
    if let (Some(front), Some(back)) = (edge_medium(nodes, false), edge_medium(nodes, true))
        && let Some(m) = real_product(nodes, n, cache)
    {
        let (wf, wb) = (cache.waves(n, front), cache.waves(n, back));
        return Ok(Some(Run {
            front,
            split: Split::of_product(&m, &wf, &wb)?,
            back,
        }));
    }
    scattered(nodes, n, cache)
}

/// The medium of the first (`from_back`: last) layer of `nodes`.
fn edge_medium(nodes: &[Layer4], from_back: bool) -> Option<usize> {
    let medium = |node: &Layer4| match node {
        Layer4::Isotropic { medium, .. } => Some(*medium),
        Layer4::Repeat { nodes, .. } => edge_medium(nodes, from_back),
        Layer4::Tensor { .. } | Layer4::Helix { .. } => None,
    };
    if from_back {
        nodes.iter().rev().find_map(medium)
    } else {
        nodes.iter().find_map(medium)
    }
}

/// The characteristic matrices (s, p) of `nodes`, the product of their
/// layers' in real arithmetic as the 2×2 engine forms them, when every
/// layer is lossless with propagating waves ([`MediumTerms::real`]) and
/// every repeat is shorter than [`EXACT_FROM`] periods; `None` otherwise.
fn real_product(nodes: &[Layer4], n: &[C], cache: &mut Cache) -> Option<RealPair> {
    let mut m = RealPair::identity();
    for node in nodes {
        let next = match *node {
            Layer4::Isotropic {
                medium,
                thickness_nm,
            } => {
                let t = cache.terms(n, medium);
                if !t.real {
                    return None;
                }
                RealPair::of_layer(
                    &Phase::new(cache.k0 * thickness_nm, t.q),
                    [t.eta_s.re, t.eta_p.re],
                    [t.inv_eta_s.re, t.inv_eta_p.re],
                )
            }
            Layer4::Repeat { count, ref nodes } if count < EXACT_FROM => {
                real_product(nodes, n, cache)?.pow(count)
            }
            _ => return None,
        };
        m = m.mul(&next);
    }
    Some(m)
}

/// [`run`] by star products of interfaces and layers, stable for absorbing
/// and evanescent layers and long repeats.
fn scattered(nodes: &[Layer4], n: &[C], cache: &mut Cache) -> Result<Option<Run>, Singular> {
    let mut acc: Option<Run> = None;
    for node in nodes {
        let part = match *node {
            Layer4::Isotropic {
                medium,
                thickness_nm,
            } => {
                let w = cache.waves(n, medium);
                // A layer adds its interface (none after its own medium)
                // and its phase.
                if let Some(a) = acc.as_mut() {
                    if a.back != medium {
                        a.split = a.split.then(&cache.interface(n, a.back, medium)?)?;
                        a.back = medium;
                    }
                    a.split = a.split.then_layer(&w, cache.k0, thickness_nm);
                    continue;
                }
                Run {
                    front: medium,
                    split: Split::layer(&w, cache.k0, thickness_nm),
                    back: medium,
                }
            }
            Layer4::Repeat { count, ref nodes } => {
                let Some(period) = run(nodes, n, cache)? else {
                    continue;
                };
                // Close the period on itself, power count − 1, then the last.
                let closed =
                    period
                        .split
                        .then(&cache.interface(n, period.back, period.front)?)?;
                Run {
                    split: closed.pow(count - 1)?.then(&period.split)?,
                    ..period
                }
            }
            Layer4::Tensor { .. } | Layer4::Helix { .. } => {
                unreachable!("runs hold isotropic layers only")
            }
        };
        acc = Some(match acc {
            None => part,
            Some(a) => Run {
                front: a.front,
                split: a
                    .split
                    .then(&cache.interface(n, a.back, part.front)?)?
                    .then(&part.split)?,
                back: part.back,
            },
        });
    }
    Ok(acc)
}
