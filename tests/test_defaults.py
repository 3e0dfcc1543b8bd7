"""The defaults a new user runs first (method="auto", no options) at realistic sizes.

Each case below once raised ConvergenceError with the default method. The contract:
the automatic choice never fails where a dense solve fits in memory, and its energies
equal the dense ones. References:
* Morse (1929) levels E_n = ω(n+½) − ω²(n+½)²/(4D), ω = a√(2D/m) (ħ = 1);
* an independent Fourier-grid Hamiltonian built here with numpy,
  T_jl = (1/2m)(1/N) Σ_p k_p² cos(k_p(x_j − x_l)) (Kosloff; Marston & Balint-Kurti 1989),
  diagonalised with scipy.linalg.eigh;
* for heterostructures on a Fourier grid: the same problem with method="dense" (the
  algebraic consistency of the two paths on one matrix pencil; the physics of the
  layered problem is checked against BenDaniel-Duke roots in test_heterostructure.py).
"""

import warnings

import numpy as np
import pytest
from scipy.linalg import eigh

import specwell as sw

D, A, X0 = 12.0, 1.0, 2.0  # Morse well depth, range parameter, centre (natural units)


def morse(x):
    return D * (1.0 - np.exp(-A * (x - X0))) ** 2


def morse_levels():
    w = A * np.sqrt(2.0 * D)
    n = np.arange(int(np.sqrt(2.0 * D) / A - 0.5) + 1)
    return w * (n + 0.5) - w**2 * (n + 0.5) ** 2 / (4.0 * D)


def fgh_matrix(start, stop, n, v):
    """Periodic Fourier-grid Hamiltonian, mass 1, built independently of specwell."""
    x = start + (stop - start) * np.arange(n) / n
    k = 2 * np.pi * np.fft.fftfreq(n, (stop - start) / n)
    col = np.real(np.fft.ifft(0.5 * k**2))  # first column of the circulant kinetic matrix
    idx = (np.arange(n)[:, None] - np.arange(n)[None, :]) % n
    return col[idx] + np.diag(v(x))


@pytest.mark.parametrize("n", [1024, 2048, 4096])
def test_morse_on_a_grid_default_method(n):
    st = sw.Hamiltonian(sw.FourierGrid(-4, 30, n), morse).solve(12)
    exact = morse_levels()
    np.testing.assert_allclose(st.energies[:4], exact[:4], rtol=0, atol=1e-9)
    # The top level (0.08 below the dissociation limit) decays only as e^{-0.4 x}: the
    # 28-unit box shifts it by 1.6e-9 at every N (a box effect, not a solver one).
    np.testing.assert_allclose(st.energies[4], exact[4], rtol=0, atol=5e-9)
    assert st.method in ("iterative", "dense")
    if st.method == "dense" and st.iterations:
        assert "dense" in st.note


def test_morse_default_equals_independent_dense_matrix():
    n = 1024
    st = sw.Hamiltonian(sw.FourierGrid(-4, 30, n), morse).solve(12)
    ref = eigh(fgh_matrix(-4, 30, n, morse), eigvals_only=True, subset_by_index=[0, 11])
    np.testing.assert_allclose(st.energies, ref, rtol=0, atol=1e-9)


README_STACK = [(20, 250, 0.09), (10, 0, 0.067), (20, 250, 0.09)]


def stack(layers, field=0.0):
    return sw.Heterostructure([sw.Layer(*l) for l in layers], field_kv_cm=field)


@pytest.mark.parametrize("n", [513, 1025, 2049])
@pytest.mark.parametrize("count", [3, 4, 5, 10])
def test_readme_stack_default_equals_dense(n, count):
    h = sw.Hamiltonian(sw.FourierGrid(-20, 70, n), stack(README_STACK, 10.0), units="semiconductor")
    auto = h.solve(count)
    dense = h.solve(count, method="dense")
    np.testing.assert_allclose(auto.energies, dense.energies, rtol=0, atol=1e-9)


def test_random_wells_default_equals_dense():
    rng = np.random.default_rng(20261202)
    for _ in range(16):
        barrier, well = rng.uniform(8, 25), rng.uniform(3, 15)
        depth, mw, mb = rng.uniform(80, 400), rng.uniform(0.04, 0.08), rng.uniform(0.07, 0.12)
        layers = [(barrier, depth, mb), (well, 0.0, mw), (barrier, depth, mb)]
        n = int(rng.integers(600, 1026))
        count = int(rng.integers(2, 6))
        total = 2 * barrier + well
        h = sw.Hamiltonian(sw.FourierGrid(-10.0, total + 10.0, n), stack(layers, rng.uniform(-20, 20)),
                           units="semiconductor")
        auto = h.solve(count)
        dense = h.solve(count, method="dense")
        np.testing.assert_allclose(auto.energies, dense.energies, rtol=0, atol=1e-9)


def test_solve_batch_default_is_iterative_and_equals_dense():
    g = sw.FourierGrid(-30, 30, 512)
    x = g.x
    pots = np.array([0.15 * x**2 + f * x for f in np.linspace(0, 0.05, 40)])
    batch = sw.solve_batch(g, pots, 5)
    assert batch[0].method == "iterative"
    for i in (0, 17, 39):
        ref = eigh(fgh_matrix(-30, 30, 512, lambda xx: 0.15 * xx**2 + np.linspace(0, 0.05, 40)[i] * xx),
                   eigvals_only=True, subset_by_index=[0, 4])
        np.testing.assert_allclose(batch.energies[i], ref, rtol=0, atol=1e-9)


def test_hermite_basis_on_a_wall_warns_and_small_basis_does_not():
    # A HermiteBasis whose quadrature nodes reach the Morse wall (V ≈ 1e31 at the outer
    # nodes for 640 functions) loses the low levels to round-off: it must say so.
    with warnings.catch_warnings():
        warnings.simplefilter("error", sw.AccuracyWarning)
        good = sw.Hamiltonian(sw.HermiteBasis(80, 4, 0.6), morse).solve(3)
    np.testing.assert_allclose(good.energies, morse_levels()[:3], rtol=1e-8)
    assert np.all(good.attainable_accuracy < 1e-8)
    with pytest.warns(sw.AccuracyWarning, match="round-off"):
        bad = sw.Hamiltonian(sw.HermiteBasis(640, 4, 0.6), morse).solve(3)
    assert np.all(bad.attainable_accuracy > 1.0)


def test_convergence_error_advice_names_existing_arguments():
    h = sw.Hamiltonian(sw.FourierGrid(-4, 30, 1024), morse)
    with pytest.raises(sw.ConvergenceError) as info:
        h.solve(12, method="iterative", max_iter=5)
    msg = str(info.value)
    assert "max_iter" in msg and "max_steps" not in msg
    assert len(info.value.energies) == 12 and np.all(np.isfinite(info.value.residuals))
