//! Spline optimisation: move the free knots of a user's spline (the end knots stay) so
//! that the ramp ends energy-diagonal, Q* - 1 below a target, while it keeps to the
//! trap's bounds and slew limit; optionally minimise the worst Q* over a band of
//! calibration errors (every omega scaled by 1 + e) instead — robust design.
//!
//! The search is the Nelder–Mead simplex method of the `argmin` crate over
//! ln(omega_k) of the free knots (knot times stay where the user put them). Nelder–Mead
//! only compares costs, so the cost is ranked lexicographically: any ramp that breaks a
//! limit ranks behind every ramp that keeps to them, ordered by how far it breaks them.

use super::restarted::{Ranked, Search, minimise};
use crate::axes::worst_q_star_minus_one;
use crate::error::{PhysicsError, Result};
use crate::limits::{TrapLimits, limit_excess};
use crate::propagate::PropagationOptions;
use crate::ramp::{Ramp, SplineRamp};
use rayon::prelude::*;
use std::cell::Cell;
use std::sync::atomic::{AtomicBool, Ordering};

/// Points on which the limits are checked during the search.
const LIMIT_POINTS: usize = 401;

/// Nelder–Mead iterations per restart round.
const ROUND: u64 = 400;

/// What the optimiser should reach and respect.
#[derive(Debug, Clone, PartialEq)]
pub struct SplineTargets {
    /// Q* - 1 to reach (nominal, or the worst over the band), > 0; default 1e-6.
    pub target: f64,
    /// Bounds and slew limit the ramp must keep to.
    pub limits: TrapLimits,
    /// Robust design: the half-width of the calibration-error band (0 < e < 0.5).
    pub calibration_band: Option<f64>,
    /// Calibration errors sampled across the band (odd, 3 to 41; default 5).
    pub band_points: usize,
    /// Most Nelder–Mead iterations in all (1 to 1e6; default 5,000).
    pub max_iterations: u64,
    /// The trap's other axes: Q* - 1 is then the worst over every axis (empty: the
    /// reference axis alone).
    pub other_axes: Vec<crate::ramp::AxisLaw>,
}

impl Default for SplineTargets {
    fn default() -> Self {
        Self {
            target: 1e-6,
            limits: TrapLimits::default(),
            calibration_band: None,
            band_points: 5,
            max_iterations: 5_000,
            other_axes: Vec::new(),
        }
    }
}

/// What the optimiser found.
#[derive(Debug, Clone, PartialEq)]
pub struct SplineFit {
    /// The optimised ramp (same times, shape, space and ends as the start).
    pub ramp: SplineRamp,
    /// Q* - 1 of the start ramp (the worst axis's when other axes are targeted).
    pub start_q_star_minus_one: f64,
    /// Q* - 1 of the optimised ramp, nominal calibration (the worst axis's when other
    /// axes are targeted).
    pub q_star_minus_one: f64,
    /// Worst Q* - 1 over the band (robust design only).
    pub worst_q_star_minus_one: Option<f64>,
    /// Whether the target was reached (nominal, or worst over the band).
    pub reached: bool,
    /// Whether the optimised ramp keeps to the limits on the check grid.
    pub within_limits: bool,
    /// Nelder–Mead iterations.
    pub iterations: u64,
    /// Q* evaluations (each band point counts once).
    pub evaluations: u64,
}

fn with_omegas(start: &SplineRamp, omegas: Vec<f64>) -> Result<SplineRamp> {
    SplineRamp::new(start.times().to_vec(), omegas, start.shape(), start.space(), start.flat_ends())
}

/// The spline with every knot frequency scaled by 1 + e.
pub fn scaled_spline(ramp: &SplineRamp, e: f64) -> Result<SplineRamp> {
    with_omegas(ramp, ramp.omegas().iter().map(|w| w * (1.0 + e)).collect())
}

struct Problem<'a> {
    start: &'a SplineRamp,
    targets: &'a SplineTargets,
    band: Vec<f64>,
    opts: &'a PropagationOptions,
    cancel: &'a AtomicBool,
    progress: &'a (dyn Fn(u64, f64) + Sync),
    evaluations: Cell<u64>,
    best: Cell<f64>,
}

impl Problem<'_> {
    fn omegas(&self, p: &[f64]) -> Vec<f64> {
        let w = self.start.omegas();
        let mut out = w.to_vec();
        for (k, x) in p.iter().enumerate() {
            out[k + 1] = w[k + 1] * x.exp();
        }
        out
    }

    /// Worst Q* - 1 over the band (or nominal), and the nominal Q* - 1. Band points run
    /// in parallel (rayon).
    fn excess(&self, ramp: &SplineRamp) -> Result<(f64, f64)> {
        let axes = &self.targets.other_axes;
        let q_at = |e: f64| -> Result<f64> {
            if e == 0.0 {
                worst_q_star_minus_one(&Ramp::Spline(ramp.clone()), axes, self.opts)
            } else {
                worst_q_star_minus_one(&Ramp::Spline(scaled_spline(ramp, e)?), axes, self.opts)
            }
        };
        let qs: Vec<f64> = if self.band.len() > 1 {
            self.band.par_iter().map(|&e| q_at(e)).collect::<Result<_>>()?
        } else {
            vec![q_at(self.band[0])?]
        };
        self.evaluations.set(self.evaluations.get() + qs.len() as u64);
        let nominal = self.band.iter().zip(&qs).find(|(e, _)| **e == 0.0).map_or(f64::NAN, |(_, q)| *q);
        let worst = qs.iter().fold(f64::NEG_INFINITY, |m, &q| m.max(q));
        Ok((worst, nominal))
    }
}

