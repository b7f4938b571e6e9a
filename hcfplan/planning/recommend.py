"""Search a pressure (or energy) range for the point that best meets a goal, within the limits.

Two stages:

1. Analytic bound (no propagation): the largest value of the searched key that keeps the
   input self-focusing margin, the input ionisation fraction and the cell rating
   (``limits.self_focusing.max_pressure_pa``, ``limits.*.max_energy_j`` of
   :func:`hcfplan.planning.reports.limits.limits_report`; without that module a bisection on
   P_cr / P of :func:`hcfplan.planning.scan.point_margins`). Both margins fall monotonically
   with pressure and with energy, so the allowed range is ``[low, bound]``.
2. Full chain runs (:func:`hcfplan.planning.scan.compute_point`) inside the allowed range,
   within an evaluation budget: a coarse pass over evenly spaced values including both ends,
   then a golden-section refinement (``scipy.optimize.minimize_scalar``, bounded) around the
   best point for ``shortest`` / ``peak_power`` / ``thz_cutoff``, or a bisection for the
   smallest value that reaches ``target_thz``. A run that ends beyond a limit (e.g. the
   ionisation in the fiber after self-compression) is never chosen and lowers the bound.

Assumptions: the objective is unimodal in the searched key over the allowed range (golden
section); the THz cutoff grows with the searched key (bisection). Both are checked only at
the evaluated points.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

from hcfplan.errors import ConfigError

Goal = Literal["shortest", "peak_power", "thz_cutoff"]

#: goal -> (summary section, key, sign): the search minimises sign * value
GOALS: dict[str, tuple[str, str, float]] = {
    "shortest": ("compressed", "fwhm_s", 1.0),
    "peak_power": ("compressed", "peak_power_w", -1.0),
    "thz_cutoff": ("thz", "cutoff_hz", -1.0),
}
#: For the goal "shortest", a compressed pulse counts only with at least this share of its
#: energy in the main lobe: a short spike on a broad pedestal is not a short pulse for a lab
#: (common practice, no source).
MIN_MAIN_LOBE_FRACTION = 0.5
SEARCH_KEYS = ("gas.pressure_bar", "laser.energy_uj")
#: Default evaluation budget (full chain runs per gas).
DEFAULT_BUDGET = 12
#: Default search tolerance, as a fraction of the allowed range.
DEFAULT_TOLERANCE = 0.01
#: Points of the coarse pass (both ends included).
COARSE_POINTS = 4


@dataclass(frozen=True)
class Evaluation:
    """One full run at ``value`` of the searched key."""

    value: float
    status: str
    objective: float | None  #: the goal quantity (SI), None when missing
    acceptable: bool
    binding: str
    record: dict = field(repr=False)


@dataclass(frozen=True)
class Recommendation:
    goal: str
    key: str
    gas: str | None
    requested: tuple[float, float]
    allowed: tuple[float, float] | None  #: after the analytic bound; None if empty
    bound_reason: str  #: what sets the upper end of the allowed range ("" = the request)
    tolerance: float  #: in the key's unit
    best: Evaluation | None
    reason: str  #: why there is no best point, or what limited it
    evaluations: tuple[Evaluation, ...]
    target_thz: float | None = None


def parse_range(text: str) -> tuple[str, tuple[float, float]]:
    """``section.key=LO:HI`` for one of :data:`SEARCH_KEYS`."""
    key, _, spec = text.partition("=")
    key = key.strip()
    if key not in SEARCH_KEYS:
        raise ConfigError(f"--vary {key!r}: recommend searches {' or '.join(SEARCH_KEYS)}")
    try:
        lo, hi = (float(x) for x in spec.split(":"))
    except ValueError:
        raise ConfigError(f"--vary {text!r}: expected {key}=LO:HI (two numbers)") from None
    if not (math.isfinite(lo) and math.isfinite(hi) and 0 < lo < hi):
        raise ConfigError(f"--vary {key}={spec}: need 0 < LO < HI")
    return key, (lo, hi)


# ---------------------------------------------------------------------------------------------
# stage 1: analytic bound


def _config(raw, base_dir, overrides, gas_dirs, source):
    from hcfplan.io.config import config_from_mapping

    return config_from_mapping(raw, base_dir=base_dir, overrides=overrides,
                               extra_gas_dirs=gas_dirs, source=source)


def _unit(key: str) -> tuple[str, float]:
    """Display unit of a search key and its SI factor."""
    return ("bar", 1e5) if key == "gas.pressure_bar" else ("uJ", 1e-6)


def analytic_bound(make_config, key: str, lo: float, hi: float) -> tuple[float, str]:
    """Largest allowed value of ``key`` in ``[lo, hi]`` from the input-side limits.

    ``make_config(value)`` returns the config at one value. Returns (bound, reason); the
    bound is below ``lo`` when the whole range is beyond a limit; reason "" when ``hi`` is
    allowed.
    """
    from hcfplan.planning.scan import limits_values

    config = make_config(lo)
    report = limits_values(config)
    unit, si = _unit(key)
    lim = config.limits
    candidates = [(hi, "")]
    if key == "gas.pressure_bar":
        if config.cell.rated_pressure is not None:
            candidates.append((config.cell.rated_pressure / si,
                               f"cell rating {config.cell.rated_pressure / si:.4g} bar"))
        sf = _pressure_bound_self_focusing(report)
    else:
        sf = _energy_bound(report, "limits.self_focusing.max_energy_j", si)
        ion = _energy_bound(report, "limits.ionization.max_energy_j", si)
        if ion is not None:
            candidates.append((ion, f"ionisation fraction > {lim.ionization_fraction_limit:g} "
                                    f"above {ion:.4g} {unit}"))
    if sf is not None:
        candidates.append((sf, f"self-focusing margin < {lim.self_focusing_margin:g} above "
                               f"{sf:.4g} {unit}"))
    bound, reason = min(candidates, key=lambda c: c[0])
    return _sharpen(make_config, lo, bound, reason, unit)


#: Relative tolerance of the bisection for the edge of the input-side checks.
EDGE_RTOL = 1e-5


def _beyond(make_config, value: float) -> list[str]:
    """Names of the input-side checks (severity "limit") beyond their limit at ``value``."""
    from hcfplan.planning.scan import limits_values

    checks = limits_values(make_config(value)).get("limits.checks", [])
    return [c["name"] for c in checks
            if c.get("severity") == "limit" and c.get("status") == "exceeds"]


def _sharpen(make_config, lo: float, bound: float, reason: str, unit: str):
    """Lower ``bound`` to the edge of every input-side check of ``limits_report``.

    The closed-form bounds cover self-focusing in the fiber, ionisation and the rating; other
    input-side checks (e.g. self-focusing in the gas before a static-fill fiber) are found
    by bisection on the report at the edge, assuming each is crossed once in the range.
    """
    b, a = max(bound, lo), min(bound, lo)
    if not _beyond(make_config, b):
        return bound, reason
    while _beyond(make_config, a) and a > lo * 1e-3:  # the edge lies lower: step down
        b, a = a, a / 2
    if _beyond(make_config, a):
        return a, f"{', '.join(_beyond(make_config, a))} beyond the limit at {a:.4g} {unit}"
    while b - a > EDGE_RTOL * b:
        mid = 0.5 * (a + b)
        a, b = (a, mid) if _beyond(make_config, mid) else (mid, b)
    return a, f"{', '.join(_beyond(make_config, b))} beyond the limit above {a:.4g} {unit}"


def _energy_bound(report: dict, name: str, si: float) -> float | None:
    value = report.get(name)
    return None if value is None else float(value) / si


def _pressure_bound_self_focusing(report: dict) -> float | None:
    value = report.get("limits.self_focusing.max_pressure_pa")
    return None if value is None else float(value) / 1e5


# ---------------------------------------------------------------------------------------------
# stage 2: full runs


class _Runner:
    """Full chain runs at values of one key, cached, counted against a budget."""

    def __init__(self, raw, base_dir, overrides, gas_dirs, source, key, budget, goal):
        self.args = (raw, base_dir, tuple(overrides), tuple(gas_dirs), source)
        self.key, self.budget, self.goal = key, budget, goal
        self.done: dict[float, Evaluation] = {}

    def config(self, value: float):
        from hcfplan.planning.scan import override_text

        raw, base, over, dirs, source = self.args
        return _config(raw, base, over + (override_text(self.key, float(value)),), dirs, source)

    @property
    def left(self) -> int:
        return self.budget - len(self.done)

    def __call__(self, value: float) -> Evaluation:
        from hcfplan.planning.scan import compute_point, config_key, override_text

        value = float(value)
        if value in self.done:
            return self.done[value]
        raw, base, over, dirs, source = self.args
        task = {"raw": raw, "base_dir": str(base), "source": str(source),
                "overrides": list(over + (override_text(self.key, value),)),
                "extra_gas_dirs": list(dirs), "key": config_key(self.config(value).resolved),
                "values": {self.key: value}}
        record = compute_point(task)
        section, name, _ = GOALS[self.goal]
        objective = record["summary"].get(section, {}).get(name)
        ok = record["status"] == "ok" and objective is not None
        binding = record["margins"].get("binding", "") or ("" if ok else
                                                           record["message"] or "run failed")
        acceptable = ok and record["margins"]["acceptable"]
        lobe = record["summary"].get("compressed", {}).get("main_lobe_energy_fraction")
        if ok and self.goal == "shortest" and (lobe is None or lobe < MIN_MAIN_LOBE_FRACTION):
            acceptable = False
            share = "unknown" if lobe is None else f"{lobe:.2g}"
            binding = ", ".join(b for b in (binding, f"pulse quality: main-lobe energy "
                                            f"fraction {share} < {MIN_MAIN_LOBE_FRACTION:g}")
                                if b)
        self.done[value] = Evaluation(value, record["status"], objective, acceptable, binding,
                                      record)
        return self.done[value]


def _score(ev: Evaluation, goal: str) -> float:
    """Lower is better; points beyond a limit or failed score +inf."""
    if not ev.acceptable:
        return math.inf
    return GOALS[goal][2] * ev.objective


def _best(runner: _Runner) -> Evaluation | None:
    good = [e for e in runner.done.values() if e.acceptable]
    return min(good, key=lambda e: _score(e, runner.goal)) if good else None


def _optimise(runner: _Runner, lo: float, hi: float, tol: float) -> None:
    """Coarse pass (both ends), then bounded golden/Brent refinement around the best."""
    import numpy as np
    from scipy.optimize import minimize_scalar

    count = max(2, min(COARSE_POINTS, runner.left))
    grid = np.linspace(lo, hi, count) if hi > lo else np.array([lo])
    for x in grid[::-1]:
        ev = runner(x)
        if not ev.acceptable and ev.status == "ok" and x > grid[0]:
            hi = x  # beyond a limit in the run (monotone in the key): search below
    best = _best(runner)
    if best is None or runner.left <= 0 or len(grid) < 2:
        return
    i = int(np.argmin(np.abs(grid - best.value)))
    a, b = grid[max(i - 1, 0)], min(grid[min(i + 1, len(grid) - 1)], hi)
    if b - a <= tol:
        return

    def objective(x: float) -> float:
        if runner.left <= 0:
            return math.inf
        score = _score(runner(x), runner.goal)
        return score if math.isfinite(score) else 1e300

    minimize_scalar(objective, bounds=(a, b), method="bounded",
                    options={"xatol": tol, "maxiter": runner.left})


def _reach_target(runner: _Runner, lo: float, hi: float, tol: float, target: float) -> None:
    """Smallest value whose THz cutoff reaches ``target`` (bisection; cutoff rising)."""
    top = runner(hi)
    if not (top.acceptable and top.objective >= target):
        return
    bottom = runner(lo)
    if bottom.acceptable and bottom.objective >= target:
        return
    a, b = lo, hi
    while b - a > tol and runner.left > 0:
        mid = 0.5 * (a + b)
        ev = runner(mid)
        if ev.acceptable and ev.objective >= target:
            b = mid
        else:
            a = mid



# ---------------------------------------------------------------------------------------------
# front end


def default_range(config) -> tuple[float, float]:
    """Pressure range when none is given: a tenth of the fill up to the rating (or 3x). [bar]"""
    p = config.gas.pressure / 1e5
    hi = config.cell.rated_pressure / 1e5 if config.cell.rated_pressure else 3 * p
    return p / 10, hi


def _why_none(runner: _Runner, target: float | None) -> str:
    beyond = sorted((e for e in runner.done.values() if not e.acceptable), key=lambda e: e.value)
    unit, _ = _unit(runner.key)
    if beyond and len(beyond) == len(runner.done):
        first = beyond[0]
        return (f"every evaluated point is beyond a modelled limit ({first.binding} at "
                f"{first.value:.4g} {unit}, the lowest evaluated)")
    if target is not None:
        return f"no evaluated point reaches the THz cutoff target {target:g} THz"
    return "no acceptable point found within the budget"


def _search_one(raw, base_dir, overrides, gas_dirs, source, goal, key, span, target_thz,
                budget, tolerance, gas) -> Recommendation:
    runner = _Runner(raw, base_dir, overrides, gas_dirs, source, key, budget, goal)
    lo, hi = span
    bound, bound_reason = analytic_bound(runner.config, key, lo, hi)
    unit, _ = _unit(key)
    if bound < lo:
        return Recommendation(goal, key, gas, span, None, bound_reason, 0.0, None,
                              f"no allowed {key} in {lo:g}-{hi:g} {unit}: {bound_reason}", (),
                              target_thz)
    top = min(hi, bound)
    tol = tolerance * (top - lo)
    if target_thz is not None:
        _reach_target(runner, lo, top, tol, target_thz * 1e12)
    else:
        _optimise(runner, lo, top, tol)
    best, reason = _best(runner), ""
    if target_thz is not None:
        reached = [e for e in runner.done.values()
                   if e.acceptable and e.objective >= target_thz * 1e12]
        if reached:
            best = min(reached, key=lambda e: e.value)
        elif best is not None:
            limit = bound_reason or f"the end of the requested range, {hi:g} {unit}"
            reason = (f"THz cutoff {best.objective / 1e12:.4g} THz at {best.value:.4g} {unit} "
                      f"(closest point; upper end set by {limit}) is below the target "
                      f"{target_thz:g} THz")
    if best is None:
        reason = _why_none(runner, target_thz)
    elif not reason and bound_reason and abs(best.value - top) <= tol:
        reason = f"on the limit: {bound_reason}"
    return Recommendation(goal, key, gas, span, (lo, top), bound_reason, tol, best, reason,
                          tuple(sorted(runner.done.values(), key=lambda e: e.value)),
                          target_thz)


def recommend(config_path: str | Path, goal: Goal, *, search: str | None = None,
              gases: tuple[str, ...] = (), target_thz: float | None = None, overrides=(),
              extra_gas_dirs=(), budget: int = DEFAULT_BUDGET,
              tolerance: float = DEFAULT_TOLERANCE) -> tuple[Recommendation, ...]:
    """Best point for ``goal`` per gas (one entry without ``gases``).

    ``search`` is ``"gas.pressure_bar=LO:HI"`` or ``"laser.energy_uj=LO:HI"``; default: the
    pressure from a tenth of the fill up to the cell rating (or 3x the fill).
    ``target_thz`` (goal ``thz_cutoff`` only) asks for the smallest value of the key whose
    cutoff reaches it [THz]; ``budget`` caps the full runs per gas.
    """
    from hcfplan.io.tomlio import read_toml

    if goal not in GOALS:
        raise ConfigError(f"--goal = {goal!r}: must be one of {', '.join(GOALS)}")
    if target_thz is not None and (goal != "thz_cutoff" or not target_thz > 0):
        raise ConfigError(f"--target-thz = {target_thz}: needs --goal thz_cutoff and a value "
                          "> 0")
    if budget < 2:
        raise ConfigError(f"--budget = {budget}: must be >= 2")
    path = Path(config_path)
    raw = read_toml(path)
    runs = [(None, tuple(overrides))] if not gases else [
        (g, tuple(overrides) + (f"gas.species={g}",)) for g in gases]
    out = []
    for gas, over in runs:
        config = _config(raw, path.parent, over, extra_gas_dirs, path)
        if config.gas is None:
            raise ConfigError(f"recommend: fiber.kind = {config.fiber.kind!r} has no gas; "
                              "the search needs a gas-filled fiber")
        key, span = parse_range(search) if search else ("gas.pressure_bar",
                                                         default_range(config))
        out.append(_search_one(raw, path.parent, over, extra_gas_dirs, path, goal, key, span,
                               target_thz, budget, tolerance, gas))
    return tuple(out)


def overall_best(recs: tuple[Recommendation, ...]) -> Recommendation | None:
    """The recommendation with the best acceptable point (goal order; reached targets first)."""
    found = [r for r in recs if r.best is not None]
    if not found:
        return None
    if found[0].target_thz is not None:
        reached = [r for r in found if not r.reason.startswith("THz cutoff")]
        if reached:
            return min(reached, key=lambda r: r.best.value)
        return max(found, key=lambda r: r.best.objective)
    return min(found, key=lambda r: _score(r.best, r.goal))
