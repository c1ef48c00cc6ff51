//! Save -> load of any valid study is the identity (no external source: a property of
//! our own format). Studies are drawn at random over every section of the schema, with
//! values inside their allowed ranges.

use proptest::collection::vec;
use proptest::prelude::*;
use quenchless_profile::study::{
    BathFilling, BathSpec, CandidateRamp, CycleSpec, DisplayUnits, DriveCalibrationSpec, DriveSpec, FrequencyUnit,
    GeneratorSpec, HoldSpec, InitialStateSpec, KnotSpec, NoiseSpec, RampSpec, SplineShapeSpec, StrokeSpec, Study,
    TimeUnit, TrapSpec,
};
use quenchless_profile::{load_study, parse_study, save_study, study_to_string};
use std::path::Path;

fn frequency() -> impl Strategy<Value = f64> {
    (3.0f64..7.0).prop_map(|e| 10f64.powf(e))
}

fn duration() -> impl Strategy<Value = f64> {
    (-7.0f64..-3.0).prop_map(|e| 10f64.powf(e))
}

fn ramp(from: f64, to: f64) -> impl Strategy<Value = RampSpec> {
    prop_oneof![
        duration().prop_map(move |d| RampSpec::Linear { from_hz: from, to_hz: to, duration_s: d }),
        duration().prop_map(move |d| RampSpec::ConstantMu { from_hz: from, to_hz: to, duration_s: d }),
        duration().prop_map(move |d| RampSpec::Shortcut { from_hz: from, to_hz: to, duration_s: d }),
        (vec(0.0f64..1e12, 1..5), duration()).prop_map(|(c, d)| RampSpec::Polynomial {
            omega2_coefficients: c.iter().map(|x| x + 1e9).collect(),
            duration_s: d
        }),
        vec((prop::bool::ANY, frequency(), duration()), 1..6).prop_map(move |h| RampSpec::Holds {
            from_hz: from,
            to_hz: to,
            holds: h
                .into_iter()
                .map(|(inv, f, d)| HoldSpec { signed_frequency_hz: if inv { -f } else { f }, duration_s: d })
                .collect(),
        }),
        (vec((duration(), frequency()), 1..8), prop::bool::ANY, prop::bool::ANY, prop::bool::ANY).prop_map(
            move |(k, smooth, log, flat)| {
                let mut t = 0.0;
                let mut knots = vec![KnotSpec { t_s: 0.0, frequency_hz: from }];
                for (dt, f) in k {
                    t += dt;
                    knots.push(KnotSpec { t_s: t, frequency_hz: f });
                }
                if let Some(last) = knots.last_mut() {
                    last.frequency_hz = to;
                }
                RampSpec::Spline {
                    knots,
                    shape: if smooth { SplineShapeSpec::Smooth } else { SplineShapeSpec::Monotone },
                    log_frequency: log,
                    flat_ends: flat,
                }
            }
        ),
        (vec((duration(), frequency()), 1..8), prop::bool::ANY).prop_map(|(rows, hold)| {
            let mut t = 0.0;
            let mut times_s = vec![0.0];
            let mut values = vec![6.0e5];
            for (dt, f) in rows {
                t += dt;
                times_s.push(t);
                values.push(f);
            }
            RampSpec::Waveform {
                source: "drawn at random".into(),
                omega2_column: false,
                hold,
                times_s,
                values,
                end_frequencies_rad_s: None,
            }
        }),
    ]
}

fn initial_state() -> impl Strategy<Value = InitialStateSpec> {
    prop_oneof![
        (0.0f64..20.0).prop_map(|occupation| InitialStateSpec::Thermal { occupation }),
        (0.0f64..1e-3).prop_map(|temperature_k| InitialStateSpec::ThermalAt { temperature_k }),
        (0.0f64..5.0, 0.0f64..2.0, -3.0f64..3.0).prop_map(|(occupation, r, phi)| InitialStateSpec::Squeezed {
            occupation,
            r,
            phi
        }),
    ]
}

