//! Core errors → Python exceptions, at the edge only.

use crate::error::{Error, InputError, NumericalError};
use pyo3::exceptions::{PyMemoryError, PyRuntimeError, PyValueError};
use pyo3::prelude::*;

pyo3::create_exception!(
    specwell,
    ConvergenceError,
    PyRuntimeError,
    "An iterative method missed its tolerance.\n\nAttributes\n----------\nenergies : list of float\n    Best energy estimates when the method stopped.\nresiduals : list of float\n    Their residual norms ‖Hψ − Eψ‖ (eigensolvers).\nrates : list of float\n    |dE/dτ| of each state at the last check (imaginary-time relaxation, instead of residuals).\niterations : int\n    Iterations (or imaginary-time steps) performed."
);

pyo3::create_exception!(
    specwell,
    AccuracyWarning,
    pyo3::exceptions::PyUserWarning,
    "Round-off limits the accuracy of some computed levels (see ``Spectrum.attainable_accuracy``)."
);

/// Emit the spectrum's accuracy warning, if any, as a `specwell.AccuracyWarning`.
pub fn warn_accuracy(py: Python<'_>, s: &crate::eigen::Spectrum) -> PyResult<()> {
    if let Some(msg) = s.accuracy_warning() {
        let cat = py.get_type::<AccuracyWarning>();
        let msg = std::ffi::CString::new(msg).unwrap_or_default();
        PyErr::warn(py, &cat, &msg, 2)?;
    }
    Ok(())
}

/// Convert a core error into the Python exception the public contract promises.
pub fn to_py(py: Python<'_>, e: Error) -> PyErr {
    match e {
        Error::Input(InputError::TooLarge { .. }) => PyMemoryError::new_err(e.to_string()),
        Error::Input(i) => PyValueError::new_err(i.to_string()),
        Error::Numerical(NumericalError::NotConverged { iterations, ref energies, ref residuals, .. }) => {
            let err = ConvergenceError::new_err(e.to_string());
            let value = err.value(py);
            // Attaching attributes cannot fail for a fresh exception instance; ignore if it does.
            let _ = value.setattr("energies", energies.clone());
            let _ = value.setattr("residuals", residuals.clone());
            let _ = value.setattr("iterations", iterations);
            err
        }
        Error::Numerical(NumericalError::NotSettled { steps, ref energies, ref rates, .. }) => {
            let err = ConvergenceError::new_err(e.to_string());
            let value = err.value(py);
            let _ = value.setattr("energies", energies.clone());
            let _ = value.setattr("rates", rates.clone());
            let _ = value.setattr("iterations", steps);
            err
        }
        Error::Numerical(NumericalError::QuadratureNotConverged { pieces, value, error, .. }) => {
            let err = ConvergenceError::new_err(e.to_string());
            let v = err.value(py);
            let _ = v.setattr("energies", vec![value]);
            let _ = v.setattr("residuals", vec![error]);
            let _ = v.setattr("iterations", pieces);
            err
        }
        Error::Numerical(n) => PyRuntimeError::new_err(n.to_string()),
    }
}

/// Shorthand: map a core `Result` into a `PyResult`.
pub trait IntoPyResult<T> {
    fn py(self, py: Python<'_>) -> PyResult<T>;
}

impl<T, E: Into<Error>> IntoPyResult<T> for Result<T, E> {
    fn py(self, py: Python<'_>) -> PyResult<T> {
        self.map_err(|e| to_py(py, e.into()))
    }
}
