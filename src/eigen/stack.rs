//! Bound levels of a layered structure on Legendre spectral elements, self-converged to
//! a requested accuracy.
//!
//! The mesh puts an element edge on every interface, splits layers into elements of at
//! most `element_length`, and covers the claddings with elements doubling in length
//! outwards ([`ElementBasis::layered`]). Two errors are controlled separately:
//!
//! * **Discretisation.** The levels are computed at orders p and p + 2 on the same mesh;
//!   `errors` are |E(p+2) − E(p)| (a bound on the error of E(p), whose spectral
//!   convergence makes the returned E(p+2) far more accurate still). p grows until every
//!   requested level satisfies error ≤ accuracy·max(|E|, E − V_min), V_min the lowest band
//!   edge of the structure; past `MAX_ORDER` the elements are halved.
//! * **Cladding depth.** The Dirichlet ends sit where the tails of the wanted bound
//!   levels are negligible: a level κ = √(m_c(V_c − E))/√(ħ²/2m_e) below a cladding
//!   edge V_c is shifted by about 4(V_c − E)e^{−2κd} by a wall at depth d; the depth is
//!   raised until that is below a tenth of the accuracy, for every level below V_c
//!   (up to [`MAX_DEPTH`]). Levels above a cladding edge are box states of the mesh on
//!   that side and are flagged `bound = false`.
//!
//! Model: the single-band BenDaniel-Duke equation with parabolic bands
//! ([`crate::model::stack`] for the layer and field conventions).

use super::{dense_lowest, residuals, Method, Spectrum};
use crate::basis::{fix_signs, ElementBasis};
use crate::error::{InputError, Result};
use crate::model::stack::Heterostructure;
use crate::model::units::Units;
use crate::problem::Hamiltonian;
use std::sync::Arc;

/// Highest element order the self-convergence raises p to before halving elements.
pub const MAX_ORDER: usize = 24;
/// Deepest cladding (nm) the solver extends to.
pub const MAX_DEPTH: f64 = 5000.0;

/// Options of [`solve_stack`].
#[derive(Debug, Clone)]
pub struct StackOptions {
    /// Number of levels; `None`: all bound levels (below both cladding edges).
    pub count: Option<usize>,
    /// Relative accuracy of every level, in [1e-13, 1e-2].
    pub accuracy: f64,
    /// Starting order (default: from the accuracy).
    pub order: Option<usize>,
    /// Longest element inside a layer (nm).
    pub element_length: f64,
}

impl StackOptions {
    pub fn new(count: Option<usize>, accuracy: f64) -> Self {
        StackOptions { count, accuracy, order: None, element_length: 12.0 }
    }
}

/// One solve on one mesh.
struct Solve {
    h: Arc<Hamiltonian>,
    energies: Vec<f64>,
    vectors: faer::Mat<f64>,
}

fn solve_on(stack: &Heterostructure, order: usize, opts: &StackOptions, depth: (f64, f64), count: usize, units: Units) -> Result<Solve> {
    let basis = Arc::new(ElementBasis::layered(stack.interfaces(), order, opts.element_length, depth)?);
    let h = Arc::new(Hamiltonian::stack_on_elements(stack, basis, units)?);
    let count = count.min(h.size());
    let (energies, vectors) = dense_lowest(h.problem(), count, faer::Par::Seq)?;
    Ok(Solve { h, energies, vectors })
}

/// Depth (nm) a cladding with band edge `edge` and mass `mass` needs for a level at
/// `e` (below the edge) to be shifted by less than `tol` (meV); `None` above the edge.
fn needed_depth(e: f64, edge: f64, mass: f64, h2m: f64, tol: f64) -> Option<f64> {
    let gap = edge - e;
    if !(gap > 0.0) {
        return None;
    }
    let kappa = (mass * gap / h2m).sqrt();
    // 4·gap·e^{−2κd} ≤ tol
    Some(((4.0 * gap / tol).max(1.0)).ln() / (2.0 * kappa))
}

