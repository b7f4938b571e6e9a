"""The figures of one ``simulate`` run, each drawn into a fresh figure from a ChainResult.

:data:`FIGURES` maps a file stem to a ``draw(fig, chain)`` function (the registry of figure
names); :data:`DEFAULT_FIGURES` are the ones a run draws unless asked for others
(:func:`select_figures` reads ``--figures``); :func:`applies` says whether a figure exists for
a run (no compressor or THz figure without those stages); :func:`figure_jobs` lists the figures
of a run folder for :func:`hcfplan.io.results.write_figures`.
"""

from __future__ import annotations

import textwrap
from collections.abc import Callable
from pathlib import Path

from hcfplan.plotting.layout import key_name, setup_line
from hcfplan.plotting.modes import draw_mode_energy, draw_mode_spectra
from hcfplan.plotting.propagation import (
    plot_energy_and_ionization,
    plot_spectra_in_out,
    plot_spectral_evolution,
    plot_temporal_in_out,
)


def _propagation_figure(fig, chain, plot: Callable, title: str, **kwargs):
    """One axes of ``fig`` with ``plot(ax, chain.propagation, **kwargs)`` and ``title`` (with
    the gas, pressure and fiber of the run on a second line)."""
    ax = plot(fig.subplots(), chain.propagation, **kwargs)
    setup = setup_line(chain.config)
    ax.set_title(f"{title}\n{setup}" if setup else title, fontsize="medium")
    return ax


def draw_spectra(fig, chain):
    """Input and output spectral energy density per nm, dB relative to the higher peak."""
    return _propagation_figure(fig, chain, plot_spectra_in_out,
                               "Spectrum before and after the fiber")


def draw_spectral_evolution(fig, chain, z_scale: str = "auto"):
    """Spectrum per nm along z as an image (dB relative to the overall peak); ``z_scale``
    ``"auto"`` takes a log z axis where the dynamics happen in the first tenth of the fiber."""
    return _propagation_figure(fig, chain, plot_spectral_evolution,
                               "Spectral evolution along the fiber", z_scale=z_scale)


def draw_temporal(fig, chain):
    """Temporal power at the fiber input and output."""
    return _propagation_figure(fig, chain, plot_temporal_in_out,
                               "Temporal power before and after the fiber (uncompressed)")


def draw_energy_ionization(fig, chain):
    """Pulse energy and ionisation fraction along z, with the configured ionisation limit."""
    limits = getattr(chain.config, "limits", None)
    return _propagation_figure(
        fig, chain, plot_energy_and_ionization, "Energy and ionisation along the fiber",
        ionization_limit=getattr(limits, "ionization_fraction_limit", None))


def draw_compressed(fig, chain):
    """Compressed vs transform-limited pulse (linear and log) and residual phase."""
    from hcfplan.plotting.compression import plot_residual_phase, plot_temporal_intensity

    ax_lin, ax_log, ax_phase = fig.subplots(3, 1)
    fig.set_size_inches(7.5, 10)
    fig.subplots_adjust(hspace=0.35)
    plot_temporal_intensity(ax_lin, chain.compression, scale="linear")
    plot_temporal_intensity(ax_log, chain.compression, scale="log", references=False)
    plot_residual_phase(ax_phase, chain.compression, band=_mirror_band(chain))
    ax_lin.set_title("Compressed pulse against the transform limit", fontsize="medium")
    return ax_lin


def _mirror_band(chain):
    """The configured mirror band [m] or None."""
    return getattr(getattr(chain.config, "compressor", None), "mirror_band", None)


def draw_bounces(fig, chain):
    """Peak power against the number of chirped-mirror bounces."""
    from hcfplan.plotting.compression import plot_peak_power_vs_bounces

    ax = plot_peak_power_vs_bounces(fig.subplots(), chain.compression)
    ax.set_title("Peak power against the bounce count", fontsize="medium")
    return ax


