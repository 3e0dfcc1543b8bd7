//! Lowest states by imaginary-time propagation: Strang steps in τ with Gram-Schmidt,
//! then a Rayleigh-Ritz step in the span of the states (through the library's dense
//! eigensolver).

use num_complex::Complex64;
use rayon::prelude::*;

use super::{Kick, SplitStep};
use crate::error::{check_memory, check_positive, InputError, NumericalError, Result};
use crate::linalg::rng::Rng;
use crate::problem::fourier::kinetic_apply;
use crate::problem::Kinetic;
use super::kernels::sum_sq;

/// Grid size from which `ground_states` propagates its states in parallel (one task = one
/// whole Strang step of one state, coarse enough to pay for the fork/join).
const GS_PAR_MIN_N: usize = 4096;
/// Imaginary-time steps between two convergence checks of [`SplitStep::ground_states`].
const CHECK_EVERY: usize = 10;

/// Result of [`SplitStep::ground_states`].
#[derive(Debug, Clone, PartialEq)]
pub struct GroundStates {
    /// Grid size (row length of `states`).
    pub n: usize,
    /// Energies in ascending order (Ritz values of the converged subspace).
    pub energies: Vec<f64>,
    /// States, count × n row-major, Σ|ψ|² dx = 1, real, and positive at the leftmost
    /// sample where |ψ| exceeds 1 % of its maximum.
    pub states: Vec<Complex64>,
    /// Imaginary-time steps taken.
    pub steps: usize,
    /// |dE/dτ| of every state at the last convergence check (energy/time).
    pub rates: Vec<f64>,
}

impl SplitStep {
    /// H ψ on the grid (the Fourier-grid kinetic operator + the real potential), into `out`.
    fn apply_h(&self, psi: &[Complex64], out: &mut [Complex64], aux: &mut [Complex64], scratch: &mut [Complex64]) {
        out.copy_from_slice(psi);
        kinetic_apply(self.grid(), &Kinetic::Uniform(self.c), out, aux, scratch);
        for ((o, p), v) in out.iter_mut().zip(psi).zip(&self.options.potential) {
            *o += *p * *v;
        }
    }