/// Levels of `stack` on spectral elements to the requested accuracy (module docs).
/// The Spectrum lives on the final element basis; `errors` and `bound` are set.
pub fn solve_stack(stack: &Heterostructure, opts: &StackOptions, units: Units) -> Result<Spectrum> {
    if !(opts.accuracy.is_finite() && (1e-13..=1e-2).contains(&opts.accuracy)) {
        return Err(InputError::range("accuracy", "a relative accuracy in [1e-13, 1e-2]", opts.accuracy).into());
    }
    if let Some(c) = opts.count {
        if c == 0 {
            return Err(InputError::range("count", "an integer >= 1, or None for all bound levels", c).into());
        }
    }
    if let Some(p) = opts.order {
        if !(2..=crate::basis::gll::MAX_ORDER - 2).contains(&p) {
            return Err(InputError::range("order", format!("an integer in [2, {}]", crate::basis::gll::MAX_ORDER - 2), p).into());
        }
    }
    crate::error::check_positive("element_length", opts.element_length)?;
    let acc = opts.accuracy;
    let h2m = units.hbar2_over_2me();
    let layers = stack.layers();
    let (edge_l, edge_r) = stack.cladding_edges();
    let (m_l, m_r) = (layers[0].mass, layers[layers.len() - 1].mass);
    let v_min = stack
        .pieces(0.0, stack.total_thickness())
        .iter()
        .map(|p| p.v_mid - 0.5 * (p.z1 - p.z0) * p.slope.abs())
        .fold(f64::INFINITY, f64::min);
    let scale = |e: f64| e.abs().max(e - v_min).max(1e-300);
    // Start: claddings deep enough for a level at the bottom of the structure.
    let tol0 = 0.1 * acc * scale(v_min + 1.0);
    let start_depth = |edge: f64, m: f64| needed_depth(v_min, edge, m, h2m, tol0).unwrap_or(20.0).clamp(10.0, MAX_DEPTH);
    let mut depth = (start_depth(edge_l, m_l), start_depth(edge_r, m_r));
    let mut order = opts.order.unwrap_or(((1.0 / acc).log10().round() as usize).clamp(6, 16));
    let mut element_length = opts.element_length;
    let mut count = opts.count.unwrap_or(8);
    let mut previous: Option<(Vec<f64>, usize, (f64, f64), f64)> = None;
    for _round in 0..64 {
        let o = StackOptions { element_length, ..opts.clone() };
        let s = solve_on(stack, order, &o, depth, count, units)?;
        // All bound levels: make sure the highest computed one is above the lower edge.
        if opts.count.is_none() {
            let edge = edge_l.min(edge_r);
            if s.energies.len() == count && s.energies[count - 1] < edge && count < s.h.size() {
                count = (2 * count).min(s.h.size());
                previous = None;
                continue;
            }
        }
        // Cladding depth for every computed level below each edge.
        let mut deeper = depth;
        for &e in &s.energies {
            let tol = 0.1 * acc * scale(e);
            if let Some(d) = needed_depth(e, edge_l, m_l, h2m, tol) {
                deeper.0 = deeper.0.max((1.2 * d).min(MAX_DEPTH));
            }
            if let Some(d) = needed_depth(e, edge_r, m_r, h2m, tol) {
                deeper.1 = deeper.1.max((1.2 * d).min(MAX_DEPTH));
            }
        }
        if deeper.0 > depth.0 * 1.0001 || deeper.1 > depth.1 * 1.0001 {
            depth = deeper;
            previous = None;
            continue;
        }
        // Self-convergence against the previous order on the same mesh.
        let same_mesh = |p: &(Vec<f64>, usize, (f64, f64), f64)| p.2 == depth && p.3 == element_length && p.1 + 2 == order;
        if let Some(prev) = previous.as_ref().filter(|p| same_mesh(p)) {
            let k = s.energies.len().min(prev.0.len());
            let errors: Vec<f64> = (0..k).map(|i| (s.energies[i] - prev.0[i]).abs()).collect();
            let wanted = opts.count.map_or_else(
                || s.energies.iter().take_while(|&&e| e < edge_l.min(edge_r)).count(),
                |c| c.min(k),
            );
            if (0..wanted).all(|i| errors[i] <= acc * scale(s.energies[i])) {
                return Ok(finish(s, errors, wanted.max(1), (edge_l, edge_r)));
            }
        }
        previous = Some((s.energies.clone(), order, depth, element_length));
        if order + 2 > MAX_ORDER {
            element_length *= 0.5;
            order = opts.order.unwrap_or(8);
            previous = None;
        } else {
            order += 2;
        }
    }
    Err(InputError::range("accuracy", "reachable within the mesh refinement limits (try a looser accuracy)", acc).into())
}

/// The Spectrum of the converged solve: the first `keep` levels, signs fixed by the
/// basis, residuals, errors and bound flags.
fn finish(s: Solve, errors: Vec<f64>, keep: usize, edges: (f64, f64)) -> Spectrum {
    let keep = keep.min(s.energies.len());
    let energies = s.energies[..keep].to_vec();
    let mut vectors = s.vectors.as_ref().subcols(0, keep).to_owned();
    fix_signs(s.h.basis().as_dyn(), &mut vectors);
    let res = residuals(s.h.problem(), &energies, &vectors);
    let attainable = super::attainable_accuracy(s.h.problem(), &energies);
    let bound = energies.iter().map(|&e| e < edges.0.min(edges.1)).collect();
    Spectrum {
        hamiltonian: s.h,
        energies,
        vectors,
        residuals: res,
        method: Method::Dense,
        iterations: 0,
        attainable,
        note: None,
        errors: Some(errors[..keep].to_vec()),
        bound: Some(bound),
    }
}
