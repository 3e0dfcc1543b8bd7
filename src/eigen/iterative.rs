//! The matrix-free path: a [`DiscreteProblem`] handed to LOBPCG as operators, its
//! preconditioner, the round-off floor of the tolerance, and the multilevel start.
//!
//! # Multilevel start (cascadic multigrid for eigenproblems, Bornemann & Deuflhard 1996)
//! Without a warm start, the problem is first solved on the coarsest basis
//! [`DiscreteProblem::coarsened`] offers with at least max([`COARSE_MIN`], 8m) functions
//! (m = wanted + guard vectors; densely up to [`COARSE_DENSE_MAX`]), then on bases twice
//! as large in turn, each level started from the previous level's vectors (guards
//! included) interpolated onto it and iterated to its own tolerance (the rule below).
//! When a level's start already meets its tolerance (zero LOBPCG steps), the states are
//! resolved on the level below: the remaining levels would only reproduce them, and the
//! cascade jumps to the full basis. On smooth problems this level is reached at a size
//! set by the physics (the wavelengths of the wanted states), not by N, so the fine solve
//! starts from converged vectors and costs a few products: total cost ∝ N log N. Each
//! level runs at most [`LEVEL_MAX_ITER`] steps and hands on its best iterate if it
//! stops short; the full basis is always iterated to the full tolerance, so a poor
//! start (rough potentials, whose states are never resolved on a coarse grid) costs
//! iterations, never accuracy.
//!
//! # Tolerance rule
//! Every level, the full basis included, is iterated to
//! `tol_eff = max(tol, ROUNDOFF_FACTOR · ε · ‖H_level‖)`: residuals cannot drop much
//! below ε‖H‖ (round-off of the product). The coarse levels' floors are lower than the
//! fine one (‖H‖ grows with the grid), so their vectors arrive on the full basis with
//! residuals well below its tolerance.

use super::SolveOptions;
use crate::error::Result;
use crate::linalg::lobpcg::{default_block_extra, lobpcg, lobpcg_with_start, IterativeOptions, IterativeResult, SymmetricOperator};
use crate::problem::DiscreteProblem;
use faer::Mat;

/// Multiple of ε‖H‖ below which the iterative tolerance is not pushed.
pub const ROUNDOFF_FACTOR: f64 = 64.0;

/// Smallest coarsest level of the multilevel start (also at least 8 functions per
/// block vector).
pub const COARSE_MIN: usize = 128;
/// Coarse levels up to this size are solved densely.
pub const COARSE_DENSE_MAX: usize = 256;
/// Iteration limit on intermediate levels (a level that stops short hands its best
/// iterate to the next one).
pub const LEVEL_MAX_ITER: usize = 100;

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

/// The tolerance of `p` for a requested `tol` (see the module docs).
pub fn effective_tol(p: &dyn DiscreteProblem, tol: f64) -> f64 {
    tol.max(ROUNDOFF_FACTOR * f64::EPSILON * p.norm_estimate())
}

/// LOBPCG on `p` with its own operators and preconditioner, from `start` (consumed)
/// or else `io.initial`.
fn run(p: &dyn DiscreteProblem, io: &IterativeOptions, start: Option<Vec<f64>>) -> Result<IterativeResult> {
    let a = OperatorA(p);
    let b = OperatorB(p);
    let b = if p.structure().generalized { Some(&b as &dyn SymmetricOperator) } else { None };
    let pc = p.preconditioner();
    match start {
        Some(s) => lobpcg_with_start(&a, b, pc.as_deref(), io, s),
        None => lobpcg(&a, b, pc.as_deref(), io),
    }
}

/// What the multilevel start hands to the full basis.
struct Start {
    /// m = count + block_extra column-major vectors on the full basis.
    block: Vec<f64>,
    /// (basis size, LOBPCG steps) of every coarse level visited, coarsest first (0
    /// steps for a dense level).
    levels: Vec<(usize, usize)>,
}

