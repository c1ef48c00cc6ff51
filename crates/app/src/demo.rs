//! The built-in invented scenario the app opens on: a trapped particle relaxed from
//! 120 kHz to 30 kHz in 20 µs by several candidate ramps, and an engine cycle between
//! two invented baths. The numbers are made up for illustration, not a real apparatus.

use quenchless_profile::study::{
    BathFilling, BathSpec, CandidateRamp, CycleSpec, GeneratorSpec, HoldSpec, InitialStateSpec, KnotSpec, RampSpec,
    SplineShapeSpec, StrokeSpec, Study, TrapSpec,
};

/// Plot colours handed to new candidates (sRGB): the project's palette.
pub use crate::colours::PALETTE;

const START_HZ: f64 = 120e3;
const END_HZ: f64 = 30e3;
const TAU_S: f64 = 20e-6;

fn candidate(name: &str, colour: usize, ramp: RampSpec) -> CandidateRamp {
    CandidateRamp { name: name.into(), visible: true, colour: Some(PALETTE[colour % PALETTE.len()]), ramp }
}

/// The default ramp of each family between the trap's end frequencies.
pub fn family_template(family: &str, from_hz: f64, to_hz: f64, duration_s: f64) -> RampSpec {
    match family {
        "constant mu" => RampSpec::ConstantMu { from_hz, to_hz, duration_s },
        "shortcut" => RampSpec::Shortcut { from_hz, to_hz, duration_s },
        "polynomial" => {
            // omega² linear in t/tau between the two ends, (rad/s)².
            let (wi, wf) = (std::f64::consts::TAU * from_hz, std::f64::consts::TAU * to_hz);
            RampSpec::Polynomial { omega2_coefficients: vec![wi * wi, wf * wf - wi * wi], duration_s }
        }
        "holds" => RampSpec::Holds {
            from_hz,
            to_hz,
            holds: vec![
                HoldSpec { signed_frequency_hz: (from_hz * to_hz).sqrt(), duration_s: 0.5 * duration_s },
                HoldSpec { signed_frequency_hz: to_hz, duration_s: 0.5 * duration_s },
            ],
        },
        "spline" => RampSpec::Spline {
            knots: (0..=4)
                .map(|k| {
                    let s = f64::from(k) / 4.0;
                    KnotSpec { t_s: s * duration_s, frequency_hz: from_hz * (to_hz / from_hz).powf(s) }
                })
                .collect(),
            shape: SplineShapeSpec::Monotone,
            log_frequency: false,
            flat_ends: true,
        },
        "waveform" => RampSpec::Waveform {
            source: "template".into(),
            omega2_column: false,
            hold: false,
            times_s: vec![0.0, duration_s],
            values: vec![std::f64::consts::TAU * from_hz, std::f64::consts::TAU * to_hz],
            end_frequencies_rad_s: None,
        },
        _ => RampSpec::Linear { from_hz, to_hz, duration_s },
    }
}

/// Families offered by the "add candidate" menu, with the label of each.
pub const FAMILIES: [&str; 7] = ["linear", "constant mu", "shortcut", "polynomial", "holds", "spline", "waveform"];

/// The invented scenario.
pub fn demo_study() -> Study {
    let mut s = Study {
        name: "Demo: relaxing a trapped particle, 120 to 30 kHz (invented)".into(),
        notes: "An invented scenario to try the tool: every number is made up.".into(),
        trap: TrapSpec {
            start_frequency_hz: START_HZ,
            end_frequency_hz: END_HZ,
            lowest_frequency_hz: Some(5e3),
            highest_frequency_hz: Some(130e3),
            slew_limit_hz_per_s: Some(2.5e10),
            model: None,
        },
        generator: Some(GeneratorSpec { sample_rate_per_s: 100e6, bits: Some(16), ..GeneratorSpec::default() }),
        initial_state: InitialStateSpec::Thermal { occupation: 0.5 },
        ..Study::default()
    };
    s.candidates = vec![
        candidate("straight line", 0, family_template("linear", START_HZ, END_HZ, TAU_S)),
        candidate("invariant shortcut", 1, family_template("shortcut", START_HZ, END_HZ, TAU_S)),
        candidate(
            "hand-drawn spline",
            2,
            RampSpec::Spline {
                knots: vec![
                    KnotSpec { t_s: 0.0, frequency_hz: START_HZ },
                    KnotSpec { t_s: 4e-6, frequency_hz: 95e3 },
                    KnotSpec { t_s: 10e-6, frequency_hz: 50e3 },
                    KnotSpec { t_s: 15e-6, frequency_hz: 34e3 },
                    KnotSpec { t_s: TAU_S, frequency_hz: END_HZ },
                ],
                shape: SplineShapeSpec::Monotone,
                log_frequency: false,
                flat_ends: true,
            },
        ),
        candidate("constant adiabaticity", 3, family_template("constant mu", START_HZ, END_HZ, TAU_S)),
        candidate("two holds", 4, family_template("holds", START_HZ, END_HZ, TAU_S)),
        candidate("compression shortcut", 5, family_template("shortcut", END_HZ, START_HZ, TAU_S)),
    ];
    s.cycle = Some(CycleSpec {
        hot: BathSpec { frequency_hz: START_HZ, filling: BathFilling::Occupation(3.0), rate_per_s: 2e5, time_s: 30e-6 },
        cold: BathSpec { frequency_hz: END_HZ, filling: BathFilling::Occupation(0.3), rate_per_s: 2e5, time_s: 30e-6 },
        expansion: StrokeSpec::Candidate("invariant shortcut".into()),
        compression: StrokeSpec::Candidate("compression shortcut".into()),
    });
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn demo_is_a_valid_study() {
        quenchless_profile::convert::validate(&demo_study()).expect("the demo must validate");
    }

    #[test]
    fn every_family_template_is_valid() {
        for f in FAMILIES {
            quenchless_profile::convert::ramp_from_spec(&family_template(f, 100e3, 25e3, 10e-6), f).expect(f);
        }
    }
}
