//! Draggable handles of the shaping plot: where they sit for each ramp family, and how
//! moving one changes the ramp spec. Geometry only; the physics crate does the rest.

use crate::edits::spec_duration;
use crate::units::DisplayScale;
use quenchless_physics::constants::TWO_PI;
use quenchless_profile::study::{KnotSpec, RampSpec};

/// A grabbable point of a ramp on the shaping plot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Handle {
    /// Spline knot k.
    Knot(usize),
    /// Start point of a parametric ramp (its start frequency).
    Start,
    /// End point of a parametric ramp (end frequency and duration).
    End,
    /// Level of hold k.
    Hold(usize),
}

/// How a drag is constrained.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Constraints {
    /// End points keep their frequencies (and a spline's last knot its time).
    pub lock_ends: bool,
    /// Round times to 1/40 of the duration and frequencies to 1 % of the start value.
    pub snap: bool,
}

/// Handles of a spec in plot coordinates.
pub fn handles(spec: &RampSpec, scale: &DisplayScale) -> Vec<(Handle, [f64; 2])> {
    let hz = |nu: f64| scale.y(TWO_PI * nu);
    match spec {
        RampSpec::Linear { from_hz, to_hz, duration_s }
        | RampSpec::ConstantMu { from_hz, to_hz, duration_s }
        | RampSpec::Shortcut { from_hz, to_hz, duration_s } => {
            vec![(Handle::Start, [0.0, hz(*from_hz)]), (Handle::End, [scale.x(*duration_s), hz(*to_hz)])]
        }
        RampSpec::Polynomial { omega2_coefficients, duration_s } => {
            let w2: f64 = omega2_coefficients.iter().sum();
            vec![(Handle::End, [scale.x(*duration_s), scale.signed_y(w2)])]
        }
        RampSpec::Holds { holds, .. } => {
            let mut t = 0.0;
            holds
                .iter()
                .enumerate()
                .map(|(k, h)| {
                    let mid = t + 0.5 * h.duration_s;
                    t += h.duration_s;
                    (Handle::Hold(k), [scale.x(mid), hz(h.signed_frequency_hz)])
                })
                .collect()
        }
        RampSpec::Spline { knots, .. } => {
            knots.iter().enumerate().map(|(k, n)| (Handle::Knot(k), [scale.x(n.t_s), hz(n.frequency_hz)])).collect()
        }
        RampSpec::Waveform { .. } => Vec::new(),
    }
}

fn snap_to(v: f64, step: f64, on: bool) -> f64 {
    if on && step > 0.0 { (v / step).round() * step } else { v }
}

/// Moves a handle to plot point (x, y). `start_hz` is the study's start frequency
/// (the snap step). Frequencies stay > 0 and knot times ordered, as the families need.
pub fn move_handle(
    spec: &mut RampSpec,
    handle: Handle,
    x: f64,
    y: f64,
    scale: &DisplayScale,
    c: Constraints,
    start_hz: f64,
) {
    let tau = spec_duration(spec);
    let t = snap_to(scale.t_from_x(x), tau / 40.0, c.snap);
    let nu = snap_to(scale.hz_from_y(y), 0.01 * start_hz, c.snap);
    let floor = 1e-3 * start_hz.abs().max(1e-9);
    let positive = |v: f64| if v.is_finite() { v.max(floor) } else { floor };
    let min_dt = 1e-4 * tau.max(1e-15);
    match (spec, handle) {
        (
            RampSpec::Linear { from_hz, .. }
            | RampSpec::ConstantMu { from_hz, .. }
            | RampSpec::Shortcut { from_hz, .. },
            Handle::Start,
        ) if !c.lock_ends => {
            *from_hz = positive(nu);
        }
        (
            RampSpec::Linear { to_hz, duration_s, .. }
            | RampSpec::ConstantMu { to_hz, duration_s, .. }
            | RampSpec::Shortcut { to_hz, duration_s, .. },
            Handle::End,
        ) => {
            *duration_s = t.max(min_dt);
            if !c.lock_ends {
                *to_hz = positive(nu);
            }
        }
        (RampSpec::Polynomial { duration_s, .. }, Handle::End) => *duration_s = t.max(min_dt),
        (RampSpec::Holds { holds, .. }, Handle::Hold(k)) => {
            let last = holds.len().saturating_sub(1);
            if let Some(h) = holds.get_mut(k)
                && !(c.lock_ends && k == last)
                && nu.is_finite()
            {
                h.signed_frequency_hz = nu;
            }
        }
        (RampSpec::Spline { knots, .. }, Handle::Knot(k)) => {
            let n = knots.len();
            if k >= n {
                return;
            }
            let is_end = k == 0 || k + 1 == n;
            if !(c.lock_ends && is_end) {
                knots[k].frequency_hz = positive(nu);
            }
            if k > 0 && !(c.lock_ends && k + 1 == n) {
                let lo = knots[k - 1].t_s + min_dt;
                let hi = knots.get(k + 1).map_or(f64::INFINITY, |n| n.t_s - min_dt);
                if lo < hi && t.is_finite() {
                    knots[k].t_s = t.clamp(lo, hi);
                }
            }
        }
        _ => {}
    }
}

