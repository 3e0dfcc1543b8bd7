//! The Hamiltonian in a Gauss-Hermite function basis: kinetic energy exact in closed
//! form (−d²/dx² = p̂²/L² couples n to n and n ± 2), potential by Gauss-Hermite
//! quadrature (Φ diag(V) Φᵀ, more nodes than functions). Uniform mass only.

use super::{DiscreteProblem, Structure, SymmetryBlocks};
use crate::basis::{Basis, HermiteBasis};
use crate::linalg::lobpcg::Preconditioner;
use faer::{Mat, MatRef};
use std::sync::Arc;

/// Antisymmetric potential parts up to this many ε‖H‖ are dropped by
/// [`HermiteProblem::symmetry_blocks`] (below the backward error of a dense solve).
pub const PARITY_TOL: f64 = 4.0;

/// H = c·(−d²/dx²) + V on a [`HermiteBasis`], c = ħ²/2m.
pub struct HermiteProblem {
    basis: Arc<HermiteBasis>,
    potential: Vec<f64>,
    c: f64,
    mass: f64,
    /// ħ²/2m_e of the unit system (scale of the preconditioner's shift).
    hbar2_over_2me: f64,
}

impl HermiteProblem {
    /// `potential` at the quadrature nodes, `c` = ħ²/2m for the (uniform) `mass`.
    pub fn new(basis: Arc<HermiteBasis>, potential: Vec<f64>, c: f64, mass: f64, hbar2_over_2me: f64) -> Self {
        HermiteProblem { basis, potential, c, mass, hbar2_over_2me }
    }

    /// Diagonal of H: c(n + ½)/L² + Σ_k Φ_nk² V_k.
    fn diagonal(&self) -> Vec<f64> {
        let b = &self.basis;
        let c = self.c / (b.length() * b.length());
        let phi = b.phi();
        let v = &self.potential;
        (0..b.size()).map(|i| c * (i as f64 + 0.5) + (0..phi.ncols()).map(|k| phi[(i, k)] * phi[(i, k)] * v[k]).sum::<f64>()).collect()
    }
}

impl DiscreteProblem for HermiteProblem {
    fn dim(&self) -> usize {
        self.basis.size()
    }
    fn structure(&self) -> Structure {
        Structure { generalized: false, fast_apply: false }
    }
    fn apply_a(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        hermite_apply(&self.basis, self.c, &self.potential, x, y, ncols)
    }
    fn dense_a(&self) -> Mat<f64> {
        let b = &self.basis;
        let t = b.neg_laplacian();
        b.potential_matrix(&self.potential) + Mat::from_fn(t.nrows(), t.ncols(), |i, j| self.c * t[(i, j)])
    }
    /// Largest kinetic energy c(2N + 1)/L² plus max |V| at the nodes.
    fn norm_estimate(&self) -> f64 {
        let b = &self.basis;
        let vmax = self.potential.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        self.c * (2.0 * b.size() as f64 + 1.0) / (b.length() * b.length()) + vmax
    }
    /// c/L², the oscillator quantum of the basis' own length scale.
    fn energy_scale(&self) -> f64 {
        self.c / (self.basis.length() * self.basis.length())
    }
    /// Jacobi: P_j = 1/(|H_nn − E_j| + δ), δ = 10⁻³·(ħ²/2m_e)/L².
    fn preconditioner(&self) -> Option<Box<dyn Preconditioner + '_>> {
        let l = self.basis.length();
        Some(Box::new(DiagonalPreconditioner { diag: self.diagonal(), delta: 1e-3 / (l * l) * self.hbar2_over_2me }))
    }
    /// Even and odd parity blocks of the dense matrix (functions n = 0, 2, …
    /// and n = 1, 3, …) when `H` commutes with the reflection about the centre of
    /// a Hermite basis (uniform mass, potential symmetric at the nodes to within
    /// [`PARITY_TOL`]·ε‖H‖; see
    /// [`HermiteBasis::parity_potential_blocks`]); `None` otherwise.
    fn symmetry_blocks(&self) -> Option<SymmetryBlocks> {
        let (b, c) = (&self.basis, self.c);
        let (even, odd) = b.parity_potential_blocks(&self.potential, PARITY_TOL * f64::EPSILON * self.norm_estimate())?;
        // −d²/dx² = p̂²/L² couples n to n ± 2 only: tridiagonal in each block.
        let s = c / (b.length() * b.length());
        let add_kinetic = |mut v: Mat<f64>, parity: usize| {
            for r in 0..v.nrows() {
                let n = 2 * r + parity;
                v[(r, r)] += s * (n as f64 + 0.5);
                if r + 1 < v.nrows() {
                    let off = -0.5 * s * (((n + 1) * (n + 2)) as f64).sqrt();
                    v[(r + 1, r)] += off;
                    v[(r, r + 1)] += off;
                }
            }
            v
        };
        let (ne, no) = (even.nrows(), odd.nrows());
        Some(SymmetryBlocks {
            blocks: vec![add_kinetic(even, 0), add_kinetic(odd, 1)],
            indices: vec![(0..ne).map(|r| 2 * r).collect(), (0..no).map(|r| 2 * r + 1).collect()],
        })
    }

    /// Exact through x = center + L·ξ̂ with ⟨n+1|ξ̂|n⟩ = √((n+1)/2).
    fn position_matrix(&self, v: MatRef<'_, f64>) -> Mat<f64> {
        v.transpose() * hermite_x_times(&self.basis, v)
    }
    fn mean_masses(&self, v: MatRef<'_, f64>) -> Vec<f64> {
        vec![self.mass; v.ncols()]
    }
}

