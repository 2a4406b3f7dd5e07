//! Anisotropic and helicoidal layers: uniaxial and biaxial materials, the
//! orientation of their principal axes, helices, and the 4×4 stack of a
//! design.
//!
//! Frames: the stack frame has z along the normal (into the stack) and x in
//! the plane of incidence. A material's principal axes are turned into it
//! by a rotation R, so that ε = R diag(n_x², n_y², n_z²) Rᵀ (a uniaxial
//! material has n_x = n_y = n_o and n_z = n_e, its optic axis along its
//! own z).

use std::f64::consts::PI;

use nalgebra::Matrix3;
use num_complex::Complex64 as C;
use serde_json::Value;

use super::json::{Obj, number, pair, show};
use super::stack::{Item, period_scale};
use crate::error::{Error, Result};
use crate::optics::Probe;
use crate::optics::aniso::{Gridded, Handedness, Layer4, Stack4, helix};

/// How many principal indices an anisotropic material has.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CrystalKind {
    /// Uniaxial: ordinary and extraordinary indices.
    Uniaxial,
    /// Biaxial: three indices along x, y and z.
    Biaxial,
}

/// An anisotropic material of the scene.
#[derive(Debug, Clone, PartialEq)]
pub struct Crystal {
    /// Name as written under `materials`.
    pub name: String,
    /// Key path for messages (`materials.film`).
    pub key: String,
    /// Uniaxial or biaxial.
    pub kind: CrystalKind,
    /// The media (indices into `Scene::media`) giving the principal indices
    /// along the material's own x, y and z (uniaxial: ordinary, ordinary,
    /// extraordinary).
    pub principal: [usize; 3],
}

/// A helix: principal axes turning about the normal by 360° per pitch.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Helix {
    /// Depth over which the axes turn by 360°, nm.
    pub pitch_nm: f64,
    /// The sense of the turn with depth.
    pub handedness: Handedness,
    /// Azimuth the axes are turned by at the layer's front face, degrees.
    pub start_azimuth_deg: f64,
    /// Bounds the design tools may move the pitch within, nm.
    pub vary_nm: Option<(f64, f64)>,
}

/// What makes a layer anisotropic.
#[derive(Debug, Clone, PartialEq)]
pub struct Anisotropy {
    /// Index into `Scene::crystals`.
    pub crystal: usize,
    /// Rotation taking the material's principal axes into the stack frame
    /// (columns: its x, y, z in stack coordinates); for a helix, at the
    /// front face before the start azimuth is applied.
    pub rotation: [[f64; 3]; 3],
    /// The helix, when the axes turn with depth.
    pub helix: Option<Helix>,
}

/// Keys of an anisotropic material object.
pub(super) const CRYSTAL_KEYS: [&str; 2] = ["uniaxial", "biaxial"];

/// True when a `materials` entry describes an anisotropic material.
pub(super) fn is_crystal(v: &Value) -> bool {
    v.as_object()
        .is_some_and(|o| CRYSTAL_KEYS.iter().any(|k| o.contains_key(*k)))
}

/// The component keys of a material kind, in the order x, y, z of
/// [`Crystal::principal`] (uniaxial: ordinary twice).
pub(super) fn components(kind: CrystalKind) -> &'static [&'static str] {
    match kind {
        CrystalKind::Uniaxial => &["ordinary", "extraordinary"],
        CrystalKind::Biaxial => &["x", "y", "z"],
    }
}

/// Rz(a)·Rx(b)·Rz(c) (angles in radians).
fn zxz(a: f64, b: f64, c: f64) -> [[f64; 3]; 3] {
    let rz = |t: f64| {
        let (s, c) = t.sin_cos();
        Matrix3::new(c, -s, 0.0, s, c, 0.0, 0.0, 0.0, 1.0)
    };
    let rx = {
        let (s, c) = b.sin_cos();
        Matrix3::new(1.0, 0.0, 0.0, 0.0, c, -s, 0.0, s, c)
    };
    let m = rz(a) * rx * rz(c);
    std::array::from_fn(|i| std::array::from_fn(|j| m[(i, j)]))
}

