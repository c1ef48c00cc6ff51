//! CSV waveforms: a header naming the columns and their units, `#` comment lines, then
//! rows of time and value.
//!
//! Accepted headers (units are case-sensitive):
//! - `t,omega` (s, rad/s) and `t,omega2` (s, (rad/s)²);
//! - bracketed units: time `t[s]`, `t[ms]`, `t[us]`, `t[µs]`, `t[ns]`; value
//!   `omega[rad/s]`, `omega2[rad^2/s^2]`, or ordinary frequency `nu[Hz]`, `nu[kHz]`,
//!   `nu[MHz]`, `nu[GHz]` (omega = 2 pi nu).
//!
//! A comment line `# reading: hold` or `# reading: linear` states how the rows are read
//! (files written here are held tables and say `hold`); without it the reader decides.
//!
//! A comment line `# end_frequencies_rad_s: OMEGA_I, OMEGA_F` states the trap before and
//! after the table (exports and playback write it); without it the first and last rows
//! are the end frequencies.
//!
//! Rows: |t| <= 1e30 s, times increasing by at least 1e-30 s; omega from 1e-30 to 1e30
//! rad/s, or omega² within ±1e60 (rad/s)² and >= 1e-60 (rad/s)² in the first and last
//! rows.

use crate::error::{ProfileError, Result};
use crate::storage::write_atomically;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::ramp::{Ramp, RampShape, SampledColumn, SampledRamp, SampledReading};
use std::fmt::Write as _;
use std::path::Path;

/// A waveform as read from a file, in SI.
#[derive(Debug, Clone, PartialEq)]
pub struct WaveformTable {
    /// Row times, s (as in the file, not shifted).
    pub times_s: Vec<f64>,
    /// omega (rad/s) or omega² ((rad/s)²) per row.
    pub values: Vec<f64>,
    /// Which of the two the values are.
    pub column: SampledColumn,
    /// Text of the `#` comment lines, without the `#`.
    pub comments: Vec<String>,
    /// The trap before and after the table, rad/s, from a comment line
    /// `# end_frequencies_rad_s: OMEGA_I, OMEGA_F` (written by exports and playback).
    /// Without it the first and last rows are the end frequencies.
    pub end_frequencies_rad_s: Option<(f64, f64)>,
    /// How the file says it is read (`# reading: hold` or `linear`), if it says.
    pub reading: Option<SampledReading>,
}

/// Key of the comment line that states the end frequencies.
pub const END_FREQUENCIES_KEY: &str = "end_frequencies_rad_s:";

/// Key of the comment line that states how the table is read between rows.
pub const READING_KEY: &str = "reading:";

/// The word of a reading in a `# reading:` line.
pub fn reading_word(r: SampledReading) -> &'static str {
    match r {
        SampledReading::Hold => "hold",
        SampledReading::Linear => "linear",
    }
}

/// The comment line (without `# `) that states a ramp's end frequencies.
pub fn end_frequencies_comment(omega_i: f64, omega_f: f64) -> String {
    format!("{END_FREQUENCIES_KEY} {omega_i:e}, {omega_f:e}")
}

impl WaveformTable {
    /// The reading to use: the file's stated one, else linear unless `hold` is asked
    /// for. A `hold` request against a file that states `linear` is refused.
    pub fn reading(&self, hold: bool, flag: &str) -> Result<SampledReading> {
        match (self.reading, hold) {
            (Some(SampledReading::Linear), true) => Err(ProfileError::invalid(
                flag,
                "hold",
                "not for this file: it states `# reading: linear` (its rows are points of a line, not held levels)",
            )),
            (Some(r), _) => Ok(r),
            (None, true) => Ok(SampledReading::Hold),
            (None, false) => Ok(SampledReading::Linear),
        }
    }

    /// The ramp read linearly or with left sample-and-hold. Errors name the row.
    pub fn to_ramp(&self, reading: SampledReading, path: &Path) -> Result<Ramp> {
        let (times, values) = (self.times_s.clone(), self.values.clone());
        let table = match self.end_frequencies_rad_s {
            Some((wi, wf)) => SampledRamp::with_stated_ends(times, values, self.column, reading, wi, wf),
            None => SampledRamp::new(times, values, self.column, reading),
        };
        table.map(Ramp::Sampled).map_err(|e| ProfileError::from_physics("waveform", &e).in_file(path))
    }
}

fn time_factor(unit: &str) -> Option<f64> {
    Some(match unit {
        "s" => 1.0,
        "ms" => 1e-3,
        "us" | "µs" => 1e-6,
        "ns" => 1e-9,
        _ => return None,
    })
}

