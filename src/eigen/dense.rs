//! Full dense diagonalisation through faer's self-adjoint eigensolver
//! (tridiagonalisation + divide and conquer; level with LAPACK `syevd` here).

use crate::error::{check_memory, NumericalError, Result};
use crate::hamiltonian::Hamiltonian;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::evd::{self_adjoint_evd, self_adjoint_evd_scratch, ComputeEigenvectors};
use faer::diag::Diag;
use faer::{Mat, MatRef, Par};

/// All eigenpairs of a real symmetric matrix (lower triangle read), ascending.
pub fn eigh(a: MatRef<'_, f64>, par: Par) -> Result<(Vec<f64>, Mat<f64>)> {
    let n = a.nrows();
    let mut u = Mat::<f64>::zeros(n, n);
    let mut s = Diag::<f64>::zeros(n);
    let mut mem = MemBuffer::new(self_adjoint_evd_scratch::<f64>(n, ComputeEigenvectors::Yes, par, Default::default()));
    self_adjoint_evd(a, s.as_mut(), Some(u.as_mut()), par, MemStack::new(&mut mem), Default::default())
        .map_err(|e| NumericalError::EigenFailed(format!("{e:?}")))?;
    let vals = (0..n).map(|i| s[i]).collect();
    Ok((vals, u))
}

/// Lowest `count` eigenpairs of `h` by building and diagonalising its dense matrix.
/// Refuses up front (before allocating) when the matrices would not fit in memory.
pub fn lowest(h: &Hamiltonian, count: usize, par: Par) -> Result<(Vec<f64>, Mat<f64>)> {
    // Matrix, eigenvectors and workspace: about three N×N arrays.
    check_memory(
        "method",
        3 * h.dense_bytes(),
        "the dense path needs about three N×N float64 arrays; use method=\"iterative\" for the lowest states of a large grid",
    )?;
    if let crate::basis::BasisRef::Layered(l) = h.basis() {
        return l.problem().solve_dense(count, par);
    }
    let m = h.matrix();
    let (vals, u) = eigh(m.as_ref(), par)?;
    let v = u.subcols(0, count).to_owned();
    Ok((vals[..count].to_vec(), v))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn eigh_diagonalises_a_known_matrix() {
        // Tridiagonal (2, −1) matrix: eigenvalues 2 − 2cos(kπ/(n+1)) (Strang, Linear Algebra, §"second differences").
        let n = 10;
        let a = Mat::from_fn(n, n, |i, j| if i == j { 2.0 } else if i.abs_diff(j) == 1 { -1.0 } else { 0.0 });
        let (vals, _) = eigh(a.as_ref(), Par::Seq).unwrap();
        for (k, v) in vals.iter().enumerate() {
            let want = 2.0 - 2.0 * (((k + 1) as f64) * std::f64::consts::PI / (n as f64 + 1.0)).cos();
            assert!((v - want).abs() < 1e-13);
        }
    }
}
