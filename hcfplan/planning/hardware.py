"""The lab hardware around the fiber as the chain sees it: the entrance window's phase on the
input pulse, the transmissions of both windows and the compressor's throughput.

Thin compositions of :mod:`hcfplan.compression.elements`, :mod:`hcfplan.compression.losses`
and :mod:`hcfplan.materials.solids`; no I/O.
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.constants import c
from hcfplan.planning.validity import quiet_validity

#: Note on window absorption, shown with the throughput (the solid table has no absorption).
ABSORPTION_NOTE = ("window bulk absorption not modelled (no absorption data in the solid "
                   "table); Fresnel loss at normal incidence for uncoated windows")


def _index_at(material: str, wavelength: float) -> float:
    from hcfplan.materials import solids

    with quiet_validity():
        return float(solids.refractive_index(material, np.array([2 * math.pi * c / wavelength]))[0])


def window_transmission_at_pump(material: str, thickness: float | None, wavelength: float,
                                coating: str) -> float:
    """Power transmission of a window at the pump (1 without a window). [-]"""
    from hcfplan.compression.losses import window_transmission

    if not thickness:
        return 1.0
    return window_transmission(_index_at(material, wavelength), thickness,
                               coated=coating == "ar")


def exit_window_transmission(config) -> float:
    """Transmission of the cell's exit window at the pump. [-]"""
    cell = config.cell
    return window_transmission_at_pump(cell.window_material, cell.window_thickness,
                                       config.laser.wavelength, cell.window_coating)


def entrance_window_transmission(config) -> float:
    """Transmission of the cell's entrance window at the pump. [-]"""
    cell = config.cell
    return window_transmission_at_pump(cell.entrance_window_material,
                                       cell.entrance_window_thickness, config.laser.wavelength,
                                       cell.window_coating)


def entrance_window_phase(config, grid) -> np.ndarray:
    """Phase of the entrance window on the grid, value and slope at the pump removed
    (grid.py convention 4); zeros without an entrance window. [rad]"""
    from hcfplan.compression.elements import material_phase
    from hcfplan.materials import solids

    cell = config.cell
    if not cell.entrance_window_thickness:
        return np.zeros_like(grid.omega)
    # the grid extends beyond the Sellmeier range far outside the spectrum (as for the exit
    # window in planning.chain); nan where the fit has no real index is handled there
    with quiet_validity(), np.errstate(invalid="ignore"):
        n = solids.refractive_index(cell.entrance_window_material, grid.omega)
    return material_phase(grid.omega, grid.omega_pump, n, cell.entrance_window_thickness)


def with_entrance_window(config, grid, field_t: np.ndarray) -> np.ndarray:
    """The input field after the entrance window's dispersion (energy unchanged:
    ``laser.energy_uj`` is the energy after the window)."""
    if not config.cell.entrance_window_thickness:
        return field_t
    phase = np.nan_to_num(entrance_window_phase(config, grid))
    return grid.to_time(grid.to_spectrum(field_t) * np.exp(1j * phase))


def entrance_window_gdd(config) -> float | None:
    """GDD of the entrance window at the pump (None without one). [s^2]"""
    from hcfplan.materials import solids

    cell = config.cell
    if not cell.entrance_window_thickness:
        return None
    omega0 = 2 * math.pi * c / config.laser.wavelength
    with quiet_validity():
        return float(np.asarray(solids.group_delay_dispersion(
            cell.entrance_window_material, omega0, cell.entrance_window_thickness)))


def compressor_losses(config, compression):
    """``compression`` with the exit window's and the mirrors' losses applied
    (:func:`hcfplan.compression.losses.with_throughput`)."""
    from hcfplan.compression.losses import with_throughput

    return with_throughput(compression, exit_window_transmission(config),
                           config.compressor.mirror_reflectivity)


def throughput_values(config, compression) -> dict:
    """``compressor.*`` summary keys of the losses after the fiber."""
    from hcfplan.compression.losses import mirror_throughput

    window = exit_window_transmission(config)
    mirrors = mirror_throughput(config.compressor.mirror_reflectivity, compression.bounces)
    return {"compressor.mirror_reflectivity": config.compressor.mirror_reflectivity,
            "compressor.mirror_transmission": mirrors,
            "compressor.exit_window_transmission": window,
            "compressor.throughput": window * mirrors,
            "compressor.window_coating": config.cell.window_coating,
            "compressor.loss_note": ABSORPTION_NOTE}
