//! `quenchless play`: the ramp as the generator plays it.

use super::{propagation, tolerance};
use crate::CommandError;
use crate::cli::PlayArgs;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::playback::{Playback, SamplePoint, minimum_bits, minimum_rate, play};
use quenchless_physics::ramp::{Ramp, RampShape, SampledReading};
use quenchless_profile::storage::write_atomically;
use quenchless_profile::units::{Quantity, parse_quantity};
use quenchless_profile::{convert, load_study, read_waveform};
use serde_json::json;
use std::fmt::Write as _;

pub fn run(a: &PlayArgs) -> Result<(), CommandError> {
    if !(a.rate.is_finite() && a.rate > 0.0) {
        return Err(CommandError(format!("--rate {}: allowed a finite number of samples per second > 0", a.rate)));
    }
    let opts = propagation(None)?;
    let (ramp, default_tol) = if let Some(path) = &a.waveform {
        let reading = if a.hold { SampledReading::Hold } else { SampledReading::Linear };
        (read_waveform(path)?.to_ramp(reading, path)?, 1e-3)
    } else if let (Some(path), Some(name)) = (&a.profile, &a.ramp) {
        let study = load_study(path)?;
        let (_, ramp) = convert::named_candidate(&study, name, "--ramp").map_err(|e| e.in_file(path))?;
        (ramp, study.tolerance)
    } else {
        return Err(CommandError("give a profile with --ramp NAME, or --waveform FILE.csv".into()));
    };
    let tol = tolerance(a.tolerance, default_tol)?;
    let quantisation = match (a.bits, &a.full_scale) {
        (Some(bits), Some(f)) => {
            if !(1..=32).contains(&bits) {
                return Err(CommandError(format!("--bits {bits}: allowed 1 to 32")));
            }
            let nu = parse_quantity(f, Quantity::Frequency).map_err(|e| CommandError(format!("--full-scale {e}")))?;
            if nu <= 0.0 {
                return Err(CommandError(format!("--full-scale {f}: must be > 0")));
            }
            let top = (TWO_PI * nu).powi(2);
            Some((bits, if a.bipolar { -top } else { 0.0 }, top))
        }
        _ => None,
    };
    let low_pass = match &a.low_pass {
        Some(t) => {
            let v = parse_quantity(t, Quantity::Time).map_err(|e| CommandError(format!("--low-pass {e}")))?;
            if v <= 0.0 {
                return Err(CommandError(format!("--low-pass {t}: a time constant must be > 0")));
            }
            Some(v)
        }
        None => None,
    };
    let pb = Playback {
        rate: a.rate,
        point: if a.midpoint { SamplePoint::Midpoint } else { SamplePoint::Left },
        quantisation,
        low_pass,
        allows_negative: a.bipolar,
        ..Playback::sample_and_hold(a.rate)
    };
    let played = play(&ramp, &pb)?;
    let designed_q = q_star(&ramp, &opts)?;
    let played_q = q_star(&Ramp::Sampled(played.clone()), &opts)?;
    let min_rate = minimum_rate(&ramp, &pb, tol, 4.0 / ramp.duration(), 1e12, &opts)?;
    let min_bits = if quantisation.is_some() { minimum_bits(&ramp, &pb, tol, &opts)? } else { None };
    if let Some(path) = &a.out {
        let mut text = format!(
            "# played by quenchless {}: rate {:e} samples/s, designed Q* {designed_q:.12}, played Q* {played_q:.12}\n# CAUTION: drives high-voltage / high-power laser hardware; check against apparatus limits and local safety rules\nt[s],omega2[rad^2/s^2]\n",
            env!("CARGO_PKG_VERSION"),
            a.rate
        );
        for (t, v) in played.times().iter().zip(played.values()) {
            let _ = writeln!(text, "{t:e},{v:e}");
        }
        eprintln!("{}", super::export::CAUTION);
        write_atomically(path, text.as_bytes())?;
    }
    let report = json!({
        "designed_q_star": designed_q,
        "played_q_star": played_q,
        "energy_diagonal_as_played": played_q - 1.0 <= tol,
        "tolerance": tol,
        "samples": played.times().len() - 1,
        "min_rate_per_s": min_rate,
        "min_bits": min_bits,
        "omega_initial_rad_s": ramp.omega_initial(),
        "omega_final_rad_s": ramp.omega_final(),
        "family": if let Ramp::Sampled(_) = ramp { "sampled" } else { ramp.family_name() },
    });
    if a.json {
        println!("{}", serde_json::to_string_pretty(&report).map_err(CommandError::from)?);
    } else {
        println!("played at {:e} samples/s ({} samples)", a.rate, played.times().len() - 1);
        println!("  Q* designed  {designed_q:.12}");
        println!(
            "  Q* played    {played_q:.12} ({})",
            if played_q - 1.0 <= tol { "energy-diagonal" } else { "NOT energy-diagonal" }
        );
        match min_rate {
            Some(r) => println!("  smallest rate within tolerance {tol:e}: {r:.3e} samples/s"),
            None => println!("  no rate up to 1e12 samples/s keeps Q* - 1 within {tol:e}"),
        }
        if let Some(b) = min_bits {
            println!("  smallest bit depth at this rate: {b}");
        }
    }
    Ok(())
}
