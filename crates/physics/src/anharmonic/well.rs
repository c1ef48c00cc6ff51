//! The shape of a 1-D well and its profile in the check's reduced units.

use crate::error::{Result, require_positive};

/// The profile of a trap axis. Every shape has curvature m omega² at its bottom, so
/// near x = 0 they all look like the harmonic well; energies are measured from the
/// bottom (V(0) = 0).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub enum WellShape {
    /// V = m omega² x² / 2: bound at every energy; omega² may be <= 0 mid-ramp.
    Harmonic,
    /// A tweezer's radial profile V = U (1 - exp(-2 x²/w0²)), U = m omega² w0²/4.
    Gaussian {
        /// Beam waist w0 (1/e² intensity radius), m; > 0.
        waist_m: f64,
    },
    /// An axial profile V = U (1 - 1/(1 + x²/zR²)), U = m omega² zR²/2.
    Lorentzian {
        /// Rayleigh range zR, m; > 0.
        rayleigh_range_m: f64,
    },
}

impl WellShape {
    /// The shape's length scale (waist or Rayleigh range), m, if it has one.
    pub fn length_m(&self) -> Option<f64> {
        match *self {
            Self::Harmonic => None,
            Self::Gaussian { waist_m } => Some(waist_m),
            Self::Lorentzian { rayleigh_range_m } => Some(rayleigh_range_m),
        }
    }

    /// Checks the length scale: finite and > 0.
    pub(crate) fn validated(self) -> Result<Self> {
        match self {
            Self::Harmonic => {}
            Self::Gaussian { waist_m } => {
                require_positive("waist", waist_m)?;
            }
            Self::Lorentzian { rayleigh_range_m } => {
                require_positive("Rayleigh range", rayleigh_range_m)?;
            }
        }
        Ok(self)
    }

    /// Depth U over m omega² (the factor w0²/4 or zR²/2), m²; `None` for harmonic.
    pub fn depth_per_curvature_m2(&self) -> Option<f64> {
        match *self {
            Self::Harmonic => None,
            Self::Gaussian { waist_m } => Some(0.25 * waist_m * waist_m),
            Self::Lorentzian { rayleigh_range_m } => Some(0.5 * rayleigh_range_m * rayleigh_range_m),
        }
    }

    /// A short name for messages.
    pub fn name(&self) -> &'static str {
        match self {
            Self::Harmonic => "harmonic",
            Self::Gaussian { .. } => "Gaussian",
            Self::Lorentzian { .. } => "Lorentzian",
        }
    }
}

/// The well in reduced units: lengths in x0 = sqrt(hbar/(m omega_ref)), energies in
/// hbar omega_ref, so that V(x, t) = w²(t) g(x) with w = omega_axis/omega_ref and
/// H = -(1/2) d²/dx² + V.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) enum Profile {
    Harmonic,
    /// Waist in x0.
    Gaussian(f64),
    /// Rayleigh range in x0.
    Lorentzian(f64),
}

impl Profile {
    pub(crate) fn new(shape: WellShape, x0: f64) -> Self {
        match shape {
            WellShape::Harmonic => Self::Harmonic,
            WellShape::Gaussian { waist_m } => Self::Gaussian(waist_m / x0),
            WellShape::Lorentzian { rayleigh_range_m } => Self::Lorentzian(rayleigh_range_m / x0),
        }
    }

    /// g(x): the potential per unit w² (curvature 1 at the bottom, g(0) = 0).
    #[inline]
    pub(crate) fn g(self, x: f64) -> f64 {
        let x2 = x * x;
        match self {
            Self::Harmonic => 0.5 * x2,
            // -expm1 keeps the relative accuracy near the bottom.
            Self::Gaussian(w) => -0.25 * w * w * (-2.0 * x2 / (w * w)).exp_m1(),
            Self::Lorentzian(z) => 0.5 * z * z * x2 / (z * z + x2),
        }
    }

    /// Depth per unit w² (U / w²), or `None` for a harmonic well.
    pub(crate) fn depth_factor(self) -> Option<f64> {
        match self {
            Self::Harmonic => None,
            Self::Gaussian(w) => Some(0.25 * w * w),
            Self::Lorentzian(z) => Some(0.5 * z * z),
        }
    }

    /// The length scale (waist or Rayleigh range) in x0.
    pub(crate) fn length(self) -> Option<f64> {
        match self {
            Self::Harmonic => None,
            Self::Gaussian(w) | Self::Lorentzian(w) => Some(w),
        }
    }

    /// The outer turning point where w² g(a) = e (a >= 0); `None` if e is at or above
    /// the edge of an optical well.
    pub(crate) fn turning_point(self, w2: f64, e: f64) -> Option<f64> {
        if e <= 0.0 {
            return Some(0.0);
        }
        let r = e / w2;
        match self {
            Self::Harmonic => Some((2.0 * r).sqrt()),
            Self::Gaussian(w) => {
                let f = r / (0.25 * w * w);
                // 1 - exp(-2a²/w²) = f  =>  a² = -(w²/2) ln(1 - f).
                (f < 1.0).then(|| (-0.5 * w * w * (-f).ln_1p()).sqrt())
            }
            Self::Lorentzian(z) => {
                let f = r / (0.5 * z * z);
                // x²/(z² + x²) = f  =>  a² = z² f/(1 - f).
                (f < 1.0).then(|| z * (f / (1.0 - f)).sqrt())
            }
        }
    }

    /// Semiclassical count of the levels below energy `e` (WKB, with the Maslov 1/2 of
    /// two smooth turning points): the number of n >= 0 with S(E_n) = pi (n + 1/2), where
    /// S(e) = integral of sqrt(2 (e - V)) dx between the turning points. Zero if e <= 0.
    pub(crate) fn wkb_count(self, w2: f64, e: f64) -> usize {
        let Some(a) = self.turning_point(w2, e) else { return 0 };
        if a <= 0.0 {
            return 0;
        }
        // x = a sin(theta) removes the square-root ends; Gauss-Legendre would do as well,
        // a 400-point midpoint rule on a smooth periodic-like integrand is ample here.
        let n = 400;
        let h = std::f64::consts::PI / f64::from(n);
        let mut s = 0.0;
        for k in 0..n {
            let theta = -std::f64::consts::FRAC_PI_2 + (f64::from(k) + 0.5) * h;
            let x = a * theta.sin();
            let kin = (e - w2 * self.g(x)).max(0.0);
            s += (2.0 * kin).sqrt() * a * theta.cos();
        }
        s *= h;
        (s / std::f64::consts::PI + 0.5).floor() as usize
    }
}
