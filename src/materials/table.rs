//! Tabulated optical constants with linear interpolation.

use num_complex::Complex64;

use crate::error::{Error, Result};

/// Measured n, k against wavelength, strictly increasing in wavelength.
#[derive(Debug, Clone, PartialEq)]
pub struct NkTable {
    wl_nm: Vec<f64>,
    n: Vec<f64>,
    k: Vec<f64>,
}

impl NkTable {
    /// Builds a table from columns; `key` names it in errors.
    pub fn new(key: &str, wl_nm: Vec<f64>, n: Vec<f64>, k: Vec<f64>) -> Result<Self> {
        if wl_nm.len() < 2 {
            return Err(Error::invalid(
                key,
                wl_nm.len(),
                "a table needs at least two rows",
            ));
        }
        for (i, w) in wl_nm.windows(2).enumerate() {
            if w[1].partial_cmp(&w[0]) != Some(std::cmp::Ordering::Greater) {
                return Err(Error::invalid(
                    format!("{key} row {}", i + 2),
                    w[1],
                    "wavelengths must increase strictly",
                ));
            }
        }
        for (i, (&ni, &ki)) in n.iter().zip(&k).enumerate() {
            if !(ni.is_finite() && ni > 0.0 && ki.is_finite() && ki >= 0.0) {
                return Err(Error::invalid(
                    format!("{key} row {}", i + 1),
                    format!("n={ni}, k={ki}"),
                    "needs n > 0 and k ≥ 0",
                ));
            }
        }
        Ok(NkTable { wl_nm, n, k })
    }

    /// Parses CSV text with a header `wavelength_nm,n,k` (the `k` column may be
    /// left out for transparent materials). `key` names the source in errors.
    pub fn from_csv(key: &str, text: &str) -> Result<Self> {
        let mut lines = text
            .lines()
            .enumerate()
            .filter(|(_, l)| !l.trim().is_empty() && !l.starts_with('#'));
        let (_, header) = lines
            .next()
            .ok_or_else(|| Error::invalid(key, "(empty)", "the CSV file has no header"))?;
        let cols: Vec<&str> = header.split(',').map(str::trim).collect();
        let has_k = match cols.as_slice() {
            ["wavelength_nm", "n"] => false,
            ["wavelength_nm", "n", "k"] => true,
            _ => {
                return Err(Error::invalid(
                    format!("{key} header"),
                    header,
                    "expected `wavelength_nm,n,k` or `wavelength_nm,n`",
                ));
            }
        };
        let (mut wl, mut n, mut k) = (Vec::new(), Vec::new(), Vec::new());
        for (i, line) in lines {
            let vals: Vec<&str> = line.split(',').map(str::trim).collect();
            if vals.len() != cols.len() {
                return Err(Error::invalid(
                    format!("{key} line {}", i + 1),
                    line,
                    format!("expected {} columns", cols.len()),
                ));
            }
            let num = |s: &str| -> Result<f64> {
                s.parse::<f64>()
                    .ok()
                    .filter(|v| v.is_finite())
                    .ok_or_else(|| {
                        Error::invalid(format!("{key} line {}", i + 1), s, "not a finite number")
                    })
            };
            wl.push(num(vals[0])?);
            n.push(num(vals[1])?);
            k.push(if has_k { num(vals[2])? } else { 0.0 });
        }
        NkTable::new(key, wl, n, k)
    }

    /// First and last tabulated wavelength (nm).
    pub fn span(&self) -> (f64, f64) {
        (self.wl_nm[0], *self.wl_nm.last().unwrap())
    }

    /// Linearly interpolated index; an error outside the table.
    pub fn index(&self, wl_nm: f64) -> Result<Complex64> {
        let (lo, hi) = self.span();
        if !(wl_nm >= lo && wl_nm <= hi) {
            return Err(Error::OutOfRange {
                key: String::new(),
                wavelength_nm: wl_nm,
                min_nm: lo,
                max_nm: hi,
            });
        }
        let j = self
            .wl_nm
            .partition_point(|&w| w <= wl_nm)
            .clamp(1, self.wl_nm.len() - 1);
        let (w0, w1) = (self.wl_nm[j - 1], self.wl_nm[j]);
        let t = (wl_nm - w0) / (w1 - w0);
        let lerp = |v: &[f64]| v[j - 1] + t * (v[j] - v[j - 1]);
        Ok(Complex64::new(lerp(&self.n), lerp(&self.k)))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn interpolates_and_refuses_outside() {
        let t =
            NkTable::from_csv("t.csv", "wavelength_nm,n,k\n400,1.5,0.0\n500,1.7,0.2\n").unwrap();
        let n = t.index(450.0).unwrap();
        assert!((n.re - 1.6).abs() < 1e-12 && (n.im - 0.1).abs() < 1e-12);
        assert_eq!(t.index(500.0).unwrap(), Complex64::new(1.7, 0.2));
        assert_eq!(t.index(400.0).unwrap(), Complex64::new(1.5, 0.0));
        assert!(t.index(399.0).is_err() && t.index(501.0).is_err());
    }

    #[test]
    fn malformed_csv_is_refused() {
        for text in [
            "",
            "wl,n\n1,2\n2,3",
            "wavelength_nm,n\n400,x\n500,1",
            "wavelength_nm,n\n500,1.5\n400,1.5",
            "wavelength_nm,n\n400,1.5",
        ] {
            assert!(NkTable::from_csv("t", text).is_err(), "{text:?}");
        }
    }
}
