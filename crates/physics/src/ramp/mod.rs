//! Ramp families: each gives omega²(t) (which may be <= 0), omega(t) where it is
//! defined, and the rate d(omega²)/dt, on t in [0, duration].

mod axis;
mod constant_mu;
mod linear;
mod piecewise;
mod polynomial;
mod sampled;
mod shortcut;
mod spline;

pub use axis::{AxisLaw, AxisRamp};
pub use constant_mu::ConstantMuRamp;
pub use linear::LinearRamp;
pub use piecewise::{PiecewiseConstantRamp, Segment};
pub use polynomial::PolynomialRamp;
pub use sampled::{SampledColumn, SampledRamp, SampledReading};
pub use shortcut::ShortcutRamp;
pub use spline::{SplineRamp, SplineShape, SplineSpace};

/// What every ramp family offers. Times in s, frequencies in rad/s.
pub trait RampShape {
    /// Duration tau, s; > 0.
    fn duration(&self) -> f64;
    /// Trap frequency before the ramp, rad/s; > 0.
    fn omega_initial(&self) -> f64;
    /// Trap frequency after the ramp, rad/s; > 0.
    fn omega_final(&self) -> f64;
    /// omega²(t), (rad/s)²; may be zero or negative (flat or inverted trap).
    fn omega2(&self, t: f64) -> f64;
    /// d(omega²)/dt at t, (rad/s)²/s (one-sided from the right at a breakpoint).
    fn omega2_rate(&self, t: f64) -> f64;
    /// Interior times (sorted, strictly inside (0, duration)) where omega² or one of
    /// its low derivatives jumps; propagation steps land on them exactly.
    fn breakpoints(&self) -> Vec<f64>;
}

/// A trap-frequency ramp of any family.
#[derive(Debug, Clone, PartialEq)]
pub enum Ramp {
    /// omega linear in time.
    Linear(LinearRamp),
    /// Constant adiabatic parameter mu = omegȧ/omega².
    ConstantMu(ConstantMuRamp),
    /// omega² a polynomial in t/tau with free coefficients.
    Polynomial(PolynomialRamp),
    /// Invariant-based shortcut (Chen et al. 2010): ends energy-diagonal.
    Shortcut(ShortcutRamp),
    /// Piecewise-constant holds (bang-bang and the like).
    PiecewiseConstant(PiecewiseConstantRamp),
    /// Smooth spline through user knots.
    Spline(SplineRamp),
    /// Sampled table (an imported waveform).
    Sampled(SampledRamp),
    /// Another ramp as one axis of the trap sees it (omega_axis² = gain omega² + offset).
    Axis(AxisRamp),
}

macro_rules! each_family {
    ($self:ident, $r:ident => $e:expr) => {
        match $self {
            Ramp::Linear($r) => $e,
            Ramp::ConstantMu($r) => $e,
            Ramp::Polynomial($r) => $e,
            Ramp::Shortcut($r) => $e,
            Ramp::PiecewiseConstant($r) => $e,
            Ramp::Spline($r) => $e,
            Ramp::Sampled($r) => $e,
            Ramp::Axis($r) => $e,
        }
    };
}

impl RampShape for Ramp {
    fn duration(&self) -> f64 {
        each_family!(self, r => r.duration())
    }
    fn omega_initial(&self) -> f64 {
        each_family!(self, r => r.omega_initial())
    }
    fn omega_final(&self) -> f64 {
        each_family!(self, r => r.omega_final())
    }
    fn omega2(&self, t: f64) -> f64 {
        each_family!(self, r => r.omega2(t))
    }
    fn omega2_rate(&self, t: f64) -> f64 {
        each_family!(self, r => r.omega2_rate(t))
    }
    fn breakpoints(&self) -> Vec<f64> {
        each_family!(self, r => r.breakpoints())
    }
}

