//! Quenchless file formats: study profiles (RON, versioned, atomic writes) and CSV
//! waveforms (unit-bearing headers, `#` comment lines). Converts profiles into the
//! physics crate's types, naming the field of every invalid value.

#![deny(missing_docs)]

pub mod convert;
pub mod drive;
pub mod error;
pub mod fuzzing;
pub mod generator_settings;
pub mod given_axis;
pub mod header;
pub mod report;
pub mod species;
pub mod storage;
pub mod study;
pub mod units;
mod upgrade;
pub mod waveform;

pub use error::ProfileError;
pub use storage::{load_study, parse_study, save_study, study_to_string};
pub use study::{
    BathFilling, BathSpec, CandidateRamp, CycleSpec, DisplayUnits, DriveCalibrationSpec, DriveSpec, FORMAT_VERSION,
    GeneratorSpec, HoldSpec, InitialStateSpec, KnotSpec, NoiseSpec, RampSpec, StrokeSpec, Study, TrapSpec,
};
pub use waveform::{ExportColumns, WaveformTable, parse_waveform, read_waveform, write_trap_table};
