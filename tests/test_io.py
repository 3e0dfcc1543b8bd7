"""npz save/load round trips: the data come back bit-identical and readable with numpy alone."""

import json

import numpy as np
import pytest

import specwell as sw


def _spectra():
    yield sw.Hamiltonian(sw.HermiteBasis(30, 0.2, 1.1), lambda x: 0.5 * x**2 + 0.1 * x**4).solve(4)
    g = sw.FourierGrid(-10.0, 10.0, 64)
    yield sw.Hamiltonian(g, lambda x: 0.5 * x**2, mass=1.0 + 0.1 * np.tanh(g.x)).solve(3)
    stack = sw.Heterostructure([sw.Layer(10, 200, 0.09), sw.Layer(8, 0, 0.067), sw.Layer(10, 200, 0.09)], 5.0)
    yield sw.Hamiltonian(sw.FourierGrid(-5.0, 33.0, 129), stack, units="semiconductor").solve(2)


@pytest.mark.parametrize("spectrum", list(_spectra()), ids=["hermite", "grid-mass-profile", "heterostructure"])
def test_spectrum_round_trip(spectrum, tmp_path):
    path = tmp_path / "s.npz"
    sw.save(spectrum, path)
    back = sw.load(path)
    np.testing.assert_array_equal(back.energies, spectrum.energies)
    np.testing.assert_array_equal(back.vectors, spectrum.vectors)
    x = np.linspace(spectrum.x.min(), spectrum.x.max(), 50)
    np.testing.assert_array_equal(back.wavefunctions(x), spectrum.wavefunctions(x))
    # Plain numpy reads the data without specwell or pickle.
    with np.load(path, allow_pickle=False) as f:
        assert json.loads(str(f["header"]))["type"] == "Spectrum"
        np.testing.assert_array_equal(f["energies"], spectrum.energies)


def test_run_round_trip(tmp_path):
    g = sw.FourierGrid(-10.0, 10.0, 64)
    run = sw.SplitStep(g, 0.5 * g.x**2, dt=0.01, absorber_width=2.0).run(sw.gaussian_packet(g, 0.0, 1.0, 1.0), 20,
                                                                          record_every=5)
    path = tmp_path / "r.npz"
    sw.save(run, path)
    back = sw.load(path)
    for name in ("times", "states", "norm", "mean_x", "mean_p", "energy", "autocorrelation"):
        np.testing.assert_array_equal(getattr(back, name), getattr(run, name))
    assert back.record_steps == run.record_steps and back.absorbed_norm == run.absorbed_norm
    with np.load(path, allow_pickle=False) as f:
        np.testing.assert_array_equal(f["states"], run.states)


def test_save_rejects_other_objects(tmp_path):
    with pytest.raises(TypeError, match="`result`"):
        sw.save(sw.FourierGrid(0.0, 1.0, 8), tmp_path / "x.npz")


def test_load_rejects_foreign_files(tmp_path):
    path = tmp_path / "foreign.npz"
    np.savez(path, header=np.array(json.dumps({"format": "other"})))
    with pytest.raises(ValueError, match="`path`"):
        sw.load(path)


def test_batch_round_trip(tmp_path):
    g = sw.FourierGrid(-8.0, 8.0, 96)
    batch = sw.solve_batch(g, [0.5 * g.x**2 + f * g.x for f in (0.0, 0.1, 0.2)], 3)
    path = tmp_path / "b.npz"
    batch.save(path)
    back = sw.load(path)
    assert len(back) == len(batch)
    np.testing.assert_array_equal(back.energies, batch.energies)
    np.testing.assert_array_equal(back.residuals, batch.residuals)
    for a, b in zip(back, batch):
        np.testing.assert_array_equal(a.vectors, b.vectors)
        np.testing.assert_array_equal(a.hamiltonian.potential, b.hamiltonian.potential)
