"""Transfer matrices for BenDaniel-Duke stacks: bound levels, transmission, Bloch bands,
resonances.

Equation (BenDaniel & Duke 1966): −H2M·d/dz (1/m) dψ/dz + V ψ = E ψ, ψ and u = ψ'/m
continuous. In each layer the pair (ψ, u) is carried across by a 2×2 real unimodular matrix:

* flat layer (F = 0), q² = m(V − E)/H2M, κ = √q²:
  M = [[cosh κt, m·sinh(κt)/κ], [q²·sinh(κt)/(κ m), cosh κt]] (plane waves above the band
  edge, exponentials below; the κ → 0 limit is analytic);
* layer in a field, V = V_a + g·z' (g = 0.1 F meV/nm): ψ'' = β³ (z' − z_E) ψ with
  β = (m g/H2M)^{1/3}, so ψ = c₁ Ai(ξ) + c₂ Bi(ξ), ξ = β(z' − z_E) (Abramowitz & Stegun 1964,
  10.4.1); M = Φ(b)Φ(a)⁻¹ with Φ = [[Ai, Bi], [βAi'/m, βBi'/m]] and the Wronskian
  W{Ai, Bi} = 1/π (A&S 10.4.10). Exponentially scaled Airy functions
  (scipy.special.airye) keep every product finite.

Every matrix is returned as (M̃, s) with M = e^s·M̃, so thick barriers never overflow.
Accuracy (measured in tests/test_reference.py against closed forms): bound levels ~1e-13
relative, T(E) ~1e-12 relative. In a field the Airy phase ζ = (2/3)|ξ|^{3/2} is computed
from the absolute |ξ|, so very weak fields lose ~eps·ζ (ζ ≈ 800 at 1 kV/cm, 200 meV above
the band edge, m = 0.067): use F = 0 exactly for the flat case.

Transfer matrices are the textbook method: e.g. Bastard (1988), "Wave mechanics applied
to semiconductor heterostructures", ch. III; Airy layers as in Ando & Itoh (1987),
J. Appl. Phys. 61, 1497.
"""

from __future__ import annotations

import numpy as np
from scipy.optimize import brentq, minimize_scalar
from scipy.special import airy, airye

from .stack import H2M, Stack

_SCALE_AT = 350.0  # |Re κt| above which cosh/sinh are evaluated in scaled form


# ---------------------------------------------------------------------------------------
# One layer
# ---------------------------------------------------------------------------------------
def _flat_matrix(energy, mass, v0, t):
    """(M̃, s) of a flat layer (band edge v0, thickness t) at energies `energy`."""
    e = np.asarray(energy)
    cplx = np.iscomplexobj(e) or np.iscomplexobj(mass)
    q2 = np.asarray(mass * (v0 - e) / H2M, dtype=complex)
    kap = np.sqrt(q2)
    x = kap * t
    big = np.abs(x.real) > _SCALE_AT
    s = np.where(big, np.abs(x.real), 0.0)
    xs = np.where(big, 0.0, x)  # keep the unscaled branch finite
    with np.errstate(invalid="ignore", over="ignore"):
        c_small = np.cosh(xs)
        shx_small = np.where(np.abs(xs) < 1e-4, 1.0 + xs * xs / 6.0, np.sinh(xs) / np.where(xs == 0, 1, xs))
        ep = np.exp(np.where(big, x - s, 0.0))
        em = np.exp(np.where(big, -x - s, 0.0))
        c_big = 0.5 * (ep + em)
        shx_big = 0.5 * (ep - em) / np.where(big, x, 1.0)
    c = np.where(big, c_big, c_small)
    shx = np.where(big, shx_big, shx_small)  # e^{-s}·sinh(κt)/(κt)
    S = t * shx  # e^{-s}·sinh(κt)/κ
    m11 = c
    m12 = mass * S
    m21 = q2 * S / mass
    M = np.stack([np.stack([m11, m12], -1), np.stack([m21, m11 * np.ones_like(m12)], -1)], -2)
    if not cplx:
        M = M.real
    return M, s


