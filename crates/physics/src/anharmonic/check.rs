//! The anharmonic check of one axis: a thermal mixture of the initial well's levels
//! propagated by split-step Fourier through the ramp, compared with the final well's
//! levels.

use super::grid::{Grid, GridNeeds};
use super::harmonic::{HarmonicView, harmonic_view};
use super::levels::{BoxLevels, box_levels, box_reach};
use super::problem::{Axis, AxisProblem, CheckSettings};
use super::report::{AxisCheck, DensityMap, WellPicture};
use super::split_step::{DensityFrames, Level, Step, propagate};
use super::well::Profile;
use crate::constants::HBAR;
use crate::error::{PhysicsError, Result};
use rayon::prelude::*;
use rustfft::num_complex::Complex64;
use std::fmt::Write as _;

/// Neglected thermal weight allowed.
const NEGLECTED_WEIGHT: f64 = 1e-12;
/// Most levels a mixture may have.
const MAX_LEVELS: usize = 400;
/// Coarsest step: this fraction of 1/omega_max (Strang's error ~ (omega dt)², so
/// about 1 % there; the extrapolation takes it down).
const COARSE_STEP: f64 = 0.2;
/// At least this many steps over the ramp at the coarsest level.
const MIN_STEPS: f64 = 16.0;
/// Most step halvings.
const MAX_HALVINGS: u32 = 9;
/// Grid refinement factor (extent and momentum range), and most refinements.
const GRID_REFINEMENT: f64 = 1.25;
const MAX_GRID_REFINEMENTS: usize = 3;
/// Extra levels diagonalised at the start, to see the thermal tail.
const TAIL_LEVELS: usize = 6;
/// Bins of the density map in x (frames in t are about as many).
const DENSITY_BINS: usize = 200;
/// Points of each potential curve.
const CURVE_POINTS: usize = 401;

/// The check's reduced units and the axis in them.
struct Context<'a> {
    axis: Axis<'a>,
    profile: Profile,
    /// omega_axis(0), rad/s; x0 = sqrt(hbar/(m omega_ref)), m.
    omega_ref: f64,
    x0: f64,
    /// (omega_axis(t_f)/omega_ref)².
    end_w2: f64,
    /// kT / (hbar omega_ref), 0 for the ground state.
    kt: f64,
    harmonic: HarmonicView,
    settings: CheckSettings,
}

/// One grid with the levels it starts and ends with.
struct Setup {
    grid: Grid,
    /// g(x) on the grid.
    g: Vec<f64>,
    start: BoxLevels,
    end: BoxLevels,
    populations: Vec<f64>,
}

/// What one propagation gives: [energy_ratio - 1, ground fidelity] and the loss.
#[derive(Debug, Clone, Copy)]
struct Figures {
    values: [f64; 2],
    lost: f64,
}

