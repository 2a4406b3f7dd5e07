//! Anisotropic and helicoidal stacks by Berreman's 4×4 method: the waves
//! of each layer ([`modes`]), combined by scattering matrices ([`smatrix`]),
//! helices integrated through a pitch and powered ([`helix`]).
//!
//! The result at one point is a pair of 2×2 Jones matrices in the (p, s)
//! basis of the incident and exit media, each wave scaled to unit normal
//! energy flux, so that |r_ij|² and |t_ij|² are power fractions: R for
//! s-polarized incident light is |r_ps|² + |r_ss|² (co- plus
//! cross-polarized). With (p, s, k̂) right-handed for every wave, the
//! Jones vector (1, i)/√2 is left-handed and (1, −i)/√2 right-handed, in the
//! sense of the helix the electric field traces in space at one instant
//! (for e^{i(k·r − ωt)}); [`Jones::circular`] changes basis.

pub mod helix;
pub mod isotropic;
pub mod modes;
pub mod smatrix;

use nalgebra::{Matrix2, Matrix3};
use num_complex::Complex64 as C;

use super::medium::Probe;
use modes::{Modes, NoModes};
use smatrix::{S, Singular};

/// Longest stretch of helix integrated as one transfer before it is turned
/// into a scattering matrix (so evanescent waves cannot grow beyond about
/// e^{2π·n·1000/λ}).
const MAX_CHUNK_NM: f64 = 1000.0;

/// One element of a 4×4 stack, listed from the incident side.
#[derive(Debug, Clone, PartialEq)]
pub enum Layer4 {
    /// An isotropic layer of medium `medium` (an index into the point's indices).
    Isotropic {
        /// Index of the medium.
        medium: usize,
        /// Thickness in nm.
        thickness_nm: f64,
    },
    /// A homogeneous anisotropic layer of tensor `tensor` (an index into the
    /// point's tensors, already in the stack frame).
    Tensor {
        /// Index of the tensor.
        tensor: usize,
        /// Thickness in nm.
        thickness_nm: f64,
    },
    /// A helicoidal layer: tensor `tensor` (its orientation at the front
    /// face before the turn) turned about the normal by
    /// ψ(z) = `start_rad` + `turn`·2π z/`pitch_nm`.
    Helix {
        /// Index of the tensor.
        tensor: usize,
        /// Thickness in nm (any, not only whole pitches).
        thickness_nm: f64,
        /// Pitch in nm: the axes turn 360° over this depth.
        pitch_nm: f64,
        /// +1 for a right-handed helix, −1 for a left-handed one.
        turn: f64,
        /// Azimuth of the axes at the front face, radians.
        start_rad: f64,
        /// Magnus steps per pitch away from normal incidence.
        steps_per_pitch: usize,
    },
    /// `count` copies of `nodes`, powered.
    Repeat {
        /// Number of periods, ≥ 1.
        count: u64,
        /// One period.
        nodes: Vec<Layer4>,
    },
}

/// An anisotropic stack between an isotropic, lossless incident medium and
/// an isotropic, semi-infinite exit medium.
#[derive(Debug, Clone, PartialEq)]
pub struct Stack4 {
    /// Index of the incident medium.
    pub incident: usize,
    /// Layers from the incident side.
    pub nodes: Vec<Layer4>,
    /// Index of the exit medium.
    pub exit: usize,
}

/// The reflection and transmission Jones matrices at one point (module
/// notes: flux-normalized, (p, s) basis, incident polarization by column).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Jones {
    /// Reflection, incident → reflected.
    pub r: Matrix2<C>,
    /// Transmission, incident → transmitted.
    pub t: Matrix2<C>,
}

/// The handedness of a helix, or of circularly polarized light named by the
/// helix its electric field traces in space at one instant (module notes).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Handedness {
    /// Left-handed.
    Left,
    /// Right-handed.
    Right,
}

impl Handedness {
    /// The sense of turn of a helix: −1 for left, +1 for right
    /// ([`Layer4::Helix`]'s `turn`).
    pub fn turn(self) -> f64 {
        match self {
            Handedness::Left => -1.0,
            Handedness::Right => 1.0,
        }
    }

    /// The index of this handedness in the circular basis of
    /// [`Jones::circular`]: 0 for left, 1 for right.
    pub fn index(self) -> usize {
        match self {
            Handedness::Left => 0,
            Handedness::Right => 1,
        }
    }

    /// `left` or `right`.
    pub fn name(self) -> &'static str {
        match self {
            Handedness::Left => "left",
            Handedness::Right => "right",
        }
    }
}

/// A 4×4 stack with the dielectric tensors of its anisotropic layers on a
/// wavelength grid, ready to evaluate at any point of the grid.
#[derive(Debug, Clone, PartialEq)]
pub struct Gridded {
    /// The stack.
    pub stack: Stack4,
    /// `tensors[w][t]`: tensor t (in the stack frame) at wavelength index w.
    pub tensors: Vec<Vec<Matrix3<C>>>,
}

