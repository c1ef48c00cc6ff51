//! The files written for the apparatus are the waveform that was judged. For random
//! ramps of every family, rates (tau R mostly not whole), left and midpoint samples,
//! bit depths, low-pass and slew: every written omega table, read back by the reading
//! it states, gives the played Q* to 1e-12; the drive and code files, read back through
//! the stated calibration and the straight-binary transfer (common practice, no
//! source), give the generator's samples, the final level included. (A round trip of
//! our own formats; the played Q* itself is checked against an independent loop of exact
//! held steps in the physics crate's tests.)

#![expect(clippy::float_cmp, reason = "the files keep every digit: exact equality is the claim")]

use proptest::collection::vec;
use proptest::prelude::*;
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::playback::{AssessmentSettings, Playback, SamplePoint, assess};
use quenchless_physics::{PropagationOptions, RampShape};
use quenchless_profile::convert;
use quenchless_profile::drive::{write_dac_codes, write_drive_samples};
use quenchless_profile::study::{HoldSpec, KnotSpec, RampSpec, SplineShapeSpec};
use quenchless_profile::waveform::{ExportColumns, read_waveform, write_trap_table};
use std::path::Path;

fn khz() -> impl Strategy<Value = f64> {
    (20.0f64..200.0).prop_map(|f| f * 1e3)
}

fn micros() -> impl Strategy<Value = f64> {
    (0.3f64..6.0).prop_map(|t| t * 1e-6)
}

