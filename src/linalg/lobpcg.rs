//! Matrix-free block eigensolver for the lowest eigenpairs of a real symmetric
//! operator `A`, or of the generalized problem `A x = λ B x` with `B` symmetric
//! positive definite.
//!
//! # Method
//! LOBPCG (locally optimal block preconditioned conjugate gradient, Knyazev 2001)
//! with the numerically robust basis handling of Hetmaniuk & Lehoucq (2006,
//! "Basis selection in LOBPCG") and the SVQB orthonormalisation of
//! Stathopoulos & Wu (2002):
//!
//! * The block holds `m = count + block_extra` vectors; the extra ("guard")
//!   vectors are iterated but not required to converge, which keeps the last
//!   wanted states well separated from the rest of the spectrum.
//! * The Rayleigh-Ritz basis is `S = [X, P, W]`: Ritz vectors `X`, previous
//!   search directions `P`, and preconditioned residuals `W`. `W` is
//!   B-orthogonalised against `[X, P]` (the projection is repeated when it
//!   cancelled more than two digits, "twice is enough") and B-orthonormalised
//!   with SVQB, dropping numerically dependent directions.
//!   `P` is built in coefficient space so that it is B-orthonormal and
//!   B-orthogonal to the new `X`. The full Gram matrix `SᵀBS` (≈ I) is still
//!   formed each step and the small projected problem is Cholesky-reduced, so
//!   round-off never accumulates in the orthonormality of `X`; if that Cholesky
//!   factorisation is ill-conditioned the step falls back to `[X, W]`, then to a
//!   re-orthonormalised `X` (restart).
//! * Soft locking: a wanted column whose relative residual is below `tol` keeps
//!   its place in the Rayleigh-Ritz basis but gets no new `W`/`P` direction.
//!   Residuals are re-evaluated every step, so a locked vector whose residual
//!   grows again is re-activated automatically.
//! * `A X`, `B X` are updated implicitly (as linear combinations); before
//!   declaring convergence (and before reporting non-convergence) they are
//!   recomputed explicitly, so the returned residuals are true residuals.
//! * The start block is seeded pseudo-random ([`super::rng`]), so every
//!   symmetry sector is represented; `initial` columns give a warm start and are
//!   topped up with random columns.
//!
//! # Memory
//! Three (two without `B`) column-major buffers of `dim × 3m` doubles, for `S`,
//! `A S` and `B S`; every update is done in place in row chunks. Small dense
//! work is `O(m²)`–`O(m³)`. See [`lobpcg_workspace_bytes`].

use crate::error::{check_finite, check_memory, check_positive, Error, InputError, NumericalError, Result};
use faer::linalg::matmul::matmul;
use faer::prelude::{Reborrow, ReborrowMut};
use faer::{Accum, Mat, MatMut, MatRef, Par, Side};
use std::borrow::Cow;
use rayon::prelude::*;

/// A real symmetric linear operator applied to column-major blocks of vectors.
pub trait SymmetricOperator: Sync {
    /// Dimension `n` of the space the operator acts on.
    fn dim(&self) -> usize;
    /// `y[:, j] = A x[:, j]` for `j < ncols`. Column-major blocks: column `j`
    /// is `x[j*dim..(j+1)*dim]`; `x.len() == y.len() == dim * ncols`.
    fn apply(&self, x: &[f64], y: &mut [f64], ncols: usize);
}

/// A symmetric positive definite preconditioner.
pub trait Preconditioner: Sync {
    /// In place: `r[:, j] <- P_j r[:, j]`, where `P_j` approximates
    /// `(A - shifts[j] B)^{-1}` and is SPD. `shifts.len() == ncols`.
    fn precondition(&self, r: &mut [f64], ncols: usize, shifts: &[f64]);
}

/// Options of [`lobpcg`].
#[derive(Debug, Clone, PartialEq)]
pub struct IterativeOptions {
    /// Number of wanted (lowest) eigenpairs, `>= 1`.
    pub count: usize,
    /// Convergence tolerance on `‖Ax − λBx‖ / max(1, |λ|)` with `‖x‖_B = 1`.
    pub tol: f64,
    /// Maximum number of LOBPCG steps (Rayleigh-Ritz updates), `>= 1`.
    pub max_iter: usize,
    /// Seed of the random start block.
    pub seed: u64,
    /// Optional warm start: `dim * k` values, `k` column-major vectors; `k`
    /// may differ from `count` (extra columns beyond the block are ignored,
    /// missing ones are filled with random vectors).
    pub initial: Option<Vec<f64>>,
    /// Extra guard vectors iterated along with the wanted ones.
    pub block_extra: usize,
    /// Return the best estimates as `Ok` (with their true residuals, some above `tol`)
    /// instead of [`NumericalError::NotConverged`] when the iteration stops short of
    /// `tol`: for callers that use the result as a start for another solve.
    pub accept_unconverged: bool,
}

impl IterativeOptions {
    /// Defaults: `tol = 1e-8`, `max_iter = 500`, `seed = 0`, no warm start,
    /// `block_extra = max(2, count / 4)`, unconverged results are errors.
    pub fn new(count: usize) -> Self {
        IterativeOptions {
            count,
            tol: 1e-8,
            max_iter: 500,
            seed: 0,
            initial: None,
            block_extra: default_block_extra(count),
            accept_unconverged: false,
        }
    }
}

/// Default number of guard vectors for `count` wanted states: `max(2, count / 4)`.
pub fn default_block_extra(count: usize) -> usize {
    (count / 4).max(2)
}

/// Result of [`lobpcg`].
#[derive(Debug, Clone, PartialEq)]
pub struct IterativeResult {
    /// The `count` lowest eigenvalues, ascending.
    pub energies: Vec<f64>,
    /// `dim * count` column-major, B-orthonormal eigenvectors (signs arbitrary:
    /// the caller applies its sign convention).
    pub vectors: Vec<f64>,
    /// True relative residuals `‖Ax − λBx‖ / max(1, |λ|)`, `‖x‖_B = 1`.
    pub residuals: Vec<f64>,
    /// Number of LOBPCG steps taken.
    pub iterations: usize,
    /// `dim * block_extra` column-major guard vectors (the Ritz vectors above the
    /// wanted ones, not held to the tolerance): with `vectors`, a warm start for a
    /// nearby problem whose guard columns are not random.
    pub guards: Vec<f64>,
}

/// Upper bound of the bytes [`lobpcg`] allocates at once for a problem of
/// dimension `dim`: the `S`, `AS` (and `BS`) work buffers of
/// `dim × 3(count + block_extra)` doubles (the returned vectors reuse the
/// `S` buffer), plus row-chunk and small dense temporaries. Excludes what
/// the operator and preconditioner allocate themselves.
pub fn lobpcg_workspace_bytes(dim: usize, count: usize, block_extra: usize, generalized: bool) -> u64 {
    let m = (count as u64).saturating_add(block_extra as u64);
    let nbuf: u64 = if generalized { 3 } else { 2 };
    // S, AS (and BS) with 3m columns each, plus the best iterate's m columns.
    let work = (3 * nbuf + 1).saturating_mul(dim as u64).saturating_mul(8).saturating_mul(m);
    let threads = rayon::current_num_threads() as u64;
    let chunks = threads.saturating_mul(CHUNK as u64 * 3 * 8).saturating_mul(m);
    let small = (3 * m).saturating_mul(3 * m).saturating_mul(70 * 2 * 8);
    work.saturating_add(chunks).saturating_add(small)
}

// ---------------------------------------------------------------------------
// Tunables

/// Row count above which tall-skinny kernels run in parallel (rayon).
const PAR_DIM: usize = 32768;
/// Rows per chunk of the tall-skinny kernels.
const CHUNK: usize = 4096;
/// SVQB drops directions whose scaled Gram eigenvalue is below this fraction of the largest.
const SVQB_DROP: f64 = 1e-12;
/// A projected direction is dropped when its B-norm shrank below this fraction.
const PROJ_DROP: f64 = 1e-10;
/// Largest deviation of XᵀBX from I tolerated before X is re-orthonormalised.
const ORTH_TOL: f64 = 1e-10;
/// Steps between explicit recomputations of AX and BX.
const REFRESH_EVERY: usize = 25;
/// The best iterate is replaced when the largest wanted residual drops below this fraction of its.
const IMPROVEMENT: f64 = 0.5;
/// Steps without such an improvement that count as a stall.
const STALL_ITERS: usize = 100;
/// Residuals this far above the best count as divergence.
const DIVERGE_FACTOR: f64 = 1e3;
/// Restarts from the best iterate before a stall ends the iteration.
const MAX_RESTARTS: usize = 2;

