//! Split-step Fourier propagation of 1D wavepackets on a periodic grid.
//!
//! # Method
//! The time-dependent Schrödinger equation iħ ∂ψ/∂t = Hψ with H = −c ∂² + V(x, t),
//! c = ħ²/(2m), is integrated with the split-step Fourier method (Feit, Fleck and
//! Steiger 1982): the potential acts by pointwise multiplication on the grid, the
//! kinetic energy by pointwise multiplication of the discrete Fourier transform.
//!
//! * [`SplitOrder::Second`]: Strang splitting
//!   e^{−iV dt/2ħ} e^{−iT dt/ħ} e^{−iV dt/2ħ}; global error O(dt²).
//! * [`SplitOrder::Fourth`]: Yoshida (1990) triple-jump composition
//!   S(w₁dt) S(w₀dt) S(w₁dt) of Strang steps, w₁ = 1/(2 − 2^{1/3}),
//!   w₀ = −2^{1/3}/(2 − 2^{1/3}); global error O(dt⁴). One step costs three Strang steps.
//!
//! Adjacent potential half-kicks are merged, so a Strang step costs two FFTs and
//! two pointwise multiplies; the closing half-kick is only applied where a state is
//! recorded (or the run ends).
//!
//! # Units and conventions
//! * Grid: `n` points x_j = start + j·dx on the periodic box [start, start + n·dx).
//!   Wave numbers k_p = 2π·fftfreq(n, dx) in numpy order (for even n the Nyquist
//!   mode p = n/2 has k = −π/dx).
//! * `c` = ħ²/(2m) in energy·length², `hbar` in energy·time, `dt` in time,
//!   potentials in energy. Natural units: c = 1/2, ħ = 1.
//! * ψ(t) = exp(−iHt/ħ) ψ(0); samples ψ_j = ψ(x_j) with Σ|ψ_j|² dx = 1 for a
//!   normalised state (the propagator is linear, input states are not rescaled in
//!   real time).
//! * Imaginary time (τ = it): one step applies exp(−H dτ/ħ) (Strang-split) and
//!   renormalises the state to Σ|ψ|² dx = 1.
//!
//! # Time-dependent potentials
//! V(x, t) = V₀(x) + f(t)·V₁(x). A Python callable cannot be called inside a
//! GIL-free loop, so f is passed as samples at the times returned by
//! [`SplitStep::drive_sample_times`]:
//! * [`DriveSampling::Substeps`]: f at the midpoint of every Strang sub-step (one
//!   sample per step for `Second`, three for `Fourth`: t_n + 0.6756·dt, t_n + dt/2,
//!   t_n + 0.3244·dt, in that order). Each Strang sub-step uses the exponential
//!   midpoint rule, which is time-symmetric, so the composition keeps its full
//!   order: 2 for `Second`, 4 for `Fourth`.
//! * [`DriveSampling::Midpoint`]: one sample per step, f(t_n + dt/2), used for all
//!   sub-steps. For `Second` this is identical to `Substeps`. For `Fourth` the drive
//!   is frozen at the step midpoint, so the global error is O(dt²) in the drive
//!   (the static part keeps its fourth-order splitting): use it only for slow drives.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{mpsc, Arc};

use num_complex::Complex64;
use rayon::prelude::*;
use rustfft::{Fft, FftPlanner};

use crate::error::{check_finite, check_memory, check_positive, InputError, NumericalError, Result};

/// Chunk length of the parallel pointwise loops.
const PAR_CHUNK: usize = 8192;
/// Grid size from which the pointwise multiplies of a single run use rayon. Off by
/// default: on the 2-core reference machine the rayon multiply was never faster
/// (n = 2^14 … 2^18, see the timing tests); the loops are memory-bound.
/// [`SplitStep::set_parallel_threshold`] turns it on for larger machines.
const DEFAULT_PAR_THRESHOLD: usize = usize::MAX;
/// Grid size from which `ground_states` propagates its states in parallel (one task = one
/// whole Strang step of one state, coarse enough to pay for the fork/join).
const GS_PAR_MIN_N: usize = 4096;
/// Imaginary-time steps between two convergence checks of [`SplitStep::ground_states`].
const CHECK_EVERY: usize = 10;

/// Order of the splitting.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SplitOrder {
    /// Strang splitting, global error O(dt²).
    Second,
    /// Yoshida (1990) triple-jump composition of Strang steps, global error O(dt⁴).
    /// Has a negative sub-step, so it is not available in imaginary time.
    Fourth,
}

/// How the drive amplitude f(t) is sampled (see the module documentation).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DriveSampling {
    /// f at the midpoint of every Strang sub-step: full order of the method.
    Substeps,
    /// One sample per step, f(t_n + dt/2): second order in the drive.
    Midpoint,
}

/// A time-dependent term f(t)·V₁(x) added to the static potential.
#[derive(Debug, Clone, PartialEq)]
pub struct Drive {
    /// V₁(x_j) on the grid (energy per unit of f), length n.
    pub v1: Vec<f64>,
    /// f at the times of [`SplitStep::drive_sample_times`] for `sampling`, step-major.
    /// A run of `steps` steps needs at least `steps × samples_per_step` values.
    pub f: Vec<f64>,
    pub sampling: DriveSampling,
}

/// Absorbing boundary.
#[derive(Debug, Clone, PartialEq)]
pub enum Absorber {
    /// Mask m_j in [0, 1] multiplied into the state once per step (the absorption
    /// per unit time therefore depends on dt).
    Mask(Vec<f64>),
    /// Complex absorbing potential: V → V − iW with W_j ≥ 0 (energy). Independent of
    /// dt; needs dt > 0.
    Cap(Vec<f64>),
}

impl Absorber {
    /// Smooth mask at both edges of the periodic box: with s_j = min(j, n − j)·dx the
    /// distance to the box edge x = start ≡ start + n·dx, points with s_j < `width`
    /// get m_j = cos(π u/2)^{1/8}, u = (width − s_j)/width, the others 1
    /// (m = 0 at the edge itself).
    pub fn cos_mask(n: usize, dx: f64, width: f64) -> Result<Absorber> {
        if n < 2 {
            return Err(InputError::range("n", "an integer >= 2", n).into());
        }
        check_positive("dx", dx)?;
        check_positive("width", width)?;
        let half = 0.5 * n as f64 * dx;
        if width > half {
            return Err(InputError::range("width", format!("a length in (0, {half}] (half the box)"), width).into());
        }
        let mask = (0..n)
            .map(|j| {
                let s = j.min(n - j) as f64 * dx;
                if s >= width {
                    1.0
                } else {
                    let u = (width - s) / width;
                    if u >= 1.0 {
                        0.0
                    } else {
                        (0.5 * std::f64::consts::PI * u).cos().max(0.0).powf(0.125)
                    }
                }
            })
            .collect();
        Ok(Absorber::Mask(mask))
    }
}

/// Everything a [`SplitStep`] is built from. Use [`SplitStepConfig::new`] for the
/// defaults (`Second`, t0 = 0, no drive, no absorber, real time) and set fields.
#[derive(Debug, Clone, PartialEq)]
pub struct SplitStepConfig {
    /// Left end of the periodic box (length).
    pub start: f64,
    /// Grid spacing (length), > 0.
    pub dx: f64,
    /// Number of grid points, >= 2.
    pub n: usize,
    /// Static potential V₀(x_j) (energy), length n, finite.
    pub potential: Vec<f64>,
    /// Kinetic prefactor c = ħ²/(2m) (energy·length²), > 0.
    pub c: f64,
    /// ħ (energy·time), > 0.
    pub hbar: f64,
    /// Time step (time): finite and nonzero (negative runs backwards); > 0 in imaginary time.
    pub dt: f64,
    /// Time of the initial state (time); record m is at t0 + m·dt.
    pub t0: f64,
    pub order: SplitOrder,
    pub drive: Option<Drive>,
    pub absorber: Option<Absorber>,
    /// Propagate in imaginary time τ = it (dt is then dτ); requires `Second`, no drive,
    /// no absorber.
    pub imaginary_time: bool,
}

impl SplitStepConfig {
    pub fn new(start: f64, dx: f64, n: usize, potential: Vec<f64>, c: f64, hbar: f64, dt: f64) -> Self {
        SplitStepConfig {
            start,
            dx,
            n,
            potential,
            c,
            hbar,
            dt,
            t0: 0.0,
            order: SplitOrder::Second,
            drive: None,
            absorber: None,
            imaginary_time: false,
        }
    }
}

/// Expectation values of one state.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Observables {
    /// Σ|ψ_j|² dx.
    pub norm: f64,
    /// ⟨x⟩ (length), positions taken in [start, start + n·dx). Normalised by the norm.
    pub mean_x: f64,
    /// ⟨p⟩ = ħ⟨k⟩ (energy·time/length) from the FFT. Normalised by the norm.
    pub mean_p: f64,
    /// ⟨T⟩ + ⟨V(t)⟩ (energy) with the real potential (a CAP is not included).
    /// Normalised by the norm.
    pub energy: f64,
}

/// Result of [`SplitStep::run`]. Record 0 is the initial state at t0, then one record
/// every `record_every` steps, and the final state is always recorded (so the last
/// interval is shorter when `steps` is not a multiple of `record_every`).
#[derive(Debug, Clone, PartialEq)]
pub struct Run {
    /// Grid size (row length of `states`).
    pub n: usize,
    /// Step count of each record.
    pub record_steps: Vec<usize>,
    /// Time of each record, t0 + step·dt (imaginary time τ in imaginary-time runs).
    pub times: Vec<f64>,
    /// Recorded states, n_records × n, row-major.
    pub states: Vec<Complex64>,
    /// Σ|ψ|² dx per record.
    pub norm: Vec<f64>,
    /// ⟨x⟩ per record (normalised by the norm).
    pub mean_x: Vec<f64>,
    /// ħ⟨k⟩ per record (normalised by the norm).
    pub mean_p: Vec<f64>,
    /// ⟨T⟩ + ⟨V(t)⟩ per record (normalised by the norm; with a drive, f at the record
    /// time is linearly interpolated between the adjacent samples, extrapolated at the
    /// ends of the sample array).
    pub energy: Vec<f64>,
    /// ⟨ψ(0)|ψ(t)⟩ = Σ conj(ψ0_j) ψ_j dx per record (not normalised).
    pub autocorrelation: Vec<Complex64>,
    /// With an absorber: 1 − norm(end)/norm(0), the fraction of the norm absorbed.
    pub absorbed_norm: Option<f64>,
    /// Steps actually taken (< steps when cancelled).
    pub steps_done: usize,
    /// True when the progress callback returned false before all steps were done;
    /// the state at cancellation is then the last record.
    pub cancelled: bool,
}

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

