"""The layered-stack model shared by every reference (units, layers, profiles).

Units: lengths nm, energies meV, masses m_e, fields kV/cm, doping cm⁻³,
non-parabolicity α in 1/eV, temperature K.

Stack convention (the same as specwell's, DESIGN.md "Public contract additions"):
* z = 0 at the stack's left edge, L = Σ thickness;
* a field F (kV/cm) adds 0.1·F·(clamp(z, 0, L) − L/2) meV: linear inside the stack, zero at
  its centre, constant beyond both ends (an electron, charge −e, in a field along +z has
  potential energy +e·F·z; 1 kV/cm = 0.1 meV/nm);
* beyond both ends the first and last layers continue as flat semi-infinite claddings
  (their band edge plus the field term at z = 0 resp. z = L);
* profiles are right-continuous: at an interface the layer on the right applies.
"""

from __future__ import annotations

from typing import Iterable, NamedTuple

import numpy as np
import scipy.constants as C

#: ħ²/(2 m_e) in meV·nm², from CODATA values in scipy.constants.
H2M = C.hbar**2 / (2 * C.m_e) / (C.e * 1e-3) * 1e18
#: Boltzmann constant in meV/K (CODATA, scipy.constants).
KB_MEV = C.k / (C.e * 1e-3)
#: Electron potential-energy gradient of a 1 kV/cm field, meV/nm.
MEV_PER_NM_PER_KV_CM = 0.1
#: 1 cm⁻³ in nm⁻³ and 1 nm⁻² in cm⁻².
PER_CM3_IN_PER_NM3 = 1e-21
PER_NM2_IN_PER_CM2 = 1e14


class Layer(NamedTuple):
    """One layer: thickness (nm, > 0), band edge (meV), mass (m_e, > 0),
    non-parabolicity α (1/eV, ≥ 0; mass m(E) = m·(1 + α·(E − band_edge)/1000)),
    fully ionised donor density (cm⁻³, ≥ 0; used by the Schrödinger-Poisson reference)."""

    thickness: float
    band_edge: float
    mass: float
    nonparabolicity: float = 0.0
    doping: float = 0.0


def as_layers(layers: Iterable) -> list[Layer]:
    """Normalise a list of layers: `Layer`, tuples (t, Ec, m[, α[, N_D]]) or any object with
    attributes thickness, band_edge, mass (and optionally nonparabolicity, doping).
    Raises ValueError naming the offending layer and argument."""
    out: list[Layer] = []
    for i, lay in enumerate(layers):
        if isinstance(lay, Layer):
            cand = lay
        elif hasattr(lay, "thickness"):
            cand = Layer(float(lay.thickness), float(lay.band_edge), float(lay.mass),
                         float(getattr(lay, "nonparabolicity", 0.0) or 0.0),
                         float(getattr(lay, "doping", 0.0) or 0.0))
        else:
            vals = tuple(float(v) for v in lay)
            if not 3 <= len(vals) <= 5:
                raise ValueError(f"layers[{i}]: expected (thickness, band_edge, mass"
                                 f"[, nonparabolicity[, doping]]), got {len(vals)} values")
            cand = Layer(*vals)
        if not (np.isfinite(cand.thickness) and cand.thickness > 0):
            raise ValueError(f"layers[{i}].thickness must be finite and > 0 nm, got {cand.thickness}")
        if not np.isfinite(cand.band_edge):
            raise ValueError(f"layers[{i}].band_edge must be finite (meV), got {cand.band_edge}")
        if not (np.isfinite(cand.mass) and cand.mass > 0):
            raise ValueError(f"layers[{i}].mass must be finite and > 0 m_e, got {cand.mass}")
        if not (np.isfinite(cand.nonparabolicity) and cand.nonparabolicity >= 0):
            raise ValueError(f"layers[{i}].nonparabolicity must be finite and >= 0 1/eV, "
                             f"got {cand.nonparabolicity}")
        if not (np.isfinite(cand.doping) and cand.doping >= 0):
            raise ValueError(f"layers[{i}].doping must be finite and >= 0 cm^-3, got {cand.doping}")
        out.append(cand)
    if not out:
        raise ValueError("layers must contain at least one layer")
    return out


class Stack:
    """Geometry and profiles of a stack in a field (see the module docstring)."""

    def __init__(self, layers, field_kv_cm: float = 0.0):
        self.layers = as_layers(layers)
        self.field = float(field_kv_cm)
        if not np.isfinite(self.field):
            raise ValueError(f"field_kv_cm must be finite, got {field_kv_cm}")
        t = np.array([lay.thickness for lay in self.layers])
        self.edges = np.concatenate([[0.0], np.cumsum(t)])
        self.length = float(self.edges[-1])
        self.slope = MEV_PER_NM_PER_KV_CM * self.field  # meV/nm inside the stack

    # --- profiles ---------------------------------------------------------------------
    def field_term(self, z):
        """0.1·F·(clamp(z, 0, L) − L/2) in meV."""
        return self.slope * (np.clip(z, 0.0, self.length) - 0.5 * self.length)

    def layer_index(self, z):
        """Index of the layer that owns z (claddings → first/last layer; right-continuous)."""
        idx = np.searchsorted(self.edges, np.asarray(z, dtype=float), side="right") - 1
        return np.clip(idx, 0, len(self.layers) - 1)

    def potential(self, z):
        """Band edge plus field term V(z) in meV."""
        ec = np.array([lay.band_edge for lay in self.layers])
        return ec[self.layer_index(z)] + self.field_term(z)

    def mass(self, z):
        """Parabolic mass m(z) in m_e."""
        m = np.array([lay.mass for lay in self.layers])
        return m[self.layer_index(z)]

    # --- per-layer data ----------------------------------------------------------------
    def layer_start_potential(self, i: int) -> float:
        """V at the left end of layer i (band edge + field term there)."""
        return self.layers[i].band_edge + float(self.field_term(self.edges[i]))

    @property
    def left_lead(self) -> float:
        """Band edge of the left cladding (z < 0), meV."""
        return self.layers[0].band_edge + float(self.field_term(0.0))

    @property
    def right_lead(self) -> float:
        """Band edge of the right cladding (z > L), meV."""
        return self.layers[-1].band_edge + float(self.field_term(self.length))

    def minimum_potential(self) -> float:
        """min V(z) over the whole line (V is linear in each layer: check both ends)."""
        vals = [self.left_lead, self.right_lead]
        for i, lay in enumerate(self.layers):
            vals.append(lay.band_edge + float(self.field_term(self.edges[i])))
            vals.append(lay.band_edge + float(self.field_term(self.edges[i + 1])))
        return min(vals)

    def layer_mass(self, i: int, energy):
        """Mass of layer i at energy E (meV): m·(1 + α·(E − E_c)/1000), Nelson, Miller &
        Kleinman (1987). Parabolic layers return the constant mass."""
        lay = self.layers[i]
        if lay.nonparabolicity == 0.0:
            return lay.mass
        if self.field != 0.0:
            raise ValueError("nonparabolicity with field_kv_cm != 0 is outside this reference's "
                             "model (the band edge, hence m(E), would vary inside a layer)")
        return lay.mass * (1.0 + lay.nonparabolicity * (np.asarray(energy) - lay.band_edge) / 1000.0)
