"""The ionising components of a gas fill, as the plasma terms of the solver take them.

:func:`ionizing_gas` turns a gas medium and a rate model into an :class:`IonizingGas`: one
:class:`IonizingSpecies` (neutral density, ionisation potential, rate table) per component
that has ionisation data, plus notes for the result when ionisation has to be left out. The
plasma terms themselves (Geissler et al. [1], envelope form of Saleh et al. [2]) are in
:mod:`hcfplan.propagation.operators`; the rates (PPT, ADK) in :mod:`hcfplan.ionization.rates`.

References
----------
.. [1] M. Geissler, G. Tempea, A. Scrinzi, M. Schnürer, F. Krausz and T. Brabec, "Light
       propagation in field-ionizing media: extreme nonlinear optics," Phys. Rev. Lett.,
       vol. 83, no. 15, pp. 2930-2933, 1999, doi:10.1103/PhysRevLett.83.2930.
.. [2] M. F. Saleh, W. Chang, P. Hölzer, A. Nazarkin, J. C. Travers, N. Y. Joly,
       P. St.J. Russell and F. Biancalana, "Theory of photoionization-induced blueshift of
       ultrashort solitons in gas-filled hollow-core photonic crystal fibers," Phys. Rev. Lett.,
       vol. 107, 203902, 2011, doi:10.1103/PhysRevLett.107.203902. [from memory]
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

from hcfplan.constants import c
from hcfplan.numerics.grid import Grid

#: Intensity range of the ionisation-rate tables. [W/m^2] (1e11 to 1e17 W/cm^2)
RATE_TABLE_RANGE = (1e15, 1e21)


@dataclass(frozen=True)
class IonizingSpecies:
    """One ionising gas component of the plasma terms.

    Attributes
    ----------
    number_density : float
        Density of the neutral species. [1/m^3]
    potential : float
        Ionisation potential Ip. [J]
    rate : RateTable
        Table of :mod:`hcfplan.ionization.tables`: intensity [W/m^2] -> rate [1/s].
    """

    number_density: float
    potential: float
    rate: object


@dataclass(frozen=True)
class IonizingGas:
    """The ionising components of a fill for one run (empty when ionisation is off).

    Attributes
    ----------
    model : str or None
        Rate model key of :data:`hcfplan.ionization.rates.RATE_MODELS`, None when off.
    species : tuple of IonizingSpecies
        One entry per gas component with ionisation data.
    notes : tuple of str
        Why ionisation was left out, when it was (for the result's warnings).
    """

    model: str | None = None
    species: tuple[IonizingSpecies, ...] = ()
    notes: tuple[str, ...] = ()


def ionizing_gas(grid: Grid, waveguide, gas, model: str | None) -> IonizingGas:
    """Rate tables and densities of the ionising components of ``gas`` for the pump of ``grid``.

    Parameters
    ----------
    grid : Grid
        The run's grid; its ``omega_pump`` sets the wavelength of the rate tables. [rad/s]
    waveguide : Waveguide
        Fiber model; needs a finite ``peak_intensity_area`` [m^2] for ionisation to be modelled.
    gas : GasMedium or None
        The fill (components with ``number_density`` [1/m^3] and table ``ionization`` data).
    model : {"ppt", "adk"} or None
        Rate model; None (or no gas) gives an empty :class:`IonizingGas`.

    Returns
    -------
    IonizingGas

    Raises
    ------
    ConfigError
        For an unknown ``model`` (the message lists the models).

    References
    ----------
    Plasma terms of M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999), in the envelope
    form of M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory] (module
    References [1], [2]); the rates cite their own sources in :mod:`hcfplan.ionization.rates`.
    """
    if gas is None or model is None:
        return IonizingGas()
    from hcfplan.ionization.rates import rate_function

    rate_function(model)  # ConfigError listing the models if unknown
    area = float(getattr(waveguide, "peak_intensity_area", math.nan))
    if not (math.isfinite(area) and area > 0):
        return IonizingGas(model, (), ("ionisation ignored: the waveguide has no "
                                       "peak_intensity_area",))
    wavelength = 2 * math.pi * c / grid.omega_pump  # the rates at the pump (grid.py conv. 1)
    found = []
    for component in gas.components:
        ion = getattr(component.table, "ionization", None)
        if ion is None:
            continue
        table = rate_table(model, wavelength, ion.potential, ion.l, ion.m, ion.charge)
        density = component.number_density * ion.mole_fraction
        found.append(IonizingSpecies(density, ion.potential, table))
    return IonizingGas(model, tuple(found), ())


@functools.lru_cache(maxsize=32)
def rate_table(model: str, wavelength: float, potential: float, l: int, m: int,  # noqa: E741
               charge: int):
    """Rate table over :data:`RATE_TABLE_RANGE` of one species (cached in memory and on disk).

    Pure, scalar inputs: cached in memory here and in hcfplan's cache folder by
    :func:`hcfplan.ionization.tables.cached_rate_table` (a table costs 1-3 s to compute).

    Parameters
    ----------
    model : {"ppt", "adk"}
        Rate model key.
    wavelength : float
        Pump wavelength. [m]
    potential : float
        Ionisation potential. [J]
    l, m : int
        Orbital and magnetic quantum numbers of the ionised state.
    charge : int
        Charge of the ion left behind.

    Returns
    -------
    RateTable
        Intensity [W/m^2] -> rate [1/s] (:mod:`hcfplan.ionization.tables`).

    References
    ----------
    none: caching helper (the rate models cite their sources in
    :mod:`hcfplan.ionization.rates`).
    """
    from hcfplan.ionization.tables import cached_rate_table

    return cached_rate_table(model, wavelength, potential, l, m, charge, *RATE_TABLE_RANGE)
