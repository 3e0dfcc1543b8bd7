"""Demo: bound states of an illustrative quantum well and an anharmonic trap.

Run ``python -m specwell.demo`` (``--no-plot`` to skip the figure,
``--out FILE`` to choose where the PNG goes).

Scenario (our own, parameters illustrative, not a real device): an electron of
effective mass 0.067 m_e in a 12 nm wide well, 220 meV deep, whose edges are
graded over about 0.4 nm; solved on a Fourier grid in semiconductor units
(nm, meV). Then the same well tilted by a weak field, and an anharmonic trap
V = x⁴/4 − 2x² (natural units) solved in both bases to show they agree.

Model limits: single-band effective mass, parabolic band, no many-body effects;
the numbers are as good as that model and these illustrative parameters.
"""

from __future__ import annotations

import argparse
import sys

import numpy as np

import specwell as sw

WIDTH_NM = 12.0
DEPTH_MEV = 220.0
GRADING_NM = 0.4
MASS = 0.067


def well(x: np.ndarray, field_mv_per_nm: float = 0.0) -> np.ndarray:
    """Graded square well: 0 outside, −DEPTH inside, tanh edges; optional uniform field."""
    half = WIDTH_NM / 2
    inside = 0.5 * (np.tanh((x + half) / GRADING_NM) - np.tanh((x - half) / GRADING_NM))
    return -DEPTH_MEV * inside + field_mv_per_nm * x


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(prog="python -m specwell.demo", description=__doc__.splitlines()[0])
    parser.add_argument("--no-plot", action="store_true", help="do not write the PNG figure")
    parser.add_argument("--out", default="specwell_demo.png", help="figure path (default: %(default)s)")
    args = parser.parse_args(argv)

    print(__doc__.split("\n\n")[2].replace("\n", " "))
    print()
    grid = sw.FourierGrid(-40.0, 40.0, 512)
    h = sw.Hamiltonian(grid, well, mass=MASS, units="semiconductor")
    bound = h.solve(8, method="dense")
    levels = [e for e in bound.energies if e < 0]
    tilted = sw.Hamiltonian(grid, lambda x: well(x, field_mv_per_nm=2.0), mass=MASS, units="semiconductor")
    tilted_spec = tilted.solve(2, method="dense")  # deeper levels stay well bound in the field
    f = bound.oscillator_strengths()

    print(f"Graded well, {WIDTH_NM:g} nm wide, {DEPTH_MEV:g} meV deep, m* = {MASS} m_e "
          f"({grid.points}-point Fourier grid on [{grid.start:g}, {grid.stop:g}) nm)")
    print(f"{'level':>5} {'E (meV)':>12} {'E - E0 (meV)':>13} {'f(0->n)':>9} {'E at 20 kV/cm':>14} {'residual':>10}")
    for n, e in enumerate(levels):
        tilted_e = f"{tilted_spec.energies[n]:14.4f}" if n < 2 else f"{'quasi-bound':>14}"
        print(f"{n:>5} {e:12.4f} {e - levels[0]:13.4f} {f[0, n]:9.4f} {tilted_e} {bound.residuals[n]:10.1e}")
    print(f"{len(levels)} bound levels; the 0->1 intersubband line sits at {levels[1] - levels[0]:.2f} meV "
          f"(wavelength {1239.84198 / (levels[1] - levels[0]):.2f} µm).")
    print("In the field, levels near the barrier top become quasi-bound (they tunnel out); not listed.")
    print()

    # Anharmonic trap in both bases.
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
        from specwell.plotting import plot_levels

        fig, axes = plt.subplots(1, 2, figsize=(11, 4.5))
        x = np.linspace(-20, 20, 800)
        sub = h.solve(len(levels), method="dense")
        plot_levels(sub, well, x, ax=axes[0])
        axes[0].set_title(f"{WIDTH_NM:g} nm graded well, m* = {MASS} m_e")
        plot_levels(tilted_spec, lambda x: well(x, 2.0), x, ax=axes[1])
        axes[1].set_title("same well at 20 kV/cm")
        fig.tight_layout()
        fig.savefig(args.out, dpi=120)
        print(f"\nfigure written to {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
