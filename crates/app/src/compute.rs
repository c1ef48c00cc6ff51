//! The per-frame recompute: every candidate evaluated by the physics crate, the cycle
//! analysed, and the plot series prepared once so the plots only borrow them.

use crate::units::DisplayScale;
use egui_plot::PlotPoint;
use quenchless_physics::axes::{AxisReport, evaluate_axes};
use quenchless_physics::constants::HBAR;
use quenchless_physics::cycle::CycleReport;
use quenchless_physics::diagnostics::{Evaluation, EvaluationSettings, Verdict, evaluate};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_physics::ramp::{Ramp, RampShape};
use quenchless_profile::Study;
use quenchless_profile::convert;

/// Accuracy of one recompute.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quality {
    /// Trajectory samples per candidate (>= 2).
    pub samples: usize,
    /// Relative propagation accuracy.
    pub accuracy: f64,
    /// Step budget of one propagation. The recompute runs on the UI thread, so a ramp
    /// that needs more (very many trap periods) is reported as an error instead of
    /// freezing the window; the headless `eval` has the physics crate's full budget.
    pub max_steps: usize,
}

impl Quality {
    /// While a knot or handle is being dragged: fast enough for every frame.
    pub const LIVE: Self = Self { samples: 300, accuracy: 1e-9, max_steps: 1_000_000 };
    /// Once the pointer is released: denser curves and tighter accuracy.
    pub const SETTLED: Self = Self { samples: 801, accuracy: 1e-10, max_steps: 1_000_000 };

    /// The propagation options of this quality.
    pub fn propagation(self) -> Result<PropagationOptions, String> {
        let opts = PropagationOptions::with_accuracy(self.accuracy).map_err(|e| e.to_string())?;
        Ok(PropagationOptions { max_steps: self.max_steps, ..opts })
    }
}

/// A curve broken into pieces where its quantity is undefined (omega² <= 0).
pub type Curve = Vec<Vec<PlotPoint>>;

/// Plot-ready series of one candidate, x in display time units.
#[derive(Debug, Clone, Default)]
pub struct CandidateSeries {
    /// omega(t) in display units where omega² > 0.
    pub omega: Curve,
    /// sign(omega²) sqrt|omega²| over the stretches where omega² <= 0.
    pub inverted: Curve,
    /// H/(hbar omega).
    pub energy: Curve,
    /// L/(hbar omega).
    pub l: Curve,
    /// C/(hbar omega).
    pub c: Curve,
    /// sqrt(L² + C²)/H.
    pub coherence: Curve,
    /// |K/K(0) - 1|.
    pub casimir_drift: Curve,
    /// Friction energy in quanta.
    pub friction: Curve,
    /// mu(t).
    pub mu: Curve,
    /// Instantaneous power in hbar omega_i per display time unit (or per 1/omega_i).
    pub power: Curve,
    /// X omega_i / hbar.
    pub x_moment: Curve,
    /// Y / (hbar omega_i).
    pub y_moment: Curve,
    /// D / hbar.
    pub d_moment: Curve,
}

/// Everything computed for one candidate.
#[derive(Debug, Clone)]
pub struct CandidateOutcome {
    /// The physics ramp.
    pub ramp: Ramp,
    /// Report and trajectory.
    pub evaluation: Evaluation,
    /// Plot series.
    pub series: CandidateSeries,
    /// Every further axis of the study's trap model (empty for one axis), by the
    /// physics crate's axis evaluation.
    pub other_axes: Vec<AxisReport>,
}

impl CandidateOutcome {
    /// The verdict of the whole trap (the worst axis's) and that axis's name when it is
    /// not the reference axis.
    pub fn trap_verdict(&self) -> (Verdict, Option<&str>) {
        let reference = self.evaluation.report.verdict();
        let rank = |v: Verdict| match v {
            Verdict::Pass => 0,
            Verdict::Fail => 1,
            Verdict::BreaksLimits => 2,
        };
        let mut worst = (reference, None, self.evaluation.report.q_star_minus_one);
        for a in &self.other_axes {
            let v = a.report.verdict();
            if rank(v) > rank(worst.0) || rank(v) == rank(worst.0) && a.report.q_star_minus_one > worst.2 {
                worst = (v, Some(a.name.as_str()), a.report.q_star_minus_one);
            }
        }
        (worst.0, worst.1)
    }

