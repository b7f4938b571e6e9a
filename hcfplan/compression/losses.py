"""Losses of the elements after the fiber: window surfaces, window absorption, mirror bounces.

The phases of :mod:`hcfplan.compression.elements` conserve energy; the losses here multiply
the power spectrum by a constant (flat across the band: the Fresnel reflectance of a window
and the reflectivity of a mirror vary little over the band of one pulse, an approximation),
so they scale the energy and the peak power of the compressed pulse and leave its shape.
:func:`with_throughput` applies them to a :class:`~hcfplan.compression.compressor.
CompressionResult`.

References
----------
.. [1] M. Born and E. Wolf, *Principles of Optics*, 7th ed., Cambridge University Press, 1999,
       Sec. 1.5.3 (Fresnel formulae; reflectivity at normal incidence ((n-1)/(n+1))^2)
       [section number from memory].
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from hcfplan.errors import ConfigError


def fresnel_reflectance(refractive_index: float) -> float:
    """Power reflectance of one uncoated surface at normal incidence, ((n-1)/(n+1))^2 [1].

    Parameters
    ----------
    refractive_index : float
        Index of the plate against vacuum (the gas or air index, within 3e-4 of 1 here, is
        left out). [-]

    Returns
    -------
    float
        Reflectance of the surface. [-]

    References
    ----------
    .. [1] M. Born and E. Wolf, *Principles of Optics*, 7th ed., Cambridge University Press,
           1999, Sec. 1.5.3 [section number from memory].
    """
    if not (math.isfinite(refractive_index) and refractive_index >= 1):
        raise ConfigError(f"refractive index = {refractive_index}: must be finite and >= 1")
    return ((refractive_index - 1) / (refractive_index + 1)) ** 2


def window_transmission(refractive_index: float, thickness: float, *,
                        coated: bool = False, absorption: float = 0.0) -> float:
    """Power transmission of a plane window at normal incidence. [-]

    Parameters
    ----------
    refractive_index : float
        Index of the window at the pump. [-]
    thickness : float
        Thickness. [m]
    coated : bool
        True for anti-reflection coated surfaces (their residual reflection is taken as 0).
    absorption : float
        Bulk power absorption coefficient (0: none modelled). [1/m]

    Returns
    -------
    float
        :math:`T = (1-R)^2 a/(1 - R^2 a^2)` with :math:`a = e^{-\\alpha d}`: both surfaces and
        the incoherent sum of the multiple reflections (:math:`(1-R)/(1+R)` without
        absorption). [-]

    References
    ----------
    .. [1] M. Born and E. Wolf, *Principles of Optics*, 7th ed., Cambridge University Press,
           1999, Sec. 1.5.3 (R at normal incidence); the incoherent multiple-reflection sum is a
           geometric series [from memory for the section].
    """
    if not (math.isfinite(thickness) and thickness >= 0):
        raise ConfigError(f"window thickness = {thickness} m: must be finite and >= 0")
    if not (math.isfinite(absorption) and absorption >= 0):
        raise ConfigError(f"window absorption = {absorption} 1/m: must be finite and >= 0")
    r = 0.0 if coated else fresnel_reflectance(refractive_index)
    a = math.exp(-absorption * thickness)
    return (1 - r) ** 2 * a / (1 - r**2 * a**2)


def mirror_throughput(reflectivity: float, bounces: int) -> float:
    """Power left after ``bounces`` reflections of reflectivity R: R^n. [-]

    References
    ----------
    none: definition.
    """
    if not (0 < reflectivity <= 1):
        raise ConfigError(f"compressor.mirror_reflectivity = {reflectivity}: must be in (0, 1]")
    if bounces < 0:
        raise ConfigError(f"bounces = {bounces}: must be >= 0")
    return reflectivity**bounces


def _scaled_metrics(metrics, factor: float):
    return dataclasses.replace(
        metrics, energy=metrics.energy * factor, peak_power=metrics.peak_power * factor,
        transform_limited_peak_power=metrics.transform_limited_peak_power * factor,
        peak_power_gain=metrics.peak_power_gain * factor,
        pre_pulse_energy=metrics.pre_pulse_energy * factor,
        post_pulse_energy=metrics.post_pulse_energy * factor)


def with_throughput(result, fixed_transmission: float, reflectivity: float):
    """A compression result with the losses of the windows and mirrors applied.

    Parameters
    ----------
    result : CompressionResult
        From :func:`hcfplan.compression.compressor.optimize_bounces` (lossless elements).
    fixed_transmission : float
        Power transmission of the fixed elements (exit window; the air path is lossless). [-]
    reflectivity : float
        Power reflectivity per mirror bounce. [-]

    Returns
    -------
    CompressionResult
        Fields and spectra scaled by :math:`\\sqrt{T}`, energies and peak powers by
        :math:`T = T_{fixed} R^n` (n the chosen bounce count); the peak power of each candidate
        count k by :math:`T_{fixed} R^k`; the references by the same T as the chosen pulse.
        ``input_energy`` (before the compressor) is unchanged. The bounce count stays the one
        chosen without losses: with R close to 1 the optimum moves by a bounce at most.

    References
    ----------
    none: scaling by the transmissions of :func:`window_transmission` and
    :func:`mirror_throughput`.
    """
    if not 0 < fixed_transmission <= 1:
        raise ConfigError(f"fixed transmission = {fixed_transmission}: must be in (0, 1]")
    total = fixed_transmission * mirror_throughput(reflectivity, result.bounces)
    root = math.sqrt(total)
    per_count = fixed_transmission * reflectivity ** np.asarray(result.bounce_counts, dtype=float)
    trimmed = result.peak_power_vs_bounces_trimmed

    def ref(pulse):
        return dataclasses.replace(pulse, field_t=pulse.field_t * root,
                                   metrics=_scaled_metrics(pulse.metrics, total))

    return dataclasses.replace(
        result, field_t=result.field_t * root, spectrum=result.spectrum * root,
        metrics=_scaled_metrics(result.metrics, total),
        peak_power_vs_bounces=result.peak_power_vs_bounces * per_count,
        peak_power_vs_bounces_trimmed=None if trimmed is None else trimmed * per_count,
        quadratic=ref(result.quadratic), quadratic_cubic=ref(result.quadratic_cubic),
        transform_limit=ref(result.transform_limit))
