//! Measured files for `fit` and `compare`: read the file, hand the text to
//! the library's reader, print its warnings.

use std::path::Path;

use lamella::measured::{ReadOptions, Reading, read};

use super::Failure;

/// Reads and parses a measured file (table or CGATS); errors name the file,
/// the line and the value; warnings go to stderr.
pub fn read_file(path: &Path, options: &ReadOptions) -> Result<Reading, Failure> {
    let bytes = std::fs::read(path)
        .map_err(|e| Failure::input(format!("{}: cannot read: {e}", path.display())))?;
    let text = String::from_utf8(bytes).map_err(|e| {
        Failure::input(format!(
            "{}: byte {} = not UTF-8 text: save the file as UTF-8",
            path.display(),
            e.utf8_error().valid_up_to()
        ))
    })?;
    let reading =
        read(&text, options).map_err(|e| Failure::input(format!("{}: {e}", path.display())))?;
    for w in &reading.warnings {
        eprintln!("lamella: warning: {}: {w}", path.display());
    }
    Ok(reading)
}
