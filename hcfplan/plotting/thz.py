"""THz figures: power spectrum with the cutoff, phase-matching map, driving optical spectrum.

Frequencies above the crystal model's stated range are shaded (:func:`shade_beyond_model`).

Each function takes an ``ax`` and a result object (:class:`hcfplan.thz.generation.ThzResult` or
:class:`hcfplan.thz.detection.PhaseMatchingMap`), draws, and returns ``ax``. Unit conversion to
display units happens here only; no physics is recomputed.
"""

from __future__ import annotations

import textwrap
from typing import Any

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.layout import legend_beside, plain_log_ticks, shown
from hcfplan.plotting.levels import decibels, per_wavelength

_FLOOR_DB = -60.0  # lowest level drawn on dB axes
#: Shading of the frequencies beyond the crystal model (on line plots and, hatched, on maps).
_BEYOND = {"color": "0.85", "zorder": 0, "lw": 0}
_BEYOND_HATCHED = {"fill": False, "hatch": "//", "edgecolor": "w", "lw": 0}


def _db(power: np.ndarray) -> np.ndarray:
    return decibels(power, np.max(power), _FLOOR_DB)


def thz_range(result: Any) -> tuple[float, float]:
    """The THz range [THz] shown by every panel of one figure: from 0 to 1.1 times the highest
    frequency where the generated power is above the dB floor."""
    f_thz = result.frequency * 1e-12
    visible = f_thz[_db(result.generated_power) > _FLOOR_DB]
    return 0.0, float(visible.max() * 1.1 if visible.size else f_thz[-1])


def shade_beyond_model(ax: Any, result: Any, f_max_thz: float | None = None, *,
                       hatched: bool = False) -> Any:
    """Shade the THz frequencies above ``result.model_limit``, where the crystal model is not
    valid (the spectrum there is computed with the model extrapolated, and no cutoff, peak or
    width is reported from it).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes with THz frequency (THz) on x.
    result : ThzResult
        THz estimate (only ``model_limit`` and ``frequency`` are read).
    f_max_thz : float or None
        Right end of the shading; default the end of the frequency axis. [THz]
    hatched : bool
        White hatching instead of grey (over a colour map).

    Returns
    -------
    matplotlib.axes.Axes
    """
    limit = result.model_limit * 1e-12
    end = result.frequency[-1] * 1e-12 if f_max_thz is None else f_max_thz
    if end > limit:
        ax.axvspan(limit, end, **(_BEYOND_HATCHED if hatched else _BEYOND),
                   label=f"beyond the crystal model\n(> {limit:.3g} THz)")
    return ax


def plot_thz_spectrum(ax: Any, result: Any, *, log_scale: bool = True,
                      f_range: tuple[float, float] | None = None) -> Any:
    """Generated (and, if present, detected) THz power spectrum with the cutoff marked and the
    frequencies beyond the crystal model's range shaded.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes to draw into.
    result : ThzResult
        THz estimate.
    log_scale : bool
        Power spectral density per Hz in dB relative to its peak (``True``) or linear, peak = 1.
    f_range : (float, float), optional
        Frequency range shown [THz]; default :func:`thz_range`.

    Returns
    -------
    matplotlib.axes.Axes
    """
    lo, hi = thz_range(result) if f_range is None else f_range
    scale = _db if log_scale else (lambda p: p / np.max(p))
    generated = scale(result.generated_power)
    detected = None if result.detected_power is None else scale(result.detected_power)
    f_thz = result.frequency * 1e-12
    ax.plot(*shown(f_thz, lo, hi, generated),
            label=f"generated ({result.crystal}, {result.thickness * 1e3:g} mm)")
    if detected is not None:
        ax.plot(*shown(f_thz, lo, hi, detected), label="detected (EO response)")
    if result.cutoff is not None:
        ax.axvline(result.cutoff * 1e-12, color="k", linestyle="--",
                   label=f"cutoff {result.cutoff * 1e-12:.2f} THz")
    ax.set_xlabel("Frequency (THz)")
    ax.set_ylabel("THz power per Hz (dB rel. peak)" if log_scale
                  else "THz power per Hz (rel. peak)")
    title = (f"Cutoff: {result.cutoff_definition}" if result.cutoff is not None else
             f"Cutoff above the model's range (> {result.model_limit * 1e-12:.3g} THz)")
    ax.set_title(textwrap.fill(title, 70), fontsize="small")
    if log_scale:
        ax.set_ylim(_FLOOR_DB, 3.0)
    ax.set_xlim(lo, hi)
    shade_beyond_model(ax, result, hi)
    legend_beside(ax)
    return ax


