"""Checks of the matrix-free (LOBPCG) eigensolver path of specwell: Hamiltonian.solve(method="iterative").

Every expected value comes from outside the iterative path itself:
* closed-form spectra: harmonic oscillator E_n = (n + 1/2) ħω (Griffiths, Introduction to
  Quantum Mechanics, 2nd ed. 2005, §2.3) and the Pöschl-Teller well
  V = -λ(λ+1)/2 sech²x with E_n = -(λ-n)²/2 (Pöschl & Teller, Z. Phys. 83, 143 (1933);
  Landau & Lifshitz, Quantum Mechanics, §23, problem 4);
* the dense path (full symmetric diagonalisation of the same discrete operator), with
  the comparison bounded by textbook perturbation theory of symmetric matrices:
  Weyl / Bauer-Fike (a Ritz value with residual r lies within r of an eigenvalue) and the
  Davis-Kahan sin Θ theorem (Davis & Kahan, SIAM J. Numer. Anal. 7, 1 (1970):
  ‖sin Θ‖ ≤ ‖R‖_F / δ); Courant-Fischer (Rayleigh-Ritz values are upper bounds);
* residuals recomputed here with numpy from Hamiltonian.apply (and, for heterostructures,
  the overlap matrix B), independently of the residuals specwell reports;
* the documented tolerance rule ‖Hψ − Eψ‖ ≤ tol_eff·max(1, |E|), tol_eff = max(tol, 64 ε ‖H‖_est),
  with ‖H‖_est rebuilt here from the basis parameters (src/eigen/matrix_free.rs,
  Hamiltonian::norm_estimate).
No number produced by specwell is hard-coded. No timing is asserted.
"""

import json
import os
import subprocess
import sys
import textwrap

import numpy as np
import pytest
import scipy.constants as C
import scipy.linalg

import specwell as sw

EPS = np.finfo(float).eps
ROUNDOFF_FACTOR = 64.0  # documented floor factor of the iterative tolerance (matrix_free.rs)
AUTO_DENSE_MAX = 512  # documented size limit of the "auto" dense choice (matrix_free.rs)

# ħ²/(2 m_e) in meV nm², from CODATA values in scipy.constants.
H2M = C.hbar**2 / (2 * C.m_e) / (C.e * 1e-3) * 1e18


# --------------------------------------------------------------------------- helpers


def child_env(**extra):
    """Environment for a child interpreter that imports the same specwell as this one."""
    pkg_parent = os.path.dirname(os.path.dirname(os.path.abspath(sw.__file__)))
    path = os.pathsep.join(p for p in (pkg_parent, os.environ.get("PYTHONPATH", "")) if p)
    return dict(os.environ, PYTHONPATH=path, **extra)


def grid_norm_estimate(grid, potential, mass=1.0):
    """Upper estimate of ‖H‖₂ on a FourierGrid in natural units (ħ = 1):
    max(ħ²/2m)·k_max² + max|V| with k_max = π/dx (the Nyquist wavenumber)."""
    c = np.max(1.0 / (2.0 * np.asarray(mass, dtype=float)))
    return c * (np.pi / grid.dx) ** 2 + np.max(np.abs(potential))


def hermite_norm_estimate(basis, potential, mass=1.0):
    """‖H‖ estimate on a Hermite basis: (ħ²/2m)(2N+1)/L² (largest oscillator kinetic energy
    of the scaled functions) + max|V| over the quadrature nodes."""
    return (1.0 / (2.0 * mass)) * (2 * basis.size + 1) / basis.length**2 + np.max(np.abs(potential))


def hetero_norm_estimate(stack, grid):
    """‖B⁻¹A‖ estimate of a heterostructure on the box [0, total thickness): (ħ²/2m_e) k_s² m_max + max|V|,
    k_s = πN/S in the mass coordinate, S = Σ m_i t_i (BenDaniel-Duke in s = ∫ m dz)."""
    layers = stack.layers
    s = sum(l.mass * l.thickness for l in layers)
    mmax = max(l.mass for l in layers)
    vmax = np.max(np.abs(stack.potential(grid.x)))
    return H2M * (np.pi * grid.size / s) ** 2 * mmax + vmax


def effective_tol(tol, norm_est):
    return max(tol, ROUNDOFF_FACTOR * EPS * norm_est)


def my_residuals(h, spec, overlap=None):
    """‖Hψ − Eψ‖ (or ‖Aψ − E Bψ‖) per state, recomputed with Hamiltonian.apply."""
    out = []
    for e, v in zip(spec.energies, spec.vectors):
        bv = v if overlap is None else overlap @ v
        out.append(np.linalg.norm(np.asarray(h.apply(v)) - e * bv))
    return np.array(out)


def sin_theta(v_ref, v):
    """Largest principal angle sine between the row spaces of v_ref (orthonormal rows) and v:
    ‖(I − P_ref) vᵀ‖₂ (Golub & Van Loan, Matrix Computations, §2.5.3 / §6.4.3)."""
    outside = v.T - v_ref.T @ (v_ref @ v.T)
    return np.linalg.norm(outside, 2)


