"""A competent finite-difference BenDaniel-Duke solver (the benchmark contender).

Discretisation (box-integration / finite volumes, equivalently linear finite elements with
a lumped mass matrix; e.g. Tan, Snider, Chang & Hu 1990, J. Appl. Phys. 68, 4071 for the
BenDaniel-Duke form): nodes on every interface and on both Dirichlet ends, each layer and
each cladding split into equal steps ≤ h, 1/m at half points (exactly the layer's 1/m:
no interface falls inside a step), V averaged over each node's dual cell (two-point
Gauss-Legendre per half cell: exact for a field, which is linear in every half cell):

    −H2M [ (ψ_{j+1} − ψ_j)/(m_{j+½} h_{j+½}) − (ψ_j − ψ_{j−1})/(m_{j−½} h_{j−½}) ]
        + w_j V̄_j ψ_j = E w_j ψ_j,         w_j = (h_{j−½} + h_{j+½})/2.

The pencil (K + W V̄, W) is symmetrised as W^{-1/2}(K + W V̄)W^{-1/2} (tridiagonal) and its
lowest `count` eigenvalues are taken from scipy.linalg.eigh_tridiagonal(select="i").
Errors are O(h²) (measured in tests/test_reference.py); halving every step keeps all
nodes, and Richardson extrapolation (4E_{h/2} − E_h)/3 removes the h² term (→ O(h⁴)).
Dirichlet ψ = 0 at −cladding and L + cladding (the cladding extent must let the wanted
states decay: the truncation error is ~exp(−2κ·cladding)).
"""

from __future__ import annotations

import numpy as np
from scipy.linalg import eigh_tridiagonal

from .stack import H2M, Stack

_GL = 0.5 / np.sqrt(3.0)  # two-point Gauss-Legendre offsets ±1/(2√3) on a unit interval


def piecewise_grid(breakpoints, h: float):
    """Nodes on [breakpoints[0], breakpoints[-1]] that include every breakpoint; each
    segment is split into ceil(length/h) equal steps. Returns (z, steps per segment)."""
    b = np.asarray(breakpoints, dtype=float)
    if not (np.isfinite(h) and h > 0):
        raise ValueError(f"h must be finite and > 0 nm, got {h}")
    if np.any(np.diff(b) <= 0):
        raise ValueError("breakpoints must be strictly increasing")
    n = np.maximum(1, np.ceil(np.diff(b) / h * (1 - 1e-12)).astype(int))
    parts = [np.linspace(b[i], b[i + 1], n[i] + 1)[:-1] for i in range(len(n))]
    return np.concatenate(parts + [b[-1:]]), n


def grid_from_counts(breakpoints, counts):
    """Nodes with `counts[i]` equal steps in segment i (used to halve a grid exactly)."""
    b = np.asarray(breakpoints, dtype=float)
    parts = [np.linspace(b[i], b[i + 1], int(counts[i]) + 1)[:-1] for i in range(len(counts))]
    return np.concatenate(parts + [b[-1:]])


def assemble(z, potential, inv_mass, h2m: float = H2M):
    """Symmetrised tridiagonal (d, e) on the interior nodes and the weights w (all nodes).

    potential(z) and inv_mass(z) are vectorised callables; V is cell-averaged with two Gauss
    points per half cell and 1/m is sampled at step midpoints (breakpoints must be nodes)."""
    hs = np.diff(z)
    mid = 0.5 * (z[:-1] + z[1:])
    k = h2m * inv_mass(mid) / hs  # coupling of nodes j, j+1
    # average of V over the left half [z_j, z_j + h/2] and right half [z_j + h/2, z_{j+1}]
    q = hs / 2
    vl = 0.5 * (potential(z[:-1] + q * (0.5 - _GL)) + potential(z[:-1] + q * (0.5 + _GL)))
    vr = 0.5 * (potential(mid + q * (0.5 - _GL)) + potential(mid + q * (0.5 + _GL)))
    w = np.zeros(len(z))
    w[:-1] += q
    w[1:] += q
    vint = np.zeros(len(z))  # ∫_cell V dz
    vint[:-1] += q * vl
    vint[1:] += q * vr
    kd = np.zeros(len(z))
    kd[:-1] += k
    kd[1:] += k
    wi = w[1:-1]
    d = (kd[1:-1] + vint[1:-1]) / wi
    e = -k[1:-1] / np.sqrt(wi[:-1] * wi[1:])
    return d, e, w


