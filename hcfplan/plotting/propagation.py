"""Plots of a :class:`~hcfplan.propagation.result.PropagationResult`.

Each function takes ``ax`` and the result and returns ``ax``.

Display units are applied here only: wavelength in nm, time in fs, z in m, energy in µJ.
Nothing is recomputed except unit conversions and the Jacobian to per-wavelength densities.
"""

from __future__ import annotations

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.levels import decibels, per_wavelength

#: Lowest level shown in the logarithmic spectral plots, relative to the peak. [dB]
DYNAMIC_RANGE_DB = 60.0
#: Level above which the spectral image sets its wavelength span. [dB]
IMAGE_RANGE_DB = 40.0


def _per_wavelength(result, density: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Ascending wavelength [nm] and |A~|^2 per unit wavelength (J/Hz * c / lambda^2)."""
    grid = result.grid
    wavelength = grid.shifted(grid.wavelength)[::-1]
    values = grid.shifted(np.asarray(density, dtype=float))[..., ::-1]
    return wavelength * 1e9, per_wavelength(c / wavelength, values)


def _db(values: np.ndarray, peak: float) -> np.ndarray:
    return decibels(values, peak, -DYNAMIC_RANGE_DB)


def _crop(ax, x: np.ndarray, keep: np.ndarray, margin: float = 0.1) -> None:
    """Limit the x axis to where ``keep`` holds, with a relative margin."""
    shown = x[keep]
    if shown.size:
        span = shown.max() - shown.min() or abs(shown.max()) or 1.0
        ax.set_xlim(shown.min() - margin * span, shown.max() + margin * span)


def plot_spectra_in_out(ax, result):
    """Input and output spectral density vs wavelength, dB relative to the common peak."""
    wl, s_in = _per_wavelength(result, result.spectrum_z[0])
    _, s_out = _per_wavelength(result, result.spectrum_z[-1])
    peak = max(s_in.max(), s_out.max())
    ax.plot(wl, _db(s_in, peak), label="input", color="0.5")
    ax.plot(wl, _db(s_out, peak), label=f"fiber output (z = {result.z[-1]:.3g} m)", color="C0")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral density (dB)")
    ax.set_ylim(-DYNAMIC_RANGE_DB, 3)
    _crop(ax, wl, np.maximum(s_in, s_out) > peak * 10 ** (-DYNAMIC_RANGE_DB / 10))
    ax.legend()
    return ax


def plot_spectral_evolution(ax, result):
    """Spectral density along z as an image (dB relative to the overall peak)."""
    wl, dens = _per_wavelength(result, result.spectrum_z)
    image = _db(dens, dens.max())
    mesh = ax.pcolormesh(wl, result.z, image, shading="auto", vmin=-IMAGE_RANGE_DB, vmax=0)
    ax.figure.colorbar(mesh, ax=ax, label="Spectral density (dB)")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Position z (m)")
    _crop(ax, wl, image.max(axis=0) > -IMAGE_RANGE_DB, margin=0.05)
    return ax


def plot_temporal_in_out(ax, result):
    """Temporal power at the input and at the last z (uncompressed)."""
    t = result.grid.time * 1e15
    p_in = np.abs(result.field_in_t) ** 2
    p_out = np.abs(result.field_out_t) ** 2
    ax.plot(t, p_in / 1e6, label="input", color="0.5")
    ax.plot(t, p_out / 1e6, label=f"fiber output (z = {result.z[-1]:.3g} m)", color="C0")
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (MW)")
    both = p_in + p_out
    _crop(ax, t, both > both.max() * 1e-3)
    ax.legend()
    return ax


def plot_energy_and_ionization(ax, result):
    """Pulse energy (left axis) and ionisation fraction behind the pulse (right, log) vs z."""
    ax.plot(result.z, result.energy_z * 1e6, color="C0")
    ax.set_xlabel("Position z (m)")
    ax.set_ylabel("Energy (µJ)", color="C0")
    twin = ax.twinx()
    frac = np.asarray(result.ionization_fraction_z, dtype=float)
    twin.semilogy(result.z, np.clip(frac, 1e-16, None), color="C3")
    twin.set_ylabel("Ionisation fraction behind the pulse", color="C3")
    return ax
