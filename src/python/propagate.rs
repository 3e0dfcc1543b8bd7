//! Python classes SplitStep, Run and GroundState.

use super::arrays::{complex_array, real_nd, shaped_array, to_usize, vec_f64};
use super::basis::{PyFourierGrid, PyProductGrid};
use super::errors::IntoPyResult;
use super::hamiltonian::potential_samples;
use super::layers::PyHeterostructure;
use crate::basis::{BasisRef, PeriodicGrid};
use crate::model::units::Units;
use crate::propagate::{DriveSampling, GroundStates, Run, SplitOrder, SplitStep, SplitStepOptions};
use num_complex::Complex64;
use numpy::{PyArray1, PyArrayDyn};
use pyo3::exceptions::{PyKeyboardInterrupt, PyTypeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::PyTuple;
use std::sync::Arc;

/// The grid of a SplitStep: the Python object (returned by `.grid`) and the core grid.
struct GridArg {
    obj: Py<PyAny>,
    core: Arc<dyn PeriodicGrid>,
    /// The 1D grid, for the potential conversion shared with Hamiltonian.
    line: Option<BasisRef>,
}

fn extract_grid(grid: &Bound<'_, PyAny>) -> PyResult<GridArg> {
    if let Ok(g) = grid.cast::<PyFourierGrid>() {
        let inner = g.get().inner.clone();
        return Ok(GridArg { obj: grid.clone().unbind(), core: inner.clone(), line: Some(BasisRef::Fourier(inner)) });
    }
    if let Ok(g) = grid.cast::<PyProductGrid>() {
        return Ok(GridArg { obj: grid.clone().unbind(), core: g.get().inner.clone(), line: None });
    }
    Err(PyTypeError::new_err(format!(
        "`grid` must be a specwell.FourierGrid or specwell.ProductGrid (split-step needs a periodic grid); got {}",
        grid.get_type().name().map(|n| n.to_string()).unwrap_or_default()
    )))
}

fn shape_str(shape: &[usize]) -> String {
    match shape {
        [n] => format!("({n},)"),
        _ => format!("({})", shape.iter().map(|n| n.to_string()).collect::<Vec<_>>().join(", ")),
    }
}

/// Samples of a potential-like argument on the grid points, flat in C order: on a
/// FourierGrid as for Hamiltonian (callable f(x) or array on grid.x); on a ProductGrid a
/// callable f(x, y[, z]) called once with the broadcastable coordinate arrays
/// (numpy.meshgrid(..., indexing="ij", sparse=True)) returning the grid's shape (or an
/// array that broadcasts to it, or a number), or an array of exactly the grid's shape.
fn grid_samples(obj: &Bound<'_, PyAny>, grid: &GridArg, name: &str) -> PyResult<Vec<f64>> {
    if let Some(line) = &grid.line {
        return potential_samples(obj, line, name);
    }
    let py = obj.py();
    let g = &grid.core;
    let shape = g.shape();
    let dims = ["x", "y", "z"][..shape.len()].join(", ");
    if obj.cast::<PyHeterostructure>().is_ok() {
        return Err(PyTypeError::new_err(format!(
            "`{name}` is a Heterostructure, which is accepted only as the potential of a 1D Hamiltonian; on a ProductGrid `{name}` must be a callable f({dims}) or an array of shape {}",
            shape_str(&shape)
        )));
    }
    if obj.is_callable() {
        let np = py.import("numpy")?;
        let axes: Vec<Bound<'_, PyArray1<f64>>> = (0..shape.len()).map(|a| PyArray1::from_slice(py, g.axis(a).x())).collect();
        let kwargs = pyo3::types::PyDict::new(py);
        kwargs.set_item("indexing", "ij")?;
        kwargs.set_item("sparse", true)?;
        let mesh = np.getattr("meshgrid")?.call(PyTuple::new(py, axes)?, Some(&kwargs))?;
        let args = PyTuple::new(py, mesh.try_iter()?.collect::<PyResult<Vec<_>>>()?)?;
        let values = obj.call1(args).inspect_err(|e| {
            let _ = e.value(py).call_method1(
                "add_note",
                (format!("raised while evaluating `{name}` at the grid points: called once as f({dims}) with broadcastable float64 coordinate arrays"),),
            );
        })?;
        if let Ok(c) = values.extract::<f64>() {
            return Ok(vec![c; g.len()]);
        }
        let (got, data) = real_nd(&values, name)?;
        if got == shape {
            return Ok(data);
        }
        let target = PyTuple::new(py, &shape)?;
        let wide = np.call_method1("broadcast_to", (&values, target)).map_err(|_| {
            PyValueError::new_err(format!(
                "`{name}` (a callable f({dims})) must return an array of the grid's shape {} or one that broadcasts to it; got shape {}",
                shape_str(&shape),
                shape_str(&got)
            ))
        })?;
        return Ok(real_nd(&wide, name)?.1);
    }
    let (got, data) = real_nd(obj, name)?;
    if got != shape {
        return Err(PyValueError::new_err(format!(
            "`{name}` must be an array of the grid's shape {} (or a callable f({dims})); got shape {}",
            shape_str(&shape),
            shape_str(&got)
        )));
    }
    Ok(data)
}

/// Split-step Fourier propagator (Feit, Fleck & Steiger 1982) on a FourierGrid or ProductGrid.
///
/// Parameters
/// ----------
/// grid : FourierGrid or ProductGrid
///     Periodic grid (1D, or 2D/3D).
/// potential : callable or array_like
///     Static potential V0 (energy units): on a FourierGrid f(x) or samples on ``grid.x``; on a
///     ProductGrid f(x, y[, z]), called once with broadcastable coordinate arrays
///     (``grid.mesh(sparse=True)``) and returning the grid's shape (or a shape that broadcasts
///     to it, or a number), or an array of exactly ``grid.shape``.
/// mass : float, default 1.0
///     Particle mass (> 0, mass unit of ``units``); a single number (a position-dependent
///     mass does not split into kinetic and potential steps).
/// dt : float
///     Time step (time units; finite, nonzero; > 0 in imaginary time and with
///     ``absorber_potential``). Required: the default None raises TypeError.
/// order : {2, 4}, optional
///     2 (default None means 2): Strang splitting; 4: Yoshida (1990) composition of three
///     Strang steps (not in imaginary time).
/// units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}, default "natural"
///     Unit system ("cold-atom": µm, ms, u, energies in ħ/ms so that ħ = 1).
/// drive : callable or array_like, optional
///     f(t) of V(x,t) = V0(x) + f(t)·V1(x); needs ``drive_potential``. A callable is called
///     once per run with the array of sub-step sample times (it must be vectorised: f(t_array)
///     → array; see ``drive_sample_times``), keeping full order; an array gives f at the step
///     midpoints t_n + dt/2, one per step (second order in the drive for order=4). Both run at
///     the same speed: the samples are taken before the GIL is released.
/// drive_potential : callable or array_like, optional
///     V1 (energy per unit of f), like ``potential``; e.g. ``lambda x: x`` for a uniform
///     field. Needs ``drive``.
/// absorber_width : float, optional
///     Width of a smooth cos^(1/8) mask at every face of the box (absorption per step); in
///     (0, half the shortest side]. Not with ``absorber_potential``.
/// absorber_potential : callable or array_like, optional
///     Complex absorbing potential W ≥ 0: V → V − iW (like ``potential``).
/// imaginary_time : bool, default False
///     Propagate in imaginary time (use ``ground_states`` or ``ground_state``); not with a
///     drive or an absorber.
/// nonlinearity : float, default 0.0
///     g of the Gross-Pitaevskii term: iħ∂ψ/∂t = [T + V + g|ψ|²]ψ with ψ normalised to
///     Σ|ψ|²dV = 1, so g includes the atom number (energy·length^d). Default 0 (linear).
///     The potential sub-steps take the exact phase exp(−i(V + g|ψ|²)w·dt/ħ), keeping order 2
///     (Strang) and 4 (Yoshida) for the nonlinear flow (Bao, Jaksch & Markowich 2003).
///     Coupling constants from the scattering length: see ``coupling_constant`` (3D
///     g = 4πħ²aN/m; quasi-2D g₂ = g₃/(√(2π) a_z); quasi-1D g₁ = g₃/(2π a_⊥²)).
///     With g ≠ 0, ``Run.energy`` is the energy functional ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴dV.
///
/// Raises
/// ------
/// ValueError
///     An argument outside its range, a potential of the wrong shape, g not finite, an
///     option combination listed above.
/// TypeError
///     Wrong grid type, non-numeric input, ``dt`` missing, an array ``mass``.
/// MemoryError
///     The phase tables would not fit in memory.
///
/// Notes
/// -----
/// Periodic boundaries: a packet leaving one face re-enters at the other unless absorbed.
/// The splitting error is O(dt²) (order 2) or O(dt⁴) (order 4) per unit time; the grid must
/// resolve the largest momentum reached (|k| < π/dx). ``Run.norm`` and ``Run.energy`` are
/// diagnostics, not accuracy guarantees: check convergence by halving ``dt``.
///
/// Examples
/// --------
/// A displaced Gaussian in a harmonic trap returns after one period 2π:
///
/// >>> import numpy as np
/// >>> import specwell as sw
/// >>> g = sw.FourierGrid(-10.0, 10.0, 128)
/// >>> prop = sw.SplitStep(g, 0.5 * g.x**2, dt=2 * np.pi / 1000, order=4)
/// >>> run = prop.run(sw.gaussian_packet(g, 1.0, sigma=np.sqrt(0.5)), 1000, record_every=500)
/// >>> np.round(run.mean_x, 6)
/// array([ 1., -1.,  1.])
#[pyclass(name = "SplitStep", module = "specwell._core", frozen)]
pub struct PySplitStep {
    core: Arc<SplitStep>,
    grid: Py<PyAny>,
    /// f(t): a callable (evaluated at the sub-step times of each run) or per-step samples.
    drive: Option<Py<PyAny>>,
}

/// A single mass for SplitStep: a number (a position-dependent mass does not split
/// exactly into kinetic and potential steps).
fn scalar_mass(m: &Bound<'_, PyAny>) -> PyResult<f64> {
    if let Ok(v) = m.extract::<f64>() {
        return Ok(v);
    }
    Err(PyTypeError::new_err(format!(
        "`mass` must be a single positive number for SplitStep (a position-dependent mass does not split exactly into kinetic and potential steps; use Hamiltonian(grid, V, mass=array) for its eigenstates); got {}",
        m.get_type().name().map(|n| n.to_string()).unwrap_or_default()
    )))
}

#[pymethods]
impl PySplitStep {
    #[new]
    #[pyo3(signature = (grid, potential, mass=None, dt=None, order=None, units="natural", *, drive=None,
                        drive_potential=None, absorber_width=None, absorber_potential=None, imaginary_time=false,
                        nonlinearity=0.0),
           text_signature = "(grid, potential, mass=1.0, dt=None, order=None, units='natural', *, drive=None, drive_potential=None, absorber_width=None, absorber_potential=None, imaginary_time=False, nonlinearity=0.0)")]
    fn new(
        py: Python<'_>,
        grid: &Bound<'_, PyAny>,
        potential: &Bound<'_, PyAny>,
        mass: Option<&Bound<'_, PyAny>>,
        dt: Option<f64>,
        order: Option<&Bound<'_, PyAny>>,
        units: &str,
        drive: Option<&Bound<'_, PyAny>>,
        drive_potential: Option<&Bound<'_, PyAny>>,
        absorber_width: Option<f64>,
        absorber_potential: Option<&Bound<'_, PyAny>>,
        imaginary_time: bool,
        nonlinearity: f64,
    ) -> PyResult<Self> {
        let units = Units::parse(units).py(py)?;
        let g = extract_grid(grid)?;
        let dt = dt.ok_or_else(|| PyTypeError::new_err("`dt` is required: the time step (time units; > 0 for imaginary time)"))?;
        let mut o = SplitStepOptions::new(g.core.clone(), grid_samples(potential, &g, "potential")?, dt);
        o.units = units;
        o.mass = match mass {
            None => 1.0,
            Some(m) => scalar_mass(m)?,
        };
        if let Some(ord) = order {
            let k = ord
                .extract::<i64>()
                .map_err(|_| PyTypeError::new_err("`order` must be an integer: 2 (Strang) or 4 (Yoshida composition)"))?;
            o.order = SplitOrder::from_number(k).py(py)?;
        }
        crate::propagate::drive::check_drive_pair(drive.is_some(), drive_potential.is_some()).py(py)?;
        o.drive_potential = drive_potential.map(|d| grid_samples(d, &g, "drive_potential")).transpose()?;
        o.absorber_width = absorber_width;
        o.absorber_potential = absorber_potential.map(|a| grid_samples(a, &g, "absorber_potential")).transpose()?;
        o.imaginary_time = imaginary_time;
        o.nonlinearity = nonlinearity;
        let core = py.detach(|| SplitStep::new(o)).py(py)?;
        Ok(PySplitStep { core: Arc::new(core), grid: g.obj, drive: drive.map(|d| d.clone().unbind()) })
    }

    /// Propagate ``psi0`` (samples on the grid) for ``steps`` steps.
    ///
    /// Parameters
    /// ----------
    /// psi0 : array_like, shape (N,) on a FourierGrid, ``grid.shape`` on a ProductGrid
    ///     Initial state; normalise it (Σ|ψ|²dV = 1) for normalised observables, and always
    ///     with a nonlinearity (g multiplies |ψ|²).
    /// steps : int
    ///     Number of time steps (≥ 0).
    /// record_every : int, optional
    ///     Record every this many steps (≥ 1; default None means 1); the final state is
    ///     always recorded.
    /// progress : bool, default False
    ///     Show a tqdm progress bar (extra ``progress``). Ctrl-C interrupts the run
    ///     (KeyboardInterrupt) with or without it.
    ///
    /// Returns
    /// -------
    /// Run
    ///
    /// Raises
    /// ------
    /// MemoryError
    ///     If the recorded snapshots would not fit in memory (raise ``record_every``); refused
    ///     before any step is taken.
    /// ValueError
    ///     ``psi0`` of the wrong shape or not finite, ``steps`` or ``record_every`` out of range.
    /// KeyboardInterrupt
    ///     The run was interrupted (Ctrl-C).
    #[pyo3(signature = (psi0, steps, record_every=None, progress=false))]
    fn run(
        &self,
        py: Python<'_>,
        psi0: &Bound<'_, PyAny>,
        steps: &Bound<'_, PyAny>,
        record_every: Option<&Bound<'_, PyAny>>,
        progress: bool,
    ) -> PyResult<PyRun> {
        let n = self.core.n();
        let (shape, data) = complex_array(psi0, "psi0")?;
        if shape != self.core.shape() {
            return Err(PyValueError::new_err(format!(
                "`psi0` must have shape {} (the grid's shape); got {shape:?}",
                shape_str(self.core.shape())
            )));
        }
        let steps = to_usize(steps, "steps", 0, usize::MAX >> 8)?;
        let record_every = match record_every {
            None => 1,
            Some(r) => to_usize(r, "record_every", 1, usize::MAX >> 8)?,
        };
        // Refuse oversized record sets before evaluating a drive callable.
        let records = (steps / record_every + 2) as u64;
        crate::error::check_memory("record_every", records.saturating_mul(n as u64 * 16), "record fewer snapshots: raise record_every").py(py)?;
        let core = self.prepared(py, steps)?;
        let mut bar = ProgressBar::new(py, progress, steps as u64)?;
        let (result, interrupted) = {
            let bar_ref = &mut bar;
            let mut interrupted = false;
            let r = py.detach(|| {
                core.run(&data, steps, record_every, &mut |done| {
                    Python::attach(|py| {
                        bar_ref.update(py, done as u64);
                        if py.check_signals().is_err() {
                            interrupted = true;
                        }
                    });
                    !interrupted
                })
            });
            (r, interrupted)
        };
        bar.close(py);
        if interrupted {
            return Err(PyKeyboardInterrupt::new_err("propagation interrupted"));
        }
        let run = result.py(py)?;
        Ok(PyRun::new(run, self.grid.clone_ref(py), self.core.options().units))
    }

    /// Propagate several initial states in parallel across cores (GIL released).
    ///
    /// Parameters
    /// ----------
    /// psi0s : array_like, shape (M, N) or (M, *grid.shape)
    ///     M ≥ 1 initial states (as for ``run``).
    /// steps : int
    ///     Number of time steps (≥ 0), the same for every state.
    /// record_every : int, optional
    ///     Record every this many steps (≥ 1; default None means 1).
    ///
    /// Returns
    /// -------
    /// list of Run
    ///     One per initial state, in order.
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     ``psi0s`` of the wrong shape, ``steps`` or ``record_every`` out of range.
    #[pyo3(signature = (psi0s, steps, record_every=None))]
    fn run_many(
        &self,
        py: Python<'_>,
        psi0s: &Bound<'_, PyAny>,
        steps: &Bound<'_, PyAny>,
        record_every: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Vec<PyRun>> {
        let (shape, data) = complex_array(psi0s, "psi0s")?;
        if shape.len() != self.core.shape().len() + 1 || shape[1..] != *self.core.shape() || shape[0] == 0 {
            let want = self.core.shape().iter().map(|n| n.to_string()).collect::<Vec<_>>().join(", ");
            return Err(PyValueError::new_err(format!("`psi0s` must have shape (M, {want}) with M >= 1; got {shape:?}")));
        }
        let steps = to_usize(steps, "steps", 0, usize::MAX >> 8)?;
        let record_every = match record_every {
            None => 1,
            Some(r) => to_usize(r, "record_every", 1, usize::MAX >> 8)?,
        };
        let core = self.prepared(py, steps)?;
        let runs = py.detach(|| core.run_many(&data, steps, record_every, &mut |_| true)).py(py)?;
        Ok(runs.into_iter().map(|r| PyRun::new(r, self.grid.clone_ref(py), self.core.options().units)).collect())
    }

    /// Lowest ``count`` states by imaginary-time propagation with Gram-Schmidt (imaginary_time=True).
    ///
    /// With a nonlinearity only ``count=1`` is accepted (ValueError otherwise): the normalised
    /// gradient flow, refined to the minimum of the energy functional on the grid, and the
    /// returned energy is the chemical potential μ = ⟨T⟩ + ⟨V⟩ + gΣ|ψ|⁴dV (see ``ground_state``
    /// for the energy functional too).
    ///
    /// Parameters
    /// ----------
    /// count : int
    ///     Number of states, 1 ≤ count ≤ number of grid points.
    /// tol : float, default 1e-9
    ///     Stop when max_i |ΔE_i|/Δτ < ``tol`` (> 0; energy per time unit), checked every 10
    ///     steps; the states are then refined by a Rayleigh-Ritz step in their span.
    /// max_steps : int, optional
    ///     Imaginary-time step limit (≥ 1); default None means 200000.
    /// seed : int, optional
    ///     Seed of the random start states, in [0, 2**63); default None means a fixed seed.
    ///
    /// Returns
    /// -------
    /// energies : ndarray, shape (count,)
    /// states : ndarray of complex128, shape (count, N) or (count, *grid.shape), Σ|ψ|²dV = 1
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     The propagator is not in imaginary time; count, tol or max_steps out of range.
    /// ConvergenceError
    ///     ``tol`` not reached within ``max_steps`` (its ``rates`` hold the last |dE/dτ|).
    ///
    /// Notes
    /// -----
    /// Linear case: the fixed point is an eigenstate of the split operator, O(dτ²) away from
    /// the grid eigenstate; the energies (Rayleigh quotients of the grid H) are O(dτ⁴)
    /// accurate. ``Hamiltonian.solve`` on the same grid has no dτ error. With g ≠ 0 the
    /// state is refined to the grid minimum of the energy functional (independent of dτ).
    #[pyo3(signature = (count, tol=1e-9, max_steps=None, seed=None))]
    fn ground_states<'py>(
        &self,
        py: Python<'py>,
        count: &Bound<'py, PyAny>,
        tol: f64,
        max_steps: Option<&Bound<'py, PyAny>>,
        seed: Option<&Bound<'py, PyAny>>,
    ) -> PyResult<(Bound<'py, PyArray1<f64>>, Bound<'py, PyArrayDyn<Complex64>>)> {
        let gs = self.solve_ground(py, Some(count), tol, max_steps, seed)?;
        let mut shape = vec![gs.energies.len()];
        shape.extend_from_slice(self.core.shape());
        let states = shaped_array(py, &shape, gs.states)?;
        Ok((PyArray1::from_vec(py, gs.energies), states))
    }

    /// The ground state by imaginary time (imaginary_time=True), with μ, E and its residual.
    ///
    /// Parameters
    /// ----------
    /// tol : float, default 1e-9
    ///     Stop the imaginary-time flow when |Δμ|/Δτ < ``tol`` (> 0; energy per time unit);
    ///     with g ≠ 0 the state is then refined by conjugate gradients to the grid minimum of
    ///     the energy functional.
    /// max_steps : int, optional
    ///     Imaginary-time step limit (≥ 1); default None means 200000.
    /// seed : int, optional
    ///     Seed of the random start state, in [0, 2**63); default None means a fixed seed.
    ///
    /// Returns
    /// -------
    /// GroundState
    ///
    /// Raises
    /// ------
    /// ValueError
    ///     The propagator is not in imaginary time; tol or max_steps out of range.
    /// ConvergenceError
    ///     ``tol`` not reached within ``max_steps``.
    #[pyo3(signature = (tol=1e-9, max_steps=None, seed=None))]
    fn ground_state(&self, py: Python<'_>, tol: f64, max_steps: Option<&Bound<'_, PyAny>>, seed: Option<&Bound<'_, PyAny>>) -> PyResult<PyGroundState> {
        let gs = self.solve_ground(py, None, tol, max_steps, seed)?;
        Ok(PyGroundState { inner: gs, shape: self.core.shape().to_vec(), units: self.core.options().units, nonlinearity: self.core.nonlinearity() })
    }

    /// Times at which a callable drive is evaluated for a run of ``steps`` steps.
    ///
    /// Parameters
    /// ----------
    /// steps : int
    ///     Number of steps of the run (≥ 0).
    ///
    /// Returns
    /// -------
    /// ndarray
    ///     Sample times relative to the start of the run (t0 = 0), in the order the drive
    ///     callable receives them.
    ///
    /// Raises
    /// ------
    /// MemoryError
    ///     The samples for this many steps would not fit in memory.
    fn drive_sample_times<'py>(&self, py: Python<'py>, steps: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let steps = to_usize(steps, "steps", 0, usize::MAX >> 8)?;
        self.check_drive_memory(py, steps)?;
        Ok(PyArray1::from_vec(py, self.core.drive_sample_times(steps, DriveSampling::Substeps)))
    }

    /// Time step.
    #[getter]
    fn dt(&self) -> f64 {
        self.core.dt()
    }
    /// Splitting order (2 or 4).
    #[getter]
    fn order(&self) -> usize {
        self.core.order().number()
    }
    /// Unit system name.
    #[getter]
    fn units(&self) -> &'static str {
        self.core.options().units.name()
    }
    /// Particle mass (mass unit of ``units``).
    #[getter]
    fn mass(&self) -> f64 {
        self.core.options().mass
    }
    /// g of the mean-field term g|ψ|² (0: linear).
    #[getter]
    fn nonlinearity(&self) -> f64 {
        self.core.nonlinearity()
    }
    /// The grid.
    #[getter]
    fn grid(&self, py: Python<'_>) -> Py<PyAny> {
        self.grid.clone_ref(py)
    }
    /// Static potential on the grid (the grid's shape).
    #[getter]
    fn potential<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArrayDyn<f64>>> {
        shaped_array(py, self.core.shape(), self.core.potential().to_vec())
    }
    fn __repr__(&self) -> String {
        let o = self.core.options();
        format!(
            "SplitStep({}, dt={}, order={}, mass={}, units={:?}{}{}{})",
            o.grid.describe_grid(),
            o.dt,
            o.order.number(),
            o.mass,
            o.units.name(),
            if o.nonlinearity != 0.0 { format!(", nonlinearity={}", o.nonlinearity) } else { String::new() },
            if self.drive.is_some() { ", driven" } else { "" },
            if o.imaginary_time { ", imaginary time" } else { "" }
        )
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyTuple>)> {
        let py = slf.py();
        let s = slf.get();
        let o = s.core.options();
        let ctor = py.import("specwell._core")?.getattr("_split_step_from_parts")?;
        let none = || py.None();
        let shape = s.core.shape();
        let arr = |v: &Option<Vec<f64>>| -> PyResult<Py<PyAny>> {
            Ok(match v {
                Some(d) => shaped_array(py, shape, d.clone())?.into_any().unbind(),
                None => none(),
            })
        };
        let args = PyTuple::new(
            py,
            [
                s.grid.clone_ref(py),
                shaped_array(py, shape, o.potential.clone())?.into_any().unbind(),
                o.mass.into_pyobject(py)?.into_any().unbind(),
                o.dt.into_pyobject(py)?.into_any().unbind(),
                o.order.number().into_pyobject(py)?.into_any().unbind(),
                o.units.name().into_pyobject(py)?.into_any().unbind(),
                s.drive.as_ref().map(|d| d.clone_ref(py)).unwrap_or_else(none),
                arr(&o.drive_potential)?,
                o.absorber_width.map(|w| w.into_pyobject(py).map(|o| o.into_any().unbind())).transpose()?.unwrap_or_else(none),
                arr(&o.absorber_potential)?,
                o.imaginary_time.into_pyobject(py)?.to_owned().into_any().unbind(),
                o.nonlinearity.into_pyobject(py)?.into_any().unbind(),
            ],
        )?;
        Ok((ctor, args))
    }
}

