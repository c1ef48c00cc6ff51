//! What the anharmonic check reports about one axis.

use crate::diagnostics::Verdict;

/// The result of [`super::check_axis`]. Energies are measured from the well's bottom.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct AxisCheck {
    /// sum_n p_n <H_f>_n / sum_n p_n E_n^f: 1 in the adiabatic limit (level n ends in
    /// level n). <H_f>_n is over the part of level n that stayed on the grid,
    /// normalised by its norm. Equals 1 + `energy_ratio_minus_one`.
    pub energy_ratio: f64,
    /// energy_ratio - 1, formed from the levels' excess energies <H_f - E_n^f> (no
    /// subtraction of two near-equal totals), Richardson-extrapolated.
    pub energy_ratio_minus_one: f64,
    /// |<phi_0^f|psi_0(t_f)>|² of the component that starts in the ground state, in [0, 1]
    /// (what left the grid counts as lost fidelity).
    pub ground_fidelity: f64,
    /// The moment engine's Husimi Q* of the axis's own ramp omega_axis(t) (harmonic well).
    pub harmonic_q_star: f64,
    /// harmonic_q_star - 1, without cancellation (>= 0).
    pub harmonic_q_star_minus_one: f64,
    /// min over t of U(t)/(hbar omega_axis(t)); `None` for a harmonic well.
    pub min_depth_quanta: Option<f64>,
    /// Number of levels in the thermal mixture (neglected weight below 1e-12).
    pub levels: usize,
    /// 1 - surviving norm, weighted over the mixture (what the absorbing edges took).
    pub lost_fraction: f64,
    /// Levels bound by at least hbar omega_axis(t_f) below the edge of the final well,
    /// by the WKB count (number of n with S(E_n) = pi hbar (n + 1/2) below that energy),
    /// independent of the grid; `None` for a harmonic well (all levels are bound).
    pub bound_levels_final: Option<usize>,
    /// Estimated error of energy_ratio and ground_fidelity: the larger of the step-halving
    /// estimate and the grid-refinement difference.
    pub error_estimate: f64,
    /// The step-halving part of `error_estimate` (last two Richardson diagonals).
    pub step_error: f64,
    /// The grid part of `error_estimate` (this grid against one 25 % larger in extent and
    /// in momentum range, at the coarsest step).
    pub grid_error: f64,
    /// error_estimate <= target accuracy.
    pub accuracy_reached: bool,
    /// |energy_ratio - 1| <= tolerance and lost_fraction < loss bound.
    pub pass: bool,
    /// The verdict tolerance used, on |energy_ratio - 1|.
    pub tolerance: f64,
    /// The verdict bound on lost_fraction used.
    pub loss_bound: f64,
    /// Thermal weights p_n of the levels (sum 1).
    pub populations: Vec<f64>,
    /// Points of the position grid.
    pub grid_points: usize,
    /// Grid spacing, m.
    pub grid_spacing_m: f64,
    /// Time steps of the finest propagation.
    pub time_steps: usize,
    /// Step halvings used (the finest propagation has 2^this times the coarsest's steps).
    pub step_halvings: u32,
    /// The well and its levels at the start.
    pub start: WellPicture,
    /// The well and its levels at the end.
    pub end: WellPicture,
    /// |psi_0(x, t)|² on a coarse grid, when asked for.
    pub density: Option<DensityMap>,
}

impl AxisCheck {
    /// PASS or FAIL (the check knows no limits).
    pub fn verdict(&self) -> Verdict {
        Verdict::of(self.pass, true)
    }
}

/// A well at one time with its levels, for a plot.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct WellPicture {
    /// Time, s.
    pub time_s: f64,
    /// omega_axis, rad/s.
    pub omega_rad_s: f64,
    /// Depth U, J; `None` for a harmonic well.
    pub depth_j: Option<f64>,
    /// Positions of the potential curve, m (the grid's interior).
    pub x_m: Vec<f64>,
    /// V(x), J.
    pub potential_j: Vec<f64>,
    /// Energies of the levels in the mixture, J, ascending.
    pub levels_j: Vec<f64>,
}

/// |psi_0(x, t)|² of the ground-state component on a coarse grid.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct DensityMap {
    /// Frame times, s, ascending from 0 to the duration.
    pub times_s: Vec<f64>,
    /// Bin centres, m.
    pub x_m: Vec<f64>,
    /// One row per time: the bin average of |psi_0|², 1/m.
    pub density_per_m: Vec<Vec<f64>>,
}
