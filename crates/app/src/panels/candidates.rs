//! The candidate list (add, duplicate, rename, hide, delete) and the numeric editor of
//! the selected ramp and of the study's trap, limits and initial state.

use crate::compute::StudyResults;
use crate::demo::{FAMILIES, PALETTE};
use crate::edits::{add_candidate, next_colour, rename_candidate, set_duration, spec_duration, unique_name};
use crate::units::{frequency_unit, sci, time_unit};
use crate::widgets::{Allowed, Kind, lab_value_field, optional_field, value_field};
use quenchless_profile::Study;
use quenchless_profile::study::{
    CandidateRamp, FrequencyUnit, HoldSpec, InitialStateSpec, KnotSpec, RampSpec, SplineShapeSpec, TimeUnit,
};
use quenchless_profile::units::{Quantity, format_quantity};

const FREQ: Kind = Kind::Unit(Quantity::Frequency);
const TIME: Kind = Kind::Unit(Quantity::Time);

/// Requests of the candidate panel that the app carries out.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[must_use]
pub enum CandidateRequest {
    /// Import a CSV waveform as a new candidate.
    ImportWaveform,
    /// Export candidate i as CSV.
    Export(usize),
}

/// State of the candidate panel.
#[derive(Debug, Default)]
pub struct CandidatePanel {
    family: usize,
}

impl CandidatePanel {
    /// Draws the panel.
    pub fn ui(
        &mut self,
        ui: &mut egui::Ui,
        study: &mut Study,
        selected: &mut usize,
        results: &StudyResults,
    ) -> Option<CandidateRequest> {
        let mut request = None;
        ui.heading("Candidate ramps");
        ui.horizontal(|ui| {
            egui::ComboBox::from_label("family").selected_text(FAMILIES[self.family.min(FAMILIES.len() - 1)]).show_ui(
                ui,
                |ui| {
                    for (k, f) in FAMILIES.iter().enumerate() {
                        ui.selectable_value(&mut self.family, k, *f);
                    }
                },
            );
            if ui
                .button("Add candidate")
                .on_hover_text("Add a ramp of the chosen family between the trap's end frequencies")
                .clicked()
            {
                *selected = add_candidate(study, FAMILIES[self.family.min(FAMILIES.len() - 1)]);
            }
        });
        if ui.button("Import waveform CSV…").clicked() {
            request = Some(CandidateRequest::ImportWaveform);
        }
        ui.separator();
        let mut delete = None;
        let mut duplicate = None;
        egui::ScrollArea::vertical().id_salt("candidate-list").max_height(200.0).show(ui, |ui| {
            for (i, c) in study.candidates.iter_mut().enumerate() {
                ui.horizontal(|ui| {
                    let [r, g, b] = c.colour.unwrap_or(PALETTE[i % PALETTE.len()]);
                    let (rect, _) = ui.allocate_exact_size(egui::vec2(12.0, 12.0), egui::Sense::hover());
                    ui.painter().rect_filled(rect, 2.0, egui::Color32::from_rgb(r, g, b));
                    ui.checkbox(&mut c.visible, "").on_hover_text("Show on the plots").widget_info(|| {
                        egui::WidgetInfo::selected(egui::Role::CheckBox, true, c.visible, format!("show {}", c.name))
                    });
                    // The verdict words every report, file header and screen uses.
                    let status = results
                        .candidates
                        .get(i)
                        .map_or_else(|| "CANNOT EVALUATE".to_string(), crate::compute::CandidateResult::verdict_words);
                    if ui
                        .selectable_label(*selected == i, format!("{status} {}", c.name))
                        .on_hover_text(c.ramp.family_label())
                        .clicked()
                    {
                        *selected = i;
                    }
                });
            }
        });
        ui.horizontal(|ui| {
            let has = *selected < study.candidates.len();
            if ui.add_enabled(has, egui::Button::new("Duplicate")).clicked() {
                duplicate = Some(*selected);
            }
            if ui.add_enabled(has, egui::Button::new("Delete")).clicked() {
                delete = Some(*selected);
            }
            if ui.add_enabled(has, egui::Button::new("Export CSV…")).clicked() {
                request = Some(CandidateRequest::Export(*selected));
            }
        });
        if let Some(i) = duplicate
            && let Some(c) = study.candidates.get(i).cloned()
        {
            let name = unique_name(study, &format!("{} copy", c.name));
            let colour = Some(next_colour(study));
            study.candidates.insert(i + 1, CandidateRamp { name, colour, ..c });
            *selected = i + 1;
        }
        if let Some(i) = delete
            && i < study.candidates.len()
        {
            study.candidates.remove(i);
            *selected = (*selected).min(study.candidates.len().saturating_sub(1));
        }
        ui.separator();
        if let Some(i) = (*selected < study.candidates.len()).then_some(*selected) {
            if let Some(e) = results.candidates.get(i).and_then(|r| r.error()) {
                ui.colored_label(ui.visuals().error_fg_color, e);
            }
            ramp_editor(ui, study, i);
        }
        ui.separator();
        study_editor(ui, study);
        request
    }
}

