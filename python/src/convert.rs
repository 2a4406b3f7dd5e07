//! Python values ↔ JSON values, and numpy arrays out.

use numpy::ndarray::{Array2, Array3, ArrayD, IxDyn};
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyDict, PyFloat, PyInt, PyList, PyString, PyTuple};
use serde_json::{Map, Number, Value};

use crate::errors::{Failure, Outcome};

/// The key of a child: `parent.name` or `parent[i]`, in the engine's style.
fn child(parent: &str, name: &str) -> String {
    if parent.is_empty() {
        name.to_string()
    } else {
        format!("{parent}.{name}")
    }
}

/// A Python value (dicts with str keys, lists, tuples, str, bool, int,
/// float, None, numpy arrays and scalars) as JSON; `key` names it in errors.
pub fn to_json(obj: &Bound<'_, PyAny>, key: &str) -> Outcome<Value> {
    let bad = |why: &str| {
        let shown = obj
            .repr()
            .map(|r| r.to_string())
            .unwrap_or_else(|_| "?".into());
        Failure::input(format!(
            "{} = {shown}: {why}",
            if key.is_empty() { "scene" } else { key }
        ))
    };
    if obj.is_none() {
        return Ok(Value::Null);
    }
    if let Ok(b) = obj.cast::<PyBool>() {
        return Ok(Value::Bool(b.is_true()));
    }
    if let Ok(i) = obj.cast::<PyInt>() {
        if let Ok(v) = i.extract::<i64>() {
            return Ok(Value::from(v));
        }
        if let Ok(v) = i.extract::<u64>() {
            return Ok(Value::from(v));
        }
        let v: f64 = i.extract().map_err(|_| bad("an integer too large"))?;
        return Number::from_f64(v)
            .map(Value::Number)
            .ok_or_else(|| bad("an integer too large"));
    }
    if let Ok(f) = obj.cast::<PyFloat>() {
        return Number::from_f64(f.value())
            .map(Value::Number)
            .ok_or_else(|| bad("not a finite number"));
    }
    if let Ok(s) = obj.cast::<PyString>() {
        return Ok(Value::String(s.to_string()));
    }
    if let Ok(d) = obj.cast::<PyDict>() {
        let mut m = Map::new();
        for (k, v) in d.iter() {
            let Ok(name) = k.cast::<PyString>() else {
                return Err(bad("keys must be strings"));
            };
            let name = name.to_string();
            let value = to_json(&v, &child(key, &name))?;
            m.insert(name, value);
        }
        return Ok(Value::Object(m));
    }
    if let Ok(l) = obj.cast::<PyList>() {
        return items(l.iter(), key);
    }
    if let Ok(t) = obj.cast::<PyTuple>() {
        return items(t.iter(), key);
    }
    // numpy arrays and scalars (np.int64, np.float32, …) become Python values.
    if obj.hasattr("tolist").unwrap_or(false)
        && let Ok(plain) = obj.call_method0("tolist")
        && !plain.is(obj)
    {
        return to_json(&plain, key);
    }
    Err(bad(
        "not a JSON value (expected a dict, list, str, number, bool or None)",
    ))
}

fn items<'py>(it: impl Iterator<Item = Bound<'py, PyAny>>, key: &str) -> Outcome<Value> {
    it.enumerate()
        .map(|(i, v)| to_json(&v, &format!("{key}[{i}]")))
        .collect::<Outcome<Vec<_>>>()
        .map(Value::Array)
}

/// A JSON value as Python objects (dicts keep their key order).
pub fn from_json<'py>(py: Python<'py>, v: &Value) -> PyResult<Bound<'py, PyAny>> {
    Ok(match v {
        Value::Null => py.None().into_bound(py),
        Value::Bool(b) => PyBool::new(py, *b).to_owned().into_any(),
        Value::Number(n) => match (n.as_i64(), n.as_u64()) {
            (Some(i), _) => i.into_pyobject(py)?.into_any(),
            (None, Some(u)) => u.into_pyobject(py)?.into_any(),
            _ => n.as_f64().unwrap_or(f64::NAN).into_pyobject(py)?.into_any(),
        },
        Value::String(s) => PyString::new(py, s).into_any(),
        Value::Array(xs) => {
            let list = PyList::empty(py);
            for x in xs {
                list.append(from_json(py, x)?)?;
            }
            list.into_any()
        }
        Value::Object(m) => dict(py, m)?.into_any(),
    })
}

/// A JSON object as a Python dict.
pub fn dict<'py>(py: Python<'py>, m: &Map<String, Value>) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    for (k, v) in m {
        d.set_item(k, from_json(py, v)?)?;
    }
    Ok(d)
}

/// A vector as a 1-D float64 array (no copy).
pub fn array1<'py>(py: Python<'py>, v: Vec<f64>) -> Bound<'py, PyArray1<f64>> {
    v.into_pyarray(py)
}

/// A row-major vector as a 2-D array of `shape`.
pub fn array2<'py, T: numpy::Element>(
    py: Python<'py>,
    shape: (usize, usize),
    v: Vec<T>,
) -> PyResult<Bound<'py, PyAny>> {
    let a = Array2::from_shape_vec(shape, v).map_err(crate::errors::internal)?;
    Ok(a.into_pyarray(py).into_any())
}

/// A row-major vector as a 3-D array of `shape`.
pub fn array3<'py, T: numpy::Element>(
    py: Python<'py>,
    shape: (usize, usize, usize),
    v: Vec<T>,
) -> PyResult<Bound<'py, PyAny>> {
    let a = Array3::from_shape_vec(shape, v).map_err(crate::errors::internal)?;
    Ok(a.into_pyarray(py).into_any())
}

/// A row-major vector as an array of any `shape`.
pub fn arrayd<'py, T: numpy::Element>(
    py: Python<'py>,
    shape: &[usize],
    v: Vec<T>,
) -> PyResult<Bound<'py, PyAny>> {
    let a = ArrayD::from_shape_vec(IxDyn(shape), v).map_err(crate::errors::internal)?;
    Ok(a.into_pyarray(py).into_any())
}

/// A 1-D float64 array from anything numpy can read as one (list, tuple,
/// array of any real dtype), refusing values that are not finite; `key`
/// names the argument in errors.
pub fn floats(obj: &Bound<'_, PyAny>, key: &str) -> Outcome<Vec<f64>> {
    let v: Vec<f64> = match obj.extract::<numpy::PyArrayLike1<'_, f64, numpy::AllowTypeChange>>() {
        Ok(a) => a.as_array().iter().copied().collect(),
        Err(_) => match obj.extract::<f64>() {
            Ok(x) => vec![x],
            Err(_) => {
                return Err(Failure::input(format!(
                    "{key} = {}: expected numbers (a 1-D array or list)",
                    obj.repr().map(|r| r.to_string()).unwrap_or_default()
                )));
            }
        },
    };
    if let Some((i, x)) = v.iter().enumerate().find(|(_, x)| !x.is_finite()) {
        return Err(Failure::input(format!(
            "{key}[{i}] = {x}: not a finite number"
        )));
    }
    Ok(v)
}
