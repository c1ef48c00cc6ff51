//! Undo and redo over the study, without egui: a stack of earlier states and one of
//! undone ones. A change becomes one step when the app commits it (when no gesture is
//! in progress), so one drag is one step. Steps are told apart by the document's
//! revision, not by comparing studies.

use quenchless_profile::Study;

/// Most undo steps kept.
pub const MAX_UNDOS: usize = 200;

/// The edit history of one document.
#[derive(Debug, Clone)]
pub struct EditHistory {
    undo: Vec<Study>,
    redo: Vec<Study>,
    /// The state of the latest step and the revision it had.
    committed: Study,
    committed_revision: u64,
}

impl EditHistory {
    /// A fresh history whose first state is `study` at `revision`.
    pub fn new(study: &Study, revision: u64) -> Self {
        Self { undo: Vec::new(), redo: Vec::new(), committed: study.clone(), committed_revision: revision }
    }

    /// Records `study` (at `revision`) as a new step unless that revision is the latest
    /// step already; a new step drops the redo states.
    pub fn commit(&mut self, study: &Study, revision: u64) {
        if revision == self.committed_revision {
            return;
        }
        let before = std::mem::replace(&mut self.committed, study.clone());
        self.committed_revision = revision;
        self.undo.push(before);
        if self.undo.len() > MAX_UNDOS {
            self.undo.remove(0);
        }
        self.redo.clear();
    }

    /// Whether there is a step to undo from the study at `revision`.
    pub fn can_undo(&self, revision: u64) -> bool {
        !self.undo.is_empty() || revision != self.committed_revision
    }

    /// Whether there is a step to redo from the study at `revision`.
    pub fn can_redo(&self, revision: u64) -> bool {
        !self.redo.is_empty() && revision == self.committed_revision
    }

    /// The state before the latest step (committing `study` first), now at `revision`.
    pub fn undo(&mut self, study: &Study, revision: u64, new_revision: u64) -> Option<Study> {
        self.commit(study, revision);
        let previous = self.undo.pop()?;
        let current = std::mem::replace(&mut self.committed, previous.clone());
        self.redo.push(current);
        self.committed_revision = new_revision;
        Some(previous)
    }

    /// The state the latest undo left, now at `new_revision`.
    pub fn redo(&mut self, revision: u64, new_revision: u64) -> Option<Study> {
        if revision != self.committed_revision {
            return None;
        }
        let next = self.redo.pop()?;
        let current = std::mem::replace(&mut self.committed, next.clone());
        self.undo.push(current);
        self.committed_revision = new_revision;
        Some(next)
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
        let mut h = EditHistory::new(&a, 0);
        assert!(!h.can_undo(0));
        h.commit(&named("b"), 1);
        h.commit(&named("c"), 2);
        assert_eq!(h.undo(&named("c"), 2, 3), Some(named("b")));
        assert_eq!(h.undo(&named("b"), 3, 4), Some(a.clone()));
        assert!(!h.can_undo(4));
        assert_eq!(h.redo(4, 5), Some(named("b")));
        // A new edit after undo drops the redo of "c".
        h.commit(&named("d"), 6);
        assert!(!h.can_redo(6));
        assert_eq!(h.redo(6, 7), None);
        assert_eq!(h.undo(&named("d"), 6, 8), Some(named("b")));
    }

    #[test]
    fn an_uncommitted_edit_is_committed_before_it_is_undone() {
        let mut h = EditHistory::new(&named("a"), 0);
        // "b" was edited (revision 1) but not yet committed (a drag still going on).
        assert!(h.can_undo(1));
        assert_eq!(h.undo(&named("b"), 1, 2), Some(named("a")));
        assert_eq!(h.redo(2, 3), Some(named("b")));
    }
}
