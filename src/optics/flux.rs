//! Where the light is absorbed: the absorptance of each layer from the
//! normal component of the Poynting vector at its faces.
//!
//! In a coherent run the tangential fields (B, C) at every interface follow
//! from the characteristic matrices (Born & Wolf, *Principles of Optics*,
//! 7th ed. 1999, §1.6.2); with tilted admittances the normal flux is
//! S = Re(B·C̄) for s and p alike (Macleod, *Thin-Film Optical Filters*,
//! 4th ed. 2010, §2.6), and a layer absorbs the flux that enters its front
//! face less the flux that leaves its back face, as a fraction of the
//! incident flux (Byrnes, "Multilayer optical calculations",
//! arXiv:1603.02720, 2016, §4). Around incoherent layers each coherent run
//! is lit from both sides by intensities found from the cascade of
//! [`super::stack`], and adds the two absorptions (Centurioni, Appl. Opt. 44,
//! 7532, 2005).

use num_complex::Complex64;

use super::matrix::{Field, Phase};
use super::medium::{MediumTerms, Probe};
use super::stack::{Behind, Exit, Flow, Node, Stack, coherent, thick};

/// Absorptance of every layer of a stack for s and p.
#[derive(Debug, Clone, PartialEq)]
pub struct Absorption {
    /// One entry per layer node in depth-first order, a layer inside a
    /// repeat group counted once and summed over its periods, then the
    /// substrate sheet of an [`Exit::Sheet`]: `[s, p]`.
    pub layers: Vec<[f64; 2]>,
    /// What a black backing behind a sheet absorbs, `[s, p]` (0 otherwise).
    pub backing: [f64; 2],
}

/// A coherent run expanded layer by layer: (layer number, medium, thickness).
type Expanded = Vec<(usize, usize, f64)>;

/// One part of the stack between incoherent boundaries.
enum Block {
    /// Coherent layers between media `a` (front) and `b` (back).
    Run {
        layers: Expanded,
        a: usize,
        b: usize,
    },
    /// A thick incoherent layer, layer number `leaf`.
    Thick { leaf: usize, medium: usize, d: f64 },
    /// A black backing.
    Absorber,
}

impl Stack {
    /// Layers once every repeat group is written out: the cost of
    /// [`Stack::absorption`] and of field profiles grows with it.
    pub fn expanded_layers(&self) -> u64 {
        fn count(nodes: &[Node]) -> u64 {
            nodes
                .iter()
                .map(|n| match n {
                    Node::Repeat { count: c, nodes } => count(nodes).saturating_mul(*c),
                    _ => 1,
                })
                .fold(0, u64::saturating_add)
        }
        count(&self.nodes)
    }

    /// Absorptance of each layer at one point (see [`Absorption`]). Repeat
    /// groups are written out, so the work grows with
    /// [`Stack::expanded_layers`]. The entries and [`Absorption::backing`]
    /// add up to 1 − R − T of [`Stack::rt`].
    pub fn absorption(&self, terms: &[MediumTerms], at: &Probe) -> Absorption {
        let mut leaves = 0;
        let mut blocks = Vec::new();
        let (mut run, mut left) = (Expanded::new(), self.incident);
        for node in &self.nodes {
            match *node {
                Node::Incoherent {
                    medium,
                    thickness_nm,
                } => {
                    let layers = std::mem::take(&mut run);
                    blocks.push(Block::Run {
                        layers,
                        a: left,
                        b: medium,
                    });
                    blocks.push(Block::Thick {
                        leaf: leaves,
                        medium,
                        d: thickness_nm,
                    });
                    leaves += 1;
                    left = medium;
                }
                _ => leaves = expand(std::slice::from_ref(node), leaves, &mut run),
            }
        }
        match self.exit {
            Exit::Medium(m) => blocks.push(Block::Run {
                layers: run,
                a: left,
                b: m,
            }),
            Exit::Sheet {
                medium,
                thickness_nm,
                behind,
            } => {
                blocks.push(Block::Run {
                    layers: run,
                    a: left,
                    b: medium,
                });
                blocks.push(Block::Thick {
                    leaf: leaves,
                    medium,
                    d: thickness_nm,
                });
                leaves += 1;
                blocks.push(match behind {
                    Behind::Medium(b) => Block::Run {
                        layers: Vec::new(),
                        a: medium,
                        b,
                    },
                    Behind::Black => Block::Absorber,
                });
            }
        }
        let mut out = Absorption {
            layers: vec![[0.0; 2]; leaves],
            backing: [0.0; 2],
        };
        for pol in 0..2 {
            cascade(&blocks, terms, at, pol, &mut out);
        }
        out
    }
}

/// Appends the layers of `nodes` written out, numbering layer nodes from
/// `first`; returns the next free number.
fn expand(nodes: &[Node], first: usize, out: &mut Expanded) -> usize {
    let mut next = first;
    for node in nodes {
        match node {
            Node::Layer {
                medium,
                thickness_nm,
            }
            | Node::Incoherent {
                medium,
                thickness_nm,
            } => {
                out.push((next, *medium, *thickness_nm));
                next += 1;
            }
            Node::Repeat { count, nodes } => {
                let start = out.len();
                next = expand(nodes, next, out);
                let period = out[start..].to_vec();
                for _ in 1..*count {
                    out.extend_from_slice(&period);
                }
            }
        }
    }
    next
}

/// The admittance of polarization `pol` (0 = s, 1 = p) and its inverse.
fn admittance(t: &MediumTerms, pol: usize) -> (Complex64, Complex64) {
    if pol == 0 {
        (t.eta_s, t.inv_eta_s)
    } else {
        (t.eta_p, t.inv_eta_p)
    }
}

