//! Diagnostics along a ramp and at its end (Rezek and Kosloff, New J. Phys. 8, 83
//! (2006); Husimi, Prog. Theor. Phys. 9, 381 (1953)): energy in
//! quanta, L, C, Casimir invariant and drift, entropy, coherence ratio, friction
//! energy and frictional work, power, mu(t), Q*, extremes, limit violations and the
//! energy-diagonal verdict.

use crate::constants::HBAR;
use crate::error::{PhysicsError, Result};
use crate::limits::{TrapLimits, Violation, ViolationKind, find_violations};
use crate::noise::Noise;
use crate::propagate::{
    PropagationOptions, StrokeMap, fundamental_at, map_between, q_star_minus_one_from_fundamental,
    q_star_minus_one_from_map, stroke_map,
};
use crate::ramp::{Ramp, RampShape};
use crate::state::Moments;

/// Default tolerance on Q* - 1 for the energy-diagonal verdict.
pub const DEFAULT_TOLERANCE: f64 = 1e-3;

/// How to evaluate a ramp.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EvaluationSettings {
    /// Verdict tolerance on Q* - 1 (> 0); default 1e-3.
    pub tolerance: f64,
    /// Number of trajectory samples (>= 2; breakpoints are added); default 801.
    pub samples: usize,
    /// Propagation accuracy.
    pub propagation: PropagationOptions,
    /// Apparatus limits to check.
    pub limits: TrapLimits,
    /// Noise during the ramp.
    pub noise: Noise,
    /// Points at which the stated limits are checked (>= the trajectory samples; rows
    /// and hold starts of sampled and piecewise ramps are always added); default 4001.
    pub limit_samples: usize,
}

impl Default for EvaluationSettings {
    fn default() -> Self {
        Self {
            tolerance: DEFAULT_TOLERANCE,
            samples: 801,
            propagation: PropagationOptions::default(),
            limits: TrapLimits::default(),
            noise: Noise::NONE,
            limit_samples: 4001,
        }
    }
}

/// The state and derived quantities at one time of a ramp. Quantities that need
/// omega are `None` where omega² <= 0; the second moments are always given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TrajectoryPoint {
    /// Time, s.
    pub t: f64,
    /// omega², (rad/s)².
    pub omega2: f64,
    /// omega, rad/s, where omega² > 0.
    pub omega: Option<f64>,
    /// Second moments.
    pub moments: Moments,
    /// H = (Y + omega² X)/2, J (defined for any omega²; may be negative if inverted).
    pub energy_j: f64,
    /// H/(hbar omega).
    pub energy_quanta: Option<f64>,
    /// L/(hbar omega).
    pub l_quanta: Option<f64>,
    /// C/(hbar omega).
    pub c_quanta: Option<f64>,
    /// sqrt(L² + C²)/H, in [0, 1).
    pub coherence_ratio: Option<f64>,
    /// Casimir K = X Y - D², J² s².
    pub casimir: f64,
    /// |K/K(0) - 1|.
    pub casimir_drift: f64,
    /// Von Neumann entropy S/k_B.
    pub entropy: f64,
    /// Friction energy (H - hbar omega nu)/(hbar omega) >= 0.
    pub friction_quanta: Option<f64>,
    /// Instantaneous power dH/dt = (1/2) d(omega²)/dt X, W (work rate on the oscillator).
    pub power_w: f64,
    /// Adiabatic parameter mu = omegȧ/omega².
    pub mu: Option<f64>,
}

impl TrajectoryPoint {
    fn new(t: f64, omega2: f64, omega2_rate: f64, m: Moments, k0: f64) -> Self {
        let omega = (omega2 > 0.0).then(|| omega2.sqrt());
        let energy_j = m.energy(omega2);
        let casimir = m.casimir();
        let (mut eq, mut lq, mut cq, mut cr, mut fq, mut mu) = (None, None, None, None, None, None);
        if let Some(w) = omega {
            let e = m.energy_picture(w);
            let q = HBAR * w;
            eq = Some(e.h / q);
            lq = Some(e.l / q);
            cq = Some(e.c / q);
            cr = Some(e.l.hypot(e.c) / e.h);
            fq = Some(m.excess_energy(w) / q);
            mu = Some(omega2_rate / (2.0 * w * omega2));
        }
        Self {
            t,
            omega2,
            omega,
            moments: m,
            energy_j,
            energy_quanta: eq,
            l_quanta: lq,
            c_quanta: cq,
            coherence_ratio: cr,
            casimir,
            casimir_drift: (casimir / k0 - 1.0).abs(),
            entropy: m.entropy(),
            friction_quanta: fq,
            power_w: 0.5 * omega2_rate * m.x,
            mu,
        }
    }
}