def draw_thz_result(fig, thz):
    """THz spectrum and coherence length of a :class:`~hcfplan.thz.generation.ThzResult` alone
    (one THz range on both panels)."""
    from hcfplan.plotting.thz import plot_coherence_length, plot_thz_spectrum, thz_range

    ax_spec, ax_lc = fig.subplots(2, 1, sharex=True)
    fig.set_size_inches(7.5, 7.5)
    f_range = thz_range(thz)
    plot_thz_spectrum(ax_spec, thz, f_range=f_range)
    plot_coherence_length(ax_lc, thz, f_range=f_range)
    return ax_spec


def draw_thz(fig, chain):
    """THz spectrum with the cutoff, coherence length and phase-matching map over one THz range
    (beyond the crystal model shaded on each), and the driving spectrum."""
    from hcfplan.plotting.thz import (
        plot_coherence_length,
        plot_optical_spectrum,
        plot_phase_matching_map,
        plot_thz_spectrum,
        thz_range,
    )

    rows = 4 if chain.phase_matching is not None else 3
    axes = fig.subplots(rows, 1)
    fig.set_size_inches(7.5, 3.3 * rows)
    fig.subplots_adjust(hspace=0.55)
    f_range = thz_range(chain.thz)
    plot_thz_spectrum(axes[0], chain.thz, f_range=f_range)
    plot_coherence_length(axes[1], chain.thz, f_range=f_range)
    if chain.phase_matching is not None:
        plot_phase_matching_map(axes[2], chain.phase_matching, f_range=f_range,
                                max_length=4 * chain.thz.thickness,
                                model_limit=chain.thz.model_limit)
        axes[2].axhline(chain.config.laser.wavelength * 1e9, color="w", ls="--", lw=0.8)
    plot_optical_spectrum(axes[-1], chain.thz)
    return axes[0]


def draw_spread(fig, chain, spread):
    """Output spectra of the corner runs as a band around the nominal, and the value ranges."""
    import numpy as np

    from hcfplan.constants import c

    ax_spec, ax_range = fig.subplots(1, 2, gridspec_kw={"width_ratios": [3, 2]})
    fig.set_size_inches(12, 4.8)
    fig.subplots_adjust(wspace=0.6)
    grid = chain.grid
    order = np.argsort(grid.frequency)
    freq = grid.frequency[order]
    from hcfplan.planning.mode_run import exit_density

    nominal = exit_density(chain.propagation)[order]  # multimode: the whole beam
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
    ax_spec.set_ylabel("Spectral energy density per Hz\n(rel. highest peak)")
    inputs = ", ".join(f"{key_name(k)} ±{v:.0%}" for k, v in spread.spec.items)
    ax_spec.set_title(textwrap.fill(f"Fiber output over the input band ({inputs})", 60),
                      fontsize="small")
    ax_spec.legend(loc="upper left", bbox_to_anchor=(0.0, -0.2), borderaxespad=0.0,
                   fontsize="small", ncols=2)
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


def draw_thz_waveform_of_run(fig, chain):
    """The THz field and the EO-sampled waveform in time (left) beside their spectra (right)."""
    from hcfplan.planning.reports.thz import chain_waveforms
    from hcfplan.plotting.thz_time import draw_thz_waveform

    return draw_thz_waveform(fig, chain.thz, chain_waveforms(chain.config, chain.thz))


#: File stem -> draw function ``draw(fig, chain)`` of every figure of a run, from the most to
#: the least costly to draw (CPU time for the demo config: 0.41, 0.35, 0.31, 0.22, 0.18, 0.13,
#: 0.11 s), so that :func:`hcfplan.io.results.write_figures` starts the costly ones first. Each
#: draws into the figure (or subfigure) it is given, so any of them can be drawn by name.
FIGURES: dict[str, Callable] = {
    "thz_spectrum": draw_thz,
    "compressed_pulse": draw_compressed,
    "energy_ionization": draw_energy_ionization,
    "bounces": draw_bounces,
    "spectral_evolution": draw_spectral_evolution,
    "spectrum_in_out": draw_spectra,
    "temporal_in_out": draw_temporal,
    "thz_waveform": draw_thz_waveform_of_run,
    "mode_energy": draw_mode_energy,
    "mode_spectra": draw_mode_spectra,
}

