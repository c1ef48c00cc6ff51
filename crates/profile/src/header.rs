//! The one header of every file written for the apparatus: what was played, how it is
//! read, what was checked, and the caution. Trap tables, drive files and DAC-code files
//! all open with these `#` lines.

use crate::units::{Quantity, format_quantity};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::limits::{TrapLimits, ViolationKind};
use quenchless_physics::playback::{DriveCalibration, Playback, PlaybackAssessment, SamplePoint};

/// The safety caution, shown before every export and written into every file for the
/// apparatus.
pub const CAUTION: &str = "CAUTION: this waveform drives real apparatus: high-voltage trap electrodes, high-power \
lasers, RF amplifiers and modulator drivers. Check it against the apparatus limits and interlocks, play it at low \
power first, and follow your local electrical and laser safety rules and your lab's licensed practice. Quenchless \
flags ramps that break the limits stated in the study and never clips them; it knows nothing of limits not stated.";

/// What a file holds, for its header.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileContent {
    /// The trap as played, one held row per step (omega or omega² columns).
    Trap,
    /// The generator's samples in drive units.
    Drive,
    /// The generator's samples as DAC codes.
    Codes,
}

/// Everything a header states.
#[derive(Debug, Clone, Copy)]
pub struct HeaderFacts<'a> {
    /// Study name, if the ramp came from a study.
    pub study: Option<&'a str>,
    /// Candidate or design name.
    pub candidate: &'a str,
    /// Family key (`shortcut`, `holds`, ...).
    pub family: &'a str,
    /// The generator settings played.
    pub playback: &'a Playback,
    /// Name of the drive unit.
    pub drive_unit: &'a str,
    /// The stated limits checked.
    pub limits: &'a TrapLimits,
    /// The judgement of the playing.
    pub assessment: &'a PlaybackAssessment,
    /// The designed duration, s.
    pub designed_duration_s: f64,
    /// The rate search's ceiling, samples/s (`None`: the rate played).
    pub max_rate: Option<f64>,
}

/// A number with at most 6 significant digits, no float noise.
pub fn plain(v: f64) -> String {
    if v == 0.0 {
        return "0".into();
    }
    if !v.is_finite() {
        return if v > 0.0 { "unbounded".into() } else { "-unbounded".into() };
    }
    let a = v.abs();
    if (1e-3..1e6).contains(&a) {
        let digits = (5 - a.log10().floor() as i32).max(0) as usize;
        let s = format!("{v:.digits$}");
        if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
    } else {
        let s = format!("{v:.5e}");
        let (m, e) = s.split_once('e').unwrap_or((&s, "0"));
        let m = if m.contains('.') { m.trim_end_matches('0').trim_end_matches('.') } else { m };
        format!("{m}e{e}")
    }
}

fn hz(omega: f64) -> String {
    format_quantity(omega / TWO_PI, Quantity::Frequency)
}

fn secs(t: f64) -> String {
    format_quantity(t, Quantity::Time)
}

/// The settings in words, with units.
pub fn settings_words(pb: &Playback, unit: &str, max_rate: Option<f64>) -> Vec<String> {
    let point = match pb.point {
        SamplePoint::Left => "each sample taken at the start of its period",
        SamplePoint::Midpoint => "each sample taken at the middle of its period",
    };
    let calibration = match &pb.calibration {
        DriveCalibration::Omega2 { gain } => format!("drive = {} {unit} per (rad/s)^2 times omega^2", plain(*gain)),
        DriveCalibration::Table { omega, .. } => format!(
            "measured table of {} rows, {} to {}, read linearly",
            omega.len(),
            hz(omega[0]),
            hz(omega[omega.len() - 1])
        ),
    };
    let plain_omega2 = pb.calibration == DriveCalibration::default() && pb.quantisation.is_none();
    let quantisation = match pb.quantisation {
        Some((bits, lo, hi)) => format!("{bits} bits over {} to {} {unit}", plain(lo), plain(hi)),
        None => "none (levels not quantised)".into(),
    };
    vec![
        format!("generator: {} samples/s, {point}", plain(pb.rate)),
        if plain_omega2 {
            format!(
                "drive: omega^2 itself, in (rad/s)^2, {}; no calibration; quantisation: none (levels not quantised)",
                if pb.allows_negative { "can go negative" } else { "cannot go negative" }
            )
        } else {
            format!(
                "drive: {unit}, {}; calibration: {calibration}; quantisation: {quantisation}",
                if pb.allows_negative { "can go negative" } else { "cannot go negative" }
            )
        },
        format!(
            "output stage: slew limit {}; low-pass {}; clock jitter {}",
            pb.slew.map_or_else(|| "none".into(), |s| format!("{} {unit}/s", plain(s))),
            pb.low_pass.map_or_else(|| "none".into(), |t| format!("time constant {}", secs(t))),
            pb.jitter
                .filter(|j| j.rms > 0.0)
                .map_or_else(|| "none".into(), |j| format!("{} rms (seed {})", secs(j.rms), j.seed))
        ),
        format!(
            "rate search ceiling (maximum rate): {}",
            max_rate.map_or_else(|| "the rate played".into(), |r| format!("{} samples/s", plain(r)))
        ),
    ]
}

