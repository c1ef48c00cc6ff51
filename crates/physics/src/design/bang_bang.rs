//! Time-optimal piecewise-constant (bang-bang) ramps between bounds
//! omega_min² <= omega² <= omega_max² that end energy-diagonal.
//!
//! Method: the Ermakov scaling factor b (b'' + omega² b = omega_i²/b³, b(0) = 1,
//! b'(0) = 0; Chen et al., Phys. Rev. Lett. 104, 063002 (2010)) must reach
//! b = sqrt(omega_i/omega_f) with b' = 0. The fastest way drives b with the extreme
//! value that accelerates it, then with the extreme that brakes it, one switch:
//! for an expansion first the lowest omega², then the highest; for a compression the
//! reverse. This is the time-optimal solution of D. Stefanatos, J. Ruths, J.-S. Li,
//! Phys. Rev. A 82, 063422 (2010) (with P. Salamon, K. H. Hoffmann, Y. Rezek,
//! R. Kosloff, Phys. Chem. Chem. Phys. 11, 1027 (2009); from memory). At constant u
//! the first integral b'² + omega_i²/b² + u b² = C gives each hold's duration in closed
//! form with z = b²: t = ∫ dz / (2 sqrt(-u z² + C z - omega_i²)).
//! For bounds equal to the end frequencies this reduces to the closed form of
//! From the frictionless condition of the two holds (compare P. Salamon et al.,
//! Phys. Chem. Chem. Phys. 11, 1027 (2009)): tau = (phi/2)(1/omega_c + 1/omega_h),
//! cos phi = (omega_h² + omega_c²)/(omega_h + omega_c)².

use crate::error::{PhysicsError, Result, require_finite, require_positive};
use crate::ramp::{PiecewiseConstantRamp, Segment};

/// A time-optimal hold sequence.
#[derive(Debug, Clone, PartialEq)]
pub struct BangBangDesign {
    /// Total duration, s.
    pub duration: f64,
    /// The holds in order (omega², duration).
    pub segments: Vec<Segment>,
    /// The ramp.
    pub ramp: PiecewiseConstantRamp,
}

/// Antiderivative of 1/(2 sqrt(q(z))), q = -u z² + c z - w2. At a turning point
/// (`turning`, where b' = 0 and so q = 0 exactly) q is set to zero rather than computed:
/// the antiderivative has an infinite slope there, and a rounding-size q would cost
/// half the digits.
fn antiderivative(u: f64, c: f64, w2: f64, z: f64, turning: bool) -> f64 {
    let q = if turning { 0.0 } else { (-u * z * z + c * z - w2).max(0.0) };
    if u > 0.0 {
        // arcsin((2uz - c)/sqrt(disc)) written as atan2 with sqrt(q) for accuracy.
        let x = 2.0 * u * z - c;
        let y = 2.0 * (u * q).sqrt();
        x.atan2(y) / (2.0 * u.sqrt())
    } else if u < 0.0 {
        let v = -u;
        (2.0 * (v * q).sqrt() + 2.0 * v * z + c).ln() / (2.0 * v.sqrt())
    } else {
        q.sqrt() / c
    }
}

/// Minimum-time holds from omega_i to omega_f (rad/s) with omega² kept within
/// [omega2_min, omega2_max] ((rad/s)²; omega2_min may be <= 0, an inverted trap). The
/// bounds must enclose both end values.
pub fn time_optimal_holds(omega_i: f64, omega_f: f64, omega2_min: f64, omega2_max: f64) -> Result<BangBangDesign> {
    require_positive("initial frequency", omega_i)?;
    require_positive("final frequency", omega_f)?;
    require_finite("lowest omega²", omega2_min)?;
    require_finite("highest omega²", omega2_max)?;
    let (wi2, wf2) = (omega_i * omega_i, omega_f * omega_f);
    let lo = wi2.min(wf2);
    let hi = wi2.max(wf2);
    if omega2_min > lo * (1.0 + 1e-12) {
        return Err(PhysicsError::invalid(
            "lowest bound",
            omega2_min,
            format!("at most the smaller end value omega² = {lo:e} (rad/s)²"),
        ));
    }
    if omega2_max < hi * (1.0 - 1e-12) {
        return Err(PhysicsError::invalid(
            "highest bound",
            omega2_max,
            format!("at least the larger end value omega² = {hi:e} (rad/s)²"),
        ));
    }
    if (omega_f / omega_i - 1.0).abs() < 1e-12 {
        return Err(PhysicsError::invalid("final frequency", omega_f, "different from the initial frequency"));
    }
    let expansion = omega_f < omega_i;
    let (u1, u2) =
        if expansion { (omega2_min.min(lo), omega2_max.max(hi)) } else { (omega2_max.max(hi), omega2_min.min(lo)) };
    if (u2 - u1).abs() < 1e-300 {
        return Err(PhysicsError::invalid("bounds", format!("[{omega2_min:e}, {omega2_max:e}]"), "a non-empty range"));
    }
    let beta2 = omega_i / omega_f; // z_end = b(tau)² = omega_i/omega_f
    let c1 = wi2 + u1; // first integral at b = 1, b' = 0
    let c2 = wi2 / beta2 + u2 * beta2; // at b² = beta2, b' = 0
    let zs = (c2 - c1) / (u2 - u1);
    let ok = if expansion { zs > 1.0 && zs < beta2 } else { zs < 1.0 && zs > beta2 };
    if !ok {
        return Err(PhysicsError::invalid(
            "bounds",
            format!("[{omega2_min:e}, {omega2_max:e}]"),
            "bounds that allow a one-switch frictionless hold pair",
        ));
    }
    let t1 = (antiderivative(u1, c1, wi2, zs, false) - antiderivative(u1, c1, wi2, 1.0, true)).abs();
    let t2 = (antiderivative(u2, c2, wi2, beta2, true) - antiderivative(u2, c2, wi2, zs, false)).abs();
    let segments = vec![Segment { omega2: u1, duration: t1 }, Segment { omega2: u2, duration: t2 }];
    let ramp = PiecewiseConstantRamp::new(omega_i, omega_f, segments.clone())?;
    Ok(BangBangDesign { duration: t1 + t2, segments, ramp })
}
