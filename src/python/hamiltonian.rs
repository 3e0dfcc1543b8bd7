//! Python classes Hamiltonian and Spectrum.

use super::arrays::{mat_t_to_py, mat_to_py, to_usize, vec_f64, vec_f64_or_complex};
use super::basis::{basis_to_py, extract_basis};
use super::errors::IntoPyResult;
use crate::basis::BasisRef;
use crate::eigen::{self, Method, SolveOptions, Spectrum};
use crate::error::check_memory;
use crate::problem::{Hamiltonian, Mass};
use crate::model::stack::Heterostructure;
use super::layers::PyHeterostructure;
use pyo3::exceptions::PyTypeError;
use crate::observables;
use crate::model::units::Units;
use numpy::{PyArray1, PyArray2};
use num_complex::Complex64;
use super::display::{fixed_to, key_value_table, table, unit_suffix};
use pyo3::prelude::*;
use pyo3::types::{PyFloat, PyTuple, PyType};
use std::sync::Arc;

/// Samples of a potential on the basis points: a vectorised callable f(x) or an array.
pub fn potential_samples(obj: &Bound<'_, PyAny>, basis: &BasisRef, name: &str) -> PyResult<Vec<f64>> {
    let points = basis.as_dyn().points();
    if obj.cast::<PyHeterostructure>().is_ok() {
        return Err(PyTypeError::new_err(format!(
            "`{name}` is a Heterostructure, which is accepted only as the potential of a Hamiltonian; here `{name}` must be a callable f(x) or an array on basis.x (e.g. stack.potential(x) with a single mass)"
        )));
    }
    if obj.is_callable() {
        let x = PyArray1::from_slice(obj.py(), points);
        // An exception raised by the user's callable propagates with its own type,
        // plus a note (Python ≥ 3.11) saying which argument was being evaluated.
        let values = obj.call1((x,)).inspect_err(|e| {
            let _ = e.value(obj.py()).call_method1(
                "add_note",
                (format!("raised while evaluating `{name}` at the basis points (a float64 array)"),),
            );
        })?;
        // A callable returning a scalar (e.g. lambda x: 0.0) means a constant potential.
        if let Ok(c) = values.extract::<f64>() {
            return Ok(vec![c; points.len()]);
        }
        return vec_f64(&values, name, Some(points.len()));
    }
    vec_f64(obj, name, Some(points.len()))
}

/// A mass argument: a positive number, or an array on a FourierGrid.
pub fn extract_mass(obj: &Bound<'_, PyAny>, basis: &BasisRef) -> PyResult<Mass> {
    if let Ok(m) = obj.extract::<f64>() {
        return Ok(Mass::Uniform(m));
    }
    if obj.is_callable() {
        return Ok(Mass::Profile(potential_samples(obj, basis, "mass")?));
    }
    Ok(Mass::Profile(vec_f64(obj, "mass", None)?))
}

/// H = T + V of one particle on a basis: the single-band effective-mass Schrödinger operator.
///
/// T = −(ħ²/2m) d²/dx² for a constant mass, −(ħ²/2) d/dx (1/m(x)) d/dx (BenDaniel-Duke) for a
/// mass profile, with ħ and the mass unit of ``units``. The matrix is built once; ``solve``,
/// ``apply`` and ``matrix`` reuse it.
///
/// Parameters
/// ----------
/// basis : HermiteBasis, FourierGrid or ElementBasis
///     The basis. A FourierGrid is periodic (states wrap around the box); an ElementBasis
///     has ψ = 0 at both ends; a HermiteBasis decays like the oscillator functions.
/// potential : callable or array_like or Heterostructure
///     Vectorised V(x) called once with ``basis.x`` (returning a number means a constant), or
///     samples on ``basis.x`` (energy units; finite, |V| ≤ 1e100). A Heterostructure (with
///     ``units="semiconductor"`` and no ``mass``) gives the BenDaniel-Duke Hamiltonian of the
///     layers: on an ElementBasis the element problem, on a FourierGrid the exact layer
///     integrals in the mass coordinate (the grid sets the box and the number of modes); both
///     are generalized problems A c = E B c (see ``overlap_matrix``).
/// mass : float or array_like or callable, optional
///     Particle mass (> 0) in the mass unit of ``units``; default None means 1. On a
///     FourierGrid or an ElementBasis an array on ``basis.x`` (on elements also one value per
///     element) or a callable gives a position-dependent mass; a HermiteBasis takes a number only.
/// units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}, default "natural"
///     "natural": ħ = 1, mass 1; "atomic": hartree, bohr, m_e; "semiconductor": nm, meV, m_e,
///     fs; "cold-atom": µm, ħ/ms (so ħ = 1), u, ms; "molecular": Å, cm⁻¹, u (a reduced mass
///     in daltons), fs.
///
/// Raises
/// ------
/// ValueError
///     NaN/inf or wrong-length potential or mass, non-positive mass, unknown units, ``mass``
///     given with a Heterostructure.
/// TypeError
///     Wrong basis type (a Heterostructure needs a FourierGrid or an ElementBasis), complex or
///     non-numeric potential, a Heterostructure where a callable or array is expected.
///
/// Notes
/// -----
/// Model limits: one particle, one band, parabolic dispersion (a constant mass per point);
/// no spin, strain, many-body or non-parabolic effects (``Heterostructure.solve`` treats
/// non-parabolicity). A smooth potential sampled on a grid converges spectrally; a step in V
/// or m sampled on a FourierGrid converges only like O(1/N): put steps on element
/// breakpoints (ElementBasis) or pass a Heterostructure.
///
/// Examples
/// --------
/// Harmonic oscillator in natural units (levels n + 1/2):
///
/// >>> import numpy as np
/// >>> import specwell as sw
/// >>> H = sw.Hamiltonian(sw.FourierGrid(-10.0, 10.0, 128), lambda x: 0.5 * x**2)
/// >>> np.round(H.solve(3).energies, 8)
/// array([0.5, 1.5, 2.5])
#[pyclass(name = "Hamiltonian", module = "specwell._core", frozen)]
pub struct PyHamiltonian {
    pub inner: Arc<Hamiltonian>,
}