impl PySplitStep {
    /// Refuse up front drive sample arrays (times and values) that would not fit in memory.
    fn check_drive_memory(&self, py: Python<'_>, steps: usize) -> PyResult<()> {
        let per_step = self.core.samples_per_step(DriveSampling::Substeps) as u64;
        let bytes = (steps as u64).saturating_mul(per_step).saturating_mul(16);
        crate::error::check_memory("steps", bytes, "the drive samples for this many steps do not fit; run in shorter segments").py(py)
    }

    /// `ground_states(count)` (count given) or `ground_state()` (count 1) in the core.
    fn solve_ground(
        &self,
        py: Python<'_>,
        count: Option<&Bound<'_, PyAny>>,
        tol: f64,
        max_steps: Option<&Bound<'_, PyAny>>,
        seed: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<GroundStates> {
        let n = self.core.n();
        let count = match count {
            Some(c) => to_usize(c, "count", 1, n)?,
            None => 1,
        };
        let max_steps = match max_steps {
            None => 200_000,
            Some(m) => to_usize(m, "max_steps", 1, usize::MAX >> 8)?,
        };
        crate::error::check_positive("tol", tol).py(py)?;
        let seed = super::arrays::seed_arg(seed)?;
        let core = self.core.clone();
        py.detach(move || core.ground_states(count, tol, max_steps, seed)).py(py)
    }

    /// The core propagator with the drive samples for a run of `steps` steps: a callable
    /// is called once on the array of sample times (it must be vectorised); an array
    /// gives one sample per step (f at each step midpoint).
    fn prepared(&self, py: Python<'_>, steps: usize) -> PyResult<Arc<SplitStep>> {
        let Some(f) = &self.drive else { return Ok(self.core.clone()) };
        let f = f.bind(py);
        self.check_drive_memory(py, steps)?;
        let (values, sampling) = if f.is_callable() {
            let times = self.core.drive_sample_times(steps, DriveSampling::Substeps);
            let t = PyArray1::from_slice(py, &times);
            let out = f.call1((t,)).inspect_err(|e| {
                let _ = e.value(py).call_method1(
                    "add_note",
                    ("raised while evaluating `drive` on the array of sample times (drive must be vectorised: f(t_array) -> array)",),
                );
            })?;
            (vec_f64(&out, "drive", Some(times.len()))?, DriveSampling::Substeps)
        } else {
            (vec_f64(f, "drive", None)?, DriveSampling::Midpoint)
        };
        Ok(Arc::new(self.core.with_drive(values, sampling).py(py)?))
    }
}

/// Rebuild a SplitStep (target of `SplitStep.__reduce__`).
#[pyfunction]
#[pyo3(signature = (grid, potential, mass, dt, order, units, drive, drive_potential, absorber_width, absorber_potential, imaginary_time, nonlinearity=0.0))]
pub fn _split_step_from_parts(
    py: Python<'_>,
    grid: &Bound<'_, PyAny>,
    potential: &Bound<'_, PyAny>,
    mass: &Bound<'_, PyAny>,
    dt: f64,
    order: &Bound<'_, PyAny>,
    units: &str,
    drive: Option<&Bound<'_, PyAny>>,
    drive_potential: Option<&Bound<'_, PyAny>>,
    absorber_width: Option<f64>,
    absorber_potential: Option<&Bound<'_, PyAny>>,
    imaginary_time: bool,
    nonlinearity: f64,
) -> PyResult<PySplitStep> {
    PySplitStep::new(
        py,
        grid,
        potential,
        Some(mass),
        Some(dt),
        Some(order),
        units,
        drive,
        drive_potential,
        absorber_width,
        absorber_potential,
        imaginary_time,
        nonlinearity,
    )
}

/// A ground state from ``SplitStep.ground_state``.
#[pyclass(name = "GroundState", module = "specwell._core", frozen)]
pub struct PyGroundState {
    inner: GroundStates,
    shape: Vec<usize>,
    units: Units,
    nonlinearity: f64,
}

#[pymethods]
impl PyGroundState {
    /// μ = ⟨T⟩ + ⟨V⟩ + gΣ|ψ|⁴dV (the lowest eigenvalue when g = 0).
    #[getter]
    fn chemical_potential(&self) -> f64 {
        self.inner.energies[0]
    }
    /// Energy functional E = ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴dV (per particle: ψ is normalised to 1).
    #[getter]
    fn energy(&self) -> f64 {
        self.inner.energy_functional[0]
    }
    /// The state (real values, complex128), the grid's shape, Σ|ψ|²dV = 1, positive where it is largest.
    #[getter]
    fn state<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArrayDyn<Complex64>>> {
        shaped_array(py, &self.shape, self.inner.states.clone())
    }
    /// ‖H[ψ]ψ − μψ‖ in the discrete norm (Σ|·|²dV)^{1/2}.
    #[getter]
    fn residual(&self) -> f64 {
        self.inner.residuals[0]
    }
    /// Imaginary-time steps taken.
    #[getter]
    fn steps(&self) -> usize {
        self.inner.steps
    }
    /// |dμ/dτ| at the last imaginary-time check.
    #[getter]
    fn rate(&self) -> f64 {
        self.inner.rates[0]
    }
    /// Conjugate-gradient iterations of the refinement to the grid solution (0 when g = 0).
    #[getter]
    fn refine_iterations(&self) -> usize {
        self.inner.refine_iterations
    }
    /// g of the propagator.
    #[getter]
    fn nonlinearity(&self) -> f64 {
        self.nonlinearity
    }
    /// Unit system name.
    #[getter]
    fn units(&self) -> &'static str {
        self.units.name()
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyTuple>)> {
        let py = slf.py();
        let s = slf.get();
        let r = &s.inner;
        let ctor = py.import("specwell._core")?.getattr("_ground_state_from_parts")?;
        let args = PyTuple::new(
            py,
            [
                s.shape.clone().into_pyobject(py)?.into_any().unbind(),
                s.units.name().into_pyobject(py)?.into_any().unbind(),
                s.nonlinearity.into_pyobject(py)?.into_any().unbind(),
                r.energies[0].into_pyobject(py)?.into_any().unbind(),
                r.energy_functional[0].into_pyobject(py)?.into_any().unbind(),
                PyArray1::from_slice(py, &r.states).into_any().unbind(),
                r.residuals[0].into_pyobject(py)?.into_any().unbind(),
                r.steps.into_pyobject(py)?.into_any().unbind(),
                r.rates[0].into_pyobject(py)?.into_any().unbind(),
                r.refine_iterations.into_pyobject(py)?.into_any().unbind(),
            ],
        )?;
        Ok((ctor, args))
    }
    fn __repr__(&self) -> String {
        format!(
            "GroundState(chemical_potential={}, energy={}, residual={:.2e}, steps={})",
            self.inner.energies[0], self.inner.energy_functional[0], self.inner.residuals[0], self.inner.steps
        )
    }
}