/// Value column: (kind, factor to rad/s or (rad/s)²).
fn value_column(name: &str) -> Option<(SampledColumn, f64)> {
    Some(match name {
        "omega" | "omega[rad/s]" => (SampledColumn::Omega, 1.0),
        "omega2" | "omega2[rad^2/s^2]" => (SampledColumn::Omega2, 1.0),
        "nu[Hz]" => (SampledColumn::Omega, TWO_PI),
        "nu[kHz]" => (SampledColumn::Omega, TWO_PI * 1e3),
        "nu[MHz]" => (SampledColumn::Omega, TWO_PI * 1e6),
        "nu[GHz]" => (SampledColumn::Omega, TWO_PI * 1e9),
        _ => return None,
    })
}

/// Largest |t| of a row, s. Bounds the time span, so shifting the table to start at 0
/// stays finite; far beyond any waveform.
const TIME_LIMIT_S: f64 = 1e30;

/// Smallest spacing of consecutive rows, s, once the table starts at 0: keeps the
/// slopes between rows finite (|omega²| <= OMEGA_MAX² over >= 1e-30 s gives <= 2e90).
const MIN_ROW_STEP_S: f64 = 1e-30;

/// Range of omega in an omega column, rad/s. Far wider than any trap, and narrow
/// enough that omega², its slopes and omega³ stay finite and non-zero.
const OMEGA_MIN: f64 = 1e-30;
/// See [`OMEGA_MIN`].
const OMEGA_MAX: f64 = 1e30;
/// Largest |omega²| in an omega2 column, (rad/s)²: OMEGA_MAX².
const OMEGA2_MAX: f64 = 1e60;
/// Smallest omega² of the first and last rows of an omega2 column, (rad/s)²: OMEGA_MIN².
const OMEGA2_MIN_END: f64 = 1e-60;

const HEADER_HELP: &str = "a header `t,omega` (s, rad/s), `t,omega2` (s, (rad/s)²) or with units such as `t[us],nu[kHz]` \
(time s, ms, us, µs, ns; value omega[rad/s], omega2[rad^2/s^2], nu[Hz|kHz|MHz|GHz])";

/// Reads a waveform file.
pub fn read_waveform(path: &Path) -> Result<WaveformTable> {
    let text = std::fs::read_to_string(path).map_err(|source| ProfileError::Io { path: path.to_path_buf(), source })?;
    parse_waveform(&text, path)
}

