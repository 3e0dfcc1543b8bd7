//! Product grids: the tensor product of two or three periodic [`FourierGrid`]s, for
//! split-step propagation and imaginary time in 2D and 3D.
//!
//! # Layout
//! A state on `ProductGrid([gx, gy, gz])` is a flat row-major (C, numpy) array of shape
//! (n_x, n_y, n_z): flat index (i·n_y + j)·n_z + l holds ψ(x_i, y_j, z_l); the spectrum of
//! [`PeriodicGrid::forward`] has the same layout over (k_x[p], k_y[q], k_z[r]) (numpy
//! `fftfreq` order on every axis). dV = dx·dy·dz; Σ|ψ|² dV = 1 for a normalised state.
//!
//! # Multi-dimensional FFT
//! One 1D transform per axis with the axis grids' rustfft plans (made once, with the
//! grids). The last axis is contiguous: its lines are transformed in place, several per
//! call. Every other axis is strided: its lines are gathered, [`BLOCK`] adjacent lines at a
//! time (each row read is a contiguous run of `BLOCK` samples), into a contiguous buffer,
//! transformed there and scattered back. Lines are spread over rayon workers, each with its
//! own part of the caller's scratch slice, so a transform allocates nothing. Every line is
//! transformed by the same plan in the same way whichever worker takes it: the result does
//! not depend on the number of threads (bit for bit).
//!
//! rustfft is used directly (no multi-dimensional FFT crate): the gather/scatter above is a
//! few dozen lines and keeps plans, scratch and threads under the propagator's control.

use std::sync::Arc;

use num_complex::Complex64;
use rayon::prelude::*;

use super::fourier::{FourierGrid, MAX_POINTS};
use super::periodic::PeriodicGrid;
use crate::error::InputError;

/// Adjacent strided lines gathered per block (a row read is BLOCK·16 bytes contiguous).
pub const BLOCK: usize = 16;
/// Grids smaller than this are transformed on the calling thread (fork/join would cost more).
const PAR_MIN_POINTS: usize = 1 << 15;
/// Most rayon workers a transform is split over.
const MAX_WORKERS: usize = 64;

/// A 2D or 3D periodic product grid with its per-axis FFT plans (see the module docs).
#[derive(Clone)]
pub struct ProductGrid {
    axes: Vec<Arc<FourierGrid>>,
    shape: Vec<usize>,
    len: usize,
    /// Scratch of one worker: BLOCK lines of the longest axis plus the largest FFT scratch.
    worker_len: usize,
    fft_scratch: usize,
    workers: usize,
}

impl std::fmt::Debug for ProductGrid {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}", self.describe_grid())
    }
}

/// A raw pointer shared by the workers of one transform, each touching a disjoint set of
/// indices (see `transform_axis`).
struct SharedPtr(*mut Complex64);
// SAFETY: the pointer is only dereferenced at indices owned by one worker (disjoint line
// blocks) while the `&mut` borrow it came from is held by the transform.
unsafe impl Sync for SharedPtr {}
unsafe impl Send for SharedPtr {}
impl SharedPtr {
    fn get(&self) -> *mut Complex64 {
        self.0
    }
}

impl ProductGrid {
    /// The product of 2 or 3 axis grids (x, y[, z]); at most 2^28 points in all.
    pub fn new(axes: Vec<Arc<FourierGrid>>) -> Result<ProductGrid, InputError> {
        if !(2..=3).contains(&axes.len()) {
            return Err(InputError::range("axes", "2 or 3 FourierGrids (x, y[, z])", format!("{} grids", axes.len())));
        }
        let shape: Vec<usize> = axes.iter().map(|g| g.len()).collect();
        let len = shape.iter().try_fold(1usize, |acc, &n| acc.checked_mul(n)).filter(|&l| l <= MAX_POINTS);
        let Some(len) = len else {
            return Err(InputError::range(
                "axes",
                format!("grids with at most {MAX_POINTS} points in all (2^28: 4 GiB per complex state)"),
                format!("shape {shape:?}"),
            ));
        };
        let n_max = shape.iter().copied().max().unwrap_or(1);
        let fft_scratch = axes
            .iter()
            .map(|g| g.forward().get_inplace_scratch_len().max(g.inverse().get_inplace_scratch_len()))
            .max()
            .unwrap_or(0);
        let workers = if len >= PAR_MIN_POINTS { rayon::current_num_threads().clamp(1, MAX_WORKERS) } else { 1 };
        Ok(ProductGrid { axes, shape, len, worker_len: BLOCK * n_max + fft_scratch, fft_scratch, workers })
    }

    /// The axis grids (x, y[, z]).
    pub fn axes(&self) -> &[Arc<FourierGrid>] {
        &self.axes
    }

