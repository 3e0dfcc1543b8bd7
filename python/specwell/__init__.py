"""specwell: bound states and wavepacket dynamics of 1D Schrödinger problems.

Spectral bases (Gauss-Hermite functions, Fourier grids, exact-layer
heterostructures), a Rust core that builds and diagonalises Hamiltonians and
propagates wavepackets by split-step Fourier, and a numpy-first API. Split-step
propagation and imaginary time also run on 2D and 3D product grids, with an
optional mean-field (Gross-Pitaevskii) term for trapped condensates.

Model limits: single-particle, single-band effective-mass Schrödinger equation
(parabolic bands, no many-body effects beyond the Gross-Pitaevskii mean field
g|ψ|² of ``SplitStep(..., nonlinearity=g)``). See the README for conventions.
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
    GroundState,
    Hamiltonian,
    HermiteBasis,
    Heterostructure,
    Layer,
    Material,
    ProductGrid,
    Run,
    SelfConsistent,
    Spectrum,
    SplitStep,
    __version__,
    angular_frequency,
    coupling_constant,
    eigh,
    material,
    self_consistent_batch,
    oscillator_length,
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
    "GroundState",
    "Hamiltonian",
    "HermiteBasis",
    "Heterostructure",
    "Layer",
    "Material",
    "ProductGrid",
    "Run",
    "SelfConsistent",
    "Spectrum",
    "SplitStep",
    "__version__",
    "angular_frequency",
    "autocorrelation_spectrum",
    "coupling_constant",
    "eigenstate",
    "eigh",
    "gaussian_packet",
    "load",
    "material",
    "oscillator_length",
    "save",
    "self_consistent_batch",
    "solve_batch",
    "superposition",
    "unit_constants",
]
