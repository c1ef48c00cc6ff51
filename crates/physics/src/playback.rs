//! Hardware playback: a ramp as a waveform generator plays it.
//!
//! The chain, in order: the generator holds one value per sample period (left or
//! midpoint samples of the designed omega²), converted to a drive through a
//! calibration (drive proportional to omega², the usual case for optical and electric
//! traps, or a measured table of drive against frequency); the drive is quantised to N
//! bits over a stated full-scale range; the period edges may carry clock jitter; the
//! output may be slew-limited and low-passed (a first-order filter, e.g. an electrode
//! filter or a modulator's rise time); the trap then sees omega² from the inverse
//! calibration. A drive that cannot go negative (an optical trap's power) cannot play
//! omega² < 0, and a drive outside the full-scale range or the calibration table is an
//! error, never a clip.
//!
//! With a slew limit or a low-pass, the continuous analog output is held at its exact
//! mean over [`ANALOG_SUBSTEPS`] sub-steps per sample, which is of second order in the
//! sub-step.

use crate::diagnostics::q_star;
use crate::error::{PhysicsError, Result, require_positive};
use crate::ramp::{Ramp, RampShape, SampledColumn, SampledRamp, SampledReading};
use rand::SeedableRng;
use rand::rngs::StdRng;
use rand_distr::{Distribution, StandardNormal};

/// Sub-steps per sample period used to hold a slewing or filtered output.
pub const ANALOG_SUBSTEPS: usize = 8;

/// Most samples one playback may hold.
pub const MAX_SAMPLES: f64 = 5e7;

/// Where in each sample period the generator takes its value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SamplePoint {
    /// At the start of the period (what most generators do): first-order error.
    Left,
    /// At the middle of the period: second-order error.
    Midpoint,
}

/// How drive units map to the trap frequency.
#[derive(Debug, Clone, PartialEq)]
pub enum DriveCalibration {
    /// drive = gain · omega² (gain in drive units per (rad/s)², > 0); omega² < 0 needs a
    /// negative drive.
    Omega2 {
        /// Drive units per (rad/s)².
        gain: f64,
    },
    /// A measured table: omega (rad/s, strictly increasing, > 0) against drive (strictly
    /// monotone), read linearly in between; nothing outside the table can be played.
    Table {
        /// omega, rad/s.
        omega: Vec<f64>,
        /// Drive units.
        drive: Vec<f64>,
    },
}

impl Default for DriveCalibration {
    /// drive = omega², in (rad/s)².
    fn default() -> Self {
        Self::Omega2 { gain: 1.0 }
    }
}

fn interpolate(xs: &[f64], ys: &[f64], x: f64) -> f64 {
    let k = xs.partition_point(|&v| v <= x).clamp(1, xs.len() - 1);
    let (x0, x1, y0, y1) = (xs[k - 1], xs[k], ys[k - 1], ys[k]);
    y0 + (y1 - y0) * (x - x0) / (x1 - x0)
}

impl DriveCalibration {
    /// Checks the calibration.
    pub fn validate(&self) -> Result<()> {
        match self {
            Self::Omega2 { gain } => {
                require_positive("drive calibration gain", *gain)?;
            }
            Self::Table { omega, drive } => {
                if omega.len() != drive.len() || omega.len() < 2 {
                    return Err(PhysicsError::invalid(
                        "drive calibration table",
                        format!("{} frequencies and {} drives", omega.len(), drive.len()),
                        "at least 2 rows, as many drives as frequencies",
                    ));
                }
                for (k, &w) in omega.iter().enumerate() {
                    if !(w.is_finite() && w > 0.0) || (k > 0 && w <= omega[k - 1]) {
                        return Err(PhysicsError::invalid(
                            format!("drive calibration frequency, row {}", k + 1),
                            format!("{w:e} rad/s"),
                            "finite, > 0 and larger than the row before",
                        ));
                    }
                }
                let rising = drive[1] > drive[0];
                for (k, &d) in drive.iter().enumerate() {
                    let ordered = k == 0 || if rising { d > drive[k - 1] } else { d < drive[k - 1] };
                    if !d.is_finite() || !ordered {
                        return Err(PhysicsError::invalid(
                            format!("drive calibration drive, row {}", k + 1),
                            d,
                            "finite and strictly monotone in frequency (one drive per frequency)",
                        ));
                    }
                }
            }
        }
        Ok(())
    }

