//! The Fourier-grid Hamiltonian (Fourier-grid Hamiltonian method: Kosloff; Marston &
//! Balint-Kurti 1989): kinetic energy exact in k, potential diagonal on the grid.
//!
//! With constant mass, T = −(ħ²/2m) d²/dx²; with a mass profile m(x), the
//! BenDaniel-Duke (1966) form T = −(ħ²/2) d/dx (1/m) d/dx, built as
//! Dᵀ·diag(ħ²/2m(x_j))·D with D the real antisymmetric spectral derivative (Nyquist
//! mode dropped from D), plus the Nyquist mode's kinetic energy ⟨ħ²/2m⟩·k_N² on the
//! alternating vector (−1)^j/√n, so that a constant profile gives exactly the
//! constant-mass operator. Symmetric by construction. Coefficients c_j = ψ(x_j)·√dx.

use super::shifted_kinetic::ShiftedKineticPreconditioner;
use super::{Coarse, DiscreteProblem, Kinetic, Structure};
use crate::basis::FourierGrid;
use crate::linalg::lobpcg::Preconditioner;
use faer::{Mat, MatRef};
use num_complex::Complex64;
use rayon::prelude::*;
use std::sync::Arc;

/// H = T + V on a [`FourierGrid`].
pub struct FourierProblem {
    grid: Arc<FourierGrid>,
    potential: Vec<f64>,
    kinetic: Kinetic,
    /// Masses at the grid points (one value for a uniform mass).
    masses: Vec<f64>,
}

impl FourierProblem {
    /// `potential` on the grid points, `kinetic` = ħ²/2m (uniform or per point) and the
    /// masses it came from (validated by the caller, [`super::Hamiltonian::new`]).
    pub fn new(grid: Arc<FourierGrid>, potential: Vec<f64>, kinetic: Kinetic, masses: Vec<f64>) -> Self {
        FourierProblem { grid, potential, kinetic, masses }
    }

    pub fn grid(&self) -> &Arc<FourierGrid> {
        &self.grid
    }

    /// Mean ħ²/2m (the value for a uniform mass).
    fn mean_kinetic(&self) -> f64 {
        match &self.kinetic {
            Kinetic::Uniform(c) => *c,
            Kinetic::Profile(cs) => cs.iter().sum::<f64>() / cs.len() as f64,
        }
    }
}

impl DiscreteProblem for FourierProblem {
    fn dim(&self) -> usize {
        self.grid.len()
    }
    fn structure(&self) -> Structure {
        Structure { generalized: false, fast_apply: true }
    }

    /// FFTs, O(N log N) per column; two real columns per complex FFT
    /// (H(a + ib) = Ha + iHb because H is real). Column pairs run in parallel on large
    /// grids (each pair is computed the same way whatever the thread count).
    fn apply_a(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        let g = &self.grid;
        let n = g.len();
        let pair = |p: usize, yc: &mut [f64], s: &mut ApplyScratch| {
            let xc = &x[2 * p * n..(2 * p * n + yc.len())];
            let (xa, xb) = xc.split_at(n);
            let (ya, yb) = yc.split_at_mut(n);
            let second = !xb.is_empty();
            for i in 0..n {
                let im = if second { xb[i] } else { 0.0 };
                s.buf[i] = Complex64::new(xa[i], im);
            }
            kinetic_apply(g, &self.kinetic, &mut s.buf, &mut s.aux, &mut s.fft);
            for i in 0..n {
                let v = self.potential[i];
                ya[i] = s.buf[i].re + v * xa[i];
            }
            if second {
                for i in 0..n {
                    yb[i] = s.buf[i].im + self.potential[i] * xb[i];
                }
            }
        };
        let y = &mut y[..n * ncols];
        if n >= PAR_APPLY_DIM && ncols > 2 {
            y.par_chunks_mut(2 * n).enumerate().for_each_init(|| ApplyScratch::new(g, &self.kinetic), |s, (p, yc)| pair(p, yc, s));
        } else {
            let mut s = ApplyScratch::new(g, &self.kinetic);
            y.chunks_mut(2 * n).enumerate().for_each(|(p, yc)| pair(p, yc, &mut s));
        }
    }

