"""Legendre spectral elements and Heterostructure.solve against outside references.

References (tests/reference, pure numpy/scipy, validated in test_reference.py):
* Bastard (1981) BenDaniel-Duke transcendental roots of a finite well (closed_forms);
* exact transfer matrices, plane waves/exponentials per layer and Airy functions per layer
  in a field (Abramowitz & Stegun 10.4) for multi-well stacks (transfer.bound_levels);
* V = |x| levels from the zeros of Ai and Ai' (scipy.special.ai_zeros; closed_forms);
* Thomas-Reiche-Kuhn sum rule and parity selection rules (textbook identities).
Parameters are illustrative (GaAs-like wells in AlGaAs-like barriers), not a real device.
"""

import numpy as np
import pytest

import specwell as sw
from reference import closed_forms, transfer

THREE_WELLS = [(15, 800, 0.09), (14, 0, 0.067), (2, 800, 0.09), (12, 0, 0.067), (2, 800, 0.09), (14, 0, 0.067),
               (15, 800, 0.09)]


def stack_of(layers, field=0.0):
    return sw.Heterostructure([sw.Layer(*l) for l in layers], field_kv_cm=field)


def rel(a, b):
    return np.abs(np.asarray(a) - np.asarray(b)) / np.abs(np.asarray(b))


def test_finite_well_with_mass_step_at_most_200_unknowns():
    # Bastard (1981): 10 nm well, 250 meV, masses 0.067 (well) and 0.092 (barriers).
    exact = closed_forms.finite_well_levels(10.0, 250.0, 0.067, 0.092)
    stack = stack_of([(40, 250, 0.092), (10, 0, 0.067), (40, 250, 0.092)])
    # Elements: interfaces, the well in two, barriers graded 2, 4, 8, … nm outwards to
    # 250 nm (the top level, 6 meV below the barrier, decays over 8 nm).
    grade = np.array([0, 2, 6, 14, 30, 62, 126, 250])
    edges = np.concatenate([40 - grade[::-1], [45], 50 + grade])
    eb = sw.ElementBasis(edges, 12)
    assert eb.size <= 200
    st = sw.Hamiltonian(eb, stack, units="semiconductor").solve(len(exact) + 1)
    assert np.all(rel(st.energies[: len(exact)], exact) <= 1e-11)
    assert st.energies[len(exact)] > 250.0  # one level too many would be below the barrier top


def test_finite_well_default_solve_finds_all_bound_levels():
    exact = closed_forms.finite_well_levels(10.0, 250.0, 0.067, 0.092)
    st = stack_of([(20, 250, 0.092), (10, 0, 0.067), (20, 250, 0.092)]).solve()
    assert st.count == len(exact) and np.all(st.bound)
    assert np.all(rel(st.energies, exact) <= 1e-10)
    assert np.all(st.errors <= 1e-10 * st.energies)


@pytest.mark.parametrize("accuracy", [1e-6, 1e-9, 1e-11])
def test_three_wells_requested_accuracy_is_honoured(accuracy):
    ref = transfer.bound_levels(THREE_WELLS)
    st = stack_of(THREE_WELLS).solve(10, accuracy=accuracy)
    assert np.all(rel(st.energies, ref[:10]) <= accuracy)
    assert np.all(st.errors <= accuracy * np.abs(st.energies))


def test_three_wells_all_bound_levels_to_1e11():
    ref = transfer.bound_levels(THREE_WELLS)
    st = stack_of(THREE_WELLS).solve(accuracy=1e-11)
    assert st.count == len(ref)
    assert np.all(rel(st.energies, ref) <= 1e-11)


@pytest.mark.parametrize("field", [-30.0, 30.0])
def test_well_in_a_field_against_airy_matching(field):
    layers = [(25, 300, 0.09), (12, 0, 0.067), (25, 300, 0.09)]
    ref = transfer.bound_levels(layers, field_kv_cm=field)
    st = stack_of(layers, field).solve(accuracy=1e-11)
    k = min(st.count, len(ref))
    assert k >= 2
    assert np.all(rel(st.energies[:k], ref[:k]) <= 1e-10)


def test_abs_potential_with_a_breakpoint_at_the_kink():
    # −½ψ'' + |x|ψ = Eψ: E = −a'_k/2^{1/3} (even) and −a_k/2^{1/3} (odd) (Airy zeros).
    exact = closed_forms.abs_potential_levels(12)
    eb = sw.ElementBasis(np.concatenate([-np.geomspace(1, 24, 6)[::-1], [0], np.geomspace(1, 24, 6)]), 16)
    st = sw.Hamiltonian(eb, np.abs).solve(12)
    assert np.all(rel(st.energies, exact) <= 1e-11)
    # Without the breakpoint the kink costs accuracy (a check that the test can fail).
    eb2 = sw.ElementBasis(np.linspace(-24, 24, 12), 16)
    st2 = sw.Hamiltonian(eb2, np.abs).solve(12)
    assert np.max(rel(st2.energies, exact)) > 1e-9


def test_thomas_reiche_kuhn_sum_rule_constant_mass():
    # Σ_f f_0f = 1 with f_0f = (2m/ħ²)(E_f − E_0)|⟨0|z|f⟩|² over a complete set
    # (Thomas-Reiche-Kuhn; e.g. Bethe & Salpeter 1957 §61), constant mass 0.067.
    m = 0.067
    stack = stack_of([(20, 300, m), (10, 0, m), (20, 300, m)])
    edges = np.concatenate([np.linspace(-10, 20, 7), np.linspace(22.5, 27.5, 3), np.linspace(30, 60, 7)])
    h = sw.Hamiltonian(sw.ElementBasis(np.unique(edges), 10), stack, units="semiconductor")
    st = h.solve(h.size, method="dense")
    f = st.oscillator_strengths()
    assert abs(f[0].sum() - 1.0) <= 1e-10


