"""Heterostructure physics checks of specwell (Layer, Heterostructure, layered Hamiltonian).

Every expected value comes from an outside reference:
* the BenDaniel & Duke (1966) matching conditions (ψ and ψ'/m continuous) of a finite
  square well, in the form used by Bastard (1981), solved here with scipy.optimize.brentq;
* an independent finite-difference BenDaniel-Duke solver written below with numpy and
  scipy.linalg.eigh_tridiagonal, Richardson-extrapolated in the step;
* the Thomas-Reiche-Kuhn sum rule, parity selection rules, and plain linear algebra
  (scipy.linalg.eigh on the matrices specwell exposes).
No number produced by specwell is hard-coded. All material parameters (thicknesses,
band offsets, effective masses) are illustrative, not fitted to any real alloy.
"""

import os
import pickle

import numpy as np
import pytest
import scipy.constants as C
from scipy.linalg import eigh, eigh_tridiagonal
from scipy.optimize import brentq

import specwell as sw

# ħ²/(2 m_e) in meV nm², from CODATA values in scipy.constants.
H2M = C.hbar**2 / (2 * C.m_e) / (C.e * 1e-3) * 1e18

# Illustrative materials: (band edge meV, mass m_e).
BARRIER = (300.0, 0.092)
STEP = (120.0, 0.080)
WELL = (0.0, 0.067)


def stack_of(layers, field=0.0):
    """layers: list of (thickness nm, band edge meV, mass m_e)."""
    return sw.Heterostructure([sw.Layer(*l) for l in layers], field_kv_cm=field)


def layered_solve(layers, box, n, count, field=0.0):
    h = sw.Hamiltonian(sw.FourierGrid(box[0], box[1], n), stack_of(layers, field), units="semiconductor")
    return h.solve(count, method="dense")


def bdd_square_well_levels(a, v0, m_w, m_b):
    """Bound levels of a finite square well of width a (nm) and depth v0 (meV) with well
    mass m_w and barrier mass m_b, from the BenDaniel & Duke (1966) boundary conditions
    (ψ and ψ'/m continuous), as written by Bastard (1981):
        even: (k/m_w) tan(k a/2) = κ/m_b,   odd: −(k/m_w) cot(k a/2) = κ/m_b,
    k² = m_w E/(ħ²/2m_e), κ² = m_b (v0 − E)/(ħ²/2m_e). Multiplied through by cos/sin to
    remove poles; roots bracketed by a sign scan and polished with scipy.optimize.brentq."""
    k = lambda e: np.sqrt(m_w * e / H2M)
    kap = lambda e: np.sqrt(m_b * (v0 - e) / H2M)
    even = lambda e: (k(e) / m_w) * np.sin(k(e) * a / 2) - (kap(e) / m_b) * np.cos(k(e) * a / 2)
    odd = lambda e: -(k(e) / m_w) * np.cos(k(e) * a / 2) - (kap(e) / m_b) * np.sin(k(e) * a / 2)
    scan = np.linspace(1e-9 * v0, v0 * (1 - 1e-12), 200001)
    roots = []
    for f in (even, odd):
        v = f(scan)
        for i in np.nonzero(np.sign(v[:-1]) * np.sign(v[1:]) < 0)[0]:
            roots.append(brentq(f, scan[i], scan[i + 1], xtol=1e-14, rtol=1e-15))
    return np.sort(roots)


