//! The selected candidate as the waveform generator plays it: the generator settings
//! (a working copy of the study's generator section, saved back on request), the
//! played omega(t) against the designed one, designed and played Q*, and the smallest
//! sample rate and bit depth that keep the study's tolerance. Playing and the searches
//! run on a worker thread; physics errors (a drive that cannot go negative asked for
//! omega² < 0, a level outside the full scale) are shown as they are, never clipped.

use crate::compute::StudyResults;
use crate::edits::playback_of;
use crate::error::AppError;
use crate::units::{DisplayScale, sci};
use crate::widgets::{Allowed, Kind, value_field};
use crate::worker::{Job, job_ui};
use egui::{Color32, RichText};
use egui_plot::{Legend, Line, LineStyle, Plot, PlotPoints};
use quenchless_physics::Verdict;
use quenchless_physics::playback::{AssessmentSettings, PlaybackAssessment, assess_trap};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_physics::ramp::SampledRamp;
use quenchless_profile::header::check_words;
use quenchless_profile::study::{DriveCalibrationSpec, DriveSpec, GeneratorSpec, RampSpec};
use quenchless_profile::units::Quantity;
use quenchless_profile::{Study, convert};

/// Clock-jitter realisations averaged when the settings state a jitter.
pub const JITTER_TRIALS: usize = 20;
/// Most rows of the played curve drawn (longer tables are thinned for the plot only).
const PLOT_ROWS: usize = 6000;

/// What one play job found.
#[derive(Debug, Clone, PartialEq)]
pub struct PlayResult {
    /// The candidate played, and its spec at the time.
    pub candidate: String,
    /// Its spec (a changed ramp makes the result stale).
    pub spec: RampSpec,
    /// The settings played with.
    pub settings: GeneratorSpec,
    /// The judgement: the same one the command line's `play` makes.
    pub assessment: PlaybackAssessment,
    /// The same judgement in the words the file headers use.
    pub checks: Vec<String>,
}

/// Which generator section of the study the settings were taken from.
#[derive(Debug, Clone, Default, PartialEq)]
enum Synced {
    /// None yet (first frame).
    #[default]
    Never,
    /// This one (`None`: the study had no generator section).
    From(Option<GeneratorSpec>),
}

/// State of the playback section.
#[derive(Debug, Default)]
pub struct PlaybackPanel {
    /// The settings being edited (saved into the study on request).
    pub settings: GeneratorSpec,
    /// The study's generator section these settings were last taken from.
    synced: Synced,
    /// The job in progress.
    pub job: Option<Job<PlayResult>>,
    /// The latest outcome.
    pub result: Option<Result<PlayResult, AppError>>,
    /// Problem with the settings.
    pub error: Option<String>,
}

fn fallback_generator(study: &Study) -> GeneratorSpec {
    study.generator.clone().unwrap_or_default()
}

impl PlaybackPanel {
    /// Takes the study's generator section as the settings when it changed (opened,
    /// undone, saved from here).
    pub fn sync(&mut self, study: &Study) {
        if self.synced != Synced::From(study.generator.clone()) {
            self.settings = fallback_generator(study);
            self.synced = Synced::From(study.generator.clone());
        }
    }

    /// Collects the worker's result; never blocks.
    pub fn poll(&mut self) {
        if let Some(j) = self.job.as_mut()
            && let Some(r) = j.poll()
        {
            self.result = Some(r);
            self.job = None;
        }
    }

