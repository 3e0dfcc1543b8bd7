"""Independent references for specwell's tests and benchmarks (pure numpy/scipy; does not
import specwell).

Model and conventions (DESIGN.md, "Public contract additions"): lengths nm, energies meV,
masses m_e, fields kV/cm, H2M = ħ²/2m_e from CODATA (scipy.constants). A stack is a list
of layers (thickness, band_edge, mass[, nonparabolicity α 1/eV[, doping cm⁻³]]); z = 0 at
its left edge; a field F adds 0.1·F·(clamp(z, 0, L) − L/2) meV; the first and last layers
continue as flat semi-infinite claddings. BenDaniel-Duke: ψ and ψ'/m continuous.

Modules
* stack            units, Layer, Stack (profiles, leads)
* closed_forms     Bastard finite well, rectangular barrier, step, Kronig-Penney, Airy
                   zeros, triangular well, V = |x|, 2D occupation, constant-T supply integral
* transfer         transfer matrices: bound_levels, transmission, resonances, Bloch bands
* finite_difference  BenDaniel-Duke finite differences with Richardson extrapolation
* poisson          Schrödinger-Poisson (finite differences, Anderson mixing)
* current          Tsu-Esaki current density

Accuracy, as measured by tests/test_reference.py (closed form or independent construction):
* bound_levels: 1e-15 relative vs Bastard (1981) roots, also with non-parabolicity (Nelson,
  Miller & Kleinman 1987); 8e-13 vs the Airy-zero triangular well in a field (limited by
  the finite wall of that construction); Airy/plane-wave layer matrices 1e-13 vs DOP853;
  tunnel-split pairs down to ~1e-8 meV are resolved (20 nm barrier pair: splitting equal to
  finite differences to 5e-6).
* transmission: 2e-15 vs the rectangular-barrier formula (also T ~ 1e-150), step 1e-15,
  1e-12 vs ODE-integrated scattering in a field; R + T = 1 to 1e-13.
* resonances: Breit-Wigner half-maximum at E_r ± Γ/2 to 2e-3 (the Lorentzian's own
  accuracy), width ratios vs WKB e^{−2κΔb} to 0.3 %.
* miniband_energies: 1e-15 vs Kronig-Penney roots and the empty lattice.
* fd_levels: O(h²) raw (3e-4 relative at h = 0.1 nm), O(h⁴) Richardson (6e-8 at h = 0.1,
  4e-9 at 0.05); ~10 ms for a three-well stack at 1e-7.
* schrodinger_poisson: neutrality 1e-12, residual < 1e-9 meV, Richardson O(h⁴) in
  E_i − E_F (6e-6 meV between h = 0.2 and 0.1 nm).
* tsu_esaki_integral: 1e-15 vs the dilogarithm (T = 1), 1e-13 vs the exact log-gamma
  Lorentzian integral; tsu_esaki_current quadrature converged to ~1e-10 relative.
"""

from .closed_forms import (abs_potential_levels, airy_zeros, dos_2d, finite_well_levels,
                           free_folded_bands, kronig_penney_energies, kronig_penney_rhs,
                           lorentzian_supply_integral, rectangular_barrier_transmission,
                           sheet_density_2d, step_transmission, supply_integral_constant_t,
                           triangular_well_levels)
from .current import (adaptive_gauss, bias_field_kv_cm, supply_function, tsu_esaki_current,
                      tsu_esaki_integral, tsu_esaki_prefactor)
from .finite_difference import fd_levels, fd_levels_profile, fd_states
from .poisson import (SPResult, modulation_doped_well, schrodinger_poisson, single_heterojunction,
                      solve_poisson)
from .stack import H2M, KB_MEV, Layer, Stack, as_layers
from .transfer import (bloch_half_trace, bound_levels, layer_matrix, matching_function,
                       miniband_energies, resonances, stack_matrix, transmission,
                       transmission_amplitude)

__all__ = [
    "H2M", "KB_MEV", "Layer", "Stack", "as_layers",
    "abs_potential_levels", "airy_zeros", "dos_2d", "finite_well_levels", "free_folded_bands",
    "kronig_penney_energies", "kronig_penney_rhs", "rectangular_barrier_transmission",
    "lorentzian_supply_integral", "sheet_density_2d", "step_transmission",
    "supply_integral_constant_t", "triangular_well_levels",
    "adaptive_gauss", "bias_field_kv_cm", "supply_function", "tsu_esaki_current",
    "tsu_esaki_integral", "tsu_esaki_prefactor",
    "fd_levels", "fd_levels_profile", "fd_states",
    "SPResult", "modulation_doped_well", "schrodinger_poisson", "single_heterojunction",
    "solve_poisson",
    "bloch_half_trace", "bound_levels", "layer_matrix", "matching_function",
    "miniband_energies", "resonances", "stack_matrix", "transmission", "transmission_amplitude",
]
