//! Fourier grid: plane waves on the periodic box [start, stop).
//!
//! Grid points x_j = start + j·dx, j = 0..n−1, dx = (stop − start)/n. Wave numbers
//! k_p = 2π·fftfreq(n, dx) in numpy order; for even n the Nyquist mode p = n/2
//! carries k = −π/dx and, in every real operator built here, enters through
//! cos(π j) = (−1)^j so that real symmetric matrices stay real symmetric.
//!
//! The orthonormal basis is the set of periodic sinc (discrete variable)
//! functions centred on the grid points, so a state's coefficients are
//! c_j = ψ(x_j)·sqrt(dx). The kinetic operator is exact in k (Fourier-grid
//! Hamiltonian: Kosloff; Marston & Balint-Kurti 1989), the potential is diagonal.

use super::Basis;
use crate::error::{check_finite, InputError};
use faer::{Mat, MatRef};
use num_complex::Complex64;
use rayon::prelude::*;
use rustfft::{Fft, FftPlanner};
use std::f64::consts::PI;
use std::sync::Arc;

/// Largest grid accepted (2^28 points: 4 GiB per complex vector).
pub const MAX_POINTS: usize = 1 << 28;

/// A periodic grid with its FFT plans (made once, shared by every operator on it).
#[derive(Clone)]
pub struct FourierGrid {
    start: f64,
    stop: f64,
    dx: f64,
    x: Vec<f64>,
    k: Vec<f64>,
    forward: Arc<dyn Fft<f64>>,
    inverse: Arc<dyn Fft<f64>>,
}

impl std::fmt::Debug for FourierGrid {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "FourierGrid(start={}, stop={}, points={})", self.start, self.stop, self.x.len())
    }
}

impl FourierGrid {
    /// A grid of `points` points on [start, stop). Requires finite bounds, stop > start
    /// and 2 ≤ points ≤ 2^28.
    pub fn new(start: f64, stop: f64, points: usize) -> Result<Self, InputError> {
        if !start.is_finite() {
            return Err(InputError::range("start", "a finite number", start));
        }
        if !stop.is_finite() || stop <= start {
            return Err(InputError::range("stop", format!("a finite number > start ({start})"), stop));
        }
        if !(2..=MAX_POINTS).contains(&points) {
            return Err(InputError::range("points", format!("an integer in [2, {MAX_POINTS}]"), points));
        }
        let n = points;
        let dx = (stop - start) / n as f64;
        if !(dx > 0.0) {
            return Err(InputError::range("points", "small enough that (stop - start)/points > 0", points));
        }
        let x = (0..n).map(|j| start + j as f64 * dx).collect();
        let k = wavenumbers(n, dx);
        let mut planner = FftPlanner::new();
        let forward = planner.plan_fft_forward(n);
        let inverse = planner.plan_fft_inverse(n);
        Ok(FourierGrid { start, stop, dx, x, k, forward, inverse })
    }

    pub fn start(&self) -> f64 {
        self.start
    }
    pub fn stop(&self) -> f64 {
        self.stop
    }
    pub fn dx(&self) -> f64 {
        self.dx
    }
    pub fn len(&self) -> usize {
        self.x.len()
    }
    pub fn is_empty(&self) -> bool {
        self.x.is_empty()
    }
    /// Grid points x_j.
    pub fn x(&self) -> &[f64] {
        &self.x
    }
    /// Wave numbers k_p (numpy `fftfreq` order, times 2π).
    pub fn k(&self) -> &[f64] {
        &self.k
    }
    /// The forward FFT plan (unnormalised, e^{−ikx}).
    pub fn forward(&self) -> &Arc<dyn Fft<f64>> {
        &self.forward
    }
    /// The inverse FFT plan (unnormalised, e^{+ikx}).
    pub fn inverse(&self) -> &Arc<dyn Fft<f64>> {
        &self.inverse
    }
    /// Refuse points outside [start, stop] (naming `argument` and the first offender).
    pub fn check_in_box(&self, argument: &str, x: &[f64]) -> Result<(), InputError> {
        match x.iter().position(|&v| !(v >= self.start && v <= self.stop)) {
            None => Ok(()),
            Some(i) => Err(InputError::range(
                argument,
                format!("points inside the periodic box [{}, {}] (outside it the series repeats periodically)", self.start, self.stop),
                format!("{} at index {i}", x[i]),
            )),
        }
    }

    /// Whether n is even, i.e. the grid has a Nyquist mode.
    pub fn has_nyquist(&self) -> bool {
        self.x.len().is_multiple_of(2)
    }

