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

Accuracy of each reference is measured against closed forms in tests/test_reference.py.
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
