//! Physics checks against published closed forms. Each expected value names its source.
#![expect(clippy::unwrap_used, reason = "helpers of tests fail loudly on bad fixtures")]

mod anharmonic;
mod assessment;
mod axes;
mod bath;
mod constant_mu;
mod cycle;
mod design;
mod magnus;
mod noise;
mod playback;
mod power_map;
mod properties;
mod ramps;
mod shortcut;
mod state;

use quenchless_physics::constants::TWO_PI;

/// A typical trap: 100 kHz ordinary frequency, in rad/s.
pub const W_100K: f64 = TWO_PI * 100e3;
