"""Transport checks: superlattice minibands, transmission, tunnelling current.

Every expected value comes from an outside reference (source named beside each check):
* the Kronig-Penney relation with BenDaniel-Duke matching (Kronig & Penney 1931; Bastard
  1981, Phys. Rev. B 24, 5693), solved with scipy.optimize.brentq
  (tests/reference/closed_forms.kronig_penney_energies);
* exact transfer matrices for BenDaniel-Duke stacks, plane waves per layer and Airy
  functions in a field (tests/reference/transfer.py: transmission, resonances,
  bloch_half_trace);
* the rectangular-barrier closed form (Griffiths 2005, problem 2.33; with a barrier mass
  from the same matching, tests/reference/closed_forms.rectangular_barrier_transmission);
* the Tsu-Esaki current with transfer-matrix T(E) and adaptive Gauss-Legendre quadrature
  (tests/reference/current.tsu_esaki_current) and the closed-form Lorentzian supply
  integral (tests/reference/closed_forms.lorentzian_supply_integral);
No number produced by specwell is hard-coded. Layer parameters are illustrative (GaAs-like
wells 0 meV / 0.067 m_e, AlGaAs-like barriers 300 meV / 0.092 m_e), not fitted to any alloy.
"""

import numpy as np
import pytest

import specwell as sw
from reference import closed_forms as cf
from reference import current as ref_current
from reference import transfer as tm
from reference.stack import H2M, KB_MEV, Stack

WELL = (0.0, 0.067)
BARRIER = (300.0, 0.092)


def stack_of(layers, field=0.0):
    return sw.Heterostructure([sw.Layer(*l) for l in layers], field_kv_cm=field)


def double_barrier(barrier=3.0, well=5.0, lead=5.0, top=BARRIER, bottom=WELL):
    return [(lead, *bottom), (barrier, *top), (well, *bottom), (barrier, *top), (lead, *bottom)]


# ------------------------------------------------------------------------------ minibands
KP_CASES = {
    # (well nm, barrier nm, height meV, m_well, m_barrier)
    "equal-mass": (6.0, 3.0, 200.0, 0.067, 0.067),
    "mass-step": (6.0, 3.0, 200.0, 0.067, 0.092),
}


@pytest.mark.parametrize("case", sorted(KP_CASES))
def test_minibands_match_kronig_penney(case):
    # Source: Kronig-Penney relation cos(qd) = RHS(E) with BenDaniel-Duke matching
    # (Kronig & Penney 1931; Bastard 1981), roots by brentq (reference.closed_forms).
    a, b, v0, mw, mb = KP_CASES[case]
    d = a + b
    stack = stack_of([(a, 0.0, mw), (b, v0, mb)])
    qs = np.array([0.0, np.pi / (2 * d), np.pi / d])
    e = stack.bands(qs, 3)
    assert e.shape == (3, 3)
    for i, q in enumerate(qs):
        exact = cf.kronig_penney_energies(q, a, b, v0, mw, mb, 3)
        assert len(exact) == 3
        rel = np.abs(e[i] - exact) / exact
        assert np.all(rel <= 1e-10), f"q={q}: {e[i]} vs {exact} (rel {rel})"


def test_minibands_match_the_transfer_matrix_discriminant_for_three_layers():
    # Source: Bloch's theorem ½ tr M(E) = cos(qd) with the exact transfer matrix of one
    # period (reference.transfer.bloch_half_trace); a three-layer period with two masses.
    layers = [(4.0, 0.0, 0.067), (2.0, 250.0, 0.092), (3.0, 80.0, 0.075)]
    stack = stack_of(layers)
    d = stack.total_thickness
    q = 0.37 / d
    e = stack.bands(q, 3)[0]
    trace = tm.bloch_half_trace(layers, e) - np.cos(q * d)
    # |½tr M − cos qd| at the computed energy, relative to its slope there (an energy error).
    h = 1e-6 * e
    slope = (tm.bloch_half_trace(layers, e + h) - tm.bloch_half_trace(layers, e - h)) / (2 * h)
    assert np.all(np.abs(trace / slope) / e <= 1e-10), (trace, slope)


