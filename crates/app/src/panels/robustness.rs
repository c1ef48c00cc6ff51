//! Robustness of the selected candidate as played: Q* over a grid of calibration
//! errors e (every omega scaled by 1 + e) and duration errors d (the ramp stretched by
//! 1 + d), from the physics crate's robustness map on the played table, on a worker
//! thread. Shown as a heat map of log10(Q* − 1) with the tolerance contour.

use crate::edits::playback_of;
use crate::error::AppError;
use crate::heatmap::FLOOR;
use crate::heatmap::{HeatGrid, HeatStyle, HeatTexture};
use crate::units::sci;
use crate::widgets::{Allowed, Kind, value_field};
use crate::worker::{Job, job_ui};
use egui::RichText;
use quenchless_physics::design::{RobustnessGrid, RobustnessMap, robustness_map};
use quenchless_physics::playback::play;
use quenchless_physics::propagate::PropagationOptions;
use quenchless_profile::study::{GeneratorSpec, RampSpec};
use quenchless_profile::{Study, convert};

/// A finished map with what it was computed for.
#[derive(Debug, Clone, PartialEq)]
pub struct RobustnessResult {
    /// Candidate name.
    pub candidate: String,
    /// Its spec at the time.
    pub spec: RampSpec,
    /// Generator settings it was played with.
    pub settings: GeneratorSpec,
    /// Tolerance on Q* - 1.
    pub tolerance: f64,
    /// The map.
    pub map: RobustnessMap,
}

impl RobustnessResult {
    /// The map as a heat grid: x = e in %, y = d in %, value log10(Q* − 1).
    pub fn grid(&self) -> HeatGrid {
        HeatGrid {
            xs: self.map.calibration_errors.iter().map(|e| 100.0 * e).collect(),
            ys: self.map.duration_errors.iter().map(|d| 100.0 * d).collect(),
            values: self.map.q_star_minus_one.iter().map(|e| e.max(FLOOR).log10()).collect(),
        }
    }

    /// Q* - 1 at the centre of the grid (no error), when the grid has a centre point.
    pub fn centre_q_star_minus_one(&self) -> Option<f64> {
        let n = self.map.calibration_errors.len();
        (n % 2 == 1).then(|| self.map.q_star_minus_one[(n / 2) * n + n / 2])
    }
}

/// State of the robustness section.
#[derive(Debug)]
pub struct RobustnessPanel {
    /// Largest |calibration error|, percent.
    pub calibration_percent: f64,
    /// Largest |duration error|, percent.
    pub duration_percent: f64,
    /// Points per axis.
    pub points: usize,
    /// The job in progress.
    pub job: Option<Job<RobustnessResult>>,
    /// The latest outcome.
    pub result: Option<Result<RobustnessResult, AppError>>,
    texture: HeatTexture,
}

impl Default for RobustnessPanel {
    fn default() -> Self {
        Self {
            calibration_percent: 5.0,
            duration_percent: 5.0,
            points: 41,
            job: None,
            result: None,
            texture: HeatTexture::default(),
        }
    }
}

impl RobustnessPanel {
    /// Collects the worker's result; never blocks.
    pub fn poll(&mut self) {
        if let Some(j) = self.job.as_mut()
            && let Some(r) = j.poll()
        {
            self.result = Some(r);
            self.job = None;
        }
    }

