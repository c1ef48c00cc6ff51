//! Robustness maps: Q* and the final coherence ratio of a played waveform when every
//! omega is scaled by (1 + e) (calibration error; the start is energy-diagonal in the
//! scaled trap and Q* is taken against the scaled end frequencies) and the duration by
//! (1 + d) (timing error). Grid points are computed in parallel (rayon).

use crate::error::{PhysicsError, Result};
use crate::noise::Noise;
use crate::propagate::{PropagationOptions, stroke_map};
use crate::ramp::{Ramp, RampShape, SampledColumn, SampledRamp};
use crate::state::Moments;
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};

/// The error axes of a map: endpoints included.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RobustnessGrid {
    /// Largest |calibration error| e (fraction), >= 0.
    pub calibration: f64,
    /// Largest |duration error| d (fraction), >= 0, < 1.
    pub duration: f64,
    /// Points per axis, 2 to 2048.
    pub points: usize,
}

impl Default for RobustnessGrid {
    fn default() -> Self {
        Self { calibration: 0.05, duration: 0.05, points: 128 }
    }
}

/// A computed map. Values are stored row by row: index = i_duration * n + i_calibration.
#[derive(Debug, Clone, PartialEq)]
pub struct RobustnessMap {
    /// Calibration errors e of the columns.
    pub calibration_errors: Vec<f64>,
    /// Duration errors d of the rows.
    pub duration_errors: Vec<f64>,
    /// Q* - 1 per grid point, without cancellation (>= 0).
    pub q_star_minus_one: Vec<f64>,
    /// Final coherence ratio sqrt(1 - 1/Q*²) = sqrt(e (2 + e))/(1 + e) with e = Q* - 1,
    /// per grid point (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)).
    pub coherence: Vec<f64>,
}

impl RobustnessMap {
    /// Fraction of grid points with Q* - 1 <= tolerance.
    pub fn fraction_within(&self, tolerance: f64) -> f64 {
        self.q_star_minus_one.iter().filter(|&&e| e <= tolerance).count() as f64 / self.q_star_minus_one.len() as f64
    }
}

fn axis(max: f64, n: usize) -> Vec<f64> {
    (0..n).map(|k| -max + 2.0 * max * k as f64 / (n - 1) as f64).collect()
}

/// The waveform scaled by calibration error e and duration error d.
pub fn scaled_waveform(w: &SampledRamp, e: f64, d: f64) -> Result<SampledRamp> {
    let f = match w.column() {
        SampledColumn::Omega => 1.0 + e,
        SampledColumn::Omega2 => (1.0 + e) * (1.0 + e),
    };
    let scaled = SampledRamp::new(
        w.times().iter().map(|t| t * (1.0 + d)).collect(),
        w.values().iter().map(|v| v * f).collect(),
        w.column(),
        w.reading(),
    )?;
    match w.end_frequencies() {
        Some((wi, wf)) => scaled.with_end_frequencies(wi * (1.0 + e), wf * (1.0 + e)),
        None => Ok(scaled),
    }
}

/// Computes the map; `progress` receives the number of finished points, `cancel` stops
/// the work early (returning [`PhysicsError::Cancelled`]). With `other_axes`, each point
/// is the worst Q* - 1 over the reference axis and those axes.
pub fn robustness_map(
    waveform: &SampledRamp,
    grid: &RobustnessGrid,
    other_axes: &[crate::ramp::AxisLaw],
    opts: &PropagationOptions,
    progress: &(dyn Fn(usize) + Sync),
    cancel: &AtomicBool,
) -> Result<RobustnessMap> {
    if !(grid.calibration.is_finite() && (0.0..0.9).contains(&grid.calibration)) {
        return Err(PhysicsError::invalid("calibration error range", grid.calibration, "0 to 0.9"));
    }
    if !(grid.duration.is_finite() && (0.0..0.9).contains(&grid.duration)) {
        return Err(PhysicsError::invalid("duration error range", grid.duration, "0 to 0.9"));
    }
    if !(2..=2048).contains(&grid.points) {
        return Err(PhysicsError::invalid("grid points per axis", grid.points, "2 to 2048"));
    }
    let n = grid.points;
    let cal = axis(grid.calibration, n);
    let dur = axis(grid.duration, n);
    let done = AtomicUsize::new(0);
    let q: Result<Vec<f64>> = (0..n * n)
        .into_par_iter()
        .map(|idx| {
            if cancel.load(Ordering::Relaxed) {
                return Err(PhysicsError::Cancelled);
            }
            let (i_d, i_c) = (idx / n, idx % n);
            let ramp = Ramp::Sampled(scaled_waveform(waveform, cal[i_c], dur[i_d])?);
            let v = crate::axes::worst_q_star_minus_one(&ramp, other_axes, opts)?;
            progress(done.fetch_add(1, Ordering::Relaxed) + 1);
            Ok(v)
        })
        .collect();
    let q = q?;
    let coherence = q.iter().map(|&e| (e * (2.0 + e)).sqrt() / (1.0 + e)).collect();
    Ok(RobustnessMap { calibration_errors: cal, duration_errors: dur, q_star_minus_one: q, coherence })
}

