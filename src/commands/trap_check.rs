//! `quenchless trap-check`: the anharmonic check of a ramp, one axis at a time (a 1D
//! cut through the trap centre), by the physics crate's split-step solver.

use super::{GivenRamp, tolerance};
use crate::CommandError;
use crate::cli::{ShapeArg, TrapCheckArgs};
use quenchless_physics::anharmonic::{AxisCheck, AxisProblem, CheckSettings, check_axis};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::ramp::Ramp;
use quenchless_profile::Study;
use quenchless_profile::convert::{self, AxisToCheck, well_words};
use quenchless_profile::given_axis::{AxisNames, GivenAxis, GivenShape};
use quenchless_profile::report::{trap_check_axis_json, trap_check_json, worst_check};
use quenchless_profile::units::{Quantity, format_quantity};
use std::fmt::Write as _;

/// One axis to check, with everything its report names.
type Job = AxisToCheck;

/// The flags' names, for the messages of the one-axis rules.
const FLAGS: AxisNames = AxisNames {
    shape: "--shape",
    quote_shape: false,
    length: "--length",
    length_hint: "800nm, 0.8um, 2.4µm, 1mm",
    mass: "--mass",
    mass_hint: "86.909180527u or 1.443e-25kg",
    law: "--gain/--offset",
    offset: "--offset",
    occupation: "--occupation",
};

fn flags_mode(a: &TrapCheckArgs, study: Option<&Study>, ramp: &Ramp, shape: ShapeArg) -> Result<Job, CommandError> {
    let given = GivenAxis {
        shape: match shape {
            ShapeArg::Harmonic => GivenShape::Harmonic,
            ShapeArg::Gaussian => GivenShape::Gaussian,
            ShapeArg::Lorentzian => GivenShape::Lorentzian,
        },
        length_m: a.length.as_ref().map(|g| g.si),
        mass_kg: a.mass.as_ref().map(|g| g.si),
        gain: a.gain,
        offset_hz: a.offset.as_ref().map(|g| g.si),
        occupation: a.occupation,
    };
    given.to_check(study, ramp, &FLAGS).map_err(CommandError)
}

fn run_one(ramp: &Ramp, job: &Job, settings: &CheckSettings, label: &str) -> Result<AxisCheck, CommandError> {
    let problem = AxisProblem {
        ramp,
        gain: job.law.gain,
        offset_omega2: job.law.offset_omega2,
        mass_kg: job.mass_kg,
        well: job.well,
        occupation: job.occupation,
    };
    let mut shown = -1_i32;
    let mut progress = |f: f64| {
        let pct = (f * 100.0) as i32;
        if pct >= shown + 10 {
            shown = pct;
            eprint!("\r{label}: {pct:3}%");
        }
        true
    };
    let check = check_axis(&problem, settings, &mut progress).map_err(|e| CommandError(format!("{label}: {e}")))?;
    eprintln!("\r{label}: done");
    Ok(check)
}

fn axis_text(job: &Job, c: &AxisCheck) -> String {
    let mut s = String::new();
    let hz = |w: f64| format_quantity(w / TWO_PI, Quantity::Frequency);
    let _ = writeln!(
        s,
        "  axis {} ({}, {} -> {}, start occupation {:.4}): {}",
        job.name,
        well_words(&job.well),
        hz(c.start.omega_rad_s),
        hz(c.end.omega_rad_s),
        job.occupation,
        c.verdict().word()
    );
    let _ = writeln!(
        s,
        "    energy ratio       {:.11} (excess {:.3e}; tolerance {:.1e}); harmonic Q* - 1 = {:.3e}",
        c.energy_ratio, c.energy_ratio_minus_one, c.tolerance, c.harmonic_q_star_minus_one
    );
    let _ = writeln!(
        s,
        "    ground fidelity    {:.11} (harmonic model: {:.11})",
        c.ground_fidelity,
        (2.0 / (2.0 + c.harmonic_q_star_minus_one)).sqrt()
    );
    let _ = writeln!(
        s,
        "    lost fraction      {:.2e} (bound {:.1e}); levels used {}; {}{}",
        c.lost_fraction,
        c.loss_bound,
        c.levels,
        c.min_depth_quanta.map_or_else(|| "no depth (harmonic)".into(), |d| format!("shallowest {d:.2} quanta deep")),
        c.bound_levels_final.map_or_else(String::new, |b| format!(", {b} levels bound at the end"))
    );
    let _ = writeln!(
        s,
        "    error estimate     {:.1e} ({}; {} grid points, {} steps)",
        c.error_estimate,
        if c.accuracy_reached { "target 1e-8 reached".to_string() } else { "TARGET 1e-8 NOT REACHED".to_string() },
        c.grid_points,
        c.time_steps
    );
    s
}

pub fn run(a: &TrapCheckArgs) -> Result<(), CommandError> {
    if !(a.loss_bound.is_finite() && a.loss_bound > 0.0 && a.loss_bound < 1.0) {
        return Err(CommandError(format!("--loss-bound {}: allowed a number in (0, 1)", a.loss_bound)));
    }
    let (ramp, study, name) = match GivenRamp::read(&a.source, " with --shape")? {
        GivenRamp::Waveform { ramp, path } => (ramp, None, GivenRamp::file_stem(&path)),
        GivenRamp::Candidate { ramp, study, name, .. } => (ramp, Some(*study), name),
    };
    let jobs = match (a.shape, &study) {
        (Some(shape), s) => vec![flags_mode(a, s.as_ref(), &ramp, shape)?],
        (None, Some(s)) => {
            for (flag, given) in [
                ("--mass", a.mass.is_some()),
                ("--length", a.length.is_some()),
                ("--gain", a.gain.is_some()),
                ("--offset", a.offset.is_some()),
                ("--occupation", a.occupation.is_some()),
            ] {
                if given {
                    return Err(CommandError(format!(
                        "{flag}: allowed only with --shape (one axis from flags); without it every axis of the study's trap model is checked"
                    )));
                }
            }
            convert::axes_to_check(s, &ramp).map_err(|e| CommandError(e.user_message()))?
        }
        (None, None) => {
            return Err(CommandError("--shape: required with --waveform (harmonic, gaussian or lorentzian)".into()));
        }
    };
    let settings = CheckSettings {
        tolerance: tolerance(a.tolerance, study.as_ref().map_or(1e-3, |s| s.tolerance))?,
        loss_bound: a.loss_bound,
        ..CheckSettings::default()
    };
    let mut checks = Vec::with_capacity(jobs.len());
    for job in &jobs {
        checks.push(run_one(&ramp, job, &settings, &format!("{name}, {} axis", job.name))?);
    }
    let worst = worst_check(&checks);
    let verdict = checks[worst].verdict();
    if a.json {
        let out = if a.shape.is_some() {
            trap_check_axis_json(&name, &jobs[0], &checks[0])
        } else {
            trap_check_json(&name, &jobs, &checks)
        };
        println!("{}", serde_json::to_string_pretty(&out).map_err(CommandError::from)?);
    } else {
        println!("{name} ({}), anharmonic check, each axis on a 1D cut through the trap centre", ramp.family_name());
        if jobs.len() > 1 {
            println!("  trap verdict       {} (worst axis: {})", verdict.word(), jobs[worst].name);
        }
        for (j, c) in jobs.iter().zip(&checks) {
            print!("{}", axis_text(j, c));
        }
    }
    Ok(())
}
