//! The generator a command plays through: the profile's generator section (or a plain
//! one) with the given flags written into it by the profile crate's one path,
//! [`quenchless_profile::generator_settings`]. An error about a value a flag gave names
//! the flag and the text typed; any other names the profile's field.

use crate::CommandError;
use crate::flags::Given;
use quenchless_physics::playback::Playback;
use quenchless_profile::generator_settings::{self, GivenSettings, SettingNames};
use quenchless_profile::study::GeneratorSpec;
use std::path::Path;

/// The flags' names, for the messages of `play`.
pub(crate) const FLAGS: SettingNames = SettingNames {
    rate: "--rate",
    bits: "--bits",
    full_scale: "--full-scale",
    low_pass: "--low-pass",
    slew: "--slew",
    jitter: "--jitter",
    max_rate: "--max-rate",
    missing_rate: "give --rate R, or a profile whose generator section states a rate",
    bits_need: "--full-scale F, or a profile generator with a drive section",
    full_scale_needs: "--bits N",
    with_units: true,
};

/// A flag's value as the profile crate takes it.
pub(crate) fn given(g: &Given) -> generator_settings::Given<f64> {
    generator_settings::Given { value: g.si, typed: g.typed.clone() }
}

/// The playback of `settings` written over `base` (from the profile `file`, if any),
/// with the section as played.
pub(crate) fn playback(
    settings: &GivenSettings,
    base: Option<GeneratorSpec>,
    file: Option<&Path>,
    names: SettingNames,
) -> Result<(Playback, GeneratorSpec), CommandError> {
    let written = settings.written_into(base, names).map_err(CommandError)?;
    let pb = written.checked(file).map_err(CommandError)?;
    Ok((pb, written.spec))
}
