//! The moment engine's view of the axis: the 2x2 fundamental matrix of
//! x'' = -omega_axis²(t) x, propagated with the crate's fourth-order Magnus stepper.
//! It gives the harmonic Husimi Q* of the axis's own ramp and the ground state's
//! widths along it, from which the wavefunction grid is sized.

use super::problem::Axis;
use crate::error::Result;
use crate::propagate::{Mat2, PropagationOptions, Stepper, q_star_minus_one_from_fundamental};

/// Accuracy of the harmonic Q* (relative): far below any wavefunction target.
const Q_STAR_ACCURACY: f64 = 1e-12;

/// Width samples taken along the ramp.
const WIDTH_SAMPLES: usize = 256;

/// The harmonic figures of an axis.
#[derive(Debug, Clone, Copy)]
pub(crate) struct HarmonicView {
    /// Q* - 1 of omega_axis(t), without cancellation.
    pub q_star_minus_one: f64,
    /// Largest sqrt(<x²>) and sqrt(<p²>) of the initial ground state along the ramp, in
    /// x0 and hbar/x0 of the initial well (1/sqrt2 each at the start).
    pub sigma_x: f64,
    pub sigma_p: f64,
}

pub(crate) fn harmonic_view(axis: &Axis) -> Result<HarmonicView> {
    let tau = axis.duration();
    let scale = axis.max.0.abs().max(axis.min.0.abs()).sqrt().max(axis.omega_start).max(axis.omega_end);
    let opts = PropagationOptions::with_accuracy(Q_STAR_ACCURACY)?;
    let mut stepper = Stepper::new(tau, scale, &opts);
    let mut times: Vec<f64> = (1..=WIDTH_SAMPLES).map(|k| tau * k as f64 / WIDTH_SAMPLES as f64).collect();
    times.extend(axis.pieces());
    times.sort_by(f64::total_cmp);
    times.dedup_by(|a, b| (*a - *b).abs() <= 1e-14 * tau);
    let f = |t: f64| axis.omega2(t);
    let w = axis.omega_start;
    let (mut sx, mut sp) = (0.5_f64, 0.5_f64);
    let mut m = Mat2::IDENTITY;
    let mut t = 0.0;
    for &tj in &times {
        let tj = tj.min(tau);
        if tj > t {
            m = stepper.advance(&f, t, tj, m)?;
            t = tj;
        }
        // X = a² X0 + b² Y0 and Y = c² X0 + d² Y0 with X0 = Y0 = 1/2 in reduced units.
        let (a, b, c, d) = (m.a, m.b * w, m.c / w, m.d);
        sx = sx.max(0.5 * (a * a + b * b));
        sp = sp.max(0.5 * (c * c + d * d));
    }
    Ok(HarmonicView {
        q_star_minus_one: q_star_minus_one_from_fundamental(&m, axis.omega_start, axis.omega_end),
        sigma_x: sx.sqrt(),
        sigma_p: sp.sqrt(),
    })
}
