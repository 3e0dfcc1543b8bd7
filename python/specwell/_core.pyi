"""Type stubs for the compiled core ``specwell._core``. Import names from ``specwell``."""

from typing import Callable, List, Optional, Sequence, Tuple, Union, final

import numpy as np
import numpy.typing as npt

__all__ = [
    "AccuracyWarning", "Batch", "ConvergenceError", "FourierGrid", "Hamiltonian", "HermiteBasis", "Heterostructure", "Layer",
    "METHODS", "Run", "Spectrum", "SplitStep", "UNITS", "__version__", "_bare_fft_pair_seconds",
    "_batch_from_spectra", "_run_from_parts", "_spectrum_from_parts", "_split_step_from_parts", "eigh", "solve_batch", "unit_constants",
]
__version__: str
UNITS: list[str]
METHODS: list[str]

_PotentialLike = Union[Callable[[npt.NDArray[np.float64]], npt.ArrayLike], npt.ArrayLike]

class ConvergenceError(RuntimeError):
    """An iterative method missed its tolerance.

    Attributes
    ----------
    energies : list of float
        Best energy estimates when the method stopped.
    residuals : list of float
        Their residual norms ‖Hψ − Eψ‖ (eigensolvers).
    rates : list of float
        |dE/dτ| of each state at the last check (imaginary-time relaxation, instead of residuals).
    iterations : int
        Iterations (or imaginary-time steps) performed.
    """

    energies: list[float]
    residuals: list[float]
    iterations: int

class AccuracyWarning(UserWarning):
    """Round-off limits the accuracy of some computed levels (see ``Spectrum.attainable_accuracy``)."""

@final
class HermiteBasis:
    """Gauss-Hermite function basis χ_n(x) = ψ_n((x − center)/length)/sqrt(length), n < size.

    ψ_n are the orthonormal Hermite functions (harmonic-oscillator eigenfunctions of
    oscillator length ``length``). The kinetic matrix is exact (pentadiagonal in n);
    potentials are sampled at ``quadrature`` Gauss-Hermite nodes ``x``.

    Parameters
    ----------
    size : int
        Number of functions, 1 ≤ size ≤ 20000.
    center : float
        Centre of the basis (length units).
    length : float
        Oscillator length (> 0, length units).
    quadrature : int, optional
        Number of quadrature nodes, size < quadrature ≤ 80000; default 2·size. Matrix elements
        of polynomial potentials of degree ≤ 2(quadrature − size) + 1 are exact.

    Raises
    ------
    ValueError
        If an argument is outside its range (the message names it).
    """

    def __new__(cls, size: int, center: float = 0.0, length: float = 1.0, quadrature: Optional[int] = None) -> HermiteBasis: ...
    @property
    def size(self) -> int:
        """Number of basis functions."""
    @property
    def center(self) -> float:
        """Centre of the basis."""
    @property
    def length(self) -> float:
        """Oscillator length."""
    @property
    def quadrature(self) -> int:
        """Number of quadrature nodes."""
    @property
    def x(self) -> npt.NDArray[np.float64]:
        """Quadrature points center + length·ξ_k where potentials are sampled, ascending."""
    @property
    def nodes(self) -> npt.NDArray[np.float64]:
        """Dimensionless Gauss-Hermite nodes ξ_k (weight e^{−ξ²})."""
    def __len__(self) -> int: ...

