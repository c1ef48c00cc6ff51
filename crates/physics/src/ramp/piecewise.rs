use super::{RampShape, check_frequency};
use crate::error::{PhysicsError, Result};

/// One hold of a piecewise-constant ramp.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Segment {
    /// omega² during the hold, (rad/s)²; any sign.
    pub omega2: f64,
    /// Duration of the hold, s; > 0.
    pub duration: f64,
}

/// Piecewise-constant ramp: the trap jumps from omega_i to the first hold, from
/// hold to hold, and to omega_f at the end (bang-bang protocols are of this kind).
/// Propagation through it is exact.
#[derive(Debug, Clone, PartialEq)]
pub struct PiecewiseConstantRamp {
    omega_i: f64,
    omega_f: f64,
    segments: Vec<Segment>,
    starts: Vec<f64>,
    tau: f64,
}

impl PiecewiseConstantRamp {
    /// omega_i, omega_f in rad/s (> 0) and at least one hold.
    pub fn new(omega_i: f64, omega_f: f64, segments: Vec<Segment>) -> Result<Self> {
        let omega_i = check_frequency("initial frequency", omega_i)?;
        let omega_f = check_frequency("final frequency", omega_f)?;
        if segments.is_empty() {
            return Err(PhysicsError::invalid("number of holds", 0, "at least 1"));
        }
        let mut starts = Vec::with_capacity(segments.len());
        let mut t = 0.0;
        for (k, s) in segments.iter().enumerate() {
            crate::error::require_omega2(&format!("omega² of hold {}", k + 1), s.omega2)?;
            super::check_duration(&format!("duration of hold {}", k + 1), s.duration)?;
            starts.push(t);
            t += s.duration;
        }
        Ok(Self { omega_i, omega_f, segments, starts, tau: t })
    }

    /// The holds, in order.
    pub fn segments(&self) -> &[Segment] {
        &self.segments
    }

    /// Index of the hold that contains t (right-continuous; the last one at t >= tau).
    pub fn segment_index(&self, t: f64) -> usize {
        self.starts.partition_point(|&s| s <= t).saturating_sub(1)
    }

    pub(crate) fn min_omega2(&self) -> (f64, f64) {
        self.extreme(|a, b| a < b)
    }

    pub(crate) fn max_omega2(&self) -> (f64, f64) {
        self.extreme(|a, b| a > b)
    }

    fn extreme(&self, better: impl Fn(f64, f64) -> bool) -> (f64, f64) {
        let mut best = (self.segments[0].omega2, 0.0);
        for (s, &t) in self.segments.iter().zip(&self.starts) {
            if better(s.omega2, best.0) {
                best = (s.omega2, t);
            }
        }
        best
    }
}

impl RampShape for PiecewiseConstantRamp {
    fn duration(&self) -> f64 {
        self.tau
    }
    fn omega_initial(&self) -> f64 {
        self.omega_i
    }
    fn omega_final(&self) -> f64 {
        self.omega_f
    }
    fn omega2(&self, t: f64) -> f64 {
        if t < 0.0 {
            self.omega_i * self.omega_i
        } else if t >= self.tau {
            self.omega_f * self.omega_f
        } else {
            self.segments[self.segment_index(t)].omega2
        }
    }
    fn omega2_rate(&self, _t: f64) -> f64 {
        0.0
    }
    fn breakpoints(&self) -> Vec<f64> {
        self.starts[1..].to_vec()
    }
}
