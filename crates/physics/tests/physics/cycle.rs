//! Otto cycle checks (Y. Rezek and R. Kosloff, New J. Phys. 8, 83 (2006); R. Kosloff and Y. Rezek, Entropy 19, 136
//! (2017); H. S. Leff, Am. J. Phys. 55, 602 (1987), from memory).

use approx::assert_relative_eq;
use quenchless_physics::constants::{BOLTZMANN, HBAR};
use quenchless_physics::cycle::{OttoCycle, Regime, WorkStroke};
use quenchless_physics::ramp::{LinearRamp, Ramp};
use quenchless_physics::state::bose_einstein;
use quenchless_physics::{Bath, Noise, PropagationOptions};

use super::W_100K;

fn ideal(wh: f64, wc: f64, nh: f64, nc: f64) -> OttoCycle {
    let rate = 1e5;
    OttoCycle {
        hot: Bath::with_occupation(wh, nh, rate).unwrap(),
        hot_time: 60.0 / rate,
        expansion: WorkStroke::IdealAdiabatic { time: 1e-6 },
        cold: Bath::with_occupation(wc, nc, rate).unwrap(),
        cold_time: 60.0 / rate,
        compression: WorkStroke::IdealAdiabatic { time: 1e-6 },
        noise: Noise::NONE,
    }
}

/// Ideal strokes: efficiency 1 - omega_c/omega_h, work hbar (omega_h - omega_c)(nbar_h - nbar_c).
#[test]
fn ideal_cycle_efficiency_and_work() {
    let (wh, wc) = (W_100K, 0.4 * W_100K);
    let (nh, nc) = (3.0, 0.2);
    let rep = ideal(wh, wc, nh, nc).analyse(&PropagationOptions::default()).unwrap();
    assert!(rep.stable);
    let f = rep.figures.unwrap();
    assert_eq!(f.regime, Regime::Engine);
    assert_relative_eq!(f.efficiency.unwrap(), 1.0 - wc / wh, max_relative = 1e-12);
    assert_relative_eq!(f.work_out_quanta * HBAR * wh, HBAR * (wh - wc) * (nh - nc), max_relative = 1e-12);
    assert!(f.residual < 1e-12);
}

/// Positive work only when omega_c/omega_h > T_c/T_h; below it the cycle pumps heat.
#[test]
fn positive_work_condition() {
    let (wh, th, tc) = (W_100K, 40e-6, 10e-6);
    for (ratio, engine) in [(0.3, true), (0.2, false)] {
        let wc = ratio * wh;
        let c = ideal(wh, wc, bose_einstein(wh, th).unwrap(), bose_einstein(wc, tc).unwrap());
        let f = c.analyse(&PropagationOptions::default()).unwrap().figures.unwrap();
        assert_eq!(f.work_out_quanta > 0.0, engine, "ratio {ratio} (T_c/T_h = 0.25)");
        if !engine {
            assert_eq!(f.regime, Regime::Refrigerator);
            assert!(f.cop.is_some() && f.efficiency.is_none());
        }
    }
}

/// High temperature: work per cycle over omega_c/omega_h peaks at sqrt(T_c/T_h),
/// efficiency at maximum work 1 - sqrt(T_c/T_h) (Leff 1987, from memory).
#[test]
fn maximum_work_ratio_is_sqrt_of_temperature_ratio() {
    let wh = W_100K;
    let (th, tc) = (2000.0 * HBAR * wh / BOLTZMANN, 500.0 * HBAR * wh / BOLTZMANN);
    let work = |r: f64| {
        let wc = r * wh;
        let c = ideal(wh, wc, bose_einstein(wh, th).unwrap(), bose_einstein(wc, tc).unwrap());
        c.analyse(&PropagationOptions::default()).unwrap().figures.unwrap().work_out_quanta
    };
    let (mut lo, mut hi) = (0.3, 0.9);
    for _ in 0..80 {
        let m1 = hi - 0.618 * (hi - lo);
        let m2 = lo + 0.618 * (hi - lo);
        if work(m1) > work(m2) { hi = m2 } else { lo = m1 }
    }
    let best = 0.5 * (lo + hi);
    assert!((best - (tc / th).sqrt()).abs() < 1e-4, "best ratio {best}");
}

/// Sudden strokes on weak baths with quarter-period contacts between `wh` and `wc`
/// (rad/s): a cycle with no limit cycle (see below).
pub fn pumping_cycle(wh: f64, wc: f64) -> OttoCycle {
    let quarter = |w: f64| std::f64::consts::FRAC_PI_2 / w;
    OttoCycle {
        hot: Bath::with_occupation(wh, 1.0, 1.0).unwrap(),
        hot_time: quarter(wh),
        expansion: WorkStroke::Sudden { hold: 0.0 },
        cold: Bath::with_occupation(wc, 0.1, 1.0).unwrap(),
        cold_time: quarter(wc),
        compression: WorkStroke::Sudden { hold: 0.0 },
        noise: Noise::NONE,
    }
}

