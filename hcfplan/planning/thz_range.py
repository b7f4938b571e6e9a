"""Texts and masks for THz cutoffs against the crystal model's range.

A THz cutoff is a result only within the range the crystal tables state for their THz model
(:func:`hcfplan.thz.measures.model_limit`); beyond it the text says "above the model's range
(> X THz)". Shared by the envelope map (:mod:`hcfplan.planning.envelope`), its GNLSE check
(:mod:`hcfplan.planning.envelope_check`) and their printing, without an import between them.
"""

from __future__ import annotations

import math

import numpy as np

#: The absolute THz figures of a summary that are results (a reason can void them): they follow
#: from the compressed pulse (:mod:`hcfplan.planning.reports.thz_absolute`).
THZ_ABSOLUTE_RESULTS = ("thz.peak_field_v_per_m", "thz.peak_field_exit_v_per_m",
                        "thz.efficiency", "thz.average_power_w", "thz.pump_fluence_j_per_m2",
                        "thz.two_photon_fluence_j_per_m2", "thz.free_carrier_fluence_j_per_m2",
                        "thz.crystal_fluence_margin", "thz.binding_limit",
                        "thz.interaction_length_m", "thz.tilt_angle_deg")
#: Settings and texts among them (never void): from the config or the crystal table.
THZ_ABSOLUTE_SETTINGS = ("thz.geometry", "thz.focus_f_number", "thz.damage_fluence_j_per_m2",
                         "thz.absolute_assumptions", "thz.eo_signal_normalisation")

def within_model(cutoff, limit: float):
    """``cutoff`` [Hz] (float or array) with nan above ``limit`` [Hz]: a value of the
    thin-crystal estimate beyond the crystal model's range is not a cutoff."""
    value = np.where(np.asarray(cutoff, dtype=float) > limit, np.nan, cutoff)
    return float(value) if value.ndim == 0 else value


def beyond_model_text(limit: float, model: str = "") -> str:
    """"above the model's range (> 20 THz)", or "above the GaP model's range (> 20 THz)"."""
    owner = f"the {model} model's" if model else "the model's"
    return f"above {owner} range (> {limit * 1e-12:.3g} THz)"


def estimate_cutoff_text(cutoff: float, limit: float, model: str = "", digits: int = 3) -> str:
    """A THz cutoff estimate for printing: "12.3 THz", "above the model's range (> 20 THz)"
    beyond ``limit``, or "void" when not finite.

    Parameters
    ----------
    cutoff : float
        The estimate (:func:`thz_cutoff_gaussian_estimate`, or an
        :class:`EnvelopeResult`'s ``thz_cutoff`` value). [Hz]
    limit : float
        Upper end of the crystal model's range (``EnvelopeResult.thz_model_limit``). [Hz]
    model : str
        Crystal name(s) for the text ("" for "the model's range").
    digits : int
        Significant digits of the value.
    """
    if cutoff is None or not math.isfinite(cutoff):
        return "void"
    if cutoff > limit:
        return beyond_model_text(limit, model)
    return f"{cutoff * 1e-12:.{digits}g} THz"
