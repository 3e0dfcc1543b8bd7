//! The lowest eigenpairs of a banded symmetric-definite pencil A x = λ B x (A symmetric
//! with bandwidth kd, B diagonal and positive) by spectral-transformation Lanczos
//! (Ericsson & Ruhe 1980, Math. Comp. 35, 1251; Parlett 1998, *The Symmetric Eigenvalue
//! Problem*, ch. 13), for the small pencils of spectral elements (n ≈ 100–2000,
//! kd ≈ 8–16, a few to a few tens of levels), with a certificate that the returned
//! eigenvalues are the lowest `count` ones.
//!
//! Route, on the standard form C = B^{-1/2} A B^{-1/2} (banded, bandwidth kd):
//! 1. σ = `lower_bound` − 100ε(|lower_bound| + ‖C‖), the caller's lower bound of the
//!    spectrum. Root-free banded Cholesky C − σI = L D Lᵀ (O(n·kd²)); a non-positive
//!    pivot means the bound is wrong: error (the caller falls back).
//! 2. Lanczos on M = (C − σI)⁻¹ (eigenvalues θ = 1/(λ − σ), the lowest λ the largest θ)
//!    from a random start ([`super::rng`]), full reorthogonalisation by classical
//!    Gram-Schmidt applied twice every step ("twice is enough": Giraud, Langou &
//!    Rozložník 2005, Comput. Math. Appl. 50, 1069). Each step is one banded solve and
//!    four passes over the Lanczos vectors; nothing is allocated inside the loop.
//! 3. Every few steps the eigenvalues of the Lanczos tridiagonal T_j and the last
//!    components s_{j,i} of its eigenvectors by the implicit QL method tracking only
//!    the last row of the eigenvector matrix (O(j²); Bowdler, Martin, Reinsch &
//!    Wilkinson 1968, `tql2`). Ritz value θ_i has converged when the Lanczos bound
//!    |β_j s_{j,i}| ≤ 20ε√n‖C‖θ_i² (Parlett §13.2: ‖M y − θ y‖ = |β_j s_{j,i}|); after
//!    the purification of step 4 the residual in C is |β_j s_{j,i}|/θ_i² plus the
//!    solve's backward error, so that bound aims at 2 % of the verification tolerance.
//!    The run stops when the `count` largest have converged and the next one (the
//!    guard) is located to a tenth of its gap, |β_j s_{j,g}| ≤ 0.1(θ_count − θ_g).
//! 4. Ritz vectors y = Q_j s_i (s_i by inverse iteration on T_j, [`super::subset`]),
//!    purified by one more solve, x = M y/θ (Ericsson & Ruhe 1980, §4; Nour-Omid,
//!    Parlett, Ericsson & Jensen 1987, Math. Comp. 48, 663), Gram-Schmidt
//!    orthonormalised (twice) and locked.
//! 5. Verification in C exactly as [`super::banded`]'s: ‖C x − ρ x‖ ≤ 1000ε·√n·‖C‖ for
//!    every pair (ρ = xᵀCx) and |XᵀX − I| ≤ 1000ε·√n.
//! 6. Completeness certificate (below). If it reports eigenvalues below τ that were
//!    not found (a member of a (near-)degenerate pair the single start vector did not
//!    resolve), Lanczos is run again on the complement of the locked vectors (explicit
//!    locking: every new vector is also orthogonalised against them), at most
//!    [`MAX_ROUNDS`] runs in all.
//! 7. x ← B^{-1/2} x: B-orthonormal eigenvectors of the pencil.
//!
//! # What is guaranteed
//! A returned result has passed step 5 and the certificate: with τ placed between
//! the count-th value and the guard, the root-free LDLᵀ of C − τI *without* pivoting
//! has exactly `count` negative pivots. Pivoting-free LDLᵀ of an indefinite matrix can
//! suffer element growth, so the count is not trusted blindly: the computed factors are
//! exact for C − τI + E with |E| ≤ γ_{kd+2}·|L||D||Lᵀ| (Higham 2002, *Accuracy and
//! Stability of Numerical Algorithms*, Thm 9.3, here with the band's inner-product
//! length), and ‖E‖₂ ≤ ‖|L||D||Lᵀ|‖_∞·γ is computed in O(n·kd) from the factors. By
//! Sylvester's law of inertia and Weyl's inequality, C then has at most `count`
//! eigenvalues below τ − ‖E‖. The `count` verified orthonormal pairs (ρ_i, x_i) with
//! residual matrix R guarantee `count` eigenvalues of C, counted with multiplicity,
//! each within 2‖R‖_F of a ρ_i (Kahan 1967; Parlett 1998, Thm 11.5.1, with ‖XᵀCX −
//! diag ρ‖ ≤ ‖R‖). If max ρ_i + 2‖R‖_F + 2η‖C‖ < τ − 2‖E‖ (η the orthogonality
//! defect), those are *all* eigenvalues below τ − ‖E‖: the returned values are, in
//! order, within 2‖R‖_F + 2η‖C‖ of the lowest `count` eigenvalues of C, none missing,
//! and every vector has passed the residual test. (First order in ε: the rounding of
//! the bound's own evaluation is covered by the factors of 2.) A large growth only
//! weakens the bound, so the check then fails safely; it is tried at three positions
//! of τ in the gap. Every failure is an error ([`NumericalError::EigenFailed`]), never
//! a silent result: [`super::banded::lowest_auto`] then takes its other paths.
//!
//! The shift-invert spectrum is what makes this fast: the wanted θ are the largest
//! and well separated relative to the O(1/‖C‖) cluster of the rest, so 30–60 steps
//! suffice for ten levels whatever n is; the cost is O(n·kd²) + O(j·n·kd) +
//! O(j²·n) (the reorthogonalisation dominates), not the O(n²·kd) of a band reduction.
//! Measured timings: see [`banded`](super::banded) and the tests below.

use super::banded::{self, SymBand};
use super::rng::Rng;
use super::subset::Tridiagonal;
use crate::error::{Error, InputError, NumericalError};
use faer::{Mat, MatRef};

/// Ritz values beyond `count` that must be located before a run stops (τ goes between
/// the last wanted value and the first guard).
const GUARD: usize = 1;
/// Converged when |β s| ≤ CONV_TOL·ε·√n·‖C‖·θ² (see the module docs, step 3).
const CONV_TOL: f64 = 20.0;
/// The guard is located when its bound is below this fraction of its gap to θ_count.
const GUARD_SEP: f64 = 0.1;
/// Lanczos runs (the first and the locked restarts) before giving up.
pub const MAX_ROUNDS: usize = 4;
/// β_j ≤ BREAKDOWN·ε·‖T‖: an invariant subspace has been found.
const BREAKDOWN: f64 = 16.0;
/// Seed of the start vectors (stream = round).
const SEED: u64 = 0x5eed_1a9c_2f0b_7e31;

