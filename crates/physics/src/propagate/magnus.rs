//! Adaptive fourth-order Magnus integration of x'' = -omega²(t) x with step doubling.

use super::PropagationOptions;
use super::mat2::Mat2;
use super::step::{GAUSS_NODES, magnus4_step};
use crate::error::{PhysicsError, Result};

/// Fraction of the accuracy budget given to the summed local errors. Measured (examples/
/// accuracy_scan.rs): the error on Q* of a constant-mu ramp stays 5 to 50 times below
/// the request with this value.
const SAFETY: f64 = 0.5;

/// Step-size controller shared across the smooth pieces of one ramp.
#[derive(Debug, Clone)]
pub struct Stepper {
    /// Allowed local error per second of ramp (scaled entries of M).
    tol_rate: f64,
    /// Frequency scale making the entries of M comparable, rad/s.
    w: f64,
    h: f64,
    steps: usize,
    max_steps: usize,
    accuracy: f64,
}

impl Stepper {
    /// A controller for a ramp of duration `tau` (s) with frequency scale `w` (rad/s).
    pub fn new(tau: f64, w: f64, opts: &PropagationOptions) -> Self {
        Self {
            tol_rate: SAFETY * opts.accuracy / tau,
            w,
            h: (0.05 / w).min(tau),
            steps: 0,
            max_steps: opts.max_steps,
            accuracy: opts.accuracy,
        }
    }

    /// Accepted steps so far.
    pub fn steps(&self) -> usize {
        self.steps
    }

    /// Advances M from a to b through the smooth omega² given by `f`. Each step compares
    /// one Magnus-4 step of h with two of h/2 (error ~ difference/15, order 5 locally)
    /// and keeps the two half steps.
    pub fn advance(&mut self, f: &impl Fn(f64) -> f64, a: f64, b: f64, mut m: Mat2) -> Result<Mat2> {
        let mut t = a;
        let span = b - a;
        while t < b {
            let mut h = self.h.min(b - t);
            // Avoid a sliver at the end of the piece.
            if b - t - h < 1e-3 * h {
                h = b - t;
            }
            let [c1, c2] = GAUSS_NODES;
            let full = magnus4_step(f(t + c1 * h), f(t + c2 * h), h);
            let hh = 0.5 * h;
            let first = magnus4_step(f(t + c1 * hh), f(t + c2 * hh), hh);
            let tm = t + hh;
            let second = magnus4_step(f(tm + c1 * hh), f(tm + c2 * hh), hh);
            let two = second.mul(&first);
            let err = two.scaled_distance(&full, self.w) / 15.0;
            // A non-finite estimate (an overflowing step) can neither be accepted nor
            // shrink the step: stop with an error rather than loop for ever.
            if !err.is_finite() || !h.is_finite() {
                return Err(PhysicsError::AccuracyNotReached {
                    what: format!("Magnus propagation (the step overflowed at t = {t:e} s)"),
                    accuracy: self.accuracy,
                    steps: self.steps,
                });
            }
            // Below a few eps the estimate is rounding noise, not truncation error.
            let tol = (self.tol_rate * h).max(8.0 * f64::EPSILON);
            #[expect(clippy::float_cmp, reason = "h was set to exactly b - t for the last step")]
            let at_end = h == b - t;
            if err <= tol || h <= 1e-14 * span.max(f64::MIN_POSITIVE) {
                m = two.mul(&m);
                t = if at_end { b } else { t + h };
                self.steps += 1;
                if self.steps > self.max_steps {
                    return Err(PhysicsError::AccuracyNotReached {
                        what: "Magnus propagation".into(),
                        accuracy: self.accuracy,
                        steps: self.max_steps,
                    });
                }
            }
            let factor = step_factor(tol, err);
            // Do not let a short final piece shrink the step carried to the next piece.
            if at_end && err <= tol && factor > 1.0 {
                self.h = self.h.max(h * factor);
            } else {
                self.h = h * factor;
            }
        }
        Ok(m)
    }
}

/// The step-size factor 0.9 (tol/err)^(1/5), clamped to [0.2, 4] (the usual controller
/// of a 4th-order method with an error estimate of order 5; common practice, no source).
/// The clamp's ends are decided without the power, which most steps of a fine table hit.
#[inline]
fn step_factor(tol: f64, err: f64) -> f64 {
    // (4/0.9)^5 and (0.2/0.9)^5: where 0.9 r^(1/5) reaches the clamp.
    const GROW_AT: f64 = 1_734.152_991_583_261_8;
    const SHRINK_AT: f64 = 5.419_228_098_697_694e-4;
    if err == 0.0 || tol >= GROW_AT * err {
        4.0
    } else if tol <= SHRINK_AT * err {
        0.2
    } else {
        (0.9 * (tol / err).powf(0.2)).clamp(0.2, 4.0)
    }
}
