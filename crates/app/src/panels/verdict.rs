//! The one-line verdict on the selected ramp: energy-diagonal or not and by how much,
//! min omega², peak energy, duration and whether the stated bounds hold.

use crate::compute::{CandidateResult, StudyResults};
use crate::units::{DisplayScale, sci};
use egui::RichText;
use quenchless_physics::diagnostics::{RampReport, Verdict};
use quenchless_physics::limits::ViolationKind;
use quenchless_profile::Study;

/// The verdict as plain text (also what the status tests read).
pub fn verdict_text(r: &RampReport, scale: &DisplayScale) -> String {
    let diag = if r.energy_diagonal {
        format!("energy-diagonal: Q* − 1 = {} ≤ {}", sci(r.q_star_minus_one), sci(r.tolerance))
    } else {
        format!("not energy-diagonal: Q* − 1 = {} > {}", sci(r.q_star_minus_one), sci(r.tolerance))
    };
    let ratio = if r.q_star_is_energy_ratio { " (energy ratio, noise on)" } else { "" };
    let min_w2 = r.min_omega2 / (r.omega_initial_rad_s * r.omega_initial_rad_s);
    let bounds = if r.within_limits() {
        "stated bounds respected".to_string()
    } else {
        let kinds: Vec<&str> =
            r.violations.iter().filter(|v| v.kind != ViolationKind::Inverted).map(|v| v.kind.describe()).collect();
        format!("breaks limits: {}", dedup(kinds).join(", "))
    };
    let inverted = if r.inverts() { " · inverts (ω² < 0)" } else { "" };
    let duration = if scale.dimensionless {
        format!("τω_i = {}", sci(scale.x(r.duration_s)))
    } else {
        format!("τ = {} {}", sci(scale.x(r.duration_s)), scale.time_unit)
    };
    format!(
        "{diag}{ratio} · min ω²/ω_i² = {} · peak <H> = {} ħω · {duration} · {bounds}{inverted}",
        sci(min_w2),
        sci(r.peak_energy_quanta)
    )
}

fn dedup(mut v: Vec<&str>) -> Vec<&str> {
    v.dedup();
    v
}

/// Draws the verdict line of the selected candidate.
pub fn verdict_ui(ui: &mut egui::Ui, study: &Study, results: &StudyResults, selected: usize) {
    let Some(c) = study.candidates.get(selected) else {
        ui.label(RichText::new("No candidate: add one on the left").italics());
        return;
    };
    match results.candidates.get(selected) {
        Some(CandidateResult::Ready(o)) => {
            let r = &o.evaluation.report;
            let verdict = o.trap_verdict().0;
            let ok = verdict == Verdict::Pass;
            let colour = match verdict {
                Verdict::Pass => crate::colours::pass(ui.visuals()),
                Verdict::BreaksLimits => ui.visuals().warn_fg_color,
                Verdict::Fail => ui.visuals().error_fg_color,
            };
            let mark = o.trap_verdict_words();
            let text = verdict_text(r, &results.scale);
            egui::Frame::group(ui.style()).stroke(egui::Stroke::new(if ok { 1.0 } else { 2.0 }, colour)).show(
                ui,
                |ui| {
                    ui.horizontal_wrapped(|ui| {
                        ui.label(RichText::new(format!("{mark}: {}", c.name)).strong().color(colour).size(15.0));
                        ui.label(RichText::new(text).size(14.0).color(colour))
                            .on_hover_text("The verdict on the selected candidate");
                    });
                    if !o.other_axes.is_empty() {
                        let mut words = vec![format!("reference axis {}", r.verdict().word())];
                        words.extend(o.other_axes.iter().map(|a| {
                            format!(
                                "{} {} (Q* − 1 = {})",
                                a.name,
                                a.report.verdict().word(),
                                sci(a.report.q_star_minus_one)
                            )
                        }));
                        ui.label(
                            RichText::new(format!(
                                "{}: every axis the control moves, each a harmonic oscillator: {}",
                                o.trap_verdict_words(),
                                words.join(" · ")
                            ))
                            .color(colour),
                        );
                    }
                },
            );
        }
        Some(CandidateResult::Refining(_)) => {
            // The same frame and text sizes as a verdict, so the plots below do not jump
            // while a long ramp is dragged.
            let colour = ui.visuals().weak_text_color();
            egui::Frame::group(ui.style()).stroke(egui::Stroke::new(1.0, colour)).show(ui, |ui| {
                ui.horizontal_wrapped(|ui| {
                    ui.label(RichText::new(format!("{}: {}", crate::compute::COMPUTING, c.name)).strong().size(15.0));
                    ui.label(
                        RichText::new(
                            "a long ramp: the curves drawn are a preview; Q*, the end figures and the verdict come \
                             from the exact propagation, which is running",
                        )
                        .size(14.0)
                        .italics(),
                    );
                });
            });
        }
        Some(CandidateResult::Failed(e)) => {
            ui.colored_label(ui.visuals().error_fg_color, format!("Warning: {}: cannot evaluate: {e}", c.name));
        }
        None => {}
    }
}
