//! Thermalisation stroke at fixed frequency (Y. Rezek and R. Kosloff, New J. Phys. 8, 83 (2006)): a Lindblad bath
//! with jump operators a (rate Gamma (nbar + 1)) and a† (rate Gamma nbar), detailed
//! balance k_up/k_down = exp(-hbar omega / k_B T). Exact affine map on (H, L, C).

use crate::affine::AffineMap;
use crate::constants::HBAR;
use crate::error::{Result, require_non_negative, require_positive};
use crate::state::bose_einstein;
use nalgebra::{Matrix3, Vector3};

/// A heat bath coupled to the oscillator at a fixed trap frequency.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bath {
    omega: f64,
    occupation: f64,
    rate: f64,
}

impl Bath {
    /// Trap frequency omega (rad/s, > 0), bath mean occupation nbar at that frequency
    /// (>= 0), coupling Gamma = k_down - k_up (1/s, >= 0).
    pub fn with_occupation(omega: f64, occupation: f64, rate: f64) -> Result<Self> {
        Ok(Self {
            omega: require_positive("bath frequency", omega)?,
            occupation: require_non_negative("bath mean occupation", occupation)?,
            rate: require_non_negative("bath coupling rate", rate)?,
        })
    }

    /// As [`Bath::with_occupation`] with the occupation from a temperature (K, >= 0).
    pub fn with_temperature(omega: f64, temperature: f64, rate: f64) -> Result<Self> {
        Self::with_occupation(omega, bose_einstein(omega, temperature)?, rate)
    }

    /// Frequency, rad/s.
    pub fn omega(&self) -> f64 {
        self.omega
    }
    /// Mean occupation nbar.
    pub fn occupation(&self) -> f64 {
        self.occupation
    }
    /// Coupling Gamma, 1/s.
    pub fn rate(&self) -> f64 {
        self.rate
    }
    /// Equilibrium energy H_eq = hbar omega (nbar + 1/2), J.
    pub fn equilibrium_energy(&self) -> f64 {
        HBAR * self.omega * (self.occupation + 0.5)
    }

    /// Exact map on (H, L, C) for a contact of `time` seconds (>= 0), with optional
    /// extra dephasing gamma_phi (1/s) on L and C:
    /// H -> H_eq + (H - H_eq) e^{-Gamma t}; (L, C) rotate by 2 omega t and decay as
    /// e^{-(Gamma + gamma_phi) t}.
    pub fn stroke(&self, time: f64, dephasing: f64) -> Result<AffineMap> {
        let time = require_non_negative("bath contact time", time)?;
        let dephasing = require_non_negative("dephasing rate", dephasing)?;
        let e = (-self.rate * time).exp();
        let ec = (-(self.rate + dephasing) * time).exp();
        let (s, c) = (2.0 * self.omega * time).sin_cos();
        let a = Matrix3::new(e, 0.0, 0.0, 0.0, ec * c, -ec * s, 0.0, ec * s, ec * c);
        let b = Vector3::new(self.equilibrium_energy() * (1.0 - e), 0.0, 0.0);
        Ok(AffineMap { a, b })
    }
}
