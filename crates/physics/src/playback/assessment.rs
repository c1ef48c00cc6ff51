//! One judgement of a playing, shared by the command line and the app: designed against
//! played Q*, the trap the generator leaves on, the stated limits on the signals they
//! concern, clock-jitter spread, and the smallest sample rate and bit depth that keep
//! the tolerance, found by searches that never end the caller's command.

use super::chain::{ANALOG_SUBSTEPS, Keep, MAX_SAMPLES, Playback, Played, check_tolerance, periods, play_streaming};
use crate::diagnostics::{Verdict, q_star_minus_one};
use crate::error::{PhysicsError, Result};
use crate::limits::{TrapLimits, Violation, ViolationKind, find_violations};
use crate::propagate::PropagationOptions;
use crate::ramp::{Ramp, RampShape};
use rayon::prelude::*;

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
    /// Keep the tables of the main playing (the trap as played and the generator's
    /// samples) for a writer or a plot; the searches never keep any.
    pub keep_tables: bool,
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
            keep_tables: true,
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
    /// The trap's other axes as played (empty for a one-axis trap); see [`assess_axes`].
    pub other_axes: Vec<AxisPlayback>,
}

/// One further axis of the trap as the generator plays the reference axis's ramp.
#[derive(Debug, Clone, PartialEq)]
pub struct AxisPlayback {
    /// The axis's name.
    pub name: String,
    /// Q* - 1 of the designed ramp on this axis.
    pub designed_q_star_minus_one: f64,
    /// Q* - 1 as played on this axis (held initial level to the trap left on).
    pub played_q_star_minus_one: f64,
    /// Tolerance on Q* - 1.
    pub tolerance: f64,
    /// Smallest played omega_axis², (rad/s)².
    pub min_played_omega2: f64,
    /// The axis's trap before the ramp and the trap the final level leaves on, rad/s.
    pub omega_start: f64,
    /// The trap this axis is left on, rad/s.
    pub omega_left_on: f64,
    /// Broken bounds and inversion of this axis as played.
    pub violations: Vec<Violation>,
}

impl AxisPlayback {
    /// PASS, FAIL or BREAKS LIMITS on this axis.
    pub fn verdict(&self) -> Verdict {
        Verdict::of(
            self.played_q_star_minus_one <= self.tolerance,
            self.violations.iter().all(|v| v.kind == ViolationKind::Inverted),
        )
    }
}

/// Plays the reference axis's ramp once per further axis and judges each axis's trap
/// (exact held steps on omega_axis² = gain omega² + offset of the played reference trap).
pub fn assess_axes(
    designed: &Ramp,
    pb: &Playback,
    axes: &[crate::axes::TrapAxis],
    tolerance: f64,
    opts: &PropagationOptions,
) -> Result<Vec<AxisPlayback>> {
    let tolerance = check_tolerance(tolerance)?;
    axes.par_iter()
        .map(|axis| {
            let on_axis = |e: PhysicsError| PhysicsError::OnAxis { axis: axis.name.clone(), source: Box::new(e) };
            let keep =
                Keep { tables: false, bounds: Some(TrapLimits { slew_max: None, ..axis.limits }), axis: axis.law };
            let played = play_streaming(designed, pb, tolerance, &keep).map_err(on_axis)?;
            let designed_q = q_star_minus_one(&designed.on_axis(axis.law).map_err(on_axis)?, opts).map_err(on_axis)?;
            Ok(AxisPlayback {
                name: axis.name.clone(),
                designed_q_star_minus_one: designed_q,
                played_q_star_minus_one: played.q_star_minus_one,
                tolerance,
                min_played_omega2: played.min_omega2,
                omega_start: played.omega_start,
                omega_left_on: played.omega_left_on,
                violations: played.violations,
            })
        })
        .collect()
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
    /// PASS, FAIL or BREAKS LIMITS of the reference axis.
    pub fn verdict(&self) -> Verdict {
        Verdict::of(self.energy_diagonal(), self.within_limits())
    }

    /// The verdict of the whole trap, the worst axis's, and that axis's name (`None`
    /// for the reference axis, or when the trap has one axis).
    pub fn trap_verdict(&self) -> (Verdict, Option<&str>) {
        let rank = |v: Verdict| match v {
            Verdict::Pass => 0,
            Verdict::Fail => 1,
            Verdict::BreaksLimits => 2,
        };
        let mut worst = (self.verdict(), None, self.played_q_star_minus_one);
        for a in &self.other_axes {
            let v = a.verdict();
            if rank(v) > rank(worst.0) || rank(v) == rank(worst.0) && a.played_q_star_minus_one > worst.2 {
                worst = (v, Some(a.name.as_str()), a.played_q_star_minus_one);
            }
        }
        (worst.0, worst.1)
    }
}

