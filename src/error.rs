//! Typed errors of the engine. The command line adds the file name and maps
//! every variant to exit code 2 (bad input), except [`Error::NotFinite`]
//! (a value that cannot be computed: exit code 1).

use std::fmt::Display;

/// Result with the engine's error.
pub type Result<T> = std::result::Result<T, Error>;

/// What went wrong, always naming the key and the offending value.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// A value is out of its allowed domain.
    #[error("{key} = {value}: {why}")]
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
        "{key} = \"{name}\": unknown material (not in `materials` nor built in; see `lamella materials`)"
    )]
    UnknownMaterial {
        /// Where the name was used.
        key: String,
        /// The unknown name.
        name: String,
    },
    /// Text that is not valid JSON.
    #[error("malformed JSON at line {line}, column {column}: {message}")]
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
        "{key}: wavelength {wavelength_nm} nm is outside the material's table ({min_nm}–{max_nm} nm)"
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
    /// A value of a valid design that cannot be computed (not finite).
    #[error("{at}: {what} is not finite")]
    NotFinite {
        /// Where, e.g. `angle 30°` or `geometry 45as15`.
        at: String,
        /// What, e.g. `the colour`.
        what: String,
    },
}

impl Error {
    /// Builds [`Error::Invalid`] from anything printable.
    pub fn invalid(key: impl Into<String>, value: impl Display, why: impl Into<String>) -> Self {
        let mut value = value.to_string();
        // Very large or small numbers print in exponent form, not 300 digits.
        if value.len() > 24
            && let Ok(x) = value.parse::<f64>()
        {
            value = format!("{x:e}");
        }
        Error::Invalid {
            key: key.into(),
            value,
            why: why.into(),
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
            other @ (Error::Syntax { .. } | Error::NotFinite { .. }) => other,
        }
    }
}