/// The one verdict of a ramp, in the words every report, file header and screen uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// Energy-diagonal within the tolerance and within the stated limits.
    Pass,
    /// Not energy-diagonal (within the stated limits or not: breaking them comes first).
    Fail,
    /// A stated limit is broken.
    BreaksLimits,
}

impl Verdict {
    /// Breaks-limits over fail over pass.
    pub fn of(energy_diagonal: bool, within_limits: bool) -> Self {
        match (energy_diagonal, within_limits) {
            (_, false) => Self::BreaksLimits,
            (false, true) => Self::Fail,
            (true, true) => Self::Pass,
        }
    }
    /// Upper-case words for reports and file headers.
    pub fn word(self) -> &'static str {
        match self {
            Self::Pass => "PASS",
            Self::Fail => "FAIL",
            Self::BreaksLimits => "BREAKS LIMITS",
        }
    }
    /// The JSON value: `pass`, `fail` or `breaks-limits`.
    pub fn key(self) -> &'static str {
        match self {
            Self::Pass => "pass",
            Self::Fail => "fail",
            Self::BreaksLimits => "breaks-limits",
        }
    }
}

/// End-of-ramp figures (the keys of `quenchless eval --json`).
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct RampReport {
    /// Duration, s.
    pub duration_s: f64,
    /// omega_i, rad/s.
    pub omega_initial_rad_s: f64,
    /// omega_f, rad/s.
    pub omega_final_rad_s: f64,
    /// Husimi Q* (>= 1), or without a unitary stroke (noise on) the energy ratio
    /// H_f / ((omega_f/omega_i) H_i). Equals 1 + `q_star_minus_one`.
    pub q_star: f64,
    /// Q* - 1 (>= 0 for a unitary stroke) computed without cancellation: what every
    /// verdict and log plot uses. As accurate as the propagation (PropagationOptions).
    pub q_star_minus_one: f64,
    /// True when `q_star` is the energy ratio of a noisy stroke.
    pub q_star_is_energy_ratio: bool,
    /// sqrt(L² + C²)/H at the end.
    pub final_coherence_ratio: f64,
    /// H/(hbar omega_f) at the end.
    pub final_energy_quanta: f64,
    /// (H_end - H_start)/(hbar omega_i): work done on the oscillator.
    pub work_quanta: f64,
    /// (W - W_ad)/(hbar omega_i) with W_ad = (omega_f/omega_i - 1) H_i; from
    /// `q_star_minus_one` for an energy-diagonal start (then >= 0).
    pub friction_work_quanta: f64,
    /// |K_end/K_start - 1|.
    pub casimir_drift: f64,
    /// Smallest omega², (rad/s)², and when, s.
    pub min_omega2: f64,
    /// Time of the smallest omega², s.
    pub min_omega2_time_s: f64,
    /// Largest omega², (rad/s)².
    pub max_omega2: f64,
    /// Largest H(t)/(hbar omega(t)) over the trajectory samples where omega² > 0.
    pub peak_energy_quanta: f64,
    /// Q* - 1 <= tolerance.
    pub energy_diagonal: bool,
    /// The verdict tolerance used.
    pub tolerance: f64,
    /// Stretches where omega² <= 0 or a stated limit is broken.
    pub violations: Vec<Violation>,
    /// Initial and final entropy S/k_B.
    pub entropy_initial: f64,
    /// Final entropy S/k_B.
    pub entropy_final: f64,
    /// Propagation steps taken for the end map.
    #[cfg_attr(feature = "serde", serde(skip))]
    pub steps: usize,
}

impl RampReport {
    /// Whether the stated bounds and slew are respected (omega² <= 0 alone does not
    /// count unless a lowest frequency is stated).
    pub fn within_limits(&self) -> bool {
        self.violations.iter().all(|v| v.kind == ViolationKind::Inverted)
    }
    /// Whether omega² <= 0 somewhere.
    pub fn inverts(&self) -> bool {
        self.min_omega2 <= 0.0
    }
    /// PASS, FAIL or BREAKS LIMITS.
    pub fn verdict(&self) -> Verdict {
        Verdict::of(self.energy_diagonal, self.within_limits())
    }
}

