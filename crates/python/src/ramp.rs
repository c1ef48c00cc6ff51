//! `quenchless.Ramp`: a designed ramp or a study's candidate, to evaluate, sample,
//! play and export.

use crate::arrays::to_numpy;
use crate::errors::{Failure, guarded};
use crate::evaluate::{self, Columns};
use crate::job;
use crate::json::to_python;
use crate::playing::{self, GeneratorArgs, Judging, Origin};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use quenchless_physics::{Ramp, RampShape};
use quenchless_profile::Study;
use quenchless_profile::header::CAUTION;
use std::fmt::Write as _;
use std::path::PathBuf;
use std::sync::Arc;

/// A study's candidate: the study, its file and the candidate's index.
#[derive(Debug, Clone)]
pub struct InStudy {
    /// The study as loaded.
    pub study: Arc<Study>,
    /// Its file.
    pub path: PathBuf,
    /// Index of the candidate.
    pub index: usize,
}

/// A trap-frequency ramp omega(t): a design (``design_shortcut`` and its kin) or a
/// candidate of a study (``load_study(path)["name"]``). Times in s, omega in rad/s,
/// omega² in (rad/s)².
#[pyclass(module = "quenchless", name = "Ramp", frozen)]
pub struct PyRamp {
    pub(crate) ramp: Ramp,
    pub(crate) origin: Origin,
    pub(crate) in_study: Option<InStudy>,
}

impl PyRamp {
    /// A designed ramp (no study).
    pub fn designed(ramp: Ramp, name: &str) -> Self {
        Self { ramp, origin: Origin::designed(name), in_study: None }
    }
}

#[pymethods]
impl PyRamp {
    /// Candidate or design name.
    #[getter]
    fn name(&self) -> String {
        self.origin.name.clone()
    }

