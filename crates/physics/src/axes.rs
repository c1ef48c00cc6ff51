//! Every axis one control moves. A tweezer's power sets its radial and axial
//! frequencies together; a linear Paul trap's DC voltage sets the axial frequency and
//! shifts the radial ones. Each axis is its own oscillator with omega_axis² = gain
//! omega² + offset ([`AxisLaw`]); its moments evolve exactly like the reference axis's,
//! so every diagnostic of [`crate::diagnostics::evaluate`] applies to it unchanged.
//! The start state is thermal at one temperature, fixed on the reference axis.

use crate::diagnostics::{EvaluationSettings, RampReport, Verdict, evaluate};
use crate::error::{PhysicsError, Result};
use crate::limits::TrapLimits;
use crate::ramp::{AxisLaw, Ramp, RampShape};
use crate::state::Moments;

/// One axis of the trap.
#[derive(Debug, Clone, PartialEq)]
pub struct TrapAxis {
    /// Its name, as the lab calls it ("radial", "axial", "x").
    pub name: String,
    /// How its omega² follows the reference's.
    pub law: AxisLaw,
    /// Its stated frequency bounds (and slew limit, for the reference axis).
    pub limits: TrapLimits,
}

/// The figures of one axis.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct AxisReport {
    /// The axis's name.
    pub name: String,
    /// Gain on the reference omega².
    pub gain: f64,
    /// Offset, (rad/s)².
    pub offset_omega2: f64,
    /// Mean occupation of its start state (from the common temperature).
    pub occupation: f64,
    /// `pass`, `fail` or `breaks-limits` for this axis.
    pub verdict: &'static str,
    /// The axis's end figures, as for a ramp (frequencies are the axis's own).
    #[cfg_attr(feature = "serde", serde(flatten))]
    pub report: RampReport,
}

/// Mean occupation on an axis of frequency `omega_axis` at the temperature that gives
/// occupation `occupation` on the reference axis of frequency `omega_reference`
/// (Bose-Einstein: N = 1/(exp(hbar omega/kT) - 1), so exp(hbar omega_r/kT) = 1 + 1/N
/// and N_axis = 1/((1 + 1/N)^(omega_axis/omega_r) - 1); 0 stays 0).
pub fn occupation_on_axis(omega_reference: f64, occupation: f64, omega_axis: f64) -> Result<f64> {
    if !(occupation.is_finite() && occupation >= 0.0) {
        return Err(PhysicsError::invalid("start occupation", occupation, "a finite number >= 0"));
    }
    for (name, w) in [("reference frequency", omega_reference), ("axis frequency", omega_axis)] {
        if !(w.is_finite() && w > 0.0) {
            return Err(PhysicsError::invalid(name, w, "a finite number > 0 rad/s"));
        }
    }
    if occupation == 0.0 {
        return Ok(0.0);
    }
    let ratio = omega_axis / omega_reference;
    Ok(1.0 / (ratio * (1.0 / occupation).ln_1p()).exp_m1())
}

/// Evaluates `ramp` (drawn for the reference axis) on every axis, from a thermal start
/// with occupation `reference_occupation` on the reference axis. `settings.limits` is
/// replaced by each axis's own limits. The reports come in the order of `axes`.
pub fn evaluate_axes(
    ramp: &Ramp,
    reference_occupation: f64,
    axes: &[TrapAxis],
    settings: &EvaluationSettings,
) -> Result<Vec<AxisReport>> {
    axes.iter()
        .map(|axis| {
            evaluate_axis(ramp, reference_occupation, axis, settings)
                .map_err(|e| PhysicsError::OnAxis { axis: axis.name.clone(), source: Box::new(e) })
        })
        .collect()
}

fn evaluate_axis(
    ramp: &Ramp,
    reference_occupation: f64,
    axis: &TrapAxis,
    settings: &EvaluationSettings,
) -> Result<AxisReport> {
    {
        {
            let on_axis = ramp.on_axis(axis.law)?;
            let occupation = occupation_on_axis(ramp.omega_initial(), reference_occupation, on_axis.omega_initial())?;
            let initial = Moments::thermal_occupation(on_axis.omega_initial(), occupation)?;
            let settings = EvaluationSettings { limits: axis.limits, ..*settings };
            let report = evaluate(&on_axis, &initial, &settings)?.report;
            Ok(AxisReport {
                name: axis.name.clone(),
                gain: axis.law.gain,
                offset_omega2: axis.law.offset_omega2,
                occupation,
                verdict: report.verdict().key(),
                report,
            })
        }
    }
}

/// Rank of a verdict, worst highest: breaks limits over fail over pass.
fn rank(v: Verdict) -> u8 {
    match v {
        Verdict::Pass => 0,
        Verdict::Fail => 1,
        Verdict::BreaksLimits => 2,
    }
}

/// The index of the worst axis: the worst verdict, then the largest Q* - 1.
pub fn worst_axis(reports: &[AxisReport]) -> Option<usize> {
    reports
        .iter()
        .enumerate()
        .max_by(|(_, a), (_, b)| {
            rank(a.report.verdict())
                .cmp(&rank(b.report.verdict()))
                .then(a.report.q_star_minus_one.total_cmp(&b.report.q_star_minus_one))
        })
        .map(|(i, _)| i)
}

/// The largest Q* - 1 of `ramp` over the reference axis and every axis of `other_axes`
/// (what a design for the whole trap must bring down).
pub fn worst_q_star_minus_one(
    ramp: &Ramp,
    other_axes: &[AxisLaw],
    opts: &crate::propagate::PropagationOptions,
) -> Result<f64> {
    let mut worst = crate::diagnostics::q_star_minus_one(ramp, opts)?;
    for law in other_axes {
        worst = worst.max(crate::diagnostics::q_star_minus_one(&ramp.on_axis(*law)?, opts)?);
    }
    Ok(worst)
}
