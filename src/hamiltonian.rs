//! Hamiltonian H = T + V in a spectral basis: dense assembly and matrix-free H·ψ.
//!
//! Kinetic energy: with constant mass m, T = −(ħ²/2m) d²/dx²; with a mass profile
//! m(x) on a Fourier grid, the BenDaniel-Duke (1966) form T = −(ħ²/2) d/dx (1/m) d/dx,
//! built as Dᵀ·diag(ħ²/2m(x_j))·D with D the real antisymmetric spectral derivative
//! (Nyquist mode dropped from D), plus the Nyquist mode's kinetic energy
//! ⟨ħ²/2m⟩·k_N² on the alternating vector (−1)^j/√n, so that a constant profile gives
//! exactly the constant-mass Fourier-grid operator. Symmetric by construction.
//! Energies and lengths are in the chosen [`Units`].

use crate::basis::{Basis, BasisRef, FourierGrid, HermiteBasis, LayeredBasis};
use crate::heterostructure::Heterostructure;
use std::sync::Arc;
use crate::error::{check_finite, check_positive, InputError, Result};
use crate::units::Units;
use faer::Mat;
use num_complex::Complex64;

/// Particle mass: one value, or a profile on the grid points (Fourier grids only).
/// In units of the unit system's mass unit (m_e in "atomic" and "semiconductor").
#[derive(Debug, Clone, PartialEq)]
pub enum Mass {
    Uniform(f64),
    Profile(Vec<f64>),
}

/// Kinetic prefactor ħ²/2m resolved from a [`Mass`] and the units.
#[derive(Debug, Clone, PartialEq)]
pub enum Kinetic {
    /// c = ħ²/2m (energy·length²).
    Uniform(f64),
    /// c_j = ħ²/2m(x_j) on the Fourier grid points.
    Profile(Vec<f64>),
}

/// Antisymmetric potential parts up to this many ε‖H‖ are dropped by
/// [`Hamiltonian::parity_blocks`] (below the backward error of a dense solve).
pub const PARITY_TOL: f64 = 4.0;

/// Largest |V| accepted: beyond this, squares in residuals and eigensolver
/// scaling overflow f64.
pub const MAX_ABS_POTENTIAL: f64 = 1e100;

/// Masses outside [1e-100, 1e100] overflow the kinetic prefactor.
fn check_mass_range(m: f64, index: Option<usize>) -> std::result::Result<(), InputError> {
    if (1e-100..=1e100).contains(&m) {
        return Ok(());
    }
    let got = match index {
        Some(i) => format!("{m:e} at index {i}"),
        None => format!("{m:e}"),
    };
    Err(InputError::range("mass", "in [1e-100, 1e100]", got))
}

/// A real symmetric Hamiltonian on a basis.
#[derive(Debug, Clone)]
pub struct Hamiltonian {
    basis: BasisRef,
    potential: Vec<f64>,
    mass: Mass,
    kinetic: Kinetic,
    units: Units,
}

impl Hamiltonian {
    /// `potential` is sampled on `basis.points()`; `mass` as in [`Mass`].
    pub fn new(basis: BasisRef, potential: Vec<f64>, mass: Mass, units: Units) -> Result<Self> {
        let b = basis.as_dyn();
        if potential.len() != b.points().len() {
            return Err(InputError::Length {
                argument: "potential".into(),
                expected: b.points().len(),
                got: potential.len(),
            }
            .into());
        }
        check_finite("potential", &potential)?;
        if let Some(i) = potential.iter().position(|v| v.abs() > MAX_ABS_POTENTIAL) {
            return Err(InputError::range(
                "potential",
                format!("finite with |V| <= {MAX_ABS_POTENTIAL:e} (larger values overflow the eigensolver)"),
                format!("{:e} at index {i}", potential[i]),
            )
            .into());
        }
        let kinetic = match &mass {
            Mass::Uniform(m) => {
                let m = *m;
                check_positive("mass", m)?;
                check_mass_range(m, None)?;
                Kinetic::Uniform(units.kinetic_prefactor(m))
            }
            Mass::Profile(ms) => {
                if matches!(basis, BasisRef::Layered(_)) {
                    return Err(InputError::range("basis", "a HermiteBasis or FourierGrid (use Hamiltonian::layered for heterostructures)", "a LayeredBasis").into());
                }
                if !matches!(basis, BasisRef::Fourier(_)) {
                    return Err(InputError::range(
                        "mass",
                        "a single positive number for a HermiteBasis (mass profiles need a FourierGrid)",
                        "an array",
                    )
                    .into());
                }
                if ms.len() != b.size() {
                    return Err(InputError::Length { argument: "mass".into(), expected: b.size(), got: ms.len() }.into());
                }
                if let Some(i) = ms.iter().position(|m| !(m.is_finite() && *m > 0.0)) {
                    return Err(InputError::range("mass", "finite and > 0 at every grid point", format!("{} at index {i}", ms[i])).into());
                }
                for (i, &m) in ms.iter().enumerate() {
                    check_mass_range(m, Some(i))?;
                }
                Kinetic::Profile(ms.iter().map(|&m| units.kinetic_prefactor(m)).collect())
            }
        };
        Ok(Hamiltonian { basis, potential, mass, kinetic, units })
    }

