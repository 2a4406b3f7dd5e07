//! Measured spectra as delimited tables.
//!
//! - Separators: tab, semicolon (cells may then use a decimal comma:
//!   `0,452`), comma or runs of whitespace, chosen from the header line in
//!   that order of precedence.
//! - Lines that are blank or start with `#`, `//` or `;` are comments; lines
//!   before the header that are not a header are preamble and skipped.
//! - The header is the first line that names a wavelength column:
//!   `wavelength`, `wl`, `nm`, `lambda` or `λ` in any case, with or without a
//!   unit (`Wavelength (nm)`, `wavelength_nm`, `WL [nm]`). With whitespace
//!   separators every header cell must be a known column (so a sentence of
//!   preamble is not taken for a header); with other separators unknown
//!   columns are ignored with a warning.
//! - Value columns: `R`, `reflectance`, `reflection`, `refl`,
//!   `reflectivity`, or `T`, `transmittance`, `transmission`, `trans`; a
//!   `%` or `percent`/`pct` anywhere in the name (`%R`, `R (%)`,
//!   `reflectance_percent`) says the values are in percent. Either one value
//!   column, with an optional `angle_deg` (`angle`, `aoi`, `theta`,
//!   `angle (deg)`) or `geometry` column, or one value column per angle or
//!   geometry written `R@0`, `R@15`, `%R@45as15`.

use super::{Points, Quantity, ReadOptions, Reading, number};
use crate::design::coating::At;
use crate::error::{Error, Result};
use crate::pigment::parse_name;
use crate::scene::WarningKind;

/// How the cells of a line are separated.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Separator {
    Tab,
    Semicolon,
    Comma,
    Whitespace,
}

impl Separator {
    fn of(line: &str) -> Separator {
        if line.contains('\t') {
            Separator::Tab
        } else if line.contains(';') {
            Separator::Semicolon
        } else if line.contains(',') {
            Separator::Comma
        } else {
            Separator::Whitespace
        }
    }

    /// The cells of `line`; with whitespace separators a unit in brackets
    /// (`Wavelength (nm)`) stays with the name before it.
    fn split(self, line: &str) -> Vec<String> {
        let by = |c: char| line.split(c).map(|s| s.trim().to_string()).collect();
        match self {
            Separator::Tab => by('\t'),
            Separator::Semicolon => by(';'),
            Separator::Comma => by(','),
            Separator::Whitespace => {
                let mut cells: Vec<String> = Vec::new();
                for word in line.split_whitespace() {
                    match cells.last_mut() {
                        Some(last) if word.starts_with(['(', '[']) => {
                            last.push(' ');
                            last.push_str(word);
                        }
                        _ => cells.push(word.to_string()),
                    }
                }
                cells
            }
        }
    }
}

/// What a header cell names.
#[derive(Debug, Clone, PartialEq)]
enum Column {
    Wavelength,
    Value {
        quantity: Quantity,
        percent: bool,
        at: Option<At>,
    },
    Angle,
    Geometry,
    Other,
}

/// A comment line (`#`, `//` or `;` first).
pub(crate) fn is_comment(trimmed: &str) -> bool {
    trimmed.starts_with('#') || trimmed.starts_with("//") || trimmed.starts_with(';')
}

/// The name of a header cell without quotes, units and percent signs, in
/// lower case, and whether it said percent.
fn base_name(cell: &str) -> (String, bool) {
    let lower = cell.trim().trim_matches(['"', '\'']).trim().to_lowercase();
    let percent = lower.contains('%') || lower.contains("percent") || lower.contains("pct");
    let mut name = String::new();
    let mut depth = 0usize;
    for c in lower.chars() {
        match c {
            '(' | '[' => depth += 1,
            ')' | ']' => depth = depth.saturating_sub(1),
            '%' => {}
            _ if depth == 0 => name.push(c),
            _ => {}
        }
    }
    let mut name = name.replace("percent", "").replace("pct", "");
    for unit in ["nm", "deg", "°"] {
        for joint in ["_", " ", "/", "-"] {
            if let Some(stripped) = name.trim_end().strip_suffix(&format!("{joint}{unit}")) {
                name = stripped.to_string();
            }
        }
    }
    (
        name.trim().trim_matches(['_', ' ', '-']).to_string(),
        percent,
    )
}

fn quantity(base: &str) -> Option<Quantity> {
    match base {
        "r" | "reflectance" | "reflection" | "refl" | "reflectivity" => Some(Quantity::Reflectance),
        "t" | "transmittance" | "transmission" | "trans" => Some(Quantity::Transmittance),
        _ => None,
    }
}

