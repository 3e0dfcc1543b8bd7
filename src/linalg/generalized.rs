//! The generalized symmetric-definite eigenproblem A x = λ B x (B symmetric positive
//! definite) by Cholesky reduction: B = L Lᵀ, C = L⁻¹ A L⁻ᵀ, C y = λ y, x = L⁻ᵀ y
//! (Golub & Van Loan 2013, §8.7.2). faer's `llt` and triangular solves throughout.

use crate::error::{NumericalError, Result};
use faer::linalg::triangular_solve::{solve_lower_triangular_in_place, solve_upper_triangular_in_place};
use faer::{Mat, MatRef, Par, Side};

/// The Cholesky factor L of B (lower triangle of `b` read).
pub fn cholesky(b: MatRef<'_, f64>) -> Result<Mat<f64>> {
    let llt = b.llt(Side::Lower).map_err(|e| NumericalError::EigenFailed(format!("Cholesky factorisation of B failed (is B positive definite?): {e:?}")))?;
    Ok(llt.L().to_owned())
}

/// C = L⁻¹ A L⁻ᵀ (symmetric) for the Cholesky factor `l` of B.
pub fn reduce(a: Mat<f64>, l: MatRef<'_, f64>, par: Par) -> Mat<f64> {
    let mut x = a;
    solve_lower_triangular_in_place(l, x.as_mut(), par); // L⁻¹A
    let mut c = x.transpose().to_owned();
    drop(x);
    solve_lower_triangular_in_place(l, c.as_mut(), par); // L⁻¹AL⁻ᵀ
    super::symmetrize(&mut c);
    c
}

/// x ← L⁻ᵀ x: eigenvectors of the reduced problem back to B-orthonormal ones.
pub fn back_transform(l: MatRef<'_, f64>, x: &mut Mat<f64>, par: Par) {
    solve_upper_triangular_in_place(l.transpose(), x.as_mut(), par);
}

/// Lowest `count` eigenpairs of the pencil (A, B): eigenvalues ascending and
/// B-orthonormal eigenvectors (xᵀ B x = 1) as columns.
pub fn lowest_generalized(a: Mat<f64>, b: MatRef<'_, f64>, count: usize, par: Par) -> Result<(Vec<f64>, Mat<f64>)> {
    let l = cholesky(b)?;
    let c = reduce(a, l.as_ref(), par);
    let (vals, mut v) = super::dense::lowest_of_matrix(c.as_ref(), count, par)?;
    back_transform(l.as_ref(), &mut v, par);
    Ok((vals, v))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn diagonal_pencil_and_b_orthonormality() {
        // A = tridiag(−1, 2, −1), B = diag(b): compare with the dense eigenvalues of
        // B^{-1/2} A B^{-1/2}, an independent reduction (B diagonal).
        let n = 30;
        let b: Vec<f64> = (0..n).map(|i| 1.0 + 0.5 * (i as f64 / 7.0).sin().abs()).collect();
        let a = Mat::from_fn(n, n, |i, j| if i == j { 2.0 } else if i.abs_diff(j) == 1 { -1.0 } else { 0.0 });
        let bm = Mat::from_fn(n, n, |i, j| if i == j { b[i] } else { 0.0 });
        let c = Mat::from_fn(n, n, |i, j| a[(i, j)] / (b[i] * b[j]).sqrt());
        let (want, _) = super::super::dense::eigh(c.as_ref(), Par::Seq).unwrap();
        let (vals, v) = lowest_generalized(a.clone(), bm.as_ref(), 5, Par::Seq).unwrap();
        for k in 0..5 {
            assert!((vals[k] - want[k]).abs() < 1e-13);
        }
        let g = v.transpose() * &bm * &v;
        for i in 0..5 {
            for j in 0..5 {
                assert!((g[(i, j)] - if i == j { 1.0 } else { 0.0 }).abs() < 1e-12);
            }
        }
    }

    #[test]
    fn indefinite_b_is_an_error() {
        let b = Mat::from_fn(2, 2, |i, j| if i == j { if i == 0 { 1.0 } else { -1.0 } } else { 0.0 });
        assert!(cholesky(b.as_ref()).is_err());
    }
}
