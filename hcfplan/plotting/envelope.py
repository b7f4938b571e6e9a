"""Figure of the operating envelope (:class:`hcfplan.planning.envelope.EnvelopeResult`).

Draws into the given ``ax`` and returns it; converts SI to display units (bar, uJ, fs, THz)
here only, recomputes nothing. The duration and THz contours are labelled SPM-only estimates;
THz cutoff contours are drawn only below the crystal model's limit (``thz_model_limit``), the
region beyond it is hatched and labelled;
the points of a GNLSE check (:class:`hcfplan.planning.envelope_check.EnvelopeCheck`) are marked
and annotated with their ratio, or the title says the estimates are unchecked.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.plotting.layout import legend_beside

if TYPE_CHECKING:
    from matplotlib.axes import Axes

    from hcfplan.planning.envelope import EnvelopeResult
    from hcfplan.planning.envelope_check import EnvelopeCheck

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


def plot_envelope(ax: Axes, result: EnvelopeResult, *, contours: str = "duration",
                  check: EnvelopeCheck | None = None) -> Axes:
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
    check : EnvelopeCheck, optional
        GNLSE check of the estimates: its points are marked (white diamonds) and annotated with
        chain/estimate; without it the title says the estimates are unchecked.

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
            label=f"self-focusing: P_cr/P = {result.self_focusing_margin:g} "
                  "(the required margin; estimate)")
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
    ax.set_xlabel(f"{result.pressure_axis.capitalize()} (bar)")
    ax.set_ylabel("Pulse energy before coupling (µJ)")
    _check_marks(ax, check)
    ax.set_title("Operating envelope: analytic limits, SPM-only estimate contours\n"
                 + _check_title(check), fontsize="medium")
    legend_beside(ax, title="lines: model estimates;\ncontours: SPM-only estimates",
                  title_fontsize="small")
    return ax


def _contours(ax, p, e, result, which: str) -> None:
    if which in ("duration", "both"):
        values = np.asarray(result.compressed_duration) * FS
        levels = _levels(values, DURATION_LEVELS_FS)
        if levels:
            cs = ax.contour(p, e, values, levels=levels, colors="0.35", linewidths=0.8)
            ax.clabel(cs, fmt="%g fs (SPM-only)", fontsize="x-small")
            ax.plot([], [], color="0.35", lw=0.8,
                    label="compressed FWHM, SPM-only estimate (fs)")
    if which in ("cutoff", "both"):
        # the thin-crystal estimate has no geometry: say so for a tilted front
        tilted = ("\n(thin crystal: no tilted front in it)"
                  if getattr(result, "thz_geometry", "collinear") == "tilted_front" else "")
        values = np.asarray(result.thz_cutoff) * THZ
        limit = result.thz_model_limit * THZ
        levels = [v for v in _levels(values, CUTOFF_LEVELS_THZ) if v < limit]
        if levels:
            cs = ax.contour(p, e, values, levels=levels, colors="C2", linewidths=0.8,
                            linestyles=":")
            ax.clabel(cs, fmt="%g THz (SPM-only)", fontsize="x-small")
            ax.plot([], [], color="C2", lw=0.8, ls=":",
                    label=f"THz cutoff, SPM-only thin-crystal estimate (THz){tilted}")
        _beyond_model(ax, p, e, values, limit, result.thz_model, tilted)


def _beyond_model(ax, p, e, values, limit: float, model: str, suffix: str = "") -> None:
    """Hatch the map where the THz cutoff estimate lies above the crystal model's range: no
    cutoff contour is drawn there (the model says nothing about those frequencies)."""
    finite = values[np.isfinite(values)]
    if not np.isfinite(limit) or finite.size == 0 or finite.max() <= limit:
        return
    top = max(float(finite.max()), limit) * 2.0
    filled = ax.contourf(p, e, np.where(np.isfinite(values), values, -1.0),
                         levels=[limit, top], colors="none", hatches=["x"])
    filled.set_edgecolor("0.45")  # the hatch colour
    filled.set_linewidth(0)
    owner = f"the {model} model" if model else "the crystal model"
    if finite.min() < limit:
        cs = ax.contour(p, e, values, levels=[limit], colors="C2", linewidths=1.0)
        ax.clabel(cs, fmt=f"%g THz: {model or 'crystal'} model limit", fontsize="x-small")
    ax.fill_between([], [], [], facecolor="none", edgecolor="0.45", hatch="x", lw=0,
                    label=f"THz cutoff estimate beyond {owner} (> {limit:.3g} THz): "
                          f"no cutoff drawn{suffix}")


def _check_title(check) -> str:
    from hcfplan.planning.envelope_check import outside

    if check is None:
        return "contours unchecked (no GNLSE check run)"
    if not check.points:
        return "contours unchecked (no map point within the limits)"
    flagged = sum(1 for pt in check.points if outside(pt.ratio, check.factor))
    return (f"GNLSE check at {len(check.points)} points: "
            f"{flagged} off by more than x{check.factor:g}")


def _check_marks(ax, check) -> None:
    """White diamonds at the check points; the ratio beside each, a sentence where it is off."""
    from hcfplan.planning.envelope_check import disagreement

    if check is None or not check.points:
        return
    for k, pt in enumerate(check.points):
        x, y = pt.pressure * BAR, pt.energy * UJ
        ax.plot([x], [y], marker="D", ms=7, mfc="white", mec="k", ls="none",
                label="GNLSE check point (chain vs SPM-only estimate)" if k == 0 else None)
        phrase = disagreement(pt.ratio, factor=check.factor)
        if phrase:
            text = phrase.replace(" than ", "\nthan ")
        elif np.isfinite(pt.ratio):
            text = f"GNLSE check: x{pt.ratio:.2g} (agrees)"
        else:
            text = "GNLSE check: void"
        lo, hi = ax.get_xlim()  # keep the text inside the axes, rows alternating
        third = min(int(3 * (x - lo) / (hi - lo)), 2)
        ax.annotate(text, (x, y), xytext=((6, 0, -6)[third], -16 - 26 * (k % 2)),
                    textcoords="offset points", ha=("left", "center", "right")[third],
                    va="top",
                    fontsize="x-small", color="k",
                    bbox={"boxstyle": "round,pad=0.2", "fc": "white", "alpha": 0.8, "lw": 0})