/// Rebuild a GroundState from its parts (target of `GroundState.__reduce__`).
#[pyfunction]
pub fn _ground_state_from_parts(
    shape: Vec<usize>,
    units: &str,
    nonlinearity: f64,
    chemical_potential: f64,
    energy: f64,
    state: Vec<Complex64>,
    residual: f64,
    steps: usize,
    rate: f64,
    refine_iterations: usize,
) -> PyResult<PyGroundState> {
    let units = Units::parse(units).map_err(|e| PyValueError::new_err(e.to_string()))?;
    let n: usize = shape.iter().product();
    if shape.is_empty() || shape.len() > 3 || n == 0 || state.len() != n {
        return Err(PyValueError::new_err("inconsistent GroundState parts (shape and state size differ)"));
    }
    let inner = GroundStates {
        n,
        energies: vec![chemical_potential],
        energy_functional: vec![energy],
        states: state,
        steps,
        rates: vec![rate],
        residuals: vec![residual],
        refine_iterations,
    };
    Ok(PyGroundState { inner, shape, units, nonlinearity })
}

/// tqdm progress bar driven from the Rust loop (a no-op when progress=False).
struct ProgressBar {
    bar: Option<Py<PyAny>>,
    last: u64,
}

impl ProgressBar {
    fn new(py: Python<'_>, enabled: bool, total: u64) -> PyResult<Self> {
        if !enabled {
            return Ok(ProgressBar { bar: None, last: 0 });
        }
        let tqdm = py.import("tqdm").map_err(|_| {
            pyo3::exceptions::PyImportError::new_err("progress=True needs tqdm: pip install 'specwell[progress]'")
        })?;
        let kwargs = pyo3::types::PyDict::new(py);
        kwargs.set_item("total", total)?;
        kwargs.set_item("unit", "step")?;
        kwargs.set_item("desc", "split-step")?;
        let bar = tqdm.getattr("tqdm")?.call((), Some(&kwargs))?;
        Ok(ProgressBar { bar: Some(bar.unbind()), last: 0 })
    }
    fn update(&mut self, py: Python<'_>, done: u64) {
        if let Some(b) = &self.bar {
            let _ = b.call_method1(py, "update", (done.saturating_sub(self.last),));
            self.last = done;
        }
    }
    fn close(&mut self, py: Python<'_>) {
        if let Some(b) = &self.bar {
            let _ = b.call_method0(py, "close");
        }
    }
}

