//! Split-step Fourier propagation with Strang splitting (G. Strang, SIAM J. Numer.
//! Anal. 5, 506 (1968); R. H. Hardin and F. D. Tappert, SIAM Rev. 15, 423 (1973)).
//!
//! One step of length h: exp(-i V(t_mid) h/2) exp(-i T h) exp(-i V(t_mid) h/2), with the
//! potential at the step's midpoint. The step is symmetric (its inverse is the step
//! with -h), so the global error of any observable is a series in even powers of h
//! and step halving can be extrapolated (Richardson). Consecutive half steps of the
//! potential are merged, so a step costs one forward and one inverse FFT.
//! The absorbing margins enter as V - i W.

use super::grid::Grid;
use crate::error::{PhysicsError, Result};
use rayon::prelude::*;
use rustfft::num_complex::Complex64;

/// Steps applied between two progress reports (and density frames).
const MAX_CHUNK: usize = 64;

/// One step: its length and w² at its midpoint (reduced units).
#[derive(Debug, Clone, Copy)]
pub(crate) struct Step {
    pub h: f64,
    pub w2: f64,
}

/// A state being propagated, with its own FFT scratch.
pub(crate) struct Level {
    pub psi: Vec<Complex64>,
    scratch: Vec<Complex64>,
}

impl Level {
    pub(crate) fn new(psi: Vec<Complex64>, grid: &Grid) -> Self {
        Self { psi, scratch: grid.scratch() }
    }
}

/// |psi_0|² frames on a coarse grid of the interior.
#[derive(Debug, Clone, Default)]
pub(crate) struct DensityFrames {
    /// Reduced times of the frames.
    pub times: Vec<f64>,
    /// Bin centres, reduced lengths.
    pub x: Vec<f64>,
    /// One row of bin averages of |psi|²/dx per frame (density per reduced length).
    pub rows: Vec<Vec<f64>>,
    bins: Vec<(usize, usize)>,
}

impl DensityFrames {
    pub(crate) fn new(grid: &Grid, bins: usize) -> Self {
        let c = grid.centre();
        let half = grid.max_half();
        // Equal bins of `stride` points, centred on x = 0.
        let points = 2 * half + 1;
        let stride = points.div_ceil(bins.max(1)).max(1);
        let nb = points / stride;
        let first = c - nb * stride / 2;
        let mut out = Self::default();
        for b in 0..nb {
            let lo = first + b * stride;
            let hi = lo + stride;
            out.bins.push((lo, hi));
            out.x.push(0.5 * (grid.x[lo] + grid.x[hi - 1]));
        }
        out
    }

    fn record(&mut self, t: f64, psi: &[Complex64], dx: f64) {
        let row = self
            .bins
            .iter()
            .map(|&(lo, hi)| psi[lo..hi].iter().map(Complex64::norm_sqr).sum::<f64>() / ((hi - lo) as f64 * dx))
            .collect();
        self.times.push(t);
        self.rows.push(row);
    }
}

/// exp(-b W(x) - i a g(x)) on the grid.
fn potential_phase(grid: &Grid, g: &[f64], a: f64, b: f64) -> Vec<Complex64> {
    let mut out: Vec<Complex64> = g
        .iter()
        .map(|&gx| {
            let (s, c) = (a * gx).sin_cos();
            Complex64::new(c, -s)
        })
        .collect();
    if b > 0.0 {
        for &j in &grid.absorbing_points {
            out[j] *= (-b * grid.absorber[j]).exp();
        }
    }
    out
}

/// exp(-i k²h/2)/n: the kinetic step with the inverse FFT's 1/n folded in.
fn kinetic_phase(grid: &Grid, h: f64) -> Vec<Complex64> {
    let inv_n = 1.0 / grid.n as f64;
    grid.kinetic
        .iter()
        .map(|&k2| {
            let (s, c) = (k2 * h).sin_cos();
            Complex64::new(c * inv_n, -s * inv_n)
        })
        .collect()
}

#[inline]
fn multiply(psi: &mut [Complex64], by: &[Complex64]) {
    for (p, f) in psi.iter_mut().zip(by) {
        *p *= f;
    }
}

/// The merged potential phase before step j (j = 0..=steps.len()): the second half of
/// step j - 1 and the first half of step j.
fn boundary(steps: &[Step], j: usize) -> (f64, f64) {
    let half = |s: Step| (0.5 * s.h * s.w2, 0.5 * s.h);
    let (a0, b0) = if j > 0 { half(steps[j - 1]) } else { (0.0, 0.0) };
    let (a1, b1) = steps.get(j).map_or((0.0, 0.0), |&s| half(s));
    (a0 + a1, b0 + b1)
}

/// Propagates every level through `steps` (in place). `g` is the well's profile on the
/// grid; `frames`, if given, records level 0 at the chunk ends; `progress` is told the
/// steps done (per level) and returns false to cancel.
pub(crate) fn propagate(
    grid: &Grid,
    g: &[f64],
    steps: &[Step],
    levels: &mut [Level],
    mut frames: Option<&mut DensityFrames>,
    progress: &mut dyn FnMut(usize) -> bool,
) -> Result<()> {
    let total = steps.len();
    let chunk = if frames.is_some() { total.div_ceil(200).clamp(1, MAX_CHUNK) } else { MAX_CHUNK };
    let mut t = 0.0;
    if let (Some(f), Some(l0)) = (frames.as_deref_mut(), levels.first()) {
        f.record(t, &l0.psi, grid.dx);
    }
    let mut start = 0;
    while start < total {
        let end = (start + chunk).min(total);
        let phases: Vec<Vec<Complex64>> = (start..end)
            .into_par_iter()
            .map(|j| {
                let (a, b) = boundary(steps, j);
                potential_phase(grid, g, a, b)
            })
            .collect();
        // Kinetic phases of the distinct step lengths of the chunk (one per piece).
        let mut kinetic: Vec<(f64, Vec<Complex64>)> = Vec::new();
        let mut which = Vec::with_capacity(end - start);
        for s in &steps[start..end] {
            #[expect(clippy::float_cmp, reason = "steps of one piece share the same length exactly")]
            let found = kinetic.iter().position(|(h, _)| *h == s.h);
            which.push(found.unwrap_or_else(|| {
                kinetic.push((s.h, kinetic_phase(grid, s.h)));
                kinetic.len() - 1
            }));
        }
        levels.par_iter_mut().for_each(|level| {
            let Level { psi, scratch } = level;
            for (phase, &k) in phases.iter().zip(&which) {
                multiply(psi, phase);
                grid.forward.process_with_scratch(psi, scratch);
                multiply(psi, &kinetic[k].1);
                grid.inverse.process_with_scratch(psi, scratch);
            }
        });
        t += steps[start..end].iter().map(|s| s.h).sum::<f64>();
        if let (Some(f), Some(l0)) = (frames.as_deref_mut(), levels.first()) {
            f.record(t, &l0.psi, grid.dx);
        }
        if !progress(end) {
            return Err(PhysicsError::Cancelled);
        }
        start = end;
    }
    let (a, b) = boundary(steps, total);
    let last = potential_phase(grid, g, a, b);
    levels.par_iter_mut().for_each(|level| multiply(&mut level.psi, &last));
    Ok(())
}
