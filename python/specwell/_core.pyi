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
    center : float, default 0.0
        Centre of the basis (length units, finite).
    length : float, default 1.0
        Oscillator length (> 0, length units). Best near √(ħ/(mω)) of the potential's
        harmonic part: the functions then resemble the states.
    quadrature : int, optional
        Number of quadrature nodes, size < quadrature ≤ 80000; default None means 2·size.
        Matrix elements of polynomial potentials of degree ≤ 2(quadrature − size) + 1 are exact.

    Raises
    ------
    ValueError
        If an argument is outside its range (the message names it).
    TypeError
        ``size`` or ``quadrature`` not an integer.

    Notes
    -----
    The basis reaches |x − center| ≲ length·sqrt(2·size): states that extend further, or
    potentials with steps, converge slowly; use a FourierGrid or an ElementBasis there.
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
    order : int, default 16
        Polynomial order p of every element, 2 ≤ p ≤ 64.
    max_element_length : float, optional
        Split intervals longer than this (> 0, length units) into equal elements; default None:
        one element per interval.

    Raises
    ------
    ValueError
        Breakpoints not strictly increasing, fewer than two or not finite; order or
        max_element_length out of range.
    TypeError
        ``order`` not an integer.

    Notes
    -----
    The Dirichlet ends are hard walls: put them where the wanted states have decayed.

    Examples
    --------
    Infinite square well of width 1 (E_n = n²π²/2 in natural units):

    >>> import numpy as np
    >>> import specwell as sw
    >>> st = sw.Hamiltonian(sw.ElementBasis([0.0, 0.5, 1.0]), lambda x: 0.0 * x).solve(2)
    >>> np.allclose(st.energies, np.array([1, 4]) * np.pi**2 / 2, rtol=1e-10)
    True
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

    Raises
    ------
    ValueError
        Non-finite bounds, stop ≤ start, points out of range.
    TypeError
        ``points`` not an integer.

    Notes
    -----
    x_j = start + j·dx, dx = (stop − start)/points; k = 2π·fftfreq(points, dx). State
    coefficients in this basis are ψ(x_j)·sqrt(dx). The box is periodic: a state that does
    not vanish at the edges meets its own image; make the box wider than the states.

    Examples
    --------
    >>> import specwell as sw
    >>> g = sw.FourierGrid(-5.0, 5.0, 100)
    >>> g.dx, float(g.x[0]), len(g)
    (0.1, -5.0, 100)
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
        """Coordinate arrays of the grid points, ``numpy.meshgrid(x, y[, z], indexing="ij", sparse=sparse)``.

        Parameters
        ----------
        sparse : bool, default False
            Broadcastable arrays of shapes (nx, 1[, 1]), (1, ny[, 1]) … instead of full ones.

        Returns
        -------
        tuple of ndarray
            (X, Y) or (X, Y, Z).
        """
    def __len__(self) -> int: ...

