//! Edit operations on a study, without egui: what the panels and the document do to a
//! study (durations, names, colours, new candidates, generator settings), shared so no panel
//! reaches into another.

use crate::demo::{PALETTE, family_template};
use quenchless_physics::playback::Playback;
use quenchless_profile::study::{CandidateRamp, GeneratorSpec, RampSpec, StrokeSpec};
use quenchless_profile::{Study, convert};

/// The duration of a ramp spec, s (0 for an empty table).
pub fn spec_duration(spec: &RampSpec) -> f64 {
    match spec {
        RampSpec::Linear { duration_s, .. }
        | RampSpec::ConstantMu { duration_s, .. }
        | RampSpec::Shortcut { duration_s, .. }
        | RampSpec::Polynomial { duration_s, .. } => *duration_s,
        RampSpec::Holds { holds, .. } => holds.iter().map(|h| h.duration_s).sum(),
        RampSpec::Spline { knots, .. } => knots.last().map_or(0.0, |k| k.t_s),
        RampSpec::Waveform { times_s, .. } => {
            times_s.last().copied().unwrap_or(0.0) - times_s.first().copied().unwrap_or(0.0)
        }
    }
}

/// Stretches a ramp in time to a new duration (every family; the shape is kept).
pub fn set_duration(spec: &mut RampSpec, tau: f64) {
    let old = spec_duration(spec);
    if !(tau.is_finite() && tau > 0.0) {
        return;
    }
    let f = if old > 0.0 { tau / old } else { 1.0 };
    match spec {
        RampSpec::Linear { duration_s, .. }
        | RampSpec::ConstantMu { duration_s, .. }
        | RampSpec::Shortcut { duration_s, .. }
        | RampSpec::Polynomial { duration_s, .. } => *duration_s = tau,
        RampSpec::Holds { holds, .. } => holds.iter_mut().for_each(|h| h.duration_s *= f),
        RampSpec::Spline { knots, .. } => knots.iter_mut().for_each(|k| k.t_s *= f),
        RampSpec::Waveform { times_s, .. } => times_s.iter_mut().for_each(|t| *t *= f),
    }
}

/// A name not used by another candidate, based on `base`.
pub fn unique_name(study: &Study, base: &str) -> String {
    if study.candidate(base).is_none() {
        return base.to_string();
    }
    // At most n + 1 names can be taken by n candidates, so this search ends.
    (2..=study.candidates.len() + 2)
        .map(|k| format!("{base} {k}"))
        .find(|n| study.candidate(n).is_none())
        .unwrap_or_else(|| base.to_string())
}

/// The colour for a new candidate: far from every colour in use (see
/// [`crate::colours::next_colour`] for the rule). Candidates without a colour count with
/// the palette colour they are drawn in.
pub fn next_colour(study: &Study) -> [u8; 3] {
    let in_use: Vec<[u8; 3]> =
        study.candidates.iter().enumerate().map(|(i, c)| c.colour.unwrap_or(PALETTE[i % PALETTE.len()])).collect();
    crate::colours::next_colour(&in_use)
}

/// Adds a candidate of a family between the trap's end frequencies; returns its index.
pub fn add_candidate(study: &mut Study, family: &str) -> usize {
    let tau = study.candidates.iter().map(|c| spec_duration(&c.ramp)).find(|t| *t > 0.0).unwrap_or(20e-6);
    let ramp = family_template(family, study.trap.start_frequency_hz, study.trap.end_frequency_hz, tau);
    let name = unique_name(study, &format!("new {family}"));
    let colour = Some(next_colour(study));
    study.candidates.push(CandidateRamp { name, visible: true, colour, ramp });
    study.candidates.len() - 1
}

/// Renames candidate i, keeping cycle strokes that refer to it; refuses empty or
/// taken names.
pub fn rename_candidate(study: &mut Study, i: usize, new_name: &str) -> Result<(), String> {
    let new_name = new_name.trim();
    if new_name.is_empty() {
        return Err("name: an empty name is not allowed; give the candidate a name".into());
    }
    if study.candidates.iter().enumerate().any(|(k, c)| k != i && c.name == new_name) {
        return Err(format!("name: \"{new_name}\" is already used by another candidate"));
    }
    let Some(c) = study.candidates.get_mut(i) else { return Err(format!("no candidate number {i}")) };
    let old = std::mem::replace(&mut c.name, new_name.to_string());
    if let Some(cy) = study.cycle.as_mut() {
        for s in [&mut cy.expansion, &mut cy.compression] {
            if matches!(s, StrokeSpec::Candidate(n) if *n == old) {
                *s = StrokeSpec::Candidate(new_name.to_string());
            }
        }
    }
    Ok(())
}

/// The playback of generator settings, with the error as the user reads it.
pub fn playback_of(settings: &GeneratorSpec) -> Result<Playback, String> {
    convert::playback(settings).map_err(|e| format!("generator settings: {}", e.user_message()))
}
