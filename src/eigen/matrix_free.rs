//! Glue between a [`Hamiltonian`] and the LOBPCG solver: the operator, the
//! kinetic-energy preconditioner, and the rule of `method="auto"`.

use super::iterative::{default_block_extra, lobpcg, IterativeOptions, Preconditioner, SymmetricOperator};
use super::{Method, SolveOptions};
use crate::basis::{Basis, BasisRef, FourierGrid, HermiteBasis};
use crate::error::Result;
use crate::hamiltonian::{Hamiltonian, Kinetic, Mass};
use faer::Mat;
use num_complex::Complex64;

/// Multiple of ε‖H‖ below which the iterative tolerance is not pushed.
pub const ROUNDOFF_FACTOR: f64 = 64.0;

/// Dense is used up to this size; above it, `method="auto"` goes matrix-free on
/// Fourier grids when `count` is small (see [`auto_choice`]).
pub const AUTO_DENSE_MAX: usize = 512;

/// The rule of `method="auto"`: dense for Hermite bases, for grids up to
/// [`AUTO_DENSE_MAX`] points, and when more than a quarter of the spectrum is
/// wanted; matrix-free LOBPCG otherwise.
pub fn auto_choice(h: &Hamiltonian, count: usize) -> Method {
    let n = h.size();
    match h.basis() {
        BasisRef::Hermite(_) => Method::Dense,
        _ if n <= AUTO_DENSE_MAX || 4 * count > n => Method::Dense,
        _ => Method::Iterative,
    }
}

/// `H` as a block operator (FFT-applied on grids, quadrature-applied on Hermite bases).
pub struct HamiltonianOperator<'a>(pub &'a Hamiltonian);

impl SymmetricOperator for HamiltonianOperator<'_> {
    fn dim(&self) -> usize {
        self.0.size()
    }
    fn apply(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        self.0.apply_block(x, y, ncols)
    }
}

/// Preconditioner on a periodic grid, P_j = W_j K W_j with
/// K(k) = 1/(c k² + σ) (kinetic, diagonal in k) and
/// W_j(x) = sqrt(σ / (σ + max((V(x) − E_j)·w(x), 0))) (diagonal in x).
///
/// K alone is the classic plane-wave kinetic-energy preconditioner; it treats the
/// residual in classically forbidden regions (V ≫ E, e.g. the walls of a box
/// around a confining well) as low-energy and over-weights it. W damps those
/// regions by the local excess potential, so strongly confining potentials do not
/// stall the iteration. P_j is SPD. `w` is 1/m at the nodes in the mass coordinate
/// of a heterostructure and 1 otherwise; σ = sqrt(ΔV·(E_max − V_min)) from the
/// current Ritz values, kept within [c(2π/L)², ΔV] (chosen by measurement on
/// oscillator, double-well, Pöschl-Teller and capped wells: 20–170 iterations
/// where the kinetic-only form needed 30–1800).
pub struct GridPreconditioner<'a> {
    grid: &'a FourierGrid,
    c: f64,
    /// Range and minimum of the (weighted) potential, and the lowest kinetic quantum.
    vrange: f64,
    vmin: f64,
    e1: f64,
    v: Vec<f64>,
    w: Option<Vec<f64>>,
}

impl<'a> GridPreconditioner<'a> {
    /// For a Hamiltonian on a Fourier grid (mean ħ²/2m for a mass profile).
    pub fn new(grid: &'a FourierGrid, h: &Hamiltonian) -> Self {
        let c = match h.kinetic() {
            Kinetic::Uniform(c) => *c,
            Kinetic::Profile(cs) => cs.iter().sum::<f64>() / cs.len() as f64,
        };
        Self::with_potential(grid, c, h.potential().to_vec(), None)
    }

    /// On `grid` with kinetic prefactor `c`, potential samples `v` and weights `w`
    /// (`v` all zero: the kinetic-only preconditioner).
    pub fn with_potential(grid: &'a FourierGrid, c: f64, v: Vec<f64>, w: Option<Vec<f64>>) -> Self {
        let scaled = |i: usize| v[i] * w.as_ref().map_or(1.0, |w| w[i]);
        let (lo, hi) = (0..v.len()).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), i| (a.min(scaled(i)), b.max(scaled(i))));
        let e1 = c * (2.0 * std::f64::consts::PI / (grid.stop() - grid.start())).powi(2);
        GridPreconditioner { grid, c, vrange: hi - lo, vmin: lo, e1, v, w }
    }

    /// σ from the current Ritz values: sqrt(ΔV · (E_max − V_min)), within [e1, ΔV].
    fn sigma(&self, shifts: &[f64]) -> f64 {
        let emax = shifts.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
        let spread = (emax - self.vmin).max(self.e1);
        (self.vrange * spread).sqrt().min(self.vrange).max(self.e1)
    }

    fn weight(&self, i: usize, shift: f64, sigma: f64) -> f64 {
        let excess = (self.v[i] - shift) * self.w.as_ref().map_or(1.0, |w| w[i]);
        (sigma / (sigma + excess.max(0.0))).sqrt()
    }
}