/// Result of ``SplitStep.run``: records at ``times`` (record 0 = initial state).
#[pyclass(name = "Run", module = "specwell._core", frozen)]
pub struct PyRun {
    pub inner: Arc<Run>,
    grid: Py<PyAny>,
    units: Units,
}

impl PyRun {
    fn new(run: Run, grid: Py<PyAny>, units: Units) -> Self {
        PyRun { inner: Arc::new(run), grid, units }
    }
}

fn optional<'py>(py: Python<'py>, v: &[f64]) -> Option<Bound<'py, PyArray1<f64>>> {
    (!v.is_empty()).then(|| PyArray1::from_slice(py, v))
}

/// The points of axis `a` of a Run's grid (None when the grid has no such axis).
fn axis_points<'py>(py: Python<'py>, grid: &Py<PyAny>, a: usize) -> Option<Bound<'py, PyArray1<f64>>> {
    let g = grid.bind(py);
    if let Ok(f) = g.cast::<PyFourierGrid>() {
        return (a == 0).then(|| PyArray1::from_slice(py, f.get().inner.x()));
    }
    let p = g.cast::<PyProductGrid>().ok()?;
    let inner = &p.get().inner;
    (a < inner.ndim()).then(|| PyArray1::from_slice(py, inner.axis(a).x()))
}

