//! The split of the cycle time that gives the most power: the physics crate's cycle
//! optimiser for a chosen family of work strokes, on a worker thread. Shows the
//! efficiency at maximum power beside 1 − ω_c/ω_h and 1 − √(T_c/T_h), marks the
//! optimum on the power map, and applies it to the study's cycle on request.

use crate::error::AppError;
use crate::units::sci;
use crate::widgets::{Allowed, Kind, value_field};
use crate::worker::{Job, job_ui};
use egui::RichText;
use quenchless_physics::design::StrokeTime;
use quenchless_physics::design::{CycleOptimum, CycleTuning, StrokeFamily, optimise_cycle};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_profile::study::CycleSpec;
use quenchless_profile::units::{Quantity, format_quantity};
use quenchless_profile::{Study, convert};

/// Families offered for the work strokes.
pub const FAMILIES: [StrokeFamily; 4] =
    [StrokeFamily::Shortcut, StrokeFamily::ConstantMu, StrokeFamily::Linear, StrokeFamily::IdealAdiabatic];

/// A finished tuning with what it started from.
#[derive(Debug, Clone, PartialEq)]
pub struct TuneResult {
    /// The cycle spec it started from (a changed cycle makes it stale).
    pub start: CycleSpec,
    /// Family of the work strokes.
    pub family: StrokeFamily,
    /// Whether omega_c/omega_h was varied.
    pub vary_ratio: bool,
    /// The optimum.
    pub best: CycleOptimum,
}

impl TuneResult {
    /// Time of a stroke axis at the optimum, s.
    pub fn time_of(&self, axis: StrokeTime) -> f64 {
        let [th, te, tc, tk] = self.best.stroke_times;
        match axis {
            StrokeTime::HotContact => th,
            StrokeTime::Expansion => te,
            StrokeTime::ColdContact => tc,
            StrokeTime::Compression => tk,
        }
    }

    /// The cycle spec of the optimum.
    pub fn spec(&self) -> CycleSpec {
        convert::optimum_cycle_spec(&self.start, &self.best, self.family, self.vary_ratio)
    }
}

/// State of the tuning section.
#[derive(Debug)]
pub struct CycleTuningPanel {
    /// Family of the work strokes.
    pub family: StrokeFamily,
    /// Keep the cycle's total time (else optimise it too).
    pub keep_total: bool,
    /// Also vary omega_c/omega_h.
    pub vary_ratio: bool,
    /// Most Nelder–Mead iterations.
    pub max_iterations: f64,
    /// The job in progress.
    pub job: Option<Job<TuneResult>>,
    /// The latest outcome.
    pub result: Option<Result<TuneResult, AppError>>,
}

impl Default for CycleTuningPanel {
    fn default() -> Self {
        Self {
            family: StrokeFamily::Shortcut,
            keep_total: true,
            vary_ratio: false,
            max_iterations: 1500.0,
            job: None,
            result: None,
        }
    }
}

impl CycleTuningPanel {
    /// Collects the worker's result; never blocks.
    pub fn poll(&mut self) {
        if let Some(j) = self.job.as_mut()
            && let Some(r) = j.poll()
        {
            self.result = Some(r);
            self.job = None;
        }
    }

    /// The optimum when it belongs to the study's current cycle.
    pub fn current(&self, study: &Study) -> Option<&TuneResult> {
        match (&self.result, &study.cycle) {
            (Some(Ok(r)), Some(c)) if r.start == *c => Some(r),
            _ => None,
        }
    }

