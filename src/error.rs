//! Typed errors of the engine. The command line adds the file name and maps
//! [`Error::NotComputable`] to exit code 1 and every other variant to exit
//! code 2 (bad input).

use std::borrow::Cow;
use std::fmt::Display;

/// Result with the engine's error.
pub type Result<T> = std::result::Result<T, Error>;

/// `text` with control characters and line separators escaped (`\n`,
/// `\u{1b}`), so that a message naming a user's key or value is always one
/// line and cannot drive the terminal.
pub fn one_line(text: &str) -> Cow<'_, str> {
    let odd = |c: char| c.is_control() || matches!(c, '\u{2028}' | '\u{2029}');
    if !text.contains(odd) {
        return Cow::Borrowed(text);
    }
    let escape = |c: char| {
        if odd(c) {
            c.escape_default().to_string()
        } else {
            c.to_string()
        }
    };
    Cow::Owned(text.chars().map(escape).collect())
}

/// A number as written by `{}`, or in exponent form when that would take
/// more than 24 characters (1e-320, not 320 digits).
fn compact(x: f64) -> String {
    let plain = x.to_string();
    if plain.len() > 24 {
        format!("{x:e}")
    } else {
        plain
    }
}

/// What went wrong, always naming the key and the offending value (printed
/// on one line: see [`one_line`]).
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// A value is out of its allowed domain.
    #[error("{} = {}: {}", one_line(.key), one_line(.value), one_line(.why))]
    Invalid {
        /// Dotted path of the key, e.g. `stack[2].thickness_nm`.
        key: String,
        /// The value as written.
        value: String,
        /// What is wrong with it.
        why: String,
    },
    /// A name that is neither in the scene's `materials` nor built in.
    #[error(
        "{} = \"{}\": unknown material (not in `materials` nor built in; see `lamella materials`)",
        one_line(.key),
        one_line(.name)
    )]
    UnknownMaterial {
        /// Where the name was used.
        key: String,
        /// The unknown name.
        name: String,
    },
    /// Text that is not valid JSON.
    #[error("malformed JSON at line {line}, column {column}: {}", one_line(.message))]
    Syntax {
        /// 1-based line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// What the parser expected.
        message: String,
    },
    /// A wavelength outside a tabulated material's data.
    #[error(
        "{}: wavelength {} nm is outside the material's table ({}–{} nm)",
        one_line(.key),
        compact(*.wavelength_nm),
        compact(*.min_nm),
        compact(*.max_nm)
    )]
    OutOfRange {
        /// The material's key.
        key: String,
        /// Requested wavelength.
        wavelength_nm: f64,
        /// First tabulated wavelength.
        min_nm: f64,
        /// Last tabulated wavelength.
        max_nm: f64,
    },
    /// A result that is not a finite number at one point (a wavelength,
    /// angle or geometry): it is refused rather than printed.
    #[error("{what} cannot be computed at {at}: {why}")]
    NotComputable {
        /// The quantity, e.g. `R_s` or `colour`.
        what: String,
        /// The point, e.g. `512 nm, 30°`.
        at: String,
        /// What came out instead (NaN, infinity).
        why: String,
    },
}

impl Error {
    /// Builds [`Error::Invalid`] from anything printable.
    pub fn invalid(key: impl Into<String>, value: impl Display, why: impl Into<String>) -> Self {
        let mut value = value.to_string();
        if value.len() > 24
            && let Ok(x) = value.parse::<f64>()
        {
            value = compact(x);
        }
        Error::Invalid {
            key: key.into(),
            value,
            why: why.into(),
        }
    }

    /// [`Error::NotComputable`] for `value` of `what` at `at`.
    pub fn not_computable(what: impl Into<String>, at: impl Into<String>, value: f64) -> Self {
        Error::NotComputable {
            what: what.into(),
            at: at.into(),
            why: format!("the result is {value}, not a finite number"),
        }
    }

    /// Prefixes the key with a parent path (`stack[3]` + `thickness_nm`).
    pub fn within(self, parent: &str) -> Self {
        let join = |k: String| {
            if k.is_empty() {
                parent.to_string()
            } else {
                format!("{parent}.{k}")
            }
        };
        match self {
            Error::Invalid { key, value, why } => Error::Invalid {
                key: join(key),
                value,
                why,
            },
            Error::UnknownMaterial { key, name } => Error::UnknownMaterial {
                key: join(key),
                name,
            },
            Error::OutOfRange {
                key,
                wavelength_nm,
                min_nm,
                max_nm,
            } => Error::OutOfRange {
                key: join(key),
                wavelength_nm,
                min_nm,
                max_nm,
            },
            other @ (Error::Syntax { .. } | Error::NotComputable { .. }) => other,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_breaks_and_control_characters_in_keys_and_values_are_escaped() {
        let e = Error::invalid("a\nb", "x\r\u{1b}[2J\u{2028}", "why\n");
        assert_eq!(e.to_string(), "a\\nb = x\\r\\u{1b}[2J\\u{2028}: why\\n");
        let e = Error::UnknownMaterial {
            key: "stack[0]".into(),
            name: "glass\n".into(),
        };
        assert!(
            e.to_string()
                .starts_with("stack[0] = \"glass\\n\": unknown"),
            "{e}"
        );
        assert_eq!(one_line("plain ΔE00 ±1"), "plain ΔE00 ±1");
    }
}
