//! The generator and drive chain: a ramp as a waveform generator plays it.
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

use crate::error::{PhysicsError, Result, require_positive};
use crate::limits::{TrapLimits, Violation, ViolationTracker};
use crate::propagate::{Mat2, constant_step, q_star_minus_one_from_fundamental};
use crate::ramp::{AxisLaw, Ramp, RampShape, SampledColumn, SampledRamp, SampledReading};
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

/// As [`interpolate`] for strictly falling `xs`, without reversing the table.
fn interpolate_falling(xs: &[f64], ys: &[f64], x: f64) -> f64 {
    let k = xs.partition_point(|&v| v > x).clamp(1, xs.len() - 1);
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
    #[inline]
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
                let w = if d1 > d0 { interpolate(drive, omega, d) } else { interpolate_falling(drive, omega, d) };
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
    /// The generator's rules, in one place (every caller that builds a playback from
    /// user input checks it here): a finite rate > 0; 1 to 32 bits over a drive range
    /// with highest > lowest; a slew limit and a low-pass time constant, if any, finite
    /// and > 0; clock jitter rms from 0 to an eighth of the sample period
    /// ([`jitter_limit`]); a valid calibration. Parameter names in errors are the
    /// physics names ("sample rate", "bits", ...), for the caller to translate.
    pub fn validate(&self) -> Result<()> {
        let rate = require_positive("sample rate", self.rate)?;
        if let Some((bits, lo, hi)) = self.quantisation {
            if !(1..=32).contains(&bits) {
                return Err(PhysicsError::invalid("bits", bits, "1 to 32"));
            }
            check_quantisation(bits, lo, hi)?;
        }
        if let Some(s) = self.slew {
            require_positive("slew limit", s)?;
        }
        if let Some(t) = self.low_pass {
            require_positive("low-pass time constant", t)?;
        }
        if let Some(j) = self.jitter {
            let limit = jitter_limit(rate);
            if !(j.rms.is_finite() && j.rms >= 0.0 && j.rms <= limit) {
                return Err(PhysicsError::invalid(
                    "clock jitter rms",
                    format!("{:e} s", j.rms),
                    format!("0 to an eighth of the sample period, {limit:e} s at {rate:e} samples/s"),
                ));
            }
        }
        self.calibration.validate()
    }

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

/// Periods a ramp of `tau` seconds gets at `rate` samples/s: N = round(tau R), half up,
/// at least 1.
pub fn periods(tau: f64, rate: f64) -> f64 {
    (tau * rate + 0.5).floor().max(1.0)
}

/// What the generator holds in its memory: the N played samples and, as sample N, the
/// final level it holds from N/R on.
#[derive(Debug, Clone, PartialEq)]
pub struct DriveSamples {
    /// Sample rate, samples/s.
    pub rate: f64,
    /// Edge times as played, s (N + 1 of them): sample k (k < N) holds from `times[k]`
    /// to `times[k + 1]`; the final level starts at `times[N]` (N/R, jittered like every
    /// edge after the first) and is held from then on.
    pub times: Vec<f64>,
    /// Drive level of each sample after quantisation, drive units (N + 1: the last is
    /// the final level).
    pub drive: Vec<f64>,
    /// Straight-binary DAC code of each sample (0 = lowest code), when quantised
    /// (N + 1, as `drive`).
    pub codes: Option<Vec<u32>>,
    /// The initial level held before t = 0 (omega_i² through calibration and
    /// quantisation), drive units.
    pub drive_before: f64,
    /// Its DAC code, when quantised.
    pub code_before: Option<u32>,
}

impl DriveSamples {
    /// Played samples N (the final level not counted).
    pub fn periods(&self) -> usize {
        self.drive.len() - 1
    }

    fn push(&mut self, t: f64, drive: f64, code: Option<u32>) {
        self.times.push(t);
        self.drive.push(drive);
        if let (Some(c), Some(code)) = (self.codes.as_mut(), code) {
            c.push(code);
        }
    }
}

/// The played waveform with what happened on the way. The tables (the trap as played
/// and the generator's samples) are kept only when asked for ([`Keep`]); every figure
/// is computed while the playing streams past.
#[derive(Debug, Clone, PartialEq)]
pub struct Played {
    /// omega² as the trap sees it, held (left sample-and-hold rows, sub-steps where an
    /// output stage acts), from t = 0 until the output has settled on the final level;
    /// its end frequencies are the trap before the ramp (the initial level) and the trap
    /// the final level leaves on. Kept when asked for.
    pub trap: Option<SampledRamp>,
    /// The generator's samples. Kept when asked for.
    pub samples: Option<DriveSamples>,
    /// Sample rate, samples/s.
    pub rate: f64,
    /// Played samples N (the final level not counted).
    pub periods: usize,
    /// When the final level starts (N/R, jittered like every edge after the first), s.
    pub final_level_start_s: f64,
    /// When the output had settled on the final level (the trap table's last row), s.
    pub settled_at: f64,
    /// Periods in which the slew limit kept the output from reaching its level.
    pub slew_limited_periods: usize,
    /// Duration as played, N/R, s.
    pub played_duration_s: f64,
    /// omega of the initial level (the trap before t = 0), rad/s.
    pub omega_start: f64,
    /// omega of the final level: the trap the generator leaves on, rad/s.
    pub omega_left_on: f64,
    /// The initial level held before t = 0, drive units, and its code when quantised.
    pub drive_before: f64,
    /// The initial level's DAC code, when quantised.
    pub code_before: Option<u32>,
    /// Q* - 1 of the trap as played, from the initial level to the trap left on
    /// (without cancellation; exact held steps).
    pub q_star_minus_one: f64,
    /// Smallest omega² of the trap as played, (rad/s)².
    pub min_omega2: f64,
    /// Stretches of the played trap that break the bounds asked for in [`Keep`] (and
    /// where it inverts); empty when none were asked for.
    pub violations: Vec<Violation>,
    /// Held steps the trap took (sub-steps included).
    pub held_steps: usize,
}

impl Played {
    /// When the output had settled on the final level (the trap table's last row), s.
    pub fn settled_at_s(&self) -> f64 {
        self.settled_at
    }
}

/// What a playing keeps besides its figures.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Keep {
    /// Keep the trap table and the generator's samples (for a writer or a plot).
    pub tables: bool,
    /// Check these bounds (and inversion) on the played trap as it streams.
    pub bounds: Option<TrapLimits>,
    /// The axis whose trap is followed: every figure (Q* - 1, smallest omega², bounds,
    /// the trap table) is that axis's, omega_axis² = gain omega² + offset of the
    /// reference trap the drive sets. The reference axis by default.
    pub axis: AxisLaw,
}

