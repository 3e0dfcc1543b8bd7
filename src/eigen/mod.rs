//! Eigenstates of a [`Hamiltonian`]: the method choice, the dense and the matrix-free
//! paths, the sign convention (applied once, by the basis) and the [`Spectrum`].
//!
//! The choice reads properties of the problem ([`DiscreteProblem::structure`], its
//! size and the number of states), never the basis type.

pub mod iterative;
pub mod stack;

use crate::basis::{fix_signs, BasisRef};
use crate::error::{check_memory, Error, InputError, NumericalError, Result};
use crate::linalg::dense::{lowest_of_blocks, lowest_of_matrix, par_for_dim};
use crate::linalg::{column_major, generalized};
use crate::model::units::Units;
use crate::problem::{DiscreteProblem, Hamiltonian, Mass};
use faer::Mat;
use std::sync::Arc;

/// Dense is used up to this size; above it, `method="auto"` goes matrix-free on
/// problems with a fast (FFT) product when `count` is small (see [`auto_choice`]).
pub const AUTO_DENSE_MAX: usize = 512;

/// How to diagonalise. Parsed from a string only at the Python edge.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// Dense for small problems, iterative for large grids (see [`auto_choice`]).
    Auto,
    /// Full dense symmetric eigensolver (faer), O(N³) time, O(N²) memory.
    Dense,
    /// Matrix-free LOBPCG with a kinetic-energy preconditioner, O(N·count) memory.
    Iterative,
}

