//! A resolved layer structure and its reflectance and transmittance at one
//! wavelength and angle, for both polarizations.

use num_complex::Complex64;

use std::array::from_fn;

use super::exact::{self, EXACT_FROM};
use super::matrix::{Field, FieldLanes, Mat, Phase, RealLanes, RealPair};
use super::medium::{MediumTerms, Probe};
use super::simd::with_wide_vectors;
use super::trig::sin_cos_lanes;

/// One element of a stack, listed from the incident side.
#[derive(Debug, Clone, PartialEq)]
pub enum Node {
    /// A homogeneous film of medium `medium` (an index into the media list).
    Layer {
        /// Index of the medium.
        medium: usize,
        /// Physical thickness in nm.
        thickness_nm: f64,
    },
    /// `count` identical copies of `nodes`, computed by powering the period's matrix.
    Repeat {
        /// Number of periods, ≥ 1.
        count: u64,
        /// One period, from the incident side.
        nodes: Vec<Node>,
    },
    /// A thick layer treated incoherently: the beams multiply reflected in
    /// it add in intensity. Only meaningful at the top level of a stack;
    /// inside a repeat group it is taken as a coherent layer.
    Incoherent {
        /// Index of the medium.
        medium: usize,
        /// Physical thickness in nm.
        thickness_nm: f64,
    },
}

/// What lies behind the coherent stack.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Exit {
    /// A semi-infinite medium.
    Medium(usize),
    /// A thick sheet treated incoherently (intensities add), then a medium behind it.
    Sheet {
        /// Medium of the sheet.
        medium: usize,
        /// Thickness of the sheet in nm.
        thickness_nm: f64,
        /// What is behind the sheet.
        behind: Behind,
    },
}

/// The medium behind an incoherent sheet.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Behind {
    /// A semi-infinite medium.
    Medium(usize),
    /// An index-matched perfect absorber (a black backing): nothing is
    /// reflected at the back face and all light reaching it is absorbed.
    Black,
}

/// Incident medium, coherent layers and exit, all media by index.
#[derive(Debug, Clone, PartialEq)]
pub struct Stack {
    /// Index of the incident medium (lossless).
    pub incident: usize,
    /// Coherent layers from the incident side.
    pub nodes: Vec<Node>,
    /// What lies behind them.
    pub exit: Exit,
}

/// Reflectance and transmittance for s and p at one point.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Rt {
    /// R for s polarization.
    pub rs: f64,
    /// R for p polarization.
    pub rp: f64,
    /// T for s polarization.
    pub ts: f64,
    /// T for p polarization.
    pub tp: f64,
}

/// Number of wavelengths [`Stack::rt_lanes`] evaluates side by side.
pub const LANES: usize = 4;

impl Stack {
    /// [`Stack::rt`] for `LANES` (four) wavelengths at once (`terms[l]` and `at[l]`
    /// per lane, all at the same angle). Lossless layers that propagate on
    /// every lane run in structure-of-arrays form, and so do lossless repeat
    /// groups shorter than 64 periods; anything else (absorbing or
    /// evanescent layers, long repeat groups, an incoherent sheet) goes lane
    /// by lane through the same code as [`Stack::rt`]. Compiled for wider
    /// vectors where the processor has them, with the same results.
    pub fn rt_lanes(&self, terms: [&[MediumTerms]; LANES], at: &[Probe; LANES]) -> [Rt; LANES] {
        with_wide_vectors(|| self.rt_lanes_inline(terms, at))
    }

