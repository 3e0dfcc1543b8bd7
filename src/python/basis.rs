//! Python classes HermiteBasis, FourierGrid and ProductGrid.

use super::arrays::{shaped_array, to_usize, vec_f64};
use super::errors::IntoPyResult;
use crate::basis::{fourier, hermite, Basis, BasisRef, ElementBasis, FourierGrid, HermiteBasis, PeriodicGrid, ProductGrid};
use numpy::PyArray1;
use super::display::key_value_table;
use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;
use pyo3::types::PyType;
use std::sync::Arc;

/// Gauss-Hermite function basis χ_n(x) = ψ_n((x − center)/length)/sqrt(length), n < size.
///
/// ψ_n are the orthonormal Hermite functions (harmonic-oscillator eigenfunctions of
/// oscillator length ``length``). The kinetic matrix is exact (pentadiagonal in n);
/// potentials are sampled at ``quadrature`` Gauss-Hermite nodes ``x``.
///
/// Parameters
/// ----------
/// size : int
///     Number of functions, 1 ≤ size ≤ 20000.
/// center : float, default 0.0
///     Centre of the basis (length units, finite).
/// length : float, default 1.0
///     Oscillator length (> 0, length units). Best near √(ħ/(mω)) of the potential's
///     harmonic part: the functions then resemble the states.
/// quadrature : int, optional
///     Number of quadrature nodes, size < quadrature ≤ 80000; default None means 2·size.
///     Matrix elements of polynomial potentials of degree ≤ 2(quadrature − size) + 1 are exact.
///
/// Raises
/// ------
/// ValueError
///     If an argument is outside its range (the message names it).
/// TypeError
///     ``size`` or ``quadrature`` not an integer.
///
/// Notes
/// -----
/// The basis reaches |x − center| ≲ length·sqrt(2·size): states that extend further, or
/// potentials with steps, converge slowly; use a FourierGrid or an ElementBasis there.
#[pyclass(name = "HermiteBasis", module = "specwell._core", frozen)]
pub struct PyHermiteBasis {
    pub inner: Arc<HermiteBasis>,
}

#[pymethods]
impl PyHermiteBasis {
    #[new]
    #[pyo3(signature = (size, center=0.0, length=1.0, quadrature=None))]
    fn new(
        py: Python<'_>,
        size: &Bound<'_, PyAny>,
        center: f64,
        length: f64,
        quadrature: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let size = to_usize(size, "size", 1, hermite::MAX_SIZE)?;
        let quadrature = quadrature.map(|q| to_usize(q, "quadrature", size + 1, 4 * hermite::MAX_SIZE)).transpose()?;
        let inner = py.detach(|| HermiteBasis::new(size, center, length, quadrature)).py(py)?;
        Ok(PyHermiteBasis { inner: Arc::new(inner) })
    }
    /// Number of basis functions.
    #[getter]
    fn size(&self) -> usize {
        self.inner.size()
    }
    /// Centre of the basis.
    #[getter]
    fn center(&self) -> f64 {
        self.inner.center()
    }
    /// Oscillator length.
    #[getter]
    fn length(&self) -> f64 {
        self.inner.length()
    }
    /// Number of quadrature nodes.
    #[getter]
    fn quadrature(&self) -> usize {
        self.inner.quadrature()
    }
    /// Quadrature points center + length·ξ_k where potentials are sampled, ascending.
    #[getter]
    fn x<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.points())
    }
    /// Dimensionless Gauss-Hermite nodes ξ_k (weight e^{−ξ²}).
    #[getter]
    fn nodes<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.nodes())
    }
    fn __len__(&self) -> usize {
        self.inner.size()
    }
    fn __repr__(&self) -> String {
        self.inner.describe()
    }
    fn _repr_html_(&self) -> String {
        let b = &self.inner;
        key_value_table(
            "HermiteBasis",
            &[
                ("size", b.size().to_string()),
                ("center", b.center().to_string()),
                ("length", b.length().to_string()),
                ("quadrature nodes", b.quadrature().to_string()),
                ("x range of nodes", format!("[{:.4}, {:.4}]", b.points()[0], b.points()[b.points().len() - 1])),
            ],
        )
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> (Bound<'py, PyType>, (usize, f64, f64, usize)) {
        let b = &slf.get().inner;
        (slf.get_type(), (b.size(), b.center(), b.length(), b.quadrature()))
    }
}

