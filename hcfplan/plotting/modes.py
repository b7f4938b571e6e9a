"""Figures of a multimode capillary run (``fiber.modes`` > 1) and of a scan of such runs.

A run: the energy in each mode EH1m along the fiber (with the whole beam and the share of the
launch the modes did not take), and the exit spectrum of each mode with that of the whole
beam. A scan: the EH11 share of the exit energy against the varied energy or pressure (a line
for one key, a map for two), with the verdict's caution level. Nothing here recomputes
physics: the run's arrays and the scan's point records are drawn as they are.
"""

from __future__ import annotations

import textwrap

import numpy as np

from hcfplan.constants import c
from hcfplan.plotting.layout import key_label, legend_beside, plain_log_ticks, setup_line, shown
from hcfplan.plotting.levels import decibels, per_wavelength

#: Lowest level of the mode spectra, relative to the whole beam's peak. [dB]
MODE_SPECTRA_RANGE_DB = 60.0
#: Lowest energy drawn in the energy figure, relative to the launched beam. [1]
MODE_ENERGY_FLOOR = 1e-6


def _title(ax, chain, text: str) -> None:
    setup = setup_line(chain.config)
    ax.set_title(f"{text}\n{setup}" if setup else text, fontsize="medium")


def plot_mode_energy(ax, result, lost_fraction: float | None = None):
    """Energy of each mode and of the whole beam along z (log scale, µJ)."""
    energy = np.asarray(result.mode_energy_z, dtype=float) * 1e6
    total = np.asarray(result.energy_z, dtype=float) * 1e6
    floor = max(float(total.max()), 1e-300) * MODE_ENERGY_FLOOR
    ax.semilogy(result.z, np.maximum(total, floor), color="k", lw=1.5, label="whole beam")
    for m in range(energy.shape[1]):
        ax.semilogy(result.z, np.maximum(energy[:, m], floor), color=f"C{m}",
                    label=f"EH1{m + 1}")
    lowest = float(np.min(energy[energy > floor], initial=float(total.max())))
    ax.set_ylim(max(floor, 0.3 * lowest), float(total.max()) * 3)
    plain_log_ticks(ax.yaxis)
    ax.set_xlabel("Position z (m)")
    ax.set_ylabel("Energy (µJ)")
    if lost_fraction is not None:
        ax.plot([], [], " ", label=textwrap.fill(
            f"launch outside the modes: {lost_fraction:.2%} (lost)", 22))
    legend_beside(ax)
    return ax


def _per_nm(grid, density: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Ascending wavelength [nm] and a spectral density per unit wavelength."""
    wavelength = grid.shifted(grid.wavelength)[::-1]
    values = grid.shifted(np.asarray(density, dtype=float))[..., ::-1]
    return wavelength * 1e9, per_wavelength(c / wavelength, values)


def plot_mode_spectra(ax, result):
    """Exit spectrum of each mode and of the whole beam per nm, dB relative to the beam's
    peak."""
    grid = result.grid
    modes = np.abs(np.asarray(result.mode_spectra_out)) ** 2
    wl, beam = _per_nm(grid, modes.sum(axis=0))
    _, each = _per_nm(grid, modes)
    peak = float(beam.max()) or 1.0
    lit = wl[beam > peak * 10 ** (-MODE_SPECTRA_RANGE_DB / 10)]
    lo, hi = (lit.min(), lit.max()) if lit.size else (wl.min(), wl.max())
    span = hi - lo or 1.0
    lo, hi = lo - 0.1 * span, hi + 0.1 * span
    wl_shown, beam_shown, *each_shown = shown(wl, lo, hi, beam, *each)
    ax.plot(wl_shown, decibels(beam_shown, peak, -MODE_SPECTRA_RANGE_DB), color="k", lw=1.5,
            label="whole beam")
    for m, values in enumerate(each_shown):
        ax.plot(wl_shown, decibels(values, peak, -MODE_SPECTRA_RANGE_DB), color=f"C{m}",
                lw=1.0, label=f"EH1{m + 1}")
    ax.set_xlim(lo, hi)
    ax.set_ylim(-MODE_SPECTRA_RANGE_DB, 3)
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral energy density per nm\n(dB rel. the whole beam's peak)")
    legend_beside(ax)
    return ax


def draw_mode_energy(fig, chain):
    """Energy per mode along the fiber (a multimode run)."""
    ax = plot_mode_energy(fig.subplots(), chain.propagation, chain.modes.launch.lost_fraction)
    _title(ax, chain, "Energy per mode along the fiber")
    return ax


def draw_mode_spectra(fig, chain):
    """Exit spectra per mode and of the whole beam (a multimode run)."""
    ax = plot_mode_spectra(fig.subplots(), chain.propagation)
    _title(ax, chain, "Spectrum of each mode at the fiber exit")
    return ax


# ---------------------------------------------------------------------------------------------
# scans


def _eh11_value(record: dict) -> float:
    """``output.eh11_fraction`` of a point record (nan where there is none)."""
    value = record.get("summary", {}).get("output", {}).get("eh11_fraction")
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return np.nan
    return float(value)


def _eh11_void(record: dict) -> bool:
    """Whether the point's verdict voids its EH11 share (a failed run: always)."""
    from hcfplan.planning.verdict import verdict_of_record

    verdict = verdict_of_record(record)
    return verdict.invalid or verdict.void_reason("output.eh11_fraction") is not None


def _eh11(record: dict) -> float:
    """The EH11 share of a point, nan where it has none or its verdict voids it."""
    return np.nan if _eh11_void(record) else _eh11_value(record)


def _beyond(record: dict) -> bool:
    """Whether a point is beyond a modelled limit (or its run failed)."""
    return bool(record.get("margins", {}).get("binding")) or record.get("status") != "ok"


def has_eh11(records) -> bool:
    """Whether the points of a scan carry ``output.eh11_fraction`` (multimode runs)."""
    return any(np.isfinite(_eh11_value(r)) for r in records)


def _numeric(values: tuple) -> tuple[np.ndarray, list[str] | None]:
    if all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in values):
        return np.asarray(values, dtype=float), None
    return np.arange(len(values), dtype=float), [str(v) for v in values]