fn hermite_x_times(b: &HermiteBasis, v: MatRef<'_, f64>) -> Mat<f64> {
    let n = v.nrows();
    let (c, l) = (b.center(), b.length());
    Mat::from_fn(n, v.ncols(), |i, j| {
        let mut s = c * v[(i, j)];
        if i >= 1 {
            s += l * (i as f64 / 2.0).sqrt() * v[(i - 1, j)];
        }
        if i + 1 < n {
            s += l * ((i + 1) as f64 / 2.0).sqrt() * v[(i + 1, j)];
        }
        s
    })
}

/// y = (c·p̂²/L² + Φ diag(V) Φᵀ) x on a Hermite basis, O(N·M) per column.
fn hermite_apply(b: &HermiteBasis, c: f64, v: &[f64], x: &[f64], y: &mut [f64], ncols: usize) {
    let n = b.size();
    let c = c / (b.length() * b.length());
    let phi = b.phi();
    let xs = faer::MatRef::from_column_major_slice(&x[..n * ncols], n, ncols);
    // q = V ⊙ (Φᵀ x), then y = c·p̂² x + Φ q (two matrix products over the block).
    let mut q = b.nodal_values(xs);
    for j in 0..ncols {
        for (k, &vk) in v.iter().enumerate() {
            q[(k, j)] *= vk;
        }
    }
    let mut ys = faer::MatMut::from_column_major_slice_mut(&mut y[..n * ncols], n, ncols);
    for j in 0..ncols {
        for i in 0..n {
            // p̂² row i: diagonal i + ½, entries at i ± 2.
            let mut t = (i as f64 + 0.5) * xs[(i, j)];
            if i >= 2 {
                t -= 0.5 * (((i - 1) * i) as f64).sqrt() * xs[(i - 2, j)];
            }
            if i + 2 < n {
                t -= 0.5 * (((i + 1) * (i + 2)) as f64).sqrt() * xs[(i + 2, j)];
            }
            ys[(i, j)] = c * t;
        }
    }
    let par = crate::linalg::par_for(2 * n * phi.ncols() * ncols);
    faer::linalg::matmul::matmul(ys.as_mut(), faer::Accum::Add, phi, q.as_ref(), 1.0, par);
}

/// Jacobi preconditioner for a Hermite basis: P_j = 1/(|H_nn − E_j| + δ).
pub struct DiagonalPreconditioner {
    diag: Vec<f64>,
    delta: f64,
}

impl Preconditioner for DiagonalPreconditioner {
    fn precondition(&self, r: &mut [f64], ncols: usize, shifts: &[f64]) {
        let n = self.diag.len();
        for j in 0..ncols {
            for i in 0..n {
                r[j * n + i] /= (self.diag[i] - shifts[j]).abs() + self.delta;
            }
        }
    }
}

