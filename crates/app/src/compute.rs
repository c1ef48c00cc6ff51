//! The per-frame recompute: every candidate evaluated by the physics crate, the cycle
//! analysed, and the plot series prepared once so the plots only borrow them.
//!
//! A long ramp (many trap periods, or a long table) would hold up the window, so the
//! frame draws it from a coarse propagation ([`Quality::PREVIEW`]) and evaluates it on
//! the exact path on a worker; its end figures and verdict appear only from that exact
//! evaluation, never from the preview (see [`CandidateResult::Refining`]).

use crate::units::DisplayScale;
use egui_plot::PlotPoint;
use quenchless_physics::axes::{AxisReport, evaluate_axes};
use quenchless_physics::constants::HBAR;
use quenchless_physics::cycle::CycleReport;
use quenchless_physics::diagnostics::{Evaluation, EvaluationSettings, Verdict, evaluate};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_physics::ramp::{Ramp, RampShape, SampledReading};
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
    /// The curves of a long ramp while its exact evaluation runs on a worker: a coarse
    /// propagation (the curves agree with the exact ones to about 1e-4, below a pixel),
    /// drawn only; no figure or verdict is ever taken from it. Its step budget keeps it
    /// near 10 ms (about 180 ns a step here); a longer ramp is drawn by omega(t) alone
    /// until the exact evaluation arrives.
    pub const PREVIEW: Self = Self { samples: 300, accuracy: 1e-4, max_steps: 60_000 };
    /// The exact evaluation of a long ramp on the worker: the settled quality with the
    /// physics crate's whole step budget (the window does not wait for it).
    pub const EXACT_OFF_THREAD: Self =
        Self { samples: 801, accuracy: 1e-10, max_steps: quenchless_physics::propagate::DEFAULT_MAX_STEPS };

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

/// What a frame has of one candidate.
#[derive(Debug, Clone)]
pub enum CandidateResult {
    /// Evaluated on the exact path: curves, end figures and verdict.
    Ready(Box<CandidateOutcome>),
    /// A long ramp whose exact evaluation runs on a worker. Only its curves from a
    /// coarse propagation are here, for drawing (`None` when even that would take too
    /// long); Q*, every end figure and the verdict wait for the exact evaluation.
    Refining(Option<Box<CandidateSeries>>),
    /// Cannot be evaluated: why, naming the field.
    Failed(String),
}

impl CandidateResult {
    /// The exact outcome, when it is there.
    pub fn ready(&self) -> Option<&CandidateOutcome> {
        match self {
            Self::Ready(o) => Some(o),
            _ => None,
        }
    }

    /// The curves to draw: the exact ones, or a long ramp's preview.
    pub fn series(&self) -> Option<&CandidateSeries> {
        match self {
            Self::Ready(o) => Some(&o.series),
            Self::Refining(s) => s.as_deref(),
            Self::Failed(_) => None,
        }
    }

    /// Why the candidate cannot be evaluated, if it cannot.
    pub fn error(&self) -> Option<&str> {
        match self {
            Self::Failed(e) => Some(e),
            _ => None,
        }
    }

    /// Whether the exact evaluation is still running.
    pub fn is_refining(&self) -> bool {
        matches!(self, Self::Refining(_))
    }

    /// The verdict words of the list and tables: the trap verdict, "computing" while a
    /// long ramp is evaluated, "CANNOT EVALUATE" for an error.
    pub fn verdict_words(&self) -> String {
        match self {
            Self::Ready(o) => o.trap_verdict_words(),
            Self::Refining(_) => COMPUTING.to_string(),
            Self::Failed(_) => "CANNOT EVALUATE".to_string(),
        }
    }
}

impl From<Result<CandidateOutcome, String>> for CandidateResult {
    fn from(r: Result<CandidateOutcome, String>) -> Self {
        match r {
            Ok(o) => Self::Ready(Box::new(o)),
            Err(e) => Self::Failed(e),
        }
    }
}

