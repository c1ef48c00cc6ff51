//! The entire functions behind every exact step: Ch(z) = cosh sqrt z and
//! Sh(z) = sinh(sqrt z)/sqrt z, defined for every real z (for z < 0 they are
//! cos sqrt(-z) and sin(sqrt(-z))/sqrt(-z)), and the pair f, g of the
//! constant-mu propagator.

/// |z| up to which the power series is used; beyond it the trigonometric or
/// hyperbolic form. At |z| = 1/4 the first dropped term of Ch is
/// 0.25^8/16! = 3.5e-18, below rounding.
pub const SERIES_LIMIT: f64 = 0.25;

// Reciprocal factorials 1/(2n)! and 1/(2n+1)!, n = 0..7, precomputed so the
// series is a pure Horner chain (no division in the hot loop).
const CH: [f64; 8] = [
    1.0,
    1.0 / 2.0,
    1.0 / 24.0,
    1.0 / 720.0,
    1.0 / 40_320.0,
    1.0 / 3_628_800.0,
    1.0 / 479_001_600.0,
    1.0 / 87_178_291_200.0,
];
const SH: [f64; 8] = [
    1.0,
    1.0 / 6.0,
    1.0 / 120.0,
    1.0 / 5040.0,
    1.0 / 362_880.0,
    1.0 / 39_916_800.0,
    1.0 / 6_227_020_800.0,
    1.0 / 1_307_674_368_000.0,
];

/// Below this |z| five terms suffice: the first dropped term of Ch is
/// 0.01^5/10! = 2.8e-17, below rounding.
pub const SHORT_SERIES_LIMIT: f64 = 0.01;

/// Degree-4 polynomial by Estrin's scheme (short dependency chains).
#[inline(always)]
fn estrin4(c: &[f64; 8], z: f64, z2: f64) -> f64 {
    (c[0] + c[1] * z) + z2 * ((c[2] + c[3] * z) + z2 * c[4])
}

/// Degree-7 polynomial by Estrin's scheme.
#[inline(always)]
fn estrin7(c: &[f64; 8], z: f64, z2: f64) -> f64 {
    let z4 = z2 * z2;
    ((c[0] + c[1] * z) + z2 * (c[2] + c[3] * z)) + z4 * ((c[4] + c[5] * z) + z2 * (c[6] + c[7] * z))
}

/// (Ch(z), Sh(z)) by the short series alone; only valid for |z| <= [`SHORT_SERIES_LIMIT`]
/// (callers check the whole batch first).
#[inline(always)]
pub fn ch_sh_short(z: f64) -> (f64, f64) {
    let z2 = z * z;
    (estrin4(&CH, z, z2), estrin4(&SH, z, z2))
}

/// Returns (Ch(z), Sh(z)) for any real z, exact to rounding.
#[inline(always)]
pub fn ch_sh(z: f64) -> (f64, f64) {
    let z2 = z * z;
    if z.abs() <= SHORT_SERIES_LIMIT {
        (estrin4(&CH, z, z2), estrin4(&SH, z, z2))
    } else if z.abs() <= SERIES_LIMIT {
        (estrin7(&CH, z, z2), estrin7(&SH, z, z2))
    } else {
        ch_sh_far(z)
    }
}

#[cold]
#[inline(never)]
fn ch_sh_far(z: f64) -> (f64, f64) {
    if z > 0.0 {
        let r = z.sqrt();
        (r.cosh(), r.sinh() / r)
    } else {
        let r = (-z).sqrt();
        (r.cos(), r.sin() / r)
    }
}

/// g(x) = sin(sqrt x)/sqrt x, entire in x (sinh form for x < 0). Equals Sh(-x).
#[inline]
pub fn g_entire(x: f64) -> f64 {
    ch_sh(-x).1
}

/// f(x) = (1 - cos sqrt x)/x, entire in x (series 1/2 - x/24 + x²/720 - ...).
#[inline]
pub fn f_entire(x: f64) -> f64 {
    if x.abs() <= 1.0 {
        // sum_{n>=0} (-x)^n / (2n+2)!, 12 terms: first dropped 1/26! ~ 2.5e-27.
        let mut term = 0.5;
        let mut sum = 0.0;
        for n in 0..12_u32 {
            sum += term;
            let k = f64::from(2 * n + 3) * f64::from(2 * n + 4);
            term *= -x / k;
        }
        sum
    } else if x > 0.0 {
        // 1 - cos r = 2 sin²(r/2) avoids cancellation.
        let r = x.sqrt();
        let s = (0.5 * r).sin();
        2.0 * s * s / x
    } else {
        let r = (-x).sqrt();
        let s = (0.5 * r).sinh();
        -2.0 * s * s / x
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The series agree with the trigonometric and hyperbolic closed forms on both
    /// sides of each tier boundary (cosh, sinh, cos, sin from the standard library).
    #[test]
    fn series_match_closed_forms() {
        for z in [1e-12, 1e-4, 0.0099, 0.0101, 0.1, 0.2499, -1e-6, -0.0099, -0.0101, -0.2499, 0.26, -0.26, 3.0, -40.0] {
            let (ch, sh) = ch_sh(z);
            let (ech, esh) = if z > 0.0 {
                let r = f64::sqrt(z);
                (r.cosh(), r.sinh() / r)
            } else {
                let r = f64::sqrt(-z);
                (r.cos(), r.sin() / r)
            };
            assert!((ch - ech).abs() <= 4e-16 * ech.abs().max(1.0), "Ch({z}) = {ch} vs {ech}");
            assert!((sh - esh).abs() <= 4e-16 * esh.abs().max(1.0), "Sh({z}) = {sh} vs {esh}");
            if z.abs() <= SHORT_SERIES_LIMIT {
                assert_eq!(ch_sh_short(z), (ch, sh));
            }
        }
    }
}