    /// The drive that gives omega²; errors where the calibration cannot.
    pub fn drive_of(&self, omega2: f64) -> Result<f64> {
        match self {
            Self::Omega2 { gain } => Ok(gain * omega2),
            Self::Table { omega, drive } => {
                let w = if omega2 >= 0.0 { omega2.sqrt() } else { f64::NAN };
                let (lo, hi) = (omega[0], omega[omega.len() - 1]);
                if !(lo..=hi).contains(&w) {
                    return Err(PhysicsError::invalid(
                        "frequency to play",
                        if omega2 < 0.0 {
                            format!("omega² = {omega2:e} (rad/s)², an inverted trap")
                        } else {
                            format!("{w:e} rad/s")
                        },
                        format!("inside the calibration table, {lo:e} to {hi:e} rad/s"),
                    ));
                }
                Ok(interpolate(omega, drive, w))
            }
        }
    }

    /// omega² of a drive.
    pub fn omega2_of(&self, d: f64) -> Result<f64> {
        match self {
            Self::Omega2 { gain } => Ok(d / gain),
            Self::Table { omega, drive } => {
                let (d0, d1) = (drive[0], drive[drive.len() - 1]);
                let (lo, hi) = (d0.min(d1), d0.max(d1));
                if !(lo..=hi).contains(&d) {
                    return Err(PhysicsError::invalid(
                        "drive",
                        d,
                        format!("inside the calibration table, {lo:e} to {hi:e} drive units"),
                    ));
                }
                let w = if d1 > d0 {
                    interpolate(drive, omega, d)
                } else {
                    let rd: Vec<f64> = drive.iter().rev().copied().collect();
                    let rw: Vec<f64> = omega.iter().rev().copied().collect();
                    interpolate(&rd, &rw, d)
                };
                Ok(w * w)
            }
        }
    }
}

/// Clock jitter: every period edge after the first moves by an independent Gaussian
/// offset (white timing jitter) with this rms, from a seeded generator.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Jitter {
    /// rms edge offset, s (>= 0, at most an eighth of the sample period).
    pub rms: f64,
    /// Seed of the realisation.
    pub seed: u64,
}

/// How the generator plays a ramp.
#[derive(Debug, Clone, PartialEq)]
pub struct Playback {
    /// Samples per second, > 0.
    pub rate: f64,
    /// Sample point in each period.
    pub point: SamplePoint,
    /// Drive units against omega².
    pub calibration: DriveCalibration,
    /// Resolution and full-scale range of the drive, in drive units:
    /// (bits 1..=32, lowest code's drive, highest code's drive).
    pub quantisation: Option<(u32, f64, f64)>,
    /// Largest |d drive/dt| of the output stage, drive units per s (> 0).
    pub slew: Option<f64>,
    /// Time constant of a first-order low-pass on the drive, s (> 0).
    pub low_pass: Option<f64>,
    /// Clock jitter of the period edges.
    pub jitter: Option<Jitter>,
    /// Whether the drive can go negative (false for an optical trap's power).
    pub allows_negative: bool,
}

impl Playback {
    /// Plain sample-and-hold at `rate` with left samples, drive = omega².
    pub fn sample_and_hold(rate: f64) -> Self {
        Self {
            rate,
            point: SamplePoint::Left,
            calibration: DriveCalibration::default(),
            quantisation: None,
            slew: None,
            low_pass: None,
            jitter: None,
            allows_negative: true,
        }
    }
}

