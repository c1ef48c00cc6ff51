//! The one path from a ramp to the files for the apparatus, as the command line's
//! `export` and `play` take it: the study's generator section with the given settings
//! written in, checked by `convert::playback`; `assess_trap` plays and judges; the
//! profile crate's `header_lines` and `write_trap_table` write what was judged.

use crate::errors::{Failure, Outcome};
use quenchless_physics::axes::TrapAxis;
use quenchless_physics::playback::{AssessmentSettings, Playback, PlaybackAssessment, assess_trap};
use quenchless_physics::{PropagationOptions, Ramp, RampShape, TrapLimits};
use quenchless_profile::generator_settings::{Given, GivenSettings, SettingNames, read_calibration};
use quenchless_profile::header::{FileContent, HeaderFacts, check_words, header_lines};
use quenchless_profile::study::GeneratorSpec;
use quenchless_profile::{ExportColumns, write_trap_table};
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};

/// Where a ramp comes from and what its study says around it.
#[derive(Debug, Clone)]
pub struct Origin {
    /// Study name, when from a study.
    pub study: Option<String>,
    /// The profile file, when from a study.
    pub path: Option<PathBuf>,
    /// Candidate or design name.
    pub name: String,
    /// Verdict tolerance on Q* - 1.
    pub tolerance: f64,
    /// Stated limits of the reference axis.
    pub limits: TrapLimits,
    /// The trap's axes besides the reference one.
    pub other_axes: Vec<TrapAxis>,
    /// The study's generator section.
    pub generator: Option<GeneratorSpec>,
}

impl Origin {
    /// A designed ramp: no study, no limits, no generator section.
    pub fn designed(name: &str) -> Self {
        Self {
            study: None,
            path: None,
            name: name.to_string(),
            tolerance: 1e-3,
            limits: TrapLimits::default(),
            other_axes: Vec::new(),
            generator: None,
        }
    }

    /// The drive unit of the generator section, (rad/s)² without one.
    fn drive_unit(&self) -> String {
        self.generator.as_ref().and_then(|g| g.drive.as_ref()).map_or_else(|| "rad^2/s^2".into(), |d| d.unit.clone())
    }
}

/// Generator settings given as arguments, written over the study's section (each
/// argument as the command-line flag of the same name).
#[derive(Debug, Clone, Default)]
#[expect(clippy::struct_excessive_bools, reason = "switches of the generator, as given")]
pub struct GeneratorArgs {
    /// `rate_per_s`, samples per second (`--rate`).
    pub rate_per_s: Option<f64>,
    /// `midpoint` (`--midpoint`).
    pub midpoint: bool,
    /// `bits` (`--bits`).
    pub bits: Option<u32>,
    /// `full_scale_hz`, the frequency at the highest code, Hz (`--full-scale`).
    pub full_scale_hz: Option<f64>,
    /// `bipolar` (`--bipolar`).
    pub bipolar: bool,
    /// `unipolar` (`--unipolar`).
    pub unipolar: bool,
    /// `calibration`, a measured table `frequency_hz,drive` (`--calibration`).
    pub calibration: Option<PathBuf>,
    /// `low_pass_s`, s (`--low-pass`).
    pub low_pass_s: Option<f64>,
    /// `slew_per_s`, drive units per s (`--slew`).
    pub slew_per_s: Option<f64>,
    /// `jitter_rms_s`, s (`--jitter`).
    pub jitter_rms_s: Option<f64>,
    /// `max_rate_per_s`, samples per second (`--max-rate`).
    pub max_rate_per_s: Option<f64>,
    /// `seed` of the jitter trials (`--seed`).
    pub seed: u64,
}

/// The keyword arguments' names, for the messages of the profile crate's one path.
const KEYWORDS: SettingNames = SettingNames {
    rate: "rate_per_s",
    bits: "bits",
    full_scale: "full_scale_hz",
    low_pass: "low_pass_s",
    slew: "slew_per_s",
    jitter: "jitter_rms_s",
    max_rate: "max_rate_per_s",
    missing_rate: "give rate_per_s (samples per second): there is no study generator section stating one",
    bits_need: "full_scale_hz, or a study generator with a drive section",
    full_scale_needs: "bits",
    with_units: false,
};

/// The playback: the study's generator section with the arguments written in, by the
/// path the command line takes.
pub fn playback(origin: &Origin, args: &GeneratorArgs) -> Outcome<(Playback, Option<f64>)> {
    if args.bipolar && args.unipolar {
        return Err(Failure::value("bipolar and unipolar: give one of them"));
    }
    if args.rate_per_s.is_none() && origin.generator.is_none() {
        return Err(Failure::value(KEYWORDS.missing_rate));
    }
    let calibration = args.calibration.as_deref().map(read_calibration).transpose()?;
    let settings = GivenSettings {
        rate_per_s: args.rate_per_s.map(Given::number),
        midpoint: args.midpoint,
        calibration,
        unipolar: args.unipolar,
        bipolar: args.bipolar,
        bits: args.bits.map(Given::number),
        full_scale_hz: args.full_scale_hz.map(Given::number),
        low_pass_s: args.low_pass_s.map(Given::number),
        slew_per_s: args.slew_per_s.map(Given::number),
        jitter_rms_s: args.jitter_rms_s.map(Given::number),
        max_rate_per_s: args.max_rate_per_s.map(Given::number),
    };
    let written = settings.written_into(origin.generator.clone(), KEYWORDS).map_err(Failure::value)?;
    let mut pb = written.checked(origin.path.as_deref()).map_err(Failure::value)?;
    if let Some(j) = pb.jitter.as_mut() {
        j.seed = args.seed;
    }
    Ok((pb, written.spec.max_rate_per_s))
}