/// Periodic grid on [start, stop) with ``points`` points (Fourier-grid basis).
///
/// Parameters
/// ----------
/// start, stop : float
///     Box bounds (length units), finite, stop > start.
/// points : int
///     Number of grid points, 2 ≤ points ≤ 2**28.
///
/// Raises
/// ------
/// ValueError
///     Non-finite bounds, stop ≤ start, points out of range.
/// TypeError
///     ``points`` not an integer.
///
/// Notes
/// -----
/// x_j = start + j·dx, dx = (stop − start)/points; k = 2π·fftfreq(points, dx). State
/// coefficients in this basis are ψ(x_j)·sqrt(dx). The box is periodic: a state that does
/// not vanish at the edges meets its own image; make the box wider than the states.
///
/// Examples
/// --------
/// >>> import specwell as sw
/// >>> g = sw.FourierGrid(-5.0, 5.0, 100)
/// >>> g.dx, float(g.x[0]), len(g)
/// (0.1, -5.0, 100)
#[pyclass(name = "FourierGrid", module = "specwell._core", frozen)]
pub struct PyFourierGrid {
    pub inner: Arc<FourierGrid>,
}

#[pymethods]
impl PyFourierGrid {
    #[new]
    fn new(py: Python<'_>, start: f64, stop: f64, points: &Bound<'_, PyAny>) -> PyResult<Self> {
        let points = to_usize(points, "points", 2, fourier::MAX_POINTS)?;
        let inner = py.detach(|| FourierGrid::new(start, stop, points)).py(py)?;
        Ok(PyFourierGrid { inner: Arc::new(inner) })
    }
    /// Left end of the box.
    #[getter]
    fn start(&self) -> f64 {
        self.inner.start()
    }
    /// Right end of the box (excluded).
    #[getter]
    fn stop(&self) -> f64 {
        self.inner.stop()
    }
    /// Number of grid points.
    #[getter]
    fn points(&self) -> usize {
        self.inner.len()
    }
    /// Number of basis functions (= points).
    #[getter]
    fn size(&self) -> usize {
        self.inner.len()
    }
    /// Grid spacing.
    #[getter]
    fn dx(&self) -> f64 {
        self.inner.dx()
    }
    /// Grid points.
    #[getter]
    fn x<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.x())
    }
    /// Wave numbers 2π·fftfreq(points, dx).
    #[getter]
    fn k<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.k())
    }
    fn __len__(&self) -> usize {
        self.inner.len()
    }
    fn __repr__(&self) -> String {
        self.inner.describe()
    }
    fn _repr_html_(&self) -> String {
        let g = &self.inner;
        key_value_table(
            "FourierGrid",
            &[
                ("box", format!("[{}, {})", g.start(), g.stop())),
                ("points", g.len().to_string()),
                ("dx", format!("{:.6e}", g.dx())),
                ("k max", format!("{:.6e}", std::f64::consts::PI / g.dx())),
            ],
        )
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> (Bound<'py, PyType>, (f64, f64, usize)) {
        let g = &slf.get().inner;
        (slf.get_type(), (g.start(), g.stop(), g.len()))
    }
}