/// Why a point could not be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Failure {
    /// A layer's waves could not be separated.
    NoModes,
    /// A scattering matrix block was singular.
    Singular,
}

impl From<NoModes> for Failure {
    fn from(_: NoModes) -> Self {
        Failure::NoModes
    }
}

impl From<Singular> for Failure {
    fn from(_: Singular) -> Self {
        Failure::Singular
    }
}

impl Jones {
    /// Total power reflected and transmitted for each incident basis
    /// polarization: `[R₀, R₁, T₀, T₁]` (column sums of |·|²).
    pub fn powers(&self) -> [f64; 4] {
        let col = |m: &Matrix2<C>, j: usize| m[(0, j)].norm_sqr() + m[(1, j)].norm_sqr();
        [
            col(&self.r, 0),
            col(&self.r, 1),
            col(&self.t, 0),
            col(&self.t, 1),
        ]
    }

    /// Power seen through an ideal analyser for each outgoing basis
    /// polarization with unpolarized incident light: `[R₀, R₁, T₀, T₁]`
    /// with R_h = ½ Σ_in |r_{h,in}|² (half the row sums of |·|²: unpolarized
    /// light is an equal incoherent mixture of the two incident basis
    /// polarizations).
    pub fn analysed(&self) -> [f64; 4] {
        let row = |m: &Matrix2<C>, i: usize| 0.5 * (m[(i, 0)].norm_sqr() + m[(i, 1)].norm_sqr());
        [
            row(&self.r, 0),
            row(&self.r, 1),
            row(&self.t, 0),
            row(&self.t, 1),
        ]
    }

    /// A matrix that is not computable (every entry NaN), standing for a
    /// point whose [`Failure`] the caller reports through its finiteness
    /// checks.
    pub fn not_computable() -> Jones {
        let nan = Matrix2::from_element(C::new(f64::NAN, f64::NAN));
        Jones { r: nan, t: nan }
    }

    /// The same matrices in the circular basis (left, right), with
    /// L = (p + i s)/√2 and R = (p − i s)/√2 for every wave.
    pub fn circular(&self) -> Jones {
        let h = std::f64::consts::FRAC_1_SQRT_2;
        let u = Matrix2::new(
            C::new(h, 0.0),
            C::new(h, 0.0),
            C::new(0.0, h),
            C::new(0.0, -h),
        );
        // U is unitary: U⁻¹ = Uᴴ.
        let ui = u.adjoint();
        Jones {
            r: ui * self.r * u,
            t: ui * self.t * u,
        }
    }
}

/// A part of the stack: its S-matrix and the waves on either side.
struct Part {
    front: Modes,
    s: S,
    back: Modes,
}

impl Part {
    fn then(self, next: Part) -> Result<Part, Failure> {
        let s = self
            .s
            .then(&S::interface(&self.back, &next.front)?)?
            .then(&next.s)?;
        Ok(Part {
            front: self.front,
            s,
            back: next.back,
        })
    }
}

impl Stack4 {
    /// The Jones matrices at one point: `n[m]` the index of isotropic medium
    /// m, `tensors[t]` the dielectric tensor ε of tensor t in the stack
    /// frame (x in the plane of incidence, z along the normal).
    pub fn jones(&self, n: &[C], tensors: &[Matrix3<C>], at: &Probe) -> Result<Jones, Failure> {
        let xi = at.beta();
        let inc = Modes::isotropic(n[self.incident], xi);
        let exit = Modes::isotropic(n[self.exit], xi);
        let mut cache = isotropic::Cache::new(n.len(), xi, at.k0());
        let s = match parts(&self.nodes, n, tensors, at, &mut cache)? {
            None => S::interface(&inc, &exit)?,
            Some(body) => S::interface(&inc, &body.front)?
                .then(&body.s)?
                .then(&S::interface(&body.back, &exit)?)?,
        };
        // Nothing is carried into an exit medium without energy flux
        // (beyond its critical angle).
        let carries = |j: usize| modes::flux(&exit.w.column(j).into_owned()) > 1e-300;
        let mut t = s.t_forward;
        for j in 0..2 {
            if !carries(j) {
                t[(j, 0)] = C::new(0.0, 0.0);
                t[(j, 1)] = C::new(0.0, 0.0);
            }
        }
        Ok(Jones { r: s.r_front, t })
    }
}

