//! `quenchless tune-cycle`: the power-optimal timing (and ratio) of a profile's cycle.

use super::propagation;
use crate::CommandError;
use crate::cli::{FamilyArg, TuneCycleArgs};
use quenchless_physics::TrapLimits;
use quenchless_physics::design::{CycleTuning, StrokeFamily, optimise_cycle};
use quenchless_profile::{convert, load_study, save_study};
use serde_json::json;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};

fn family(f: FamilyArg) -> StrokeFamily {
    match f {
        FamilyArg::Linear => StrokeFamily::Linear,
        FamilyArg::ConstantMu => StrokeFamily::ConstantMu,
        FamilyArg::Shortcut => StrokeFamily::Shortcut,
        FamilyArg::Adiabatic => StrokeFamily::IdealAdiabatic,
    }
}

/// `--min-stroke-time`, required for ideal adiabatic strokes.
fn shortest_stroke(a: &TuneCycleArgs, fam: StrokeFamily) -> Result<f64, CommandError> {
    Ok(match &a.min_stroke_time {
        Some(t) => t.si,
        None if fam == StrokeFamily::IdealAdiabatic => {
            return Err(CommandError(
                "--family adiabatic needs --min-stroke-time t: ideal adiabatic strokes change nothing but the cycle \
                 time, so the power grows without bound as they shrink and there is no finite optimum"
                    .into(),
            ));
        }
        None => 0.0,
    })
}

pub fn run(a: &TuneCycleArgs) -> Result<(), CommandError> {
    let mut study = load_study(&a.profile)?;
    let Some(spec) = study.cycle.clone() else {
        return Err(CommandError(format!("{}: the study has no cycle section to tune", a.profile.display())));
    };
    let template = convert::cycle(&study, &spec).map_err(|e| e.in_file(&a.profile))?;
    if !(1..=1_000_000).contains(&a.max_iterations) {
        return Err(CommandError(format!("--max-iterations {}: allowed 1 to 1000000", a.max_iterations)));
    }
    let total_time =
        if a.free_total { None } else { Some(a.total.as_ref().map_or_else(|| template.cycle_time(), |t| t.si)) };
    let limits = if a.ignore_limits {
        TrapLimits::default()
    } else {
        convert::limits(&study.trap).map_err(|e| e.in_file(&a.profile))?
    };
    let fam = family(a.family);
    let min_stroke_time = shortest_stroke(a, fam)?;
    let tuning = CycleTuning {
        family: fam,
        total_time,
        vary_ratio: a.vary_ratio,
        limits,
        max_iterations: a.max_iterations,
        min_stroke_time,
    };
    let opts = propagation(None)?;
    let shown = AtomicU64::new(0);
    let progress = |evals: u64, best: f64| {
        if evals >= shown.load(Ordering::Relaxed) + 200 {
            shown.store(evals, Ordering::Relaxed);
            eprint!("\r{evals} cycles analysed, best power {best:.4e} W   ");
        }
    };
    let best = optimise_cycle(&template, &tuning, &opts, &progress, &AtomicBool::new(false))?;
    eprintln!("\r{} cycles analysed in {} iterations{:20}", best.evaluations, best.iterations, "");
    let [th, te, tc, tk] = best.stroke_times;
    let report = json!({
        "family": fam.name(),
        "hot_time_s": th,
        "expansion_time_s": te,
        "cold_time_s": tc,
        "compression_time_s": tk,
        "total_time_s": best.total_time,
        "omega_ratio": best.ratio,
        "power_w": best.power_w,
        "start_power_w": best.start_power_w,
        "efficiency": best.efficiency,
        "otto_efficiency": best.otto_efficiency,
        "curzon_ahlborn_efficiency": best.curzon_ahlborn,
        "iterations": best.iterations,
        "evaluations": best.evaluations,
    });
    if let Some(path) = &a.profile_out {
        let new = convert::optimum_cycle_spec(&spec, &best, fam, a.vary_ratio);
        study.cycle = Some(new);
        save_study(&study, path)?;
    }
    if a.json {
        println!("{}", serde_json::to_string_pretty(&crate::report::versioned(report)).map_err(CommandError::from)?);
        return Ok(());
    }
    println!("power-optimal cycle, {} strokes", fam.name());
    println!("  hot contact {th:.4e} s, expansion {te:.4e} s, cold contact {tc:.4e} s, compression {tk:.4e} s");
    println!("  total {:.4e} s, omega_c/omega_h {:.6}", best.total_time, best.ratio);
    println!("  power {:.6e} W (start {:.6e} W)", best.power_w, best.start_power_w);
    match best.efficiency {
        Some(e) => println!("  efficiency at maximum power {e:.6}"),
        None => println!("  not an engine at the optimum"),
    }
    println!("  1 - omega_c/omega_h = {:.6}", best.otto_efficiency);
    if let Some(ca) = best.curzon_ahlborn {
        println!("  1 - sqrt(T_c/T_h)   = {ca:.6}");
    }
    Ok(())
}
