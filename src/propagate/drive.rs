//! The time-dependent term f(t)·V₁(x) of a split-step run: sampling times, samples
//! per step, kick weights and the drive value at the records (see the module docs
//! of [`super`] for the sampling schemes and their order).

use super::{Kick, SplitStep};
use crate::error::{check_finite, InputError, Result};

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

/// `drive` (f(t)) and `drive_potential` (V₁) come together: V(x,t) = V₀(x) + f(t)·V₁(x).
pub fn check_drive_pair(has_drive: bool, has_potential: bool) -> std::result::Result<(), InputError> {
    if has_drive == has_potential {
        return Ok(());
    }
    let (argument, missing) = if has_drive { ("drive_potential", "drive") } else { ("drive", "drive_potential") };
    Err(InputError::range(argument, format!("given together with `{missing}`: V(x,t) = V0(x) + drive(t)·drive_potential(x)"), "None"))
}

impl SplitStep {
    /// A copy of this propagator with the drive f(t)·V₁(x): V₁ is the options'
    /// `drive_potential`, `f` the samples at [`SplitStep::drive_sample_times`] for
    /// `sampling` (at least steps × samples-per-step values for a run of `steps`).
    pub fn with_drive(&self, f: Vec<f64>, sampling: DriveSampling) -> Result<SplitStep> {
        let Some(v1) = &self.options.drive_potential else {
            return Err(InputError::range("drive_potential", "given with `drive`: V(x,t) = V0(x) + drive(t)·drive_potential(x)", "None").into());
        };
        check_finite("drive", &f)?;
        let mut sp = self.clone();
        sp.drive = Some(Drive { v1: v1.clone(), f, sampling });
        Ok(sp)
    }

    /// Whether the options carry a drive potential (a run then needs drive samples).
    pub fn is_driven(&self) -> bool {
        self.options.drive_potential.is_some()
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
                t.push(self.options.t0 + (m as f64 + o) * self.options.dt);
            }
        }
        t
    }


    fn fval(&self, f: &[f64], sampling: DriveSampling, step: usize, s: usize) -> f64 {
        match sampling {
            DriveSampling::Substeps => f[step * self.weights.len() + s],
            DriveSampling::Midpoint => f[step],
        }
    }

    /// Σ f·w/2 of a kick (units of dt).
    pub(super) fn drive_weight(&self, d: &Drive, kind: Kick, step: usize) -> f64 {
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

    /// f at the record after `m` steps, linearly interpolated between the nearest samples
    /// on either side (extrapolated from the two nearest when one side is missing, constant
    /// when there is a single sample).
    pub(super) fn drive_value_at(&self, m: usize) -> f64 {
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
}
