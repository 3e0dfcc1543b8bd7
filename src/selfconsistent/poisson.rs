//! Poisson's equation on the element mesh of a Schrödinger solve:
//! d/dz (ε_r dU/dz) = K·(N_D − n) for the electron potential energy U = −eφ (meV),
//! K = e²/ε₀ = 18 095 meV·nm, densities in nm⁻³ (Jackson 1999, eq. 1.22 with ε = ε_r ε₀).
//!
//! Weak form on the C0 Lagrange space of *all* mesh nodes (both ends included):
//! ∫ ε_r U' v' dz = −K ∫ (N_D − n) v dz + boundary terms, stiffness by the same GLL
//! quadrature as the kinetic energy (exact for ε_r constant per element), the source
//! GLL-lumped. Boundary conditions: zero field (natural) at an end, or U given there.
//! With zero field at both ends the problem is solvable when the total charge vanishes
//! (the Fermi level is chosen so); U is then fixed by U(left) = 0.

use crate::basis::elements::ElementBasis;
use crate::error::{NumericalError, Result};
use crate::linalg::banded::SymBand;

/// e²/ε₀ in meV·nm (CODATA 2022: e = 1.602176634e-19 C exact, ε₀ = 8.8541878188e-12 F/m).
pub const E2_OVER_EPS0: f64 = 1.602_176_634e-19 * 1e12 / 8.854_187_818_8e-12;

/// Global node of local node i of element e (all nodes, ends included).
pub fn node(basis: &ElementBasis, e: usize, i: usize) -> usize {
    e * basis.order() + i
}

/// Number of global nodes, ends included.
pub fn node_count(basis: &ElementBasis) -> usize {
    basis.elements().len() * basis.order() + 1
}

/// The Poisson operator of one mesh and permittivity profile, assembled once: the
/// stiffness on the unknown nodes 1..nn (node 0 is fixed or the reference), its
/// coupling to node 0, and the GLL weight of every sample point. Reused by every
/// iteration of a self-consistent solve.
pub struct Poisson {
    /// Stiffness on nodes 1..nn.
    a: SymBand,
    /// Stiffness entries K[g, 0] for g = 1..=p (the coupling to the fixed node).
    a0: Vec<f64>,
    /// Global node of every sample point (element order).
    node_of: Vec<usize>,
    /// GLL quadrature weight of every sample point.
    wq: Vec<f64>,
    nn: usize,
}

impl Poisson {
    /// Assemble ∫ε_r U'v' on `basis` with `permittivity` sampled on the basis points.
    pub fn new(basis: &ElementBasis, permittivity: &[f64]) -> Result<Self> {
        let p = basis.order();
        let m = p + 1;
        let nn = node_count(basis);
        let d = basis.gll().differentiation();
        let omega = basis.gll().weights();
        let mut a = SymBand::zeros(nn - 1, p)?;
        let mut a0 = vec![0.0; m];
        let mut kloc = vec![0.0; m * m];
        for (e, el) in basis.elements().iter().enumerate() {
            kloc.fill(0.0);
            for q in 0..m {
                let s = 2.0 / el.h * permittivity[e * m + q] * omega[q];
                for i in 0..m {
                    for j in 0..m {
                        kloc[i * m + j] += s * d[q * m + i] * d[q * m + j];
                    }
                }
            }
            for i in 0..m {
                let gi = node(basis, e, i);
                for j in 0..m {
                    let gj = node(basis, e, j);
                    match (gi, gj) {
                        (0, _) => {}
                        (_, 0) => a0[gi] += kloc[i * m + j],
                        _ if gj <= gi => a.add(gi - 1, gj - 1, kloc[i * m + j])?,
                        _ => {}
                    }
                }
            }
        }
        let node_of = (0..basis.elements().len()).flat_map(|e| (0..m).map(move |i| node(basis, e, i))).collect();
        Ok(Poisson { a, a0, node_of, wq: basis.quadrature_weights().to_vec(), nn })
    }

