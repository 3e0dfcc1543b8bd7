"""Benchmarks: specwell side by side with the best numpy/scipy script for the same job.

Run ``python -m specwell.bench`` (``--quick`` for smaller repeats, ``--only NAME``
to run the rows whose name contains NAME). Every row times both contenders in
the same process, checks that they agree, and prints the ratio
reference_time / specwell_time (> 1 means specwell is faster). Timings are the
best of several repeats (wall clock). Needs scipy (``pip install scipy``).

These are not tests: nothing here asserts a speed.
"""

from __future__ import annotations

import argparse
import os
import platform
import time
from dataclasses import dataclass
from typing import Callable, List, Optional

import numpy as np

import specwell as sw


@dataclass
class Row:
    name: str
    specwell_s: float
    reference_s: float
    reference: str
    target: str
    agreement: str

    @property
    def ratio(self) -> float:
        return self.reference_s / self.specwell_s


def best_time(fn: Callable[[], object], repeat: int, min_total: float = 0.2) -> float:
    """Best wall time of ``fn`` over ``repeat`` runs (more runs if each is very short)."""
    fn()  # warm-up (plans, caches, imports)
    times = []
    start = time.perf_counter()
    while len(times) < repeat or (time.perf_counter() - start < min_total and len(times) < 200):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


BENCHES: List[Callable[[argparse.Namespace], Row]] = []


def bench(fn: Callable[[argparse.Namespace], Row]) -> Callable[[argparse.Namespace], Row]:
    BENCHES.append(fn)
    return fn


# --------------------------------------------------------------------- dense eigen
@bench
def dense_eigen_1000(args: argparse.Namespace) -> Row:
    """All eigenpairs of the same 1000×1000 symmetric matrix (a Fourier-grid Hamiltonian)."""
    import scipy.linalg

    grid = sw.FourierGrid(-20.0, 20.0, 1000)
    a = sw.Hamiltonian(grid, lambda x: 0.5 * x**2 + 0.05 * x**4).matrix()
    r = 3 if args.quick else 5
    t_sw = best_time(lambda: sw.eigh(a), r)
    t_sp = best_time(lambda: scipy.linalg.eigh(a, driver="evd"), r)
    w_sw, _ = sw.eigh(a)
    w_sp = scipy.linalg.eigh(a, driver="evd", eigvals_only=True)
    err = np.max(np.abs(w_sw - w_sp)) / np.max(np.abs(w_sp))
    return Row("dense eigh, all pairs, n=1000", t_sw, t_sp, 'scipy.linalg.eigh(driver="evd")',
               "specwell ≤ 1.3× scipy (ratio ≥ 0.77)", f"max rel. diff {err:.1e}")


# ------------------------------------------------------------ quartic, Hermite basis
def _hermite_script(size: int, quad: int, count: int, potential: Callable[[np.ndarray], np.ndarray]):
    """The vectorised numpy/scipy script a user would write for the same job."""
    import scipy.linalg

    xi, w = np.polynomial.hermite.hermgauss(quad)
    # Orthonormal Hermite functions at the nodes by the normalised recurrence.
    psi = np.empty((size, quad))
    psi[0] = np.pi**-0.25 * np.exp(-0.5 * xi**2)
    if size > 1:
        psi[1] = np.sqrt(2.0) * xi * psi[0]
    for n in range(1, size - 1):
        psi[n + 1] = np.sqrt(2.0 / (n + 1)) * xi * psi[n] - np.sqrt(n / (n + 1)) * psi[n - 1]
    phi = psi * np.sqrt(w * np.exp(xi**2))
    v = (phi * potential(xi)) @ phi.T
    n = np.arange(size)
    p2 = np.diag(n + 0.5) - np.diag(0.5 * np.sqrt((n[:-2] + 1) * (n[:-2] + 2)), 2) \
        - np.diag(0.5 * np.sqrt((n[:-2] + 1) * (n[:-2] + 2)), -2)
    h = 0.5 * p2 + v
    return scipy.linalg.eigh(h, subset_by_index=[0, count - 1], eigvals_only=True)


@bench
def quartic_hermite_200(args: argparse.Namespace) -> Row:
    """Quartic oscillator V = x⁴, Hermite basis of 200 functions, lowest 20 levels."""
    size, quad, count = 200, 210, 20

    def pot(x):
        return x**4

    def run_sw():
        basis = sw.HermiteBasis(size, quadrature=quad)
        return sw.Hamiltonian(basis, pot).solve(count, method="dense").energies

    r = 5 if args.quick else 20
    t_sw = best_time(run_sw, r)
    t_np = best_time(lambda: _hermite_script(size, quad, count, pot), r)
    err = np.max(np.abs(run_sw() - _hermite_script(size, quad, count, pot)))
    return Row("quartic, Hermite N=200, lowest 20", t_sw, t_np,
               "numpy hermgauss + recurrence + eigh(subset)", "ratio ≥ 4", f"max |ΔE| {err:.1e}")


# ------------------------------------------------------------ matrix-free lowest states
def _grid_matrix(n: int, pot):
    grid = sw.FourierGrid(-20.0, 20.0, n)
    return grid, sw.Hamiltonian(grid, pot)


def _anharmonic(x):
    return 0.5 * x**2 + 0.01 * x**4


