//! Spline optimisation of the selected spline candidate: the physics crate moves its
//! free knots (the end knots and every knot time stay) until Q* − 1 is below a
//! target inside the trap's limits, optionally for the worst point of a calibration
//! band (robust design). On a worker thread; the result replaces the knots or becomes
//! a new candidate, one undo step either way.

use crate::edits::{next_colour, unique_name};
use crate::error::AppError;
use crate::units::sci;
use crate::widgets::{Allowed, Kind, value_field};
use crate::worker::{Job, job_ui};
use egui::RichText;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::{SplineFit, SplineTargets, optimise_spline};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_physics::ramp::Ramp;
use quenchless_profile::study::{CandidateRamp, KnotSpec, RampSpec};
use quenchless_profile::{Study, convert};

/// A finished optimisation.
#[derive(Debug, Clone, PartialEq)]
pub struct FitResult {
    /// The candidate it started from.
    pub candidate: String,
    /// Its spec at the start.
    pub start: RampSpec,
    /// The optimised spec (same shape flags and knot times).
    pub spec: RampSpec,
    /// What the physics crate reported.
    pub fit: SplineFit,
    /// Target asked for.
    pub target: f64,
}

/// State of the spline-optimiser section.
#[derive(Debug)]
pub struct SplineFitPanel {
    /// Target Q* − 1.
    pub target: f64,
    /// Robust design over ± this calibration error, percent (None: nominal only).
    pub band_percent: Option<f64>,
    /// Calibration errors sampled across the band (odd).
    pub band_points: f64,
    /// Most Nelder–Mead iterations.
    pub max_iterations: f64,
    /// The job in progress.
    pub job: Option<Job<FitResult>>,
    /// The latest outcome.
    pub result: Option<Result<FitResult, AppError>>,
    /// What happened to the latest result.
    pub applied: Option<String>,
}

impl Default for SplineFitPanel {
    fn default() -> Self {
        Self {
            target: 1e-6,
            band_percent: None,
            band_points: 5.0,
            max_iterations: 3000.0,
            job: None,
            result: None,
            applied: None,
        }
    }
}

fn whole(name: &str, v: f64, lo: f64, hi: f64) -> Result<u64, String> {
    if v.is_finite() && v.fract() == 0.0 && (lo..=hi).contains(&v) {
        Ok(v as u64)
    } else {
        Err(format!("spline optimiser: {name} = {} is not allowed: a whole number from {lo} to {hi}", sci(v)))
    }
}

impl SplineFitPanel {
    /// Collects the worker's result; never blocks.
    pub fn poll(&mut self) {
        if let Some(j) = self.job.as_mut()
            && let Some(r) = j.poll()
        {
            self.result = Some(r);
            self.job = None;
        }
    }

