"""specwell: bound states and wavepacket dynamics of 1D Schrödinger problems.

Spectral bases (Gauss-Hermite functions, Fourier grids), a Rust core that builds
and diagonalises Hamiltonians, and a numpy-first API.

Model limits: single-particle, single-band effective-mass Schrödinger equation
(parabolic bands, no many-body effects). See the README for conventions.
"""

from specwell._core import (
    METHODS,
    UNITS,
    ConvergenceError,
    FourierGrid,
    Hamiltonian,
    HermiteBasis,
    Spectrum,
    __version__,
    eigh,
)

__all__ = [
    "METHODS",
    "UNITS",
    "ConvergenceError",
    "FourierGrid",
    "Hamiltonian",
    "HermiteBasis",
    "Spectrum",
    "__version__",
    "eigh",
]
