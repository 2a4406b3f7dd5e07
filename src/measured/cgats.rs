//! CGATS.17 text files (ANSI CGATS.17, "Graphic technology — Exchange format
//! for colour and process control data using XML or ASCII text", and its
//! international form ISO 28178:2009), read for their spectral samples and
//! written for spectra and colours.
//!
//! lamella does not have the standard's text: the structure below is
//! written **from memory** and kept to the parts in wide use. A file is a
//! first line naming the format (`CGATS.17`), keyword lines
//! (`ORIGINATOR "…"`, `NUMBER_OF_FIELDS 41`, user keywords declared with
//! `KEYWORD "NAME"`), the field names between `BEGIN_DATA_FORMAT` and
//! `END_DATA_FORMAT`, `NUMBER_OF_SETS`, and the data sets between
//! `BEGIN_DATA` and `END_DATA`, one set per line, cells separated by white
//! space; strings are in double quotes; `#` starts a comment.
//!
//! Spectral fields are named `SPECTRAL_NM380`, `SPECTRAL_NM_380` or
//! `SPECTRAL_380` (wavelength in nm, decimals allowed). Their values are in
//! percent (0–100), which is common practice for reflectance in CGATS
//! files (from memory); a file holding fractions says so with lamella's
//! own keyword `SPECTRAL_SCALE "fraction"` (`"percent"` is the default).
//! Other lamella keywords: `SPECTRAL_QUANTITY "reflectance"` or
//! `"transmittance"` (default reflectance). Each set's angle comes from an
//! `ANGLE_DEG` field, its geometry from a `GEOMETRY` field (a name such as
//! `45as15`); the same names as keywords give one angle or geometry for the
//! whole file; a set with neither is at the default angle. `SAMPLE_ID` and
//! `SAMPLE_NAME` label the sets and are otherwise not used.

use super::{Points, Quantity, ReadOptions, Reading, number, percent_text};
use crate::design::coating::At;
use crate::error::{Error, Result};
use crate::pigment::parse_name;

/// Whether `text` is laid out as CGATS (it has a `BEGIN_DATA_FORMAT` line).
pub fn looks_like(text: &str) -> bool {
    text.lines().any(|l| l.trim() == "BEGIN_DATA_FORMAT")
}

/// The cells of a line: words, and double-quoted strings kept whole (the
/// quotes removed); `#` outside a string ends the line. `None` for an
/// unclosed quote.
fn cells(line: &str) -> Option<Vec<(String, bool)>> {
    let mut out = Vec::new();
    let mut chars = line.chars().peekable();
    while let Some(&c) = chars.peek() {
        if c.is_whitespace() {
            chars.next();
        } else if c == '#' {
            break;
        } else if c == '"' {
            chars.next();
            let mut s = String::new();
            loop {
                match chars.next()? {
                    '"' => break,
                    ch => s.push(ch),
                }
            }
            out.push((s, true));
        } else {
            let mut s = String::new();
            while let Some(&ch) = chars.peek() {
                if ch.is_whitespace() {
                    break;
                }
                s.push(ch);
                chars.next();
            }
            out.push((s, false));
        }
    }
    Some(out)
}

/// The wavelength of a spectral field name, if it is one.
fn spectral_nm(field: &str) -> Option<f64> {
    let upper = field.to_ascii_uppercase();
    let rest = upper.strip_prefix("SPECTRAL_")?;
    let rest = rest.strip_prefix("NM").unwrap_or(rest);
    let rest = rest.strip_prefix('_').unwrap_or(rest);
    rest.parse::<f64>().ok().filter(|w| w.is_finite())
}

