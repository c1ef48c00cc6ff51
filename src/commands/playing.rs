//! The one path from a designed ramp to the files for the apparatus, shared by
//! `export`, `play` and `design --waveform-out`: play it through the generator, judge
//! the playing, print the checks, and write what was judged with the one header.

use crate::CommandError;
use quenchless_physics::axes::TrapAxis;
use quenchless_physics::playback::{AssessmentSettings, Playback, PlaybackAssessment, assess_trap};
use quenchless_physics::{PropagationOptions, Ramp, RampShape, TrapLimits};
use quenchless_profile::drive::{write_dac_codes, write_drive_samples};
use quenchless_profile::header::{CAUTION, FileContent, HeaderFacts, check_words, header_lines};
use quenchless_profile::{ExportColumns, write_trap_table};
use std::path::Path;

/// The axes of a study's trap besides the reference one.
pub(crate) fn other_axes(study: &quenchless_profile::Study, path: &Path) -> Result<Vec<TrapAxis>, CommandError> {
    let model = quenchless_profile::convert::trap_model(&study.trap).map_err(|e| e.in_file(path))?;
    Ok(model.trap_axes().into_iter().skip(1).collect())
}

/// A ramp with what its files must say about where it came from.
pub(crate) struct Source<'a> {
    /// Study name, when from a study.
    pub study: Option<&'a str>,
    /// Candidate or design name.
    pub candidate: &'a str,
    /// The designed ramp.
    pub ramp: &'a Ramp,
    /// Stated limits.
    pub limits: TrapLimits,
    /// The trap's axes besides the reference one (empty for a one-axis trap).
    pub other_axes: Vec<TrapAxis>,
}

/// A judged playing with the settings it was judged at.
pub(crate) struct Judged<'a> {
    pub source: Source<'a>,
    pub playback: Playback,
    pub drive_unit: String,
    pub max_rate: Option<f64>,
    pub assessment: PlaybackAssessment,
}

/// Plays and judges; a ramp that cannot be played at these settings is refused with
/// the reason.
pub(crate) fn judge<'a>(
    source: Source<'a>,
    playback: Playback,
    drive_unit: String,
    settings: AssessmentSettings,
    opts: &PropagationOptions,
) -> Result<Judged<'a>, CommandError> {
    let assessment = assess_trap(source.ramp, &playback, &settings, &source.other_axes, opts, &|| false)
        .map_err(|e| CommandError(format!("cannot be played at these settings: {e}")))?;
    Ok(Judged { source, playback, drive_unit, max_rate: settings.max_rate, assessment })
}

impl Judged<'_> {
    fn header(&self, content: FileContent) -> Vec<String> {
        let facts = HeaderFacts {
            study: self.source.study,
            candidate: self.source.candidate,
            family: self.source.ramp.family_name(),
            playback: &self.playback,
            drive_unit: &self.drive_unit,
            limits: &self.source.limits,
            assessment: &self.assessment,
            designed_duration_s: self.source.ramp.duration(),
            max_rate: self.max_rate,
        };
        header_lines(&facts, content)
    }

    /// The checks in words, one per line.
    pub fn checks(&self) -> Vec<String> {
        check_words(&self.assessment, &self.source.limits)
    }

    /// Prints the caution and the checks on stderr (before any file is written).
    pub fn announce(&self) {
        eprintln!("{CAUTION}");
        for line in self.checks() {
            eprintln!("  {line}");
        }
    }

    fn kept<'t, T>(table: Option<&'t T>, path: &Path) -> Result<&'t T, CommandError> {
        table.ok_or_else(|| {
            CommandError(format!("{}: the playing was judged without keeping its samples to write", path.display()))
        })
    }

    /// Writes the trap as played.
    pub fn write_trap(&self, path: &Path, columns: ExportColumns) -> Result<usize, CommandError> {
        let trap = Self::kept(self.assessment.played.trap.as_ref(), path)?;
        Ok(write_trap_table(path, trap, columns, &self.header(FileContent::Trap))?)
    }

    /// Writes the generator's samples in drive units.
    pub fn write_drive(&self, path: &Path) -> Result<usize, CommandError> {
        let samples = Self::kept(self.assessment.played.samples.as_ref(), path)?;
        Ok(write_drive_samples(path, samples, &self.drive_unit, &self.header(FileContent::Drive))?)
    }

    /// Writes the DAC codes.
    pub fn write_codes(&self, path: &Path) -> Result<usize, CommandError> {
        let samples = Self::kept(self.assessment.played.samples.as_ref(), path)?;
        write_dac_codes(path, samples, &self.header(FileContent::Codes))
            .map_err(|e| CommandError(format!("--codes-out {}: {e}", path.display())))
    }
}
