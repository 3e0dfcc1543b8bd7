//! Legendre spectral elements on an interval [b_0, b_m]: Lagrange polynomials of
//! order p on the Gauss-Lobatto-Legendre (GLL) nodes of every element, C0 across
//! elements, homogeneous Dirichlet conditions at both ends (Patera 1984, J. Comput.
//! Phys. 54, 468; Deville, Fischer & Mund 2002, *High-Order Methods for
//! Incompressible Fluid Flow*, ch. 2).
//!
//! ## Mesh
//! Every interval between consecutive breakpoints b_k < b_{k+1} becomes at least one
//! element; with a maximum element length the interval is split into
//! ⌈(b_{k+1} − b_k)/max⌉ equal elements. Graded meshes (e.g. barrier elements of 2,
//! 4, 8, 16 nm) are built by giving the breakpoints directly.
//!
//! ## Numbering
//! Element e (0-based, left to right) has local nodes i = 0..=p at
//! x = a_e + (ξ_i + 1)·h_e/2 (ξ_i the GLL nodes, h_e = b_e − a_e). Its local node i is
//! the global node e·p + i: neighbouring elements share their common edge node, which
//! gives C0 continuity. Of the n_el·p + 1 global nodes the two ends are removed
//! (ψ(b_0) = ψ(b_m) = 0), so the unknowns are the global nodes 1..n_el·p − 1 and
//! unknown k is global node k + 1: the dimension is n_el·p − 1. The unknowns are the
//! nodal values ψ(x_k) (Lagrange basis), so a coefficient vector is also a sample of ψ.
//! [`ElementBasis::global_index`] is the only place where this map is defined. Two
//! variants serve open and periodic structures ([`crate::basis`] users in transport):
//! * [`ElementBasis::open_index`] keeps both end nodes (natural, Neumann-type ends where
//!   leads are attached, e.g. by the quantum transmitting boundary method): unknown
//!   k = global node k, dimension n_el·p + 1;
//! * [`ElementBasis::periodic_index`] identifies the last node with the first (one
//!   period of a Bloch-periodic function, ψ(b_m) = e^{iθ}ψ(b_0)): unknown k = global
//!   node k for k < n_el·p, the last node maps to unknown 0 and is flagged so that the
//!   caller multiplies its coefficient by the Bloch phase e^{iθ}; dimension n_el·p.
//!
//! ## Sample points
//! A potential V(x) and the stiffness weight w(x) = 1/m(x) are sampled on the GLL
//! nodes of every element, n_el·(p+1) points in element order (`points()[e·(p+1) + q]`),
//! so an edge shared by two elements is sampled twice, once from each side: the two
//! end points of every element are moved one ulp inward (`f64::next_up` at a_e,
//! `f64::next_down` at b_e), so a callable with a jump at a breakpoint is evaluated on
//! the side of the element that uses the value. Elsewhere the points are exact.
//!
//! ## Weak form (see [`ElementBasis::assemble`])
//! −c d/dx (w dψ/dx) + V ψ = E ψ is discretised as the symmetric-definite pencil
//! A u = E B u,
//!   A_ij = Σ_e Σ_q (2/h_e)·c·w_q ω_q D_qi D_qj + Σ_e Σ_q (h_e/2) ω_q V_q δ_ij,
//!   B_ii = Σ_e Σ_q (h_e/2) ω_q δ_ij (GLL-lumped, diagonal, positive),
//! with ω_q the GLL weights and D_qi = ℓ_i'(ξ_q). The stiffness part is exact for w
//! polynomial of degree ≤ 1 within an element; the lumped mass is the usual GLL
//! quadrature (spectrally accurate). The BenDaniel-Duke condition (w ψ' continuous,
//! BenDaniel & Duke 1966) is the natural interface condition of this weak form: no
//! special treatment at a mass step other than a breakpoint there.
//!
//! Coordinates, c, w and V are in the caller's units (e.g. nm, ħ²/2m_e in meV·nm², 1/m
//! in 1/m_e, meV); eigenvectors are B-orthonormal, i.e. ∫ψ² dx = 1 in GLL quadrature.

use super::gll::{gauss_legendre, Gll};
use crate::error::InputError;
use faer::{Mat, MatRef};