#: The figures ``simulate`` draws unless ``--figures`` asks for others (``all``, or names); the
#: mode figures exist for multimode runs (``fiber.modes`` > 1) only (:func:`applies`).
DEFAULT_FIGURES: tuple[str, ...] = ("spectrum_in_out", "compressed_pulse", "thz_spectrum",
                                    "mode_energy", "mode_spectra")

_NEEDS = {"compressed_pulse": "compression", "bounces": "compression", "thz_spectrum": "thz",
          "thz_waveform": "thz", "mode_energy": "modes", "mode_spectra": "modes"}


def select_figures(choice: str | None) -> tuple[str, ...]:
    """The figure names of a ``--figures`` value: ``None`` or ``"default"`` gives
    :data:`DEFAULT_FIGURES`, ``"all"`` every figure of :data:`FIGURES`, otherwise a
    comma-separated list of names (``default`` and ``all`` may be among them).

    Raises
    ------
    ConfigError
        An unknown name, with the valid ones listed.
    """
    from hcfplan.errors import ConfigError

    names: list[str] = []
    for item in (choice or "default").split(","):
        item = item.strip()
        if item == "default":
            names += DEFAULT_FIGURES
        elif item == "all":
            names += FIGURES
        elif item in FIGURES:
            names.append(item)
        elif item:
            raise ConfigError(f"--figures {item!r}: unknown figure; choose 'default', 'all' or "
                              f"names from {', '.join(FIGURES)}")
    return tuple(name for name in FIGURES if name in names)


def applies(name: str, chain) -> bool:
    """Whether the figure ``name`` can be drawn for ``chain``."""
    stage = _NEEDS.get(name)
    return stage is None or getattr(chain, stage, None) is not None


def figure_jobs(out_dir: Path, chain, spread=None, names: tuple[str, ...] | None = None
                ) -> list[tuple[Path, Callable, tuple]]:
    """The figure jobs ``(path, draw, args)`` of a run folder, the costliest first.

    Parameters
    ----------
    out_dir : Path
        Run folder; every figure is ``out_dir / "<stem>.png"``.
    chain : ChainResult
        The run (:func:`hcfplan.planning.chain.run_chain`).
    spread : SpreadResult, optional
        Corner runs of ``--spread``; with corners, ``spread.png`` is drawn too.
        A run with cascaded stages adds :func:`stage_jobs` (the final stage's figures keep
        their plain names).
    names : tuple of str, optional
        The figures to draw (:func:`select_figures`); default :data:`DEFAULT_FIGURES`.

    Returns
    -------
    list of tuple
        Jobs for :func:`hcfplan.io.results.write_figures`.
    """
    out_dir = Path(out_dir)
    names = DEFAULT_FIGURES if names is None else names
    jobs = [(out_dir / f"{name}.png", draw, (chain,))
            for name, draw in FIGURES.items() if name in names and applies(name, chain)]
    if spread is not None and spread.corners:
        jobs.insert(min(2, len(jobs)), (out_dir / "spread.png", draw_spread, (chain, spread)))
    if getattr(chain, "stages", ()):
        jobs += stage_jobs(out_dir, chain, names)
    return jobs


def stage_jobs(out_dir: Path, chain, names: tuple[str, ...]) -> list[tuple[Path, Callable, tuple]]:
    """Figure jobs of a run with cascaded stages: ``stages_overview.png`` and, for each stage
    K before the final one, the figures ``names`` drawn from that stage as
    ``stage_K_<name>.png`` (the final stage's are the run's own, plain names)."""
    from hcfplan.plotting.stages import draw_stages_overview

    jobs = [(out_dir / "stages_overview.png", draw_stages_overview, (chain,))]
    for index, stage in enumerate(chain.stages[:-1]):
        jobs += [(out_dir / f"stage_{index}_{name}.png", draw, (stage,))
                 for name, draw in FIGURES.items() if name in names and applies(name, stage)]
    return jobs
