"""Wavepacket propagation: SplitStep, Run, ground_states and the state helpers.

Every physics check names its reference next to it: a textbook result, or an
independent construction with numpy/scipy on the *same* grid Hamiltonian
(``Hamiltonian(grid, V).matrix()`` acts on ψ(x_j)·√dx, i.e. the same linear map on
the samples ψ(x_j), so exp(−iHt) built with scipy is the exact grid propagator that
the split-step method approximates).  No expected value in this file comes from
specwell itself.
"""

import math
import pickle
import sys
import types

import numpy as np
import pytest
import scipy.linalg as sla
from scipy.integrate import solve_ivp
from scipy.signal import find_peaks

import specwell as sw

# CODATA 2022 (Mohr et al., Rev. Mod. Phys. 97, 025002 (2025)):
# ħ = 6.582119569e-16 eV s = 658.2119569 meV fs; ħ²/(2 m_e) = 38.0998211 meV nm².
HBAR_MEV_FS = 658.2119569
HBAR2_2ME_MEV_NM2 = 38.0998211


# --------------------------------------------------------------------------- helpers


def l2(psi, dx):
    """Discrete L² norm (Σ|ψ_j|² dx)^{1/2}."""
    return np.sqrt(np.sum(np.abs(psi) ** 2, axis=-1) * dx)


def moments(states, x, dx):
    """⟨x⟩ and σ_x of each row of `states`, computed with numpy from the samples."""
    p = np.abs(states) ** 2 * dx
    n = p.sum(axis=-1)
    mx = (p * x).sum(axis=-1) / n
    var = (p * x**2).sum(axis=-1) / n - mx**2
    return mx, np.sqrt(var)


def mean_p_fft(states, k, hbar=1.0):
    """ħ⟨k⟩ of each row from numpy's FFT (k = grid.k, numpy order)."""
    a = np.abs(np.fft.fft(states, axis=-1)) ** 2
    return hbar * (a * k).sum(axis=-1) / a.sum(axis=-1)


def exact_propagator(h, t):
    """exp(−iHt) (ħ = 1) of the real symmetric grid matrix via scipy.linalg.eigh."""
    e, u = sla.eigh(h)
    return (u * np.exp(-1j * e * t)) @ u.T


def observed_orders(errors):
    """log2 of successive error ratios for step sizes halved each time."""
    errors = np.asarray(errors)
    return np.log2(errors[:-1] / errors[1:])


# Asymmetric double well used by several tests (smooth, bounded by the quartic term).
L_DW, N_DW, M_DW = 6.0, 64, 1.3


def dw_potential(x):
    return 0.05 * x**4 - 0.5 * x**2 + 0.2 * x


def dw_force(x):
    """−V'(x) of `dw_potential`."""
    return -(0.2 * x**3 - 1.0 * x + 0.2)


@pytest.fixture(scope="module")
def dw():
    grid = sw.FourierGrid(-L_DW, L_DW, N_DW)
    v = dw_potential(grid.x)
    h = sw.Hamiltonian(grid, v, mass=M_DW).matrix()
    psi0 = sw.gaussian_packet(grid, -1.0, 0.7, 0.6)
    return types.SimpleNamespace(grid=grid, x=grid.x, dx=grid.dx, v=v, h=h, psi0=psi0)


# --------------------------------------------------------------------------- 1. free Gaussian


def test_free_gaussian_spreading_natural_units():
    # Free Gaussian packet: σ(t) = σ0 sqrt(1 + (ħt/(2mσ0²))²), ⟨x⟩ = x0 + p0 t/m
    # (Griffiths, Introduction to QM, 2nd ed. 2005, Problem 2.43; Cohen-Tannoudji,
    # Diu & Laloë 1977, Complement G_I). m ≠ 1 so that the mass enters.
    m, s0, x0, p0 = 2.5, 0.8, -10.0, 1.2
    grid = sw.FourierGrid(-40.0, 40.0, 512)
    psi0 = sw.gaussian_packet(grid, x0, p0, s0)
    dt, steps = 0.05, 240
    run = sw.SplitStep(grid, np.zeros(grid.points), mass=m, dt=dt).run(psi0, steps, record_every=10)
    mx, sigma = moments(run.states, grid.x, grid.dx)
    t = run.times
    expected = s0 * np.sqrt(1.0 + (t / (2.0 * m * s0**2)) ** 2)
    assert sigma[-1] > 3.0 * s0  # the packet really spread
    np.testing.assert_allclose(sigma, expected, rtol=1e-9)
    np.testing.assert_allclose(mx, x0 + p0 * t / m, atol=1e-9)
    np.testing.assert_allclose(run.mean_x, mx, atol=1e-12)
    # Free particle: ⟨p⟩ is conserved (Ehrenfest with V = 0).
    np.testing.assert_allclose(run.mean_p, p0, atol=1e-9)