@final
class Hamiltonian:
    """H = T + V of one particle on a basis: the single-band effective-mass Schrödinger operator.

    T = −(ħ²/2m) d²/dx² for a constant mass, −(ħ²/2) d/dx (1/m(x)) d/dx (BenDaniel-Duke) for a
    mass profile, with ħ and the mass unit of ``units``. The matrix is built once; ``solve``,
    ``apply`` and ``matrix`` reuse it.

    Parameters
    ----------
    basis : HermiteBasis, FourierGrid or ElementBasis
        The basis. A FourierGrid is periodic (states wrap around the box); an ElementBasis
        has ψ = 0 at both ends; a HermiteBasis decays like the oscillator functions.
    potential : callable or array_like or Heterostructure
        Vectorised V(x) called once with ``basis.x`` (returning a number means a constant), or
        samples on ``basis.x`` (energy units; finite, |V| ≤ 1e100). A Heterostructure (with
        ``units="semiconductor"`` and no ``mass``) gives the BenDaniel-Duke Hamiltonian of the
        layers: on an ElementBasis the element problem, on a FourierGrid the exact layer
        integrals in the mass coordinate (the grid sets the box and the number of modes); both
        are generalized problems A c = E B c (see ``overlap_matrix``).
    mass : float or array_like or callable, optional
        Particle mass (> 0) in the mass unit of ``units``; default None means 1. On a
        FourierGrid or an ElementBasis an array on ``basis.x`` (on elements also one value per
        element) or a callable gives a position-dependent mass; a HermiteBasis takes a number only.
    units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}, default "natural"
        "natural": ħ = 1, mass 1; "atomic": hartree, bohr, m_e; "semiconductor": nm, meV, m_e,
        fs; "cold-atom": µm, ħ/ms (so ħ = 1), u, ms; "molecular": Å, cm⁻¹, u (a reduced mass
        in daltons), fs.

    Raises
    ------
    ValueError
        NaN/inf or wrong-length potential or mass, non-positive mass, unknown units, ``mass``
        given with a Heterostructure.
    TypeError
        Wrong basis type (a Heterostructure needs a FourierGrid or an ElementBasis), complex or
        non-numeric potential, a Heterostructure where a callable or array is expected.

    Notes
    -----
    Model limits: one particle, one band, parabolic dispersion (a constant mass per point);
    no spin, strain, many-body or non-parabolic effects (``Heterostructure.solve`` treats
    non-parabolicity). A smooth potential sampled on a grid converges spectrally; a step in V
    or m sampled on a FourierGrid converges only like O(1/N): put steps on element
    breakpoints (ElementBasis) or pass a Heterostructure.

    Examples
    --------
    Harmonic oscillator in natural units (levels n + 1/2):

    >>> import numpy as np
    >>> import specwell as sw
    >>> H = sw.Hamiltonian(sw.FourierGrid(-10.0, 10.0, 128), lambda x: 0.5 * x**2)
    >>> np.round(H.solve(3).energies, 8)
    array([0.5, 1.5, 2.5])
    """

    def __new__(cls, basis: Union[HermiteBasis, FourierGrid, ElementBasis],
                 potential: Union[_PotentialLike, Heterostructure],
                 mass: Union[float, _PotentialLike, None] = None, units: str = "natural") -> Hamiltonian: ...
    def overlap_matrix(self) -> Optional[npt.NDArray[np.float64]]:
        """The overlap matrix B of a generalized problem A c = E B c (None where B = I).

        Returns
        -------
        ndarray, shape (N, N), or None
            B for a Heterostructure (on a FourierGrid or an ElementBasis) and for any
            ElementBasis problem (diagonal there: GLL quadrature); None for a HermiteBasis or a
            FourierGrid with a plain potential.

        Raises
        ------
        MemoryError
            If the matrix would not fit in available memory.
        """
    def matrix(self) -> npt.NDArray[np.float64]:
        """The dense N×N matrix (real symmetric); for a generalized problem, A of A c = E B c.

        Returns
        -------
        ndarray, shape (N, N)
            Energy units; in the basis' coefficients (on a FourierGrid, ψ(x_j)·sqrt(dx)).

        Raises
        ------
        MemoryError
            If the matrix would not fit in available memory.
        """
    def apply(self, psi: npt.ArrayLike) -> npt.NDArray[np.generic]:
        """H·psi, matrix-free, for a real or complex vector of basis coefficients.

        Parameters
        ----------
        psi : array_like, shape (N,)
            Real or complex coefficients. On a FourierGrid they may equally be grid samples
            ψ(x_j) (the map is linear).

        Returns
        -------
        ndarray, shape (N,)
            float64 for real ``psi``, complex128 for complex ``psi``; for a generalized problem
            the product with A (not B⁻¹A).

        Raises
        ------
        ValueError
            ``psi`` of the wrong length or not finite.
        """
    def solve(self, count: int, method: str = "auto", tol: float = 1e-10, max_iter: Optional[int] = None,
              initial: Union[Spectrum, npt.ArrayLike, None] = None, seed: Optional[int] = None) -> Spectrum:
        """Lowest ``count`` eigenpairs (energies ascending) with their residuals.

        Parameters
        ----------
        count : int
            Number of states, 1 ≤ count ≤ N (N = ``size``).
        method : {"auto", "dense", "iterative"}, default "auto"
            "dense": direct eigensolver on the assembled matrix (banded on an ElementBasis,
            parity blocks on a symmetric HermiteBasis problem); "iterative": matrix-free block
            solver (LOBPCG) for the lowest states; "auto": iterative when the
            problem has an FFT product (FourierGrid, or a Heterostructure on one), N > 512 and
            count ≤ N/4, dense otherwise. If an automatic iterative solve stalls and the dense
            matrices fit in memory it is finished densely (``Spectrum.note`` says so).
        tol : float, default 1e-10
            Residual tolerance of the iterative path, ‖Hψ − Eψ‖ ≤ tol·max(1, |E|), in (0, 1).
            Not used by the dense path.
        max_iter : int, optional
            Iteration limit of the iterative path, ≥ 1; default None means 1000.
        initial : Spectrum or array_like (k, N), optional
            Warm start for the iterative path. Without it, a large grid starts from the
            same problem solved on a coarser grid of the same box (then interpolated).
        seed : int, optional
            Seed of the iterative path's random vectors (the start block when there is neither
            ``initial`` nor a coarser grid to start from, and any columns ``initial`` lacks), in
            [0, 2**63); default None means a fixed seed, so results are reproducible.

        Returns
        -------
        Spectrum
            ``energies``, ``vectors``, ``residuals`` and the method actually used.

        Raises
        ------
        ValueError
            count outside [1, N], tol outside (0, 1), unknown method, ``initial`` of the wrong
            shape or not finite.
        MemoryError
            The dense path's matrices (about three N×N float64 arrays, five for a
            generalized problem) would not fit in available memory.
        ConvergenceError
            The iterative path missed ``tol`` within ``max_iter`` (and could not be finished
            densely).

        Warns
        -----
        AccuracyWarning
            Round-off allows some level less than 1e-8 relative accuracy
            (``Spectrum.attainable_accuracy``).

        Notes
        -----
        The residual r = ‖Hψ − Eψ‖ (‖ψ‖ = 1) bounds the eigenvalue error of the discretised
        problem (some exact discrete eigenvalue lies within r of E, for a standard symmetric
        problem); it says nothing about the discretisation error of the basis. Check that by
        solving again with a larger basis.

        Examples
        --------
        >>> import numpy as np
        >>> import specwell as sw
        >>> H = sw.Hamiltonian(sw.HermiteBasis(40), lambda x: 0.5 * x**2)
        >>> st = H.solve(4)
        >>> np.round(st.energies, 10)
        array([0.5, 1.5, 2.5, 3.5])
        >>> bool(st.residuals.max() < 1e-10)
        True
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
    """Lowest eigenpairs of a Hamiltonian (returned by ``Hamiltonian.solve``).

    Not constructed directly. ``len(spectrum)`` is the number of states; results pickle and
    save (``save``) exactly.

    Notes
    -----
    Wavefunctions are normalised, ∫|ψ|² dx = 1 (for a generalized problem cᵀBc = 1). Signs are
    deterministic: each state is positive in the leftmost region where |ψ| exceeds 1 % of its
    maximum. ``residuals`` measure how well the discrete eigenproblem is solved, not the
    error of the basis (``errors``, set by ``Heterostructure.solve``, estimates that).
    """

    @property
    def energies(self) -> npt.NDArray[np.float64]:
        """Energies, ascending, shape (count,)."""
    @property
    def residuals(self) -> npt.NDArray[np.float64]:
        """Residual norms ‖Hψ − Eψ‖ (‖ψ‖ = 1), shape (count,)."""
    @property
    def vectors(self) -> npt.NDArray[np.float64]:
        """Orthonormal coefficient vectors in the basis, shape (count, N) (B-orthonormal, cᵀBc = 1, for a generalized problem)."""
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
        """ψ_n(x) for every state, normalised ∫|ψ|² dx = 1.

        Parameters
        ----------
        x : array_like, optional
            Points (length units, finite); default None: the basis' own points ``x``. Evaluated
            with the basis functions themselves: the trigonometric series on a FourierGrid
            (points must lie in [start, stop]), Hermite functions anywhere, element
            polynomials on an ElementBasis (0 outside the elements).

        Returns
        -------
        ndarray, shape (count, len(x))
            Real values (1/sqrt(length) units).

        Raises
        ------
        ValueError
            ``x`` not finite, or outside the box of a FourierGrid.
        """
    def dipole_matrix(self) -> npt.NDArray[np.float64]:
        """Position matrix ⟨i|x|j⟩, shape (count, count), length units.

        On a FourierGrid x is the grid coordinate (not periodic): meaningful for states that
        vanish at the box edges.
        """
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

        Parameters
        ----------
        other : Spectrum
            The second set of states (same length unit; any basis).

        Returns
        -------
        ndarray, shape (len(self), len(other))

        Raises
        ------
        ValueError
            The two bases share no x range.

        Notes
        -----
        On different bases only the common x range is integrated: weight of either state
        outside it is missing from the overlap.
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
            Photon energies (energy units, finite).
        broadening : float
            Line width (> 0): half width at half maximum (Lorentzian) or standard deviation (Gaussian).
        shape : {"lorentzian", "gaussian"}, default "lorentzian"
            Unit-area line shape.
        initial : int, default 0
            Initial state index, in [0, count − 1].

        Returns
        -------
        ndarray, shape (len(energies),)
            Oscillator strength per unit energy; multiply by the material prefactor for an
            absorption coefficient.

        Raises
        ------
        ValueError
            Non-positive broadening, non-finite energies, unknown shape, ``initial`` out of range.

        Notes
        -----
        Only transitions between the ``count`` computed states enter: solve for enough states
        to cover the photon energies.
        """
    def expectation(self, g: Optional[Callable[[npt.NDArray[np.float64]], npt.ArrayLike]] = None,
                    points: int = 8192) -> npt.NDArray[np.float64]:
        """⟨n|g(x)|n⟩ for every state (g=None: ⟨x⟩).

        Parameters
        ----------
        g : callable, optional
            Vectorised g(x) returning finite values, called once with the ``points`` sample
            points; default None means g(x) = x.
        points : int, default 8192
            Number of uniform points (≥ 16) spanning the basis' own points ``x`` (from the
            smallest to the largest); the trapezoid rule on them.

        Returns
        -------
        ndarray, shape (count,)

        Raises
        ------
        ValueError
            ``points`` < 16, ``g`` returns the wrong number of values or non-finite ones.

        Notes
        -----
        The range is that of ``x``: a state with weight outside it (a HermiteBasis state beyond
        the outermost nodes) is integrated only over the part inside. Second order in the
        spacing; ``matrix_elements`` is more accurate for smooth g.
        """
    def save(self, path: str) -> None:
        """Save to a ``.npz`` file readable with numpy alone (see :func:`specwell.save`).

        Parameters
        ----------
        path : str or path-like
            Destination; numpy appends ``.npz`` if missing.
        """
    def __len__(self) -> int: ...

