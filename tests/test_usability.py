"""What a new user trips over first: clear errors naming the argument, results that save,
names that print as ``specwell.…``. Physics references are named where a value is checked."""

import warnings

import numpy as np
import pytest

import specwell as sw


def test_exceptions_print_as_specwell_names():
    assert sw.ConvergenceError.__module__ == "specwell"
    assert sw.AccuracyWarning.__module__ == "specwell"
    assert issubclass(sw.AccuracyWarning, UserWarning)
    assert callable(sw.unit_constants) and "unit_constants" in sw.__all__


def test_unit_constants_match_codata():
    # ħ²/2m_e in meV nm² and ħ in meV fs from scipy.constants (CODATA 2022 in scipy >= 1.15).
    import scipy.constants as C
    h2m, hbar = sw.unit_constants("semiconductor")
    assert h2m == pytest.approx(C.hbar**2 / (2 * C.m_e) / (C.e * 1e-3) * 1e18, rel=1e-13)
    assert hbar == pytest.approx(C.hbar / (C.e * 1e-3) * 1e15, rel=1e-13)


def test_autocorrelation_spectrum_accepts_a_shorter_final_record():
    # Harmonic oscillator, ψ(0) = ground state: C(t) = e^{−iE0 t} with E0 = 1/2 (textbook),
    # so the spectrum peaks at 1/2. 1001 steps with record_every=10 append a final record.
    g = sw.FourierGrid(-10, 10, 128)
    prop = sw.SplitStep(g, 0.5 * g.x**2, dt=0.01)
    psi0 = np.exp(-g.x**2 / 2).astype(complex)
    run = prop.run(psi0 / np.sqrt(np.sum(abs(psi0) ** 2) * g.dx), 1001, record_every=10)
    assert np.diff(run.times)[-1] < np.diff(run.times)[0]
    e, s = sw.autocorrelation_spectrum(run.times, run.autocorrelation, pad=16)
    assert e[np.argmax(s)] == pytest.approx(0.5, abs=2 * np.pi / run.times[-1])


def test_autocorrelation_energy_range_past_nyquist_is_an_error():
    t = np.arange(64) * 0.1
    c = np.exp(-1j * 0.5 * t)
    with pytest.raises(ValueError, match="`energy_range`"):
        sw.autocorrelation_spectrum(t, c, energy_range=(100.0, 200.0))


def test_wavefunctions_outside_a_periodic_box_are_refused():
    g = sw.FourierGrid(-5, 5, 64)
    st = sw.Hamiltonian(g, 0.5 * g.x**2).solve(2)
    st.wavefunctions(np.array([-5.0, 0.0, 5.0]))  # the box ends are fine
    with pytest.raises(ValueError, match="`x`.*box"):
        st.wavefunctions(np.array([0.0, 7.0]))


def test_splitstep_mass_array_names_the_argument():
    g = sw.FourierGrid(-5, 5, 64)
    with pytest.raises(TypeError, match="`mass`"):
        sw.SplitStep(g, 0.5 * g.x**2, mass=np.ones(64), dt=0.01)


def test_heterostructure_where_samples_are_expected_says_so():
    g = sw.FourierGrid(-5, 40, 64)
    stack = sw.Heterostructure([sw.Layer(10, 200, 0.09), sw.Layer(10, 0, 0.067), sw.Layer(10, 200, 0.09)])
    with pytest.raises(TypeError, match="Heterostructure"):
        sw.SplitStep(g, stack, dt=0.01, units="semiconductor")
    with pytest.raises(TypeError, match="Heterostructure"):
        sw.solve_batch(g, [stack], 2, units="semiconductor")


def test_order4_imaginary_time_message_uses_the_api_values():
    g = sw.FourierGrid(-5, 5, 64)
    with pytest.raises(ValueError, match="`order` must be 2 in imaginary time"):
        sw.SplitStep(g, 0.5 * g.x**2, dt=0.01, order=4, imaginary_time=True)


