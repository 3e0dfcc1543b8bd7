//! Runs of the split-step propagator: one packet ([`SplitStep::run`]) or many in
//! parallel ([`SplitStep::run_many`]), the records they keep and the observables of
//! each record.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc;

use num_complex::Complex64;
use rayon::prelude::*;

use super::kernels::sum_sq;
use super::{Kick, SplitStep};
use crate::error::{check_memory, InputError, NumericalError, Result};

/// Expectation values of one state. Positions and momenta per axis (x, y, z; entries of
/// absent axes are 0), all normalised by the norm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Observables {
    /// Σ|ψ_j|² dV.
    pub norm: f64,
    /// ⟨x⟩, ⟨y⟩, ⟨z⟩ (length), positions taken in [start, start + n·dx) on each axis.
    pub position: [f64; 3],
    /// ⟨p_x⟩, ⟨p_y⟩, ⟨p_z⟩ = ħ⟨k⟩ (energy·time/length) from the FFT.
    pub momentum: [f64; 3],
    /// ⟨T⟩ + ⟨V(t)⟩ + (g/2)Σ|ψ|⁴ dV (energy), divided by the norm, with the real potential
    /// (a CAP is not included); with g = 0 the linear ⟨H⟩.
    pub energy: f64,
    /// (g/2)Σ|ψ|⁴ dV divided by the norm (0 when g = 0): for a normalised stationary state
    /// the chemical potential is μ = energy + interaction.
    pub interaction: f64,
}

/// Result of [`SplitStep::run`]. Record 0 is the initial state at t0, then one record
/// every `record_every` steps, and the final state is always recorded (so the last
/// interval is shorter when `steps` is not a multiple of `record_every`).
#[derive(Debug, Clone, PartialEq)]
pub struct Run {
    /// Grid size: points per state (row length of `states`).
    pub n: usize,
    /// Points per axis (row-major layout of each recorded state).
    pub shape: Vec<usize>,
    /// Step count of each record.
    pub record_steps: Vec<usize>,
    /// Time of each record, t0 + step·dt (imaginary time τ in imaginary-time runs).
    pub times: Vec<f64>,
    /// Recorded states, n_records × n, row-major.
    pub states: Vec<Complex64>,
    /// Σ|ψ|² dV per record.
    pub norm: Vec<f64>,
    /// ⟨x⟩ per record (normalised by the norm).
    pub mean_x: Vec<f64>,
    /// ⟨y⟩ per record (empty on a 1D grid).
    pub mean_y: Vec<f64>,
    /// ⟨z⟩ per record (empty on a 1D or 2D grid).
    pub mean_z: Vec<f64>,
    /// ħ⟨k_x⟩ per record (normalised by the norm).
    pub mean_p: Vec<f64>,
    /// ħ⟨k_y⟩ per record (empty on a 1D grid).
    pub mean_py: Vec<f64>,
    /// ħ⟨k_z⟩ per record (empty on a 1D or 2D grid).
    pub mean_pz: Vec<f64>,
    /// ⟨T⟩ + ⟨V(t)⟩ (+ (g/2)Σ|ψ|⁴ dV with a nonlinearity) per record (normalised by the
    /// norm; with a drive, f at the record time is linearly interpolated between the
    /// adjacent samples, extrapolated at the ends of the sample array).
    pub energy: Vec<f64>,
    /// ⟨ψ(0)|ψ(t)⟩ = Σ conj(ψ0_j) ψ_j dV per record (not normalised).
    pub autocorrelation: Vec<Complex64>,
    /// With an absorber: 1 − norm(end)/norm(0), the fraction of the norm absorbed.
    pub absorbed_norm: Option<f64>,
    /// Steps actually taken (< steps when cancelled).
    pub steps_done: usize,
    /// True when the progress callback returned false before all steps were done;
    /// the state at cancellation is then the last record.
    pub cancelled: bool,
}