/// A full evaluation: the report and the sampled trajectory.
#[derive(Debug, Clone, PartialEq)]
pub struct Evaluation {
    /// End figures.
    pub report: RampReport,
    /// Samples along the ramp (start and end included).
    pub trajectory: Vec<TrajectoryPoint>,
}

/// Evaluates a ramp from an initial state given at omega_i.
pub fn evaluate(ramp: &Ramp, initial: &Moments, settings: &EvaluationSettings) -> Result<Evaluation> {
    if !(settings.tolerance.is_finite() && settings.tolerance > 0.0) {
        return Err(PhysicsError::invalid("tolerance", settings.tolerance, "a finite number > 0"));
    }
    let times = ramp.grid_with_breakpoints(settings.samples);
    let noise = settings.noise;
    let opts = settings.propagation;
    // Unitary strokes: one sweep gives the trajectory and, at its last time (the end of
    // the ramp), the end map, under the requested accuracy (output times only shorten
    // steps). Otherwise the end map is propagated on its own below.
    let mut swept_end: Option<StrokeMap> = None;
    let states: Vec<Moments> = if noise.is_silent() && !matches!(ramp, Ramp::ConstantMu(_)) {
        let (ms, steps) = fundamental_at(ramp, &times, &opts)?;
        if let Some(last) = ms.last() {
            swept_end = Some(StrokeMap { moments: last.moment_map(), fundamental: Some(*last), steps });
        }
        ms.iter().map(|m| initial.mapped(&m.moment_map())).collect()
    } else {
        let mut out = Vec::with_capacity(times.len());
        let mut s = *initial;
        let mut t = 0.0;
        for &tj in &times {
            s = s.mapped(&map_between(ramp, &noise, t, tj, &opts)?.moments);
            t = tj;
            out.push(s);
        }
        out
    };
    let k0 = initial.casimir();
    let trajectory: Vec<TrajectoryPoint> = times
        .iter()
        .zip(&states)
        .map(|(&t, m)| TrajectoryPoint::new(t, ramp.omega2(t), ramp.omega2_rate(t), *m, k0))
        .collect();

    let end_map = match swept_end {
        Some(m) => m,
        None => stroke_map(ramp, &noise, &opts)?,
    };
    let wi = ramp.omega_initial();
    let wf = ramp.omega_final();
    let fin = initial.mapped(&end_map.moments);
    let unitary = noise.is_silent();
    let e0 = initial.energy_picture(wi);
    let ef = fin.energy_picture(wf);
    let excess = if unitary {
        match &end_map.fundamental {
            Some(m) => q_star_minus_one_from_fundamental(m, wi, wf),
            None => q_star_minus_one_from_map(&end_map.moments, wi, wf),
        }
    } else {
        noisy_ratio_minus_one(initial, &fin, wi, wf)
    };
    let work = ef.h - e0.h;
    // W - W_ad = H_f - (omega_f/omega_i) H_i, written so that nothing cancels: for an
    // energy-diagonal start through a unitary stroke it is (omega_f/omega_i) H_i (Q* - 1).
    let friction = if unitary && is_energy_diagonal(initial, wi) {
        wf / wi * e0.h * excess
    } else {
        excess_over_adiabatic(initial, &fin, wi, wf, unitary)
    };
    let (min_omega2, min_t) = ramp.min_omega2();
    let (max_omega2, _) = ramp.max_omega2();
    let peak = trajectory.iter().filter_map(|p| p.energy_quanta).fold(ef.h / (HBAR * wf), f64::max);
    let limit_times = limit_grid(ramp, &times, settings.limit_samples);
    let report = RampReport {
        duration_s: ramp.duration(),
        omega_initial_rad_s: wi,
        omega_final_rad_s: wf,
        q_star: 1.0 + excess,
        q_star_minus_one: excess,
        q_star_is_energy_ratio: !unitary,
        final_coherence_ratio: ef.l.hypot(ef.c) / ef.h,
        final_energy_quanta: ef.h / (HBAR * wf),
        work_quanta: work / (HBAR * wi),
        friction_work_quanta: friction / (HBAR * wi),
        casimir_drift: (fin.casimir() / k0 - 1.0).abs(),
        min_omega2,
        min_omega2_time_s: min_t,
        max_omega2,
        peak_energy_quanta: peak,
        energy_diagonal: excess <= settings.tolerance,
        tolerance: settings.tolerance,
        violations: find_violations(ramp, &settings.limits, &limit_times),
        entropy_initial: initial.entropy(),
        // A unitary stroke keeps K: the final entropy is the initial one exactly.
        entropy_final: if unitary { initial.entropy() } else { fin.entropy() },
        steps: end_map.steps,
    };
    Ok(Evaluation { report, trajectory })
}