def _lowest_iterative_vs_dense(n: int, count: int, args, extrapolate_from=None, pot=_anharmonic) -> Row:
    import scipy.linalg

    grid, h = _grid_matrix(n, pot)
    r = 2 if args.quick else 3
    t_sw = best_time(lambda: h.solve(count, method="iterative"), r)
    e_sw = h.solve(count, method="iterative").energies
    if extrapolate_from is None:
        a = h.matrix()
        t_sp = best_time(lambda: scipy.linalg.eigh(a, subset_by_index=[0, count - 1], eigvals_only=True), 1, 0.0)
        e_sp = scipy.linalg.eigh(a, subset_by_index=[0, count - 1], eigvals_only=True)
        how = "scipy.linalg.eigh(subset_by_index) on the dense grid matrix"
        agree = f"max |ΔE| {np.max(np.abs(e_sw - e_sp)):.1e}"
    else:
        # O(N³) extrapolation from two measured sizes (said so in the row).
        n1, n2 = extrapolate_from
        ts = []
        for m in (n1, n2):
            a = _grid_matrix(m, pot)[1].matrix()
            ts.append(best_time(lambda: scipy.linalg.eigh(a, subset_by_index=[0, count - 1], eigvals_only=True), 1, 0.0))
        p = np.log(ts[1] / ts[0]) / np.log(n2 / n1)
        t_sp = ts[1] * (n / n2) ** p
        how = f"scipy eigh(subset), extrapolated from N={n1},{n2} (measured exponent {p:.2f})"
        agree = f"E0 error vs (n+½)-like reference: {abs(e_sw[0] - _grid_matrix(2048, pot)[1].solve(1).energies[0]):.1e}"
    return Row(f"lowest {count}, N={n}", t_sw, t_sp, how, "", agree)


@bench
def iterative_2048(args: argparse.Namespace) -> Row:
    row = _lowest_iterative_vs_dense(2048, 10, args)
    row.target = "ratio ≥ 20"
    return row


@bench
def iterative_2048_rough(args: argparse.Namespace) -> Row:
    """A finite square well: its states are not resolved on a coarse grid, so the
    coarse-grid start helps little and LOBPCG does the work (report only)."""
    row = _lowest_iterative_vs_dense(2048, 10, args, pot=lambda x: np.where(np.abs(x) < 3.0, 0.0, 5.0))
    row.name = "lowest 10, N=2048, square well (rough)"
    row.target = "report"
    return row


@bench
def iterative_8192(args: argparse.Namespace) -> Row:
    row = _lowest_iterative_vs_dense(8192, 10, args, extrapolate_from=(2048, 4096))
    row.target = "ratio ≥ 100"
    return row


@bench
def iterative_equal_accuracy(args: argparse.Namespace) -> Row:
    """Smooth double well, lowest 10 to 1e-8 relative: specwell (N by convergence) vs FD + eigsh shift-invert."""
    import scipy.sparse
    import scipy.sparse.linalg

    pot = lambda x: 0.05 * (x**2 - 9.0) ** 2 - 2.0  # noqa: E731
    lo, hi, count = -10.0, 10.0, 10
    ref = sw.Hamiltonian(sw.FourierGrid(lo, hi, 1024), pot).solve(count, method="dense").energies
    scale = np.maximum(np.abs(ref), 1.0)
    n_sw = 64
    while np.max(np.abs(sw.Hamiltonian(sw.FourierGrid(lo, hi, n_sw), pot).solve(count).energies - ref) / scale) > 1e-8:
        n_sw = int(n_sw * 1.25)

    def fd(n):
        x = np.linspace(lo, hi, n + 2)[1:-1]
        h = x[1] - x[0]
        main = 1.0 / h**2 + pot(x)
        off = -0.5 / h**2 * np.ones(n - 1)
        a = scipy.sparse.diags([off, main, off], [-1, 0, 1], format="csc")
        return np.sort(scipy.sparse.linalg.eigsh(a, k=count, sigma=ref[0] - 1.0, which="LM", return_eigenvectors=False))

    n_fd = 2000
    while np.max(np.abs(fd(n_fd) - ref) / scale) > 1e-8 and n_fd < 20_000_000:
        n_fd = int(n_fd * 1.6)
    err_fd = np.max(np.abs(fd(n_fd) - ref) / scale)
    r = 2 if args.quick else 3
    t_sw = best_time(lambda: sw.Hamiltonian(sw.FourierGrid(lo, hi, n_sw), pot).solve(count), r)
    t_fd = best_time(lambda: fd(n_fd), 1, 0.0)
    return Row("double well, lowest 10 to 1e-8", t_sw, t_fd,
               f"2nd-order FD ({n_fd} pts) + eigsh(sigma) shift-invert", "ratio ≥ 30",
               f"specwell N={n_sw}; FD rel. err {err_fd:.1e}")


