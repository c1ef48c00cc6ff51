//! Evaluating a ramp as `quenchless eval --json` does: the same settings, the same
//! engine call, and the profile crate's `eval_json` (and `with_axes` for a study's
//! candidate) to build the object, so the keys and values are the command line's.

use crate::errors::{Failure, Outcome};
use quenchless_physics::{Evaluation, EvaluationSettings, Moments, PropagationOptions, Ramp, RampShape, evaluate};
use quenchless_profile::report::{AxesFailure, eval_json, every_axis, with_axes};
use quenchless_profile::{Study, convert};
use serde_json::Value;
use std::path::Path;

/// Propagation options from an optional `accuracy` (as `--accuracy`).
pub fn propagation(accuracy: Option<f64>) -> Outcome<PropagationOptions> {
    match accuracy {
        None => Ok(PropagationOptions::default()),
        Some(a) => PropagationOptions::with_accuracy(a)
            .map_err(|_| Failure::value(format!("accuracy {a}: allowed 1e-15 to 1e-2"))),
    }
}

/// Checks a `tolerance` (as `--tolerance`).
pub fn tolerance(t: Option<f64>, default: f64) -> Outcome<f64> {
    match t {
        None => Ok(default),
        Some(t) if t.is_finite() && t > 0.0 && t < 1.0 => Ok(t),
        Some(t) => Err(Failure::value(format!("tolerance {t}: allowed a number in (0, 1)"))),
    }
}

/// Checks an `occupation` (as `--occupation`).
pub fn occupation(n: f64) -> Outcome<f64> {
    if n.is_finite() && n >= 0.0 {
        Ok(n)
    } else {
        Err(Failure::value(format!("occupation {n}: allowed a finite number >= 0")))
    }
}

/// A ramp without a study (a waveform or a design), evaluated as `eval --waveform`
/// does: from a thermal state of `occupation` quanta, no limits, no noise.
pub fn free_ramp(
    name: &str,
    ramp: &Ramp,
    occupation: f64,
    tol: Option<f64>,
    accuracy: Option<f64>,
    samples: Option<usize>,
) -> Outcome<(Value, Evaluation)> {
    let opts = propagation(accuracy)?;
    let initial = Moments::thermal_occupation(ramp.omega_initial(), self::occupation(occupation)?)?;
    let mut settings =
        EvaluationSettings { tolerance: tolerance(tol, 1e-3)?, propagation: opts, ..EvaluationSettings::default() };
    if let Some(n) = samples {
        settings.samples = trajectory_samples(n)?;
    }
    let ev = evaluate(ramp, &initial, &settings)?;
    Ok((eval_json(name, ramp, &ev.report), ev))
}

/// Checks a number of trajectory samples.
pub fn trajectory_samples(n: usize) -> Outcome<usize> {
    if (2..=1_000_000).contains(&n) {
        Ok(n)
    } else {
        Err(Failure::value(format!("n {n}: allowed 2 to 1000000 trajectory samples")))
    }
}

/// A study's candidate, evaluated as `eval STUDY --ramp NAME --json` does: the study's
/// tolerance, limits, noise and initial state, and every axis of its trap.
pub fn candidate(
    study: &Study,
    path: &Path,
    index: usize,
    tol: Option<f64>,
    accuracy: Option<f64>,
    samples: Option<usize>,
) -> Outcome<(Value, Evaluation)> {
    let c = &study.candidates[index];
    let mut settings = EvaluationSettings {
        tolerance: tolerance(tol, study.tolerance)?,
        propagation: propagation(accuracy)?,
        limits: convert::limits(&study.trap).map_err(|e| e.in_file(path))?,
        noise: convert::noise(&study.noise).map_err(|e| e.in_file(path))?,
        ..EvaluationSettings::default()
    };
    if let Some(n) = samples {
        settings.samples = trajectory_samples(n)?;
    }
    let model = convert::trap_model(&study.trap).map_err(|e| e.in_file(path))?;
    let ramp = convert::candidate_ramp(c, index).map_err(|e| e.in_file(path))?;
    let initial = convert::initial_state(&study.initial_state, ramp.omega_initial()).map_err(|e| e.in_file(path))?;
    let in_candidate =
        |e: &dyn std::fmt::Display| Failure::value(format!("{}: candidate \"{}\": {e}", path.display(), c.name));
    let ev = evaluate(&ramp, &initial, &settings).map_err(|e| in_candidate(&e))?;
    // Every axis the control moves, the reference axis again from the common
    // temperature (as the command line lists them).
    let axes = every_axis(study, &ramp, &model, &ev.report, &settings).map_err(|f| match f {
        AxesFailure::Study(e) => Failure::from(e.in_file(path)),
        AxesFailure::Engine(e) => in_candidate(&e),
    })?;
    Ok((with_axes(eval_json(&c.name, &ramp, &ev.report), &axes, &model), ev))
}

