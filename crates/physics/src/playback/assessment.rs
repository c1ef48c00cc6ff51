//! One judgement of a playing, shared by the command line and the app: designed against
//! played Q*, the trap the generator leaves on, the stated limits on the signals they
//! concern, clock-jitter spread, and the smallest sample rate and bit depth that keep
//! the tolerance, found by searches that never end the caller's command.

use super::chain::{ANALOG_SUBSTEPS, MAX_SAMPLES, Playback, Played, check_tolerance, periods, play, play_through};
use crate::diagnostics::{Verdict, q_star_minus_one};
use crate::error::{PhysicsError, Result};
use crate::limits::{TrapLimits, Violation, ViolationKind, find_violations};
use crate::propagate::PropagationOptions;
use crate::ramp::{Ramp, RampShape};

/// Default ratio of neighbouring rates on the rate-search grid.
pub const DEFAULT_GRID_RATIO: f64 = 1.05;

/// Default number of clock-jitter realisations averaged.
pub const DEFAULT_JITTER_TRIALS: usize = 20;

/// Smallest number of samples per ramp the rate search walks down to.
pub const FEWEST_SAMPLES: f64 = 4.0;

/// What to judge a playing against.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AssessmentSettings {
    /// Tolerance on Q* - 1, in (0, 1).
    pub tolerance: f64,
    /// Stated limits: bounds are checked on the played trap, the slew limit on the
    /// designed ramp.
    pub limits: TrapLimits,
    /// Highest rate the rate search starts from, samples/s; `None`: the rate played.
    pub max_rate: Option<f64>,
    /// Ratio of neighbouring rates on the search grid, > 1.
    pub grid_ratio: f64,
    /// Clock-jitter realisations averaged when the playback has jitter, 1..=10000.
    pub jitter_trials: usize,
    /// Whether to run the rate and bit-depth searches.
    pub searches: bool,
}

impl Default for AssessmentSettings {
    fn default() -> Self {
        Self {
            tolerance: crate::diagnostics::DEFAULT_TOLERANCE,
            limits: TrapLimits::default(),
            max_rate: None,
            grid_ratio: DEFAULT_GRID_RATIO,
            jitter_trials: DEFAULT_JITTER_TRIALS,
            searches: true,
        }
    }
}

/// The smallest rate R* on a geometric grid below a ceiling such that every grid rate
/// from R* up to the ceiling passes.
#[derive(Debug, Clone, PartialEq)]
pub struct RateSearch {
    /// R*, samples/s; `None` when no rate qualifies or the search was skipped (see `note`).
    pub min_rate: Option<f64>,
    /// Ratio of neighbouring grid rates.
    pub grid_ratio: f64,
    /// The rate the walk started from, samples/s.
    pub ceiling: f64,
    /// Plays the walk took.
    pub plays: usize,
    /// Why the walk ended where it did, or why it did not run.
    pub note: String,
}

/// The smallest bit depth b such that every depth from b to 32 passes at the rate played.
#[derive(Debug, Clone, PartialEq)]
pub struct BitsSearch {
    /// b; `None` when even 32 bits fail or the search was skipped (see `note`).
    pub min_bits: Option<u32>,
    /// Plays the walk took.
    pub plays: usize,
    /// Why the walk ended where it did, or why it did not run.
    pub note: String,
}

/// Q* - 1 over clock-jitter realisations.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct JitterSpread {
    /// Mean Q* - 1.
    pub mean_q_star_minus_one: f64,
    /// Worst Q* - 1.
    pub worst_q_star_minus_one: f64,
    /// Realisations (seeds seed, seed + 1, ...).
    pub trials: usize,
}

/// A ramp as the generator plays it, judged.
#[derive(Debug, Clone, PartialEq)]
pub struct PlaybackAssessment {
    /// The playing itself: samples, the trap as played, the trap left on.
    pub played: Played,
    /// Q* - 1 of the designed ramp (in omega_f), without cancellation.
    pub designed_q_star_minus_one: f64,
    /// Q* - 1 as played, from the held initial level to the trap the final level
    /// leaves on, after the output settled; without cancellation.
    pub played_q_star_minus_one: f64,
    /// Tolerance on Q* - 1.
    pub tolerance: f64,
    /// The designed final frequency omega_f, rad/s.
    pub omega_final_designed: f64,
    /// Broken limits: bounds and inversion on the played trap, slew on the designed ramp.
    pub violations: Vec<Violation>,
    /// Smallest played omega², (rad/s)².
    pub min_played_omega2: f64,
    /// Q* spread over clock-jitter realisations, when the playback has jitter.
    pub jitter: Option<JitterSpread>,
    /// The rate search, unless it was not asked for.
    pub rate_search: Option<RateSearch>,
    /// The bit-depth search, when the drive is quantised and searches were asked for.
    pub bits_search: Option<BitsSearch>,
}

