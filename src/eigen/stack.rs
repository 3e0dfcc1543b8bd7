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
//!   edge of the structure; past `MAX_ORDER` the elements are halved. p starts at
//!   round(1.4·log10(1/accuracy)) in [6, 18] ([`start_order`]): 14 for 1e-10, the
//!   lowest order that passes on the benchmark stacks, so that typically two
//!   eigensolves (p and p + 2) are done.
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

/// The energies of the last solve with its order, cladding depths and element length.
type Previous = (Vec<f64>, usize, (f64, f64), f64);

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
    solve_stack_traced(stack, opts, units, &mut Vec::new())
}

/// [`solve_stack`] for many stacks (e.g. a field sweep), in parallel with rayon; results
/// in input order, the first error returned.
pub fn solve_stack_batch(stacks: &[Heterostructure], opts: &StackOptions, units: Units) -> Result<Vec<Spectrum>> {
    use rayon::prelude::*;
    if stacks.is_empty() {
        return Err(InputError::range("stacks", "at least one Heterostructure", "none").into());
    }
    stacks.par_iter().map(|s| solve_stack(s, opts, units)).collect()
}

/// Starting order for a relative accuracy: the levels of the benchmark stacks (12 nm
/// elements) meet 1e-10 at p ≈ 14 and 1e-6 at p ≈ 8; starting there saves the solves
/// at lower orders that could never pass (each round costs one eigensolve).
fn start_order(acc: f64) -> usize {
    ((1.4 * (1.0 / acc).log10()).round() as usize).clamp(6, 18)
}