/// Axes of a noise-strength map: dephasing rates 0..=max_dephasing (1/s) and
/// amplitude-noise spectral densities 0..=max_amplitude_psd (s), `points` each.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NoiseGrid {
    /// Largest dephasing rate gamma_phi, 1/s (> 0).
    pub max_dephasing: f64,
    /// Largest two-sided spectral density S of fractional omega² noise, s (> 0).
    pub max_amplitude_psd: f64,
    /// Points per axis, 2 to 512, both ends included.
    pub points: usize,
}

/// Energy ratio of a ramp over noise strengths.
#[derive(Debug, Clone, PartialEq)]
pub struct NoiseMap {
    /// Dephasing rates, 1/s.
    pub dephasing_rates: Vec<f64>,
    /// Amplitude-noise spectral densities, s.
    pub amplitude_psds: Vec<f64>,
    /// Final energy over the adiabatic final energy (omega_f/omega_i) H_i, minus one,
    /// without cancellation; row-major with the amplitude axis slow: index =
    /// i_amplitude * points + i_dephasing. Equal to Q* - 1 for a thermal start without noise.
    pub energy_ratio_minus_one: Vec<f64>,
}

/// Final energy over (omega_f/omega_i) times the initial energy, with noise, minus one
/// (computed without cancellation: [`crate::diagnostics::energy_ratio_minus_one`]).
pub fn energy_ratio_minus_one(ramp: &Ramp, initial: &Moments, noise: &Noise, opts: &PropagationOptions) -> Result<f64> {
    let (wi, wf) = (ramp.omega_initial(), ramp.omega_final());
    let map = stroke_map(ramp, noise, opts)?;
    let end = initial.mapped(&map.moments);
    Ok(crate::diagnostics::energy_ratio_minus_one(initial, &end, wi, wf, noise.is_silent()))
}

/// The energy ratio over a grid of noise strengths, in parallel (rayon). `progress`
/// receives the number of finished cells; `cancel` stops the job.
pub fn noise_map(
    ramp: &Ramp,
    initial: &Moments,
    grid: &NoiseGrid,
    opts: &PropagationOptions,
    progress: &(dyn Fn(usize) + Sync),
    cancel: &AtomicBool,
) -> Result<NoiseMap> {
    if !(grid.max_dephasing.is_finite() && grid.max_dephasing > 0.0) {
        return Err(PhysicsError::invalid("largest dephasing rate", grid.max_dephasing, "a finite rate > 0 (1/s)"));
    }
    if !(grid.max_amplitude_psd.is_finite() && grid.max_amplitude_psd > 0.0) {
        return Err(PhysicsError::invalid(
            "largest amplitude-noise spectral density",
            grid.max_amplitude_psd,
            "a finite density > 0 (s)",
        ));
    }
    if !(2..=512).contains(&grid.points) {
        return Err(PhysicsError::invalid("noise grid points per axis", grid.points, "2 to 512"));
    }
    let n = grid.points;
    let up = |max: f64| (0..n).map(|k| max * k as f64 / (n - 1) as f64).collect::<Vec<_>>();
    let (deph, amp) = (up(grid.max_dephasing), up(grid.max_amplitude_psd));
    let done = AtomicUsize::new(0);
    let excess: Result<Vec<f64>> = (0..n * n)
        .into_par_iter()
        .map(|idx| {
            if cancel.load(Ordering::Relaxed) {
                return Err(PhysicsError::Cancelled);
            }
            let noise = Noise::new(deph[idx % n], amp[idx / n])?;
            let v = energy_ratio_minus_one(ramp, initial, &noise, opts)?;
            progress(done.fetch_add(1, Ordering::Relaxed) + 1);
            Ok(v)
        })
        .collect();
    Ok(NoiseMap { dephasing_rates: deph, amplitude_psds: amp, energy_ratio_minus_one: excess? })
}
