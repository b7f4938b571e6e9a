"""The temporal pulse shapes offered by hcfplan: one registry read by every module.

Each shape is an amplitude a(x) of the reduced time x = t/T0 with a(0) = 1; the intensity is
a(x)^2. The registry holds, per shape, the constants that follow from it: the intensity FWHM in
units of T0, the energy in units of P0 T0 (P0 the peak power) and the time-bandwidth product of
the transform-limited pulse. :func:`hcfplan.pulse.fields.pulse_field` (fields on a grid),
:func:`hcfplan.pulse.fields.peak_power_from_energy` and
:func:`hcfplan.ionization.fraction.pulse_ionization_fraction` all read it here.

=============  ==================  ==================  ============  ========================
shape          intensity a(x)^2    FWHM / T0           E / (P0 T0)   TBP
=============  ==================  ==================  ============  ========================
``sech2``      sech^2(x)           2 ln(1 + sqrt 2)    2             4 ln^2(1 + sqrt 2) / pi^2
``gaussian``   exp(-x^2)           2 sqrt(ln 2)        sqrt(pi)      2 ln 2 / pi
=============  ==================  ==================  ============  ========================

References
----------
.. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
       (Gaussian and sech pulse shapes, T0 and the FWHM). [from memory]
.. [2] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
       Press, 2006, ch. 1 (table of pulse shapes: FWHM relations and time-bandwidth products).
       [from memory]
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt

from hcfplan.errors import ConfigError

PulseShape = Literal["sech2", "gaussian"]


def sech_amplitude(x: npt.ArrayLike) -> np.ndarray:
    """Amplitude sech(x) of a sech^2 pulse at reduced time x = t/T0.

    Parameters
    ----------
    x : float or ndarray
        Reduced time t/T0. [-]

    Returns
    -------
    ndarray
        sech(x); the argument is clipped at |x| = 700 so that cosh does not overflow. [-]

    References
    ----------
    .. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
           (sech pulse and its T0). [from memory]
    """
    return 1.0 / np.cosh(np.clip(np.asarray(x, dtype=float), -700.0, 700.0))


def gaussian_amplitude(x: npt.ArrayLike) -> np.ndarray:
    """Amplitude exp(-x^2/2) of a Gaussian pulse at reduced time x = t/T0 (intensity exp(-x^2)).

    Parameters
    ----------
    x : float or ndarray
        Reduced time t/T0. [-]

    Returns
    -------
    ndarray
        exp(-x^2/2). [-]

    References
    ----------
    .. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
           (T0 convention of the Gaussian pulse). [from memory]
    """
    return np.exp(-0.5 * np.asarray(x, dtype=float) ** 2)


@dataclass(frozen=True)
class ShapeEntry:
    """One registered pulse shape (module docstring).

    Attributes
    ----------
    name : str
        Registry key.
    amplitude : callable
        a(x) of the reduced time x = t/T0, a(0) = 1; the intensity is a(x)^2. [-]
    fwhm_per_t0 : float
        Intensity FWHM in units of T0. [-]
    energy_per_p0t0 : float
        :math:`\\int a(x)^2\\,dx`, the energy in units of P0 T0. [-]
    time_bandwidth_product : float
        Intensity FWHM times spectral FWHM (ordinary frequency) of the transform-limited
        pulse. [-]

    References
    ----------
    .. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
           (Gaussian and sech pulse shapes, T0 and the FWHM). [from memory]
    .. [2] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 (table of pulse shapes: FWHM relations and time-bandwidth
           products). [from memory]
    """

    name: str
    amplitude: Callable[[npt.ArrayLike], np.ndarray]
    fwhm_per_t0: float
    energy_per_p0t0: float
    time_bandwidth_product: float


#: shape key -> its entry; values of [1] and [2] of the module docstring.
PULSE_SHAPES: dict[str, ShapeEntry] = {
    "sech2": ShapeEntry("sech2", sech_amplitude, 2.0 * math.log(1.0 + math.sqrt(2.0)), 2.0,
                        4.0 * math.log(1.0 + math.sqrt(2.0)) ** 2 / math.pi**2),
    "gaussian": ShapeEntry("gaussian", gaussian_amplitude, 2.0 * math.sqrt(math.log(2.0)),
                           math.sqrt(math.pi), 2.0 * math.log(2.0) / math.pi),
}


def pulse_shape(shape: PulseShape) -> ShapeEntry:
    """The registry entry of a pulse shape.

    Parameters
    ----------
    shape : {"sech2", "gaussian"}
        Registry key.

    Returns
    -------
    ShapeEntry

    Raises
    ------
    ConfigError
        Unknown shape; the message names it and lists the allowed keys.

    References
    ----------
    none: registry look-up (the values carry the references of the module docstring).
    """
    try:
        return PULSE_SHAPES[shape]
    except (KeyError, TypeError):
        raise ConfigError(
            f"pulse shape = {shape!r}: unknown; allowed are {sorted(PULSE_SHAPES)}"
        ) from None


def intensity_envelope(shape: PulseShape, u: npt.ArrayLike) -> np.ndarray:
    """Normalised intensity of a pulse at time u = t / FWHM (peak 1 at u = 0, 1/2 at u = ±1/2).

    Parameters
    ----------
    shape : {"sech2", "gaussian"}
        Registry key.
    u : float or ndarray
        Time in units of the intensity FWHM. [-]

    Returns
    -------
    ndarray
        :math:`a(u\\,\\tau/T_0)^2`: sech^2(2 ln(1+sqrt 2) u) or exp(-4 ln2 u^2). [-]

    References
    ----------
    .. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
           (FWHM of sech and Gaussian pulses). [from memory]
    """
    entry = pulse_shape(shape)
    return entry.amplitude(np.asarray(u, dtype=float) * entry.fwhm_per_t0) ** 2
