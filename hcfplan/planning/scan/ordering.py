"""Which task a local worker takes next: the costliest end of the task list first.

Used by :func:`hcfplan.planning.scan.executors.run_processes`; results never depend on the
order (every point is computed once, alone).
"""

from __future__ import annotations

import math


def point_work(record: dict) -> float:
    """Work of a computed point, for :class:`CostlierEndFirst`: N evaluations of the solver
    times N log2 N of its grid (the FFTs dominate a point); 0 for a point without a solver run.
    Unlike its wall time, it does not include a new process's first-call set-up."""
    summary = record.get("summary") or {}
    evaluations = (summary.get("solver") or {}).get("rhs_evaluations") or 0
    points = (summary.get("grid") or {}).get("points") or 0
    return float(evaluations) * points * math.log2(max(points, 2))


class CostlierEndFirst:
    """Order in which local workers take the tasks of a run: from the end of the task list
    whose points cost more so far, so the costliest points start first and the run does not
    end on one long point while the other workers wait.

    This is the longest-processing-time-first rule of Graham [1] (its makespan is within
    4/3 - 1/(3m) of the optimum on m workers), with the costs learnt on the way: along a
    scanned key the cost of a point mostly grows or falls steadily (more pressure or energy:
    more nonlinearity, more solver steps), so the first two tasks come from the two ends of
    the list; then each next task is taken from the end whose latest finished point had the
    larger :func:`point_work`; while only one end has a finished point, from the other end
    (its point is still running, so it costs more). Ties go to the start of the list. Results
    do not depend on the order (every point is computed once, alone).

    References
    ----------
    .. [1] R. L. Graham, "Bounds on multiprocessing timing anomalies," SIAM J. Appl. Math.,
           vol. 17, no. 2, pp. 416-429, 1969, doi:10.1137/0117039. [from memory, with the
           4/3 - 1/(3m) bound]
    """

    def __init__(self, tasks: list[dict]) -> None:
        self._tasks, self._low, self._high = tasks, 0, len(tasks) - 1
        self._ends: dict[str, str] = {}  # key of a task in progress -> "low" or "high"
        self._work: dict[str, float | None] = {"low": None, "high": None}  # latest finished

    def _pick(self) -> str:
        if self._low == 0:  # the two ends first
            return "low"
        if self._high == len(self._tasks) - 1:
            return "high"
        low, high = self._work["low"], self._work["high"]
        if low is None or high is None:  # the end without a finished point: still running
            return "low" if low is None else "high"
        return "high" if high > low else "low"

    def take(self) -> dict | None:
        """The next task, or None when all are given out."""
        if self._low > self._high:
            return None
        end = self._pick()
        if end == "low":
            task, self._low = self._tasks[self._low], self._low + 1
        else:
            task, self._high = self._tasks[self._high], self._high - 1
        self._ends[task.get("key", "")] = end
        return task

    def finished(self, record: dict) -> None:
        """Note the work of a finished point (a record of :func:`compute_point`)."""
        end = self._ends.pop(record.get("key", ""), None)
        if end is not None:
            self._work[end] = point_work(record)