def test_free_gaussian_spreading_semiconductor_units():
    # Same textbook law in nm/meV/fs with an effective mass (GaAs-like m = 0.067 m_e):
    # ħt/(2mσ0²) = (ħ²/2m_e)/m · t/(ħσ0²), constants from CODATA 2022 (module header).
    m, s0 = 0.067, 4.0
    grid = sw.FourierGrid(-200.0, 200.0, 512)
    psi0 = sw.gaussian_packet(grid, -50.0, 0.0, s0, units="semiconductor")
    run = sw.SplitStep(grid, np.zeros(grid.points), mass=m, dt=0.5, units="semiconductor").run(
        psi0, 200, record_every=20
    )
    _, sigma = moments(run.states, grid.x, grid.dx)
    rate = HBAR2_2ME_MEV_NM2 / m / (HBAR_MEV_FS * s0**2)  # 1/fs
    expected = s0 * np.sqrt(1.0 + (rate * run.times) ** 2)
    assert sigma[-1] > 3.0 * s0
    np.testing.assert_allclose(sigma, expected, rtol=1e-7)  # CODATA constants to ~1e-9


# --------------------------------------------------------------------------- 2. coherent state


@pytest.mark.parametrize("order, dt, tol", [(2, 0.002, 1e-4), (4, 0.02, 1e-5)])
def test_coherent_state_in_harmonic_well(order, dt, tol):
    # Displaced ground state of V = mω²x²/2 (σ0 = sqrt(ħ/2mω)) is a coherent state:
    # ⟨x⟩ = x0 cos ωt, ⟨p⟩ = −mωx0 sin ωt, σ_x = σ0 at all times
    # (Cohen-Tannoudji, Diu & Laloë 1977, Vol. 1, Complement G_V, quasi-classical states).
    m, w, x0 = 2.0, 1.5, 2.0
    grid = sw.FourierGrid(-10.0, 10.0, 128)
    x = grid.x
    s0 = np.sqrt(1.0 / (2.0 * m * w))
    psi0 = sw.gaussian_packet(grid, x0, 0.0, s0)
    steps = int(round(2 * (2 * np.pi / w) / dt))  # two periods
    run = sw.SplitStep(grid, 0.5 * m * w**2 * x**2, mass=m, dt=dt, order=order).run(
        psi0, steps, record_every=steps // 40
    )
    t = run.times
    mx, sigma = moments(run.states, x, grid.dx)
    np.testing.assert_allclose(run.mean_x, x0 * np.cos(w * t), atol=tol * x0)
    np.testing.assert_allclose(run.mean_p, -m * w * x0 * np.sin(w * t), atol=tol * m * w * x0)
    np.testing.assert_allclose(sigma, s0, rtol=tol)
    # Library observables agree with numpy moments of the recorded states.
    np.testing.assert_allclose(run.mean_x, mx, atol=1e-12)
    np.testing.assert_allclose(run.mean_p, mean_p_fft(run.states, grid.k), atol=1e-12)


# --------------------------------------------------------------------------- 3. convergence order


@pytest.mark.parametrize("order, steps_list", [(2, [20, 40, 80, 160, 320]), (4, [20, 40, 80, 160, 320])])
def test_global_order_against_exact_propagation(dw, order, steps_list):
    # Reference: ψ(T) = Σ c_n e^{−iE_n T} φ_n from scipy.linalg.eigh of the same grid
    # matrix. Strang splitting has global error O(dt²) (Strang 1968, SIAM J. Numer.
    # Anal. 5, 506); the Yoshida (1990, Phys. Lett. A 150, 262) triple jump O(dt⁴).
    T = 2.0
    exact = exact_propagator(dw.h, T) @ dw.psi0
    errors = []
    for steps in steps_list:
        prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=T / steps, order=order)
        run = prop.run(dw.psi0, steps, record_every=steps)
        assert run.times[-1] == pytest.approx(T, rel=1e-14)
        errors.append(l2(run.states[-1] - exact, dw.dx))
    orders = observed_orders(errors)
    assert np.all(np.abs(orders - order) < 0.3), (errors, orders)
    assert errors[-1] < (1e-5 if order == 2 else 1e-9)


@pytest.mark.parametrize("order", [2, 4])
def test_time_reversal(dw, order):
    # Strang and Yoshida compositions are symmetric: S(−dt) = S(dt)^{-1}
    # (Hairer, Lubich & Wanner, Geometric Numerical Integration 2006, Sec. II.3 / V.1),
    # so propagating back with −dt restores ψ0 up to round-off.
    steps, dt = 300, 0.01
    fwd = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt, order=order).run(dw.psi0, steps, record_every=steps)
    back = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=-dt, order=order).run(fwd.states[-1], steps, record_every=steps)
    assert l2(fwd.states[-1] - dw.psi0, dw.dx) > 0.1  # it did move
    assert l2(back.states[-1] - dw.psi0, dw.dx) < 1e-11
    assert back.times[-1] == pytest.approx(-steps * dt)


