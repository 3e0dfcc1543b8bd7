//! Transmission between the claddings (the leads) of a stack, by the quantum
//! transmitting boundary method (QTBM; Lent & Kirkner 1990, J. Appl. Phys. 67, 6353) on
//! Legendre spectral elements covering the stack [0, L].
//!
//! ## Open boundaries
//! The leads are flat (the field convention keeps the claddings flat), so the solution
//! there is known: ψ = e^{ik_L z} + r e^{−ik_L z} for z ≤ 0 and ψ = t e^{ik_R (z − L)} for
//! z ≥ L, with k = √(m (E − V)/c) in an open lead and k = i√(m (V − E)/c) (a decaying
//! tail) in a closed one. The weak form of −c (ψ'/m)' + V ψ = E ψ on [0, L] has the
//! boundary terms c ψ'(0)/m_L v(0) − c ψ'(L)/m_R v(L), and BenDaniel-Duke continuity of
//! ψ'/m across z = 0 and z = L lets the lead solutions supply them:
//! ψ'(L) = i k_R ψ(L), ψ'(0) = i k_L (2 − ψ(0)). With every node kept
//! ([`crate::basis::ElementBasis::open_index`]) this is the complex linear system
//!   (A − E B − S) ψ = −2i c (k_L/m_L) e_0,   S = diag(i c k_L/m_L, 0, …, 0, i c k_R/m_R),
//! A and B the real symmetric stiffness + potential and the GLL-lumped mass of
//! [`crate::problem::elements`], and r = ψ(0) − 1, t = ψ(L).
//! T = (k_R/m_R)/(k_L/m_L)·|t|² (probability currents ħk/m), R = |r|².
//!
//! ## Evaluation at many energies
//! S touches only the two end nodes, so only the 2×2 end block of the inverse is needed.
//! One diagonalisation of the closed pencil A v = λ B v (natural, Neumann-type ends;
//! B-orthonormal v) gives G₀(E) = (A − E B)⁻¹ = Σ_n v_n v_nᵀ/(λ_n − E) exactly, and the
//! open end block is G = (G₀,ee⁻¹ − S)⁻¹ (Schur complement onto the end nodes; the
//! R-matrix form of Wigner & Eisenbud 1947): O(N) per energy after an O(N³) start. Next
//! to a level (|λ_n − E| < 10⁻³ of its spacing) the inverse of G₀,ee is formed by the
//! Sherman-Morrison identity with that level's term split off, which keeps it exact
//! where G₀,ee itself diverges. The levels are sharpened by the Rayleigh quotient with
//! the kinetic energy as a sum of squares (accurate relative to λ, not to ‖A‖).
//!
//! ## Conventions
//! T is the same from either side; below one lead's band edge (only one lead open)
//! T = 0 and R = 1; below both there is no scattering state and the energy is an error.
//! The mesh is sized by [`converge`]: orders p and p + 2 agree on the closed levels below
//! the top energy (relative accuracy) and on T at probe energies (to the accuracy, or to
//! the change of T under a relative energy shift of the accuracy, whichever is larger:
//! next to a narrow resonance T is as accurate as its position).

use super::mesh::{energy_scale, potential_range, stack_basis, MeshOptions, MAX_ORDER};
use crate::error::{InputError, NumericalError, Result};
use crate::linalg::dense;
use crate::model::stack::Heterostructure;
use crate::model::units::Units;
use crate::problem::elements::element_stiffness;
use faer::Mat;
use num_complex::Complex64;

/// A flat lead: band edge (meV) and mass (m_e).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Lead {
    pub edge: f64,
    pub mass: f64,
}

/// Transmission and reflection amplitudes and probabilities at one real energy.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Scattering {
    /// t (right-lead amplitude for a unit wave incident from the left).
    pub t: Complex64,
    /// r (left-lead reflected amplitude).
    pub r: Complex64,
    pub transmission: f64,
    pub reflection: f64,
}

/// The stack with open ends on one element mesh, diagonalised once (module docs).
#[derive(Debug, Clone)]
pub struct OpenSystem {
    /// c = ħ²/2m_e (meV·nm²).
    c: f64,
    /// Left and right leads.
    leads: [Lead; 2],
    /// Closed-pencil eigenvalues λ_n (ascending, meV).
    lambda: Vec<f64>,
    /// End values (v_n(0), v_n(L)) of the B-orthonormal eigenvectors.
    ends: Vec<[f64; 2]>,
    order: usize,
    elements: usize,
}

