//! Frictionless ramps on demand between the trap's end frequencies, from the physics
//! crate's closed forms: constant mu of order k (or the order nearest a duration), the
//! invariant-based shortcut (of a duration, or the shortest above an omega² floor),
//! and time-optimal holds between two bounds. The preview is live; "Add" makes it a
//! candidate of the study (one undo step), stored as an ordinary ramp spec.

use crate::edits::{next_colour, unique_name};
use crate::units::sci;
use crate::widgets::{Allowed, Kind, value_field};
use egui::RichText;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::{
    frictionless_constant_mu, nearest_frictionless_order, shortcut_for_duration, shortest_shortcut_above,
    time_optimal_holds,
};
use quenchless_physics::diagnostics::Verdict;
use quenchless_physics::limits::{ViolationKind, find_violations};
use quenchless_physics::ramp::Segment;
use quenchless_profile::study::{CandidateRamp, HoldSpec, RampSpec};
use quenchless_profile::units::{Quantity, format_quantity};
use quenchless_profile::{Study, convert};

/// A way to build a frictionless ramp.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// Constant mu of a given order k.
    ConstantMuOrder,
    /// Constant mu of the order whose duration is nearest a wanted one.
    ConstantMuNearest,
    /// Invariant-based shortcut of a given duration.
    ShortcutDuration,
    /// Shortest shortcut whose omega² stays above a floor.
    ShortcutFloor,
    /// Time-optimal holds (bang-bang) between two omega² bounds.
    TimeOptimal,
}

impl Method {
    /// All methods in menu order.
    pub const ALL: [Self; 5] = [
        Self::ConstantMuOrder,
        Self::ConstantMuNearest,
        Self::ShortcutDuration,
        Self::ShortcutFloor,
        Self::TimeOptimal,
    ];

    /// Menu label.
    pub fn label(self) -> &'static str {
        match self {
            Self::ConstantMuOrder => "constant μ, frictionless order k",
            Self::ConstantMuNearest => "constant μ, frictionless order nearest a duration",
            Self::ShortcutDuration => "invariant shortcut of a duration",
            Self::ShortcutFloor => "shortest invariant shortcut above an ω² floor",
            Self::TimeOptimal => "time-optimal holds between two bounds",
        }
    }
}

/// A designed ramp ready to be added.
#[derive(Debug, Clone, PartialEq)]
pub struct Designed {
    /// The ramp spec a candidate will hold.
    pub spec: RampSpec,
    /// Suggested candidate name.
    pub name: String,
    /// Figures to show: (label, value).
    pub figures: Vec<(String, String)>,
    /// A warning to show (the trap inverts).
    pub warning: Option<String>,
    /// Holds of a bang-bang design (omega², duration).
    pub segments: Vec<Segment>,
}

/// State of the synthesis section.
#[derive(Debug, Clone, PartialEq)]
pub struct SynthesisPanel {
    /// Chosen method.
    pub method: Method,
    /// Order k (a whole number, typed).
    pub order: f64,
    /// Wanted duration, s (nearest order, shortcut).
    pub duration_s: f64,
    /// omega² floor as a signed frequency, Hz (negative: an inverted floor).
    pub floor_signed_hz: f64,
    /// Lowest bound as a signed frequency, Hz.
    pub lowest_signed_hz: f64,
    /// Highest bound, Hz.
    pub highest_hz: f64,
    /// Last problem adding a candidate.
    pub error: Option<String>,
    /// The study whose trap and time scale the bounds and duration were taken from.
    seeded: Option<String>,
}

impl Default for SynthesisPanel {
    fn default() -> Self {
        Self {
            method: Method::ShortcutDuration,
            order: 1.0,
            duration_s: 20e-6,
            floor_signed_hz: 0.0,
            lowest_signed_hz: 0.0,
            highest_hz: 0.0,
            error: None,
            seeded: None,
        }
    }
}

fn signed_omega2(nu_hz: f64) -> f64 {
    let w = TWO_PI * nu_hz;
    w * w.abs()
}

fn signed_hz(omega2: f64) -> f64 {
    omega2.signum() * omega2.abs().sqrt() / TWO_PI
}

fn time(t: f64) -> String {
    format_quantity(t, Quantity::Time)
}

fn freq(hz: f64) -> String {
    if hz < 0.0 {
        format!("−{} (inverted)", format_quantity(-hz, Quantity::Frequency))
    } else {
        format_quantity(hz, Quantity::Frequency)
    }
}

