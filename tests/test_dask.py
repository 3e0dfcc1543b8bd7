"""A field sweep distributed with dask.distributed gives bit-identical results to the serial run.

Bit-identity holds for independent items (method="dense"); the default batch method
warm-starts each item from the previous one in its chunk, so a different chunking agrees
to round-off (checked to 1e-10) but not bit for bit (README, "Determinism").

Workers are separate processes; each gets a chunk of potentials and calls ``specwell.solve_batch``
(a pickled FourierGrid travels with the task, the Batch comes back pickled).
"""

from __future__ import annotations

import functools

import numpy as np
import pytest

import specwell as sw

distributed = pytest.importorskip("dask.distributed")

FIELDS = np.linspace(0.0, 0.5, 40)
COUNT = 5


def _potentials(grid):
    # Illustrative anharmonic trap tilted by a uniform field F (natural units).
    return [0.5 * grid.x**2 + 0.02 * grid.x**4 + f * grid.x for f in FIELDS]


def _per_item(grid, potentials, count):
    """Reference per potential via Hamiltonian.solve (importable: specwell only)."""
    return np.array([sw.Hamiltonian(grid, p).solve(count).energies for p in potentials])


@pytest.fixture(scope="module")
def client():
    cluster = distributed.LocalCluster(n_workers=2, processes=True, threads_per_worker=1,
                                       dashboard_address=None)
    c = distributed.Client(cluster)
    try:
        yield c
    finally:
        c.close()
        cluster.close()


def test_field_sweep_on_local_cluster_matches_serial(client):
    grid = sw.FourierGrid(-12.0, 12.0, 256)
    pots = _potentials(grid)
    serial = sw.solve_batch(grid, pots, COUNT, method="dense")
    chunks = [pots[i:i + 10] for i in range(0, len(pots), 10)]
    futures = client.map(functools.partial(sw.solve_batch, grid, count=COUNT, method="dense"), chunks)
    parts = client.gather(futures)
    energies = np.concatenate([p.energies for p in parts])
    residuals = np.concatenate([p.residuals for p in parts])
    assert energies.shape == (len(FIELDS), COUNT)
    assert np.array_equal(energies, serial.energies)
    assert np.array_equal(residuals, serial.residuals)
    # Stark shift sanity: the ground state goes down with the field (second-order perturbation theory).
    assert np.all(np.diff(serial.energies[:, 0]) < 0)
    # The default (warm-started) method on the cluster agrees to round-off.
    futures = client.map(functools.partial(sw.solve_batch, grid, count=COUNT), chunks)
    default = np.concatenate([p.energies for p in client.gather(futures)])
    np.testing.assert_allclose(default, serial.energies, rtol=0, atol=1e-10)


def test_per_item_hamiltonian_on_cluster_matches_serial(client):
    grid = sw.FourierGrid(-12.0, 12.0, 256)
    pots = _potentials(grid)[:8]
    futures = client.map(lambda p: sw.Hamiltonian(grid, p).solve(COUNT).energies, pots)
    energies = np.array(client.gather(futures))
    assert np.array_equal(energies, _per_item(grid, pots, COUNT))
    assert np.array_equal(energies, sw.solve_batch(grid, pots, COUNT, method="dense").energies)
    np.testing.assert_allclose(energies, sw.solve_batch(grid, pots, COUNT).energies, rtol=0, atol=1e-10)
