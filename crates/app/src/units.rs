//! How numbers are shown: lab units (ordinary frequency, time) or the dimensionless
//! view (omega/omega_i, t omega_i). Only a change of scale; no physics here.

use quenchless_physics::constants::TWO_PI;
use quenchless_profile::study::{DisplayUnits, FrequencyUnit, TimeUnit};

/// Maps SI values (s, rad/s) to plot coordinates and back.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DisplayScale {
    /// Dimensionless view.
    pub dimensionless: bool,
    /// Reference angular frequency omega_i, rad/s (> 0).
    pub omega_i: f64,
    /// Seconds per displayed time unit.
    pub seconds_per_unit: f64,
    /// Hz per displayed frequency unit.
    pub hz_per_unit: f64,
    /// Name of the time unit.
    pub time_unit: &'static str,
    /// Name of the frequency unit.
    pub frequency_unit: &'static str,
}

/// Seconds per display time unit, and its symbol.
pub fn time_unit(u: TimeUnit) -> (f64, &'static str) {
    (u.seconds(), u.symbol())
}

/// Hz per display frequency unit, and its symbol.
pub fn frequency_unit(u: FrequencyUnit) -> (f64, &'static str) {
    (u.hz(), u.symbol())
}

impl DisplayScale {
    /// The scale of a study's display settings; `start_hz` is the trap's start
    /// frequency (a bad value falls back to 1 Hz so plots never see NaN).
    pub fn new(units: &DisplayUnits, start_hz: f64) -> Self {
        let start_hz = if start_hz.is_finite() && start_hz > 0.0 { start_hz } else { 1.0 };
        let (seconds_per_unit, time_unit) = time_unit(units.time);
        let (hz_per_unit, frequency_unit) = frequency_unit(units.frequency);
        Self {
            dimensionless: units.dimensionless,
            omega_i: TWO_PI * start_hz,
            seconds_per_unit,
            hz_per_unit,
            time_unit,
            frequency_unit,
        }
    }

    /// Plot x of a time in s.
    pub fn x(&self, t_s: f64) -> f64 {
        if self.dimensionless { t_s * self.omega_i } else { t_s / self.seconds_per_unit }
    }

    /// Time in s of a plot x.
    pub fn t_from_x(&self, x: f64) -> f64 {
        if self.dimensionless { x / self.omega_i } else { x * self.seconds_per_unit }
    }

    /// Plot y of an angular frequency in rad/s (signed values stay signed).
    pub fn y(&self, omega: f64) -> f64 {
        if self.dimensionless { omega / self.omega_i } else { omega / TWO_PI / self.hz_per_unit }
    }

    /// Ordinary frequency in Hz of a plot y.
    pub fn hz_from_y(&self, y: f64) -> f64 {
        if self.dimensionless { y * self.omega_i / TWO_PI } else { y * self.hz_per_unit }
    }

    /// Label of the time axis.
    pub fn x_label(&self) -> String {
        if self.dimensionless { "t ω_i".into() } else { format!("t [{}]", self.time_unit) }
    }

    /// Label of the frequency axis.
    pub fn y_label(&self) -> String {
        if self.dimensionless { "ω/ω_i".into() } else { format!("ν [{}]", self.frequency_unit) }
    }

    /// Signed plot y of omega²: sign(omega²) sqrt|omega²|, so an inverted trap shows
    /// below zero instead of vanishing.
    pub fn signed_y(&self, omega2: f64) -> f64 {
        self.y(omega2.signum() * omega2.abs().sqrt())
    }
}

/// Short scientific formatting for figures in tables and verdicts: the figure layer's
/// one number formatter.
pub use quenchless_figures::number::{sci, tick_label};

/// A grid for small plots: four to six labelled marks on a 1-2-5 step over the visible
/// range (and unlabelled lines at a fifth of it), so a 150-pixel plot never shows a
/// single tick label.
#[expect(clippy::needless_pass_by_value, reason = "the signature egui_plot asks of a grid spacer")]
pub fn few_ticks(input: egui_plot::GridInput) -> Vec<egui_plot::GridMark> {
    let (lo, hi) = input.bounds;
    let span = hi - lo;
    if !(span.is_finite() && span > 0.0) {
        return Vec::new();
    }
    let decade = 10f64.powf((span / 4.0).log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0].into_iter().map(|m| m * decade).find(|s| span / s <= 6.0).unwrap_or(10.0 * decade);
    let mut marks = Vec::new();
    for (size, count) in [(step, 1_i64), (step / 5.0, 5)] {
        let (first, last) = ((lo / size).ceil() as i64, (hi / size).floor() as i64);
        for k in first..=last.min(first + 200) {
            // Fine lines only where no labelled mark sits.
            if count == 1 || k % count != 0 {
                marks.push(egui_plot::GridMark { value: k as f64 * size, step_size: size });
            }
        }
    }
    marks
}

/// [`tick_label`] as an egui_plot axis formatter.
pub fn axis_ticks(mark: egui_plot::GridMark, _range: &std::ops::RangeInclusive<f64>) -> String {
    tick_label(mark.value, mark.step_size)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lab_and_dimensionless_round_trip() {
        let mut u = DisplayUnits::default();
        let s = DisplayScale::new(&u, 100e3);
        // 25 µs shown as 25 in µs; 50 kHz shown as 50 in kHz.
        assert!((s.x(25e-6) - 25.0).abs() < 1e-9);
        assert!((s.y(TWO_PI * 50e3) - 50.0).abs() < 1e-9);
        assert!((s.hz_from_y(50.0) - 50e3).abs() < 1e-6);
        u.dimensionless = true;
        let d = DisplayScale::new(&u, 100e3);
        assert!((d.y(TWO_PI * 50e3) - 0.5).abs() < 1e-12);
        assert!((d.t_from_x(d.x(3e-6)) - 3e-6).abs() < 1e-18);
        assert!(d.signed_y(-(TWO_PI * 100e3).powi(2)) < 0.0);
    }

    #[test]
    fn bad_start_frequency_gives_finite_scale() {
        let s = DisplayScale::new(&DisplayUnits::default(), f64::NAN);
        assert!(s.omega_i.is_finite());
    }
}