def fd_levels(layers, field, a0, a1, h, count):
    """Independent reference: BenDaniel-Duke (1966) equation −(ħ²/2m_e)(ψ'/m)' + Vψ = Eψ
    discretised by the symmetric 3-point (finite-volume) scheme
        −(ħ²/2m_e)/h² [(ψ_{i+1} − ψ_i)/m_{i+1/2} − (ψ_i − ψ_{i−1})/m_{i−1/2}] + V̄_i ψ_i = E ψ_i
    on [a0, a1] with ψ = 0 at both ends, 1/m taken at the midpoints between nodes (so mass
    steps enter through the flux ψ'/m), interfaces on nodes, and V̄_i the exact average of
    V over the cell [z_i − h/2, z_i + h/2]. Potential built here from the documented model:
    band edge of the layer (outer layers continue outside the stack) plus
    0.1·F·(clamp(z, 0, L) − L/2) meV. Lowest `count` eigenvalues by
    scipy.linalg.eigh_tridiagonal. Error O(h²)."""
    th = np.array([l[0] for l in layers], float)
    edges = np.array([l[1] for l in layers], float)
    masses = np.array([l[2] for l in layers], float)
    bounds = np.concatenate([[0.0], np.cumsum(th)])
    total = bounds[-1]
    n = int(round((a1 - a0) / h))
    for b in bounds:
        assert abs((b - a0) / h - round((b - a0) / h)) < 1e-9, "interfaces must sit on FD nodes"
    z = a0 + h * np.arange(n + 1)
    zi = z[1:-1]

    def material(p):
        idx = np.searchsorted(bounds[1:-1], p, side="right")
        return edges[idx], masses[idx]

    field_energy = lambda p: 0.1 * field * (np.clip(p, 0.0, total) - total / 2)
    _, m_mid = material(0.5 * (z[:-1] + z[1:]))
    # Cell average: V is piecewise linear with kinks only on nodes, so the mean of the
    # two half-cell midpoint values is exact.
    vl, _ = material(zi - h / 4)
    vr, _ = material(zi + h / 4)
    vbar = 0.5 * (vl + vr) + 0.5 * (field_energy(zi - h / 4) + field_energy(zi + h / 4))
    w = H2M / (m_mid * h * h)
    diag = w[:-1] + w[1:] + vbar
    off = -w[1:-1]
    return eigh_tridiagonal(diag, off, select="i", select_range=(0, count - 1), eigvals_only=True)


def fd_richardson(layers, field, a0, a1, count, h=0.004):
    """Richardson extrapolation of the O(h²) FD levels: (4 E(h/2) − E(h))/3."""
    e1 = fd_levels(layers, field, a0, a1, h, count)
    e2 = fd_levels(layers, field, a0, a1, h / 2, count)
    return (4 * e2 - e1) / 3


def fitted_order(ns, errs):
    """Least-squares slope of −log(err) against log(N)."""
    return -np.polyfit(np.log(ns), np.log(errs), 1)[0]


# --------------------------------------------------------------------------- 1, 2: single well

# Illustrative well: 10 nm, m_w = 0.067 in a 300 meV, m_b = 0.092 barrier (20 nm each side).
SQ_A, SQ_V0 = 10.0, BARRIER[0]
SQ_LAYERS = [(20.0, *BARRIER), (SQ_A, *WELL), (20.0, *BARRIER)]
SQ_BOX = (-10.0, 60.0)
SQ_NS = (129, 257, 513, 1025)


@pytest.fixture(scope="module")
def square_well():
    exact = bdd_square_well_levels(SQ_A, SQ_V0, WELL[1], BARRIER[1])
    layered = {}
    for n in SQ_NS:
        layered[n] = layered_solve(SQ_LAYERS, SQ_BOX, n, len(exact) + 1).energies
    return exact, layered


def test_square_well_matches_bendaniel_duke_with_third_order_convergence(square_well):
    exact, layered = square_well
    assert len(exact) >= 3  # the illustrative well holds several bound levels
    errs = np.array([np.abs(layered[n][: len(exact)] - exact) / exact for n in SQ_NS])
    print("\nlayered Galerkin vs BenDaniel-Duke roots, relative error per level")
    print("   N   " + "  ".join(f"E{i}={e:9.4f}" for i, e in enumerate(exact)))
    for n, row in zip(SQ_NS, errs):
        print(f"{n:5d}  " + "  ".join(f"{x:14.3e}" for x in row))
    pair = np.log(errs[:-1] / errs[1:]) / np.log(np.array(SQ_NS[1:]) / np.array(SQ_NS[:-1]))[:, None]
    orders = [fitted_order(SQ_NS, errs[:, i]) for i in range(len(exact))]
    print("pairwise orders:\n", np.array2string(pair, precision=3), "\nfitted orders:", np.round(orders, 3))
    # Every bound level to 1e-6 relative with at most 1025 modes.
    assert np.all(errs[-1] <= 1e-6)
    # Documented O(N^-3) convergence (mass coordinate, exact layer integrals).
    assert min(orders) >= 2.5
    assert pair.min() >= 2.5
    # No spurious bound state: the next level lies above the barrier (Bastard 1981 counts
    # exactly len(exact) bound states for this well).
    assert layered[SQ_NS[-1]][len(exact)] > SQ_V0