#[derive(Clone, Copy, Debug)]
enum Kick {
    /// Opening half-kick of a step (nothing pending).
    Open,
    /// Merged kick between sub-steps s − 1 and s of one step.
    Inner(usize),
    /// Merged kick: closing half of the previous step + opening half of this step.
    Boundary,
    /// Closing half-kick of a step.
    Close,
}

/// Precomputed split-step propagator. Cheap to share: `run` and `run_many` take
/// `&self`; the FFT plans are shared by all threads.
#[derive(Clone)]
pub struct SplitStep {
    start: f64,
    dx: f64,
    n: usize,
    c: f64,
    hbar: f64,
    dt: f64,
    t0: f64,
    order: SplitOrder,
    imaginary: bool,
    potential: Vec<f64>,
    drive: Option<Drive>,
    absorber: Option<Absorber>,
    x: Vec<f64>,
    k: Vec<f64>,
    /// Sub-step weights (fractions of dt).
    weights: Vec<f64>,
    /// Midpoint of each sub-step (fraction of dt from the step start).
    offsets: Vec<f64>,
    /// Kinetic factors, one table per distinct weight, 1/n folded in.
    kin: Vec<Vec<Complex64>>,
    kin_index: Vec<usize>,
    kick_open: Vec<Complex64>,
    kick_inner: Vec<Complex64>,
    kick_boundary: Vec<Complex64>,
    kick_close: Vec<Complex64>,
    fwd: Arc<dyn Fft<f64>>,
    inv: Arc<dyn Fft<f64>>,
    scratch_len: usize,
    par_threshold: usize,
}

fn yoshida_weights() -> (f64, f64) {
    let cr = 2f64.cbrt();
    let w1 = 1.0 / (2.0 - cr);
    (w1, -cr * w1)
}

/// k_p = 2π·fftfreq(n, dx), numpy order.
fn wavenumbers(n: usize, dx: f64) -> Vec<f64> {
    let l = n as f64 * dx;
    (0..n)
        .map(|p| {
            let q = if p < n.div_ceil(2) {
                p as f64
            } else {
                p as f64 - n as f64
            };
            2.0 * std::f64::consts::PI * q / l
        })
        .collect()
}

fn check_state(argument: &str, psi: &[Complex64], n: usize, offset: usize) -> std::result::Result<(), InputError> {
    if psi.len() != n {
        return Err(InputError::Length {
            argument: argument.into(),
            expected: n,
            got: psi.len(),
        });
    }
    if let Some(i) = psi.iter().position(|z| !(z.re.is_finite() && z.im.is_finite())) {
        return Err(InputError::NotFinite {
            argument: argument.into(),
            index: offset + i,
        });
    }
    if psi.iter().all(|z| z.re == 0.0 && z.im == 0.0) {
        return Err(InputError::range(
            argument,
            "a state that is not identically zero",
            "all zeros",
        ));
    }
    // Norms, energies and the autocorrelation are sums of |ψ|²: refuse a state whose
    // sum overflows instead of reporting inf for them.
    if !psi.iter().map(|z| z.norm_sqr()).sum::<f64>().is_finite() {
        let max = psi.iter().fold(0.0_f64, |m, z| m.max(z.re.abs()).max(z.im.abs()));
        return Err(InputError::range(
            argument,
            "a state with finite Σ|ψ|² (rescale it; |ψ| up to about 1e150)",
            format!("max |component| {max:e}, Σ|ψ|² overflows"),
        ));
    }
    Ok(())
}

#[inline(always)]
fn mul_kernel(a: &mut [Complex64], b: &[Complex64]) {
    for (x, y) in a.iter_mut().zip(b) {
        *x *= *y;
    }
}

/// a_j *= b_j with AVX2/FMA, two complex numbers per 256-bit register:
/// (a_r + i a_i)(b_r + i b_i) = fmaddsub(a, dup(b_r), swap(a)·dup(b_i)).
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn mul_avx(a: &mut [Complex64], b: &[Complex64]) {
    use std::arch::x86_64::*;
    let n = a.len().min(b.len());
    let pairs = n / 2;
    let pa = a.as_mut_ptr() as *mut f64;
    let pb = b.as_ptr() as *const f64;
    for p in 0..pairs {
        // SAFETY: 2p + 1 < n; Complex64 is two contiguous f64 (repr(C)); unaligned loads.
        unsafe {
            let x = _mm256_loadu_pd(pa.add(4 * p));
            let y = _mm256_loadu_pd(pb.add(4 * p));
            let yr = _mm256_movedup_pd(y);
            let yi = _mm256_permute_pd(y, 0b1111);
            let xs = _mm256_permute_pd(x, 0b0101);
            let r = _mm256_fmaddsub_pd(x, yr, _mm256_mul_pd(xs, yi));
            _mm256_storeu_pd(pa.add(4 * p), r);
        }
    }
    mul_kernel(&mut a[2 * pairs..n], &b[2 * pairs..n]);
}

/// a_j *= b_j (AVX2/FMA code path selected at run time where available).
fn mul_seq(a: &mut [Complex64], b: &[Complex64]) {
    #[cfg(target_arch = "x86_64")]
    {
        if std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma") {
            // SAFETY: the CPU supports the features the function was compiled for.
            unsafe { mul_avx(a, b) };
            return;
        }
    }
    mul_kernel(a, b)
}

fn mul(a: &mut [Complex64], b: &[Complex64], par: bool) {
    if par {
        a.par_chunks_mut(PAR_CHUNK)
            .zip(b.par_chunks(PAR_CHUNK))
            .for_each(|(a, b)| mul_seq(a, b));
    } else {
        mul_seq(a, b);
    }
}

/// a_j *= b_j · e^{i coef v_j}
fn mul_drive_seq(a: &mut [Complex64], b: &[Complex64], v: &[f64], coef: f64) {
    for ((x, y), v) in a.iter_mut().zip(b).zip(v) {
        let (s, c) = (coef * v).sin_cos();
        *x *= *y * Complex64::new(c, s);
    }
}

fn mul_drive(a: &mut [Complex64], b: &[Complex64], v: &[f64], coef: f64, par: bool) {
    if par {
        a.par_chunks_mut(PAR_CHUNK)
            .zip(b.par_chunks(PAR_CHUNK))
            .zip(v.par_chunks(PAR_CHUNK))
            .for_each(|((a, b), v)| mul_drive_seq(a, b, v, coef));
    } else {
        mul_drive_seq(a, b, v, coef);
    }
}

fn sum_sq(a: &[Complex64]) -> f64 {
    a.iter().map(|z| z.norm_sqr()).sum()
}

/// Cyclic Jacobi eigensolver for a real symmetric m×m matrix (row-major, destroyed).
/// Returns ascending eigenvalues and the eigenvectors as columns of a row-major matrix.
fn jacobi_eigh(a: &mut [f64], m: usize) -> (Vec<f64>, Vec<f64>) {
    let mut v = vec![0.0; m * m];
    for i in 0..m {
        v[i * m + i] = 1.0;
    }
    let scale: f64 = a.iter().map(|x| x * x).sum::<f64>().max(f64::MIN_POSITIVE);
    for _sweep in 0..100 {
        let mut off = 0.0;
        for p in 0..m {
            for q in p + 1..m {
                off += a[p * m + q] * a[p * m + q];
            }
        }
        if off <= 1e-32 * scale {
            break;
        }
        for p in 0..m {
            for q in p + 1..m {
                let apq = a[p * m + q];
                if apq == 0.0 {
                    continue;
                }
                let theta = (a[q * m + q] - a[p * m + p]) / (2.0 * apq);
                let t = theta.signum() / (theta.abs() + (theta * theta + 1.0).sqrt());
                let cs = 1.0 / (t * t + 1.0).sqrt();
                let sn = t * cs;
                for r in 0..m {
                    let (arp, arq) = (a[r * m + p], a[r * m + q]);
                    a[r * m + p] = cs * arp - sn * arq;
                    a[r * m + q] = sn * arp + cs * arq;
                }
                for r in 0..m {
                    let (apr, aqr) = (a[p * m + r], a[q * m + r]);
                    a[p * m + r] = cs * apr - sn * aqr;
                    a[q * m + r] = sn * apr + cs * aqr;
                }
                for r in 0..m {
                    let (vrp, vrq) = (v[r * m + p], v[r * m + q]);
                    v[r * m + p] = cs * vrp - sn * vrq;
                    v[r * m + q] = sn * vrp + cs * vrq;
                }
            }
        }
    }
    let mut idx: Vec<usize> = (0..m).collect();
    idx.sort_by(|&i, &j| a[i * m + i].total_cmp(&a[j * m + j]));
    let evals = idx.iter().map(|&i| a[i * m + i]).collect();
    let mut evecs = vec![0.0; m * m];
    for (newc, &oldc) in idx.iter().enumerate() {
        for r in 0..m {
            evecs[r * m + newc] = v[r * m + oldc];
        }
    }
    (evals, evecs)
}

/// SplitMix64: small deterministic generator for the ground-state start vectors.
fn splitmix(state: &mut u64) -> f64 {
    *state = state.wrapping_add(0x9E3779B97F4A7C15);
    let mut z = *state;
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58476D1CE4E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D049BB133111EB);
    z ^= z >> 31;
    (z >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
}