    /// The body of [`Stack::rt_lanes`], inlined into each instruction-set
    /// variant.
    #[inline(always)]
    fn rt_lanes_inline(&self, terms: [&[MediumTerms]; LANES], at: &[Probe; LANES]) -> [Rt; LANES] {
        let Exit::Medium(m) = self.exit else {
            return from_fn(|l| self.rt(terms[l], &at[l]));
        };
        if self.has_incoherent() {
            return from_fn(|l| self.rt(terms[l], &at[l]));
        }
        let k0: [f64; LANES] = from_fn(|l| at[l].k0());
        let mut fs: [Field; LANES] = from_fn(|l| Field::exit(terms[l][m].eta_s));
        let mut fp: [Field; LANES] = from_fn(|l| Field::exit(terms[l][m].eta_p));
        let mut lanes = FieldLanes::load(&fs, &fp);
        let mut packed = true;
        for (i, node) in self.nodes.iter().rev().enumerate() {
            match node {
                Node::Layer {
                    medium,
                    thickness_nm,
                } if terms.iter().all(|t| t[*medium].real) => {
                    if !packed {
                        lanes = FieldLanes::load(&fs, &fp);
                        packed = true;
                    }
                    let t = |l: usize| &terms[l][*medium];
                    lanes.through_real(
                        from_fn(|l| k0[l] * thickness_nm),
                        from_fn(|l| t(l).q.re),
                        [from_fn(|l| t(l).eta_s.re), from_fn(|l| t(l).eta_p.re)],
                        [
                            from_fn(|l| t(l).inv_eta_s.re),
                            from_fn(|l| t(l).inv_eta_p.re),
                        ],
                    );
                    if i % 8 == 7 {
                        lanes.renormalise();
                    }
                }
                Node::Repeat { count, nodes }
                    if *count < EXACT_FROM && short(nodes) && real_on_all_lanes(nodes, &terms) =>
                {
                    if !packed {
                        lanes = FieldLanes::load(&fs, &fp);
                        packed = true;
                    }
                    lanes.through_real_matrix(&product_real_lanes(nodes, terms, k0).pow(*count));
                    lanes.renormalise();
                }
                _ => {
                    if packed {
                        lanes.store(&mut fs, &mut fp);
                        packed = false;
                    }
                    for l in 0..LANES {
                        apply(
                            std::slice::from_ref(node),
                            terms[l],
                            &at[l],
                            &mut fs[l],
                            &mut fp[l],
                        );
                    }
                }
            }
        }
        if packed {
            lanes.renormalise();
            let (inc, ex) = (self.incident, m);
            if terms.iter().all(|t| t[ex].real) {
                // Real admittances on both sides: R and T straight from the lanes.
                let eta = |k: usize| {
                    [
                        from_fn(|l| terms[l][k].eta_s.re),
                        from_fn(|l| terms[l][k].eta_p.re),
                    ]
                };
                let [[rs, rp], [ts, tp]] = lanes.reflect_transmit(eta(inc), eta(ex));
                return from_fn(|l| Rt {
                    rs: rs[l],
                    rp: rp[l],
                    ts: ts[l],
                    tp: tp[l],
                });
            }
            lanes.store(&mut fs, &mut fp);
        }
        from_fn(|l| {
            let (inc, ex) = (&terms[l][self.incident], &terms[l][m]);
            let (rs, ts) = coherent(inc.eta_s, ex.eta_s, &fs[l]);
            let (rp, tp) = coherent(inc.eta_p, ex.eta_p, &fp[l]);
            Rt { rs, rp, ts, tp }
        })
    }

    /// R and T at one wavelength and angle: `terms[m]` holds medium m's
    /// terms at the point `at`.
    pub fn rt(&self, terms: &[MediumTerms], at: &Probe) -> Rt {
        let inc = &terms[self.incident];
        match self.exit {
            Exit::Medium(m) if !self.has_incoherent() => {
                let ex = &terms[m];
                let (mut fs, mut fp) = (Field::exit(ex.eta_s), Field::exit(ex.eta_p));
                apply(&self.nodes, terms, at, &mut fs, &mut fp);
                let (rs, ts) = coherent(inc.eta_s, ex.eta_s, &fs);
                let (rp, tp) = coherent(inc.eta_p, ex.eta_p, &fp);
                Rt { rs, rp, ts, tp }
            }
            _ => self.rt_incoherent(terms, at),
        }
    }

    /// True when a top-level node is an incoherent layer.
    fn has_incoherent(&self) -> bool {
        self.nodes
            .iter()
            .any(|n| matches!(n, Node::Incoherent { .. }))
    }