/// A judged playing with what its files must say.
pub struct Judged {
    /// Where the ramp came from.
    pub origin: Origin,
    /// The designed ramp.
    pub ramp: Ramp,
    /// The settings played.
    pub playback: Playback,
    /// Drive unit of the generator.
    pub drive_unit: String,
    /// The rate search's ceiling.
    pub max_rate: Option<f64>,
    /// The judgement.
    pub assessment: PlaybackAssessment,
}

/// How a playing is judged: as `export` (no searches, tables kept) or as `play`.
#[derive(Debug, Clone, Copy)]
pub struct Judging {
    /// Verdict tolerance (None: the study's).
    pub tolerance: Option<f64>,
    /// Run the smallest-rate and smallest-bit-depth searches and the jitter trials.
    pub searches: bool,
    /// Keep the trap table (to sample or write it).
    pub keep_tables: bool,
    /// Grid ratio of the rate search (`--grid-ratio`).
    pub grid_ratio: f64,
    /// Jitter trials (`--jitter-trials`).
    pub jitter_trials: usize,
}

impl Judging {
    /// As `export` judges: the study's tolerance, no searches, the table kept.
    pub fn export() -> Self {
        // `export` leaves the rest at the engine's defaults (its jitter trials differ
        // from `play`'s flag default).
        let d = AssessmentSettings::default();
        Self {
            tolerance: None,
            searches: false,
            keep_tables: true,
            grid_ratio: d.grid_ratio,
            jitter_trials: d.jitter_trials,
        }
    }
}

/// Plays and judges; a ramp that cannot be played at these settings is refused with
/// the reason, as the command line refuses it.
pub fn judge(origin: Origin, ramp: Ramp, args: &GeneratorArgs, how: Judging, cancel: &AtomicBool) -> Outcome<Judged> {
    if !(1..=10_000).contains(&how.jitter_trials) {
        return Err(Failure::value(format!("jitter_trials {}: allowed 1 to 10000", how.jitter_trials)));
    }
    if !(how.grid_ratio.is_finite() && how.grid_ratio > 1.0 && how.grid_ratio <= 2.0) {
        return Err(Failure::value(format!("grid_ratio {}: allowed a number above 1, at most 2", how.grid_ratio)));
    }
    let tolerance = crate::evaluate::tolerance(how.tolerance, origin.tolerance)?;
    let (pb, max_rate) = playback(&origin, args)?;
    let settings = AssessmentSettings {
        tolerance,
        limits: origin.limits,
        max_rate,
        grid_ratio: how.grid_ratio,
        jitter_trials: how.jitter_trials,
        searches: how.searches,
        keep_tables: how.keep_tables,
    };
    let cancelled = || cancel.load(Ordering::Relaxed);
    let assessment = assess_trap(&ramp, &pb, &settings, &origin.other_axes, &PropagationOptions::default(), &cancelled)
        .map_err(|e| match e {
            quenchless_physics::PhysicsError::Cancelled => Failure::Interrupted,
            e => Failure::value(format!("cannot be played at these settings: {e}")),
        })?;
    let drive_unit = origin.drive_unit();
    Ok(Judged { origin, ramp, playback: pb, drive_unit, max_rate, assessment })
}

/// Export columns by name, as `--columns`.
pub fn columns(name: &str) -> Outcome<ExportColumns> {
    match name {
        "si" => Ok(ExportColumns::Si),
        "lab" => Ok(ExportColumns::LabMicrosecondsKilohertz),
        "omega2" => Ok(ExportColumns::Omega2),
        other => Err(Failure::value(format!("columns \"{other}\": allowed \"si\", \"lab\" or \"omega2\""))),
    }
}

impl Judged {
    /// The checks in words, one per line (as the command line prints them).
    pub fn checks(&self) -> Vec<String> {
        check_words(&self.assessment, &self.origin.limits)
    }

    /// The trap table as played: times (s, from 0) and omega² ((rad/s)²) per held row.
    pub fn trap_rows(&self) -> Outcome<(Vec<f64>, Vec<f64>)> {
        let trap = self
            .assessment
            .played
            .trap
            .as_ref()
            .ok_or_else(|| Failure::Runtime("the playing was judged without keeping its samples".into()))?;
        Ok((trap.times().to_vec(), trap.omega2_rows().to_vec()))
    }

    /// Writes the trap as played with the command line's header; the number of rows.
    pub fn write_trap(&self, path: &Path, columns: ExportColumns) -> Outcome<usize> {
        if columns == ExportColumns::LabMicrosecondsKilohertz && self.assessment.inverts() {
            return Err(Failure::value(
                "columns \"lab\": allowed \"si\" or \"omega2\" for this ramp: the trap inverts as played (omega² <= 0), \
                 which a frequency column cannot hold",
            ));
        }
        let trap = self
            .assessment
            .played
            .trap
            .as_ref()
            .ok_or_else(|| Failure::Runtime("the playing was judged without keeping its samples".into()))?;
        let facts = HeaderFacts {
            study: self.origin.study.as_deref(),
            candidate: &self.origin.name,
            family: self.ramp.family_name(),
            playback: &self.playback,
            drive_unit: &self.drive_unit,
            limits: &self.origin.limits,
            assessment: &self.assessment,
            designed_duration_s: self.ramp.duration(),
            max_rate: self.max_rate,
        };
        Ok(write_trap_table(path, trap, columns, &header_lines(&facts, FileContent::Trap))?)
    }

    /// The keys of `play --json`, by the command line's own builder.
    pub fn play_json(&self, tolerance: f64) -> Value {
        quenchless_profile::report::play_json(
            &self.origin.name,
            &self.ramp,
            &self.playback,
            &self.assessment,
            tolerance,
            &self.drive_unit,
        )
    }
}
