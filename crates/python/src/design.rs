//! The designs of `quenchless design`: each returns the `design --json` object and the
//! ramp, computed by the same physics calls as the command line.

use crate::errors::{Failure, Outcome, guarded};
use crate::evaluate::propagation;
use crate::job;
use crate::json::to_python;
use crate::ramp::PyRamp;
use pyo3::prelude::*;
use quenchless_physics::Ramp;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::{
    frictionless_constant_mu, nearest_frictionless_order, shortcut_for_duration, shortest_shortcut_above,
    time_optimal_holds,
};
use quenchless_physics::diagnostics::q_star_minus_one;
use quenchless_profile::report::versioned;
use serde_json::{Value, json};

/// A frequency argument in Hz, checked (> 0, finite).
fn hz(name: &str, v: f64) -> Outcome<f64> {
    if v.is_finite() && v > 0.0 {
        Ok(v)
    } else {
        Err(Failure::value(format!("{name} {v}: allowed a finite frequency > 0 in Hz (nu, not omega)")))
    }
}

/// Adds Q* and Q* - 1 of the ramp (as the command line does) and the schema version.
fn finish(py: Python<'_>, ramp: Ramp, mut report: Value, label: &str) -> PyResult<(Py<PyAny>, PyRamp)> {
    let r = ramp.clone();
    let excess = job::run(py, None, 0, move |_| Ok(q_star_minus_one(&r, &propagation(None)?)?))?;
    (report["q_star"], report["q_star_minus_one"]) = (json!(1.0 + excess), json!(excess));
    Ok((to_python(py, &versioned(report))?, PyRamp::designed(ramp, label)))
}

/// The constant-adiabaticity ramp (mu = omega'/omega² constant) of a frictionless
/// order: ``order`` K (1, 2, ...) or the order whose duration is nearest
/// ``near_time_s`` (s). Frequencies ``start_hz`` and ``end_hz`` are ordinary
/// frequencies nu in Hz (omega = 2 pi nu). Returns ``(report, ramp)``: ``report`` has
/// the keys of ``quenchless design constant-mu --json``.
#[pyfunction]
#[pyo3(signature = (start_hz, end_hz, *, order=None, near_time_s=None))]
pub fn design_constant_mu(
    py: Python<'_>,
    start_hz: f64,
    end_hz: f64,
    order: Option<u32>,
    near_time_s: Option<f64>,
) -> PyResult<(Py<PyAny>, PyRamp)> {
    guarded(|| {
        let (wi, wf) = (TWO_PI * hz("start_hz", start_hz)?, TWO_PI * hz("end_hz", end_hz)?);
        let d = match (order, near_time_s) {
            (Some(k), _) => {
                frictionless_constant_mu(wi, wf, k).map_err(|e| Failure::value(format!("order {k}: {e}")))?
            }
            (None, Some(t)) => {
                nearest_frictionless_order(wi, wf, t).map_err(|e| Failure::value(format!("near_time_s {t}: {e}")))?
            }
            (None, None) => return Err(Failure::value("give order=K or near_time_s=t").into()),
        };
        let report = json!({"order": d.order, "mu": d.mu, "duration_s": d.duration});
        let label = format!("constant mu, order {}", d.order);
        finish(py, Ramp::ConstantMu(d.ramp), report, &label)
    })
}

/// The invariant-based shortcut (Chen et al., PRL 104, 063002 (2010)): a polynomial
/// scaling whose Q* is exactly 1, for ``duration_s`` (s) or the shortest one whose
/// omega² stays at or above ``min_omega2`` ((rad/s)², may be 0 or negative).
/// ``start_hz``/``end_hz``: ordinary frequencies nu in Hz, not omega. Returns
/// ``(report, ramp)`` with the keys of ``quenchless design shortcut --json``; a
/// shortcut that inverts the trap also warns (RuntimeWarning), as the command line does.
#[pyfunction]
#[pyo3(signature = (start_hz, end_hz, *, duration_s=None, min_omega2=None))]
pub fn design_shortcut(
    py: Python<'_>,
    start_hz: f64,
    end_hz: f64,
    duration_s: Option<f64>,
    min_omega2: Option<f64>,
) -> PyResult<(Py<PyAny>, PyRamp)> {
    guarded(|| {
        let (wi, wf) = (TWO_PI * hz("start_hz", start_hz)?, TWO_PI * hz("end_hz", end_hz)?);
        let d = match (duration_s, min_omega2) {
            (Some(t), _) => shortcut_for_duration(wi, wf, t).map_err(Failure::from)?,
            (None, Some(x)) => {
                shortest_shortcut_above(wi, wf, x).map_err(|e| Failure::value(format!("min_omega2 {x}: {e}")))?
            }
            (None, None) => return Err(Failure::value("give duration_s=t or min_omega2=X").into()),
        };
        if d.inverts {
            let warnings = py.import("warnings")?;
            warnings.call_method1(
                "warn",
                (
                    format!(
                        "this shortcut inverts the trap (omega² down to {:e} (rad/s)²); an optical trap cannot play it",
                        d.min_omega2
                    ),
                    py.get_type::<pyo3::exceptions::PyRuntimeWarning>(),
                ),
            )?;
        }
        let report = json!({"duration_s": d.duration, "min_omega2": d.min_omega2, "inverts": d.inverts});
        finish(py, Ramp::Shortcut(d.ramp), report, "shortcut")
    })
}

/// The time-optimal ramp between bounds: holds at ``min_hz`` and ``max_hz`` (Hz, nu
/// not omega) between ``start_hz`` and ``end_hz``. Returns ``(report, ramp)`` with the
/// keys of ``quenchless design bang-bang --json`` (``segments`` with ``omega_rad_s``
/// and ``duration_s``).
#[pyfunction]
pub fn design_bang_bang(
    py: Python<'_>,
    start_hz: f64,
    end_hz: f64,
    min_hz: f64,
    max_hz: f64,
) -> PyResult<(Py<PyAny>, PyRamp)> {
    guarded(|| {
        let (wi, wf) = (TWO_PI * hz("start_hz", start_hz)?, TWO_PI * hz("end_hz", end_hz)?);
        if !(min_hz.is_finite() && min_hz >= 0.0) {
            return Err(Failure::value(format!(
                "min_hz {min_hz}: allowed a finite frequency >= 0 in Hz (nu, not omega)"
            ))
            .into());
        }
        let (lo, hi) = (TWO_PI * min_hz, TWO_PI * hz("max_hz", max_hz)?);
        let d =
            time_optimal_holds(wi, wf, lo * lo, hi * hi).map_err(|e| Failure::value(format!("min_hz/max_hz: {e}")))?;
        let segments: Vec<Value> = d
            .segments
            .iter()
            .map(|s| json!({"omega_rad_s": s.omega2.max(0.0).sqrt(), "duration_s": s.duration}))
            .collect();
        let report = json!({"duration_s": d.duration, "segments": segments});
        let ramp = Ramp::PiecewiseConstant(d.ramp);
        finish(py, ramp, report, "time-optimal holds")
    })
}