impl SplitStep {
    /// Validate the configuration and precompute FFT plans and all phase tables.
    pub fn new(cfg: SplitStepConfig) -> Result<SplitStep> {
        let SplitStepConfig {
            start,
            dx,
            n,
            potential,
            c,
            hbar,
            dt,
            t0,
            order,
            drive,
            absorber,
            imaginary_time,
        } = cfg;
        if n < 2 {
            return Err(InputError::range("n", "an integer >= 2", n).into());
        }
        if !start.is_finite() {
            return Err(InputError::range("start", "a finite number", start).into());
        }
        check_positive("dx", dx)?;
        check_positive("c", c)?;
        check_positive("hbar", hbar)?;
        if !t0.is_finite() {
            return Err(InputError::range("t0", "a finite number", t0).into());
        }
        if imaginary_time {
            check_positive("dt", dt)
                .map_err(|_| InputError::range("dt", "a finite number > 0 (imaginary-time step)", dt))?;
        } else if !(dt.is_finite() && dt != 0.0) {
            return Err(InputError::range("dt", "a finite nonzero number", dt).into());
        }
        if potential.len() != n {
            return Err(InputError::Length {
                argument: "potential".into(),
                expected: n,
                got: potential.len(),
            }
            .into());
        }
        check_finite("potential", &potential)?;
        if imaginary_time && order == SplitOrder::Fourth {
            return Err(InputError::range(
                "order",
                "\"second\" in imaginary time (the fourth-order composition has a negative sub-step, unstable for diffusion)",
                "fourth",
            )
            .into());
        }
        if let Some(ab) = &absorber {
            if imaginary_time {
                return Err(InputError::range("absorber", "None in imaginary time", "an absorber").into());
            }
            match ab {
                Absorber::Mask(m) => {
                    if m.len() != n {
                        return Err(InputError::Length {
                            argument: "absorber".into(),
                            expected: n,
                            got: m.len(),
                        }
                        .into());
                    }
                    if let Some(i) = m.iter().position(|v| !(v.is_finite() && (0.0..=1.0).contains(v))) {
                        return Err(InputError::range(
                            "absorber",
                            "a mask with values in [0, 1]",
                            format!("{} at index {i}", m[i]),
                        )
                        .into());
                    }
                }
                Absorber::Cap(w) => {
                    if w.len() != n {
                        return Err(InputError::Length {
                            argument: "absorber".into(),
                            expected: n,
                            got: w.len(),
                        }
                        .into());
                    }
                    if let Some(i) = w.iter().position(|v| !(v.is_finite() && *v >= 0.0)) {
                        return Err(InputError::range(
                            "absorber",
                            "a complex absorbing potential W >= 0 (finite)",
                            format!("{} at index {i}", w[i]),
                        )
                        .into());
                    }
                    if dt < 0.0 {
                        return Err(InputError::range("dt", "> 0 with a complex absorbing potential", dt).into());
                    }
                }
            }
        }
        let tables = match order {
            SplitOrder::Second => 4,
            SplitOrder::Fourth => 6,
        };
        let bytes = (n as u64) * (16 * tables + 8 * 4);
        check_memory("n", bytes, "use fewer grid points")?;

        let mut planner = FftPlanner::<f64>::new();
        let fwd = planner.plan_fft_forward(n);
        let inv = planner.plan_fft_inverse(n);
        let scratch_len = fwd.get_inplace_scratch_len().max(inv.get_inplace_scratch_len());

        let (weights, kin_w, kin_index): (Vec<f64>, Vec<f64>, Vec<usize>) = match order {
            SplitOrder::Second => (vec![1.0], vec![1.0], vec![0]),
            SplitOrder::Fourth => {
                let (w1, w0) = yoshida_weights();
                (vec![w1, w0, w1], vec![w1, w0], vec![0, 1, 0])
            }
        };
        let mut offsets = Vec::with_capacity(weights.len());
        let mut acc = 0.0;
        for &w in &weights {
            offsets.push(acc + 0.5 * w);
            acc += w;
        }
        let x: Vec<f64> = (0..n).map(|j| start + j as f64 * dx).collect();
        let k = wavenumbers(n, dx);
        let inv_n = 1.0 / n as f64;
        let factor = |energy: f64, w: f64| -> Complex64 {
            let a = energy * w * dt / hbar;
            if imaginary_time {
                Complex64::new((-a).exp(), 0.0)
            } else {
                Complex64::from_polar(1.0, -a)
            }
        };
        let kin = kin_w
            .iter()
            .map(|&w| k.iter().map(|&kk| factor(c * kk * kk, w) * inv_n).collect())
            .collect();
        // In imaginary time the potential is shifted by its minimum (a constant that the
        // renormalisation removes), so that no factor exceeds 1.
        let vshift = if imaginary_time {
            potential.iter().cloned().fold(f64::INFINITY, f64::min)
        } else {
            0.0
        };
        let kick_table = |w: f64, masked: bool| -> Vec<Complex64> {
            (0..n)
                .map(|j| {
                    let mut z = factor(potential[j] - vshift, w);
                    match &absorber {
                        Some(Absorber::Cap(wc)) => z *= (-wc[j] * w * dt / hbar).exp(),
                        Some(Absorber::Mask(m)) if masked => z *= m[j],
                        _ => {}
                    }
                    z
                })
                .collect()
        };
        let s = weights.len();
        let kick_open = kick_table(0.5 * weights[0], false);
        let kick_inner = if s > 1 {
            kick_table(0.5 * (weights[0] + weights[1]), false)
        } else {
            Vec::new()
        };
        let kick_boundary = kick_table(0.5 * (weights[s - 1] + weights[0]), true);
        let kick_close = kick_table(0.5 * weights[s - 1], true);

        let mut out = SplitStep {
            start,
            dx,
            n,
            c,
            hbar,
            dt,
            t0,
            order,
            imaginary: imaginary_time,
            potential,
            drive: None,
            absorber,
            x,
            k,
            weights,
            offsets,
            kin,
            kin_index,
            kick_open,
            kick_inner,
            kick_boundary,
            kick_close,
            fwd,
            inv,
            scratch_len,
            par_threshold: DEFAULT_PAR_THRESHOLD,
        };
        out.set_drive(drive)?;
        Ok(out)
    }

    /// Attach (or with `None` remove) the drive f(t)·V₁(x). Typical use: build without a
    /// drive, call [`drive_sample_times`](Self::drive_sample_times), evaluate f there, attach.
    pub fn set_drive(&mut self, drive: Option<Drive>) -> Result<()> {
        if let Some(d) = &drive {
            if self.imaginary {
                return Err(InputError::range("drive", "None in imaginary time", "a drive").into());
            }
            if d.v1.len() != self.n {
                return Err(InputError::Length {
                    argument: "drive.v1".into(),
                    expected: self.n,
                    got: d.v1.len(),
                }
                .into());
            }
            check_finite("drive.v1", &d.v1)?;
            check_finite("drive.f", &d.f)?;
        }
        self.drive = drive;
        Ok(())
    }

    /// Samples of f needed per step for `sampling`: 1, or 3 for `Fourth` with `Substeps`.
    pub fn samples_per_step(&self, sampling: DriveSampling) -> usize {
        match sampling {
            DriveSampling::Substeps => self.weights.len(),
            DriveSampling::Midpoint => 1,
        }
    }

    /// The times (step-major) at which the drive amplitude f must be given for a run of
    /// `steps` steps: t0 + (m + o_s)·dt with o_s the sub-step midpoints
    /// (`Second`: 1/2; `Fourth`+`Substeps`: w₁/2 ≈ 0.6756, 1/2, 1 − w₁/2 ≈ 0.3244;
    /// `Midpoint`: 1/2).
    pub fn drive_sample_times(&self, steps: usize, sampling: DriveSampling) -> Vec<f64> {
        let spp = self.samples_per_step(sampling);
        let mut t = Vec::with_capacity(steps.saturating_mul(spp));
        for m in 0..steps {
            for s in 0..spp {
                let o = if spp == 1 { 0.5 } else { self.offsets[s] };
                t.push(self.t0 + (m as f64 + o) * self.dt);
            }
        }
        t
    }

    /// Grid size from which the pointwise multiplies of `run` (and of `ground_states` with a
    /// single state) use rayon. Default `usize::MAX` (off: not faster on 2 cores).
    /// `run_many` always parallelises over packets instead.
    pub fn set_parallel_threshold(&mut self, n: usize) {
        self.par_threshold = n;
    }

    pub fn n(&self) -> usize {
        self.n
    }
    pub fn dx(&self) -> f64 {
        self.dx
    }
    pub fn dt(&self) -> f64 {
        self.dt
    }
    pub fn start(&self) -> f64 {
        self.start
    }
    pub fn order(&self) -> SplitOrder {
        self.order
    }
    /// Grid points x_j = start + j·dx.
    pub fn grid_x(&self) -> &[f64] {
        &self.x
    }
    /// Wave numbers k_p = 2π·fftfreq(n, dx) (numpy order).
    pub fn wavenumbers(&self) -> &[f64] {
        &self.k
    }

    fn fval(&self, f: &[f64], sampling: DriveSampling, step: usize, s: usize) -> f64 {
        match sampling {
            DriveSampling::Substeps => f[step * self.weights.len() + s],
            DriveSampling::Midpoint => f[step],
        }
    }

    /// Σ f·w/2 of a kick (units of dt).
    fn drive_weight(&self, d: &Drive, kind: Kick, step: usize) -> f64 {
        let w = &self.weights;
        let last = w.len() - 1;
        let f = |st: usize, s: usize| self.fval(&d.f, d.sampling, st, s);
        match kind {
            Kick::Open => 0.5 * f(step, 0) * w[0],
            Kick::Inner(s) => 0.5 * (f(step, s - 1) * w[s - 1] + f(step, s) * w[s]),
            Kick::Boundary => 0.5 * (f(step - 1, last) * w[last] + f(step, 0) * w[0]),
            Kick::Close => 0.5 * f(step, last) * w[last],
        }
    }