# --------------------------------------------------------------------------- 4. conservation


@pytest.mark.parametrize("order", [2, 4])
def test_norm_and_energy_conservation_long_run(order):
    # Each factor of a split step is unitary (unimodular phases, unitary DFT), so the
    # norm is conserved up to round-off; a symmetric splitting is exactly exp(−iH̃dt)
    # with H̃ = H + O(dt^order), so ⟨H⟩ stays within O(dt^order) of its initial value
    # with no secular drift (Hairer, Lubich & Wanner 2006, Ch. IX).
    grid = sw.FourierGrid(-10.0, 10.0, 256)
    x = grid.x
    v = dw_potential(x)
    psi0 = sw.gaussian_packet(grid, -1.5, 0.5, 0.7)
    steps, every, dt = 10**5, 2000, 0.01
    run = sw.SplitStep(grid, v, dt=dt, order=order).run(psi0, steps, record_every=every)
    assert len(run) == steps // every + 1
    assert run.steps_done == steps
    assert np.max(np.abs(run.norm - 1.0)) <= 1e-10
    np.testing.assert_allclose(l2(run.states, grid.dx) ** 2, run.norm, rtol=1e-13)
    # Energy reported = ψ†Hψ dx / norm with the grid matrix (independent construction).
    h = sw.Hamiltonian(grid, v).matrix()
    e_ind = np.einsum("ij,jk,ik->i", run.states.conj(), h, run.states).real * grid.dx / run.norm
    np.testing.assert_allclose(run.energy, e_ind, atol=1e-12)
    drift = np.abs(run.energy - run.energy[0])
    # small relative to |E0| (the dt^order scaling is checked in the next test)
    assert drift.max() < (1e-4 if order == 2 else 1e-6) * abs(run.energy[0]), drift.max()
    half = len(drift) // 2
    assert drift[half:].max() < 3 * drift[:half].max() + 1e-12  # no secular growth
    # Bound state: stays in the double well (V(±5) ≈ 20 ≫ E ≈ −0.7; only a tunnelling tail outside).
    inside = np.sum(np.abs(run.states[:, np.abs(x) < 5.0]) ** 2, axis=1) * grid.dx
    assert np.all(inside > 1.0 - 1e-5)


@pytest.mark.parametrize("order", [2, 4])
def test_energy_error_scales_as_dt_to_the_order(order):
    # Same reference (backward error analysis, Hairer, Lubich & Wanner 2006, Ch. IX):
    # max_t |⟨H⟩(t) − ⟨H⟩(0)| = O(dt^order); measured on the same record times for dt, dt/2.
    grid = sw.FourierGrid(-10.0, 10.0, 256)
    v = dw_potential(grid.x)
    psi0 = sw.gaussian_packet(grid, -1.5, 0.5, 0.7)
    dev = []
    for dt in (0.02, 0.01):
        run = sw.SplitStep(grid, v, dt=dt, order=order).run(psi0, int(round(50 / dt)), record_every=int(round(0.5 / dt)))
        dev.append(np.max(np.abs(run.energy - run.energy[0])))
    assert abs(np.log2(dev[0] / dev[1]) - order) < 0.3, dev


def test_record_layout(dw):
    # Record 0 is ψ0 (not rescaled), then every record_every steps, final always recorded.
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01)
    run = prop.run(dw.psi0, 10, record_every=3)
    assert run.record_steps == [0, 3, 6, 9, 10]
    np.testing.assert_allclose(run.times, 0.01 * np.array([0, 3, 6, 9, 10]), rtol=0, atol=1e-15)
    assert run.states.shape == (5, N_DW) and run.states.dtype == np.complex128
    np.testing.assert_array_equal(run.states[0], dw.psi0)
    np.testing.assert_array_equal(run.x, dw.x)
    assert run.absorbed_norm is None
    # Autocorrelation ⟨ψ(0)|ψ(t)⟩ = Σ conj(ψ0) ψ dx (numpy).
    ac = run.states @ dw.psi0.conj() * dw.dx
    np.testing.assert_allclose(run.autocorrelation, ac, atol=1e-14)
    # The last interval is shorter and equals a direct 10-step run's final state.
    direct = prop.run(dw.psi0, 10, record_every=10)
    np.testing.assert_allclose(run.states[-1], direct.states[-1], atol=1e-13)
    # steps = 0: only the initial record.
    zero = prop.run(dw.psi0, 0)
    assert len(zero) == 1 and zero.steps_done == 0
    assert zero.autocorrelation[0] == pytest.approx(1.0, abs=1e-14)


