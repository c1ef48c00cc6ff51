//! `quenchless.Study`: a study profile loaded from its RON file, its candidates by
//! name, and its cycle.

use crate::errors::{Failure, guarded};
use crate::evaluate;
use crate::job;
use crate::json::to_python;
use crate::playing::Origin;
use crate::ramp::{InStudy, PyRamp};
use pyo3::prelude::*;
use pyo3::types::PyList;
use quenchless_profile::report::cycle_json;
use quenchless_profile::{Study, convert};
use std::path::PathBuf;
use std::sync::Arc;

/// A study profile (``.ron``) as ``load_study`` read it: its candidate ramps by name
/// (``study["shortcut 15 us"]``), each a :class:`Ramp`, and its cycle.
#[pyclass(module = "quenchless", name = "Study", frozen)]
pub struct PyStudy {
    study: Arc<Study>,
    path: PathBuf,
}

/// Reads a study profile. A file that cannot be read raises OSError
/// (FileNotFoundError for a missing one); an invalid profile ValueError naming the
/// line or field, as the command line does.
#[pyfunction]
pub fn load_study(py: Python<'_>, path: PathBuf) -> PyResult<PyStudy> {
    guarded(|| {
        let p = path.clone();
        let study = job::run(py, None, 0, move |_| Ok(quenchless_profile::load_study(&p)?))?;
        Ok(PyStudy { study: Arc::new(study), path })
    })
}

impl PyStudy {
    fn candidate_ramp(&self, name: &str) -> Result<PyRamp, Failure> {
        let (index, ramp) = convert::named_candidate(&self.study, name, "name").map_err(|e| e.in_file(&self.path))?;
        let s = &self.study;
        let origin = Origin {
            study: Some(s.name.clone()),
            path: Some(self.path.clone()),
            name: s.candidates[index].name.clone(),
            tolerance: s.tolerance,
            limits: convert::limits(&s.trap).map_err(|e| e.in_file(&self.path))?,
            other_axes: convert::trap_model(&s.trap)
                .map_err(|e| e.in_file(&self.path))?
                .trap_axes()
                .into_iter()
                .skip(1)
                .collect(),
            generator: s.generator.clone(),
        };
        Ok(PyRamp {
            ramp,
            origin,
            in_study: Some(InStudy { study: Arc::clone(&self.study), path: self.path.clone(), index }),
        })
    }
}

#[pymethods]
impl PyStudy {
    /// The study's name.
    #[getter]
    fn name(&self) -> String {
        self.study.name.clone()
    }

    /// The profile file it was read from.
    #[getter]
    fn path(&self) -> PathBuf {
        self.path.clone()
    }

    /// The candidates' names, in the file's order.
    #[getter]
    fn candidates(&self) -> Vec<String> {
        self.study.candidates.iter().map(|c| c.name.clone()).collect()
    }

    /// The verdict tolerance on Q* - 1 the study states.
    #[getter]
    fn tolerance(&self) -> f64 {
        self.study.tolerance
    }

    fn __len__(&self) -> usize {
        self.study.candidates.len()
    }

    fn __contains__(&self, name: &str) -> bool {
        self.study.candidate(name).is_some()
    }

    fn __getitem__(&self, name: &str) -> PyResult<PyRamp> {
        guarded(|| {
            if self.study.candidate(name).is_none() {
                return Err(pyo3::exceptions::PyKeyError::new_err(format!(
                    "no candidate \"{name}\" in {}; candidates: {}",
                    self.path.display(),
                    self.candidates().join(", ")
                )));
            }
            Ok(self.candidate_ramp(name)?)
        })
    }

    fn __repr__(&self) -> String {
        format!(
            "<quenchless.Study \"{}\" from {}, {} candidates>",
            self.study.name,
            self.path.display(),
            self.__len__()
        )
    }

    /// The candidate called ``name`` (ValueError naming the candidates if none is).
    fn candidate(&self, name: &str) -> PyResult<PyRamp> {
        guarded(|| Ok(self.candidate_ramp(name)?))
    }