/// Diagnostics of one successful solve (for tests and timing reports).
#[derive(Clone, Debug)]
pub struct ShiftInvertReport {
    /// The shift σ (below the spectrum).
    pub sigma: f64,
    /// Lanczos steps of each run (one entry per round).
    pub steps: Vec<usize>,
    /// Where the certificate placed τ, and the count of negative pivots there.
    pub tau: f64,
    pub below_tau: usize,
    /// Bound on ‖E‖ of the LDLᵀ of C − τI and the residual/orthogonality radius
    /// 2‖R‖_F + 2η‖C‖ of the returned pairs (absolute, the units of λ).
    pub backward_bound: f64,
    pub residual_bound: f64,
    /// (τ − 2‖E‖) − (max ρ + radius): positive, the slack of the certificate.
    pub margin: f64,
}

/// The lowest `count` eigenpairs of A x = λ B x by shift-invert Lanczos (module docs):
/// eigenvalues ascending and the n × count B-orthonormal eigenvectors (xᵀBx = 1, sign
/// arbitrary), certified complete.
///
/// `lower_bound` must satisfy xᵀAx ≥ lower_bound·xᵀBx for all x, i.e. lie at or below
/// the lowest eigenvalue. A caller usually knows such a bound from the structure of A:
/// for a stiffness matrix plus a lumped potential, A = K + diag(w_i V_i) with K
/// positive semi-definite and B = diag(w_i), xᵀAx ≥ min_i V_i·xᵀBx. The bound only
/// places the shift (closer is faster); a wrong one is detected (the Cholesky of
/// C − σI fails) and never yields a wrong answer.
///
/// Errors: invalid input ([`InputError`], as [`banded::lowest`], plus a non-finite
/// `lower_bound`), and [`NumericalError::EigenFailed`] when the bound is not below
/// the spectrum, `count` ≥ n, a run does not converge within its step budget, the
/// verification fails or completeness cannot be certified. Callers wanting an answer
/// regardless use [`banded::lowest_auto`], which falls back.
pub fn lowest(a: &SymBand, b: &[f64], count: usize, lower_bound: f64) -> Result<(Vec<f64>, Mat<f64>), Error> {
    lowest_with_report(a, b, count, lower_bound).map(|(v, x, _)| (v, x))
}

/// [`lowest`] with its diagnostics.
pub fn lowest_with_report(a: &SymBand, b: &[f64], count: usize, lower_bound: f64) -> Result<(Vec<f64>, Mat<f64>, ShiftInvertReport), Error> {
    lowest_impl(a, b, count, lower_bound, None)
}

/// [`lowest_with_report`] with an optional start vector for the first run (tests).
fn lowest_impl(
    a: &SymBand,
    b: &[f64],
    count: usize,
    lower_bound: f64,
    start: Option<&[f64]>,
) -> Result<(Vec<f64>, Mat<f64>, ShiftInvertReport), Error> {
    let s = banded::check_pencil(a, b, count)?;
    if !lower_bound.is_finite() {
        return Err(InputError::range("lower_bound", "a finite lower bound of the lowest eigenvalue", lower_bound).into());
    }
    let n = a.n();
    if count >= n {
        return Err(fail(format!("shift-invert Lanczos needs count < n for its guard (count {count}, n {n})")).into());
    }
    let c = a.scaled(&s);
    let norm = c.norm_inf().max(f64::MIN_POSITIVE);
    let sigma = lower_bound - 100.0 * f64::EPSILON * (lower_bound.abs() + norm);
    let mut ldl = BandLdl::new(n, c.kd());
    match ldl.factor(&c, sigma) {
        Some(0) => {}
        Some(neg) => {
            return Err(fail(format!(
                "lower_bound {lower_bound:e} is not below the spectrum: C − σI has {neg} negative pivots"
            ))
            .into())
        }
        None => return Err(fail(format!("lower_bound {lower_bound:e}: C − σI has a zero or non-finite pivot")).into()),
    }
    let mut solver = Solver::new(&c, &ldl, sigma, norm, count);
    solver.start = start.filter(|x| x.len() == n).map(|x| x.to_vec());
    let (vals, mut x, report) = solver.solve(count)?;
    for j in 0..count {
        for i in 0..n {
            x[(i, j)] *= s[i];
        }
    }
    Ok((vals, x, report))
}

fn fail(msg: String) -> NumericalError {
    NumericalError::EigenFailed(format!("shift-invert Lanczos: {msg}"))
}

/// Root-free Cholesky / LDLᵀ without pivoting of the band matrix C − τI: L unit lower
/// triangular with bandwidth kd, D diagonal.
pub(crate) struct BandLdl {
    n: usize,
    kd: usize,
    /// Lower band storage as [`SymBand`]: column j holds d_j, then l_{j+1,j} … l_{j+kd,j}.
    w: Vec<f64>,
    /// L by rows: row i holds l_{i,i−kd} … l_{i,i−1} (zeros before column 0), for the
    /// back substitution in axpy form.
    rows: Vec<f64>,
    inv_d: Vec<f64>,
    /// max_i |c_ii − τ| of the factored matrix (for the backward-error bound).
    max_diag: f64,
}

impl BandLdl {
    pub(crate) fn new(n: usize, kd: usize) -> Self {
        BandLdl { n, kd, w: vec![0.0; n * (kd + 1)], rows: vec![0.0; n * kd], inv_d: vec![0.0; n], max_diag: 0.0 }
    }

    /// Factor C − τI (C of the order and bandwidth given to [`BandLdl::new`]); returns
    /// the number of negative pivots, or `None` when a pivot is zero or not finite.
    pub(crate) fn factor(&mut self, c: &SymBand, tau: f64) -> Option<usize> {
        let (n, kd) = (self.n, self.kd);
        let ld = kd + 1;
        debug_assert!(c.n() == n && c.kd() == kd);
        self.w.copy_from_slice(c.data());
        let mut max_diag = 0.0_f64;
        for j in 0..n {
            self.w[j * ld] -= tau;
            max_diag = max_diag.max(self.w[j * ld].abs());
        }
        self.max_diag = max_diag;
        let mut neg = 0;
        for j in 0..n {
            let m = kd.min(n - 1 - j);
            let (head, tail) = self.w.split_at_mut((j + 1) * ld);
            let col = &mut head[j * ld..];
            let dj = col[0];
            if !(dj != 0.0 && dj.is_finite()) {
                return None;
            }
            if dj < 0.0 {
                neg += 1;
            }
            let inv = 1.0 / dj;
            self.inv_d[j] = inv;
            // Trailing update: C[j+i, j+k] −= c_{j+i,j}·c_{j+k,j}/d_j, k ≤ i ≤ m.
            for k in 1..=m {
                let lk = col[k] * inv;
                let dst = &mut tail[(k - 1) * ld..(k - 1) * ld + (m - k + 1)];
                for (d, &ci) in dst.iter_mut().zip(&col[k..=m]) {
                    *d -= ci * lk;
                }
            }
            for v in &mut col[1..=m] {
                *v *= inv;
            }
            for (i, &l) in col[1..=m].iter().enumerate() {
                // l_{j+1+i, j} is entry kd − 1 − i of row j + 1 + i.
                self.rows[(j + 1 + i) * kd + kd - 1 - i] = l;
            }
        }
        Some(neg)
    }

