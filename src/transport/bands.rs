//! Minibands of a superlattice: the stack is one period d = L of an infinite periodic
//! structure (no field), and Bloch's theorem ψ(z + d) = e^{iqd} ψ(z) is imposed on the
//! element basis.
//!
//! ## Bloch-periodic elements
//! With the numbering [`crate::basis::ElementBasis::periodic_index`] the last node of
//! the period is the first one times the phase e^{iθ}, θ = qd. An element coupling
//! between local nodes i and j picks up conj(φ_i)·φ_j (φ = e^{iθ} on the wrapped node,
//! 1 elsewhere), so the weak form of [`crate::problem::elements`] becomes the Hermitian
//! pencil A(θ) u = E B u with
//!   A(θ) = A₀ + e^{iθ} X + e^{−iθ} Xᵀ,
//! A₀ real symmetric, X the real couplings of the wrapped node, B the GLL-lumped mass
//! (diagonal, θ-independent). Its eigenvalues, from the dense Hermitian solver on
//! B^{-1/2} A B^{-1/2}, are the bands E_n(q).
//!
//! ## Conventions
//! q is in 1/nm. E_n(q) is periodic in q with period 2π/d and even, so any q is folded
//! into the first zone: q → |q − (2π/d)·round(qd/2π)| ∈ [0, π/d] (documented folding,
//! no error). Bands are numbered from 0 upwards at every q (sorted energies).
//!
//! ## Band-edge masses
//! The curvature of band n at θ₀ ∈ {0, π} (where A is real) comes from second-order
//! perturbation theory in θ on the discrete pencil, exact for the discretised bands:
//!   E_n'' = ⟨n|A''|n⟩ + 2 Σ_{m≠n} |⟨m|A'|n⟩|²/(E_n − E_m),
//! A' = i e^{iθ} X − i e^{−iθ} Xᵀ, A'' = −e^{iθ} X − e^{−iθ} Xᵀ, with B-orthonormal
//! eigenvectors of the real pencil at θ₀. Then d²E/dq² = d²·E_n'' and the effective mass
//! m* = 2c/(d²E/dq²) (in m_e, E = c q²/m* near the edge). The band bottom of band n is at
//! q = 0 for even n and at q = π/d for odd n (the Bloch discriminant of a 1D period
//! alternates between +1 and −1 at successive band edges; e.g. Ashcroft & Mermin 1976,
//! ch. 8, problem 1); [`band_mass`] evaluates it there. A band edge touching its
//! neighbour (a closed gap) has no curvature and is an error.
//!
//! ## Accuracy
//! The mesh is sized for the highest requested band: its energy is bounded above by
//! V_max + c·max(1/m)·(count·π/d)² (min-max against the empty lattice with the largest
//! potential and inverse mass), which sets the element length ([`super::mesh`]); the
//! order is raised until orders p and p + 2 agree at q = 0 and q = π/d (the band edges)
//! to the relative accuracy, and the p + 2 system is used.

use super::mesh::{element_length_for, energy_scale, potential_range, stack_basis, MeshOptions, MAX_ORDER};
use crate::error::{InputError, Result};
use crate::linalg::{dense, hermitian};
use crate::model::stack::Heterostructure;
use crate::model::units::Units;
use crate::problem::elements::element_stiffness;
use faer::Mat;
use num_complex::Complex64;
use std::f64::consts::PI;

/// One period on one element mesh (module docs).
#[derive(Debug, Clone)]
pub struct PeriodicSystem {
    c: f64,
    period: f64,
    /// A₀ (n × n, real symmetric).
    a0: Mat<f64>,
    /// The wrapped couplings X as (row, column, value).
    plus: Vec<(usize, usize, f64)>,
    /// B^{-1/2} (diagonal).
    d: Vec<f64>,
}