    /// Family key (``shortcut``, ``constant-mu``, ``holds``, ``sampled``, ...).
    #[getter]
    fn family(&self) -> &'static str {
        self.ramp.family_name()
    }

    /// Designed duration, s.
    #[getter]
    fn duration_s(&self) -> f64 {
        self.ramp.duration()
    }

    /// Trap angular frequency before the ramp, rad/s.
    #[getter]
    fn omega_initial_rad_s(&self) -> f64 {
        self.ramp.omega_initial()
    }

    /// Trap angular frequency after the ramp, rad/s.
    #[getter]
    fn omega_final_rad_s(&self) -> f64 {
        self.ramp.omega_final()
    }

    fn __repr__(&self) -> String {
        format!(
            "<quenchless.Ramp \"{}\" ({}), {:.6e} s, {:.6e} -> {:.6e} rad/s>",
            self.origin.name,
            self.ramp.family_name(),
            self.ramp.duration(),
            self.ramp.omega_initial(),
            self.ramp.omega_final()
        )
    }

    /// The figures of ``quenchless eval --json``: for a study's candidate those of
    /// ``eval STUDY --ramp NAME --json`` (study tolerance, limits, noise, initial
    /// state, every axis: ``axes``, ``trap_verdict``, ``worst_axis``); for a design
    /// those of ``eval --waveform`` (a thermal start of ``occupation`` quanta, default
    /// 0, no limits). ``tolerance`` on Q* - 1 in (0, 1); ``accuracy`` the relative
    /// propagation accuracy, 1e-15 to 1e-2 (default 1e-10).
    #[pyo3(signature = (*, tolerance=None, accuracy=None, occupation=None))]
    fn evaluate(
        &self,
        py: Python<'_>,
        tolerance: Option<f64>,
        accuracy: Option<f64>,
        occupation: Option<f64>,
    ) -> PyResult<Py<PyAny>> {
        guarded(|| {
            let (v, _) = self.run_evaluation(py, tolerance, accuracy, occupation, None)?;
            to_python(py, &v)
        })
    }

    /// The state along the ramp at about ``n`` times (the ramp's breakpoints are
    /// added): a dict of 1-D float64 arrays ``t_s`` (s), ``omega2`` ((rad/s)²),
    /// ``energy_quanta`` (H / hbar omega), ``l_quanta`` and ``c_quanta`` (Lagrangian
    /// and correlation, in quanta), ``friction_quanta`` ((H - hbar omega nu) / hbar
    /// omega), ``mu`` (omega' / omega², 1) and ``casimir_drift`` (|K/K(0) - 1|). NaN
    /// where a quantity needs omega² > 0 and the trap is inverted.
    #[pyo3(signature = (n=801, *, accuracy=None))]
    fn trajectory(&self, py: Python<'_>, n: usize, accuracy: Option<f64>) -> PyResult<Py<PyAny>> {
        guarded(|| {
            let (_, ev) = self.run_evaluation(py, None, accuracy, None, Some(n))?;
            let c = Columns::of(&ev);
            let d = PyDict::new(py);
            d.set_item("t_s", to_numpy(py, c.t_s))?;
            d.set_item("omega2", to_numpy(py, c.omega2))?;
            d.set_item("energy_quanta", to_numpy(py, c.energy_quanta))?;
            d.set_item("l_quanta", to_numpy(py, c.l_quanta))?;
            d.set_item("c_quanta", to_numpy(py, c.c_quanta))?;
            d.set_item("friction_quanta", to_numpy(py, c.friction_quanta))?;
            d.set_item("mu", to_numpy(py, c.mu))?;
            d.set_item("casimir_drift", to_numpy(py, c.casimir_drift))?;
            Ok(d.into_any().unbind())
        })
    }

    /// The trap as the generator plays it, the path of ``export`` and ``play``: the
    /// study's generator section (if any) at ``rate_per_s`` samples per second (default
    /// the section's rate). Returns ``(t_s, omega2)``: held rows, row k from its time
    /// (s, from 0) to the next row's; the last row is the trap left on.
    #[pyo3(signature = (rate_per_s=None))]
    fn sample<'py>(&self, py: Python<'py>, rate_per_s: Option<f64>) -> PyResult<Bound<'py, PyAny>> {
        guarded(|| {
            let args = GeneratorArgs { rate_per_s, ..GeneratorArgs::default() };
            let judged = self.judged(py, args, Judging::export(), None)?;
            let (t, w2) = judged.trap_rows()?;
            Ok((to_numpy(py, t), to_numpy(py, w2)).into_pyobject(py)?.into_any())
        })
    }

    /// The ramp played through the generator and judged: the keys of ``quenchless play
    /// --json`` (designed and played Q*, limits, the smallest rate and bit depth that
    /// pass, jitter spread, every axis). Arguments as the ``play`` flags: samples per
    /// second (``rate_per_s``, ``max_rate_per_s``); ``bits`` of the DAC over
    /// ``full_scale_hz`` (the frequency in Hz at the highest code; needed unless the
    /// study's generator has a drive section); ``bipolar`` or ``unipolar`` drive;
    /// ``calibration`` a measured table (CSV ``frequency_hz,drive``) read linearly;
    /// ``low_pass_s`` (s), ``slew_per_s`` (drive units per s), ``jitter_rms_s`` (s).
    /// ``progress(done, total)`` is called now and then; Ctrl-C stops the call with
    /// KeyboardInterrupt.
    #[pyo3(signature = (rate_per_s=None, *, tolerance=None, midpoint=false, bits=None, full_scale_hz=None,
        bipolar=false, unipolar=false, calibration=None, low_pass_s=None, slew_per_s=None, jitter_rms_s=None,
        max_rate_per_s=None, seed=0, jitter_trials=16, grid_ratio=1.05, progress=None))]
    #[expect(clippy::too_many_arguments, clippy::fn_params_excessive_bools, reason = "the keyword arguments of play()")]
    fn play(
        &self,
        py: Python<'_>,
        rate_per_s: Option<f64>,
        tolerance: Option<f64>,
        midpoint: bool,
        bits: Option<u32>,
        full_scale_hz: Option<f64>,
        bipolar: bool,
        unipolar: bool,
        calibration: Option<PathBuf>,
        low_pass_s: Option<f64>,
        slew_per_s: Option<f64>,
        jitter_rms_s: Option<f64>,
        max_rate_per_s: Option<f64>,
        seed: u64,
        jitter_trials: usize,
        grid_ratio: f64,
        progress: Option<Bound<'_, PyAny>>,
    ) -> PyResult<Py<PyAny>> {
        guarded(|| {
            let args = GeneratorArgs {
                rate_per_s,
                midpoint,
                bits,
                full_scale_hz,
                bipolar,
                unipolar,
                calibration,
                low_pass_s,
                slew_per_s,
                jitter_rms_s,
                max_rate_per_s,
                seed,
            };
            let how = Judging { tolerance, searches: true, keep_tables: false, grid_ratio, jitter_trials };
            let tol = evaluate::tolerance(tolerance, self.origin.tolerance)?;
            let judged = self.judged(py, args, how, progress.as_ref())?;
            to_python(py, &judged.play_json(tol))
        })
    }

    /// The anharmonic check (``quenchless trap-check --json``): the start state
    /// propagated as a wavefunction through the ramp in each axis's real well, one axis
    /// at a time on a 1D cut through the trap centre. Without ``shape``, every axis of
    /// the study's trap model (keys ``trap_verdict``, ``worst_axis``, ``axes``); with
    /// ``shape`` (``"harmonic"``, ``"gaussian"``, ``"lorentzian"``), one axis from the
    /// arguments: ``length_m`` the waist or Rayleigh range in m (required for the
    /// optical shapes, refused for harmonic), ``mass_kg`` in kg (required for the
    /// optical shapes unless the study states a particle), ``gain`` on omega²,
    /// ``offset_hz`` a signed ordinary frequency F adding sign(F) (2 pi F)² to omega²,
    /// ``occupation`` the mean occupation on the axis's initial trap (default the study's start
    /// state seen on that axis, else 0; the rules of ``trap-check --shape``).
    /// ``tolerance`` on |energy ratio - 1|, ``loss_bound`` on the lost fraction.
    /// ``progress(done, total)`` is called now and then; Ctrl-C stops the call.
    #[pyo3(signature = (*, shape=None, length_m=None, mass_kg=None, gain=1.0, offset_hz=0.0, occupation=None,
        tolerance=None, loss_bound=1e-6, progress=None))]
    fn trap_check(
        &self,
        py: Python<'_>,
        shape: Option<&str>,
        length_m: Option<f64>,
        mass_kg: Option<f64>,
        gain: f64,
        offset_hz: f64,
        occupation: Option<f64>,
        tolerance: Option<f64>,
        loss_bound: f64,
        progress: Option<Bound<'_, PyAny>>,
    ) -> PyResult<Py<PyAny>> {
        use quenchless_physics::anharmonic::CheckSettings;
        use quenchless_profile::convert::{self, AxisToCheck};
        guarded(|| {
            if !(loss_bound.is_finite() && loss_bound > 0.0 && loss_bound < 1.0) {
                return Err(Failure::value(format!("loss_bound {loss_bound}: allowed a number in (0, 1)")).into());
            }
            let study = self.in_study.as_ref().map(|s| &*s.study);
            let axes: Vec<AxisToCheck> = match shape {
                None => {
                    let Some(st) = study else {
                        return Err(Failure::value(
                            "shape: required for a ramp outside a study (harmonic, gaussian or lorentzian)",
                        )
                        .into());
                    };
                    convert::axes_to_check(st, &self.ramp).map_err(Failure::from)?
                }
                Some(sh) => {
                    vec![axis_from_arguments(study, &self.ramp, sh, length_m, mass_kg, gain, offset_hz, occupation)?]
                }
            };
            let settings = CheckSettings {
                tolerance: evaluate::tolerance(tolerance, self.origin.tolerance)?,
                loss_bound,
                ..CheckSettings::default()
            };
            let ramp = self.ramp.clone();
            let units = 1000;
            let total = units * axes.len();
            let (work_axes, one) = (axes.clone(), shape.is_some());
            let checks = job::run(py, progress.as_ref(), total, move |j| {
                let mut out = Vec::with_capacity(work_axes.len());
                for (k, a) in work_axes.iter().enumerate() {
                    let problem = quenchless_physics::anharmonic::AxisProblem {
                        ramp: &ramp,
                        gain: a.law.gain,
                        offset_omega2: a.law.offset_omega2,
                        mass_kg: a.mass_kg,
                        well: a.well,
                        occupation: a.occupation,
                    };
                    let mut report = |f: f64| {
                        j.done.fetch_max(k * units + (f * units as f64) as usize, std::sync::atomic::Ordering::Relaxed);
                        !j.cancel.load(std::sync::atomic::Ordering::Relaxed)
                    };
                    let c = quenchless_physics::anharmonic::check_axis(&problem, &settings, &mut report)
                        .map_err(|e| Failure::value(format!("the {} axis: {e}", a.name)))?;
                    out.push(c);
                }
                Ok(out)
            })?;
            let name = &self.origin.name;
            let v = if one {
                quenchless_profile::report::trap_check_axis_json(name, &axes[0], &checks[0])
            } else {
                quenchless_profile::report::trap_check_json(name, &axes, &checks)
            };
            to_python(py, &v)
        })
    }

    /// The robustness map of the ramp as the generator plays it (the study's generator
    /// section at ``rate_per_s``, as :meth:`sample` and ``export`` play it): Q* - 1
    /// over calibration errors e (every omega scaled by 1 + e) and duration errors d,
    /// each point the worst axis of the study's trap model, as the app's map. The keys
    /// and arguments of :func:`robustness_map`, which takes the played rows instead.
    #[pyo3(signature = (rate_per_s=None, *, calibration_error=0.05, duration_error=0.05, grid=128, accuracy=None,
        progress=None))]
    fn robustness_map(
        &self,
        py: Python<'_>,
        rate_per_s: Option<f64>,
        calibration_error: f64,
        duration_error: f64,
        grid: usize,
        accuracy: Option<f64>,
        progress: Option<Bound<'_, PyAny>>,
    ) -> PyResult<Py<PyAny>> {
        use quenchless_physics::design::RobustnessGrid;
        guarded(|| {
            let args = GeneratorArgs { rate_per_s, ..GeneratorArgs::default() };
            let judged = self.judged(py, args, Judging::export(), None)?;
            let trap = judged
                .assessment
                .played
                .trap
                .ok_or_else(|| Failure::Runtime("the playing was judged without keeping its samples".into()))?;
            let others = self.origin.other_axes.iter().map(|a| a.law).collect();
            let g = RobustnessGrid { calibration: calibration_error, duration: duration_error, points: grid };
            crate::maps::robustness_of(py, trap, others, g, accuracy, progress.as_ref())
        })
    }

    /// Writes the trap as the generator plays it to ``path`` (CSV), with the header of
    /// ``quenchless export`` (provenance, timing, settings, checks and the caution).
    /// ``rate_per_s``: samples per second (default the study generator's).
    /// ``columns``: ``"si"`` (t[s], omega[rad/s]; omega² if the trap inverts),
    /// ``"lab"`` (t[us], nu[kHz]) or ``"omega2"``. The caution and the checks are
    /// also printed on stderr, as the command line does. Returns ``{"rows", "path",
    /// "checks", "caution"}``.
    #[pyo3(signature = (path, rate_per_s=None, *, columns="si"))]
    fn export(&self, py: Python<'_>, path: PathBuf, rate_per_s: Option<f64>, columns: &str) -> PyResult<Py<PyAny>> {
        guarded(|| {
            let columns = playing::columns(columns)?;
            let args = GeneratorArgs { rate_per_s, ..GeneratorArgs::default() };
            let judged = self.judged(py, args, Judging::export(), None)?;
            let checks = judged.checks();
            let stderr = py.import("sys")?.getattr("stderr")?;
            let mut text = format!("{CAUTION}\n");
            for line in &checks {
                let _ = writeln!(text, "  {line}");
            }
            stderr.call_method1("write", (text,))?;
            let rows = judged.write_trap(&path, columns)?;
            let d = PyDict::new(py);
            d.set_item("rows", rows)?;
            d.set_item("path", path.display().to_string())?;
            d.set_item("checks", checks)?;
            d.set_item("caution", CAUTION)?;
            Ok(d.into_any().unbind())
        })
    }
}

