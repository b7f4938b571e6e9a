"""Plots of a :class:`~hcfplan.propagation.result.PropagationResult`.

Each function takes ``ax`` and the result and returns ``ax``.

Display units are applied here only: wavelength in nm, time in fs, z in m, energy in µJ.
Nothing is recomputed except unit conversions and the Jacobian to per-wavelength densities.
Spectral levels are energy densities per unit wavelength (per nm), in dB relative to the
peak named in the axis label. Only the samples inside the shown range are drawn.
"""

from __future__ import annotations

from typing import Literal

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.layout import legend_beside, plain_log_ticks, shown
from hcfplan.plotting.levels import decibels, per_wavelength

#: Lowest level shown in the logarithmic spectral plots, relative to the peak. [dB]
DYNAMIC_RANGE_DB = 60.0
#: Level above which the spectral image sets its wavelength span. [dB]
IMAGE_RANGE_DB = 40.0
#: Label of the per-wavelength spectral levels (relative to the common peak).
SPECTRAL_DB_LABEL = "Spectral energy density per nm\n(dB rel. the higher peak of the two)"
#: With ``z_scale="auto"`` the evolution map takes a log z axis when the spectrum reaches this
#: share of its final -20 dB width within the first tenth of the fiber.
EARLY_WIDTH_SHARE = 0.8


def _per_wavelength(result, density: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Ascending wavelength [nm] and |A~|^2 per unit wavelength (J/Hz * c / lambda^2)."""
    grid = result.grid
    wavelength = grid.shifted(grid.wavelength)[::-1]
    values = grid.shifted(np.asarray(density, dtype=float))[..., ::-1]
    return wavelength * 1e9, per_wavelength(c / wavelength, values)


def _db(values: np.ndarray, peak: float) -> np.ndarray:
    return decibels(values, peak, -DYNAMIC_RANGE_DB)


def _span(x: np.ndarray, keep: np.ndarray, margin: float = 0.1) -> tuple[float, float]:
    """The x range where ``keep`` holds, with a relative margin (all of x if nowhere)."""
    inside = x[keep] if np.any(keep) else x
    span = inside.max() - inside.min() or abs(inside.max()) or 1.0
    return float(inside.min() - margin * span), float(inside.max() + margin * span)


def plot_spectra_in_out(ax, result):
    """Input and output spectral energy density per nm, dB relative to the common peak."""
    wl, s_in = _per_wavelength(result, result.spectrum_z[0])
    _, s_out = _per_wavelength(result, result.spectrum_z[-1])
    peak = max(s_in.max(), s_out.max())
    lo, hi = _span(wl, np.maximum(s_in, s_out) > peak * 10 ** (-DYNAMIC_RANGE_DB / 10))
    wl, s_in, s_out = shown(wl, lo, hi, s_in, s_out)
    ax.plot(wl, _db(s_in, peak), label="input", color="0.5")
    ax.plot(wl, _db(s_out, peak), label=f"fiber output\n(z = {result.z[-1]:.3g} m)", color="C0")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel(SPECTRAL_DB_LABEL)
    ax.set_ylim(-DYNAMIC_RANGE_DB, 3)
    ax.set_xlim(lo, hi)
    legend_beside(ax)
    return ax


def dynamics_are_early(result) -> bool:
    """Whether the spectrum reaches EARLY_WIDTH_SHARE of its final -20 dB width (in samples of
    the frequency grid) within the first tenth of the fiber (then a log z axis shows them)."""
    z = np.asarray(result.z)
    if z.size < 4 or z[-1] <= 0:
        return False
    dens = np.asarray(result.spectrum_z, dtype=float)
    widths = np.sum(dens > dens.max(axis=1, keepdims=True) * 1e-2, axis=1)
    grown = widths - widths[0]
    if grown[-1] <= 0:
        return False
    early = grown[z <= 0.1 * z[-1]].max()
    return bool(early >= EARLY_WIDTH_SHARE * grown[-1])


def plot_spectral_evolution(ax, result, *, z_scale: Literal["linear", "log", "auto"] = "auto"):
    """Spectral energy density per nm along z as an image (dB relative to the overall peak).

    ``z_scale``: ``"log"`` spreads the first part of the fiber (from the first z sample after
    the input), ``"auto"`` takes it when :func:`dynamics_are_early`.
    """
    wl, dens = _per_wavelength(result, result.spectrum_z)
    peak = dens.max()
    lo, hi = _span(wl, dens.max(axis=0) > peak * 10 ** (-IMAGE_RANGE_DB / 10), margin=0.05)
    wl, dens = shown(wl, lo, hi, dens)
    image = decibels(dens, peak, -IMAGE_RANGE_DB - 1)
    z = np.asarray(result.z)
    log_z = z_scale == "log" or (z_scale == "auto" and dynamics_are_early(result))
    if log_z and z.size > 2 and z[1] > 0:
        z, image = z[1:], image[1:]
        ax.set_yscale("log")
        plain_log_ticks(ax.yaxis)
    mesh = ax.pcolormesh(wl, z, image, shading="auto", vmin=-IMAGE_RANGE_DB, vmax=0,
                         rasterized=True)
    ax.figure.colorbar(mesh, ax=ax, label="Spectral energy density per nm\n(dB rel. peak)")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Position z (m, log scale)" if ax.get_yscale() == "log" else "Position z (m)")
    ax.set_xlim(lo, hi)
    return ax


def plot_temporal_in_out(ax, result):
    """Temporal power at the input and at the last z (uncompressed)."""
    t = result.grid.time * 1e15
    p_in = np.abs(result.field_in_t) ** 2
    p_out = np.abs(result.field_out_t) ** 2
    both = p_in + p_out
    lo, hi = _span(t, both > both.max() * 1e-3)
    t, p_in, p_out = shown(t, lo, hi, p_in, p_out)
    ax.plot(t, p_in / 1e6, label="input", color="0.5")
    ax.plot(t, p_out / 1e6, label=f"fiber output\n(z = {result.z[-1]:.3g} m)", color="C0")
    ax.set_xlabel("Delay (fs)")
    ax.set_ylabel("Power (MW)")
    ax.set_xlim(lo, hi)
    legend_beside(ax)
    return ax


def plot_energy_and_ionization(ax, result, *, ionization_limit: float | None = None):
    """Pulse energy (left axis) and ionisation fraction behind the pulse (right, log) vs z,
    with the configured ionisation-fraction limit drawn as a line when given."""
    ax.plot(result.z, result.energy_z * 1e6, color="C0", label="pulse energy (left)")
    ax.set_xlabel("Position z (m)")
    ax.set_ylabel("Pulse energy (µJ)", color="C0")
    twin = ax.twinx()
    frac = np.clip(np.asarray(result.ionization_fraction_z, dtype=float), 1e-16, None)
    line = twin.semilogy(result.z, frac, color="C3", label="ionisation fraction (right)")
    handles = ax.get_lines() + line
    if ionization_limit is not None:
        handles += twin.plot(result.z[[0, -1]], [ionization_limit] * 2, color="C3", ls="--",
                             lw=1.0, label=f"ionisation limit {ionization_limit:g} (config)")
        top = max(ionization_limit, frac.max()) * 10
        twin.set_ylim(min(frac.min(), ionization_limit * 1e-3) / 3, top)
    plain_log_ticks(twin.yaxis)
    twin.set_ylabel("Ionisation fraction behind the pulse", color="C3")
    ax.legend(handles=handles, loc="upper left", bbox_to_anchor=(1.22, 1.0), borderaxespad=0.0,
              fontsize="small")
    return ax
