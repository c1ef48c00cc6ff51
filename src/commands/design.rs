//! `quenchless design`.

use super::generator;
use super::playing::{Source, judge};
use super::propagation;
use crate::CommandError;
use crate::cli::{DesignKind, DesignOutput, EndFrequencies};
use crate::report::versioned;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::{
    SplineFit, SplineTargets, frictionless_constant_mu, nearest_frictionless_order, optimise_spline,
    shortcut_for_duration, shortest_shortcut_above, time_optimal_holds,
};
use quenchless_physics::diagnostics::q_star_minus_one;
use quenchless_physics::playback::AssessmentSettings;
use quenchless_physics::{PropagationOptions, TrapLimits};
use quenchless_physics::{Ramp, RampShape};
use quenchless_profile::generator_settings::GivenSettings;
use quenchless_profile::study::{CandidateRamp, HoldSpec, KnotSpec, RampSpec, Study, TrapSpec};
use quenchless_profile::{ExportColumns, save_study};
use quenchless_profile::{convert, load_study};
use serde_json::{Value, json};
use std::path::Path;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};

/// (omega_i, omega_f) in rad/s from --from and --to.
fn end_omegas(ends: &EndFrequencies) -> (f64, f64) {
    (TWO_PI * ends.from.si, TWO_PI * ends.to.si)
}

pub fn run(kind: &DesignKind) -> Result<(), CommandError> {
    let opts = propagation(None)?;
    let (ramp, spec, mut report, out, label) = match kind {
        DesignKind::Spline {
            profile,
            ramp,
            target,
            robust,
            band_points,
            max_iterations,
            ignore_limits,
            reference_axis_only,
            out,
        } => {
            return spline(
                &SplineRequest {
                    profile,
                    name: ramp,
                    target: *target,
                    robust: robust.as_ref().map(|r| r.si),
                    band_points: *band_points,
                    max_iterations: *max_iterations,
                    ignore_limits: *ignore_limits,
                    reference_axis_only: *reference_axis_only,
                },
                out,
            );
        }
        DesignKind::ConstantMu { ends, order, near_time, out } => {
            let (wi, wf) = end_omegas(ends);
            let d = match (order, near_time) {
                (Some(k), _) => {
                    frictionless_constant_mu(wi, wf, *k).map_err(|e| CommandError(format!("--order {k}: {e}")))?
                }
                (None, Some(t)) => nearest_frictionless_order(wi, wf, t.si)
                    .map_err(|e| CommandError(format!("--near-time {}: {e}", t.typed)))?,
                (None, None) => return Err(CommandError("give --order K or --near-time t".into())),
            };
            let spec = RampSpec::ConstantMu { from_hz: wi / TWO_PI, to_hz: wf / TWO_PI, duration_s: d.duration };
            let report = json!({"order": d.order, "mu": d.mu, "duration_s": d.duration});
            (Ramp::ConstantMu(d.ramp), spec, report, out, format!("constant mu, order {}", d.order))
        }
        DesignKind::Shortcut { ends, time, min_omega2, out } => {
            let (wi, wf) = end_omegas(ends);
            let d = match (time, min_omega2) {
                (Some(t), _) => shortcut_for_duration(wi, wf, t.si)?,
                (None, Some(x)) => {
                    shortest_shortcut_above(wi, wf, *x).map_err(|e| CommandError(format!("--min-omega2 {x}: {e}")))?
                }
                (None, None) => return Err(CommandError("give --time t or --min-omega2 X".into())),
            };
            let spec = RampSpec::Shortcut { from_hz: wi / TWO_PI, to_hz: wf / TWO_PI, duration_s: d.duration };
            let report = json!({"duration_s": d.duration, "min_omega2": d.min_omega2, "inverts": d.inverts});
            if d.inverts {
                eprintln!(
                    "warning: this shortcut inverts the trap (omega² down to {:e} (rad/s)²); an optical trap cannot play it",
                    d.min_omega2
                );
            }
            (Ramp::Shortcut(d.ramp), spec, report, out, "shortcut".to_string())
        }
        DesignKind::BangBang { ends, min, max, out } => {
            let (wi, wf) = end_omegas(ends);
            let (lo, hi) = (TWO_PI * min.si, TWO_PI * max.si);
            let d =
                time_optimal_holds(wi, wf, lo * lo, hi * hi).map_err(|e| CommandError(format!("--min/--max: {e}")))?;
            let segments: Vec<Value> = d
                .segments
                .iter()
                .map(|s| json!({"omega_rad_s": s.omega2.max(0.0).sqrt(), "duration_s": s.duration}))
                .collect();
            let holds = d
                .segments
                .iter()
                .map(|s| HoldSpec {
                    signed_frequency_hz: s.omega2.abs().sqrt().copysign(s.omega2) / TWO_PI,
                    duration_s: s.duration,
                })
                .collect();
            let spec = RampSpec::Holds { from_hz: wi / TWO_PI, to_hz: wf / TWO_PI, holds };
            let report = json!({"duration_s": d.duration, "segments": segments});
            (Ramp::PiecewiseConstant(d.ramp), spec, report, out, "time-optimal holds".to_string())
        }
    };
    let excess = q_star_minus_one(&ramp, &opts)?;
    (report["q_star"], report["q_star_minus_one"]) = (json!(1.0 + excess), json!(excess));
    write_outputs(&ramp, &spec, out, &label)?;
    if out.json {
        println!("{}", serde_json::to_string_pretty(&versioned(report.clone())).map_err(CommandError::from)?);
    } else {
        println!("{label}: {} -> {} kHz", ramp.omega_initial() / TWO_PI / 1e3, ramp.omega_final() / TWO_PI / 1e3);
        if let Value::Object(map) = &report {
            for (k, v) in map {
                println!("  {k:<12} {v}");
            }
        }
    }
    Ok(())
}