def test_collocation_with_mass_array_is_first_order_and_much_worse(square_well):
    # Same physical well on a plain FourierGrid: sampled step potential and a sampled mass
    # array (BenDaniel-Duke operator by collocation). The jumps are resolved only to a grid
    # spacing, so the error is O(1/N); compare honestly at equal N.
    exact, layered = square_well
    stack = stack_of(SQ_LAYERS)
    coll = []
    for n in SQ_NS:
        g = sw.FourierGrid(SQ_BOX[0], SQ_BOX[1], n)
        h = sw.Hamiltonian(g, stack.potential(g.x), mass=stack.mass(g.x), units="semiconductor")
        coll.append(np.abs(h.solve(len(exact), method="dense").energies - exact) / exact)
    coll = np.array(coll)
    lay = np.array([np.abs(layered[n][: len(exact)] - exact) / exact for n in SQ_NS])
    print("\nground level relative error: collocation (sampled V, mass=) vs layered Galerkin")
    print("   N    collocation      layered       ratio")
    for n, c, l in zip(SQ_NS, coll[:, 0], lay[:, 0]):
        print(f"{n:5d}  {c:12.3e}  {l:12.3e}  {c / l:10.1f}")
    orders = [fitted_order(SQ_NS, coll[:, i]) for i in range(len(exact))]
    print("collocation fitted orders:", np.round(orders, 3))
    assert np.all(coll[-1] < coll[0])  # it does converge ...
    assert max(orders) < 2.0  # ... but at low order (about 1/N, non-monotone with the node offsets)
    assert np.all(coll >= 100 * lay)  # at equal N the layered result is >= 100x more accurate


# --------------------------------------------------------------------------- 3: TRK sum rule


def test_thomas_reiche_kuhn_sum_rule_constant_mass():
    # Thomas-Reiche-Kuhn: Σ_f f_if = 1 for constant mass, f_if = (2m/ħ²)(E_f − E_i)|z_if|².
    m = WELL[1]
    layers = [(20.0, 300.0, m), (10.0, 0.0, m), (20.0, 300.0, m)]
    n = 257
    s = layered_solve(layers, SQ_BOX, n, n)
    f = s.oscillator_strengths()
    d = s.dipole_matrix()
    e = s.energies
    # The definition f_if = (2m/ħ²)(E_f − E_i)|z_if|² applied to the dipole matrix. rtol 1e-8:
    # specwell and scipy >= 1.15 use CODATA 2022 (an older scipy's m_e differs ~1e-9).
    f_ref = (m / H2M) * (e[None, :] - e[:, None]) * d**2
    np.testing.assert_allclose(f, f_ref, rtol=1e-8, atol=1e-12)
    np.testing.assert_allclose(d, d.T, atol=1e-10)
    partial = {k: f[0, :k].sum() for k in (10, 40, n)}
    print("\nTRK partial sums Σ_f f_0f:", {k: round(v, 7) for k, v in partial.items()})
    # For the two deeply bound states (ψ negligible at the edges of the periodic box, where
    # z jumps; the shallow third level still leaks there and its sum converges slowly).
    for i in range(2):
        assert abs(f[i].sum() - 1.0) <= 1e-3
    assert f[0, 1] > 0.9  # the 0→1 line carries most of the strength (infinite-well limit 0.96)


# --------------------------------------------------------------------------- 4: Stark shift