@bench
def iterative_2p20_memory(args: argparse.Namespace) -> Row:
    """Lowest 5 states at N = 2^20 in a fresh process: wall time and peak RSS."""
    import subprocess
    import sys

    code = (
        "import resource, time, numpy as np, specwell as sw\n"
        "g = sw.FourierGrid(-400.0, 400.0, 1 << 20)\n"
        "h = sw.Hamiltonian(g, lambda x: np.minimum(0.5 * x**2, 200.0))\n"
        "t = time.perf_counter(); s = h.solve(5, method='iterative'); t = time.perf_counter() - t\n"
        "print(t, resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, np.max(np.abs(s.energies - np.arange(5) - 0.5)))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.split()
    t, rss_kib, err = float(out[0]), int(out[1]), float(out[2])
    return Row("lowest 5, N=2^20 (fresh process)", t, float("nan"), "—",
               f"peak RSS {rss_kib / 1024:.0f} MiB (target < 1024)", f"max |E − (n+½)| {err:.1e}")


# -------------------------------------------------------------------- batch sweeps
@bench
def batch_field_sweep(args: argparse.Namespace) -> Row:
    """200-point field sweep, lowest 5, N = 512: solve_batch vs a numpy/scipy loop."""
    import scipy.linalg

    grid = sw.FourierGrid(-30.0, 30.0, 512)
    x = grid.x
    fields = np.linspace(0.0, 0.05, 200)
    pots = np.array([0.15 * x**2 + f * x for f in fields])
    t_kin = sw.Hamiltonian(grid, np.zeros(512)).matrix()

    def scipy_loop():
        return np.array([scipy.linalg.eigh(t_kin + np.diag(p), subset_by_index=[0, 4], eigvals_only=True) for p in pots])

    r = 2 if args.quick else 3
    t_sw = best_time(lambda: sw.solve_batch(grid, pots, 5), r)
    t_sp = best_time(scipy_loop, 1, 0.0)
    err = np.max(np.abs(sw.solve_batch(grid, pots, 5).energies - scipy_loop()))
    return Row("200-field sweep, lowest 5, N=512", t_sw, t_sp, "loop of scipy.linalg.eigh(subset_by_index)",
               "ratio ≥ 20", f"max |ΔE| {err:.1e}")


# ------------------------------------------------------------------- propagation
def _numpy_split_step(psi, vphase, kphase, steps):
    """The best plain numpy/scipy loop: scipy.fft in place, phases precomputed, half kicks merged.

    Returns the state before its closing half kick (one full kick is applied per step).
    """
    import scipy.fft

    psi = psi * np.sqrt(vphase)  # opening half kick; each later full kick closes one step and opens the next
    for _ in range(steps):
        psi = scipy.fft.fft(psi, overwrite_x=True)
        psi *= kphase
        psi = scipy.fft.ifft(psi, overwrite_x=True)
        psi *= vphase
    return psi


def _split_step_problem(n: int):
    """The propagation job of the split-step rows: (grid, potential, dt, propagator, ψ0)."""
    grid = sw.FourierGrid(-40.0, 40.0, n)
    dt = 1e-3
    prop = sw.SplitStep(grid, _anharmonic, dt=dt)
    return grid, _anharmonic, dt, prop, sw.gaussian_packet(grid, 1.0, 0.5, 1.0)


def _split_step_case(n: int, steps: int, args: argparse.Namespace):
    grid, pot, dt, prop, psi0 = _split_step_problem(n)
    v = pot(grid.x)
    vphase = np.exp(-1j * v * dt)  # merged half kicks
    kphase = np.exp(-1j * 0.5 * grid.k**2 * dt)
    r = 3 if args.quick else 5
    t_sw = best_time(lambda: prop.run(psi0, steps, record_every=steps), r) / steps
    t_np = best_time(lambda: _numpy_split_step(psi0, vphase, kphase, steps), r) / steps
    # Agreement: same Strang scheme (the numpy loop lacks the final half kick; undo it).
    a = prop.run(psi0, steps, record_every=steps).states[-1]
    b = _numpy_split_step(psi0, vphase, kphase, steps) * np.exp(0.5j * v * dt)  # full kick → half kick
    err = np.max(np.abs(a - b)) / np.max(np.abs(a))
    return t_sw, t_np, err


@bench
def split_step_1024(args: argparse.Namespace) -> Row:
    """Strang split step, N = 1024, per step."""
    steps = 2000 if args.quick else 20000
    t_sw, t_np, err = _split_step_case(1024, steps, args)
    floor = _step_over_fft_pair(1024, 10 if args.quick else 30)
    return Row("split step N=1024 (per step)", t_sw, t_np, "scipy.fft loop, overwrite_x, phases precomputed",
               f"ratio ≥ 3.5; specwell/2 bare FFTs = {floor:.2f} (target ≤ 1.3)", f"max rel. diff {err:.1e}")


def _step_over_fft_pair(n: int, rounds: int) -> float:
    """Split step over two bare FFTs of the same size, timed alternately (about 10 ms
    each, best of `rounds`) so that both see the same machine conditions."""
    _, _, _, prop, psi0 = _split_step_problem(n)
    steps = max(1, 2_000_000 // n)
    t_step, t_pair = float("inf"), float("inf")
    for _ in range(rounds):
        t0 = time.perf_counter()
        prop.run(psi0, steps, record_every=steps)
        t_step = min(t_step, (time.perf_counter() - t0) / steps)
        t_pair = min(t_pair, sw._core._bare_fft_pair_seconds(n, 1))
    return t_step / t_pair


@bench
def split_step_2p18(args: argparse.Namespace) -> Row:
    """Strang split step, N = 2^18, per step."""
    steps = 10 if args.quick else 40
    t_sw, t_np, err = _split_step_case(1 << 18, steps, args)
    fft_pair = sw._core._bare_fft_pair_seconds(1 << 18, 3)
    return Row("split step N=2^18 (per step)", t_sw, t_np, "scipy.fft loop, overwrite_x, phases precomputed",
               f"ratio ≥ 1.6; specwell/2 bare FFTs = {t_sw / fft_pair:.2f}", f"max rel. diff {err:.1e}")


@bench
def split_step_many_packets(args: argparse.Namespace) -> Row:
    """64 independent packets, N = 1024: run_many (parallel) vs one batched numpy loop (2-D FFT over rows)."""
    import scipy.fft

    n, m = 1024, 64
    steps = 200 if args.quick else 1000
    grid = sw.FourierGrid(-40.0, 40.0, n)
    pot = lambda x: 0.5 * x**2  # noqa: E731
    dt = 1e-3
    prop = sw.SplitStep(grid, pot, dt=dt)
    psi0s = np.array([sw.gaussian_packet(grid, x0, 0.0, 1.0) for x0 in np.linspace(-5, 5, m)])
    vphase = np.exp(-1j * pot(grid.x) * dt)
    kphase = np.exp(-1j * 0.5 * grid.k**2 * dt)

    def numpy_batch():
        psi = psi0s * np.sqrt(vphase)
        for _ in range(steps):
            psi = scipy.fft.fft(psi, axis=1, overwrite_x=True)
            psi *= kphase
            psi = scipy.fft.ifft(psi, axis=1, overwrite_x=True)
            psi *= vphase
        return psi

    r = 2 if args.quick else 3
    t_sw = best_time(lambda: prop.run_many(psi0s, steps, record_every=steps), r)
    t_np = best_time(numpy_batch, r)
    t_serial = best_time(lambda: [prop.run(p, steps, record_every=steps) for p in psi0s], r)
    return Row(f"{m} packets × {steps} steps, N={n}", t_sw, t_np, "batched scipy.fft loop (axis=1)",
               f"parallel speed-up over serial specwell: {t_serial / t_sw:.2f}× on {os.cpu_count()} cores", "—")


# ------------------------------------------------------- 2D / 3D split step (product grids)
def interleaved_times(fns: List[Callable[[], object]], rounds: int) -> List[List[float]]:
    """Wall time of each of ``fns`` per round, the functions alternating within every round
    (after one warm-up call each), so that all see the same machine conditions."""
    for fn in fns:
        fn()
    times: List[List[float]] = [[] for _ in fns]
    for _ in range(rounds):
        for k, fn in enumerate(fns):
            t0 = time.perf_counter()
            fn()
            times[k].append(time.perf_counter() - t0)
    return times


def _split_step_nd(shape: tuple, box: float, steps: int, rounds: int, name: str, target: str) -> Row:
    """Strang split step on a product grid against the tuned scipy.fft loop (fft2/fftn, workers=2,
    overwrite_x, phases precomputed, half kicks merged), both timed the same way (interleaved
    rounds of `steps` steps; min and median), plus both sides over their own bare FFT pair."""
    import scipy.fft

    axes = [sw.FourierGrid(-box, box, n) for n in shape]
    grid = sw.ProductGrid(*axes)
    coords = grid.mesh(sparse=True)
    v = sum(0.5 * c**2 + 0.01 * c**4 for c in coords) * np.ones(grid.shape)
    dt = 1e-3
    prop = sw.SplitStep(grid, v, dt=dt)
    psi0 = sw.gaussian_packet(grid, tuple(1.0 for _ in shape), 0.5, 1.0)
    ksq = grid.k_squared
    vphase = np.exp(-1j * v * dt)
    kphase = np.exp(-1j * 0.5 * ksq * dt)
    half = np.sqrt(vphase)
    fwd, inv = (scipy.fft.fft2, scipy.fft.ifft2) if len(shape) == 2 else (scipy.fft.fftn, scipy.fft.ifftn)

    def scipy_loop():
        psi = psi0 * half
        for _ in range(steps):
            psi = fwd(psi, overwrite_x=True, workers=2)
            psi *= kphase
            psi = inv(psi, overwrite_x=True, workers=2)
            psi *= vphase
        return psi

    buf = psi0.copy()

    def scipy_bare():
        nonlocal buf
        for _ in range(steps):
            buf = inv(fwd(buf, overwrite_x=True, workers=2), overwrite_x=True, workers=2)

    bare_sw: List[float] = []  # seconds per pair, as timed inside the core (same scratch as a run)
    t_sw, t_np, t_bare_np, _ = interleaved_times(
        [lambda: prop.run(psi0, steps, record_every=steps), scipy_loop, scipy_bare,
         lambda: bare_sw.append(sw._core._bare_grid_fft_pair_seconds(grid, 1))], rounds)
    per = lambda ts: (min(ts) / steps, float(np.median(ts)) / steps)  # noqa: E731
    (sw_min, sw_med), (np_min, np_med), (bnp_min, _) = per(t_sw), per(t_np), per(t_bare_np)
    bsw_min = min(bare_sw)
    a = prop.run(psi0, steps, record_every=steps).states[-1]
    b = scipy_loop() * np.exp(0.5j * v * dt)  # full closing kick → half kick
    err = np.max(np.abs(a - b)) / np.max(np.abs(a))
    return Row(name, sw_min, np_min, "scipy.fft loop (workers=2, overwrite_x, phases precomputed)",
               f"{target}; median ratio {np_med / sw_med:.2f}; step/2 bare FFTs: specwell {sw_min / bsw_min:.2f}, "
               f"scipy {np_min / bnp_min:.2f}; bare FFT pair scipy/specwell {bnp_min / bsw_min:.2f}",
               f"max rel. diff {err:.1e}")


@bench
def split_step_2d_512(args: argparse.Namespace) -> Row:
    """Strang split step on a 512×512 ProductGrid, per step."""
    return _split_step_nd((512, 512), 20.0, 5 if args.quick else 20, 3 if args.quick else 7,
                          "split step 2D 512² (per step)", "ratio ≥ 1.5")


@bench
def split_step_3d_128(args: argparse.Namespace) -> Row:
    """Strang split step on a 128³ ProductGrid, per step."""
    return _split_step_nd((128, 128, 128), 10.0, 2 if args.quick else 5, 3 if args.quick else 7,
                          "split step 3D 128³ (per step)", "ratio ≥ 1.3")


# -------------------------------------------------------------- heterostructures
def paired_times(fa: Callable[[], object], fb: Callable[[], object], repeat: int, min_total: float = 0.3):
    """Time two contenders the same way: interleaved runs (a, b, a, b, …) after one warm-up
    each, at least ``repeat`` pairs and ``min_total`` seconds; returns (min, median) of each."""
    fa(), fb()
    ta, tb = [], []
    start = time.perf_counter()
    while len(ta) < repeat or (time.perf_counter() - start < min_total and len(ta) < 200):
        for f, out in ((fa, ta), (fb, tb)):
            t0 = time.perf_counter()
            f()
            out.append(time.perf_counter() - t0)
    return (min(ta), float(np.median(ta))), (min(tb), float(np.median(tb)))


def _hbar2_2me() -> float:
    from scipy.constants import e, hbar, m_e

    return hbar**2 / (2 * m_e) / (1e-3 * e) * 1e18  # meV nm² (CODATA via scipy.constants)


def transfer_matrix_levels(layers, hbar2_2me: float, scan: int = 40000) -> np.ndarray:
    """Exact bound levels of flat layers (no field) with BenDaniel-Duke matching: the
    transfer matrix of (ψ, ψ'/m) across each layer (cos/sin or cosh/sinh), a decaying
    start in the left cladding and D(E) = φ + (κ_R/m_R)ψ = 0 at the right edge; roots by a
    fine scan and scipy.optimize.brentq. The outer layers are the semi-infinite claddings,
    so only the inner layers are crossed (the decaying tails are exact)."""
    from scipy.optimize import brentq

    t = np.array([l[0] for l in layers], float)
    v = np.array([l[1] for l in layers], float)
    m = np.array([l[2] for l in layers], float)
    top = min(v[0], v[-1])

    def d(energy):
        psi, phi = 1.0, np.sqrt(m[0] * (v[0] - energy) / hbar2_2me) / m[0]
        for ti, vi, mi in zip(t[1:-1], v[1:-1], m[1:-1]):
            q = mi * (energy - vi) / hbar2_2me
            if q > 0:
                k = np.sqrt(q)
                c, s_ = np.cos(k * ti), np.sin(k * ti)
                psi, phi = psi * c + mi * phi / k * s_, -k / mi * psi * s_ + phi * c
            else:
                k = np.sqrt(-q)
                c, s_ = np.cosh(k * ti), np.sinh(k * ti)
                psi, phi = psi * c + mi * phi / k * s_, k / mi * psi * s_ + phi * c
            norm = np.hypot(psi, phi)
            psi, phi = psi / norm, phi / norm
        return phi + np.sqrt(m[-1] * (v[-1] - energy) / hbar2_2me) / m[-1] * psi

    grid = np.linspace(v.min() + 1e-9, top - 1e-9, scan)
    vals = np.array([d(x) for x in grid])
    roots = [brentq(d, grid[i], grid[i + 1], xtol=1e-14, rtol=1e-15)
             for i in np.flatnonzero(np.sign(vals[:-1]) * np.sign(vals[1:]) < 0)]
    return np.array(roots)


def fd_richardson_levels(layers, h: float, count: int, hbar2_2me: float, cladding: float = 20.0,
                         field_kv_cm: float = 0.0) -> np.ndarray:
    """The competent finite-difference script: nodes on every interface (h must divide all
    layer thicknesses and the cladding), 1/m at half points, cell-averaged V, ψ = 0 at the
    cladding ends, lowest `count` by scipy.linalg.eigh_tridiagonal(select="i") after the
    symmetric scaling, Richardson extrapolation from h and h/2 (O(h²) → O(h⁴))."""
    import scipy.linalg

    bounds = np.concatenate([[0.0], np.cumsum([l[0] for l in layers])])
    total = bounds[-1]

    def levels(step):
        z = np.arange(-cladding, total + cladding + step / 2, step)
        idx = lambda zz: np.clip(np.searchsorted(bounds, zz, side="right") - 1, 0, len(layers) - 1)  # noqa: E731
        edge = np.array([l[1] for l in layers])
        mass = np.array([l[2] for l in layers])
        field = lambda zz: 0.1 * field_kv_cm * (np.clip(zz, 0.0, total) - total / 2)  # noqa: E731
        # Cell averages of V over [z − h/2, z + h/2] from the two half cells.
        lo, hi = z - step / 4, z + step / 4
        v = 0.5 * (edge[idx(lo)] + field(lo) + edge[idx(hi)] + field(hi))
        w = 1.0 / mass[idx(z[:-1] + step / 2)]
        inner = slice(1, len(z) - 1)
        diag = hbar2_2me / step**2 * (w[:-1] + w[1:]) + v[inner]
        off = -hbar2_2me / step**2 * w[1:-1]
        return scipy.linalg.eigh_tridiagonal(diag, off, select="i", select_range=(0, count - 1), eigvals_only=True)

    coarse, fine = levels(h), levels(h / 2)
    return fine + (fine - coarse) / 3.0


THREE_WELLS = [(15.0, 800.0, 0.09), (14.0, 0.0, 0.067), (2.0, 800.0, 0.09), (12.0, 0.0, 0.067),
               (2.0, 800.0, 0.09), (14.0, 0.0, 0.067), (15.0, 800.0, 0.09)]


def _fd_step_for(layers, count, ref, target, c):
    """Largest h = 1/k (nodes on the integer interfaces) whose Richardson levels meet `target`."""
    for k in range(1, 400):
        h = 1.0 / k
        e = fd_richardson_levels(layers, h, count, c)
        err = np.max(np.abs(e - ref) / np.abs(ref))
        if err <= target:
            return h, err
    return h, err


@bench
def heterostructure_three_wells(args: argparse.Namespace) -> Row:
    """Three coupled wells (illustrative parameters), lowest 10 subbands: specwell to 1e-10
    against the competent FD + Richardson script at 1e-6."""
    c = _hbar2_2me()
    count = 10
    ref = transfer_matrix_levels(THREE_WELLS, c)[:count]
    stack = sw.Heterostructure([sw.Layer(*l) for l in THREE_WELLS])
    err_sw = np.max(np.abs(stack.solve(count, accuracy=1e-10).energies - ref) / ref)
    h, err_fd = _fd_step_for(THREE_WELLS, count, ref, 1e-6, c)
    r = 5 if args.quick else 15
    (t_sw, m_sw), (t_fd, m_fd) = paired_times(lambda: stack.solve(count, accuracy=1e-10),
                                              lambda: fd_richardson_levels(THREE_WELLS, h, count, c), r)
    return Row("3-well stack, lowest 10: specwell 1e-10 vs FD+Richardson 1e-6", t_sw, t_fd,
               f"FD BenDaniel-Duke, nodes on interfaces, h={h:.4g}/{h / 2:.4g} nm + Richardson, eigh_tridiagonal(select) "
               f"(medians: specwell {_fmt(m_sw)}, FD {_fmt(m_fd)})",
               "ratio ≥ 10", f"rel. err vs transfer matrix: specwell {err_sw:.1e}, FD {err_fd:.1e}")


@bench
def heterostructure_three_wells_fourier(args: argparse.Namespace) -> Row:
    """The same stack: spectral elements (1e-10) against the Fourier-mode path sized to 1e-6."""
    c = _hbar2_2me()
    count, pad = 10, 20.0
    ref = transfer_matrix_levels(THREE_WELLS, c)[:count]
    stack = sw.Heterostructure([sw.Layer(*l) for l in THREE_WELLS])

    def fourier(n):
        grid = sw.FourierGrid(-pad, stack.total_thickness + pad, n)
        return sw.Hamiltonian(grid, stack, units="semiconductor").solve(count, method="dense").energies

    n = 257
    while np.max(np.abs(fourier(n) - ref) / ref) > 1e-6 and n < 8193:
        n = 2 * n - 1
    err_f = np.max(np.abs(fourier(n) - ref) / ref)
    (t_sw, m_sw), (t_f, m_f) = paired_times(lambda: stack.solve(count, accuracy=1e-10), lambda: fourier(n), 2, 0.0)
    return Row("3-well stack, lowest 10: elements 1e-10 vs Fourier modes 1e-6", t_sw, t_f,
               f"specwell Hamiltonian(FourierGrid, stack), {n} modes, dense (the previous default)",
               "ratio ≥ 1000", f"rel. err vs transfer matrix: elements "
               f"{np.max(np.abs(stack.solve(count, accuracy=1e-10).energies - ref) / ref):.1e}, Fourier {err_f:.1e}")


@bench
def heterostructure_field_sweep(args: argparse.Namespace) -> Row:
    """A double well in 200 fields, 5 levels to 1e-10 (solve_batch of stacks), beside a loop of
    the FD + Richardson script at 1e-6."""
    c = _hbar2_2me()
    # Illustrative double well with five bound levels at every field of the sweep.
    layers = [(15.0, 500.0, 0.09), (10.0, 0.0, 0.067), (3.0, 500.0, 0.09), (10.0, 0.0, 0.067), (15.0, 500.0, 0.09)]
    fields = np.linspace(-30.0, 30.0, 200)
    stacks = [sw.Heterostructure([sw.Layer(*l) for l in layers], f) for f in fields]
    count = 5
    batch = sw.solve_batch(None, stacks, count, accuracy=1e-10)
    # Agreement at three fields against the FD script at a fine step (its own O(h⁴) error ~1e-9).
    check = [0, 100, 199]
    fine = np.array([fd_richardson_levels(layers, 1 / 16, count, c, field_kv_cm=fields[i]) for i in check])
    agree = np.max(np.abs(batch.energies[check] - fine) / np.abs(fine))
    h = 0.5  # FD+Richardson at h = 0.5/0.25 nm: ~1e-6 on this stack
    loop = lambda: [fd_richardson_levels(layers, h, count, c, field_kv_cm=f) for f in fields]  # noqa: E731
    err_fd = np.max(np.abs(np.array(loop())[check] - fine) / np.abs(fine))
    r = 2 if args.quick else 5
    (t_sw, m_sw), (t_fd, m_fd) = paired_times(lambda: sw.solve_batch(None, stacks, count, accuracy=1e-10), loop, r)
    return Row("200-field sweep of a double well, 5 levels to 1e-10", t_sw, t_fd,
               f"loop of FD+Richardson (h={h}/{h / 2} nm) (medians: specwell {_fmt(m_sw)}, FD {_fmt(m_fd)})",
               "specwell ≤ 100 ms on 2 cores (report)",
               f"max rel. diff vs FD h=1/16 nm: specwell {agree:.1e}, FD loop {err_fd:.1e}")


# ------------------------------------------------------------------ transport
def _tm_layer_matrices(e, layers, field_kv_cm, hbar2_2me):
    """Transfer matrices (ψ, ψ'/m) of every layer at the energies `e` (vectorised): plane
    waves / exponentials for flat layers, Airy functions (scipy.special.airy and the scaled
    airye for positive arguments, Abramowitz & Stegun 10.4) in a field. Yields (M, log-scale)
    with M = e^s·M̃, shape (len(e), 2, 2)."""
    from scipy.special import airy, airye

    total = sum(l[0] for l in layers)
    g = 0.1 * field_kv_cm
    z = 0.0
    for t, ec, m in layers:
        va = ec + g * (z - total / 2)
        z += t
        if g == 0.0:
            q2 = (m * (va - e) / hbar2_2me).astype(complex)
            kap = np.sqrt(q2)
            x = kap * t
            big = np.abs(x.real) > 300
            s = np.where(big, np.abs(x.real), 0.0)
            ep, em = np.exp(x - s), np.exp(-x - s)
            c = 0.5 * (ep + em)
            sh = np.where(np.abs(x) < 1e-8, t * np.exp(-s), 0.5 * (ep - em) / np.where(x == 0, 1, kap))
            M = np.empty(e.shape + (2, 2), complex)
            M[:, 0, 0], M[:, 0, 1], M[:, 1, 0], M[:, 1, 1] = c, m * sh, q2 * sh / m, c
            yield M, s
            continue
        beta = np.cbrt(m * g / hbar2_2me)
        xa = beta * (va - e) / g
        xb = xa + beta * t

        def scaled(x):
            pos = x >= 0
            ai, aip, bi, bip = airy(np.where(pos, 0.0, x))
            eai, eaip, ebi, ebip = airye(np.where(pos, x, 0.0))
            zeta = (2.0 / 3.0) * np.where(pos, x, 0.0) ** 1.5
            return (np.where(pos, eai, ai), np.where(pos, eaip, aip), np.where(pos, ebi, bi),
                    np.where(pos, ebip, bip), zeta)

        aa, apa, ba, bpa, za = scaled(xa)
        ab, apb, bb, bpb, zb = scaled(xb)
        P, Q = za - zb, zb - za  # exponents of Ai(b)Bi(a)- and Bi(b)Ai(a)-type products
        s = np.maximum(P, Q)
        eP, eQ = np.exp(P - s), np.exp(Q - s)
        M = np.empty(e.shape + (2, 2))
        M[:, 0, 0] = np.pi * (ab * bpa * eP - bb * apa * eQ)
        M[:, 0, 1] = (np.pi * m / beta) * (bb * aa * eQ - ab * ba * eP)
        M[:, 1, 0] = (np.pi * beta / m) * (apb * bpa * eP - bpb * apa * eQ)
        M[:, 1, 1] = np.pi * (bpb * aa * eQ - apb * ba * eP)
        yield M, s


def numpy_transfer_matrix_t(layers, energies, field_kv_cm=0.0, hbar2_2me=None):
    """The competent vectorised numpy script for T(E) of a BenDaniel-Duke stack: layer
    transfer matrices of (ψ, ψ'/m) multiplied over the layers for all energies at once
    (explicit 2×2 products, renormalised per layer), then the lead plane waves:
    T = (k_L/m_L)/(k_R/m_R)/|N₂₂|² with N = P_R⁻¹ M P_L (e.g. Bastard 1988, ch. III;
    Airy layers as in Ando & Itoh 1987)."""
    c = _hbar2_2me() if hbar2_2me is None else hbar2_2me
    e = np.asarray(energies, dtype=float)
    total = sum(l[0] for l in layers)
    g = 0.1 * field_kv_cm
    vl, ml = layers[0][1] - g * total / 2, layers[0][2]
    vr, mr = layers[-1][1] + g * total / 2, layers[-1][2]
    tot = None
    logs = np.zeros(e.shape)
    for M, s in _tm_layer_matrices(e, layers, field_kv_cm, c):
        if tot is None:
            tot = M.astype(complex)
        else:
            a = M[:, 0, 0, None] * tot[:, 0, :] + M[:, 0, 1, None] * tot[:, 1, :]
            b = M[:, 1, 0, None] * tot[:, 0, :] + M[:, 1, 1, None] * tot[:, 1, :]
            tot = np.stack([a, b], axis=1)
        n = np.max(np.abs(tot), axis=(1, 2))
        tot /= n[:, None, None]
        logs += s + np.log(n)
    kl = np.sqrt((ml * (e - vl) / c).astype(complex))
    kr = np.sqrt((mr * (e - vr) / c).astype(complex))
    a, b = 1j * kl / ml, 1j * kr / mr
    with np.errstate(divide="ignore", invalid="ignore", under="ignore"):
        n22 = 0.5 * ((tot[:, 0, 0] - a * tot[:, 0, 1]) - (tot[:, 1, 0] - a * tot[:, 1, 1]) / b)
        t = ((kl / ml) / (kr / mr)).real * np.exp(-2 * logs) / np.abs(n22) ** 2
    return np.where(e > max(vl, vr), np.nan_to_num(t), 0.0)


DOUBLE_BARRIER = [(5.0, 0.0, 0.067), (3.0, 300.0, 0.092), (5.0, 0.0, 0.067), (3.0, 300.0, 0.092), (5.0, 0.0, 0.067)]


@bench
def transmission_double_barrier(args: argparse.Namespace) -> Row:
    """T(E) of a double barrier (illustrative GaAs/AlGaAs-like parameters, mass steps) at 1,200
    energies: specwell (QTBM on elements, accuracy 1e-10) beside the vectorised numpy
    transfer matrix (exact for flat layers, ~1e-13)."""
    stack = sw.Heterostructure([sw.Layer(*l) for l in DOUBLE_BARRIER])
    e = np.linspace(0.1, 600.0, 1200)
    c = _hbar2_2me()
    r = 5 if args.quick else 20
    (t_sw, m_sw), (t_np, m_np) = paired_times(lambda: stack.transmission(e), lambda: numpy_transfer_matrix_t(DOUBLE_BARRIER, e, 0.0, c), r)
    diff = np.max(np.abs(stack.transmission(e) - numpy_transfer_matrix_t(DOUBLE_BARRIER, e, 0.0, c)))
    return Row("T(E), double barrier, 1200 energies", t_sw, t_np,
               f"vectorised numpy transfer matrix (medians: specwell {_fmt(m_sw)}, numpy {_fmt(m_np)})",
               "specwell ≤ 50 ms", f"max |ΔT| {diff:.1e}")


def _numpy_tsu_esaki(layers, bias, temperature, fermi, epsrel=1e-8, c=None):
    """The numpy script for one Tsu-Esaki point: the field F = −10⁴V/L, T(E) by the
    vectorised transfer matrix, the supply function, resonances located as the local maxima
    of T on a 2,000-point scan (cuts at each peak and ± its half width from the scan), and
    vectorised adaptive Gauss-Legendre (10 points, every active interval per call) to epsrel."""
    import scipy.constants as C

    c = _hbar2_2me() if c is None else c
    total = sum(l[0] for l in layers)
    field = -1e4 * bias / total
    g = 0.1 * field
    vl, vr = layers[0][1] - g * total / 2, layers[-1][1] + g * total / 2
    kt = C.k * temperature / (C.e * 1e-3)
    mu_l = vl + fermi
    mu_r = mu_l - 1000 * bias
    lo, hi = max(vl, vr), max(mu_l, mu_r) + 40 * kt
    if hi <= lo or bias == 0.0:
        return 0.0
    pref = C.e * layers[0][2] * C.m_e * C.k * temperature / (2 * np.pi**2 * C.hbar**3) * (C.e * 1e-3) * 1e-4

    def f(x):
        s = np.logaddexp(0.0, (mu_l - x) / kt) - np.logaddexp(0.0, (mu_r - x) / kt)
        return numpy_transfer_matrix_t(layers, x, field, c) * s

    scan = np.linspace(lo, hi, 2001)[1:]
    ts = numpy_transfer_matrix_t(layers, scan, field, c)
    peaks = np.flatnonzero((ts[1:-1] > ts[:-2]) & (ts[1:-1] >= ts[2:])) + 1
    cuts = [lo]
    for p in peaks:
        cuts += [scan[p - 1], scan[p], scan[p + 1]]
    cuts = np.unique(np.clip(cuts + [hi], lo, hi))
    xg, wg = np.polynomial.legendre.leggauss(10)

    def gl(a, b):
        mid, half = 0.5 * (a + b), 0.5 * (b - a)
        x = mid[:, None] + half[:, None] * xg
        return half * (f(x.ravel()).reshape(x.shape) @ wg)

    a, b = cuts[:-1], cuts[1:]
    whole = gl(a, b)
    done = 0.0
    for _ in range(60):
        m = 0.5 * (a + b)
        left, right = gl(a, m), gl(m, b)
        halves = left + right
        err = np.abs(halves - whole)
        est = done + halves.sum()
        ok = err <= 0.5 * epsrel * abs(est) / len(a)
        done += halves[ok].sum()
        if ok.all():
            break
        a, m, b = a[~ok], m[~ok], b[~ok]
        a, b = np.concatenate([a, m]), np.concatenate([m, b])
        whole = np.concatenate([left[~ok], right[~ok]])
    return pref * done


@bench
def current_voltage_double_barrier(args: argparse.Namespace) -> Row:
    """A 41-point J–V curve (0 to 0.4 V, 77 K, E_F = 30 meV) of the same double barrier:
    specwell.current_voltage (accuracy 1e-8) beside a loop of the numpy transfer-matrix
    Tsu-Esaki script (Airy layers, adaptive Gauss-Legendre, 1e-8)."""
    stack = sw.Heterostructure([sw.Layer(*l) for l in DOUBLE_BARRIER])
    v = np.linspace(0.0, 0.4, 41)
    c = _hbar2_2me()
    loop = lambda: np.array([_numpy_tsu_esaki(DOUBLE_BARRIER, x, 77.0, 30.0, 1e-8, c) for x in v])  # noqa: E731
    r = 2 if args.quick else 3
    (t_sw, m_sw), (t_np, m_np) = paired_times(lambda: stack.current_voltage(v, 77.0, 30.0), loop, r, 0.0)
    j_sw, j_np = stack.current_voltage(v, 77.0, 30.0), loop()
    rel = np.max(np.abs(j_sw[1:] - j_np[1:]) / np.abs(j_np[1:]))
    return Row("J–V, double barrier, 41 biases", t_sw, t_np,
               f"loop of a numpy transfer-matrix Tsu-Esaki script (medians: specwell {_fmt(m_sw)}, numpy {_fmt(m_np)})",
               "specwell ≤ 1 s", f"max rel. diff {rel:.1e}")


def run(argv: Optional[List[str]] = None) -> List[Row]:
    parser = argparse.ArgumentParser(prog="python -m specwell.bench", description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repeats and smaller sizes")
    parser.add_argument("--only", default="", help="run only benchmarks whose function name contains this")
    args = parser.parse_args(argv)
    print(f"specwell {sw.__version__} | numpy {np.__version__} | python {platform.python_version()} | "
          f"{os.cpu_count()} cores | {platform.machine()}")
    rows = []
    for fn in BENCHES:
        if args.only and args.only not in fn.__name__:
            continue
        row = fn(args)
        rows.append(row)
        print(f"  {row.name}: specwell {row.specwell_s * 1e3:.3f} ms, reference {row.reference_s * 1e3:.3f} ms, "
              f"ratio {row.ratio:.2f}", flush=True)
    print()
    print("| job | specwell | numpy/scipy | reference | ratio (ref/specwell) | target | agreement |")
    print("|---|---|---|---|---|---|---|")
    for r in rows:
        print(f"| {r.name} | {_fmt(r.specwell_s)} | {_fmt(r.reference_s)} | {r.reference} | "
              f"{r.ratio:.2f} | {r.target} | {r.agreement} |")
    return rows


def _fmt(seconds: float) -> str:
    if seconds < 1e-3:
        return f"{seconds * 1e6:.1f} µs"
    if seconds < 1:
        return f"{seconds * 1e3:.2f} ms"
    return f"{seconds:.2f} s"


if __name__ == "__main__":
    run()
