//! The one pseudo-random generator of the crate: xoshiro256++ (Blackman & Vigna
//! 2021) from `rand_xoshiro`, seeded through SplitMix64 (`seed_from_u64`).
//!
//! Random numbers only start iterations (LOBPCG blocks, inverse-iteration vectors,
//! imaginary-time states, backward-error probes); results never depend on them
//! beyond the solver tolerance, and every stream is deterministic for a seed.

use rand_xoshiro::rand_core::{Rng as _, SeedableRng};
use rand_xoshiro::Xoshiro256PlusPlus;

/// A deterministic stream of uniform and normal deviates.
pub struct Rng(Xoshiro256PlusPlus);

impl Rng {
    /// The stream of `seed`.
    pub fn new(seed: u64) -> Self {
        Rng(Xoshiro256PlusPlus::seed_from_u64(seed))
    }

    /// Stream number `stream` of `seed`: independent streams for, e.g., the columns
    /// of a start block (the pair is mixed by SplitMix64 inside `seed_from_u64`).
    pub fn stream(seed: u64, stream: u64) -> Self {
        Self::new(seed ^ stream.wrapping_mul(0xD1B5_4A32_D192_ED03).wrapping_add(0x2545_F491_4F6C_DD1D))
    }

    /// Uniform in [0, 1) with 53 random bits.
    pub fn uniform(&mut self) -> f64 {
        (self.0.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
    }

    /// Uniform in [−1, 1).
    pub fn symmetric(&mut self) -> f64 {
        2.0 * self.uniform() - 1.0
    }

    /// Standard normal deviate (Box-Muller).
    pub fn normal(&mut self) -> f64 {
        let u1 = self.uniform().max(f64::MIN_POSITIVE);
        let u2 = self.uniform();
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }

    /// Fill `out` with uniform deviates in [−1, 1).
    pub fn fill_symmetric(&mut self, out: &mut [f64]) {
        out.iter_mut().for_each(|v| *v = self.symmetric());
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn deterministic_and_in_range() {
        let a: Vec<f64> = { let mut r = Rng::new(7); (0..1000).map(|_| r.uniform()).collect() };
        let b: Vec<f64> = { let mut r = Rng::new(7); (0..1000).map(|_| r.uniform()).collect() };
        assert_eq!(a, b);
        assert!(a.iter().all(|&x| (0.0..1.0).contains(&x)));
        let mut s = Rng::stream(7, 1);
        assert!((0..100).map(|_| s.uniform()).zip(&a).any(|(x, y)| x != *y));
    }

    #[test]
    fn normal_moments() {
        // Sample mean 0 and variance 1 within 5 standard errors for 2e5 draws.
        let mut r = Rng::new(1);
        let n = 200_000;
        let xs: Vec<f64> = (0..n).map(|_| r.normal()).collect();
        let mean = xs.iter().sum::<f64>() / n as f64;
        let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / n as f64;
        assert!(mean.abs() < 5.0 / (n as f64).sqrt());
        assert!((var - 1.0).abs() < 5.0 * (2.0 / n as f64).sqrt());
    }
}
