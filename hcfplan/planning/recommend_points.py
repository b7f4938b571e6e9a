"""The points of a recommend search: one full chain run each, its verdict and its constraints.

A point is a tuple of values of the searched keys (in the keys' own units, e.g. bar and uJ).
:class:`PointRunner` turns points into scan tasks and runs them in batches on the scan's
executors (:data:`hcfplan.planning.scan.executors.EXECUTORS`: serially or on local worker
processes), caching every point it has seen. Each run becomes an :class:`Evaluation` carrying
its verdict (valid or not, with the reasons) and the goal quantity. A point beyond an
input-side limit (a check of ``limits_report`` that needs no run) is judged without a run.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

#: goal -> (summary section, key, sign): the search minimises sign * value
GOALS: dict[str, tuple[str, str, float]] = {
    "shortest": ("compressed", "fwhm_s", 1.0),
    "peak_power": ("compressed", "peak_power_w", -1.0),
    "thz_cutoff": ("thz", "cutoff_hz", -1.0),
    "thz_field": ("thz", "peak_field_v_per_m", -1.0),
}
#: Goals whose point must also keep the pump fluence on the generation crystal below its
#: binding limit (damage, two-photon or free-carrier absorption; thz.crystal_fluence_margin).
CRYSTAL_LIMITED_GOALS = ("thz_field",)
#: For the goal "shortest", a compressed pulse counts only with at least this share of its
#: energy in the main lobe: a short spike on a broad pedestal is not a short pulse for a lab
#: (common practice, no source).
MIN_MAIN_LOBE_FRACTION = 0.5
#: Reason of a point whose EH11 share of the exit energy is below ``--min-eh11``, or that has
#: no such share standing (none in its summary, or void by its verdict).
BELOW_MIN_EH11 = "EH11 share below --min-eh11"
#: Reason of a point whose THz cutoff stays below the ``--target-thz`` value.
NOT_REACHED = "goal not reached"

#: Check name of ``limits_report`` -> how its margin reads in an answer.
CHECK_LABELS = {
    "self_focusing.input": "self-focusing margin",
    "self_focusing.in_fiber": "self-focusing margin in the fiber",
    "static_fill.self_focusing": "self-focusing margin before the fiber",
    "ionization.input": "ionisation margin",
    "ionization.in_fiber": "ionisation margin in the fiber",
    "static_fill.ionization": "ionisation margin before the fiber",
    "cell.rating": "cell rating margin",
    "window.pressure": "window thickness margin",
    "window.b_integral": "window B-integral margin",
    "gas_handling.oxygen": "oxygen margin",
}


@dataclass(frozen=True)
class Evaluation:
    """One point: its values, the run's status, the goal quantity and the verdict."""

    values: tuple[float, ...]  #: of the searched keys, in their own units
    status: str  #: "ok", "failed" (the run) or "not run" (beyond an input-side limit)
    objective: float | None  #: the goal quantity (SI), None when missing
    valid: bool  #: may be chosen
    reasons: tuple[str, ...]  #: why not (empty when valid)
    record: dict = field(repr=False)  #: the scan point record ({} when not run)
    verdict: str = ""  #: of the run (hcfplan.planning.verdict): valid, caution or invalid

    @property
    def value(self) -> float:
        """The value of the first searched key."""
        return self.values[0]


def score(ev: Evaluation, goal: str) -> float:
    """Lower is better; a point that may not be chosen scores +inf."""
    if not ev.valid:
        return math.inf
    return GOALS[goal][2] * ev.objective


def _finite(x) -> float | None:
    if isinstance(x, bool) or not isinstance(x, (int, float)) or not math.isfinite(x):
        return None
    return float(x)


