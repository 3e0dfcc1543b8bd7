//! Python result class of `Heterostructure.self_consistent`: conversion only.

use super::arrays::vec_f64;
use super::errors::IntoPyResult;
use super::hamiltonian::PySpectrum;
use super::layers::PyHeterostructure;
use crate::selfconsistent::{Boundary, Options, Solution};
use pyo3::exceptions::{PyTypeError, PyUserWarning, PyValueError};
use numpy::PyArray1;
use pyo3::prelude::*;
use std::sync::Arc;

/// A converged Schrödinger-Poisson solution (``Heterostructure.self_consistent``).
#[pyclass(name = "SelfConsistent", module = "specwell._core", frozen)]
pub struct PySelfConsistent {
    pub inner: Arc<Solution>,
}

#[pymethods]
impl PySelfConsistent {
    /// Fermi level (meV); NaN when undefined (no charge).
    #[getter]
    fn fermi_level(&self) -> f64 {
        self.inner.fermi_level
    }
    /// The bound levels of the converged potential, on the element mesh.
    #[getter]
    fn spectrum(&self) -> PySpectrum {
        PySpectrum { inner: Arc::new(self.inner.spectrum.clone()) }
    }
    /// Electron sheet density of each level (cm⁻²).
    #[getter]
    fn sheet_densities<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.sheet_densities)
    }
    /// Iterations to self-consistency.
    #[getter]
    fn iterations(&self) -> usize {
        self.inner.iterations
    }
    /// max |U_out − U_in| (meV) of every iteration.
    #[getter]
    fn residual<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.residuals)
    }
    /// Why the solution is special (the flat band of an undoped structure), else None.
    #[getter]
    fn note(&self) -> Option<String> {
        self.inner.note.clone()
    }
    /// Total band edge E_c + field + electrostatic energy (meV) at z (nm); V_xc excluded.
    ///
    /// Parameters
    /// ----------
    /// z : array_like
    ///     Positions (nm, finite).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(z),)
    fn potential<'py>(&self, py: Python<'py>, z: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let z = vec_f64(z, "z", None)?;
        crate::error::check_finite("z", &z).py(py)?;
        Ok(PyArray1::from_vec(py, self.inner.potential(&z)))
    }
    /// Electron density n(z) = Σ_i N_i |ψ_i(z)|² (cm⁻³) at z (nm).
    ///
    /// Parameters
    /// ----------
    /// z : array_like
    ///     Positions (nm, finite).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(z),)
    fn density<'py>(&self, py: Python<'py>, z: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let z = vec_f64(z, "z", None)?;
        let n = self.inner.density(&z).py(py)?;
        Ok(PyArray1::from_vec(py, n))
    }
    fn __repr__(&self) -> String {
        let s = &self.inner;
        let total: f64 = s.sheet_densities.iter().sum();
        format!(
            "SelfConsistent(fermi_level={:.6} meV, levels={}, electrons={:.4e} cm^-2, iterations={})",
            s.fermi_level,
            s.spectrum.count(),
            total,
            s.iterations
        )
    }
}

/// The core options from the Python keywords (shared by the method and the sweep).
#[allow(clippy::too_many_arguments)]
pub fn options(
    temperature: f64,
    fermi_level: Option<f64>,
    surface_barrier: Option<f64>,
    tol: f64,
    max_iter: usize,
    exchange_correlation: bool,
    accuracy: f64,
    mixing: f64,
) -> PyResult<Options> {
    let mut o = Options::new(temperature);
    o.boundary = match (fermi_level, surface_barrier) {
        (None, None) => Boundary::Neutral,
        (Some(f), b) => Boundary::FermiLevel { fermi_level: f, surface_barrier: b },
        (None, Some(_)) => {
            return Err(PyValueError::new_err(
                "`surface_barrier` pins the Fermi level at the surface: give `fermi_level` too (the energy zero it refers to)",
            ))
        }
    };
    if max_iter == 0 {
        return Err(PyValueError::new_err("`max_iter` must be an integer >= 1; got 0"));
    }
    (o.tol, o.max_iter, o.exchange_correlation, o.accuracy, o.mixing) = (tol, max_iter, exchange_correlation, accuracy, mixing);
    Ok(o)
}

/// The Python object of a solution; its note (flat band of an undoped structure) becomes a warning.
pub fn wrap(py: Python<'_>, s: Solution) -> PyResult<PySelfConsistent> {
    if let Some(note) = &s.note {
        let msg = std::ffi::CString::new(note.clone()).unwrap_or_default();
        PyErr::warn(py, &py.get_type::<PyUserWarning>(), &msg, 1)?;
    }
    Ok(PySelfConsistent { inner: Arc::new(s) })
}

/// ``Heterostructure.self_consistent`` for many structures (a doping or gate sweep), in parallel.
///
/// Rayon threads with the GIL released: one contiguous chunk of the sequence per thread, each
/// item started from the previous item's electrostatic potential (so neighbouring items
/// should be similar structures).
///
/// Parameters
/// ----------
/// stacks : sequence of Heterostructure
///     The structures, each with a permittivity on every layer.
/// temperature : float
///     K, > 0.
/// fermi_level, surface_barrier, tol, max_iter, exchange_correlation, accuracy, mixing
///     Keyword-only; as for ``Heterostructure.self_consistent`` (same defaults), applied to
///     every structure.
///
/// Returns
/// -------
/// list of SelfConsistent
///     One per structure, in order.
///
/// Raises
/// ------
/// TypeError
///     An item is not a Heterostructure.
/// ValueError
///     As for ``Heterostructure.self_consistent``.
/// ConvergenceError
///     Some item did not converge within ``max_iter``.
#[pyfunction]
#[pyo3(signature = (stacks, temperature, *, fermi_level=None, surface_barrier=None, tol=1e-6, max_iter=100,
                    exchange_correlation=false, accuracy=1e-10, mixing=0.3))]
pub fn self_consistent_batch(
    py: Python<'_>,
    stacks: &Bound<'_, PyAny>,
    temperature: f64,
    fermi_level: Option<f64>,
    surface_barrier: Option<f64>,
    tol: f64,
    max_iter: usize,
    exchange_correlation: bool,
    accuracy: f64,
    mixing: f64,
) -> PyResult<Vec<PySelfConsistent>> {
    let o = options(temperature, fermi_level, surface_barrier, tol, max_iter, exchange_correlation, accuracy, mixing)?;
    let mut list = Vec::new();
    for (i, item) in stacks.try_iter().map_err(|_| PyTypeError::new_err("`stacks` must be a sequence of specwell.Heterostructure"))?.enumerate() {
        let item = item?;
        let s = item
            .cast::<PyHeterostructure>()
            .map_err(|_| PyTypeError::new_err(format!("`stacks[{i}]` must be a specwell.Heterostructure")))?;
        list.push((*s.get().inner).clone());
    }
    let out = py.detach(move || crate::selfconsistent::solve_batch(&list, &o)).py(py)?;
    out.into_iter().map(|s| wrap(py, s)).collect()
}