/// The rotation that puts a uniaxial optic axis at `polar` from the normal
/// with its in-plane projection at `azimuth` from x (radians): Rz(φ)·Ry(θ).
fn polar_azimuth(polar: f64, azimuth: f64) -> [[f64; 3]; 3] {
    let (st, ct) = polar.sin_cos();
    let (sp, cp) = azimuth.sin_cos();
    let ry = Matrix3::new(ct, 0.0, st, 0.0, 1.0, 0.0, -st, 0.0, ct);
    let rz = Matrix3::new(cp, -sp, 0.0, sp, cp, 0.0, 0.0, 0.0, 1.0);
    let m = rz * ry;
    std::array::from_fn(|i| std::array::from_fn(|j| m[(i, j)]))
}

/// Reads a layer's `orientation` and `helix` for a layer of `crystal`
/// (at key path `o`). Defaults: principal axes along the stack frame (a
/// uniaxial optic axis along the normal); in a helix a uniaxial axis lies
/// in the plane, along x at the front face before the start azimuth.
pub(super) fn parse_layer(o: &Obj, crystal: usize, kind: CrystalKind) -> Result<Anisotropy> {
    let helix = o
        .get("helix")
        .map(|v| parse_helix(v, &o.key("helix")))
        .transpose()?;
    let rotation = match o.get("orientation") {
        None if helix.is_some() && kind == CrystalKind::Uniaxial => polar_azimuth(PI / 2.0, 0.0),
        None => zxz(0.0, 0.0, 0.0),
        Some(v) => parse_orientation(v, &o.key("orientation"), kind)?,
    };
    Ok(Anisotropy {
        crystal,
        rotation,
        helix,
    })
}

fn parse_orientation(v: &Value, path: &str, kind: CrystalKind) -> Result<[[f64; 3]; 3]> {
    let o = Obj::new(v, path)?;
    o.only(&["polar_deg", "azimuth_deg", "euler_zxz_deg"])?;
    if let Some(e) = o.get("euler_zxz_deg") {
        if o.get("polar_deg").is_some() || o.get("azimuth_deg").is_some() {
            return Err(Error::invalid(
                o.key("euler_zxz_deg"),
                show(e),
                "give euler_zxz_deg or polar_deg/azimuth_deg, not both",
            ));
        }
        let key = o.key("euler_zxz_deg");
        let list = e.as_array().filter(|xs| xs.len() == 3).ok_or_else(|| {
            Error::invalid(&key, show(e), "expected three angles [α, β, γ] in degrees")
        })?;
        let angles = list
            .iter()
            .enumerate()
            .map(|(i, x)| number(x, &format!("{key}[{i}]")))
            .collect::<Result<Vec<f64>>>()?;
        let r = |d: f64| d.to_radians();
        return Ok(zxz(r(angles[0]), r(angles[1]), r(angles[2])));
    }
    if kind == CrystalKind::Biaxial {
        return Err(Error::invalid(
            path,
            show(v),
            "a biaxial material's orientation is given as {\"euler_zxz_deg\": [α, β, γ]}",
        ));
    }
    let polar = o.f64("polar_deg")?.ok_or_else(|| {
        o.missing(
            "polar_deg",
            "the optic axis's angle from the normal, degrees",
        )
    })?;
    let azimuth = o.f64("azimuth_deg")?.unwrap_or(0.0);
    Ok(polar_azimuth(polar.to_radians(), azimuth.to_radians()))
}

