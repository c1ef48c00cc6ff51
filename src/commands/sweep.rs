//! `quenchless sweep`: robustness map over calibration and duration errors.

use super::{propagation, tolerance};
use crate::CommandError;
use crate::cli::SweepArgs;
use crate::plot::write_map;
use quenchless_physics::design::{RobustnessGrid, robustness_map};
use quenchless_physics::ramp::Ramp;
use quenchless_profile::read_waveform;
use quenchless_profile::storage::write_atomically;
use std::io::Write;
use std::sync::atomic::AtomicBool;

pub fn run(a: &SweepArgs) -> Result<(), CommandError> {
    let (cal, dur) = (a.calibration_error.si, a.duration_error.si);
    if !(2..=2048).contains(&a.grid) {
        return Err(CommandError(format!("--grid {}: allowed 2 to 2048 points per axis", a.grid)));
    }
    super::plot_path(a.plot.as_deref())?;
    let tol = tolerance(a.tolerance, 1e-3)?;
    let opts = propagation(a.accuracy)?;
    let table = read_waveform(&a.waveform)?;
    let reading = table.reading(a.hold, "--hold").map_err(|e| e.in_file(&a.waveform))?;
    let Ramp::Sampled(w) = table.to_ramp(reading, &a.waveform)? else { unreachable!("waveforms are sampled ramps") };
    let grid = RobustnessGrid { calibration: cal, duration: dur, points: a.grid };
    let total = a.grid * a.grid;
    let progress = super::map_progress(total);
    let map = robustness_map(&w, &grid, &[], &opts, &progress, &AtomicBool::new(false))?;
    eprintln!("\rdone: {total} points, {:.1}% within Q* - 1 <= {tol:e}", 100.0 * map.fraction_within(tol));
    let mut csv = Vec::new();
    writeln!(csv, "calibration_error,duration_error,q_star,q_star_minus_one,final_coherence_ratio")
        .map_err(CommandError::from)?;
    for (i_d, d) in map.duration_errors.iter().enumerate() {
        for (i_c, e) in map.calibration_errors.iter().enumerate() {
            let k = i_d * a.grid + i_c;
            let excess = map.q_star_minus_one[k];
            writeln!(csv, "{e:e},{d:e},{:e},{excess:e},{:e}", 1.0 + excess, map.coherence[k])
                .map_err(CommandError::from)?;
        }
    }
    write_atomically(&a.out, &csv)?;
    if let Some(p) = &a.plot {
        // The title names the table, not the path to it.
        let name = a.waveform.file_stem().map_or_else(|| "the waveform".into(), |s| s.to_string_lossy().into_owned());
        write_map(&map, tol, &name, p)?;
    }
    Ok(())
}
