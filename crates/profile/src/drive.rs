//! Drive files: a measured drive calibration table (CSV `frequency_hz,drive`), and the
//! generator's samples written in drive units or as integer DAC codes.
//!
//! Every written file opens with the `#` lines of [`crate::header`] (provenance, reading,
//! checks and the safety caution), then a header row, then one row per sample, the final
//! level included.

use crate::error::{ProfileError, Result};
use crate::storage::write_atomically;
use crate::study::DriveCalibrationSpec;
use quenchless_physics::playback::DriveSamples;
use std::fmt::Write as _;
use std::path::Path;

/// Most rows of a calibration table.
pub const MAX_CALIBRATION_ROWS: usize = 100_000;

fn syntax(path: &Path, line: usize, column: usize, message: impl Into<String>) -> ProfileError {
    ProfileError::Syntax { path: path.to_path_buf(), line, column, message: message.into() }
}

/// Parses a calibration table: optional `#` comment lines, the header
/// `frequency_hz,drive` (any unit name in brackets after `drive` is allowed, e.g.
/// `drive[V]`), then rows of two numbers. Frequencies must rise; drives must be
/// monotone (checked when the study or playback is validated).
pub fn parse_calibration_table(text: &str, path: &Path) -> Result<DriveCalibrationSpec> {
    let mut frequency_hz = Vec::new();
    let mut drive = Vec::new();
    let mut header_seen = false;
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let l = raw.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let cells: Vec<&str> = l.split(',').map(str::trim).collect();
        if !header_seen {
            let ok = cells.len() == 2 && cells[0] == "frequency_hz" && cells[1].starts_with("drive");
            if !ok {
                return Err(syntax(path, line, 1, format!("header \"{l}\": expected frequency_hz,drive")));
            }
            header_seen = true;
            continue;
        }
        if cells.len() != 2 {
            return Err(syntax(path, line, 1, format!("{} cells: expected 2 (frequency_hz, drive)", cells.len())));
        }
        let mut row = [0.0; 2];
        for (k, c) in cells.iter().enumerate() {
            row[k] = c.parse::<f64>().ok().filter(|v| v.is_finite()).ok_or_else(|| {
                let column = raw.find(c).map_or(1, |p| p + 1);
                syntax(path, line, column, format!("\"{c}\" is not a finite number"))
            })?;
        }
        if row[0] <= 0.0 {
            return Err(syntax(path, line, 1, format!("frequency {} Hz: must be > 0", row[0])));
        }
        frequency_hz.push(row[0]);
        drive.push(row[1]);
        if frequency_hz.len() > MAX_CALIBRATION_ROWS {
            return Err(syntax(path, line, 1, format!("more than {MAX_CALIBRATION_ROWS} rows")));
        }
    }
    if !header_seen {
        return Err(syntax(path, 1, 1, "no header row: expected frequency_hz,drive"));
    }
    if frequency_hz.len() < 2 {
        return Err(syntax(path, 1, 1, format!("{} data rows: a table needs at least 2", frequency_hz.len())));
    }
    Ok(DriveCalibrationSpec::Table { frequency_hz, drive })
}

/// Reads a calibration table file.
pub fn read_calibration_table(path: &Path) -> Result<DriveCalibrationSpec> {
    let text = std::fs::read_to_string(path).map_err(|source| ProfileError::Io { path: path.to_path_buf(), source })?;
    parse_calibration_table(&text, path)
}

fn comments(provenance: &[String]) -> String {
    provenance.iter().fold(String::new(), |mut out, p| {
        let _ = writeln!(out, "# {p}");
        out
    })
}

/// Writes the generator's samples in drive units: `t_s,drive[unit]`, N + 1 rows: row k
/// is sample k from its (played) edge time on, and the last row is the final level,
/// which the generator must hold. The header states the initial level before t = 0.
pub fn write_drive_samples(path: &Path, s: &DriveSamples, unit: &str, header: &[String]) -> Result<usize> {
    let mut text = comments(header);
    let _ = writeln!(text, "t_s,drive[{unit}]");
    for (t, d) in s.times.iter().zip(&s.drive) {
        let _ = writeln!(text, "{t:e},{d:e}");
    }
    write_atomically(path, text.as_bytes())?;
    Ok(s.drive.len())
}

/// Writes the integer DAC codes: `sample,t_s,code`, N + 1 rows, the last the final
/// level's code (to be held).
pub fn write_dac_codes(path: &Path, s: &DriveSamples, header: &[String]) -> Result<usize> {
    let Some(codes) = &s.codes else {
        return Err(ProfileError::invalid("DAC codes", "none", "a quantised playback (bits and a full-scale range)"));
    };
    let mut text = comments(header);
    text.push_str("sample,t_s,code\n");
    for (k, (t, c)) in s.times.iter().zip(codes).enumerate() {
        let _ = writeln!(text, "{k},{t:e},{c}");
    }
    write_atomically(path, text.as_bytes())?;
    Ok(codes.len())
}