/// Classifies a header cell (`key` names the header line in errors).
fn classify(cell: &str, key: &str) -> Result<Column> {
    let (base, percent) = base_name(cell);
    if let Some((left, right)) = base.split_once('@') {
        let Some(quantity) = quantity(left.trim()) else {
            return Ok(Column::Other);
        };
        let point = right.trim();
        let at = match point.parse::<f64>() {
            Ok(a) if a.is_finite() => At::Angle(a),
            _ => match parse_name(point, key).ok().as_deref() {
                Some([g]) => At::Geometry(g.clone()),
                _ => {
                    return Err(Error::invalid(
                        key,
                        cell,
                        "after @ give an angle in degrees (R@45) or one geometry name (R@45as15)",
                    ));
                }
            },
        };
        return Ok(Column::Value {
            quantity,
            percent,
            at: Some(at),
        });
    }
    Ok(match base.as_str() {
        "wavelength" | "wavelengths" | "wl" | "nm" | "lambda" | "λ" | "wave length" => {
            Column::Wavelength
        }
        "angle" | "angle_deg" | "aoi" | "theta" | "angle of incidence" | "incidence" => {
            Column::Angle
        }
        "geometry" | "geom" => Column::Geometry,
        b => match quantity(b) {
            Some(quantity) => Column::Value {
                quantity,
                percent,
                at: None,
            },
            None => Column::Other,
        },
    })
}

/// The layout a header gives.
struct Layout {
    separator: Separator,
    width: usize,
    wavelength: usize,
    /// (column, percent, fixed point) per value column.
    values: Vec<(usize, bool, Option<At>)>,
    quantity: Quantity,
    angle: Option<usize>,
    geometry: Option<usize>,
    names: Vec<String>,
}

/// The header's layout, `None` when the line is not a header (preamble).
fn layout(line: &str, key: &str) -> Result<Option<Layout>> {
    let separator = Separator::of(line);
    let names = separator.split(line);
    let columns = names
        .iter()
        .map(|c| classify(c, key))
        .collect::<Result<Vec<_>>>()?;
    let Some(wavelength) = columns.iter().position(|c| *c == Column::Wavelength) else {
        return Ok(None);
    };
    if separator == Separator::Whitespace && columns.contains(&Column::Other) {
        return Ok(None);
    }
    let only = |want: &Column, what: &str| -> Result<Option<usize>> {
        let at: Vec<usize> = (0..columns.len())
            .filter(|&i| columns[i] == *want)
            .collect();
        match at.as_slice() {
            [] => Ok(None),
            [i] => Ok(Some(*i)),
            _ => Err(Error::invalid(
                key,
                line.trim(),
                format!("more than one {what} column"),
            )),
        }
    };
    only(&Column::Wavelength, "wavelength")?;
    let angle = only(&Column::Angle, "angle")?;
    let geometry = only(&Column::Geometry, "geometry")?;
    if angle.is_some() && geometry.is_some() {
        return Err(Error::invalid(
            key,
            line.trim(),
            "give an angle_deg or a geometry column, not both",
        ));
    }
    let mut values = Vec::new();
    let mut quantities = Vec::new();
    for (i, c) in columns.iter().enumerate() {
        if let Column::Value {
            quantity,
            percent,
            at,
        } = c
        {
            values.push((i, *percent, at.clone()));
            quantities.push(*quantity);
        }
    }
    let Some(&quantity) = quantities.first() else {
        return Err(Error::invalid(
            key,
            line.trim(),
            "needs an R column (or T; e.g. `wavelength_nm,R`)",
        ));
    };
    if quantities.iter().any(|&q| q != quantity) {
        return Err(Error::invalid(
            key,
            line.trim(),
            "reflectance and transmittance in one file: give one of them",
        ));
    }
    let wide = values.iter().filter(|v| v.2.is_some()).count();
    if wide > 0 && (wide < values.len() || angle.is_some() || geometry.is_some()) {
        return Err(Error::invalid(
            key,
            line.trim(),
            "a wide table has only R@POINT columns besides the wavelength (no plain R, angle or geometry column)",
        ));
    }
    if wide == 0 && values.len() > 1 {
        return Err(Error::invalid(
            key,
            line.trim(),
            format!(
                "more than one {} column (one per angle is written {0}@0, {0}@45)",
                quantity.symbol()
            ),
        ));
    }
    for (i, (_, _, a)) in values.iter().enumerate() {
        if values[..i].iter().any(|v| v.2 == *a) {
            return Err(Error::invalid(
                key,
                &names[values[i].0],
                "this point has two columns",
            ));
        }
    }
    Ok(Some(Layout {
        separator,
        width: names.len(),
        wavelength,
        values,
        quantity,
        angle,
        geometry,
        names,
    }))
}

