//! Cold-atom helpers: trap frequencies, oscillator lengths and the coupling constant g.

use super::errors::IntoPyResult;
use crate::model::atoms::{self, Confinement};
use crate::model::units::Units;
use pyo3::exceptions::PyValueError;
use pyo3::prelude::*;

/// ω = 2π f (radians per time unit of `units`) of a frequency f in Hz.
#[pyfunction]
#[pyo3(signature = (frequency_hz, units="cold-atom"))]
pub fn angular_frequency(py: Python<'_>, frequency_hz: f64, units: &str) -> PyResult<f64> {
    let u = Units::parse(units).py(py)?;
    u.angular_frequency(frequency_hz).py(py)
}

/// The oscillator length √(ħ/(mω)) of a trap of frequency `frequency_hz` (Hz).
#[pyfunction]
#[pyo3(signature = (mass, frequency_hz, units="cold-atom"))]
pub fn oscillator_length(py: Python<'_>, mass: f64, frequency_hz: f64, units: &str) -> PyResult<f64> {
    let u = Units::parse(units).py(py)?;
    if !(frequency_hz.is_finite() && frequency_hz > 0.0) {
        return Err(PyValueError::new_err(format!("`frequency_hz` must be a finite frequency > 0 (Hz); got {frequency_hz}")));
    }
    atoms::oscillator_length(u, mass, u.angular_frequency(frequency_hz).py(py)?).py(py)
}

/// g of the Gross-Pitaevskii equation (ψ normalised to 1) in `dims` dimensions.
#[pyfunction]
#[pyo3(signature = (scattering_length, atom_number, mass, dims=None, confinement_hz=None, units="cold-atom"),
       text_signature = "(scattering_length, atom_number, mass, dims=3, confinement_hz=None, units=\"cold-atom\")")]
pub fn coupling_constant(
    py: Python<'_>,
    scattering_length: f64,
    atom_number: f64,
    mass: f64,
    dims: Option<&Bound<'_, PyAny>>,
    confinement_hz: Option<f64>,
    units: &str,
) -> PyResult<f64> {
    // Any integer is accepted here and checked against {1, 2, 3} below (no overflow error).
    let dims: i64 = dims.map_or(Ok(3), |d| super::arrays::to_usize(d, "dims", 1, 3)).map(|d| d as i64)?;
    let u = Units::parse(units).py(py)?;
    let omega = || -> PyResult<f64> {
        match confinement_hz {
            Some(f) if f.is_finite() && f > 0.0 => u.angular_frequency(f).py(py),
            Some(f) => Err(PyValueError::new_err(format!(
                "`confinement_hz` must be a finite frequency > 0 (Hz) of the tight confinement; got {f}"
            ))),
            None => Err(PyValueError::new_err(format!(
                "`confinement_hz` must be given for dims={dims}: the frequency (Hz) of the tight harmonic confinement ({})",
                if dims == 2 { "ω_z/2π of the frozen axis" } else { "ω_⊥/2π of the frozen transverse directions" }
            ))),
        }
    };
    let confinement = match dims {
        3 => {
            if confinement_hz.is_some() {
                return Err(PyValueError::new_err("`confinement_hz` must be None for dims=3 (no direction is frozen)"));
            }
            Confinement::Free3D
        }
        2 => Confinement::Quasi2D { omega: omega()? },
        1 => Confinement::Quasi1D { omega: omega()? },
        _ => return Err(PyValueError::new_err(format!("`dims` must be one of 1, 2, 3; got {dims}"))),
    };
    atoms::coupling_constant(u, scattering_length, atom_number, mass, confinement).py(py)
}