    /// Global node of every sample point (element order).
    pub fn node_of(&self) -> &[usize] {
        &self.node_of
    }

    /// Right-hand side −K∫(N_D − n)v − K[., 0]·u0 on the unknown nodes.
    fn rhs(&self, source: &[f64], u0: f64) -> Vec<f64> {
        let mut rhs = vec![0.0; self.nn - 1];
        for (k, &g) in self.node_of.iter().enumerate() {
            if g > 0 {
                rhs[g - 1] -= E2_OVER_EPS0 * self.wq[k] * source[k];
            }
        }
        for (g, &c) in self.a0.iter().enumerate().skip(1) {
            if g < self.nn {
                rhs[g - 1] -= c * u0;
            }
        }
        rhs
    }

    /// U at every global node for `source` = N_D − n (nm⁻³) on the sample points, U at
    /// the left end `left` (None: only the reference U = 0 there with zero field, which
    /// needs a neutral source), zero field at the right end.
    pub fn solve(&self, source: &[f64], left: Option<f64>) -> Result<Vec<f64>> {
        let u0 = left.unwrap_or(0.0);
        let mut rhs = self.rhs(source, u0);
        self.a.solve_spd(&mut rhs).map_err(|e| NumericalError::EigenFailed(format!("Poisson: {e}")))?;
        let mut u = Vec::with_capacity(self.nn);
        u.push(u0);
        u.extend(rhs);
        Ok(u)
    }

    /// The nonlinear Poisson equation ∫ε_r U'v' = −K∫(N_D − n(U))v with U(left) = `left`
    /// and zero field at the right end, by damped Newton iteration from `u` (nodal,
    /// updated in place). `density(k, U)` gives the electron density n and −dn/dU
    /// (≥ 0) at sample point k for the nodal value U there; the Jacobian is the
    /// stiffness plus a positive diagonal, so every Newton step is one banded Cholesky.
    /// Each step is halved until the residual norm decreases (Newton's method with a
    /// backtracking line search; Nocedal & Wright 2006, §3.1). Stops when the update is
    /// below `tol` (meV). Returns the number of Newton steps.
    pub fn solve_nonlinear(
        &self,
        nd: &[f64],
        density: impl Fn(usize, f64) -> (f64, f64),
        left: f64,
        u: &mut [f64],
        tol: f64,
    ) -> Result<usize> {
        let nn = self.nn;
        u[0] = left;
        let residual = |u: &[f64], jac: Option<&mut SymBand>| -> Vec<f64> {
            // F = A u − rhs(N_D − n(u)), on the unknown nodes.
            let src: Vec<f64> = self.node_of.iter().enumerate().map(|(k, &g)| nd[k] - density(k, u[g]).0).collect();
            let mut f = self.rhs(&src, left);
            let mut au = vec![0.0; nn - 1];
            self.a.mul_vec(&u[1..], &mut au);
            for (fi, ai) in f.iter_mut().zip(&au) {
                *fi = ai - *fi;
            }
            if let Some(j) = jac {
                for (k, &g) in self.node_of.iter().enumerate() {
                    if g > 0 {
                        let d = E2_OVER_EPS0 * self.wq[k] * density(k, u[g]).1;
                        let _ = j.add(g - 1, g - 1, d);
                    }
                }
            }
            f
        };
        let norm = |f: &[f64]| f.iter().map(|x| x * x).sum::<f64>().sqrt();
        for step in 1..=100 {
            let mut jac = self.a.clone();
            let f = residual(u, Some(&mut jac));
            let f0 = norm(&f);
            let mut du = f;
            jac.solve_spd(&mut du).map_err(|e| NumericalError::EigenFailed(format!("Poisson (Newton): {e}")))?;
            let size = du.iter().map(|x| x.abs()).fold(0.0, f64::max);
            let mut t = 1.0;
            let mut trial = u.to_vec();
            loop {
                for g in 1..nn {
                    trial[g] = u[g] - t * du[g - 1];
                }
                if norm(&residual(&trial, None)) < f0 || t < 1e-6 {
                    break;
                }
                t *= 0.5;
            }
            u.copy_from_slice(&trial);
            if t * size <= tol {
                return Ok(step);
            }
        }
        Err(NumericalError::EigenFailed("Poisson (Newton): no convergence in 100 steps".into()).into())
    }
}

