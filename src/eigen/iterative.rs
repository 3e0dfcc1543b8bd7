//! The matrix-free path: a [`DiscreteProblem`] handed to LOBPCG as operators, its
//! preconditioner, the round-off floor of the tolerance, and the coarse-grid start.

use super::SolveOptions;
use crate::error::Result;
use crate::linalg::lobpcg::{default_block_extra, lobpcg, IterativeOptions, SymmetricOperator};
use crate::problem::DiscreteProblem;
use faer::Mat;

/// Multiple of ε‖H‖ below which the iterative tolerance is not pushed.
pub const ROUNDOFF_FACTOR: f64 = 64.0;

/// Coarse problems of the cascade up to this size are solved densely.
const COARSE_DENSE_MAX: usize = 256;
/// Iteration limit on coarse levels (a failed coarse level only costs its time:
/// the fine solve then starts from random vectors).
const COARSE_MAX_ITER: usize = 200;

/// A of a problem as an operator.
struct OperatorA<'a>(&'a dyn DiscreteProblem);

impl SymmetricOperator for OperatorA<'_> {
    fn dim(&self) -> usize {
        self.0.dim()
    }
    fn apply(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        self.0.apply_a(x, y, ncols)
    }
}

/// B of a generalized problem as an operator.
struct OperatorB<'a>(&'a dyn DiscreteProblem);

impl SymmetricOperator for OperatorB<'_> {
    fn dim(&self) -> usize {
        self.0.dim()
    }
    fn apply(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        self.0.apply_b(x, y, ncols)
    }
}

/// Warm start for `k` vectors from the same problem on a coarser basis
/// ([`DiscreteProblem::coarsened`], at least max(128, 8k) functions): solved densely up
/// to [`COARSE_DENSE_MAX`], by this cascade again above, then interpolated (cascadic
/// multigrid for eigenproblems, cf. Bornemann & Deuflhard 1996). Smooth low states
/// are resolved on the coarse level already, so LOBPCG starts next to its answer;
/// for rough potentials the start is merely no worse than random. `None` when the
/// problem cannot be coarsened or the coarse solve fails.
fn coarse_start(p: &dyn DiscreteProblem, k: usize, opts: &SolveOptions) -> Option<Vec<f64>> {
    let coarse = p.coarsened((8 * k).max(128))?;
    let cp = coarse.problem.as_ref();
    let vectors: Mat<f64> = if cp.dim() <= COARSE_DENSE_MAX {
        super::dense_lowest(cp, k, faer::Par::Seq).ok()?.1
    } else {
        let mut oc = SolveOptions::new(k);
        oc.tol = opts.tol.max(1e-8);
        oc.max_iter = Some(COARSE_MAX_ITER);
        oc.seed = opts.seed;
        solve(cp, &oc).ok()?.vectors
    };
    let mut out = Vec::with_capacity(p.dim() * k);
    for j in 0..vectors.ncols() {
        let col: Vec<f64> = vectors.col(j).iter().copied().collect();
        out.extend((coarse.interpolate)(&col));
    }
    Some(out)
}

/// What the matrix-free path returns.
pub struct Solution {
    pub energies: Vec<f64>,
    /// N × count, B-orthonormal, signs not yet fixed.
    pub vectors: Mat<f64>,
    pub iterations: usize,
    /// Column-major guard vectors ([`crate::linalg::lobpcg::IterativeResult::guards`]),
    /// a warm start for a nearby problem.
    pub guards: Vec<f64>,
}

/// Lowest eigenpairs of `p` by LOBPCG.
pub fn solve(p: &dyn DiscreteProblem, opts: &SolveOptions) -> Result<Solution> {
    let n = p.dim();
    let mut io = IterativeOptions::new(opts.count);
    // Residuals cannot drop below round-off, about ε‖H‖: a tighter `tol` is raised to
    // that floor (energies are still accurate to ~residual²/gap; `residuals` report the truth).
    io.tol = opts.tol.max(ROUNDOFF_FACTOR * f64::EPSILON * p.norm_estimate());
    io.seed = opts.seed;
    io.initial = opts.initial.clone();
    io.block_extra = default_block_extra(opts.count).min(n - opts.count);
    io.max_iter = opts.max_iter.unwrap_or(1000);
    if io.initial.is_none() {
        io.initial = coarse_start(p, opts.count + io.block_extra, opts);
    }
    let a = OperatorA(p);
    let b = OperatorB(p);
    let b = if p.structure().generalized { Some(&b as &dyn SymmetricOperator) } else { None };
    let pc = p.preconditioner();
    let res = lobpcg(&a, b, pc.as_deref(), &io)?;
    let vectors = crate::linalg::from_column_major(&res.vectors, n, opts.count);
    Ok(Solution { energies: res.energies, vectors, iterations: res.iterations, guards: res.guards })
}
