//! Gauss-Lobatto-Legendre (GLL) and Gauss-Legendre quadrature on [−1, 1], and the
//! Lagrange interpolation basis on the GLL nodes (the shape functions of the
//! Legendre spectral elements in [`super::elements`]).
//!
//! * GLL rule of order p: the p + 1 nodes −1 = x_0 < x_1 < … < x_p = 1 are the zeros
//!   of (1 − x²) P'_p(x); the weights are ω_j = 2 / (p(p+1) P_p(x_j)²); the rule is
//!   exact for polynomials of degree ≤ 2p − 1 (Abramowitz & Stegun 1964, 25.4.32,
//!   Lobatto integration; equation number recalled from memory).
//! * Gauss-Legendre rule with n nodes: zeros of P_n, weights 2 / ((1 − x²) P'_n(x)²),
//!   exact for degree ≤ 2n − 1 (Abramowitz & Stegun 1964, 25.4.29).
//! * Lagrange basis ℓ_j (ℓ_j(x_i) = δ_ij): barycentric weights
//!   λ_j = 1 / Π_{k≠j}(x_j − x_k) and the first ("modified Lagrange") barycentric form
//!   ℓ_j(x) = λ_j Π_{k≠j}(x − x_k) (Berrut & Trefethen 2004, SIAM Rev. 46, eq. 3.2;
//!   Higham 2004 for its backward stability), evaluated with prefix/suffix products so
//!   that ℓ_j and ℓ_j' for all j cost O(p) per point and no division by x − x_k occurs
//!   (stable arbitrarily close to a node). At a node the values are returned exactly:
//!   δ_ij and the rows of the differentiation matrix.
//! * Differentiation matrix D_ij = ℓ_j'(x_i) = (λ_j/λ_i)/(x_i − x_j) for i ≠ j, and
//!   D_ii = −Σ_{j≠i} D_ij (the "negative sum trick", Baltensperger & Trummer 2003, SIAM
//!   J. Sci. Comput. 24, 1465), so D applied to a constant is exactly zero.

use crate::error::InputError;

/// Largest supported GLL order (Newton from the Chebyshev start converges to
/// machine precision well beyond it; the barycentric weights stay far inside f64).
pub const MAX_ORDER: usize = 64;

/// Legendre P_n(x) and P_{n−1}(x) by the three-term recurrence
/// (k+1) P_{k+1} = (2k+1) x P_k − k P_{k−1} (Abramowitz & Stegun 1964, 22.7.10).
/// For n = 0 the second value is 0.
pub fn legendre_pair(n: usize, x: f64) -> (f64, f64) {
    if n == 0 {
        return (1.0, 0.0);
    }
    let (mut prev, mut cur) = (1.0, x);
    for k in 1..n {
        let kf = k as f64;
        let next = ((2.0 * kf + 1.0) * x * cur - kf * prev) / (kf + 1.0);
        prev = cur;
        cur = next;
    }
    (cur, prev)
}

/// The Gauss-Lobatto-Legendre rule of order p and its Lagrange interpolation basis.
#[derive(Clone, Debug, PartialEq)]
pub struct Gll {
    order: usize,
    nodes: Vec<f64>,
    weights: Vec<f64>,
    /// Barycentric weights λ_j = 1/Π_{k≠j}(x_j − x_k) (unscaled).
    bary: Vec<f64>,
    /// D[i*(p+1) + j] = ℓ_j'(x_i), row-major.
    diff: Vec<f64>,
}

impl Gll {
    /// The GLL rule of order `order` (p + 1 nodes), 1 ≤ p ≤ [`MAX_ORDER`].
    pub fn new(order: usize) -> Result<Self, InputError> {
        if !(1..=MAX_ORDER).contains(&order) {
            return Err(InputError::range("order", format!("an integer in 1..={MAX_ORDER}"), order));
        }
        let p = order;
        let nodes = gll_nodes(p);
        let pf = p as f64;
        let weights: Vec<f64> = nodes
            .iter()
            .map(|&x| {
                let (pp, _) = legendre_pair(p, x);
                2.0 / (pf * (pf + 1.0) * pp * pp)
            })
            .collect();
        let bary: Vec<f64> = (0..=p)
            .map(|j| 1.0 / (0..=p).filter(|&k| k != j).map(|k| nodes[j] - nodes[k]).product::<f64>())
            .collect();
        let m = p + 1;
        let mut diff = vec![0.0; m * m];
        for i in 0..m {
            let mut sum = 0.0;
            for j in 0..m {
                if j != i {
                    let d = (bary[j] / bary[i]) / (nodes[i] - nodes[j]);
                    diff[i * m + j] = d;
                    sum += d;
                }
            }
            diff[i * m + i] = -sum;
        }
        Ok(Gll { order: p, nodes, weights, bary, diff })
    }

