"""Search strategies of recommend: coarse pass, refinement around local optima, target bracket.

Every strategy works on a runner with ``evaluate(points) -> list[Evaluation]`` (new points of
one call run as one parallel batch), ``done`` (every point evaluated so far) and ``left`` (full
runs left in the budget); see :class:`hcfplan.planning.recommend_points.PointRunner`. Points
are tuples of values of the searched keys. The objective is neither assumed unimodal nor
monotone: the coarse pass covers the whole allowed range, the refinement then bisects towards
each of the best local optima in turn, and the answer is the best valid point of everything
evaluated, so it is never worse than the best valid point of the coarse pass.
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Callable, Sequence

from hcfplan.planning.recommend_points import NOT_REACHED, Evaluation

#: Local optima refined in each round (best first).
OPTIMA_REFINED = 2


def coarse_values(lo: float, hi: float, count: int) -> list[float]:
    """``count`` evenly spaced values from ``lo`` to ``hi``, both ends included."""
    if count < 2 or hi <= lo:
        return [lo]
    step = (hi - lo) / (count - 1)
    values = [lo + i * step for i in range(count)]
    values[-1] = hi
    return values


def best_of(evals, score: Callable[[Evaluation], float]) -> Evaluation | None:
    """The valid evaluation with the lowest score (the lowest values on a tie), or None."""
    good = [e for e in evals if e.valid and math.isfinite(score(e))]
    return min(good, key=lambda e: (score(e), e.values)) if good else None


# ---------------------------------------------------------------------------------------------
# one key


def local_optima_1d(evals: Sequence[Evaluation], score) -> list[int]:
    """Indices (into ``evals``, sorted by value) of the valid points that score no worse
    than both neighbours, best first; a missing or invalid neighbour counts as worse."""
    scores = [score(e) for e in evals]
    found = []
    for i, s in enumerate(scores):
        if not math.isfinite(s):
            continue
        left = scores[i - 1] if i > 0 else math.inf
        right = scores[i + 1] if i + 1 < len(scores) else math.inf
        if s <= left and s <= right:
            found.append(i)
    return sorted(found, key=lambda i: (scores[i], evals[i].values))


def refine_1d(runner, score, tol: float, optima: int = OPTIMA_REFINED) -> None:
    """Bisect towards the local optima until their neighbours lie within ``tol`` or the
    budget is spent: each round evaluates, in one batch, the midpoints between an optimum and
    its two neighbours among all evaluated points, for the best ``optima`` local optima that
    are not yet within ``tol`` of both neighbours."""
    while runner.left > 0:
        evals = sorted(runner.done.values(), key=lambda e: e.values)
        proposals: list[tuple[float, ...]] = []
        refined = 0
        for i in local_optima_1d(evals, score):
            x = evals[i].value
            mids = [(0.5 * (x + evals[j].value),) for j in (i - 1, i + 1)
                    if 0 <= j < len(evals) and abs(evals[j].value - x) > tol]
            mids = [m for m in mids if m not in runner.done and m not in proposals]
            if mids:
                proposals += mids
                refined += 1
            if refined == optima:
                break
        before = len(runner.done)
        if not proposals:
            return
        runner.evaluate(proposals)
        if len(runner.done) == before:
            return


def first_crossing(evals: Sequence[Evaluation], reached) -> int | None:
    """Index of the first point (sorted by value) that is valid and reaches the target."""
    return next((i for i, e in enumerate(evals) if e.valid and reached(e)), None)


def _bisect_crossing(runner, a: float, b: float, reached, tol: float, per_round: int) -> None:
    """Narrow (a, b), where b is valid and reaches the target and a does not, to ``tol``."""
    k = max(1, per_round)
    while b - a > tol and runner.left > 0:
        inner = [(a + (b - a) * i / (k + 1),) for i in range(1, k + 1)]
        runner.evaluate(inner)
        if not all(p in runner.done for p in inner):
            return  # budget spent within the round
        for p in inner:
            e = runner.done[p]
            if e.valid and reached(e):
                b = p[0]
                break
            a = p[0]


def _probe_edge(runner, a: float, b: float, reached, tol: float) -> float | None:
    """Search (a, b), from a valid point ``a`` below the target to an excluded point ``b``,
    for a valid point that reaches the target (the target may be crossed on the valid side of
    the excluded part): bisection towards the edge of the excluded part. Returns the value of
    the point found, or None."""
    while b - a > tol and runner.left > 0:
        mid = (0.5 * (a + b),)
        got = runner.evaluate([mid])
        if not got:
            return None
        if got[0].valid and reached(got[0]):
            return mid[0]
        a, b = (mid[0], b) if got[0].valid else (a, mid[0])
    return None


def smallest_reaching(runner, coarse: Sequence[Evaluation], reached, tol: float,
                      per_round: int = 1) -> None:
    """Narrow the first interval of the coarse pass where the target is crossed from below.

    Walking up from the low end: an interval from a valid point below the target to an
    excluded point (its run beyond a limit, or its number void) is probed first, since the
    target may be reached just below the excluded part (:func:`_probe_edge`); the interval
    ending at the first coarse point that is valid and reaches the target is the bracket.
    Each round of the bisection in a bracket evaluates ``per_round`` evenly spaced interior
    points in one batch and keeps the part up to the first of them that reaches the target,
    until the bracket is within ``tol`` or the budget is spent. A point that cannot be chosen
    counts as not reaching the target.
    """
    evals = sorted(coarse, key=lambda e: e.values)
    j = first_crossing(evals, reached)
    stop = len(evals) - 1 if j is None else j
    for i in range(stop):
        here, there = evals[i], evals[i + 1]
        if i + 1 == j:
            _bisect_crossing(runner, here.value, there.value, reached, tol, per_round)
            return
        if here.valid and not reached(here) and not there.valid and there.status != "not run":
            found = _probe_edge(runner, here.value, there.value, reached, tol)
            if found is not None:
                low = max((e.value for e in runner.done.values() if e.value < found),
                          default=here.value)
                _bisect_crossing(runner, low, found, reached, tol, per_round)
                return


# ---------------------------------------------------------------------------------------------
# two keys


def local_optima_2d(grid: dict[tuple[int, int], Evaluation], score) -> list[tuple[int, int]]:
    """Grid indices of the valid points that score no worse than their (up to 8) neighbours,
    best first."""
    found = []
    for (i, j), e in grid.items():
        s = score(e)
        if not math.isfinite(s):
            continue
        near = [grid.get((i + di, j + dj)) for di in (-1, 0, 1) for dj in (-1, 0, 1)
                if di or dj]
        if all(n is None or s <= score(n) for n in near):
            found.append((i, j))
    return sorted(found, key=lambda ij: (score(grid[ij]), grid[ij].values))


def refine_2d(runner, score, grid: dict[tuple[int, int], Evaluation],
              steps: tuple[float, float], box: tuple[tuple[float, float], ...],
              tol: tuple[float, float], optima: int = OPTIMA_REFINED) -> None:
    """Pattern search around the best ``optima`` local optima of the coarse grid.

    Each round evaluates, in one batch, the 8 neighbours of each current centre at half the
    last spacing (inside ``box``); the best valid point among the centre and its neighbours
    becomes the next centre. Stops when the spacing is within ``tol`` on both keys or the
    budget is spent.
    """
    states = [(grid[ij].values, (steps[0] / 2, steps[1] / 2))
              for ij in local_optima_2d(grid, score)[:optima]]
    while states and runner.left > 0:
        rounds = []
        for centre, (sx, sy) in states:
            near = []
            for di in (-1, 0, 1):
                for dj in (-1, 0, 1):
                    p = (centre[0] + di * sx, centre[1] + dj * sy)
                    if (di or dj) and all(lo - 1e-12 * abs(hi) <= v <= hi + 1e-12 * abs(hi)
                                          for v, (lo, hi) in zip(p, box, strict=True)):
                        near.append(p)
            rounds.append((centre, (sx, sy), near))
        before = len(runner.done)
        runner.evaluate([p for _, _, near in rounds for p in near])
        if len(runner.done) == before:
            return
        states = []
        for centre, (sx, sy), near in rounds:
            here = [runner.done[p] for p in [centre, *near] if p in runner.done]
            best = best_of(here, score)
            if best is not None and (sx > tol[0] or sy > tol[1]):
                states.append((best.values, (sx / 2, sy / 2)))


# ---------------------------------------------------------------------------------------------
# what was excluded, and where


def point_label(e: Evaluation, reached=None) -> str:
    """"" for a point that may be chosen (and reaches the target, with ``reached``), else
    the reasons it is excluded, joined by "; "."""
    if not e.valid:
        return "; ".join(e.reasons)
    if reached is not None and not reached(e):
        return NOT_REACHED
    return ""


def exclusion_counts(evals: Sequence[Evaluation], reached=None) -> list[tuple[str, int]]:
    """(reason, number of points) over the excluded points, most frequent first (a point
    with two reasons counts under both)."""
    counts: Counter[str] = Counter()
    for e in evals:
        if not e.valid:
            counts.update(e.reasons)
        elif reached is not None and not reached(e):
            counts[NOT_REACHED] += 1
    return counts.most_common()


def _span(lo: float, hi: float, unit: str) -> str:
    return f"{lo:.4g} {unit}" if lo == hi else f"{lo:.4g}–{hi:.4g} {unit}"


def excluded_spans(evals: Sequence[Evaluation], units: Sequence[str],
                   reached=None) -> list[str]:
    """Which reason excludes which part of the range, e.g.
    ``"5–20 bar: self-focusing margin < 2"``.

    One key: runs of neighbouring points (sorted by value) with the same label. Two keys: per
    label, the number of points and the box they span.
    """
    evals = sorted(evals, key=lambda e: e.values)
    if not evals:
        return []
    if len(units) == 1:
        out, start = [], 0
        labels = [point_label(e, reached) for e in evals]
        for i in range(1, len(evals) + 1):
            if i == len(evals) or labels[i] != labels[start]:
                if labels[start]:
                    out.append(f"{_span(evals[start].value, evals[i - 1].value, units[0])}: "
                               f"{labels[start]}")
                start = i
        return out
    groups: dict[str, list[Evaluation]] = {}
    for e in evals:
        label = point_label(e, reached)
        if label:
            groups.setdefault(label, []).append(e)
    out = []
    for label, members in groups.items():
        box = " x ".join(_span(min(m.values[k] for m in members),
                               max(m.values[k] for m in members), units[k])
                         for k in range(len(units)))
        out.append(f"{len(members)} point{'s' if len(members) > 1 else ''} in {box}: {label}")
    return out
