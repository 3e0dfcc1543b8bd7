//! The pyo3 layer: borrow arrays, call the core, convert results and errors.
//! Nothing here does numerics; option strings are parsed once, here.

// pyo3 signatures mirror the Python API: many arguments, nested return tuples.
#![allow(clippy::too_many_arguments, clippy::type_complexity)]

mod arrays;
mod atoms;
mod basis;
mod display;
mod errors;
mod hamiltonian;
mod layers;
mod materials;
mod propagate;
mod selfconsistent;
mod transport;

use pyo3::prelude::*;

/// specwell._core: the compiled extension. Import names from `specwell` instead.
#[pymodule]
fn _core(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<basis::PyHermiteBasis>()?;
    m.add_class::<basis::PyFourierGrid>()?;
    m.add_class::<basis::PyElementBasis>()?;
    m.add_class::<basis::PyProductGrid>()?;
    m.add_class::<hamiltonian::PyHamiltonian>()?;
    m.add_class::<hamiltonian::PySpectrum>()?;
    m.add_class::<hamiltonian::PyBatch>()?;
    m.add_function(wrap_pyfunction!(hamiltonian::solve_batch, m)?)?;
    m.add_function(wrap_pyfunction!(hamiltonian::_batch_from_spectra, m)?)?;
    m.add_class::<materials::PyMaterial>()?;
    m.add_function(wrap_pyfunction!(materials::material, m)?)?;
    m.add("MATERIALS", materials::names())?;
    m.add_class::<layers::PyLayer>()?;
    m.add_function(wrap_pyfunction!(layers::_layer_from_parts, m)?)?;
    m.add_class::<layers::PyHeterostructure>()?;
    m.add_class::<selfconsistent::PySelfConsistent>()?;
    m.add_function(wrap_pyfunction!(selfconsistent::self_consistent_batch, m)?)?;
    m.add_class::<propagate::PySplitStep>()?;
    m.add_class::<propagate::PyRun>()?;
    m.add_class::<propagate::PyGroundState>()?;
    m.add_function(wrap_pyfunction!(propagate::_bare_grid_fft_pair_seconds, m)?)?;
    m.add_function(wrap_pyfunction!(atoms::angular_frequency, m)?)?;
    m.add_function(wrap_pyfunction!(atoms::oscillator_length, m)?)?;
    m.add_function(wrap_pyfunction!(atoms::coupling_constant, m)?)?;
    m.add_function(wrap_pyfunction!(propagate::_split_step_from_parts, m)?)?;
    m.add_function(wrap_pyfunction!(propagate::_bare_fft_pair_seconds, m)?)?;
    m.add_function(wrap_pyfunction!(propagate::_run_from_parts, m)?)?;
    m.add_function(wrap_pyfunction!(propagate::_ground_state_from_parts, m)?)?;
    m.add_function(wrap_pyfunction!(hamiltonian::eigh, m)?)?;
    m.add_function(wrap_pyfunction!(unit_constants, m)?)?;
    m.add_function(wrap_pyfunction!(hamiltonian::_spectrum_from_parts, m)?)?;
    m.add("ConvergenceError", m.py().get_type::<errors::ConvergenceError>())?;
    m.add("AccuracyWarning", m.py().get_type::<errors::AccuracyWarning>())?;
    m.add("UNITS", crate::error::choice_names(&crate::model::units::Units::TABLE))?;
    m.add("METHODS", crate::error::choice_names(&crate::eigen::Method::TABLE))?;
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    Ok(())
}

/// (ħ²/2m₁, ħ) of a unit system, in energy·length² and energy·time.
///
/// m₁ is the system's mass unit: m_e, or u for "cold-atom" and "molecular".
///
/// Parameters
/// ----------
/// units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}
///
/// Returns
/// -------
/// (float, float)
///
/// Raises
/// ------
/// ValueError
///     Unknown units.
///
/// Examples
/// --------
/// >>> import specwell as sw
/// >>> sw.unit_constants("natural")
/// (0.5, 1.0)
#[pyfunction]
fn unit_constants(units: &str) -> PyResult<(f64, f64)> {
    let u = crate::model::units::Units::parse(units).map_err(|e| pyo3::exceptions::PyValueError::new_err(e.to_string()))?;
    Ok((u.hbar2_over_2me(), u.hbar()))
}
