//! Generator settings given on top of a study's generator section: the command line's
//! flags and the Python package's keyword arguments take this one path. The settings
//! are written into the section, and the result is checked by the one validator,
//! [`convert::playback`]. Every caller therefore gets the same rules, and the messages
//! name each setting as the caller spells it: `--bits 40` or `bits 40`.

use crate::convert::{self, GeneratorField};
use crate::error::ProfileError;
use crate::study::{DriveCalibrationSpec, DriveSpec, GeneratorSpec};
use crate::units::Quantity;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::playback::Playback;
use std::path::Path;

/// What a caller calls each setting, for its messages.
#[derive(Debug, Clone, Copy)]
pub struct SettingNames {
    /// The sample rate ("--rate").
    pub rate: &'static str,
    /// The bit depth ("--bits").
    pub bits: &'static str,
    /// The frequency at the highest code ("--full-scale").
    pub full_scale: &'static str,
    /// The low-pass time constant ("--low-pass").
    pub low_pass: &'static str,
    /// The output stage's slew limit ("--slew").
    pub slew: &'static str,
    /// The rms clock jitter ("--jitter").
    pub jitter: &'static str,
    /// The highest rate of the smallest-rate search ("--max-rate").
    pub max_rate: &'static str,
    /// The refusal when no rate is given and the study states none.
    pub missing_rate: &'static str,
    /// What a bit depth needs without a drive section ("--full-scale F, or ...").
    pub bits_need: &'static str,
    /// What a full scale needs ("--bits N").
    pub full_scale_needs: &'static str,
    /// Whether the settings take units (then a refusal lists them).
    pub with_units: bool,
}

/// One given setting: its value (SI) and the text it was given as.
#[derive(Debug, Clone, PartialEq)]
pub struct Given<T> {
    /// The value, SI.
    pub value: T,
    /// As typed ("100MS/s"), or the number as given.
    pub typed: String,
}

impl<T: std::fmt::Display> Given<T> {
    /// A value given as a plain number (its text is the number).
    pub fn number(value: T) -> Self {
        let typed = value.to_string();
        Self { value, typed }
    }
}

/// The settings given on top of the study's generator section; `None` and `false`
/// keep the section's own.
#[derive(Debug, Clone, Default)]
pub struct GivenSettings {
    /// Samples per second.
    pub rate_per_s: Option<Given<f64>>,
    /// Take each sample at the middle of its period.
    pub midpoint: bool,
    /// A measured calibration table, replacing drive proportional to omega².
    pub calibration: Option<DriveCalibrationSpec>,
    /// The drive cannot go negative, whatever the study says.
    pub unipolar: bool,
    /// The drive can go negative.
    pub bipolar: bool,
    /// DAC bits.
    pub bits: Option<Given<u32>>,
    /// Frequency at the highest code, Hz (needs `bits`).
    pub full_scale_hz: Option<Given<f64>>,
    /// First-order low-pass time constant, s.
    pub low_pass_s: Option<Given<f64>>,
    /// Output slew limit, drive units per s.
    pub slew_per_s: Option<Given<f64>>,
    /// rms clock jitter, s.
    pub jitter_rms_s: Option<Given<f64>>,
    /// Highest rate of the smallest-rate search, samples per second.
    pub max_rate_per_s: Option<Given<f64>>,
}

/// A generator section with the given settings written in, and which setting wrote
/// which field (for the messages of [`Written::checked`]).
#[derive(Debug, Clone)]
pub struct Written {
    /// The section as it will be played.
    pub spec: GeneratorSpec,
    given: Vec<(GeneratorField, &'static str, String)>,
    names: SettingNames,
}

/// The drive section, made if the study has none: drive = omega² in (rad/s)² (the gain
/// is exactly 1: drive (2 pi)² at 1 Hz), bipolar, with no bit depth of its own, as a
/// generator without a drive section plays.
pub fn drive_section(g: &mut GeneratorSpec) -> &mut DriveSpec {
    if g.drive.is_none() {
        g.bits = None;
    }
    g.drive.get_or_insert_with(|| DriveSpec {
        unit: "rad^2/s^2".into(),
        calibration: DriveCalibrationSpec::FrequencySquared {
            reference_frequency_hz: 1.0,
            drive_at_reference: TWO_PI * TWO_PI,
        },
        full_scale_low: 0.0,
        full_scale_high: 1.0,
        can_go_negative: true,
    })
}

/// A measured drive calibration table (`frequency_hz,drive`) read from `path` and
/// checked as a calibration (frequencies rising, drives monotone), for
/// [`GivenSettings::calibration`].
///
/// # Errors
/// The file cannot be read, or its table is not a calibration; the message names the file.
pub fn read_calibration(path: &Path) -> Result<DriveCalibrationSpec, ProfileError> {
    let spec = crate::drive::read_calibration_table(path)?;
    convert::drive_calibration(&spec).map_err(|e| e.in_file(path))?;
    Ok(spec)
}

impl GivenSettings {
    /// Only a rate (the `export` and `design --waveform-out` case).
    pub fn rate(rate: Given<f64>) -> Self {
        Self { rate_per_s: Some(rate), ..Self::default() }
    }

