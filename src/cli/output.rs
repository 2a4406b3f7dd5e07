//! Writing results: to stdout, or atomically to a file (temporary file in the
//! same folder, then rename), so a reader never sees half a file. A run
//! stopped by SIGINT, SIGTERM or SIGHUP removes its temporary files and exits
//! with 128 + the signal number (130, 143, 129).

use std::fs;
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::{Mutex, MutexGuard, Once, PoisonError};

use signal_hook::consts::{SIGHUP, SIGINT, SIGTERM};
use signal_hook::iterator::Signals;

/// Temporary files being written; a signal removes them before exiting.
static TEMPORARY: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

fn temporary() -> MutexGuard<'static, Vec<PathBuf>> {
    TEMPORARY.lock().unwrap_or_else(PoisonError::into_inner)
}

/// Starts, once, the thread that waits for a stopping signal, removes the
/// temporary files and exits. Files are created, renamed and removed under
/// the same lock, so none is left behind whenever the signal comes.
pub fn clean_up_on_signal() {
    static START: Once = Once::new();
    START.call_once(|| {
        let Ok(mut signals) = Signals::new([SIGINT, SIGTERM, SIGHUP]) else {
            return;
        };
        std::thread::spawn(move || {
            if let Some(signal) = signals.forever().next() {
                let files = temporary();
                for f in files.iter() {
                    let _ = fs::remove_file(f);
                }
                std::process::exit(128 + signal);
            }
        });
    });
}

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
    clean_up_on_signal();
    let created = {
        let mut files = temporary();
        let file = fs::File::create(&tmp);
        if file.is_ok() {
            files.push(tmp.clone());
        }
        file
    };
    let result = created
        .and_then(|mut f| write_all(&mut f))
        .and_then(|()| fs::rename(&tmp, path));
    let mut files = temporary();
    files.retain(|f| f != &tmp);
    if result.is_err() {
        let _ = fs::remove_file(&tmp);
    }
    result
}