    /// x ← (L D Lᵀ)⁻¹ x: forward and back substitution both as axpys (columns of L,
    /// then rows of L), so that only one scalar is carried from step to step.
    #[inline(always)]
    fn solve(&self, x: &mut [f64]) {
        let (n, kd) = (self.n, self.kd);
        let ld = kd + 1;
        let x = &mut x[..n];
        for j in 0..n {
            let m = kd.min(n - 1 - j);
            let xj = x[j];
            let col = &self.w[j * ld + 1..j * ld + 1 + m];
            for (xi, &l) in x[j + 1..=j + m].iter_mut().zip(col) {
                *xi -= l * xj;
            }
        }
        for (xi, d) in x.iter_mut().zip(&self.inv_d) {
            *xi *= d;
        }
        for i in (1..n).rev() {
            let xi = x[i];
            let lo = i.saturating_sub(kd);
            let row = &self.rows[i * kd + kd - (i - lo)..(i + 1) * kd];
            for (xj, &l) in x[lo..i].iter_mut().zip(row) {
                *xj -= l * xi;
            }
        }
    }

    /// An upper bound on ‖E‖₂ for the computed factors, L D Lᵀ = C − τI + E:
    /// 2γ_{kd+2}‖|L||D||Lᵀ|‖_∞ + 2ε·max|c_ii − τ| (Higham 2002, Thm 9.3; the second
    /// term covers the rounding of the shift). `tmp` has length ≥ 2n.
    fn backward_bound(&self, tmp: &mut [f64]) -> f64 {
        let (n, kd) = (self.n, self.kd);
        let ld = kd + 1;
        let (y, g) = tmp.split_at_mut(n);
        // y = |D||Lᵀ|𝟙, then g = |L| y.
        for (j, (yj, dj)) in y.iter_mut().zip(&self.inv_d).enumerate() {
            let m = kd.min(n - 1 - j);
            let s: f64 = self.w[j * ld + 1..j * ld + 1 + m].iter().map(|l| l.abs()).sum();
            *yj = (1.0 + s) / dj.abs();
        }
        g[..n].copy_from_slice(y);
        for j in 0..n {
            let m = kd.min(n - 1 - j);
            for (gi, l) in g[j + 1..=j + m].iter_mut().zip(&self.w[j * ld + 1..j * ld + 1 + m]) {
                *gi += l.abs() * y[j];
            }
        }
        let growth = g[..n].iter().cloned().fold(0.0, f64::max);
        let k = (kd + 2) as f64 * f64::EPSILON;
        2.0 * k / (1.0 - k) * growth + 2.0 * f64::EPSILON * self.max_diag
    }
}

/// The workspace of one call, allocated once: Lanczos and locked vectors, the
/// tridiagonal, the QL arrays.
struct Solver<'a> {
    c: &'a SymBand,
    ldl: &'a BandLdl,
    sigma: f64,
    norm: f64,
    n: usize,
    /// Column capacity of `v`.
    ncap: usize,
    /// n × ncap, column-major: locked vectors first, then the current Lanczos vectors.
    v: Vec<f64>,
    nlock: usize,
    /// λ = σ + 1/θ of the locked vectors (same order as their columns).
    locked: Vec<f64>,
    w: Vec<f64>,
    h: Vec<f64>,
    alpha: Vec<f64>,
    beta: Vec<f64>,
    ql_d: Vec<f64>,
    ql_e: Vec<f64>,
    ql_z: Vec<f64>,
    order: Vec<usize>,
    /// Lanczos steps per run.
    steps: Vec<usize>,
    /// Start vector of the first run instead of a random one (tests).
    start: Option<Vec<f64>>,
}

/// What a run found: the leading Ritz values (θ descending), the number of steps, and
/// which of them have converged.
struct RunOutcome {
    steps: usize,
    theta: Vec<f64>,
    converged: Vec<bool>,
    /// λ of the guard when it was located (its bound below GUARD_SEP of its gap).
    guard: Option<f64>,
}

impl<'a> Solver<'a> {
    fn new(c: &'a SymBand, ldl: &'a BandLdl, sigma: f64, norm: f64, count: usize) -> Self {
        let n = c.n();
        // One run needs about 2–4·(count + GUARD) steps; room for a second run's
        // locked vectors as well, and at least 300 steps for wanted values inside a
        // tight cluster (box states of a wide cladding) that need far more.
        let ncap = (6 * (count + GUARD) + 40).max(300).min(n) + 1;
        Solver {
            c,
            ldl,
            sigma,
            norm,
            n,
            ncap,
            v: vec![0.0; n * ncap],
            nlock: 0,
            locked: Vec::with_capacity(ncap),
            w: vec![0.0; n],
            h: vec![0.0; ncap],
            alpha: vec![0.0; ncap],
            beta: vec![0.0; ncap],
            ql_d: vec![0.0; ncap],
            ql_e: vec![0.0; ncap],
            ql_z: vec![0.0; ncap],
            order: Vec::with_capacity(ncap),
            steps: Vec::new(),
            start: None,
        }
    }