impl PlaybackAssessment {
    /// Q* of the designed ramp.
    pub fn designed_q_star(&self) -> f64 {
        1.0 + self.designed_q_star_minus_one
    }
    /// Q* as played, in the trap left on.
    pub fn played_q_star(&self) -> f64 {
        1.0 + self.played_q_star_minus_one
    }
    /// omega_left_on / omega_f - 1.
    pub fn final_frequency_error(&self) -> f64 {
        self.played.omega_left_on / self.omega_final_designed - 1.0
    }
    /// Played Q* - 1 <= tolerance.
    pub fn energy_diagonal(&self) -> bool {
        self.played_q_star_minus_one <= self.tolerance
    }
    /// No stated limit broken (an inverted stretch alone does not count).
    pub fn within_limits(&self) -> bool {
        self.violations.iter().all(|v| v.kind == ViolationKind::Inverted)
    }
    /// Whether the played trap inverts (omega² <= 0) somewhere.
    pub fn inverts(&self) -> bool {
        self.min_played_omega2 <= 0.0
    }
    /// PASS, FAIL or BREAKS LIMITS.
    pub fn verdict(&self) -> Verdict {
        Verdict::of(self.energy_diagonal(), self.within_limits())
    }
}

/// Played Q* - 1 at these settings, or the reason it cannot be played.
fn excess(designed: &Ramp, pb: &Playback, tolerance: f64, opts: &PropagationOptions) -> Result<f64> {
    q_star_minus_one(&Ramp::Sampled(play(designed, pb, tolerance)?), opts)
}

/// Walks a geometric grid down from `ceiling` (ratio `grid_ratio`) and stops at the
/// first rate that fails (or cannot be played) or at 4 samples per ramp; the smallest
/// rate before that failure is R*. `cancelled` is polled before every play.
pub fn minimum_rate(
    designed: &Ramp,
    pb: &Playback,
    tolerance: f64,
    ceiling: f64,
    grid_ratio: f64,
    opts: &PropagationOptions,
    cancelled: &dyn Fn() -> bool,
) -> Result<RateSearch> {
    let tolerance = check_tolerance(tolerance)?;
    if !(grid_ratio.is_finite() && grid_ratio > 1.0 && grid_ratio <= 2.0) {
        return Err(PhysicsError::invalid("rate grid ratio", grid_ratio, "a number above 1, at most 2"));
    }
    if !(ceiling.is_finite() && ceiling > 0.0) {
        return Err(PhysicsError::invalid("maximum rate", ceiling, "a finite number of samples/s > 0"));
    }
    let tau = designed.duration();
    let floor = FEWEST_SAMPLES / tau;
    let mut ceiling = ceiling;
    let mut caps = Vec::new();
    if let Some(j) = pb.jitter.filter(|j| j.rms > 0.0) {
        let cap = 1.0 / (8.0 * j.rms);
        if ceiling > cap {
            ceiling = cap;
            caps.push(format!("capped at {cap:.4e} samples/s, where the clock jitter reaches an eighth of a period"));
        }
    }
    let analog = pb.slew.is_some() || pb.low_pass.is_some();
    let cap = MAX_SAMPLES / tau / if analog { ANALOG_SUBSTEPS as f64 } else { 1.0 };
    if ceiling > cap {
        ceiling = cap;
        caps.push(format!("capped at {cap:.4e} samples/s ({MAX_SAMPLES:e} held steps)"));
    }
    let mut out = RateSearch { min_rate: None, grid_ratio, ceiling, plays: 0, note: String::new() };
    if ceiling < floor {
        out.note = format!("the ceiling {ceiling:.4e} samples/s gives fewer than {FEWEST_SAMPLES} samples per ramp");
        return Ok(out);
    }
    let mut r = ceiling;
    let end = loop {
        if cancelled() {
            break "cancelled".to_string();
        }
        out.plays += 1;
        match excess(designed, &Playback { rate: r, ..pb.clone() }, tolerance, opts) {
            Ok(e) if e <= tolerance => out.min_rate = Some(r),
            Ok(e) => {
                break format!("first failure walking down at {r:.4e} samples/s (Q* - 1 = {e:.3e})");
            }
            Err(err) => break format!("first rate that cannot be played walking down: {r:.4e} samples/s ({err})"),
        }
        let next = r / grid_ratio;
        // N = round(tau R): below 4 samples per ramp the grid ends.
        if next < floor || periods(tau, next) < FEWEST_SAMPLES {
            break format!("reached {FEWEST_SAMPLES} samples per ramp without a failure");
        }
        r = next;
    };
    caps.push(end);
    out.note = caps.join("; ");
    Ok(out)
}

