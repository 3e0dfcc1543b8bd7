//! Unit systems and CODATA 2022 constants.
//!
//! Every solver works with two numbers taken from the unit system:
//! * `hbar2_over_2me`: ħ²/(2 m_e) in energy·length², so the kinetic operator for
//!   a particle of mass `m` (in units of the system's mass unit) is
//!   `-(hbar2_over_2me / m) d²/dx²`;
//! * `hbar`: ħ in energy·time, so states evolve as `exp(-i H t / hbar)`.
//!
//! | system | length | energy | mass | time | ħ²/2m_e | ħ |
//! |---|---|---|---|---|---|---|
//! | `Natural` | 1 | 1 | 1 | 1 | 1/2 | 1 |
//! | `Atomic` | bohr | hartree | m_e | ħ/E_h | 1/2 | 1 |
//! | `Semiconductor` | nm | meV | m_e | fs | 38.0998… meV nm² | 658.2119… meV fs |
//! | `ColdAtom` | µm | ħ/ms | u (dalton) | ms | 31.7530… (ħ/ms) µm² | 1 |
//! | `Molecular` | Å | cm⁻¹ | u (dalton) | fs | 16.8576… cm⁻¹ Å² | 5308.84… cm⁻¹ fs |
//!
//! For `ColdAtom` the mass unit is the atomic mass constant u (so the first column is
//! ħ²/(2u)) and the energy unit is ħ per millisecond (1.054…e-31 J, h × 159.15… Hz), which
//! makes ħ = 1: a harmonic trap of frequency f (Hz) is V = ½ m ω² x² with
//! ω = 2π f · 1e-3 rad/ms ([`Units::angular_frequency`]).

use crate::error::InputError;

/// CODATA 2022 exact and recommended values (SI; Mohr et al., Rev. Mod. Phys. 97, 025002 (2025)),
/// the values scipy.constants ≥ 1.15 carries.
pub mod codata2022 {
    /// Planck constant h, J s (exact since 2019).
    pub const PLANCK: f64 = 6.626_070_15e-34;
    /// Reduced Planck constant ħ = h/2π, J s (exact).
    pub const HBAR: f64 = PLANCK / (2.0 * std::f64::consts::PI);
    /// Electron mass, kg.
    pub const ELECTRON_MASS: f64 = 9.109_383_713_9e-31;
    /// Elementary charge, C (exact).
    pub const ELEMENTARY_CHARGE: f64 = 1.602_176_634e-19;
    /// Hartree energy, J.
    pub const HARTREE: f64 = 4.359_744_722_206e-18;
    /// Bohr radius, m.
    pub const BOHR_RADIUS: f64 = 5.291_772_105_44e-11;
    /// Atomic mass constant u = m(¹²C)/12 (dalton), kg (CODATA 2022, recalled from memory:
    /// 1.660 539 068 92(52)e-27 kg).
    pub const ATOMIC_MASS_CONSTANT: f64 = 1.660_539_068_92e-27;
    /// Atomic unit of time ħ/E_h, s.
    pub const ATOMIC_TIME: f64 = HBAR / HARTREE;
    /// Speed of light in vacuum c, m/s (exact).
    pub const SPEED_OF_LIGHT: f64 = 299_792_458.0;
    /// One wavenumber (cm⁻¹) as an energy, h·c·100 m⁻¹, J.
    pub const WAVENUMBER_ENERGY: f64 = PLANCK * SPEED_OF_LIGHT * 100.0;
    /// Boltzmann constant k_B, J/K (exact since 2019).
    pub const BOLTZMANN: f64 = 1.380_649e-23;
}

