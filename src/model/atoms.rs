//! Trapped atomic gases: oscillator lengths and the mean-field coupling constant g of the
//! Gross-Pitaevskii equation iħ∂ψ/∂t = [−ħ²∇²/2m + V + g|ψ|²]ψ with ψ normalised to 1
//! (so g carries the atom number N).
//!
//! * 3D: g₃ = 4πħ²aN/m for the s-wave scattering length a (Pitaevskii & Stringari,
//!   *Bose-Einstein Condensation*, 2003, Eq. 5.3 for ψ normalised to N; Dalfovo, Giorgini,
//!   Pitaevskii & Stringari 1999, Rev. Mod. Phys. 71, 463, Eq. 9).
//! * Quasi-2D (the gas frozen in the ground state of a tight harmonic confinement ω_z,
//!   a_z = √(ħ/mω_z), and a ≪ a_z): integrating out z with the Gaussian ground state gives
//!   g₂ = g₃/(√(2π) a_z) (Petrov, Holzmann & Shlyapnikov 2000, Phys. Rev. Lett. 84, 2551,
//!   leading term, without their logarithmic correction).
//! * Quasi-1D (tight isotropic transverse confinement ω_⊥, a_⊥ = √(ħ/mω_⊥), a ≪ a_⊥):
//!   g₁ = g₃/(2π a_⊥²) = 2ħω_⊥ a N (Olshanii 1998, Phys. Rev. Lett. 81, 938, leading term
//!   of g₁ = 2ħω_⊥a/(1 − C a/a_⊥), C ≈ 1.0326: the confinement-induced resonance is not
//!   included).
//!
//! Units: those of [`Units`]; the natural system for this job is [`Units::ColdAtom`]
//! (µm, ms, u, ħ/ms). g has units energy·length^d.

use crate::error::{check_positive, InputError};
use crate::model::units::Units;

/// How the gas is confined (which reduction of g₃ applies).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Confinement {
    /// A three-dimensional condensate: g₃.
    Free3D,
    /// Quasi-2D: frozen in the ground state of a tight trap of angular frequency ω_z
    /// (radians per time unit).
    Quasi2D { omega: f64 },
    /// Quasi-1D: frozen in the ground state of a tight isotropic transverse trap ω_⊥.
    Quasi1D { omega: f64 },
}

/// The harmonic oscillator length √(ħ/(mω)) (length) of a particle of `mass` (mass unit of
/// `units`) in a trap of angular frequency `omega` (radians per time unit), both > 0.
pub fn oscillator_length(units: Units, mass: f64, omega: f64) -> Result<f64, InputError> {
    crate::error::check_positive("mass", mass)?;
    check_positive("omega", omega)?;
    // ħ/(mω) = 2·(ħ²/2m)/(ħω)
    Ok((2.0 * units.kinetic_prefactor(mass) / (units.hbar() * omega)).sqrt())
}

/// g of N atoms of `mass` (mass unit of `units`, > 0) with s-wave scattering length
/// `scattering_length` (length, finite; negative for attractive interactions), in the
/// dimension set by `confinement` (see the module docs). `atom_number` > 0 (finite).
pub fn coupling_constant(
    units: Units,
    scattering_length: f64,
    atom_number: f64,
    mass: f64,
    confinement: Confinement,
) -> Result<f64, InputError> {
    if !scattering_length.is_finite() {
        return Err(InputError::range("scattering_length", "a finite length (negative: attractive)", scattering_length));
    }
    check_positive("atom_number", atom_number)?;
    check_positive("mass", mass)?;
    // 4πħ²a/m = 8π·(ħ²/2m)·a
    let g3 = 8.0 * std::f64::consts::PI * units.kinetic_prefactor(mass) * scattering_length * atom_number;
    let named = |omega: f64| {
        check_positive("confinement_hz", omega).map_err(|_| {
            InputError::range("confinement_hz", "a finite frequency > 0 (Hz) of the tight confinement", omega)
        })
    };
    Ok(match confinement {
        Confinement::Free3D => g3,
        Confinement::Quasi2D { omega } => {
            named(omega)?;
            g3 / ((2.0 * std::f64::consts::PI).sqrt() * oscillator_length(units, mass, omega)?)
        }
        Confinement::Quasi1D { omega } => {
            named(omega)?;
            let a = oscillator_length(units, mass, omega)?;
            g3 / (2.0 * std::f64::consts::PI * a * a)
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // Source: the closed forms of the module docs: g₁ = 2ħω_⊥aN (Olshanii 1998) and
    // g₂ = 2√(2π) ħ²aN/(m a_z) (Petrov, Holzmann & Shlyapnikov 2000), evaluated directly.
    #[test]
    fn reductions_match_closed_forms() {
        let u = Units::ColdAtom;
        let (a, n, m) = (0.005_3, 1.0e4, 86.909);
        let w = u.angular_frequency(500.0).unwrap();
        let g1 = coupling_constant(u, a, n, m, Confinement::Quasi1D { omega: w }).unwrap();
        assert!((g1 - 2.0 * u.hbar() * w * a * n).abs() < 1e-12 * g1.abs());
        let az = oscillator_length(u, m, w).unwrap();
        let hbar2_m = 2.0 * u.kinetic_prefactor(m);
        let g2 = coupling_constant(u, a, n, m, Confinement::Quasi2D { omega: w }).unwrap();
        let want = 2.0 * (2.0 * std::f64::consts::PI).sqrt() * hbar2_m * a * n / az;
        assert!((g2 - want).abs() < 1e-12 * want);
        let g3 = coupling_constant(u, -a, n, m, Confinement::Free3D).unwrap();
        assert!((g3 + 4.0 * std::f64::consts::PI * hbar2_m * a * n).abs() < 1e-12 * g3.abs());
        // Recalled from memory: a_ho = √(ħ/mω) ≈ 1.08 µm for ⁸⁷Rb at 100 Hz.
        let l = oscillator_length(u, m, u.angular_frequency(100.0).unwrap()).unwrap();
        assert!((l - 1.078).abs() < 5e-3, "{l}");
    }

    #[test]
    fn bad_inputs_name_their_argument() {
        let u = Units::ColdAtom;
        let e = coupling_constant(u, f64::NAN, 1.0, 1.0, Confinement::Free3D).unwrap_err();
        assert!(e.to_string().contains("`scattering_length`"));
        let e = coupling_constant(u, 0.01, 0.0, 1.0, Confinement::Free3D).unwrap_err();
        assert!(e.to_string().contains("`atom_number`"));
        let e = coupling_constant(u, 0.01, 1.0, 1.0, Confinement::Quasi1D { omega: 0.0 }).unwrap_err();
        assert!(e.to_string().contains("`confinement_hz`"));
        assert!(oscillator_length(u, -1.0, 1.0).is_err());
    }
}