#[pymethods]
impl PyHamiltonian {
    #[new]
    #[pyo3(signature = (basis, potential, mass=None, units="natural"))]
    fn new(
        py: Python<'_>,
        basis: &Bound<'_, PyAny>,
        potential: &Bound<'_, PyAny>,
        mass: Option<&Bound<'_, PyAny>>,
        units: &str,
    ) -> PyResult<Self> {
        let units = Units::parse(units).py(py)?;
        let b = extract_basis(basis, "basis")?;
        if let Ok(stack) = potential.cast::<PyHeterostructure>() {
            return layered_hamiltonian(py, &b, &stack.get().inner, mass, units);
        }
        let v = potential_samples(potential, &b, "potential")?;
        let m = match mass {
            None => Mass::Uniform(1.0),
            Some(obj) => extract_mass(obj, &b)?,
        };
        let h = Hamiltonian::new(b, v, m, units).py(py)?;
        Ok(PyHamiltonian { inner: Arc::new(h) })
    }

    /// The dense N×N matrix (real symmetric); for a generalized problem, A of A c = E B c.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (N, N)
    ///     Energy units; in the basis' coefficients (on a FourierGrid, ψ(x_j)·sqrt(dx)).
    ///
    /// Raises
    /// ------
    /// MemoryError
    ///     If the matrix would not fit in available memory.
    fn matrix<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let h = self.inner.clone();
        check_memory("Hamiltonian.matrix", 2 * h.dense_bytes(), "the matrix does not fit; use apply() or solve(method=\"iterative\")").py(py)?;
        let m = py.detach(move || h.matrix());
        Ok(mat_to_py(py, m.as_ref()))
    }

    /// The overlap matrix B of a generalized problem A c = E B c (None where B = I).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (N, N), or None
    ///     B for a Heterostructure (on a FourierGrid or an ElementBasis) and for any
    ///     ElementBasis problem (diagonal there: GLL quadrature); None for a HermiteBasis or a
    ///     FourierGrid with a plain potential.
    ///
    /// Raises
    /// ------
    /// MemoryError
    ///     If the matrix would not fit in available memory.
    fn overlap_matrix<'py>(&self, py: Python<'py>) -> PyResult<Option<Bound<'py, PyArray2<f64>>>> {
        if !self.inner.is_generalized() {
            return Ok(None);
        }
        let h = self.inner.clone();
        check_memory("Hamiltonian.overlap_matrix", 2 * h.dense_bytes(), "the matrix does not fit").py(py)?;
        let m = py.detach(move || h.overlap());
        Ok(m.map(|m| mat_to_py(py, m.as_ref())))
    }

    /// H·psi, matrix-free, for a real or complex vector of basis coefficients.
    ///
    /// Parameters
    /// ----------
    /// psi : array_like, shape (N,)
    ///     Real or complex coefficients. On a FourierGrid they may equally be grid samples
    ///     ψ(x_j) (the map is linear).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (N,)
    ///     float64 for real ``psi``, complex128 for complex ``psi``; for a generalized problem
    ///     the product with A (not B⁻¹A).
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     ``psi`` of the wrong length or not finite.
    fn apply<'py>(&self, py: Python<'py>, psi: &Bound<'py, PyAny>) -> PyResult<Py<PyAny>> {
        let (re, im) = vec_f64_or_complex(psi, "psi")?;
        let h = self.inner.clone();
        let hre = py.detach(|| h.apply(&re)).py(py)?;
        match im {
            None => Ok(PyArray1::from_vec(py, hre).into_any().unbind()),
            Some(im) => {
                let him = py.detach(|| h.apply(&im)).py(py)?;
                let z: Vec<Complex64> = hre.iter().zip(&him).map(|(&a, &b)| Complex64::new(a, b)).collect();
                Ok(PyArray1::from_vec(py, z).into_any().unbind())
            }
        }
    }

    /// Lowest ``count`` eigenpairs (energies ascending) with their residuals.
    ///
    /// Parameters
    /// ----------
    /// count : int
    ///     Number of states, 1 ≤ count ≤ N (N = ``size``).
    /// method : {"auto", "dense", "iterative"}, default "auto"
    ///     "dense": direct eigensolver on the assembled matrix (banded on an ElementBasis,
    ///     parity blocks on a symmetric HermiteBasis problem); "iterative": matrix-free block
    ///     solver (LOBPCG) for the lowest states; "auto": iterative when the
    ///     problem has an FFT product (FourierGrid, or a Heterostructure on one), N > 512 and
    ///     count ≤ N/4, dense otherwise. If an automatic iterative solve stalls and the dense
    ///     matrices fit in memory it is finished densely (``Spectrum.note`` says so).
    /// tol : float, default 1e-10
    ///     Residual tolerance of the iterative path, ‖Hψ − Eψ‖ ≤ tol·max(1, |E|), in (0, 1).
    ///     Not used by the dense path.
    /// max_iter : int, optional
    ///     Iteration limit of the iterative path, ≥ 1; default None means 1000.
    /// initial : Spectrum or array_like (k, N), optional
    ///     Warm start for the iterative path. Without it, a large grid starts from the
    ///     same problem solved on a coarser grid of the same box (then interpolated).
    /// seed : int, optional
    ///     Seed of the iterative path's random vectors (the start block when there is neither
    ///     ``initial`` nor a coarser grid to start from, and any columns ``initial`` lacks), in
    ///     [0, 2**63); default None means a fixed seed, so results are reproducible.
    ///
    /// Returns
    /// -------
    /// Spectrum
    ///     ``energies``, ``vectors``, ``residuals`` and the method actually used.
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     count outside [1, N], tol outside (0, 1), unknown method, ``initial`` of the wrong
    ///     shape or not finite.
    /// MemoryError
    ///     The dense path's matrices (about three N×N float64 arrays, five for a
    ///     generalized problem) would not fit in available memory.
    /// ConvergenceError
    ///     The iterative path missed ``tol`` within ``max_iter`` (and could not be finished
    ///     densely).
    ///
    /// Warns
    /// -----
    /// AccuracyWarning
    ///     Round-off allows some level less than 1e-8 relative accuracy
    ///     (``Spectrum.attainable_accuracy``).
    ///
    /// Notes
    /// -----
    /// The residual r = ‖Hψ − Eψ‖ (‖ψ‖ = 1) bounds the eigenvalue error of the discretised
    /// problem (some exact discrete eigenvalue lies within r of E, for a standard symmetric
    /// problem); it says nothing about the discretisation error of the basis. Check that by
    /// solving again with a larger basis.
    ///
    /// Examples
    /// --------
    /// >>> import numpy as np
    /// >>> import specwell as sw
    /// >>> H = sw.Hamiltonian(sw.HermiteBasis(40), lambda x: 0.5 * x**2)
    /// >>> st = H.solve(4)
    /// >>> np.round(st.energies, 10)
    /// array([0.5, 1.5, 2.5, 3.5])
    /// >>> bool(st.residuals.max() < 1e-10)
    /// True
    #[pyo3(signature = (count, method="auto", tol=1e-10, max_iter=None, initial=None, seed=None))]
    fn solve(
        &self,
        py: Python<'_>,
        count: &Bound<'_, PyAny>,
        method: &str,
        tol: f64,
        max_iter: Option<&Bound<'_, PyAny>>,
        initial: Option<&Bound<'_, PyAny>>,
        seed: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<PySpectrum> {
        let n = self.inner.size();
        let method = Method::parse(method).py(py)?;
        let mut opts = SolveOptions::new(to_usize(count, "count", 1, n)?);
        opts.method = method;
        opts.tol = tol;
        opts.seed = super::arrays::seed_arg(seed)?;
        opts.max_iter = max_iter.map(|m| to_usize(m, "max_iter", 1, 1 << 31)).transpose()?;
        if let Some(init) = initial {
            opts.initial = Some(initial_block(init, n)?);
        }
        let h = self.inner.clone();
        let s = py.detach(move || eigen::solve(&h, &opts)).py(py)?;
        super::errors::warn_accuracy(py, &s)?;
        Ok(PySpectrum { inner: Arc::new(s) })
    }

    /// The basis.
    #[getter]
    fn basis(&self, py: Python<'_>) -> PyResult<Py<PyAny>> {
        basis_to_py(py, self.inner.basis())
    }
    /// Potential samples on ``basis.x``.
    #[getter]
    fn potential<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.potential())
    }
    /// Unit system name.
    #[getter]
    fn units(&self) -> &'static str {
        self.inner.units().name()
    }
    /// The mass as given (a float, or an array on the grid points; for a heterostructure the layer masses at the nodes).
    #[getter]
    fn mass(&self, py: Python<'_>) -> Py<PyAny> {
        mass_to_py(py, self.inner.mass())
    }
    /// The Heterostructure of a layered Hamiltonian, else None.
    #[getter]
    fn heterostructure(&self, py: Python<'_>) -> PyResult<Option<Py<PyHeterostructure>>> {
        self.inner.stack().map(|s| Py::new(py, PyHeterostructure { inner: s.clone() })).transpose()
    }
    /// Matrix dimension N.
    #[getter]
    fn size(&self) -> usize {
        self.inner.size()
    }
    fn __repr__(&self) -> String {
        format!(
            "Hamiltonian({}, mass={}, units={:?})",
            self.inner.basis().as_dyn().describe(),
            mass_text(self.inner.mass()),
            self.inner.units().name()
        )
    }
    fn _repr_html_(&self) -> String {
        let h = &self.inner;
        let sym = h.units().symbols();
        // Exact for a stack (piecewise linear); otherwise the samples at the basis points.
        let (label, (lo, hi)) = match h.stack() {
            Some(s) => ("potential range", s.potential_range()),
            None => ("potential at basis points", h.potential().iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| (a.min(x), b.max(x)))),
        };
        key_value_table(
            "Hamiltonian",
            &[
                ("basis", h.basis().as_dyn().describe()),
                ("units", h.units().name().to_string()),
                ("mass", format!("{}{}", mass_text(h.mass()), unit_suffix(sym[2]))),
                (label, format!("[{lo:.6}, {hi:.6}]{}", unit_suffix(sym[1]))),
                ("dimension", h.size().to_string()),
            ],
        )
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyType>, (Py<PyAny>, Py<PyAny>, Py<PyAny>, &'static str))> {
        let py = slf.py();
        let h = &slf.get().inner;
        if let Some(s) = h.stack() {
            let stack = Py::new(py, PyHeterostructure { inner: s.clone() })?.into_any();
            return Ok((slf.get_type(), (basis_to_py(py, h.basis())?, stack, py.None(), h.units().name())));
        }
        Ok((
            slf.get_type(),
            (basis_to_py(py, h.basis())?, PyArray1::from_slice(py, h.potential()).into_any().unbind(), mass_to_py(py, h.mass()), h.units().name()),
        ))
    }
}