def random_smooth_potential(rng):
    """A few random Gaussians on a random confining x² or x⁴ background."""
    half = rng.uniform(8.0, 12.0)
    n = int(rng.choice([512, 640, 768, 896, 1024]))
    grid = sw.FourierGrid(-half, half, n)
    x = grid.x
    if rng.random() < 0.5:
        v = rng.uniform(0.3, 2.0) * x**2
    else:
        v = rng.uniform(0.03, 0.3) * x**4
    for _ in range(rng.integers(2, 6)):
        amp = rng.uniform(-4.0, 4.0)
        x0 = rng.uniform(-0.3 * half, 0.3 * half)
        w = rng.uniform(0.3, 1.5)
        v = v + amp * np.exp(-((x - x0) / w) ** 2)
    count = int(rng.integers(4, 9))
    return grid, v, count


def symmetric_double_well(rng, deep):
    """c(x² − a²)² plus symmetric Gaussian pairs: parity-even, deep enough that the lowest
    doublet is split by tunnelling only (WKB: splitting ∝ exp(−∫|p|dx), Landau-Lifshitz §50)."""
    half = rng.uniform(7.0, 9.0)
    n = int(rng.choice([512, 768, 1024]))
    grid = sw.FourierGrid(-half, half, n)
    x = grid.x
    if deep:  # splittings down at the round-off level of the dense solver
        a, c, amp_range = rng.uniform(2.6, 3.0), rng.uniform(1.0, 2.0), (-1.0, 1.0)
    else:  # resolved splittings, ~1e-11 to 1e-8
        a, c, amp_range = rng.uniform(2.32, 2.48), rng.uniform(1.0, 1.25), (-0.2, 0.3)
    v = c * (x**2 - a**2) ** 2
    for _ in range(rng.integers(1, 3)):
        amp = rng.uniform(*amp_range)
        x0 = rng.uniform(0.0, a)
        w = rng.uniform(0.3, 1.0)
        v = v + amp * (np.exp(-((x - x0) / w) ** 2) + np.exp(-((x + x0) / w) ** 2))
    count = int(rng.choice([4, 6, 8]))  # even: never cut a doublet
    return grid, v, count


def compare_with_dense(h, it, dense_plus_one, count, overlap=None):
    """Energies, orthonormality and subspace of an iterative result against the dense one.
    Returns (max |ΔE|, sinΘ)."""
    d = dense_plus_one
    ed, vd = d.energies[:count], d.vectors[:count]
    # Orthonormal (B-orthonormal for heterostructures): no state returned twice.
    b = np.eye(h.size) if overlap is None else overlap
    gram = it.vectors @ b @ it.vectors.T
    assert np.abs(gram - np.eye(count)).max() < 1e-10
    # Weyl/Bauer-Fike: each Ritz value is within its residual of an eigenvalue; with the
    # same count and ascending order no state is missed.
    r_it = my_residuals(h, it, overlap)
    r_d = my_residuals(h, d, overlap)[:count]
    de = np.abs(it.energies - ed)
    assert np.all(de <= 1e-9), de
    # Subspaces: singular values of V_dense·B·V_iterᵀ are the cosines of the principal angles.
    sv = np.linalg.svd(vd @ b @ it.vectors.T, compute_uv=False)
    assert sv.max() <= 1 + 1e-10 and sv.min() >= 1 - 1e-8, sv
    st = np.nan
    if overlap is None:
        # Davis-Kahan sin Θ: both subspaces lie within ‖R‖_F/δ of the exact one, δ = gap to
        # the first excluded eigenvalue.
        delta = d.energies[count] - max(it.energies[-1], ed[-1])
        assert delta > 0
        st = sin_theta(vd, it.vectors)
        bound = (np.linalg.norm(r_it) + np.linalg.norm(r_d)) / delta + 1e-11
        assert st <= bound, (st, bound)
    return de.max(), st


# --------------------------------------------------------------------------- 1. agreement with dense


RANDOM_CASES = list(range(40))
DOUBLE_WELL_CASES = list(range(12))


@pytest.mark.parametrize("case", RANDOM_CASES)
def test_random_smooth_potentials_match_dense(case):
    # Independent construction: the same discrete operator diagonalised densely.
    rng = np.random.default_rng(20240 + case)
    grid, v, count = random_smooth_potential(rng)
    h = sw.Hamiltonian(grid, v)
    d = h.solve(count + 1, method="dense")
    it = h.solve(count, method="iterative")
    assert it.method == "iterative" and d.method == "dense"
    compare_with_dense(h, it, d, count)
    # Well-separated states: each vector matches its dense partner with the same sign
    # (both paths apply the same sign convention); Davis-Kahan for one vector: sin θ ≤ r/gap.
    r_it = my_residuals(h, it)
    r_d = my_residuals(h, d)
    e = d.energies
    for j in range(count):
        gap = min(e[j + 1] - e[j], e[j] - e[j - 1] if j > 0 else np.inf)
        if gap > 1e-3:
            diff = np.linalg.norm(it.vectors[j] - d.vectors[j])
            assert diff <= 2 * (r_it[j] + r_d[j]) / gap + 1e-10, (j, diff, gap)