/// The checks in words: Q*, the trap left on, limits, inversion, verdict. Printed on
/// screen by every command that writes a file, and written into the file.
pub fn check_words(a: &PlaybackAssessment, limits: &TrapLimits) -> Vec<String> {
    let p = &a.played;
    let settle = p.settled_at_s() - p.final_level_start_s;
    let error = a.final_frequency_error();
    let mut out = vec![
        format!(
            "Q*: designed {:.12}, as played {:.12} (Q* - 1 = {:.3e}, tolerance {}), taken in the trap left on {}",
            a.designed_q_star(),
            a.played_q_star(),
            a.played_q_star_minus_one,
            plain(a.tolerance),
            if settle > 0.0 {
                format!("once the output settled, {} after the final level starts", secs(settle))
            } else {
                "from the moment the final level starts".to_string()
            },
        ),
        format!(
            "trap before t = 0: {}; trap left on: {} against the designed {} ({})",
            hz(p.omega_start),
            hz(p.omega_left_on),
            hz(a.omega_final_designed),
            if error == 0.0 { "exactly".to_string() } else { format!("relative error {error:+.3e}") }
        ),
    ];
    let stated = |v: Option<f64>, f: &dyn Fn(f64) -> String| v.map_or_else(|| "not stated".to_string(), f);
    out.push(format!(
        "stated limits: lowest {}, highest {}, slew {} (bounds checked on the played trap, slew on the designed ramp)",
        stated(limits.omega_min, &hz),
        stated(limits.omega_max, &hz),
        stated(limits.slew_max, &|s| format!("{} Hz/s", plain(s / TWO_PI)))
    ));
    let broken: Vec<_> = a.violations.iter().filter(|v| v.kind != ViolationKind::Inverted).collect();
    if broken.is_empty() {
        out.push("limits broken: none".into());
    }
    for v in broken {
        let worst = match v.worst_as_stated() {
            None => "a jump".to_string(),
            Some((w, "Hz")) => format_quantity(w, Quantity::Frequency),
            Some((w, unit)) => format!("{} {unit}", plain(w)),
        };
        out.push(format!(
            "LIMIT BROKEN: {} from {} to {} (worst {worst})",
            v.kind.describe(),
            secs(v.start),
            secs(v.end)
        ));
    }
    let inverted: Vec<_> = a.violations.iter().filter(|v| v.kind == ViolationKind::Inverted).collect();
    if inverted.is_empty() {
        out.push("inversion: the played trap never inverts (omega^2 > 0 throughout)".into());
    }
    for v in inverted {
        out.push(format!(
            "INVERTS: the played trap is inverted (omega^2 <= 0) from {} to {} (lowest omega^2 {} (rad/s)^2)",
            secs(v.start),
            secs(v.end),
            plain(v.worst)
        ));
    }
    if let Some(j) = a.jitter {
        out.push(format!(
            "clock jitter: mean Q* - 1 = {:.3e}, worst {:.3e} over {} realisations",
            j.mean_q_star_minus_one, j.worst_q_star_minus_one, j.trials
        ));
    }
    if let Some(r) = &a.rate_search {
        out.push(match r.min_rate {
            Some(m) => format!(
                "smallest rate: {} samples/s (every rate on a x{} grid from there up to {} samples/s passes; {} plays; {})",
                plain(m),
                plain(r.grid_ratio),
                plain(r.ceiling),
                r.plays,
                r.note
            ),
            None => format!("smallest rate: none ({})", r.note),
        });
    }
    if let Some(b) = &a.bits_search {
        out.push(match b.min_bits {
            Some(m) => {
                format!("smallest bit depth: {m} (every depth from {m} to 32 passes at the rate played; {})", b.note)
            }
            None => format!("smallest bit depth: none ({})", b.note),
        });
    }
    out.extend(axis_lines(a));
    out.push(verdict_line(a));
    out
}

