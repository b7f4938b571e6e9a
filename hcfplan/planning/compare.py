"""Two setups side by side: the full chain for each, the main numbers, B - A and B / A.

The one-command answer to "what does the new laser (or fiber, gas, pressure) change, and is
the setup still within the modelled limits?". Both configs run the same chain as
``simulate``; margins come from :func:`hcfplan.planning.scan.point_margins` (the
``limits_report`` values), in the one convention of :mod:`hcfplan.limits.margins`: the
self-focusing margin is P_cr / P, shown beside the required value
``limits.self_focusing_margin``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

#: (label, flattened summary key, display scale, display unit)
ROWS: tuple[tuple[str, str, float, str], ...] = (
    ("input energy", "input.energy_j", 1e-6, "uJ"),
    ("input FWHM", "input.fwhm_s", 1e-15, "fs"),
    ("input peak power", "input.peak_power_w", 1e9, "GW"),
    ("fiber transmission", "fiber.transmission", 1e-2, "%"),
    ("output bandwidth (-20 dB)", "output.bandwidth_hz", 1e12, "THz"),
    ("compressed FWHM", "compressed.fwhm_s", 1e-15, "fs"),
    ("compressed peak power", "compressed.peak_power_w", 1e9, "GW"),
    ("EH11 share of the exit energy", "output.eh11_fraction", 1e-2, "%"),
    ("compressed FWHM, whole beam", "compressed.beam_fwhm_s", 1e-15, "fs"),
    ("compressed peak power, whole beam", "compressed.beam_peak_power_w", 1e9, "GW"),
    ("THz peak", "thz.peak_hz", 1e12, "THz"),
    ("THz cutoff", "thz.cutoff_hz", 1e12, "THz"),
    ("THz peak field at the focus", "thz.peak_field_v_per_m", 1e5, "kV/cm"),
    ("THz energy", "thz.energy_estimate_j", 1e-9, "nJ"),
    ("THz efficiency", "thz.efficiency", 1.0, ""),
    ("THz average power", "thz.average_power_w", 1e-3, "mW"),
    ("crystal fluence margin limit/fluence", "thz.crystal_fluence_margin", 1.0, ""),
    ("self-focusing margin P_cr/P", "margins.self_focusing", 1.0, ""),
    ("self-focusing margin P_cr/P in fiber", "margins.self_focusing_in_fiber", 1.0, ""),
    ("required self-focusing margin", "margins.self_focusing_required", 1.0, ""),
    ("ionisation fraction", "margins.ionization_fraction", 1.0, ""),
    ("ionisation margin limit/fraction (required 1)", "margins.ionization_margin", 1.0, ""),
    ("fill pressure (highest)", "margins.pressure_pa", 1e5, "bar"),
)
#: Rows of multimode runs only (``fiber.modes`` > 1), left out when neither side has them.
MULTIMODE_KEYS = ("output.eh11_fraction", "compressed.beam_fwhm_s",
                  "compressed.beam_peak_power_w")


@dataclass(frozen=True, eq=False)
class Side:
    """One side of the comparison."""

    label: str
    chain: Any  #: ChainResult
    summary: dict  #: nested summary (with ``limits`` where available)
    margins: dict

    @property
    def verdict(self):
        """The :class:`~hcfplan.planning.verdict.Verdict` of this side's result."""
        from hcfplan.planning.verdict import stored_verdict

        return stored_verdict(self.summary)


@dataclass(frozen=True, eq=False)
class Comparison:
    a: Side
    b: Side
    #: label, key, unit, scale, a, b, difference, ratio (SI), a_void, b_void
    rows: tuple[dict, ...]


def _number(flat: dict, key: str) -> float | None:
    from hcfplan.planning.scan import number_or_none

    return number_or_none(flat.get(key), finite=True)


def comparison_rows(a: Side, b: Side) -> tuple[dict, ...]:
    """The table: each quantity for A and B, B - A and B / A (SI; None where undefined).

    ``a_void`` and ``b_void`` name the verdict code that voids a side's number (None where it
    stands, :mod:`hcfplan.planning.verdict`); the numbers are kept, but B - A and B / A of a
    void number are None.
    """
    from hcfplan.planning.scan import flatten

    flat_a = flatten(a.summary) | flatten(a.margins, "margins.")
    flat_b = flatten(b.summary) | flatten(b.margins, "margins.")
    verdict_a, verdict_b = a.verdict, b.verdict
    rows = []
    for label, key, scale, unit in ROWS:
        if key in MULTIMODE_KEYS and key not in flat_a and key not in flat_b:
            continue
        va, vb = _number(flat_a, key), _number(flat_b, key)
        void_a = verdict_a.void_reason(key) if va is not None else None
        void_b = verdict_b.void_reason(key) if vb is not None else None
        both = va is not None and vb is not None and void_a is None and void_b is None
        diff = vb - va if both else None
        ratio = vb / va if diff is not None and va != 0 else None
        rows.append({"label": label, "key": key, "unit": unit, "scale": scale, "a": va,
                     "b": vb, "difference": diff, "ratio": ratio,
                     "a_void": void_a.code if void_a else None,
                     "b_void": void_b.code if void_b else None})
    return tuple(rows)


def run_side(config, label: str) -> Side:
    """Run the chain for one config and collect its summary and margins."""
    from hcfplan.planning.chain import run_chain
    from hcfplan.planning.scan import run_summary

    chain = run_chain(config)
    summary, margins = run_summary(config, chain)
    return Side(label, chain, summary, margins)


def compare_configs(config_a, config_b, labels: tuple[str, str] = ("A", "B")) -> Comparison:
    """Run both configs and tabulate them (see :data:`ROWS`)."""
    a, b = run_side(config_a, labels[0]), run_side(config_b, labels[1])
    return Comparison(a, b, comparison_rows(a, b))
