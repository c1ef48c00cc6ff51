use super::RampShape;
use crate::error::{PhysicsError, Result};

/// How the spline passes between knots.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SplineShape {
    /// Shape-preserving piecewise-cubic Hermite (PCHIP): monotone between knots,
    /// no overshoot; slopes by the weighted harmonic mean of F. N. Fritsch and
    /// J. Butland, SIAM J. Sci. Stat. Comput. 5, 300 (1984), within the monotonicity
    /// region of F. N. Fritsch and R. E. Carlson, SIAM J. Numer. Anal. 17, 238 (1980).
    /// C1 in time.
    Monotone,
    /// Cubic spline with continuous second derivative (C2); may overshoot.
    Smooth,
}

/// The variable the spline interpolates.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SplineSpace {
    /// omega itself (rad/s). A smooth spline that dips below zero is read as an
    /// inverted trap with omega² = -value².
    Omega,
    /// ln omega: ratios rather than differences are interpolated (always > 0).
    LogOmega,
}

/// A smooth ramp through user knots (t_k, omega_k), t_0 = 0 < t_1 < ... < t_n = tau.
#[derive(Debug, Clone, PartialEq)]
pub struct SplineRamp {
    times: Vec<f64>,
    omegas: Vec<f64>,
    shape: SplineShape,
    space: SplineSpace,
    flat_ends: bool,
    values: Vec<f64>,
    slopes: Vec<f64>,
}

impl SplineRamp {
    /// Knot times in s (first 0, strictly increasing), knot frequencies in rad/s
    /// (> 0). `flat_ends` forces d omega/dt = 0 at both ends.
    pub fn new(
        times: Vec<f64>,
        omegas: Vec<f64>,
        shape: SplineShape,
        space: SplineSpace,
        flat_ends: bool,
    ) -> Result<Self> {
        if times.len() != omegas.len() {
            return Err(PhysicsError::invalid(
                "number of knot frequencies",
                omegas.len(),
                format!("equal to the number of knot times ({})", times.len()),
            ));
        }
        if times.len() < 2 || times.len() > 10_000 {
            return Err(PhysicsError::invalid("number of knots", times.len(), "2 to 10000"));
        }
        if times[0] != 0.0 {
            return Err(PhysicsError::invalid("time of knot 1", times[0], "0 (ramps start at t = 0)"));
        }
        for k in 1..times.len() {
            if !times[k].is_finite() || times[k] <= times[k - 1] || times[k] > crate::error::WORKING_RANGE.1 {
                return Err(PhysicsError::invalid(
                    format!("time of knot {}", k + 1),
                    times[k],
                    format!("a finite number > {} (the previous knot)", times[k - 1]),
                ));
            }
        }
        for (k, &w) in omegas.iter().enumerate() {
            super::check_frequency(&format!("frequency of knot {}", k + 1), w)?;
        }
        let values: Vec<f64> = match space {
            SplineSpace::Omega => omegas.clone(),
            SplineSpace::LogOmega => omegas.iter().map(|w| w.ln()).collect(),
        };
        let slopes = match shape {
            SplineShape::Monotone => pchip_slopes(&times, &values, flat_ends),
            SplineShape::Smooth => c2_slopes(&times, &values, flat_ends),
        };
        Ok(Self { times, omegas, shape, space, flat_ends, values, slopes })
    }

    /// Knot times, s.
    pub fn times(&self) -> &[f64] {
        &self.times
    }
    /// Knot frequencies, rad/s.
    pub fn omegas(&self) -> &[f64] {
        &self.omegas
    }
    /// Interpolation shape.
    pub fn shape(&self) -> SplineShape {
        self.shape
    }
    /// Interpolated variable.
    pub fn space(&self) -> SplineSpace {
        self.space
    }
    /// Whether the end slopes are forced to zero.
    pub fn flat_ends(&self) -> bool {
        self.flat_ends
    }

    /// Interpolated value and its time derivative at t (in the spline's space).
    fn eval(&self, t: f64) -> (f64, f64) {
        let n = self.times.len();
        let t = t.clamp(0.0, self.times[n - 1]);
        let k = self.times.partition_point(|&x| x <= t).clamp(1, n - 1) - 1;
        let h = self.times[k + 1] - self.times[k];
        let s = (t - self.times[k]) / h;
        let (f0, f1) = (self.values[k], self.values[k + 1]);
        let (m0, m1) = (self.slopes[k] * h, self.slopes[k + 1] * h);
        let s2 = s * s;
        let s3 = s2 * s;
        let v =
            (2.0 * s3 - 3.0 * s2 + 1.0) * f0 + (s3 - 2.0 * s2 + s) * m0 + (-2.0 * s3 + 3.0 * s2) * f1 + (s3 - s2) * m1;
        let dv = ((6.0 * s2 - 6.0 * s) * f0
            + (3.0 * s2 - 4.0 * s + 1.0) * m0
            + (-6.0 * s2 + 6.0 * s) * f1
            + (3.0 * s2 - 2.0 * s) * m1)
            / h;
        (v, dv)
    }
}