def plot_phase_matching_map(ax: Any, pm_map: Any, *, max_length: float | None = None,
                            f_range: tuple[float, float] | None = None,
                            model_limit: float | None = None) -> Any:
    """Coherence length over pump wavelength and THz frequency (colour, mm).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes to draw into.
    pm_map : PhaseMatchingMap
        From :func:`hcfplan.thz.detection.phase_matching_map`.
    max_length : float or None
        Upper end of the colour scale. [m]
    f_range : (float, float), optional
        Frequency range shown [THz]; default the map's.
    model_limit : float, optional
        Highest frequency of the crystal model's validity [Hz]; the map beyond it is hatched.

    Returns
    -------
    matplotlib.axes.Axes
    """
    f_thz = pm_map.frequency * 1e-12
    lo, hi = (f_thz.min(), f_thz.max()) if f_range is None else f_range
    l_mm = np.minimum(pm_map.coherence_length, 1e3) * 1e3
    f_shown, l_shown = shown(f_thz, lo, hi, l_mm)
    vmax = None if max_length is None else max_length * 1e3
    mesh = ax.pcolormesh(f_shown, pm_map.pump_wavelength * 1e9, l_shown, shading="auto",
                         vmax=vmax, rasterized=True)
    ax.figure.colorbar(mesh, ax=ax, label="Coherence length (mm)")
    if model_limit is not None and model_limit * 1e-12 < hi:
        ax.axvspan(model_limit * 1e-12, hi, **_BEYOND_HATCHED)
    ax.set_xlim(lo, hi)
    ax.set_xlabel("THz frequency (THz)")
    ax.set_ylabel("Pump wavelength (nm)")
    geometry = getattr(pm_map, "geometry", "collinear")
    how = ("collinear" if geometry != "tilted_front" else
           f"tilted front at {np.degrees(pm_map.tilt):.1f} deg")
    ax.set_title(f"{pm_map.crystal}: velocity matching, {how}"
                 + (" (hatched: beyond the crystal model)" if model_limit is not None
                    and model_limit * 1e-12 < hi else ""), fontsize="small")
    return ax


def plot_coherence_length(ax: Any, result: Any, *,
                          f_range: tuple[float, float] | None = None) -> Any:
    """Coherence length at the pump centroid versus THz frequency, with the crystal thickness.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes to draw into.
    result : ThzResult
        THz estimate.
    f_range : (float, float), optional
        Frequency range shown [THz]; default :func:`thz_range`.

    Returns
    -------
    matplotlib.axes.Axes
    """
    lo, hi = thz_range(result) if f_range is None else f_range
    pump_nm = c / result.pump_frequency * 1e9
    finite = np.isfinite(result.coherence_length)
    f_thz, length = shown(result.frequency[finite] * 1e-12, lo, hi,
                          result.coherence_length[finite] * 1e3)
    ax.semilogy(f_thz, length, label=f"coherence length\nat {pump_nm:.0f} nm")
    plain_log_ticks(ax.yaxis)
    ax.axhline(result.thickness * 1e3, color="k", linestyle="--",
               label=f"thickness {result.thickness * 1e3:g} mm")
    shade_beyond_model(ax, result, hi)
    ax.set_xlim(lo, hi)
    ax.set_xlabel("THz frequency (THz)")
    ax.set_ylabel("Length (mm)")
    legend_beside(ax)
    return ax


def plot_optical_spectrum(ax: Any, result: Any) -> Any:
    """The driving optical spectrum (after compression): energy density per nm versus
    wavelength, relative to its peak.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes to draw into.
    result : ThzResult
        THz estimate (holds the optical spectrum per unit frequency).

    Returns
    -------
    matplotlib.axes.Axes
    """
    frequency = result.optical_frequency
    keep = frequency > 0
    order = np.argsort(c / frequency[keep])
    wavelength_nm = (c / frequency[keep] * 1e9)[order]
    density = per_wavelength(frequency[keep], result.optical_spectrum[keep])[order]
    density = density / np.max(density)
    lit = wavelength_nm[density > 1e-4]
    lo, hi = (lit.min(), lit.max()) if lit.size else (wavelength_nm[0], wavelength_nm[-1])
    span = hi - lo or 1.0
    lo, hi = lo - 0.1 * span, hi + 0.1 * span
    ax.plot(*shown(wavelength_nm, lo, hi, density))
    ax.set_xlim(lo, hi)
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral energy density\nper nm (rel. peak)")
    ax.set_title(f"Driving spectrum, {result.pump_energy * 1e6:.3g} µJ", fontsize="small")
    return ax
