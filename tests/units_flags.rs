//! Every unit-bearing flag: the spellings it takes (with and without a space, µ and u)
//! and their value in SI, and the values it refuses with the message naming the flag,
//! the text typed and what is allowed. Unit factors: the SI prefixes (SI brochure,
//! BIPM 2019); a sample rate in Hz is one sample per clock cycle (no 2 pi).

#![expect(clippy::unwrap_used, reason = "helpers of tests fail loudly on bad fixtures")]

mod common;

use clap::Parser;
use common::{fails_with, json, sample, write};
use quenchless::cli::{Cli, Command, DesignKind};
use quenchless::flags::Given;

/// What a flag reads.
#[derive(Clone, Copy)]
enum Kind {
    /// A trap frequency, > 0.
    Frequency,
    /// A frequency bound, >= 0.
    FrequencyOrZero,
    /// A duration, > 0.
    Duration,
    /// A time, >= 0.
    TimeOrZero,
    /// A time of the generator: any sign reaches the generator's rules.
    GeneratorTime,
    /// A temperature, >= 0.
    Temperature,
    /// A sample rate: any sign reaches the generator's rules.
    SampleRate,
    /// A map error, 0 to below 90%.
    MapError,
    /// A robust band, above 0 and below 50%.
    RobustBand,
}

/// Spellings every flag of a kind takes, and their SI value (SI brochure, BIPM 2019).
fn accepted(kind: Kind) -> &'static [(&'static str, f64)] {
    match kind {
        Kind::Frequency | Kind::FrequencyOrZero => {
            &[("250Hz", 250.0), ("1.5 kHz", 1.5e3), ("120kHz", 120e3), ("2MHz", 2e6), ("1e-3 GHz", 1e6)]
        }
        Kind::Duration | Kind::TimeOrZero | Kind::GeneratorTime => &[
            ("2s", 2.0),
            ("3 ms", 3e-3),
            ("15us", 15e-6),
            ("15 µs", 15e-6),
            ("15µs", 15e-6),
            ("40 ns", 40e-9),
            ("1.5e1us", 15e-6),
        ],
        Kind::Temperature => &[("1K", 1.0), ("2 mK", 2e-3), ("20uK", 20e-6), ("20 µK", 20e-6), ("300nK", 300e-9)],
        Kind::SampleRate => &[
            ("1e8", 1e8),
            ("100MS/s", 1e8),
            ("100 MS/s", 1e8),
            ("250 kS/s", 250e3),
            ("1GS/s", 1e9),
            ("5000 S/s", 5e3),
            ("100MHz", 1e8),
            ("100 MHz", 1e8),
            ("2.5GHz", 2.5e9),
            ("10 kHz", 1e4),
            ("500Hz", 500.0),
        ],
        Kind::MapError => &[("5%", 0.05), ("5 %", 0.05), ("0.05", 0.05), ("0", 0.0)],
        Kind::RobustBand => &[("5%", 0.05), ("0.05", 0.05), ("49%", 0.49)],
    }
}

