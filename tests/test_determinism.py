"""Bit-for-bit determinism.

* Repeated runs in one process give bit-identical energies / states.
* Runs in subprocesses with RAYON_NUM_THREADS=1 and RAYON_NUM_THREADS=2 give
  bit-identical energies of dense and iterative solves, of solve_batch, and
  bit-identical propagated states (np.array_equal).  Where the core is known to differ
  across thread counts the specific assertion is an xfail carrying the measured
  difference (see the README section on determinism).
"""

import json
import os
import subprocess
import sys
import textwrap

import numpy as np
import pytest

import specwell as sw

# The workload, shared by the in-process and the subprocess checks. It prints a JSON
# dict name -> list of float64 bit patterns (as hex strings) so that comparison is exact.
WORKLOAD = textwrap.dedent(
    r"""
    import json, sys
    import numpy as np
    import specwell as sw

    def V(x):
        return 0.5 * x**2 + 0.05 * x**4 - 1.5 * np.exp(-(x - 0.7) ** 2)

    def bits(a):
        a = np.ascontiguousarray(np.asarray(a))
        if np.iscomplexobj(a):
            a = a.view(np.float64)
        return a.astype(np.float64).view(np.uint64).ravel().tolist()

    out = {}
    grid = sw.FourierGrid(-12.0, 12.0, 512)
    H = sw.Hamiltonian(grid, V, mass=1.3)
    out["fourier_dense"] = bits(H.solve(8, method="dense").energies)
    out["fourier_iterative"] = bits(H.solve(6, method="iterative", tol=1e-10).energies)
    hb = sw.Hamiltonian(sw.HermiteBasis(300, 0.1, 0.9, quadrature=700), V)
    out["hermite_dense"] = bits(hb.solve(8, method="dense").energies)
    out["hermite_iterative"] = bits(hb.solve(5, method="iterative", tol=1e-10).energies)
    big = sw.FourierGrid(-40.0, 40.0, 8192)
    Hbig = sw.Hamiltonian(big, V)
    out["large_iterative"] = bits(Hbig.solve(6, method="iterative", tol=1e-10).energies)
    pots = np.array([V(grid.x) + 0.05 * f * grid.x for f in range(16)])
    out["batch_dense"] = bits(sw.solve_batch(grid, pots, 3, mass=1.3, method="dense").energies)
    out["batch_iterative"] = bits(sw.solve_batch(grid, pots, 3, mass=1.3, method="iterative", tol=1e-9).energies)
    g = sw.FourierGrid(-40.0, 40.0, 4096)
    ss = sw.SplitStep(g, V, dt=0.005, order=4)
    psi = np.exp(-(g.x - 1.0) ** 2 + 0.5j * g.x)
    psi = psi / np.sqrt(np.sum(np.abs(psi) ** 2) * g.dx)
    out["propagation"] = bits(ss.run(psi, 400, record_every=400).states[-1])
    out["run_many"] = bits(np.array([r.states[-1] for r in ss.run_many(np.array([psi, np.conj(psi), np.roll(psi, 7)]), 200, record_every=200)]))
    json.dump(out, sys.stdout)
    """
)

# Names whose cross-thread-count equality is known to fail: name -> reason (measured).
# Measured 2026-12-01 (2-core box): deterministic for a fixed thread count (1 vs 1, 2 vs 2
# bit-identical), but
#  * the dense eigensolver differs between RAYON_NUM_THREADS=1 and 2 once N ≥ 384 (N ≤ 300
#    identical): FourierGrid(-12, 12, 512), V = 0.5x² + 0.05x⁴ − 1.5exp(−(x−0.7)²), mass 1.3,
#    solve(8, "dense"): max |ΔE| = 4.4e-13; harmonic N=1024: 1.4e-12; Hermite N=512: 1.5e-11;
#  * solve_batch(method="iterative") differs for every item but the first (items are not
#    solved independently: item i ≠ Hamiltonian(grid, pots[i]).solve(...) bitwise, and the
#    result depends on how rayon splits the batch): max |ΔE| = 6.4e-15 here.
# Single-problem iterative solves, solve_batch(method="dense") and propagation are identical.
KNOWN_THREAD_COUNT_DIFFERENCES: dict = {
    "fourier_dense": "dense eigensolver (N=512) is not bitwise reproducible across rayon thread "
                     "counts: measured max |dE| = 4.4e-13 (RAYON_NUM_THREADS=1 vs 2)",
    "batch_iterative": "solve_batch(method='iterative') results depend on the rayon split of the "
                       "batch: measured max |dE| = 6.4e-15 (RAYON_NUM_THREADS=1 vs 2)",
}


def _run(threads):
    env = dict(os.environ)
    env["RAYON_NUM_THREADS"] = str(threads)
    p = subprocess.run([sys.executable, "-c", WORKLOAD], env=env, capture_output=True, text=True, timeout=600)
    assert p.returncode == 0, p.stderr
    return {k: np.array(v, dtype=np.uint64).view(np.float64) for k, v in json.loads(p.stdout).items()}


@pytest.fixture(scope="module")
def by_threads():
    return {1: _run(1), 2: _run(2), "2again": _run(2)}


NAMES = ["fourier_dense", "fourier_iterative", "hermite_dense", "hermite_iterative", "large_iterative",
         "batch_dense", "batch_iterative", "propagation", "run_many"]


@pytest.mark.parametrize("name", NAMES)
def test_repeatable_same_thread_count(by_threads, name):
    a, b = by_threads[2][name], by_threads["2again"][name]
    assert np.array_equal(a, b), f"max |diff| = {np.max(np.abs(a - b)):.3e}"


@pytest.mark.parametrize("name", NAMES)
def test_identical_across_rayon_thread_counts(by_threads, name):
    a, b = by_threads[1][name], by_threads[2][name]
    if name in KNOWN_THREAD_COUNT_DIFFERENCES and not np.array_equal(a, b):
        pytest.xfail(KNOWN_THREAD_COUNT_DIFFERENCES[name] + f" (this run: max |diff| = {np.max(np.abs(a - b)):.3e})")
    assert np.array_equal(a, b), (
        f"{name}: RAYON_NUM_THREADS=1 vs 2 differ, max |diff| = {np.max(np.abs(a - b)):.3e}"
    )


def test_repeated_runs_in_process_bit_identical():
    grid = sw.FourierGrid(-10.0, 10.0, 200)
    V = 0.5 * grid.x**2 + 0.3 * np.cos(3 * grid.x)
    H = sw.Hamiltonian(grid, V)
    ref_d = H.solve(5, method="dense")
    ref_i = H.solve(5, method="iterative", tol=1e-10)
    ss = sw.SplitStep(grid, V, dt=0.01, order=2)
    psi = np.exp(-((grid.x - 0.5) ** 2)).astype(complex)
    ref_r = ss.run(psi, 100, record_every=25).states
    for _ in range(5):
        assert np.array_equal(H.solve(5, method="dense").energies, ref_d.energies)
        assert np.array_equal(H.solve(5, method="dense").vectors, ref_d.vectors)
        i = H.solve(5, method="iterative", tol=1e-10)
        assert np.array_equal(i.energies, ref_i.energies)
        assert np.array_equal(i.vectors, ref_i.vectors)
        assert np.array_equal(ss.run(psi, 100, record_every=25).states, ref_r)
        # A fresh, equal Hamiltonian gives the same bits too.
        assert np.array_equal(sw.Hamiltonian(grid, V.copy()).solve(5, method="dense").energies, ref_d.energies)
