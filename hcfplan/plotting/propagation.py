"""Plots of a :class:`~hcfplan.propagation.result.PropagationResult`.

Each function takes ``ax`` and the result and returns ``ax``.

Display units are applied here only: wavelength in nm, time in fs, z in cm, energy in µJ.
Nothing is recomputed except unit conversions and the Jacobian to per-wavelength densities.
"""

from __future__ import annotations

import numpy as np

from ..constants import c

#: Lowest level shown in the logarithmic spectral plots, relative to the peak. [dB]
DYNAMIC_RANGE_DB = 60.0


def _per_wavelength(result, density: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Ascending wavelength [nm] and |A~|^2 per unit wavelength (J/Hz * c / lambda^2)."""
    grid = result.grid
    wavelength = grid.shifted(grid.wavelength)[::-1]
    values = grid.shifted(np.asarray(density, dtype=float))[..., ::-1]
    return wavelength * 1e9, values * c / wavelength**2


def _db(values: np.ndarray, peak: float) -> np.ndarray:
    with np.errstate(divide="ignore"):
        return np.maximum(10 * np.log10(values / peak), -DYNAMIC_RANGE_DB)


def plot_spectra_in_out(ax, result):
    """Input and output spectral density vs wavelength, dB relative to the output peak."""
    wl, s_in = _per_wavelength(result, result.spectrum_z[0])
    _, s_out = _per_wavelength(result, result.spectrum_z[-1])
    peak = max(s_in.max(), s_out.max())
    ax.plot(wl, _db(s_in, peak), label="input")
    ax.plot(wl, _db(s_out, peak), label=f"z = {result.z[-1] * 100:.3g} cm")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral density (dB)")
    ax.set_ylim(-DYNAMIC_RANGE_DB, 3)
    ax.legend()
    return ax


def plot_spectral_evolution(ax, result):
    """Spectral density (dB, per wavelength) versus wavelength and z as an image."""
    wl, s = _per_wavelength(result, result.spectrum_z)
    image = _db(s, s.max())
    mesh = ax.pcolormesh(wl, result.z * 100, image, shading="auto", vmin=-DYNAMIC_RANGE_DB, vmax=0)
    ax.figure.colorbar(mesh, ax=ax, label="dB")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("z (cm)")
    return ax


def plot_temporal_in_out(ax, result):
    """Instantaneous power of the input and output pulses versus delay."""
    t = result.grid.time * 1e15
    ax.plot(t, np.abs(result.field_in_t) ** 2 / 1e9, label="input")
    ax.plot(t, np.abs(result.field_out_t) ** 2 / 1e9, label=f"z = {result.z[-1] * 100:.3g} cm")
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (GW)")
    ax.legend()
    return ax


def plot_energy_and_ionization(ax, result):
    """Pulse energy (left axis) and ionisation fraction (right axis, log) versus z."""
    z = result.z * 100
    ax.plot(z, result.energy_z * 1e6, color="C0")
    ax.set_xlabel("z (cm)")
    ax.set_ylabel("Energy (µJ)", color="C0")
    right = ax.twinx()
    fraction = np.where(result.ionization_fraction_z > 0, result.ionization_fraction_z, np.nan)
    right.semilogy(z, fraction, color="C3")
    right.set_ylabel("Ionisation fraction", color="C3")
    return ax
