//! Cycle optimisation: for a chosen ramp family of the two work strokes, the split of
//! the cycle time between the four strokes that maximises the power of the limit
//! cycle at a given total time; or the total time too; and optionally the frequency
//! ratio omega_c/omega_h (omega_h and the bath temperatures stay).
//!
//! The search is the Nelder–Mead simplex method of the `argmin` crate, restarted
//! around its best point until a round gains less than 0.1 %. Parameters: the stroke
//! times as a softmax of the total (fixed total) or as logarithms (free total), and
//! the frequency ratio through a logistic map onto (0, 1). Work strokes that break the
//! trap limits, and cycles without a stable limit cycle, rank behind every allowed
//! cycle.

use super::restarted::{Ranked, Search, minimise};
use crate::bath::Bath;
use crate::constants::{BOLTZMANN, HBAR};
use crate::cycle::{OttoCycle, WorkStroke};
use crate::error::{PhysicsError, Result};
use crate::limits::{TrapLimits, limit_excess};
use crate::propagate::PropagationOptions;
use crate::ramp::{ConstantMuRamp, LinearRamp, Ramp, ShortcutRamp};
use std::cell::Cell;
use std::sync::atomic::{AtomicBool, Ordering};

/// Nelder–Mead iterations per restart round.
const ROUND: u64 = 300;

/// The ramp family of both work strokes, at whatever duration the split gives them.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StrokeFamily {
    /// omega linear in time.
    Linear,
    /// Constant adiabatic parameter mu.
    ConstantMu,
    /// Invariant-based shortcut polynomial (frictionless at every duration).
    Shortcut,
    /// Ideal adiabatic strokes that take the given time (the quasi-static limit). Their
    /// time changes nothing but the cycle time, so the power grows without bound as
    /// they shrink: tuning this family needs a stated shortest work-stroke time.
    IdealAdiabatic,
}

impl StrokeFamily {
    /// Name for reports.
    pub fn name(self) -> &'static str {
        match self {
            Self::Linear => "linear",
            Self::ConstantMu => "constant mu",
            Self::Shortcut => "shortcut",
            Self::IdealAdiabatic => "ideal adiabatic",
        }
    }

    /// The work stroke of this family from `from` to `to` (rad/s) taking `time` s.
    pub fn stroke(self, from: f64, to: f64, time: f64) -> Result<WorkStroke> {
        Ok(match self {
            Self::Linear => WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(from, to, time)?)),
            Self::ConstantMu => WorkStroke::Ramp(Ramp::ConstantMu(ConstantMuRamp::with_duration(from, to, time)?)),
            Self::Shortcut => WorkStroke::Ramp(Ramp::Shortcut(ShortcutRamp::new(from, to, time)?)),
            Self::IdealAdiabatic => WorkStroke::IdealAdiabatic { time },
        })
    }
}

/// What to optimise.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CycleTuning {
    /// Ramp family of the work strokes.
    pub family: StrokeFamily,
    /// Keep the total cycle time at this (s, > 0); `None` optimises the total too.
    pub total_time: Option<f64>,
    /// Also optimise omega_c/omega_h (the cold bath keeps its temperature).
    pub vary_ratio: bool,
    /// Limits the work strokes must keep to.
    pub limits: TrapLimits,
    /// Most Nelder–Mead iterations in all (1 to 1e6; default 3,000).
    pub max_iterations: u64,
    /// Shortest time each work stroke may take, s (>= 0; default 0). Required (> 0) for
    /// the ideal adiabatic family, whose optimum otherwise is a zero-time stroke.
    pub min_stroke_time: f64,
}

impl Default for CycleTuning {
    fn default() -> Self {
        Self {
            family: StrokeFamily::Shortcut,
            total_time: None,
            vary_ratio: false,
            limits: TrapLimits::default(),
            max_iterations: 3_000,
            min_stroke_time: 0.0,
        }
    }
}

/// The best cycle found.
#[derive(Debug, Clone, PartialEq)]
pub struct CycleOptimum {
    /// The cycle itself.
    pub cycle: OttoCycle,
    /// Hot contact, expansion, cold contact and compression times, s.
    pub stroke_times: [f64; 4],
    /// Total cycle time, s.
    pub total_time: f64,
    /// omega_c / omega_h.
    pub ratio: f64,
    /// Power of the limit cycle, W (> 0 for an engine).
    pub power_w: f64,
    /// Efficiency at this optimum (an engine only).
    pub efficiency: Option<f64>,
    /// 1 - omega_c/omega_h (ideal Otto efficiency at this ratio).
    pub otto_efficiency: f64,
    /// 1 - sqrt(T_c/T_h) (Curzon–Ahlborn); None for a hot bath at zero temperature.
    pub curzon_ahlborn: Option<f64>,
    /// Power of the start cycle, W.
    pub start_power_w: f64,
    /// Nelder–Mead iterations.
    pub iterations: u64,
    /// Cycle analyses.
    pub evaluations: u64,
}