/// Upper limit on n_el·p (memory guard for the band matrix and the sample arrays).
const MAX_UNKNOWNS: usize = 10_000_000;

/// One element [a, b] of the mesh; h = b − a > 0.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Element {
    pub a: f64,
    pub b: f64,
    pub h: f64,
}

/// A mesh of Legendre spectral elements of one order with Dirichlet ends.
#[derive(Clone, Debug, PartialEq)]
pub struct ElementBasis {
    breakpoints: Vec<f64>,
    elements: Vec<Element>,
    gll: Gll,
    /// Global node positions x_0 = b_0 < … < x_{n_el·p} = b_m (including both ends).
    nodes: Vec<f64>,
    /// Sample points, n_el·(p+1), element ends nudged one ulp inward.
    points: Vec<f64>,
    /// GLL quadrature weights (h_e/2)·ω_q of the sample points.
    weights: Vec<f64>,
}

impl ElementBasis {
    /// Mesh on the sorted `breakpoints` b_0 < … < b_m (m ≥ 1, finite) with elements of
    /// `order` p (1 ≤ p ≤ 64). `max_element_length`, if given (finite, > 0), splits each
    /// longer interval into equal elements no longer than it. The dimension
    /// n_el·p − 1 must be ≥ 1.
    pub fn new(breakpoints: &[f64], order: usize, max_element_length: Option<f64>) -> Result<Self, InputError> {
        if breakpoints.len() < 2 {
            return Err(InputError::range("breakpoints", "at least 2 values", format!("{} values", breakpoints.len())));
        }
        crate::error::check_finite("breakpoints", breakpoints)?;
        if let Some(k) = breakpoints.windows(2).position(|w| w[0] >= w[1]) {
            return Err(InputError::range(
                "breakpoints",
                "strictly increasing",
                format!("b[{k}] = {} followed by b[{}] = {}", breakpoints[k], k + 1, breakpoints[k + 1]),
            ));
        }
        if let Some(m) = max_element_length {
            crate::error::check_positive("max_element_length", m)?;
        }
        let gll = Gll::new(order)?;
        let p = order;
        let mut elements = Vec::new();
        for w in breakpoints.windows(2) {
            let (lo, hi) = (w[0], w[1]);
            let len = hi - lo;
            if len <= 0.0 || !len.is_finite() {
                return Err(InputError::range("breakpoints", "intervals of finite positive length", len));
            }
            let pieces = match max_element_length {
                // A small tolerance so that an exact multiple is not split once more by rounding.
                Some(m) => ((len / m) * (1.0 - 1e-12)).ceil().max(1.0),
                None => 1.0,
            };
            if pieces * p as f64 > MAX_UNKNOWNS as f64 || elements.len() as f64 + pieces > MAX_UNKNOWNS as f64 {
                return Err(InputError::range(
                    "max_element_length",
                    format!("large enough that elements·order <= {MAX_UNKNOWNS}"),
                    max_element_length.unwrap_or(len),
                ));
            }
            let pieces = pieces as usize;
            let step = len / pieces as f64;
            let mut a = lo;
            for k in 0..pieces {
                let b = if k + 1 == pieces { hi } else { lo + step * (k + 1) as f64 };
                elements.push(Element { a, b, h: b - a });
                a = b;
            }
        }
        let n_el = elements.len();
        if n_el * p > MAX_UNKNOWNS {
            return Err(InputError::range("order", format!("such that elements·order <= {MAX_UNKNOWNS}"), p));
        }
        if n_el * p < 2 {
            return Err(InputError::range("order", "such that elements·order >= 2 (at least one unknown)", p));
        }
        if let Some(e) = elements.iter().find(|e| e.h <= 0.0) {
            return Err(InputError::range("max_element_length", "not so small that elements collapse to zero length", e.h));
        }
        let xi = gll.nodes();
        let mut nodes = Vec::with_capacity(n_el * p + 1);
        let mut points = Vec::with_capacity(n_el * (p + 1));
        let mut weights = Vec::with_capacity(n_el * (p + 1));
        for el in &elements {
            for (q, (&xq, &wq)) in xi.iter().zip(gll.weights()).enumerate() {
                let x = if q == 0 {
                    el.a
                } else if q == p {
                    el.b
                } else {
                    el.a + (xq + 1.0) * (0.5 * el.h)
                };
                if q < p {
                    nodes.push(x);
                }
                points.push(if q == 0 {
                    el.a.next_up()
                } else if q == p {
                    el.b.next_down()
                } else {
                    x
                });
                weights.push(0.5 * el.h * wq);
            }
        }
        nodes.push(elements[n_el - 1].b);
        Ok(ElementBasis { breakpoints: breakpoints.to_vec(), elements, gll, nodes, points, weights })
    }

