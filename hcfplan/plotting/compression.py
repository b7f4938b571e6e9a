"""Figures of a chirped-mirror compression result
(:class:`hcfplan.compression.compressor.CompressionResult`).

Each function draws into the given ``ax`` and returns it; matplotlib is imported inside the
functions. Values are converted from SI to display units here only (fs, THz, GW).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Literal

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.layout import legend_beside, plain_log_ticks, shown

if TYPE_CHECKING:
    from matplotlib.axes import Axes

    from hcfplan.compression.compressor import CompressionResult

FS = 1e15  # s -> fs
THZ = 1e-12  # Hz -> THz
GW = 1e-9  # W -> GW

#: Scale name -> (matplotlib y-scale, lower y limit relative to the TL peak or None).
_INTENSITY_SCALES: dict[str, tuple[str, float | None]] = {
    "linear": ("linear", None),
    "log": ("log", 1e-6),
}


def plot_temporal_intensity(
    ax: Axes,
    result: CompressionResult,
    *,
    scale: Literal["linear", "log"] = "linear",
    references: bool = True,
) -> Axes:
    """Compressed temporal power against the transform limit (and the polynomial references).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Target axes.
    result : CompressionResult
        The compression result.
    scale : {"linear", "log"}
        Power axis scale; the log axis starts 60 dB below the transform-limited peak.
    references : bool
        Also draw the best quadratic and quadratic + cubic references.
    """
    yscale, floor = _INTENSITY_SCALES[scale]
    half_span = 6.0 * max(result.metrics.transform_limited_fwhm, result.metrics.fwhm) * FS
    if not np.isfinite(half_span):
        half_span = float(np.max(np.abs(result.grid.time))) * FS
    time, power = shown(result.grid.time * FS, -half_span, half_span,
                        np.abs(result.field_t) ** 2 * GW)
    curves = [(result.transform_limit, "transform limit", ":", "k")]
    if references:
        curves += [
            (result.quadratic, "best GDD only", "--", "C1"),
            (result.quadratic_cubic, "best GDD + TOD", "-.", "C2"),
        ]
    for reference, label, style, colour in curves:
        _, ref_power = shown(result.grid.time * FS, -half_span, half_span,
                             np.abs(reference.field_t) ** 2 * GW)
        ax.plot(time, ref_power, style, color=colour, lw=1.0, label=label)
    ax.plot(time, power, "-", color="C3", lw=1.5,
            label=f"{result.bounces} bounces,\nFWHM {result.metrics.fwhm * FS:.1f} fs")
    t_lo, t_hi = result.metrics.main_lobe_bounds
    ax.axvspan(t_lo * FS, t_hi * FS, color="0.9", zorder=0, label="main lobe")
    ax.set_yscale(yscale)
    if yscale == "log":
        plain_log_ticks(ax.yaxis)
    if floor is not None:
        peak = result.transform_limit.metrics.peak_power * GW
        ax.set_ylim(peak * floor, peak * 2.0)
    ax.set_xlim(-half_span, half_span)
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (GW, log scale)" if scale == "log" else "Power (GW)")
    legend_beside(ax)
    return ax


def plot_residual_phase(ax: Axes, result: CompressionResult,
                        band: tuple[float, float] | None = None) -> Axes:
    """Residual spectral phase over the spectrum, shaded by the spectral power.

    The phase is drawn only where the spectral power exceeds the floor used by
    :func:`hcfplan.compression.compressor.residual_spectral_phase` (nan elsewhere); the
    spectrum (per Hz, relative to its peak) is shaded on a twin axis, the mirror band when given.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Target axes.
    result : CompressionResult
        The compression result.
    band : (float, float), optional
        The mirror band (shortest, longest wavelength) to mark. [m]
    """
    grid = result.grid
    order = np.argsort(grid.frequency)
    frequency = grid.frequency[order] * THZ
    power = np.abs(result.spectrum[order]) ** 2
    power = power / power.max()
    phase = result.residual_phase[order]
    lit = frequency[np.isfinite(phase)]
    lo, hi = (lit.min(), lit.max()) if lit.size else (frequency.min(), frequency.max())
    pad = 0.15 * (hi - lo) or 1.0
    lo, hi = lo - pad, hi + pad
    frequency, power, phase = shown(frequency, lo, hi, power, phase)
    twin = ax.twinx()
    twin.fill_between(frequency, power, color="0.85", zorder=0,
                      label="spectrum after the compressor (right)")
    twin.set_ylabel("Spectral energy density per Hz\n(rel. peak)")
    twin.set_ylim(0.0, 1.05)
    handles = ax.plot(frequency, phase, color="C0", lw=1.2,
                      label="residual phase (left; drawn where\nthe spectrum is above the floor)")
    handles = [*handles, *twin.collections]
    if band is not None:
        f_hi, f_lo = (THZ * c / b for b in band)
        handles.append(ax.axvspan(f_lo, f_hi, color="C2", alpha=0.12, lw=0, zorder=0,
                                  label=f"mirror band {band[0] * 1e9:.0f}-{band[1] * 1e9:.0f} nm"))
    ax.set_xlabel("Frequency (THz)")
    ax.set_ylabel("Residual phase (rad)")
    ax.set_zorder(twin.get_zorder() + 1)  # phase above the shaded spectrum
    ax.patch.set_visible(False)
    ax.set_xlim(lo, hi)
    ax.legend(handles=handles, loc="upper left", bbox_to_anchor=(1.22, 1.0), borderaxespad=0.0,
              fontsize="small")
    return ax


def plot_peak_power_vs_bounces(ax: Axes, result: CompressionResult) -> Axes:
    """Peak power against the number of bounces (with the trimmed curve when present).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Target axes.
    result : CompressionResult
        The compression result.
    """
    counts = result.bounce_counts
    ax.plot(counts, result.peak_power_vs_bounces * GW, "o-", label="mirrors only")
    if result.peak_power_vs_bounces_trimmed is not None:
        ax.plot(counts, result.peak_power_vs_bounces_trimmed * GW, "s--", label="with trim")
    ax.axvline(result.bounces, color="C2", lw=1.2, label=f"chosen: {result.bounces} bounces")
    ax.axhline(
        result.transform_limit.metrics.peak_power * GW, color="0.5", ls=":", label="transform limit"
    )
    ax.set_xlabel("Chirped-mirror bounces")
    ax.set_ylabel("Compressed peak power (GW)")
    legend_beside(ax)
    return ax