def _airy_scaled(xi):
    """Scaled Airy values: Ai = ai·e^{−za}, Ai' = aip·e^{−za}, Bi = bi·e^{zb}, Bi' = bip·e^{zb}."""
    if np.iscomplexobj(xi):
        # a signed zero imaginary part (−0j, e.g. from β < 0) would put numpy's ξ^{3/2} and
        # scipy's airye on different sides of the branch cut: make it +0
        xi = np.where(xi.imag == 0, xi.real + 0j, xi)
        ai, aip, bi, bip = airye(xi)
        zeta = (2.0 / 3.0) * xi ** 1.5  # principal branch, as in scipy's airye scaling
        return ai, aip, bi, bip, zeta, np.abs(zeta.real)
    # real axis: scipy's real airye is NaN for x < 0 (no scaling is needed there), so use
    # airy for x < 0 and airye for x >= 0
    xi = np.asarray(xi, dtype=float)
    pos = xi >= 0
    ai, aip, bi, bip = airy(np.where(pos, 0.0, xi))
    eai, eaip, ebi, ebip = airye(np.where(pos, xi, 0.0))
    zeta = (2.0 / 3.0) * np.where(pos, xi, 0.0) ** 1.5
    return (np.where(pos, eai, ai), np.where(pos, eaip, aip), np.where(pos, ebi, bi),
            np.where(pos, ebip, bip), zeta, zeta)


def _airy_matrix(energy, mass, v0, g, t):
    """(M̃, s) of a layer with V = v0 + g·z' on z' ∈ [0, t] (g ≠ 0), A&S 10.4."""
    e = np.asarray(energy)
    cplx = np.iscomplexobj(e) or np.iscomplexobj(mass)
    # the real cube root (any root solves β³ = m g/H2M, but a complex one for g < 0 would
    # push ξ off the real axis, where Ai and Bi are huge and cancel); the mass is real
    # whenever g != 0 (non-parabolicity is refused in a field)
    beta = np.cbrt(np.real(mass * g / H2M))
    # ξ_a = β (0 − z_E), z_E = (E − v0)/g
    xa = beta * (v0 - e) / g
    xb = xa + beta * t
    if cplx:
        xa = np.asarray(xa, dtype=complex)
        xb = np.asarray(xb, dtype=complex)
    aia, aipa, bia, bipa, zaa, zba = _airy_scaled(xa)
    aib, aipb, bib, bipb, zab, zbb = _airy_scaled(xb)
    P = -zab + zba  # exponent of Ai(b)·Bi(a)-type products
    Q = zbb - zaa  # exponent of Bi(b)·Ai(a)-type products
    s = np.maximum(np.real(P), np.real(Q))
    eP = np.exp(P - s)
    eQ = np.exp(Q - s)
    pi = np.pi
    m11 = pi * (aib * bipa * eP - bib * aipa * eQ)
    m12 = (pi * mass / beta) * (bib * aia * eQ - aib * bia * eP)
    m21 = (pi * beta / mass) * (aipb * bipa * eP - bipb * aipa * eQ)
    m22 = pi * (bipb * aia * eQ - aipb * bia * eP)
    M = np.stack([np.stack([m11, m12], -1), np.stack([m21, m22], -1)], -2)
    if not cplx:
        M = M.real
    return M, s


def layer_matrix(energy, mass, v0, slope, thickness):
    """Transfer matrix of one layer for the pair (ψ, ψ'/m), as (M̃, s) with M = e^s·M̃.

    energy: meV (array, real or complex); mass: m_e (scalar or array like energy);
    v0: band edge at the layer's left end (meV); slope: dV/dz (meV/nm, 0 → flat layer);
    thickness: nm. Method: plane waves/exponentials (flat) or Airy Ai, Bi (A&S 10.4)."""
    if slope == 0.0:
        return _flat_matrix(energy, mass, v0, thickness)
    return _airy_matrix(energy, mass, v0, slope, thickness)


def _layer_list(stack: Stack, energy):
    for i, lay in enumerate(stack.layers):
        yield layer_matrix(energy, stack.layer_mass(i, energy), stack.layer_start_potential(i),
                           stack.slope, lay.thickness)


