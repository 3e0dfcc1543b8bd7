"""Demo: bound levels, dipoles and a Stark fan of an illustrative coupled-well stack.

Run ``python -m specwell.demo`` (``--no-plot`` to skip the figure,
``--out FILE`` to choose where the PNG goes).

Scenario (our own, parameters illustrative, not a real device): two coupled wells of a
low-mass material (m* = 0.067 m_e), 9 nm and 6 nm wide, separated by a 2 nm barrier and
clad by 15 nm barriers 280 meV higher with a heavier mass (0.09 m_e). The levels are
solved on Legendre spectral elements with an element edge on every interface
(BenDaniel-Duke), self-converged to 1e-10; then the Stark fan of the structure from
-40 to 40 kV/cm, and an anharmonic trap V = x^4/4 - 2x^2 (natural units) in two bases.

Model limits: single-band effective mass, parabolic bands in this demo (non-parabolicity
off), no electron-electron interaction in these solves (Schrödinger-Poisson, a mean-field
option, is not used here); the material parameters are illustrative and must be replaced
by verified ones for real work. The numbers are as good as that model.
"""

from __future__ import annotations

import argparse
import sys
import time

import numpy as np

import specwell as sw

BARRIER_MEV, M_WELL, M_BARRIER = 280.0, 0.067, 0.09


def coupled_wells(field_kv_cm: float = 0.0) -> sw.Heterostructure:
    """Barrier | 9 nm well | 2 nm barrier | 6 nm well | barrier (illustrative numbers).

    Parameters
    ----------
    field_kv_cm : float, default 0.0
        Field across the stack (kV/cm).

    Returns
    -------
    Heterostructure
    """
    return sw.Heterostructure([sw.Layer(15, BARRIER_MEV, M_BARRIER), sw.Layer(9, 0.0, M_WELL),
                               sw.Layer(2, BARRIER_MEV, M_BARRIER), sw.Layer(6, 0.0, M_WELL),
                               sw.Layer(15, BARRIER_MEV, M_BARRIER)], field_kv_cm=field_kv_cm)


def main(argv=None) -> int:
    """Run the demo from the command line (``python -m specwell.demo``).

    Parameters
    ----------
    argv : list of str, optional
        Command-line arguments (default: ``sys.argv[1:]``): ``--no-plot``, ``--out PATH``.

    Returns
    -------
    int
        Exit status (0).
    """
    parser = argparse.ArgumentParser(prog="python -m specwell.demo", description=__doc__.splitlines()[0])
    parser.add_argument("--no-plot", action="store_true", help="do not write the PNG figure")
    parser.add_argument("--out", default="specwell_demo.png", help="figure path (default: %(default)s)")
    args = parser.parse_args(argv)

    print(__doc__.split("\n\n")[2].replace("\n", " "))
    print()
    stack = coupled_wells()
    t0 = time.perf_counter()
    st = stack.solve(accuracy=1e-10)  # all bound levels
    dt = time.perf_counter() - t0
    f = st.oscillator_strengths()
    print(f"All bound levels ({st.count}), solved in {dt * 1e3:.1f} ms on {st.basis.size} element unknowns "
          f"(order {st.basis.order}):")
    print(f"{'level':>5} {'E (meV)':>12} {'error est.':>11} {'f(0->n)':>9} {'bound':>6}")
    for n, e in enumerate(st.energies):
        print(f"{n:>5} {e:12.6f} {st.errors[n]:11.1e} {f[0, n]:9.4f} {str(bool(st.bound[n])):>6}")
    line = st.energies[1] - st.energies[0]
    print(f"0->1 line at {line:.4f} meV (wavelength {1239.84198 / line:.2f} µm).")
    print()

    fields = np.linspace(-40.0, 40.0, 81)
    t0 = time.perf_counter()
    fan = sw.solve_batch(None, [coupled_wells(F) for F in fields], 3, accuracy=1e-10)
    dt = time.perf_counter() - t0
    i_min = int(np.argmin(fan.energies[:, 1] - fan.energies[:, 0]))
    print(f"Stark fan: {len(fields)} fields x 3 levels in {dt * 1e3:.0f} ms; the two lowest levels come "
          f"closest at {fields[i_min]:+.0f} kV/cm (splitting {fan.energies[i_min, 1] - fan.energies[i_min, 0]:.3f} meV).")
    print()

    pot = lambda x: 0.25 * x**4 - 2.0 * x**2  # noqa: E731
    he = sw.Hamiltonian(sw.HermiteBasis(80, length=0.8), pot).solve(6).energies
    fe = sw.Hamiltonian(sw.FourierGrid(-8.0, 8.0, 256), pot).solve(6).energies
    print("Anharmonic trap V = x^4/4 - 2x^2 (natural units): Hermite vs Fourier")
    print(f"{'level':>5} {'Hermite':>18} {'Fourier':>18} {'|diff|':>9}")
    for n, (a, b) in enumerate(zip(he, fe)):
        print(f"{n:>5} {a:18.12f} {b:18.12f} {abs(a - b):9.1e}")
    print()
    print(__doc__.split("\n\n")[3].replace("\n", " "))

    if not args.no_plot:
        try:
            import matplotlib

            matplotlib.use("Agg")
            import matplotlib.pyplot as plt
        except ImportError:
            print("\n(matplotlib not installed: no figure; pip install 'specwell[plot]')")
            return 0
        from specwell.plotting import plot_band_diagram, plot_stark_fan

        fig, axes = plt.subplots(1, 2, figsize=(11, 4.5))
        plot_band_diagram(st, ax=axes[0])
        axes[0].set_title("coupled wells (illustrative), all bound levels")
        plot_stark_fan(fan, fields, ax=axes[1])
        axes[1].set_title("Stark fan, three lowest levels")
        fig.tight_layout()
        fig.savefig(args.out, dpi=120)
        print(f"\nfigure written to {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
