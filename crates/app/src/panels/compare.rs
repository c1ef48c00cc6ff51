//! The side-by-side comparison of all candidates, sortable by any column.

use crate::compute::{CandidateResult, StudyResults};
use crate::units::sci;
use crate::widgets::colour_of;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::diagnostics::{RampReport, Verdict};
use quenchless_physics::limits::ViolationKind;
use quenchless_profile::Study;

/// omega of the study's start trap, rad/s: the unit of the work columns.
fn reference_omega(study: &Study) -> f64 {
    TWO_PI * study.trap.start_frequency_hz
}

/// A sortable column.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Column {
    /// Candidate name.
    Name,
    /// Q* - 1.
    QStar,
    /// Final coherence ratio.
    Coherence,
    /// Work in quanta of the study's start trap.
    Work,
    /// Frictional work.
    FrictionWork,
    /// Peak energy.
    PeakEnergy,
    /// Min omega² / omega_i².
    MinOmega2,
    /// Duration.
    Duration,
    /// Number of broken stated bounds.
    Violations,
}

const COLUMNS: [(Column, &str); 9] = [
    (Column::Name, "Candidate"),
    (Column::QStar, "Q* − 1"),
    (Column::Coherence, "coherence ratio"),
    (Column::Work, "work [ħω of the start trap]"),
    (Column::FrictionWork, "friction work [ħω of the start trap]"),
    (Column::PeakEnergy, "peak <H>/ħω"),
    (Column::MinOmega2, "min ω²/ω_i²"),
    (Column::Duration, "duration"),
    (Column::Violations, "limits broken"),
];

/// Work and friction work in one unit for every row: quanta of the study's start trap
/// (a waveform candidate may start elsewhere, and its own ħω_i would mix units).
fn in_start_quanta(quanta_of_own_start: f64, r: &RampReport, omega_ref: f64) -> f64 {
    quanta_of_own_start * r.omega_initial_rad_s / omega_ref
}

/// The limits a candidate breaks, by name, with the number of stretches of each.
fn broken_words(r: &RampReport) -> String {
    let mut kinds: Vec<(ViolationKind, usize)> = Vec::new();
    for v in r.violations.iter().filter(|v| v.kind != ViolationKind::Inverted) {
        match kinds.iter_mut().find(|(k, _)| *k == v.kind) {
            Some((_, n)) => *n += 1,
            None => kinds.push((v.kind, 1)),
        }
    }
    kinds
        .iter()
        .map(|(k, n)| if *n == 1 { k.describe().to_string() } else { format!("{} ({n} stretches)", k.describe()) })
        .collect::<Vec<_>>()
        .join("; ")
}

fn broken(r: &RampReport) -> usize {
    r.violations.iter().filter(|v| v.kind != ViolationKind::Inverted).count()
}

fn key(r: &RampReport, c: Column, omega_ref: f64) -> f64 {
    match c {
        Column::Name => 0.0,
        Column::QStar => r.q_star_minus_one,
        Column::Coherence => r.final_coherence_ratio,
        Column::Work => in_start_quanta(r.work_quanta, r, omega_ref),
        Column::FrictionWork => in_start_quanta(r.friction_work_quanta, r, omega_ref),
        Column::PeakEnergy => r.peak_energy_quanta,
        Column::MinOmega2 => r.min_omega2 / (r.omega_initial_rad_s * r.omega_initial_rad_s),
        Column::Duration => r.duration_s,
        Column::Violations => broken(r) as f64,
    }
}

/// State of the comparison table.
#[derive(Debug, Clone, Copy)]
pub struct ComparePanel {
    /// Sorted by.
    pub sort: Column,
    /// Ascending.
    pub ascending: bool,
}

impl Default for ComparePanel {
    fn default() -> Self {
        Self { sort: Column::QStar, ascending: true }
    }
}

