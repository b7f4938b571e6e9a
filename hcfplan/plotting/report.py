"""The figures of one ``simulate`` run, each drawn into a fresh figure from a ChainResult.

:data:`FIGURES` maps a file stem to a ``draw(fig, chain)`` function; :func:`applies` says
whether a figure exists for a run (no compressor or THz figure without those stages);
:func:`figure_jobs` lists the figures of a run folder for
:func:`hcfplan.io.results.write_figures`.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from hcfplan.plotting.propagation import (
    plot_energy_and_ionization,
    plot_spectra_in_out,
    plot_spectral_evolution,
    plot_temporal_in_out,
)


def _propagation_figure(fig, chain, plot: Callable, title: str):
    """One axes of ``fig`` with ``plot(ax, chain.propagation)`` and ``title``."""
    ax = plot(fig.subplots(), chain.propagation)
    ax.set_title(title)
    return ax


def draw_spectra(fig, chain):
    """Input and output spectral energy density per wavelength, dB."""
    return _propagation_figure(fig, chain, plot_spectra_in_out,
                               "Spectrum before and after the fiber")


def draw_spectral_evolution(fig, chain):
    """Spectrum along z as an image (dB relative to the overall peak)."""
    return _propagation_figure(fig, chain, plot_spectral_evolution,
                               "Spectral evolution along the fiber")


def draw_temporal(fig, chain):
    """Temporal power at the fiber input and output."""
    return _propagation_figure(fig, chain, plot_temporal_in_out,
                               "Temporal power before and after the fiber (uncompressed)")


def draw_energy_ionization(fig, chain):
    """Pulse energy and peak ionisation fraction along z."""
    return _propagation_figure(fig, chain, plot_energy_and_ionization,
                               "Energy and ionisation along the fiber")


def draw_compressed(fig, chain):
    """Compressed vs transform-limited pulse (linear and log) and residual phase."""
    from hcfplan.plotting.compression import plot_residual_phase, plot_temporal_intensity

    ax_lin, ax_log, ax_phase = fig.subplots(3, 1)
    fig.set_size_inches(7.5, 10)
    plot_temporal_intensity(ax_lin, chain.compression, scale="linear")
    plot_temporal_intensity(ax_log, chain.compression, scale="log", references=False)
    plot_residual_phase(ax_phase, chain.compression)
    return ax_lin


def draw_bounces(fig, chain):
    """Peak power against the number of chirped-mirror bounces."""
    from hcfplan.plotting.compression import plot_peak_power_vs_bounces

    return plot_peak_power_vs_bounces(fig.subplots(), chain.compression)


def draw_thz_result(fig, thz):
    """THz spectrum and coherence length of a :class:`~hcfplan.thz.generation.ThzResult` alone."""
    from hcfplan.plotting.thz import plot_coherence_length, plot_thz_spectrum

    ax_spec, ax_lc = fig.subplots(2, 1, sharex=True)
    fig.set_size_inches(7.5, 7.5)
    plot_thz_spectrum(ax_spec, thz)
    plot_coherence_length(ax_lc, thz)
    return ax_spec


def draw_thz(fig, chain):
    """THz spectrum with the cutoff, coherence length, driving spectrum, phase-matching map."""
    from hcfplan.plotting.thz import (
        plot_coherence_length,
        plot_optical_spectrum,
        plot_phase_matching_map,
        plot_thz_spectrum,
    )

    axes = fig.subplots(2, 2)
    fig.set_size_inches(13, 8.5)
    plot_thz_spectrum(axes[0, 0], chain.thz)
    plot_coherence_length(axes[1, 0], chain.thz)
    plot_optical_spectrum(axes[0, 1], chain.thz)
    if chain.phase_matching is not None:
        plot_phase_matching_map(axes[1, 1], chain.phase_matching,
                                max_length=4 * chain.thz.thickness)
        axes[1, 1].axhline(chain.config.laser.wavelength * 1e9, color="w", ls="--", lw=0.8)
    return axes[0, 0]


def draw_spread(fig, chain, spread):
    """Output spectra of the corner runs as a band around the nominal, and the value ranges."""
    import numpy as np

    from hcfplan.constants import c

    ax_spec, ax_range = fig.subplots(1, 2, gridspec_kw={"width_ratios": [3, 2]})
    fig.set_size_inches(12, 4.8)
    grid = chain.grid
    order = np.argsort(grid.frequency)
    freq = grid.frequency[order]
    nominal = np.abs(chain.propagation.field_out_spectrum[order]) ** 2
    curves = [np.interp(freq, r["spectrum"]["frequency_hz"],
                        r["spectrum"]["energy_density_j_per_hz"], left=0.0, right=0.0)
              for r in spread.corners if r["spectrum"]["frequency_hz"]]
    peak = max([nominal.max()] + [cv.max() for cv in curves])
    wl = c / freq * 1e9
    floor = 1e-4
    if curves:
        low, high = np.min(curves, axis=0), np.max(curves, axis=0)
        ax_spec.fill_between(wl, np.maximum(low / peak, floor), np.maximum(high / peak, floor),
                             color="C0", alpha=0.3, label=f"{len(curves)} corner runs")
    ax_spec.semilogy(wl, np.maximum(nominal / peak, floor), color="C0", label="nominal")
    lit = wl[nominal > peak * floor]
    if lit.size:
        ax_spec.set_xlim(lit.min() * 0.97, lit.max() * 1.03)
    ax_spec.set_ylim(floor, 2)
    ax_spec.set_xlabel("Wavelength (nm)")
    ax_spec.set_ylabel("Spectral density per Hz (norm.)")
    inputs = ", ".join(f"{k} ±{v:.0%}" for k, v in spread.spec.items)
    ax_spec.set_title(f"Fiber output over the input band ({inputs})", fontsize="small")
    ax_spec.legend()
    labels, lows, highs = [], [], []
    for label, r in spread.ranges.items():
        if r["nominal"]:
            labels.append(label)
            lows.append(100 * (r["low"] / r["nominal"] - 1))
            highs.append(100 * (r["high"] / r["nominal"] - 1))
    y = np.arange(len(labels))
    ax_range.barh(y, np.array(highs) - np.array(lows), left=lows, color="C1", alpha=0.6)
    ax_range.axvline(0.0, color="k", lw=0.8)
    ax_range.set_yticks(y, labels, fontsize="small")
    ax_range.set_xlabel("Range over the corners (% of nominal)")
    ax_range.set_title("How sure the predictions are", fontsize="small")
    return ax_spec


#: File stem -> draw function, from the most to the least costly to draw (demo config, 16384
#: points: 1.9, 1.7, 0.7, 0.6, 0.4, 0.3, 0.3 s), so that :func:`hcfplan.io.results.write_figures`
#: starts the costly ones first.
FIGURES: dict[str, Callable] = {
    "thz_spectrum": draw_thz,
    "compressed_pulse": draw_compressed,
    "spectral_evolution": draw_spectral_evolution,
    "energy_ionization": draw_energy_ionization,
    "temporal_in_out": draw_temporal,
    "spectrum_in_out": draw_spectra,
    "bounces": draw_bounces,
}

_NEEDS = {"compressed_pulse": "compression", "bounces": "compression", "thz_spectrum": "thz"}


def applies(name: str, chain) -> bool:
    """Whether the figure ``name`` can be drawn for ``chain``."""
    stage = _NEEDS.get(name)
    return stage is None or getattr(chain, stage) is not None


def figure_jobs(out_dir: Path, chain, spread=None) -> list[tuple[Path, Callable, tuple]]:
    """The figure jobs ``(path, draw, args)`` of a run folder, the costliest first.

    Parameters
    ----------
    out_dir : Path
        Run folder; every figure is ``out_dir / "<stem>.png"``.
    chain : ChainResult
        The run (:func:`hcfplan.planning.chain.run_chain`).
    spread : SpreadResult, optional
        Corner runs of ``--spread``; with corners, ``spread.png`` is drawn too.

    Returns
    -------
    list of tuple
        Jobs for :func:`hcfplan.io.results.write_figures`.
    """
    out_dir = Path(out_dir)
    jobs = [(out_dir / f"{name}.png", draw, (chain,))
            for name, draw in FIGURES.items() if applies(name, chain)]
    if spread is not None and spread.corners:
        jobs.insert(2, (out_dir / "spread.png", draw_spread, (chain, spread)))
    if chain.thz is not None:
        from hcfplan.planning.reports.thz import chain_waveforms
        from hcfplan.plotting.thz_time import draw_thz_waveform

        jobs.append((out_dir / "thz_waveform.png", draw_thz_waveform,
                     (chain.thz, chain_waveforms(chain.config, chain.thz))))
    return jobs