@pytest.mark.parametrize("case", DOUBLE_WELL_CASES)
def test_symmetric_double_wells_near_degenerate_pairs(case):
    rng = np.random.default_rng(777 + case)
    grid, v, count = symmetric_double_well(rng, deep=case % 2 == 0)
    h = sw.Hamiltonian(grid, v)
    d = h.solve(count + 1, method="dense")
    # Verify the ground doublet is indeed nearly degenerate (tunnel splitting ≤ 1e-8)
    # and well isolated from the next doublet.
    split = d.energies[1] - d.energies[0]
    assert 0 <= split <= 1e-8, split
    assert d.energies[2] - d.energies[1] > 1e-2
    it = h.solve(count, method="iterative")
    compare_with_dense(h, it, d, count)
    # Both members of the doublet are present (not one state twice): the projections
    # of the iterative doublet on the dense even and odd states have full rank.
    m = d.vectors[:2] @ it.vectors[:2].T
    assert np.linalg.svd(m, compute_uv=False).min() > 1 - 1e-8
    # Parity (the potential is even on the grid x_j ↔ −x_j, a periodic reflection): the
    # iterative doublet subspace is invariant under reflection.
    n = grid.size
    refl = lambda u: np.roll(u[::-1], 1)  # x_j = -L + j dx  ↦  x_{(N-j) mod N}
    assert np.allclose(v, refl(v), atol=1e-12 * np.abs(v).max())
    pr = np.array([refl(u) for u in it.vectors[:2]])
    assert sin_theta(it.vectors[:2], pr) < 1e-6


# --------------------------------------------------------------------------- 2. known spectra at large N


def test_harmonic_oscillator_large_grid():
    # E_n = (n + 1/2) ħω, V = m ω² x²/2 (Griffiths 2005, §2.3); ħ = 1 (natural units).
    n = 2**16
    mass, omega = 2.0, 1.3
    grid = sw.FourierGrid(-25.0, 25.0, n)
    v = 0.5 * mass * omega**2 * grid.x**2
    h = sw.Hamiltonian(grid, v, mass=mass)
    s = h.solve(5, method="iterative")
    want = (np.arange(5) + 0.5) * omega
    assert s.method == "iterative"
    np.testing.assert_allclose(s.energies, want, rtol=0, atol=1e-9)
    tol_eff = effective_tol(1e-10, grid_norm_estimate(grid, v, mass))
    assert np.all(my_residuals(h, s) <= tol_eff * np.maximum(1, np.abs(s.energies)) * (1 + 1e-3))


def test_poschl_teller_large_grid():
    # V = -λ(λ+1)/2 sech²x, E_n = -(λ-n)²/2 for n < λ (ħ = m = 1;
    # Pöschl & Teller 1933; Landau-Lifshitz QM §23 problem 4). λ = 4.5: five bound states,
    # the last at -1/8, decaying like e^{-|x|/2}: the box ±40 truncates at ~e^{-40}.
    n = 2**16
    lam = 4.5
    grid = sw.FourierGrid(-40.0, 40.0, n)
    v = -lam * (lam + 1) / 2 / np.cosh(grid.x) ** 2
    h = sw.Hamiltonian(grid, v)
    s = h.solve(5, method="iterative")
    want = -((lam - np.arange(5)) ** 2) / 2
    np.testing.assert_allclose(s.energies, want, rtol=0, atol=1e-9)
    # All five are bound (below the continuum threshold 0).
    assert np.all(s.energies < 0)


# --------------------------------------------------------------------------- 3. residual criterion


@pytest.mark.parametrize("tol", [1e-5, 1e-8, 1e-10, 1e-14])
def test_residual_criterion_every_state(tol):
    # The documented stopping rule, checked on residuals recomputed with H.apply.
    rng = np.random.default_rng(4242)
    n = 4096
    grid = sw.FourierGrid(-15.0, 15.0, n)
    x = grid.x
    v = 0.05 * x**4 - 3 * np.exp(-((x - 0.7) / 0.8) ** 2) + 2 * np.exp(-((x + 1.5) / 0.5) ** 2) + 20.0
    h = sw.Hamiltonian(grid, v)
    s = h.solve(6, method="iterative", tol=tol, seed=int(rng.integers(1, 2**63)))
    norm_est = grid_norm_estimate(grid, v)
    tol_eff = effective_tol(tol, norm_est)
    mine = my_residuals(h, s)
    # specwell's reported residuals are the true absolute ones (up to round-off in H·ψ).
    np.testing.assert_allclose(s.residuals, mine, rtol=0, atol=16 * EPS * norm_est)
    assert np.all(mine <= tol_eff * np.maximum(1.0, np.abs(s.energies)) + 16 * EPS * norm_est), (mine, tol_eff)
    # Orthonormal vectors.
    assert np.abs(s.vectors @ s.vectors.T - np.eye(6)).max() < 1e-10
    if tol >= 1e-8:
        # Bauer-Fike/Weyl: a loose tolerance still brackets the exact energies (dense reference
        # on a smaller grid is not the same operator, so use the residual bound on a re-solve
        # at the default tolerance instead).
        ref = h.solve(6, method="iterative", tol=1e-10)
        assert np.all(np.abs(s.energies - ref.energies) <= mine + my_residuals(h, ref) + 1e-12)