def test_pickle_roundtrip(dw):
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01, order=4)
    clone = pickle.loads(pickle.dumps(prop))
    a = prop.run(dw.psi0, 25, record_every=5)
    b = clone.run(dw.psi0, 25, record_every=5)
    np.testing.assert_array_equal(a.states, b.states)


# --------------------------------------------------------------------------- 5. absorbers


@pytest.fixture(scope="module")
def outgoing():
    # A packet with k0 = 3 heading right in a free box [−40, 40); both box edges absorb.
    L, n, k0, width = 40.0, 512, 3.0, 12.0
    grid = sw.FourierGrid(-L, L, n)
    x = grid.x
    psi0 = sw.gaussian_packet(grid, -5.0, k0, 2.0)
    xa = L - width
    # Quadratic CAP W(x) ≥ 0 in the same layer (Riss & Meyer 1993, J. Phys. B 26, 4503),
    # strength of order the packet energy k0²/2 at the box edge.
    cap = np.where(np.abs(x) > xa, k0**2 * ((np.abs(x) - xa) / width) ** 2, 0.0)
    dt = 0.02
    # After T = 2L/k0 an unabsorbed packet would be back in the interior (reflected from
    # the right edge, or wrapped round the periodic box): the control run checks that.
    steps = int(np.ceil(2 * L / k0 / dt))
    return types.SimpleNamespace(grid=grid, x=x, psi0=psi0, xa=xa, width=width, cap=cap, dt=dt, steps=steps)


@pytest.mark.parametrize("kind", ["mask", "cap"])
def test_absorber_removes_outgoing_packet(outgoing, kind):
    o = outgoing
    kw = {"absorber_width": o.width} if kind == "mask" else {"absorber_potential": o.cap}
    run = sw.SplitStep(o.grid, np.zeros(o.grid.points), dt=o.dt, **kw).run(o.psi0, o.steps, record_every=25)
    interior = np.abs(o.x) < o.xa
    final = run.states[-1]
    remaining = np.sum(np.abs(final) ** 2) * o.grid.dx
    reflected = np.sum(np.abs(final[interior]) ** 2) * o.grid.dx
    assert remaining <= 0.01  # ≥ 99 % absorbed
    assert reflected <= 1e-3  # ≤ 1e-3 back in the interior
    # The reported absorbed fraction is 1 − norm(end)/norm(0), with the norm from numpy.
    n_np = l2(run.states, o.grid.dx) ** 2
    np.testing.assert_allclose(run.norm, n_np, rtol=1e-12, atol=1e-300)
    assert run.absorbed_norm == pytest.approx(1.0 - n_np[-1] / n_np[0], abs=1e-12)
    assert run.absorbed_norm >= 0.99
    # An absorber can only remove norm.
    assert np.all(np.diff(run.norm) <= 1e-13)


def test_absorber_control_without_absorber(outgoing):
    # Control for the test above: without an absorber the packet is back in the interior
    # at the final time (so "reflected ≤ 1e-3" is a meaningful measurement).
    o = outgoing
    run = sw.SplitStep(o.grid, np.zeros(o.grid.points), dt=o.dt).run(o.psi0, o.steps, record_every=o.steps)
    interior = np.abs(o.x) < o.xa
    assert np.sum(np.abs(run.states[-1][interior]) ** 2) * o.grid.dx > 0.9
    assert run.absorbed_norm is None


# --------------------------------------------------------------------------- 6. Ehrenfest


def test_ehrenfest_theorem_anharmonic(dw):
    # d⟨p⟩/dt = −⟨V'(x)⟩ (Ehrenfest 1927, Z. Phys. 45, 455; Griffiths 2005, Eq. 1.38).
    # ⟨V'⟩ from the recorded states with the analytic V'; d⟨p⟩/dt by central
    # differences of mean_p (error O(dt²)).
    dt, steps = 0.005, 600
    run = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt).run(dw.psi0, steps, record_every=1)
    p = np.abs(run.states) ** 2
    force = (p * dw_force(dw.x)).sum(axis=1) / p.sum(axis=1)
    dpdt = (run.mean_p[2:] - run.mean_p[:-2]) / (2 * dt)
    scale = np.max(np.abs(force))
    assert scale > 0.1  # non-trivial, anharmonic force
    np.testing.assert_allclose(dpdt, force[1:-1], atol=1e-4 * scale)
    # And d⟨x⟩/dt = ⟨p⟩/m (same reference).
    dxdt = (run.mean_x[2:] - run.mean_x[:-2]) / (2 * dt)
    np.testing.assert_allclose(dxdt, run.mean_p[1:-1] / M_DW, atol=1e-4 * np.max(np.abs(run.mean_p)))


