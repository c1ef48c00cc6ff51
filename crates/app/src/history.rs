//! Undo and redo over the study: egui's `Undoer` holds the snapshots; a change becomes
//! one step when the pointer is released, so one drag is one step.

use egui::util::undoer::{Settings, Undoer};
use quenchless_profile::Study;

/// The edit history of one document.
#[derive(Clone)]
pub struct EditHistory {
    undoer: Undoer<Study>,
    committed: Study,
    clock: f64,
}

impl std::fmt::Debug for EditHistory {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("EditHistory").field("undoer", &self.undoer).finish_non_exhaustive()
    }
}

impl EditHistory {
    /// A fresh history whose first state is `study`.
    pub fn new(study: &Study) -> Self {
        let mut undoer = Undoer::with_settings(Settings { max_undos: 200, ..Settings::default() });
        undoer.add_undo(study);
        Self { undoer, committed: study.clone(), clock: 0.0 }
    }

    /// Records `study` as a new step if it differs from the last step. Call when no
    /// gesture is in progress.
    pub fn commit(&mut self, study: &Study) {
        if *study == self.committed {
            return;
        }
        // feed_state drops redo states that the new edit made stale; add_undo then
        // makes the edit a step of its own at once.
        self.clock += 1.0;
        self.undoer.feed_state(self.clock, study);
        self.undoer.add_undo(study);
        self.committed = study.clone();
    }

    /// Whether there is a step to undo from `study`.
    pub fn can_undo(&self, study: &Study) -> bool {
        self.undoer.has_undo(study)
    }

    /// Whether there is a step to redo.
    pub fn can_redo(&self, study: &Study) -> bool {
        self.undoer.has_redo(study)
    }

    /// The state before the latest step, if any.
    pub fn undo(&mut self, study: &Study) -> Option<Study> {
        self.commit(study);
        let s = self.undoer.undo(study)?.clone();
        self.committed = s.clone();
        Some(s)
    }

    /// The state the latest undo left, if any.
    pub fn redo(&mut self, study: &Study) -> Option<Study> {
        let s = self.undoer.redo(study)?.clone();
        self.committed = s.clone();
        Some(s)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn named(n: &str) -> Study {
        Study { name: n.into(), ..Study::default() }
    }

    #[test]
    fn undo_redo_and_stale_redo_dropped() {
        let a = named("a");
        let mut h = EditHistory::new(&a);
        assert!(!h.can_undo(&a));
        let b = named("b");
        h.commit(&b);
        let c = named("c");
        h.commit(&c);
        assert_eq!(h.undo(&c), Some(b.clone()));
        assert_eq!(h.undo(&b), Some(a.clone()));
        assert_eq!(h.redo(&a), Some(b.clone()));
        // A new edit after undo drops the redo of "c".
        let d = named("d");
        h.commit(&d);
        assert_eq!(h.redo(&d), None);
        assert_eq!(h.undo(&d), Some(b));
    }
}