fn generator() -> impl Strategy<Value = GeneratorSpec> {
    let drive = (prop::bool::ANY, frequency(), 0.01f64..10.0, 0.1f64..100.0, prop::bool::ANY, prop::bool::ANY)
        .prop_map(|(table, f, d, top, neg, mw)| DriveSpec {
            unit: if mw { "mW".into() } else { "V".into() },
            calibration: if table {
                DriveCalibrationSpec::Table {
                    frequency_hz: vec![f, 2.0 * f, 3.0 * f],
                    drive: vec![d, 2.0 * d, 5.0 * d],
                }
            } else {
                DriveCalibrationSpec::FrequencySquared { reference_frequency_hz: f, drive_at_reference: d }
            },
            full_scale_low: if neg { -top } else { 0.0 },
            full_scale_high: top,
            can_go_negative: neg,
        });
    (
        (6.0f64..10.0).prop_map(|e| 10f64.powf(e)),
        prop::bool::ANY,
        prop::option::of(1u32..=32),
        prop::option::of(drive),
        prop::option::of(0.1f64..1e6),
        prop::option::of(duration()),
        prop::option::of(0.0f64..0.125),
    )
        .prop_map(|(rate, mid, bits, drive, slew, lp, jitter)| GeneratorSpec {
            sample_rate_per_s: rate,
            midpoint_samples: mid,
            bits,
            drive,
            slew_limit_per_s: slew,
            low_pass_s: lp,
            jitter_rms_s: jitter.map(|j| j / rate),
            max_rate_per_s: None,
        })
}

fn study() -> impl Strategy<Value = Study> {
    (frequency(), frequency()).prop_flat_map(|(start, end)| {
        (
            vec(ramp(start, end), 0..5),
            initial_state(),
            (0.0f64..1e4, 0.0f64..1e-9),
            (-9.0f64..-0.5).prop_map(|e| 10f64.powf(e)),
            prop::option::of(generator()),
            prop::option::of((1.0f64..1e5, 0.0f64..10.0, duration(), duration(), 0.1f64..0.9)),
            ("[ -~]{0,40}", prop::bool::ANY),
        )
            .prop_map(move |(ramps, init, (deph, psd), tol, generator, cycle, (notes, dimensionless))| Study {
                name: "random study".into(),
                notes,
                display: DisplayUnits { frequency: FrequencyUnit::MHz, time: TimeUnit::Ns, dimensionless },
                trap: TrapSpec { start_frequency_hz: start, end_frequency_hz: end, ..TrapSpec::default() },
                initial_state: init,
                noise: NoiseSpec { dephasing_rate_per_s: deph, amplitude_psd_s: psd },
                tolerance: tol,
                candidates: ramps
                    .into_iter()
                    .enumerate()
                    .map(|(i, ramp)| CandidateRamp {
                        name: format!("candidate {i}"),
                        visible: i % 2 == 0,
                        colour: Some([i as u8, 40, 200]),
                        ramp,
                    })
                    .collect(),
                cycle: cycle.map(|(rate, n, th, tc, ratio)| CycleSpec {
                    hot: BathSpec {
                        frequency_hz: start,
                        filling: BathFilling::Occupation(n),
                        rate_per_s: rate,
                        time_s: th,
                    },
                    cold: BathSpec {
                        frequency_hz: start * ratio,
                        filling: BathFilling::TemperatureK(1e-6 * n),
                        rate_per_s: rate,
                        time_s: tc,
                    },
                    expansion: StrokeSpec::IdealAdiabatic { time_s: th },
                    compression: StrokeSpec::Sudden { hold_s: tc },
                }),
                generator,
                ..Study::default()
            })
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 96, ..ProptestConfig::default() })]

    #[test]
    fn save_then_load_is_the_identity(s in study()) {
        // Only studies the validator accepts are kept (random ramps can, e.g., leave a
        // spline below zero); most draws are valid.
        prop_assume!(quenchless_profile::convert::validate(&s).is_ok());
        let text = study_to_string(&s).unwrap();
        prop_assert_eq!(&parse_study(&text, Path::new("random.ron")).unwrap(), &s);
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("random.ron");
        save_study(&s, &path).unwrap();
        prop_assert_eq!(load_study(&path).unwrap(), s);
    }
}

/// The property above is not vacuous: most drawn studies pass validation.
#[test]
fn most_drawn_studies_are_valid() {
    use proptest::strategy::ValueTree;
    use proptest::test_runner::TestRunner;
    let mut runner = TestRunner::deterministic();
    let strategy = study();
    let n = 200;
    let valid = (0..n)
        .filter(|_| quenchless_profile::convert::validate(&strategy.new_tree(&mut runner).unwrap().current()).is_ok())
        .count();
    assert!(valid * 2 > n, "only {valid} of {n} drawn studies are valid");
}