/// Temperature of a bath from its occupation at its frequency, K.
pub fn bath_temperature(b: &Bath) -> f64 {
    if b.occupation() <= 0.0 { 0.0 } else { HBAR * b.omega() / (BOLTZMANN * (1.0 / b.occupation()).ln_1p()) }
}

struct Problem<'a> {
    template: &'a OttoCycle,
    tuning: &'a CycleTuning,
    cold_temperature: f64,
    opts: &'a PropagationOptions,
    cancel: &'a AtomicBool,
    progress: &'a (dyn Fn(u64, f64) + Sync),
    evaluations: Cell<u64>,
    best: Cell<f64>,
}

fn logistic(x: f64) -> f64 {
    1.0 / (1.0 + (-x).exp())
}

impl Problem<'_> {
    /// Stroke times: the work strokes take the stated minimum plus their share.
    fn times(&self, p: &[f64]) -> [f64; 4] {
        let least = self.tuning.min_stroke_time;
        let [th, te, tc, tk] = match self.tuning.total_time {
            Some(total) => {
                let z = [0.0, p[0], p[1], p[2]];
                let m = z.iter().copied().fold(f64::NEG_INFINITY, f64::max);
                let w = z.map(|v| (v - m).exp());
                let s: f64 = w.iter().sum();
                w.map(|v| (total - 2.0 * least) * v / s)
            }
            None => [p[0].exp(), p[1].exp(), p[2].exp(), p[3].exp()],
        };
        [th, least + te, tc, least + tk]
    }

    fn ratio(&self, p: &[f64]) -> f64 {
        if self.tuning.vary_ratio {
            logistic(p[p.len() - 1])
        } else {
            self.template.cold.omega() / self.template.hot.omega()
        }
    }

    fn cycle(&self, p: &[f64]) -> Result<OttoCycle> {
        let [th, te, tc, tk] = self.times(p);
        let wh = self.template.hot.omega();
        let wc = wh * self.ratio(p);
        let cold = if self.tuning.vary_ratio {
            Bath::with_temperature(wc, self.cold_temperature, self.template.cold.rate())?
        } else {
            self.template.cold
        };
        Ok(OttoCycle {
            hot: self.template.hot,
            hot_time: th,
            expansion: self.tuning.family.stroke(wh, wc, te)?,
            cold,
            cold_time: tc,
            compression: self.tuning.family.stroke(wc, wh, tk)?,
            noise: self.template.noise,
        })
    }

    /// Power (W) of an allowed cycle; Err(rank) for one that is not.
    fn power(&self, c: &OttoCycle) -> Result<std::result::Result<f64, f64>> {
        let mut broken = 0.0;
        for s in [&c.expansion, &c.compression] {
            if let WorkStroke::Ramp(r) = s {
                broken += limit_excess(r, &self.tuning.limits, 201);
            }
        }
        if broken > 0.0 {
            return Ok(Err(broken));
        }
        self.evaluations.set(self.evaluations.get() + 1);
        match c.analyse(self.opts) {
            Ok(report) => Ok(report.figures.map(|f| f.power_w).filter(|p| p.is_finite()).ok_or(0.0)),
            Err(PhysicsError::AccuracyNotReached { .. }) => Ok(Err(0.0)),
            Err(e) => Err(e),
        }
    }
}

impl Ranked for Problem<'_> {
    fn rank(&self, p: &[f64]) -> Result<f64> {
        if self.cancel.load(Ordering::Relaxed) {
            return Err(PhysicsError::Cancelled);
        }
        if p.iter().any(|x| !x.is_finite() || x.abs() > 60.0) {
            return Ok(1e300);
        }
        let Ok(cycle) = self.cycle(p) else {
            return Ok(1e300);
        };
        // Lexicographic: allowed cycles by -power, then unstable ones, then broken limits.
        let cost = match self.power(&cycle)? {
            Ok(power) => -power,
            Err(broken) => 1e200 * (1.0 + broken.min(1e6)),
        };
        if cost < self.best.get() {
            self.best.set(cost);
        }
        (self.progress)(self.evaluations.get(), -self.best.get());
        Ok(cost)
    }
}

