//! Python classes Layer and Heterostructure.

use super::arrays::{to_usize, vec_f64};
use crate::eigen::stack::{solve_stack, StackOptions};
use crate::model::units::Units;
use super::display::table;
use super::errors::IntoPyResult;
use crate::model::stack::{Heterostructure, Layer};
use numpy::PyArray1;
use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;
use pyo3::types::{PyList, PyType};
use std::sync::Arc;

/// One layer: thickness (nm, > 0), conduction-band edge (meV), effective mass (m_e, > 0).
///
/// Parameters
/// ----------
/// thickness : float
///     Thickness (nm, finite, > 0).
/// band_edge : float
///     Conduction-band edge (meV, finite).
/// mass : float
///     Effective mass (m_e, finite, > 0).
/// doping : float, keyword-only, default 0.0
///     Net ionized dopant density (cm⁻³; donors > 0, acceptors < 0; |doping| ≤ 1e23), for
///     Schrödinger-Poisson.
/// permittivity : float or None, keyword-only, default None
///     Static relative permittivity ε_r (> 0; needed where there is charge).
/// nonparabolicity : float, keyword-only, default 0.0
///     α (1/eV, in [0, 100]) of the energy-dependent mass m(E) = m (1 + α (E − E_c))
///     (two-band Kane form); 0 for a parabolic band.
///
/// Raises
/// ------
/// TypeError
///     A non-numeric argument.
///
/// Notes
/// -----
/// The values are checked when a ``Heterostructure`` is built from the layer (ValueError
/// naming ``layers[i].thickness`` etc.), not here. Material parameters are the user's
/// responsibility (see ``specwell.material`` for a table recalled from the literature).
#[pyclass(name = "Layer", module = "specwell._core", frozen)]
#[derive(Clone)]
pub struct PyLayer {
    pub inner: Layer,
}

#[pymethods]
impl PyLayer {
    #[new]
    #[pyo3(signature = (thickness, band_edge, mass, *, doping=0.0, permittivity=None, nonparabolicity=0.0))]
    fn new(thickness: f64, band_edge: f64, mass: f64, doping: f64, permittivity: Option<f64>, nonparabolicity: f64) -> Self {
        // Validated by Heterostructure (which names the layer index).
        PyLayer { inner: Layer { thickness, band_edge, mass, doping, permittivity, nonparabolicity } }
    }
    /// Thickness (nm).
    #[getter]
    fn thickness(&self) -> f64 {
        self.inner.thickness
    }
    /// Conduction-band edge (meV).
    #[getter]
    fn band_edge(&self) -> f64 {
        self.inner.band_edge
    }
    /// Effective mass (m_e).
    #[getter]
    fn mass(&self) -> f64 {
        self.inner.mass
    }
    /// A layer of ``material`` with the table's band edge, mass, permittivity and non-parabolicity.
    ///
    /// Parameters
    /// ----------
    /// material : Material
    ///     From ``specwell.material``.
    /// thickness : float
    ///     Thickness (nm, > 0).
    /// reference : Material, optional
    ///     Band edge = the Γ conduction-band edge of ``material`` minus that of ``reference``
    ///     (meV); default None: on the compilation's absolute scale (InSb valence band = 0).
    /// nonparabolicity : {"three_band", "two_band"} or None, default "three_band"
    ///     Kane model of α (see ``Material.nonparabolicity``); None for a parabolic band.
    /// doping : float, default 0.0
    ///     Net ionized dopant density (cm⁻³).
    ///
    /// Returns
    /// -------
    /// Layer
    ///
    /// Raises
    /// ------
    /// TypeError
    ///     ``material`` or ``reference`` not a Material.
    /// ValueError
    ///     Unknown ``nonparabolicity`` model.
    #[classmethod]
    #[pyo3(signature = (material, thickness, *, reference=None, nonparabolicity="three_band", doping=0.0))]
    fn from_material(
        _cls: &Bound<'_, pyo3::types::PyType>,
        py: Python<'_>,
        material: &Bound<'_, PyAny>,
        thickness: f64,
        reference: Option<&Bound<'_, PyAny>>,
        nonparabolicity: Option<&str>,
        doping: f64,
    ) -> PyResult<Self> {
        let as_material = |obj: &Bound<'_, PyAny>, name: &str| -> PyResult<crate::model::materials::Material> {
            obj.cast::<super::materials::PyMaterial>().map(|m| m.get().inner.clone()).map_err(|_| {
                PyTypeError::new_err(format!("`{name}` must be a specwell.Material (from specwell.material(...)); got {}", obj.get_type().name().map(|n| n.to_string()).unwrap_or_default()))
            })
        };
        let m = as_material(material, "material")?;
        let r = reference.map(|r| as_material(r, "reference")).transpose()?;
        let model = nonparabolicity
            .map(|s| crate::error::parse_choice("nonparabolicity", s, &crate::model::materials::Nonparabolicity::TABLE))
            .transpose()
            .py(py)?;
        let mut layer = Layer::from_material(&m, thickness, r.as_ref(), model);
        layer.doping = doping;
        Ok(PyLayer { inner: layer })
    }
    /// Net ionized dopant density (cm⁻³).
    #[getter]
    fn doping(&self) -> f64 {
        self.inner.doping
    }
    /// Static relative permittivity, or None.
    #[getter]
    fn permittivity(&self) -> Option<f64> {
        self.inner.permittivity
    }
    /// Non-parabolicity α (1/eV).
    #[getter]
    fn nonparabolicity(&self) -> f64 {
        self.inner.nonparabolicity
    }
    fn __repr__(&self) -> String {
        layer_text(&self.inner)
    }
    fn __eq__(&self, other: &Bound<'_, PyAny>) -> bool {
        other.cast::<PyLayer>().map(|o| o.get().inner == self.inner).unwrap_or(false)
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyAny>, (f64, f64, f64, f64, Option<f64>, f64))> {
        let l = &slf.get().inner;
        let ctor = slf.py().import("specwell._core")?.getattr("_layer_from_parts")?;
        Ok((ctor, (l.thickness, l.band_edge, l.mass, l.doping, l.permittivity, l.nonparabolicity)))
    }
}