/// Values refused by the value parser, and the message after "FLAG VALUE: ".
fn refused(kind: Kind) -> &'static [(&'static str, &'static str)] {
    match kind {
        Kind::Frequency => &[
            ("100", "a frequency needs a unit: one of Hz, kHz, MHz, GHz"),
            ("100khz", "unknown frequency unit \"khz\"; use one of Hz, kHz, MHz, GHz (case matters)"),
            ("100Khz", "unknown frequency unit \"Khz\""),
            ("100 KHz", "unknown frequency unit \"KHz\""),
            ("100 mHz", "unknown frequency unit \"mHz\""),
            ("100us", "unknown frequency unit \"us\""),
            ("nan", "the number must be finite, followed by a frequency unit (Hz, kHz, MHz, GHz)"),
            ("infHz", "the number must be finite"),
            ("1e308GHz", "1e308 GHz is beyond the largest finite frequency: at most 1.79"),
            ("-5kHz", "allowed a finite frequency > 0 (Hz, kHz, MHz, GHz)"),
            ("0Hz", "allowed a finite frequency > 0 (Hz, kHz, MHz, GHz)"),
        ],
        Kind::FrequencyOrZero => &[
            ("10", "a frequency needs a unit"),
            ("10khz", "unknown frequency unit \"khz\""),
            ("nanHz", "the number must be finite"),
            ("1e308GHz", "1e308 GHz is beyond the largest finite frequency"),
            ("-1kHz", "allowed a finite frequency >= 0 (Hz, kHz, MHz, GHz)"),
        ],
        Kind::Duration => &[
            ("5", "a time needs a unit: one of s, ms, us, µs, ns"),
            ("5 Us", "unknown time unit \"Us\"; use one of s, ms, us, µs, ns (case matters)"),
            ("5Ms", "unknown time unit \"Ms\""),
            ("5 sec", "unknown time unit \"sec\""),
            ("infs", "the number must be finite, followed by a time unit"),
            ("-1us", "allowed a finite time > 0 (s, ms, us, µs, ns)"),
            ("0s", "allowed a finite time > 0 (s, ms, us, µs, ns)"),
        ],
        Kind::TimeOrZero => &[
            ("5", "a time needs a unit"),
            ("5 US", "unknown time unit \"US\""),
            ("nan", "the number must be finite"),
            ("1e400s", "the number must be finite"),
            ("-1us", "allowed a finite time >= 0 (s, ms, us, µs, ns)"),
        ],
        Kind::GeneratorTime => &[
            ("50", "a time needs a unit: one of s, ms, us, µs, ns"),
            ("50 NS", "unknown time unit \"NS\""),
            ("nan", "the number must be finite"),
        ],
        Kind::Temperature => &[
            ("20", "a temperature needs a unit: one of K, mK, uK, µK, nK"),
            ("20uk", "unknown temperature unit \"uk\""),
            ("20 MK", "unknown temperature unit \"MK\""),
            ("nanK", "the number must be finite"),
            ("-1uK", "allowed a finite temperature >= 0 (K, mK, uK, µK, nK)"),
        ],
        Kind::SampleRate => &[
            ("100khz", "unknown sample rate unit \"khz\"; use one of S/s, kS/s, MS/s, GS/s or Hz..GHz (case matters)"),
            ("100Khz", "unknown sample rate unit \"Khz\""),
            ("100 ms/s", "unknown sample rate unit \"ms/s\""),
            ("100 MSa/s", "unknown sample rate unit \"MSa/s\""),
            ("100us", "unknown sample rate unit \"us\""),
            ("nan", "the number must be finite, followed by a sample rate unit (S/s, kS/s, MS/s, GS/s or Hz..GHz)"),
            ("inf", "the number must be finite"),
            ("1e308GHz", "1e308 GHz is beyond the largest finite sample rate"),
            ("1e308 GS/s", "1e308 GS/s is beyond the largest finite sample rate"),
        ],
        Kind::MapError => &[
            ("95%", "allowed 0 to below 0.9 (0% to below 90%)"),
            ("0.9", "allowed 0 to below 0.9"),
            ("-1%", "allowed 0 to below 0.9"),
            ("abc", "expected a fraction like 0.05 or a percentage like 5%"),
            ("5kHz", "expected a fraction"),
            ("nan", "the number must be finite: a fraction like 0.05 or a percentage like 5%"),
        ],
        Kind::RobustBand => &[
            ("70%", "allowed above 0 and below 0.5 (0% to 50%, both excluded)"),
            ("0%", "allowed above 0 and below 0.5"),
            ("-5%", "allowed above 0 and below 0.5"),
            ("five", "expected a fraction"),
            ("inf", "the number must be finite: a fraction like 0.05 or a percentage like 5%"),
        ],
    }
}

/// One flag: the command line before it (all else it needs to parse) and where its
/// value lands.
struct Flag {
    name: &'static str,
    kind: Kind,
    before: &'static [&'static str],
    read: fn(&Command) -> Option<&Given>,
}