def check_label(check: dict, margins: dict) -> str:
    """Short reason for a check of severity "limit" beyond its limit, e.g.
    ``"self-focusing margin < 2"``."""
    name = check.get("name", "")
    if name in ("self_focusing.input", "self_focusing.in_fiber", "static_fill.self_focusing"):
        required = check.get("required") or margins.get("self_focusing_required")
        where = {"self_focusing.in_fiber": " in the fiber",
                 "static_fill.self_focusing": " before the fiber"}.get(name, "")
        return f"self-focusing margin{where} < {required:g}" if required else \
            f"{name} beyond its limit"
    if name in ("ionization.input", "ionization.in_fiber", "static_fill.ionization"):
        where = {"ionization.in_fiber": " in the fiber",
                 "static_fill.ionization": " before the fiber"}.get(name, "")
        limit = margins.get("ionization_limit")
        return f"ionisation fraction{where} > {limit:g}" if limit else f"{name} beyond its limit"
    return f"{CHECK_LABELS.get(name, name)} < 1 ({name})"


def _checks(record: dict) -> list[dict]:
    checks = record.get("summary", {}).get("limits", {}).get("checks", [])
    return [c for c in checks if isinstance(c, dict)]


def point_verdict(record: dict, goal: str, min_eh11: float | None = None,
                  ) -> tuple[bool, tuple[str, ...], str]:
    """(valid, reasons, verdict status of the run) of one point record for ``goal``.

    A point is valid when the verdict of its run
    (:func:`hcfplan.planning.verdict.verdict_of_record`) is not "invalid", the goal quantity
    is a finite number that the verdict does not void, no check of severity "limit" is beyond
    its limit, and (goal ``shortest``) the compressed pulse holds at least
    :data:`MIN_MAIN_LOBE_FRACTION` of its energy in the main lobe, and (with ``min_eh11``, a
    multimode run) EH11 holds at least that share of the exit energy
    (``output.eh11_fraction``, not void). Each reason is short and
    the same for every point it applies to, so that points can be counted by reason.
    """
    from hcfplan.planning.verdict import CODES, verdict_of_record

    verdict = verdict_of_record(record)
    reasons = [f"{CODES[r.code].meaning} ({r.code})" for r in verdict.reasons
               if CODES[r.code].status == "invalid"]
    if record.get("status") != "ok" and not reasons:
        reasons.append("solver failed (run_failed)")
    section, name, _ = GOALS[goal]
    void = verdict.void_reason(f"{section}.{name}")
    if void is not None and not reasons:
        reasons.append(f"{section}.{name} void: {CODES[void.code].meaning} ({void.code})")
    elif not reasons and _finite(record.get("summary", {}).get(section, {}).get(name)) is None:
        reasons.append(f"no {section}.{name}")
    margins = record.get("margins", {})
    beyond = [c for c in _checks(record)
              if c.get("severity") == "limit" and c.get("status") == "exceeds"]
    reasons += [check_label(c, margins) for c in beyond]
    if not beyond and margins.get("binding"):
        reasons += [f"{n.strip()} beyond its limit" for n in margins["binding"].split(",")]
    crystal = _finite(record.get("summary", {}).get("thz", {}).get("crystal_fluence_margin"))
    if goal in CRYSTAL_LIMITED_GOALS and crystal is not None and crystal < 1:
        binding = record["summary"]["thz"].get("binding_limit")
        reasons.append(f"crystal fluence beyond its {binding} limit")
    if goal == "shortest" and record.get("status") == "ok":
        lobe = _finite(record.get("summary", {}).get("compressed", {})
                       .get("main_lobe_energy_fraction"))
        if lobe is None or lobe < MIN_MAIN_LOBE_FRACTION:
            reasons.append(f"main-lobe energy fraction < {MIN_MAIN_LOBE_FRACTION:g}")
    if min_eh11 is not None and record.get("status") == "ok":
        eh11 = _finite(record.get("summary", {}).get("output", {}).get("eh11_fraction"))
        if eh11 is None or eh11 < min_eh11 \
                or verdict.void_reason("output.eh11_fraction") is not None:
            reasons.append(f"{BELOW_MIN_EH11} ({min_eh11:g})")
    return not reasons, tuple(dict.fromkeys(reasons)), verdict.status


