//! Lowest states by imaginary-time propagation: Strang steps in τ with Gram-Schmidt,
//! then a Rayleigh-Ritz step in the span of the states (through the library's dense
//! eigensolver). With a nonlinearity (Gross-Pitaevskii, g ≠ 0) only the ground state is
//! computed: the normalised gradient flow in τ, then a refinement of the energy minimum
//! on the unit sphere by preconditioned nonlinear conjugate gradients.

use num_complex::Complex64;
use rayon::prelude::*;

use super::kernels::sum_sq;
use super::{Kick, SplitStep};
use crate::error::{check_memory, check_positive, InputError, NumericalError, Result};
use crate::linalg::rng::Rng;

/// Grid size from which `ground_states` propagates its states in parallel (one task = one
/// whole Strang step of one state, coarse enough to pay for the fork/join).
const GS_PAR_MIN_N: usize = 4096;
/// Imaginary-time steps between two convergence checks of [`SplitStep::ground_states`].
const CHECK_EVERY: usize = 10;
/// Most conjugate-gradient iterations of the nonlinear refinement.
const REFINE_MAX_ITER: usize = 4000;
/// Iterations without a new smallest residual after which the refinement stops.
const REFINE_STALL: usize = 200;

/// Result of [`SplitStep::ground_states`].
#[derive(Debug, Clone, PartialEq)]
pub struct GroundStates {
    /// Grid size (row length of `states`).
    pub n: usize,
    /// Energies in ascending order (Ritz values of the converged subspace); with a
    /// nonlinearity, the chemical potential μ = ⟨T⟩ + ⟨V⟩ + gΣ|ψ|⁴ dV of the ground state.
    pub energies: Vec<f64>,
    /// The energy functional E = ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴ dV of each state (= `energies`
    /// when g = 0).
    pub energy_functional: Vec<f64>,
    /// States, count × n row-major, Σ|ψ|² dV = 1, real, and positive at the first sample
    /// (flat row-major order) where |ψ| exceeds 1 % of its maximum.
    pub states: Vec<Complex64>,
    /// Imaginary-time steps taken.
    pub steps: usize,
    /// |dE/dτ| of every state at the last convergence check (energy/time); with a
    /// nonlinearity, of μ.
    pub rates: Vec<f64>,
    /// ‖H ψ − E ψ‖ (with a nonlinearity ‖H[ψ]ψ − μψ‖, H[ψ] = T + V + g|ψ|²) of each
    /// returned state, in the discrete norm (Σ|·|² dV)^{1/2} (energy/length^{d/2}).
    pub residuals: Vec<f64>,
    /// Conjugate-gradient iterations of the nonlinear refinement (0 when g = 0).
    pub refine_iterations: usize,
}

