use approx::assert_relative_eq;
use quenchless_physics::constants::{BOLTZMANN, HBAR};
use quenchless_physics::{Bath, Moments, Noise};

use super::W_100K;

/// A long contact relaxes H to (hbar omega/2) coth(hbar omega / 2 k_B T) and removes
/// coherence (Rezek and Kosloff, New J. Phys. 8, 83 (2006); the equilibrium is the Bose-Einstein mean energy).
#[test]
fn thermalisation_relaxes_to_coth() {
    let t_bath = 5e-6;
    let bath = Bath::with_temperature(W_100K, t_bath, 1e4).unwrap();
    let map = bath.stroke(50.0 / 1e4, &Noise::NONE).unwrap();
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
        let h = bath.stroke(t, &Noise::NONE).unwrap().apply(&nalgebra::Vector3::new(h0, 0.0, 0.0))[0];
        assert_relative_eq!(h - heq, (h0 - heq) * (-3e4 * t).exp(), max_relative = 1e-12);
        assert!(h < prev);
        prev = h;
    }
}

/// With amplitude noise the contact's map is a matrix exponential; as the noise goes
/// to zero it must become the closed-form Lindblad map (Rezek and Kosloff, New J. Phys.
/// 8, 83 (2006)), which fixes the signs of the rotation and the decay it is built from.
#[test]
fn noisy_contact_tends_to_the_closed_form() {
    let bath = Bath::with_occupation(W_100K, 2.0, 3e4).unwrap();
    let t = 37e-6;
    let exact = bath.stroke(t, &Noise::new(2e3, 0.0).unwrap()).unwrap();
    let faint = bath.stroke(t, &Noise::new(2e3, 1e-30).unwrap()).unwrap();
    let scale = bath.equilibrium_energy();
    assert!((exact.a - faint.a).amax() < 1e-12, "{}", (exact.a - faint.a).amax());
    assert!((exact.b - faint.b).amax() < 1e-12 * scale);
}

/// Without a bath, white amplitude noise of spectral density S on omega² heats the
/// trapped oscillator exponentially at the rate pi² nu² S_k(2 nu) with the one-sided
/// density S_k = 2 S (T. A. Savard, K. M. O'Hara and J. E. Thomas, Phys. Rev. A 56,
/// R1095 (1997)), that is omega² S / 2; the rotating L adds ripples of relative size
/// kappa / omega.
#[test]
fn amplitude_noise_in_contact_heats_at_the_savard_rate() {
    let s = 2e-9;
    let no_coupling = Bath::with_occupation(W_100K, 0.0, 0.0).unwrap();
    let kappa = 0.5 * W_100K * W_100K * s;
    let t = 0.2 / kappa;
    let h0 = HBAR * W_100K * 3.5;
    let h =
        no_coupling.stroke(t, &Noise::new(0.0, s).unwrap()).unwrap().apply(&nalgebra::Vector3::new(h0, 0.0, 0.0))[0];
    let savard = h0 * (kappa * t).exp();
    assert!((h / savard - 1.0).abs() < 10.0 * kappa / W_100K, "{h:e} vs {savard:e} (kappa/omega {:e})", kappa / W_100K);
}

/// A fixed trap in contact with a bath and amplitude noise settles where the bath's
/// cooling balances the heating: H_ss = Gamma H_eq / (Gamma - kappa + kappa²/(Gamma' +
/// kappa + 4 omega²/Gamma')), derived by setting to zero the Lindblad generator of
/// Rezek and Kosloff (2006) plus Savard et al.'s (1997) heating term (the derivation is
/// in `Bath::stationary_energy`); for omega >> Gamma it is H_eq / (1 - kappa/Gamma).
#[test]
fn contact_with_amplitude_noise_settles_at_the_balance() {
    let bath = Bath::with_occupation(W_100K, 1.5, 4e4).unwrap();
    let noise = Noise::new(5e3, 4e-8).unwrap();
    let kappa = 0.5 * W_100K * W_100K * noise.amplitude_psd;
    let steady = bath.stationary_energy(&noise).expect("the bath outruns the heating");
    let heq = bath.equilibrium_energy();
    assert!(kappa / bath.rate() > 0.1, "a visible effect: kappa/Gamma = {}", kappa / bath.rate());
    // The kappa² term is of relative size kappa Gamma'/(4 omega²): tiny here.
    assert!((steady / (heq / (1.0 - kappa / bath.rate())) - 1.0).abs() < 1e-3);
    let long = bath.stroke(60.0 / bath.rate(), &noise).unwrap();
    for start in [0.0, heq, 10.0 * heq] {
        let v = long.apply(&nalgebra::Vector3::new(start, 0.3 * start, -0.2 * start));
        assert!((v[0] / steady - 1.0).abs() < 1e-10, "from {start:e}: {:e} vs {steady:e}", v[0]);
    }
    let fixed = long.fixed_point().expect("a contracting map");
    assert!((fixed[0] / steady - 1.0).abs() < 1e-10);
    // Heating faster than the bath cools has no steady state.
    assert!(bath.stationary_energy(&Noise::new(0.0, 4.0 * bath.rate() / (W_100K * W_100K)).unwrap()).is_none());
}
