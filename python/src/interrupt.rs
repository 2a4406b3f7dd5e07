//! Long calls: the GIL is released, the work runs on a thread of its own
//! (which uses the rayon pool), and the calling thread checks for Ctrl-C
//! every few milliseconds. On Ctrl-C the work is asked to stop; it stops at
//! its next check (between pieces of a grid, designs of a batch, or when an
//! engine loop reports progress) and `KeyboardInterrupt` is raised.

use std::panic::{AssertUnwindSafe, catch_unwind, resume_unwind};
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Duration;

use pyo3::prelude::*;

use crate::errors::{Failure, Outcome, internal};

/// How often the calling thread looks for a pending signal.
const POLL: Duration = Duration::from_millis(20);

/// A request to stop, set by the calling thread and read by the work.
#[derive(Debug, Default)]
pub struct Stop(AtomicBool);

/// The payload of an unwind that stops engine code from inside one of its
/// progress callbacks; caught by [`run`] and never seen by Python.
struct Interrupted;

impl Stop {
    /// Whether a stop was requested.
    pub fn requested(&self) -> bool {
        self.0.load(Ordering::Relaxed)
    }

    /// `Err(Failure::Interrupted)` once a stop was requested.
    pub fn check(&self) -> Outcome<()> {
        if self.requested() {
            Err(Failure::Interrupted)
        } else {
            Ok(())
        }
    }

    /// For engine progress callbacks, which cannot return an error: leaves
    /// the engine call by unwinding once a stop was requested. The unwind
    /// does not run the panic hook (nothing is printed) and [`run`] turns it
    /// into `KeyboardInterrupt`.
    pub fn unwind_if_requested(&self) {
        if self.requested() {
            resume_unwind(Box::new(Interrupted));
        }
    }

    fn request(&self) {
        self.0.store(true, Ordering::Relaxed);
    }
}

/// Runs `work` with the GIL released. With `watch`, it runs on a thread of
/// its own while this one checks for signals; otherwise (short work) on this
/// thread. A panic (none is expected) becomes a `RuntimeError`.
pub fn run<T: Send>(
    py: Python<'_>,
    watch: bool,
    work: impl FnOnce(&Stop) -> Outcome<T> + Send,
) -> PyResult<T> {
    let stop = Stop::default();
    let mut signal: Option<PyErr> = None;
    let outcome = py.detach(|| {
        if !watch {
            return catch_unwind(AssertUnwindSafe(|| work(&stop)));
        }
        std::thread::scope(|s| {
            let caller = std::thread::current();
            let stop = &stop;
            let handle = s.spawn(move || {
                let out = catch_unwind(AssertUnwindSafe(|| work(stop)));
                caller.unpark();
                out
            });
            while !handle.is_finished() {
                std::thread::park_timeout(POLL);
                if signal.is_none()
                    && !handle.is_finished()
                    && let Err(e) = Python::attach(|py| py.check_signals())
                {
                    signal = Some(e);
                    stop.request();
                }
            }
            handle.join().unwrap_or_else(Err)
        })
    });
    if let Some(e) = signal {
        return Err(e);
    }
    match outcome {
        Ok(Ok(v)) => Ok(v),
        Ok(Err(f)) => Err(f.into()),
        Err(payload) if payload.is::<Interrupted>() => Err(Failure::Interrupted.into()),
        Err(payload) => {
            let what = payload
                .downcast_ref::<String>()
                .cloned()
                .or_else(|| payload.downcast_ref::<&str>().map(|s| s.to_string()))
                .unwrap_or_else(|| "a panic".into());
            Err(internal(what))
        }
    }
}