def stack_matrix(layers, energy, field_kv_cm: float = 0.0):
    """Transfer matrix of the whole stack from z = 0 to z = L for (ψ, ψ'/m), as (M̃, s),
    M = e^s·M̃, renormalised after every layer. Shape (..., 2, 2) for energies (...)."""
    stack = layers if isinstance(layers, Stack) else Stack(layers, field_kv_cm)
    e = np.asarray(energy)
    total = None
    logs = np.zeros(e.shape)
    for M, s in _layer_list(stack, e):
        total = M if total is None else np.einsum("...ij,...jk->...ik", M, total)
        n = np.max(np.abs(total), axis=(-2, -1))
        total = total / n[..., None, None]
        logs = logs + s + np.log(n)
    return total, logs


# ---------------------------------------------------------------------------------------
# Bound levels
# ---------------------------------------------------------------------------------------
def _pieces(stack: Stack):
    """Layers cut into pieces with κ_max·t ≤ 4 (κ_max at the stack's lowest energy), so
    that the matching can happen inside thick barriers. Yields (layer index, offset, t)."""
    e0 = stack.minimum_potential()
    for i, lay in enumerate(stack.layers):
        vmax = lay.band_edge + max(stack.field_term(stack.edges[i]), stack.field_term(stack.edges[i + 1]))
        m = np.max(stack.layer_mass(i, np.array([e0])))
        kmax = np.sqrt(max(m * (vmax - e0), 0.0) / H2M)
        n = max(1, int(np.ceil(kmax * lay.thickness / 4.0)))
        for k in range(n):
            yield i, k * lay.thickness / n, lay.thickness / n


def _growth(stack: Stack, e):
    """c(E) = ∫ κ₊ dz over the stack, κ₊ = √(max(m(V − E), 0)/H2M): the log-growth of a
    generic solution, divided out of the Wronskian to keep the matching function O(1)."""
    c = np.zeros(np.shape(e))
    for i, lay in enumerate(stack.layers):
        m = stack.layer_mass(i, e)
        va = stack.layer_start_potential(i)
        if stack.slope == 0.0:
            c = c + lay.thickness * np.sqrt(np.maximum(m * (va - e), 0.0) / H2M)
        else:
            vb = va + stack.slope * lay.thickness
            xa, xb = np.maximum(va - e, 0.0), np.maximum(vb - e, 0.0)
            c = c + np.sqrt(m / H2M) * (2.0 / (3.0 * stack.slope)) * (xb**1.5 - xa**1.5)
    return c


