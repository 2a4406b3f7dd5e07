//! Measured spectra given as text: one reader for `fit`, `compare`, the
//! charts and the Python package. The library parses text handed to it and
//! reads no files.
//!
//! Two forms are read ([`read`] tells them apart by content):
//!
//! - delimited tables ([`table`]): a header naming a wavelength column and a
//!   reflectance or transmittance column, optionally an `angle_deg` or
//!   `geometry` column, or one value column per angle or geometry
//!   (`wavelength_nm,R@0,R@15,R@45`); comma, tab, semicolon (with decimal
//!   comma) or whitespace separators; comment lines and free-text preamble;
//! - CGATS.17 / ISO 28178 text ([`cgats`]), one spectral sample per data set.
//!
//! Values are fractions (1 is a perfect reflector, or the perfect white
//! diffuser's reflectance factor) unless a header says percent or the
//! caller asks for percent. Readings slightly below zero (down to
//! [`MIN_MEASURED`], instrument noise near zero) are kept and counted in a
//! warning; anything lower, and fractions above [`MAX_MEASURED`], are
//! refused. Errors name the line (`measured line 12 = 0,45x: …`); the front
//! ends add the file name.

pub mod cgats;
pub mod table;

use crate::design::coating::At;
use crate::error::{Error, Result};
use crate::scene::{MIN_WAVELENGTH_NM, Warning, WarningKind};

/// Measured reflectance (or transmittance) at one angle, or reflectance
/// factor at one geometry.
#[derive(Debug, Clone, PartialEq)]
pub struct Measured {
    /// Angle of incidence (a film) or geometry (a coating).
    pub at: At,
    /// Wavelengths in nm, strictly increasing.
    pub wavelengths_nm: Vec<f64>,
    /// Reflectance (or transmittance, or reflectance factor) as a fraction.
    pub r: Vec<f64>,
}

/// What a measured file holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Quantity {
    /// Reflectance, or the reflectance factor at a geometry.
    #[default]
    Reflectance,
    /// Transmittance.
    Transmittance,
}

impl Quantity {
    /// `R` or `T`.
    pub fn symbol(self) -> &'static str {
        match self {
            Quantity::Reflectance => "R",
            Quantity::Transmittance => "T",
        }
    }

    /// `reflectance` or `transmittance`.
    pub fn name(self) -> &'static str {
        match self {
            Quantity::Reflectance => "reflectance",
            Quantity::Transmittance => "transmittance",
        }
    }
}

/// Largest fraction accepted: reflectance is a fraction, and values above
/// this are almost surely percent.
pub const MAX_MEASURED: f64 = 1.5;

/// Lowest reading accepted (as a fraction): a little below zero is
/// instrument noise on a dark sample and is kept with a warning.
pub const MIN_MEASURED: f64 = -0.02;

/// How to read a measured file.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct ReadOptions {
    /// Angle of incidence (degrees) of readings that name no angle or geometry.
    pub default_angle_deg: f64,
    /// Every value is in percent, whatever the header says.
    pub percent: bool,
}

/// A measured file, read.
#[derive(Debug, Clone, PartialEq)]
pub struct Reading {
    /// Reflectance or transmittance.
    pub quantity: Quantity,
    /// One group per angle or geometry, in order of first appearance.
    pub groups: Vec<Measured>,
    /// What was kept but deserves a look (readings below zero, columns
    /// ignored).
    pub warnings: Vec<Warning>,
}

/// Reads a delimited table or, when the text holds a `BEGIN_DATA_FORMAT`
/// line, a CGATS file. A leading UTF-8 byte order mark is skipped; lines may
/// end in CRLF.
pub fn read(text: &str, options: &ReadOptions) -> Result<Reading> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    if cgats::looks_like(text) {
        cgats::read(text, options)
    } else {
        table::read(text, options)
    }
}

/// Measured points given as columns (wavelength, value and the point of
/// each), checked as a file's rows are; errors name the row as
/// `measured[i]`.
pub fn from_columns(wavelengths_nm: &[f64], r: &[f64], at: &[At]) -> Result<Reading> {
    if wavelengths_nm.len() != r.len() || at.len() != r.len() {
        return Err(Error::invalid(
            "measured",
            format!(
                "{} wavelengths, {} R, {} points",
                wavelengths_nm.len(),
                r.len(),
                at.len()
            ),
            "the columns must have one value per row",
        ));
    }
    let mut points = Points::new(Quantity::Reflectance);
    for (i, ((&w, &rv), p)) in wavelengths_nm.iter().zip(r).zip(at).enumerate() {
        let key = format!("measured[{i}]");
        if !(w.is_finite() && rv.is_finite()) {
            let row = format!("wavelength_nm {w}, R {rv}, {}", p.describe());
            return Err(Error::invalid(&key, row, "not a finite number"));
        }
        points.add(&key, (&w.to_string(), w), (&rv.to_string(), rv), p.clone())?;
    }
    points.finish()
}

/// A number as written in a cell, with `shift` decimal places moved to the
/// left (2 for percent: `45.2` → 0.452, read from the exact decimal so that
/// percent and fraction files of the same digits give identical values).
pub(crate) fn number(cell: &str, shift: i32) -> Option<f64> {
    let t = cell.trim();
    let ok = |c: char| c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E');
    if t.is_empty() || !t.chars().all(ok) || !t.contains(|c: char| c.is_ascii_digit()) {
        return None;
    }
    let v: f64 = if shift == 0 {
        t.parse().ok()?
    } else {
        let (mantissa, exponent) = match t.find(['e', 'E']) {
            Some(i) => (&t[..i], t[i + 1..].parse::<i32>().ok()?),
            None => (t, 0),
        };
        format!("{mantissa}e{}", exponent.checked_sub(shift)?)
            .parse()
            .ok()?
    };
    v.is_finite().then_some(v)
}