impl RampShape for SplineRamp {
    fn duration(&self) -> f64 {
        self.times[self.times.len() - 1]
    }
    fn omega_initial(&self) -> f64 {
        self.omegas[0]
    }
    fn omega_final(&self) -> f64 {
        self.omegas[self.omegas.len() - 1]
    }
    fn omega2(&self, t: f64) -> f64 {
        let (v, _) = self.eval(t);
        match self.space {
            SplineSpace::Omega => v * v.abs(),
            SplineSpace::LogOmega => (2.0 * v).exp(),
        }
    }
    fn omega2_rate(&self, t: f64) -> f64 {
        if !(0.0..self.duration()).contains(&t) {
            return 0.0;
        }
        let (v, dv) = self.eval(t);
        match self.space {
            SplineSpace::Omega => 2.0 * v.abs() * dv,
            SplineSpace::LogOmega => 2.0 * dv * (2.0 * v).exp(),
        }
    }
    fn breakpoints(&self) -> Vec<f64> {
        self.times[1..self.times.len() - 1].to_vec()
    }
}

/// PCHIP slopes (Fritsch-Butland harmonic mean; one-sided three-point ends with the
/// usual shape-preserving limits).
fn pchip_slopes(t: &[f64], f: &[f64], flat_ends: bool) -> Vec<f64> {
    let n = t.len();
    let h: Vec<f64> = t.windows(2).map(|w| w[1] - w[0]).collect();
    let d: Vec<f64> = (0..n - 1).map(|k| (f[k + 1] - f[k]) / h[k]).collect();
    let mut m = vec![0.0; n];
    if n == 2 {
        m[0] = d[0];
        m[1] = d[0];
    } else {
        for k in 1..n - 1 {
            if d[k - 1] * d[k] > 0.0 {
                let w1 = 2.0 * h[k] + h[k - 1];
                let w2 = h[k] + 2.0 * h[k - 1];
                m[k] = (w1 + w2) / (w1 / d[k - 1] + w2 / d[k]);
            }
        }
        m[0] = pchip_end(h[0], h[1], d[0], d[1]);
        m[n - 1] = pchip_end(h[n - 2], h[n - 3], d[n - 2], d[n - 3]);
    }
    if flat_ends {
        m[0] = 0.0;
        m[n - 1] = 0.0;
    }
    m
}

fn pchip_end(h0: f64, h1: f64, d0: f64, d1: f64) -> f64 {
    let m = ((2.0 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
    if m.signum() != d0.signum() || d0 == 0.0 {
        0.0
    } else if d0.signum() != d1.signum() && m.abs() > 3.0 * d0.abs() {
        3.0 * d0
    } else {
        m
    }
}

/// Slopes of the C2 cubic spline: natural ends (zero second derivative) or, with
/// `flat_ends`, clamped to zero slope. Thomas algorithm on the tridiagonal system.
fn c2_slopes(t: &[f64], f: &[f64], flat_ends: bool) -> Vec<f64> {
    let n = t.len();
    let h: Vec<f64> = t.windows(2).map(|w| w[1] - w[0]).collect();
    let d: Vec<f64> = (0..n - 1).map(|k| (f[k + 1] - f[k]) / h[k]).collect();
    let mut lower = vec![0.0; n];
    let mut diag = vec![0.0; n];
    let mut upper = vec![0.0; n];
    let mut rhs = vec![0.0; n];
    if flat_ends {
        diag[0] = 1.0;
        diag[n - 1] = 1.0;
    } else {
        diag[0] = 2.0;
        upper[0] = 1.0;
        rhs[0] = 3.0 * d[0];
        diag[n - 1] = 2.0;
        lower[n - 1] = 1.0;
        rhs[n - 1] = 3.0 * d[n - 2];
    }
    for k in 1..n - 1 {
        lower[k] = 1.0 / h[k - 1];
        diag[k] = 2.0 * (1.0 / h[k - 1] + 1.0 / h[k]);
        upper[k] = 1.0 / h[k];
        rhs[k] = 3.0 * (d[k - 1] / h[k - 1] + d[k] / h[k]);
    }
    for k in 1..n {
        let w = lower[k] / diag[k - 1];
        diag[k] -= w * upper[k - 1];
        rhs[k] -= w * rhs[k - 1];
    }
    let mut m = vec![0.0; n];
    m[n - 1] = rhs[n - 1] / diag[n - 1];
    for k in (0..n - 1).rev() {
        m[k] = (rhs[k] - upper[k] * m[k + 1]) / diag[k];
    }
    m
}
