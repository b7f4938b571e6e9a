"""Limits of a gas-filled fiber setup: self-focusing (this module grows with further checks).

Pure functions in SI.

References
----------
.. [1] G. Fibich, A. L. Gaeta, "Critical power for self-focusing in bulk media and in hollow
       waveguides," Opt. Lett. 25, 335-337 (2000), doi:10.1364/OL.25.000335.
.. [2] J. H. Marburger, "Self-focusing: theory," Prog. Quantum Electron. 4, 35-110 (1975),
       doi:10.1016/0079-6727(75)90003-8 [DOI from memory].
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Literal

import numpy as np

from .errors import ConfigError

SelfFocusingModel = Literal["fibich2000", "marburger1975"]


def _critical_power_fibich2000(wavelength: np.ndarray, n0: np.ndarray, n2: np.ndarray):
    """P_cr = 1.8962 lambda^2 / (4 pi n0 n2), the Townes-profile value of [1]."""
    return 1.8962 * wavelength**2 / (4 * np.pi * n0 * n2)


def _critical_power_marburger1975(wavelength: np.ndarray, n0: np.ndarray, n2: np.ndarray):
    """P_cr = 3.77 lambda^2 / (8 pi n0 n2), the Gaussian-beam value of [2]."""
    return 3.77 * wavelength**2 / (8 * np.pi * n0 * n2)


#: model key -> function(wavelength [m], n0 [-], n2 [m^2/W]) -> critical power [W]
SELF_FOCUSING_MODELS: dict[str, Callable[..., np.ndarray]] = {
    "fibich2000": _critical_power_fibich2000,
    "marburger1975": _critical_power_marburger1975,
}


def self_focusing_power(
    wavelength: float | np.ndarray,
    n0: float | np.ndarray,
    n2: float | np.ndarray,
    model: SelfFocusingModel = "fibich2000",
) -> float | np.ndarray:
    """Critical power for self-focusing (catastrophic collapse) of a beam in a Kerr medium.

    Parameters
    ----------
    wavelength : float or ndarray
        Vacuum wavelength. [m]
    n0 : float or ndarray
        Linear refractive index of the medium. [-]
    n2 : float or ndarray
        Kerr coefficient (n = n0 + n2 I); n2 = 0 gives an infinite critical power. [m^2/W]
    model : {"fibich2000", "marburger1975"}
        ``"fibich2000"``: :math:`P_{cr} = 1.8962\\,\\lambda^2/(4\\pi n_0 n_2)`, the power of the
        Townes profile, from [1]; [1] argues (from memory) that the same
        value holds for hollow waveguides. ``"marburger1975"``:
        :math:`P_{cr} = 3.77\\,\\lambda^2/(8\\pi n_0 n_2)` for a collimated Gaussian beam [2]
        (0.6 % lower).

    Returns
    -------
    float or ndarray
        Critical power. [W]

    Raises
    ------
    ConfigError
        Non-positive wavelength, n0 < 1 or negative n2 (a defocusing medium does not collapse),
        or an unknown model.

    Notes
    -----
    Valid for the paraxial, continuous-wave picture; pulses much shorter than the collapse
    time, plasma and dispersion raise the power actually needed.
    """
    if model not in SELF_FOCUSING_MODELS:
        raise ConfigError(
            f"self-focusing model = {model!r}: unknown; allowed: {', '.join(SELF_FOCUSING_MODELS)}"
        )
    wavelength, n0, n2 = (np.asarray(v, dtype=float) for v in (wavelength, n0, n2))
    if np.any(~(wavelength > 0)):
        raise ConfigError(f"wavelength = {wavelength} m: must be > 0")
    if np.any(~(n0 >= 1)):
        raise ConfigError(f"n0 = {n0}: must be >= 1")
    if np.any(~(n2 >= 0)):
        raise ConfigError(f"n2 = {n2} m^2/W: must be >= 0")
    with np.errstate(divide="ignore"):
        power = SELF_FOCUSING_MODELS[model](wavelength, n0, n2)
    return float(power) if power.ndim == 0 else power