# --------------------------------------------------------------------------- 4. ConvergenceError


def random_start(count, n, seed=7):
    """An explicit random start block (skips the coarse-grid start, whose interpolated
    vectors can already meet the tolerance on a smooth problem)."""
    return np.random.default_rng(seed).standard_normal((count, n))


@pytest.fixture(scope="module")
def convergence_case():
    n = 2048
    grid = sw.FourierGrid(-10.0, 10.0, n)
    v = 0.5 * grid.x**2
    return grid, v


def test_convergence_error_when_max_iter_too_small(convergence_case):
    grid, v = convergence_case
    h = sw.Hamiltonian(grid, v)
    count, max_iter = 4, 3
    with pytest.raises(sw.ConvergenceError) as info:
        h.solve(count, method="iterative", max_iter=max_iter, initial=random_start(count, grid.size))
    e = info.value
    assert isinstance(e, RuntimeError)
    assert issubclass(sw.ConvergenceError, RuntimeError)
    assert "max_iter" in str(e)
    assert e.iterations == max_iter
    energies = np.asarray(e.energies, dtype=float)
    residuals = np.asarray(e.residuals, dtype=float)
    assert energies.shape == (count,) and residuals.shape == (count,)
    assert np.all(np.isfinite(energies)) and np.all(np.isfinite(residuals))
    assert np.all(np.diff(energies) >= 0)
    assert np.all(residuals >= 0)
    # Courant-Fischer: the k-th Rayleigh-Ritz value is an upper bound of the k-th eigenvalue;
    # exact values (n + 1/2) for ω = 1 (Griffiths §2.3; the box ±10 and dx ≈ 0.01 make the
    # discrete operator exact to far below the slack).
    exact = np.arange(count) + 0.5
    assert np.all(energies >= exact - 1e-9)
    # Really unconverged: the worst residual is above the effective tolerance, in either
    # the absolute or the relative sense.
    tol_eff = effective_tol(1e-10, grid_norm_estimate(grid, v))
    assert residuals.max() > tol_eff * max(1.0, np.abs(energies).max())
    # The same call with enough iterations succeeds and lies below the estimates.
    s = h.solve(count, method="iterative")
    assert np.all(s.energies <= energies + 1e-12)


def test_convergence_error_from_max_iter_one(convergence_case):
    grid, v = convergence_case
    h = sw.Hamiltonian(grid, v)
    with pytest.raises(RuntimeError) as info:
        h.solve(2, method="iterative", max_iter=1, initial=random_start(2, grid.size))
    assert isinstance(info.value, sw.ConvergenceError)
    assert info.value.iterations == 1


def test_convergence_error_residuals_are_absolute(convergence_case):
    # H → H + c·I leaves every Krylov/Rayleigh-Ritz iterate (and the V − E weighted
    # preconditioner) unchanged, so the absolute residuals ‖Hψ − Eψ‖ of the iterate after
    # max_iter steps are the same for V and V + c; energies just shift by c.
    grid, v = convergence_case
    out = []
    for shift in (0.0, 1000.0):
        h = sw.Hamiltonian(grid, v + shift)
        with pytest.raises(sw.ConvergenceError) as info:
            h.solve(3, method="iterative", max_iter=5, initial=random_start(3, grid.size))
        out.append((np.asarray(info.value.energies) - shift, np.asarray(info.value.residuals)))
    np.testing.assert_allclose(out[0][0], out[1][0], rtol=0, atol=1e-6)  # same iterate
    np.testing.assert_allclose(out[0][1], out[1][1], rtol=1e-3)


# --------------------------------------------------------------------------- 5. warm start