    /// ``eval STUDY --json``: a list with every candidate's figures (see
    /// :meth:`Ramp.evaluate`); with ``name``, that candidate's dict (``--ramp NAME``).
    #[pyo3(signature = (name=None, *, tolerance=None, accuracy=None))]
    fn evaluate(
        &self,
        py: Python<'_>,
        name: Option<&str>,
        tolerance: Option<f64>,
        accuracy: Option<f64>,
    ) -> PyResult<Py<PyAny>> {
        guarded(|| {
            if let Some(n) = name {
                let (index, _) = convert::named_candidate(&self.study, n, "name")
                    .map_err(|e| Failure::from(e.in_file(&self.path)))?;
                let (study, path) = (Arc::clone(&self.study), self.path.clone());
                let (v, _) = job::run(py, None, 0, move |_| {
                    evaluate::candidate(&study, &path, index, tolerance, accuracy, None)
                })?;
                return to_python(py, &v);
            }
            if self.study.candidates.is_empty() {
                return Err(Failure::value(format!("{}: the study has no candidate ramps", self.path.display())).into());
            }
            let (study, path) = (Arc::clone(&self.study), self.path.clone());
            let all = job::run(py, None, self.study.candidates.len(), move |job| {
                (0..study.candidates.len())
                    .map(|i| {
                        let v = evaluate::candidate(&study, &path, i, tolerance, accuracy, None).map(|(v, _)| v);
                        job.done.store(i + 1, std::sync::atomic::Ordering::Relaxed);
                        v
                    })
                    .collect::<Result<Vec<_>, _>>()
            })?;
            let list = PyList::empty(py);
            for v in &all {
                list.append(to_python(py, v)?)?;
            }
            Ok(list.into_any().unbind())
        })
    }

    /// The study's Otto cycle analysed: the keys of ``quenchless cycle STUDY --json``
    /// (stability, spectral radius, work, heats, efficiency or COP, power in W, corner
    /// states). A multi-axis trap adds ``axes_note``: the cycle runs on the reference
    /// axis alone.
    #[pyo3(signature = (*, accuracy=None))]
    fn cycle(&self, py: Python<'_>, accuracy: Option<f64>) -> PyResult<Py<PyAny>> {
        guarded(|| {
            let (study, path) = (Arc::clone(&self.study), self.path.clone());
            let v = job::run(py, None, 0, move |_| {
                let opts = evaluate::propagation(accuracy)?;
                let model = convert::trap_model(&study.trap).map_err(|e| e.in_file(&path))?;
                let Some(spec) = &study.cycle else {
                    return Err(Failure::value(format!(
                        "{}: the study has no cycle (add a `cycle: Some((...))` section)",
                        path.display()
                    )));
                };
                let cycle = convert::cycle(&study, spec).map_err(|e| e.in_file(&path))?;
                let mut v = cycle_json(&cycle.analyse(&opts)?);
                if model.is_multi_axis()
                    && let serde_json::Value::Object(o) = &mut v
                {
                    o.insert(
                        "axes_note".into(),
                        serde_json::json!(format!(
                            "the cycle runs on the reference axis ({}) alone: the trap's other axes ({}) are not part of it yet",
                            model.axes[0].axis.name,
                            model.axes[1..].iter().map(|m| m.axis.name.as_str()).collect::<Vec<_>>().join(", ")
                        )),
                    );
                }
                Ok(v)
            })?;
            to_python(py, &v)
        })
    }

    /// ``study.candidate(name).play(...)``: see :meth:`Ramp.play`.
    #[pyo3(signature = (name, rate_per_s=None, **kwargs))]
    fn play(
        &self,
        py: Python<'_>,
        name: &str,
        rate_per_s: Option<f64>,
        kwargs: Option<&Bound<'_, pyo3::types::PyDict>>,
    ) -> PyResult<Py<PyAny>> {
        let ramp = Bound::new(py, self.candidate(name)?)?;
        Ok(ramp.call_method("play", (rate_per_s,), kwargs)?.unbind())
    }

    /// ``study.candidate(name).export(path, rate_per_s, ...)``: see :meth:`Ramp.export`.
    #[pyo3(signature = (name, rate_per_s, path, **kwargs))]
    fn export(
        &self,
        py: Python<'_>,
        name: &str,
        rate_per_s: Option<f64>,
        path: PathBuf,
        kwargs: Option<&Bound<'_, pyo3::types::PyDict>>,
    ) -> PyResult<Py<PyAny>> {
        let ramp = Bound::new(py, self.candidate(name)?)?;
        Ok(ramp.call_method("export", (path, rate_per_s), kwargs)?.unbind())
    }
}
