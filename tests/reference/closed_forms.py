"""Closed forms used to validate the numerical references (and usable directly by tests).

Each function names its source. Units: nm, meV, m_e unless stated (natural units for the
|x| potential).
"""

from __future__ import annotations

import numpy as np
from scipy.optimize import brentq
from scipy.special import ai_zeros, spence

from .stack import H2M


# ---------------------------------------------------------------------------------------
# Finite square well (BenDaniel-Duke), with optional non-parabolicity
# ---------------------------------------------------------------------------------------
def finite_well_levels(width: float, depth: float, m_well: float, m_barrier: float,
                       alpha_well: float = 0.0, alpha_barrier: float = 0.0) -> np.ndarray:
    """Bound levels (meV above the well bottom, ascending) of a finite square well of
    `width` (nm) and barrier height `depth` (meV), BenDaniel-Duke matching.

    Bastard (1981), Phys. Rev. B 24, 5693 (and Bastard 1988, ch. III): with
    k = √(m_w E/H2M), κ = √(m_b (V0 − E)/H2M), θ = k·width/2,
    even: (k/m_w) tan θ = κ/m_b;  odd: −(k/m_w) cot θ = κ/m_b,
    solved in the pole-free forms (k/m_w) sin θ − (κ/m_b) cos θ = 0 and
    (k/m_w) cos θ + (κ/m_b) sin θ = 0, one root per branch θ ∈ [jπ/2, (j+1)π/2].
    Non-parabolicity (Nelson, Miller & Kleinman 1987): m_w(E) = m_w(1 + α_w E/1000),
    m_b(E) = m_b(1 + α_b (E − V0)/1000), α in 1/eV."""
    mw = lambda e: m_well * (1.0 + alpha_well * e / 1000.0)  # noqa: E731
    mb = lambda e: m_barrier * (1.0 + alpha_barrier * (e - depth) / 1000.0)  # noqa: E731
    if mb(0.0) <= 0:
        raise ValueError("alpha_barrier too large: barrier mass m_b(E) <= 0 at E = 0")

    def theta(e):
        return 0.5 * width * np.sqrt(mw(e) * e / H2M)

    def g(e, parity):
        k = np.sqrt(mw(e) * e / H2M)
        kap = np.sqrt(max(mb(e) * (depth - e), 0.0) / H2M)
        th = 0.5 * width * k
        if parity == 0:
            return (k / mw(e)) * np.sin(th) - (kap / mb(e)) * np.cos(th)
        return (k / mw(e)) * np.cos(th) + (kap / mb(e)) * np.sin(th)

    theta_max = theta(depth)
    levels = []
    j = 0
    while j * np.pi / 2 < theta_max:
        parity = j % 2
        # energies where θ = jπ/2 and min((j+1)π/2, θ_max): θ(E) is increasing
        def e_at(th_target):
            if th_target <= 0:
                return 0.0
            return brentq(lambda e: theta(e) - th_target, 0.0, depth, xtol=1e-15 * depth, rtol=1e-15)
        a = e_at(j * np.pi / 2)
        b = depth if (j + 1) * np.pi / 2 >= theta_max else e_at((j + 1) * np.pi / 2)
        ga, gb = g(a, parity), g(b, parity)
        if ga * gb < 0:
            levels.append(brentq(lambda e: g(e, parity), a, b, xtol=1e-15 * depth, rtol=1e-15))
        elif gb == 0.0:
            levels.append(b)
        j += 1
    return np.array(sorted(levels))


# ---------------------------------------------------------------------------------------
# Rectangular barrier and potential step
# ---------------------------------------------------------------------------------------
def rectangular_barrier_transmission(energy, height: float, width: float, m_lead: float,
                                     m_barrier: float | None = None):
    """T(E) of a rectangular barrier (height meV, width nm) between identical leads.

    Equal masses: Griffiths, "Introduction to Quantum Mechanics" (2nd ed. 2005), Problem
    2.33, T⁻¹ = 1 + V0² sinh²(κa)/(4E(V0 − E)) (E < V0), 1 + V0² sin²(ka)/(4E(E − V0))
    (E > V0), 1 + m a² V0/(4 H2M) (E = V0). With a barrier mass (BenDaniel-Duke) the same
    matching with ψ'/m gives T⁻¹ = 1 + ¼(ξ + 1/ξ)² sinh²(κa), ξ = (k/m_l)/(κ/m_b), and
    T⁻¹ = 1 + ¼(η − 1/η)² sin²(Ka), η = (k/m_l)/(K/m_b) above the barrier (derived here;
    reduces to Griffiths' form for m_b = m_l)."""
    mb = m_lead if m_barrier is None else m_barrier
    e = np.atleast_1d(np.asarray(energy, dtype=float))
    T = np.zeros(e.shape)
    pos = e > 0
    k = np.sqrt(m_lead * e[pos] / H2M) / m_lead
    d = e[pos] - height
    q = np.sqrt(mb * np.abs(d) / H2M)
    qm = q / mb
    x = q * width
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        below = 1.0 / (1.0 + 0.25 * (k / qm + qm / k) ** 2 * np.sinh(x) ** 2)
        above = 1.0 / (1.0 + 0.25 * (k / qm - qm / k) ** 2 * np.sin(x) ** 2)
        at = 1.0 / (1.0 + 0.25 * (k * width * mb) ** 2)  # lim qm→0 of (k/qm)² sinh²(x)/4
    T[pos] = np.where(d < 0, below, np.where(d > 0, above, at))
    T[pos] = np.nan_to_num(T[pos], nan=0.0)
    return T if np.ndim(energy) else T[0]