/// Checks one axis through its ramp (see the module documentation of
/// [`crate::anharmonic`]). `progress` is told the fraction done (0 to 1) now and then
/// and returns false to cancel, which gives [`PhysicsError::Cancelled`].
pub fn check_axis(
    problem: &AxisProblem,
    settings: &CheckSettings,
    progress: &mut dyn FnMut(f64) -> bool,
) -> Result<AxisCheck> {
    let ctx = Context::new(problem, settings)?;
    let count = ctx.level_count()?;
    let mut scale = settings.grid_scale;
    let mut base = ctx.setup(count, scale)?;
    let coarse = ctx.steps(0);
    let levels = base.populations.len();
    let planned = (coarse.len() * levels) as f64 * (1.0 + GRID_REFINEMENT.powi(2) + 63.0);
    let mut done = 0.0;
    let mut report = |work: f64| progress((work / planned).min(0.99));

    // Grid: compare with a larger one at the coarsest step, refining while they differ.
    let mut on_base = ctx.run(&base, &coarse, None, &mut |k| report(done + (k * levels) as f64))?;
    done += (coarse.len() * levels) as f64;
    let mut grid_error = f64::INFINITY;
    for _ in 0..=MAX_GRID_REFINEMENTS {
        let finer = ctx.setup(count, scale * GRID_REFINEMENT)?;
        let weight = finer.grid.n as f64 / base.grid.n as f64;
        let on_finer = ctx.run(&finer, &coarse, None, &mut |k| report(done + weight * (k * levels) as f64))?;
        done += weight * (coarse.len() * levels) as f64;
        grid_error = difference(&on_base, &on_finer);
        if grid_error <= 0.5 * settings.target_accuracy {
            break;
        }
        base = finer;
        on_base = on_finer;
        scale *= GRID_REFINEMENT;
    }

    // Steps: halve and extrapolate (Romberg's table on the even error series).
    let mut table: Vec<Vec<[f64; 2]>> = vec![vec![on_base.values]];
    let mut finest = on_base;
    let mut step_error = f64::INFINITY;
    let mut frames = None;
    let mut halvings = 0;
    for i in 1..=MAX_HALVINGS {
        let steps = ctx.steps(i);
        let mut f = settings.keep_density.then(|| DensityFrames::new(&base.grid, DENSITY_BINS));
        finest = ctx.run(&base, &steps, f.as_mut(), &mut |k| report(done + (k * levels) as f64))?;
        done += (steps.len() * levels) as f64;
        frames = f;
        halvings = i;
        table.push(romberg_row(&table[table.len() - 1], finest.values));
        let (last, prev) = (&table[table.len() - 1], &table[table.len() - 2]);
        step_error = difference_values(last[last.len() - 1], prev[prev.len() - 1]);
        if i >= 2 && step_error <= 0.5 * settings.target_accuracy {
            break;
        }
    }
    let best = table[table.len() - 1][table.len() - 1];
    progress(1.0);
    Ok(ctx.report(&base, &Outcome { best, lost: finest.lost, step_error, grid_error, halvings, frames }))
}

/// One propagation without extrapolation or grid check (for studying the solver's
/// convergence): the figures of the mixture after Strang steps of 2^`halvings` times the
/// coarsest count, on the automatically chosen grid times `settings.grid_scale`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StrangRun {
    /// energy_ratio - 1 (see [`AxisCheck::energy_ratio_minus_one`]).
    pub energy_ratio_minus_one: f64,
    /// Ground-state fidelity (see [`AxisCheck::ground_fidelity`]).
    pub ground_fidelity: f64,
    /// 1 - surviving norm, weighted over the mixture.
    pub lost_fraction: f64,
    /// Time steps taken.
    pub time_steps: usize,
    /// Grid points.
    pub grid_points: usize,
}

/// Propagates the mixture once with Strang steps of 2^`halvings` (at most 12) times the
/// coarsest count; see [`StrangRun`].
pub fn strang_run(problem: &AxisProblem, settings: &CheckSettings, halvings: u32) -> Result<StrangRun> {
    if halvings > 12 {
        return Err(PhysicsError::invalid("step halvings", halvings, "0 to 12"));
    }
    let ctx = Context::new(problem, settings)?;
    let setup = ctx.setup(ctx.level_count()?, ctx.settings.grid_scale)?;
    let steps = ctx.steps(halvings);
    let f = ctx.run(&setup, &steps, None, &mut |_| true)?;
    Ok(StrangRun {
        energy_ratio_minus_one: f.values[0],
        ground_fidelity: f.values[1],
        lost_fraction: f.lost,
        time_steps: steps.len(),
        grid_points: setup.grid.n,
    })
}

