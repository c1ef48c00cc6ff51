use quenchless_profile::units::{Quantity, parse_fraction, parse_quantity};

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