    fn dense_a(&self) -> Mat<f64> {
        let g = &self.grid;
        let t = match &self.kinetic {
            Kinetic::Uniform(c) => {
                let t = g.neg_laplacian();
                Mat::from_fn(t.nrows(), t.ncols(), |i, j| c * t[(i, j)])
            }
            Kinetic::Profile(cs) => variable_mass_kinetic(g, cs),
        };
        g.potential_matrix(&self.potential) + t
    }

    /// Largest kinetic energy plus max |V|.
    fn norm_estimate(&self) -> f64 {
        let vmax = self.potential.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        let cmax = match &self.kinetic {
            Kinetic::Uniform(c) => *c,
            Kinetic::Profile(cs) => cs.iter().cloned().fold(0.0, f64::max),
        };
        cmax * (std::f64::consts::PI / self.grid.dx()).powi(2) + vmax
    }

    /// c_min·(2π/L)² of the periodic box.
    fn energy_scale(&self) -> f64 {
        let cmin = match &self.kinetic {
            Kinetic::Uniform(c) => *c,
            Kinetic::Profile(cs) => cs.iter().cloned().fold(f64::INFINITY, f64::min),
        };
        cmin * (2.0 * std::f64::consts::PI / (self.grid.stop() - self.grid.start())).powi(2)
    }

    /// The kinetic operator shifted by the local potential level
    /// ([`ShiftedKineticPreconditioner`]; mean ħ²/2m for a mass profile).
    fn preconditioner(&self) -> Option<Box<dyn Preconditioner + '_>> {
        Some(Box::new(ShiftedKineticPreconditioner::new(&self.grid, self.mean_kinetic(), &self.potential)))
    }

    /// The same box with n/r points, r the largest power of two dividing n with
    /// n/r ≥ `min_dim` (V and the mass subsampled), interpolated back in k (two columns
    /// per complex FFT).
    fn coarsened(&self, min_dim: usize) -> Option<Coarse> {
        let g = &self.grid;
        let n = g.len();
        let mut r = 1;
        while n.is_multiple_of(2 * r) && n / (2 * r) >= min_dim.max(2) {
            r *= 2;
        }
        if r == 1 {
            return None;
        }
        let cg = Arc::new(FourierGrid::new(g.start(), g.stop(), n / r).ok()?);
        let sub = |v: &[f64]| -> Vec<f64> { v.iter().step_by(r).copied().collect() };
        let kinetic = match &self.kinetic {
            Kinetic::Uniform(c) => Kinetic::Uniform(*c),
            Kinetic::Profile(cs) => Kinetic::Profile(sub(cs)),
        };
        let masses = if self.masses.len() == 1 { self.masses.clone() } else { sub(&self.masses) };
        let problem = FourierProblem::new(cg.clone(), sub(&self.potential), kinetic, masses);
        let fine = g.clone();
        // Coefficients c_j = ψ(x_j)·√dx: samples interpolated, then scaled by √(dx_f/dx_c),
        // so that an orthonormal coarse block stays orthonormal (up to its content at the
        // coarse Nyquist mode, which is split between ±k).
        let scale = (1.0 / r as f64).sqrt();
        let interpolate = move |c: &[f64], ncols: usize| -> Vec<f64> {
            let mut out = cg.upsample_block(c, ncols, &fine);
            out.iter_mut().for_each(|v| *v *= scale);
            out
        };
        Some(Coarse { problem: Box::new(problem), interpolate: Box::new(interpolate) })
    }

    /// Σ_j c_j x_j c'_j: the position on the box [start, stop), meaningful for states
    /// localised away from the box edges.
    fn position_matrix(&self, v: MatRef<'_, f64>) -> Mat<f64> {
        let x = self.grid.x();
        let xv = Mat::from_fn(v.nrows(), v.ncols(), |i, j| x[i] * v[(i, j)]);
        v.transpose() * xv
    }

    /// Σ_j c_j² m(x_j).
    fn mean_masses(&self, v: MatRef<'_, f64>) -> Vec<f64> {
        if self.masses.len() == 1 {
            return vec![self.masses[0]; v.ncols()];
        }
        (0..v.ncols()).map(|j| (0..v.nrows()).map(|i| v[(i, j)] * v[(i, j)] * self.masses[i]).sum()).collect()
    }
}

