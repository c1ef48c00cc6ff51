//! Restarted Nelder–Mead over `Vec<f64>` with the `argmin` crate: rounds of at most
//! `round` iterations, each from a fresh simplex around the best point so far (its
//! size the last round's move), until the target cost is reached, a round gains less
//! than `min_gain` (relative), or the iteration budget is spent.

use crate::error::{PhysicsError, Result};
use argmin::core::{CostFunction, Executor, State};
use argmin::solver::neldermead::NelderMead;
use std::cell::RefCell;

/// A cost to minimise, whose evaluation can fail.
pub(crate) trait Ranked {
    /// The cost of a point (lower is better).
    fn rank(&self, p: &[f64]) -> Result<f64>;
}

/// The argmin cost of a [`Ranked`] problem. argmin's Nelder–Mead unwraps cost errors
/// in its set-up, so this cost never fails: it records the first failure, ranks every
/// point last from then on, and the driver returns the failure after the round.
struct Recorder<P> {
    inner: P,
    failure: RefCell<Option<PhysicsError>>,
}

impl<P: Ranked> CostFunction for Recorder<P> {
    type Param = Vec<f64>;
    type Output = f64;

    fn cost(&self, p: &Vec<f64>) -> std::result::Result<f64, argmin::core::Error> {
        if self.failure.borrow().is_some() {
            return Ok(f64::MAX);
        }
        Ok(self.inner.rank(p).unwrap_or_else(|e| {
            *self.failure.borrow_mut() = Some(e);
            f64::MAX
        }))
    }
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
pub(crate) fn minimise<P: Ranked>(what: &str, problem: P, x0: Vec<f64>, s: &Search) -> Result<(P, Vec<f64>, u64)> {
    let n = x0.len();
    let mut best = x0;
    let mut best_cost = f64::INFINITY;
    let mut iterations = 0;
    let mut step = s.step;
    let mut problem = Recorder { inner: problem, failure: RefCell::new(None) };
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
        if let Some(e) = problem.failure.borrow_mut().take() {
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
    Ok((problem.inner, best, iterations))
}
