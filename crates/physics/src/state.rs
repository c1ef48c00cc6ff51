//! Zero-mean Gaussian states by their second moments, and conversions to the
//! (H, L, C) picture of R. Kosloff and Y. Rezek, Entropy 19, 136 (2017) (m = 1 throughout).

use crate::constants::{BOLTZMANN, HBAR};
use crate::error::{PhysicsError, Result, require_non_negative, require_positive};
use nalgebra::{Matrix3, Vector3};

/// Second moments X = <Q²> (m²), Y = <P²> ((m/s)²), D = <(QP+PQ)/2> (m²/s) of a
/// zero-mean Gaussian state, mass-scaled (m = 1 kg). Valid for any sign of omega².
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Moments {
    /// <Q²>, m².
    pub x: f64,
    /// <P²>, (m/s)².
    pub y: f64,
    /// <(QP+PQ)/2>, m²/s.
    pub d: f64,
}

/// Energy H, Lagrangian L and correlation C at a frequency omega > 0 (all in J).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EnergyPicture {
    /// H = (Y + omega² X)/2, J.
    pub h: f64,
    /// L = (Y - omega² X)/2, J.
    pub l: f64,
    /// C = omega D, J.
    pub c: f64,
}

impl Moments {
    /// Builds a state from its moments, checking the uncertainty relation
    /// X Y - D² >= hbar²/4 (to 1e-9 relative) and X, Y > 0.
    pub fn new(x: f64, y: f64, d: f64) -> Result<Self> {
        require_positive("<Q²>", x)?;
        require_positive("<P²>", y)?;
        if !d.is_finite() {
            return Err(PhysicsError::invalid("<(QP+PQ)/2>", d, "a finite number"));
        }
        let m = Self { x, y, d };
        let k = m.casimir();
        let bound = 0.25 * HBAR * HBAR;
        if k < bound * (1.0 - 1e-9) {
            return Err(PhysicsError::invalid(
                "X Y - D² (uncertainty)",
                format!("{k:e} J² s²"),
                format!(">= hbar²/4 = {bound:e} J² s² (Robertson-Schrödinger)"),
            ));
        }
        Ok(m)
    }

    /// The ground state of a trap of frequency omega (rad/s, > 0).
    pub fn ground(omega: f64) -> Result<Self> {
        Self::thermal_occupation(omega, 0.0)
    }

    /// Thermal state with mean occupation nbar (>= 0) at frequency omega (rad/s).
    pub fn thermal_occupation(omega: f64, nbar: f64) -> Result<Self> {
        let omega = require_positive("trap frequency", omega)?;
        let nbar = require_non_negative("mean occupation", nbar)?;
        let h = HBAR * omega * (nbar + 0.5);
        Ok(Self { x: h / (omega * omega), y: h, d: 0.0 })
    }

    /// Thermal state at temperature T (K, >= 0) in a trap of frequency omega.
    pub fn thermal_temperature(omega: f64, temperature: f64) -> Result<Self> {
        let omega = require_positive("trap frequency", omega)?;
        Self::thermal_occupation(omega, bose_einstein(omega, temperature)?)
    }

    /// Squeezed vacuum-like state: the thermal state nbar at omega, squeezed by
    /// factor exp(r) along an angle phi (rad) in phase space. X Y - D² is kept.
    pub fn squeezed(omega: f64, nbar: f64, r: f64, phi: f64) -> Result<Self> {
        let base = Self::thermal_occupation(omega, nbar)?;
        if !r.is_finite() || r.abs() > 20.0 {
            return Err(PhysicsError::invalid("squeezing parameter r", r, "|r| <= 20"));
        }
        let h = base.energy_picture(omega).h;
        // In the energy picture a squeeze gives H -> H cosh 2r and a coherence of
        // magnitude H sinh 2r at angle phi, leaving H² - L² - C² unchanged.
        let hlc = EnergyPicture {
            h: h * (2.0 * r).cosh(),
            l: -h * (2.0 * r).sinh() * phi.cos(),
            c: h * (2.0 * r).sinh() * phi.sin(),
        };
        Ok(Self::from_energy_picture(hlc, omega))
    }

    /// The moments of a given (H, L, C) at frequency omega > 0.
    pub fn from_energy_picture(e: EnergyPicture, omega: f64) -> Self {
        Self { x: (e.h - e.l) / (omega * omega), y: e.h + e.l, d: e.c / omega }
    }

    /// (H, L, C) at frequency omega > 0.
    pub fn energy_picture(&self, omega: f64) -> EnergyPicture {
        let w2 = omega * omega;
        EnergyPicture { h: 0.5 * (self.y + w2 * self.x), l: 0.5 * (self.y - w2 * self.x), c: omega * self.d }
    }

    /// H = (Y + omega² X)/2 for any sign of omega², J (may be negative if omega² < 0).
    pub fn energy(&self, omega2: f64) -> f64 {
        0.5 * (self.y + omega2 * self.x)
    }

