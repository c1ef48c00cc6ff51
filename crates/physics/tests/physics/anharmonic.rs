//! The anharmonic check's wavefunction solver against closed forms and independent
//! values: Husimi's harmonic identities (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)),
//! first-order perturbation theory of the quartic term, unitarity and the order of
//! Strang splitting (G. Strang, SIAM J. Numer. Anal. 5, 506 (1968)), and the worked
//! rubidium example against values computed independently from a ramp table.

use quenchless_physics::anharmonic::{AxisProblem, CheckSettings, WellShape, check_axis, strang_run, well_levels};
use quenchless_physics::constants::{HBAR, TWO_PI};
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::ramp::{
    LinearRamp, PolynomialRamp, Ramp, RampShape, SampledColumn, SampledRamp, SampledReading, ShortcutRamp,
};
use quenchless_physics::{PhysicsError, PropagationOptions};

/// Unified atomic mass unit, kg (CODATA 2018).
const ATOMIC_MASS_UNIT: f64 = 1.660_539_066_60e-27;
/// Rubidium-87, kg (atomic mass 86.909180527 u, CODATA 2018 / AME).
const RB87: f64 = 86.909_180_527 * ATOMIC_MASS_UNIT;
/// Accuracy the harmonic identities are checked to (the brief's 1e-8).
const IDENTITY_TOL: f64 = 1e-8;

fn problem(ramp: &Ramp, well: WellShape, occupation: f64) -> AxisProblem<'_> {
    AxisProblem { ramp, gain: 1.0, offset_omega2: 0.0, mass_kg: RB87, well, occupation }
}

fn fast_linear() -> Ramp {
    Ramp::Linear(LinearRamp::new(TWO_PI * 100e3, TWO_PI * 25e3, 2e-6).unwrap())
}

fn worked_shortcut() -> Ramp {
    Ramp::Shortcut(ShortcutRamp::new(TWO_PI * 100e3, TWO_PI * 25e3, 5e-6).unwrap())
}

fn exact_q_star(ramp: &Ramp) -> f64 {
    q_star(ramp, &PropagationOptions::with_accuracy(1e-13).unwrap()).unwrap()
}

fn check(p: &AxisProblem) -> quenchless_physics::anharmonic::AxisCheck {
    check_axis(p, &CheckSettings::default(), &mut |_| true).unwrap()
}

/// Husimi: an energy-diagonal start ends with <H_f>_n = Q* E_n^f for every level, so any
/// mixture's energy ratio is Q*; the ground state's survival is sqrt(2/(1 + Q*)).
fn assert_husimi(p: &AxisProblem, q: f64) {
    let r = check(p);
    assert!(q > 1.5, "the ramp must be clearly non-adiabatic (Q* = {q})");
    assert!(r.error_estimate <= IDENTITY_TOL, "error estimate {:e}", r.error_estimate);
    assert!((r.energy_ratio - q).abs() <= IDENTITY_TOL, "energy ratio {} vs Q* {q}", r.energy_ratio);
    let fidelity = (2.0 / (1.0 + q)).sqrt();
    assert!((r.ground_fidelity - fidelity).abs() <= IDENTITY_TOL, "fidelity {} vs {fidelity}", r.ground_fidelity);
    assert!((r.harmonic_q_star - q).abs() <= 1e-10, "the report's own Q* {}", r.harmonic_q_star);
    assert!(r.lost_fraction < 1e-12 && r.min_depth_quanta.is_none() && r.bound_levels_final.is_none());
}

#[test]
fn harmonic_ground_state_obeys_husimi() {
    let ramp = fast_linear();
    assert_husimi(&problem(&ramp, WellShape::Harmonic, 0.0), exact_q_star(&ramp));
}

#[test]
fn harmonic_thermal_mixture_obeys_husimi() {
    let ramp = fast_linear();
    let p = problem(&ramp, WellShape::Harmonic, 1.0);
    assert_husimi(&p, exact_q_star(&ramp));
    // Bose-Einstein weights of N = 1: p_n = 2^-(n+1), cut where the rest is below 1e-12.
    let r = check(&p);
    assert_eq!(r.levels, 40);
    for (n, pn) in r.populations.iter().enumerate().take(5) {
        assert!((pn - 0.5_f64.powf(n as f64 + 1.0)).abs() < 1e-9, "p_{n} = {pn}");
    }
}