/// Legendre spectral elements: Lagrange polynomials of order ``order`` on the
/// Gauss-Lobatto-Legendre nodes of every element, continuous across elements, ψ = 0 at
/// both ends.
///
/// Elements have their edges on the given breakpoints (each interval one element, or
/// split evenly into pieces no longer than ``max_element_length``). Put a breakpoint on
/// every jump of the potential or the mass and on every kink of the potential: the
/// levels then converge spectrally (exponentially in the order). The BenDaniel-Duke
/// condition (ψ'/m continuous) is natural in the weak form. Potentials and masses are
/// sampled on ``x``, the GLL nodes of every element with each element's two ends moved
/// one ulp inward, so a callable with a jump at a breakpoint is evaluated on the side
/// the element uses. Coefficient vectors are the nodal values ψ(nodes[1:-1]).
///
/// Parameters
/// ----------
/// breakpoints : array_like
///     Strictly increasing, finite, at least two (length units).
/// order : int, default 16
///     Polynomial order p of every element, 2 ≤ p ≤ 64.
/// max_element_length : float, optional
///     Split intervals longer than this (> 0, length units) into equal elements; default None:
///     one element per interval.
///
/// Raises
/// ------
/// ValueError
///     Breakpoints not strictly increasing, fewer than two or not finite; order or
///     max_element_length out of range.
/// TypeError
///     ``order`` not an integer.
///
/// Notes
/// -----
/// The Dirichlet ends are hard walls: put them where the wanted states have decayed.
///
/// Examples
/// --------
/// Infinite square well of width 1 (E_n = n²π²/2 in natural units):
///
/// >>> import numpy as np
/// >>> import specwell as sw
/// >>> st = sw.Hamiltonian(sw.ElementBasis([0.0, 0.5, 1.0]), lambda x: 0.0 * x).solve(2)
/// >>> np.allclose(st.energies, np.array([1, 4]) * np.pi**2 / 2, rtol=1e-10)
/// True
#[pyclass(name = "ElementBasis", module = "specwell._core", frozen)]
pub struct PyElementBasis {
    pub inner: Arc<ElementBasis>,
}

#[pymethods]
impl PyElementBasis {
    #[new]
    #[pyo3(signature = (breakpoints, order=None, max_element_length=None), text_signature = "(breakpoints, order=16, max_element_length=None)")]
    fn new(py: Python<'_>, breakpoints: &Bound<'_, PyAny>, order: Option<&Bound<'_, PyAny>>, max_element_length: Option<f64>) -> PyResult<Self> {
        let b = vec_f64(breakpoints, "breakpoints", None)?;
        let order = order.map(|o| to_usize(o, "order", 2, crate::basis::gll::MAX_ORDER)).transpose()?.unwrap_or(16);
        let inner = py.detach(|| ElementBasis::new(&b, order, max_element_length)).py(py)?;
        Ok(PyElementBasis { inner: Arc::new(inner) })
    }
    /// Polynomial order p of every element.
    #[getter]
    fn order(&self) -> usize {
        self.inner.order()
    }
    /// Number of unknowns, n_elements·p − 1.
    #[getter]
    fn size(&self) -> usize {
        self.inner.size()
    }
    /// Element edges after splitting (length n_elements + 1).
    #[getter]
    fn edges<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_vec(py, self.inner.edges())
    }
    /// The breakpoints given.
    #[getter]
    fn breakpoints<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.breakpoints())
    }
    /// Sample points of potentials and masses, length n_elements·(p+1) (element ends nudged inward).
    #[getter]
    fn x<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.points())
    }
    /// Global nodes including both ends (length n_elements·p + 1).
    #[getter]
    fn nodes<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.nodes())
    }
    fn __len__(&self) -> usize {
        self.inner.size()
    }
    fn __repr__(&self) -> String {
        self.inner.describe()
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> (Bound<'py, PyType>, (Vec<f64>, usize)) {
        let b = &slf.get().inner;
        (slf.get_type(), (b.edges(), b.order()))
    }
}

