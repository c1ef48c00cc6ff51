//! Affine maps v -> A v + b on three-component state vectors.

use nalgebra::{Matrix3, Vector3};

/// v -> A v + b. Used on (H, L, C) for cycle strokes.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AffineMap {
    /// Linear part A.
    pub a: Matrix3<f64>,
    /// Offset b.
    pub b: Vector3<f64>,
}

impl AffineMap {
    /// The identity map.
    pub fn identity() -> Self {
        Self { a: Matrix3::identity(), b: Vector3::zeros() }
    }

    /// A linear map (b = 0).
    pub fn linear(a: Matrix3<f64>) -> Self {
        Self { a, b: Vector3::zeros() }
    }

    /// Applies the map.
    pub fn apply(&self, v: &Vector3<f64>) -> Vector3<f64> {
        self.a * v + self.b
    }

    /// `next ∘ self`: first self, then `next`.
    #[must_use]
    pub fn then(&self, next: &Self) -> Self {
        Self { a: next.a * self.a, b: next.a * self.b + next.b }
    }

    /// Spectral radius of the linear part (largest |eigenvalue|).
    pub fn spectral_radius(&self) -> f64 {
        self.a.complex_eigenvalues().iter().map(|z| z.norm()).fold(0.0, f64::max)
    }

    /// The fixed point (I - A)⁻¹ b, if I - A is invertible.
    pub fn fixed_point(&self) -> Option<Vector3<f64>> {
        (Matrix3::identity() - self.a).lu().solve(&self.b)
    }
}