/// Parses waveform text; `path` names it in errors.
#[expect(clippy::too_many_lines, reason = "one pass over the lines, each error raised where it is found")]
pub fn parse_waveform(text: &str, path: &Path) -> Result<WaveformTable> {
    let syn = |line: usize, column: usize, message: String| ProfileError::Syntax {
        path: path.to_path_buf(),
        line,
        column,
        message,
    };
    let mut comments = Vec::new();
    let mut ends = None;
    let mut reading = None;
    let mut header: Option<(f64, SampledColumn, f64)> = None;
    let mut times = Vec::new();
    let mut values = Vec::new();
    for (idx, raw) in text.lines().enumerate() {
        let line_no = idx + 1;
        let line = raw.trim();
        if line.is_empty() {
            continue;
        }
        if let Some(c) = line.strip_prefix('#') {
            let c = c.trim();
            if let Some(rest) = c.strip_prefix(END_FREQUENCIES_KEY) {
                let parsed: Vec<Option<f64>> = rest.split(',').map(|v| v.trim().parse::<f64>().ok()).collect();
                match parsed.as_slice() {
                    [Some(a), Some(b)]
                        if a.is_finite()
                            && b.is_finite()
                            && (OMEGA_MIN..=OMEGA_MAX).contains(a)
                            && (OMEGA_MIN..=OMEGA_MAX).contains(b) =>
                    {
                        ends = Some((*a, *b));
                    }
                    _ => {
                        return Err(syn(
                            line_no,
                            1,
                            format!(
                                "\"{c}\": expected `{END_FREQUENCIES_KEY} OMEGA_I, OMEGA_F`, two frequencies from {OMEGA_MIN:e} to {OMEGA_MAX:e} rad/s"
                            ),
                        ));
                    }
                }
            }
            if let Some(rest) = c.strip_prefix(READING_KEY) {
                reading = Some(match rest.trim() {
                    "hold" => SampledReading::Hold,
                    "linear" => SampledReading::Linear,
                    other => {
                        return Err(syn(
                            line_no,
                            1,
                            format!("\"{other}\": expected `{READING_KEY} hold` or `{READING_KEY} linear`"),
                        ));
                    }
                });
            }
            comments.push(c.to_string());
            continue;
        }
        // Plain lines (the usual case: numbers, no quotes) are split directly; a line
        // with quotes goes through the CSV reader. Building a reader per line cost
        // 92 % of reading a long table.
        let mut record = csv::StringRecord::new();
        let plain: Vec<&str>;
        let cells: [&str; 2] = if line.contains('"') {
            let mut reader = csv::ReaderBuilder::new()
                .has_headers(false)
                .trim(csv::Trim::All)
                .flexible(true)
                .from_reader(line.as_bytes());
            match reader.read_record(&mut record) {
                Ok(true) => {}
                Ok(false) => continue,
                Err(e) => return Err(syn(line_no, 1, format!("not a CSV line: {e}"))),
            }
            if record.len() != 2 {
                return Err(syn(line_no, 1, format!("expected 2 columns (time, value), found {}", record.len())));
            }
            [record.get(0).unwrap_or(""), record.get(1).unwrap_or("")]
        } else {
            plain = line.split(',').map(str::trim).collect();
            if plain.len() != 2 {
                return Err(syn(line_no, 1, format!("expected 2 columns (time, value), found {}", plain.len())));
            }
            [plain[0], plain[1]]
        };
        let col2 = raw.find(',').map_or(1, |p| p + 2);
        let Some((tf, column, vf)) = header else {
            let tf = match cells[0] {
                "t" => Some(1.0),
                c => c.strip_prefix("t[").and_then(|r| r.strip_suffix(']')).and_then(time_factor),
            };
            let Some(tf) = tf else {
                if cells[0].parse::<f64>().is_ok() {
                    return Err(syn(
                        line_no,
                        1,
                        format!("missing header: the first line is data; expected {HEADER_HELP}"),
                    ));
                }
                return Err(syn(line_no, 1, format!("unknown time column \"{}\"; expected {HEADER_HELP}", cells[0])));
            };
            let Some((column, vf)) = value_column(cells[1]) else {
                return Err(syn(
                    line_no,
                    col2,
                    format!("unknown value column \"{}\"; expected {HEADER_HELP}", cells[1]),
                ));
            };
            header = Some((tf, column, vf));
            continue;
        };
        let row = times.len() + 1;
        let mut parsed = [0.0; 2];
        for (k, cell) in cells.iter().enumerate() {
            let col = if k == 0 { 1 } else { col2 };
            let what = if k == 0 { "time" } else { "value" };
            let v: f64 = cell
                .parse()
                .map_err(|_| syn(line_no, col, format!("{what} \"{cell}\" in data row {row} is not a number")))?;
            if !v.is_finite() {
                return Err(syn(
                    line_no,
                    col,
                    format!("{what} \"{cell}\" in data row {row} is not finite (NaN and inf are not allowed)"),
                ));
            }
            parsed[k] = v;
        }
        let t = parsed[0] * tf;
        let v = parsed[1] * vf;
        if t.abs() > TIME_LIMIT_S {
            return Err(syn(
                line_no,
                1,
                format!(
                    "time {} in data row {row} is {t:e} s; allowed |t| <= {TIME_LIMIT_S:e} s ({:e} in this column's unit)",
                    cells[0],
                    TIME_LIMIT_S / tf
                ),
            ));
        }
        if let Some(&prev) = times.last() {
            if t <= prev {
                return Err(syn(
                    line_no,
                    1,
                    format!(
                        "time {} in data row {row} is not after the previous row's {}; times must increase strictly",
                        cells[0],
                        prev / tf
                    ),
                ));
            }
            // The ramp counts time from the first row: the rows must stay apart after
            // that shift too (as SampledRamp computes it).
            let step = (t - times[0]) - (prev - times[0]);
            if step < MIN_ROW_STEP_S {
                return Err(syn(
                    line_no,
                    1,
                    format!(
                        "time {} in data row {row} is {step:e} s after the previous row once the table is counted \
                         from its first row ({}); rows must be at least {MIN_ROW_STEP_S:e} s apart",
                        cells[0],
                        times[0] / tf
                    ),
                ));
            }
        }
        if column == SampledColumn::Omega && v <= 0.0 {
            return Err(syn(
                line_no,
                col2,
                format!(
                    "frequency {} in data row {row} must be > 0 (an inverted trap needs an omega2 column)",
                    cells[1]
                ),
            ));
        }
        if column == SampledColumn::Omega && !(OMEGA_MIN..=OMEGA_MAX).contains(&v) {
            return Err(syn(
                line_no,
                col2,
                format!(
                    "frequency {} in data row {row} is omega = {v:e} rad/s; allowed {OMEGA_MIN:e} to {OMEGA_MAX:e} \
                     rad/s ({:e} to {:e} in this column's unit)",
                    cells[1],
                    OMEGA_MIN / vf,
                    OMEGA_MAX / vf
                ),
            ));
        }
        if column == SampledColumn::Omega2 && v.abs() > OMEGA2_MAX {
            return Err(syn(
                line_no,
                col2,
                format!(
                    "omega² {} in data row {row} is {v:e} (rad/s)²; allowed {:e} to {OMEGA2_MAX:e} (rad/s)²",
                    cells[1], -OMEGA2_MAX
                ),
            ));
        }
        times.push(t);
        values.push(v);
    }
    let Some((_, column, _)) = header else {
        return Err(syn(1, 1, format!("the file has no header and no data; expected {HEADER_HELP}")));
    };
    if times.len() < 2 {
        return Err(syn(
            text.lines().count().max(1),
            1,
            format!("a waveform needs at least 2 data rows, found {}", times.len()),
        ));
    }
    // With the end frequencies stated, the first row may be a played inverted sample.
    if column == SampledColumn::Omega2 && ends.is_none() {
        for (row, v) in [(1, values[0]), (values.len(), values[values.len() - 1])] {
            if v < OMEGA2_MIN_END {
                return Err(ProfileError::invalid(
                    format!("omega² in data row {row}"),
                    format!("{v:e}"),
                    format!(
                        ">= {OMEGA2_MIN_END:e} (rad/s)² in the first and last rows (the trap must confine at both ends)"
                    ),
                )
                .in_file(path));
            }
        }
    }
    Ok(WaveformTable { times_s: times, values, column, comments, end_frequencies_rad_s: ends, reading })
}