fn ramp_editor(ui: &mut egui::Ui, study: &mut Study, i: usize) {
    ui.strong(format!("Shape of “{}”", study.candidates[i].name));
    let mut name = study.candidates[i].name.clone();
    let id = ui.scope_id().with("rename-error");
    ui.horizontal(|ui| {
        let lab = ui.label("Name");
        let r = ui.add(egui::TextEdit::singleline(&mut name).desired_width(160.0)).labelled_by(lab.id);
        if r.lost_focus() && name != study.candidates[i].name {
            match rename_candidate(study, i, &name) {
                Ok(()) => ui.data_mut(|d| d.remove::<String>(id)),
                Err(e) => {
                    ui.data_mut(|d| d.insert_temp(id, e));
                }
            }
        }
    });
    if let Some(e) = ui.data(|d| d.get_temp::<String>(id)) {
        ui.colored_label(ui.visuals().error_fg_color, e);
    }
    let spec = &mut study.candidates[i].ramp;
    match spec {
        RampSpec::Linear { from_hz, to_hz, duration_s }
        | RampSpec::ConstantMu { from_hz, to_hz, duration_s }
        | RampSpec::Shortcut { from_hz, to_hz, duration_s } => {
            value_field(ui, "From", from_hz, FREQ, Allowed::Positive);
            value_field(ui, "To", to_hz, FREQ, Allowed::Positive);
            value_field(ui, "Duration", duration_s, TIME, Allowed::Positive);
        }
        RampSpec::Polynomial { omega2_coefficients, duration_s } => {
            value_field(ui, "Duration", duration_s, TIME, Allowed::Positive);
            ui.label("ω² = Σ a_k (t/τ)^k, a_k in (rad/s)²");
            for (k, a) in omega2_coefficients.iter_mut().enumerate() {
                value_field(ui, &format!("a{k}"), a, Kind::Number, Allowed::Any);
            }
            ui.horizontal(|ui| {
                if ui.button("Add term").clicked() {
                    omega2_coefficients.push(0.0);
                }
                if omega2_coefficients.len() > 1 && ui.button("Remove last term").clicked() {
                    omega2_coefficients.pop();
                }
            });
        }
        RampSpec::Holds { from_hz, to_hz, holds } => {
            value_field(ui, "From", from_hz, FREQ, Allowed::Positive);
            value_field(ui, "To", to_hz, FREQ, Allowed::Positive);
            ui.label("Holds (a negative level inverts the trap)");
            for (k, h) in holds.iter_mut().enumerate() {
                value_field(ui, &format!("Hold {} level", k + 1), &mut h.signed_frequency_hz, FREQ, Allowed::Any);
                value_field(ui, &format!("Hold {} time", k + 1), &mut h.duration_s, TIME, Allowed::Positive);
            }
            ui.horizontal(|ui| {
                if ui.button("Add hold").clicked() {
                    let last =
                        holds.last().copied().unwrap_or(HoldSpec { signed_frequency_hz: *to_hz, duration_s: 1e-6 });
                    holds.push(last);
                }
                if holds.len() > 1 && ui.button("Remove last hold").clicked() {
                    holds.pop();
                }
            });
        }
        RampSpec::Spline { knots, shape, log_frequency, flat_ends } => {
            ui.horizontal(|ui| {
                egui::ComboBox::from_label("spline shape")
                    .selected_text(if *shape == SplineShapeSpec::Monotone { "monotone" } else { "smooth (C2)" })
                    .show_ui(ui, |ui| {
                        ui.selectable_value(shape, SplineShapeSpec::Monotone, "monotone");
                        ui.selectable_value(shape, SplineShapeSpec::Smooth, "smooth (C2)");
                    });
            });
            ui.checkbox(log_frequency, "interpolate ln ν");
            ui.checkbox(flat_ends, "flat ends");
            ui.label("Knots: click the plot to add, Ctrl+click or right-click a knot to remove");
            let n = knots.len();
            for (k, kn) in knots.iter_mut().enumerate() {
                let KnotSpec { t_s, frequency_hz } = kn;
                if k > 0 {
                    value_field(ui, &format!("Knot {} time", k + 1), t_s, TIME, Allowed::Positive);
                }
                value_field(ui, &format!("Knot {} frequency", k + 1), frequency_hz, FREQ, Allowed::Positive);
                if k + 1 == n {
                    break;
                }
            }
        }
        RampSpec::Waveform { source, hold, times_s, .. } => {
            ui.label(format!("Imported table: {} rows from {source}", times_s.len()));
            ui.checkbox(hold, "sample-and-hold between rows");
            let mut tau = spec_duration(spec);
            if value_field(ui, "Duration (stretches the table)", &mut tau, TIME, Allowed::Positive) {
                set_duration(spec, tau);
            }
        }
    }
}

