//! Element meshes of one stack for the transport solvers, and the options that size them.
//!
//! The mesh covers exactly the stack [0, L] (the claddings are leads or the neighbouring
//! periods, never meshed): an element edge on every interface, layers split into equal
//! elements no longer than a length chosen from the largest wavenumber in the energy
//! range, √(m_i |E − V|/c) over every layer i and every energy in the range
//! (propagating or evanescent). About 7/k per element was measured for the bound-level
//! solver (`crate::eigen::stack`: 7.5 nm at k = 0.78/nm reached 1e-11 at order 12);
//! the solvers here then raise the order p (p vs p + 2 on the same mesh) until their
//! results agree to the requested accuracy, halving the elements past [`MAX_ORDER`].

use crate::basis::ElementBasis;
use crate::error::InputError;
use crate::model::stack::Heterostructure;

/// Highest element order before the elements are halved.
pub const MAX_ORDER: usize = 24;
/// Shortest element (nm) the sizing rule picks; halving may go below.
pub const MIN_ELEMENT: f64 = 0.25;

/// Options shared by the transport solvers.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MeshOptions {
    /// Relative accuracy of energies (and absolute accuracy of probabilities), in [1e-13, 1e-3].
    pub accuracy: f64,
    /// Starting order p (default: from the accuracy), in [2, MAX_ORDER − 2].
    pub order: Option<usize>,
    /// Longest element inside a layer (nm, > 0); the solvers shorten it for the energies
    /// they need.
    pub element_length: f64,
}

impl MeshOptions {
    pub fn new(accuracy: f64) -> Self {
        MeshOptions { accuracy, order: None, element_length: 15.0 }
    }

    /// Check the ranges (errors name the argument).
    pub fn validate(&self) -> Result<(), InputError> {
        if !(self.accuracy.is_finite() && (1e-13..=1e-3).contains(&self.accuracy)) {
            return Err(InputError::range("accuracy", "a relative accuracy in [1e-13, 1e-3]", self.accuracy));
        }
        if let Some(p) = self.order {
            if !(2..=MAX_ORDER - 2).contains(&p) {
                return Err(InputError::range("order", format!("an integer in [2, {}]", MAX_ORDER - 2), p));
            }
        }
        crate::error::check_positive("element_length", self.element_length)
    }

    /// The first order tried: about 1.2·log10(1/accuracy), even, in [6, 18], unless given.
    pub fn start_order(&self) -> usize {
        self.order.unwrap_or(((1.2 * (1.0 / self.accuracy).log10()).round() as usize).clamp(6, 18) & !1)
    }
}

/// Lowest and highest potential energy V(z) on the stack (meV), field included.
pub fn potential_range(stack: &Heterostructure) -> (f64, f64) {
    let z = stack.interfaces();
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for (i, l) in stack.layers().iter().enumerate() {
        for zz in [z[i], z[i + 1]] {
            let v = l.band_edge + stack.field_energy(zz);
            lo = lo.min(v);
            hi = hi.max(v);
        }
    }
    (lo, hi)
}

/// The element length (nm) for energies in [e_lo, e_hi]: 7/k_max with k_max the largest
/// √(m_i|E − V|/c) over the layers and energies, within [MIN_ELEMENT, max_length].
pub fn element_length_for(stack: &Heterostructure, e_lo: f64, e_hi: f64, c: f64, max_length: f64) -> f64 {
    let z = stack.interfaces();
    let mut kmax: f64 = 0.0;
    for (i, l) in stack.layers().iter().enumerate() {
        let va = l.band_edge + stack.field_energy(z[i]);
        let vb = l.band_edge + stack.field_energy(z[i + 1]);
        let gap = (e_hi - va.min(vb)).abs().max((va.max(vb) - e_lo).abs());
        kmax = kmax.max((l.mass * gap / c).sqrt());
    }
    if kmax > 0.0 {
        (7.0 / kmax).clamp(MIN_ELEMENT.min(max_length), max_length)
    } else {
        max_length
    }
}

/// Spectral elements of `order` on [0, L]: an edge on every interface and layers split
/// into equal elements no longer than `length` (nm).
pub fn stack_basis(stack: &Heterostructure, order: usize, length: f64) -> Result<ElementBasis, InputError> {
    ElementBasis::new(stack.interfaces(), order, Some(length))
}

/// Energy scale of a relative accuracy: max(|E|, E − V_min, floor), with the floor 1e-3
/// of the stack's potential range (at least 1e-6 meV), as in the bound-level solver.
pub fn energy_scale(e: f64, vmin: f64, floor: f64) -> f64 {
    e.abs().max(e - vmin).max(floor)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::stack::Layer;

    #[test]
    fn mesh_has_an_edge_on_every_interface() {
        let s = Heterostructure::new(vec![Layer::new(5.0, 300.0, 0.09), Layer::new(7.5, 0.0, 0.067), Layer::new(5.0, 300.0, 0.09)], 10.0).unwrap();
        let eb = stack_basis(&s, 8, 2.0).unwrap();
        let edges = eb.edges();
        for z in s.interfaces() {
            assert!(edges.iter().any(|e| (e - z).abs() < 1e-12), "no edge at {z}");
        }
        assert!(edges.windows(2).all(|w| w[1] - w[0] <= 2.0 + 1e-12));
        let (lo, hi) = potential_range(&s);
        // Field 10 kV/cm = 1 meV/nm, term (z − 8.75) meV: highest at the right barrier's end
        // (300 + 8.75), lowest at the well's left edge z = 5 (0 + 5 − 8.75).
        assert!((hi - 308.75).abs() < 1e-12 && (lo + 3.75).abs() < 1e-12, "{lo} {hi}");
        let l = element_length_for(&s, 0.0, 500.0, 38.1, 15.0);
        assert!(l > MIN_ELEMENT && l < 15.0);
        let mut o = MeshOptions::new(1e-10);
        assert!(o.validate().is_ok());
        assert_eq!(o.start_order(), 12);
        o.accuracy = 0.0;
        assert!(o.validate().is_err());
        o.accuracy = 1e-8;
        o.order = Some(1);
        assert!(o.validate().is_err());
    }
}