/// [a, b, d] = the symmetric 2×2 [[a, b], [b, d]]; its inverse.
fn inv2(m: [Complex64; 3]) -> [Complex64; 3] {
    let det = m[0] * m[2] - m[1] * m[1];
    [m[2] / det, -m[1] / det, m[0] / det]
}

impl OpenSystem {
    /// Assemble and diagonalise the stack on elements of `order` no longer than `length`
    /// (nm). Errors for non-parabolic layers or a mesh too large for memory.
    pub fn new(stack: &Heterostructure, order: usize, length: f64) -> Result<Self> {
        super::check_parabolic(stack)?;
        let c = Units::Semiconductor.hbar2_over_2me();
        let basis = stack_basis(stack, order, length)?;
        let p = order;
        let m = p + 1;
        let n_el = basis.elements().len();
        let n = n_el * p + 1;
        crate::error::check_memory("layers", (4 * n * n * 8) as u64, "the stack needs fewer or thinner layers for a dense transport solve")?;
        let pts = basis.points();
        let v = stack.potential(pts);
        let w: Vec<f64> = stack.mass(pts).iter().map(|m| 1.0 / m).collect();
        let wq = basis.quadrature_weights();
        let mut a = Mat::<f64>::zeros(n, n);
        let mut b = vec![0.0; n];
        let mut s = vec![0.0; m];
        let mut k = vec![0.0; m * m];
        let mut stiff = Vec::with_capacity(n_el * m);
        for e in 0..n_el {
            element_stiffness(&basis, e, c, &w, &mut s, &mut k);
            stiff.extend_from_slice(&s);
            for i in 0..m {
                let Some(gi) = basis.open_index(e, i) else { continue };
                for j in 0..m {
                    if let Some(gj) = basis.open_index(e, j) {
                        a[(gi, gj)] += k[i * m + j];
                    }
                }
                a[(gi, gi)] += wq[e * m + i] * v[e * m + i];
                b[gi] += wq[e * m + i];
            }
        }
        let d: Vec<f64> = b.iter().map(|x| 1.0 / x.sqrt()).collect();
        let cmat = Mat::from_fn(n, n, |i, j| a[(i, j)] * d[i] * d[j]);
        let (vals, z) = dense::eigh(cmat.as_ref(), dense::par_for_dim(n, faer::get_global_parallelism()))?;
        // Rayleigh quotients with the kinetic energy as a sum of squares, element by element.
        let diff = basis.gll().differentiation();
        let mut loc = vec![0.0; m];
        let mut pairs: Vec<(f64, [f64; 2])> = Vec::with_capacity(n);
        for (j, &val) in vals.iter().enumerate() {
            let (mut kin, mut pot, mut norm) = (0.0, 0.0, 0.0);
            for e in 0..n_el {
                for (i, l) in loc.iter_mut().enumerate() {
                    let g = e * p + i;
                    *l = d[g] * z[(g, j)];
                }
                for q in 0..m {
                    let du: f64 = diff[q * m..(q + 1) * m].iter().zip(&loc).map(|(d, x)| d * x).sum();
                    kin += stiff[e * m + q] * du * du;
                    pot += wq[e * m + q] * v[e * m + q] * loc[q] * loc[q];
                    norm += wq[e * m + q] * loc[q] * loc[q];
                }
            }
            let rq = (kin + pot) / norm;
            let lam = if rq.is_finite() { rq } else { val };
            pairs.push((lam, [d[0] * z[(0, j)], d[n - 1] * z[(n - 1, j)]]));
        }
        pairs.sort_by(|x, y| x.0.total_cmp(&y.0));
        if pairs.iter().any(|(l, u)| !(l.is_finite() && u[0].is_finite() && u[1].is_finite())) {
            return Err(NumericalError::EigenFailed("non-finite closed-stack levels".into()).into());
        }
        let layers = stack.layers();
        let (vl, vr) = stack.cladding_edges();
        Ok(OpenSystem {
            c,
            leads: [Lead { edge: vl, mass: layers[0].mass }, Lead { edge: vr, mass: layers[layers.len() - 1].mass }],
            lambda: pairs.iter().map(|x| x.0).collect(),
            ends: pairs.iter().map(|x| x.1).collect(),
            order,
            elements: n_el,
        })
    }

