//! Open and periodic stacks on Legendre spectral elements: Bloch minibands of a
//! superlattice, transmission between the claddings as leads, resonances
//! (quasi-bound levels) and the Tsu-Esaki tunnelling current.
//!
//! ## Model and conventions
//! The single-band BenDaniel-Duke equation −c d/dz (1/m) dψ/dz + V ψ = E ψ with
//! c = ħ²/2m_e (meV·nm²), lengths in nm, energies in meV, masses in m_e, parabolic
//! bands (layers with a non-parabolicity α ≠ 0 are refused: an energy-dependent mass
//! is outside these solvers). The stack convention of [`crate::model::stack`] holds:
//! z = 0 at the left edge of the stack, a field F (kV/cm) adds 0.1·F·(clamp(z, 0, L) − L/2)
//! meV, linear inside the stack and flat beyond it, and the first and last layers
//! continue as semi-infinite claddings.
//!
//! * [`bands`]: the stack is one period d = L of an infinite superlattice (no field);
//!   Bloch-periodic elements ψ(z + d) = e^{iqd} ψ(z).
//! * [`transmission`]: the claddings are the leads (flat, plane waves); the quantum
//!   transmitting boundary method (Lent & Kirkner 1990) on elements covering [0, L].
//! * [`resonances`]: poles E_r − iΓ/2 of the scattering problem of [`transmission`].
//! * [`current`]: Tsu & Esaki (1973) with Fermi-Dirac leads, the bias as a field.
//!
//! Every solver sizes its own mesh ([`mesh`]) and checks itself at two element orders,
//! p and p + 2, on the same mesh (spectral convergence makes the p + 2 result the more
//! accurate one, which is returned).

pub mod bands;
pub mod current;
pub mod mesh;
pub mod quadrature;
pub mod resonances;
pub mod transmission;

use crate::error::InputError;
use crate::model::stack::Heterostructure;

/// Refuse stacks outside the parabolic model of this module.
pub(crate) fn check_parabolic(stack: &Heterostructure) -> Result<(), InputError> {
    if let Some(i) = stack.layers().iter().position(|l| l.nonparabolicity != 0.0) {
        return Err(InputError::range(
            &format!("layers[{i}].nonparabolicity"),
            "0 for bands, transmission, resonances and currents (energy-dependent masses are not supported there)",
            stack.layers()[i].nonparabolicity,
        ));
    }
    Ok(())
}
