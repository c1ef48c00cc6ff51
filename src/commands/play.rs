//! `quenchless play`: the ramp as the generator plays it.

use super::generator;
use super::playing::{Source, judge};
use super::{GivenRamp, propagation, tolerance};
use crate::CommandError;
use crate::cli::PlayArgs;
use crate::report::SCHEMA_VERSION;
use quenchless_physics::TrapLimits;
use quenchless_physics::playback::{AssessmentSettings, Playback};
use quenchless_physics::ramp::{Ramp, RampShape};
use quenchless_profile::drive::read_calibration_table;
use quenchless_profile::generator_settings::{Given, GivenSettings};
use quenchless_profile::study::GeneratorSpec;
use quenchless_profile::{ExportColumns, convert};
use serde::Serialize;
use std::path::PathBuf;

/// What is played: the designed ramp and what the profile says around it.
struct Designed {
    ramp: Ramp,
    study: Option<String>,
    name: String,
    tolerance: f64,
    limits: TrapLimits,
    /// The trap's other axes (empty for a waveform or a one-axis trap).
    other_axes: Vec<quenchless_physics::axes::TrapAxis>,
    /// The profile's generator section and the profile it came from.
    generator: Option<(GeneratorSpec, PathBuf)>,
}

fn designed(a: &PlayArgs) -> Result<Designed, CommandError> {
    match GivenRamp::read(&a.source, "")? {
        GivenRamp::Waveform { ramp, path } => Ok(Designed {
            ramp,
            study: None,
            name: path.display().to_string(),
            tolerance: 1e-3,
            limits: TrapLimits::default(),
            other_axes: Vec::new(),
            generator: None,
        }),
        GivenRamp::Candidate { ramp, study, path, name } => Ok(Designed {
            ramp,
            study: Some(study.name.clone()),
            name,
            tolerance: study.tolerance,
            limits: convert::limits(&study.trap).map_err(|e| e.in_file(&path))?,
            other_axes: super::playing::other_axes(&study, &path)?,
            generator: study.generator.map(|g| (g, path.clone())),
        }),
    }
}

/// The playback: the profile's generator section, with every given flag on top, and
/// the maximum rate of the smallest-rate search.
fn playback(a: &PlayArgs, base: Option<&(GeneratorSpec, PathBuf)>) -> Result<(Playback, Option<f64>), CommandError> {
    let calibration = match &a.calibration {
        Some(path) => {
            let spec = read_calibration_table(path)?;
            convert::drive_calibration(&spec).map_err(|e| e.in_file(path))?;
            Some(spec)
        }
        None => None,
    };
    let settings = GivenSettings {
        rate_per_s: a.rate.as_ref().map(generator::given),
        midpoint: a.midpoint,
        calibration,
        unipolar: a.unipolar,
        bipolar: a.bipolar,
        bits: a.bits.map(Given::number),
        full_scale_hz: a.full_scale.as_ref().map(generator::given),
        low_pass_s: a.low_pass.as_ref().map(generator::given),
        slew_per_s: a.slew.map(Given::number),
        jitter_rms_s: a.jitter.as_ref().map(generator::given),
        max_rate_per_s: a.max_rate.as_ref().map(generator::given),
    };
    let (mut pb, g) =
        generator::playback(&settings, base.map(|(g, _)| g.clone()), base.map(|(_, p)| p.as_path()), generator::FLAGS)?;
    if let Some(j) = pb.jitter.as_mut() {
        j.seed = a.seed;
    }
    Ok((pb, g.max_rate_per_s))
}

/// The `play --json` object.
#[derive(Serialize)]
struct PlayJson<'a> {
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

#[derive(Serialize)]
struct AxisPlayJson<'a> {
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
    fn new(d: &'a Designed, judged: &'a super::playing::Judged, tol: f64, unit: &'a str) -> Self {
        let s = &judged.assessment;
        let p = &s.played;
        PlayJson {
            schema_version: SCHEMA_VERSION,
            name: &d.name,
            family: d.ramp.family_name(),
            verdict: s.verdict().key(),
            designed_q_star: s.designed_q_star(),
            designed_q_star_minus_one: s.designed_q_star_minus_one,
            played_q_star: s.played_q_star(),
            played_q_star_minus_one: s.played_q_star_minus_one,
            energy_diagonal_as_played: s.energy_diagonal(),
            within_limits: s.within_limits(),
            inverts: s.inverts(),
            tolerance: tol,
            rate_per_s: judged.playback.rate,
            samples: p.periods,
            played_duration_s: p.played_duration_s,
            designed_duration_s: d.ramp.duration(),
            omega_initial_rad_s: d.ramp.omega_initial(),
            omega_final_rad_s: d.ramp.omega_final(),
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

pub fn run(a: &PlayArgs) -> Result<(), CommandError> {
    if !(1..=10_000).contains(&a.jitter_trials) {
        return Err(CommandError(format!("--jitter-trials {}: allowed 1 to 10000", a.jitter_trials)));
    }
    if !(a.grid_ratio.is_finite() && a.grid_ratio > 1.0 && a.grid_ratio <= 2.0) {
        return Err(CommandError(format!("--grid-ratio {}: allowed a number above 1, at most 2", a.grid_ratio)));
    }
    let opts = propagation(None)?;
    let d = designed(a)?;
    let unit =
        d.generator.as_ref().and_then(|(g, _)| g.drive.as_ref()).map_or_else(|| "rad^2/s^2".into(), |d| d.unit.clone());
    let (pb, max_rate) = playback(a, d.generator.as_ref())?;
    let tol = tolerance(a.tolerance, d.tolerance)?;
    let writing = a.out.is_some() || a.drive_out.is_some() || a.codes_out.is_some();
    let settings = AssessmentSettings {
        tolerance: tol,
        limits: d.limits,
        max_rate,
        grid_ratio: a.grid_ratio,
        jitter_trials: a.jitter_trials,
        searches: true,
        // The playing streams; its samples are kept only for a file to write.
        keep_tables: writing,
    };
    let source = Source {
        study: d.study.as_deref(),
        candidate: &d.name,
        ramp: &d.ramp,
        limits: d.limits,
        other_axes: d.other_axes.clone(),
    };
    let judged = judge(source, pb, unit.clone(), settings, &opts)?;
    if writing {
        judged.announce();
    }
    if let Some(path) = &a.out {
        judged.write_trap(path, ExportColumns::Omega2)?;
    }
    if let Some(path) = &a.drive_out {
        judged.write_drive(path)?;
    }
    if let Some(path) = &a.codes_out {
        judged.write_codes(path)?;
    }
    let p = &judged.assessment.played;
    if a.json {
        let report = PlayJson::new(&d, &judged, tol, &unit);
        println!("{}", serde_json::to_string_pretty(&report).map_err(CommandError::from)?);
        return Ok(());
    }
    println!(
        "{} played at {} samples/s ({} samples, {} s as played)",
        d.name,
        quenchless_profile::header::plain(judged.playback.rate),
        p.periods,
        quenchless_profile::header::plain(p.played_duration_s)
    );
    for line in judged.checks() {
        println!("  {line}");
    }
    Ok(())
}