    /// Rounds of Lanczos + locking until the lowest `count` are certified (module docs).
    fn solve(&mut self, count: usize) -> Result<(Vec<f64>, Mat<f64>, ShiftInvertReport), NumericalError> {
        let mut want = count;
        let mut guards: Vec<f64> = Vec::new();
        let mut tmp = vec![0.0; 2 * self.n];
        let mut ldl_tau = BandLdl::new(self.n, self.c.kd());
        let mut last_err = String::new();
        for round in 0..MAX_ROUNDS {
            let mut rng = Rng::stream(SEED, round as u64);
            let out = self.run(want, &mut rng)?;
            self.steps.push(out.steps);
            let sel: Vec<usize> = (0..out.theta.len()).filter(|&i| out.converged[i]).collect();
            self.lock(&out, &sel);
            if let Some(g) = out.guard {
                guards.push(g);
            }
            if self.nlock < count {
                want = count - self.nlock;
                last_err = format!("{} of {count} pairs converged", self.nlock);
                continue;
            }
            // The lowest `count` locked pairs, ascending.
            let mut idx: Vec<usize> = (0..self.nlock).collect();
            idx.sort_by(|&i, &j| self.locked[i].total_cmp(&self.locked[j]));
            let top = self.locked[idx[count - 1]];
            let next = idx[count..]
                .iter()
                .map(|&i| self.locked[i])
                .chain(guards.iter().cloned())
                .filter(|&l| l > top)
                .fold(f64::INFINITY, f64::min);
            if !next.is_finite() {
                want = GUARD;
                last_err = "no guard above the wanted values".into();
                continue;
            }
            let (vals, x) = self.rayleigh_ritz(&idx[..count]);
            let ver = banded::verify_report(self.c, &vals, &x, self.norm).map_err(|e| fail(format!("{e}")))?;
            let radius = 2.0 * ver.frobenius + 2.0 * ver.orthogonality * count as f64 * self.norm;
            let vmax = vals[count - 1];
            // τ at θ-fractions of the gap between θ(top) and θ(next).
            let (th_top, th_next) = (1.0 / (top - self.sigma), 1.0 / (next - self.sigma));
            let mut missing = 0;
            for frac in [0.5, 0.3, 0.7] {
                let tau = self.sigma + 1.0 / (th_next + frac * (th_top - th_next));
                let Some(nu) = ldl_tau.factor(self.c, tau) else { continue };
                let e = ldl_tau.backward_bound(&mut tmp);
                let margin = (tau - 2.0 * e) - (vmax + radius);
                if nu == count && margin > 0.0 {
                    let report = ShiftInvertReport {
                        sigma: self.sigma,
                        steps: self.steps.clone(),
                        tau,
                        below_tau: nu,
                        backward_bound: e,
                        residual_bound: radius,
                        margin,
                    };
                    return Ok((vals, x, report));
                }
                if nu > count && margin > 0.0 {
                    // Trusted count: eigenvalues below τ were not found.
                    missing = missing.max(nu - count);
                }
                last_err = format!("inertia {nu} below τ = {tau:e} for {count} found, margin {margin:e}");
            }
            if missing == 0 {
                break;
            }
            want = missing;
        }
        Err(fail(format!("completeness not certified after {} runs ({last_err})", self.steps.len())))
    }

    /// One Lanczos run on M restricted to the complement of the locked vectors, until
    /// the `want` largest Ritz values have converged and the guard is located (or the
    /// step budget is spent, or an invariant subspace is found).
    fn run(&mut self, want: usize, rng: &mut Rng) -> Result<RunOutcome, NumericalError> {
        #[cfg(target_arch = "x86_64")]
        {
            if std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma") {
                // SAFETY: the CPU supports the features the function was compiled for.
                return unsafe { self.run_avx(want, rng) };
            }
        }
        self.run_impl(want, rng)
    }

    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx2,fma")]
    unsafe fn run_avx(&mut self, want: usize, rng: &mut Rng) -> Result<RunOutcome, NumericalError> {
        self.run_impl(want, rng)
    }

    #[inline(always)]
    fn run_impl(&mut self, want: usize, rng: &mut Rng) -> Result<RunOutcome, NumericalError> {
        let n = self.n;
        let base = self.nlock;
        let jmax = (self.ncap - 1 - base).min(n - base);
        if want == 0 || want > n - base || jmax < want + GUARD.min(n - base - want) {
            return Err(fail(format!("no room for {want} more pairs ({} locked, n {n})", base)));
        }
        let ctol = CONV_TOL * f64::EPSILON * (n as f64).sqrt() * self.norm;
        // Start vector: random, orthogonal to the locked vectors.
        let mut ok = false;
        for _ in 0..3 {
            match self.start.take() {
                Some(x) => self.w.copy_from_slice(&x),
                None => rng.fill_symmetric(&mut self.w),
            }
            if base > 0 {
                cgs_pass(&self.v[..base * n], n, base, &mut self.w, &mut self.h);
                cgs_pass(&self.v[..base * n], n, base, &mut self.w, &mut self.h);
            }
            let nw = norm2(&self.w);
            if nw > 0.0 && nw.is_finite() {
                let inv = 1.0 / nw;
                for (q, &x) in self.v[base * n..(base + 1) * n].iter_mut().zip(&self.w) {
                    *q = x * inv;
                }
                ok = true;
                break;
            }
        }
        if !ok {
            return Err(fail("no start vector outside the locked space".into()));
        }
        // Convergence checks (an O(j²) QL each) from 2(want + GUARD) steps on, every
        // third step (ten levels of the element pencils converge in 25–40 steps), then
        // every j/10 steps so that long runs spend O(j²·n) in the checks at most.
        let first_check = (2 * (want + GUARD)).min(jmax);
        let mut tnorm = 0.0_f64;
        let mut next_check = first_check;
        for j in 0..jmax {
            let col = base + j;
            self.w.copy_from_slice(&self.v[col * n..(col + 1) * n]);
            self.ldl.solve(&mut self.w);
            // Three-term recurrence, then one classical Gram-Schmidt pass against every
            // vector so far (locked and Lanczos), and a second one when the first
            // removed more than 1 − 1/√2 of the norm (Kahan-Parlett "twice is enough",
            // Parlett 1998 §6.9).
            if j > 0 {
                let bp = self.beta[j - 1];
                for (wi, &q) in self.w.iter_mut().zip(&self.v[(col - 1) * n..col * n]) {
                    *wi -= bp * q;
                }
            }
            let qj = &self.v[col * n..(col + 1) * n];
            let mut a = dot(qj, &self.w);
            for (wi, &q) in self.w.iter_mut().zip(qj) {
                *wi -= a * q;
            }
            let cols = &self.v[..(col + 1) * n];
            let mut b0 = norm2(&self.w);
            let mut b = b0;
            for _pass in 0..2 {
                cgs_pass(cols, n, col + 1, &mut self.w, &mut self.h);
                a += self.h[col];
                b = norm2(&self.w);
                if b >= std::f64::consts::FRAC_1_SQRT_2 * b0 {
                    break;
                }
                b0 = b;
            }
            if !(a.is_finite() && b.is_finite()) {
                return Err(fail(format!("non-finite Lanczos coefficients at step {j}")));
            }
            self.alpha[j] = a;
            self.beta[j] = b;
            tnorm = tnorm.max(a.abs() + b + if j > 0 { self.beta[j - 1] } else { 0.0 });
            let steps = j + 1;
            let breakdown = b <= BREAKDOWN * f64::EPSILON * tnorm;
            let last = breakdown || steps == jmax;
            if !last {
                let inv = 1.0 / b;
                for (q, &x) in self.v[(col + 1) * n..(col + 2) * n].iter_mut().zip(&self.w) {
                    *q = x * inv;
                }
            }
            if last || (steps >= first_check && steps >= next_check) {
                next_check = steps + (steps / 10).max(3);
                let beta_last = if breakdown { 0.0 } else { b };
                let out = self.ritz_bounds(steps, beta_last, want, ctol)?;
                let done = out.converged.iter().take(want).all(|&c| c) && (out.guard.is_some() || steps + base == n);
                if done || last {
                    return Ok(out);
                }
            }
        }
        Err(fail("empty run".into()))
    }

    /// Ritz values of T_steps (θ descending, the `want` + GUARD largest), their
    /// Lanczos bounds |β s_last| and convergence flags.
    fn ritz_bounds(&mut self, steps: usize, beta_last: f64, want: usize, ctol: f64) -> Result<RunOutcome, NumericalError> {
        let (d, e, z) = (&mut self.ql_d[..steps], &mut self.ql_e[..steps], &mut self.ql_z[..steps]);
        d.copy_from_slice(&self.alpha[..steps]);
        e[..steps - 1].copy_from_slice(&self.beta[..steps - 1]);
        e[steps - 1] = 0.0;
        z.fill(0.0);
        z[steps - 1] = 1.0;
        if !ql_last_row(d, e, z) {
            return Err(fail(format!("QL on the {steps}×{steps} Lanczos tridiagonal did not converge")));
        }
        self.order.clear();
        self.order.extend(0..steps);
        self.order.sort_by(|&i, &j| d[j].total_cmp(&d[i]));
        let k = (want + GUARD).min(steps);
        let theta: Vec<f64> = self.order[..k].iter().map(|&i| d[i]).collect();
        let bound: Vec<f64> = self.order[..k].iter().map(|&i| (beta_last * z[i]).abs()).collect();
        let converged: Vec<bool> = (0..k).map(|i| theta[i] > 0.0 && bound[i] <= ctol * theta[i] * theta[i]).collect();
        let guard = if k > want && want > 0 {
            let gap = theta[want - 1] - theta[want];
            (theta[want] > 0.0 && gap > 0.0 && bound[want] <= GUARD_SEP * gap).then(|| self.sigma + 1.0 / theta[want])
        } else {
            None
        };
        Ok(RunOutcome { steps, theta, converged, guard })
    }

    /// Lock the Ritz pairs `sel` of the last run: y = Q s, x = M y (purification),
    /// Gram-Schmidt against the locked vectors and each other, stored after them.
    fn lock(&mut self, out: &RunOutcome, sel: &[usize]) {
        if sel.is_empty() {
            return;
        }
        let (n, base, j) = (self.n, self.nlock, out.steps);
        let tri = Tridiagonal::new(self.alpha[..j].iter().map(|x| -x).collect(), self.beta[..j - 1].iter().map(|x| -x).collect());
        let shifts: Vec<f64> = sel.iter().map(|&i| -out.theta[i]).collect();
        let s = tri.eigenvectors(&shifts);
        let q = MatRef::from_column_major_slice(&self.v[base * n..(base + j) * n], n, j);
        let y = q * &s;
        for (k, &i) in sel.iter().enumerate() {
            for (r, wr) in self.w.iter_mut().enumerate() {
                *wr = y[(r, k)];
            }
            self.ldl.solve(&mut self.w);
            let m = self.nlock;
            if m > 0 {
                cgs_pass(&self.v[..m * n], n, m, &mut self.w, &mut self.h);
                cgs_pass(&self.v[..m * n], n, m, &mut self.w, &mut self.h);
            }
            let nw = norm2(&self.w);
            if !(nw > 0.0 && nw.is_finite()) {
                continue;
            }
            let inv = 1.0 / nw;
            for (q, &x) in self.v[m * n..(m + 1) * n].iter_mut().zip(&self.w) {
                *q = x * inv;
            }
            self.locked.push(self.sigma + 1.0 / out.theta[i]);
            self.nlock += 1;
        }
    }

    /// The locked vectors `idx` as columns, ordered by their Rayleigh quotients xᵀCx
    /// (ascending), and those quotients.
    fn rayleigh_ritz(&self, idx: &[usize]) -> (Vec<f64>, Mat<f64>) {
        let n = self.n;
        let mut y = vec![0.0; n];
        let mut pairs: Vec<(f64, usize)> = idx
            .iter()
            .map(|&k| {
                let col = &self.v[k * n..(k + 1) * n];
                self.c.mul_vec(col, &mut y);
                (col.iter().zip(&y).map(|(a, b)| a * b).sum::<f64>(), k)
            })
            .collect();
        pairs.sort_by(|p, q| p.0.total_cmp(&q.0));
        let x = Mat::from_fn(n, pairs.len(), |i, k| self.v[pairs[k].1 * n + i]);
        (pairs.into_iter().map(|p| p.0).collect(), x)
    }
}