fn mass_text(m: &Mass) -> String {
    match m {
        Mass::Uniform(m) => format!("{m}"),
        Mass::Profile(ms) => {
            let (lo, hi) = ms.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| (a.min(x), b.max(x)));
            format!("profile in [{lo}, {hi}]")
        }
    }
}

fn mass_to_py(py: Python<'_>, m: &Mass) -> Py<PyAny> {
    match m {
        Mass::Uniform(m) => PyFloat::new(py, *m).into_any().unbind(),
        Mass::Profile(ms) => PyArray1::from_slice(py, ms).into_any().unbind(),
    }
}

/// Rebuild a Spectrum from its Hamiltonian and arrays (the target of
/// `Spectrum.__reduce__` and `specwell.load`); the parts are validated by the core.
#[pyfunction]
pub fn _spectrum_from_parts(
    py: Python<'_>,
    hamiltonian: &Bound<'_, PyHamiltonian>,
    energies: &Bound<'_, PyAny>,
    vectors: &Bound<'_, PyAny>,
    residuals: &Bound<'_, PyAny>,
    method: &str,
    iterations: usize,
    errors: Option<&Bound<'_, PyAny>>,
) -> PyResult<PySpectrum> {
    let energies = vec_f64(energies, "energies", None)?;
    let residuals = vec_f64(residuals, "residuals", None)?;
    let (count, n, data) = super::arrays::mat_f64(vectors, "vectors")?;
    let method = Method::parse(method).py(py)?;
    let v = crate::linalg::from_column_major(&data, n, count);
    let errors = errors.map(|e| vec_f64(e, "errors", None)).transpose()?;
    let s = Spectrum::from_parts(hamiltonian.get().inner.clone(), energies, v, residuals, method, iterations, errors).py(py)?;
    Ok(PySpectrum { inner: Arc::new(s) })
}

