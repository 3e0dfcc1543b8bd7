//! Tunnelling current density through a stack under bias: Tsu & Esaki (1973), Appl.
//! Phys. Lett. 22, 562, eq. (5), with the longitudinal energy E conserved, one in-plane
//! mass m (the emitter's, the left lead's layer mass) and Fermi-Dirac leads:
//!
//!   J(V) = (e m kT/(2π² ħ³)) ∫ T(E, V) ln[(1 + e^{(μ_L − E)/kT})/(1 + e^{(μ_R − E)/kT})] dE,
//!
//! in A/cm² with E and kT in meV. T(E, V) is the transmission of [`super::transmission`].
//!
//! ## Bias
//! The bias V (volts) is dropped linearly across the stack as the field
//! F = −10⁴·V/L kV/cm (L in nm), which replaces the stack's own field: with the field
//! term 0.1·F·(z − L/2) the right lead sits eV (1000·V meV) below the left one, and
//! F > 0 in the stack convention is V < 0 here. Both leads hold the same Fermi energy
//! `fermi_level` E_F above their own band edge: μ_L = V_L + E_F, μ_R = μ_L − 1000·V meV.
//! (The convention of the independent reference in tests/reference/current.py.)
//!
//! ## Quadrature
//! T vanishes below max(V_L, V_R) and the supply function has decayed by e^{−40} at
//! max(μ_L, μ_R) + 40 kT, the integration range. It is cut at every resonance E_r in it
//! and at E_r ± Γ·{½, 5, 50} ([`super::resonances::poles`] on the same mesh, so a line
//! far narrower than kT is sampled on its own scale), and the first piece, of length
//! min(10 kT, ½ the distance to the first cut), is integrated in u = √(E − E_0), which
//! removes the √(E − E_0) onset of T at the lead band edge E_0. The pieces go to the
//! adaptive Gauss-Legendre rule of [`super::quadrature`] (10 points) with the relative
//! tolerance `accuracy`: the sum of the interval estimates |I_whole − I_halves| is at
//! most accuracy·|J| (a conservative bound for this analytic integrand). T itself is
//! accurate to the mesh accuracy (MeshOptions), so J is good to about the sum of both.

use super::mesh::MeshOptions;
use super::quadrature::{integrate, Rule};
use super::resonances::poles;
use super::transmission::converge;
use crate::error::{InputError, Result};
use crate::model::stack::Heterostructure;
use crate::model::units::codata2022::{BOLTZMANN, ELECTRON_MASS, ELEMENTARY_CHARGE, HBAR};

/// Options of [`current_density`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CurrentOptions {
    /// Relative tolerance of the energy integral, in [1e-10, 1e-2].
    pub accuracy: f64,
    /// Mesh accuracy of T(E) (relative energies, absolute T).
    pub mesh: MeshOptions,
}

impl CurrentOptions {
    pub fn new(accuracy: f64) -> Self {
        CurrentOptions { accuracy, mesh: MeshOptions::new(1e-10) }
    }
}

/// k_B in meV/K.
pub fn boltzmann_mev() -> f64 {
    BOLTZMANN / (ELEMENTARY_CHARGE * 1e-3)
}

/// e m m_e k_B T/(2π² ħ³) in A/cm² per meV of the energy integral.
pub fn tsu_esaki_prefactor(mass: f64, temperature: f64) -> f64 {
    let per_joule = ELEMENTARY_CHARGE * mass * ELECTRON_MASS * BOLTZMANN * temperature / (2.0 * std::f64::consts::PI.powi(2) * HBAR.powi(3));
    per_joule * (ELEMENTARY_CHARGE * 1e-3) * 1e-4
}

/// The field (kV/cm) that drops `bias` volts across `stack`: F = −10⁴·V/L.
pub fn bias_field_kv_cm(stack: &Heterostructure, bias: f64) -> f64 {
    -1e4 * bias / stack.total_thickness()
}

/// ln(1 + e^x), without overflow.
fn softplus(x: f64) -> f64 {
    x.max(0.0) + (-x.abs()).exp().ln_1p()
}

fn check(bias: f64, temperature: f64, fermi_level: f64, opts: &CurrentOptions) -> std::result::Result<(), InputError> {
    if !bias.is_finite() {
        return Err(InputError::range("bias", "a finite voltage (V)", bias));
    }
    if !(temperature.is_finite() && temperature > 0.0) {
        return Err(InputError::range("temperature", "a finite temperature > 0 K", temperature));
    }
    if !fermi_level.is_finite() {
        return Err(InputError::range("fermi_level", "a finite energy (meV) above the lead band edges", fermi_level));
    }
    if !(opts.accuracy.is_finite() && (1e-10..=1e-2).contains(&opts.accuracy)) {
        return Err(InputError::range("accuracy", "a relative accuracy in [1e-10, 1e-2]", opts.accuracy));
    }
    opts.mesh.validate()
}