/// What `design spline` was asked.
struct SplineRequest<'a> {
    profile: &'a Path,
    name: &'a str,
    target: f64,
    robust: Option<f64>,
    band_points: usize,
    max_iterations: u64,
    ignore_limits: bool,
    reference_axis_only: bool,
}

/// The laws of the study's axes besides the reference one.
fn other_laws(
    study: &quenchless_profile::Study,
    path: &Path,
) -> Result<Vec<quenchless_physics::ramp::AxisLaw>, CommandError> {
    let model = convert::trap_model(&study.trap).map_err(|e| e.in_file(path))?;
    Ok(model.trap_axes().into_iter().skip(1).map(|a| a.law).collect())
}

fn spline(r: &SplineRequest<'_>, out: &DesignOutput) -> Result<(), CommandError> {
    let mut study = load_study(r.profile)?;
    let (_, ramp) = convert::named_candidate(&study, r.name, "--ramp").map_err(|e| e.in_file(r.profile))?;
    let Ramp::Spline(start) = ramp else {
        return Err(CommandError(format!(
            "--ramp {}: a {} candidate; spline optimisation needs a spline",
            r.name,
            ramp.family_name()
        )));
    };
    if !(r.target.is_finite() && r.target > 0.0 && r.target < 1.0) {
        return Err(CommandError(format!("--target {}: allowed a number in (0, 1)", r.target)));
    }
    let band = r.robust;
    if band.is_some() && (!(3..=41).contains(&r.band_points) || r.band_points.is_multiple_of(2)) {
        return Err(CommandError(format!("--band-points {}: allowed an odd number, 3 to 41", r.band_points)));
    }
    if !(1..=1_000_000).contains(&r.max_iterations) {
        return Err(CommandError(format!("--max-iterations {}: allowed 1 to 1000000", r.max_iterations)));
    }
    let limits = if r.ignore_limits {
        TrapLimits::default()
    } else {
        convert::limits(&study.trap).map_err(|e| e.in_file(r.profile))?
    };
    let targets = SplineTargets {
        target: r.target,
        limits,
        calibration_band: band,
        band_points: r.band_points,
        max_iterations: r.max_iterations,
        other_axes: if r.reference_axis_only { Vec::new() } else { other_laws(&study, r.profile)? },
    };
    let search = PropagationOptions::with_accuracy((1e-3 * r.target).clamp(1e-13, 1e-9))?;
    let shown = AtomicU64::new(0);
    let progress = |evals: u64, best: f64| {
        if evals >= shown.load(Ordering::Relaxed) + 500 {
            shown.store(evals, Ordering::Relaxed);
            eprint!("\r{evals} evaluations, best {best:.3e}   ");
        }
    };
    let fit = optimise_spline(&start, &targets, &search, &progress, &AtomicBool::new(false))?;
    eprintln!("\r{} evaluations in {} iterations{:20}", fit.evaluations, fit.iterations, "");
    let knots: Vec<KnotSpec> = fit
        .ramp
        .times()
        .iter()
        .zip(fit.ramp.omegas())
        .map(|(&t, &w)| KnotSpec { t_s: t, frequency_hz: w / TWO_PI })
        .collect();
    let report = json!({
        "axes_targeted": targets.other_axes.len() + 1,
        "q_star_start": 1.0 + fit.start_q_star_minus_one,
        "q_star_minus_one_start": fit.start_q_star_minus_one,
        "q_star": 1.0 + fit.q_star_minus_one,
        "q_star_minus_one": fit.q_star_minus_one,
        "worst_q_star": fit.worst_q_star_minus_one.map(|e| 1.0 + e),
        "worst_q_star_minus_one": fit.worst_q_star_minus_one,
        "calibration_band": band,
        "target": r.target,
        "reached": fit.reached,
        "within_limits": fit.within_limits,
        "iterations": fit.iterations,
        "evaluations": fit.evaluations,
        "knots": knots.iter().map(|k| json!({"t_s": k.t_s, "frequency_hz": k.frequency_hz})).collect::<Vec<_>>(),
    });
    let label = format!("{} (optimised)", r.name);
    let ramp = Ramp::Spline(fit.ramp.clone());
    if let Some(path) = &out.waveform_out {
        write_waveform_out(&ramp, out, path, &label)?;
    }
    plot_out(&ramp, out, &label)?;
    if let Some(path) = &out.profile_out {
        let Some(old) = study.candidate(r.name).cloned() else { unreachable!("the candidate was found above") };
        let RampSpec::Spline { shape, log_frequency, flat_ends, .. } = old.ramp else {
            unreachable!("the candidate is a spline")
        };
        let mut name = label.clone();
        let mut k = 2;
        while study.candidate(&name).is_some() {
            name = format!("{label} {k}");
            k += 1;
        }
        study.candidates.push(CandidateRamp {
            name,
            visible: true,
            colour: None,
            ramp: RampSpec::Spline { knots, shape, log_frequency, flat_ends },
        });
        save_study(&study, path)?;
    }
    print_fit(&fit, &report, &label, band, r.target, out.json)
}

