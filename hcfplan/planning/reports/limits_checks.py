"""One entry of ``limits.checks`` (the fields are described in
:mod:`hcfplan.planning.reports.limits`), shared by every part of the limits report.
"""

from __future__ import annotations

import math

import numpy as np


def finite_or_none(x):
    """A finite float, or None for a non-finite number; other values unchanged."""
    if x is None or isinstance(x, bool):
        return x
    if isinstance(x, (float, int, np.floating, np.integer)):
        return float(x) if math.isfinite(x) else None
    return x


def check_entry(name: str, value, limit, *, unit: str, source: str, assumption: str,
                kind: str = "maximum", severity: str = "limit", required: float = 1.0,
                ratio: str = "") -> dict:
    """One entry of ``limits.checks`` (see :mod:`hcfplan.planning.reports.limits`)."""
    from hcfplan.limits.margins import margin_record

    record = margin_record(name, limit=finite_or_none(limit), value=finite_or_none(value),
                           required=required, unit=unit, kind=kind, ratio=ratio)
    met = record["met"]
    record.update({"margin": finite_or_none(record["margin"]),
                   "status": "not checked" if met is None else ("within" if met else "exceeds"),
                   "severity": severity, "source": source, "assumption": assumption})
    return record


def not_checked(name: str, unit: str, why: str, source: str = "",
                severity: str = "limit", ratio: str = "", kind: str = "maximum") -> dict:
    """An entry whose check could not be made, with the reason."""
    return check_entry(name, None, None, unit=unit, source=source, assumption=why,
                       severity=severity, ratio=ratio, kind=kind)
