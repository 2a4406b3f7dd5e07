//! What a valid scene may still get wrong: materials used beyond the range
//! their source vouches for, a wavelength step too coarse for colour, and
//! coherent layers too thick for interference to be seen.

use std::fmt;

use super::{Item, Scene};

/// Coarsest wavelength step (nm) colour is computed on without a warning;
/// CIE 015:2018 recommends 5 nm or finer for colorimetric summation.
pub const COARSEST_COLOUR_STEP_NM: f64 = 10.0;

/// Thickest coherent layer (nm) without a warning: beyond 50 µm the fringes
/// are finer than a spectrometer or the eye resolves (common practice).
pub const THICKEST_COHERENT_NM: f64 = 50_000.0;

/// Thinnest incoherent layer (nm) without a warning: below 1 µm visible
/// light keeps its coherence across the layer and fringes are seen (common
/// practice).
pub const THINNEST_INCOHERENT_NM: f64 = 1_000.0;

/// The kind of a [`Warning`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum WarningKind {
    /// A material is used outside the wavelengths its source vouches for.
    OutsideValidRange,
    /// The wavelength step is coarser than [`COARSEST_COLOUR_STEP_NM`]; it
    /// matters only where colour is computed.
    CoarseStep,
    /// A coherent layer is thicker than [`THICKEST_COHERENT_NM`].
    ThickLayer,
    /// An incoherent layer is thinner than `THINNEST_INCOHERENT_NM` (1 µm).
    ThinIncoherent,
    /// Measured readings a little below zero (instrument noise) were kept.
    NegativeReadings,
    /// Columns of a measured table that were not used.
    IgnoredColumns,
}

/// A warning about a valid scene, naming the key it concerns.
#[derive(Debug, Clone, PartialEq)]
pub struct Warning {
    /// What it is about.
    pub kind: WarningKind,
    /// Dotted path of the key, e.g. `stack[0].material`.
    pub key: String,
    /// What is wrong and what to do.
    pub message: String,
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.key, self.message)
    }
}

/// Every warning about `scene`, in the order of its keys.
pub(super) fn of(scene: &Scene) -> Vec<Warning> {
    let mut out = Vec::new();
    let (lo, hi) = (
        scene.wavelengths_nm[0],
        scene.wavelengths_nm[scene.wavelengths_nm.len() - 1],
    );
    for m in &scene.media {
        let Some((from, to)) = m.valid_nm else {
            continue;
        };
        let outside: Vec<String> = [(lo < from, lo), (hi > to, hi)]
            .into_iter()
            .filter(|(out, _)| *out)
            .map(|(_, w)| format!("{w} nm"))
            .collect();
        if !outside.is_empty() {
            out.push(Warning {
                kind: WarningKind::OutsideValidRange,
                key: m.used_at.clone(),
                message: format!(
                    "\"{}\" is used at {}, outside {from}–{to} nm where its source vouches for it; values there are extrapolated",
                    m.name,
                    outside.join(" and ")
                ),
            });
        }
    }
    if let Some(step) = coarsest_visible_step(&scene.wavelengths_nm)
        && step > COARSEST_COLOUR_STEP_NM
    {
        out.push(Warning {
            kind: WarningKind::CoarseStep,
            key: "wavelengths_nm".to_string(),
            message: format!(
                "the wavelength step reaches {step} nm where the observer sees; colour from steps coarser than \
                 {COARSEST_COLOUR_STEP_NM} nm is approximate (CIE 015:2018 recommends 5 nm or finer)"
            ),
        });
    }
    let platelet = scene.coating.iter().flat_map(|c| &c.platelet);
    thick_layers(scene.stack.iter().chain(platelet), &mut out);
    out
}

/// The widest spacing between neighbouring grid points where the CIE
/// observers see (360–830 nm); `None` for a single point.
fn coarsest_visible_step(grid: &[f64]) -> Option<f64> {
    grid.windows(2)
        .filter(|w| w[1] > 360.0 && w[0] < 830.0)
        .map(|w| w[1] - w[0])
        .reduce(f64::max)
}

fn thick_layers<'a>(items: impl Iterator<Item = &'a Item>, out: &mut Vec<Warning>) {
    for item in items {
        match item {
            Item::Layer(l) if l.incoherent && l.thickness_nm < THINNEST_INCOHERENT_NM => {
                out.push(Warning {
                    kind: WarningKind::ThinIncoherent,
                    key: format!("{}.incoherent", key_of(&l.pointer)),
                    message: format!(
                        "an incoherent layer of {} nm: light stays coherent across layers \
                         thinner than {} µm, so a coherent layer is likely meant",
                        l.thickness_nm,
                        THINNEST_INCOHERENT_NM / 1e3
                    ),
                })
            }
            Item::Layer(l) if !l.incoherent && l.thickness_nm > THICKEST_COHERENT_NM => out.push(Warning {
                kind: WarningKind::ThickLayer,
                key: format!("{}.thickness_nm", key_of(&l.pointer)),
                message: format!(
                    "{} nm is a coherent layer thicker than {} µm, whose fringes no instrument resolves; \
                     mark it \"incoherent\": true (or use a substrate sheet)",
                    l.thickness_nm,
                    THICKEST_COHERENT_NM / 1e3
                ),
            }),
            Item::Layer(_) => {}
            Item::Repeat(r) => thick_layers(r.items.iter(), out),
        }
    }
}

/// `/stack/2/stack/0` → `stack[2].stack[0]`.
pub(super) fn key_of(pointer: &str) -> String {
    let mut key = String::new();
    for part in pointer.split('/').filter(|p| !p.is_empty()) {
        if part.bytes().all(|b| b.is_ascii_digit()) {
            key.push_str(&format!("[{part}]"));
        } else {
            if !key.is_empty() {
                key.push('.');
            }
            key.push_str(part);
        }
    }
    key
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pointers_read_as_keys() {
        assert_eq!(key_of("/stack/2/stack/0"), "stack[2].stack[0]");
        assert_eq!(key_of("/coating/platelet/1"), "coating.platelet[1]");
    }

    #[test]
    fn the_visible_step_ignores_the_infrared() {
        assert_eq!(
            coarsest_visible_step(&[400.0, 405.0, 830.0, 2000.0]),
            Some(425.0)
        );
        assert_eq!(
            coarsest_visible_step(&[380.0, 385.0, 390.0, 900.0, 2000.0]),
            Some(510.0)
        );
        assert_eq!(coarsest_visible_step(&[900.0, 1000.0]), None);
        assert_eq!(coarsest_visible_step(&[550.0]), None);
    }
}
