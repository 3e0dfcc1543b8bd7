//! Exchange-correlation potential in the local-density approximation of Hedin &
//! Lundqvist (1971, J. Phys. C 4, 2064), in the parametrisation used for semiconductor
//! heterostructures by Stern & Das Sarma (1984, Phys. Rev. B 30, 840, eq. 13):
//!   V_xc(z) = −(2/(π α r_s)) (1 + 0.7734 x ln(1 + 1/x)) Ry*,
//!   α = (4/9π)^{1/3}, x = r_s/21, r_s = (4π a*³ n/3)^{−1/3},
//! with the effective Bohr radius a* = ε_r (m_e/m) a_B and Rydberg Ry* = (m/m_e)/ε_r² Ry
//! of the local material. An approximation (homogeneous 3D electron gas, local).

/// Bohr radius in nm and Rydberg energy in meV (CODATA 2022).
const BOHR_NM: f64 = 0.052_917_721_054_4;
const RYDBERG_MEV: f64 = 13_605.693_122_99;

/// V_xc (meV) at density `n` (nm⁻³) in a material of relative permittivity `eps` and mass
/// `mass` (m_e); 0 where n ≤ 0.
pub fn hedin_lundqvist(n: f64, eps: f64, mass: f64) -> f64 {
    if !(n > 0.0) {
        return 0.0;
    }
    let a_star = eps / mass * BOHR_NM;
    let ry_star = mass / (eps * eps) * RYDBERG_MEV;
    let rs = (4.0 * std::f64::consts::PI * a_star.powi(3) * n / 3.0).powf(-1.0 / 3.0);
    let alpha = (4.0 / (9.0 * std::f64::consts::PI)).powf(1.0 / 3.0);
    let x = rs / 21.0;
    -(2.0 / (std::f64::consts::PI * alpha * rs)) * (1.0 + 0.7734 * x * (1.0 + 1.0 / x).ln()) * ry_star
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exchange_limit_at_high_density() {
        // For r_s → 0 the correlation term vanishes and V_x = −(2/(π α r_s)) Ry*: the
        // Kohn-Sham exchange potential of the electron gas (textbook, e.g. Stern & Das
        // Sarma 1984 eq. 13 with x → 0).
        let (eps, m) = (12.9, 0.067);
        let a_star = eps / m * BOHR_NM;
        let n = 1e3 / a_star.powi(3);
        let rs = (4.0 * std::f64::consts::PI * a_star.powi(3) * n / 3.0).powf(-1.0 / 3.0);
        let alpha = (4.0 / (9.0 * std::f64::consts::PI)).powf(1.0 / 3.0);
        let vx = -(2.0 / (std::f64::consts::PI * alpha * rs)) * m / (eps * eps) * RYDBERG_MEV;
        assert!((hedin_lundqvist(n, eps, m) / vx - 1.0).abs() < 0.02);
        assert_eq!(hedin_lundqvist(0.0, eps, m), 0.0);
        assert!(hedin_lundqvist(1e-4, eps, m) < 0.0);
    }
}