impl SynthesisPanel {
    /// The design of the current inputs between `from_hz` and `to_hz`; an error names
    /// the input, its value and what is allowed.
    pub fn design(&self, from_hz: f64, to_hz: f64) -> Result<Designed, String> {
        let (wi, wf) = (TWO_PI * from_hz, TWO_PI * to_hz);
        let e = |err: quenchless_physics::PhysicsError| format!("synthesis: {err}");
        let wi2 = wi * wi;
        let min_figure = |min_omega2: f64| {
            (
                "lowest ω²: ω²/ω_i² · signed ν".to_string(),
                format!("{} · {}", sci(min_omega2 / wi2), freq(signed_hz(min_omega2))),
            )
        };
        match self.method {
            Method::ConstantMuOrder | Method::ConstantMuNearest => {
                let d = if self.method == Method::ConstantMuOrder {
                    if !(self.order.is_finite() && self.order.fract() == 0.0 && (1.0..=1e5).contains(&self.order)) {
                        return Err(format!(
                            "synthesis: order k = {} is not allowed: a whole number from 1 to 100000",
                            self.order
                        ));
                    }
                    frictionless_constant_mu(wi, wf, self.order as u32).map_err(e)?
                } else {
                    nearest_frictionless_order(wi, wf, self.duration_s).map_err(e)?
                };
                Ok(Designed {
                    spec: RampSpec::ConstantMu { from_hz, to_hz, duration_s: d.duration },
                    name: format!("frictionless μ, k = {}", d.order),
                    figures: vec![
                        ("order k".into(), d.order.to_string()),
                        ("adiabatic parameter μ".into(), sci(d.mu)),
                        ("duration".into(), time(d.duration)),
                    ],
                    warning: None,
                    segments: Vec::new(),
                })
            }
            Method::ShortcutDuration | Method::ShortcutFloor => {
                let d = if self.method == Method::ShortcutDuration {
                    shortcut_for_duration(wi, wf, self.duration_s).map_err(e)?
                } else {
                    if !self.floor_signed_hz.is_finite() {
                        return Err(format!(
                            "synthesis: ω² floor = {} is not allowed: a finite frequency",
                            self.floor_signed_hz
                        ));
                    }
                    shortest_shortcut_above(wi, wf, signed_omega2(self.floor_signed_hz)).map_err(e)?
                };
                let warning = d.inverts.then(|| {
                    format!(
                        "Warning: this shortcut inverts the trap (ω² < 0, down to {}): the drive must be able to go negative",
                        freq(signed_hz(d.min_omega2))
                    )
                });
                Ok(Designed {
                    spec: RampSpec::Shortcut { from_hz, to_hz, duration_s: d.duration },
                    name: format!("shortcut {}", time(d.duration)),
                    figures: vec![("duration".into(), time(d.duration)), min_figure(d.min_omega2)],
                    warning,
                    segments: Vec::new(),
                })
            }
            Method::TimeOptimal => {
                for (name, v) in [("lowest bound", self.lowest_signed_hz), ("highest bound", self.highest_hz)] {
                    if !v.is_finite() {
                        return Err(format!("synthesis: {name} = {v} is not allowed: a finite frequency"));
                    }
                }
                let d =
                    time_optimal_holds(wi, wf, signed_omega2(self.lowest_signed_hz), signed_omega2(self.highest_hz))
                        .map_err(e)?;
                let holds = d
                    .segments
                    .iter()
                    .map(|s| HoldSpec { signed_frequency_hz: signed_hz(s.omega2), duration_s: s.duration })
                    .collect();
                let inverts = d.segments.iter().any(|s| s.omega2 < 0.0);
                Ok(Designed {
                    spec: RampSpec::Holds { from_hz, to_hz, holds },
                    name: "time-optimal holds".into(),
                    figures: vec![
                        ("total time".into(), time(d.duration)),
                        ("holds".into(), d.segments.len().to_string()),
                    ],
                    warning: inverts.then(|| {
                        "Warning: a hold inverts the trap (ω² < 0): the drive must be able to go negative".to_string()
                    }),
                    segments: d.segments,
                })
            }
        }
    }

    /// Adds the current design to the study as a new candidate; returns its index.
    pub fn add_to(&mut self, study: &mut Study) -> Result<usize, String> {
        let d = self.design(study.trap.start_frequency_hz, study.trap.end_frequency_hz)?;
        let name = unique_name(study, &d.name);
        let colour = Some(next_colour(study));
        study.candidates.push(CandidateRamp { name, visible: true, colour, ramp: d.spec });
        Ok(study.candidates.len() - 1)
    }

    fn seed_bounds(&mut self, study: &Study) {
        if self.seeded.as_deref() == Some(study.name.as_str()) {
            return;
        }
        let t = &study.trap;
        let (lo, hi) = (t.start_frequency_hz.min(t.end_frequency_hz), t.start_frequency_hz.max(t.end_frequency_hz));
        self.lowest_signed_hz = t.lowest_frequency_hz.unwrap_or(0.5 * lo).min(lo);
        self.highest_hz = t.highest_frequency_hz.unwrap_or(hi).max(hi);
        // The wanted duration starts at the study's own time scale: its first candidate's.
        if let Some(tau) =
            study.candidates.iter().map(|c| crate::edits::spec_duration(&c.ramp)).find(|t| t.is_finite() && *t > 0.0)
        {
            self.duration_s = tau;
        }
        self.seeded = Some(study.name.clone());
    }

