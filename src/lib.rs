//! # specwell
//!
//! Bound states and wavepacket dynamics of the one-dimensional Schrödinger equation
//! −(ħ²/2m) ψ'' + V(x) ψ = E ψ in spectral bases; split-step propagation and imaginary
//! time also on 2D/3D product grids ([`basis::ProductGrid`]) with an optional
//! Gross-Pitaevskii mean-field term ([`propagate`]).
//!
//! ## Conventions
//! * **Units** ([`units::Units`]): `Natural` (ħ = 1, kinetic −(1/2m)∂², mass 1 by
//!   default), `Atomic` (same numbers in hartree/bohr/m_e), `Semiconductor` (nm, meV,
//!   m_e, fs; ħ²/2m_e and ħ from CODATA 2022), `ColdAtom` (µm, ms, u, energies in
//!   ħ/ms so that ħ = 1; ħ²/2u from CODATA 2022).
//! * **Normalisation**: wavefunctions satisfy ∫|ψ(x)|² dx = 1; basis coefficient
//!   vectors have unit 2-norm.
//! * **Signs**: each eigenvector is positive in the leftmost region where |ψ|
//!   exceeds 1 % of its maximum ([`basis::fix_signs`]).
//! * **Time**: states evolve as exp(−iHt/ħ).
//!
//! ## Model limits
//! Single-particle, single-band effective-mass model: parabolic bands, no
//! many-body effects (no Hartree or exchange-correlation potential), no strain
//! or non-parabolicity. Numbers are as good as that model. The one exception is
//! the Gross-Pitaevskii mean field g|ψ|² of a condensate in [`propagate`].
//!
//! The pure-Rust core has no Python dependency; the pyo3 bindings live in
//! [`python`] only.

// No `unwrap` on any path reachable from user input; the few `expect`s left in the
// iterative solver state internal invariants (a buffer allocated iff B is given).
#![cfg_attr(not(test), deny(clippy::unwrap_used))]
// Comparisons are written `!(x > 0.0)` on purpose: they are true for NaN, so one test
// rejects NaN and out-of-range values together.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod basis;
pub mod eigen;
pub mod error;
pub mod linalg;
pub mod model;
pub mod observables;
pub mod problem;
pub mod propagate;
pub mod selfconsistent;
pub mod transport;

mod python;

pub use basis::{Basis, BasisRef, FourierGrid, HermiteBasis, PeriodicGrid, ProductGrid};
pub use eigen::{solve, Method, SolveOptions, Spectrum};
pub use error::{Error, InputError, NumericalError};
pub use model::units::Units;
pub use problem::{DiscreteProblem, Hamiltonian, Mass};
