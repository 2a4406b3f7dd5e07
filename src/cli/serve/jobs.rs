//! Work that outlives one moment: generation counters, so that a newer live
//! request supersedes an older one still running, and the match job (one
//! at a time) with its progress and cancel flag.

use std::collections::HashMap;
use std::panic::resume_unwind;
use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};
use std::sync::{Arc, Mutex, MutexGuard, PoisonError};

use serde_json::Value;

/// Most channels remembered (page sessions × request kinds); beyond, the
/// table starts afresh (an older request then simply runs to its end).
const MAX_CHANNELS: usize = 256;

/// The server's jobs.
#[derive(Default)]
pub struct Jobs {
    channels: Mutex<HashMap<String, Arc<AtomicU64>>>,
    current: Mutex<Option<Arc<MatchJob>>>,
    next_id: AtomicU64,
}

fn lock<T>(m: &Mutex<T>) -> MutexGuard<'_, T> {
    m.lock().unwrap_or_else(PoisonError::into_inner)
}

/// A request's place in its channel: stale once a newer one arrived.
pub struct Ticket {
    counter: Arc<AtomicU64>,
    mine: u64,
}

/// The answer of a superseded request.
#[derive(Debug)]
pub struct Superseded;

impl Ticket {
    /// `Err(Superseded)` once a newer request of the same channel arrived.
    pub fn current(&self) -> Result<(), Superseded> {
        if self.counter.load(Ordering::SeqCst) == self.mine {
            Ok(())
        } else {
            Err(Superseded)
        }
    }
}

/// The payload of the unwind that leaves a cancelled search from inside
/// its progress callback.
pub struct Cancelled;

/// One run of `match`.
pub struct MatchJob {
    /// Its number, for the status and cancel calls.
    pub id: u64,
    /// The evaluation budget.
    pub max_evals: usize,
    /// Evaluations so far.
    pub evaluations: AtomicUsize,
    /// Best cost so far (bits of an f64).
    best: AtomicU64,
    cancel: AtomicBool,
    /// The result once finished: the response body, and whether it is an
    /// error.
    pub outcome: Mutex<Option<(bool, Value)>>,
}

impl MatchJob {
    /// Records progress; leaves the search by unwinding once cancelled.
    pub fn progress(&self, evaluations: usize, best: f64) {
        self.evaluations.store(evaluations, Ordering::Relaxed);
        self.best.store(best.to_bits(), Ordering::Relaxed);
        if self.cancelled() {
            resume_unwind(Box::new(Cancelled));
        }
    }

    /// The best cost so far, when one is known.
    pub fn best(&self) -> Option<f64> {
        let b = f64::from_bits(self.best.load(Ordering::Relaxed));
        b.is_finite().then_some(b)
    }

    /// Asks the search to stop at its next progress report.
    pub fn cancel(&self) {
        self.cancel.store(true, Ordering::Relaxed);
    }

    /// Whether a cancel was asked for.
    pub fn cancelled(&self) -> bool {
        self.cancel.load(Ordering::Relaxed)
    }

    /// Stores the result.
    pub fn finish(&self, error: bool, body: Value) {
        *lock(&self.outcome) = Some((error, body));
    }
}

impl Jobs {
    /// A ticket for a new request on `channel`, superseding earlier ones.
    pub fn ticket(&self, channel: &str) -> Ticket {
        let mut channels = lock(&self.channels);
        if channels.len() >= MAX_CHANNELS && !channels.contains_key(channel) {
            channels.clear();
        }
        let counter = channels.entry(channel.to_owned()).or_default().clone();
        let mine = counter.fetch_add(1, Ordering::SeqCst) + 1;
        Ticket { counter, mine }
    }

    /// A new match job, unless one is still running.
    pub fn start_match(&self, max_evals: usize) -> Option<Arc<MatchJob>> {
        let mut current = lock(&self.current);
        if current.as_ref().is_some_and(|j| lock(&j.outcome).is_none()) {
            return None;
        }
        let job = Arc::new(MatchJob {
            id: self.next_id.fetch_add(1, Ordering::Relaxed) + 1,
            max_evals,
            evaluations: AtomicUsize::new(0),
            best: AtomicU64::new(f64::NAN.to_bits()),
            cancel: AtomicBool::new(false),
            outcome: Mutex::new(None),
        });
        *current = Some(job.clone());
        Some(job)
    }

    /// The match job with this number, if it is the latest.
    pub fn find_match(&self, id: u64) -> Option<Arc<MatchJob>> {
        lock(&self.current).clone().filter(|j| j.id == id)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_newer_ticket_supersedes_older_ones_of_its_channel_only() {
        let jobs = Jobs::default();
        let first = jobs.ticket("a/live");
        let other = jobs.ticket("b/live");
        assert!(first.current().is_ok());
        let second = jobs.ticket("a/live");
        assert!(first.current().is_err());
        assert!(second.current().is_ok() && other.current().is_ok());
    }

    #[test]
    fn one_match_at_a_time() {
        let jobs = Jobs::default();
        let job = jobs.start_match(10).expect("the first starts");
        assert!(jobs.start_match(10).is_none());
        job.finish(false, Value::Null);
        let next = jobs.start_match(10).expect("the next starts once it ends");
        assert!(jobs.find_match(job.id).is_none() && jobs.find_match(next.id).is_some());
    }
}