/// Sudden strokes with weak baths: the quarter-period holds make the composed
/// symplectic map hyperbolic (|trace| > 2), so energy grows cycle after cycle
/// (parametric heating; Kosloff and Rezek 2017). It must be reported unstable.
#[test]
fn unstable_cycle_is_detected() {
    let (wh, wc) = (W_100K, 0.3 * W_100K);
    let c = pumping_cycle(wh, wc);
    let rep = c.analyse(&PropagationOptions::default()).unwrap();
    assert!(!rep.stable && rep.spectral_radius > 1.0 && rep.figures.is_none());
    // Plain iteration confirms the growth.
    let v0 = nalgebra::Vector3::new(HBAR * wh * 1.5, 0.0, 0.0);
    let it = c.iterate(v0, 40, &PropagationOptions::default()).unwrap();
    assert!(it[39][0] > 100.0 * v0[0]);
}

/// The limit cycle from (I - A)⁻¹ b agrees with plain iteration of a finite-time cycle.
#[test]
fn fixed_point_matches_iteration() {
    let (wh, wc) = (W_100K, 0.5 * W_100K);
    let c = OttoCycle {
        hot: Bath::with_occupation(wh, 2.0, 2e4).unwrap(),
        hot_time: 30e-6,
        expansion: WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(wh, wc, 10e-6).unwrap())),
        cold: Bath::with_occupation(wc, 0.3, 3e4).unwrap(),
        cold_time: 30e-6,
        compression: WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(wc, wh, 10e-6).unwrap())),
        noise: Noise::NONE,
    };
    let opts = PropagationOptions::default();
    let rep = c.analyse(&opts).unwrap();
    let f = rep.figures.unwrap();
    let it = c.iterate(nalgebra::Vector3::new(HBAR * wh * 2.5, 0.0, 0.0), 200, &opts).unwrap();
    let last = it.last().unwrap();
    assert!((last - f.fixed_point).amax() < 1e-11 * f.fixed_point[0]);
    assert!(f.residual < 1e-12);
    // Energy balance: work out = sum of heats; and the ramp end-frequency check.
    assert_relative_eq!(f.work_out_quanta, f.heat_hot_quanta + f.heat_cold_quanta, max_relative = 1e-14);
}

#[test]
fn mismatched_ramp_is_rejected() {
    let (wh, wc) = (W_100K, 0.5 * W_100K);
    let c = OttoCycle {
        hot: Bath::with_occupation(wh, 2.0, 2e4).unwrap(),
        hot_time: 30e-6,
        expansion: WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(wh, 0.49 * W_100K, 10e-6).unwrap())),
        cold: Bath::with_occupation(wc, 0.3, 3e4).unwrap(),
        cold_time: 30e-6,
        compression: WorkStroke::IdealAdiabatic { time: 1e-6 },
        noise: Noise::NONE,
    };
    let e = c.analyse(&PropagationOptions::default()).unwrap_err().to_string();
    assert!(e.contains("expansion ramp end frequency"), "{e}");
}

/// Amplitude noise acts during the bath contacts too. With contacts long enough to
/// reach the steady state and ideal adiabatic strokes (every expectation scales by the
/// frequency ratio), the corners are the contacts' stationary energies, so heat and
/// work follow in closed form: Q_h = H_ss,h - (omega_h/omega_c) H_ss,c,
/// Q_c = H_ss,c - (omega_c/omega_h) H_ss,h, W = Q_h + Q_c, with H_ss = Gamma H_eq /
/// (Gamma - kappa + kappa²/(Gamma' + kappa + 4 omega²/Gamma')) and kappa = omega² S/2
/// (derived in `Bath::stationary_energy` from the generator of Rezek and Kosloff 2006
/// with the heating term of Savard, O'Hara and Thomas, Phys. Rev. A 56, R1095 (1997)).
#[test]
fn noise_heats_during_the_bath_contacts() {
    let (wh, wc) = (W_100K, 0.4 * W_100K);
    let mut cycle = ideal(wh, wc, 3.0, 0.2);
    cycle.noise = Noise::new(2e3, 2e-7).unwrap();
    let qh = HBAR * wh;
    let hot = cycle.hot.stationary_energy(&cycle.noise).unwrap();
    let cold = cycle.cold.stationary_energy(&cycle.noise).unwrap();
    assert!(hot / cycle.hot.equilibrium_energy() - 1.0 > 1e-2, "the noise shows at the hot corner");
    let f = cycle.analyse(&PropagationOptions::default()).unwrap().figures.unwrap();
    let heat_hot = (hot - wh / wc * cold) / qh;
    let heat_cold = (cold - wc / wh * hot) / qh;
    assert_relative_eq!(f.heat_hot_quanta, heat_hot, max_relative = 1e-10);
    assert_relative_eq!(f.heat_cold_quanta, heat_cold, max_relative = 1e-10);
    assert_relative_eq!(f.work_out_quanta, heat_hot + heat_cold, max_relative = 1e-10);
    let silent = ideal(wh, wc, 3.0, 0.2).analyse(&PropagationOptions::default()).unwrap().figures.unwrap();
    // The heat the noise deposits leaves through the baths: more heat goes into the
    // cold bath than without noise.
    assert!(
        f.heat_cold_quanta < silent.heat_cold_quanta * (1.0 + 1e-3),
        "{} vs {}",
        f.heat_cold_quanta,
        silent.heat_cold_quanta
    );
}
