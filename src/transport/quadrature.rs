//! Globally adaptive Gauss-Legendre quadrature of a scalar function over a line cut
//! into pieces.
//!
//! Every interval carries two estimates: the m-point Gauss-Legendre value on the whole
//! interval, W, and the sum of the values on its two halves, H (the one kept). Its error
//! estimate is |W − H|, the change from one halving; the interval with the largest
//! estimate is halved next (its halves already know their own W) until
//! Σ|W − H| ≤ max(rel·|Σ H|, abs). For an integrand analytic on the intervals the error
//! of H is far below |W − H| (an m-point Gauss rule gains about 2^{−2m} per halving), so
//! the stated tolerance is a conservative bound; an integrand with a feature narrower
//! than the cuts (an unresolved resonance) can still fool it, which is why the callers
//! cut the line at every known resonance.

use crate::basis::gll::gauss_legendre;
use crate::error::{InputError, NumericalError, Result};
use std::cmp::Ordering;
use std::collections::BinaryHeap;

/// Result of [`integrate`]: the value and the sum of the interval error estimates.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Integral {
    pub value: f64,
    pub error: f64,
    /// Number of integrand evaluations.
    pub evaluations: usize,
}

struct Piece {
    a: f64,
    b: f64,
    /// Values of the two halves.
    left: f64,
    right: f64,
    err: f64,
}

impl PartialEq for Piece {
    fn eq(&self, other: &Self) -> bool {
        self.err.total_cmp(&other.err) == Ordering::Equal
    }
}
impl Eq for Piece {}
impl PartialOrd for Piece {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}
impl Ord for Piece {
    fn cmp(&self, other: &Self) -> Ordering {
        self.err.total_cmp(&other.err)
    }
}

/// The m-point Gauss-Legendre rule, reused for every interval.
pub struct Rule {
    x: Vec<f64>,
    w: Vec<f64>,
}

impl Rule {
    /// m points (1 ≤ m ≤ 64).
    pub fn new(m: usize) -> std::result::Result<Self, InputError> {
        let (x, w) = gauss_legendre(m)?;
        Ok(Rule { x, w })
    }

    fn apply(&self, f: &mut dyn FnMut(f64) -> f64, a: f64, b: f64, count: &mut usize) -> f64 {
        let (mid, half) = (0.5 * (a + b), 0.5 * (b - a));
        *count += self.x.len();
        half * self.x.iter().zip(&self.w).map(|(x, w)| w * f(mid + half * x)).sum::<f64>()
    }
}

/// ∫ f over [edges[0], edges[last]] with every edge a cut (module docs): edges ascending,
/// finite, at least two; `rel` ≥ 0 and `abs` ≥ 0 the tolerances; at most `max_pieces`
/// intervals. Errors for bad edges, a non-finite integrand value, or a tolerance not met
/// within `max_pieces` ([`NumericalError::QuadratureNotConverged`] with the last estimates).
pub fn integrate(f: &mut dyn FnMut(f64) -> f64, edges: &[f64], rule: &Rule, rel: f64, abs: f64, max_pieces: usize) -> Result<Integral> {
    if edges.len() < 2 || edges.iter().any(|e| !e.is_finite()) || edges.windows(2).any(|w| !(w[1] > w[0])) {
        return Err(InputError::range("edges", "at least two finite, strictly increasing values", format!("{edges:?}")).into());
    }
    let mut count = 0;
    let mut heap = BinaryHeap::new();
    let make = |f: &mut dyn FnMut(f64) -> f64, a: f64, b: f64, whole: f64, count: &mut usize| -> Piece {
        let m = 0.5 * (a + b);
        let left = rule.apply(f, a, m, count);
        let right = rule.apply(f, m, b, count);
        Piece { a, b, left, right, err: (whole - (left + right)).abs() }
    };
    for w in edges.windows(2) {
        let whole = rule.apply(f, w[0], w[1], &mut count);
        heap.push(make(f, w[0], w[1], whole, &mut count));
    }
    loop {
        let (value, error) = heap.iter().fold((0.0, 0.0), |(v, e), p| (v + p.left + p.right, e + p.err));
        if !(value.is_finite() && error.is_finite()) {
            return Err(NumericalError::Diverged("the integrand is not finite on the integration range".into()).into());
        }
        if error <= (rel * value.abs()).max(abs) {
            return Ok(Integral { value, error, evaluations: count });
        }
        if heap.len() >= max_pieces {
            return Err(NumericalError::QuadratureNotConverged { pieces: heap.len(), tol: rel, value, error }.into());
        }
        let Some(worst) = heap.pop() else { break };
        let m = 0.5 * (worst.a + worst.b);
        if !(m > worst.a && m < worst.b) {
            // Cannot halve further (interval at rounding level): accept as it is.
            heap.push(Piece { err: 0.0, ..worst });
            continue;
        }
        heap.push(make(f, worst.a, m, worst.left, &mut count));
        heap.push(make(f, m, worst.b, worst.right, &mut count));
    }
    Err(NumericalError::Diverged("quadrature without intervals".into()).into())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn integrates_a_narrow_lorentzian_and_a_square_root_onset() {
        let rule = Rule::new(10).unwrap();
        // ∫_{−1}^{1} γ/(x² + γ²) dx = 2 atan(1/γ), with a cut at the peak.
        let g = 1e-6;
        let mut f = |x: f64| g / (x * x + g * g);
        let r = integrate(&mut f, &[-1.0, 0.0, 1.0], &rule, 1e-12, 0.0, 10_000).unwrap();
        let exact = 2.0 * (1.0 / g).atan();
        assert!(((r.value - exact) / exact).abs() < 1e-12, "{} vs {exact}", r.value);
        // ∫_0^1 √x dx = 2/3 (endpoint singularity: converges, slowly).
        let mut h = |x: f64| x.sqrt();
        let r = integrate(&mut h, &[0.0, 1.0], &rule, 1e-10, 0.0, 10_000).unwrap();
        assert!((r.value - 2.0 / 3.0).abs() < 1e-10);
        assert!(integrate(&mut h, &[1.0, 0.0], &rule, 1e-10, 0.0, 10).is_err());
        let mut bad = |_x: f64| f64::NAN;
        assert!(integrate(&mut bad, &[0.0, 1.0], &rule, 1e-10, 0.0, 10).is_err());
        let mut z = |_x: f64| 0.0;
        assert_eq!(integrate(&mut z, &[0.0, 1.0], &rule, 1e-10, 0.0, 10).unwrap().value, 0.0);
    }
}
