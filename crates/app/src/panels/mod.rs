//! The panels of the window, one module each.

pub mod candidates;
pub mod compare;
pub mod cycle;
pub mod cycle_tuning;
pub mod design;
pub mod noise_map;
pub mod playback;
pub mod plots;
pub mod real_wells;
pub mod robustness;
pub mod spline_fit;
pub mod synthesis;
pub mod trap_model;
pub mod verdict;
