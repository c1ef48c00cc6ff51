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
}

/// The played waveform with what happened on the way.
#[derive(Debug, Clone, PartialEq)]
pub struct Played {
    /// omega² as the trap sees it, held (left sample-and-hold rows, sub-steps where an
    /// output stage acts), from t = 0 until the output has settled on the final level;
    /// its end frequencies are the trap before the ramp (the initial level) and the trap
    /// the final level leaves on.
    pub trap: SampledRamp,
    /// The generator's samples.
    pub samples: DriveSamples,
    /// Periods in which the slew limit kept the output from reaching its level.
    pub slew_limited_periods: usize,
    /// Duration as played, N/R, s.
    pub played_duration_s: f64,
    /// omega of the initial level (the trap before t = 0), rad/s.
    pub omega_start: f64,
    /// omega of the final level: the trap the generator leaves on, rad/s.
    pub omega_left_on: f64,
}

impl Played {
    /// When the output had settled on the final level (the table's last row), s.
    pub fn settled_at_s(&self) -> f64 {
        self.trap.times().last().copied().unwrap_or(0.0)
    }
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

/// Edges 0..=n at k/rate, jittered after the first.
fn edges(n: usize, rate: f64, jitter: Option<Jitter>) -> Result<Vec<f64>> {
    let mut times: Vec<f64> = (0..=n).map(|k| k as f64 / rate).collect();
    if let Some(j) = jitter {
        let limit = jitter_limit(rate);
        if !(j.rms.is_finite() && j.rms >= 0.0 && j.rms <= limit) {
            return Err(PhysicsError::invalid(
                "clock jitter rms",
                format!("{:e} s", j.rms),
                format!("0 to an eighth of the sample period, {limit:e} s at {rate:e} samples/s"),
            ));
        }
        let mut rng = StdRng::seed_from_u64(j.seed);
        for t in times.iter_mut().skip(1) {
            let z: f64 = StandardNormal.sample(&mut rng);
            *t += j.rms * z;
        }
        for k in 1..=n {
            if times[k] <= times[k - 1] {
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

/// The generator's samples of a ramp: N = round(tau R) samples taken at k/R (left) or
/// (k + 1/2)/R (midpoint), the value just after a jump where a sample falls on one,
/// then the final level (omega_f²) as sample N; each through calibration and
/// quantisation.
pub fn drive_samples(ramp: &Ramp, pb: &Playback) -> Result<DriveSamples> {
    let rate = require_positive("sample rate", pb.rate)?;
    pb.calibration.validate()?;
    let tau = ramp.duration();
    let n = periods(tau, rate);
    if n > MAX_SAMPLES {
        return Err(PhysicsError::invalid(
            "sample rate",
            format!("{rate:e} samples/s"),
            format!("at most {:e} samples/s for this ramp ({MAX_SAMPLES:e} samples)", MAX_SAMPLES / tau),
        ));
    }
    let n = n as usize;
    let mut drive = Vec::with_capacity(n + 1);
    for k in 0..n {
        let ts = match pb.point {
            SamplePoint::Left => k as f64 / rate,
            SamplePoint::Midpoint => (k as f64 + 0.5) / rate,
        }
        .min(tau);
        drive.push(level(pb, ramp.omega2(ts), &|| format!("drive at sample {k} (t = {ts:e} s)"))?);
    }
    drive.push(level(pb, ramp.omega_final().powi(2), &|| format!("final level (sample {n})"))?);
    let mut drive_before = level(pb, ramp.omega_initial().powi(2), &|| "initial level (before t = 0)".to_string())?;
    let (mut codes, mut code_before) = (None, None);
    if let Some((bits, lo, hi)) = pb.quantisation {
        check_quantisation(bits, lo, hi)?;
        let levels = 2f64.powi(bits.cast_signed()) - 1.0;
        let step = (hi - lo) / levels;
        let quantise = |v: &mut f64, place: &dyn Fn() -> String| -> Result<u32> {
            if *v < lo - 1e-12 * step || *v > hi + 1e-12 * step {
                return Err(PhysicsError::invalid(
                    place(),
                    format!("{:e}", *v),
                    format!("inside the full-scale range [{lo:e}, {hi:e}] drive units; it is not clipped"),
                ));
            }
            let code = ((*v - lo) / step).round().clamp(0.0, levels);
            *v = lo + code * step;
            Ok(code as u32)
        };
        let mut c = Vec::with_capacity(n + 1);
        for (k, v) in drive.iter_mut().enumerate() {
            c.push(quantise(v, &|| {
                if k < n {
                    format!("drive at sample {k} (t = {:e} s)", k as f64 / rate)
                } else {
                    format!("final level (sample {n})")
                }
            })?);
        }
        code_before = Some(quantise(&mut drive_before, &|| "initial level (before t = 0)".to_string())?);
        codes = Some(c);
    }
    Ok(DriveSamples { rate, times: edges(n, rate, pb.jitter)?, drive, codes, drive_before, code_before })
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

/// The analog output stage (slew limit, then low-pass), started at the initial level.
struct Stage {
    slew: Option<f64>,
    tf: Option<f64>,
    ys: f64,
    yl: f64,
}

impl Stage {
    /// Drives the stage with `x` for `h` seconds: (mean output, whether the slew fell short).
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
            // The filter sees the slewing stage's mean over the sub-step.
            Some(tf) => {
                let (end, mean) = low_pass_step(self.yl, mean_in, tf, h);
                self.yl = end;
                mean
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
fn omega2_at(cal: &DriveCalibration, d: f64, t: f64) -> Result<f64> {
    cal.omega2_of(d).map_err(|e| PhysicsError::invalid(format!("output at t = {t:e} s"), d, e.to_string()))
}

/// The trap as the output stage (slew, low-pass) delivers it: held sub-steps over the
/// N periods, then the final level until the output has settled within `band` of
/// `target` in omega². Returns (times, omega², slew-limited periods).
fn through_stage(
    s: &DriveSamples,
    mut stage: Stage,
    cal: &DriveCalibration,
    target: f64,
    band: f64,
    duration: f64,
) -> Result<(Vec<f64>, Vec<f64>, usize)> {
    let n = s.periods();
    if ((n + 1) * ANALOG_SUBSTEPS) as f64 > MAX_SAMPLES {
        return Err(PhysicsError::invalid(
            "sample rate",
            format!("{:e} samples/s", s.rate),
            format!(
                "at most {:e} samples/s for this ramp with a slew limit or low-pass ({MAX_SAMPLES:e} held steps of {ANALOG_SUBSTEPS} per sample)",
                MAX_SAMPLES / ANALOG_SUBSTEPS as f64 / duration
            ),
        ));
    }
    let mut times = Vec::with_capacity((n + 1) * ANALOG_SUBSTEPS);
    let mut values = Vec::with_capacity((n + 1) * ANALOG_SUBSTEPS);
    let mut limited = 0;
    for k in 0..n {
        let (t0, t1) = (s.times[k], s.times[k + 1]);
        let h = (t1 - t0) / ANALOG_SUBSTEPS as f64;
        let mut short = false;
        for j in 0..ANALOG_SUBSTEPS {
            let t = t0 + j as f64 * h;
            let (mean, fell_short) = stage.step(s.drive[k], h);
            short |= fell_short && j + 1 == ANALOG_SUBSTEPS;
            times.push(t);
            values.push(omega2_at(cal, mean, t)?);
        }
        limited += usize::from(short);
    }
    // The final level, held until the output has settled on it.
    let final_drive = s.drive[n];
    let h = 1.0 / s.rate / ANALOG_SUBSTEPS as f64;
    let mut t = s.times[n];
    let most = MAX_SAMPLES as usize;
    loop {
        // slew_step lands exactly on its target once it reaches it.
        #[expect(clippy::float_cmp, reason = "the slew stage sets its output to the target exactly")]
        let reached = stage.slew.is_none_or(|_| stage.ys == final_drive);
        if reached && (omega2_at(cal, stage.output(), t)? - target).abs() < band {
            break;
        }
        if times.len() >= most {
            return Err(PhysicsError::invalid(
                "output stage",
                format!("still {:e} s after the final level starts", t - s.times[n]),
                format!(
                    "settled on the final level within {most:e} held steps in all; shorten the low-pass time constant or raise the slew limit"
                ),
            ));
        }
        let (mean, _) = stage.step(final_drive, h);
        times.push(t);
        values.push(omega2_at(cal, mean, t)?);
        t = s.times[n] + (times.len() - n * ANALOG_SUBSTEPS) as f64 * h;
    }
    times.push(t);
    values.push(target);
    Ok((times, values, limited))
}

/// Plays a ramp through the whole chain: the generator's samples, the output stage,
/// and the final level held until the output has settled within
/// [`SETTLE_FRACTION`] · `tolerance` of it in omega².
pub fn play_through(ramp: &Ramp, pb: &Playback, tolerance: f64) -> Result<Played> {
    let tolerance = check_tolerance(tolerance)?;
    let samples = drive_samples(ramp, pb)?;
    let slew = pb.slew.map(|v| require_positive("slew limit", v)).transpose()?;
    let tf = pb.low_pass.map(|v| require_positive("low-pass time constant", v)).transpose()?;
    let cal = &pb.calibration;
    let positive = |w2: f64, what: &str| {
        if w2 > 0.0 {
            Ok(w2.sqrt())
        } else {
            Err(PhysicsError::invalid(
                what,
                format!("omega² = {w2:e} (rad/s)²"),
                "> 0 after calibration and quantisation (the trap must confine)",
            ))
        }
    };
    let omega_start = positive(omega2_at(cal, samples.drive_before, 0.0)?, "initial level")?;
    let n = samples.periods();
    let omega_left_on = positive(omega2_at(cal, samples.drive[n], samples.times[n])?, "final level")?;
    let target = omega_left_on * omega_left_on;
    let (times, values, limited) = if slew.is_none() && tf.is_none() {
        let values = samples.drive.iter().zip(&samples.times).map(|(&d, &t)| omega2_at(cal, d, t));
        (samples.times.clone(), values.collect::<Result<Vec<f64>>>()?, 0)
    } else {
        let stage = Stage { slew, tf, ys: samples.drive_before, yl: samples.drive_before };
        through_stage(&samples, stage, cal, target, SETTLE_FRACTION * tolerance * target, ramp.duration())?
    };
    let trap = SampledRamp::with_stated_ends(
        times,
        values,
        SampledColumn::Omega2,
        SampledReading::Hold,
        omega_start,
        omega_left_on,
    )?;
    Ok(Played {
        trap,
        played_duration_s: n as f64 / samples.rate,
        samples,
        slew_limited_periods: limited,
        omega_start,
        omega_left_on,
    })
}

/// The played trap as a held table of omega², with the trap before and the trap left on
/// as its end frequencies.
pub fn play(ramp: &Ramp, pb: &Playback, tolerance: f64) -> Result<SampledRamp> {
    Ok(play_through(ramp, pb, tolerance)?.trap)
}