impl ComparePanel {
    /// Row order of the candidates under the current sort (errors last).
    pub fn order(&self, study: &Study, results: &StudyResults) -> Vec<usize> {
        let mut idx: Vec<usize> = (0..study.candidates.len().min(results.candidates.len())).collect();
        let omega_ref = reference_omega(study);
        idx.sort_by(|&a, &b| {
            let ord = match (results.candidates[a].ready(), results.candidates[b].ready()) {
                // Name order does not depend on what is evaluated yet.
                _ if self.sort == Column::Name => study.candidates[a].name.cmp(&study.candidates[b].name),
                (Some(x), Some(y)) => key(&x.evaluation.report, self.sort, omega_ref).total_cmp(&key(
                    &y.evaluation.report,
                    self.sort,
                    omega_ref,
                )),
                (Some(_), None) => return std::cmp::Ordering::Less,
                (None, Some(_)) => return std::cmp::Ordering::Greater,
                (None, None) => std::cmp::Ordering::Equal,
            };
            if self.ascending { ord } else { ord.reverse() }
        });
        idx
    }

    /// Draws the table; clicking a row selects that candidate.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &Study, results: &StudyResults, selected: &mut usize) {
        ui.heading("Compare candidates");
        ui.label("Click a column title to sort; click a name to select it for shaping.");
        let order = self.order(study, results);
        let omega_ref = reference_omega(study);
        egui::ScrollArea::both().show(ui, |ui| {
            egui::Grid::new("compare-table").striped(true).spacing([14.0, 6.0]).show(ui, |ui| {
                for (col, title) in COLUMNS {
                    let arrow = if self.sort == col { if self.ascending { " (up)" } else { " (down)" } } else { "" };
                    if ui.button(format!("{title}{arrow}")).clicked() {
                        if self.sort == col {
                            self.ascending = !self.ascending;
                        } else {
                            self.sort = col;
                            self.ascending = true;
                        }
                    }
                }
                ui.end_row();
                for i in order {
                    let c = &study.candidates[i];
                    let name = egui::RichText::new(&c.name).color(colour_of(study, i)).strong();
                    if ui.selectable_label(*selected == i, name).clicked() {
                        *selected = i;
                    }
                    match &results.candidates[i] {
                        CandidateResult::Ready(o) => {
                            let r = &o.evaluation.report;
                            let verdict = o.trap_verdict().0;
                            let q =
                                egui::RichText::new(format!("{} {}", sci(r.q_star_minus_one), o.trap_verdict_words()));
                            ui.label(match verdict {
                                Verdict::Pass => q.color(crate::colours::pass(ui.visuals())),
                                Verdict::Fail => q,
                                Verdict::BreaksLimits => q.color(ui.visuals().warn_fg_color),
                            });
                            ui.label(sci(r.final_coherence_ratio));
                            ui.label(sci(in_start_quanta(r.work_quanta, r, omega_ref)));
                            ui.label(sci(in_start_quanta(r.friction_work_quanta, r, omega_ref)));
                            ui.label(sci(r.peak_energy_quanta));
                            let m = key(r, Column::MinOmega2, omega_ref);
                            ui.label(if m <= 0.0 {
                                egui::RichText::new(format!("{} (inverts)", sci(m))).color(ui.visuals().error_fg_color)
                            } else {
                                egui::RichText::new(sci(m))
                            });
                            ui.label(format!(
                                "{} {}",
                                sci(results.scale.x(r.duration_s)),
                                if results.scale.dimensionless { "/ω_i" } else { results.scale.time_unit }
                            ));
                            ui.label(if broken(r) == 0 {
                                egui::RichText::new("none")
                            } else {
                                egui::RichText::new(broken_words(r)).color(ui.visuals().warn_fg_color)
                            });
                        }
                        CandidateResult::Refining(_) => {
                            ui.label(egui::RichText::new(crate::compute::COMPUTING).italics())
                                .on_hover_text("A long ramp: its exact evaluation is running");
                        }
                        CandidateResult::Failed(e) => {
                            ui.colored_label(ui.visuals().error_fg_color, e);
                        }
                    }
                    ui.end_row();
                }
            });
        });
    }
}