    /// Order p (the rule has p + 1 nodes).
    pub fn order(&self) -> usize {
        self.order
    }

    /// Nodes x_0 = −1 < … < x_p = 1 (exactly antisymmetric: x_{p−j} = −x_j).
    pub fn nodes(&self) -> &[f64] {
        &self.nodes
    }

    /// Weights ω_j (positive, symmetric, Σ ω_j = 2).
    pub fn weights(&self) -> &[f64] {
        &self.weights
    }

    /// Barycentric weights λ_j = 1 / Π_{k≠j}(x_j − x_k).
    pub fn barycentric_weights(&self) -> &[f64] {
        &self.bary
    }

    /// Differentiation matrix, row-major (p+1)×(p+1): `d[i*(p+1) + j]` = ℓ_j'(x_i).
    pub fn differentiation(&self) -> &[f64] {
        &self.diff
    }

    /// ℓ_j'(x_i).
    pub fn d(&self, i: usize, j: usize) -> f64 {
        self.diff[i * (self.order + 1) + j]
    }

    /// ℓ_j(x) for all j into `values` (length p + 1); x need not lie in [−1, 1].
    /// Exact (δ_ij) when x is a node.
    pub fn lagrange(&self, x: f64, values: &mut [f64]) {
        self.lagrange_impl(x, values, None);
    }

    /// ℓ_j(x) into `values` and ℓ_j'(x) into `derivs` (both length p + 1).
    /// At a node x_i the derivatives are the row i of the differentiation matrix.
    pub fn lagrange_with_derivative(&self, x: f64, values: &mut [f64], derivs: &mut [f64]) {
        self.lagrange_impl(x, values, Some(derivs));
    }

    fn lagrange_impl(&self, x: f64, values: &mut [f64], derivs: Option<&mut [f64]>) {
        let m = self.order + 1;
        if let Some(i) = self.nodes.iter().position(|&xn| xn == x) {
            for (j, v) in values.iter_mut().enumerate().take(m) {
                *v = if j == i { 1.0 } else { 0.0 };
            }
            if let Some(dv) = derivs {
                dv[..m].copy_from_slice(&self.diff[i * m..(i + 1) * m]);
            }
            return;
        }
        // prefix P_j = Π_{k<j} (x − x_k) and its derivative, then sweep the suffix:
        // ℓ_j = λ_j P_j S_{j+1}, ℓ_j' = λ_j (P_j' S_{j+1} + P_j S_{j+1}').
        // `values` holds P_j, `derivs` P_j' during the first sweep.
        let mut pre = 1.0;
        let mut dpre = 0.0;
        match derivs {
            None => {
                for (v, &xn) in values.iter_mut().zip(&self.nodes) {
                    *v = pre;
                    pre *= x - xn;
                }
                let mut suf = 1.0;
                for j in (0..m).rev() {
                    values[j] = self.bary[j] * values[j] * suf;
                    suf *= x - self.nodes[j];
                }
            }
            Some(dv) => {
                for j in 0..m {
                    values[j] = pre;
                    dv[j] = dpre;
                    let t = x - self.nodes[j];
                    dpre = dpre * t + pre;
                    pre *= t;
                }
                let (mut suf, mut dsuf) = (1.0, 0.0);
                for j in (0..m).rev() {
                    let (pj, dpj) = (values[j], dv[j]);
                    values[j] = self.bary[j] * pj * suf;
                    dv[j] = self.bary[j] * (dpj * suf + pj * dsuf);
                    let t = x - self.nodes[j];
                    dsuf = dsuf * t + suf;
                    suf *= t;
                }
            }
        }
    }
}