impl Method {
    /// Option strings and their methods (the one place the names live).
    pub const TABLE: [(&'static str, Method); 3] =
        [("auto", Method::Auto), ("dense", Method::Dense), ("iterative", Method::Iterative)];

    pub fn parse(s: &str) -> std::result::Result<Self, InputError> {
        crate::error::parse_choice("method", s, &Self::TABLE)
    }

    pub fn name(self) -> &'static str {
        crate::error::choice_name(&Self::TABLE, self)
    }

    /// The concrete method `Auto` picks for `p` and `count`.
    pub fn resolve(self, p: &dyn DiscreteProblem, count: usize) -> Method {
        match self {
            Method::Auto => auto_choice(p, count),
            m => m,
        }
    }
}

/// The rule of `method="auto"`: matrix-free LOBPCG when the problem has a fast
/// (FFT) product, more than [`AUTO_DENSE_MAX`] functions and at most a quarter of
/// the spectrum is wanted; dense otherwise. Measured (10 states, quartic well): dense
/// 3/15/80/220 ms at N = 256/512/1024/1536, iterative 0.7/0.9/1.3/2.1 ms; on rough
/// potentials (steps) iterative and dense cost about the same at 513 points.
pub fn auto_choice(p: &dyn DiscreteProblem, count: usize) -> Method {
    let n = p.dim();
    if p.structure().fast_apply && n > AUTO_DENSE_MAX && 4 * count <= n {
        Method::Iterative
    } else {
        Method::Dense
    }
}

/// Batches start matrix-free above this size: each item is warm-started from its
/// neighbours' vectors, so an item costs a few LOBPCG steps (see [`batch_auto_choice`]).
/// Measured (200-field sweep of a harmonic well, 5 states, 2 cores): dense/iterative
/// 34/44 ms at N = 48, 57/40 ms at 64, 105/39 ms at 96, 5.9 s/0.15 s at 512.
pub const BATCH_AUTO_DENSE_MAX: usize = 56;

/// The rule of `method="auto"` in [`solve_batch`]: as [`auto_choice`], but matrix-free
/// from [`BATCH_AUTO_DENSE_MAX`] functions, because the sweep's warm starts make each
/// item far cheaper than a cold iterative solve.
pub fn batch_auto_choice(p: &dyn DiscreteProblem, count: usize) -> Method {
    let n = p.dim();
    if p.structure().fast_apply && n > BATCH_AUTO_DENSE_MAX && 4 * count <= n {
        Method::Iterative
    } else {
        Method::Dense
    }
}

/// Options of [`solve`].
#[derive(Debug, Clone)]
pub struct SolveOptions {
    pub count: usize,
    pub method: Method,
    /// Tolerance on the residual ‖Hψ − Eψ‖ ≤ tol·max(1, |E|) (iterative path).
    pub tol: f64,
    /// Iteration limit of the iterative path (`None`: a default that grows with count).
    pub max_iter: Option<usize>,
    /// Warm start: column-major N×k block of previous eigenvectors (iterative path).
    pub initial: Option<Vec<f64>>,
    /// Seed of the random start block (iterative path).
    pub seed: u64,
}

impl SolveOptions {
    pub fn new(count: usize) -> Self {
        SolveOptions { count, method: Method::Auto, tol: 1e-10, max_iter: None, initial: None, seed: 0x5eed }
    }
}

/// The lowest eigenpairs of a Hamiltonian.
///
/// * `energies` ascending, in the energy unit of the Hamiltonian's units;
/// * `vectors` (N × count): orthonormal (B-orthonormal for heterostructures)
///   coefficient vectors in the basis; the sign of each is fixed by [`fix_signs`]
///   (positive in the leftmost region where |ψ| exceeds 1 % of its maximum);
/// * `residuals`: ‖Hψ − EBψ‖ (coefficient 2-norm), energy units;
/// * `attainable`: the relative accuracy round-off allows each level,
///   ε‖H‖/max(|E_i|, E_max − E_min, E_unit) (a backward-stable solve perturbs H by ~ε‖H‖;
///   see [`attainable_accuracy`]);
/// * `method`: the method that produced the pairs (`Dense` also when the automatic
///   choice started iteratively and finished densely; `note` then says why).
#[derive(Debug, Clone)]
pub struct Spectrum {
    pub hamiltonian: Arc<Hamiltonian>,
    pub energies: Vec<f64>,
    pub vectors: Mat<f64>,
    pub residuals: Vec<f64>,
    pub method: Method,
    /// LOBPCG steps on the full basis (0 for dense).
    pub iterations: usize,
    /// (basis size, LOBPCG steps) of each coarse level of the iterative path's
    /// multilevel start, coarsest first (solved densely: 0 steps); empty otherwise.
    pub levels: Vec<(usize, usize)>,
    pub attainable: Vec<f64>,
    pub note: Option<String>,
    /// Per-level error estimates (energy units) of a self-converged solve ([`stack`]).
    pub errors: Option<Vec<f64>>,
    /// Per level: below both cladding band edges of a layered structure.
    pub bound: Option<Vec<bool>>,
}

/// Levels whose attainable relative accuracy is worse than this carry an accuracy
/// warning: round-off then limits them to fewer than 8 significant digits.
pub const ACCURACY_WARN: f64 = 1e-8;

/// ε‖H‖/max(|E_i|, E_max − E_min, E_unit) per level (see [`Spectrum::attainable`]);
/// E_unit is the problem's [`DiscreteProblem::energy_scale`], so a level at E ≈ 0
/// (a free particle's) is judged against the kinetic quantum, not against zero.
pub fn attainable_accuracy(p: &dyn DiscreteProblem, energies: &[f64]) -> Vec<f64> {
    let lo = energies.iter().cloned().fold(f64::INFINITY, f64::min);
    let hi = energies.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
    let floor = (hi - lo).max(0.0).max(p.energy_scale()).max(f64::MIN_POSITIVE);
    let norm = p.norm_estimate();
    energies.iter().map(|e| f64::EPSILON * norm / e.abs().max(floor)).collect()
}

impl Spectrum {
    /// A spectrum from stored parts (e.g. a file), validated: `vectors` N × count with
    /// N the Hamiltonian's dimension, as many finite energies and residuals as vectors.
    pub fn from_parts(
        hamiltonian: Arc<Hamiltonian>,
        energies: Vec<f64>,
        vectors: Mat<f64>,
        residuals: Vec<f64>,
        method: Method,
        iterations: usize,
        errors: Option<Vec<f64>>,
    ) -> std::result::Result<Self, InputError> {
        let n = hamiltonian.size();
        let k = energies.len();
        if k == 0 || vectors.ncols() != k || vectors.nrows() != n {
            return Err(InputError::range(
                "vectors",
                format!("an array of shape ({k}, {n}) (one row per energy, one column per basis function), k >= 1"),
                format!("({}, {})", vectors.ncols(), vectors.nrows()),
            ));
        }
        if residuals.len() != k {
            return Err(InputError::Length { argument: "residuals".into(), expected: k, got: residuals.len() });
        }
        crate::error::check_finite("energies", &energies)?;
        crate::error::check_finite("residuals", &residuals)?;
        crate::error::check_finite("vectors", &column_major(&vectors))?;
        if let Some(e) = &errors {
            if e.len() != k {
                return Err(InputError::Length { argument: "errors".into(), expected: k, got: e.len() });
            }
        }
        let attainable = attainable_accuracy(hamiltonian.problem(), &energies);
        let bound = hamiltonian.stack().map(|s| {
            let (l, r) = s.cladding_edges();
            energies.iter().map(|&e| e < l.min(r)).collect()
        });
        Ok(Spectrum { hamiltonian, energies, vectors, residuals, method, iterations, attainable, levels: Vec::new(), note: None, errors, bound })
    }

