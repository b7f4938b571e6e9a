"""Pressure profile of a gradient fill and its division into segments of uniform fill.

A capillary fed with gas at one end and pumped at the other carries a steady flow whose
pressure falls along the bore. In the viscous (Poiseuille) regime the profile is [1], [2]

.. math:: p(z) = \\sqrt{p_0^2 + (p_L^2 - p_0^2)\\, z/L},

with :math:`p_0` the pressure at the entrance (z = 0) and :math:`p_L` at the exit (z = L).
Derivation (standard, reproduced here): for laminar flow in a tube of radius a the volume flow
at the local pressure is :math:`\\dot V = -(\\pi a^4 / 8\\eta)\\, dp/dz` (Hagen-Poiseuille); the
molar flow :math:`\\dot n = p\\dot V/(RT)` is the same at every z in steady state, so
:math:`p\\,dp/dz = \\tfrac12\\,d(p^2)/dz` is constant and :math:`p^2` is linear in z.

Assumptions (the model's range): steady, isothermal, fully developed laminar flow of an ideal gas
with a pressure-independent viscosity; the mean free path is much smaller than the bore
(Knudsen number << 1: viscous, not molecular flow); no entrance or exit effects. Near an
evacuated end the pressure falls to where the mean free path reaches the bore and the flow
becomes transitional/molecular; there the model overstates the fall to zero, which matters little
for the nonlinear optics because the density there is small either way.

The mean of the profile over the fiber, :math:`\\bar p = \\tfrac23 (p_L^3 - p_0^3)/(p_L^2 - p_0^2)`,
is :math:`\\tfrac23 p_L` for an evacuated entrance (:math:`p_0 = 0`): a gradient imparts the
nonlinear phase of a static fill at :math:`\\bar p` when dispersion is negligible, since the Kerr
coefficient is proportional to the density (checked in ``tests/propagation/test_profile.py``).

The solver takes the profile as segments of uniform fill (:func:`pressure_segments`): the
segment boundaries lie at equal pressure steps, so no segment spans more than a given share of
the highest pressure, and each segment is filled at the mean pressure of the profile over it,
so the integral of the pressure (and of an ideal gas's density) over each segment is exact.

References
----------
.. [1] A. Suda, M. Hatayama, K. Nagasaka and K. Midorikawa, "Generation of sub-10-fs, 5-mJ-optical
       pulses using a hollow fiber with a pressure gradient," Appl. Phys. Lett., vol. 86,
       111116, 2005, doi:10.1063/1.1883706. [from memory]
.. [2] M. Nurhuda, A. Suda, K. Midorikawa, M. Hatayama and K. Nagasaka, "Propagation dynamics of
       femtosecond laser pulses in a hollow fiber filled with argon: constant gas pressure
       versus differential gas pressure," J. Opt. Soc. Am. B, vol. 20, no. 9, pp. 2002-2011,
       2003, doi:10.1364/JOSAB.20.002002. [from memory]
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from hcfplan.errors import ConfigError

#: Default largest pressure step within one segment, as a share of the highest pressure of the
#: profile (the convergence test in tests/propagation/test_profile.py shows the output spectrum
#: changes by < 1e-3 of its norm when this is halved). [1]
SEGMENT_PRESSURE_STEP = 0.05


def _check_ends(length: float, entrance_pressure: float, exit_pressure: float) -> None:
    if not (math.isfinite(length) and length > 0):
        raise ConfigError(f"length = {length!r} m: must be finite and > 0")
    for name, p in (("entrance_pressure", entrance_pressure), ("exit_pressure", exit_pressure)):
        if not (math.isfinite(p) and p >= 0):
            raise ConfigError(f"{name} = {p!r} Pa: must be finite and >= 0")


def viscous_pressure_profile(z, length: float, entrance_pressure: float,
                             exit_pressure: float) -> np.ndarray:
    """Pressure along a capillary in steady viscous flow between two fixed end pressures.

    Parameters
    ----------
    z : float or ndarray
        Position from the entrance, 0 <= z <= length. [m]
    length : float
        Fiber length. [m]
    entrance_pressure, exit_pressure : float
        Absolute pressures at z = 0 and z = length (0: evacuated). [Pa]

    Returns
    -------
    ndarray
        p(z). [Pa]

    Notes
    -----
    :math:`p(z) = \\sqrt{p_0^2 + (p_L^2 - p_0^2) z/L}` (module docstring: derivation and range).

    References
    ----------
    A. Suda, M. Hatayama, K. Nagasaka and K. Midorikawa, Appl. Phys. Lett. 86, 111116 (2005)
    [from memory]; M. Nurhuda et al., J. Opt. Soc. Am. B 20, 2002 (2003) [from memory].
    """
    _check_ends(length, entrance_pressure, exit_pressure)
    x = np.clip(np.asarray(z, dtype=float) / length, 0.0, 1.0)
    p0, p1 = float(entrance_pressure), float(exit_pressure)
    return np.sqrt(p0**2 + (p1**2 - p0**2) * x)


def _mean_between(pa: float, pb: float) -> float:
    """Mean over z of the profile between two of its pressures: (2/3)(pb^3-pa^3)/(pb^2-pa^2)."""
    if pa == pb:
        return pa
    return 2.0 / 3.0 * (pa * pa + pa * pb + pb * pb) / (pa + pb)


def mean_pressure(entrance_pressure: float, exit_pressure: float) -> float:
    """Mean of the viscous-flow profile over the fiber length. [Pa]

    Parameters
    ----------
    entrance_pressure, exit_pressure : float
        Absolute end pressures (0: evacuated). [Pa]

    Returns
    -------
    float
        :math:`\\bar p = \\tfrac23 (p_L^3 - p_0^3)/(p_L^2 - p_0^2)` (the end pressure when both
        are equal; :math:`\\tfrac23 p_L` for :math:`p_0 = 0`). [Pa]

    Notes
    -----
    With :math:`u = p^2` linear in z, :math:`dz = L\\,du/(p_L^2 - p_0^2)` and
    :math:`\\int p\\,dz = \\tfrac23 L (p_L^3 - p_0^3)/(p_L^2 - p_0^2)` (derived).

    References
    ----------
    Profile of A. Suda et al., Appl. Phys. Lett. 86, 111116 (2005) [from memory]; the mean is
    derived in the Notes.
    """
    _check_ends(1.0, entrance_pressure, exit_pressure)
    return _mean_between(float(entrance_pressure), float(exit_pressure))


@dataclass(frozen=True)
class PressureSegments:
    """Segments of uniform fill approximating a pressure profile (SI).

    Attributes
    ----------
    edges : ndarray
        Segment boundaries from 0 to the length, increasing, K + 1 values. [m]
    pressures : ndarray
        Fill pressure of each segment: the mean of the profile over it, K values. [Pa]
    """

    edges: np.ndarray
    pressures: np.ndarray


def pressure_segments(length: float, entrance_pressure: float, exit_pressure: float,
                      step: float = SEGMENT_PRESSURE_STEP) -> PressureSegments:
    """Divide the viscous-flow profile into segments of uniform fill.

    Parameters
    ----------
    length : float
        Fiber length. [m]
    entrance_pressure, exit_pressure : float
        Absolute end pressures (0: evacuated; not both). [Pa]
    step : float
        Largest pressure change within a segment as a share of the highest end pressure,
        in (0, 1]. [1]

    Returns
    -------
    PressureSegments
        K = ceil(|p_L - p_0| / (step max(p_0, p_L))) segments (1 for equal ends) with
        boundaries at equal pressure steps, z_k = L (p_k^2 - p_0^2)/(p_L^2 - p_0^2), each filled
        at the profile's mean over it (:func:`mean_pressure` of its end pressures).

    Raises
    ------
    ConfigError
        For a non-positive length, negative pressures, both ends 0 or a step outside (0, 1].

    References
    ----------
    Profile of A. Suda et al., Appl. Phys. Lett. 86, 111116 (2005) [from memory]; the
    segmentation is a numerical choice (its convergence is tested), no source.
    """
    _check_ends(length, entrance_pressure, exit_pressure)
    if not (isinstance(step, (int, float)) and 0 < step <= 1):
        raise ConfigError(f"step = {step!r}: must be in (0, 1]")
    p0, p1 = float(entrance_pressure), float(exit_pressure)
    top = max(p0, p1)
    if top <= 0:
        raise ConfigError("entrance_pressure = exit_pressure = 0 Pa: no gas in the fiber")
    count = max(1, math.ceil(abs(p1 - p0) / (step * top) * (1 - 1e-12)))
    p = np.linspace(p0, p1, count + 1)
    if count == 1 and p0 == p1:
        edges = np.array([0.0, length])
    else:
        edges = length * (p**2 - p0**2) / (p1**2 - p0**2)
        edges[0], edges[-1] = 0.0, length
    means = np.array([_mean_between(a, b) for a, b in zip(p[:-1], p[1:], strict=True)])
    return PressureSegments(edges=edges, pressures=means)
