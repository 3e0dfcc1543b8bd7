"""Thread safety and GIL release.

* 8 Python threads (ThreadPoolExecutor) call ``Hamiltonian.solve`` (dense and iterative),
  ``solve_batch``, ``SplitStep.run`` and ``SplitStep.run_many`` concurrently on SHARED
  inputs (one Hamiltonian object, one SplitStep object, one potential array) and must
  produce results bit-identical to serial runs of the same calls.
* The GIL is released during heavy work: a pure-Python counter thread keeps running
  while a long solve / propagation runs in another thread.
"""

import threading
import time
from concurrent.futures import ThreadPoolExecutor

import numpy as np
import pytest

import specwell as sw

THREADS = 8
ROUNDS = 3  # each task is submitted this many times per kind


def _v(x):
    return 0.5 * x**2 + 0.05 * x**4 - 1.5 * np.exp(-((x - 0.7) ** 2))


@pytest.fixture(scope="module")
def shared():
    grid = sw.FourierGrid(-12.0, 12.0, 256)
    H = sw.Hamiltonian(grid, _v, mass=1.3)
    hb = sw.Hamiltonian(sw.HermiteBasis(120, 0.1, 0.9, quadrature=260), _v)
    pots = np.array([_v(grid.x) + 0.05 * f * grid.x for f in range(12)])
    ss = sw.SplitStep(grid, _v, mass=1.3, dt=0.01, order=4)
    ss2 = sw.SplitStep(grid, _v, mass=1.3, dt=0.02, order=2,
                       drive=lambda t: np.sin(2.0 * t), drive_potential=lambda x: x)
    psis = np.array([np.exp(-((grid.x - c) ** 2) + 1j * k * grid.x) for c, k in
                     [(-1.0, 0.5), (0.0, 0.0), (1.5, -1.0), (0.5, 2.0)]])
    psis /= np.sqrt(np.sum(np.abs(psis) ** 2, axis=1, keepdims=True) * grid.dx)
    return dict(grid=grid, H=H, hb=hb, pots=pots, ss=ss, ss2=ss2, psis=psis)


def _tasks(s):
    """name -> zero-argument callable returning a tuple of arrays to compare."""
    H, hb, grid, pots, ss, ss2, psis = (s[k] for k in ("H", "hb", "grid", "pots", "ss", "ss2", "psis"))

    def spec(sp):
        return (sp.energies, sp.vectors, sp.residuals)

    def run(r):
        return (r.states, r.norm, r.energy, r.autocorrelation)

    return {
        "dense": lambda: spec(H.solve(6, method="dense")),
        "dense_hermite": lambda: spec(hb.solve(8, method="dense")),
        "iterative": lambda: spec(H.solve(4, method="iterative", tol=1e-10)),
        "iterative_hermite": lambda: spec(hb.solve(3, method="iterative", tol=1e-10, seed=7)),
        "batch_dense": lambda: (lambda b: (b.energies, b.residuals, b.wavefunctions(3)))(
            sw.solve_batch(grid, pots, 3, mass=1.3, method="dense")),
        "batch_iterative": lambda: (lambda b: (b.energies, b.residuals))(
            sw.solve_batch(grid, pots, 3, mass=1.3, method="iterative", tol=1e-9)),
        "run": lambda: run(ss.run(psis[0], 200, record_every=50)),
        "run_drive": lambda: run(ss2.run(psis[2], 150, record_every=30)),
        "run_many": lambda: tuple(a for r in ss.run_many(psis, 120, record_every=40) for a in run(r)),
    }


def _same(a, b):
    assert len(a) == len(b)
    for x, y in zip(a, b):
        assert np.array_equal(x, y), f"max |diff| = {np.max(np.abs(np.asarray(x) - np.asarray(y)))}"


def test_concurrent_calls_on_shared_objects_bit_identical(shared):
    tasks = _tasks(shared)
    serial = {name: f() for name, f in tasks.items()}
    # Serial repeatability first, so that a mismatch below is attributable to threads.
    for name, f in tasks.items():
        _same(serial[name], f())
    jobs = [name for name in tasks for _ in range(ROUNDS)]
    # Interleave kinds so that different calls overlap on the shared objects.
    rng = np.random.default_rng(1)
    rng.shuffle(jobs)
    barrier = threading.Barrier(THREADS)

    def work(name, first):
        if first:
            barrier.wait(timeout=60)  # start the first wave together
        return name, tasks[name]()

    with ThreadPoolExecutor(max_workers=THREADS) as ex:
        futs = [ex.submit(work, n, i < THREADS) for i, n in enumerate(jobs)]
        results = [f.result(timeout=300) for f in futs]
    assert len(results) == len(jobs)
    for name, got in results:
        try:
            _same(serial[name], got)
        except AssertionError as e:  # pragma: no cover - diagnostic
            raise AssertionError(f"{name}: threaded result differs from serial: {e}") from None


