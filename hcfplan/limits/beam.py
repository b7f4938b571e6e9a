"""Limits of a gas-filled fiber setup: self-focusing, ionisation, beam and fluence estimates.

Pure functions in SI. The cell, window and gas-handling checks are in :mod:`hcfplan.limits.cell`;
the ionised fraction of a pulse and the peak intensity for a given fraction in
:mod:`hcfplan.ionization.fraction`. :mod:`hcfplan.planning.reports.limits` composes them for a
configured setup. Every limit here is
an estimate: the model, its validity range and the source are stated in each docstring.

References
----------
.. [1] G. Fibich, A. L. Gaeta, "Critical power for self-focusing in bulk media and in hollow
       waveguides," Opt. Lett. 25, 335-337 (2000), doi:10.1364/OL.25.000335.
.. [2] J. H. Marburger, "Self-focusing: theory," Prog. Quantum Electron. 4, 35-110 (1975),
       doi:10.1016/0079-6727(75)90003-8 [DOI and the collapse-distance formula from memory].
.. [3] A. E. Siegman, *Lasers*, University Science Books, 1986, ch. 17 (Gaussian beams:
       w(z), z_R, R(z)) [chapter from memory].
.. [4] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, Sec. 7.2 (B-integral
       B = (2 pi / lambda) int n2 I dz) [section from memory].
.. [5] A. M. Perelomov, V. S. Popov, M. V. Terent'ev, Sov. Phys. JETP 23, 924-934 (1966)
       (PPT rate; evaluated by :mod:`hcfplan.ionization.rates`) [from memory].
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Literal

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.numerics.optimize import root_bracketed
from hcfplan.pulse.shapes import PulseShape

SelfFocusingModel = Literal["fibich2000", "marburger1975"]

#: Self-focusing margin P_cr / P_peak asked for by default (common practice, no source).
DEFAULT_SELF_FOCUSING_MARGIN = 2.0
#: Ionised fraction treated as the limit by default: PPT fraction left behind the pulse
#: (common practice, no source; clean SPM is usually quoted for 1e-4 to 1e-3).
DEFAULT_IONIZATION_FRACTION_LIMIT = 1e-4
#: B-integral treated as the limit in a window (common practice, no source).
DEFAULT_B_INTEGRAL_LIMIT = 1.0


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

    References
    ----------
    .. [1] G. Fibich, A. L. Gaeta, "Critical power for self-focusing in bulk media and in hollow
           waveguides," Opt. Lett. 25, 335-337 (2000), doi:10.1364/OL.25.000335.
    .. [2] J. H. Marburger, "Self-focusing: theory," Prog. Quantum Electron. 4, 35-110 (1975),
           doi:10.1016/0079-6727(75)90003-8 [DOI and the collapse-distance formula from memory].
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


def _check_positive(name: str, value, unit: str, *, allow_zero: bool = False) -> None:
    value = np.asarray(value, dtype=float)
    bad = ~(value >= 0) if allow_zero else ~(value > 0)
    if np.any(bad) or np.any(~np.isfinite(value)):
        allowed = ">= 0" if allow_zero else "> 0"
        shown = f"{value} {unit}".strip()
        raise ConfigError(f"{name} = {shown}: must be finite and {allowed}")


def _check_margin(margin: float) -> None:
    if not (math.isfinite(margin) and margin >= 1.0):
        raise ConfigError(f"self-focusing margin = {margin}: must be finite and >= 1")


# ----------------------------------------------------------------------------- self-focusing
def self_focusing_margin(critical_power, peak_power):
    """Self-focusing margin P_cr / P_peak (> 1: below the critical power).

    Parameters
    ----------
    critical_power : float or ndarray
        Critical power, e.g. from :func:`self_focusing_power`. [W]
    peak_power : float or ndarray
        Peak power of the pulse. [W]

    Returns
    -------
    float or ndarray
        P_cr / P_peak; infinite for zero peak power. [-]

    References
    ----------
    none: ratio of two powers.

    See Also
    --------
    hcfplan.limits.margins.margin : the same convention (limit / value) for every margin of the
        reports, with the required value beside it (``limits.self_focusing_margin``).
    """
    _check_positive("peak_power", peak_power, "W", allow_zero=True)
    with np.errstate(divide="ignore"):
        ratio = np.asarray(critical_power, dtype=float) / np.asarray(peak_power, dtype=float)
    return float(ratio) if ratio.ndim == 0 else ratio


def max_pressure_for_self_focusing(
    peak_power: float,
    critical_power_at: Callable[[float], float],
    *,
    margin: float = DEFAULT_SELF_FOCUSING_MARGIN,
    pressure_range: tuple[float, float] = (1.0, 1.0e8),
) -> float:
    """Highest fill pressure at which P_cr(p) / P_peak is still at least ``margin``.

    Parameters
    ----------
    peak_power : float
        Peak power of the pulse. [W]
    critical_power_at : callable
        Pressure [Pa] -> critical power [W] of the fill at that pressure, decreasing with
        pressure; build it from the real-gas density (n2 is proportional to the number
        density), e.g. with :func:`self_focusing_power` and a gas medium at each pressure.
    margin : float
        Required P_cr / P_peak (>= 1; default 2, common practice, no source). [-]
    pressure_range : (float, float)
        Search interval. [Pa]

    Returns
    -------
    float
        Pressure where P_cr(p) = margin P_peak (Brent's method in ln p, relative tolerance
        1e-12); ``inf`` if the margin still holds at the top of the range, ``nan`` if it fails
        already at the bottom. [Pa]

    Notes
    -----
    With n2 = n2_ref N/N_ref the condition is N(p) = N_ref P_cr(p_ref)/(margin P_peak) (up to the
    slow variation of n0), so the real-gas density, not p/(k_B T), fixes the answer at high
    pressure. Critical power of [1] through ``critical_power_at``; validity as
    :func:`self_focusing_power`.

    References
    ----------
    .. [1] G. Fibich, A. L. Gaeta, "Critical power for self-focusing in bulk media and in hollow
           waveguides," Opt. Lett. 25, 335-337 (2000), doi:10.1364/OL.25.000335.
    """
    _check_positive("peak_power", peak_power, "W")
    _check_margin(margin)
    lo, hi = (float(p) for p in pressure_range)
    if not 0 < lo < hi:
        raise ConfigError(f"pressure_range = ({lo}, {hi}) Pa: need 0 < min < max")
    target = margin * peak_power

    def excess(log_p: float) -> float:  # ln(P_cr(p) / (margin P_peak)): falls with pressure
        return math.log(critical_power_at(math.exp(log_p)) / target)

    if excess(math.log(hi)) >= 0:
        return math.inf
    if excess(math.log(lo)) < 0:
        return math.nan
    return math.exp(root_bracketed(excess, math.log(lo), math.log(hi), xtol=1e-13, rtol=1e-13))


def max_energy_for_self_focusing(
    critical_power,
    duration_fwhm: float,
    shape: PulseShape,
    *,
    margin: float = DEFAULT_SELF_FOCUSING_MARGIN,
    coupling_efficiency: float = 1.0,
):
    """Largest pulse energy (before coupling) whose peak power stays at P_cr / margin.

    Parameters
    ----------
    critical_power : float or ndarray
        Critical power at the pressure(s) of interest. [W]
    duration_fwhm : float
        Intensity FWHM of the (transform-limited) pulse. [s]
    shape : {"gaussian", "sech2"}
        Temporal intensity profile.
    margin : float
        Required P_cr / P_peak (>= 1). [-]
    coupling_efficiency : float
        Fraction of the energy that reaches the gas where the check applies (the fiber mode:
        the launch efficiency; the focal region before the fiber: 1). [-]

    Returns
    -------
    float or ndarray
        E_max = (P_cr / margin) / (P_peak per joule) / efficiency. [J]

    Notes
    -----
    Critical power as in [1]. Peak power per joule from
    :func:`hcfplan.pulse.fields.peak_power_from_energy` (0.9394/tau for a Gaussian, 0.8814/tau
    for sech^2). Chirped input pulses have a lower peak power; the limit then holds for more
    energy.

    References
    ----------
    .. [1] G. Fibich, A. L. Gaeta, "Critical power for self-focusing in bulk media and in hollow
           waveguides," Opt. Lett. 25, 335-337 (2000), doi:10.1364/OL.25.000335.
    """
    from hcfplan.pulse.fields import peak_power_from_energy

    _check_margin(margin)
    if not 0 < coupling_efficiency <= 1:
        raise ConfigError(f"coupling_efficiency = {coupling_efficiency}: must be in (0, 1]")
    per_joule = peak_power_from_energy(1.0, duration_fwhm, shape)
    energy = np.asarray(critical_power, dtype=float) / (margin * per_joule * coupling_efficiency)
    return float(energy) if energy.ndim == 0 else energy


def self_focusing_distance_marburger1975(
    peak_power: float,
    wavelength: float,
    n0: float,
    n2: float,
    beam_radius: float,
    wavefront_radius: float = math.inf,
) -> float:
    """Distance to the self-focus of a Gaussian beam, Marburger's fit [1].

    Parameters
    ----------
    peak_power : float
        Peak power. [W]
    wavelength : float
        Vacuum wavelength. [m]
    n0, n2 : float
        Linear index [-] and Kerr coefficient [m^2/W] of the medium.
    beam_radius : float
        1/e^2 intensity (1/e field) radius w of the beam where it enters the medium. [m]
    wavefront_radius : float
        Radius of curvature of the converging wavefront there (> 0 converging, ``inf`` for a
        collimated beam). [m]

    Returns
    -------
    float
        Collapse distance; ``inf`` when P <= P_cr (no collapse in this model). [m]

    Notes
    -----
    .. math:: z_f = \\frac{0.367\\, k w^2}{\\sqrt{[(P/P_{cr})^{1/2} - 0.852]^2 - 0.0219}},
              \\qquad \\frac{1}{z_f'} = \\frac{1}{z_f} + \\frac{1}{R}

    with k = 2 pi n0 / lambda and P_cr the Gaussian-beam value 3.77 lambda^2/(8 pi n0 n2) of the
    same paper (formula, constants and the lens transformation for a converging beam from
    memory; the form is also the one quoted in reviews of filamentation). An info value:
    pulses, plasma and the finite gas path change it.

    References
    ----------
    .. [1] J. H. Marburger, "Self-focusing: theory," Prog. Quantum Electron. 4, 35-110 (1975),
           doi:10.1016/0079-6727(75)90003-8 [DOI and the collapse-distance formula from memory].
    """
    _check_positive("peak_power", peak_power, "W")
    _check_positive("beam_radius", beam_radius, "m")
    if not wavefront_radius > 0:
        raise ConfigError(f"wavefront_radius = {wavefront_radius} m: must be > 0 (inf: collimated)")
    critical = self_focusing_power(wavelength, n0, n2, "marburger1975")
    ratio = peak_power / critical
    if ratio <= 1.0:
        return math.inf
    k = 2 * math.pi * n0 / wavelength
    z_collimated = 0.367 * k * beam_radius**2 / math.sqrt((math.sqrt(ratio) - 0.852) ** 2 - 0.0219)
    return 1.0 / (1.0 / z_collimated + 1.0 / wavefront_radius)


# ----------------------------------------------------------------------------- ionisation
def energy_from_peak_intensity(
    peak_intensity,
    intensity_area: float,
    duration_fwhm: float,
    shape: PulseShape,
    coupling_efficiency: float = 1.0,
):
    """Pulse energy (before coupling) that gives an on-axis peak intensity I0 = P / A_I.

    Parameters
    ----------
    peak_intensity : float or ndarray
        On-axis peak intensity. [W/m^2]
    intensity_area : float
        Area A_I with I0 = P / A_I (EH11: pi a^2 J1(u11)^2; free Gaussian: pi w^2 / 2). [m^2]
    duration_fwhm : float
        Intensity FWHM. [s]
    shape : {"gaussian", "sech2"}
        Temporal profile.
    coupling_efficiency : float
        Fraction of the energy in the beam where the intensity applies. [-]

    Returns
    -------
    float or ndarray
        E = I0 A_I / (P_peak per joule) / efficiency. [J]

    References
    ----------
    none: conversion through the peak power of :func:`hcfplan.pulse.fields.peak_power_from_energy`.
    """
    from hcfplan.pulse.fields import peak_power_from_energy

    _check_positive("intensity_area", intensity_area, "m^2")
    if not 0 < coupling_efficiency <= 1:
        raise ConfigError(f"coupling_efficiency = {coupling_efficiency}: must be in (0, 1]")
    per_joule = peak_power_from_energy(1.0, duration_fwhm, shape)
    energy = np.asarray(peak_intensity, dtype=float) * intensity_area / (
        per_joule * coupling_efficiency)
    return float(energy) if energy.ndim == 0 else energy


# ----------------------------------------------------------------------------- Gaussian beams
def gaussian_beam_radius(beam_waist: float, wavelength: float, distance, n0: float = 1.0):
    """1/e^2 intensity radius w(z) = w0 sqrt(1 + (z / z_R)^2), z_R = pi n0 w0^2 / lambda [1].

    Parameters
    ----------
    beam_waist : float
        Waist w0 (1/e field = 1/e^2 intensity radius). [m]
    wavelength : float
        Vacuum wavelength. [m]
    distance : float or ndarray
        Distance from the waist. [m]
    n0 : float
        Refractive index of the medium (1 for the gas, to 3e-3). [-]

    Returns
    -------
    float or ndarray
        Beam radius. [m]

    Notes
    -----
    Paraxial TEM00 beam; a fiber output in the EH11 mode is approximated by the Gaussian of
    the matched waist 0.64 a (98 % overlap).

    References
    ----------
    .. [1] A. E. Siegman, *Lasers*, University Science Books, 1986, ch. 17 (Gaussian beams:
           w(z), z_R, R(z)) [chapter from memory].
    """
    _check_positive("beam_waist", beam_waist, "m")
    _check_positive("wavelength", wavelength, "m")
    rayleigh = math.pi * n0 * beam_waist**2 / wavelength
    radius = beam_waist * np.sqrt(1.0 + (np.asarray(distance, dtype=float) / rayleigh) ** 2)
    return float(radius) if radius.ndim == 0 else radius


def gaussian_peak_intensity(peak_power, beam_radius):
    """On-axis intensity 2 P / (pi w^2) of a Gaussian beam of 1/e^2 radius w. [W/m^2]

    Parameters
    ----------
    peak_power : float or ndarray
        Power. [W]
    beam_radius : float or ndarray
        1/e^2 intensity radius. [m]

    References
    ----------
    .. [1] A. E. Siegman, *Lasers*, University Science Books, 1986, ch. 17 (Gaussian beams:
           w(z), z_R, R(z)) [chapter from memory].
    """
    _check_positive("beam_radius", beam_radius, "m")
    value = 2.0 * np.asarray(peak_power, dtype=float) / (np.pi * np.asarray(beam_radius) ** 2)
    return float(value) if value.ndim == 0 else value


def gaussian_fluence(energy, beam_radius: float, radius=0.0):
    """Fluence F(r) = (2 E / (pi w^2)) exp(-2 r^2 / w^2) of a Gaussian beam. [J/m^2]

    Parameters
    ----------
    energy : float or ndarray
        Pulse energy in the beam. [J]
    beam_radius : float
        1/e^2 intensity radius w. [m]
    radius : float or ndarray
        Distance from the beam axis (e.g. the core radius for the light that reaches the
        fiber facet around the bore). [m]

    References
    ----------
    .. [1] A. E. Siegman, *Lasers*, University Science Books, 1986, ch. 17 (Gaussian beams:
           w(z), z_R, R(z)) [chapter from memory].
    """
    _check_positive("beam_radius", beam_radius, "m")
    r = np.asarray(radius, dtype=float)
    value = 2.0 * np.asarray(energy, dtype=float) / (np.pi * beam_radius**2) * np.exp(
        -2.0 * r**2 / beam_radius**2)
    return float(value) if value.ndim == 0 else value


def b_integral(peak_intensity, n2: float, thickness: float, wavelength: float):
    """Peak nonlinear phase B = (2 pi / lambda) n2 I L of a plate at constant intensity [1].

    Parameters
    ----------
    peak_intensity : float or ndarray
        Peak intensity in the plate. [W/m^2]
    n2 : float
        Kerr coefficient of the plate material. [m^2/W]
    thickness : float
        Plate thickness L. [m]
    wavelength : float
        Vacuum wavelength. [m]

    Returns
    -------
    float or ndarray
        B-integral. [rad]

    Notes
    -----
    The beam size is taken constant through the plate (L << z_R). Beyond about 3 rad
    small-scale self-focusing becomes a risk; 1 rad is the usual design limit (common
    practice, no source).

    References
    ----------
    .. [1] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, Sec. 7.2 (B-integral
           B = (2 pi / lambda) int n2 I dz) [section from memory].
    """
    _check_positive("wavelength", wavelength, "m")
    _check_positive("thickness", thickness, "m", allow_zero=True)
    value = 2.0 * np.pi / wavelength * n2 * np.asarray(peak_intensity, dtype=float) * thickness
    return float(value) if value.ndim == 0 else value
