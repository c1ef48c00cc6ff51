//! The document, without egui: the study being edited, the copy last saved, its file,
//! the undo history, a revision counter, the validation of every edit, and the edit
//! operations that replace the study (new, open, save, restore, import, undo, redo).
//!
//! Panels edit the study in place (egui widgets write into its fields), so once per
//! frame [`Document::settle`] compares it with the last validated copy: that is the one
//! whole-study comparison of a frame. Everything else (the result cache, the undo
//! history, the unsaved-changes mark) follows the revision, which rises with every
//! accepted change.

use crate::edits::{add_candidate, next_colour, unique_name};
use crate::history::EditHistory;
use quenchless_physics::ramp::{SampledColumn, SampledReading};
use quenchless_profile::study::{CandidateRamp, RampSpec};
use quenchless_profile::{ProfileError, Study, convert, load_study, read_waveform, save_study};
use std::path::{Path, PathBuf};

/// One study being edited.
#[derive(Debug, Clone)]
pub struct Document {
    study: Study,
    /// The latest study that passed validation: an edit that breaks a rule is undone
    /// back to it, with a message naming the field, the value and what is allowed.
    last_valid: Study,
    saved: Study,
    path: Option<PathBuf>,
    history: EditHistory,
    revision: u64,
    dirty: bool,
}

/// A study for File > New: one linear candidate between the default trap frequencies.
pub fn fresh_study() -> Study {
    let mut s = Study { name: "New study".into(), ..Study::default() };
    add_candidate(&mut s, "linear");
    s
}

impl Document {
    /// A document holding `study`, not yet saved to a file and with nothing unsaved.
    pub fn new(study: Study) -> Self {
        Self {
            history: EditHistory::new(&study, 0),
            last_valid: study.clone(),
            saved: study.clone(),
            study,
            path: None,
            revision: 0,
            dirty: false,
        }
    }

    /// The study.
    pub fn study(&self) -> &Study {
        &self.study
    }

    /// The study to edit in place; [`Document::settle`] then checks and counts the edit.
    pub fn study_mut(&mut self) -> &mut Study {
        &mut self.study
    }

    /// Rises with every accepted change of the study.
    pub fn revision(&self) -> u64 {
        self.revision
    }

    /// The file the study belongs to.
    pub fn path(&self) -> Option<&Path> {
        self.path.as_deref()
    }

    /// Whether there are unsaved changes.
    pub fn is_dirty(&self) -> bool {
        self.dirty
    }

    /// Takes in the edits made in place since the last call: a valid change raises the
    /// revision, an invalid one is reverted and its reason returned.
    pub fn settle(&mut self) -> Option<String> {
        if self.study == self.last_valid {
            return None;
        }
        let checked = convert::validate(&self.study)
            .map_err(|e| e.user_message())
            .and_then(|()| crate::interactive::check_interactive(&self.study));
        match checked {
            Ok(()) => {
                self.changed();
                None
            }
            Err(e) => {
                self.study = self.last_valid.clone();
                Some(format!("Not applied: {e}. The previous value is kept."))
            }
        }
    }

    /// Counts the current study as a new, valid revision.
    fn changed(&mut self) {
        self.last_valid = self.study.clone();
        self.revision += 1;
        self.dirty = self.study != self.saved;
    }

    /// Replaces everything by `study` from `path` (nothing unsaved).
    fn replace(&mut self, study: Study, path: Option<PathBuf>) {
        let revision = self.revision + 1;
        *self = Self { revision, history: EditHistory::new(&study, revision), ..Self::new(study) };
        self.path = path;
    }

    /// Records the current revision as an undo step (when no gesture is in progress).
    pub fn commit_step(&mut self) {
        self.history.commit(&self.study, self.revision);
    }

    /// Whether there is a step to undo.
    pub fn can_undo(&self) -> bool {
        self.history.can_undo(self.revision)
    }

    /// Whether there is a step to redo.
    pub fn can_redo(&self) -> bool {
        self.history.can_redo(self.revision)
    }

    /// Undoes the latest step.
    pub fn undo(&mut self) {
        if let Some(s) = self.history.undo(&self.study, self.revision, self.revision + 1) {
            self.study = s;
            self.changed();
        }
    }

    /// Redoes the latest undone step.
    pub fn redo(&mut self) {
        if let Some(s) = self.history.redo(self.revision, self.revision + 1) {
            self.study = s;
            self.changed();
        }
    }

    /// Starts a new study (File > New).
    pub fn new_study(&mut self) {
        self.replace(fresh_study(), None);
    }

    /// Opens a study file; on failure the current study stays.
    pub fn open(&mut self, path: &Path) -> Result<(), ProfileError> {
        let s = load_study(path)?;
        self.replace(s, Some(path.to_path_buf()));
        Ok(())
    }

    /// Saves the study to a file (atomic); it becomes the study's file. On failure the
    /// study stays unsaved.
    pub fn save_to(&mut self, path: &Path) -> Result<(), ProfileError> {
        save_study(&self.study, path)?;
        self.saved = self.study.clone();
        self.path = Some(path.to_path_buf());
        self.dirty = false;
        Ok(())
    }

