//! The power map over stroke times, against the closed-form limit cycle of an Otto
//! engine with ideal (Q* = 1) work strokes and partial thermalisation: H relaxes as
//! H_eq + (H - H_eq) e^{-Gamma t} on each contact (Lindblad relaxation, Rezek and Kosloff 2006),
//! and an ideal stroke scales H by the frequency ratio; the fixed point gives the heats
//! (T. Feldmann and R. Kosloff, Phys. Rev. E 61, 4774 (2000), from memory).

use quenchless_physics::cycle::{OttoCycle, WorkStroke};
use quenchless_physics::design::{NOT_COMPUTED, StrokeTime, power_map, stroke_time, with_stroke_time};
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::ramp::{
    ConstantMuRamp, LinearRamp, PiecewiseConstantRamp, PolynomialRamp, Ramp, SampledColumn, SampledRamp,
    SampledReading, Segment, ShortcutRamp, SplineRamp, SplineShape, SplineSpace,
};
use quenchless_physics::{Bath, Noise, PropagationOptions, RampShape};
use std::sync::atomic::AtomicBool;

use super::W_100K;

fn ideal_engine() -> OttoCycle {
    let (wh, wc) = (2.0 * W_100K, 0.8 * W_100K);
    OttoCycle {
        hot: Bath::with_occupation(wh, 4.0, 4e4).unwrap(),
        hot_time: 50e-6,
        expansion: WorkStroke::IdealAdiabatic { time: 3e-6 },
        cold: Bath::with_occupation(wc, 0.2, 6e4).unwrap(),
        cold_time: 50e-6,
        compression: WorkStroke::IdealAdiabatic { time: 2e-6 },
        noise: Noise::NONE,
    }
}

/// Power of the ideal-stroke engine at contact times (th, tc), closed form.
fn closed_form_power(c: &OttoCycle, th: f64, tc: f64) -> f64 {
    let r = c.cold.omega() / c.hot.omega();
    let (eh, ec) = (c.hot.equilibrium_energy(), c.cold.equilibrium_energy());
    let (a, b) = ((-c.hot.rate() * th).exp(), (-c.cold.rate() * tc).exp());
    let h0 = (ec * (1.0 - b) + r * b * eh * (1.0 - a)) / (r * (1.0 - a * b));
    let h1 = eh + (h0 - eh) * a;
    let h2 = r * h1;
    let h3 = ec + (h2 - ec) * b;
    let work = (h1 - h0) + (h3 - h2);
    work / (th + tc + 3e-6 + 2e-6)
}

#[test]
fn the_power_map_matches_the_closed_form_limit_cycle() {
    let c = ideal_engine();
    let xs = [5e-6, 20e-6, 80e-6];
    let ys = [10e-6, 40e-6];
    let m = power_map(
        &c,
        (StrokeTime::HotContact, StrokeTime::ColdContact),
        &xs,
        &ys,
        &PropagationOptions::default(),
        &|_| {},
        &AtomicBool::new(false),
    )
    .unwrap();
    for (iy, &y) in ys.iter().enumerate() {
        for (ix, &x) in xs.iter().enumerate() {
            let p = m.power(ix, iy).expect("stable");
            let want = closed_form_power(&c, x, y);
            assert!((p / want - 1.0).abs() < 1e-9, "({x:e}, {y:e}): {p:e} vs {want:e}");
        }
    }
}