def matching_function(layers, energy, field_kv_cm: float = 0.0):
    """Scalar matching function whose roots are the bound levels (E below both claddings).

    Two-sided shooting: the solution decaying into the left cladding, (ψ, u) = (1, κ_L/m_L)
    at z = 0, is carried to every matching point z_j (layer interfaces, and cuts inside
    thick layers so that κ·Δz ≤ 4) by the layer matrices; the solution decaying into the
    right cladding, (1, −κ_R/m_R) at z = L, is carried back by their inverses (adjugates:
    the matrices are unimodular). Both are renormalised at every point and their
    log-amplitudes a_L(z_j), a_R(z_j) are accumulated. The Wronskian
    W = ψ_L u_R − u_L ψ_R is constant in z; it is evaluated at the point that maximises
    a_L + a_R (the maximum of the eigenfunction near a level, where neither solution has
    crossed a barrier in its decaying direction), skipping points where either solution has
    fallen more than e^{30} below its running maximum (digits lost). Returned:
    f(E) = W(E)·e^{−c(E)}, c(E) = ∫ κ₊ dz (smooth), i.e. an analytic-like function of E of
    order one. Unlike a normalised (Prüfer-angle) form, f keeps a visible minimum between the
    two roots of a near-degenerate pair (tunnel-split levels), which the root scan needs."""
    stack = layers if isinstance(layers, Stack) else Stack(layers, field_kv_cm)
    e = np.atleast_1d(np.asarray(energy, dtype=float))
    nl = len(stack.layers)
    mL = stack.layer_mass(0, e) * np.ones_like(e)
    mR = stack.layer_mass(nl - 1, e) * np.ones_like(e)
    if np.any(mL <= 0) or np.any(mR <= 0):
        raise ValueError("energy: non-parabolic cladding mass m(E) <= 0 in the requested range")
    kL = np.sqrt(np.maximum(mL * (stack.left_lead - e), 0.0) / H2M)
    kR = np.sqrt(np.maximum(mR * (stack.right_lead - e), 0.0) / H2M)
    mats = [layer_matrix(e, stack.layer_mass(i, e), stack.layer_start_potential(i) + stack.slope * off,
                         stack.slope, t) for i, off, t in _pieces(stack)]
    npt = len(mats)
    vl = np.empty((npt + 1, 2) + e.shape)
    vr = np.empty((npt + 1, 2) + e.shape)
    al = np.zeros((npt + 1,) + e.shape)
    ar = np.zeros((npt + 1,) + e.shape)
    n0 = np.hypot(1.0, kL / mL)
    vl[0] = (1.0 / n0, kL / mL / n0)
    for j, (M, s) in enumerate(mats):
        p = M[..., 0, 0] * vl[j, 0] + M[..., 0, 1] * vl[j, 1]
        q = M[..., 1, 0] * vl[j, 0] + M[..., 1, 1] * vl[j, 1]
        n = np.hypot(p, q)
        vl[j + 1] = (p / n, q / n)
        al[j + 1] = al[j] + s + np.log(n)
    n0 = np.hypot(1.0, kR / mR)
    vr[npt] = (1.0 / n0, -kR / mR / n0)
    for j in range(npt - 1, -1, -1):
        M, s = mats[j]
        p = M[..., 1, 1] * vr[j + 1, 0] - M[..., 0, 1] * vr[j + 1, 1]  # M⁻¹ = adj(M), det M = 1
        q = -M[..., 1, 0] * vr[j + 1, 0] + M[..., 0, 0] * vr[j + 1, 1]
        n = np.hypot(p, q)
        vr[j] = (p / n, q / n)
        ar[j] = ar[j + 1] + s + np.log(n)
    w = vl[:, 0] * vr[:, 1] - vl[:, 1] * vr[:, 0]
    drop_l = np.maximum.accumulate(al, axis=0) - al
    drop_r = np.maximum.accumulate(ar[::-1], axis=0)[::-1] - ar
    score = np.where((drop_l > 30.0) | (drop_r > 30.0), -np.inf, al + ar)
    best = np.argmax(score, axis=0)
    wb = np.take_along_axis(w, best[None], axis=0)[0]
    sb = np.take_along_axis(al + ar, best[None], axis=0)[0]
    with np.errstate(divide="ignore"):
        f = np.sign(wb) * np.exp(np.log(np.abs(wb)) + sb - _growth(stack, e))
    return f if np.ndim(energy) else f[0]


def _wkb_count(stack: Stack, emax: float) -> float:
    """Upper estimate Σ t·k_max/π of the number of nodes below emax (sets the scan density)."""
    n = 1.0
    for i, lay in enumerate(stack.layers):
        vlo = lay.band_edge + min(stack.field_term(stack.edges[i]), stack.field_term(stack.edges[i + 1]))
        m = np.max(stack.layer_mass(i, np.array([emax])))
        n += lay.thickness * np.sqrt(max(m * (emax - vlo), 0.0) / H2M) / np.pi
    return n


def _split_pair(fun, a, c, b, s, scale):
    """Look for a point between two close roots hidden in [a, b] (f has sign s at a, c, b):
    minimise s·f around c by bounded Brent, recentred and narrowed four times (the offset
    from the centre keeps scipy's sqrt(eps)·|x| tolerance small). Returns x with s·f(x) < 0
    or None."""
    h = max(c - a, b - c)
    for _ in range(5):
        lo, hi = max(a, c - h) - c, min(b, c + h) - c
        res = minimize_scalar(lambda x: s * fun(c + x), bounds=(lo, hi), method="bounded",
                              options={"xatol": 1e-15 * scale})
        if res.fun < 0:
            return c + res.x
        c = c + res.x
        h = max(1e3 * (1.5e-8 * abs(res.x) + 1e-15 * scale), 1e-14 * scale)
        if h < 1e-13 * scale:
            break
    return None