/// `value` (a fraction) in percent as text whose digits are those of the
/// shortest form of the fraction, moved two places (0.4523 → `45.23`): read
/// back with [`number`] and a shift of 2 it gives exactly `value`.
pub(crate) fn percent_text(value: f64) -> String {
    let plain = value.to_string();
    let (sign, body) = match plain.strip_prefix('-') {
        Some(b) => ("-", b),
        None => ("", plain.as_str()),
    };
    let (int, frac) = body.split_once('.').unwrap_or((body, ""));
    let frac = format!("{frac:0<2}");
    let whole = format!("{int}{}", &frac[..2]);
    let whole = match whole.trim_start_matches('0') {
        "" => "0",
        w => w,
    };
    let rest = &frac[2..];
    if rest.is_empty() {
        format!("{sign}{whole}")
    } else {
        format!("{sign}{whole}.{rest}")
    }
}

/// Measured points being gathered into groups, with the checks every
/// reading passes.
pub(crate) struct Points {
    quantity: Quantity,
    groups: Vec<Measured>,
    negative: usize,
    lowest: f64,
    warnings: Vec<Warning>,
}

impl Points {
    pub(crate) fn new(quantity: Quantity) -> Self {
        Points {
            quantity,
            groups: Vec::new(),
            negative: 0,
            lowest: 0.0,
            warnings: Vec::new(),
        }
    }

    /// Whether a group exists at `at`.
    pub(crate) fn has(&self, at: &At) -> bool {
        self.groups.iter().any(|g| g.at == *at)
    }

    /// A warning to pass on.
    pub(crate) fn warn(&mut self, kind: WarningKind, key: &str, message: String) {
        self.warnings.push(Warning {
            kind,
            key: key.to_string(),
            message,
        });
    }

    /// Checks one reading (`key` names its line; each value comes with its
    /// text as written) and adds it to the group of its angle or geometry.
    pub(crate) fn add(
        &mut self,
        key: &str,
        (w_text, w): (&str, f64),
        (v_text, v): (&str, f64),
        at: At,
    ) -> Result<()> {
        let q = self.quantity.symbol();
        if !(w >= MIN_WAVELENGTH_NM) {
            return Err(Error::invalid(
                key,
                w_text,
                format!("needs wavelength ≥ {MIN_WAVELENGTH_NM} nm"),
            ));
        }
        if let Some(a) = at.angle_deg()
            && !(a.abs() < 90.0)
        {
            return Err(Error::invalid(key, a, "needs |angle| < 90°"));
        }
        if v > MAX_MEASURED {
            return Err(Error::invalid(
                key,
                v_text,
                format!(
                    "{q} is a fraction and this is above {MAX_MEASURED}: looks like percent: divide by 100 (or mark the column as percent, e.g. `{q} (%)`)"
                ),
            ));
        }
        if v < MIN_MEASURED {
            return Err(Error::invalid(
                key,
                v_text,
                format!(
                    "{q} below {MIN_MEASURED} is not instrument noise: check the baseline (or the column)"
                ),
            ));
        }
        if v < 0.0 {
            self.negative += 1;
            self.lowest = self.lowest.min(v);
        }
        match self.groups.iter_mut().find(|g| g.at == at) {
            Some(g) => {
                let last = g.wavelengths_nm[g.wavelengths_nm.len() - 1];
                if !(w > last) {
                    return Err(Error::invalid(
                        key,
                        w_text,
                        format!(
                            "wavelengths must increase within each {} (the previous one at {} is {last} nm)",
                            if at.angle_deg().is_some() {
                                "angle"
                            } else {
                                "geometry"
                            },
                            at.describe()
                        ),
                    ));
                }
                g.wavelengths_nm.push(w);
                g.r.push(v);
            }
            None => self.groups.push(Measured {
                at,
                wavelengths_nm: vec![w],
                r: vec![v],
            }),
        }
        Ok(())
    }

    /// The reading, or an error when there is no data.
    pub(crate) fn finish(mut self) -> Result<Reading> {
        if self.groups.is_empty() {
            return Err(Error::invalid("measured", "(no rows)", "no data rows"));
        }
        if self.negative > 0 {
            let message = format!(
                "{} reading{} below 0 (lowest {}) kept as measured: instrument noise near zero",
                self.negative,
                if self.negative == 1 { "" } else { "s" },
                self.lowest
            );
            self.warn(WarningKind::NegativeReadings, "measured", message);
        }
        Ok(Reading {
            quantity: self.quantity,
            groups: self.groups,
            warnings: self.warnings,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn percent_text_reads_back_exactly() {
        for v in [
            0.4523,
            0.0,
            1.0,
            0.5,
            0.012345,
            -0.013,
            1.4999,
            0.1 + 0.2,
            1e-7,
        ] {
            let t = percent_text(v);
            assert_eq!(number(&t, 2), Some(v), "{v} → {t}");
        }
        assert_eq!(percent_text(0.4523), "45.23");
        assert_eq!(percent_text(0.5), "50");
        assert_eq!(percent_text(-0.013), "-1.3");
        assert_eq!(number("45.2e0", 2), Some(0.452));
        assert_eq!(number("x", 0), None);
        assert_eq!(number("inf", 0), None);
    }
}
