"""Measured against modelled output spectra of a calibration
(:class:`hcfplan.planning.calibrate.CalibrationResult`). Nothing here recomputes physics."""

from __future__ import annotations

import numpy as np

from hcfplan.plotting.layout import legend_beside


def draw_calibration(fig, result):
    """One axes: each measured spectrum (solid) and the calibrated model (dashed) in dB of
    their own peaks versus wavelength; the fitted band is the measured samples shown."""
    ax = fig.subplots()
    for i, m in enumerate(result.measurements):
        colour = f"C{i % 10}"
        band = result.band[i]
        wavelength_nm = np.asarray(m.wavelength)[band] * 1e9
        name = m.source.name + (f" ({', '.join(m.overrides)})" if m.overrides else "")
        ax.plot(wavelength_nm, result.measured_db[i][band], color=colour, lw=1.2,
                label=f"measured {name}")
        offset = float(np.mean(result.modelled_db[i][band] - result.measured_db[i][band]))
        ax.plot(wavelength_nm, result.modelled_db[i][band] - offset, color=colour, lw=1.2,
                ls="--", label="model, calibrated")
    from hcfplan.planning.calibrate import FIT_PARAMETERS

    fitted = ", ".join(f"{FIT_PARAMETERS[n].path} = {result.values[n]:.4g} \u00b1 "
                       f"{result.uncertainties[n]:.2g}" for n in result.names)
    ax.set_title(f"Calibration: {fitted}\nresidual {result.residual_db:.2f} dB RMS, "
                 f"fit {result.quality}", fontsize="medium")
    ax.set_xlabel("Wavelength (nm)")
    ax.set_ylabel("Spectral density per wavelength (dB, own peak)")
    legend_beside(ax)
    return ax
