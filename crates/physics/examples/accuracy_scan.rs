//! Prints the adaptive Magnus error on Q* against the exact 1 of a shortcut ramp and
//! against the closed-form constant-mu Q*, with the step counts (for tuning).
#![expect(clippy::unwrap_used, reason = "a developer tool on fixed, valid inputs")]
use quenchless_physics::PropagationOptions;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::propagate::{fundamental_between, q_star_from_fundamental};
use quenchless_physics::ramp::{ConstantMuRamp, Ramp, RampShape, ShortcutRamp};

fn main() {
    let w = TWO_PI * 100e3;
    let cases = [
        ("shortcut 12us x0.25", Ramp::Shortcut(ShortcutRamp::new(w, 0.25 * w, 12e-6).unwrap()), 1.0),
        ("shortcut 1us x0.1 (inverts)", Ramp::Shortcut(ShortcutRamp::new(w, 0.1 * w, 1e-6).unwrap()), 1.0),
        ("shortcut 40us x4", Ramp::Shortcut(ShortcutRamp::new(w, 4.0 * w, 40e-6).unwrap()), 1.0),
    ];
    for acc in [1e-8, 1e-10, 1e-12] {
        let opts = PropagationOptions { accuracy: acc, ..PropagationOptions::default() };
        for (name, r, exact) in &cases {
            let (m, steps) = fundamental_between(r, 0.0, r.duration(), &opts).unwrap();
            let q = q_star_from_fundamental(&m, r.omega_initial(), r.omega_final());
            println!("acc {acc:e} {name:<30} steps {steps:6} error {:.2e}", (q - exact).abs());
        }
        let c = ConstantMuRamp::with_mu(w, 0.2 * w, -0.9).unwrap();
        let theta: f64 = (0.2f64).ln() / -0.9;
        let om = (4.0 - 0.81f64).sqrt();
        let exact = 1.0 + 0.81 * (1.0 - (om * theta).cos()) / (om * om);
        let r = Ramp::ConstantMu(c);
        let (m, steps) = fundamental_between(&r, 0.0, r.duration(), &opts).unwrap();
        let q = q_star_from_fundamental(&m, r.omega_initial(), r.omega_final());
        println!("acc {acc:e} {:<30} steps {steps:6} error {:.2e}", "constant mu -0.9", (q - exact).abs());
    }
}