fn parse_helix(v: &Value, path: &str) -> Result<Helix> {
    let o = Obj::new(v, path)?;
    o.only(&["pitch_nm", "handedness", "start_azimuth_deg", "vary_nm"])?;
    let pitch_nm = o.req_f64("pitch_nm")?;
    if !(pitch_nm > 0.0) {
        return Err(Error::invalid(
            o.key("pitch_nm"),
            pitch_nm,
            "must be greater than zero",
        ));
    }
    let handedness = match o.str("handedness")? {
        Some("left") => Handedness::Left,
        Some("right") => Handedness::Right,
        Some(other) => {
            return Err(Error::invalid(
                o.key("handedness"),
                other,
                "expected \"left\" or \"right\"",
            ));
        }
        None => return Err(o.missing("handedness", "\"left\" or \"right\"")),
    };
    let vary_nm = o
        .get("vary_nm")
        .map(|v| pair(v, &o.key("vary_nm")))
        .transpose()?;
    if let Some((lo, hi)) = vary_nm
        && !(lo > 0.0 && hi >= lo)
    {
        return Err(Error::invalid(
            o.key("vary_nm"),
            format!("[{lo}, {hi}]"),
            "a pitch's bounds need 0 < low ≤ high",
        ));
    }
    Ok(Helix {
        pitch_nm,
        handedness,
        start_azimuth_deg: o.f64("start_azimuth_deg")?.unwrap_or(0.0),
        vary_nm,
    })
}

/// Most periods the 4×4 path powers: helix pitches times the counts of the
/// enclosing repeat groups (or, for any other layer, those counts alone).
/// Scattering matrices are powered in double precision, whose rounding
/// grows about in proportion to the number of periods: R + T of a lossless
/// helix stays within 1e-9 of 1 at 10⁵ periods (tested), and was off by
/// 5e-9 at 10⁶.
pub const MAX_4X4_PERIODS: f64 = 1e5;

/// Refuses a layer of an anisotropic stack that the 4×4 path would power
/// more than [`MAX_4X4_PERIODS`] times, naming the layer and the count.
pub(super) fn check_periods(items: &[Item], enclosing: f64) -> Result<()> {
    for item in items {
        match item {
            Item::Repeat(r) => check_periods(&r.items, enclosing * r.count as f64)?,
            Item::Layer(l) => {
                let pitches = match l.anisotropy.as_ref().and_then(|a| a.helix.as_ref()) {
                    Some(h) => (l.thickness_nm / h.pitch_nm).max(1.0),
                    None => 1.0,
                };
                let total = enclosing * pitches;
                if total > MAX_4X4_PERIODS {
                    return Err(Error::invalid(
                        format!("{}.thickness_nm", super::warnings::key_of(&l.pointer)),
                        l.thickness_nm,
                        format!(
                            "the 4×4 path would power this layer {total:.3e} times (helix pitches \
                             times repeat counts); at most 10⁵ are computed, to within 1e-9"
                        ),
                    ));
                }
            }
        }
    }
    Ok(())
}

/// True when any layer of `items` is anisotropic.
pub(super) fn any_anisotropic(items: &[Item]) -> bool {
    items.iter().any(|i| match i {
        Item::Layer(l) => l.anisotropy.is_some(),
        Item::Repeat(r) => any_anisotropic(&r.items),
    })
}

/// True when any layer of `items` is incoherent.
pub(super) fn any_incoherent(items: &[Item]) -> bool {
    items.iter().any(|i| match i {
        Item::Layer(l) => l.incoherent,
        Item::Repeat(r) => any_incoherent(&r.items),
    })
}

/// A tensor the 4×4 stack needs: a crystal and its rotation.
struct Slot {
    crystal: usize,
    rotation: [[f64; 3]; 3],
}

