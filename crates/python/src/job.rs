//! Long calls: the work runs on a named worker thread while the caller waits with the
//! GIL released. Every few tens of milliseconds the caller takes the GIL back to look
//! for Ctrl-C (`KeyboardInterrupt`) and to report progress to the user's callback; a
//! cancel flag, checked by the engine per point, stops the worker early.

use crate::errors::{Failure, Outcome, panic_message};
use pyo3::prelude::*;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::mpsc;
use std::sync::{Arc, Mutex};
use std::time::Duration;

/// How often the waiting caller looks for Ctrl-C and reports progress.
const POLL: Duration = Duration::from_millis(50);

/// What a worker shares with the caller: points done and the cancel flag.
#[derive(Debug, Default)]
pub struct Job {
    /// Points (or steps) finished so far.
    pub done: AtomicUsize,
    /// Set by the caller to stop the work (Ctrl-C, or a callback that raised).
    pub cancel: AtomicBool,
}

impl Job {
    /// A progress sink for the engine's `&(dyn Fn(usize) + Sync)` parameters.
    pub fn progress(&self) -> impl Fn(usize) + Sync + '_ {
        move |n| {
            self.done.fetch_max(n, Ordering::Relaxed);
        }
    }
}

/// Runs `work` on a worker thread, the GIL released. `progress` (a Python callable
/// taking (done, total)) is called from the caller's thread as the count moves; Ctrl-C
/// or a raising callback cancels the job. A panic in the worker becomes a
/// `RuntimeError`.
pub fn run<T, F>(py: Python<'_>, progress: Option<&Bound<'_, PyAny>>, total: usize, work: F) -> Outcome<T>
where
    T: Send + 'static,
    F: FnOnce(&Job) -> Outcome<T> + Send + 'static,
{
    let job = Arc::new(Job::default());
    let (tx, rx) = mpsc::channel::<Outcome<T>>();
    // Shared by reference with the GIL-free wait, which needs `Sync`.
    let rx = Mutex::new(rx);
    let worker_job = Arc::clone(&job);
    std::thread::Builder::new()
        .name("quenchless-job".into())
        .spawn(move || {
            let out = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| work(&worker_job)))
                .unwrap_or_else(|payload| Err(Failure::Runtime(panic_message(payload.as_ref()))));
            // The caller may have stopped waiting (Ctrl-C): then nobody reads this.
            let _ = tx.send(out);
        })
        .map_err(|e| Failure::Runtime(format!("could not start a worker thread: {e}")))?;
    let mut reported = usize::MAX;
    loop {
        match py.detach(|| rx.lock().map_or(Err(mpsc::RecvTimeoutError::Disconnected), |r| r.recv_timeout(POLL))) {
            Ok(out) => {
                report(progress, &job, total, &mut reported)?;
                return out;
            }
            Err(mpsc::RecvTimeoutError::Disconnected) => {
                return Err(Failure::Runtime("the worker thread ended without a result".into()));
            }
            Err(mpsc::RecvTimeoutError::Timeout) => {}
        }
        let checked =
            py.check_signals().map_err(Failure::Python).and_then(|()| report(progress, &job, total, &mut reported));
        if let Err(e) = checked {
            // The worker stops at its next cancel check; its result is dropped.
            job.cancel.store(true, Ordering::Relaxed);
            return Err(e);
        }
    }
}

/// Calls the progress callback if the count moved since the last call.
fn report(progress: Option<&Bound<'_, PyAny>>, job: &Job, total: usize, reported: &mut usize) -> Outcome<()> {
    let Some(cb) = progress else { return Ok(()) };
    let done = job.done.load(Ordering::Relaxed);
    if done != *reported {
        *reported = done;
        cb.call1((done, total)).map_err(Failure::Python)?;
    }
    Ok(())
}