    /// The 1D FFT of every line along axis `a`, in place (`inverse`: e^{+ikx}).
    fn transform_axis(&self, a: usize, psi: &mut [Complex64], scratch: &mut [Complex64], inverse: bool) {
        let n = self.shape[a];
        let inner: usize = self.shape[a + 1..].iter().product();
        let outer = self.len / (n * inner);
        let g = &self.axes[a];
        let fft = if inverse { g.inverse() } else { g.forward() };
        let workers = self.workers.min(scratch.len() / self.worker_len).max(1);
        let fs = self.fft_scratch;
        if inner == 1 {
            // Contiguous lines: several per call, one contiguous run of lines per worker.
            if workers == 1 {
                fft.process_with_scratch(psi, &mut scratch[..fs]);
                return;
            }
            let per = outer.div_ceil(workers) * n;
            psi.par_chunks_mut(per)
                .zip(scratch.par_chunks_mut(self.worker_len))
                .for_each(|(p, s)| fft.process_with_scratch(p, &mut s[..fs]));
            return;
        }
        // Strided lines: blocks of BLOCK adjacent lines (same outer index o, inner i0..i0+b).
        let per_outer = inner.div_ceil(BLOCK);
        let tasks = outer * per_outer;
        let per_worker = tasks.div_ceil(workers);
        let base = SharedPtr(psi.as_mut_ptr());
        let len = self.len;
        let work = |w: usize, s: &mut [Complex64]| {
            let (buf, fscr) = s.split_at_mut(BLOCK * n);
            for t in w * per_worker..((w + 1) * per_worker).min(tasks) {
                let o = t / per_outer;
                let i0 = (t % per_outer) * BLOCK;
                let b = BLOCK.min(inner - i0);
                let start = o * n * inner + i0;
                debug_assert!(start + (n - 1) * inner + b <= len);
                let p = base.get();
                for j in 0..n {
                    let row = start + j * inner;
                    for q in 0..b {
                        // SAFETY: row + q < len (checked above); the indices
                        // o·n·inner + j·inner + i0 + q of block t belong to task t only,
                        // and every task is run by exactly one worker.
                        buf[q * n + j] = unsafe { *p.add(row + q) };
                    }
                }
                fft.process_with_scratch(&mut buf[..b * n], &mut fscr[..fs]);
                for j in 0..n {
                    let row = start + j * inner;
                    for q in 0..b {
                        // SAFETY: as for the gather above.
                        unsafe { *p.add(row + q) = buf[q * n + j] };
                    }
                }
            }
        };
        if workers == 1 {
            work(0, &mut scratch[..self.worker_len]);
        } else {
            scratch
                .par_chunks_mut(self.worker_len)
                .take(workers)
                .enumerate()
                .for_each(|(w, s)| work(w, s));
        }
    }
}

