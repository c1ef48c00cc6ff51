//! Values with units as people type them: a number followed by a case-sensitive
//! unit, with or without a space ("1.2MHz", "150 us", "40 µK", "100 MS/s"). Unit
//! factors are those of the SI prefixes (SI brochure, BIPM 2019).

use thiserror::Error;

/// The kind of quantity a value must be.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// Ordinary frequency nu = omega / 2 pi: Hz, kHz, MHz, GHz.
    Frequency,
    /// Time: s, ms, us (or µs), ns.
    Time,
    /// Temperature: K, mK, uK (or µK), nK.
    Temperature,
    /// Sample rate of a generator, samples per second: S/s, kS/s, MS/s, GS/s, or a
    /// clock frequency Hz, kHz, MHz, GHz (one sample per clock cycle: no 2 pi), or a
    /// bare number of samples per second.
    SampleRate,
    /// Length: m, mm, um (or µm), nm.
    Length,
    /// Mass: kg, or u (unified atomic mass unit, m(12C)/12).
    Mass,
}

/// The unified atomic mass unit, kg (CODATA 2018 recommended value).
pub const ATOMIC_MASS_UNIT_KG: f64 = 1.660_539_066_60e-27;

impl Quantity {
    /// Units accepted, with their factor to SI (Hz, s, K).
    pub fn units(self) -> &'static [(&'static str, f64)] {
        match self {
            Self::Frequency => &[("Hz", 1.0), ("kHz", 1e3), ("MHz", 1e6), ("GHz", 1e9)],
            Self::Time => &[("s", 1.0), ("ms", 1e-3), ("us", 1e-6), ("µs", 1e-6), ("ns", 1e-9)],
            Self::Temperature => &[("K", 1.0), ("mK", 1e-3), ("uK", 1e-6), ("µK", 1e-6), ("nK", 1e-9)],
            Self::SampleRate => &[
                ("S/s", 1.0),
                ("kS/s", 1e3),
                ("MS/s", 1e6),
                ("GS/s", 1e9),
                ("Hz", 1.0),
                ("kHz", 1e3),
                ("MHz", 1e6),
                ("GHz", 1e9),
            ],
            Self::Length => &[("m", 1.0), ("mm", 1e-3), ("um", 1e-6), ("µm", 1e-6), ("nm", 1e-9)],
            Self::Mass => &[("kg", 1.0), ("u", ATOMIC_MASS_UNIT_KG)],
        }
    }

    /// Name for messages.
    pub fn name(self) -> &'static str {
        match self {
            Self::Frequency => "frequency",
            Self::Time => "time",
            Self::Temperature => "temperature",
            Self::SampleRate => "sample rate",
            Self::Length => "length",
            Self::Mass => "mass",
        }
    }

    /// Whether a bare number is read as a value in the SI unit (only sample rates: a
    /// bare number of samples per second, as the first versions took it).
    pub fn bare_number_allowed(self) -> bool {
        self == Self::SampleRate
    }

    /// The units in words for messages: "Hz, kHz, MHz, GHz".
    pub fn unit_list(self) -> String {
        match self {
            Self::SampleRate => "S/s, kS/s, MS/s, GS/s or Hz..GHz".into(),
            _ => self.units().iter().map(|(u, _)| *u).collect::<Vec<_>>().join(", "),
        }
    }
}

/// A value that could not be read.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[error("\"{text}\": {message}")]
pub struct UnitError {
    /// What was typed.
    pub text: String,
    /// What is wrong and what is allowed.
    pub message: String,
}

