//! Writing results: to stdout, or atomically to a file (temporary file in the
//! same folder, then rename), so a reader never sees half a file.

use std::fs;
use std::io::{self, Write};
use std::path::Path;

/// Writes the concatenated `chunks` to `path` atomically, or to stdout when
/// `path` is `None`. Special files such as `/dev/null` are written in place.
pub fn emit(path: Option<&Path>, chunks: &[Vec<u8>]) -> io::Result<()> {
    emit_with(path, |out| chunks.iter().try_for_each(|c| out.write_all(c)))
}

/// Like [`emit`], with the content produced by `write` as it goes, so large
/// outputs need not be held in memory whole.
pub fn emit_with(
    path: Option<&Path>,
    write: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> io::Result<()> {
    let write_all = |out: &mut dyn Write| -> io::Result<()> {
        write(out)?;
        out.flush()
    };
    let Some(path) = path else {
        return match write_all(&mut io::stdout().lock()) {
            Err(e) if e.kind() == io::ErrorKind::BrokenPipe => Ok(()),
            other => other,
        };
    };
    if fs::metadata(path).is_ok_and(|m| !m.is_file()) {
        return write_all(&mut fs::OpenOptions::new().write(true).open(path)?);
    }
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .ok_or_else(|| io::Error::new(io::ErrorKind::InvalidInput, "not a file name"))?;
    let tmp = dir.join(format!(
        ".{}.{}.tmp",
        name.to_string_lossy(),
        std::process::id()
    ));
    let result = fs::File::create(&tmp)
        .and_then(|mut f| write_all(&mut f))
        .and_then(|_| fs::rename(&tmp, path));
    if result.is_err() {
        let _ = fs::remove_file(&tmp);
    }
    result
}
