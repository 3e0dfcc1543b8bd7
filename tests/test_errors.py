import sys
"""Bad input raises ValueError/TypeError whose message names the argument
(DESIGN.md, "Public Python contract"); acceptable array-likes are accepted."""

import numpy as np
import pytest

import specwell as sw

NAN, INF = float("nan"), float("inf")


@pytest.fixture
def grid():
    return sw.FourierGrid(-5.0, 5.0, 16)


@pytest.fixture
def hermite():
    return sw.HermiteBasis(10)  # 20 quadrature points


@pytest.fixture
def ham(grid):
    return sw.Hamiltonian(grid, 0.5 * grid.x**2)


# --------------------------------------------------------------------------- potential


@pytest.mark.parametrize("bad", [NAN, INF, -INF])
def test_potential_array_not_finite(grid, bad):
    v = np.zeros(16)
    v[7] = bad
    with pytest.raises(ValueError, match=r"`potential`.*finite.*index 7"):
        sw.Hamiltonian(grid, v)


@pytest.mark.parametrize("basis_name", ["grid", "hermite"])
def test_potential_callable_not_finite(request, basis_name):
    basis = request.getfixturevalue(basis_name)
    with pytest.raises(ValueError, match=r"`potential`.*finite"):
        sw.Hamiltonian(basis, lambda x: np.where(x > 0, np.inf, 0.0))
    with np.errstate(invalid="ignore"), pytest.raises(ValueError, match=r"`potential`.*finite"):
        sw.Hamiltonian(basis, lambda x: np.sqrt(x))  # NaN for x < 0


def test_potential_wrong_length(grid, hermite):
    with pytest.raises(ValueError, match=r"`potential`.*length 16.*15"):
        sw.Hamiltonian(grid, np.zeros(15))
    # on a Hermite basis the potential lives on the quadrature points, not on `size` points
    with pytest.raises(ValueError, match=r"`potential`.*length 20.*10"):
        sw.Hamiltonian(hermite, np.zeros(10))


def test_potential_two_dimensional(grid):
    with pytest.raises(ValueError, match=r"`potential`.*1-dimensional"):
        sw.Hamiltonian(grid, np.zeros((16, 1)))
    with pytest.raises(ValueError, match=r"`potential`.*1-dimensional"):
        sw.Hamiltonian(grid, np.zeros((4, 4)))


def test_potential_complex_is_type_error(grid):
    with pytest.raises(TypeError, match=r"`potential`.*real"):
        sw.Hamiltonian(grid, np.zeros(16, dtype=complex))
    with pytest.raises(TypeError, match=r"`potential`.*real"):
        sw.Hamiltonian(grid, lambda x: x + 0j)


@pytest.mark.parametrize("bad", ["abc", None, [object()] * 16])
def test_potential_non_numeric_is_type_error(grid, bad):
    with pytest.raises(TypeError, match=r"`potential`"):
        sw.Hamiltonian(grid, bad)


def test_potential_callable_raises(grid):
    def boom(x):
        raise ValueError("boom inside user code")

    # The user's own exception propagates with its type; a note names the argument.
    with pytest.raises(ValueError, match=r"boom inside user code") as info:
        sw.Hamiltonian(grid, boom)
    if sys.version_info >= (3, 11):
        assert any("`potential`" in note for note in info.value.__notes__)


def test_potential_callable_wrong_length_or_shape(grid):
    with pytest.raises(ValueError, match=r"`potential`.*length 16.*15"):
        sw.Hamiltonian(grid, lambda x: x[:-1])
    with pytest.raises(ValueError, match=r"`potential`.*1-dimensional"):
        sw.Hamiltonian(grid, lambda x: np.outer(x, x))