    /// A mesh for a layered structure: element edges on every interface (`interfaces`
    /// z_0 < … < z_n, the stack), layers split into pieces no longer than `max_length`,
    /// and claddings of depth `depth.0` to the left of z_0 and `depth.1` to the right of
    /// z_n covered by elements that double in length outwards from `first.0` (left) and
    /// `first.1` (right) (each at most max_length/2), the last one merged so that the mesh
    /// ends exactly at the depth. Graded claddings resolve every decay length from the
    /// first element outwards with a few elements (exponential tails need no more); a
    /// first element of about 1.5 decay lengths of the most strongly bound state is a
    /// good choice.
    pub fn layered(interfaces: &[f64], order: usize, max_length: f64, depth: (f64, f64), first: (f64, f64)) -> Result<Self, InputError> {
        crate::error::check_positive("max_length", max_length)?;
        crate::error::check_positive("first cladding element", first.0)?;
        crate::error::check_positive("first cladding element", first.1)?;
        crate::error::check_positive("cladding depth", depth.0)?;
        crate::error::check_positive("cladding depth", depth.1)?;
        let n = interfaces.len();
        if n < 2 {
            return Err(InputError::range("interfaces", "at least 2 values (one layer)", n));
        }
        let grade = |h0: f64, depth: f64| -> Vec<f64> {
            // Distances from the stack edge of the cladding element edges.
            let mut d = vec![0.0];
            let mut h = h0.min(depth);
            while d[d.len() - 1] + h < depth * (1.0 - 1e-12) {
                let next = d[d.len() - 1] + h;
                // Merge a last sliver into the previous element.
                if depth - next < 0.5 * h {
                    break;
                }
                d.push(next);
                h *= 2.0;
            }
            d.push(depth);
            d
        };
        let left = grade((0.5 * max_length).min(first.0), depth.0);
        let right = grade((0.5 * max_length).min(first.1), depth.1);
        let mut edges: Vec<f64> = left.iter().rev().map(|d| interfaces[0] - d).collect();
        edges.pop(); // z_0 itself comes with the layers
        for w in interfaces.windows(2) {
            let pieces = (((w[1] - w[0]) / max_length) * (1.0 - 1e-12)).ceil().max(1.0) as usize;
            for k in 0..pieces {
                edges.push(w[0] + (w[1] - w[0]) * k as f64 / pieces as f64);
            }
        }
        edges.extend(right.iter().map(|d| interfaces[n - 1] + d));
        ElementBasis::new(&edges, order, None)
    }

    /// Order p of every element.
    pub fn order(&self) -> usize {
        self.gll.order()
    }

    /// Number of unknowns n_el·p − 1 (the matrix dimension).
    pub fn size(&self) -> usize {
        self.elements.len() * self.order() - 1
    }

    /// Element edges a_0 < b_0 = a_1 < … < b_last (the breakpoints after splitting).
    pub fn edges(&self) -> Vec<f64> {
        std::iter::once(self.elements[0].a).chain(self.elements.iter().map(|e| e.b)).collect()
    }

    /// The breakpoints the mesh was built from.
    pub fn breakpoints(&self) -> &[f64] {
        &self.breakpoints
    }

    /// Elements in order, left to right.
    pub fn elements(&self) -> &[Element] {
        &self.elements
    }

    /// The reference GLL rule (nodes, weights, differentiation matrix).
    pub fn gll(&self) -> &Gll {
        &self.gll
    }

    /// All n_el·p + 1 global node positions, both Dirichlet ends included; unknown k
    /// sits at `nodes()[k + 1]`.
    pub fn nodes(&self) -> &[f64] {
        &self.nodes
    }

    /// Sample points of V and w: n_el·(p+1) values, `points()[e·(p+1) + q]` being
    /// local GLL node q of element e, element ends one ulp inside the element.
    pub fn points(&self) -> &[f64] {
        &self.points
    }

