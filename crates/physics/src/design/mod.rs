//! Design on demand: frictionless ramps from closed forms (constant mu, the shortcut
//! polynomial, time-optimal holds) and robustness maps over calibration and timing
//! errors.

mod bang_bang;
mod constant_mu;
mod cycle_timing;
mod power_map;
mod restarted;
mod robustness;
mod shortcut;
mod spline_fit;

pub use bang_bang::{BangBangDesign, time_optimal_holds};
pub use constant_mu::{ConstantMuDesign, frictionless_constant_mu, nearest_frictionless_order};
pub use cycle_timing::{CycleOptimum, CycleTuning, StrokeFamily, bath_temperature, optimise_cycle};
pub use power_map::{NOT_COMPUTED, PowerMap, StrokeTime, power_map, stroke_time, with_stroke_time};
pub use robustness::{
    NoiseGrid, NoiseMap, RobustnessGrid, RobustnessMap, energy_ratio_minus_one, noise_map, robustness_map,
    scaled_waveform,
};
pub use shortcut::{ShortcutDesign, shortcut_for_duration, shortest_shortcut_above};
pub use spline_fit::{SplineFit, SplineTargets, optimise_spline, scaled_spline};