/// The next row of Romberg's table: R[i][j] = R[i][j-1] + (R[i][j-1] - R[i-1][j-1])/(4^j - 1).
fn romberg_row(prev: &[[f64; 2]], fresh: [f64; 2]) -> Vec<[f64; 2]> {
    let mut row = vec![fresh];
    let mut factor = 1.0;
    for p in prev {
        factor *= 4.0;
        let r = row[row.len() - 1];
        row.push([r[0] + (r[0] - p[0]) / (factor - 1.0), r[1] + (r[1] - p[1]) / (factor - 1.0)]);
    }
    row
}

fn difference_values(a: [f64; 2], b: [f64; 2]) -> f64 {
    (a[0] - b[0]).abs().max((a[1] - b[1]).abs())
}

fn difference(a: &Figures, b: &Figures) -> f64 {
    difference_values(a.values, b.values)
}

/// The extrapolated figures and how they were reached.
struct Outcome {
    best: [f64; 2],
    lost: f64,
    step_error: f64,
    grid_error: f64,
    halvings: u32,
    frames: Option<DensityFrames>,
}

/// The number of levels whose neglected thermal weight is below 1e-12, from the
/// level energies (ascending; the tail past the last is taken geometric with the last
/// spacing); `None` if the list is too short to tell.
fn thermal_count(energies: &[f64], kt: f64) -> Option<usize> {
    if kt <= 0.0 {
        return Some(1);
    }
    let len = energies.len();
    if len < 3 {
        return None;
    }
    let w: Vec<f64> = energies.iter().map(|e| (-(e - energies[0]) / kt).exp()).collect();
    let q = (-(energies[len - 1] - energies[len - 2]) / kt).exp();
    let beyond = w[len - 1] * q / (1.0 - q);
    let total: f64 = w.iter().sum::<f64>() + beyond;
    let mut tail = total;
    for n in 1..len - 1 {
        tail -= w[n - 1];
        // Summed afresh: the running difference would cancel.
        let exact_tail = w[n..].iter().sum::<f64>() + beyond;
        if exact_tail.min(tail) <= NEGLECTED_WEIGHT * total {
            return Some(n);
        }
    }
    None
}

impl<'a> Context<'a> {
    fn new(problem: &AxisProblem<'a>, settings: &CheckSettings) -> Result<Self> {
        let settings = settings.validated()?;
        let axis = Axis::new(problem)?;
        let omega_ref = axis.omega_start;
        let x0 = (HBAR / (axis.mass * omega_ref)).sqrt();
        let profile = Profile::new(axis.well, x0);
        if let Some(l) = profile.length()
            && !(l.is_finite() && l > 1e-3 && l < 1e6)
        {
            let name = if matches!(profile, Profile::Gaussian(_)) { "waist" } else { "Rayleigh range" };
            return Err(PhysicsError::invalid(
                name,
                format!("{:e} m ({l:e} oscillator lengths)", l * x0),
                "between 1e-3 and 1e6 oscillator lengths sqrt(hbar/(m omega_axis(0)))",
            ));
        }
        let end_w2 = (axis.omega_end / omega_ref).powi(2);
        let n = axis.occupation;
        let kt = if n > 0.0 { 1.0 / (1.0 / n).ln_1p() } else { 0.0 };
        let harmonic = harmonic_view(&axis)?;
        Ok(Self { axis, profile, omega_ref, x0, end_w2, kt, harmonic, settings })
    }