/// Builds the 4×4 stack of a coherent design: isotropic layers as
/// [`Layer4::Isotropic`], anisotropic ones as tensors or helices, repeat
/// groups powered (graded ones written out period by period, a helix's
/// pitch scaling with its thickness). `index[m][w]` is medium m's index;
/// helices are sliced by [`helix::steps_for`] at the grid's most
/// demanding point (shortest wavelength, largest angle).
pub(super) fn gridded(
    items: &[Item],
    incident: usize,
    exit: usize,
    crystals: &[Crystal],
    index: &[Vec<C>],
    wavelengths_nm: &[f64],
    angles_deg: &[f64],
) -> Gridded {
    let mut slots = Vec::new();
    let mut nodes = emit4(items, 1.0, &mut slots);
    let tensors: Vec<Vec<Matrix3<C>>> = (0..wavelengths_nm.len())
        .map(|w| {
            slots
                .iter()
                .map(|s| tensor(&crystals[s.crystal], &s.rotation, index, w))
                .collect()
        })
        .collect();
    // The most demanding point: shortest wavelength, largest angle.
    let shortest = (0..wavelengths_nm.len())
        .min_by(|&a, &b| wavelengths_nm[a].total_cmp(&wavelengths_nm[b]))
        .unwrap_or(0);
    let widest = angles_deg.iter().fold(0.0f64, |m, a| m.max(a.abs()));
    let at = Probe::new(
        wavelengths_nm.get(shortest).copied().unwrap_or(550.0),
        index[incident].get(shortest).map_or(1.0, |n| n.re),
        widest,
    );
    if let Some(eps) = tensors.get(shortest) {
        choose_steps(&mut nodes, eps, &at);
    }
    Gridded {
        stack: Stack4 {
            incident,
            nodes,
            exit,
        },
        tensors,
    }
}

/// ε of `crystal` turned by `rotation`, at wavelength index `w`: exactly
/// n²I where the principal indices are equal (a rotation cannot change it,
/// and rounding would split the degenerate waves), symmetric otherwise.
fn tensor(crystal: &Crystal, rotation: &[[f64; 3]; 3], index: &[Vec<C>], w: usize) -> Matrix3<C> {
    let eps = crystal.principal.map(|m| index[m][w] * index[m][w]);
    if eps[1] == eps[0] && eps[2] == eps[0] {
        return Matrix3::from_diagonal_element(eps[0]);
    }
    let r = Matrix3::from_fn(|i, j| C::new(rotation[i][j], 0.0));
    let e = r * Matrix3::from_diagonal(&eps.into()) * r.transpose();
    (e + e.transpose()) * C::new(0.5, 0.0)
}

fn choose_steps(nodes: &mut [Layer4], eps: &[Matrix3<C>], at: &Probe) {
    for node in nodes {
        match node {
            Layer4::Helix {
                tensor,
                pitch_nm,
                steps_per_pitch,
                ..
            } => *steps_per_pitch = helix::steps_for(&eps[*tensor], *pitch_nm, at.beta(), at.k0()),
            Layer4::Repeat { nodes, .. } => choose_steps(nodes, eps, at),
            Layer4::Isotropic { .. } | Layer4::Tensor { .. } => {}
        }
    }
}

fn emit4(items: &[Item], scale: f64, slots: &mut Vec<Slot>) -> Vec<Layer4> {
    let mut out = Vec::new();
    for item in items {
        match item {
            Item::Layer(l) => {
                let thickness_nm = l.thickness_nm * scale;
                out.push(match &l.anisotropy {
                    None => Layer4::Isotropic {
                        medium: l.medium,
                        thickness_nm,
                    },
                    Some(a) => {
                        slots.push(Slot {
                            crystal: a.crystal,
                            rotation: a.rotation,
                        });
                        let tensor = slots.len() - 1;
                        match a.helix {
                            None => Layer4::Tensor {
                                tensor,
                                thickness_nm,
                            },
                            Some(h) => Layer4::Helix {
                                tensor,
                                thickness_nm,
                                pitch_nm: h.pitch_nm * scale,
                                turn: h.handedness.turn(),
                                start_rad: h.start_azimuth_deg.to_radians(),
                                steps_per_pitch: 1,
                            },
                        }
                    }
                });
            }
            Item::Repeat(r) if r.chirp_scale != 1.0 => {
                for p in 0..r.count {
                    out.extend(emit4(&r.items, period_scale(r, p, scale), slots));
                }
            }
            Item::Repeat(r) => out.push(Layer4::Repeat {
                count: r.count,
                nodes: emit4(&r.items, scale, slots),
            }),
        }
    }
    out
}