def test_potential_array_likes_accepted(grid):
    reference = sw.Hamiltonian(grid, np.arange(16.0)).matrix()
    # integer list
    np.testing.assert_array_equal(sw.Hamiltonian(grid, list(range(16))).matrix(), reference)
    # integer array
    np.testing.assert_array_equal(sw.Hamiltonian(grid, np.arange(16)).matrix(), reference)
    # non-contiguous float view
    strided = (np.arange(32.0) / 2.0)[::2]
    assert not strided.flags.c_contiguous
    np.testing.assert_array_equal(sw.Hamiltonian(grid, strided).matrix(), reference)
    # read-only float array
    ro = np.arange(16.0)
    ro.setflags(write=False)
    np.testing.assert_array_equal(sw.Hamiltonian(grid, ro).matrix(), reference)
    # big-endian and float32 arrays
    np.testing.assert_array_equal(sw.Hamiltonian(grid, np.arange(16.0).astype(">f8")).matrix(), reference)
    np.testing.assert_array_equal(sw.Hamiltonian(grid, np.arange(16, dtype=np.float32)).matrix(), reference)
    # the potential actually enters: a different one gives a different matrix
    assert not np.array_equal(sw.Hamiltonian(grid, np.zeros(16)).matrix(), reference)


# --------------------------------------------------------------------------- HermiteBasis


@pytest.mark.parametrize("size", [0, -1, -100])
def test_hermite_size_out_of_range(size):
    with pytest.raises(ValueError, match=r"`size`.*\[1, "):
        sw.HermiteBasis(size)


def test_hermite_size_not_integer():
    # pyo3 puts the argument name in the PEP 678 note, which pytest's `match` searches.
    with pytest.raises(TypeError, match="size"):
        sw.HermiteBasis(2.5)


@pytest.mark.parametrize("quadrature", [10, 9, 1, 0, -5])
def test_hermite_quadrature_not_above_size(quadrature):
    with pytest.raises(ValueError, match=r"`quadrature`.*\[11, "):
        sw.HermiteBasis(10, quadrature=quadrature)


def test_hermite_quadrature_just_above_size_accepted():
    assert sw.HermiteBasis(10, quadrature=11).quadrature == 11


@pytest.mark.parametrize("length", [0.0, -1.0, NAN, INF])
def test_hermite_length_invalid(length):
    with pytest.raises(ValueError, match=r"`length`.*> 0"):
        sw.HermiteBasis(5, length=length)


@pytest.mark.parametrize("center", [INF, -INF, NAN])
def test_hermite_center_not_finite(center):
    with pytest.raises(ValueError, match=r"`center`.*finite"):
        sw.HermiteBasis(5, center=center)


# --------------------------------------------------------------------------- FourierGrid


@pytest.mark.parametrize("stop", [1.0, 0.5, -3.0])
def test_fourier_stop_not_above_start(stop):
    with pytest.raises(ValueError, match=r"`stop`.*> start"):
        sw.FourierGrid(1.0, stop, 8)


@pytest.mark.parametrize("points", [1, 0, -4])
def test_fourier_points_too_few(points):
    with pytest.raises(ValueError, match=r"`points`.*\[2, "):
        sw.FourierGrid(0.0, 1.0, points)


@pytest.mark.parametrize("start,stop,name", [(NAN, 1.0, "start"), (0.0, NAN, "stop"), (-INF, 1.0, "start"), (0.0, INF, "stop")])
def test_fourier_bounds_not_finite(start, stop, name):
    with pytest.raises(ValueError, match=rf"`{name}`.*finite"):
        sw.FourierGrid(start, stop, 8)


# --------------------------------------------------------------------------- mass


@pytest.mark.parametrize("mass", [0.0, -1.0, NAN, INF])
@pytest.mark.parametrize("basis_name", ["grid", "hermite"])
def test_mass_scalar_invalid(request, basis_name, mass):
    basis = request.getfixturevalue(basis_name)
    with pytest.raises(ValueError, match=r"`mass`.*> 0"):
        sw.Hamiltonian(basis, np.zeros(basis.x.size), mass=mass)


def test_mass_array_on_hermite(hermite):
    with pytest.raises(ValueError, match=r"`mass`.*FourierGrid"):
        sw.Hamiltonian(hermite, np.zeros(20), mass=np.ones(10))
    with pytest.raises(ValueError, match=r"`mass`.*FourierGrid"):
        sw.Hamiltonian(hermite, np.zeros(20), mass=np.ones(20))


