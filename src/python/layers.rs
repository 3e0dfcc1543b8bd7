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

/// One layer of a heterostructure: thickness (nm), conduction-band edge (meV), effective
/// mass (m_e); optionally doping (cm⁻³), relative permittivity and non-parabolicity (1/eV).
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
    #[getter]
    fn thickness(&self) -> f64 {
        self.inner.thickness
    }
    #[getter]
    fn band_edge(&self) -> f64 {
        self.inner.band_edge
    }
    #[getter]
    fn mass(&self) -> f64 {
        self.inner.mass
    }
    /// A layer of `material` (see `_core.pyi`): band edge relative to `reference`,
    /// mass, permittivity and non-parabolicity from the table.
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
    /// Net ionized dopant density (cm⁻³): donors > 0, acceptors < 0.
    #[getter]
    fn doping(&self) -> f64 {
        self.inner.doping
    }
    /// Static relative permittivity, or None.
    #[getter]
    fn permittivity(&self) -> Option<f64> {
        self.inner.permittivity
    }
    /// Non-parabolicity α (1/eV) of m(E) = m(1 + α(E − E_c)).
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

/// A stack of layers occupying z ∈ [0, total_thickness) in semiconductor units,
/// with an optional uniform field applied across the stack.
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
    #[getter]
    fn layers<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        PyList::new(py, self.inner.layers().iter().map(|l| PyLayer { inner: *l }))
    }
    #[getter]
    fn field_kv_cm(&self) -> f64 {
        self.inner.field_kv_cm()
    }
    /// Total thickness (nm).
    #[getter]
    fn total_thickness(&self) -> f64 {
        self.inner.total_thickness()
    }
    /// Interface positions (nm), including 0 and the total thickness.
    #[getter]
    fn interfaces<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.interfaces())
    }
    /// Conduction-band edge plus field term V(z) (meV) at points z (nm).
    fn potential<'py>(&self, py: Python<'py>, z: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let z = vec_f64(z, "z", None)?;
        crate::error::check_finite("z", &z).py(py)?;
        Ok(PyArray1::from_vec(py, self.inner.potential(&z)))
    }
    /// Effective mass m(z) (m_e) at points z (nm).
    fn mass<'py>(&self, py: Python<'py>, z: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let z = vec_f64(z, "z", None)?;
        crate::error::check_finite("z", &z).py(py)?;
        Ok(PyArray1::from_vec(py, self.inner.mass(&z)))
    }
    /// Levels on Legendre spectral elements, self-converged to `accuracy` (see `_core.pyi`).
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
    /// Schrödinger-Poisson solution with the layers' doping and permittivities (see `_core.pyi`).
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
    /// Minibands E_n(q) of the superlattice with this stack as one period (see `_core.pyi`).
    #[pyo3(signature = (q, count, *, accuracy=1e-10))]
    fn bands<'py>(&self, py: Python<'py>, q: &Bound<'py, PyAny>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, numpy::PyArray2<f64>>> {
        super::transport::bands(py, &self.inner, q, count, accuracy)
    }
    /// Bottom and top of each of the lowest `count` minibands (meV), shape (count, 2).
    #[pyo3(signature = (count, *, accuracy=1e-10))]
    fn minibands<'py>(&self, py: Python<'py>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, numpy::PyArray2<f64>>> {
        super::transport::minibands(py, &self.inner, count, accuracy)
    }
    /// Widths (meV) of the lowest `count` minibands.
    #[pyo3(signature = (count, *, accuracy=1e-10))]
    fn miniband_widths<'py>(&self, py: Python<'py>, count: &Bound<'py, PyAny>, accuracy: f64) -> PyResult<Bound<'py, PyArray1<f64>>> {
        super::transport::miniband_widths(py, &self.inner, count, accuracy)
    }
    /// Effective mass (m_e) at the bottom of miniband `band` (see `_core.pyi`).
    #[pyo3(signature = (band=None, *, accuracy=1e-10))]
    fn band_mass(&self, py: Python<'_>, band: Option<&Bound<'_, PyAny>>, accuracy: f64) -> PyResult<f64> {
        match band {
            Some(b) => super::transport::band_mass(py, &self.inner, b, accuracy),
            None => super::transport::band_mass(py, &self.inner, &0_i64.into_pyobject(py)?.into_any(), accuracy),
        }
    }
    /// Transmission probability between the claddings (see `_core.pyi`).
    #[pyo3(signature = (energies, *, reflection=false, accuracy=1e-10))]
    fn transmission<'py>(&self, py: Python<'py>, energies: &Bound<'py, PyAny>, reflection: bool, accuracy: f64) -> PyResult<Py<PyAny>> {
        super::transport::transmission(py, &self.inner, energies, reflection, accuracy)
    }
    /// Tsu-Esaki current density (A/cm²) at one bias (see `_core.pyi`).
    #[pyo3(signature = (bias, temperature, fermi_level, *, accuracy=1e-8, mesh_accuracy=1e-10))]
    fn current_density(&self, py: Python<'_>, bias: f64, temperature: f64, fermi_level: f64, accuracy: f64, mesh_accuracy: f64) -> PyResult<f64> {
        super::transport::current_density(py, &self.inner, bias, temperature, fermi_level, accuracy, mesh_accuracy)
    }
    /// Tsu-Esaki current density (A/cm²) at every bias, in parallel (see `_core.pyi`).
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
    /// Band edges of the left and right claddings (meV), field term included.
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
