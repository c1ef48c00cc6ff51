use quenchless_profile::study::{DriveSpec, FrequencyUnit, GeneratorSpec, Study, TimeUnit};
use quenchless_profile::units::{Quantity, parse_fraction, parse_quantity};
use quenchless_profile::{ProfileError, convert, load_study, parse_study, study_to_string};
use std::path::Path;

/// Expected values from the SI prefixes (BIPM, The International System of Units,
/// 9th edition, 2019).
#[test]
fn values_with_units_parse_with_or_without_space() {
    let cases = [
        ("1.2MHz", Quantity::Frequency, 1.2e6),
        ("150 kHz", Quantity::Frequency, 150e3),
        ("3GHz", Quantity::Frequency, 3e9),
        ("2.5e3 Hz", Quantity::Frequency, 2.5e3),
        ("150us", Quantity::Time, 150e-6),
        ("150 µs", Quantity::Time, 150e-6),
        ("20ns", Quantity::Time, 20e-9),
        ("1e-3 s", Quantity::Time, 1e-3),
        ("4ms", Quantity::Time, 4e-3),
        ("40uK", Quantity::Temperature, 40e-6),
        ("40 µK", Quantity::Temperature, 40e-6),
        ("3 nK", Quantity::Temperature, 3e-9),
        ("1.5mK", Quantity::Temperature, 1.5e-3),
        ("2 K", Quantity::Temperature, 2.0),
    ];
    for (text, kind, want) in cases {
        let got = parse_quantity(text, kind).unwrap();
        assert!((got - want).abs() <= 1e-15 * want.abs(), "{text}: {got} vs {want}");
    }
}

#[test]
fn missing_wrong_or_miscased_units_are_errors() {
    for (text, kind, needle) in [
        ("150", Quantity::Time, "needs a unit"),
        ("150 khz", Quantity::Frequency, "unknown"),
        ("150 kHz", Quantity::Time, "unknown time unit"),
        ("NaN kHz", Quantity::Frequency, "finite"),
        ("inf s", Quantity::Time, "finite"),
        ("kHz", Quantity::Frequency, "expected a number"),
        ("1.2.3 kHz", Quantity::Frequency, "not a number"),
    ] {
        let e = parse_quantity(text, kind).unwrap_err().to_string();
        assert!(e.contains(needle), "{text}: {e}");
    }
}

/// 5 % = 0.05 (definition of the percent; common practice, no source).
#[test]
fn fractions_and_percentages() {
    assert!((parse_fraction("5%").unwrap() - 0.05).abs() < 1e-15);
    assert!((parse_fraction("0.05").unwrap() - 0.05).abs() < 1e-15);
    assert!(parse_fraction("five").is_err());
}

/// Every kind, every unit it takes, with and without a space, µ and u: the factor is the
/// SI prefix (SI brochure, BIPM 2019); a sample rate in Hz is one sample per clock cycle
/// (no 2 pi: a clock frequency counts cycles, not radians).
#[test]
fn every_unit_of_every_kind_parses() {
    let table: &[(Quantity, &[(&str, f64)])] = &[
        (Quantity::Frequency, &[("Hz", 1.0), ("kHz", 1e3), ("MHz", 1e6), ("GHz", 1e9)]),
        (Quantity::Time, &[("s", 1.0), ("ms", 1e-3), ("us", 1e-6), ("µs", 1e-6), ("ns", 1e-9)]),
        (Quantity::Temperature, &[("K", 1.0), ("mK", 1e-3), ("uK", 1e-6), ("µK", 1e-6), ("nK", 1e-9)]),
        (
            Quantity::SampleRate,
            &[
                ("S/s", 1.0),
                ("kS/s", 1e3),
                ("MS/s", 1e6),
                ("GS/s", 1e9),
                ("Hz", 1.0),
                ("kHz", 1e3),
                ("MHz", 1e6),
                ("GHz", 1e9),
            ],
        ),
        (Quantity::Length, &[("m", 1.0), ("mm", 1e-3), ("um", 1e-6), ("µm", 1e-6), ("nm", 1e-9)]),
        // u = 1.66053906660e-27 kg (CODATA 2018 recommended value).
        (Quantity::Mass, &[("kg", 1.0), ("u", 1.660_539_066_60e-27)]),
    ];
    for (kind, units) in table {
        let listed: Vec<&str> = kind.units().iter().map(|(u, _)| *u).collect();
        assert_eq!(listed, units.iter().map(|(u, _)| *u).collect::<Vec<_>>(), "{kind:?}: units as documented");
        for (unit, factor) in *units {
            for text in [format!("2.5{unit}"), format!("2.5 {unit}"), format!(" 2.5e0  {unit} ")] {
                let got = parse_quantity(&text, *kind).unwrap_or_else(|e| panic!("{text}: {e}"));
                let want = 2.5 * factor;
                assert!((got - want).abs() <= 1e-15 * want, "{text}: {got:e} vs {want:e}");
            }
        }
    }
}

