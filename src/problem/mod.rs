//! Problems: the operators a basis and a model give, as the solvers need them.
//!
//! Every discretisation's Hamiltonian implements [`DiscreteProblem`]: its dimension,
//! A (and B for a generalized problem A c = E B c) applied to blocks of vectors, dense
//! A and B on demand, a norm estimate, a preconditioner, optional symmetry blocks and
//! an optional coarser copy of itself (for the coarse-grid start). The eigen layer
//! reads these properties, never the basis type; the [`crate::linalg`] solvers see
//! only the operators and matrices they produce.
//!
//! * [`fourier`]: Fourier-grid Hamiltonian (constant mass or BenDaniel-Duke profile).
//! * [`hermite`]: Gauss-Hermite function basis (quadrature potential, parity blocks).
//! * [`layered`]: a heterostructure's exact-layer Galerkin problem in the mass coordinate.
//! * [`elements`]: Legendre spectral elements (banded A, diagonal B), any potential and mass.
//! * [`hamiltonian`]: the user-facing [`Hamiltonian`]: basis + potential + mass + units,
//!   holding one of the above.

pub mod elements;
pub mod fourier;
pub mod hamiltonian;
pub mod hermite;
pub mod layered;
pub mod shifted_kinetic;

pub use hamiltonian::{Hamiltonian, Kinetic, Mass};

use crate::linalg::banded::SymBand;
use crate::linalg::lobpcg::Preconditioner;
use faer::{Mat, MatRef};

/// What the `method="auto"` rule and the solvers may know about a problem.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Structure {
    /// A c = E B c with B ≠ I (B symmetric positive definite).
    pub generalized: bool,
    /// The matrix-free product costs O(N log N) per vector (FFTs), so a
    /// matrix-free iteration beats a dense O(N³) solve on large problems.
    pub fast_apply: bool,
}

/// A problem whose matrix is block diagonal in a known splitting of the basis
/// (e.g. parity): the blocks and, for each, the basis indices of its rows.
pub struct SymmetryBlocks {
    pub blocks: Vec<Mat<f64>>,
    pub indices: Vec<Vec<usize>>,
}

/// Maps a column-major block of `ncols` coefficient vectors of a coarse problem onto a
/// finer basis: `(block, ncols) -> block` (the fine block is column-major too).
pub type Interpolator = Box<dyn Fn(&[f64], usize) -> Vec<f64> + Send + Sync>;

/// A banded pencil: A symmetric with the band stored, B diagonal.
pub struct BandPencil<'a> {
    pub a: &'a SymBand,
    pub b: &'a [f64],
    /// A value ℓ with xᵀAx ≥ ℓ·xᵀBx for every x (at or below the lowest eigenvalue),
    /// when the problem knows one from its structure; it lets the eigensolver use
    /// shift-invert Lanczos ([`crate::linalg::lanczos`]).
    pub lower_bound: Option<f64>,
}

/// A coarser discretisation of the same problem and the map of its vectors back.
pub struct Coarse {
    pub problem: Box<dyn DiscreteProblem>,
    pub interpolate: Interpolator,
}

/// The operators of one discretised Hamiltonian (see the module docs). Blocks of
/// vectors are column-major: column j is `x[j*dim..(j+1)*dim]`.
pub trait DiscreteProblem: Send + Sync {
    /// Matrix dimension N.
    fn dim(&self) -> usize;
    /// Properties read by the auto rule.
    fn structure(&self) -> Structure;
    /// y = A x for `ncols` columns.
    fn apply_a(&self, x: &[f64], y: &mut [f64], ncols: usize);
    /// y = B x for `ncols` columns (B = I unless [`Structure::generalized`]).
    fn apply_b(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        let n = self.dim() * ncols;
        y[..n].copy_from_slice(&x[..n]);
    }
    /// Dense A (N×N, real symmetric).
    fn dense_a(&self) -> Mat<f64>;
    /// Dense B, `None` when B = I.
    fn dense_b(&self) -> Option<Mat<f64>> {
        None
    }
    /// An upper estimate of the norm of the standard-form operator B^{-1/2} A B^{-1/2}
    /// (energy units), used for round-off floors.
    fn norm_estimate(&self) -> f64;
    /// A natural energy unit of the problem, the lowest kinetic quantum of its domain
    /// (e.g. c·(2π/L)² on a periodic box): the scale below which |E| counts as zero
    /// when judging round-off.
    fn energy_scale(&self) -> f64;
    /// A symmetric positive definite preconditioner approximating (A − σB)⁻¹.
    fn preconditioner(&self) -> Option<Box<dyn Preconditioner + '_>> {
        None
    }
    /// Blocks of A when a symmetry splits it exactly (up to round-off of a dense solve).
    fn symmetry_blocks(&self) -> Option<SymmetryBlocks> {
        None
    }
    /// The same problem on the coarsest basis of at least `min_dim` functions that the
    /// discretisation offers (for a Fourier grid: n/2^j points), with the map of its
    /// vectors back onto this basis, for the multilevel start of an iteration; `None`
    /// when it cannot be coarsened (to at least `min_dim` and below this size).
    fn coarsened(&self, min_dim: usize) -> Option<Coarse> {
        let _ = min_dim;
        None
    }
    /// A banded form of the pencil (B diagonal), when the problem has one.
    fn band(&self) -> Option<BandPencil<'_>> {
        None
    }
    /// Rayleigh quotients of the columns of `v` computed in a form more accurate than
    /// vᵀAv (e.g. the kinetic energy as a sum of squares), to refine the energies of a
    /// solve; `None` when the problem has no such form.
    fn rayleigh_quotients(&self, v: MatRef<'_, f64>) -> Option<Vec<f64>> {
        let _ = v;
        None
    }
    /// ⟨i|x|j⟩ of the states in the columns of `v` (B-orthonormal), length units.
    fn position_matrix(&self, v: MatRef<'_, f64>) -> Mat<f64>;
    /// ⟨i|m(x)|i⟩ of the states in the columns of `v` (mass units).
    fn mean_masses(&self, v: MatRef<'_, f64>) -> Vec<f64>;
}