/// Zeros of f(x) = (1 − x²) P'_p(x) = p (P_{p−1}(x) − x P_p(x)) by Newton's method from
/// the Chebyshev-Gauss-Lobatto points −cos(πj/p). f'(x) = −p(p+1) P_p(x) (Legendre's
/// equation), so the step is δ = (P_{p−1} − x P_p) / ((p+1) P_p). The left half is
/// computed and mirrored, so the nodes are exactly antisymmetric and x_{p/2} = 0 for
/// even p.
fn gll_nodes(p: usize) -> Vec<f64> {
    let mut x = vec![0.0; p + 1];
    x[0] = -1.0;
    x[p] = 1.0;
    let pf = p as f64;
    for j in 1..p.div_ceil(2) {
        let mut xj = -(std::f64::consts::PI * j as f64 / pf).cos();
        for _ in 0..100 {
            let (pp, pm) = legendre_pair(p, xj);
            let step = (pm - xj * pp) / ((pf + 1.0) * pp);
            xj += step;
            if step.abs() <= 2.0 * f64::EPSILON {
                break;
            }
        }
        // One more step at convergence (quadratic: the last one is below rounding).
        let (pp, pm) = legendre_pair(p, xj);
        xj += (pm - xj * pp) / ((pf + 1.0) * pp);
        x[j] = xj;
        x[p - j] = -xj;
    }
    if p.is_multiple_of(2) {
        x[p / 2] = 0.0;
    }
    x
}