    /// The BenDaniel-Duke Hamiltonian of a heterostructure on the box and size of `grid`
    /// (exact layer integrals, mass coordinate; see [`crate::heterostructure`]).
    /// `potential()` and `mass()` then hold the band edge and mass at the basis nodes.
    pub fn layered(stack: &Heterostructure, grid: &FourierGrid, units: Units) -> Result<Self> {
        let basis = Arc::new(LayeredBasis::new(stack, grid, units)?);
        let nodes = basis.points().to_vec();
        let potential = stack.potential(&nodes);
        let masses = stack.mass(&nodes);
        let kinetic = Kinetic::Profile(masses.iter().map(|&m| units.kinetic_prefactor(m)).collect());
        Ok(Hamiltonian { basis: BasisRef::Layered(basis), potential, mass: Mass::Profile(masses), kinetic, units })
    }

    /// Whether the eigenproblem is generalized (A c = E B c, heterostructures).
    pub fn is_generalized(&self) -> bool {
        matches!(self.basis, BasisRef::Layered(_))
    }

    pub fn basis(&self) -> &BasisRef {
        &self.basis
    }
    pub fn potential(&self) -> &[f64] {
        &self.potential
    }
    /// The mass as given (for reconstruction and display).
    pub fn mass(&self) -> &Mass {
        &self.mass
    }
    pub fn kinetic(&self) -> &Kinetic {
        &self.kinetic
    }
    pub fn units(&self) -> Units {
        self.units
    }
    pub fn size(&self) -> usize {
        self.basis.as_dyn().size()
    }

    /// An upper estimate of ‖H‖₂ (largest kinetic energy plus max |V|; for a
    /// heterostructure, of the standard-form operator), used for round-off floors.
    pub fn norm_estimate(&self) -> f64 {
        let vmax = self.potential.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        let cmax = match &self.kinetic {
            Kinetic::Uniform(c) => *c,
            Kinetic::Profile(cs) => cs.iter().cloned().fold(0.0, f64::max),
        };
        let kmax2 = match &self.basis {
            BasisRef::Fourier(g) => (std::f64::consts::PI / g.dx()).powi(2),
            BasisRef::Hermite(b) => (2.0 * b.size() as f64 + 1.0) / (b.length() * b.length()),
            BasisRef::Layered(l) => {
                // k_s = π N/S in the mass coordinate; T = (ħ²/2m_e) k_s² relative to B ≥ 1/m_max.
                let p = l.problem();
                let ks = std::f64::consts::PI * p.dim() as f64 / p.s_length();
                let mmax = match &self.mass {
                    Mass::Profile(ms) => ms.iter().cloned().fold(0.0, f64::max),
                    Mass::Uniform(m) => *m,
                };
                return self.units.hbar2_over_2me() * ks * ks * mmax + vmax;
            }
        };
        cmax * kmax2 + vmax
    }

    /// Bytes a dense N×N matrix of this Hamiltonian takes.
    pub fn dense_bytes(&self) -> u64 {
        let n = self.size() as u64;
        n * n * 8
    }