#[pymethods]
impl PyRun {
    /// Record times.
    #[getter]
    fn times<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.times)
    }
    /// Recorded states, shape (records, N) on a FourierGrid, (records, *grid.shape) on a ProductGrid.
    #[getter]
    fn states<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArrayDyn<Complex64>>> {
        let r = &self.inner;
        let mut shape = vec![r.times.len()];
        shape.extend_from_slice(&r.shape);
        shaped_array(py, &shape, r.states.clone())
    }
    /// Σ|ψ|²dV per record.
    #[getter]
    fn norm<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.norm)
    }
    /// ⟨x⟩ per record (normalised by the norm).
    #[getter]
    fn mean_x<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.mean_x)
    }
    /// ⟨y⟩ per record (None on a 1D grid).
    #[getter]
    fn mean_y<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        optional(py, &self.inner.mean_y)
    }
    /// ⟨z⟩ per record (None on a 1D or 2D grid).
    #[getter]
    fn mean_z<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        optional(py, &self.inner.mean_z)
    }
    /// ⟨p_x⟩ = ħ⟨k_x⟩ per record.
    #[getter]
    fn mean_p<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.mean_p)
    }
    /// ⟨p_y⟩ per record (None on a 1D grid).
    #[getter]
    fn mean_py<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        optional(py, &self.inner.mean_py)
    }
    /// ⟨p_z⟩ per record (None on a 1D or 2D grid).
    #[getter]
    fn mean_pz<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        optional(py, &self.inner.mean_pz)
    }
    /// ⟨T⟩ + ⟨V(t)⟩ per record; with a nonlinearity the energy functional ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴dV (all divided by the norm).
    #[getter]
    fn energy<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        PyArray1::from_slice(py, &self.inner.energy)
    }
    /// ⟨ψ(0)|ψ(t)⟩ = Σ conj(ψ0)ψ dV per record.
    #[getter]
    fn autocorrelation<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<Complex64>> {
        PyArray1::from_slice(py, &self.inner.autocorrelation)
    }
    /// Fraction of the norm absorbed (None without an absorber).
    #[getter]
    fn absorbed_norm(&self) -> Option<f64> {
        self.inner.absorbed_norm
    }
    /// Steps taken.
    #[getter]
    fn steps_done(&self) -> usize {
        self.inner.steps_done
    }
    /// Step index of each record.
    #[getter]
    fn record_steps(&self) -> Vec<usize> {
        self.inner.record_steps.clone()
    }
    /// The grid.
    #[getter]
    fn grid(&self, py: Python<'_>) -> Py<PyAny> {
        self.grid.clone_ref(py)
    }
    /// Points per axis of each recorded state.
    #[getter]
    fn shape(&self) -> Vec<usize> {
        self.inner.shape.clone()
    }
    /// Points of the x axis.
    #[getter]
    fn x<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray1<f64>>> {
        axis_points(py, &self.grid, 0).ok_or_else(|| PyValueError::new_err("run grid has no x axis"))
    }
    /// Points of the y axis (None on a 1D grid).
    #[getter]
    fn y<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        axis_points(py, &self.grid, 1)
    }
    /// Points of the z axis (None on a 1D or 2D grid).
    #[getter]
    fn z<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        axis_points(py, &self.grid, 2)
    }
    /// Unit system name.
    #[getter]
    fn units(&self) -> &'static str {
        self.units.name()
    }
    fn __len__(&self) -> usize {
        self.inner.times.len()
    }
    fn __repr__(&self) -> String {
        let r = &self.inner;
        let t = r.times.last().cloned().unwrap_or(0.0);
        let sym = self.units.symbols()[3];
        format!(
            "Run(records={}, steps={}, t_end={t}{}{}, final norm={:.12})",
            r.times.len(),
            r.steps_done,
            if sym.is_empty() { "" } else { " " },
            sym,
            r.norm.last().cloned().unwrap_or(0.0)
        )
    }
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyTuple>)> {
        let py = slf.py();
        let s = slf.get();
        let r = &s.inner;
        let ctor = py.import("specwell._core")?.getattr("_run_from_parts")?;
        let opt = |v: &Vec<f64>| if v.is_empty() { py.None() } else { PyArray1::from_slice(py, v).into_any().unbind() };
        let args = PyTuple::new(
            py,
            [
                s.grid.clone_ref(py),
                s.units.name().into_pyobject(py)?.into_any().unbind(),
                r.record_steps.clone().into_pyobject(py)?.into_any().unbind(),
                PyArray1::from_slice(py, &r.times).into_any().unbind(),
                PyArray1::from_slice(py, &r.states).into_any().unbind(),
                PyArray1::from_slice(py, &r.norm).into_any().unbind(),
                PyArray1::from_slice(py, &r.mean_x).into_any().unbind(),
                PyArray1::from_slice(py, &r.mean_p).into_any().unbind(),
                PyArray1::from_slice(py, &r.energy).into_any().unbind(),
                PyArray1::from_slice(py, &r.autocorrelation).into_any().unbind(),
                r.absorbed_norm.into_pyobject(py)?.into_any().unbind(),
                r.steps_done.into_pyobject(py)?.into_any().unbind(),
                r.cancelled.into_pyobject(py)?.to_owned().into_any().unbind(),
                opt(&r.mean_y),
                opt(&r.mean_z),
                opt(&r.mean_py),
                opt(&r.mean_pz),
            ],
        )?;
        Ok((ctor, args))
    }
    fn _repr_html_(&self) -> String {
        let r = &self.inner;
        let sym = self.units.symbols();
        let last = |v: &Vec<f64>| v.last().map(|x| format!("{x:.10}")).unwrap_or_default();
        super::display::key_value_table(
            "Run",
            &[
                ("records", r.times.len().to_string()),
                ("steps", r.steps_done.to_string()),
                ("t end", format!("{}{}", last(&r.times), super::display::unit_suffix(sym[3]))),
                ("final norm", last(&r.norm)),
                ("final ⟨x⟩", format!("{}{}", last(&r.mean_x), super::display::unit_suffix(sym[0]))),
                ("final energy", format!("{}{}", last(&r.energy), super::display::unit_suffix(sym[1]))),
                ("absorbed", r.absorbed_norm.map(|a| format!("{a:.6}")).unwrap_or_else(|| "—".into())),
            ],
        )
    }
}

