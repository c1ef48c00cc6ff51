//! File-format checks: units, waveforms, profiles.

mod fuzz_findings;
mod fuzz_seeds;
mod roundtrip;
mod storage;
mod trap_model;
mod units;
mod waveform;
mod written;

/// The repository's sample_profiles folder.
pub fn samples_dir() -> std::path::PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample_profiles")
}
