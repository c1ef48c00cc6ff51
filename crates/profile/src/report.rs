//! The JSON objects of the headless commands that other front ends emit too (`eval
//! --json`, `cycle --json`): one serde struct behind the command line and the Python
//! package, so both print the same keys with bit-identical values.

use crate::convert::{TrapModel, well_words};
use quenchless_physics::axes::{AxisReport, worst_axis};
use quenchless_physics::cycle::CycleReport;
use quenchless_physics::playback::{Playback, PlaybackAssessment};
use quenchless_physics::{Ramp, RampReport, RampShape as _};
use serde::Serialize;
use serde_json::{Value, json};

/// Version of every JSON object the commands print; bumped when a key changes meaning.
pub const SCHEMA_VERSION: u32 = 2;

/// Adds `schema_version` to a JSON object (to each object of an array).
pub fn versioned(mut v: Value) -> Value {
    match &mut v {
        Value::Object(m) => {
            m.insert("schema_version".into(), json!(SCHEMA_VERSION));
        }
        Value::Array(items) => {
            for item in items.iter_mut() {
                if let Value::Object(m) = item {
                    m.insert("schema_version".into(), json!(SCHEMA_VERSION));
                }
            }
        }
        _ => {}
    }
    v
}

/// The `eval --json` object of one ramp: the physics crate's report (its field names
/// are the keys) with what the command adds.
#[derive(Debug, Serialize)]
pub struct EvalJson<'a> {
    /// See [`SCHEMA_VERSION`].
    pub schema_version: u32,
    /// Candidate name.
    pub name: &'a str,
    /// Family key.
    pub family: &'static str,
    /// `pass`, `fail` or `breaks-limits`.
    pub verdict: &'static str,
    /// omega² <= 0 somewhere.
    pub inverts: bool,
    /// No stated limit broken.
    pub within_limits: bool,
    /// The end figures.
    #[serde(flatten)]
    pub report: &'a RampReport,
}

/// JSON of one evaluated ramp (keys of the `eval --json` contract).
pub fn eval_json(name: &str, ramp: &Ramp, r: &RampReport) -> Value {
    let j = EvalJson {
        schema_version: SCHEMA_VERSION,
        name,
        family: ramp.family_name(),
        verdict: r.verdict().key(),
        inverts: r.inverts(),
        within_limits: r.within_limits(),
        report: r,
    };
    serde_json::to_value(j).unwrap_or(Value::Null)
}

/// Adds the `axes` array (every axis of the study's trap, reference first), the
/// `trap_verdict` (the worst axis's) and `worst_axis` (its name) to an `eval --json`
/// object, whose other keys stay those of the reference axis.
pub fn with_axes(mut v: Value, axes: &[AxisReport], model: &TrapModel) -> Value {
    let worst = worst_axis(axes).unwrap_or(0);
    let list: Vec<Value> = axes
        .iter()
        .zip(&model.axes)
        .map(|(a, m)| {
            let mut j = serde_json::to_value(a).unwrap_or(Value::Null);
            if let Value::Object(o) = &mut j {
                o.insert("well".into(), json!(well_words(&m.well)));
                o.insert("inverts".into(), json!(a.report.inverts()));
                o.insert("within_limits".into(), json!(a.report.within_limits()));
                o.insert("occupation".into(), finite(a.occupation));
            }
            j
        })
        .collect();
    if let Value::Object(o) = &mut v {
        o.insert("trap_verdict".into(), json!(axes.get(worst).map_or("pass", |a| a.verdict)));
        o.insert("worst_axis".into(), json!(axes.get(worst).map(|a| a.name.clone())));
        o.insert("axes".into(), Value::Array(list));
    }
    v
}