/// Seconds per forward+inverse pair of bare in-place FFTs of length `n` (benchmark floor).
#[pyfunction]
pub fn _bare_fft_pair_seconds(py: Python<'_>, n: usize, reps: usize) -> f64 {
    py.detach(|| crate::propagate::bare_fft_pair_seconds(n, reps))
}

/// Seconds per forward+inverse pair of whole-state FFTs of a FourierGrid or ProductGrid.
#[pyfunction]
pub fn _bare_grid_fft_pair_seconds(py: Python<'_>, grid: &Bound<'_, PyAny>, reps: usize) -> PyResult<f64> {
    let g = extract_grid(grid)?.core;
    Ok(py.detach(|| crate::propagate::bare_grid_fft_pair_seconds(&*g, reps)))
}

/// Rebuild a Run from its parts (target of `Run.__reduce__`).
#[pyfunction]
#[pyo3(signature = (grid, units, record_steps, times, states, norm, mean_x, mean_p, energy, autocorrelation,
                    absorbed_norm, steps_done, cancelled, mean_y=None, mean_z=None, mean_py=None, mean_pz=None))]
pub fn _run_from_parts(
    grid: &Bound<'_, PyAny>,
    units: &str,
    record_steps: Vec<usize>,
    times: Vec<f64>,
    states: Vec<Complex64>,
    norm: Vec<f64>,
    mean_x: Vec<f64>,
    mean_p: Vec<f64>,
    energy: Vec<f64>,
    autocorrelation: Vec<Complex64>,
    absorbed_norm: Option<f64>,
    steps_done: usize,
    cancelled: bool,
    mean_y: Option<Vec<f64>>,
    mean_z: Option<Vec<f64>>,
    mean_py: Option<Vec<f64>>,
    mean_pz: Option<Vec<f64>>,
) -> PyResult<PyRun> {
    let units = Units::parse(units).map_err(|e| PyValueError::new_err(e.to_string()))?;
    let g = extract_grid(grid)?;
    let shape = g.core.shape();
    let nd = shape.len();
    let n = g.core.len();
    let records = times.len();
    let (mean_y, mean_z, mean_py, mean_pz) =
        (mean_y.unwrap_or_default(), mean_z.unwrap_or_default(), mean_py.unwrap_or_default(), mean_pz.unwrap_or_default());
    let axis_ok = |v: &Vec<f64>, a: usize| v.len() == if nd > a { records } else { 0 };
    if states.len() != records * n
        || [norm.len(), mean_x.len(), mean_p.len(), energy.len(), autocorrelation.len(), record_steps.len()].iter().any(|&l| l != records)
        || !(axis_ok(&mean_y, 1) && axis_ok(&mean_py, 1) && axis_ok(&mean_z, 2) && axis_ok(&mean_pz, 2))
    {
        return Err(PyValueError::new_err("inconsistent Run parts (record counts differ)"));
    }
    let run = Run {
        n,
        shape,
        record_steps,
        times,
        states,
        norm,
        mean_x,
        mean_y,
        mean_z,
        mean_p,
        mean_py,
        mean_pz,
        energy,
        autocorrelation,
        absorbed_norm,
        steps_done,
        cancelled,
    };
    Ok(PyRun::new(run, g.obj, units))
}
