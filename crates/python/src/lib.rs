//! Quenchless for Python: the engine of the command line as a module, numpy in and
//! out, SI units, the command line's JSON objects and refusals.

#![deny(missing_docs)]

mod arrays;
mod cycle;
mod design;
mod errors;
mod evaluate;
mod job;
mod json;
mod maps;
mod playing;
mod quantity;
mod ramp;
mod study;

use pyo3::prelude::*;

/// Design, verify, play and export trap-frequency ramps omega(t) of a quantum
/// harmonic oscillator. SI units throughout: s, rad/s for omega, (rad/s)² for omega²,
/// Hz only where an argument's name says so (an ordinary frequency nu = omega / 2 pi).
#[pymodule]
fn quenchless(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    m.add("SCHEMA_VERSION", quenchless_profile::report::SCHEMA_VERSION)?;
    m.add("CAUTION", quenchless_profile::header::CAUTION)?;
    m.add_class::<ramp::PyRamp>()?;
    m.add_class::<study::PyStudy>()?;
    m.add_function(wrap_pyfunction!(evaluate::function::evaluate, m)?)?;
    m.add_function(wrap_pyfunction!(study::load_study, m)?)?;
    m.add_function(wrap_pyfunction!(design::design_constant_mu, m)?)?;
    m.add_function(wrap_pyfunction!(design::design_shortcut, m)?)?;
    m.add_function(wrap_pyfunction!(design::design_bang_bang, m)?)?;
    m.add_function(wrap_pyfunction!(cycle::cycle, m)?)?;
    m.add_function(wrap_pyfunction!(maps::robustness_map, m)?)?;
    m.add_function(wrap_pyfunction!(maps::noise_map, m)?)?;
    m.add_function(wrap_pyfunction!(quantity::quantity, m)?)?;
    Ok(())
}
