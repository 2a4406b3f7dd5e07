//! Tabulated spectra: the CIE standard observers and illuminants (embedded from
//! `reference_data/cie/`, see its README) and custom illuminants from CSV text.

use std::fmt;
use std::str::FromStr;
use std::sync::OnceLock;

use crate::error::{Error, Result};
use crate::tabulated::Spectral;

/// Spectral tables here are CIE data or lights: linearly interpolated (as CIE
/// 015:2018 allows for tabulated data) and never negative.
pub(crate) type Table = Spectral;

/// Parses a table whose header is exactly `header` and whose values are all ≥ 0.
fn table_from_csv(key: &str, text: &str, header: &[&str]) -> Result<Table> {
    let (table, _) = Spectral::from_csv(key, text, &[header])?;
    for (c, name) in header[1..].iter().enumerate() {
        if let Some(&v) = table.column(c).iter().find(|&&v| v < 0.0) {
            return Err(Error::invalid(
                format!("{key} {name}"),
                v,
                "must not be negative",
            ));
        }
    }
    Ok(table)
}

/// Parses an embedded table; they are checked by the tests, so failure is a build defect.
fn embedded(
    cell: &'static OnceLock<Table>,
    key: &str,
    text: &str,
    header: &[&str],
) -> &'static Table {
    cell.get_or_init(|| table_from_csv(key, text, header).expect("embedded CIE table is valid"))
}

const CMF_HEADER: &[&str] = &["wavelength_nm", "xbar", "ybar", "zbar"];
const POWER_HEADER: &[&str] = &["wavelength_nm", "power"];

/// A CIE standard colorimetric observer (CIE 015:2018).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Observer {
    /// CIE 1931 standard colorimetric observer (2° field).
    Cie1931_2,
    /// CIE 1964 standard colorimetric observer (10° field).
    Cie1964_10,
}

impl Observer {
    /// Its canonical name, `CIE1931_2` or `CIE1964_10`.
    pub fn name(self) -> &'static str {
        match self {
            Observer::Cie1931_2 => "CIE1931_2",
            Observer::Cie1964_10 => "CIE1964_10",
        }
    }

    /// Colour-matching functions x̄, ȳ, z̄ at 360–830 nm in 1 nm steps
    /// (CIE 015:2018).
    pub(crate) fn cmfs(self) -> &'static Table {
        static CIE1931: OnceLock<Table> = OnceLock::new();
        static CIE1964: OnceLock<Table> = OnceLock::new();
        match self {
            Observer::Cie1931_2 => embedded(
                &CIE1931,
                "cmf_cie1931_2.csv",
                include_str!("../../reference_data/cie/cmf_cie1931_2.csv"),
                CMF_HEADER,
            ),
            Observer::Cie1964_10 => embedded(
                &CIE1964,
                "cmf_cie1964_10.csv",
                include_str!("../../reference_data/cie/cmf_cie1964_10.csv"),
                CMF_HEADER,
            ),
        }
    }
}

impl Observer {
    /// The spectrum locus: wavelength (nm) and chromaticity x, y of
    /// monochromatic light at every tabulated wavelength, x = x̄/(x̄+ȳ+z̄),
    /// y = ȳ/(x̄+ȳ+z̄) (CIE 015:2018); wavelengths where all three are zero
    /// are left out.
    pub fn spectrum_locus(self) -> Vec<(f64, f64, f64)> {
        let t = self.cmfs();
        t.wavelengths()
            .iter()
            .enumerate()
            .filter_map(|(i, &w)| {
                let (x, y, z) = (t.column(0)[i], t.column(1)[i], t.column(2)[i]);
                let sum = x + y + z;
                (sum > 0.0).then(|| (w, x / sum, y / sum))
            })
            .collect()
    }
}

impl FromStr for Observer {
    type Err = Error;

    /// Accepts `CIE1931_2` / `2` and `CIE1964_10` / `10`, in any case.
    fn from_str(s: &str) -> Result<Self> {
        match s.trim().to_ascii_uppercase().as_str() {
            "CIE1931_2" | "2" => Ok(Observer::Cie1931_2),
            "CIE1964_10" | "10" => Ok(Observer::Cie1964_10),
            _ => Err(Error::invalid(
                "observer",
                s,
                "unknown observer (expected CIE1931_2 or CIE1964_10, or 2 or 10)",
            )),
        }
    }
}

impl fmt::Display for Observer {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

macro_rules! builtin_illuminants {
    ($($name:literal => $file:literal),* $(,)?) => {
        /// Names of the built-in illuminants (CIE 015:2018).
        pub const BUILT_IN_ILLUMINANTS: &[&str] = &[$($name),*];

        /// The embedded table of a built-in illuminant, by canonical name.
        fn builtin_table(name: &str) -> Option<&'static Table> {
            static CELLS: [OnceLock<Table>; BUILT_IN_ILLUMINANTS.len()] =
                [const { OnceLock::new() }; BUILT_IN_ILLUMINANTS.len()];
            let texts: [(&str, &str); BUILT_IN_ILLUMINANTS.len()] =
                [$(($file, include_str!(concat!("../../reference_data/cie/", $file)))),*];
            let i = BUILT_IN_ILLUMINANTS.iter().position(|&n| n == name)?;
            Some(embedded(&CELLS[i], texts[i].0, texts[i].1, POWER_HEADER))
        }
    };
}

