//! The maps of `quenchless sweep` and `sweep-noise` as numpy grids, computed in
//! parallel by the physics crate with progress and Ctrl-C.

use crate::arrays::{ArrayWaveform, to_numpy};
use crate::errors::{Failure, guarded};
use crate::evaluate::{occupation as checked_occupation, propagation};
use crate::job;
use numpy::{PyArray2, PyArrayMethods};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use quenchless_physics::design::{
    NoiseGrid, RobustnessGrid, noise_map as physics_noise_map, robustness_map as physics_robustness_map,
};
use quenchless_physics::ramp::{AxisLaw, SampledRamp};
use quenchless_physics::{Moments, Ramp, RampShape};

/// A row-major `rows x cols` grid as a 2-D numpy array.
fn grid(py: Python<'_>, values: Vec<f64>, rows: usize, cols: usize) -> PyResult<Bound<'_, PyArray2<f64>>> {
    let flat = to_numpy(py, values);
    flat.reshape([rows, cols])
}

/// Q* - 1 of the waveform (``t_s`` in s with ``omega_rad_s`` in rad/s or ``omega2``
/// in (rad/s)², as :func:`evaluate` takes it) over calibration errors e (every omega
/// scaled by 1 + e, |e| <= ``calibration_error``, a fraction below 0.9) and duration
/// errors d (duration scaled by 1 + d, |d| <= ``duration_error``), ``grid`` points per
/// axis (2 to 2048), as ``quenchless sweep``. Returns a dict: ``calibration_errors``
/// and ``duration_errors`` (1-D), ``q_star_minus_one`` and ``final_coherence_ratio``
/// (2-D, indexed [duration, calibration]). ``progress(done, total)`` is called now and
/// then; Ctrl-C raises KeyboardInterrupt.
#[pyfunction]
#[pyo3(signature = (t_s, omega_rad_s=None, *, omega2=None, hold=false, end_frequencies_rad_s=None,
    calibration_error=0.05, duration_error=0.05, grid=128, accuracy=None, progress=None))]
pub fn robustness_map(
    py: Python<'_>,
    t_s: &Bound<'_, PyAny>,
    omega_rad_s: Option<&Bound<'_, PyAny>>,
    omega2: Option<&Bound<'_, PyAny>>,
    hold: bool,
    end_frequencies_rad_s: Option<(f64, f64)>,
    calibration_error: f64,
    duration_error: f64,
    grid: usize,
    accuracy: Option<f64>,
    progress: Option<Bound<'_, PyAny>>,
) -> PyResult<Py<PyAny>> {
    guarded(|| {
        let w = ArrayWaveform::from_args(t_s, omega_rad_s, omega2, hold, end_frequencies_rad_s)?.ramp()?;
        let Ramp::Sampled(w) = w else {
            return Err(Failure::Runtime("a waveform did not read as a sampled ramp".into()).into());
        };
        let g = RobustnessGrid { calibration: calibration_error, duration: duration_error, points: grid };
        robustness_of(py, w, Vec::new(), g, accuracy, progress.as_ref())
    })
}

/// The robustness map of a played (or given) table, every point the worst of the
/// reference axis and the `other_axes`, as a dict of numpy arrays.
pub fn robustness_of(
    py: Python<'_>,
    w: SampledRamp,
    other_axes: Vec<AxisLaw>,
    g: RobustnessGrid,
    accuracy: Option<f64>,
    progress: Option<&Bound<'_, PyAny>>,
) -> PyResult<Py<PyAny>> {
    let n = g.points;
    if !(2..=2048).contains(&n) {
        return Err(Failure::value(format!("grid {n}: allowed 2 to 2048 points per axis")).into());
    }
    let opts = propagation(accuracy)?;
    let map = job::run(py, progress, n * n, move |job| {
        Ok(physics_robustness_map(&w, &g, &other_axes, &opts, &job.progress(), &job.cancel)?)
    })?;
    let d = PyDict::new(py);
    d.set_item("calibration_errors", to_numpy(py, map.calibration_errors))?;
    d.set_item("duration_errors", to_numpy(py, map.duration_errors))?;
    d.set_item("q_star_minus_one", self::grid(py, map.q_star_minus_one, n, n)?)?;
    d.set_item("final_coherence_ratio", self::grid(py, map.coherence, n, n)?)?;
    Ok(d.into_any().unbind())
}

/// The energy ratio (final energy over omega_f/omega_i times the initial one) minus
/// one of the waveform over noise strengths, as ``quenchless sweep-noise``: dephasing
/// rates 0 to ``max_dephasing_per_s`` (1/s) and amplitude-noise spectral densities 0
/// to ``max_amplitude_psd_s`` (s), ``grid`` points each (2 to 512), from a thermal
/// start of ``occupation`` quanta. Returns a dict: ``dephasing_rates_per_s`` and
/// ``amplitude_psds_s`` (1-D), ``energy_ratio_minus_one`` (2-D, indexed [amplitude,
/// dephasing]). ``progress(done, total)`` as in :func:`robustness_map`.
#[pyfunction]
#[pyo3(signature = (t_s, omega_rad_s=None, *, omega2=None, hold=false, end_frequencies_rad_s=None,
    max_dephasing_per_s, max_amplitude_psd_s, occupation=0.0, grid=32, accuracy=None, progress=None))]
pub fn noise_map(
    py: Python<'_>,
    t_s: &Bound<'_, PyAny>,
    omega_rad_s: Option<&Bound<'_, PyAny>>,
    omega2: Option<&Bound<'_, PyAny>>,
    hold: bool,
    end_frequencies_rad_s: Option<(f64, f64)>,
    max_dephasing_per_s: f64,
    max_amplitude_psd_s: f64,
    occupation: f64,
    grid: usize,
    accuracy: Option<f64>,
    progress: Option<Bound<'_, PyAny>>,
) -> PyResult<Py<PyAny>> {
    guarded(|| {
        for (name, v) in [("max_dephasing_per_s", max_dephasing_per_s), ("max_amplitude_psd_s", max_amplitude_psd_s)] {
            if !(v.is_finite() && v > 0.0) {
                return Err(Failure::value(format!("{name} {v}: allowed a finite number > 0")).into());
            }
        }
        if !(2..=512).contains(&grid) {
            return Err(Failure::value(format!("grid {grid}: allowed 2 to 512 points per axis")).into());
        }
        let ramp = ArrayWaveform::from_args(t_s, omega_rad_s, omega2, hold, end_frequencies_rad_s)?.ramp()?;
        let initial = Moments::thermal_occupation(ramp.omega_initial(), checked_occupation(occupation)?)
            .map_err(Failure::from)?;
        let opts = propagation(accuracy)?;
        let g = NoiseGrid { max_dephasing: max_dephasing_per_s, max_amplitude_psd: max_amplitude_psd_s, points: grid };
        let map = job::run(py, progress.as_ref(), grid * grid, move |job| {
            Ok(physics_noise_map(&ramp, &initial, &g, &opts, &job.progress(), &job.cancel)?)
        })?;
        let d = PyDict::new(py);
        d.set_item("dephasing_rates_per_s", to_numpy(py, map.dephasing_rates))?;
        d.set_item("amplitude_psds_s", to_numpy(py, map.amplitude_psds))?;
        d.set_item("energy_ratio_minus_one", self::grid(py, map.energy_ratio_minus_one, grid, grid)?)?;
        Ok(d.into_any().unbind())
    })
}
