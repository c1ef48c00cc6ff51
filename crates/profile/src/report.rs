//! The JSON objects of the headless commands that other front ends emit too (`eval
//! --json`, `cycle --json`): one serde struct behind the command line and the Python
//! package, so both print the same keys with bit-identical values.

use crate::convert::{TrapModel, well_words};
use quenchless_physics::axes::{AxisReport, worst_axis};
use quenchless_physics::cycle::CycleReport;
use quenchless_physics::{Ramp, RampReport};
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
