//! Propagation of second moments through ramps: exact constant steps, adaptive
//! fourth-order Magnus, the closed-form constant-mu propagator, and noisy strokes.

mod constant_mu;
mod entire;
mod magnus;
mod mat2;
mod noisy;
mod step;

pub use constant_mu::{constant_mu_energy_map, constant_mu_moment_map};
pub use entire::{ch_sh, f_entire, g_entire};
pub use magnus::Stepper;
pub use mat2::Mat2;
pub use noisy::noisy_map_between;
pub use step::{GAUSS_NODES, constant_step, hold_uniform, hold_varying, magnus2_step, magnus4_step};

use crate::error::{PhysicsError, Result};
use crate::noise::Noise;
use crate::ramp::{AxisLaw, Ramp, RampShape, SampledReading};
use crate::state::Moments;
use nalgebra::Matrix3;

/// Accuracy settings of a propagation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PropagationOptions {
    /// Requested relative accuracy of Q* (and of the moment map), > 0; default 1e-10.
    /// Exact propagations (holds, piecewise-constant, constant-mu) ignore it.
    pub accuracy: f64,
    /// Step budget of the adaptive integrator before it gives up with an error.
    pub max_steps: usize,
}

/// The default step budget of one propagation.
pub const DEFAULT_MAX_STEPS: usize = 50_000_000;

impl Default for PropagationOptions {
    fn default() -> Self {
        Self { accuracy: 1e-10, max_steps: DEFAULT_MAX_STEPS }
    }
}

impl PropagationOptions {
    /// Options with a given accuracy, validated to (1e-15, 1e-2].
    pub fn with_accuracy(accuracy: f64) -> Result<Self> {
        if !(accuracy.is_finite() && (1e-15..=1e-2).contains(&accuracy)) {
            return Err(PhysicsError::invalid("accuracy", accuracy, "between 1e-15 and 1e-2"));
        }
        Ok(Self { accuracy, ..Self::default() })
    }
}

/// The linear map of one stroke on the moments (X, Y, D).
#[derive(Debug, Clone, PartialEq)]
pub struct StrokeMap {
    /// 3x3 map on (X, Y, D).
    pub moments: Matrix3<f64>,
    /// The 2x2 fundamental matrix, when the stroke is unitary and was propagated as one.
    pub fundamental: Option<Mat2>,
    /// Steps taken (exact steps, accepted adaptive steps, or 1 for a closed form).
    pub steps: usize,
}

/// Frequency scale used to make the entries of M comparable, rad/s.
/// Only a scale is needed, so smooth ramps get a coarse 65-point scan rather than the
/// refined extremes of [`Ramp::min_omega2`].
fn frequency_scale(ramp: &Ramp) -> f64 {
    let ends = ramp.omega_initial().max(ramp.omega_final());
    let peak = match ramp {
        Ramp::PiecewiseConstant(_) | Ramp::Sampled(_) | Ramp::Axis(_) => {
            ramp.max_omega2().0.abs().max(ramp.min_omega2().0.abs())
        }
        _ => {
            let tau = ramp.duration();
            (0..=64).map(|k| ramp.omega2(tau * f64::from(k) / 64.0).abs()).fold(0.0, f64::max)
        }
    };
    peak.sqrt().max(ends)
}

/// Fundamental matrix M over [a, b] (0 <= a <= b <= duration): exact for holds and
/// piecewise-constant ramps, adaptive Magnus-4 with step doubling otherwise.
pub fn fundamental_between(ramp: &Ramp, a: f64, b: f64, opts: &PropagationOptions) -> Result<(Mat2, usize)> {
    let mut walker = Walker::new(ramp, opts);
    let m = walker.advance(Mat2::IDENTITY, a, b)?;
    Ok((m, walker.steps()))
}

/// Cumulative fundamental matrices M(t_j) from 0 to each of the sorted `times`
/// (inside [0, duration]), in one sweep.
pub fn fundamental_at(ramp: &Ramp, times: &[f64], opts: &PropagationOptions) -> Result<(Vec<Mat2>, usize)> {
    let mut walker = Walker::new(ramp, opts);
    let mut out = Vec::with_capacity(times.len());
    let mut m = Mat2::IDENTITY;
    let mut t = 0.0;
    for &tj in times {
        if tj < t {
            return Err(PhysicsError::invalid("output times", tj, "sorted in increasing order"));
        }
        m = walker.advance(m, t, tj)?;
        t = tj;
        out.push(m);
    }
    Ok((out, walker.steps()))
}

