"""Search a pressure (or energy, or both) range for the point that best meets a goal.

1. Allowed range (no propagation). The pressure stays at or below ``limits.rating_fraction``
   x ``cell.rated_pressure_bar``: the rating is never used as an operating point. For one
   searched key, the range is also cut at the largest value that keeps the input-side checks
   of ``limits_report`` within their limits (self-focusing and ionisation at the input, the
   checks before a static-fill fiber); these fall monotonically with pressure and energy.
2. Coarse pass: full chain runs at evenly spaced points over the whole allowed range (both
   ends; a grid for two keys), run in parallel on the scan's executors.
3. Refinement (:mod:`hcfplan.planning.recommend_search`): bisection towards the best local
   optima (a pattern search for two keys), or, with ``target_thz``, a bisection inside the
   first coarse interval where the THz cutoff crosses the target from below.

Every point carries a verdict (:func:`hcfplan.planning.recommend_points.point_verdict`): a run
that failed, a missing goal quantity or a limit exceeded in the run excludes the point. The
answer is the best valid point of all evaluated (the smallest that reaches the target), so it
is never worse than the best valid point of the coarse pass; the objective need be neither
unimodal nor monotone. The answer names the constraints closest to their required value, and
without an answer, which reason excludes which part of the range.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

from hcfplan.errors import ConfigError
from hcfplan.io.stages import split_stage_path, stage_label
from hcfplan.planning import recommend_search as search
from hcfplan.planning.recommend_points import (
    CRYSTAL_LIMITED_GOALS,
    GOALS,
    MIN_MAIN_LOBE_FRACTION,
    Evaluation,
    PointRunner,
    binding_constraints,
    score,
)

Goal = Literal["shortest", "peak_power", "thz_cutoff", "thz_field"]
SEARCH_KEYS = ("gas.pressure_bar", "gas.exit_pressure_bar", "laser.energy_uj")
#: The pressure keys of :data:`SEARCH_KEYS`: a static fill's pressure, or a gradient's exit
#: pressure (its entrance pressure stays as configured).
PRESSURE_KEYS = ("gas.pressure_bar", "gas.exit_pressure_bar")
#: Default coarse pass: points for one key, points per key for two keys.
COARSE_POINTS = {1: 12, 2: 6}
#: Default refinement runs after the coarse pass, for one and two keys.
REFINE_RUNS = {1: 12, 2: 16}
#: Default search tolerance, as a fraction of the allowed range of each key.
DEFAULT_TOLERANCE = 0.01
#: Relative tolerance of the bisection for the edge of the input-side checks.
EDGE_RTOL = 1e-5

__all__ = ["COARSE_POINTS", "DEFAULT_TOLERANCE", "GOALS", "MIN_MAIN_LOBE_FRACTION",
           "PRESSURE_KEYS", "REFINE_RUNS", "SEARCH_KEYS", "Evaluation", "Recommendation",
           "default_key", "default_range",
           "overall_best", "parse_range", "parse_ranges", "recommend"]


@dataclass(frozen=True)
class Recommendation:
    """The answer of one search (one gas)."""

    goal: str
    keys: tuple[str, ...]
    gas: str | None
    requested: tuple[tuple[float, float], ...]  #: per key, in its unit
    allowed: tuple[tuple[float, float], ...] | None  #: per key; None if empty
    bound_reason: str  #: what cuts the upper end of the allowed range ("" = the request)
    tolerance: tuple[float, ...]  #: per key, in its unit
    best: Evaluation | None  #: the chosen point (valid; reaches the target if one is given)
    reason: str  #: why there is no answer, or what it sits on
    evaluations: tuple[Evaluation, ...]  #: every point, sorted by values
    target_thz: float | None = None
    coarse: int = 0  #: points of the coarse pass
    runs: int = 0  #: full chain runs
    rating_fraction: float | None = None
    pressure_cap: float | None = None  #: rating_fraction x rated pressure [bar]; None: no rating
    binding: tuple[dict, ...] = ()  #: constraints closest to their required value at best
    excluded: tuple[tuple[str, int], ...] = ()  #: (reason, points)
    spans: tuple[str, ...] = ()  #: which reason excludes which part of the range
    closest: Evaluation | None = None  #: with an unreached target: the highest valid cutoff
    min_eh11: float | None = None  #: smallest EH11 share of the exit energy allowed [1]

    @property
    def key(self) -> str:
        return self.keys[0]

    @property
    def units(self) -> tuple[str, ...]:
        return tuple(unit(k) for k in self.keys)


def unit(key: str) -> str:
    """Display unit of a search key."""
    return "bar" if is_pressure(key) else "uJ"


def _si(key: str) -> float:
    return 1e5 if is_pressure(key) else 1e-6


def is_pressure(key: str) -> bool:
    """Whether a search key is a pressure (of the single stage or of a stage,
    ``stage.K.gas.pressure_bar``)."""
    return split_stage_path(key)[1] in PRESSURE_KEYS


def stage_config(config, key: str):
    """The config of the stage a search key belongs to (the config itself for a key without
    ``stage.K.``, or a single-stage config)."""
    index = split_stage_path(key)[0]
    if index is None or not config.stages:
        return config
    if index >= len(config.stages):
        raise ConfigError(f"--vary {key}: the config has {len(config.stages)} stages "
                          f"(stage.0 to stage.{len(config.stages) - 1})")
    return config.stages[index]


def parse_range(text: str) -> tuple[str, tuple[float, float]]:
    """``section.key=LO:HI`` for one of :data:`SEARCH_KEYS`."""
    key, _, spec = text.partition("=")
    key = key.strip()
    index, inner = split_stage_path(key, "--vary ")
    if inner not in SEARCH_KEYS or (index is not None and inner not in PRESSURE_KEYS):
        raise ConfigError(f"--vary {key!r}: recommend searches {' or '.join(SEARCH_KEYS)} "
                          "(of a config with stages: stage.K.gas.pressure_bar or "
                          "stage.K.gas.exit_pressure_bar, or laser.energy_uj)")
    try:
        lo, hi = (float(x) for x in spec.split(":"))
    except ValueError:
        raise ConfigError(f"--vary {text!r}: expected {key}=LO:HI (two numbers)") from None
    if not (math.isfinite(lo) and math.isfinite(hi) and 0 < lo < hi):
        raise ConfigError(f"--vary {key}={spec}: need 0 < LO < HI")
    return key, (lo, hi)


def parse_ranges(texts: Sequence[str]) -> list[tuple[str, tuple[float, float]]]:
    """One or two ``--vary`` ranges (two: one pressure and one energy range)."""
    if not 1 <= len(texts) <= 2:
        raise ConfigError(f"--vary: give one or two ranges, got {len(texts)}")
    out = [parse_range(t) for t in texts]
    if len(out) == 2 and out[0][0] == out[1][0]:
        raise ConfigError(f"--vary {out[0][0]}: the same key is given twice")
    if len(out) == 2 and is_pressure(out[0][0]) and is_pressure(out[1][0]):
        raise ConfigError(f"--vary {out[0][0]} and {out[1][0]}: give one pressure range and "
                          "one energy range")
    return out


def default_range(config) -> tuple[float, float]:
    """Pressure range when none is given: a tenth of the fill up to the cell rating (the
    search itself stops at ``limits.rating_fraction`` of it), or 3x the fill; for a gradient
    the same around its exit pressure (:func:`default_key`). [bar]"""
    gas = config.gas
    p = (gas.exit_pressure if gas.is_gradient else gas.pressure) / 1e5
    if not p > 0:
        raise ConfigError("recommend: gas.exit_pressure_bar = 0 gives no default range; give "
                          "--vary gas.exit_pressure_bar=LO:HI")
    hi = config.cell.rated_pressure / 1e5 if config.cell.rated_pressure else 3 * p
    return p / 10, hi


def default_key(config) -> str:
    """The key searched when none is given: the fill pressure, or a gradient's exit pressure
    (entrance fixed); of a config with stages, that of the final stage."""
    if config.stages:
        final = config.stages[-1]
        return stage_label(len(config.stages) - 1, default_key(final))
    return "gas.exit_pressure_bar" if config.gas.is_gradient else "gas.pressure_bar"


# ---------------------------------------------------------------------------------------------
# allowed range


def _beyond(make_config, value: float) -> list[str]:
    """Names of the input-side checks (severity "limit") beyond their limit at ``value``."""
    from hcfplan.planning.scan import limits_values

    checks = limits_values(make_config(value)).get("limits.checks", [])
    return [c["name"] for c in checks
            if c.get("severity") == "limit" and c.get("status") == "exceeds"]


def _sharpen(make_config, lo: float, bound: float, reason: str, unit_: str):
    """Lower ``bound`` to the edge of every input-side check of ``limits_report``.

    The closed-form bounds cover self-focusing in the fiber and ionisation; other input-side
    checks (e.g. self-focusing in the gas before a static-fill fiber) are found by bisection
    on the report at the edge, assuming each is crossed once in the range.
    """
    b, a = max(bound, lo), min(bound, lo)
    if not _beyond(make_config, b):
        return bound, reason
    while _beyond(make_config, a) and a > lo * 1e-3:  # the edge lies lower: step down
        b, a = a, a / 2
    if _beyond(make_config, a):
        return a, f"{', '.join(_beyond(make_config, a))} beyond the limit at {a:.4g} {unit_}"
    while b - a > EDGE_RTOL * b:
        mid = 0.5 * (a + b)
        a, b = (a, mid) if _beyond(make_config, mid) else (mid, b)
    return a, f"{', '.join(_beyond(make_config, b))} beyond the limit above {a:.4g} {unit_}"


def analytic_bound(make_config, key: str, lo: float, hi: float) -> tuple[float, str]:
    """Largest value of ``key`` in ``[lo, hi]`` within the input-side limits.

    ``make_config(value)`` returns the config at one value. Returns (bound, reason); the
    bound is below ``lo`` when the whole range is beyond a limit; reason "" when ``hi`` is
    allowed. A key of stage 1 or later has no input-side bound before a run (its input is
    the previous stage's output): ``(hi, "")``; its runs are judged in full.
    """
    from hcfplan.planning.scan import limits_values

    config = make_config(lo)
    if (split_stage_path(key)[0] or 0) > 0:  # its input is the run of the stage before
        return hi, ""
    report = limits_values(config)
    lim, u, si = config.limits, unit(key), _si(key)
    candidates = [(hi, "")]
    if is_pressure(key):  # a gradient: the highest pressure, its exit when rising
        sf = report.get("limits.self_focusing.max_pressure_pa")
    else:
        sf = report.get("limits.self_focusing.max_energy_j")
        ion = report.get("limits.ionization.max_energy_j")
        if ion is not None:
            ion = float(ion) / si
            candidates.append((ion, f"ionisation fraction > {lim.ionization_fraction_limit:g} "
                                    f"above {ion:.4g} {u}"))
    if sf is not None:
        sf = float(sf) / si
        candidates.append((sf, f"self-focusing margin < {lim.self_focusing_margin:g} above "
                               f"{sf:.4g} {u}"))
    bound, reason = min(candidates, key=lambda c: c[0])
    return _sharpen(make_config, lo, bound, reason, u)


def rating_cap(config) -> float | None:
    """``limits.rating_fraction`` x the cell's rated pressure [bar]; None without a rating."""
    rated = config.cell.rated_pressure
    return None if rated is None else config.limits.rating_fraction * rated / 1e5


# ---------------------------------------------------------------------------------------------
# one search


@dataclass(frozen=True)
class _Setup:
    """What one search runs on."""

    args: tuple  #: (raw, base folder, overrides, gas folders, source)
    goal: str
    spans: tuple[tuple[str, tuple[float, float]], ...]
    target: float | None  #: [Hz]
    coarse: int
    budget: int
    tolerance: float
    workers: int
    min_eh11: float | None = None


def _allowed(runner: PointRunner, setup: _Setup, config):
    """(allowed spans or None, bound reason, pressure cap [bar] or None)."""
    fraction = config.limits.rating_fraction
    keyed = next((k for k, _ in setup.spans if is_pressure(k)), setup.spans[0][0])
    cell = stage_config(config, keyed)
    cap = rating_cap(cell)
    cap_reason = (f"{fraction:g} x the cell rating {cell.cell.rated_pressure / 1e5:g} bar "
                  "(limits.rating_fraction)") if cap is not None else ""
    allowed, reasons = [], []
    for key, (lo, hi) in setup.spans:
        top = hi
        if is_pressure(key) and cap is not None and cap < hi:
            top = cap
            reasons.append(f"{key} up to {cap:.4g} bar: {cap_reason}")
        allowed.append((lo, top))
    top_fill = cell.gas.highest_pressure / 1e5  # a gradient: its higher end
    if not any(is_pressure(k) for k, _ in setup.spans) and cap is not None \
            and top_fill > cap * (1 + 1e-12):
        return None, (f"fill pressure {top_fill:g} bar is above "
                      f"{cap_reason} = {cap:.4g} bar"), cap
    if len(setup.spans) == 1:
        key = setup.spans[0][0]
        lo, top = allowed[0]
        if top < lo:
            return None, reasons[0], cap
        bound, why = analytic_bound(lambda v: runner.config((v,)), key, lo, top)
        if bound < lo:
            return None, why, cap
        if why:
            allowed[0], reasons = (lo, bound), [why]
    elif any(top < lo for lo, top in allowed):
        return None, "; ".join(reasons), cap
    return tuple(allowed), "; ".join(reasons), cap


def _grid_points(allowed, coarse: int) -> list[tuple[float, ...]]:
    axes = [search.coarse_values(lo, hi, coarse) for lo, hi in allowed]
    if len(axes) == 1:
        return [(x,) for x in axes[0]]
    return [(x, y) for x in axes[0] for y in axes[1]]


def _search(setup: _Setup, gas: str | None, on_batch=None) -> Recommendation:
    keys = tuple(k for k, _ in setup.spans)
    units = tuple(unit(k) for k in keys)
    runner = PointRunner(setup.args, keys, setup.goal, setup.budget, setup.workers, on_batch,
                         setup.min_eh11)
    config = runner.config(tuple(lo for _, (lo, _) in setup.spans))
    fraction = config.limits.rating_fraction
    allowed, bound_reason, cap = _allowed(runner, setup, config)
    requested = tuple(span for _, span in setup.spans)
    common = {"goal": setup.goal, "keys": keys, "gas": gas, "requested": requested,
              "target_thz": None if setup.target is None else setup.target / 1e12,
              "rating_fraction": fraction, "pressure_cap": cap, "min_eh11": setup.min_eh11}
    if allowed is None:
        where = ", ".join(f"{k} in {lo:g}-{hi:g} {unit(k)}" for k, (lo, hi) in setup.spans)
        return Recommendation(**common, allowed=None, bound_reason=bound_reason,
                              tolerance=tuple(0.0 for _ in keys), best=None,
                              reason=f"no allowed {where}: {bound_reason}", evaluations=())
    tol = tuple(setup.tolerance * (hi - lo) for lo, hi in allowed)
    sc = lambda e: score(e, setup.goal)  # noqa: E731
    reached = None
    if setup.target is not None:
        reached = lambda e: e.objective is not None and e.objective >= setup.target  # noqa: E731
    points = _grid_points(allowed, setup.coarse)
    coarse = runner.evaluate(points)
    if setup.target is not None:
        search.smallest_reaching(runner, coarse, reached, tol[0], max(1, setup.workers))
    elif len(keys) == 1:
        search.refine_1d(runner, sc, tol[0])
    else:
        axes = [search.coarse_values(lo, hi, setup.coarse) for lo, hi in allowed]
        grid = {(i, j): runner.done[(x, y)] for i, x in enumerate(axes[0])
                for j, y in enumerate(axes[1]) if (x, y) in runner.done}
        steps = tuple((hi - lo) / max(setup.coarse - 1, 1) for lo, hi in allowed)
        search.refine_2d(runner, sc, grid, steps, allowed, tol)
    evals = tuple(sorted(runner.done.values(), key=lambda e: e.values))
    if reached is not None:
        hits = [e for e in evals if e.valid and reached(e)]
        best = min(hits, key=lambda e: e.values) if hits else None
        closest = None if hits else search.best_of(evals, sc)
    else:
        best, closest = search.best_of(evals, sc), None
    reason = ""
    spans = tuple(search.excluded_spans(evals, units, reached))
    if best is None:
        what = (f"no point reaches the THz cutoff target {common['target_thz']:g} THz within "
                "the modelled limits" if reached is not None else
                "no point meets the goal within the modelled limits")
        reason = what + (": " + "; ".join(spans) if spans else "")
        if bound_reason:
            reason += f"; not searched: {bound_reason}"
    elif len(keys) == 1 and bound_reason and abs(best.value - allowed[0][1]) <= tol[0]:
        reason = f"on the edge of the allowed range: {bound_reason}"
    binding = ()
    if best is not None:
        cap_pa = None if cap is None else cap * 1e5
        binding = tuple(binding_constraints(best.record, cap_pa, fraction,
                                            crystal=setup.goal in CRYSTAL_LIMITED_GOALS,
                                            min_eh11=setup.min_eh11))
    return Recommendation(**common, allowed=allowed, bound_reason=bound_reason, tolerance=tol,
                          best=best, reason=reason, evaluations=evals, coarse=len(points),
                          runs=runner.runs, binding=binding,
                          excluded=tuple(search.exclusion_counts(evals, reached)),
                          spans=spans, closest=closest)


# ---------------------------------------------------------------------------------------------
# front end


def _validate(goal, target_thz, coarse, budget, dims) -> tuple[int, int]:
    if goal not in GOALS:
        raise ConfigError(f"--goal = {goal!r}: must be one of {', '.join(GOALS)}")
    if target_thz is not None and (goal != "thz_cutoff" or not target_thz > 0):
        raise ConfigError(f"--target-thz = {target_thz}: needs --goal thz_cutoff and a value "
                          "> 0")
    if target_thz is not None and dims != 1:
        raise ConfigError("--target-thz: searches one key (give one --vary)")
    coarse = COARSE_POINTS[dims] if coarse is None else coarse
    if coarse < 3:
        raise ConfigError(f"--coarse = {coarse}: must be >= 3")
    total = coarse ** dims
    budget = total + REFINE_RUNS[dims] if budget is None else budget
    if budget < total:
        raise ConfigError(f"--budget = {budget}: must be at least the coarse pass "
                          f"({total} runs)")
    return coarse, budget


def recommend(config_path: str | Path, goal: Goal, *,
              search: str | Sequence[str] | None = None, gases: tuple[str, ...] = (),
              target_thz: float | None = None, overrides=(), extra_gas_dirs=(),
              budget: int | None = None, coarse: int | None = None,
              tolerance: float = DEFAULT_TOLERANCE, workers: int = 1,
              on_batch: Callable[[int, int], None] | None = None,
              min_eh11: float | None = None) -> tuple[Recommendation, ...]:
    """Best point for ``goal`` per gas (one entry without ``gases``).

    ``search`` is one or two ranges ``"gas.pressure_bar=LO:HI"`` (a gradient:
    ``"gas.exit_pressure_bar=LO:HI"``, entrance fixed) / ``"laser.energy_uj=LO:HI"`` (default:
    the pressure from a tenth of the fill up to the cell rating, or 3x the fill).
    ``target_thz`` (goal ``thz_cutoff``, one key) asks for the smallest value whose cutoff
    reaches it [THz]. ``coarse``: points of the coarse pass per key (default
    :data:`COARSE_POINTS`); ``budget``: full runs per gas, at most (default: the coarse pass
    plus :data:`REFINE_RUNS`); ``workers``: points run at a time (1: in this process).
    ``on_batch(runs_done, batch_size)`` is called before each batch of runs.
    ``min_eh11`` (a multimode config, ``fiber.modes`` > 1) excludes every point whose EH11
    share of the exit energy (``output.eh11_fraction``) is below it.
    """
    from hcfplan.io.config import config_from_mapping
    from hcfplan.io.tomlio import read_toml

    texts = [search] if isinstance(search, str) else list(search or ())
    ranges = parse_ranges(texts) if texts else None
    coarse, budget = _validate(goal, target_thz, coarse, budget, len(ranges or [0]))
    if min_eh11 is not None and not 0 < min_eh11 <= 1:
        raise ConfigError(f"--min-eh11 = {min_eh11:g}: must be in (0, 1] (a share of the "
                          "exit energy)")
    if workers < 1:
        raise ConfigError(f"--workers = {workers}: must be >= 1")
    path = Path(config_path)
    raw = read_toml(path)
    first = config_from_mapping(raw, base_dir=path.parent, overrides=tuple(overrides),
                                extra_gas_dirs=extra_gas_dirs, source=path)
    searched = ranges[0][0] if ranges else default_key(first)
    species = "gas.species"  # of the searched stage in a config with stages
    if first.stages:
        species = stage_label(split_stage_path(searched)[0] or 0, species)
    runs = [(None, tuple(overrides))] if not gases else [
        (g, tuple(overrides) + (f"{species}={g}",)) for g in gases]
    out = []
    for gas, over in runs:
        whole = config_from_mapping(raw, base_dir=path.parent, overrides=over,
                                    extra_gas_dirs=extra_gas_dirs, source=path)
        config = stage_config(whole, searched)
        if config.gas is None:
            raise ConfigError(f"recommend: fiber.kind = {config.fiber.kind!r} has no gas; "
                              "the search needs a gas-filled fiber")
        if min_eh11 is not None and config.fiber.modes < 2:
            raise ConfigError(f"--min-eh11 = {min_eh11:g}: needs fiber.modes > 1 (a "
                              "single-mode run has no EH11 share; set fiber.modes)")
        if goal == "thz_field" and ("thz" not in config.present_sections
                                    or config.thz.beam_waist is None):
            raise ConfigError("--goal thz_field: needs a [thz] section with thz.beam_waist_um "
                              "(the peak field is absolute)")
        spans = tuple(ranges) if ranges else ((default_key(whole), default_range(config)),)
        setup = _Setup((raw, path.parent, tuple(over), tuple(extra_gas_dirs), path), goal,
                       spans, None if target_thz is None else target_thz * 1e12, coarse,
                       budget, tolerance, workers, min_eh11)
        out.append(_search(setup, gas, on_batch))
    return tuple(out)


def overall_best(recs: Sequence[Recommendation]) -> Recommendation | None:
    """The recommendation with the best chosen point (with a target: the smallest value)."""
    found = [r for r in recs if r.best is not None]
    if not found:
        return None
    if found[0].target_thz is not None:
        return min(found, key=lambda r: r.best.values)
    return min(found, key=lambda r: score(r.best, r.goal))