/// Reads the spectral samples of a CGATS file (see the module documentation).
pub fn read(text: &str, options: &ReadOptions) -> Result<Reading> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut keywords: Vec<(String, String)> = Vec::new();
    let mut fields: Vec<String> = Vec::new();
    let mut format_line = 0;
    let mut sets: Vec<(usize, Vec<(String, bool)>)> = Vec::new();
    let mut sets_line = 0;
    #[derive(PartialEq)]
    enum Part {
        Header,
        Format,
        Data,
        Done,
    }
    let mut part = Part::Header;
    for (i, line) in text.lines().enumerate() {
        let n = i + 1;
        let key = format!("measured line {n}");
        let words = cells(line)
            .ok_or_else(|| Error::invalid(&key, line.trim(), "a string is not closed"))?;
        let Some(((first, quoted), rest)) = words.split_first() else {
            continue;
        };
        let word = if *quoted { "" } else { first.as_str() };
        match (&part, word) {
            (Part::Header, "BEGIN_DATA_FORMAT") => {
                part = Part::Format;
                format_line = n;
            }
            (Part::Format, "END_DATA_FORMAT") => part = Part::Header,
            (Part::Format, _) => fields.extend(words.iter().map(|w| w.0.clone())),
            (Part::Header, "BEGIN_DATA") => {
                if fields.is_empty() {
                    return Err(Error::invalid(
                        &key,
                        "BEGIN_DATA",
                        "the data come before BEGIN_DATA_FORMAT … END_DATA_FORMAT",
                    ));
                }
                part = Part::Data;
                sets_line = n;
            }
            (Part::Data, "END_DATA") => part = Part::Done,
            (Part::Data, _) => {
                if words.len() != fields.len() {
                    return Err(Error::invalid(
                        &key,
                        line.trim(),
                        format!("expected {} values, one per field", fields.len()),
                    ));
                }
                sets.push((n, words));
            }
            (Part::Header | Part::Done, _) if n == 1 || word == "KEYWORD" => {}
            (Part::Header | Part::Done, _) => {
                let value = rest.first().map(|v| v.0.clone()).unwrap_or_default();
                keywords.push((first.to_ascii_uppercase(), value));
            }
        }
    }
    if part == Part::Format || part == Part::Data {
        return Err(Error::invalid(
            "measured",
            if part == Part::Format {
                "BEGIN_DATA_FORMAT"
            } else {
                "BEGIN_DATA"
            },
            "is not closed (END_DATA_FORMAT, END_DATA)",
        ));
    }
    if sets_line == 0 {
        return Err(Error::invalid(
            "measured",
            "(no BEGIN_DATA)",
            "no data sets",
        ));
    }
    let keyword = |name: &str| {
        keywords
            .iter()
            .find(|(k, _)| k == name)
            .map(|(_, v)| v.as_str())
    };
    let count = |name: &str, want: usize, line: usize| -> Result<()> {
        match keyword(name) {
            Some(v) if v.parse::<usize>().ok() != Some(want) => Err(Error::invalid(
                format!("measured {name}"),
                v,
                format!("the file has {want} (line {line})"),
            )),
            _ => Ok(()),
        }
    };
    count("NUMBER_OF_FIELDS", fields.len(), format_line)?;
    count("NUMBER_OF_SETS", sets.len(), sets_line)?;
    let quantity = match keyword("SPECTRAL_QUANTITY")
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        None | Some("reflectance" | "r") => Quantity::Reflectance,
        Some("transmittance" | "t") => Quantity::Transmittance,
        Some(other) => {
            return Err(Error::invalid(
                "measured SPECTRAL_QUANTITY",
                other,
                "expected \"reflectance\" or \"transmittance\"",
            ));
        }
    };
    let shift = match keyword("SPECTRAL_SCALE")
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        None | Some("percent") => 2,
        Some("fraction") if options.percent => 2,
        Some("fraction") => 0,
        Some(other) => {
            return Err(Error::invalid(
                "measured SPECTRAL_SCALE",
                other,
                "expected \"percent\" or \"fraction\"",
            ));
        }
    };
    let mut spectral: Vec<(usize, f64)> = Vec::new();
    for (i, f) in fields.iter().enumerate() {
        if let Some(w) = spectral_nm(f) {
            if spectral.last().is_some_and(|&(_, last)| !(w > last)) {
                return Err(Error::invalid(
                    format!("measured line {format_line}"),
                    f,
                    "spectral fields must follow increasing wavelength",
                ));
            }
            spectral.push((i, w));
        }
    }
    if spectral.is_empty() {
        return Err(Error::invalid(
            format!("measured line {format_line}"),
            fields.join(" "),
            "no spectral fields (SPECTRAL_NM380 …)",
        ));
    }
    let field = |name: &str| fields.iter().position(|f| f.eq_ignore_ascii_case(name));
    let (angle, geometry) = (field("ANGLE_DEG"), field("GEOMETRY"));
    let point = |text: &str, is_angle: bool, key: &str| -> Result<At> {
        if is_angle {
            number(text, 0)
                .map(At::Angle)
                .ok_or_else(|| Error::invalid(key, text, "ANGLE_DEG is not a number"))
        } else {
            match parse_name(text, key)?.as_slice() {
                [g] => Ok(At::Geometry(g.clone())),
                _ => Err(Error::invalid(
                    key,
                    text,
                    "one geometry name such as 45as15",
                )),
            }
        }
    };
    let whole_file = match (keyword("ANGLE_DEG"), keyword("GEOMETRY")) {
        (Some(a), _) => Some(point(a, true, "measured ANGLE_DEG")?),
        (_, Some(g)) => Some(point(g, false, "measured GEOMETRY")?),
        _ => None,
    };
    let mut points = Points::new(quantity);
    for (n, set) in &sets {
        let key = format!("measured line {n}");
        let at = match (angle, geometry) {
            (Some(c), _) => point(&set[c].0, true, &key)?,
            (_, Some(c)) => point(&set[c].0, false, &key)?,
            _ => whole_file
                .clone()
                .unwrap_or(At::Angle(options.default_angle_deg)),
        };
        if points.has(&at) {
            return Err(Error::invalid(
                &key,
                at.describe(),
                "a second sample at this point: give each sample its own angle or geometry",
            ));
        }
        for &(c, w) in &spectral {
            let cell = &set[c].0;
            let v = number(cell, shift).ok_or_else(|| {
                Error::invalid(&key, cell, format!("{} is not a number", fields[c]))
            })?;
            points.add(&key, (&fields[c], w), (cell, v), at.clone())?;
        }
    }
    points.finish()
}