/// One line per further axis of the trap as played.
fn axis_lines(a: &PlaybackAssessment) -> Vec<String> {
    let mut out = Vec::new();
    for x in &a.other_axes {
        let broken = x.violations.iter().filter(|v| v.kind != ViolationKind::Inverted).count();
        let inverts = x.min_played_omega2 <= 0.0;
        out.push(format!(
            "axis {}: Q* designed {:.12}, as played {:.12} (Q* - 1 = {:.3e}); trap before t = 0 {}, left on {}; {}{}: {}",
            x.name,
            1.0 + x.designed_q_star_minus_one,
            1.0 + x.played_q_star_minus_one,
            x.played_q_star_minus_one,
            hz(x.omega_start),
            hz(x.omega_left_on),
            if broken == 0 { "limits broken: none".to_string() } else { format!("{broken} stretch(es) break its bounds") },
            if inverts { ", inverts" } else { "" },
            x.verdict().word()
        ));
    }
    out
}

/// The verdict line: the worst axis's verdict, naming it when the trap has several.
fn verdict_line(a: &PlaybackAssessment) -> String {
    let (trap, worst) = a.trap_verdict();
    if a.other_axes.is_empty() {
        format!("verdict: {}{}", a.verdict().word(), if a.inverts() { ", inverts" } else { "" })
    } else {
        format!(
            "verdict: {} (the worst of {} axes: {}; each axis a harmonic oscillator; the reference axis alone: {}{})",
            trap.word(),
            a.other_axes.len() + 1,
            worst.map_or_else(|| "the reference axis".to_string(), |n| format!("the {n} axis")),
            a.verdict().word(),
            if a.inverts() { ", inverts" } else { "" }
        )
    }
}

/// The whole header (without `# `): provenance, what the file holds and how to read it,
/// settings, checks, caution.
pub fn header_lines(f: &HeaderFacts<'_>, content: FileContent) -> Vec<String> {
    let a = f.assessment;
    let s = &a.played;
    let n = s.periods;
    let mut out = vec![format!("written by quenchless {}", env!("CARGO_PKG_VERSION"))];
    out.push(format!(
        "{}candidate: {} ({})",
        f.study.map_or_else(String::new, |name| format!("study: {name}; ")),
        f.candidate,
        f.family
    ));
    out.push(match content {
        FileContent::Trap => "content: the trap as the generator plays it, held: row k holds from its time to the next row's; the last row is the trap left on".into(),
        FileContent::Drive => format!("content: the generator's samples in {}: sample k holds from its time to the next row's", f.drive_unit),
        FileContent::Codes => "content: the generator's samples as straight-binary DAC codes (0 = lowest level): sample k holds from its time to the next row's".into(),
    });
    out.push(format!(
        "timing: N = round(duration x rate) = {n} samples at {} samples/s, sample k on [k/R, (k+1)/R); played duration N/R = {} (designed {})",
        plain(s.rate),
        secs(a.played.played_duration_s),
        secs(f.designed_duration_s)
    ));
    out.push(format!(
        "start: before t = 0 the generator holds the initial level{} ({}); the start state is the stated one in that trap",
        match (content, s.code_before) {
            (FileContent::Codes, Some(c)) => format!(", code {c}"),
            (FileContent::Drive, _) => format!(", {} {}", plain(s.drive_before), f.drive_unit),
            _ => String::new(),
        },
        hz(a.played.omega_start)
    ));
    out.push(format!(
        "end: the last row (sample {n}, from N/R on) is the final level: the generator must hold it; a generator that returns to an idle level instead leaves another trap"
    ));
    out.extend(settings_words(f.playback, f.drive_unit, f.max_rate));
    out.extend(check_words(a, f.limits));
    out.push(CAUTION.into());
    out
}