/// `Layer(…)` as typed, optional parts only when set.
fn layer_text(l: &Layer) -> String {
    let mut s = format!("Layer({}, {}, {}", l.thickness, l.band_edge, l.mass);
    if l.doping != 0.0 {
        s += &format!(", doping={:e}", l.doping);
    }
    if let Some(e) = l.permittivity {
        s += &format!(", permittivity={e}");
    }
    if l.nonparabolicity != 0.0 {
        s += &format!(", nonparabolicity={}", l.nonparabolicity);
    }
    s + ")"
}

/// Rebuild a Layer (target of `Layer.__reduce__`).
#[pyfunction]
pub fn _layer_from_parts(thickness: f64, band_edge: f64, mass: f64, doping: f64, permittivity: Option<f64>, nonparabolicity: f64) -> PyLayer {
    PyLayer { inner: Layer { thickness, band_edge, mass, doping, permittivity, nonparabolicity } }
}

/// A stack of layers on z ∈ [0, total_thickness) (nm) with an optional uniform field.
///
/// Parameters
/// ----------
/// layers : sequence of Layer
///     From left to right; the outer layers continue beyond the stack as flat semi-infinite
///     claddings.
/// field_kv_cm : float, default 0.0
///     Field (kV/cm, finite) applied across the stack only: V(z) = band edge +
///     0.1·F·(clamp(z, 0, L) − L/2) meV, constant in the claddings.
///
/// Raises
/// ------
/// TypeError
///     ``layers`` not a sequence of Layer.
/// ValueError
///     No layers, or a layer value out of range (the message names ``layers[i].<field>``),
///     non-finite field.
///
/// Notes
/// -----
/// Semiconductor units throughout (nm, meV, m_e). Model: single conduction band in the
/// envelope-function (BenDaniel-Duke) approximation with abrupt interfaces; no strain,
/// valence-band mixing or interface roughness. The results are only as good as the layer
/// parameters.
///
/// Examples
/// --------
/// A 10 nm GaAs-like well between 250 meV barriers:
///
/// >>> import specwell as sw
/// >>> stack = sw.Heterostructure([sw.Layer(20.0, 250.0, 0.092), sw.Layer(10.0, 0.0, 0.067),
/// ...                             sw.Layer(20.0, 250.0, 0.092)])
/// >>> st = stack.solve()
/// >>> bool(st.bound.all()), bool(0.0 < st.energies[0] < 250.0)
/// (True, True)
#[pyclass(name = "Heterostructure", module = "specwell._core", frozen)]
pub struct PyHeterostructure {
    pub inner: Arc<Heterostructure>,
}