/// [`solve_stack`], recording (order, unknowns) of every eigensolve in `trace`.
fn solve_stack_traced(stack: &Heterostructure, opts: &StackOptions, units: Units, trace: &mut Vec<(usize, usize)>) -> Result<Spectrum> {
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
    // Start: claddings deep enough for a level three quarters of the way up from the
    // bottom of the structure to the lower cladding edge. The graded cladding elements
    // make depth cheap (a doubling adds one element per side), while a depth found too
    // small after the first solve costs a whole extra eigensolve.
    let e0 = v_min + 0.75 * (edge_l.min(edge_r) - v_min);
    let tol0 = 0.1 * acc * scale(e0);
    let start_depth = |edge: f64, m: f64| needed_depth(e0, edge, m, h2m, tol0).map_or(20.0, |d| 1.2 * d).clamp(10.0, MAX_DEPTH);
    let mut depth = (start_depth(edge_l, m_l), start_depth(edge_r, m_r));
    let mut order = opts.order.unwrap_or_else(|| start_order(acc));
    let mut element_length = opts.element_length;
    let mut count = opts.count.unwrap_or(8);
    let mut previous: Option<Previous> = None;
    for _round in 0..64 {
        let o = StackOptions { element_length, ..opts.clone() };
        let s = solve_on(stack, order, &o, depth, count, units)?;
        trace.push((order, s.h.size()));
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
        let same_mesh = |p: &Previous| p.2 == depth && p.3 == element_length && p.1 + 2 == order;
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::stack::Layer;

    fn stack_of(l: &[(f64, f64, f64)], field: f64) -> Heterostructure {
        Heterostructure::new(l.iter().map(|&(t, v, m)| Layer::new(t, v, m)).collect(), field).unwrap()
    }

    /// The 3-well benchmark stack of issue 13 (nm, meV, m_e).
    const THREE_WELLS: [(f64, f64, f64); 7] =
        [(15.0, 800.0, 0.09), (14.0, 0.0, 0.067), (2.0, 800.0, 0.09), (12.0, 0.0, 0.067), (2.0, 800.0, 0.09), (14.0, 0.0, 0.067), (15.0, 800.0, 0.09)];

    #[test]
    fn start_order_and_batch() {
        assert_eq!(start_order(1e-10), 14);
        assert_eq!(start_order(1e-6), 8);
        assert_eq!(start_order(1e-2), 6);
        // The batch is the per-stack solve, in input order.
        let opts = StackOptions::new(Some(3), 1e-9);
        let stacks: Vec<Heterostructure> = [-20.0, 0.0, 20.0].iter().map(|&f| stack_of(&THREE_WELLS, f)).collect();
        let batch = solve_stack_batch(&stacks, &opts, Units::Semiconductor).unwrap();
        for (s, b) in stacks.iter().zip(&batch) {
            let one = solve_stack(s, &opts, Units::Semiconductor).unwrap();
            assert_eq!(one.energies, b.energies);
        }
        assert!(solve_stack_batch(&[], &opts, Units::Semiconductor).is_err());
    }

    /// CPU time of the calling thread (Linux CLOCK_THREAD_CPUTIME_ID): the machine is shared.
    #[cfg(target_os = "linux")]
    fn thread_time() -> Option<f64> {
        #[repr(C)]
        struct Timespec {
            sec: i64,
            nsec: i64,
        }
        extern "C" {
            fn clock_gettime(clk: i32, tp: *mut Timespec) -> i32;
        }
        let mut ts = Timespec { sec: 0, nsec: 0 };
        // SAFETY: plain libc call writing into a properly laid out timespec (64-bit Linux).
        let rc = unsafe { clock_gettime(3, &mut ts) };
        (rc == 0 && cfg!(target_pointer_width = "64")).then_some(ts.sec as f64 + ts.nsec as f64 * 1e-9)
    }
    #[cfg(not(target_os = "linux"))]
    fn thread_time() -> Option<f64> {
        None
    }

    /// Best of 7 blocks of the thread CPU time per call (ms).
    fn ms<T>(reps: usize, mut f: impl FnMut() -> T) -> f64 {
        (0..7)
            .map(|_| {
                let c0 = thread_time();
                let t = std::time::Instant::now();
                for _ in 0..reps {
                    std::hint::black_box(f());
                }
                let wall = t.elapsed().as_secs_f64();
                let el = match (c0, thread_time()) {
                    (Some(a), Some(b)) => b - a,
                    _ => wall,
                };
                el / reps as f64 * 1e3
            })
            .fold(f64::INFINITY, f64::min)
    }

    /// Where the time of a stack solve goes (printed, not asserted):
    /// `cargo test --release --lib stack_timing -- --ignored --nocapture`.
    #[test]
    #[ignore]
    fn stack_timing() {
        let stack = stack_of(&THREE_WELLS, 0.0);
        let opts = StackOptions::new(Some(10), 1e-10);
        let units = Units::Semiconductor;
        let mut trace = Vec::new();
        let s = solve_stack_traced(&stack, &opts, units, &mut trace).unwrap();
        let crate::basis::BasisRef::Elements(eb) = s.hamiltonian.basis() else { panic!("not on elements") };
        let order = eb.order();
        let edges = eb.edges();
        let ifc = stack.interfaces();
        let depth = (ifc[0] - edges[0], edges[edges.len() - 1] - ifc[ifc.len() - 1]);
        println!("3-well stack, 10 levels, accuracy 1e-10: eigensolves (order, n) {trace:?}, depth {depth:?}");
        println!("  max error estimate {:e}", s.errors.as_ref().unwrap().iter().cloned().fold(0.0, f64::max));
        println!("  solve_stack total: {:.3} ms thread CPU", ms(20, || solve_stack(&stack, &opts, units).unwrap()));
        for p in [order - 2, order] {
            let t_basis = ms(50, || ElementBasis::layered(ifc, p, opts.element_length, depth).unwrap());
            let basis = Arc::new(ElementBasis::layered(ifc, p, opts.element_length, depth).unwrap());
            let t_ham = ms(50, || Hamiltonian::stack_on_elements(&stack, basis.clone(), units).unwrap());
            let h = Hamiltonian::stack_on_elements(&stack, basis.clone(), units).unwrap();
            let t_eig = ms(50, || dense_lowest(h.problem(), 10, faer::Par::Seq).unwrap());
            let band = h.problem().band().unwrap();
            let lb = band.lower_bound.unwrap();
            let t_si = ms(50, || crate::linalg::lanczos::lowest(band.a, band.b, 10, lb).unwrap());
            let t_dn = ms(20, || crate::linalg::banded::lowest_auto(band.a, band.b, 10, None).unwrap());
            let (_, _, rep) = crate::linalg::lanczos::lowest_with_report(band.a, band.b, 10, lb).unwrap();
            let (e, v) = dense_lowest(h.problem(), 10, faer::Par::Seq).unwrap();
            let t_res = ms(50, || residuals(h.problem(), &e, &v));
            let t_rq = ms(50, || h.problem().rayleigh_quotients(v.as_ref()));
            println!(
                "  p {p:2} n {:4}: basis {t_basis:.3}  assembly {t_ham:.3}  eigen {t_eig:.3} (shift-invert {t_si:.3}, steps {:?}; without bound {t_dn:.3})  Rayleigh {t_rq:.3}  residuals {t_res:.3} ms",
                basis.size(),
                rep.steps
            );
        }
        let double = [(15.0, 800.0, 0.09), (10.0, 0.0, 0.067), (3.0, 800.0, 0.09), (10.0, 0.0, 0.067), (15.0, 800.0, 0.09)];
        for (name, layers, count) in [("3-well, 10 levels", &THREE_WELLS[..], 10), ("double well, 5 levels", &double[..], 5)] {
            let stacks: Vec<Heterostructure> = (0..200).map(|i| stack_of(layers, -30.0 + 60.0 * i as f64 / 199.0)).collect();
            let o = StackOptions::new(Some(count), 1e-10);
            let t = std::time::Instant::now();
            let out = solve_stack_batch(&stacks, &o, units).unwrap();
            let wall = t.elapsed().as_secs_f64() * 1e3;
            let t = std::time::Instant::now();
            let _ = solve_stack_batch(&stacks, &o, units).unwrap();
            let wall2 = t.elapsed().as_secs_f64() * 1e3;
            let serial = ms(1, || stacks.iter().map(|s| solve_stack(s, &o, units).unwrap().energies[0]).sum::<f64>());
            println!(
                "  200-field sweep ±30 kV/cm, {name}: solve_stack_batch wall {wall:.1} / {wall2:.1} ms ({} threads), serial {serial:.1} ms thread CPU; {} items",
                rayon::current_num_threads(),
                out.len()
            );
        }
    }
}