/// Tsu-Esaki current density (A/cm²) at `bias` (V), `temperature` (K) and `fermi_level`
/// (meV above each lead's band edge) (module docs). Errors for non-finite arguments, a
/// temperature ≤ 0, non-parabolic layers, or a quadrature that misses its tolerance.
pub fn current_density(stack: &Heterostructure, bias: f64, temperature: f64, fermi_level: f64, opts: &CurrentOptions) -> Result<f64> {
    check(bias, temperature, fermi_level, opts)?;
    super::check_parabolic(stack)?;
    let biased = stack.with_field(bias_field_kv_cm(stack, bias))?;
    let kt = boltzmann_mev() * temperature;
    let (vl, vr) = biased.cladding_edges();
    let mu_l = vl + fermi_level;
    let mu_r = mu_l - 1000.0 * bias;
    let e_lo = vl.max(vr);
    let e_hi = mu_l.max(mu_r) + 40.0 * kt;
    if !(e_hi > e_lo) || mu_l == mu_r {
        return Ok(0.0);
    }
    let conv = converge(&biased, e_hi, &[], &opts.mesh)?;
    let sys = conv.fine;
    let mut cuts = Vec::new();
    for z in poles(&sys, e_lo, e_hi) {
        let g = -2.0 * z.im;
        cuts.push(z.re);
        for f in [0.5, 5.0, 50.0] {
            cuts.push(z.re - f * g);
            cuts.push(z.re + f * g);
        }
    }
    cuts.retain(|c| *c > e_lo && *c < e_hi);
    cuts.sort_by(f64::total_cmp);
    cuts.dedup_by(|a, b| (*a - *b).abs() <= 1e-13 * a.abs().max(1.0));
    let head = (10.0 * kt).min(0.5 * (cuts.first().copied().unwrap_or(e_hi) - e_lo));
    let supply = |e: f64| softplus((mu_l - e) / kt) - softplus((mu_r - e) / kt);
    let mut failed: Option<InputError> = None;
    let mut f = |e: f64| match sys.scattering(e) {
        Ok(s) => s.transmission * supply(e),
        Err(err) => {
            failed.get_or_insert(err);
            0.0
        }
    };
    let rule = Rule::new(10)?;
    let max_pieces = 20_000;
    // The integrand has one sign (that of μ_L − μ_R) throughout, so a relative tolerance on
    // each part is one on the sum; no absolute floor is needed.
    let mut total = 0.0;
    if head > 0.0 {
        let mut fu = |u: f64| 2.0 * u * f(e_lo + u * u);
        total += integrate(&mut fu, &[0.0, head.sqrt()], &rule, opts.accuracy, 0.0, max_pieces)?.value;
    }
    let mut edges = vec![e_lo + head];
    edges.extend(cuts.iter().copied().filter(|c| *c > e_lo + head));
    edges.push(e_hi);
    edges.dedup_by(|a, b| !(*a > *b));
    if edges.len() >= 2 {
        total += integrate(&mut f, &edges, &rule, opts.accuracy, 0.0, max_pieces)?.value;
    }
    if let Some(err) = failed {
        return Err(err.into());
    }
    Ok(tsu_esaki_prefactor(stack.layers()[0].mass, temperature) * total)
}

/// [`current_density`] at every bias (V), in parallel over the biases (results in order).
pub fn current_voltage(stack: &Heterostructure, biases: &[f64], temperature: f64, fermi_level: f64, opts: &CurrentOptions) -> Result<Vec<f64>> {
    use rayon::prelude::*;
    if let Some(i) = biases.iter().position(|b| !b.is_finite()) {
        return Err(InputError::range(&format!("biases[{i}]"), "finite voltages (V)", biases[i]).into());
    }
    check(0.0, temperature, fermi_level, opts)?;
    biases.par_iter().map(|&v| current_density(stack, v, temperature, fermi_level, opts)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::stack::Layer;

    #[test]
    fn constant_transmission_gives_the_dilogarithm_closed_form() {
        // A uniform stack has T = 1 above the band edge at zero field; with a bias the
        // field tilts it, so check instead the constant-T integral through the
        // quadrature alone: ∫_{E0}^{∞} ln(1 + e^{(μ−E)/kT}) dE = −kT·Li₂(−e^{(μ−E0)/kT})
        // (dilogarithm, A&S 27.7); for μ − E0 = 0: kT·π²/12.
        let kt = 25.0;
        let rule = Rule::new(10).unwrap();
        let mut f = |e: f64| softplus(-e / kt);
        let r = integrate(&mut f, &[0.0, 40.0 * kt], &rule, 1e-12, 0.0, 1000).unwrap();
        let exact = kt * std::f64::consts::PI.powi(2) / 12.0;
        assert!(((r.value - exact) / exact).abs() < 1e-12, "{} vs {exact}", r.value);
    }

    #[test]
    fn zero_bias_gives_zero_current_and_bad_input_is_an_error() {
        let stack = Heterostructure::new(vec![Layer::new(5.0, 0.0, 0.067), Layer::new(5.0, 300.0, 0.092), Layer::new(5.0, 0.0, 0.067)], 0.0).unwrap();
        let o = CurrentOptions::new(1e-8);
        assert_eq!(current_density(&stack, 0.0, 77.0, 10.0, &o).unwrap(), 0.0);
        let j = current_density(&stack, 0.01, 77.0, 10.0, &o).unwrap();
        assert!(j > 0.0);
        let jm = current_density(&stack, -0.01, 77.0, 10.0, &o).unwrap();
        // A symmetric stack: J(−V) = −J(V) (mirror symmetry; the emitter mass is the same).
        assert!(((j + jm) / j).abs() < 1e-7, "{j} {jm}");
        assert!(current_density(&stack, 0.1, 0.0, 10.0, &o).is_err());
        assert!(current_density(&stack, 0.1, -3.0, 10.0, &o).is_err());
        assert!(current_density(&stack, f64::NAN, 300.0, 10.0, &o).is_err());
        assert!(current_density(&stack, 0.1, 300.0, f64::INFINITY, &o).is_err());
        assert!(current_voltage(&stack, &[0.0, f64::NAN], 300.0, 10.0, &o).is_err());
        let jv = current_voltage(&stack, &[0.0, 0.01], 77.0, 10.0, &o).unwrap();
        assert_eq!(jv[0], 0.0);
        assert_eq!(jv[1], j);
    }
}