/// What the generator holds in its memory: one drive level (and code) per period.
#[derive(Debug, Clone, PartialEq)]
pub struct DriveSamples {
    /// Period start times as played (jittered edges), s; the last period ends at the
    /// ramp's duration.
    pub times: Vec<f64>,
    /// Drive level of each period, drive units (after quantisation).
    pub drive: Vec<f64>,
    /// Integer DAC code of each period (0 = lowest code), when quantised.
    pub codes: Option<Vec<u32>>,
    /// Drive before the ramp (the level at omega_i), drive units.
    pub drive_before: f64,
}

/// The played waveform with what happened on the way.
#[derive(Debug, Clone, PartialEq)]
pub struct Played {
    /// omega² as the trap sees it, held in sub-steps, with the designed end frequencies.
    pub ramp: SampledRamp,
    /// The generator's samples.
    pub samples: DriveSamples,
    /// Periods in which the slew limit kept the output from reaching its level.
    pub slew_limited_periods: usize,
}

fn check_quantisation(bits: u32, lo: f64, hi: f64) -> Result<()> {
    if !(1..=32).contains(&bits) || !lo.is_finite() || !hi.is_finite() || hi <= lo {
        return Err(PhysicsError::invalid(
            "quantisation",
            format!("{bits} bits over [{lo:e}, {hi:e}]"),
            "1 to 32 bits over a drive range with highest > lowest",
        ));
    }
    Ok(())
}

fn edges(n: usize, dt: f64, tau: f64, jitter: Option<Jitter>) -> Result<Vec<f64>> {
    let mut times: Vec<f64> = (0..n).map(|k| k as f64 * dt).collect();
    if let Some(j) = jitter {
        if !(j.rms.is_finite() && j.rms >= 0.0 && j.rms <= dt / 8.0) {
            return Err(PhysicsError::invalid(
                "clock jitter rms",
                format!("{:e} s", j.rms),
                format!("0 to an eighth of the sample period, {:e} s", dt / 8.0),
            ));
        }
        let mut rng = StdRng::seed_from_u64(j.seed);
        for t in times.iter_mut().skip(1) {
            let z: f64 = StandardNormal.sample(&mut rng);
            *t += j.rms * z;
        }
        for k in 1..n {
            let next = if k + 1 < n { times[k + 1] } else { tau };
            if times[k] <= times[k - 1] || times[k] >= next {
                return Err(PhysicsError::invalid(
                    format!("clock jitter at edge {k}"),
                    format!("{:e} s rms", j.rms),
                    "small enough that period edges keep their order; lower it or the sample rate",
                ));
            }
        }
    }
    Ok(times)
}

