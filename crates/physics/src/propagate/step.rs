//! Exact step matrices: constant omega² over a step (any sign), and the
//! fourth-order Magnus step for a smoothly varying omega².

use super::entire::{SHORT_SERIES_LIMIT, ch_sh, ch_sh_short};
use super::mat2::Mat2;

/// Exact step over `dt` at constant `omega2` (rad/s)², any sign:
/// [[c, s], [-omega² s, c]] with c = Ch(-omega² dt²), s = dt Sh(-omega² dt²).
#[inline(always)]
pub fn constant_step(omega2: f64, dt: f64) -> Mat2 {
    let (c, sh) = ch_sh(-omega2 * dt * dt);
    let s = dt * sh;
    Mat2 { a: c, b: s, c: -omega2 * s, d: c }
}

/// Gauss-Legendre nodes of the two-point rule on [0, 1].
pub const GAUSS_NODES: [f64; 2] = [0.5 - 0.288_675_134_594_812_9, 0.5 + 0.288_675_134_594_812_9];

/// sqrt(3)/12, the weight of the commutator term.
const COMMUTATOR_WEIGHT: f64 = 0.144_337_567_297_406_43;

/// Fourth-order Magnus step from omega² sampled at the two Gauss nodes of a step `h`.
/// Omega = h/2)(A1 + A2) + (sqrt3 h²/12)[A2, A1] with A = [[0, 1], [-omega², 0]], which
/// is [[p, h], [r, -p]] with p = (sqrt3 h²/12)(w2_2 - w2_1), r = -(h/2)(w2_1 + w2_2;
/// exp(Omega) = Ch(z) I + Sh(z) Omega, z = p² + h r. (Blanes, Casas, Oteo, Ros,
/// Phys. Rep. 470, 151 (2009), eq. for the order-4 Magnus integrator.)
#[inline(always)]
pub fn magnus4_step(w2_1: f64, w2_2: f64, h: f64) -> Mat2 {
    let p = COMMUTATOR_WEIGHT * h * h * (w2_2 - w2_1);
    let r = -0.5 * h * (w2_1 + w2_2);
    let z = p * p + h * r;
    let (ch, sh) = ch_sh(z);
    Mat2 { a: ch + sh * p, b: sh * h, c: sh * r, d: ch - sh * p }
}

/// Second-order step without the commutator (midpoint of the Gauss values): kept
/// only so tests can show that dropping the commutator costs two orders.
#[inline]
pub fn magnus2_step(w2_1: f64, w2_2: f64, h: f64) -> Mat2 {
    constant_step(0.5 * (w2_1 + w2_2), h)
}

/// Exact propagation through held samples of constant omega² and a common step `dt`:
/// returns M_n ... M_1. This is the sample-and-hold kernel (a generator's output).
/// Samples are taken in pairs: the pair's product does not depend on the running M,
/// so the serial chain through M is half as long and the processor overlaps the rest.
/// When every sample is short (|omega²| dt² <= 0.01, the usual case for a generator far
/// faster than the trap) the loop runs branch-free on the short series.
#[inline]
pub fn hold_uniform(omega2: &[f64], dt: f64) -> Mat2 {
    let dt2 = dt * dt;
    let peak = omega2.iter().fold(0.0_f64, |m, w| m.max(w.abs()));
    if peak * dt2 <= SHORT_SERIES_LIMIT {
        hold_pairs(omega2, |w2: f64| {
            let (c, sh) = ch_sh_short(-w2 * dt2);
            let s = dt * sh;
            Mat2 { a: c, b: s, c: -w2 * s, d: c }
        })
    } else {
        hold_pairs(omega2, |w2: f64| {
            let (c, sh) = ch_sh(-w2 * dt2);
            let s = dt * sh;
            Mat2 { a: c, b: s, c: -w2 * s, d: c }
        })
    }
}

#[inline(always)]
fn hold_pairs(omega2: &[f64], step: impl Fn(f64) -> Mat2) -> Mat2 {
    let mut m = Mat2::IDENTITY;
    let mut pairs = omega2.chunks_exact(2);
    for pair in &mut pairs {
        let p = step(pair[1]).mul(&step(pair[0]));
        m = p.mul(&m);
    }
    for &w2 in pairs.remainder() {
        m = step(w2).mul(&m);
    }
    m
}

/// Exact propagation through held samples with individual durations: returns
/// M_n ... M_1. Taken in pairs like [`hold_uniform`], so the serial chain through the
/// running product is half as long.
#[inline]
pub fn hold_varying(omega2: &[f64], dt: &[f64]) -> Mat2 {
    let n = omega2.len().min(dt.len());
    let mut m = Mat2::IDENTITY;
    let mut k = 0;
    while k + 1 < n {
        let p = constant_step(omega2[k + 1], dt[k + 1]).mul(&constant_step(omega2[k], dt[k]));
        m = p.mul(&m);
        k += 2;
    }
    if k < n {
        m = constant_step(omega2[k], dt[k]).mul(&m);
    }
    m
}
