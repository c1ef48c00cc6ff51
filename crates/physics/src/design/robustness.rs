//! Robustness maps: Q* and the final coherence ratio of a played waveform when every
//! omega is scaled by (1 + e) (calibration error; the start is energy-diagonal in the
//! scaled trap and Q* is taken against the scaled end frequencies) and the duration by
//! (1 + d) (timing error). Grid points are computed in parallel (rayon).

use crate::diagnostics::q_star;
use crate::error::{PhysicsError, Result};
use crate::propagate::PropagationOptions;
use crate::ramp::{Ramp, SampledColumn, SampledRamp};
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
    /// Q* per grid point.
    pub q_star: Vec<f64>,
    /// Final coherence ratio sqrt(1 - 1/Q*²) per grid point (PHYSICS.md section 4).
    pub coherence: Vec<f64>,
}

impl RobustnessMap {
    /// Fraction of grid points with Q* - 1 <= tolerance.
    pub fn fraction_within(&self, tolerance: f64) -> f64 {
        self.q_star.iter().filter(|&&q| q - 1.0 <= tolerance).count() as f64 / self.q_star.len() as f64
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
/// the work early (returning [`PhysicsError::Cancelled`]).
pub fn robustness_map(
    waveform: &SampledRamp,
    grid: &RobustnessGrid,
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
            let v = q_star(&ramp, opts)?;
            progress(done.fetch_add(1, Ordering::Relaxed) + 1);
            Ok(v)
        })
        .collect();
    let q = q?;
    let coherence = q.iter().map(|&q| (1.0 - 1.0 / (q * q)).max(0.0).sqrt()).collect();
    Ok(RobustnessMap { calibration_errors: cal, duration_errors: dur, q_star: q, coherence })
}