fn fill_random(col: &mut [f64], seed: u64, stream: u64) {
    super::rng::Rng::stream(seed, stream).fill_symmetric(col);
}

// ---------------------------------------------------------------------------
// Tall-skinny kernels on column-major buffers

#[inline]
fn view(buf: &[f64], dim: usize, c0: usize, c1: usize) -> MatRef<'_, f64> {
    MatRef::from_column_major_slice(&buf[c0 * dim..c1 * dim], dim, c1 - c0)
}

#[inline]
fn view_mut(buf: &mut [f64], dim: usize, c0: usize, c1: usize) -> MatMut<'_, f64> {
    MatMut::from_column_major_slice_mut(&mut buf[c0 * dim..c1 * dim], dim, c1 - c0)
}

/// `aᵀ b` for tall-skinny `a` (n × ka), `b` (n × kb).
fn gram(a: MatRef<'_, f64>, b: MatRef<'_, f64>) -> Mat<f64> {
    gram_multi(a, &[b]).pop().expect("one product")
}

/// `[aᵀ b_0, aᵀ b_1, ...]` in one pass over the rows of `a` (each row chunk
/// of `a` is reused from cache). Parallel over a fixed partition of the rows
/// for large `n`, summed in a fixed order (results do not depend on the
/// number of threads).
fn gram_multi(a: MatRef<'_, f64>, bs: &[MatRef<'_, f64>]) -> Vec<Mat<f64>> {
    let (n, ka) = (a.nrows(), a.ncols());
    let zeros = || bs.iter().map(|b| Mat::<f64>::zeros(ka, b.ncols())).collect::<Vec<_>>();
    if ka == 0 || n == 0 || bs.iter().all(|b| b.ncols() == 0) {
        return zeros();
    }
    // rows [r0, r1) accumulated into `acc`
    let rows = |r0: usize, r1: usize, acc: &mut Vec<Mat<f64>>| {
        let mut r = r0;
        while r < r1 {
            let len = CHUNK.min(r1 - r);
            let ac = a.subrows(r, len).transpose();
            for (g, b) in acc.iter_mut().zip(bs) {
                if b.ncols() > 0 {
                    matmul(g.as_mut(), Accum::Add, ac, b.subrows(r, len), 1.0, Par::Seq);
                }
            }
            r += len;
        }
    };
    let mut out = zeros();
    if n < PAR_DIM {
        rows(0, n, &mut out);
        return out;
    }
    const GROUPS: usize = 64;
    let per = n.div_ceil(GROUPS).div_ceil(CHUNK) * CHUNK;
    let ngroups = n.div_ceil(per);
    let parts: Vec<Vec<Mat<f64>>> = (0..ngroups)
        .into_par_iter()
        .map(|gi| {
            let mut acc = zeros();
            rows(gi * per, ((gi + 1) * per).min(n), &mut acc);
            acc
        })
        .collect();
    for part in &parts {
        for (o, p) in out.iter_mut().zip(part) {
            for j in 0..o.ncols() {
                for i in 0..o.nrows() {
                    o[(i, j)] += p[(i, j)];
                }
            }
        }
    }
    out
}

/// `dst -= lhs · c` (dst n × k, lhs n × q, c q × k).
fn sub_mul(dst: MatMut<'_, f64>, lhs: MatRef<'_, f64>, c: MatRef<'_, f64>) {
    let n = dst.nrows();
    if dst.ncols() == 0 || lhs.ncols() == 0 {
        return;
    }
    if n < PAR_DIM {
        matmul(dst, Accum::Add, lhs, c, -1.0, Par::Seq);
    } else {
        dst.par_row_chunks_mut(CHUNK).enumerate().for_each(|(i, blk)| {
            let r0 = i * CHUNK;
            let len = blk.nrows();
            matmul(blk, Accum::Add, lhs.subrows(r0, len), c, -1.0, Par::Seq);
        });
    }
}

/// In place: columns `[c0, c0+kin)` of `buf` ← (those columns) · `coef`
/// (`kin × kout`, `kout <= kin`); the result occupies columns `[c0, c0+kout)`.
fn transform_in_place(buf: &mut [f64], dim: usize, c0: usize, kin: usize, coef: MatRef<'_, f64>) {
    let kout = coef.ncols();
    debug_assert!(kout <= kin && coef.nrows() == kin);
    if kin == 0 {
        return;
    }
    let mat = view_mut(buf, dim, c0, c0 + kin);
    let work = |blk: MatMut<'_, f64>, tmp: &mut Mat<f64>| {
        let len = blk.nrows();
        let mut t = tmp.as_mut().subrows_mut(0, len);
        matmul(t.rb_mut(), Accum::Replace, blk.rb(), coef, 1.0, Par::Seq);
        blk.subcols_mut(0, kout).copy_from(t.rb());
    };
    if dim < PAR_DIM {
        let mut tmp = Mat::<f64>::zeros(CHUNK.min(dim), kout);
        let mut mat = mat;
        let mut r0 = 0;
        while r0 < dim {
            let len = CHUNK.min(dim - r0);
            work(mat.rb_mut().subrows_mut(r0, len), &mut tmp);
            r0 += len;
        }
    } else {
        mat.par_row_chunks_mut(CHUNK).for_each_init(|| Mat::<f64>::zeros(CHUNK, kout), |tmp, blk| work(blk, tmp));
    }
}

// ---------------------------------------------------------------------------
// Small dense helpers

use super::symmetrize;

fn all_finite(h: &Mat<f64>) -> bool {
    (0..h.ncols()).all(|j| (0..h.nrows()).all(|i| h[(i, j)].is_finite()))
}

/// Cholesky `g = L Lᵀ` (faer); `None` if a pivot is not safely positive
/// (`L_ii² < 1e-8 · g_ii`), i.e. the basis is (nearly) dependent.
fn cholesky(g: &Mat<f64>) -> Option<Mat<f64>> {
    let l = g.llt(Side::Lower).ok()?.L().to_owned();
    (0..g.nrows()).all(|j| l[(j, j)] * l[(j, j)] >= 1e-8 * g[(j, j)].abs()).then_some(l)
}

/// Dense symmetric eigendecomposition (ascending) via faer.
fn sym_eig(h: &Mat<f64>) -> Result<(Vec<f64>, Mat<f64>)> {
    let n = h.nrows();
    if n == 0 {
        return Ok((Vec::new(), Mat::zeros(0, 0)));
    }
    if !all_finite(h) {
        return Err(NumericalError::EigenFailed("the operator or preconditioner produced NaN or inf".into()).into());
    }
    let evd = h
        .self_adjoint_eigen(Side::Lower)
        .map_err(|e| Error::from(NumericalError::EigenFailed(format!("projected eigenproblem: {e:?}"))))?;
    let s = evd.S().column_vector();
    let vals: Vec<f64> = (0..n).map(|i| s[i]).collect();
    let u = evd.U();
    let vecs = Mat::<f64>::from_fn(n, n, |i, j| u[(i, j)]);
    Ok((vals, vecs))
}

/// Rayleigh-Ritz for the pencil `(h, g)` with `g` SPD (≈ I here). Returns
/// ascending Ritz values and `g`-orthonormal coefficient vectors, or `None`
/// when `g` is not safely positive definite.
fn rayleigh_ritz(h: &Mat<f64>, g: &Mat<f64>) -> Result<Option<(Vec<f64>, Mat<f64>)>> {
    if !all_finite(h) || !all_finite(g) {
        return Err(NumericalError::EigenFailed("the operator or preconditioner produced NaN or inf".into()).into());
    }
    let l = match cholesky(g) {
        Some(l) => l,
        None => return Ok(None),
    };
    let hs = super::generalized::reduce(h.clone(), l.as_ref(), Par::Seq);
    let (vals, mut z) = sym_eig(&hs)?;
    super::generalized::back_transform(l.as_ref(), &mut z, Par::Seq);
    Ok(Some((vals, z)))
}

