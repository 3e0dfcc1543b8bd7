//! Anderson mixing of a fixed-point iteration x = F(x) (Anderson 1965, J. ACM 12, 547;
//! in the form of Eyert 1996, J. Comput. Phys. 124, 271): the next input is the
//! combination of the last inputs and outputs that minimises the linearised residual,
//! damped by `beta`.

/// History of inputs and residuals r = F(x) − x.
pub struct Anderson {
    depth: usize,
    beta: f64,
    xs: Vec<Vec<f64>>,
    rs: Vec<Vec<f64>>,
}

impl Anderson {
    pub fn new(depth: usize, beta: f64) -> Self {
        Anderson { depth, beta, xs: Vec::new(), rs: Vec::new() }
    }

    /// Forget the history (after a change of the problem, e.g. a new Fermi level rule).
    pub fn reset(&mut self) {
        self.xs.clear();
        self.rs.clear();
    }

    /// The next input from the input `x` and its output `fx`.
    pub fn next(&mut self, x: &[f64], fx: &[f64]) -> Vec<f64> {
        let r: Vec<f64> = fx.iter().zip(x).map(|(a, b)| a - b).collect();
        self.xs.push(x.to_vec());
        self.rs.push(r.clone());
        if self.xs.len() > self.depth + 1 {
            self.xs.remove(0);
            self.rs.remove(0);
        }
        let k = self.xs.len() - 1;
        // Differences against the newest entry; solve min ‖r − Σ γ_j (r − r_j)‖ by the
        // normal equations (k ≤ depth, tiny), regularised.
        let dr: Vec<Vec<f64>> = (0..k).map(|j| r.iter().zip(&self.rs[j]).map(|(a, b)| a - b).collect()).collect();
        let dx: Vec<Vec<f64>> = (0..k).map(|j| x.iter().zip(&self.xs[j]).map(|(a, b)| a - b).collect()).collect();
        let dot = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(u, v)| u * v).sum::<f64>();
        let mut gamma = vec![0.0; k];
        if k > 0 {
            let mut m = faer::Mat::<f64>::from_fn(k, k, |i, j| dot(&dr[i], &dr[j]));
            let scale = (0..k).map(|i| m[(i, i)]).fold(0.0, f64::max).max(f64::MIN_POSITIVE);
            for i in 0..k {
                m[(i, i)] += 1e-12 * scale;
            }
            let b = faer::Mat::<f64>::from_fn(k, 1, |i, _| dot(&dr[i], &r));
            if let Ok(llt) = m.llt(faer::Side::Lower) {
                let g = faer::linalg::solvers::Solve::solve(&llt, &b);
                for i in 0..k {
                    gamma[i] = g[(i, 0)];
                }
            }
        }
        (0..x.len())
            .map(|t| {
                let mut xt = x[t] + self.beta * r[t];
                for j in 0..k {
                    xt -= gamma[j] * (dx[j][t] + self.beta * dr[j][t]);
                }
                xt
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn solves_a_linear_fixed_point_faster_than_damping() {
        // x = A x + b with A = diag(0.9, −0.8, 0.5): fixed point x* = b/(1 − a) (algebra).
        let a = [0.9, -0.8, 0.5];
        let b = [1.0, 2.0, -1.0];
        let f = |x: &[f64]| -> Vec<f64> { (0..3).map(|i| a[i] * x[i] + b[i]).collect() };
        let mut mix = Anderson::new(5, 0.5);
        let mut x = vec![0.0; 3];
        let mut it = 0;
        while it < 50 {
            let fx = f(&x);
            if (0..3).all(|i| (fx[i] - x[i]).abs() < 1e-12) {
                break;
            }
            x = mix.next(&x, &fx);
            it += 1;
        }
        for i in 0..3 {
            assert!((x[i] - b[i] / (1.0 - a[i])).abs() < 1e-10);
        }
        assert!(it < 12, "{it} iterations");
    }
}