/// Played Q* - 1 at these settings, or the reason it cannot be played (a streamed
/// playing: nothing per sample is stored).
fn excess(designed: &Ramp, pb: &Playback, tolerance: f64) -> Result<f64> {
    Ok(play_streaming(designed, pb, tolerance, &Keep::default())?.q_star_minus_one)
}

/// One grid point of a search: pass, fail with Q* - 1, or cannot be played.
enum Outcome {
    Pass,
    Fail(f64),
    Unplayable(PhysicsError),
}

fn outcome(result: Result<f64>, tolerance: f64) -> Outcome {
    match result {
        Ok(e) if e <= tolerance => Outcome::Pass,
        Ok(e) => Outcome::Fail(e),
        Err(err) => Outcome::Unplayable(err),
    }
}

/// Plays the next one or two points of a walk at once (one on each core), the second
/// speculatively: it is only looked at when the first passes.
fn two_at_once(
    first: impl FnOnce() -> Result<f64> + Send,
    second: Option<impl FnOnce() -> Result<f64> + Send>,
) -> (Result<f64>, Option<Result<f64>>) {
    match second {
        Some(g) => {
            let (a, b) = rayon::join(first, g);
            (a, Some(b))
        }
        None => (first(), None),
    }
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
    let _ = opts;
    minimum_rate_knowing(designed, pb, tolerance, ceiling, grid_ratio, None, cancelled)
}