/// Optimises the cycle's timing (and ratio) starting from `template`'s stroke times
/// and frequencies. `progress` receives (cycle analyses so far, best power so far, W);
/// setting `cancel` stops with [`PhysicsError::Cancelled`].
pub fn optimise_cycle(
    template: &OttoCycle,
    tuning: &CycleTuning,
    opts: &PropagationOptions,
    progress: &(dyn Fn(u64, f64) + Sync),
    cancel: &AtomicBool,
) -> Result<CycleOptimum> {
    template.validate()?;
    if !(1..=1_000_000).contains(&tuning.max_iterations) {
        return Err(PhysicsError::invalid("iteration limit", tuning.max_iterations, "1 to 1000000"));
    }
    let start_times =
        [template.hot_time, template.expansion.duration(), template.cold_time, template.compression.duration()];
    let start_total: f64 = start_times.iter().sum();
    if let Some(t) = tuning.total_time
        && !(t.is_finite() && t > 0.0)
    {
        return Err(PhysicsError::invalid("total cycle time", t, "a finite number of seconds > 0"));
    }
    if start_total.is_nan() || start_total <= 0.0 {
        return Err(PhysicsError::invalid("start cycle time", start_total, "> 0: give the strokes some time"));
    }
    let least = tuning.min_stroke_time;
    if !(least.is_finite() && least >= 0.0) {
        return Err(PhysicsError::invalid("shortest work-stroke time", least, "a finite number of seconds >= 0"));
    }
    if tuning.family == StrokeFamily::IdealAdiabatic && least == 0.0 {
        return Err(PhysicsError::invalid(
            "shortest work-stroke time",
            "none stated",
            "a time > 0 for ideal adiabatic strokes: their time changes nothing but the cycle time, \
             so the power grows without bound as they shrink and there is no finite optimum",
        ));
    }
    if let Some(t) = tuning.total_time
        && 2.0 * least >= t
    {
        return Err(PhysicsError::invalid(
            "shortest work-stroke time",
            format!("{least:e} s"),
            format!("below half the total cycle time ({t:e} s), leaving time for the baths"),
        ));
    }
    // Start from the template's split (strokes of zero time start at 1 % of the total),
    // less the work strokes' stated minimum.
    let floor = 0.01 * start_total;
    let st = [start_times[0], start_times[1] - least, start_times[2], start_times[3] - least].map(|t| t.max(floor));
    let mut x0: Vec<f64> = match tuning.total_time {
        Some(_) => (1..4).map(|k| (st[k] / st[0]).ln()).collect(),
        None => st.iter().map(|t| t.ln()).collect(),
    };
    if tuning.vary_ratio {
        let r = template.cold.omega() / template.hot.omega();
        if !(r > 0.0 && r < 1.0) {
            return Err(PhysicsError::invalid("omega_c/omega_h", r, "between 0 and 1 to vary the ratio"));
        }
        x0.push((r / (1.0 - r)).ln());
    }
    let problem = Problem {
        template,
        tuning,
        cold_temperature: bath_temperature(&template.cold),
        opts,
        cancel,
        progress,
        evaluations: Cell::new(0),
        best: Cell::new(f64::INFINITY),
    };
    let start_power = problem.power(&problem.cycle(&x0)?)?.unwrap_or(f64::NAN);
    let search =
        Search { step: 0.3, round: ROUND, budget: tuning.max_iterations, target: f64::NEG_INFINITY, min_gain: 1e-3 };
    let (problem, best, iterations) = minimise("cycle optimiser", problem, x0, &search)?;
    let cycle = problem.cycle(&best)?;
    let report = cycle.analyse(opts)?;
    let Some(fig) = report.figures else {
        return Err(PhysicsError::invalid(
            "cycle optimiser",
            "no stable cycle",
            "a start cycle with a stable limit cycle (spectral radius < 1)",
        ));
    };
    let (th, tc) = (bath_temperature(&cycle.hot), bath_temperature(&cycle.cold));
    Ok(CycleOptimum {
        stroke_times: problem.times(&best),
        total_time: report.cycle_time_s,
        ratio: cycle.cold.omega() / cycle.hot.omega(),
        power_w: fig.power_w,
        efficiency: fig.efficiency,
        otto_efficiency: report.otto_efficiency,
        curzon_ahlborn: (th > 0.0).then(|| 1.0 - (tc / th).sqrt()),
        start_power_w: start_power,
        iterations,
        evaluations: problem.evaluations.get(),
        cycle,
    })
}