def draw_eh11_fraction(fig, keys: tuple[str, ...], values: tuple[tuple, ...], records):
    """EH11 share of the exit energy against one varied key (a line) or two (a map), with the
    level below which the verdict cautions. A share the point's verdict voids is a hollow grey
    marker at its value (at the foot of the panel without a number); points beyond a modelled
    limit are shaded (a map: crossed)."""
    from hcfplan.planning.mode_run import EH11_FRACTION_FLOOR

    ax = fig.subplots()
    y = np.array([_eh11(r) for r in records]) * 100
    raw = np.array([_eh11_value(r) for r in records]) * 100
    beyond = np.array([_beyond(r) for r in records], dtype=bool)
    floor = EH11_FRACTION_FLOOR * 100
    if len(keys) == 1:
        x, labels = _numeric(values[0])
        ok = np.isfinite(y)
        ax.plot(x[ok], y[ok], "o-", color="C0", label="EH11 share")
        at = ~ok & np.isfinite(raw)  # void numbers where they lie, the others at the foot
        if np.any(~ok):
            ax.plot(x[at], raw[at], "o", mfc="none", color="0.6", label="void or failed")
            ax.plot(x[~ok & ~at], np.full(int(np.sum(~ok & ~at)), 0.04), "o", mfc="none",
                    color="0.6", transform=ax.get_xaxis_transform(), clip_on=False)
        half = np.min(np.diff(x)) / 2 if x.size > 1 else 0.5
        for xi in x[beyond]:
            ax.axvspan(xi - half, xi + half, color="C3", alpha=0.15, lw=0)
        if np.any(beyond):
            ax.fill_between([], [], color="C3", alpha=0.15, lw=0,
                            label="beyond a modelled\nlimit (or failed)")
        ax.axhline(floor, color="C3", ls="--", lw=1,
                   label=textwrap.fill(f"caution below {floor:.0f} % (verdict)", 20))
        low = np.nanmin(np.concatenate([y, raw, [floor]]))
        ax.set_ylim(max(0.0, low - 0.1 * (100 - low) - 1), 100.5)
        if labels:
            ax.set_xticks(x, labels)
        ax.set_xlabel(key_label(keys[0]))
        ax.set_ylabel("EH11 share of the exit energy (%)")
        legend_beside(ax)
    else:
        x, xlabels = _numeric(values[0])
        yy, ylabels = _numeric(values[1])
        grid = y.reshape(x.size, yy.size)
        mesh = ax.pcolormesh(x, yy, grid.T, shading="nearest", vmax=100.0)
        fig.colorbar(mesh, ax=ax, label="EH11 share of the\nexit energy (%)")
        if np.nanmin(grid, initial=100.0) < floor < np.nanmax(grid, initial=0.0) \
                and min(x.size, yy.size) > 1:
            ax.contour(x, yy, grid.T, levels=[floor], colors="C3", linestyles="--")
        gx, gy = np.meshgrid(x, yy, indexing="ij")
        missing = ~np.isfinite(grid)
        outside = beyond.reshape(x.size, yy.size)
        ax.plot(gx[outside], gy[outside], "x", color="C3", ms=8)
        ax.plot(gx[missing], gy[missing], "o", mfc="none", color="0.6", ms=8)
        if xlabels:
            ax.set_xticks(x, xlabels)
        if ylabels:
            ax.set_yticks(yy, ylabels)
        ax.set_xlabel(key_label(keys[0]))
        ax.set_ylabel(key_label(keys[1]))
    marks = ("shaded: beyond a modelled limit" if len(keys) == 1
             else "x: beyond a modelled limit; grey circle: void or failed")
    ax.set_title(textwrap.fill("EH11 share of the exit energy (multimode runs); "
                               f"{marks}; red dashed: verdict caution below {floor:.0f} %",
                               60), fontsize="small")
    return ax