#[test]
fn harmonic_axis_with_gain_and_offset_obeys_husimi() {
    // omega² linear in t/tau; the axis's omega_axis² = g omega² + c is again a polynomial
    // ramp, whose Q* the moment engine gives independently of the check.
    let (wi2, wf2) = ((TWO_PI * 100e3).powi(2), (TWO_PI * 25e3).powi(2));
    let (gain, offset) = (0.7, -(TWO_PI * 10e3).powi(2));
    let tau = 2e-6;
    let ramp = Ramp::Polynomial(PolynomialRamp::new(vec![wi2, wf2 - wi2], tau).unwrap());
    let axis = Ramp::Polynomial(PolynomialRamp::new(vec![gain * wi2 + offset, gain * (wf2 - wi2)], tau).unwrap());
    let q = exact_q_star(&axis);
    for occupation in [0.0, 1.0] {
        let p = AxisProblem { gain, offset_omega2: offset, ..problem(&ramp, WellShape::Harmonic, occupation) };
        assert_husimi(&p, q);
    }
}

/// First-order perturbation theory of the quartic term (derived here: V = U(2x²/w² -
/// 2x⁴/w⁴ + ...) with U = m omega² w²/4 for the Gaussian, V = U(x²/z² - x⁴/z⁴ + ...) with
/// U = m omega² z²/2 for the Lorentzian, so both have the quartic -(m omega²/(2 l²)) x⁴;
/// <n|x⁴|n> = (3/4) x0⁴ (2n² + 2n + 1), J. J. Sakurai and J. Napolitano, Modern Quantum
/// Mechanics, harmonic oscillator matrix elements): E_n = (n + 1/2) hbar omega -
/// (3/8)(x0/l)² (2n² + 2n + 1) hbar omega, with a residual of order (x0/l)⁴.
fn perturbation_residuals(shape: impl Fn(f64) -> WellShape, ratio: f64) -> Vec<f64> {
    let omega = TWO_PI * 100e3;
    let x0 = (HBAR / (RB87 * omega)).sqrt();
    let levels = well_levels(shape(ratio * x0), RB87, omega, 4).unwrap();
    levels
        .iter()
        .enumerate()
        .map(|(n, e)| {
            let n = n as f64;
            let first = n + 0.5 - 0.375 * (2.0 * n * n + 2.0 * n + 1.0) / (ratio * ratio);
            e / (HBAR * omega) - first
        })
        .collect()
}

fn assert_fourth_order_residual(shape: impl Fn(f64) -> WellShape + Copy) {
    let near = perturbation_residuals(shape, 12.0);
    let far = perturbation_residuals(shape, 24.0);
    for (n, (a, b)) in near.iter().zip(&far).enumerate() {
        let first_order = 0.375 * (2.0 * (n * n + n) as f64 + 1.0) / 144.0;
        assert!(a.abs() < 0.1 * first_order, "level {n}: residual {a:e} vs shift {first_order:e}");
        // Doubling the length scale: residual / 16, up to the next order's (x0/l)² share.
        assert!((b / a * 16.0 - 1.0).abs() < 0.1, "level {n}: residual ratio {} (expected 1/16)", b / a);
    }
}

#[test]
fn gaussian_levels_follow_perturbation_theory() {
    assert_fourth_order_residual(|w| WellShape::Gaussian { waist_m: w });
}

#[test]
fn lorentzian_levels_follow_perturbation_theory() {
    assert_fourth_order_residual(|z| WellShape::Lorentzian { rayleigh_range_m: z });
}

