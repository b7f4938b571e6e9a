"""The figures of one ``simulate`` run, each drawn into a fresh figure from a ChainResult.

:data:`FIGURES` maps a file stem to a ``draw(fig, chain)`` function; :func:`applies` says
whether a figure exists for a run (no compressor or THz figure without those stages).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from ..constants import c

_FLOOR_DB = -60.0


def _db(values: np.ndarray, reference: float | None = None) -> np.ndarray:
    ref = np.max(values) if reference is None else reference
    return 10 * np.log10(np.maximum(values / ref, 10 ** (_FLOOR_DB / 10)))


def _wavelength_axis(grid):
    order = np.argsort(grid.frequency)
    freq = grid.frequency[order]
    keep = freq > 0
    return order[keep], c / freq[keep] * 1e9


def _per_wavelength(spectrum_j_per_hz: np.ndarray, wavelength_nm: np.ndarray) -> np.ndarray:
    wavelength = wavelength_nm * 1e-9
    return spectrum_j_per_hz * c / wavelength**2  # J/Hz -> J/m (Jacobian)


def draw_spectra(fig, chain):
    """Input and output spectral energy density per wavelength, dB."""
    ax = fig.subplots()
    prop, grid = chain.propagation, chain.grid
    order, wl = _wavelength_axis(grid)
    inp = _per_wavelength(np.abs(grid.to_spectrum(prop.field_in_t)) ** 2, wl)
    out = _per_wavelength(np.abs(prop.field_out_spectrum) ** 2, wl)
    peak = max(inp[order].max(), out[order].max())
    ax.plot(wl, _db(inp[order], peak), label="input", color="0.5")
    ax.plot(wl, _db(out[order], peak), label=f"fiber output (z = {prop.z[-1]:.3g} m)", color="C0")
    ax.set_ylim(_FLOOR_DB, 3)
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral energy density (dB)")
    ax.set_title("Spectrum before and after the fiber")
    ax.legend()
    return ax


def draw_spectral_evolution(fig, chain):
    """Spectrum along z as an image (dB relative to the overall peak)."""
    ax = fig.subplots()
    prop, grid = chain.propagation, chain.grid
    order, wl = _wavelength_axis(grid)
    dens = np.asarray(prop.spectrum_z, dtype=float)[:, order]
    image = _db(dens, dens.max())
    mesh = ax.pcolormesh(wl, prop.z, image, shading="auto", vmin=-40, vmax=0)
    fig.colorbar(mesh, ax=ax, label="Spectral energy density (dB)")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Position z (m)")
    ax.set_title("Spectral evolution along the fiber")
    band = wl[(image.max(axis=0) > -40)]
    if band.size:
        ax.set_xlim(band.min() * 0.95, band.max() * 1.05)
    return ax


def draw_temporal(fig, chain):
    """Temporal power at the fiber input and output."""
    ax = fig.subplots()
    prop, grid = chain.propagation, chain.grid
    t_fs = grid.time * 1e15
    ax.plot(t_fs, np.abs(prop.field_in_t) ** 2 / 1e6, label="input", color="0.5")
    ax.plot(t_fs, np.abs(prop.field_out_t) ** 2 / 1e6, label="fiber output", color="C0")
    power = np.abs(prop.field_out_t) ** 2 + np.abs(prop.field_in_t) ** 2
    on = t_fs[power > power.max() * 1e-3]
    if on.size:
        span = on.max() - on.min()
        ax.set_xlim(on.min() - 0.1 * span, on.max() + 0.1 * span)
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (MW)")
    ax.set_title("Temporal power before and after the fiber (uncompressed)")
    ax.legend()
    return ax


def draw_energy_ionization(fig, chain):
    """Pulse energy and peak ionisation fraction along z."""
    ax = fig.subplots()
    prop = chain.propagation
    ax.plot(prop.z, prop.energy_z * 1e6, color="C0")
    ax.set_xlabel("Position z (m)")
    ax.set_ylabel("Energy (uJ)", color="C0")
    twin = ax.twinx()
    frac = np.asarray(prop.ionization_fraction_z, dtype=float)
    twin.semilogy(prop.z, np.clip(frac, 1e-12, None), color="C3")
    twin.set_ylabel("Ionisation fraction behind the pulse", color="C3")
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
    """THz power spectrum with the cutoff, and the coherence length."""
    return draw_thz_result(fig, chain.thz)


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