def _roots_by_scan(fun, grid, values, xtol_scale):
    """Bracket sign changes on a scan (plus close pairs hidden between samples, found at local
    minima of |f|) and polish each root with brentq."""
    brackets = []
    sgn = np.sign(values)
    for j in np.nonzero(sgn[:-1] * sgn[1:] < 0)[0]:
        brackets.append((grid[j], grid[j + 1]))
    absf = np.abs(values)
    for j in range(1, len(grid) - 1):
        if absf[j] < absf[j - 1] and absf[j] < absf[j + 1] and sgn[j - 1] == sgn[j] == sgn[j + 1] != 0:
            x = _split_pair(fun, grid[j - 1], grid[j], grid[j + 1], sgn[j], xtol_scale)
            if x is not None:
                brackets.append((grid[j - 1], x))
                brackets.append((x, grid[j + 1]))
    roots = []
    for a, b in brackets:
        if a == b:
            continue
        roots.append(brentq(fun, a, b, xtol=1e-15 * xtol_scale, rtol=1e-15, maxiter=200))
    return np.unique(np.array(sorted(roots)))


def bound_levels(layers, field_kv_cm: float = 0.0, emax: float | None = None, *,
                 scan_points: int | None = None) -> np.ndarray:
    """All bound levels (meV, ascending) of a stack, decaying in both claddings.

    Method: transfer matrices (flat layers: exponentials/plane waves; field: Airy Ai, Bi,
    A&S 10.4) matched with ψ and ψ'/m continuous (BenDaniel & Duke 1966), the renormalised
    shooting function of `matching_function`, a fine scan uniform in √(E − V_min) (≥ 40
    samples per WKB level spacing) with a local-minimum search for pairs of roots between
    samples, and brentq to ~1e-15 of the energy range. With non-parabolicity each layer's mass
    is m_i(E) = m_i(1 + α_i(E − E_c,i)), α in 1/eV (Nelson, Miller & Kleinman 1987).

    emax: upper limit (meV); default and cap: the lower cladding edge min(V_L, V_R).
    Levels closer than ~1e-12 of the range may be reported as one."""
    stack = Stack(layers, field_kv_cm)
    lo = stack.minimum_potential()
    hi = min(stack.left_lead, stack.right_lead)
    if emax is not None:
        if not np.isfinite(emax):
            raise ValueError(f"emax must be finite (meV), got {emax}")
        hi = min(hi, float(emax))
    if hi <= lo:
        return np.zeros(0)
    width = hi - lo
    n = scan_points or int(400 + 40 * _wkb_count(stack, hi))
    s = np.linspace(0.0, np.sqrt(width), n + 1)[1:]
    grid = lo + s * s
    grid[-1] = hi - 1e-12 * width
    vals = matching_function(stack, grid)
    fun = lambda x: float(matching_function(stack, x))  # noqa: E731
    return _roots_by_scan(fun, grid, vals, max(width, abs(hi), 1.0))


# ---------------------------------------------------------------------------------------
# Transmission
# ---------------------------------------------------------------------------------------
def _lead_k(stack: Stack, e):
    mL = stack.layer_mass(0, e) * np.ones(np.shape(e))
    mR = stack.layer_mass(len(stack.layers) - 1, e) * np.ones(np.shape(e))
    kL = np.sqrt(np.asarray(mL * (e - stack.left_lead) / H2M, dtype=complex))
    kR = np.sqrt(np.asarray(mR * (e - stack.right_lead) / H2M, dtype=complex))
    return mL, mR, kL, kR