#[test]
fn norm_is_conserved_without_absorbers() {
    // Every factor of a split step is unitary (the FFT, phase multiplications), so with
    // the margins off the norm stays 1 to rounding, in any well and mixture.
    let ramp = fast_linear();
    let settings = CheckSettings { absorbing_edges: false, ..CheckSettings::default() };
    for (well, occupation) in [
        (WellShape::Harmonic, 1.0),
        (WellShape::Gaussian { waist_m: 1.6e-6 }, 0.5),
        (WellShape::Lorentzian { rayleigh_range_m: 2e-6 }, 0.0),
    ] {
        let run = strang_run(&problem(&ramp, well, occupation), &settings, 2).unwrap();
        assert!(run.lost_fraction.abs() < 1e-12, "{well:?}: 1 - norm = {:e}", run.lost_fraction);
    }
}

#[test]
fn strang_error_falls_fourfold_per_halving_and_extrapolation_beats_it() {
    // Exact reference: Husimi's Q* from the moment engine (energy ratio of a harmonic well).
    let ramp = fast_linear();
    let p = problem(&ramp, WellShape::Harmonic, 0.0);
    let exact = exact_q_star(&ramp) - 1.0;
    let settings = CheckSettings::default();
    let errors: Vec<f64> =
        (0..5).map(|i| (strang_run(&p, &settings, i).unwrap().energy_ratio_minus_one - exact).abs()).collect();
    for w in errors.windows(2).skip(1) {
        let ratio = w[0] / w[1];
        assert!((3.6..4.4).contains(&ratio), "error ratio {ratio} per halving (second order: 4); {errors:?}");
    }
    let extrapolated = (check(&p).energy_ratio_minus_one - exact).abs();
    assert!(extrapolated < 1e-4 * errors[4], "Richardson {extrapolated:e} vs plain {:e}", errors[4]);
}

#[test]
fn grid_error_falls_as_the_grid_grows() {
    // Spectral (Fourier-grid) accuracy: the error of a resolved state falls faster than
    // any power of the points. The step error is removed by a two-level Richardson
    // extrapolation of three halvings; the reference is Husimi's Q* (moment engine).
    let ramp = fast_linear();
    let p = problem(&ramp, WellShape::Harmonic, 0.0);
    let exact = exact_q_star(&ramp) - 1.0;
    let error = |scale: f64| {
        let settings = CheckSettings { grid_scale: scale, ..CheckSettings::default() };
        let e: Vec<f64> = (4..7).map(|i| strang_run(&p, &settings, i).unwrap().energy_ratio_minus_one).collect();
        let (r1, r2) = ((4.0 * e[1] - e[0]) / 3.0, (4.0 * e[2] - e[1]) / 3.0);
        ((16.0 * r2 - r1) / 15.0 - exact).abs()
    };
    let (coarse, middle, fine) = (error(0.35), error(0.45), error(1.0));
    assert!(coarse > 10.0 * middle && middle > 10.0 * fine, "{coarse:e} {middle:e} {fine:e}");
    assert!(fine < 1e-10, "{fine:e}");
}

/// The 20,001-row table of the shortcut's omega read linearly, as the independent
/// values were computed from.
fn worked_table() -> Ramp {
    let shortcut = ShortcutRamp::new(TWO_PI * 100e3, TWO_PI * 25e3, 5e-6).unwrap();
    let times: Vec<f64> = (0..20_001).map(|k| 5e-6 * f64::from(k) / 20_000.0).collect();
    let omegas = times.iter().map(|&t| shortcut.omega2(t).sqrt()).collect();
    Ramp::Sampled(
        SampledRamp::with_stated_ends(
            times,
            omegas,
            SampledColumn::Omega,
            SampledReading::Linear,
            TWO_PI * 100e3,
            TWO_PI * 25e3,
        )
        .unwrap(),
    )
}

