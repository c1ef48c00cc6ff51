//! The command line's figures, drawn by the one figure layer (`quenchless-figures`, the
//! same as the app's figure exports): robustness and noise maps with axes, a colour bar
//! with numbers and the tolerance contour, and a ramp's trap frequency. PNG or SVG by
//! the file's extension. Colour encodes log10(Q* - 1), or log10(E/E_ad - 1) for a
//! noise map.

use crate::CommandError;
use quenchless_figures::grid::HeatGrid;
use quenchless_figures::{HeatFigure, LineFigure, Series, save_heat, save_lines};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::{NoiseMap, RobustnessMap};
use quenchless_physics::ramp::{Ramp, RampShape};
use std::path::Path;

/// Pieces of a curve: (x, y) runs.
type Pieces = Vec<Vec<(f64, f64)>>;

/// Smallest excess the colour scale shows (rounding of the propagation lies below).
const FLOOR: f64 = 1e-16;

fn log_excess(v: &[f64]) -> Vec<f64> {
    v.iter().map(|e| e.max(FLOOR).log10()).collect()
}

/// A robustness map: x the calibration error, y the duration error, both in %.
pub fn write_map(map: &RobustnessMap, tol: f64, title: &str, path: &Path) -> Result<(), CommandError> {
    let fig = HeatFigure {
        title: format!("Robustness of {title}"),
        x_label: "calibration error e [%]".into(),
        y_label: "duration error d [%]".into(),
        value_label: "log₁₀(Q* − 1)".into(),
        grid: HeatGrid {
            xs: map.calibration_errors.iter().map(|e| 100.0 * e).collect(),
            ys: map.duration_errors.iter().map(|d| 100.0 * d).collect(),
            values: log_excess(&map.q_star_minus_one),
        },
        contour: Some((tol.log10(), format!("Q* − 1 = {}", quenchless_figures::number::sci(tol)))),
        mark: Some(((0.0, 0.0), "as designed".into())),
    };
    Ok(save_heat(&fig, path)?)
}

/// A noise map: x the dephasing rate, y the amplitude-noise density.
pub fn write_noise(map: &NoiseMap, tol: f64, title: &str, path: &Path) -> Result<(), CommandError> {
    let fig = HeatFigure {
        title: format!("Noise on {title}"),
        x_label: "dephasing rate γ [1/s]".into(),
        y_label: "amplitude-noise density S [s]".into(),
        value_label: "log₁₀(E/E_ad − 1)".into(),
        grid: HeatGrid {
            xs: map.dephasing_rates.clone(),
            ys: map.amplitude_psds.clone(),
            values: log_excess(&map.energy_ratio_minus_one),
        },
        contour: Some((tol.log10(), format!("E/E_ad − 1 = {}", quenchless_figures::number::sci(tol)))),
        mark: None,
    };
    Ok(save_heat(&fig, path)?)
}

/// A ramp's trap frequency nu = omega/2 pi in kHz against time in µs, with the trap
/// before and after it; where omega² < 0 the signed frequency -sqrt|omega²|/2 pi is drawn
/// dashed.
pub fn write_ramp(ramp: &Ramp, title: &str, path: &Path) -> Result<(), CommandError> {
    let times = ramp.grid_with_breakpoints(1500);
    let held = ramp.is_piecewise_constant();
    let signed = |w2: f64| w2.signum() * w2.abs().sqrt() / TWO_PI / 1e3;
    let mut trap: Pieces = Vec::new();
    let mut inverted: Pieces = Vec::new();
    let mut last_sign = None;
    for (k, &t) in times.iter().enumerate() {
        // Held ramps: each hold as a flat step (its value just before each break).
        let mut points = Vec::with_capacity(2);
        if held && k > 0 {
            points.push((t, ramp.omega2(0.5 * (times[k - 1] + t))));
        }
        points.push((t, ramp.omega2(t)));
        for (t, w2) in points {
            let positive = w2 > 0.0;
            if last_sign != Some(positive) {
                let start = if positive { &mut trap } else { &mut inverted };
                start.push(Vec::new());
                last_sign = Some(positive);
            }
            let into = if positive { trap.last_mut() } else { inverted.last_mut() };
            if let Some(piece) = into {
                piece.push((t * 1e6, signed(w2)));
            }
        }
    }
    let tau_us = ramp.duration() * 1e6;
    let (nu_i, nu_f) = (ramp.omega_initial() / TWO_PI / 1e3, ramp.omega_final() / TWO_PI / 1e3);
    let ends = vec![vec![(-0.08 * tau_us, nu_i), (0.0, nu_i)], vec![(tau_us, nu_f), (1.08 * tau_us, nu_f)]];
    let mut series = vec![
        Series { name: Some("trap before and after".into()), colour: [120, 120, 120], pieces: ends, dashed: true },
        Series { name: Some(title.to_string()), colour: [28, 86, 138], pieces: trap, dashed: false },
    ];
    let inverts = !inverted.is_empty();
    if inverts {
        series.push(Series {
            name: Some("inverted (ω² < 0)".into()),
            colour: [180, 60, 60],
            pieces: inverted,
            dashed: true,
        });
    }
    let fig = LineFigure {
        title: format!("Trap frequency of {title}"),
        x_label: "time t [µs]".into(),
        y_label: "trap frequency ν = ω/2π [kHz]".into(),
        series,
        note: inverts.then(|| "where ω² < 0 the signed frequency −√|ω²|/2π is drawn".to_string()),
    };
    Ok(save_lines(&fig, path)?)
}