    /// Starts playing candidate `index` of the study with the current settings.
    pub fn start(&mut self, study: &Study, index: usize, ctx: Option<egui::Context>) {
        self.error = None;
        let started = (|| {
            let pb = playback_of(&self.settings)?;
            let c = study.candidates.get(index).ok_or_else(|| format!("playback: no candidate number {index}"))?;
            let ramp = convert::candidate_ramp(c, index).map_err(|e| e.user_message())?;
            let limits = convert::limits(&study.trap).map_err(|e| e.user_message())?;
            let others: Vec<_> = convert::trap_model(&study.trap)
                .map_err(|e| e.user_message())?
                .trap_axes()
                .into_iter()
                .skip(1)
                .collect();
            let settings = AssessmentSettings {
                tolerance: study.tolerance,
                limits,
                max_rate: self.settings.max_rate_per_s,
                jitter_trials: JITTER_TRIALS,
                ..AssessmentSettings::default()
            };
            let (candidate, spec, generator) = (c.name.clone(), c.ramp.clone(), self.settings.clone());
            Job::start("playback", 1, ctx, move |p| {
                p.note("playing, then searching the smallest rate and bit depth");
                let assessment =
                    assess_trap(&ramp, &pb, &settings, &others, &PropagationOptions::default(), &|| p.cancelled())?;
                p.set(1);
                p.note("");
                let checks = check_words(&assessment, &limits);
                Ok(PlayResult { candidate, spec, settings: generator, assessment, checks })
            })
        })();
        match started {
            Ok(j) => {
                self.job = Some(j);
                self.result = None;
            }
            Err(e) => self.error = Some(e.to_string()),
        }
    }

    fn settings_ui(&mut self, ui: &mut egui::Ui) {
        let g = &mut self.settings;
        let t = Kind::Unit(Quantity::Time);
        value_field(ui, "Sample rate [samples/s]", &mut g.sample_rate_per_s, Kind::Number, Allowed::Positive);
        ui.checkbox(&mut g.midpoint_samples, "take each sample at the middle of its period (else at its start)");
        let mut has_drive = g.drive.is_some();
        if ui.checkbox(&mut has_drive, "state the drive: unit, calibration, full scale").changed() {
            g.drive = has_drive.then(DriveSpec::default);
        }
        if let Some(d) = g.drive.as_mut() {
            ui.indent("drive-settings", |ui| {
                ui.horizontal(|ui| {
                    let lab = ui.label("Drive unit");
                    ui.add(egui::TextEdit::singleline(&mut d.unit).desired_width(60.0)).labelled_by(lab.id);
                });
                match &mut d.calibration {
                    DriveCalibrationSpec::FrequencySquared { reference_frequency_hz, drive_at_reference } => {
                        ui.label("drive proportional to ν²:");
                        value_field(
                            ui,
                            "Reference frequency",
                            reference_frequency_hz,
                            Kind::Unit(Quantity::Frequency),
                            Allowed::Positive,
                        );
                        value_field(ui, "Drive at the reference", drive_at_reference, Kind::Number, Allowed::Positive);
                    }
                    DriveCalibrationSpec::Table { frequency_hz, .. } => {
                        ui.label(format!(
                            "Measured calibration table, {} rows (from the profile; edit it there)",
                            frequency_hz.len()
                        ));
                    }
                }
                value_field(ui, "Full scale, lowest code", &mut d.full_scale_low, Kind::Number, Allowed::Any);
                value_field(ui, "Full scale, highest code", &mut d.full_scale_high, Kind::Number, Allowed::Any);
                ui.checkbox(&mut d.can_go_negative, "the drive can go negative (an optical trap's power cannot)");
            });
        }
        ui.horizontal(|ui| {
            let mut quantise = g.bits.is_some();
            if ui.checkbox(&mut quantise, "DAC bits").changed() {
                g.bits = quantise.then_some(16);
            }
            if let Some(b) = g.bits.as_mut() {
                let mut v = f64::from(*b);
                if value_field(ui, "DAC bits value", &mut v, Kind::Whole, Allowed::Positive) {
                    if v.fract() == 0.0 && (1.0..=32.0).contains(&v) {
                        *b = v as u32;
                        self.error = None;
                    } else {
                        self.error = Some(format!("DAC bits = {} is not allowed: a whole number from 1 to 32", sci(v)));
                    }
                }
            }
        });
        if g.bits.is_some() && g.drive.is_none() {
            ui.small("Bits quantise only over a stated drive full scale.");
        }
        for (label, value, kind) in [
            ("Low-pass time constant", &mut g.low_pass_s, t),
            ("Slew limit [drive units/s]", &mut g.slew_limit_per_s, Kind::Number),
            ("Clock jitter (rms)", &mut g.jitter_rms_s, t),
            ("Maximum rate, where the rate search starts [samples/s]", &mut g.max_rate_per_s, Kind::Number),
        ] {
            crate::widgets::optional_field(ui, label, value, kind, default_of(label, g.sample_rate_per_s));
        }
    }