def eigh(a: npt.ArrayLike) -> Tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
    """All eigenpairs of a real symmetric matrix (lower triangle read) with the core's dense solver.

    Parameters
    ----------
    a : array_like, shape (n, n)
        Real square matrix, finite, |a_ij| ≤ 1e100; only the lower triangle is read (the
        upper one is assumed to mirror it).

    Returns
    -------
    values : ndarray, shape (n,)
        Eigenvalues, ascending.
    vectors : ndarray, shape (n, n)
        Orthonormal eigenvectors as columns.

    Raises
    ------
    ValueError
        ``a`` not square, empty, not finite or with entries beyond 1e100.

    Examples
    --------
    >>> import numpy as np
    >>> import specwell as sw
    >>> w, v = sw.eigh(np.array([[2.0, 1.0], [1.0, 2.0]]))
    >>> np.round(w, 12)
    array([1., 3.])
    """

@final
class Layer:
    """One layer: thickness (nm, > 0), conduction-band edge (meV), effective mass (m_e, > 0).

    Parameters
    ----------
    thickness : float
        Thickness (nm, finite, > 0).
    band_edge : float
        Conduction-band edge (meV, finite).
    mass : float
        Effective mass (m_e, finite, > 0).
    doping : float, keyword-only, default 0.0
        Net ionized dopant density (cm⁻³; donors > 0, acceptors < 0; |doping| ≤ 1e23), for
        Schrödinger-Poisson.
    permittivity : float or None, keyword-only, default None
        Static relative permittivity ε_r (> 0; needed where there is charge).
    nonparabolicity : float, keyword-only, default 0.0
        α (1/eV, in [0, 100]) of the energy-dependent mass m(E) = m (1 + α (E − E_c))
        (two-band Kane form); 0 for a parabolic band.

    Raises
    ------
    TypeError
        A non-numeric argument.

    Notes
    -----
    The values are checked when a ``Heterostructure`` is built from the layer (ValueError
    naming ``layers[i].thickness`` etc.), not here. Material parameters are the user's
    responsibility (see ``specwell.material`` for a table recalled from the literature).
    """

    def __new__(cls, thickness: float, band_edge: float, mass: float, *, doping: float = 0.0,
                permittivity: Optional[float] = None, nonparabolicity: float = 0.0) -> Layer: ...
    @classmethod
    def from_material(cls, material: Material, thickness: float, *, reference: Optional[Material] = None,
                      nonparabolicity: Optional[str] = "three_band", doping: float = 0.0) -> Layer:
        """A layer of ``material`` with the table's band edge, mass, permittivity and non-parabolicity.

        Parameters
        ----------
        material : Material
            From ``specwell.material``.
        thickness : float
            Thickness (nm, > 0).
        reference : Material, optional
            Band edge = the Γ conduction-band edge of ``material`` minus that of ``reference``
            (meV); default None: on the compilation's absolute scale (InSb valence band = 0).
        nonparabolicity : {"three_band", "two_band"} or None, default "three_band"
            Kane model of α (see ``Material.nonparabolicity``); None for a parabolic band.
        doping : float, default 0.0
            Net ionized dopant density (cm⁻³).

        Returns
        -------
        Layer

        Raises
        ------
        TypeError
            ``material`` or ``reference`` not a Material.
        ValueError
            Unknown ``nonparabolicity`` model.
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
        """Total band edge E_c + field + electrostatic energy (meV) at z (nm); V_xc excluded.

        Parameters
        ----------
        z : array_like
            Positions (nm, finite).

        Returns
        -------
        ndarray, shape (len(z),)
        """
    def density(self, z: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """Electron density n(z) = Σ_i N_i |ψ_i(z)|² (cm⁻³) at z (nm).

        Parameters
        ----------
        z : array_like
            Positions (nm, finite).

        Returns
        -------
        ndarray, shape (len(z),)
        """

def self_consistent_batch(stacks: Sequence[Heterostructure], temperature: float, *,
                          fermi_level: Optional[float] = None, surface_barrier: Optional[float] = None,
                          tol: float = 1e-6, max_iter: int = 100, exchange_correlation: bool = False,
                          accuracy: float = 1e-10, mixing: float = 0.3) -> list[SelfConsistent]:
    """``Heterostructure.self_consistent`` for many structures (a doping or gate sweep), in parallel.

    Rayon threads with the GIL released: one contiguous chunk of the sequence per thread, each
    item started from the previous item's electrostatic potential (so neighbouring items
    should be similar structures).

    Parameters
    ----------
    stacks : sequence of Heterostructure
        The structures, each with a permittivity on every layer.
    temperature : float
        K, > 0.
    fermi_level, surface_barrier, tol, max_iter, exchange_correlation, accuracy, mixing
        Keyword-only; as for ``Heterostructure.self_consistent`` (same defaults), applied to
        every structure.

    Returns
    -------
    list of SelfConsistent
        One per structure, in order.

    Raises
    ------
    TypeError
        An item is not a Heterostructure.
    ValueError
        As for ``Heterostructure.self_consistent``.
    ConvergenceError
        Some item did not converge within ``max_iter``.
    """

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
    def name(self) -> str:
        """Material name as given to ``specwell.material`` (one of ``specwell.MATERIALS``)."""
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
        """Conduction-band non-parabolicity α (1/eV) of m(E) = m(1 + α(E − E_c)).

        Parameters
        ----------
        model : {"three_band", "two_band"}, default "three_band"
            Kane model: "three_band" includes the spin-orbit splitting Δ_so; "two_band" gives
            α ≈ 1/E_g.

        Returns
        -------
        float

        Raises
        ------
        ValueError
            Unknown model.
        """

def material(name: str, x: Optional[float] = None, temperature: float = 300.0) -> Material:
    """Parameters of a III-V material at a composition and temperature.

    Parameters
    ----------
    name : str
        One of ``specwell.MATERIALS`` (e.g. "GaAs", "AlGaAs").
    x : float, optional
        Composition of a ternary, 0 ≤ x ≤ 1 (see ``Material.x`` for which element); None
        for a binary (required for a ternary).
    temperature : float, default 300.0
        K, in [0, 800]; the band gap follows the Varshni form.

    Returns
    -------
    Material

    Notes
    -----
    The table's values were recalled from memory of the published compilation (see
    ``Material.source``): verify the parameters you rely on before using them for real work.

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
    field_kv_cm : float, default 0.0
        Field (kV/cm, finite) applied across the stack only: V(z) = band edge +
        0.1·F·(clamp(z, 0, L) − L/2) meV, constant in the claddings.

    Raises
    ------
    TypeError
        ``layers`` not a sequence of Layer.
    ValueError
        No layers, or a layer value out of range (the message names ``layers[i].<field>``),
        non-finite field.

    Notes
    -----
    Semiconductor units throughout (nm, meV, m_e). Model: single conduction band in the
    envelope-function (BenDaniel-Duke) approximation with abrupt interfaces; no strain,
    valence-band mixing or interface roughness. The results are only as good as the layer
    parameters.

    Examples
    --------
    A 10 nm GaAs-like well between 250 meV barriers:

    >>> import specwell as sw
    >>> stack = sw.Heterostructure([sw.Layer(20.0, 250.0, 0.092), sw.Layer(10.0, 0.0, 0.067),
    ...                             sw.Layer(20.0, 250.0, 0.092)])
    >>> st = stack.solve()
    >>> bool(st.bound.all()), bool(0.0 < st.energies[0] < 250.0)
    (True, True)
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
        """V(z) (meV): band edge plus field term, at points z (nm).

        Parameters
        ----------
        z : array_like
            Positions (nm, finite); beyond both ends the claddings continue.

        Returns
        -------
        ndarray, shape (len(z),)
            At an interface, the value of the layer on its right.
        """
    def mass(self, z: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """m(z) (m_e) at points z (nm).

        Parameters
        ----------
        z : array_like
            Positions (nm, finite).

        Returns
        -------
        ndarray, shape (len(z),)
        """
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
        the p + 2 levels are returned with those differences as ``errors``. Layers with a
        non-parabolicity α ≠ 0 are solved level by level for the fixed point E_i = λ_i(H(E_i))
        with the energy-dependent masses m(E) = m(1 + α(E − E_c)).

        Parameters
        ----------
        count : int, optional
            Number of levels, 1 ≤ count ≤ 100000; default None: all bound levels (below both
            cladding edges). Levels above the cladding edges are box states of the truncated
            claddings (``bound`` False), not resonances.
        accuracy : float, default 1e-10
            Relative accuracy in [1e-13, 1e-2].
        order : int, optional
            Starting element order, 2 ≤ order ≤ 62; default None: chosen from the accuracy.
        element_length : float, keyword-only, default 15.0
            Longest element inside a layer (nm); shortened for the wavenumbers of the levels.

        Returns
        -------
        Spectrum
            On an ``ElementBasis``; ``errors`` and ``bound`` are set, wavefunctions evaluate
            anywhere (0 beyond the cladding depth, where the tails are below the accuracy).

        Raises
        ------
        ValueError
            count, accuracy or order out of range; an accuracy the mesh refinement cannot
            reach.

        Warns
        -----
        AccuracyWarning
            Round-off limits some level (see ``Spectrum.attainable_accuracy``).

        Notes
        -----
        ``errors`` estimate the discretisation error of the single-band model, not the error of
        the model or of the layer parameters, which usually dominates (meV, not 1e-10 relative).
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
        """Bottom and top (meV) of each of the lowest ``count`` minibands.

        From the bands at q = 0 and q = π/d (a 1D band is monotonic in |q| between them).

        Parameters
        ----------
        count : int
            Number of minibands, 1 ≤ count ≤ 10000.
        accuracy : float, keyword-only, default 1e-10
            Relative accuracy in [1e-13, 1e-3] (see ``bands``).

        Returns
        -------
        ndarray, shape (count, 2)
            (bottom, top) per band.

        Raises
        ------
        ValueError
            As for ``bands``.
        """
    def miniband_widths(self, count: int, *, accuracy: float = 1e-10) -> npt.NDArray[np.float64]:
        """Widths (meV) of the lowest ``count`` minibands, top − bottom.

        Parameters
        ----------
        count : int
            Number of minibands, 1 ≤ count ≤ 10000.
        accuracy : float, keyword-only, default 1e-10
            Relative accuracy in [1e-13, 1e-3] (see ``bands``).

        Returns
        -------
        ndarray, shape (count,)

        Notes
        -----
        A narrow band's width is a difference of two nearly equal energies: its relative
        error is about accuracy·|E|/width, not ``accuracy``.
        """
    def band_mass(self, band: Optional[int] = None, *, accuracy: float = 1e-10) -> float:
        """Effective mass m* (m_e) at the bottom of a miniband.

        m* = 2(ħ²/2m_e)/(d²E/dq²), the curvature from second-order perturbation theory in
        the Bloch phase on the discretised bands. The bottom of band n lies at q = 0 for
        even n and at q = π/d for odd n.

        Parameters
        ----------
        band : int, optional
            Band index (≥ 0); default None means band 0.
        accuracy : float, keyword-only, default 1e-10
            Relative accuracy of the bands in [1e-13, 1e-3].

        Returns
        -------
        float

        Raises
        ------
        ValueError
            A band edge touching its neighbour (closed gap), a field, non-parabolic layers,
            ``band`` or ``accuracy`` out of range.
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

        Returns
        -------
        float
            J (A/cm²), with the sign of μ_L − μ_R (positive for bias > 0, electrons flowing
            from the left lead to the right one).

        Raises
        ------
        ValueError
            Non-finite bias, non-positive temperature, accuracy or mesh_accuracy out of range,
            non-parabolic layers.

        Notes
        -----
        Coherent tunnelling only (no scattering, no charge self-consistency, the bias drops
        linearly across the stack): a model for trends, not device currents.
        """
    def current_voltage(self, biases: npt.ArrayLike, temperature: float, fermi_level: float, *,
                        accuracy: float = 1e-8, mesh_accuracy: float = 1e-10) -> npt.NDArray[np.float64]:
        """``current_density`` at every bias, in parallel over the biases (GIL released).

        Parameters
        ----------
        biases : array_like
            Biases (volts, finite).
        temperature, fermi_level, accuracy, mesh_accuracy
            As for ``current_density`` (``accuracy`` and ``mesh_accuracy`` keyword-only).

        Returns
        -------
        ndarray, shape (len(biases),)
            J (A/cm²).
        """
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
    mass : float, default 1.0
        Particle mass (> 0, mass unit of ``units``); a single number (a position-dependent
        mass does not split into kinetic and potential steps).
    dt : float
        Time step (time units; finite, nonzero; > 0 in imaginary time and with
        ``absorber_potential``). Required: the default None raises TypeError.
    order : {2, 4}, optional
        2 (default None means 2): Strang splitting; 4: Yoshida (1990) composition of three
        Strang steps (not in imaginary time).
    units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}, default "natural"
        Unit system ("cold-atom": µm, ms, u, energies in ħ/ms so that ħ = 1).
    drive : callable or array_like, optional
        f(t) of V(x,t) = V0(x) + f(t)·V1(x); needs ``drive_potential``. A callable is called
        once per run with the array of sub-step sample times (it must be vectorised: f(t_array)
        → array; see ``drive_sample_times``), keeping full order; an array gives f at the step
        midpoints t_n + dt/2, one per step (second order in the drive for order=4). Both run at
        the same speed: the samples are taken before the GIL is released.
    drive_potential : callable or array_like, optional
        V1 (energy per unit of f), like ``potential``; e.g. ``lambda x: x`` for a uniform
        field. Needs ``drive``.
    absorber_width : float, optional
        Width of a smooth cos^(1/8) mask at every face of the box (absorption per step); in
        (0, half the shortest side]. Not with ``absorber_potential``.
    absorber_potential : callable or array_like, optional
        Complex absorbing potential W ≥ 0: V → V − iW (like ``potential``).
    imaginary_time : bool, default False
        Propagate in imaginary time (use ``ground_states`` or ``ground_state``); not with a
        drive or an absorber.
    nonlinearity : float, default 0.0
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
        An argument outside its range, a potential of the wrong shape, g not finite, an
        option combination listed above.
    TypeError
        Wrong grid type, non-numeric input, ``dt`` missing, an array ``mass``.
    MemoryError
        The phase tables would not fit in memory.

    Notes
    -----
    Periodic boundaries: a packet leaving one face re-enters at the other unless absorbed.
    The splitting error is O(dt²) (order 2) or O(dt⁴) (order 4) per unit time; the grid must
    resolve the largest momentum reached (|k| < π/dx). ``Run.norm`` and ``Run.energy`` are
    diagnostics, not accuracy guarantees: check convergence by halving ``dt``.

    Examples
    --------
    A displaced Gaussian in a harmonic trap returns after one period 2π:

    >>> import numpy as np
    >>> import specwell as sw
    >>> g = sw.FourierGrid(-10.0, 10.0, 128)
    >>> prop = sw.SplitStep(g, 0.5 * g.x**2, dt=2 * np.pi / 1000, order=4)
    >>> run = prop.run(sw.gaussian_packet(g, 1.0, sigma=np.sqrt(0.5)), 1000, record_every=500)
    >>> np.round(run.mean_x, 6)
    array([ 1., -1.,  1.])
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
            Record every this many steps (≥ 1; default None means 1); the final state is
            always recorded.
        progress : bool, default False
            Show a tqdm progress bar (extra ``progress``). Ctrl-C interrupts the run
            (KeyboardInterrupt) with or without it.

        Returns
        -------
        Run

        Raises
        ------
        MemoryError
            If the recorded snapshots would not fit in memory (raise ``record_every``); refused
            before any step is taken.
        ValueError
            ``psi0`` of the wrong shape or not finite, ``steps`` or ``record_every`` out of range.
        KeyboardInterrupt
            The run was interrupted (Ctrl-C).
        """
    def run_many(self, psi0s: npt.ArrayLike, steps: int, record_every: Optional[int] = None) -> list[Run]:
        """Propagate several initial states in parallel across cores (GIL released).

        Parameters
        ----------
        psi0s : array_like, shape (M, N) or (M, *grid.shape)
            M ≥ 1 initial states (as for ``run``).
        steps : int
            Number of time steps (≥ 0), the same for every state.
        record_every : int, optional
            Record every this many steps (≥ 1; default None means 1).

        Returns
        -------
        list of Run
            One per initial state, in order.

        Raises
        ------
        ValueError
            ``psi0s`` of the wrong shape, ``steps`` or ``record_every`` out of range.
        """
    def ground_states(self, count: int, tol: float = 1e-9, max_steps: Optional[int] = None,
                      seed: Optional[int] = None) -> Tuple[npt.NDArray[np.float64], npt.NDArray[np.complex128]]:
        """Lowest ``count`` states by imaginary-time propagation with Gram-Schmidt (imaginary_time=True).

        With a nonlinearity only ``count=1`` is accepted (ValueError otherwise): the normalised
        gradient flow, refined to the minimum of the energy functional on the grid, and the
        returned energy is the chemical potential μ = ⟨T⟩ + ⟨V⟩ + gΣ|ψ|⁴dV (see ``ground_state``
        for the energy functional too).

        Parameters
        ----------
        count : int
            Number of states, 1 ≤ count ≤ number of grid points.
        tol : float, default 1e-9
            Stop when max_i |ΔE_i|/Δτ < ``tol`` (> 0; energy per time unit), checked every 10
            steps; the states are then refined by a Rayleigh-Ritz step in their span.
        max_steps : int, optional
            Imaginary-time step limit (≥ 1); default None means 200000.
        seed : int, optional
            Seed of the random start states, in [0, 2**63); default None means a fixed seed.

        Returns
        -------
        energies : ndarray, shape (count,)
        states : ndarray of complex128, shape (count, N) or (count, *grid.shape), Σ|ψ|²dV = 1

        Raises
        ------
        ValueError
            The propagator is not in imaginary time; count, tol or max_steps out of range.
        ConvergenceError
            ``tol`` not reached within ``max_steps`` (its ``rates`` hold the last |dE/dτ|).

        Notes
        -----
        Linear case: the fixed point is an eigenstate of the split operator, O(dτ²) away from
        the grid eigenstate; the energies (Rayleigh quotients of the grid H) are O(dτ⁴)
        accurate. ``Hamiltonian.solve`` on the same grid has no dτ error. With g ≠ 0 the
        state is refined to the grid minimum of the energy functional (independent of dτ).
        """
    def ground_state(self, tol: float = 1e-9, max_steps: Optional[int] = None, seed: Optional[int] = None) -> GroundState:
        """The ground state by imaginary time (imaginary_time=True), with μ, E and its residual.

        Parameters
        ----------
        tol : float, default 1e-9
            Stop the imaginary-time flow when |Δμ|/Δτ < ``tol`` (> 0; energy per time unit);
            with g ≠ 0 the state is then refined by conjugate gradients to the grid minimum of
            the energy functional.
        max_steps : int, optional
            Imaginary-time step limit (≥ 1); default None means 200000.
        seed : int, optional
            Seed of the random start state, in [0, 2**63); default None means a fixed seed.

        Returns
        -------
        GroundState

        Raises
        ------
        ValueError
            The propagator is not in imaginary time; tol or max_steps out of range.
        ConvergenceError
            ``tol`` not reached within ``max_steps``.
        """
    def drive_sample_times(self, steps: int) -> npt.NDArray[np.float64]:
        """Times at which a callable drive is evaluated for a run of ``steps`` steps.

        Parameters
        ----------
        steps : int
            Number of steps of the run (≥ 0).

        Returns
        -------
        ndarray
            Sample times relative to the start of the run (t0 = 0), in the order the drive
            callable receives them.

        Raises
        ------
        MemoryError
            The samples for this many steps would not fit in memory.
        """
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
        """Save to a ``.npz`` file readable with numpy alone (see :func:`specwell.save`).

        Parameters
        ----------
        path : str or path-like
            Destination; numpy appends ``.npz`` if missing.
        """
    def __len__(self) -> int: ...

def unit_constants(units: str) -> Tuple[float, float]:
    """(ħ²/2m₁, ħ) of a unit system, in energy·length² and energy·time.

    m₁ is the system's mass unit: m_e, or u for "cold-atom" and "molecular".

    Parameters
    ----------
    units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}

    Returns
    -------
    (float, float)

    Raises
    ------
    ValueError
        Unknown units.

    Examples
    --------
    >>> import specwell as sw
    >>> sw.unit_constants("natural")
    (0.5, 1.0)
    """

def angular_frequency(frequency_hz: float, units: str = "cold-atom") -> float:
    """ω = 2πf in radians per time unit of ``units`` for a frequency f in Hz.

    Parameters
    ----------
    frequency_hz : float
        f (Hz, finite, ≥ 0).
    units : str, default "cold-atom"
        A unit system with a time unit (not "natural").

    Returns
    -------
    float

    Raises
    ------
    ValueError
        Negative or non-finite frequency, unknown units or "natural".
    """

def oscillator_length(mass: float, frequency_hz: float, units: str = "cold-atom") -> float:
    """Harmonic-oscillator length √(ħ/(mω)) (length units) of a particle in a trap.

    Parameters
    ----------
    mass : float
        Particle mass (> 0; mass unit of ``units``: u for "cold-atom").
    frequency_hz : float
        Trap frequency ω/2π (Hz, > 0).
    units : str, default "cold-atom"
        A unit system with a time unit (not "natural").

    Returns
    -------
    float

    Raises
    ------
    ValueError
        Non-positive mass or frequency, unknown units or "natural".
    """

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

    Raises
    ------
    ValueError
        Non-finite scattering length, non-positive atom number or mass, dims outside {1, 2, 3},
        ``confinement_hz`` missing or non-positive for dims 1 and 2, unknown units.
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
        """ψ_n(x) of item ``index``, shape (count, len(x)) (see ``Spectrum.wavefunctions``).

        Parameters
        ----------
        index : int
            Item index (negative counts from the end).
        x : array_like, optional
            Points (length units); default None: the basis' own points.

        Returns
        -------
        ndarray, shape (count, len(x))

        Raises
        ------
        IndexError
            ``index`` out of range.
        """
    def __getitem__(self, key: int, /) -> Spectrum: ...
    def save(self, path: str) -> None:
        """Save to a ``.npz`` file readable with numpy alone (see :func:`specwell.save`).

        Parameters
        ----------
        path : str or path-like
            Destination; numpy appends ``.npz`` if missing.
        """
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
        ``energies`` and ``residuals`` of shape (M, count); item i is a Spectrum.

    Raises
    ------
    ValueError
        As for ``Hamiltonian`` and ``Hamiltonian.solve`` (the message names
        ``potentials[i]``), potentials of the wrong shape, ``mass`` with Heterostructures.
    TypeError
        Heterostructures with a basis, or other items without one.
    ConvergenceError
        An iterative item missed ``tol``.
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