/// SVQB (Stathopoulos & Wu 2002): given the Gram matrix `g` (k × k) of a block
/// `V`, returns `T` (k × r) such that `V T` is orthonormal, dropping directions
/// whose scaled Gram eigenvalue is below `SVQB_DROP · max`, and the columns
/// flagged in `dropped`.
fn svqb(g: &Mat<f64>, dropped: &[bool]) -> Result<Mat<f64>> {
    let k = g.nrows();
    let d: Vec<f64> = (0..k)
        .map(|i| {
            let gi = g[(i, i)];
            if dropped.get(i).copied().unwrap_or(false) || !gi.is_finite() || gi <= 0.0 {
                0.0
            } else {
                1.0 / gi.sqrt()
            }
        })
        .collect();
    let mut gs = Mat::<f64>::from_fn(k, k, |i, j| d[i] * g[(i, j)] * d[j]);
    symmetrize(&mut gs);
    let (theta, v) = sym_eig(&gs)?;
    let tmax = theta.iter().cloned().fold(0.0_f64, f64::max);
    let keep: Vec<usize> = (0..k).filter(|&i| tmax > 0.0 && theta[i] > SVQB_DROP * tmax).collect();
    Ok(Mat::<f64>::from_fn(k, keep.len(), |i, c| d[i] * v[(i, keep[c])] / theta[keep[c]].sqrt()))
}

// ---------------------------------------------------------------------------
// Solver state

struct Work<'a> {
    a: &'a dyn SymmetricOperator,
    b: Option<&'a dyn SymmetricOperator>,
    dim: usize,
    m: usize,
    seed: u64,
    /// Random stream counter for top-up columns.
    stream: u64,
    /// S = [X (m) | P (np) | W (nw)], capacity 3m columns each.
    s: Vec<f64>,
    as_: Vec<f64>,
    bs: Option<Vec<f64>>,
    np: usize,
    lambda: Vec<f64>,
}

impl Work<'_> {
    /// Buffer holding `B S` (the `S` buffer itself when `B = I`).
    fn bbuf(&self) -> &[f64] {
        self.bs.as_deref().unwrap_or(&self.s)
    }

    /// Writes the residuals `AX − BX Λ` of all `m` block columns into the
    /// `W` slot (columns `m + np ..`) and returns their relative norms.
    fn residuals_into_w(&mut self) -> Vec<f64> {
        let (dim, m) = (self.dim, self.m);
        let w0 = m + self.np;
        let (left, right) = self.s.split_at_mut(w0 * dim);
        let bx: &[f64] = match self.bs.as_deref() {
            Some(bs) => bs,
            None => left,
        };
        let ax = &self.as_;
        let lam = &self.lambda;
        let one = |(j, col): (usize, &mut [f64])| -> f64 {
            let (a, b) = (&ax[j * dim..(j + 1) * dim], &bx[j * dim..(j + 1) * dim]);
            let l = lam[j];
            let mut s = 0.0;
            for ((r, a), b) in col.iter_mut().zip(a).zip(b) {
                let v = a - l * b;
                *r = v;
                s += v * v;
            }
            s.sqrt() / l.abs().max(1.0)
        };
        let cols = &mut right[..m * dim];
        if dim < PAR_DIM {
            cols.chunks_mut(dim).enumerate().map(one).collect()
        } else {
            cols.par_chunks_mut(dim).enumerate().map(one).collect()
        }
    }

    /// B-orthonormalise `X` (SVQB, topping up lost columns with random ones),
    /// recompute `AX`, `BX` explicitly and do Rayleigh-Ritz on `X`.
    /// Returns true if columns had to be replaced (then `P` is discarded).
    fn rebuild_x(&mut self) -> Result<bool> {
        let (dim, m) = (self.dim, self.m);
        let mut replaced = false;
        for attempt in 0..8 {
            if let Some(b) = self.b {
                let bs = self.bs.as_mut().expect("B buffer");
                b.apply(&self.s[..m * dim], &mut bs[..m * dim], m);
            }
            let g = gram(view(&self.s, dim, 0, m), view(self.bbuf(), dim, 0, m));
            let dev = max_dev_from_identity(&g);
            if dev < 1e-12 {
                break;
            }
            let t = svqb(&g, &[])?;
            let r = t.ncols();
            transform_in_place(&mut self.s, dim, 0, m, t.as_ref());
            if let Some(bs) = self.bs.as_mut() {
                transform_in_place(bs, dim, 0, m, t.as_ref());
            }
            if r < m {
                if attempt == 7 {
                    return Err(NumericalError::EigenFailed(format!(
                        "could not build {m} B-orthonormal block vectors (is B positive definite?)"
                    ))
                    .into());
                }
                replaced = true;
                for j in r..m {
                    self.stream += 1;
                    fill_random(&mut self.s[j * dim..(j + 1) * dim], self.seed, self.stream);
                }
            }
        }
        self.a.apply(&self.s[..m * dim], &mut self.as_[..m * dim], m);
        let h = gram(view(&self.s, dim, 0, m), view(&self.as_, dim, 0, m));
        let g = gram(view(&self.s, dim, 0, m), view(self.bbuf(), dim, 0, m));
        let mut h = h;
        let mut g = g;
        symmetrize(&mut h);
        symmetrize(&mut g);
        let (theta, y) = match rayleigh_ritz(&h, &g)? {
            Some(r) => r,
            None => {
                return Err(NumericalError::EigenFailed("start block lost B-orthonormality".into()).into());
            }
        };
        transform_in_place(&mut self.s, dim, 0, m, y.as_ref());
        transform_in_place(&mut self.as_, dim, 0, m, y.as_ref());
        if let Some(bs) = self.bs.as_mut() {
            transform_in_place(bs, dim, 0, m, y.as_ref());
        }
        self.lambda = theta[..m].to_vec();
        if replaced {
            self.np = 0;
        }
        Ok(replaced)
    }

    /// B-orthonormalise the `nw` columns of `W` (at column `w0 = m + np`)
    /// against `[X, P]` and among themselves; `BW` must be current.
    ///
    /// One pass forms `F = [X P W]ᵀ B W` (projection coefficients `C` and
    /// `WᵀBW` together), projects `W -= [X P] C`, and uses
    /// `WᵀBW − CᵀC` as the Gram matrix of the projected block for SVQB. When
    /// a column lost more than two digits of its norm in the projection, the
    /// pass is repeated on the projected block ("twice is enough") so that
    /// neither cancellation nor a single classical projection limits the
    /// accuracy. Columns whose norm falls below `PROJ_DROP` of the original
    /// lie in span[X, P] and are dropped. Returns the number of columns kept.
    fn orthonormalize_w(&mut self, mut nw: usize) -> Result<usize> {
        let dim = self.dim;
        let w0 = self.m + self.np;
        if nw == 0 {
            return Ok(0);
        }
        let mut norms0: Vec<f64> = Vec::new();
        for pass in 0..3 {
            let f = gram(view(&self.s, dim, 0, w0 + nw), view(self.bbuf(), dim, w0, w0 + nw));
            let c = f.as_ref().subrows(0, w0).to_owned();
            let mut gw = f.as_ref().subrows(w0, nw).to_owned();
            symmetrize(&mut gw);
            if pass == 0 {
                norms0 = (0..nw).map(|j| gw[(j, j)]).collect();
            }
            let mut g = &gw - c.transpose() * &c;
            symmetrize(&mut g);
            let cancel = (0..nw).any(|j| g[(j, j)] < 1e-4 * gw[(j, j)]);
            if w0 > 0 {
                {
                    let (left, right) = self.s.split_at_mut(w0 * dim);
                    sub_mul(view_mut(right, dim, 0, nw), view(left, dim, 0, w0), c.as_ref());
                }
                if let Some(bs) = self.bs.as_mut() {
                    let (left, right) = bs.split_at_mut(w0 * dim);
                    sub_mul(view_mut(right, dim, 0, nw), view(left, dim, 0, w0), c.as_ref());
                }
            }
            if cancel && pass < 2 {
                // The projection cancelled digits: the implicitly updated BW carries the
                // round-off of the large terms that cancelled (relative error ~ε·‖BW₀‖/‖BW‖),
                // so recompute it before the next pass (B = I needs nothing).
                if let (Some(b), Some(bs)) = (self.b, self.bs.as_mut()) {
                    b.apply(&self.s[w0 * dim..(w0 + nw) * dim], &mut bs[w0 * dim..(w0 + nw) * dim], nw);
                }
                continue;
            }
            let dropped: Vec<bool> = (0..nw).map(|j| g[(j, j)].is_nan() || g[(j, j)] <= PROJ_DROP * PROJ_DROP * norms0[j]).collect();
            let t = svqb(&g, &dropped)?;
            transform_in_place(&mut self.s, dim, w0, nw, t.as_ref());
            nw = t.ncols();
            // BW explicitly: SVQB scales nearly dependent directions up (by as much as
            // SVQB_DROP^-1/2), and with them any round-off an implicit update of BW
            // would carry; measured on BenDaniel-Duke pencils, that error grew ~3× per
            // step and broke the B-orthonormality of the whole basis.
            if let (Some(b), Some(bs)) = (self.b, self.bs.as_mut()) {
                b.apply(&self.s[w0 * dim..(w0 + nw) * dim], &mut bs[w0 * dim..(w0 + nw) * dim], nw);
            }
            break;
        }
        Ok(nw)
    }
}

