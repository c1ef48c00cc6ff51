//! The side-by-side comparison of all candidates, sortable by any column.

use crate::compute::StudyResults;
use crate::units::sci;
use crate::widgets::colour_of;
use quenchless_physics::diagnostics::RampReport;
use quenchless_physics::limits::ViolationKind;
use quenchless_profile::Study;

/// A sortable column.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Column {
    /// Candidate name.
    Name,
    /// Q* - 1.
    QStar,
    /// Final coherence ratio.
    Coherence,
    /// Work in quanta of omega_i.
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
    (Column::Work, "work [ħω_i]"),
    (Column::FrictionWork, "friction work [ħω_i]"),
    (Column::PeakEnergy, "peak <H>/ħω"),
    (Column::MinOmega2, "min ω²/ω_i²"),
    (Column::Duration, "duration"),
    (Column::Violations, "bounds broken"),
];

fn broken(r: &RampReport) -> usize {
    r.violations.iter().filter(|v| v.kind != ViolationKind::Inverted).count()
}

fn key(r: &RampReport, c: Column) -> f64 {
    match c {
        Column::Name => 0.0,
        Column::QStar => r.q_star_minus_one,
        Column::Coherence => r.final_coherence_ratio,
        Column::Work => r.work_quanta,
        Column::FrictionWork => r.friction_work_quanta,
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
        idx.sort_by(|&a, &b| {
            let ord = match (&results.candidates[a], &results.candidates[b]) {
                (Ok(x), Ok(y)) if self.sort == Column::Name => study.candidates[a].name.cmp(&study.candidates[b].name),
                (Ok(x), Ok(y)) => key(&x.evaluation.report, self.sort).total_cmp(&key(&y.evaluation.report, self.sort)),
                (Ok(_), Err(_)) => return std::cmp::Ordering::Less,
                (Err(_), Ok(_)) => return std::cmp::Ordering::Greater,
                (Err(_), Err(_)) => std::cmp::Ordering::Equal,
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
                        Ok(o) => {
                            let r = &o.evaluation.report;
                            let q = egui::RichText::new(sci(r.q_star_minus_one));
                            ui.label(if r.energy_diagonal { q.color(egui::Color32::from_rgb(30, 150, 70)) } else { q });
                            ui.label(sci(r.final_coherence_ratio));
                            ui.label(sci(r.work_quanta));
                            ui.label(sci(r.friction_work_quanta));
                            ui.label(sci(r.peak_energy_quanta));
                            let m = key(r, Column::MinOmega2);
                            ui.label(if m <= 0.0 {
                                egui::RichText::new(sci(m)).color(egui::Color32::from_rgb(200, 50, 50))
                            } else {
                                egui::RichText::new(sci(m))
                            });
                            ui.label(format!(
                                "{} {}",
                                sci(results.scale.x(r.duration_s)),
                                if results.scale.dimensionless { "/ω_i" } else { results.scale.time_unit }
                            ));
                            let b = broken(r);
                            ui.label(if b == 0 {
                                egui::RichText::new("none")
                            } else {
                                egui::RichText::new(format!("{b} stretch(es)"))
                                    .color(egui::Color32::from_rgb(210, 120, 0))
                            });
                        }
                        Err(e) => {
                            ui.colored_label(ui.visuals().error_fg_color, e);
                        }
                    }
                    ui.end_row();
                }
            });
        });
    }
}
