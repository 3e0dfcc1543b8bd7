//! Full dense diagonalisation through faer's self-adjoint eigensolver
//! (tridiagonalisation + divide and conquer; level with LAPACK `syevd` here).

use crate::error::{check_memory, NumericalError, Result};
use crate::hamiltonian::Hamiltonian;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::evd::{self_adjoint_evd, self_adjoint_evd_scratch, ComputeEigenvectors, SelfAdjointEvdParams};
use faer::diag::Diag;
use faer::{Mat, MatRef, Par};

/// All eigenpairs of a real symmetric matrix (lower triangle read), ascending.
///
/// faer's divide-and-conquer path runs level with LAPACK but, measured here on
/// graded matrices (heterostructure Galerkin matrices, ‖A‖ ≈ 1e7), returned some
/// eigenvectors with residuals ~1e-6·‖A‖ instead of ~1e-15·‖A‖. Every result is
/// therefore checked with a cheap random probe, ‖(AV − VΛ)g‖ for two Gaussian g
/// (≈ ‖AV − VΛ‖_F, O(N²)), and recomputed with the QR-iteration path (about 2×
/// slower, always backward stable) when the probe exceeds 1e-11·√N·max|λ|.
pub fn eigh(a: MatRef<'_, f64>, par: Par) -> Result<(Vec<f64>, Mat<f64>)> {
    let (vals, u) = evd(a, par, None)?;
    if backward_error_probe(a, &vals, u.as_ref()) <= PROBE_TOL {
        return Ok((vals, u));
    }
    evd(a, par, Some(usize::MAX))
}

const PROBE_TOL: f64 = 1e-11;

/// Dense problems up to this size run sequentially.
const SEQUENTIAL_MAX: usize = 256;

/// Tridiagonal blocks below this size are solved by QR inside divide and conquer
/// (faer's default is 128; 48–64 measured 10–15 % faster at N = 1000 here).
const DC_RECURSION_THRESHOLD: usize = 64;

fn evd(a: MatRef<'_, f64>, par: Par, recursion_threshold: Option<usize>) -> Result<(Vec<f64>, Mat<f64>)> {
    let n = a.nrows();
    let mut u = Mat::<f64>::zeros(n, n);
    let mut s = Diag::<f64>::zeros(n);
    let mut params: SelfAdjointEvdParams = faer::Auto::<f64>::auto();
    params.recursion_threshold = recursion_threshold.unwrap_or(DC_RECURSION_THRESHOLD);
    let mut mem = MemBuffer::new(self_adjoint_evd_scratch::<f64>(n, ComputeEigenvectors::Yes, par, params.into()));
    self_adjoint_evd(a, s.as_mut(), Some(u.as_mut()), par, MemStack::new(&mut mem), params.into())
        .map_err(|e| NumericalError::EigenFailed(format!("{e:?}")))?;
    let vals = (0..n).map(|i| s[i]).collect();
    Ok((vals, u))
}

/// max over two Gaussian probes g of ‖A(Vg) − V(Λg)‖ / (√N · max|λ|), A read from its lower triangle.
fn backward_error_probe(a: MatRef<'_, f64>, vals: &[f64], u: MatRef<'_, f64>) -> f64 {
    let n = a.nrows();
    if n == 0 {
        return 0.0;
    }
    let scale = vals.iter().fold(0.0_f64, |m, v| m.max(v.abs())).max(f64::MIN_POSITIVE) * (n as f64).sqrt();
    let mut state = 0x9e37_79b9_7f4a_7c15_u64;
    // Columns 0, 1: g; columns 2, 3: Λg.
    let mut g = Mat::<f64>::zeros(n, 4);
    for c in 0..2 {
        for i in 0..n {
            let x = gaussian(&mut state);
            g[(i, c)] = x;
            g[(i, c + 2)] = vals[i] * x;
        }
    }
    let vg = u * &g;
    let avg = symmetric_lower_times(a, vg.as_ref().subcols(0, 2));
    let worst = (0..2)
        .map(|c| (0..n).map(|i| (avg[(i, c)] - vg[(i, c + 2)]).powi(2)).sum::<f64>().sqrt() / scale)
        .fold(0.0_f64, f64::max);
    if worst.is_finite() {
        worst
    } else {
        f64::INFINITY
    }
}

/// A·X for symmetric A given by its lower triangle (the upper one is not read):
/// tril(A)·X + strict_tril(A)ᵀ·X, two triangular matrix products.
pub fn symmetric_lower_times(a: MatRef<'_, f64>, x: MatRef<'_, f64>) -> Mat<f64> {
    use faer::linalg::matmul::triangular::{matmul, BlockStructure};
    let mut y = Mat::<f64>::zeros(a.nrows(), x.ncols());
    matmul(y.as_mut(), BlockStructure::Rectangular, faer::Accum::Replace, a, BlockStructure::TriangularLower, x, BlockStructure::Rectangular, 1.0, Par::Seq);
    matmul(y.as_mut(), BlockStructure::Rectangular, faer::Accum::Add, a.transpose(), BlockStructure::StrictTriangularUpper, x, BlockStructure::Rectangular, 1.0, Par::Seq);
    y
}