    /// GLL quadrature weights (h_e/2)·ω_q of the sample points: ∫f dx ≈ Σ_k w_k f(points_k).
    pub fn quadrature_weights(&self) -> &[f64] {
        &self.weights
    }

    /// The unknown of local node `i` of element `e`, or `None` for the two Dirichlet
    /// end nodes (or out-of-range arguments).
    pub fn global_index(&self, e: usize, i: usize) -> Option<usize> {
        let p = self.order();
        if e >= self.elements.len() || i > p {
            return None;
        }
        let g = e * p + i;
        if g == 0 || g == self.elements.len() * p {
            None
        } else {
            Some(g - 1)
        }
    }

    /// The unknown of local node `i` of element `e` with both end nodes kept (open
    /// ends): e·p + i, in 0..=n_el·p; `None` for out-of-range arguments.
    pub fn open_index(&self, e: usize, i: usize) -> Option<usize> {
        let p = self.order();
        if e >= self.elements.len() || i > p {
            return None;
        }
        Some(e * p + i)
    }

    /// The unknown of local node `i` of element `e` on one Bloch period (the last node
    /// identified with the first) and whether it is that wrapped last node, whose value
    /// is e^{iθ} times unknown 0; `None` for out-of-range arguments. Dimension n_el·p.
    pub fn periodic_index(&self, e: usize, i: usize) -> Option<(usize, bool)> {
        let p = self.order();
        if e >= self.elements.len() || i > p {
            return None;
        }
        let g = e * p + i;
        if g == self.elements.len() * p {
            Some((0, true))
        } else {
            Some((g, false))
        }
    }

    /// The element containing x: the one with a_e ≤ x < b_e, the last one at x = b_m,
    /// `None` outside [b_0, b_m] or for NaN. At an element edge this is the element to
    /// the right.
    pub fn locate(&self, x: f64) -> Option<usize> {
        let n_el = self.elements.len();
        let (lo, hi) = (self.elements[0].a, self.elements[n_el - 1].b);
        if !(x >= lo && x <= hi) {
            return None;
        }
        let e = self.elements.partition_point(|el| el.a <= x);
        Some(e.saturating_sub(1).min(n_el - 1))
    }

    /// GLL quadrature of a function sampled on [`ElementBasis::points`].
    pub fn integrate(&self, samples: &[f64]) -> Result<f64, InputError> {
        if samples.len() != self.points.len() {
            return Err(InputError::Length { argument: "samples".into(), expected: self.points.len(), got: samples.len() });
        }
        Ok(samples.iter().zip(&self.weights).map(|(f, w)| f * w).sum())
    }

    /// Points and weights of an m-point Gauss-Legendre rule on every element (exact for
    /// polynomials of degree 2m − 1 per element; e.g. m = p + 2 integrates ψ_i x ψ_j
    /// exactly for a dipole). Points are interior to the elements, in element order.
    pub fn gauss_rule(&self, points_per_element: usize) -> Result<(Vec<f64>, Vec<f64>), InputError> {
        let (xi, wi) = gauss_legendre(points_per_element)?;
        let mut x = Vec::with_capacity(self.elements.len() * xi.len());
        let mut w = Vec::with_capacity(x.capacity());
        for el in &self.elements {
            for (t, wt) in xi.iter().zip(&wi) {
                x.push(el.a + (t + 1.0) * (0.5 * el.h));
                w.push(0.5 * el.h * wt);
            }
        }
        Ok((x, w))
    }

    /// The diagonal of the lumped mass matrix B (length [`ElementBasis::size`]).
    pub fn mass_diagonal(&self) -> Vec<f64> {
        let p = self.order();
        let mut b = vec![0.0; self.size()];
        for e in 0..self.elements.len() {
            for q in 0..=p {
                if let Some(g) = self.global_index(e, q) {
                    b[g] += self.weights[e * (p + 1) + q];
                }
            }
        }
        b
    }