/// How close the output must come to the final level before the trap it leaves on is
/// judged: |omega² - omega_L²| < SETTLE_FRACTION · tolerance · omega_L².
pub const SETTLE_FRACTION: f64 = 1e-3;

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

/// A verdict tolerance on Q* - 1: in (0, 1).
pub(crate) fn check_tolerance(tolerance: f64) -> Result<f64> {
    if tolerance.is_finite() && tolerance > 0.0 && tolerance < 1.0 {
        Ok(tolerance)
    } else {
        Err(PhysicsError::invalid("tolerance", tolerance, "a number in (0, 1)"))
    }
}

/// The largest clock jitter rms a rate allows (an eighth of the period), s.
pub fn jitter_limit(rate: f64) -> f64 {
    1.0 / rate / 8.0
}

/// Period edges as they come: k/R, each after the first moved by the clock jitter
/// (an independent Gaussian offset per edge from a seeded generator).
struct Edges {
    rate: f64,
    jitter: Option<(StdRng, f64)>,
    previous: f64,
    k: usize,
}

impl Edges {
    fn new(rate: f64, jitter: Option<Jitter>) -> Self {
        Self { rate, jitter: jitter.map(|j| (StdRng::seed_from_u64(j.seed), j.rms)), previous: f64::NEG_INFINITY, k: 0 }
    }

    /// The next edge (edge 0 is t = 0).
    fn next(&mut self) -> Result<f64> {
        let k = self.k;
        let mut t = k as f64 / self.rate;
        if k > 0
            && let Some((rng, rms)) = self.jitter.as_mut()
        {
            let z: f64 = StandardNormal.sample(rng);
            t += *rms * z;
            if t <= self.previous {
                return Err(PhysicsError::invalid(
                    format!("clock jitter at edge {k}"),
                    format!("{rms:e} s rms"),
                    "small enough that period edges keep their order; lower it or the sample rate",
                ));
            }
        }
        self.previous = t;
        self.k += 1;
        Ok(t)
    }
}