impl Ranked for Problem<'_> {
    fn rank(&self, p: &[f64]) -> Result<f64> {
        if self.cancel.load(Ordering::Relaxed) {
            return Err(PhysicsError::Cancelled);
        }
        if p.iter().any(|x| !x.is_finite() || x.abs() > 5.0) {
            return Ok(1e12);
        }
        let Ok(ramp) = with_omegas(self.start, self.omegas(p)) else {
            return Ok(1e12);
        };
        let broken = limit_excess(&Ramp::Spline(ramp.clone()), &self.targets.limits, LIMIT_POINTS);
        if broken > 0.0 {
            return Ok(1e6 + broken);
        }
        // A ramp the integrator cannot finish (e.g. a very deep inversion) ranks last.
        let cost = match self.excess(&ramp) {
            Ok((worst, _)) if worst.is_finite() => worst.max(0.0),
            Ok(_) | Err(PhysicsError::AccuracyNotReached { .. }) => 1e9,
            Err(e) => return Err(e),
        };
        if cost < self.best.get() {
            self.best.set(cost);
        }
        (self.progress)(self.evaluations.get(), self.best.get());
        Ok(cost)
    }
}

/// The band of calibration errors sampled (0 for nominal design).
fn band_of(targets: &SplineTargets) -> Result<Vec<f64>> {
    match targets.calibration_band {
        None => Ok(vec![0.0]),
        Some(b) => {
            if !(b.is_finite() && b > 0.0 && b < 0.5) {
                return Err(PhysicsError::invalid("calibration band", b, "between 0 and 0.5 (exclusive)"));
            }
            let n = targets.band_points;
            if !(3..=41).contains(&n) || n.is_multiple_of(2) {
                return Err(PhysicsError::invalid("calibration band points", n, "an odd number, 3 to 41"));
            }
            Ok((0..n).map(|k| if 2 * k + 1 == n { 0.0 } else { -b + 2.0 * b * k as f64 / (n - 1) as f64 }).collect())
        }
    }
}

/// Moves the free knots of `start` (all but the first and last) to reach the target.
/// `progress` receives (Q* evaluations so far, best cost so far); setting `cancel`
/// stops the search with [`PhysicsError::Cancelled`].
pub fn optimise_spline(
    start: &SplineRamp,
    targets: &SplineTargets,
    opts: &PropagationOptions,
    progress: &(dyn Fn(u64, f64) + Sync),
    cancel: &AtomicBool,
) -> Result<SplineFit> {
    if !(targets.target.is_finite() && targets.target > 0.0 && targets.target < 1.0) {
        return Err(PhysicsError::invalid("target Q* - 1", targets.target, "between 0 and 1 (exclusive)"));
    }
    if !(1..=1_000_000).contains(&targets.max_iterations) {
        return Err(PhysicsError::invalid("iteration limit", targets.max_iterations, "1 to 1000000"));
    }
    let free = start.omegas().len().saturating_sub(2);
    if free == 0 {
        return Err(PhysicsError::invalid(
            "free knots",
            0,
            "at least one knot between the end knots (a spline of 3 or more knots)",
        ));
    }
    let problem = Problem {
        start,
        targets,
        band: band_of(targets)?,
        opts,
        cancel,
        progress,
        evaluations: Cell::new(0),
        best: Cell::new(f64::INFINITY),
    };
    let start_q_star_minus_one = worst_q_star_minus_one(&Ramp::Spline(start.clone()), &targets.other_axes, opts)?;
    let search =
        Search { step: 0.05, round: ROUND, budget: targets.max_iterations, target: targets.target, min_gain: 0.01 };
    let (problem, best, iterations) = minimise("spline optimiser", problem, vec![0.0; free], &search)?;
    let evaluations = problem.evaluations.get();
    let ramp = with_omegas(start, problem.omegas(&best))?;
    let within_limits = limit_excess(&Ramp::Spline(ramp.clone()), &targets.limits, LIMIT_POINTS) == 0.0;
    let (worst, nominal) = problem.excess(&ramp)?;
    Ok(SplineFit {
        start_q_star_minus_one,
        q_star_minus_one: nominal,
        worst_q_star_minus_one: targets.calibration_band.map(|_| worst),
        reached: within_limits && worst <= targets.target,
        within_limits,
        iterations,
        evaluations,
        ramp,
    })
}