def test_shared_inputs_not_mutated(shared):
    H, ss, psis, pots = shared["H"], shared["ss"], shared["psis"], shared["pots"]
    psis0, pots0, V0 = psis.copy(), pots.copy(), H.potential.copy()
    with ThreadPoolExecutor(max_workers=THREADS) as ex:
        list(ex.map(lambda i: ss.run(psis[i % 4], 50), range(16)))
        list(ex.map(lambda i: sw.solve_batch(shared["grid"], pots, 2, method="dense"), range(8)))
    assert np.array_equal(psis, psis0)
    assert np.array_equal(pots, pots0)
    assert np.array_equal(H.potential, V0)


class _Counter(threading.Thread):
    def __init__(self):
        super().__init__(daemon=True)
        self.count = 0
        self.stop = threading.Event()

    def run(self):
        while not self.stop.is_set():
            self.count += 1


def _counter_advance_during(fn):
    """(counts during fn, seconds fn took, counts/s of the counter when uncontended)."""
    c = _Counter()
    c.start()
    time.sleep(0.05)
    t0, n0 = time.perf_counter(), c.count
    time.sleep(0.2)
    free_rate = (c.count - n0) / (time.perf_counter() - t0)
    done = {}

    def heavy():
        t = time.perf_counter()
        done["result"] = fn()
        done["elapsed"] = time.perf_counter() - t

    n0 = c.count
    worker = threading.Thread(target=heavy)
    worker.start()
    worker.join(timeout=300)
    advanced = c.count - n0
    c.stop.set()
    c.join()
    assert not worker.is_alive()
    return advanced, done["elapsed"], free_rate


@pytest.mark.parametrize(
    "name",
    ["dense", "iterative", "batch", "run", "run_many"],
)
def test_gil_released_during_heavy_work(name):
    grid = sw.FourierGrid(-30.0, 30.0, 900)
    V = 0.5 * grid.x**2
    if name == "dense":
        # Large enough (≈0.55 s on 2 idle cores) that the workload check below cannot flake:
        # more than a quarter of the spectrum, so all pairs are computed (a few lowest
        # pairs take the faster subset solver, ≈0.3 s, too close to the 0.2 s floor).
        dense_grid = sw.FourierGrid(-30.0, 30.0, 1500)
        H = sw.Hamiltonian(dense_grid, 0.5 * dense_grid.x**2)
        fn = lambda: H.solve(400, method="dense")  # noqa: E731
    elif name == "iterative":
        # 2^19 points, three solves: the multilevel start made one 2^19 solve 0.25-0.35 s on
        # 2 idle cores, too close to the 0.2 s workload floor below (it flaked once).
        big = sw.FourierGrid(-60.0, 60.0, 2**19)
        H = sw.Hamiltonian(big, 0.5 * big.x**2 + 0.01 * big.x**4)
        fn = lambda: [H.solve(6, method="iterative", tol=1e-11) for _ in range(3)]  # noqa: E731
    elif name == "batch":
        pots = np.array([V + 0.01 * i * grid.x for i in range(10)])  # ≈0.5 s with the subset solver
        fn = lambda: sw.solve_batch(grid, pots, 3, method="dense")  # noqa: E731
    else:
        g = sw.FourierGrid(-40.0, 40.0, 4096)
        ss = sw.SplitStep(g, 0.5 * g.x**2, dt=0.002, order=4)
        psi = np.exp(-((g.x - 1) ** 2)).astype(complex)
        if name == "run":
            fn = lambda: ss.run(psi, 3000, record_every=3000)  # noqa: E731
        else:
            fn = lambda: ss.run_many(np.array([psi] * 4), 1500, record_every=1500)  # noqa: E731
    advanced, elapsed, free_rate = _counter_advance_during(fn)
    assert elapsed > 0.2, f"{name}: workload too short ({elapsed:.3f}s) to test GIL release"
    # With the GIL held the counter would be frozen for the whole call (≈ 0 counts beyond
    # the switch interval); released, it runs at a sizeable fraction of its free rate.
    expected = free_rate * elapsed
    print(f"{name}: {advanced} counts in {elapsed:.2f}s; free rate {free_rate:.0f}/s")
    assert advanced >= 0.1 * expected and advanced > 100_000, (
        f"{name}: counter advanced {advanced} in {elapsed:.2f}s (free rate {free_rate:.0f}/s)"
    )


def test_gil_probe_detects_a_gil_holding_call():
    """Negative control: the probe must see (almost) nothing while C code holds the GIL."""
    advanced, elapsed, free_rate = _counter_advance_during(lambda: sum(range(60_000_000)))
    assert elapsed > 0.2
    assert advanced < 0.05 * free_rate * elapsed, (advanced, elapsed, free_rate)
