//! Array conversion at the Python edge: accept any real array-like (lists, integer
//! arrays, non-contiguous or read-only arrays are converted), reject complex or
//! non-numeric input with a TypeError naming the argument.

use numpy::{AllowTypeChange, PyArray2, PyArrayLikeDyn, PyUntypedArrayMethods};
use pyo3::exceptions::{PyTypeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::PyAnyMethods;

/// `np.asarray(obj)` with a dtype-kind check: "real" (bool/int/uint/float) or "complex".
fn as_ndarray<'py>(obj: &Bound<'py, PyAny>, name: &str, allow_complex: bool) -> PyResult<(Bound<'py, PyAny>, bool)> {
    let py = obj.py();
    let np = py.import("numpy")?;
    let arr = np.call_method1("asarray", (obj,)).map_err(|_| {
        PyTypeError::new_err(format!("`{name}` must be an array-like of real numbers; got {}", type_name(obj)))
    })?;
    let kind: String = arr.getattr("dtype")?.getattr("kind")?.extract()?;
    let is_complex = kind == "c";
    if !(matches!(kind.as_str(), "b" | "i" | "u" | "f") || (allow_complex && is_complex)) {
        let what = if allow_complex { "real or complex numbers" } else { "real numbers" };
        let dtype: String = arr.getattr("dtype")?.str()?.extract()?;
        return Err(PyTypeError::new_err(format!("`{name}` must be an array of {what}; got dtype {dtype}")));
    }
    Ok((arr, is_complex))
}

fn type_name(obj: &Bound<'_, PyAny>) -> String {
    obj.get_type().name().map(|n| n.to_string()).unwrap_or_else(|_| "an unknown type".into())
}

/// A real array-like as float64 (rust-numpy's `PyArrayLike`, after the dtype check
/// above so that complex input is refused instead of cast), with its shape checked
/// to have `ndim` dimensions.
fn real_array<'py>(obj: &Bound<'py, PyAny>, name: &str, ndim: usize) -> PyResult<PyArrayLikeDyn<'py, f64, AllowTypeChange>> {
    let (arr, _) = as_ndarray(obj, name, false)?;
    let a: PyArrayLikeDyn<'py, f64, AllowTypeChange> = arr.extract().map_err(|e| PyTypeError::new_err(format!("`{name}`: {e}")))?;
    if a.ndim() != ndim {
        return Err(PyValueError::new_err(format!("`{name}` must be {ndim}-dimensional; got shape {:?}", a.shape())));
    }
    Ok(a)
}

/// A 1-D real array of length `expected` (if given) as a Vec<f64>.
pub fn vec_f64(obj: &Bound<'_, PyAny>, name: &str, expected: Option<usize>) -> PyResult<Vec<f64>> {
    let a = real_array(obj, name, 1)?;
    let v = a.as_array().iter().copied().collect::<Vec<f64>>();
    if let Some(n) = expected {
        if v.len() != n {
            return Err(PyValueError::new_err(format!("`{name}` must have length {n}; got length {}", v.len())));
        }
    }
    Ok(v)
}

