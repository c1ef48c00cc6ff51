//! Restarted Nelder–Mead over `Vec<f64>` with the `argmin` crate: rounds of at most
//! `round` iterations, each from a fresh simplex around the best point so far (its
//! size the last round's move), until the target cost is reached, a round gains less
//! than `min_gain` (relative), or the iteration budget is spent.

use crate::error::{PhysicsError, Result};
use argmin::core::{CostFunction, Executor, State};
use argmin::solver::neldermead::NelderMead;

/// A cost whose evaluation can fail. argmin's Nelder–Mead unwraps cost errors in its
/// set-up, so the cost itself never fails: it records the reason, ranks the point
/// last, and the driver returns the reason after the round.
pub(crate) trait Recorded: CostFunction<Param = Vec<f64>, Output = f64> {
    /// The recorded failure, if any (taken).
    fn take_failure(&self) -> Option<PhysicsError>;
}

/// How to search.
pub(crate) struct Search {
    /// Simplex edge of the first round.
    pub step: f64,
    /// Iterations per round.
    pub round: u64,
    /// Iterations in all.
    pub budget: u64,
    /// Stop once the best cost is at or below this.
    pub target: f64,
    /// Stop when a round lowers the best cost by less than this fraction of it.
    pub min_gain: f64,
}

fn internal(what: &str, e: &dyn std::fmt::Display) -> PhysicsError {
    PhysicsError::invalid(what, e.to_string(), "a working Nelder–Mead set-up (internal error)")
}

/// Runs the search from `x0`; returns the problem back, the best point and the
/// iterations spent.
pub(crate) fn minimise<P: Recorded>(what: &str, problem: P, x0: Vec<f64>, s: &Search) -> Result<(P, Vec<f64>, u64)> {
    let n = x0.len();
    let mut best = x0;
    let mut best_cost = f64::INFINITY;
    let mut iterations = 0;
    let mut step = s.step;
    let mut problem = problem;
    while iterations < s.budget {
        let mut simplex = vec![best.clone()];
        for k in 0..n {
            let mut v = best.clone();
            v[k] += step;
            simplex.push(v);
        }
        let solver = NelderMead::new(simplex).with_sd_tolerance(0.0).map_err(|e| internal(what, &e))?;
        let round = s.round.min(s.budget - iterations);
        let result = Executor::new(problem, solver)
            .configure(|st| st.max_iters(round).target_cost(s.target))
            .run()
            .map_err(|e| internal(what, &e))?;
        iterations += result.state().get_iter();
        let cost = result.state().get_best_cost();
        let param = result.state().get_best_param().cloned();
        problem = result.problem.problem.ok_or_else(|| internal(what, &"the optimiser lost its problem"))?;
        if let Some(e) = problem.take_failure() {
            return Err(e);
        }
        let gained = best_cost.is_infinite() || cost < best_cost - s.min_gain * best_cost.abs();
        if cost < best_cost
            && let Some(p) = param
        {
            step = p.iter().zip(&best).map(|(a, b)| (a - b).abs()).fold(s.step * 1e-4, f64::max).min(s.step);
            best = p;
            best_cost = cost;
        }
        if best_cost <= s.target || !gained {
            break;
        }
    }
    Ok((problem, best, iterations))
}