/// A unit system. Parsed from a string only at the Python edge.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Units {
    /// ħ = 1, mass unit 1: kinetic energy -(1/2m) d²/dx².
    Natural,
    /// Hartree atomic units (ħ = m_e = e = 1): the same numbers as `Natural`,
    /// lengths in bohr, energies in hartree, times in ħ/E_h.
    Atomic,
    /// Lengths in nm, energies in meV, masses in m_e, times in fs.
    Semiconductor,
    /// Cold atoms: lengths in µm, times in ms, masses in u (dalton), energies in ħ/ms
    /// (so ħ = 1); trap frequencies from Hz with [`Units::angular_frequency`].
    ColdAtom,
    /// Molecular vibrations: lengths in Å, energies in cm⁻¹ (wavenumbers), masses in u
    /// (dalton; a reduced mass in u as given by mass tables), times in fs.
    Molecular,
}

impl Units {
    /// Option strings and their systems, in the order listed in error messages: the one
    /// place the names live (parsing, `name()` and the Python `UNITS` list read it).
    pub const TABLE: [(&'static str, Units); 5] = [
        ("natural", Units::Natural),
        ("atomic", Units::Atomic),
        ("semiconductor", Units::Semiconductor),
        ("cold-atom", Units::ColdAtom),
        ("molecular", Units::Molecular),
    ];

    /// Parse an option string (exact, lower case).
    pub fn parse(s: &str) -> Result<Self, InputError> {
        crate::error::parse_choice("units", s, &Self::TABLE)
    }

    /// The option string of this system.
    pub fn name(self) -> &'static str {
        crate::error::choice_name(&Self::TABLE, self)
    }

    /// ħ²/(2 m₁) in energy·length² of this system, m₁ its mass unit (m_e; u for `ColdAtom`).
    pub fn hbar2_over_2me(self) -> f64 {
        use codata2022::*;
        match self {
            Units::Natural | Units::Atomic => 0.5,
            Units::Semiconductor => {
                // J m² -> meV nm²: divide by (e * 1e-3) and multiply by 1e18.
                HBAR * HBAR / (2.0 * ELECTRON_MASS) / (ELEMENTARY_CHARGE * 1e-3) * 1e18
            }
            // J m² -> (ħ/ms) µm²: divide by ħ/1e-3 s and multiply by 1e12.
            Units::ColdAtom => HBAR * HBAR / (2.0 * ATOMIC_MASS_CONSTANT) / (HBAR / 1e-3) * 1e12,
            // J m² -> cm⁻¹ Å²
            Units::Molecular => HBAR * HBAR / (2.0 * ATOMIC_MASS_CONSTANT) / WAVENUMBER_ENERGY * 1e20,
        }
    }

    /// ħ in energy·time of this system.
    pub fn hbar(self) -> f64 {
        use codata2022::*;
        match self {
            Units::Natural | Units::Atomic => 1.0,
            // J s -> meV fs
            Units::Semiconductor => HBAR / (ELEMENTARY_CHARGE * 1e-3) * 1e15,
            // the energy unit is ħ/ms
            Units::ColdAtom => 1.0,
            // J s -> cm⁻¹ fs
            Units::Molecular => HBAR / WAVENUMBER_ENERGY * 1e15,
        }
    }

    /// Time of one unit of this system in seconds (natural units: `None`).
    pub fn time_unit_second(self) -> Option<f64> {
        match self {
            Units::Natural => None,
            Units::Atomic => Some(codata2022::ATOMIC_TIME),
            Units::Semiconductor => Some(1e-15),
            Units::ColdAtom => Some(1e-3),
            Units::Molecular => Some(1e-15),
        }
    }

    /// ω = 2π f in radians per time unit of this system, for a frequency f in Hz
    /// (`frequency_hz` finite and ≥ 0; natural units have no time unit: an error).
    pub fn angular_frequency(self, frequency_hz: f64) -> Result<f64, InputError> {
        if !(frequency_hz.is_finite() && frequency_hz >= 0.0) {
            return Err(InputError::range("frequency_hz", "a finite frequency >= 0 (Hz)", frequency_hz));
        }
        let t = self.time_unit_second().ok_or_else(|| {
            InputError::range("units", "a unit system with a time unit (natural units have none: give ω directly)", "\"natural\"")
        })?;
        Ok(2.0 * std::f64::consts::PI * frequency_hz * t)
    }