/// The parts of `nodes` combined into one (`None` when there are none);
/// `cache` holds the point's isotropic waves and interfaces.
fn parts(
    nodes: &[Layer4],
    n: &[C],
    tensors: &[Matrix3<C>],
    at: &Probe,
    cache: &mut isotropic::Cache,
) -> Result<Option<Part>, Failure> {
    let mut acc: Option<Part> = None;
    let mut rest = nodes;
    while let Some(first) = rest.first() {
        // Consecutive isotropic layers (and repeats of them) go as one run.
        let taken = match rest.iter().position(|node| !isotropic::is_isotropic(node)) {
            Some(0) => 1,
            Some(k) => k,
            None => rest.len(),
        };
        let found = if isotropic::is_isotropic(first) {
            isotropic::run(&rest[..taken], n, cache)?.map(|r| {
                let (front, s, back) = r.into_part(n, cache);
                Part { front, s, back }
            })
        } else {
            part(first, n, tensors, at, cache)?
        };
        rest = &rest[taken..];
        let Some(part) = found else {
            continue;
        };
        acc = Some(match acc {
            None => part,
            Some(a) => a.then(part)?,
        });
    }
    Ok(acc)
}

fn part(
    node: &Layer4,
    n: &[C],
    tensors: &[Matrix3<C>],
    at: &Probe,
    cache: &mut isotropic::Cache,
) -> Result<Option<Part>, Failure> {
    let (xi, k0) = (at.beta(), at.k0());
    let homogeneous = |modes: Modes, d: f64| {
        let s = S::layer(&modes, k0, d);
        Part {
            front: modes.clone(),
            s,
            back: modes,
        }
    };
    Ok(Some(match *node {
        Layer4::Isotropic { .. } => {
            let Some(r) = isotropic::run(std::slice::from_ref(node), n, cache)? else {
                return Ok(None);
            };
            let (front, s, back) = r.into_part(n, cache);
            Part { front, s, back }
        }
        Layer4::Tensor {
            tensor,
            thickness_nm,
        } => homogeneous(Modes::of_tensor(&tensors[tensor], xi)?, thickness_nm),
        Layer4::Helix {
            tensor,
            thickness_nm,
            pitch_nm,
            turn,
            start_rad,
            steps_per_pitch,
        } => {
            let eps = &tensors[tensor];
            let stretch = |from: f64, to: f64| -> Result<Part, Failure> {
                let pieces = ((to - from) / MAX_CHUNK_NM).ceil().max(1.0) as usize;
                let len = (to - from) / pieces as f64;
                // The axes' azimuth from the depth's fraction of a pitch, a
                // whole number of pitches counting as none, so that the waves
                // at the ends of whole pitches are the very same.
                let psi = |z: f64| {
                    let u = z / pitch_nm;
                    let frac = if (u - u.round()).abs() < 1e-12 {
                        0.0
                    } else {
                        u - u.floor()
                    };
                    start_rad + turn * std::f64::consts::TAU * frac
                };
                let mut acc: Option<Part> = None;
                for k in 0..pieces {
                    let (a, b) = (from + len * k as f64, from + len * (k + 1) as f64);
                    let front = Modes::of_tensor(&helix::turned(eps, psi(a)), xi)?;
                    let back = Modes::of_tensor(&helix::turned(eps, psi(b)), xi)?;
                    let t = helix::transfer(
                        eps,
                        start_rad,
                        turn,
                        pitch_nm,
                        a,
                        b,
                        xi,
                        k0,
                        steps_per_pitch,
                    );
                    let s = S::of_transfer(&(back.w_inv * t * front.w))?;
                    let piece = Part { front, s, back };
                    acc = Some(match acc {
                        // Consecutive pieces meet in the same waves.
                        Some(p) => Part {
                            s: p.s.then(&piece.s)?,
                            front: p.front,
                            back: piece.back,
                        },
                        None => piece,
                    });
                }
                Ok(acc.expect("at least one piece"))
            };
            let whole = (thickness_nm / pitch_nm + 1e-9).floor();
            let rest = thickness_nm - whole * pitch_nm;
            let mut acc: Option<Part> = None;
            if whole >= 1.0 {
                let pitch = stretch(0.0, pitch_nm)?;
                // After a whole pitch the axes are back where they started,
                // so pitches meet in the same waves and power directly.
                acc = Some(Part {
                    s: pitch.s.pow(whole as u64)?,
                    front: pitch.front,
                    back: pitch.back,
                });
            }
            if rest > 1e-9 {
                let tail = stretch(whole * pitch_nm, thickness_nm)?;
                acc = Some(match acc {
                    Some(p) => Part {
                        s: p.s.then(&tail.s)?,
                        front: p.front,
                        back: tail.back,
                    },
                    None => tail,
                });
            }
            match acc {
                Some(p) => p,
                None => return Ok(None),
            }
        }
        Layer4::Repeat { count, ref nodes } => {
            let Some(period) = parts(nodes, n, tensors, at, cache)? else {
                return Ok(None);
            };
            // Close the period on itself, power count − 1 of them, then the last.
            let closed = period.s.then(&S::interface(&period.back, &period.front)?)?;
            let s = closed.pow(count - 1)?.then(&period.s)?;
            Part {
                front: period.front,
                s,
                back: period.back,
            }
        }
    }))
}