impl PyRamp {
    /// Evaluates on a worker thread (GIL released, Ctrl-C honoured).
    fn run_evaluation(
        &self,
        py: Python<'_>,
        tolerance: Option<f64>,
        accuracy: Option<f64>,
        occupation: Option<f64>,
        samples: Option<usize>,
    ) -> Result<(serde_json::Value, quenchless_physics::Evaluation), Failure> {
        if let Some(s) = self.in_study.clone() {
            if occupation.is_some() {
                return Err(Failure::value(
                    "occupation: a study's candidate starts from the study's initial state (initial_state)",
                ));
            }
            job::run(py, None, 0, move |_| {
                evaluate::candidate(&s.study, &s.path, s.index, tolerance, accuracy, samples)
            })
        } else {
            let (ramp, name) = (self.ramp.clone(), self.origin.name.clone());
            job::run(py, None, 0, move |_| {
                evaluate::free_ramp(&name, &ramp, occupation.unwrap_or(0.0), tolerance, accuracy, samples)
            })
        }
    }

    /// Plays and judges on a worker thread.
    fn judged(
        &self,
        py: Python<'_>,
        args: GeneratorArgs,
        how: Judging,
        progress: Option<&Bound<'_, PyAny>>,
    ) -> Result<playing::Judged, Failure> {
        let (origin, ramp) = (self.origin.clone(), self.ramp.clone());
        job::run(py, progress, 0, move |job| playing::judge(origin, ramp, &args, how, &job.cancel))
    }
}