/// One classical Gram-Schmidt pass: h_c = v_c·w for the m columns of `v` (column-major,
/// n rows), then w ← w − V h. Four columns at a time, eight independent partial sums
/// per column (vectorisable without reassociating any one sum).
#[inline(always)]
fn cgs_pass(v: &[f64], n: usize, m: usize, w: &mut [f64], h: &mut [f64]) {
    const L: usize = 8;
    let w = &mut w[..n];
    let body = n - n % L;
    let mut c = 0;
    while c + 4 <= m {
        let (c0, c1, c2, c3) = (&v[c * n..][..n], &v[(c + 1) * n..][..n], &v[(c + 2) * n..][..n], &v[(c + 3) * n..][..n]);
        let mut acc = [[0.0_f64; L]; 4];
        for i in (0..body).step_by(L) {
            let x = &w[i..i + L];
            let (a0, a1, a2, a3) = (&c0[i..i + L], &c1[i..i + L], &c2[i..i + L], &c3[i..i + L]);
            for l in 0..L {
                acc[0][l] += a0[l] * x[l];
                acc[1][l] += a1[l] * x[l];
                acc[2][l] += a2[l] * x[l];
                acc[3][l] += a3[l] * x[l];
            }
        }
        let mut s = [0.0; 4];
        for (sk, ak) in s.iter_mut().zip(&acc) {
            *sk = ak.iter().sum();
        }
        for i in body..n {
            s[0] += c0[i] * w[i];
            s[1] += c1[i] * w[i];
            s[2] += c2[i] * w[i];
            s[3] += c3[i] * w[i];
        }
        h[c..c + 4].copy_from_slice(&s);
        c += 4;
    }
    while c < m {
        let c0 = &v[c * n..][..n];
        let mut acc = [0.0_f64; L];
        for i in (0..body).step_by(L) {
            for l in 0..L {
                acc[l] += c0[i + l] * w[i + l];
            }
        }
        let mut s: f64 = acc.iter().sum();
        for i in body..n {
            s += c0[i] * w[i];
        }
        h[c] = s;
        c += 1;
    }
    let mut c = 0;
    while c + 4 <= m {
        let (c0, c1, c2, c3) = (&v[c * n..][..n], &v[(c + 1) * n..][..n], &v[(c + 2) * n..][..n], &v[(c + 3) * n..][..n]);
        let (h0, h1, h2, h3) = (h[c], h[c + 1], h[c + 2], h[c + 3]);
        for ((((wi, a0), a1), a2), a3) in w.iter_mut().zip(c0).zip(c1).zip(c2).zip(c3) {
            *wi -= (h0 * a0 + h1 * a1) + (h2 * a2 + h3 * a3);
        }
        c += 4;
    }
    while c < m {
        let h0 = h[c];
        for (wi, a0) in w.iter_mut().zip(&v[c * n..][..n]) {
            *wi -= h0 * a0;
        }
        c += 1;
    }
}

