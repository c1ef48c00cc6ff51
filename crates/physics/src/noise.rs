//! Noise on a unitary stroke (amplitude noise after T. A. Savard, K. M. O'Hara and J. E.
//! Thomas, Phys. Rev. A 56, R1095 (1997)): dephasing in the energy basis
//! and white fractional noise on omega².

use crate::error::{Result, require_non_negative};
use nalgebra::Matrix3;

/// Noise acting during ramps. Both zero means a unitary stroke.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Noise {
    /// Dephasing rate gamma_phi, 1/s (>= 0): L and C decay at this extra rate, H
    /// untouched. Acts only where omega² > 0 (the energy basis needs a trap).
    pub dephasing_rate: f64,
    /// Two-sided spectral density S of white fractional noise eps(t) on omega²,
    /// omega² -> omega² (1 + eps), <eps(t) eps(t')> = S delta(t - t'); s (>= 0).
    /// Adds omega⁴ S X to dY/dt (weak-noise limit, S omega << 1).
    pub amplitude_psd: f64,
}

impl Noise {
    /// No noise.
    pub const NONE: Self = Self { dephasing_rate: 0.0, amplitude_psd: 0.0 };

    /// Validated noise.
    pub fn new(dephasing_rate: f64, amplitude_psd: f64) -> Result<Self> {
        Ok(Self {
            dephasing_rate: require_non_negative("dephasing rate", dephasing_rate)?,
            amplitude_psd: require_non_negative("amplitude-noise spectral density", amplitude_psd)?,
        })
    }

    /// True when both strengths are zero.
    pub fn is_silent(&self) -> bool {
        self.dephasing_rate == 0.0 && self.amplitude_psd == 0.0
    }

    /// Generator G of d(X, Y, D)/dt = G (X, Y, D) at a given omega², including this noise.
    pub fn generator(&self, omega2: f64) -> Matrix3<f64> {
        let mut g = Matrix3::new(0.0, 0.0, 2.0, 0.0, 0.0, -2.0 * omega2, -omega2, 1.0, 0.0);
        g[(1, 0)] += omega2 * omega2 * self.amplitude_psd;
        if omega2 > 0.0 && self.dephasing_rate > 0.0 {
            let gp = self.dephasing_rate;
            g[(0, 0)] -= 0.5 * gp;
            g[(0, 1)] += 0.5 * gp / omega2;
            g[(1, 0)] += 0.5 * gp * omega2;
            g[(1, 1)] -= 0.5 * gp;
            g[(2, 2)] -= gp;
        }
        g
    }
}
