//! The generator a command plays through: the profile's generator section (or a plain
//! one) with the given flags written into it, checked by the one validator,
//! [`convert::playback`]. An error about a value a flag gave names the flag and the
//! text typed; any other names the profile's field.

use crate::CommandError;
use crate::flags::Given;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::playback::Playback;
use quenchless_profile::convert::{self, GeneratorField};
use quenchless_profile::study::{DriveCalibrationSpec, DriveSpec, GeneratorSpec};
use quenchless_profile::{ProfileError, units::Quantity};
use std::path::Path;

/// Which flag set which field of the generator section, as typed.
#[derive(Debug, Default)]
pub(crate) struct FlagValues {
    given: Vec<(GeneratorField, &'static str, String)>,
}

impl FlagValues {
    /// Records that `flag` (typed as `typed`) set `field`.
    pub fn set(&mut self, field: GeneratorField, flag: &'static str, typed: impl Into<String>) {
        self.given.push((field, flag, typed.into()));
    }

    fn of(&self, field: GeneratorField) -> Option<&(GeneratorField, &'static str, String)> {
        self.given.iter().rev().find(|(f, _, _)| *f == field)
    }

    fn words(&self) -> String {
        self.given.iter().map(|(_, flag, typed)| format!("{flag} {typed}")).collect::<Vec<_>>().join(", ")
    }
}

/// The units a flag of this field takes, for its message.
fn units(field: GeneratorField) -> String {
    match field {
        GeneratorField::SampleRate | GeneratorField::MaxRate => format!(" ({})", Quantity::SampleRate.unit_list()),
        GeneratorField::LowPass | GeneratorField::Jitter => format!(" ({})", Quantity::Time.unit_list()),
        _ => String::new(),
    }
}

/// The section with `rate` written in; a maximum rate below it (the profile's) is
/// dropped, as the rate played is then the highest one stated.
pub(crate) fn with_rate(base: Option<GeneratorSpec>, rate: &Given, flags: &mut FlagValues) -> GeneratorSpec {
    let mut g = base.unwrap_or_default();
    g.sample_rate_per_s = rate.si;
    g.max_rate_per_s = g.max_rate_per_s.filter(|&m| m >= rate.si);
    flags.set(GeneratorField::SampleRate, "--rate", &rate.typed);
    g
}

/// The playback of a generator section, checked; `file` is the profile the section
/// came from, if any.
pub(crate) fn checked(g: &GeneratorSpec, flags: &FlagValues, file: Option<&Path>) -> Result<Playback, CommandError> {
    convert::playback(g).map_err(|e| {
        if let ProfileError::Invalid { allowed, .. } = &e
            && let Some((field, flag, typed)) = GeneratorField::of_error(&e).and_then(|f| flags.of(f))
        {
            return CommandError(format!("{flag} {typed}: allowed {allowed}{}", units(*field)));
        }
        let e = match file {
            Some(p) => e.in_file(p),
            None => e,
        };
        if flags.given.is_empty() {
            CommandError(e.to_string())
        } else {
            CommandError(format!("{e} (with {})", flags.words()))
        }
    })
}

/// The drive section, made if the profile has none: drive = omega² in (rad/s)² (the
/// gain is exactly 1: drive (2 pi)² at 1 Hz), bipolar, with no bit depth of its own, as
/// a generator without a drive section plays.
pub(crate) fn drive_section(g: &mut GeneratorSpec) -> &mut DriveSpec {
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

/// Writes a full scale given as the frequency at the highest code into the drive
/// section (in drive units through its calibration): from 0, or from minus the top
/// for a drive that can go negative.
pub(crate) fn set_full_scale(
    g: &mut GeneratorSpec,
    full_scale: &Given,
    flags: &mut FlagValues,
) -> Result<(), CommandError> {
    let d = drive_section(g);
    let calibration = convert::drive_calibration(&d.calibration)?;
    let top = calibration
        .drive_of((TWO_PI * full_scale.si).powi(2))
        .map_err(|e| CommandError(format!("--full-scale {}: {e}", full_scale.typed)))?;
    d.full_scale_high = top;
    d.full_scale_low = if d.can_go_negative { -top } else { 0.0 };
    flags.set(GeneratorField::FullScaleHigh, "--full-scale", &full_scale.typed);
    Ok(())
}