const PLAY: &[&str] = &["play", "p.ron", "--ramp", "r"];
const EXPORT: &[&str] = &["export", "p.ron", "--ramp", "r", "--out", "o.csv"];
const MU: &[&str] = &["design", "constant-mu", "--from", "100kHz", "--to", "10kHz"];
const SHORTCUT: &[&str] = &["design", "shortcut", "--from", "100kHz", "--to", "10kHz", "--time", "1us"];
const FROM: &[&str] = &["design", "shortcut", "--to", "10kHz", "--time", "1us"];
const TO: &[&str] = &["design", "shortcut", "--from", "100kHz", "--time", "1us"];
const TIME: &[&str] = &["design", "shortcut", "--from", "100kHz", "--to", "10kHz"];
const BANG_MIN: &[&str] = &["design", "bang-bang", "--from", "100kHz", "--to", "10kHz", "--max", "200kHz"];
const BANG_MAX: &[&str] = &["design", "bang-bang", "--from", "100kHz", "--to", "10kHz", "--min", "5kHz"];
const SPLINE: &[&str] = &["design", "spline", "p.ron", "--ramp", "r"];
const SWEEP: &[&str] = &["sweep", "--waveform", "w.csv", "--out", "o.csv"];
const TUNE: &[&str] = &["tune-cycle", "p.ron"];
const CYCLE: &[&str] = &["cycle"];

fn play(c: &Command) -> Option<&quenchless::cli::PlayArgs> {
    if let Command::Play(a) = c { Some(a) } else { None }
}

fn design(c: &Command) -> Option<&DesignKind> {
    if let Command::Design(a) = c { Some(&a.kind) } else { None }
}

fn cycle(c: &Command) -> Option<&quenchless::cli::CycleArgs> {
    if let Command::Cycle(a) = c { Some(a) } else { None }
}

fn design_out_rate(c: &Command) -> Option<&Given> {
    match design(c)? {
        DesignKind::Shortcut { out, .. } => out.rate.as_ref(),
        _ => None,
    }
}

fn ends(c: &Command) -> Option<&quenchless::cli::EndFrequencies> {
    match design(c)? {
        DesignKind::Shortcut { ends, .. } => Some(ends),
        _ => None,
    }
}

fn flags() -> Vec<Flag> {
    vec![
        Flag { name: "--rate", kind: Kind::SampleRate, before: PLAY, read: |c| play(c)?.rate.as_ref() },
        Flag { name: "--max-rate", kind: Kind::SampleRate, before: PLAY, read: |c| play(c)?.max_rate.as_ref() },
        Flag { name: "--full-scale", kind: Kind::Frequency, before: PLAY, read: |c| play(c)?.full_scale.as_ref() },
        Flag { name: "--low-pass", kind: Kind::GeneratorTime, before: PLAY, read: |c| play(c)?.low_pass.as_ref() },
        Flag { name: "--jitter", kind: Kind::GeneratorTime, before: PLAY, read: |c| play(c)?.jitter.as_ref() },
        Flag {
            name: "--rate",
            kind: Kind::SampleRate,
            before: EXPORT,
            read: |c| if let Command::Export(a) = c { a.rate.as_ref() } else { None },
        },
        Flag { name: "--rate", kind: Kind::SampleRate, before: SHORTCUT, read: design_out_rate },
        Flag { name: "--from", kind: Kind::Frequency, before: FROM, read: |c| ends(c).map(|e| &e.from) },
        Flag { name: "--to", kind: Kind::Frequency, before: TO, read: |c| ends(c).map(|e| &e.to) },
        Flag {
            name: "--time",
            kind: Kind::Duration,
            before: TIME,
            read: |c| match design(c)? {
                DesignKind::Shortcut { time, .. } => time.as_ref(),
                _ => None,
            },
        },
        Flag {
            name: "--near-time",
            kind: Kind::Duration,
            before: MU,
            read: |c| match design(c)? {
                DesignKind::ConstantMu { near_time, .. } => near_time.as_ref(),
                _ => None,
            },
        },
        Flag {
            name: "--min",
            kind: Kind::FrequencyOrZero,
            before: BANG_MIN,
            read: |c| match design(c)? {
                DesignKind::BangBang { min, .. } => Some(min),
                _ => None,
            },
        },
        Flag {
            name: "--max",
            kind: Kind::Frequency,
            before: BANG_MAX,
            read: |c| match design(c)? {
                DesignKind::BangBang { max, .. } => Some(max),
                _ => None,
            },
        },
        Flag {
            name: "--robust",
            kind: Kind::RobustBand,
            before: SPLINE,
            read: |c| match design(c)? {
                DesignKind::Spline { robust, .. } => robust.as_ref(),
                _ => None,
            },
        },
        Flag {
            name: "--calibration-error",
            kind: Kind::MapError,
            before: SWEEP,
            read: |c| if let Command::Sweep(a) = c { Some(&a.calibration_error) } else { None },
        },
        Flag {
            name: "--duration-error",
            kind: Kind::MapError,
            before: SWEEP,
            read: |c| if let Command::Sweep(a) = c { Some(&a.duration_error) } else { None },
        },
        Flag {
            name: "--total",
            kind: Kind::Duration,
            before: TUNE,
            read: |c| if let Command::TuneCycle(a) = c { a.total.as_ref() } else { None },
        },
        Flag {
            name: "--min-stroke-time",
            kind: Kind::Duration,
            before: TUNE,
            read: |c| if let Command::TuneCycle(a) = c { a.min_stroke_time.as_ref() } else { None },
        },
        Flag { name: "--hot-freq", kind: Kind::Frequency, before: CYCLE, read: |c| cycle(c)?.hot_freq.as_ref() },
        Flag { name: "--cold-freq", kind: Kind::Frequency, before: CYCLE, read: |c| cycle(c)?.cold_freq.as_ref() },
        Flag { name: "--hot-temp", kind: Kind::Temperature, before: CYCLE, read: |c| cycle(c)?.hot_temp.as_ref() },
        Flag { name: "--cold-temp", kind: Kind::Temperature, before: CYCLE, read: |c| cycle(c)?.cold_temp.as_ref() },
        Flag { name: "--hot-time", kind: Kind::TimeOrZero, before: CYCLE, read: |c| cycle(c)?.hot_time.as_ref() },
        Flag { name: "--cold-time", kind: Kind::TimeOrZero, before: CYCLE, read: |c| cycle(c)?.cold_time.as_ref() },
        Flag { name: "--expand-time", kind: Kind::TimeOrZero, before: CYCLE, read: |c| cycle(c)?.expand_time.as_ref() },
        Flag {
            name: "--compress-time",
            kind: Kind::TimeOrZero,
            before: CYCLE,
            read: |c| cycle(c)?.compress_time.as_ref(),
        },
    ]
}

