//! Hardware playback: a ramp as a waveform generator plays it. Sample-and-hold at a
//! sample rate (left or midpoint samples), optional quantisation of the drive to N bits
//! over a stated full-scale range, optional first-order low-pass of the drive chain,
//! optional clock jitter. The drive is proportional to omega² (the usual case for
//! optical and electric traps); a drive that cannot go negative (an optical trap's
//! power) cannot play omega² < 0, and that is an error, never a clip.

use crate::diagnostics::q_star;
use crate::error::{PhysicsError, Result, require_positive};
use crate::ramp::{Ramp, RampShape, SampledColumn, SampledRamp, SampledReading};

/// Where in each sample period the generator takes its value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SamplePoint {
    /// At the start of the period (what most generators do): first-order error.
    Left,
    /// At the middle of the period: second-order error.
    Midpoint,
}

/// How the generator plays a ramp.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Playback {
    /// Samples per second, > 0.
    pub rate: f64,
    /// Sample point in each period.
    pub point: SamplePoint,
    /// Resolution and full-scale range of the drive, in omega² units ((rad/s)²):
    /// (bits 1..=32, lowest code's omega², highest code's omega²).
    pub quantisation: Option<(u32, f64, f64)>,
    /// Time constant of a first-order low-pass on the drive, s (> 0).
    pub low_pass: Option<f64>,
    /// Whether the drive can go negative (false for an optical trap's power).
    pub allows_negative: bool,
}

impl Playback {
    /// Plain sample-and-hold at `rate` with left samples.
    pub fn sample_and_hold(rate: f64) -> Self {
        Self { rate, point: SamplePoint::Left, quantisation: None, low_pass: None, allows_negative: true }
    }
}

/// The played waveform as a held table.
pub fn play(ramp: &Ramp, pb: &Playback) -> Result<SampledRamp> {
    let rate = require_positive("sample rate", pb.rate)?;
    let tau = ramp.duration();
    let n = (tau * rate).ceil().max(1.0);
    if n > 5e7 {
        return Err(PhysicsError::invalid(
            "sample rate",
            rate,
            format!("at most {:e} samples/s for this ramp (50 million samples)", 5e7 / tau),
        ));
    }
    let n = n as usize;
    let dt = 1.0 / rate;
    let mut times = Vec::with_capacity(n + 1);
    let mut values = Vec::with_capacity(n + 1);
    for k in 0..n {
        let t0 = k as f64 * dt;
        let t1 = ((k + 1) as f64 * dt).min(tau);
        let ts = match pb.point {
            SamplePoint::Left => t0,
            SamplePoint::Midpoint => 0.5 * (t0 + t1),
        };
        times.push(t0);
        values.push(ramp.omega2(ts));
    }
    if let Some((k, v)) = values.iter().enumerate().find(|(_, v)| **v < 0.0).filter(|_| !pb.allows_negative) {
        return Err(PhysicsError::invalid(
            format!("drive at sample {} (t = {:e} s)", k + 1, times[k]),
            format!("omega² = {v:e} (rad/s)²"),
            ">= 0: this drive cannot go negative (an optical trap's power), so it cannot play an inverted trap",
        ));
    }
    if let Some((bits, lo, hi)) = pb.quantisation {
        if !(1..=32).contains(&bits) || !lo.is_finite() || !hi.is_finite() || hi <= lo {
            return Err(PhysicsError::invalid(
                "quantisation",
                format!("{bits} bits over [{lo:e}, {hi:e}]"),
                "1 to 32 bits over a range with highest > lowest",
            ));
        }
        let levels = f64::from(2u32.saturating_pow(bits).saturating_sub(1).max(1));
        let step = (hi - lo) / levels;
        for (k, v) in values.iter_mut().enumerate() {
            if *v < lo - 1e-12 * step || *v > hi + 1e-12 * step {
                return Err(PhysicsError::invalid(
                    format!("drive at sample {} (t = {:e} s)", k + 1, times[k]),
                    format!("omega² = {v:e} (rad/s)²"),
                    format!("inside the full-scale range [{lo:e}, {hi:e}] (rad/s)²; it is not clipped"),
                ));
            }
            *v = lo + ((*v - lo) / step).round() * step;
        }
    }
    if let Some(tf) = pb.low_pass {
        let tf = require_positive("low-pass time constant", tf)?;
        // Exact first-order response to the held input, evaluated at the middle of
        // sub-steps (8 per sample): the output then holds piecewise-constant values.
        let sub = 8;
        let mut y = ramp.omega_initial().powi(2);
        let mut t_out = Vec::with_capacity(n * sub + 1);
        let mut v_out = Vec::with_capacity(n * sub + 1);
        for (k, &x) in values.iter().enumerate() {
            let t0 = times[k];
            let t1 = if k + 1 < n { times[k + 1] } else { tau };
            let h = (t1 - t0) / sub as f64;
            for j in 0..sub {
                let mid = y + (x - y) * (-(0.5 * h) / tf).exp_m1().abs();
                t_out.push(t0 + j as f64 * h);
                v_out.push(mid);
                y = x + (y - x) * (-h / tf).exp();
            }
        }
        times = t_out;
        values = v_out;
    }
    // The last row is the end value (held for no time); the trap's frequencies before
    // and after the table are the designed ones.
    times.push(tau);
    values.push(ramp.omega_final().powi(2));
    SampledRamp::new(times, values, SampledColumn::Omega2, SampledReading::Hold)?
        .with_end_frequencies(ramp.omega_initial(), ramp.omega_final())
}