def test_miniband_widths_and_band_mass_match_kronig_penney():
    # Widths: E(π/d) − E(0) of the Kronig-Penney roots (Kronig & Penney 1931; Bastard 1981).
    # Mass: differentiating cos(qd) = f(E) twice at q = 0 gives E''(0) = −d²/f'(E_0), so
    # m* = 2(ħ²/2m_e)/E'' = −2·H2M·f'(E_0)/d²; f' by a five-point centred difference of
    # the reference's kronig_penney_rhs (truncation ~(h/E)⁴ ≈ 1e-11).
    a, b, v0, mw, mb = KP_CASES["mass-step"]
    d = a + b
    stack = stack_of([(a, 0.0, mw), (b, v0, mb)])
    e0 = cf.kronig_penney_energies(0.0, a, b, v0, mw, mb, 2)
    ed = cf.kronig_penney_energies(np.pi / d, a, b, v0, mw, mb, 2)
    widths = stack.miniband_widths(2)
    exact = np.abs(ed - e0)
    assert np.all(np.abs(widths - exact) / exact <= 1e-8), (widths, exact)
    edges = stack.minibands(2)
    assert np.allclose(edges[:, 0], np.minimum(e0, ed), rtol=1e-10, atol=0)
    f = lambda e: cf.kronig_penney_rhs(e, a, b, v0, mw, mb)  # noqa: E731
    h = 0.02
    x = e0[0]
    fp = (-f(x + 2 * h) + 8 * f(x + h) - 8 * f(x - h) + f(x - 2 * h)) / (12 * h)
    m_exact = -2 * H2M * fp / d**2
    m = stack.band_mass(0)
    assert abs(m - m_exact) / m_exact <= 1e-7, (m, m_exact)
    # The second band's bottom is at q = π/d; its curvature there from the same relation,
    # E'' = +d²/f'(E) (cos qd = −1).
    x = ed[1]
    fp = (-f(x + 2 * h) + 8 * f(x + h) - 8 * f(x - h) + f(x - 2 * h)) / (12 * h)
    m1_exact = 2 * H2M * fp / d**2
    assert abs(stack.band_mass(1) - m1_exact) / abs(m1_exact) <= 1e-6


def test_bands_fold_q_into_the_first_zone():
    # E(q) is periodic with period 2π/d and even (Bloch's theorem): folding, not an error.
    stack = stack_of([(6.0, *WELL), (3.0, *BARRIER)])
    d = stack.total_thickness
    q = np.array([0.2, -0.2, 0.2 + 2 * np.pi / d, 0.2 - 6 * np.pi / d])
    e = stack.bands(q, 2)
    assert np.allclose(e, e[0], rtol=1e-12, atol=0)


# ------------------------------------------------------------------------------ transmission
T_CASES = {
    "single-barrier-mass-step": [(5.0, *WELL), (4.0, *BARRIER), (5.0, *WELL)],
    "double-barrier-mass-step": double_barrier(3.0, 5.0),
    "asymmetric-three-materials": [(5.0, *WELL), (2.5, *BARRIER), (6.0, 0.0, 0.067), (4.0, 200.0, 0.083), (5.0, 50.0, 0.07)],
}


@pytest.mark.parametrize("case", sorted(T_CASES))
def test_transmission_matches_the_exact_transfer_matrix(case):
    # Source: exact transfer matrices with BenDaniel-Duke matching (reference.transfer).
    layers = T_CASES[case]
    stack = stack_of(layers)
    lo = max(stack.cladding_edges)
    e = np.linspace(lo + 0.05, 650.0, 1200)
    t, r = stack.transmission(e, reflection=True)
    t_ref = tm.transmission(layers, e)
    err = np.max(np.abs(t - t_ref))
    assert err <= 1e-9, f"max |ΔT| = {err:.2e}"
    assert np.max(np.abs(t + r - 1)) <= 1e-10


@pytest.mark.parametrize("field", [25.0, -60.0])
def test_transmission_in_a_field_matches_airy_transfer_matrices(field):
    # Source: Airy-function layer matrices (Abramowitz & Stegun 10.4) of reference.transfer,
    # leads at different band edges.
    layers = double_barrier(3.0, 5.0)
    stack = stack_of(layers, field)
    vl, vr = stack.cladding_edges
    assert vl != vr
    e = np.linspace(max(vl, vr) + 0.05, 600.0, 1000)
    t = stack.transmission(e)
    err = np.max(np.abs(t - tm.transmission(layers, e, field)))
    assert err <= 1e-9, f"max |ΔT| = {err:.2e}"
    # Between the two lead edges only one lead is open: T = 0, R = 1.
    tt, rr = stack.transmission(0.5 * (vl + vr), reflection=True)
    assert tt == 0.0 and rr == 1.0


def test_rectangular_barrier_matches_the_closed_form():
    # Source: Griffiths (2005), problem 2.33 (equal masses), and the BenDaniel-Duke form with
    # a barrier mass (reference.closed_forms.rectangular_barrier_transmission).
    for mb in (0.067, 0.092):
        stack = stack_of([(3.0, *WELL), (6.0, 300.0, mb), (3.0, *WELL)])
        e = np.linspace(0.5, 900.0, 1500)
        t = stack.transmission(e)
        exact = cf.rectangular_barrier_transmission(e, 300.0, 6.0, 0.067, mb)
        assert np.max(np.abs(t - exact)) <= 1e-9
    assert isinstance(stack.transmission(100.0), float)


def _narrow_double_barrier():
    return double_barrier(barrier=8.0, well=6.0, lead=5.0)


# ------------------------------------------------------------------------------ current
def test_tsu_esaki_matches_the_reference_current_on_a_double_barrier():
    # Source: reference.current.tsu_esaki_current (Tsu & Esaki 1973 eq. 5, transfer-matrix
    # T(E, V) with Airy layers, adaptive Gauss-Legendre to 1e-10).
    layers = double_barrier(3.0, 5.0, lead=5.0)
    stack = stack_of(layers)
    for bias in (0.02, 0.12, 0.25):
        j = stack.current_density(bias, 77.0, 30.0)
        j_ref = ref_current.tsu_esaki_current(layers, bias, 30.0, 77.0)
        assert abs(j - j_ref) <= 1e-6 * abs(j_ref), (bias, j, j_ref)


