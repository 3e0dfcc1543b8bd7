//! Small dense-matrix helpers shared by the bases, the Hamiltonian and the eigensolvers.

use faer::Mat;

pub mod banded;

/// Parallelism for a dense kernel of about `flops` floating-point operations:
/// sequential below 2·10⁷ (measured: rayon's fork/join then costs 50–100 µs, more
/// than a 200×210×20 product takes), faer's global setting above.
pub fn par_for(flops: usize) -> faer::Par {
    if flops < 20_000_000 {
        faer::Par::Seq
    } else {
        faer::get_global_parallelism()
    }
}

/// Replace a square matrix by (A + Aᵀ)/2: removes the rounding asymmetry of a
/// product that is symmetric in exact arithmetic (e.g. Φ·diag(V)·Φᵀ).
pub fn symmetrize(m: &mut Mat<f64>) {
    for i in 0..m.nrows() {
        for j in 0..i {
            let a = 0.5 * (m[(i, j)] + m[(j, i)]);
            m[(i, j)] = a;
            m[(j, i)] = a;
        }
    }
}