@final
class FourierGrid:
    """Periodic grid on [start, stop) with ``points`` points (Fourier-grid basis).

    Parameters
    ----------
    start, stop : float
        Box bounds (length units), finite, stop > start.
    points : int
        Number of grid points, 2 ≤ points ≤ 2**28.

    Notes
    -----
    x_j = start + j·dx, dx = (stop − start)/points; k = 2π·fftfreq(points, dx). State
    coefficients in this basis are ψ(x_j)·sqrt(dx).
    """

    def __new__(cls, start: float, stop: float, points: int) -> FourierGrid: ...
    @property
    def start(self) -> float:
        """Left end of the box."""
    @property
    def stop(self) -> float:
        """Right end of the box (excluded)."""
    @property
    def points(self) -> int:
        """Number of grid points."""
    @property
    def size(self) -> int:
        """Number of basis functions (= points)."""
    @property
    def dx(self) -> float:
        """Grid spacing."""
    @property
    def x(self) -> npt.NDArray[np.float64]:
        """Grid points."""
    @property
    def k(self) -> npt.NDArray[np.float64]:
        """Wave numbers 2π·fftfreq(points, dx)."""
    def __len__(self) -> int: ...

@final
class Hamiltonian:
    """H = T + V on a basis.

    Parameters
    ----------
    basis : HermiteBasis or FourierGrid
        The basis.
    potential : callable or array_like or Heterostructure
        Vectorised V(x) called with ``basis.x``, or samples on ``basis.x`` (energy units).
        A Heterostructure on a FourierGrid (``units="semiconductor"``, no ``mass``) gives the
        BenDaniel-Duke Hamiltonian with exact layer integrals in the mass coordinate: the grid
        sets the box and the number of modes; the problem is generalized (A c = E B c).
    mass : float or array_like or callable, optional
        Particle mass in the unit system's mass unit (default 1). On a FourierGrid an array on
        the grid (or a callable) gives the BenDaniel-Duke operator −(ħ²/2) d/dx (1/m) d/dx.
    units : {"natural", "atomic", "semiconductor"}
        "natural": ħ = 1; "atomic": hartree/bohr/m_e; "semiconductor": nm, meV, m_e, fs.

    Raises
    ------
    ValueError
        NaN/inf or wrong-length potential or mass, non-positive mass, unknown units.
    TypeError
        Wrong basis type, complex or non-numeric potential.
    """

    def __new__(cls, basis: Union[HermiteBasis, FourierGrid], potential: _PotentialLike,
                 mass: Union[float, _PotentialLike, None] = None, units: str = "natural") -> Hamiltonian: ...
    def overlap_matrix(self) -> Optional[npt.NDArray[np.float64]]:
        """The overlap matrix B of a heterostructure's generalized problem A c = E B c (None otherwise)."""
    def matrix(self) -> npt.NDArray[np.float64]:
        """The dense N×N matrix (real symmetric); for a heterostructure, the matrix A of A c = E B c.

        Raises
        ------
        MemoryError
            If the matrix would not fit in available memory.
        """
    def apply(self, psi: npt.ArrayLike) -> npt.NDArray[np.generic]:
        """H·psi, matrix-free, for a real or complex vector of basis coefficients (length N).

        On a FourierGrid the coefficients may equally be grid samples ψ(x_j) (the map is linear).
        """
    def solve(self, count: int, method: str = "auto", tol: float = 1e-10, max_iter: Optional[int] = None,
              initial: Union[Spectrum, npt.ArrayLike, None] = None, seed: Optional[int] = None) -> Spectrum:
        """Lowest ``count`` eigenpairs.

        Parameters
        ----------
        count : int
            Number of states, 1 ≤ count ≤ N.
        method : {"auto", "dense", "iterative"}
            "dense": full symmetric eigensolver; "iterative": matrix-free block solver for the
            lowest states; "auto": chooses by size.
        tol : float
            Residual tolerance of the iterative path, ‖Hψ − Eψ‖ ≤ tol·max(1, |E|), in (0, 1).
        max_iter : int, optional
            Iteration limit of the iterative path.
        initial : Spectrum or array_like (k, N), optional
            Warm start for the iterative path. Without it, a large grid starts from the
            same problem solved on a coarser grid of the same box (then interpolated).
        seed : int, optional
            Seed of the iterative path's random vectors (the start block when there is neither
            ``initial`` nor a coarser grid to start from, and any columns ``initial`` lacks), in [0, 2**63).

        Returns
        -------
        Spectrum

        Raises
        ------
        ValueError
            count outside [1, N], tol outside (0, 1), unknown method.
        ConvergenceError
            The iterative path missed ``tol`` within ``max_iter``.
        """
    @property
    def basis(self) -> Union[HermiteBasis, FourierGrid]:
        """The basis."""
    @property
    def potential(self) -> npt.NDArray[np.float64]:
        """Potential samples on ``basis.x``."""
    @property
    def units(self) -> str:
        """Unit system name."""
    @property
    def mass(self) -> Union[float, npt.NDArray[np.float64]]:
        """The mass as given (a float, or an array on the grid points; for a heterostructure the layer masses at the nodes)."""
    @property
    def heterostructure(self) -> Optional[Heterostructure]:
        """The Heterostructure of a layered Hamiltonian, else None."""
    @property
    def size(self) -> int:
        """Matrix dimension N."""

