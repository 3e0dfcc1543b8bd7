//! The lowest `count` eigenpairs of a dense real symmetric matrix without
//! computing the others: Householder tridiagonalisation (faer), bisection on
//! Sturm counts for the eigenvalues, inverse iteration for the eigenvectors of
//! the tridiagonal matrix, and one back-transformation of only `count` vectors.
//!
//! This is the classical route of LAPACK's `dstebz` + `dstein` (Wilkinson 1965,
//! *The Algebraic Eigenvalue Problem*, §5.41 (Sturm sequences) and §9.47
//! (inverse iteration); Golub & Van Loan 2013, §8.4.1–8.4.2). The full
//! divide-and-conquer eigensolver spends about as long on the eigenvectors of the
//! tridiagonal matrix and their back-transformation as on the tridiagonalisation;
//! for a few lowest states that half shrinks to O(N·count²).
//!
//! Every result is verified in the original space (‖A v − λ v‖ and ‖VᵀV − I‖,
//! O(N²·count)); the caller falls back to the full solver when the check fails.

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::evd::tridiag::{tridiag_in_place, tridiag_in_place_scratch, TridiagParams};
use faer::linalg::householder::{
    apply_block_householder_sequence_on_the_left_in_place_scratch,
    apply_block_householder_sequence_on_the_left_in_place_with_conj,
};
use faer::{Conj, Mat, MatRef, Par};

/// Residual and orthogonality bound of the verification, relative to
/// √N·max(|λ|, ‖T‖) (the same scale as the dense backward-error probe).
const VERIFY_TOL: f64 = 1e-11;

/// Shifts per Sturm-count pass of the multisection.
const LANES: usize = 8;

/// Subset path only when at most this fraction of the spectrum is wanted
/// (beyond it, divide and conquer on all pairs is as fast).
pub const MAX_FRACTION: usize = 4;

/// Lowest `count` eigenpairs (ascending, orthonormal columns) of `a`, read from
/// its lower triangle, or `None` when the verification fails (the caller then
/// uses the full solver).
pub fn lowest(a: MatRef<'_, f64>, count: usize, par: Par) -> Option<(Vec<f64>, Mat<f64>)> {
    if count == 0 || count > a.nrows() {
        return None;
    }
    let r = Reduction::new(a, par)?;
    let vals = r.lowest_values(count);
    let v = r.vectors(a, &vals, par)?;
    Some((vals, v))
}

/// A = Q T Qᵀ: the tridiagonal T and the Householder sequence Q (faer's
/// blocked tridiagonalisation), ready for eigenvalues and selected vectors.
pub struct Reduction {
    /// T on the diagonal and subdiagonal, Q's reflectors below the subdiagonal.
    trid: Mat<f64>,
    householder: Mat<f64>,
    tri: Tridiagonal,
}

impl Reduction {
    /// Tridiagonalise `a` (lower triangle read); `None` for N < 2 or non-finite T.
    pub fn new(a: MatRef<'_, f64>, par: Par) -> Option<Self> {
        let n = a.nrows();
        if n < 2 {
            return None;
        }
        let mut trid = Mat::<f64>::zeros(n, n);
        trid.copy_from_triangular_lower(a);
        let bs = faer::linalg::qr::no_pivoting::factor::recommended_block_size::<f64>(n, n);
        let mut householder = Mat::<f64>::zeros(bs, n - 1);
        let params: TridiagParams = faer::Auto::<f64>::auto();
        let mut mem = MemBuffer::new(tridiag_in_place_scratch::<f64>(n, par, params.into()));
        tridiag_in_place(trid.as_mut(), householder.as_mut(), par, MemStack::new(&mut mem), params.into());
        let d: Vec<f64> = (0..n).map(|i| trid[(i, i)]).collect();
        let e: Vec<f64> = (0..n - 1).map(|i| trid[(i + 1, i)]).collect();
        let tri = Tridiagonal::new(d, e);
        tri.norm.is_finite().then_some(Reduction { trid, householder, tri })
    }

