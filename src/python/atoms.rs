//! Cold-atom helpers: trap frequencies, oscillator lengths and the coupling constant g.

use super::errors::IntoPyResult;
use crate::model::atoms::{self, Confinement};
use crate::model::units::Units;
use pyo3::exceptions::PyValueError;
use pyo3::prelude::*;

/// ω = 2πf in radians per time unit of ``units`` for a frequency f in Hz.
///
/// Parameters
/// ----------
/// frequency_hz : float
///     f (Hz, finite, ≥ 0).
/// units : str, default "cold-atom"
///     A unit system with a time unit (not "natural").
///
/// Returns
/// -------
/// float
///
/// Raises
/// ------
/// ValueError
///     Negative or non-finite frequency, unknown units or "natural".
#[pyfunction]
#[pyo3(signature = (frequency_hz, units="cold-atom"))]
pub fn angular_frequency(py: Python<'_>, frequency_hz: f64, units: &str) -> PyResult<f64> {
    let u = Units::parse(units).py(py)?;
    u.angular_frequency(frequency_hz).py(py)
}

/// Harmonic-oscillator length √(ħ/(mω)) (length units) of a particle in a trap.
///
/// Parameters
/// ----------
/// mass : float
///     Particle mass (> 0; mass unit of ``units``: u for "cold-atom").
/// frequency_hz : float
///     Trap frequency ω/2π (Hz, > 0).
/// units : str, default "cold-atom"
///     A unit system with a time unit (not "natural").
///
/// Returns
/// -------
/// float
///
/// Raises
/// ------
/// ValueError
///     Non-positive mass or frequency, unknown units or "natural".
#[pyfunction]
#[pyo3(signature = (mass, frequency_hz, units="cold-atom"))]
pub fn oscillator_length(py: Python<'_>, mass: f64, frequency_hz: f64, units: &str) -> PyResult<f64> {
    let u = Units::parse(units).py(py)?;
    if !(frequency_hz.is_finite() && frequency_hz > 0.0) {
        return Err(PyValueError::new_err(format!("`frequency_hz` must be a finite frequency > 0 (Hz); got {frequency_hz}")));
    }
    atoms::oscillator_length(u, mass, u.angular_frequency(frequency_hz).py(py)?).py(py)
}

/// g of ``SplitStep(..., nonlinearity=g)`` for N atoms with s-wave scattering length a (ψ normalised to 1).
///
/// Parameters
/// ----------
/// scattering_length : float
///     a (length units of ``units``: µm for "cold-atom"); negative for attraction.
/// atom_number : float
///     N (> 0).
/// mass : float
///     Atom mass (mass unit: u for "cold-atom").
/// dims : {1, 2, 3}
///     3: g₃ = 4πħ²aN/m (Pitaevskii & Stringari 2003); 2: quasi-2D, g₂ = g₃/(√(2π) a_z)
///     (Petrov, Holzmann & Shlyapnikov 2000); 1: quasi-1D, g₁ = g₃/(2π a_⊥²) = 2ħω_⊥aN
///     (Olshanii 1998); a_z, a_⊥ = √(ħ/(mω)) of the tight confinement. Leading terms, valid
///     for a ≪ a_z, a_⊥.
/// confinement_hz : float, optional
///     Frequency (Hz) of the frozen direction(s): ω_z/2π (dims=2) or ω_⊥/2π (dims=1); None for dims=3.
/// units : str
///     Unit system (default "cold-atom").
///
/// Returns
/// -------
/// float
///     g in energy·length^dims.
///
/// Raises
/// ------
/// ValueError
///     Non-finite scattering length, non-positive atom number or mass, dims outside {1, 2, 3},
///     ``confinement_hz`` missing or non-positive for dims 1 and 2, unknown units.
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
