//! Python `material()` and the Material class: the table lookup of the core, converted.

use super::errors::IntoPyResult;
use crate::model::materials::{self, Material, Nonparabolicity};
use pyo3::prelude::*;

/// Parameters of a III-V material at a composition and temperature (``specwell.material``).
///
/// Band parameters from Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001),
/// alloys with that compilation's bowing parameters; permittivities from a handbook.
/// Every value in the table was recalled from memory (see ``source``): verify the
/// parameters you rely on against the publications before using them for real work.
/// Energies in meV, masses in m_e.
#[pyclass(name = "Material", module = "specwell._core", frozen)]
#[derive(Clone)]
pub struct PyMaterial {
    pub inner: Material,
}

#[pymethods]
impl PyMaterial {
    /// Material name as given to ``specwell.material`` (one of ``specwell.MATERIALS``).
    #[getter]
    fn name(&self) -> &'static str {
        self.inner.name
    }
    /// Composition of a ternary (AlGaAs: Al fraction; InGaAs, InAlAs: In fraction; GaAsSb, InAsSb, AlAsSb: Sb fraction).
    #[getter]
    fn x(&self) -> Option<f64> {
        self.inner.x
    }
    /// Temperature (K) the gap was evaluated at (Varshni form).
    #[getter]
    fn temperature(&self) -> f64 {
        self.inner.temperature_k
    }
    /// Γ band gap E_g(T) (meV).
    #[getter]
    fn band_gap(&self) -> f64 {
        self.inner.band_gap
    }
    /// Valence-band maximum on the compilation's common scale (meV; InSb = 0).
    #[getter]
    fn valence_band(&self) -> f64 {
        self.inner.valence_band
    }
    /// Γ conduction-band edge, valence_band + band_gap (meV).
    #[getter]
    fn conduction_band(&self) -> f64 {
        self.inner.conduction_band
    }
    /// Γ electron effective mass (m_e).
    #[getter]
    fn mass(&self) -> f64 {
        self.inner.mass
    }
    /// Kane energy E_P (meV).
    #[getter]
    fn kane_energy(&self) -> f64 {
        self.inner.kane_energy
    }
    /// Spin-orbit splitting Δ_so (meV).
    #[getter]
    fn spin_orbit(&self) -> f64 {
        self.inner.spin_orbit
    }
    /// Static relative permittivity.
    #[getter]
    fn permittivity(&self) -> f64 {
        self.inner.permittivity
    }
    /// Lattice constant at 300 K (Å).
    #[getter]
    fn lattice_constant(&self) -> f64 {
        self.inner.lattice_constant
    }
    /// Where the row's numbers come from.
    #[getter]
    fn source(&self) -> &'static str {
        self.inner.source
    }
    /// Conduction-band non-parabolicity α (1/eV) of m(E) = m(1 + α(E − E_c)).
    ///
    /// Parameters
    /// ----------
    /// model : {"three_band", "two_band"}, default "three_band"
    ///     Kane model: "three_band" includes the spin-orbit splitting Δ_so; "two_band" gives
    ///     α ≈ 1/E_g.
    ///
    /// Returns
    /// -------
    /// float
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     Unknown model.
    #[pyo3(signature = (model="three_band"))]
    fn nonparabolicity(&self, py: Python<'_>, model: &str) -> PyResult<f64> {
        let m = crate::error::parse_choice("model", model, &Nonparabolicity::TABLE).py(py)?;
        Ok(self.inner.nonparabolicity(m))
    }
    fn __repr__(&self) -> String {
        let x = self.inner.x.map(|x| format!(", x={x}")).unwrap_or_default();
        format!(
            "Material({:?}{x}, T={} K: Eg={:.1} meV, Ec={:.1} meV, m={:.4} m_e, eps={:.2})",
            self.inner.name, self.inner.temperature_k, self.inner.band_gap, self.inner.conduction_band, self.inner.mass, self.inner.permittivity
        )
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyAny>, (&'static str, Option<f64>, f64))> {
        let m = &slf.get().inner;
        Ok((slf.py().import("specwell._core")?.getattr("material")?, (m.name, m.x, m.temperature_k)))
    }
}

/// Parameters of a III-V material at a composition and temperature.
///
/// Parameters
/// ----------
/// name : str
///     One of ``specwell.MATERIALS`` (e.g. "GaAs", "AlGaAs").
/// x : float, optional
///     Composition of a ternary, 0 ≤ x ≤ 1 (see ``Material.x`` for which element); None
///     for a binary (required for a ternary).
/// temperature : float, default 300.0
///     K, in [0, 800]; the band gap follows the Varshni form.
///
/// Returns
/// -------
/// Material
///
/// Notes
/// -----
/// The table's values were recalled from memory of the published compilation (see
/// ``Material.source``): verify the parameters you rely on before using them for real work.
///
/// Raises
/// ------
/// ValueError
///     Unknown name (the message lists the choices), x missing or outside [0, 1], x for a
///     binary, temperature out of range.
#[pyfunction]
#[pyo3(signature = (name, x=None, temperature=300.0))]
pub fn material(py: Python<'_>, name: &str, x: Option<f64>, temperature: f64) -> PyResult<PyMaterial> {
    Ok(PyMaterial { inner: materials::material(name, x, temperature).py(py)? })
}

/// The material names `material` accepts.
pub fn names() -> Vec<&'static str> {
    materials::material_names()
}
