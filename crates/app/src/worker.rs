//! Long jobs off the UI thread: a named worker thread, progress and a status line
//! shared through atomics, the result over a channel polled by the app, and cancel
//! through an atomic flag the physics checks per step; a job that returns what it had
//! when cancelled keeps it. Dropping a job cancels it.

use crate::error::{AppError, AppResult};
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::mpsc::{Receiver, TryRecvError, channel};
use std::sync::{Arc, Mutex};
use std::time::Instant;

/// What a job reports: the worker's side of it.
#[derive(Debug, Clone)]
pub struct Progress {
    done: Arc<AtomicUsize>,
    cancel: Arc<AtomicBool>,
    note: Arc<Mutex<String>>,
    ctx: Option<egui::Context>,
}

impl Progress {
    /// A progress nobody watches: for running a job's work on the calling thread.
    pub fn detached() -> Self {
        Self {
            done: Arc::new(AtomicUsize::new(0)),
            cancel: Arc::new(AtomicBool::new(false)),
            note: Arc::new(Mutex::new(String::new())),
            ctx: None,
        }
    }

    /// Sets the number of finished units and asks for a repaint.
    pub fn set(&self, done: usize) {
        self.done.store(done, Ordering::Relaxed);
        if let Some(c) = &self.ctx {
            c.request_repaint();
        }
    }

    /// Sets the status line shown beside the progress bar.
    pub fn note(&self, text: impl Into<String>) {
        if let Ok(mut n) = self.note.lock() {
            *n = text.into();
        }
        if let Some(c) = &self.ctx {
            c.request_repaint();
        }
    }

    /// The cancel flag, for physics functions that check it per step.
    pub fn cancel_flag(&self) -> &AtomicBool {
        &self.cancel
    }

    /// Whether cancel was asked for.
    pub fn cancelled(&self) -> bool {
        self.cancel.load(Ordering::Relaxed)
    }
}

/// A job running on a worker thread.
#[derive(Debug)]
pub struct Job<T> {
    progress: Progress,
    rx: Receiver<AppResult<T>>,
    /// Units of work in all (0 when unknown).
    pub total: usize,
    started: Instant,
}

/// The message of a job stopped by its cancel button.
pub const CANCELLED: &str = "cancelled; nothing was changed";

impl<T: Send + 'static> Job<T> {
    /// Starts `work` on a thread named `quenchless-{name}`. `total` is the number of
    /// units `work` reports through [`Progress::set`] (0 if it cannot tell).
    pub fn start(
        name: &str,
        total: usize,
        ctx: Option<egui::Context>,
        work: impl FnOnce(&Progress) -> AppResult<T> + Send + 'static,
    ) -> AppResult<Self> {
        let progress = Progress { ctx, ..Progress::detached() };
        let (tx, rx) = channel();
        let theirs = progress.clone();
        std::thread::Builder::new()
            .name(format!("quenchless-{name}"))
            .spawn(move || {
                // A job that returns what it had when cancelled keeps it (a partial map);
                // one that fails on a cancel says it was cancelled.
                let out = match work(&theirs) {
                    Err(_) if theirs.cancelled() => Err(AppError::Cancelled),
                    out => out,
                };
                let _ = tx.send(out);
                if let Some(c) = &theirs.ctx {
                    c.request_repaint();
                }
            })
            .map_err(|e| AppError::Worker(format!("{name}: cannot start the worker thread: {e}")))?;
        Ok(Self { progress, rx, total, started: Instant::now() })
    }

    /// The result once the worker is done (`Err` for a failure or a cancel); never blocks.
    pub fn poll(&mut self) -> Option<AppResult<T>> {
        match self.rx.try_recv() {
            Ok(r) => Some(r),
            Err(TryRecvError::Empty) => None,
            Err(TryRecvError::Disconnected) => {
                Some(Err(AppError::Worker("the worker stopped without a result".into())))
            }
        }
    }
}

impl<T> Job<T> {
    /// Asks the worker to stop at its next check.
    pub fn cancel(&self) {
        self.progress.cancel.store(true, Ordering::Relaxed);
    }

    /// Whether cancel was asked for (the worker may still be finishing a step).
    pub fn is_cancelled(&self) -> bool {
        self.progress.cancelled()
    }

    /// Units done so far.
    pub fn done(&self) -> usize {
        self.progress.done.load(Ordering::Relaxed)
    }

    /// Fraction done, 0 to 1 (0 when the total is unknown).
    pub fn fraction(&self) -> f32 {
        if self.total == 0 { 0.0 } else { (self.done() as f32 / self.total as f32).clamp(0.0, 1.0) }
    }

    /// The worker's status line.
    pub fn note(&self) -> String {
        self.progress.note.lock().map(|n| n.clone()).unwrap_or_default()
    }

    /// Seconds since the start.
    pub fn seconds(&self) -> f64 {
        self.started.elapsed().as_secs_f64()
    }
}

impl<T> Drop for Job<T> {
    /// A job nobody waits for any more stops its worker.
    fn drop(&mut self) {
        self.cancel();
    }
}

/// Draws a running job: progress bar (or the status line alone when the total is
/// unknown) and a cancel button labelled `cancel_label`. Returns true when a job ran.
pub fn job_ui<T>(ui: &mut egui::Ui, job: Option<&Job<T>>, cancel_label: &str) -> bool {
    let Some(job) = job else { return false };
    ui.horizontal(|ui| {
        let text = if job.total > 0 {
            format!("{} of {} · {:.1} s", job.done(), job.total, job.seconds())
        } else {
            format!("{:.1} s", job.seconds())
        };
        let bar = egui::ProgressBar::new(job.fraction()).desired_width(220.0).text(text);
        ui.add(if job.total == 0 { bar.animate(true) } else { bar });
        if job.is_cancelled() {
            ui.label("cancelling…");
        } else if ui.button(cancel_label).clicked() {
            job.cancel();
        }
        let note = job.note();
        if !note.is_empty() {
            ui.label(note);
        }
    });
    true
}