    /// The lowest `count` eigenstates by imaginary-time propagation (requires
    /// `imaginary_time = true`; dt is dτ). Start vectors are random (seeded by `seed`);
    /// after every Strang step the states are Gram-Schmidt orthonormalised. Every 10 steps
    /// the Rayleigh quotients E_i are compared with the previous check; the iteration stops
    /// when max_i |ΔE_i|/Δτ < `tol` (energy/time). The result is then refined by a
    /// Rayleigh-Ritz step in the span of the states.
    ///
    /// Accuracy: the fixed point is an eigenstate of the split operator, O(dτ²) away from
    /// the grid eigenstate; the reported energies (Rayleigh quotients of the exact grid H)
    /// are O(dτ⁴) accurate. Errors: `NotSettled` after `max_steps` steps.
    pub fn ground_states(&self, count: usize, tol: f64, max_steps: usize, seed: u64) -> Result<GroundStates> {
        let n = self.n();
        if !self.options.imaginary_time {
            return Err(InputError::range(
                "imaginary_time",
                "true for ground_states (build the SplitStep with imaginary_time = true; dt is then dτ)",
                false,
            )
            .into());
        }
        if count < 1 || count > n {
            return Err(InputError::range("count", format!("an integer in [1, {n}] (the grid size)"), count).into());
        }
        check_positive("tol", tol)?;
        if max_steps < 1 {
            return Err(InputError::range("max_steps", "an integer >= 1", max_steps).into());
        }
        check_memory(
            "count",
            (count as u64)
                .saturating_mul(n as u64 * 16 + self.scratch_len as u64 * 16)
                .saturating_mul(2),
            "ask for fewer states",
        )?;
        let zero = Complex64::new(0.0, 0.0);
        let mut rng = Rng::new(seed);
        let mut states: Vec<Complex64> = (0..count * n).map(|_| Complex64::new(rng.symmetric(), 0.0)).collect();
        let sl = self.scratch_len.max(1);
        let mut scratches = vec![zero; count * sl];
        let mut work = vec![zero; n];
        let dx = self.grid().dx();

        let gram_schmidt = |states: &mut [Complex64]| -> Result<()> {
            for i in 0..count {
                let (before, rest) = states.split_at_mut(i * n);
                let pi = &mut rest[..n];
                for j in 0..i {
                    let pj = &before[j * n..(j + 1) * n];
                    let ov: Complex64 = pj.iter().zip(pi.iter()).map(|(a, b)| a.conj() * b).sum::<Complex64>() * dx;
                    for (b, a) in pi.iter_mut().zip(pj) {
                        *b -= ov * a;
                    }
                }
                self.renormalise(pi)?;
            }
            Ok(())
        };
        gram_schmidt(&mut states)?;
        let energies_of = |states: &[Complex64], work: &mut [Complex64], scratch: &mut [Complex64]| -> Vec<f64> {
            states
                .chunks(n)
                .map(|p| self.observe(p, work, scratch, 0.0).energy)
                .collect()
        };
        let mut e_prev = energies_of(&states, &mut work, &mut scratches[..sl]);
        let mut rates = vec![f64::INFINITY; count];
        let par = n >= GS_PAR_MIN_N && count >= 2;
        let par_inner = n >= self.par_threshold && count < 2;
        let mut converged = false;
        let mut steps = 0;
        while steps < max_steps {
            let one = |(p, sc): (&mut [Complex64], &mut [Complex64])| {
                self.step(p, sc, 0, false, par_inner);
                self.apply_kick(p, Kick::Close, 0, par_inner);
            };
            if par {
                states.par_chunks_mut(n).zip(scratches.par_chunks_mut(sl)).for_each(one);
            } else {
                states.chunks_mut(n).zip(scratches.chunks_mut(sl)).for_each(one);
            }
            gram_schmidt(&mut states)?;
            steps += 1;
            if steps.is_multiple_of(CHECK_EVERY) || steps == max_steps {
                let e = energies_of(&states, &mut work, &mut scratches[..sl]);
                let dtau = ((steps - 1) % CHECK_EVERY + 1) as f64 * self.options.dt;
                for i in 0..count {
                    rates[i] = (e[i] - e_prev[i]).abs() / dtau;
                }
                e_prev = e;
                if rates.iter().all(|r| *r < tol) {
                    converged = true;
                    break;
                }
            }
        }
        if !converged {
            return Err(NumericalError::NotSettled { steps, tol, energies: e_prev, rates }.into());
        }

        // Rayleigh-Ritz in the span of the states (real symmetric up to round-off: the
        // start vectors are real and every factor maps real states to real states).
        let mut hs = vec![zero; count * n];
        for (p, h) in states.chunks(n).zip(hs.chunks_mut(n)) {
            self.apply_h(p, h, &mut work, &mut scratches[..sl]);
        }
        let mut hm = faer::Mat::<f64>::from_fn(count, count, |i, j| {
            let pi = &states[i * n..(i + 1) * n];
            let hj = &hs[j * n..(j + 1) * n];
            pi.iter().zip(hj).map(|(a, b)| (a.conj() * b).re).sum::<f64>() * dx
        });
        crate::linalg::symmetrize(&mut hm);
        let (energies, u) = crate::linalg::dense::eigh(hm.as_ref(), faer::Par::Seq)?;
        let mut out = vec![zero; count * n];
        for (kcol, o) in out.chunks_mut(n).enumerate() {
            for j in 0..count {
                let w = u[(j, kcol)];
                for (z, p) in o.iter_mut().zip(&states[j * n..(j + 1) * n]) {
                    *z += *p * w;
                }
            }
            // Real, normalised, positive at the leftmost sample above 1 % of the maximum.
            let max = o.iter().map(|z| z.norm()).fold(0.0, f64::max);
            let phase = o
                .iter()
                .find(|z| z.norm() > 0.01 * max)
                .map(|z| z.conj() / z.norm())
                .unwrap_or(Complex64::new(1.0, 0.0));
            let nrm = (sum_sq(o) * dx).sqrt();
            for z in o.iter_mut() {
                *z = Complex64::new((*z * phase).re / nrm, 0.0);
            }
        }
        Ok(GroundStates {
            n,
            energies,
            states: out,
            steps,
            rates,
        })
    }
}