    fn apply_kick(&self, psi: &mut [Complex64], kind: Kick, step: usize, par: bool) {
        let table = match kind {
            Kick::Open => &self.kick_open,
            Kick::Inner(_) => &self.kick_inner,
            Kick::Boundary => &self.kick_boundary,
            Kick::Close => &self.kick_close,
        };
        match &self.drive {
            Some(d) => {
                let b = self.drive_weight(d, kind, step);
                mul_drive(psi, table, &d.v1, -b * self.dt / self.hbar, par);
            }
            None => mul(psi, table, par),
        }
    }

    /// One step. On entry `open` tells whether the closing half-kick of the previous
    /// step is still pending; on exit the closing half-kick of this step is pending.
    fn step(&self, psi: &mut [Complex64], scratch: &mut [Complex64], step: usize, open: bool, par: bool) {
        self.apply_kick(psi, if open { Kick::Boundary } else { Kick::Open }, step, par);
        for s in 0..self.weights.len() {
            if s > 0 {
                self.apply_kick(psi, Kick::Inner(s), step, par);
            }
            self.fwd.process_with_scratch(psi, scratch);
            mul(psi, &self.kin[self.kin_index[s]], par);
            self.inv.process_with_scratch(psi, scratch);
        }
    }

    /// f at the record after `m` steps, linearly interpolated between the nearest samples
    /// on either side (extrapolated from the two nearest when one side is missing, constant
    /// when there is a single sample).
    fn drive_value_at(&self, m: usize) -> f64 {
        let Some(d) = &self.drive else { return 0.0 };
        let spp = self.samples_per_step(d.sampling);
        let nf = d.f.len() / spp;
        let mut pts = [(0.0f64, 0.0f64); 12];
        let mut np = 0;
        for st in m.saturating_sub(2)..(m + 2).min(nf) {
            for s in 0..spp {
                let o = if spp == 1 { 0.5 } else { self.offsets[s] };
                pts[np] = (st as f64 - m as f64 + o, d.f[st * spp + s]);
                np += 1;
            }
        }
        let pts = &mut pts[..np];
        pts.sort_by(|a, b| a.0.total_cmp(&b.0));
        let below = pts.iter().rposition(|p| p.0 < 0.0);
        let above = pts.iter().position(|p| p.0 > 0.0);
        let lerp = |a: (f64, f64), b: (f64, f64)| a.1 + (b.1 - a.1) * (0.0 - a.0) / (b.0 - a.0);
        match (below, above) {
            (Some(i), Some(j)) => lerp(pts[i], pts[j]),
            (None, Some(j)) if j + 1 < pts.len() => lerp(pts[j], pts[j + 1]),
            (Some(i), None) if i >= 1 => lerp(pts[i - 1], pts[i]),
            (None, Some(j)) => pts[j].1,
            (Some(i), None) => pts[i].1,
            (None, None) => 0.0,
        }
    }

    fn observe(&self, psi: &[Complex64], work: &mut [Complex64], scratch: &mut [Complex64], fnow: f64) -> Observables {
        let (mut s0, mut sx, mut sv, mut sv1) = (0.0, 0.0, 0.0, 0.0);
        for ((z, &x), &v) in psi.iter().zip(&self.x).zip(&self.potential) {
            let p = z.norm_sqr();
            s0 += p;
            sx += x * p;
            sv += v * p;
        }
        if let Some(d) = &self.drive {
            sv1 = psi.iter().zip(&d.v1).map(|(z, v)| z.norm_sqr() * v).sum();
        }
        work.copy_from_slice(psi);
        self.fwd.process_with_scratch(work, scratch);
        let (mut k0, mut k1, mut k2) = (0.0, 0.0, 0.0);
        for (z, &kk) in work.iter().zip(&self.k) {
            let p = z.norm_sqr();
            k0 += p;
            k1 += kk * p;
            k2 += kk * kk * p;
        }
        Observables {
            norm: s0 * self.dx,
            mean_x: sx / s0,
            mean_p: self.hbar * k1 / k0,
            energy: self.c * k2 / k0 + (sv + fnow * sv1) / s0,
        }
    }

    /// Expectation values of `psi` (length n); `drive_value` is f(t) for ⟨V(t)⟩
    /// (ignored without a drive).
    pub fn observables(&self, psi: &[Complex64], drive_value: f64) -> Result<Observables> {
        check_state("psi", psi, self.n, 0)?;
        if !drive_value.is_finite() {
            return Err(InputError::range("drive_value", "a finite number", drive_value).into());
        }
        let mut work = vec![Complex64::new(0.0, 0.0); self.n];
        let mut scratch = vec![Complex64::new(0.0, 0.0); self.scratch_len];
        Ok(self.observe(psi, &mut work, &mut scratch, drive_value))
    }

    fn n_records(steps: usize, record_every: usize) -> usize {
        1 + steps / record_every + usize::from(!steps.is_multiple_of(record_every))
    }

    fn check_run_args(&self, steps: usize, record_every: usize) -> Result<()> {
        if record_every < 1 {
            return Err(InputError::range("record_every", "an integer >= 1", record_every).into());
        }
        if let Some(d) = &self.drive {
            let spp = self.samples_per_step(d.sampling);
            let need = steps.saturating_mul(spp);
            if d.f.len() < need {
                return Err(InputError::range(
                    "drive.f",
                    format!(
                        "an array of at least {need} samples (steps = {steps} × {spp} per step, at drive_sample_times)"
                    ),
                    format!("{} samples", d.f.len()),
                )
                .into());
            }
        }
        Ok(())
    }

    fn renormalise(&self, psi: &mut [Complex64]) -> Result<()> {
        let nrm = sum_sq(psi) * self.dx;
        if !(nrm.is_finite() && nrm > 0.0) {
            return Err(NumericalError::EigenFailed(format!(
                "imaginary-time propagation: the state norm became {nrm}; use a smaller dt or a better start state"
            ))
            .into());
        }
        let s = 1.0 / nrm.sqrt();
        psi.iter_mut().for_each(|z| *z *= s);
        Ok(())
    }

    /// Propagate `psi0` (length n) by `steps` steps, recording every `record_every`
    /// steps (record 0 = initial state; the final state is always recorded).
    ///
    /// `progress(steps_done)` is called after every max(steps/200, 1) steps (and after
    /// the last); returning `false` cancels: the state reached is closed, recorded, and
    /// the run returned with `cancelled = true`.
    ///
    /// In imaginary time the initial state is normalised and every state renormalised.
    pub fn run(
        &self,
        psi0: &[Complex64],
        steps: usize,
        record_every: usize,
        progress: &mut dyn FnMut(usize) -> bool,
    ) -> Result<Run> {
        check_state("psi0", psi0, self.n, 0)?;
        self.check_run_args(steps, record_every)?;
        let bytes = (Self::n_records(steps, record_every) as u64).saturating_mul(self.n as u64 * 16);
        check_memory("record_every", bytes, "record fewer snapshots: raise record_every")?;
        self.run_inner(psi0, steps, record_every, progress, self.n >= self.par_threshold)
    }

    fn run_inner(
        &self,
        psi0: &[Complex64],
        steps: usize,
        record_every: usize,
        progress: &mut dyn FnMut(usize) -> bool,
        par: bool,
    ) -> Result<Run> {
        let n = self.n;
        let n_rec = Self::n_records(steps, record_every);
        let too_large = |_| InputError::TooLarge {
            argument: "record_every".into(),
            needed_bytes: (n_rec as u64).saturating_mul(n as u64 * 16),
            available_bytes: crate::error::available_memory_bytes().unwrap_or(0),
            hint: "record fewer snapshots: raise record_every".into(),
        };
        let mut states: Vec<Complex64> = Vec::new();
        states.try_reserve_exact(n_rec.saturating_mul(n)).map_err(too_large)?;
        let mut run = Run {
            n,
            record_steps: Vec::with_capacity(n_rec),
            times: Vec::with_capacity(n_rec),
            states,
            norm: Vec::with_capacity(n_rec),
            mean_x: Vec::with_capacity(n_rec),
            mean_p: Vec::with_capacity(n_rec),
            energy: Vec::with_capacity(n_rec),
            autocorrelation: Vec::with_capacity(n_rec),
            absorbed_norm: None,
            steps_done: 0,
            cancelled: false,
        };
        let zero = Complex64::new(0.0, 0.0);
        let mut psi = psi0.to_vec();
        if self.imaginary {
            self.renormalise(&mut psi)?;
        }
        let init = psi.clone();
        let mut scratch = vec![zero; self.scratch_len];
        let mut work = vec![zero; n];

        let record = |run: &mut Run, psi: &[Complex64], work: &mut [Complex64], scratch: &mut [Complex64], m: usize| {
            let o = self.observe(psi, work, scratch, self.drive_value_at(m));
            let ac: Complex64 = init.iter().zip(psi).map(|(a, b)| a.conj() * b).sum::<Complex64>() * self.dx;
            run.record_steps.push(m);
            run.times.push(self.t0 + m as f64 * self.dt);
            run.states.extend_from_slice(psi);
            run.norm.push(o.norm);
            run.mean_x.push(o.mean_x);
            run.mean_p.push(o.mean_p);
            run.energy.push(o.energy);
            run.autocorrelation.push(ac);
        };
        record(&mut run, &psi, &mut work, &mut scratch, 0);

        let chunk = (steps / 200).max(1);
        let mut open = false;
        let mut done = 0;
        for st in 0..steps {
            self.step(&mut psi, &mut scratch, st, open, par);
            open = true;
            done = st + 1;
            if self.imaginary {
                self.renormalise(&mut psi)?;
            }
            if done.is_multiple_of(record_every) || done == steps {
                self.apply_kick(&mut psi, Kick::Close, st, par);
                open = false;
                if self.imaginary {
                    self.renormalise(&mut psi)?;
                }
                record(&mut run, &psi, &mut work, &mut scratch, done);
            }
            if (done.is_multiple_of(chunk) || done == steps) && !progress(done) {
                if open {
                    self.apply_kick(&mut psi, Kick::Close, st, par);
                    if self.imaginary {
                        self.renormalise(&mut psi)?;
                    }
                    record(&mut run, &psi, &mut work, &mut scratch, done);
                }
                run.cancelled = done < steps;
                break;
            }
        }
        run.steps_done = done;
        if self.absorber.is_some() {
            let n0 = run.norm[0];
            let n1 = *run.norm.last().unwrap_or(&n0);
            run.absorbed_norm = Some(1.0 - n1 / n0);
        }
        Ok(run)
    }