def test_mass_array_wrong_length(grid):
    with pytest.raises(ValueError, match=r"`mass`.*grid point \(16\).*length 15"):
        sw.Hamiltonian(grid, np.zeros(16), mass=np.ones(15))


@pytest.mark.parametrize("bad", [0.0, -0.5, NAN, INF])
def test_mass_array_with_bad_entry(grid, bad):
    m = np.ones(16)
    m[3] = bad
    with pytest.raises(ValueError, match=r"`mass`.*index 3"):
        sw.Hamiltonian(grid, np.zeros(16), mass=m)


def test_mass_array_non_numeric(grid):
    with pytest.raises(TypeError, match=r"`mass`"):
        sw.Hamiltonian(grid, np.zeros(16), mass=np.ones(16, dtype=complex))
    with pytest.raises(ValueError, match=r"`mass`.*1-dimensional"):
        sw.Hamiltonian(grid, np.zeros(16), mass=np.ones((16, 1)))


# --------------------------------------------------------------------------- options


@pytest.mark.parametrize("units", ["SI", "Natural", "", "cgs"])
def test_units_unknown_lists_choices(grid, units):
    with pytest.raises(ValueError, match=r'`units`.*"natural".*"atomic".*"semiconductor"') as info:
        sw.Hamiltonian(grid, np.zeros(16), units=units)
    assert repr(units) in str(info.value) or f'"{units}"' in str(info.value)


@pytest.mark.parametrize("method", ["lu", "Dense", "eigh"])
def test_method_unknown_lists_choices(ham, method):
    with pytest.raises(ValueError, match=r'`method`.*"auto".*"dense"'):
        ham.solve(2, method=method)


@pytest.mark.parametrize("count", [0, -1, 17, 1000])
def test_count_out_of_range(ham, count):
    with pytest.raises(ValueError, match=r"`count`.*\[1, 16\]"):
        ham.solve(count)


def test_count_full_range_accepted(ham):
    assert ham.solve(16).energies.shape == (16,)
    assert ham.solve(1).energies.shape == (1,)


@pytest.mark.parametrize("tol", [0.0, -1e-8, NAN, INF])
def test_tol_invalid(ham, tol):
    with pytest.raises(ValueError, match=r"`tol`"):
        ham.solve(2, tol=tol)


# --------------------------------------------------------------------------- apply / wavefunctions


@pytest.mark.parametrize("n", [15, 17, 0])
def test_apply_wrong_length(ham, n):
    with pytest.raises(ValueError, match=r"`psi`.*length 16"):
        ham.apply(np.ones(n))


@pytest.mark.parametrize("dtype", [float, complex])
def test_apply_not_finite(ham, dtype):
    psi = np.ones(16, dtype=dtype)
    psi[5] = NAN
    with pytest.raises(ValueError, match=r"`psi`.*finite.*index 5"):
        ham.apply(psi)
    psi = np.ones(16, dtype=dtype)
    psi[2] = INF if dtype is float else complex(1.0, INF)
    with pytest.raises(ValueError, match=r"`psi`.*finite"):
        ham.apply(psi)


def test_apply_non_numeric(ham):
    with pytest.raises(TypeError, match=r"`psi`"):
        ham.apply(["a"] * 16)
    with pytest.raises(ValueError, match=r"`psi`.*1-dimensional"):
        ham.apply(np.ones((16, 1)))


@pytest.mark.parametrize("basis_name", ["grid", "hermite"])
def test_wavefunctions_not_finite(request, basis_name):
    basis = request.getfixturevalue(basis_name)
    s = sw.Hamiltonian(basis, 0.5 * basis.x**2).solve(2)
    with pytest.raises(ValueError, match=r"`x`.*finite.*index 1"):
        s.wavefunctions([0.0, NAN, 1.0])
    with pytest.raises(ValueError, match=r"`x`.*finite"):
        s.wavefunctions(np.array([INF]))
    with pytest.raises(ValueError, match=r"`x`.*1-dimensional"):
        s.wavefunctions(np.zeros((2, 2)))


# --------------------------------------------------------------------------- basis type


