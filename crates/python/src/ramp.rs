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
    /// second (``rate_per_s``, ``max_rate_per_s``), ``low_pass_s`` (s), ``slew_per_s``
    /// ((rad/s)² per s), ``jitter_rms_s`` (s). ``progress(done, total)`` is called
    /// now and then; Ctrl-C stops the call with KeyboardInterrupt.
    #[pyo3(signature = (rate_per_s=None, *, tolerance=None, midpoint=false, low_pass_s=None, slew_per_s=None,
        jitter_rms_s=None, max_rate_per_s=None, seed=0, jitter_trials=16, grid_ratio=1.05, progress=None))]
    fn play(
        &self,
        py: Python<'_>,
        rate_per_s: Option<f64>,
        tolerance: Option<f64>,
        midpoint: bool,
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
            let args =
                GeneratorArgs { rate_per_s, midpoint, low_pass_s, slew_per_s, jitter_rms_s, max_rate_per_s, seed };
            let how = Judging { tolerance, searches: true, keep_tables: false, grid_ratio, jitter_trials };
            let tol = evaluate::tolerance(tolerance, self.origin.tolerance)?;
            let judged = self.judged(py, args, how, progress.as_ref())?;
            to_python(py, &judged.play_json(tol))
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