/// x·y with eight partial sums.
#[inline(always)]
fn dot(x: &[f64], y: &[f64]) -> f64 {
    const L: usize = 8;
    let n = x.len().min(y.len());
    let body = n - n % L;
    let mut acc = [0.0_f64; L];
    for i in (0..body).step_by(L) {
        for l in 0..L {
            acc[l] += x[i + l] * y[i + l];
        }
    }
    let mut s: f64 = acc.iter().sum();
    for i in body..n {
        s += x[i] * y[i];
    }
    s
}

/// Euclidean norm (plain sum of squares: Lanczos vectors are O(1)·θ, far from
/// overflow; eight partial sums).
#[inline(always)]
fn norm2(x: &[f64]) -> f64 {
    const L: usize = 8;
    let body = x.len() - x.len() % L;
    let mut acc = [0.0_f64; L];
    for i in (0..body).step_by(L) {
        for l in 0..L {
            acc[l] += x[i + l] * x[i + l];
        }
    }
    let mut s: f64 = acc.iter().sum();
    for v in &x[body..] {
        s += v * v;
    }
    s.sqrt()
}

/// √(a² + b²), plain when safe, `hypot` otherwise.
#[inline]
fn pythag(a: f64, b: f64) -> f64 {
    let r2 = a * a + b * b;
    if r2.is_normal() && r2 < 1e300 {
        r2.sqrt()
    } else {
        a.hypot(b)
    }
}

/// Eigenvalues of the symmetric tridiagonal matrix (diagonal `d`, off-diagonal
/// e[0..n−1], e[n−1] = 0 on entry) by the implicit QL method with Wilkinson-type shifts
/// (`tql2`, Bowdler, Martin, Reinsch & Wilkinson 1968, Numer. Math. 11, 293), applying
/// the rotations only to the row vector `z` (on entry the last row of the identity):
/// on exit d holds the eigenvalues (unordered) and z[i] the last component of the
/// eigenvector of d[i]. O(n²). Returns false if an eigenvalue needs over 60 sweeps.
fn ql_last_row(d: &mut [f64], e: &mut [f64], z: &mut [f64]) -> bool {
    let n = d.len();
    for l in 0..n {
        let mut iter = 0;
        loop {
            let mut m = l;
            while m + 1 < n {
                let dd = d[m].abs() + d[m + 1].abs();
                if e[m].abs() <= f64::EPSILON * dd {
                    break;
                }
                m += 1;
            }
            if m == l {
                break;
            }
            iter += 1;
            if iter > 60 {
                return false;
            }
            let mut g = (d[l + 1] - d[l]) / (2.0 * e[l]);
            let mut r = pythag(g, 1.0);
            g = d[m] - d[l] + e[l] / (g + r.copysign(g));
            let (mut s, mut c, mut p) = (1.0, 1.0, 0.0);
            let mut i = m;
            let mut underflow = false;
            while i > l {
                i -= 1;
                let f = s * e[i];
                let b = c * e[i];
                r = pythag(f, g);
                e[i + 1] = r;
                if r == 0.0 {
                    d[i + 1] -= p;
                    e[m] = 0.0;
                    underflow = true;
                    break;
                }
                s = f / r;
                c = g / r;
                g = d[i + 1] - p;
                r = (d[i] - g) * s + 2.0 * c * b;
                p = s * r;
                d[i + 1] = g + p;
                g = c * r - b;
                let zf = z[i + 1];
                z[i + 1] = s * z[i] + c * zf;
                z[i] = c * z[i] - s * zf;
            }
            if underflow {
                continue;
            }
            d[l] -= p;
            e[l] = g;
            e[m] = 0.0;
        }
    }
    true
}

#[cfg(test)]
mod tests {
    use super::*;
    use faer::Side;

    /// Deterministic random band matrix with a dominant diagonal shift `shift`.
    fn random_band(n: usize, kd: usize, seed: u64, shift: f64) -> SymBand {
        let mut a = SymBand::zeros(n, kd).unwrap();
        let mut rng = Rng::new(seed);
        for j in 0..n {
            for i in j..(j + kd + 1).min(n) {
                let v = 0.5 * rng.symmetric();
                a.add(i, j, if i == j { v + shift } else { v }).unwrap();
            }
        }
        a
    }

    fn random_diag(n: usize, seed: u64) -> Vec<f64> {
        let mut rng = Rng::new(seed);
        (0..n).map(|_| 0.5 + rng.uniform()).collect()
    }

    /// Gershgorin's lower bound (Gershgorin 1931) of the spectrum of
    /// C = B^{-1/2} A B^{-1/2}: min_i (c_ii − Σ_{j≠i} |c_ij|). Valid for any pencil,
    /// independent of the solver.
    fn gershgorin_lower(a: &SymBand, b: &[f64]) -> f64 {
        let n = a.n();
        let mut lo = f64::INFINITY;
        for i in 0..n {
            let mut r = 0.0;
            for j in i.saturating_sub(a.kd())..(i + a.kd() + 1).min(n) {
                if j != i {
                    r += a.get(i, j).abs() / (b[i] * b[j]).sqrt();
                }
            }
            lo = lo.min(a.get(i, i) / b[i] - r);
        }
        lo
    }

    fn c_norm(a: &SymBand, b: &[f64]) -> f64 {
        let s: Vec<f64> = b.iter().map(|v| 1.0 / v.sqrt()).collect();
        a.scaled(&s).norm_inf()
    }

    /// Compare with faer's dense solver: eigenvalues to `etol`·‖C‖, vectors up to sign
    /// (B-overlap within `vtol` of ±1), B-orthonormality to 1e-12.
    fn compare_dense(a: &SymBand, b: &[f64], vals: &[f64], v: &Mat<f64>, etol: f64, vtol: f64) {
        let count = vals.len();
        let (rv, rvec) = banded::lowest_dense(a, b, count).unwrap();
        let n = a.n();
        let norm = c_norm(a, b);
        for j in 0..count {
            assert!((vals[j] - rv[j]).abs() <= etol * norm, "pair {j}: {} vs {} (diff {:e})", vals[j], rv[j], vals[j] - rv[j]);
            if vtol.is_finite() {
                let ov: f64 = (0..n).map(|i| v[(i, j)] * b[i] * rvec[(i, j)]).sum();
                assert!((ov.abs() - 1.0).abs() < vtol, "pair {j}: overlap {ov}");
            }
        }
        for i in 0..count {
            for j in 0..count {
                let g: f64 = (0..n).map(|r| v[(r, i)] * b[r] * v[(r, j)]).sum();
                assert!((g - if i == j { 1.0 } else { 0.0 }).abs() < 1e-12, "B-orthonormality ({i},{j}) = {g}");
            }
        }
    }