impl SplitStep {
    /// out ← (T + V + g|ψ|²)ψ on the grid (Fourier-grid kinetic operator c·|k|², real
    /// potential; the mean-field term only when `nonlinear`).
    fn apply_h(&self, psi: &[Complex64], out: &mut [Complex64], scratch: &mut [Complex64], nonlinear: bool) {
        let grid = &*self.options.grid;
        let inv_n = 1.0 / self.n() as f64;
        let c = self.c;
        out.copy_from_slice(psi);
        grid.forward(out, scratch);
        self.scale_spectrum(out, |k2| c * k2 * inv_n);
        grid.inverse(out, scratch);
        let g = if nonlinear { self.options.nonlinearity } else { 0.0 };
        for ((o, p), v) in out.iter_mut().zip(psi).zip(&self.options.potential) {
            *o += *p * (*v + g * p.norm_sqr());
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
    ///
    /// With a nonlinearity g ≠ 0 only `count = 1` is accepted (the Gross-Pitaevskii
    /// equation has no orthogonal set of excited states). The normalised gradient flow
    /// (Bao & Du 2004) runs until |Δμ|/Δτ < `tol`; its fixed point is O(dτ²) away from
    /// the grid solution, so it is then refined to the minimum of the energy functional
    /// E[ψ] on Σ|ψ|² dV = 1 of the grid problem, by nonlinear conjugate gradients on
    /// the sphere with an exact line search along the geodesic (the method of Antoine,
    /// Levitt & Tang 2017, J. Comput. Phys. 343, 92, with a kinetic preconditioner
    /// scaled down where V + g|ψ|² exceeds μ), until ‖H[ψ]ψ − μψ‖ reaches about
    /// 1e-10·max(1, |μ|) or stops decreasing. The result is then independent of dτ.
    pub fn ground_states(&self, count: usize, tol: f64, max_steps: usize, seed: u64) -> Result<GroundStates> {
        let n = self.n();
        let nonlinear = self.options.nonlinearity != 0.0;
        if !self.options.imaginary_time {
            return Err(InputError::range(
                "imaginary_time",
                "true for ground_states (build the SplitStep with imaginary_time = true; dt is then dτ)",
                false,
            )
            .into());
        }
        if nonlinear && count != 1 {
            return Err(InputError::range(
                "count",
                "1 with a nonlinearity (g ≠ 0): the Gross-Pitaevskii equation is nonlinear and has no orthogonal set of excited states",
                count,
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
        let dv = self.grid().cell_volume();

        let gram_schmidt = |states: &mut [Complex64]| -> Result<()> {
            for i in 0..count {
                let (before, rest) = states.split_at_mut(i * n);
                let pi = &mut rest[..n];
                for j in 0..i {
                    let pj = &before[j * n..(j + 1) * n];
                    let ov: Complex64 = pj.iter().zip(pi.iter()).map(|(a, b)| a.conj() * b).sum::<Complex64>() * dv;
                    for (b, a) in pi.iter_mut().zip(pj) {
                        *b -= ov * a;
                    }
                }
                self.renormalise(pi)?;
            }
            Ok(())
        };
        gram_schmidt(&mut states)?;
        // Energies watched for convergence: Rayleigh quotients, or μ with a nonlinearity.
        let energies_of = |states: &[Complex64], work: &mut [Complex64], scratch: &mut [Complex64]| -> Vec<f64> {
            states
                .chunks(n)
                .map(|p| {
                    let o = self.observe(p, work, scratch, 0.0);
                    o.energy + o.interaction
                })
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
                if nonlinear {
                    // The density of the closing kick is that of a normalised state, as
                    // the opening kick's (the potential and kinetic factors shrink the norm).
                    let _ = self.renormalise(p);
                }
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
        if nonlinear {
            let mut phi: Vec<f64> = states.iter().map(|z| z.re).collect();
            let refined = self.refine_nonlinear(&mut phi, &mut work, &mut scratches[..sl]);
            let mut out: Vec<Complex64> = phi.iter().map(|&v| Complex64::new(v, 0.0)).collect();
            fix_phase(&mut out, dv);
            return Ok(GroundStates {
                n,
                energies: vec![refined.mu],
                energy_functional: vec![refined.energy],
                states: out,
                steps,
                rates,
                residuals: vec![refined.residual],
                refine_iterations: refined.iterations,
            });
        }

        // Rayleigh-Ritz in the span of the states (real symmetric up to round-off: the
        // start vectors are real and every factor maps real states to real states).
        let mut hs = vec![zero; count * n];
        for (p, h) in states.chunks(n).zip(hs.chunks_mut(n)) {
            self.apply_h(p, h, &mut scratches[..sl], false);
        }
        let mut hm = faer::Mat::<f64>::from_fn(count, count, |i, j| {
            let pi = &states[i * n..(i + 1) * n];
            let hj = &hs[j * n..(j + 1) * n];
            pi.iter().zip(hj).map(|(a, b)| (a.conj() * b).re).sum::<f64>() * dv
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
            fix_phase(o, dv);
        }
        let mut residuals = Vec::with_capacity(count);
        for (o, &e) in out.chunks(n).zip(&energies) {
            self.apply_h(o, &mut work, &mut scratches[..sl], false);
            residuals.push((work.iter().zip(o).map(|(h, p)| (h - p * e).norm_sqr()).sum::<f64>() * dv).sqrt());
        }
        Ok(GroundStates {
            n,
            energy_functional: energies.clone(),
            energies,
            states: out,
            steps,
            rates,
            residuals,
            refine_iterations: 0,
        })
    }

    /// Minimise E[φ] = ⟨φ, (T + V) φ⟩ + (g/2)Σφ⁴ dV over real φ with Σφ² dV = 1, starting
    /// from `phi` (normalised on return): preconditioned Polak-Ribière conjugate gradients
    /// on the sphere, exact line search along φ cos θ + d̂ sin θ (E(θ) is a trigonometric
    /// polynomial whose coefficients take one operator application per iteration).
    fn refine_nonlinear(&self, phi: &mut [f64], work: &mut [Complex64], scratch: &mut [Complex64]) -> Refined {
        let n = phi.len();
        let g = self.options.nonlinearity;
        let dv = self.grid().cell_volume();
        let v = &self.options.potential;
        let dot = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| x * y).sum::<f64>() * dv;
        let normalise = |a: &mut [f64]| {
            let s = 1.0 / dot(a, a).sqrt();
            a.iter_mut().for_each(|x| *x *= s);
        };
        // out ← (T + V) a for a real vector.
        let apply_l = |a: &[f64], out: &mut [f64], work: &mut [Complex64], scratch: &mut [Complex64]| {
            let inv_n = 1.0 / n as f64;
            let c = self.c;
            for (w, &x) in work.iter_mut().zip(a) {
                *w = Complex64::new(x, 0.0);
            }
            self.grid().forward(work, scratch);
            self.scale_spectrum(work, |k2| c * k2 * inv_n);
            self.grid().inverse(work, scratch);
            for (((o, w), &x), &vv) in out.iter_mut().zip(work.iter()).zip(a).zip(v) {
                *o = w.re + vv * x;
            }
        };
        normalise(phi);
        let mut lphi = vec![0.0; n];
        let mut r = vec![0.0; n];
        let mut z = vec![0.0; n];
        let mut d = vec![0.0; n];
        let mut dh = vec![0.0; n];
        let mut ld = vec![0.0; n];
        let mut r_old = vec![0.0; n];
        let mut zr_old = 0.0;
        let mut best = (f64::INFINITY, phi.to_vec());
        let mut since_best = 0;
        let mut iterations = 0;
        let kmax2: f64 = (0..self.shape.len()).map(|a| self.grid().axis(a).k().iter().fold(0.0_f64, |m, k| m.max(k * k))).sum();
        let vmax = v.iter().fold(0.0_f64, |m, x| m.max(x.abs()));
        apply_l(phi, &mut lphi, work, scratch);
        loop {
            // Residual r = H[φ]φ − μφ (⟂ φ), μ = ⟨φ, H[φ]φ⟩.
            for ((ri, &l), &p) in r.iter_mut().zip(&lphi).zip(phi.iter()) {
                *ri = l + g * p * p * p;
            }
            let mu = dot(phi, &r);
            r.iter_mut().zip(phi.iter()).for_each(|(ri, &p)| *ri -= mu * p);
            let res = dot(&r, &r).sqrt();
            if res < best.0 {
                best = (res, phi.to_vec());
                since_best = 0;
            } else {
                since_best += 1;
            }
            let pmax = phi.iter().fold(0.0_f64, |m, x| m.max(x * x));
            let floor = 50.0 * f64::EPSILON * (self.c * kmax2 + vmax + g.abs() * pmax + mu.abs());
            let target = (1e-10 * mu.abs().max(1.0)).max(floor);
            if res <= target || iterations >= REFINE_MAX_ITER || since_best >= REFINE_STALL {
                break;
            }
            iterations += 1;
            // Preconditioned residual z = D (α + c k²)⁻¹ D r with D = (α/(α + h))^{1/2},
            // h = max(V + 3gφ² − μ, 0) the local part of the second variation of E
            // (V − μ outside the cloud, 2gφ² inside a Thomas-Fermi cloud), α = ⟨φ, Tφ⟩;
            // projected on the tangent space of the sphere.
            let t_kin = dot(phi, &lphi) - phi.iter().zip(v).map(|(p, vv)| p * p * vv).sum::<f64>() * dv;
            let alpha = t_kin.max(1e-6 * mu.abs()).max(f64::MIN_POSITIVE);
            let dscale = |j: usize| (alpha / (alpha + (v[j] + 3.0 * g * phi[j] * phi[j] - mu).max(0.0))).sqrt();
            for (j, w) in work.iter_mut().enumerate() {
                *w = Complex64::new(dscale(j) * r[j], 0.0);
            }
            self.grid().forward(work, scratch);
            let (c, inv_n) = (self.c, 1.0 / n as f64);
            self.scale_spectrum(work, |k2| inv_n / (alpha + c * k2));
            self.grid().inverse(work, scratch);
            for (j, zj) in z.iter_mut().enumerate() {
                *zj = dscale(j) * work[j].re;
            }
            let zp = dot(&z, phi);
            z.iter_mut().zip(phi.iter()).for_each(|(zj, &p)| *zj -= zp * p);
            // Polak-Ribière+ with a restart whenever d is not a descent direction.
            let zr = dot(&z, &r);
            let beta = if iterations == 1 || zr_old <= 0.0 {
                0.0
            } else {
                let num: f64 = z.iter().zip(&r).zip(&r_old).map(|((zj, rj), ro)| zj * (rj - ro)).sum::<f64>() * dv;
                (num / zr_old).max(0.0)
            };
            for (dj, zj) in d.iter_mut().zip(&z) {
                *dj = -zj + beta * *dj;
            }
            let dp = dot(&d, phi);
            d.iter_mut().zip(phi.iter()).for_each(|(dj, &p)| *dj -= dp * p);
            if dot(&d, &r) >= 0.0 {
                d.iter_mut().zip(&z).for_each(|(dj, zj)| *dj = -zj);
            }
            r_old.copy_from_slice(&r);
            zr_old = zr;
            let dn = dot(&d, &d).sqrt();
            if !(dn > 0.0 && dn.is_finite()) {
                break;
            }
            // d̂ = d/‖d‖ for the line search; d itself is kept for the next β·d.
            dh.iter_mut().zip(&d).for_each(|(h, x)| *h = x / dn);
            apply_l(&dh, &mut ld, work, scratch);
            // E(θ) = cos²θ a + 2 sinθ cosθ b + sin²θ e + (g/2) Σ (φ cosθ + d sinθ)⁴ dV.
            let a = dot(phi, &lphi);
            let b = dot(phi, &ld);
            let e = dot(&dh, &ld);
            let mut q = [0.0; 5]; // Σ φ^{4−m} d̂^m dV, m = 0..4
            for (&p, &dd) in phi.iter().zip(dh.iter()) {
                let (p2, d2) = (p * p, dd * dd);
                q[0] += p2 * p2;
                q[1] += p2 * p * dd;
                q[2] += p2 * d2;
                q[3] += p * d2 * dd;
                q[4] += d2 * d2;
            }
            q.iter_mut().for_each(|x| *x *= dv);
            let theta = line_search(a, b, e, 0.5 * g, &q);
            if theta == 0.0 {
                break;
            }
            let (s, cth) = theta.sin_cos();
            for (p, &dd) in phi.iter_mut().zip(dh.iter()) {
                *p = cth * *p + s * dd;
            }
            normalise(phi);
            if iterations.is_multiple_of(25) {
                apply_l(phi, &mut lphi, work, scratch);
            } else {
                let sc = 1.0 / (cth * cth + s * s).sqrt();
                for (l, &ldj) in lphi.iter_mut().zip(&ld) {
                    *l = (cth * *l + s * ldj) * sc;
                }
            }
        }
        phi.copy_from_slice(&best.1);
        // Final values from a fresh operator application.
        apply_l(phi, &mut lphi, work, scratch);
        let quartic = phi.iter().map(|p| p.powi(4)).sum::<f64>() * dv;
        let lin = dot(phi, &lphi);
        let mu = lin + g * quartic;
        let res = (phi
            .iter()
            .zip(&lphi)
            .map(|(&p, &l)| (l + g * p * p * p - mu * p).powi(2))
            .sum::<f64>()
            * dv)
            .sqrt();
        Refined { mu, energy: lin + 0.5 * g * quartic, residual: res, iterations }
    }
}

struct Refined {
    mu: f64,
    energy: f64,
    residual: f64,
    iterations: usize,
}

/// The first minimum θ > 0 of E(θ) = cos²θ a + 2 sinθ cosθ b + sin²θ e + h·Q(θ),
/// Q = Σ_m C(4,m) cos^{4−m}θ sin^mθ q_m, located from the sign of E'(θ) (which, unlike E,
/// is computed without cancellation near the minimum). 0 if E'(0) ≥ 0.
fn line_search(a: f64, b: f64, e: f64, h: f64, q: &[f64; 5]) -> f64 {
    let de = |t: f64| {
        let (s, c) = t.sin_cos();
        let dq = -4.0 * c * c * c * s * q[0] + 4.0 * (c.powi(4) - 3.0 * c * c * s * s) * q[1]
            + 12.0 * (c * c * c * s - c * s * s * s) * q[2]
            + 4.0 * (3.0 * c * c * s * s - s.powi(4)) * q[3]
            + 4.0 * c * s * s * s * q[4];
        (2.0 * t).sin() * (e - a) + 2.0 * (2.0 * t).cos() * b + h * dq
    };
    if !(de(0.0) < 0.0) {
        return 0.0;
    }
    let steps = 256;
    let hstep = std::f64::consts::FRAC_PI_2 / steps as f64;
    let mut lo = 0.0;
    let mut hi = None;
    for k in 1..=steps {
        let t = k as f64 * hstep;
        if de(t) >= 0.0 {
            hi = Some(t);
            break;
        }
        lo = t;
    }
    let Some(mut hi) = hi else { return std::f64::consts::FRAC_PI_2 };
    // Bisection on the sign of E' down to adjacent floating-point numbers.
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if de(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// Make a state real, normalised (Σ|ψ|² dV = 1) and positive at its first sample (flat
/// order) where |ψ| exceeds 1 % of its maximum.
fn fix_phase(o: &mut [Complex64], dv: f64) {
    let max = o.iter().map(|z| z.norm()).fold(0.0, f64::max);
    let phase = o
        .iter()
        .find(|z| z.norm() > 0.01 * max)
        .map(|z| z.conj() / z.norm())
        .unwrap_or(Complex64::new(1.0, 0.0));
    let nrm = (sum_sq(o) * dv).sqrt();
    for z in o.iter_mut() {
        *z = Complex64::new((*z * phase).re / nrm, 0.0);
    }
}