/// A bare number is samples per second for a sample rate only (compatibility with the
/// first versions, which took --rate as a bare number); every other kind needs a unit.
#[test]
fn only_a_sample_rate_takes_a_bare_number() {
    assert!((parse_quantity("1e8", Quantity::SampleRate).unwrap() - 1e8).abs() < 1e-7);
    assert!(
        (parse_quantity("-5", Quantity::SampleRate).unwrap() + 5.0).abs() < 1e-15,
        "the sign is the generator's rule"
    );
    for kind in [Quantity::Frequency, Quantity::Time, Quantity::Temperature] {
        let e = parse_quantity("1e8", kind).unwrap_err().to_string();
        assert!(e.contains("\"1e8\"") && e.contains("needs a unit: one of"), "{kind:?}: {e}");
    }
}

/// Refused values quote the text and say what is allowed: unit symbols are
/// case-sensitive (SI brochure, BIPM 2019: "k" is kilo, "K" kelvin, "M" mega, "m" milli).
#[test]
fn refused_values_quote_the_text_and_say_what_is_allowed() {
    let cases: &[(&str, Quantity, &str)] = &[
        ("100 khz", Quantity::Frequency, "unknown frequency unit \"khz\"; use one of Hz, kHz, MHz, GHz (case matters)"),
        ("100Khz", Quantity::Frequency, "unknown frequency unit \"Khz\""),
        ("100 KHz", Quantity::Frequency, "unknown frequency unit \"KHz\""),
        ("3 Us", Quantity::Time, "unknown time unit \"Us\"; use one of s, ms, us, µs, ns"),
        ("3 Ms", Quantity::Time, "unknown time unit \"Ms\""),
        ("3 uk", Quantity::Temperature, "unknown temperature unit \"uk\"; use one of K, mK, uK, µK, nK"),
        (
            "100 ms/s",
            Quantity::SampleRate,
            "unknown sample rate unit \"ms/s\"; use one of S/s, kS/s, MS/s, GS/s or Hz..GHz",
        ),
        ("100 khz", Quantity::SampleRate, "unknown sample rate unit \"khz\""),
        ("100 MSa/s", Quantity::SampleRate, "unknown sample rate unit \"MSa/s\""),
        ("nan", Quantity::SampleRate, "the number must be finite, followed by a sample rate unit (S/s"),
        ("NaN kHz", Quantity::Frequency, "the number must be finite, followed by a frequency unit (Hz, kHz"),
        ("inf s", Quantity::Time, "the number must be finite, followed by a time unit (s, ms"),
        ("-inf K", Quantity::Temperature, "the number must be finite, followed by a temperature unit"),
        ("1e308GHz", Quantity::Frequency, "1e308 GHz is beyond the largest finite frequency: at most 1.79"),
        ("1e308GS/s", Quantity::SampleRate, "1e308 GS/s is beyond the largest finite sample rate"),
        ("1e400 s", Quantity::Time, "the number must be finite"),
        ("150", Quantity::Time, "a time needs a unit: one of s, ms, us, µs, ns"),
        ("20", Quantity::Temperature, "a temperature needs a unit: one of K, mK, uK, µK, nK"),
        ("MHz", Quantity::SampleRate, "expected a number followed by a sample rate unit"),
    ];
    for (text, kind, needle) in cases {
        let e = parse_quantity(text, *kind).unwrap_err().to_string();
        assert!(e.contains(&format!("\"{text}\"")), "{text}: the text is quoted in {e}");
        assert!(e.contains(needle), "{text}: expected {needle:?} in {e}");
    }
}