    /// Casimir invariant K = X Y - D², J² s² (>= hbar²/4); equals (H² - L² - C²)/omega².
    pub fn casimir(&self) -> f64 {
        self.x * self.y - self.d * self.d
    }

    /// The energy above the least a state of the same Casimir invariant can have at
    /// omega > 0, H - omega sqrt(K) (J, >= 0), without cancellation:
    /// H - omega sqrt(K) = [(sqrt(Y) - omega sqrt(X))² + 2 omega D² / (sqrt(XY) + sqrt(K))] / 2,
    /// since Y + omega² X - 2 omega sqrt(XY) = (sqrt(Y) - omega sqrt(X))² and
    /// sqrt(XY) - sqrt(K) = D² / (sqrt(XY) + sqrt(K)) with K = XY - D²
    /// (H² - L² - C² = omega² K: R. Kosloff and Y. Rezek, Entropy 19, 136 (2017)).
    /// Divided by hbar omega it is the friction energy; divided by omega sqrt(K) it is
    /// Q* - 1 of a unitary stroke from an energy-diagonal start.
    pub fn excess_energy(&self, omega: f64) -> f64 {
        let sx = self.x.max(0.0).sqrt();
        let sy = self.y.max(0.0).sqrt();
        let sk = self.casimir().max(0.0).sqrt();
        let gap = sy - omega * sx;
        let denominator = sx * sy + sk;
        let squeeze = if denominator > 0.0 { 2.0 * omega * self.d * self.d / denominator } else { 0.0 };
        0.5 * (gap * gap + squeeze)
    }

    /// Symplectic eigenvalue nu = sqrt(K)/hbar (>= 1/2).
    pub fn symplectic_eigenvalue(&self) -> f64 {
        self.casimir().max(0.0).sqrt() / HBAR
    }

    /// Von Neumann entropy S/k_B = (nu+1/2) ln(nu+1/2) - (nu-1/2) ln(nu-1/2).
    pub fn entropy(&self) -> f64 {
        entropy_of_symplectic(self.symplectic_eigenvalue())
    }

    /// As a vector (X, Y, D).
    pub fn to_vector(&self) -> Vector3<f64> {
        Vector3::new(self.x, self.y, self.d)
    }

    /// From a vector (X, Y, D).
    pub fn from_vector(v: &Vector3<f64>) -> Self {
        Self { x: v[0], y: v[1], d: v[2] }
    }

    /// Applies a linear map on (X, Y, D).
    #[must_use]
    pub fn mapped(&self, map: &Matrix3<f64>) -> Self {
        Self::from_vector(&(map * self.to_vector()))
    }
}

/// S/k_B of a Gaussian state with symplectic eigenvalue nu (values below 1/2 by
/// rounding count as 1/2, the pure state).
pub fn entropy_of_symplectic(nu: f64) -> f64 {
    let nu = if nu < 0.5 { 0.5 } else { nu };
    let p = nu + 0.5;
    let m = nu - 0.5;
    let lower = if m > 0.0 { m * m.ln() } else { 0.0 };
    p * p.ln() - lower
}

/// The temperature whose Bose-Einstein occupation at omega is n, K: the inverse of
/// [`bose_einstein`], T = hbar omega / (k_B ln(1 + 1/n)); 0 for n = 0.
pub fn temperature_of_occupation(omega: f64, occupation: f64) -> Result<f64> {
    let omega = require_positive("trap frequency", omega)?;
    let n = require_non_negative("mean occupation", occupation)?;
    if n == 0.0 {
        return Ok(0.0);
    }
    Ok(HBAR * omega / (BOLTZMANN * (1.0 / n).ln_1p()))
}

/// Bose-Einstein mean occupation 1/(exp(hbar omega / k_B T) - 1); 0 at T = 0.
pub fn bose_einstein(omega: f64, temperature: f64) -> Result<f64> {
    let omega = require_positive("trap frequency", omega)?;
    let temperature = require_non_negative("temperature", temperature)?;
    if temperature == 0.0 {
        return Ok(0.0);
    }
    Ok(1.0 / (HBAR * omega / (BOLTZMANN * temperature)).exp_m1())
}

/// Linear map from (X, Y, D) to (H, L, C) at frequency omega.
pub fn to_energy_matrix(omega: f64) -> Matrix3<f64> {
    let w2 = omega * omega;
    Matrix3::new(0.5 * w2, 0.5, 0.0, -0.5 * w2, 0.5, 0.0, 0.0, 0.0, omega)
}

/// Linear map from (H, L, C) at frequency omega to (X, Y, D).
pub fn from_energy_matrix(omega: f64) -> Matrix3<f64> {
    let w2 = omega * omega;
    Matrix3::new(1.0 / w2, -1.0 / w2, 0.0, 1.0, 1.0, 0.0, 0.0, 0.0, 1.0 / omega)
}