builtin_illuminants! {
    "D65" => "illuminant_d65.csv",
    "D50" => "illuminant_d50.csv",
    "A" => "illuminant_a.csv",
    "E" => "illuminant_e.csv",
    "F2" => "illuminant_f2.csv",
    "F7" => "illuminant_f7.csv",
    "F11" => "illuminant_f11.csv",
    "LED-B1" => "illuminant_led-b1.csv",
    "LED-B2" => "illuminant_led-b2.csv",
    "LED-B3" => "illuminant_led-b3.csv",
    "LED-B4" => "illuminant_led-b4.csv",
    "LED-B5" => "illuminant_led-b5.csv",
    "LED-BH1" => "illuminant_led-bh1.csv",
    "LED-RGB1" => "illuminant_led-rgb1.csv",
    "LED-V1" => "illuminant_led-v1.csv",
    "LED-V2" => "illuminant_led-v2.csv",
}

/// Relative spectral power of the light: a built-in CIE illuminant or a custom table.
#[derive(Debug, Clone, PartialEq)]
pub struct Illuminant {
    name: String,
    table: Table,
}

impl Illuminant {
    /// A built-in illuminant by name, case-insensitive (`D65`, `d50`, `A`, `E`,
    /// `F2`/`FL2`, `F7`, `F11`, `LED-B1` … `LED-V2`; see [`BUILT_IN_ILLUMINANTS`]).
    pub fn builtin(name: &str) -> Result<Self> {
        let upper = name.trim().to_ascii_uppercase();
        let canonical = match upper.strip_prefix("FL") {
            Some(n) => format!("F{n}"),
            None => upper,
        };
        let table = builtin_table(&canonical).ok_or_else(|| {
            Error::invalid(
                "illuminant",
                name,
                format!(
                    "unknown illuminant (built in: {})",
                    BUILT_IN_ILLUMINANTS.join(", ")
                ),
            )
        })?;
        Ok(Illuminant {
            name: canonical,
            table: table.clone(),
        })
    }

    /// A custom illuminant (e.g. a measured light booth) from CSV text with the
    /// header `wavelength_nm,power`: wavelengths strictly increasing, powers ≥ 0
    /// in any unit (only relative values matter). `name` labels it in errors.
    pub fn from_csv(name: &str, text: &str) -> Result<Self> {
        Ok(Illuminant {
            name: name.to_string(),
            table: table_from_csv(name, text, POWER_HEADER)?,
        })
    }

    /// The canonical name of a built-in illuminant, or the custom one's label.
    pub fn name(&self) -> &str {
        &self.name
    }

    pub(crate) fn table(&self) -> &Table {
        &self.table
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn observer_names_parse() {
        for (s, o) in [
            ("CIE1931_2", Observer::Cie1931_2),
            ("cie1931_2", Observer::Cie1931_2),
            ("2", Observer::Cie1931_2),
            ("CIE1964_10", Observer::Cie1964_10),
            (" 10 ", Observer::Cie1964_10),
        ] {
            assert_eq!(s.parse::<Observer>().unwrap(), o);
        }
        assert!("CIE2015_2".parse::<Observer>().is_err());
    }

    #[test]
    fn every_builtin_illuminant_loads_and_covers_the_visible() {
        for name in BUILT_IN_ILLUMINANTS {
            let ill = Illuminant::builtin(name).unwrap();
            let (lo, hi) = ill.table().span();
            assert!(lo <= 380.0 && hi >= 780.0, "{name}: {lo}–{hi}");
        }
        assert_eq!(Illuminant::builtin("fl11").unwrap().name(), "F11");
        assert_eq!(Illuminant::builtin("led-rgb1").unwrap().name(), "LED-RGB1");
        assert!(Illuminant::builtin("D66").is_err());
    }

    #[test]
    fn observers_span_360_to_830_nm() {
        for o in [Observer::Cie1931_2, Observer::Cie1964_10] {
            assert_eq!(o.cmfs().span(), (360.0, 830.0));
        }
        // CIE 015:2018, CIE 1931 2° observer: ȳ(555 nm) = 1.0; x̄(600 nm) = 1.0622.
        let c = Observer::Cie1931_2.cmfs();
        assert_eq!(c.at(1, 555.0), Some(1.0));
        assert!((c.at(0, 600.0).unwrap() - 1.0622).abs() < 1e-12);
    }

    #[test]
    fn custom_illuminant_parses_and_interpolates() {
        let ill = Illuminant::from_csv(
            "booth.csv",
            "# measured\nwavelength_nm,power\n400,10\n500,30\n\n600,20\n",
        )
        .unwrap();
        assert_eq!(ill.table().at(0, 450.0), Some(20.0));
        assert_eq!(ill.table().at(0, 600.0), Some(20.0));
        assert_eq!(ill.table().at(0, 601.0), None);
    }

    #[test]
    fn malformed_custom_illuminants_are_refused_with_key_and_value() {
        for (text, needle) in [
            ("", "no header"),
            ("wl,power\n400,1\n500,1", "header"),
            ("wavelength_nm,power\n400,x\n500,1", "x"),
            ("wavelength_nm,power\n400,1\n500", "columns"),
            ("wavelength_nm,power\n500,1\n400,1", "increase"),
            ("wavelength_nm,power\n400,1\n500,-2", "negative"),
            ("wavelength_nm,power\n400,inf\n500,1", "finite"),
            ("wavelength_nm,power\n400,1", "two rows"),
        ] {
            let err = Illuminant::from_csv("booth.csv", text)
                .unwrap_err()
                .to_string();
            assert!(
                err.contains("booth.csv") && err.contains(needle),
                "{text:?}: {err}"
            );
        }
    }
}