    /// Starts the optimiser on the study's cycle.
    ///
    /// Ideal adiabatic strokes keep the study's shorter work-stroke time as their
    /// minimum (see [`ideal_stroke_floor`]).
    pub fn start(&mut self, study: &Study, ctx: Option<egui::Context>) {
        let started = (|| {
            let spec = study.cycle.clone().ok_or("cycle optimiser: the study has no cycle; build one first")?;
            let template = convert::cycle(study, &spec).map_err(|e| e.user_message())?;
            let it = self.max_iterations;
            if !(it.is_finite() && it.fract() == 0.0 && (1.0..=1e6).contains(&it)) {
                return Err(AppError::from(format!(
                    "cycle optimiser: iteration limit = {} is not allowed: a whole number from 1 to 1000000",
                    sci(it)
                )));
            }
            let tuning = CycleTuning {
                family: self.family,
                total_time: self.keep_total.then(|| template.cycle_time()),
                vary_ratio: self.vary_ratio,
                limits: convert::limits(&study.trap).map_err(|e| e.user_message())?,
                max_iterations: it as u64,
                min_stroke_time: ideal_stroke_floor(self.family, &template),
            };
            let (family, vary_ratio) = (self.family, self.vary_ratio);
            Job::start("cycle-optimiser", 0, ctx, move |p| {
                let progress = |evals: u64, best: f64| {
                    p.note(format!("{evals} cycles analysed, best power {} W", sci(best)));
                };
                let best =
                    optimise_cycle(&template, &tuning, &PropagationOptions::default(), &progress, p.cancel_flag())?;
                Ok(TuneResult { start: spec, family, vary_ratio, best })
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

    /// Draws the section; may apply the optimum to the study's cycle.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &mut Study) {
        ui.strong("The split of the cycle time with the most power (computed in the background)");
        ui.horizontal(|ui| {
            egui::ComboBox::from_label("work-stroke family").selected_text(self.family.name()).show_ui(ui, |ui| {
                for f in FAMILIES {
                    ui.selectable_value(&mut self.family, f, f.name());
                }
            });
            ui.checkbox(&mut self.keep_total, "keep the total cycle time");
            if self.family == StrokeFamily::IdealAdiabatic {
                ui.label("(ideal strokes keep the study's work-stroke time as their shortest)")
                    .on_hover_text("Shorter ideal strokes only raise the power: without a floor there is no optimum.");
            }
            ui.checkbox(&mut self.vary_ratio, "also vary ω_c/ω_h");
            value_field(ui, "Optimiser iteration limit", &mut self.max_iterations, Kind::Whole, Allowed::Positive);
        });
        if ui.add_enabled(self.job.is_none(), egui::Button::new("Find the split of most power")).clicked() {
            let ctx = ui.ctx().clone();
            self.start(study, Some(ctx));
        }
        job_ui(ui, self.job.as_ref(), "Cancel cycle optimisation");
        let mut apply = None;
        match &self.result {
            Some(Ok(r)) => {
                let stale = study.cycle.as_ref() != Some(&r.start);
                figures_ui(ui, r);
                if stale {
                    ui.colored_label(ui.visuals().warn_fg_color, "The cycle changed since: find it again.");
                } else if ui.button("Apply this split to the cycle").clicked() {
                    apply = Some(r.spec());
                }
            }
            Some(Err(e)) => {
                ui.colored_label(ui.visuals().error_fg_color, format!("Cycle optimiser: {e}"));
            }
            None => {}
        }
        if let Some(spec) = apply {
            study.cycle = Some(spec);
        }
    }
}

fn figures_ui(ui: &mut egui::Ui, r: &TuneResult) {
    let b = &r.best;
    let t = |s: f64| format_quantity(s, Quantity::Time);
    egui::Grid::new("cycle-optimum").num_columns(2).striped(true).show(ui, |ui| {
        let mut row = |k: &str, v: String| {
            ui.label(k);
            ui.label(RichText::new(v).monospace());
            ui.end_row();
        };
        let [th, te, tc, tk] = b.stroke_times;
        row("work strokes", format!("{} ramps", r.family.name()));
        row("hot contact · expansion", format!("{} · {}", t(th), t(te)));
        row("cold contact · compression", format!("{} · {}", t(tc), t(tk)));
        row("cycle time", t(b.total_time));
        row("ω_c/ω_h", sci(b.ratio));
        row("power at the optimum", format!("{} W (start: {} W)", sci(b.power_w), sci(b.start_power_w)));
        row("efficiency at maximum power", b.efficiency.map_or_else(|| "— (not an engine)".into(), sci));
        row("Otto bound 1 − ω_c/ω_h", sci(b.otto_efficiency));
        row(
            "Curzon–Ahlborn 1 − √(T_c/T_h)",
            b.curzon_ahlborn.map_or_else(|| "— (hot bath at zero temperature)".into(), sci),
        );
        row("iterations · cycles analysed", format!("{} · {}", b.iterations, b.evaluations));
    });
}

/// The shortest work-stroke time for the optimiser: for ideal adiabatic strokes the
/// study cycle's shorter work stroke (their time changes nothing but the cycle time,
/// so without a floor the optimum is a zero-time stroke); none for real ramps.
fn ideal_stroke_floor(family: StrokeFamily, template: &quenchless_physics::cycle::OttoCycle) -> f64 {
    if family == StrokeFamily::IdealAdiabatic {
        template.expansion.duration().min(template.compression.duration())
    } else {
        0.0
    }
}
