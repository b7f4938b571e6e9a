"""THz figures: power spectrum with the cutoff, phase-matching map, driving optical spectrum.

Frequencies above the crystal model's stated range are shaded (:func:`shade_beyond_model`).

Each function takes an ``ax`` and a result object (:class:`hcfplan.thz.generation.ThzResult` or
:class:`hcfplan.thz.detection.PhaseMatchingMap`), draws, and returns ``ax``. Unit conversion to
display units happens here only; no physics is recomputed.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.levels import decibels, per_wavelength

_FLOOR_DB = -60.0  # lowest level drawn on dB axes


def _db(power: np.ndarray) -> np.ndarray:
    return decibels(power, np.max(power), _FLOOR_DB)


def shade_beyond_model(ax: Any, result: Any, f_max_thz: float | None = None) -> Any:
    """Shade the THz frequencies above ``result.model_limit``, where the crystal model is not
    valid (the spectrum there is computed with the model extrapolated, and no cutoff, peak or
    width is reported from it).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes with THz frequency (THz) on x.
    result : ThzResult
        THz estimate.
    f_max_thz : float or None
        Right end of the shading; default the end of the frequency axis. [THz]

    Returns
    -------
    matplotlib.axes.Axes
    """
    limit = result.model_limit * 1e-12
    end = result.frequency[-1] * 1e-12 if f_max_thz is None else f_max_thz
    if end > limit:
        ax.axvspan(limit, end, color="0.85", zorder=0,
                   label=f"beyond the crystal model (> {limit:.3g} THz)")
    return ax


def plot_thz_spectrum(ax: Any, result: Any, *, log_scale: bool = True) -> Any:
    """Generated (and, if present, detected) THz power spectrum with the cutoff marked and the
    frequencies beyond the crystal model's range shaded.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes to draw into.
    result : ThzResult
        THz estimate.
    log_scale : bool
        Power in dB relative to the peak (``True``) or linear, peak = 1.

    Returns
    -------
    matplotlib.axes.Axes
    """
    f_thz = result.frequency * 1e-12
    scale = _db if log_scale else (lambda p: p / np.max(p))
    ax.plot(f_thz, scale(result.generated_power), label=f"generated ({result.crystal}, "
            f"{result.thickness * 1e3:g} mm)")
    if result.detected_power is not None:
        ax.plot(f_thz, scale(result.detected_power), label="detected (EO response)")
    if result.cutoff is not None:
        ax.axvline(result.cutoff * 1e-12, color="k", linestyle="--",
                   label=f"cutoff {result.cutoff * 1e-12:.2f} THz")
    ax.set_xlabel("Frequency (THz)")
    ax.set_ylabel("Power (dB rel. peak)" if log_scale else "Power (norm.)")
    title = (f"Cutoff: {result.cutoff_definition}" if result.cutoff is not None else
             f"Cutoff above the model's range (> {result.model_limit * 1e-12:.3g} THz)")
    ax.set_title(title, fontsize="small", wrap=True)
    if log_scale:
        ax.set_ylim(_FLOOR_DB, 3.0)
    visible = f_thz[_db(result.generated_power) > _FLOOR_DB]
    right = visible.max() * 1.1 if visible.size else f_thz[-1]
    ax.set_xlim(0.0, right)
    shade_beyond_model(ax, result, right)
    ax.legend(fontsize="small", loc="upper right")
    return ax


def plot_phase_matching_map(ax: Any, pm_map: Any, *, max_length: float | None = None) -> Any:
    """Coherence length over pump wavelength and THz frequency (colour, mm).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes to draw into.
    pm_map : PhaseMatchingMap
        From :func:`hcfplan.thz.detection.phase_matching_map`.
    max_length : float or None
        Upper end of the colour scale. [m]

    Returns
    -------
    matplotlib.axes.Axes
    """
    l_mm = np.minimum(pm_map.coherence_length, 1e3) * 1e3
    vmax = None if max_length is None else max_length * 1e3
    mesh = ax.pcolormesh(pm_map.frequency * 1e-12, pm_map.pump_wavelength * 1e9, l_mm,
                         shading="auto", vmax=vmax)
    ax.figure.colorbar(mesh, ax=ax, label="Coherence length (mm)")
    ax.set_xlabel("THz frequency (THz)")
    ax.set_ylabel("Pump wavelength (nm)")
    ax.set_title(f"{pm_map.crystal}: velocity matching")
    return ax


def plot_coherence_length(ax: Any, result: Any) -> Any:
    """Coherence length at the pump centroid versus THz frequency, with the crystal thickness.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes to draw into.
    result : ThzResult
        THz estimate.

    Returns
    -------
    matplotlib.axes.Axes
    """
    pump_nm = c / result.pump_frequency * 1e9
    finite = np.isfinite(result.coherence_length)
    ax.semilogy(result.frequency[finite] * 1e-12, result.coherence_length[finite] * 1e3,
                label=f"coherence length at {pump_nm:.0f} nm")
    ax.axhline(result.thickness * 1e3, color="k", linestyle="--",
               label=f"thickness {result.thickness * 1e3:g} mm")
    shade_beyond_model(ax, result)
    ax.set_xlabel("THz frequency (THz)")
    ax.set_ylabel("Length (mm)")
    ax.legend(fontsize="small")
    return ax


def plot_optical_spectrum(ax: Any, result: Any) -> Any:
    """The driving optical spectrum (after compression) versus wavelength, peak = 1.

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
    wavelength_nm = c / frequency[keep] * 1e9
    density = per_wavelength(frequency[keep], result.optical_spectrum[keep])
    ax.plot(wavelength_nm, density / np.max(density))
    lit = wavelength_nm[density > 1e-4 * np.max(density)]
    if lit.size:
        span = lit.max() - lit.min()
        ax.set_xlim(lit.min() - 0.1 * span, lit.max() + 0.1 * span)
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral energy density (norm., per wavelength)")
    ax.set_title(f"Driving spectrum, {result.pump_energy * 1e6:.3g} uJ")
    return ax