fn family() -> impl Strategy<Value = RampSpec> {
    (khz(), khz()).prop_flat_map(|(from, to)| {
        prop_oneof![
            micros().prop_map(move |d| RampSpec::Linear { from_hz: from, to_hz: to, duration_s: d }),
            micros().prop_map(move |d| RampSpec::ConstantMu { from_hz: from, to_hz: to, duration_s: d }),
            micros().prop_map(move |d| RampSpec::Shortcut { from_hz: from, to_hz: to, duration_s: d }),
            (vec(0.0f64..4e11, 1..4), micros()).prop_map(|(c, d)| RampSpec::Polynomial {
                omega2_coefficients: c.iter().enumerate().map(|(k, x)| if k == 0 { x + 1e10 } else { *x }).collect(),
                duration_s: d,
            }),
            vec((prop::bool::ANY, khz(), micros()), 1..4).prop_map(move |h| RampSpec::Holds {
                from_hz: from,
                to_hz: to,
                holds: h
                    .into_iter()
                    .map(|(inv, f, d)| HoldSpec { signed_frequency_hz: if inv { -0.3 * f } else { f }, duration_s: d })
                    .collect(),
            }),
            (vec((micros(), khz()), 1..5), prop::bool::ANY).prop_map(move |(k, smooth)| {
                let mut t = 0.0;
                let mut knots = vec![KnotSpec { t_s: 0.0, frequency_hz: from }];
                for (dt, f) in k {
                    t += dt;
                    knots.push(KnotSpec { t_s: t, frequency_hz: f });
                }
                if let Some(last) = knots.last_mut() {
                    last.frequency_hz = to;
                }
                let shape = if smooth { SplineShapeSpec::Smooth } else { SplineShapeSpec::Monotone };
                RampSpec::Spline { knots, shape, log_frequency: false, flat_ends: true }
            }),
            (vec((micros(), khz()), 1..6), prop::bool::ANY).prop_map(move |(rows, hold)| {
                let mut t = 0.0;
                let mut times_s = vec![0.0];
                let mut values = vec![from * std::f64::consts::TAU];
                for (dt, f) in rows {
                    t += dt;
                    times_s.push(t);
                    values.push(f * std::f64::consts::TAU);
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
    })
}

/// Data rows of a written CSV (after the `#` lines and the column header).
fn rows(path: &Path) -> Vec<Vec<f64>> {
    std::fs::read_to_string(path)
        .unwrap_or_default()
        .lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .map(|l| l.split(',').map(|c| c.parse::<f64>().unwrap_or(f64::NAN)).collect())
        .collect()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]
    #[test]
    fn written_files_are_the_played_waveform(
        spec in family(),
        rate in 2e7f64..3e8,
        midpoint in prop::bool::ANY,
        bits in prop::option::of(10u32..=24),
        low_pass in prop::option::of(2e-9f64..4e-8),
        slew_time in prop::option::of(1e-9f64..2e-7),
    ) {
        let Ok(ramp) = convert::ramp_from_spec(&spec, "ramp") else { return Ok(()) };
        let (lo2, _) = ramp.min_omega2();
        let (hi2, _) = ramp.max_omega2();
        // A hold sequence jumps to omega_f only at its end: the full scale covers both ends.
        let top = 1.5 * hi2.max(-lo2).max(ramp.omega_initial().powi(2)).max(ramp.omega_final().powi(2));
        let pb = Playback {
            point: if midpoint { SamplePoint::Midpoint } else { SamplePoint::Left },
            quantisation: bits.map(|b| (b, -top, top)),
            low_pass,
            // A full-scale swing in slew_time seconds.
            slew: slew_time.map(|t| 2.0 * top / t),
            ..Playback::sample_and_hold(rate)
        };
        let settings = AssessmentSettings { searches: false, ..AssessmentSettings::default() };
        let a = assess(&ramp, &pb, &settings, &PropagationOptions::default(), &|| false).unwrap();
        let dir = tempfile::tempdir().unwrap();
        let opts = PropagationOptions::default();
        for columns in [ExportColumns::Si, ExportColumns::Omega2, ExportColumns::LabMicrosecondsKilohertz] {
            let path = dir.path().join("trap.csv");
            if write_trap_table(&path, a.played.trap.as_ref().unwrap(), columns, &["header".into()]).is_err() {
                // Lab columns refuse an inverted trap; SI falls back to omega².
                prop_assert!(columns == ExportColumns::LabMicrosecondsKilohertz && a.inverts());
                continue;
            }
            let table = read_waveform(&path).unwrap();
            let reading = table.reading(false, "--hold").unwrap();
            let back = q_star(&table.to_ramp(reading, &path).unwrap(), &opts).unwrap();
            // Lab columns carry 15 significant digits, SI ones every digit; the playing is
            // propagated step by step as it streams, the file through the paired held-step
            // kernel, so the two agree to rounding relative to Q*: about the number of held
            // steps (up to ~1e5 here) times the double-precision epsilon (2.2e-16).
            let allowed = if columns == ExportColumns::LabMicrosecondsKilohertz { 1e-9 } else { 1e-11 };
            let (played, diff) = (a.played_q_star(), (back - a.played_q_star()).abs());
            prop_assert!(diff < allowed * played, "{columns:?}: {back} vs {played}");
        }
        let s = a.played.samples.as_ref().unwrap();
        let n = s.periods();
        let drive = dir.path().join("drive.csv");
        write_drive_samples(&drive, s, "V", &[]).unwrap();
        let d = rows(&drive);
        prop_assert_eq!(d.len(), n + 1);
        for (k, row) in d.iter().enumerate() {
            prop_assert_eq!(row[0], s.times[k]);
            prop_assert_eq!(row[1], s.drive[k]);
            // Through the stated calibration (drive = omega² here), the generator's level.
            let w2 = pb.calibration.omega2_of(row[1]).unwrap();
            prop_assert_eq!(w2, s.drive[k]);
        }
        prop_assert!((d[n][1] - a.played.omega_left_on.powi(2)).abs() <= 1e-9 * top, "the final level");
        if pb.slew.is_none() && pb.low_pass.is_none() {
            // Plain hold: the trap rows are the generator's levels.
            prop_assert_eq!(a.played.trap.as_ref().unwrap().omega2_rows(), &s.drive[..]);
        }
        if let Some((b, lo, hi)) = pb.quantisation {
            let codes = dir.path().join("codes.csv");
            write_dac_codes(&codes, s, &[]).unwrap();
            let c = rows(&codes);
            prop_assert_eq!(c.len(), n + 1);
            let step = (hi - lo) / (2f64.powi(b.cast_signed()) - 1.0);
            for (k, row) in c.iter().enumerate() {
                prop_assert_eq!(row[0] as usize, k);
                prop_assert!((lo + row[2] * step - s.drive[k]).abs() <= 1e-9 * step, "code of sample {k}");
            }
        }
    }
}