fn print_fit(
    fit: &SplineFit,
    report: &Value,
    label: &str,
    band: Option<f64>,
    target: f64,
    as_json: bool,
) -> Result<(), CommandError> {
    if as_json {
        println!("{}", serde_json::to_string_pretty(&versioned(report.clone())).map_err(CommandError::from)?);
        return Ok(());
    }
    println!("{label}: Q* - 1 {:.3e} -> {:.3e}", fit.start_q_star_minus_one, fit.q_star_minus_one);
    if let Some(w) = fit.worst_q_star_minus_one {
        println!("  worst Q* - 1 over +-{:.2}%: {w:.3e}", 100.0 * band.unwrap_or(0.0));
    }
    println!(
        "  {} (target Q* - 1 <= {target:e}); {} limits; {} iterations, {} evaluations",
        if fit.reached { "reached" } else { "NOT reached" },
        if fit.within_limits { "within" } else { "BREAKS" },
        fit.iterations,
        fit.evaluations
    );
    Ok(())
}

fn plot_out(ramp: &Ramp, out: &DesignOutput, label: &str) -> Result<(), CommandError> {
    if let Some(path) = &out.plot {
        super::plot_path(Some(path))?;
        crate::plot::write_ramp(ramp, label, path)?;
    }
    Ok(())
}

fn write_waveform_out(ramp: &Ramp, out: &DesignOutput, path: &Path, label: &str) -> Result<(), CommandError> {
    let rate =
        out.rate.as_ref().ok_or_else(|| CommandError("--waveform-out needs --rate R (samples per second)".into()))?;
    let (playback, _) =
        generator::playback(&GivenSettings::rate(generator::given(rate)), None, None, generator::FLAGS)?;
    let limits = TrapLimits::default();
    let settings = AssessmentSettings { limits, searches: false, ..Default::default() };
    let source = Source { study: None, candidate: label, ramp, limits, other_axes: Vec::new() };
    let judged = judge(source, playback, "rad^2/s^2".into(), settings, &propagation(None)?)?;
    judged.announce();
    judged.write_trap(path, ExportColumns::Si)?;
    Ok(())
}

fn write_outputs(ramp: &Ramp, spec: &RampSpec, out: &DesignOutput, label: &str) -> Result<(), CommandError> {
    if let Some(path) = &out.waveform_out {
        write_waveform_out(ramp, out, path, label)?;
    }
    plot_out(ramp, out, label)?;
    if let Some(path) = &out.profile_out {
        let study = Study {
            name: format!("Designed: {label}"),
            trap: TrapSpec {
                start_frequency_hz: ramp.omega_initial() / TWO_PI,
                end_frequency_hz: ramp.omega_final() / TWO_PI,
                ..TrapSpec::default()
            },
            candidates: vec![CandidateRamp {
                name: label.to_string(),
                visible: true,
                colour: None,
                ramp: spec.clone(),
            }],
            ..Study::default()
        };
        save_study(&study, path)?;
    }
    Ok(())
}