/// Fractions: "5%" is 0.05 (the percent is 1/100); not-a-number and infinity refused.
#[test]
fn fractions_refuse_what_is_not_one() {
    assert!((parse_fraction("5 %").unwrap() - 0.05).abs() < 1e-15);
    assert!((parse_fraction("-2%").unwrap() + 0.02).abs() < 1e-15, "the sign is the flag's rule");
    for (text, needle) in [
        ("nan", "must be finite"),
        ("inf%", "must be finite"),
        ("5 percent", "expected a fraction like 0.05 or a percentage like 5%"),
        ("5kHz", "expected a fraction"),
    ] {
        let e = parse_fraction(text).unwrap_err().to_string();
        assert!(e.contains(&format!("\"{text}\"")) && e.contains(needle), "{text}: {e}");
    }
}

fn study_with_display(frequency: &str, time: &str) -> Result<Study, ProfileError> {
    let text = format!(
        "Study(format_version: 2, display: DisplayUnits(frequency: {frequency}, time: {time}, dimensionless: false))"
    );
    parse_study(&text, Path::new("display.ron"))
}

/// Display units in study files: the SI symbols (SI brochure, BIPM 2019; `us` for µs,
/// as plain text files spell it) and the first versions' names, which load unchanged.
#[test]
fn display_units_take_si_and_old_spellings() {
    let frequencies = [
        ("Hz", FrequencyUnit::Hz),
        ("kHz", FrequencyUnit::KHz),
        ("MHz", FrequencyUnit::MHz),
        ("KHz", FrequencyUnit::KHz),
    ];
    let times =
        [("ns", TimeUnit::Ns), ("us", TimeUnit::Us), ("ms", TimeUnit::Ms), ("s", TimeUnit::S), ("Ns", TimeUnit::Ns)];
    for (f, fu) in frequencies {
        for (t, tu) in times {
            let s = study_with_display(f, t).unwrap_or_else(|e| panic!("{f}, {t}: {e}"));
            assert_eq!((s.display.frequency, s.display.time), (fu, tu), "{f}, {t}");
        }
    }
    for (t, tu) in [("Us", TimeUnit::Us), ("Ms", TimeUnit::Ms), ("S", TimeUnit::S)] {
        assert_eq!(study_with_display("kHz", t).unwrap().display.time, tu, "old spelling {t}");
    }
    // Unit factors of the SI prefixes (SI brochure, BIPM 2019).
    for (u, hz) in FrequencyUnit::ALL.iter().zip([1.0, 1e3, 1e6]) {
        assert!((u.hz() - hz).abs() <= 1e-15 * hz, "{}", u.symbol());
    }
    for (u, s) in TimeUnit::ALL.iter().zip([1e-9, 1e-6, 1e-3, 1.0]) {
        assert!((u.seconds() - s).abs() <= 1e-15 * s, "{}", u.symbol());
    }
}

/// Unknown or miscased display units are refused at their place in the file.
#[test]
fn display_units_refuse_unknown_spellings() {
    for (f, t, needle) in [
        ("khz", "us", "khz"),
        ("Khz", "us", "Khz"),
        ("GHz", "us", "GHz"),
        ("kHz", "US", "US"),
        ("kHz", "µs", "display.ron:1:"),
    ] {
        let e = study_with_display(f, t).unwrap_err().to_string();
        assert!(e.contains("display.ron:1:") && e.contains(needle), "{f}, {t}: {e}");
    }
}