    /// The `count` lowest eigenvalues, ascending (bisection; O(N·count)).
    pub fn lowest_values(&self, count: usize) -> Vec<f64> {
        self.tri.lowest_eigenvalues(count.min(self.tri.d.len()))
    }

    /// Orthonormal eigenvectors of `a` (the matrix reduced) for the lowest
    /// eigenvalues `vals` (a prefix of [`Reduction::lowest_values`]), or `None`
    /// when the verification in the original space fails.
    pub fn vectors(&self, a: MatRef<'_, f64>, vals: &[f64], par: Par) -> Option<Mat<f64>> {
        let n = a.nrows();
        let mut z = self.tri.eigenvectors(vals);
        let bs = self.householder.nrows();
        let mut mem = MemBuffer::new(apply_block_householder_sequence_on_the_left_in_place_scratch::<f64>(n - 1, bs, vals.len()));
        apply_block_householder_sequence_on_the_left_in_place_with_conj(
            self.trid.as_ref().submatrix(1, 0, n - 1, n - 1),
            self.householder.as_ref(),
            Conj::No,
            z.as_mut().subrows_mut(1, n - 1),
            par,
            MemStack::new(&mut mem),
        );
        verified(a, vals, &z, self.tri.norm).then_some(z)
    }
}

/// ‖A v_j − λ_j v_j‖ and |VᵀV − I| within [`VERIFY_TOL`]·√N·scale.
fn verified(a: MatRef<'_, f64>, vals: &[f64], v: &Mat<f64>, norm: f64) -> bool {
    let n = a.nrows();
    let k = vals.len();
    let av = super::dense::symmetric_lower_times(a, v.as_ref());
    let scale = VERIFY_TOL * (n as f64).sqrt() * vals.iter().fold(norm, |m, x| m.max(x.abs())).max(f64::MIN_POSITIVE);
    for j in 0..k {
        let r = (0..n).map(|i| (av[(i, j)] - vals[j] * v[(i, j)]).powi(2)).sum::<f64>().sqrt();
        if !(r <= scale) {
            return false;
        }
    }
    let g = v.transpose() * v;
    let otol = VERIFY_TOL * (n as f64).sqrt();
    (0..k).all(|j| (0..k).all(|i| (g[(i, j)] - if i == j { 1.0 } else { 0.0 }).abs() <= otol))
}

/// Symmetric tridiagonal T: diagonal `d` (N), off-diagonal `e` (N − 1).
pub(crate) struct Tridiagonal {
    d: Vec<f64>,
    e: Vec<f64>,
    /// e_i² (Sturm recurrence).
    e2: Vec<f64>,
    /// max_i (|d_i| + |e_{i−1}| + |e_i|) ≥ ‖T‖₂ (Gershgorin).
    pub(crate) norm: f64,
    /// Gershgorin interval [lo, hi] containing the spectrum.
    lo: f64,
    hi: f64,
    /// Smallest pivot magnitude allowed in the Sturm recurrence.
    pivmin: f64,
}

impl Tridiagonal {
    pub(crate) fn new(d: Vec<f64>, e: Vec<f64>) -> Self {
        let n = d.len();
        let radius = |i: usize| (if i > 0 { e[i - 1].abs() } else { 0.0 }) + (if i + 1 < n { e[i].abs() } else { 0.0 });
        let (mut lo, mut hi, mut norm) = (f64::INFINITY, f64::NEG_INFINITY, 0.0_f64);
        for (i, &di) in d.iter().enumerate() {
            let r = radius(i);
            lo = lo.min(di - r);
            hi = hi.max(di + r);
            norm = norm.max(di.abs() + r);
        }
        let e2: Vec<f64> = e.iter().map(|x| x * x).collect();
        let emax2 = e2.iter().cloned().fold(0.0, f64::max);
        let pivmin = f64::MIN_POSITIVE * emax2.max(1.0);
        // Widen so that the end points are strictly outside the spectrum.
        let pad = 2.0 * f64::EPSILON * norm * n as f64 + 2.0 * pivmin;
        Tridiagonal { d, e, e2, norm, lo: lo - pad, hi: hi + pad, pivmin }
    }