impl Ramp {
    /// omega(t), rad/s, where omega² > 0; `None` where the trap is flat or inverted.
    pub fn omega(&self, t: f64) -> Option<f64> {
        let w2 = self.omega2(t);
        (w2 > 0.0).then(|| w2.sqrt())
    }

    /// d omega/dt at t, rad/s², where omega² > 0.
    pub fn omega_rate(&self, t: f64) -> Option<f64> {
        self.omega(t).map(|w| self.omega2_rate(t) / (2.0 * w))
    }

    /// Adiabatic parameter mu = omegȧ/omega² (dimensionless) where omega² > 0.
    pub fn mu(&self, t: f64) -> Option<f64> {
        self.omega(t).map(|w| self.omega2_rate(t) / (2.0 * w * w * w))
    }

    /// The same shape stretched (or squeezed) in time to last `tau` seconds: the end
    /// frequencies stay, times scale by tau / duration (holds, knots, table rows), and a
    /// family defined by its duration (linear, constant mu, shortcut, polynomial in
    /// t/tau) is rebuilt for the new one.
    pub fn with_duration(&self, tau: f64) -> crate::Result<Self> {
        let tau = check_duration("duration", tau)?;
        let f = tau / self.duration();
        Ok(match self {
            Self::Linear(r) => Self::Linear(LinearRamp::new(r.omega_initial(), r.omega_final(), tau)?),
            Self::ConstantMu(r) => {
                Self::ConstantMu(ConstantMuRamp::with_duration(r.omega_initial(), r.omega_final(), tau)?)
            }
            Self::Shortcut(r) => Self::Shortcut(ShortcutRamp::new(r.omega_initial(), r.omega_final(), tau)?),
            Self::Polynomial(r) => Self::Polynomial(PolynomialRamp::new(r.coefficients().to_vec(), tau)?),
            Self::PiecewiseConstant(r) => Self::PiecewiseConstant(PiecewiseConstantRamp::new(
                r.omega_initial(),
                r.omega_final(),
                r.segments().iter().map(|s| Segment { omega2: s.omega2, duration: s.duration * f }).collect(),
            )?),
            Self::Spline(r) => Self::Spline(SplineRamp::new(
                r.times().iter().map(|t| t * f).collect(),
                r.omegas().to_vec(),
                r.shape(),
                r.space(),
                r.flat_ends(),
            )?),
            Self::Sampled(r) => {
                let times = r.times().iter().map(|t| t * f).collect();
                Self::Sampled(match r.end_frequencies() {
                    Some((wi, wf)) => {
                        SampledRamp::with_stated_ends(times, r.values().to_vec(), r.column(), r.reading(), wi, wf)?
                    }
                    None => SampledRamp::new(times, r.values().to_vec(), r.column(), r.reading())?,
                })
            }
            Self::Axis(r) => Self::Axis(AxisRamp::new(r.base().with_duration(tau)?, r.law())?),
        })
    }

    /// This ramp as the axis with `law` sees it (the reference axis's law gives the
    /// ramp back unchanged).
    pub fn on_axis(&self, law: AxisLaw) -> crate::Result<Self> {
        if law.is_identity() {
            return Ok(self.clone());
        }
        Ok(Self::Axis(AxisRamp::new(self.clone(), law)?))
    }