def evaluation(values: tuple[float, ...], record: dict, goal: str,
               min_eh11: float | None = None) -> Evaluation:
    """The :class:`Evaluation` of a point record (``min_eh11``: :func:`point_verdict`)."""
    section, name, _ = GOALS[goal]
    objective = _finite(record.get("summary", {}).get(section, {}).get(name))
    valid, reasons, status = point_verdict(record, goal, min_eh11)
    return Evaluation(tuple(values), record.get("status", "failed"), objective, valid, reasons,
                      record, status)


# ---------------------------------------------------------------------------------------------
# binding constraints at a point


def constraint_text(check: dict) -> str:
    """One check's margin as text (:func:`hcfplan.limits.margins.margin_text`), e.g.
    ``"self-focusing margin P_cr/P = 2.05 (required >= 2): met"``."""
    from hcfplan.limits.margins import margin_text

    name = check.get("name", "")
    ratio = check.get("ratio") or ("limit/value" if check.get("limit_kind") != "minimum"
                                   else "value/limit")
    return margin_text(CHECK_LABELS.get(name, name), _finite(check.get("margin")),
                       _finite(check.get("required")) or 1.0, ratio)


def binding_constraints(record: dict, pressure_cap: float | None = None,
                        fraction: float | None = None, count: int = 2,
                        crystal: bool = False, min_eh11: float | None = None) -> list[dict]:
    """The constraints closest to their required value at a point, closest first.

    Every checked limit of severity "limit" (``limits_report``) and, with ``pressure_cap``
    [Pa], the fill pressure against ``fraction`` x the cell rating; with ``crystal``, the pump
    fluence on the THz crystal against its binding limit; with ``min_eh11`` = F, the share of
    the exit energy outside EH11 against the share F allows there (closeness
    (1 - F) / (1 - share)). Returns at most
    ``count`` entries ``{"name", "closeness", "text"}`` where closeness = margin / required
    (1 on the limit).
    """
    from hcfplan.limits.margins import margin, margin_text

    found = []
    for check in _checks(record):
        m = _finite(check.get("margin"))
        if check.get("severity") != "limit" or m is None:
            continue
        if check.get("name") == "cell.rating" and pressure_cap is not None:
            continue  # the rating fraction below stands for it
        found.append({"name": check.get("name", ""),
                      "closeness": m / (_finite(check.get("required")) or 1.0),
                      "text": constraint_text(check)})
    pressure = _finite(record.get("margins", {}).get("pressure_pa"))
    closeness = margin(pressure_cap, pressure)
    if closeness is not None and math.isfinite(closeness):
        label = (f"pressure margin against {fraction:g} x the cell rating "
                 f"({pressure_cap / 1e5:.4g} bar)")
        found.append({"name": "limits.rating_fraction", "closeness": closeness,
                      "text": margin_text(label, closeness, 1.0, "limit/pressure")})
    thz = record.get("summary", {}).get("thz", {})
    closeness = _finite(thz.get("crystal_fluence_margin"))
    if crystal and closeness is not None:
        label = f"crystal fluence margin ({thz.get('binding_limit')})"
        found.append({"name": "thz.crystal_fluence_margin", "closeness": closeness,
                      "text": margin_text(label, closeness, 1.0, "limit/fluence")})
    eh11 = _finite(record.get("summary", {}).get("output", {}).get("eh11_fraction"))
    if min_eh11 is not None and eh11 is not None:
        # the margin of the share outside EH11: allowed (1 - F) over found (1 - share); the
        # ratio share/F could never exceed 1/F and made --min-eh11 look binding at any share
        outside = 1.0 - eh11
        closeness = (1.0 - min_eh11) / outside if outside > 0 else math.inf
        found.append({"name": "output.eh11_fraction", "closeness": closeness,
                      "text": margin_text("share of the exit energy outside EH11 against "
                                          "--min-eh11", closeness, 1.0, "allowed/found")})
    found.sort(key=lambda c: c["closeness"])
    return found[:count]


