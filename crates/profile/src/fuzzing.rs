//! The properties the fuzz targets (the separate `fuzz/` crate) and the seed replay test
//! check, one function per target, so both run exactly the same code. Each takes raw
//! bytes and returns `Err` describing the first broken property; a panic inside is a
//! finding too. A test aid, not part of the crate's interface.
#![doc(hidden)]

use crate::error::ProfileError;
use crate::units::{Quantity, UnitError, format_quantity, parse_fraction, parse_quantity};
use crate::{convert, parse_study, parse_waveform, study_to_string};
use quenchless_physics::ramp::{Ramp, RampShape, SampledColumn, SampledReading};
use std::path::Path;

/// Name the study inputs are given in errors.
pub const STUDY_PATH: &str = "fuzz-input.ron";
/// Name the waveform inputs are given in errors.
pub const WAVEFORM_PATH: &str = "fuzz-input.csv";

/// Rows of an accepted waveform checked one by one; more would slow the fuzzer down
/// without reaching new code.
const ROWS_CHECKED: usize = 64;

/// Largest |value| (SI) whose display text is re-parsed: within an ulp of `f64::MAX` the
/// re-parsed number times its unit factor can round past the largest finite float.
const ROUND_TRIP_MAX: f64 = 1e300;

/// Loads a study from the bytes (invalid UTF-8 replaced, so the parser sees text). An
/// error must name its place; an accepted study must save and load back unchanged,
/// and its candidates' ramps must evaluate without panicking.
pub fn check_study(data: &[u8]) -> Result<(), String> {
    let text = String::from_utf8_lossy(data);
    let path = Path::new(STUDY_PATH);
    let study = match parse_study(&text, path) {
        Ok(s) => s,
        Err(e) => return check_profile_error(&e, path),
    };
    // Save then load is the identity: no external source, property of our own format.
    let saved = study_to_string(&study).map_err(|e| format!("an accepted study cannot be saved: {e}"))?;
    let again = parse_study(&saved, path).map_err(|e| format!("a saved study does not load again: {e}\n{saved}"))?;
    if again != study {
        return Err(format!("save then load changed the study; saved text:\n{saved}"));
    }
    for (i, c) in study.candidates.iter().enumerate() {
        let ramp = convert::candidate_ramp(c, i).map_err(|e| format!("validated candidate {i} has no ramp: {e}"))?;
        // Only for panics: what a profile's ramp is allowed to evaluate to is the
        // converter's business, not the loader's.
        for t in sample_times(ramp.duration()) {
            let _ = (ramp.omega2(t), ramp.omega2_rate(t));
        }
    }
    Ok(())
}

/// Reads a CSV waveform from the bytes. An error must name its place; an accepted table
/// must hold what the format promises, become a ramp for both readings, and that ramp
/// must keep the promises of [`RampShape`] and pass through the table's rows.
pub fn check_waveform(data: &[u8]) -> Result<(), String> {
    let text = String::from_utf8_lossy(data);
    let path = Path::new(WAVEFORM_PATH);
    let table = match parse_waveform(&text, path) {
        Ok(t) => t,
        Err(e) => return check_profile_error(&e, path),
    };
    let (times, values) = (&table.times_s, &table.values);
    if times.len() != values.len() || times.len() < 2 {
        return Err(format!(
            "accepted table has {} times and {} values (needs >= 2 of each)",
            times.len(),
            values.len()
        ));
    }
    if let Some(k) = (0..times.len()).find(|&k| !times[k].is_finite() || !values[k].is_finite()) {
        return Err(format!("accepted row {} is not finite: t = {}, value = {}", k + 1, times[k], values[k]));
    }
    if let Some(k) = (1..times.len()).find(|&k| times[k] <= times[k - 1]) {
        return Err(format!(
            "accepted row {} does not come after the previous one: {} <= {}",
            k + 1,
            times[k],
            times[k - 1]
        ));
    }
    let last = values.len() - 1;
    let must_be_positive: Vec<usize> =
        if table.column == SampledColumn::Omega { (0..values.len()).collect() } else { vec![0, last] };
    if let Some(&k) = must_be_positive.iter().find(|&&k| values[k] <= 0.0) {
        return Err(format!("accepted row {} has value {} <= 0 ({:?} column)", k + 1, values[k], table.column));
    }
    for reading in [SampledReading::Linear, SampledReading::Hold] {
        let ramp = table
            .to_ramp(reading, path)
            .map_err(|e| format!("an accepted table is refused as a {reading:?} ramp: {e}"))?;
        check_ramp(&ramp).map_err(|e| format!("{reading:?} ramp of an accepted table: {e}"))?;
        let Ramp::Sampled(s) = &ramp else {
            return Err(format!("a waveform became a {} ramp", ramp.family_name()));
        };
        // The ramp passes through every row (either reading): no external source,
        // property of our own format.
        for (k, &t) in s.times().iter().enumerate().take(ROWS_CHECKED) {
            let want = if table.column == SampledColumn::Omega { values[k] * values[k] } else { values[k] };
            let got = ramp.omega2(t);
            if (got - want).abs() > 1e-12 * want.abs() {
                return Err(format!(
                    "{reading:?} ramp at row {} (t = {t}) gives omega² {got}, the row says {want}",
                    k + 1
                ));
            }
        }
    }
    Ok(())
}