/// A heterostructure on a FourierGrid (box and number of modes); the mass comes from the layers.
fn layered_hamiltonian(
    py: Python<'_>,
    basis: &BasisRef,
    stack: &Arc<Heterostructure>,
    mass: Option<&Bound<'_, PyAny>>,
    units: Units,
) -> PyResult<PyHamiltonian> {
    if mass.is_some() {
        return Err(pyo3::exceptions::PyValueError::new_err(
            "`mass` must be omitted for a Heterostructure potential (each layer carries its own mass)",
        ));
    }
    let stack = stack.clone();
    let h = match basis {
        BasisRef::Fourier(g) => {
            let g = g.clone();
            py.detach(move || Hamiltonian::layered(&stack, &g, units)).py(py)?
        }
        BasisRef::Elements(e) => {
            let e = e.clone();
            py.detach(move || Hamiltonian::stack_on_elements(&stack, e, units)).py(py)?
        }
        _ => return Err(PyTypeError::new_err("`basis` must be a specwell.ElementBasis or FourierGrid for a Heterostructure potential")),
    };
    Ok(PyHamiltonian { inner: Arc::new(h) })
}

/// Warm-start block: a Spectrum, or an array (k, N) of vectors in the basis.
fn initial_block(obj: &Bound<'_, PyAny>, n: usize) -> PyResult<Vec<f64>> {
    if let Ok(s) = obj.cast::<PySpectrum>() {
        let v = &s.get().inner.vectors;
        if v.nrows() != n {
            return Err(pyo3::exceptions::PyValueError::new_err(format!(
                "`initial` spectrum has basis size {}; this Hamiltonian has {n}",
                v.nrows()
            )));
        }
        return Ok(crate::linalg::column_major(v));
    }
    let (r, c, data) = super::arrays::mat_f64(obj, "initial")?;
    if c != n || r == 0 {
        return Err(pyo3::exceptions::PyValueError::new_err(format!(
            "`initial` must have shape (k, {n}) with k >= 1; got ({r}, {c})"
        )));
    }
    Ok(data)
}

/// Lowest eigenpairs of a Hamiltonian (returned by ``Hamiltonian.solve``).
///
/// Not constructed directly. ``len(spectrum)`` is the number of states; results pickle and
/// save (``save``) exactly.
///
/// Notes
/// -----
/// Wavefunctions are normalised, ∫|ψ|² dx = 1 (for a generalized problem cᵀBc = 1). Signs are
/// deterministic: each state is positive in the leftmost region where |ψ| exceeds 1 % of its
/// maximum. ``residuals`` measure how well the discrete eigenproblem is solved, not the
/// error of the basis (``errors``, set by ``Heterostructure.solve``, estimates that).
#[pyclass(name = "Spectrum", module = "specwell._core", frozen)]
pub struct PySpectrum {
    pub inner: Arc<Spectrum>,
}