/// The best iterate seen: the block X (all m columns, so guards restart too), its Ritz
/// values and true residuals, and the step it was reached at.
struct Best {
    x: Vec<f64>,
    lambda: Vec<f64>,
    res: Vec<f64>,
    score: f64,
    iter: usize,
}

impl Best {
    fn new(dim: usize, m: usize, count: usize) -> Self {
        Best { x: vec![0.0; dim * m], lambda: vec![0.0; count], res: vec![f64::INFINITY; count], score: f64::INFINITY, iter: 0 }
    }
    fn save(&mut self, w: &Work<'_>, res: &[f64], iter: usize) {
        let n = self.x.len();
        self.x.copy_from_slice(&w.s[..n]);
        let count = self.lambda.len();
        self.lambda.copy_from_slice(&w.lambda[..count]);
        self.res.copy_from_slice(&res[..count]);
        self.score = (0..count).map(|j| res[j] * w.lambda[j].abs().max(1.0)).fold(0.0_f64, f64::max);
        self.iter = iter;
    }
    fn restore(&self, w: &mut Work<'_>) {
        if self.score.is_finite() {
            w.s[..self.x.len()].copy_from_slice(&self.x);
        }
    }
}

fn max_dev_from_identity(g: &Mat<f64>) -> f64 {
    let n = g.nrows();
    let mut dev = 0.0_f64;
    for j in 0..n {
        for i in 0..n {
            dev = dev.max((g[(i, j)] - if i == j { 1.0 } else { 0.0 }).abs());
        }
    }
    dev
}

/// Select rows and columns `idx` of a square matrix.
fn select(h: &Mat<f64>, idx: &[usize]) -> Mat<f64> {
    Mat::<f64>::from_fn(idx.len(), idx.len(), |i, j| h[(idx[i], idx[j])])
}

fn validate(
    a: &dyn SymmetricOperator,
    b: Option<&dyn SymmetricOperator>,
    opts: &IterativeOptions,
    initial: Option<&[f64]>,
) -> std::result::Result<(), InputError> {
    let dim = a.dim();
    if let Some(b) = b {
        if b.dim() != dim {
            return Err(InputError::Length { argument: "b".into(), expected: dim, got: b.dim() });
        }
    }
    let extra = opts.block_extra;
    if opts.count == 0 || opts.count.saturating_add(extra) > dim {
        let hi = dim.saturating_sub(extra);
        let expected = if hi >= 1 {
            format!("an integer in [1, {hi}] (dim = {dim} minus block_extra = {extra} guard vectors)")
        } else {
            format!("an integer in [1, dim - block_extra], which is empty for dim = {dim}, block_extra = {extra}; lower block_extra")
        };
        return Err(InputError::range("count", expected, opts.count));
    }
    check_positive("tol", opts.tol)?;
    if opts.max_iter == 0 {
        return Err(InputError::range("max_iter", "an integer >= 1", opts.max_iter));
    }
    if let Some(init) = initial {
        if init.len() % dim != 0 {
            return Err(InputError::range(
                "initial",
                format!("a column-major block whose length is a multiple of dim = {dim}"),
                format!("length {}", init.len()),
            ));
        }
        check_finite("initial", init)?;
    }
    Ok(())
}

/// Lowest `opts.count` eigenpairs of `A x = λ B x` (`B = I` when `b` is `None`)
/// by LOBPCG; see the module documentation.
///
/// Errors: [`InputError`] for invalid options (naming the argument and the
/// allowed range) or a request exceeding available memory;
/// [`NumericalError::NotConverged`] with the best estimates when `max_iter`
/// steps do not bring all wanted residuals below `tol`;
/// [`NumericalError::EigenFailed`] if the operator produces non-finite values.
pub fn lobpcg(
    a: &dyn SymmetricOperator,
    b: Option<&dyn SymmetricOperator>,
    precond: Option<&dyn Preconditioner>,
    opts: &IterativeOptions,
) -> Result<IterativeResult> {
    lobpcg_impl(a, b, precond, opts, opts.initial.as_deref().map(Cow::Borrowed))
}

/// [`lobpcg`] with the warm start `start` (replacing `opts.initial`) taken by value:
/// it is freed as soon as it has been copied into the work buffer, so a large start
/// block does not stay alive next to the workspace.
pub fn lobpcg_with_start(
    a: &dyn SymmetricOperator,
    b: Option<&dyn SymmetricOperator>,
    precond: Option<&dyn Preconditioner>,
    opts: &IterativeOptions,
    start: Vec<f64>,
) -> Result<IterativeResult> {
    lobpcg_impl(a, b, precond, opts, Some(Cow::Owned(start)))
}