/// Reads a delimited table (see the module documentation).
pub fn read(text: &str, options: &ReadOptions) -> Result<Reading> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l))
        .filter(|(_, l)| !l.trim().is_empty() && !is_comment(l.trim()));
    let mut found = None;
    for (n, line) in lines.by_ref() {
        if let Some(l) = layout(line, &format!("measured line {n}"))? {
            found = Some((n, l));
            break;
        }
    }
    let Some((header_line, layout)) = found else {
        return Err(Error::invalid(
            "measured",
            "(no header)",
            "no header line naming a wavelength column (e.g. `wavelength_nm,R`)",
        ));
    };
    let mut points = Points::new(layout.quantity);
    let ignored: Vec<&str> = (0..layout.width)
        .filter(|&i| {
            i != layout.wavelength
                && Some(i) != layout.angle
                && Some(i) != layout.geometry
                && layout.values.iter().all(|v| v.0 != i)
        })
        .map(|i| layout.names[i].as_str())
        .collect();
    if !ignored.is_empty() {
        points.warn(
            WarningKind::IgnoredColumns,
            &format!("measured line {header_line}"),
            format!("columns not used: {}", ignored.join(", ")),
        );
    }
    for (n, line) in lines {
        let key = format!("measured line {n}");
        let cells = layout.separator.split(line);
        if cells.len() != layout.width {
            return Err(Error::invalid(
                &key,
                line.trim(),
                format!("expected {} columns as in the header", layout.width),
            ));
        }
        let decimal = |c: &str| {
            if layout.separator == Separator::Semicolon {
                c.replace(',', ".")
            } else {
                c.to_string()
            }
        };
        let num = |c: usize, shift: i32| -> Result<f64> {
            number(&decimal(&cells[c]), shift).ok_or_else(|| {
                Error::invalid(
                    &key,
                    &cells[c],
                    format!("{} is not a number", layout.names[c]),
                )
            })
        };
        let w = num(layout.wavelength, 0)?;
        let row_at = match (layout.angle, layout.geometry) {
            (Some(c), _) => Some(At::Angle(num(c, 0)?)),
            (_, Some(c)) => match parse_name(&cells[c], &key)?.as_slice() {
                [g] => Some(At::Geometry(g.clone())),
                _ => {
                    return Err(Error::invalid(
                        &key,
                        &cells[c],
                        "one geometry per row (a name such as 45as15, not a set)",
                    ));
                }
            },
            _ => None,
        };
        for (c, percent, fixed) in &layout.values {
            let shift = if *percent || options.percent { 2 } else { 0 };
            let v = num(*c, shift)?;
            let at = fixed
                .clone()
                .or_else(|| row_at.clone())
                .unwrap_or(At::Angle(options.default_angle_deg));
            points.add(&key, (&cells[layout.wavelength], w), (&cells[*c], v), at)?;
        }
    }
    points.finish()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn header_names_with_units_and_percent_are_recognised() {
        let key = "k";
        let value = |q, p| Column::Value {
            quantity: q,
            percent: p,
            at: None,
        };
        for (cell, want) in [
            ("Wavelength (nm)", Column::Wavelength),
            ("wavelength_nm", Column::Wavelength),
            ("WL [nm]", Column::Wavelength),
            ("lambda", Column::Wavelength),
            ("\"nm\"", Column::Wavelength),
            ("R", value(Quantity::Reflectance, false)),
            ("%R", value(Quantity::Reflectance, true)),
            ("R (%)", value(Quantity::Reflectance, true)),
            ("Reflectance_percent", value(Quantity::Reflectance, true)),
            ("%T", value(Quantity::Transmittance, true)),
            ("transmittance", value(Quantity::Transmittance, false)),
            ("angle_deg", Column::Angle),
            ("Angle (deg)", Column::Angle),
            ("geometry", Column::Geometry),
            ("sample", Column::Other),
        ] {
            assert_eq!(classify(cell, key).unwrap(), want, "{cell}");
        }
        assert_eq!(
            classify("R@45", key).unwrap(),
            Column::Value {
                quantity: Quantity::Reflectance,
                percent: false,
                at: Some(At::Angle(45.0))
            }
        );
        assert!(classify("R@sideways", key).is_err());
    }
}
