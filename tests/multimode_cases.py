"""Shared set-ups of the multimode solver tests (small capillary cases; not a test module).

The cases are test scenarios of our own (invented, not measured setups), on small grids so
each run takes a fraction of a second.
"""

from __future__ import annotations

import dataclasses
import warnings
from functools import lru_cache

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ValidityWarning
from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.numerics.grid import Grid

OMEGA_800 = 2 * np.pi * c / 800e-9


@dataclasses.dataclass(frozen=True)
class LosslessCapillary(CapillaryFiber):
    """Test double: a capillary mode with the Marcatili beta and zero attenuation."""

    def attenuation(self, omega):
        return np.zeros(np.shape(omega))


class NoKerrGas:
    """Test double: the index of ``gas`` with n2 = 0 (no nonlinearity)."""

    n2 = 0.0

    def __init__(self, gas) -> None:
        self._gas = gas

    def refractive_index(self, omega):
        return self._gas.refractive_index(omega)


@lru_cache(maxsize=8)
def gas(species: str, pressure: float = 1e5):
    return gas_medium(GasFill(((species, 1.0),), pressure, 293.15))


def grid(points: int = 2**10, dt: float = 1.5e-15) -> Grid:
    return Grid(points=points, dt=dt, omega0=OMEGA_800)


def modes(fiber, n: int) -> list:
    """EH11..EH1n of ``fiber`` (the contract's way)."""
    return [dataclasses.replace(fiber, mode=(1, m)) for m in range(1, n + 1)]


def quiet(call, *args, **kw):
    """Run ``call`` with the extrapolation warnings of the gas/silica fits silenced (the wide
    test windows reach outside the fits' ranges; the physics checked does not depend on it)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        return call(*args, **kw)