STARK_LAYERS = [(15.0, *BARRIER), (10.0, *WELL), (15.0, *BARRIER)]
STARK_BOX = (-25.0, 65.0)


def test_fd_reference_reproduces_bendaniel_duke():
    # Sanity of the independent reference itself before it is used below.
    exact = bdd_square_well_levels(10.0, BARRIER[0], WELL[1], BARRIER[1])
    ref = fd_richardson(STARK_LAYERS, 0.0, *STARK_BOX, len(exact))
    assert np.all(np.abs(ref - exact) / exact <= 1e-8)


def test_quantum_confined_stark_shift_against_finite_differences():
    fields = (0.0, 20.0, 50.0)
    rows = []
    for f in fields:
        ref = fd_richardson(STARK_LAYERS, f, *STARK_BOX, 2)
        got = layered_solve(STARK_LAYERS, STARK_BOX, 1025, 2, field=f).energies
        rows.append((f, got, ref))
    print("\nQCSE: layered (N=1025) vs Richardson FD (h=0.004, 0.002 nm)")
    print(" F kV/cm        E0 specwell       E0 FD     rel       E1 specwell       E1 FD     rel")
    for f, got, ref in rows:
        rel = np.abs(got - ref) / ref
        print(f"{f:7.1f}  {got[0]:15.8f} {ref[0]:13.8f} {rel[0]:8.1e}  {got[1]:15.8f} {ref[1]:13.8f} {rel[1]:8.1e}")
        assert np.all(rel <= 1e-5)
    g0, r0 = rows[0][1], rows[0][2]
    for f, got, ref in rows[1:]:
        shift, shift_ref = got - g0, ref - r0
        print(f"shift at {f:4.1f} kV/cm: specwell {shift}, FD {shift_ref}")
        assert np.all(np.abs(shift - shift_ref) <= 1e-5 * np.abs(ref))
    # Second-order perturbation theory (Bastard et al. 1983): the ground level of a
    # symmetric well moves down, quadratically at weak field, monotonically with |F|.
    e0 = [got[0] for _, got, _ in rows]
    assert e0[0] > e0[1] > e0[2]


# --------------------------------------------------------------------------- 5: parity

# Symmetric step well (illustrative): barrier / step / well / step / barrier.
PARITY_LAYERS = [(15.0, *BARRIER), (4.0, *STEP), (8.0, *WELL), (4.0, *STEP), (15.0, *BARRIER)]
PARITY_BOX = (-20.0, 66.0)  # symmetric about the stack centre 23 nm


def test_parity_selection_rule_and_its_breaking_by_a_field():
    s = layered_solve(PARITY_LAYERS, PARITY_BOX, 257, 4)
    assert np.all(s.energies < BARRIER[0])  # four bound states
    f = s.oscillator_strengths()
    big = np.abs(f).max()
    # Symmetric potential → eigenstates of definite parity ψ_n(L − z) = (−1)^n ψ_n(z) (Bastard 1981).
    z = np.linspace(-5.0, 23.0, 57)
    stack = stack_of(PARITY_LAYERS)
    psi, mirrored = s.wavefunctions(z), s.wavefunctions(stack.total_thickness - z)
    for n in range(4):
        np.testing.assert_allclose(mirrored[n], (-1) ** n * psi[n], atol=1e-9)
    # Dipole selection rule: z is odd, so same-parity transitions vanish.
    for i in range(4):
        for j in range(4):
            if i != j and (i - j) % 2 == 0:
                assert abs(f[i, j]) <= 1e-8
            elif i != j:
                assert abs(f[i, j]) >= 1e-4 * big
    assert f[0, 1] > 0.5
    # A field breaks the symmetry: 0 → 2 becomes allowed.
    sf = layered_solve(PARITY_LAYERS, PARITY_BOX, 257, 4, field=20.0)
    ff = sf.oscillator_strengths()
    print(f"\nf_02 at 0 kV/cm: {f[0, 2]:.2e}, at 20 kV/cm: {ff[0, 2]:.2e}")
    assert abs(ff[0, 2]) > 1e-6 and abs(ff[0, 2]) > 1e4 * abs(f[0, 2])


