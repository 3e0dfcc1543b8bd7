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
    if isinstance(basis, _core.ElementBasis):
        return {"kind": "ElementBasis", "edges": [float(e) for e in basis.edges], "order": basis.order}
    if isinstance(basis, _core.ProductGrid):
        return {"kind": "ProductGrid", "axes": [_basis_header(g) for g in basis.axes]}
    raise TypeError(f"`basis` must be a HermiteBasis, FourierGrid, ElementBasis or ProductGrid; got {type(basis).__name__}")


def _basis_from_header(h: dict):
    if h["kind"] == "HermiteBasis":
        return _core.HermiteBasis(h["size"], h["center"], h["length"], h["quadrature"])
    if h["kind"] == "FourierGrid":
        return _core.FourierGrid(h["start"], h["stop"], h["points"])
    if h["kind"] == "ElementBasis":
        return _core.ElementBasis(h["edges"], h["order"])
    if h["kind"] == "ProductGrid":
        return _core.ProductGrid(*[_basis_from_header(a) for a in h["axes"]])
    raise ValueError(f"unknown basis kind {h['kind']!r} in file")


def _stack_header(stack) -> dict:
    return {"field_kv_cm": stack.field_kv_cm,
            "layers": [{"thickness": l.thickness, "band_edge": l.band_edge, "mass": l.mass, "doping": l.doping,
                        "permittivity": l.permittivity, "nonparabolicity": l.nonparabolicity} for l in stack.layers]}


def _stack_from_header(h: dict):
    # Version-1 files store layers as [thickness, band_edge, mass].
    layers = [_core.Layer(*l) if isinstance(l, list) else _core.Layer(
        l["thickness"], l["band_edge"], l["mass"], doping=l["doping"], permittivity=l["permittivity"],
        nonparabolicity=l["nonparabolicity"]) for l in h["layers"]]
    return _core.Heterostructure(layers, h["field_kv_cm"])


def _hamiltonian_parts(h, header: dict, arrays: dict) -> None:
    """Header entries and arrays that rebuild the Hamiltonian `h`."""
    header.update(units=h.units, basis=_basis_header(h.basis))
    stack = h.heterostructure
    if stack is not None:
        header["heterostructure"] = _stack_header(stack)
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
        return _core.Hamiltonian(basis, _stack_from_header(header["heterostructure"]), units=header["units"])
    mass = f["mass"] if header["mass_is_array"] else header["mass"]
    return _core.Hamiltonian(basis, f["potential"], mass, header["units"])


def save(result, path: Union[str, os.PathLike]) -> None:
    """Save a Spectrum, Batch or Run to ``path`` (.npz): plain arrays plus a JSON header.

    Parameters
    ----------
    result : Spectrum, Batch or Run
        The result to save.
    path : str or path-like
        Destination; numpy appends ``.npz`` if missing.

    Raises
    ------
    TypeError
        ``result`` is not a Spectrum, Batch or Run.
    """
    if isinstance(result, _core.Spectrum):
        header = {"format": _FORMAT, "version": _VERSION, "type": "Spectrum", "method": result.method,
                  "iterations": result.iterations}
        arrays = dict(energies=result.energies, vectors=result.vectors, residuals=result.residuals,
                      x=result.x)
        _hamiltonian_parts(result.hamiltonian, header, arrays)
        if result.errors is not None:
            arrays["errors"] = result.errors
    elif isinstance(result, _core.Batch):
        header = {"format": _FORMAT, "version": _VERSION, "type": "Batch", "items": []}
        arrays = {"energies": result.energies, "residuals": result.residuals}
        shapes = {s.vectors.shape for s in result}
        if len(shapes) == 1:
            arrays["vectors"] = np.stack([s.vectors for s in result])
        else:  # items on meshes of their own (sweeps of heterostructures)
            header["vectors_per_item"] = True
            arrays.update({f"vectors_{i}": s.vectors for i, s in enumerate(result)})
        per_item = []
        for s in result:
            h, a = {"method": s.method, "iterations": s.iterations}, {}
            _hamiltonian_parts(s.hamiltonian, h, a)
            header["items"].append(h)
            per_item.append(a)
        for key in per_item[0]:
            arrays[key] = np.stack([a[key] for a in per_item])
        if all(s.errors is not None for s in result):
            arrays["errors"] = np.stack([s.errors for s in result])
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
        raise TypeError(f"`result` must be a specwell result (Spectrum, Batch, Run); got {type(result).__name__}")
    np.savez(path, header=np.array(json.dumps(header)), **arrays)


def load(path: Union[str, os.PathLike]):
    """Load a result written by :func:`save`.

    Parameters
    ----------
    path : str or path-like
        A ``.npz`` file written by ``specwell.save`` (read without pickle).

    Returns
    -------
    Spectrum, Batch or Run
        Rebuilt with its Hamiltonian (Spectrum, Batch) or grid (Run); the numbers are the
        saved ones, bit for bit.

    Raises
    ------
    ValueError
        Not a specwell result file, or an unknown result type.
    """
    with np.load(path, allow_pickle=False) as f:
        header = json.loads(str(f["header"]))
        if header.get("format") != _FORMAT:
            raise ValueError(f"`path` is not a specwell result file (format {header.get('format')!r})")
        kind = header["type"]
        if kind == "Spectrum":
            return _core._spectrum_from_parts(_hamiltonian_from_parts(header, f), f["energies"], f["vectors"],
                                              f["residuals"], header["method"], header["iterations"],
                                              f["errors"] if "errors" in f.files else None)
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


def _load_batch(header: dict, f: dict):
    spectra = []
    for i, h in enumerate(header["items"]):
        parts = {k: v[i] for k, v in f.items() if k in ("potential", "mass")}
        ham = _hamiltonian_from_parts(h, parts)
        vectors = f[f"vectors_{i}"] if header.get("vectors_per_item") else f["vectors"][i]
        errors = f["errors"][i] if "errors" in f else None
        spectra.append(_core._spectrum_from_parts(ham, f["energies"][i], vectors, f["residuals"][i],
                                                  h["method"], h["iterations"], errors))
    return _core._batch_from_spectra(spectra)


_LOADERS: dict = {"Run": _load_run, "Batch": _load_batch}


def _save_method(self, path: Union[str, os.PathLike]) -> None:
    """Save to a ``.npz`` file readable with numpy alone (see :func:`specwell.save`).

    Parameters
    ----------
    path : str or path-like
        Destination; numpy appends ``.npz`` if missing.
    """
    save(self, path)


# Results save themselves through the one writer above.
for _cls in (_core.Spectrum, _core.Batch, _core.Run):
    _cls.save = _save_method
