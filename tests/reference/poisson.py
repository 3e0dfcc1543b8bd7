"""An independent finite-difference Schrödinger-Poisson reference (scipy).

Model (the one specwell's self_consistent() is to have):
* constant effective mass m (all layers must share it), uniform relative permittivity ε_r;
* fully ionised donors N_D (cm⁻³) per stack layer; the claddings are undoped;
* subbands E_i, ψ_i from the BenDaniel-Duke finite differences of `finite_difference`
  (nodes on interfaces, Dirichlet at −cladding and L + cladding) with V = E_c(z) + U(z);
* 2D Fermi-Dirac occupation with spin, n_i = (m kT/πħ²) ln(1 + e^{(E_F − E_i)/kT})
  (Davies 1998, "The Physics of Low-Dimensional Semiconductors", §1.6), E_F fixed by global
  neutrality Σ n_i = ∫ N_D dz; density n(z) = Σ n_i |ψ_i(z)|²;
* Poisson −d/dz(ε dφ/dz) = e(N_D − n) on the whole domain with zero field at both ends;
  the electron potential energy U = −eφ obeys U'' = (e/ε₀ε_r)(N_D − n). It is discretised
  with the same nodes and dual cells as the Schrödinger operator (box integration):
  (U_{j+1} − U_j)/h_{j+½} − (U_j − U_{j−1})/h_{j−½} = (e/ε₀ε_r)(∫_cell N_D − w_j n_j),
  so the discrete neutrality that fixes E_F is exactly the solvability condition of the
  Neumann problem. Gauge: U = 0 at the left end of the domain (results E_i − E_F do not
  depend on it).
* Self-consistency: Anderson mixing on U (Anderson 1965, J. ACM 12, 547; the "type II"
  form of Eyert 1996, J. Comput. Phys. 124, 271) to max|U_out − U_in| < tol (default
  1e-9 meV); Richardson extrapolation in h of E_i − E_F, n_i and U (common nodes).

Numbers in the example structures are illustrative, not fitted to any material.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import scipy.constants as C
from scipy.linalg import solve_banded
from scipy.optimize import brentq

from .closed_forms import dos_2d
from .finite_difference import fd_states, grid_from_counts, piecewise_grid
from .stack import KB_MEV, PER_CM3_IN_PER_NM3, PER_NM2_IN_PER_CM2, Layer, Stack, as_layers

#: e/ε₀ in meV·nm: U'' [meV/nm²] = POISSON_COEFF/ε_r · (N_D − n) [nm⁻³].
POISSON_COEFF = C.e / C.epsilon_0 * 1e12


def cell_integrals(z, breakpoints, density_per_segment):
    """∫ over each node's dual cell of a piecewise-constant density (value per segment
    between breakpoints; breakpoints are nodes)."""
    seg = np.searchsorted(breakpoints, 0.5 * (z[:-1] + z[1:]), side="right") - 1
    half = 0.5 * np.diff(z) * np.asarray(density_per_segment)[seg]
    out = np.zeros(len(z))
    out[:-1] += half
    out[1:] += half
    return out


def solve_poisson(z, source, permittivity: float):
    """Electron potential energy U (meV) on nodes z (nm) from the cell-integrated net
    positive charge density `source` (∫_cell (N_D − n) dz per node, nm⁻²): box-integration
    discretisation of U'' = (e/ε₀ε_r)(N_D − n), zero field at both ends, U(z₀) = 0.
    The source must sum to ~0 (neutrality: the Neumann problem's solvability)."""
    hs = np.diff(z)
    n = len(z)
    rhs = POISSON_COEFF / permittivity * np.asarray(source, dtype=float)
    tot = np.sum(rhs)
    if abs(tot) > 1e-9 * max(np.sum(np.abs(rhs)), 1e-300):
        raise ValueError(f"source: not neutral (sum {tot:.3e}); the zero-field Neumann problem "
                         "has no solution")
    # equations j = 1..n-1 for unknowns U_1..U_{n-1} (U_0 = 0); row j: flux balance of node j
    g = 1.0 / hs
    ab = np.zeros((3, n - 1))
    diag = np.zeros(n)
    diag[:-1] -= g
    diag[1:] -= g
    ab[1] = diag[1:]
    ab[0, 1:] = g[1:]  # super-diagonal: coupling j -> j+1
    ab[2, :-1] = g[1:]  # sub-diagonal
    U = np.zeros(n)
    U[1:] = solve_banded((1, 1), ab, rhs[1:])
    return U


@dataclass
class SPResult:
    """Result of `schrodinger_poisson` (energies meV, densities cm⁻², lengths nm)."""
    z: np.ndarray                 # nodes (coarse grid when extrapolated)
    potential: np.ndarray         # U(z) = −eφ, meV, U = 0 at the left end of the domain
    band: np.ndarray              # E_c(z) + U(z) at the nodes (right-continuous E_c)
    levels_minus_fermi: np.ndarray  # E_i − E_F, meV
    sheet_densities: np.ndarray   # n_i, cm⁻²
    fermi_level: float            # E_F in the gauge of `potential` (finest grid)
    levels: np.ndarray            # E_i in the same gauge (finest grid)
    iterations: int               # mixing iterations (finest grid)
    residual: float               # final max|U_out − U_in|, meV
    donor_sheet_density: float    # ∫ N_D dz, cm⁻²
    h: float
    extrapolated: bool
    details: dict = field(default_factory=dict)


def _fermi_level(levels, total, g, kT):
    """E_F with Σ g kT ln(1 + e^{(E_F − E_i)/kT}) = total (monotone; brentq)."""
    def f(ef):
        return np.sum(g * kT * np.logaddexp(0.0, (ef - levels) / kT)) - total
    lo = levels[0] - 50 * kT
    while f(lo) > 0:
        lo -= 50 * kT
    hi = levels[0] + total / g + 50 * kT
    return brentq(f, lo, hi, xtol=1e-14 * max(kT, 1.0), rtol=1e-15, maxiter=500)


def _solve_on_grid(stack, mass, permittivity, kT, cladding, h, counts, tol, max_iter, beta,
                   history, u0=None):
    breaks = np.concatenate([[-cladding], stack.edges, [stack.length + cladding]])
    if counts is None:
        _, counts = piecewise_grid(breaks, h)
    # donors per segment (claddings undoped), nm⁻³
    dop = np.concatenate([[0.0], [lay.doping * PER_CM3_IN_PER_NM3 for lay in stack.layers], [0.0]])
    z = grid_from_counts(breaks, counts)
    donors = cell_integrals(z, breaks, dop)
    total = float(np.sum(donors))
    g = dos_2d(mass)
    nsub = 4
    state = {}

    def evaluate(U):
        nonlocal nsub
        while True:
            ev, _, psi, w, _ = fd_states(stack.layers, 0.0, cladding, h, nsub, counts=counts,
                                         extra_potential=U)
            ef = _fermi_level(ev, total, g, kT)
            if ev[-1] - ef > 40 * kT or nsub >= len(z) - 2:
                break
            nsub = min(2 * nsub, len(z) - 2)
        ni = g * kT * np.logaddexp(0.0, (ef - ev) / kT)
        dens = ni @ (psi ** 2)
        Uout = solve_poisson(z, donors - w * dens, permittivity)
        state.update(levels=ev, fermi=ef, sheet=ni, psi=psi)
        return Uout

    U = np.zeros(len(z)) if u0 is None else np.asarray(u0, dtype=float).copy()
    if total == 0.0:
        ev, _, psi, w, _ = fd_states(stack.layers, 0.0, cladding, h, nsub, counts=counts)
        return dict(z=z, U=U, levels=ev, fermi=-np.inf, sheet=np.zeros(nsub), iterations=0,
                    residual=0.0, counts=counts, breaks=breaks, total=total)
    dX, dF = [], []
    x_prev = f_prev = None
    res = np.inf
    for it in range(1, max_iter + 1):
        gx = evaluate(U)
        f = gx - U
        res = float(np.max(np.abs(f)))
        if res < tol:
            U = gx
            break
        if x_prev is not None:
            dX.append(U - x_prev)
            dF.append(f - f_prev)
            if len(dX) > history:
                dX.pop(0)
                dF.pop(0)
        x_prev, f_prev = U.copy(), f.copy()
        if dF:
            Fm = np.array(dF).T
            Xm = np.array(dX).T
            gamma = np.linalg.lstsq(Fm, f, rcond=1e-12)[0]
            U = U + beta * f - (Xm + beta * Fm) @ gamma
        else:
            U = U + beta * f
    else:
        raise RuntimeError(f"schrodinger_poisson: no convergence in {max_iter} iterations "
                           f"(residual {res:.3e} meV, tol {tol:.1e})")
    evaluate(U)  # levels of the returned potential
    return dict(z=z, U=U, levels=state["levels"], fermi=state["fermi"], sheet=state["sheet"],
                iterations=it, residual=res, counts=counts, breaks=breaks, total=total)


def schrodinger_poisson(layers, temperature_k: float, permittivity: float, *,
                        cladding: float = 40.0, h: float = 0.1, richardson: bool = True,
                        tol: float = 1e-9, max_iter: int = 300, mixing: float = 0.3,
                        history: int = 8) -> SPResult:
    """Self-consistent Schrödinger-Poisson solution of a doped stack (see module docstring).

    layers: Layer(thickness, band_edge, mass, nonparabolicity=0, doping cm⁻³); all masses
    equal (constant-mass model; nonparabolicity must be 0). Returns SPResult; with
    richardson=True E_i − E_F, n_i and U are extrapolated from h and h/2, (4X_{h/2} − X_h)/3,
    over the subbands both grids report. An undoped stack returns U = 0, E_F = −inf, no
    electrons and `levels` = the (extrapolated) Schrödinger levels of the bare stack."""
    lays = as_layers(layers)
    masses = {lay.mass for lay in lays}
    if len(masses) != 1:
        raise ValueError("layers: the Schrödinger-Poisson reference uses one constant mass; "
                         f"got masses {sorted(masses)}")
    if any(lay.nonparabolicity for lay in lays):
        raise ValueError("layers: nonparabolicity must be 0 in the Schrödinger-Poisson reference")
    if not (np.isfinite(temperature_k) and temperature_k > 0):
        raise ValueError(f"temperature_k must be finite and > 0 K, got {temperature_k}")
    if not (np.isfinite(permittivity) and permittivity > 0):
        raise ValueError(f"permittivity must be finite and > 0, got {permittivity}")
    mass = masses.pop()
    stack = Stack(lays, 0.0)
    kT = KB_MEV * temperature_k
    args = (stack, mass, permittivity, kT, cladding)
    a = _solve_on_grid(*args, h, None, tol, max_iter, mixing, history)
    ec = stack.potential(a["z"])
    if a["total"] == 0.0:  # undoped: U = 0, no electrons, E_F = −inf
        lv = a["levels"]
        if richardson:
            b = _solve_on_grid(*args, h / 2, 2 * a["counts"], tol, max_iter, mixing, history)
            lv = (4.0 * b["levels"] - a["levels"]) / 3.0
        return SPResult(a["z"], a["U"], ec.copy(), np.full(len(lv), np.inf), a["sheet"], -np.inf,
                        lv, 0, 0.0, 0.0, h, richardson, {})
    if not richardson:
        lm = a["levels"] - a["fermi"]
        return SPResult(a["z"], a["U"], ec + a["U"], lm, a["sheet"] * PER_NM2_IN_PER_CM2,
                        a["fermi"], a["levels"], a["iterations"], a["residual"],
                        a["total"] * PER_NM2_IN_PER_CM2, h, False,
                        dict(coarse=a) if richardson else {})
    # h/2 grid: every step halved; start from the coarse potential interpolated
    z2 = grid_from_counts(a["breaks"], 2 * a["counts"])
    u0 = np.interp(z2, a["z"], a["U"])
    b = _solve_on_grid(*args, h / 2, 2 * a["counts"], tol, max_iter, mixing, history, u0=u0)
    n = min(len(a["levels"]), len(b["levels"]))
    ext = lambda x1, x2: (4.0 * x2 - x1) / 3.0  # noqa: E731
    lm = ext(a["levels"][:n] - a["fermi"], b["levels"][:n] - b["fermi"])
    ns = ext(a["sheet"][:n], b["sheet"][:n])
    U = ext(a["U"], b["U"][::2])
    fin = b
    return SPResult(a["z"], U, ec + U, lm, ns * PER_NM2_IN_PER_CM2, fin["fermi"], fin["levels"],
                    fin["iterations"], max(a["residual"], b["residual"]),
                    a["total"] * PER_NM2_IN_PER_CM2, h, True, dict(coarse=a, fine=b))


# ---------------------------------------------------------------------------------------
# Example structures (illustrative numbers of our own, not fitted to any material)
# ---------------------------------------------------------------------------------------
BARRIER_EDGE = 230.0   # meV, illustrative
MASS = 0.067           # m_e, illustrative (one mass everywhere)
PERMITTIVITY = 12.9    # illustrative


def modulation_doped_well(doping_cm3: float = 5e17):
    """Symmetric modulation-doped well (illustrative): each side has a 30 nm barrier
    (230 meV) made of 10 nm undoped cap (outer), 10 nm doped (N_D) and a 10 nm undoped
    spacer; 15 nm well (0 meV). Mass 0.067, ε_r 12.9. Returns (layers, permittivity)."""
    b = BARRIER_EDGE
    layers = [Layer(10.0, b, MASS), Layer(10.0, b, MASS, 0.0, doping_cm3), Layer(10.0, b, MASS),
              Layer(15.0, 0.0, MASS),
              Layer(10.0, b, MASS), Layer(10.0, b, MASS, 0.0, doping_cm3), Layer(10.0, b, MASS)]
    return layers, PERMITTIVITY


def single_heterojunction(doping_cm3: float = 2.5e17, channel: float = 60.0,
                          back_barrier: float = 20.0):
    """Single heterojunction (illustrative): 10 nm undoped barrier, 20 nm doped barrier
    (N_D), 10 nm undoped spacer (barriers 230 meV), an undoped channel (0 meV) of `channel`
    nm, deep enough that the field has vanished inside it, closed by an undoped back barrier
    of `back_barrier` nm (230 meV; set 0 to let the channel continue as the cladding).
    Mass 0.067, ε_r 12.9. Returns (layers, permittivity).

    Why the back barrier: in this donor-only model the 2DEG is confined by its own charge
    alone (no depletion charge), and E_F settles within ~1 meV of the flat channel band edge
    (measured: 0.16 meV at 1.5 K for 2e11 cm⁻²). Without a back barrier the channel
    continuum near E_F is then occupied and the result depends on the domain extent; with it
    the channel states are quantised and the problem is domain-independent."""
    b = BARRIER_EDGE
    layers = [Layer(10.0, b, MASS), Layer(20.0, b, MASS, 0.0, doping_cm3), Layer(10.0, b, MASS),
              Layer(channel, 0.0, MASS)]
    if back_barrier > 0:
        layers.append(Layer(back_barrier, b, MASS))
    return layers, PERMITTIVITY
