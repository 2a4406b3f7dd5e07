//! The electric field through a coherent stack: |E|² relative to the
//! incident wave at any depth.
//!
//! The tangential fields (B, C) at a plane inside a layer follow from those
//! at its back face by the characteristic matrix of the part of the layer
//! behind the plane (Born & Wolf, *Principles of Optics*, 7th ed. 1999,
//! §1.6.2). For s the electric field is tangential, |E|² = |B|². For p,
//! with tilted admittances (Macleod, *Thin-Film Optical Filters*, 4th ed.
//! 2010, §2.6), B is the tangential component and Maxwell's equations give
//! the normal one as E_z = β·C/n² (β = n₀ sin θ₀; Born & Wolf §1.6.1), so
//! |E|² = |B|² + |β C/n²|². The incident wave's tangential amplitude is
//! (η₀B₀ + C₀)/(2η₀) at the front face; for p its full amplitude is that
//! over cos θ₀.

use num_complex::Complex64;

use super::matrix::{Field, Phase};
use super::medium::{MediumTerms, Probe};
use super::stack::{Exit, Node, Stack};

/// |E|² at one depth.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FieldPoint {
    /// Depth in nm from the first interface (negative in the incident medium).
    pub z_nm: f64,
    /// Where the point lies: 0 in the incident medium, k for the k-th layer
    /// node of the stack (depth-first, a layer in a repeat group numbered
    /// once), one past the last layer in the exit medium.
    pub layer: usize,
    /// |E|² relative to |E|² of the incident wave.
    pub e2: f64,
}

impl Stack {
    /// |E|² for polarization `pol` (0 = s, 1 = p) at the depths `z_nm`
    /// (any order). A coherent stack on a semi-infinite exit only; `None`
    /// for a stack with incoherent layers or a substrate sheet. Repeat
    /// groups are written out ([`Stack::expanded_layers`]).
    pub fn field(
        &self,
        terms: &[MediumTerms],
        at: &Probe,
        pol: usize,
        z_nm: &[f64],
    ) -> Option<Vec<FieldPoint>> {
        let Exit::Medium(exit) = self.exit else {
            return None;
        };
        let (mut layers, mut count) = (Vec::new(), 0);
        if !coherent_layers(&self.nodes, &mut count, &mut layers) {
            return None;
        }
        let eta = |t: &MediumTerms| {
            if pol == 0 {
                (t.eta_s, t.inv_eta_s)
            } else {
                (t.eta_p, t.inv_eta_p)
            }
        };
        // Fields at the back face of every layer, walking from the exit.
        let mut f = Field::exit(eta(&terms[exit]).0);
        let mut backs = vec![f; layers.len()];
        for (j, &(_, m, d)) in layers.iter().enumerate().rev() {
            backs[j] = f;
            let t = &terms[m];
            let (e, inv) = eta(t);
            f.through_layer(&Phase::new(at.k0() * d, t.q), e, inv, t.real);
            f.renormalise();
        }
        let front = f;
        let inc = &terms[self.incident];
        let (eta0, _) = eta(inc);
        let incident = (eta0 * front.v[0] + front.v[1]) / (2.0 * eta0);
        // For p the incident wave's full amplitude is the tangential one over cos θ₀.
        let cos0 = inc.q.re / inc.n.re;
        let reference = incident.norm_sqr() / if pol == 0 { 1.0 } else { cos0 * cos0 };
        let beta = at.beta();
        // |E|² of field vector `v` (scale `log`) in medium `m`.
        let e2 = |v: [Complex64; 2], log: f64, m: usize| {
            let scale = (2.0 * (log - front.log)).exp();
            let normal = if pol == 0 {
                0.0
            } else {
                (beta * v[1] / (terms[m].n * terms[m].n)).norm_sqr()
            };
            (v[0].norm_sqr() + normal) * scale / reference
        };
        // The field at distance `w` in front of a plane with field `f`, in medium m.
        let ahead = |f: &Field, m: usize, w: f64| {
            let t = &terms[m];
            let (e, inv) = eta(t);
            let mut g = *f;
            g.through_layer(&Phase::new(at.k0() * w, t.q), e, inv, t.real);
            g
        };
        // Faces: starts[j] is the depth of layer j's front face.
        let mut starts = Vec::with_capacity(layers.len() + 1);
        let mut depth = 0.0;
        for &(_, _, d) in &layers {
            starts.push(depth);
            depth += d;
        }
        let total = depth;
        let points = z_nm
            .iter()
            .map(|&z| {
                if z < 0.0 {
                    let g = ahead(&front, self.incident, -z);
                    return FieldPoint {
                        z_nm: z,
                        layer: 0,
                        e2: e2(g.v, g.log, self.incident),
                    };
                }
                if z >= total {
                    // Only the transmitted wave: B = e^{i k₀ q (z − D)}.
                    let q = terms[exit].q;
                    let decay = (-2.0 * at.k0() * q.im * (z - total)).exp();
                    let g = Field::exit(eta(&terms[exit]).0);
                    return FieldPoint {
                        z_nm: z,
                        layer: count + 1,
                        e2: e2(g.v, g.log, exit) * decay,
                    };
                }
                let j = starts.partition_point(|&s| s <= z) - 1;
                let (leaf, m, d) = layers[j];
                let g = ahead(&backs[j], m, starts[j] + d - z);
                FieldPoint {
                    z_nm: z,
                    layer: leaf + 1,
                    e2: e2(g.v, g.log, m),
                }
            })
            .collect();
        Some(points)
    }
}

/// Writes out the coherent layers of `nodes` as (layer number, medium,
/// thickness), numbering layer nodes from `next`; false if an incoherent
/// layer is met.
fn coherent_layers(nodes: &[Node], next: &mut usize, out: &mut Vec<(usize, usize, f64)>) -> bool {
    for node in nodes {
        match node {
            Node::Layer {
                medium,
                thickness_nm,
            } => {
                out.push((*next, *medium, *thickness_nm));
                *next += 1;
            }
            Node::Incoherent { .. } => return false,
            Node::Repeat { count, nodes } => {
                let start = out.len();
                if !coherent_layers(nodes, next, out) {
                    return false;
                }
                let period = out[start..].to_vec();
                for _ in 1..*count {
                    out.extend_from_slice(&period);
                }
            }
        }
    }
    true
}