/// Standard normal deviate (SplitMix64 + Box-Muller); deterministic.
fn gaussian(state: &mut u64) -> f64 {
    let u1 = super::subset::uniform(state).max(f64::MIN_POSITIVE);
    let u2 = super::subset::uniform(state);
    (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
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
    // Below this size the fork/join of a parallel kernel costs more than it saves
    // (measured: N = 200 Hermite solve 1.6 ms sequential vs 1.9 ms on 2 threads).
    let par = if h.size() <= SEQUENTIAL_MAX { Par::Seq } else { par };
    if let Some(blocks) = h.parity_blocks() {
        return lowest_by_parity(&blocks, count, par);
    }
    let m = h.matrix();
    lowest_of_matrix(m.as_ref(), count, par)
}

/// Lowest `count` eigenpairs of a matrix given by its even and odd parity blocks
/// (rows/columns 0, 2, 4, … and 1, 3, 5, … of the full matrix): the lowest
/// eigenvalues of each block (as many as can be among the lowest `count` of the
/// union), vectors for those that are, scattered back to full vectors.
fn lowest_by_parity(blocks: &[Mat<f64>; 2], count: usize, par: Par) -> Result<(Vec<f64>, Mat<f64>)> {
    let n = blocks[0].nrows() + blocks[1].nrows();
    // (energy, parity, coefficients in the block)
    let mut pairs: Vec<(f64, usize, Vec<f64>)> = Vec::with_capacity(count);
    let wanted = |b: &Mat<f64>| count.min(b.nrows());
    let subset = blocks.iter().all(|b| b.nrows() >= 2 && wanted(b) * super::subset::MAX_FRACTION <= b.nrows());
    let reductions: Option<Vec<super::subset::Reduction>> =
        if subset { blocks.iter().map(|b| super::subset::Reduction::new(b.as_ref(), par)).collect() } else { None };
    let mut done = false;
    if let Some(red) = reductions {
        // Eigenvalues of both blocks first (cheap), then vectors only for the
        // `count` lowest of the union. Parities usually alternate up the spectrum,
        // so start with about half of `count` from each block and take more from a
        // block while its highest value so far is still among the lowest `count`.
        let mut k = [0, 1].map(|p| (count / 2 + 2).min(wanted(&blocks[p])));
        let vals: Vec<Vec<f64>> = loop {
            let vals: Vec<Vec<f64>> = (0..2).map(|p| red[p].lowest_values(k[p])).collect();
            let mut all: Vec<f64> = vals.iter().flatten().copied().collect();
            all.sort_by(f64::total_cmp);
            let threshold = all[count.min(all.len()) - 1];
            let more = [0, 1].map(|p| k[p] < wanted(&blocks[p]) && vals[p].last().is_some_and(|&v| v <= threshold));
            if !more.contains(&true) {
                break vals;
            }
            for p in 0..2 {
                if more[p] {
                    k[p] = (k[p] + count / 4 + 2).min(wanted(&blocks[p]));
                }
            }
        };
        let mut merged: Vec<(f64, usize)> = vals.iter().enumerate().flat_map(|(p, v)| v.iter().map(move |&e| (e, p))).collect();
        merged.sort_by(|a, b| a.0.total_cmp(&b.0));
        merged.truncate(count);
        let taken = [0, 1].map(|p| merged.iter().filter(|m| m.1 == p).count());
        done = true;
        for p in 0..2 {
            if taken[p] == 0 {
                continue;
            }
            match red[p].vectors(blocks[p].as_ref(), &vals[p][..taken[p]], par) {
                Some(v) => pairs.extend((0..taken[p]).map(|j| (vals[p][j], p, v.col(j).iter().copied().collect()))),
                None => done = false,
            }
        }
    }
    if !done {
        pairs.clear();
        for (parity, b) in blocks.iter().enumerate() {
            let k = wanted(b);
            if k == 0 {
                continue;
            }
            let (vals, v) = lowest_of_matrix(b.as_ref(), k, par)?;
            pairs.extend(vals.into_iter().enumerate().map(|(j, e)| (e, parity, v.col(j).iter().copied().collect())));
        }
    }
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
    pairs.truncate(count);
    let mut vectors = Mat::<f64>::zeros(n, count);
    for (j, (_, parity, v)) in pairs.iter().enumerate() {
        for (r, x) in v.iter().enumerate() {
            vectors[(2 * r + parity, j)] = *x;
        }
    }
    Ok((pairs.into_iter().map(|p| p.0).collect(), vectors))
}

/// Lowest `count` eigenpairs of a symmetric matrix (lower triangle read): the
/// verified subset solver ([`super::subset`]) when at most a quarter of the
/// spectrum is wanted, all pairs by [`eigh`] otherwise or when its check fails.
pub fn lowest_of_matrix(a: MatRef<'_, f64>, count: usize, par: Par) -> Result<(Vec<f64>, Mat<f64>)> {
    if count * super::subset::MAX_FRACTION <= a.nrows() {
        if let Some(pairs) = super::subset::lowest(a, count, par) {
            return Ok(pairs);
        }
    }
    let (vals, u) = eigh(a, par)?;
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