    /// R and T of a stack with incoherent layers (an [`Exit::Sheet`] counts
    /// as one before what lies behind it): the coherent runs between them,
    /// each seen from both sides, and the single-pass attenuations of the
    /// thick layers, cascaded in intensity (Katsidis & Siapkas, "General
    /// transfer-matrix method for optical multilayer systems with coherent,
    /// partially coherent, and incoherent interference", Appl. Opt. 41, 3978,
    /// 2002; Centurioni, "Generalized matrix method for calculation of
    /// internal light energy flux in mixed coherent and incoherent
    /// multilayers", Appl. Opt. 44, 7532, 2005), combined pairwise in the
    /// bounded form of [`Flow::then`].
    fn rt_incoherent(&self, terms: &[MediumTerms], at: &Probe) -> Rt {
        let mut total = [Flow::CLEAR; 2];
        let mut left = self.incident;
        let mut start = 0;
        let add = |total: &mut [Flow; 2], next: [Flow; 2]| {
            *total = [total[0].then(next[0]), total[1].then(next[1])];
        };
        for (i, node) in self.nodes.iter().enumerate() {
            if let Node::Incoherent {
                medium,
                thickness_nm,
            } = *node
            {
                add(
                    &mut total,
                    segment(&self.nodes[start..i], left, medium, terms, at),
                );
                add(&mut total, [thick(&terms[medium], thickness_nm, at); 2]);
                (left, start) = (medium, i + 1);
            }
        }
        let rest = &self.nodes[start..];
        match self.exit {
            Exit::Medium(m) => add(&mut total, segment(rest, left, m, terms, at)),
            Exit::Sheet {
                medium,
                thickness_nm,
                behind,
            } => {
                add(&mut total, segment(rest, left, medium, terms, at));
                add(&mut total, [thick(&terms[medium], thickness_nm, at); 2]);
                match behind {
                    Behind::Medium(b) => add(&mut total, segment(&[], medium, b, terms, at)),
                    Behind::Black => add(&mut total, [Flow::ABSORBED; 2]),
                }
            }
        }
        let [s, p] = total;
        Rt {
            rs: s.rf,
            rp: p.rf,
            ts: s.tf,
            tp: p.tf,
        }
    }
}

/// Power reflectance and transmittance of a part of a stack for light
/// arriving from the front (f) and from the back (b).
#[derive(Debug, Clone, Copy)]
pub(super) struct Flow {
    pub rf: f64,
    pub tf: f64,
    pub rb: f64,
    pub tb: f64,
}

impl Flow {
    /// Nothing at all: everything passes.
    pub const CLEAR: Flow = Flow {
        rf: 0.0,
        tf: 1.0,
        rb: 0.0,
        tb: 1.0,
    };

    /// An index-matched perfect absorber: nothing comes back or through.
    pub const ABSORBED: Flow = Flow {
        rf: 0.0,
        tf: 0.0,
        rb: 0.0,
        tb: 0.0,
    };

    /// `self` followed by `next`, the beams between them adding in
    /// intensity (a geometric series of round trips):
    /// R_f = R_f1 + T_f1 T_b1 R_f2 / (1 − R_b1 R_f2),
    /// T_f = T_f1 T_f2 / (1 − R_b1 R_f2), and likewise from the back
    /// (Harbecke, "Coherent and incoherent reflection and transmission of
    /// multilayer structures", Appl. Phys. B 39, 165, 1986). Every term stays
    /// within [0, 1], so no scale is needed however thick or absorbing the
    /// layers; two perfect mirrors facing each other trap nothing that
    /// entered (T = 0 on one side), so the denominator is kept from zero.
    pub fn then(self, next: Flow) -> Flow {
        let inv = 1.0 / (1.0 - self.rb * next.rf).max(f64::MIN_POSITIVE);
        Flow {
            rf: self.rf + self.tf * self.tb * next.rf * inv,
            tf: self.tf * next.tf * inv,
            rb: next.rb + next.tb * next.tf * self.rb * inv,
            tb: next.tb * self.tb * inv,
        }
    }
}

/// The coherent run `nodes` between media `a` (front) and `b` (back), seen
/// from both sides, for s and p. The reversed run's matrix is the
/// transposed product with its diagonal swapped ([`Mat::reversed`]).
fn segment(nodes: &[Node], a: usize, b: usize, terms: &[MediumTerms], at: &Probe) -> [Flow; 2] {
    let (ms, mp) = product(nodes, terms, at);
    let (ta, tb) = (&terms[a], &terms[b]);
    let flow = |m: Mat, ea: Complex64, eb: Complex64| {
        let through = |mat: &Mat, exit: Complex64| {
            let mut f = Field::exit(exit);
            f.through(mat);
            f
        };
        // No light travels in a lossless medium beyond its critical angle
        // (Re η = 0): nothing arrives from that side (and a thick layer of
        // it passes nothing, tunnelling through many wavelengths being
        // negligible).
        let lit = |from: Complex64, to: Complex64, m: &Mat| {
            if from.re > 0.0 {
                coherent(from, to, &through(m, to))
            } else {
                (0.0, 0.0)
            }
        };
        let (rf, tf) = lit(ea, eb, &m);
        let (rb, tb) = lit(eb, ea, &m.reversed());
        Flow { rf, tf, rb, tb }
    };
    [flow(ms, ta.eta_s, tb.eta_s), flow(mp, ta.eta_p, tb.eta_p)]
}

