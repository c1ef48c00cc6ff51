//! How noise spoils the selected candidate: the final energy over the adiabatic one,
//! E_f / ((omega_f/omega_i) E_i), over a grid of dephasing rates and amplitude-noise
//! strengths, from the physics crate's noise map on a worker thread; a heat map of
//! log10(ratio − 1) with the tolerance contour.

use crate::error::AppError;
use crate::heatmap::FLOOR;
use crate::heatmap::{HeatGrid, HeatStyle, HeatTexture};
use crate::units::sci;
use crate::widgets::{Allowed, Kind, value_field};
use crate::worker::{Job, job_ui};
use egui::RichText;
use quenchless_physics::Noise;
use quenchless_physics::RampShape as _;
use quenchless_physics::design::{NoiseGrid, NoiseMap, noise_map};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_profile::study::RampSpec;
use quenchless_profile::{Study, convert};

/// A finished noise map.
#[derive(Debug, Clone, PartialEq)]
pub struct NoiseResult {
    /// Candidate name.
    pub candidate: String,
    /// Its spec at the time.
    pub spec: RampSpec,
    /// Tolerance on the ratio − 1.
    pub tolerance: f64,
    /// The map.
    pub map: NoiseMap,
}

impl NoiseResult {
    /// The map as a heat grid: x = dephasing rate [1/s], y = amplitude PSD [s].
    pub fn grid(&self) -> HeatGrid {
        HeatGrid {
            xs: self.map.dephasing_rates.clone(),
            ys: self.map.amplitude_psds.clone(),
            values: self.map.energy_ratio_minus_one.iter().map(|e| e.max(FLOOR).log10()).collect(),
        }
    }
}

/// State of the noise-map section.
#[derive(Debug)]
pub struct NoiseMapPanel {
    /// Largest dephasing rate, 1/s.
    pub max_dephasing_per_s: f64,
    /// Largest two-sided spectral density of fractional omega² noise, s.
    pub max_amplitude_psd_s: f64,
    /// Points per axis.
    pub points: usize,
    /// The job in progress.
    pub job: Option<Job<NoiseResult>>,
    /// The latest outcome.
    pub result: Option<Result<NoiseResult, AppError>>,
    texture: HeatTexture,
    /// The study the ranges were scaled to (they are scaled once per study).
    scaled_for: Option<String>,
}

impl Default for NoiseMapPanel {
    fn default() -> Self {
        Self {
            max_dephasing_per_s: 1e4,
            max_amplitude_psd_s: 1e-7,
            points: 21,
            job: None,
            result: None,
            texture: HeatTexture::default(),
            scaled_for: None,
        }
    }
}

/// Noise ranges that suit a ramp, so the tolerance contour falls inside the map. For
/// weak noise the excess energy grows linearly in each strength (first order in the
/// noise; for amplitude noise the heating rate omega² S/2 of T. A. Savard, K. M. O'Hara
/// and J. E. Thomas, Phys. Rev. A 56, R1095 (1997)), so one probe of each strength gives
/// the strength that uses up the tolerance; each range goes to three times that.
pub fn scaled_ranges(
    ramp: &quenchless_physics::Ramp,
    initial: &quenchless_physics::Moments,
    tolerance: f64,
) -> Option<(f64, f64)> {
    let opts = PropagationOptions::default();
    let tau = ramp.duration();
    let w2 = ramp.omega_initial().max(ramp.omega_final()).powi(2);
    let excess = |noise: Noise| quenchless_physics::design::energy_ratio_minus_one(ramp, initial, &noise, &opts).ok();
    let base = excess(Noise::NONE)?;
    let (g0, s0) = (tolerance / tau, tolerance / (w2 * tau));
    let reach =
        |probe: f64, e: f64| (e > base).then(|| 3.0 * probe * (tolerance - base.min(0.5 * tolerance)) / (e - base));
    let dephasing = reach(g0, excess(Noise::new(g0, 0.0).ok()?)?).unwrap_or(10.0 / tau);
    let psd = reach(s0, excess(Noise::new(0.0, s0).ok()?)?).unwrap_or(1e-7);
    (dephasing.is_finite() && psd.is_finite() && dephasing > 0.0 && psd > 0.0).then_some((dephasing, psd))
}

impl NoiseMapPanel {
    /// Collects the worker's result; never blocks.
    pub fn poll(&mut self) {
        if let Some(j) = self.job.as_mut()
            && let Some(r) = j.poll()
        {
            self.result = Some(r);
            self.job = None;
        }
    }