/// The generator's samples of a ramp: drive levels and DAC codes per period.
pub fn drive_samples(ramp: &Ramp, pb: &Playback) -> Result<DriveSamples> {
    let rate = require_positive("sample rate", pb.rate)?;
    pb.calibration.validate()?;
    let tau = ramp.duration();
    // A duration that is a whole number of periods up to rounding gets that many
    // periods (the last one absorbs the rounding), not one more of zero length.
    let n = (tau * rate * (1.0 - 1e-9)).ceil().max(1.0);
    if n > MAX_SAMPLES {
        return Err(PhysicsError::invalid(
            "sample rate",
            rate,
            format!("at most {:e} samples/s for this ramp ({MAX_SAMPLES:e} samples)", MAX_SAMPLES / tau),
        ));
    }
    let n = n as usize;
    let dt = 1.0 / rate;
    let mut drive = Vec::with_capacity(n);
    for k in 0..n {
        let t0 = k as f64 * dt;
        let t1 = ((k + 1) as f64 * dt).min(tau);
        let ts = match pb.point {
            SamplePoint::Left => t0,
            SamplePoint::Midpoint => 0.5 * (t0 + t1),
        };
        let w2 = ramp.omega2(ts);
        let place = || format!("drive at sample {} (t = {ts:e} s)", k + 1);
        if w2 < 0.0 && !pb.allows_negative {
            return Err(PhysicsError::invalid(
                place(),
                format!("omega² = {w2:e} (rad/s)²"),
                ">= 0: this drive cannot go negative (an optical trap's power), so it cannot play an inverted trap",
            ));
        }
        let d = pb.calibration.drive_of(w2).map_err(|e| PhysicsError::invalid(place(), w2, e.to_string()))?;
        if d < 0.0 && !pb.allows_negative {
            return Err(PhysicsError::invalid(place(), d, ">= 0: this drive cannot go negative"));
        }
        drive.push(d);
    }
    let drive_before = pb.calibration.drive_of(ramp.omega_initial().powi(2))?;
    let mut codes = None;
    if let Some((bits, lo, hi)) = pb.quantisation {
        check_quantisation(bits, lo, hi)?;
        let levels = 2f64.powi(bits.cast_signed()) - 1.0;
        let step = (hi - lo) / levels;
        let mut c = Vec::with_capacity(n);
        for (k, v) in drive.iter_mut().enumerate() {
            if *v < lo - 1e-12 * step || *v > hi + 1e-12 * step {
                return Err(PhysicsError::invalid(
                    format!("drive at sample {} (t = {:e} s)", k + 1, k as f64 * dt),
                    *v,
                    format!("inside the full-scale range [{lo:e}, {hi:e}] drive units; it is not clipped"),
                ));
            }
            let code = ((*v - lo) / step).round().clamp(0.0, levels);
            c.push(code as u32);
            *v = lo + code * step;
        }
        codes = Some(c);
    }
    Ok(DriveSamples { times: edges(n, dt, tau, pb.jitter)?, drive, codes, drive_before })
}

/// Output of a slew-limited stage moving from `y` toward `x` at most `s` per second for
/// `h` seconds: (end value, exact mean over the interval, whether it fell short).
fn slew_step(y: f64, x: f64, s: f64, h: f64) -> (f64, f64, bool) {
    let gap = x - y;
    let reach = gap.abs() / s;
    if reach <= h {
        let mean = if h > 0.0 { ((y + x) * 0.5 * reach + x * (h - reach)) / h } else { x };
        (x, mean, false)
    } else {
        let end = y + gap.signum() * s * h;
        (end, 0.5 * (y + end), true)
    }
}

/// Output of a first-order low-pass with time constant `tf` driven by `x` for `h`
/// seconds from `y`: (end value, exact mean).
fn low_pass_step(y: f64, x: f64, tf: f64, h: f64) -> (f64, f64) {
    let decay = (-h / tf).exp();
    let mean = if h > 0.0 { x + (y - x) * (-(-h / tf).exp_m1()) * tf / h } else { y };
    (x + (y - x) * decay, mean)
}

/// The analog output held in sub-steps: (times, drive means, slew-limited periods).
fn analog_chain(s: &DriveSamples, tau: f64, pb: &Playback) -> Result<(Vec<f64>, Vec<f64>, usize)> {
    let slew = pb.slew.map(|v| require_positive("slew limit", v)).transpose()?;
    let tf = pb.low_pass.map(|v| require_positive("low-pass time constant", v)).transpose()?;
    if slew.is_none() && tf.is_none() {
        return Ok((s.times.clone(), s.drive.clone(), 0));
    }
    let n = s.times.len();
    let (mut ys, mut yl) = (s.drive_before, s.drive_before);
    let mut limited = 0;
    let mut times = Vec::with_capacity(n * ANALOG_SUBSTEPS);
    let mut means = Vec::with_capacity(n * ANALOG_SUBSTEPS);
    for (k, &x) in s.drive.iter().enumerate() {
        let t0 = s.times[k];
        let t1 = if k + 1 < n { s.times[k + 1] } else { tau };
        let h = (t1 - t0) / ANALOG_SUBSTEPS as f64;
        let mut short = false;
        for j in 0..ANALOG_SUBSTEPS {
            let mean_in = match slew {
                Some(rate) => {
                    let (end, mean, fell_short) = slew_step(ys, x, rate, h);
                    ys = end;
                    short |= fell_short && j + 1 == ANALOG_SUBSTEPS;
                    mean
                }
                None => x,
            };
            let mean = match tf {
                // The filter sees the slewing stage's mean over the sub-step.
                Some(tf) => {
                    let (end, mean) = low_pass_step(yl, mean_in, tf, h);
                    yl = end;
                    mean
                }
                None => mean_in,
            };
            times.push(t0 + j as f64 * h);
            means.push(mean);
        }
        limited += usize::from(short);
    }
    Ok((times, means, limited))
}