fn args<'a>(f: &'a Flag, value: &'a str) -> Vec<&'a str> {
    std::iter::once("quenchless").chain(f.before.iter().copied()).chain([f.name, value]).collect()
}

#[test]
fn every_unit_bearing_flag_reads_its_spellings_in_si() {
    for f in flags() {
        let mut spellings = accepted(f.kind).to_vec();
        match f.kind {
            Kind::FrequencyOrZero => spellings.push(("0Hz", 0.0)),
            Kind::TimeOrZero => spellings.push(("0 s", 0.0)),
            _ => {}
        }
        for &(text, want) in &spellings {
            let cli = Cli::try_parse_from(args(&f, text)).unwrap_or_else(|e| panic!("{} {text}: {e}", f.name));
            let got = (f.read)(cli.command.as_ref().unwrap()).unwrap_or_else(|| panic!("{} {text}: not read", f.name));
            assert!((got.si - want).abs() <= 1e-15 * want.abs(), "{} {text}: {} vs {want}", f.name, got.si);
            assert_eq!(got.typed, text, "{}: the text typed is kept for messages", f.name);
        }
    }
}

#[test]
fn every_unit_bearing_flag_refuses_with_flag_value_and_what_is_allowed() {
    for f in flags() {
        for &(text, why) in refused(f.kind) {
            let argv = args(&f, text);
            fails_with(&argv[1..], &format!("error: {} {text}: {why}", f.name));
        }
    }
}

/// A clock frequency is samples per second: 100 MHz, 100 MS/s and 1e8 play alike (one
/// sample per clock cycle, no 2 pi).
#[test]
fn a_rate_in_hz_is_samples_per_second() {
    let p = sample("tweezer_expansion.ron");
    let p = p.to_str().unwrap();
    for rate in ["100MHz", "100 MS/s", "1e8", "0.1GS/s"] {
        let v = json(&["play", p, "--ramp", "shortcut 15 us", "--rate", rate, "--json"]);
        let got = v["rate_per_s"].as_f64().unwrap();
        assert!((got - 1e8).abs() < 1e-6, "--rate {rate}: {got:e}");
    }
}