    /// Starts the map of candidate `index` played with `settings`.
    pub fn start(&mut self, study: &Study, index: usize, settings: &GeneratorSpec, ctx: Option<egui::Context>) {
        let started = (|| {
            for (name, v) in
                [("calibration error range", self.calibration_percent), ("duration error range", self.duration_percent)]
            {
                if !(v.is_finite() && (0.0..90.0).contains(&v)) {
                    return Err(AppError::from(format!(
                        "robustness map: {name} = {} % is not allowed: 0 to 90 %",
                        sci(v)
                    )));
                }
            }
            if !(2..=2048).contains(&self.points) {
                return Err(AppError::from(format!(
                    "robustness map: {} points per axis is not allowed: 2 to 2048",
                    self.points
                )));
            }
            let pb = playback_of(settings)?;
            let c =
                study.candidates.get(index).ok_or_else(|| format!("robustness map: no candidate number {index}"))?;
            let ramp = convert::candidate_ramp(c, index).map_err(|e| e.user_message())?;
            // Every axis of the trap model: each point is the worst axis's.
            let others: Vec<_> = convert::trap_model(&study.trap)
                .map_err(|e| e.user_message())?
                .trap_axes()
                .into_iter()
                .skip(1)
                .map(|a| a.law)
                .collect();
            let grid = RobustnessGrid {
                calibration: self.calibration_percent / 100.0,
                duration: self.duration_percent / 100.0,
                points: self.points,
            };
            let (candidate, spec, settings, tolerance) =
                (c.name.clone(), c.ramp.clone(), settings.clone(), study.tolerance);
            Job::start("robustness-map", grid.points * grid.points, ctx, move |p| {
                p.note("playing the ramp");
                let played = play(&ramp, &pb, tolerance).map_err(|e| format!("cannot play it: {e}"))?;
                p.note("");
                let map = robustness_map(
                    &played,
                    &grid,
                    &others,
                    &PropagationOptions::default(),
                    &|n| p.set(n),
                    p.cancel_flag(),
                )?;
                Ok(RobustnessResult { candidate, spec, settings, tolerance, map })
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

    /// Draws the section: settings and figures on the left, the map on the right.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &Study, selected: usize, settings: &GeneratorSpec) {
        let Some(c) = study.candidates.get(selected) else {
            ui.label("No candidate to map: add one first.");
            return;
        };
        let w = ui.available_width();
        let left = (0.3 * w).clamp(240.0, 420.0);
        let right = (w - left - 3.0 * ui.spacing().item_spacing.x).max(200.0);
        ui.horizontal_top(|ui| {
            ui.vertical(|ui| {
                ui.set_width(left);
                ui.label(format!(
                    "“{}” as played at {} samples/s (the generator settings); every ω scaled by 1 + e, the duration by 1 + d.",
                    c.name,
                    sci(settings.sample_rate_per_s)
                ));
                value_field(ui, "Calibration error ± [%]", &mut self.calibration_percent, Kind::Number, Allowed::NonNegative);
                value_field(ui, "Duration error ± [%]", &mut self.duration_percent, Kind::Number, Allowed::NonNegative);
                ui.add(egui::Slider::new(&mut self.points, 5..=121).text("points per axis"));
                ui.small("An odd number of points puts a grid point at zero error.");
                if ui.add_enabled(self.job.is_none(), egui::Button::new("Compute robustness map")).clicked() {
                    let ctx = ui.ctx().clone();
                    self.start(study, selected, settings, Some(ctx));
                }
                job_ui(ui, self.job.as_ref(), "Cancel robustness map");
                match &self.result {
                    Some(Ok(r)) => {
                        let frac = r.map.fraction_within(r.tolerance);
                        ui.label(
                            RichText::new(format!(
                                "“{}”: {:.1} % of the grid within Q* − 1 ≤ {}",
                                r.candidate,
                                100.0 * frac,
                                sci(r.tolerance)
                            ))
                            .strong(),
                        );
                        if let Some(e) = r.centre_q_star_minus_one() {
                            ui.label(format!("At zero error Q* − 1 = {}", sci(e)));
                        }
                        if c.name != r.candidate || c.ramp != r.spec || r.settings != *settings {
                            ui.colored_label(
                                ui.visuals().warn_fg_color,
                                "The ramp or the generator settings changed since: compute it again.",
                            );
                        }
                    }
                    Some(Err(e)) => {
                        ui.colored_label(ui.visuals().error_fg_color, format!("Robustness map: {e}"));
                    }
                    None => {}
                }
            });
            ui.vertical(|ui| {
                ui.set_width(right);
                if let Some(Ok(r)) = &self.result {
                    let grid = r.grid();
                    let range = grid.colour_range();
                    self.texture.ui(
                        ui,
                        &grid,
                        range,
                        &HeatStyle {
                            id: "robustness",
                            x_label: "calibration error e [%]",
                            y_label: "duration error d [%]",
                            value_label: "log₁₀(Q* − 1)",
                            contour: Some((r.tolerance.log10(), "tolerance contour")),
                            mark: None,
                            height: 280.0,
                        },
                    );
                }
            });
        });
    }
}