/// A thick layer's single-pass power attenuation e^{−2 Im δ} both ways.
pub(super) fn thick(t: &MediumTerms, thickness_nm: f64, at: &Probe) -> Flow {
    let alpha = (-2.0 * at.k0() * thickness_nm * t.q.im).exp();
    Flow {
        rf: 0.0,
        tf: alpha,
        rb: 0.0,
        tb: alpha,
    }
}

/// Carries the exit fields through `nodes` toward the incident side.
fn apply(nodes: &[Node], terms: &[MediumTerms], at: &Probe, fs: &mut Field, fp: &mut Field) {
    for (i, node) in nodes.iter().rev().enumerate() {
        if i % 8 == 7 {
            fs.renormalise();
            fp.renormalise();
        }
        match node {
            Node::Layer {
                medium,
                thickness_nm,
            }
            | Node::Incoherent {
                medium,
                thickness_nm,
            } => {
                let t = &terms[*medium];
                let ph = Phase::new(at.k0() * thickness_nm, t.q);
                fs.through_layer(&ph, t.eta_s, t.inv_eta_s, t.real);
                fp.through_layer(&ph, t.eta_p, t.inv_eta_p, t.real);
            }
            Node::Repeat { count, nodes } => {
                let (ms, mp) = repeat(nodes, *count, terms, at);
                fs.through(&ms);
                fp.through(&mp);
            }
        }
    }
    fs.renormalise();
    fp.renormalise();
}

/// The matrices (s, p) of `count` periods of `nodes`: in double-double for
/// long groups ([`EXACT_FROM`] periods or more), otherwise by the
/// real-arithmetic path when every layer in them is lossless and
/// propagating, or in complex arithmetic.
fn repeat(nodes: &[Node], count: u64, terms: &[MediumTerms], at: &Probe) -> (Mat, Mat) {
    if count >= EXACT_FROM {
        exact::repeat(nodes, count, terms, at)
    } else if short(nodes) && all_real(nodes, terms) {
        product_real(nodes, terms, at.k0()).pow(count).complex()
    } else {
        let (s, p) = product(nodes, terms, at);
        (s.pow(count), p.pow(count))
    }
}

/// True when no repeat group inside `nodes` is long enough for the
/// double-double path.
fn short(nodes: &[Node]) -> bool {
    nodes.iter().all(|n| match n {
        Node::Layer { .. } | Node::Incoherent { .. } => true,
        Node::Repeat { count, nodes } => *count < EXACT_FROM && short(nodes),
    })
}

/// [`all_real`] on every lane at once.
fn real_on_all_lanes(nodes: &[Node], terms: &[&[MediumTerms]; LANES]) -> bool {
    for node in nodes {
        match node {
            Node::Layer { medium, .. } | Node::Incoherent { medium, .. } => {
                for t in terms {
                    if !t[*medium].real {
                        return false;
                    }
                }
            }
            Node::Repeat { nodes, .. } => {
                if !real_on_all_lanes(nodes, terms) {
                    return false;
                }
            }
        }
    }
    true
}

fn all_real(nodes: &[Node], terms: &[MediumTerms]) -> bool {
    nodes.iter().all(|n| match n {
        Node::Layer { medium, .. } | Node::Incoherent { medium, .. } => terms[*medium].real,
        Node::Repeat { nodes, .. } => all_real(nodes, terms),
    })
}

