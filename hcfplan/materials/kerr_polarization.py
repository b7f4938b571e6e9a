"""The Kerr response of an isotropic gas for linear and circular polarisation.

For a field of one circular polarisation the third-order index change differs from that of a
linear field of the same intensity, by a factor that depends on the mechanism:

* electronic (nonresonant) response, :math:`B/A = 1` in Maker and Terhune's notation: the
  circular n2 is 2/3 of the linear one;
* molecular orientation (the rotational Raman response of N2, O2, air), :math:`B/A = 6`:
  the circular value is 1/4 of the linear one.

In the notation of [1], an isotropic medium has
:math:`\\mathbf P = A(\\mathbf E\\cdot\\mathbf E^*)\\mathbf E
+ \\tfrac12 B(\\mathbf E\\cdot\\mathbf E)\\mathbf E^*`; a linear field sees :math:`A + B/2`,
a circular one :math:`A`, so the ratio is
:math:`1/(1 + B/(2A))` (Sec. 4.2 and its table of B/A for the mechanisms of [1]; the section
number and the table values 1 and 6 are from memory).

References
----------
.. [1] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, Sec. 4.2 (tensor nature
       of the third-order susceptibility; nonlinear refraction for circular polarisation)
       [from memory].
.. [2] P. D. Maker and R. W. Terhune, "Study of optical effects due to an induced polarization
       third order in the electric field strength," Phys. Rev., vol. 137, no. 3A,
       pp. A801-A818, 1965, doi:10.1103/PhysRev.137.A801 [from memory].
"""

from __future__ import annotations

import dataclasses
import math
from typing import Literal

from hcfplan.errors import ConfigError

Polarization = Literal["linear", "circular"]

#: B/A of [1] for the nonresonant electronic response and for molecular orientation.
ELECTRONIC_B_OVER_A = 1.0
ORIENTATIONAL_B_OVER_A = 6.0


def circular_kerr_ratio(b_over_a: float) -> float:
    """n2(circular) / n2(linear) of an isotropic medium with the given B/A [1].

    Parameters
    ----------
    b_over_a : float
        Ratio B/A of the two independent third-order coefficients (>= 0). [-]

    Returns
    -------
    float
        :math:`1/(1 + B/(2A))`: 2/3 for the electronic response (B/A = 1), 1/4 for molecular
        orientation (B/A = 6). [-]

    References
    ----------
    .. [1] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, Sec. 4.2
           [from memory].
    """
    if not b_over_a >= 0:
        raise ConfigError(f"B/A = {b_over_a}: must be >= 0")
    return 1.0 / (1.0 + 0.5 * b_over_a)


def kerr_polarization_factors(polarization: Polarization) -> tuple[float, float]:
    """(electronic factor, rotational factor) that multiply the linear-polarisation n2.

    Parameters
    ----------
    polarization : {"linear", "circular"}
        Polarisation of the pump.

    Returns
    -------
    (float, float)
        (1, 1) for linear; (2/3, 1/4) for circular (:func:`circular_kerr_ratio`). [-]

    References
    ----------
    .. [1] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, Sec. 4.2
           [from memory].
    """
    if polarization == "linear":
        return 1.0, 1.0
    if polarization == "circular":
        return (circular_kerr_ratio(ELECTRONIC_B_OVER_A),
                circular_kerr_ratio(ORIENTATIONAL_B_OVER_A))
    raise ConfigError(f"laser.polarization = {polarization!r}: unknown; allowed: linear, circular")


def polarized_medium(medium, polarization: Polarization):
    """The gas medium as a pump of the given polarisation sees it.

    Parameters
    ----------
    medium : GasMedium
        Medium of :func:`hcfplan.materials.gases.gas_medium` (linear-polarisation data).
    polarization : {"linear", "circular"}
        Polarisation of the pump.

    Returns
    -------
    GasMedium
        ``medium`` itself for linear polarisation; for circular a copy whose electronic n2 is
        scaled by 2/3 and whose rotational Raman records carry the polarisability anisotropy
        scaled by :math:`\\sqrt{1/4} = 1/2` (the rotational response is proportional to
        :math:`\\Delta\\alpha^2`, :mod:`hcfplan.propagation.raman`, so its n2 scales by 1/4).

    References
    ----------
    .. [1] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, Sec. 4.2
           [from memory].
    """
    electronic, rotational = kerr_polarization_factors(polarization)
    if polarization == "linear":
        return medium
    scale = math.sqrt(rotational)
    components = tuple(
        dataclasses.replace(k, table=dataclasses.replace(k.table, raman=tuple(
            dataclasses.replace(sp, polarizability_anisotropy=sp.polarizability_anisotropy * scale)
            for sp in k.table.raman)))
        for k in medium.components)
    return dataclasses.replace(medium, components=components, n2=medium.n2 * electronic)
