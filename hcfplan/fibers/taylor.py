"""A waveguide given directly by its Taylor dispersion coefficients and a constant gamma.

Used for textbook cases and for fibers measured elsewhere. Conventions of
:mod:`hcfplan.numerics.grid`.

How the nonlinearity is represented (read this when building the propagation equation)
-------------------------------------------------------------------------------------
* :meth:`TaylorFiber.nonlinear_coefficient` returns the constant gamma for every omega; it does
  NOT contain the omega/omega0 factor.
* ``self_steepening`` is a plain field: when True the propagation builder should apply the
  usual shock term with time scale tau_shock = 1/omega0 (equivalently, multiply gamma by
  omega/omega0 in the frequency domain); when False, no shock term.
* ``raman_fraction``, ``raman_tau1``, ``raman_tau2`` are plain fields for the builder's Raman
  response (a fraction f_R of a damped-oscillator response with times tau1, tau2, as in
  Blow & Wood [1]); this module does not use them.
* ``kerr_n2`` = gamma c A_eff / omega0 when ``mode_area`` is given, else nan.

References
----------
.. [1] K. J. Blow, D. Wood, "Theoretical description of transient stimulated Raman scattering in
       optical fibers," IEEE J. Quantum Electron. 25, 2665-2673 (1989),
       doi:10.1109/3.40655 [from memory].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.fibers.capillary import ATTENUATION_CONVENTION


def taylor_propagation_constant(omega: np.ndarray, omega0: float, betas) -> np.ndarray:
    """beta(omega) = sum_{n>=2} beta_n (omega - omega0)^n / n!  (beta0 = beta1 = 0). [rad/m]

    Parameters
    ----------
    omega : ndarray
        Angular frequency. [rad/s]
    omega0 : float
        Expansion frequency. [rad/s]
    betas : sequence of float
        (beta2, beta3, ...). [s^n/m]

    References
    ----------
    none: Taylor series of beta about omega0 (common practice, no source)
    """
    detuning = np.asarray(omega, dtype=float) - omega0
    beta = np.zeros_like(detuning)
    for n, beta_n in enumerate(betas, start=2):
        beta = beta + beta_n * detuning**n / math.factorial(n)
    return beta


def _check_positive(name: str, value: float, unit: str, *, allow_zero: bool = False) -> None:
    ok = value >= 0 if allow_zero else value > 0
    if not (np.isfinite(value) and ok):
        bound = ">= 0" if allow_zero else "> 0"
        raise ConfigError(f"taylor fiber {name} = {value} {unit}: must be finite and {bound}")


@dataclass(frozen=True)
class TaylorFiber:
    """Waveguide defined by Taylor coefficients about omega0 and a constant gamma.

    Parameters
    ----------
    omega0 : float
        Expansion (pump) frequency. [rad/s]
    betas : tuple of float
        (beta2, beta3, ...) = d^n beta / d omega^n at omega0. [s^n/m]
    gamma : float
        Nonlinear coefficient, returned unchanged for all omega. [1/(W m)]
    length : float
        Fiber length. [m]
    loss : float
        Flat FIELD attenuation alpha (power ~ exp(-2 alpha z)). [1/m]
    self_steepening : bool
        Whether the builder applies the shock term with tau_shock = 1/omega0 (module docstring).
    raman_fraction : float
        Delayed Raman fraction f_R, 0 <= f_R < 1. [-]
    raman_tau1, raman_tau2 : float
        Raman response times. [s]
    mode_area : float or None
        Mode area, if known (needed only for intensities and kerr_n2); returned by
        ``effective_area(omega)`` and ``peak_intensity_area``. Named ``mode_area`` because the
        interface method ``effective_area(omega)`` takes that name. [m^2]
    """

    omega0: float
    betas: tuple[float, ...]
    gamma: float
    length: float
    loss: float = 0.0
    self_steepening: bool = True
    raman_fraction: float = 0.0
    raman_tau1: float = 12.2e-15
    raman_tau2: float = 32e-15
    mode_area: float | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "betas", tuple(float(b) for b in self.betas))
        if not all(np.isfinite(self.betas)):
            raise ConfigError(f"taylor fiber betas = {self.betas} s^n/m: must be finite")
        _check_positive("omega0", self.omega0, "rad/s")
        _check_positive("gamma", self.gamma, "1/(W m)", allow_zero=True)
        _check_positive("length", self.length, "m")
        _check_positive("loss", self.loss, "1/m", allow_zero=True)
        _check_positive("raman_tau1", self.raman_tau1, "s")
        _check_positive("raman_tau2", self.raman_tau2, "s")
        if not 0.0 <= self.raman_fraction < 1.0:
            raise ConfigError(
                f"taylor fiber raman_fraction = {self.raman_fraction}: must be in [0, 1)"
            )
        if self.mode_area is not None:
            _check_positive("mode_area", self.mode_area, "m^2")

    @property
    def kerr_n2(self) -> float:
        """gamma c A_eff / omega0 if the area is given, else nan. [m^2/W]

        References
        ----------
        none: definition of gamma inverted (common practice, no source)
        """
        if self.mode_area is None:
            return math.nan
        return self.gamma * c * self.mode_area / self.omega0

    def propagation_constant(self, omega: np.ndarray) -> np.ndarray:
        """beta(omega) from the Taylor series (beta0 = beta1 = 0). [rad/m]

        References
        ----------
        none: Taylor series of beta about omega0 (common practice, no source)
        """
        return taylor_propagation_constant(omega, self.omega0, self.betas)

    def attenuation(self, omega: np.ndarray) -> np.ndarray:
        """Flat FIELD attenuation ``loss``. [1/m]

        References
        ----------
        none: a given constant
        """
        return np.full(np.shape(omega), float(self.loss))

    def effective_area(self, omega: np.ndarray) -> np.ndarray:
        """``mode_area`` for every omega (nan if not given). [m^2]

        References
        ----------
        none: a given constant
        """
        return np.full(np.shape(omega), self.peak_intensity_area)

    def nonlinear_coefficient(self, omega: np.ndarray) -> np.ndarray:
        """The constant gamma for every omega (no omega/omega0 factor). [1/(W m)]

        References
        ----------
        none: a given constant
        """
        return np.full(np.shape(omega), float(self.gamma))

    @property
    def peak_intensity_area(self) -> float:
        """``mode_area`` if given, else nan. [m^2]

        References
        ----------
        none: a given constant
        """
        return math.nan if self.mode_area is None else float(self.mode_area)

    #: What :meth:`attenuation` is (the summary's ``fiber.loss_model``).
    loss_model = "flat"

    def describe(self) -> dict:
        """Defining SI parameters of the model.

        References
        ----------
        none: no physics (the model's defining parameters)
        """
        return {
            "model": "taylor",
            "omega0": self.omega0,
            "betas": list(self.betas),
            "gamma": self.gamma,
            "length": self.length,
            "loss": self.loss,
            "self_steepening": self.self_steepening,
            "raman_fraction": self.raman_fraction,
            "raman_tau1": self.raman_tau1,
            "raman_tau2": self.raman_tau2,
            "mode_area": self.mode_area,
            "kerr_n2": self.kerr_n2,
            "attenuation": ATTENUATION_CONVENTION,
        }
