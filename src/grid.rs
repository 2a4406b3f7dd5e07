//! Evenly spaced sample grids (wavelengths, angles) as scene files describe them.

use crate::error::{Error, Result};

/// An inclusive, evenly spaced range `from, from + step, …` that stops at `to`
/// when `to` lies on the grid, otherwise at the last point below it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Range {
    /// First point.
    pub from: f64,
    /// Upper end (included when on the grid).
    pub to: f64,
    /// Spacing, strictly positive.
    pub step: f64,
}

/// Most points a grid may hold; larger grids are a typing error, not a design.
pub const MAX_POINTS: usize = 1_000_000;

impl Range {
    /// Checks the range and expands it into its points. `key` names the range in errors.
    pub fn points(&self, key: &str) -> Result<Vec<f64>> {
        let Range { from, to, step } = *self;
        for (name, v) in [("from", from), ("to", to), ("step", step)] {
            if !v.is_finite() {
                return Err(Error::invalid(
                    format!("{key}.{name}"),
                    v,
                    "must be a finite number",
                ));
            }
        }
        if step <= 0.0 {
            return Err(Error::invalid(
                format!("{key}.step"),
                step,
                "must be greater than zero",
            ));
        }
        if to < from {
            return Err(Error::invalid(
                format!("{key}.to"),
                to,
                "must not be below `from` (empty range)",
            ));
        }
        // Tolerate rounding so that 380..780 step 0.1 still ends at 780.
        let count = ((to - from) / step + 1e-9).floor() + 1.0;
        if count > MAX_POINTS as f64 {
            return Err(Error::invalid(
                format!("{key}.step"),
                step,
                "gives more than 1,000,000 points",
            ));
        }
        Ok((0..count as usize)
            .map(|i| from + step * i as f64)
            .collect())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn visible_grid_has_401_points_and_includes_the_end() {
        let p = Range {
            from: 380.0,
            to: 780.0,
            step: 1.0,
        }
        .points("w")
        .unwrap();
        assert_eq!(p.len(), 401);
        assert_eq!(*p.last().unwrap(), 780.0);
    }

    #[test]
    fn off_grid_end_stops_below() {
        let p = Range {
            from: 0.0,
            to: 10.0,
            step: 3.0,
        }
        .points("a")
        .unwrap();
        assert_eq!(p, vec![0.0, 3.0, 6.0, 9.0]);
    }

    #[test]
    fn fractional_step_reaches_the_end() {
        let p = Range {
            from: 380.0,
            to: 780.0,
            step: 0.1,
        }
        .points("w")
        .unwrap();
        assert_eq!(p.len(), 4001);
    }

    #[test]
    fn bad_ranges_are_refused() {
        for r in [
            Range {
                from: 0.0,
                to: 1.0,
                step: 0.0,
            },
            Range {
                from: 0.0,
                to: 1.0,
                step: -1.0,
            },
            Range {
                from: 2.0,
                to: 1.0,
                step: 1.0,
            },
            Range {
                from: f64::NAN,
                to: 1.0,
                step: 1.0,
            },
            Range {
                from: 0.0,
                to: 1e9,
                step: 1e-3,
            },
        ] {
            assert!(r.points("k").is_err(), "{r:?}");
        }
    }
}