def test_warm_start_fewer_iterations_same_answer():
    n = 4096
    grid = sw.FourierGrid(-12.0, 12.0, n)
    x = grid.x
    v0 = 0.5 * x**2 + 1.5 * np.exp(-(x / 0.7) ** 2)
    v1 = v0 + 1e-3 * x * np.exp(-(x**2) / 4)  # small asymmetric change
    count = 5
    prev = sw.Hamiltonian(grid, v0).solve(count, method="iterative")
    h1 = sw.Hamiltonian(grid, v1)
    cold = h1.solve(count, method="iterative", initial=random_start(count, n))
    warm = h1.solve(count, method="iterative", initial=prev)
    warm_arr = h1.solve(count, method="iterative", initial=prev.vectors)
    warm_part = h1.solve(count, method="iterative", initial=prev.vectors[:2])  # topped up randomly
    assert warm.iterations < cold.iterations, (warm.iterations, cold.iterations)
    assert warm_arr.iterations < cold.iterations
    np.testing.assert_array_equal(warm.energies, warm_arr.energies)  # same start block
    for s in (warm, warm_arr, warm_part):
        # Same answer: both satisfy the residual bound, so they agree within the sum of the
        # residuals (Weyl), and span the same subspace.
        assert np.all(np.abs(s.energies - cold.energies) <= 1e-9)
        assert sin_theta(cold.vectors, s.vectors) < 1e-6
    # Restarting from the converged answer of the same operator costs fewer steps still.
    again = h1.solve(count, method="iterative", initial=cold)
    assert again.iterations < cold.iterations
    np.testing.assert_allclose(again.energies, cold.energies, rtol=0, atol=1e-9)


# --------------------------------------------------------------------------- 6. method="auto"


def test_auto_picks_iterative_for_large_grid_small_count():
    grid = sw.FourierGrid(-20.0, 20.0, 8192)
    h = sw.Hamiltonian(grid, 0.5 * grid.x**2)
    s = h.solve(3)
    assert s.method == "iterative"
    explicit = h.solve(3, method="iterative")
    np.testing.assert_array_equal(s.energies, explicit.energies)  # same path, same seed


def test_auto_threshold_and_small_grids_are_dense():
    # Documented rule: dense up to AUTO_DENSE_MAX points.
    for n in (64, 256, AUTO_DENSE_MAX):
        grid = sw.FourierGrid(-10.0, 10.0, n)
        h = sw.Hamiltonian(grid, 0.5 * grid.x**2)
        s = h.solve(3)
        assert s.method == "dense" and s.iterations == 0, n
    grid = sw.FourierGrid(-10.0, 10.0, AUTO_DENSE_MAX + 1)
    s = sw.Hamiltonian(grid, 0.5 * grid.x**2).solve(3)
    assert s.method == "iterative"