def _scattering(stack: Stack, e):
    """(Ñ22, Ñ21, s, flux ratio (k_L/m_L)/(k_R/m_R)) with N = P_R⁻¹ M P_L = e^s·Ñ, the matrix
    from lead amplitudes (A→, B←) at z = 0 to (C→, D←) at z = L."""
    M, s = stack_matrix(stack, e)
    mL, mR, kL, kR = _lead_k(stack, e)
    a = 1j * kL / mL
    b = 1j * kR / mR
    m11, m12, m21, m22 = M[..., 0, 0], M[..., 0, 1], M[..., 1, 0], M[..., 1, 1]
    with np.errstate(divide="ignore", invalid="ignore"):
        n22 = 0.5 * ((m11 - a * m12) - (m21 - a * m22) / b)
        n21 = 0.5 * ((m11 + a * m12) - (m21 + a * m22) / b)
        ratio = (kL / mL) / (kR / mR)
    return n22, n21, s, ratio


def transmission(layers, energy, field_kv_cm: float = 0.0, *, reflection: bool = False):
    """Transmission T(E) (and R(E) if reflection=True) from the left cladding (lead) to the
    right one, through the stack in a field, by transfer matrices (plane waves per layer, Airy
    per layer in a field) with the probability-current factor:
    T = (k_R/m_R)/(k_L/m_L)·|t|² = [(k_L/m_L)/(k_R/m_R)]/|N22|², R = |N21/N22|².
    Leads may sit at different band edges. T = R = 0 where E ≤ max(V_L, V_R) (no propagating
    wave in one lead). Vectorised over `energy` (meV)."""
    stack = layers if isinstance(layers, Stack) else Stack(layers, field_kv_cm)
    e = np.asarray(energy, dtype=float)
    e1 = np.atleast_1d(e)
    open_ = e1 > max(stack.left_lead, stack.right_lead)
    T = np.zeros(e1.shape)
    R = np.zeros(e1.shape)
    if np.any(open_):
        n22, n21, s, ratio = _scattering(stack, e1[open_])
        with np.errstate(under="ignore"):
            T[open_] = ratio.real * np.exp(-2.0 * s) / np.abs(n22) ** 2
        R[open_] = np.abs(n21 / n22) ** 2
    if e.ndim == 0:
        T, R = T[0], R[0]
    return (T, R) if reflection else T


def transmission_amplitude(layers, energy, field_kv_cm: float = 0.0):
    """Complex transmission amplitude t = C/A = ratio/N22 (right-lead outgoing over left-lead
    incoming, plane waves e^{ik(z−z_lead)}); energy may be complex (analytic continuation with
    principal square roots: outgoing-wave sheet for Im E < 0 just below the real axis)."""
    stack = layers if isinstance(layers, Stack) else Stack(layers, field_kv_cm)
    e = np.asarray(energy)
    n22, _, s, ratio = _scattering(stack, np.atleast_1d(e))
    t = ratio / (n22 * np.exp(s))
    return t if e.ndim else t[0]