impl PeriodicSystem {
    /// Assemble one period (the stack; no field, parabolic layers) on elements of `order`
    /// no longer than `length` (nm).
    pub fn new(stack: &Heterostructure, order: usize, length: f64) -> Result<Self> {
        check_periodic(stack)?;
        let c = Units::Semiconductor.hbar2_over_2me();
        let basis = stack_basis(stack, order, length)?;
        let p = order;
        let m = p + 1;
        let n_el = basis.elements().len();
        let n = n_el * p;
        crate::error::check_memory("layers", (6 * n * n * 16) as u64, "a period needs fewer or thinner layers for a dense band solve")?;
        let pts = basis.points();
        let v = stack.potential(pts);
        let w: Vec<f64> = stack.mass(pts).iter().map(|m| 1.0 / m).collect();
        let wq = basis.quadrature_weights();
        let mut a0 = Mat::<f64>::zeros(n, n);
        let mut plus = Vec::new();
        let mut b = vec![0.0; n];
        let mut s = vec![0.0; m];
        let mut k = vec![0.0; m * m];
        for e in 0..n_el {
            element_stiffness(&basis, e, c, &w, &mut s, &mut k);
            for i in 0..m {
                let Some((gi, wi)) = basis.periodic_index(e, i) else { continue };
                for j in 0..m {
                    let Some((gj, wj)) = basis.periodic_index(e, j) else { continue };
                    match (wi, wj) {
                        (false, true) => plus.push((gi, gj, k[i * m + j])),
                        // The transposed partner of a (false, true) entry: part of e^{−iθ}Xᵀ.
                        (true, false) => {}
                        _ => a0[(gi, gj)] += k[i * m + j],
                    }
                }
                a0[(gi, gi)] += wq[e * m + i] * v[e * m + i];
                b[gi] += wq[e * m + i];
            }
        }
        Ok(PeriodicSystem { c, period: stack.total_thickness(), a0, plus, d: b.iter().map(|x| 1.0 / x.sqrt()).collect() })
    }

    /// Number of unknowns (the most bands one solve can give).
    pub fn dim(&self) -> usize {
        self.d.len()
    }

    /// The period d (nm).
    pub fn period(&self) -> f64 {
        self.period
    }

    /// B^{-1/2} A(θ) B^{-1/2} (dense Hermitian).
    fn matrix(&self, theta: f64) -> Mat<Complex64> {
        let n = self.dim();
        let d = &self.d;
        let mut h = Mat::from_fn(n, n, |i, j| Complex64::new(self.a0[(i, j)] * d[i] * d[j], 0.0));
        let ph = Complex64::from_polar(1.0, theta);
        for &(r, c, x) in &self.plus {
            let v = x * d[r] * d[c];
            h[(r, c)] += ph * v;
            h[(c, r)] += ph.conj() * v;
        }
        h
    }

    /// The lowest `count` energies (meV, ascending) at Bloch phase θ = qd.
    pub fn energies(&self, theta: f64, count: usize) -> Result<Vec<f64>> {
        let n = self.dim();
        if count == 0 || count > n {
            return Err(InputError::range("count", format!("an integer in 1..={n} on this mesh"), count).into());
        }
        let (vals, _) = hermitian::eigh(self.matrix(theta).as_ref(), false, dense::par_for_dim(n, faer::Par::Seq))?;
        Ok(vals[..count].to_vec())
    }

    /// d²E_n/dθ² of band `band` at θ₀ = 0 (`at_edge` false) or π (true), by
    /// second-order perturbation theory (module docs). Errors when the band touches a
    /// neighbour there (relative gap below 1e-9).
    pub fn curvature(&self, band: usize, at_edge: bool) -> Result<f64> {
        let n = self.dim();
        if band >= n {
            return Err(InputError::range("band", format!("an integer in 0..{n} on this mesh"), band).into());
        }
        let sigma = if at_edge { -1.0 } else { 1.0 };
        let d = &self.d;
        let mut h = Mat::from_fn(n, n, |i, j| self.a0[(i, j)] * d[i] * d[j]);
        for &(r, c, x) in &self.plus {
            let v = sigma * x * d[r] * d[c];
            h[(r, c)] += v;
            h[(c, r)] += v;
        }
        let (vals, z) = dense::eigh(h.as_ref(), dense::par_for_dim(n, faer::get_global_parallelism()))?;
        let en = vals[band];
        let scale = vals.iter().fold(0.0_f64, |a, v| a.max(v.abs())).max(1e-300);
        for (m, &em) in vals.iter().enumerate() {
            if m != band && (em - en).abs() <= 1e-9 * en.abs().max(1e-6 * scale) {
                return Err(InputError::range(
                    "band",
                    format!("a band whose edge at q = {} does not touch a neighbouring band (gap {:e} meV)", if at_edge { "π/d" } else { "0" }, (em - en).abs()),
                    band,
                )
                .into());
            }
        }
        // y = Y z_n with Y = D(X − Xᵀ)D, and the second-derivative term −σ zᵀ D(X + Xᵀ)D z.
        let zn: Vec<f64> = (0..n).map(|i| z[(i, band)]).collect();
        let mut y = vec![0.0; n];
        let mut second = 0.0;
        for &(r, c, x) in &self.plus {
            let v = x * d[r] * d[c];
            y[r] += v * zn[c];
            y[c] -= v * zn[r];
            second += -sigma * 2.0 * v * zn[r] * zn[c];
        }
        let mut sum = 0.0;
        for m in 0..n {
            if m == band {
                continue;
            }
            let proj: f64 = (0..n).map(|i| z[(i, m)] * y[i]).sum();
            sum += proj * proj / (en - vals[m]);
        }
        Ok(second + 2.0 * sum)
    }
}

