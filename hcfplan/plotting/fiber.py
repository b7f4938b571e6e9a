"""Figure of the linear fiber properties: GVD and loss versus wavelength."""

from __future__ import annotations

import numpy as np

from hcfplan.plotting.layout import legend_beside, plain_log_ticks, setup_line


def plot_dispersion_and_loss(fig, curves: dict, config=None):
    """Draw beta2 (top) and power loss (bottom) vs wavelength, pump and resonances marked.

    ``curves`` is the dict of :func:`hcfplan.planning.reports.fiber.dispersion_curves`;
    ``config`` (optional) names the gas, pressure and core in the title.
    Returns the two axes.
    """
    ax_gvd, ax_loss = fig.subplots(2, 1, sharex=True)
    wl_nm = np.asarray(curves["wavelength_m"]) * 1e9
    gvd = np.asarray(curves["beta2_s2_per_m"]) * 1e27  # fs^2/mm
    loss = np.asarray(curves["power_loss_db_per_m"])
    ax_gvd.plot(wl_nm, gvd, color="C0")
    ax_gvd.axhline(0.0, color="0.4", lw=0.8)
    finite = gvd[np.isfinite(gvd)]
    if finite.size:
        span = np.percentile(np.abs(finite), 90) * 1.5 or 1.0
        ax_gvd.set_ylim(-span, span)
    ax_gvd.set_ylabel("GVD β₂ (fs²/mm)")
    ax_loss.semilogy(wl_nm, np.clip(loss, 1e-6, None), color="C3")
    plain_log_ticks(ax_loss.yaxis)
    ax_loss.set_ylabel("Power loss (dB/m)")
    ax_loss.set_xlabel("Wavelength (nm)")
    for ax in (ax_gvd, ax_loss):
        ax.axvline(curves["pump_wavelength_m"] * 1e9, color="C2", ls="--", lw=1.0,
                   label="pump")
        for i, res in enumerate(curves.get("resonance_wavelengths_m", [])):
            if wl_nm.min() <= res * 1e9 <= wl_nm.max():
                ax.axvspan(res * 1e9 * 0.98, res * 1e9 * 1.02, color="0.6", alpha=0.3,
                           label="resonance band" if i == 0 else None)
    legend_beside(ax_gvd)
    setup = setup_line(config) if config is not None else ""
    ax_gvd.set_title("Fundamental-mode dispersion and loss" + (f"\n{setup}" if setup else ""),
                     fontsize="medium")
    return ax_gvd, ax_loss