/// A 1-D array that may be complex: (real part, imaginary part or None).
pub fn vec_f64_or_complex(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<(Vec<f64>, Option<Vec<f64>>)> {
    let (arr, is_complex) = as_ndarray(obj, name, true)?;
    if is_complex {
        let re = vec_f64(&arr.getattr("real")?, name, None)?;
        let im = vec_f64(&arr.getattr("imag")?, name, None)?;
        Ok((re, Some(im)))
    } else {
        Ok((vec_f64(&arr, name, None)?, None))
    }
}

/// A 2-D real array as (rows, cols, row-major data).
pub fn mat_f64(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<(usize, usize, Vec<f64>)> {
    let a = real_array(obj, name, 2)?;
    let (r, c) = (a.shape()[0], a.shape()[1]);
    // Row-major data: one memcpy when the array is C-contiguous.
    let data = match a.as_slice() {
        Ok(sl) => sl.to_vec(),
        Err(_) => a.as_array().iter().cloned().collect(),
    };
    Ok((r, c, data))
}

/// A faer matrix as a 2-D numpy array (copy): Fortran-ordered from a
/// column-major matrix and C-ordered from a row-major view (whose transpose is
/// column-major), copied a contiguous column at a time, so neither layout needs a
/// strided element-by-element pass.
pub fn mat_to_py<'py>(py: Python<'py>, m: faer::MatRef<'_, f64>) -> Bound<'py, PyArray2<f64>> {
    use ndarray::ShapeBuilder;
    let (r, c) = (m.nrows(), m.ncols());
    let (cols, fortran) = if m.row_stride() == 1 {
        (m, true)
    } else if m.col_stride() == 1 {
        (m.transpose(), false)
    } else {
        return PyArray2::from_owned_array(py, ndarray::Array2::from_shape_fn((r, c), |(i, j)| m[(i, j)]));
    };
    let mut data = Vec::with_capacity(r * c);
    for j in 0..cols.ncols() {
        match cols.col(j).try_as_col_major() {
            Some(col) => data.extend_from_slice(col.as_slice()),
            None => data.extend((0..cols.nrows()).map(|i| cols[(i, j)])),
        }
    }
    let shaped = if fortran { ndarray::Array2::from_shape_vec((r, c).f(), data) } else { ndarray::Array2::from_shape_vec((r, c), data) };
    match shaped {
        Ok(a) => PyArray2::from_owned_array(py, a),
        Err(_) => PyArray2::from_owned_array(py, ndarray::Array2::from_shape_fn((r, c), |(i, j)| m[(i, j)])),
    }
}

/// The transpose of a faer matrix as a 2-D numpy array (copy).
pub fn mat_t_to_py<'py>(py: Python<'py>, m: faer::MatRef<'_, f64>) -> Bound<'py, PyArray2<f64>> {
    mat_to_py(py, m.transpose())
}

/// An integer argument with its allowed range [min, max]. Python ints of any size
/// (and numpy integers) are accepted; out-of-range values raise ValueError, non-integers
/// TypeError, both naming the argument.
pub fn to_usize(obj: &Bound<'_, PyAny>, name: &str, min: usize, max: usize) -> PyResult<usize> {
    let index = obj.call_method0("__index__").map_err(|_| {
        PyTypeError::new_err(format!("`{name}` must be an integer in [{min}, {max}]; got {}", type_name(obj)))
    })?;
    match index.extract::<i64>() {
        Ok(v) if v >= min as i64 && v <= max as i64 => Ok(v as usize),
        _ => Err(PyValueError::new_err(format!(
            "`{name}` must be an integer in [{min}, {max}]; got {}",
            index.str().map(|s| s.to_string()).unwrap_or_default()
        ))),
    }
}

/// A real or complex array of any shape as (shape, complex128 data in C order).
pub fn complex_array(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<(Vec<usize>, Vec<num_complex::Complex64>)> {
    let (arr, _) = as_ndarray(obj, name, true)?;
    let a: PyArrayLikeDyn<'_, num_complex::Complex64, AllowTypeChange> =
        arr.extract().map_err(|e| PyTypeError::new_err(format!("`{name}`: {e}")))?;
    let shape = a.shape().to_vec();
    // C order: `iter` walks the logical order of any layout.
    let data: Vec<num_complex::Complex64> = a.as_array().iter().copied().collect();
    if let Some(i) = data.iter().position(|z| !(z.re.is_finite() && z.im.is_finite())) {
        return Err(PyValueError::new_err(format!(
            "`{name}` must contain only finite numbers; found NaN or inf at flat index {i}"
        )));
    }
    Ok((shape, data))
}

/// A `seed` argument: None (the default seed) or an integer in [0, 2^63).
pub fn seed_arg(obj: Option<&Bound<'_, PyAny>>) -> PyResult<u64> {
    match obj {
        None => Ok(0x5eed),
        Some(o) => Ok(to_usize(o, "seed", 0, i64::MAX as usize)? as u64),
    }
}

/// A real array-like of any shape as (shape, float64 data in C order).
pub fn real_nd(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<(Vec<usize>, Vec<f64>)> {
    let (arr, _) = as_ndarray(obj, name, false)?;
    let a: PyArrayLikeDyn<'_, f64, AllowTypeChange> = arr.extract().map_err(|e| PyTypeError::new_err(format!("`{name}`: {e}")))?;
    let shape = a.shape().to_vec();
    let data = match a.as_slice() {
        Ok(sl) => sl.to_vec(),
        Err(_) => a.as_array().iter().copied().collect(),
    };
    Ok((shape, data))
}

/// A flat C-order vector as a numpy array of `shape` (a copy; the length must match).
pub fn shaped_array<'py, T: numpy::Element + Clone>(py: Python<'py>, shape: &[usize], data: Vec<T>) -> PyResult<Bound<'py, numpy::PyArrayDyn<T>>> {
    let a = ndarray::ArrayD::from_shape_vec(ndarray::IxDyn(shape), data).map_err(|e| PyValueError::new_err(e.to_string()))?;
    Ok(numpy::PyArrayDyn::from_owned_array(py, a))
}
