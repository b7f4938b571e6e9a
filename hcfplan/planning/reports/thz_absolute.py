"""The absolute THz figures of an estimate (energy, efficiency, average power, peak field at a
focus, the crystal's fluence limits) and its time-domain arrays, for the summary and the
``thz`` command.

The physics is in :mod:`hcfplan.thz.generation`, :mod:`hcfplan.thz.waveforms` and
:mod:`hcfplan.thz.crystal_limits`; this module names and collects it.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np


def absolute_assumptions(result, setup, focus_f_number: float) -> str:
    """One line: the assumptions behind the energy and the peak field.

    Parameters
    ----------
    result : ThzResult
        The estimate.
    setup : ThzSetup
        Its set-up (beam radius, d_eff).
    focus_f_number : float
        f-number of the focus. [-]

    Returns
    -------
    str
    """
    if result.field_scale is None:
        return ("no absolute figures: set thz.beam_waist_um (and thz.d_eff_pm_per_v if the "
                "crystal table gives none); fields are for d_eff = 1 pm/V and a 1 mm^2 flat top")
    from hcfplan.thz.waveforms import beyond_model_share

    d = setup.d_eff if setup.d_eff is not None else setup.crystal.d_eff
    share = beyond_model_share(result)
    left_out = ("" if share < 1e-3 else
                f"; fields without the {100 * share:.3g} % of the energy above the crystal "
                f"model's range (> {result.model_limit * 1e-12:.3g} THz)")
    geometry = ("tilted pulse front (grating and imaging not modelled)"
                if result.geometry == "tilted_front" else "collinear")
    return (f"plane wave, undepleted pump, {geometry}, Gaussian pump w = "
            f"{setup.beam_radius * 1e3:.3g} mm, d_eff = {d * 1e12:.3g} pm/V; every frequency "
            f"focused diffraction-limited at f/{focus_f_number:g} (w0 = 2 lambda F / pi); no "
            f"two-photon, free-carrier or Kerr losses; uncertain by a factor of a few{left_out}")


def waveforms(result, setup, focus_f_number: float):
    """:func:`hcfplan.thz.waveforms.thz_waveforms` of an estimate and its set-up.

    Parameters
    ----------
    result : ThzResult
        The estimate.
    setup : ThzSetup
        Its set-up (beam radius, detector).
    focus_f_number : float
        f-number of the focus. [-]

    Returns
    -------
    ThzWaveforms
    """
    from hcfplan.thz.waveforms import thz_waveforms

    det = setup.detector
    return thz_waveforms(result, beam_radius=setup.beam_radius, focus_f_number=focus_f_number,
                         detector=None if det is None else det.crystal,
                         detector_thickness=None if det is None else det.thickness)


def _limits_part(result) -> dict[str, Any]:
    lim = result.crystal_limits
    if lim is None:
        return {}
    return {
        "thz.pump_fluence_j_per_m2": lim.fluence,
        "thz.damage_fluence_j_per_m2": lim.damage_fluence,
        "thz.two_photon_fluence_j_per_m2": lim.two_photon_fluence,
        "thz.free_carrier_fluence_j_per_m2": lim.free_carrier_fluence,
        "thz.binding_limit": lim.binding,
        "thz.crystal_fluence_margin": lim.margin,
    }


def absolute_part(result, setup, *, focus_f_number: float,
                  repetition_rate: float | None = None) -> dict[str, Any]:
    """Flat ``thz.*`` summary keys: geometry, absolute figures and crystal limits.

    Parameters
    ----------
    result : ThzResult
        The estimate.
    setup : ThzSetup
        Its set-up.
    focus_f_number : float
        f-number of the focus. [-]
    repetition_rate : float or None
        Pulse repetition rate for ``thz.average_power_w``. [Hz]

    Returns
    -------
    dict
        SI values, the unit in each key; ``None`` for a figure that needs a missing input.
    """
    wf = waveforms(result, setup, focus_f_number)
    energy = result.thz_energy
    out: dict[str, Any] = {
        "thz.geometry": result.geometry,
        "thz.interaction_length_m": result.interaction_length,
        "thz.focus_f_number": focus_f_number,
        "thz.peak_field_v_per_m": wf.peak_field if wf.absolute else None,
        "thz.peak_field_exit_v_per_m": wf.peak_field_exit if wf.absolute else None,
        "thz.efficiency": None if energy is None else energy / result.pump_energy,
        "thz.average_power_w": (None if energy is None or repetition_rate is None
                                else energy * repetition_rate),
        "thz.absolute_assumptions": absolute_assumptions(result, setup, focus_f_number),
        "thz.eo_signal_normalisation": wf.eo_normalisation,
    }
    if result.tilt_angle is not None:
        out["thz.tilt_angle_deg"] = math.degrees(result.tilt_angle)
    out.update(_limits_part(result))
    return out


def waveform_arrays(result, setup, focus_f_number: float) -> dict[str, np.ndarray]:
    """The time-domain arrays of ``fields.npz``.

    ``thz_time_s``, ``thz_field_v_per_m`` (on-axis field at the crystal's exit face),
    ``thz_focus_field_v_per_m``, and with a detector ``eo_delay_s`` and ``eo_signal`` (its
    normalisation is ``thz.eo_signal_normalisation`` of the summary). Without beam radius and
    d_eff the fields are those of the reference case (``thz.absolute_assumptions``).
    """
    wf = waveforms(result, setup, focus_f_number)
    arrays = {"thz_time_s": wf.time, "thz_field_v_per_m": wf.exit_field,
              "thz_focus_field_v_per_m": wf.focus_field}
    if wf.eo_signal is not None:
        arrays["eo_delay_s"] = wf.eo_delay
        arrays["eo_signal"] = wf.eo_signal
    return arrays