/// The generator's rules (physics `Playback::validate`, reached through the profile's
/// one validator) refuse a flag's value with the flag and the text typed, never the
/// profile's field name or a placeholder; the eighth of a period at 1e8 samples/s is
/// 1.25e-9 s.
#[test]
fn generator_flags_are_refused_by_the_one_validator() {
    let p = sample("tweezer_expansion.ron");
    let p = p.to_str().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let o = dir.path().join("o.csv");
    let o = o.to_str().unwrap();
    let rate_rule = "allowed a finite number of samples per second > 0 (S/s, kS/s, MS/s, GS/s or Hz..GHz)";
    let play = |extra: &[&str]| -> Vec<String> {
        ["play", p, "--ramp", "shortcut 15 us"].iter().chain(extra).map(ToString::to_string).collect()
    };
    let cases: Vec<(Vec<String>, String)> = vec![
        (play(&["--rate", "-5"]), format!("--rate -5: {rate_rule}")),
        (play(&["--rate", "0MS/s"]), format!("--rate 0MS/s: {rate_rule}")),
        (play(&["--rate", "-100 MHz"]), format!("--rate -100 MHz: {rate_rule}")),
        (
            ["export", p, "--ramp", "straight line", "--rate", "-5", "--out", o].map(String::from).to_vec(),
            format!("--rate -5: {rate_rule}"),
        ),
        (
            [
                "design",
                "shortcut",
                "--from",
                "100kHz",
                "--to",
                "20kHz",
                "--time",
                "5us",
                "--waveform-out",
                o,
                "--rate",
                "0",
            ]
            .map(String::from)
            .to_vec(),
            format!("--rate 0: {rate_rule}"),
        ),
        (play(&["--bits", "0"]), "--bits 0: allowed 1 to 32".into()),
        (play(&["--bits", "33"]), "--bits 33: allowed 1 to 32".into()),
        (play(&["--slew", "-1"]), "--slew -1: allowed a finite number of drive units per second > 0".into()),
        (play(&["--low-pass", "0s"]), "--low-pass 0s: allowed a finite time > 0 (s, ms, us, µs, ns)".into()),
        (play(&["--low-pass", "-5 ns"]), "--low-pass -5 ns: allowed a finite time > 0".into()),
        (
            play(&["--jitter", "2ns"]),
            "--jitter 2ns: allowed 0 to an eighth of the sample period, 1.25e-9 s at 1e8 samples/s (s, ms, us, µs, ns)"
                .into(),
        ),
        (play(&["--jitter", "-1ns"]), "--jitter -1ns: allowed 0 to an eighth of the sample period".into()),
        (
            play(&["--rate", "100MHz", "--max-rate", "10 MS/s"]),
            "--max-rate 10 MS/s: allowed a finite number of samples per second >= the sample rate, 1e8 samples per \
             second (S/s, kS/s, MS/s, GS/s or Hz..GHz)"
                .into(),
        ),
    ];
    for (argv, needle) in &cases {
        let refs: Vec<&str> = argv.iter().map(String::as_str).collect();
        fails_with(&refs, &format!("error: {needle}"));
        let err = String::from_utf8_lossy(&common::run(&refs).stderr).into_owned();
        assert!(!err.contains("generator.") && !err.contains("<study>"), "{refs:?}: {err}");
    }
    // At the edge of the jitter rule the value is taken: 1.25 ns at 100 MS/s.
    let ok = common::run(&["play", p, "--ramp", "shortcut 15 us", "--jitter", "1.25ns", "--jitter-trials", "1"]);
    assert!(ok.status.success(), "{}", String::from_utf8_lossy(&ok.stderr));
}

/// A field the flags did not set but made wrong is named in the profile, with the flags
/// that made it so: the profile's 50 ns low-pass is fine, its jitter rule follows --rate.
#[test]
fn a_profile_field_broken_by_a_flag_names_the_file_and_the_flag() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(sample("tweezer_expansion.ron"))
        .unwrap()
        .replace("jitter_rms_s: None", "jitter_rms_s: Some(1.0e-9)");
    let p = write(dir.path(), "jittery.ron", &text);
    fails_with(
        &["play", &p, "--ramp", "shortcut 15 us", "--rate", "1GS/s"],
        "jittery.ron: generator.jitter_rms_s = 1e-9 s is not allowed: 0 to an eighth of the sample period, 1.25e-10 s \
         at 1e9 samples/s (with --rate 1GS/s)",
    );
}