impl Preconditioner for GridPreconditioner<'_> {
    fn precondition(&self, r: &mut [f64], ncols: usize, shifts: &[f64]) {
        let g = self.grid;
        let n = g.len();
        let k = g.k();
        let mut buf = vec![Complex64::new(0.0, 0.0); n];
        let mut scratch = vec![Complex64::new(0.0, 0.0); g.forward().get_inplace_scratch_len()];
        let inv_n = 1.0 / n as f64;
        let sigma = self.sigma(&shifts[..ncols]);
        // Two real columns per complex FFT: W is applied in x per column, K is real and even in k.
        let mut j = 0;
        while j < ncols {
            let second = j + 1 < ncols;
            let s2 = if second { shifts[j + 1] } else { 0.0 };
            for i in 0..n {
                let b = if second { self.weight(i, s2, sigma) * r[(j + 1) * n + i] } else { 0.0 };
                buf[i] = Complex64::new(self.weight(i, shifts[j], sigma) * r[j * n + i], b);
            }
            g.forward().process_with_scratch(&mut buf, &mut scratch);
            for (z, &kp) in buf.iter_mut().zip(k) {
                *z *= inv_n / (self.c * kp * kp + sigma);
            }
            g.inverse().process_with_scratch(&mut buf, &mut scratch);
            for i in 0..n {
                r[j * n + i] = self.weight(i, shifts[j], sigma) * buf[i].re;
                if second {
                    r[(j + 1) * n + i] = self.weight(i, s2, sigma) * buf[i].im;
                }
            }
            j += 2;
        }
    }
}

/// The overlap B as an operator (heterostructures).
pub struct OverlapOperator<'a>(pub &'a Hamiltonian);

impl SymmetricOperator for OverlapOperator<'_> {
    fn dim(&self) -> usize {
        self.0.size()
    }
    fn apply(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        self.0.apply_overlap_block(x, y, ncols)
    }
}

/// Jacobi preconditioner for a Hermite basis: P_j = 1/(|H_nn − E_j| + δ).
pub struct DiagonalPreconditioner {
    diag: Vec<f64>,
    delta: f64,
}

impl Preconditioner for DiagonalPreconditioner {
    fn precondition(&self, r: &mut [f64], ncols: usize, shifts: &[f64]) {
        let n = self.diag.len();
        for j in 0..ncols {
            for i in 0..n {
                r[j * n + i] /= (self.diag[i] - shifts[j]).abs() + self.delta;
            }
        }
    }
}

/// Diagonal of H in a Hermite basis: c(n + ½)/L² + Σ_k Φ_nk² V_k.
fn hermite_diagonal(b: &HermiteBasis, h: &Hamiltonian) -> Vec<f64> {
    let c = match h.kinetic() {
        Kinetic::Uniform(c) => *c / (b.length() * b.length()),
        Kinetic::Profile(_) => 0.0, // rejected by Hamiltonian::new for Hermite bases
    };
    let phi = b.phi();
    let v = h.potential();
    (0..b.size())
        .map(|i| c * (i as f64 + 0.5) + (0..phi.ncols()).map(|k| phi[(i, k)] * phi[(i, k)] * v[k]).sum::<f64>())
        .collect()
}

/// Coarse grids of the cascade up to this size are solved densely.
const COARSE_DENSE_MAX: usize = 256;
/// Largest refinement factor between cascade levels.
const COARSE_FACTOR: usize = 8;
/// Iteration limit on coarse levels (a failed coarse level only costs its time:
/// the fine solve then starts from random vectors).
const COARSE_MAX_ITER: usize = 200;

