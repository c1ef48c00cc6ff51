//! Strokes with noise: the moments obey d(X, Y, D)/dt = G(t) (X, Y, D) with the 3x3
//! generator of [`Noise::generator`]; exact exponentials for constant pieces,
//! adaptive fourth-order Magnus (3x3, with the commutator) otherwise.

use super::PropagationOptions;
use super::step::GAUSS_NODES;
use crate::error::{PhysicsError, Result};
use crate::noise::Noise;
use crate::ramp::{Ramp, RampShape, SampledReading};
use nalgebra::Matrix3;

const COMMUTATOR_WEIGHT: f64 = 0.144_337_567_297_406_43;

/// Map on (X, Y, D) over [a, b] with noise.
pub fn noisy_map_between(
    ramp: &Ramp,
    noise: &Noise,
    a: f64,
    b: f64,
    opts: &PropagationOptions,
) -> Result<(Matrix3<f64>, usize)> {
    let tau = ramp.duration();
    if !(a >= 0.0 && b >= a && b <= tau * (1.0 + 1e-12)) {
        return Err(PhysicsError::invalid(
            "propagation interval",
            format!("[{a:e}, {b:e}] s"),
            format!("inside [0, {tau:e}] s"),
        ));
    }
    let mut edges = vec![a];
    edges.extend(ramp.breakpoints().into_iter().filter(|&t| t > a && t < b));
    edges.push(b);
    let constant = ramp.is_piecewise_constant();
    let mut map = Matrix3::identity();
    let mut steps = 0;
    let w = ramp.omega_initial().max(ramp.omega_final()).max(ramp.max_omega2().0.abs().sqrt());
    let tol_rate = 0.05 * opts.accuracy / tau;
    let mut h = (0.05 / w).min(tau);
    // Work in scaled coordinates (omega² X, Y, omega D) with a fixed omega = w, where
    // every generator entry is of order w: the exponentials of the raw SI matrices
    // (entries from 1 to ~1e15) lose most digits to scaling and squaring.
    let scale = Matrix3::from_diagonal(&nalgebra::Vector3::new(w * w, 1.0, w));
    let inv = Matrix3::from_diagonal(&nalgebra::Vector3::new(1.0 / (w * w), 1.0, 1.0 / w));
    let scaled = |w2: f64| scale * noise.generator(w2) * inv;
    for win in edges.windows(2) {
        let (t0, t1) = (win[0], win[1]);
        if t1 <= t0 {
            continue;
        }
        if constant {
            let mid = 0.5 * (t0 + t1);
            let w2 = match ramp {
                Ramp::Sampled(s) if s.reading() == SampledReading::Hold => s.omega2_rows()[s.row_index(mid)],
                _ => ramp.omega2(mid),
            };
            map = (scaled(w2) * (t1 - t0)).exp() * map;
            steps += 1;
            continue;
        }
        let mut t = t0;
        while t < t1 {
            let mut hs = h.min(t1 - t);
            if t1 - t - hs < 1e-3 * hs {
                hs = t1 - t;
            }
            let step = |t: f64, h: f64| {
                let g1 = scaled(ramp.omega2(t + GAUSS_NODES[0] * h));
                let g2 = scaled(ramp.omega2(t + GAUSS_NODES[1] * h));
                let omega = (g1 + g2) * (0.5 * h) + (g2 * g1 - g1 * g2) * (COMMUTATOR_WEIGHT * h * h);
                omega.exp()
            };
            let full = step(t, hs);
            let two = step(t + 0.5 * hs, 0.5 * hs) * step(t, 0.5 * hs);
            let err = (two - full).amax() / 15.0;
            // Below ~100 eps the estimate is rounding noise of the 3x3 exponentials.
            let tol = (tol_rate * hs).max(100.0 * f64::EPSILON);
            if err <= tol || hs <= 1e-14 * tau {
                map = two * map;
                t += hs;
                if t1 - t < 1e-15 * tau {
                    t = t1;
                }
                steps += 1;
                if steps > opts.max_steps {
                    return Err(PhysicsError::AccuracyNotReached {
                        what: "noisy propagation".into(),
                        accuracy: opts.accuracy,
                        steps,
                    });
                }
            }
            let factor = if err == 0.0 { 4.0 } else { (0.9 * (tol / err).powf(0.2)).clamp(0.2, 4.0) };
            h = hs * factor;
        }
    }
    Ok((inv * map * scale, steps))
}