/// The verdict word of a long ramp whose exact evaluation is still running.
pub const COMPUTING: &str = "computing…";

/// Results of one recompute of a study.
#[derive(Debug, Clone)]
pub struct StudyResults {
    /// Scale the series were built with.
    pub scale: DisplayScale,
    /// One entry per candidate, in study order.
    pub candidates: Vec<CandidateResult>,
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
        let windows_budget = settings.propagation.max_steps < quenchless_physics::propagate::DEFAULT_MAX_STEPS;
        let hint = if windows_budget && matches!(e, quenchless_physics::PhysicsError::AccuracyNotReached { .. }) {
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

/// Adaptive Magnus steps per trap period at the settled accuracy (1e-10): 474,513 steps
/// for the 4,200 periods of a 35 ms shortcut from 120 kHz to 30 kHz (measured).
const STEPS_PER_PERIOD: f64 = 113.0;

/// Held rows and holds cost an exact step each, about a tenth of an adaptive step with
/// its error estimate (measured: 20 ns against 156 ns).
const HELD_ROWS_PER_STEP: f64 = 10.0;

/// A rough count of the adaptive steps the exact propagation of a ramp takes: trap
/// periods at its highest frequency times [`STEPS_PER_PERIOD`], at least one step a
/// row for a table read linearly; held rows and holds at a tenth; a constant-mu ramp
/// without noise is a closed form. Noise (a numerical 3x3 propagation) counts double.
pub fn estimated_steps(ramp: &Ramp, noisy: bool) -> f64 {
    let (max_omega2, _) = ramp.max_omega2();
    let periods = ramp.duration() * max_omega2.abs().sqrt() / quenchless_physics::constants::TWO_PI;
    let smooth = STEPS_PER_PERIOD * periods;
    let steps = match ramp {
        Ramp::Axis(a) => estimated_steps(a.base(), noisy).max(smooth),
        Ramp::ConstantMu(_) if !noisy => 0.0,
        Ramp::PiecewiseConstant(p) => p.segments().len() as f64 / HELD_ROWS_PER_STEP,
        Ramp::Sampled(s) if s.reading() == SampledReading::Hold => s.times().len() as f64 / HELD_ROWS_PER_STEP,
        Ramp::Sampled(s) => smooth.max(s.times().len() as f64),
        _ => smooth,
    };
    if noisy { 2.0 * steps } else { steps }
}

/// How many times fewer steps the preview's accuracy takes than the settled one:
/// 474,513 against 31,350 for the 35 ms shortcut (measured).
const PREVIEW_SAVING: f64 = 15.0;

/// Above this many [`estimated_steps`] a ramp is evaluated on a worker while the frame
/// draws its preview: about 4 ms of exact propagation at 156 ns a step (the `long
/// ramp` benchmark of `crates/app/benches/frame.rs`).
pub const LONG_RAMP_STEPS: f64 = 25_000.0;

/// Whether candidate `index` of `study` is evaluated off the UI thread.
fn is_long(study: &Study, index: usize) -> bool {
    let noisy = convert::noise(&study.noise).is_ok_and(|n| !n.is_silent());
    study
        .candidates
        .get(index)
        .and_then(|c| convert::candidate_ramp(c, index).ok())
        .is_some_and(|r| estimated_steps(&r, noisy) > LONG_RAMP_STEPS)
}

/// The coarse curves of a long ramp (drawing only): a coarse propagation, or the trap
/// frequency alone where that would be no quicker than the exact one (held rows and
/// holds are exact steps; a table read linearly takes a step a row) or would take too
/// long. No moment is shown that was not propagated.
pub fn preview_series(study: &Study, index: usize, scale: &DisplayScale) -> Option<CandidateSeries> {
    let settings = settings_of(study, Quality::PREVIEW).ok()?;
    let c = study.candidates.get(index)?;
    let ramp = convert::candidate_ramp(c, index).ok()?;
    let base = match &ramp {
        Ramp::Axis(a) => a.base(),
        r => r,
    };
    let noisy = convert::noise(&study.noise).is_ok_and(|n| !n.is_silent());
    let coarse_helps = match base {
        Ramp::PiecewiseConstant(_) => false,
        Ramp::Sampled(s) => s.reading() != SampledReading::Hold && s.times().len() < Quality::PREVIEW.max_steps / 2,
        _ => estimated_steps(&ramp, noisy) / PREVIEW_SAVING < Quality::PREVIEW.max_steps as f64,
    };
    let initial = convert::initial_state(&study.initial_state, ramp.omega_initial()).ok()?;
    match coarse_helps.then(|| evaluate(&ramp, &initial, &settings)) {
        Some(Ok(evaluation)) => Some(series_of(&evaluation, scale)),
        _ => Some(trap_series(&ramp, settings.samples, scale)),
    }
}

/// The trap frequency of a ramp as plot series, with its inverted stretches.
fn trap_series(ramp: &Ramp, samples: usize, scale: &DisplayScale) -> CandidateSeries {
    let mut s = CandidateSeries::default();
    let (mut open_omega, mut open_inverted) = (false, false);
    let times = ramp.grid_with_breakpoints(samples);
    let w2: Vec<f64> = times.iter().map(|&t| ramp.omega2(t)).collect();
    for (k, (&t, &omega2)) in times.iter().zip(&w2).enumerate() {
        let near_inversion = omega2 <= 0.0
            || w2.get(k + 1).is_some_and(|&q| q <= 0.0)
            || k > 0 && w2.get(k - 1).is_some_and(|&q| q <= 0.0);
        let x = scale.x(t);
        push(&mut s.omega, &mut open_omega, x, (omega2 > 0.0).then(|| scale.y(omega2.sqrt())));
        push(&mut s.inverted, &mut open_inverted, x, near_inversion.then(|| scale.signed_y(omega2)));
    }
    s
}

/// The whole per-frame recompute of a study, every candidate on the exact path on this
/// thread (the headless use: tests, benchmarks, figure files).
pub fn compute(study: &Study, quality: Quality) -> StudyResults {
    let scale = DisplayScale::new(&study.display, study.trap.start_frequency_hz);
    let (candidates, setup_error) = match settings_of(study, quality) {
        Ok(settings) => (
            (0..study.candidates.len()).map(|i| evaluate_candidate(study, i, &settings, &scale).into()).collect(),
            None,
        ),
        Err(e) => {
            (study.candidates.iter().map(|_| CandidateResult::Failed(format!("not evaluated: {e}"))).collect(), Some(e))
        }
    };
    StudyResults { scale, candidates, cycle: analyse_cycle(study, quality), setup_error }
}

#[expect(clippy::float_cmp, reason = "a cached result is reused only for exactly the same inputs")]
fn same_physics(a: &Study, b: &Study) -> bool {
    a.trap == b.trap && a.initial_state == b.initial_state && a.noise == b.noise && a.tolerance == b.tolerance
}

fn same_shared(a: &Study, b: &Study) -> bool {
    same_physics(a, b) && a.display == b.display
}

/// Exact results of long ramps, kept by what they depend on: the study's physical
/// settings, the candidate's name and its ramp (the display units only redraw them).
#[derive(Debug, Default)]
struct ExactStore {
    entries: std::collections::VecDeque<(Study, String, quenchless_profile::study::RampSpec, CandidateResult)>,
}

impl ExactStore {
    /// Long-ramp results kept, the most recently used first (an undo or redo finds the
    /// ones before it).
    const KEPT: usize = 32;

    fn position(&self, study: &Study, index: usize) -> Option<usize> {
        let c = study.candidates.get(index)?;
        self.entries.iter().position(|(s, n, r, _)| *n == c.name && *r == c.ramp && same_physics(s, study))
    }

    /// The result of candidate `index`, its curves redrawn for `scale` when the display
    /// units changed since it was computed.
    fn find(&self, study: &Study, index: usize, scale: &DisplayScale) -> Option<CandidateResult> {
        let (s, _, _, r) = &self.entries[self.position(study, index)?];
        Some(match r {
            CandidateResult::Ready(o) if s.display != study.display => {
                let mut o = o.clone();
                o.series = series_of(&o.evaluation, scale);
                CandidateResult::Ready(o)
            }
            r => r.clone(),
        })
    }

    /// Marks the result of candidate `index` as just used.
    fn touch(&mut self, study: &Study, index: usize) {
        if let Some(k) = self.position(study, index).filter(|&k| k > 0)
            && let Some(e) = self.entries.remove(k)
        {
            self.entries.push_front(e);
        }
    }

    fn insert(&mut self, study: &Study, index: usize, result: CandidateResult) {
        let Some(c) = study.candidates.get(index) else { return };
        if self.position(study, index).is_some() {
            return;
        }
        let shared = Study { candidates: Vec::new(), cycle: None, generator: None, ..study.clone() };
        self.entries.push_front((shared, c.name.clone(), c.ramp.clone(), result));
        self.entries.truncate(Self::KEPT);
    }
}

/// The recompute of a study, reusing the results of candidates that did not change
/// since `previous` (while a knot is dragged only one candidate changes per frame).
/// A long ramp gets its exact result from `exact` when it was computed before, else
/// [`CandidateResult::Refining`] with its preview (when `exact` is given; without it
/// every candidate is evaluated here).
fn compute_reusing_with(
    study: &Study,
    quality: Quality,
    previous: Option<(&Study, Quality, &StudyResults)>,
    exact: Option<&ExactStore>,
) -> StudyResults {
    let scale = DisplayScale::new(&study.display, study.trap.start_frequency_hz);
    let reusable = previous.filter(|(s, q, _)| *q == quality && same_shared(s, study));
    let (candidates, setup_error) = match settings_of(study, quality) {
        Ok(settings) => (
            (0..study.candidates.len())
                .map(|i| {
                    // The same candidate in the previous results, if they were drawn alike.
                    let same = |(s, _, r): (&Study, Quality, &StudyResults)| {
                        let c = &study.candidates[i];
                        let j = s.candidates.iter().position(|o| o.ramp == c.ramp && o.name == c.name)?;
                        r.candidates.get(j).cloned()
                    };
                    // An unchanged candidate's result is taken as it was (the common case
                    // while another candidate is dragged: nothing is converted again).
                    let drawn_alike = previous.filter(|(s, _, _)| same_shared(s, study)).and_then(same);
                    match (&drawn_alike, exact) {
                        // A long ramp's preview: its exact result if it arrived meanwhile.
                        (Some(o @ CandidateResult::Refining(_)), Some(store)) => {
                            return store.find(study, i, &scale).unwrap_or_else(|| o.clone());
                        }
                        (Some(o), _) if !o.is_refining() && reusable.is_some() => return o.clone(),
                        _ => {}
                    }
                    if let Some(store) = exact
                        && is_long(study, i)
                    {
                        // The exact result if known, else a new preview.
                        return store.find(study, i, &scale).unwrap_or_else(|| {
                            CandidateResult::Refining(preview_series(study, i, &scale).map(Box::new))
                        });
                    }
                    evaluate_candidate(study, i, &settings, &scale).into()
                })
                .collect(),
            None,
        ),
        Err(e) => {
            (study.candidates.iter().map(|_| CandidateResult::Failed(format!("not evaluated: {e}"))).collect(), Some(e))
        }
    };
    let cycle = match reusable {
        Some((s, _, r)) if s.cycle == study.cycle && cycle_inputs(s) == cycle_inputs(study) => r.cycle.clone(),
        _ => analyse_cycle(study, quality),
    };
    StudyResults { scale, candidates, cycle, setup_error }
}

/// The recompute of a study on this thread, reusing the results of candidates that did
/// not change since `previous` (while a knot is dragged only one candidate changes per
/// frame).
pub fn compute_reusing(
    study: &Study,
    quality: Quality,
    previous: Option<(&Study, Quality, &StudyResults)>,
) -> StudyResults {
    compute_reusing_with(study, quality, previous, None)
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

/// The exact evaluations of long ramps of one study snapshot, on a worker.
type Refinement = crate::worker::Job<Vec<(usize, CandidateResult)>>;

/// Evaluates the long candidates `indices` of `study` on the exact path, with the
/// physics crate's whole step budget.
fn refine(study: &Study, indices: &[usize], progress: &crate::worker::Progress) -> Vec<(usize, CandidateResult)> {
    let scale = DisplayScale::new(&study.display, study.trap.start_frequency_hz);
    let settings = settings_of(study, Quality::EXACT_OFF_THREAD);
    indices
        .iter()
        .enumerate()
        // A worker nobody waits for (the window closed) stops between ramps.
        .take_while(|_| !progress.cancelled())
        .map(|(k, &i)| {
            progress.set(k);
            let r = match &settings {
                Ok(s) => evaluate_candidate(study, i, s, &scale).into(),
                Err(e) => CandidateResult::Failed(format!("not evaluated: {e}")),
            };
            (i, r)
        })
        .collect()
}

/// Caches the results of the latest study and recomputes only when it changed, and
/// then only the candidates that changed. Long ramps are evaluated on one worker at a
/// time: the latest study's, once the worker is free.
#[derive(Debug, Default)]
pub struct ResultCache {
    /// The study last computed, its revision and the quality.
    key: Option<(Study, u64, Quality)>,
    results: Option<StudyResults>,
    /// Number of recomputes so far (for tests and the status line).
    pub recomputes: u64,
    /// Duration of the latest recompute, s.
    pub last_seconds: f64,
    exact: ExactStore,
    /// The worker evaluating long ramps, with the study and the candidates it was given.
    refinement: Option<(Study, Vec<usize>, Refinement)>,
    /// Asked to repaint when the worker is done (the window's context).
    repaint: Option<egui::Context>,
}

impl ResultCache {
    /// Makes a finished long-ramp evaluation repaint the window.
    pub fn set_repaint(&mut self, ctx: &egui::Context) {
        if self.repaint.is_none() {
            self.repaint = Some(ctx.clone());
        }
    }

    /// Results of `study` (at the document's `revision`) at `quality`, recomputed only
    /// when the revision or the quality changed (no comparison of studies). Long ramps
    /// may come back [`CandidateResult::Refining`]; call this every frame so their
    /// exact results are collected and the next ones started.
    pub fn get(&mut self, study: &Study, revision: u64, quality: Quality) -> &StudyResults {
        let stale = !matches!(&self.key, Some((_, r, q)) if *r == revision && *q == quality);
        if stale || self.results.is_none() {
            let start = std::time::Instant::now();
            let previous = match (&self.key, &self.results) {
                (Some((s, _, q)), Some(r)) => Some((s, *q, r)),
                _ => None,
            };
            let fresh = compute_reusing_with(study, quality, previous, Some(&self.exact));
            self.results = Some(fresh);
            self.last_seconds = start.elapsed().as_secs_f64();
            self.key = Some((study.clone(), revision, quality));
            self.recomputes += 1;
            for i in 0..study.candidates.len() {
                self.exact.touch(study, i);
            }
        }
        self.pump(study, quality);
        self.results.get_or_insert_with(|| compute(study, quality))
    }

    /// Like [`get`](Self::get) at the settled quality, waiting up to `patience` for the
    /// exact evaluation of every long ramp (on its worker): for files and figures,
    /// which must describe exact results.
    ///
    /// # Errors
    /// When a long ramp's exact evaluation takes longer than `patience`: which ramps,
    /// and that the evaluation goes on.
    pub fn get_exact(
        &mut self,
        study: &Study,
        revision: u64,
        patience: std::time::Duration,
    ) -> Result<&StudyResults, String> {
        let start = std::time::Instant::now();
        loop {
            self.get(study, revision, Quality::SETTLED);
            let waiting = self.refining();
            if waiting.is_empty() {
                break;
            }
            if start.elapsed() >= patience {
                let names: Vec<String> = waiting
                    .iter()
                    .filter_map(|&i| study.candidates.get(i))
                    .map(|c| format!("\"{}\"", c.name))
                    .collect();
                return Err(format!(
                    "the exact evaluation of {} (a long ramp) is still running; try again once the list shows its \
                     verdict",
                    names.join(", ")
                ));
            }
            std::thread::sleep(std::time::Duration::from_millis(5));
        }
        self.results.as_ref().ok_or_else(|| "nothing was evaluated".to_string())
    }

    /// Indices of the candidates whose exact evaluation is still to come.
    fn refining(&self) -> Vec<usize> {
        self.results.as_ref().map_or_else(Vec::new, |r| {
            r.candidates.iter().enumerate().filter(|(_, c)| c.is_refining()).map(|(i, _)| i).collect()
        })
    }

    /// Puts the exact results now known into the latest results.
    fn patch(&mut self, study: &Study) {
        let Some(results) = self.results.as_mut() else { return };
        for (i, c) in results.candidates.iter_mut().enumerate() {
            if c.is_refining()
                && let Some(r) = self.exact.find(study, i, &results.scale)
            {
                *c = r;
            }
        }
    }

    /// Collects a finished worker and starts the next one for what is still refining;
    /// none is started while a handle is dragged (`quality` LIVE), so the worker never
    /// spends itself on a shape the pointer has already left.
    fn pump(&mut self, study: &Study, quality: Quality) {
        if let Some((snapshot, indices, job)) = &mut self.refinement
            && let Some(done) = job.poll()
        {
            match done {
                Ok(done) => {
                    for (i, r) in done {
                        self.exact.insert(snapshot, i, r);
                    }
                }
                // A worker that failed is not started again for the same ramps: they
                // say why instead of computing for ever.
                Err(e) => {
                    for &i in indices.iter() {
                        self.exact.insert(
                            snapshot,
                            i,
                            CandidateResult::Failed(format!("exact evaluation stopped: {e}")),
                        );
                    }
                }
            }
            self.refinement = None;
            self.patch(study);
        }
        let waiting = self.refining();
        if self.refinement.is_none() && !waiting.is_empty() && quality != Quality::LIVE {
            let snapshot = study.clone();
            let theirs = snapshot.clone();
            let given = waiting.clone();
            let job = crate::worker::Job::start("exact-long-ramps", waiting.len(), self.repaint.clone(), move |p| {
                Ok(refine(&theirs, &given, p))
            });
            // A worker that cannot start leaves the ramps refining; the next frame tries again.
            if let Ok(job) = job {
                self.refinement = Some((snapshot, waiting, job));
            }
        }
    }

    /// Whether a long ramp's exact evaluation is running (the status line says so).
    pub fn is_refining(&self) -> bool {
        self.refinement.is_some()
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
            let (a, b) = (a.ready().expect("ok"), b.ready().expect("ok"));
            assert_eq!(a.evaluation.report, b.evaluation.report);
        }
        let q = |r: &StudyResults| r.candidates[2].ready().expect("ok").evaluation.report.q_star;
        assert!((q(&first) - q(&full)).abs() > 1e-12, "the moved knot changed Q*");
    }

    /// A study whose second candidate is long: a 35 ms shortcut from 120 kHz to 30 kHz
    /// (4,200 trap periods at the start frequency).
    fn with_long_ramp() -> Study {
        use quenchless_profile::study::RampSpec;
        let mut s = crate::demo::demo_study();
        s.candidates[1].ramp = RampSpec::Shortcut { from_hz: 120e3, to_hz: 30e3, duration_s: 35e-3 };
        s
    }

    /// Waits (up to a minute) until the cache has no long ramp left to evaluate.
    fn settle(cache: &mut ResultCache, study: &Study, revision: u64, quality: Quality) -> StudyResults {
        let start = std::time::Instant::now();
        loop {
            let r = cache.get(study, revision, quality).clone();
            if !r.candidates.iter().any(CandidateResult::is_refining) {
                return r;
            }
            assert!(start.elapsed().as_secs() < 60, "the long ramp's exact evaluation never arrived");
            std::thread::sleep(std::time::Duration::from_millis(5));
        }
    }

    #[test]
    fn a_long_ramp_shows_no_figure_until_its_exact_evaluation_on_the_worker() {
        let study = with_long_ramp();
        assert!(is_long(&study, 1) && !is_long(&study, 0), "the rule picks the 35 ms ramp alone");
        let mut cache = ResultCache::default();
        // While a handle is dragged no worker starts.
        let dragged = cache.get(&study, 1, Quality::LIVE).clone();
        assert!(dragged.candidates[1].is_refining() && !cache.is_refining());
        let first = cache.get(&study, 1, Quality::SETTLED).clone();
        assert!(cache.is_refining(), "released: the worker starts");
        // The frame has the preview's curves and nothing else: no Q*, no verdict.
        let CandidateResult::Refining(Some(preview)) = &first.candidates[1] else {
            panic!("the long ramp is refined on the worker, with a preview to draw")
        };
        assert!(first.candidates[1].ready().is_none());
        assert_eq!(first.candidates[1].verdict_words(), COMPUTING);
        assert!(first.candidates[0].ready().is_some(), "short ramps are exact at once");
        // The worker's result is the exact path's, identical to evaluating the ramp on
        // this thread with the same settings, and it does not depend on the frame's
        // quality.
        let settled = settle(&mut cache, &study, 1, Quality::SETTLED);
        let exact = settled.candidates[1].ready().expect("exact");
        let settings = settings_of(&study, Quality::EXACT_OFF_THREAD).expect("settings");
        let scale = DisplayScale::new(&study.display, study.trap.start_frequency_hz);
        let headless = evaluate_candidate(&study, 1, &settings, &scale).expect("evaluates");
        assert_eq!(exact.evaluation.report, headless.evaluation.report);
        // Chen et al., PRL 104, 063002 (2010): the invariant-based shortcut ends
        // energy-diagonal, so Q* - 1 sits at the propagation's floor.
        assert!(exact.evaluation.report.q_star_minus_one.abs() < 1e-9, "{}", exact.evaluation.report.q_star_minus_one);
        // The preview draws what the exact path draws, far below a pixel: at the same
        // times, the energy curve agrees to 1e-4 of its range.
        let same_times = EvaluationSettings { samples: Quality::PREVIEW.samples, ..settings };
        let exact_there = evaluate_candidate(&study, 1, &same_times, &scale).expect("evaluates");
        let pick = |c: &Curve| c.iter().flatten().map(|p| (p.x, p.y)).collect::<Vec<_>>();
        let (pe, ee) = (pick(&preview.energy), pick(&exact_there.series.energy));
        assert_eq!(pe.len(), ee.len());
        let range = ee.iter().map(|p| p.1).fold(0.0_f64, f64::max);
        for ((x, y), (xe, ye)) in pe.iter().zip(&ee) {
            assert!((x - xe).abs() <= 1e-12 * xe.abs());
            assert!((y - ye).abs() < 1e-4 * range, "energy at t = {x}: {y} vs {ye}");
        }
        // A later frame at another quality, an undo to this study or a drag elsewhere
        // finds the exact result again without a new worker.
        let again = cache.get(&study, 2, Quality::LIVE).clone();
        assert_eq!(again.candidates[1].ready().expect("kept").evaluation.report, headless.evaluation.report);
        assert!(!cache.is_refining());
        // Other display units redraw the kept result without evaluating it again.
        let mut in_ms = study.clone();
        in_ms.display.time = quenchless_profile::study::TimeUnit::Ms;
        let redrawn = cache.get(&in_ms, 3, Quality::SETTLED).clone();
        let o = redrawn.candidates[1].ready().expect("kept across display units");
        assert_eq!(o.evaluation.report, headless.evaluation.report);
        let last_x = o.series.omega.iter().flatten().last().expect("a curve").x;
        assert!((last_x - 35.0).abs() < 1e-9, "the curve is in ms now: ends at {last_x}");
        assert!(!cache.is_refining());
    }

    #[test]
    fn files_and_figures_wait_for_the_exact_evaluation() {
        let study = with_long_ramp();
        // From an empty cache, and with the worker already running (it is waited for).
        for started in [false, true] {
            let mut cache = ResultCache::default();
            if started {
                cache.get(&study, 1, Quality::SETTLED);
                assert!(cache.is_refining());
            }
            let r = cache.get_exact(&study, 1, std::time::Duration::from_mins(1)).expect("in time").clone();
            assert!(r.candidates.iter().all(|c| !c.is_refining()), "every ramp exact before a file is written");
            assert!(r.candidates[1].ready().is_some());
        }
        // Without patience the figure is refused, naming the ramp.
        let mut cache = ResultCache::default();
        let e = cache.get_exact(&study, 1, std::time::Duration::ZERO).expect_err("still running");
        assert!(e.contains(&format!("\"{}\"", study.candidates[1].name)) && e.contains("still running"), "{e}");
    }

    #[test]
    fn a_ramp_too_long_even_for_a_preview_is_drawn_by_its_trap_frequency_alone() {
        use quenchless_profile::study::RampSpec;
        let mut study = crate::demo::demo_study();
        // 3.5 s at up to 120 kHz: 420,000 periods, far beyond the preview's budget.
        study.candidates[1].ramp = RampSpec::Shortcut { from_hz: 120e3, to_hz: 30e3, duration_s: 3.5 };
        let scale = DisplayScale::new(&study.display, study.trap.start_frequency_hz);
        let s = preview_series(&study, 1, &scale).expect("a preview");
        assert!(s.energy.is_empty() && s.friction.is_empty(), "no moment that was not propagated");
        let omega: Vec<_> = s.omega.iter().flatten().collect();
        assert_eq!(omega.len(), Quality::PREVIEW.samples);
        // The shortcut's ends: 120 kHz and 30 kHz in the display unit (kHz).
        assert!((omega[0].y - 120.0).abs() < 1e-9 && (omega[omega.len() - 1].y - 30.0).abs() < 1e-9);
    }

    /// What counts as long follows the cost of the exact path: a held table of 20,001
    /// rows (exact steps, well under a millisecond) stays on the frame; a million held
    /// rows go to the worker and are previewed by the trap frequency alone, as a
    /// coarse propagation of exact steps would be no quicker.
    #[test]
    fn held_tables_are_long_only_when_their_rows_are_many() {
        use quenchless_physics::ramp::{SampledColumn, SampledRamp};
        let table = |n: usize| {
            let t: Vec<f64> = (0..n).map(|k| 20e-6 * k as f64 / (n - 1) as f64).collect();
            let w: Vec<f64> =
                t.iter().map(|&x| (quenchless_physics::constants::TWO_PI * (120e3 - 4.5e9 * x)).powi(2)).collect();
            Ramp::Sampled(SampledRamp::new(t, w, SampledColumn::Omega2, SampledReading::Hold).expect("a table"))
        };
        assert!(estimated_steps(&table(20_001), false) < LONG_RAMP_STEPS);
        assert!(estimated_steps(&table(1_000_001), false) > LONG_RAMP_STEPS);
        // The 35 ms shortcut of the other tests is long; the demo's 20 µs ramps are not.
        let study = with_long_ramp();
        assert!(is_long(&study, 1));
        assert!((0..study.candidates.len()).filter(|&i| i != 1).all(|i| !is_long(&study, i)));
    }
}