def test_franck_condon_factors_of_displaced_oscillators_are_poisson():
    # Two harmonic potentials of equal frequency displaced by d: |⟨0|n'⟩|² = e^{−S} Sⁿ/n!
    # with the Huang-Rhys factor S = d²/(2ℓ²), ℓ = 1/√(mω) (Huang & Rhys 1950; e.g.
    # Atkins & Friedman, Molecular Quantum Mechanics, Franck-Condon factors of displaced
    # oscillators). Natural units, m = ω = 1, d = 1.5: S = 1.125.
    from math import factorial
    grid = sw.FourierGrid(-14.0, 14.0, 256)
    d = 1.5
    lower = sw.Hamiltonian(grid, lambda x: 0.5 * x**2).solve(1)
    upper = sw.Hamiltonian(grid, lambda x: 0.5 * (x - d) ** 2).solve(12)
    fc = lower.overlaps(upper)[0] ** 2
    s = d**2 / 2
    poisson = np.array([np.exp(-s) * s**n / factorial(n) for n in range(12)])
    np.testing.assert_allclose(fc, poisson, rtol=0, atol=1e-10)
    assert lower.overlaps(upper).shape == (1, 12)
    # On different bases (each Hermite basis centred on its own minimum): quadrature.
    a = sw.Hamiltonian(sw.HermiteBasis(40, center=0.0), lambda x: 0.5 * x**2).solve(1)
    b = sw.Hamiltonian(sw.HermiteBasis(40, center=d), lambda x: 0.5 * (x - d) ** 2).solve(12)
    np.testing.assert_allclose(a.overlaps(b)[0] ** 2, poisson, rtol=0, atol=1e-12)
    # And between a grid and a Hermite basis.
    np.testing.assert_allclose(lower.overlaps(b)[0] ** 2, poisson, rtol=0, atol=1e-10)
    with pytest.raises(ValueError, match="`other`"):
        lower.overlaps(sw.Hamiltonian(sw.FourierGrid(20.0, 30.0, 64), lambda x: 0.5 * x**2).solve(1))


def test_matrix_elements_of_the_oscillator():
    # ⟨m|x²|n⟩ of the harmonic oscillator (m = ω = ħ = 1): (2n+1)/2 on the diagonal,
    # √((n+1)(n+2))/2 two off it (Griffiths, Introduction to QM, §2.3, ladder operators).
    s = sw.Hamiltonian(sw.HermiteBasis(40), lambda x: 0.5 * x**2).solve(6)
    m = s.matrix_elements(lambda x: x**2)
    n = np.arange(6)
    expected = np.diag((2 * n + 1) / 2) + np.diag(np.sqrt((n[:-2] + 1) * (n[:-2] + 2)) / 2, 2)
    expected = expected + np.triu(expected, 1).T
    np.testing.assert_allclose(m, expected, rtol=0, atol=1e-11)
    with pytest.raises(TypeError, match="`g`"):
        s.matrix_elements(3.0)


def test_molecular_units_against_scipy_constants_and_a_diatomic():
    # ħ²/(2u) in cm⁻¹·Å² and ħ in cm⁻¹·fs from scipy.constants (CODATA 2022).
    import scipy.constants as sc
    u = sc.physical_constants["atomic mass constant"][0]
    wavenumber = sc.h * sc.c * 100.0
    c, hbar = sw.unit_constants("molecular")
    assert c == pytest.approx(sc.hbar**2 / (2 * u) / wavenumber * 1e20, rel=1e-12)
    assert hbar == pytest.approx(sc.hbar / wavenumber * 1e15, rel=1e-12)
    # A harmonic diatomic: V = ½ k (r − r_e)², k in cm⁻¹/Å², μ in u; levels ħω(n + ½) with
    # ω = sqrt(k/μ) (Griffiths §2.3). With k, μ chosen for ω̃ = 2000 cm⁻¹: E1 − E0 = 2000 cm⁻¹.
    mu = 6.86  # u, illustrative (a CO-like reduced mass)
    # ħω = sqrt(ħ²k/μ) = sqrt(2ck/μ) with c = ħ²/(2u) in cm⁻¹·Å².
    k = 2000.0**2 * mu / (2 * c)
    basis = sw.HermiteBasis(40, center=1.13, length=(2 * c / mu / k) ** 0.25)
    e = sw.Hamiltonian(basis, lambda r: 0.5 * k * (r - 1.13) ** 2, mass=mu, units="molecular").solve(3).energies
    np.testing.assert_allclose(np.diff(e), [2000.0, 2000.0], rtol=1e-10)