fn lobpcg_impl(
    a: &dyn SymmetricOperator,
    b: Option<&dyn SymmetricOperator>,
    precond: Option<&dyn Preconditioner>,
    opts: &IterativeOptions,
    initial: Option<Cow<'_, [f64]>>,
) -> Result<IterativeResult> {
    validate(a, b, opts, initial.as_deref())?;
    let dim = a.dim();
    let count = opts.count;
    let m = count + opts.block_extra;
    check_memory(
        "count",
        lobpcg_workspace_bytes(dim, count, opts.block_extra, b.is_some()),
        "lower `count`/`block_extra` or the grid size",
    )?;
    let cap = 3 * m;
    let mut w = Work {
        a,
        b,
        dim,
        m,
        seed: opts.seed,
        stream: 0,
        s: vec![0.0; dim * cap],
        as_: vec![0.0; dim * cap],
        bs: b.map(|_| vec![0.0; dim * cap]),
        np: 0,
        lambda: vec![0.0; m],
    };
    // start block: warm-start columns, then random ones
    let k0 = initial.as_ref().map_or(0, |v| (v.len() / dim).min(m));
    if let Some(init) = initial {
        w.s[..k0 * dim].copy_from_slice(&init[..k0 * dim]);
    }
    for j in k0..m {
        w.stream += 1;
        fill_random(&mut w.s[j * dim..(j + 1) * dim], opts.seed, w.stream);
    }
    w.rebuild_x()?;

    let mut iter = 0usize;
    let mut fresh = true; // AX, BX recomputed explicitly since the last update
    let mut since_refresh = 0usize;
    let mut best = Best::new(dim, m, count);
    let mut stalls = 0usize;
    loop {
        let res = w.residuals_into_w();
        // Progress is judged on absolute residuals: relative ones change scale with the
        // Ritz values themselves, which fall by orders of magnitude from a random start.
        let score = (0..count).map(|j| res[j] * w.lambda[j].abs().max(1.0)).fold(0.0_f64, f64::max);
        let converged: Vec<bool> = (0..m).map(|j| j < count && res[j] <= opts.tol).collect();
        let done = converged[..count].iter().all(|&c| c);
        // (a converged iterate is returned at once: no copy needed)
        if !done && fresh && score.is_finite() && score < IMPROVEMENT * best.score {
            best.save(&w, &res, iter);
        }
        // Stagnation (no halving of the best residual for STALL_ITERS steps) or divergence
        // (residuals far above the best, or not finite), judged on explicit products:
        // restart from the best iterate with fresh directions, up to MAX_RESTARTS
        // times; the next stall ends the iteration.
        let diverged = !score.is_finite() || score > DIVERGE_FACTOR * best.score;
        let stalled = iter >= best.iter + STALL_ITERS;
        if !done && fresh && (diverged || stalled) && iter < opts.max_iter && stalls < MAX_RESTARTS {
            stalls += 1;
            best.restore(&mut w);
            w.np = 0;
            w.rebuild_x()?;
            best.iter = iter;
            since_refresh = 0;
            continue;
        }
        let give_up = stalls >= MAX_RESTARTS && (diverged || stalled);
        if done || iter >= opts.max_iter || give_up {
            if !fresh {
                w.rebuild_x()?;
                fresh = true;
                since_refresh = 0;
                continue;
            }
            if done {
                // hand back the X block of S without a copy (the buffer shrinks in place)
                let energies = w.lambda[..count].to_vec();
                let guards = w.s[count * dim..m * dim].to_vec();
                drop(w.as_);
                drop(w.bs);
                let mut vectors = w.s;
                vectors.truncate(count * dim);
                vectors.shrink_to_fit();
                return Ok(IterativeResult {
                    energies,
                    vectors,
                    residuals: res[..count].to_vec(),
                    iterations: iter,
                    guards,
                });
            }
            // Not converged: report the last iterate, or the best one seen when the last
            // has drifted well above it (true residuals either way).
            let use_best = score > 10.0 * best.score;
            let (energies, residuals) = if use_best {
                (best.lambda.clone(), best.res.clone())
            } else {
                (w.lambda[..count].to_vec(), res[..count].to_vec())
            };
            if opts.accept_unconverged {
                let x = if use_best { &best.x[..] } else { &w.s[..m * dim] };
                return Ok(IterativeResult {
                    energies,
                    vectors: x[..count * dim].to_vec(),
                    residuals,
                    iterations: iter,
                    guards: x[count * dim..m * dim].to_vec(),
                });
            }
            return Err(NumericalError::NotConverged { iterations: iter, tol: opts.tol, energies, residuals }.into());
        }
        // AX and BX are updated implicitly; recompute them explicitly now and then so
        // that round-off in the updates cannot accumulate.
        if since_refresh >= REFRESH_EVERY {
            w.rebuild_x()?;
            fresh = true;
            since_refresh = 0;
            continue;
        }
        iter += 1;
        since_refresh += 1;
        fresh = false;

        // ---- W = preconditioned residuals of the active columns
        let active: Vec<usize> = (0..m).filter(|&j| !converged[j]).collect();
        let nw0 = active.len();
        let w0 = m + w.np;
        // keep the residuals of the active columns, packed at the front of the W slot
        for (i, &j) in active.iter().enumerate() {
            if i != j {
                w.s.copy_within((w0 + j) * dim..(w0 + j + 1) * dim, (w0 + i) * dim);
            }
        }
        if let (Some(p), true) = (precond, nw0 > 0) {
            let shifts: Vec<f64> = active.iter().map(|&j| w.lambda[j]).collect();
            p.precondition(&mut w.s[w0 * dim..(w0 + nw0) * dim], nw0, &shifts);
        }
        if let (Some(b), true) = (b, nw0 > 0) {
            let bs = w.bs.as_mut().expect("B buffer");
            b.apply(&w.s[w0 * dim..(w0 + nw0) * dim], &mut bs[w0 * dim..(w0 + nw0) * dim], nw0);
        }
        let nw = w.orthonormalize_w(nw0)?;
        if nw > 0 {
            a.apply(&w.s[w0 * dim..(w0 + nw) * dim], &mut w.as_[w0 * dim..(w0 + nw) * dim], nw);
        }

        // ---- Rayleigh-Ritz on S = [X P W]
        let np = w.np;
        let ns = m + np + nw;
        let mut hg = gram_multi(view(&w.s, dim, 0, ns), &[view(&w.as_, dim, 0, ns), view(w.bbuf(), dim, 0, ns)]);
        let mut g = hg.pop().expect("G");
        let mut h = hg.pop().expect("H");
        symmetrize(&mut h);
        symmetrize(&mut g);
        // X must stay B-orthonormal: when round-off in the implicit updates has eroded
        // it, re-orthonormalise X explicitly and restart the search directions.
        if max_dev_from_identity(&select(&g, &(0..m).collect::<Vec<_>>())) > ORTH_TOL {
            w.np = 0;
            w.rebuild_x()?;
            fresh = true;
            since_refresh = 0;
            continue;
        }
        // try [X P W], then [X W], then [X]
        let all: Vec<usize> = (0..ns).collect();
        let xw: Vec<usize> = (0..m).chain(m + np..ns).collect();
        let xo: Vec<usize> = (0..m).collect();
        let mut sol = None;
        let mut tried = usize::MAX;
        for idx in [&all, &xw, &xo] {
            if idx.len() == tried {
                continue;
            }
            tried = idx.len();
            if let Some((theta, yr)) = rayleigh_ritz(&select(&h, idx), &select(&g, idx))? {
                // expand coefficients to the full basis
                let mut y = Mat::<f64>::zeros(ns, idx.len());
                for c in 0..idx.len() {
                    for (r, &i) in idx.iter().enumerate() {
                        y[(i, c)] = yr[(r, c)];
                    }
                }
                sol = Some((theta, y));
                break;
            }
        }
        let (theta, y) = match sol {
            Some(s) => s,
            None => {
                // X itself lost B-orthonormality: restart from it without P
                w.np = 0;
                w.rebuild_x()?;
                fresh = true;
                continue;
            }
        };
        let nr = y.ncols();
        // ---- new P: Ritz coefficients of active columns with X rows zeroed,
        // G-orthogonalised against the new X coefficients, then G-orthonormalised
        let ym = y.as_ref().subcols(0, m);
        let mut z0 = Mat::<f64>::from_fn(ns, nw0, |i, c| if i < m { 0.0 } else { y[(i, active[c])] });
        let gnorm = |z: &Mat<f64>| -> Vec<f64> {
            let gz = &g * z;
            (0..z.ncols()).map(|c| (0..ns).map(|i| z[(i, c)] * gz[(i, c)]).sum::<f64>()).collect()
        };
        let zn0 = gnorm(&z0);
        if nr > m {
            for _ in 0..2 {
                let gz = &g * &z0;
                let proj = ym.transpose() * &gz;
                z0 = &z0 - ym * &proj;
            }
        }
        let z = if nr > m && ns > m {
            let mut gzz = z0.transpose() * (&g * &z0);
            symmetrize(&mut gzz);
            // columns that vanished after projection carry no new direction
            let dropped: Vec<bool> = (0..nw0).map(|c| gzz[(c, c)].is_nan() || gzz[(c, c)] <= PROJ_DROP * PROJ_DROP * zn0[c]).collect();
            let t = svqb(&gzz, &dropped)?;
            &z0 * &t
        } else {
            Mat::<f64>::zeros(ns, 0)
        };
        let npn = z.ncols().min(ns - m);
        let coef = Mat::<f64>::from_fn(ns, m + npn, |i, c| if c < m { y[(i, c)] } else { z[(i, c - m)] });
        transform_in_place(&mut w.s, dim, 0, ns, coef.as_ref());
        transform_in_place(&mut w.as_, dim, 0, ns, coef.as_ref());
        if let Some(bs) = w.bs.as_mut() {
            transform_in_place(bs, dim, 0, ns, coef.as_ref());
        }
        w.np = npn;
        w.lambda = theta[..m].to_vec();
    }
}

#[cfg(test)]
#[allow(clippy::needless_range_loop)]
mod tests {
    use super::*;
    use rustfft::num_complex::Complex;
    use rustfft::{Fft, FftPlanner};
    use std::sync::Arc;
    use std::time::Instant;

    // -----------------------------------------------------------------------
    // Test operators

    /// Periodic Fourier grid on [-L/2, L/2) with `n` points (spectral
    /// collocation: derivatives are exact on the band-limited plane waves).
    struct Grid {
        n: usize,
        x: Vec<f64>,
        half_k2: Vec<f64>,
        fwd: Arc<dyn Fft<f64>>,
        inv: Arc<dyn Fft<f64>>,
    }

