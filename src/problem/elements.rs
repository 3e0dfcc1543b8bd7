//! The Hamiltonian on Legendre spectral elements ([`crate::basis::elements`]): the weak
//! form of −c d/dx (w dψ/dx) + V ψ = E ψ, w = 1/m, as the symmetric-definite pencil
//! A u = E B u,
//!   A_ij = Σ_e Σ_q (2/h_e)·c·w_q ω_q D_qi D_qj + Σ_e Σ_q (h_e/2) ω_q V_q δ_ij,
//!   B_ii = Σ_e Σ_q (h_e/2) ω_q δ_ij (GLL-lumped, diagonal, positive),
//! with ω_q the GLL weights and D_qi = ℓ_i'(ξ_q). A is banded (bandwidth p). The
//! stiffness is exact for w polynomial of degree ≤ 1 within an element; the lumped mass
//! is the usual GLL quadrature (spectrally accurate). The BenDaniel-Duke condition
//! (w ψ' continuous, BenDaniel & Duke 1966) is the natural interface condition of this
//! weak form: a mass step needs only a breakpoint. A potential linear within each
//! element (a uniform field) is integrated exactly enough for spectral convergence; a
//! kink of V at a breakpoint costs nothing.
//!
//! Coordinates, c, w and V are in the caller's units (e.g. nm, ħ²/2m_e in meV·nm², 1/m
//! in 1/m_e, meV); eigenvectors are B-orthonormal, i.e. ∫ψ² dx = 1 in GLL quadrature.

use super::{BandPencil, DiscreteProblem, Structure};
use crate::basis::elements::ElementBasis;
use crate::error::{Error, InputError};
use crate::linalg::banded::{self, SymBand};
use faer::{Mat, MatRef};
use std::sync::Arc;

/// Assemble the weak form of −c d/dx (w dψ/dx) + V ψ = E ψ on `basis` (module docs): `c` the
/// kinetic prefactor (ħ²/2m_e, or 1/2 in natural units; finite, > 0),
/// `stiffness_weight` w = 1/m and `potential` V sampled on the basis points
/// (w finite and > 0, V finite). Returns A as a symmetric band matrix of bandwidth p
/// and the diagonal of B.
pub fn assemble(basis: &ElementBasis, c: f64, stiffness_weight: &[f64], potential: &[f64]) -> Result<ElementPencil, InputError> {
    crate::error::check_positive("c", c)?;
    let np = basis.points().len();
    for (name, v) in [("stiffness_weight", stiffness_weight), ("potential", potential)] {
        if v.len() != np {
            return Err(InputError::Length { argument: name.into(), expected: np, got: v.len() });
        }
        crate::error::check_finite(name, v)?;
    }
    if let Some(i) = stiffness_weight.iter().position(|w| *w <= 0.0) {
        return Err(InputError::range(
            "stiffness_weight",
            "> 0 at every sample point (1/mass with a positive mass)",
            format!("{} at x = {}", stiffness_weight[i], basis.points()[i]),
        ));
    }
    let p = basis.order();
    let m = p + 1;
    let n = basis.size();
    let mut a = SymBand::zeros(n, p)?;
    let mut b = vec![0.0; n];
    let d = basis.gll().differentiation();
    // s_q = (2/h)·c·w_q·ω_q: the stiffness weights of an element's quadrature points.
    let mut s = vec![0.0; m];
    let mut kloc = vec![0.0; m * m];
    let mut stiff = Vec::with_capacity(np);
    for e in 0..basis.elements().len() {
        element_stiffness(basis, e, c, stiffness_weight, &mut s, &mut kloc);
        stiff.extend_from_slice(&s);
        for i in 0..m {
            let Some(gi) = basis.global_index(e, i) else { continue };
            for j in 0..=i {
                let Some(gj) = basis.global_index(e, j) else { continue };
                a.add(gi, gj, kloc[i * m + j])?;
            }
            let wq = basis.quadrature_weights()[e * m + i];
            a.add(gi, gi, wq * potential[e * m + i])?;
            b[gi] += wq;
        }
    }
    Ok(ElementPencil {
        a,
        b,
        v_min: potential.iter().cloned().fold(f64::INFINITY, f64::min),
        order: p,
        stiff,
        massv: basis.quadrature_weights().iter().zip(potential).map(|(w, v)| w * v).collect(),
        diff: d.to_vec(),
    })
}

/// The stiffness of element `e` before any numbering: the weights
/// `s[q]` = (2/h_e)·c·w_q·ω_q of its GLL points and the full symmetric (p+1)×(p+1) matrix
/// `k[i·(p+1) + j]` = Σ_q s_q D_qi D_qj (row-major), with `stiffness_weight` w sampled on
/// the basis points. The weak form of [`assemble`] is Σ_e of these plus the diagonal
/// (h_e/2)·ω_q·(V_q − E); numberings other than the Dirichlet one (open ends, Bloch
/// periods: [`ElementBasis::open_index`], [`ElementBasis::periodic_index`]) assemble
/// from here. `s` must have p + 1 entries and `k` (p+1)² (internal callers; no checks
/// beyond the slice bounds).
pub fn element_stiffness(basis: &ElementBasis, e: usize, c: f64, stiffness_weight: &[f64], s: &mut [f64], k: &mut [f64]) {
    let m = basis.order() + 1;
    let el = basis.elements()[e];
    let omega = basis.gll().weights();
    let d = basis.gll().differentiation();
    for q in 0..m {
        s[q] = 2.0 / el.h * c * stiffness_weight[e * m + q] * omega[q];
    }
    k[..m * m].fill(0.0);
    for q in 0..m {
        let row = &d[q * m..(q + 1) * m];
        for i in 0..m {
            let f = s[q] * row[i];
            for j in 0..=i {
                k[i * m + j] += f * row[j];
            }
        }
    }
    for i in 0..m {
        for j in 0..i {
            k[j * m + i] = k[i * m + j];
        }
    }
}