/// Walks a ramp piece by piece, keeping the adaptive step size between calls. An axis
/// ramp is walked over its base's pieces with the axis law applied to every omega².
struct Walker<'a> {
    whole: &'a Ramp,
    ramp: &'a Ramp,
    law: AxisLaw,
    stepper: Option<Stepper>,
    exact_steps: usize,
    opts: PropagationOptions,
}

impl<'a> Walker<'a> {
    fn new(whole: &'a Ramp, opts: &PropagationOptions) -> Self {
        let (ramp, law) = match whole {
            Ramp::Axis(a) => (a.base(), a.law()),
            r => (r, AxisLaw::IDENTITY),
        };
        Self { whole, ramp, law, stepper: None, exact_steps: 0, opts: *opts }
    }

    fn steps(&self) -> usize {
        self.exact_steps + self.stepper.as_ref().map_or(0, Stepper::steps)
    }

    fn stepper(&mut self) -> &mut Stepper {
        let ramp = self.whole;
        let opts = self.opts;
        self.stepper.get_or_insert_with(|| Stepper::new(ramp.duration(), frequency_scale(ramp), &opts))
    }

    fn advance(&mut self, mut m: Mat2, a: f64, b: f64) -> Result<Mat2> {
        check_interval(self.ramp, a, b)?;
        let b = b.min(self.ramp.duration());
        if b <= a {
            return Ok(m);
        }
        let law = self.law;
        match self.ramp {
            Ramp::PiecewiseConstant(p) => {
                let mut t = a;
                let mut k = p.segment_index(a);
                let mut start: f64 = p.segments()[..k].iter().map(|s| s.duration).sum();
                while t < b && k < p.segments().len() {
                    let seg = p.segments()[k];
                    let end = if k + 1 == p.segments().len() { b } else { (start + seg.duration).min(b) };
                    if end > t {
                        m = constant_step(law.apply(seg.omega2), end - t).mul(&m);
                        self.exact_steps += 1;
                    }
                    t = end;
                    start += seg.duration;
                    k += 1;
                }
                Ok(m)
            }
            Ramp::Sampled(s) if s.reading() == SampledReading::Hold => {
                let times = s.times();
                let w2 = s.omega2_rows();
                let n = times.len();
                #[expect(clippy::float_cmp, reason = "the whole table is asked for by its exact ends")]
                let whole = a == 0.0 && b == s.duration();
                if whole && let Some(dt) = s.uniform_step() {
                    self.exact_steps += n - 1;
                    if law.is_identity() {
                        return Ok(hold_uniform(&w2[..n - 1], dt).mul(&m));
                    }
                    let mapped: Vec<f64> = w2[..n - 1].iter().map(|&w2| law.apply(w2)).collect();
                    return Ok(hold_uniform(&mapped, dt).mul(&m));
                }
                let mut k = s.row_index(a);
                let mut t = a;
                while t < b && k < n - 1 {
                    let end = if k + 2 == n { b } else { times[k + 1].min(b) };
                    if end > t {
                        m = constant_step(law.apply(w2[k]), end - t).mul(&m);
                        self.exact_steps += 1;
                    }
                    t = end;
                    k += 1;
                }
                Ok(m)
            }
            Ramp::Sampled(s) => {
                let times = s.times();
                let n = times.len();
                let mut k = s.row_index(a);
                let mut t = a;
                let square = s.column() == crate::ramp::SampledColumn::Omega;
                while t < b && k < n - 1 {
                    let end = if k + 2 == n { b } else { times[k + 1].min(b) };
                    if end > t {
                        let (t0, t1) = (times[k], times[k + 1]);
                        let (v0, v1) = (s.values()[k], s.values()[k + 1]);
                        let slope = (v1 - v0) / (t1 - t0);
                        let f = move |x: f64| {
                            let v = v0 + (x - t0) * slope;
                            law.apply(if square { v * v } else { v })
                        };
                        m = self.stepper().advance(&f, t, end, m)?;
                    }
                    t = end;
                    k += 1;
                }
                Ok(m)
            }
            ramp => {
                let mut t = a;
                let cuts: Vec<f64> = ramp.breakpoints().into_iter().filter(|&bp| bp > a && bp < b).collect();
                let f = |x: f64| law.apply(ramp.omega2(x));
                for bp in cuts.into_iter().chain(std::iter::once(b)) {
                    m = self.stepper().advance(&f, t, bp, m)?;
                    t = bp;
                }
                Ok(m)
            }
        }
    }
}

