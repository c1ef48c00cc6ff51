//! Reading older profile formats and upgrading them to the current one.
//!
//! Version 1 kept the generator's sample rate and bit depth in `trap`
//! (`generator_rate_per_s`, `generator_bits`). Version 2 moved them into the
//! `generator` section, beside the drive calibration and analog chain that version 1
//! could not state. A version-1 generator has no drive section: its bit depth is kept
//! but means nothing until a full-scale range is given, as before.

use crate::study::{
    CandidateRamp, CycleSpec, DisplayUnits, GeneratorSpec, InitialStateSpec, NoiseSpec, Study, TrapSpec,
};
use serde::Deserialize;

/// The trap section of format 1.
#[derive(Debug, Deserialize)]
#[serde(rename = "TrapSpec", default)]
struct TrapSpecV1 {
    start_frequency_hz: f64,
    end_frequency_hz: f64,
    lowest_frequency_hz: Option<f64>,
    highest_frequency_hz: Option<f64>,
    slew_limit_hz_per_s: Option<f64>,
    generator_rate_per_s: Option<f64>,
    generator_bits: Option<u32>,
}

impl Default for TrapSpecV1 {
    fn default() -> Self {
        let t = TrapSpec::default();
        Self {
            start_frequency_hz: t.start_frequency_hz,
            end_frequency_hz: t.end_frequency_hz,
            lowest_frequency_hz: None,
            highest_frequency_hz: None,
            slew_limit_hz_per_s: None,
            generator_rate_per_s: None,
            generator_bits: None,
        }
    }
}

/// A study of format 1 (the fields that did not change are shared with format 2).
#[derive(Debug, Deserialize)]
#[serde(rename = "Study", default)]
pub(crate) struct StudyV1 {
    format_version: u32,
    name: String,
    notes: String,
    display: DisplayUnits,
    trap: TrapSpecV1,
    initial_state: InitialStateSpec,
    noise: NoiseSpec,
    tolerance: f64,
    candidates: Vec<CandidateRamp>,
    cycle: Option<CycleSpec>,
}

impl Default for StudyV1 {
    fn default() -> Self {
        let s = Study::default();
        Self {
            format_version: 1,
            name: s.name,
            notes: s.notes,
            display: s.display,
            trap: TrapSpecV1::default(),
            initial_state: s.initial_state,
            noise: s.noise,
            tolerance: s.tolerance,
            candidates: s.candidates,
            cycle: s.cycle,
        }
    }
}

impl StudyV1 {
    /// The same study in the current format.
    pub(crate) fn upgrade(self) -> Study {
        let t = self.trap;
        let generator = match (t.generator_rate_per_s, t.generator_bits) {
            (None, None) => None,
            (rate, bits) => Some(GeneratorSpec {
                sample_rate_per_s: rate.unwrap_or(GeneratorSpec::default().sample_rate_per_s),
                bits,
                ..GeneratorSpec::default()
            }),
        };
        let _ = self.format_version;
        Study {
            format_version: crate::study::FORMAT_VERSION,
            name: self.name,
            notes: self.notes,
            display: self.display,
            trap: TrapSpec {
                start_frequency_hz: t.start_frequency_hz,
                end_frequency_hz: t.end_frequency_hz,
                lowest_frequency_hz: t.lowest_frequency_hz,
                highest_frequency_hz: t.highest_frequency_hz,
                slew_limit_hz_per_s: t.slew_limit_hz_per_s,
                model: None,
            },
            initial_state: self.initial_state,
            noise: self.noise,
            tolerance: self.tolerance,
            candidates: self.candidates,
            cycle: self.cycle,
            generator,
        }
    }
}