/// The times at which limits are checked: the trajectory grid, densified to at least
/// `n` points, plus every row or hold start of a sampled or piecewise ramp.
fn limit_grid(ramp: &Ramp, times: &[f64], n: usize) -> Vec<f64> {
    let mut grid: Vec<f64> = if times.len() >= n { times.to_vec() } else { ramp.grid_with_breakpoints(n) };
    let base = if let Ramp::Axis(a) = ramp { a.base() } else { ramp };
    match base {
        Ramp::Sampled(s) => grid.extend_from_slice(s.times()),
        Ramp::PiecewiseConstant(_) => grid.extend(ramp.breakpoints()),
        _ => {}
    }
    grid.sort_by(f64::total_cmp);
    grid.dedup();
    grid
}

/// Only Q*, without the trajectory (faster): 1 + [`q_star_minus_one`].
pub fn q_star(ramp: &Ramp, opts: &PropagationOptions) -> Result<f64> {
    Ok(1.0 + q_star_minus_one(ramp, opts)?)
}

/// Q* - 1 of a ramp without noise, computed without cancellation (>= 0), between the
/// trap the ramp starts in and the trap it ends in.
pub fn q_star_minus_one(ramp: &Ramp, opts: &PropagationOptions) -> Result<f64> {
    let map = stroke_map(ramp, &Noise::NONE, opts)?;
    Ok(match map.fundamental {
        Some(m) => q_star_minus_one_from_fundamental(&m, ramp.omega_initial(), ramp.omega_final()),
        None => q_star_minus_one_from_map(&map.moments, ramp.omega_initial(), ramp.omega_final()),
    })
}

/// Whether a state is energy-diagonal at omega (L = C = 0 to rounding): thermal starts are.
fn is_energy_diagonal(m: &Moments, omega: f64) -> bool {
    let e = m.energy_picture(omega);
    e.l.hypot(e.c) <= 1e-12 * e.h
}

/// H_f - (omega_f/omega_i) H_i split into terms that do not cancel:
/// [H_f - omega_f sqrt(K_f)] + omega_f [sqrt(K_f) - sqrt(K_i)] - (omega_f/omega_i) [H_i - omega_i sqrt(K_i)].
/// The middle term is the change of the Casimir invariant, which only noise makes
/// (a unitary stroke keeps K, so it is left out then).
fn excess_over_adiabatic(initial: &Moments, fin: &Moments, wi: f64, wf: f64, unitary: bool) -> f64 {
    let ki = initial.casimir();
    let kf = fin.casimir();
    let growth = if unitary { 0.0 } else { wf * (kf - ki) / (kf.max(0.0).sqrt() + ki.max(0.0).sqrt()) };
    fin.excess_energy(wf) + growth - wf / wi * initial.excess_energy(wi)
}

/// The energy ratio H_f / ((omega_f/omega_i) H_i) of a stroke from `initial` (at
/// omega_i) to `fin` (at omega_f), minus one, with nothing cancelling (see
/// [`excess_over_adiabatic`]; noise heats, so with an energy-diagonal start it is >= 0
/// up to the rounding of the Casimir invariant's growth). `keeps_casimir`: the stroke
/// is unitary (no noise), so K's change is rounding and is left out.
pub fn energy_ratio_minus_one(initial: &Moments, fin: &Moments, wi: f64, wf: f64, keeps_casimir: bool) -> f64 {
    excess_over_adiabatic(initial, fin, wi, wf, keeps_casimir) / (wf / wi * initial.energy_picture(wi).h)
}

fn noisy_ratio_minus_one(initial: &Moments, fin: &Moments, wi: f64, wf: f64) -> f64 {
    energy_ratio_minus_one(initial, fin, wi, wf, false)
}
