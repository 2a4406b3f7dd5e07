//! Writing files the way the command line does: whole or not at all.

use std::path::Path;

use pyo3::prelude::*;

use crate::errors::Failure;

/// Writes `bytes` to `path` through a temporary file in the same folder and
/// a rename, so a reader never sees half a file.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> PyResult<()> {
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .ok_or_else(|| Failure::input(format!("{}: not a file name", path.display())))?;
    let tmp = dir.join(format!(
        ".{}.{}.tmp",
        name.to_string_lossy(),
        std::process::id()
    ));
    let written = std::fs::write(&tmp, bytes).and_then(|()| std::fs::rename(&tmp, path));
    if let Err(e) = written {
        let _ = std::fs::remove_file(&tmp);
        return Err(pyo3::exceptions::PyOSError::new_err(format!(
            "{}: cannot write: {e}",
            path.display()
        )));
    }
    Ok(())
}