#[test]
fn worked_rubidium_example_matches_independent_values() {
    // Independent values (a separate solver on the 20,001-row table read linearly):
    // energy ratio 1.00056044026, ground fidelity 0.99988186073, given to 11 decimals.
    const RATIO: f64 = 1.000_560_440_26;
    const FIDELITY: f64 = 0.999_881_860_73;
    const QUOTED: f64 = 5e-12;
    let well = WellShape::Gaussian { waist_m: 800e-9 };
    let table = worked_table();
    let r = check(&problem(&table, well, 0.0));
    assert!(r.error_estimate < 1e-8 && r.accuracy_reached, "error estimate {:e}", r.error_estimate);
    let within = r.error_estimate + QUOTED;
    assert!((r.energy_ratio - RATIO).abs() <= within, "energy ratio {:.12}", r.energy_ratio);
    assert!((r.ground_fidelity - FIDELITY).abs() <= within, "fidelity {:.12}", r.ground_fidelity);
    // The analytic ramp: the shortcut ends energy-diagonal in the harmonic approximation
    // (Chen et al., PRL 104, 063002 (2010)), and differs from its table by far less than 1e-8.
    let ramp = worked_shortcut();
    let a = check(&problem(&ramp, well, 0.0));
    assert!(a.harmonic_q_star_minus_one < 1e-10);
    assert!((a.energy_ratio - RATIO).abs() < 1e-8 && (a.ground_fidelity - FIDELITY).abs() < 1e-8);
    assert!(a.lost_fraction < 1e-10 && a.pass && a.min_depth_quanta.is_some_and(|d| d > 30.0));
    // The excess comes from the quartic term (x0/w0)²: doubling the waist divides it by ~16.
    let wide = check(&problem(&ramp, WellShape::Gaussian { waist_m: 1600e-9 }, 0.0));
    let ratio = wide.energy_ratio_minus_one / a.energy_ratio_minus_one;
    assert!((ratio * 16.0 - 1.0).abs() < 0.05, "excess ratio {ratio} (expected about 1/16)");
}

#[test]
fn wkb_bound_count_agrees_with_the_grid_levels() {
    // WKB quantisation S(E_n) = pi hbar (n + 1/2) (Sakurai and Napolitano, ch. 2) against
    // the levels found on the grid, counted at least one quantum below the edge.
    let ramp = worked_shortcut();
    let waist = 800e-9;
    let r = check(&problem(&ramp, WellShape::Gaussian { waist_m: waist }, 0.0));
    let omega = TWO_PI * 25e3;
    let depth = RB87 * omega * omega * waist * waist / 4.0;
    let wkb = r.bound_levels_final.unwrap();
    let grid = well_levels(WellShape::Gaussian { waist_m: waist }, RB87, omega, wkb + 3).unwrap();
    let counted = grid.iter().filter(|&&e| e <= depth - HBAR * omega).count();
    assert!(counted.abs_diff(wkb) <= 1, "WKB {wkb}, grid {counted}");
}

#[test]
fn density_map_keeps_the_norm() {
    // |psi_0|² integrates to the surviving norm (1 here) at every frame (Born rule).
    let ramp = worked_shortcut();
    let p = problem(&ramp, WellShape::Gaussian { waist_m: 800e-9 }, 0.0);
    let settings = CheckSettings { keep_density: true, ..CheckSettings::default() };
    let r = check_axis(&p, &settings, &mut |_| true).unwrap();
    let map = r.density.unwrap();
    assert!((100..=260).contains(&map.times_s.len()) && (100..=200).contains(&map.x_m.len()));
    let dx = map.x_m[1] - map.x_m[0];
    for row in &map.density_per_m {
        let norm: f64 = row.iter().sum::<f64>() * dx;
        assert!((norm - 1.0).abs() < 1e-3, "norm {norm}");
    }
    assert!((map.times_s[map.times_s.len() - 1] - 5e-6).abs() < 1e-15);
}

