"""Overlaid figures of two runs (:mod:`hcfplan.planning.compare`): output spectra, compressed
pulses and THz spectra, A and B in one axes each. Nothing here recomputes physics."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.layout import legend_beside, shown
from hcfplan.plotting.levels import decibels, per_wavelength

_FLOOR_DB = -50.0
_COLOURS = ("C0", "C3")


def _db(values: np.ndarray, reference: float) -> np.ndarray:
    return decibels(values, reference, _FLOOR_DB)


def side_name(label: str) -> str:
    """Legend name of one side: the config's name instead of its path
    (``/home/me/configs/a.toml`` -> ``a``; a ``with --set-b`` suffix is kept)."""
    head, sep, rest = str(label).partition(" with ")
    path = Path(head)
    name = path.stem if path.suffix == ".toml" else path.name
    return name + sep + rest


def draw_spectra(fig, a, b):
    """Fiber output spectral energy density per wavelength (dB, common reference; the whole
    beam of a multimode run)."""
    from hcfplan.planning.mode_run import exit_density

    ax = fig.subplots()
    curves = []
    for side in (a, b):
        grid, prop = side.chain.grid, side.chain.propagation
        order = np.argsort(grid.frequency)
        freq = np.asarray(grid.frequency)[order]
        dens = exit_density(prop)[order]  # multimode: the whole beam
        keep = freq > 0
        curves.append((c / freq[keep] * 1e9, per_wavelength(freq[keep], dens[keep])))
    peak = max(np.max(d) for _, d in curves)
    lit = np.concatenate([wl[_db(dens, peak) > _FLOOR_DB] for wl, dens in curves])
    lo, hi = (lit.min(), lit.max()) if lit.size else (None, None)
    if lit.size:
        pad = 0.05 * (hi - lo) or 1.0
        lo, hi = lo - pad, hi + pad
    for (wl, dens), side, colour in zip(curves, (a, b), _COLOURS, strict=True):
        order = np.argsort(wl)
        wl, dens = wl[order], dens[order]
        if lo is not None:
            wl, dens = shown(wl, lo, hi, dens)
        ax.plot(wl, _db(dens, peak), color=colour, label=side_name(side.label))
    if lo is not None:
        ax.set_xlim(lo, hi)
    ax.set_ylim(_FLOOR_DB, 3)
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral energy density per nm\n(dB rel. the higher peak)")
    ax.set_title("Fiber output spectra")
    legend_beside(ax)
    return ax


def draw_pulses(fig, a, b):
    """Compressed pulses, power vs delay (each side's own time grid)."""
    ax = fig.subplots()
    for side, colour in zip((a, b), _COLOURS, strict=True):
        comp = side.chain.compression
        if comp is None:
            continue
        t, power = side.chain.grid.time, np.abs(comp.field_t) ** 2
        ax.plot(t * 1e15, power / 1e9, color=colour, label=side_name(side.label))
    widths = [s.summary.get("compressed", {}).get("fwhm_s") for s in (a, b)]
    span = 6 * max((w for w in widths if w), default=100e-15) * 1e15
    ax.set_xlim(-span, span)
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (GW)")
    ax.set_title("Compressed pulses")
    legend_beside(ax)
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
                    label=side_name(side.label))
    limit = min(s.chain.thz.model_limit for s in sides) / 1e12
    right = max(s.chain.thz.frequency[-1] for s in sides) / 1e12
    if right > limit:
        ax.axvspan(limit, right, color="0.85", zorder=0, lw=0,
                   label=f"beyond a crystal model\n(> {limit:.3g} THz)")
    ax.set_xlim(0.0, right)
    ax.set_ylim(_FLOOR_DB, 3)
    ax.set_xlabel("Frequency (THz)")
    ax.set_ylabel("Generated THz power per Hz\n(dB rel. the higher peak)")
    ax.set_title("THz spectra")
    legend_beside(ax)
    return ax


#: file stem -> draw(fig, a, b)
FIGURES = {"compare_spectra": draw_spectra, "compare_pulses": draw_pulses,
           "compare_thz": draw_thz}
