//! numpy arrays in and out. A waveform given as arrays goes through the command
//! line's own CSV reader (`parse_waveform`, fed the rows as exact text), so it meets
//! every check and message of `quenchless eval --waveform`, and the ramp is built by
//! the same `WaveformTable::to_ramp` afterwards. Rust prints an f64 with the shortest
//! digits that read back to the same bits, so the values are unchanged.

use crate::errors::{Failure, Outcome};
use numpy::{PyArray1, PyArrayMethods, PyUntypedArrayMethods};
use pyo3::prelude::*;
use quenchless_physics::ramp::{Ramp, SampledColumn};
use quenchless_profile::waveform::{END_FREQUENCIES_KEY, READING_KEY};
use quenchless_profile::{ProfileError, parse_waveform};
use std::fmt::Write as _;
use std::path::Path;

/// A 1-D float64 copy of `obj` (a numpy array or anything `numpy.asarray` takes);
/// `name` is the argument's name in messages.
pub fn vector(obj: &Bound<'_, PyAny>, name: &str) -> Outcome<Vec<f64>> {
    let np = obj.py().import("numpy")?;
    let arr = np
        .call_method1("asarray", (obj, "float64"))
        .map_err(|e| Failure::value(format!("{name}: expected an array of numbers ({e})")))?;
    let ndim: usize = arr.getattr("ndim")?.extract()?;
    if ndim != 1 {
        let shape: Vec<usize> = arr.getattr("shape")?.extract()?;
        let shape = shape.iter().map(ToString::to_string).collect::<Vec<_>>().join(" x ");
        return Err(Failure::value(format!("{name}: expected a 1-D array, this one has {ndim} dimensions ({shape})")));
    }
    let arr =
        arr.cast_into::<PyArray1<f64>>().map_err(|_| Failure::value(format!("{name}: expected a float64 array")))?;
    debug_assert_eq!(arr.ndim(), 1);
    arr.to_vec().map_err(|_| Failure::value(format!("{name}: expected a contiguous array")))
}

/// A 1-D float64 numpy array holding `v`.
pub fn to_numpy(py: Python<'_>, v: Vec<f64>) -> Bound<'_, PyArray1<f64>> {
    PyArray1::from_vec(py, v)
}

/// A waveform table given as arrays: times (s) and omega (rad/s) or omega² ((rad/s)²).
pub struct ArrayWaveform {
    /// Row times, s.
    pub times_s: Vec<f64>,
    /// Row values.
    pub values: Vec<f64>,
    /// omega or omega².
    pub column: SampledColumn,
    /// Left sample-and-hold instead of linear reading.
    pub hold: bool,
    /// The trap before and after the table, rad/s, if stated.
    pub end_frequencies_rad_s: Option<(f64, f64)>,
    /// The arguments' names, for messages.
    pub names: String,
}

impl ArrayWaveform {
    /// Reads `t_s` with exactly one of `omega_rad_s` and `omega2`.
    pub fn from_args(
        t_s: &Bound<'_, PyAny>,
        omega_rad_s: Option<&Bound<'_, PyAny>>,
        omega2: Option<&Bound<'_, PyAny>>,
        hold: bool,
        end_frequencies_rad_s: Option<(f64, f64)>,
    ) -> Outcome<Self> {
        let (values, column, value_name) = match (omega_rad_s, omega2) {
            (Some(w), None) => (vector(w, "omega_rad_s")?, SampledColumn::Omega, "omega_rad_s"),
            (None, Some(w2)) => (vector(w2, "omega2")?, SampledColumn::Omega2, "omega2"),
            (Some(_), Some(_)) => {
                return Err(Failure::value("give one of omega_rad_s (rad/s) or omega2 ((rad/s)²), not both"));
            }
            (None, None) => return Err(Failure::value("give omega_rad_s (rad/s) or omega2 ((rad/s)²) with t_s")),
        };
        let times_s = vector(t_s, "t_s")?;
        if times_s.len() != values.len() {
            return Err(Failure::value(format!(
                "t_s has {} rows and {value_name} has {}: the arrays must have equal lengths",
                times_s.len(),
                values.len()
            )));
        }
        Ok(Self { times_s, values, column, hold, end_frequencies_rad_s, names: format!("t_s, {value_name}") })
    }

    /// The table as the CSV text the command line reads.
    fn csv(&self) -> String {
        let mut s = String::with_capacity(24 * self.times_s.len() + 64);
        if self.hold {
            let _ = writeln!(s, "# {READING_KEY} hold");
        }
        if let Some((wi, wf)) = self.end_frequencies_rad_s {
            let _ = writeln!(s, "# {END_FREQUENCIES_KEY} {wi:e}, {wf:e}");
        }
        s.push_str(if self.column == SampledColumn::Omega { "t,omega\n" } else { "t,omega2\n" });
        for (t, v) in self.times_s.iter().zip(&self.values) {
            let _ = writeln!(s, "{t:e},{v:e}");
        }
        s
    }

    /// The ramp, through the command line's reader and `to_ramp`; refusals carry the
    /// reader's message, naming the data row (1-based: row 1 is index 0).
    pub fn ramp(&self) -> Outcome<Ramp> {
        let names = Path::new(&self.names);
        let table = parse_waveform(&self.csv(), names).map_err(|e| self.refusal(e))?;
        let reading = table.reading(self.hold, "hold").map_err(|e| self.refusal(e))?;
        table.to_ramp(reading, names).map_err(|e| self.refusal(e))
    }

    /// A reader's error without the line and column of the text it never showed.
    fn refusal(&self, e: ProfileError) -> Failure {
        match e {
            ProfileError::Syntax { message, .. } => Failure::value(format!("{}: {message}", self.names)),
            other => Failure::from(other.in_file(Path::new(&self.names))),
        }
    }
}
