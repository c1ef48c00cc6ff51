//! `quenchless.quantity`: values with units as people type them.

use crate::errors::{Failure, guarded};
use pyo3::prelude::*;
use quenchless_profile::units::{Quantity, parse_quantity};

/// The kinds tried, in order, with the name returned for each.
const KINDS: [(Quantity, &str); 6] = [
    (Quantity::Frequency, "frequency_hz"),
    (Quantity::Time, "time_s"),
    (Quantity::Temperature, "temperature_k"),
    (Quantity::Length, "length_m"),
    (Quantity::Mass, "mass_kg"),
    (Quantity::SampleRate, "sample_rate_per_s"),
];

/// Reads a value with its unit, as the command line reads its flags ("35 kHz",
/// "150us", "40 µK", "100 MS/s", "87u"), and returns ``(value, kind)`` in SI: kind
/// ``"frequency_hz"`` (an ordinary frequency nu in Hz, NOT an angular frequency:
/// omega = 2 pi nu), ``"time_s"``, ``"temperature_k"``, ``"length_m"``, ``"mass_kg"``
/// or ``"sample_rate_per_s"`` (S/s units; Hz reads as a frequency). Units are
/// case-sensitive. ValueError with the command line's message for anything else.
#[pyfunction]
pub fn quantity(text: &str) -> PyResult<(f64, &'static str)> {
    guarded(|| {
        if text.trim().parse::<f64>().is_ok() {
            return Err(Failure::value(format!(
                "\"{text}\": a bare number has no kind; give it a unit (35 kHz, 150 us, 40 uK, 2 um, 87 u, 100 MS/s)"
            ))
            .into());
        }
        let mut first_error = None;
        for (kind, name) in KINDS {
            match parse_quantity(text, kind) {
                Ok(v) => return Ok((v, name)),
                Err(e) => {
                    first_error.get_or_insert(e);
                }
            }
        }
        let e = first_error.map_or_else(|| format!("\"{text}\": not a quantity"), |e| e.to_string());
        Err(Failure::value(format!(
            "{e}; quantity() reads frequencies (Hz..GHz), times (s..ns), temperatures (K..nK), lengths (m..nm), \
             masses (kg, u) and sample rates (S/s..GS/s)"
        ))
        .into())
    })
}
