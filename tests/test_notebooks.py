"""Execute the demo notebooks (nbclient) and test the plotting helpers.

The notebooks in ``notebooks-demo/`` are stored without outputs; each is executed here in a
temporary working directory (figures land there, not in the repository) and must finish without
a cell error in under 60 s.
"""

from __future__ import annotations

import pathlib
import time

import numpy as np
import pytest

import specwell as sw

matplotlib = pytest.importorskip("matplotlib")
matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
from matplotlib.axes import Axes  # noqa: E402

from specwell import plotting  # noqa: E402

NOTEBOOK_DIR = pathlib.Path(__file__).resolve().parent.parent / "notebooks-demo"
NOTEBOOKS = sorted(NOTEBOOK_DIR.glob("*.ipynb"))
TIME_LIMIT_S = 60.0


def test_three_notebooks_present():
    assert len(NOTEBOOKS) >= 3, f"expected the demo notebooks in {NOTEBOOK_DIR}"


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_notebook_is_committed_without_outputs(path):
    nbformat = pytest.importorskip("nbformat")
    nb = nbformat.read(path, as_version=4)
    nbformat.validate(nb)
    for cell in nb.cells:
        if cell.cell_type == "code":
            assert cell.outputs == [] and cell.execution_count is None, f"{path.name} has stored outputs"


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_notebook_executes(path, tmp_path):
    nbformat = pytest.importorskip("nbformat")
    nbclient = pytest.importorskip("nbclient")
    pytest.importorskip("ipykernel")
    pytest.importorskip("scipy")
    nb = nbformat.read(path, as_version=4)
    client = nbclient.NotebookClient(nb, timeout=int(2 * TIME_LIMIT_S), kernel_name="python3",
                                     allow_errors=False, resources={"metadata": {"path": str(tmp_path)}})
    t0 = time.perf_counter()
    try:
        client.execute()
    except nbclient.exceptions.CellExecutionError as exc:  # pragma: no cover - failure path
        pytest.fail(f"{path.name}: cell failed:\n{exc}")
    elapsed = time.perf_counter() - t0
    for cell in nb.cells:
        for out in cell.get("outputs", []):
            assert out.get("output_type") != "error", f"{path.name}: {out.get('ename')}: {out.get('evalue')}"
    assert elapsed < TIME_LIMIT_S, f"{path.name} took {elapsed:.1f} s (limit {TIME_LIMIT_S:g} s)"
    assert list(tmp_path.glob("*.png")), "the notebook should have written its figure into the working dir"


# ------------------------------------------------------------------ plotting helpers
@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


@pytest.fixture(scope="module")
def small_run():
    grid = sw.FourierGrid(-20.0, 20.0, 256)
    v = np.where(np.abs(grid.x) < 1.0, 2.0, 0.0)
    prop = sw.SplitStep(grid, v, dt=0.01, absorber_width=3.0)
    return prop.run(sw.gaussian_packet(grid, -8.0, 2.0, 1.0), 200, record_every=10), v


@pytest.fixture(scope="module")
def stack():
    return sw.Heterostructure([sw.Layer(10.0, 200.0, 0.09), sw.Layer(8.0, 0.0, 0.067),
                               sw.Layer(10.0, 200.0, 0.09)])


def test_all_lists_plot_functions():
    for name in ("plot_levels", "plot_density", "plot_convergence", "plot_potential_stack"):
        assert name in plotting.__all__ and callable(getattr(plotting, name))


def test_plot_density_returns_axes_and_image(small_run):
    run, v = small_run
    ax = plotting.plot_density(run)
    assert isinstance(ax, Axes)
    img = ax.get_images()[0].get_array()
    assert img.shape == (len(run.times), len(run.x))
    np.testing.assert_allclose(np.asarray(img), np.abs(run.states) ** 2)
    # extent covers x and t
    x0, x1, t0, t1 = ax.get_images()[0].get_extent()
    assert x0 < run.x[0] and x1 > run.x[-1] and t0 == run.times[0] and t1 == run.times[-1]


def test_plot_density_accepts_ax_log_and_potential(small_run):
    run, v = small_run
    fig, ax = plt.subplots()
    out = plotting.plot_density(run, ax=ax, log=True, vmin=-8, potential=v, colorbar=False, xlim=(-10, 10))
    assert out is ax
    assert ax.get_xlim() == (-10.0, 10.0)
    assert len(ax.get_lines()) == 2  # the two barrier edges


def test_plot_convergence(tmp_path):
    sizes = [8, 16, 32, 64]
    errors = np.array([[1e-2, 2e-2], [1e-4, 3e-4], [1e-8, 1e-7], [0.0, 1e-12]])
    fig, ax = plt.subplots()
    out = plotting.plot_convergence(sizes, errors, ax=ax, labels=["a", "b"], slopes=[2, 4], floor=1e-14)
    assert out is ax
    assert ax.get_xscale() == "log" and ax.get_yscale() == "log"
    lines = ax.get_lines()
    assert len(lines) == 2 + 2 + 1
    assert np.all(np.asarray(lines[0].get_ydata()) > 0)  # exact zero drawn at a positive floor
    # reference slope ∝ N^-2 anchored at the first point
    np.testing.assert_allclose(lines[2].get_ydata(), 1e-2 * (np.array(sizes) / 8.0) ** -2)
    fig.savefig(tmp_path / "conv.png")
    assert isinstance(plotting.plot_convergence([1, 2], [1.0, 0.5]), Axes)
    with pytest.raises(ValueError, match="errors"):
        plotting.plot_convergence([1, 2, 3], [1.0, 0.5])


def test_plot_potential_stack(stack):
    ax = plotting.plot_potential_stack(stack)
    assert isinstance(ax, Axes)
    z, v = ax.get_lines()[0].get_data()
    np.testing.assert_allclose(v, stack.potential(z))
    mass_ax = ax.specwell_mass_axis
    zm, m = mass_ax.get_lines()[0].get_data()
    np.testing.assert_allclose(m, stack.mass(zm))
    fig, ax2 = plt.subplots()
    assert plotting.plot_potential_stack(stack, ax=ax2, mass=False, z=np.linspace(0, 28, 50)) is ax2
    assert ax2.specwell_mass_axis is None


def test_plot_levels_accepts_ax():
    spec = sw.Hamiltonian(sw.HermiteBasis(30), lambda x: 0.5 * x**2).solve(3)
    fig, ax = plt.subplots()
    assert plotting.plot_levels(spec, lambda x: 0.5 * x**2, ax=ax) is ax
    assert isinstance(plotting.plot_levels(spec, lambda x: 0.5 * x**2, density=True), Axes)
