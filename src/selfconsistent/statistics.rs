//! Occupation of 2D subbands: Fermi-Dirac statistics with the 2D density of states and
//! spin degeneracy 2 (e.g. Davies 1998, *The Physics of Low-Dimensional Semiconductors*,
//! eq. 1.98): N_i = (m_i k_B T/πħ²) ln(1 + exp((E_F − E_i)/k_B T)), m_i the in-plane mass
//! of subband i (here ⟨ψ_i|m|ψ_i⟩, the band-edge mass the subband sees).

/// Boltzmann constant in meV/K (exact since the 2019 SI: 1.380649e-23 J/K).
pub const KB_MEV_PER_K: f64 = 1.380_649e-23 / 1.602_176_634e-22;

/// ln(1 + eˣ) without overflow.
pub fn softplus(x: f64) -> f64 {
    if x > 35.0 {
        x + (-x).exp()
    } else if x < -35.0 {
        x.exp()
    } else {
        x.exp().ln_1p()
    }
}

/// Sheet density (nm⁻²) of a subband at `level` with in-plane mass `mass` (m_e) for a
/// Fermi level `fermi` (meV) at `kt` = k_B T (meV); `h2m` = ħ²/2m_e (meV·nm²), so that
/// m/(πħ²) = mass/(2π·h2m).
pub fn sheet_density(fermi: f64, level: f64, mass: f64, kt: f64, h2m: f64) -> f64 {
    mass * kt / (2.0 * std::f64::consts::PI * h2m) * softplus((fermi - level) / kt)
}

/// ∂N/∂E_F (nm⁻²/meV) of [`sheet_density`]: (m/πħ²)·f(E_i − E_F), f the Fermi function.
pub fn sheet_density_slope(fermi: f64, level: f64, mass: f64, kt: f64, h2m: f64) -> f64 {
    let x = (fermi - level) / kt;
    let f = if x >= 0.0 { 1.0 / (1.0 + (-x).exp()) } else { x.exp() / (1.0 + x.exp()) };
    mass / (2.0 * std::f64::consts::PI * h2m) * f
}

/// The Fermi level that puts `total` (nm⁻², > 0) electrons into the subbands (levels,
/// masses): the sheet density is increasing in E_F, so bisection on a bracket grown
/// from the lowest level converges to round-off.
pub fn fermi_level_for(total: f64, levels: &[f64], masses: &[f64], kt: f64, h2m: f64) -> f64 {
    let n = |ef: f64| levels.iter().zip(masses).map(|(&e, &m)| sheet_density(ef, e, m, kt, h2m)).sum::<f64>();
    let e0 = levels.iter().cloned().fold(f64::INFINITY, f64::min);
    let (mut lo, mut hi) = (e0 - 40.0 * kt, e0 + kt);
    while n(lo) > total {
        lo -= 40.0 * kt;
    }
    while n(hi) < total {
        hi += (hi - e0).max(kt);
    }
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if n(mid) < total {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_subband_inverts_exactly() {
        // N = (m kT/πħ²) ln(1 + e^{(E_F − E_1)/kT}) ⇔ E_F = E_1 + kT ln(e^{N/g} − 1) (Davies 1998).
        let (m, kt, h2m, e1, total) = (0.067, KB_MEV_PER_K * 10.0, 38.1, 12.0, 5e-3);
        let g = m * kt / (2.0 * std::f64::consts::PI * h2m);
        let ef = fermi_level_for(total, &[e1], &[m], kt, h2m);
        assert!((ef - (e1 + kt * ((total / g).exp() - 1.0).ln())).abs() < 1e-10);
        assert!((sheet_density(ef, e1, m, kt, h2m) - total).abs() < 1e-14);
    }
}
