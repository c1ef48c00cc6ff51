use super::samples_dir;
use quenchless_profile::study::{CandidateRamp, RampSpec};
use quenchless_profile::{ProfileError, Study, load_study, parse_study, save_study, study_to_string};
use std::path::Path;

#[test]
fn samples_load_and_round_trip() {
    let dir = tempfile::tempdir().unwrap();
    let mut n = 0;
    for entry in std::fs::read_dir(samples_dir()).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "ron") {
            let s = load_study(&path).unwrap_or_else(|e| panic!("{e}"));
            let out = dir.path().join("copy.ron");
            save_study(&s, &out).unwrap();
            assert_eq!(load_study(&out).unwrap(), s, "{}", path.display());
            n += 1;
        }
    }
    assert!(n >= 3, "at least three sample studies");
}

#[test]
fn syntax_errors_name_line_and_column() {
    let text = "Study(\n    format_version: 1,\n    name: \"x\",\n    tolerance: oops,\n)";
    let e = parse_study(text, Path::new("bad.ron")).unwrap_err();
    assert!(matches!(e, ProfileError::Syntax { line: 4, .. }), "{e}");
    assert!(e.to_string().starts_with("bad.ron:4:"), "{e}");
    let e = parse_study("", Path::new("empty.ron")).unwrap_err().to_string();
    assert!(e.contains("empty"), "{e}");
}

#[test]
fn newer_format_is_refused_and_missing_version_named() {
    let e = parse_study("Study(format_version: 99)", Path::new("new.ron")).unwrap_err();
    assert!(matches!(e, ProfileError::NewerFormat { found: 99, .. }), "{e}");
    let e = parse_study("Study(name: \"x\")", Path::new("old.ron")).unwrap_err().to_string();
    assert!(e.contains("format_version"), "{e}");
}

#[test]
fn invalid_fields_are_named() {
    let mut s = Study::default();
    s.candidates.push(CandidateRamp {
        name: "fast".into(),
        visible: true,
        colour: None,
        ramp: RampSpec::Linear { from_hz: 1e5, to_hz: 2e4, duration_s: -1e-6 },
    });
    let text = study_to_string(&s).unwrap();
    let e = parse_study(&text, Path::new("s.ron")).unwrap_err().to_string();
    assert!(e.contains("candidates[0] \"fast\".duration_s") && e.contains("-0.000001"), "{e}");
    s.candidates[0].ramp = RampSpec::Linear { from_hz: 1e5, to_hz: 2e4, duration_s: 1e-6 };
    s.candidates.push(s.candidates[0].clone());
    let e = quenchless_profile::convert::validate(&s).unwrap_err().to_string();
    assert!(e.contains("not used by another candidate"), "{e}");
}

#[test]
fn save_never_writes_an_invalid_study_and_keeps_the_old_file() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("keep.ron");
    let good = Study::default();
    save_study(&good, &path).unwrap();
    let mut bad = good.clone();
    bad.tolerance = -1.0;
    assert!(save_study(&bad, &path).is_err());
    assert_eq!(load_study(&path).unwrap(), good);
    // No temporary files are left behind.
    let leftovers: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .filter_map(std::result::Result::ok)
        .filter(|e| e.file_name().to_string_lossy().ends_with(".tmp"))
        .collect();
    assert!(leftovers.is_empty());
}

