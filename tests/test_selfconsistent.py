"""Schrödinger-Poisson against an independent finite-difference solver and textbook rules.

Reference: tests/reference/poisson.py, a finite-difference Schrödinger-Poisson solver
written with numpy/scipy for the same model (constant mass, uniform ε, full ionisation,
2D Fermi-Dirac statistics with spin, neutrality, zero field at both ends), Anderson mixed
to 1e-9 meV and Richardson-extrapolated in the step (validated in test_reference.py).
Structures are illustrative (numbers of our own, not a real device). T = 4 K: the model
puts no charge in continuum states, which are empty at this temperature.
"""

import warnings

import numpy as np
import pytest

import specwell as sw
from reference import closed_forms, poisson


def as_stack(layers, eps):
    return sw.Heterostructure([sw.Layer(l.thickness, l.band_edge, l.mass, doping=l.doping, permittivity=eps)
                               for l in layers])


@pytest.fixture(scope="module", params=["modulation_doped_well", "single_heterojunction"])
def pair(request):
    layers, eps = getattr(poisson, request.param)()
    ref = poisson.schrodinger_poisson(layers, 4.0, eps)
    sc = as_stack(layers, eps).self_consistent(4.0)
    return layers, eps, ref, sc


def test_agrees_with_the_finite_difference_reference(pair):
    _, _, ref, sc = pair
    e = sc.spectrum.energies
    # E1 − E_F and E2 − E1 within 2e-3 meV; the ground-subband density within 1e-4.
    assert abs((e[0] - sc.fermi_level) - ref.levels_minus_fermi[0]) < 2e-3
    assert abs((e[1] - e[0]) - (ref.levels_minus_fermi[1] - ref.levels_minus_fermi[0])) < 2e-3
    assert sc.sheet_densities[0] == pytest.approx(ref.sheet_densities[0], rel=1e-4)
    assert sc.iterations <= 40


def test_neutrality(pair):
    layers, _, _, sc = pair
    donors = sum(l.doping * l.thickness * 1e-7 for l in layers)  # cm⁻³·nm → cm⁻²
    assert sc.sheet_densities.sum() == pytest.approx(donors, rel=1e-8)
    # The density integrates to the same charge (∫ n dz in cm⁻³·nm).
    z = np.linspace(sc.spectrum.basis.edges[0], sc.spectrum.basis.edges[-1], 200001)
    assert np.trapezoid(sc.density(z), z) * 1e-7 == pytest.approx(donors, rel=1e-6)


def test_two_dimensional_occupation_formula_on_one_subband():
    # n_1 = (m kT/πħ²) ln(1 + e^{(E_F − E_1)/kT}) (Davies 1998): with the levels and E_F the
    # solver reports, the formula written here gives its sheet densities.
    layers, eps = poisson.modulation_doped_well(2e17)
    sc = as_stack(layers, eps).self_consistent(4.0)
    h2m = sw.unit_constants("semiconductor")[0]
    kt = 1.380649e-23 / 1.602176634e-22 * 4.0
    m = 0.067
    n_formula = m * kt / (2 * np.pi * h2m) * np.log1p(np.exp((sc.fermi_level - sc.spectrum.energies) / kt)) * 1e14
    np.testing.assert_allclose(sc.sheet_densities, n_formula, rtol=1e-9, atol=1e-3)


def test_symmetric_doping_gives_a_symmetric_potential():
    layers, eps = poisson.modulation_doped_well()
    stack = as_stack(layers, eps)
    sc = stack.self_consistent(4.0)
    total = stack.total_thickness
    # Midpoints of 41 equal cells: symmetric about the centre and, for this
    # stack, never on an interface (where the band edge is discontinuous).
    z = (np.arange(41) + 0.5) * total / 41
    edges = np.cumsum([layer.thickness for layer in stack.layers])
    assert np.min(np.abs(z[:, None] - edges[None, :])) > 1e-3
    v = sc.potential(z)
    np.testing.assert_allclose(v, v[::-1], rtol=0, atol=1e-6)


def test_undoped_limit_is_the_plain_solve_and_says_so():
    layers = [(20, 230, 0.067), (12, 0, 0.067), (20, 230, 0.067)]
    stack = sw.Heterostructure([sw.Layer(*l, permittivity=12.9) for l in layers])
    with pytest.warns(UserWarning, match="Fermi level"):
        sc = stack.self_consistent(4.0)
    assert np.isnan(sc.fermi_level)
    plain = stack.solve(accuracy=1e-10)
    np.testing.assert_allclose(sc.spectrum.energies, plain.energies, rtol=1e-12)
    # And against Bastard's roots (same mass everywhere).
    np.testing.assert_allclose(plain.energies, closed_forms.finite_well_levels(12, 230, 0.067, 0.067), rtol=1e-10)


def test_given_fermi_level_and_surface_barrier():
    # A surface barrier φ_B pins E_F at the left end: E_c(0) + U(0) − E_F = φ_B (the
    # boundary condition itself, checked on the solution).
    layers, eps = poisson.single_heterojunction()
    stack = as_stack(layers, eps)
    sc = stack.self_consistent(4.0, fermi_level=200.0, surface_barrier=150.0)
    assert sc.fermi_level == 200.0
    z0 = sc.spectrum.basis.edges[0]
    assert sc.potential([z0])[0] - 200.0 == pytest.approx(150.0, abs=1e-8)


def test_sweep_matches_single_solves():
    dopings = [1e17, 3e17, 5e17]
    stacks = []
    for d in dopings:
        layers, eps = poisson.modulation_doped_well(d)
        stacks.append(as_stack(layers, eps))
    sweep = sw.self_consistent_batch(stacks, 4.0)
    for s, st in zip(sweep, stacks):
        one = st.self_consistent(4.0)
        assert abs(s.fermi_level - one.fermi_level) < 1e-5
        np.testing.assert_allclose(s.sheet_densities, one.sheet_densities, rtol=1e-6)


def test_bad_input():
    layers, eps = poisson.modulation_doped_well()
    stack = as_stack(layers, eps)
    with pytest.raises(ValueError, match="`temperature`"):
        stack.self_consistent(-1.0)
    no_eps = sw.Heterostructure([sw.Layer(10, 200, 0.067, doping=1e17), sw.Layer(10, 0, 0.067)])
    with pytest.raises(ValueError, match="permittivity"):
        no_eps.self_consistent(4.0)
    with pytest.raises(ValueError, match="`surface_barrier`"):
        stack.self_consistent(4.0, surface_barrier=100.0)
    with pytest.raises(sw.ConvergenceError):
        stack.self_consistent(4.0, max_iter=2)


def test_exchange_correlation_is_attractive():
    # The LDA exchange-correlation potential is negative: it binds the subbands more
    # deeply relative to E_F (Stern & Das Sarma 1984).
    layers, eps = poisson.modulation_doped_well()
    stack = as_stack(layers, eps)
    plain = stack.self_consistent(4.0)
    xc = stack.self_consistent(4.0, exchange_correlation=True)
    assert xc.spectrum.energies[0] - xc.fermi_level < plain.spectrum.energies[0] - plain.fermi_level