# --------------------------------------------------------------------------- 6: coupled wells

# Illustrative asymmetric triple well: 7, 8, 6 nm wells separated by 3 nm barriers.
TRIPLE_LAYERS = [
    (15.0, *BARRIER), (7.0, *WELL), (3.0, *BARRIER), (8.0, *WELL),
    (3.0, *BARRIER), (6.0, *WELL), (15.0, *BARRIER),
]
TRIPLE_BOX = (-20.0, 77.0)


def test_triple_well_subbands_against_finite_differences():
    count = 6
    ref = fd_richardson(TRIPLE_LAYERS, 0.0, *TRIPLE_BOX, count)
    got = layered_solve(TRIPLE_LAYERS, TRIPLE_BOX, 1025, count).energies
    rel = np.abs(got - ref) / ref
    print("\ntriple well: specwell", np.round(got, 6), "\n             FD      ", np.round(ref, 6), "\n rel", rel)
    assert np.all(got < BARRIER[0])
    assert np.all(rel <= 1e-5)


# --------------------------------------------------------------------------- 7: wavefunctions


def test_normalisation_continuity_and_mass_weighted_derivative():
    stack = stack_of(STARK_LAYERS, 20.0)
    s = layered_solve(STARK_LAYERS, STARK_BOX, 513, 3, field=20.0)
    z = np.linspace(*STARK_BOX, 90001)
    psi = s.wavefunctions(z)
    # ∫|ψ|² dz = 1 (trapezoid rule on a fine grid).
    np.testing.assert_allclose(np.trapezoid(psi**2, z, axis=1), 1.0, atol=1e-7)
    d = 1e-4
    for zi in stack.interfaces[1:-1]:
        m_l, m_r = stack.mass(np.array([zi - d, zi + d]))
        assert m_l != m_r
        p = s.wavefunctions(np.array([zi - 2 * d, zi - d, zi, zi + d, zi + 2 * d]))
        scale = np.abs(psi).max(axis=1)
        # ψ continuous (BenDaniel & Duke 1966): linear extrapolations from each side agree.
        left, right = 2 * p[:, 1] - p[:, 0], 2 * p[:, 3] - p[:, 4]
        assert np.all(np.abs(left - right) <= 1e-6 * scale)
        assert np.all(np.abs(p[:, 2] - left) <= 1e-6 * scale)
        # ψ'/m continuous (BenDaniel & Duke 1966): 2nd-order one-sided differences.
        dl = (3 * p[:, 2] - 4 * p[:, 1] + p[:, 0]) / (2 * d)
        dr = (-3 * p[:, 2] + 4 * p[:, 3] - p[:, 4]) / (2 * d)
        assert np.all(np.abs(dl / m_l - dr / m_r) <= 1e-5 * np.abs(dl / m_l))
        # ... so ψ' itself jumps by the mass ratio.
        np.testing.assert_allclose(dl / dr, m_l / m_r, rtol=1e-5)
        assert np.all(np.abs(dl / dr - 1) > 0.2)


# --------------------------------------------------------------------------- 8: matrices, round trips


@pytest.fixture(scope="module")
def matrix_case():
    stack = stack_of(PARITY_LAYERS, 10.0)
    h = sw.Hamiltonian(sw.FourierGrid(*PARITY_BOX, 257), stack, units="semiconductor")
    return stack, h, h.solve(5, method="dense")