/// The trajectory of an evaluation as columns (NaN where a quantity needs omega² > 0
/// and the trap is inverted).
pub struct Columns {
    /// Time, s.
    pub t_s: Vec<f64>,
    /// omega², (rad/s)².
    pub omega2: Vec<f64>,
    /// Energy in quanta of the instantaneous trap.
    pub energy_quanta: Vec<f64>,
    /// Lagrangian L in quanta.
    pub l_quanta: Vec<f64>,
    /// Correlation C in quanta.
    pub c_quanta: Vec<f64>,
    /// Friction (energy above the adiabatic one) in quanta.
    pub friction_quanta: Vec<f64>,
    /// Adiabatic parameter mu = omega' / omega².
    pub mu: Vec<f64>,
    /// Relative drift of the Casimir invariant.
    pub casimir_drift: Vec<f64>,
}

impl Columns {
    /// The columns of an evaluation's trajectory.
    pub fn of(ev: &Evaluation) -> Self {
        let col = |f: &dyn Fn(&quenchless_physics::TrajectoryPoint) -> Option<f64>| {
            ev.trajectory.iter().map(|p| f(p).unwrap_or(f64::NAN)).collect::<Vec<_>>()
        };
        Self {
            t_s: col(&|p| Some(p.t)),
            omega2: col(&|p| Some(p.omega2)),
            energy_quanta: col(&|p| p.energy_quanta),
            l_quanta: col(&|p| p.l_quanta),
            c_quanta: col(&|p| p.c_quanta),
            friction_quanta: col(&|p| p.friction_quanta),
            mu: col(&|p| p.mu),
            casimir_drift: col(&|p| Some(p.casimir_drift)),
        }
    }
}

/// The Python function `evaluate`: a waveform given as arrays.
pub mod function {
    use crate::arrays::ArrayWaveform;
    use crate::errors::guarded;
    use crate::job;
    use crate::json::to_python;
    use pyo3::prelude::*;

    /// Evaluates a waveform given as arrays, exactly as ``quenchless eval --waveform
    /// FILE --json`` evaluates the same table: the returned dict has the command's keys
    /// and bit-identical values (one serde struct behind both).
    ///
    /// ``t_s``: row times, s (1-D, finite, strictly increasing, >= 2 rows; the table
    /// is counted from its first row). ``omega_rad_s``: trap angular frequency per row,
    /// rad/s (> 0), or ``omega2``: omega² per row, (rad/s)² (may be <= 0 inside: an
    /// inverted trap). ``hold``: read the rows by left sample-and-hold (row k holds until
    /// the next row's time) instead of linearly. ``occupation``: mean quanta of the
    /// thermal start. ``tolerance``: on Q* - 1, in (0, 1). ``end_frequencies_rad_s``:
    /// (omega_i, omega_f), rad/s, the trap before and after the table (default: the
    /// first and last rows). ``accuracy``: relative propagation accuracy, 1e-15 to
    /// 1e-2. ``name``: the report's ``name`` (the command line puts the file's stem).
    ///
    /// Bad arrays raise ValueError with the command line's message (data rows counted
    /// from 1).
    #[pyfunction]
    #[pyo3(signature = (t_s, omega_rad_s=None, *, omega2=None, hold=false, occupation=0.0, tolerance=1e-3,
        end_frequencies_rad_s=None, accuracy=None, name="waveform"))]
    pub fn evaluate(
        py: Python<'_>,
        t_s: &Bound<'_, PyAny>,
        omega_rad_s: Option<&Bound<'_, PyAny>>,
        omega2: Option<&Bound<'_, PyAny>>,
        hold: bool,
        occupation: f64,
        tolerance: f64,
        end_frequencies_rad_s: Option<(f64, f64)>,
        accuracy: Option<f64>,
        name: &str,
    ) -> PyResult<Py<PyAny>> {
        guarded(|| {
            let table = ArrayWaveform::from_args(t_s, omega_rad_s, omega2, hold, end_frequencies_rad_s)?;
            let name = name.to_string();
            let (v, _) = job::run(py, None, 0, move |_| {
                let ramp = table.ramp()?;
                super::free_ramp(&name, &ramp, occupation, Some(tolerance), accuracy, None)
            })?;
            to_python(py, &v)
        })
    }
}