/// Periodic 2D or 3D grid: the tensor product of FourierGrids (x, y[, z]).
///
/// Parameters
/// ----------
/// gx, gy : FourierGrid
///     The x and y axes.
/// gz : FourierGrid, optional
///     The z axis (3D).
///
/// Notes
/// -----
/// States, potentials and absorbing potentials on the grid are arrays of shape ``shape`` =
/// (nx, ny[, nz]) indexed [i, j(, l)] ↔ (x_i, y_j(, z_l)) (numpy C order, ``indexing="ij"``).
/// The discrete norm is Σ|ψ|²·dV with dV = dx·dy(·dz). Split-step FFTs run along each axis
/// with the axes' plans, over rayon workers for grids of 2**15 points or more.
///
/// Raises
/// ------
/// TypeError
///     An axis is not a FourierGrid (the message names gx, gy or gz).
/// ValueError
///     More than 2**28 points in all.
#[pyclass(name = "ProductGrid", module = "specwell._core", frozen)]
pub struct PyProductGrid {
    pub inner: Arc<ProductGrid>,
    axes: Vec<Py<PyFourierGrid>>,
}

#[pymethods]
impl PyProductGrid {
    #[new]
    #[pyo3(signature = (gx, gy, gz=None))]
    fn new(py: Python<'_>, gx: &Bound<'_, PyAny>, gy: &Bound<'_, PyAny>, gz: Option<&Bound<'_, PyAny>>) -> PyResult<Self> {
        let mut axes = Vec::new();
        for (name, g) in [("gx", Some(gx)), ("gy", Some(gy)), ("gz", gz)] {
            let Some(g) = g else { continue };
            let fg = g.cast::<PyFourierGrid>().map_err(|_| {
                PyTypeError::new_err(format!(
                    "`{name}` must be a specwell.FourierGrid (one axis of the product grid); got {}",
                    g.get_type().name().map(|n| n.to_string()).unwrap_or_default()
                ))
            })?;
            axes.push(fg.clone().unbind());
        }
        let grids = axes.iter().map(|g| g.get().inner.clone()).collect();
        let inner = py.detach(|| ProductGrid::new(grids)).py(py)?;
        Ok(PyProductGrid { inner: Arc::new(inner), axes })
    }
    /// Points per axis (nx, ny[, nz]).
    #[getter]
    fn shape(&self) -> Vec<usize> {
        self.inner.shape()
    }
    /// Number of axes (2 or 3).
    #[getter]
    fn ndim(&self) -> usize {
        self.inner.ndim()
    }
    /// Total number of points.
    #[getter]
    fn points(&self) -> usize {
        PeriodicGrid::len(&*self.inner)
    }
    /// The axis grids (x, y[, z]).
    #[getter]
    fn axes(&self, py: Python<'_>) -> Vec<Py<PyFourierGrid>> {
        self.axes.iter().map(|g| g.clone_ref(py)).collect()
    }
    /// Points of the x axis.
    #[getter]
    fn x<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.axis(0).x())
    }
    /// Points of the y axis.
    #[getter]
    fn y<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.axis(1).x())
    }
    /// Points of the z axis (None on a 2D grid).
    #[getter]
    fn z<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        (self.inner.ndim() == 3).then(|| PyArray1::from_slice(py, self.inner.axis(2).x()))
    }
    /// Grid spacings (dx, dy[, dz]).
    #[getter]
    fn spacing(&self) -> Vec<f64> {
        (0..self.inner.ndim()).map(|a| self.inner.axis(a).dx()).collect()
    }
    /// Cell volume dx·dy[·dz].
    #[getter(dV)]
    fn dv(&self) -> f64 {
        self.inner.cell_volume()
    }
    /// Wave numbers 2π·fftfreq(n, d) of each axis.
    #[getter]
    fn k<'py>(&self, py: Python<'py>) -> Vec<Bound<'py, PyArray1<f64>>> {
        (0..self.inner.ndim()).map(|a| PyArray1::from_slice(py, self.inner.axis(a).k())).collect()
    }
    /// |k|² = Σ k_a² on ``shape`` (FFT layout: numpy fftfreq order on every axis).
    #[getter]
    fn k_squared<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, numpy::PyArrayDyn<f64>>> {
        shaped_array(py, &self.inner.shape(), self.inner.k_squared())
    }
    /// Coordinate arrays of the grid points, ``numpy.meshgrid(x, y[, z], indexing="ij", sparse=sparse)``.
    ///
    /// Parameters
    /// ----------
    /// sparse : bool, default False
    ///     Broadcastable arrays of shapes (nx, 1[, 1]), (1, ny[, 1]) … instead of full ones.
    ///
    /// Returns
    /// -------
    /// tuple of ndarray
    ///     (X, Y) or (X, Y, Z).
    #[pyo3(signature = (sparse=false))]
    fn mesh<'py>(&self, py: Python<'py>, sparse: bool) -> PyResult<Bound<'py, PyAny>> {
        let np = py.import("numpy")?;
        let axes: Vec<Bound<'py, PyArray1<f64>>> =
            (0..self.inner.ndim()).map(|a| PyArray1::from_slice(py, self.inner.axis(a).x())).collect();
        let kwargs = pyo3::types::PyDict::new(py);
        kwargs.set_item("indexing", "ij")?;
        kwargs.set_item("sparse", sparse)?;
        let out = np.getattr("meshgrid")?.call(pyo3::types::PyTuple::new(py, axes)?, Some(&kwargs))?;
        Ok(pyo3::types::PyTuple::new(py, out.try_iter()?.collect::<PyResult<Vec<_>>>()?)?.into_any())
    }
    fn __len__(&self) -> usize {
        PeriodicGrid::len(&*self.inner)
    }
    fn __repr__(&self) -> String {
        self.inner.describe_grid()
    }
    fn _repr_html_(&self) -> String {
        let g = &self.inner;
        let names = ["x", "y", "z"];
        let mut rows: Vec<(&str, String)> = (0..g.ndim())
            .map(|a| {
                let ax = g.axis(a);
                (names[a], format!("[{}, {}) × {} (d{} = {:.4e})", ax.start(), ax.stop(), ax.len(), names[a], ax.dx()))
            })
            .collect();
        rows.push(("points", PeriodicGrid::len(&**g).to_string()));
        key_value_table("ProductGrid", &rows)
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyType>, Bound<'py, pyo3::types::PyTuple>)> {
        let py = slf.py();
        let args = pyo3::types::PyTuple::new(py, slf.get().axes.iter().map(|g| g.clone_ref(py)))?;
        Ok((slf.get_type(), args))
    }
}

