//! Gauss-Hermite function basis.
//!
//! χ_n(x) = ψ_n(ξ)/sqrt(L), ξ = (x − center)/L, n = 0..N−1, where ψ_n are the
//! orthonormal Hermite functions ψ_n(ξ) = H_n(ξ) e^{−ξ²/2}/sqrt(2ⁿ n! √π)
//! (physicists' H_n). They are the harmonic-oscillator eigenfunctions for
//! ħ = m = 1 and ω = 1/L², so `length` is the oscillator length sqrt(ħ/mω).
//!
//! * Kinetic: −d²/dx² = (1/L²)·p̂² with p̂² exact and pentadiagonal in n
//!   (⟨n|p̂²|n⟩ = n + ½, ⟨n+2|p̂²|n⟩ = −½ sqrt((n+1)(n+2)), from the ladder operators).
//! * Potential: V_mn = Σ_k λ_k ψ_m(ξ_k) ψ_n(ξ_k) V(center + L ξ_k) with M > N
//!   Gauss-Hermite nodes ξ_k and scaled weights λ_k = w_k e^{ξ_k²}; exact when
//!   V is a polynomial of degree ≤ 2(M − N) + 1. Assembled as Φ·diag(V)·Φᵀ with
//!   Φ_nk = ψ_n(ξ_k) sqrt(λ_k) (a matrix product, O(N² M)).

use super::hermite_math::{gauss_hermite, hermite_function_table, hermite_functions};
use super::Basis;
use crate::error::{check_finite, InputError};
use faer::{Mat, MatRef};
use rayon::prelude::*;

/// Largest basis accepted (the dense N×M table Φ is kept in memory).
pub const MAX_SIZE: usize = 20_000;

/// Entries of Φ above which its columns are filled in parallel.
const PAR_MIN_TABLE: usize = 1 << 14;

/// Gauss-Hermite function basis with its quadrature table.
#[derive(Debug, Clone)]
pub struct HermiteBasis {
    size: usize,
    center: f64,
    length: f64,
    /// Quadrature nodes ξ_k (dimensionless), ascending.
    nodes: Vec<f64>,
    /// Quadrature points x_k = center + length·ξ_k.
    x: Vec<f64>,
    /// Φ (N × M): ψ_n(ξ_k)·sqrt(λ_k).
    phi: Mat<f64>,
}

impl HermiteBasis {
    /// `size` functions centred at `center` with oscillator length `length` and
    /// `quadrature` Gauss-Hermite nodes (`None`: 2·size). Requires 1 ≤ size ≤ 20000,
    /// size < quadrature ≤ 4·MAX_SIZE, finite center, finite length > 0.
    pub fn new(size: usize, center: f64, length: f64, quadrature: Option<usize>) -> Result<Self, InputError> {
        if !(1..=MAX_SIZE).contains(&size) {
            return Err(InputError::range("size", format!("an integer in [1, {MAX_SIZE}]"), size));
        }
        if !center.is_finite() {
            return Err(InputError::range("center", "a finite number", center));
        }
        if !(length.is_finite() && length > 0.0) {
            return Err(InputError::range("length", "a finite number > 0", length));
        }
        let m = quadrature.unwrap_or(2 * size);
        if m <= size || m > 4 * MAX_SIZE {
            return Err(InputError::range(
                "quadrature",
                format!("an integer in [{}, {}] (more nodes than functions)", size + 1, 4 * MAX_SIZE),
                m,
            ));
        }
        let gh = gauss_hermite(m);
        let nodes = gh.nodes;
        let x: Vec<f64> = nodes.iter().map(|&xi| center + length * xi).collect();
        // length ≤ f64::MAX can still overflow at the outer nodes (|ξ| up to ~√(2m)).
        if x.iter().any(|v| !v.is_finite()) {
            let xi_max = nodes.iter().fold(0.0_f64, |a, &b| a.max(b.abs()));
            return Err(InputError::range(
                "length",
                format!("a finite number > 0 with |center| + length·{xi_max:.3} finite (the outermost node)"),
                length,
            ));
        }
        // Column k of Φ: ψ_0..ψ_{N−1} at ξ_k times sqrt(λ_k); columns are independent
        // (in parallel only when the table is large enough to pay for the threads).
        let mut table = vec![0.0; size * m];
        let block = 64;
        let fill = |(c, cols): (usize, &mut [f64])| {
            let ks = c * block..(c * block + block).min(m);
            hermite_function_table(size, &nodes[ks.clone()], cols);
            for (k, col) in ks.zip(cols.chunks_mut(size)) {
                let s = gh.scaled_weights[k].sqrt();
                col.iter_mut().for_each(|v| *v *= s);
            }
        };
        if size * m >= PAR_MIN_TABLE {
            table.par_chunks_mut(size * block).enumerate().for_each(fill);
        } else {
            table.chunks_mut(size * block).enumerate().for_each(fill);
        }
        let phi = faer::MatRef::from_column_major_slice(&table, size, m).to_owned();
        Ok(HermiteBasis { size, center, length, nodes, x, phi })
    }

