"""Quantities derived from any :class:`~hcfplan.fibers.base.Waveguide` and standard pulse scales.

Pure functions in SI. Dispersion follows :mod:`hcfplan.numerics.grid` (beta_n = d^n beta / d
omega^n, positive beta2 normal); ``alpha`` is the FIELD attenuation (power ~ exp(-2 alpha z)).

References
----------
.. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3-5
       (L_D, L_NL, soliton order N, effective length, SPM phase) [from memory].
.. [2] J. M. Dudley, G. Genty, S. Coen, "Supercontinuum generation in photonic crystal fiber,"
       Rev. Mod. Phys. 78, 1135-1184 (2006), doi:10.1103/RevModPhys.78.1135 (fission length
       L_fiss ~ L_D / N) [from memory].
.. [3] S. C. Pinault, M. J. Potasek, "Frequency broadening by self-phase modulation in optical
       fibers," J. Opt. Soc. Am. B 2, 1318-1319 (1985), doi:10.1364/JOSAB.2.001318
       [from memory: formula and citation not checked].
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.fibers.base import Waveguide
from hcfplan.numerics.derivatives import derivative, derivative_table
from hcfplan.numerics.optimize import root_bracketed, roots_bracketed
from hcfplan.pulse.fields import shape_t0_factor
from hcfplan.pulse.shapes import PulseShape

#: Samples per ZDW search before each sign change is refined by a bracketed root search.
ZDW_SEARCH_POINTS = 400


def dispersion_coefficients(waveguide: Waveguide, omega0: float, order: int = 4) -> np.ndarray:
    """Taylor coefficients beta_0..beta_order of beta(omega) at omega0.

    Parameters
    ----------
    waveguide : Waveguide
        Any fiber model.
    omega0 : float
        Expansion frequency. [rad/s]
    order : int
        Highest order, 1..6.

    Returns
    -------
    ndarray
        [beta0 (rad/m), beta1 (s/m), beta2 (s^2/m), ..., beta_order (s^order/m)].

    References
    ----------
    none: numerical helper (Chebyshev derivatives, :mod:`hcfplan.numerics.derivatives`)
    """
    if not 1 <= order <= 6:
        raise ConfigError(f"dispersion order = {order}: must be 1..6")
    return derivative_table(waveguide.propagation_constant, float(omega0), order)


def group_velocity_dispersion(waveguide: Waveguide, omega: float | np.ndarray) -> np.ndarray:
    """beta2(omega) = d^2 beta / d omega^2 of the mode. [s^2/m]  (omega [rad/s])

    References
    ----------
    none: numerical helper (Chebyshev derivatives, :mod:`hcfplan.numerics.derivatives`)
    """
    return derivative(waveguide.propagation_constant, omega, 2)


def zero_dispersion_wavelengths(
    waveguide: Waveguide, wavelength_range: tuple[float, float]
) -> list[float]:
    """All wavelengths in the range where beta2 changes sign, ascending.

    Parameters
    ----------
    waveguide : Waveguide
        Any fiber model.
    wavelength_range : (float, float)
        Search interval (min, max). [m]

    Returns
    -------
    list of float
        Zero-dispersion wavelengths, each refined with Brent's method to 1e-13 m. [m]

    Notes
    -----
    beta2 is sampled at :data:`ZDW_SEARCH_POINTS` log-spaced wavelengths; two zeros closer than
    the sample spacing (about 0.2 % of the range ratio per step) can be missed. Every bracket
    is then refined at once by Chandrupatla's method
    (:func:`~hcfplan.numerics.optimize.roots_bracketed`: one evaluation of beta2 at all
    brackets per step); a bracket it does not close is refined alone by Brent's method. An
    anti-resonant fiber has ten zeros in the default range; one by one they took 0.1-0.2 s of
    the demo command, all together 0.04 s, for the same roots within the tolerance (measured).

    References
    ----------
    none: numerical helper (root search by Chandrupatla's or Brent's method,
    :mod:`hcfplan.numerics.optimize`)
    """
    lo, hi = (float(x) for x in wavelength_range)
    if not 0 < lo < hi:
        raise ConfigError(f"wavelength_range = ({lo}, {hi}) m: need 0 < min < max")
    wavelength = np.geomspace(lo, hi, ZDW_SEARCH_POINTS)
    beta2 = group_velocity_dispersion(waveguide, 2.0 * np.pi * c / wavelength)

    def beta2_at(lam):
        return group_velocity_dispersion(waveguide, 2.0 * np.pi * c / lam)

    where = np.flatnonzero(np.sign(beta2[:-1]) * np.sign(beta2[1:]) < 0)
    if where.size == 0:
        return []

    def one_by_one(i: int) -> float:  # Brent's method on the bracket after sample i
        return root_bracketed(lambda lam: float(beta2_at(lam)), wavelength[i],
                              wavelength[i + 1], xtol=ZDW_XTOL)

    roots, ok = roots_bracketed(beta2_at, wavelength[where], wavelength[where + 1],
                                xatol=ZDW_XTOL, xrtol=0.0)
    return [float(x) if good else one_by_one(i)
            for x, good, i in zip(roots, ok, where, strict=True)]


#: Absolute tolerance of each zero-dispersion wavelength. [m]
ZDW_XTOL = 1e-13


def zero_dispersion_pressure(
    fiber_at_pressure: Callable[[float], Waveguide],
    omega: float,
    pressure_range: tuple[float, float],
) -> float:
    """Fill pressure at which beta2(omega) = 0, or nan if beta2 does not change sign in the range.

    Parameters
    ----------
    fiber_at_pressure : callable
        Pressure [Pa] -> Waveguide filled at that pressure.
    omega : float
        Angular frequency. [rad/s]
    pressure_range : (float, float)
        Search interval. [Pa]

    Returns
    -------
    float
        Pressure of zero GVD (Brent's method, relative tolerance 1e-10). [Pa]

    References
    ----------
    none: numerical helper (root search by Brent's method,
    :func:`~hcfplan.numerics.optimize.root_bracketed`)
    """
    lo, hi = (float(p) for p in pressure_range)
    if not 0 <= lo < hi:
        raise ConfigError(f"pressure_range = ({lo}, {hi}) Pa: need 0 <= min < max")

    def beta2_at(p: float) -> float:
        return float(group_velocity_dispersion(fiber_at_pressure(p), omega))

    f_lo, f_hi = beta2_at(lo), beta2_at(hi)
    if np.sign(f_lo) == np.sign(f_hi):
        return float("nan")
    return root_bracketed(beta2_at, lo, hi, rtol=1e-10)


def t0_from_fwhm(duration_fwhm: float, shape: PulseShape) -> float:
    """Shape parameter T0 from the intensity FWHM (sech^2: /1.7627, Gaussian: /1.6651). [s]

    (duration_fwhm [s]; the shape registry is :func:`hcfplan.pulse.fields.shape_t0_factor`.)

    References
    ----------
    none: shape factors of :mod:`hcfplan.pulse.fields` (common practice, no source)
    """
    return duration_fwhm / shape_t0_factor(shape)


def dispersion_length(duration_t0: float, beta2: float) -> float:
    """L_D = T0^2 / |beta2| ([1]). [m]  (duration_t0 [s], beta2 [s^2/m])

    References
    ----------
    G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., Academic Press (2019), ch. 3-5 [from memory].
    """
    return duration_t0**2 / np.abs(beta2)


def nonlinear_length(gamma: float, peak_power: float) -> float:
    """L_NL = 1 / (gamma P0) ([1]). [m]  (gamma [1/(W m)], peak_power [W])

    References
    ----------
    G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., Academic Press (2019), ch. 3-5 [from memory].
    """
    return 1.0 / (gamma * peak_power)


def soliton_order(duration_t0: float, beta2: float, gamma: float, peak_power: float) -> float:
    """N = sqrt(L_D / L_NL) = sqrt(gamma P0 T0^2 / |beta2|) ([1]). [-]

    (duration_t0 [s], beta2 [s^2/m], gamma [1/(W m)], peak_power [W])

    References
    ----------
    G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., Academic Press (2019), ch. 3-5 [from memory].
    """
    return np.sqrt(dispersion_length(duration_t0, beta2) / nonlinear_length(gamma, peak_power))


def fission_length(duration_t0: float, beta2: float, gamma: float, peak_power: float) -> float:
    """Soliton fission length L_fiss ~ L_D / N ([2]). [m]  (units as :func:`soliton_order`)

    References
    ----------
    J. M. Dudley, G. Genty and S. Coen, Rev. Mod. Phys. 78, 1135 (2006) [from memory].
    """
    order = soliton_order(duration_t0, beta2, gamma, peak_power)
    return dispersion_length(duration_t0, beta2) / order


def effective_length(length: float | np.ndarray, alpha_field: float | np.ndarray) -> np.ndarray:
    """L_eff = (1 - exp(-2 alpha L)) / (2 alpha), the power-loss weighted length ([1]).

    Parameters
    ----------
    length : float or ndarray
        Fiber length L. [m]
    alpha_field : float or ndarray
        FIELD attenuation alpha (power loss coefficient 2 alpha); 0 gives L. [1/m]

    Returns
    -------
    ndarray
        Effective length. [m]

    References
    ----------
    G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., Academic Press (2019), ch. 3-5 [from memory].
    """
    power_loss = 2.0 * np.asarray(alpha_field, dtype=float)
    length = np.asarray(length, dtype=float)
    safe = np.where(power_loss == 0.0, 1.0, power_loss)
    return np.where(power_loss == 0.0, length, -np.expm1(-safe * length) / safe)


def transmission(waveguide: Waveguide, omega: float | np.ndarray) -> np.ndarray:
    """Power transmission exp(-2 alpha(omega) L) of the whole fiber. [-]  (omega [rad/s])

    References
    ----------
    none: definition of the field attenuation (common practice, no source)
    """
    return np.exp(-2.0 * waveguide.attenuation(np.asarray(omega, dtype=float)) * waveguide.length)


def nonlinear_phase(gamma: float, peak_power: float, effective_length: float) -> float:
    """Peak SPM phase phi_max = gamma P0 L_eff ([1]). [rad]

    (gamma [1/(W m)], peak_power [W], effective_length [m])

    References
    ----------
    G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., Academic Press (2019), ch. 3-5 [from memory].
    """
    return gamma * peak_power * effective_length


def spm_broadening_factor(phi_max: float | np.ndarray) -> np.ndarray:
    """RMS spectral broadening of an unchirped Gaussian by SPM: sqrt(1 + (4/(3 sqrt 3)) phi^2).

    Parameters
    ----------
    phi_max : float or ndarray
        Peak nonlinear phase. [rad]

    Returns
    -------
    ndarray
        Delta omega_rms / Delta omega_rms,0 ([3], from memory; dispersion neglected). [-]

    References
    ----------
    S. C. Pinault and M. J. Potasek, J. Opt. Soc. Am. B 2, 1318 (1985) [from memory: formula and
    citation not checked].
    """
    phi = np.asarray(phi_max, dtype=float)
    return np.sqrt(1.0 + 4.0 / (3.0 * np.sqrt(3.0)) * phi**2)


def dispersive_wave_frequency(waveguide: Waveguide, omega_pump: float, soliton_power: float,
                              gamma: float, omega_max: float) -> float | None:
    """Angular frequency of the resonant dispersive wave phase-matched with a soliton at the pump.

    Parameters
    ----------
    waveguide : Waveguide
        Fiber model; its ``propagation_constant`` gives beta(omega). [rad/m]
    omega_pump : float
        Pump (soliton) angular frequency; the dispersion there must be anomalous. [rad/s]
    soliton_power : float
        Soliton peak power for the nonlinear phase term. [W]
    gamma : float
        Nonlinear coefficient at the pump. [1/(W m)]
    omega_max : float
        Highest angular frequency searched. [rad/s]

    Returns
    -------
    float or None
        The lowest omega above the pump with
        beta(omega) - beta(omega_p) - beta1 (omega - omega_p) - gamma P / 2 = 0; None when the
        pump is not anomalous or no such frequency lies below ``omega_max``. [rad/s]

    Notes
    -----
    The phase-matching condition of the soliton (moving at the pump's group velocity with the
    nonlinear wavenumber gamma P / 2) and a linear wave, with the full beta(omega) of the
    waveguide, as in Joly et al. [1]. Searched on ``ZDW_SEARCH_POINTS`` samples (non-finite
    beta skipped) and refined by Brent's method
    (:func:`~hcfplan.numerics.optimize.root_bracketed`).

    References
    ----------
    .. [1] N. Y. Joly, J. Nold, W. Chang, P. Hölzer, A. Nazarkin, G. K. L. Wong, F. Biancalana
           and P. St.J. Russell, "Bright spatially coherent wavelength-tunable deep-UV laser
           source using an Ar-filled photonic crystal fiber," Phys. Rev. Lett. 106, 203901
           (2011) [from memory].
    """
    betas = derivative_table(waveguide.propagation_constant, float(omega_pump), 2)
    if not betas[2] < 0 or not omega_max > omega_pump:
        return None
    offset = 0.5 * gamma * soliton_power

    def mismatch(omega):
        omega = np.asarray(omega, dtype=float)
        with np.errstate(all="ignore"):
            beta = np.asarray(waveguide.propagation_constant(omega), dtype=float)
        return beta - betas[0] - betas[1] * (omega - omega_pump) - offset

    omega = np.linspace(omega_pump * 1.02, omega_max, ZDW_SEARCH_POINTS)
    values = mismatch(omega)
    for k in range(omega.size - 1):
        a, b = values[k], values[k + 1]
        if np.isfinite(a) and np.isfinite(b) and a < 0 <= b:
            return root_bracketed(lambda w: float(mismatch(np.array([w]))[0]),
                                  omega[k], omega[k + 1])
    return None
