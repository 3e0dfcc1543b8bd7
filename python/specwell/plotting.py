"""Plots (optional extra ``plot``: matplotlib). Every function returns the Axes and accepts ``ax=``."""

from __future__ import annotations

from typing import Optional, Sequence

import numpy as np

__all__ = ["plot_levels", "plot_density", "plot_convergence", "plot_potential_stack", "plot_band_diagram",
           "plot_stark_fan", "plot_self_consistent", "plot_density_slice", "plot_column_density", "plot_bands",
           "plot_transmission", "plot_current_voltage"]


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
    # Show barrier tops unless the potential runs far above the levels (e.g. a trap's walls).
    hi = max(e.max() + 1.5 * scale, min(float(np.max(v)), e.max() + 3.0 * (e.max() - lo)))
    ax.set_ylim(lo - 0.05 * (hi - lo), hi + 0.05 * (hi - lo))
    if units is None:
        units = {"semiconductor": "nm, meV", "atomic": "bohr, hartree"}.get(spectrum.units, "")
    lu, eu = (units.split(", ") + ["", ""])[:2] if units else ("", "")
    coord = "z" if getattr(spectrum, "heterostructure", None) is not None else "x"
    ax.set_xlabel(f"{coord} ({lu})" if lu else coord)
    ax.set_ylabel(f"energy ({eu})" if eu else "energy")
    return ax


def _unit_labels(units: Optional[str]) -> tuple:
    """(length, energy, time) axis-label units of a unit system name ("" when dimensionless)."""
    return {"semiconductor": ("nm", "meV", "fs"), "atomic": ("bohr", "hartree", "a.u."),
            "cold-atom": ("µm", "ħ/ms", "ms"), "molecular": ("Å", "cm⁻¹", "fs")}.get(units or "", ("", "", ""))


def _label(name: str, unit: str) -> str:
    return f"{name} ({unit})" if unit else name


def plot_density(run, ax=None, *, log: bool = False, vmin: Optional[float] = None, cmap: str = "viridis",
                 colorbar: bool = True, potential=None, xlim: Optional[Sequence[float]] = None):
    """Space-time map of the probability density |ψ(x, t)|² of a propagation run.

    Parameters
    ----------
    run : Run
        Result of ``SplitStep.run``; uses ``run.x``, ``run.times`` and ``run.states``.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    log : bool
        Colour by log10 |ψ|² (shows small transmitted or reflected parts).
    vmin : float, optional
        Lower colour limit (of log10 |ψ|² when ``log``; default: 6 decades below the maximum).
    cmap : str
        Matplotlib colour map.
    colorbar : bool
        Add a colour bar.
    potential : callable or ndarray, optional
        V(x) (callable or samples on ``run.x``); drawn as white contour lines of its
        non-zero regions (e.g. barriers) over the map.
    xlim : (float, float), optional
        Horizontal range (length units).

    Returns
    -------
    matplotlib.axes.Axes
        x on the horizontal axis, time on the vertical axis.
    """
    ax = _axes(ax)
    x = np.asarray(run.x, dtype=float)
    t = np.asarray(run.times, dtype=float)
    rho = np.abs(np.asarray(run.states)) ** 2
    if rho.ndim != 2 or rho.shape != (len(t), len(x)):
        raise ValueError(f"`run.states` must have shape (len(run.times), len(run.x)) = ({len(t)}, {len(x)}); "
                         f"got {rho.shape}")
    if log:
        top = float(np.max(rho)) if rho.size else 1.0
        data = np.log10(np.maximum(rho, top * 1e-300 if top > 0 else 1e-300))
        lo = np.log10(top) - 6.0 if vmin is None and top > 0 else vmin
        label = "log10 |ψ|²"
    else:
        data, lo, label = rho, (0.0 if vmin is None else vmin), "|ψ|²"
    if len(t) > 1:
        extent_t = (t[0], t[-1])
    else:
        extent_t = (t[0] - 0.5, t[0] + 0.5)
    dx = x[1] - x[0] if len(x) > 1 else 1.0
    mesh = ax.imshow(data, origin="lower", aspect="auto", cmap=cmap, vmin=lo, interpolation="nearest",
                     extent=(x[0] - dx / 2, x[-1] + dx / 2, extent_t[0], extent_t[1]))
    if potential is not None:
        v = potential(x) if callable(potential) else np.asarray(potential, dtype=float)
        if v.shape != x.shape:
            raise ValueError(f"`potential` must give {len(x)} samples on run.x; got shape {v.shape}")
        span = np.ptp(v)
        if span > 0:
            mask = np.abs(v - np.median(v)) > 0.05 * span
            edges = np.flatnonzero(np.diff(mask.astype(int)))
            for i in edges:
                ax.axvline(0.5 * (x[i] + x[i + 1]), color="w", lw=0.7, alpha=0.8)
    if colorbar:
        ax.figure.colorbar(mesh, ax=ax, label=label)
    lu, _, tu = _unit_labels(getattr(run, "units", None))
    ax.set_xlabel(_label("x", lu))
    ax.set_ylabel(_label("t", tu))
    if xlim is not None:
        ax.set_xlim(*xlim)
    return ax


