//! Replays the fuzz seeds (fuzz/seeds/<target>/) through the same checks the fuzz
//! targets run (quenchless_profile::fuzzing), so every seed stays a regression test
//! without a fuzzer. The properties are our own format's (no external source).

use quenchless_profile::fuzzing::{check_study, check_units, check_waveform};
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::path::PathBuf;

fn seeds_dir(target: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../fuzz/seeds").join(target)
}

/// Runs `check` on every file of the target's seed folder; fails naming each seed that
/// panics or breaks a property, and fails if the folder holds fewer than `at_least`.
fn replay(target: &str, at_least: usize, check: fn(&[u8]) -> Result<(), String>) {
    let dir = seeds_dir(target);
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .map(|entry| entry.unwrap_or_else(|e| panic!("{}: {e}", dir.display())).path())
        .filter(|p| p.is_file())
        .collect();
    files.sort();
    assert!(files.len() >= at_least, "{}: {} seeds, expected at least {at_least}", dir.display(), files.len());
    let mut failures = Vec::new();
    for path in &files {
        let data = std::fs::read(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
        match catch_unwind(AssertUnwindSafe(|| check(&data))) {
            Ok(Ok(())) => {}
            Ok(Err(broken)) => failures.push(format!("{}: {broken}", path.display())),
            Err(_) => failures.push(format!("{}: panicked", path.display())),
        }
    }
    assert!(failures.is_empty(), "{} of {} seeds fail:\n{}", failures.len(), files.len(), failures.join("\n"));
}

#[test]
fn fuzz_seeds_study_ron() {
    replay("study_ron", 3, check_study);
}

#[test]
fn fuzz_seeds_waveform_csv() {
    replay("waveform_csv", 3, check_waveform);
}

#[test]
fn fuzz_seeds_unit_values() {
    replay("unit_values", 3, check_units);
}

/// Input that is no text, empty or cut short is handled like any other: an error that
/// names its place, no panic.
#[test]
fn fuzz_checks_handle_broken_input() {
    for garbage in [&b"\xff\xfe"[..], b"", b"Study(", b"t,omega\n0,1\n1", b"\0"] {
        check_study(garbage).unwrap();
        check_waveform(garbage).unwrap();
        check_units(garbage).unwrap();
    }
}