# --------------------------------------------------------------------------- 7. drive


def drive_f(t):
    return 0.8 * np.sin(2.1 * np.asarray(t) + 0.3)


def driven_reference(dw, T):
    # Exact grid dynamics iψ' = (H + f(t)·diag(x))ψ with scipy's DOP853 at tight tolerance.
    x = dw.x
    sol = solve_ivp(lambda t, y: -1j * (dw.h @ y + drive_f(t) * x * y), (0.0, T), dw.psi0,
                    method="DOP853", rtol=1e-13, atol=1e-13)
    assert sol.success
    return sol.y[:, -1]


def test_drive_callable_equals_midpoint_samples_order2(dw):
    # For order 2 the callable is sampled at t_n + dt/2, i.e. exactly the per-step samples.
    dt, steps = 0.01, 150
    a = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt, drive=drive_f, drive_potential=dw.x)
    samples = drive_f((np.arange(steps) + 0.5) * dt)
    b = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt, drive=samples, drive_potential=dw.x)
    ra, rb = a.run(dw.psi0, steps, record_every=10), b.run(dw.psi0, steps, record_every=10)
    np.testing.assert_array_equal(ra.states, rb.states)
    np.testing.assert_array_equal(ra.energy, rb.energy)
    np.testing.assert_allclose(a.drive_sample_times(steps), (np.arange(steps) + 0.5) * dt, rtol=1e-14)
    # A scalar-only callable (math.sin rejects arrays) raises its own error, with a note
    # saying the drive is called once on the array of times; np.vectorize makes it work.
    scalar = lambda t: 0.8 * math.sin(2.1 * t + 0.3)
    c = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt, drive=scalar, drive_potential=dw.x)
    with pytest.raises(TypeError) as info:
        c.run(dw.psi0, steps, record_every=10)
    assert any("vectorised" in n for n in getattr(info.value, "__notes__", []))
    c = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt, drive=np.vectorize(scalar), drive_potential=dw.x)
    np.testing.assert_allclose(c.run(dw.psi0, steps, record_every=10).states, ra.states, atol=1e-14)
    # Samples longer than needed are fine.
    d = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt, drive=np.concatenate([samples, [9.0, 9.0]]),
                     drive_potential=dw.x)
    np.testing.assert_array_equal(d.run(dw.psi0, steps, record_every=10).states, ra.states)


def test_drive_sample_times_order4(dw):
    # Yoshida (1990) weights w1 = 1/(2 − 2^{1/3}), w0 = 1 − 2w1: sub-step midpoints
    # w1/2, w1 + w0/2 = 1/2, 1 − w1/2 (fractions of dt).
    w1 = 1.0 / (2.0 - 2.0 ** (1.0 / 3.0))
    dt = 0.1
    prop = sw.SplitStep(dw.grid, dw.v, dt=dt, order=4, drive=drive_f, drive_potential=dw.x)
    t = prop.drive_sample_times(2)
    expected = dt * np.array([w1 / 2, 0.5, 1 - w1 / 2, 1 + w1 / 2, 1.5, 2 - w1 / 2])
    np.testing.assert_allclose(t, expected, rtol=1e-14)


@pytest.mark.parametrize("order, kind, expected_order", [(2, "callable", 2), (4, "callable", 4), (4, "samples", 2)])
def test_drive_order_against_solve_ivp(dw, order, kind, expected_order):
    # Reference: scipy solve_ivp on the grid matrix. Each Strang sub-step with f at its
    # midpoint is time-symmetric, so the Yoshida composition keeps order 4 for a
    # callable drive; per-step samples freeze f at t_n + dt/2 for all three sub-steps,
    # a second-order approximation in the drive (module docs of propagate.rs).
    T = 2.0
    exact = driven_reference(dw, T)
    errors = []
    for steps in [20, 40, 80, 160]:
        dt = T / steps
        drive = drive_f if kind == "callable" else drive_f((np.arange(steps) + 0.5) * dt)
        prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt, order=order, drive=drive, drive_potential=dw.x)
        errors.append(l2(prop.run(dw.psi0, steps, record_every=steps).states[-1] - exact, dw.dx))
    orders = observed_orders(errors)
    assert np.all(np.abs(orders - expected_order) < 0.3), (errors, orders)
    assert errors[-1] < 1e-4