#[pymethods]
impl PySpectrum {
    /// Energies, ascending, shape (count,).
    #[getter]
    fn energies<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.energies)
    }
    /// Residual norms ‖Hψ − Eψ‖ (‖ψ‖ = 1), shape (count,).
    #[getter]
    fn residuals<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.residuals)
    }
    /// Orthonormal coefficient vectors in the basis, shape (count, N) (B-orthonormal, cᵀBc = 1, for a generalized problem).
    #[getter]
    fn vectors<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray2<f64>> {
        mat_t_to_py(py, self.inner.vectors.as_ref())
    }
    /// The basis' own points (grid points or quadrature nodes).
    #[getter]
    fn x<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.basis().as_dyn().points())
    }
    /// Number of states.
    #[getter]
    fn count(&self) -> usize {
        self.inner.count()
    }
    /// The Heterostructure of a layered spectrum, else None.
    #[getter]
    fn heterostructure(&self, py: Python<'_>) -> PyResult<Option<Py<PyHeterostructure>>> {
        self.inner.hamiltonian.stack().map(|s| Py::new(py, PyHeterostructure { inner: s.clone() })).transpose()
    }
    /// Per-level error estimates |E(p+2) − E(p)| (energy units) of ``Heterostructure.solve``, else None.
    #[getter]
    fn errors<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        self.inner.errors.as_ref().map(|e| PyArray1::from_slice(py, e))
    }
    /// For a layered structure: True where the level lies below both cladding band edges
    /// (in a field, below the lower of the two), False for continuum (box) states; else None.
    #[getter]
    fn bound<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<bool>>> {
        self.inner.bound.as_ref().map(|b| PyArray1::from_slice(py, b))
    }
    /// The Hamiltonian whose eigenpairs these are.
    #[getter]
    fn hamiltonian(&self) -> PyHamiltonian {
        PyHamiltonian { inner: self.inner.hamiltonian.clone() }
    }
    /// Broadened absorption from state ``initial``: Σ_f f_if·L(E − (E_f − E_i)).
    ///
    /// Parameters
    /// ----------
    /// energies : array_like
    ///     Photon energies (energy units, finite).
    /// broadening : float
    ///     Line width (> 0): half width at half maximum (Lorentzian) or standard deviation (Gaussian).
    /// shape : {"lorentzian", "gaussian"}, default "lorentzian"
    ///     Unit-area line shape.
    /// initial : int, default 0
    ///     Initial state index, in [0, count − 1].
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(energies),)
    ///     Oscillator strength per unit energy; multiply by the material prefactor for an
    ///     absorption coefficient.
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     Non-positive broadening, non-finite energies, unknown shape, ``initial`` out of range.
    ///
    /// Notes
    /// -----
    /// Only transitions between the ``count`` computed states enter: solve for enough states
    /// to cover the photon energies.
    #[pyo3(signature = (energies, broadening, shape="lorentzian", initial=0))]
    fn absorption<'py>(
        &self,
        py: Python<'py>,
        energies: &Bound<'py, PyAny>,
        broadening: f64,
        shape: &str,
        initial: usize,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let shape = observables::LineShape::parse(shape).py(py)?;
        let e = vec_f64(energies, "energies", None)?;
        let a = observables::absorption(&self.inner, &e, broadening, shape, initial).py(py)?;
        Ok(PyArray1::from_vec(py, a))
    }
    /// ⟨n|g(x)|n⟩ for every state (g=None: ⟨x⟩).
    ///
    /// Parameters
    /// ----------
    /// g : callable, optional
    ///     Vectorised g(x) returning finite values, called once with the ``points`` sample
    ///     points; default None means g(x) = x.
    /// points : int, default 8192
    ///     Number of uniform points (≥ 16) spanning the basis' own points ``x`` (from the
    ///     smallest to the largest); the trapezoid rule on them.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (count,)
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     ``points`` < 16, ``g`` returns the wrong number of values or non-finite ones.
    ///
    /// Notes
    /// -----
    /// The range is that of ``x``: a state with weight outside it (a HermiteBasis state beyond
    /// the outermost nodes) is integrated only over the part inside. Second order in the
    /// spacing; ``matrix_elements`` is more accurate for smooth g.
    #[pyo3(signature = (g=None, points=8192))]
    fn expectation<'py>(&self, py: Python<'py>, g: Option<&Bound<'py, PyAny>>, points: usize) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let (lo, hi) = observables::x_range(&self.inner);
        if points < 16 {
            return Err(pyo3::exceptions::PyValueError::new_err(format!("`points` must be an integer >= 16; got {points}")));
        }
        let xs: Vec<f64> = (0..points).map(|i| lo + (hi - lo) * i as f64 / (points - 1) as f64).collect();
        let gv = match g {
            None => xs.clone(),
            Some(f) => {
                let arr = PyArray1::from_slice(py, &xs);
                let v = vec_f64(&f.call1((arr,))?, "g", Some(points))?;
                crate::error::check_finite("g", &v).py(py)?;
                v
            }
        };
        let s = self.inner.clone();
        let out = py.detach(move || observables::expectation(&s, &xs, &gv)).py(py)?;
        Ok(PyArray1::from_vec(py, out))
    }
    /// Method used ("dense" or "iterative").
    #[getter]
    fn method(&self) -> &'static str {
        self.inner.method.name()
    }
    /// LOBPCG steps of the iterative path on the full basis (0 for dense).
    #[getter]
    fn iterations(&self) -> usize {
        self.inner.iterations
    }
    /// (basis size, LOBPCG steps) of each coarse level of the iterative path's multilevel start.
    ///
    /// Coarsest first; 0 steps means solved densely or already converged from the level below.
    /// Empty for dense and warm-started solves.
    #[getter]
    fn levels(&self) -> Vec<(usize, usize)> {
        self.inner.levels.clone()
    }
    /// Relative accuracy round-off allows each level, ε‖H‖/max(|E_i|, E_max − E_min, E_unit), shape (count,), with E_unit the lowest kinetic quantum of the domain.
    ///
    /// Above 1e-8, ``solve`` issues a ``specwell.AccuracyWarning``.
    #[getter]
    fn attainable_accuracy<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.attainable)
    }
    /// How the result was produced when the automatic choice changed course, else None.
    #[getter]
    fn note(&self) -> Option<String> {
        self.inner.note.clone()
    }
    /// Unit system name.
    #[getter]
    fn units(&self) -> &'static str {
        self.inner.units().name()
    }
    /// The basis (for a heterostructure: the grid it was built on).
    #[getter]
    fn basis(&self, py: Python<'_>) -> PyResult<Py<PyAny>> {
        basis_to_py(py, self.inner.basis())
    }
    /// ψ_n(x) for every state, normalised ∫|ψ|² dx = 1.
    ///
    /// Parameters
    /// ----------
    /// x : array_like, optional
    ///     Points (length units, finite); default None: the basis' own points ``x``. Evaluated
    ///     with the basis functions themselves: the trigonometric series on a FourierGrid
    ///     (points must lie in [start, stop]), Hermite functions anywhere, element
    ///     polynomials on an ElementBasis (0 outside the elements).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (count, len(x))
    ///     Real values (1/sqrt(length) units).
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     ``x`` not finite, or outside the box of a FourierGrid.
    #[pyo3(signature = (x=None))]
    fn wavefunctions<'py>(&self, py: Python<'py>, x: Option<&Bound<'py, PyAny>>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let xs = match x {
            None => self.inner.basis().as_dyn().points().to_vec(),
            Some(obj) => {
                let v = vec_f64(obj, "x", None)?;
                crate::error::check_finite("x", &v).py(py)?;
                v
            }
        };
        let s = self.inner.clone();
        let w = py.detach(move || s.wavefunctions(&xs)).py(py)?;
        Ok(mat_t_to_py(py, w.as_ref()))
    }
    /// Position matrix ⟨i|x|j⟩, shape (count, count), length units.
    ///
    /// On a FourierGrid x is the grid coordinate (not periodic): meaningful for states that
    /// vanish at the box edges.
    fn dipole_matrix<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let d = observables::dipole_matrix(&self.inner).py(py)?;
        Ok(mat_to_py(py, d.as_ref()))
    }
    /// f_ij = (2m_i/ħ²)(E_j − E_i)|⟨i|x|j⟩|², shape (count, count).
    ///
    /// m_i is the mass, or ⟨i|m(x)|i⟩ for a position-dependent mass (then the
    /// Thomas-Reiche-Kuhn sum rule holds only approximately).
    fn oscillator_strengths<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let f = observables::oscillator_strengths(&self.inner).py(py)?;
        Ok(mat_to_py(py, f.as_ref()))
    }
    /// Overlaps ⟨ψ_i|φ_j⟩ with the states of ``other``, shape (len(self), len(other)).
    ///
    /// The squares are Franck-Condon factors when the two spectra are the vibrational
    /// levels of two electronic states. On the same basis (same kind, size and points)
    /// the overlap is exact (coefficients and the discretisation's overlap matrix B);
    /// on different bases (e.g. two Hermite bases centred on each potential's minimum)
    /// it is a composite Gauss-Lobatto-Legendre quadrature of ψ_i(x)φ_j(x) over the x
    /// range both bases cover: round-off accurate for smooth states, about 1e-7 where a
    /// state has a kink (layer interfaces) inside a quadrature panel.
    ///
    /// Parameters
    /// ----------
    /// other : Spectrum
    ///     The second set of states (same length unit; any basis).
    ///
    /// Returns
    /// -------
    /// ndarray, shape (len(self), len(other))
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     The two bases share no x range.
    ///
    /// Notes
    /// -----
    /// On different bases only the common x range is integrated: weight of either state
    /// outside it is missing from the overlap.
    fn overlaps<'py>(&self, py: Python<'py>, other: PyRef<'py, PySpectrum>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let s = observables::overlaps(&self.inner, &other.inner).py(py)?;
        Ok(mat_to_py(py, s.as_ref()))
    }
    /// Matrix elements ⟨ψ_i|g(x)|ψ_j⟩, shape (count, count).
    ///
    /// Parameters
    /// ----------
    /// g : callable
    ///     Vectorised g(x) (x in the basis's length unit), called once with the
    ///     quadrature nodes (composite Gauss-Lobatto-Legendre over the basis's x range);
    ///     round-off accurate for smooth states and g, about 1e-7 where ψ or g has a kink.
    ///
    /// Raises
    /// ------
    /// TypeError
    ///     ``g`` is not callable.
    /// ValueError
    ///     ``g`` returns the wrong number of values or non-finite ones.
    fn matrix_elements<'py>(&self, py: Python<'py>, g: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        if !g.is_callable() {
            return Err(pyo3::exceptions::PyTypeError::new_err("`g` must be a vectorised callable g(x) returning one value per point"));
        }
        let (xs, ws) = observables::matrix_element_rule(&self.inner).py(py)?;
        let v = vec_f64(&g.call1((PyArray1::from_slice(py, &xs),))?, "g", Some(xs.len()))?;
        let m = observables::matrix_elements(&self.inner, &xs, &ws, &v).py(py)?;
        Ok(mat_to_py(py, m.as_ref()))
    }
    fn __len__(&self) -> usize {
        self.inner.count()
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyTuple>)> {
        let py = slf.py();
        let s = &slf.get().inner;
        let rebuild = py.import("specwell._core")?.getattr("_spectrum_from_parts")?;
        let args = PyTuple::new(
            py,
            [
                Py::new(py, PyHamiltonian { inner: s.hamiltonian.clone() })?.into_any(),
                PyArray1::from_slice(py, &s.energies).into_any().unbind(),
                mat_t_to_py(py, s.vectors.as_ref()).into_any().unbind(),
                PyArray1::from_slice(py, &s.residuals).into_any().unbind(),
                s.method.name().into_pyobject(py)?.into_any().unbind(),
                s.iterations.into_pyobject(py)?.into_any().unbind(),
                match &s.errors {
                    Some(e) => PyArray1::from_slice(py, e).into_any().unbind(),
                    None => py.None(),
                },
            ],
        )?;
        Ok((rebuild, args))
    }
    fn _repr_html_(&self) -> String {
        let s = &self.inner;
        let sym = s.units().symbols();
        let eu = unit_suffix(sym[1]);
        let header = vec!["n".to_string(), format!("E{eu}"), format!("E − E₀{eu}"), format!("residual{eu}")];
        let e0 = s.energies.first().cloned().unwrap_or(0.0);
        // Decimals from each level's error estimate (elements) or its residual, which
        // bounds the error of a symmetric eigenvalue (Bauer-Fike).
        let err = |n: usize| s.errors.as_ref().map_or(s.residuals[n], |e| e[n].max(f64::EPSILON * s.energies[n].abs()));
        let mut header = header;
        if s.errors.is_some() {
            header.push(format!("error{eu}"));
        }
        let rows: Vec<Vec<String>> = (0..s.count())
            .map(|n| {
                let e = s.energies[n];
                let mut row = vec![n.to_string(), fixed_to(e, err(n)), fixed_to(e - e0, err(n)), format!("{:.1e}", s.residuals[n])];
                if let Some(errs) = &s.errors {
                    row.push(format!("{:.1e}", errs[n]));
                }
                row
            })
            .collect();
        let states = if s.count() == 1 { "state" } else { "states" };
        let title = format!("Spectrum: {} {states}, {} method, {}", s.count(), s.method.name(), s.basis().as_dyn().describe());
        table(&title, &header, &rows, 50)
    }
    fn __repr__(&self) -> String {
        let unit = self.inner.units().symbols()[1];
        let s = &self.inner;
        let e: Vec<String> = (0..s.count().min(6)).map(|n| fixed_to(s.energies[n], s.errors.as_ref().map_or(s.residuals[n], |e| e[n]))).collect();
        let more = if self.inner.count() > 6 { ", …" } else { "" };
        format!("Spectrum(count={}, energies=[{}{}] {unit}, method={:?})", self.inner.count(), e.join(", "), more, self.inner.method.name())
    }
}

