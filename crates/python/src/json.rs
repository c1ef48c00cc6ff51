//! JSON values (the command line's objects) as Python objects: objects become dicts,
//! numbers floats or ints with the very same bits, null None.

use pyo3::IntoPyObjectExt;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};
use serde_json::Value;

/// The Python object of a JSON value.
pub fn to_python(py: Python<'_>, v: &Value) -> PyResult<Py<PyAny>> {
    Ok(match v {
        Value::Null => py.None(),
        Value::Bool(b) => b.into_py_any(py)?,
        Value::Number(n) => {
            if let Some(i) = n.as_i64() {
                i.into_py_any(py)?
            } else if let Some(u) = n.as_u64() {
                u.into_py_any(py)?
            } else {
                n.as_f64().unwrap_or(f64::NAN).into_py_any(py)?
            }
        }
        Value::String(s) => s.into_py_any(py)?,
        Value::Array(items) => {
            let list = PyList::empty(py);
            for item in items {
                list.append(to_python(py, item)?)?;
            }
            list.into_any().unbind()
        }
        Value::Object(map) => {
            let dict = PyDict::new(py);
            for (k, item) in map {
                dict.set_item(k, to_python(py, item)?)?;
            }
            dict.into_any().unbind()
        }
    })
}
