//! The design variables of a scene: layers whose thickness the design tools
//! may change. A layer inside a repeat group is written once, so it is one
//! variable shared by every period of the group.

use serde_json::Value;

use crate::error::{Error, Result};
use crate::scene::{Item, Scene};

/// One layer thickness the design tools work on.
#[derive(Debug, Clone, PartialEq)]
pub struct Variable {
    /// JSON pointer of the layer in the scene document.
    pub pointer: String,
    /// The layer's material name.
    pub material: String,
    /// Thickness as written in the scene, nm.
    pub nominal_nm: f64,
    /// Lower bound, nm.
    pub low_nm: f64,
    /// Upper bound, nm.
    pub high_nm: f64,
}

/// The layers marked `vary_nm`, in document order, with their bounds.
pub fn varying(scene: &Scene) -> Vec<Variable> {
    varying_in(scene, &scene.stack)
}

/// The layers of `items` (the scene's stack or a coating's platelet)
/// marked `vary_nm`.
pub fn varying_in(scene: &Scene, items: &[Item]) -> Vec<Variable> {
    let mut out = Vec::new();
    walk(items, &mut |l| {
        if let Some((low_nm, high_nm)) = l.vary_nm {
            out.push(Variable {
                pointer: l.pointer.clone(),
                material: scene.media[l.medium].name.clone(),
                nominal_nm: l.thickness_nm,
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
            material: scene.media[l.medium].name.clone(),
            nominal_nm: l.thickness_nm,
            low_nm: 0.0,
            high_nm: f64::INFINITY,
        })
    });
    out
}

fn walk(items: &[Item], f: &mut dyn FnMut(&crate::scene::Layer)) {
    for item in items {
        match item {
            Item::Layer(l) => f(l),
            Item::Repeat(r) => walk(&r.items, f),
        }
    }
}

pub(super) fn walk_mut(items: &mut [Item], f: &mut dyn FnMut(&mut crate::scene::Layer)) {
    for item in items {
        match item {
            Item::Layer(l) => f(l),
            Item::Repeat(r) => walk_mut(&mut r.items, f),
        }
    }
}

/// `items` with the layer of each variable set to the thickness in `x`.
pub fn with_thicknesses(items: &[Item], vars: &[Variable], x: &[f64]) -> Vec<Item> {
    let mut out = items.to_vec();
    walk_mut(&mut out, &mut |l| {
        if let Some(i) = vars.iter().position(|v| v.pointer == l.pointer) {
            l.thickness_nm = x[i];
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
/// `thickness_um` for a thick layer given in µm.
pub fn edited_document(document: &Value, vars: &[Variable], x: &[f64]) -> Result<Value> {
    let mut doc = document.clone();
    for (v, &t) in vars.iter().zip(x) {
        let layer = doc
            .pointer_mut(&v.pointer)
            .and_then(Value::as_object_mut)
            .ok_or_else(|| Error::invalid(&v.pointer, "(missing)", "no layer at this pointer"))?;
        if layer.contains_key("thickness_um") {
            layer.insert("thickness_um".into(), Value::from(t / 1e3));
        } else {
            layer.insert("thickness_nm".into(), Value::from(t));
        }
    }
    Ok(doc)
}
