//! Schrödinger-Poisson for doped layered structures on the spectral-element mesh.
//!
//! Model (mean field, single band): donors fully ionised with the layers' `doping`
//! (cm⁻³; negative for acceptors) inside the stack [0, L] (the claddings beyond are
//! undoped); electrons in the bound subbands of the total band edge
//! V(z) = E_c(z) + eF·z-term + U(z) (+ V_xc(z) with `exchange_correlation`), occupied by
//! 2D Fermi-Dirac statistics with spin ([`statistics`]); U from Poisson's equation
//! ([`poisson`]) with the layers' permittivities. Subbands above the lower cladding edge
//! (continuum) carry no charge here: a low-temperature model, to be checked for a hot
//! structure whose barriers would hold thermal electrons.
//!
//! Boundary conditions ([`Boundary`]): by default zero field at both ends and the Fermi
//! level fixed by overall neutrality (Σ N_i = total donor sheet density); or a given
//! Fermi level with U fixed at the left end (optionally by a surface barrier: E_c(0) +
//! U(0) − E_F = φ_B, a Schottky-type contact pinning E_F) and zero field at the right.
//!
//! Iteration: Anderson mixing ([`mixing`]) of U at the mesh nodes, started from the
//! flat band, to max|U_out − U_in| ≤ `tol`; the history is kept.

pub mod mixing;
pub mod poisson;
pub mod statistics;
pub mod xc;

use crate::basis::elements::ElementBasis;
use crate::basis::{fix_signs, BasisRef};
use crate::eigen::stack::{solve_stack, StackOptions};
use crate::eigen::{attainable_accuracy, dense_lowest, residuals, Method, Spectrum};
use crate::error::{InputError, NumericalError, Result};
use crate::model::stack::Heterostructure;
use crate::model::units::Units;
use crate::problem::Hamiltonian;
use std::sync::Arc;

/// Boundary conditions of the electrostatics.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Boundary {
    /// Zero field at both ends; E_F from overall neutrality.
    Neutral,
    /// E_F given (meV); U(left) = 0, or set by a surface barrier φ_B (meV) so that
    /// E_c(0) + U(0) − E_F = φ_B; zero field at the right end.
    FermiLevel { fermi_level: f64, surface_barrier: Option<f64> },
}

/// Options of [`solve`].
#[derive(Debug, Clone)]
pub struct Options {
    pub temperature_k: f64,
    pub boundary: Boundary,
    /// Self-consistency: max |U_out − U_in| (meV).
    pub tol: f64,
    pub max_iter: usize,
    /// Add the Hedin-Lundqvist LDA exchange-correlation potential (an approximation).
    pub exchange_correlation: bool,
    /// Relative accuracy of the levels (the mesh is sized by the flat-band solve).
    pub accuracy: f64,
    /// Anderson mixing: damping and depth.
    pub mixing: f64,
    pub depth: usize,
}

impl Options {
    pub fn new(temperature_k: f64) -> Self {
        Options { temperature_k, boundary: Boundary::Neutral, tol: 1e-6, max_iter: 100, exchange_correlation: false, accuracy: 1e-10, mixing: 0.3, depth: 8 }
    }
}

/// A converged self-consistent solution.
#[derive(Debug, Clone)]
pub struct Solution {
    pub stack: Heterostructure,
    /// The element mesh of the solution.
    pub basis: Arc<ElementBasis>,
    pub fermi_level: f64,
    /// The levels of the converged total potential (on the element mesh).
    pub spectrum: Spectrum,
    /// Electron sheet density of each level (cm⁻²).
    pub sheet_densities: Vec<f64>,
    /// U at the mesh nodes (meV), both ends included.
    pub u_nodes: Vec<f64>,
    /// V_xc at the sample points (meV), zeros without exchange-correlation.
    pub vxc_points: Vec<f64>,
    pub iterations: usize,
    /// max |U_out − U_in| (meV) of every iteration.
    pub residuals: Vec<f64>,
    /// Set when the solution is the flat band (no charge: E_F undefined).
    pub note: Option<String>,
}

