//! The one interface split-step propagation needs from a grid: a periodic box in 1, 2 or 3
//! dimensions with an in-place, unnormalised FFT of the whole state.
//!
//! # Layout and conventions
//! * A state is a flat slice of `len()` complex samples ψ(x_i, y_j, z_l) in row-major
//!   (C, numpy) order: the **last axis is contiguous**, flat index (i·n_y + j)·n_z + l.
//! * Axis a is a [`FourierGrid`] ([`PeriodicGrid::axis`]): points x_j = start + j·dx and
//!   wave numbers k = 2π·fftfreq(n, dx) (numpy order). The spectrum produced by
//!   [`PeriodicGrid::forward`] has the same row-major layout, its entry (p, q, r) belonging
//!   to (k_x[p], k_y[q], k_z[r]).
//! * `forward` is Σ_j ψ_j e^{−i k·x_j} (unnormalised), `inverse` the same with e^{+i k·x}
//!   (unnormalised), so inverse(forward(ψ)) = len()·ψ.
//! * The discrete norm is Σ|ψ|²·dV with dV = [`PeriodicGrid::cell_volume`] (dx, dx·dy or
//!   dx·dy·dz), the quadrature of ∫|ψ|² over the box.
//!
//! Implemented by [`FourierGrid`] (1D) and [`ProductGrid`](super::ProductGrid) (2D, 3D).

use num_complex::Complex64;

use super::FourierGrid;

/// A periodic grid with an in-place unnormalised FFT of the whole state (see the module docs).
pub trait PeriodicGrid: Send + Sync + std::fmt::Debug {
    /// Number of axes: 1, 2 or 3.
    fn ndim(&self) -> usize;
    /// Points per axis, row-major (the last axis is contiguous in a state).
    fn shape(&self) -> Vec<usize>;
    /// Total number of points (the product of `shape`).
    fn len(&self) -> usize;
    /// Whether the grid has no points (never true for a valid grid).
    fn is_empty(&self) -> bool {
        self.len() == 0
    }
    /// The 1D grid of axis `a` (`a < ndim()`; `a = 0` is x).
    fn axis(&self, a: usize) -> &FourierGrid;
    /// dV = Π dx_a (length^ndim).
    fn cell_volume(&self) -> f64;
    /// Length of the scratch slice `forward` and `inverse` need (any larger slice works).
    fn scratch_len(&self) -> usize;
    /// In-place unnormalised forward transform (e^{−ik·x}) of a whole state of `len()` samples.
    fn forward(&self, psi: &mut [Complex64], scratch: &mut [Complex64]);
    /// In-place unnormalised inverse transform (e^{+ik·x}) of a whole spectrum of `len()` entries.
    fn inverse(&self, psi: &mut [Complex64], scratch: &mut [Complex64]);
    /// Short human-readable description.
    fn describe_grid(&self) -> String;

    /// |k|² = Σ_a k_a² at every point of the spectrum layout (row-major).
    fn k_squared(&self) -> Vec<f64> {
        let shape = self.shape();
        let mut out = vec![0.0; self.len()];
        let mut stride = self.len();
        for (a, &n) in shape.iter().enumerate() {
            stride /= n;
            let k = self.axis(a).k();
            for (idx, o) in out.iter_mut().enumerate() {
                let kk = k[(idx / stride) % n];
                *o += kk * kk;
            }
        }
        out
    }
}

impl PeriodicGrid for FourierGrid {
    fn ndim(&self) -> usize {
        1
    }
    fn shape(&self) -> Vec<usize> {
        vec![FourierGrid::len(self)]
    }
    fn len(&self) -> usize {
        FourierGrid::len(self)
    }
    fn axis(&self, _a: usize) -> &FourierGrid {
        self
    }
    fn cell_volume(&self) -> f64 {
        self.dx()
    }
    fn scratch_len(&self) -> usize {
        FourierGrid::forward(self).get_inplace_scratch_len().max(FourierGrid::inverse(self).get_inplace_scratch_len())
    }
    #[inline]
    fn forward(&self, psi: &mut [Complex64], scratch: &mut [Complex64]) {
        FourierGrid::forward(self).process_with_scratch(psi, scratch);
    }
    #[inline]
    fn inverse(&self, psi: &mut [Complex64], scratch: &mut [Complex64]) {
        FourierGrid::inverse(self).process_with_scratch(psi, scratch);
    }
    fn describe_grid(&self) -> String {
        <FourierGrid as super::Basis>::describe(self)
    }
    fn k_squared(&self) -> Vec<f64> {
        self.k().iter().map(|k| k * k).collect()
    }
}