@pytest.mark.parametrize("bad", ["grid", None, 3.0, np.linspace(0, 1, 16)])
def test_basis_wrong_type(bad):
    with pytest.raises(TypeError, match=r"`basis`.*HermiteBasis.*FourierGrid"):
        sw.Hamiltonian(bad, np.zeros(16))


def test_errors_are_not_convergence_errors():
    # ConvergenceError is reserved for iterative methods missing tol (a RuntimeError).
    assert issubclass(sw.ConvergenceError, RuntimeError)
    assert not issubclass(sw.ConvergenceError, ValueError)


# ------------------------------------------------------------------ huge integers


@pytest.mark.parametrize(
    "call",
    [
        lambda: sw.HermiteBasis(10**30),
        lambda: sw.FourierGrid(0.0, 1.0, 10**30),
        lambda: sw.Hamiltonian(sw.FourierGrid(0.0, 1.0, 4), np.zeros(4)).solve(10**20),
    ],
    ids=["size", "points", "count"],
)
def test_huge_integers_raise_value_error(call):
    with pytest.raises(ValueError):
        call()


def test_huge_finite_potential_is_refused():
    # Values near the float64 limit would overflow the eigensolver; refused up front.
    with pytest.raises(ValueError, match=r"`potential`"):
        sw.Hamiltonian(sw.FourierGrid(0.0, 1.0, 8), np.full(8, 1e308))


def test_state_whose_norm_overflows_is_refused():
    # Finite components, but Σ|ψ|² overflows float64: norms and energies would be inf.
    grid = sw.FourierGrid(-5.0, 5.0, 64)
    prop = sw.SplitStep(grid, 0.5 * grid.x**2, dt=0.01)
    psi = sw.gaussian_packet(grid, 0.0, p0=0.0, sigma=1.0) * 1e160
    assert np.all(np.isfinite(psi))
    with pytest.raises(ValueError, match=r"`psi0`.*finite Σ\|ψ\|²"):
        prop.run(psi, 3)
    prop.run(psi * 1e-20, 3)  # |ψ| ~ 1e140: accepted


def test_float_size_is_type_error_naming_argument():
    with pytest.raises(TypeError, match=r"`size`"):
        sw.HermiteBasis(2.5)


# --------------------------------------------------------------------------- product grids, GPE


def test_product_grid_arguments_named():
    g = sw.FourierGrid(-1.0, 1.0, 8)
    for bad, name in [((None, g), "gx"), ((g, 3.0), "gy"), ((g, g, "z"), "gz")]:
        with pytest.raises(TypeError, match=rf"`{name}`.*FourierGrid"):
            sw.ProductGrid(*bad)
    big = sw.FourierGrid(0.0, 1.0, 1 << 15)
    with pytest.raises(ValueError, match=r"`axes`.*points"):
        sw.ProductGrid(big, big, big)


@pytest.mark.parametrize("bad", [NAN, INF, -INF])
def test_nonlinearity_not_finite(grid, bad):
    with pytest.raises(ValueError, match=r"`nonlinearity`.*finite"):
        sw.SplitStep(grid, np.zeros(16), dt=0.1, nonlinearity=bad)


def test_nonlinearity_not_a_number(grid):
    with pytest.raises(TypeError):
        sw.SplitStep(grid, np.zeros(16), dt=0.1, nonlinearity="strong")


def test_cold_atom_helpers_name_arguments():
    with pytest.raises(ValueError, match=r"`frequency_hz`"):
        sw.angular_frequency(-1.0)
    with pytest.raises(ValueError, match=r"`frequency_hz`"):
        sw.oscillator_length(87.0, 0.0)
    with pytest.raises(ValueError, match=r"`mass`"):
        sw.oscillator_length(-87.0, 10.0)
    with pytest.raises(ValueError, match=r"`units`.*cold-atom"):
        sw.coupling_constant(0.005, 1e4, 87.0, units="SI")


def test_rejected_huge_value_is_printed_compactly():
    # Rust's default float formatting writes 1e308 with 309 digits; the message must stay readable.
    with pytest.raises(ValueError) as info:
        sw.HermiteBasis(16, center=0, length=-1e308)
    assert str(info.value) == "`length` must be a finite number > 0; got -1e308"