    /// Reduced w² at both ends.
    fn ends(&self) -> [(f64, &'static str); 2] {
        [(1.0, "start"), (self.end_w2, "end")]
    }

    /// How many levels the mixture needs, refusing a state the well does not bind.
    fn level_count(&self) -> Result<usize> {
        let n = self.axis.occupation;
        // The harmonic estimate: weight q^n beyond n levels, q = N/(N+1).
        let estimate = if n > 0.0 {
            let q = n / (n + 1.0);
            (NEGLECTED_WEIGHT.ln() / q.ln()).ceil().max(1.0) as usize
        } else {
            1
        };
        if estimate > MAX_LEVELS {
            return Err(self.unbound(estimate, None, "start"));
        }
        // An optical well binds only so many: refuse before building a grid for them.
        for (w2, when) in self.ends() {
            if let Some(u) = self.profile.depth_factor().map(|d| d * w2) {
                let bound = self.profile.wkb_count(w2, u - w2.sqrt());
                if estimate > bound {
                    return Err(self.unbound(estimate, Some(bound), when));
                }
            }
        }
        let mut cap = estimate;
        loop {
            let (start, _) = self.start_levels(cap + TAIL_LEVELS, self.settings.grid_scale)?;
            if let Some(count) = thermal_count(&start.energies, self.kt) {
                return Ok(count);
            }
            if cap >= MAX_LEVELS {
                return Err(self.unbound(cap, None, "start"));
            }
            cap = (cap * 3 / 2 + TAIL_LEVELS).min(MAX_LEVELS);
        }
    }

    /// The refusal of a thermal state that is not bound, with its numbers.
    fn unbound(&self, levels: usize, bound: Option<usize>, when: &str) -> PhysicsError {
        let w2 = if when == "end" { self.end_w2 } else { 1.0 };
        let w = w2.sqrt();
        let top = levels as f64 - 0.5;
        let depth = self.profile.depth_factor().map(|d| d * w2 / w);
        let mut text = format!(
            "the thermal state is not bound in this well: it needs about {levels} levels (the highest \
             near {top:.1} hbar omega by the harmonic estimate)"
        );
        if let Some(u) = depth {
            let _ = write!(text, ", but the {when} well is {u:.1} hbar omega deep");
        }
        if let Some(b) = bound {
            let _ = write!(text, " and binds {b} levels at least 1 hbar omega below its edge");
        }
        if levels > MAX_LEVELS {
            let _ = write!(text, " (at most {MAX_LEVELS} levels are propagated)");
        }
        PhysicsError::invalid("occupation", self.axis.occupation, text)
    }

    /// The refusal after diagonalising: level `top` lies within 1 hbar omega of the edge.
    fn check_bound(&self, levels: &BoxLevels, count: usize, w2: f64, when: &str) -> Result<()> {
        let Some(u) = self.profile.depth_factor().map(|d| d * w2) else { return Ok(()) };
        let w = w2.sqrt();
        let top = levels.energies[count - 1];
        if top > u - w {
            return Err(PhysicsError::invalid(
                "occupation",
                self.axis.occupation,
                format!(
                    "the thermal state is not bound in this well: it needs {count} levels, the highest \
                     at {:.2} hbar omega, but the {when} well is {:.2} hbar omega deep (every level must \
                     lie at least 1 hbar omega below the edge)",
                    top / w,
                    u / w
                ),
            ));
        }
        Ok(())
    }

    fn grid(&self, count: usize, scale: f64) -> Grid {
        let reach = self
            .ends()
            .iter()
            .map(|&(w2, _)| box_reach(self.profile, w2, count + TAIL_LEVELS, f64::INFINITY))
            .filter(|r| r.is_finite())
            .fold(0.0, f64::max);
        let needs = GridNeeds {
            levels: count,
            sigma_x: self.harmonic.sigma_x,
            sigma_p: self.harmonic.sigma_p,
            reach,
            scale,
            absorbing: self.settings.absorbing_edges,
        };
        Grid::new(&needs, self.profile)
    }

    fn levels_on(&self, grid: &Grid, w2: f64, count: usize) -> Result<BoxLevels> {
        let cap = grid.max_half() as f64 * grid.dx;
        let half = ((box_reach(self.profile, w2, count, cap) / grid.dx).ceil() as usize).min(grid.max_half());
        box_levels(self.profile, w2, grid.dx, half, count.min(2 * half))
    }

    fn start_levels(&self, count: usize, scale: f64) -> Result<(BoxLevels, Grid)> {
        let grid = self.grid(count, scale);
        Ok((self.levels_on(&grid, 1.0, count)?, grid))
    }

    /// The grid for `count` levels with their start and end eigenstates.
    fn setup(&self, count: usize, scale: f64) -> Result<Setup> {
        let (start, grid) = self.start_levels(count + TAIL_LEVELS, scale)?;
        if start.energies.len() < count {
            return Err(PhysicsError::invalid("levels", count, "fewer than the grid holds"));
        }
        self.check_bound(&start, count, 1.0, "start")?;
        let end = self.levels_on(&grid, self.end_w2, count)?;
        if end.energies.len() < count {
            return Err(PhysicsError::invalid("levels", count, "fewer than the grid holds"));
        }
        self.check_bound(&end, count, self.end_w2, "end")?;
        let weights: Vec<f64> = if self.kt > 0.0 {
            start.energies[..count].iter().map(|e| (-(e - start.energies[0]) / self.kt).exp()).collect()
        } else {
            vec![1.0]
        };
        let z: f64 = weights.iter().sum();
        let populations = weights.iter().map(|w| w / z).collect();
        let g = grid.x.iter().map(|&x| self.profile.g(x)).collect();
        Ok(Setup { grid, g, start, end, populations })
    }

    /// The steps of the propagation with 2^halvings times the coarsest count, landing on
    /// the pieces' ends.
    fn steps(&self, halvings: u32) -> Vec<Step> {
        let w_max = self.axis.max.0.abs().max(self.axis.min.0.abs()).sqrt().max(self.axis.omega_start);
        let tau = self.axis.duration();
        let dt = (COARSE_STEP / w_max).min(tau / MIN_STEPS);
        let mut steps = Vec::new();
        let mut prev = 0.0;
        let factor = 1_usize << halvings;
        for end in self.axis.pieces() {
            let len = end - prev;
            if len <= 0.0 {
                continue;
            }
            let n = ((len / dt).ceil().max(1.0) as usize) * factor;
            let h = len / n as f64;
            let inv = 1.0 / (self.omega_ref * self.omega_ref);
            steps.extend(
                (0..n).map(|k| Step { h: h * self.omega_ref, w2: self.axis.omega2(prev + (k as f64 + 0.5) * h) * inv }),
            );
            prev = end;
        }
        steps
    }

    /// Propagates the mixture of `setup` through `steps` and measures it.
    fn run(
        &self,
        setup: &Setup,
        steps: &[Step],
        frames: Option<&mut DensityFrames>,
        progress: &mut dyn FnMut(usize) -> bool,
    ) -> Result<Figures> {
        let grid = &setup.grid;
        let count = setup.populations.len();
        let mut levels: Vec<Level> =
            setup.start.vectors[..count].iter().map(|v| Level::new(grid.embed(v), grid)).collect();
        propagate(grid, &setup.g, steps, &mut levels, frames, progress)?;
        let phi0 = grid.embed(&setup.end.vectors[0]);
        let measured: Vec<(f64, f64)> = levels
            .par_iter()
            .enumerate()
            .map(|(n, level)| excess_and_norm(grid, &setup.g, self.end_w2, setup.end.energies[n], level))
            .collect();
        let mut excess = 0.0;
        let mut reference = 0.0;
        let mut lost = 0.0;
        for (n, &(de, norm)) in measured.iter().enumerate() {
            let p = setup.populations[n];
            excess += p * de;
            reference += p * setup.end.energies[n];
            lost += p * (1.0 - norm);
        }
        let overlap: Complex64 = phi0.iter().zip(&levels[0].psi).map(|(a, b)| a.conj() * b).sum();
        Ok(Figures { values: [excess / reference, overlap.norm_sqr()], lost })
    }

    fn report(&self, setup: &Setup, outcome: &Outcome) -> AxisCheck {
        let Outcome { best, lost, step_error, grid_error, halvings, ref frames } = *outcome;
        let hw = HBAR * self.omega_ref;
        let error_estimate = step_error.max(grid_error);
        let q1 = self.harmonic.q_star_minus_one;
        let ratio_minus_one = best[0];
        let depth = self.profile.depth_factor();
        let min_depth_quanta = depth.map(|d| d * self.axis.min.0.max(0.0).sqrt() / self.omega_ref);
        let bound_levels_final =
            depth.map(|d| self.profile.wkb_count(self.end_w2, d * self.end_w2 - self.end_w2.sqrt()));
        let count = setup.populations.len();
        let density = frames.as_ref().map(|f| DensityMap {
            times_s: f.times.iter().map(|t| t / self.omega_ref).collect(),
            x_m: f.x.iter().map(|x| x * self.x0).collect(),
            density_per_m: f.rows.iter().map(|r| r.iter().map(|d| d / self.x0).collect()).collect(),
        });
        AxisCheck {
            energy_ratio: 1.0 + ratio_minus_one,
            energy_ratio_minus_one: ratio_minus_one,
            ground_fidelity: best[1].clamp(0.0, 1.0),
            harmonic_q_star: 1.0 + q1,
            harmonic_q_star_minus_one: q1,
            min_depth_quanta,
            levels: count,
            lost_fraction: lost.max(0.0),
            bound_levels_final,
            error_estimate,
            step_error,
            grid_error,
            accuracy_reached: error_estimate <= self.settings.target_accuracy,
            pass: ratio_minus_one.abs() <= self.settings.tolerance && lost < self.settings.loss_bound,
            tolerance: self.settings.tolerance,
            loss_bound: self.settings.loss_bound,
            populations: setup.populations.clone(),
            grid_points: setup.grid.n,
            grid_spacing_m: setup.grid.dx * self.x0,
            time_steps: self.steps(halvings).len(),
            step_halvings: halvings,
            start: self.picture(setup, &setup.start, 1.0, 0.0, count, hw),
            end: self.picture(setup, &setup.end, self.end_w2, self.axis.duration(), count, hw),
            density,
        }
    }

    fn picture(&self, setup: &Setup, levels: &BoxLevels, w2: f64, t: f64, count: usize, hw: f64) -> WellPicture {
        let inner = setup.grid.inner;
        let x: Vec<f64> =
            (0..CURVE_POINTS).map(|k| -inner + 2.0 * inner * k as f64 / (CURVE_POINTS - 1) as f64).collect();
        WellPicture {
            time_s: t,
            omega_rad_s: w2.sqrt() * self.omega_ref,
            depth_j: self.profile.depth_factor().map(|d| d * w2 * hw),
            x_m: x.iter().map(|x| x * self.x0).collect(),
            potential_j: x.iter().map(|&x| w2 * self.profile.g(x) * hw).collect(),
            levels_j: levels.energies[..count].iter().map(|e| e * hw).collect(),
        }
    }
}

/// <psi|H_f - E|psi>/<psi|psi> and <psi|psi> of a propagated level, with the kinetic
/// part from the spectrum (Parseval with the unnormalised FFT: sum |psi_k|² = n sum |psi_j|²).
fn excess_and_norm(grid: &Grid, g: &[f64], w2: f64, e: f64, level: &Level) -> (f64, f64) {
    let psi = &level.psi;
    let norm: f64 = psi.iter().map(Complex64::norm_sqr).sum();
    let potential: f64 = psi.iter().zip(g).map(|(p, &gx)| p.norm_sqr() * (w2 * gx - e)).sum();
    let mut spectrum = psi.clone();
    let mut scratch = grid.scratch();
    grid.forward.process_with_scratch(&mut spectrum, &mut scratch);
    let kinetic: f64 =
        spectrum.iter().zip(&grid.kinetic).map(|(p, &k2)| p.norm_sqr() * k2).sum::<f64>() / grid.n as f64;
    ((kinetic + potential) / norm, norm)
}