    pub fn center(&self) -> f64 {
        self.center
    }
    pub fn length(&self) -> f64 {
        self.length
    }
    pub fn quadrature(&self) -> usize {
        self.nodes.len()
    }
    /// Dimensionless quadrature nodes ξ_k.
    pub fn nodes(&self) -> &[f64] {
        &self.nodes
    }
    /// The quadrature table Φ (N × M), Φ_nk = ψ_n(ξ_k) sqrt(λ_k).
    pub fn phi(&self) -> MatRef<'_, f64> {
        self.phi.as_ref()
    }

    /// Φᵀ·C (M × k): the states with coefficient columns C at the quadrature
    /// nodes, ψ(x_k)·sqrt(λ_k L).
    pub fn nodal_values(&self, coefs: MatRef<'_, f64>) -> Mat<f64> {
        let mut out = Mat::<f64>::zeros(self.phi.ncols(), coefs.ncols());
        let par = crate::linalg::par_for(2 * self.phi.nrows() * self.phi.ncols() * coefs.ncols());
        faer::linalg::matmul::matmul(out.as_mut(), faer::Accum::Replace, self.phi.transpose(), coefs, 1.0, par);
        out
    }

    /// The N×N matrix of −d²/dx² = p̂²/L² (exact, pentadiagonal).
    pub fn neg_laplacian(&self) -> Mat<f64> {
        let s = 1.0 / (self.length * self.length);
        let p2 = HermiteBasis::p_squared(self.size);
        Mat::from_fn(self.size, self.size, |i, j| s * p2[(i, j)])
    }
    /// The N×N matrix of V, sampled on the quadrature points: Φ·diag(V)·Φᵀ.
    pub fn potential_matrix(&self, v: &[f64]) -> Mat<f64> {
        // Φ diag(V) Φᵀ: scale columns of Φ by V, then one GEMM.
        let scaled = Mat::from_fn(self.size, self.nodes.len(), |n, k| self.phi[(n, k)] * v[k]);
        let mut out = &scaled * self.phi.transpose();
        // Symmetrise against rounding in the product.
        crate::linalg::symmetrize(&mut out);
        out
    }

    /// Parity blocks of Φ·diag(V)·Φᵀ when V is mirror-symmetric about the
    /// centre: `(V_even, V_odd)` over the functions n = 0, 2, 4, … and
    /// n = 1, 3, 5, …, or `None` when V is not symmetric at the nodes.
    ///
    /// The nodes are mirror pairs ξ_k = −ξ_{M−1−k} and ψ_n(−ξ) = (−1)ⁿ ψ_n(ξ), so
    /// for a symmetric V the even-odd couplings vanish and each block is a sum
    /// over half the nodes (4× less work than the full product, and two half-size
    /// eigenproblems instead of one). The blocks use the symmetric part of V;
    /// "symmetric" means the antisymmetric part δ_k = (V_k − V_{M−1−k})/2 has
    /// max|δ_k| ≤ `tol`. Since ‖Φ‖₂ ≤ 1, the matrix dropped has 2-norm ≤ `tol`;
    /// callers pass a few ε‖H‖, the backward error any dense eigensolver makes
    /// anyway (rounding in sampling V, e.g. at center ± L·ξ, is then accepted).
    pub fn parity_potential_blocks(&self, v: &[f64], tol: f64) -> Option<(Mat<f64>, Mat<f64>)> {
        let m = self.nodes.len();
        let half = m / 2;
        for k in 0..half {
            let (a, b) = (v[k], v[m - 1 - k]);
            if self.nodes[k] != -self.nodes[m - 1 - k] || !(0.5 * (a - b).abs() <= tol) {
                return None;
            }
        }
        // Folded weights: node pairs count twice (the symmetric part of V), the
        // middle node (odd M, ξ = 0) once.
        let cols = m - half;
        let w = |k: usize| if k < half { v[k] + v[m - 1 - k] } else { v[k] };
        let block = |parity: usize| {
            let rows = (self.size + 1 - parity) / 2;
            let scaled = Mat::from_fn(rows, cols, |r, k| self.phi[(2 * r + parity, k)] * w(k));
            let plain = Mat::from_fn(rows, cols, |r, k| self.phi[(2 * r + parity, k)]);
            let mut out = Mat::<f64>::zeros(rows, rows);
            faer::linalg::matmul::matmul(out.as_mut(), faer::Accum::Replace, &scaled, plain.transpose(), 1.0, crate::linalg::par_for(2 * rows * rows * cols));
            crate::linalg::symmetrize(&mut out);
            out
        };
        Some((block(0), block(1)))
    }

    /// The matrix of the dimensionless p̂² = −d²/dξ² in the first N functions.
    pub fn p_squared(size: usize) -> Mat<f64> {
        Mat::from_fn(size, size, |i, j| {
            let (lo, hi) = if i <= j { (i, j) } else { (j, i) };
            if lo == hi {
                lo as f64 + 0.5
            } else if hi == lo + 2 {
                -0.5 * (((lo + 1) * (lo + 2)) as f64).sqrt()
            } else {
                0.0
            }
        })
    }
}