/// Whether the ramp as played with `pb` ends within `tolerance` of energy-diagonal.
fn passes(designed: &Ramp, pb: &Playback, tolerance: f64, opts: &crate::PropagationOptions) -> Result<bool> {
    Ok(q_star(&Ramp::Sampled(play(designed, pb)?), opts)? - 1.0 <= tolerance)
}

/// The smallest sample rate in [`low`, `high`] (samples/s) at which the played ramp keeps
/// Q* - 1 <= `tolerance`, other settings as in `pb`: doubling from `low` to the first
/// passing rate, then bisection to 1 % (the error need not fall monotonically, so this
/// is the first passing rate on that path). `None` if even `high` fails.
pub fn minimum_rate(
    designed: &Ramp,
    pb: &Playback,
    tolerance: f64,
    low: f64,
    high: f64,
    opts: &crate::PropagationOptions,
) -> Result<Option<f64>> {
    require_positive("lowest rate", low)?;
    if !(high.is_finite() && high >= low) {
        return Err(PhysicsError::invalid("highest rate", high, format!(">= the lowest rate {low:e}")));
    }
    let at = |r: f64| passes(designed, &Playback { rate: r, ..*pb }, tolerance, opts);
    let mut lo = low;
    if at(lo)? {
        return Ok(Some(lo));
    }
    let mut hi = lo;
    loop {
        hi = (hi * 2.0).min(high);
        if at(hi)? {
            break;
        }
        if hi >= high {
            return Ok(None);
        }
        lo = hi;
    }
    while hi / lo > 1.01 {
        let mid = (lo * hi).sqrt();
        if at(mid)? { hi = mid } else { lo = mid }
    }
    Ok(Some(hi))
}

/// The smallest bit depth (1 to 32) at which the played ramp keeps Q* - 1 <= `tolerance`
/// with the full-scale range of `pb` (which must set a quantisation). `None` if 32 bits fail.
pub fn minimum_bits(
    designed: &Ramp,
    pb: &Playback,
    tolerance: f64,
    opts: &crate::PropagationOptions,
) -> Result<Option<u32>> {
    let Some((_, lo, hi)) = pb.quantisation else {
        return Err(PhysicsError::invalid("quantisation", "none", "a full-scale range to quantise over"));
    };
    for bits in 1..=32 {
        if passes(designed, &Playback { quantisation: Some((bits, lo, hi)), ..*pb }, tolerance, opts)? {
            return Ok(Some(bits));
        }
    }
    Ok(None)
}
