"""The overview figure of a run with cascaded stages: duration and spectrum after each stage.

Draws from a staged :class:`~hcfplan.planning.chain.ChainResult` (``chain.stages`` holds every
stage's result); nothing is recomputed but unit conversions and the Jacobian to densities
per wavelength. Per-stage figures are the run's own figures drawn from each stage's result
(:func:`hcfplan.plotting.report.figure_jobs`).
"""

from __future__ import annotations

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.layout import legend_beside, setup_line, shown
from hcfplan.plotting.levels import decibels, per_wavelength

#: Lowest spectral level shown, relative to the highest peak. [dB]
OVERVIEW_RANGE_DB = 50.0


def _after_stage(chain):
    """(wavelength [nm] ascending, spectral density per wavelength) after a stage's
    compressor, or after its fiber when it has no compressed pulse."""
    grid = chain.grid
    spectrum = (chain.compression.spectrum if chain.compression is not None
                else chain.propagation.field_out_spectrum)
    wavelength = grid.shifted(grid.wavelength)[::-1]
    density = grid.shifted(np.abs(spectrum) ** 2)[::-1]
    return wavelength * 1e9, per_wavelength(c / wavelength, density)


def draw_stages_overview(fig, chain):
    """Left: pulse FWHM at the laser and after each stage's compressor (with the transform
    limit of each stage's output). Right: the spectra after each stage, dB relative to the
    highest peak."""
    ax_t, ax_s = fig.subplots(1, 2, gridspec_kw={"width_ratios": [2, 3]})
    fig.set_size_inches(12, 4.8)
    fig.subplots_adjust(wspace=0.35, right=0.8, bottom=0.2)
    stages = chain.stages
    labels = ["laser"] + [f"stage {k}" for k in range(len(stages))]
    first = stages[0].propagation
    from hcfplan.pulse.metrics import envelope_fwhm

    durations = [float(envelope_fwhm(stages[0].grid, first.field_in_t))]
    limits = [np.nan]
    for stage in stages:
        m = stage.compression.metrics if stage.compression is not None else None
        durations.append(m.fwhm if m is not None else np.nan)
        limits.append(m.transform_limited_fwhm if m is not None else np.nan)
    x = np.arange(len(labels))
    ax_t.semilogy(x, np.asarray(durations) * 1e15, "o-", color="C0", label="compressed FWHM")
    ax_t.semilogy(x, np.asarray(limits) * 1e15, "s--", color="0.5", label="transform limit")
    ax_t.set_xticks(x, labels)
    ax_t.set_ylabel("Pulse duration FWHM (fs)")
    ax_t.set_title("Duration after each stage", fontsize="medium")
    ax_t.legend(loc="upper right", fontsize="small")
    curves = [_after_stage(stage) for stage in stages]
    peak = max(float(d.max()) for _, d in curves)
    floor = peak * 10 ** (-OVERVIEW_RANGE_DB / 10)
    lit = np.concatenate([wl[d > floor] for wl, d in curves])
    lo, hi = (float(lit.min()), float(lit.max())) if lit.size else (None, None)
    for k, (wl, density) in enumerate(curves):
        if lo is not None:
            wl, density = shown(wl, lo, hi, density)
        ax_s.plot(wl, decibels(density, peak, -OVERVIEW_RANGE_DB),
                  label=f"after stage {k}\n{setup_line(stages[k].config)}", color=f"C{k}")
    if lo is not None:
        ax_s.set_xlim(lo, hi)
    ax_s.set_ylim(-OVERVIEW_RANGE_DB, 3)
    ax_s.set_xlabel("Wavelength (nm)")
    ax_s.set_ylabel("Spectral energy density per nm\n(dB rel. the highest peak)")
    ax_s.set_title("Spectrum after each stage's compressor", fontsize="medium")
    legend_beside(ax_s)
    return ax_t
