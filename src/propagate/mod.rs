//! Split-step Fourier propagation of wavepackets and condensates on periodic grids in
//! 1, 2 and 3 dimensions.
//!
//! One file per concern: this file builds the propagator and takes steps;
//! [`drive`] the time-dependent term, [`absorber`] the absorbing boundaries,
//! [`records`] runs and their observables (one packet or many in parallel),
//! [`ground`] imaginary-time ground states (linear and Gross-Pitaevskii),
//! [`kernels`] the pointwise multiplies and the nonlinear kick.
//!
//! # Method
//! The time-dependent Schrödinger equation iħ ∂ψ/∂t = Hψ with H = −c ∇² + V(r, t),
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
//! # Grids
//! Any [`PeriodicGrid`]: a [`FourierGrid`](crate::basis::FourierGrid) (1D) or a
//! [`ProductGrid`](crate::basis::ProductGrid) (2D, 3D). States, potentials and absorbing
//! potentials are flat row-major arrays of the grid's `len()` points (last axis contiguous,
//! numpy C order); k² = Σ_a k_a² with k_a = 2π·fftfreq(n_a, dx_a). The 1D and the
//! multi-dimensional paths share every line of the stepping, kick, record and ground-state
//! code; only the FFT of the whole state differs.
//!
//! # Mean-field (Gross-Pitaevskii) term
//! With `nonlinearity` g ≠ 0 the equation is iħ ∂ψ/∂t = [T + V + g|ψ|²]ψ, with ψ normalised
//! to Σ|ψ|² dV = 1, so g includes the atom number N (energy·length^d in d dimensions).
//! During a potential sub-step |ψ| does not change, so that sub-step is solved exactly by
//! ψ ← exp(−i(V + g|ψ|²) w dt/ħ) ψ with |ψ| taken at its start; Strang splitting keeps
//! order 2 and the Yoshida composition order 4 for this nonlinear flow (time-splitting
//! spectral method: Bao, Jaksch & Markowich 2003, J. Comput. Phys. 187, 318). Merging two
//! adjacent potential sub-steps stays exact, so the merged-kick layout above is kept; the
//! phase is computed on the fly in the kick (one pass, one sine/cosine per point) instead
//! of from a precomputed table. With a complex absorbing potential W, |ψ|² decays as
//! e^{−2Wτ/ħ} during the kick and the nonlinear phase is its exact integral
//! g|ψ₀|²·(1 − e^{−2Wτ/ħ})/(2W); with a mask the phases of the two halves of a merged
//! kick use |ψ|² before and after the mask. The drive f(t)·V₁ adds to the same phase.
//!
//! Coupling constants from the s-wave scattering length a and N atoms of mass m
//! ([`crate::model::atoms`]): in 3D g₃ = 4πħ²aN/m (Pitaevskii & Stringari 2003, Eq. 5.3
//! with ψ normalised to 1 instead of N); a quasi-2D gas, frozen in the ground state of a
//! tight harmonic confinement ω_z, has g₂ = g₃/(√(2π) a_z), a_z = √(ħ/mω_z) (Petrov,
//! Holzmann & Shlyapnikov 2000, leading term for a ≪ a_z); a quasi-1D gas with transverse
//! confinement ω_⊥ has g₁ = g₃/(2π a_⊥²) = 2ħω_⊥aN, a_⊥ = √(ħ/mω_⊥) (Olshanii 1998,
//! leading term for a ≪ a_⊥).
//!
//! Observables with g ≠ 0: `energy` is the energy functional
//! E = ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴ dV (divided by the norm, like every observable), the quantity
//! the nonlinear flow conserves; the chemical potential μ = ⟨T⟩ + ⟨V⟩ + gΣ|ψ|⁴ dV of a
//! stationary state is reported by [`SplitStep::ground_states`].
//!
//! # Units and conventions
//! * The mass and the unit system give c = ħ²/(2m) (energy·length²) and ħ
//!   (energy·time); `dt` in time, potentials in energy. Natural units: c = 1/2m, ħ = 1.
//!   The kinetic symbol c·k² is that of the Fourier-grid Hamiltonian
//!   ([`crate::problem::fourier`]); a position-dependent mass does not split exactly and
//!   is not offered here.
//! * ψ(t) = exp(−iHt/ħ) ψ(0); samples ψ_j = ψ(r_j) with Σ|ψ_j|² dV = 1 for a
//!   normalised state (the linear propagator does not rescale input states in real time;
//!   with g ≠ 0 the amplitude matters: give a normalised state).
//! * Imaginary time (τ = it): one step applies exp(−H dτ/ħ) (Strang-split; with g ≠ 0 the
//!   density of each potential sub-step is the one at its start) and renormalises the state
//!   to Σ|ψ|² dV = 1 (a normalised gradient flow: Bao & Du 2004, SIAM J. Sci. Comput. 25, 1674).
//!
//! # Time-dependent potentials
//! V(r, t) = V₀(r) + f(t)·V₁(r). A Python callable cannot be called inside a
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

pub mod absorber;
pub mod drive;
pub mod ground;
pub mod kernels;
pub mod records;

pub use absorber::Absorber;
pub use drive::{Drive, DriveSampling};
pub use ground::GroundStates;
pub use kernels::{bare_fft_pair_seconds, bare_grid_fft_pair_seconds};
pub use records::{Observables, Run};

use std::sync::Arc;

use num_complex::Complex64;

use crate::basis::PeriodicGrid;
use crate::error::{check_memory, InputError, Result};
use crate::model::units::Units;
use kernels::{kick_nonlinear, mul, mul_drive, NlCoef};

/// Grid size from which the pointwise multiplies of a single run use rayon. Off by
/// default: on the 2-core reference machine the rayon multiply was never faster
/// (n = 2^14 … 2^18, see the timing tests); the loops are memory-bound.
/// [`SplitStep::set_parallel_threshold`] turns it on for larger machines.
const DEFAULT_PAR_THRESHOLD: usize = usize::MAX;
/// Grid size from which the nonlinear kick uses rayon (outside a rayon worker): unlike the
/// table multiplies it is compute-bound (a sine and cosine per point, ~4 ns).
const NL_PAR_MIN: usize = 1 << 15;

/// Order of the splitting.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SplitOrder {
    /// Strang splitting, global error O(dt²).
    Second,
    /// Yoshida (1990) triple-jump composition of Strang steps, global error O(dt⁴).
    /// Has a negative sub-step, so it is not available in imaginary time.
    Fourth,
}