def plot_convergence(sizes, errors, ax=None, *, labels: Optional[Sequence[str]] = None,
                     slopes: Optional[Sequence[float]] = None, floor: Optional[float] = None,
                     xlabel: str = "basis size N", ylabel: str = "|E_N − E_ref|", marker: str = "o"):
    """Log-log plot of an energy error against basis size, with optional reference slopes N^(−p).

    Parameters
    ----------
    sizes : array_like, shape (n,)
        Basis sizes (> 0).
    errors : array_like, shape (n,) or (n, k)
        Errors; each column of a 2-D array is one curve (e.g. one level or one basis).
        Zero errors (exact agreement) are drawn at the smallest positive error / 10.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    labels : sequence of str, optional
        Legend label per curve.
    slopes : sequence of float, optional
        Orders p of reference lines ∝ N^(−p), anchored at the first point of the first curve.
    floor : float, optional
        Draw a horizontal line at this error (e.g. the round-off level).
    xlabel, ylabel : str
        Axis labels.
    marker : str
        Marker of the data points.

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    n = np.asarray(sizes, dtype=float)
    err = np.abs(np.asarray(errors, dtype=float))
    if err.ndim == 1:
        err = err[:, None]
    if n.ndim != 1 or err.ndim != 2 or err.shape[0] != n.shape[0]:
        raise ValueError(f"`errors` must have shape ({n.shape[0]},) or ({n.shape[0]}, k); got {np.shape(errors)}")
    if np.any(n <= 0):
        raise ValueError("`sizes` must all be > 0")
    if labels is not None and len(labels) != err.shape[1]:
        raise ValueError(f"`labels` must have one entry per curve ({err.shape[1]}); got {len(labels)}")
    positive = err[err > 0]
    tiny = positive.min() / 10 if positive.size else 1e-16
    plotted = np.where(err > 0, err, tiny)
    for j in range(err.shape[1]):
        ax.loglog(n, plotted[:, j], marker=marker, label=None if labels is None else labels[j])
    for p in slopes or ():
        ref = plotted[0, 0] * (n / n[0]) ** (-float(p))
        ax.loglog(n, ref, ls=":", color="0.4", lw=1.0, label=f"∝ N^-{p:g}")
    if floor is not None:
        ax.axhline(floor, color="0.6", lw=0.8, ls="--", label=f"floor {floor:.0e}")
    ax.set_xlabel(xlabel)
    ax.set_ylabel(ylabel)
    if labels is not None or slopes or floor is not None:
        ax.legend()
    ax.grid(True, which="both", alpha=0.3)
    return ax


def plot_potential_stack(stack, ax=None, *, z: Optional[Sequence[float]] = None, padding: Optional[float] = None,
                         mass: bool = True, interfaces: bool = True):
    """Band-edge profile V(z) of a Heterostructure, with the effective-mass profile on a twin axis.

    Parameters
    ----------
    stack : Heterostructure
        The layer stack (nm, meV, m_e).
    ax : matplotlib Axes, optional
        Axes for the band edge; a new figure is made if omitted. The mass goes on ``ax.twinx()``.
    z : array_like, optional
        Plot points (nm); default: 1000 points over the stack plus ``padding`` on both sides.
    padding : float, optional
        Barrier padding drawn on each side (nm; default 10 % of the stack thickness).
    mass : bool
        Draw m(z) on a right-hand twin axis.
    interfaces : bool
        Mark the interfaces with thin vertical lines.

    Returns
    -------
    matplotlib.axes.Axes
        The band-edge Axes (the mass axis is reachable as ``ax.specwell_mass_axis``).
    """
    ax = _axes(ax)
    total = float(stack.total_thickness)
    if z is None:
        pad = 0.1 * total if padding is None else float(padding)
        z = np.linspace(-pad, total + pad, 1000)
    z = np.asarray(z, dtype=float)
    v = np.asarray(stack.potential(z))
    ax.plot(z, v, color="C0", lw=1.6, label="band edge")
    ax.set_xlabel("z (nm)")
    ax.set_ylabel("band edge (meV)", color="C0")
    if interfaces:
        for zi in np.asarray(stack.interfaces):
            ax.axvline(zi, color="0.7", lw=0.6, ls=":")
    if mass:
        m = np.asarray(stack.mass(z))
        ax2 = ax.twinx()
        ax2.plot(z, m, color="C3", lw=1.0, ls="--", label="mass")
        ax2.set_ylabel("effective mass (m_e)", color="C3")
        lo, hi = float(m.min()), float(m.max())
        margin = 0.1 * (hi - lo) if hi > lo else 0.1 * max(hi, 1e-3)
        ax2.set_ylim(lo - margin, hi + margin)
        ax.specwell_mass_axis = ax2
    else:
        ax.specwell_mass_axis = None
    return ax


def plot_band_diagram(spectrum, ax=None, *, z: Optional[Sequence[float]] = None, scale: Optional[float] = None,
                      density: bool = True, unbound: bool = False):
    """Band diagram of a layered structure: the band edge V(z), each level as a line at its
    energy and |ψ|² (or ψ) offset on it; barrier tops and the cladding edges stay in view.

    Parameters
    ----------
    spectrum : Spectrum
        Levels of a Heterostructure (``spectrum.heterostructure`` must be set), e.g. from
        ``Heterostructure.solve``.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    z : array_like, optional
        Plot points (nm); default: the stack plus 20 % of its thickness on each side.
    scale : float, optional
        Height of the largest |ψ|² (meV; default 40 % of the smallest level spacing shown,
        at least 2 % of the band-edge range).
    density : bool
        Draw |ψ|² (default) or ψ.
    unbound : bool
        Also draw levels flagged as not bound (box states of the claddings).

    Returns
    -------
    matplotlib.axes.Axes
        z (nm) horizontal, energy (meV) vertical.
    """
    stack = spectrum.heterostructure
    if stack is None:
        raise ValueError("`spectrum` must come from a Heterostructure (spectrum.heterostructure is None)")
    ax = _axes(ax)
    total = float(stack.total_thickness)
    if z is None:
        z = np.linspace(-0.2 * total, 1.2 * total, 1400)
    z = np.asarray(z, dtype=float)
    v = np.asarray(stack.potential(z))
    e = np.asarray(spectrum.energies)
    keep = np.ones(len(e), bool) if unbound or spectrum.bound is None else np.asarray(spectrum.bound)
    psi = spectrum.wavefunctions(z)[keep]
    e = e[keep]
    if density:
        psi = psi**2
    vr = float(np.ptp(v)) or 1.0
    if scale is None:
        gaps = np.diff(np.sort(e))
        gaps = gaps[gaps > 1e-6 * vr]
        scale = max(0.4 * (gaps.min() if gaps.size else vr), 0.02 * vr)
    ax.plot(z, v, color="0.15", lw=1.6, label="band edge")
    amp = np.max(np.abs(psi), axis=1, keepdims=True) if len(e) else np.ones((0, 1))
    amp[amp == 0] = 1.0
    for en, p in zip(e, psi / amp):
        line, = ax.plot(z, en + scale * p, lw=1.1)
        ax.hlines(en, z[0], z[-1], color=line.get_color(), lw=0.6, ls="--")
    for edge in stack.cladding_edges:
        ax.axhline(edge, color="0.6", lw=0.6, ls=":")
    lo = float(v.min())
    hi = max(float(v.max()), (e.max() + 1.3 * scale) if len(e) else lo)
    ax.set_ylim(lo - 0.05 * (hi - lo), hi + 0.08 * (hi - lo))
    ax.set_xlim(z[0], z[-1])
    ax.set_xlabel("z (nm)")
    ax.set_ylabel("energy (meV)")
    return ax


def plot_stark_fan(batch, fields: Sequence[float], ax=None, *, marker_unbound: str = "x"):
    """Levels against the field of a sweep (``solve_batch(None, stacks, count)``).

    Parameters
    ----------
    batch : Batch
        One item per field, in order.
    fields : array_like
        The fields (kV/cm), one per item.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    marker_unbound : str
        Marker for levels flagged as not bound (above a cladding edge), if any.

    Returns
    -------
    matplotlib.axes.Axes
    """
    f = np.asarray(fields, dtype=float)
    e = np.asarray(batch.energies)
    if f.shape != (e.shape[0],):
        raise ValueError(f"`fields` must have one value per batch item ({e.shape[0]}); got shape {f.shape}")
    ax = _axes(ax)
    for k in range(e.shape[1]):
        ax.plot(f, e[:, k], lw=1.3, label=f"level {k}")
        flags = [batch[i].bound for i in range(len(f))]
        if all(b is not None for b in flags):
            out = np.array([not b[k] for b in flags])
            if out.any():
                ax.plot(f[out], e[out, k], ls="none", marker=marker_unbound, color="0.3")
    ax.set_xlabel("field (kV/cm)")
    ax.set_ylabel("energy (meV)")
    return ax


def plot_self_consistent(solution, ax=None, *, z: Optional[Sequence[float]] = None, density: bool = True):
    """Band diagram of a Schrödinger-Poisson solution: the total band edge, the Fermi
    level, the occupied levels with |ψ|², and the electron density on a twin axis.

    Parameters
    ----------
    solution : SelfConsistent
        From ``Heterostructure.self_consistent``.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    z : array_like, optional
        Plot points (nm); default: the stack plus 20 % on each side.
    density : bool
        Draw n(z) (cm⁻³) on a right-hand twin axis (``ax.specwell_density_axis``).

    Returns
    -------
    matplotlib.axes.Axes
    """
    spec = solution.spectrum
    stack = spec.heterostructure
    ax = _axes(ax)
    total = float(stack.total_thickness)
    z = np.linspace(-0.2 * total, 1.2 * total, 1400) if z is None else np.asarray(z, dtype=float)
    v = np.asarray(solution.potential(z))
    ax.plot(z, v, color="0.15", lw=1.6, label="band edge")
    e = np.asarray(spec.energies)
    psi = spec.wavefunctions(z) ** 2
    vr = float(np.ptp(v)) or 1.0
    scale = 0.08 * vr
    for en, p, ns in zip(e, psi, solution.sheet_densities):
        line, = ax.plot(z, en + scale * p / max(p.max(), 1e-300), lw=1.1, label=f"{ns:.2e} cm⁻²")
        ax.hlines(en, z[0], z[-1], color=line.get_color(), lw=0.6, ls="--")
    if np.isfinite(solution.fermi_level):
        ax.axhline(solution.fermi_level, color="C3", lw=1.0, ls="-.", label="E_F")
    lo, hi = float(v.min()), float(v.max())
    ax.set_ylim(lo - 0.05 * (hi - lo), hi + 0.08 * (hi - lo))
    ax.set_xlim(z[0], z[-1])
    ax.set_xlabel("z (nm)")
    ax.set_ylabel("energy (meV)")
    ax.legend(fontsize="small", loc="upper right")
    if density:
        ax2 = ax.twinx()
        ax2.fill_between(z, solution.density(z), color="C0", alpha=0.15)
        ax2.set_ylabel("electron density (cm⁻³)", color="C0")
        ax.specwell_density_axis = ax2
    else:
        ax.specwell_density_axis = None
    return ax


_AXES = ("x", "y", "z")


def _density_on_grid(data, record: int, grid):
    """(|ψ|² with the grid's shape, the grid, unit system) from a Run or from a state + grid."""
    from specwell import _core

    if isinstance(data, _core.Run):
        grid = data.grid
        states = np.asarray(data.states)
        n = states.shape[0]
        if not -n <= int(record) < n:
            raise ValueError(f"`record` must be an integer in [{-n}, {n - 1}] (the run has {n} records); got {record}")
        psi, units = states[int(record)], data.units
    else:
        if grid is None:
            raise ValueError("`grid` must be given (a ProductGrid) when `data` is a state array instead of a Run")
        psi, units = np.asarray(data), None
    if not isinstance(grid, _core.ProductGrid):
        raise ValueError(f"`data` must be a run (or state) on a 2D or 3D ProductGrid; got a grid of type "
                         f"{type(grid).__name__} (use plot_density for 1D runs)")
    if psi.shape != tuple(grid.shape):
        raise ValueError(f"`data` must have the grid's shape {tuple(grid.shape)}; got {psi.shape}")
    return np.abs(psi) ** 2, grid, units


def _axis_index(axis, ndim: int) -> int:
    names = _AXES[:ndim]
    if axis in names:
        return names.index(axis)
    if isinstance(axis, (int, np.integer)) and 0 <= int(axis) < ndim:
        return int(axis)
    raise ValueError(f"`axis` must be one of {', '.join(repr(a) for a in names)} (or 0..{ndim - 1}); got {axis!r}")


def _draw(ax, data: np.ndarray, axes_points, names, units, *, log, vmin, cmap, colorbar, label):
    lu = _unit_labels(units)[0]
    if log:
        top = float(np.max(data)) if data.size else 1.0
        shown = np.log10(np.maximum(data, top * 1e-300 if top > 0 else 1e-300))
        lo = np.log10(top) - 6.0 if vmin is None and top > 0 else vmin
        label = f"log10 {label}"
    else:
        shown, lo = data, (0.0 if vmin is None else vmin)
    if data.ndim == 1:
        ax.plot(axes_points[0], shown, lw=1.4)
        ax.set_xlabel(_label(names[0], lu))
        ax.set_ylabel(label)
        return ax
    (xa, xb) = axes_points
    dx = xa[1] - xa[0] if len(xa) > 1 else 1.0
    dy = xb[1] - xb[0] if len(xb) > 1 else 1.0
    img = ax.imshow(shown.T, origin="lower", aspect="auto", cmap=cmap, vmin=lo, interpolation="nearest",
                    extent=(xa[0] - dx / 2, xa[-1] + dx / 2, xb[0] - dy / 2, xb[-1] + dy / 2))
    if colorbar:
        ax.figure.colorbar(img, ax=ax, label=label)
    ax.set_xlabel(_label(names[0], lu))
    ax.set_ylabel(_label(names[1], lu))
    return ax


def plot_density_slice(data, record: int = -1, *, axis="z", position: Optional[float] = None, grid=None, ax=None,
                       log: bool = False, vmin: Optional[float] = None, cmap: str = "viridis", colorbar: bool = True):
    """|ψ|² of a 2D/3D run on the plane (3D) or line (2D) normal to ``axis`` through ``position``.

    Parameters
    ----------
    data : Run or ndarray
        A run on a ProductGrid (record ``record`` is drawn), or one state of the grid's shape
        (then give ``grid``).
    record : int
        Record index (negative counts from the end).
    axis : {"x", "y", "z"} or int
        The axis the slice is normal to (default "z"; on a 2D grid "x" or "y").
    position : float, optional
        Coordinate of the slice on ``axis`` (length units): the nearest grid point is used.
        Default: the grid point nearest the density's centre ⟨axis⟩.
    grid : ProductGrid, optional
        The grid of a state array.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    log : bool
        Colour by (or plot) log10 |ψ|².
    vmin : float, optional
        Lower colour limit (of log10 |ψ|² when ``log``; default 6 decades below the maximum).
    cmap : str
        Matplotlib colour map (images only).
    colorbar : bool
        Add a colour bar (images only).

    Returns
    -------
    matplotlib.axes.Axes
        An image over the two other axes (3D) or a curve along the other axis (2D); the slice
        coordinate used is stored as ``ax.specwell_slice_position``.
    """
    ax = _axes(ax)
    rho, grid, units = _density_on_grid(data, record, grid)
    ndim = rho.ndim
    if axis == "z" and ndim == 2:
        axis = "y"
    a = _axis_index(axis, ndim)
    coords = np.asarray(grid.axes[a].x)
    if position is None:
        weights = rho.sum(axis=tuple(i for i in range(ndim) if i != a))
        position = float(np.sum(weights * coords) / np.sum(weights))
    if not np.isfinite(position):
        raise ValueError(f"`position` must be a finite coordinate; got {position}")
    j = int(np.argmin(np.abs(coords - position)))
    cut = np.take(rho, j, axis=a)
    rest = [i for i in range(ndim) if i != a]
    names = [_AXES[i] for i in rest]
    _draw(ax, cut, [np.asarray(grid.axes[i].x) for i in rest], names, units, log=log, vmin=vmin, cmap=cmap,
          colorbar=colorbar, label="|ψ|²")
    ax.set_title(f"{_AXES[a]} = {coords[j]:.4g}")
    ax.specwell_slice_position = float(coords[j])
    return ax


def plot_column_density(data, record: int = -1, *, axis="z", grid=None, ax=None, log: bool = False,
                        vmin: Optional[float] = None, cmap: str = "viridis", colorbar: bool = True):
    """Column density ∫|ψ|² d(axis) of a 2D/3D run (an absorption image along ``axis``).

    Parameters
    ----------
    data : Run or ndarray
        A run on a ProductGrid (record ``record``), or one state of the grid's shape (give ``grid``).
    record : int
        Record index (negative counts from the end).
    axis : {"x", "y", "z"} or int
        Integration (line-of-sight) axis; default "z" ("y" on a 2D grid).
    grid : ProductGrid, optional
        The grid of a state array.
    ax, log, vmin, cmap, colorbar
        As for :func:`plot_density_slice`.

    Returns
    -------
    matplotlib.axes.Axes
        An image over the two other axes (3D) or a curve along the other axis (2D): the
        discrete column density Σ_j |ψ|² d(axis) (length^{1−d}), which integrates to the norm.
    """
    ax = _axes(ax)
    rho, grid, units = _density_on_grid(data, record, grid)
    ndim = rho.ndim
    if axis == "z" and ndim == 2:
        axis = "y"
    a = _axis_index(axis, ndim)
    column = rho.sum(axis=a) * grid.axes[a].dx
    rest = [i for i in range(ndim) if i != a]
    _draw(ax, column, [np.asarray(grid.axes[i].x) for i in rest], [_AXES[i] for i in rest], units, log=log,
          vmin=vmin, cmap=cmap, colorbar=colorbar, label=f"∫|ψ|² d{_AXES[a]}")
    return ax


def plot_bands(stack, count: int = 3, ax=None, *, q: Optional[Sequence[float]] = None, points: int = 121,
               extended: bool = False, gaps: bool = True):
    """Minibands E_n(q) of the superlattice whose period is ``stack`` (``stack.bands``).

    Parameters
    ----------
    stack : Heterostructure
        One period (no field).
    count : int
        Number of bands.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    q : array_like, optional
        Wavevectors (1/nm); default ``points`` values over the first zone [−π/d, π/d].
    points : int
        Number of default wavevectors.
    extended : bool
        Draw the default q over two zones [−2π/d, 2π/d] (the bands are periodic).
    gaps : bool
        Shade the minigaps between consecutive bands.

    Returns
    -------
    matplotlib.axes.Axes
        q (1/nm) horizontal, energy (meV) vertical.
    """
    d = float(stack.total_thickness)
    if q is None:
        zone = 2.0 if extended else 1.0
        q = np.linspace(-zone * np.pi / d, zone * np.pi / d, int(points))
    q = np.asarray(q, dtype=float)
    e = np.asarray(stack.bands(q, count))
    ax = _axes(ax)
    for n in range(e.shape[1]):
        ax.plot(q, e[:, n], lw=1.4, label=f"band {n}")
    if gaps and e.shape[1] > 1:
        edges = np.asarray(stack.minibands(count))
        for n in range(len(edges) - 1):
            lo, hi = edges[n, 1], edges[n + 1, 0]
            if hi > lo:
                ax.axhspan(lo, hi, color="0.85", lw=0)
    for x in (-np.pi / d, np.pi / d):
        if q.min() <= x <= q.max():
            ax.axvline(x, color="0.6", lw=0.6, ls=":")
    ax.set_xlim(q.min(), q.max())
    ax.set_xlabel("q (1/nm)")
    ax.set_ylabel("energy (meV)")
    return ax


def plot_transmission(stack, energies: Sequence[float], ax=None, *, log: bool = True, reflection: bool = False):
    """Transmission T(E) between the claddings of ``stack`` (``stack.transmission``).

    Parameters
    ----------
    stack : Heterostructure
        The stack (its claddings are the leads).
    energies : array_like
        Energies (meV), at or above the lower lead band edge.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    log : bool
        Logarithmic T axis.
    reflection : bool
        Also draw R(E).

    Returns
    -------
    matplotlib.axes.Axes
        Energy (meV) horizontal, probability vertical.
    """
    e = np.asarray(energies, dtype=float)
    t, r = stack.transmission(e, reflection=True)
    ax = _axes(ax)
    (ax.semilogy if log else ax.plot)(e, np.maximum(t, 1e-300) if log else t, lw=1.3, label="T")
    if reflection:
        ax.plot(e, r, lw=1.0, ls="--", label="R")
    ax.set_xlabel("energy (meV)")
    ax.set_ylabel("transmission")
    if reflection:
        ax.legend()
    return ax


def plot_current_voltage(biases: Sequence[float], current: Sequence[float], ax=None, *, ndr: bool = True,
                         log: bool = False):
    """Current density against bias (e.g. from ``stack.current_voltage``), with regions of
    negative differential resistance (dJ/dV < 0) shaded.

    Parameters
    ----------
    biases : array_like
        Biases (V), ascending.
    current : array_like
        Current densities (A/cm²), one per bias.
    ax : matplotlib Axes, optional
        Axes to draw into; a new figure is made if omitted.
    ndr : bool
        Shade the intervals where J falls while V rises.
    log : bool
        Logarithmic |J| axis.

    Returns
    -------
    matplotlib.axes.Axes
        Bias (V) horizontal, J (A/cm²) vertical; ``ax.specwell_ndr`` lists the shaded (V_a, V_b).
    """
    v = np.asarray(biases, dtype=float)
    j = np.asarray(current, dtype=float)
    if v.ndim != 1 or j.shape != v.shape:
        raise ValueError(f"`current` must have one value per bias ({v.shape}); got shape {j.shape}")
    ax = _axes(ax)
    if log:
        ax.semilogy(v, np.abs(j), marker="o", ms=3, lw=1.3)
    else:
        ax.plot(v, j, marker="o", ms=3, lw=1.3)
    spans = []
    if ndr and len(v) > 1:
        falling = (np.diff(j) < 0) & (np.diff(v) > 0)
        k = 0
        while k < len(falling):
            if falling[k]:
                start = k
                while k < len(falling) and falling[k]:
                    k += 1
                spans.append((float(v[start]), float(v[k])))
            else:
                k += 1
        for a, b in spans:
            ax.axvspan(a, b, color="C3", alpha=0.15, lw=0)
    ax.specwell_ndr = spans
    ax.set_xlabel("bias (V)")
    ax.set_ylabel("current density (A/cm²)")
    return ax