    /// Values ψ_j(x_i) (or ψ_j'(x_i) when `derivative`) of the states whose coefficient
    /// vectors are the columns of `coefs` (rows = [`ElementBasis::size`]), as an
    /// `x.len() × coefs.ncols()` matrix. 0 outside [b_0, b_m]; at an element edge the
    /// element to the right is used (so ψ' there is the right-sided derivative, the
    /// left-sided one at b_m). Exact nodal values at the nodes.
    fn eval(&self, coefs: MatRef<'_, f64>, x: &[f64], derivative: bool) -> Result<Mat<f64>, InputError> {
        if coefs.nrows() != self.size() {
            return Err(InputError::Length { argument: "coefs".into(), expected: self.size(), got: coefs.nrows() });
        }
        crate::error::check_finite("x", x)?;
        let p = self.order();
        let k = coefs.ncols();
        let mut out = Mat::<f64>::zeros(x.len(), k);
        let mut l = vec![0.0; p + 1];
        let mut dl = vec![0.0; p + 1];
        for (r, &xr) in x.iter().enumerate() {
            let Some(e) = self.locate(xr) else { continue };
            let el = self.elements[e];
            let xi = if xr == el.a {
                -1.0
            } else if xr == el.b {
                1.0
            } else {
                2.0 * (xr - el.a) / el.h - 1.0
            };
            let scale = if derivative {
                self.gll.lagrange_with_derivative(xi, &mut l, &mut dl);
                2.0 / el.h
            } else {
                self.gll.lagrange(xi, &mut l);
                1.0
            };
            let basis = if derivative { &dl } else { &l };
            for (i, &bi) in basis.iter().enumerate() {
                let Some(g) = self.global_index(e, i) else { continue };
                let f = scale * bi;
                if f == 0.0 {
                    continue;
                }
                for j in 0..k {
                    out[(r, j)] += f * coefs[(g, j)];
                }
            }
        }
        Ok(out)
    }

