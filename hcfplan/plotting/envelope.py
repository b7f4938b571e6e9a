"""Figure of the operating envelope (:class:`hcfplan.planning.envelope.EnvelopeResult`).

Draws into the given ``ax`` and returns it; converts SI to display units (bar, uJ, fs, THz)
here only, recomputes nothing.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from hcfplan.errors import ConfigError

if TYPE_CHECKING:
    from matplotlib.axes import Axes

    from hcfplan.planning.envelope import EnvelopeResult

BAR = 1e-5  # Pa -> bar
UJ = 1e6  # J -> uJ
FS = 1e15  # s -> fs
THZ = 1e-12  # Hz -> THz

#: Contour levels of the compressed-duration estimate (fs) and of the THz cutoff (THz).
DURATION_LEVELS_FS = (3, 5, 10, 20, 50, 100, 200)
CUTOFF_LEVELS_THZ = (2, 5, 10, 20, 50, 100)


def _levels(values: np.ndarray, levels) -> list:
    finite = values[np.isfinite(values)]
    if finite.size == 0:
        return []
    return [v for v in levels if finite.min() < v < finite.max()]


def _shade_beyond(ax, p, energy_line, top, color, label, hatch=None):
    ax.fill_between(p, np.minimum(energy_line, top), top, color=color, alpha=0.18,
                    hatch=hatch, lw=0, label=label)


def plot_envelope(ax: Axes, result: EnvelopeResult, *, contours: str = "duration") -> Axes:
    """Energy (log) vs fill pressure with the limit lines, regions and estimate contours.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Target axes.
    result : EnvelopeResult
        From :func:`hcfplan.planning.envelope.envelope_map`.
    contours : {"duration", "cutoff", "both"}
        Which estimate to contour: compressed duration (fs, solid grey), THz cutoff (THz,
        dotted), or both.

    Returns
    -------
    matplotlib.axes.Axes

    Raises
    ------
    ConfigError
        An unknown ``contours`` value (the command line checks ``--contours`` first).
    """
    if contours not in ("duration", "cutoff", "both"):
        raise ConfigError(f"contours = {contours!r}: use 'duration', 'cutoff' or 'both'")
    p = np.asarray(result.pressures) * BAR
    e = np.asarray(result.energies) * UJ
    top, bottom = e.max(), e.min()
    anomalous = np.asarray(result.beta2) < 0
    ax.fill_between(p, bottom, top, where=anomalous, color="C0", alpha=0.08, lw=0,
                    step="mid", label="anomalous dispersion at the pump")
    sf = np.asarray(result.self_focusing_max_energy) * UJ
    ion = np.asarray(result.ionization_max_energy) * UJ
    _shade_beyond(ax, p, sf, top, "C3", None)
    _shade_beyond(ax, p, ion, top, "C1", None, hatch="//")
    ax.plot(p, sf, color="C3", lw=1.8,
            label=f"self-focusing: P_cr / {result.self_focusing_margin:g} (estimate)")
    ax.plot(p, ion, color="C1", lw=1.8, ls="--",
            label=f"ionisation fraction {result.ionization_fraction_limit:g} (PPT estimate)")
    if result.rated_pressure is not None and result.rated_pressure * BAR <= p.max():
        ax.axvspan(result.rated_pressure * BAR, p.max(), color="0.4", alpha=0.25, lw=0)
        ax.axvline(result.rated_pressure * BAR, color="0.2", lw=1.5,
                   label="cell rating (beyond: exceeds rating)")
    if np.isfinite(result.zero_dispersion_pressure):
        ax.axvline(result.zero_dispersion_pressure * BAR, color="C0", ls=":", lw=1.5,
                   label="zero dispersion at the pump (estimate)")
    _contours(ax, p, e, result, contours)
    ax.plot([result.config_pressure * BAR], [result.config_energy * UJ], marker="*", ms=14,
            color="k", ls="none", label="configured point")
    ax.set_yscale("log")
    ax.set_xlim(p.min(), p.max())
    ax.set_ylim(bottom, top)
    ax.set_xlabel("Fill pressure (bar)")
    ax.set_ylabel("Pulse energy before coupling (uJ)")
    ax.set_title("Operating envelope (analytic estimates, no propagation)")
    ax.legend(loc="lower left", fontsize="small", title="lines are model estimates",
              title_fontsize="small", framealpha=0.85)
    return ax


def _contours(ax, p, e, result, which: str) -> None:
    if which in ("duration", "both"):
        values = np.asarray(result.compressed_duration) * FS
        levels = _levels(values, DURATION_LEVELS_FS)
        if levels:
            cs = ax.contour(p, e, values, levels=levels, colors="0.35", linewidths=0.8)
            ax.clabel(cs, fmt="%g fs", fontsize="x-small")
    if which in ("cutoff", "both"):
        values = np.asarray(result.thz_cutoff) * THZ
        levels = _levels(values, CUTOFF_LEVELS_THZ)
        if levels:
            cs = ax.contour(p, e, values, levels=levels, colors="C2", linewidths=0.8,
                            linestyles=":")
            ax.clabel(cs, fmt="%g THz", fontsize="x-small")
