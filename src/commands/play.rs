//! `quenchless play`: the ramp as the generator plays it.

use super::{propagation, tolerance};
use crate::CommandError;
use crate::cli::PlayArgs;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::playback::{
    Jitter, Playback, SamplePoint, jitter_q_star, minimum_bits, minimum_rate, play_through,
};
use quenchless_physics::ramp::{Ramp, RampShape, SampledReading};
use quenchless_profile::drive::{read_calibration_table, write_dac_codes, write_drive_samples};
use quenchless_profile::storage::write_atomically;
use quenchless_profile::units::{Quantity, parse_quantity};
use quenchless_profile::{convert, load_study, read_waveform};
use serde_json::json;
use std::fmt::Write as _;

/// The designed ramp, the default tolerance, and the profile's playback and drive
/// unit if it has a generator section.
/// A designed ramp, its default tolerance, and the profile's playback with drive unit.
type Designed = (Ramp, f64, Option<(Playback, Option<String>)>);

fn designed(a: &PlayArgs) -> Result<Designed, CommandError> {
    if let Some(path) = &a.waveform {
        let reading = if a.hold { SampledReading::Hold } else { SampledReading::Linear };
        return Ok((read_waveform(path)?.to_ramp(reading, path)?, 1e-3, None));
    }
    let (Some(path), Some(name)) = (&a.profile, &a.ramp) else {
        return Err(CommandError("give a profile with --ramp NAME, or --waveform FILE.csv".into()));
    };
    let study = load_study(path)?;
    let (_, ramp) = convert::named_candidate(&study, name, "--ramp").map_err(|e| e.in_file(path))?;
    let generator = match &study.generator {
        Some(g) => Some((convert::playback(g).map_err(|e| e.in_file(path))?, g.drive.as_ref().map(|d| d.unit.clone()))),
        None => None,
    };
    Ok((ramp, study.tolerance, generator))
}

fn positive_time(flag: &str, text: &str, allow_zero: bool) -> Result<f64, CommandError> {
    let v = parse_quantity(text, Quantity::Time).map_err(|e| CommandError(format!("{flag} {e}")))?;
    if v < 0.0 || (!allow_zero && v == 0.0) {
        return Err(CommandError(format!("{flag} {text}: must be {} 0", if allow_zero { ">=" } else { ">" })));
    }
    Ok(v)
}

/// The playback: the profile's generator section, with every given flag on top.
fn playback(a: &PlayArgs, base: Option<Playback>) -> Result<Playback, CommandError> {
    let mut pb = match (a.rate, base) {
        (Some(r), b) => {
            if !(r.is_finite() && r > 0.0) {
                return Err(CommandError(format!("--rate {r}: allowed a finite number of samples per second > 0")));
            }
            Playback { rate: r, ..b.unwrap_or_else(|| Playback::sample_and_hold(r)) }
        }
        (None, Some(b)) => b,
        (None, None) => {
            return Err(CommandError("give --rate R, or a profile whose generator section states a rate".into()));
        }
    };
    if a.midpoint {
        pb.point = SamplePoint::Midpoint;
    }
    if a.bipolar {
        pb.allows_negative = true;
    }
    if a.unipolar {
        pb.allows_negative = false;
    }
    if let Some(path) = &a.calibration {
        let spec = read_calibration_table(path)?;
        pb.calibration = convert::drive_calibration(&spec).map_err(|e| e.in_file(path))?;
    }
    match (a.bits, &a.full_scale) {
        (Some(bits), _) if !(1..=32).contains(&bits) => {
            return Err(CommandError(format!("--bits {bits}: allowed 1 to 32")));
        }
        (Some(bits), Some(f)) => {
            let nu = parse_quantity(f, Quantity::Frequency).map_err(|e| CommandError(format!("--full-scale {e}")))?;
            if nu <= 0.0 {
                return Err(CommandError(format!("--full-scale {f}: must be > 0")));
            }
            let top = pb.calibration.drive_of((TWO_PI * nu).powi(2))?;
            pb.quantisation = Some((bits, if pb.allows_negative { -top } else { 0.0 }, top));
        }
        (Some(bits), None) => match pb.quantisation {
            Some((_, lo, hi)) => pb.quantisation = Some((bits, lo, hi)),
            None => {
                return Err(CommandError(format!(
                    "--bits {bits}: needs --full-scale F, or a profile generator with a drive section"
                )));
            }
        },
        (None, Some(_)) => return Err(CommandError("--full-scale needs --bits N".into())),
        (None, None) => {}
    }
    if let Some(t) = &a.low_pass {
        pb.low_pass = Some(positive_time("--low-pass", t, false)?);
    }
    if let Some(s) = a.slew {
        if !(s.is_finite() && s > 0.0) {
            return Err(CommandError(format!("--slew {s}: allowed a finite number of drive units per second > 0")));
        }
        pb.slew = Some(s);
    }
    if let Some(t) = &a.jitter {
        pb.jitter = Some(Jitter { rms: positive_time("--jitter", t, true)?, seed: a.seed });
    } else if let Some(j) = pb.jitter.as_mut() {
        j.seed = a.seed;
    }
    Ok(pb)
}