@final
class Spectrum:
    """Lowest eigenpairs of a Hamiltonian (returned by ``Hamiltonian.solve``)."""

    @property
    def energies(self) -> npt.NDArray[np.float64]:
        """Energies, ascending, shape (count,)."""
    @property
    def residuals(self) -> npt.NDArray[np.float64]:
        """Residual norms ‖Hψ − Eψ‖ (‖ψ‖ = 1), shape (count,)."""
    @property
    def vectors(self) -> npt.NDArray[np.float64]:
        """Orthonormal coefficient vectors in the basis, shape (count, N)."""
    @property
    def x(self) -> npt.NDArray[np.float64]:
        """The basis' own points (grid points or quadrature nodes)."""
    @property
    def count(self) -> int:
        """Number of states."""
    @property
    def method(self) -> str:
        """Method used ("dense" or "iterative")."""
    @property
    def iterations(self) -> int:
        """LOBPCG steps of the iterative path on the full basis (0 for dense)."""
    @property
    def levels(self) -> List[Tuple[int, int]]:
        """(basis size, LOBPCG steps) of each coarse level of the iterative path's multilevel start.

        Coarsest first; 0 steps means solved densely or already converged from the level below.
        Empty for dense and warm-started solves.
        """
    @property
    def units(self) -> str:
        """Unit system name."""
    @property
    def basis(self) -> Union[HermiteBasis, FourierGrid]:
        """The basis (for a heterostructure: the grid it was built on)."""
    @property
    def heterostructure(self) -> Optional[Heterostructure]:
        """The Heterostructure of a layered spectrum, else None."""
    @property
    def hamiltonian(self) -> Hamiltonian:
        """The Hamiltonian whose eigenpairs these are."""
    @property
    def attainable_accuracy(self) -> npt.NDArray[np.float64]:
        """Relative accuracy round-off allows each level, ε‖H‖/max(|E_i|, E_max − E_min), shape (count,).

        Above 1e-8, ``solve`` issues a ``specwell.AccuracyWarning``.
        """
    @property
    def note(self) -> Optional[str]:
        """How the result was produced when the automatic choice changed course, else None."""
    def wavefunctions(self, x: Optional[npt.ArrayLike] = None) -> npt.NDArray[np.float64]:
        """ψ_n(x) for every state, shape (count, len(x)), normalised ∫|ψ|² dx = 1.

        Parameters
        ----------
        x : array_like, optional
            Points (length units); default: the basis' own points.
        """
    def dipole_matrix(self) -> npt.NDArray[np.float64]:
        """Position matrix ⟨i|x|j⟩, shape (count, count), length units."""
    def oscillator_strengths(self) -> npt.NDArray[np.float64]:
        """f_ij = (2m_i/ħ²)(E_j − E_i)|⟨i|x|j⟩|², shape (count, count).

        m_i is the mass, or ⟨i|m(x)|i⟩ for a position-dependent mass (then the
        Thomas-Reiche-Kuhn sum rule holds only approximately).
        """
    def absorption(self, energies: npt.ArrayLike, broadening: float, shape: str = "lorentzian",
                   initial: int = 0) -> npt.NDArray[np.float64]:
        """Broadened absorption from state ``initial``: Σ_f f_if·L(E − (E_f − E_i)).

        Parameters
        ----------
        energies : array_like
            Photon energies (energy units).
        broadening : float
            Line width (> 0): half width at half maximum (Lorentzian) or standard deviation (Gaussian).
        shape : {"lorentzian", "gaussian"}
            Unit-area line shape.
        initial : int
            Initial state index.

        Returns
        -------
        ndarray
            Oscillator strength per unit energy; multiply by the material prefactor for an
            absorption coefficient.
        """
    def expectation(self, g: Optional[Callable[[npt.NDArray[np.float64]], npt.ArrayLike]] = None,
                    points: int = 8192) -> npt.NDArray[np.float64]:
        """⟨n|g(x)|n⟩ for every state (g=None: ⟨x⟩), trapezoid rule on ``points`` uniform points."""
    def save(self, path: str) -> None:
        """Save to an ``.npz`` file readable with numpy alone (see ``specwell.save``)."""
    def __len__(self) -> int: ...