impl Solution {
    /// The total band edge E_c(z) + field + U(z) (meV) at `z` (nm); V_xc excluded.
    pub fn potential(&self, z: &[f64]) -> Vec<f64> {
        let u = poisson::evaluate(&self.basis, &self.u_nodes, z);
        self.stack.potential(z).iter().zip(u).map(|(v, u)| v + u).collect()
    }
    /// Electron density n(z) (cm⁻³) = Σ_i N_i |ψ_i(z)|².
    pub fn density(&self, z: &[f64]) -> std::result::Result<Vec<f64>, InputError> {
        let psi = self.spectrum.wavefunctions(z)?;
        Ok((0..z.len())
            .map(|r| (0..self.sheet_densities.len()).map(|i| self.sheet_densities[i] * 1e7 * psi[(r, i)] * psi[(r, i)]).sum())
            .collect())
    }
}

/// Check the inputs every boundary condition needs.
fn validate(stack: &Heterostructure, o: &Options) -> std::result::Result<(), InputError> {
    if !(o.temperature_k.is_finite() && o.temperature_k > 0.0) {
        return Err(InputError::range("temperature", "a finite temperature > 0 K", o.temperature_k));
    }
    crate::error::check_positive("tol", o.tol)?;
    if !(o.mixing > 0.0 && o.mixing <= 1.0) {
        return Err(InputError::range("mixing", "a damping in (0, 1]", o.mixing));
    }
    if let Some(i) = stack.layers().iter().position(|l| l.permittivity.is_none()) {
        return Err(InputError::range(
            &format!("layers[{i}].permittivity"),
            "a relative permittivity for every layer (Poisson's equation needs it; Layer(..., permittivity=…) or Layer.from_material)",
            "None",
        ));
    }
    if let Boundary::FermiLevel { fermi_level, surface_barrier } = o.boundary {
        if !fermi_level.is_finite() {
            return Err(InputError::range("fermi_level", "a finite energy (meV)", fermi_level));
        }
        if let Some(b) = surface_barrier {
            if !b.is_finite() {
                return Err(InputError::range("surface_barrier", "a finite energy (meV)", b));
            }
        }
    }
    Ok(())
}

/// Self-consistent Schrödinger-Poisson solution of `stack` (module docs).
pub fn solve(stack: &Heterostructure, o: &Options) -> Result<Solution> {
    solve_from(stack, o, None)
}