def step_transmission(energy, v_left: float, m_left: float, v_right: float, m_right: float):
    """T(E) of an abrupt step between two leads (BenDaniel-Duke):
    T = 4 (k₁/m₁)(k₂/m₂)/((k₁/m₁) + (k₂/m₂))² for E above both edges, else 0 (e.g.
    Bastard 1988, ch. III; the equal-mass form is Griffiths 2005, Problem 2.34)."""
    e = np.atleast_1d(np.asarray(energy, dtype=float))
    T = np.zeros(e.shape)
    ok = e > max(v_left, v_right)
    a = np.sqrt(m_left * (e[ok] - v_left) / H2M) / m_left
    b = np.sqrt(m_right * (e[ok] - v_right) / H2M) / m_right
    T[ok] = 4 * a * b / (a + b) ** 2
    return T if np.ndim(energy) else T[0]


# ---------------------------------------------------------------------------------------
# Kronig-Penney (BenDaniel-Duke)
# ---------------------------------------------------------------------------------------
def kronig_penney_rhs(energy, well: float, barrier: float, height: float, m_well: float,
                      m_barrier: float):
    """Right-hand side of the Kronig-Penney relation cos(qd) = RHS(E), d = well + barrier,
    well bottom 0, barrier height V0, BenDaniel-Duke matching (Kronig & Penney 1931; Bastard
    1981, Phys. Rev. B 24, 5693):
    E < V0: cos(ka)cosh(κb) − ½(ξ − 1/ξ) sin(ka) sinh(κb), ξ = (k/m_w)/(κ/m_b);
    E > V0: cos(ka)cos(Kb) − ½(η + 1/η) sin(ka) sin(Kb),   η = (k/m_w)/(K/m_b).
    E = V0 is the limit: cos(ka) − ½ (k/m_w) m_b b sin(ka)."""
    e = np.atleast_1d(np.asarray(energy, dtype=float))
    k = np.sqrt(m_well * e / H2M)
    kw = k / m_well
    d = e - height
    q = np.sqrt(m_barrier * np.abs(d) / H2M)
    qb = q / m_barrier
    a, b = well, barrier
    with np.errstate(divide="ignore", invalid="ignore"):
        xi = kw / qb
        below = np.cos(k * a) * np.cosh(q * b) - 0.5 * (xi - 1 / xi) * np.sin(k * a) * np.sinh(q * b)
        above = np.cos(k * a) * np.cos(q * b) - 0.5 * (xi + 1 / xi) * np.sin(k * a) * np.sin(q * b)
    at = np.cos(k * a) - 0.5 * kw * m_barrier * b * np.sin(k * a)
    r = np.where(d < 0, below, np.where(d > 0, above, at))
    return r if np.ndim(energy) else r[0]


def kronig_penney_energies(q: float, well: float, barrier: float, height: float, m_well: float,
                           m_barrier: float, count: int, *, points: int = 200000,
                           emax: float | None = None) -> np.ndarray:
    """Lowest `count` roots in E > 0 of kronig_penney_rhs(E) = cos(q d) (brentq on a scan
    uniform in √E up to emax, default 20·V0 + 2000 meV)."""
    d = well + barrier
    c = np.cos(q * d)
    top = emax if emax is not None else 20 * height + 2000.0
    s = np.linspace(0, np.sqrt(top), points)[1:]
    grid = s * s
    vals = kronig_penney_rhs(grid, well, barrier, height, m_well, m_barrier) - c
    f = lambda e: float(kronig_penney_rhs(e, well, barrier, height, m_well, m_barrier) - c)  # noqa: E731
    roots = []
    for j in np.nonzero(np.sign(vals[:-1]) * np.sign(vals[1:]) < 0)[0]:
        roots.append(brentq(f, grid[j], grid[j + 1], xtol=1e-15 * max(grid[j], 1.0), rtol=1e-15))
        if len(roots) == count:
            break
    return np.array(roots)


def free_folded_bands(q: float, period: float, mass: float, count: int, v0: float = 0.0):
    """Empty-lattice bands E = v0 + H2M (q + 2πn/d)²/m, lowest `count` (free electron folded
    into the Brillouin zone of period d; e.g. Ashcroft & Mermin 1976, ch. 9)."""
    n = np.arange(-count - 1, count + 2)
    e = v0 + H2M * (q + 2 * np.pi * n / period) ** 2 / mass
    return np.sort(e)[:count]


