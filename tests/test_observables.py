"""Observables of a Spectrum: expectation values and broadened absorption."""

import numpy as np
import pytest

import specwell as sw


def test_expectation_values_of_the_oscillator():
    # Harmonic oscillator (m, ω): ⟨x²⟩_n = (n + ½) ħ/(mω) (Griffiths 2005, Problem 2.12), ⟨x⟩_n = 0.
    m, w = 1.5, 0.8
    st = sw.Hamiltonian(sw.FourierGrid(-15.0, 15.0, 256), lambda x: 0.5 * m * w**2 * x**2, mass=m).solve(4)
    x2 = st.expectation(lambda x: x**2)
    np.testing.assert_allclose(x2, (np.arange(4) + 0.5) / (m * w), rtol=1e-8)
    np.testing.assert_allclose(st.expectation(), 0.0, atol=1e-10)
    # The diagonal of the dipole matrix is ⟨x⟩ too (independent construction in the core).
    np.testing.assert_allclose(np.diag(st.dipole_matrix()), st.expectation(), atol=1e-10)


def test_expectation_in_hermite_basis_matches_fourier():
    pot = lambda x: 0.25 * x**4 - x**2  # noqa: E731
    a = sw.Hamiltonian(sw.HermiteBasis(60, length=0.8), pot).solve(3).expectation(lambda x: x**2)
    b = sw.Hamiltonian(sw.FourierGrid(-8.0, 8.0, 256), pot).solve(3).expectation(lambda x: x**2)
    np.testing.assert_allclose(a, b, rtol=1e-7)


def test_gaussian_absorption_integrates_to_the_oscillator_strengths():
    # A unit-area line shape integrates to f_0f per line (definition); the total is Σ_f f_0f,
    # which the Thomas-Reiche-Kuhn sum rule puts near 1 for a complete set (Bethe & Jackiw 1968).
    st = sw.Hamiltonian(sw.FourierGrid(-12.0, 12.0, 256), lambda x: 0.5 * x**2 + 0.05 * x**4).solve(30)
    f = st.oscillator_strengths()[0]
    e = np.linspace(-5.0, 80.0, 40001)
    a = st.absorption(e, 0.05, shape="gaussian")
    np.testing.assert_allclose(np.trapezoid(a, e), f[1:].sum(), rtol=1e-6)
    assert abs(f[1:].sum() - 1.0) < 1e-6
    # The peak sits at the 0→1 transition energy.
    assert abs(e[np.argmax(a)] - (st.energies[1] - st.energies[0])) < 1e-2


def test_lorentzian_line_height():
    # Lorentzian (γ/π)/(ΔE² + γ²): height at the line centre f/(πγ) (definition).
    st = sw.Hamiltonian(sw.FourierGrid(-10.0, 10.0, 128), lambda x: 0.5 * x**2).solve(2)
    gamma = 0.01
    de = st.energies[1] - st.energies[0]
    a = st.absorption([de], gamma)
    f01 = st.oscillator_strengths()[0, 1]
    assert a[0] == pytest.approx(f01 / (np.pi * gamma), rel=1e-9)


@pytest.mark.parametrize(
    "kwargs, pattern",
    [
        (dict(energies=[0.0], broadening=0.0), "`broadening`"),
        (dict(energies=[0.0], broadening=np.nan), "`broadening`"),
        (dict(energies=[np.nan], broadening=0.1), "`energies`"),
        (dict(energies=[0.0], broadening=0.1, shape="voigt"), "`shape`.*lorentzian.*gaussian"),
        (dict(energies=[0.0], broadening=0.1, initial=5), "`initial`"),
    ],
)
def test_absorption_bad_inputs(kwargs, pattern):
    st = sw.Hamiltonian(sw.FourierGrid(-10.0, 10.0, 64), lambda x: 0.5 * x**2).solve(3)
    with pytest.raises(ValueError, match=pattern):
        st.absorption(**kwargs)
