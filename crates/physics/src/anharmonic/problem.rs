//! What the anharmonic check is asked: one trap axis following a reference ramp, its
//! well, its start state, and the accuracy wanted.

use super::well::WellShape;
use crate::error::{PhysicsError, Result, require_finite, require_non_negative, require_positive};
use crate::ramp::{Ramp, RampShape};

/// One trap axis whose frequency follows a reference ramp:
/// omega_axis²(t) = gain omega²(t) + offset_omega2.
#[derive(Debug, Clone, Copy)]
pub struct AxisProblem<'a> {
    /// The reference ramp omega(t).
    pub ramp: &'a Ramp,
    /// Factor on the ramp's omega², dimensionless; finite.
    pub gain: f64,
    /// Added to gain omega²(t), (rad/s)²; finite, may be negative.
    pub offset_omega2: f64,
    /// Mass of the trapped particle, kg; > 0.
    pub mass_kg: f64,
    /// The well's profile.
    pub well: WellShape,
    /// Mean occupation N of the thermal start state in the initial well (>= 0; 0 is the
    /// pure ground state): kT = hbar omega_axis(0) / ln(1 + 1/N).
    pub occupation: f64,
}

/// Accuracy and verdict settings of the check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CheckSettings {
    /// Verdict tolerance on |energy_ratio - 1|, > 0; default 1e-3.
    pub tolerance: f64,
    /// Verdict bound on the lost fraction, > 0; default 1e-6.
    pub loss_bound: f64,
    /// Wanted accuracy of energy_ratio and ground_fidelity, 1e-12 to 1e-2; default 1e-8.
    pub target_accuracy: f64,
    /// Keep |psi_0(x, t)|² on a coarse grid (about 200 x 200) for a heat map.
    pub keep_density: bool,
    /// Absorbing margins at the grid's edges (default on). Off, the grid is periodic and
    /// the propagation exactly unitary: only for checking the solver.
    pub absorbing_edges: bool,
    /// Multiplies the automatically chosen box and momentum range, 0.25 to 8; default 1.
    /// Below 1 only to study convergence.
    pub grid_scale: f64,
}

impl Default for CheckSettings {
    fn default() -> Self {
        Self {
            tolerance: 1e-3,
            loss_bound: 1e-6,
            target_accuracy: 1e-8,
            keep_density: false,
            absorbing_edges: true,
            grid_scale: 1.0,
        }
    }
}

impl CheckSettings {
    pub(crate) fn validated(&self) -> Result<Self> {
        require_positive("tolerance", self.tolerance)?;
        require_positive("loss bound", self.loss_bound)?;
        if !(self.target_accuracy.is_finite() && (1e-12..=1e-2).contains(&self.target_accuracy)) {
            return Err(PhysicsError::invalid("target accuracy", self.target_accuracy, "1e-12 to 1e-2"));
        }
        if !(self.grid_scale.is_finite() && (0.25..=8.0).contains(&self.grid_scale)) {
            return Err(PhysicsError::invalid("grid scale", self.grid_scale, "0.25 to 8"));
        }
        Ok(*self)
    }
}

/// Most breakpoints the propagation lands on one by one; a table with more rows is
/// stepped uniformly (see `Axis::pieces`).
const MAX_LANDED_BREAKPOINTS: usize = 4096;

/// The validated axis: omega_axis²(t) and its extremes.
#[derive(Debug, Clone)]
pub(crate) struct Axis<'a> {
    pub ramp: &'a Ramp,
    pub gain: f64,
    pub offset: f64,
    pub mass: f64,
    pub well: WellShape,
    pub occupation: f64,
    /// omega_axis at the start and the end, rad/s.
    pub omega_start: f64,
    pub omega_end: f64,
    /// Smallest and largest omega_axis², (rad/s)², with their times, s.
    pub min: (f64, f64),
    pub max: (f64, f64),
}

impl<'a> Axis<'a> {
    pub(crate) fn new(problem: &AxisProblem<'a>) -> Result<Self> {
        let gain = require_finite("gain", problem.gain)?;
        let offset = require_finite("offset omega²", problem.offset_omega2)?;
        let mass = require_positive("mass", problem.mass_kg)?;
        let well = problem.well.validated()?;
        let occupation = require_non_negative("occupation", problem.occupation)?;
        let ramp = problem.ramp;
        let (lo, hi) = (ramp.min_omega2(), ramp.max_omega2());
        let (min, max) = if gain >= 0.0 {
            ((gain * lo.0 + offset, lo.1), (gain * hi.0 + offset, hi.1))
        } else {
            ((gain * hi.0 + offset, hi.1), (gain * lo.0 + offset, lo.1))
        };
        let tau = ramp.duration();
        let start2 = gain * ramp.omega_initial().powi(2) + offset;
        let end2 = gain * ramp.omega_final().powi(2) + offset;
        let what = |w: &str| format!("the {w} well of the axis (omega_axis² = gain omega² + offset)");
        if !(start2.is_finite() && start2 > 0.0) {
            return Err(PhysicsError::UndefinedWhereInverted { what: what("initial"), omega2: start2, time: 0.0 });
        }
        if !(end2.is_finite() && end2 > 0.0) {
            return Err(PhysicsError::UndefinedWhereInverted { what: what("final"), omega2: end2, time: tau });
        }
        if !matches!(well, WellShape::Harmonic) && min.0 <= 0.0 {
            return Err(PhysicsError::UndefinedWhereInverted {
                what: format!(
                    "a {} well (its depth U is proportional to omega_axis²; an optical trap cannot invert)",
                    well.name()
                ),
                omega2: min.0,
                time: min.1,
            });
        }
        Ok(Self {
            ramp,
            gain,
            offset,
            mass,
            well,
            occupation,
            omega_start: start2.sqrt(),
            omega_end: end2.sqrt(),
            min,
            max,
        })
    }

    /// omega_axis²(t), (rad/s)².
    #[inline]
    pub(crate) fn omega2(&self, t: f64) -> f64 {
        self.gain * self.ramp.omega2(t) + self.offset
    }

    pub(crate) fn duration(&self) -> f64 {
        self.ramp.duration()
    }

    /// The smooth pieces the propagation steps through, as their end times (the last is
    /// the duration): the ramp's breakpoints, where omega² or a derivative jumps, unless
    /// there are more than 4096 of them and the ramp is not a hold sequence (a table read
    /// linearly: its kinks are then left inside steps, which the step-halving estimate
    /// sees).
    pub(crate) fn pieces(&self) -> Vec<f64> {
        let tau = self.duration();
        let bps = self.ramp.breakpoints();
        let mut ends =
            if bps.len() <= MAX_LANDED_BREAKPOINTS || self.ramp.is_piecewise_constant() { bps } else { Vec::new() };
        ends.retain(|&t| t > 0.0 && t < tau);
        ends.push(tau);
        ends
    }
}
