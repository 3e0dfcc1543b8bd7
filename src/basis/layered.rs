//! The basis of a heterostructure on a periodic box: N periodic sinc (grid) functions
//! χ_j in the mass coordinate s = ∫ m dz (see [`crate::problem::layered`] for the
//! Galerkin problem A c = E B c it carries). Coefficients are B-orthonormal
//! (∫|ψ|² dz = cᵀBc = 1); c_j ∝ ψ(z(s_j)) exactly for odd N.
//!
//! Geometry only: the map z ↔ s, node positions and evaluation of ψ(z).

use super::{Basis, FourierGrid};
use crate::error::{check_finite, InputError};
use crate::model::stack::{Heterostructure, Piece};
use faer::{Mat, MatRef};
use std::f64::consts::SQRT_2;

/// A heterostructure's mass-coordinate basis on the box and size of a [`FourierGrid`].
#[derive(Debug)]
pub struct LayeredBasis {
    stack: Heterostructure,
    grid: FourierGrid,
    /// The periodic grid of the mass coordinate: [0, S) with N points.
    sgrid: FourierGrid,
    pieces: Vec<Piece>,
    n: usize,
    s_len: f64,
    nodes: Vec<f64>,
}

impl LayeredBasis {
    /// The basis of `stack` in the box [grid.start, grid.stop) with N = grid.len()
    /// functions. Requires N ≥ 3 and a box that contains the stack: start ≤ 0 and
    /// stop ≥ L (the parts outside the stack continue the outer layers; with start = 0
    /// and stop = L the periodic box joins the last layer directly to the first).
    pub fn new(stack: &Heterostructure, grid: &FourierGrid) -> Result<Self, InputError> {
        let n = grid.len();
        if n < 3 {
            return Err(InputError::range("grid", "a FourierGrid with at least 3 points (odd counts preferred)", format!("{n} points")));
        }
        let total = stack.total_thickness();
        let (a0, a1) = (grid.start(), grid.stop());
        if !(a0 <= 0.0 && a1 >= total) {
            return Err(InputError::range(
                "grid",
                format!("a box [start, stop) containing the stack [0, {total}] nm, i.e. start <= 0 and stop >= {total}"),
                format!("[{a0}, {a1})"),
            ));
        }
        let pieces = stack.pieces(a0, a1);
        let s_len = pieces.last().map_or(0.0, |p| p.s1);
        if !(s_len.is_finite() && s_len > 0.0) {
            return Err(InputError::range("grid", "a box whose mass-weighted length ∫m dz is finite and > 0", s_len));
        }
        let sgrid = FourierGrid::new(0.0, s_len, n)?;
        let mut b = LayeredBasis { stack: stack.clone(), grid: grid.clone(), sgrid, pieces, n, s_len, nodes: Vec::new() };
        b.nodes = b.node_positions();
        Ok(b)
    }

    pub fn stack(&self) -> &Heterostructure {
        &self.stack
    }
    /// The user's grid: box [start, stop) and N.
    pub fn grid(&self) -> &FourierGrid {
        &self.grid
    }
    /// The pieces of constant mass covering the box.
    pub fn pieces(&self) -> &[Piece] {
        &self.pieces
    }
    /// The periodic grid [0, S) of the mass coordinate (N points, its FFT plans).
    pub fn s_grid(&self) -> &FourierGrid {
        &self.sgrid
    }
    /// Period S = ∫_{start}^{stop} m dz of the mass coordinate (nm·m_e).
    pub fn s_length(&self) -> f64 {
        self.s_len
    }

    /// s(z) for z in the box; z outside the box is first wrapped into [start, stop)
    /// (the problem is periodic). NaN for NaN input.
    fn s_at(&self, z: f64) -> f64 {
        let (a0, a1) = (self.grid.start(), self.grid.stop());
        let mut z = z;
        if !(z >= a0 && z < a1) {
            let len = a1 - a0;
            z = a0 + (z - a0).rem_euclid(len);
        }
        let i = self.pieces.partition_point(|p| p.z1 <= z).min(self.pieces.len() - 1);
        let p = &self.pieces[i];
        p.s0 + p.mass * (z - p.z0)
    }

    /// z(s) for s in [0, S].
    fn z_at(&self, s: f64) -> f64 {
        let i = self.pieces.partition_point(|p| p.s1 <= s).min(self.pieces.len() - 1);
        let p = &self.pieces[i];
        p.z0 + (s - p.s0) / p.mass
    }

    /// Positions z(s_j) (nm) of the basis nodes s_j = j·S/N; the coefficient c_j of a
    /// state is ψ(z(s_j))·√(S/N) (exactly for odd N), handy for sign and overview plots.
    fn node_positions(&self) -> Vec<f64> {
        (0..self.n).map(|j| self.z_at(j as f64 * self.s_len / self.n as f64)).collect()
    }

    pub fn check_coefs(&self, coefs: MatRef<'_, f64>) -> std::result::Result<(), InputError> {
        if coefs.nrows() != self.n {
            return Err(InputError::Length { argument: "coefs".into(), expected: self.n, got: coefs.nrows() });
        }
        for j in 0..coefs.ncols() {
            for i in 0..self.n {
                if !coefs[(i, j)].is_finite() {
                    return Err(InputError::NotFinite { argument: "coefs".into(), index: j * self.n + i });
                }
            }
        }
        Ok(())
    }

    /// ψ(z) of the states whose coefficients are the columns of `coefs` (N × k), as a
    /// z.len() × k matrix: the trigonometric series evaluated at s(z). With
    /// B-orthonormal coefficients ∫|ψ|² dz = 1. Points must lie in the box.
    fn evaluate_at(&self, coefs: MatRef<'_, f64>, z: &[f64]) -> std::result::Result<Mat<f64>, InputError> {
        self.check_coefs(coefs)?;
        check_finite("z", z)?;
        self.grid.check_in_box("x", z)?;
        // ψ̃(s) = Σ_p x̂_p e^{i k_p s}/√S with x̂ the unitary DFT of c: the series of the
        // samples c_j/√(S/N) on the s-grid, the even-N Nyquist function being the
        // normalised cosine √(2/S)·cos(πNs/S).
        let scale = 1.0 / self.sgrid.dx().sqrt();
        let values = Mat::from_fn(self.n, coefs.ncols(), |i, j| coefs[(i, j)] * scale);
        let s: Vec<f64> = z.iter().map(|&zi| self.s_at(zi)).collect();
        Ok(self.sgrid.trig_series(values.as_ref(), &s, SQRT_2))
    }
}

impl Basis for LayeredBasis {
    fn size(&self) -> usize {
        self.n
    }
    /// Positions z(s_j) (nm) of the nodes; they crowd where the mass is large.
    fn points(&self) -> &[f64] {
        &self.nodes
    }
    fn evaluate(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError> {
        self.evaluate_at(coefs, x)
    }
    /// c_j ∝ ψ(z(s_j)) (exactly for odd N).
    fn sample_sign_profile(&self, coefs: MatRef<'_, f64>) -> Mat<f64> {
        coefs.to_owned()
    }
    fn describe(&self) -> String {
        format!(
            "LayeredBasis(layers={}, field_kv_cm={}, box=[{}, {}), modes={})",
            self.stack.layers().len(),
            self.stack.field_kv_cm(),
            self.grid.start(),
            self.grid.stop(),
            self.n
        )
    }
}
