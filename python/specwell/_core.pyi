"""Type stubs for the compiled core ``specwell._core``. Import names from ``specwell``."""

from typing import Callable, List, Optional, Sequence, Tuple, Union, final

import numpy as np
import numpy.typing as npt

__all__ = [
    "AccuracyWarning", "Batch", "ConvergenceError", "ElementBasis", "FourierGrid", "GroundState",
    "Hamiltonian", "HermiteBasis", "Heterostructure", "Layer", "MATERIALS", "METHODS", "Material",
    "ProductGrid", "Run", "SelfConsistent", "Spectrum", "SplitStep", "UNITS", "__version__",
    "_bare_fft_pair_seconds", "_bare_grid_fft_pair_seconds", "_batch_from_spectra",
    "_ground_state_from_parts", "_layer_from_parts", "_run_from_parts", "_spectrum_from_parts",
    "_split_step_from_parts", "angular_frequency", "coupling_constant", "eigh", "material",
    "oscillator_length", "self_consistent_batch", "solve_batch", "unit_constants",
]
__version__: str
UNITS: list[str]
METHODS: list[str]
MATERIALS: list[str]

_PotentialLike = Union[Callable[[npt.NDArray[np.float64]], npt.ArrayLike], npt.ArrayLike]
# On a ProductGrid: f(x, y) or f(x, y, z) called once with broadcastable coordinate arrays, or an array of grid.shape.
_GridPotentialLike = Union[Callable[..., npt.ArrayLike], npt.ArrayLike]

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
class ElementBasis:
    """Legendre spectral elements: Lagrange polynomials of order ``order`` on the
    Gauss-Lobatto-Legendre nodes of every element, continuous across elements, ψ = 0 at
    both ends.

    Elements have their edges on the given breakpoints (each interval one element, or
    split evenly into pieces no longer than ``max_element_length``). Put a breakpoint on
    every jump of the potential or the mass and on every kink of the potential: the
    levels then converge spectrally (exponentially in the order). The BenDaniel-Duke
    condition (ψ'/m continuous) is natural in the weak form. Potentials and masses are
    sampled on ``x``, the GLL nodes of every element with each element's two ends moved
    one ulp inward, so a callable with a jump at a breakpoint is evaluated on the side
    the element uses. Coefficient vectors are the nodal values ψ(nodes[1:-1]).

    Parameters
    ----------
    breakpoints : array_like
        Strictly increasing, finite, at least two (length units).
    order : int
        Polynomial order p of every element, 2 ≤ p ≤ 64 (default 16).
    max_element_length : float, optional
        Split intervals longer than this into equal elements.
    """

    def __new__(cls, breakpoints: npt.ArrayLike, order: int = 16, max_element_length: Optional[float] = None) -> ElementBasis: ...
    @property
    def order(self) -> int:
        """Polynomial order p of every element."""
    @property
    def size(self) -> int:
        """Number of unknowns, n_elements·p − 1."""
    @property
    def edges(self) -> npt.NDArray[np.float64]:
        """Element edges after splitting (length n_elements + 1)."""
    @property
    def breakpoints(self) -> npt.NDArray[np.float64]:
        """The breakpoints given."""
    @property
    def x(self) -> npt.NDArray[np.float64]:
        """Sample points of potentials and masses, length n_elements·(p+1) (element ends nudged inward)."""
    @property
    def nodes(self) -> npt.NDArray[np.float64]:
        """Global nodes including both ends (length n_elements·p + 1)."""
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
class ProductGrid:
    """Periodic 2D or 3D grid: the tensor product of FourierGrids (x, y[, z]).

    Parameters
    ----------
    gx, gy : FourierGrid
        The x and y axes.
    gz : FourierGrid, optional
        The z axis (3D).

    Notes
    -----
    States, potentials and absorbing potentials on the grid are arrays of shape ``shape`` =
    (nx, ny[, nz]) indexed [i, j(, l)] ↔ (x_i, y_j(, z_l)) (numpy C order, ``indexing="ij"``).
    The discrete norm is Σ|ψ|²·dV with dV = dx·dy(·dz). Split-step FFTs run along each axis
    with the axes' plans, over rayon workers for grids of 2**15 points or more.

    Raises
    ------
    TypeError
        An axis is not a FourierGrid (the message names gx, gy or gz).
    ValueError
        More than 2**28 points in all.
    """

    def __new__(cls, gx: FourierGrid, gy: FourierGrid, gz: Optional[FourierGrid] = None) -> ProductGrid: ...
    @property
    def shape(self) -> list[int]:
        """Points per axis (nx, ny[, nz])."""
    @property
    def ndim(self) -> int:
        """Number of axes (2 or 3)."""
    @property
    def points(self) -> int:
        """Total number of points."""
    @property
    def axes(self) -> list[FourierGrid]:
        """The axis grids (x, y[, z])."""
    @property
    def x(self) -> npt.NDArray[np.float64]:
        """Points of the x axis."""
    @property
    def y(self) -> npt.NDArray[np.float64]:
        """Points of the y axis."""
    @property
    def z(self) -> Optional[npt.NDArray[np.float64]]:
        """Points of the z axis (None on a 2D grid)."""
    @property
    def spacing(self) -> list[float]:
        """Grid spacings (dx, dy[, dz])."""
    @property
    def dV(self) -> float:
        """Cell volume dx·dy[·dz]."""
    @property
    def k(self) -> list[npt.NDArray[np.float64]]:
        """Wave numbers 2π·fftfreq(n, d) of each axis."""
    @property
    def k_squared(self) -> npt.NDArray[np.float64]:
        """|k|² = Σ k_a² on ``shape`` (FFT layout: numpy fftfreq order on every axis)."""
    def mesh(self, sparse: bool = False) -> Tuple[npt.NDArray[np.float64], ...]:
        """Coordinate arrays ``numpy.meshgrid(x, y[, z], indexing="ij", sparse=sparse)``."""
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
    units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}
        "natural": ħ = 1; "atomic": hartree/bohr/m_e; "semiconductor": nm, meV, m_e, fs;
        "cold-atom": µm, ħ/ms (so ħ = 1), u, ms; "molecular": Å, cm⁻¹, u (a reduced mass in
        daltons), fs.

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
        """Relative accuracy round-off allows each level, ε‖H‖/max(|E_i|, E_max − E_min, E_unit), shape (count,), with E_unit the lowest kinetic quantum of the domain.

        Above 1e-8, ``solve`` issues a ``specwell.AccuracyWarning``.
        """
    @property
    def note(self) -> Optional[str]:
        """How the result was produced when the automatic choice changed course, else None."""
    @property
    def errors(self) -> Optional[npt.NDArray[np.float64]]:
        """Per-level error estimates |E(p+2) − E(p)| (energy units) of ``Heterostructure.solve``, else None."""
    @property
    def bound(self) -> Optional[npt.NDArray[np.bool_]]:
        """For a layered structure: True where the level lies below both cladding band edges
        (in a field, below the lower of the two), False for continuum (box) states; else None."""
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
    def overlaps(self, other: Spectrum) -> npt.NDArray[np.float64]:
        """Overlaps ⟨ψ_i|φ_j⟩ with the states of ``other``, shape (len(self), len(other)).

        The squares are Franck-Condon factors when the two spectra are the vibrational
        levels of two electronic states. On the same basis (same kind, size and points)
        the overlap is exact (coefficients and the discretisation's overlap matrix B);
        on different bases (e.g. two Hermite bases centred on each potential's minimum)
        it is a composite Gauss-Lobatto-Legendre quadrature of ψ_i(x)φ_j(x) over the x
        range both bases cover: round-off accurate for smooth states, about 1e-7 where a
        state has a kink (layer interfaces) inside a quadrature panel.

        Raises
        ------
        ValueError
            The two bases share no x range.
        """
    def matrix_elements(self, g: Callable[[npt.NDArray[np.float64]], npt.ArrayLike]) -> npt.NDArray[np.float64]:
        """Matrix elements ⟨ψ_i|g(x)|ψ_j⟩, shape (count, count).

        Parameters
        ----------
        g : callable
            Vectorised g(x) (x in the basis's length unit), called once with the
            quadrature nodes (composite Gauss-Lobatto-Legendre over the basis's x range);
            round-off accurate for smooth states and g, about 1e-7 where ψ or g has a kink.

        Raises
        ------
        TypeError
            ``g`` is not callable.
        ValueError
            ``g`` returns the wrong number of values or non-finite ones.
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
    """One layer: thickness (nm, > 0), conduction-band edge (meV), effective mass (m_e, > 0).

    Parameters
    ----------
    thickness, band_edge, mass : float
        nm, meV, m_e.
    doping : float, keyword-only
        Net ionized dopant density (cm⁻³; donors > 0, acceptors < 0), for Schrödinger-Poisson.
    permittivity : float or None, keyword-only
        Static relative permittivity ε_r (needed where there is charge).
    nonparabolicity : float, keyword-only
        α (1/eV) of the energy-dependent mass m(E) = m (1 + α (E − E_c)) (two-band Kane form).
    """

    def __new__(cls, thickness: float, band_edge: float, mass: float, *, doping: float = 0.0,
                permittivity: Optional[float] = None, nonparabolicity: float = 0.0) -> Layer: ...
    @classmethod
    def from_material(cls, material: Material, thickness: float, *, reference: Optional[Material] = None,
                      nonparabolicity: Optional[str] = "three_band", doping: float = 0.0) -> Layer:
        """A layer of ``material``: band edge = its Γ conduction-band edge minus that of
        ``reference`` (on the compilation's absolute scale without one), its mass and
        permittivity, and the non-parabolicity α of the Kane model ``nonparabolicity``
        ("three_band", "two_band"; None for a parabolic band).
        """
    @property
    def doping(self) -> float:
        """Net ionized dopant density (cm⁻³)."""
    @property
    def permittivity(self) -> Optional[float]:
        """Static relative permittivity, or None."""
    @property
    def nonparabolicity(self) -> float:
        """Non-parabolicity α (1/eV)."""
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
class SelfConsistent:
    """A converged Schrödinger-Poisson solution (``Heterostructure.self_consistent``)."""

    @property
    def fermi_level(self) -> float:
        """Fermi level (meV); NaN when undefined (no charge)."""
    @property
    def spectrum(self) -> Spectrum:
        """The bound levels of the converged potential, on the element mesh."""
    @property
    def sheet_densities(self) -> npt.NDArray[np.float64]:
        """Electron sheet density of each level (cm⁻²)."""
    @property
    def iterations(self) -> int:
        """Iterations to self-consistency."""
    @property
    def residual(self) -> npt.NDArray[np.float64]:
        """max |U_out − U_in| (meV) of every iteration."""
    @property
    def note(self) -> Optional[str]:
        """Why the solution is special (the flat band of an undoped structure), else None."""
    def potential(self, z: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """Total band edge E_c + field + electrostatic energy (meV) at z (nm); V_xc excluded."""
    def density(self, z: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """Electron density n(z) = Σ_i N_i |ψ_i(z)|² (cm⁻³) at z (nm)."""

def self_consistent_batch(stacks: Sequence[Heterostructure], temperature: float, *,
                          fermi_level: Optional[float] = None, surface_barrier: Optional[float] = None,
                          tol: float = 1e-6, max_iter: int = 100, exchange_correlation: bool = False,
                          accuracy: float = 1e-10, mixing: float = 0.3) -> list[SelfConsistent]:
    """``Heterostructure.self_consistent`` for many structures (a doping or gate sweep), in
    parallel (rayon, GIL released): one contiguous chunk per thread, each item started from
    the previous item's electrostatic potential."""

@final
class Material:
    """Parameters of a III-V material at a composition and temperature (``specwell.material``).

    Band parameters from Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001),
    alloys with that compilation's bowing parameters; permittivities from a handbook.
    Every value in the table was recalled from memory (see ``source``): verify the
    parameters you rely on against the publications before using them for real work.
    Energies in meV, masses in m_e.
    """

    @property
    def name(self) -> str: ...
    @property
    def x(self) -> Optional[float]:
        """Composition of a ternary (AlGaAs: Al fraction; InGaAs, InAlAs: In fraction; GaAsSb, InAsSb, AlAsSb: Sb fraction)."""
    @property
    def temperature(self) -> float:
        """Temperature (K) the gap was evaluated at (Varshni form)."""
    @property
    def band_gap(self) -> float:
        """Γ band gap E_g(T) (meV)."""
    @property
    def valence_band(self) -> float:
        """Valence-band maximum on the compilation's common scale (meV; InSb = 0)."""
    @property
    def conduction_band(self) -> float:
        """Γ conduction-band edge, valence_band + band_gap (meV)."""
    @property
    def mass(self) -> float:
        """Γ electron effective mass (m_e)."""
    @property
    def kane_energy(self) -> float:
        """Kane energy E_P (meV)."""
    @property
    def spin_orbit(self) -> float:
        """Spin-orbit splitting Δ_so (meV)."""
    @property
    def permittivity(self) -> float:
        """Static relative permittivity."""
    @property
    def lattice_constant(self) -> float:
        """Lattice constant at 300 K (Å)."""
    @property
    def source(self) -> str:
        """Where the row's numbers come from."""
    def nonparabolicity(self, model: str = "three_band") -> float:
        """Non-parabolicity α (1/eV) of m(E) = m(1 + α(E − E_c)): Kane "three_band" (with Δ_so) or "two_band" (≈ 1/E_g)."""

def material(name: str, x: Optional[float] = None, temperature: float = 300.0) -> Material:
    """Parameters of material ``name`` (one of ``specwell.MATERIALS``) at composition ``x``
    (ternaries only, 0 ≤ x ≤ 1) and ``temperature`` (K, 0–800).

    Raises
    ------
    ValueError
        Unknown name (the message lists the choices), x missing or outside [0, 1], x for a
        binary, temperature out of range.
    """

@final
class Heterostructure:
    """A stack of layers on z ∈ [0, total_thickness) (nm) with an optional uniform field.

    Parameters
    ----------
    layers : sequence of Layer
        From left to right; the outer layers continue beyond the stack as flat semi-infinite
        claddings.
    field_kv_cm : float
        Field (kV/cm) applied across the stack only: V(z) = band edge + 0.1·F·(clamp(z, 0, L) − L/2) meV,
        constant in the claddings.
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
    def self_consistent(self, temperature: float, *, fermi_level: Optional[float] = None,
                        surface_barrier: Optional[float] = None, tol: float = 1e-6, max_iter: int = 100,
                        exchange_correlation: bool = False, accuracy: float = 1e-10,
                        mixing: float = 0.3) -> SelfConsistent:
        """Schrödinger-Poisson solution with the layers' doping and permittivities.

        Donors (acceptors: negative doping) are fully ionised inside the stack; the
        claddings are undoped. Electrons fill the bound subbands of the total band edge by
        2D Fermi-Dirac statistics with spin, n_i = (m_i k_B T/πħ²) ln(1 + e^{(E_F − E_i)/k_B T})
        with m_i = ⟨i|m|i⟩ the in-plane mass; Poisson's equation on the same element mesh
        (exact for piecewise-constant charge, flux-continuous ε); Anderson mixing of the
        electrostatic energy to max|U_out − U_in| ≤ ``tol`` meV. Mean field only (plus the
        optional LDA exchange-correlation, an approximation); continuum states above the
        lower cladding edge hold no charge (a low-temperature model).

        Parameters
        ----------
        temperature : float
            K, > 0.
        fermi_level : float, optional
            Default None: E_F from overall neutrality with zero field at both ends. Given
            (meV): E_F fixed, U = 0 at the left end (or set by ``surface_barrier``), zero
            field at the right end.
        surface_barrier : float, optional
            A surface (Schottky-type) barrier φ_B (meV) pinning E_F at the left end:
            E_c(0) + U(0) − E_F = φ_B. Needs ``fermi_level``.
        tol : float
            Self-consistency of the electrostatic energy (meV).
        max_iter : int
            Iterations before a ``ConvergenceError`` (its ``rates`` hold the residual history).
        exchange_correlation : bool
            Add the Hedin-Lundqvist (1971) LDA exchange-correlation potential.
        accuracy : float
            Relative accuracy of the levels (sizes the element mesh).
        mixing : float
            Anderson mixing damping in (0, 1].

        Raises
        ------
        ValueError
            Non-positive temperature, a layer without permittivity, ``surface_barrier``
            without ``fermi_level``.
        ConvergenceError
            No convergence within ``max_iter``.

        Warns
        -----
        UserWarning
            A structure without net donor charge: E_F is undefined; the flat-band levels
            are returned (``note`` says so).
        """
    @property
    def cladding_edges(self) -> Tuple[float, float]:
        """Band edges (meV) of the left and right claddings, field term included: a level below both is bound."""
    def solve(self, count: Optional[int] = None, accuracy: float = 1e-10, *, order: Optional[int] = None,
              element_length: float = 15.0) -> Spectrum:
        """Levels on Legendre spectral elements, self-converged to ``accuracy``.

        The mesh has an element edge on every interface; the claddings are covered by
        elements that grow outwards to where the wanted levels have decayed. Levels are
        computed at orders p and p + 2 on one mesh until |E(p+2) − E(p)| ≤
        accuracy·max(|E|, E − V_min) for every requested level (V_min the lowest band edge);
        the p + 2 levels are returned with those differences as ``errors``. Model: single-band
        BenDaniel-Duke, parabolic bands; material parameters are the user's.

        Parameters
        ----------
        count : int, optional
            Number of levels; None: all bound levels (below both cladding edges).
        accuracy : float
            Relative accuracy in [1e-13, 1e-2].
        order : int, optional
            Starting element order (default from the accuracy).
        element_length : float
            Longest element inside a layer (nm); shortened for the wavenumbers of the levels.

        Returns
        -------
        Spectrum
            On an ``ElementBasis``; ``errors`` and ``bound`` are set, wavefunctions evaluate
            anywhere (0 beyond the cladding depth, where the tails are below the accuracy).
        """
    def bands(self, q: Union[float, npt.ArrayLike], count: int, *, accuracy: float = 1e-10) -> npt.NDArray[np.float64]:
        """Minibands E_n(q) (meV) of the infinite superlattice whose period is this stack.

        Bloch-periodic spectral elements ψ(z + d) = e^{iqd} ψ(z), d = ``total_thickness``
        (the last node of the period is the first times the Bloch phase: a Hermitian
        pencil). Bands are converged at q = 0 and π/d (orders p and p + 2 agree to
        ``accuracy`` relative to max(|E|, E − V_min)).

        Parameters
        ----------
        q : float or array_like
            Bloch wavevectors (1/nm). E(q) is periodic with period 2π/d and even, so every q
            is folded into the first zone: q → |q − (2π/d)·round(qd/2π)| (no error).
        count : int
            Number of bands, 1 ≤ count ≤ 10000.
        accuracy : float
            Relative accuracy in [1e-13, 1e-3].

        Returns
        -------
        ndarray, shape (len(q), count)
            Energies, ascending in each row (one row for a scalar q).

        Raises
        ------
        ValueError
            A field (``field_kv_cm`` ≠ 0 breaks the periodicity), non-parabolic layers,
            non-finite q, count or accuracy out of range.
        """
    def minibands(self, count: int, *, accuracy: float = 1e-10) -> npt.NDArray[np.float64]:
        """Bottom and top (meV) of each of the lowest ``count`` minibands, shape (count, 2),
        from q = 0 and q = π/d (a 1D band is monotonic in |q| between them)."""
    def miniband_widths(self, count: int, *, accuracy: float = 1e-10) -> npt.NDArray[np.float64]:
        """Widths (meV) of the lowest ``count`` minibands, top − bottom, shape (count,)."""
    def band_mass(self, band: Optional[int] = None, *, accuracy: float = 1e-10) -> float:
        """Effective mass m* (m_e) at the bottom of miniband ``band`` (None: band 0).

        m* = 2(ħ²/2m_e)/(d²E/dq²), the curvature from second-order perturbation theory in
        the Bloch phase on the discretised bands. The bottom of band n lies at q = 0 for
        even n and at q = π/d for odd n. A band edge touching its neighbour (closed gap) is
        a ValueError.
        """
    def transmission(self, energies: Union[float, npt.ArrayLike], *, reflection: bool = False,
                     accuracy: float = 1e-10) -> Union[float, Tuple[float, float], npt.NDArray[np.float64],
                                                       Tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]]:
        """Transmission probability T(E) between the claddings, which act as leads.

        The quantum transmitting boundary method (Lent & Kirkner 1990) on spectral elements
        covering the stack: plane waves in the flat leads (k = √(m(E − V)/(ħ²/2m_e))),
        BenDaniel-Duke matching, the field (if any) linear inside the stack, so the leads
        may sit at different band edges. T = (k_R/m_R)/(k_L/m_L)·|t|², R = |r|², T + R = 1.
        Where only one lead is open T = 0 and R = 1. The mesh is converged for the highest
        energy asked (orders p and p + 2 agree on T to ``accuracy``, or on the energy of a
        narrow resonance to ``accuracy`` relative).

        Parameters
        ----------
        energies : float or array_like
            Energies (meV), at or above the lower lead band edge min(cladding_edges).
        reflection : bool
            Also return R.
        accuracy : float
            In [1e-13, 1e-3].

        Returns
        -------
        T, or (T, R)
            Floats for a scalar energy, arrays of len(energies) otherwise.

        Raises
        ------
        ValueError
            An energy below both leads or not finite; non-parabolic layers.
        """
    def current_density(self, bias: float, temperature: float, fermi_level: float, *, accuracy: float = 1e-8,
                        mesh_accuracy: float = 1e-10) -> float:
        """Tsu-Esaki (1973) tunnelling current density J (A/cm²) with Fermi-Dirac leads.

        J = (e m kT/(2π²ħ³)) ∫ T(E, V) ln[(1 + e^{(μ_L − E)/kT})/(1 + e^{(μ_R − E)/kT})] dE, m the
        left (emitter) lead mass. The bias V (volts) is the field F = −10⁴·V/L kV/cm (L in nm)
        across the stack, replacing ``field_kv_cm``: the right lead sits 1000·V meV below
        the left one. Both leads hold ``fermi_level`` E_F above their band edge:
        μ_L = V_L + E_F, μ_R = μ_L − 1000·V. The integral runs from max(V_L, V_R) to
        max(μ_L, μ_R) + 40 kT, cut at every pole found and at E_r ± Γ·{½, 5, 50}, by adaptive
        Gauss-Legendre quadrature whose summed error estimates are ≤ ``accuracy``·|J|.

        Parameters
        ----------
        bias : float
            Volts (finite).
        temperature : float
            Kelvin, > 0.
        fermi_level : float
            E_F − E_c in both leads (meV).
        accuracy : float
            Relative tolerance of the energy integral, in [1e-10, 1e-2].
        mesh_accuracy : float
            Accuracy of T(E) (see ``transmission``), in [1e-13, 1e-3].
        """
    def current_voltage(self, biases: npt.ArrayLike, temperature: float, fermi_level: float, *,
                        accuracy: float = 1e-8, mesh_accuracy: float = 1e-10) -> npt.NDArray[np.float64]:
        """``current_density`` at every bias (V), in parallel over the biases; shape (len(biases),)."""
    def __len__(self) -> int: ...

@final
class SplitStep:
    """Split-step Fourier propagator (Feit, Fleck & Steiger 1982) on a FourierGrid or ProductGrid.

    Parameters
    ----------
    grid : FourierGrid or ProductGrid
        Periodic grid (1D, or 2D/3D).
    potential : callable or array_like
        Static potential V0 (energy units): on a FourierGrid f(x) or samples on ``grid.x``; on a
        ProductGrid f(x, y[, z]), called once with broadcastable coordinate arrays
        (``grid.mesh(sparse=True)``) and returning the grid's shape (or a shape that broadcasts
        to it, or a number), or an array of exactly ``grid.shape``.
    mass : float
        Particle mass (> 0).
    dt : float
        Time step (time units; nonzero; > 0 in imaginary time).
    order : {2, 4}
        2: Strang splitting; 4: Yoshida (1990) composition of three Strang steps.
    units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}
        Unit system ("cold-atom": µm, ms, u, energies in ħ/ms so that ħ = 1).
    drive : callable or array_like, optional
        f(t) of V(x,t) = V0(x) + f(t)·V1(x). A callable is evaluated (vectorised if it can be)
        at the sub-step midpoints of each run before the loop starts, keeping full order;
        an array gives f at the step midpoints t_n + dt/2 (second order in the drive for order=4).
        Both run at the same speed: the samples are taken before the GIL is released.
    drive_potential : callable or array_like, optional
        V1 (energy per unit of f), like ``potential``; e.g. ``lambda x: x`` for a uniform field.
    absorber_width : float, optional
        Width of a smooth cos^(1/8) mask at every face of the box (absorption per step); at most
        half the shortest side.
    absorber_potential : callable or array_like, optional
        Complex absorbing potential W ≥ 0: V → V − iW (like ``potential``).
    imaginary_time : bool
        Propagate in imaginary time (use ``ground_states`` or ``ground_state``).
    nonlinearity : float
        g of the Gross-Pitaevskii term: iħ∂ψ/∂t = [T + V + g|ψ|²]ψ with ψ normalised to
        Σ|ψ|²dV = 1, so g includes the atom number (energy·length^d). Default 0 (linear).
        The potential sub-steps take the exact phase exp(−i(V + g|ψ|²)w·dt/ħ), keeping order 2
        (Strang) and 4 (Yoshida) for the nonlinear flow (Bao, Jaksch & Markowich 2003).
        Coupling constants from the scattering length: see ``coupling_constant`` (3D
        g = 4πħ²aN/m; quasi-2D g₂ = g₃/(√(2π) a_z); quasi-1D g₁ = g₃/(2π a_⊥²)).
        With g ≠ 0, ``Run.energy`` is the energy functional ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴dV.

    Raises
    ------
    ValueError
        An argument outside its range, a potential of the wrong shape, g not finite.
    TypeError
        Wrong grid type, non-numeric input.
    """

    def __new__(cls, grid: Union[FourierGrid, ProductGrid], potential: _GridPotentialLike, mass: float = 1.0,
                 dt: Optional[float] = None, order: Optional[int] = None, units: str = "natural", *,
                 drive: Union[Callable[..., npt.ArrayLike], npt.ArrayLike, None] = None,
                 drive_potential: Optional[_GridPotentialLike] = None, absorber_width: Optional[float] = None,
                 absorber_potential: Optional[_GridPotentialLike] = None, imaginary_time: bool = False,
                 nonlinearity: float = 0.0) -> SplitStep: ...
    @property
    def mass(self) -> float:
        """Particle mass (mass unit of ``units``)."""
    @property
    def nonlinearity(self) -> float:
        """g of the mean-field term g|ψ|² (0: linear)."""
    def run(self, psi0: npt.ArrayLike, steps: int, record_every: Optional[int] = None, progress: bool = False) -> Run:
        """Propagate ``psi0`` (samples on the grid) for ``steps`` steps.

        Parameters
        ----------
        psi0 : array_like, shape (N,) on a FourierGrid, ``grid.shape`` on a ProductGrid
            Initial state; normalise it (Σ|ψ|²dV = 1) for normalised observables, and always
            with a nonlinearity (g multiplies |ψ|²).
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
            If the recorded snapshots would not fit in memory (raise ``record_every``); refused
            before any step is taken.
        """
    def run_many(self, psi0s: npt.ArrayLike, steps: int, record_every: Optional[int] = None) -> list[Run]:
        """Propagate the states ``psi0s[i]`` (shape (M, *grid.shape)) in parallel across cores."""
    def ground_states(self, count: int, tol: float = 1e-9, max_steps: Optional[int] = None,
                      seed: Optional[int] = None) -> Tuple[npt.NDArray[np.float64], npt.NDArray[np.complex128]]:
        """Lowest ``count`` states by imaginary-time propagation with Gram-Schmidt (imaginary_time=True).

        With a nonlinearity only ``count=1`` is accepted (ValueError otherwise): the normalised
        gradient flow, refined to the minimum of the energy functional on the grid, and the
        returned energy is the chemical potential μ = ⟨T⟩ + ⟨V⟩ + gΣ|ψ|⁴dV (see ``ground_state``
        for the energy functional too).

        Returns
        -------
        energies : ndarray, shape (count,)
        states : ndarray of complex128, shape (count, N) or (count, *grid.shape), Σ|ψ|²dV = 1
        """
    def ground_state(self, tol: float = 1e-9, max_steps: Optional[int] = None, seed: Optional[int] = None) -> GroundState:
        """The ground state by imaginary time (imaginary_time=True), with μ, E and its residual."""
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
    def grid(self) -> Union[FourierGrid, ProductGrid]:
        """The grid."""
    @property
    def potential(self) -> npt.NDArray[np.float64]:
        """Static potential on the grid (the grid's shape)."""

@final
class GroundState:
    """A ground state from ``SplitStep.ground_state``."""

    @property
    def chemical_potential(self) -> float:
        """μ = ⟨T⟩ + ⟨V⟩ + gΣ|ψ|⁴dV (the lowest eigenvalue when g = 0)."""
    @property
    def energy(self) -> float:
        """Energy functional E = ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴dV (per particle: ψ is normalised to 1)."""
    @property
    def state(self) -> npt.NDArray[np.complex128]:
        """The state (real values, complex128), the grid's shape, Σ|ψ|²dV = 1, positive where it is largest."""
    @property
    def residual(self) -> float:
        """‖H[ψ]ψ − μψ‖ in the discrete norm (Σ|·|²dV)^{1/2}."""
    @property
    def steps(self) -> int:
        """Imaginary-time steps taken."""
    @property
    def rate(self) -> float:
        """|dμ/dτ| at the last imaginary-time check."""
    @property
    def refine_iterations(self) -> int:
        """Conjugate-gradient iterations of the refinement to the grid solution (0 when g = 0)."""
    @property
    def nonlinearity(self) -> float:
        """g of the propagator."""
    @property
    def units(self) -> str:
        """Unit system name."""

@final
class Run:
    """Result of ``SplitStep.run``: records at ``times`` (record 0 = initial state)."""

    @property
    def times(self) -> npt.NDArray[np.float64]:
        """Record times."""
    @property
    def states(self) -> npt.NDArray[np.complex128]:
        """Recorded states, shape (records, N) on a FourierGrid, (records, *grid.shape) on a ProductGrid."""
    @property
    def norm(self) -> npt.NDArray[np.float64]:
        """Σ|ψ|²dV per record."""
    @property
    def mean_x(self) -> npt.NDArray[np.float64]:
        """⟨x⟩ per record (normalised by the norm)."""
    @property
    def mean_y(self) -> Optional[npt.NDArray[np.float64]]:
        """⟨y⟩ per record (None on a 1D grid)."""
    @property
    def mean_z(self) -> Optional[npt.NDArray[np.float64]]:
        """⟨z⟩ per record (None on a 1D or 2D grid)."""
    @property
    def mean_p(self) -> npt.NDArray[np.float64]:
        """⟨p_x⟩ = ħ⟨k_x⟩ per record."""
    @property
    def mean_py(self) -> Optional[npt.NDArray[np.float64]]:
        """⟨p_y⟩ per record (None on a 1D grid)."""
    @property
    def mean_pz(self) -> Optional[npt.NDArray[np.float64]]:
        """⟨p_z⟩ per record (None on a 1D or 2D grid)."""
    @property
    def energy(self) -> npt.NDArray[np.float64]:
        """⟨T⟩ + ⟨V(t)⟩ per record; with a nonlinearity the energy functional ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴dV (all divided by the norm)."""
    @property
    def autocorrelation(self) -> npt.NDArray[np.complex128]:
        """⟨ψ(0)|ψ(t)⟩ = Σ conj(ψ0)ψ dV per record."""
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
    def grid(self) -> Union[FourierGrid, ProductGrid]:
        """The grid."""
    @property
    def shape(self) -> list[int]:
        """Points per axis of each recorded state."""
    @property
    def x(self) -> npt.NDArray[np.float64]:
        """Points of the x axis."""
    @property
    def y(self) -> Optional[npt.NDArray[np.float64]]:
        """Points of the y axis (None on a 1D grid)."""
    @property
    def z(self) -> Optional[npt.NDArray[np.float64]]:
        """Points of the z axis (None on a 1D or 2D grid)."""
    @property
    def units(self) -> str:
        """Unit system name."""
    def save(self, path: str) -> None:
        """Save to an ``.npz`` file readable with numpy alone (see ``specwell.save``)."""
    def __len__(self) -> int: ...

def unit_constants(units: str) -> Tuple[float, float]:
    """(ħ²/2m₁, ħ) of a unit system, in energy·length² and energy·time (m₁ the mass unit: m_e, or u for "cold-atom" and "molecular")."""

def angular_frequency(frequency_hz: float, units: str = "cold-atom") -> float:
    """ω = 2πf in radians per time unit of ``units`` for a frequency f in Hz (≥ 0; natural units have no time unit)."""

def oscillator_length(mass: float, frequency_hz: float, units: str = "cold-atom") -> float:
    """Harmonic-oscillator length √(ħ/(mω)) (length units) of a particle of ``mass`` in a trap of ``frequency_hz``."""

def coupling_constant(scattering_length: float, atom_number: float, mass: float, dims: int = 3,
                      confinement_hz: Optional[float] = None, units: str = "cold-atom") -> float:
    """g of ``SplitStep(..., nonlinearity=g)`` for N atoms with s-wave scattering length a (ψ normalised to 1).

    Parameters
    ----------
    scattering_length : float
        a (length units of ``units``: µm for "cold-atom"); negative for attraction.
    atom_number : float
        N (> 0).
    mass : float
        Atom mass (mass unit: u for "cold-atom").
    dims : {1, 2, 3}
        3: g₃ = 4πħ²aN/m (Pitaevskii & Stringari 2003); 2: quasi-2D, g₂ = g₃/(√(2π) a_z)
        (Petrov, Holzmann & Shlyapnikov 2000); 1: quasi-1D, g₁ = g₃/(2π a_⊥²) = 2ħω_⊥aN
        (Olshanii 1998); a_z, a_⊥ = √(ħ/(mω)) of the tight confinement. Leading terms, valid
        for a ≪ a_z, a_⊥.
    confinement_hz : float, optional
        Frequency (Hz) of the frozen direction(s): ω_z/2π (dims=2) or ω_⊥/2π (dims=1); None for dims=3.
    units : str
        Unit system (default "cold-atom").

    Returns
    -------
    float
        g in energy·length^dims.
    """

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
    def save(self, path: str) -> None:
        """Save to an ``.npz`` file readable with numpy alone (see ``specwell.save``)."""
    def __len__(self) -> int: ...

def solve_batch(basis: Union[HermiteBasis, FourierGrid, ElementBasis, None],
                potentials: Union[npt.ArrayLike, Sequence[_PotentialLike], Sequence[Heterostructure]],
                count: int, mass: Union[float, _PotentialLike, None] = None, units: str = "natural",
                method: str = "auto", tol: float = 1e-10, accuracy: float = 1e-10) -> Batch:
    """Lowest ``count`` states of many potentials on one basis, or of many heterostructures,
    in parallel (rayon, GIL released).

    Parameters
    ----------
    basis : HermiteBasis, FourierGrid, ElementBasis or None
        Shared basis; None for a sweep of Heterostructures, each solved as by
        ``Heterostructure.solve(count, accuracy)`` on its own element mesh (each thread
        starts an item from the previous item's mesh).
    potentials : array_like (M, N), sequence of callables/arrays, or sequence of Heterostructure
        Potentials sampled on ``basis.x`` (or callables evaluated there); Heterostructures
        when ``basis`` is None.
    count : int
        States per item.
    mass, units, method, tol
        As for ``Hamiltonian`` and ``Hamiltonian.solve``. With ``method="iterative"`` (the
        automatic choice above 56 functions with a fast product) each thread walks a
        contiguous chunk of the sweep and warm-starts every item from the linear
        extrapolation of the two previous items' eigenvectors.
    accuracy : float
        Relative accuracy of every level of a sweep of Heterostructures.

    Returns
    -------
    Batch
    """

def _layer_from_parts(thickness: float, band_edge: float, mass: float, doping: float,
                      permittivity: Optional[float], nonparabolicity: float) -> Layer: ...
def _spectrum_from_parts(hamiltonian: Hamiltonian, energies: npt.ArrayLike, vectors: npt.ArrayLike,
                         residuals: npt.ArrayLike, method: str, iterations: int,
                         errors: Optional[npt.ArrayLike]) -> Spectrum: ...
def _split_step_from_parts(grid: Union[FourierGrid, ProductGrid], potential: _GridPotentialLike, mass: float, dt: float,
                           order: int, units: str, drive: object, drive_potential: object,
                           absorber_width: Optional[float], absorber_potential: object, imaginary_time: bool,
                           nonlinearity: float = 0.0) -> SplitStep: ...
def _run_from_parts(grid: Union[FourierGrid, ProductGrid], units: str, record_steps: Sequence[int], times: Sequence[float],
                    states: Sequence[complex], norm: Sequence[float], mean_x: Sequence[float], mean_p: Sequence[float],
                    energy: Sequence[float], autocorrelation: Sequence[complex], absorbed_norm: Optional[float],
                    steps_done: int, cancelled: bool, mean_y: Optional[Sequence[float]] = None,
                    mean_z: Optional[Sequence[float]] = None, mean_py: Optional[Sequence[float]] = None,
                    mean_pz: Optional[Sequence[float]] = None) -> Run: ...
def _ground_state_from_parts(shape: Sequence[int], units: str, nonlinearity: float, chemical_potential: float,
                            energy: float, state: npt.ArrayLike, residual: float, steps: int, rate: float,
                            refine_iterations: int) -> GroundState: ...
def _batch_from_spectra(spectra: Sequence[Spectrum]) -> Batch: ...
def _bare_fft_pair_seconds(n: int, reps: int) -> float: ...
def _bare_grid_fft_pair_seconds(grid: Union[FourierGrid, ProductGrid], reps: int) -> float: ...
