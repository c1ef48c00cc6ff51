//! The anharmonic check of the selected candidate in the app: every axis of the study's
//! trap model propagated as a wavefunction in its real well (the physics crate's
//! split-step solver, on a worker thread with progress and cancel), the excess energy
//! and fidelity beside the harmonic figures, the ground component's density over x and
//! t, and the well with its levels at the start and the end.

use crate::error::AppError;
use crate::heatmap::{HeatGrid, HeatStyle, HeatTexture};
use crate::units::{DisplayScale, sci};
use crate::worker::{Job, job_ui};
use egui::RichText;
use egui_plot::{Legend, Line, Plot, PlotPoints};
use quenchless_physics::anharmonic::{AxisCheck, AxisProblem, CheckSettings, check_axis};
use quenchless_physics::constants::HBAR;
use quenchless_physics::diagnostics::Verdict;
use quenchless_profile::convert::{self, AxisToCheck, well_words};
use quenchless_profile::study::RampSpec;
use quenchless_profile::{ProfileError, Study};

/// Progress units per axis.
const UNITS_PER_AXIS: usize = 1000;

/// One checked axis.
#[derive(Debug, Clone)]
pub struct CheckedAxis {
    /// What was checked.
    pub axis: AxisToCheck,
    /// The check.
    pub check: AxisCheck,
}

/// A finished check of one candidate.
#[derive(Debug, Clone)]
pub struct RealWellsResult {
    /// Candidate name.
    pub candidate: String,
    /// Its spec at the time.
    pub spec: RampSpec,
    /// Every axis, reference first.
    pub axes: Vec<CheckedAxis>,
}

/// State of the section.
#[derive(Debug, Default)]
pub struct RealWellsPanel {
    /// The job in progress.
    pub job: Option<Job<RealWellsResult>>,
    /// The latest outcome.
    pub result: Option<Result<RealWellsResult, AppError>>,
    /// Which axis the pictures show.
    shown: usize,
    texture: HeatTexture,
}

impl RealWellsPanel {
    /// Collects the worker's result; never blocks.
    pub fn poll(&mut self) {
        if let Some(j) = self.job.as_mut()
            && let Some(r) = j.poll()
        {
            self.result = Some(r);
            self.job = None;
            self.shown = 0;
        }
    }

    /// Starts the check of candidate `index` on every axis of the study's trap model.
    pub fn start(&mut self, study: &Study, index: usize, ctx: Option<egui::Context>) {
        let started = (|| {
            let c = study.candidates.get(index).ok_or_else(|| format!("real wells: no candidate number {index}"))?;
            let ramp = convert::candidate_ramp(c, index).map_err(|e| e.user_message())?;
            let axes = convert::axes_to_check(study, &ramp).map_err(|e: ProfileError| e.user_message())?;
            let settings = CheckSettings { tolerance: study.tolerance, keep_density: true, ..CheckSettings::default() };
            let (candidate, spec) = (c.name.clone(), c.ramp.clone());
            Job::start("real-wells", UNITS_PER_AXIS * axes.len(), ctx, move |p| {
                let mut out = Vec::with_capacity(axes.len());
                for (k, axis) in axes.into_iter().enumerate() {
                    p.note(format!("the {} axis", axis.name));
                    let problem = AxisProblem {
                        ramp: &ramp,
                        gain: axis.law.gain,
                        offset_omega2: axis.law.offset_omega2,
                        mass_kg: axis.mass_kg,
                        well: axis.well,
                        occupation: axis.occupation,
                    };
                    let mut progress = |f: f64| {
                        p.set(k * UNITS_PER_AXIS + (f * UNITS_PER_AXIS as f64) as usize);
                        !p.cancelled()
                    };
                    let check = check_axis(&problem, &settings, &mut progress)
                        .map_err(|e| AppError::from(format!("the {} axis: {e}", axis.name)))?;
                    out.push(CheckedAxis { axis, check });
                }
                p.note("");
                Ok(RealWellsResult { candidate, spec, axes: out })
            })
        })();
        match started {
            Ok(j) => {
                self.job = Some(j);
                self.result = None;
            }
            Err(e) => self.result = Some(Err(e)),
        }
    }