/// Plays a ramp through the whole chain.
pub fn play_through(ramp: &Ramp, pb: &Playback) -> Result<Played> {
    let samples = drive_samples(ramp, pb)?;
    let tau = ramp.duration();
    let (mut times, drive, slew_limited_periods) = analog_chain(&samples, tau, pb)?;
    let mut values = Vec::with_capacity(drive.len() + 1);
    for (k, &d) in drive.iter().enumerate() {
        values.push(
            pb.calibration
                .omega2_of(d)
                .map_err(|e| PhysicsError::invalid(format!("output at t = {:e} s", times[k]), d, e.to_string()))?,
        );
    }
    times.push(tau);
    values.push(ramp.omega_final().powi(2));
    let ramp_played = SampledRamp::new(times, values, SampledColumn::Omega2, SampledReading::Hold)?
        .with_end_frequencies(ramp.omega_initial(), ramp.omega_final())?;
    Ok(Played { ramp: ramp_played, samples, slew_limited_periods })
}

/// The played waveform as a held table of omega², carrying the designed end frequencies.
pub fn play(ramp: &Ramp, pb: &Playback) -> Result<SampledRamp> {
    Ok(play_through(ramp, pb)?.ramp)
}

fn passes(designed: &Ramp, pb: &Playback, tolerance: f64, opts: &crate::PropagationOptions) -> Result<bool> {
    Ok(q_star(&Ramp::Sampled(play(designed, pb)?), opts)? - 1.0 <= tolerance)
}

/// The smallest sample rate in [low, high] at which the played ramp keeps
/// Q* - 1 <= tolerance (to 1 % in rate), or None if even `high` does not. Assumes the
/// error falls with the rate; it searches by doubling then bisection.
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
    let at = |r: f64| passes(designed, &Playback { rate: r, ..pb.clone() }, tolerance, opts);
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

/// The smallest bit depth (1..=32) over the playback's full-scale range that keeps
/// Q* - 1 <= tolerance at its sample rate, or None.
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
        if passes(designed, &Playback { quantisation: Some((bits, lo, hi)), ..pb.clone() }, tolerance, opts)? {
            return Ok(Some(bits));
        }
    }
    Ok(None)
}

/// Q* over `trials` jitter realisations (seeds seed, seed + 1, ...): (mean, worst).
pub fn jitter_q_star(
    designed: &Ramp,
    pb: &Playback,
    trials: usize,
    opts: &crate::PropagationOptions,
) -> Result<(f64, f64)> {
    let Some(j) = pb.jitter else {
        return Err(PhysicsError::invalid("clock jitter", "none", "an rms edge offset to sample"));
    };
    if !(1..=10_000).contains(&trials) {
        return Err(PhysicsError::invalid("jitter trials", trials, "1 to 10000"));
    }
    let mut sum = 0.0;
    let mut worst = f64::NEG_INFINITY;
    for k in 0..trials {
        let jk = Jitter { seed: j.seed.wrapping_add(k as u64), ..j };
        let q = q_star(&Ramp::Sampled(play(designed, &Playback { jitter: Some(jk), ..pb.clone() })?), opts)?;
        sum += q;
        worst = worst.max(q);
    }
    Ok((sum / trials as f64, worst))
}
