"""Initial states for propagation and spectra from autocorrelation functions.

All states are complex128 samples ψ(x_j) on a FourierGrid, normalised so that
Σ|ψ_j|² dx = 1 (the discrete form of ∫|ψ|² dx = 1), or on a ProductGrid, arrays of
the grid's shape normalised so that Σ|ψ|² dV = 1.
"""

from __future__ import annotations

from typing import Optional, Sequence, Tuple

import numpy as np

__all__ = ["gaussian_packet", "eigenstate", "superposition", "autocorrelation_spectrum"]

_WINDOWS = ("hann", "gaussian", "none")


def _hbar(units: str) -> float:
    from specwell import _core

    return _core.unit_constants(units)[1]


def _normalise(psi: np.ndarray, dx: float, name: str) -> np.ndarray:
    norm = np.sqrt(np.sum(np.abs(psi) ** 2) * dx)
    if not np.isfinite(norm) or norm == 0.0:
        raise ValueError(f"`{name}` gives a state of zero or non-finite norm on this grid")
    return psi / norm


def _per_axis(value, ndim: int, name: str) -> np.ndarray:
    """A scalar or a sequence of `ndim` finite numbers as a float array of length `ndim`."""
    arr = np.atleast_1d(np.asarray(value, dtype=float))
    if arr.ndim != 1 or (arr.size != 1 and arr.size != ndim):
        raise ValueError(f"`{name}` must be a number or a sequence of {ndim} numbers (one per axis); got {value!r}")
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"`{name}` must contain only finite numbers; got {value!r}")
    return np.broadcast_to(arr, (ndim,)).astype(float)


def gaussian_packet(grid, x0, p0=0.0, sigma=1.0, units: str = "natural") -> np.ndarray:
    """Gaussian packet ψ(x) ∝ exp(−(x − x0)²/(4σ²) + i p0 (x − x0)/ħ) on a grid.

    Parameters
    ----------
    grid : FourierGrid or ProductGrid
        The grid. On a ProductGrid the packet is the product of one such Gaussian per axis.
    x0 : float, or sequence of float (one per axis of a ProductGrid)
        Centre ⟨x⟩ (length units); must lie inside the grid box on every axis. On a
        ProductGrid give one value per axis.
    p0 : float or sequence of float, default 0.0
        Mean momentum ⟨p⟩ (energy·time/length in the unit system; ħk in natural units);
        a single number applies to every axis.
    sigma : float or sequence of float, default 1.0
        Position standard deviation σ (> 0, length units); |ψ|² has width σ along each axis.
    units : {"natural", "atomic", "semiconductor", "cold-atom", "molecular"}, default "natural"
        Unit system (fixes ħ).

    Returns
    -------
    ndarray of complex128, shape ``(grid.points,)`` on a FourierGrid, ``grid.shape`` on a
    ProductGrid; normalised to Σ|ψ|² dx = 1 (Σ|ψ|² dV = 1).

    Raises
    ------
    ValueError
        ``x0`` outside the box, non-positive or non-finite ``sigma``, a per-axis argument of
        the wrong length.

    Notes
    -----
    The packet is sampled, not periodised: keep it several σ away from the box edges, or the
    cut tails (and the periodic images in propagation) matter.
    """
    from specwell import _core

    if isinstance(grid, _core.ProductGrid):
        ndim = grid.ndim
        if np.ndim(x0) != 1 or len(x0) != ndim:
            raise ValueError(f"`x0` must be a sequence of {ndim} numbers (one centre per axis) on a {ndim}D ProductGrid; "
                             f"got {x0!r}")
        c = _per_axis(x0, ndim, "x0")
        p = _per_axis(p0, ndim, "p0")
        s = _per_axis(sigma, ndim, "sigma")
        if np.any(s <= 0):
            raise ValueError(f"`sigma` must be > 0 on every axis; got {sigma!r}")
        hbar = _hbar(units)
        psi = np.ones(tuple(grid.shape), dtype=np.complex128)
        for a, (ax, ca, pa, sa) in enumerate(zip(grid.axes, c, p, s)):
            if not ax.start <= ca < ax.stop:
                raise ValueError(f"`x0` must lie in the grid box: axis {a} is [{ax.start}, {ax.stop}); got {ca}")
            x = ax.x
            f = np.exp(-((x - ca) ** 2) / (4.0 * sa**2) + 1j * pa * (x - ca) / hbar)
            shape = [1] * ndim
            shape[a] = len(x)
            psi = psi * f.reshape(shape)
        return _normalise(psi, grid.dV, "sigma")
    for name, v in (("x0", x0), ("p0", p0), ("sigma", sigma)):
        if np.ndim(v) != 0:
            raise ValueError(f"`{name}` must be a single number on a FourierGrid; got {v!r}")
        if not np.isfinite(v):
            raise ValueError(f"`{name}` must be a finite number; got {v}")
    if sigma <= 0:
        raise ValueError(f"`sigma` must be a finite number > 0; got {sigma}")
    if not grid.start <= x0 < grid.stop:
        raise ValueError(f"`x0` must lie in [{grid.start}, {grid.stop}) (the grid box); got {x0}")
    hbar = _hbar(units)
    x = grid.x
    psi = np.exp(-((x - x0) ** 2) / (4.0 * sigma**2) + 1j * p0 * (x - x0) / hbar)
    return _normalise(psi.astype(np.complex128), grid.dx, "sigma")