    /// The trap verdict in words: "FAIL (axial axis)" or "PASS".
    pub fn trap_verdict_words(&self) -> String {
        match self.trap_verdict() {
            (v, Some(axis)) => format!("{} ({axis} axis)", v.word()),
            (v, None) => v.word().to_string(),
        }
    }
}

/// Results of one recompute of a study.
#[derive(Debug, Clone)]
pub struct StudyResults {
    /// Scale the series were built with.
    pub scale: DisplayScale,
    /// One entry per candidate, in study order; an error names the bad field.
    pub candidates: Vec<Result<CandidateOutcome, String>>,
    /// The cycle, when the study has one.
    pub cycle: Option<Result<CycleReport, String>>,
    /// A problem with the study's shared settings (limits, noise, tolerance).
    pub setup_error: Option<String>,
}

fn push(curve: &mut Curve, open: &mut bool, x: f64, y: Option<f64>) {
    match y {
        Some(y) if y.is_finite() => {
            if !*open {
                curve.push(Vec::new());
                *open = true;
            }
            if let Some(last) = curve.last_mut() {
                last.push(PlotPoint::new(x, y));
            }
        }
        _ => *open = false,
    }
}

/// Builds the plot series of an evaluation.
pub fn series_of(evaluation: &Evaluation, scale: &DisplayScale) -> CandidateSeries {
    let mut s = CandidateSeries::default();
    let mut open = [false; 13];
    let wi = scale.omega_i;
    let power_scale = if scale.dimensionless { 1.0 / (HBAR * wi * wi) } else { scale.seconds_per_unit / (HBAR * wi) };
    let traj = &evaluation.trajectory;
    for (k, p) in traj.iter().enumerate() {
        let x = scale.x(p.t);
        // Inverted stretches keep their neighbours so the dashed piece meets the curve.
        let near_inversion = p.omega2 <= 0.0
            || traj.get(k + 1).is_some_and(|q| q.omega2 <= 0.0)
            || k > 0 && traj.get(k - 1).is_some_and(|q| q.omega2 <= 0.0);
        let curves: [(&mut Curve, Option<f64>); 13] = [
            (&mut s.omega, p.omega.map(|w| scale.y(w))),
            (&mut s.inverted, near_inversion.then(|| scale.signed_y(p.omega2))),
            (&mut s.energy, p.energy_quanta),
            (&mut s.l, p.l_quanta),
            (&mut s.c, p.c_quanta),
            (&mut s.coherence, p.coherence_ratio),
            (&mut s.casimir_drift, Some(p.casimir_drift)),
            (&mut s.friction, p.friction_quanta),
            (&mut s.mu, p.mu),
            (&mut s.power, Some(p.power_w * power_scale)),
            (&mut s.x_moment, Some(p.moments.x * wi / HBAR)),
            (&mut s.y_moment, Some(p.moments.y / (HBAR * wi))),
            (&mut s.d_moment, Some(p.moments.d / HBAR)),
        ];
        for ((curve, y), o) in curves.into_iter().zip(open.iter_mut()) {
            push(curve, o, x, y);
        }
    }
    s
}

/// The evaluation settings of a study at a quality.
pub fn settings_of(study: &Study, quality: Quality) -> Result<EvaluationSettings, String> {
    let limits = convert::limits(&study.trap).map_err(|e| e.to_string())?;
    let noise = convert::noise(&study.noise).map_err(|e| e.to_string())?;
    let propagation = quality.propagation()?;
    if !(study.tolerance.is_finite() && study.tolerance > 0.0 && study.tolerance < 1.0) {
        return Err(format!("tolerance = {} is not allowed: a number in (0, 1)", study.tolerance));
    }
    // Limits are checked on a grid five times the trajectory's (rows and hold starts of
    // sampled and piecewise ramps are always added by the physics crate).
    Ok(EvaluationSettings {
        tolerance: study.tolerance,
        samples: quality.samples.max(2),
        propagation,
        limits,
        noise,
        limit_samples: 5 * quality.samples.max(2),
    })
}