/// JSON of a cycle report (keys of the `cycle --json` contract).
pub fn cycle_json(r: &CycleReport) -> Value {
    let f = r.figures.as_ref();
    let corners: Value = f.map_or(Value::Null, |f| {
        Value::Array(
            f.corners
                .iter()
                .map(|c| json!({"label": c.label, "omega_rad_s": c.omega_rad_s, "energy_quanta": c.energy_quanta, "l_quanta": c.l_quanta, "c_quanta": c.c_quanta}))
                .collect(),
        )
    });
    json!({
        "schema_version": SCHEMA_VERSION,
        "stable": r.stable,
        "spectral_radius": r.spectral_radius,
        "regime": f.map(|f| f.regime.name()),
        "work_out_quanta": f.map(|f| f.work_out_quanta),
        "heat_hot_quanta": f.map(|f| f.heat_hot_quanta),
        "heat_cold_quanta": f.map(|f| f.heat_cold_quanta),
        "efficiency": f.and_then(|f| f.efficiency),
        "cop": f.and_then(|f| f.cop),
        "otto_efficiency": r.otto_efficiency,
        "cycle_time_s": r.cycle_time_s,
        "power_w": f.map(|f| finite(f.power_w)),
        "corners": corners,
        "residual": f.map(|f| f.residual),
    })
}

/// A number, or null when it is not finite (JSON has no NaN or infinity).
fn finite(v: f64) -> Value {
    if v.is_finite() { json!(v) } else { Value::Null }
}

/// Why the axes of a candidate could not be evaluated.
#[derive(Debug)]
pub enum AxesFailure {
    /// The study's start state does not fit a multi-axis trap (a field to name).
    Study(crate::ProfileError),
    /// The engine refused an axis.
    Engine(quenchless_physics::PhysicsError),
}

/// Every axis of the study's trap for a candidate already evaluated on the reference
/// axis (`reference`): the reference axis again from the common temperature and each
/// further axis, for the `axes` array of `eval --json` (the command line and the Python
/// module both call this).
pub fn every_axis(
    study: &crate::Study,
    ramp: &Ramp,
    model: &TrapModel,
    reference: &RampReport,
    settings: &quenchless_physics::EvaluationSettings,
) -> Result<Vec<AxisReport>, AxesFailure> {
    use quenchless_physics::RampShape as _;
    let occupation = crate::convert::reference_occupation(&study.initial_state, ramp.omega_initial(), model);
    if model.is_multi_axis() {
        let n0 = occupation.map_err(AxesFailure::Study)?;
        return quenchless_physics::axes::evaluate_axes(ramp, n0, &model.trap_axes(), settings)
            .map_err(AxesFailure::Engine);
    }
    let axis = &model.axes[0].axis;
    Ok(vec![AxisReport {
        name: axis.name.clone(),
        gain: 1.0,
        offset_omega2: 0.0,
        occupation: occupation.unwrap_or(f64::NAN),
        verdict: reference.verdict().key(),
        report: reference.clone(),
    }])
}

/// The index of the worst checked axis: a failing verdict first, then the largest
/// |energy ratio - 1|.
pub fn worst_check(checks: &[quenchless_physics::anharmonic::AxisCheck]) -> usize {
    use quenchless_physics::diagnostics::Verdict;
    checks
        .iter()
        .enumerate()
        .max_by(|(_, x), (_, y)| {
            (x.verdict() != Verdict::Pass)
                .cmp(&(y.verdict() != Verdict::Pass))
                .then(x.energy_ratio_minus_one.abs().total_cmp(&y.energy_ratio_minus_one.abs()))
        })
        .map_or(0, |(i, _)| i)
}

/// One axis's anharmonic check as JSON (the keys of `trap-check --json`; the pictures
/// and the density, which are for the app's plots, left out).
fn axis_check_json(axis: &crate::convert::AxisToCheck, c: &quenchless_physics::anharmonic::AxisCheck) -> Value {
    let mut v = serde_json::to_value(c).unwrap_or(Value::Null);
    if let Value::Object(o) = &mut v {
        for big in ["start", "end", "density", "populations"] {
            o.remove(big);
        }
        o.insert("name".into(), json!(axis.name));
        o.insert("well".into(), json!(well_words(&axis.well)));
        o.insert("gain".into(), json!(axis.law.gain));
        o.insert("offset_omega2".into(), json!(axis.law.offset_omega2));
        o.insert("mass_kg".into(), json!(axis.mass_kg));
        o.insert("occupation".into(), json!(axis.occupation));
        o.insert("verdict".into(), json!(c.verdict().key()));
        o.insert("omega_initial_rad_s".into(), json!(c.start.omega_rad_s));
        o.insert("omega_final_rad_s".into(), json!(c.end.omega_rad_s));
    }
    v
}

