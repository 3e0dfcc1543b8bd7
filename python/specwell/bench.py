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
