//! The trap model of format 3: particle, axes, well shapes, the tweezer expansion, and
//! what older files and bad values become.

use quenchless_physics::anharmonic::WellShape;
use quenchless_profile::convert::trap_model;
use quenchless_profile::storage::{parse_study, study_to_string};
use quenchless_profile::study::FORMAT_VERSION;
use quenchless_profile::{ProfileError, Study};
use std::path::Path;

fn parse(text: &str) -> Result<Study, ProfileError> {
    parse_study(text, Path::new("trap.ron"))
}

fn with_model(model: &str, start: &str) -> String {
    format!(
        "Study(format_version: 3, initial_state: {start}, trap: TrapSpec(start_frequency_hz: 100000.0, \
         end_frequency_hz: 25000.0, model: Some(TrapModelSpec({model}))))"
    )
}

#[test]
fn a_format_2_study_loads_as_one_harmonic_axis_and_saves_as_format_3() {
    let s =
        parse("Study(format_version: 2, trap: TrapSpec(start_frequency_hz: 1e5, end_frequency_hz: 2.5e4))").unwrap();
    assert_eq!(s.format_version, FORMAT_VERSION);
    let m = trap_model(&s.trap).unwrap();
    assert_eq!(m.axes.len(), 1);
    assert_eq!(m.axes[0].well, WellShape::Harmonic);
    assert!(m.axes[0].axis.law.is_identity());
    assert!(study_to_string(&s).unwrap().contains("format_version: 3"));
    let e = parse("Study(format_version: 2, trap: TrapSpec(model: Some(TrapModelSpec())))").unwrap_err().to_string();
    assert!(e.contains("trap.model") && e.contains("format_version 3"), "{e}");
}

#[test]
fn a_tweezer_expands_into_its_radial_and_axial_axes() {
    // Paraxial Gaussian beam: zR = pi w0²/lambda and omega_z²/omega_r² = w0²/(2 zR²)
    // (B. E. A. Saleh and M. C. Teich, Fundamentals of Photonics, ch. 3; the curvatures
    // of U exp(-2r²/w0²) and U/(1 + z²/zR²) at the centre).
    let (w0, lambda) = (8e-7_f64, 8.5e-7_f64);
    let text = with_model(
        &format!(
            "particle: Some(Species(\"Rb87\")), reference_name: \"radial\", reference_well: Tweezer(waist_m: {w0:e}, \
             axial: Wavelength({lambda:e}), axial_name: \"axial\")"
        ),
        "Thermal(occupation: 0.2)",
    );
    let s = parse(&text).unwrap();
    let m = trap_model(&s.trap).unwrap();
    let z_r = std::f64::consts::PI * w0 * w0 / lambda;
    assert_eq!(m.axes.len(), 2);
    assert_eq!(m.axes[0].well, WellShape::Gaussian { waist_m: w0 });
    assert_eq!(m.axes[1].axis.name, "axial");
    match m.axes[1].well {
        WellShape::Lorentzian { rayleigh_range_m } => assert!((rayleigh_range_m - z_r).abs() < 1e-15 * z_r),
        w => panic!("axial well {w:?}"),
    }
    let gain = m.axes[1].axis.law.gain;
    assert!((gain - w0 * w0 / (2.0 * z_r * z_r)).abs() < 1e-15, "gain {gain}");
    assert!((0.045..0.06).contains(&gain), "a 0.8 um near-infrared tweezer: {gain}");
    // Rubidium-87: 86.909180527 u (AME2016, from memory), u from CODATA 2018.
    assert!((m.mass_kg.unwrap() - 86.909_180_527 * 1.660_539_066_60e-27).abs() < 1e-36);
    // By a measured ratio r = nu_z/nu_r instead: gain r², zR = w0/(r sqrt 2).
    let s = parse(&with_model(
        "particle: Some(MassU(86.909180527)), reference_well: Tweezer(waist_m: 8e-7, axial: FrequencyRatio(0.23), axial_name: \"z\")",
        "Thermal(occupation: 0.0)",
    ))
    .unwrap();
    let m = trap_model(&s.trap).unwrap();
    assert!((m.axes[1].axis.law.gain - 0.23 * 0.23).abs() < 1e-15);
}

#[test]
fn further_axes_take_a_gain_and_a_signed_offset() {
    // A linear Paul trap's radial axis under its DC (axial) control: omega_r² = omega_p²
    // - omega_z²/2 (e.g. D. J. Berkeland et al., J. Appl. Phys. 83, 5025 (1998), from
    // memory): gain -1/2, offset F_p = +3 MHz meaning +(2 pi 3 MHz)².
    let s = parse(&with_model(
        "reference_name: \"axial\", axes: [AxisSpec(name: \"radial\", gain: -0.5, offset_hz: 3e6, lowest_frequency_hz: Some(1e6))]",
        "Thermal(occupation: 1.0)",
    ))
    .unwrap();
    let m = trap_model(&s.trap).unwrap();
    let law = m.axes[1].axis.law;
    assert!((law.gain + 0.5).abs() < 1e-15);
    assert!((law.offset_omega2 - (std::f64::consts::TAU * 3e6).powi(2)).abs() < 1e-3);
    assert!(m.axes[1].axis.limits.omega_min.is_some());
    // A negative offset pulls the other way.
    let s = parse(&with_model("axes: [AxisSpec(name: \"y\", gain: 1.0, offset_hz: -1e4)]", "Thermal(occupation: 0.0)"))
        .unwrap();
    let law = trap_model(&s.trap).unwrap().axes[1].axis.law;
    assert!((law.offset_omega2 + (std::f64::consts::TAU * 1e4).powi(2)).abs() < 1e-6);
}

#[test]
fn bad_trap_models_are_refused_with_the_field() {
    let cases = [
        (with_model("reference_well: Gaussian(waist_m: 8e-7)", "Thermal(occupation: 0.0)"), "trap.model.particle"),
        (
            with_model(
                "particle: Some(Species(\"Unobtainium\")), reference_well: Gaussian(waist_m: 8e-7)",
                "Thermal(occupation: 0.0)",
            ),
            "Rb87",
        ),
        (with_model("particle: Some(MassKg(-1.0))", "Thermal(occupation: 0.0)"), "trap.model.particle"),
        (
            with_model(
                "particle: Some(MassU(87.0)), reference_well: Gaussian(waist_m: 0.0)",
                "Thermal(occupation: 0.0)",
            ),
            "waist_m",
        ),
        (with_model("axes: [AxisSpec(name: \"z\", gain: 0.0)]", "Thermal(occupation: 0.0)"), "axis gain"),
        (with_model("axes: [AxisSpec(name: \"reference\")]", "Thermal(occupation: 0.0)"), "twice"),
        (
            with_model("axes: [AxisSpec(name: \"z\", gain: 0.1)]", "Squeezed(occupation: 0.0, r: 0.5, phi: 0.0)"),
            "thermal start",
        ),
        (
            with_model(
                "particle: Some(MassU(87.0)), reference_well: Tweezer(waist_m: 8e-7, axial: FrequencyRatio(1.5), axial_name: \"z\")",
                "Thermal(occupation: 0.0)",
            ),
            "FrequencyRatio",
        ),
    ];
    for (text, needle) in cases {
        let e = parse(&text).unwrap_err().to_string();
        assert!(e.contains(needle), "{text}\n -> {e}");
    }
}