/// `trap-check --shape ... --json`: one axis from flags.
pub fn trap_check_axis_json(
    ramp: &str,
    axis: &crate::convert::AxisToCheck,
    check: &quenchless_physics::anharmonic::AxisCheck,
) -> Value {
    let mut v = axis_check_json(axis, check);
    if let Value::Object(o) = &mut v {
        o.insert("schema_version".into(), json!(SCHEMA_VERSION));
        o.insert("ramp".into(), json!(ramp));
    }
    v
}

/// `trap-check STUDY --ramp NAME --json`: every axis of the trap model, the worst named.
pub fn trap_check_json(
    ramp: &str,
    axes: &[crate::convert::AxisToCheck],
    checks: &[quenchless_physics::anharmonic::AxisCheck],
) -> Value {
    let worst = worst_check(checks);
    json!({
        "schema_version": SCHEMA_VERSION,
        "ramp": ramp,
        "trap_verdict": checks.get(worst).map_or("pass", |c| c.verdict().key()),
        "worst_axis": axes.get(worst).map(|a| a.name.clone()),
        "axes": axes.iter().zip(checks).map(|(a, c)| axis_check_json(a, c)).collect::<Vec<_>>(),
    })
}

/// The `play --json` object (the command line and the Python package's `play()`).
#[derive(Debug, Serialize)]
pub struct PlayJson<'a> {
    schema_version: u32,
    name: &'a str,
    family: &'a str,
    verdict: &'a str,
    designed_q_star: f64,
    designed_q_star_minus_one: f64,
    played_q_star: f64,
    played_q_star_minus_one: f64,
    energy_diagonal_as_played: bool,
    within_limits: bool,
    inverts: bool,
    tolerance: f64,
    rate_per_s: f64,
    samples: usize,
    played_duration_s: f64,
    designed_duration_s: f64,
    omega_initial_rad_s: f64,
    omega_final_rad_s: f64,
    omega_start_rad_s: f64,
    omega_left_on_rad_s: f64,
    final_frequency_error: f64,
    settled_at_s: f64,
    slew_limited_periods: usize,
    jitter_mean_q_star: Option<f64>,
    jitter_mean_q_star_minus_one: Option<f64>,
    jitter_worst_q_star: Option<f64>,
    jitter_worst_q_star_minus_one: Option<f64>,
    jitter_trials: Option<usize>,
    min_rate_per_s: Option<f64>,
    min_rate_grid_ratio: Option<f64>,
    min_rate_ceiling_per_s: Option<f64>,
    min_rate_plays: Option<usize>,
    min_rate_note: Option<&'a str>,
    min_bits: Option<u32>,
    min_bits_plays: Option<usize>,
    min_bits_note: Option<&'a str>,
    violations: &'a [quenchless_physics::Violation],
    drive_unit: &'a str,
    /// The worst axis's verdict (the reference axis's for a one-axis trap).
    trap_verdict: &'a str,
    /// The worst axis, when it is not the reference axis.
    worst_axis: Option<&'a str>,
    /// The trap's other axes as played.
    other_axes: Vec<AxisPlayJson<'a>>,
}

/// One further axis of the trap as played, in [`PlayJson`].
#[derive(Debug, Serialize)]
pub struct AxisPlayJson<'a> {
    name: &'a str,
    verdict: &'a str,
    designed_q_star_minus_one: f64,
    played_q_star: f64,
    played_q_star_minus_one: f64,
    min_played_omega2: f64,
    omega_start_rad_s: f64,
    omega_left_on_rad_s: f64,
    violations: &'a [quenchless_physics::Violation],
}