def eigenstate(spectrum, n: int, grid) -> np.ndarray:
    """State ``n`` of ``spectrum`` sampled on ``grid`` as an initial state for ``SplitStep.run``.

    Parameters
    ----------
    spectrum : Spectrum
        Result of ``Hamiltonian.solve`` (any basis).
    n : int
        State index, 0 ≤ n < spectrum.count.
    grid : FourierGrid
        Grid to sample on (``spectrum.wavefunctions(grid.x)``).

    Returns
    -------
    ndarray of complex128, shape (grid.points,)
        Renormalised on the grid, Σ|ψ|² dx = 1 (sampling on a grid other than the
        spectrum's own changes the discrete norm slightly).

    Raises
    ------
    ValueError
        ``n`` out of range, or a state that vanishes on the grid.
    """
    if not 0 <= n < spectrum.count:
        raise ValueError(f"`n` must be an integer in [0, {spectrum.count - 1}]; got {n}")
    psi = spectrum.wavefunctions(grid.x)[n].astype(np.complex128)
    return _normalise(psi, grid.dx, "n")


def superposition(states: Sequence[np.ndarray], coefficients: Sequence[complex], grid) -> np.ndarray:
    """Normalised Σ c_i ψ_i of states sampled on ``grid``.

    Parameters
    ----------
    states : sequence of ndarray
        States sampled on ``grid`` (shape (grid.points,) each), e.g. from ``eigenstate``.
    coefficients : sequence of complex
        One coefficient c_i per state.
    grid : FourierGrid
        The grid the states are sampled on.

    Returns
    -------
    ndarray of complex128, shape (grid.points,)
        Normalised to Σ|ψ|² dx = 1 (the c_i are relative weights).

    Raises
    ------
    ValueError
        No states, a coefficient count that differs from the state count, a state of the
        wrong shape, or a sum that vanishes.
    """
    states = [np.asarray(s, dtype=np.complex128) for s in states]
    coefficients = np.asarray(coefficients, dtype=np.complex128)
    if len(states) == 0 or len(states) != len(coefficients):
        raise ValueError(f"`coefficients` must have one entry per state ({len(states)}); got {len(coefficients)}")
    for s in states:
        if s.shape != (grid.points,):
            raise ValueError(f"every state must have shape ({grid.points},); got {s.shape}")
    psi = sum(c * s for c, s in zip(coefficients, states))
    return _normalise(psi, grid.dx, "coefficients")