/// All eigenpairs of a real symmetric matrix (lower triangle read) with the core's dense solver.
///
/// Parameters
/// ----------
/// a : array_like, shape (n, n)
///     Real square matrix, finite, |a_ij| ≤ 1e100; only the lower triangle is read (the
///     upper one is assumed to mirror it).
///
/// Returns
/// -------
/// values : ndarray, shape (n,)
///     Eigenvalues, ascending.
/// vectors : ndarray, shape (n, n)
///     Orthonormal eigenvectors as columns.
///
/// Raises
/// ------
/// ValueError
///     ``a`` not square, empty, not finite or with entries beyond 1e100.
///
/// Examples
/// --------
/// >>> import numpy as np
/// >>> import specwell as sw
/// >>> w, v = sw.eigh(np.array([[2.0, 1.0], [1.0, 2.0]]))
/// >>> np.round(w, 12)
/// array([1., 3.])
#[pyfunction]
pub fn eigh<'py>(py: Python<'py>, a: &Bound<'py, PyAny>) -> PyResult<(Bound<'py, PyArray1<f64>>, Bound<'py, PyArray2<f64>>)> {
    let (r, c, data) = super::arrays::mat_f64(a, "a")?;
    if r != c || r == 0 {
        return Err(pyo3::exceptions::PyValueError::new_err(format!("`a` must be a non-empty square matrix; got shape ({r}, {c})")));
    }
    crate::error::check_finite("a", &data).py(py)?;
    if let Some(i) = data.iter().position(|v| v.abs() > crate::problem::hamiltonian::MAX_ABS_POTENTIAL) {
        return Err(pyo3::exceptions::PyValueError::new_err(format!(
            "`a` entries must satisfy |a| <= {:e} (larger values overflow the eigensolver); got {:e} at flat index {i}",
            crate::problem::hamiltonian::MAX_ABS_POTENTIAL,
            data[i]
        )));
    }
    let (vals, vecs) = py
        .detach(move || {
            // Row-major data viewed in place (only the lower triangle is read).
            crate::linalg::dense::eigh(faer::MatRef::from_row_major_slice(&data, r, r), faer::get_global_parallelism())
        })
        .py(py)?;
    Ok((PyArray1::from_vec(py, vals), mat_to_py(py, vecs.as_ref())))
}

