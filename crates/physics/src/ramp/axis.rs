use super::{Ramp, RampShape};
use crate::error::{PhysicsError, Result};

/// How one axis of a trap follows the control: omega_axis² = gain * omega² + offset,
/// with omega² the reference axis's (the ramp as drawn). A tweezer's axial axis moves
/// with its radial one at a fixed ratio (gain, offset 0); a linear Paul trap's radial
/// axes follow its axial (DC) frequency as omega_r² = omega_p² - omega_z²/2 (gain -1/2,
/// offset omega_p²).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AxisLaw {
    /// Gain on the reference omega² (finite, not 0).
    pub gain: f64,
    /// Offset, (rad/s)² (finite; negative pulls the axis towards inversion).
    pub offset_omega2: f64,
}

impl Default for AxisLaw {
    fn default() -> Self {
        Self::IDENTITY
    }
}

impl AxisLaw {
    /// The reference axis itself.
    pub const IDENTITY: Self = Self { gain: 1.0, offset_omega2: 0.0 };

    /// A validated law.
    pub fn new(gain: f64, offset_omega2: f64) -> Result<Self> {
        if !(gain.is_finite() && gain != 0.0 && gain.abs() <= 1e12) {
            return Err(PhysicsError::invalid("axis gain", gain, "a finite number, not 0, of size at most 1e12"));
        }
        crate::error::require_omega2("axis offset", offset_omega2)?;
        Ok(Self { gain, offset_omega2 })
    }

    /// The axis's omega², (rad/s)², for the reference's.
    #[inline(always)]
    pub fn apply(&self, omega2: f64) -> f64 {
        self.gain.mul_add(omega2, self.offset_omega2)
    }

    /// Whether this is the reference axis's own law.
    pub fn is_identity(&self) -> bool {
        *self == Self::IDENTITY
    }
}

/// A ramp as one axis of the trap sees it: omega_axis²(t) = gain * omega²(t) + offset,
/// exact (no resampling): propagation walks the base ramp's own pieces (holds stay
/// exact steps, smooth pieces the adaptive Magnus stepper) with the law applied.
#[derive(Debug, Clone, PartialEq)]
pub struct AxisRamp {
    base: Box<Ramp>,
    law: AxisLaw,
    omega_i: f64,
    omega_f: f64,
}

impl AxisRamp {
    /// The axis's view of `base`. Refused when the axis has no trap (omega_axis² <= 0)
    /// before or after the ramp, since its start state and Q* then have no meaning.
    pub fn new(base: Ramp, law: AxisLaw) -> Result<Self> {
        let base = match base {
            Ramp::Axis(a) => {
                let law = AxisLaw { gain: law.gain * a.law.gain, offset_omega2: law.apply(a.law.offset_omega2) };
                return Self::new(*a.base, law);
            }
            b => b,
        };
        let ends = |name: &str, w: f64| -> Result<f64> {
            let w2 = law.apply(w * w);
            if w2 > 0.0 && w2.is_finite() {
                Ok(w2.sqrt())
            } else {
                Err(PhysicsError::invalid(
                    name,
                    format!("omega² = {w2:e} (rad/s)²"),
                    "a trap (omega² > 0) on every axis before and after the ramp",
                ))
            }
        };
        let omega_i = ends("axis frequency before the ramp", base.omega_initial())?;
        let omega_f = ends("axis frequency after the ramp", base.omega_final())?;
        Ok(Self { base: Box::new(base), law, omega_i, omega_f })
    }

    /// The ramp as drawn for the reference axis.
    pub fn base(&self) -> &Ramp {
        &self.base
    }

    /// The axis's law.
    pub fn law(&self) -> AxisLaw {
        self.law
    }

    /// The smallest omega_axis² and when: exact from the base's extremes (the law is
    /// monotone in omega²).
    pub fn min_omega2(&self) -> (f64, f64) {
        let (w2, t) = if self.law.gain > 0.0 { self.base.min_omega2() } else { self.base.max_omega2() };
        (self.law.apply(w2), t)
    }

    /// The largest omega_axis² and when.
    pub fn max_omega2(&self) -> (f64, f64) {
        let (w2, t) = if self.law.gain > 0.0 { self.base.max_omega2() } else { self.base.min_omega2() };
        (self.law.apply(w2), t)
    }
}

impl RampShape for AxisRamp {
    fn duration(&self) -> f64 {
        self.base.duration()
    }
    fn omega_initial(&self) -> f64 {
        self.omega_i
    }
    fn omega_final(&self) -> f64 {
        self.omega_f
    }
    fn omega2(&self, t: f64) -> f64 {
        self.law.apply(self.base.omega2(t))
    }
    fn omega2_rate(&self, t: f64) -> f64 {
        self.law.gain * self.base.omega2_rate(t)
    }
    fn breakpoints(&self) -> Vec<f64> {
        self.base.breakpoints()
    }
}