/// A CGATS document to write: keywords, field names and data sets.
#[derive(Debug, Clone, PartialEq)]
pub struct Document {
    /// The file's description (`DESCRIPTOR`).
    pub descriptor: String,
    /// When it was made (`CREATED`), ISO 8601; the caller reads the clock.
    pub created: String,
    /// Further keywords and their values, in order; names not defined by
    /// the standard are declared with `KEYWORD` when written.
    pub keywords: Vec<(String, Cell)>,
    /// Field names.
    pub fields: Vec<String>,
    /// Data sets, one cell per field.
    pub sets: Vec<Vec<Cell>>,
}

/// One value of a CGATS file.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    /// A number, written in its shortest round-trip form.
    Number(f64),
    /// A fraction written in percent with digits that read back exactly.
    Percent(f64),
    /// A string, written in double quotes.
    Text(String),
}

impl Cell {
    fn write(&self) -> String {
        match self {
            Cell::Number(v) => v.to_string(),
            Cell::Percent(v) => percent_text(*v),
            Cell::Text(s) => format!("\"{}\"", s.replace('"', "'")),
        }
    }
}

/// Keywords the standard defines, written without a `KEYWORD` declaration
/// (from memory).
const STANDARD_KEYWORDS: [&str; 8] = [
    "ORIGINATOR",
    "DESCRIPTOR",
    "CREATED",
    "MANUFACTURER",
    "PROD_DATE",
    "SERIAL",
    "MATERIAL",
    "INSTRUMENTATION",
];

/// Field names the standard defines (from memory); others are declared.
fn standard_field(name: &str) -> bool {
    spectral_nm(name).is_some()
        || matches!(
            name,
            "SAMPLE_ID"
                | "SAMPLE_NAME"
                | "XYZ_X"
                | "XYZ_Y"
                | "XYZ_Z"
                | "XYY_X"
                | "XYY_Y"
                | "XYY_CAPY"
                | "LAB_L"
                | "LAB_A"
                | "LAB_B"
                | "LAB_C"
                | "LAB_H"
        )
}

impl Document {
    /// The document as CGATS.17 text (lines end in `\n`).
    pub fn write(&self) -> String {
        let line_safe = |s: &str| crate::error::one_line(s).replace('"', "'");
        let mut out = String::from("CGATS.17\n");
        out.push_str(&format!(
            "ORIGINATOR \"lamella {}\"\n",
            crate::report::VERSION
        ));
        out.push_str(&format!("DESCRIPTOR \"{}\"\n", line_safe(&self.descriptor)));
        out.push_str(&format!("CREATED \"{}\"\n", line_safe(&self.created)));
        for (k, v) in &self.keywords {
            if !STANDARD_KEYWORDS.contains(&k.as_str()) {
                out.push_str(&format!("KEYWORD \"{k}\"\n"));
            }
            out.push_str(&format!("{k} {}\n", v.write()));
        }
        for f in self.fields.iter().filter(|f| !standard_field(f)) {
            out.push_str(&format!("KEYWORD \"{f}\"\n"));
        }
        out.push_str(&format!("NUMBER_OF_FIELDS {}\n", self.fields.len()));
        out.push_str("BEGIN_DATA_FORMAT\n");
        out.push_str(&self.fields.join(" "));
        out.push_str("\nEND_DATA_FORMAT\n");
        out.push_str(&format!("NUMBER_OF_SETS {}\n", self.sets.len()));
        out.push_str("BEGIN_DATA\n");
        for set in &self.sets {
            let cells: Vec<String> = set.iter().map(Cell::write).collect();
            out.push_str(&cells.join(" "));
            out.push('\n');
        }
        out.push_str("END_DATA\n");
        out
    }
}

