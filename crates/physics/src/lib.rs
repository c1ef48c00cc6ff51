//! Quenchless physics: the quantum harmonic oscillator under trap-frequency ramps.
//!
//! Pure computation, SI units, mass-scaled coordinates (m = 1). A zero-mean Gaussian
//! state is three numbers, the second moments X = <Q²>, Y = <P²>, D = <(QP+PQ)/2>,
//! equivalent to the energy H, Lagrangian L and correlation C where omega² > 0.
//! Ramps map them linearly through the 2x2 fundamental matrix of x'' = -omega²(t) x;
//! baths are exact affine maps; an Otto cycle is their composition.

#![deny(missing_docs)]

pub mod affine;
pub mod anharmonic;
pub mod axes;
pub mod bath;
pub mod constants;
pub mod cycle;
pub mod design;
pub mod diagnostics;
pub mod error;
pub mod limits;
pub mod noise;
pub mod playback;
pub mod propagate;
pub mod ramp;
pub mod state;

pub use affine::AffineMap;
pub use bath::Bath;
pub use cycle::{CycleReport, OttoCycle, Regime, WorkStroke};
pub use diagnostics::{Evaluation, EvaluationSettings, RampReport, TrajectoryPoint, Verdict, evaluate};
pub use error::{PhysicsError, Result};
pub use limits::{TrapLimits, Violation, ViolationKind};
pub use noise::Noise;
pub use propagate::{Mat2, PropagationOptions};
pub use ramp::{Ramp, RampShape};
pub use state::Moments;