/// The multilevel start of the module docs: `m` vectors on `p`'s basis, `None` when
/// the problem cannot be coarsened or the coarsest solve fails.
fn multilevel_start(p: &dyn DiscreteProblem, io: &IterativeOptions) -> Option<Start> {
    let n = p.dim();
    let m = io.count + io.block_extra;
    let coarsest = p.coarsened(COARSE_MIN.max(8 * m))?;
    let d0 = coarsest.problem.dim();
    if d0 >= n || d0 < m + 1 {
        return None;
    }
    let mut block: Vec<f64> = if d0 <= COARSE_DENSE_MAX {
        let (_, v) = super::dense_lowest(coarsest.problem.as_ref(), m, faer::Par::Seq).ok()?;
        crate::linalg::column_major(&v)
    } else {
        let mut o = io.clone();
        o.tol = effective_tol(coarsest.problem.as_ref(), io.tol);
        o.max_iter = LEVEL_MAX_ITER.min(io.max_iter);
        o.accept_unconverged = true;
        o.initial = None;
        let r = run(coarsest.problem.as_ref(), &o, None).ok()?;
        [r.vectors, r.guards].concat()
    };
    let mut level = coarsest;
    let mut levels = vec![(d0, 0)];
    let level_max_iter = LEVEL_MAX_ITER.min(io.max_iter);
    loop {
        let d = level.problem.dim();
        if 2 * d >= n {
            break;
        }
        let next = match p.coarsened(2 * d) {
            Some(c) if c.problem.dim() > d && c.problem.dim() < n => c,
            _ => break,
        };
        let Some(to_next) = next.problem.coarsened(d) else { break };
        let mut o = io.clone();
        o.tol = effective_tol(next.problem.as_ref(), io.tol);
        o.max_iter = level_max_iter;
        o.accept_unconverged = true;
        o.initial = None;
        let start = (to_next.interpolate)(&block, m);
        let Ok(r) = run(next.problem.as_ref(), &o, Some(start)) else { break };
        levels.push((next.problem.dim(), r.iterations));
        let resolved = r.iterations == 0 && r.residuals.iter().all(|&x| x <= o.tol);
        block = [r.vectors, r.guards].concat();
        level = next;
        if resolved {
            break;
        }
    }
    Some(Start { block: (level.interpolate)(&block, m), levels })
}

/// What the matrix-free path returns.
pub struct Solution {
    pub energies: Vec<f64>,
    /// N × count, B-orthonormal, signs not yet fixed.
    pub vectors: Mat<f64>,
    /// ‖Aψ − EBψ‖ per state (absolute), from products recomputed explicitly at the end
    /// of the iteration (see [`crate::linalg::lobpcg::IterativeResult::residuals`]).
    pub residuals: Vec<f64>,
    /// LOBPCG steps on the full basis (the multilevel start's coarse levels not counted:
    /// see `levels`).
    pub iterations: usize,
    /// (basis size, LOBPCG steps) of the coarse levels of the multilevel start.
    pub levels: Vec<(usize, usize)>,
    /// Column-major guard vectors ([`crate::linalg::lobpcg::IterativeResult::guards`]),
    /// a warm start for a nearby problem.
    pub guards: Vec<f64>,
}