impl SplitOrder {
    /// The order from its number: 2 (Strang) or 4 (Yoshida composition).
    pub fn from_number(order: i64) -> std::result::Result<Self, InputError> {
        match order {
            2 => Ok(SplitOrder::Second),
            4 => Ok(SplitOrder::Fourth),
            _ => Err(InputError::range("order", "one of 2 (Strang) or 4 (Yoshida composition)", order)),
        }
    }
    /// 2 or 4.
    pub fn number(self) -> usize {
        match self {
            SplitOrder::Second => 2,
            SplitOrder::Fourth => 4,
        }
    }
}

/// Everything a [`SplitStep`] is built from, in the user's terms (kept by the
/// propagator, so it can be rebuilt from it). [`SplitStepOptions::new`] gives the
/// defaults: mass 1, natural units, `Second`, t0 = 0, no drive potential, no
/// absorber, real time, no nonlinearity.
#[derive(Debug, Clone)]
pub struct SplitStepOptions {
    /// The periodic grid (1D [`FourierGrid`](crate::basis::FourierGrid) or 2D/3D
    /// [`ProductGrid`](crate::basis::ProductGrid)).
    pub grid: Arc<dyn PeriodicGrid>,
    /// Static potential V₀ on the grid points (energy), length `grid.len()`, finite.
    pub potential: Vec<f64>,
    /// Particle mass (mass unit of `units`), > 0.
    pub mass: f64,
    pub units: Units,
    /// Time step: finite and nonzero (negative runs backwards); > 0 in imaginary time.
    pub dt: f64,
    /// Time of the initial state; record m is at t0 + m·dt.
    pub t0: f64,
    pub order: SplitOrder,
    /// V₁ of a drive f(t)·V₁ on the grid points (the samples of f are given per run, see
    /// [`SplitStep::with_drive`]).
    pub drive_potential: Option<Vec<f64>>,
    /// Width (length) of a smooth absorbing mask at every face of the box ([`Absorber::cos_mask`]).
    pub absorber_width: Option<f64>,
    /// A complex absorbing potential W ≥ 0 on the grid (V → V − iW).
    pub absorber_potential: Option<Vec<f64>>,
    /// Propagate in imaginary time τ = it (dt is then dτ); requires order 2, no drive,
    /// no absorber.
    pub imaginary_time: bool,
    /// g of the mean-field term g|ψ|² (energy·length^d, ψ normalised to 1), finite; 0: linear.
    pub nonlinearity: f64,
}

