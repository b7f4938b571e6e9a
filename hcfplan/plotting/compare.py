"""Overlaid figures of two runs (:mod:`hcfplan.planning.compare`): output spectra, compressed
pulses and THz spectra, A and B in one axes each. Nothing here recomputes physics."""

from __future__ import annotations

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.levels import decibels, per_wavelength

_FLOOR_DB = -50.0
_COLOURS = ("C0", "C3")


def _db(values: np.ndarray, reference: float) -> np.ndarray:
    return decibels(values, reference, _FLOOR_DB)


def draw_spectra(fig, a, b):
    """Fiber output spectral energy density per wavelength (dB, common reference)."""
    ax = fig.subplots()
    curves = []
    for side in (a, b):
        grid, prop = side.chain.grid, side.chain.propagation
        order = np.argsort(grid.frequency)
        freq = np.asarray(grid.frequency)[order]
        dens = np.abs(np.asarray(prop.field_out_spectrum)[order]) ** 2
        keep = freq > 0
        curves.append((c / freq[keep] * 1e9, per_wavelength(freq[keep], dens[keep])))
    peak = max(np.max(d) for _, d in curves)
    for (wl, dens), side, colour in zip(curves, (a, b), _COLOURS, strict=True):
        ax.plot(wl, _db(dens, peak), color=colour, label=side.label)
    ax.set_ylim(_FLOOR_DB, 3)
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral energy density (dB)")
    ax.set_title("Fiber output spectra")
    ax.legend()
    return ax


def draw_pulses(fig, a, b):
    """Compressed pulses, power vs delay (each side's own time grid)."""
    ax = fig.subplots()
    for side, colour in zip((a, b), _COLOURS, strict=True):
        comp = side.chain.compression
        if comp is None:
            continue
        t, power = side.chain.grid.time, np.abs(comp.field_t) ** 2
        ax.plot(t * 1e15, power / 1e9, color=colour, label=side.label)
    widths = [s.summary.get("compressed", {}).get("fwhm_s") for s in (a, b)]
    span = 6 * max((w for w in widths if w), default=100e-15) * 1e15
    ax.set_xlim(-span, span)
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (GW)")
    ax.set_title("Compressed pulses")
    ax.legend()
    return ax


def draw_thz(fig, a, b):
    """Generated THz power spectra (dB, common reference)."""
    ax = fig.subplots()
    sides = [s for s in (a, b) if s.chain.thz is not None]
    if not sides:
        ax.set_title("No THz stage in either config")
        return ax
    peak = max(np.max(s.chain.thz.generated_power) for s in sides)
    for side, colour in zip((a, b), _COLOURS, strict=True):
        thz = side.chain.thz
        if thz is not None:
            ax.plot(thz.frequency / 1e12, _db(thz.generated_power, peak), color=colour,
                    label=side.label)
    ax.set_ylim(_FLOOR_DB, 3)
    ax.set_xlabel("Frequency (THz)")
    ax.set_ylabel("Generated THz power (dB)")
    ax.set_title("THz spectra")
    ax.legend()
    return ax


#: file stem -> draw(fig, a, b)
FIGURES = {"compare_spectra": draw_spectra, "compare_pulses": draw_pulses,
           "compare_thz": draw_thz}