/// Normal flux Re(B·C̄) of a field vector, without its scale.
fn flux(f: &Field) -> f64 {
    (f.v[0] * f.v[1].conj()).re
}

/// A coherent run lit from medium `a`, toward medium `b`: its power R and T
/// ([`coherent`]'s conventions) and each layer's absorptance, added into
/// `out[layer][pol]`. Returns (R, T, Σ absorptance).
fn lit_run(
    layers: &mut dyn Iterator<Item = (usize, usize, f64)>,
    a: usize,
    b: usize,
    terms: &[MediumTerms],
    at: &Probe,
    pol: usize,
    out: &mut [[f64; 2]],
) -> (f64, f64, f64) {
    let (eta_a, _) = admittance(&terms[a], pol);
    if !(eta_a.re > 0.0) {
        // No light travels in medium a (beyond its critical angle).
        return (0.0, 0.0, 0.0);
    }
    let (eta_b, _) = admittance(&terms[b], pol);
    let mut f = Field::exit(eta_b);
    // Per layer: its number, and the flux at its front and back faces with
    // the log scale of each.
    let mut faces = Vec::new();
    for (leaf, m, d) in layers {
        let back = (flux(&f), f.log);
        let t = &terms[m];
        let (eta, inv_eta) = admittance(t, pol);
        f.through_layer(&Phase::new(at.k0() * d, t.q), eta, inv_eta, t.real);
        f.renormalise();
        faces.push((leaf, (flux(&f), f.log), back));
    }
    let (r, t) = coherent(eta_a, eta_b, &f);
    // Incident flux Re(η₀)|η₀B + C|²/(4|η₀|²), the convention of `coherent`.
    let incident = eta_a.re * (eta_a * f.v[0] + f.v[1]).norm_sqr() / (4.0 * eta_a.norm_sqr());
    let scaled = |(s, log): (f64, f64)| s * (2.0 * (log - f.log)).exp() / incident;
    let mut sum = 0.0;
    for (leaf, front, back) in faces {
        let absorbed = scaled(front) - scaled(back);
        out[leaf][pol] += absorbed;
        sum += absorbed;
    }
    (r, t, sum)
}

/// Absorptances of polarization `pol` over the blocks of a stack.
fn cascade(blocks: &[Block], terms: &[MediumTerms], at: &Probe, pol: usize, out: &mut Absorption) {
    // Each run's flows and its absorption for unit light from either side,
    // kept per layer in scratch lists.
    let n = out.layers.len();
    let mut flows = Vec::with_capacity(blocks.len());
    let mut lit = Vec::with_capacity(blocks.len());
    for block in blocks {
        match block {
            Block::Run { layers, a, b } => {
                let (mut front, mut back) = (vec![[0.0; 2]; n], vec![[0.0; 2]; n]);
                let (rf, tf, sf) = lit_run(
                    &mut layers.iter().rev().copied(),
                    *a,
                    *b,
                    terms,
                    at,
                    pol,
                    &mut front,
                );
                let (rb, tb, sb) = lit_run(
                    &mut layers.iter().copied(),
                    *b,
                    *a,
                    terms,
                    at,
                    pol,
                    &mut back,
                );
                flows.push(Flow { rf, tf, rb, tb });
                // What the run's flows lose beyond its own layers is
                // absorbed in the absorbing medium it is lit from (the
                // interference of incident and reflected waves at that face).
                lit.push(Some((front, back, 1.0 - rf - tf - sf, 1.0 - rb - tb - sb)));
            }
            Block::Thick { medium, d, .. } => {
                flows.push(thick(&terms[*medium], *d, at));
                lit.push(None);
            }
            Block::Absorber => {
                flows.push(Flow::ABSORBED);
                lit.push(None);
            }
        }
    }
    // Cascades of the blocks before and after each boundary; boundary i
    // lies before block i.
    let mut prefix = vec![Flow::CLEAR; blocks.len() + 1];
    for i in 0..blocks.len() {
        prefix[i + 1] = prefix[i].then(flows[i]);
    }
    let mut suffix = vec![Flow::CLEAR; blocks.len() + 1];
    for i in (0..blocks.len()).rev() {
        suffix[i] = flows[i].then(suffix[i + 1]);
    }
    // Forward and backward intensity at each boundary, the round trips
    // between the two sides summed.
    let forward: Vec<f64> = (0..=blocks.len())
        .map(|i| prefix[i].tf / (1.0 - prefix[i].rb * suffix[i].rf).max(f64::MIN_POSITIVE))
        .collect();
    let backward: Vec<f64> = (0..=blocks.len())
        .map(|i| forward[i] * suffix[i].rf)
        .collect();
    for (i, block) in blocks.iter().enumerate() {
        let (lit_front, lit_back) = (forward[i], backward[i + 1]);
        match block {
            Block::Run { .. } => {
                let Some((front, back, lost_front, lost_back)) = &lit[i] else {
                    unreachable!("every run has its lighting")
                };
                for (o, (f, b)) in out.layers.iter_mut().zip(front.iter().zip(back)) {
                    o[pol] += lit_front * f[pol] + lit_back * b[pol];
                }
                if let Some(Block::Thick { leaf, .. }) = i.checked_sub(1).map(|j| &blocks[j]) {
                    out.layers[*leaf][pol] += lit_front * lost_front;
                }
                if let Some(Block::Thick { leaf, .. }) = blocks.get(i + 1) {
                    out.layers[*leaf][pol] += lit_back * lost_back;
                }
            }
            Block::Thick { leaf, .. } => {
                let alpha = flows[i].tf;
                out.layers[*leaf][pol] += (1.0 - alpha) * (lit_front + lit_back);
            }
            Block::Absorber => out.backing[pol] += lit_front,
        }
    }
}