# ---------------------------------------------------------------------------------------
# Airy functions: zeros, triangular well, V = |x|
# ---------------------------------------------------------------------------------------
def airy_zeros(count: int):
    """First `count` zeros a_k of Ai and a'_k of Ai' (negative, descending), from
    scipy.special.ai_zeros (A&S 10.4.94-10.4.95; table 10.13)."""
    a, ap, _, _ = ai_zeros(count)
    return a, ap


def triangular_well_levels(field_kv_cm: float, mass: float, count: int) -> np.ndarray:
    """Levels (meV above the band edge at the wall) of a hard wall plus uniform field:
    E_n = −a_n·(H2M g²/m)^{1/3}, g = 0.1|F| meV/nm (A&S 10.4; e.g. Davies 1998, §4.3)."""
    a, _ = airy_zeros(count)
    g = 0.1 * abs(field_kv_cm)
    return -a * (H2M * g * g / mass) ** (1.0 / 3.0)


def abs_potential_levels(count: int) -> np.ndarray:
    """Levels of −½ψ'' + |x|ψ = Eψ (natural units ħ = m = 1), ascending.
    For x > 0 ψ = Ai(2^{1/3}(x − E)); even states need Ai'(−2^{1/3}E) = 0, odd states
    Ai(−2^{1/3}E) = 0: E = −a'_k/2^{1/3} (even), −a_k/2^{1/3} (odd), interleaved."""
    n = (count + 1) // 2 + 1
    a, ap = airy_zeros(n)
    out = np.empty(count)
    for j in range(count):
        out[j] = -(ap[j // 2] if j % 2 == 0 else a[j // 2]) / 2 ** (1.0 / 3.0)
    return out


# ---------------------------------------------------------------------------------------
# 2D electron gas occupation and the Tsu-Esaki supply function
# ---------------------------------------------------------------------------------------
def dos_2d(mass: float) -> float:
    """2D density of states per subband with spin, m/(πħ²) = m/(2π·H2M) in nm⁻² meV⁻¹
    (Davies 1998, "The Physics of Low-Dimensional Semiconductors", §1.6)."""
    return mass / (2.0 * np.pi * H2M)


def sheet_density_2d(fermi_minus_level, mass: float, kT: float):
    """Sheet density (nm⁻²) of one subband: n = (m kT/πħ²) ln(1 + e^{(E_F − E_i)/kT})
    (Davies 1998, §1.6 / eq. for the 2D Fermi-Dirac integral). kT in meV."""
    return dos_2d(mass) * kT * np.logaddexp(0.0, np.asarray(fermi_minus_level) / kT)


def supply_integral_constant_t(e0: float, mu_l: float, mu_r: float, kT: float) -> float:
    """∫_{e0}^{∞} ln[(1 + e^{(μ_L−E)/kT})/(1 + e^{(μ_R−E)/kT})] dE in closed form:
    ∫_{e0}^{∞} ln(1 + e^{(μ−E)/kT}) dE = −kT·Li₂(−e^{(μ−e0)/kT}), Li₂(z) = spence(1 − z)
    (scipy.special.spence; dilogarithm, A&S 27.7)."""
    def one(mu):
        return -kT * spence(1.0 + np.exp((mu - e0) / kT))
    return float(one(mu_l) - one(mu_r))


def lorentzian_supply_integral(e0: float, width: float, mu_l: float, mu_r: float,
                               kT: float) -> float:
    """∫_{−∞}^{∞} L(E) S(E) dE for the unit-peak Lorentzian L = (Γ/2)²/((E − e0)² + (Γ/2)²)
    (FWHM Γ = width) and the Tsu-Esaki supply S = ln[(1 + e^{(μ_L−E)/kT})/(1 + e^{(μ_R−E)/kT})].

    Closed form (derived here): ∂S/∂μ-integration of the Lorentzian-broadened Fermi function,
    ∫ (γ/π)/((E − e0)² + γ²) f(E − μ) dE = ½ − (1/π) Im ψ(½ + (γ + i(e0 − μ))/(2πkT)) (digamma;
    e.g. the standard Matsubara-sum result), integrated over μ ∈ [μ_R, μ_L] with ∫ψ = ln Γ:
    πγ[(μ_L − μ_R)/(2kT) − 2 Re(lnΓ(w_L) − lnΓ(w_R))], w = ½ + (γ + i(e0 − μ))/(2πkT), γ = Γ/2.
    For Γ → 0 it tends to (πΓ/2)·S(e0) (Re lnΓ(½ + iy) = ½ ln(π/cosh πy), A&S 6.1.30)."""
    from scipy.special import loggamma
    g = 0.5 * width
    w = lambda mu: 0.5 + (g + 1j * (e0 - mu)) / (2 * np.pi * kT)  # noqa: E731
    return float(np.pi * g * ((mu_l - mu_r) / (2 * kT)
                              - 2.0 * np.real(loggamma(w(mu_l)) - loggamma(w(mu_r)))))
