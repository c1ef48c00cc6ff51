//! Hardware playback: a ramp as a waveform generator plays it, and what that playing
//! is worth.
//!
//! One sampling rule serves every file written for the apparatus (README, "Files for the
//! apparatus"):
//! - N = round(tau R) periods (half up); sample k (k = 0..N-1) holds on [k/R, (k+1)/R)
//!   and takes the ramp at k/R (left) or (k + 1/2)/R (midpoint); where a sample falls
//!   on a jump of the ramp it takes the value just after the jump. The duration as
//!   played is N/R.
//! - Before t = 0 the generator holds the initial level (omega_i² through the same
//!   calibration and quantisation); the start state is the stated one in that trap.
//! - Sample N is the final level (omega_f² through calibration and quantisation), held
//!   from N/R on.
//! - Q* is taken in the trap the final level leaves on, once the output stage has
//!   settled on it.
//!
//! [`chain`] plays a ramp as a stream (its tables are kept only for a writer or a
//! plot); [`assessment`] judges the playing (designed against played
//! Q*, the trap left on, the stated limits, the smallest rate and bit depth that keep
//! the tolerance).

pub mod assessment;
pub mod chain;

pub use assessment::{
    AssessmentSettings, AxisPlayback, BitsSearch, JitterSpread, PlaybackAssessment, RateSearch, assess, assess_axes,
    assess_trap, jitter_q_star, minimum_bits, minimum_rate,
};
pub use chain::{
    ANALOG_SUBSTEPS, DriveCalibration, DriveSamples, Jitter, Keep, MAX_SAMPLES, Playback, Played, SETTLE_FRACTION,
    SamplePoint, drive_samples, jitter_limit, periods, play, play_streaming, play_through,
};