def eigh(a: npt.ArrayLike) -> Tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
    """All eigenpairs of a real symmetric matrix (lower triangle read) with the core's dense solver.

    Returns
    -------
    values : ndarray, shape (n,)
        Eigenvalues, ascending.
    vectors : ndarray, shape (n, n)
        Eigenvectors as columns.
    """

@final
class Layer:
    """One layer: thickness (nm, > 0), conduction-band edge (meV), effective mass (m_e, > 0)."""

    def __new__(cls, thickness: float, band_edge: float, mass: float) -> Layer: ...
    @property
    def thickness(self) -> float:
        """Thickness (nm)."""
    @property
    def band_edge(self) -> float:
        """Conduction-band edge (meV)."""
    @property
    def mass(self) -> float:
        """Effective mass (m_e)."""

@final
class Heterostructure:
    """A stack of layers on z ∈ [0, total_thickness) (nm) with an optional uniform field.

    Parameters
    ----------
    layers : sequence of Layer
        From left to right; the outer layers continue beyond the stack as barrier padding.
    field_kv_cm : float
        Field (kV/cm) applied across the stack only: V(z) = band edge + 0.1·F·(clamp(z, 0, L) − L/2) meV,
        constant outside the stack (no sawtooth in the periodic box).
    """

    def __new__(cls, layers: Sequence[Layer], field_kv_cm: float = 0.0) -> Heterostructure: ...
    @property
    def layers(self) -> list[Layer]:
        """The layers."""
    @property
    def field_kv_cm(self) -> float:
        """Field (kV/cm)."""
    @property
    def total_thickness(self) -> float:
        """Total thickness L (nm)."""
    @property
    def interfaces(self) -> npt.NDArray[np.float64]:
        """Interface positions 0 = z_0 < … < z_n = L (nm)."""
    def potential(self, z: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """V(z) (meV): band edge plus field term, at points z (nm)."""
    def mass(self, z: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """m(z) (m_e) at points z (nm)."""
    def __len__(self) -> int: ...

@final
class SplitStep:
    """Split-step Fourier propagator (Feit, Fleck & Steiger 1982) on a FourierGrid.

    Parameters
    ----------
    grid : FourierGrid
        Periodic grid.
    potential : callable or array_like
        Static potential V0(x) (energy units).
    mass : float
        Particle mass (> 0).
    dt : float
        Time step (time units; nonzero; > 0 in imaginary time).
    order : {2, 4}
        2: Strang splitting; 4: Yoshida (1990) composition of three Strang steps.
    units : {"natural", "atomic", "semiconductor"}
        Unit system.
    drive : callable or array_like, optional
        f(t) of V(x,t) = V0(x) + f(t)·V1(x). A callable is evaluated (vectorised if it can be)
        at the sub-step midpoints of each run before the loop starts, keeping full order;
        an array gives f at the step midpoints t_n + dt/2 (second order in the drive for order=4).
        Both run at the same speed: the samples are taken before the GIL is released.
    drive_potential : callable or array_like, optional
        V1(x) (energy per unit of f); e.g. ``lambda x: x`` for a uniform field.
    absorber_width : float, optional
        Width of a smooth cos^(1/8) mask at both box edges (absorption per step).
    absorber_potential : callable or array_like, optional
        Complex absorbing potential W(x) ≥ 0: V → V − iW.
    imaginary_time : bool
        Propagate in imaginary time (use ``ground_states``).
    """

    def __new__(cls, grid: FourierGrid, potential: _PotentialLike, mass: float = 1.0, dt: Optional[float] = None,
                 order: Optional[int] = None, units: str = "natural", *, drive: Union[Callable[..., npt.ArrayLike], npt.ArrayLike, None] = None,
                 drive_potential: Optional[_PotentialLike] = None, absorber_width: Optional[float] = None,
                 absorber_potential: Optional[_PotentialLike] = None, imaginary_time: bool = False) -> SplitStep: ...
    @property
    def mass(self) -> float:
        """Particle mass (mass unit of ``units``)."""
    def run(self, psi0: npt.ArrayLike, steps: int, record_every: Optional[int] = None, progress: bool = False) -> Run:
        """Propagate ``psi0`` (samples on the grid) for ``steps`` steps.

        Parameters
        ----------
        psi0 : array_like, shape (N,)
            Initial state ψ(x_j); normalise it (Σ|ψ|²dx = 1) for normalised observables.
        steps : int
            Number of time steps (≥ 0).
        record_every : int, optional
            Record every this many steps (default 1); the final state is always recorded.
        progress : bool
            Show a tqdm progress bar (extra ``progress``); Ctrl-C interrupts the run.

        Returns
        -------
        Run

        Raises
        ------
        MemoryError
            If the recorded snapshots would not fit in memory (raise ``record_every``).
        """
    def run_many(self, psi0s: npt.ArrayLike, steps: int, record_every: Optional[int] = None) -> list[Run]:
        """Propagate the rows of ``psi0s`` (shape (M, N)) in parallel across cores."""
    def ground_states(self, count: int, tol: float = 1e-9, max_steps: Optional[int] = None,
                      seed: Optional[int] = None) -> Tuple[npt.NDArray[np.float64], npt.NDArray[np.complex128]]:
        """Lowest ``count`` states by imaginary-time propagation with Gram-Schmidt (imaginary_time=True).

        Returns
        -------
        energies : ndarray, shape (count,)
        states : ndarray of complex128, shape (count, N), Σ|ψ|²dx = 1
        """
    def drive_sample_times(self, steps: int) -> npt.NDArray[np.float64]:
        """Times at which a callable drive is evaluated for a run of ``steps`` steps."""
    @property
    def dt(self) -> float:
        """Time step."""
    @property
    def order(self) -> int:
        """Splitting order (2 or 4)."""
    @property
    def units(self) -> str:
        """Unit system name."""
    @property
    def grid(self) -> FourierGrid:
        """The grid."""
    @property
    def potential(self) -> npt.NDArray[np.float64]:
        """Static potential on the grid."""

@final
class Run:
    """Result of ``SplitStep.run``: records at ``times`` (record 0 = initial state)."""

    @property
    def times(self) -> npt.NDArray[np.float64]:
        """Record times."""
    @property
    def states(self) -> npt.NDArray[np.complex128]:
        """Recorded states ψ(x_j), shape (records, N)."""
    @property
    def norm(self) -> npt.NDArray[np.float64]:
        """Σ|ψ|²dx per record."""
    @property
    def mean_x(self) -> npt.NDArray[np.float64]:
        """⟨x⟩ per record (normalised by the norm)."""
    @property
    def mean_p(self) -> npt.NDArray[np.float64]:
        """⟨p⟩ = ħ⟨k⟩ per record."""
    @property
    def energy(self) -> npt.NDArray[np.float64]:
        """⟨T⟩ + ⟨V(t)⟩ per record."""
    @property
    def autocorrelation(self) -> npt.NDArray[np.complex128]:
        """⟨ψ(0)|ψ(t)⟩ per record."""
    @property
    def absorbed_norm(self) -> Optional[float]:
        """Fraction of the norm absorbed (None without an absorber)."""
    @property
    def steps_done(self) -> int:
        """Steps taken."""
    @property
    def record_steps(self) -> list[int]:
        """Step index of each record."""
    @property
    def grid(self) -> FourierGrid:
        """The grid."""
    @property
    def x(self) -> npt.NDArray[np.float64]:
        """Grid points."""
    @property
    def units(self) -> str:
        """Unit system name."""
    def __len__(self) -> int: ...

def unit_constants(units: str) -> Tuple[float, float]:
    """(ħ²/2m_e, ħ) of a unit system, in energy·length² and energy·time."""

@final
class Batch:
    """Spectra of many potentials on one basis (returned by ``solve_batch``)."""

    @property
    def energies(self) -> npt.NDArray[np.float64]:
        """Energies, shape (M, count)."""
    @property
    def residuals(self) -> npt.NDArray[np.float64]:
        """Residual norms, shape (M, count)."""
    def wavefunctions(self, index: int, x: Optional[npt.ArrayLike] = None) -> npt.NDArray[np.float64]:
        """ψ_n(x) of item ``index``, shape (count, len(x))."""
    def __getitem__(self, key: int, /) -> Spectrum: ...
    def __len__(self) -> int: ...

def solve_batch(basis: Union[HermiteBasis, FourierGrid], potentials: Union[npt.ArrayLike, Sequence[_PotentialLike]],
                count: int, mass: Union[float, _PotentialLike, None] = None, units: str = "natural",
                method: str = "auto", tol: float = 1e-10) -> Batch:
    """Lowest ``count`` states of many potentials on one basis, in parallel (rayon, GIL released).

    Parameters
    ----------
    basis : HermiteBasis or FourierGrid
        Shared basis.
    potentials : array_like (M, N) or sequence of callables/arrays
        Potentials sampled on ``basis.x`` (or callables evaluated there).
    count : int
        States per item.
    mass, units, method, tol
        As for ``Hamiltonian`` and ``Hamiltonian.solve``. With ``method="iterative"`` each thread
        walks a contiguous chunk of the sweep and warm-starts every item from the linear
        extrapolation of the two previous items' eigenvectors.

    Returns
    -------
    Batch
    """

def _spectrum_from_parts(hamiltonian: Hamiltonian, energies: npt.ArrayLike, vectors: npt.ArrayLike,
                         residuals: npt.ArrayLike, method: str, iterations: int) -> Spectrum: ...
def _split_step_from_parts(grid: FourierGrid, potential: _PotentialLike, mass: float, dt: float, order: int, units: str,
                           drive: object, drive_potential: object, absorber_width: Optional[float],
                           absorber_potential: object, imaginary_time: bool) -> SplitStep: ...
def _run_from_parts(grid: FourierGrid, units: str, record_steps: Sequence[int], times: Sequence[float],
                    states: Sequence[complex], norm: Sequence[float], mean_x: Sequence[float], mean_p: Sequence[float],
                    energy: Sequence[float], autocorrelation: Sequence[complex], absorbed_norm: Optional[float],
                    steps_done: int, cancelled: bool) -> Run: ...
def _batch_from_spectra(spectra: Sequence[Spectrum]) -> Batch: ...
def _bare_fft_pair_seconds(n: int, reps: int) -> float: ...