/// The discretised pencil A u = E B u of [`assemble`].
#[derive(Clone, Debug)]
pub struct ElementPencil {
    /// A, symmetric band (bandwidth p), lower band storage.
    pub a: SymBand,
    /// Diagonal of the lumped mass matrix B (> 0).
    pub b: Vec<f64>,
    /// min_q V_q over the sample points (see [`ElementPencil::lower_bound`]).
    v_min: f64,
    order: usize,
    /// Per sample point: s_q = (2/h)·c·w_q·ω_q.
    stiff: Vec<f64>,
    /// Per sample point: (h/2)·ω_q·V_q.
    massv: Vec<f64>,
    /// GLL differentiation matrix, row-major.
    diff: Vec<f64>,
}

impl ElementPencil {
    /// uᵀ A u evaluated element by element as Σ_q s_q (Σ_i D_qi u_i)² + Σ_q (h/2)ω_q V_q u_q²:
    /// the kinetic part is a sum of non-negative terms, so it carries no cancellation
    /// error of size ε‖A‖‖u‖² (unlike the band product), and the Rayleigh quotient of a
    /// computed eigenvector is accurate relative to the eigenvalue.
    /// Errors if `u` does not have one entry per unknown.
    pub fn energy(&self, u: &[f64]) -> Result<f64, InputError> {
        if u.len() != self.b.len() {
            return Err(InputError::Length { argument: "u".into(), expected: self.b.len(), got: u.len() });
        }
        let m = self.order + 1;
        let n_el = self.stiff.len() / m;
        let mut loc = vec![0.0; m];
        let (mut kin, mut pot) = (0.0, 0.0);
        for e in 0..n_el {
            for (i, li) in loc.iter_mut().enumerate() {
                let g = e * self.order + i; // global node; unknown g − 1
                *li = if g == 0 || g == n_el * self.order { 0.0 } else { u[g - 1] };
            }
            for q in 0..m {
                let du: f64 = self.diff[q * m..(q + 1) * m].iter().zip(&loc).map(|(d, x)| d * x).sum();
                kin += self.stiff[e * m + q] * du * du;
                pot += self.massv[e * m + q] * loc[q] * loc[q];
            }
        }
        Ok(kin + pot)
    }

    /// A lower bound of every eigenvalue: the smallest potential sample V_min.
    ///
    /// uᵀAu = Σ_e Σ_q s_q (Σ_i D_qi u_i)² + Σ_e Σ_q (h_e/2) ω_q V_q u_q² and
    /// uᵀBu = Σ_e Σ_q (h_e/2) ω_q u_q² (see [`ElementPencil::energy`]), with every
    /// s_q = (2/h)·c·w_q·ω_q > 0 (c > 0, w > 0 and the GLL weights ω_q > 0): the kinetic
    /// sum is non-negative and each potential term is ≥ V_min times the matching mass
    /// term, so uᵀAu ≥ V_min·uᵀBu for every u, i.e. E ≥ V_min for every eigenvalue
    /// (strictly, as the Dirichlet ends make the kinetic part definite). This is what
    /// the shift-invert solver ([`crate::linalg::lanczos`]) needs to place its shift.
    pub fn lower_bound(&self) -> f64 {
        self.v_min
    }

    /// Lowest `count` eigenpairs by [`banded::lowest_auto`] with the bound
    /// [`ElementPencil::lower_bound`] (certified shift-invert Lanczos, falling back to
    /// the dense subset or band solvers): energies ascending, refined by the Rayleigh
    /// quotient [`ElementPencil::energy`]/(uᵀBu), and B-orthonormal coefficient columns
    /// (∫ψ² dx = 1 under GLL quadrature; sign arbitrary). Errors on invalid `count` or
    /// when every path fails its verification.
    pub fn lowest(&self, count: usize) -> Result<(Vec<f64>, Mat<f64>), Error> {
        let (mut vals, v) = banded::lowest_auto(&self.a, &self.b, count, Some(self.v_min))?;
        self.refine(&mut vals, &v);
        Ok((vals, v))
    }

    /// The same through the shift-invert Lanczos solver alone ([`crate::linalg::lanczos::lowest`],
    /// no fallback: an error when it cannot certify its result).
    pub fn lowest_shift_invert(&self, count: usize) -> Result<(Vec<f64>, Mat<f64>), Error> {
        let (mut vals, v) = crate::linalg::lanczos::lowest(&self.a, &self.b, count, self.v_min)?;
        self.refine(&mut vals, &v);
        Ok((vals, v))
    }

    /// The same through the band-reduction solver ([`banded::lowest`]).
    pub fn lowest_band(&self, count: usize) -> Result<(Vec<f64>, Mat<f64>), Error> {
        let (mut vals, v) = banded::lowest(&self.a, &self.b, count)?;
        self.refine(&mut vals, &v);
        Ok((vals, v))
    }

    /// The same through the dense reference solver ([`banded::lowest_dense`], O(n³)).
    pub fn lowest_dense(&self, count: usize) -> Result<(Vec<f64>, Mat<f64>), Error> {
        let (mut vals, v) = banded::lowest_dense(&self.a, &self.b, count)?;
        self.refine(&mut vals, &v);
        Ok((vals, v))
    }

