//! The built-in material library. Each entry names its source; values
//! recalled without a document at hand are marked "from memory".

use super::{Dispersion, Material};

fn entry(name: &str, dispersion: Dispersion, valid_nm: (f64, f64), source: &str) -> Material {
    Material {
        name: name.to_string(),
        dispersion,
        valid_nm,
        source: source.to_string(),
    }
}

/// All built-in materials, in listing order.
pub fn all() -> Vec<Material> {
    vec![
        entry(
            "air",
            Dispersion::Constant { n: 1.0, k: 0.0 },
            (200.0, 2500.0),
            "n = 1 exactly, by definition of this library",
        ),
        entry(
            "fused_silica",
            Dispersion::Sellmeier {
                a: 1.0,
                terms: vec![
                    (0.696_166_3, 0.068_404_3f64.powi(2)),
                    (0.407_942_6, 0.116_241_4f64.powi(2)),
                    (0.897_479_4, 9.896_161f64.powi(2)),
                ],
                k: 0.0,
            },
            (210.0, 3710.0),
            "Malitson, \"Interspecimen comparison of the refractive index of fused silica\", JOSA 55, 1205 (1965)",
        ),
    ]
}

/// Looks up a built-in material by name (case-insensitive).
pub fn find(name: &str) -> Option<Material> {
    all()
        .into_iter()
        .find(|m| m.name.eq_ignore_ascii_case(name))
}