impl<'a> PlayJson<'a> {
    /// The object of a played and judged ramp.
    pub fn new(
        name: &'a str,
        ramp: &'a Ramp,
        playback: &'a Playback,
        s: &'a PlaybackAssessment,
        tol: f64,
        unit: &'a str,
    ) -> Self {
        let p = &s.played;
        PlayJson {
            schema_version: SCHEMA_VERSION,
            name,
            family: ramp.family_name(),
            verdict: s.verdict().key(),
            designed_q_star: s.designed_q_star(),
            designed_q_star_minus_one: s.designed_q_star_minus_one,
            played_q_star: s.played_q_star(),
            played_q_star_minus_one: s.played_q_star_minus_one,
            energy_diagonal_as_played: s.energy_diagonal(),
            within_limits: s.within_limits(),
            inverts: s.inverts(),
            tolerance: tol,
            rate_per_s: playback.rate,
            samples: p.periods,
            played_duration_s: p.played_duration_s,
            designed_duration_s: ramp.duration(),
            omega_initial_rad_s: ramp.omega_initial(),
            omega_final_rad_s: ramp.omega_final(),
            omega_start_rad_s: p.omega_start,
            omega_left_on_rad_s: p.omega_left_on,
            final_frequency_error: s.final_frequency_error(),
            settled_at_s: p.settled_at_s(),
            slew_limited_periods: p.slew_limited_periods,
            jitter_mean_q_star: s.jitter.map(|j| 1.0 + j.mean_q_star_minus_one),
            jitter_mean_q_star_minus_one: s.jitter.map(|j| j.mean_q_star_minus_one),
            jitter_worst_q_star: s.jitter.map(|j| 1.0 + j.worst_q_star_minus_one),
            jitter_worst_q_star_minus_one: s.jitter.map(|j| j.worst_q_star_minus_one),
            jitter_trials: s.jitter.map(|j| j.trials),
            min_rate_per_s: s.rate_search.as_ref().and_then(|r| r.min_rate),
            min_rate_grid_ratio: s.rate_search.as_ref().map(|r| r.grid_ratio),
            min_rate_ceiling_per_s: s.rate_search.as_ref().map(|r| r.ceiling),
            min_rate_plays: s.rate_search.as_ref().map(|r| r.plays),
            min_rate_note: s.rate_search.as_ref().map(|r| r.note.as_str()),
            min_bits: s.bits_search.as_ref().and_then(|b| b.min_bits),
            min_bits_plays: s.bits_search.as_ref().map(|b| b.plays),
            min_bits_note: s.bits_search.as_ref().map(|b| b.note.as_str()),
            violations: &s.violations,
            drive_unit: unit,
            trap_verdict: s.trap_verdict().0.key(),
            worst_axis: s.trap_verdict().1,
            other_axes: s
                .other_axes
                .iter()
                .map(|x| AxisPlayJson {
                    name: &x.name,
                    verdict: x.verdict().key(),
                    designed_q_star_minus_one: x.designed_q_star_minus_one,
                    played_q_star: 1.0 + x.played_q_star_minus_one,
                    played_q_star_minus_one: x.played_q_star_minus_one,
                    min_played_omega2: x.min_played_omega2,
                    omega_start_rad_s: x.omega_start,
                    omega_left_on_rad_s: x.omega_left_on,
                    violations: &x.violations,
                })
                .collect(),
        }
    }
}

/// The `play --json` object as a JSON value.
pub fn play_json(
    name: &str,
    ramp: &Ramp,
    playback: &Playback,
    assessment: &PlaybackAssessment,
    tolerance: f64,
    drive_unit: &str,
) -> Value {
    serde_json::to_value(PlayJson::new(name, ramp, playback, assessment, tolerance, drive_unit)).unwrap_or(Value::Null)
}