/// Adds a spline knot at (x, y) strictly inside the ramp; returns its index.
pub fn add_knot(spec: &mut RampSpec, x: f64, y: f64, scale: &DisplayScale) -> Option<usize> {
    let RampSpec::Spline { knots, .. } = spec else { return None };
    let t = scale.t_from_x(x);
    let nu = scale.hz_from_y(y);
    let tau = knots.last()?.t_s;
    if !(t > 0.0 && t < tau && nu.is_finite() && nu > 0.0) {
        return None;
    }
    let k = knots.partition_point(|n| n.t_s < t);
    let tol = 1e-4 * tau;
    if knots.get(k).is_some_and(|n| (n.t_s - t).abs() < tol) || k > 0 && (knots[k - 1].t_s - t).abs() < tol {
        return None;
    }
    knots.insert(k, KnotSpec { t_s: t, frequency_hz: nu });
    Some(k)
}

/// Removes interior spline knot k (the end knots stay: a spline needs both ends).
pub fn remove_knot(spec: &mut RampSpec, k: usize) -> bool {
    let RampSpec::Spline { knots, .. } = spec else { return false };
    if k == 0 || k + 1 >= knots.len() {
        return false;
    }
    knots.remove(k);
    true
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::edits::set_duration;
    use quenchless_profile::study::DisplayUnits;

    fn spline() -> RampSpec {
        crate::demo::family_template("spline", 100e3, 25e3, 10e-6)
    }

    #[test]
    fn knot_drag_keeps_order_and_lock() {
        let scale = DisplayScale::new(&DisplayUnits::default(), 100e3);
        let mut s = spline();
        // Drag knot 2 far right: it stops before knot 3.
        move_handle(&mut s, Handle::Knot(2), 100.0, 70.0, &scale, Constraints::default(), 100e3);
        let RampSpec::Spline { knots, .. } = &s else { unreachable!() };
        assert!(knots[2].t_s < knots[3].t_s);
        assert!((knots[2].frequency_hz - 70e3).abs() < 1e-6);
        let before = knots[4];
        move_handle(&mut s, Handle::Knot(4), 3.0, 90.0, &scale, Constraints { lock_ends: true, snap: false }, 100e3);
        let RampSpec::Spline { knots, .. } = &s else { unreachable!() };
        assert_eq!(knots[4], before, "locked end knot must not move");
    }

    #[test]
    fn add_and_remove_knots() {
        let scale = DisplayScale::new(&DisplayUnits::default(), 100e3);
        let mut s = spline();
        let k = add_knot(&mut s, 1.0, 90.0, &scale).expect("inside the ramp");
        assert_eq!(k, 1);
        assert!(add_knot(&mut s, 20.0, 90.0, &scale).is_none(), "outside the ramp");
        assert!(!remove_knot(&mut s, 0), "end knots stay");
        assert!(remove_knot(&mut s, 1));
        assert_eq!(s, spline());
    }

    #[test]
    fn end_handle_sets_duration_and_set_duration_scales() {
        let scale = DisplayScale::new(&DisplayUnits::default(), 100e3);
        let mut s = crate::demo::family_template("linear", 100e3, 25e3, 10e-6);
        move_handle(&mut s, Handle::End, 15.0, 30.0, &scale, Constraints::default(), 100e3);
        assert!((spec_duration(&s) - 15e-6).abs() < 1e-15);
        let mut h = crate::demo::family_template("holds", 100e3, 25e3, 10e-6);
        set_duration(&mut h, 5e-6);
        assert!((spec_duration(&h) - 5e-6).abs() < 1e-18);
    }
}
