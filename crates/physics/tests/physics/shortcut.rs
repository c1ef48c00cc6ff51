//! Invariant-based shortcut: X. Chen, A. Ruschhaupt, S. Schmidt, A. del Campo,
//! D. Guéry-Odelin, J. G. Muga, Phys. Rev. Lett. 104, 063002 (2010): the end state
//! is energy-diagonal for any duration, even when omega² < 0 mid-ramp.

use quenchless_physics::diagnostics::q_star;
use quenchless_physics::ramp::{Ramp, ShortcutRamp};
use quenchless_physics::{EvaluationSettings, Moments, PropagationOptions, evaluate};

use super::W_100K;

#[test]
fn shortcut_ends_energy_diagonal_for_several_durations() {
    let wi = W_100K;
    for (wf, periods) in [(0.1 * wi, 3.0), (0.1 * wi, 0.5), (0.1 * wi, 0.15), (4.0 * wi, 0.2), (4.0 * wi, 2.0)] {
        let tau = periods * std::f64::consts::TAU / wi;
        let ramp = Ramp::Shortcut(ShortcutRamp::new(wi, wf, tau).unwrap());
        let q = q_star(&ramp, &PropagationOptions::default()).unwrap();
        assert!((q - 1.0).abs() < 1e-10, "wf/wi {}, {periods} periods: Q* - 1 = {:e}", wf / wi, q - 1.0);
    }
}

#[test]
fn short_shortcut_inverts_the_trap_and_says_so() {
    let wi = W_100K;
    let tau = 0.15 * std::f64::consts::TAU / wi;
    let ramp = Ramp::Shortcut(ShortcutRamp::new(wi, 0.1 * wi, tau).unwrap());
    let ev = evaluate(&ramp, &Moments::thermal_occupation(wi, 0.5).unwrap(), &EvaluationSettings::default()).unwrap();
    assert!(ev.report.min_omega2 < 0.0);
    assert!(ev.report.energy_diagonal);
    assert!(ev.report.final_coherence_ratio < 1e-4);
}
