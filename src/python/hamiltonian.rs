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

/// H = T + V on a basis. See `specwell._core.pyi` for the documented signature.
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

    /// The dense N×N matrix.
    fn matrix<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let h = self.inner.clone();
        check_memory("Hamiltonian.matrix", 2 * h.dense_bytes(), "the matrix does not fit; use apply() or solve(method=\"iterative\")").py(py)?;
        let m = py.detach(move || h.matrix());
        Ok(mat_to_py(py, m.as_ref()))
    }

    /// The overlap matrix B of a heterostructure's generalized problem A c = E B c
    /// (None for the other bases, where B = I).
    fn overlap_matrix<'py>(&self, py: Python<'py>) -> PyResult<Option<Bound<'py, PyArray2<f64>>>> {
        if !self.inner.is_generalized() {
            return Ok(None);
        }
        let h = self.inner.clone();
        check_memory("Hamiltonian.overlap_matrix", 2 * h.dense_bytes(), "the matrix does not fit").py(py)?;
        let m = py.detach(move || h.overlap());
        Ok(m.map(|m| mat_to_py(py, m.as_ref())))
    }

    /// H·psi (matrix-free). `psi`: real or complex, length N.
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

    /// The lowest `count` eigenpairs.
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

    #[getter]
    fn basis(&self, py: Python<'_>) -> PyResult<Py<PyAny>> {
        basis_to_py(py, self.inner.basis())
    }
    /// Potential samples on basis.x.
    #[getter]
    fn potential<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.potential())
    }
    #[getter]
    fn units(&self) -> &'static str {
        self.inner.units().name()
    }
    /// The mass as given: a float, or an array on the grid points (for a
    /// heterostructure, the layer masses at the basis nodes).
    #[getter]
    fn mass(&self, py: Python<'_>) -> Py<PyAny> {
        mass_to_py(py, self.inner.mass())
    }
    /// The Heterostructure the Hamiltonian was built from (None otherwise).
    #[getter]
    fn heterostructure(&self, py: Python<'_>) -> PyResult<Option<Py<PyHeterostructure>>> {
        self.inner.stack().map(|s| Py::new(py, PyHeterostructure { inner: s.clone() })).transpose()
    }
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

/// Eigenpairs of a Hamiltonian.
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
    /// Residual norms ‖Hψ − Eψ‖, shape (count,).
    #[getter]
    fn residuals<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.residuals)
    }
    /// Coefficient vectors in the basis, shape (count, N), orthonormal rows.
    #[getter]
    fn vectors<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray2<f64>> {
        mat_t_to_py(py, self.inner.vectors.as_ref())
    }
    /// The basis' own sample points (grid points or quadrature nodes).
    #[getter]
    fn x<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, self.inner.basis().as_dyn().points())
    }
    #[getter]
    fn count(&self) -> usize {
        self.inner.count()
    }
    /// The Heterostructure of the spectrum's Hamiltonian (None when it has none).
    #[getter]
    fn heterostructure(&self, py: Python<'_>) -> PyResult<Option<Py<PyHeterostructure>>> {
        self.inner.hamiltonian.stack().map(|s| Py::new(py, PyHeterostructure { inner: s.clone() })).transpose()
    }
    /// Per-level error estimates (energy units) of a self-converged solve
    /// (`Heterostructure.solve`): |E(p+2) − E(p)|; None for other solves.
    #[getter]
    fn errors<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        self.inner.errors.as_ref().map(|e| PyArray1::from_slice(py, e))
    }
    /// Per level, for a layered structure: True when the level lies below both cladding
    /// band edges (in a field, below the lower of the two), i.e. is bound; False for
    /// continuum (box) states. None without a structure.
    #[getter]
    fn bound<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<bool>>> {
        self.inner.bound.as_ref().map(|b| PyArray1::from_slice(py, b))
    }
    /// The Hamiltonian whose eigenpairs these are.
    #[getter]
    fn hamiltonian(&self) -> PyHamiltonian {
        PyHamiltonian { inner: self.inner.hamiltonian.clone() }
    }
    /// Broadened absorption from state `initial`: Σ_f f_if·L(E − (E_f − E_i)), shape (len(energies),).
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
    /// ⟨n|g(x)|n⟩ for every state: `g` a vectorised callable (or None for x), integrated by
    /// the trapezoid rule on `points` uniform points spanning the basis' own points.
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
    #[getter]
    fn method(&self) -> &'static str {
        self.inner.method.name()
    }
    #[getter]
    fn iterations(&self) -> usize {
        self.inner.iterations
    }
    /// (basis size, LOBPCG steps) of each coarse level of the iterative path's
    /// multilevel start, coarsest first (0 steps: solved densely, or already converged
    /// from the level below); empty for dense and warm-started solves.
    #[getter]
    fn levels(&self) -> Vec<(usize, usize)> {
        self.inner.levels.clone()
    }
    /// Relative accuracy round-off allows each level, ε‖H‖/max(|E_i|, E_max − E_min, E_unit),
    /// E_unit the lowest kinetic quantum of the domain; shape (count,). Above 1e-8 a
    /// `specwell.AccuracyWarning` is issued by `solve`.
    #[getter]
    fn attainable_accuracy<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.attainable)
    }
    /// How the result was produced when the automatic choice changed course (e.g. an
    /// iteration that stalled and was finished densely), else None.
    #[getter]
    fn note(&self) -> Option<String> {
        self.inner.note.clone()
    }
    #[getter]
    fn units(&self) -> &'static str {
        self.inner.units().name()
    }
    #[getter]
    fn basis(&self, py: Python<'_>) -> PyResult<Py<PyAny>> {
        basis_to_py(py, self.inner.basis())
    }
    /// ψ_n(x) for every state, shape (count, len(x)); x=None: the basis' own points.
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
    /// ⟨i|x|j⟩, shape (count, count), length units.
    fn dipole_matrix<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let d = observables::dipole_matrix(&self.inner).py(py)?;
        Ok(mat_to_py(py, d.as_ref()))
    }
    /// f_ij = (2m/ħ²)(E_j − E_i)|⟨i|x|j⟩|², shape (count, count).
    fn oscillator_strengths<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let f = observables::oscillator_strengths(&self.inner).py(py)?;
        Ok(mat_to_py(py, f.as_ref()))
    }
    /// ⟨ψ_i|φ_j⟩ with the states φ_j of `other` (same basis), shape (count, len(other)):
    /// Franck-Condon factors are its squares.
    fn overlaps<'py>(&self, py: Python<'py>, other: PyRef<'py, PySpectrum>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let s = observables::overlaps(&self.inner, &other.inner).py(py)?;
        Ok(mat_to_py(py, s.as_ref()))
    }
    /// ⟨i|g(x)|j⟩, shape (count, count), for a vectorised callable g(x).
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

/// All eigenpairs of a real symmetric matrix (lower triangle read) through the
/// core's dense solver: (values ascending, vectors as columns).
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

/// Spectra of many potentials on one basis (see `solve_batch`).
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
    /// ψ_n(x) of item `index`, shape (count, len(x)).
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

/// Solve many potentials on one basis in parallel (rayon, GIL released).
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
