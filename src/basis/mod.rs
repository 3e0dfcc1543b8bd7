//! Spectral bases. One file per basis behind the small [`Basis`] trait.
//!
//! A basis is an orthonormal set of real functions {χ_n(x)}. Operators are
//! represented by real symmetric matrices in that set, states by coefficient
//! vectors `c` with ψ(x) = Σ_n c_n χ_n(x); ∫|ψ|² dx = Σ c_n².
//!
//! * [`HermiteBasis`]: Gauss-Hermite functions; potentials are sampled at the
//!   Gauss-Hermite quadrature nodes (more nodes than functions).
//! * [`FourierGrid`]: the Fourier-grid (discrete variable) basis of a periodic
//!   box; potentials are sampled on the grid points and the coefficients are
//!   c_j = ψ(x_j)·sqrt(dx).
//! * [`LayeredBasis`]: periodic sinc functions in the mass coordinate s = ∫m dz of a
//!   heterostructure (generalized problem A c = E B c; coefficients B-orthonormal).
//! * [`ElementBasis`]: Legendre spectral elements (Lagrange polynomials on GLL nodes, C0,
//!   Dirichlet ends); coefficients are the nodal values, B-orthonormal in GLL quadrature.
//! * [`ProductGrid`]: the tensor product of two or three Fourier grids (2D and 3D boxes).
//!   It is not a [`Basis`] (no eigen solver runs on it); it and [`FourierGrid`] are the
//!   [`PeriodicGrid`]s that split-step propagation runs on.

pub mod elements;
pub mod fourier;
pub mod gll;
pub mod hermite;
pub mod hermite_math;
pub mod layered;
pub mod periodic;
pub mod product;

pub use elements::ElementBasis;
pub use fourier::FourierGrid;
pub use hermite::HermiteBasis;
pub use layered::LayeredBasis;
pub use periodic::PeriodicGrid;
pub use product::ProductGrid;

use crate::error::InputError;

use faer::{Mat, MatRef};
use std::sync::Arc;

/// What every basis provides to the Hamiltonian and eigen code.
pub trait Basis: Send + Sync {
    /// Number of basis functions N (the matrix dimension).
    fn size(&self) -> usize;
    /// Points at which a multiplicative potential is sampled (length set by the basis).
    fn points(&self) -> &[f64];
    /// Values ψ_j(x_i) of the states whose coefficients are the columns of `coefs`,
    /// as a `x.len() × coefs.ncols()` matrix.
    fn evaluate(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError>;
    /// Values of the states at [`Basis::points`] up to a positive factor per point
    /// (used for the sign convention and for plotting on the native points).
    fn sample_sign_profile(&self, coefs: MatRef<'_, f64>) -> Mat<f64>;
    /// Short human-readable description.
    fn describe(&self) -> String;
}

/// A shared handle on one of the bases, so that Hamiltonians and spectra can keep
/// their basis alive cheaply and still reach basis-specific fast paths.
#[derive(Clone, Debug)]
pub enum BasisRef {
    Hermite(Arc<HermiteBasis>),
    Fourier(Arc<FourierGrid>),
    /// A heterostructure's mass-coordinate basis (BenDaniel-Duke, generalized problem).
    Layered(Arc<LayeredBasis>),
    /// Legendre spectral elements (banded generalized problem).
    Elements(Arc<ElementBasis>),
}

impl BasisRef {
    pub fn as_dyn(&self) -> &dyn Basis {
        match self {
            BasisRef::Hermite(b) => b.as_ref(),
            BasisRef::Fourier(g) => g.as_ref(),
            BasisRef::Layered(l) => l.as_ref(),
            BasisRef::Elements(e) => e.as_ref(),
        }
    }
}

/// Flip the sign of each column of `coefs` so the state is positive in its leftmost
/// region where |ψ| exceeds 1 % of its maximum on the basis' own sample points.
/// This makes signs deterministic and (to the extent the lobes are resolved)
/// the same in every basis: the ground state is positive, and each excited
/// state starts positive on the left.
pub fn fix_signs(basis: &dyn Basis, coefs: &mut Mat<f64>) {
    let profile = basis.sample_sign_profile(coefs.as_ref());
    for j in 0..coefs.ncols() {
        let col = profile.col(j);
        let max = (0..col.nrows()).map(|i| col[i].abs()).fold(0.0, f64::max);
        let first = (0..col.nrows()).find(|&i| col[i].abs() > 0.01 * max);
        if let Some(i) = first {
            if col[i] < 0.0 {
                for r in 0..coefs.nrows() {
                    coefs[(r, j)] = -coefs[(r, j)];
                }
            }
        }
    }
}
