//! The periodic position grid of the split-step propagation, with its Fourier
//! partner and the absorbing margins.

use super::well::Profile;
use rustfft::num_complex::Complex64;
use rustfft::{Fft, FftPlanner};
use std::sync::Arc;

/// Margin on the phase-space estimate of the box and the momentum range (both).
const SAFETY: f64 = 1.15;
/// Ground-state standard deviations of evanescent tail kept beyond the top level's
/// turning point (|psi|² ~ exp(-x²/(2 sigma²)) falls to 1e-18 at 9 sigma).
const TAIL_SIGMAS: f64 = 9.0;
/// Width of each absorbing margin relative to the interior half-width.
const ABSORBER_FRACTION: f64 = 0.35;
/// How far past the edge of an optical well the interior reaches, in waists (the
/// Gaussian is at 98.9 % of its depth at 1.5 w0) or Rayleigh ranges (the Lorentzian is
/// at 90 % at 3 zR), so that what leaves the well runs into the absorber.
const GAUSSIAN_EDGE: f64 = 1.5;
const LORENTZIAN_EDGE: f64 = 3.0;

/// What the grid must hold, in reduced units.
#[derive(Debug, Clone, Copy)]
pub(crate) struct GridNeeds {
    /// Number of levels propagated (the top one is levels - 1).
    pub levels: usize,
    /// Largest ground-state widths along the ramp (harmonic moment engine).
    pub sigma_x: f64,
    pub sigma_p: f64,
    /// Half-widths the start and end levels need (turning point plus tail).
    pub reach: f64,
    /// Multiplier of the box and momentum range.
    pub scale: f64,
    /// Absorbing margins on or off.
    pub absorbing: bool,
}

/// A periodic grid x_j = (j - n/2) dx, j = 0..n, symmetric about x = 0 (index n/2).
pub(crate) struct Grid {
    pub n: usize,
    pub dx: f64,
    /// Half-width of the interior (where no absorption acts).
    pub inner: f64,
    pub x: Vec<f64>,
    /// k² / 2 in FFT order.
    pub kinetic: Vec<f64>,
    /// Absorbing potential W(x) >= 0 (zero in the interior).
    pub absorber: Vec<f64>,
    /// Indices of the grid points where W > 0.
    pub absorbing_points: Vec<usize>,
    pub forward: Arc<dyn Fft<f64>>,
    pub inverse: Arc<dyn Fft<f64>>,
    pub scratch_len: usize,
}

impl Grid {
    pub(crate) fn new(needs: &GridNeeds, profile: Profile) -> Self {
        let top = needs.levels.saturating_sub(1) as f64;
        let reach = (2.0 * (2.0 * top + 1.0)).sqrt() + TAIL_SIGMAS;
        let mut inner = SAFETY * needs.scale * reach * needs.sigma_x;
        inner = inner.max(needs.scale * needs.reach);
        if let Profile::Gaussian(w) = profile {
            inner = inner.max(needs.scale * GAUSSIAN_EDGE * w);
        }
        if let Profile::Lorentzian(z) = profile {
            inner = inner.max(needs.scale * LORENTZIAN_EDGE * z);
        }
        let k_max = SAFETY * needs.scale * reach * needs.sigma_p;
        let margin = if needs.absorbing { ABSORBER_FRACTION * inner } else { 0.0 };
        let half_box = inner + margin;
        // Phase-space area over 2 pi hbar: (2 L)(2 k_max)/(2 pi) points.
        let wanted = (2.0 * half_box * k_max / std::f64::consts::PI).ceil() as usize;
        let n = fast_length(wanted.max(32));
        let dx = 2.0 * half_box / n as f64;
        let x: Vec<f64> = (0..n).map(|j| (j as f64 - (n / 2) as f64) * dx).collect();
        let dk = 2.0 * std::f64::consts::PI / (n as f64 * dx);
        let kinetic = (0..n)
            .map(|j| {
                let k = if j < n / 2 { j as f64 } else { j as f64 - n as f64 } * dk;
                0.5 * k * k
            })
            .collect();
        let (absorber, absorbing_points) = absorber(&x, inner, margin, k_max);
        let mut planner = FftPlanner::new();
        let forward = planner.plan_fft_forward(n);
        let inverse = planner.plan_fft_inverse(n);
        let scratch_len = forward.get_inplace_scratch_len().max(inverse.get_inplace_scratch_len());
        Self { n, dx, inner, x, kinetic, absorber, absorbing_points, forward, inverse, scratch_len }
    }

    /// The index of x = 0.
    pub(crate) fn centre(&self) -> usize {
        self.n / 2
    }

    /// Most points a symmetric box inside the interior may have each side of 0.
    pub(crate) fn max_half(&self) -> usize {
        ((self.inner / self.dx).floor() as usize).min(self.n / 2 - 1)
    }

    /// Embeds a box vector (2 half + 1 points about 0) into the grid.
    pub(crate) fn embed(&self, v: &[f64]) -> Vec<Complex64> {
        let half = v.len() / 2;
        let mut psi = vec![Complex64::new(0.0, 0.0); self.n];
        let c = self.centre();
        for (i, &a) in v.iter().enumerate() {
            psi[c + i - half] = Complex64::new(a, 0.0);
        }
        psi
    }

    /// A scratch buffer for the FFTs.
    pub(crate) fn scratch(&self) -> Vec<Complex64> {
        vec![Complex64::new(0.0, 0.0); self.scratch_len]
    }
}

/// W(x) = W0 s³ over each margin (s from 0 at the interior's edge to 1 at the box's),
/// with W0 such that what crosses a margin at half the grid's top momentum loses e^-35
/// of its norm: W0 (width / 4) / v = 17.5 in and the same on the far side (the margins
/// meet across the periodic boundary). A smooth start keeps reflection small.
fn absorber(x: &[f64], inner: f64, margin: f64, k_max: f64) -> (Vec<f64>, Vec<usize>) {
    let mut w = vec![0.0; x.len()];
    let mut points = Vec::new();
    if margin <= 0.0 {
        return (w, points);
    }
    let w0 = 35.0 * (0.5 * k_max) / margin;
    for (j, &xj) in x.iter().enumerate() {
        let s = (xj.abs() - inner) / margin;
        if s > 0.0 {
            let s = s.min(1.0);
            w[j] = w0 * s * s * s;
            points.push(j);
        }
    }
    (w, points)
}

/// The smallest even n >= `wanted` of the form 2^a 3^b 5^c (fast for the FFT).
pub(crate) fn fast_length(wanted: usize) -> usize {
    let mut n = wanted.max(2);
    loop {
        if n.is_multiple_of(2) {
            let mut m = n;
            for p in [2, 3, 5] {
                while m.is_multiple_of(p) {
                    m /= p;
                }
            }
            if m == 1 {
                return n;
            }
        }
        n += 1;
    }
}
