"""Rate tables: a photoionisation rate tabulated once and evaluated by interpolation.

The PPT sum of :mod:`hcfplan.ionization.rates` is slow; :func:`tabulate_rate` tabulates a rate on an
adaptive intensity grid once (nodes at the PPT channel closings, bisection to a relative
tolerance) and :class:`RateTable` evaluates it by log-log interpolation.
:func:`cached_rate_table` keeps such tables in hcfplan's cache folder
(:mod:`hcfplan.numerics.cache`) between runs. The ionised fraction of a pulse and the peak
intensity for a given fraction are in :mod:`hcfplan.ionization.fraction`. Units and validity as
in :mod:`hcfplan.ionization.rates`.

References
----------
.. [1] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an alternating
       electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966. [from memory]
.. [2] F. A. Ilkov, J. E. Decker and S. L. Chin, J. Phys. B, vol. 25, no. 19, pp. 4005-4020,
       1992, doi:10.1088/0953-4075/25/19/011. [from memory]
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import numpy.typing as npt

from hcfplan import constants
from hcfplan.constants import au_energy, au_field, c, epsilon_0
from hcfplan.errors import ConfigError
from hcfplan.ionization import rates
from hcfplan.ionization.rates import (
    LOG_RATE_MODELS,
    RateModel,
    check_positive,
    field_au,
    omega_au,
    rate_function,
)
from hcfplan.numerics.cache import cached_arrays

#: PPT channel closings become table nodes down to this Keldysh parameter.
_CLOSING_MIN_GAMMA = 0.03
#: Upper limit on the number of nodes of a RateTable.
_TABLE_MAX_POINTS = 200_000

# ----------------------------------------------------------------------------- tables
@dataclass(frozen=True, eq=False)
class RateTable:
    """A rate tabulated on an adaptive intensity grid, evaluated by log-log interpolation.

    Attributes
    ----------
    log_intensity : ndarray
        Natural log of the grid intensities [ln(W/m^2)], increasing.
    log_rate : ndarray
        Natural log of the rate at those intensities [ln(1/s)].
    model : str
        Key of the rate model in :data:`RATE_MODELS`.

    Notes
    -----
    Below the lowest node the rate is 0: start the table where rate × duration is negligible.
    Above the highest node it is extrapolated in log-log with the mean slope of the table's top
    factor e in intensity (such intensities are usually beyond barrier suppression;
    ``hcfplan.planning.reports.limits`` flags them).

    References
    ----------
    none: numerical helper (the tabulated models carry their own references).
    """

    log_intensity: np.ndarray
    log_rate: np.ndarray
    model: str

    @property
    def intensity_min(self) -> float:
        """Lowest tabulated intensity. [W/m^2]"""
        return float(np.exp(self.log_intensity[0]))

    @property
    def intensity_max(self) -> float:
        """Highest tabulated intensity. [W/m^2]"""
        return float(np.exp(self.log_intensity[-1]))

    @functools.cached_property
    def top_slope(self) -> float:
        """d ln(rate) / d ln(intensity) used above the table: the mean slope over the top
        factor e in intensity (steadier than the slope of one PPT cusp). [1]"""
        x, y = self.log_intensity, self.log_rate
        k = min(int(np.searchsorted(x, x[-1] - 1.0)), x.size - 2)
        return float((y[-1] - y[k]) / (x[-1] - x[k]))

    def __call__(self, intensity: npt.ArrayLike) -> np.ndarray:
        """Rate [1/s] at ``intensity`` [W/m^2] (float or ndarray)."""
        intensity = np.asarray(intensity, dtype=float)
        x, y = self.log_intensity, self.log_rate
        with np.errstate(divide="ignore"):
            li = np.log(intensity)
        log_w = np.interp(li, x, y)
        log_w = np.where(li > x[-1], y[-1] + self.top_slope * (li - x[-1]), log_w)
        return np.where(li >= x[0], np.exp(log_w), 0.0)[()]


def _ppt_channel_closings(wavelength, ip, intensity_min, intensity_max) -> np.ndarray:
    """Intensities [W/m^2] at which ν = I_p/ω + U_p/ω is an integer (PPT channel closings).

    Only closings with γ >= _CLOSING_MIN_GAMMA are returned: below that the channel structure
    of the PPT rate is smaller than 1e-4 relative and the refinement alone resolves it.
    """
    omega, ip_au = omega_au(wavelength), ip / au_energy
    f_top = min(float(field_au(intensity_max)), omega * math.sqrt(2 * ip_au) / _CLOSING_MIN_GAMMA)

    def nu(field):  # (I_p/ω)(1 + 1/(2γ²)) = I_p/ω + F²/(4ω³)
        return ip_au / omega + field**2 / (4.0 * omega**3)

    k = np.arange(math.floor(nu(float(field_au(intensity_min)))) + 1, math.floor(nu(f_top)) + 1)
    field = np.sqrt(4.0 * omega**3 * (k - ip_au / omega))
    return 0.5 * c * epsilon_0 * (field * au_field) ** 2


#: Intensities where each model's rate has kinks; they become table nodes.
_BREAKPOINTS: dict[str, Callable[..., np.ndarray]] = {
    "ppt": _ppt_channel_closings,
    "adk": lambda *args: np.empty(0),
    "adk_circular": lambda *args: np.empty(0),
}


def _refine(log_fn: Callable[[np.ndarray], np.ndarray], x: np.ndarray, tol: float):
    """Bisect (x, y = log_fn(x)) until linear interpolation is within ``tol`` at midpoints."""
    y = log_fn(x)
    todo = np.ones(x.size - 1, dtype=bool)
    while todo.any() and x.size < _TABLE_MAX_POINTS:
        mid = 0.5 * (x[:-1] + x[1:])[todo]
        y_mid = log_fn(mid)
        bad = np.abs(y_mid - 0.5 * (y[:-1] + y[1:])[todo]) > tol
        order = np.argsort(np.concatenate([x, mid]), kind="stable")
        x, y = np.concatenate([x, mid])[order], np.concatenate([y, y_mid])[order]
        flag = np.concatenate([np.zeros(x.size - mid.size, dtype=bool), bad])[order]
        # the two halves of a bad interval are the intervals on either side of its midpoint
        todo = flag[1:] | flag[:-1]
    return x, y


def tabulate_rate(
    model: RateModel,
    wavelength: float,
    ip: float,
    l: int,
    m: int = 0,
    charge: int = 1,
    intensity_min: float = 1e15,
    intensity_max: float = 1e20,
    points: int = 241,
    rtol: float = 2e-4,
) -> RateTable:
    """Tabulate a rate model on an adaptive log-intensity grid for fast evaluation.

    Parameters
    ----------
    model : {"ppt", "adk"}
        Key of :data:`RATE_MODELS`.
    wavelength : float
        Vacuum wavelength. [m]
    ip : float
        Ionisation potential. [J]
    l, m, charge : int
        As in :func:`ppt_rate`.
    intensity_min, intensity_max : float
        Range of the table (default 1e11 to 1e16 W/cm^2). [W/m^2]
    points : int
        Number of log-spaced starting nodes (>= 2); the table gets more after refinement.
    rtol : float
        Target relative accuracy of the interpolated rate.

    Returns
    -------
    RateTable

    Notes
    -----
    The starting nodes are ``points`` log-spaced intensities plus, for PPT, the channel
    closings (ν crossing an integer) down to γ = 0.03: just below each closing the lowest
    photon-number term vanishes as √(κ-ν), so the PPT rate has a cusp there (a dip by a factor
    2.6 at γ = 2, 1.4 at γ = 1, 1.002 at γ = 0.1). Intervals are then bisected until linear
    interpolation of ln w versus ln I at every midpoint is within ``rtol``. With the defaults
    the interpolated rate stays within 1e-3 of the formula from 1e12 to 1e16 W/cm^2 (tested for
    Ar at 0.8 µm and Xe at 1.03 µm).

    References
    ----------
    .. [1] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an
           alternating electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966
           (the threshold photon number ν whose integer crossings become nodes). [from memory]
    .. [2] F. A. Ilkov, J. E. Decker and S. L. Chin, J. Phys. B, vol. 25, no. 19,
           pp. 4005-4020, 1992, doi:10.1088/0953-4075/25/19/011 (the form of the PPT sum).
           [from memory]
    """
    log_fn = LOG_RATE_MODELS.get(model)
    if log_fn is None:
        rate_function(model)  # raises the ConfigError that lists the valid keys
    check_positive("intensity_min", intensity_min, "W/m^2")
    if not intensity_max > intensity_min:
        raise ConfigError(
            f"intensity_max = {intensity_max} W/m^2: must be > intensity_min = {intensity_min}"
        )
    if points < 2:
        raise ConfigError(f"points = {points}: must be >= 2")
    check_positive("rtol", rtol, "")
    log_fn(intensity_min, wavelength, ip, l, m, charge)  # validates the remaining inputs once
    closings = _BREAKPOINTS[model](wavelength, ip, intensity_min, intensity_max)
    x0 = np.union1d(
        np.linspace(math.log(intensity_min), math.log(intensity_max), points), np.log(closings)
    )
    x, y = _refine(lambda xx: log_fn(np.exp(xx), wavelength, ip, l, m, charge), x0, rtol)
    x.setflags(write=False)
    y.setflags(write=False)
    return RateTable(log_intensity=x, log_rate=y, model=model)


# ----------------------------------------------------------------------------- disk cache
def rate_table_is_sound(arrays: dict[str, np.ndarray]) -> bool:
    """Whether arrays read back from the cache folder can form a :class:`RateTable`.

    Parameters
    ----------
    arrays : dict of str to ndarray
        The stored ``log_intensity`` and ``log_rate``.

    Returns
    -------
    bool
        True for two 1-D arrays of equal length >= 2 with finite, strictly increasing
        ``log_intensity``.

    References
    ----------
    none: numerical helper.
    """
    x, y = arrays.get("log_intensity"), arrays.get("log_rate")
    return (x is not None and y is not None and x.ndim == y.ndim == 1 and x.size == y.size >= 2
            and bool(np.all(np.diff(x) > 0)) and bool(np.all(np.isfinite(x))))


def cached_rate_table(model: RateModel, wavelength: float, ip: float, l: int,  # noqa: E741
                      m: int, charge: int, intensity_min: float,
                      intensity_max: float, *, points: int = 241,
                      rtol: float = 2e-4) -> RateTable:
    """:func:`tabulate_rate`, kept in hcfplan's cache folder.

    Parameters
    ----------
    model, wavelength, ip, l, m, charge, intensity_min, intensity_max, points, rtol :
        As in :func:`tabulate_rate` (``points`` and ``rtol`` default to its defaults).

    Returns
    -------
    RateTable
        The same numbers as :func:`tabulate_rate` (nodes and log rates are stored exactly),
        with read-only arrays.

    Notes
    -----
    The entry is keyed by the inputs and by the source files of :mod:`hcfplan.constants`,
    :mod:`hcfplan.ionization.rates` and this module (:func:`hcfplan.numerics.cache.cached_arrays`),
    so a change of the formulas makes a new entry. A damaged or unsound file
    (:func:`rate_table_is_sound`) is computed again.

    References
    ----------
    none: caching wrapper (the rate models carry their own references).
    """
    def compute() -> dict[str, np.ndarray]:
        table = tabulate_rate(model, wavelength, ip, l, m, charge, intensity_min, intensity_max,
                              points=points, rtol=rtol)
        return {"log_intensity": table.log_intensity, "log_rate": table.log_rate}

    inputs = (model, float(wavelength), float(ip), int(l), int(m), int(charge),
              float(intensity_min), float(intensity_max), int(points), float(rtol))
    sources = (Path(constants.__file__), Path(rates.__file__), Path(__file__))
    arrays = cached_arrays("rate-table", inputs, sources, compute, rate_table_is_sound)
    x, y = arrays["log_intensity"], arrays["log_rate"]
    x.setflags(write=False)
    y.setflags(write=False)
    return RateTable(log_intensity=x, log_rate=y, model=model)
