//! Quenchless file formats: study profiles (RON, versioned, atomic writes) and CSV
//! waveforms (unit-bearing headers, `#` comment lines). Converts profiles into the
//! physics crate's types, naming the field of every invalid value.

#![deny(missing_docs)]

pub mod convert;
pub mod error;
pub mod storage;
pub mod study;
pub mod units;
pub mod waveform;

pub use error::ProfileError;
pub use storage::{load_study, parse_study, save_study, study_to_string};
pub use study::{
    CandidateRamp, CycleSpec, DisplayUnits, HoldSpec, InitialStateSpec, KnotSpec, NoiseSpec, RampSpec, Study,
    StrokeSpec, BathSpec, BathFilling, TrapSpec, FORMAT_VERSION,
};
pub use waveform::{WaveformTable, read_waveform, parse_waveform, write_waveform, ExportColumns};
