//! Levels of a well on a uniform grid: the sinc discrete-variable representation
//! (D. T. Colbert and W. H. Miller, J. Chem. Phys. 96, 1982 (1992)) on a symmetric box
//! of the propagation grid, diagonalised in its even and odd blocks.
//!
//! The sinc kinetic matrix on a box and the periodic Fourier kinetic operator of the
//! split-step propagation differ only by terms that act through a state's Nyquist
//! component, which is exponentially small for a resolved state; a box reaching well
//! past the turning points therefore gives the eigenstates of the propagation's own
//! Hamiltonian to rounding.

use super::well::Profile;
use crate::error::{PhysicsError, Result};
use nalgebra::{DMatrix, SymmetricEigen};

/// Eigenstates of a well on the box x_j = j dx, j = -half..=half.
#[derive(Debug, Clone)]
pub(crate) struct BoxLevels {
    /// Energies in ascending order, hbar omega_ref.
    pub energies: Vec<f64>,
    /// The matching eigenvectors on the 2 half + 1 box points, unit discrete norm.
    pub vectors: Vec<Vec<f64>>,
}

/// Sinc-DVR kinetic element between points `d` apart, hbar = m = 1.
#[inline]
fn kinetic(d: usize, dx: f64) -> f64 {
    let scale = 1.0 / (dx * dx);
    if d == 0 {
        scale * std::f64::consts::PI * std::f64::consts::PI / 6.0
    } else {
        let df = d as f64;
        let sign = if d.is_multiple_of(2) { 1.0 } else { -1.0 };
        scale * sign / (df * df)
    }
}

/// The lowest `count` levels of w² g(x) on the box of `half` points each side of 0.
pub(crate) fn box_levels(profile: Profile, w2: f64, dx: f64, half: usize, count: usize) -> Result<BoxLevels> {
    if half < 2 || count == 0 || count > 2 * half {
        return Err(PhysicsError::invalid("levels asked of the grid box", count, format!("1 to {}", 2 * half)));
    }
    let v: Vec<f64> = (0..=half).map(|j| w2 * profile.g(j as f64 * dx)).collect();
    // Even block: basis delta_0 and (delta_k + delta_-k)/sqrt2, k = 1..=half.
    let ne = half + 1;
    let even = DMatrix::from_fn(ne, ne, |i, j| match (i, j) {
        (0, 0) => kinetic(0, dx) + v[0],
        (0, k) | (k, 0) => std::f64::consts::SQRT_2 * kinetic(k, dx),
        (k, l) => kinetic(k.abs_diff(l), dx) + kinetic(k + l, dx) + if k == l { v[k] } else { 0.0 },
    });
    // Odd block: (delta_k - delta_-k)/sqrt2, k = 1..=half.
    let no = half;
    let odd = DMatrix::from_fn(no, no, |i, j| {
        let (k, l) = (i + 1, j + 1);
        kinetic(k.abs_diff(l), dx) - kinetic(k + l, dx) + if k == l { v[k] } else { 0.0 }
    });
    let ee = SymmetricEigen::new(even);
    let eo = SymmetricEigen::new(odd);
    let mut all: Vec<(f64, bool, usize)> = ee
        .eigenvalues
        .iter()
        .enumerate()
        .map(|(i, &e)| (e, true, i))
        .chain(eo.eigenvalues.iter().enumerate().map(|(i, &e)| (e, false, i)))
        .collect();
    all.sort_by(|a, b| a.0.total_cmp(&b.0));
    let n = 2 * half + 1;
    let r = std::f64::consts::FRAC_1_SQRT_2;
    let mut energies = Vec::with_capacity(count);
    let mut vectors = Vec::with_capacity(count);
    for &(e, is_even, i) in all.iter().take(count) {
        let mut vec = vec![0.0; n];
        if is_even {
            let col = ee.eigenvectors.column(i);
            vec[half] = col[0];
            for k in 1..=half {
                vec[half + k] = r * col[k];
                vec[half - k] = r * col[k];
            }
        } else {
            let col = eo.eigenvectors.column(i);
            for k in 1..=half {
                vec[half + k] = r * col[k - 1];
                vec[half - k] = -r * col[k - 1];
            }
        }
        // A fixed sign (positive where the state first rises) makes overlaps reproducible.
        if let Some(&first) = vec.iter().find(|c| c.abs() > 1e-8)
            && first < 0.0
        {
            for c in &mut vec {
                *c = -*c;
            }
        }
        energies.push(e);
        vectors.push(vec);
    }
    Ok(BoxLevels { energies, vectors })
}

/// Half-width (reduced units) a box needs for the lowest `count` levels of w² g at
/// frequency w = sqrt(w2): the turning point of the harmonic estimate of the top level
/// (at or beyond the true one, as every shape here is softer than its harmonic
/// approximation) plus 11 local oscillator lengths of evanescent tail (a level bound
/// by at least one quantum decays at least as exp(-sqrt(2) x) beyond it, so its weight
/// there is below 1e-13). `cap` bounds it (the grid's interior).
pub(crate) fn box_reach(profile: Profile, w2: f64, count: usize, cap: f64) -> f64 {
    let w = w2.sqrt();
    let e_top = (count as f64 - 0.5) * w;
    let tail = 11.0 / w.sqrt();
    profile.turning_point(w2, e_top).map_or(cap, |a| (a + tail).min(cap))
}
