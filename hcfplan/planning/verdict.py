"""A verdict on every result: valid, caution or invalid, with the reasons and the void numbers.

A planner is only as good as the numbers it prints. Every chain result gets a verdict:
``status`` is ``"valid"``, ``"caution"`` or ``"invalid"``; ``reasons`` lists what was found,
each a ``{code, message}`` pair whose message is one line with the numbers; ``void_fields`` lists
the result keys (flat, e.g. ``compressed.fwhm_s``; never an input or setting) whose numbers must
not be read as results.
The JSON keeps those numbers; the terminal prints "void (code: message)" in their place, scan
figures draw them hollow and grey, and ``compare`` and ``--spread`` leave them out of
differences and ranges.

Codes (:data:`CODES`; a result is invalid when any of its reasons is, caution when its reasons
are all cautions, valid without reasons):

=============================  ========  ==================================================
code                           status    voids
=============================  ========  ==================================================
``run_failed``                 invalid   every result (the point produced no summary)
``not_converged``              invalid   every result (the solver stopped before the fiber
                                         end, or a convergence check without a code of its
                                         own failed)
``no_transmission``            invalid   the compressed and THz results (fiber transmission
                                         below :data:`TRANSMISSION_FLOOR`)
``pump_in_resonance``          invalid   every result (anti-resonant fiber: the pump lies in
                                         a wall-resonance band, where the model fails)
``self_focusing_at_entrance``  invalid   every result (input peak power at or above the
                                         critical power of the fill)
``beyond_barrier_suppression`` invalid   every result (peak intensity in the fiber above the
                                         barrier-suppression intensity: PPT/ADK fail)
``window_edge_energy``         invalid   every result (a window-edge check of
                                         :mod:`hcfplan.planning.convergence` failed: energy
                                         or spectral level at the time or frequency edge)
``unresolved_pulse``           invalid   the durations and peak powers of each pulse that
                                         is sampled by fewer than
                                         :data:`~hcfplan.planning.convergence.MIN_POINTS_PER_FWHM`
                                         time steps per FWHM (the compressed pulse, its
                                         transform limit, the output's transform limit;
                                         :data:`UNRESOLVED_GROUPS`); all of them where the
                                         summary does not say which
``thz_beyond_crystal_model``   caution   ``thz.cutoff_hz``, ``thz.detected_cutoff_hz``
                                         (THz peak or cutoff beyond the crystal model's
                                         validity, or a cutoff the THz estimate already left
                                         out for that reason; the rest of the result stands)
``thz_crystal_limit``          caution   nothing (pump fluence on the THz crystal above the
                                         limit that binds, ``thz.binding_limit``: damage,
                                         two-photon or free-carrier absorption; the energy,
                                         efficiency and peak field ignore the last two, so
                                         they are upper bounds, and the message says so)
``main_lobe_below_half``       caution   nothing (main lobe below half the compressed energy)
``eh11_fraction_low``          caution   nothing (multimode run: EH11 holds less than
                                         ``EH11_FRACTION_FLOOR`` of the exit energy)
``extrapolated_data``          caution   nothing (a material fit is used outside its range
                                         where the output spectrum carries light)
=============================  ========  ==================================================

"Every result" is :data:`RESULT_FIELDS`, an explicit list of result keys: the output spectrum's
width, transform limit and peak power, the compressed pulse and its mirror set, the THz peak,
cutoffs, widths, efficiency, energy, peak field and fluence limits. Inputs and settings are never
void, even in a result section (:data:`NOT_RESULT_FIELDS`: e.g. the crystal thickness, the model's
limit, the THz frequency step); nor are the margins and limits: they say why a result is void.

Why these statuses: a code is *invalid* when the printed numbers are not what the models would
give for the setup — the model fails at the pump (resonance, self-focusing collapse, tunnelling
rates beyond barrier suppression), the grid does not hold or resolve the light, the solver
stopped, or no light is left. It is a *caution* when the numbers stand as computed but one
void number is left out (the THz cutoff beyond the crystal model), a number needs reading with
care (a spike on a pedestal, THz figures past the crystal's fluence limit) or rests on a fit
used beyond its stated range. A verdict judges
the numbers, never the setup: "valid" does not call an operating point safe.

Entry points: :func:`verdict_fields` (from a ChainResult and its flat summary; called by
:func:`hcfplan.planning.chain.summary_dict`, it stores ``verdict.status``, ``verdict.reasons``,
``verdict.void_fields`` and ``verdict.measured``, the numbers the summary does not hold
otherwise), :func:`verdict_of_chain` (the same as a :class:`Verdict`), :func:`verdict_of_summary`
(recomputed from a stored summary, flat or nested), :func:`stored_verdict` (the verdict a summary
was written with), :func:`verdict_of_record` (a scan point, compare side, ``--spread`` corner
or recommend candidate; ``run_failed`` for a point without a summary) and
:func:`verdict_of_thz_report` (the ``thz`` command's estimate from a measured spectrum). All
run the same checks on the same numbers: a stored summary gives the verdict it was written with.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from hcfplan.planning.convergence import EDGE_ENERGY_LIMIT, EDGE_LEVEL_DB, MIN_POINTS_PER_FWHM
from hcfplan.planning.mode_run import EH11_FRACTION_FLOOR
from hcfplan.planning.thz_range import THZ_ABSOLUTE_RESULTS, THZ_ABSOLUTE_SETTINGS
from hcfplan.planning.verdict_modes import check_eh11_fraction
from hcfplan.planning.verdict_reasons import Reason, first_number, number
from hcfplan.planning.verdict_thz import (
    check_crystal_limit,
    check_thz_model,
    crystal_model_limit,
)

#: Verdict statuses from best to worst.
STATUSES = ("valid", "caution", "invalid")

#: Fiber transmission below which no light reaches the compressor. [1] Common practice, no
#: source: 30 dB of loss leaves nothing a compressor or THz stage could use.
TRANSMISSION_FLOOR = 1e-3
#: Smallest main-lobe energy fraction of a compressed pulse that is not flagged. [1] The same
#: level ``recommend`` requires for ``shortest`` (common practice, no source).
MAIN_LOBE_FLOOR = 0.5

#: The numbers the fiber stage produces that a reason can void (flat summary keys).
OUTPUT_RESULT_FIELDS = ("output.bandwidth_hz", "output.transform_limit_fwhm_s",
                        "output.peak_power_w", "output.eh11_fraction",
                        "output.eh11_fraction_lowest")
#: The numbers of the compressor stage (flat summary keys): the pulse it gives and the mirror
#: set its search chose for that pulse.
COMPRESSED_RESULT_FIELDS = (
    "compressed.fwhm_s", "compressed.peak_power_w", "compressed.energy_j", "compressed.bounces",
    "compressed.gdd_s2", "compressed.tod_s3", "compressed.trim_insertion_m",
    "compressed.band_loss_fraction", "compressed.main_lobe_energy_fraction",
    "compressed.transform_limit_fwhm_s", "compressed.peak_to_transform_limit",
    "compressed.peak_power_gain", "compressed.pre_pulse_energy_j",
    "compressed.post_pulse_energy_j", "compressed.best_quadratic_fwhm_s",
    "compressed.best_quadratic_gdd_s2", "compressed.best_quadratic_cubic_fwhm_s",
    "compressed.best_quadratic_cubic_peak_power_w", "compressed.transform_limit_peak_power_w",
    "compressed.beam_fwhm_s", "compressed.beam_peak_power_w", "compressed.beam_energy_j")
#: The numbers of the THz stage (flat summary keys).
THZ_RESULT_FIELDS = ("thz.peak_hz", "thz.cutoff_hz", "thz.bandwidth_3db_hz",
                     "thz.bandwidth_10db_hz", "thz.relative_efficiency",
                     "thz.detected_peak_hz", "thz.detected_cutoff_hz",
                     "thz.energy_estimate_j") + THZ_ABSOLUTE_RESULTS
#: Every number a run produces: the only keys a reason can void.
RESULT_FIELDS = OUTPUT_RESULT_FIELDS + COMPRESSED_RESULT_FIELDS + THZ_RESULT_FIELDS
#: Keys of the ``output``, ``compressed`` and ``thz`` sections that are inputs, settings or
#: texts, never results, so never void: the crystal and its thickness (config), the crystal
#: model's upper limit (crystal table), the THz frequency step (sampling setting), the
#: definitions and cautions (texts), the energy left at the fiber end and the peaks inside the
#: fiber (the margins and limits read them; they say why a result is void).
NOT_RESULT_FIELDS = ("output.energy_j", "output.bandwidth_definition",
                     "output.max_ionization_fraction", "output.max_peak_intensity_w_per_m2",
                     "output.max_peak_power_w", "thz.crystal", "thz.thickness_m",
                     "thz.cutoff_definition", "thz.model_limit_hz", "thz.frequency_step_hz",
                     "thz.energy_estimate_caution") + THZ_ABSOLUTE_SETTINGS
#: Durations and peak powers of the compressed pulse and its references.
DURATION_FIELDS = ("compressed.fwhm_s", "compressed.peak_power_w",
                   "compressed.transform_limit_fwhm_s", "compressed.best_quadratic_fwhm_s",
                   "compressed.best_quadratic_cubic_fwhm_s",
                   "compressed.best_quadratic_cubic_peak_power_w",
                   "compressed.transform_limit_peak_power_w",
                   "compressed.peak_to_transform_limit", "compressed.peak_power_gain",
                   "compressed.main_lobe_energy_fraction", "output.transform_limit_fwhm_s",
                   "compressed.beam_fwhm_s", "compressed.beam_peak_power_w")
THZ_CUTOFF_FIELDS = ("thz.cutoff_hz", "thz.detected_cutoff_hz")
#: ``unresolved_pulse`` voids the numbers of each pulse whose FWHM (the key) is under-sampled.
UNRESOLVED_GROUPS = {
    "compressed.fwhm_s": tuple(k for k in DURATION_FIELDS if "transform_limit_" not in k),
    "compressed.transform_limit_fwhm_s": (
        "compressed.transform_limit_fwhm_s", "compressed.transform_limit_peak_power_w",
        "compressed.peak_to_transform_limit"),
    "output.transform_limit_fwhm_s": ("output.transform_limit_fwhm_s",)}


@dataclass(frozen=True)
class Code:
    """What a reason code means, the status it gives and the summary keys it voids."""

    status: str  #: "invalid" or "caution"
    voids: tuple[str, ...]  #: flat summary keys, all of them in :data:`RESULT_FIELDS`
    meaning: str


CODES: dict[str, Code] = {
    "run_failed": Code("invalid", RESULT_FIELDS, "the run produced no result"),
    "not_converged": Code("invalid", RESULT_FIELDS,
                          "the solver did not reach the fiber end, or a convergence check "
                          "failed"),
    "no_transmission": Code("invalid", COMPRESSED_RESULT_FIELDS + THZ_RESULT_FIELDS,
                            f"fiber transmission below {TRANSMISSION_FLOOR:g}"),
    "pump_in_resonance": Code("invalid", RESULT_FIELDS,
                              "anti-resonant fiber: the pump lies in a wall-resonance band"),
    "self_focusing_at_entrance": Code("invalid", RESULT_FIELDS,
                                      "input peak power at or above the critical power of the "
                                      "fill"),
    "beyond_barrier_suppression": Code("invalid", RESULT_FIELDS,
                                       "peak intensity above the barrier-suppression intensity"),
    "window_edge_energy": Code("invalid", RESULT_FIELDS,
                               f"more than {EDGE_ENERGY_LIMIT:g} of the energy, or a spectral "
                               f"level above {EDGE_LEVEL_DB:g} dB, at the edge of the time or "
                               "frequency window"),
    "unresolved_pulse": Code("invalid", DURATION_FIELDS,
                             f"fewer than {MIN_POINTS_PER_FWHM:g} time steps across the FWHM "
                             "of the shortest pulse"),
    "thz_beyond_crystal_model": Code("caution", THZ_CUTOFF_FIELDS,
                                     "THz cutoff or band beyond the crystal model's validity"),
    "thz_crystal_limit": Code("caution", (),
                              "pump fluence on the THz crystal above its binding limit "
                              "(damage, two-photon or free-carrier absorption)"),
    "main_lobe_below_half": Code("caution", (),
                                 f"main lobe below {MAIN_LOBE_FLOOR:.0%} of the compressed "
                                 "energy"),
    "eh11_fraction_low": Code("caution", (), "multimode run: EH11 holds less than "
                              f"{EH11_FRACTION_FLOOR:.0%} of the exit energy"),
    "extrapolated_data": Code("caution", (),
                              "a material fit is used outside its range where there is light"),
}


@dataclass(frozen=True)
class Verdict:
    """Status, reasons and void summary keys of one result (see the module docstring)."""

    status: str
    reasons: tuple[Reason, ...]
    void_fields: tuple[str, ...]

    @property
    def codes(self) -> tuple[str, ...]:
        return tuple(r.code for r in self.reasons)

    @property
    def invalid(self) -> bool:
        return self.status == "invalid"

    def void_reason(self, key: str) -> Reason | None:
        """The first reason that voids the flat summary key ``key``, or None."""
        if key not in self.void_fields and self.void_fields:
            return None
        for reason in self.reasons:
            if key in CODES[reason.code].voids:
                return reason
        return None

    def as_dict(self) -> dict:
        """``{"status", "reasons": [{code, message}], "void_fields"}`` (plain JSON types)."""
        return {"status": self.status, "reasons": [r.as_dict() for r in self.reasons],
                "void_fields": list(self.void_fields)}

    def reasons_text(self) -> str:
        """``"code: message; code: message"`` (empty for a valid result)."""
        return "; ".join(f"{r.code}: {r.message}" for r in self.reasons)


# ---------------------------------------------------------------------------------------------
# reading summaries


def flat_summary(summary: dict) -> dict:
    """A summary as flat ``{"a.b": value}``, whether it is given nested or flat."""
    out: dict[str, Any] = {}

    def walk(node: dict, prefix: str) -> None:
        for key, value in node.items():
            name = f"{prefix}{key}"
            if isinstance(value, dict) and name not in ("verdict.measured",):
                walk(value, f"{name}.")
            else:
                out[name] = value

    walk(summary, "")
    return out


# ---------------------------------------------------------------------------------------------
# the checks: each takes the flat summary and the measured extras, returns reasons


def solver_reason(success, status=None, message=None) -> Reason | None:
    """``not_converged`` when the solver stopped before the fiber end (``success`` False), with
    its status and message; None otherwise."""
    if success is not False:
        return None
    message = " ".join(str(message or "").split())
    return Reason("not_converged", f"solver stopped ({status or 'fault'})"
                  + (f": {message}" if message else ""))


def _check_run(flat: dict, measured: dict) -> list[Reason]:
    found = solver_reason(flat.get("solver.success"), flat.get("solver.status"),
                          flat.get("solver.message"))
    return [] if found is None else [found]


#: What a failed convergence check of each code means for the numbers.
_CONSEQUENCE = {"window_edge_energy": "the grid does not hold the light",
                "unresolved_pulse": "durations and peak powers are not resolved"}


def convergence_reasons(checks) -> list[Reason]:
    """One reason per code of the failed convergence checks (``Check.as_dict()`` of
    :mod:`hcfplan.planning.convergence`, as stored in ``grid.checks``): ``window_edge_energy``,
    ``unresolved_pulse``, or ``not_converged`` for a check without a code of its own."""
    found: dict[str, list[str]] = {}
    for check in checks:
        if not isinstance(check, dict) or check.get("passed") is not False:
            continue
        code = check.get("code") if check.get("code") in CODES else "not_converged"
        limit = check.get("limit")
        text = str(check.get("reason") or check.get("name") or "convergence check failed")
        if isinstance(limit, (int, float)) and not isinstance(limit, bool):
            text += f" (limit {limit:.3g})"
        found.setdefault(code, []).append(text)
    return [Reason(code, "; ".join(texts) + (f": {_CONSEQUENCE[code]}" if code in _CONSEQUENCE
                                              else ""))
            for code, texts in found.items()]


def _check_convergence(flat: dict, measured: dict) -> list[Reason]:
    """The failed checks of ``grid.checks`` (:func:`convergence_reasons`); a summary without
    them gets the sampling check from its own numbers."""
    checks = flat.get("grid.checks")
    if not isinstance(checks, list):
        return _check_resolution(flat, measured)
    return convergence_reasons(checks)


def _check_transmission(flat: dict, measured: dict) -> list[Reason]:
    t = number(flat, "fiber.transmission")
    if t is None or t >= TRANSMISSION_FLOOR:
        return []
    return [Reason("no_transmission", f"fiber transmission {t:.2g} (below "
                   f"{TRANSMISSION_FLOOR:g}): no light reaches the compressor")]


def _check_resonance(flat: dict, measured: dict) -> list[Reason]:
    if flat.get("limits.fiber.pump_in_resonance_band") is not True:
        return []
    distance = number(flat, "limits.fiber.relative_distance_to_resonance")
    pump = number(measured, "pump_wavelength_m")
    resonances = [r for r in flat.get("limits.fiber.resonance_wavelengths_m") or []
                  if isinstance(r, (int, float)) and r > 0]
    where = "a wall resonance"
    if pump is not None and resonances:
        nearest = min(resonances, key=lambda r: abs(pump / r - 1))
        where = f"the wall resonance at {nearest * 1e9:.0f} nm"
    head = f"pump {pump * 1e9:.0f} nm" if pump is not None else "pump"
    near = f" within {distance:.1%} of" if distance is not None else " in the band of"
    return [Reason("pump_in_resonance", f"{head} lies{near} {where}: high loss and strong "
                   "dispersion there, the fiber model does not hold")]


def _check_self_focusing(flat: dict, measured: dict) -> list[Reason]:
    critical = number(flat, "limits.self_focusing.critical_power_w")
    power = first_number(flat, "limits.static_fill.peak_power_w",
                   "limits.self_focusing.peak_power_input_w")
    if critical is None or power is None or power < critical:
        return []
    return [Reason("self_focusing_at_entrance",
                   f"input peak power {power / 1e9:.3g} GW >= critical power "
                   f"{critical / 1e9:.3g} GW of the fill (P_cr/P = {critical / power:.2f}): "
                   "the beam self-focuses at the fiber entrance")]


def _check_barrier(flat: dict, measured: dict) -> list[Reason]:
    bsi = number(flat, "limits.ionization.barrier_suppression_intensity_w_per_m2")
    peak = first_number(flat, "output.max_peak_intensity_w_per_m2",
                  "limits.ionization.peak_intensity_in_fiber_w_per_m2",
                  "limits.ionization.peak_intensity_input_w_per_m2")
    if bsi is None or peak is None or peak <= bsi:
        return []
    return [Reason("beyond_barrier_suppression",
                   f"peak intensity {peak / 1e4:.3g} W/cm^2 is above the barrier-suppression "
                   f"intensity {bsi / 1e4:.3g} W/cm^2 ({peak / bsi:.2g}x): the tunnelling "
                   "rates do not hold there")]


#: How the durations of :func:`_check_resolution` are named in its message.
_DURATION_NAMES = {"compressed.fwhm_s": "compressed FWHM",
                   "compressed.transform_limit_fwhm_s": "transform-limited FWHM",
                   "output.transform_limit_fwhm_s": "transform-limited FWHM of the output"}


def _under_sampled(flat: dict) -> tuple[float, dict[str, float]]:
    """``grid.dt_s`` and the FWHMs (:data:`UNRESOLVED_GROUPS` keys) spanning fewer than
    ``MIN_POINTS_PER_FWHM`` steps of it (none without a step)."""
    dt = number(flat, "grid.dt_s")
    if dt is None or dt <= 0:
        return math.nan, {}
    return dt, {k: f for k in UNRESOLVED_GROUPS
                if (f := number(flat, k)) is not None and 0 < f < MIN_POINTS_PER_FWHM * dt}


def _check_resolution(flat: dict, measured: dict) -> list[Reason]:
    dt, short = _under_sampled(flat)
    if not short:
        return []
    key = min(short, key=short.__getitem__)
    return [Reason("unresolved_pulse",
                   f"{_DURATION_NAMES[key]} {short[key] * 1e15:.3g} fs spans "
                   f"{short[key] / dt:.1f} grid steps of {dt * 1e15:.3g} fs (at least "
                   f"{MIN_POINTS_PER_FWHM:g} needed)")]


def _check_main_lobe(flat: dict, measured: dict) -> list[Reason]:
    fraction = number(flat, "compressed.main_lobe_energy_fraction")
    if fraction is None or fraction >= MAIN_LOBE_FLOOR:
        return []
    return [Reason("main_lobe_below_half",
                   f"main lobe holds {fraction:.0%} of the compressed energy (below "
                   f"{MAIN_LOBE_FLOOR:.0%}): FWHM and peak power describe a spike on a pedestal")]


def _check_extrapolated(flat: dict, measured: dict) -> list[Reason]:
    return [Reason("extrapolated_data", str(note))
            for note in measured.get("extrapolated") or []]


#: The checks in the order their reasons are listed: the physical causes before the numerical
#: ones (without light at the fiber end, the grid checks see only numerical noise).
CHECKS = (_check_run, _check_transmission, _check_resonance, _check_self_focusing,
          _check_barrier, _check_convergence, check_thz_model, check_crystal_limit,
          _check_main_lobe, check_eh11_fraction, _check_extrapolated)


def _verdict(flat: dict, measured: dict) -> Verdict:
    reasons: list[Reason] = []
    for check in CHECKS:
        reasons += check(flat, measured)
    return verdict_from_reasons(reasons, flat)


def unresolved_fields(flat: dict) -> tuple[str, ...] | None:
    """The keys ``unresolved_pulse`` voids in ``flat``: the :data:`UNRESOLVED_GROUPS` of the
    under-sampled pulses; None where the summary does not tell (no step, no short pulse)."""
    short = _under_sampled(flat)[1]
    if not short:
        return None
    return tuple(dict.fromkeys(k for key in short for k in UNRESOLVED_GROUPS[key]))


def _voids(code: str, flat: dict) -> tuple[str, ...]:
    """The keys a reason of ``code`` voids in ``flat`` (per pulse for ``unresolved_pulse``)."""
    found = unresolved_fields(flat) if code == "unresolved_pulse" else None
    return found or CODES[code].voids


def verdict_from_reasons(reasons, summary: dict | None = None) -> Verdict:
    """The verdict of a list of :class:`Reason` (status from :data:`CODES`).

    ``void_fields`` are the keys of ``summary`` (flat or nested; numbers and nulls only) that
    the reasons void; without a summary they are empty.
    """
    reasons = tuple(reasons)
    unknown = [r.code for r in reasons if r.code not in CODES]
    if unknown:
        raise ValueError(f"unknown verdict codes: {', '.join(unknown)}")
    levels = [STATUSES.index(CODES[r.code].status) for r in reasons]
    status = STATUSES[max(levels, default=0)]
    flat = flat_summary(summary) if summary else {}
    voided = {k for r in reasons for k in _voids(r.code, flat)}
    void = tuple(k for k, v in flat.items()
                 if (v is None or (isinstance(v, (int, float)) and not isinstance(v, bool)))
                 and k in voided)
    return Verdict(status, reasons, void)


def verdict_of_summary(summary: dict) -> Verdict:
    """The verdict of a chain summary, nested (``summary.json``) or flat.

    Reads the summary's numbers and, when present, ``verdict.measured`` (written by
    :func:`verdict_fields`); a summary without them (an older record) gets every check that its
    numbers allow. An empty summary (a point that did not run) is invalid, ``run_failed``.
    """
    flat = flat_summary(summary or {})
    if not flat:
        return verdict_from_reasons([Reason("run_failed", "the run produced no summary")])
    measured = flat.get("verdict.measured")
    return _verdict(flat, measured if isinstance(measured, dict) else {})


def stored_verdict(summary: dict) -> Verdict:
    """The verdict a summary was written with (``verdict.reasons``), void fields included; a
    summary without one gets :func:`verdict_of_summary`."""
    flat = flat_summary(summary or {})
    stored = flat.get("verdict.reasons")
    if isinstance(stored, list) and all(isinstance(r, dict) and r.get("code") in CODES
                                        for r in stored):
        return verdict_from_reasons([Reason(r["code"], str(r.get("message", "")))
                                     for r in stored], flat)
    return verdict_of_summary(summary)


def verdict_of_record(record: dict) -> Verdict:
    """The verdict of a scan point record (:mod:`hcfplan.planning.scan.records`)."""
    summary = record.get("summary") or {}
    if not summary:
        message = " ".join(str(record.get("message") or "the run produced no summary").split())
        return verdict_from_reasons([Reason("run_failed", message)])
    return stored_verdict(summary)


def verdict_of_thz_report(report: dict, detector: bool | None = None) -> Verdict:
    """The verdict of a THz estimate from a measured spectrum (the ``thz`` command's report:
    unprefixed keys ``crystal``, ``peak_hz``, ``cutoff_hz``, ``model_limit_hz``, ...).

    Only the THz checks apply (there is no fiber run): ``thz_beyond_crystal_model`` when the
    cutoff is left out or lies beyond the crystal model, ``thz_crystal_limit`` when the pump
    fluence (``--energy-uj`` with a beam radius) exceeds the crystal's binding limit.
    ``void_fields`` names the report's own keys (e.g. ``cutoff_hz``). ``detector``: whether an
    EO detector was given (default: a detected number is present); without one the
    ``detected_*`` keys are no results at all.
    """
    if detector is None:
        detector = any(report.get(k) is not None
                       for k in ("detected_peak_hz", "detected_cutoff_hz"))
    flat = {f"thz.{k}": v for k, v in report.items()
            if not isinstance(v, (dict, list)) and k != "verdict"
            and (detector or not k.startswith("detected_"))}
    measured = {"thz_model_limit_hz": report.get("model_limit_hz")}
    verdict = verdict_from_reasons(check_thz_model(flat, measured)
                                   + check_crystal_limit(flat, measured), flat)
    return Verdict(verdict.status, verdict.reasons,
                   tuple(k.removeprefix("thz.") for k in verdict.void_fields))


# ---------------------------------------------------------------------------------------------
# from a chain result


def measured_of_chain(chain) -> dict:
    """The numbers a verdict needs that the summary does not hold (``verdict.measured``).

    ``pump_wavelength_m``; ``thz_model_limit_hz`` (upper validity of the THz model of the
    generation crystal, with a ``[thz]`` section); ``extrapolated`` (the range notes of the
    material fits against the output spectrum above
    :data:`hcfplan.planning.validity.LIGHT_LEVEL_DB`, as in the run's warnings).
    """
    import numpy as np

    from hcfplan.planning.mode_run import exit_density
    from hcfplan.planning.validity import light_band, quiet_validity, range_notes

    config, grid, prop = chain.config, chain.grid, chain.propagation
    measured: dict[str, Any] = {"pump_wavelength_m": float(config.laser.wavelength)}
    power = exit_density(prop)  # multimode: the whole beam
    notes: list[str] = []
    if np.any(power > 0):
        band = light_band(grid.frequency, power)
        with quiet_validity():
            notes = range_notes(config, chain.medium, band, "the output spectrum at -40 dB")
    measured["extrapolated"] = notes
    if chain.thz is not None:
        measured["thz_model_limit_hz"] = crystal_model_limit(config.thz.crystal,
                                                             config.thz.table_dirs)
    return measured


def verdict_of_chain(chain, summary: dict) -> Verdict:
    """The verdict of a ChainResult, with its summary (flat or nested) at hand."""
    return _verdict(flat_summary(summary), measured_of_chain(chain))


def verdict_fields(chain, summary: dict) -> dict:
    """The flat ``verdict.*`` keys of ``summary.json``: status, reasons, void_fields, measured.

    ``summary`` is the flat summary built so far (every other section).
    """
    measured = measured_of_chain(chain)
    verdict = _verdict(flat_summary(summary), measured)
    return {"verdict.status": verdict.status,
            "verdict.reasons": [r.as_dict() for r in verdict.reasons],
            "verdict.void_fields": list(verdict.void_fields),
            "verdict.measured": measured}
