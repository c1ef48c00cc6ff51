//! Helpers shared by the end-to-end tests of the binary.

#![allow(dead_code, reason = "each test crate uses a different subset")]

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

pub fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_quenchless"))
}

pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

pub fn sample(name: &str) -> PathBuf {
    root().join("sample_profiles").join(name)
}

pub fn run(args: &[&str]) -> Output {
    bin().args(args).output().expect("the binary runs")
}

pub fn json(args: &[&str]) -> Value {
    let out = run(args);
    assert!(out.status.success(), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice(&out.stdout).expect("valid JSON")
}

/// Exit status 2, a one-line message containing `needle`, and no panic.
pub fn fails_with(args: &[&str], needle: &str) {
    let out = run(args);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{args:?}: status {:?}, stderr {err}", out.status);
    assert!(err.contains(needle), "{args:?}: expected {needle:?} in {err}");
    assert!(!err.contains("panicked"), "{args:?}: {err}");
}

pub fn write(dir: &Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.to_string_lossy().into_owned()
}
