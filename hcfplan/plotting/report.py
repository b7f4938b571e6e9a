"""The figures of one ``simulate`` run, each drawn into a fresh figure from a ChainResult.

:data:`FIGURES` maps a file stem to a ``draw(fig, chain)`` function; :func:`applies` says
whether a figure exists for a run (no compressor or THz figure without those stages).
"""

from __future__ import annotations

from collections.abc import Callable

from .propagation import (
    plot_energy_and_ionization,
    plot_spectra_in_out,
    plot_spectral_evolution,
    plot_temporal_in_out,
)


def draw_spectra(fig, chain):
    """Input and output spectral energy density per wavelength, dB."""
    ax = plot_spectra_in_out(fig.subplots(), chain.propagation)
    ax.set_title("Spectrum before and after the fiber")
    return ax


def draw_spectral_evolution(fig, chain):
    """Spectrum along z as an image (dB relative to the overall peak)."""
    ax = plot_spectral_evolution(fig.subplots(), chain.propagation)
    ax.set_title("Spectral evolution along the fiber")
    return ax


def draw_temporal(fig, chain):
    """Temporal power at the fiber input and output."""
    ax = plot_temporal_in_out(fig.subplots(), chain.propagation)
    ax.set_title("Temporal power before and after the fiber (uncompressed)")
    return ax


def draw_energy_ionization(fig, chain):
    """Pulse energy and peak ionisation fraction along z."""
    ax = plot_energy_and_ionization(fig.subplots(), chain.propagation)
    ax.set_title("Energy and ionisation along the fiber")
    return ax


def draw_compressed(fig, chain):
    """Compressed vs transform-limited pulse (linear and log) and residual phase."""
    from .compression import plot_residual_phase, plot_temporal_intensity

    ax_lin, ax_log, ax_phase = fig.subplots(3, 1)
    fig.set_size_inches(7.5, 10)
    plot_temporal_intensity(ax_lin, chain.compression, scale="linear")
    plot_temporal_intensity(ax_log, chain.compression, scale="log", references=False)
    plot_residual_phase(ax_phase, chain.compression)
    return ax_lin


def draw_bounces(fig, chain):
    """Peak power against the number of chirped-mirror bounces."""
    from .compression import plot_peak_power_vs_bounces

    return plot_peak_power_vs_bounces(fig.subplots(), chain.compression)


def draw_thz_result(fig, thz):
    """THz spectrum and coherence length of a :class:`~hcfplan.thz.ThzResult` alone."""
    from .thz import plot_coherence_length, plot_thz_spectrum

    ax_spec, ax_lc = fig.subplots(2, 1, sharex=True)
    fig.set_size_inches(7.5, 7.5)
    plot_thz_spectrum(ax_spec, thz)
    plot_coherence_length(ax_lc, thz)
    return ax_spec


def draw_thz(fig, chain):
    """THz spectrum with the cutoff, coherence length, driving spectrum, phase-matching map."""
    from .thz import (
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


FIGURES: dict[str, Callable] = {
    "spectrum_in_out": draw_spectra,
    "spectral_evolution": draw_spectral_evolution,
    "temporal_in_out": draw_temporal,
    "energy_ionization": draw_energy_ionization,
    "compressed_pulse": draw_compressed,
    "bounces": draw_bounces,
    "thz_spectrum": draw_thz,
}

_NEEDS = {"compressed_pulse": "compression", "bounces": "compression", "thz_spectrum": "thz"}


def applies(name: str, chain) -> bool:
    """Whether the figure ``name`` can be drawn for ``chain``."""
    stage = _NEEDS.get(name)
    return stage is None or getattr(chain, stage) is not None