def test_auto_dense_when_many_states_wanted():
    # count > N/4 → dense even above the size limit.
    n = 1100
    grid = sw.FourierGrid(-10.0, 10.0, n)
    h = sw.Hamiltonian(grid, 0.5 * grid.x**2)
    assert h.solve(n // 4 + 1).method == "dense"
    assert h.solve(4).method == "iterative"


def test_auto_hermite_always_dense():
    b = sw.HermiteBasis(1100)
    h = sw.Hamiltonian(b, lambda x: 0.5 * x**2)
    s = h.solve(2)
    assert s.method == "dense"
    # Hermite functions diagonalise the oscillator exactly: E_n = n + 1/2 (Griffiths §2.3).
    np.testing.assert_allclose(s.energies, [0.5, 1.5], atol=1e-9)


# --------------------------------------------------------------------------- 7. heterostructures and Hermite


def _stack():
    # Illustrative asymmetric double quantum well (not fitted to any real alloy).
    return sw.Heterostructure(
        [
            sw.Layer(12.0, 300.0, 0.092),
            sw.Layer(8.0, 0.0, 0.067),
            sw.Layer(2.0, 150.0, 0.080),
            sw.Layer(6.0, 0.0, 0.067),
            sw.Layer(12.0, 300.0, 0.092),
        ]
    )


@pytest.mark.parametrize("n,field", [(511, 0.0), (1023, 0.0), (768, 25.0)])
def test_heterostructure_iterative_matches_dense(n, field):
    # Independent construction: the dense generalized eigenproblem A c = E B c of the same
    # Galerkin matrices (checked here with scipy.linalg.eigh on H.matrix()/H.overlap_matrix()).
    from scipy.linalg import eigh

    base = _stack()
    stack = sw.Heterostructure(base.layers, field_kv_cm=field)
    grid = sw.FourierGrid(0.0, stack.total_thickness, n)
    h = sw.Hamiltonian(grid, stack, units="semiconductor")
    count = 4
    d = h.solve(count + 1, method="dense")
    it = h.solve(count, method="iterative")
    assert it.method == "iterative"
    b = h.overlap_matrix()
    if n < 1000:  # the scipy cross-check of the dense reference, on the smaller cases
        ref = eigh(h.matrix(), b, eigvals_only=True, subset_by_index=[0, count])
        np.testing.assert_allclose(d.energies, ref, rtol=1e-10)
    rel = np.abs(it.energies / d.energies[:count] - 1)
    assert rel.max() <= 1e-8, rel
    # B-orthonormal vectors (normalised wavefunctions), same subspace as dense.
    assert np.abs(it.vectors @ b @ it.vectors.T - np.eye(count)).max() < 1e-10
    sv = np.linalg.svd(d.vectors[:count] @ b @ it.vectors.T, compute_uv=False)
    assert sv.min() > 1 - 1e-8 and sv.max() < 1 + 1e-10
    # Residual rule of the generalized problem, ‖Aψ − E Bψ‖ ≤ tol_eff·max(1,|E|), recomputed here.
    mine = my_residuals(h, it, overlap=b)
    norm_est = hetero_norm_estimate(stack, grid)
    # H2M here is CODATA, the library's constant may differ in the last digits: 1 % slack.
    tol_eff = effective_tol(1e-10, norm_est) * 1.01
    assert np.all(mine <= tol_eff * np.maximum(1, np.abs(it.energies)) + 16 * EPS * norm_est)
    np.testing.assert_allclose(it.residuals, mine, rtol=1e-6, atol=16 * EPS * norm_est)


def test_heterostructure_auto_goes_iterative_on_large_grid():
    stack = _stack()
    grid = sw.FourierGrid(0.0, stack.total_thickness, 2047)
    s = sw.Hamiltonian(grid, stack, units="semiconductor").solve(2)
    assert s.method == "iterative"


def test_hermite_iterative_matches_dense():
    # Anharmonic well with a bump in a Hermite basis; dense is the reference.
    b = sw.HermiteBasis(120, center=0.2, length=0.9)
    pot = lambda x: 0.5 * x**2 + 0.05 * x**4 + 1.2 * np.exp(-((x - 0.3) ** 2))
    h = sw.Hamiltonian(b, pot)
    count = 5
    d = h.solve(count + 1, method="dense")
    assert d.method == "dense"
    it = h.solve(count, method="iterative")
    assert it.method == "iterative"
    compare_with_dense(h, it, d, count)
    norm_est = hermite_norm_estimate(b, h.potential)
    tol_eff = effective_tol(1e-10, norm_est)
    mine = my_residuals(h, it)
    assert np.all(mine <= tol_eff * np.maximum(1, np.abs(it.energies)) + 16 * EPS * norm_est)


# --------------------------------------------------------------------------- 8. position-dependent mass


@pytest.mark.parametrize("n", [768, 1024])
def test_mass_profile_iterative_matches_dense(n):
    grid = sw.FourierGrid(-10.0, 10.0, n)
    x = grid.x
    mass = 1.0 + 0.4 * np.tanh(x) + 0.2 * np.exp(-x**2)  # smooth, in [0.6, 1.6]
    v = 0.3 * x**2 - 2.0 * np.exp(-((x - 1) / 0.8) ** 2)
    h = sw.Hamiltonian(grid, v, mass=mass)
    count = 6
    d = h.solve(count + 1, method="dense")
    it = h.solve(count, method="iterative")
    compare_with_dense(h, it, d, count)
    # Independent construction of the BenDaniel-Duke operator −½ d/dx (1/m) d/dx + V on
    # the periodic grid with numpy FFT derivatives, symmetric form Dᵀ diag(1/2m) D: its
    # Rayleigh quotients at the iterative vectors reproduce the energies. (The Nyquist mode,
    # where the spectral derivative is ambiguous, carries ~nothing for smooth states.)
    k = 2 * np.pi * np.fft.fftfreq(n, d=grid.dx)
    k[n // 2] = 0.0
    deriv = lambda u: np.real(np.fft.ifft(1j * k * np.fft.fft(u)))
    for e, u in zip(it.energies, it.vectors):
        du = deriv(u)
        rq = np.sum(du**2 / (2 * mass)) + np.sum(v * u**2)
        assert abs(rq - e) < 1e-6 * max(1, abs(e))
    tol_eff = effective_tol(1e-10, grid_norm_estimate(grid, v, mass))
    assert np.all(my_residuals(h, it) <= tol_eff * np.maximum(1, np.abs(it.energies)) * (1 + 1e-3))


def test_constant_mass_array_equals_scalar_mass():
    grid = sw.FourierGrid(-12.0, 12.0, 2048)
    v = 0.5 * 1.7 * grid.x**2
    a = sw.Hamiltonian(grid, v, mass=np.full(grid.size, 1.7)).solve(4, method="iterative")
    b = sw.Hamiltonian(grid, v, mass=1.7).solve(4, method="iterative")
    np.testing.assert_allclose(a.energies, b.energies, rtol=0, atol=1e-9)
    # E_n = (n + 1/2) ω with ω = 1 here (Griffiths §2.3).
    np.testing.assert_allclose(b.energies, np.arange(4) + 0.5, atol=1e-9)


# --------------------------------------------------------------------------- 9. memory


MEMORY_SCRIPT = textwrap.dedent(
    """
    import json, resource, sys
    limit = int(sys.argv[1])
    resource.setrlimit(resource.RLIMIT_AS, (limit, limit))
    import numpy as np, specwell as sw
    n = 2**18
    grid = sw.FourierGrid(-30.0, 30.0, n)
    h = sw.Hamiltonian(grid, 0.5 * grid.x**2)
    s = h.solve(3, method="iterative")
    out = {"energies": s.energies.tolist(), "method": s.method, "shape": list(s.vectors.shape)}
    for name, call in (("dense", lambda: h.solve(3, method="dense")), ("matrix", h.matrix)):
        try:
            call()
            out[name] = "no error"
        except MemoryError as e:
            out[name] = "MemoryError: " + str(e)
    # Peak RSS of this image: VmHWM belongs to the address space made by exec, whereas
    # ru_maxrss keeps the forking parent's peak (the pytest process, GBs late in a run).
    with open("/proc/self/status") as f:
        out["maxrss_kib"] = next(int(l.split()[1]) for l in f if l.startswith("VmHWM:"))
    print(json.dumps(out))
    """
)


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="RLIMIT_AS / ru_maxrss semantics are Linux's")
def test_iterative_never_forms_dense_matrix_and_dense_refuses():
    # In a child process whose address space is capped at 4 GiB, so that any attempt to
    # allocate an N×N float64 array (N = 2^18: 512 GiB; the dense path needs 3·N²·8 B)
    # would abort the process instead of passing: the iterative path must finish, and
    # the dense path must refuse with MemoryError before allocating.
    n = 2**18
    limit = 4 * 2**30
    proc = subprocess.run(
        [sys.executable, "-c", MEMORY_SCRIPT, str(limit)],
        capture_output=True,
        text=True,
        timeout=600,
        # few malloc arenas / BLAS buffers, so the cap only bites on large arrays
        env=child_env(MALLOC_ARENA_MAX="2", OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1"),
    )
    assert proc.returncode == 0, proc.stderr[-2000:]
    out = json.loads(proc.stdout.strip().splitlines()[-1])
    assert out["method"] == "iterative" and out["shape"] == [3, n]
    # E_n = n + 1/2 (Griffiths §2.3).
    np.testing.assert_allclose(out["energies"], [0.5, 1.5, 2.5], rtol=0, atol=1e-9)
    assert out["dense"].startswith("MemoryError"), out["dense"]
    assert "`method`" in out["dense"] and "iterative" in out["dense"]
    assert out["matrix"].startswith("MemoryError"), out["matrix"]
    # Peak resident memory is O(N·count), nowhere near one N×N array (512 GiB here; the
    # 4 GiB address-space cap already proves none was allocated). Measured ~120 MiB
    # typically (ru_maxrss had reported the parent pytest's peak, up to 4.6 GiB).
    assert out["maxrss_kib"] * 1024 < 1 * 2**30


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the memory guard reads /proc/meminfo")
def test_dense_guard_in_process():
    # The guard raises before allocating (a 1.5 TiB allocation would abort the interpreter).
    grid = sw.FourierGrid(-30.0, 30.0, 2**18)
    h = sw.Hamiltonian(grid, 0.5 * grid.x**2)
    with pytest.raises(MemoryError, match="method"):
        h.solve(3, method="dense")


# --------------------------------------------------------------------------- 10. bad inputs


@pytest.fixture(scope="module")
def small_h():
    grid = sw.FourierGrid(-10.0, 10.0, 2048)
    return sw.Hamiltonian(grid, 0.5 * grid.x**2)


def test_unknown_method_lists_choices(small_h):
    with pytest.raises(ValueError) as info:
        small_h.solve(3, method="lanczos")
    msg = str(info.value)
    assert "method" in msg and "lanczos" in msg
    for choice in ("auto", "dense", "iterative"):
        assert choice in msg
    assert list(sw.METHODS) == ["auto", "dense", "iterative"]


@pytest.mark.parametrize("tol", [0.0, -1e-8, 1.0, 2.0, float("nan"), float("inf"), -float("inf")])
@pytest.mark.parametrize("method", ["iterative", "auto", "dense"])
def test_bad_tol(small_h, tol, method):
    with pytest.raises(ValueError, match="tol"):
        small_h.solve(3, method=method, tol=tol)


@pytest.mark.parametrize("max_iter", [0, -1])
def test_bad_max_iter(small_h, max_iter):
    with pytest.raises(ValueError, match="max_iter"):
        small_h.solve(3, method="iterative", max_iter=max_iter)


def _bad_initials(n):
    rng = np.random.default_rng(5)
    nan = rng.standard_normal((3, n))
    nan[1, 7] = np.nan
    inf = rng.standard_normal((3, n))
    inf[2, 0] = np.inf
    return {
        "wrong_columns": np.ones((3, n - 1)),
        "transposed": np.ones((n, 3))[:-1],
        "one_dim": np.ones(n),
        "three_dim": np.ones((1, 3, n)),
        "no_rows": np.ones((0, n)),
        "nan": nan,
        "inf": inf,
    }


@pytest.mark.parametrize("kind", list(_bad_initials(8)))
def test_bad_initial(small_h, kind):
    bad = _bad_initials(small_h.size)[kind]
    with pytest.raises(ValueError, match="initial"):
        small_h.solve(3, method="iterative", initial=bad)


def test_initial_spectrum_of_other_size(small_h):
    g = sw.FourierGrid(-10.0, 10.0, 1024)
    other = sw.Hamiltonian(g, 0.5 * g.x**2).solve(3)
    with pytest.raises(ValueError, match="initial"):
        small_h.solve(3, method="iterative", initial=other)


@pytest.mark.parametrize("count", [0, -2, 2049, 10**6])
@pytest.mark.parametrize("method", ["iterative", "auto"])
def test_bad_count(small_h, count, method):
    with pytest.raises(ValueError, match="count"):
        small_h.solve(count, method=method)


# --------------------------------------------------------------------------- 11. determinism


def test_same_seed_bit_identical():
    grid = sw.FourierGrid(-15.0, 15.0, 4096)
    x = grid.x
    h = sw.Hamiltonian(grid, 0.5 * x**2 + 2 * np.exp(-((x - 0.5) / 0.6) ** 2))
    runs = [h.solve(5, method="iterative", seed=12345) for _ in range(3)]
    for r in runs[1:]:
        assert r.energies.tobytes() == runs[0].energies.tobytes()
        assert r.vectors.tobytes() == runs[0].vectors.tobytes()
        assert r.residuals.tobytes() == runs[0].residuals.tobytes()
        assert r.iterations == runs[0].iterations
    # A rebuilt, equal Hamiltonian gives the same bits too.
    h2 = sw.Hamiltonian(grid, 0.5 * x**2 + 2 * np.exp(-((x - 0.5) / 0.6) ** 2))
    assert h2.solve(5, method="iterative", seed=12345).energies.tobytes() == runs[0].energies.tobytes()
    # Another seed: a different start, the same answer within the residual bound.
    other = h.solve(5, method="iterative", seed=999)
    np.testing.assert_allclose(other.energies, runs[0].energies, rtol=0, atol=1e-9)


THREADS_SCRIPT = textwrap.dedent(
    """
    import numpy as np, specwell as sw
    grid = sw.FourierGrid(-25.0, 25.0, 2**16)
    x = grid.x
    s = sw.Hamiltonian(grid, 0.5 * x**2 + np.exp(-x**2)).solve(4, method="iterative", seed=7)
    print(s.energies.tobytes().hex(), s.iterations)
    """
)


def test_bit_identical_across_thread_counts():
    # Above the parallel threshold the tall-skinny reductions run on rayon threads; the code
    # documents a fixed summation order, so a one-thread child and this process's default
    # pool agree bitwise.
    proc = subprocess.run(
        [sys.executable, "-c", THREADS_SCRIPT],
        capture_output=True,
        text=True,
        env=child_env(RAYON_NUM_THREADS="1"),
        timeout=600,
    )
    assert proc.returncode == 0, proc.stderr[-2000:]
    grid = sw.FourierGrid(-25.0, 25.0, 2**16)
    x = grid.x
    s = sw.Hamiltonian(grid, 0.5 * x**2 + np.exp(-x**2)).solve(4, method="iterative", seed=7)
    assert proc.stdout.strip() == f"{s.energies.tobytes().hex()} {s.iterations}"


# --------------------------------------------------------------------------- 7. coarse-grid start


@pytest.mark.parametrize(
    "name, potential, mass",
    [
        ("smooth double well", lambda x: 0.05 * (x**2 - 9.0) ** 2 - 2.0, 1.0),
        ("finite square well (rough)", lambda x: np.where(np.abs(x) < 3.0, 0.0, 5.0), 1.0),
        ("mass profile", lambda x: 0.5 * x**2, lambda x: 1.0 + 0.5 * np.exp(-(x / 2.0) ** 2)),
    ],
)
def test_coarse_grid_start_gives_the_dense_answer(name, potential, mass):
    # Without `initial`, a large grid starts from the same problem solved on a coarser
    # grid of the same box. Whatever that start is worth, the result must be the dense
    # answer: Weyl (|ΔE| ≤ residual) and Davis-Kahan (subspace angle ≤ ‖R‖_F / gap).
    n, count = 2048, 6
    grid = sw.FourierGrid(-20.0, 20.0, n)
    h = sw.Hamiltonian(grid, potential, mass=mass(grid.x) if callable(mass) else mass)
    s = h.solve(count, method="iterative")
    res = my_residuals(h, s)
    w, v = scipy.linalg.eigh(h.matrix(), subset_by_index=[0, count])
    assert np.all(np.abs(s.energies - w[:count]) <= res + 1e-12), name
    gap = w[count] - w[count - 1]
    assert sin_theta(v[:, :count].T, s.vectors) <= np.sqrt(np.sum(res**2)) / gap + 1e-10, name
    # The documented tolerance holds however few iterations were needed.
    tol_eff = effective_tol(1e-10, grid_norm_estimate(grid, h.potential, mass(grid.x) if callable(mass) else mass))
    assert np.all(res <= tol_eff * np.maximum(1.0, np.abs(s.energies)) + 16 * EPS * grid_norm_estimate(grid, h.potential)), name