/// Gauss-Legendre nodes (ascending) and weights of the n-point rule, 1 ≤ n ≤ 1024:
/// Newton on P_n from Tricomi's start cos(π(i − 1/4)/(n + 1/2)), mirrored for exact
/// symmetry; weights 2 / ((1 − x²) P'_n(x)²) with P'_n = n (x P_n − P_{n−1}) / (x² − 1).
pub fn gauss_legendre(n: usize) -> Result<(Vec<f64>, Vec<f64>), InputError> {
    if !(1..=1024).contains(&n) {
        return Err(InputError::range("points", "an integer in 1..=1024", n));
    }
    let nf = n as f64;
    let mut x = vec![0.0; n];
    let mut w = vec![0.0; n];
    let deriv = |t: f64| {
        let (pn, pm) = legendre_pair(n, t);
        (pn, nf * (t * pn - pm) / (t * t - 1.0))
    };
    for i in 0..n / 2 {
        // i-th node from the left (negative).
        let mut t = -(std::f64::consts::PI * (i as f64 + 0.75) / (nf + 0.5)).cos();
        for _ in 0..100 {
            let (pn, dp) = deriv(t);
            let step = pn / dp;
            t -= step;
            if step.abs() <= 2.0 * f64::EPSILON {
                break;
            }
        }
        let (pn, dp) = deriv(t);
        t -= pn / dp;
        let (_, dp) = deriv(t);
        let wi = 2.0 / ((1.0 - t * t) * dp * dp);
        x[i] = t;
        x[n - 1 - i] = -t;
        w[i] = wi;
        w[n - 1 - i] = wi;
    }
    if n % 2 == 1 {
        let (_, dp) = deriv(0.0);
        x[n / 2] = 0.0;
        w[n / 2] = 2.0 / (dp * dp);
    }
    Ok((x, w))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f64, b: f64, tol: f64) -> bool {
        (a - b).abs() <= tol * b.abs().max(1.0)
    }

    #[test]
    fn closed_form_nodes_and_weights() {
        // Zeros of P'_p in closed form: P'_2 = 3x; P'_3 = (15x² − 3)/2 → x² = 1/5;
        // P'_4 = (35x³ − 15x)/2 → x² = 3/7; P'_5 ∝ 21x⁴ − 14x² + 1 → x² = (7 ∓ 2√7)/21.
        // Weights: the Lobatto table of Abramowitz & Stegun 1964, Table 25.6 (values
        // 1/3, 4/3; 1/6, 5/6; 1/10, 49/90, 32/45; 1/15, (14 ∓ √7)/30, recalled from memory
        // and re-derived by hand from 2/(p(p+1)P_p(x_j)²) with the closed-form nodes).
        let s7 = 7.0_f64.sqrt();
        let cases: Vec<(usize, Vec<f64>, Vec<f64>)> = vec![
            (1, vec![-1.0, 1.0], vec![1.0, 1.0]),
            (2, vec![-1.0, 0.0, 1.0], vec![1.0 / 3.0, 4.0 / 3.0, 1.0 / 3.0]),
            (3, vec![-1.0, -(0.2_f64).sqrt(), (0.2_f64).sqrt(), 1.0], vec![1.0 / 6.0, 5.0 / 6.0, 5.0 / 6.0, 1.0 / 6.0]),
            (
                4,
                vec![-1.0, -(3.0_f64 / 7.0).sqrt(), 0.0, (3.0_f64 / 7.0).sqrt(), 1.0],
                vec![0.1, 49.0 / 90.0, 32.0 / 45.0, 49.0 / 90.0, 0.1],
            ),
            (
                5,
                {
                    let a = ((7.0 + 2.0 * s7) / 21.0).sqrt();
                    let b = ((7.0 - 2.0 * s7) / 21.0).sqrt();
                    vec![-1.0, -a, -b, b, a, 1.0]
                },
                {
                    let wa = (14.0 - s7) / 30.0;
                    let wb = (14.0 + s7) / 30.0;
                    vec![1.0 / 15.0, wa, wb, wb, wa, 1.0 / 15.0]
                },
            ),
        ];
        for (p, xs, ws) in cases {
            let g = Gll::new(p).unwrap();
            for j in 0..=p {
                assert!(close(g.nodes()[j], xs[j], 2e-16), "p={p} node {j}: {} vs {}", g.nodes()[j], xs[j]);
                assert!(close(g.weights()[j], ws[j], 4e-16), "p={p} weight {j}: {} vs {}", g.weights()[j], ws[j]);
            }
        }
    }

    #[test]
    fn gll_exact_to_degree_2p_minus_1_and_not_2p() {
        // ∫_{−1}^{1} x^k dx = 2/(k+1) for even k, 0 for odd k.
        for p in [1, 2, 3, 5, 8, 12, 16, 24, 32, 48, 64] {
            let g = Gll::new(p).unwrap();
            for k in 0..2 * p {
                let q: f64 = g.nodes().iter().zip(g.weights()).map(|(x, w)| w * x.powi(k as i32)).sum();
                let exact = if k % 2 == 0 { 2.0 / (k as f64 + 1.0) } else { 0.0 };
                assert!((q - exact).abs() < 1e-14, "p={p} k={k}: {q} vs {exact}");
            }
        }
        // Degree 2p is integrated with the Lobatto remainder (A&S 1964, 25.4.32, with
        // n = p + 1 points; recalled from memory and checked by hand at p = 1, where it
        // is the trapezoid rule's −4/3 for x²): ∫x^{2p} − Q = E with
        // E = −(p+1) p³ 2^{2p+1} ((p−1)!)⁴ / ((2p+1) ((2p)!)²).
        for p in 1..=10usize {
            let g = Gll::new(p).unwrap();
            let k = 2 * p;
            let q: f64 = g.nodes().iter().zip(g.weights()).map(|(x, w)| w * x.powi(k as i32)).sum();
            let fact = |m: usize| (1..=m).map(|i| i as f64).product::<f64>();
            let pf = p as f64;
            let e = -(pf + 1.0) * pf.powi(3) * 2f64.powi(2 * p as i32 + 1) * fact(p - 1).powi(4) / ((2.0 * pf + 1.0) * fact(2 * p).powi(2));
            let defect = 2.0 / (k as f64 + 1.0) - q;
            assert!((defect - e).abs() <= 1e-14 + 1e-10 * e.abs(), "p={p}: {defect:e} vs {e:e}");
        }
    }

    #[test]
    fn nodes_are_zeros_of_one_minus_x2_dp() {
        // p (P_{p−1} − x P_p) = (1 − x²) P'_p, evaluated independently of the Newton iterate.
        for p in [7, 20, 64] {
            let g = Gll::new(p).unwrap();
            for &x in g.nodes() {
                let (pp, pm) = legendre_pair(p, x);
                assert!((pm - x * pp).abs() < 1e-14, "p={p} x={x}");
            }
            assert!(g.nodes().windows(2).all(|w| w[0] < w[1]));
        }
    }

    #[test]
    fn differentiation_exact_on_monomials() {
        for p in [1, 2, 4, 9, 16, 32] {
            let g = Gll::new(p).unwrap();
            let m = p + 1;
            for k in 0..=p {
                for i in 0..m {
                    let xi = g.nodes()[i];
                    let du: f64 = (0..m).map(|j| g.d(i, j) * g.nodes()[j].powi(k as i32)).sum();
                    let exact = if k == 0 { 0.0 } else { k as f64 * xi.powi(k as i32 - 1) };
                    // D's entries grow like p²; cancellation costs about p² ε.
                    assert!((du - exact).abs() < 1e-15 * (m * m) as f64 * exact.abs().max(1.0), "p={p} k={k} i={i}: {du} vs {exact}");
                }
            }
        }
    }

    #[test]
    fn gll_corner_entries_of_d() {
        // D_00 = −p(p+1)/4, D_pp = p(p+1)/4 (Canuto, Hussaini, Quarteroni & Zang 2006,
        // eq. 2.4.34, recalled from memory).
        for p in [2, 6, 15] {
            let g = Gll::new(p).unwrap();
            let c = (p * (p + 1)) as f64 / 4.0;
            assert!(close(g.d(0, 0), -c, 1e-13));
            assert!(close(g.d(p, p), c, 1e-13));
        }
    }

    #[test]
    fn lagrange_interpolates_polynomials_and_their_derivatives() {
        let p = 10;
        let g = Gll::new(p).unwrap();
        let m = p + 1;
        let f = |x: f64| 1.0 - 2.0 * x + 0.5 * x.powi(3) - x.powi(7) + 0.25 * x.powi(10);
        let df = |x: f64| -2.0 + 1.5 * x * x - 7.0 * x.powi(6) + 2.5 * x.powi(9);
        let c: Vec<f64> = g.nodes().iter().map(|&x| f(x)).collect();
        let mut v = vec![0.0; m];
        let mut d = vec![0.0; m];
        // Points including ones within a few ulps of nodes and outside [−1, 1].
        let mut xs: Vec<f64> = (0..=200).map(|i| -1.0 + i as f64 * 0.01).collect();
        for &xn in g.nodes() {
            xs.push(xn);
            xs.push(xn.next_up());
            xs.push(xn.next_down());
            xs.push(xn + 1e-9);
        }
        xs.push(1.1);
        xs.push(-1.05);
        for &x in &xs {
            g.lagrange_with_derivative(x, &mut v, &mut d);
            let u: f64 = v.iter().zip(&c).map(|(a, b)| a * b).sum();
            let du: f64 = d.iter().zip(&c).map(|(a, b)| a * b).sum();
            assert!((u - f(x)).abs() < 1e-13, "x={x}: {u} vs {}", f(x));
            assert!((du - df(x)).abs() < 1e-11, "x={x}: {du} vs {}", df(x));
            let mut v2 = vec![0.0; m];
            g.lagrange(x, &mut v2);
            assert_eq!(v, v2);
        }
        // Exact at nodes.
        for (i, &xn) in g.nodes().iter().enumerate() {
            g.lagrange(xn, &mut v);
            for (j, &vj) in v.iter().enumerate() {
                assert_eq!(vj, if i == j { 1.0 } else { 0.0 });
            }
        }
    }

    #[test]
    fn gauss_legendre_closed_forms_and_exactness() {
        // n = 2: ±1/√3, weights 1; n = 3: 0, ±√(3/5), weights 8/9, 5/9 (zeros of
        // P_2 = (3x² − 1)/2 and P_3 = (5x³ − 3x)/2; weights A&S 1964 Table 25.4).
        let (x, w) = gauss_legendre(2).unwrap();
        assert!(close(x[1], 1.0 / 3.0_f64.sqrt(), 2e-16) && close(w[0], 1.0, 1e-15), "{x:?} {w:?}");
        let (x, w) = gauss_legendre(3).unwrap();
        assert!(close(x[2], 0.6_f64.sqrt(), 2e-16) && x[1] == 0.0);
        assert!(close(w[1], 8.0 / 9.0, 1e-15) && close(w[0], 5.0 / 9.0, 1e-15), "{w:?}");
        for n in [1, 4, 7, 16, 33, 100] {
            let (x, w) = gauss_legendre(n).unwrap();
            for k in 0..2 * n {
                let q: f64 = x.iter().zip(&w).map(|(x, w)| w * x.powi(k as i32)).sum();
                let exact = if k % 2 == 0 { 2.0 / (k as f64 + 1.0) } else { 0.0 };
                assert!((q - exact).abs() < 2e-14, "n={n} k={k}: {q} vs {exact}");
            }
        }
    }

    #[test]
    fn rejects_bad_orders() {
        assert!(Gll::new(0).is_err());
        assert!(Gll::new(65).is_err());
        assert!(gauss_legendre(0).is_err());
    }
}