@pytest.mark.parametrize("order", [2, 4])
def test_driven_energy_uses_instantaneous_potential(dw, order):
    # Run.energy = ⟨T⟩ + ⟨V0⟩ + f(t)⟨x⟩ at the record time; for a linear f the documented
    # linear interpolation between samples is exact. Reference: grid matrix with numpy.
    f = lambda t: 0.3 * np.asarray(t) - 0.2  # noqa: E731
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01, order=order, drive=f, drive_potential=dw.x)
    run = prop.run(dw.psi0, 57, record_every=5)
    s, n = run.states, run.norm
    e = np.einsum("ij,jk,ik->i", s.conj(), dw.h, s).real * dw.dx / n
    e += f(run.times) * (np.abs(s) ** 2 * dw.x).sum(axis=1) * dw.dx / n
    np.testing.assert_allclose(run.energy, e, atol=1e-12)


# --------------------------------------------------------------------------- 8. imaginary time


def test_ground_states_match_eigh(dw):
    # Reference: scipy.linalg.eigh of the same grid matrix, and Hamiltonian.solve.
    count = 4
    e_ref, u_ref = sla.eigh(dw.h)
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01, imaginary_time=True)
    energies, states = prop.ground_states(count)
    assert states.shape == (count, N_DW)
    np.testing.assert_allclose(energies, e_ref[:count], atol=1e-8)
    spec = sw.Hamiltonian(dw.grid, dw.v, mass=M_DW).solve(count)
    np.testing.assert_allclose(energies, spec.energies, atol=1e-8)
    # States: orthonormal in Σ conj(ψ_i) ψ_j dx, and each parallel to the eigh vector
    # (fixed point of the split operator, O(dτ²) from the grid eigenvector).
    gram = states.conj() @ states.T * dw.dx
    np.testing.assert_allclose(gram, np.eye(count), atol=1e-10)
    overlap = np.abs(u_ref[:, :count].T @ states.T * np.sqrt(dw.dx)).diagonal()
    np.testing.assert_allclose(overlap, 1.0, atol=1e-4)


def test_ground_state_energy_error_is_fourth_order_in_dtau(dw):
    # The fixed point is O(dτ²) from the eigenvector; its Rayleigh quotient with the exact
    # grid H is then O(dτ⁴) (Rayleigh-quotient error is quadratic in the vector error,
    # e.g. Parlett, The Symmetric Eigenvalue Problem 1998; documented in propagate.rs).
    e_ref = sla.eigh(dw.h, eigvals_only=True)[:2]
    errs = []
    for dtau in (0.04, 0.02):
        prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dtau, imaginary_time=True)
        errs.append(np.max(np.abs(prop.ground_states(2, tol=1e-12)[0] - e_ref)))
    assert abs(np.log2(errs[0] / errs[1]) - 4.0) < 0.3, errs


def test_imaginary_time_run_relaxes_to_ground_state(dw):
    # exp(−Hτ)ψ/‖…‖ → ground state for τ ≫ 1/(E1 − E0) (spectral decomposition);
    # reference energy from scipy eigh. Runs renormalise every record.
    e0 = sla.eigh(dw.h, eigvals_only=True)[0]
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01, imaginary_time=True)
    run = prop.run(2.0 * dw.psi0, 3000, record_every=500)
    np.testing.assert_allclose(run.norm, 1.0, atol=1e-12)
    assert np.all(np.diff(run.energy) <= 1e-12)  # energy decreases monotonically
    assert run.energy[-1] == pytest.approx(e0, abs=1e-6)


# --------------------------------------------------------------------------- 9. spectrum


def test_autocorrelation_spectrum_peaks_at_eigenenergies(dw):
    # C(t) = Σ|c_n|² e^{−iE_n t}: its Fourier transform peaks at the E_n present in ψ(0)
    # with weights |c_n|² (Feit, Fleck & Steiger 1982, J. Comput. Phys. 47, 412, Sec. 3),
    # resolved to ~2πħ/T. E_n from scipy eigh of the grid matrix.
    e_ref = sla.eigh(dw.h, eigvals_only=True)
    spec = sw.Hamiltonian(dw.grid, dw.v, mass=M_DW).solve(5)
    levels, coefs = (0, 1, 3), np.array([1.0, 0.8j, 0.6])
    psi0 = sw.superposition([sw.eigenstate(spec, n, dw.grid) for n in levels], coefs, dw.grid)
    dt, T = 0.01, 150.0
    run = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=dt).run(psi0, int(round(T / dt)), record_every=10)
    energies, intensity = sw.autocorrelation_spectrum(run.times, run.autocorrelation, energy_range=(-3.0, 3.0))
    peaks, _ = find_peaks(intensity, height=0.05 * intensity.max())
    assert len(peaks) == len(levels)
    resolution = 2 * np.pi / T
    np.testing.assert_allclose(np.sort(energies[peaks]), e_ref[list(levels)], atol=resolution)
    weights = np.abs(coefs) ** 2
    np.testing.assert_allclose(intensity[peaks] / intensity[peaks].max(), weights / weights.max(), atol=0.05)


# --------------------------------------------------------------------------- 10. run_many


