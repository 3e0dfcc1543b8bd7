//! Eigenstates of a [`Hamiltonian`]: full dense diagonalisation or, for the
//! lowest states of large grids, a matrix-free block iteration.

pub mod dense;
pub mod iterative;
pub mod matrix_free;
pub mod subset;

use crate::basis::{fix_signs, BasisRef};
use crate::error::{InputError, Result};
use crate::hamiltonian::{Hamiltonian, Kinetic, Mass};
use crate::units::Units;
use faer::Mat;

/// How to diagonalise. Parsed from a string only at the Python edge.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// Dense for small problems, iterative for large grids (see [`Method::resolve`]).
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

    /// The concrete method `Auto` picks for `h` and `count`.
    pub fn resolve(self, h: &Hamiltonian, count: usize) -> Method {
        match self {
            Method::Auto => matrix_free::auto_choice(h, count),
            m => m,
        }
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
/// * `energies` ascending, in the energy unit of `units`;
/// * `vectors` (N × count): orthonormal coefficient vectors in the basis; the sign of
///   each is fixed by [`fix_signs`] (positive in the leftmost region where |ψ| exceeds
///   1 % of its maximum);
/// * `residuals`: ‖Hψ − Eψ‖ (coefficient 2-norm, ‖ψ‖ = 1), energy units.
#[derive(Debug, Clone)]
pub struct Spectrum {
    pub basis: BasisRef,
    pub units: Units,
    pub mass: Mass,
    pub kinetic: Kinetic,
    pub energies: Vec<f64>,
    pub vectors: Mat<f64>,
    pub residuals: Vec<f64>,
    pub method: Method,
    pub iterations: usize,
}

impl Spectrum {
    pub fn count(&self) -> usize {
        self.energies.len()
    }
    /// ψ_n(x_i) for all states, `x.len() × count`, normalised ∫|ψ|² dx = 1.
    pub fn wavefunctions(&self, x: &[f64]) -> std::result::Result<Mat<f64>, InputError> {
        self.basis.as_dyn().evaluate(self.vectors.as_ref(), x)
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

/// The columns of `m` laid end to end (the column-major block layout of the
/// matrix-free operators and of warm starts).
pub fn column_major(m: &Mat<f64>) -> Vec<f64> {
    (0..m.ncols()).flat_map(|j| (0..m.nrows()).map(move |i| m[(i, j)])).collect()
}

/// Residual norms ‖H v_j − E_j B v_j‖ of the columns of `vectors` (B = I except for
/// heterostructures).
pub fn residuals(h: &Hamiltonian, energies: &[f64], vectors: &Mat<f64>) -> Vec<f64> {
    let n = vectors.nrows();
    let k = vectors.ncols();
    let x = column_major(vectors);
    let mut y = vec![0.0; n * k];
    h.apply_block(&x, &mut y, k);
    let mut bx = vec![0.0; n * k];
    h.apply_overlap_block(&x, &mut bx, k);
    (0..k)
        .map(|j| {
            (0..n)
                .map(|i| {
                    let r = y[j * n + i] - energies[j] * bx[j * n + i];
                    r * r
                })
                .sum::<f64>()
                .sqrt()
        })
        .collect()
}

/// Lowest `opts.count` eigenpairs of `h`.
pub fn solve(h: &Hamiltonian, opts: &SolveOptions) -> Result<Spectrum> {
    solve_with_par(h, opts, faer::get_global_parallelism())
}

/// [`solve`] with explicit parallelism for the dense kernels (`Par::Seq` inside
/// an outer parallel loop such as [`solve_batch`]).
pub fn solve_with_par(h: &Hamiltonian, opts: &SolveOptions, par: faer::Par) -> Result<Spectrum> {
    solve_keeping_guards(h, opts, par).map(|(s, _)| s)
}

/// [`solve_with_par`], also returning the iterative path's guard vectors
/// (column-major; empty on the dense path) for warm-starting a nearby problem.
fn solve_keeping_guards(h: &Hamiltonian, opts: &SolveOptions, par: faer::Par) -> Result<(Spectrum, Vec<f64>)> {
    check_count(opts.count, h.size())?;
    check_tol(opts.tol)?;
    if let Some(init) = &opts.initial {
        crate::error::check_finite("initial", init)?;
    }
    let method = opts.method.resolve(h, opts.count);
    let (energies, mut vectors, iterations, guards) = match method {
        Method::Dense | Method::Auto => {
            let (e, v) = dense::lowest(h, opts.count, par)?;
            (e, v, 0, Vec::new())
        }
        Method::Iterative => matrix_free::solve_hamiltonian(h, opts).map_err(absolute_residuals)?,
    };
    fix_signs(h.basis().as_dyn(), &mut vectors);
    let residuals = residuals(h, &energies, &vectors);
    let spectrum = Spectrum {
        basis: h.basis().clone(),
        units: h.units(),
        mass: h.mass().clone(),
        kinetic: h.kinetic().clone(),
        energies,
        vectors,
        residuals,
        method,
        iterations,
    };
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
    let build = |v: &Vec<f64>| Hamiltonian::new(basis.clone(), v.clone(), mass.clone(), units);
    let first = build(&potentials[0])?;
    check_count(opts.count, first.size())?;
    let method = opts.method.resolve(&first, opts.count);
    let mut o = opts.clone();
    o.method = method;
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
                        let (s, g) = solve_keeping_guards(&build(v)?, &oi, faer::Par::Seq)?;
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
        _ => potentials.par_iter().map(|v| solve_with_par(&build(v)?, &o, faer::Par::Seq)).collect(),
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