def resonances(layers, field_kv_cm: float = 0.0, emin: float | None = None,
               emax: float | None = None, *, scan_points: int | None = None):
    """Resonances (quasi-bound states) in (emin, emax) as poles of the transmission
    amplitude: complex zeros E_r − iΓ/2 of N22(E) (outgoing waves in both leads; Gamow
    1928, Siegert 1939). Candidates are found on a real scan (uniform in √(E − E_lo)) as
    jumps |Δ arg t| > π/2 between neighbours or local maxima of T, then polished by the
    complex secant method. Returns (energies E_r, widths Γ) in meV, ascending; Γ = ħ/τ.
    emin defaults to just above max(V_L, V_R); emax must be given."""
    stack = Stack(layers, field_kv_cm)
    e_lo = max(stack.left_lead, stack.right_lead)
    if emax is None:
        raise ValueError("emax (meV) must be given for resonances()")
    emin = e_lo if emin is None else max(float(emin), e_lo)
    if emax <= emin:
        return np.zeros(0), np.zeros(0)
    n = scan_points or int(400 + 60 * _wkb_count(stack, emax))
    s = np.linspace(np.sqrt(emin - e_lo), np.sqrt(emax - e_lo), n + 1)
    grid = e_lo + s * s
    grid[0] += 1e-9 * (emax - emin)
    t = transmission_amplitude(stack, grid.astype(float))
    T = transmission(stack, grid)
    dphi = np.angle(t[1:] / t[:-1])
    cands = set(np.nonzero(np.abs(dphi) > np.pi / 2)[0].tolist())
    for j in range(1, n):
        if T[j] > T[j - 1] and T[j] >= T[j + 1]:
            cands.add(j if T[j + 1] >= T[j - 1] else j - 1)
    f = lambda x: complex(1.0 / transmission_amplitude(stack, complex(x)))  # noqa: E731
    poles = []
    step = np.max(np.diff(grid))
    for j in sorted(cands):
        x0, x1 = complex(grid[j]), complex(grid[j + 1])
        f0, f1 = f(x0), f(x1)
        ok = False
        for _ in range(100):
            if f1 == f0:
                break
            x2 = x1 - f1 * (x1 - x0) / (f1 - f0)
            x0, f0 = x1, f1
            x1 = x2
            f1 = f(x1)
            if abs(x1 - x0) < 1e-14 * max(abs(x1), 1.0):
                ok = True
                break
        if ok and x1.imag < 0 and emin < x1.real < emax and abs(x1.real - grid[j]) < 10 * step + 5 * abs(x1.imag):
            if not any(abs(x1 - p) < 1e-9 * max(abs(x1), 1.0) for p in poles):
                poles.append(x1)
    poles.sort(key=lambda z: z.real)
    return np.array([p.real for p in poles]), np.array([-2.0 * p.imag for p in poles])


# ---------------------------------------------------------------------------------------
# Bloch bands of a periodic stack
# ---------------------------------------------------------------------------------------
def bloch_half_trace(layers, energy):
    """½ tr M(E) of one period (the stack, no field); Bloch's theorem gives the allowed
    energies at wavevector q from ½ tr M(E) = cos(q d), d = period (Kronig & Penney 1931;
    for BenDaniel-Duke matching Bastard 1981). Overflow beyond e^700 is clipped."""
    stack = Stack(layers, 0.0)
    M, s = stack_matrix(stack, np.asarray(energy, dtype=float))
    return 0.5 * (M[..., 0, 0] + M[..., 1, 1]) * np.exp(np.minimum(s, 700.0))


def miniband_energies(layers, q: float, count: int) -> np.ndarray:
    """Lowest `count` Bloch energies (meV) at wavevector q (1/nm) of the periodic stack
    (one period = the layers, no field): roots of ½ tr M(E) − cos(q d) by a scan uniform in
    √(E − V_min) (step ≤ 0.05 rad of Σ t_i √(m_i/H2M)·√(E−V_min)) and brentq.
    Touching bands (closed gaps at q = 0 or π/d) are tangencies, not sign changes, and are
    not resolved."""
    stack = Stack(layers, 0.0)
    if count < 1:
        raise ValueError(f"count must be >= 1, got {count}")
    d = stack.length
    c = np.cos(q * d)
    vmin = stack.minimum_potential()
    rate = sum(lay.thickness * np.sqrt(lay.mass / H2M) for lay in stack.layers)
    ds = 0.05 / rate
    fun = lambda x: float(bloch_half_trace(stack.layers, x) - c)  # noqa: E731
    roots: list[float] = []
    s0 = 0.0
    chunk = 2000
    while len(roots) < count:
        s = s0 + ds * np.arange(1, chunk + 1)
        grid = vmin + s * s
        vals = bloch_half_trace(stack.layers, grid) - c
        if s0 > 0:
            grid = np.concatenate([[vmin + s0 * s0], grid])
            vals = np.concatenate([[fun(vmin + s0 * s0)], vals])
        for j in np.nonzero(np.sign(vals[:-1]) * np.sign(vals[1:]) < 0)[0]:
            roots.append(brentq(fun, grid[j], grid[j + 1], xtol=1e-15 * max(abs(grid[j]), 1.0), rtol=1e-15))
        s0 = s[-1]
        if s0 * s0 > 1e7:
            raise RuntimeError("miniband_energies: fewer roots than requested below 1e7 meV")
    return np.array(sorted(roots)[:count])
