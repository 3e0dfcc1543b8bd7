"""Tsu-Esaki tunnelling current density through a stack under bias.

Tsu & Esaki (1973), Appl. Phys. Lett. 22, 562, eq. (5): with the longitudinal energy E
conserved and one in-plane mass m (that of the emitter, the left lead),

    J(V) = (e m kT/(2π² ħ³)) ∫ T(E, V) ln[(1 + e^{(μ_L − E)/kT})/(1 + e^{(μ_R − E)/kT})] dE,

μ_R = μ_L − eV. Units: J in A/cm² (SI prefactor in A/m² × 1e-4), E and kT in meV, V in V.

Bias as a field: V is dropped linearly across the stack, field F = −10⁴·V/L kV/cm (L in
nm), i.e. the field term 0.1·F·(z − L/2) lowers the right lead by eV (1000·V meV) and raises
the left one by eV/2 — so F > 0 in specwell's convention corresponds to V < 0 here. Both
leads hold the same Fermi energy E_F above their band edge: μ_L = V_L + E_F, μ_R = μ_L − eV.

Quadrature: T(E, V) by `transfer.transmission` (Airy layers); the interval
[max(V_L, V_R), max(μ_L, μ_R) + 40 kT] (the supply function has decayed by e^{-40}) is cut at
every resonance E_r and at E_r ± (1, 10, 100)·Γ (poles from `transfer.resonances`), and the
pieces are integrated by adaptive bisection with 10-point Gauss-Legendre (`adaptive_gauss`,
vectorised over energies) to a requested epsrel (default 1e-10).
Measured accuracy (tests/test_reference.py): the quadrature reproduces the constant-T
dilogarithm closed form to 1e-12 and the narrow-Lorentzian limit to O(Γ/kT).
"""

from __future__ import annotations

import numpy as np
import scipy.constants as C

from .stack import KB_MEV, Stack
from .transfer import resonances, transmission


def tsu_esaki_prefactor(mass: float, temperature_k: float) -> float:
    """e m m_e kT/(2π² ħ³) in A/cm² per meV of the energy integral (kT from temperature)."""
    kT_J = C.k * temperature_k
    per_joule = C.e * mass * C.m_e * kT_J / (2 * np.pi**2 * C.hbar**3)  # A/m² per J
    return per_joule * (C.e * 1e-3) * 1e-4


def supply_function(energy, mu_l: float, mu_r: float, kT: float):
    """ln[(1 + e^{(μ_L−E)/kT})/(1 + e^{(μ_R−E)/kT})], evaluated with logaddexp (stable)."""
    e = np.asarray(energy, dtype=float)
    return np.logaddexp(0.0, (mu_l - e) / kT) - np.logaddexp(0.0, (mu_r - e) / kT)


_GLX, _GLW = np.polynomial.legendre.leggauss(10)


def _gauss(f, a, b):
    """10-point Gauss-Legendre on each [a_i, b_i] (vectorised: one call of f)."""
    mid, half = 0.5 * (a + b), 0.5 * (b - a)
    x = mid[:, None] + half[:, None] * _GLX[None, :]
    return half * (f(x.ravel()).reshape(x.shape) @ _GLW)


def adaptive_gauss(f, edges, epsrel: float = 1e-10, max_rounds: int = 60,
                   noise: float = 1e-12) -> float:
    """∫ f over [edges[0], edges[-1]] by adaptive bisection with 10-point Gauss-Legendre:
    each active interval's value on its two halves is accepted when it differs from the
    whole-interval value by ≤ ½·epsrel·|I|/(number of active intervals) (I: running
    estimate of the integral) or by ≤ noise·|its own value| (the integrand's rounding floor:
    T(E) of transfer matrices is good to ~1e-12 relative). |I_whole − I_halves| overestimates
    the error of the accepted halves by orders of magnitude for analytic integrands (10-point
    Gauss: ~2^-20 per halving);
    f is vectorised and called once per round for all active intervals."""
    e = np.asarray(sorted(edges), dtype=float)
    a, b = e[:-1], e[1:]
    whole = _gauss(f, a, b)
    done = 0.0
    for _ in range(max_rounds):
        m = 0.5 * (a + b)
        left, right = _gauss(f, a, m), _gauss(f, m, b)
        halves = left + right
        est = done + np.sum(halves)
        err = np.abs(halves - whole)
        share = 0.5 * epsrel * max(abs(est), 1e-300) / len(a)
        ok = (err <= share) | (err <= noise * np.abs(halves))
        done += np.sum(halves[ok])
        if np.all(ok):
            return float(done)
        keep = ~ok
        if np.count_nonzero(keep) > 20000:
            raise RuntimeError(f"adaptive_gauss: epsrel {epsrel:g} needs more than 40000 "
                               "intervals (integrand too noisy for the tolerance?)")
        a, m, b = a[keep], m[keep], b[keep]
        a, b = np.concatenate([a, m]), np.concatenate([m, b])
        whole = np.concatenate([left[keep], right[keep]])
    raise RuntimeError(f"adaptive_gauss: epsrel {epsrel:g} not reached in {max_rounds} rounds")


