//! Tabulated optical constants with linear interpolation.

use num_complex::Complex64;

use crate::error::{Error, Result};
use crate::tabulated::Spectral;

/// Measured n, k against wavelength, strictly increasing in wavelength.
#[derive(Debug, Clone, PartialEq)]
pub struct NkTable {
    /// Columns n and k.
    table: Spectral,
}

impl NkTable {
    /// Parses CSV text with a header `wavelength_nm,n,k` (the `k` column may be
    /// left out for transparent materials). `key` names the source in errors.
    pub fn from_csv(key: &str, text: &str) -> Result<Self> {
        let (table, _) = Spectral::from_csv(
            key,
            text,
            &[&["wavelength_nm", "n", "k"], &["wavelength_nm", "n"]],
        )?;
        let k = |i: usize| {
            if table.columns() > 1 {
                table.column(1)[i]
            } else {
                0.0
            }
        };
        if let Some((i, &n)) = table
            .column(0)
            .iter()
            .enumerate()
            .find(|&(i, &n)| !(n > 0.0 && k(i) >= 0.0))
        {
            return Err(Error::invalid(
                format!("{key} row {}", i + 1),
                format!("n={n}, k={}", k(i)),
                "needs n > 0 and k ≥ 0",
            ));
        }
        Ok(NkTable { table })
    }

    /// First and last tabulated wavelength (nm).
    pub fn span(&self) -> (f64, f64) {
        self.table.span()
    }

    /// Linearly interpolated index; an error outside the table.
    pub fn index(&self, wl_nm: f64) -> Result<Complex64> {
        let out_of_range = || {
            let (min_nm, max_nm) = self.span();
            Error::OutOfRange {
                key: String::new(),
                wavelength_nm: wl_nm,
                min_nm,
                max_nm,
            }
        };
        let n = self.table.at(0, wl_nm).ok_or_else(out_of_range)?;
        let k = if self.table.columns() > 1 {
            self.table.at(1, wl_nm).ok_or_else(out_of_range)?
        } else {
            0.0
        };
        Ok(Complex64::new(n, k))
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
