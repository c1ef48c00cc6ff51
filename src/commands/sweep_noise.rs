//! `quenchless sweep-noise`: energy ratio over noise strengths.

use super::{GivenRamp, propagation, tolerance};
use crate::CommandError;
use crate::cli::SweepNoiseArgs;
use crate::plot::write_noise;
use quenchless_physics::Moments;
use quenchless_physics::design::{NoiseGrid, noise_map};
use quenchless_physics::ramp::RampShape;
use quenchless_profile::convert;
use quenchless_profile::storage::write_atomically;
use std::io::Write;
use std::sync::atomic::AtomicBool;

pub fn run(a: &SweepNoiseArgs) -> Result<(), CommandError> {
    for (flag, v) in [("--max-dephasing", a.max_dephasing), ("--max-amplitude-psd", a.max_amplitude_psd)] {
        if !(v.is_finite() && v > 0.0) {
            return Err(CommandError(format!("{flag} {v}: allowed a finite number > 0")));
        }
    }
    if !(2..=512).contains(&a.grid) {
        return Err(CommandError(format!("--grid {}: allowed 2 to 512 points per axis", a.grid)));
    }
    super::plot_path(a.plot.as_deref())?;
    let (ramp, initial, title) = match GivenRamp::read(&a.source, "")? {
        GivenRamp::Waveform { ramp, path } => {
            let n = a.occupation.unwrap_or(0.0);
            if !(n.is_finite() && n >= 0.0) {
                return Err(CommandError(format!("--occupation {n}: allowed a finite number >= 0")));
            }
            let s0 = Moments::thermal_occupation(ramp.omega_initial(), n)?;
            (ramp, s0, GivenRamp::file_stem(&path))
        }
        GivenRamp::Candidate { ramp, study, path, name } => {
            let s0 =
                convert::initial_state(&study.initial_state, ramp.omega_initial()).map_err(|e| e.in_file(&path))?;
            (ramp, s0, format!("{name} ({})", study.name))
        }
    };
    let opts = propagation(a.accuracy)?;
    let tol = tolerance(a.tolerance, 1e-3)?;
    let grid = NoiseGrid { max_dephasing: a.max_dephasing, max_amplitude_psd: a.max_amplitude_psd, points: a.grid };
    let total = a.grid * a.grid;
    let progress = super::map_progress(total);
    let map = noise_map(&ramp, &initial, &grid, &opts, &progress, &AtomicBool::new(false))?;
    eprintln!("\rdone: {total} points");
    let mut csv = Vec::new();
    writeln!(csv, "dephasing_rate_per_s,amplitude_psd_s,energy_ratio,energy_ratio_minus_one")
        .map_err(CommandError::from)?;
    for (i_a, s) in map.amplitude_psds.iter().enumerate() {
        for (i_d, g) in map.dephasing_rates.iter().enumerate() {
            let excess = map.energy_ratio_minus_one[i_a * a.grid + i_d];
            writeln!(csv, "{g:e},{s:e},{:e},{excess:e}", 1.0 + excess).map_err(CommandError::from)?;
        }
    }
    write_atomically(&a.out, &csv)?;
    if let Some(p) = &a.plot {
        write_noise(&map, tol, &title, p)?;
    }
    Ok(())
}