    /// Draws the section.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &Study, scale: &DisplayScale, selected: usize) {
        let Some(c) = study.candidates.get(selected) else {
            ui.label("No candidate to check: add one first.");
            return;
        };
        if study.trap.model.is_none() {
            ui.label(
                "The study states no trap model, so there is no real well to check in: describe the trap under \
                 “Trap model: axes and wells” on the left (a tweezer, or axes with their well shapes).",
            );
            return;
        }
        ui.label(format!(
            "“{}” in the real wells of every axis, each on a 1D cut through the trap centre (couplings between \
             axes and between atoms left out).",
            c.name
        ));
        ui.horizontal(|ui| {
            if ui.add_enabled(self.job.is_none(), egui::Button::new("Check in the real wells")).clicked() {
                let ctx = ui.ctx().clone();
                self.start(study, selected, Some(ctx));
            }
            job_ui(ui, self.job.as_ref(), "Cancel check");
        });
        let shown = &mut self.shown;
        match &self.result {
            Some(Ok(r)) => {
                if c.name != r.candidate || c.ramp != r.spec {
                    ui.colored_label(ui.visuals().warn_fg_color, "The ramp changed since: check it again.");
                }
                results_table(ui, r);
                if r.axes.len() > 1 {
                    ui.horizontal(|ui| {
                        ui.label("Pictures of the");
                        for (k, a) in r.axes.iter().enumerate() {
                            ui.selectable_value(shown, k, format!("{} axis", a.axis.name));
                        }
                    });
                }
                if let Some(a) = r.axes.get((*shown).min(r.axes.len().saturating_sub(1))) {
                    pictures(ui, a, scale, &mut self.texture);
                }
            }
            Some(Err(e)) => {
                ui.colored_label(ui.visuals().error_fg_color, format!("Real wells: {e}"));
            }
            None => {}
        }
    }
}

fn results_table(ui: &mut egui::Ui, r: &RealWellsResult) {
    egui::Grid::new("real-wells-table").striped(true).spacing([12.0, 4.0]).show(ui, |ui| {
        for title in [
            "axis",
            "well",
            "E/E_ad − 1",
            "harmonic Q* − 1",
            "ground fidelity",
            "harmonic",
            "lost",
            "shallowest",
            "error est.",
            "verdict",
        ] {
            ui.strong(title);
        }
        ui.end_row();
        for a in &r.axes {
            let c = &a.check;
            ui.label(&a.axis.name);
            ui.label(well_words(&a.axis.well));
            ui.label(sci(c.energy_ratio_minus_one));
            ui.label(sci(c.harmonic_q_star_minus_one));
            ui.label(format!("{:.9}", c.ground_fidelity));
            ui.label(format!("{:.9}", (2.0 / (2.0 + c.harmonic_q_star_minus_one)).sqrt()));
            ui.label(sci(c.lost_fraction));
            ui.label(c.min_depth_quanta.map_or_else(|| "no edge".into(), |d| format!("{} quanta", sci(d))));
            let est = RichText::new(sci(c.error_estimate));
            ui.label(if c.accuracy_reached { est } else { est.color(ui.visuals().warn_fg_color) }).on_hover_text(
                if c.accuracy_reached { "within the 1e-8 target" } else { "the 1e-8 target was not reached" },
            );
            let v = c.verdict();
            let colour =
                if v == Verdict::Pass { crate::colours::pass(ui.visuals()) } else { ui.visuals().error_fg_color };
            ui.label(RichText::new(v.word()).strong().color(colour));
            ui.end_row();
        }
    });
}