/// Refuse stacks that are not one period of the model here: a field, or non-parabolic layers.
fn check_periodic(stack: &Heterostructure) -> std::result::Result<(), InputError> {
    if stack.field_kv_cm() != 0.0 {
        return Err(InputError::range("field_kv_cm", "0 for minibands (a field breaks the periodicity of the superlattice)", stack.field_kv_cm()));
    }
    super::check_parabolic(stack)
}

/// The Bloch phase θ = qd folded into [0, π] (module docs); errors for non-finite q.
pub fn folded_phase(q: f64, period: f64) -> std::result::Result<f64, InputError> {
    if !q.is_finite() {
        return Err(InputError::range("q", "finite wavevectors (1/nm)", q));
    }
    let t = q * period;
    Ok((t - 2.0 * PI * (t / (2.0 * PI)).round()).abs().min(PI))
}

/// The converged period system for the lowest `count` bands, and the per-band errors
/// max |E(p+2) − E(p)| at the two band-edge points (module docs).
pub fn converge(stack: &Heterostructure, count: usize, opts: &MeshOptions) -> Result<(PeriodicSystem, Vec<f64>)> {
    opts.validate()?;
    check_periodic(stack)?;
    if !(1..=10_000).contains(&count) {
        return Err(InputError::range("count", "an integer in [1, 10000]", count).into());
    }
    let c = Units::Semiconductor.hbar2_over_2me();
    let (vmin, vmax) = potential_range(stack);
    let d = stack.total_thickness();
    let wmax = stack.layers().iter().map(|l| 1.0 / l.mass).fold(0.0, f64::max);
    let top = vmax + c * wmax * (count as f64 * PI / d).powi(2);
    let floor = (1e-3 * (vmax - vmin)).max(1e-6);
    let mut length = element_length_for(stack, vmin, top, c, opts.element_length);
    let start = opts.start_order();
    let acc = opts.accuracy;
    let edges = |s: &PeriodicSystem| -> Result<Option<[Vec<f64>; 2]>> {
        if s.dim() < count + 2 {
            return Ok(None);
        }
        Ok(Some([s.energies(0.0, count)?, s.energies(PI, count)?]))
    };
    let mut p = start;
    let mut ce = edges(&PeriodicSystem::new(stack, p, length)?)?;
    for _ in 0..40 {
        let fine = PeriodicSystem::new(stack, p + 2, length)?;
        let fe = edges(&fine)?;
        if let (Some(a), Some(b)) = (&ce, &fe) {
            let errors: Vec<f64> = (0..count).map(|i| (a[0][i] - b[0][i]).abs().max((a[1][i] - b[1][i]).abs())).collect();
            let ok = (0..count).all(|i| errors[i] <= acc * energy_scale(b[0][i].max(b[1][i]), vmin, floor));
            if ok {
                return Ok((fine, errors));
            }
        }
        if p + 4 > MAX_ORDER || fe.is_none() {
            length *= 0.5;
            p = start;
            ce = edges(&PeriodicSystem::new(stack, p, length)?)?;
        } else {
            p += 2;
            ce = fe;
        }
    }
    Err(InputError::range("accuracy", "reachable within the mesh refinement limits (try a looser accuracy)", acc).into())
}

/// E_n(q) for every q (1/nm, folded into the first zone) and the lowest `count` bands:
/// one row per q, in parallel over q.
pub fn bands(stack: &Heterostructure, q: &[f64], count: usize, opts: &MeshOptions) -> Result<Vec<Vec<f64>>> {
    use rayon::prelude::*;
    let d = stack.total_thickness();
    let thetas: Vec<f64> = q.iter().map(|&x| folded_phase(x, d)).collect::<std::result::Result<_, _>>()?;
    let (sys, _) = converge(stack, count, opts)?;
    thetas.par_iter().map(|&t| sys.energies(t, count)).collect()
}