fn check_interval(ramp: &Ramp, a: f64, b: f64) -> Result<()> {
    let tau = ramp.duration();
    if !(a.is_finite() && b.is_finite() && a >= 0.0 && b >= a && b <= tau * (1.0 + 1e-12)) {
        return Err(PhysicsError::invalid(
            "propagation interval",
            format!("[{a:e}, {b:e}] s"),
            format!("inside [0, {tau:e}] s with start <= end"),
        ));
    }
    Ok(())
}

/// The map on (X, Y, D) over [a, b] of a ramp, with noise if any. Uses the
/// closed-form propagator for constant-mu ramps without noise.
pub fn map_between(ramp: &Ramp, noise: &Noise, a: f64, b: f64, opts: &PropagationOptions) -> Result<StrokeMap> {
    if !noise.is_silent() {
        let (moments, steps) = noisy_map_between(ramp, noise, a, b, opts)?;
        return Ok(StrokeMap { moments, fundamental: None, steps });
    }
    if let Ramp::ConstantMu(c) = ramp {
        check_interval(ramp, a, b)?;
        return Ok(StrokeMap { moments: constant_mu_moment_map(c, a, b), fundamental: None, steps: 1 });
    }
    let (m, steps) = fundamental_between(ramp, a, b, opts)?;
    Ok(StrokeMap { moments: m.moment_map(), fundamental: Some(m), steps })
}

/// The map of the whole ramp on (X, Y, D).
pub fn stroke_map(ramp: &Ramp, noise: &Noise, opts: &PropagationOptions) -> Result<StrokeMap> {
    map_between(ramp, noise, 0.0, ramp.duration(), opts)
}

/// Husimi Q* from the 2x2 fundamental matrix M of a ramp omega_i -> omega_f
/// (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)):
/// Q* = [omega_i²(omega_f² b² + d²) + (omega_f² a² + c²)] / (2 omega_i omega_f),
/// returned as 1 + [`q_star_minus_one_from_fundamental`] so that Q* >= 1 always.
pub fn q_star_from_fundamental(m: &Mat2, omega_i: f64, omega_f: f64) -> f64 {
    1.0 + q_star_minus_one_from_fundamental(m, omega_i, omega_f)
}

/// Q* - 1 without cancellation: with det M = ad - bc = 1, Husimi's numerator minus
/// 2 omega_i omega_f is a sum of squares,
/// Q* - 1 = [(omega_f a - omega_i d)² + (c + omega_i omega_f b)²] / (2 omega_i omega_f),
/// so it is >= 0 and as accurate relative to itself as the entries of M.
pub fn q_star_minus_one_from_fundamental(m: &Mat2, omega_i: f64, omega_f: f64) -> f64 {
    let u = omega_f * m.a - omega_i * m.d;
    let v = m.c + omega_i * omega_f * m.b;
    (u * u + v * v) / (2.0 * omega_i * omega_f)
}

/// Q* - 1 of a unitary map on (X, Y, D) (the closed-form constant-mu propagator),
/// from the state it makes of an energy-diagonal start at omega_i: the end state's
/// energy above omega_f sqrt(K), over omega_f sqrt(K) (see [`Moments::excess_energy`]).
/// Independent of the start's occupation.
pub fn q_star_minus_one_from_map(map: &Matrix3<f64>, omega_i: f64, omega_f: f64) -> f64 {
    let start = Moments { x: 0.5 / omega_i, y: 0.5 * omega_i, d: 0.0 };
    let end = start.mapped(map);
    end.excess_energy(omega_f) / (omega_f * end.casimir().max(0.0).sqrt())
}
