"""specwell: bound states and wavepacket dynamics of 1D Schrödinger problems.

Spectral bases (Gauss-Hermite functions, Fourier grids, exact-layer
heterostructures), a Rust core that builds and diagonalises Hamiltonians and
propagates wavepackets by split-step Fourier, and a numpy-first API.

Model limits: single-particle, single-band effective-mass Schrödinger equation
(parabolic bands, no many-body effects). See the README for conventions.
"""

from specwell._core import (
    MATERIALS,
    METHODS,
    AccuracyWarning,
    Batch,
    UNITS,
    ConvergenceError,
    ElementBasis,
    FourierGrid,
    Hamiltonian,
    HermiteBasis,
    Heterostructure,
    Layer,
    Material,
    Run,
    SelfConsistent,
    Spectrum,
    SplitStep,
    __version__,
    eigh,
    material,
    self_consistent_batch,
    solve_batch,
    unit_constants,
)
from specwell.io import load, save
from specwell.states import autocorrelation_spectrum, eigenstate, gaussian_packet, superposition

__all__ = [
    "MATERIALS",
    "METHODS",
    "AccuracyWarning",
    "Batch",
    "UNITS",
    "ConvergenceError",
    "ElementBasis",
    "FourierGrid",
    "Hamiltonian",
    "HermiteBasis",
    "Heterostructure",
    "Layer",
    "Material",
    "Run",
    "SelfConsistent",
    "Spectrum",
    "SplitStep",
    "__version__",
    "autocorrelation_spectrum",
    "eigenstate",
    "eigh",
    "gaussian_packet",
    "load",
    "material",
    "save",
    "self_consistent_batch",
    "solve_batch",
    "superposition",
    "unit_constants",
]