/// Columns of an exported waveform.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum ExportColumns {
    /// `t[s],omega[rad/s]`, or `t[s],omega2[rad^2/s^2]` when the trap inverts.
    #[default]
    Si,
    /// `t[us],nu[kHz]` (lab units, 15 significant digits); refused when the trap inverts.
    LabMicrosecondsKilohertz,
    /// `t[s],omega2[rad^2/s^2]` always.
    Omega2,
}

/// A number with 15 significant digits and no trailing zeros (lab-unit columns: the
/// digits a unit conversion leaves are noise).
pub fn significant15(v: f64) -> String {
    let s = format!("{v:.14e}");
    let (m, e) = s.split_once('e').unwrap_or((&s, "0"));
    let m = m.trim_end_matches('0').trim_end_matches('.');
    if e == "0" { m.to_string() } else { format!("{m}e{e}") }
}

/// Writes the trap as played (a held table of omega², see
/// [`quenchless_physics::playback::Played`]) atomically: the `#` header lines, then
/// `# reading: hold` and the end frequencies (the trap before and the trap left on),
/// the column header, and one row per held step. SI columns keep round-trip precision.
pub fn write_trap_table(path: &Path, trap: &SampledRamp, columns: ExportColumns, header: &[String]) -> Result<usize> {
    let rows = trap.omega2_rows();
    let inverts = rows.iter().any(|&w2| w2 <= 0.0);
    let columns = match columns {
        ExportColumns::Si if inverts => ExportColumns::Omega2,
        ExportColumns::LabMicrosecondsKilohertz if inverts => {
            return Err(ProfileError::invalid(
                "export columns",
                "t[us],nu[kHz]",
                "a column that can hold omega² <= 0: this trap inverts as played, export omega2 instead",
            ));
        }
        c => c,
    };
    let mut out = String::new();
    for p in header {
        out.push_str("# ");
        out.push_str(p);
        out.push('\n');
    }
    let _ = writeln!(out, "# {READING_KEY} {}", reading_word(SampledReading::Hold));
    let (wi, wf) = trap.end_frequencies().unwrap_or((trap.omega_initial(), trap.omega_final()));
    let _ = writeln!(out, "# {}", end_frequencies_comment(wi, wf));
    out.push_str(match columns {
        ExportColumns::Si => "t[s],omega[rad/s]\n",
        ExportColumns::LabMicrosecondsKilohertz => "t[us],nu[kHz]\n",
        ExportColumns::Omega2 => "t[s],omega2[rad^2/s^2]\n",
    });
    for (&t, &w2) in trap.times().iter().zip(rows) {
        let _ = match columns {
            ExportColumns::Si => writeln!(out, "{t:e},{:e}", w2.sqrt()),
            ExportColumns::LabMicrosecondsKilohertz => {
                writeln!(out, "{},{}", significant15(t * 1e6), significant15(w2.sqrt() / (TWO_PI * 1e3)))
            }
            ExportColumns::Omega2 => writeln!(out, "{t:e},{w2:e}"),
        };
    }
    write_atomically(path, out.as_bytes())?;
    Ok(rows.len())
}