/// [`minimum_rate`], reusing the main playing's Q* - 1 where the walk starts at its rate.
fn minimum_rate_knowing(
    designed: &Ramp,
    pb: &Playback,
    tolerance: f64,
    ceiling: f64,
    grid_ratio: f64,
    known: Option<f64>,
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
    // N = round(tau R): below 4 samples per ramp the grid ends.
    let on_grid = |r: f64| r >= floor && periods(tau, r) >= FEWEST_SAMPLES;
    let at = |r: f64| move || excess(designed, &Playback { rate: r, ..pb.clone() }, tolerance);
    #[expect(clippy::float_cmp, reason = "the walk starts exactly at the rate the main playing used")]
    let mut reuse = known.filter(|_| ceiling == pb.rate);
    let mut r = ceiling;
    let end = 'walk: loop {
        if cancelled() {
            break "cancelled".to_string();
        }
        let next = r / grid_ratio;
        let (first, second) = if let Some(e) = reuse.take() {
            (Ok(e), None)
        } else {
            let second = on_grid(next).then(|| at(next));
            out.plays += 1 + usize::from(second.is_some());
            two_at_once(at(r), second)
        };
        for (rate, result) in std::iter::once((r, first)).chain(second.map(|b| (next, b))) {
            match outcome(result, tolerance) {
                Outcome::Pass => out.min_rate = Some(rate),
                Outcome::Fail(e) => {
                    break 'walk format!("first failure walking down at {rate:.4e} samples/s (Q* - 1 = {e:.3e})");
                }
                Outcome::Unplayable(err) => {
                    break 'walk format!("first rate that cannot be played walking down: {rate:.4e} samples/s ({err})");
                }
            }
            r = rate;
        }
        let next = r / grid_ratio;
        if !on_grid(next) {
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
    let _ = opts;
    minimum_bits_knowing(designed, pb, tolerance, None, cancelled)
}

/// [`minimum_bits`], reusing the main playing's Q* - 1 at its own depth.
fn minimum_bits_knowing(
    designed: &Ramp,
    pb: &Playback,
    tolerance: f64,
    known: Option<f64>,
    cancelled: &dyn Fn() -> bool,
) -> Result<BitsSearch> {
    let tolerance = check_tolerance(tolerance)?;
    let Some((played_bits, lo, hi)) = pb.quantisation else {
        return Err(PhysicsError::invalid("quantisation", "none", "a full-scale range to quantise over"));
    };
    let mut out = BitsSearch { min_bits: None, plays: 0, note: String::new() };
    let at =
        |bits: u32| move || excess(designed, &Playback { quantisation: Some((bits, lo, hi)), ..pb.clone() }, tolerance);
    let mut bits = 32;
    while bits >= 1 {
        if cancelled() {
            out.note = "cancelled".into();
            return Ok(out);
        }
        let (first, second) = if let Some(e) = known.filter(|_| bits == played_bits) {
            (Ok(e), None)
        } else {
            let next = (bits > 1 && bits - 1 != played_bits).then(|| at(bits - 1));
            out.plays += 1 + usize::from(next.is_some());
            two_at_once(at(bits), next)
        };
        for (b, result) in std::iter::once((bits, first)).chain(second.map(|r| (bits - 1, r))) {
            match outcome(result, tolerance) {
                Outcome::Pass => out.min_bits = Some(b),
                Outcome::Fail(e) => {
                    out.note = format!("first failure walking down at {b} bits (Q* - 1 = {e:.3e})");
                    return Ok(out);
                }
                Outcome::Unplayable(err) => {
                    out.note = format!("{b} bits cannot be played ({err})");
                    return Ok(out);
                }
            }
            bits = b - 1;
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
    let _ = opts;
    // Realisations in parallel (rayon); summed in seed order, so the mean does not
    // depend on the number of threads.
    let each: Vec<f64> = (0..trials)
        .into_par_iter()
        .map(|k| {
            let jk = super::Jitter { seed: j.seed.wrapping_add(k as u64), ..j };
            excess(designed, &Playback { jitter: Some(jk), ..pb.clone() }, tolerance)
        })
        .collect::<Result<_>>()?;
    let sum: f64 = each.iter().sum();
    let worst = each.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    Ok(JitterSpread { mean_q_star_minus_one: sum / trials as f64, worst_q_star_minus_one: worst, trials })
}

/// Plays a ramp and judges the playing on every axis of the trap: [`assess`] on the
/// reference axis, then [`assess_axes`] on `other_axes` (empty for a one-axis trap).
/// The one judgement behind every file written for the apparatus.
pub fn assess_trap(
    designed: &Ramp,
    pb: &Playback,
    settings: &AssessmentSettings,
    other_axes: &[crate::axes::TrapAxis],
    opts: &PropagationOptions,
    cancelled: &dyn Fn() -> bool,
) -> Result<PlaybackAssessment> {
    let mut a = assess(designed, pb, settings, opts, cancelled)?;
    if !other_axes.is_empty() {
        a.other_axes = assess_axes(designed, pb, other_axes, settings.tolerance, opts)?;
    }
    Ok(a)
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
    let bounds = TrapLimits { slew_max: None, ..settings.limits };
    let keep = Keep { tables: settings.keep_tables, bounds: Some(bounds), ..Keep::default() };
    let played = play_streaming(designed, pb, tolerance, &keep)?;
    let designed_q_star_minus_one = q_star_minus_one(designed, opts)?;
    let played_q_star_minus_one = played.q_star_minus_one;
    let mut violations = played.violations.clone();
    if settings.limits.slew_max.is_some() {
        let slew_only = TrapLimits { omega_min: None, omega_max: None, ..settings.limits };
        violations.extend(
            find_violations(designed, &slew_only, &designed.grid_with_breakpoints(4001))
                .into_iter()
                .filter(|v| v.kind == ViolationKind::Slew),
        );
        violations.sort_by(|a, b| a.start.total_cmp(&b.start));
    }
    let min_played_omega2 = played.min_omega2;
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
        // The walk's first rate is often the one played: its playing is the same one.
        let known = Some(played_q_star_minus_one);
        Some(minimum_rate_knowing(designed, pb, tolerance, ceiling, settings.grid_ratio, known, cancelled)?)
    };
    let bits_search = match (settings.searches, pb.quantisation.is_some()) {
        (true, true) if design_fails => Some(BitsSearch { min_bits: None, plays: 0, note: skipped() }),
        (true, true) => Some(minimum_bits_knowing(designed, pb, tolerance, Some(played_q_star_minus_one), cancelled)?),
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
        other_axes: Vec::new(),
    })
}
