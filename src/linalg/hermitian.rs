//! All eigenpairs of a dense complex Hermitian matrix (faer's self-adjoint solver on
//! `Complex64`), for the Bloch-periodic problems whose wrap-around coupling carries a
//! phase e^{iθ}.
//!
//! The QR-iteration path is used (divide and conquer is disabled): it is always backward
//! stable (‖AV − VΛ‖ ≈ ε‖A‖), which [`super::dense`] found faer's divide and conquer is
//! not on graded matrices; the matrices here are small (a period of a superlattice, a
//! few hundred unknowns), where the QR path costs little more.

use crate::error::{NumericalError, Result};
use faer::diag::Diag;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::evd::{self_adjoint_evd, self_adjoint_evd_scratch, ComputeEigenvectors, SelfAdjointEvdParams};
use faer::{Mat, MatRef, Par};
use num_complex::Complex64;

/// Eigenvalues (ascending) of the Hermitian matrix `a` (lower triangle read) and, when
/// `vectors`, the unitary matrix of eigenvectors as columns. Errors if the solver fails
/// (non-finite input) or the matrix is not square.
pub fn eigh(a: MatRef<'_, Complex64>, vectors: bool, par: Par) -> Result<(Vec<f64>, Option<Mat<Complex64>>)> {
    let n = a.nrows();
    if a.ncols() != n {
        return Err(NumericalError::EigenFailed(format!("matrix is {}×{}, not square", n, a.ncols())).into());
    }
    let mut params: SelfAdjointEvdParams = faer::Auto::<Complex64>::auto();
    params.recursion_threshold = usize::MAX;
    let compute = if vectors { ComputeEigenvectors::Yes } else { ComputeEigenvectors::No };
    let mut mem = MemBuffer::new(self_adjoint_evd_scratch::<Complex64>(n, compute, par, params.into()));
    let mut s = Diag::<Complex64>::zeros(n);
    let mut u = if vectors { Some(Mat::<Complex64>::zeros(n, n)) } else { None };
    self_adjoint_evd(a, s.as_mut(), u.as_mut().map(|u| u.as_mut()), par, MemStack::new(&mut mem), params.into())
        .map_err(|e| NumericalError::EigenFailed(format!("{e:?}")))?;
    let vals: Vec<f64> = (0..n).map(|i| s[i].re).collect();
    if vals.iter().any(|v| !v.is_finite()) {
        return Err(NumericalError::EigenFailed("non-finite eigenvalues (non-finite matrix?)".into()).into());
    }
    Ok((vals, u))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hermitian_eigenpairs_of_a_phase_coupled_ring() {
        // The tight-binding ring with a flux: H_jk = −1 between neighbours, the wrap-around
        // bond carrying e^{iθ}. Its eigenvalues are −2 cos((θ + 2πm)/n), m = 0..n−1
        // (Bloch's theorem on the ring; e.g. Ashcroft & Mermin 1976, ch. 8).
        let n = 7;
        let theta = 0.37;
        let mut a = Mat::<Complex64>::zeros(n, n);
        for j in 0..n - 1 {
            a[(j + 1, j)] = Complex64::new(-1.0, 0.0);
            a[(j, j + 1)] = Complex64::new(-1.0, 0.0);
        }
        let ph = Complex64::from_polar(1.0, theta);
        a[(0, n - 1)] = -ph;
        a[(n - 1, 0)] = -ph.conj();
        let (vals, u) = eigh(a.as_ref(), true, Par::Seq).unwrap();
        let mut exact: Vec<f64> = (0..n).map(|m| -2.0 * ((theta + 2.0 * std::f64::consts::PI * m as f64) / n as f64).cos()).collect();
        exact.sort_by(f64::total_cmp);
        for (v, e) in vals.iter().zip(&exact) {
            assert!((v - e).abs() < 1e-14, "{v} vs {e}");
        }
        let u = u.unwrap();
        let r = &a * &u;
        for j in 0..n {
            for i in 0..n {
                assert!((r[(i, j)] - u[(i, j)] * vals[j]).norm() < 1e-13);
            }
        }
        let (v2, none) = eigh(a.as_ref(), false, Par::Seq).unwrap();
        assert!(none.is_none());
        assert!(v2.iter().zip(&vals).all(|(a, b)| (a - b).abs() < 1e-14));
        assert!(eigh(Mat::<Complex64>::zeros(2, 3).as_ref(), false, Par::Seq).is_err());
    }
}