def test_matrices_symmetric_overlap_positive_and_residuals(matrix_case):
    stack, h, s = matrix_case
    a, b = h.matrix(), h.overlap_matrix()
    assert a.shape == b.shape == (257, 257)
    np.testing.assert_allclose(a, a.T, rtol=0, atol=1e-12 * np.abs(a).max())
    np.testing.assert_allclose(b, b.T, rtol=0, atol=1e-14 * np.abs(b).max())
    mb = np.linalg.eigvalsh(b)
    masses = [l[2] for l in PARITY_LAYERS]
    # B is the Galerkin matrix of multiplication by 1/m: its spectrum lies inside the
    # range of 1/m (Rayleigh quotient bound), in particular B is positive definite.
    assert mb.min() > 0
    assert mb.min() >= (1 / max(masses)) * (1 - 1e-12) and mb.max() <= (1 / min(masses)) * (1 + 1e-12)
    # Independent generalized eigensolve of (A, B) with scipy.
    w = eigh(a, b, eigvals_only=True, subset_by_index=(0, 4))
    np.testing.assert_allclose(s.energies, w, rtol=1e-10)
    # Residuals as reported and as recomputed from A, B, vectors; backward-stable size.
    v = s.vectors
    r = np.linalg.norm(v @ a - s.energies[:, None] * (v @ b), axis=1)
    norm_a = np.linalg.norm(a, 2)
    assert np.all(s.residuals <= 1e-12 * norm_a)
    np.testing.assert_allclose(s.residuals, r, rtol=0.1, atol=1e-13 * norm_a)
    # B-orthonormal vectors = orthonormal wavefunctions.
    np.testing.assert_allclose(v @ b @ v.T, np.eye(5), atol=1e-12)


def test_pickle_round_trips(matrix_case):
    stack, h, s = matrix_case
    z = np.linspace(-10.0, 56.0, 301)
    layer = sw.Layer(*PARITY_LAYERS[1])
    assert pickle.loads(pickle.dumps(layer)) == layer
    st2 = pickle.loads(pickle.dumps(stack))
    assert st2.field_kv_cm == stack.field_kv_cm and list(st2.layers) == list(stack.layers)
    np.testing.assert_array_equal(st2.potential(z), stack.potential(z))
    s2 = pickle.loads(pickle.dumps(s))
    np.testing.assert_array_equal(s2.energies, s.energies)
    np.testing.assert_array_equal(s2.wavefunctions(z), s.wavefunctions(z))
    np.testing.assert_array_equal(s2.dipole_matrix(), s.dipole_matrix())
    h2 = pickle.loads(pickle.dumps(h))
    np.testing.assert_array_equal(h2.matrix(), h.matrix())
    np.testing.assert_array_equal(h2.overlap_matrix(), h.overlap_matrix())
    np.testing.assert_array_equal(h2.solve(5, method="dense").energies, s.energies)


def test_save_load_energies(matrix_case, tmp_path):
    _, _, s = matrix_case
    path = os.fspath(tmp_path / "layered.npz")
    sw.save(s, path)
    t = sw.load(path)
    np.testing.assert_array_equal(t.energies, s.energies)
    np.testing.assert_array_equal(t.residuals, s.residuals)


def test_save_load_wavefunctions(matrix_case, tmp_path):
    _, _, s = matrix_case
    path = os.fspath(tmp_path / "layered.npz")
    sw.save(s, path)
    t = sw.load(path)
    z = np.linspace(-10.0, 56.0, 301)
    np.testing.assert_allclose(t.wavefunctions(z), s.wavefunctions(z), atol=1e-12)
    np.testing.assert_allclose(t.dipole_matrix(), s.dipole_matrix(), atol=1e-12)


# --------------------------------------------------------------------------- profiles


def test_potential_and_mass_profiles_follow_documented_model():
    layers = [(5.0, 200.0, 0.09), (3.0, 0.0, 0.067), (4.0, 150.0, 0.08)]
    f = 30.0
    stack = stack_of(layers, f)
    np.testing.assert_array_equal(stack.interfaces, [0.0, 5.0, 8.0, 12.0])
    assert stack.total_thickness == 12.0 and len(stack) == 3
    z = np.array([-7.0, -1e-9, 0.0, 2.5, 5.0 - 1e-9, 5.0, 7.9, 8.0, 11.0, 12.0, 20.0])
    # Independent numpy construction of the documented model: right-continuous layers,
    # outer layers continue as padding, field 0.1·F·(clamp(z, 0, L) − L/2) meV.
    idx = np.array([0, 0, 0, 0, 0, 1, 1, 2, 2, 2, 2])
    edge = np.array([l[1] for l in layers])[idx]
    mass = np.array([l[2] for l in layers])[idx]
    want_v = edge + 0.1 * f * (np.clip(z, 0, 12.0) - 6.0)
    np.testing.assert_allclose(stack.potential(z), want_v, rtol=0, atol=1e-12)
    np.testing.assert_array_equal(stack.mass(z), mass)


