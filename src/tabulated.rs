//! Numeric tables from CSV text (a header naming the columns, then rows of
//! finite numbers; blank lines and `#` comments skipped), and spectral tables
//! interpolated linearly against a strictly increasing wavelength column.

use crate::error::{Error, Result};

/// Parsed CSV: column names and rows, each row with its 1-based line number.
#[derive(Debug, Clone, PartialEq)]
pub struct Csv {
    /// Column names as written (trimmed).
    pub header: Vec<String>,
    /// (line number, values) per data row.
    pub rows: Vec<(usize, Vec<f64>)>,
}

impl Csv {
    /// Parses `text`; `key` names the source in errors.
    pub fn parse(key: &str, text: &str) -> Result<Csv> {
        let mut lines = text
            .lines()
            .enumerate()
            .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
        let (_, head) = lines
            .next()
            .ok_or_else(|| Error::invalid(key, "(empty)", "the CSV text has no header line"))?;
        let header: Vec<String> = head.split(',').map(|h| h.trim().to_string()).collect();
        let mut rows = Vec::new();
        for (i, line) in lines {
            let at = format!("{key} line {}", i + 1);
            let cells: Vec<&str> = line.split(',').map(str::trim).collect();
            if cells.len() != header.len() {
                return Err(Error::invalid(
                    at,
                    line.trim(),
                    format!("expected {} columns", header.len()),
                ));
            }
            let values = cells
                .iter()
                .map(|c| {
                    c.parse::<f64>()
                        .ok()
                        .filter(|v| v.is_finite())
                        .ok_or_else(|| Error::invalid(&at, c, "not a finite number"))
                })
                .collect::<Result<Vec<f64>>>()?;
            rows.push((i + 1, values));
        }
        Ok(Csv { header, rows })
    }

    /// Index of the column called `name` (case-insensitive).
    pub fn column(&self, name: &str) -> Option<usize> {
        self.header
            .iter()
            .position(|h| h.eq_ignore_ascii_case(name))
    }
}

/// Columns against a strictly increasing wavelength (nm), linearly interpolated.
#[derive(Debug, Clone, PartialEq)]
pub struct Spectral {
    wl_nm: Vec<f64>,
    cols: Vec<Vec<f64>>,
}

impl Spectral {
    /// Parses CSV whose header is exactly one of `headers` (the first column
    /// being the wavelength); returns the table and which header matched.
    pub fn from_csv(key: &str, text: &str, headers: &[&[&str]]) -> Result<(Spectral, usize)> {
        let csv = Csv::parse(key, text)?;
        let which = headers
            .iter()
            .position(|h| csv.header.iter().map(String::as_str).eq(h.iter().copied()))
            .ok_or_else(|| {
                let expected: Vec<String> = headers
                    .iter()
                    .map(|h| format!("`{}`", h.join(",")))
                    .collect();
                Error::invalid(
                    format!("{key} header"),
                    csv.header.join(","),
                    format!("expected {}", expected.join(" or ")),
                )
            })?;
        let mut wl_nm = Vec::with_capacity(csv.rows.len());
        let mut cols = vec![Vec::with_capacity(csv.rows.len()); csv.header.len() - 1];
        for (line, values) in &csv.rows {
            if wl_nm.last().is_some_and(|&last| !(values[0] > last)) {
                return Err(Error::invalid(
                    format!("{key} line {line}"),
                    values[0],
                    "wavelengths must increase strictly",
                ));
            }
            wl_nm.push(values[0]);
            for (c, v) in cols.iter_mut().zip(&values[1..]) {
                c.push(*v);
            }
        }
        if wl_nm.len() < 2 {
            return Err(Error::invalid(
                key,
                format!("{} rows", wl_nm.len()),
                "a table needs at least two rows",
            ));
        }
        Ok((Spectral { wl_nm, cols }, which))
    }

    /// First and last wavelength (nm).
    pub fn span(&self) -> (f64, f64) {
        (self.wl_nm[0], self.wl_nm[self.wl_nm.len() - 1])
    }

    /// The wavelengths (nm).
    pub fn wavelengths(&self) -> &[f64] {
        &self.wl_nm
    }

    /// Number of value columns (after the wavelength).
    pub fn columns(&self) -> usize {
        self.cols.len()
    }

    /// The values of column `col` (0 is the first column after the wavelength).
    pub fn column(&self, col: usize) -> &[f64] {
        &self.cols[col]
    }

    /// Column `col` linearly interpolated at `wl_nm`; `None` outside the table.
    pub fn at(&self, col: usize, wl_nm: f64) -> Option<f64> {
        let (lo, hi) = self.span();
        if !(wl_nm >= lo && wl_nm <= hi) {
            return None;
        }
        let j = self
            .wl_nm
            .partition_point(|&w| w <= wl_nm)
            .clamp(1, self.wl_nm.len() - 1);
        let (w0, w1) = (self.wl_nm[j - 1], self.wl_nm[j]);
        let v = &self.cols[col];
        Some(v[j - 1] + (wl_nm - w0) / (w1 - w0) * (v[j] - v[j - 1]))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn interpolates_inside_and_refuses_outside() {
        let (t, which) = Spectral::from_csv(
            "t",
            "# comment\nwavelength_nm,a\n400,1\n\n500,3\n",
            &[&["wavelength_nm", "a"]],
        )
        .unwrap();
        assert_eq!(which, 0);
        assert_eq!(t.at(0, 450.0), Some(2.0));
        assert_eq!(t.at(0, 500.0), Some(3.0));
        assert_eq!(t.at(0, 399.9), None);
    }

    #[test]
    fn malformed_text_is_refused_with_the_line() {
        let h: &[&[&str]] = &[&["wavelength_nm", "a"]];
        for (text, fragment) in [
            ("", "no header"),
            ("wl,a\n1,2\n2,3", "header"),
            ("wavelength_nm,a\n400,x\n500,1", "line 2"),
            ("wavelength_nm,a\n500,1\n400,1", "increase"),
            ("wavelength_nm,a\n400,1", "two rows"),
            ("wavelength_nm,a\n400,1,2\n500,1", "columns"),
        ] {
            let e = Spectral::from_csv("t", text, h).unwrap_err().to_string();
            assert!(e.contains(fragment), "{text:?}: {e}");
        }
    }
}
