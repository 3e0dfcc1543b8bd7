"""Save and load results as ``.npz`` files: plain arrays plus a small JSON header,
readable with ``numpy.load`` alone (no pickle needed to get the data back)."""

from __future__ import annotations

import json
import os
from typing import Union

import numpy as np

from specwell import _core

__all__ = ["save", "load"]

_FORMAT = "specwell-npz"
_VERSION = 1


def _basis_header(basis) -> dict:
    if isinstance(basis, _core.HermiteBasis):
        return {"kind": "HermiteBasis", "size": basis.size, "center": basis.center,
                "length": basis.length, "quadrature": basis.quadrature}
    if isinstance(basis, _core.FourierGrid):
        return {"kind": "FourierGrid", "start": basis.start, "stop": basis.stop, "points": basis.points}
    if isinstance(basis, _core.ProductGrid):
        return {"kind": "ProductGrid", "axes": [_basis_header(g) for g in basis.axes]}
    raise TypeError(f"`basis` must be a HermiteBasis, FourierGrid or ProductGrid; got {type(basis).__name__}")


def _basis_from_header(h: dict):
    if h["kind"] == "HermiteBasis":
        return _core.HermiteBasis(h["size"], h["center"], h["length"], h["quadrature"])
    if h["kind"] == "FourierGrid":
        return _core.FourierGrid(h["start"], h["stop"], h["points"])
    if h["kind"] == "ProductGrid":
        return _core.ProductGrid(*[_basis_from_header(a) for a in h["axes"]])
    raise ValueError(f"unknown basis kind {h['kind']!r} in file")


def _hamiltonian_parts(h, header: dict, arrays: dict) -> None:
    """Header entries and arrays that rebuild the Hamiltonian `h`."""
    header.update(units=h.units, basis=_basis_header(h.basis))
    stack = h.heterostructure
    if stack is not None:
        header["heterostructure"] = {"field_kv_cm": stack.field_kv_cm,
                                     "layers": [[l.thickness, l.band_edge, l.mass] for l in stack.layers]}
        return
    arrays["potential"] = h.potential
    mass = h.mass
    header["mass_is_array"] = isinstance(mass, np.ndarray)
    if header["mass_is_array"]:
        arrays["mass"] = mass
    else:
        header["mass"] = float(mass)


def _hamiltonian_from_parts(header: dict, f) -> "_core.Hamiltonian":
    basis = _basis_from_header(header["basis"])
    if "heterostructure" in header:
        h = header["heterostructure"]
        stack = _core.Heterostructure([_core.Layer(*l) for l in h["layers"]], h["field_kv_cm"])
        return _core.Hamiltonian(basis, stack, units=header["units"])
    mass = f["mass"] if header["mass_is_array"] else header["mass"]
    return _core.Hamiltonian(basis, f["potential"], mass, header["units"])


def save(result, path: Union[str, os.PathLike]) -> None:
    """Save a Spectrum or a Run to ``path`` (.npz): plain arrays plus a JSON header.

    Parameters
    ----------
    result : Spectrum or Run
        The result to save.
    path : str or path-like
        Destination; numpy appends ``.npz`` if missing.
    """
    if isinstance(result, _core.Spectrum):
        header = {"format": _FORMAT, "version": _VERSION, "type": "Spectrum", "method": result.method,
                  "iterations": result.iterations}
        arrays = dict(energies=result.energies, vectors=result.vectors, residuals=result.residuals,
                      x=result.x)
        _hamiltonian_parts(result.hamiltonian, header, arrays)
    elif isinstance(result, _core.Run):
        header = {"format": _FORMAT, "version": _VERSION, "type": "Run", "units": result.units,
                  "basis": _basis_header(result.grid), "absorbed_norm": result.absorbed_norm,
                  "steps_done": result.steps_done, "cancelled": False}
        arrays = dict(times=result.times, states=result.states, norm=result.norm, mean_x=result.mean_x,
                      mean_p=result.mean_p, energy=result.energy, autocorrelation=result.autocorrelation,
                      record_steps=np.asarray(result.record_steps, dtype=np.int64), x=result.x)
        for name in _EXTRA_AXES:
            value = getattr(result, name)
            if value is not None:
                arrays[name] = value
    else:
        raise TypeError(f"`result` must be a specwell result (Spectrum, Run, ...); got {type(result).__name__}")
    np.savez(path, header=np.array(json.dumps(header)), **arrays)


def load(path: Union[str, os.PathLike]):
    """Load a result written by :func:`save`.

    Returns
    -------
    Spectrum or another specwell result
    """
    with np.load(path, allow_pickle=False) as f:
        header = json.loads(str(f["header"]))
        if header.get("format") != _FORMAT:
            raise ValueError(f"`path` is not a specwell result file (format {header.get('format')!r})")
        kind = header["type"]
        if kind == "Spectrum":
            return _core._spectrum_from_parts(_hamiltonian_from_parts(header, f), f["energies"], f["vectors"],
                                              f["residuals"], header["method"], header["iterations"])
        loaders = _LOADERS.get(kind)
        if loaders is None:
            raise ValueError(f"unknown result type {kind!r} in file")
        return loaders(header, {k: f[k] for k in f.files if k != "header"})


# Observables of the y and z axes of 2D/3D runs (absent from 1D files).
_EXTRA_AXES = ("mean_y", "mean_z", "mean_py", "mean_pz")


def _load_run(header: dict, f: dict):
    grid = _basis_from_header(header["basis"])
    extra = [f.get(name) for name in _EXTRA_AXES]
    return _core._run_from_parts(grid, header["units"], [int(k) for k in f["record_steps"]], f["times"],
                                 f["states"].ravel(), f["norm"], f["mean_x"], f["mean_p"], f["energy"],
                                 f["autocorrelation"], header["absorbed_norm"], header["steps_done"],
                                 header["cancelled"], *extra)


_LOADERS: dict = {"Run": _load_run}


def _save_method(self, path: Union[str, os.PathLike]) -> None:
    """Save to a ``.npz`` file (see :func:`specwell.save`)."""
    save(self, path)


# Results save themselves through the one writer above.
for _cls in (_core.Spectrum,):
    _cls.save = _save_method
