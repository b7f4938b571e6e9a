"""Figures of a chirped-mirror compression result
(:class:`hcfplan.compression.compressor.CompressionResult`).

Each function draws into the given ``ax`` and returns it; matplotlib is imported inside the
functions. Values are converted from SI to display units here only (fs, THz, GW).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Literal

import numpy as np

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
    time = result.grid.time * FS
    curves = [(result.transform_limit, "transform limit", ":")]
    if references:
        curves += [
            (result.quadratic, "best GDD only", "--"),
            (result.quadratic_cubic, "best GDD + TOD", "-."),
        ]
    for reference, label, style in curves:
        ax.plot(time, np.abs(reference.field_t) ** 2 * GW, style, lw=1.0, label=label)
    ax.plot(
        time,
        np.abs(result.field_t) ** 2 * GW,
        "-",
        lw=1.5,
        label=f"{result.bounces} bounces, FWHM {result.metrics.fwhm * FS:.1f} fs",
    )
    t_lo, t_hi = result.metrics.main_lobe_bounds
    ax.axvspan(t_lo * FS, t_hi * FS, color="0.9", zorder=0, label="main lobe")
    ax.set_yscale(yscale)
    if floor is not None:
        peak = result.transform_limit.metrics.peak_power * GW
        ax.set_ylim(peak * floor, peak * 2.0)
    half_span = 6.0 * max(result.metrics.transform_limited_fwhm, result.metrics.fwhm)
    if np.isfinite(half_span):
        ax.set_xlim(-half_span * FS, half_span * FS)
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (GW)")
    ax.legend(fontsize="small")
    return ax


def plot_residual_phase(ax: Axes, result: CompressionResult) -> Axes:
    """Residual spectral phase over the spectrum, shaded by the spectral power.

    The phase is drawn only where the spectral power exceeds the floor used by
    :func:`hcfplan.compression.compressor.residual_spectral_phase` (nan elsewhere); the normalised
    spectrum is drawn on a twin axis.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Target axes.
    result : CompressionResult
        The compression result.
    """
    grid = result.grid
    order = np.argsort(grid.frequency)
    frequency = grid.frequency[order] * THZ
    power = np.abs(result.spectrum[order]) ** 2
    power = power / power.max()
    phase = result.residual_phase[order]
    ax.plot(frequency, phase, color="C0", lw=1.0)
    ax.scatter(frequency, phase, c=power, cmap="Blues", vmin=0.0, vmax=1.0, s=4, zorder=3)
    ax.set_xlabel("Frequency (THz)")
    ax.set_ylabel("Residual phase (rad)")
    twin = ax.twinx()
    twin.fill_between(frequency, power, color="0.85", zorder=0)
    twin.set_ylabel("Spectral density (norm.)")
    twin.set_ylim(0.0, 1.05)
    ax.set_zorder(twin.get_zorder() + 1)  # phase above the shaded spectrum
    ax.patch.set_visible(False)
    shown = frequency[np.isfinite(phase)]
    if shown.size:
        ax.set_xlim(shown.min(), shown.max())
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
    ax.axvline(result.bounces, color="0.5", lw=0.8)
    ax.axhline(
        result.transform_limit.metrics.peak_power * GW, color="0.5", ls=":", label="transform limit"
    )
    ax.set_xlabel("Bounces")
    ax.set_ylabel("Peak power (GW)")
    ax.legend(fontsize="small")
    return ax