    /// Left and right leads.
    pub fn leads(&self) -> [Lead; 2] {
        self.leads
    }
    /// Element order p.
    pub fn order(&self) -> usize {
        self.order
    }
    /// Number of elements.
    pub fn elements(&self) -> usize {
        self.elements
    }
    /// Closed-pencil levels λ_n (meV, ascending): natural (ψ'/m = 0) ends at 0 and L.
    pub fn closed_levels(&self) -> &[f64] {
        &self.lambda
    }
    /// End values (v_n(0), v_n(L)) of the B-orthonormal closed-pencil eigenvectors.
    pub fn closed_ends(&self) -> &[[f64; 2]] {
        &self.ends
    }
    /// c = ħ²/2m_e (meV·nm²).
    pub fn c(&self) -> f64 {
        self.c
    }

    /// Wavenumber (1/nm) in lead 0 (left) or 1 (right) at a complex energy, on the
    /// sheet adjacent to the real axis at Re E: √(m(E − V)/c) (principal root) where
    /// Re E ≥ V (open: outgoing, and for Im E < 0 the analytic continuation of a
    /// resonance), i√(m(V − E)/c) where Re E < V (closed: decaying).
    pub fn wavenumber(&self, lead: usize, e: Complex64) -> Complex64 {
        let l = self.leads[lead];
        let x = (e - l.edge) * (l.mass / self.c);
        if e.re >= l.edge {
            x.sqrt()
        } else {
            Complex64::i() * (-x).sqrt()
        }
    }

    /// The end block [G_00, G_0N, G_NN] of the open system's Green function
    /// (A − E B − S(E))⁻¹ at a complex energy (module docs).
    pub fn green_ends(&self, e: Complex64) -> [Complex64; 3] {
        let sl = Complex64::i() * (self.c / self.leads[0].mass) * self.wavenumber(0, e);
        let sr = Complex64::i() * (self.c / self.leads[1].mass) * self.wavenumber(1, e);
        let g0inv = self.closed_inverse(e);
        inv2([g0inv[0] - sl, g0inv[1], g0inv[2] - sr])
    }

    /// (G₀,ee)⁻¹ of the closed pencil at a complex energy: the inverse of
    /// Σ_n u_n u_nᵀ/(λ_n − E), with Sherman-Morrison next to a level.
    fn closed_inverse(&self, e: Complex64) -> [Complex64; 3] {
        let lam = &self.lambda;
        let n = lam.len();
        let idx = lam.partition_point(|&l| l < e.re);
        let j = if idx == 0 {
            0
        } else if idx == n || (e.re - lam[idx - 1]) <= (lam[idx] - e.re) {
            idx - 1
        } else {
            idx
        };
        let gap = {
            let lo = if j > 0 { lam[j] - lam[j - 1] } else { f64::INFINITY };
            let hi = if j + 1 < n { lam[j + 1] - lam[j] } else { f64::INFINITY };
            lo.min(hi)
        };
        let delta = Complex64::new(lam[j], 0.0) - e;
        let split = delta.norm() < 1e-3 * gap;
        let mut r = [Complex64::new(0.0, 0.0); 3];
        if e.im == 0.0 {
            let (mut r0, mut r1, mut r2) = (0.0, 0.0, 0.0);
            for (i, (&l, u)) in lam.iter().zip(&self.ends).enumerate() {
                if split && i == j {
                    continue;
                }
                let f = 1.0 / (l - e.re);
                r0 += u[0] * u[0] * f;
                r1 += u[0] * u[1] * f;
                r2 += u[1] * u[1] * f;
            }
            r = [Complex64::new(r0, 0.0), Complex64::new(r1, 0.0), Complex64::new(r2, 0.0)];
        } else {
            for (i, (&l, u)) in lam.iter().zip(&self.ends).enumerate() {
                if split && i == j {
                    continue;
                }
                let f = (Complex64::new(l, 0.0) - e).inv();
                r[0] += f * (u[0] * u[0]);
                r[1] += f * (u[0] * u[1]);
                r[2] += f * (u[1] * u[1]);
            }
        }
        if !split {
            return inv2(r);
        }
        // (R + u uᵀ/δ)⁻¹ = R⁻¹ − (R⁻¹u)(R⁻¹u)ᵀ/(δ + uᵀR⁻¹u).
        let ri = inv2(r);
        let u = self.ends[j];
        let a0 = ri[0] * u[0] + ri[1] * u[1];
        let a1 = ri[1] * u[0] + ri[2] * u[1];
        let den = delta + a0 * u[0] + a1 * u[1];
        [ri[0] - a0 * a0 / den, ri[1] - a0 * a1 / den, ri[2] - a1 * a1 / den]
    }