fn provenance(pb: &Playback, designed_q: f64, played_q: f64) -> Vec<String> {
    vec![
        format!(
            "played by quenchless {}: rate {:e} samples/s, designed Q* {designed_q:.12}, played Q* {played_q:.12}",
            env!("CARGO_PKG_VERSION"),
            pb.rate
        ),
        format!(
            "quantisation {:?}, slew {:?}, low-pass {:?} s, jitter {:?}",
            pb.quantisation, pb.slew, pb.low_pass, pb.jitter
        ),
        "CAUTION: drives high-voltage / high-power laser hardware; check against apparatus limits and local safety rules"
            .into(),
    ]
}

pub fn run(a: &PlayArgs) -> Result<(), CommandError> {
    if !(1..=10_000).contains(&a.jitter_trials) {
        return Err(CommandError(format!("--jitter-trials {}: allowed 1 to 10000", a.jitter_trials)));
    }
    let opts = propagation(None)?;
    let (ramp, default_tol, generator) = designed(a)?;
    let unit = generator.as_ref().and_then(|(_, u)| u.clone()).unwrap_or_else(|| "rad^2/s^2".into());
    let pb = playback(a, generator.map(|(p, _)| p))?;
    let tol = tolerance(a.tolerance, default_tol)?;
    let played = play_through(&ramp, &pb)?;
    let designed_q = q_star(&ramp, &opts)?;
    let played_q = q_star(&Ramp::Sampled(played.ramp.clone()), &opts)?;
    let jitter = match pb.jitter {
        Some(j) if j.rms > 0.0 => Some(jitter_q_star(&ramp, &pb, a.jitter_trials, &opts)?),
        _ => None,
    };
    let min_rate = minimum_rate(&ramp, &pb, tol, 4.0 / ramp.duration(), 1e12, &opts)?;
    let min_bits = if pb.quantisation.is_some() { minimum_bits(&ramp, &pb, tol, &opts)? } else { None };
    let prov = provenance(&pb, designed_q, played_q);
    let writing = a.out.is_some() || a.drive_out.is_some() || a.codes_out.is_some();
    if writing {
        eprintln!("{}", super::export::CAUTION);
    }
    if let Some(path) = &a.out {
        let mut text = String::new();
        for p in &prov {
            let _ = writeln!(text, "# {p}");
        }
        let ends = quenchless_profile::waveform::end_frequencies_comment(ramp.omega_initial(), ramp.omega_final());
        let _ = writeln!(text, "# {ends}");
        text.push_str("t[s],omega2[rad^2/s^2]\n");
        for (t, v) in played.ramp.times().iter().zip(played.ramp.values()) {
            let _ = writeln!(text, "{t:e},{v:e}");
        }
        write_atomically(path, text.as_bytes())?;
    }
    if let Some(path) = &a.drive_out {
        write_drive_samples(path, &played.samples, ramp.duration(), &unit, &prov)?;
    }
    if let Some(path) = &a.codes_out {
        write_dac_codes(path, &played.samples, &prov)
            .map_err(|e| CommandError(format!("--codes-out {}: {e}", path.display())))?;
    }
    let diagonal = played_q - 1.0 <= tol;
    let report = json!({
        "designed_q_star": designed_q,
        "played_q_star": played_q,
        "energy_diagonal_as_played": diagonal,
        "tolerance": tol,
        "samples": played.samples.drive.len(),
        "slew_limited_periods": played.slew_limited_periods,
        "jitter_mean_q_star": jitter.map(|j| j.0),
        "jitter_worst_q_star": jitter.map(|j| j.1),
        "jitter_trials": jitter.map(|_| a.jitter_trials),
        "min_rate_per_s": min_rate,
        "min_bits": min_bits,
        "drive_unit": unit,
        "omega_initial_rad_s": ramp.omega_initial(),
        "omega_final_rad_s": ramp.omega_final(),
        "family": if let Ramp::Sampled(_) = ramp { "sampled" } else { ramp.family_name() },
    });
    if a.json {
        println!("{}", serde_json::to_string_pretty(&report).map_err(CommandError::from)?);
        return Ok(());
    }
    println!("played at {:e} samples/s ({} samples)", pb.rate, played.samples.drive.len());
    println!("  Q* designed  {designed_q:.12}");
    println!("  Q* played    {played_q:.12} ({})", if diagonal { "energy-diagonal" } else { "NOT energy-diagonal" });
    if let Some((mean, worst)) = jitter {
        println!("  with jitter  mean {mean:.12}, worst {worst:.12} over {} realisations", a.jitter_trials);
    }
    if played.slew_limited_periods > 0 {
        println!("  the slew limit held the output back in {} periods", played.slew_limited_periods);
    }
    match min_rate {
        Some(r) => println!("  smallest rate within tolerance {tol:e}: {r:.3e} samples/s"),
        None => println!("  no rate up to 1e12 samples/s keeps Q* - 1 within {tol:e}"),
    }
    if let Some(b) = min_bits {
        println!("  smallest bit depth at this rate: {b}");
    }
    Ok(())
}