/// U on the basis points (element order) from the nodal values (ends nudged inside
/// their element: the same nodal value).
pub fn on_points(basis: &ElementBasis, u: &[f64]) -> Vec<f64> {
    let m = basis.order() + 1;
    (0..basis.elements().len()).flat_map(|e| (0..m).map(move |i| (e, i))).map(|(e, i)| u[node(basis, e, i)]).collect()
}

/// U(z) at arbitrary points by Lagrange interpolation in each element (the left end's
/// value left of the mesh, the right end's value right of it).
pub fn evaluate(basis: &ElementBasis, u: &[f64], z: &[f64]) -> Vec<f64> {
    let p = basis.order();
    let els = basis.elements();
    let mut l = vec![0.0; p + 1];
    z.iter()
        .map(|&x| {
            if x.is_nan() {
                return f64::NAN;
            }
            if x <= els[0].a {
                return u[0];
            }
            if x >= els[els.len() - 1].b {
                return u[u.len() - 1];
            }
            let e = basis.locate(x).unwrap_or(0);
            let el = els[e];
            basis.gll().lagrange(2.0 * (x - el.a) / el.h - 1.0, &mut l);
            (0..=p).map(|i| l[i] * u[node(basis, e, i)]).sum()
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn uniform_sheet_between_zero_field_ends() {
        // A slab of charge density ρ on [0, 1] (N_D = 1 nm⁻³, n = 0) and compensating
        // charge −ρ on [1, 2] in ε_r = 2, zero field at both ends: U'' = (K/ε)(N_D − n)
        // gives U = (K/2ε) z² on [0,1] (U(0) = 0, U'(0) = 0) and by symmetry
        // U(2 − z) = 2U(1) − U(z) (textbook electrostatics, integrated by hand).
        let b = ElementBasis::new(&[0.0, 0.5, 1.0, 1.5, 2.0], 6, None).unwrap();
        let src: Vec<f64> = b.points().iter().map(|&z| if z < 1.0 { 1.0 } else { -1.0 }).collect();
        let eps = vec![2.0; src.len()];
        let u = Poisson::new(&b, &eps).unwrap().solve(&src, None).unwrap();
        let k = E2_OVER_EPS0 / 2.0;
        let zs = [0.25, 0.75, 1.0, 1.6];
        let got = evaluate(&b, &u, &zs);
        let exact = |z: f64| if z <= 1.0 { 0.5 * k * z * z } else { 2.0 * 0.5 * k - 0.5 * k * (2.0 - z) * (2.0 - z) };
        for (g, z) in got.iter().zip(zs) {
            assert!((g - exact(z)).abs() < 1e-9 * k, "z={z}: {g} vs {}", exact(z));
        }
    }

    #[test]
    fn dirichlet_left_end_with_a_step_in_permittivity() {
        // No charge, U(0) = 3, zero field at the right end: U = 3 everywhere whatever ε.
        let b = ElementBasis::new(&[0.0, 1.0, 3.0], 5, None).unwrap();
        let eps: Vec<f64> = b.points().iter().map(|&z| if z < 1.0 { 4.0 } else { 9.0 }).collect();
        let u = Poisson::new(&b, &eps).unwrap().solve(&vec![0.0; eps.len()], Some(3.0)).unwrap();
        assert!(u.iter().all(|v| (v - 3.0).abs() < 1e-12));
    }
}