/// Spectra of many potentials on one basis (returned by ``solve_batch``).
#[pyclass(name = "Batch", module = "specwell._core", frozen)]
pub struct PyBatch {
    items: Vec<Arc<Spectrum>>,
}

#[pymethods]
impl PyBatch {
    /// Energies, shape (M, count).
    #[getter]
    fn energies<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        self.stack_rows(py, |s| &s.energies)
    }
    /// Residual norms, shape (M, count).
    #[getter]
    fn residuals<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        self.stack_rows(py, |s| &s.residuals)
    }
    /// The Spectrum of item i (negative indices count from the end).
    fn __getitem__(&self, i: &Bound<'_, PyAny>) -> PyResult<PySpectrum> {
        let m = self.items.len() as i128;
        let idx: i128 = i
            .call_method0("__index__")
            .and_then(|v| v.extract::<i128>())
            .map_err(|_| PyTypeError::new_err("batch index must be an integer"))?;
        let j = if idx < 0 { idx + m } else { idx };
        if !(0..m).contains(&j) {
            return Err(pyo3::exceptions::PyIndexError::new_err(format!("batch index must be in [{}, {}]; got {idx}", -m, m - 1)));
        }
        Ok(PySpectrum { inner: self.items[j as usize].clone() })
    }
    fn __len__(&self) -> usize {
        self.items.len()
    }
    /// ψ_n(x) of item ``index``, shape (count, len(x)) (see ``Spectrum.wavefunctions``).
    ///
    /// Parameters
    /// ----------
    /// index : int
    ///     Item index (negative counts from the end).
    /// x : array_like, optional
    ///     Points (length units); default None: the basis' own points.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (count, len(x))
    ///
    /// Raises
    /// ------
    /// IndexError
    ///     ``index`` out of range.
    #[pyo3(signature = (index, x=None))]
    fn wavefunctions<'py>(&self, py: Python<'py>, index: &Bound<'py, PyAny>, x: Option<&Bound<'py, PyAny>>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        self.__getitem__(index)?.wavefunctions(py, x)
    }
    fn __repr__(&self) -> String {
        format!("Batch(items={}, count={})", self.items.len(), self.items.first().map(|s| s.count()).unwrap_or(0))
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyAny>, (Vec<PySpectrum>,))> {
        let py = slf.py();
        let ctor = py.import("specwell._core")?.getattr("_batch_from_spectra")?;
        Ok((ctor, (slf.get().items.iter().map(|s| PySpectrum { inner: s.clone() }).collect(),)))
    }
}

impl PyBatch {
    /// One row per item: an (M, count) array of a per-spectrum vector.
    fn stack_rows<'py>(&self, py: Python<'py>, field: impl Fn(&Spectrum) -> &Vec<f64>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let count = self.items.first().map(|s| s.count()).unwrap_or(0);
        let data: Vec<f64> = self.items.iter().flat_map(|s| field(s).iter().cloned()).collect();
        let a = ndarray::Array2::from_shape_vec((self.items.len(), count), data)
            .map_err(|e| pyo3::exceptions::PyValueError::new_err(e.to_string()))?;
        Ok(PyArray2::from_owned_array(py, a))
    }
}

/// Rebuild a Batch from its spectra (target of `Batch.__reduce__`).
#[pyfunction]
pub fn _batch_from_spectra(spectra: Vec<PyRef<'_, PySpectrum>>) -> PyBatch {
    PyBatch { items: spectra.iter().map(|s| s.inner.clone()).collect() }
}

