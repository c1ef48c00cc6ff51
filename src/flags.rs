//! Typed values of command-line flags: clap value parsers (`value_parser = ...`) built
//! on the profile crate's unit reader, so command code receives SI values and never
//! reads units itself. A refused value is reported by clap as the flag, the text typed
//! and what is allowed (see [`crate::run`] for the one message style).

use quenchless_profile::units::{Quantity, parse_fraction, parse_quantity};

/// A value as typed on the command line, with its value in SI.
#[derive(Debug, Clone, PartialEq)]
pub struct Given {
    /// In SI: Hz (ordinary frequency), s, K, samples per second, or a plain fraction.
    pub si: f64,
    /// The text as typed, quoted in messages.
    pub typed: String,
}

/// What a flag allows beyond a finite value of its kind.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Sign {
    /// Any sign (a later rule decides, e.g. the generator's).
    Any,
    /// At least 0.
    NonNegative,
    /// Above 0.
    Positive,
}

fn quantity(text: &str, kind: Quantity, sign: Sign) -> Result<Given, String> {
    let si = parse_quantity(text, kind).map_err(|e| e.message)?;
    let (ok, rule) = match sign {
        Sign::Any => (true, ""),
        Sign::NonNegative => (si >= 0.0, ">= 0"),
        Sign::Positive => (si > 0.0, "> 0"),
    };
    if ok { Ok(Given { si, typed: text.to_string() }) } else { Err(allowed(kind, rule)) }
}

/// "allowed a time > 0 (s, ms, us, µs, ns)".
pub fn allowed(kind: Quantity, rule: &str) -> String {
    let rule = if rule.is_empty() { String::new() } else { format!(" {rule}") };
    format!("allowed a finite {}{rule} ({})", kind.name(), kind.unit_list())
}

/// A trap frequency (ordinary frequency nu, Hz, kHz, MHz, GHz): > 0.
///
/// # Errors
/// Without a frequency unit, not finite, or not above 0.
pub fn frequency(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Frequency, Sign::Positive)
}

/// A frequency bound that may be 0 (Hz, kHz, MHz, GHz): >= 0.
///
/// # Errors
/// Without a frequency unit, not finite, or below 0.
pub fn frequency_or_zero(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Frequency, Sign::NonNegative)
}

/// A duration (s, ms, us, µs, ns): > 0.
///
/// # Errors
/// Without a time unit, not finite, or not above 0.
pub fn duration(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Time, Sign::Positive)
}

/// A time that may be 0 (s, ms, us, µs, ns): >= 0.
///
/// # Errors
/// Without a time unit, not finite, or below 0.
pub fn time_or_zero(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Time, Sign::NonNegative)
}

/// A time of the generator (s, ms, us, µs, ns), any sign: the generator's rules
/// (`convert::playback`) decide what is allowed.
///
/// # Errors
/// Without a time unit, or not finite.
pub fn generator_time(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Time, Sign::Any)
}

/// A temperature (K, mK, uK, µK, nK): >= 0.
///
/// # Errors
/// Without a temperature unit, not finite, or below 0.
pub fn temperature(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Temperature, Sign::NonNegative)
}

/// A sample rate (S/s, kS/s, MS/s, GS/s, or a clock frequency Hz..GHz, or a bare
/// number of samples per second), any sign: the generator's rules decide.
///
/// # Errors
/// An unknown unit, or not finite.
pub fn sample_rate(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::SampleRate, Sign::Any)
}

fn fraction_in(text: &str, ok: impl Fn(f64) -> bool, range: &str) -> Result<Given, String> {
    let si = parse_fraction(text).map_err(|e| e.message)?;
    if ok(si) { Ok(Given { si, typed: text.to_string() }) } else { Err(format!("allowed {range}")) }
}

/// The largest error of a robustness map ("5%" or "0.05"): 0 to below 90 %.
///
/// # Errors
/// Not a fraction, or outside [0, 0.9).
pub fn map_error(text: &str) -> Result<Given, String> {
    fraction_in(text, |v| (0.0..0.9).contains(&v), "0 to below 0.9 (0% to below 90%)")
}

/// The calibration band of a robust design ("5%" or "0.05"): above 0, below 50 %.
///
/// # Errors
/// Not a fraction, or outside (0, 0.5).
pub fn robust_band(text: &str) -> Result<Given, String> {
    fraction_in(text, |v| v > 0.0 && v < 0.5, "above 0 and below 0.5 (0% to 50%, both excluded)")
}

/// A length (m, mm, um, µm, nm): > 0.
///
/// # Errors
/// Without a length unit, not finite, or not above 0.
pub fn length(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Length, Sign::Positive)
}

/// A particle mass (u or kg): > 0.
///
/// # Errors
/// Without a mass unit, not finite, or not above 0.
pub fn mass(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Mass, Sign::Positive)
}

/// A signed frequency (Hz, kHz, MHz, GHz; an offset F meaning sign(F) (2 pi F)²).
///
/// # Errors
/// Without a frequency unit, or not finite.
pub fn signed_frequency(text: &str) -> Result<Given, String> {
    quantity(text, Quantity::Frequency, Sign::Any)
}