    /// Writes the settings into `base` (the study's section, if any). A calibration
    /// table must already be read and checked by the caller, which knows its file.
    ///
    /// # Errors
    /// A message naming the setting: no rate at all, a full scale without bits, bits
    /// without a drive, or a full scale the calibration cannot reach.
    pub fn written_into(&self, base: Option<GeneratorSpec>, names: SettingNames) -> Result<Written, String> {
        let mut w = Written { spec: GeneratorSpec::default(), given: Vec::new(), names };
        let had_drive = base.as_ref().is_some_and(|g| g.drive.is_some());
        w.spec = match (&self.rate_per_s, base) {
            (Some(r), base) => {
                let mut g = base.unwrap_or_default();
                g.sample_rate_per_s = r.value;
                // A maximum rate below the one asked for is dropped: the rate played is
                // then the highest one stated.
                g.max_rate_per_s = g.max_rate_per_s.filter(|&m| m >= r.value);
                w.note(GeneratorField::SampleRate, names.rate, &r.typed);
                g
            }
            (None, Some(g)) => g,
            (None, None) => return Err(names.missing_rate.to_string()),
        };
        let g = &mut w.spec;
        if self.midpoint {
            g.midpoint_samples = true;
        }
        if let Some(spec) = &self.calibration {
            drive_section(g).calibration = spec.clone();
        }
        if self.unipolar {
            drive_section(g).can_go_negative = false;
        } else if let (true, Some(d)) = (self.bipolar, g.drive.as_mut()) {
            d.can_go_negative = true;
        }
        match (&self.bits, &self.full_scale_hz) {
            (Some(_), Some(f)) => {
                let d = drive_section(g);
                let calibration = convert::drive_calibration(&d.calibration).map_err(|e| e.to_string())?;
                let top = calibration
                    .drive_of((TWO_PI * f.value).powi(2))
                    .map_err(|e| format!("{} {}: {e}", names.full_scale, f.typed))?;
                d.full_scale_high = top;
                d.full_scale_low = if d.can_go_negative { -top } else { 0.0 };
                w.note(GeneratorField::FullScaleHigh, names.full_scale, &f.typed);
            }
            (None, Some(_)) => return Err(format!("{} needs {}", names.full_scale, names.full_scale_needs)),
            _ => {}
        }
        let g = &mut w.spec;
        if let Some(bits) = &self.bits {
            g.bits = Some(bits.value);
        }
        let mut fields: Vec<(GeneratorField, &'static str, &str)> = Vec::new();
        if let Some(b) = &self.bits {
            fields.push((GeneratorField::Bits, names.bits, &b.typed));
        }
        for (value, field, name, set) in [
            (&self.low_pass_s, GeneratorField::LowPass, names.low_pass, &mut g.low_pass_s),
            (&self.slew_per_s, GeneratorField::Slew, names.slew, &mut g.slew_limit_per_s),
            (&self.jitter_rms_s, GeneratorField::Jitter, names.jitter, &mut g.jitter_rms_s),
            (&self.max_rate_per_s, GeneratorField::MaxRate, names.max_rate, &mut g.max_rate_per_s),
        ] {
            if let Some(v) = value {
                *set = Some(v.value);
                fields.push((field, name, &v.typed));
            }
        }
        for (field, name, typed) in fields {
            w.note(field, name, typed);
        }
        if let (Some(bits), None, false) = (&self.bits, &self.full_scale_hz, had_drive) {
            // Checked after the section so a bit depth out of range is named first.
            w.checked(None)?;
            return Err(format!("{} {}: needs {}", names.bits, bits.typed, names.bits_need));
        }
        Ok(w)
    }
}

impl Written {
    fn note(&mut self, field: GeneratorField, name: &'static str, typed: &str) {
        self.given.push((field, name, typed.to_string()));
    }

    /// The playback of the section, checked by [`convert::playback`]; `file` is the
    /// study the section came from, if any.
    ///
    /// # Errors
    /// A value a setting gave is named by that setting and its text ("--bits 40:
    /// allowed 1 to 32"); any other names the study's field, and the settings given.
    pub fn checked(&self, file: Option<&Path>) -> Result<Playback, String> {
        convert::playback(&self.spec).map_err(|e| {
            if let ProfileError::Invalid { allowed, .. } = &e
                && let Some(field) = GeneratorField::of_error(&e)
                && let Some((field, name, typed)) = self.given.iter().rev().find(|(f, _, _)| *f == field)
            {
                let units = match field {
                    _ if !self.names.with_units => String::new(),
                    GeneratorField::SampleRate | GeneratorField::MaxRate => {
                        format!(" ({})", Quantity::SampleRate.unit_list())
                    }
                    GeneratorField::LowPass | GeneratorField::Jitter => format!(" ({})", Quantity::Time.unit_list()),
                    _ => String::new(),
                };
                return format!("{name} {typed}: allowed {allowed}{units}");
            }
            let e = match file {
                Some(p) => e.in_file(p),
                None => e,
            };
            if self.given.is_empty() {
                e.to_string()
            } else {
                let words: Vec<String> = self.given.iter().map(|(_, name, typed)| format!("{name} {typed}")).collect();
                format!("{e} (with {})", words.join(", "))
            }
        })
    }
}
