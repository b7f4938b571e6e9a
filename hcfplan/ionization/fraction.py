"""Ionised fraction left behind a pulse, and the peak intensity at which it reaches a level.

:func:`ionization_fraction` integrates a rate over any intensity history;
:func:`pulse_ionization_fraction` applies it to a pulse of one of the shapes of
:mod:`hcfplan.pulse.shapes` in a gas of one or more ionising species; and
:func:`peak_intensity_for_fraction` inverts that for the peak intensity. Every hcfplan module
that needs these (the limits report, the operating envelope) calls them here. The rates are
those of :mod:`hcfplan.ionization.rates`, usually through a
:class:`~hcfplan.ionization.tables.RateTable`; units and validity as stated there.

References
----------
.. [1] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an alternating
       electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966. [from memory]
.. [2] M. V. Ammosov, N. B. Delone and V. P. Krainov, "Tunnel ionization of complex atoms and of
       atomic ions in an alternating electromagnetic field," Sov. Phys. JETP, vol. 64, no. 6,
       pp. 1191-1194, 1986. [from memory]
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np
import numpy.typing as npt

from hcfplan.errors import ConfigError
from hcfplan.ionization.rates import check_intensity, check_positive
from hcfplan.numerics.optimize import root_bracketed
from hcfplan.pulse.shapes import PulseShape, intensity_envelope, pulse_shape

#: (weight, rate) pairs: the number fraction of the ionising species in the gas [-] and its
#: cycle-averaged rate W(I) [1/s] for an intensity array [W/m^2].
WeightedRates = Sequence[tuple[float, Callable[[np.ndarray], np.ndarray]]]

#: Half-width of the time window of :func:`pulse_ionization_fraction`, in FWHM. At ±3 FWHM a
#: Gaussian is at 2^-36 = 1.5e-11 and a sech^2 at 1.0e-4 of its peak intensity; with rates that
#: rise as a high power of the intensity (order > 6 near the onset,
#: tests/ionization/test_ionization.py) the part outside the window is negligible.
PULSE_HALF_WINDOW = 3.0
#: Number of samples over that window (133 per FWHM).
PULSE_SAMPLES = 801


def _check_finite(name: str, value, unit: str, *, allow_zero: bool) -> None:
    value = np.asarray(value, dtype=float)
    bad = ~(value >= 0) if allow_zero else ~(value > 0)
    if np.any(bad) or np.any(~np.isfinite(value)):
        allowed = ">= 0" if allow_zero else "> 0"
        raise ConfigError(f"{name} = {value} {unit}: must be finite and {allowed}")


def ionization_fraction(
    intensity_t: npt.ArrayLike,
    dt: float,
    rate: Callable[[np.ndarray], np.ndarray],
    neutral_fraction_start: npt.ArrayLike = 1.0,
) -> np.ndarray:
    """Ionised fraction ρ(t) for an intensity history, from dρ/dt = W(I(t)) (1 - ρ).

    Parameters
    ----------
    intensity_t : ndarray
        Intensity samples I(t_k), t_k = t_0 + k dt, along the last axis. [W/m^2]
    dt : float
        Sample spacing. [s]
    rate : callable
        W(I) in 1/s for an intensity array in W/m^2, e.g. a
        :class:`~hcfplan.ionization.tables.RateTable` or
        ``functools.partial(ppt_rate, wavelength=..., ip=..., l=...)``.
    neutral_fraction_start : float or ndarray
        Neutral fraction 1 - ρ at t_0 (default 1: no ions yet).

    Returns
    -------
    ndarray
        ρ(t_k), same shape as ``intensity_t``; ρ(t_0) = 1 - ``neutral_fraction_start``.

    Notes
    -----
    With W held at W_k over [t_k, t_k + dt) the equation is solved exactly per step,
    :math:`\\rho_{k+1} = 1 - (1-\\rho_k)e^{-W_k\\,dt}`, i.e.
    :math:`\\rho_k = 1 - (1-\\rho_0)\\exp(-\\sum_{j<k} W_j\\,dt)`. No recombination, single
    ionisation only.

    References
    ----------
    none: numerical helper (exact step solution of the rate equation; the rates carry their
    own references).
    """
    check_positive("dt", dt, "s")
    intensity_t = np.asarray(intensity_t, dtype=float)
    check_intensity(intensity_t)
    w_dt = np.asarray(rate(intensity_t), dtype=float) * dt
    exponent = np.cumsum(w_dt, axis=-1) - w_dt  # Σ_{j<k} W_j dt
    neutral = np.asarray(neutral_fraction_start, dtype=float)
    return (1.0 - neutral) - neutral * np.expm1(-exponent)  # = 1 - n0 exp(-S), exact for tiny S


def pulse_ionization_fraction(
    peak_intensity: npt.ArrayLike,
    duration_fwhm: float,
    shape: PulseShape,
    rates: WeightedRates,
):
    """Ionised fraction of the gas left behind a pulse of given peak intensity.

    Parameters
    ----------
    peak_intensity : float or ndarray
        Peak (cycle-averaged) intensity. [W/m^2]
    duration_fwhm : float
        Intensity FWHM. [s]
    shape : {"gaussian", "sech2"}
        Temporal intensity profile (:func:`hcfplan.pulse.shapes.intensity_envelope`).
    rates : sequence of (weight, rate)
        For each ionising species its number fraction in the gas [-] (mole fraction of the
        component times the species fraction of the table record, e.g. 0.2095 for O2 in air;
        1 for a pure atomic gas) and its rate W(I) [1/s], e.g. a
        :class:`~hcfplan.ionization.tables.RateTable`.

    Returns
    -------
    float or ndarray
        :math:`\\rho = \\sum_i x_i \\rho_i` with
        :math:`\\rho_i = 1 - \\exp(-\\int W_i(I(t))\\,dt)`, same shape as ``peak_intensity``. [-]

    Notes
    -----
    Integrated by :func:`ionization_fraction` over ±:data:`PULSE_HALF_WINDOW` FWHM with
    :data:`PULSE_SAMPLES` samples; single ionisation, no recombination, each species depletes
    independently. The rate models hold below barrier suppression (PPT [1], ADK [2]; see
    :mod:`hcfplan.ionization.rates`).

    References
    ----------
    .. [1] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an
           alternating electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966.
           [from memory]
    .. [2] M. V. Ammosov, N. B. Delone and V. P. Krainov, "Tunnel ionization of complex atoms
           and of atomic ions in an alternating electromagnetic field," Sov. Phys. JETP,
           vol. 64, no. 6, pp. 1191-1194, 1986. [from memory]
    """
    _check_finite("duration_fwhm", duration_fwhm, "s", allow_zero=False)
    peak = np.asarray(peak_intensity, dtype=float)
    _check_finite("peak_intensity", peak, "W/m^2", allow_zero=True)
    x = np.linspace(-PULSE_HALF_WINDOW, PULSE_HALF_WINDOW, PULSE_SAMPLES)
    history = peak[..., None] * intensity_envelope(shape, x)
    dt = float(x[1] - x[0]) * duration_fwhm
    total = np.zeros(peak.shape)
    for weight, rate in rates:
        total = total + weight * ionization_fraction(history, dt, rate)[..., -1]
    return float(total) if total.ndim == 0 else total


def peak_intensity_for_fraction(
    fraction_limit: float,
    duration_fwhm: float,
    shape: PulseShape,
    rates: WeightedRates,
    intensity_range: tuple[float, float] = (1e15, 1e20),
) -> float:
    """Peak intensity at which a pulse leaves the ionised fraction ``fraction_limit`` behind it.

    Parameters
    ----------
    fraction_limit : float
        Ionised fraction to reach, 0 < ρ < sum of the weights. [-]
    duration_fwhm, shape, rates :
        As in :func:`pulse_ionization_fraction`.
    intensity_range : (float, float)
        Search interval (default 1e11 to 1e16 W/cm^2). [W/m^2]

    Returns
    -------
    float
        Peak (cycle-averaged) intensity; ``inf`` if the fraction stays below ``fraction_limit``
        over the whole range, ``nan`` if it already exceeds it at the bottom. [W/m^2]

    Raises
    ------
    ConfigError
        ``fraction_limit`` outside (0, sum of weights), a bad range or shape.

    Notes
    -----
    Solves :math:`\\sum_i x_i[1 - \\exp(-\\int W_i(I_0 s(t))\\,dt)] = \\rho` for :math:`I_0`
    (s the normalised intensity envelope) by Brent's method
    (:func:`~hcfplan.numerics.optimize.root_bracketed`) in
    :math:`\\ln I_0` on :math:`\\ln(\\rho/\\rho(I_0))`, relative tolerance 1e-12, with the
    fraction from :func:`pulse_ionization_fraction`. The fraction rises monotonically with
    :math:`I_0` for any non-negative rate, so the root is unique.

    References
    ----------
    .. [1] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an
           alternating electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966.
           [from memory]
    .. [2] M. V. Ammosov, N. B. Delone and V. P. Krainov, "Tunnel ionization of complex atoms
           and of atomic ions in an alternating electromagnetic field," Sov. Phys. JETP,
           vol. 64, no. 6, pp. 1191-1194, 1986. [from memory]
    """
    rates = tuple(rates)
    weights = sum(w for w, _ in rates)
    if not 0 < fraction_limit < weights:
        raise ConfigError(
            f"ionization fraction limit = {fraction_limit}: must be in (0, {weights:g})")
    pulse_shape(shape)  # ConfigError naming an unknown shape before any work
    lo, hi = (float(i) for i in intensity_range)
    if not 0 < lo < hi:
        raise ConfigError(f"intensity_range = ({lo}, {hi}) W/m^2: need 0 < min < max")

    def margin_left(log_i: float) -> float:  # ln(limit / fraction): falls with intensity
        rho = pulse_ionization_fraction(math.exp(log_i), duration_fwhm, shape, rates)
        return math.log(fraction_limit / max(rho, 1e-300))

    if margin_left(math.log(hi)) >= 0:
        return math.inf
    if margin_left(math.log(lo)) < 0:
        return math.nan
    return math.exp(root_bracketed(margin_left, math.log(lo), math.log(hi), xtol=1e-12,
                                   rtol=1e-12))