def autocorrelation_spectrum(times: np.ndarray, autocorrelation: np.ndarray, units: str = "natural",
                             window: str = "hann", pad: int = 4,
                             energy_range: Optional[Tuple[float, float]] = None) -> Tuple[np.ndarray, np.ndarray]:
    """Spectrum σ(E) = |∫ C(t) w(t) e^{iEt/ħ} dt| from an autocorrelation C(t) = ⟨ψ(0)|ψ(t)⟩.

    Peaks sit at the eigenenergies present in ψ(0), with weights |c_n|² (Feit, Fleck & Steiger 1982).
    The resolution is about 2πħ/T for a record of length T.

    Parameters
    ----------
    times : ndarray
        Uniformly spaced record times starting at t0 (a run's ``times``: when ``steps`` is
        not a multiple of ``record_every`` the final, closer record is dropped here).
    autocorrelation : ndarray
        C(t) at those times.
    units : str, default "natural"
        Unit system (fixes ħ).
    window : {"hann", "gaussian", "none"}, default "hann"
        Window against truncation ripples.
    pad : int, default 4
        Zero padding factor (≥ 1) for a finer energy grid.
    energy_range : (float, float), optional
        Keep only energies in this interval.

    Returns
    -------
    energies, intensity : ndarray
        Ascending energies and |spectrum| (arbitrary units).

    Raises
    ------
    ValueError
        Arrays not 1-D of equal length ≥ 4, times not uniform, unknown window, pad < 1.
    """
    t = np.asarray(times, dtype=float)
    c = np.asarray(autocorrelation, dtype=np.complex128)
    if t.ndim != 1 or t.shape != c.shape or len(t) < 4:
        raise ValueError("`times` and `autocorrelation` must be 1-D of equal length >= 4")
    dt = np.diff(t)
    if len(dt) >= 2 and not np.isclose(dt[-1], dt[0], rtol=1e-9, atol=0) and np.allclose(dt[:-1], dt[0], rtol=1e-9, atol=0):
        # A run always records its final state; a shorter last interval is not part of
        # the uniform record.
        t, c, dt = t[:-1], c[:-1], dt[:-1]
    if not np.allclose(dt, dt[0], rtol=1e-9, atol=0) or not dt[0] > 0:
        raise ValueError("`times` must be uniformly spaced and increasing (a shorter final interval is allowed)")
    if window not in _WINDOWS:
        raise ValueError(f"`window` must be one of {', '.join(repr(w) for w in _WINDOWS)}; got {window!r}")
    if int(pad) < 1:
        raise ValueError(f"`pad` must be an integer >= 1; got {pad}")
    n = len(t)
    if window == "hann":
        w = 0.5 * (1 + np.cos(np.pi * np.arange(n) / n))  # half Hann: 1 at t0, 0 at the end
    elif window == "gaussian":
        w = np.exp(-0.5 * (3.0 * np.arange(n) / n) ** 2)
    else:
        w = np.ones(n)
    hbar = _hbar(units)
    m = int(pad) * n
    # C(t) ∝ Σ |c_n|² e^{−iE_n t/ħ}: transform with e^{+iEt/ħ}, i.e. an inverse FFT.
    spec = np.fft.ifft(c * w, m) * m
    omega = 2 * np.pi * np.fft.fftfreq(m, dt[0])
    energies = hbar * omega
    order = np.argsort(energies)
    energies, intensity = energies[order], np.abs(spec[order])
    if energy_range is not None:
        lo, hi = (float(v) for v in energy_range)
        nyquist = np.pi * hbar / dt[0]
        if not (np.isfinite(lo) and np.isfinite(hi) and lo < hi) or hi <= -nyquist or lo >= nyquist:
            raise ValueError(f"`energy_range` must be an interval (lo < hi) overlapping [{-nyquist:.6g}, {nyquist:.6g}), "
                             f"the energies a record spacing of {dt[0]:.6g} resolves (±πħ/Δt); got {energy_range}")
        keep = (energies >= lo) & (energies <= hi)
        energies, intensity = energies[keep], intensity[keep]
    return energies, intensity