@pytest.mark.parametrize("extra", [{}, {"absorber_width": 1.5, "drive": drive_f}])
def test_run_many_equals_run(dw, extra):
    kw = dict(extra)
    if "drive" in kw:
        kw["drive_potential"] = dw.x
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01, order=4, **kw)
    psi0s = np.stack([sw.gaussian_packet(dw.grid, x0, p0, 0.5) for x0, p0 in [(-2, 0), (-1, 1), (0.5, -0.5), (2, 2)]])
    many = prop.run_many(psi0s, 83, record_every=10)
    assert len(many) == len(psi0s)
    for psi0, r_many in zip(psi0s, many):
        r = prop.run(psi0, 83, record_every=10)
        for attr in ("times", "states", "norm", "mean_x", "mean_p", "energy", "autocorrelation"):
            np.testing.assert_array_equal(getattr(r_many, attr), getattr(r, attr), err_msg=attr)
        assert r_many.record_steps == r.record_steps
        assert r_many.absorbed_norm == r.absorbed_norm
        assert r_many.steps_done == r.steps_done == 83


# --------------------------------------------------------------------------- 11. bad input


@pytest.fixture
def small():
    grid = sw.FourierGrid(-5.0, 5.0, 16)
    return types.SimpleNamespace(grid=grid, v=np.zeros(16), psi=sw.gaussian_packet(grid, 0.0, 0.0, 1.0))


@pytest.mark.parametrize(
    "kwargs, exc, pattern",
    [
        ({"dt": float("nan")}, ValueError, r"`dt`"),
        ({"dt": 0.0}, ValueError, r"`dt`"),
        ({"dt": float("inf")}, ValueError, r"`dt`"),
        ({"dt": None}, TypeError, r"`dt`.*required"),
        ({"dt": 0.1, "order": 3}, ValueError, r"`order`"),
        ({"dt": 0.1, "mass": 0.0}, ValueError, r"`mass`"),
        ({"dt": 0.1, "drive": drive_f}, ValueError, r"`drive_potential`"),
        ({"dt": 0.1, "drive_potential": np.ones(16)}, ValueError, r"`drive`"),
        ({"dt": 0.1, "absorber_width": 1.0, "absorber_potential": np.ones(16)}, ValueError,
         r"`absorber_width`.*`absorber_potential`"),
        ({"dt": 0.1, "absorber_potential": np.ones(15)}, ValueError, r"`absorber_potential`.*16"),
        ({"dt": 0.1, "imaginary_time": True, "order": 4}, ValueError, r"`order`.*imaginary"),
        ({"dt": -0.1, "imaginary_time": True}, ValueError, r"`dt`"),
        ({"dt": 0.1, "units": "furlongs"}, ValueError, r"`units`"),
    ],
)
def test_bad_constructor_arguments(small, kwargs, exc, pattern):
    with pytest.raises(exc, match=pattern):
        sw.SplitStep(small.grid, small.v, **kwargs)


def test_grid_must_be_fourier_grid():
    with pytest.raises(TypeError, match=r"`grid`.*FourierGrid"):
        sw.SplitStep(sw.HermiteBasis(10), np.zeros(20), dt=0.1)


def test_absorber_width_too_large_refused(small):
    # half the box is 5; the refusal itself works (argument naming: see the xfail below)
    with pytest.raises(ValueError, match=r"half the box"):
        sw.SplitStep(small.grid, small.v, dt=0.1, absorber_width=6.0)


def test_absorber_width_too_large_names_argument(small):
    with pytest.raises(ValueError, match=r"`absorber_width`"):
        sw.SplitStep(small.grid, small.v, dt=0.1, absorber_width=6.0)


def test_negative_cap_names_argument(small):
    with pytest.raises(ValueError, match=r"`absorber_potential`"):
        sw.SplitStep(small.grid, small.v, dt=0.1, absorber_potential=-np.ones(16))


def test_imaginary_time_with_drive_refused_up_front(small):
    with pytest.raises(ValueError, match=r"`drive`"):
        sw.SplitStep(small.grid, small.v, dt=0.1, imaginary_time=True, drive=np.ones(4), drive_potential=small.grid.x)


@pytest.mark.parametrize(
    "args, exc, pattern",
    [
        (lambda s: (s.psi[:15], 3), ValueError, r"`psi0`.*16"),
        (lambda s: (np.where(np.arange(16) == 3, np.nan, s.psi), 3), ValueError, r"`psi0`.*finite"),
        (lambda s: (np.zeros(16), 3), ValueError, r"`psi0`"),
        (lambda s: (s.psi, -1), ValueError, r"`steps`"),
        (lambda s: (s.psi, 2.5), TypeError, r"`steps`"),
        (lambda s: (s.psi, 3, 0), ValueError, r"`record_every`"),
    ],
)
def test_bad_run_arguments(small, args, exc, pattern):
    prop = sw.SplitStep(small.grid, small.v, dt=0.1)
    with pytest.raises(exc, match=pattern):
        prop.run(*args(small))