def test_parity_selection_rule_and_bound_flags():
    # A symmetric stack: ⟨i|z|j⟩ = 0 between states of equal parity (textbook).
    stack = stack_of([(20, 250, 0.092), (8, 0, 0.067), (20, 250, 0.092)])
    st = stack.solve(4, accuracy=1e-10)
    d = st.dipole_matrix() - 24.0 * np.eye(4)  # about the centre of the well
    assert abs(d[0, 2]) < 1e-10 and abs(d[1, 3]) < 1e-10
    assert abs(d[0, 1]) > 0.1
    # A 4 nm well of 250 meV holds one bound level (Bastard roots); states above are not bound.
    exact = closed_forms.finite_well_levels(4.0, 250.0, 0.067, 0.092)
    assert len(exact) == 1
    st = stack_of([(20, 250, 0.092), (4, 0, 0.067), (20, 250, 0.092)]).solve(3, accuracy=1e-9)
    assert list(st.bound) == [True, False, False]
    assert rel(st.energies[0], exact[0]) < 1e-9


def test_wavefunctions_continuous_with_continuous_flux_and_decaying_tails():
    # BenDaniel-Duke: ψ and ψ'/m continuous at a mass step; in a cladding of height V the
    # tail decays as exp(−κ z), κ = √(m (V − E))/√(ħ²/2m_e) (both textbook).
    stack = stack_of([(20, 250, 0.092), (10, 0, 0.067), (20, 250, 0.092)])
    st = stack.solve(1, accuracy=1e-12)
    h = 1e-4
    z0 = 20.0
    psi = st.wavefunctions(np.array([z0 - 2 * h, z0 - h, z0, z0 + h, z0 + 2 * h]))[0]
    left = (psi[2] - psi[0]) / (2 * h) * 1.0  # one-sided enough at this h for the check
    right = (psi[4] - psi[2]) / (2 * h)
    assert abs(left / 0.092 - right / 0.067) < 1e-3 * abs(right / 0.067)
    h2m = sw.unit_constants("semiconductor")[0]
    kappa = np.sqrt(0.092 * (250.0 - st.energies[0]) / h2m)
    z = np.array([12.0, 7.0])  # in the left barrier, well inside the converged tail
    tail = st.wavefunctions(z)[0]
    assert tail[1] / tail[0] == pytest.approx(np.exp(-5.0 * kappa), rel=1e-6)
    # Normalised: ∫|ψ|² dz = 1 over the whole mesh.
    edges = st.basis.edges
    zz = np.linspace(edges[0], edges[-1], 400001)
    assert np.trapezoid(st.wavefunctions(zz)[0] ** 2, zz) == pytest.approx(1.0, abs=1e-8)


def test_element_basis_with_callable_potential_and_per_element_mass():
    # Harmonic oscillator on elements: E_n = n + ½ (natural units, textbook).
    eb = sw.ElementBasis(np.linspace(-10, 10, 11), 14)
    st = sw.Hamiltonian(eb, lambda x: 0.5 * x**2).solve(8)
    np.testing.assert_allclose(st.energies, np.arange(8) + 0.5, rtol=0, atol=1e-10)
    # A per-element mass equal everywhere is the uniform mass.
    st2 = sw.Hamiltonian(eb, lambda x: 0.5 * x**2, mass=np.ones(10)).solve(8)
    np.testing.assert_allclose(st2.energies, st.energies, rtol=0, atol=1e-12)


def test_stack_sweep_batch_matches_single_solves():
    fields = np.linspace(0.0, 40.0, 9)
    stacks = [stack_of([(15, 300, 0.09), (8, 0, 0.067), (3, 300, 0.09), (8, 0, 0.067), (15, 300, 0.09)], f)
              for f in fields]
    batch = sw.solve_batch(None, stacks, 4, accuracy=1e-10)
    assert batch.energies.shape == (9, 4)
    for i in (0, 4, 8):
        ref = transfer.bound_levels([(15, 300, 0.09), (8, 0, 0.067), (3, 300, 0.09), (8, 0, 0.067), (15, 300, 0.09)],
                                    field_kv_cm=fields[i])
        assert np.all(rel(batch.energies[i], ref[:4]) <= 1e-10)


def test_errors_name_the_argument():
    stack = stack_of(THREE_WELLS)
    with pytest.raises(ValueError, match="`accuracy`"):
        stack.solve(accuracy=0.5)
    with pytest.raises(ValueError, match="`count`"):
        stack.solve(0)
    with pytest.raises(ValueError, match="`breakpoints`"):
        sw.ElementBasis([0.0, 0.0, 1.0])
    with pytest.raises(ValueError, match="`order`"):
        sw.ElementBasis([0.0, 1.0], order=1)
    with pytest.raises(ValueError, match="`mass`"):
        sw.Hamiltonian(sw.ElementBasis([0.0, 1.0, 2.0], 4), lambda x: 0 * x, mass=np.ones(3))
    with pytest.raises(TypeError, match="Heterostructure"):
        sw.solve_batch(None, [1.0], 2)