    pub fn count(&self) -> usize {
        self.energies.len()
    }

    /// A warning when round-off limits some level to fewer than 8 significant digits
    /// ([`ACCURACY_WARN`]), naming the levels, the norm and what to do.
    pub fn accuracy_warning(&self) -> Option<String> {
        let bad: Vec<usize> = (0..self.count()).filter(|&i| self.attainable[i] > ACCURACY_WARN).collect();
        if bad.is_empty() {
            return None;
        }
        let worst = bad.iter().map(|&i| self.attainable[i]).fold(0.0, f64::max);
        Some(format!(
            "round-off limits levels {bad:?} to a relative accuracy of about {worst:.1e}: ‖H‖ ≈ {:.2e} dwarfs the energies. \
             Typical causes: a HermiteBasis whose quadrature nodes reach a steep wall (Morse, exponential or hard walls) \
             or a grid box far larger than the states need. Shrink the box or the basis, or use an ElementBasis with a breakpoint at the wall.",
            self.hamiltonian.norm_estimate()
        ))
    }
    pub fn basis(&self) -> &BasisRef {
        self.hamiltonian.basis()
    }
    pub fn units(&self) -> Units {
        self.hamiltonian.units()
    }
    pub fn mass(&self) -> &Mass {
        self.hamiltonian.mass()
    }
    /// ψ_n(x_i) for all states, `x.len() × count`, normalised ∫|ψ|² dx = 1.
    pub fn wavefunctions(&self, x: &[f64]) -> std::result::Result<Mat<f64>, InputError> {
        self.basis().as_dyn().evaluate(self.vectors.as_ref(), x)
    }
}

/// Validate `count` against the basis size.
pub fn check_count(count: usize, size: usize) -> std::result::Result<(), InputError> {
    if count == 0 || count > size {
        return Err(InputError::range("count", format!("an integer in [1, {size}] (the basis size)"), count));
    }
    Ok(())
}

/// Validate `tol`.
pub fn check_tol(tol: f64) -> std::result::Result<(), InputError> {
    if !(tol.is_finite() && tol > 0.0 && tol < 1.0) {
        return Err(InputError::range("tol", "a finite number in (0, 1)", tol));
    }
    Ok(())
}

/// Residual norms ‖A v_j − E_j B v_j‖ of the columns of `vectors`.
pub fn residuals(p: &dyn DiscreteProblem, energies: &[f64], vectors: &Mat<f64>) -> Vec<f64> {
    let n = vectors.nrows();
    let k = vectors.ncols();
    let x = column_major(vectors);
    let mut y = vec![0.0; n * k];
    p.apply_a(&x, &mut y, k);
    let mut bx = vec![0.0; n * k];
    p.apply_b(&x, &mut bx, k);
    (0..k)
        .map(|j| (0..n).map(|i| (y[j * n + i] - energies[j] * bx[j * n + i]).powi(2)).sum::<f64>().sqrt())
        .collect()
}

/// Lowest `count` eigenpairs of a problem from its dense matrices: the generalized
/// reduction when B ≠ I, the symmetry blocks when the problem has them, the subset or
/// full dense solver otherwise. Refuses up front (before allocating) when the
/// matrices would not fit in memory.
pub fn dense_lowest(p: &dyn DiscreteProblem, count: usize, par: faer::Par) -> Result<(Vec<f64>, Mat<f64>)> {
    // Banded pencils never form N×N arrays beyond the dense subset solver's below
    // banded::DENSE_BELOW (≤ 1.3 MB): no memory check, which reads /proc/meminfo on
    // every call (a file read per eigensolve, in the inner loop of stack sweeps).
    if let Some(band) = p.band() {
        let (mut e, v) = crate::linalg::banded::lowest_auto(band.a, band.b, count, band.lower_bound)?;
        if let Some(q) = p.rayleigh_quotients(v.as_ref()) {
            e = q;
        }
        return Ok((e, v));
    }
    let n = p.dim() as u64;
    let generalized = p.structure().generalized;
    // Matrix, eigenvectors and workspace: about three N×N arrays (five with B).
    check_memory(
        "method",
        (if generalized { 5 } else { 3 }) * n * n * 8,
        "the dense path needs about three N×N float64 arrays (five for a heterostructure); use method=\"iterative\" for the lowest states of a large grid",
    )?;
    let par = par_for_dim(p.dim(), par);
    if generalized {
        let b = p.dense_b().ok_or_else(|| crate::error::NumericalError::EigenFailed("generalized problem without B".into()))?;
        return generalized::lowest_generalized(p.dense_a(), b.as_ref(), count, par);
    }
    if let Some(sym) = p.symmetry_blocks() {
        let pairs = lowest_of_blocks(&sym.blocks, count, par)?;
        let mut vectors = Mat::<f64>::zeros(p.dim(), pairs.len());
        for (j, (_, block, v)) in pairs.iter().enumerate() {
            for (&row, x) in sym.indices[*block].iter().zip(v) {
                vectors[(row, j)] = *x;
            }
        }
        return Ok((pairs.into_iter().map(|p| p.0).collect(), vectors));
    }
    lowest_of_matrix(p.dense_a().as_ref(), count, par)
}

/// Whether the dense path's matrices (about five N×N arrays) fit in available memory.
pub fn dense_fits(p: &dyn DiscreteProblem) -> bool {
    let n = p.dim() as u64;
    check_memory("method", 5 * n * n * 8, "").is_ok()
}

/// Lowest `opts.count` eigenpairs of `h`.
pub fn solve(h: &Arc<Hamiltonian>, opts: &SolveOptions) -> Result<Spectrum> {
    solve_with_par(h, opts, faer::get_global_parallelism())
}

/// [`solve`] with explicit parallelism for the dense kernels (`Par::Seq` inside
/// an outer parallel loop such as [`solve_batch`]).
pub fn solve_with_par(h: &Arc<Hamiltonian>, opts: &SolveOptions, par: faer::Par) -> Result<Spectrum> {
    solve_keeping_guards(h, opts, opts.method.resolve(h.problem(), opts.count), par).map(|(s, _)| s)
}

/// [`solve_with_par`], also returning the iterative path's guard vectors
/// (column-major; empty on the dense path) for warm-starting a nearby problem.
/// `method` is the resolved method; with `opts.method == Auto` a stalled iteration
/// finishes densely when the dense matrices fit.
fn solve_keeping_guards(h: &Arc<Hamiltonian>, opts: &SolveOptions, method: Method, par: faer::Par) -> Result<(Spectrum, Vec<f64>)> {
    let p = h.problem();
    check_count(opts.count, p.dim())?;
    check_tol(opts.tol)?;
    if let Some(init) = &opts.initial {
        crate::error::check_finite("initial", init)?;
    }
    let mut method = method;
    let mut note = None;
    let mut levels = Vec::new();
    // The iterative path's residuals come from products recomputed at its end (the sign
    // convention below does not change them); the dense ones are computed here.
    let mut known_residuals = None;
    let (energies, mut vectors, iterations, guards) = match method {
        Method::Dense | Method::Auto => {
            let (e, v) = dense_lowest(p, opts.count, par)?;
            (e, v, 0, Vec::new())
        }
        Method::Iterative => match iterative::solve(p, opts) {
            Ok(s) => {
                levels = s.levels;
                known_residuals = Some(s.residuals);
                (s.energies, s.vectors, s.iterations, s.guards)
            }
            // The automatic choice never fails where a dense solve fits: finish densely.
            Err(Error::Numerical(NumericalError::NotConverged { iterations, residuals, energies, .. }))
                if opts.method == Method::Auto && dense_fits(p) =>
            {
                let worst = residuals.iter().zip(&energies).map(|(r, e)| r * e.abs().max(1.0)).fold(0.0, f64::max);
                note = Some(format!(
                    "the iterative path stopped after {iterations} iterations with largest residual {worst:.1e}; finished with the dense solver"
                ));
                method = Method::Dense;
                let (e, v) = dense_lowest(p, opts.count, par)?;
                (e, v, iterations, Vec::new())
            }
            Err(e) => return Err(absolute_residuals(e)),
        },
    };
    fix_signs(h.basis().as_dyn(), &mut vectors);
    let residuals = known_residuals.unwrap_or_else(|| residuals(p, &energies, &vectors));
    let attainable = attainable_accuracy(p, &energies);
    let bound = h.stack().map(|s| {
        let (l, r) = s.cladding_edges();
        energies.iter().map(|&e| e < l.min(r)).collect()
    });
    let spectrum = Spectrum { hamiltonian: h.clone(), energies, vectors, residuals, method, iterations, levels, attainable, note, errors: None, bound };
    Ok((spectrum, guards))
}

/// Solve many Hamiltonians that share a basis, mass and units but differ in the
/// potential (`potentials[i]` sampled on the basis points), in parallel with rayon.
///
/// Dense method: items are independent (one sequential dense solve per item).
/// Iterative method: the items are split into one contiguous chunk per thread and
/// each item is warm-started from the previous item's eigenvectors (sweeps over a
/// field or a width change the states smoothly). Results are in input order.
pub fn solve_batch(
    basis: &BasisRef,
    potentials: &[Vec<f64>],
    mass: &Mass,
    units: Units,
    opts: &SolveOptions,
) -> Result<Vec<Spectrum>> {
    use rayon::prelude::*;
    if potentials.is_empty() {
        return Err(InputError::range("potentials", "at least one potential", "none").into());
    }
    let build = |v: &Vec<f64>| Hamiltonian::new(basis.clone(), v.clone(), mass.clone(), units).map(Arc::new);
    let first = build(&potentials[0])?;
    check_count(opts.count, first.size())?;
    let method = match opts.method {
        Method::Auto => batch_auto_choice(first.problem(), opts.count),
        m => m,
    };
    let o = opts.clone();
    match method {
        Method::Iterative => {
            let threads = rayon::current_num_threads().max(1);
            let chunk = potentials.len().div_ceil(threads);
            let chunks: Vec<Result<Vec<Spectrum>>> = potentials
                .par_chunks(chunk)
                .map(|items| {
                    let mut out: Vec<Spectrum> = Vec::with_capacity(items.len());
                    let mut oi = o.clone();
                    let mut guards = Vec::new();
                    for v in items {
                        // Warm start: the previous item's vectors, linearly extrapolated from
                        // the two previous items when available (signs are deterministic),
                        // then its guard vectors (as they are: only their span matters).
                        let k = out.len();
                        if k >= 1 {
                            let last = column_major(&out[k - 1].vectors);
                            let mut start = if k >= 2 {
                                let before = column_major(&out[k - 2].vectors);
                                last.iter().zip(&before).map(|(a, b)| 2.0 * a - b).collect()
                            } else {
                                last
                            };
                            start.extend_from_slice(&guards);
                            oi.initial = Some(start);
                        }
                        let (s, g) = solve_keeping_guards(&build(v)?, &oi, method, faer::Par::Seq)?;
                        out.push(s);
                        guards = g;
                    }
                    Ok(out)
                })
                .collect();
            let mut all = Vec::with_capacity(potentials.len());
            for c in chunks {
                all.extend(c?);
            }
            Ok(all)
        }
        _ => potentials.par_iter().map(|v| Ok(solve_keeping_guards(&build(v)?, &o, method, faer::Par::Seq)?.0)).collect(),
    }
}

/// The LOBPCG core reports relative residuals ‖Hψ − Eψ‖/max(1, |E|); the public
/// contract (Spectrum.residuals, ConvergenceError.residuals) is absolute.
fn absolute_residuals(e: crate::error::Error) -> crate::error::Error {
    use crate::error::{Error, NumericalError};
    match e {
        Error::Numerical(NumericalError::NotConverged { iterations, tol, energies, residuals }) => {
            let residuals = residuals.iter().zip(&energies).map(|(r, e)| r * e.abs().max(1.0)).collect();
            Error::Numerical(NumericalError::NotConverged { iterations, tol, energies, residuals })
        }
        other => other,
    }
}