/// `export --columns lab` of a trap that inverts as played: refused naming the flag,
/// never with the placeholder file name of an unsaved study.
#[test]
fn export_lab_columns_of_an_inverting_trap_names_the_flag() {
    let dir = tempfile::tempdir().unwrap();
    let study = r#"Study(
    format_version: 2,
    name: "Inverting",
    trap: TrapSpec(start_frequency_hz: 100000.0, end_frequency_hz: 25000.0),
    initial_state: Thermal(occupation: 0.0),
    tolerance: 0.001,
    candidates: [CandidateRamp(name: "fast", visible: true,
        ramp: Shortcut(from_hz: 100000.0, to_hz: 25000.0, duration_s: 1.5e-6))],
)"#;
    let p = write(dir.path(), "inv.ron", study);
    let o = dir.path().join("o.csv");
    let argv = ["export", &p, "--ramp", "fast", "--rate", "1GS/s", "--columns", "lab", "--out", o.to_str().unwrap()];
    fails_with(&argv, "error: --columns lab: allowed si or omega2 for this ramp: the trap inverts as played");
    let err = String::from_utf8_lossy(&common::run(&argv).stderr).into_owned();
    assert!(!err.contains("<study>"), "{err}");
    assert!(!o.exists());
}

/// Bath couplings and dephasing rates are bare numbers per second, and their help
/// says why (a unit like Hz there invites a 2 pi error).
#[test]
fn rates_per_second_stay_bare_numbers_and_say_why() {
    let cycle = String::from_utf8_lossy(&common::run(&["cycle", "--help"]).stdout).into_owned();
    let noise = String::from_utf8_lossy(&common::run(&["sweep-noise", "--help"]).stdout).into_owned();
    for (help, flag) in [(&cycle, "--hot-rate"), (&cycle, "--cold-rate"), (&noise, "--max-dephasing")] {
        // The last mention is the option's own entry (the first may be the usage line).
        let at = help.rfind(&format!("{flag} <")).unwrap_or_else(|| panic!("{flag} in help"));
        let words = &help[at..(at + 240).min(help.len())].split_whitespace().collect::<Vec<_>>().join(" ");
        assert!(words.contains("per second: a bare number"), "{flag}: {words}");
    }
    assert!(cycle.contains("2 pi error") && noise.contains("2 pi error"));
    fails_with(
        &[
            "cycle",
            "--hot-freq",
            "200kHz",
            "--cold-freq",
            "80kHz",
            "--hot-occupation",
            "4",
            "--cold-occupation",
            "1",
            "--hot-rate",
            "1kHz",
        ],
        "--hot-rate",
    );
}

/// The drive flags depend on each other: a full scale needs a bit depth, and a bit
/// depth without a drive section (a plain waveform) needs a full scale; each refusal
/// names the flags (common practice, no source: a DAC code means nothing without the
/// range it spans).
#[test]
fn drive_flags_that_need_each_other_say_which() {
    let dir = tempfile::tempdir().unwrap();
    let w = write(dir.path(), "w.csv", "t[us],nu[kHz]\n0,100\n10,20\n");
    let p = sample("tweezer_expansion.ron");
    let p = p.to_str().unwrap();
    fails_with(
        &["play", p, "--ramp", "shortcut 15 us", "--full-scale", "200kHz"],
        "error: --full-scale needs --bits N",
    );
    fails_with(
        &["play", "--waveform", &w, "--rate", "1e8", "--bits", "12"],
        "error: --bits 12: needs --full-scale F, or a profile generator with a drive section",
    );
    // Out of range comes first, named as typed.
    fails_with(&["play", "--waveform", &w, "--rate", "1e8", "--bits", "40"], "error: --bits 40: allowed 1 to 32");
    // No rate at all is said first, before a calibration file is read.
    fails_with(
        &["play", "--waveform", &w, "--calibration", "no_such_table.csv"],
        "error: give --rate R, or a profile whose generator section states a rate",
    );
    // With both, the plain waveform plays: 12 bits over +-200 kHz.
    let ok = common::run(&["play", "--waveform", &w, "--rate", "1e8", "--bits", "12", "--full-scale", "200kHz"]);
    assert!(ok.status.success(), "{}", String::from_utf8_lossy(&ok.stderr));
}
