"""Plots (optional extra ``plot``: matplotlib). Every function returns the Axes and accepts ``ax=``."""

from __future__ import annotations

from typing import Optional, Sequence

import numpy as np

__all__ = ["plot_levels"]


def _axes(ax):
    if ax is not None:
        return ax
    try:
        import matplotlib.pyplot as plt
    except ImportError as exc:  # pragma: no cover - depends on the environment
        raise ImportError("plotting needs matplotlib: pip install 'specwell[plot]'") from exc
    _, ax = plt.subplots(figsize=(7, 5))
    return ax


def plot_levels(spectrum, potential, x: Optional[Sequence[float]] = None, *, scale: Optional[float] = None,
                ax=None, units: Optional[str] = None, density: bool = False):
    """Draw the potential and each level as a line at its energy with ψ_n (or |ψ_n|²) offset on it.

    Parameters
    ----------
    spectrum : Spectrum
        States to draw.
    potential : callable or ndarray
        V(x), vectorised callable, or samples on ``x``.
    x : array_like, optional
        Plot points (default: 800 points over the basis' own points).
    scale : float, optional
        Vertical scale of the wavefunctions in energy units (default: 40 % of the mean level spacing).
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    units : str, optional
        Axis-label units as ``"nm, meV"``-style text (default: from ``spectrum.units``).
    density : bool
        Draw |ψ|² instead of ψ.

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    if x is None:
        pts = np.asarray(spectrum.x)
        x = np.linspace(pts.min(), pts.max(), 800)
    x = np.asarray(x, dtype=float)
    v = potential(x) if callable(potential) else np.asarray(potential, dtype=float)
    e = np.asarray(spectrum.energies)
    psi = spectrum.wavefunctions(x)
    if density:
        psi = psi**2
    if scale is None:
        spacing = np.mean(np.diff(e)) if len(e) > 1 else max(abs(e[0]), 1.0)
        scale = 0.4 * spacing
    amp = np.max(np.abs(psi), axis=1, keepdims=True)
    amp[amp == 0] = 1.0
    ax.plot(x, v, color="0.2", lw=1.5, label="V(x)")
    for n, (en, p) in enumerate(zip(e, psi / amp)):
        line, = ax.plot(x, en + scale * p, lw=1.2)
        ax.axhline(en, color=line.get_color(), lw=0.6, ls="--")
    lo = min(np.min(v), e.min() - scale)
    hi = e.max() + 1.5 * scale
    ax.set_ylim(lo - 0.05 * (hi - lo), hi)
    if units is None:
        units = {"semiconductor": "nm, meV", "atomic": "bohr, hartree"}.get(spectrum.units, "")
    lu, eu = (units.split(", ") + ["", ""])[:2] if units else ("", "")
    ax.set_xlabel(f"x ({lu})" if lu else "x")
    ax.set_ylabel(f"energy ({eu})" if eu else "energy")
    return ax
