//! Full dense diagonalisation through faer's self-adjoint eigensolver
//! (tridiagonalisation + divide and conquer; level with LAPACK `syevd` here).

use crate::error::{NumericalError, Result};
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

/// `par` for a dense solve of dimension `n`: sequential up to 256, where the
/// fork/join of a parallel kernel costs more than it saves (measured: N = 200
/// Hermite solve 1.6 ms sequential vs 1.9 ms on 2 threads).
pub fn par_for_dim(n: usize, par: Par) -> Par {
    if n <= SEQUENTIAL_MAX {
        Par::Seq
    } else {
        par
    }
}

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
    let mut rng = super::rng::Rng::new(0x9e37_79b9_7f4a_7c15);
    // Columns 0, 1: g; columns 2, 3: Λg.
    let mut g = Mat::<f64>::zeros(n, 4);
    for c in 0..2 {
        for i in 0..n {
            let x = rng.normal();
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

/// Lowest `count` eigenpairs of a block-diagonal symmetric matrix given by its
/// blocks (each read from its lower triangle): the lowest eigenvalues of each block
/// (as many as can be among the lowest `count` of the union, found by bisection
/// where the subset solver applies), vectors only for those that are. Returns the
/// pairs ascending as (eigenvalue, block index, eigenvector within the block); the
/// caller scatters the block vectors into the full space.
pub fn lowest_of_blocks(blocks: &[Mat<f64>], count: usize, par: Par) -> Result<Vec<(f64, usize, Vec<f64>)>> {
    let nb = blocks.len();
    let mut pairs: Vec<(f64, usize, Vec<f64>)> = Vec::with_capacity(count);
    let wanted = |b: &Mat<f64>| count.min(b.nrows());
    let subset = blocks.iter().all(|b| b.nrows() >= 2 && wanted(b) * super::subset::MAX_FRACTION <= b.nrows());
    let reductions: Option<Vec<super::subset::Reduction>> =
        if subset { blocks.iter().map(|b| super::subset::Reduction::new(b.as_ref(), par)).collect() } else { None };
    let mut done = false;
    if let Some(red) = reductions {
        // Eigenvalues of every block first (cheap), then vectors only for the `count`
        // lowest of the union. Start with about count/nb + 2 values per block and take
        // more from a block while its highest value so far is still among the lowest.
        let mut k: Vec<usize> = blocks.iter().map(|b| (count / nb + 2).min(wanted(b))).collect();
        let vals: Vec<Vec<f64>> = loop {
            let vals: Vec<Vec<f64>> = (0..nb).map(|p| red[p].lowest_values(k[p])).collect();
            let mut all: Vec<f64> = vals.iter().flatten().copied().collect();
            all.sort_by(f64::total_cmp);
            let threshold = all[count.min(all.len()) - 1];
            let more: Vec<bool> = (0..nb).map(|p| k[p] < wanted(&blocks[p]) && vals[p].last().is_some_and(|&v| v <= threshold)).collect();
            if !more.contains(&true) {
                break vals;
            }
            for p in 0..nb {
                if more[p] {
                    k[p] = (k[p] + count / (2 * nb) + 2).min(wanted(&blocks[p]));
                }
            }
        };
        let mut merged: Vec<(f64, usize)> = vals.iter().enumerate().flat_map(|(p, v)| v.iter().map(move |&e| (e, p))).collect();
        merged.sort_by(|a, b| a.0.total_cmp(&b.0));
        merged.truncate(count);
        done = true;
        for p in 0..nb {
            let taken = merged.iter().filter(|m| m.1 == p).count();
            if taken == 0 {
                continue;
            }
            match red[p].vectors(blocks[p].as_ref(), &vals[p][..taken], par) {
                Some(v) => pairs.extend((0..taken).map(|j| (vals[p][j], p, v.col(j).iter().copied().collect()))),
                None => done = false,
            }
        }
    }
    if !done {
        pairs.clear();
        for (p, b) in blocks.iter().enumerate() {
            let k = wanted(b);
            if k == 0 {
                continue;
            }
            let (vals, v) = lowest_of_matrix(b.as_ref(), k, par)?;
            pairs.extend(vals.into_iter().enumerate().map(|(j, e)| (e, p, v.col(j).iter().copied().collect())));
        }
    }
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
    pairs.truncate(count);
    Ok(pairs)
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