/// Parses "number unit" into SI (Hz for frequencies, s, K). The number, and the value
/// in SI, must be finite.
pub fn parse_quantity(text: &str, kind: Quantity) -> Result<f64, UnitError> {
    let err = |message: String| UnitError { text: text.to_string(), message };
    let trimmed = text.trim();
    let lower = trimmed.to_ascii_lowercase();
    let finite =
        || err(format!("the number must be finite, followed by a {} unit ({})", kind.name(), kind.unit_list()));
    if lower.starts_with("nan") || lower.starts_with("inf") || lower.starts_with("-inf") || lower.starts_with("+inf") {
        return Err(finite());
    }
    let split = trimmed
        .char_indices()
        .find(|&(i, c)| c.is_alphabetic() && !is_exponent(trimmed, i) || c == 'µ' || c == '/')
        .map_or(trimmed.len(), |(i, _)| i);
    let (number, unit) = trimmed.split_at(split);
    let number = number.trim();
    let unit = unit.trim();
    if number.is_empty() {
        return Err(err(format!("expected a number followed by a {} unit ({})", kind.name(), kind.unit_list())));
    }
    let value: f64 = number.parse().map_err(|_| {
        err(format!(
            "\"{number}\" is not a number; expected a number followed by a {} unit ({})",
            kind.name(),
            kind.unit_list()
        ))
    })?;
    if !value.is_finite() {
        return Err(finite());
    }
    if unit.is_empty() {
        if kind.bare_number_allowed() {
            return Ok(value);
        }
        return Err(err(format!("a {} needs a unit: one of {}", kind.name(), kind.unit_list())));
    }
    let Some(&(_, factor)) = kind.units().iter().find(|(u, _)| *u == unit) else {
        return Err(err(format!(
            "unknown {} unit \"{unit}\"; use one of {} (case matters)",
            kind.name(),
            kind.unit_list()
        )));
    };
    let si = value * factor;
    if !si.is_finite() {
        return Err(err(format!(
            "{number} {unit} is beyond the largest finite {}: at most {:e} {unit} in magnitude",
            kind.name(),
            f64::MAX / factor
        )));
    }
    Ok(si)
}

/// Whether the alphabetic character at byte `i` is the exponent marker of a number
/// like "1e6" or "2.5E-3" (an 'e'/'E' after a digit and followed by a digit or sign).
fn is_exponent(s: &str, i: usize) -> bool {
    let bytes = s.as_bytes();
    if !matches!(bytes[i], b'e' | b'E') || i == 0 || !bytes[i - 1].is_ascii_digit() && bytes[i - 1] != b'.' {
        return false;
    }
    match bytes.get(i + 1) {
        Some(b'+' | b'-') => bytes.get(i + 2).is_some_and(u8::is_ascii_digit),
        Some(c) => c.is_ascii_digit(),
        None => false,
    }
}

/// Parses a fraction given as "5%" (= 0.05) or a bare number "0.05".
pub fn parse_fraction(text: &str) -> Result<f64, UnitError> {
    let t = text.trim();
    let (num, scale) = match t.strip_suffix('%') {
        Some(n) => (n.trim(), 0.01),
        None => (t, 1.0),
    };
    let v: f64 = num.parse().map_err(|_| UnitError {
        text: text.to_string(),
        message: "expected a fraction like 0.05 or a percentage like 5%".into(),
    })?;
    if !v.is_finite() {
        return Err(UnitError {
            text: text.to_string(),
            message: "the number must be finite: a fraction like 0.05 or a percentage like 5%".into(),
        });
    }
    Ok(v * scale)
}

/// Formats a value in SI with the best-fitting unit of a kind ("12.5 µs").
pub fn format_quantity(value: f64, kind: Quantity) -> String {
    let mut units: Vec<(&str, f64)> =
        kind.units().iter().copied().filter(|(u, _)| !(u.len() > 1 && u.starts_with('u'))).collect();
    units.sort_by(|a, b| b.1.total_cmp(&a.1));
    let smallest = units[units.len() - 1];
    let best = units.iter().copied().find(|u| value.abs() >= u.1 * 0.999_999).unwrap_or(smallest);
    format!("{} {}", trim_float(value / best.1), best.0)
}

fn trim_float(v: f64) -> String {
    let s = format!("{v:.6}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s.is_empty() || s == "-" { "0".into() } else { s.to_string() }
}