impl PeriodicGrid for ProductGrid {
    fn ndim(&self) -> usize {
        self.shape.len()
    }
    fn shape(&self) -> Vec<usize> {
        self.shape.clone()
    }
    fn len(&self) -> usize {
        self.len
    }
    fn axis(&self, a: usize) -> &FourierGrid {
        &self.axes[a]
    }
    fn cell_volume(&self) -> f64 {
        self.axes.iter().map(|g| g.dx()).product()
    }
    fn scratch_len(&self) -> usize {
        self.workers * self.worker_len
    }
    fn forward(&self, psi: &mut [Complex64], scratch: &mut [Complex64]) {
        for a in (0..self.shape.len()).rev() {
            self.transform_axis(a, psi, scratch, false);
        }
    }
    fn inverse(&self, psi: &mut [Complex64], scratch: &mut [Complex64]) {
        for a in 0..self.shape.len() {
            self.transform_axis(a, psi, scratch, true);
        }
    }
    fn describe_grid(&self) -> String {
        let parts: Vec<String> = self
            .axes
            .iter()
            .map(|g| format!("[{}, {}) × {}", g.start(), g.stop(), g.len()))
            .collect();
        format!("ProductGrid({})", parts.join(", "))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    fn grids(spec: &[(f64, f64, usize)]) -> ProductGrid {
        ProductGrid::new(spec.iter().map(|&(a, b, n)| Arc::new(FourierGrid::new(a, b, n).unwrap())).collect()).unwrap()
    }

    fn naive_dft(shape: &[usize], data: &[Complex64], sign: f64) -> Vec<Complex64> {
        // Direct O(N²) multi-dimensional DFT: Σ_x data[x] e^{sign·2πi Σ_a p_a x_a / n_a}.
        let len: usize = shape.iter().product();
        let idx = |mut f: usize| -> Vec<usize> {
            let mut out = vec![0; shape.len()];
            for a in (0..shape.len()).rev() {
                out[a] = f % shape[a];
                f /= shape[a];
            }
            out
        };
        (0..len)
            .map(|p| {
                let pi = idx(p);
                (0..len)
                    .map(|x| {
                        let xi = idx(x);
                        let ph: f64 = (0..shape.len()).map(|a| (pi[a] * xi[a]) as f64 / shape[a] as f64).sum();
                        data[x] * Complex64::from_polar(1.0, sign * 2.0 * PI * ph)
                    })
                    .sum()
            })
            .collect()
    }

    // Source: the definition of the multi-dimensional DFT (direct summation).
    #[test]
    fn matches_direct_dft_2d_and_3d() {
        for spec in [vec![(0.0, 1.0, 6), (0.0, 2.0, 5)], vec![(0.0, 1.0, 4), (-1.0, 1.0, 3), (0.0, 3.0, 5)], vec![(0.0, 1.0, 3), (0.0, 1.0, 37)]] {
            let g = grids(&spec);
            let shape = g.shape();
            let data: Vec<Complex64> = (0..g.len()).map(|j| Complex64::new((j as f64 * 0.37).sin(), (j as f64 * 1.1).cos())).collect();
            let mut psi = data.clone();
            let mut scratch = vec![Complex64::new(0.0, 0.0); g.scratch_len()];
            g.forward(&mut psi, &mut scratch);
            let want = naive_dft(&shape, &data, -1.0);
            for (a, b) in psi.iter().zip(&want) {
                assert!((a - b).norm() < 1e-11, "{shape:?}: {a} vs {b}");
            }
            g.inverse(&mut psi, &mut scratch);
            for (a, b) in psi.iter().zip(&data) {
                assert!((a / g.len() as f64 - b).norm() < 1e-13);
            }
        }
    }

    // Source: separability of the plane wave e^{i(k_x x + k_y y)}: its transform is a single
    // spike of height N at (p, q), and k_squared there is k_x² + k_y² (the axis fftfreq).
    #[test]
    fn plane_wave_lands_on_its_mode_parallel_path() {
        let g = grids(&[(-3.0, 3.0, 256), (0.0, 4.0, 160)]); // ≥ PAR_MIN_POINTS: the parallel path
        assert!(g.workers >= 1 && g.len() >= PAR_MIN_POINTS);
        let (p, q) = (7usize, 160 - 3);
        let (kx, ky) = (g.axis(0).k()[p], g.axis(1).k()[q]);
        let mut psi: Vec<Complex64> = (0..g.len())
            .map(|f| {
                let (i, j) = (f / 160, f % 160);
                Complex64::from_polar(1.0, kx * g.axis(0).x()[i] + ky * g.axis(1).x()[j])
            })
            .collect();
        let mut scratch = vec![Complex64::new(0.0, 0.0); g.scratch_len()];
        g.forward(&mut psi, &mut scratch);
        let peak = p * 160 + q;
        for (f, z) in psi.iter().enumerate() {
            let want = if f == peak { g.len() as f64 } else { 0.0 };
            assert!((z.norm() - want).abs() < 1e-8 * g.len() as f64, "mode {f}: {z}");
        }
        let ksq = g.k_squared();
        assert!((ksq[peak] - (kx * kx + ky * ky)).abs() < 1e-12);
        // A smaller scratch (one worker) gives bitwise the same transform.
        let mut a: Vec<Complex64> = (0..g.len()).map(|j| Complex64::new((j as f64).sin(), 0.3)).collect();
        let mut b = a.clone();
        g.forward(&mut a, &mut scratch);
        let mut one = vec![Complex64::new(0.0, 0.0); g.worker_len];
        g.forward(&mut b, &mut one);
        assert_eq!(a, b);
    }

    #[test]
    fn rejects_bad_axis_counts() {
        let g = Arc::new(FourierGrid::new(0.0, 1.0, 4).unwrap());
        assert!(ProductGrid::new(vec![g.clone()]).is_err());
        assert!(ProductGrid::new(vec![g.clone(); 4]).is_err());
        let big = Arc::new(FourierGrid::new(0.0, 1.0, 1 << 15).unwrap());
        let e = ProductGrid::new(vec![big.clone(), big.clone(), big]).unwrap_err();
        assert!(e.to_string().contains("`axes`"), "{e}");
        let g3 = grids(&[(0.0, 1.0, 4), (0.0, 2.0, 5), (0.0, 0.5, 2)]);
        assert!((g3.cell_volume() - 0.25 * 0.4 * 0.25).abs() < 1e-15);
        assert_eq!(g3.shape(), vec![4, 5, 2]);
    }
}
