//! What the window evaluates while you edit: a range of durations and frequencies that
//! covers trap ramps (1 ps to 1000 s, up to 10 GHz, up to 400,000 trap periods); a long
//! ramp's exact evaluation runs on a worker (see `compute`). A value outside it is refused like an invalid one, naming
//! the field, the value and the range; the headless commands have no such range.

use crate::edits::spec_duration;
use quenchless_physics::constants::TWO_PI;
use quenchless_profile::Study;
use quenchless_profile::study::{BathSpec, RampSpec, StrokeSpec};

/// Highest ordinary frequency anywhere in a study the window evaluates, Hz.
pub const MAX_FREQUENCY_HZ: f64 = 1e10;
/// Shortest ramp duration the window evaluates, s.
pub const MIN_DURATION_S: f64 = 1e-12;
/// Longest ramp, contact or hold the window evaluates, s.
pub const MAX_DURATION_S: f64 = 1e3;
/// Most trap periods (duration times the highest frequency) of one ramp. A long ramp
/// is evaluated on a worker with the physics crate's 50 M step budget; at about 113
/// steps per period (measured on a 35 ms shortcut) 400,000 periods stay inside it,
/// some 7 s of propagation.
pub const MAX_PERIODS: f64 = 4e5;

fn refuse(field: &str, value: &str, allowed: &str) -> Result<(), String> {
    Err(format!("{field} = {value} is not allowed: {allowed} (the range the window evaluates while you edit)"))
}

fn frequency(field: &str, hz: f64) -> Result<(), String> {
    if hz.abs() > MAX_FREQUENCY_HZ {
        return refuse(field, &format!("{hz:e} Hz"), &format!("at most {MAX_FREQUENCY_HZ:e} Hz in size"));
    }
    Ok(())
}

fn time(field: &str, t: f64, min: f64) -> Result<(), String> {
    if !(min..=MAX_DURATION_S).contains(&t) {
        return refuse(field, &format!("{t:e} s"), &format!("{min:e} s to {MAX_DURATION_S:e} s"));
    }
    Ok(())
}

/// The largest |ordinary frequency| a ramp spec reaches at its defining points, Hz.
pub fn spec_peak_hz(spec: &RampSpec) -> f64 {
    let omega_hz = |w: f64| w.abs() / TWO_PI;
    let omega2_hz = |w2: f64| w2.abs().sqrt() / TWO_PI;
    match spec {
        RampSpec::Linear { from_hz, to_hz, .. }
        | RampSpec::ConstantMu { from_hz, to_hz, .. }
        | RampSpec::Shortcut { from_hz, to_hz, .. } => from_hz.abs().max(to_hz.abs()),
        RampSpec::Polynomial { omega2_coefficients, .. } => {
            // |omega²| <= sum |a_k| on [0, 1].
            omega2_hz(omega2_coefficients.iter().map(|a| a.abs()).sum())
        }
        RampSpec::Holds { from_hz, to_hz, holds } => {
            holds.iter().map(|h| h.signed_frequency_hz.abs()).fold(from_hz.abs().max(to_hz.abs()), f64::max)
        }
        RampSpec::Spline { knots, .. } => knots.iter().map(|k| k.frequency_hz.abs()).fold(0.0, f64::max),
        RampSpec::Waveform { omega2_column, values, .. } => {
            let peak = values.iter().map(|v| v.abs()).fold(0.0, f64::max);
            if *omega2_column { omega2_hz(peak) } else { omega_hz(peak) }
        }
    }
}

/// Checks one ramp spec; `field` names it.
pub fn check_ramp(spec: &RampSpec, field: &str) -> Result<(), String> {
    let peak = spec_peak_hz(spec);
    frequency(&format!("{field} highest frequency"), peak)?;
    let tau = spec_duration(spec);
    time(&format!("{field} duration"), tau, MIN_DURATION_S)?;
    if tau * peak > MAX_PERIODS {
        return refuse(
            &format!("{field} duration × highest frequency"),
            &format!("{:e} trap periods", tau * peak),
            &format!("at most {MAX_PERIODS:e} periods"),
        );
    }
    Ok(())
}

fn check_bath(b: &BathSpec, field: &str) -> Result<(), String> {
    frequency(&format!("{field}.frequency_hz"), b.frequency_hz)?;
    time(&format!("{field}.time_s"), b.time_s, 0.0)
}

fn check_stroke(s: &StrokeSpec, field: &str) -> Result<(), String> {
    match s {
        StrokeSpec::Candidate(_) => Ok(()),
        StrokeSpec::Sudden { hold_s } => time(&format!("{field}.hold_s"), *hold_s, 0.0),
        StrokeSpec::IdealAdiabatic { time_s } => time(&format!("{field}.time_s"), *time_s, 0.0),
        StrokeSpec::Ramp(r) => check_ramp(r, field),
    }
}

/// Checks a whole study against the window's range.
pub fn check_interactive(study: &Study) -> Result<(), String> {
    let t = &study.trap;
    frequency("trap.start_frequency_hz", t.start_frequency_hz)?;
    frequency("trap.end_frequency_hz", t.end_frequency_hz)?;
    for c in &study.candidates {
        check_ramp(&c.ramp, &format!("candidate “{}”", c.name))?;
    }
    if let Some(cy) = &study.cycle {
        check_bath(&cy.hot, "cycle.hot")?;
        check_bath(&cy.cold, "cycle.cold")?;
        check_stroke(&cy.expansion, "cycle.expansion")?;
        check_stroke(&cy.compression, "cycle.compression")?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn demo_is_inside_and_absurd_values_are_named() {
        let mut s = crate::demo::demo_study();
        check_interactive(&s).expect("the demo is an ordinary study");
        crate::edits::set_duration(&mut s.candidates[0].ramp, 1e300);
        let e = check_interactive(&s).expect_err("1e300 s is refused");
        assert!(e.contains("straight line") && e.contains("1e300 s"), "{e}");
        let mut s = crate::demo::demo_study();
        s.trap.end_frequency_hz = 1e300;
        assert!(check_interactive(&s).expect_err("1e300 Hz").contains("trap.end_frequency_hz"));
        // 1 s at 120 kHz is 1.2e5 periods: inside (on the worker); 10 s is 1.2e6: refused.
        let mut s = crate::demo::demo_study();
        crate::edits::set_duration(&mut s.candidates[0].ramp, 1.0);
        check_interactive(&s).expect("long but inside");
        crate::edits::set_duration(&mut s.candidates[0].ramp, 10.0);
        assert!(check_interactive(&s).expect_err("too many periods").contains("periods"));
    }
}