#[test]
fn optical_well_refuses_to_invert() {
    // A shortcut this fast inverts the trap mid-ramp (omega² < 0): an optical well's
    // depth would be negative. The harmonic well takes it.
    let wi = TWO_PI * 100e3;
    let ramp = Ramp::Shortcut(ShortcutRamp::new(wi, 0.25 * wi, 0.15 * TWO_PI / wi).unwrap());
    let err =
        check_axis(&problem(&ramp, WellShape::Gaussian { waist_m: 1e-6 }, 0.0), &CheckSettings::default(), &mut |_| {
            true
        })
        .unwrap_err();
    match err {
        PhysicsError::UndefinedWhereInverted { omega2, time, .. } => {
            assert!(omega2 <= 0.0 && time > 0.0 && time < ramp.duration(), "{omega2:e} at {time:e}");
        }
        other => panic!("unexpected {other}"),
    }
    // A negative offset does it too, even for a gentle ramp.
    let gentle = worked_shortcut();
    let p = AxisProblem {
        offset_omega2: -(TWO_PI * 30e3).powi(2),
        ..problem(&gentle, WellShape::Lorentzian { rayleigh_range_m: 2e-6 }, 0.0)
    };
    assert!(matches!(
        check_axis(&p, &CheckSettings::default(), &mut |_| true),
        Err(PhysicsError::UndefinedWhereInverted { .. })
    ));
    let harmonic = check(&problem(&ramp, WellShape::Harmonic, 0.0));
    assert!(harmonic.harmonic_q_star_minus_one < 1e-8 && harmonic.energy_ratio_minus_one.abs() < 1e-7);
}

#[test]
fn refuses_a_thermal_state_the_well_does_not_bind() {
    // N = 50 needs ~1400 levels (Bose-Einstein tail (50/51)^n < 1e-12); a 300 nm waist binds
    // about 30 at 100 kHz.
    let ramp = worked_shortcut();
    let err = check_axis(
        &problem(&ramp, WellShape::Gaussian { waist_m: 300e-9 }, 50.0),
        &CheckSettings::default(),
        &mut |_| true,
    )
    .unwrap_err();
    let text = err.to_string();
    assert!(text.contains("the thermal state is not bound in this well") && text.contains("hbar omega deep"), "{text}");
    // A few quanta in a shallow well: the levels found on the grid reach the edge.
    let shallow = check_axis(
        &problem(&ramp, WellShape::Gaussian { waist_m: 250e-9 }, 2.0),
        &CheckSettings::default(),
        &mut |_| true,
    );
    assert!(shallow.unwrap_err().to_string().contains("not bound"));
}

#[test]
fn bad_inputs_name_the_field_and_what_is_allowed() {
    let ramp = worked_shortcut();
    let base = problem(&ramp, WellShape::Gaussian { waist_m: 800e-9 }, 0.0);
    let cases = [
        (AxisProblem { mass_kg: f64::NAN, ..base }, "mass"),
        (AxisProblem { mass_kg: -1.0, ..base }, "mass"),
        (AxisProblem { mass_kg: 0.0, ..base }, "mass"),
        (AxisProblem { well: WellShape::Gaussian { waist_m: 0.0 }, ..base }, "waist"),
        (AxisProblem { well: WellShape::Gaussian { waist_m: f64::INFINITY }, ..base }, "waist"),
        (AxisProblem { well: WellShape::Lorentzian { rayleigh_range_m: -2e-6 }, ..base }, "Rayleigh range"),
        (AxisProblem { occupation: -0.5, ..base }, "occupation"),
        (AxisProblem { gain: f64::NAN, ..base }, "gain"),
    ];
    for (p, field) in cases {
        match check_axis(&p, &CheckSettings::default(), &mut |_| true) {
            Err(PhysicsError::InvalidParameter { name, value, allowed }) => {
                assert_eq!(name, field);
                assert!(!value.is_empty() && !allowed.is_empty());
            }
            other => panic!("{field}: unexpected {other:?}"),
        }
    }
    let bad = CheckSettings { target_accuracy: 0.0, ..CheckSettings::default() };
    assert!(matches!(check_axis(&base, &bad, &mut |_| true), Err(PhysicsError::InvalidParameter { .. })));
}

#[test]
fn cancelling_stops_with_its_own_error() {
    let ramp = worked_shortcut();
    let p = problem(&ramp, WellShape::Gaussian { waist_m: 800e-9 }, 0.0);
    let mut calls = 0;
    let r = check_axis(&p, &CheckSettings::default(), &mut |f| {
        assert!((0.0..=1.0).contains(&f));
        calls += 1;
        calls < 3
    });
    assert!(matches!(r, Err(PhysicsError::Cancelled)));
}
