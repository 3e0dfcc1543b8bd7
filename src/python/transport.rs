//! Python conversion for the transport solvers (bands, transmission, currents):
//! arguments in, arrays out. The numerics and every
//! range check beyond types live in `crate::transport`.

use super::arrays::{to_usize, vec_f64};
use super::errors::IntoPyResult;
use crate::model::stack::Heterostructure;
use crate::transport::current::{self, CurrentOptions};
use crate::transport::mesh::MeshOptions;
use crate::transport::{bands, transmission};
use numpy::{PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::PyFloat;
use std::sync::Arc;

/// A float or int scalar (not an array, not a bool): Some(value).
fn scalar(obj: &Bound<'_, PyAny>) -> Option<f64> {
    if obj.is_instance_of::<pyo3::types::PyBool>() {
        return None;
    }
    if obj.is_instance_of::<PyFloat>() || obj.is_instance_of::<pyo3::types::PyInt>() {
        return obj.extract::<f64>().ok();
    }
    None
}

/// A 1-D real array-like, or a Python scalar as one value (then `true`).
fn values(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<(Vec<f64>, bool)> {
    match scalar(obj) {
        Some(x) => Ok((vec![x], true)),
        None => Ok((vec_f64(obj, name, None)?, false)),
    }
}

fn rows_to_py<'py>(py: Python<'py>, rows: &[Vec<f64>], cols: usize) -> Bound<'py, PyArray2<f64>> {
    let flat: Vec<f64> = rows.iter().flat_map(|r| r.iter().copied()).collect();
    let a = ndarray::Array2::from_shape_vec((rows.len(), cols), flat).unwrap_or_else(|_| ndarray::Array2::zeros((rows.len(), cols)));
    PyArray2::from_owned_array(py, a)
}

pub fn bands<'py>(py: Python<'py>, stack: &Arc<Heterostructure>, q: &Bound<'py, PyAny>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let (q, _) = values(q, "q")?;
    let count = to_usize(count, "count", 1, 10_000)?;
    let s = stack.clone();
    let rows = py.detach(move || bands::bands(&s, &q, count, &MeshOptions::new(accuracy))).py(py)?;
    Ok(rows_to_py(py, &rows, count))
}

pub fn minibands<'py>(py: Python<'py>, stack: &Arc<Heterostructure>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let count = to_usize(count, "count", 1, 10_000)?;
    let s = stack.clone();
    let edges = py.detach(move || bands::minibands(&s, count, &MeshOptions::new(accuracy))).py(py)?;
    let rows: Vec<Vec<f64>> = edges.iter().map(|e| e.to_vec()).collect();
    Ok(rows_to_py(py, &rows, 2))
}

pub fn miniband_widths<'py>(py: Python<'py>, stack: &Arc<Heterostructure>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let count = to_usize(count, "count", 1, 10_000)?;
    let s = stack.clone();
    let w = py.detach(move || bands::miniband_widths(&s, count, &MeshOptions::new(accuracy))).py(py)?;
    Ok(PyArray1::from_vec(py, w))
}

pub fn band_mass(py: Python<'_>, stack: &Arc<Heterostructure>, band: &Bound<'_, PyAny>, accuracy: f64) -> PyResult<f64> {
    let band = to_usize(band, "band", 0, 9_999)?;
    let s = stack.clone();
    py.detach(move || bands::band_mass(&s, band, &MeshOptions::new(accuracy))).py(py)
}

/// T (and R) at the energies: floats for a scalar energy, arrays otherwise.
pub fn transmission<'py>(py: Python<'py>, stack: &Arc<Heterostructure>, energies: &Bound<'py, PyAny>, reflection: bool, accuracy: f64) -> PyResult<Py<PyAny>> {
    let (e, is_scalar) = values(energies, "energies")?;
    let s = stack.clone();
    let (t, r) = py.detach(move || transmission::transmission(&s, &e, &MeshOptions::new(accuracy))).py(py)?;
    let out = match (is_scalar, reflection) {
        (true, false) => t[0].into_pyobject(py)?.into_any().unbind(),
        (true, true) => (t[0], r[0]).into_pyobject(py)?.into_any().unbind(),
        (false, false) => PyArray1::from_vec(py, t).into_any().unbind(),
        (false, true) => (PyArray1::from_vec(py, t), PyArray1::from_vec(py, r)).into_pyobject(py)?.into_any().unbind(),
    };
    Ok(out)
}

fn current_options(accuracy: f64, mesh_accuracy: f64) -> CurrentOptions {
    CurrentOptions { accuracy, mesh: MeshOptions::new(mesh_accuracy) }
}

pub fn current_density(py: Python<'_>, stack: &Arc<Heterostructure>, bias: f64, temperature: f64, fermi_level: f64, accuracy: f64, mesh_accuracy: f64) -> PyResult<f64> {
    let s = stack.clone();
    let o = current_options(accuracy, mesh_accuracy);
    py.detach(move || current::current_density(&s, bias, temperature, fermi_level, &o)).py(py)
}

pub fn current_voltage<'py>(
    py: Python<'py>,
    stack: &Arc<Heterostructure>,
    biases: &Bound<'py, PyAny>,
    temperature: f64,
    fermi_level: f64,
    accuracy: f64,
    mesh_accuracy: f64,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let b = vec_f64(biases, "biases", None)?;
    let s = stack.clone();
    let o = current_options(accuracy, mesh_accuracy);
    let j = py.detach(move || current::current_voltage(&s, &b, temperature, fermi_level, &o)).py(py)?;
    Ok(PyArray1::from_vec(py, j))
}
