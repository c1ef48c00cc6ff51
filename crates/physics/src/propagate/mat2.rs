//! A 2x2 real matrix for the fundamental solution of x'' = -omega²(t) x.

use nalgebra::Matrix3;

/// 2x2 fundamental matrix [[a, b], [c, d]] mapping (x, x') at one time to (x, x') at
/// a later one. Columns: the solutions with (x, x') = (1, 0) and (0, 1) at the start.
/// Units: a, d dimensionless; b in s; c in 1/s. det = 1 for every unitary stroke.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Mat2 {
    /// Row 1, column 1.
    pub a: f64,
    /// Row 1, column 2, s.
    pub b: f64,
    /// Row 2, column 1, 1/s.
    pub c: f64,
    /// Row 2, column 2.
    pub d: f64,
}

impl Mat2 {
    /// The identity.
    pub const IDENTITY: Self = Self { a: 1.0, b: 0.0, c: 0.0, d: 1.0 };

    /// Matrix product `self * rhs` (apply `rhs` first).
    #[inline(always)]
    #[must_use]
    pub fn mul(&self, rhs: &Self) -> Self {
        Self {
            a: self.a * rhs.a + self.b * rhs.c,
            b: self.a * rhs.b + self.b * rhs.d,
            c: self.c * rhs.a + self.d * rhs.c,
            d: self.c * rhs.b + self.d * rhs.d,
        }
    }

    /// Determinant (1 for an exact unitary stroke).
    pub fn det(&self) -> f64 {
        self.a * self.d - self.b * self.c
    }

    /// The linear map this induces on the second moments (X, Y, D) =
    /// (<Q²>, <P²>, <(QP+PQ)/2>): Sigma -> M Sigma Mᵀ.
    pub fn moment_map(&self) -> Matrix3<f64> {
        let Self { a, b, c, d } = *self;
        Matrix3::new(a * a, b * b, 2.0 * a * b, c * c, d * d, 2.0 * c * d, a * c, b * d, a * d + b * c)
    }

    /// Largest entry in a frequency-scaled sense: |a|, |b| w, |c|/w, |d|.
    pub(crate) fn scaled_norm(&self, w: f64) -> f64 {
        self.a.abs().max((self.b * w).abs()).max((self.c / w).abs()).max(self.d.abs())
    }

    /// Largest scaled entry of `self - other`.
    pub(crate) fn scaled_distance(&self, other: &Self, w: f64) -> f64 {
        Self { a: self.a - other.a, b: self.b - other.b, c: self.c - other.c, d: self.d - other.d }.scaled_norm(w)
    }
}