    /// Forgets the unsaved changes' claim on the file (Discard changes): the study as it
    /// is counts as saved, so a following New or Open does not ask again.
    pub fn discard_changes(&mut self) {
        self.saved = self.study.clone();
        self.dirty = false;
    }

    /// Restores unsaved work from a recovery copy: it becomes the study, belonging to
    /// `origin`, and counts as unsaved against that file's content.
    pub fn restore(&mut self, study: Study, origin: Option<PathBuf>) -> Result<(), ProfileError> {
        convert::validate(&study)?;
        let saved = origin.as_deref().and_then(|p| load_study(p).ok()).unwrap_or_default();
        self.study = study;
        self.path = origin;
        self.saved = saved;
        self.changed();
        self.commit_step();
        Ok(())
    }

    /// Imports a CSV waveform as a new candidate (read as the file says); its index.
    pub fn import_waveform(&mut self, path: &Path) -> Result<usize, ProfileError> {
        let table = read_waveform(path)?;
        let t0 = table.times_s.first().copied().unwrap_or(0.0);
        let spec = RampSpec::Waveform {
            source: path.display().to_string(),
            omega2_column: table.column == SampledColumn::Omega2,
            hold: table.reading == Some(SampledReading::Hold),
            times_s: table.times_s.iter().map(|t| t - t0).collect(),
            values: table.values,
            end_frequencies_rad_s: table.end_frequencies_rad_s,
        };
        convert::ramp_from_spec(&spec, "waveform").map_err(|e| e.in_file(path))?;
        let base = path.file_stem().map_or_else(|| "imported".to_string(), |s| s.to_string_lossy().into_owned());
        let name = unique_name(&self.study, &base);
        let colour = Some(next_colour(&self.study));
        self.study.candidates.push(CandidateRamp { name, visible: true, colour, ramp: spec });
        if let Some(refusal) = self.settle() {
            return Err(ProfileError::invalid("waveform", path.display(), refusal));
        }
        Ok(self.study.candidates.len() - 1)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn doc() -> Document {
        Document::new(crate::demo::demo_study())
    }

    #[test]
    fn edits_raise_the_revision_and_mark_unsaved_once_settled() {
        let mut d = doc();
        assert!(!d.is_dirty());
        assert_eq!(d.settle(), None);
        assert_eq!(d.revision(), 0, "no change, no revision");
        d.study_mut().name = "edited".into();
        assert_eq!(d.settle(), None);
        assert_eq!(d.revision(), 1);
        assert!(d.is_dirty());
        d.study_mut().name = crate::demo::demo_study().name;
        d.settle();
        assert!(!d.is_dirty(), "back to the saved study");
    }

    #[test]
    fn an_invalid_edit_is_reverted_with_its_reason() {
        let mut d = doc();
        d.study_mut().tolerance = 2.0;
        let e = d.settle().expect("refused");
        assert!(e.contains("tolerance") && e.contains("previous value is kept"), "{e}");
        assert!((d.study().tolerance - crate::demo::demo_study().tolerance).abs() < 1e-15);
        assert_eq!(d.revision(), 0);
        assert!(!d.is_dirty());
    }

    #[test]
    fn undo_and_redo_follow_the_committed_steps() {
        let mut d = doc();
        let n = d.study().candidates.len();
        add_candidate(d.study_mut(), "shortcut");
        d.settle();
        d.commit_step();
        assert!(d.can_undo());
        d.undo();
        assert_eq!(d.study().candidates.len(), n);
        assert!(!d.is_dirty());
        assert!(d.can_redo());
        d.redo();
        assert_eq!(d.study().candidates.len(), n + 1);
        assert!(d.is_dirty());
    }

    #[test]
    fn save_open_and_a_failed_save() {
        let dir = tempfile::tempdir().expect("temp dir");
        let mut d = doc();
        d.study_mut().name = "to disk".into();
        d.settle();
        let path = dir.path().join("s.ron");
        d.save_to(&path).expect("saves");
        assert!(!d.is_dirty());
        assert_eq!(d.path(), Some(path.as_path()));
        d.study_mut().name = "changed again".into();
        d.settle();
        let gone = dir.path().join("missing-folder").join("s.ron");
        assert!(d.save_to(&gone).is_err());
        assert!(d.is_dirty(), "a failed save leaves the study unsaved");
        assert_eq!(d.path(), Some(path.as_path()), "and its file unchanged");
        let before = d.revision();
        d.open(&path).expect("opens");
        assert_eq!(d.study().name, "to disk");
        assert!(!d.is_dirty() && d.revision() > before);
        assert!(d.open(&dir.path().join("nothing.ron")).is_err());
        assert_eq!(d.study().name, "to disk", "a failed open keeps the study");
    }

    #[test]
    fn restore_marks_the_recovered_work_unsaved() {
        let mut d = doc();
        let mut s = crate::demo::demo_study();
        s.name = "recovered".into();
        d.restore(s, None).expect("valid");
        assert_eq!(d.study().name, "recovered");
        assert!(d.is_dirty());
        let mut bad = crate::demo::demo_study();
        bad.tolerance = -1.0;
        assert!(d.restore(bad, None).is_err());
        assert_eq!(d.study().name, "recovered");
    }
}
