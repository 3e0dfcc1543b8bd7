"""Trapped gases: the Gross-Pitaevskii term, product grids (2D/3D), cold-atom units and plots.

Every physics check names its source next to it: a closed form from a paper or textbook,
or an independent construction with numpy/scipy on the same grid (a dense Fourier-grid
matrix built here with numpy's FFT, a Newton solve, scipy's ODE integrator, scipy.constants).
No expected value in this file comes from specwell itself.
"""

import math
import pickle

import numpy as np
import pytest
import scipy.constants as sc
import scipy.linalg as sla
from scipy.integrate import solve_ivp

import specwell as sw


# --------------------------------------------------------------------------- helpers


def fourier_kinetic_matrix(n, length, mass=1.0, hbar=1.0):
    """Dense −(ħ²/2m)∂² of a periodic grid acting on samples ψ(x_j): F⁻¹ diag(ħ²k²/2m) F,
    built here from numpy's FFT of the identity (independent of specwell)."""
    k = 2 * np.pi * np.fft.fftfreq(n, length / n)
    f = np.fft.fft(np.eye(n), axis=0)
    return np.fft.ifft((hbar**2 * k**2 / (2 * mass))[:, None] * f, axis=0).real


def gpe_ground_state_reference(x, v, g, mass=1.0, stages=20):
    """Ground state of (T + V + gφ²)φ = μφ, Σφ²dx = 1 on the periodic grid x: the linear ground
    state from scipy.linalg.eigh, then Newton's method on (φ, μ) with the exact Jacobian along
    g' = g/stages, 2g/stages, …, g (continuation on the ground-state branch). Returns (μ, φ, E)."""
    n, dx = len(x), x[1] - x[0]
    h0 = fourier_kinetic_matrix(n, n * dx, mass) + np.diag(v)
    w, u = sla.eigh(h0, subset_by_index=[0, 0])
    mu, phi = w[0], u[:, 0] / np.sqrt(dx)
    phi *= np.sign(phi[n // 2])
    for gk in np.linspace(0.0, g, stages + 1)[1:]:
        # Newton on F(φ, μ) = [(H0 + g'φ²)φ − μφ, (Σφ²dx − 1)/2].
        for _ in range(50):
            f1 = h0 @ phi + gk * phi**3 - mu * phi
            f2 = 0.5 * (np.sum(phi**2) * dx - 1.0)
            jac = np.zeros((n + 1, n + 1))
            jac[:n, :n] = h0 + np.diag(3 * gk * phi**2 - mu)
            jac[:n, n] = -phi
            jac[n, :n] = phi * dx
            step = np.linalg.solve(jac, -np.concatenate([f1, [f2]]))
            phi, mu = phi + step[:n], mu + step[n]
            if np.max(np.abs(step)) < 1e-13:
                break
        else:
            raise AssertionError(f"reference Newton did not converge at g = {gk}")
    # Self-consistency with scipy: (μ, φ) must be the lowest eigenpair of the frozen mean-field
    # Hamiltonian H0 + g diag(φ²) (the SCF fixed point on the ground-state branch).
    w_scf, u_scf = sla.eigh(h0 + np.diag(g * phi**2), subset_by_index=[0, 0])
    if abs(w_scf[0] - mu) > 1e-10 or abs(abs(u_scf[:, 0] @ phi) * np.sqrt(dx) - 1.0) > 1e-10:
        raise AssertionError("reference is not the self-consistent ground state")
    energy = phi @ h0 @ phi * dx + 0.5 * g * np.sum(phi**4) * dx
    return mu, phi, energy


def harmonic(*axes, w=1.0):
    return 0.5 * w**2 * sum(a**2 for a in axes)


def soliton(x, kappa, x0, v, t):
    """Moving bright soliton of iψ_t = −½ψ_xx + g|ψ|²ψ with g = −κ, Σ|ψ|²dx = 1:
    ψ = (√κ/2) sech((κ/2)(x − x0 − vt)) exp(i(v(x − x0) − (v²/2 − κ²/8)t))
    (Zakharov & Shabat 1972, Sov. Phys. JETP 34, 62; Galilean boost of the stationary soliton)."""
    a = 0.5 * np.sqrt(kappa) / np.cosh(0.5 * kappa * (x - x0 - v * t))
    return a * np.exp(1j * (v * (x - x0) - (0.5 * v**2 - kappa**2 / 8.0) * t))


def l2(a, dv):
    return np.sqrt(np.sum(np.abs(a) ** 2) * dv)


# --------------------------------------------------------------------------- 1D GPE ground state


@pytest.fixture(scope="module")
def trap_1d():
    grid = sw.FourierGrid(-12.0, 12.0, 256)
    return grid, harmonic(grid.x)


def test_gpe_ground_state_matches_independent_scf_newton(trap_1d):
    # Reference: a self-consistent-field solve on the same Fourier grid with numpy/scipy (helpers
    # above): scipy eigh start, Newton on (φ, μ), then checked to be the lowest eigenpair of the
    # frozen mean-field Hamiltonian by scipy eigh.
    grid, v = trap_1d
    g = 50.0
    mu_ref, phi_ref, e_ref = gpe_ground_state_reference(grid.x, v, g)
    prop = sw.SplitStep(grid, v, dt=0.01, imaginary_time=True, nonlinearity=g)
    energies, states = prop.ground_states(1)
    assert states.shape == (1, grid.points)
    assert abs(energies[0] - mu_ref) <= 1e-6, (energies[0], mu_ref)
    gs = prop.ground_state()
    assert abs(gs.chemical_potential - mu_ref) <= 1e-6
    assert abs(gs.energy - e_ref) <= 1e-6
    np.testing.assert_allclose(gs.state.real, phi_ref, atol=1e-6)
    assert np.all(gs.state.imag == 0)
    assert gs.residual < 1e-7 and gs.refine_iterations > 0
    # The imaginary-time step does not change the answer (the refinement reaches the grid solution).
    e2, _ = sw.SplitStep(grid, v, dt=0.03, imaginary_time=True, nonlinearity=g).ground_states(1)
    assert abs(e2[0] - mu_ref) <= 1e-6


def test_thomas_fermi_limit_is_approached_as_the_tf_correction_predicts():
    # Thomas-Fermi limit of the 1D trap V = ½ω²x² (ħ = m = 1): μ_TF = (3gω/(4√2))^(2/3)
    # (normalisation of n(x) = (μ − V)/g; Pitaevskii & Stringari 2003, Sec. 17.2 in 1D). The
    # leading correction comes from the kinetic energy of the boundary layer and scales as
    # (ħω/μ)² ln(μ/ħω) (recalled from memory: Lundh, Pethick & Smith 1997, Phys. Rev. A 55,
    # 2126, in 3D; the boundary-layer argument is the same in 1D), so the relative deviation
    # must be positive, shrink with g, with a log-log slope between −4/3 and −1 in g.
    gs, devs = [50.0, 200.0, 800.0], []
    for g in gs:
        mu_tf = (3 * g / (4 * np.sqrt(2))) ** (2 / 3)
        grid = sw.FourierGrid(-16.0, 16.0, 512)
        mu = sw.SplitStep(grid, harmonic(grid.x), dt=0.005, imaginary_time=True, nonlinearity=g).ground_states(1)[0][0]
        devs.append((mu - mu_tf) / mu_tf)
    devs = np.array(devs)
    assert np.all(devs > 0) and np.all(np.diff(devs) < 0), devs
    slopes = np.diff(np.log(devs)) / np.diff(np.log(gs))
    assert np.all((slopes > -4 / 3 - 0.1) & (slopes < -0.9)), (devs, slopes)
    assert devs[-1] < 1e-3


# --------------------------------------------------------------------------- bright soliton


@pytest.fixture(scope="module")
def soliton_case():
    grid = sw.FourierGrid(-30.0, 30.0, 768)  # sech tails e^{−26} at the box edges
    kappa, x0, v, tf = 2.0, -4.0, 1.0, 8.0
    return grid, kappa, x0, v, tf


def _soliton_error(case, dt, order):
    grid, kappa, x0, v, tf = case
    steps = int(round(tf / dt))
    prop = sw.SplitStep(grid, np.zeros(grid.points), dt=dt, order=order, nonlinearity=-kappa)
    run = prop.run(soliton(grid.x, kappa, x0, v, 0.0), steps, record_every=steps)
    return run, soliton(grid.x, kappa, x0, v, tf)


def test_bright_soliton_keeps_its_shape(soliton_case):
    # Exact moving soliton (Zakharov & Shabat 1972): shape |ψ| preserved to 1e-5 at dt = 2e-3, t = 8.
    run, exact = _soliton_error(soliton_case, 2e-3, 2)
    grid = soliton_case[0]
    assert np.max(np.abs(np.abs(run.states[-1]) - np.abs(exact))) <= 1e-5
    assert l2(run.states[-1] - exact, grid.dx) <= 1e-4  # and the phase e^{i(vx − ωt)}
    # it moved by v·t = 8
    assert run.mean_x[-1] == pytest.approx(soliton_case[2] + soliton_case[3] * soliton_case[4], abs=1e-6)
    np.testing.assert_allclose(run.norm, 1.0, atol=1e-12)


@pytest.mark.parametrize("order, dts", [(2, [0.02, 0.01, 0.005]), (4, [0.04, 0.02, 0.01])])
def test_soliton_convergence_order(soliton_case, order, dts):
    # Strang O(dt²) and Yoshida O(dt⁴) for the cubic NLS (Bao, Jaksch & Markowich 2003; Lubich
    # 2008, Math. Comp. 77, 2141), measured against the exact soliton.
    grid = soliton_case[0]
    errors = []
    for dt in dts:
        run, exact = _soliton_error(soliton_case, dt, order)
        errors.append(l2(run.states[-1] - exact, grid.dx))
    orders = np.log2(np.array(errors[:-1]) / np.array(errors[1:]))
    assert np.all(np.abs(orders - order) < 0.25), (errors, orders)


# --------------------------------------------------------------------------- conservation


def test_nonlinear_norm_conservation_1e4_steps():
    # Every factor of the nonlinear splitting is unitary (|e^{iθ}| = 1, unitary DFT): the norm is
    # conserved to round-off (compared with the same run at g = 0); the energy functional has no drift.
    grid = sw.FourierGrid(-12.0, 12.0, 256)
    v = harmonic(grid.x)
    psi0 = sw.gaussian_packet(grid, 1.0, 0.5, 0.8)
    lin = sw.SplitStep(grid, v, dt=0.005).run(psi0, 10_000, record_every=500)
    run = sw.SplitStep(grid, v, dt=0.005, nonlinearity=20.0).run(psi0, 10_000, record_every=500)
    drift, drift_lin = np.max(np.abs(run.norm - run.norm[0])), np.max(np.abs(lin.norm - lin.norm[0]))
    assert drift <= max(10 * drift_lin, 1e-13) and drift < 1e-11, (drift, drift_lin)
    np.testing.assert_allclose(np.sum(np.abs(run.states) ** 2, axis=1) * grid.dx, run.norm, rtol=1e-13)
    # Energy functional from numpy on the recorded states (dense kinetic matrix built here).
    t = fourier_kinetic_matrix(grid.points, 24.0)
    s = run.states
    e = (np.einsum("ij,jk,ik->i", s.conj(), t, s).real * grid.dx + (np.abs(s) ** 2 * v).sum(1) * grid.dx
         + 10.0 * (np.abs(s) ** 4).sum(1) * grid.dx) / run.norm
    np.testing.assert_allclose(run.energy, e, atol=1e-11)
    assert np.max(np.abs(run.energy - run.energy[0])) < 1e-4 * run.energy[0]


# --------------------------------------------------------------------------- 2D and 3D


def test_2d_and_3d_oscillator_levels_by_imaginary_time():
    # Isotropic oscillator E = ħω(n_x + n_y + 1) (2D: 1, 2, 2) and ħω(n_x + n_y + n_z + 3/2)
    # (3D ground: 1.5) (Cohen-Tannoudji, Diu & Laloë 1977, Complement E_VI).
    g2 = sw.ProductGrid(sw.FourierGrid(-8.0, 8.0, 64), sw.FourierGrid(-8.0, 8.0, 48))
    e, states = sw.SplitStep(g2, harmonic, dt=0.01, imaginary_time=True).ground_states(3, tol=1e-11)
    np.testing.assert_allclose(e, [1.0, 2.0, 2.0], atol=1e-7)
    assert states.shape == (3, 64, 48)
    gram = np.einsum("aij,bij->ab", states.conj(), states) * g2.dV
    np.testing.assert_allclose(gram, np.eye(3), atol=1e-10)
    ax = sw.FourierGrid(-7.0, 7.0, 32)
    g3 = sw.ProductGrid(ax, ax, sw.FourierGrid(-7.0, 7.0, 28))
    gs = sw.SplitStep(g3, harmonic, dt=0.01, imaginary_time=True).ground_state(tol=1e-11)
    assert abs(gs.chemical_potential - 1.5) <= 1e-7
    assert gs.state.shape == (32, 32, 28)
    # ground state ∝ e^{−r²/2}: compare the normalised profile (numpy)
    x, y, z = g3.mesh()
    ref = np.exp(-(x**2 + y**2 + z**2) / 2)
    ref /= l2(ref, g3.dV)
    np.testing.assert_allclose(gs.state.real, ref, atol=1e-5)


def test_2d_coherent_state_and_observables_against_numpy():
    # Coherent state: ⟨x⟩(t) = x0 cos ωt, ⟨p_x⟩ = −mωx0 sin ωt (Cohen-Tannoudji et al. 1977,
    # Complement G_V, per axis); observables recomputed with numpy from the recorded states.
    grid = sw.ProductGrid(sw.FourierGrid(-10.0, 10.0, 64), sw.FourierGrid(-9.0, 11.0, 60))
    x0, y0 = 2.0, 0.5
    psi0 = sw.gaussian_packet(grid, (x0, y0), 0.0, np.sqrt(0.5))
    prop = sw.SplitStep(grid, harmonic, dt=0.005, order=4)
    run = prop.run(psi0, 1257, record_every=50)
    t = run.times
    assert run.states.shape == (len(t), 64, 60) and run.shape == [64, 60]
    np.testing.assert_allclose(run.mean_x, x0 * np.cos(t), atol=1e-8)
    np.testing.assert_allclose(run.mean_y, y0 * np.cos(t), atol=1e-8)
    np.testing.assert_allclose(run.mean_p, -x0 * np.sin(t), atol=1e-8)
    assert run.mean_z is None and run.mean_pz is None and run.z is None
    X, Y = grid.mesh()
    rho = np.abs(run.states) ** 2
    norm = rho.sum(axis=(1, 2)) * grid.dV
    np.testing.assert_allclose(run.norm, norm, rtol=1e-13)
    np.testing.assert_allclose(run.mean_x, (rho * X).sum((1, 2)) / rho.sum((1, 2)), atol=1e-12)
    np.testing.assert_allclose(run.mean_y, (rho * Y).sum((1, 2)) / rho.sum((1, 2)), atol=1e-12)
    psik = np.abs(np.fft.fftn(run.states, axes=(1, 2))) ** 2
    KX, KY = np.meshgrid(*grid.k, indexing="ij")
    np.testing.assert_allclose(run.mean_py, (psik * KY).sum((1, 2)) / psik.sum((1, 2)), atol=1e-12)
    ekin = 0.5 * (psik * (KX**2 + KY**2)).sum((1, 2)) / psik.sum((1, 2))
    epot = (rho * harmonic(X, Y)).sum((1, 2)) / rho.sum((1, 2))
    np.testing.assert_allclose(run.energy, ekin + epot, atol=1e-12)
    np.testing.assert_allclose(run.autocorrelation, np.einsum("ij,tij->t", psi0.conj(), run.states) * grid.dV, atol=1e-13)
    np.testing.assert_allclose(grid.k_squared, KX**2 + KY**2, rtol=0, atol=0)


def test_3d_coherent_state_and_interacting_observables_against_numpy():
    # Coherent state along z in a 3D isotropic trap: ⟨z⟩(t) = z0 cos t (Cohen-Tannoudji et al.
    # 1977, Complement G_V), ⟨x⟩ = ⟨y⟩ = 0 by symmetry. With g ≠ 0 the centre of mass still
    # follows it (Kohn 1961), and every recorded observable, including the energy functional
    # ⟨T⟩ + ⟨V⟩ + (g/2)Σ|ψ|⁴dV, is recomputed here with numpy from the recorded states.
    ax = sw.FourierGrid(-7.0, 7.0, 24)
    grid = sw.ProductGrid(ax, sw.FourierGrid(-7.0, 7.0, 20), sw.FourierGrid(-8.0, 8.0, 32))
    z0, g = 1.5, 4.0
    psi0 = sw.gaussian_packet(grid, (0.0, 0.0, z0), 0.0, np.sqrt(0.5))
    run = sw.SplitStep(grid, harmonic, dt=0.01, order=4, nonlinearity=g).run(psi0, 300, record_every=30)
    t = run.times
    assert run.states.shape == (len(t), 24, 20, 32)
    np.testing.assert_allclose(run.mean_z, z0 * np.cos(t), atol=1e-7)
    np.testing.assert_allclose(run.mean_pz, -z0 * np.sin(t), atol=1e-7)
    # (symmetric up to the even grid's unpaired point −L/2 and Nyquist mode: 1e-10 seen)
    np.testing.assert_allclose(run.mean_x, 0.0, atol=1e-8)
    X, Y, Z = grid.mesh(sparse=True)
    rho = np.abs(run.states) ** 2
    norm = rho.sum(axis=(1, 2, 3)) * grid.dV
    np.testing.assert_allclose(run.norm, norm, rtol=1e-13)
    np.testing.assert_allclose(run.mean_z, (rho * Z).sum((1, 2, 3)) * grid.dV / norm, atol=1e-12)
    np.testing.assert_allclose(run.mean_y, (rho * Y).sum((1, 2, 3)) * grid.dV / norm, atol=1e-12)
    psik = np.abs(np.fft.fftn(run.states, axes=(1, 2, 3))) ** 2
    ekin = 0.5 * (psik * grid.k_squared).sum((1, 2, 3)) / psik.sum((1, 2, 3))
    epot = (rho * harmonic(X, Y, Z)).sum((1, 2, 3)) * grid.dV / norm
    eint = 0.5 * g * (rho**2).sum((1, 2, 3)) * grid.dV / norm
    np.testing.assert_allclose(run.energy, ekin + epot + eint, atol=1e-11)
    np.testing.assert_allclose(run.autocorrelation,
                               np.einsum("ijk,tijk->t", psi0.conj(), run.states) * grid.dV, atol=1e-13)


def test_3d_gpe_ground_state_virial_theorem():
    # Virial theorem of the GP functional in a harmonic trap: 2E_kin − 2E_ho + 3E_int = 0
    # (Dalfovo, Giorgini, Pitaevskii & Stringari 1999, Rev. Mod. Phys. 71, 463, Eq. 40), and
    # μ = E + E_int (their Eq. 39 with ψ normalised to 1); the three parts computed with numpy.
    ax = sw.FourierGrid(-6.0, 6.0, 32)
    grid = sw.ProductGrid(ax, ax, ax)
    g = 40.0
    gs = sw.SplitStep(grid, harmonic, dt=0.01, imaginary_time=True, nonlinearity=g).ground_state(tol=1e-9)
    psi = gs.state
    X, Y, Z = grid.mesh(sparse=True)
    rho = np.abs(psi) ** 2
    e_ho = np.sum(rho * harmonic(X, Y, Z)) * grid.dV
    e_int = 0.5 * g * np.sum(rho**2) * grid.dV
    psik = np.abs(np.fft.fftn(psi)) ** 2
    e_kin = 0.5 * np.sum(psik * grid.k_squared) / np.sum(psik)
    assert abs(2 * e_kin - 2 * e_ho + 3 * e_int) < 1e-7 * (e_kin + e_ho + e_int)
    assert gs.energy == pytest.approx(e_kin + e_ho + e_int, abs=1e-9)
    assert gs.chemical_potential == pytest.approx(e_kin + e_ho + 2 * e_int, abs=1e-9)


def test_kohn_theorem_driven_interacting_cloud_2d():
    # Harmonic potential theorem (Kohn 1961, Phys. Rev. 123, 1242; Dobson 1994, Phys. Rev.
    # Lett. 73, 2244): in a harmonic trap the centre of mass of an interacting cloud under a
    # uniform force −f(t) obeys m ẍ = −mω²x − f(t) exactly. Reference: scipy solve_ivp (DOP853).
    w, m = 1.3, 1.0
    grid = sw.ProductGrid(sw.FourierGrid(-10.0, 10.0, 64), sw.FourierGrid(-10.0, 10.0, 64))
    f = lambda t: 0.4 * np.sin(1.1 * np.asarray(t)) + 0.1  # noqa: E731
    prop = sw.SplitStep(grid, lambda x, y: harmonic(x, y, w=w), dt=0.01, order=4, nonlinearity=25.0,
                        drive=f, drive_potential=lambda x, y: x + 0 * y)
    psi0 = sw.gaussian_packet(grid, (0.5, 0.0), (0.2, 0.0), 0.8)
    run = prop.run(psi0, 400, record_every=40)
    sol = solve_ivp(lambda t, s: [s[1], -w**2 * s[0] - f(t) / m], (0, run.times[-1]), [run.mean_x[0], run.mean_p[0] / m],
                    t_eval=run.times, method="DOP853", rtol=1e-12, atol=1e-12)
    np.testing.assert_allclose(run.mean_x, sol.y[0], atol=1e-7)
    np.testing.assert_allclose(run.mean_p, m * sol.y[1], atol=1e-7)


@pytest.mark.parametrize("kind", ["mask", "cap"])
def test_absorbers_on_product_grid_with_nonlinearity(kind):
    # Absorbing boundaries (mask at the box faces; CAP W ≥ 0 given as an array, Riss & Meyer
    # 1993) remove a packet leaving the box; the reported absorbed fraction matches numpy.
    grid = sw.ProductGrid(sw.FourierGrid(-30.0, 30.0, 128), sw.FourierGrid(-12.0, 12.0, 48))
    X, Y = grid.mesh()
    if kind == "mask":
        kw = {"absorber_width": 6.0}
    else:
        d = np.maximum(np.abs(X) - 22.0, 0.0) / 8.0
        kw = {"absorber_potential": 3.0 * d**2}
    prop = sw.SplitStep(grid, np.zeros(grid.shape), dt=0.02, nonlinearity=1.0, **kw)
    run = prop.run(sw.gaussian_packet(grid, (0.0, 0.0), (3.0, 0.0), 2.0), 1200, record_every=100)
    n_np = np.sum(np.abs(run.states) ** 2, axis=(1, 2)) * grid.dV
    np.testing.assert_allclose(run.norm, n_np, rtol=1e-12, atol=1e-300)
    assert run.absorbed_norm == pytest.approx(1 - n_np[-1] / n_np[0], abs=1e-12)
    assert run.absorbed_norm > 0.99
    assert np.all(np.diff(run.norm) <= 1e-13)


def test_gaussian_packet_on_product_grids():
    # Moments of the product Gaussian (numpy): ⟨x_a⟩ = x0_a, σ_a, normalised Σ|ψ|²dV = 1.
    grid = sw.ProductGrid(sw.FourierGrid(-8.0, 8.0, 40), sw.FourierGrid(-6.0, 6.0, 36), sw.FourierGrid(-5.0, 7.0, 30))
    psi = sw.gaussian_packet(grid, (1.0, -0.5, 0.7), (0.3, 0.0, -0.2), (0.9, 0.7, 0.8))
    assert psi.shape == (40, 36, 30) and psi.dtype == np.complex128
    rho = np.abs(psi) ** 2
    assert np.sum(rho) * grid.dV == pytest.approx(1.0, abs=1e-13)
    for a, (c, s) in enumerate([(1.0, 0.9), (-0.5, 0.7), (0.7, 0.8)]):
        marg = rho.sum(axis=tuple(i for i in range(3) if i != a))
        x = grid.axes[a].x
        mean = np.sum(marg * x) / np.sum(marg)
        assert mean == pytest.approx(c, abs=1e-9)
        assert np.sqrt(np.sum(marg * (x - mean) ** 2) / np.sum(marg)) == pytest.approx(s, rel=1e-8)
    with pytest.raises(ValueError, match=r"`x0`"):
        sw.gaussian_packet(grid, 1.0)
    with pytest.raises(ValueError, match=r"`x0`"):
        sw.gaussian_packet(grid, (1.0, 2.0, 9.0))
    with pytest.raises(ValueError, match=r"`sigma`"):
        sw.gaussian_packet(grid, (0.0, 0.0, 0.0), sigma=(1.0, -1.0, 1.0))


def test_memory_guard_refuses_huge_3d_recording_up_front():
    # 64³ points × 16 B × (10^6 + 1) records ≈ 4 TB: refused before any step.
    ax = sw.FourierGrid(-5.0, 5.0, 64)
    grid = sw.ProductGrid(ax, ax, ax)
    prop = sw.SplitStep(grid, harmonic, dt=0.01)
    psi = sw.gaussian_packet(grid, (0.0, 0.0, 0.0))
    with pytest.raises(MemoryError, match=r"record_every"):
        prop.run(psi, 10**6, record_every=1)
    with pytest.raises(MemoryError, match=r"record_every"):
        prop.run_many(np.stack([psi, psi]), 10**6, record_every=1)


def test_run_many_on_product_grid_equals_run():
    grid = sw.ProductGrid(sw.FourierGrid(-6.0, 6.0, 32), sw.FourierGrid(-6.0, 6.0, 24))
    prop = sw.SplitStep(grid, harmonic, dt=0.01, nonlinearity=3.0)
    psi0s = np.stack([sw.gaussian_packet(grid, (x0, 0.5), 0.0, 0.8) for x0 in (-1.0, 0.0, 1.5)])
    many = prop.run_many(psi0s, 37, record_every=10)
    for p, r in zip(psi0s, many):
        single = prop.run(p, 37, record_every=10)
        np.testing.assert_array_equal(r.states, single.states)
        np.testing.assert_array_equal(r.mean_y, single.mean_y)


# --------------------------------------------------------------------------- units and coupling


def test_cold_atom_units_against_scipy_constants():
    # ħ²/(2u) in (ħ/ms)·µm² and ħ = 1 from scipy.constants (CODATA 2022 in scipy ≥ 1.15, as in
    # the crate; an older scipy's CODATA 2018 u differs by 1.4e-9 relative).
    u = sc.physical_constants["atomic mass constant"][0]
    e_unit = sc.hbar / 1e-3
    c, hbar = sw._core.unit_constants("cold-atom")
    assert c == pytest.approx(sc.hbar**2 / (2 * u) / e_unit / 1e-12, rel=1e-8)
    assert hbar == 1.0
    assert "cold-atom" in sw.UNITS
    assert sw.angular_frequency(250.0) == pytest.approx(2 * np.pi * 250.0 * 1e-3, rel=1e-15)
    assert sw.angular_frequency(1e15, units="semiconductor") == pytest.approx(2 * np.pi, rel=1e-15)
    m = 86.909  # ⁸⁷Rb in u (recalled from memory: 86.909180 u)
    a_ho = sw.oscillator_length(m, 100.0)
    assert a_ho == pytest.approx(np.sqrt(sc.hbar / (m * u * 2 * np.pi * 100.0)) / 1e-6, rel=1e-8)


def test_coupling_constants_against_si_formulas():
    # g₃ = 4πħ²aN/m (Pitaevskii & Stringari 2003), g₂ = g₃/(√(2π) a_z) (Petrov, Holzmann &
    # Shlyapnikov 2000), g₁ = 2ħω_⊥aN (Olshanii 1998), evaluated in SI with scipy.constants and
    # converted to (ħ/ms)·µm^d.
    u = sc.physical_constants["atomic mass constant"][0]
    m, a_um, n = 86.909, 5.3e-3, 2.0e4  # a ≈ 100 a₀ (illustrative), in µm
    m_si, a_si = m * u, a_um * 1e-6
    e_unit = sc.hbar / 1e-3
    g3_si = 4 * np.pi * sc.hbar**2 * a_si * n / m_si  # J m³
    assert sw.coupling_constant(a_um, n, m) == pytest.approx(g3_si / e_unit / 1e-18, rel=1e-8)
    fz = 2000.0
    az = np.sqrt(sc.hbar / (m_si * 2 * np.pi * fz))
    g2_si = g3_si / (np.sqrt(2 * np.pi) * az)
    assert sw.coupling_constant(a_um, n, m, dims=2, confinement_hz=fz) == pytest.approx(g2_si / e_unit / 1e-12, rel=1e-8)
    g1_si = 2 * sc.hbar * (2 * np.pi * fz) * a_si * n
    assert sw.coupling_constant(a_um, n, m, dims=1, confinement_hz=fz) == pytest.approx(g1_si / e_unit / 1e-6, rel=1e-8)
    for kw, pat in [({"dims": 2}, r"`confinement_hz`"), ({"dims": 1, "confinement_hz": -3.0}, r"`confinement_hz`"),
                    ({"dims": 4}, r"`dims`"), ({"dims": 3, "confinement_hz": 10.0}, r"`confinement_hz`")]:
        with pytest.raises(ValueError, match=pat):
            sw.coupling_constant(a_um, n, m, **kw)
    with pytest.raises(ValueError, match=r"`atom_number`"):
        sw.coupling_constant(a_um, 0.0, m)
    with pytest.raises(ValueError, match=r"`scattering_length`"):
        sw.coupling_constant(float("nan"), n, m)
    with pytest.raises(ValueError, match=r"`units`"):
        sw.angular_frequency(10.0, units="natural")


def test_cold_atom_trap_in_physical_units():
    # A quasi-1D ⁸⁷Rb cloud in a 20 Hz axial trap (illustrative numbers): in cold-atom units the
    # Thomas-Fermi μ_TF = (3 g₁ √(m) ω / (4√2))^(2/3) (the 1D TF normalisation with m ≠ 1,
    # ħ = 1) is approached, and the oscillator length matches √(ħ/mω) from scipy.constants.
    m, n, a = 86.909, 1.0e4, 5.3e-3
    g1 = sw.coupling_constant(a, n, m, dims=1, confinement_hz=500.0)
    w = sw.angular_frequency(20.0)
    grid = sw.FourierGrid(-150.0, 150.0, 1024)
    prop = sw.SplitStep(grid, 0.5 * m * w**2 * grid.x**2, mass=m, dt=0.05, units="cold-atom", imaginary_time=True,
                        nonlinearity=g1)
    mu = prop.ground_state().chemical_potential
    mu_tf = (3 * g1 * np.sqrt(m) * w / (4 * np.sqrt(2))) ** (2 / 3)
    assert 0 < (mu - mu_tf) / mu_tf < 1e-2


# --------------------------------------------------------------------------- bad input


@pytest.fixture
def pg():
    return sw.ProductGrid(sw.FourierGrid(-5.0, 5.0, 16), sw.FourierGrid(-4.0, 4.0, 12))


@pytest.mark.parametrize("g", [float("nan"), float("inf"), -float("inf")])
def test_nonlinearity_must_be_finite(g):
    grid = sw.FourierGrid(-5.0, 5.0, 16)
    with pytest.raises(ValueError, match=r"`nonlinearity`"):
        sw.SplitStep(grid, np.zeros(16), dt=0.1, nonlinearity=g)


def test_count_above_one_with_nonlinearity_is_refused():
    grid = sw.FourierGrid(-5.0, 5.0, 16)
    prop = sw.SplitStep(grid, harmonic(grid.x), dt=0.1, imaginary_time=True, nonlinearity=2.0)
    with pytest.raises(ValueError, match=r"`count`.*nonlinear"):
        prop.ground_states(2)


@pytest.mark.parametrize("name", ["potential", "drive_potential", "absorber_potential"])
def test_wrong_array_shapes_on_product_grid(pg, name):
    kw = {"potential": np.zeros(pg.shape)}
    bad = np.zeros((12, 16))  # transposed shape
    kw[name] = bad
    if name == "drive_potential":
        kw["drive"] = np.ones(3)
    with pytest.raises(ValueError, match=rf"`{name}`.*\(16, 12\)"):
        sw.SplitStep(pg, dt=0.1, **kw)
    kw[name] = np.zeros(16 * 12)  # flat is not accepted either
    with pytest.raises(ValueError, match=rf"`{name}`"):
        sw.SplitStep(pg, dt=0.1, **kw)


def test_callables_returning_the_wrong_shape_on_product_grid(pg):
    with pytest.raises(ValueError, match=r"`potential`.*callable.*\(16, 12\)"):
        sw.SplitStep(pg, lambda x, y: np.zeros((3, 3)), dt=0.1)
    with pytest.raises(ValueError, match=r"`absorber_potential`"):
        sw.SplitStep(pg, harmonic, dt=0.1, absorber_potential=lambda x, y: np.ones(5))
    with pytest.raises(TypeError):
        sw.SplitStep(pg, lambda x: x, dt=0.1)  # wrong arity: the callable's own error
    # broadcastable results and numbers are fine
    a = sw.SplitStep(pg, lambda x, y: 0.5 * x**2, dt=0.1)
    X, _ = pg.mesh()
    np.testing.assert_array_equal(a.potential, 0.5 * X**2)
    assert np.all(sw.SplitStep(pg, lambda x, y: 2.0, dt=0.1).potential == 2.0)


def test_wrong_state_shapes_on_product_grid(pg):
    prop = sw.SplitStep(pg, harmonic, dt=0.1)
    psi = sw.gaussian_packet(pg, (0.0, 0.0))
    with pytest.raises(ValueError, match=r"`psi0`.*\(16, 12\)"):
        prop.run(psi.T, 3)
    with pytest.raises(ValueError, match=r"`psi0`"):
        prop.run(psi.ravel(), 3)
    with pytest.raises(ValueError, match=r"`psi0s`"):
        prop.run_many(psi, 3)
    with pytest.raises(ValueError, match=r"`absorber_width`.*shortest side"):
        sw.SplitStep(pg, harmonic, dt=0.1, absorber_width=4.5)
    with pytest.raises(TypeError, match=r"`gz`"):
        sw.ProductGrid(pg.axes[0], pg.axes[1], "z")
    with pytest.raises(TypeError, match=r"`grid`"):
        sw.SplitStep(sw.HermiteBasis(8), np.zeros(16), dt=0.1)


# --------------------------------------------------------------------------- pickle, io, plots


def test_pickle_and_save_product_grid_runs(tmp_path):
    grid = sw.ProductGrid(sw.FourierGrid(-6.0, 6.0, 20), sw.FourierGrid(-5.0, 5.0, 16), sw.FourierGrid(-4.0, 4.0, 12))
    g2 = pickle.loads(pickle.dumps(grid))
    assert g2.shape == grid.shape and np.array_equal(g2.z, grid.z) and g2.dV == grid.dV
    prop = sw.SplitStep(grid, harmonic, dt=0.02, nonlinearity=2.5, absorber_width=1.0)
    p2 = pickle.loads(pickle.dumps(prop))
    assert p2.nonlinearity == 2.5
    psi0 = sw.gaussian_packet(grid, (0.5, 0.0, -0.5), (0.3, 0.0, 0.0), 0.9)
    a, b = prop.run(psi0, 20, record_every=5), p2.run(psi0, 20, record_every=5)
    np.testing.assert_array_equal(a.states, b.states)
    r2 = pickle.loads(pickle.dumps(a))
    for attr in ("states", "mean_x", "mean_y", "mean_z", "mean_pz", "energy"):
        np.testing.assert_array_equal(getattr(r2, attr), getattr(a, attr))
    # GroundState round-trips bit for bit (multiprocessing / dask workers).
    gs = sw.SplitStep(grid, harmonic, dt=0.02, imaginary_time=True, nonlinearity=2.5).ground_state(tol=1e-6)
    gs2 = pickle.loads(pickle.dumps(gs))
    assert isinstance(gs2, sw.GroundState) and gs2.state.shape == tuple(grid.shape)
    np.testing.assert_array_equal(gs2.state, gs.state)
    for attr in ("chemical_potential", "energy", "residual", "steps", "rate", "refine_iterations", "nonlinearity",
                 "units"):
        assert getattr(gs2, attr) == getattr(gs, attr), attr
    with pytest.raises(ValueError, match="GroundState parts"):
        sw._core._ground_state_from_parts([3, 4], "natural", 0.0, 1.0, 1.0, np.zeros(5, complex), 0.0, 0, 0.0, 0)
    path = tmp_path / "run3d.npz"
    sw.save(a, path)
    c = sw.load(path)
    assert c.states.shape == a.states.shape and isinstance(c.grid, sw.ProductGrid)
    np.testing.assert_array_equal(c.states, a.states)
    np.testing.assert_array_equal(c.mean_z, a.mean_z)


def test_density_slice_and_column_density_plots():
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from specwell.plotting import plot_column_density, plot_density_slice

    grid = sw.ProductGrid(sw.FourierGrid(-6.0, 6.0, 24), sw.FourierGrid(-5.0, 5.0, 20), sw.FourierGrid(-4.0, 4.0, 16))
    run = sw.SplitStep(grid, harmonic, dt=0.02).run(sw.gaussian_packet(grid, (1.0, 0.0, -0.5)), 10, record_every=5)
    rho = np.abs(run.states[-1]) ** 2
    ax = plot_column_density(run, axis="z")
    np.testing.assert_allclose(np.asarray(ax.images[0].get_array()).T, rho.sum(axis=2) * grid.axes[2].dx, rtol=1e-12)
    plt.close("all")
    ax = plot_density_slice(run, axis="x", position=1.0)
    j = int(np.argmin(np.abs(grid.x - 1.0)))
    np.testing.assert_allclose(np.asarray(ax.images[0].get_array()).T, rho[j], rtol=1e-12)
    assert ax.specwell_slice_position == pytest.approx(grid.x[j])
    plt.close("all")
    g2 = sw.ProductGrid(sw.FourierGrid(-6.0, 6.0, 24), sw.FourierGrid(-5.0, 5.0, 20))
    run2 = sw.SplitStep(g2, harmonic, dt=0.02).run(sw.gaussian_packet(g2, (1.0, 0.0)), 4)
    ax = plot_column_density(run2)  # along y: a curve over x
    np.testing.assert_allclose(ax.lines[0].get_ydata(), (np.abs(run2.states[-1]) ** 2).sum(1) * g2.axes[1].dx, rtol=1e-12)
    plt.close("all")
    ax = plot_density_slice(run2.states[0], grid=g2, axis="y", position=0.0)
    assert len(ax.lines) == 1
    plt.close("all")
    with pytest.raises(ValueError, match=r"`axis`"):
        plot_density_slice(run, axis="w")
    with pytest.raises(ValueError, match=r"`data`"):
        plot_column_density(sw.SplitStep(sw.FourierGrid(-5, 5, 16), np.zeros(16), dt=0.1).run(np.ones(16), 1))
    plt.close("all")
