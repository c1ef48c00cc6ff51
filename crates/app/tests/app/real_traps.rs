//! Real traps in the app: the trap model editor, every axis's verdict, and the
//! anharmonic check on a worker, checked against Husimi's closed forms through the
//! wavefunction solver (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)).

use crate::harness::app_harness;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable as _;
use quenchless_app::QuenchlessApp;
use quenchless_physics::diagnostics::q_star_minus_one;
use quenchless_physics::propagate::PropagationOptions;
use quenchless_profile::convert;
use quenchless_profile::study::{AxisSpec, TrapModelSpec, WellSpec};
use std::time::{Duration, Instant};

fn click(h: &mut Harness<'_, QuenchlessApp>, label: &str) {
    h.get_by_label(label).scroll_to_me();
    h.run_ok();
    h.get_by_label(label).click_accesskit();
    h.run_ok();
}

fn wait(h: &mut Harness<'_, QuenchlessApp>) {
    let t0 = Instant::now();
    while h.state_mut().design_panel().busy() {
        assert!(t0.elapsed() < Duration::from_mins(1), "the check did not finish in a minute");
        std::thread::sleep(Duration::from_millis(10));
        h.run_ok();
    }
    h.run_ok();
}

#[test]
fn describing_a_tweezer_adds_its_axial_axis_and_its_verdict() {
    let mut h = app_harness();
    click(&mut h, "Trap model: axes and wells");
    click(&mut h, "Describe a tweezer");
    let model = h.state().study().trap.model.clone().expect("a model");
    assert!(matches!(model.reference_well, WellSpec::Tweezer { .. }));
    // Every candidate now has a second axis; its verdict is shown by the axis's name
    // wherever it is the worst.
    let m = convert::trap_model(&h.state().study().trap).unwrap();
    assert_eq!(m.axes.len(), 2);
    let results = h.state_mut().results(quenchless_app::compute::Quality::SETTLED).clone();
    let outcome = results.candidates[0].ready().expect("evaluates");
    assert_eq!(outcome.other_axes.len(), 1);
    assert_eq!(outcome.other_axes[0].name, "axial");
    h.run_ok();
    click(&mut h, "One harmonic axis again");
    assert!(h.state().study().trap.model.is_none());
}

#[test]
fn the_check_in_harmonic_wells_gives_husimis_q_star_on_every_axis() {
    let mut h = app_harness();
    // A harmonic reference axis and a second harmonic axis at a quarter of omega²: the
    // wavefunction solver's energy ratio must be each axis's Q*, and the ground-state
    // fidelity sqrt(2/(1 + Q*)).
    h.state_mut().study_mut().trap.model = Some(TrapModelSpec {
        axes: vec![AxisSpec { name: "slow".into(), gain: 0.25, ..AxisSpec::default() }],
        ..TrapModelSpec::default()
    });
    h.state_mut().commit_edit();
    h.state_mut().select(0);
    h.run_ok();
    click(&mut h, "Design & hardware");
    click(&mut h, "Real wells: the anharmonic check");
    click(&mut h, "Check in the real wells");
    wait(&mut h);
    let r = h.state_mut().design_panel().real_wells.result.clone().expect("a result").expect("checks");
    assert_eq!(r.axes.len(), 2);
    let study = h.state().study().clone();
    let ramp = convert::candidate_ramp(&study.candidates[0], 0).unwrap();
    for (a, gain) in r.axes.iter().zip([1.0, 0.25]) {
        let axis = ramp.on_axis(quenchless_physics::ramp::AxisLaw::new(gain, 0.0).unwrap()).unwrap();
        let q1 = q_star_minus_one(&axis, &PropagationOptions::default()).unwrap();
        assert!(
            (a.check.energy_ratio_minus_one - q1).abs() < 1e-8,
            "{}: {} vs {q1}",
            a.axis.name,
            a.check.energy_ratio_minus_one
        );
        assert!((a.check.ground_fidelity - (2.0 / (2.0 + q1)).sqrt()).abs() < 1e-8);
    }
    // The pictures draw (the density map and the levels).
    h.run_ok();
    assert!(h.query_by_label("Pictures of the").is_some());
}