    /// Propagate several independent packets in parallel (rayon; FFT plans shared, one
    /// scratch per packet). `psi0s` is flat, count × n row-major. `progress` is called on
    /// the calling thread with the total number of steps done over all packets (out of
    /// count × steps), at most about 200 times; returning `false` cancels all packets
    /// (each returns its state at cancellation, see [`Run::cancelled`]).
    pub fn run_many(
        &self,
        psi0s: &[Complex64],
        steps: usize,
        record_every: usize,
        progress: &mut dyn FnMut(usize) -> bool,
    ) -> Result<Vec<Run>> {
        let n = self.n;
        if psi0s.is_empty() || !psi0s.len().is_multiple_of(n) {
            return Err(InputError::range(
                "psi0s",
                format!("a non-empty array of whole states (length a multiple of n = {n})"),
                format!("length {}", psi0s.len()),
            )
            .into());
        }
        let count = psi0s.len() / n;
        for (i, p) in psi0s.chunks(n).enumerate() {
            check_state(&format!("psi0s[{i}]"), p, n, 0)?;
        }
        self.check_run_args(steps, record_every)?;
        let bytes = (Self::n_records(steps, record_every) as u64)
            .saturating_mul(n as u64 * 16)
            .saturating_mul(count as u64);
        check_memory(
            "record_every",
            bytes,
            "record fewer snapshots: raise record_every, or run fewer packets at once",
        )?;

        let total = count * steps;
        let report_every = (total / 200).max(1);
        if rayon::current_thread_index().is_some() {
            // Called from inside a rayon pool: blocking this worker on the report channel
            // could starve a small pool, so run the packets one after the other here.
            let mut base = 0;
            let mut reported = 0;
            let mut stop = false;
            let mut runs = Vec::with_capacity(count);
            for p in psi0s.chunks(n) {
                let packet_steps = if stop { 0 } else { steps };
                let mut cb = |done: usize| {
                    if base + done >= reported + report_every || base + done == total {
                        reported = base + done;
                        stop = !progress(base + done);
                    }
                    !stop
                };
                let r = self.run_inner(p, packet_steps, record_every, &mut cb, false)?;
                runs.push(Run {
                    cancelled: stop && steps > 0,
                    ..r
                });
                base += steps;
            }
            return Ok(runs);
        }
        let cancel = AtomicBool::new(false);
        let (tx, rx) = mpsc::channel::<usize>();
        let results: Vec<Result<Run>> = std::thread::scope(|sc| {
            let cancel = &cancel;
            let handle = sc.spawn(move || {
                psi0s
                    .par_chunks(n)
                    .map_with(tx, |tx, p| {
                        let mut last = 0;
                        let mut cb = |done: usize| {
                            let _ = tx.send(done - last);
                            last = done;
                            !cancel.load(Ordering::Relaxed)
                        };
                        if cancel.load(Ordering::Relaxed) {
                            self.run_inner(p, 0, record_every, &mut cb, false).map(|mut r| {
                                r.cancelled = steps > 0;
                                r
                            })
                        } else {
                            self.run_inner(p, steps, record_every, &mut cb, false)
                        }
                    })
                    .collect()
            });
            let mut done = 0;
            let mut reported = 0;
            for inc in rx.iter() {
                done += inc;
                if done >= reported + report_every && !cancel.load(Ordering::Relaxed) {
                    reported = done;
                    if !progress(done) {
                        cancel.store(true, Ordering::Relaxed);
                    }
                }
            }
            if done > reported && !cancel.load(Ordering::Relaxed) {
                progress(done);
            }
            handle.join().unwrap_or_else(|e| std::panic::resume_unwind(e))
        });
        results.into_iter().collect()
    }