# --------------------------------------------------------------------------- 9: bad inputs

GOOD = [sw.Layer(10.0, 300.0, 0.092), sw.Layer(10.0, 0.0, 0.067), sw.Layer(10.0, 300.0, 0.092)]
NAN = float("nan")


@pytest.mark.parametrize(
    "make, exc, match",
    [
        (lambda: sw.Heterostructure([]), ValueError, r"`layers`"),
        (lambda: sw.Heterostructure([GOOD[0], sw.Layer(-1.0, 0.0, 0.067)]), ValueError, r"`layers\[1\]\.thickness`"),
        (lambda: sw.Heterostructure([sw.Layer(0.0, 0.0, 0.067)]), ValueError, r"`layers\[0\]\.thickness`"),
        (lambda: sw.Heterostructure([sw.Layer(10.0, 0.0, 0.0)]), ValueError, r"`layers\[0\]\.mass`"),
        (lambda: sw.Heterostructure([GOOD[0], sw.Layer(10.0, 0.0, NAN)]), ValueError, r"`layers\[1\]\.mass`"),
        (lambda: sw.Heterostructure([sw.Layer(10.0, NAN, 0.067)]), ValueError, r"`layers\[0\]\.band_edge`"),
        (lambda: sw.Heterostructure(GOOD, field_kv_cm=NAN), ValueError, r"`field_kv_cm`"),
        (lambda: sw.Heterostructure([GOOD[0], (10.0, 0.0, 0.067)]), TypeError, r"`layers\[1\]`"),
        (lambda: sw.Heterostructure(5), TypeError, r"`layers`"),
        (lambda: sw.Hamiltonian(sw.FourierGrid(0.0, 20.0, 65), sw.Heterostructure(GOOD), units="semiconductor"),
         ValueError, r"`grid`"),
        (lambda: sw.Hamiltonian(sw.FourierGrid(1.0, 40.0, 65), sw.Heterostructure(GOOD), units="semiconductor"),
         ValueError, r"`grid`"),
        (lambda: sw.Hamiltonian(sw.FourierGrid(-5.0, 35.0, 65), sw.Heterostructure(GOOD), units="natural"),
         ValueError, r"`units`"),
        (lambda: sw.Hamiltonian(sw.FourierGrid(-5.0, 35.0, 65), sw.Heterostructure(GOOD)), ValueError, r"`units`"),
        (lambda: sw.Hamiltonian(sw.FourierGrid(-5.0, 35.0, 65), sw.Heterostructure(GOOD), mass=0.067,
                                units="semiconductor"), ValueError, r"`mass`"),
        (lambda: sw.Hamiltonian(sw.FourierGrid(-5.0, 35.0, 65), sw.Heterostructure(GOOD), mass=np.full(65, 0.067),
                                units="semiconductor"), ValueError, r"`mass`"),
        (lambda: sw.Hamiltonian(sw.HermiteBasis(20), sw.Heterostructure(GOOD), units="semiconductor"),
         TypeError, r"`basis`"),
        (lambda: sw.Heterostructure(GOOD).potential([1.0, NAN]), ValueError, r"`z`"),
    ],
    ids=[
        "empty", "negative-thickness", "zero-thickness", "zero-mass", "nan-mass", "nan-band-edge",
        "nan-field", "non-layer", "not-a-sequence", "grid-too-short", "grid-starts-inside",
        "units-natural", "units-default", "mass-scalar-with-stack", "mass-array-with-stack",
        "hermite-with-stack", "nan-z",
    ],
)
def test_bad_inputs_name_the_argument(make, exc, match):
    with pytest.raises(exc, match=match):
        make()