/// Parses the bytes as a value of every [`Quantity`] kind and as a fraction. An error
/// must quote the input and say what is allowed; an accepted value must be finite and
/// its display text ([`format_quantity`]) must parse back to it.
pub fn check_units(data: &[u8]) -> Result<(), String> {
    let text = String::from_utf8_lossy(data);
    for kind in [Quantity::Frequency, Quantity::Time, Quantity::Temperature, Quantity::SampleRate] {
        let units: Vec<&str> = kind.units().iter().map(|(u, _)| *u).collect();
        let v = match parse_quantity(&text, kind) {
            Ok(v) => v,
            Err(e) => {
                check_unit_error(&e, &text, &units)?;
                continue;
            }
        };
        if !v.is_finite() {
            return Err(format!("{text:?} as a {} was accepted as {v}", kind.name()));
        }
        if v.abs() > ROUND_TRIP_MAX {
            continue;
        }
        let shown = format_quantity(v, kind);
        let back = parse_quantity(&shown, kind)
            .map_err(|e| format!("{text:?} = {v} is shown as {shown:?}, which does not parse: {e}"))?;
        // Shown with 6 decimals in a unit no larger than the value (or the smallest
        // unit): the error is at most 5e-7 of the larger of |v| and that smallest unit.
        // No external source: property of our own format.
        let smallest = kind.units().iter().map(|&(_, f)| f).fold(f64::INFINITY, f64::min);
        if (back - v).abs() > 1e-6 * v.abs().max(smallest) {
            return Err(format!("{text:?} = {v} is shown as {shown:?}, which parses back to {back}"));
        }
    }
    match parse_fraction(&text) {
        Ok(v) if !v.is_finite() => Err(format!("{text:?} was accepted as the fraction {v}")),
        Ok(_) => Ok(()),
        Err(e) => check_unit_error(&e, &text, &["fraction", "percentage"]),
    }
}

/// Times at which a ramp is evaluated: both ends, a few inside, and just outside.
fn sample_times(tau: f64) -> [f64; 7] {
    [0.0, 0.25 * tau, 0.5 * tau, 0.75 * tau, tau, -tau, 2.0 * tau]
}

/// The promises of [`RampShape`]: finite duration > 0, end frequencies finite and > 0,
/// breakpoints sorted strictly inside (0, duration), omega² and its rate finite.
fn check_ramp(ramp: &Ramp) -> Result<(), String> {
    let tau = ramp.duration();
    if !(tau.is_finite() && tau > 0.0) {
        return Err(format!("duration {tau} is not finite and > 0"));
    }
    for (what, w) in [("initial", ramp.omega_initial()), ("final", ramp.omega_final())] {
        if !(w.is_finite() && w > 0.0) {
            return Err(format!("{what} frequency {w} rad/s is not finite and > 0"));
        }
    }
    let breaks = ramp.breakpoints();
    let mut previous = 0.0;
    for &b in &breaks {
        if !(b > previous && b < tau) {
            return Err(format!("breakpoint {b} s is not after {previous} s and before the end {tau} s"));
        }
        previous = b;
    }
    for t in sample_times(tau).into_iter().chain(breaks.into_iter().take(ROWS_CHECKED)) {
        let (w2, rate) = (ramp.omega2(t), ramp.omega2_rate(t));
        if !(w2.is_finite() && rate.is_finite()) {
            return Err(format!("at t = {t} s omega² = {w2} and its rate = {rate} (both must be finite)"));
        }
    }
    for (what, (w2, t)) in [("smallest", ramp.min_omega2()), ("largest", ramp.max_omega2())] {
        if !(w2.is_finite() && t.is_finite()) {
            return Err(format!("{what} omega² {w2} at t = {t} s is not finite"));
        }
    }
    Ok(())
}

/// An error of a loader names the file and a place: a line and column, or a field with
/// its value and what is allowed.
fn check_profile_error(e: &ProfileError, path: &Path) -> Result<(), String> {
    let shown = e.to_string();
    let bad = |why: &str| Err(format!("error {shown:?} {why}"));
    if !shown.starts_with(&*path.to_string_lossy()) {
        return bad("does not start with the file name");
    }
    match e {
        ProfileError::Io { .. } => bad("is an I/O error from a text parser"),
        ProfileError::Syntax { line, column, message, .. } => {
            if *line == 0 || *column == 0 {
                bad("has a line or column 0 (they count from 1)")
            } else if message.trim().is_empty() {
                bad("has an empty message")
            } else {
                Ok(())
            }
        }
        ProfileError::Invalid { field, value, allowed, .. } => {
            if field.trim().is_empty() || value.trim().is_empty() || allowed.trim().is_empty() {
                bad("lacks the field, the value or what is allowed")
            } else {
                Ok(())
            }
        }
        ProfileError::NewerFormat { found, supported, .. } => {
            if found > supported {
                Ok(())
            } else {
                bad("calls an old version newer")
            }
        }
    }
}

/// A unit error quotes what was typed and names what is allowed (one of `allowed`, or
/// says the number must be finite).
fn check_unit_error(e: &UnitError, text: &str, allowed: &[&str]) -> Result<(), String> {
    if e.text != text {
        return Err(format!("error {e} quotes {:?}, not the input {text:?}", e.text));
    }
    if !(e.message.contains("finite") || allowed.iter().any(|a| e.message.contains(a))) {
        return Err(format!("error {e} names nothing allowed (expected one of {allowed:?} or \"finite\")"));
    }
    Ok(())
}