    /// H ψ on the grid (FFT kinetic + real potential), into `out`.
    fn apply_h(&self, psi: &[Complex64], out: &mut [Complex64], scratch: &mut [Complex64]) {
        out.copy_from_slice(psi);
        self.fwd.process_with_scratch(out, scratch);
        let inv_n = 1.0 / self.n as f64;
        for (z, &kk) in out.iter_mut().zip(&self.k) {
            *z *= self.c * kk * kk * inv_n;
        }
        self.inv.process_with_scratch(out, scratch);
        for ((o, p), v) in out.iter_mut().zip(psi).zip(&self.potential) {
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
    /// are O(dτ⁴) accurate. Errors: `NotConverged` after `max_steps` steps.
    pub fn ground_states(&self, count: usize, tol: f64, max_steps: usize, seed: u64) -> Result<GroundStates> {
        let n = self.n;
        if !self.imaginary {
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
        let mut rng = seed;
        let mut states: Vec<Complex64> = (0..count * n)
            .map(|_| Complex64::new(splitmix(&mut rng), 0.0))
            .collect();
        let sl = self.scratch_len.max(1);
        let mut scratches = vec![zero; count * sl];
        let mut work = vec![zero; n];
        let dx = self.dx;

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
                let dtau = ((steps - 1) % CHECK_EVERY + 1) as f64 * self.dt;
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
            return Err(NumericalError::NotConverged {
                iterations: steps,
                tol,
                energies: e_prev,
                residuals: rates,
            }
            .into());
        }

        // Rayleigh-Ritz in the span of the states (real symmetric up to round-off: the
        // start vectors are real and every factor maps real states to real states).
        let mut hs = vec![zero; count * n];
        for (p, h) in states.chunks(n).zip(hs.chunks_mut(n)) {
            self.apply_h(p, h, &mut scratches[..sl]);
        }
        let mut hm = vec![0.0; count * count];
        for i in 0..count {
            for j in 0..count {
                let pi = &states[i * n..(i + 1) * n];
                let hj = &hs[j * n..(j + 1) * n];
                hm[i * count + j] = pi.iter().zip(hj).map(|(a, b)| (a.conj() * b).re).sum::<f64>() * dx;
            }
        }
        for i in 0..count {
            for j in i + 1..count {
                let a = 0.5 * (hm[i * count + j] + hm[j * count + i]);
                hm[i * count + j] = a;
                hm[j * count + i] = a;
            }
        }
        let (energies, u) = jacobi_eigh(&mut hm, count);
        let mut out = vec![zero; count * n];
        for (kcol, o) in out.chunks_mut(n).enumerate() {
            for j in 0..count {
                let w = u[j * count + kcol];
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

/// Seconds per pair of bare in-place FFTs (forward + inverse) of length `n`, best of
/// `reps` timed batches: the floor a split step (two FFTs plus two multiplies) is
/// compared against in the benchmark.
pub fn bare_fft_pair_seconds(n: usize, reps: usize) -> f64 {
    let n = n.max(1);
    let mut planner = FftPlanner::new();
    let fwd = planner.plan_fft_forward(n);
    let inv = planner.plan_fft_inverse(n);
    let mut buf: Vec<Complex64> = (0..n).map(|j| Complex64::new((j as f64 * 0.37).sin(), 0.0)).collect();
    let mut scratch = vec![Complex64::new(0.0, 0.0); fwd.get_inplace_scratch_len().max(inv.get_inplace_scratch_len())];
    let inner = (4_000_000 / n).clamp(1, 10_000);
    let mut best = f64::INFINITY;
    for _ in 0..reps.max(1) {
        let t = std::time::Instant::now();
        for i in 0..inner {
            fwd.process_with_scratch(&mut buf, &mut scratch);
            inv.process_with_scratch(&mut buf, &mut scratch);
            if i % 16 == 15 {
                // Each pair multiplies by n; rescale rarely so values stay finite.
                let s = (n as f64).powi(-16);
                buf.iter_mut().for_each(|z| *z *= s);
            }
        }
        best = best.min(t.elapsed().as_secs_f64() / inner as f64);
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn simd_complex_multiply_matches_scalar() {
        // The AVX2 kernel (two complex numbers per register, scalar tail) against
        // num-complex's multiplication, for even and odd lengths.
        for n in [0usize, 1, 2, 7, 1024, 1031] {
            let a0: Vec<Complex64> = (0..n).map(|j| Complex64::new((j as f64 * 0.7).sin(), (j as f64 * 1.3).cos() - 0.2)).collect();
            let b: Vec<Complex64> = (0..n).map(|j| Complex64::from_polar(1.0 + 0.1 * j as f64, j as f64 * 0.01)).collect();
            let mut a = a0.clone();
            mul_seq(&mut a, &b);
            for j in 0..n {
                let want = a0[j] * b[j];
                assert!((a[j] - want).norm() <= 4.0 * f64::EPSILON * want.norm().max(1e-300), "n={n} j={j}");
            }
        }
    }
    use crate::error::Error;
    use std::time::Instant;

    fn c(re: f64) -> Complex64 {
        Complex64::new(re, 0.0)
    }

    /// Normalised Gaussian e^{-(x-x0)²/(4σ²) + i k0 x} sampled on the grid.
    fn gaussian(x: &[f64], dx: f64, x0: f64, sigma: f64, k0: f64) -> Vec<Complex64> {
        let mut v: Vec<Complex64> = x
            .iter()
            .map(|&xx| Complex64::from_polar((-(xx - x0).powi(2) / (4.0 * sigma * sigma)).exp(), k0 * xx))
            .collect();
        let nrm = (sum_sq(&v) * dx).sqrt();
        v.iter_mut().for_each(|z| *z /= nrm);
        v
    }

    fn width(psi: &[Complex64], x: &[f64]) -> f64 {
        let s0: f64 = psi.iter().map(|z| z.norm_sqr()).sum();
        let m1: f64 = psi.iter().zip(x).map(|(z, x)| z.norm_sqr() * x).sum::<f64>() / s0;
        let m2: f64 = psi.iter().zip(x).map(|(z, x)| z.norm_sqr() * x * x).sum::<f64>() / s0;
        (m2 - m1 * m1).sqrt()
    }

    fn l2_diff(a: &[Complex64], b: &[Complex64], dx: f64) -> f64 {
        (a.iter().zip(b).map(|(p, q)| (p - q).norm_sqr()).sum::<f64>() * dx).sqrt()
    }

    fn grid(start: f64, stop: f64, n: usize) -> (f64, Vec<f64>) {
        let dx = (stop - start) / n as f64;
        (dx, (0..n).map(|j| start + j as f64 * dx).collect())
    }

    fn yes(_: usize) -> bool {
        true
    }

    // Source: free Gaussian spreading σ(t) = σ0 sqrt(1 + (ħt/(2mσ0²))²), Griffiths,
    // Introduction to Quantum Mechanics, Problem 2.43 (2nd ed. 2.22); centre moves at ħk0/m.
    #[test]
    fn free_gaussian_spreading() {
        let (start, stop, n) = (-80.0, 80.0, 1024);
        let (dx, x) = grid(start, stop, n);
        let (sigma0, k0) = (1.0, 1.5);
        let mut cfg = SplitStepConfig::new(start, dx, n, vec![0.0; n], 0.5, 1.0, 0.05);
        cfg.order = SplitOrder::Second;
        let sp = SplitStep::new(cfg).unwrap();
        let psi0 = gaussian(&x, dx, 0.0, sigma0, k0);
        let run = sp.run(&psi0, 200, 20, &mut yes).unwrap();
        assert_eq!(run.times.len(), 11);
        let m = 1.0; // c = ħ²/2m = 1/2
        for (r, &t) in run.times.iter().enumerate() {
            let s = &run.states[r * n..(r + 1) * n];
            let expect = sigma0 * (1.0 + (t / (2.0 * m * sigma0 * sigma0)).powi(2)).sqrt();
            assert!(
                (width(s, &x) - expect).abs() < 1e-9 * expect,
                "t={t} w={} expect={expect}",
                width(s, &x)
            );
            assert!((run.mean_x[r] - k0 * t / m).abs() < 1e-9);
            assert!((run.mean_p[r] - k0).abs() < 1e-9);
            // E = ħ²k0²/2m + ħ²/(8mσ0²)
            assert!((run.energy[r] - (0.5 * k0 * k0 + 1.0 / 8.0)).abs() < 1e-9);
        }
    }

    // Source: coherent state of the harmonic oscillator, ⟨x⟩ = x0 cos ωt, ⟨p⟩ = −mωx0 sin ωt,
    // constant width sqrt(ħ/2mω) (e.g. Griffiths Problem 3.35; Cohen-Tannoudji Complement G_V).
    #[test]
    fn coherent_state_in_harmonic_well() {
        let (start, stop, n) = (-16.0, 16.0, 256);
        let (dx, x) = grid(start, stop, n);
        let w: f64 = 1.3;
        let v: Vec<f64> = x.iter().map(|x| 0.5 * w * w * x * x).collect();
        let mut cfg = SplitStepConfig::new(start, dx, n, v, 0.5, 1.0, 0.01);
        cfg.order = SplitOrder::Fourth;
        let sp = SplitStep::new(cfg).unwrap();
        let x0 = 3.0;
        let s0 = (1.0 / (2.0 * w)).sqrt();
        let psi0 = gaussian(&x, dx, x0, s0, 0.0);
        let steps = (2.0 * std::f64::consts::PI / w / 0.01).round() as usize;
        let run = sp.run(&psi0, steps, 25, &mut yes).unwrap();
        let mut worst: f64 = 0.0;
        for (r, &t) in run.times.iter().enumerate() {
            let s = &run.states[r * n..(r + 1) * n];
            worst = worst.max((run.mean_x[r] - x0 * (w * t).cos()).abs());
            assert!((run.mean_p[r] + w * x0 * (w * t).sin()).abs() < 1e-7);
            assert!((width(s, &x) - s0).abs() < 1e-7, "width {}", width(s, &x));
        }
        assert!(worst < 1e-7, "worst ⟨x⟩ error {worst}");
        assert_eq!(*run.record_steps.last().unwrap(), steps);
    }

    /// Dense Fourier-grid Hamiltonian H_jl = V_j δ_jl + (c/n) Σ_p k_p² cos(k_p (x_j − x_l)),
    /// exactly the operator the split-step kinetic factor exponentiates.
    fn dense_propagate(sp: &SplitStep, v: &[f64], psi0: &[Complex64], t: f64) -> Vec<Complex64> {
        let n = sp.n();
        let k = sp.wavenumbers();
        let mut h = vec![0.0; n * n];
        for j in 0..n {
            for l in 0..n {
                let d = (j as f64 - l as f64) * sp.dx();
                let kin: f64 = k.iter().map(|kk| kk * kk * (kk * d).cos()).sum::<f64>() * 0.5 / n as f64;
                h[j * n + l] = kin + if j == l { v[j] } else { 0.0 };
            }
        }
        let (e, u) = jacobi_eigh(&mut h, n);
        let mut out = vec![c(0.0); n];
        for m in 0..n {
            let a: Complex64 = (0..n).map(|j| psi0[j] * u[j * n + m]).sum();
            let a = a * Complex64::from_polar(1.0, -e[m] * t);
            for j in 0..n {
                out[j] += a * u[j * n + m];
            }
        }
        out
    }

    // Source: Strang splitting is second order, Yoshida (1990, Phys. Lett. A 150, 262)
    // triple jump fourth order; reference = exact exponential of the same grid Hamiltonian
    // (dense diagonalisation), so only the splitting error is measured.
    #[test]
    fn global_order_static_potential() {
        let (start, stop, n) = (-8.0, 8.0, 64);
        let (dx, x) = grid(start, stop, n);
        let v: Vec<f64> = x.iter().map(|x| 0.5 * x * x + 0.05 * x.powi(4)).collect();
        let psi0 = gaussian(&x, dx, 1.0, 0.7, 0.5);
        let tf = 1.0;
        let base = SplitStep::new(SplitStepConfig::new(start, dx, n, v.clone(), 0.5, 1.0, 0.1)).unwrap();
        let exact = dense_propagate(&base, &v, &psi0, tf);
        for (order, expect, dts) in [
            (SplitOrder::Second, 2.0, [0.02, 0.01, 0.005]),
            (SplitOrder::Fourth, 4.0, [0.05, 0.025, 0.0125]),
        ] {
            let errs: Vec<f64> = dts
                .iter()
                .map(|&dt| {
                    let mut cfg = SplitStepConfig::new(start, dx, n, v.clone(), 0.5, 1.0, dt);
                    cfg.order = order;
                    let sp = SplitStep::new(cfg).unwrap();
                    let steps = (tf / dt).round() as usize;
                    let r = sp.run(&psi0, steps, steps, &mut yes).unwrap();
                    l2_diff(&r.states[n..], &exact, dx)
                })
                .collect();
            let p1 = (errs[0] / errs[1]).log2();
            let p2 = (errs[1] / errs[2]).log2();
            println!("{order:?}: errors {errs:?}, observed orders {p1:.3} {p2:.3}");
            assert!(
                (p2 - expect).abs() < 0.15 && (p1 - expect).abs() < 0.3,
                "{order:?} orders {p1} {p2}"
            );
        }
    }

    // Source: as above, for V(x,t) = V0 + f(t)V1 with sub-step midpoint samples; the
    // reference is the Fourth scheme at a 16× finer step (error 65536× smaller).
    #[test]
    fn global_order_driven() {
        let (start, stop, n) = (-10.0, 10.0, 128);
        let (dx, x) = grid(start, stop, n);
        let v0: Vec<f64> = x.iter().map(|x| 0.5 * x * x).collect();
        let v1: Vec<f64> = x.to_vec();
        let f = |t: f64| 0.8 * (2.0 * t).sin() + 0.3 * t * t;
        let psi0 = gaussian(&x, dx, 0.5, 0.8, 0.0);
        let tf = 1.0;
        let solve = |order: SplitOrder, sampling: DriveSampling, dt: f64| -> Vec<Complex64> {
            let mut cfg = SplitStepConfig::new(start, dx, n, v0.clone(), 0.5, 1.0, dt);
            cfg.order = order;
            let mut sp = SplitStep::new(cfg).unwrap();
            let steps = (tf / dt).round() as usize;
            let fs = sp.drive_sample_times(steps, sampling).into_iter().map(f).collect();
            sp.set_drive(Some(Drive {
                v1: v1.clone(),
                f: fs,
                sampling,
            }))
            .unwrap();
            let r = sp.run(&psi0, steps, steps, &mut yes).unwrap();
            r.states[n..].to_vec()
        };
        let reference = solve(SplitOrder::Fourth, DriveSampling::Substeps, 0.0125 / 16.0);
        for (order, sampling, expect, dts) in [
            (SplitOrder::Second, DriveSampling::Substeps, 2.0, [0.02, 0.01, 0.005]),
            (SplitOrder::Fourth, DriveSampling::Substeps, 4.0, [0.05, 0.025, 0.0125]),
            (SplitOrder::Fourth, DriveSampling::Midpoint, 2.0, [0.05, 0.025, 0.0125]),
        ] {
            let errs: Vec<f64> = dts
                .iter()
                .map(|&dt| l2_diff(&solve(order, sampling, dt), &reference, dx))
                .collect();
            let p1 = (errs[0] / errs[1]).log2();
            let p2 = (errs[1] / errs[2]).log2();
            println!("driven {order:?}/{sampling:?}: errors {errs:?}, observed orders {p1:.3} {p2:.3}");
            assert!((p2 - expect).abs() < 0.2, "{order:?}/{sampling:?} orders {p1} {p2}");
        }
    }

    // Source: unitarity of exp(−iHt/ħ) (norm conservation) and energy conservation for a
    // time-independent H (any QM textbook; Griffiths §2.1). Split-step is exactly unitary,
    // so the drift is round-off only; its energy oscillates at O(dt²) without drift.
    #[test]
    fn norm_and_energy_conservation() {
        let (start, stop, n) = (-12.0, 12.0, 256);
        let (dx, x) = grid(start, stop, n);
        let v: Vec<f64> = x.iter().map(|x| 0.5 * x * x + 0.3 * (2.0 * x).cos()).collect();
        let sp = SplitStep::new(SplitStepConfig::new(start, dx, n, v, 0.5, 1.0, 0.005)).unwrap();
        let psi0 = gaussian(&x, dx, 2.0, 0.6, 1.0);
        let mut calls = 0;
        let t = Instant::now();
        let run = sp
            .run(&psi0, 100_000, 1000, &mut |_| {
                calls += 1;
                true
            })
            .unwrap();
        let el = t.elapsed();
        assert_eq!(calls, 200);
        let drift = run.norm.iter().map(|nn| (nn - run.norm[0]).abs()).fold(0.0, f64::max);
        let e0 = run.energy[0];
        let de = run.energy.iter().map(|e| (e - e0).abs()).fold(0.0, f64::max);
        println!(
            "1e5 steps n=256: {:.2} s, max norm drift {drift:.2e}, max |E−E0|/E0 {:.2e}",
            el.as_secs_f64(),
            de / e0
        );
        assert!(drift <= 1e-10, "norm drift {drift}");
        assert!(de / e0 < 1e-4, "energy deviation {de}");
        let last = *run.energy.last().unwrap();
        assert!((last - e0).abs() / e0 < 1e-4);
    }

    // Source: absorbing boundaries by a smooth cos^(1/8) mask applied every step (a common
    // grid-method choice); a packet leaving the interior must be removed without reflection.
    #[test]
    fn mask_absorbs_outgoing_packet() {
        let (start, stop, n) = (-100.0, 100.0, 2048);
        let (dx, x) = grid(start, stop, n);
        let width = 30.0;
        let mut cfg = SplitStepConfig::new(start, dx, n, vec![0.0; n], 0.5, 1.0, 0.02);
        cfg.absorber = Some(Absorber::cos_mask(n, dx, width).unwrap());
        let sp = SplitStep::new(cfg).unwrap();
        let psi0 = gaussian(&x, dx, 0.0, 3.0, 3.0);
        let steps = 3000; // t = 60: centre would be at x = 180, beyond the box
        let run = sp.run(&psi0, steps, 500, &mut yes).unwrap();
        let last = &run.states[(run.times.len() - 1) * n..];
        let interior: f64 = last
            .iter()
            .zip(&x)
            .filter(|(_, x)| x.abs() < 100.0 - width)
            .map(|(z, _)| z.norm_sqr())
            .sum::<f64>()
            * dx;
        let absorbed = run.absorbed_norm.unwrap();
        println!(
            "mask: absorbed {absorbed:.6}, left in interior {interior:.2e}, total {:.2e}",
            run.norm.last().unwrap()
        );
        assert!(absorbed >= 0.99);
        assert!(interior <= 1e-3);
    }

    // Source: complex absorbing potential −iW (dt-independent absorption), same criterion.
    #[test]
    fn cap_absorbs_outgoing_packet() {
        let (start, stop, n) = (-100.0, 100.0, 2048);
        let (dx, x) = grid(start, stop, n);
        let width = 30.0;
        let w: Vec<f64> = x
            .iter()
            .map(|&x| {
                let d = x.abs() - (100.0 - width);
                if d > 0.0 {
                    2.0 * (d / width).powi(2)
                } else {
                    0.0
                }
            })
            .collect();
        let mut cfg = SplitStepConfig::new(start, dx, n, vec![0.0; n], 0.5, 1.0, 0.02);
        cfg.absorber = Some(Absorber::Cap(w));
        let sp = SplitStep::new(cfg).unwrap();
        let psi0 = gaussian(&x, dx, 0.0, 3.0, 3.0);
        let run = sp.run(&psi0, 3000, 3000, &mut yes).unwrap();
        let last = &run.states[n..];
        let interior: f64 = last
            .iter()
            .zip(&x)
            .filter(|(_, x)| x.abs() < 100.0 - width)
            .map(|(z, _)| z.norm_sqr())
            .sum::<f64>()
            * dx;
        println!(
            "cap: absorbed {:.6}, interior {interior:.2e}",
            run.absorbed_norm.unwrap()
        );
        assert!(run.absorbed_norm.unwrap() >= 0.99);
        assert!(interior <= 1e-3);
    }

    // Source: harmonic-oscillator spectrum E_n = (n + 1/2)ħω (Griffiths §2.3).
    #[test]
    fn imaginary_time_harmonic_levels() {
        let (start, stop, n) = (-10.0, 10.0, 128);
        let (dx, x) = grid(start, stop, n);
        let w = 1.0;
        let v: Vec<f64> = x.iter().map(|x| 0.5 * w * w * x * x).collect();
        let mut cfg = SplitStepConfig::new(start, dx, n, v, 0.5, 1.0, 0.01);
        cfg.imaginary_time = true;
        let sp = SplitStep::new(cfg).unwrap();
        let t = Instant::now();
        let gs = sp.ground_states(3, 1e-10, 200_000, 7).unwrap();
        println!(
            "ground_states: {:?} in {} steps, {:.3} s",
            gs.energies,
            gs.steps,
            t.elapsed().as_secs_f64()
        );
        for (i, e) in gs.energies.iter().enumerate() {
            assert!((e - (i as f64 + 0.5) * w).abs() < 1e-8, "E{i} = {e}");
        }
        // orthonormal, ground state positive, first excited state odd
        for i in 0..3 {
            for j in 0..3 {
                let ov: Complex64 = gs.states[i * n..(i + 1) * n]
                    .iter()
                    .zip(&gs.states[j * n..(j + 1) * n])
                    .map(|(a, b)| a.conj() * b)
                    .sum::<Complex64>()
                    * dx;
                assert!((ov - c(if i == j { 1.0 } else { 0.0 })).norm() < 1e-10);
            }
        }
        assert!(gs.states[n / 2].re > 0.0);
        // run() in imaginary time converges to the ground state as well
        let psi0 = gaussian(&x, dx, 1.0, 2.0, 0.0);
        let r = sp.run(&psi0, 3000, 3000, &mut yes).unwrap();
        assert!((r.energy[1] - 0.5).abs() < 1e-8 && (r.norm[1] - 1.0).abs() < 1e-12);
    }

    // Source: as above (E_n = (n + 1/2)ħω), on a grid large enough for the parallel path.
    #[test]
    fn imaginary_time_parallel_path() {
        let (start, stop, n) = (-10.0, 10.0, GS_PAR_MIN_N);
        let (dx, x) = grid(start, stop, n);
        let v: Vec<f64> = x.iter().map(|x| 0.5 * x * x).collect();
        let mut cfg = SplitStepConfig::new(start, dx, n, v, 0.5, 1.0, 0.01);
        cfg.imaginary_time = true;
        let gs = SplitStep::new(cfg)
            .unwrap()
            .ground_states(2, 1e-10, 100_000, 3)
            .unwrap();
        assert!(
            (gs.energies[0] - 0.5).abs() < 1e-8 && (gs.energies[1] - 1.5).abs() < 1e-8,
            "{:?}",
            gs.energies
        );
    }

    // Source: independent packets are independent: run_many must equal separate runs.
    #[test]
    fn run_many_matches_run_and_cancels() {
        let (start, stop, n) = (-10.0, 10.0, 128);
        let (dx, x) = grid(start, stop, n);
        let v: Vec<f64> = x.iter().map(|x| 0.5 * x * x).collect();
        let mut cfg = SplitStepConfig::new(start, dx, n, v, 0.5, 1.0, 0.01);
        cfg.order = SplitOrder::Fourth;
        let sp = SplitStep::new(cfg).unwrap();
        let mut flat = Vec::new();
        for i in 0..5 {
            flat.extend(gaussian(&x, dx, i as f64 - 2.0, 0.8, 0.3 * i as f64));
        }
        let mut last = 0;
        let runs = sp
            .run_many(&flat, 300, 70, &mut |d| {
                last = d;
                true
            })
            .unwrap();
        assert_eq!(last, 1500);
        for (i, r) in runs.iter().enumerate() {
            let single = sp.run(&flat[i * n..(i + 1) * n], 300, 70, &mut yes).unwrap();
            assert_eq!(r.record_steps, vec![0, 70, 140, 210, 280, 300]);
            assert_eq!(r.states, single.states);
        }
        // cancellation: single run
        let r = sp.run(&flat[..n], 1000, 100, &mut |d| d < 250).unwrap();
        assert!(r.cancelled);
        assert_eq!(r.steps_done, 250);
        assert_eq!(r.record_steps, vec![0, 100, 200, 250]);
        // the rayon pointwise multiplies give bitwise the same states
        let mut spp = sp.clone();
        spp.set_parallel_threshold(1);
        assert_eq!(spp.run(&flat[..n], 300, 70, &mut yes).unwrap().states, runs[0].states);
        // inside a rayon pool (sequential fallback) the results are the same
        let pool = rayon::ThreadPoolBuilder::new().num_threads(1).build().unwrap();
        let inner = pool.install(|| sp.run_many(&flat, 300, 70, &mut yes)).unwrap();
        assert_eq!(inner, runs);
        // cancellation: many
        // (long runs, so that the calling thread surely sees the first report in time)
        let rs = sp.run_many(&flat, 200_000, 100_000, &mut |d| d < 100).unwrap();
        assert!(rs.iter().all(|r| r.cancelled && r.steps_done < 200_000));
    }

    // Source: linear interpolation/extrapolation is exact for a linear f(t), so the drive
    // value used for ⟨V(t)⟩ at every record must equal f(t_record).
    #[test]
    fn drive_value_at_records_is_exact_for_linear_f() {
        let n = 16;
        for (order, sampling) in [
            (SplitOrder::Second, DriveSampling::Substeps),
            (SplitOrder::Fourth, DriveSampling::Substeps),
            (SplitOrder::Fourth, DriveSampling::Midpoint),
        ] {
            let mut cfg = SplitStepConfig::new(0.0, 0.5, n, vec![0.0; n], 0.5, 1.0, 0.1);
            cfg.t0 = 0.3;
            cfg.order = order;
            let mut sp = SplitStep::new(cfg).unwrap();
            let steps = 5;
            let f = |t: f64| 2.0 - 3.0 * t;
            let fs = sp.drive_sample_times(steps, sampling).into_iter().map(f).collect();
            sp.set_drive(Some(Drive {
                v1: vec![1.0; n],
                f: fs,
                sampling,
            }))
            .unwrap();
            for m in 0..=steps {
                let t = 0.3 + 0.1 * m as f64;
                assert!(
                    (sp.drive_value_at(m) - f(t)).abs() < 1e-12,
                    "{order:?} {sampling:?} m={m}"
                );
            }
            // with V1 = 1 the energy of a record is ⟨T⟩ + f(t)
            let psi: Vec<Complex64> = (0..n).map(|j| c((-(j as f64 - 8.0).powi(2) / 8.0).exp())).collect();
            let r = sp.run(&psi, steps, 2, &mut yes).unwrap();
            let t_kin = sp.observables(&psi, 0.0).unwrap().energy;
            assert!((r.energy[0] - t_kin - f(0.3)).abs() < 1e-12);
            assert_eq!(r.record_steps, vec![0, 2, 4, 5]);
        }
    }

    // Source: the sample-time contract of the drive (module docs).
    #[test]
    fn drive_sample_times_layout() {
        let n = 16;
        let mut cfg = SplitStepConfig::new(0.0, 0.5, n, vec![0.0; n], 0.5, 1.0, 0.1);
        cfg.t0 = 1.0;
        cfg.order = SplitOrder::Fourth;
        let sp = SplitStep::new(cfg).unwrap();
        let t = sp.drive_sample_times(2, DriveSampling::Substeps);
        let (w1, _) = yoshida_weights();
        let expect = [
            1.0 + 0.05 * w1,
            1.05,
            1.1 - 0.05 * w1,
            1.1 + 0.05 * w1,
            1.15,
            1.2 - 0.05 * w1,
        ];
        for (a, b) in t.iter().zip(expect) {
            assert!((a - b).abs() < 1e-14);
        }
        assert_eq!(sp.drive_sample_times(3, DriveSampling::Midpoint).len(), 3);
    }

    // Source: input contract of the crate (error.rs): every invalid input is an InputError.
    #[test]
    fn invalid_inputs_are_input_errors() {
        let n = 8;
        let ok = || SplitStepConfig::new(0.0, 1.0, n, vec![0.0; n], 0.5, 1.0, 0.1);
        let is_input = |r: Result<SplitStep>| matches!(r, Err(Error::Input(_)));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            n: 1,
            potential: vec![0.0],
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepConfig { dt: 0.0, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepConfig { dt: f64::NAN, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            dt: -0.1,
            imaginary_time: true,
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepConfig { c: 0.0, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepConfig { hbar: -1.0, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepConfig { dx: 0.0, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            potential: vec![0.0; 7],
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            potential: vec![f64::INFINITY; 8],
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            imaginary_time: true,
            order: SplitOrder::Fourth,
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            absorber: Some(Absorber::Mask(vec![1.5; 8])),
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            absorber: Some(Absorber::Cap(vec![-1.0; 8])),
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepConfig {
            drive: Some(Drive {
                v1: vec![0.0; 3],
                f: vec![],
                sampling: DriveSampling::Midpoint
            }),
            ..ok()
        })));
        assert!(Absorber::cos_mask(8, 1.0, 5.0).is_err());
        let sp = SplitStep::new(ok()).unwrap();
        let psi = vec![c(1.0); n];
        assert!(matches!(sp.run(&psi[..7], 1, 1, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.run(&vec![c(0.0); n], 1, 1, &mut yes), Err(Error::Input(_))));
        assert!(matches!(
            sp.run(&vec![c(f64::NAN); n], 1, 1, &mut yes),
            Err(Error::Input(_))
        ));
        assert!(matches!(sp.run(&psi, 1, 0, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.run_many(&psi[..5], 1, 1, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.ground_states(1, 1e-8, 10, 0), Err(Error::Input(_))));
        let mut sp2 = SplitStep::new(ok()).unwrap();
        sp2.set_drive(Some(Drive {
            v1: vec![0.0; n],
            f: vec![0.0; 2],
            sampling: DriveSampling::Midpoint,
        }))
        .unwrap();
        assert!(matches!(sp2.run(&psi, 3, 1, &mut yes), Err(Error::Input(_))));
        let spi = SplitStep::new(SplitStepConfig {
            imaginary_time: true,
            ..ok()
        })
        .unwrap();
        assert!(matches!(spi.ground_states(9, 1e-8, 10, 0), Err(Error::Input(_))));
        assert!(matches!(spi.ground_states(1, 0.0, 10, 0), Err(Error::Input(_))));
        assert!(matches!(spi.ground_states(1, 1e-8, 0, 0), Err(Error::Input(_))));
        // zero steps: one record, the initial state
        let r = sp.run(&psi, 0, 5, &mut yes).unwrap();
        assert_eq!(r.times, vec![0.0]);
    }

    /// CPU time of the calling thread in seconds (Linux CLOCK_THREAD_CPUTIME_ID), so that
    /// the timings of serial code are not inflated by other processes on a shared machine.
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

    /// Minimum over 5 blocks of the time per call of `f`: thread CPU time when `cpu`
    /// (serial code), wall time otherwise (parallel code).
    fn best_of(reps: usize, cpu: bool, mut f: impl FnMut()) -> f64 {
        (0..5)
            .map(|_| {
                let c0 = if cpu { thread_time() } else { None };
                let t = Instant::now();
                for _ in 0..reps {
                    f();
                }
                let wall = t.elapsed().as_secs_f64();
                let el = match (c0, if cpu { thread_time() } else { None }) {
                    (Some(a), Some(b)) => b - a,
                    _ => wall,
                };
                el / reps as f64
            })
            .fold(f64::INFINITY, f64::min)
    }

    // Timing (printed, not asserted): the pointwise multiply kernels.
    #[test]
    fn timing_mul() {
        for n in [1024usize, 1 << 14, 1 << 16, 1 << 18] {
            let mut a = vec![Complex64::new(0.3, 0.1); n];
            let b = vec![Complex64::from_polar(1.0, 0.2); n];
            let reps = ((1 << 20) / n).max(4);
            let plain = best_of(reps, true, || mul_kernel(&mut a, &b));
            let disp = best_of(reps, true, || mul_seq(&mut a, &b));
            let par = best_of(reps, false, || mul(&mut a, &b, true));
            println!(
                "mul n={n} (thread CPU time): baseline {:.2} ns/elem, dispatched {:.2} ns/elem; rayon (wall) {:.2} ns/elem",
                plain * 1e9 / n as f64,
                disp * 1e9 / n as f64,
                par * 1e9 / n as f64
            );
        }
    }

    // Timing (printed, not asserted): a step vs two bare in-place FFTs of the same size.
    // Minimum over 5 blocks.
    #[test]
    fn timing_per_step() {
        for (n, steps) in [(1024usize, 2000usize), (1 << 14, 100), (1 << 16, 20), (1 << 18, 8)] {
            let (dx, x) = grid(-50.0, 50.0, n);
            let v: Vec<f64> = x.iter().map(|x| 0.01 * x * x).collect();
            let psi0 = gaussian(&x, dx, 0.0, 2.0, 1.0);
            let mut planner = FftPlanner::<f64>::new();
            let (f, i) = (planner.plan_fft_forward(n), planner.plan_fft_inverse(n));
            let mut buf = psi0.clone();
            let mut scr = vec![c(0.0); f.get_inplace_scratch_len().max(i.get_inplace_scratch_len())];
            let bare = best_of(steps, true, || {
                f.process_with_scratch(&mut buf, &mut scr);
                i.process_with_scratch(&mut buf, &mut scr);
            });
            let mut line = format!("n={n} (thread CPU time; rayon: wall): 2 bare FFTs {:.2} µs", bare * 1e6);
            for (order, label) in [(SplitOrder::Second, "Second"), (SplitOrder::Fourth, "Fourth")] {
                for thr in [usize::MAX, 1] {
                    if n < 1 << 14 && thr == 1 {
                        continue;
                    }
                    let mut cfg = SplitStepConfig::new(-50.0, dx, n, v.clone(), 0.5, 1.0, 0.001);
                    cfg.order = order;
                    let mut sp = SplitStep::new(cfg).unwrap();
                    sp.set_parallel_threshold(thr);
                    // (T(2s) − T(s))/s removes the fixed cost of a run (allocation, the
                    // observables of the first and last record).
                    let t1 = best_of(1, thr != 1, || {
                        sp.run(&psi0, steps, steps, &mut yes).unwrap();
                    });
                    let t2 = best_of(1, thr != 1, || {
                        sp.run(&psi0, 2 * steps, 2 * steps, &mut yes).unwrap();
                    });
                    let per = (t2 - t1) / steps as f64;
                    line += &format!(", {label}{} {:.2} µs", if thr == 1 { "(rayon)" } else { "" }, per * 1e6);
                }
            }
            println!("{line}");
        }
    }
}

