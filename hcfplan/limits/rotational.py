"""The Kerr coefficient that sets self-focusing in a molecular gas: electronic plus the delayed
rotational part reached at the pulse peak.

In N2, O2 and air the index change has an instantaneous electronic part :math:`n_2 I(t)` and a
delayed rotational part :math:`\\delta n_{rot}(t) = \\int_0^\\infty R(\\tau) I(t-\\tau)\\,d\\tau`
(:func:`hcfplan.propagation.raman.rotational_raman_response`). A pulse long against the
rotational response sees the sum :math:`n_2 + n_{2,rot}`, a pulse much shorter only
:math:`n_2`. :func:`self_focusing_n2` returns the largest total index change over the pulse per
unit peak intensity, which moves between the two limits with the pulse duration; the critical
power for self-focusing uses it (:mod:`hcfplan.limits.beam`).

References
----------
.. [1] J. K. Wahlstrand, Y.-H. Cheng and H. M. Milchberg, "High field optical nonlinearity and
       the Kramers-Kronig relations," Phys. Rev. A, vol. 85, 043820, 2012,
       doi:10.1103/PhysRevA.85.043820 (N2: instantaneous n2 = 7.4e-24 m^2/W, effective long-pulse
       value n2/0.23). [title from memory]
.. [2] S. Zahedpour, J. K. Wahlstrand and H. M. Milchberg, "Measurement of the nonlinear
       refractive index of air constituents at mid-infrared wavelengths," Opt. Lett., vol. 40,
       pp. 5794-5797, 2015 (N2: n2,rot = 24e-24 m^2/W for long pulses). [title from memory]
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.errors import ConfigError

#: Pulses longer than this use the long-pulse sum n2 + n2_rot (the rotational response of N2
#: and O2 has decayed into its adiabatic part well before; common practice, no source). [s]
LONG_PULSE = 20e-12
#: Time step of the convolution: at most this, and at most FWHM / 50. [s]
MAX_STEP = 2e-15
#: The pulse is sampled over +- this many FWHM.
HALF_SPAN_FWHM = 4.0


def raman_records(medium) -> list:
    """(species with T2 scaled to the fill pressure, molecule density [1/m^3]) of every
    Raman-active molecule of a gas medium (T2 is collisional, so it scales as 1/pressure)."""
    import dataclasses

    found = []
    for component in medium.components:
        for sp in component.table.raman:
            t2 = sp.dephasing_time * sp.dephasing_reference_pressure / medium.fill.pressure
            found.append((dataclasses.replace(sp, dephasing_time=t2),
                          component.number_density * sp.mole_fraction))
    return found


def rotational_n2(medium) -> float:
    """Long-pulse rotational Kerr coefficient of a gas medium (0 for atomic gases). [m^2/W]

    Parameters
    ----------
    medium : GasMedium
        Medium of :func:`hcfplan.materials.gases.gas_medium`.

    Returns
    -------
    float
        Sum of :func:`hcfplan.propagation.raman.rotational_kerr_n2` over the Raman records of
        its components, at their molecule densities and the fill temperature. [m^2/W]

    References
    ----------
    .. [1] J. K. Wahlstrand, Y.-H. Cheng and H. M. Milchberg, Phys. Rev. A 85, 043820 (2012).
    """
    from hcfplan.propagation.raman import rotational_kerr_n2

    return float(sum(rotational_kerr_n2(sp, density, medium.fill.temperature)
                     for sp, density in raman_records(medium)))


def self_focusing_n2(medium, duration_fwhm: float, shape: str) -> float:
    """Largest total nonlinear index over a pulse per unit peak intensity. [m^2/W]

    Parameters
    ----------
    medium : GasMedium
        The fill (``n2`` is its instantaneous electronic part).
    duration_fwhm : float
        Intensity FWHM of the (transform-limited) pulse. [s]
    shape : {"sech2", "gaussian"}
        Temporal profile.

    Returns
    -------
    float
        :math:`\\max_t [n_2 I(t) + \\delta n_{rot}(t)]/I_0`; ``medium.n2`` for a gas without
        rotational Raman records; :math:`n_2 + n_{2,rot}` for pulses longer than
        :data:`LONG_PULSE`. [m^2/W]

    Notes
    -----
    The convolution is evaluated on a uniform grid (step :data:`MAX_STEP` or FWHM/50, whichever
    is smaller, over +-4 FWHM) with the rotational response of
    :func:`hcfplan.propagation.raman.rotational_raman_response`. The peak of the index change
    lags the intensity peak; taking its maximum is an upper estimate of the Kerr lens for the
    self-focusing check. Published checks (tests): N2 long pulse :math:`n_2 + n_{2,rot}`
    against 3.2e-23 m^2/W ([1]: n2/0.23) and 7.9e-24 + 24e-24 ([2]).

    References
    ----------
    .. [1] J. K. Wahlstrand, Y.-H. Cheng and H. M. Milchberg, Phys. Rev. A 85, 043820 (2012).
    .. [2] S. Zahedpour, J. K. Wahlstrand and H. M. Milchberg, Opt. Lett. 40, 5794 (2015).
    """
    from hcfplan.propagation.raman import rotational_raman_response
    from hcfplan.pulse.shapes import intensity_envelope

    if not (math.isfinite(duration_fwhm) and duration_fwhm > 0):
        raise ConfigError(f"duration_fwhm = {duration_fwhm} s: must be finite and > 0")
    records = raman_records(medium)
    if not records:
        return float(medium.n2)
    if duration_fwhm > LONG_PULSE:
        return float(medium.n2) + rotational_n2(medium)
    dt = min(MAX_STEP, duration_fwhm / 50)
    count = int(math.ceil(2 * HALF_SPAN_FWHM * duration_fwhm / dt)) + 1
    t = (np.arange(count) - (count - 1) / 2) * dt
    intensity = intensity_envelope(shape, t / duration_fwhm)
    delay = np.arange(count) * dt
    response = sum(rotational_raman_response(delay, sp, density, medium.fill.temperature)
                   for sp, density in records)
    from scipy.signal import fftconvolve

    rotational = fftconvolve(intensity, response)[:count] * dt  # causal: history within span
    return float(np.max(medium.n2 * intensity + rotational))
