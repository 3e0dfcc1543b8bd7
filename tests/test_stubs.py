"""The type stubs match the compiled module (mypy stubtest), and every public object pickles.

Pickle round-trips matter for multiprocessing and dask: an object sent to a worker must give the
same numbers there (compared with ``np.array_equal``, not a tolerance).
"""

from __future__ import annotations

import pickle
import subprocess
import sys

import numpy as np
import pytest

import specwell as sw

def test_stubtest_passes():
    pytest.importorskip("mypy")
    proc = subprocess.run([sys.executable, "-m", "mypy.stubtest", "specwell._core"],
                          capture_output=True, text=True, timeout=300)
    assert proc.returncode == 0, proc.stdout[-6000:] + proc.stderr[-2000:]


def _rt(obj):
    return pickle.loads(pickle.dumps(obj, protocol=pickle.HIGHEST_PROTOCOL))


def _same_spectrum(a, b):
    assert type(a) is type(b)
    assert np.array_equal(a.energies, b.energies)
    assert np.array_equal(a.vectors, b.vectors)
    assert np.array_equal(a.residuals, b.residuals)
    assert np.array_equal(a.x, b.x)
    assert a.units == b.units and a.method == b.method and a.count == b.count
    assert np.array_equal(a.wavefunctions(), b.wavefunctions())
    assert np.array_equal(a.dipole_matrix(), b.dipole_matrix())
    assert np.array_equal(a.oscillator_strengths(), b.oscillator_strengths())


def _stack():
    return sw.Heterostructure([sw.Layer(10.0, 250.0, 0.09), sw.Layer(7.0, 0.0, 0.067),
                               sw.Layer(10.0, 250.0, 0.09)], field_kv_cm=5.0)


def test_pickle_hermite_basis():
    b = sw.HermiteBasis(40, center=0.3, length=0.7, quadrature=97)
    c = _rt(b)
    assert (c.size, c.center, c.length, c.quadrature) == (b.size, b.center, b.length, b.quadrature)
    assert np.array_equal(c.x, b.x) and np.array_equal(c.nodes, b.nodes)
    pot = lambda x: x**4 - x**2  # noqa: E731
    _same_spectrum(sw.Hamiltonian(b, pot).solve(5), sw.Hamiltonian(c, pot).solve(5))


def test_pickle_fourier_grid():
    g = sw.FourierGrid(-7.5, 9.25, 200)
    h = _rt(g)
    assert (h.start, h.stop, h.points) == (g.start, g.stop, g.points)
    assert np.array_equal(h.x, g.x) and np.array_equal(h.k, g.k) and h.dx == g.dx


def _same_hamiltonian(h, count=4):
    h2 = _rt(h)
    assert type(h2) is sw.Hamiltonian
    assert h2.units == h.units and h2.size == h.size
    assert np.array_equal(h2.potential, h.potential)
    assert np.array_equal(h2.matrix(), h.matrix())
    ob, ob2 = h.overlap_matrix(), h2.overlap_matrix()
    assert (ob is None) == (ob2 is None)
    if ob is not None:
        assert np.array_equal(ob, ob2)
    psi = np.random.default_rng(1).standard_normal(h.size)
    assert np.array_equal(h2.apply(psi), h.apply(psi))
    _same_spectrum(h.solve(count), h2.solve(count))


def test_pickle_hamiltonian_array_potential():
    g = sw.FourierGrid(-10.0, 10.0, 128)
    _same_hamiltonian(sw.Hamiltonian(g, 0.5 * g.x**2 + 0.1 * g.x**3 * np.exp(-g.x**2)))


def test_pickle_hamiltonian_callable_potential():
    # The callable itself is not pickled: its samples on basis.x are.
    _same_hamiltonian(sw.Hamiltonian(sw.HermiteBasis(50, length=0.8), lambda x: 0.25 * x**4 - 2 * x**2))


def test_pickle_hamiltonian_mass_array():
    g = sw.FourierGrid(-10.0, 10.0, 128)
    mass = 1.0 + 0.3 * np.tanh(g.x)
    _same_hamiltonian(sw.Hamiltonian(g, 0.5 * g.x**2, mass=mass, units="atomic"))