/// Accept a HermiteBasis, FourierGrid or ElementBasis as `name`.
pub fn extract_basis(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<BasisRef> {
    if let Ok(b) = obj.cast::<PyHermiteBasis>() {
        return Ok(BasisRef::Hermite(b.get().inner.clone()));
    }
    if let Ok(g) = obj.cast::<PyFourierGrid>() {
        return Ok(BasisRef::Fourier(g.get().inner.clone()));
    }
    if let Ok(e) = obj.cast::<PyElementBasis>() {
        return Ok(BasisRef::Elements(e.get().inner.clone()));
    }
    Err(PyTypeError::new_err(format!(
        "`{name}` must be a specwell.HermiteBasis, FourierGrid or ElementBasis; got {}",
        obj.get_type().name().map(|n| n.to_string()).unwrap_or_default()
    )))
}

/// The Python object for a basis handle (for `Hamiltonian.basis`, `Spectrum.basis`).
pub fn basis_to_py(py: Python<'_>, b: &BasisRef) -> PyResult<Py<PyAny>> {
    Ok(match b {
        BasisRef::Hermite(h) => Py::new(py, PyHermiteBasis { inner: h.clone() })?.into_any(),
        BasisRef::Fourier(g) => Py::new(py, PyFourierGrid { inner: g.clone() })?.into_any(),
        // A heterostructure's basis is presented as the grid (box and size) it was built on.
        BasisRef::Layered(l) => Py::new(py, PyFourierGrid { inner: Arc::new(l.grid().clone()) })?.into_any(),
        BasisRef::Elements(e) => Py::new(py, PyElementBasis { inner: e.clone() })?.into_any(),
    })
}