/// Quantisation to straight-binary codes over a full-scale range.
#[derive(Clone, Copy)]
struct Quantiser {
    lo: f64,
    hi: f64,
    step: f64,
    levels: f64,
}

impl Quantiser {
    fn new(pb: &Playback) -> Result<Option<Self>> {
        let Some((bits, lo, hi)) = pb.quantisation else { return Ok(None) };
        check_quantisation(bits, lo, hi)?;
        let levels = 2f64.powi(bits.cast_signed()) - 1.0;
        Ok(Some(Self { lo, hi, step: (hi - lo) / levels, levels }))
    }

    /// The quantised level and its code; a level outside the full scale is an error.
    fn quantise(&self, v: f64, place: &dyn Fn() -> String) -> Result<(f64, u32)> {
        let Self { lo, hi, step, levels } = *self;
        if v < lo - 1e-12 * step || v > hi + 1e-12 * step {
            return Err(PhysicsError::invalid(
                place(),
                format!("{v:e}"),
                format!("inside the full-scale range [{lo:e}, {hi:e}] drive units; it is not clipped"),
            ));
        }
        let code = ((v - lo) / step).round().clamp(0.0, levels);
        Ok((lo + code * step, code as u32))
    }
}

/// One level through calibration and the drive's sign rule (before quantisation).
fn level(pb: &Playback, w2: f64, place: &dyn Fn() -> String) -> Result<f64> {
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
    Ok(d)
}

/// One level through calibration, the sign rule and quantisation.
fn quantised_level(
    pb: &Playback,
    q: Option<&Quantiser>,
    w2: f64,
    place: &dyn Fn() -> String,
) -> Result<(f64, Option<u32>)> {
    let d = level(pb, w2, place)?;
    match q {
        Some(q) => q.quantise(d, place).map(|(v, c)| (v, Some(c))),
        None => Ok((d, None)),
    }
}

/// The one sampling rule: N = round(tau R) samples taken at k/R (left) or (k + 1/2)/R
/// (midpoint), the value just after a jump where a sample falls on one, each through
/// calibration and quantisation; `each` receives (k, edge k, edge k + 1, drive, code).
/// Returns the final level (omega_f² through the same chain), its code and edge N.
fn sample_stream(
    ramp: &Ramp,
    pb: &Playback,
    n: usize,
    q: Option<&Quantiser>,
    mut each: impl FnMut(usize, f64, f64, f64, Option<u32>) -> Result<()>,
) -> Result<(f64, Option<u32>, f64)> {
    let rate = pb.rate;
    let tau = ramp.duration();
    let mut edges = Edges::new(rate, pb.jitter);
    let mut t0 = edges.next()?;
    for k in 0..n {
        let ts = match pb.point {
            SamplePoint::Left => k as f64 / rate,
            SamplePoint::Midpoint => (k as f64 + 0.5) / rate,
        }
        .min(tau);
        let (d, code) =
            quantised_level(pb, q, ramp.omega2(ts), &|| format!("drive at sample {k} (t = {:e} s)", k as f64 / rate))?;
        let t1 = edges.next()?;
        each(k, t0, t1, d, code)?;
        t0 = t1;
    }
    let (d, code) = quantised_level(pb, q, ramp.omega_final().powi(2), &|| format!("final level (sample {n})"))?;
    Ok((d, code, t0))
}

/// Checks the rate against the sample budget: N = round(tau R) samples, each of
/// `per_sample` held steps.
fn sample_count(ramp: &Ramp, pb: &Playback, per_sample: usize) -> Result<usize> {
    let tau = ramp.duration();
    let n = periods(tau, pb.rate);
    if per_sample == 1 && n > MAX_SAMPLES {
        return Err(PhysicsError::invalid(
            "sample rate",
            format!("{:e} samples/s", pb.rate),
            format!("at most {:e} samples/s for this ramp ({MAX_SAMPLES:e} samples)", MAX_SAMPLES / tau),
        ));
    }
    if per_sample > 1 && (n + 1.0) * per_sample as f64 > MAX_SAMPLES {
        return Err(PhysicsError::invalid(
            "sample rate",
            format!("{:e} samples/s", pb.rate),
            format!(
                "at most {:e} samples/s for this ramp with a slew limit or low-pass ({MAX_SAMPLES:e} held steps of {per_sample} per sample)",
                MAX_SAMPLES / per_sample as f64 / tau
            ),
        ));
    }
    Ok(n as usize)
}