/// The keywords' names, for the messages of the one-axis rules.
const KEYWORDS: quenchless_profile::given_axis::AxisNames = quenchless_profile::given_axis::AxisNames {
    shape: "shape",
    quote_shape: true,
    length: "length_m",
    length_hint: "m",
    mass: "mass_kg",
    mass_hint: "a mass in kg",
    law: "gain/offset_hz",
    offset: "offset_hz",
    occupation: "occupation",
};

/// The one axis of `Ramp.trap_check(shape=...)`, from its arguments, by the rules the
/// command line's `trap-check --shape` takes.
fn axis_from_arguments(
    study: Option<&Study>,
    ramp: &quenchless_physics::Ramp,
    sh: &str,
    length_m: Option<f64>,
    mass_kg: Option<f64>,
    gain: f64,
    offset_hz: f64,
    occupation: Option<f64>,
) -> Result<quenchless_profile::convert::AxisToCheck, Failure> {
    use quenchless_profile::given_axis::{GivenAxis, GivenShape};
    let shape = match sh {
        "harmonic" => GivenShape::Harmonic,
        "gaussian" => GivenShape::Gaussian,
        "lorentzian" => GivenShape::Lorentzian,
        other => {
            return Err(Failure::value(format!(
                "shape \"{other}\": allowed \"harmonic\", \"gaussian\" or \"lorentzian\""
            )));
        }
    };
    let given = GivenAxis { shape, length_m, mass_kg, gain: Some(gain), offset_hz: Some(offset_hz), occupation };
    given.to_check(study, ramp, &KEYWORDS).map_err(Failure::value)
}
