"""Average power and heat in the gas: what each pulse leaves behind and whether it is gone
before the next pulse arrives.

Each pulse deposits heat in the gas of the core: the energy spent on ionisation
(:func:`ionization_heat`) and the energy left in the molecular rotation by the delayed Raman
response (:func:`rotational_heat_per_length`). The heat diffuses to the wall (the glass, far
larger in heat capacity, taken at a fixed temperature); the slowest radial mode decays with
:func:`thermal_relaxation_time`. When the pulse spacing is not several of those times the index
change left by one pulse is still there when the next arrives: long-lived index changes of this
kind were observed in gas-filled single-ring hollow-core fibers at high repetition rates [1].

References
----------
.. [1] J. R. Koehler, F. Köttig, B. M. Trabold, F. Tani and P. St.J. Russell, "Long-lived
       refractive-index changes induced by femtosecond ionization in gas-filled single-ring
       photonic-crystal fibers," 2018 (authors, year and title from memory; the journal is
       given as Phys. Rev. Lett. in one account and as Phys. Rev. Applied 10, 064020 in
       another, both from memory: check before citing).
.. [2] H. S. Carslaw and J. C. Jaeger, *Conduction of Heat in Solids*, 2nd ed., Oxford
       University Press, 1959, Sec. 7.6 (infinite cylinder with the surface at a fixed
       temperature) [section from memory].
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError

#: First zero of J0: the slowest radial heat-diffusion mode of a cylinder with a cold wall [2].
J0_FIRST_ZERO = 2.404825557695773
#: The gas counts as relaxed when the pulse spacing is at least this many relaxation times
#: (the slowest mode then decays to e^-3 = 5 %; common practice, no source).
RELAXATION_TIMES_BETWEEN_PULSES = 3.0


def _check(name: str, value, unit: str, *, allow_zero: bool = False) -> None:
    ok = math.isfinite(value) and (value >= 0 if allow_zero else value > 0)
    if not ok:
        raise ConfigError(f"{name} = {value} {unit}: must be finite and "
                          f"{'>= 0' if allow_zero else '> 0'}")


def average_power(pulse_energy: float, repetition_rate: float) -> float:
    """Average power E f of a pulse train. [W]

    Parameters
    ----------
    pulse_energy : float
        Energy per pulse. [J]
    repetition_rate : float
        Pulses per second. [Hz]

    References
    ----------
    none: definition.
    """
    _check("pulse_energy", pulse_energy, "J", allow_zero=True)
    _check("repetition_rate", repetition_rate, "Hz")
    return pulse_energy * repetition_rate


def thermal_relaxation_time(core_radius: float, diffusivity: float) -> float:
    """Decay time of the slowest radial heat-diffusion mode of the gas in a core. [s]

    Parameters
    ----------
    core_radius : float
        Core radius a. [m]
    diffusivity : float
        Thermal diffusivity D = kappa/(rho c_p) of the gas. [m^2/s]

    Returns
    -------
    float
        :math:`\\tau = a^2/(j_{01}^2 D)`, j01 = 2.4048 the first zero of J0. [s]

    Notes
    -----
    A temperature profile in a cylinder whose wall stays at a fixed temperature decays as a
    sum of :math:`J_0(j_{0n} r/a)\\,e^{-D j_{0n}^2 t/a^2}`; the n = 1 term is the slowest
    (Sec. 7.6 of [1]). Conduction only: gas flow, convection and the heating of the wall are
    left out.

    References
    ----------
    .. [1] H. S. Carslaw and J. C. Jaeger, *Conduction of Heat in Solids*, 2nd ed., Oxford
           University Press, 1959, Sec. 7.6 [section from memory].
    """
    _check("core_radius", core_radius, "m")
    _check("diffusivity", diffusivity, "m^2/s")
    return core_radius**2 / (J0_FIRST_ZERO**2 * diffusivity)


def relaxes_between_pulses(relaxation_time: float, repetition_rate: float) -> bool:
    """Whether the pulse spacing 1/f is at least 3 thermal relaxation times.

    Parameters
    ----------
    relaxation_time : float
        From :func:`thermal_relaxation_time`. [s]
    repetition_rate : float
        Pulses per second. [Hz]

    References
    ----------
    none: the factor 3 is common practice, no source; the effect it guards against was
    observed by J. R. Koehler et al. (2018) [from memory].
    """
    _check("relaxation_time", relaxation_time, "s", allow_zero=True)
    _check("repetition_rate", repetition_rate, "Hz")
    return RELAXATION_TIMES_BETWEEN_PULSES * relaxation_time * repetition_rate <= 1.0


def ionization_heat(ionization_potential, number_density, fraction, volume: float):
    """Energy spent on ionisation in a volume: I_p N f V. [J]

    Parameters
    ----------
    ionization_potential : float or ndarray
        Ionisation potential of each species. [J]
    number_density : float or ndarray
        Number density of each species. [1/m^3]
    fraction : float or ndarray
        Fraction of that species ionised by the pulse. [-]
    volume : float
        Volume over which the fraction holds. [m^3]

    Returns
    -------
    float
        Sum over the species. The free electrons' kinetic energy is not included (a lower
        estimate of the heat of this channel) and all of I_p is taken to end as heat on
        recombination (an upper estimate): the energy balance of the plasma term of the
        propagation model (:mod:`hcfplan.propagation.operators`). [J]

    References
    ----------
    M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999) (the I_p loss per electron).
    """
    _check("volume", volume, "m^3", allow_zero=True)
    terms = (np.asarray(ionization_potential, dtype=float) * np.asarray(number_density, dtype=float)
             * np.asarray(fraction, dtype=float))
    return float(np.sum(terms) * volume)


def intensity_spectrum(shape: str, omega, duration_fwhm: float) -> np.ndarray:
    """Fourier transform :math:`\\int i(t) e^{i\\Omega t} dt` of the unit-peak intensity
    envelope of a sech^2 or Gaussian pulse. [s]

    Parameters
    ----------
    shape : {"sech2", "gaussian"}
        Temporal profile.
    omega : float or ndarray
        Angular frequency Omega. [rad/s]
    duration_fwhm : float
        Intensity FWHM tau. [s]

    Returns
    -------
    ndarray
        Gaussian :math:`\\tau\\sqrt{\\pi/(4\\ln 2)}\\,e^{-\\Omega^2\\tau^2/(16\\ln 2)}`;
        sech^2 :math:`\\pi\\Omega T^2/\\sinh(\\pi\\Omega T/2)` with
        :math:`T = \\tau/(2\\ln(1+\\sqrt2))` (2T at Omega = 0). [s]

    References
    ----------
    I. S. Gradshteyn and I. M. Ryzhik, *Table of Integrals, Series, and Products*, 7th ed.,
    Academic Press, 2007, 3.323.2 (Gaussian) and 3.986 (sech^2 by parts) [numbers from memory];
    checked against the numerical transform in the tests.
    """
    _check("duration_fwhm", duration_fwhm, "s")
    w = np.abs(np.asarray(omega, dtype=float))
    if shape == "gaussian":
        return duration_fwhm * math.sqrt(math.pi / (4 * math.log(2))) * np.exp(
            -(w * duration_fwhm) ** 2 / (16 * math.log(2)))
    if shape == "sech2":
        t0 = duration_fwhm / (2 * math.log(1 + math.sqrt(2)))
        x = np.maximum(math.pi * w * t0 / 2, 1e-300)
        with np.errstate(over="ignore"):
            return np.where(x < 700, 2 * t0 * x / np.sinh(np.minimum(x, 700)), 0.0)
    raise ConfigError(f"pulse shape = {shape!r}: unknown; allowed are gaussian, sech2")


def rotational_heat_per_length(records, temperature: float, peak_power: float,
                               duration_fwhm: float, shape: str, effective_area: float) -> float:
    """Energy per unit length left in the molecular rotation by one pulse. [J/m]

    Parameters
    ----------
    records : list of (RotationalRamanSpecies, float)
        Raman-active molecules with their densities [1/m^3]
        (:func:`hcfplan.limits.rotational.raman_records`).
    temperature : float
        Gas temperature. [K]
    peak_power : float
        Peak power of the pulse in the mode. [W]
    duration_fwhm : float
        Intensity FWHM. [s]
    shape : {"sech2", "gaussian"}
        Temporal profile.
    effective_area : float
        Nonlinear effective area :math:`(\\int I\\,dA)^2/\\int I^2 dA` of the mode. [m^2]

    Returns
    -------
    float
        :math:`\\frac{P_0^2}{2cA_{eff}}\\sum_J K a_J \\omega_J |\\tilde\\imath(\\omega_J)|^2`. [J/m]

    Notes
    -----
    The work the field does on the delayed index change, per volume,
    :math:`q = (1/c)\\int I\\,\\partial_t\\delta n_{rot}\\,dt`, equals the energy the pulse loses
    to its Raman red shift. With :math:`\\delta n_{rot} = \\int R I` and
    :math:`R = K\\sum_J a_J \\sin(\\omega_J\\tau)e^{-\\tau/T_2}`
    (:mod:`hcfplan.propagation.raman`, :math:`K = 4\\pi^2N\\Delta\\alpha^2/c`), Parseval gives
    :math:`q = (1/2\\pi c)\\int \\Omega\\,\\mathrm{Im}\\hat R(\\Omega)
    |\\tilde I(\\Omega)|^2 d\\Omega`,
    and for :math:`T_2 \\gg` the pulse each line contributes
    :math:`K a_J\\omega_J|\\tilde I(\\omega_J)|^2/(2c)`. Integrating :math:`I^2` over the mode
    gives :math:`P_0^2/A_{eff}`. Linear response (perturbative alignment), one pulse, the
    input pulse shape (broadening and compression in the fiber change it); checked in the
    tests against the time-domain integral.

    References
    ----------
    J. R. Peñano et al., Phys. Rev. E 68, 056502 (2003) [from memory] (the response R).
    """
    from hcfplan.propagation.raman import rotational_lines

    _check("peak_power", peak_power, "W", allow_zero=True)
    _check("effective_area", effective_area, "m^2")
    total = 0.0
    for species, density in records:
        omega, amplitude = rotational_lines(species, temperature)
        k = 4 * math.pi**2 * density * species.polarizability_anisotropy**2 / c
        spectrum = intensity_spectrum(shape, omega, duration_fwhm)
        total += k * float(np.sum(amplitude * omega * spectrum**2)) / (2 * c)
    return total * peak_power**2 / effective_area