    /// Draws the section for candidate `selected`; may save the settings into the study.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &mut Study, results: &StudyResults, selected: usize) {
        self.sync(study);
        let Some(name) = study.candidates.get(selected).map(|c| c.name.clone()) else {
            ui.label("No candidate to play: add one first.");
            return;
        };
        let designed = results.candidates.get(selected).and_then(crate::compute::CandidateResult::ready);
        ui.columns(3, |cols| {
            cols[0].label(RichText::new(format!("Generator settings, playing “{name}”")).strong());
            self.settings_ui(&mut cols[0]);
            cols[0].horizontal_wrapped(|ui| {
                let running = self.job.is_some();
                if ui.add_enabled(!running, egui::Button::new("Play it")).clicked() {
                    let ctx = ui.ctx().clone();
                    self.start(study, selected, Some(ctx));
                }
                let saved = study.generator.as_ref() == Some(&self.settings);
                if ui.add_enabled(!saved, egui::Button::new("Save these settings into the study")).clicked() {
                    match playback_of(&self.settings) {
                        Ok(_) => {
                            study.generator = Some(self.settings.clone());
                            self.synced = Synced::From(study.generator.clone());
                        }
                        Err(e) => self.error = Some(e),
                    }
                }
                if ui.add_enabled(!saved, egui::Button::new("Back to the study's settings")).clicked() {
                    self.settings = fallback_generator(study);
                    self.error = None;
                }
            });
            if study.generator.is_none() {
                cols[0].small("The study has no generator section yet; saving adds one.");
            }
            if let Some(e) = &self.error {
                cols[0].colored_label(cols[0].visuals().error_fg_color, e);
            }
            job_ui(&mut cols[0], self.job.as_ref(), "Cancel playback");
            let current = study.candidates.get(selected);
            match &self.result {
                Some(Ok(r)) => {
                    let stale = current.is_none_or(|c| c.name != r.candidate || c.ramp != r.spec)
                        || r.settings != self.settings;
                    figures_ui(&mut cols[1], r, stale);
                }
                Some(Err(e)) => {
                    cols[1].colored_label(cols[1].visuals().error_fg_color, format!("Cannot play it: {e}"));
                }
                None => {
                    cols[1].label("Press “Play it” to see the ramp as the generator plays it.");
                }
            }
            let played = match &self.result {
                Some(Ok(r)) if r.candidate == name => r.assessment.played.trap.as_ref(),
                _ => None,
            };
            playback_plot(&mut cols[2], &results.scale, designed.map(|o| &o.series), played);
        });
    }
}

fn default_of(label: &str, rate: f64) -> f64 {
    match label {
        "Low-pass time constant" => 2.0 / rate.max(1.0),
        "Clock jitter (rms)" => 0.01 / rate.max(1.0),
        l if l.starts_with("Maximum rate") => 4.0 * rate,
        _ => 1e9,
    }
}

