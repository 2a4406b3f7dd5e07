//! Refusing numbers that are not finite: a design whose colour (or
//! spectrum) cannot be computed is an error naming the point, never a
//! NaN in a report nor a silent ΔE00 of 0.

use super::coating::At;
use crate::error::{Error, Result};

impl At {
    /// The point in words: `angle 30°` or `geometry 45as15`.
    pub fn describe(&self) -> String {
        match self {
            At::Angle(a) => format!("angle {a}°"),
            At::Geometry(g) => format!("geometry {}", g.name),
        }
    }
}

/// Ok when every one of `values` is finite; otherwise
/// [`Error::NotComputable`] naming `what` at `at` (with `context` before the
/// point, e.g. `sample 17, `).
pub fn check_finite(values: &[f64], at: &At, context: &str, what: &str) -> Result<()> {
    if values.iter().all(|v| v.is_finite()) {
        Ok(())
    } else {
        Err(Error::NotComputable {
            what: what.into(),
            at: format!("{context}{}", at.describe()),
            why: "not a finite number".into(),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_the_point_of_a_value_that_is_not_finite() {
        assert!(check_finite(&[1.0, -2.0, 0.0], &At::Angle(30.0), "", "the colour").is_ok());
        for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let e = check_finite(
                &[1.0, bad, 0.0],
                &At::Angle(30.0),
                "sample 4, ",
                "the colour",
            )
            .unwrap_err();
            assert!(matches!(e, Error::NotComputable { .. }));
            assert_eq!(
                e.to_string(),
                "the colour cannot be computed at sample 4, angle 30°: not a finite number"
            );
        }
    }
}