    impl Grid {
        fn new(n: usize, l: f64) -> Self {
            let dx = l / n as f64;
            let x = (0..n).map(|i| -0.5 * l + i as f64 * dx).collect();
            let half_k2 = (0..n)
                .map(|j| {
                    let jj = if j <= n / 2 { j as f64 } else { j as f64 - n as f64 };
                    let k = 2.0 * std::f64::consts::PI / l * jj;
                    0.5 * k * k
                })
                .collect();
            let mut planner = FftPlanner::new();
            Grid { n, x, half_k2, fwd: planner.plan_fft_forward(n), inv: planner.plan_fft_inverse(n) }
        }

        /// out[:, c] = F^{-1} diag(mult(c, k)) F inp[:, c] for real, even
        /// multipliers; two real columns share one complex FFT.
        fn multiply<F: Fn(usize, usize) -> f64 + Sync>(&self, inp: &[f64], out: &mut [f64], ncols: usize, mult: F) {
            let n = self.n;
            assert_eq!(inp.len(), n * ncols);
            let scratch_len = self.fwd.get_inplace_scratch_len().max(self.inv.get_inplace_scratch_len());
            let zero = Complex::new(0.0, 0.0);
            out.par_chunks_mut(2 * n).zip(inp.par_chunks(2 * n)).enumerate().for_each_init(
                || (vec![zero; n], vec![zero; n], vec![zero; scratch_len]),
                |(buf, y, scratch), (p, (o, x))| {
                    let two = x.len() == 2 * n;
                    if two {
                        for i in 0..n {
                            buf[i] = Complex::new(x[i], x[n + i]);
                        }
                    } else {
                        for i in 0..n {
                            buf[i] = Complex::new(x[i], 0.0);
                        }
                    }
                    self.fwd.process_with_scratch(buf, scratch);
                    let inv_n = 0.5 / n as f64;
                    // split the spectra of the two real columns, scale, recombine
                    for k in 0..n {
                        let xk = buf[k];
                        let xm = buf[if k == 0 { 0 } else { n - k }].conj();
                        let m1 = mult(2 * p, k) * inv_n;
                        let m2 = if two { mult(2 * p + 1, k) * inv_n } else { 0.0 };
                        y[k] = (xk + xm) * m1 + (xk - xm) * m2;
                    }
                    self.inv.process_with_scratch(y, scratch);
                    if two {
                        let (o1, o2) = o.split_at_mut(n);
                        for i in 0..n {
                            o1[i] = y[i].re;
                            o2[i] = y[i].im;
                        }
                    } else {
                        for i in 0..n {
                            o[i] = y[i].re;
                        }
                    }
                },
            );
        }
    }

    /// H = -1/2 d^2/dx^2 + V(x) on a periodic Fourier grid, applied by FFT.
    struct GridOperator {
        grid: Grid,
        v: Vec<f64>,
    }

    impl GridOperator {
        fn new(n: usize, l: f64, v: impl Fn(f64) -> f64) -> Self {
            let grid = Grid::new(n, l);
            let v = grid.x.iter().map(|&x| v(x)).collect();
            GridOperator { grid, v }
        }
        fn dense(&self) -> Mat<f64> {
            dense_of(self)
        }
    }

    impl SymmetricOperator for GridOperator {
        fn dim(&self) -> usize {
            self.grid.n
        }
        fn apply(&self, x: &[f64], y: &mut [f64], ncols: usize) {
            let hk = &self.grid.half_k2;
            self.grid.multiply(x, y, ncols, |_, k| hk[k]);
            let n = self.grid.n;
            y.par_chunks_mut(n).zip(x.par_chunks(n)).for_each(|(yc, xc)| {
                for i in 0..n {
                    yc[i] += self.v[i] * xc[i];
                }
            });
        }
    }