/// A format-1 file (generator rate and bits in `trap`) is upgraded on load: the
/// values move into the generator section, nothing else changes, and it saves as the
/// current format (no external source: a property of our own format history).
#[test]
fn format_one_is_upgraded() {
    let old = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/profile/fixtures/format1_tweezer.ron");
    let text = std::fs::read_to_string(&old).unwrap();
    assert!(text.contains("format_version: 1") && text.contains("generator_rate_per_s"));
    let s = load_study(&old).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(s.format_version, quenchless_profile::FORMAT_VERSION);
    let g = s.generator.as_ref().expect("the generator moved into its own section");
    assert!((g.sample_rate_per_s - 1.0e8).abs() < 1e-6 && g.bits == Some(16) && g.drive.is_none());
    // The current sample is the same study with a drive section added by hand.
    let new = load_study(&samples_dir().join("tweezer_expansion.ron")).unwrap();
    assert_eq!(s.trap, new.trap);
    assert_eq!(s.candidates, new.candidates);
    assert_eq!(s.initial_state, new.initial_state);
    let text = study_to_string(&s).unwrap();
    let current = format!("format_version: {}", quenchless_profile::FORMAT_VERSION);
    assert!(text.contains(&current) && !text.contains("generator_rate_per_s"), "{text}");
    assert_eq!(parse_study(&text, Path::new("again.ron")).unwrap(), s);
}

/// Every generator field is range-checked, and the error names the field, the value and
/// what is allowed (common practice, no source).
#[test]
fn generator_fields_are_checked() {
    let base = load_study(&samples_dir().join("tweezer_expansion.ron")).unwrap();
    let check = |edit: &dyn Fn(&mut Study), field: &str, allowed: &str| {
        let mut s = base.clone();
        edit(&mut s);
        let e = quenchless_profile::convert::validate(&s).unwrap_err().to_string();
        assert!(e.contains(field) && e.contains(allowed), "{field}: {e}");
    };
    check(&|s| s.generator.as_mut().unwrap().sample_rate_per_s = -1.0, "generator.sample_rate_per_s", "> 0");
    check(&|s| s.generator.as_mut().unwrap().bits = Some(40), "generator.bits", "1 to 32");
    check(&|s| s.generator.as_mut().unwrap().jitter_rms_s = Some(1e-6), "generator.jitter_rms_s", "eighth");
    check(&|s| s.generator.as_mut().unwrap().low_pass_s = Some(f64::NAN), "generator.low_pass_s", "> 0");
    check(
        &|s| s.generator.as_mut().unwrap().drive.as_mut().unwrap().full_scale_high = -1.0,
        "generator.drive.full_scale_high",
        "above full_scale_low",
    );
    check(
        &|s| s.generator.as_mut().unwrap().drive.as_mut().unwrap().unit = "m,W".into(),
        "generator.drive.unit",
        "without commas",
    );
    check(
        &|s| {
            s.generator.as_mut().unwrap().drive.as_mut().unwrap().calibration =
                quenchless_profile::DriveCalibrationSpec::Table {
                    frequency_hz: vec![10e3, 50e3, 40e3],
                    drive: vec![0.1, 0.5, 0.9],
                };
        },
        "generator.drive.calibration",
        "larger than the row before",
    );
}

/// Written files get the usual permissions: a new file what the umask leaves of
/// read-write for everyone (POSIX open(2) with mode 0666, as any program's new file;
/// common practice, no source), a replaced file keeps its mode.
#[cfg(unix)]
#[test]
fn written_files_get_the_usual_permissions() {
    use quenchless_profile::storage::write_atomically;
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    // What this process's umask gives a file made the ordinary way.
    let probe = dir.path().join("probe");
    std::fs::write(&probe, b"x").unwrap();
    let usual = std::fs::metadata(&probe).unwrap().permissions().mode() & 0o777;
    let new = dir.path().join("new.csv");
    write_atomically(&new, b"a").unwrap();
    assert_eq!(std::fs::metadata(&new).unwrap().permissions().mode() & 0o777, usual);
    let kept = dir.path().join("kept.ron");
    std::fs::write(&kept, b"old").unwrap();
    std::fs::set_permissions(&kept, std::fs::Permissions::from_mode(0o640)).unwrap();
    write_atomically(&kept, b"new").unwrap();
    assert_eq!(std::fs::metadata(&kept).unwrap().permissions().mode() & 0o777, 0o640);
    assert_eq!(std::fs::read(&kept).unwrap(), b"new");
}