    /// t, r, T and R at a real energy (meV). Errors below both lead band edges; T = 0 and
    /// R = 1 where only one lead is open (or at the band edge of one).
    pub fn scattering(&self, e: f64) -> std::result::Result<Scattering, InputError> {
        let (vl, vr) = (self.leads[0].edge, self.leads[1].edge);
        if !e.is_finite() || e < vl.min(vr) {
            return Err(below_leads(e, vl.min(vr)));
        }
        if e <= vl || e <= vr {
            return Ok(Scattering { t: Complex64::new(0.0, 0.0), r: Complex64::new(-1.0, 0.0), transmission: 0.0, reflection: 1.0 });
        }
        let ez = Complex64::new(e, 0.0);
        let g = self.green_ends(ez);
        let kl = self.wavenumber(0, ez).re;
        let kr = self.wavenumber(1, ez).re;
        let (fl, fr) = (kl / self.leads[0].mass, kr / self.leads[1].mass);
        let b = Complex64::new(0.0, -2.0 * self.c * fl);
        let t = b * g[1];
        let r = b * g[0] - 1.0;
        Ok(Scattering { t, r, transmission: fr / fl * t.norm_sqr(), reflection: r.norm_sqr() })
    }

    /// 1/G_N0(E) at a complex energy: analytic near a pole of the scattering problem,
    /// where it has a simple zero (the resonance condition of [`super::resonances`]).
    pub fn pole_function(&self, e: Complex64) -> Complex64 {
        self.green_ends(e)[1].inv()
    }
}

/// The error for an energy below both leads.
pub fn below_leads(e: f64, edge: f64) -> InputError {
    InputError::range(
        "energies",
        format!("finite energies (meV) at or above the lower lead band edge {edge} meV (below both leads there is no scattering state)"),
        e,
    )
}

/// The open system on a mesh where orders p and p + 2 agree ([`converge`]): `fine` (p + 2)
/// is the one to use, `coarse` (p) gives error estimates.
#[derive(Debug, Clone)]
pub struct Converged {
    pub fine: OpenSystem,
    pub coarse: OpenSystem,
}

/// Size the mesh for energies up to `emax` (meV) and raise the order until p and p + 2
/// agree (module docs) on the closed levels below emax + ¼(emax − V_min) and on T at
/// `probes` (energies at or above the lower lead edge) and at 32 energies spread over
/// the open range up to emax.
pub fn converge(stack: &Heterostructure, emax: f64, probes: &[f64], opts: &MeshOptions) -> Result<Converged> {
    opts.validate()?;
    super::check_parabolic(stack)?;
    let c = Units::Semiconductor.hbar2_over_2me();
    let (vmin, vmax) = potential_range(stack);
    let (vl, vr) = stack.cladding_edges();
    let e_open = vl.max(vr);
    let top = emax.max(vl.min(vr)).max(vmin);
    let floor = (1e-3 * (vmax - vmin)).max(1e-6);
    let e_check = top + 0.25 * (top - vmin).max(floor);
    let mut probe: Vec<f64> = probes.iter().copied().filter(|e| *e > e_open).collect();
    if top > e_open {
        probe.extend((1..=32).map(|i| e_open + (top - e_open) * i as f64 / 32.0));
    }
    let acc = opts.accuracy;
    let mut length = super::mesh::element_length_for(stack, vl.min(vr), top, c, opts.element_length);
    let start = opts.start_order();
    let mut p = start;
    let mut coarse = OpenSystem::new(stack, p, length)?;
    for _ in 0..40 {
        let fine = OpenSystem::new(stack, p + 2, length)?;
        if agree(&coarse, &fine, e_check, &probe, acc, vmin, floor) {
            return Ok(Converged { fine, coarse });
        }
        if p + 4 > MAX_ORDER {
            length *= 0.5;
            p = start;
            coarse = OpenSystem::new(stack, p, length)?;
        } else {
            p += 2;
            coarse = fine;
        }
    }
    Err(InputError::range("accuracy", "reachable within the mesh refinement limits (try a looser accuracy)", acc).into())
}