#[pymethods]
impl PyHeterostructure {
    #[new]
    #[pyo3(signature = (layers, field_kv_cm=0.0))]
    fn new(py: Python<'_>, layers: &Bound<'_, PyAny>, field_kv_cm: f64) -> PyResult<Self> {
        let mut out = Vec::new();
        for (i, item) in layers.try_iter().map_err(|_| PyTypeError::new_err("`layers` must be a sequence of specwell.Layer"))?.enumerate() {
            let item = item?;
            let l = item.cast::<PyLayer>().map_err(|_| {
                PyTypeError::new_err(format!("`layers[{i}]` must be a specwell.Layer; got {}", item.get_type().name().map(|n| n.to_string()).unwrap_or_default()))
            })?;
            out.push(l.get().inner);
        }
        let h = Heterostructure::new(out, field_kv_cm).py(py)?;
        Ok(PyHeterostructure { inner: Arc::new(h) })
    }
    /// The layers.
    #[getter]
    fn layers<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        PyList::new(py, self.inner.layers().iter().map(|l| PyLayer { inner: *l }))
    }
    /// Field (kV/cm).
    #[getter]
    fn field_kv_cm(&self) -> f64 {
        self.inner.field_kv_cm()
    }
    /// Total thickness L (nm).
    #[getter]
    fn total_thickness(&self) -> f64 {
        self.inner.total_thickness()
    }
    /// Interface positions 0 = z_0 < … < z_n = L (nm).
    #[getter]
    fn interfaces<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.interfaces())
    }
    /// V(z) (meV): band edge plus field term, at points z (nm).
    ///
    /// Parameters
    /// ----------
    /// z : array_like
    ///     Positions (nm, finite); beyond both ends the claddings continue.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(z),)
    ///     At an interface, the value of the layer on its right.
    fn potential<'py>(&self, py: Python<'py>, z: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let z = vec_f64(z, "z", None)?;
        crate::error::check_finite("z", &z).py(py)?;
        Ok(PyArray1::from_vec(py, self.inner.potential(&z)))
    }
    /// m(z) (m_e) at points z (nm).
    ///
    /// Parameters
    /// ----------
    /// z : array_like
    ///     Positions (nm, finite).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(z),)
    fn mass<'py>(&self, py: Python<'py>, z: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let z = vec_f64(z, "z", None)?;
        crate::error::check_finite("z", &z).py(py)?;
        Ok(PyArray1::from_vec(py, self.inner.mass(&z)))
    }
    /// Levels on Legendre spectral elements, self-converged to ``accuracy``.
    ///
    /// The mesh has an element edge on every interface; the claddings are covered by
    /// elements that grow outwards to where the wanted levels have decayed. Levels are
    /// computed at orders p and p + 2 on one mesh until |E(p+2) − E(p)| ≤
    /// accuracy·max(|E|, E − V_min) for every requested level (V_min the lowest band edge);
    /// the p + 2 levels are returned with those differences as ``errors``. Layers with a
    /// non-parabolicity α ≠ 0 are solved level by level for the fixed point E_i = λ_i(H(E_i))
    /// with the energy-dependent masses m(E) = m(1 + α(E − E_c)).
    ///
    /// Parameters
    /// ----------
    /// count : int, optional
    ///     Number of levels, 1 ≤ count ≤ 100000; default None: all bound levels (below both
    ///     cladding edges). Levels above the cladding edges are box states of the truncated
    ///     claddings (``bound`` False), not resonances.
    /// accuracy : float, default 1e-10
    ///     Relative accuracy in [1e-13, 1e-2].
    /// order : int, optional
    ///     Starting element order, 2 ≤ order ≤ 62; default None: chosen from the accuracy.
    /// element_length : float, keyword-only, default 15.0
    ///     Longest element inside a layer (nm); shortened for the wavenumbers of the levels.
    ///
    /// Returns
    /// -------
    /// Spectrum
    ///     On an ``ElementBasis``; ``errors`` and ``bound`` are set, wavefunctions evaluate
    ///     anywhere (0 beyond the cladding depth, where the tails are below the accuracy).
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     count, accuracy or order out of range; an accuracy the mesh refinement cannot
    ///     reach.
    ///
    /// Warns
    /// -----
    /// AccuracyWarning
    ///     Round-off limits some level (see ``Spectrum.attainable_accuracy``).
    ///
    /// Notes
    /// -----
    /// ``errors`` estimate the discretisation error of the single-band model, not the error of
    /// the model or of the layer parameters, which usually dominates (meV, not 1e-10 relative).
    #[pyo3(signature = (count=None, accuracy=1e-10, *, order=None, element_length=15.0))]
    fn solve(
        &self,
        py: Python<'_>,
        count: Option<&Bound<'_, PyAny>>,
        accuracy: f64,
        order: Option<&Bound<'_, PyAny>>,
        element_length: f64,
    ) -> PyResult<super::hamiltonian::PySpectrum> {
        let mut o = StackOptions::new(count.map(|c| to_usize(c, "count", 1, 100_000)).transpose()?, accuracy);
        o.order = order.map(|p| to_usize(p, "order", 2, crate::basis::gll::MAX_ORDER - 2)).transpose()?;
        o.element_length = element_length;
        let stack = self.inner.clone();
        let s = py.detach(move || solve_stack(&stack, &o, Units::Semiconductor)).py(py)?;
        super::errors::warn_accuracy(py, &s)?;
        Ok(super::hamiltonian::PySpectrum { inner: Arc::new(s) })
    }
    /// Schrödinger-Poisson solution with the layers' doping and permittivities.
    ///
    /// Donors (acceptors: negative doping) are fully ionised inside the stack; the
    /// claddings are undoped. Electrons fill the bound subbands of the total band edge by
    /// 2D Fermi-Dirac statistics with spin, n_i = (m_i k_B T/πħ²) ln(1 + e^{(E_F − E_i)/k_B T})
    /// with m_i = ⟨i|m|i⟩ the in-plane mass; Poisson's equation on the same element mesh
    /// (exact for piecewise-constant charge, flux-continuous ε); Anderson mixing of the
    /// electrostatic energy to max|U_out − U_in| ≤ ``tol`` meV. Mean field only (plus the
    /// optional LDA exchange-correlation, an approximation); continuum states above the
    /// lower cladding edge hold no charge (a low-temperature model).
    ///
    /// Parameters
    /// ----------
    /// temperature : float
    ///     K, > 0.
    /// fermi_level : float, optional
    ///     Default None: E_F from overall neutrality with zero field at both ends. Given
    ///     (meV): E_F fixed, U = 0 at the left end (or set by ``surface_barrier``), zero
    ///     field at the right end.
    /// surface_barrier : float, optional
    ///     A surface (Schottky-type) barrier φ_B (meV) pinning E_F at the left end:
    ///     E_c(0) + U(0) − E_F = φ_B. Needs ``fermi_level``.
    /// tol : float
    ///     Self-consistency of the electrostatic energy (meV).
    /// max_iter : int
    ///     Iterations before a ``ConvergenceError`` (its ``rates`` hold the residual history).
    /// exchange_correlation : bool
    ///     Add the Hedin-Lundqvist (1971) LDA exchange-correlation potential.
    /// accuracy : float
    ///     Relative accuracy of the levels (sizes the element mesh).
    /// mixing : float
    ///     Anderson mixing damping in (0, 1].
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     Non-positive temperature, a layer without permittivity, ``surface_barrier``
    ///     without ``fermi_level``.
    /// ConvergenceError
    ///     No convergence within ``max_iter``.
    ///
    /// Warns
    /// -----
    /// UserWarning
    ///     A structure without net donor charge: E_F is undefined; the flat-band levels
    ///     are returned (``note`` says so).
    #[pyo3(signature = (temperature, *, fermi_level=None, surface_barrier=None, tol=1e-6, max_iter=100,
                        exchange_correlation=false, accuracy=1e-10, mixing=0.3))]
    fn self_consistent(
        &self,
        py: Python<'_>,
        temperature: f64,
        fermi_level: Option<f64>,
        surface_barrier: Option<f64>,
        tol: f64,
        max_iter: usize,
        exchange_correlation: bool,
        accuracy: f64,
        mixing: f64,
    ) -> PyResult<super::selfconsistent::PySelfConsistent> {
        let o = super::selfconsistent::options(temperature, fermi_level, surface_barrier, tol, max_iter, exchange_correlation, accuracy, mixing)?;
        let stack = self.inner.clone();
        let s = py.detach(move || crate::selfconsistent::solve(&stack, &o)).py(py)?;
        super::selfconsistent::wrap(py, s)
    }
    /// Minibands E_n(q) (meV) of the infinite superlattice whose period is this stack.
    ///
    /// Bloch-periodic spectral elements ψ(z + d) = e^{iqd} ψ(z), d = ``total_thickness``
    /// (the last node of the period is the first times the Bloch phase: a Hermitian
    /// pencil). Bands are converged at q = 0 and π/d (orders p and p + 2 agree to
    /// ``accuracy`` relative to max(|E|, E − V_min)).
    ///
    /// Parameters
    /// ----------
    /// q : float or array_like
    ///     Bloch wavevectors (1/nm). E(q) is periodic with period 2π/d and even, so every q
    ///     is folded into the first zone: q → |q − (2π/d)·round(qd/2π)| (no error).
    /// count : int
    ///     Number of bands, 1 ≤ count ≤ 10000.
    /// accuracy : float
    ///     Relative accuracy in [1e-13, 1e-3].
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(q), count)
    ///     Energies, ascending in each row (one row for a scalar q).
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     A field (``field_kv_cm`` ≠ 0 breaks the periodicity), non-parabolic layers,
    ///     non-finite q, count or accuracy out of range.
    #[pyo3(signature = (q, count, *, accuracy=1e-10))]
    fn bands<'py>(&self, py: Python<'py>, q: &Bound<'py, PyAny>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, numpy::PyArray2<f64>>> {
        super::transport::bands(py, &self.inner, q, count, accuracy)
    }
    /// Bottom and top (meV) of each of the lowest ``count`` minibands.
    ///
    /// From the bands at q = 0 and q = π/d (a 1D band is monotonic in |q| between them).
    ///
    /// Parameters
    /// ----------
    /// count : int
    ///     Number of minibands, 1 ≤ count ≤ 10000.
    /// accuracy : float, keyword-only, default 1e-10
    ///     Relative accuracy in [1e-13, 1e-3] (see ``bands``).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (count, 2)
    ///     (bottom, top) per band.
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     As for ``bands``.
    #[pyo3(signature = (count, *, accuracy=1e-10))]
    fn minibands<'py>(&self, py: Python<'py>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, numpy::PyArray2<f64>>> {
        super::transport::minibands(py, &self.inner, count, accuracy)
    }
    /// Widths (meV) of the lowest ``count`` minibands, top − bottom.
    ///
    /// Parameters
    /// ----------
    /// count : int
    ///     Number of minibands, 1 ≤ count ≤ 10000.
    /// accuracy : float, keyword-only, default 1e-10
    ///     Relative accuracy in [1e-13, 1e-3] (see ``bands``).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (count,)
    ///
    /// Notes
    /// -----
    /// A narrow band's width is a difference of two nearly equal energies: its relative
    /// error is about accuracy·|E|/width, not ``accuracy``.
    #[pyo3(signature = (count, *, accuracy=1e-10))]
    fn miniband_widths<'py>(&self, py: Python<'py>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, PyArray1<f64>>> {
        super::transport::miniband_widths(py, &self.inner, count, accuracy)
    }
    /// Effective mass m* (m_e) at the bottom of a miniband.
    ///
    /// m* = 2(ħ²/2m_e)/(d²E/dq²), the curvature from second-order perturbation theory in
    /// the Bloch phase on the discretised bands. The bottom of band n lies at q = 0 for
    /// even n and at q = π/d for odd n.
    ///
    /// Parameters
    /// ----------
    /// band : int, optional
    ///     Band index (≥ 0); default None means band 0.
    /// accuracy : float, keyword-only, default 1e-10
    ///     Relative accuracy of the bands in [1e-13, 1e-3].
    ///
    /// Returns
    /// -------
    /// float
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     A band edge touching its neighbour (closed gap), a field, non-parabolic layers,
    ///     ``band`` or ``accuracy`` out of range.
    #[pyo3(signature = (band=None, *, accuracy=1e-10))]
    fn band_mass(&self, py: Python<'_>, band: Option<&Bound<'_, PyAny>>, accuracy: f64) -> PyResult<f64> {
        match band {
            Some(b) => super::transport::band_mass(py, &self.inner, b, accuracy),
            None => super::transport::band_mass(py, &self.inner, &0_i64.into_pyobject(py)?.into_any(), accuracy),
        }
    }
    /// Transmission probability T(E) between the claddings, which act as leads.
    ///
    /// The quantum transmitting boundary method (Lent & Kirkner 1990) on spectral elements
    /// covering the stack: plane waves in the flat leads (k = √(m(E − V)/(ħ²/2m_e))),
    /// BenDaniel-Duke matching, the field (if any) linear inside the stack, so the leads
    /// may sit at different band edges. T = (k_R/m_R)/(k_L/m_L)·|t|², R = |r|², T + R = 1.
    /// Where only one lead is open T = 0 and R = 1. The mesh is converged for the highest
    /// energy asked (orders p and p + 2 agree on T to ``accuracy``, or on the energy of a
    /// narrow resonance to ``accuracy`` relative).
    ///
    /// Parameters
    /// ----------
    /// energies : float or array_like
    ///     Energies (meV), at or above the lower lead band edge min(cladding_edges).
    /// reflection : bool
    ///     Also return R.
    /// accuracy : float
    ///     In [1e-13, 1e-3].
    ///
    /// Returns
    /// -------
    /// T, or (T, R)
    ///     Floats for a scalar energy, arrays of len(energies) otherwise.
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     An energy below both leads or not finite; non-parabolic layers.
    #[pyo3(signature = (energies, *, reflection=false, accuracy=1e-10))]
    fn transmission<'py>(&self, py: Python<'py>, energies: &Bound<'py, PyAny>, reflection: bool, accuracy: f64) -> PyResult<Py<PyAny>> {
        super::transport::transmission(py, &self.inner, energies, reflection, accuracy)
    }
    /// Tsu-Esaki (1973) tunnelling current density J (A/cm²) with Fermi-Dirac leads.
    ///
    /// J = (e m kT/(2π²ħ³)) ∫ T(E, V) ln[(1 + e^{(μ_L − E)/kT})/(1 + e^{(μ_R − E)/kT})] dE, m the
    /// left (emitter) lead mass. The bias V (volts) is the field F = −10⁴·V/L kV/cm (L in nm)
    /// across the stack, replacing ``field_kv_cm``: the right lead sits 1000·V meV below
    /// the left one. Both leads hold ``fermi_level`` E_F above their band edge:
    /// μ_L = V_L + E_F, μ_R = μ_L − 1000·V. The integral runs from max(V_L, V_R) to
    /// max(μ_L, μ_R) + 40 kT, cut at every pole found and at E_r ± Γ·{½, 5, 50}, by adaptive
    /// Gauss-Legendre quadrature whose summed error estimates are ≤ ``accuracy``·|J|.
    ///
    /// Parameters
    /// ----------
    /// bias : float
    ///     Volts (finite).
    /// temperature : float
    ///     Kelvin, > 0.
    /// fermi_level : float
    ///     E_F − E_c in both leads (meV).
    /// accuracy : float
    ///     Relative tolerance of the energy integral, in [1e-10, 1e-2].
    /// mesh_accuracy : float
    ///     Accuracy of T(E) (see ``transmission``), in [1e-13, 1e-3].
    ///
    /// Returns
    /// -------
    /// float
    ///     J (A/cm²), with the sign of μ_L − μ_R (positive for bias > 0, electrons flowing
    ///     from the left lead to the right one).
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     Non-finite bias, non-positive temperature, accuracy or mesh_accuracy out of range,
    ///     non-parabolic layers.
    ///
    /// Notes
    /// -----
    /// Coherent tunnelling only (no scattering, no charge self-consistency, the bias drops
    /// linearly across the stack): a model for trends, not device currents.
    #[pyo3(signature = (bias, temperature, fermi_level, *, accuracy=1e-8, mesh_accuracy=1e-10))]
    fn current_density(&self, py: Python<'_>, bias: f64, temperature: f64, fermi_level: f64, accuracy: f64, mesh_accuracy: f64) -> PyResult<f64> {
        super::transport::current_density(py, &self.inner, bias, temperature, fermi_level, accuracy, mesh_accuracy)
    }
    /// ``current_density`` at every bias, in parallel over the biases (GIL released).
    ///
    /// Parameters
    /// ----------
    /// biases : array_like
    ///     Biases (volts, finite).
    /// temperature, fermi_level, accuracy, mesh_accuracy
    ///     As for ``current_density`` (``accuracy`` and ``mesh_accuracy`` keyword-only).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(biases),)
    ///     J (A/cm²).
    #[pyo3(signature = (biases, temperature, fermi_level, *, accuracy=1e-8, mesh_accuracy=1e-10))]
    fn current_voltage<'py>(
        &self,
        py: Python<'py>,
        biases: &Bound<'py, PyAny>,
        temperature: f64,
        fermi_level: f64,
        accuracy: f64,
        mesh_accuracy: f64,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        super::transport::current_voltage(py, &self.inner, biases, temperature, fermi_level, accuracy, mesh_accuracy)
    }
    /// Band edges (meV) of the left and right claddings, field term included: a level below both is bound.
    #[getter]
    fn cladding_edges(&self) -> (f64, f64) {
        self.inner.cladding_edges()
    }
    fn __len__(&self) -> usize {
        self.inner.layers().len()
    }
    fn __repr__(&self) -> String {
        let layers: Vec<String> = self.inner.layers().iter().map(layer_text).collect();
        format!("Heterostructure([{}], field_kv_cm={})", layers.join(", "), self.inner.field_kv_cm())
    }
    fn _repr_html_(&self) -> String {
        let header = vec!["layer".into(), "from (nm)".into(), "thickness (nm)".into(), "band edge (meV)".into(), "mass (m_e)".into()];
        let z = self.inner.interfaces();
        let rows: Vec<Vec<String>> = self
            .inner
            .layers()
            .iter()
            .enumerate()
            .map(|(i, l)| vec![i.to_string(), format!("{:.3}", z[i]), format!("{}", l.thickness), format!("{}", l.band_edge), format!("{}", l.mass)])
            .collect();
        table(&format!("Heterostructure, field {} kV/cm", self.inner.field_kv_cm()), &header, &rows, 100)
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyType>, (Bound<'py, PyList>, f64))> {
        let py = slf.py();
        let s = slf.get();
        Ok((slf.get_type(), (s.layers(py)?, s.inner.field_kv_cm())))
    }
}