impl Basis for HermiteBasis {
    fn size(&self) -> usize {
        self.size
    }
    fn points(&self) -> &[f64] {
        &self.x
    }
    fn evaluate(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError> {
        check_finite("x", x)?;
        let n = self.size;
        let ncols = coefs.ncols();
        let scale = 1.0 / self.length.sqrt();
        let rows: Vec<Vec<f64>> = x
            .par_iter()
            .map_init(
                || vec![0.0; n],
                |funcs, &xi| {
                    hermite_functions(n, (xi - self.center) / self.length, funcs);
                    (0..ncols).map(|j| scale * (0..n).map(|i| funcs[i] * coefs[(i, j)]).sum::<f64>()).collect()
                },
            )
            .collect();
        Ok(Mat::from_fn(x.len(), ncols, |i, j| rows[i][j]))
    }
    fn sample_sign_profile(&self, coefs: MatRef<'_, f64>) -> Mat<f64> {
        // ψ(x_k)·sqrt(λ_k L): same sign as ψ at the nodes.
        self.nodal_values(coefs)
    }
    fn describe(&self) -> String {
        format!(
            "HermiteBasis(size={}, center={}, length={}, quadrature={})",
            self.size,
            self.center,
            self.length,
            self.nodes.len()
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn p_squared_matches_ladder_operators() {
        // p = i(a† − a)/√2 with a|n⟩ = √n|n−1⟩ (any QM text, e.g. Sakurai 2.3):
        // build p as a dense matrix in a larger space and square it.
        let n = 12;
        let big = n + 2;
        let mut p_re = vec![vec![0.0; big]; big]; // p = i·A with A real antisymmetric
        for m in 0..big - 1 {
            let s = ((m + 1) as f64).sqrt() / 2f64.sqrt();
            p_re[m + 1][m] = s; // a†
            p_re[m][m + 1] = -s; // −a
        }
        let p2 = HermiteBasis::p_squared(n);
        for i in 0..n {
            for j in 0..n {
                // p² = (iA)² = −A²
                let a2: f64 = (0..big).map(|l| p_re[i][l] * p_re[l][j]).sum();
                assert!((p2[(i, j)] + a2).abs() < 1e-13, "{i} {j}");
            }
        }
    }

    #[test]
    fn potential_matrix_of_xsquared_is_exact() {
        // ⟨m|ξ²|n⟩ = (2n+1)/2 on the diagonal, sqrt((n+1)(n+2))/2 two off (ladder operators).
        let b = HermiteBasis::new(30, 0.0, 1.0, None).unwrap();
        let v: Vec<f64> = b.points().iter().map(|x| x * x).collect();
        let m = b.potential_matrix(&v);
        for i in 0..30usize {
            for j in 0..30 {
                let want = if i == j {
                    i as f64 + 0.5
                } else if i.abs_diff(j) == 2 {
                    0.5 * (((i.min(j) + 1) * (i.min(j) + 2)) as f64).sqrt()
                } else {
                    0.0
                };
                assert!((m[(i, j)] - want).abs() < 1e-11, "{i} {j} {}", m[(i, j)]);
            }
        }
    }

    #[test]
    fn rejects_bad_arguments() {
        assert!(HermiteBasis::new(0, 0.0, 1.0, None).is_err());
        assert!(HermiteBasis::new(4, 0.0, -1.0, None).is_err());
        assert!(HermiteBasis::new(4, f64::INFINITY, 1.0, None).is_err());
        assert!(HermiteBasis::new(4, 0.0, 1.0, Some(4)).is_err());
        // finite length whose outer nodes overflow (found by tests/test_fuzz_inputs.py)
        let e = HermiteBasis::new(4, 0.0, 1e308, Some(13)).unwrap_err();
        assert!(e.to_string().contains("`length`"), "{e}");
    }
}