    #[test]
    fn band_ldl_inertia_and_solve_match_dense() {
        // Sylvester's law of inertia: the negative pivots count the eigenvalues below τ,
        // checked against faer's dense eigenvalues; the solve against a dense product.
        let (n, kd) = (60, 5);
        let c = random_band(n, kd, 3, 0.0);
        let ev = c.to_dense().self_adjoint_eigenvalues(Side::Lower).unwrap();
        let mut ldl = BandLdl::new(n, kd);
        let mut tmp = vec![0.0; 2 * n];
        for k in [0, 1, 7, 30, 59] {
            let tau = if k == 59 { ev[59] + 1.0 } else { 0.5 * (ev[k] + ev[k + 1]) };
            let nu = ldl.factor(&c, tau).unwrap();
            let expect = ev.iter().filter(|&&l| l < tau).count();
            assert_eq!(nu, expect, "τ = {tau}");
            assert!(ldl.backward_bound(&mut tmp) > 0.0);
            let x: Vec<f64> = (0..n).map(|i| (0.3 * i as f64).cos()).collect();
            let mut y = x.clone();
            ldl.solve(&mut y);
            let mut cy = vec![0.0; n];
            c.mul_vec(&y, &mut cy);
            for i in 0..n {
                cy[i] -= tau * y[i];
            }
            let err = cy.iter().zip(&x).map(|(p, q)| (p - q).abs()).fold(0.0, f64::max);
            let ynorm = y.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
            assert!(err < 1e-10 * (1.0 + ynorm), "τ={tau}: residual {err:e}");
        }
    }

    #[test]
    fn ql_last_row_matches_dense_tridiagonal() {
        let n = 40;
        let mut rng = Rng::new(5);
        let d0: Vec<f64> = (0..n).map(|_| rng.symmetric()).collect();
        let e0: Vec<f64> = (0..n - 1).map(|_| rng.symmetric()).collect();
        let t = Mat::from_fn(n, n, |i, j| {
            if i == j {
                d0[i]
            } else if i == j + 1 {
                e0[j]
            } else if j == i + 1 {
                e0[i]
            } else {
                0.0
            }
        });
        let evd = t.self_adjoint_eigen(Side::Lower).unwrap();
        let (mut d, mut e, mut z) = (d0.clone(), e0.clone(), vec![0.0; n]);
        e.push(0.0);
        z[n - 1] = 1.0;
        assert!(ql_last_row(&mut d, &mut e, &mut z));
        let mut pairs: Vec<(f64, f64)> = d.iter().cloned().zip(z.iter().map(|x| x.abs())).collect();
        pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
        for (i, (l, zl)) in pairs.iter().enumerate() {
            assert!((l - evd.S()[i]).abs() < 1e-14, "i={i}");
            assert!((zl - evd.U()[(n - 1, i)].abs()).abs() < 1e-12, "i={i}: {zl} vs {}", evd.U()[(n - 1, i)]);
        }
    }

    #[test]
    fn random_spd_pencils_match_dense() {
        for (n, kd, count, seed) in [(60, 4, 10, 1), (150, 10, 10, 2), (97, 16, 20, 3), (40, 24, 5, 4), (200, 1, 12, 6), (300, 12, 10, 8), (120, 8, 3, 9)] {
            let a = random_band(n, kd, seed, kd as f64 + 1.5);
            let b = random_diag(n, seed + 100);
            let lb = gershgorin_lower(&a, &b);
            let (vals, v, rep) = lowest_with_report(&a, &b, count, lb).unwrap();
            assert!(rep.margin > 0.0 && rep.below_tau == count);
            compare_dense(&a, &b, &vals, &v, 1e-12, 1e-10);
        }
    }

    #[test]
    fn second_difference_closed_form_spectra() {
        // T = tridiag(−1, 2, −1) of order n has λ_k = 4 sin²(kπ/(2(n+1))), k = 1…n, and
        // T² (bandwidth 2) has λ_k² (the standard closed form of the discrete Dirichlet
        // Laplacian, e.g. Strang 2007, *Computational Science and Engineering*, §1.5).
        // With B = diag(b) and A = B^{1/2} T B^{1/2}, the pencil has the same spectrum.
        // Both are positive definite: lower bound 0.
        let n = 200;
        let exact: Vec<f64> = (1..=n).map(|k| 4.0 * (k as f64 * std::f64::consts::PI / (2.0 * (n + 1) as f64)).sin().powi(2)).collect();
        let b = random_diag(n, 41);
        for squared in [false, true] {
            let kd = if squared { 2 } else { 1 };
            let mut a = SymBand::zeros(n, kd).unwrap();
            let t = |i: usize, j: usize| -> f64 {
                let d = i.abs_diff(j);
                match (squared, d) {
                    (false, 0) => 2.0,
                    (false, 1) => -1.0,
                    (true, 0) if i == 0 || i == n - 1 => 5.0,
                    (true, 0) => 6.0,
                    (true, 1) => -4.0,
                    (true, 2) => 1.0,
                    _ => 0.0,
                }
            };
            for j in 0..n {
                for i in j..(j + kd + 1).min(n) {
                    a.add(i, j, t(i, j) * (b[i] * b[j]).sqrt()).unwrap();
                }
            }
            let (vals, v, rep) = lowest_with_report(&a, &b, 12, 0.0).unwrap();
            assert!(rep.margin > 0.0 && rep.below_tau == 12);
            for (k, l) in vals.iter().enumerate() {
                let e = if squared { exact[k] * exact[k] } else { exact[k] };
                // λ_1 of T² is 6e-8 while ‖C‖ ≈ 16: absolute accuracy ε‖C‖.
                assert!((l - e).abs() <= 1e-13 * 16.0 + 1e-12 * e, "squared {squared}, k {k}: {l} vs {e}");
            }
            compare_dense(&a, &b, &vals, &v, 1e-12, f64::INFINITY);
        }
    }

    #[test]
    fn indefinite_matrix_with_a_valid_bound() {
        let a = random_band(80, 6, 11, 0.0);
        let b = random_diag(80, 12);
        let lb = gershgorin_lower(&a, &b);
        assert!(lb < 0.0);
        let (vals, v) = lowest(&a, &b, 15, lb).unwrap();
        compare_dense(&a, &b, &vals, &v, 1e-12, 1e-9);
    }

    /// Two copies of one block coupled by `coupling` at the junction.
    fn twin_blocks(m: usize, kd: usize, seed: u64, coupling: f64) -> SymBand {
        let block = random_band(m, kd, seed, kd as f64 + 1.5);
        let mut a = SymBand::zeros(2 * m, kd).unwrap();
        for j in 0..m {
            for i in j..(j + kd + 1).min(m) {
                a.add(i, j, block.get(i, j)).unwrap();
                a.add(i + m, j + m, block.get(i, j)).unwrap();
            }
        }
        a.add(m, m - 1, coupling).unwrap();
        a
    }