    /// First column of a real circulant matrix whose eigenvalue on mode p is `symbol[p]`
    /// (symbol must be even in k): t_m = (1/n) Σ_p symbol_p e^{i k_p m dx}.
    pub fn circulant_column(&self, symbol: impl Fn(f64) -> f64) -> Vec<f64> {
        let n = self.len();
        let mut buf: Vec<Complex64> = self.k.iter().map(|&k| Complex64::new(symbol(k), 0.0)).collect();
        self.inverse.process(&mut buf);
        buf.iter().map(|z| z.re / n as f64).collect()
    }

    /// First column of the spectral first-derivative matrix with the Nyquist mode
    /// removed (so it is real antisymmetric): d_m = (1/n) Σ_{p≠n/2} i k_p e^{i k_p m dx}.
    pub fn derivative_column(&self) -> Vec<f64> {
        let n = self.len();
        let nyq = if self.has_nyquist() { Some(n / 2) } else { None };
        let mut buf: Vec<Complex64> = self
            .k
            .iter()
            .enumerate()
            .map(|(p, &k)| if Some(p) == nyq { Complex64::new(0.0, 0.0) } else { Complex64::new(0.0, k) })
            .collect();
        self.inverse.process(&mut buf);
        buf.iter().map(|z| z.re / n as f64).collect()
    }

    /// Dense matrix from a circulant first column c: A_jl = c[(j − l) mod n].
    pub fn circulant_matrix(column: &[f64]) -> Mat<f64> {
        let n = column.len();
        Mat::from_fn(n, n, |j, l| column[(j + n - l) % n])
    }

    /// The N×N matrix of −d²/dx² (exact in k, circulant, real symmetric).
    pub fn neg_laplacian(&self) -> Mat<f64> {
        FourierGrid::circulant_matrix(&self.circulant_column(|k| k * k))
    }

    /// The N×N matrix of a multiplicative potential sampled on the grid (diagonal).
    pub fn potential_matrix(&self, v: &[f64]) -> Mat<f64> {
        Mat::from_fn(self.len(), self.len(), |i, j| if i == j { v[i] } else { 0.0 })
    }

    /// Trigonometric interpolation of real samples on this grid onto `fine`, a grid
    /// of the same box with r·n points (r ≥ 1): zero-padding in k, O(rn log rn).
    /// The Nyquist term of an even n is split evenly between ±k so real data stay
    /// real; the values returned are samples (not rescaled to fine coefficients).
    pub fn upsample(&self, values: &[f64], fine: &FourierGrid) -> Vec<f64> {
        self.upsample_block(values, 1, fine)
    }

    /// [`FourierGrid::upsample`] of a column-major block of `ncols` columns, two real
    /// columns per complex FFT (the zero-padding map is real and linear, so the real and
    /// imaginary parts stay apart). Returns the column-major block on `fine`.
    pub fn upsample_block(&self, values: &[f64], ncols: usize, fine: &FourierGrid) -> Vec<f64> {
        let n = self.len();
        let m = fine.len();
        debug_assert!(values.len() == n * ncols && m >= n && m.is_multiple_of(n));
        let z0 = Complex64::new(0.0, 0.0);
        let mut out = vec![0.0; m * ncols];
        let mut buf = vec![z0; n];
        let mut wide = vec![z0; m];
        let mut scratch = vec![z0; self.forward.get_inplace_scratch_len().max(fine.inverse.get_inplace_scratch_len())];
        let half = n / 2;
        let inv_n = 1.0 / n as f64;
        for (p, chunk) in out.chunks_mut(2 * m).enumerate() {
            let second = chunk.len() == 2 * m;
            let (a, b) = (&values[2 * p * n..(2 * p + 1) * n], if second { &values[(2 * p + 1) * n..(2 * p + 2) * n] } else { &[][..] });
            for i in 0..n {
                buf[i] = Complex64::new(a[i], if second { b[i] } else { 0.0 });
            }
            self.forward.process_with_scratch(&mut buf, &mut scratch);
            wide.fill(z0);
            for p in 0..n {
                let z = buf[p] * inv_n;
                if self.has_nyquist() && p == half {
                    wide[half] += 0.5 * z;
                    wide[m - half] += 0.5 * z;
                } else if p < half || (p == half && !self.has_nyquist()) {
                    wide[p] = z;
                } else {
                    wide[m - n + p] = z;
                }
            }
            fine.inverse.process_with_scratch(&mut wide, &mut scratch);
            let (oa, ob) = chunk.split_at_mut(m);
            for i in 0..m {
                oa[i] = wide[i].re;
            }
            for i in 0..ob.len() {
                ob[i] = wide[i].im;
            }
        }
        out
    }

    /// Trigonometric interpolation of grid states (columns of `values`, samples ψ(x_j))
    /// at arbitrary points (periodic: points outside the box see its periodic images);
    /// the Nyquist term enters as a cosine so real data stay real.
    pub fn interpolate(&self, values: MatRef<'_, f64>, x: &[f64]) -> Mat<f64> {
        self.trig_series(values, x, 1.0)
    }

