"""One finding of a verdict (:class:`Reason`) and the readers of a flat summary's numbers,
shared by the checks of :mod:`hcfplan.planning.verdict` and :mod:`hcfplan.planning.verdict_thz`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class Reason:
    """One finding: its code (a key of :data:`hcfplan.planning.verdict.CODES`) and one line
    with the numbers."""

    code: str
    message: str

    def as_dict(self) -> dict:
        return {"code": self.code, "message": self.message}

    @property
    def short(self) -> str:
        """The message up to its first ": " or "; " (the first numbers, without what follows
        from them)."""
        return self.message.partition(": ")[0].partition("; ")[0]


def number(flat: dict, key: str) -> float | None:
    """``flat[key]`` as a finite float, or None (missing, not a number, bool, nan, inf)."""
    value = flat.get(key)
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return None
    return float(value) if math.isfinite(value) else None


def first_number(flat: dict, *keys: str) -> float | None:
    """The first of ``keys`` that holds a finite number in ``flat``, or None."""
    return next((v for v in (number(flat, k) for k in keys) if v is not None), None)
