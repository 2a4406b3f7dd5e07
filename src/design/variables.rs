//! The design variables of a scene: layers whose thickness, and helices
//! whose pitch, the design tools may change. A layer inside a repeat group is
//! written once, so it is one variable shared by every period of the group.

use serde_json::Value;

use crate::error::{Error, Result};
use crate::scene::{Helix, Item, Layer, Scene};

/// One layer thickness, or one helix pitch, the design tools work on.
#[derive(Debug, Clone, PartialEq)]
pub struct Variable {
    /// JSON pointer of the layer in the scene document, or of its `helix`
    /// object (`/stack/0/helix`) for a pitch.
    pub pointer: String,
    /// The layer's material name.
    pub material: String,
    /// Thickness (or pitch) as written in the scene, nm.
    pub nominal_nm: f64,
    /// Lower bound, nm.
    pub low_nm: f64,
    /// Upper bound, nm.
    pub high_nm: f64,
}

/// The suffix of a pitch variable's pointer.
const HELIX: &str = "/helix";

impl Variable {
    /// The pointer of the layer whose helix pitch this variable is, or
    /// `None` for a thickness.
    pub fn pitch_of(&self) -> Option<&str> {
        self.pointer.strip_suffix(HELIX)
    }

    /// What the variable is, as reports name it: `thickness` or `pitch`.
    pub fn quantity(&self) -> &'static str {
        match self.pitch_of() {
            Some(_) => "pitch",
            None => "thickness",
        }
    }
}

/// The layers and helix pitches marked `vary_nm`, in document order (a
/// layer's thickness before its pitch), with their bounds.
pub fn varying(scene: &Scene) -> Vec<Variable> {
    varying_in(scene, &scene.stack)
}

/// The layers and helix pitches of `items` (the scene's stack or a
/// coating's platelet) marked `vary_nm`.
pub fn varying_in(scene: &Scene, items: &[Item]) -> Vec<Variable> {
    let mut out = Vec::new();
    walk(items, &mut |l| {
        let material = material_of(scene, l);
        if let Some((low_nm, high_nm)) = l.vary_nm {
            out.push(Variable {
                pointer: l.pointer.clone(),
                material: material.clone(),
                nominal_nm: l.thickness_nm,
                low_nm,
                high_nm,
            });
        }
        if let Some(h) = helix_of(l)
            && let Some((low_nm, high_nm)) = h.vary_nm
        {
            out.push(Variable {
                pointer: format!("{}{HELIX}", l.pointer),
                material,
                nominal_nm: h.pitch_nm,
                low_nm,
                high_nm,
            });
        }
    });
    out
}

/// Every layer of `items` as written (a layer in a repeat group once),
/// bounded below by zero and unbounded above.
pub fn every_layer(scene: &Scene, items: &[Item]) -> Vec<Variable> {
    let mut out = Vec::new();
    walk(items, &mut |l| {
        out.push(Variable {
            pointer: l.pointer.clone(),
            material: material_of(scene, l),
            nominal_nm: l.thickness_nm,
            low_nm: 0.0,
            high_nm: f64::INFINITY,
        })
    });
    out
}

/// [`every_layer`] followed, after each helicoidal layer, by its pitch
/// (bounded below by zero): what a process may get wrong.
pub fn every_layer_and_pitch(scene: &Scene, items: &[Item]) -> Vec<Variable> {
    let mut out = Vec::new();
    walk(items, &mut |l| {
        let material = material_of(scene, l);
        out.push(Variable {
            pointer: l.pointer.clone(),
            material: material.clone(),
            nominal_nm: l.thickness_nm,
            low_nm: 0.0,
            high_nm: f64::INFINITY,
        });
        if let Some(h) = helix_of(l) {
            out.push(Variable {
                pointer: format!("{}{HELIX}", l.pointer),
                material,
                nominal_nm: h.pitch_nm,
                low_nm: 0.0,
                high_nm: f64::INFINITY,
            });
        }
    });
    out
}

/// The material a layer is made of as the scene names it (an anisotropic
/// material by its own name, not by its principal indices').
fn material_of(scene: &Scene, l: &Layer) -> String {
    match &l.anisotropy {
        Some(a) => scene.crystals[a.crystal].name.clone(),
        None => scene.media[l.medium].name.clone(),
    }
}

fn helix_of(l: &Layer) -> Option<&Helix> {
    l.anisotropy.as_ref().and_then(|a| a.helix.as_ref())
}

fn walk(items: &[Item], f: &mut dyn FnMut(&Layer)) {
    for item in items {
        match item {
            Item::Layer(l) => f(l),
            Item::Repeat(r) => walk(&r.items, f),
        }
    }
}

pub(super) fn walk_mut(items: &mut [Item], f: &mut dyn FnMut(&mut Layer)) {
    for item in items {
        match item {
            Item::Layer(l) => f(l),
            Item::Repeat(r) => walk_mut(&mut r.items, f),
        }
    }
}

/// `items` with the layer (or helix) of each variable set to the thickness
/// (or pitch) in `x`.
pub fn with_thicknesses(items: &[Item], vars: &[Variable], x: &[f64]) -> Vec<Item> {
    let mut out = items.to_vec();
    walk_mut(&mut out, &mut |l| {
        for (v, &t) in vars.iter().zip(x) {
            if v.pointer == l.pointer {
                l.thickness_nm = t;
            } else if v.pitch_of() == Some(&l.pointer)
                && let Some(h) = l.anisotropy.as_mut().and_then(|a| a.helix.as_mut())
            {
                h.pitch_nm = t;
            }
        }
    });
    out
}

/// Total physical thickness of a design in nm, every period of every repeat
/// counted (a graded group's periods scale linearly from 1 to `chirp_scale`,
/// so its mean period is (1 + chirp_scale)/2 of the first).
pub fn total_thickness(items: &[Item]) -> f64 {
    items
        .iter()
        .map(|i| match i {
            Item::Layer(l) => l.thickness_nm,
            Item::Repeat(r) => {
                r.count as f64 * total_thickness(&r.items) * 0.5 * (1.0 + r.chirp_scale)
            }
        })
        .sum()
}

/// The scene document with each variable's layer given its new thickness
/// (`x` in nm), in the unit the layer was written in: `thickness_nm`, or
/// `thickness_um` for a thick layer given in µm; a pitch variable's helix
/// its new `pitch_nm`.
pub fn edited_document(document: &Value, vars: &[Variable], x: &[f64]) -> Result<Value> {
    let mut doc = document.clone();
    for (v, &t) in vars.iter().zip(x) {
        let layer = doc
            .pointer_mut(&v.pointer)
            .and_then(Value::as_object_mut)
            .ok_or_else(|| {
                Error::invalid(&v.pointer, "(missing)", "no layer or helix at this pointer")
            })?;
        if v.pitch_of().is_some() {
            layer.insert("pitch_nm".into(), Value::from(t));
        } else if layer.contains_key("thickness_um") {
            layer.insert("thickness_um".into(), Value::from(t / 1e3));
        } else {
            layer.insert("thickness_nm".into(), Value::from(t));
        }
    }
    Ok(doc)
}
