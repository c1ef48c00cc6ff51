use approx::assert_relative_eq;
use quenchless_physics::constants::{BOLTZMANN, HBAR};
use quenchless_physics::{Bath, Moments};

use super::W_100K;

/// A long contact relaxes H to (hbar omega/2) coth(hbar omega / 2 k_B T) and removes
/// coherence (Rezek and Kosloff, New J. Phys. 8, 83 (2006); the equilibrium is the Bose-Einstein mean energy).
#[test]
fn thermalisation_relaxes_to_coth() {
    let t_bath = 5e-6;
    let bath = Bath::with_temperature(W_100K, t_bath, 1e4).unwrap();
    let map = bath.stroke(50.0 / 1e4, 0.0).unwrap();
    let start = Moments::squeezed(W_100K, 7.0, 0.8, 0.4).unwrap().energy_picture(W_100K);
    let end = map.apply(&nalgebra::Vector3::new(start.h, start.l, start.c));
    let x = HBAR * W_100K / (2.0 * BOLTZMANN * t_bath);
    assert_relative_eq!(end[0], 0.5 * HBAR * W_100K / x.tanh(), max_relative = 1e-12);
    assert!(end[1].abs() < 1e-20 * end[0] && end[2].abs() < 1e-20 * end[0]);
}

/// H relaxes monotonically toward H_eq, exactly exponentially at rate Gamma.
#[test]
fn thermalisation_is_exponential() {
    let bath = Bath::with_occupation(W_100K, 2.0, 3e4).unwrap();
    let h0 = HBAR * W_100K * 9.0;
    let heq = bath.equilibrium_energy();
    let mut prev = h0;
    for k in 1..20 {
        let t = f64::from(k) * 5e-6;
        let h = bath.stroke(t, 0.0).unwrap().apply(&nalgebra::Vector3::new(h0, 0.0, 0.0))[0];
        assert_relative_eq!(h - heq, (h0 - heq) * (-3e4 * t).exp(), max_relative = 1e-12);
        assert!(h < prev);
        prev = h;
    }
}