    #[test]
    fn near_degenerate_pairs_are_both_found() {
        // Each block level splits into a pair; the dense reference shows splittings of
        // 1e-10 … 1e-7 relative to ‖C‖ (asserted), and all members must be returned.
        let (m, kd) = (75, 10);
        let a = twin_blocks(m, kd, 21, 2e-3);
        let b = vec![1.0; 2 * m];
        let norm = c_norm(&a, &b);
        let (rv, _) = banded::lowest_dense(&a, &b, 12).unwrap();
        let splits: Vec<f64> = (0..6).map(|p| (rv[2 * p + 1] - rv[2 * p]) / norm).collect();
        assert!(splits.iter().all(|&s| s > 1e-11 && s < 1e-7), "splittings {splits:?}");
        let lb = gershgorin_lower(&a, &b);
        for count in [12, 11, 4] {
            let (vals, v, rep) = lowest_with_report(&a, &b, count, lb).unwrap();
            println!("near-degenerate count {count}: steps {:?}, margin {:e}", rep.steps, rep.margin);
            // Vectors of a pair split by 1e-8‖C‖ are determined only to ~ε‖C‖/split.
            compare_dense(&a, &b, &vals, &v, 1e-12, f64::INFINITY);
            for p in 0..count / 2 {
                let s = vals[2 * p + 1] - vals[2 * p];
                assert!((s - (rv[2 * p + 1] - rv[2 * p])).abs() < 1e-12 * norm, "pair {p}");
            }
        }
    }

    #[test]
    fn exactly_degenerate_blocks() {
        // Two decoupled identical blocks: every eigenvalue is exactly double. From a
        // random start, rounding seeds the second copies and one run may find them all.
        // From a start vector (u, u) symmetric across the blocks, the Krylov sequence
        // stays exactly symmetric (identical factors and operations on both halves), so
        // the first run sees one copy of each level only: the certificate must detect
        // the missing copies and the locked restart find them.
        let m = 45;
        let a = twin_blocks(m, 5, 21, 0.0);
        let b = vec![1.0; 2 * m];
        let norm = c_norm(&a, &b);
        let lb = gershgorin_lower(&a, &b);
        let mut rng = Rng::new(77);
        let half: Vec<f64> = (0..m).map(|_| rng.symmetric()).collect();
        let sym: Vec<f64> = half.iter().chain(&half).cloned().collect();
        for start in [None, Some(&sym[..])] {
            let (vals, v, rep) = lowest_impl(&a, &b, 12, lb, start).unwrap();
            println!("degenerate blocks, start {}: steps {:?}", if start.is_some() { "symmetric" } else { "random" }, rep.steps);
            if start.is_some() {
                assert!(rep.steps.len() >= 2, "steps {:?}", rep.steps);
            }
            compare_dense(&a, &b, &vals, &v, 1e-12, f64::INFINITY);
            for j in (0..12).step_by(2) {
                assert!((vals[j] - vals[j + 1]).abs() < 1e-12 * norm);
            }
        }
    }

    #[test]
    fn bad_lower_bound_is_refused_and_auto_falls_back() {
        let a = random_band(100, 6, 31, 7.5);
        let b = random_diag(100, 32);
        let (rv, _) = banded::lowest_dense(&a, &b, 5).unwrap();
        // Above λ_1, above λ_3: the Cholesky of C − σI fails.
        for lb in [rv[0] + 1e-6, 0.5 * (rv[2] + rv[3])] {
            assert!(lowest(&a, &b, 5, lb).is_err());
            let (vals, v) = banded::lowest_auto(&a, &b, 5, Some(lb)).unwrap();
            compare_dense(&a, &b, &vals, &v, 1e-12, 1e-10);
        }
        // A bound far below is valid but slow: either certified or refused, never wrong.
        if let Ok((vals, v)) = lowest(&a, &b, 5, -1e6) {
            compare_dense(&a, &b, &vals, &v, 1e-12, 1e-10);
        }
        assert!(lowest(&a, &b, 5, f64::NAN).is_err());
        assert!(lowest(&a, &b, 100, -100.0).is_err());
        assert!(lowest(&a, &b, 0, -100.0).is_err());
    }

    #[test]
    fn small_orders_exhaust_the_space() {
        // n barely above count: the Krylov space is the whole space.
        for (n, kd, count) in [(4, 1, 3), (9, 3, 6), (12, 11, 10)] {
            let a = random_band(n, kd, n as u64, kd as f64 + 1.5);
            let b = random_diag(n, 7);
            let lb = gershgorin_lower(&a, &b);
            let (vals, v) = lowest(&a, &b, count, lb).unwrap();
            compare_dense(&a, &b, &vals, &v, 1e-12, 1e-9);
        }
    }

    use crate::linalg::thread_time; // thread CPU time: timings on a shared machine

    /// Best over `blocks` blocks of the thread CPU time per call of `f` (ms).
    fn best_ms<T>(blocks: usize, reps: usize, mut f: impl FnMut() -> T) -> f64 {
        (0..blocks)
            .map(|_| {
                let c0 = thread_time();
                let t = std::time::Instant::now();
                for _ in 0..reps {
                    std::hint::black_box(f());
                }
                let wall = t.elapsed().as_secs_f64();
                let el = match (c0, thread_time()) {
                    (Some(a), Some(b)) => b - a,
                    _ => wall,
                };
                el / reps as f64 * 1e3
            })
            .fold(f64::INFINITY, f64::min)
    }

    /// Timings for the report (printed, not asserted):
    /// `cargo test --release --lib lanczos_timing -- --ignored --nocapture`.
    #[test]
    #[ignore]
    fn lanczos_timing() {
        println!("random SPD pencils, count = 10, thread CPU ms (best of 7 blocks)");
        println!("    n  kd | shift-invert  steps | lowest_auto (current) | dense full (faer) | max |Δλ|/‖C‖");
        for kd in [8, 10, 12] {
            for n in [120, 150, 200, 300] {
                let count = 10;
                let a = random_band(n, kd, 99, kd as f64 + 1.5);
                let b = random_diag(n, 98);
                let lb = gershgorin_lower(&a, &b);
                let (vals, _, rep) = lowest_with_report(&a, &b, count, lb).unwrap();
                let t_si = best_ms(7, 20, || lowest(&a, &b, count, lb).unwrap());
                let t_auto = best_ms(7, 5, || banded::lowest_auto(&a, &b, count, None).unwrap());
                let t_dense = best_ms(5, 3, || banded::lowest_dense(&a, &b, count).unwrap());
                let (rv, _) = banded::lowest_dense(&a, &b, count).unwrap();
                let norm = c_norm(&a, &b);
                let err = vals.iter().zip(&rv).map(|(x, y)| (x - y).abs()).fold(0.0, f64::max) / norm;
                println!("{n:5} {kd:3} | {t_si:12.3} {:>6?} | {t_auto:21.3} | {t_dense:17.3} | {err:.1e}", rep.steps);
            }
        }
    }
}