/// Bottom and top (meV) of each of the lowest `count` minibands, from q = 0 and q = π/d
/// (a 1D band is monotonic in |q| between them).
pub fn minibands(stack: &Heterostructure, count: usize, opts: &MeshOptions) -> Result<Vec<[f64; 2]>> {
    let (sys, _) = converge(stack, count, opts)?;
    let (a, b) = (sys.energies(0.0, count)?, sys.energies(PI, count)?);
    Ok(a.iter().zip(&b).map(|(x, y)| [x.min(*y), x.max(*y)]).collect())
}

/// Widths (meV) of the lowest `count` minibands: top − bottom of [`minibands`].
pub fn miniband_widths(stack: &Heterostructure, count: usize, opts: &MeshOptions) -> Result<Vec<f64>> {
    Ok(minibands(stack, count, opts)?.iter().map(|[lo, hi]| hi - lo).collect())
}

/// Effective mass (m_e) at the bottom of band `band` (q = 0 for even, π/d for odd band
/// indices): m* = 2c/(d²E/dq²) (module docs).
pub fn band_mass(stack: &Heterostructure, band: usize, opts: &MeshOptions) -> Result<f64> {
    if band > 9_999 {
        return Err(InputError::range("band", "an integer in [0, 9999]", band).into());
    }
    let (sys, _) = converge(stack, band + 2, opts)?;
    let curv = sys.curvature(band, band % 2 == 1)?;
    let d = sys.period();
    Ok(2.0 * sys.c / (d * d * curv))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::stack::Layer;

    #[test]
    fn empty_lattice_bands_and_mass() {
        // A uniform "superlattice" is the free electron folded into the zone:
        // E = V0 + c (q + 2πn/d)²/m (Ashcroft & Mermin 1976, ch. 9).
        let (v0, m, d) = (15.0, 0.07, 6.0);
        let stack = Heterostructure::new(vec![Layer::new(2.5, v0, m), Layer::new(3.5, v0, m)], 0.0).unwrap();
        let c = Units::Semiconductor.hbar2_over_2me();
        let q = [0.0, 0.3, PI / d, 2.0 * PI / d + 0.3, -0.3];
        let e = bands(&stack, &q, 4, &MeshOptions::new(1e-11)).unwrap();
        for (row, &qq) in e.iter().zip(&q) {
            let mut free: Vec<f64> = (-4..=4).map(|n| v0 + c * (qq + 2.0 * PI * n as f64 / d).powi(2) / m).collect();
            free.sort_by(f64::total_cmp);
            for i in 0..4 {
                assert!(((row[i] - free[i]) / free[i]).abs() < 1e-10, "q={qq} band {i}: {} vs {}", row[i], free[i]);
            }
        }
        // Folding: q and q + 2π/d and −q give the same energies.
        assert!(e[1].iter().zip(&e[3]).all(|(a, b)| (a - b).abs() < 1e-9));
        assert!(e[1].iter().zip(&e[4]).all(|(a, b)| (a - b).abs() < 1e-9));
        let mass = band_mass(&stack, 0, &MeshOptions::new(1e-11)).unwrap();
        assert!(((mass - m) / m).abs() < 1e-9, "{mass}");
        // The first gap of the empty lattice is closed at q = π/d: bands 0 and 1 touch there.
        assert!(band_mass(&stack, 1, &MeshOptions::new(1e-11)).is_err());
    }

    #[test]
    fn bad_input_is_an_error() {
        let stack = Heterostructure::new(vec![Layer::new(2.0, 0.0, 0.07), Layer::new(3.0, 100.0, 0.09)], 0.0).unwrap();
        let o = MeshOptions::new(1e-10);
        assert!(bands(&stack, &[f64::NAN], 2, &o).is_err());
        assert!(bands(&stack, &[0.0], 0, &o).is_err());
        let tilted = stack.with_field(1.0).unwrap();
        assert!(bands(&tilted, &[0.0], 2, &o).is_err());
        assert!(folded_phase(3.0 * PI / 5.0, 5.0).unwrap() - PI < 1e-12);
    }
}