    fn refine(&self, vals: &mut [f64], v: &Mat<f64>) {
        let n = v.nrows();
        let mut u = vec![0.0; n];
        for (j, val) in vals.iter_mut().enumerate() {
            for i in 0..n {
                u[i] = v[(i, j)];
            }
            let nb: f64 = u.iter().zip(&self.b).map(|(x, b)| b * x * x).sum();
            // Keep the solver's value if the quotient is not finite (cannot happen for
            // finite input; guards the refinement only).
            if let Ok(e) = self.energy(&u) {
                if (e / nb).is_finite() {
                    *val = e / nb;
                }
            }
        }
    }
}


/// (points, weights, ψ_j(points) as columns) of a Gauss rule.
type GaussSamples = (Vec<f64>, Vec<f64>, Mat<f64>);

/// H on an [`ElementBasis`]: the assembled pencil, the samples it came from and the
/// masses at the sample points (for ⟨m⟩ and oscillator strengths).
pub struct ElementProblem {
    basis: Arc<ElementBasis>,
    pencil: ElementPencil,
    /// Mass at every sample point (mass units).
    masses: Vec<f64>,
    /// c·(1/m)_min·(π/L)², the lowest kinetic quantum of the interval.
    energy_unit: f64,
}

impl ElementProblem {
    /// `c` = ħ²/2m_e (or 1/2 in natural units), `masses` and `potential` sampled on
    /// the basis points (finite; masses > 0).
    pub fn new(basis: Arc<ElementBasis>, c: f64, masses: Vec<f64>, potential: &[f64]) -> Result<Self, InputError> {
        if let Some(i) = masses.iter().position(|m| !(m.is_finite() && *m > 0.0)) {
            return Err(InputError::range("mass", "finite and > 0 at every sample point", format!("{} at x = {}", masses[i], basis.points()[i])));
        }
        let w: Vec<f64> = masses.iter().map(|m| 1.0 / m).collect();
        let pencil = assemble(&basis, c, &w, potential)?;
        let els = basis.elements();
        let length = els[els.len() - 1].b - els[0].a;
        let wmin = w.iter().cloned().fold(f64::INFINITY, f64::min);
        let energy_unit = c * wmin * (std::f64::consts::PI / length).powi(2);
        Ok(ElementProblem { basis, pencil, masses, energy_unit })
    }

    pub fn basis(&self) -> &Arc<ElementBasis> {
        &self.basis
    }
    pub fn pencil(&self) -> &ElementPencil {
        &self.pencil
    }

    /// Points, weights and ψ_j at the points of an m-point Gauss rule on every element.
    fn gauss_values(&self, v: MatRef<'_, f64>, m: usize) -> Result<GaussSamples, InputError> {
        let (x, w) = self.basis.gauss_rule(m)?;
        let vals = self.basis.evaluate(v, &x)?;
        Ok((x, w, vals))
    }
}