fn figures_ui(ui: &mut egui::Ui, r: &PlayResult, stale: bool) {
    let a = &r.assessment;
    ui.label(RichText::new(format!("“{}” as played", r.candidate)).strong());
    if stale {
        ui.colored_label(ui.visuals().warn_fg_color, "The ramp or the settings changed since: play it again.");
    }
    egui::Grid::new("playback-figures").num_columns(2).striped(true).show(ui, |ui| {
        let mut row = |k: &str, v: String| {
            ui.label(k);
            ui.label(RichText::new(v).monospace());
            ui.end_row();
        };
        row("Q* − 1 designed", sci(a.designed_q_star_minus_one));
        row("Q* − 1 played, in the trap left on", sci(a.played_q_star_minus_one));
        row("tolerance", sci(a.tolerance));
        row("generator samples", a.played.periods.to_string());
        row("duration as played", format!("{} s", sci(a.played.played_duration_s)));
        row("trap left on, relative error", sci(a.final_frequency_error()));
        if let Some(j) = a.jitter {
            row("with jitter: mean Q* − 1", sci(j.mean_q_star_minus_one));
            row(&format!("worst of {} realisations", j.trials), sci(j.worst_q_star_minus_one));
        }
        if r.settings.slew_limit_per_s.is_some() {
            row("periods held back by slew", a.played.slew_limited_periods.to_string());
        }
        let rate = match &a.rate_search {
            Some(s) => s.min_rate.map_or_else(|| "none".to_string(), |v| format!("{} samples/s", sci(v))),
            None => "not searched".into(),
        };
        row("smallest rate in tolerance", rate);
        let bits = match &a.bits_search {
            Some(b) => b.min_bits.map_or_else(|| "none".to_string(), |b| format!("{b} bits")),
            None => "needs drive range + bits".into(),
        };
        row("smallest bit depth in tolerance", bits);
    });
    let (verdict, worst) = a.trap_verdict();
    let colour = match verdict {
        Verdict::Pass => crate::colours::pass(ui.visuals()),
        Verdict::Fail | Verdict::BreaksLimits => ui.visuals().error_fg_color,
    };
    let inverts = if a.inverts() { ", inverts" } else { "" };
    let axis = worst.map_or_else(String::new, |n| format!(" ({n} axis)"));
    ui.label(RichText::new(format!("As played: {}{axis}{inverts}", verdict.word())).strong().color(colour));
    egui::CollapsingHeader::new("What was checked (as written into exported files)").default_open(false).show(
        ui,
        |ui| {
            for line in &r.checks {
                ui.small(line);
            }
        },
    );
}

fn playback_plot(
    ui: &mut egui::Ui,
    scale: &DisplayScale,
    designed: Option<&crate::compute::CandidateSeries>,
    played: Option<&SampledRamp>,
) {
    let steps: Vec<[f64; 2]> = played.map_or_else(Vec::new, |p| {
        let (t, v) = (p.times(), p.values());
        let stride = (t.len() / PLOT_ROWS).max(1);
        let mut out = Vec::with_capacity(2 * t.len() / stride + 2);
        let mut k = 0;
        while k + 1 < t.len() {
            let y = scale.signed_y(v[k]);
            out.push([scale.x(t[k]), y]);
            out.push([scale.x(t[(k + stride).min(t.len() - 1)]), y]);
            k += stride;
        }
        out
    });
    ui.label(RichText::new("Designed and played trap frequency").strong());
    Plot::new("playback-plot")
        .allow_scroll(false)
        .x_axis_formatter(crate::units::axis_ticks)
        .y_axis_formatter(crate::units::axis_ticks)
        .height(250.0)
        .legend(Legend::default())
        .x_axis_label(scale.x_label())
        .y_axis_label(format!("{}, signed", scale.y_label()))
        .show(ui, |pui| {
            if let Some(s) = designed {
                for (curve, dashed) in [(&s.omega, false), (&s.inverted, true)] {
                    for piece in curve {
                        let mut l = Line::new("designed", PlotPoints::Borrowed(piece))
                            .color(Color32::from_rgb(150, 150, 150))
                            .width(4.0);
                        if dashed {
                            l = l.style(LineStyle::dashed_dense());
                        }
                        pui.line(l);
                    }
                }
            }
            if !steps.is_empty() {
                pui.line(Line::new("played", PlotPoints::new(steps)).color(Color32::from_rgb(214, 96, 39)).width(1.4));
            }
        });
}
