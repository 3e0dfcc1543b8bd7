"""Material table and non-parabolic wells.

Table values: Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001) (VMR). The
anchor values below are recalled from memory (as is the whole table; see
docs/materials_notes.md). The non-parabolic finite well is checked against the
BenDaniel-Duke transcendental equations with m(E) = m(1 + α(E − E_c)) in both layers
(Nelson, Miller & Kleinman 1987), solved with scipy.optimize.brentq
(tests/reference/closed_forms.py).
"""

import numpy as np
import pytest

import specwell as sw
from reference import closed_forms


def test_gaas_anchor_values():
    # VMR Table (GaAs): Eg(0) = 1519 meV, Varshni α = 0.5405 meV/K, β = 204 K, m* = 0.067
    # (recalled from memory).
    g0 = sw.material("GaAs", temperature=0.0)
    assert g0.band_gap == pytest.approx(1519.0, abs=1e-9)
    assert g0.mass == pytest.approx(0.067, abs=1e-12)
    g300 = sw.material("GaAs", temperature=300.0)
    assert g300.band_gap == pytest.approx(1519.0 - 0.5405 * 300**2 / (300 + 204), rel=1e-12)
    assert g300.conduction_band == pytest.approx(g300.valence_band + g300.band_gap, rel=1e-14)


def test_algaas_gap_bowing_and_offset_from_the_table_formulas():
    # Γ-gap bowing C = −127 + 1310x meV (VMR, recalled): Eg(x) = x·Eg(AlAs) + (1−x)·Eg(GaAs) − x(1−x)C.
    x = 0.3
    a, g, t = sw.material("AlAs", temperature=0.0), sw.material("GaAs", temperature=0.0), sw.material("AlGaAs", x=x, temperature=0.0)
    c = -127.0 + 1310.0 * x
    assert t.band_gap == pytest.approx(x * a.band_gap + (1 - x) * g.band_gap - x * (1 - x) * c, rel=1e-12)
    # Conduction-band offset of GaAs/Al0.3Ga0.7As: from the same table (VBO interpolated
    # with its bowing, plus the gap); about 0.25–0.26 eV (recalled range).
    offset = t.conduction_band - g.conduction_band
    assert 230.0 < offset < 290.0


def test_ingaas_lattice_matched_to_inp_at_300k():
    # In0.53Ga0.47As: Eg(300 K) ≈ 0.73–0.75 eV, m* ≈ 0.041–0.045 m_e (published ranges, recalled).
    m = sw.material("InGaAs", x=0.53, temperature=300.0)
    assert 720.0 < m.band_gap < 760.0
    assert 0.040 < m.mass < 0.046


def test_bad_material_arguments_name_themselves():
    with pytest.raises(ValueError, match="`name`.*GaAs"):
        sw.material("Unobtainium")
    with pytest.raises(ValueError, match="`x`"):
        sw.material("AlGaAs", x=1.5)
    with pytest.raises(ValueError, match="`x`"):
        sw.material("AlGaAs")
    with pytest.raises(ValueError, match="`x`"):
        sw.material("GaAs", x=0.2)
    with pytest.raises(ValueError, match="`temperature"):
        sw.material("GaAs", temperature=-5.0)
    assert "AlGaAs" in sw.MATERIALS and "InSb" in sw.MATERIALS


def test_layer_from_material_fills_edge_mass_permittivity_and_alpha():
    well, barrier = sw.material("GaAs", temperature=77), sw.material("AlGaAs", x=0.3, temperature=77)
    layer = sw.Layer.from_material(barrier, 20.0, reference=well, doping=1e17)
    assert layer.band_edge == pytest.approx(barrier.conduction_band - well.conduction_band)
    assert layer.mass == barrier.mass and layer.permittivity == barrier.permittivity
    assert layer.nonparabolicity == pytest.approx(barrier.nonparabolicity("three_band"))
    assert layer.doping == 1e17
    parabolic = sw.Layer.from_material(well, 10.0, reference=well, nonparabolicity=None)
    assert parabolic.band_edge == 0.0 and parabolic.nonparabolicity == 0.0
    with pytest.raises(TypeError, match="`material`"):
        sw.Layer.from_material("GaAs", 10.0)


@pytest.mark.parametrize("alpha_w, alpha_b", [(0.6, 0.4), (1.5, 0.0), (0.0, 0.9)])
def test_nonparabolic_finite_well_against_the_transcendental_condition(alpha_w, alpha_b):
    stack = sw.Heterostructure([sw.Layer(20, 250, 0.092, nonparabolicity=alpha_b),
                                sw.Layer(10, 0, 0.067, nonparabolicity=alpha_w),
                                sw.Layer(20, 250, 0.092, nonparabolicity=alpha_b)])
    exact = closed_forms.finite_well_levels(10.0, 250.0, 0.067, 0.092, alpha_well=alpha_w, alpha_barrier=alpha_b)
    st = stack.solve(accuracy=1e-11)
    assert st.count == len(exact)
    np.testing.assert_allclose(st.energies, exact, rtol=1e-10, atol=0)
    assert np.all(st.residuals < 1e-8)


def test_alpha_to_zero_equals_the_parabolic_solve():
    def stack(a):
        return sw.Heterostructure([sw.Layer(20, 250, 0.092, nonparabolicity=a), sw.Layer(10, 0, 0.067, nonparabolicity=a),
                                   sw.Layer(20, 250, 0.092, nonparabolicity=a)])
    parabolic = stack(0.0).solve(accuracy=1e-11).energies
    tiny = stack(1e-9).solve(accuracy=1e-11).energies
    np.testing.assert_allclose(tiny, parabolic, rtol=1e-10, atol=0)
    # Non-parabolicity in the well alone lowers the levels (heavier mass above its band edge).
    well_only = sw.Heterostructure([sw.Layer(20, 250, 0.092), sw.Layer(10, 0, 0.067, nonparabolicity=0.7),
                                    sw.Layer(20, 250, 0.092)])
    assert np.all(well_only.solve(accuracy=1e-9).energies < parabolic)