/// Lowest eigenpairs of `p` by LOBPCG (multilevel start unless `opts.initial` is given).
pub fn solve(p: &dyn DiscreteProblem, opts: &SolveOptions) -> Result<Solution> {
    let n = p.dim();
    let mut io = IterativeOptions::new(opts.count);
    // Residuals cannot drop below round-off, about ε‖H‖: a tighter `tol` is raised to
    // that floor (energies are still accurate to ~residual²/gap; `residuals` report the truth).
    io.tol = effective_tol(p, opts.tol);
    io.seed = opts.seed;
    io.initial = opts.initial.clone();
    io.block_extra = default_block_extra(opts.count).min(n - opts.count);
    io.max_iter = opts.max_iter.unwrap_or(1000);
    let mut levels = Vec::new();
    let mut start = None;
    if io.initial.is_none() {
        let mut lo = io.clone();
        lo.tol = opts.tol; // each level applies its own floor
        if let Some(s) = multilevel_start(p, &lo) {
            start = Some(s.block);
            levels = s.levels;
        }
    }
    let res = run(p, &io, start)?;
    let vectors = crate::linalg::from_column_major(&res.vectors, n, opts.count);
    drop(res.vectors);
    let residuals = res.residuals.iter().zip(&res.energies).map(|(r, e)| r * e.abs().max(1.0)).collect();
    Ok(Solution { energies: res.energies, vectors, residuals, iterations: res.iterations, levels, guards: res.guards })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::{BasisRef, FourierGrid};
    use crate::model::units::Units;
    use crate::problem::{Hamiltonian, Mass};
    use std::sync::Arc;

    /// The quartic double well of issue 19, V = 0.05 (x² − 9)², on [−50, 50) with n points
    /// (natural units, m = 1: ħ²/2m = 1/2).
    fn double_well(n: usize) -> Hamiltonian {
        let g = Arc::new(FourierGrid::new(-50.0, 50.0, n).unwrap());
        let v: Vec<f64> = g.x().iter().map(|x| 0.05 * (x * x - 9.0).powi(2)).collect();
        Hamiltonian::new(BasisRef::Fourier(g), v, Mass::Uniform(1.0), Units::Natural).unwrap()
    }

    // Energies against an independent construction: the dense eigendecomposition (faer
    // self_adjoint_eigen) of the same grid matrix. The multilevel start must not change
    // what is converged to: Bauer-Fike bounds |E − E_dense| by the residual, and the
    // residual tolerance here is the round-off floor 64 ε ‖H‖ (‖H‖ ≈ 3·10⁵, the well's
    // value at the box edge), so 1e-9 relative to max(1, |E|) is asserted.
    #[test]
    fn multilevel_matches_dense_same_matrix() {
        let h = double_well(2048);
        let p = h.problem();
        let dense = p.dense_a().self_adjoint_eigen(faer::Side::Lower).unwrap();
        let ev = dense.S().column_vector();
        for k in [5usize, 12] {
            let s = solve(p, &SolveOptions::new(k)).unwrap();
            assert!(!s.levels.is_empty(), "no multilevel start taken");
            for i in 0..k {
                let e = ev[i];
                assert!((s.energies[i] - e).abs() <= 1e-9 * e.abs().max(1.0), "k = {k}, state {i}: {} vs dense {e}", s.energies[i]);
            }
        }
    }

    // The property issue 19 asks for: for a fixed physical problem the LOBPCG steps on
    // the full grid do not grow with N. From N = 2^13 to 2^15 the cascade resolves the
    // states on a level set by the physics, so the full grid should need (almost) no
    // steps (a start that missed the fine grid took 300-430 steps with the former
    // preconditioner, issue 19's table). The coarse levels visited must also be the same
    // list at every N, and the reported residuals must meet the documented tolerance.
    #[test]
    fn full_grid_steps_do_not_grow_with_n() {
        let mut seen = Vec::new();
        for n in [1usize << 13, 1 << 14, 1 << 15] {
            let h = double_well(n);
            let s = solve(h.problem(), &SolveOptions::new(5)).unwrap();
            assert!(s.iterations <= 3, "N = {n}: {} full-grid steps, levels {:?}", s.iterations, s.levels);
            let tol = effective_tol(h.problem(), 1e-10);
            for (r, e) in s.residuals.iter().zip(&s.energies) {
                assert!(*r <= tol * e.abs().max(1.0) * (1.0 + 1e-12), "N = {n}: residual {r:e} above {tol:e}");
            }
            seen.push(s.levels);
        }
        assert!(seen.windows(2).all(|w| w[0] == w[1]), "levels differ between sizes: {seen:?}");
    }
}