def test_bad_run_many_arguments(small):
    prop = sw.SplitStep(small.grid, small.v, dt=0.1)
    with pytest.raises(ValueError, match=r"`psi0s`"):
        prop.run_many(small.psi, 3)  # 1-D
    with pytest.raises(ValueError, match=r"`psi0s`"):
        prop.run_many(np.zeros((2, 15), complex), 3)
    with pytest.raises(ValueError, match=r"`record_every`"):
        prop.run_many(np.stack([small.psi]), 3, record_every=0)


def test_drive_samples_too_short(small):
    prop = sw.SplitStep(small.grid, small.v, dt=0.1, drive=np.ones(3), drive_potential=small.grid.x)
    with pytest.raises(ValueError, match=r"`drive`.*`steps`"):
        prop.run(small.psi, 5)
    with pytest.raises(ValueError, match=r"`drive`"):
        prop.run_many(np.stack([small.psi]), 5)
    prop.run(small.psi, 3)  # exactly enough samples is fine


def test_drive_callable_not_finite(small):
    prop = sw.SplitStep(small.grid, small.v, dt=0.1, drive=lambda t: np.full_like(t, np.nan), drive_potential=small.grid.x)
    with pytest.raises(ValueError, match=r"`drive`.*finite"):
        prop.run(small.psi, 5)


def test_drive_callable_wrong_shape_names_argument(small):
    prop = sw.SplitStep(small.grid, small.v, dt=0.1, drive=lambda t: np.ones(2), drive_potential=small.grid.x)
    with pytest.raises((ValueError, TypeError), match=r"`drive`"):
        prop.run(small.psi, 5)


def test_ground_states_needs_imaginary_time(small):
    with pytest.raises(ValueError, match=r"`imaginary_time`"):
        sw.SplitStep(small.grid, small.v, dt=0.1).ground_states(1)
    prop = sw.SplitStep(small.grid, small.v, dt=0.1, imaginary_time=True)
    with pytest.raises(ValueError, match=r"`count`"):
        prop.ground_states(17)
    with pytest.raises(ValueError, match=r"`tol`"):
        prop.ground_states(1, tol=0.0)


# --------------------------------------------------------------------------- 12. memory guard


def test_memory_guard_refuses_huge_recording_up_front():
    # 2^16 points × 16 B × (10^7 + 1) records ≈ 10 TB: refused before any step is taken
    # (if it were not, this test would run for hours instead of milliseconds).
    n = 2**16
    grid = sw.FourierGrid(-100.0, 100.0, n)
    prop = sw.SplitStep(grid, np.zeros(n), dt=0.01)
    psi = sw.gaussian_packet(grid, 0.0, 0.0, 1.0)
    with pytest.raises(MemoryError, match=r"record_every"):
        prop.run(psi, 10**7, record_every=1)
    with pytest.raises(MemoryError, match=r"record_every"):
        prop.run_many(np.stack([psi, psi]), 10**7, record_every=1)


# --------------------------------------------------------------------------- 13. progress


def test_progress_with_tqdm_same_result(dw):
    pytest.importorskip("tqdm")
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01)
    a = prop.run(dw.psi0, 500, record_every=50, progress=True)
    b = prop.run(dw.psi0, 500, record_every=50, progress=False)
    assert a.steps_done == 500
    np.testing.assert_array_equal(a.states, b.states)
    np.testing.assert_array_equal(a.energy, b.energy)


def test_progress_bar_protocol(dw, monkeypatch):
    # A recording stand-in for tqdm: the bar gets total = steps, updates summing to
    # steps, and is closed.
    bars = []

    class Bar:
        def __init__(self, total=None, **kwargs):
            self.total, self.done, self.closed = total, 0, False
            bars.append(self)

        def update(self, k):
            self.done += k

        def close(self):
            self.closed = True

    fake = types.ModuleType("tqdm")
    fake.tqdm = Bar
    monkeypatch.setitem(sys.modules, "tqdm", fake)
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01)
    prop.run(dw.psi0, 777, record_every=100, progress=True)
    assert len(bars) == 1
    assert bars[0].total == 777 and bars[0].done == 777 and bars[0].closed


def test_progress_without_tqdm_raises_import_error(dw, monkeypatch):
    monkeypatch.setitem(sys.modules, "tqdm", None)
    prop = sw.SplitStep(dw.grid, dw.v, mass=M_DW, dt=0.01)
    with pytest.raises(ImportError, match=r"tqdm"):
        prop.run(dw.psi0, 10, progress=True)