/// Walks bit depths down from 32 at the playback's rate and full scale and stops at the
/// first failure; the depth above it is b*.
pub fn minimum_bits(
    designed: &Ramp,
    pb: &Playback,
    tolerance: f64,
    opts: &PropagationOptions,
    cancelled: &dyn Fn() -> bool,
) -> Result<BitsSearch> {
    let tolerance = check_tolerance(tolerance)?;
    let Some((_, lo, hi)) = pb.quantisation else {
        return Err(PhysicsError::invalid("quantisation", "none", "a full-scale range to quantise over"));
    };
    let mut out = BitsSearch { min_bits: None, plays: 0, note: String::new() };
    for bits in (1..=32).rev() {
        if cancelled() {
            out.note = "cancelled".into();
            return Ok(out);
        }
        out.plays += 1;
        let at = Playback { quantisation: Some((bits, lo, hi)), ..pb.clone() };
        match excess(designed, &at, tolerance, opts) {
            Ok(e) if e <= tolerance => out.min_bits = Some(bits),
            Ok(e) => {
                out.note = format!("first failure walking down at {bits} bits (Q* - 1 = {e:.3e})");
                return Ok(out);
            }
            Err(err) => {
                out.note = format!("{bits} bits cannot be played ({err})");
                return Ok(out);
            }
        }
    }
    out.note = "every depth from 1 to 32 bits passes".into();
    Ok(out)
}

/// Q* - 1 over `trials` jitter realisations (seeds seed, seed + 1, ...).
pub fn jitter_q_star(
    designed: &Ramp,
    pb: &Playback,
    trials: usize,
    tolerance: f64,
    opts: &PropagationOptions,
) -> Result<JitterSpread> {
    let Some(j) = pb.jitter else {
        return Err(PhysicsError::invalid("clock jitter", "none", "an rms edge offset to sample"));
    };
    if !(1..=10_000).contains(&trials) {
        return Err(PhysicsError::invalid("jitter trials", trials, "1 to 10000"));
    }
    let mut sum = 0.0;
    let mut worst = f64::NEG_INFINITY;
    for k in 0..trials {
        let jk = super::Jitter { seed: j.seed.wrapping_add(k as u64), ..j };
        let q = excess(designed, &Playback { jitter: Some(jk), ..pb.clone() }, tolerance, opts)?;
        sum += q;
        worst = worst.max(q);
    }
    Ok(JitterSpread { mean_q_star_minus_one: sum / trials as f64, worst_q_star_minus_one: worst, trials })
}

/// Plays a ramp and judges the playing. Errors only where the ramp truly cannot be
/// played at these settings (an inverted trap on a drive that cannot go negative, a
/// level outside the full scale or the calibration); the searches report their own
/// end and never fail the call.
pub fn assess(
    designed: &Ramp,
    pb: &Playback,
    settings: &AssessmentSettings,
    opts: &PropagationOptions,
    cancelled: &dyn Fn() -> bool,
) -> Result<PlaybackAssessment> {
    let tolerance = check_tolerance(settings.tolerance)?;
    let played = play_through(designed, pb, tolerance)?;
    let designed_q_star_minus_one = q_star_minus_one(designed, opts)?;
    let trap = Ramp::Sampled(played.trap.clone());
    let played_q_star_minus_one = q_star_minus_one(&trap, opts)?;
    let bounds = TrapLimits { slew_max: None, ..settings.limits };
    let mut violations = find_violations(&trap, &bounds, played.trap.times());
    if settings.limits.slew_max.is_some() {
        let slew_only = TrapLimits { omega_min: None, omega_max: None, ..settings.limits };
        violations.extend(
            find_violations(designed, &slew_only, &designed.grid_with_breakpoints(4001))
                .into_iter()
                .filter(|v| v.kind == ViolationKind::Slew),
        );
        violations.sort_by(|a, b| a.start.total_cmp(&b.start));
    }
    let min_played_omega2 = played.trap.omega2_rows().iter().copied().fold(f64::INFINITY, f64::min);
    let jitter = match pb.jitter {
        Some(j) if j.rms > 0.0 => Some(jitter_q_star(designed, pb, settings.jitter_trials, tolerance, opts)?),
        _ => None,
    };
    let design_fails = designed_q_star_minus_one > tolerance;
    let skipped = || {
        format!(
            "not searched: the design itself fails the tolerance (designed Q* - 1 = {designed_q_star_minus_one:.3e} > {tolerance:e})"
        )
    };
    let ceiling = settings.max_rate.unwrap_or(pb.rate);
    let rate_search = if !settings.searches {
        None
    } else if design_fails {
        Some(RateSearch { min_rate: None, grid_ratio: settings.grid_ratio, ceiling, plays: 0, note: skipped() })
    } else {
        Some(minimum_rate(designed, pb, tolerance, ceiling, settings.grid_ratio, opts, cancelled)?)
    };
    let bits_search = match (settings.searches, pb.quantisation.is_some()) {
        (true, true) if design_fails => Some(BitsSearch { min_bits: None, plays: 0, note: skipped() }),
        (true, true) => Some(minimum_bits(designed, pb, tolerance, opts, cancelled)?),
        _ => None,
    };
    Ok(PlaybackAssessment {
        omega_final_designed: designed.omega_final(),
        played,
        designed_q_star_minus_one,
        played_q_star_minus_one,
        tolerance,
        violations,
        min_played_omega2,
        jitter,
        rate_search,
        bits_search,
    })
}