def tsu_esaki_integral(transmission_fn, mu_l: float, mu_r: float, kT: float, e_lo: float,
                       e_hi: float, points=(), epsrel: float = 1e-10) -> float:
    """∫_{e_lo}^{e_hi} T(E) S(E) dE (meV) by `adaptive_gauss` on pieces cut at `points`
    (inside the interval); on [e_lo, e_lo + d], d = min(10 kT, half-way to the first cut),
    in u = √(E − e_lo) (smooth at a lead band edge, where T ∝ √(E − e_lo)), then in E.
    The integral is additive over the pieces, so each piece gets the relative tolerance.
    transmission_fn is vectorised over energies (meV)."""
    cuts = sorted({float(p) for p in points if e_lo < p < e_hi})
    # E = e_lo + u² on a short first piece removes the √(E − e_lo) onset of T at the lead
    # band edge; plain E elsewhere (u² far from e_lo would cost digits in E − E_r)
    d = min(10.0 * kT, 0.5 * ((cuts[0] if cuts else e_hi) - e_lo))

    def f(x):
        return transmission_fn(x) * supply_function(x, mu_l, mu_r, kT)

    def f_u(u):
        return 2.0 * u * f(e_lo + u * u)
    head = adaptive_gauss(f_u, [0.0, np.sqrt(d)], epsrel)
    return head + adaptive_gauss(f, [e_lo + d] + cuts + [e_hi], epsrel)


def bias_field_kv_cm(layers, bias_v: float) -> float:
    """Field (kV/cm) that drops `bias_v` volts across the stack: F = −10⁴·V/L."""
    return -1e4 * bias_v / Stack(layers).length


def tsu_esaki_current(layers, bias_v: float, fermi_mev: float, temperature_k: float, *,
                      window_kt: float = 40.0, epsrel: float = 1e-10) -> float:
    """Current density J (A/cm²) through the stack at bias `bias_v` (V), Tsu-Esaki (1973)
    with T(E, V) from transfer matrices (see module docstring). fermi_mev: Fermi energy of
    both leads above their own band edge; emitter (left-lead) mass in the prefactor."""
    if not (np.isfinite(temperature_k) and temperature_k > 0):
        raise ValueError(f"temperature_k must be finite and > 0 K, got {temperature_k}")
    field = bias_field_kv_cm(layers, bias_v)
    stack = Stack(layers, field)
    kT = KB_MEV * temperature_k
    mu_l = stack.left_lead + fermi_mev
    mu_r = mu_l - 1000.0 * bias_v
    e_lo = max(stack.left_lead, stack.right_lead)
    e_hi = max(mu_l, mu_r) + window_kt * kT
    if e_hi <= e_lo:
        return 0.0
    er, gam = resonances(stack.layers, field, e_lo, e_hi)
    pts = [p for r, g in zip(er, gam) for p in (r, r - g, r + g, r - 10 * g, r + 10 * g, r - 100 * g, r + 100 * g)]
    integral = tsu_esaki_integral(lambda x: transmission(stack, x), mu_l, mu_r, kT, e_lo, e_hi,
                                  pts, epsrel)
    return tsu_esaki_prefactor(stack.layers[0].mass, temperature_k) * integral