/// Warm start for `k` vectors on a Fourier grid from the same problem on a grid
/// of the same box with n/r points (r ≤ [`COARSE_FACTOR`] a power of two dividing
/// n; V and the mass subsampled): solved densely up to [`COARSE_DENSE_MAX`]
/// points, by this cascade again above, then trigonometrically interpolated to
/// the fine grid (cascadic multigrid for eigenproblems, cf. Bornemann &
/// Deuflhard 1996). Smooth low states are resolved on the coarse grid already,
/// so LOBPCG on the fine grid starts next to its answer; for rough potentials
/// the start is merely no worse than random. `None` when the grid is too small
/// to coarsen (coarse grid ≥ max(128, 8k) points) or the coarse solve fails.
fn coarse_start(h: &Hamiltonian, g: &FourierGrid, k: usize, opts: &SolveOptions) -> Option<Vec<f64>> {
    let n = g.len();
    let min = (8 * k).max(128);
    let mut r = 1;
    while r < COARSE_FACTOR && n % (2 * r) == 0 && n / (2 * r) >= min {
        r *= 2;
    }
    if r == 1 {
        return None;
    }
    let nc = n / r;
    let cg = std::sync::Arc::new(FourierGrid::new(g.start(), g.stop(), nc).ok()?);
    let vc: Vec<f64> = h.potential().iter().step_by(r).copied().collect();
    let mass = match h.mass() {
        Mass::Uniform(m) => Mass::Uniform(*m),
        Mass::Profile(ms) => Mass::Profile(ms.iter().step_by(r).copied().collect()),
    };
    let hc = Hamiltonian::new(BasisRef::Fourier(cg.clone()), vc, mass, h.units()).ok()?;
    let coarse: Mat<f64> = if nc <= COARSE_DENSE_MAX {
        super::dense::lowest_of_matrix(hc.matrix().as_ref(), k, faer::Par::Seq).ok()?.1
    } else {
        let mut oc = SolveOptions::new(k);
        oc.tol = opts.tol.max(1e-8);
        oc.max_iter = Some(COARSE_MAX_ITER);
        oc.seed = opts.seed;
        solve_hamiltonian(&hc, &oc).ok()?.1
    };
    let mut out = Vec::with_capacity(n * k);
    for j in 0..coarse.ncols() {
        let col: Vec<f64> = (0..nc).map(|i| coarse[(i, j)]).collect();
        out.extend(cg.upsample(&col, g));
    }
    Some(out)
}

/// Lowest eigenpairs of `h` by LOBPCG: (energies, N×count vectors, iterations,
/// column-major guard vectors; see [`super::iterative::IterativeResult::guards`]).
pub fn solve_hamiltonian(h: &Hamiltonian, opts: &SolveOptions) -> Result<(Vec<f64>, Mat<f64>, usize, Vec<f64>)> {
    let n = h.size();
    let mut io = IterativeOptions::new(opts.count);
    // Residuals cannot drop below round-off, about ε‖H‖: a tighter `tol` is raised to
    // that floor (energies are still accurate to ~residual²/gap; `residuals` report the truth).
    io.tol = opts.tol.max(ROUNDOFF_FACTOR * f64::EPSILON * h.norm_estimate());
    io.seed = opts.seed;
    io.initial = opts.initial.clone();
    io.block_extra = default_block_extra(opts.count).min(n - opts.count);
    io.max_iter = opts.max_iter.unwrap_or(1000);
    let op = HamiltonianOperator(h);
    let res = match h.basis() {
        BasisRef::Fourier(g) => {
            if io.initial.is_none() {
                io.initial = coarse_start(h, g, opts.count + io.block_extra, opts);
            }
            let p = GridPreconditioner::new(g, h);
            lobpcg(&op, None, Some(&p), &io)?
        }
        BasisRef::Layered(l) => {
            // Kinetic preconditioner in the mass coordinate: (ħ²/2m_e) k_s² + shift, on a
            // periodic grid of the s-box with the same number of modes.
            let lp = l.problem();
            let sgrid = FourierGrid::new(0.0, lp.s_length(), lp.dim())?;
            let c = h.units().hbar2_over_2me();
            // Kinetic part only (σ = lowest kinetic quantum): the potential-weighted form
            // stalled on 1025-mode wells in the mass coordinate (measured), this one
            // converges in ~50 iterations there.
            let p = GridPreconditioner::with_potential(&sgrid, c, vec![0.0; lp.dim()], None);
            let b = OverlapOperator(h);
            lobpcg(&op, Some(&b), Some(&p), &io)?
        }
        BasisRef::Hermite(b) => {
            let diag = hermite_diagonal(b, h);
            let delta = 1e-3 / (b.length() * b.length()) * h.units().hbar2_over_2me();
            let p = DiagonalPreconditioner { diag, delta };
            lobpcg(&op, None, Some(&p), &io)?
        }
    };
    let vectors = Mat::from_fn(n, opts.count, |i, j| res.vectors[j * n + i]);
    Ok((res.energies, vectors, res.iterations, res.guards))
}