/// [`solve`] starting from the electrostatic energy of a nearby solution (interpolated
/// onto this structure's mesh) instead of the flat band: a sweep's warm start.
pub fn solve_from(stack: &Heterostructure, o: &Options, start: Option<&Solution>) -> Result<Solution> {
    validate(stack, o)?;
    let units = Units::Semiconductor;
    let h2m = units.hbar2_over_2me();
    let kt = statistics::KB_MEV_PER_K * o.temperature_k;
    let total_l = stack.total_thickness();
    // Donor sheet density (nm⁻²): Σ doping·thickness, doping in cm⁻³ = 1e-21 nm⁻³.
    let donors: f64 = stack.layers().iter().map(|l| l.doping * 1e-21 * l.thickness).sum();
    // The mesh of the flat-band structure, all bound levels.
    let flat = solve_stack(stack, &StackOptions::new(None, o.accuracy), units)?;
    let BasisRef::Elements(basis) = flat.basis().clone() else {
        return Err(NumericalError::EigenFailed("stack solve returned a non-element basis".into()).into());
    };
    if o.boundary == Boundary::Neutral && !(donors > 0.0) {
        let nn = poisson::node_count(&basis);
        let count = flat.count();
        return Ok(Solution {
            stack: stack.clone(),
            basis: basis.clone(),
            fermi_level: f64::NAN,
            spectrum: flat,
            sheet_densities: vec![0.0; count],
            u_nodes: vec![0.0; nn],
            vxc_points: vec![0.0; basis.points().len()],
            iterations: 0,
            residuals: Vec::new(),
            note: Some(format!(
                "no net donor charge (total {:.3e} cm^-2): the Fermi level of a neutral structure is undefined; the flat-band levels are returned",
                donors * 1e14
            )),
        });
    }
    let points = basis.points().to_vec();
    let layer_of: Vec<usize> = points.iter().map(|&z| stack.layer_index(z)).collect();
    let eps: Vec<f64> = layer_of.iter().map(|&i| stack.layers()[i].permittivity.unwrap_or(1.0)).collect();
    let masses = stack.mass(&points);
    let nd: Vec<f64> = points
        .iter()
        .zip(&layer_of)
        .map(|(&z, &i)| if (0.0..total_l).contains(&z) { stack.layers()[i].doping * 1e-21 } else { 0.0 })
        .collect();
    let band: Vec<f64> = stack.potential(&points);
    let nn = poisson::node_count(&basis);
    let m = basis.order() + 1;
    let left = match o.boundary {
        Boundary::Neutral => None,
        Boundary::FermiLevel { fermi_level, surface_barrier } => Some(surface_barrier.map_or(0.0, |b| fermi_level + b - band[0])),
    };
    let mut u = match start {
        Some(s) => {
            let nodes = basis.nodes();
            let mut u = poisson::evaluate(&s.basis, &s.u_nodes, nodes);
            if let Some(l) = left {
                u[0] = l;
            }
            u
        }
        None => vec![left.unwrap_or(0.0); nn],
    };
    let pois = poisson::Poisson::new(&basis, &eps)?;
    let mut vxc = vec![0.0; points.len()];
    let mut mix = mixing::Anderson::new(o.depth, o.mixing);
    let mut history = Vec::new();
    let mut count = flat.count().max(1) + 2;
    let (cl, cr) = stack.cladding_edges();
    for it in 0..o.max_iter {
        // Schrödinger step in the current potential.
        let up = poisson::on_points(&basis, &u);
        let v: Vec<f64> = (0..points.len()).map(|k| band[k] + up[k] + vxc[k]).collect();
        let h = Arc::new(Hamiltonian::stack_with_potential(stack, basis.clone(), v, units)?);
        let edge = (cl + u[0]).min(cr + u[nn - 1]);
        let (energies, mut vectors) = loop {
            let k = count.min(h.size());
            let (e, vec) = dense_lowest(h.problem(), k, faer::Par::Seq)?;
            if e[k - 1] < edge && k < h.size() {
                count *= 2;
                continue;
            }
            break (e, vec);
        };
        let bound = energies.iter().take_while(|&&e| e < edge).count().max(1);
        let mean_m = h.mean_masses(vectors.as_ref().subcols(0, bound));
        let ef = match o.boundary {
            Boundary::Neutral => statistics::fermi_level_for(donors, &energies[..bound], &mean_m, kt, h2m),
            Boundary::FermiLevel { fermi_level, .. } => fermi_level,
        };
        let sheets: Vec<f64> = (0..bound).map(|i| statistics::sheet_density(ef, energies[i], mean_m[i], kt, h2m)).collect();
        // |ψ_i|² at the sample points (the unknowns are the inner nodes; 0 at the ends).
        let psi2: Vec<Vec<f64>> = (0..points.len())
            .map(|k| {
                let (e, q) = (k / m, k % m);
                basis.global_index(e, q).map_or(vec![0.0; bound], |g| (0..bound).map(|i| vectors[(g, i)] * vectors[(g, i)]).collect())
            })
            .collect();
        let n: Vec<f64> = psi2.iter().map(|p| p.iter().zip(&sheets).map(|(a, b)| a * b).sum()).collect();
        let u_out = match left {
            // Zero field at both ends, E_F from neutrality: the linear Poisson map.
            None => {
                let source: Vec<f64> = nd.iter().zip(&n).map(|(a, b)| a - b).collect();
                pois.solve(&source, None)?
            }
            // Given E_F: the predictor-corrector map (Trellakis et al. 1997, J. Appl. Phys.
            // 81, 7880): the nonlinear Poisson equation with the subband energies shifted
            // locally by the change of U, E_i + U(z) − U_in(z), solved by Newton. The plain
            // map diverges here (the charge responds exponentially to U).
            Some(l) => {
                let u_in = u.clone();
                let density = |k: usize, uk: f64| {
                    let shift = uk - u_in[pois.node_of()[k]];
                    let mut n = 0.0;
                    let mut dn = 0.0;
                    for i in 0..bound {
                        let w = psi2[k][i];
                        if w != 0.0 {
                            n += w * statistics::sheet_density(ef, energies[i] + shift, mean_m[i], kt, h2m);
                            dn += w * statistics::sheet_density_slope(ef, energies[i] + shift, mean_m[i], kt, h2m);
                        }
                    }
                    (n, dn)
                };
                let mut un = u.clone();
                pois.solve_nonlinear(&nd, density, l, &mut un, 1e-3 * o.tol)?;
                un
            }
        };
        let res = u_out.iter().zip(&u).map(|(a, b)| (a - b).abs()).fold(0.0, f64::max);
        history.push(res);
        if res <= o.tol {
            fix_signs(h.basis().as_dyn(), &mut vectors);
            let keep = bound.min(energies.len());
            let energies = energies[..keep].to_vec();
            let vectors = vectors.as_ref().subcols(0, keep).to_owned();
            let r = residuals(h.problem(), &energies, &vectors);
            let attainable = attainable_accuracy(h.problem(), &energies);
            let spectrum = Spectrum {
                hamiltonian: h,
                energies,
                vectors,
                residuals: r,
                method: Method::Dense,
                iterations: it + 1,
                attainable,
                levels: Vec::new(),
                note: None,
                errors: None,
                bound: Some(vec![true; keep]),
            };
            return Ok(Solution {
                stack: stack.clone(),
                basis: basis.clone(),
                fermi_level: ef,
                spectrum,
                sheet_densities: sheets.iter().map(|s| s * 1e14).collect(),
                u_nodes: u_out,
                vxc_points: vxc,
                iterations: it + 1,
                residuals: history,
                note: None,
            });
        }
        if o.exchange_correlation {
            vxc = (0..points.len()).map(|k| xc::hedin_lundqvist(n[k], eps[k], masses[k])).collect();
        }
        u = mix.next(&u, &u_out);
        if let Some(l) = left {
            u[0] = l;
        }
    }
    Err(NumericalError::NotSettled { steps: o.max_iter, tol: o.tol, energies: Vec::new(), rates: history }.into())
}

/// [`solve`] for many structures (a doping or gate sweep) in parallel: one contiguous
/// chunk per thread, each item started from the previous item's potential. Results in
/// input order.
pub fn solve_batch(stacks: &[Heterostructure], o: &Options) -> Result<Vec<Solution>> {
    use rayon::prelude::*;
    if stacks.is_empty() {
        return Err(InputError::range("stacks", "at least one Heterostructure", "none").into());
    }
    let chunk = stacks.len().div_ceil(rayon::current_num_threads().max(1));
    let parts: Vec<Result<Vec<Solution>>> = stacks
        .par_chunks(chunk)
        .map(|items| {
            let mut out: Vec<Solution> = Vec::with_capacity(items.len());
            for s in items {
                let next = solve_from(s, o, out.last())?;
                out.push(next);
            }
            Ok(out)
        })
        .collect();
    let mut all = Vec::with_capacity(stacks.len());
    for p in parts {
        all.extend(p?);
    }
    Ok(all)
}