/// The first end figure of a report that is not a finite number, if any (the app shows
/// an error instead of a NaN).
pub fn non_finite_figure(r: &quenchless_physics::RampReport) -> Option<(&'static str, f64)> {
    [
        ("Q*", r.q_star),
        ("final coherence ratio", r.final_coherence_ratio),
        ("final energy", r.final_energy_quanta),
        ("work", r.work_quanta),
        ("friction work", r.friction_work_quanta),
        ("Casimir drift", r.casimir_drift),
        ("min omega²", r.min_omega2),
        ("max omega²", r.max_omega2),
        ("peak energy", r.peak_energy_quanta),
        ("duration", r.duration_s),
        ("initial entropy", r.entropy_initial),
        ("final entropy", r.entropy_final),
    ]
    .into_iter()
    .find(|(_, v)| !v.is_finite())
}

/// Evaluates one candidate of a study.
pub fn evaluate_candidate(
    study: &Study,
    index: usize,
    settings: &EvaluationSettings,
    scale: &DisplayScale,
) -> Result<CandidateOutcome, String> {
    let c = study.candidates.get(index).ok_or_else(|| format!("no candidate number {index}"))?;
    let ramp = convert::candidate_ramp(c, index).map_err(|e| e.to_string())?;
    let initial = convert::initial_state(&study.initial_state, ramp.omega_initial()).map_err(|e| e.to_string())?;
    let evaluation = evaluate(&ramp, &initial, settings).map_err(|e| {
        let hint = if matches!(e, quenchless_physics::PhysicsError::AccuracyNotReached { .. }) {
            " (the window recomputes on every change and allows that many steps; a ramp of this many trap \
             periods can be checked with `quenchless eval`)"
        } else {
            ""
        };
        format!("candidates[{index}] \"{}\": {e}{hint}", c.name)
    })?;
    if let Some((name, v)) = non_finite_figure(&evaluation.report) {
        return Err(format!(
            "candidates[{index}] \"{}\": the evaluation gave {name} = {v}, so no figures are shown; \
             the ramp is outside what the propagator handles (check its duration and frequencies)",
            c.name
        ));
    }
    let series = series_of(&evaluation, scale);
    let model = convert::trap_model(&study.trap).map_err(|e| e.to_string())?;
    let other_axes = if model.is_multi_axis() {
        let n0 = convert::reference_occupation(&study.initial_state, ramp.omega_initial(), &model)
            .map_err(|e| e.to_string())?;
        let axes: Vec<_> = model.trap_axes().into_iter().skip(1).collect();
        let light = EvaluationSettings { samples: 64, ..*settings };
        evaluate_axes(&ramp, n0, &axes, &light).map_err(|e| format!("candidates[{index}] \"{}\": {e}", c.name))?
    } else {
        Vec::new()
    };
    Ok(CandidateOutcome { ramp, evaluation, series, other_axes })
}

/// Analyses the study's cycle, if any.
pub fn analyse_cycle(study: &Study, quality: Quality) -> Option<Result<CycleReport, String>> {
    let spec = study.cycle.as_ref()?;
    Some((|| {
        let cycle = convert::cycle(study, spec).map_err(|e| e.to_string())?;
        let opts = quality.propagation()?;
        cycle.analyse(&opts).map_err(|e| format!("cycle: {e}"))
    })())
}

/// The whole per-frame recompute of a study.
pub fn compute(study: &Study, quality: Quality) -> StudyResults {
    compute_reusing(study, quality, None)
}

#[expect(clippy::float_cmp, reason = "a cached result is reused only for exactly the same inputs")]
fn same_shared(a: &Study, b: &Study) -> bool {
    a.trap == b.trap
        && a.initial_state == b.initial_state
        && a.noise == b.noise
        && a.tolerance == b.tolerance
        && a.display == b.display
}

