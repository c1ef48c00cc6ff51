//! `quenchless eval`.

use super::{propagation, tolerance};
use crate::CommandError;
use crate::cli::EvalArgs;
use crate::report::{axes_text, eval_json, eval_text, with_axes};
use quenchless_physics::{EvaluationSettings, Moments, RampShape, evaluate};
use quenchless_profile::report::{AxesFailure, every_axis};
use quenchless_profile::{convert, load_study, read_waveform};

pub fn run(a: &EvalArgs) -> Result<(), CommandError> {
    let opts = propagation(a.accuracy)?;
    if let Some(path) = &a.waveform {
        let n0 = match a.occupation {
            None => 0.0,
            Some(n) if n.is_finite() && n >= 0.0 => n,
            Some(n) => return Err(CommandError(format!("--occupation {n}: allowed a finite number >= 0"))),
        };
        let table = read_waveform(path)?;
        let reading = table.reading(a.hold, "--hold").map_err(|e| e.in_file(path))?;
        let ramp = table.to_ramp(reading, path)?;
        let initial = Moments::thermal_occupation(ramp.omega_initial(), n0)?;
        let settings = EvaluationSettings {
            tolerance: tolerance(a.tolerance, 1e-3)?,
            propagation: opts,
            ..EvaluationSettings::default()
        };
        let ev = evaluate(&ramp, &initial, &settings)?;
        let name = path.file_stem().map_or_else(|| "waveform".into(), |s| s.to_string_lossy().into_owned());
        if a.json {
            println!(
                "{}",
                serde_json::to_string_pretty(&eval_json(&name, &ramp, &ev.report)).map_err(CommandError::from)?
            );
        } else {
            print!("{}", eval_text(&name, &ramp, &ev.report));
        }
        return Ok(());
    }
    let Some(path) = &a.profile else {
        return Err(CommandError("give a profile (quenchless eval STUDY.ron) or --waveform FILE.csv".into()));
    };
    let study = load_study(path)?;
    let wanted: Vec<(usize, &quenchless_profile::CandidateRamp)> = if let Some(name) = &a.ramp {
        let (i, _) = convert::named_candidate(&study, name, "--ramp").map_err(|e| e.in_file(path))?;
        vec![(i, &study.candidates[i])]
    } else {
        study.candidates.iter().enumerate().collect()
    };
    if wanted.is_empty() {
        return Err(CommandError(format!("{}: the study has no candidate ramps", path.display())));
    }
    let settings = EvaluationSettings {
        tolerance: tolerance(a.tolerance, study.tolerance)?,
        propagation: opts,
        limits: convert::limits(&study.trap).map_err(|e| e.in_file(path))?,
        noise: convert::noise(&study.noise).map_err(|e| e.in_file(path))?,
        ..EvaluationSettings::default()
    };
    let model = convert::trap_model(&study.trap).map_err(|e| e.in_file(path))?;
    let mut json = Vec::new();
    for (i, c) in wanted {
        let ramp = convert::candidate_ramp(c, i).map_err(|e| e.in_file(path))?;
        let initial =
            convert::initial_state(&study.initial_state, ramp.omega_initial()).map_err(|e| e.in_file(path))?;
        let in_candidate =
            |e: &dyn std::fmt::Display| CommandError(format!("{}: candidate \"{}\": {e}", path.display(), c.name));
        let ev = evaluate(&ramp, &initial, &settings).map_err(|e| in_candidate(&e))?;
        // Every axis the control moves (the reference axis again, from the common
        // temperature, so the array is complete and uniform).
        let axes = every_axis(&study, &ramp, &model, &ev.report, &settings).map_err(|f| match f {
            AxesFailure::Study(e) => CommandError::from(e.in_file(path)),
            AxesFailure::Engine(e) => in_candidate(&e),
        })?;
        if a.json {
            json.push(with_axes(eval_json(&c.name, &ramp, &ev.report), &axes, &model));
        } else {
            print!("{}", eval_text(&c.name, &ramp, &ev.report));
            if model.is_multi_axis() {
                print!("{}", axes_text(&axes, &model));
            }
        }
    }
    if a.json {
        let out = if a.ramp.is_some() { json.remove(0) } else { serde_json::Value::Array(json) };
        println!("{}", serde_json::to_string_pretty(&out).map_err(CommandError::from)?);
    }
    Ok(())
}