# ---------------------------------------------------------------------------------------------
# running points


def run_records(tasks: list[dict], workers: int) -> list[dict]:
    """Point records of ``tasks`` (in task order) from the scan executors: serially with
    ``workers`` <= 1, else on ``workers`` local processes (the parent among them)."""
    from hcfplan.planning.scan import EXECUTORS, choose_executor

    if not tasks:
        return []
    done: dict[str, dict] = {}
    EXECUTORS[choose_executor(workers, None, len(tasks))](
        tasks, lambda record: done.__setitem__(record["key"], record), workers, None)
    return [done[t["key"]] for t in tasks]


class PointRunner:
    """Full chain runs at points of the searched keys, cached, counted against a budget.

    ``args`` = (raw config, base folder, ``--set`` overrides, gas folders, source path).
    """

    def __init__(self, args: tuple, keys: Sequence[str], goal: str, budget: int,
                 workers: int = 1,
                 on_batch: Callable[[int, int], None] | None = None,
                 min_eh11: float | None = None) -> None:
        self.args = args
        self.min_eh11 = min_eh11
        self.keys, self.goal, self.budget, self.workers = tuple(keys), goal, budget, workers
        self.done: dict[tuple[float, ...], Evaluation] = {}
        self.runs = 0
        self.on_batch = on_batch

    def overrides(self, values: tuple[float, ...]) -> tuple[str, ...]:
        from hcfplan.planning.scan import override_text

        return self.args[2] + tuple(override_text(k, float(v))
                                    for k, v in zip(self.keys, values, strict=True))

    def config(self, values: tuple[float, ...]):
        from hcfplan.io.config import config_from_mapping

        raw, base, _, dirs, source = self.args
        return config_from_mapping(raw, base_dir=base, overrides=self.overrides(values),
                                   extra_gas_dirs=dirs, source=source)

    @property
    def left(self) -> int:
        """Full runs left in the budget."""
        return self.budget - self.runs

    def _task(self, values: tuple[float, ...], config) -> dict:
        from hcfplan.planning.scan import config_key

        raw, base, _, dirs, source = self.args
        return {"raw": raw, "base_dir": str(base), "source": str(source),
                "overrides": list(self.overrides(values)), "extra_gas_dirs": list(dirs),
                "key": config_key(config.resolved),
                "values": dict(zip(self.keys, values, strict=True))}

    def evaluate(self, points: Sequence[tuple[float, ...]]) -> list[Evaluation]:
        """Evaluations of ``points`` (new ones run in one batch, within the budget; points
        beyond the budget are left out of the result)."""
        from hcfplan.planning.scan import limits_values

        points = [tuple(float(v) for v in p) for p in points]
        new = [p for p in dict.fromkeys(points) if p not in self.done]
        tasks, order = [], []
        for p in new:
            config = self.config(p)
            beyond = [c for c in limits_values(config).get("limits.checks", [])
                      if c.get("severity") == "limit" and c.get("status") == "exceeds"]
            if beyond:  # an input-side limit: judged without a run
                margins = {"self_focusing_required": config.limits.self_focusing_margin,
                           "ionization_limit": config.limits.ionization_fraction_limit}
                reasons = tuple(dict.fromkeys(check_label(c, margins) for c in beyond))
                self.done[p] = Evaluation(p, "not run", None, False, reasons, {})
            elif len(tasks) < self.left:
                tasks.append(self._task(p, config))
                order.append(p)
        if tasks and self.on_batch is not None:
            self.on_batch(self.runs, len(tasks))
        for p, record in zip(order, run_records(tasks, self.workers), strict=True):
            self.done[p] = evaluation(p, record, self.goal, self.min_eh11)
        self.runs += len(tasks)
        return [self.done[p] for p in points if p in self.done]
