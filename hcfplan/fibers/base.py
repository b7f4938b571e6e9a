"""The small interface every fiber model provides.

A waveguide model is an object with the methods below, all vectorised over angular frequency
and all in SI (see the conventions in :mod:`hcfplan.numerics.grid`). The propagation builder, the
derived quantities and the CLI only use this interface, so a new fiber kind is one new module.

1. ``propagation_constant(omega)`` -> beta(omega) [rad/m], real, the full dispersion of the mode
   including the filling medium.
2. ``attenuation(omega)`` -> alpha(omega) [1/m], the *field* attenuation: power falls as
   exp(-2 alpha z).
3. ``effective_area(omega)`` -> A_eff(omega) [m^2] = (int |F|^2 dA)^2 / int |F|^4 dA.
4. ``nonlinear_coefficient(omega)`` -> gamma(omega) [1/(W m)] = n2 omega / (c A_eff(omega)).
5. ``peak_intensity_area`` -> float [m^2]: the area A_I such that the on-axis peak intensity is
   I_0 = P / A_I (for EH11: pi a^2 J1(u11)^2).
6. ``length`` -> float [m], ``kerr_n2`` -> float [m^2/W] (the n2 used in gamma; 0 for no Kerr).
7. ``describe()`` -> dict of the model's defining SI parameters (for summaries).

The gas-like object that a gas-filled model takes has ``refractive_index(omega)`` [-] and the
attribute ``n2`` [m^2/W] (the Kerr coefficient at the fill density).
"""

from __future__ import annotations

from typing import Protocol, runtime_checkable

import numpy as np


@runtime_checkable
class GasLike(Protocol):
    """What a gas-filled fiber model needs from the filling medium."""

    n2: float

    def refractive_index(self, omega: np.ndarray) -> np.ndarray:
        """Refractive index of the fill at ``omega`` [rad/s]. [-]

        References
        ----------
        none: interface (the gas model cites its source)
        """


@runtime_checkable
class Waveguide(Protocol):
    """Interface of a single-mode waveguide model (see module docstring)."""

    length: float
    kerr_n2: float

    def propagation_constant(self, omega: np.ndarray) -> np.ndarray:
        """beta(omega) of the mode (item 1 of the module docstring). [rad/m]

        References
        ----------
        none: interface (each fiber model cites its source)
        """

    def attenuation(self, omega: np.ndarray) -> np.ndarray:
        """FIELD attenuation alpha(omega) (item 2 of the module docstring). [1/m]

        References
        ----------
        none: interface (each fiber model cites its source)
        """

    def effective_area(self, omega: np.ndarray) -> np.ndarray:
        """Nonlinear effective area A_eff(omega) (item 3 of the module docstring). [m^2]

        References
        ----------
        none: interface (each fiber model cites its source)
        """

    def nonlinear_coefficient(self, omega: np.ndarray) -> np.ndarray:
        """gamma(omega) (item 4 of the module docstring). [1/(W m)]

        References
        ----------
        none: interface (each fiber model cites its source)
        """

    @property
    def peak_intensity_area(self) -> float:
        """Area A_I with on-axis peak intensity P / A_I (item 5 of the module docstring). [m^2]

        References
        ----------
        none: interface (each fiber model cites its source)
        """

    def describe(self) -> dict:
        """Defining SI parameters of the model (item 7 of the module docstring).

        References
        ----------
        none: no physics (the model's defining parameters)
        """
