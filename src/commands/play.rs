//! `quenchless play`: the ramp as the generator plays it.

use super::generator;
use super::playing::{Source, judge};
use super::{GivenRamp, propagation, tolerance};
use crate::CommandError;
use crate::cli::PlayArgs;
use quenchless_physics::TrapLimits;
use quenchless_physics::playback::{AssessmentSettings, Playback};
use quenchless_physics::ramp::Ramp;
use quenchless_profile::generator_settings::{Given, GivenSettings, read_calibration};
use quenchless_profile::report::PlayJson;
use quenchless_profile::study::GeneratorSpec;
use quenchless_profile::{ExportColumns, convert};
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
    // No rate at all is said before any file is read.
    if a.rate.is_none() && base.is_none() {
        return Err(CommandError(generator::FLAGS.missing_rate.into()));
    }
    let calibration = a.calibration.as_deref().map(read_calibration).transpose()?;
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
        // The struct itself keeps the keys in their documented order.
        let report = PlayJson::new(&d.name, &d.ramp, &judged.playback, &judged.assessment, tol, &unit);
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