    /// The one trigonometric series evaluator: for each column of `values` (n samples),
    /// Σ_p (X_p/n) e^{i k_p (x − start)} at the points `x`, with X = DFT(column) and the
    /// Nyquist term of an even n written as `nyquist_factor`·(X_{n/2}/n)·cos(π n (x − start)/L)
    /// (1 reproduces the samples; √2 gives the normalised cosine √(2/L)·cos of a
    /// Galerkin basis whose Nyquist function is that cosine). The phases are advanced by
    /// a complex recurrence resynchronised every 32 modes. O(n·(k + len(x))).
    pub fn trig_series(&self, values: MatRef<'_, f64>, x: &[f64], nyquist_factor: f64) -> Mat<f64> {
        let n = self.len();
        let ncols = values.ncols();
        let half = (n - 1) / 2; // positive non-Nyquist modes 1..=half
        let mut scratch = vec![Complex64::new(0.0, 0.0); self.forward.get_inplace_scratch_len()];
        let mut buf = vec![Complex64::new(0.0, 0.0); n];
        let mut modes: Vec<Vec<Complex64>> = Vec::with_capacity(ncols);
        let mut nyq: Vec<f64> = Vec::with_capacity(ncols);
        for j in 0..ncols {
            for (i, b) in buf.iter_mut().enumerate() {
                *b = Complex64::new(values[(i, j)], 0.0);
            }
            self.forward.process_with_scratch(&mut buf, &mut scratch);
            modes.push(buf[..=half].iter().map(|z| z / n as f64).collect());
            nyq.push(if self.has_nyquist() { nyquist_factor * buf[n / 2].re / n as f64 } else { 0.0 });
        }
        let length = self.stop - self.start;
        let rows: Vec<Vec<f64>> = x
            .par_iter()
            .map(|&xi| {
                let theta = 2.0 * PI * (xi - self.start) / length;
                let mut out: Vec<f64> = modes.iter().map(|a| a[0].re).collect();
                let (s1, c1) = theta.sin_cos();
                let step = Complex64::new(c1, s1);
                let mut e = Complex64::new(1.0, 0.0);
                for m in 1..=half {
                    if m % 32 == 0 {
                        let (sm, cm) = (m as f64 * theta).sin_cos();
                        e = Complex64::new(cm, sm);
                    } else {
                        e *= step;
                    }
                    for (o, a) in out.iter_mut().zip(&modes) {
                        // a_m e^{imθ} + conj(a_m) e^{−imθ} = 2 Re(a_m e^{imθ})
                        *o += 2.0 * (a[m].re * e.re - a[m].im * e.im);
                    }
                }
                if self.has_nyquist() {
                    let cn = (0.5 * n as f64 * theta).cos();
                    for (o, &b) in out.iter_mut().zip(&nyq) {
                        *o += b * cn;
                    }
                }
                out
            })
            .collect();
        Mat::from_fn(x.len(), ncols, |i, j| rows[i][j])
    }
}

/// k_p = 2π·fftfreq(n, dx)[p], numpy order (for even n the Nyquist mode p = n/2 has
/// k = −π/dx). The one `fftfreq` of the crate.
pub fn wavenumbers(n: usize, dx: f64) -> Vec<f64> {
    (0..n).map(|p| wavenumber(p, n, dx)).collect()
}

/// k_p = 2π·fftfreq(n, dx)[p].
fn wavenumber(p: usize, n: usize, dx: f64) -> f64 {
    let m = if p < n.div_ceil(2) { p as f64 } else { p as f64 - n as f64 };
    2.0 * PI * m / (n as f64 * dx)
}

impl Basis for FourierGrid {
    fn size(&self) -> usize {
        self.len()
    }
    fn points(&self) -> &[f64] {
        &self.x
    }
    /// The trigonometric interpolant at `x`, which must lie in the box [start, stop]
    /// (outside it the series repeats periodically, which is rarely what a caller means).
    fn evaluate(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError> {
        check_finite("x", x)?;
        self.check_in_box("x", x)?;
        let scale = 1.0 / self.dx.sqrt();
        let values = Mat::from_fn(coefs.nrows(), coefs.ncols(), |i, j| coefs[(i, j)] * scale);
        Ok(self.interpolate(values.as_ref(), x))
    }
    fn sample_sign_profile(&self, coefs: MatRef<'_, f64>) -> Mat<f64> {
        coefs.to_owned()
    }
    fn describe(&self) -> String {
        format!("FourierGrid(start={}, stop={}, points={}, dx={:.6e})", self.start, self.stop, self.len(), self.dx)
    }
}

/// Validate a potential sampled on the points of a basis.
pub fn check_samples(argument: &str, values: &[f64], expected: usize) -> Result<(), InputError> {
    if values.len() != expected {
        return Err(InputError::Length { argument: argument.into(), expected, got: values.len() });
    }
    check_finite(argument, values)
}

#[cfg(test)]
mod tests {
    use super::*;

