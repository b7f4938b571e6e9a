"""Validity ranges of the data behind a run, reported as warning lines (never as errors).

Broad spectral grids evaluate every fit far beyond the light actually present, so the
per-call ``ValidityWarning`` of the material modules is silenced on those evaluations
(:func:`quiet_validity`) and the ranges are checked here instead, once, against the band that
carries light: the pump for the first-look reports, the -40 dB extent of the output spectrum
after a run.
"""

from __future__ import annotations

import contextlib
import warnings
from collections.abc import Iterator

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ValidityWarning

#: Spectral level that defines "where the light is" for the range checks. [dB]
LIGHT_LEVEL_DB = -40.0


@contextlib.contextmanager
def quiet_validity() -> Iterator[None]:
    """Silence ValidityWarning inside the block (ranges are checked by :func:`range_notes`)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        yield


#: Modules whose ValidityWarnings are range notes of material fits (checked by range_notes).
MATERIAL_MODULES = r"hcfplan\.(materials|fibers)\..*"


@contextlib.contextmanager
def quiet_validity_of_materials() -> Iterator[None]:
    """Silence the material-fit range warnings only; other ValidityWarnings pass through."""
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", category=ValidityWarning, module=MATERIAL_MODULES)
        yield


def light_band(frequency: np.ndarray, power: np.ndarray,
               level_db: float = LIGHT_LEVEL_DB) -> tuple[float, float]:
    """Shortest and longest wavelength [m] where ``power`` is above ``level_db`` of its peak."""
    power = np.asarray(power, dtype=float)
    keep = (power >= power.max() * 10 ** (level_db / 10)) & (np.asarray(frequency) > 0)
    f = np.asarray(frequency)[keep]
    return float(c / f.max()), float(c / f.min())


def _note(what: str, lo: float, hi: float, band: tuple[float, float], where: str) -> str | None:
    b_lo, b_hi = band
    if b_lo >= lo and b_hi <= hi:
        return None
    return (f"{what} is valid for {lo * 1e9:.0f}-{hi * 1e9:.0f} nm; {where} "
            f"({b_lo * 1e9:.0f}-{b_hi * 1e9:.0f} nm) is extrapolated")


def range_notes(config, medium, band: tuple[float, float], where: str) -> list[str]:
    """Warnings for every fit (gas components, cladding, window) that ``band`` [m] leaves."""
    from hcfplan.materials import solids

    notes = []
    if medium is not None:
        for comp in medium.components:
            fit = comp.table.dispersion
            notes.append(_note(f"{comp.table.name} dispersion fit ({fit.source.split(',')[0]})",
                               *fit.valid_wavelength, band, where))
    materials = {config.fiber.cladding: "cladding"} if config.fiber.kind != "taylor" else {}
    if config.cell.window_thickness:
        materials.setdefault(config.cell.window_material, "window")
    for name, role in materials.items():
        fit = solids.load_material(name).dispersion
        notes.append(_note(f"{role} ({name}) Sellmeier fit", fit.wavelength_min,
                           fit.wavelength_max, band, where))
    return [n for n in notes if n]
