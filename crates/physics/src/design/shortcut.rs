//! The invariant-based shortcut polynomial on demand (X. Chen et al., Phys. Rev. Lett.
//! 104, 063002 (2010)): its lowest omega², whether it inverts the trap, and the
//! shortest duration whose omega² stays at or above a floor.

use crate::error::{PhysicsError, Result, require_finite, require_positive};
use crate::ramp::{Ramp, ShortcutRamp};

/// A shortcut ramp with its lowest omega².
#[derive(Debug, Clone, PartialEq)]
pub struct ShortcutDesign {
    /// Duration, s.
    pub duration: f64,
    /// Lowest omega² over the ramp, (rad/s)².
    pub min_omega2: f64,
    /// omega² < 0 somewhere.
    pub inverts: bool,
    /// The ramp.
    pub ramp: ShortcutRamp,
}

/// The shortcut of a given duration.
pub fn shortcut_for_duration(omega_i: f64, omega_f: f64, duration: f64) -> Result<ShortcutDesign> {
    let ramp = ShortcutRamp::new(omega_i, omega_f, duration)?;
    let min = Ramp::Shortcut(ramp.clone()).min_omega2().0;
    Ok(ShortcutDesign { duration, min_omega2: min, inverts: min < 0.0, ramp })
}

/// The shortest shortcut whose omega² stays at or above `floor` ((rad/s)², may be 0 or
/// negative). The lowest omega² rises with the duration (b'' scales as 1/tau²), so a
/// bisection on tau finds it; relative precision 1e-12 in tau.
pub fn shortest_shortcut_above(omega_i: f64, omega_f: f64, floor: f64) -> Result<ShortcutDesign> {
    require_positive("initial frequency", omega_i)?;
    require_positive("final frequency", omega_f)?;
    require_finite("omega² floor", floor)?;
    let lowest_end = (omega_i * omega_i).min(omega_f * omega_f);
    if floor >= lowest_end {
        return Err(PhysicsError::invalid(
            "omega² floor",
            floor,
            format!("below the smaller end value omega² = {lowest_end:e} (rad/s)² (no ramp can stay above it)"),
        ));
    }
    let period = std::f64::consts::TAU / omega_i.min(omega_f);
    let min_at = |tau: f64| -> Result<f64> { Ok(shortcut_for_duration(omega_i, omega_f, tau)?.min_omega2) };
    let mut hi = period;
    while min_at(hi)? < floor {
        hi *= 2.0;
        if hi > 1e6 * period {
            return Err(PhysicsError::invalid(
                "omega² floor",
                floor,
                "reachable by a shortcut of at most a million periods",
            ));
        }
    }
    let mut lo = hi / 2.0;
    while min_at(lo)? >= floor && lo > 1e-9 * period {
        hi = lo;
        lo /= 2.0;
    }
    for _ in 0..200 {
        if (hi - lo) <= 1e-12 * hi {
            break;
        }
        let mid = 0.5 * (lo + hi);
        if min_at(mid)? >= floor { hi = mid } else { lo = mid }
    }
    shortcut_for_duration(omega_i, omega_f, hi)
}