pub(super) fn check_state(argument: &str, psi: &[Complex64], n: usize, offset: usize) -> std::result::Result<(), InputError> {
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

impl SplitStep {
    pub(super) fn observe(&self, psi: &[Complex64], work: &mut [Complex64], scratch: &mut [Complex64], fnow: f64) -> Observables {
        let grid = &*self.options.grid;
        let nd = self.shape.len();
        let (nl, _) = self.lines();
        let g = self.options.nonlinearity;
        let x_last = grid.axis(nd - 1).x();
        let (mut s0, mut sv, mut sv1, mut s4) = (0.0, 0.0, 0.0, 0.0);
        let mut sa = [0.0; 3];
        for (line, (chunk, vs)) in psi.chunks(nl).zip(self.options.potential.chunks(nl)).enumerate() {
            let (mut l0, mut lx) = (0.0, 0.0);
            for ((z, &x), &v) in chunk.iter().zip(x_last).zip(vs) {
                let p = z.norm_sqr();
                l0 += p;
                lx += x * p;
                sv += v * p;
            }
            if g != 0.0 {
                s4 += chunk.iter().map(|z| z.norm_sqr() * z.norm_sqr()).sum::<f64>();
            }
            s0 += l0;
            sa[nd - 1] += lx;
            let (i, j) = self.line_outer(line);
            if nd >= 2 {
                sa[0] += grid.axis(0).x()[i] * l0;
            }
            if nd == 3 {
                sa[1] += grid.axis(1).x()[j] * l0;
            }
        }
        if let Some(d) = &self.drive {
            sv1 = psi.iter().zip(&d.v1).map(|(z, v)| z.norm_sqr() * v).sum();
        }
        work.copy_from_slice(psi);
        grid.forward(work, scratch);
        let k_last = grid.axis(nd - 1).k();
        let (mut k0, mut k2) = (0.0, 0.0);
        let mut ka = [0.0; 3];
        for (line, chunk) in work.chunks(nl).enumerate() {
            let (mut l0, mut l1, mut l2) = (0.0, 0.0, 0.0);
            for (z, &kk) in chunk.iter().zip(k_last) {
                let p = z.norm_sqr();
                l0 += p;
                l1 += kk * p;
                l2 += kk * kk * p;
            }
            k0 += l0;
            ka[nd - 1] += l1;
            k2 += l2;
            if nd >= 2 {
                let (i, j) = self.line_outer(line);
                let kx = grid.axis(0).k()[i];
                let ky = if nd == 3 { grid.axis(1).k()[j] } else { 0.0 };
                ka[0] += kx * l0;
                if nd == 3 {
                    ka[1] += ky * l0;
                }
                k2 += (kx * kx + ky * ky) * l0;
            }
        }
        let interaction = if g != 0.0 { 0.5 * g * s4 / s0 } else { 0.0 };
        let mut energy = self.c * k2 / k0 + (sv + fnow * sv1) / s0;
        if g != 0.0 {
            energy += interaction;
        }
        Observables {
            norm: s0 * grid.cell_volume(),
            position: [sa[0] / s0, sa[1] / s0, sa[2] / s0],
            momentum: [self.hbar * ka[0] / k0, self.hbar * ka[1] / k0, self.hbar * ka[2] / k0],
            energy,
            interaction,
        }
    }

    /// Expectation values of `psi` (length n); `drive_value` is f(t) for ⟨V(t)⟩
    /// (ignored without a drive).
    pub fn observables(&self, psi: &[Complex64], drive_value: f64) -> Result<Observables> {
        check_state("psi", psi, self.n(), 0)?;
        if !drive_value.is_finite() {
            return Err(InputError::range("drive_value", "a finite number", drive_value).into());
        }
        let mut work = vec![Complex64::new(0.0, 0.0); self.n()];
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
        match &self.drive {
            Some(d) => {
                let spp = self.samples_per_step(d.sampling);
                let need = steps.saturating_mul(spp);
                if d.f.len() < need {
                    let what = match d.sampling {
                        super::DriveSampling::Midpoint => format!("samples of f at least `steps` = {steps} long (f at each step midpoint t_n + dt/2)"),
                        super::DriveSampling::Substeps => format!("{need} samples (steps = {steps} × {spp} per step, at drive_sample_times)"),
                    };
                    return Err(InputError::range("drive", what, format!("{} samples", d.f.len())).into());
                }
            }
            None if self.is_driven() && steps > 0 => {
                return Err(InputError::range("drive", "samples or a callable f(t) for the drive potential", "None").into());
            }
            None => {}
        }
        Ok(())
    }

    pub(super) fn renormalise(&self, psi: &mut [Complex64]) -> Result<()> {
        let nrm = sum_sq(psi) * self.grid().cell_volume();
        if !(nrm.is_finite() && nrm > 0.0) {
            return Err(NumericalError::Diverged(format!(
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
        check_state("psi0", psi0, self.n(), 0)?;
        self.check_run_args(steps, record_every)?;
        let bytes = (Self::n_records(steps, record_every) as u64).saturating_mul(self.n() as u64 * 16);
        check_memory("record_every", bytes, "record fewer snapshots: raise record_every")?;
        self.run_inner(psi0, steps, record_every, progress, self.n() >= self.par_threshold)
    }

    fn run_inner(
        &self,
        psi0: &[Complex64],
        steps: usize,
        record_every: usize,
        progress: &mut dyn FnMut(usize) -> bool,
        par: bool,
    ) -> Result<Run> {
        let n = self.n();
        let n_rec = Self::n_records(steps, record_every);
        let too_large = |_| InputError::TooLarge {
            argument: "record_every".into(),
            needed_bytes: (n_rec as u64).saturating_mul(n as u64 * 16),
            available_bytes: crate::error::available_memory_bytes().unwrap_or(0),
            hint: "record fewer snapshots: raise record_every".into(),
        };
        let mut states: Vec<Complex64> = Vec::new();
        states.try_reserve_exact(n_rec.saturating_mul(n)).map_err(too_large)?;
        let nd = self.shape.len();
        let per_axis = |a: usize| if nd > a { Vec::with_capacity(n_rec) } else { Vec::new() };
        let mut run = Run {
            n,
            shape: self.shape.clone(),
            record_steps: Vec::with_capacity(n_rec),
            times: Vec::with_capacity(n_rec),
            states,
            norm: Vec::with_capacity(n_rec),
            mean_x: Vec::with_capacity(n_rec),
            mean_y: per_axis(1),
            mean_z: per_axis(2),
            mean_p: Vec::with_capacity(n_rec),
            mean_py: per_axis(1),
            mean_pz: per_axis(2),
            energy: Vec::with_capacity(n_rec),
            autocorrelation: Vec::with_capacity(n_rec),
            absorbed_norm: None,
            steps_done: 0,
            cancelled: false,
        };
        let zero = Complex64::new(0.0, 0.0);
        let mut psi = psi0.to_vec();
        if self.options.imaginary_time {
            self.renormalise(&mut psi)?;
        }
        let init = psi.clone();
        let mut scratch = vec![zero; self.scratch_len];
        let mut work = vec![zero; n];

        let record = |run: &mut Run, psi: &[Complex64], work: &mut [Complex64], scratch: &mut [Complex64], m: usize| {
            let o = self.observe(psi, work, scratch, self.drive_value_at(m));
            let ac: Complex64 = init.iter().zip(psi).map(|(a, b)| a.conj() * b).sum::<Complex64>() * self.grid().cell_volume();
            run.record_steps.push(m);
            run.times.push(self.options.t0 + m as f64 * self.options.dt);
            run.states.extend_from_slice(psi);
            run.norm.push(o.norm);
            run.mean_x.push(o.position[0]);
            run.mean_p.push(o.momentum[0]);
            if nd >= 2 {
                run.mean_y.push(o.position[1]);
                run.mean_py.push(o.momentum[1]);
            }
            if nd == 3 {
                run.mean_z.push(o.position[2]);
                run.mean_pz.push(o.momentum[2]);
            }
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
            if self.options.imaginary_time {
                self.renormalise(&mut psi)?;
            }
            if done.is_multiple_of(record_every) || done == steps {
                self.apply_kick(&mut psi, Kick::Close, st, par);
                open = false;
                if self.options.imaginary_time {
                    self.renormalise(&mut psi)?;
                }
                record(&mut run, &psi, &mut work, &mut scratch, done);
            }
            if (done.is_multiple_of(chunk) || done == steps) && !progress(done) {
                if open {
                    self.apply_kick(&mut psi, Kick::Close, st, par);
                    if self.options.imaginary_time {
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
        let n = self.n();
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

}
