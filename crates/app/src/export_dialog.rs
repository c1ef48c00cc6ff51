//! The export window: rate, columns, warnings for a ramp that breaks the stated limits
//! or inverts the trap. It draws and returns the request; the app asks for the file.

use crate::compute::{CandidateResult, StudyResults};
use crate::export::columns_words;
use crate::widgets::{Allowed, Kind, value_field};
use quenchless_profile::{ExportColumns, Study};

/// The settings of an export being prepared.
#[derive(Debug, Clone, PartialEq)]
pub struct ExportDialog {
    /// Candidate index.
    pub candidate: usize,
    /// Sample rate, samples/s.
    pub rate: f64,
    /// Column layout.
    pub columns: ExportColumns,
    /// Consent to write a ramp that breaks the stated limits.
    pub accept_broken_limits: bool,
}

impl ExportDialog {
    /// For candidate i at the study generator's rate (or 100 MS/s).
    pub fn for_candidate(study: &Study, i: usize) -> Self {
        let rate = study.generator.as_ref().map_or(100e6, |g| g.sample_rate_per_s);
        Self { candidate: i, rate, columns: ExportColumns::Si, accept_broken_limits: false }
    }
}

/// What the export window asks for.
#[derive(Debug, Clone, PartialEq)]
pub enum ExportAnswer {
    /// Choose the file and export with these settings (the candidate's name given).
    ChooseFile(ExportDialog, String),
    /// The window was closed.
    Closed,
}

/// Draws the export window for `d`; `results` judge the designed ramp for the warnings.
pub fn export_ui(
    ctx: &egui::Context,
    d: &mut ExportDialog,
    study: &Study,
    results: &StudyResults,
) -> Option<ExportAnswer> {
    let mut open = true;
    let mut answer = None;
    let negative_drive = study.generator.as_ref().and_then(|g| g.drive.as_ref()).is_none_or(|d| d.can_go_negative);
    let (name, broken, inverts, err) = match (study.candidates.get(d.candidate), results.candidates.get(d.candidate)) {
        (Some(c), Some(CandidateResult::Ready(o))) => {
            let r = &o.evaluation.report;
            (c.name.clone(), !r.within_limits(), r.inverts(), None)
        }
        (Some(c), Some(CandidateResult::Failed(e))) => (c.name.clone(), false, false, Some(e.clone())),
        (Some(c), Some(CandidateResult::Refining(_))) => {
            (c.name.clone(), false, false, Some("the exact evaluation of this long ramp is still running".to_string()))
        }
        _ => (String::new(), false, false, Some("no such candidate".to_string())),
    };
    egui::Window::new("Export waveform").open(&mut open).collapsible(false).show(ctx, |ui| {
        ui.label(format!("Candidate: “{name}”"));
        if let Some(e) = &err {
            ui.colored_label(ui.visuals().error_fg_color, e);
            return;
        }
        value_field(ui, "Sample rate [samples/s]", &mut d.rate, Kind::Number, Allowed::Positive);
        egui::ComboBox::from_label("columns").selected_text(columns_words(d.columns)).show_ui(ui, |ui| {
            for c in [ExportColumns::Si, ExportColumns::LabMicrosecondsKilohertz, ExportColumns::Omega2] {
                ui.selectable_value(&mut d.columns, c, columns_words(c));
            }
        });
        if broken {
            ui.colored_label(
                ui.visuals().warn_fg_color,
                "Warning: This ramp breaks the limits stated in the study. It will be written unchanged, never clipped.",
            );
            ui.checkbox(&mut d.accept_broken_limits, "Export it anyway; I will check it against the apparatus");
        }
        if inverts && !negative_drive {
            ui.colored_label(
                ui.visuals().error_fg_color,
                "This ramp inverts the trap (ω² < 0), and the study's drive cannot go negative: it cannot be played as designed.",
            );
        } else if inverts {
            ui.colored_label(ui.visuals().warn_fg_color, "Warning: this ramp inverts the trap (ω² < 0); the file says where.");
        }
        ui.small(
            "The file is the trap as the generator plays it (the study's generator settings at this rate), held row by \
             row, ending on the level the generator must hold. It starts with # lines: tool version, study, settings, the \
             checks made and the caution.",
        );
        if ui.add_enabled(!broken || d.accept_broken_limits, egui::Button::new("Choose file and export")).clicked() {
            answer = Some(ExportAnswer::ChooseFile(d.clone(), name.clone()));
        }
    });
    if open { answer } else { Some(ExportAnswer::Closed) }
}
