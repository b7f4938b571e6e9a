"""Fiber models behind one small interface (:mod:`hcfplan.fibers.base`).

:data:`FIBER_MODELS` maps a model key to its class; every class implements
:class:`~hcfplan.fibers.base.Waveguide` (SI units, ``attenuation`` = FIELD attenuation).

Note for the propagation builder: the gas-filled models return gamma(omega) = n2 omega/(c A_eff),
i.e. the omega/omega0 (self-steepening) factor is already inside gamma(omega) (A_eff does not
depend on omega). :class:`TaylorFiber` returns a constant gamma and states through its field
``self_steepening`` whether the shock term with tau_shock = 1/omega0 is to be applied.
"""

from __future__ import annotations

from hcfplan.fibers.antiresonant import AntiresonantFiber
from hcfplan.fibers.base import GasLike, Waveguide
from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.fibers.measured import MeasuredFiber
from hcfplan.fibers.taylor import TaylorFiber

#: model key -> Waveguide class
FIBER_MODELS: dict[str, type] = {
    "capillary": CapillaryFiber,
    "antiresonant": AntiresonantFiber,
    "taylor": TaylorFiber,
}

__all__ = [
    "FIBER_MODELS",
    "AntiresonantFiber",
    "CapillaryFiber",
    "GasLike",
    "MeasuredFiber",
    "TaylorFiber",
    "Waveguide",
]