/// The name of a spectral field at `wavelength_nm` (`SPECTRAL_NM380`).
pub fn spectral_field(wavelength_nm: f64) -> String {
    format!("SPECTRAL_NM{wavelength_nm}")
}

/// Spectra at angles or geometries as a CGATS document: one set per group
/// (`SAMPLE_ID`, `SAMPLE_NAME`, `ANGLE_DEG` or `GEOMETRY`, then the spectral
/// fields in percent). Every group must share the first group's wavelengths.
pub fn spectra_document(
    descriptor: &str,
    created: &str,
    quantity: Quantity,
    groups: &[super::Measured],
) -> Result<Document> {
    let first = groups
        .first()
        .ok_or_else(|| Error::invalid("spectra", "(none)", "nothing to write"))?;
    let geometry = first.at.geometry().is_some();
    let mut fields = vec![
        "SAMPLE_ID".to_string(),
        "SAMPLE_NAME".to_string(),
        if geometry { "GEOMETRY" } else { "ANGLE_DEG" }.to_string(),
    ];
    fields.extend(first.wavelengths_nm.iter().map(|&w| spectral_field(w)));
    let mut sets = Vec::new();
    for (i, g) in groups.iter().enumerate() {
        if g.wavelengths_nm != first.wavelengths_nm || g.at.geometry().is_some() != geometry {
            return Err(Error::invalid(
                format!("spectra[{i}]"),
                g.at.describe(),
                "every sample of one file shares the wavelengths and the kind of point",
            ));
        }
        let mut set = vec![
            Cell::Number((i + 1) as f64),
            Cell::Text(g.at.describe()),
            match &g.at {
                At::Angle(a) => Cell::Number(*a),
                At::Geometry(geo) => Cell::Text(geo.name.clone()),
            },
        ];
        set.extend(g.r.iter().map(|&v| Cell::Percent(v)));
        sets.push(set);
    }
    Ok(Document {
        descriptor: descriptor.to_string(),
        created: created.to_string(),
        keywords: vec![
            (
                "SPECTRAL_QUANTITY".into(),
                Cell::Text(quantity.name().into()),
            ),
            ("SPECTRAL_SCALE".into(), Cell::Text("percent".into())),
        ],
        fields,
        sets,
    })
}

/// Colours at angles or geometries as a CGATS document: `SAMPLE_ID`,
/// `SAMPLE_NAME`, `ANGLE_DEG` or `GEOMETRY`, then `XYZ_X`, `XYZ_Y`, `XYZ_Z`
/// (Y = 100 for the perfect diffuser), `LAB_L`, `LAB_A`, `LAB_B`, `LAB_C`,
/// `LAB_H`; the light and observer as keywords.
pub fn colour_document(
    descriptor: &str,
    created: &str,
    light: (&str, &str),
    points: &[(At, &crate::colorimetry::Colour)],
) -> Document {
    let geometry = points.first().is_some_and(|(a, _)| a.geometry().is_some());
    let mut fields: Vec<String> = ["SAMPLE_ID", "SAMPLE_NAME"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    fields.push(if geometry { "GEOMETRY" } else { "ANGLE_DEG" }.into());
    for f in [
        "XYZ_X", "XYZ_Y", "XYZ_Z", "LAB_L", "LAB_A", "LAB_B", "LAB_C", "LAB_H",
    ] {
        fields.push(f.into());
    }
    let sets = points
        .iter()
        .enumerate()
        .map(|(i, (at, c))| {
            let mut set = vec![
                Cell::Number((i + 1) as f64),
                Cell::Text(at.describe()),
                match at {
                    At::Angle(a) => Cell::Number(*a),
                    At::Geometry(g) => Cell::Text(g.name.clone()),
                },
            ];
            set.extend(
                c.xyz
                    .iter()
                    .chain(&c.lab)
                    .chain(&c.lch[1..])
                    .map(|&v| Cell::Number(v)),
            );
            set
        })
        .collect();
    Document {
        descriptor: descriptor.to_string(),
        created: created.to_string(),
        keywords: vec![
            ("ILLUMINANT".into(), Cell::Text(light.0.into())),
            ("OBSERVER".into(), Cell::Text(light.1.into())),
        ],
        fields,
        sets,
    }
}