/// Grids from this size on apply column pairs in parallel.
const PAR_APPLY_DIM: usize = 16384;

/// Work arrays of one column pair of [`FourierProblem::apply_a`].
struct ApplyScratch {
    buf: Vec<Complex64>,
    aux: Vec<Complex64>,
    fft: Vec<Complex64>,
}

impl ApplyScratch {
    /// `aux` only for a mass profile (the uniform kinetic energy does not use it).
    fn new(g: &FourierGrid, kinetic: &Kinetic) -> Self {
        let z = Complex64::new(0.0, 0.0);
        let s = g.forward().get_inplace_scratch_len().max(g.inverse().get_inplace_scratch_len());
        let aux = if matches!(kinetic, Kinetic::Profile(_)) { g.len() } else { 0 };
        ApplyScratch { buf: vec![z; g.len()], aux: vec![z; aux], fft: vec![z; s] }
    }
}

/// Dense BenDaniel-Duke kinetic matrix on a Fourier grid (see module docs).
fn variable_mass_kinetic(g: &FourierGrid, cs: &[f64]) -> Mat<f64> {
    let n = g.len();
    let d = FourierGrid::circulant_matrix(&g.derivative_column());
    let cd = Mat::from_fn(n, n, |i, j| cs[i] * d[(i, j)]);
    let mut t = d.transpose() * &cd;
    if g.has_nyquist() {
        let kn = std::f64::consts::PI / g.dx();
        let cbar = cs.iter().sum::<f64>() / n as f64;
        let s = cbar * kn * kn / n as f64;
        for i in 0..n {
            for j in 0..n {
                t[(i, j)] += if (i + j) % 2 == 0 { s } else { -s };
            }
        }
    }
    t
}

/// buf ← T·buf on a Fourier grid (complex-linear, so two real columns can share it).
pub fn kinetic_apply(
    g: &FourierGrid,
    kinetic: &Kinetic,
    buf: &mut [Complex64],
    aux: &mut [Complex64],
    scratch: &mut [Complex64],
) {
    let n = g.len();
    let inv_n = 1.0 / n as f64;
    let k = g.k();
    g.forward().process_with_scratch(buf, scratch);
    match kinetic {
        Kinetic::Uniform(c) => {
            for (z, &kp) in buf.iter_mut().zip(k) {
                *z *= c * kp * kp * inv_n;
            }
        }
        Kinetic::Profile(cs) => {
            let nyq = if g.has_nyquist() { Some(n / 2) } else { None };
            let nyq_coef = nyq.map(|p| buf[p]);
            // aux = D ψ (Nyquist dropped), then aux *= c(x), then buf = −D aux.
            for p in 0..n {
                aux[p] = if Some(p) == nyq { Complex64::new(0.0, 0.0) } else { buf[p] * Complex64::new(0.0, k[p] * inv_n) };
            }
            g.inverse().process_with_scratch(aux, scratch);
            for (z, &c) in aux.iter_mut().zip(cs) {
                *z *= c;
            }
            g.forward().process_with_scratch(aux, scratch);
            for p in 0..n {
                buf[p] = if Some(p) == nyq { Complex64::new(0.0, 0.0) } else { -aux[p] * Complex64::new(0.0, k[p] * inv_n) };
            }
            if let (Some(p), Some(z)) = (nyq, nyq_coef) {
                let cbar = cs.iter().sum::<f64>() * inv_n;
                buf[p] = z * (cbar * k[p] * k[p] * inv_n);
            }
        }
    }
    g.inverse().process_with_scratch(buf, scratch);
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