    // Number of eigenvalues strictly below x: the LDLᵀ pivots of T − xI
    // (Wilkinson 1965, §5.41); a zero pivot is replaced by −pivmin as in LAPACK `dlaebz`.
    /// Sturm counts at `LANES` shifts at once: the chains are independent, so
    /// their divisions overlap instead of waiting on each other's latency (AVX2
    /// code path selected at run time where available).
    fn count_below_lanes(&self, x: &[f64; LANES]) -> [usize; LANES] {
        #[cfg(target_arch = "x86_64")]
        {
            if std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma") {
                // SAFETY: the CPU supports the features the function was compiled for.
                return unsafe { sturm_lanes_avx(&self.d, &self.e2, self.pivmin, x) };
            }
        }
        sturm_lanes(&self.d, &self.e2, self.pivmin, x)
    }

    /// The `count` lowest eigenvalues, ascending, each bracketed to an interval
    /// of width ≤ 2ε·max(|lo|, |hi|) + pivmin (absolute accuracy O(ε‖T‖), as
    /// any backward-stable dense solver). Multisection: every pass splits the
    /// current bracket at `LANES` points, and each Sturm count tightens the
    /// brackets of all wanted eigenvalues (as LAPACK `dstebz` reuses counts).
    pub(crate) fn lowest_eigenvalues(&self, count: usize) -> Vec<f64> {
        let mut lower = vec![self.lo; count];
        let mut upper = vec![self.hi; count];
        let mut vals = Vec::with_capacity(count);
        for j in 0..count {
            // Invariant: count_below(lower[j]) ≤ j < count_below(upper[j]).
            loop {
                let (lo, hi) = (lower[j], upper[j]);
                let tol = 2.0 * f64::EPSILON * lo.abs().max(hi.abs()) + self.pivmin;
                if hi - lo <= tol {
                    break;
                }
                let step = (hi - lo) / (LANES + 1) as f64;
                let mut x = [0.0; LANES];
                for (l, xl) in x.iter_mut().enumerate() {
                    *xl = lo + step * (l + 1) as f64;
                }
                if x[0] <= lo || x[LANES - 1] >= hi {
                    // Bracket already at adjacent floating-point numbers.
                    break;
                }
                let c = self.count_below_lanes(&x);
                for l in 0..LANES {
                    for i in j..count {
                        if i < c[l] {
                            upper[i] = upper[i].min(x[l]);
                        } else {
                            lower[i] = lower[i].max(x[l]);
                        }
                    }
                }
            }
            vals.push(0.5 * (lower[j] + upper[j]));
        }
        vals
    }

    /// Orthonormal eigenvectors (N × k) for the eigenvalues `vals` (ascending) by
    /// inverse iteration with partial pivoting (LAPACK `dstein`'s scheme): close
    /// shifts are separated by 10ε|λ|, and vectors of eigenvalues closer than
    /// 10⁻³‖T‖ are Gram-Schmidt orthogonalised against each other every sweep.
    pub(crate) fn eigenvectors(&self, vals: &[f64]) -> Mat<f64> {
        let n = self.d.len();
        let k = vals.len();
        let mut z = Mat::<f64>::zeros(n, k);
        let cluster_gap = 1e-3 * self.norm;
        let eps_norm = f64::EPSILON * self.norm.max(f64::MIN_POSITIVE);
        let mut lu = BandLu::new(n);
        let mut x = vec![0.0; n];
        let mut rng = super::rng::Rng::new(0x2545_f491_4f6c_dd1d);
        let mut cluster_start = 0;
        let mut prev_shift = f64::NEG_INFINITY;
        for j in 0..k {
            if j > 0 && vals[j] - vals[j - 1] > cluster_gap {
                cluster_start = j;
            }
            let mut shift = vals[j];
            if j > cluster_start && shift - prev_shift < 10.0 * f64::EPSILON * shift.abs().max(eps_norm) {
                shift = prev_shift + 10.0 * f64::EPSILON * shift.abs().max(eps_norm);
            }
            prev_shift = shift;
            lu.factor(&self.d, &self.e, shift, eps_norm);
            for xi in x.iter_mut() {
                *xi = 0.5 * rng.symmetric();
            }
            // Residual of the normalised iterate is ≤ 1/growth; stop two sweeps
            // after it reaches the roundoff level (as dstein's extra iterations).
            let target = 1.0 / (10.0 * (n as f64).sqrt() * eps_norm);
            let mut extra = 0;
            for _ in 0..8 {
                let b = norm2(&x);
                for xi in x.iter_mut() {
                    *xi /= b;
                }
                lu.solve(&mut x);
                for p in cluster_start..j {
                    let c = (0..n).map(|i| z[(i, p)] * x[i]).sum::<f64>();
                    for i in 0..n {
                        x[i] -= c * z[(i, p)];
                    }
                }
                let growth = norm2(&x);
                if !growth.is_finite() {
                    break;
                }
                if growth >= target {
                    extra += 1;
                    if extra > 2 {
                        break;
                    }
                }
            }
            let b = norm2(&x);
            for i in 0..n {
                z[(i, j)] = x[i] / b;
            }
        }
        z
    }
}