/// Lowest ``count`` states of many potentials on one basis, or of many heterostructures,
/// in parallel (rayon, GIL released).
///
/// Parameters
/// ----------
/// basis : HermiteBasis, FourierGrid, ElementBasis or None
///     Shared basis; None for a sweep of Heterostructures, each solved as by
///     ``Heterostructure.solve(count, accuracy)`` on its own element mesh (each thread
///     starts an item from the previous item's mesh).
/// potentials : array_like (M, N), sequence of callables/arrays, or sequence of Heterostructure
///     Potentials sampled on ``basis.x`` (or callables evaluated there); Heterostructures
///     when ``basis`` is None.
/// count : int
///     States per item.
/// mass, units, method, tol
///     As for ``Hamiltonian`` and ``Hamiltonian.solve``. With ``method="iterative"`` (the
///     automatic choice above 56 functions with a fast product) each thread walks a
///     contiguous chunk of the sweep and warm-starts every item from the linear
///     extrapolation of the two previous items' eigenvectors.
/// accuracy : float
///     Relative accuracy of every level of a sweep of Heterostructures.
///
/// Returns
/// -------
/// Batch
///     ``energies`` and ``residuals`` of shape (M, count); item i is a Spectrum.
///
/// Raises
/// ------
/// ValueError
///     As for ``Hamiltonian`` and ``Hamiltonian.solve`` (the message names
///     ``potentials[i]``), potentials of the wrong shape, ``mass`` with Heterostructures.
/// TypeError
///     Heterostructures with a basis, or other items without one.
/// ConvergenceError
///     An iterative item missed ``tol``.
#[pyfunction]
#[pyo3(signature = (basis, potentials, count, mass=None, units="natural", method="auto", tol=1e-10, accuracy=1e-10))]
pub fn solve_batch(
    py: Python<'_>,
    basis: Option<&Bound<'_, PyAny>>,
    potentials: &Bound<'_, PyAny>,
    count: &Bound<'_, PyAny>,
    mass: Option<&Bound<'_, PyAny>>,
    units: &str,
    method: &str,
    tol: f64,
    accuracy: f64,
) -> PyResult<PyBatch> {
    let units = Units::parse(units).py(py)?;
    let method = Method::parse(method).py(py)?;
    let Some(basis) = basis else {
        return stack_batch(py, potentials, count, mass, accuracy);
    };
    let b = extract_basis(basis, "basis")?;
    let n_points = b.as_dyn().points().len();
    // An (M, N) ndarray, or a sequence of callables / arrays on basis.x (decided by type).
    let is_ndarray = potentials.is_instance(&py.import("numpy")?.getattr("ndarray")?)?;
    let rows: Vec<Vec<f64>> = if is_ndarray {
        let (r, c, data) = super::arrays::mat_f64(potentials, "potentials")?;
        if c != n_points || r == 0 {
            return Err(pyo3::exceptions::PyValueError::new_err(format!(
                "`potentials` must have shape (M, {n_points}) with M >= 1 (samples on basis.x); got ({r}, {c})"
            )));
        }
        data.chunks(c).map(|ch| ch.to_vec()).collect()
    } else {
        let items = potentials
            .try_iter()
            .map_err(|_| PyTypeError::new_err("`potentials` must be an (M, N) array or a sequence of callables/arrays"))?;
        let mut out = Vec::new();
        for (i, item) in items.enumerate() {
            let item = item?;
            if item.cast::<PyHeterostructure>().is_ok() {
                return Err(PyTypeError::new_err(format!(
                    "`potentials[{i}]` is a Heterostructure: a sweep of stacks needs basis=None (each stack gets its own element basis)"
                )));
            }
            out.push(potential_samples(&item, &b, &format!("potentials[{i}]"))?);
        }
        out
    };
    let m = match mass {
        None => Mass::Uniform(1.0),
        Some(obj) => extract_mass(obj, &b)?,
    };
    let mut opts = SolveOptions::new(to_usize(count, "count", 1, b.as_dyn().size())?);
    opts.method = method;
    opts.tol = tol;
    let spectra = py.detach(move || eigen::solve_batch(&b, &rows, &m, units, &opts)).py(py)?;
    if let Some(s) = spectra.iter().find(|s| s.accuracy_warning().is_some()) {
        super::errors::warn_accuracy(py, s)?;
    }
    Ok(PyBatch { items: spectra.into_iter().map(Arc::new).collect() })
}

/// `solve_batch(None, stacks, count)`: each Heterostructure on its own self-converged
/// element mesh (see `Heterostructure.solve`).
fn stack_batch(py: Python<'_>, stacks: &Bound<'_, PyAny>, count: &Bound<'_, PyAny>, mass: Option<&Bound<'_, PyAny>>, accuracy: f64) -> PyResult<PyBatch> {
    if mass.is_some() {
        return Err(pyo3::exceptions::PyValueError::new_err("`mass` must be omitted for a sweep of Heterostructures (each layer carries its own mass)"));
    }
    let items = stacks.try_iter().map_err(|_| PyTypeError::new_err("`potentials` must be a sequence of specwell.Heterostructure when `basis` is None"))?;
    let mut list = Vec::new();
    for (i, item) in items.enumerate() {
        let item = item?;
        let s = item.cast::<PyHeterostructure>().map_err(|_| {
            PyTypeError::new_err(format!("`potentials[{i}]` must be a specwell.Heterostructure when `basis` is None; got {}", item.get_type().name().map(|n| n.to_string()).unwrap_or_default()))
        })?;
        list.push((*s.get().inner).clone());
    }
    let opts = crate::eigen::stack::StackOptions::new(Some(to_usize(count, "count", 1, 100_000)?), accuracy);
    let spectra = py.detach(move || crate::eigen::stack::solve_stack_batch(&list, &opts, Units::Semiconductor)).py(py)?;
    Ok(PyBatch { items: spectra.into_iter().map(Arc::new).collect() })
}