    /// ψ_j(x_i) for the coefficient columns of `coefs` (see the module docs); 0 outside
    /// [b_0, b_m]. Errors on a wrong number of rows or non-finite x.
    pub fn evaluate(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError> {
        self.eval(coefs, x, false)
    }

    /// ψ_j'(x_i); at an element edge the right element's derivative (the left one's at
    /// b_m); 0 outside [b_0, b_m].
    pub fn evaluate_derivative(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError> {
        self.eval(coefs, x, true)
    }
}

impl super::Basis for ElementBasis {
    fn size(&self) -> usize {
        ElementBasis::size(self)
    }
    /// The GLL nodes of every element, ends nudged inward (see the module docs).
    fn points(&self) -> &[f64] {
        ElementBasis::points(self)
    }
    /// ψ(x) from the nodal coefficients; 0 outside [b_0, b_m].
    fn evaluate(&self, coefs: MatRef<'_, f64>, x: &[f64]) -> Result<Mat<f64>, InputError> {
        ElementBasis::evaluate(self, coefs, x)
    }
    /// The coefficients are the nodal values ψ(x_k) themselves.
    fn sample_sign_profile(&self, coefs: MatRef<'_, f64>) -> Mat<f64> {
        coefs.to_owned()
    }
    fn describe(&self) -> String {
        let (a, b) = (self.breakpoints[0], self.breakpoints[self.breakpoints.len() - 1]);
        format!("ElementBasis(elements={}, order={}, interval=[{a:.6}, {b:.6}], unknowns={})", self.elements.len(), self.order(), self.size())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mesh_numbering_points_and_quadrature() {
        let eb = ElementBasis::new(&[-1.0, 0.0, 3.0], 4, Some(1.0)).unwrap();
        assert_eq!(eb.elements().len(), 4);
        assert_eq!(eb.size(), 4 * 4 - 1);
        assert_eq!(eb.nodes().len(), 17);
        assert_eq!(eb.points().len(), 20);
        assert_eq!(eb.global_index(0, 0), None);
        assert_eq!(eb.global_index(0, 4), Some(3));
        assert_eq!(eb.global_index(1, 0), Some(3));
        assert_eq!(eb.global_index(3, 4), None);
        assert_eq!(eb.open_index(0, 0), Some(0));
        assert_eq!(eb.open_index(3, 4), Some(16));
        assert_eq!(eb.open_index(4, 0), None);
        assert_eq!(eb.periodic_index(0, 0), Some((0, false)));
        assert_eq!(eb.periodic_index(1, 0), Some((4, false)));
        assert_eq!(eb.periodic_index(3, 3), Some((15, false)));
        assert_eq!(eb.periodic_index(3, 4), Some((0, true)));
        assert_eq!(eb.periodic_index(0, 5), None);
        assert_eq!(eb.elements()[1].a, 0.0);
        assert_eq!(eb.elements()[3].b, 3.0);
        // Nudged ends: inside their element, one ulp away.
        assert_eq!(eb.points()[5], 0.0_f64.next_up());
        assert_eq!(eb.points()[4], 0.0_f64.next_down());
        // ∫_{−1}^{3} x² dx = 28/3 (GLL exact to degree 7 per element).
        let f: Vec<f64> = eb.points().iter().map(|x| x * x).collect();
        assert!((eb.integrate(&f).unwrap() - 28.0 / 3.0).abs() < 1e-13);
        let (x, w) = eb.gauss_rule(6).unwrap();
        let q: f64 = x.iter().zip(&w).map(|(x, w)| w * x.powi(11)).sum();
        assert!((q - (3.0_f64.powi(12) - 1.0) / 12.0).abs() < 1e-9);
        assert!(eb.mass_diagonal().iter().all(|b| *b > 0.0));
        assert_eq!(eb.locate(0.0), Some(1));
        assert_eq!(eb.locate(3.0), Some(3));
        assert_eq!(eb.locate(3.1), None);
        // Exact multiples of the maximum length are not split once more.
        assert_eq!(ElementBasis::new(&[0.0, 10.0], 3, Some(2.0)).unwrap().elements().len(), 5);
    }

    #[test]
    fn bad_input_is_an_error() {
        assert!(ElementBasis::new(&[0.0], 4, None).is_err());
        assert!(ElementBasis::new(&[0.0, 0.0], 4, None).is_err());
        assert!(ElementBasis::new(&[1.0, 0.0], 4, None).is_err());
        assert!(ElementBasis::new(&[0.0, f64::NAN], 4, None).is_err());
        assert!(ElementBasis::new(&[0.0, 1.0], 0, None).is_err());
        assert!(ElementBasis::new(&[0.0, 1.0], 65, None).is_err());
        assert!(ElementBasis::new(&[0.0, 1.0], 1, None).is_err());
        assert!(ElementBasis::new(&[0.0, 1.0], 4, Some(0.0)).is_err());
        assert!(ElementBasis::new(&[0.0, 1.0], 4, Some(1e-12)).is_err());
        let eb = ElementBasis::new(&[0.0, 1.0], 4, None).unwrap();
        assert!(eb.evaluate(Mat::<f64>::zeros(2, 1).as_ref(), &[0.5]).is_err());
        assert!(eb.evaluate(Mat::<f64>::zeros(3, 1).as_ref(), &[f64::NAN]).is_err());
    }

    #[test]
    fn evaluation_reproduces_a_polynomial_and_its_derivative() {
        // Nodal coefficients of f(x) = (x − 0)(2 − x)(1 + x²) (zero at both ends, degree 4)
        // are reproduced exactly by order ≥ 4 elements, as is f'.
        let eb = ElementBasis::new(&[0.0, 0.7, 2.0], 5, None).unwrap();
        let f = |x: f64| x * (2.0 - x) * (1.0 + x * x);
        let df = |x: f64| (2.0 - 2.0 * x) * (1.0 + x * x) + x * (2.0 - x) * 2.0 * x;
        let n = eb.size();
        let c = Mat::from_fn(n, 1, |k, _| f(eb.nodes()[k + 1]));
        let xs: Vec<f64> = (0..=40).map(|i| i as f64 * 0.05).chain([0.7, -0.1, 2.5]).collect();
        let v = eb.evaluate(c.as_ref(), &xs).unwrap();
        let dv = eb.evaluate_derivative(c.as_ref(), &xs).unwrap();
        for (i, &x) in xs.iter().enumerate() {
            let (fe, de) = if (0.0..=2.0).contains(&x) { (f(x), df(x)) } else { (0.0, 0.0) };
            assert!((v[(i, 0)] - fe).abs() < 1e-13, "x={x}");
            assert!((dv[(i, 0)] - de).abs() < 1e-12, "x={x}: {} vs {de}", dv[(i, 0)]);
        }
    }
}
