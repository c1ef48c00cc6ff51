//! Thermalisation stroke at fixed frequency (Y. Rezek and R. Kosloff, New J. Phys. 8, 83 (2006)): a Lindblad bath
//! with jump operators a (rate Gamma (nbar + 1)) and a† (rate Gamma nbar), detailed
//! balance k_up/k_down = exp(-hbar omega / k_B T). Exact affine map on (H, L, C).

use crate::affine::AffineMap;
use crate::constants::HBAR;
use crate::error::{PhysicsError, Result, require_non_negative, require_positive};
use crate::noise::Noise;
use crate::state::bose_einstein;
use nalgebra::{Matrix3, Matrix4, Vector3};

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

    /// Exact map on (H, L, C) for a contact of `time` seconds (>= 0) with the trap held
    /// at the bath's frequency and the noise that acts on the trap meanwhile:
    /// H -> H_eq + (H - H_eq) e^{-Gamma t}; (L, C) rotate by 2 omega t and decay as
    /// e^{-(Gamma + gamma_phi) t} (dephasing gamma_phi). White amplitude noise on omega²
    /// (spectral density S, T. A. Savard, K. M. O'Hara and J. E. Thomas, Phys. Rev. A 56,
    /// R1095 (1997)) adds kappa (H - L) to both dH/dt and dL/dt with kappa = omega² S / 2
    /// (from dY/dt += omega⁴ S X); the map is then the exponential of the affine
    /// generator (a 4x4 matrix exponential, Padé with scaling and squaring, accurate to
    /// rounding: no time steps).
    pub fn stroke(&self, time: f64, noise: &Noise) -> Result<AffineMap> {
        let time = require_non_negative("bath contact time", time)?;
        let dephasing = require_non_negative("dephasing rate", noise.dephasing_rate)?;
        let psd = require_non_negative("amplitude-noise spectral density", noise.amplitude_psd)?;
        if psd == 0.0 {
            let e = (-self.rate * time).exp();
            let ec = (-(self.rate + dephasing) * time).exp();
            let (s, c) = (2.0 * self.omega * time).sin_cos();
            let a = Matrix3::new(e, 0.0, 0.0, 0.0, ec * c, -ec * s, 0.0, ec * s, ec * c);
            let b = Vector3::new(self.equilibrium_energy() * (1.0 - e), 0.0, 0.0);
            return Ok(AffineMap { a, b });
        }
        let (g, w) = (self.rate, self.omega);
        let gl = g + dephasing;
        let kappa = 0.5 * w * w * psd;
        #[rustfmt::skip]
        let generator = Matrix4::new(
            kappa - g, -kappa, 0.0, g * self.equilibrium_energy(),
            kappa, -gl - kappa, -2.0 * w, 0.0,
            0.0, 2.0 * w, -gl, 0.0,
            0.0, 0.0, 0.0, 0.0,
        );
        let m = (generator * time).exp();
        if !m.iter().all(|v| v.is_finite()) {
            return Err(PhysicsError::invalid(
                "amplitude noise during the bath contact",
                format!("{psd:e} s over {time:e} s"),
                "a strength and contact time whose heating stays finite",
            ));
        }
        Ok(AffineMap { a: m.fixed_view::<3, 3>(0, 0).into_owned(), b: Vector3::new(m[(0, 3)], m[(1, 3)], m[(2, 3)]) })
    }

    /// The stationary energy of a contact with amplitude noise of spectral density S
    /// (s) and dephasing gamma_phi, when the bath outruns the heating; `None` when the
    /// noise heats faster than the bath cools (no steady state). Setting the derivatives
    /// of the generator in [`Bath::stroke`] to zero gives
    /// H_ss = Gamma H_eq / (Gamma - kappa + kappa² / (Gamma' + kappa + 4 omega² / Gamma'))
    /// with kappa = omega² S / 2 and Gamma' = Gamma + gamma_phi (derived here from that
    /// generator; with S = 0 it is H_eq).
    pub fn stationary_energy(&self, noise: &Noise) -> Option<f64> {
        let (g, w) = (self.rate, self.omega);
        let gl = g + noise.dephasing_rate;
        let kappa = 0.5 * w * w * noise.amplitude_psd;
        if kappa == 0.0 {
            return Some(self.equilibrium_energy());
        }
        if gl <= 0.0 {
            return None;
        }
        let denominator = g - kappa + kappa * kappa / (gl + kappa + 4.0 * w * w / gl);
        (denominator > 0.0).then(|| g * self.equilibrium_energy() / denominator)
    }
}
