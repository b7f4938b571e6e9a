"""Two setups side by side: the full chain for each, the main numbers, B - A and B / A.

The one-command answer to "what does the new laser (or fiber, gas, pressure) change, and is
the setup still within the modelled limits?". Both configs run the same chain as
``simulate``; margins come from :func:`hcfplan.planning.scan.point_margins` (the
``limits_report`` values where that module exists).
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
    ("THz peak", "thz.peak_hz", 1e12, "THz"),
    ("THz cutoff", "thz.cutoff_hz", 1e12, "THz"),
    ("self-focusing margin P_cr/P", "margins.self_focusing", 1.0, ""),
    ("ionisation fraction", "margins.ionization_fraction", 1.0, ""),
    ("ionisation margin limit/fraction", "margins.ionization_margin", 1.0, ""),
    ("fill pressure", "margins.pressure_pa", 1e5, "bar"),
)


@dataclass(frozen=True, eq=False)
class Side:
    """One side of the comparison."""

    label: str
    chain: Any  #: ChainResult
    summary: dict  #: nested summary (with ``limits`` where available)
    margins: dict


@dataclass(frozen=True, eq=False)
class Comparison:
    a: Side
    b: Side
    rows: tuple[dict, ...]  #: label, key, unit, scale, a, b, difference, ratio (SI)


def _number(flat: dict, key: str) -> float | None:
    from hcfplan.planning.scan import number_or_none

    return number_or_none(flat.get(key), finite=True)


def comparison_rows(a: Side, b: Side) -> tuple[dict, ...]:
    """The table: each quantity for A and B, B - A and B / A (SI; None where undefined)."""
    from hcfplan.planning.scan import flatten

    flat_a = flatten(a.summary) | flatten(a.margins, "margins.")
    flat_b = flatten(b.summary) | flatten(b.margins, "margins.")
    rows = []
    for label, key, scale, unit in ROWS:
        va, vb = _number(flat_a, key), _number(flat_b, key)
        diff = vb - va if va is not None and vb is not None else None
        ratio = vb / va if diff is not None and va != 0 else None
        rows.append({"label": label, "key": key, "unit": unit, "scale": scale, "a": va,
                     "b": vb, "difference": diff, "ratio": ratio})
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