    /// Energy of one unit of this system in joules (natural units: `None`).
    pub fn energy_unit_joule(self) -> Option<f64> {
        match self {
            Units::Natural => None,
            Units::Atomic => Some(codata2022::HARTREE),
            Units::Semiconductor => Some(codata2022::ELEMENTARY_CHARGE * 1e-3),
            Units::ColdAtom => Some(codata2022::HBAR / 1e-3),
            Units::Molecular => Some(codata2022::WAVENUMBER_ENERGY),
        }
    }

    /// Length of one unit of this system in metres (natural units: `None`).
    pub fn length_unit_metre(self) -> Option<f64> {
        match self {
            Units::Natural => None,
            Units::Atomic => Some(codata2022::BOHR_RADIUS),
            Units::Semiconductor => Some(1e-9),
            Units::ColdAtom => Some(1e-6),
            Units::Molecular => Some(1e-10),
        }
    }

    /// Symbols (length, energy, mass, time) for tables and plots.
    pub fn symbols(self) -> [&'static str; 4] {
        match self {
            Units::Natural => ["", "", "", ""],
            Units::Atomic => ["bohr", "Ha", "m_e", "ħ/Ha"],
            Units::Semiconductor => ["nm", "meV", "m_e", "fs"],
            Units::ColdAtom => ["µm", "ħ/ms", "u", "ms"],
            Units::Molecular => ["Å", "cm⁻¹", "u", "fs"],
        }
    }

    /// Kinetic prefactor ħ²/(2m) for a mass `mass` in units of the system's mass unit.
    pub fn kinetic_prefactor(self, mass: f64) -> f64 {
        self.hbar2_over_2me() / mass
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn semiconductor_constants_match_recalled_values() {
        // Recalled from memory (CODATA 2018 derived; CODATA 2022 moves them by ~1e-9): ħ²/2m_e = 38.0998 meV nm², ħ = 658.2120 meV fs.
        assert!((Units::Semiconductor.hbar2_over_2me() - 38.0998).abs() < 1e-3);
        assert!((Units::Semiconductor.hbar() - 658.2120).abs() < 1e-3);
    }

    #[test]
    fn cold_atom_constants_match_recalled_values() {
        // Recalled from memory: ħ = 1.054571817e-34 J s, u = 1.66053906892e-27 kg (CODATA 2022),
        // so ħ·1e-3/(2u·1e-12) = 31.7530 (ħ/ms) µm²; for ⁸⁷Rb (86.909 u) ħ/m = 0.7307 µm²/ms.
        assert!((Units::ColdAtom.hbar2_over_2me() - 31.7530).abs() < 1e-3);
        assert!((2.0 * Units::ColdAtom.kinetic_prefactor(86.909) - 0.7307).abs() < 1e-3);
        assert_eq!(Units::parse("cold-atom").unwrap(), Units::ColdAtom);
        // 100 Hz is 2π·0.1 rad/ms
        let w = Units::ColdAtom.angular_frequency(100.0).unwrap();
        assert!((w - 0.2 * std::f64::consts::PI).abs() < 1e-15);
        assert!(Units::Natural.angular_frequency(1.0).is_err());
        assert!(Units::ColdAtom.angular_frequency(-1.0).is_err());
    }

    #[test]
    fn molecular_constants_match_recalled_values() {
        // Recalled from memory: the rotational-constant factor B = 16.8576/(μ r²) cm⁻¹ (μ in
        // u, r in Å) is ħ²/(2u); ħ/(hc) = 1/(2πc) = 5.30884e-12 cm⁻¹ s.
        assert!((Units::Molecular.hbar2_over_2me() - 16.8576).abs() < 1e-3);
        assert!((Units::Molecular.hbar() - 5308.84).abs() < 1e-2);
        assert_eq!(Units::parse("molecular").unwrap(), Units::Molecular);
    }

    #[test]
    fn parse_rejects_unknown() {
        let e = Units::parse("SI").unwrap_err();
        assert!(e.to_string().contains("natural"));
        assert_eq!(Units::parse("atomic").unwrap(), Units::Atomic);
    }
}