def test_tsu_esaki_in_the_sharp_resonance_limit_matches_the_lorentzian_integral():
    # Source: reference.closed_forms.lorentzian_supply_integral (the exact log-gamma form of
    # ∫ L(E) S(E) dE for a unit-peak Lorentzian of width Γ), with E_r and Γ from the reference
    # transfer-matrix poles and the peak height T(E_r) from the reference T(E); prefactor
    # e m kT/(2π²ħ³) from scipy.constants (reference.current.tsu_esaki_prefactor). Valid
    # when Γ ≪ kT and the off-resonance background is negligible: both below 1e-3 here.
    layers = _narrow_double_barrier()
    stack = stack_of(layers)
    bias, temp, ef = 0.005, 77.0, 20.0
    j = stack.current_density(bias, temp, ef)
    field = ref_current.bias_field_kv_cm(layers, bias)
    s = Stack(layers, field)
    er, gam = tm.resonances(layers, field, None, 200.0)
    er, g = er[0], gam[0]
    kT = KB_MEV * temp
    assert g < 1e-3 * kT
    mu_l = s.left_lead + ef
    mu_r = mu_l - 1000 * bias
    tpeak = float(tm.transmission(layers, er, field))
    expected = (ref_current.tsu_esaki_prefactor(layers[0][2], temp)
                * tpeak * cf.lorentzian_supply_integral(er, g, mu_l, mu_r, kT))
    assert abs(j - expected) <= 1e-2 * abs(expected), (j, expected)


def test_current_voltage_shows_negative_differential_resistance():
    # Source for the values: reference.current.tsu_esaki_current at the J-V peak and just past
    # it (the resonance crossing the emitter band edge, Tsu & Esaki 1973, fig. 2).
    layers = double_barrier(3.0, 5.0)
    stack = stack_of(layers)
    v = np.linspace(0.0, 0.4, 41)
    j = stack.current_voltage(v, 77.0, 30.0)
    assert j[0] == 0.0 and np.all(j[1:] > 0)
    k = int(np.argmax(j))
    # NDR: past the peak the current falls by more than a quarter within one 10 mV step (far
    # beyond the 1e-6 accuracy); the values themselves are checked against the reference below.
    assert 0 < k < len(v) - 1 and j[k + 1] < 0.75 * j[k], j
    for i in (k, k + 1):
        ref = ref_current.tsu_esaki_current(layers, v[i], 30.0, 77.0)
        assert abs(j[i] - ref) <= 1e-6 * abs(ref), (v[i], j[i], ref)
    # The helper is the per-bias function, in parallel.
    assert j[7] == stack.current_density(v[7], 77.0, 30.0)


# ------------------------------------------------------------------------------ errors
def test_bad_input_is_a_clear_error():
    stack = stack_of(double_barrier())
    with pytest.raises(ValueError, match="energies"):
        stack.transmission([10.0, -5.0])
    with pytest.raises(ValueError, match="energies"):
        stack.transmission(np.nan)
    with pytest.raises(ValueError, match="layers"):
        sw.Heterostructure([])
    with pytest.raises(ValueError, match="q"):
        stack.bands([0.0, np.inf], 2)
    with pytest.raises(ValueError, match="field_kv_cm"):
        stack_of(double_barrier(), 5.0).bands([0.0], 2)
    with pytest.raises(ValueError, match="count"):
        stack.bands([0.0], 0)
    with pytest.raises(ValueError, match="temperature"):
        stack.current_density(0.1, 0.0, 10.0)
    with pytest.raises(ValueError, match="temperature"):
        stack.current_voltage([0.1], -1.0, 10.0)
    with pytest.raises(ValueError, match="bias"):
        stack.current_density(np.nan, 300.0, 10.0)
    with pytest.raises(ValueError, match="accuracy"):
        stack.transmission([10.0], accuracy=0.5)
    with pytest.raises(ValueError, match="nonparabolicity"):
        sw.Heterostructure([sw.Layer(5.0, 0.0, 0.067, nonparabolicity=0.6), sw.Layer(5.0, 300.0, 0.092)]).transmission([400.0])
    with pytest.raises(TypeError, match="energies"):
        stack.transmission("abc")


def test_plots_draw():
    mpl = pytest.importorskip("matplotlib")
    mpl.use("Agg")
    from specwell import plotting

    sl = stack_of([(6.0, *WELL), (3.0, *BARRIER)])
    ax = plotting.plot_bands(sl, 3)
    assert len(ax.lines) >= 3
    db = stack_of(double_barrier())
    ax = plotting.plot_transmission(db, np.linspace(1.0, 400.0, 300))
    assert ax.get_yscale() == "log"
    v = np.linspace(0.0, 0.4, 21)
    ax = plotting.plot_current_voltage(v, db.current_voltage(v, 77.0, 30.0))
    assert len(ax.specwell_ndr) >= 1