    /// Starts the map of candidate `index`.
    pub fn start(&mut self, study: &Study, index: usize, ctx: Option<egui::Context>) {
        let started = (|| {
            let c = study.candidates.get(index).ok_or_else(|| format!("noise map: no candidate number {index}"))?;
            let ramp = convert::candidate_ramp(c, index).map_err(|e| e.user_message())?;
            let initial =
                convert::initial_state(&study.initial_state, ramp.omega_initial()).map_err(|e| e.user_message())?;
            let grid = NoiseGrid {
                max_dephasing: self.max_dephasing_per_s,
                max_amplitude_psd: self.max_amplitude_psd_s,
                points: self.points,
            };
            let (candidate, spec, tolerance) = (c.name.clone(), c.ramp.clone(), study.tolerance);
            Job::start("noise-map", grid.points * grid.points, ctx, move |p| {
                let map =
                    noise_map(&ramp, &initial, &grid, &PropagationOptions::default(), &|n| p.set(n), p.cancel_flag())?;
                Ok(NoiseResult { candidate, spec, tolerance, map })
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

    /// Scales the ranges to the study's selected candidate the first time a study is
    /// shown (a typed range is kept until another study is opened).
    fn scale_to(&mut self, study: &Study, selected: usize) {
        if self.scaled_for.as_deref() == Some(study.name.as_str()) {
            return;
        }
        if let Some(ramp) = study.candidates.get(selected).and_then(|c| convert::candidate_ramp(c, selected).ok())
            && let Ok(initial) = convert::initial_state(&study.initial_state, ramp.omega_initial())
            && let Some(ranges) = scaled_ranges(&ramp, &initial, study.tolerance)
        {
            (self.max_dephasing_per_s, self.max_amplitude_psd_s) = ranges;
        }
        self.scaled_for = Some(study.name.clone());
    }

    /// Draws the section: settings and figures on the left, the map on the right.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &Study, selected: usize) {
        let Some(c) = study.candidates.get(selected) else {
            ui.label("No candidate to map: add one first.");
            return;
        };
        self.scale_to(study, selected);
        let w = ui.available_width();
        let left = (0.3 * w).clamp(240.0, 420.0);
        let right = (w - left - 3.0 * ui.spacing().item_spacing.x).max(200.0);
        ui.horizontal_top(|ui| {
            ui.vertical(|ui| {
                ui.set_width(left);
                ui.label(format!(
                    "“{}” as designed, from the study's initial state, with dephasing and amplitude noise.",
                    c.name
                ));
                value_field(
                    ui,
                    "Largest dephasing rate [1/s]",
                    &mut self.max_dephasing_per_s,
                    Kind::Number,
                    Allowed::Positive,
                );
                value_field(
                    ui,
                    "Largest amplitude-noise density [s]",
                    &mut self.max_amplitude_psd_s,
                    Kind::Number,
                    Allowed::Positive,
                );
                ui.add(egui::Slider::new(&mut self.points, 3..=61).text("noise points per axis"));
                if ui.add_enabled(self.job.is_none(), egui::Button::new("Compute noise map")).clicked() {
                    let ctx = ui.ctx().clone();
                    self.start(study, selected, Some(ctx));
                }
                job_ui(ui, self.job.as_ref(), "Cancel noise map");
                match &self.result {
                    Some(Ok(r)) => {
                        let within = r.map.energy_ratio_minus_one.iter().filter(|e| **e <= r.tolerance).count();
                        ui.label(
                            RichText::new(format!(
                                "“{}”: {:.1} % of the grid ends within E/E_ad − 1 ≤ {}",
                                r.candidate,
                                100.0 * within as f64 / r.map.energy_ratio_minus_one.len().max(1) as f64,
                                sci(r.tolerance)
                            ))
                            .strong(),
                        );
                        if c.name != r.candidate || c.ramp != r.spec {
                            ui.colored_label(ui.visuals().warn_fg_color, "The ramp changed since: compute it again.");
                        }
                    }
                    Some(Err(e)) => {
                        ui.colored_label(ui.visuals().error_fg_color, format!("Noise map: {e}"));
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
                            id: "noise",
                            x_label: "dephasing rate γ_φ [1/s]",
                            y_label: "amplitude-noise density S [s]",
                            value_label: "log₁₀(E/E_ad − 1)",
                            contour: Some((r.tolerance.log10(), "tolerance contour")),
                            mark: None,
                            height: 260.0,
                        },
                    );
                }
            });
        });
    }
}
