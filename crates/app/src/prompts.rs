//! The questions the app asks before it goes on: unsaved changes, restoring earlier
//! unsaved work, the export caution. They draw and return the answer; the app acts on
//! it.

use crate::file_chooser::AfterSave;
use egui::RichText;
use quenchless_profile::Study;
use quenchless_profile::header::CAUTION;
use std::path::PathBuf;

/// An open question.
#[derive(Debug, Clone)]
pub enum Prompt {
    /// The study has unsaved changes; then do this.
    Unsaved(AfterSave),
    /// Unsaved work from an earlier session, and the file it belonged to.
    Restore(Box<Study>, Option<PathBuf>),
    /// The export caution, before exporting candidate i.
    Caution(usize),
}

/// The user's answer.
#[derive(Debug, Clone)]
pub enum PromptAnswer {
    /// Save, then go on.
    SaveFirst(AfterSave),
    /// Drop the changes, then go on.
    Discard(AfterSave),
    /// Go back to the study.
    KeepEditing,
    /// Make the earlier work the study.
    Restore(Box<Study>, Option<PathBuf>),
    /// Delete the earlier work.
    DiscardRecovery,
    /// The caution was read: export candidate i.
    CautionAccepted(usize),
    /// No export.
    CautionDeclined,
}

/// Draws the prompt; returns the answer once given.
pub fn prompt_ui(ctx: &egui::Context, prompt: &Prompt, study_name: &str) -> Option<PromptAnswer> {
    let mut answer = None;
    egui::Window::new("Quenchless asks")
        .collapsible(false)
        .resizable(false)
        .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
        .show(ctx, |ui| match prompt {
            Prompt::Unsaved(then) => {
                ui.label(format!("“{study_name}” has unsaved changes."));
                ui.horizontal(|ui| {
                    if ui.button("Save first").clicked() {
                        answer = Some(PromptAnswer::SaveFirst(then.clone()));
                    }
                    if ui.button("Discard changes").clicked() {
                        answer = Some(PromptAnswer::Discard(then.clone()));
                    }
                    if ui.button("Keep editing").clicked() {
                        answer = Some(PromptAnswer::KeepEditing);
                    }
                });
            }
            Prompt::Restore(study, origin) => {
                ui.label("Quenchless found unsaved work from an earlier session that did not end normally.");
                ui.label(format!(
                    "Study: “{}”{}",
                    study.name,
                    origin.as_ref().map_or_else(String::new, |p| format!(" (from {})", p.display()))
                ));
                ui.horizontal(|ui| {
                    if ui.button("Restore it").clicked() {
                        answer = Some(PromptAnswer::Restore(study.clone(), origin.clone()));
                    }
                    if ui.button("Discard it").clicked() {
                        answer = Some(PromptAnswer::DiscardRecovery);
                    }
                });
            }
            Prompt::Caution(i) => {
                ui.label(RichText::new("Warning: Before you export a waveform").strong().size(16.0));
                ui.add(egui::Label::new(CAUTION).wrap());
                ui.horizontal(|ui| {
                    if ui.button("I understand; continue").clicked() {
                        answer = Some(PromptAnswer::CautionAccepted(*i));
                    }
                    if ui.button("Cancel export").clicked() {
                        answer = Some(PromptAnswer::CautionDeclined);
                    }
                });
            }
        });
    answer
}
