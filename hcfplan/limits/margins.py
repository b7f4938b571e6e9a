"""Margins: one convention for every limit hcfplan reports.

A margin is a ratio that is at least its required value on the within side of a limit:

- a **maximum** (the value must not exceed the limit: peak power vs the critical power,
  ionised fraction, B-integral, fill pressure vs the rating, fluence vs the damage fluence):
  margin = limit / value;
- a **minimum** (the value must not fall below the limit: window thickness, oxygen fraction,
  distance to a fiber resonance): margin = value / limit.

A margin is *met* when margin >= required. The required value is 1 unless a config key asks for
more; the self-focusing margin is P_cr / P with the required value ``limits.self_focusing_margin``
(default 2, common practice, no source). Every report, table and figure of hcfplan computes its
margins here and formats them with :func:`margin_text`, so ``limits``, ``simulate``, ``scan``,
``compare``, ``--spread`` and ``recommend`` show the same number for the same setup.

The words are neutral on purpose: a met margin means "within the modelled limit", never that a
setup is safe; the cell maker's rating, local codes and licensed practice come first.
"""

from __future__ import annotations

import math

#: limit_kind -> how the margin is formed from (limit, value).
LIMIT_KINDS = ("maximum", "minimum")


def _number(x) -> float | None:
    """``x`` as a float, or None for None, a bool or a non-number."""
    if x is None or isinstance(x, bool):
        return None
    try:
        return float(x)
    except (TypeError, ValueError):
        return None


def margin(limit, value, kind: str = "maximum") -> float | None:
    """Margin of ``value`` against ``limit``: limit / value (maximum) or value / limit (minimum).

    Parameters
    ----------
    limit : float or None
        The limit, in the unit of ``value`` (e.g. the critical power [W]).
    value : float or None
        The value checked against it (e.g. the peak power [W]).
    kind : {"maximum", "minimum"}
        ``"maximum"``: the value must not exceed the limit; ``"minimum"``: it must not fall
        below it.

    Returns
    -------
    float or None
        The margin [-]: >= 1 on the within side of the limit; ``inf`` when the denominator is 0
        and the numerator positive; None when either input is missing or not finite, when the
        ratio is 0/0, or when an input is negative (no margin is defined then).

    Raises
    ------
    ValueError
        An unknown ``kind``.

    References
    ----------
    none: the ratio of a limit and a value (common practice, no source).
    """
    if kind not in LIMIT_KINDS:
        raise ValueError(f"limit kind = {kind!r}: use one of {', '.join(LIMIT_KINDS)}")
    limit, value = _number(limit), _number(value)
    if limit is None or value is None or not (math.isfinite(limit) and math.isfinite(value)):
        return None
    top, bottom = (limit, value) if kind == "maximum" else (value, limit)
    if top < 0 or bottom < 0:
        return None
    if bottom == 0:
        return math.inf if top > 0 else None
    return top / bottom


def margin_met(value_margin, required: float = 1.0) -> bool | None:
    """True when ``value_margin >= required``; None when the margin is missing.

    Parameters
    ----------
    value_margin : float or None
        A margin from :func:`margin`. [-]
    required : float
        The required margin (>= 1 in every config key that sets one). [-]

    References
    ----------
    none: comparison of two numbers.
    """
    m = _number(value_margin)
    if m is None or math.isnan(m):
        return None
    return m >= required


def margin_record(name: str, limit, value, *, required: float = 1.0, unit: str = "",
                  kind: str = "maximum", ratio: str = "") -> dict:
    """One margin as a record: the numbers it is made of, the required value and whether it is met.

    Parameters
    ----------
    name : str
        Name of the check (e.g. ``"self_focusing.input"``).
    limit, value : float or None
        As in :func:`margin`, in ``unit`` (SI).
    required : float
        Required margin (1 unless a config key sets it). [-]
    unit : str
        SI unit of ``limit`` and ``value`` ("" for a ratio).
    kind : {"maximum", "minimum"}
        As in :func:`margin`.
    ratio : str
        How the margin reads, e.g. ``"P_cr/P"`` (default: ``"limit/value"`` or
        ``"value/limit"``).

    Returns
    -------
    dict
        ``name``, ``value``, ``limit``, ``unit``, ``limit_kind``, ``ratio``, ``margin``,
        ``required``, ``met`` (None when the margin is missing, e.g. an input not given).

    References
    ----------
    none: bookkeeping of :func:`margin`.
    """
    m = margin(limit, value, kind)
    return {"name": name, "value": _number(value), "limit": _number(limit), "unit": unit,
            "limit_kind": kind,
            "ratio": ratio or ("limit/value" if kind == "maximum" else "value/limit"),
            "margin": m, "required": float(required), "met": margin_met(m, required)}


def margin_word(met: bool | None) -> str:
    """``"met"``, ``"not met"`` or ``"not checked"`` (neutral words, never "safe")."""
    return "not checked" if met is None else ("met" if met else "not met")


def margin_text(label: str, value_margin, required: float = 1.0, ratio: str = "",
                met: bool | None = None) -> str:
    """One margin as a line of text, e.g.
    ``"self-focusing margin P_cr/P = 3.1 (required >= 2): met"``.

    Parameters
    ----------
    label : str
        What the margin is of (``"self-focusing margin"``; empty: just ``"margin"``).
    value_margin : float or None
        The margin (:func:`margin`). [-]
    required : float
        The required margin. [-]
    ratio : str
        How the margin reads (``"P_cr/P"``); empty: not shown.
    met : bool, optional
        Whether the margin is met, for a record whose margin was written as null because it
        is unbounded (a zero value against a maximum): ``True`` prints "unbounded ... met".

    References
    ----------
    none: formatting.
    """
    m = _number(value_margin)
    head = " ".join(p for p in (label or "margin", ratio) if p)
    if (m is None or math.isnan(m)) and met:
        return f"{head} = unbounded (required >= {required:g}): met"
    if m is None or math.isnan(m):
        return f"{head}: not checked"
    shown = "unbounded" if math.isinf(m) else f"{m:.3g}"
    return (f"{head} = {shown} (required >= {required:g}): "
            f"{margin_word(margin_met(m, required))}")