/// The recompute of a study, reusing the results of candidates that did not change
/// since `previous` (while a knot is dragged only one candidate changes per frame).
pub fn compute_reusing(
    study: &Study,
    quality: Quality,
    previous: Option<(&Study, Quality, &StudyResults)>,
) -> StudyResults {
    let scale = DisplayScale::new(&study.display, study.trap.start_frequency_hz);
    let reusable = previous.filter(|(s, q, _)| *q == quality && same_shared(s, study));
    let (candidates, setup_error) = match settings_of(study, quality) {
        Ok(settings) => (
            (0..study.candidates.len())
                .map(|i| {
                    let old = reusable.and_then(|(s, _, r)| {
                        let j = s
                            .candidates
                            .iter()
                            .position(|c| c.ramp == study.candidates[i].ramp && c.name == study.candidates[i].name)?;
                        r.candidates.get(j).cloned()
                    });
                    old.unwrap_or_else(|| evaluate_candidate(study, i, &settings, &scale))
                })
                .collect(),
            None,
        ),
        Err(e) => (study.candidates.iter().map(|_| Err(format!("not evaluated: {e}"))).collect(), Some(e)),
    };
    let cycle = match reusable {
        Some((s, _, r)) if s.cycle == study.cycle && cycle_inputs(s) == cycle_inputs(study) => r.cycle.clone(),
        _ => analyse_cycle(study, quality),
    };
    StudyResults { scale, candidates, cycle, setup_error }
}

/// The candidates a cycle uses, by name.
fn cycle_inputs(study: &Study) -> Vec<&quenchless_profile::CandidateRamp> {
    use quenchless_profile::StrokeSpec;
    let Some(c) = &study.cycle else { return Vec::new() };
    [&c.expansion, &c.compression]
        .into_iter()
        .filter_map(|s| match s {
            StrokeSpec::Candidate(n) => study.candidate(n),
            _ => None,
        })
        .collect()
}

/// Caches the results of the latest study and recomputes only when it changed, and
/// then only the candidates that changed.
#[derive(Debug, Default)]
pub struct ResultCache {
    /// The study last computed, its revision and the quality.
    key: Option<(Study, u64, Quality)>,
    results: Option<StudyResults>,
    /// Number of recomputes so far (for tests and the status line).
    pub recomputes: u64,
    /// Duration of the latest recompute, s.
    pub last_seconds: f64,
}

impl ResultCache {
    /// Results of `study` (at the document's `revision`) at `quality`, recomputed only
    /// when the revision or the quality changed (no comparison of studies).
    pub fn get(&mut self, study: &Study, revision: u64, quality: Quality) -> &StudyResults {
        let stale = !matches!(&self.key, Some((_, r, q)) if *r == revision && *q == quality);
        if stale || self.results.is_none() {
            let start = std::time::Instant::now();
            let previous = match (&self.key, &self.results) {
                (Some((s, _, q)), Some(r)) => Some((s, *q, r)),
                _ => None,
            };
            let fresh = compute_reusing(study, quality, previous);
            self.results = Some(fresh);
            self.last_seconds = start.elapsed().as_secs_f64();
            self.key = Some((study.clone(), revision, quality));
            self.recomputes += 1;
        }
        self.results.get_or_insert_with(|| compute(study, quality))
    }

    /// The latest results, if any.
    pub fn latest(&self) -> Option<&StudyResults> {
        self.results.as_ref()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reuse_gives_the_same_figures_as_a_full_recompute() {
        let mut s = crate::demo::demo_study();
        let first = compute(&s, Quality::LIVE);
        if let quenchless_profile::study::RampSpec::Spline { knots, .. } = &mut s.candidates[2].ramp {
            knots[2].frequency_hz *= 1.1;
        }
        let reused = compute_reusing(&s, Quality::LIVE, Some((&crate::demo::demo_study(), Quality::LIVE, &first)));
        let full = compute(&s, Quality::LIVE);
        for (a, b) in reused.candidates.iter().zip(&full.candidates) {
            let (a, b) = (a.as_ref().expect("ok"), b.as_ref().expect("ok"));
            assert_eq!(a.evaluation.report, b.evaluation.report);
        }
        let q = |r: &StudyResults| r.candidates[2].as_ref().expect("ok").evaluation.report.q_star;
        assert!((q(&first) - q(&full)).abs() > 1e-12, "the moved knot changed Q*");
    }
}