    // The block form packs two real columns into one complex FFT: each column must come
    // out as the one-column interpolation of itself (odd and even column counts).
    #[test]
    fn upsample_block_matches_columns() {
        let coarse = FourierGrid::new(-2.0, 3.0, 32).unwrap();
        let fine = FourierGrid::new(-2.0, 3.0, 128).unwrap();
        for ncols in [1usize, 2, 3] {
            let vals: Vec<f64> = (0..32 * ncols).map(|i| ((i * 7919) % 101) as f64 / 50.0 - 1.0).collect();
            let block = coarse.upsample_block(&vals, ncols, &fine);
            for j in 0..ncols {
                let one = coarse.upsample_block(&vals[j * 32..(j + 1) * 32], 1, &fine);
                for i in 0..128 {
                    assert!((block[j * 128 + i] - one[i]).abs() < 1e-13, "column {j} of {ncols}, row {i}");
                }
            }
        }
    }

    #[test]
    fn upsample_reproduces_band_limited_functions() {
        // A trigonometric polynomial within the coarse band is reproduced exactly
        // on the fine grid (sampling theorem); odd and even coarse sizes.
        for (n, r) in [(16usize, 4usize), (15, 3), (64, 8)] {
            let (a, b) = (-3.0, 5.0);
            let coarse = FourierGrid::new(a, b, n).unwrap();
            let fine = FourierGrid::new(a, b, n * r).unwrap();
            let f = |x: f64| {
                let t = 2.0 * PI * (x - a) / (b - a);
                0.3 + (3.0 * t).cos() - 0.7 * t.sin() + 0.2 * ((n as f64 / 2.0 - 1.0).floor() * t).sin()
            };
            let vals: Vec<f64> = coarse.x().iter().map(|&x| f(x)).collect();
            let up = coarse.upsample(&vals, &fine);
            for (x, u) in fine.x().iter().zip(&up) {
                assert!((u - f(*x)).abs() < 1e-12, "n={n} x={x}: {u} vs {}", f(*x));
            }
        }
    }

    #[test]
    fn wavenumbers_match_numpy_fftfreq_convention() {
        // numpy.fft.fftfreq(4, 0.5) = [0, 0.5, -1, -0.5] (numpy docs convention).
        let g = FourierGrid::new(0.0, 2.0, 4).unwrap();
        let f: Vec<f64> = g.k().iter().map(|k| k / (2.0 * PI)).collect();
        assert_eq!(f, vec![0.0, 0.5, -1.0, -0.5]);
        let g = FourierGrid::new(0.0, 2.5, 5).unwrap();
        let f: Vec<f64> = g.k().iter().map(|k| k / (2.0 * PI)).collect();
        let want = [0.0, 0.4, 0.8, -0.8, -0.4];
        for (a, b) in f.iter().zip(want) {
            assert!((a - b).abs() < 1e-15);
        }
    }

    #[test]
    fn laplacian_is_exact_on_resolved_plane_waves() {
        // −d²/dx² cos(2π·3x/L) = (2π·3/L)² cos(...) exactly for a resolved mode.
        for n in [16, 17] {
            let g = FourierGrid::new(-1.0, 2.0, n).unwrap();
            let l = 3.0;
            let kk = 2.0 * PI * 3.0 / l;
            let t = g.neg_laplacian();
            for i in 0..n {
                let mut s = 0.0;
                for j in 0..n {
                    s += t[(i, j)] * (kk * (g.x()[j] + 1.0)).cos();
                }
                assert!((s - kk * kk * (kk * (g.x()[i] + 1.0)).cos()).abs() < 1e-10);
            }
        }
    }

    #[test]
    fn interpolation_reproduces_band_limited_function() {
        let g = FourierGrid::new(0.0, 1.0, 12).unwrap();
        let f = |x: f64| 1.0 + (2.0 * PI * x).sin() + 0.3 * (2.0 * PI * 4.0 * x).cos();
        let vals = Mat::from_fn(12, 1, |i, _| f(g.x()[i]));
        let xs = [0.013, 0.5, 0.77, 0.99];
        let out = g.interpolate(vals.as_ref(), &xs);
        for (i, &x) in xs.iter().enumerate() {
            assert!((out[(i, 0)] - f(x)).abs() < 1e-12);
        }
    }

    #[test]
    fn rejects_bad_boxes() {
        assert!(FourierGrid::new(1.0, 1.0, 8).is_err());
        assert!(FourierGrid::new(f64::NAN, 1.0, 8).is_err());
        assert!(FourierGrid::new(0.0, 1.0, 1).is_err());
    }
}