    /// Draws the section (inputs on the left, the design's figures on the right);
    /// adding selects the new candidate.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &mut Study, selected: &mut usize) {
        self.seed_bounds(study);
        let (from_hz, to_hz) = (study.trap.start_frequency_hz, study.trap.end_frequency_hz);
        let mut add = false;
        ui.columns(2, |cols| {
            self.inputs_ui(&mut cols[0], from_hz, to_hz);
            let design = self.design(from_hz, to_hz);
            cols[0].horizontal(|ui| {
                if ui.add_enabled(design.is_ok(), egui::Button::new("Add as a candidate")).clicked() {
                    add = true;
                }
            });
            if let Some(e) = &self.error {
                cols[0].colored_label(cols[0].visuals().error_fg_color, e);
            }
            let broken = design.as_ref().map(|d| broken_limits(&d.spec, study)).unwrap_or_default();
            design_ui(&mut cols[1], &design, &broken);
        });
        if add {
            match self.add_to(study) {
                Ok(i) => {
                    *selected = i;
                    self.error = None;
                }
                Err(e) => self.error = Some(e),
            }
        }
    }

    fn inputs_ui(&mut self, ui: &mut egui::Ui, from_hz: f64, to_hz: f64) {
        ui.label(format!("From ν_i = {} to ν_f = {}, the trap's end frequencies.", freq(from_hz), freq(to_hz)));
        egui::ComboBox::from_label("synthesis method").selected_text(self.method.label()).width(300.0).show_ui(
            ui,
            |ui| {
                for m in Method::ALL {
                    ui.selectable_value(&mut self.method, m, m.label());
                }
            },
        );
        let t = Kind::Unit(Quantity::Time);
        let f = Kind::Unit(Quantity::Frequency);
        match self.method {
            Method::ConstantMuOrder => {
                value_field(ui, "Order k", &mut self.order, Kind::Whole, Allowed::Positive);
            }
            Method::ConstantMuNearest | Method::ShortcutDuration => {
                value_field(ui, "Wanted duration", &mut self.duration_s, t, Allowed::Positive);
            }
            Method::ShortcutFloor => {
                value_field(ui, "ω² floor (signed frequency)", &mut self.floor_signed_hz, f, Allowed::Any);
                ui.small("0 Hz: the shortest shortcut that never inverts the trap; −ν allows ω² down to −(2πν)².");
            }
            Method::TimeOptimal => {
                value_field(ui, "Lowest bound (signed frequency)", &mut self.lowest_signed_hz, f, Allowed::Any);
                value_field(ui, "Highest bound", &mut self.highest_hz, f, Allowed::Positive);
                ui.small("The holds jump between these bounds; they must enclose both end frequencies.");
            }
        }
    }
}

/// The stated limits a design breaks, in the words of every report: "BREAKS LIMITS:
/// faster than the slew limit (worst 3.2e10 Hz/s)". Inversion alone is the warning's.
fn broken_limits(spec: &RampSpec, study: &Study) -> Vec<String> {
    let (Ok(ramp), Ok(limits)) = (convert::ramp_from_spec(spec, "design"), convert::limits(&study.trap)) else {
        return Vec::new();
    };
    find_violations(&ramp, &limits, &ramp.grid_with_breakpoints(4001))
        .into_iter()
        .filter(|v| v.kind != ViolationKind::Inverted)
        .map(|v| {
            let worst = match v.worst_as_stated() {
                None => "a jump".to_string(),
                Some((w, "Hz")) => freq(w),
                Some((w, unit)) => format!("{} {unit}", sci(w)),
            };
            format!("{}: {} (worst {worst})", Verdict::BreaksLimits.word(), v.kind.describe())
        })
        .collect()
}

fn design_ui(ui: &mut egui::Ui, design: &Result<Designed, String>, broken: &[String]) {
    match design {
        Ok(d) => {
            egui::Grid::new("synthesis-figures").num_columns(2).striped(true).show(ui, |ui| {
                for (k, v) in &d.figures {
                    ui.label(k);
                    ui.label(RichText::new(v).monospace());
                    ui.end_row();
                }
            });
            if !d.segments.is_empty() {
                egui::Grid::new("synthesis-holds").num_columns(3).striped(true).show(ui, |ui| {
                    ui.strong("hold");
                    ui.strong("level");
                    ui.strong("time");
                    ui.end_row();
                    for (k, s) in d.segments.iter().enumerate() {
                        ui.label((k + 1).to_string());
                        ui.label(freq(signed_hz(s.omega2)));
                        ui.label(time(s.duration));
                        ui.end_row();
                    }
                });
            }
            if let Some(w) = &d.warning {
                ui.add(egui::Label::new(RichText::new(w).color(ui.visuals().warn_fg_color)).wrap());
            }
            for b in broken {
                ui.add(egui::Label::new(RichText::new(b).strong().color(ui.visuals().error_fg_color)).wrap());
            }
        }
        Err(e) => {
            ui.add(egui::Label::new(RichText::new(e).color(ui.visuals().error_fg_color)).wrap());
        }
    }
}