    /// Starts optimising candidate `index` (a spline).
    pub fn start(&mut self, study: &Study, index: usize, ctx: Option<egui::Context>) {
        self.applied = None;
        let started = (|| {
            let c =
                study.candidates.get(index).ok_or_else(|| format!("spline optimiser: no candidate number {index}"))?;
            let RampSpec::Spline { shape, log_frequency, flat_ends, .. } = c.ramp.clone() else {
                return Err(AppError::from(format!(
                    "spline optimiser: “{}” is a {} ramp; the optimiser moves spline knots",
                    c.name,
                    c.ramp.family_label()
                )));
            };
            let Ramp::Spline(start) = convert::candidate_ramp(c, index).map_err(|e| e.user_message())? else {
                return Err(AppError::from("spline optimiser: the candidate is not a spline"));
            };
            if !(self.target.is_finite() && self.target > 0.0 && self.target < 1.0) {
                return Err(AppError::from(format!(
                    "spline optimiser: target Q* − 1 = {} is not allowed: a number between 0 and 1",
                    sci(self.target)
                )));
            }
            let band = match self.band_percent {
                Some(b) if !(b > 0.0 && b < 50.0) => {
                    return Err(AppError::from(format!(
                        "spline optimiser: calibration band = ± {} % is not allowed: above 0 and below 50 %",
                        sci(b)
                    )));
                }
                Some(b) => Some(b / 100.0),
                None => None,
            };
            let band_points = whole("band points", self.band_points, 3.0, 41.0)? as usize;
            if band.is_some() && band_points.is_multiple_of(2) {
                return Err(AppError::from(format!(
                    "spline optimiser: band points = {band_points} is not allowed: an odd number"
                )));
            }
            let targets = SplineTargets {
                target: self.target,
                limits: convert::limits(&study.trap).map_err(|e| e.user_message())?,
                calibration_band: band,
                band_points,
                max_iterations: whole("iteration limit", self.max_iterations, 1.0, 1e6)?,
                // Every axis of the trap model: the search brings down the worst axis.
                other_axes: convert::trap_model(&study.trap)
                    .map_err(|e| e.user_message())?
                    .trap_axes()
                    .into_iter()
                    .skip(1)
                    .map(|a| a.law)
                    .collect(),
            };
            // The search needs Q* well below its target (as the headless `design spline`).
            let opts = PropagationOptions::with_accuracy((1e-3 * self.target).clamp(1e-13, 1e-9))?;
            let (candidate, start_spec, target) = (c.name.clone(), c.ramp.clone(), self.target);
            Job::start("spline-optimiser", 0, ctx, move |p| {
                let progress = |evals: u64, best: f64| {
                    p.note(format!("{evals} Q* evaluations, best Q* − 1 = {}", sci(best)));
                };
                let fit = optimise_spline(&start, &targets, &opts, &progress, p.cancel_flag())?;
                let knots = fit
                    .ramp
                    .times()
                    .iter()
                    .zip(fit.ramp.omegas())
                    .map(|(&t_s, &w)| KnotSpec { t_s, frequency_hz: w / TWO_PI })
                    .collect();
                let spec = RampSpec::Spline { knots, shape, log_frequency, flat_ends };
                Ok(FitResult { candidate, start: start_spec, spec, fit, target })
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

    /// Replaces the knots of the candidate the fit started from. Refused if that
    /// candidate changed since (its work would be lost).
    pub fn replace(&mut self, study: &mut Study) -> Result<usize, AppError> {
        let Some(Ok(r)) = &self.result else { return Err(AppError::from("spline optimiser: no result to use")) };
        let Some(i) = study.candidates.iter().position(|c| c.name == r.candidate) else {
            return Err(AppError::from(format!("spline optimiser: “{}” is no longer in the study", r.candidate)));
        };
        if study.candidates[i].ramp != r.start {
            return Err(AppError::from(format!(
                "spline optimiser: “{}” changed since the optimisation started; add the result as a new candidate instead",
                r.candidate
            )));
        }
        study.candidates[i].ramp = r.spec.clone();
        Ok(i)
    }

    /// Adds the optimised ramp as a new candidate; returns its index.
    pub fn add(&mut self, study: &mut Study) -> Result<usize, AppError> {
        let Some(Ok(r)) = &self.result else { return Err(AppError::from("spline optimiser: no result to use")) };
        let name = unique_name(study, &format!("{} (optimised)", r.candidate));
        let colour = Some(next_colour(study));
        study.candidates.push(CandidateRamp { name, visible: true, colour, ramp: r.spec.clone() });
        Ok(study.candidates.len() - 1)
    }

    /// Draws the section.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &mut Study, selected: &mut usize) {
        let Some(c) = study.candidates.get(*selected) else {
            ui.label("No candidate: add a spline first.");
            return;
        };
        let is_spline = matches!(&c.ramp, RampSpec::Spline { knots, .. } if knots.len() >= 3);
        if is_spline {
            ui.label(format!(
                "Moves the inner knots of “{}” up and down (times and end knots stay) inside the trap's limits.",
                c.name
            ));
        } else {
            ui.label("Select a spline candidate with at least three knots to optimise it.");
        }
        ui.horizontal(|ui| {
            value_field(ui, "Target Q* − 1", &mut self.target, Kind::Number, Allowed::Positive);
            value_field(ui, "Iteration limit", &mut self.max_iterations, Kind::Whole, Allowed::Positive);
        });
        ui.horizontal(|ui| {
            crate::widgets::optional_field(
                ui,
                "Robust over a calibration band ± [%]",
                &mut self.band_percent,
                Kind::Number,
                2.0,
            );
            if self.band_percent.is_some() {
                value_field(ui, "Band points", &mut self.band_points, Kind::Whole, Allowed::Positive);
            }
        });
        if ui.add_enabled(is_spline && self.job.is_none(), egui::Button::new("Optimise the inner knots")).clicked() {
            let ctx = ui.ctx().clone();
            self.start(study, *selected, Some(ctx));
        }
        job_ui(ui, self.job.as_ref(), "Cancel optimisation");
        let mut action = None;
        match &self.result {
            Some(Ok(r)) => {
                let f = &r.fit;
                egui::Grid::new("spline-fit-figures").num_columns(2).striped(true).show(ui, |ui| {
                    let mut row = |k: &str, v: String| {
                        ui.label(k);
                        ui.label(RichText::new(v).monospace());
                        ui.end_row();
                    };
                    row("started from", format!("“{}”", r.candidate));
                    row("Q* − 1 at the start", sci(f.start_q_star_minus_one));
                    row("Q* − 1 optimised", sci(f.q_star_minus_one));
                    if let Some(w) = f.worst_q_star_minus_one {
                        row("worst Q* − 1 over the band", sci(w));
                    }
                    row("target", sci(r.target));
                    row("iterations · Q* evaluations", format!("{} · {}", f.iterations, f.evaluations));
                });
                let (text, colour) = match (f.reached, f.within_limits) {
                    (true, true) => ("Target reached inside the limits", crate::colours::pass(ui.visuals())),
                    (false, true) => ("Target NOT reached (best found shown)", ui.visuals().error_fg_color),
                    (_, false) => ("The result breaks the trap's limits", ui.visuals().warn_fg_color),
                };
                ui.label(RichText::new(text).strong().color(colour));
                ui.horizontal(|ui| {
                    if ui.button(format!("Replace the knots of “{}”", r.candidate)).clicked() {
                        action = Some(true);
                    }
                    if ui.button("Add it as a new candidate").clicked() {
                        action = Some(false);
                    }
                });
            }
            Some(Err(e)) => {
                ui.colored_label(ui.visuals().error_fg_color, format!("Spline optimiser: {e}"));
            }
            None => {}
        }
        match action {
            Some(true) => match self.replace(study) {
                Ok(i) => {
                    *selected = i;
                    self.applied = Some("Knots replaced (undo brings the old ones back)".into());
                }
                Err(e) => self.applied = Some(e.to_string()),
            },
            Some(false) => match self.add(study) {
                Ok(i) => {
                    *selected = i;
                    self.applied = Some("Added as a new candidate".into());
                }
                Err(e) => self.applied = Some(e.to_string()),
            },
            None => {}
        }
        if let Some(a) = &self.applied {
            ui.label(a);
        }
    }
}