def _solve(d, e, w, count, vectors):
    n = len(d)
    if count > n:
        raise ValueError(f"count = {count} exceeds the {n} interior grid nodes")
    if vectors:
        ev, vec = eigh_tridiagonal(d, e, select="i", select_range=(0, count - 1))
        psi = vec / np.sqrt(w[1:-1])[:, None]
        # deterministic sign: first extremum positive
        idx = np.argmax(np.abs(psi), axis=0)
        psi = psi * np.sign(psi[idx, np.arange(count)])
        return ev, psi
    return eigh_tridiagonal(d, e, eigvals_only=True, select="i", select_range=(0, count - 1)), None


def _stack_grid(stack: Stack, cladding: float, h: float):
    if not (np.isfinite(cladding) and cladding > 0):
        raise ValueError(f"cladding must be finite and > 0 nm, got {cladding}")
    breaks = np.concatenate([[-cladding], stack.edges, [stack.length + cladding]])
    return breaks


def fd_states(layers, field_kv_cm: float = 0.0, cladding: float = 30.0, h: float = 0.1,
              count: int = 1, *, counts=None, extra_potential=None):
    """Finite-difference levels and states on one grid (no extrapolation).

    Returns (energies (count,), z (all nodes incl. the two Dirichlet ends), psi (count, len z)
    normalised with Σ w_j ψ_j² = 1, weights w, steps per segment). extra_potential: optional
    nodal array added to V (lumped: w_j·U_j), used by the Schrödinger-Poisson reference."""
    stack = Stack(layers, field_kv_cm)
    if count < 1:
        raise ValueError(f"count must be >= 1, got {count}")
    breaks = _stack_grid(stack, cladding, h)
    if counts is None:
        z, counts = piecewise_grid(breaks, h)
    else:
        z = grid_from_counts(breaks, counts)
    d, e, w = assemble(z, stack.potential, lambda x: 1.0 / stack.mass(x))
    if extra_potential is not None:
        d = d + np.asarray(extra_potential)[1:-1]
    ev, psi = _solve(d, e, w, count, True)
    full = np.zeros((count, len(z)))
    full[:, 1:-1] = psi.T
    return ev, z, full, w, counts


def fd_levels(layers, field_kv_cm: float = 0.0, cladding: float = 30.0, h: float = 0.1,
              count: int = 1, richardson: bool = True) -> np.ndarray:
    """Lowest `count` BenDaniel-Duke levels (meV) by finite differences on a grid with nodes
    on every interface (steps ≤ h nm, Dirichlet at −cladding and L + cladding), optionally
    Richardson-extrapolated from h and h/2: (4E_{h/2} − E_h)/3 (O(h²) → O(h⁴)).
    Parabolic masses only (the layers' nonparabolicity is ignored)."""
    stack = Stack(layers, field_kv_cm)
    breaks = _stack_grid(stack, cladding, h)
    z, counts = piecewise_grid(breaks, h)
    inv_m = lambda x: 1.0 / stack.mass(x)  # noqa: E731
    e1 = _solve(*assemble(z, stack.potential, inv_m), count, False)[0]
    if not richardson:
        return e1
    z2 = grid_from_counts(breaks, 2 * counts)
    e2 = _solve(*assemble(z2, stack.potential, inv_m), count, False)[0]
    return (4.0 * e2 - e1) / 3.0


def fd_levels_profile(breakpoints, potential, h: float, count: int, *, mass: float = 1.0,
                      h2m: float = 0.5, richardson: bool = True) -> np.ndarray:
    """Lowest levels of −h2m·(1/m)ψ'' + V(x)ψ = Eψ with Dirichlet ends at breakpoints[0]
    and breakpoints[-1], nodes on every breakpoint (put kinks of V there), same scheme as
    fd_levels. Defaults are natural units (h2m = ½, m = 1)."""
    z, counts = piecewise_grid(breakpoints, h)
    inv_m = lambda x: np.full(np.shape(x), 1.0 / mass)  # noqa: E731
    e1 = _solve(*assemble(z, potential, inv_m, h2m), count, False)[0]
    if not richardson:
        return e1
    z2 = grid_from_counts(breakpoints, 2 * counts)
    e2 = _solve(*assemble(z2, potential, inv_m, h2m), count, False)[0]
    return (4.0 * e2 - e1) / 3.0
