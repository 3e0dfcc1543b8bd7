"""Type stubs for the compiled core ``specwell._core``. Import names from ``specwell``."""

from typing import Callable, Optional, Sequence, Tuple, Union

import numpy as np
import numpy.typing as npt

__version__: str
UNITS: list[str]
METHODS: list[str]

ArrayLike = Union[npt.ArrayLike, Sequence[float]]
PotentialLike = Union[Callable[[npt.NDArray[np.float64]], npt.ArrayLike], npt.ArrayLike]

class ConvergenceError(RuntimeError):
    """An iterative method missed its tolerance.

    Attributes
    ----------
    energies : list of float
        Best energy estimates when the method stopped.
    residuals : list of float
        Their residual norms ‖Hψ − Eψ‖.
    iterations : int
        Iterations performed.
    """

    energies: list[float]
    residuals: list[float]
    iterations: int

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

    def __init__(self, size: int, center: float = 0.0, length: float = 1.0, quadrature: Optional[int] = None) -> None: ...
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

    def __init__(self, start: float, stop: float, points: int) -> None: ...
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

class Hamiltonian:
    """H = T + V on a basis.

    Parameters
    ----------
    basis : HermiteBasis or FourierGrid
        The basis.
    potential : callable or array_like
        Vectorised V(x) called with ``basis.x``, or samples on ``basis.x`` (energy units).
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

    def __init__(self, basis: Union[HermiteBasis, FourierGrid], potential: PotentialLike,
                 mass: Union[float, PotentialLike, None] = None, units: str = "natural") -> None: ...
    def matrix(self) -> npt.NDArray[np.float64]:
        """The dense N×N matrix (real symmetric).

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
              initial: Union[Spectrum, npt.ArrayLike, None] = None, seed: int = 0x5EED) -> Spectrum:
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
            Warm start for the iterative path.
        seed : int
            Seed of the iterative path's random start block.

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
    def size(self) -> int:
        """Matrix dimension N."""

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
        """Iterations of the iterative path (0 for dense)."""
    @property
    def units(self) -> str:
        """Unit system name."""
    @property
    def basis(self) -> Union[HermiteBasis, FourierGrid]:
        """The basis."""
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
        """f_ij = (2m/ħ²)(E_j − E_i)|⟨i|x|j⟩|², shape (count, count); needs a uniform mass."""
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