    /// The dense N×N matrix (real symmetric). For a heterostructure this is the
    /// matrix A of the generalized problem A c = E B c (B: [`Hamiltonian::overlap`]).
    pub fn matrix(&self) -> Mat<f64> {
        match (&self.basis, &self.kinetic) {
            (BasisRef::Hermite(b), Kinetic::Uniform(c)) => {
                let t = b.neg_laplacian();
                b.potential_matrix(&self.potential) + Mat::from_fn(t.nrows(), t.ncols(), |i, j| c * t[(i, j)])
            }
            (BasisRef::Fourier(g), Kinetic::Uniform(c)) => {
                let t = g.neg_laplacian();
                g.potential_matrix(&self.potential) + Mat::from_fn(t.nrows(), t.ncols(), |i, j| c * t[(i, j)])
            }
            (BasisRef::Fourier(g), Kinetic::Profile(cs)) => g.potential_matrix(&self.potential) + variable_mass_kinetic(g, cs),
            (BasisRef::Layered(l), _) => l.problem().matrix_a_unchecked(),
            (BasisRef::Hermite(_), Kinetic::Profile(_)) => unreachable_profile(),
        }
    }

    /// Even and odd parity blocks of [`Hamiltonian::matrix`] (functions n = 0, 2, …
    /// and n = 1, 3, …) when `H` commutes with the reflection about the centre of
    /// a Hermite basis (uniform mass, potential symmetric at the nodes to within
    /// [`PARITY_TOL`]·ε‖H‖; see
    /// [`HermiteBasis::parity_potential_blocks`]); `None` otherwise.
    pub fn parity_blocks(&self) -> Option<[Mat<f64>; 2]> {
        let (BasisRef::Hermite(b), Kinetic::Uniform(c)) = (&self.basis, &self.kinetic) else {
            return None;
        };
        let (even, odd) = b.parity_potential_blocks(&self.potential, PARITY_TOL * f64::EPSILON * self.norm_estimate())?;
        // −d²/dx² = p̂²/L² couples n to n ± 2 only: tridiagonal in each block.
        let s = c / (b.length() * b.length());
        let add_kinetic = |mut v: Mat<f64>, parity: usize| {
            for r in 0..v.nrows() {
                let n = 2 * r + parity;
                v[(r, r)] += s * (n as f64 + 0.5);
                if r + 1 < v.nrows() {
                    let off = -0.5 * s * (((n + 1) * (n + 2)) as f64).sqrt();
                    v[(r + 1, r)] += off;
                    v[(r, r + 1)] += off;
                }
            }
            v
        };
        Some([add_kinetic(even, 0), add_kinetic(odd, 1)])
    }

    /// The overlap (mass) matrix B of a generalized problem; `None` when B = I.
    pub fn overlap(&self) -> Option<Mat<f64>> {
        match &self.basis {
            BasisRef::Layered(l) => Some(l.problem().matrix_b_unchecked()),
            _ => None,
        }
    }

    /// y = B x (the identity except for heterostructures).
    pub fn apply_overlap_block(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        match &self.basis {
            BasisRef::Layered(l) => l.problem().apply_b(x, y, ncols),
            _ => {
                let n = self.size() * ncols;
                y[..n].copy_from_slice(&x[..n]);
            }
        }
    }

    /// y = H x for `ncols` columns stored column-major (column j is x[j*N..(j+1)*N]).
    /// Matrix-free: FFTs on a Fourier grid (O(N log N) per column), the quadrature
    /// table on a Hermite basis (O(N·M) per column).
    pub fn apply_block(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        let n = self.size();
        debug_assert!(x.len() >= n * ncols && y.len() >= n * ncols);
        match &self.basis {
            BasisRef::Fourier(g) => {
                let mut buf = vec![Complex64::new(0.0, 0.0); n];
                let mut aux = vec![Complex64::new(0.0, 0.0); n];
                let mut scratch = vec![Complex64::new(0.0, 0.0); g.forward().get_inplace_scratch_len()];
                // Two real columns per complex FFT: H(a + ib) = Ha + iHb because H is real.
                let mut j = 0;
                while j < ncols {
                    let second = j + 1 < ncols;
                    for i in 0..n {
                        let im = if second { x[(j + 1) * n + i] } else { 0.0 };
                        buf[i] = Complex64::new(x[j * n + i], im);
                    }
                    fourier_kinetic_apply(g, &self.kinetic, &mut buf, &mut aux, &mut scratch);
                    for i in 0..n {
                        let v = self.potential[i];
                        y[j * n + i] = buf[i].re + v * x[j * n + i];
                        if second {
                            y[(j + 1) * n + i] = buf[i].im + v * x[(j + 1) * n + i];
                        }
                    }
                    j += 2;
                }
            }
            BasisRef::Hermite(b) => hermite_apply(b, &self.kinetic, &self.potential, x, y, ncols),
            BasisRef::Layered(l) => l.problem().apply_a(x, y, ncols),
        }
    }