fn agree(coarse: &OpenSystem, fine: &OpenSystem, e_check: f64, probes: &[f64], acc: f64, vmin: f64, floor: f64) -> bool {
    let count = fine.lambda.partition_point(|&l| l <= e_check);
    if coarse.lambda.len() < count {
        return false;
    }
    for i in 0..count {
        let (a, b) = (coarse.lambda[i], fine.lambda[i]);
        if !((a - b).abs() <= acc * energy_scale(b, vmin, floor)) {
            return false;
        }
    }
    for &e in probes {
        let (Ok(tc), Ok(tf)) = (coarse.scattering(e), fine.scattering(e)) else { return false };
        let sc = energy_scale(e, vmin, floor);
        let h = 1e-6 * sc;
        let slope = match (fine.scattering(e + h), fine.scattering(e - h)) {
            (Ok(a), Ok(b)) => (a.transmission - b.transmission).abs() / (2.0 * h),
            _ => 0.0,
        };
        if !((tc.transmission - tf.transmission).abs() <= acc + acc * sc * slope) {
            return false;
        }
    }
    true
}

/// T(E) and R(E) at every energy (meV) on a converged mesh, in parallel. Energies must be
/// finite and at or above the lower lead edge (else an error naming the first bad one).
pub fn transmission(stack: &Heterostructure, energies: &[f64], opts: &MeshOptions) -> Result<(Vec<f64>, Vec<f64>)> {
    use rayon::prelude::*;
    opts.validate()?;
    super::check_parabolic(stack)?;
    let (vl, vr) = stack.cladding_edges();
    if let Some(i) = energies.iter().position(|e| !(e.is_finite() && *e >= vl.min(vr))) {
        return Err(InputError::range(
            &format!("energies[{i}]"),
            format!("a finite energy (meV) at or above the lower lead band edge {} meV (below both leads there is no scattering state)", vl.min(vr)),
            energies[i],
        )
        .into());
    }
    if energies.is_empty() {
        return Ok((Vec::new(), Vec::new()));
    }
    let emax = energies.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let stride = energies.len().div_ceil(64).max(1);
    let probes: Vec<f64> = energies.iter().step_by(stride).copied().collect();
    let sys = converge(stack, emax, &probes, opts)?.fine;
    let chunk = 512;
    let parts: Vec<std::result::Result<Vec<Scattering>, InputError>> =
        energies.par_chunks(chunk).map(|es| es.iter().map(|&e| sys.scattering(e)).collect()).collect();
    let mut t = Vec::with_capacity(energies.len());
    let mut r = Vec::with_capacity(energies.len());
    for part in parts {
        for s in part? {
            t.push(s.transmission);
            r.push(s.reflection);
        }
    }
    Ok((t, r))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::stack::Layer;

    fn c() -> f64 {
        Units::Semiconductor.hbar2_over_2me()
    }

    /// Rectangular barrier with a barrier mass (BenDaniel-Duke), E < V0:
    /// T⁻¹ = 1 + ¼(ξ + 1/ξ)² sinh²(κa), ξ = (k/m_l)/(κ/m_b); E > V0:
    /// T⁻¹ = 1 + ¼(η − 1/η)² sin²(Ka), η = (k/m_l)/(K/m_b) (Griffiths 2005, problem 2.33,
    /// for equal masses; the mass ratio from the same matching with ψ'/m continuous).
    fn barrier_t(e: f64, v0: f64, a: f64, ml: f64, mb: f64) -> f64 {
        let k = (ml * e / c()).sqrt() / ml;
        let q = (mb * (e - v0).abs() / c()).sqrt();
        let qm = q / mb;
        if e < v0 {
            1.0 / (1.0 + 0.25 * (k / qm + qm / k).powi(2) * (q * a).sinh().powi(2))
        } else {
            1.0 / (1.0 + 0.25 * (k / qm - qm / k).powi(2) * (q * a).sin().powi(2))
        }
    }

    #[test]
    fn rectangular_barrier_with_a_mass_step_matches_the_closed_form() {
        let (v0, a, ml, mb) = (300.0, 4.0, 0.067, 0.092);
        let stack = Heterostructure::new(vec![Layer::new(2.0, 0.0, ml), Layer::new(a, v0, mb), Layer::new(3.0, 0.0, ml)], 0.0).unwrap();
        // Offset by 0.1 meV so that no energy is exactly V0, where the closed form is 0/0.
        let es: Vec<f64> = (1..400).map(|i| i as f64 * 1.5 + 0.1).collect();
        let (t, r) = transmission(&stack, &es, &MeshOptions::new(1e-10)).unwrap();
        for (i, &e) in es.iter().enumerate() {
            let exact = barrier_t(e, v0, a, ml, mb);
            assert!((t[i] - exact).abs() < 1e-9, "E={e}: {} vs {exact}", t[i]);
            assert!((t[i] + r[i] - 1.0).abs() < 1e-10, "R + T at {e}: {}", t[i] + r[i]);
        }
    }

    #[test]
    fn uniform_stack_transmits_everything_and_energies_below_both_leads_are_errors() {
        let stack = Heterostructure::new(vec![Layer::new(7.0, 10.0, 0.07), Layer::new(3.0, 10.0, 0.07)], 0.0).unwrap();
        let sys = OpenSystem::new(&stack, 10, 3.0).unwrap();
        let s = sys.scattering(60.0).unwrap();
        assert!((s.transmission - 1.0).abs() < 1e-12 && s.reflection < 1e-20);
        // t = e^{ikL}: the phase of a plane wave over the stack.
        let k = (0.07 * 50.0 / c()).sqrt();
        assert!((s.t - Complex64::from_polar(1.0, k * 10.0)).norm() < 1e-11);
        assert!(sys.scattering(9.0).is_err());
        assert!(sys.scattering(f64::NAN).is_err());
        assert_eq!(sys.scattering(10.0).unwrap().transmission, 0.0);
        assert!(transmission(&stack, &[20.0, 5.0], &MeshOptions::new(1e-10)).is_err());
        assert_eq!(transmission(&stack, &[], &MeshOptions::new(1e-10)).unwrap().0.len(), 0);
    }

    #[test]
    fn step_between_leads_matches_the_flux_formula() {
        // Abrupt step (BenDaniel-Duke): T = 4 (k₁/m₁)(k₂/m₂)/((k₁/m₁) + (k₂/m₂))² above both
        // edges (Bastard 1988, ch. III; Griffiths 2005, problem 2.34 for equal masses).
        let stack = Heterostructure::new(vec![Layer::new(4.0, 0.0, 0.067), Layer::new(4.0, 120.0, 0.08)], 0.0).unwrap();
        let sys = converge(&stack, 400.0, &[], &MeshOptions::new(1e-11)).unwrap().fine;
        for e in [50.0, 120.0, 121.0, 150.0, 399.0] {
            let s = sys.scattering(e).unwrap();
            let exact = if e <= 120.0 {
                0.0
            } else {
                let a = (0.067 * e / c()).sqrt() / 0.067;
                let b = (0.08 * (e - 120.0) / c()).sqrt() / 0.08;
                4.0 * a * b / (a + b).powi(2)
            };
            assert!((s.transmission - exact).abs() < 1e-11, "E={e}: {} vs {exact}", s.transmission);
            assert!((s.transmission + s.reflection - 1.0).abs() < 1e-11);
        }
    }

    #[test]
    fn sherman_morrison_next_to_a_level_is_continuous() {
        // T evaluated exactly at, and 1e-12 meV beside, a closed level agrees with T a
        // little further away (a smooth function; the expansion diverges term by term).
        let stack = Heterostructure::new(vec![Layer::new(3.0, 200.0, 0.09), Layer::new(6.0, 0.0, 0.067), Layer::new(3.0, 200.0, 0.09)], 0.0).unwrap();
        let sys = OpenSystem::new(&stack, 12, 3.0).unwrap();
        let lam = sys.closed_levels().iter().copied().find(|&l| l > 210.0).unwrap();
        let t0 = sys.scattering(lam).unwrap().transmission;
        let t1 = sys.scattering(lam + 1e-12).unwrap().transmission;
        let t2 = sys.scattering(lam + 1e-6).unwrap().transmission;
        let t3 = sys.scattering(lam - 1e-6).unwrap().transmission;
        assert!(t0.is_finite() && (t0 - t1).abs() < 1e-12, "{t0} {t1}");
        assert!((t0 - 0.5 * (t2 + t3)).abs() < 1e-9, "{t0} {t2} {t3}");
    }
}
