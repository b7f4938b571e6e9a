"""THz waveform figure: the field E(t) and the EO-sampled waveform S(tau) beside their spectra.

Reads a :class:`hcfplan.thz.generation.ThzResult` and its
:class:`hcfplan.thz.waveforms.ThzWaveforms`; converts to display units only (no physics).
"""

from __future__ import annotations

from typing import Any

import numpy as np

from hcfplan.plotting.levels import decibels
from hcfplan.plotting.thz import shade_beyond_model

_FLOOR_DB = -50.0  # lowest level drawn on the dB axis


def _window(time: np.ndarray, *curves: np.ndarray) -> tuple[float, float]:
    """Time range holding every sample above 2 % of each curve's peak, with a margin. [s]"""
    lit = np.zeros(time.shape, dtype=bool)
    for curve in curves:
        lit |= np.abs(curve) > 0.02 * np.max(np.abs(curve))
    lo, hi = time[lit].min(), time[lit].max()
    pad = 0.1 * (hi - lo) + 0.2e-12
    return lo - pad, hi + pad


def plot_thz_waveform(ax: Any, waveforms: Any) -> Any:
    """Field at the crystal exit and at the focus (kV/cm, or normalised for the reference
    case), and the EO-sampled waveform on a second axis.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Target axes.
    waveforms : ThzWaveforms
        Time-domain results.

    Returns
    -------
    matplotlib.axes.Axes
    """
    wf = waveforms
    t_ps = wf.time * 1e12
    if wf.absolute:
        ax.plot(t_ps, wf.exit_field * 1e-5, color="C0", label="crystal exit")
        ax.plot(t_ps, wf.focus_field * 1e-5, color="C0", ls=":",
                label=f"focus f/{wf.focus_f_number:g}")
        ax.set_ylabel("THz field (kV/cm)")
    else:
        ax.plot(t_ps, wf.exit_field / np.max(np.abs(wf.exit_field)), color="C0",
                label="crystal exit (norm.)")
        ax.set_ylabel("THz field (norm.; no beam radius)")
    curves = [wf.exit_field]
    if wf.eo_signal is not None:
        twin = ax.twinx()
        rad = "rad" in wf.eo_normalisation.split(" (")[0]
        scale = 1e3 if rad else 1.0
        twin.plot(wf.eo_delay * 1e12, wf.eo_signal * scale, color="C3", lw=1.0,
                  label="EO signal")
        twin.set_ylabel("EO phase retardation (mrad)" if rad else "EO signal (norm.)",
                        color="C3")
        curves.append(wf.eo_signal)
    ax.set_xlim(*(np.array(_window(wf.time, *curves)) * 1e12))
    ax.set_xlabel("Time / probe delay (ps)")
    ax.legend(loc="upper left", fontsize="small")
    ax.set_title("THz field and EO-sampled waveform", fontsize="small")
    return ax


def plot_waveform_spectra(ax: Any, thz: Any, waveforms: Any) -> Any:
    """Power spectra of the generated field and of the EO-sampled waveform (dB, each to its
    own peak), up to the computed cutoff's double; the part beyond the crystal model's range
    (shaded) is not in the waveforms.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Target axes.
    thz : ThzResult
        The estimate (its generated and detected power spectra).
    waveforms : ThzWaveforms
        For the label only.

    Returns
    -------
    matplotlib.axes.Axes
    """
    f_thz = thz.frequency * 1e-12
    ax.plot(f_thz, decibels(thz.generated_power, np.max(thz.generated_power), _FLOOR_DB),
            color="C0", label="field E(t)")
    if thz.detected_power is not None and waveforms.eo_signal is not None:
        ax.plot(f_thz, decibels(thz.detected_power, np.max(thz.detected_power), _FLOOR_DB),
                color="C3", label="EO waveform S(tau)")
    f_max = min(f_thz[-1], 2 * thz.cutoff_computed * 1e-12)
    ax.set_xlim(0, f_max)
    ax.set_ylim(_FLOOR_DB, 3)
    shade_beyond_model(ax, thz, f_max)  # left out of the waveforms
    ax.set_xlabel("Frequency (THz)")
    ax.set_ylabel("Power spectrum (dB)")
    ax.legend(fontsize="small")
    ax.set_title("Spectra", fontsize="small")
    return ax


def draw_thz_waveform(fig: Any, thz: Any, waveforms: Any) -> Any:
    """The waveform figure: time domain (left) beside the spectra (right).

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        Empty figure.
    thz : ThzResult
        The estimate.
    waveforms : ThzWaveforms
        Its time-domain fields.

    Returns
    -------
    matplotlib.axes.Axes
        The time-domain axes.
    """
    ax_time, ax_spec = fig.subplots(1, 2)
    fig.set_size_inches(12, 4.5)
    plot_thz_waveform(ax_time, waveforms)
    plot_waveform_spectra(ax_spec, thz, waveforms)
    fig.tight_layout()
    return ax_time