    /// A short name of the family, for reports.
    pub fn family_name(&self) -> &'static str {
        match self {
            Ramp::Linear(_) => "linear",
            Ramp::ConstantMu(_) => "constant-mu",
            Ramp::Polynomial(_) => "polynomial",
            Ramp::Shortcut(_) => "shortcut",
            Ramp::PiecewiseConstant(_) => "holds",
            Ramp::Spline(_) => "spline",
            Ramp::Sampled(_) => "waveform",
            Ramp::Axis(a) => a.base().family_name(),
        }
    }

    /// Whether omega² is constant between consecutive breakpoints (so the
    /// propagation is exact with constant steps).
    pub fn is_piecewise_constant(&self) -> bool {
        match self {
            Ramp::PiecewiseConstant(_) => true,
            Ramp::Sampled(s) => s.reading() == SampledReading::Hold,
            Ramp::Axis(a) => a.base().is_piecewise_constant(),
            _ => false,
        }
    }

    /// The smallest omega² over the ramp, (rad/s)², and where it occurs, s.
    /// Exact for piecewise-constant and sampled ramps (the extremes are at rows or
    /// holds); for smooth families a dense scan refined by golden-section search.
    pub fn min_omega2(&self) -> (f64, f64) {
        match self {
            Ramp::PiecewiseConstant(p) => p.min_omega2(),
            Ramp::Sampled(s) => s.min_omega2(),
            Ramp::Axis(a) => a.min_omega2(),
            _ => smooth_extreme(self, |w2| w2),
        }
    }

    /// The largest omega² over the ramp, (rad/s)², and where it occurs, s.
    pub fn max_omega2(&self) -> (f64, f64) {
        match self {
            Ramp::PiecewiseConstant(p) => p.max_omega2(),
            Ramp::Sampled(s) => s.max_omega2(),
            Ramp::Axis(a) => a.max_omega2(),
            _ => smooth_extreme(self, |w2| -w2),
        }
    }

    /// Uniform grid of `n` >= 2 times over [0, duration], with every breakpoint added
    /// (so a plot shows each jump). Sorted, without duplicates.
    pub fn grid_with_breakpoints(&self, n: usize) -> Vec<f64> {
        let tau = self.duration();
        let n = n.max(2);
        let mut times: Vec<f64> = (0..n).map(|k| tau * k as f64 / (n - 1) as f64).collect();
        let bps = self.breakpoints();
        if bps.len() <= 4 * n {
            times.extend(bps);
            times.sort_by(f64::total_cmp);
            times.dedup_by(|a, b| (*a - *b).abs() <= 1e-15 * tau);
        }
        times
    }
}

/// Minimum of `key(omega²(t))` over a smooth ramp: scan each smooth piece at 96 points
/// then refine the best bracket by golden-section search.
fn smooth_extreme(ramp: &Ramp, key: impl Fn(f64) -> f64) -> (f64, f64) {
    let tau = ramp.duration();
    let mut edges = vec![0.0];
    edges.extend(ramp.breakpoints());
    edges.push(tau);
    let mut best = (key(ramp.omega2(0.0)), 0.0);
    let mut best_bracket = (0.0, 0.0);
    for w in edges.windows(2) {
        let (a, b) = (w[0], w[1]);
        let n = 96;
        let h = (b - a) / f64::from(n);
        for k in 0..=n {
            let t = if k == n { b - 1e-12 * (b - a) } else { a + h * f64::from(k) };
            let v = key(ramp.omega2(t));
            if v < best.0 {
                best = (v, t);
                best_bracket = ((t - h).max(a), (t + h).min(b));
            }
        }
    }
    let (mut lo, mut hi) = best_bracket;
    if hi > lo {
        let phi = 0.618_033_988_749_894_8;
        for _ in 0..60 {
            let m1 = hi - phi * (hi - lo);
            let m2 = lo + phi * (hi - lo);
            if key(ramp.omega2(m1)) < key(ramp.omega2(m2)) {
                hi = m2;
            } else {
                lo = m1;
            }
        }
        let t = 0.5 * (lo + hi);
        let v = key(ramp.omega2(t));
        if v < best.0 {
            best = (v, t);
        }
    }
    (ramp.omega2(best.1), best.1)
}

pub(crate) fn check_frequency(name: &str, omega: f64) -> crate::Result<f64> {
    crate::error::require_in_range(name, omega, "rad/s")
}

pub(crate) fn check_duration(name: &str, tau: f64) -> crate::Result<f64> {
    crate::error::require_in_range(name, tau, "s")
}
