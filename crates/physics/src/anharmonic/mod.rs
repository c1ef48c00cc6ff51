//! The anharmonic check: how far a ramp is from the adiabatic limit in a real
//! (Gaussian or Lorentzian) well, where the moment engine's harmonic answer is only
//! the well's bottom.
//!
//! A thermal mixture of the initial well's eigenstates is propagated through the ramp
//! by split-step Fourier with Strang splitting (potential at each step's midpoint;
//! second order, error even in the step, extrapolated by Richardson over step halving),
//! on a periodic grid sized from the harmonic moment engine's widths along the ramp,
//! with absorbing margins that count what leaves. The eigenstates come from the
//! sinc-DVR Hamiltonian on the same grid spacing, so they are the propagation's own.
//! A harmonic well goes through the same solver, which is how the solver is checked
//! (Husimi's closed forms).
//!
//! Reduced units inside: lengths in x0 = sqrt(hbar/(m omega_axis(0))), times in
//! 1/omega_axis(0), energies in hbar omega_axis(0); the report is in SI.

mod check;
mod grid;
mod harmonic;
mod levels;
mod problem;
mod report;
mod split_step;
mod well;

pub use check::{StrangRun, check_axis, strang_run};
pub use problem::{AxisProblem, CheckSettings};
pub use report::{AxisCheck, DensityMap, WellPicture};
pub use well::WellShape;

use crate::constants::HBAR;
use crate::error::{PhysicsError, Result, require_positive};

/// The lowest `count` (1 to 400) levels of a well of curvature m omega² at its bottom,
/// J, measured from the bottom, on a sinc-DVR grid chosen for them (converged to
/// about 1e-12 relative for levels bound by at least one quantum). Refuses a count
/// the well does not bind below its edge.
pub fn well_levels(well: WellShape, mass_kg: f64, omega_rad_s: f64, count: usize) -> Result<Vec<f64>> {
    let mass = require_positive("mass", mass_kg)?;
    let omega = require_positive("trap frequency", omega_rad_s)?;
    let well = well.validated()?;
    if !(1..=400).contains(&count) {
        return Err(PhysicsError::invalid("number of levels", count, "1 to 400"));
    }
    let x0 = (HBAR / (mass * omega)).sqrt();
    let profile = well::Profile::new(well, x0);
    // Momentum reach of the top level (harmonic estimate, an upper bound here) with
    // margin, and the box from its turning point plus evanescent tail.
    let top = (count - 1) as f64;
    let k_max = 1.15 * ((2.0 * (2.0 * top + 1.0)).sqrt() + 9.0) * std::f64::consts::FRAC_1_SQRT_2;
    let dx = std::f64::consts::PI / k_max;
    let edge = profile.length().map_or(f64::INFINITY, |l| 3.0 * l + 11.0);
    let reach = levels::box_reach(profile, 1.0, count, edge);
    let half = ((reach / dx).ceil() as usize).max(4);
    if half > 1500 {
        return Err(PhysicsError::invalid(
            "well length scale",
            format!("{reach:e} x0"),
            "up to 1e4 oscillator lengths",
        ));
    }
    let found = levels::box_levels(profile, 1.0, dx, half, count)?;
    if let Some(u) = profile.depth_factor()
        && let Some(&top) = found.energies.last()
        && top >= u
    {
        return Err(PhysicsError::invalid(
            "number of levels",
            count,
            format!("at most the levels bound below the edge ({u:.2} hbar omega deep)"),
        ));
    }
    Ok(found.energies.iter().map(|e| e * HBAR * omega).collect())
}