/// A cell without a limit cycle says why (sudden jumps with quarter-period contacts on
/// weak baths pump energy in: parametric heating, Kosloff and Rezek 2017, as in the cycle tests),
/// and equal axes or a cancel end the map with a reason.
#[test]
fn cells_without_a_cycle_give_the_reason_and_bad_requests_are_refused() {
    let (wh, wc) = (2.0 * W_100K, 0.8 * W_100K);
    let quarter = |w: f64| std::f64::consts::FRAC_PI_2 / w;
    let c = super::cycle::pumping_cycle(wh, wc);
    let opts = PropagationOptions::default();
    let m = power_map(
        &c,
        (StrokeTime::HotContact, StrokeTime::ColdContact),
        &[quarter(wh)],
        &[quarter(wc)],
        &opts,
        &|_| {},
        &AtomicBool::new(false),
    )
    .unwrap();
    let e = m.power_w[0].clone().expect_err("quarter-period holds after sudden jumps pump energy in");
    assert!(e.contains("spectral radius"), "{e}");
    let axes = (StrokeTime::Expansion, StrokeTime::Expansion);
    assert!(power_map(&c, axes, &[1e-6], &[1e-6], &opts, &|_| {}, &AtomicBool::new(false)).is_err());
    let cancelled = power_map(
        &c,
        (StrokeTime::HotContact, StrokeTime::ColdContact),
        &[1e-6, 2e-6],
        &[1e-6],
        &opts,
        &|_| {},
        &AtomicBool::new(true),
    )
    .unwrap();
    assert!(cancelled.power_w.iter().all(|p| p.as_ref().is_err_and(|e| e == NOT_COMPUTED)), "kept, marked");
}

/// Stretching a ramp keeps its end frequencies and its shape; the invariant shortcut
/// stays frictionless at every duration (Chen et al., Phys. Rev. Lett. 104, 063002
/// (2010)), so Q* = 1 after stretching too.
#[test]
fn every_family_stretches_to_a_new_duration() {
    let (wi, wf) = (W_100K, 0.25 * W_100K);
    let ramps = [
        Ramp::Linear(LinearRamp::new(wi, wf, 10e-6).unwrap()),
        Ramp::ConstantMu(ConstantMuRamp::with_duration(wi, wf, 10e-6).unwrap()),
        Ramp::Shortcut(ShortcutRamp::new(wi, wf, 10e-6).unwrap()),
        Ramp::Polynomial(PolynomialRamp::new(vec![wi * wi, wf * wf - wi * wi], 10e-6).unwrap()),
        Ramp::PiecewiseConstant(
            PiecewiseConstantRamp::new(wi, wf, vec![Segment { omega2: 0.3 * wi * wi, duration: 10e-6 }]).unwrap(),
        ),
        Ramp::Spline(
            SplineRamp::new(
                vec![0.0, 4e-6, 10e-6],
                vec![wi, 0.5 * wi, wf],
                SplineShape::Monotone,
                SplineSpace::Omega,
                true,
            )
            .unwrap(),
        ),
        Ramp::Sampled(
            SampledRamp::new(
                vec![0.0, 5e-6, 10e-6],
                vec![wi, 0.6 * wi, wf],
                SampledColumn::Omega,
                SampledReading::Linear,
            )
            .unwrap(),
        ),
    ];
    let opts = PropagationOptions::default();
    for r in &ramps {
        let s = r.with_duration(25e-6).unwrap();
        assert!((s.duration() - 25e-6).abs() < 1e-18, "{}", r.family_name());
        assert!((s.omega_initial() - r.omega_initial()).abs() < 1e-9 * wi, "{}", r.family_name());
        assert!((s.omega_final() - r.omega_final()).abs() < 1e-9 * wi, "{}", r.family_name());
        // The shape: omega² at the same fraction of the duration.
        if !matches!(r, Ramp::Polynomial(_) | Ramp::ConstantMu(_) | Ramp::Shortcut(_)) {
            let (a, b) = (r.omega2(0.37 * 10e-6), s.omega2(0.37 * 25e-6));
            assert!((a - b).abs() < 1e-9 * wi * wi, "{}: {a} vs {b}", r.family_name());
        }
    }
    let stretched = ramps[2].with_duration(4e-6).unwrap();
    assert!(q_star(&stretched, &opts).unwrap() - 1.0 < 1e-9);
    let c = ideal_engine();
    let e = with_stroke_time(&c, StrokeTime::Expansion, 7e-6).unwrap();
    assert!((stroke_time(&e, StrokeTime::Expansion) - 7e-6).abs() < 1e-18);
}