def test_pickle_hamiltonian_heterostructure():
    g = sw.FourierGrid(-10.0, 37.0, 129)
    _same_hamiltonian(sw.Hamiltonian(g, _stack(), units="semiconductor"), count=3)


def test_pickle_spectrum_including_heterostructure():
    g = sw.FourierGrid(-10.0, 10.0, 128)
    _same_spectrum(_rt(sw.Hamiltonian(g, 0.5 * g.x**2).solve(4)), sw.Hamiltonian(g, 0.5 * g.x**2).solve(4))
    s = sw.Hamiltonian(sw.FourierGrid(-10.0, 37.0, 129), _stack(), units="semiconductor").solve(3)
    s2 = _rt(s)
    _same_spectrum(s, s2)
    assert s2.heterostructure is not None
    assert len(s2.heterostructure) == len(s.heterostructure)
    x = np.linspace(-5.0, 30.0, 77)
    assert np.array_equal(s.wavefunctions(x), s2.wavefunctions(x))


def test_pickle_layer_and_heterostructure():
    layer = sw.Layer(3.5, 120.0, 0.071)
    l2 = _rt(layer)
    assert (l2.thickness, l2.band_edge, l2.mass) == (layer.thickness, layer.band_edge, layer.mass)
    st = _stack()
    st2 = _rt(st)
    assert st2.field_kv_cm == st.field_kv_cm and st2.total_thickness == st.total_thickness
    assert np.array_equal(st2.interfaces, st.interfaces)
    z = np.linspace(-5.0, 32.0, 301)
    assert np.array_equal(st2.potential(z), st.potential(z))
    assert np.array_equal(st2.mass(z), st.mass(z))


@pytest.mark.parametrize("kwargs", [
    dict(dt=0.01),
    dict(dt=0.02, order=4, absorber_width=2.0),
    dict(dt=0.01, drive=np.sin(0.01 * (np.arange(50) + 0.5)), drive_potential=lambda x: x,
         absorber_potential=lambda x: 0.1 * (np.abs(x) > 8) * (np.abs(x) - 8) ** 2),
], ids=["plain", "order4-absorber", "drive-cap"])
def test_pickle_split_step(kwargs):
    g = sw.FourierGrid(-10.0, 10.0, 128)
    prop = sw.SplitStep(g, 0.5 * g.x**2, **kwargs)
    p2 = _rt(prop)
    assert (p2.dt, p2.order, p2.units) == (prop.dt, prop.order, prop.units)
    assert np.array_equal(p2.potential, prop.potential)
    psi0 = sw.gaussian_packet(g, 1.0, 0.5, 0.8)
    a, b = prop.run(psi0, 50, record_every=5), p2.run(psi0, 50, record_every=5)
    assert np.array_equal(a.times, b.times)
    assert np.array_equal(a.states, b.states)
    assert np.array_equal(a.energy, b.energy)
    assert a.absorbed_norm == b.absorbed_norm


def test_pickle_batch():
    g = sw.FourierGrid(-10.0, 10.0, 128)
    pots = [0.5 * g.x**2 + f * g.x for f in (0.0, 0.1, 0.2)]
    batch = sw.solve_batch(g, pots, 3)
    b2 = _rt(batch)
    assert np.array_equal(b2.energies, batch.energies)
    assert np.array_equal(b2.residuals, batch.residuals)
    x = np.linspace(-5.0, 5.0, 41)
    for i in range(len(pots)):
        assert np.array_equal(b2.wavefunctions(i), batch.wavefunctions(i))
        assert np.array_equal(b2.wavefunctions(i, x), batch.wavefunctions(i, x))


def test_pickle_run():
    g = sw.FourierGrid(-10.0, 10.0, 64)
    run = sw.SplitStep(g, 0.5 * g.x**2, dt=0.01).run(sw.gaussian_packet(g, 0.0), 10)
    r2 = _rt(run)
    assert np.array_equal(r2.states, run.states) and np.array_equal(r2.times, run.times)