impl SplitStepOptions {
    pub fn new(grid: Arc<dyn PeriodicGrid>, potential: Vec<f64>, dt: f64) -> Self {
        SplitStepOptions {
            grid,
            potential,
            mass: 1.0,
            units: Units::Natural,
            dt,
            t0: 0.0,
            order: SplitOrder::Second,
            drive_potential: None,
            absorber_width: None,
            absorber_potential: None,
            imaginary_time: false,
            nonlinearity: 0.0,
        }
    }
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
/// `&self`; the FFT plans (those of the grid) are shared by all threads.
#[derive(Clone)]
pub struct SplitStep {
    options: SplitStepOptions,
    /// Points per axis of the grid (row-major).
    shape: Vec<usize>,
    /// ħ²/2m (energy·length²) and ħ (energy·time) of the mass in the unit system.
    c: f64,
    hbar: f64,
    drive: Option<Drive>,
    absorber: Option<Absorber>,
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
    /// With g ≠ 0: the coefficient G of the nonlinear phase G·|ψ|² of each kick
    /// (open, inner, boundary, close), see [`kernels::kick_nonlinear`].
    nl: Option<[NlCoef; 4]>,
    scratch_len: usize,
    par_threshold: usize,
}

fn w_given(w: Option<f64>) -> String {
    w.map_or_else(|| "None".into(), |w| w.to_string())
}

fn yoshida_weights() -> (f64, f64) {
    let cr = 2f64.cbrt();
    let w1 = 1.0 / (2.0 - cr);
    (w1, -cr * w1)
}

/// ∫₀^τ e^{−2Ws/ħ} ds / τ = (1 − e^{−a})/a with a = 2Wτ/ħ ≥ 0 (1 at a = 0).
fn decay_average(a: f64) -> f64 {
    if a < 1e-12 {
        1.0 - 0.5 * a
    } else {
        -(-a).exp_m1() / a
    }
}

impl SplitStep {
    /// Validate the options and precompute all phase tables.
    pub fn new(options: SplitStepOptions) -> Result<SplitStep> {
        let o = &options;
        let grid = &*o.grid;
        let n = grid.len();
        crate::problem::hamiltonian::check_mass(o.mass)?;
        let (c, hbar) = (o.units.kinetic_prefactor(o.mass), o.units.hbar());
        if !o.t0.is_finite() {
            return Err(InputError::range("t0", "a finite number", o.t0).into());
        }
        if !o.nonlinearity.is_finite() {
            return Err(InputError::range(
                "nonlinearity",
                "a finite number (g of the mean-field term g|ψ|², energy·length^d; 0 for the linear equation)",
                o.nonlinearity,
            )
            .into());
        }
        if o.imaginary_time {
            if !(o.dt.is_finite() && o.dt > 0.0) {
                return Err(InputError::range("dt", "a finite number > 0 (imaginary-time step)", o.dt).into());
            }
        } else if !(o.dt.is_finite() && o.dt != 0.0) {
            return Err(InputError::range("dt", "a finite nonzero number", o.dt).into());
        }
        crate::basis::fourier::check_samples("potential", &o.potential, n)?;
        if let Some(v1) = &o.drive_potential {
            crate::basis::fourier::check_samples("drive_potential", v1, n)?;
        }
        if o.imaginary_time {
            if o.order == SplitOrder::Fourth {
                return Err(InputError::range(
                    "order",
                    "2 in imaginary time (the fourth-order composition has a negative sub-step, unstable for diffusion)",
                    4,
                )
                .into());
            }
            if o.drive_potential.is_some() || o.absorber_width.is_some() || o.absorber_potential.is_some() {
                return Err(InputError::range(
                    "imaginary_time",
                    "False with `drive`, `absorber_width` or `absorber_potential` (imaginary time relaxes a static problem)",
                    true,
                )
                .into());
            }
        }
        let absorber = match (o.absorber_width, &o.absorber_potential) {
            (Some(_), Some(_)) => {
                return Err(InputError::range(
                    "absorber_width",
                    "None when `absorber_potential` is given (at most one of a mask and a complex absorbing potential)",
                    w_given(o.absorber_width),
                )
                .into())
            }
            (Some(w), None) => Some(Absorber::cos_mask(grid, w)?),
            (None, Some(w)) => {
                if o.dt < 0.0 {
                    return Err(InputError::range("dt", "> 0 with a complex absorbing potential", o.dt).into());
                }
                Some(Absorber::cap(w.clone(), n)?)
            }
            (None, None) => None,
        };
        let tables = match o.order {
            SplitOrder::Second => 4,
            SplitOrder::Fourth => 6,
        };
        let nl_tables = if o.nonlinearity != 0.0 && absorber.is_some() { 4 } else { 0 };
        check_memory("grid", (n as u64) * (16 * tables + 8 * nl_tables + 8 * 4), "use fewer grid points")?;
        let scratch_len = grid.scratch_len();
        let (dt, imaginary) = (o.dt, o.imaginary_time);

        let (weights, kin_w, kin_index): (Vec<f64>, Vec<f64>, Vec<usize>) = match o.order {
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
        let inv_n = 1.0 / n as f64;
        let factor = |energy: f64, w: f64| -> Complex64 {
            let a = energy * w * dt / hbar;
            if imaginary {
                Complex64::new((-a).exp(), 0.0)
            } else {
                Complex64::from_polar(1.0, -a)
            }
        };
        let ksq = grid.k_squared();
        let kin = kin_w.iter().map(|&w| ksq.iter().map(|&kk| factor(c * kk, w) * inv_n).collect()).collect();
        drop(ksq);
        // In imaginary time the potential is shifted by its minimum (a constant that the
        // renormalisation removes), so that no factor exceeds 1.
        let vshift = if imaginary { o.potential.iter().cloned().fold(f64::INFINITY, f64::min) } else { 0.0 };
        let kick_table = |w: f64, masked: bool| -> Vec<Complex64> {
            (0..n)
                .map(|j| {
                    let mut z = factor(o.potential[j] - vshift, w);
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
        let (tau_open, tau_close) = (0.5 * weights[0], 0.5 * weights[s - 1]);
        let tau_inner = if s > 1 { 0.5 * (weights[0] + weights[1]) } else { 0.0 };
        let kick_open = kick_table(tau_open, false);
        let kick_inner = if s > 1 { kick_table(tau_inner, false) } else { Vec::new() };
        let kick_boundary = kick_table(tau_close + tau_open, true);
        let kick_close = kick_table(tau_close, true);
        // Nonlinear phase coefficients G = g·τ_eff·dt/ħ (see the module docs).
        let nl = (o.nonlinearity != 0.0).then(|| {
            let gk = o.nonlinearity * dt / hbar;
            let coef = |tau: f64, boundary: bool| -> NlCoef {
                match &absorber {
                    None => NlCoef::Uniform(gk * tau),
                    Some(Absorber::Cap(wc)) => {
                        NlCoef::PerPoint(wc.iter().map(|&w| gk * tau * decay_average(2.0 * w * tau * dt / hbar)).collect())
                    }
                    // The mask acts between the closing and the opening half of a merged kick.
                    Some(Absorber::Mask(m)) if boundary => {
                        NlCoef::PerPoint(m.iter().map(|&mj| gk * (tau_close + mj * mj * tau_open)).collect())
                    }
                    Some(Absorber::Mask(_)) => NlCoef::Uniform(gk * tau),
                }
            };
            [
                coef(tau_open, false),
                coef(tau_inner, false),
                coef(tau_close + tau_open, true),
                coef(tau_close, false),
            ]
        });
        Ok(SplitStep {
            shape: grid.shape(),
            options,
            c,
            hbar,
            drive: None,
            absorber,
            weights,
            offsets,
            kin,
            kin_index,
            kick_open,
            kick_inner,
            kick_boundary,
            kick_close,
            nl,
            scratch_len,
            par_threshold: DEFAULT_PAR_THRESHOLD,
        })
    }

    /// Grid size from which the pointwise multiplies of `run` (and of `ground_states` with a
    /// single state) use rayon. Default `usize::MAX` (off: not faster on 2 cores).
    /// `run_many` always parallelises over packets instead. (The FFTs of a
    /// [`ProductGrid`](crate::basis::ProductGrid) use rayon across lines regardless.)
    pub fn set_parallel_threshold(&mut self, n: usize) {
        self.par_threshold = n;
    }

    /// The options the propagator was built from.
    pub fn options(&self) -> &SplitStepOptions {
        &self.options
    }
    pub fn grid(&self) -> &dyn PeriodicGrid {
        &*self.options.grid
    }
    /// Points per axis (row-major).
    pub fn shape(&self) -> &[usize] {
        &self.shape
    }
    /// Total number of grid points (length of a state).
    pub fn n(&self) -> usize {
        self.options.grid.len()
    }
    pub fn dt(&self) -> f64 {
        self.options.dt
    }
    pub fn order(&self) -> SplitOrder {
        self.options.order
    }
    pub fn potential(&self) -> &[f64] {
        &self.options.potential
    }
    /// g of the mean-field term (0: linear).
    pub fn nonlinearity(&self) -> f64 {
        self.options.nonlinearity
    }
    /// ħ²/2m (energy·length²) and ħ (energy·time) of the propagated particle.
    pub fn constants(&self) -> (f64, f64) {
        (self.c, self.hbar)
    }

    fn apply_kick(&self, psi: &mut [Complex64], kind: Kick, step: usize, par: bool) {
        let (table, slot) = match kind {
            Kick::Open => (&self.kick_open, 0),
            Kick::Inner(_) => (&self.kick_inner, 1),
            Kick::Boundary => (&self.kick_boundary, 2),
            Kick::Close => (&self.kick_close, 3),
        };
        let drive = self
            .drive
            .as_ref()
            .map(|d| (&d.v1[..], -self.drive_weight(d, kind, step) * self.options.dt / self.hbar));
        match (&self.nl, drive) {
            (None, Some((v1, coef))) => mul_drive(psi, table, v1, coef, par),
            (None, None) => mul(psi, table, par),
            (Some(nl), drive) => {
                let par = par || (psi.len() >= NL_PAR_MIN && rayon::current_thread_index().is_none());
                kick_nonlinear(psi, table, &nl[slot], drive, self.options.imaginary_time, par)
            }
        }
    }

    /// One step. On entry `open` tells whether the closing half-kick of the previous
    /// step is still pending; on exit the closing half-kick of this step is pending.
    fn step(&self, psi: &mut [Complex64], scratch: &mut [Complex64], step: usize, open: bool, par: bool) {
        let g = &*self.options.grid;
        self.apply_kick(psi, if open { Kick::Boundary } else { Kick::Open }, step, par);
        for s in 0..self.weights.len() {
            if s > 0 {
                self.apply_kick(psi, Kick::Inner(s), step, par);
            }
            g.forward(psi, scratch);
            mul(psi, &self.kin[self.kin_index[s]], par);
            g.inverse(psi, scratch);
        }
    }

    /// Lines of the grid along its last (contiguous) axis: (line length, number of lines).
    pub(crate) fn lines(&self) -> (usize, usize) {
        let last = self.shape[self.shape.len() - 1];
        (last, self.n() / last)
    }

    /// Indices (i, j) on the first two axes of line `line` (unused ones are 0): 1D has one
    /// line (0, 0); 2D line i is x_i; 3D line i·n_y + j is (x_i, y_j).
    pub(crate) fn line_outer(&self, line: usize) -> (usize, usize) {
        match self.shape.len() {
            1 => (0, 0),
            2 => (line, 0),
            _ => (line / self.shape[1], line % self.shape[1]),
        }
    }

    /// buf_p ← f(|k_p|²)·buf_p over the spectrum layout (in place).
    pub(crate) fn scale_spectrum(&self, buf: &mut [Complex64], f: impl Fn(f64) -> f64) {
        let g = &*self.options.grid;
        let nd = self.shape.len();
        let (nl, _) = self.lines();
        let k_last = g.axis(nd - 1).k();
        for (line, chunk) in buf.chunks_mut(nl).enumerate() {
            let (i, j) = self.line_outer(line);
            let outer = match nd {
                1 => 0.0,
                2 => g.axis(0).k()[i].powi(2),
                _ => g.axis(0).k()[i].powi(2) + g.axis(1).k()[j].powi(2),
            };
            for (z, &k) in chunk.iter_mut().zip(k_last) {
                *z *= f(outer + k * k);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    use super::kernels::{mul, mul_kernel, mul_seq, sum_sq};
    use crate::basis::{FourierGrid, ProductGrid};
    use crate::error::Error;
    use rustfft::FftPlanner;
    use std::time::Instant;

    /// Options on the grid [start, start + n·dx) in natural units (ħ = 1, mass 1: c = ½).
    fn cfg(start: f64, dx: f64, n: usize, potential: Vec<f64>, dt: f64) -> SplitStepOptions {
        let grid = Arc::new(FourierGrid::new(start, start + n as f64 * dx, n).unwrap());
        SplitStepOptions::new(grid, potential, dt)
    }

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
        let mut o = cfg(start, dx, n, vec![0.0; n], 0.05);
        o.order = SplitOrder::Second;
        let sp = SplitStep::new(o).unwrap();
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
        let mut o = cfg(start, dx, n, v, 0.01);
        o.order = SplitOrder::Fourth;
        let sp = SplitStep::new(o).unwrap();
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
        let k = sp.grid().axis(0).k();
        let mut h = vec![0.0; n * n];
        for j in 0..n {
            for l in 0..n {
                let d = (j as f64 - l as f64) * sp.grid().axis(0).dx();
                let kin: f64 = k.iter().map(|kk| kk * kk * (kk * d).cos()).sum::<f64>() * 0.5 / n as f64;
                h[j * n + l] = kin + if j == l { v[j] } else { 0.0 };
            }
        }
        let hm = faer::Mat::from_fn(n, n, |j, l| h[j * n + l]);
        let (e, u) = crate::linalg::dense::eigh(hm.as_ref(), faer::Par::Seq).unwrap();
        let mut out = vec![c(0.0); n];
        for m in 0..n {
            let a: Complex64 = (0..n).map(|j| psi0[j] * u[(j, m)]).sum();
            let a = a * Complex64::from_polar(1.0, -e[m] * t);
            for j in 0..n {
                out[j] += a * u[(j, m)];
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
        let base = SplitStep::new(cfg(start, dx, n, v.clone(), 0.1)).unwrap();
        let exact = dense_propagate(&base, &v, &psi0, tf);
        for (order, expect, dts) in [
            (SplitOrder::Second, 2.0, [0.02, 0.01, 0.005]),
            (SplitOrder::Fourth, 4.0, [0.05, 0.025, 0.0125]),
        ] {
            let errs: Vec<f64> = dts
                .iter()
                .map(|&dt| {
                    let mut o = cfg(start, dx, n, v.clone(), dt);
                    o.order = order;
                    let sp = SplitStep::new(o).unwrap();
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
            let mut o = cfg(start, dx, n, v0.clone(), dt);
            o.order = order;
            o.drive_potential = Some(v1.clone());
            let sp = SplitStep::new(o).unwrap();
            let steps = (tf / dt).round() as usize;
            let fs = sp.drive_sample_times(steps, sampling).into_iter().map(f).collect();
            let sp = sp.with_drive(fs, sampling).unwrap();
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
        let sp = SplitStep::new(cfg(start, dx, n, v, 0.005)).unwrap();
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
        let mut o = cfg(start, dx, n, vec![0.0; n], 0.02);
        o.absorber_width = Some(width);
        let sp = SplitStep::new(o).unwrap();
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
        let mut o = cfg(start, dx, n, vec![0.0; n], 0.02);
        o.absorber_potential = Some(w);
        let sp = SplitStep::new(o).unwrap();
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
        let mut o = cfg(start, dx, n, v, 0.01);
        o.imaginary_time = true;
        let sp = SplitStep::new(o).unwrap();
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
        let (start, stop, n) = (-10.0, 10.0, 4096); // ground::GS_PAR_MIN_N: the parallel path
        let (dx, x) = grid(start, stop, n);
        let v: Vec<f64> = x.iter().map(|x| 0.5 * x * x).collect();
        let mut o = cfg(start, dx, n, v, 0.01);
        o.imaginary_time = true;
        let gs = SplitStep::new(o)
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
        let mut o = cfg(start, dx, n, v, 0.01);
        o.order = SplitOrder::Fourth;
        let sp = SplitStep::new(o).unwrap();
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
            let mut o = cfg(0.0, 0.5, n, vec![0.0; n], 0.1);
            o.t0 = 0.3;
            o.order = order;
            o.drive_potential = Some(vec![1.0; n]);
            let sp = SplitStep::new(o).unwrap();
            let steps = 5;
            let f = |t: f64| 2.0 - 3.0 * t;
            let fs = sp.drive_sample_times(steps, sampling).into_iter().map(f).collect();
            let sp = sp.with_drive(fs, sampling).unwrap();
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
        let mut o = cfg(0.0, 0.5, n, vec![0.0; n], 0.1);
        o.t0 = 1.0;
        o.order = SplitOrder::Fourth;
        let sp = SplitStep::new(o).unwrap();
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
        let ok = || cfg(0.0, 1.0, n, vec![0.0; n], 0.1);
        let is_input = |r: Result<SplitStep>| matches!(r, Err(Error::Input(_)));
        assert!(is_input(SplitStep::new(SplitStepOptions { dt: 0.0, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { dt: f64::NAN, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { dt: -0.1, imaginary_time: true, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { mass: 0.0, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { mass: f64::NAN, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { t0: f64::INFINITY, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { potential: vec![0.0; 7], ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { potential: vec![f64::INFINITY; 8], ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { imaginary_time: true, order: SplitOrder::Fourth, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { imaginary_time: true, absorber_width: Some(1.0), ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { absorber_width: Some(5.0), ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { absorber_potential: Some(vec![-1.0; 8]), ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions { absorber_potential: Some(vec![1.0; 8]), dt: -0.1, ..ok() })));
        assert!(is_input(SplitStep::new(SplitStepOptions {
            absorber_potential: Some(vec![1.0; 8]),
            absorber_width: Some(1.0),
            ..ok()
        })));
        assert!(is_input(SplitStep::new(SplitStepOptions { drive_potential: Some(vec![0.0; 3]), ..ok() })));
        let e = SplitStep::new(SplitStepOptions { imaginary_time: true, order: SplitOrder::Fourth, ..ok() }).err().unwrap();
        assert!(e.to_string().contains("`order` must be 2 in imaginary time"), "{e}");
        assert!(SplitOrder::from_number(3).is_err());
        let sp = SplitStep::new(ok()).unwrap();
        assert!(matches!(sp.with_drive(vec![0.0; 2], DriveSampling::Midpoint), Err(Error::Input(_))));
        let psi = vec![c(1.0); n];
        assert!(matches!(sp.run(&psi[..7], 1, 1, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.run(&vec![c(0.0); n], 1, 1, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.run(&vec![c(f64::NAN); n], 1, 1, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.run(&psi, 1, 0, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.run_many(&psi[..5], 1, 1, &mut yes), Err(Error::Input(_))));
        assert!(matches!(sp.ground_states(1, 1e-8, 10, 0), Err(Error::Input(_))));
        let sp2 = SplitStep::new(SplitStepOptions { drive_potential: Some(vec![0.0; n]), ..ok() }).unwrap();
        let sp2 = sp2.with_drive(vec![0.0; 2], DriveSampling::Midpoint).unwrap();
        assert!(matches!(sp2.run(&psi, 3, 1, &mut yes), Err(Error::Input(_))));
        let spi = SplitStep::new(SplitStepOptions { imaginary_time: true, ..ok() }).unwrap();
        assert!(matches!(spi.ground_states(9, 1e-8, 10, 0), Err(Error::Input(_))));
        assert!(matches!(spi.ground_states(1, 0.0, 10, 0), Err(Error::Input(_))));
        assert!(matches!(spi.ground_states(1, 1e-8, 0, 0), Err(Error::Input(_))));
        // zero steps: one record, the initial state
        let r = sp.run(&psi, 0, 5, &mut yes).unwrap();
        assert_eq!(r.times, vec![0.0]);
    }


    // ------------------------------------------------------------------ 2D / 3D and GPE

    /// Options on a product grid of boxes `spec` (start, stop, n), V sampled row-major.
    fn cfg_nd(spec: &[(f64, f64, usize)], v: impl Fn(&[f64]) -> f64, dt: f64) -> (SplitStepOptions, Vec<Vec<f64>>) {
        let axes: Vec<Arc<FourierGrid>> = spec.iter().map(|&(a, b, n)| Arc::new(FourierGrid::new(a, b, n).unwrap())).collect();
        let xs: Vec<Vec<f64>> = axes.iter().map(|g| g.x().to_vec()).collect();
        let grid: Arc<dyn PeriodicGrid> = if axes.len() == 1 { axes[0].clone() } else { Arc::new(ProductGrid::new(axes).unwrap()) };
        let pts = points(&xs);
        let pot = pts.iter().map(|p| v(p)).collect();
        (SplitStepOptions::new(grid, pot, dt), xs)
    }

    /// Coordinates of every point of the product of the axes `xs`, row-major.
    fn points(xs: &[Vec<f64>]) -> Vec<Vec<f64>> {
        let mut out = vec![vec![]];
        for ax in xs {
            out = out.into_iter().flat_map(|p| ax.iter().map(move |&x| [p.clone(), vec![x]].concat())).collect();
        }
        out
    }

    fn normalised(mut v: Vec<Complex64>, dv: f64) -> Vec<Complex64> {
        let s = 1.0 / (sum_sq(&v) * dv).sqrt();
        v.iter_mut().for_each(|z| *z *= s);
        v
    }

    // Source: isotropic oscillator levels E = ħω(n_x + n_y + 1) in 2D (1, 2, 2 for ω = 1) and
    // E = ħω(n_x + n_y + n_z + 3/2) in 3D (e.g. Cohen-Tannoudji, Diu & Laloë 1977, Complement E_VI).
    #[test]
    fn imaginary_time_oscillator_levels_2d_3d() {
        let (mut o, _) = cfg_nd(&[(-8.0, 8.0, 64), (-8.0, 8.0, 48)], |p| 0.5 * (p[0] * p[0] + p[1] * p[1]), 0.01);
        o.imaginary_time = true;
        let gs = SplitStep::new(o).unwrap().ground_states(3, 1e-11, 100_000, 1).unwrap();
        for (e, want) in gs.energies.iter().zip([1.0, 2.0, 2.0]) {
            assert!((e - want).abs() < 1e-8, "2D: {:?}", gs.energies);
        }
        assert!(gs.residuals.iter().all(|r| *r < 1e-3), "{:?}", gs.residuals);
        let (mut o, _) = cfg_nd(&[(-7.0, 7.0, 32), (-7.0, 7.0, 32), (-7.0, 7.0, 28)], |p| 0.5 * p.iter().map(|x| x * x).sum::<f64>(), 0.01);
        o.imaginary_time = true;
        let gs = SplitStep::new(o).unwrap().ground_states(1, 1e-11, 100_000, 1).unwrap();
        assert!((gs.energies[0] - 1.5).abs() < 1e-8, "3D: {:?}", gs.energies);
    }

    // Source: coherent state of the 2D isotropic oscillator, ⟨x⟩ = x0 cos ωt, ⟨y⟩ = y0 cos ωt,
    // ⟨p_y⟩ = −mω y0 sin ωt (Cohen-Tannoudji, Diu & Laloë 1977, Complement G_V, per axis).
    #[test]
    fn coherent_state_2d() {
        let w: f64 = 1.0;
        let (mut o, xs) = cfg_nd(&[(-10.0, 10.0, 64), (-10.0, 10.0, 64)], |p| 0.5 * w * w * (p[0] * p[0] + p[1] * p[1]), 0.01);
        o.order = SplitOrder::Fourth;
        let sp = SplitStep::new(o).unwrap();
        let (x0, y0) = (2.0, -1.0);
        let psi0 = normalised(
            points(&xs).iter().map(|p| c((-0.5 * w * ((p[0] - x0).powi(2) + (p[1] - y0).powi(2))).exp())).collect(),
            sp.grid().cell_volume(),
        );
        let steps = 628;
        let r = sp.run(&psi0, steps, 157, &mut yes).unwrap();
        assert_eq!(r.shape, vec![64, 64]);
        for (k, &t) in r.times.iter().enumerate() {
            assert!((r.mean_x[k] - x0 * (w * t).cos()).abs() < 1e-8, "t={t} x={}", r.mean_x[k]);
            assert!((r.mean_y[k] - y0 * (w * t).cos()).abs() < 1e-8);
            assert!((r.mean_py[k] + w * y0 * (w * t).sin()).abs() < 1e-8);
            assert!((r.norm[k] - 1.0).abs() < 1e-12);
            // E = ħω + ½mω²(x0² + y0²), up to the O(dt⁴) energy oscillation of the scheme
            assert!((r.energy[k] - (1.0 + 0.5 * (x0 * x0 + y0 * y0))).abs() < 1e-7, "E = {}", r.energy[k]);
        }
        assert!(r.mean_z.is_empty() && r.mean_pz.is_empty());
    }

    /// The moving bright soliton of iψ_t = −½ψ_xx + g|ψ|²ψ, g = −κ < 0, normalised to 1:
    /// ψ = (√κ/2) sech((κ/2)(x − x0 − vt)) e^{i(v(x − x0) − (v²/2 − κ²/8)t)}
    /// (Zakharov & Shabat 1972, Sov. Phys. JETP 34, 62; Galilean boost of the stationary one).
    fn soliton(x: &[f64], kappa: f64, x0: f64, v: f64, t: f64) -> Vec<Complex64> {
        x.iter()
            .map(|&x| {
                let a = 0.5 * kappa.sqrt() / (0.5 * kappa * (x - x0 - v * t)).cosh();
                Complex64::from_polar(a, v * (x - x0) - (0.5 * v * v - kappa * kappa / 8.0) * t)
            })
            .collect()
    }

    // Source: the exact soliton above; the splitting error is O(dt²) (Strang) and O(dt⁴)
    // (Yoshida) for the nonlinear flow (Bao, Jaksch & Markowich 2003; Lubich 2008, Math. Comp.
    // 77, 2141 for the Strang error bound of the cubic NLS).
    #[test]
    fn bright_soliton_shape_and_order() {
        // sech tails e^{−26} at the box edges: the periodic images do not touch.
        let (start, stop, n) = (-30.0, 30.0, 768);
        let (dx, x) = grid(start, stop, n);
        let (kappa, x0, v, tf) = (2.0, -4.0, 1.0, 8.0);
        let psi0 = soliton(&x, kappa, x0, v, 0.0);
        let exact = soliton(&x, kappa, x0, v, tf);
        let err = |order: SplitOrder, dt: f64| {
            let mut o = cfg(start, dx, n, vec![0.0; n], dt);
            o.order = order;
            o.nonlinearity = -kappa;
            let sp = SplitStep::new(o).unwrap();
            let steps = (tf / dt).round() as usize;
            let r = sp.run(&psi0, steps, steps, &mut yes).unwrap();
            (l2_diff(&r.states[n..], &exact, dx), r)
        };
        let (e, r) = err(SplitOrder::Second, 2e-3);
        let shape: f64 = r.states[n..].iter().zip(&exact).map(|(a, b)| (a.norm() - b.norm()).abs()).fold(0.0, f64::max);
        println!("soliton dt=2e-3: L2 error {e:.2e}, max ||ψ|−|ψ_exact|| {shape:.2e}");
        assert!(shape < 1e-5 && e < 1e-4, "{shape} {e}");
        assert!((r.energy[1] - r.energy[0]).abs() < 1e-6);
        for (order, expect, dts) in [(SplitOrder::Second, 2.0, [0.02, 0.01, 0.005]), (SplitOrder::Fourth, 4.0, [0.04, 0.02, 0.01])] {
            let errs: Vec<f64> = dts.iter().map(|&dt| err(order, dt).0).collect();
            let p1 = (errs[0] / errs[1]).log2();
            let p2 = (errs[1] / errs[2]).log2();
            println!("soliton {order:?}: errors {errs:?}, orders {p1:.3} {p2:.3}");
            assert!((p2 - expect).abs() < 0.25, "{order:?}: {p1} {p2}");
        }
    }

    // Source: unitarity of every factor of the nonlinear splitting (|e^{iθ}| = 1, unitary
    // DFT): the norm is conserved to round-off; time-symmetric steps invert with −dt.
    #[test]
    fn nonlinear_norm_conservation_and_time_reversal() {
        let (start, stop, n) = (-12.0, 12.0, 256);
        let (dx, x) = grid(start, stop, n);
        let v: Vec<f64> = x.iter().map(|x| 0.5 * x * x).collect();
        let psi0 = gaussian(&x, dx, 1.0, 0.8, 0.5);
        let mut o = cfg(start, dx, n, v.clone(), 0.005);
        let drift_of = |r: &Run| r.norm.iter().map(|m| (m - r.norm[0]).abs()).fold(0.0, f64::max);
        // Round-off level: the same run without the mean-field term.
        let linear = drift_of(&SplitStep::new(o.clone()).unwrap().run(&psi0, 10_000, 1000, &mut yes).unwrap());
        o.nonlinearity = 20.0;
        let sp = SplitStep::new(o.clone()).unwrap();
        let r = sp.run(&psi0, 10_000, 1000, &mut yes).unwrap();
        let drift = drift_of(&r);
        let de = r.energy.iter().map(|e| (e - r.energy[0]).abs()).fold(0.0, f64::max);
        println!("GPE 1e4 steps: norm drift {drift:.1e} (linear run {linear:.1e}), energy deviation {de:.1e}");
        assert!(drift < 10.0 * linear.max(1e-13) && drift < 1e-11, "{drift}");
        assert!(de < 1e-4 * r.energy[0].abs());
        // Back from the state after 2000 steps with −dt (round-off grows with the run length
        // under the nonlinear dynamics: measured 1.1e-11 here, 2.4e-10 after 1e4 + 1e4 steps).
        let fwd = SplitStep::new(o.clone()).unwrap().run(&psi0, 2000, 2000, &mut yes).unwrap();
        o.dt = -0.005;
        let back = SplitStep::new(o).unwrap().run(&fwd.states[n..], 2000, 2000, &mut yes).unwrap();
        let rev = l2_diff(&back.states[n..], &psi0, dx);
        println!("time reversal after 2000 + 2000 steps: {rev:.1e}");
        assert!(l2_diff(&fwd.states[n..], &psi0, dx) > 0.1 && rev < 1e-10, "{rev}");
    }

    // Source: the virial theorem of the Gross-Pitaevskii functional in a harmonic trap,
    // 2E_kin − 2E_ho + d·E_int = 0 (Dalfovo, Giorgini, Pitaevskii & Stringari 1999, Rev. Mod.
    // Phys. 71, 463, Eq. 40 for d = 3; the scaling argument gives d·E_int in d dimensions),
    // and μ = E + E_int (their Eq. 39 with ψ normalised to 1).
    #[test]
    fn gpe_ground_state_virial_1d_2d() {
        for (spec, g, dt) in [(vec![(-12.0, 12.0, 256)], 50.0, 0.01), (vec![(-8.0, 8.0, 64), (-8.0, 8.0, 64)], 30.0, 0.01)] {
            let d = spec.len();
            let (mut o, xs) = cfg_nd(&spec, |p| 0.5 * p.iter().map(|x| x * x).sum::<f64>(), dt);
            o.imaginary_time = true;
            o.nonlinearity = g;
            let sp = SplitStep::new(o).unwrap();
            let gs = sp.ground_states(1, 1e-9, 200_000, 3).unwrap();
            let dv = sp.grid().cell_volume();
            let psi = &gs.states;
            let pts = points(&xs);
            let e_ho: f64 = psi.iter().zip(&pts).map(|(z, p)| z.norm_sqr() * 0.5 * p.iter().map(|x| x * x).sum::<f64>()).sum::<f64>() * dv;
            let e_int: f64 = 0.5 * g * psi.iter().map(|z| z.norm_sqr().powi(2)).sum::<f64>() * dv;
            let e_kin = gs.energy_functional[0] - e_ho - e_int;
            let virial = 2.0 * e_kin - 2.0 * e_ho + d as f64 * e_int;
            println!(
                "{d}D g={g}: μ={} E={} residual {:.1e} after {} steps + {} CG iterations, virial {virial:.1e}",
                gs.energies[0], gs.energy_functional[0], gs.residuals[0], gs.steps, gs.refine_iterations
            );
            assert!(virial.abs() < 1e-8, "virial {virial}");
            assert!((gs.energies[0] - (gs.energy_functional[0] + e_int)).abs() < 1e-9);
            assert!(gs.residuals[0] < 1e-8);
            // The result does not depend on dτ (the refinement reaches the grid solution).
            let (mut o2, _) = cfg_nd(&spec, |p| 0.5 * p.iter().map(|x| x * x).sum::<f64>(), 2.0 * dt);
            o2.imaginary_time = true;
            o2.nonlinearity = g;
            let gs2 = SplitStep::new(o2).unwrap().ground_states(1, 1e-9, 200_000, 3).unwrap();
            assert!((gs2.energies[0] - gs.energies[0]).abs() < 1e-9, "{} {}", gs2.energies[0], gs.energies[0]);
        }
    }

    // Source: Kohn's theorem / harmonic potential theorem (Kohn 1961, Phys. Rev. 123, 1242;
    // Dobson 1994, Phys. Rev. Lett. 73, 2244): in a harmonic trap the centre of mass of an
    // interacting cloud under a uniform force −f(t) follows ẍ = −ω²x − f(t)/m exactly, whatever
    // g. Reference: the classical ODE by RK4 at a tiny step.
    #[test]
    fn driven_nonlinear_cloud_follows_kohn_2d() {
        let w: f64 = 1.0;
        let (mut o, xs) = cfg_nd(&[(-10.0, 10.0, 64), (-10.0, 10.0, 64)], |p| 0.5 * w * w * (p[0] * p[0] + p[1] * p[1]), 0.01);
        o.nonlinearity = 15.0;
        o.order = SplitOrder::Fourth;
        o.drive_potential = Some(points(&xs).iter().map(|p| p[0]).collect());
        let sp = SplitStep::new(o).unwrap();
        let f = |t: f64| 0.3 * (1.7 * t).sin();
        let steps = 300;
        let fs = sp.drive_sample_times(steps, DriveSampling::Substeps).into_iter().map(f).collect();
        let sp = sp.with_drive(fs, DriveSampling::Substeps).unwrap();
        let psi0 = normalised(points(&xs).iter().map(|p| c((-0.4 * (p[0] * p[0] + p[1] * p[1])).exp())).collect(), sp.grid().cell_volume());
        let r = sp.run(&psi0, steps, 50, &mut yes).unwrap();
        // RK4 for (x, u): x' = u, u' = −ω²x − f(t)
        let (mut t, mut y) = (0.0, [r.mean_x[0], r.mean_p[0]]);
        let h = 1e-4;
        let rhs = |t: f64, y: [f64; 2]| [y[1], -w * w * y[0] - f(t)];
        let mut k = 1;
        while k < r.times.len() {
            let k1 = rhs(t, y);
            let k2 = rhs(t + h / 2.0, [y[0] + h / 2.0 * k1[0], y[1] + h / 2.0 * k1[1]]);
            let k3 = rhs(t + h / 2.0, [y[0] + h / 2.0 * k2[0], y[1] + h / 2.0 * k2[1]]);
            let k4 = rhs(t + h, [y[0] + h * k3[0], y[1] + h * k3[1]]);
            for i in 0..2 {
                y[i] += h / 6.0 * (k1[i] + 2.0 * k2[i] + 2.0 * k3[i] + k4[i]);
            }
            t += h;
            if (t - r.times[k]).abs() < h / 2.0 {
                assert!((r.mean_x[k] - y[0]).abs() < 1e-7, "t={t}: {} vs {}", r.mean_x[k], y[0]);
                assert!(r.mean_y[k].abs() < 1e-10, "⟨y⟩ = {}", r.mean_y[k]);
                k += 1;
            }
        }
    }

    // Source: as the linear absorber tests; the nonlinear kick keeps the absorber's removal
    // of an outgoing packet (mask and CAP), and with a CAP the exact decaying-density phase
    // keeps the Strang order 2 (reference: the Fourth scheme at a 16× finer step).
    #[test]
    fn absorbers_with_nonlinearity() {
        let (start, stop, n) = (-60.0, 60.0, 1024);
        let (dx, x) = grid(start, stop, n);
        let width = 20.0;
        let cap: Vec<f64> = x.iter().map(|&x| if x.abs() > 60.0 - width { 2.0 * ((x.abs() - 60.0 + width) / width).powi(2) } else { 0.0 }).collect();
        let psi0 = gaussian(&x, dx, 0.0, 2.0, 3.0);
        for mask in [true, false] {
            let mut o = cfg(start, dx, n, vec![0.0; n], 0.02);
            o.nonlinearity = 2.0;
            if mask {
                o.absorber_width = Some(width);
            } else {
                o.absorber_potential = Some(cap.clone());
            }
            let r = SplitStep::new(o).unwrap().run(&psi0, 2500, 2500, &mut yes).unwrap();
            assert!(r.absorbed_norm.unwrap() > 0.99, "mask={mask}: {:?}", r.absorbed_norm);
        }
        let solve = |order: SplitOrder, dt: f64| {
            let mut o = cfg(start, dx, n, vec![0.0; n], dt);
            o.nonlinearity = 2.0;
            o.order = order;
            o.absorber_potential = Some(cap.clone());
            let steps = (20.0 / dt).round() as usize;
            SplitStep::new(o).unwrap().run(&psi0, steps, steps, &mut yes).unwrap().states[n..].to_vec()
        };
        let reference = solve(SplitOrder::Fourth, 0.0025);
        let errs: Vec<f64> = [0.02, 0.01, 0.005].iter().map(|&dt| l2_diff(&solve(SplitOrder::Second, dt), &reference, dx)).collect();
        let p = (errs[1] / errs[2]).log2();
        println!("CAP + g: errors {errs:?}, order {p:.3}");
        assert!((p - 2.0).abs() < 0.2, "{errs:?}");
    }

    // Source: the product mask removes a 2D packet leaving through a box face.
    #[test]
    fn mask_absorbs_2d_packet() {
        let (mut o, xs) = cfg_nd(&[(-30.0, 30.0, 128), (-15.0, 15.0, 64)], |_| 0.0, 0.02);
        o.absorber_width = Some(8.0);
        let sp = SplitStep::new(o).unwrap();
        let psi0 = normalised(
            points(&xs).iter().map(|p| Complex64::from_polar((-(p[0] * p[0] + p[1] * p[1]) / 8.0).exp(), 3.0 * p[0])).collect(),
            sp.grid().cell_volume(),
        );
        let r = sp.run(&psi0, 1500, 1500, &mut yes).unwrap();
        assert!(r.absorbed_norm.unwrap() > 0.99, "{:?}", r.absorbed_norm);
    }

    #[test]
    fn nonlinear_input_errors() {
        let n = 8;
        let ok = || cfg(0.0, 1.0, n, vec![0.0; n], 0.1);
        for g in [f64::NAN, f64::INFINITY] {
            let e = SplitStep::new(SplitStepOptions { nonlinearity: g, ..ok() }).err().unwrap();
            assert!(e.to_string().contains("`nonlinearity`"), "{e}");
        }
        let sp = SplitStep::new(SplitStepOptions { nonlinearity: 1.0, imaginary_time: true, ..ok() }).unwrap();
        let e = sp.ground_states(2, 1e-8, 10, 0).err().unwrap();
        assert!(e.to_string().contains("`count`") && e.to_string().contains("nonlinear"), "{e}");
    }

    use crate::linalg::thread_time; // thread CPU time: timings on a shared machine

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
    #[ignore = "timings only; run with --ignored"]
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

    // Timing (printed, not asserted): the nonlinear kick (one pass, fast sin/cos) against the
    // linear table multiply and against libm's sin_cos, thread CPU time.
    #[test]
    #[ignore = "timings only; run with --ignored"]
    fn timing_nonlinear_kick() {
        use super::kernels::{kick_nonlinear, NlCoef};
        let n = 1 << 18;
        let mut a: Vec<Complex64> = (0..n).map(|j| Complex64::from_polar(0.01, j as f64 * 1e-3)).collect();
        let t = vec![Complex64::from_polar(1.0, 0.2); n];
        let reps = 20;
        let lin = best_of(reps, true, || mul_seq(&mut a, &t));
        let nl = best_of(reps, true, || kick_nonlinear(&mut a, &t, &NlCoef::Uniform(0.3), None, false, false));
        let libm = best_of(reps, true, || {
            for (x, y) in a.iter_mut().zip(&t) {
                let (s, c) = (-0.3 * x.norm_sqr()).sin_cos();
                *x *= *y * Complex64::new(c, s);
            }
        });
        println!(
            "n=2^18 kick (thread CPU): linear table {:.2} ns/pt, nonlinear (fast sin/cos) {:.2} ns/pt, with libm sin_cos {:.2} ns/pt",
            lin * 1e9 / n as f64,
            nl * 1e9 / n as f64,
            libm * 1e9 / n as f64
        );
    }

    // Timing (printed, not asserted): 2D/3D steps vs the bare whole-state FFT pair (wall time:
    // the FFTs use rayon), linear and with g.
    #[test]
    #[ignore = "timings only; run with --ignored"]
    fn timing_per_step_nd() {
        for (spec, steps) in [(vec![(-20.0, 20.0, 512), (-20.0, 20.0, 512)], 10usize), (vec![(-10.0, 10.0, 128); 3], 4)] {
            let (o, xs) = cfg_nd(&spec, |p| 0.5 * p.iter().map(|x| x * x).sum::<f64>(), 1e-3);
            let bare = kernels::bare_grid_fft_pair_seconds(&*o.grid, 3);
            let pts = points(&xs);
            let psi0 = normalised(pts.iter().map(|p| c((-p.iter().map(|x| x * x).sum::<f64>()).exp())).collect(), o.grid.cell_volume());
            let mut line = format!("{:?}: bare FFT pair {:.2} ms", o.grid.shape(), bare * 1e3);
            for g in [0.0, 5.0] {
                let sp = SplitStep::new(SplitStepOptions { nonlinearity: g, ..o.clone() }).unwrap();
                let t1 = best_of(1, false, || {
                    sp.run(&psi0, steps, steps, &mut yes).unwrap();
                });
                let t2 = best_of(1, false, || {
                    sp.run(&psi0, 2 * steps, 2 * steps, &mut yes).unwrap();
                });
                let per = (t2 - t1) / steps as f64;
                line += &format!(", g={g}: {:.2} ms/step ({:.2}× the pair)", per * 1e3, per / bare);
            }
            println!("{line}");
        }
    }

    // Timing (printed, not asserted): a step vs two bare in-place FFTs of the same size.
    // Minimum over 5 blocks.
    #[test]
    #[ignore = "timings only; run with --ignored"]
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
                    let mut o = cfg(-50.0, dx, n, v.clone(), 0.001);
                    o.order = order;
                    let mut sp = SplitStep::new(o).unwrap();
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