impl DiscreteProblem for ElementProblem {
    fn dim(&self) -> usize {
        self.basis.size()
    }
    fn structure(&self) -> Structure {
        Structure { generalized: true, fast_apply: false }
    }
    fn apply_a(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        let n = self.dim();
        for j in 0..ncols {
            self.pencil.a.mul_vec(&x[j * n..(j + 1) * n], &mut y[j * n..(j + 1) * n]);
        }
    }
    fn apply_b(&self, x: &[f64], y: &mut [f64], ncols: usize) {
        let n = self.dim();
        for j in 0..ncols {
            for i in 0..n {
                y[j * n + i] = self.pencil.b[i] * x[j * n + i];
            }
        }
    }
    fn dense_a(&self) -> Mat<f64> {
        self.pencil.a.to_dense()
    }
    fn dense_b(&self) -> Option<Mat<f64>> {
        let b = &self.pencil.b;
        Some(Mat::from_fn(b.len(), b.len(), |i, j| if i == j { b[i] } else { 0.0 }))
    }
    /// Gershgorin bound of C = B^{-1/2} A B^{-1/2}: max_i Σ_j |A_ij|/√(b_i b_j).
    fn norm_estimate(&self) -> f64 {
        let (a, b) = (&self.pencil.a, &self.pencil.b);
        let (n, kd) = (a.n(), a.kd());
        let mut rows = vec![0.0_f64; n];
        for j in 0..n {
            for i in j..(j + kd + 1).min(n) {
                let v = a.get(i, j).abs() / (b[i] * b[j]).sqrt();
                rows[i] += v;
                if i != j {
                    rows[j] += v;
                }
            }
        }
        rows.into_iter().fold(0.0, f64::max)
    }
    fn energy_scale(&self) -> f64 {
        self.energy_unit
    }
    fn band(&self) -> Option<BandPencil<'_>> {
        Some(BandPencil { a: &self.pencil.a, b: &self.pencil.b, lower_bound: Some(self.pencil.lower_bound()) })
    }
    /// uᵀAu/uᵀBu with the kinetic part as a sum of squares ([`ElementPencil::energy`]).
    fn rayleigh_quotients(&self, v: MatRef<'_, f64>) -> Option<Vec<f64>> {
        let mut u = vec![0.0; v.nrows()];
        (0..v.ncols())
            .map(|j| {
                u.iter_mut().enumerate().for_each(|(i, x)| *x = v[(i, j)]);
                let nb: f64 = u.iter().zip(&self.pencil.b).map(|(x, b)| b * x * x).sum();
                self.pencil.energy(&u).ok().map(|e| e / nb).filter(|q| q.is_finite())
            })
            .collect()
    }
    /// ∫ψ_i x ψ_j dx by an (p+1)-point Gauss rule per element (exact for the degree
    /// 2p + 1 integrand).
    fn position_matrix(&self, v: MatRef<'_, f64>) -> Mat<f64> {
        let k = v.ncols();
        match self.gauss_values(v, self.basis.order() + 1) {
            Ok((x, w, vals)) => Mat::from_fn(k, k, |i, j| (0..x.len()).map(|g| w[g] * x[g] * vals[(g, i)] * vals[(g, j)]).sum()),
            Err(_) => Mat::zeros(k, k),
        }
    }
    /// ∫ψ² m dx in GLL quadrature on the sample points.
    fn mean_masses(&self, v: MatRef<'_, f64>) -> Vec<f64> {
        let (p, wq) = (self.basis.order(), self.basis.quadrature_weights());
        (0..v.ncols())
            .map(|j| {
                let mut s = 0.0;
                for e in 0..self.basis.elements().len() {
                    for q in 0..=p {
                        if let Some(g) = self.basis.global_index(e, q) {
                            let k = e * (p + 1) + q;
                            s += wq[k] * self.masses[k] * v[(g, j)] * v[(g, j)];
                        }
                    }
                }
                s
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    fn rel(a: f64, b: f64) -> f64 {
        ((a - b) / b).abs()
    }

    #[test]
    fn bad_input_is_an_error() {
        let eb = ElementBasis::new(&[0.0, 1.0], 4, None).unwrap();
        let np = eb.points().len();
        assert!(assemble(&eb, 0.5, &vec![1.0; np - 1], &vec![0.0; np]).is_err());
        assert!(assemble(&eb, 0.5, &vec![0.0; np], &vec![0.0; np]).is_err());
        assert!(assemble(&eb, -0.5, &vec![1.0; np], &vec![0.0; np]).is_err());
        assert!(assemble(&eb, 0.5, &vec![1.0; np], &vec![f64::NAN; np]).is_err());
        let pencil = assemble(&eb, 0.5, &vec![1.0; np], &vec![0.0; np]).unwrap();
        assert!(pencil.lowest(0).is_err());
        assert!(pencil.lowest(4).is_err());
    }


    /// Lowest `count` energies of −c (w ψ')' + V ψ on `eb` with w, V callables.
    fn solve(eb: &ElementBasis, c: f64, w: impl Fn(f64) -> f64, v: impl Fn(f64) -> f64, count: usize) -> (Vec<f64>, Mat<f64>, ElementPencil) {
        let ws: Vec<f64> = eb.points().iter().map(|&x| w(x)).collect();
        let vs: Vec<f64> = eb.points().iter().map(|&x| v(x)).collect();
        let pencil = assemble(eb, c, &ws, &vs).unwrap();
        let (vals, vecs) = pencil.lowest(count).unwrap();
        (vals, vecs, pencil)
    }

    #[test]
    fn particle_in_a_box() {
        // E_n = n²π²/(2L²) for −½ψ'' on [0, L], ψ(0) = ψ(L) = 0 (any quantum mechanics
        // text, e.g. Griffiths 2005 eq. 2.27 with ħ = m = 1).
        let l = 3.0;
        let eb = ElementBasis::new(&[0.0, l], 16, Some(0.5)).unwrap();
        let (vals, vecs, pencil) = solve(&eb, 0.5, |_| 1.0, |_| 0.0, 10);
        for (k, e) in vals.iter().enumerate() {
            let n = (k + 1) as f64;
            let exact = n * n * PI * PI / (2.0 * l * l);
            assert!(rel(*e, exact) < 1e-12, "n={n}: {e} vs {exact}, rel {:e}", rel(*e, exact));
        }
        // Ground state ∝ sin(πx/L), normalised: ψ(L/2)² = 2/L.
        let psi = eb.evaluate(vecs.as_ref(), &[l / 2.0]).unwrap();
        assert!((psi[(0, 0)].abs() - (2.0 / l).sqrt()).abs() < 1e-10);
        // The dense reference gives the same energies, and so does the strict
        // shift-invert path (no fallback: an error if it cannot certify its result).
        let (dv, _) = pencil.lowest_dense(10).unwrap();
        let (si, _) = pencil.lowest_shift_invert(10).unwrap();
        for k in 0..10 {
            assert!(rel(vals[k], dv[k]) < 1e-13);
            assert!(rel(si[k], dv[k]) < 1e-13);
            let n = (k + 1) as f64;
            assert!(rel(si[k], n * n * PI * PI / (2.0 * l * l)) < 1e-12);
        }
    }

    #[test]
    fn harmonic_oscillator() {
        // E_n = n + ½ for −½ψ'' + ½x²ψ (ħ = m = ω = 1); the box [−10, 10] changes the
        // lowest ten by far less than 1e-15 (the tail e^{−x²/2} at x = 10 is 2e−22).
        let eb = ElementBasis::new(&[-10.0, 10.0], 14, Some(1.25)).unwrap();
        let (vals, _, _) = solve(&eb, 0.5, |_| 1.0, |x| 0.5 * x * x, 10);
        for (n, e) in vals.iter().enumerate() {
            let exact = n as f64 + 0.5;
            assert!((e - exact).abs() < 1e-11, "n={n}: {e}, err {:e}", e - exact);
        }
    }

    /// ħ²/(2m_e) in meV·nm² from CODATA 2022 (h = 6.62607015e-34 J s and e =
    /// 1.602176634e-19 C exact since the 2019 SI, m_e = 9.1093837139e-31 kg, Mohr et al.
    /// 2025): 38.0998… meV nm².
    fn hbar2_over_2me_mev_nm2() -> f64 {
        let hbar = 6.626_070_15e-34 / (2.0 * PI);
        let me = 9.109_383_713_9e-31;
        let mev = 1.602_176_634e-22;
        hbar * hbar / (2.0 * me) / mev * 1e18
    }

    /// Bound levels of the BenDaniel-Duke finite well of width `a`, depth `v0`, masses
    /// `mw` (well) and `mb` (barrier): roots in (0, v0) of Bastard's equations (Bastard
    /// 1981, Phys. Rev. B 24, 5693) with k = √(E m_w/c), κ = √((V0 − E) m_b/c):
    /// even (k/m_w) tan(ka/2) = κ/m_b, odd −(k/m_w) cot(ka/2) = κ/m_b, multiplied by
    /// cos resp. sin so that the functions have no poles; bracketed on a fine grid and
    /// bisected to adjacent floating-point numbers.
    fn bastard_levels(a: f64, v0: f64, mw: f64, mb: f64, c: f64) -> Vec<f64> {
        let f = |e: f64, odd: bool| {
            let k = (e * mw / c).sqrt();
            let kap = ((v0 - e) * mb / c).sqrt();
            let (s, co) = (k * a / 2.0).sin_cos();
            if odd {
                k / mw * co + kap / mb * s
            } else {
                k / mw * s - kap / mb * co
            }
        };
        let mut roots = Vec::new();
        let grid = 20000;
        for odd in [false, true] {
            for i in 0..grid {
                let (mut lo, mut hi) = (v0 * i as f64 / grid as f64, v0 * (i + 1) as f64 / grid as f64);
                if i == 0 {
                    lo = 1e-300;
                }
                if i + 1 == grid {
                    hi = v0.next_down();
                }
                let (flo, fhi) = (f(lo, odd), f(hi, odd));
                if flo == 0.0 {
                    roots.push(lo);
                    continue;
                }
                if flo.signum() == fhi.signum() {
                    continue;
                }
                loop {
                    let mid = 0.5 * (lo + hi);
                    if mid <= lo || mid >= hi {
                        break;
                    }
                    if f(mid, odd).signum() == flo.signum() {
                        lo = mid;
                    } else {
                        hi = mid;
                    }
                }
                roots.push(0.5 * (lo + hi));
            }
        }
        roots.sort_by(f64::total_cmp);
        roots
    }

    /// Breakpoints of the finite-well test: the well [−a/2, a/2] cut in `well_pieces`,
    /// barrier elements of lengths `grow` outwards on both sides.
    fn well_breakpoints(a: f64, well_pieces: usize, grow: &[f64]) -> Vec<f64> {
        let mut left = vec![-a / 2.0];
        for &g in grow {
            let x = left[left.len() - 1] - g;
            left.push(x);
        }
        left.reverse();
        let mut bp = left;
        for k in 1..=well_pieces {
            bp.push(-a / 2.0 + a * k as f64 / well_pieces as f64);
        }
        for &g in grow {
            let x = bp[bp.len() - 1] + g;
            bp.push(x);
        }
        bp
    }

    fn finite_well(order: usize, well_pieces: usize, grow: &[f64]) -> (Vec<f64>, Vec<f64>, usize) {
        let (vals, exact, eb, _) = finite_well_states(order, well_pieces, grow);
        (vals, exact, eb.size())
    }

    fn finite_well_states(order: usize, well_pieces: usize, grow: &[f64]) -> (Vec<f64>, Vec<f64>, ElementBasis, Mat<f64>) {
        let (a, v0, mw, mb) = (10.0, 250.0, 0.067, 0.092);
        let c = hbar2_over_2me_mev_nm2();
        let exact = bastard_levels(a, v0, mw, mb, c);
        let eb = ElementBasis::new(&well_breakpoints(a, well_pieces, grow), order, None).unwrap();
        let inside = |x: f64| x.abs() < a / 2.0;
        let (vals, vecs, _) = solve(&eb, c, |x| if inside(x) { 1.0 / mw } else { 1.0 / mb }, |x| if inside(x) { 0.0 } else { v0 }, exact.len());
        (vals, exact, eb, vecs)
    }

    #[test]
    fn bendaniel_duke_finite_well() {
        let c = hbar2_over_2me_mev_nm2();
        assert!((c - 38.09982).abs() < 1e-5, "{c}");
        let (vals, exact, n) = finite_well(16, 2, &[2.0, 6.0, 18.0, 54.0, 162.0]);
        assert!(n <= 200, "{n} unknowns");
        assert_eq!(exact.len(), 3, "levels {exact:?}");
        for (e, x) in vals.iter().zip(&exact) {
            assert!(rel(*e, *x) <= 1e-11, "{e} vs {x}: {:e}", rel(*e, *x));
        }
        // The natural interface condition of the weak form: ψ'/m continuous at the
        // interface x = a/2 (BenDaniel & Duke 1966), while ψ' itself jumps by m_b/m_w.
        let grow = [2.0, 6.0, 18.0, 54.0, 162.0];
        let (_, _, eb, vecs) = finite_well_states(16, 2, &grow);
        let x0 = 5.0_f64;
        let left = eb.evaluate_derivative(vecs.as_ref(), &[x0.next_down()]).unwrap();
        let right = eb.evaluate_derivative(vecs.as_ref(), &[x0]).unwrap();
        for j in 0..3 {
            let (fl, fr) = (left[(0, j)] / 0.067, right[(0, j)] / 0.092);
            assert!((fl - fr).abs() <= 1e-7 * fl.abs(), "state {j}: ψ'/m {fl} vs {fr}");
            assert!((left[(0, j)] / right[(0, j)] - 0.067 / 0.092).abs() < 1e-6);
        }
    }

    #[test]
    fn shift_invert_matches_dense_on_a_finite_well() {
        // The strict shift-invert path (no fallback) against faer's dense solver on the
        // same pencil: energies to 1e-13 relative, both refined by the same Rayleigh
        // quotient; the Bastard levels (above) as the physical reference.
        let (a, v0, mw, mb) = (10.0, 250.0, 0.067, 0.092);
        let c = hbar2_over_2me_mev_nm2();
        let exact = bastard_levels(a, v0, mw, mb, c);
        for (order, pieces, grow) in [(16, 2, &[2.0, 6.0, 18.0, 54.0, 162.0][..]), (10, 3, &[2.0, 4.0, 8.0, 16.0, 32.0, 64.0, 128.0][..])] {
            let eb = ElementBasis::new(&well_breakpoints(a, pieces, grow), order, None).unwrap();
            let inside = |x: f64| x.abs() < a / 2.0;
            let ws: Vec<f64> = eb.points().iter().map(|&x| if inside(x) { 1.0 / mw } else { 1.0 / mb }).collect();
            let vs: Vec<f64> = eb.points().iter().map(|&x| if inside(x) { 0.0 } else { v0 }).collect();
            let pencil = assemble(&eb, c, &ws, &vs).unwrap();
            assert_eq!(pencil.lower_bound(), 0.0);
            let count = 10.min(eb.size() - 2);
            let (si, vsi) = pencil.lowest_shift_invert(count).unwrap();
            let (dv, vd) = pencil.lowest_dense(count).unwrap();
            for k in 0..count {
                assert!(rel(si[k], dv[k]) < 1e-13, "p={order} level {k}: {} vs {}: {:e}", si[k], dv[k], rel(si[k], dv[k]));
                let ov: f64 = (0..eb.size()).map(|i| vsi[(i, k)] * pencil.b[i] * vd[(i, k)]).sum();
                assert!((ov.abs() - 1.0).abs() < 1e-9, "level {k}: overlap {ov}");
            }
            for (e, x) in si.iter().zip(&exact) {
                assert!(rel(*e, *x) <= 1e-10, "{e} vs Bastard {x}");
            }
        }
    }

    /// Two finite wells (width 10 nm, depth 250 meV, the masses of the well test)
    /// separated by a barrier of `barrier` nm, on elements of order `order`.
    fn double_well_pencil(order: usize, barrier: f64) -> (ElementPencil, usize) {
        let (a, v0, mw, mb) = (10.0, 250.0, 0.067, 0.092);
        let c = hbar2_over_2me_mev_nm2();
        let half = barrier / 2.0;
        let left = vec![-half - a - 60.0, -half - a - 30.0, -half - a - 12.0, -half - a - 4.0, -half - a, -half - a / 2.0, -half];
        let nb = (barrier / 5.0).ceil() as usize;
        let mut bp = left.clone();
        for k in 1..nb {
            bp.push(-half + barrier * k as f64 / nb as f64);
        }
        bp.extend(left.iter().rev().map(|x| -x));
        let eb = ElementBasis::new(&bp, order, None).unwrap();
        let inside = |x: f64| x.abs() > half && x.abs() < half + a;
        let ws: Vec<f64> = eb.points().iter().map(|&x| if inside(x) { 1.0 / mw } else { 1.0 / mb }).collect();
        let vs: Vec<f64> = eb.points().iter().map(|&x| if inside(x) { 0.0 } else { v0 }).collect();
        (assemble(&eb, c, &ws, &vs).unwrap(), eb.size())
    }

    #[test]
    fn shift_invert_resolves_tunnel_split_doublets() {
        // Symmetric double well: every bound level of one well splits into an even/odd
        // doublet. The dense reference (faer) shows the ground doublet split by
        // 1e-11 … 1e-5 relative (asserted; 3e-10 for the 30 nm barrier, near the
        // resolution of the pencil's rounding); both members must come back, in order, for a
        // count that ends inside a doublet as well.
        for (barrier, order) in [(20.0, 12), (30.0, 10)] {
            let (pencil, n) = double_well_pencil(order, barrier);
            let (dv, _) = pencil.lowest_dense(6.min(n - 2)).unwrap();
            let split = (dv[1] - dv[0]) / dv[0];
            assert!(split > 1e-11 && split < 1e-5, "barrier {barrier}: ground doublet split {split:e}");
            for count in [6, 5, 2, 1] {
                let (si, _) = pencil.lowest_shift_invert(count).unwrap();
                let (dv, _) = pencil.lowest_dense(count).unwrap();
                for k in 0..count {
                    assert!(rel(si[k], dv[k]) < 1e-13, "barrier {barrier} count {count} level {k}: {:e}", rel(si[k], dv[k]));
                }
                if count >= 2 {
                    assert!(rel(si[1] - si[0], dv[1] - dv[0]) < 1e-4, "splitting {} vs {}", si[1] - si[0], dv[1] - dv[0]);
                }
            }
        }
    }

    /// Shift-invert Lanczos against the other paths on element pencils, thread CPU time
    /// (best of 7 blocks): `cargo test --release --lib elements_shift_invert_timing -- --ignored --nocapture`.
    #[test]
    #[ignore]
    fn elements_shift_invert_timing() {
        use crate::linalg::thread_time;
        fn best<T>(reps: usize, mut f: impl FnMut() -> T) -> f64 {
            (0..7)
                .map(|_| {
                    let c0 = thread_time();
                    let t = std::time::Instant::now();
                    for _ in 0..reps {
                        std::hint::black_box(f());
                    }
                    let wall = t.elapsed().as_secs_f64();
                    match (c0, thread_time()) {
                        (Some(a), Some(b)) => (b - a) / reps as f64,
                        _ => wall / reps as f64,
                    }
                })
                .fold(f64::INFINITY, f64::min)
                * 1e3
        }
        let count = 10;
        println!("element pencils, count = {count}, thread CPU ms (best of 7 blocks)");
        println!("pencil            p    n | shift-invert steps      | auto, no bound | dense full | max rel |ΔE| vs dense");
        for order in [8, 10, 12] {
            for target in [120, 150, 200, 300] {
                let n_el = (target + 1) / order;
                let len = 20.0 / n_el as f64;
                let eb = ElementBasis::new(&[-10.0, 10.0], order, Some(len * (1.0 + 1e-9))).unwrap();
                let ws = vec![1.0; eb.points().len()];
                let vs: Vec<f64> = eb.points().iter().map(|x| 0.5 * x * x).collect();
                let ho = assemble(&eb, 0.5, &ws, &vs).unwrap();
                let (dw, _) = double_well_pencil(order, 20.0);
                for (name, p) in [("oscillator", &ho), ("double well", &dw)] {
                    if name == "double well" && target != 150 {
                        continue;
                    }
                    let n = p.b.len();
                    let (_, _, rep) = crate::linalg::lanczos::lowest_with_report(&p.a, &p.b, count, p.lower_bound()).unwrap();
                    let t_si = best(20, || p.lowest_shift_invert(count).unwrap());
                    let t_auto = best(5, || banded::lowest_auto(&p.a, &p.b, count, None).unwrap());
                    let t_dense = best(3, || p.lowest_dense(count).unwrap());
                    let (si, _) = p.lowest_shift_invert(count).unwrap();
                    let (dv, _) = p.lowest_dense(count).unwrap();
                    let err = si.iter().zip(&dv).map(|(x, y)| rel(*x, *y)).fold(0.0, f64::max);
                    println!("{name:<16} {order:2} {n:4} | {t_si:8.3} {:<14} | {t_auto:14.3} | {t_dense:10.3} | {err:.1e}", format!("{:?}", rep.steps));
                }
            }
        }
    }

    /// Zeros of Ai and Ai' on the negative axis, magnitudes ascending, `count` of each:
    /// Ai(0) = 1/(3^{2/3} Γ(2/3)), Ai'(0) = −1/(3^{1/3} Γ(1/3)) (A&S 1964, 10.4.4–5;
    /// digits recalled from memory), then the Airy equation y'' = x y integrated towards
    /// −∞ by Taylor steps (recurrence a_{n+2} = (x_0 a_n + a_{n−1})/((n+1)(n+2)),
    /// 40 terms, step 1/8: truncation far below rounding), sign changes of y and y'
    /// located on each step and bisected on the step's Taylor polynomial.
    fn airy_zeros(count: usize) -> (Vec<f64>, Vec<f64>) {
        let (mut y, mut dy) = (0.355_028_053_887_817_2_f64, -0.258_819_403_792_806_8_f64);
        let h = -0.125;
        let mut x0 = 0.0;
        let (mut za, mut zd) = (Vec::new(), Vec::new());
        let taylor = |x0: f64, y: f64, dy: f64| {
            let mut a = [0.0; 40];
            a[0] = y;
            a[1] = dy;
            a[2] = x0 * y / 2.0;
            for n in 1..38 {
                a[n + 2] = (x0 * a[n] + a[n - 1]) / ((n + 1) * (n + 2)) as f64;
            }
            a
        };
        let eval = |a: &[f64; 40], t: f64| {
            let (mut v, mut d) = (0.0, 0.0);
            for n in (0..40).rev() {
                v = v * t + a[n];
                if n > 0 {
                    d = d * t + n as f64 * a[n];
                }
            }
            (v, d)
        };
        while za.len() < count || zd.len() < count {
            let a = taylor(x0, y, dy);
            let (y1, dy1) = eval(&a, h);
            for (which, f0, f1) in [(0, y, y1), (1, dy, dy1)] {
                if f0.signum() != f1.signum() {
                    let (mut lo, mut hi) = (0.0_f64, h);
                    let pick = |t: f64| if which == 0 { eval(&a, t).0 } else { eval(&a, t).1 };
                    for _ in 0..200 {
                        let mid = 0.5 * (lo + hi);
                        if pick(mid).signum() == f0.signum() {
                            lo = mid;
                        } else {
                            hi = mid;
                        }
                    }
                    let z = -(x0 + 0.5 * (lo + hi));
                    if which == 0 { za.push(z) } else { zd.push(z) }
                }
            }
            x0 += h;
            y = y1;
            dy = dy1;
        }
        za.truncate(count);
        zd.truncate(count);
        (za, zd)
    }

    #[test]
    fn airy_zeros_agree_with_the_published_table() {
        // Abramowitz & Stegun 1964, Table 10.13 (first six zeros of Ai and Ai', recalled
        // from memory to the digits shown): a cross-check of the ODE-based zeros.
        let (za, zd) = airy_zeros(6);
        let ta = [2.338_107_41, 4.087_949_44, 5.520_559_83, 6.786_708_09, 7.944_133_59, 9.022_650_85];
        let td = [1.018_792_97, 3.248_197_58, 4.820_099_21, 6.163_307_36, 7.372_177_26, 8.488_486_73];
        for k in 0..6 {
            assert!((za[k] - ta[k]).abs() < 1e-8, "a_{k}: {} vs {}", za[k], ta[k]);
            assert!((zd[k] - td[k]).abs() < 1e-8, "a'_{k}: {} vs {}", zd[k], td[k]);
        }
    }

    #[test]
    fn linear_v_shaped_potential_airy_levels() {
        // −½ψ'' + |x|ψ = Eψ: for x > 0, ψ ∝ Ai(2^{1/3}(x − E)); even states have ψ'(0) = 0
        // (E = |a'_k| 2^{−1/3}), odd ones ψ(0) = 0 (E = |a_k| 2^{−1/3}) (e.g. Griffiths 2005,
        // problem 8.? on the "bouncing ball"; the Airy-function solution of a linear
        // potential). The box [−16, 16] changes the lowest twelve by < 1e-20.
        let (za, zd) = airy_zeros(6);
        let s = 2f64.powf(-1.0 / 3.0);
        let mut exact: Vec<f64> = za.iter().chain(&zd).map(|z| z * s).collect();
        exact.sort_by(f64::total_cmp);
        let eb = ElementBasis::new(&[-16.0, 0.0, 16.0], 14, Some(2.0)).unwrap();
        let (vals, _, _) = solve(&eb, 0.5, |_| 1.0, f64::abs, 12);
        for (k, (e, x)) in vals.iter().zip(&exact).enumerate() {
            assert!(rel(*e, *x) <= 1e-11, "level {k}: {e} vs {x}: {:e}", rel(*e, *x));
        }
    }

    /// Accuracy table for the report: `cargo test --lib elements_report -- --ignored --nocapture`.
    #[test]
    #[ignore]
    fn elements_report_finite_well_convergence() {
        let grows: [&[f64]; 4] = [&[2.0, 4.0, 8.0, 16.0, 32.0], &[2.0, 4.0, 8.0, 16.0, 32.0, 64.0, 128.0], &[2.0, 6.0, 18.0, 54.0, 162.0], &[3.0, 9.0, 27.0, 81.0, 162.0]];
        for grow in grows {
            println!("barrier elements {grow:?} nm");
            for order in [8, 12, 16] {
                for pieces in [1, 2, 3] {
                    let (vals, exact, n) = finite_well(order, pieces, grow);
                    let errs: Vec<String> = vals.iter().zip(&exact).map(|(e, x)| format!("{:.1e}", rel(*e, *x))).collect();
                    println!("p={order:2} well elements={pieces} unknowns={n:3}  rel. errors {}", errs.join(" "));
                }
            }
        }
        // Raw band-solver eigenvalues vs the Rayleigh-quotient refinement (box, HO).
        let eb = ElementBasis::new(&[0.0, 3.0], 16, Some(0.5)).unwrap();
        let (_, _, pencil) = solve(&eb, 0.5, |_| 1.0, |_| 0.0, 1);
        let (raw, _) = banded::lowest(&pencil.a, &pencil.b, 10).unwrap();
        let (refined, _) = pencil.lowest(10).unwrap();
        for k in 0..10 {
            let exact = ((k + 1) * (k + 1)) as f64 * PI * PI / 18.0;
            println!("box n={} raw {:.1e} refined {:.1e}", k + 1, rel(raw[k], exact), rel(refined[k], exact));
        }
        let eb = ElementBasis::new(&[-10.0, 10.0], 14, Some(1.25)).unwrap();
        let (vals, _, _) = solve(&eb, 0.5, |_| 1.0, |x| 0.5 * x * x, 10);
        let worst = vals.iter().enumerate().map(|(n, e)| (e - (n as f64 + 0.5)).abs()).fold(0.0, f64::max);
        println!("harmonic oscillator, {} unknowns: max |E_n − (n+½)| = {worst:.1e}", eb.size());
        let (za, zd) = airy_zeros(6);
        let s3 = 2f64.powf(-1.0 / 3.0);
        let mut exact: Vec<f64> = za.iter().chain(&zd).map(|z| z * s3).collect();
        exact.sort_by(f64::total_cmp);
        let eb = ElementBasis::new(&[-16.0, 0.0, 16.0], 14, Some(2.0)).unwrap();
        let (vals, _, _) = solve(&eb, 0.5, |_| 1.0, f64::abs, 12);
        let worst = vals.iter().zip(&exact).map(|(e, x)| rel(*e, *x)).fold(0.0, f64::max);
        println!("|x| well, {} unknowns: max relative error of 12 levels = {worst:.1e}", eb.size());
    }

    /// Timings of element pencils (harmonic oscillator on [−10, 10]) for the report:
    /// `cargo test --release --lib elements_timing -- --ignored --nocapture`.
    #[test]
    #[ignore]
    fn elements_timing() {
        use std::time::Instant;
        fn best<T>(reps: usize, mut f: impl FnMut() -> T) -> f64 {
            let mut t = f64::INFINITY;
            for _ in 0..reps {
                let s = Instant::now();
                std::hint::black_box(f());
                t = t.min(s.elapsed().as_secs_f64());
            }
            t * 1e3
        }
        println!("element pencils, count = 10, ms (best of several): assemble | banded lowest | dense lowest");
        for (order, n_el) in [(10, 15), (16, 9), (10, 50), (16, 31), (10, 200), (24, 83)] {
            let len = 20.0 / n_el as f64;
            let eb = ElementBasis::new(&[-10.0, 10.0], order, Some(len * (1.0 + 1e-9))).unwrap();
            let ws = vec![1.0; eb.points().len()];
            let vs: Vec<f64> = eb.points().iter().map(|x| 0.5 * x * x).collect();
            let reps = if eb.size() < 600 { 30 } else { 3 };
            let t_asm = best(reps, || assemble(&eb, 0.5, &ws, &vs).unwrap());
            let pencil = assemble(&eb, 0.5, &ws, &vs).unwrap();
            let t_band = best(reps, || pencil.lowest(10).unwrap());
            let t_dense = best(reps.min(5), || pencil.lowest_dense(10).unwrap());
            println!("p={order:2} elements={n_el:3} n={:5}: {t_asm:8.3} | {t_band:8.3} | {t_dense:9.3}", eb.size());
        }
    }
}