/// The ground component's density over t and x, and the well with its levels.
fn pictures(ui: &mut egui::Ui, a: &CheckedAxis, scale: &DisplayScale, texture: &mut HeatTexture) {
    let c = &a.check;
    let w = ui.available_width();
    ui.horizontal_top(|ui| {
        ui.vertical(|ui| {
            ui.set_width(0.55 * w);
            if let Some(d) = &c.density {
                let peak = d.density_per_m.iter().flatten().copied().fold(0.0, f64::max).max(f64::MIN_POSITIVE);
                // Only the rows where the density ever reaches 1e-4 of its peak (with a
                // margin), so a narrow state fills the picture.
                let seen: Vec<usize> = (0..d.x_m.len())
                    .filter(|&ix| d.density_per_m.iter().any(|f| f.get(ix).is_some_and(|v| *v >= 1e-4 * peak)))
                    .collect();
                let (lo, hi) = match (seen.first(), seen.last()) {
                    (Some(&a), Some(&b)) => {
                        let pad = ((b - a) / 8).max(2);
                        (a.saturating_sub(pad), (b + pad).min(d.x_m.len() - 1))
                    }
                    _ => (0, d.x_m.len().saturating_sub(1)),
                };
                // Rows are positions (y), columns times (x): values[iy * nx + ix].
                let mut values = Vec::with_capacity((hi + 1 - lo) * d.times_s.len());
                for ix in lo..=hi {
                    for frame in &d.density_per_m {
                        values.push(frame.get(ix).copied().unwrap_or(f64::NAN) / peak);
                    }
                }
                let grid = HeatGrid {
                    xs: d.times_s.iter().map(|t| scale.x(*t)).collect(),
                    ys: d.x_m[lo..=hi].iter().map(|x| x * 1e6).collect(),
                    values,
                };
                let x_label =
                    if scale.dimensionless { "time t ω_i".to_string() } else { format!("time [{}]", scale.time_unit) };
                texture.ui(
                    ui,
                    &grid,
                    (0.0, 1.0),
                    &HeatStyle {
                        id: "real-wells-density",
                        x_label: &x_label,
                        y_label: "position x [µm]",
                        value_label: "|ψ₀(x, t)|² / its peak",
                        contour: None,
                        mark: None,
                        height: 240.0,
                    },
                );
            }
        });
        ui.vertical(|ui| {
            let quantum = HBAR * c.start.omega_rad_s;
            // Energies up to twice the top level used (at least 4 quanta): the levels
            // and the bottom of the wells, where the state lives.
            let top = c.start.levels_j.iter().chain(&c.end.levels_j).copied().fold(0.0, f64::max) / quantum;
            let ceiling = (2.0 * top).max(4.0);
            let curve = |x: &[f64], v: &[f64]| -> PlotPoints<'static> {
                x.iter()
                    .zip(v)
                    .filter(|(_, v)| **v / quantum <= ceiling)
                    .map(|(x, v)| [x * 1e6, v / quantum])
                    .collect::<Vec<_>>()
                    .into()
            };
            // A level spans the well at its energy (the classical turning points).
            let span = |x: &[f64], v: &[f64], e: f64| {
                let inside: Vec<f64> = x.iter().zip(v).filter(|(_, v)| **v <= e).map(|(x, _)| x * 1e6).collect();
                (inside.first().copied().unwrap_or(0.0), inside.last().copied().unwrap_or(0.0))
            };
            Plot::new("real-wells-levels")
                .height(240.0)
                .x_axis_label("position x [µm]")
                .y_axis_label(format!("energy [ħω at the start, {}]", a.axis.name))
                .x_axis_formatter(crate::units::axis_ticks)
                .y_axis_formatter(crate::units::axis_ticks)
                .x_grid_spacer(crate::units::few_ticks)
                .y_grid_spacer(crate::units::few_ticks)
                .include_y(0.0)
                .include_y(ceiling)
                .allow_scroll(false)
                .legend(Legend::default())
                .show(ui, |pui| {
                    for (pic, name, stroke) in [(&c.start, "well at the start", 2.0), (&c.end, "well at the end", 1.2)]
                    {
                        pui.line(Line::new(name, curve(&pic.x_m, &pic.potential_j)).width(stroke));
                        for e in &pic.levels_j {
                            let (x0, x1) = span(&pic.x_m, &pic.potential_j, *e);
                            let y = e / quantum;
                            pui.line(Line::new("", vec![[x0, y], [x1, y]]).width(0.8 * stroke));
                        }
                    }
                });
            ui.small("Horizontal lines: the levels of the mixture in each well (thermal weights ≥ 1e-12).");
        });
    });
}