/// Sturm counts of T = tridiag(e, d, e) (e2 = e²) at `LANES` shifts.
#[inline(always)]
fn sturm_lanes(d: &[f64], e2: &[f64], pivmin: f64, x: &[f64; LANES]) -> [usize; LANES] {
    let mut q = [0.0; LANES];
    let mut neg = [0.0_f64; LANES];
    for l in 0..LANES {
        q[l] = d[0] - x[l];
    }
    let mut i = 0;
    loop {
        for l in 0..LANES {
            if q[l].abs() < pivmin {
                q[l] = -pivmin;
            }
            neg[l] += if q[l] < 0.0 { 1.0 } else { 0.0 };
        }
        i += 1;
        if i == d.len() {
            return neg.map(|c| c as usize);
        }
        let (di, ei2) = (d[i], e2[i - 1]);
        for l in 0..LANES {
            q[l] = di - x[l] - ei2 / q[l];
        }
    }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn sturm_lanes_avx(d: &[f64], e2: &[f64], pivmin: f64, x: &[f64; LANES]) -> [usize; LANES] {
    sturm_lanes(d, e2, pivmin, x)
}

/// LU factors of T − σI with partial pivoting (U has two superdiagonals).
struct BandLu {
    u0: Vec<f64>,
    u1: Vec<f64>,
    u2: Vec<f64>,
    l: Vec<f64>,
    swap: Vec<bool>,
}

impl BandLu {
    fn new(n: usize) -> Self {
        BandLu { u0: vec![0.0; n], u1: vec![0.0; n], u2: vec![0.0; n], l: vec![0.0; n], swap: vec![false; n] }
    }

    /// Factor T − σI; zero pivots are replaced by `tiny` (standard for inverse
    /// iteration: the solve then yields a huge, still correctly directed vector).
    fn factor(&mut self, d: &[f64], e: &[f64], sigma: f64, tiny: f64) {
        let n = d.len();
        // The current row i holds (a, b) at columns (i, i+1); its column i+2 is zero
        // (neither row i nor row i+1 of T reaches two columns further).
        let mut a = d[0] - sigma;
        let mut b = if n > 1 { e[0] } else { 0.0 };
        for i in 0..n {
            if i + 1 == n {
                self.swap[i] = false;
                self.u0[i] = if a == 0.0 { tiny } else { a };
                self.u1[i] = 0.0;
                self.u2[i] = 0.0;
                break;
            }
            // Row i+1 holds (e_i, d_{i+1} − σ, e_{i+1}) at columns (i, i+1, i+2).
            let next = (e[i], d[i + 1] - sigma, if i + 2 < n { e[i + 1] } else { 0.0 });
            let current = (a, b, 0.0);
            // Partial pivoting: the row with the larger entry in column i is the pivot row.
            self.swap[i] = next.0.abs() > a.abs();
            let (pivot, other) = if self.swap[i] { (next, current) } else { (current, next) };
            let piv = if pivot.0 == 0.0 { tiny } else { pivot.0 };
            let m = other.0 / piv;
            self.l[i] = m;
            self.u0[i] = piv;
            self.u1[i] = pivot.1;
            self.u2[i] = pivot.2;
            a = other.1 - m * pivot.1;
            b = other.2 - m * pivot.2;
        }
    }

    /// x ← (T − σI)⁻¹ x.
    fn solve(&self, x: &mut [f64]) {
        let n = x.len();
        for i in 0..n.saturating_sub(1) {
            if self.swap[i] {
                x.swap(i, i + 1);
            }
            x[i + 1] -= self.l[i] * x[i];
        }
        for i in (0..n).rev() {
            let mut s = x[i];
            if i + 1 < n {
                s -= self.u1[i] * x[i + 1];
            }
            if i + 2 < n {
                s -= self.u2[i] * x[i + 2];
            }
            x[i] = s / self.u0[i];
        }
    }
}

fn norm2(x: &[f64]) -> f64 {
    // Scaled to avoid overflow of huge inverse-iteration growth.
    let m = x.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
    if m == 0.0 || !m.is_finite() {
        return m;
    }
    m * x.iter().map(|v| (v / m) * (v / m)).sum::<f64>().sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn second_difference_matrix_lowest_pairs() {
        // Tridiagonal (2, −1): λ_k = 2 − 2cos(kπ/(n+1)), v_k(i) ∝ sin(ikπ/(n+1))
        // (Strang, Linear Algebra, "second differences").
        let n = 300;
        let t = Tridiagonal::new(vec![2.0; n], vec![-1.0; n - 1]);
        let vals = t.lowest_eigenvalues(12);
        let z = t.eigenvectors(&vals);
        for k in 0..12 {
            let th = ((k + 1) as f64) * std::f64::consts::PI / (n as f64 + 1.0);
            assert!((vals[k] - (2.0 - 2.0 * th.cos())).abs() < 1e-14, "k={k}");
            let s: Vec<f64> = (0..n).map(|i| (((i + 1) as f64) * th).sin()).collect();
            let ns = norm2(&s);
            let dot = (0..n).map(|i| z[(i, k)] * s[i] / ns).sum::<f64>();
            assert!((dot.abs() - 1.0).abs() < 1e-12, "k={k} overlap {dot}");
        }
    }

    #[test]
    fn matches_full_solver_on_a_dense_matrix_with_a_near_degenerate_pair() {
        // Two decoupled copies of the same block: every eigenvalue is exactly
        // doubled, the hardest case for inverse iteration (orthogonality).
        let m = 40;
        let block = Mat::from_fn(m, m, |i, j| 1.0 / (1.0 + (i as f64 - j as f64).powi(2)) + if i == j { i as f64 * 0.1 } else { 0.0 });
        let n = 2 * m;
        let a = Mat::from_fn(n, n, |i, j| if (i < m) == (j < m) { block[(i % m, j % m)] } else { 0.0 });
        let (vals, v) = lowest(a.as_ref(), 10, Par::Seq).expect("verified");
        let (all, _) = super::super::dense::eigh(a.as_ref(), Par::Seq).unwrap();
        for j in 0..10 {
            assert!((vals[j] - all[j]).abs() < 1e-13, "j={j}");
        }
        let g = v.transpose() * &v;
        for i in 0..10 {
            for j in 0..10 {
                assert!((g[(i, j)] - if i == j { 1.0 } else { 0.0 }).abs() < 1e-12);
            }
        }
    }
}