/// A study written by the first versions, with `KHz` and `Ms` (milliseconds), loads;
/// the writer spells the units as in SI, and the rewritten text loads to the same study.
#[test]
fn old_display_spellings_load_and_are_rewritten_in_si() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/profile/fixtures/display_units_old_spellings.ron");
    let s = load_study(&path).unwrap();
    assert_eq!((s.display.frequency, s.display.time), (FrequencyUnit::KHz, TimeUnit::Ms));
    let text = study_to_string(&s).unwrap();
    assert!(text.contains("frequency: kHz") && text.contains("time: ms"), "{text}");
    assert!(!text.contains("KHz") && !text.contains("Ms"), "{text}");
    assert_eq!(parse_study(&text, Path::new("rewritten.ron")).unwrap(), s);
}

/// The sample studies use the SI spellings.
#[test]
fn sample_studies_spell_display_units_as_in_si() {
    for name in ["tweezer_expansion.ron", "single_ion_engine.ron", "ion_compression_tight.ron"] {
        let text = std::fs::read_to_string(super::samples_dir().join(name)).unwrap();
        let line = text.lines().find(|l| l.contains("display:")).unwrap();
        assert!(["kHz", "MHz"].iter().any(|u| line.contains(&format!("frequency: {u},"))), "{name}: {line}");
        assert!(["us", "ns"].iter().any(|u| line.contains(&format!("time: {u},"))), "{name}: {line}");
    }
}

/// The generator section's rules are the physics crate's (`Playback::validate`); each
/// error names the field, the value and what is allowed in the field's units, with no
/// placeholder file name (common practice, no source; the eighth of a period is
/// `jitter_limit`'s rule: 1/(8 x 1e8) s = 1.25e-9 s).
#[test]
fn generator_errors_name_field_value_and_what_is_allowed() {
    let base = GeneratorSpec::default();
    let cases: Vec<(GeneratorSpec, &str)> = vec![
        (
            GeneratorSpec { sample_rate_per_s: -5.0, ..base.clone() },
            "generator.sample_rate_per_s = -5 is not allowed: a finite number of samples per second > 0",
        ),
        (
            GeneratorSpec { sample_rate_per_s: f64::NAN, ..base.clone() },
            "generator.sample_rate_per_s = NaN is not allowed: a finite number of samples per second > 0",
        ),
        (GeneratorSpec { bits: Some(0), ..base.clone() }, "generator.bits = 0 is not allowed: 1 to 32"),
        (
            GeneratorSpec { bits: Some(33), drive: Some(DriveSpec::default()), ..base.clone() },
            "generator.bits = 33 is not allowed: 1 to 32",
        ),
        (
            GeneratorSpec { slew_limit_per_s: Some(-1.0), ..base.clone() },
            "generator.slew_limit_per_s = -1 is not allowed: a finite number of drive units per second > 0",
        ),
        (
            GeneratorSpec { low_pass_s: Some(0.0), ..base.clone() },
            "generator.low_pass_s = 0 is not allowed: a finite time > 0",
        ),
        (
            GeneratorSpec { jitter_rms_s: Some(2e-9), ..base.clone() },
            "generator.jitter_rms_s = 2e-9 s is not allowed: 0 to an eighth of the sample period, 1.25e-9 s",
        ),
        (
            GeneratorSpec { jitter_rms_s: Some(-1e-12), ..base.clone() },
            "generator.jitter_rms_s = -1e-12 s is not allowed: 0 to an eighth",
        ),
        (
            GeneratorSpec { max_rate_per_s: Some(1e7), ..base.clone() },
            "generator.max_rate_per_s = 10000000 is not allowed: a finite number of samples per second >= the sample rate, 1e8",
        ),
    ];
    for (g, needle) in cases {
        let e = convert::playback(&g).unwrap_err();
        assert_eq!(e.to_string(), e.user_message());
        let text = e.to_string();
        assert!(text.starts_with(needle), "expected {needle:?}, got {text}");
        assert!(!text.contains("<study>"), "{text}");
    }
    // At the edge of each rule the value is taken.
    let edge = GeneratorSpec { jitter_rms_s: Some(1.25e-9), bits: Some(32), max_rate_per_s: Some(1e8), ..base };
    assert!(convert::playback(&edge).is_ok());
}