/// The generator's samples of a ramp: N = round(tau R) samples taken at k/R (left) or
/// (k + 1/2)/R (midpoint), the value just after a jump where a sample falls on one,
/// then the final level (omega_f²) as sample N; each through calibration and
/// quantisation. The same rule as every playing ([`play_streaming`]).
pub fn drive_samples(ramp: &Ramp, pb: &Playback) -> Result<DriveSamples> {
    pb.validate()?;
    let n = sample_count(ramp, pb, 1)?;
    let q = Quantiser::new(pb)?;
    let mut times = Vec::with_capacity(n + 1);
    let mut drive = Vec::with_capacity(n + 1);
    let mut codes = q.map(|_| Vec::with_capacity(n + 1));
    let (d, code, tn) = sample_stream(ramp, pb, n, q.as_ref(), |_, t0, _, d, code| {
        times.push(t0);
        drive.push(d);
        if let (Some(c), Some(code)) = (codes.as_mut(), code) {
            c.push(code);
        }
        Ok(())
    })?;
    times.push(tn);
    drive.push(d);
    if let (Some(c), Some(code)) = (codes.as_mut(), code) {
        c.push(code);
    }
    let (drive_before, code_before) =
        quantised_level(pb, q.as_ref(), ramp.omega_initial().powi(2), &|| "initial level (before t = 0)".to_string())?;
    Ok(DriveSamples { rate: pb.rate, times, drive, codes, drive_before, code_before })
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

/// The factors of a first-order low-pass with time constant `tf` over `h` seconds:
/// (decay e^{-h/tf}, the weight of the start value in the exact mean).
fn low_pass_factors(tf: f64, h: f64) -> (f64, f64) {
    let decay = (-h / tf).exp();
    let weight = if h > 0.0 { (-(-h / tf).exp_m1()) * tf / h } else { 1.0 };
    (decay, weight)
}

/// The analog output stage (slew limit, then low-pass), started at the initial level.
struct Stage {
    slew: Option<f64>,
    tf: Option<f64>,
    ys: f64,
    yl: f64,
    /// The low-pass factors of the last sub-step length (sub-steps repeat within a period).
    factors: (f64, f64, f64),
}

impl Stage {
    fn new(slew: Option<f64>, tf: Option<f64>, start: f64) -> Self {
        Self { slew, tf, ys: start, yl: start, factors: (f64::NAN, 0.0, 0.0) }
    }

    /// Drives the stage with `x` for `h` seconds: (mean output, whether the slew fell short).
    #[inline]
    fn step(&mut self, x: f64, h: f64) -> (f64, bool) {
        let (mean_in, short) = match self.slew {
            Some(rate) => {
                let (end, mean, fell_short) = slew_step(self.ys, x, rate, h);
                self.ys = end;
                (mean, fell_short)
            }
            None => (x, false),
        };
        let mean = match self.tf {
            // The filter sees the slewing stage's mean over the sub-step: exactly
            // y_end = x + (y - x) e^{-h/tf}, mean = x + (y - x) (1 - e^{-h/tf}) tf/h.
            Some(tf) => {
                #[expect(clippy::float_cmp, reason = "a cache keyed by the exact sub-step length")]
                if self.factors.0 != h {
                    let (decay, weight) = low_pass_factors(tf, h);
                    self.factors = (h, decay, weight);
                }
                let (_, decay, weight) = self.factors;
                let gap = self.yl - mean_in;
                self.yl = mean_in + gap * decay;
                mean_in + gap * weight
            }
            None => mean_in,
        };
        (mean, short)
    }
    /// The output now.
    fn output(&self) -> f64 {
        if self.tf.is_some() { self.yl } else { self.ys }
    }
}

/// omega² of a drive through the calibration, naming the time in an error.
#[inline]
fn omega2_at(cal: &DriveCalibration, d: f64, t: f64) -> Result<f64> {
    cal.omega2_of(d).map_err(|e| PhysicsError::invalid(format!("output at t = {t:e} s"), d, e.to_string()))
}

/// Takes the played trap point by point (omega² holds from a point's time until the
/// next point's): the exact held-step fundamental matrix, the smallest omega², the bound
/// checks, and the table when it is kept. (Multiplying each step in as it comes is
/// faster here than buffering for the paired kernel: the step's latency hides behind
/// the generation of the next point.)
struct TrapSink {
    law: AxisLaw,
    m: Mat2,
    previous: Option<(f64, f64)>,
    min_w2: f64,
    steps: usize,
    tracker: Option<ViolationTracker>,
    table: Option<(Vec<f64>, Vec<f64>)>,
}

impl TrapSink {
    fn new(keep: &Keep, capacity: usize) -> Self {
        Self {
            law: keep.axis,
            m: Mat2::IDENTITY,
            previous: None,
            min_w2: f64::INFINITY,
            steps: 0,
            tracker: keep.bounds.map(|b| ViolationTracker::new(TrapLimits { slew_max: None, ..b })),
            table: keep.tables.then(|| (Vec::with_capacity(capacity), Vec::with_capacity(capacity))),
        }
    }

    #[inline]
    fn point(&mut self, t: f64, w2: f64) {
        let w2 = self.law.apply(w2);
        if let Some((pt, pw2)) = self.previous {
            self.m = constant_step(pw2, t - pt).mul(&self.m);
            self.steps += 1;
        }
        self.previous = Some((t, w2));
        self.min_w2 = self.min_w2.min(w2);
        if let Some(tr) = self.tracker.as_mut() {
            tr.observe(t, w2, None);
        }
        if let Some((ts, vs)) = self.table.as_mut() {
            ts.push(t);
            vs.push(w2);
        }
    }

    /// The fundamental matrix of everything taken so far.
    fn fundamental(&self) -> Mat2 {
        self.m
    }
}

fn confining(w2: f64, what: &str) -> Result<f64> {
    if w2 > 0.0 {
        Ok(w2.sqrt())
    } else {
        Err(PhysicsError::invalid(
            what,
            format!("omega² = {w2:e} (rad/s)²"),
            "> 0 after calibration and quantisation (the trap must confine)",
        ))
    }
}

/// Plays a ramp through the whole chain as a stream: the generator's samples, the
/// output stage (held sub-steps where a slew limit or low-pass acts), and the final
/// level held until the output has settled within [`SETTLE_FRACTION`] · `tolerance` of
/// it in omega². Nothing per sample is stored unless `keep` asks for the tables; Q* - 1
/// of the trap as played, its smallest omega² and the asked-for bound checks are
/// computed on the way.
pub fn play_streaming(ramp: &Ramp, pb: &Playback, tolerance: f64, keep: &Keep) -> Result<Played> {
    let tolerance = check_tolerance(tolerance)?;
    pb.validate()?;
    let analog = pb.slew.is_some() || pb.low_pass.is_some();
    let per_sample = if analog { ANALOG_SUBSTEPS } else { 1 };
    let n = sample_count(ramp, pb, per_sample)?;
    let q = Quantiser::new(pb)?;
    let cal = &pb.calibration;
    let (drive_before, code_before) =
        quantised_level(pb, q.as_ref(), ramp.omega_initial().powi(2), &|| "initial level (before t = 0)".to_string())?;
    let omega_start = confining(keep.axis.apply(omega2_at(cal, drive_before, 0.0)?), "initial level")?;
    let (final_drive, final_code) =
        quantised_level(pb, q.as_ref(), ramp.omega_final().powi(2), &|| format!("final level (sample {n})"))?;
    let left_on2 = omega2_at(cal, final_drive, n as f64 / pb.rate)?;
    let omega_left_on = confining(keep.axis.apply(left_on2), "final level")?;
    // The settling rule is the reference trap's (the drive's), whatever axis is followed.
    let target = left_on2;
    let mut sink = TrapSink::new(keep, if keep.tables { (n + 1) * per_sample + 1 } else { 0 });
    let mut samples = keep.tables.then(|| DriveSamples {
        rate: pb.rate,
        times: Vec::with_capacity(n + 1),
        drive: Vec::with_capacity(n + 1),
        codes: q.map(|_| Vec::with_capacity(n + 1)),
        drive_before,
        code_before,
    });
    let mut stage = Stage::new(pb.slew, pb.low_pass, drive_before);
    let mut limited = 0;
    let (_, _, tn) = sample_stream(ramp, pb, n, q.as_ref(), |_, t0, t1, d, code| {
        if let Some(s) = samples.as_mut() {
            s.push(t0, d, code);
        }
        if analog {
            let h = (t1 - t0) / ANALOG_SUBSTEPS as f64;
            let mut short = false;
            for j in 0..ANALOG_SUBSTEPS {
                let t = t0 + j as f64 * h;
                let (mean, fell_short) = stage.step(d, h);
                short |= fell_short && j + 1 == ANALOG_SUBSTEPS;
                sink.point(t, omega2_at(cal, mean, t)?);
            }
            limited += usize::from(short);
        } else {
            sink.point(t0, omega2_at(cal, d, t0)?);
        }
        Ok(())
    })?;
    if let Some(s) = samples.as_mut() {
        s.push(tn, final_drive, final_code);
    }
    let settled_at = if analog {
        settle(&mut sink, &mut stage, cal, final_drive, tn, pb.rate, n, target, SETTLE_FRACTION * tolerance * target)?
    } else {
        sink.point(tn, omega2_at(cal, final_drive, tn)?);
        tn
    };
    let fundamental = sink.fundamental();
    let trap = match sink.table.take() {
        Some((times, values)) => Some(SampledRamp::with_stated_ends(
            times,
            values,
            SampledColumn::Omega2,
            SampledReading::Hold,
            omega_start,
            omega_left_on,
        )?),
        None => None,
    };
    Ok(Played {
        trap,
        samples,
        rate: pb.rate,
        periods: n,
        final_level_start_s: tn,
        settled_at,
        slew_limited_periods: limited,
        played_duration_s: n as f64 / pb.rate,
        omega_start,
        omega_left_on,
        drive_before,
        code_before,
        q_star_minus_one: q_star_minus_one_from_fundamental(&fundamental, omega_start, omega_left_on),
        min_omega2: sink.min_w2,
        violations: sink.tracker.map(ViolationTracker::finish).unwrap_or_default(),
        held_steps: sink.steps,
    })
}

/// Holds the final level from `tn` on, in sub-steps of a period, until the output has
/// settled within `band` of `target` in omega²; the last point is the target itself.
/// Returns the time it settled.
#[expect(clippy::too_many_arguments, reason = "the settling tail of one playing, kept apart for length")]
fn settle(
    sink: &mut TrapSink,
    stage: &mut Stage,
    cal: &DriveCalibration,
    final_drive: f64,
    tn: f64,
    rate: f64,
    n: usize,
    target: f64,
    band: f64,
) -> Result<f64> {
    let h = 1.0 / rate / ANALOG_SUBSTEPS as f64;
    let mut t = tn;
    let mut points = n * ANALOG_SUBSTEPS;
    let most = MAX_SAMPLES as usize;
    loop {
        // slew_step lands exactly on its target once it reaches it.
        #[expect(clippy::float_cmp, reason = "the slew stage sets its output to the target exactly")]
        let reached = stage.slew.is_none_or(|_| stage.ys == final_drive);
        if reached && (omega2_at(cal, stage.output(), t)? - target).abs() < band {
            break;
        }
        if points >= most {
            return Err(PhysicsError::invalid(
                "output stage",
                format!("still {:e} s after the final level starts", t - tn),
                format!(
                    "settled on the final level within {most:e} held steps in all; shorten the low-pass time constant or raise the slew limit"
                ),
            ));
        }
        let (mean, _) = stage.step(final_drive, h);
        sink.point(t, omega2_at(cal, mean, t)?);
        points += 1;
        t = tn + (points - n * ANALOG_SUBSTEPS) as f64 * h;
    }
    sink.point(t, target);
    Ok(t)
}

/// Plays a ramp through the whole chain and keeps the tables (the trap as played and
/// the generator's samples); see [`play_streaming`].
pub fn play_through(ramp: &Ramp, pb: &Playback, tolerance: f64) -> Result<Played> {
    play_streaming(ramp, pb, tolerance, &Keep { tables: true, ..Keep::default() })
}

/// The played trap as a held table of omega², with the trap before and the trap left on
/// as its end frequencies.
pub fn play(ramp: &Ramp, pb: &Playback, tolerance: f64) -> Result<SampledRamp> {
    let played = play_streaming(ramp, pb, tolerance, &Keep { tables: true, ..Keep::default() })?;
    played.trap.ok_or_else(|| PhysicsError::invalid("played trap", "not kept", "a playing that keeps its table"))
}