    /// y = H x for one vector, checking its length and finiteness.
    pub fn apply(&self, x: &[f64]) -> Result<Vec<f64>> {
        if x.len() != self.size() {
            return Err(InputError::Length { argument: "psi".into(), expected: self.size(), got: x.len() }.into());
        }
        check_finite("psi", x)?;
        let mut y = vec![0.0; x.len()];
        self.apply_block(x, &mut y, 1);
        Ok(y)
    }
}

fn unreachable_profile() -> ! {
    // Hamiltonian::new refuses mass profiles on Hermite bases.
    unreachable!("mass profile on a Hermite basis is rejected in Hamiltonian::new")
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
fn fourier_kinetic_apply(
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

/// y = (c·p̂²/L² + Φ diag(V) Φᵀ) x on a Hermite basis, O(N·M) per column.
fn hermite_apply(b: &HermiteBasis, kinetic: &Kinetic, v: &[f64], x: &[f64], y: &mut [f64], ncols: usize) {
    let n = b.size();
    let c = match kinetic {
        Kinetic::Uniform(c) => *c / (b.length() * b.length()),
        Kinetic::Profile(_) => unreachable_profile(),
    };
    let phi = b.phi();
    let xs = faer::MatRef::from_column_major_slice(&x[..n * ncols], n, ncols);
    // q = V ⊙ (Φᵀ x), then y = c·p̂² x + Φ q (two matrix products over the block).
    let mut q = b.nodal_values(xs);
    for j in 0..ncols {
        for (k, &vk) in v.iter().enumerate() {
            q[(k, j)] *= vk;
        }
    }
    let mut ys = faer::MatMut::from_column_major_slice_mut(&mut y[..n * ncols], n, ncols);
    for j in 0..ncols {
        for i in 0..n {
            // p̂² row i: diagonal i + ½, entries at i ± 2.
            let mut t = (i as f64 + 0.5) * xs[(i, j)];
            if i >= 2 {
                t -= 0.5 * (((i - 1) * i) as f64).sqrt() * xs[(i - 2, j)];
            }
            if i + 2 < n {
                t -= 0.5 * (((i + 1) * (i + 2)) as f64).sqrt() * xs[(i + 2, j)];
            }
            ys[(i, j)] = c * t;
        }
    }
    let par = crate::linalg::par_for(2 * n * phi.ncols() * ncols);
    faer::linalg::matmul::matmul(ys.as_mut(), faer::Accum::Add, phi, q.as_ref(), 1.0, par);
}

#[cfg(test)]
mod tests {
    use super::*;

    fn max_abs_diff(a: &[f64], b: &[f64]) -> f64 {
        a.iter().zip(b).map(|(x, y)| (x - y).abs()).fold(0.0, f64::max)
    }

    fn check_apply_matches_matrix(h: &Hamiltonian) {
        let n = h.size();
        let m = h.matrix();
        let x: Vec<f64> = (0..3 * n).map(|i| ((i * 7919) % 101) as f64 / 50.0 - 1.0).collect();
        let mut y = vec![0.0; 3 * n];
        h.apply_block(&x, &mut y, 3);
        for j in 0..3 {
            let want: Vec<f64> = (0..n).map(|i| (0..n).map(|l| m[(i, l)] * x[j * n + l]).sum()).collect();
            assert!(max_abs_diff(&want, &y[j * n..(j + 1) * n]) < 1e-9 * (1.0 + want.iter().map(|v| v.abs()).fold(0.0, f64::max)));
        }
        // Symmetry of the dense matrix.
        for i in 0..n {
            for j in 0..n {
                assert!((m[(i, j)] - m[(j, i)]).abs() < 1e-10);
            }
        }
    }

    #[test]
    fn apply_matches_dense_matrix_fourier_uniform_and_profile() {
        for n in [32, 33] {
            let g = Arc::new(FourierGrid::new(-5.0, 5.0, n).unwrap());
            let v: Vec<f64> = g.x().iter().map(|x| 0.5 * x * x).collect();
            let h = Hamiltonian::new(BasisRef::Fourier(g.clone()), v.clone(), Mass::Uniform(2.0), Units::Natural).unwrap();
            check_apply_matches_matrix(&h);
            let ms: Vec<f64> = g.x().iter().map(|x| 1.0 + 0.5 * (x / 2.0).tanh()).collect();
            let h = Hamiltonian::new(BasisRef::Fourier(g), v, Mass::Profile(ms), Units::Natural).unwrap();
            check_apply_matches_matrix(&h);
        }
    }

    #[test]
    fn constant_profile_equals_uniform_mass() {
        let g = Arc::new(FourierGrid::new(-3.0, 4.0, 24).unwrap());
        let v: Vec<f64> = g.x().iter().map(|x| x.sin()).collect();
        let a = Hamiltonian::new(BasisRef::Fourier(g.clone()), v.clone(), Mass::Uniform(0.7), Units::Natural).unwrap();
        let b = Hamiltonian::new(BasisRef::Fourier(g), v, Mass::Profile(vec![0.7; 24]), Units::Natural).unwrap();
        let (ma, mb) = (a.matrix(), b.matrix());
        for i in 0..24 {
            for j in 0..24 {
                assert!((ma[(i, j)] - mb[(i, j)]).abs() < 1e-10);
            }
        }
    }

    #[test]
    fn parity_blocks_are_the_even_and_odd_submatrices() {
        // A potential symmetric about the basis centre (ξ ↦ −ξ); the blocks must be
        // the even/odd rows and columns of the full matrix, the couplings zero.
        for (size, quad) in [(21, 43), (20, 40)] {
            let b = Arc::new(HermiteBasis::new(size, 0.3, 1.4, Some(quad)).unwrap());
            let v: Vec<f64> = b.nodes().iter().map(|xi| xi.powi(4) - 3.0 * xi * xi).collect();
            let h = Hamiltonian::new(BasisRef::Hermite(b.clone()), v, Mass::Uniform(0.7), Units::Natural).unwrap();
            let full = h.matrix();
            let [even, odd] = h.parity_blocks().expect("symmetric potential");
            let scale = (0..size).map(|i| full[(i, i)].abs()).fold(0.0, f64::max);
            for i in 0..size {
                for j in 0..size {
                    let got = match (i % 2, j % 2) {
                        (0, 0) => even[(i / 2, j / 2)],
                        (1, 1) => odd[(i / 2, j / 2)],
                        _ => 0.0,
                    };
                    assert!((got - full[(i, j)]).abs() < 1e-12 * scale, "({i},{j}) {got} vs {}", full[(i, j)]);
                }
            }
            // An asymmetric potential has no parity blocks.
            let w: Vec<f64> = b.nodes().iter().map(|xi| xi.powi(4) + 1e-6 * xi).collect();
            let g = Hamiltonian::new(BasisRef::Hermite(b), w, Mass::Uniform(0.7), Units::Natural).unwrap();
            assert!(g.parity_blocks().is_none());
        }
    }

    #[test]
    fn apply_matches_dense_matrix_hermite() {
        let b = Arc::new(HermiteBasis::new(20, 0.3, 1.4, None).unwrap());
        let v: Vec<f64> = b.points().iter().map(|x| x.powi(4) - x * x).collect();
        let h = Hamiltonian::new(BasisRef::Hermite(b), v, Mass::Uniform(1.0), Units::Natural).unwrap();
        check_apply_matches_matrix(&h);
    }

    #[test]
    fn rejects_bad_potential_and_mass() {
        let g = Arc::new(FourierGrid::new(0.0, 1.0, 8).unwrap());
        let r = BasisRef::Fourier(g);
        assert!(Hamiltonian::new(r.clone(), vec![0.0; 7], Mass::Uniform(1.0), Units::Natural).is_err());
        assert!(Hamiltonian::new(r.clone(), vec![f64::NAN; 8], Mass::Uniform(1.0), Units::Natural).is_err());
        assert!(Hamiltonian::new(r.clone(), vec![0.0; 8], Mass::Uniform(-1.0), Units::Natural).is_err());
        assert!(Hamiltonian::new(r, vec![0.0; 8], Mass::Profile(vec![1.0; 7]), Units::Natural).is_err());
    }
}