/// [`product_real`] for [`LANES`] wavelengths at once: lane `pol · LANES + l`
/// holds polarization `pol` (s = 0, p = 1) at wavelength `l`.
fn product_real_lanes(
    nodes: &[Node],
    terms: [&[MediumTerms]; LANES],
    k0: [f64; LANES],
) -> RealLanes<{ 2 * LANES }> {
    let mut m: Option<RealLanes<{ 2 * LANES }>> = None;
    for node in nodes {
        let next = match node {
            Node::Layer {
                medium,
                thickness_nm,
            }
            | Node::Incoherent {
                medium,
                thickness_nm,
            } => {
                let t = |k: usize| &terms[k % LANES][*medium];
                let phase: [f64; LANES] = from_fn(|l| k0[l] * thickness_nm * t(l).q.re);
                let (sn, cs) = sin_cos_lanes(phase);
                let pick = |k: usize, s: f64, p: f64| if k < LANES { s } else { p };
                RealLanes::layer(
                    from_fn(|k| cs[k % LANES]),
                    from_fn(|k| sn[k % LANES]),
                    from_fn(|k| pick(k, t(k).eta_s.re, t(k).eta_p.re)),
                    from_fn(|k| pick(k, t(k).inv_eta_s.re, t(k).inv_eta_p.re)),
                )
            }
            Node::Repeat { count, nodes } => product_real_lanes(nodes, terms, k0).pow(*count),
        };
        m = Some(m.map_or(next, |m| m.mul(&next)));
    }
    m.unwrap_or_else(RealLanes::identity)
}

/// [`product`] for lossless, propagating layers, both polarizations at once.
fn product_real(nodes: &[Node], terms: &[MediumTerms], k0: f64) -> RealPair {
    let mut m = RealPair::identity();
    for node in nodes {
        let next = match node {
            Node::Layer {
                medium,
                thickness_nm,
            }
            | Node::Incoherent {
                medium,
                thickness_nm,
            } => {
                let t = &terms[*medium];
                let ph = Phase::new(k0 * thickness_nm, t.q);
                RealPair::of_layer(
                    &ph,
                    [t.eta_s.re, t.eta_p.re],
                    [t.inv_eta_s.re, t.inv_eta_p.re],
                )
            }
            Node::Repeat { count, nodes } => product_real(nodes, terms, k0).pow(*count),
        };
        m = m.mul(&next);
    }
    m
}

/// The characteristic matrices (s, p) of `nodes`: M₁·M₂·…, incident side first.
pub(super) fn product(nodes: &[Node], terms: &[MediumTerms], at: &Probe) -> (Mat, Mat) {
    let (mut ms, mut mp) = (Mat::identity(), Mat::identity());
    for node in nodes {
        let (ns, np) = match node {
            Node::Layer {
                medium,
                thickness_nm,
            }
            | Node::Incoherent {
                medium,
                thickness_nm,
            } => {
                let t = &terms[*medium];
                let ph = Phase::new(at.k0() * thickness_nm, t.q);
                (
                    Mat::layer(&ph, t.eta_s, t.inv_eta_s),
                    Mat::layer(&ph, t.eta_p, t.inv_eta_p),
                )
            }
            Node::Repeat { count, nodes } => repeat(nodes, *count, terms, at),
        };
        ms = ms.mul(&ns);
        mp = mp.mul(&np);
    }
    (ms, mp)
}

/// R and T from the incident admittance, the exit admittance and the field
/// (B, C) at the front face: r = (η₀B − C)/(η₀B + C) and the tangential
/// amplitude t = 2η₀/(η₀B + C) (Macleod, *Thin-Film Optical Filters*, 2010,
/// eq. 2.99–2.100), R = |r|², T = |t|² Re(η_m)/Re(η₀), with the field's scale
/// e^{log} divided out of T. For a lossless incident medium this is Macleod's
/// T = 4η₀ Re(η_m)/|η₀B + C|²; from inside an absorbing sheet it is the
/// convention of Byrnes, "Multilayer optical calculations", arXiv:1603.02720
/// (2016), eq. 14–15, written with tilted admittances.
pub(super) fn coherent(eta0: Complex64, eta_m: Complex64, f: &Field) -> (f64, f64) {
    let [b, c] = f.v;
    let inv_den2 = 1.0 / (eta0 * b + c).norm_sqr();
    let scale = if f.log == 0.0 {
        1.0
    } else {
        (-2.0 * f.log).exp()
    };
    let t = 4.0 * eta0.norm_sqr() * eta_m.re / eta0.re * inv_den2 * scale;
    ((eta0 * b - c).norm_sqr() * inv_den2, t)
}