    /// Kinetic-energy preconditioner of plane-wave codes:
    /// P_j = F^{-1} diag(1 / (k^2/2 + |shift_j| + c)) F. It is SPD for any
    /// shift, inverts the kinetic part exactly at high k (where T dominates and
    /// the condition number of H comes from), and is a damped identity at low k.
    struct KineticPrecond<'a> {
        grid: &'a Grid,
        c: f64,
    }

    impl Preconditioner for KineticPrecond<'_> {
        fn precondition(&self, r: &mut [f64], ncols: usize, shifts: &[f64]) {
            let inp = r.to_vec();
            let hk = &self.grid.half_k2;
            let c = self.c;
            self.grid.multiply(&inp, r, ncols, |col, k| 1.0 / (hk[k] + shifts[col].abs() + c));
        }
    }

    /// Diagonal operator.
    struct Diag(Vec<f64>);

    impl SymmetricOperator for Diag {
        fn dim(&self) -> usize {
            self.0.len()
        }
        fn apply(&self, x: &[f64], y: &mut [f64], ncols: usize) {
            let n = self.0.len();
            for c in 0..ncols {
                for i in 0..n {
                    y[c * n + i] = self.0[i] * x[c * n + i];
                }
            }
        }
    }

    /// Dense matrix of an operator, built column by column from unit vectors.
    fn dense_of(op: &dyn SymmetricOperator) -> Mat<f64> {
        let n = op.dim();
        let mut e = vec![0.0; n * n];
        for j in 0..n {
            e[j * n + j] = 1.0;
        }
        let mut y = vec![0.0; n * n];
        op.apply(&e, &mut y, n);
        let mut h = Mat::<f64>::from_fn(n, n, |i, j| y[j * n + i]);
        symmetrize(&mut h);
        h
    }

    fn dense_eigvals(h: &Mat<f64>) -> Vec<f64> {
        sym_eig(h).unwrap().0
    }

    fn opts(count: usize, tol: f64) -> IterativeOptions {
        IterativeOptions { tol, max_iter: 1000, ..IterativeOptions::new(count) }
    }

    /// Checks B-orthonormality of the returned vectors and recomputes residuals.
    fn check_result(a: &dyn SymmetricOperator, b: Option<&dyn SymmetricOperator>, r: &IterativeResult, tol: f64) {
        let n = a.dim();
        let k = r.energies.len();
        let mut ax = vec![0.0; n * k];
        a.apply(&r.vectors, &mut ax, k);
        let bx = match b {
            Some(b) => {
                let mut bx = vec![0.0; n * k];
                b.apply(&r.vectors, &mut bx, k);
                bx
            }
            None => r.vectors.clone(),
        };
        let g = gram(view(&r.vectors, n, 0, k), view(&bx, n, 0, k));
        assert!(max_dev_from_identity(&g) < 1e-10, "not B-orthonormal: {}", max_dev_from_identity(&g));
        for j in 0..k {
            let l = r.energies[j];
            let res: f64 =
                (0..n).map(|i| (ax[j * n + i] - l * bx[j * n + i]).powi(2)).sum::<f64>().sqrt() / l.abs().max(1.0);
            assert!(res <= 1.5 * tol, "residual {j}: {res:e} > tol {tol:e}");
            assert!((res - r.residuals[j]).abs() <= 0.05 * tol, "reported residual {j}: {:e} vs {res:e}", r.residuals[j]);
        }
        for w in r.energies.windows(2) {
            assert!(w[0] <= w[1], "energies not ascending");
        }
    }

    fn harmonic(n: usize, l: f64, cap: f64, count: usize, c: f64) -> (IterativeResult, f64) {
        let h = GridOperator::new(n, l, |x| 0.5 * x.abs().min(cap).powi(2));
        let p = KineticPrecond { grid: &h.grid, c };
        let t = Instant::now();
        let r = lobpcg(&h, None, Some(&p), &opts(count, 1e-10)).unwrap();
        let secs = t.elapsed().as_secs_f64();
        check_result(&h, None, &r, 1e-10);
        for (i, e) in r.energies.iter().enumerate() {
            let exact = i as f64 + 0.5;
            assert!((e - exact).abs() < 1e-9, "E_{i} = {e}, exact {exact}, diff {:e}", e - exact);
        }
        (r, secs)
    }

    // Textbook harmonic oscillator V = x^2/2 (hbar = m = omega = 1): E_n = n + 1/2.
    // Box [-20, 20): the n < 10 states are below e^-150 at the edge, and the
    // Fourier grid (dx ~ 0.01) resolves them spectrally.
    #[test]
    fn harmonic_oscillator_4096() {
        let (r, secs) = harmonic(4096, 40.0, f64::INFINITY, 10, 20.0);
        println!("HO dim 4096 count 10: {} iterations, {:.3} s", r.iterations, secs);
    }

    // Textbook harmonic oscillator, E_n = n + 1/2, on a big box (L = 840,
    // dx = 0.0128). V = x^2/2 for |x| <= 20 and V = 200 beyond: the wanted
    // states are below e^-150 there, so E_n is unchanged in double precision,
    // while the bounded potential keeps the kinetic preconditioner effective
    // (an unbounded x^2/2 on this box reaches 88000, where a kinetic
    // preconditioner needs thousands of steps). A finer grid on [-20, 20)
    // instead would put ||T|| ~ 1e7 and the round-off floor of the FFT above
    // tol = 1e-10.
    #[test]
    fn harmonic_oscillator_65536() {
        let (r, secs) = harmonic(65536, 840.0, 20.0, 5, 50.0);
        println!("HO dim 65536 count 5: {} iterations, {:.3} s", r.iterations, secs);
    }

    // Poschl & Teller (1933); Landau-Lifshitz QM §23, problem 4 (sech^-2 well):
    // V = -lambda(lambda+1)/2 sech^2 x has E_n = -(lambda - n)^2 / 2 for n < lambda.
    #[test]
    fn poschl_teller_lambda_4() {
        let lam = 4.0_f64;
        let h = GridOperator::new(1024, 60.0, |x| -0.5 * lam * (lam + 1.0) / x.cosh().powi(2));
        let p = KineticPrecond { grid: &h.grid, c: 5.0 };
        let r = lobpcg(&h, None, Some(&p), &opts(4, 1e-10)).unwrap();
        check_result(&h, None, &r, 1e-10);
        for (n, e) in r.energies.iter().enumerate() {
            let exact = -0.5 * (lam - n as f64).powi(2);
            assert!((e - exact).abs() < 1e-9, "E_{n} = {e}, exact {exact}");
        }
        println!("Poschl-Teller: {} iterations", r.iterations);
    }

    /// Quartic double well h (1 - (x/d)^2)^2 with barrier h = 18, minima at +-3:
    /// the lowest tunnelling pairs are split by ~1e-9 .. 1e-5.
    fn double_well(n: usize) -> GridOperator {
        GridOperator::new(n, 16.0, |x| 18.0 * (1.0 - (x / 3.0).powi(2)).powi(2))
    }

    // Near-degenerate pairs (symmetric double well) against a dense
    // diagonalisation (faer) of the same operator: no state missed, none doubled.
    #[test]
    fn double_well_matches_dense() {
        let h = double_well(512);
        let dense = dense_eigvals(&h.dense());
        let split0 = dense[1] - dense[0];
        assert!(split0 < 1e-8 && split0 > 0.0, "test needs a splitting <= 1e-8, got {split0:e}");
        println!("double well splittings: {:e} {:e} {:e}", dense[1] - dense[0], dense[3] - dense[2], dense[5] - dense[4]);
        let p = KineticPrecond { grid: &h.grid, c: 10.0 };
        for (seed, precond) in [(0u64, true), (1, true), (2, false), (12345, true)] {
            let o = IterativeOptions { seed, ..opts(6, 1e-10) };
            let pre: Option<&dyn Preconditioner> = if precond { Some(&p) } else { None };
            let r = lobpcg(&h, None, pre, &o).unwrap();
            check_result(&h, None, &r, 1e-10);
            for j in 0..6 {
                assert!((r.energies[j] - dense[j]).abs() < 1e-9, "seed {seed}: E_{j} {} vs dense {}", r.energies[j], dense[j]);
            }
            // each dense eigenvector of a pair lies in the computed subspace
            let evd = h.dense().self_adjoint_eigen(Side::Lower).unwrap();
            let u = evd.U();
            for j in 0..6 {
                let w: f64 = (0..6)
                    .map(|c| (0..512).map(|i| u[(i, j)] * r.vectors[c * 512 + i]).sum::<f64>().powi(2))
                    .sum();
                assert!((w - 1.0).abs() < 1e-8, "seed {seed}: dense state {j} captured only {w}");
            }
            println!("double well seed {seed} precond {precond}: {} iterations, splitting {split0:e}", r.iterations);
        }
    }

    // The wanted/guard boundary inside a near-degenerate pair (count = 1, 3)
    // must still give the dense answer.
    #[test]
    fn double_well_count_splits_pair() {
        let h = double_well(256);
        let dense = dense_eigvals(&h.dense());
        let p = KineticPrecond { grid: &h.grid, c: 10.0 };
        for count in [1, 3] {
            let r = lobpcg(&h, None, Some(&p), &opts(count, 1e-10)).unwrap();
            check_result(&h, None, &r, 1e-10);
            for j in 0..count {
                assert!((r.energies[j] - dense[j]).abs() < 1e-9, "count {count}: E_{j} {} vs {}", r.energies[j], dense[j]);
            }
        }
    }

    // Small spaces where the basis [X P W] would exceed dim: dependent
    // directions must be dropped, results match dense.
    #[test]
    fn block_comparable_to_dim() {
        for (n, count, extra) in [(64usize, 30usize, 2usize), (16, 10, 3), (8, 6, 2), (4, 1, 3)] {
            let h = double_well(n);
            let dense = dense_eigvals(&h.dense());
            let r = lobpcg(&h, None, None, &IterativeOptions { block_extra: extra, ..opts(count, 1e-10) }).unwrap();
            check_result(&h, None, &r, 1e-10);
            for j in 0..count {
                assert!((r.energies[j] - dense[j]).abs() < 1e-9 * dense[j].abs().max(1.0), "n {n}: E_{j} {} vs {}", r.energies[j], dense[j]);
            }
        }
    }

    // Degenerate warm start (the same vector repeated, and zero columns) is
    // repaired with random columns.
    #[test]
    fn degenerate_warm_start() {
        let h = double_well(256);
        let dense = dense_eigvals(&h.dense());
        let p = KineticPrecond { grid: &h.grid, c: 10.0 };
        let v: Vec<f64> = h.grid.x.iter().map(|x| (-x * x).exp()).collect();
        let mut init = Vec::new();
        for _ in 0..6 {
            init.extend_from_slice(&v);
        }
        init.extend(std::iter::repeat_n(0.0, 2 * 256));
        let r = lobpcg(&h, None, Some(&p), &IterativeOptions { initial: Some(init), ..opts(6, 1e-10) }).unwrap();
        check_result(&h, None, &r, 1e-10);
        for j in 0..6 {
            assert!((r.energies[j] - dense[j]).abs() < 1e-9);
        }
    }

    // The same seed gives bit-identical results.
    #[test]
    fn deterministic() {
        let h = double_well(256);
        let p = KineticPrecond { grid: &h.grid, c: 10.0 };
        let r1 = lobpcg(&h, None, Some(&p), &opts(4, 1e-9)).unwrap();
        let r2 = lobpcg(&h, None, Some(&p), &opts(4, 1e-9)).unwrap();
        assert_eq!(r1, r2);
    }

    // Exact degeneracy: free particle on a ring of length L = 2 pi:
    // E = k^2/2 for k = 0, +-1, +-2 (textbook), i.e. 0, 1/2, 1/2, 2, 2.
    #[test]
    fn free_particle_exact_degeneracy() {
        let h = GridOperator::new(256, 2.0 * std::f64::consts::PI, |_| 0.0);
        let p = KineticPrecond { grid: &h.grid, c: 1.0 };
        let r = lobpcg(&h, None, Some(&p), &opts(5, 1e-11)).unwrap();
        check_result(&h, None, &r, 1e-11);
        for (e, exact) in r.energies.iter().zip([0.0, 0.5, 0.5, 2.0, 2.0]) {
            assert!((e - exact).abs() < 1e-10, "{e} vs {exact}");
        }
    }

    // Generalized A x = lambda B x, B diagonal SPD, against a dense solution
    // of the reduced C = B^-1/2 A B^-1/2 (B diagonal: an independent reduction).
    #[test]
    fn generalized_matches_dense() {
        let n = 256;
        let h = double_well(n);
        let bdiag: Vec<f64> = h.grid.x.iter().map(|&x| 1.0 + 0.5 * (0.7 * x).cos().powi(2) + 0.1 * x.sin()).collect();
        let b = Diag(bdiag.clone());
        let a = h.dense();
        let mut c = Mat::<f64>::from_fn(n, n, |i, j| a[(i, j)] / (bdiag[i] * bdiag[j]).sqrt());
        symmetrize(&mut c);
        let dense = dense_eigvals(&c);
        let p = KineticPrecond { grid: &h.grid, c: 10.0 };
        let r = lobpcg(&h, Some(&b), Some(&p), &opts(6, 1e-10)).unwrap();
        check_result(&h, Some(&b), &r, 1e-10);
        for j in 0..6 {
            assert!((r.energies[j] - dense[j]).abs() < 1e-9, "E_{j} {} vs dense {}", r.energies[j], dense[j]);
        }
        // also without preconditioner
        let r2 = lobpcg(&h, Some(&b), None, &opts(6, 1e-10)).unwrap();
        for j in 0..6 {
            assert!((r2.energies[j] - dense[j]).abs() < 1e-9);
        }
        println!("generalized: {} iterations (no precond: {})", r.iterations, r2.iterations);
    }

    // Error contract: max_iter too small gives NotConverged with the best estimates.
    #[test]
    fn not_converged_reports_estimates() {
        let h = double_well(256);
        let p = KineticPrecond { grid: &h.grid, c: 10.0 };
        let o = IterativeOptions { max_iter: 3, ..opts(4, 1e-12) };
        match lobpcg(&h, None, Some(&p), &o) {
            Err(Error::Numerical(NumericalError::NotConverged { iterations, tol, energies, residuals })) => {
                assert_eq!(iterations, 3);
                assert_eq!(tol, 1e-12);
                assert_eq!(energies.len(), 4);
                assert_eq!(residuals.len(), 4);
                assert!(energies.iter().all(|e| e.is_finite()));
                assert!(residuals.iter().any(|&r| r > 1e-12));
            }
            other => panic!("expected NotConverged, got {other:?}"),
        }
    }

    // Error contract: invalid input returns InputError naming the argument.
    #[test]
    fn invalid_input() {
        let h = double_well(64);
        let arg = |r: Result<IterativeResult>| match r {
            Err(Error::Input(InputError::OutOfRange { argument, .. })) => argument,
            Err(Error::Input(InputError::Length { argument, .. })) => argument,
            Err(Error::Input(InputError::NotFinite { argument, .. })) => argument,
            other => panic!("expected InputError, got {other:?}"),
        };
        assert_eq!(arg(lobpcg(&h, None, None, &opts(0, 1e-8))), "count");
        let o63 = IterativeOptions { block_extra: 2, ..opts(63, 1e-8) };
        assert_eq!(arg(lobpcg(&h, None, None, &o63)), "count");
        let msg = lobpcg(&h, None, None, &o63).unwrap_err().to_string();
        assert!(msg.contains("[1, 62]"), "{msg}");
        assert_eq!(arg(lobpcg(&h, None, None, &opts(2, 0.0))), "tol");
        assert_eq!(arg(lobpcg(&h, None, None, &opts(2, f64::NAN))), "tol");
        assert_eq!(arg(lobpcg(&h, None, None, &IterativeOptions { max_iter: 0, ..opts(2, 1e-8) })), "max_iter");
        assert_eq!(arg(lobpcg(&h, None, None, &IterativeOptions { initial: Some(vec![0.0; 65]), ..opts(2, 1e-8) })), "initial");
        let mut bad = vec![1.0; 64];
        bad[3] = f64::NAN;
        assert_eq!(arg(lobpcg(&h, None, None, &IterativeOptions { initial: Some(bad), ..opts(2, 1e-8) })), "initial");
        assert_eq!(arg(lobpcg(&h, Some(&Diag(vec![1.0; 63])), None, &opts(2, 1e-8))), "b");
        // the whole space as block: exact answer at once
        let r = lobpcg(&h, None, None, &IterativeOptions { block_extra: 0, ..opts(64, 1e-8) }).unwrap();
        let dense = dense_eigvals(&h.dense());
        assert!((r.energies[63] - dense[63]).abs() < 1e-8 * dense[63]);
    }

    /// An operator that returns NaN (a broken user callback).
    struct NanOp(usize);

    impl SymmetricOperator for NanOp {
        fn dim(&self) -> usize {
            self.0
        }
        fn apply(&self, _x: &[f64], y: &mut [f64], _ncols: usize) {
            y.iter_mut().for_each(|v| *v = f64::NAN);
        }
    }

    // Error contract: broken operators give an error, never a panic or a hang.
    #[test]
    fn broken_operators_error() {
        let h = double_well(64);
        match lobpcg(&NanOp(64), None, None, &opts(2, 1e-8)) {
            Err(Error::Numerical(NumericalError::EigenFailed(_))) => {}
            other => panic!("expected EigenFailed, got {other:?}"),
        }
        // not positive definite B
        assert!(lobpcg(&h, Some(&Diag(vec![-1.0; 64])), None, &IterativeOptions { max_iter: 50, ..opts(2, 1e-8) }).is_err());
        // NaN from the preconditioner
        struct NanPre;
        impl Preconditioner for NanPre {
            fn precondition(&self, r: &mut [f64], _ncols: usize, _shifts: &[f64]) {
                r.iter_mut().for_each(|v| *v = f64::NAN);
            }
        }
        assert!(lobpcg(&h, None, Some(&NanPre), &opts(2, 1e-8)).is_err());
    }

    // Warm start from converged vectors (more columns than count, and fewer).
    #[test]
    fn warm_start() {
        let h = double_well(512);
        let p = KineticPrecond { grid: &h.grid, c: 10.0 };
        let cold = lobpcg(&h, None, Some(&p), &opts(8, 1e-10)).unwrap();
        let warm = lobpcg(&h, None, Some(&p), &IterativeOptions { initial: Some(cold.vectors.clone()), ..opts(6, 1e-10) }).unwrap();
        let part = lobpcg(&h, None, Some(&p), &IterativeOptions { initial: Some(cold.vectors[..3 * 512].to_vec()), ..opts(6, 1e-10) }).unwrap();
        for j in 0..6 {
            assert!((warm.energies[j] - cold.energies[j]).abs() < 1e-9);
            assert!((part.energies[j] - cold.energies[j]).abs() < 1e-9);
        }
        assert!(warm.iterations < cold.iterations / 2, "warm {} cold {}", warm.iterations, cold.iterations);
        println!("warm start: cold {} / warm {} / partial {} iterations", cold.iterations, warm.iterations, part.iterations);
    }

    fn timing(n: usize, count: usize) {
        // HO on [-20, 20) extended with a flat V = 200 beyond |x| = 20 (dx = 40/2048)
        let l = 40.0 * n as f64 / 2048.0;
        let h = GridOperator::new(n, l, |x| 0.5 * x.abs().min(20.0).powi(2));
        let p = KineticPrecond { grid: &h.grid, c: 50.0 };
        let t = Instant::now();
        let r = lobpcg(&h, None, Some(&p), &opts(count, 1e-10)).unwrap();
        let secs = t.elapsed().as_secs_f64();
        let err = r.energies.iter().enumerate().map(|(i, e)| (e - i as f64 - 0.5).abs()).fold(0.0, f64::max);
        println!(
            "timing dim {n} count {count}: {} iterations, {secs:.3} s, max |E_n - (n+1/2)| = {err:.1e}, workspace {:.1} MiB",
            r.iterations,
            lobpcg_workspace_bytes(n, count, default_block_extra(count), false) as f64 / 1048576.0
        );
        assert!(err < 1e-8);
    }

    // Timing (printed, not asserted): cargo test --release -- --nocapture
    #[test]
    fn timing_small() {
        timing(2048, 10);
        timing(8192, 10);
    }

    // Timing for dim = 2^20, count 5 (slow: run with --ignored).
    #[test]
    #[ignore]
    fn timing_2_pow_20() {
        timing(1 << 20, 5);
    }
}