fn study_editor(ui: &mut egui::Ui, study: &mut Study) {
    egui::CollapsingHeader::new("Trap, limits and start state").default_open(false).show(ui, |ui| {
        let t = &mut study.trap;
        // The start frequency defines omega_i, so it stays in lab units in the dimensionless view.
        lab_value_field(ui, "Trap start", &mut t.start_frequency_hz, FREQ, Allowed::Positive);
        value_field(ui, "Trap end", &mut t.end_frequency_hz, FREQ, Allowed::Positive);
        let lo = 0.1 * t.end_frequency_hz.min(t.start_frequency_hz);
        let hi = 1.2 * t.end_frequency_hz.max(t.start_frequency_hz);
        optional_field(ui, "Lowest frequency", &mut t.lowest_frequency_hz, FREQ, lo);
        optional_field(ui, "Highest frequency", &mut t.highest_frequency_hz, FREQ, hi);
        optional_field(ui, "Slew limit [Hz/s]", &mut t.slew_limit_hz_per_s, Kind::Number, 1e10);
        let mut n = match study.initial_state {
            InitialStateSpec::Thermal { occupation } => Some(occupation),
            _ => None,
        };
        if let Some(n) = n.as_mut() {
            if value_field(ui, "Start occupation (mean n)", n, Kind::Number, Allowed::NonNegative) {
                study.initial_state = InitialStateSpec::Thermal { occupation: *n };
            }
        } else {
            ui.label(format!("Start state: {}", start_state_words(&study.initial_state)));
        }
        value_field(ui, "Tolerance on Q* − 1", &mut study.tolerance, Kind::Number, Allowed::Positive);
    });
    super::trap_model::trap_model_ui(ui, study);
    egui::CollapsingHeader::new("Display units").default_open(false).show(ui, |ui| {
        let d = &mut study.display;
        egui::ComboBox::from_label("frequency unit").selected_text(frequency_unit(d.frequency).1).show_ui(ui, |ui| {
            for u in FrequencyUnit::ALL {
                ui.selectable_value(&mut d.frequency, u, frequency_unit(u).1);
            }
        });
        egui::ComboBox::from_label("time unit").selected_text(time_unit(d.time).1).show_ui(ui, |ui| {
            for u in TimeUnit::ALL {
                ui.selectable_value(&mut d.time, u, time_unit(u).1);
            }
        });
        ui.checkbox(&mut d.dimensionless, "dimensionless view (ω/ω_i, t ω_i)");
    });
}

/// A start state in words (the fields of the study file, with units).
fn start_state_words(s: &InitialStateSpec) -> String {
    match s {
        InitialStateSpec::Thermal { occupation } => format!("thermal, mean occupation {}", sci(*occupation)),
        InitialStateSpec::ThermalAt { temperature_k } => {
            format!("thermal at {}", format_quantity(*temperature_k, Quantity::Temperature))
        }
        InitialStateSpec::Squeezed { occupation, r, phi } => {
            format!(
                "squeezed thermal, mean occupation {}, squeezing r = {}, angle {} rad",
                sci(*occupation),
                sci(*r),
                sci(*phi)
            )
        }
        InitialStateSpec::Moments { x_scaled, y_scaled, d_scaled } => format!(
            "second moments <Q²>ω_i/ħ = {}, <P²>/ħω_i = {}, <QP+PQ>/2ħ = {} (edit them in the study file)",
            sci(*x_scaled),
            sci(*y_scaled),
            sci(*d_scaled)
        ),
    }
}
