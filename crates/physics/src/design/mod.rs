//! Design on demand: frictionless ramps from closed forms (constant mu, the shortcut
//! polynomial, time-optimal holds) and robustness maps over calibration and timing
//! errors.

mod bang_bang;
mod constant_mu;
mod robustness;
mod shortcut;

pub use bang_bang::{BangBangDesign, time_optimal_holds};
pub use constant_mu::{ConstantMuDesign, frictionless_constant_mu, nearest_frictionless_order};
pub use robustness::{RobustnessGrid, RobustnessMap, robustness_map};
pub use shortcut::{ShortcutDesign, shortcut_for_duration, shortest_shortcut_above};
