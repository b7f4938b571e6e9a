"""The planning workflows for the Python API: ``scan``, ``limits``, ``envelope``,
``recommend`` and ``compare``, each computing what its command computes (same numbers as
``--json``) and returning Python objects instead of printing.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Mapping, Sequence
from pathlib import Path

from hcfplan.api.config import ConfigFile, ConfigLike, as_config, gas_dirs, override_texts
from hcfplan.api.run import Run, draw_figure
from hcfplan.api.table import Table
from hcfplan.errors import ConfigError

# ---------------------------------------------------------------------------------------------
# scan


class ScanTable(Table):
    """The table of a :func:`scan`: one row per point, the columns of ``table.csv``.

    ``records`` holds the point records (summary, margins, verdict of each point);
    ``folder`` the scan folder (None when the scan ran in a temporary folder, removed since).
    """

    def __init__(self, columns, rows, records, folder):
        super().__init__(columns, rows)
        self.records = tuple(records)
        self.folder = folder


def _vary_texts(vary) -> list[str]:
    """``--vary`` texts from ``{key: values}``: values a sequence (any key) or a
    ``"START:STOP:COUNT"`` text (numeric keys)."""
    from hcfplan.planning.scan import override_text

    if not isinstance(vary, Mapping) or not vary:
        raise ConfigError("vary: expected a mapping {'section.key': values} with one or two keys")
    texts = []
    for key, values in vary.items():
        if isinstance(values, str):
            texts.append(f"{key}={values}")
            continue
        if not isinstance(values, Sequence) and not hasattr(values, "tolist"):
            raise ConfigError(f"vary {key}: expected a list of values or 'START:STOP:COUNT'")
        items = list(values.tolist() if hasattr(values, "tolist") else values)
        if not items:
            raise ConfigError(f"vary {key}: no values")
        parts = []
        for value in items:
            try:
                parts.append(override_text(str(key), value).partition("=")[2])
            except ConfigError:
                raise ConfigError(f"vary {key}: value {value!r} cannot be varied (numbers, "
                                  "strings, true/false)") from None
        texts.append(f"{key}={','.join(parts)}")
    return texts


def _worker_count(workers: int | None) -> int:
    count = workers if workers is not None else (os.cpu_count() or 1)
    if count < 1:
        raise ConfigError(f"workers = {workers}: must be >= 1")
    return count


def scan(config: ConfigLike, vary, *, overrides=None, workers: int | None = None,
         out=None, fresh: bool = False, force: bool = False, figures: bool = True,
         report: bool = True) -> ScanTable:
    """Run the full chain over one or two varied config keys.

    Parameters
    ----------
    config : str, path-like, mapping or PlanConfig
        The base config (as for :func:`load_config`).
    vary : mapping
        One or two keys, each with its values: ``{"gas.pressure_bar": [1, 2, 3]}`` or
        ``{"gas.pressure_bar": "1:5:9"}`` (START:STOP:COUNT, both ends included).
    overrides : mapping or iterable of str, optional
        Applied to every point (``--set``).
    workers : int, optional
        Points computed at a time (default: all cores; 1 runs them in this process).
    out : path, optional
        Scan folder (as ``scan --out``): points saved as they finish, a rerun resumes, and
        ``table.csv``, the figures and ``report.html`` are written there. Default: a
        temporary folder, removed once the table is read.
    fresh, force, figures, report : bool
        As the options ``--fresh``, ``--force``, ``--no-figures``, ``--no-report``.

    Returns
    -------
    ScanTable
        Rows as dicts with the columns of ``table.csv`` (varied values, status, verdict, every
        scalar of the summary, margins); ``to_pandas()`` with pandas installed.

    Raises
    ------
    ConfigError
        For bad input, naming the key.

    References
    ----------
    Each point is the chain of :func:`simulate`; no other physics.
    """
    from hcfplan.planning.scan import (
        parse_vary,
        plan_scan,
        release_workers,
        run_scan,
        start_worker_server,
        table_rows,
    )

    varies = [parse_vary(text, option="vary") for text in _vary_texts(vary)]
    count = _worker_count(workers)
    temporary = tempfile.TemporaryDirectory(prefix="hcfplan-scan-") if out is None else None
    folder = Path(temporary.name) if temporary is not None else Path(out)
    try:
        with ConfigFile(config, overrides) as source:
            if count > 1:
                start_worker_server(count)
            plan = plan_scan(source.path, varies, overrides=source.overrides,
                             extra_gas_dirs=gas_dirs())
            try:
                outcome = run_scan(plan, folder, workers=count, fresh=fresh, force=force)
            finally:
                release_workers()
            header, rows = table_rows(plan, outcome.records)
            if temporary is None:
                if figures:
                    from hcfplan.cli.workflows import scan_figures

                    scan_figures(outcome.out_dir, plan, outcome.records)
                if report:
                    from hcfplan.report import write_scan_report

                    write_scan_report(outcome.out_dir, command="hcfplan.scan(...)")
    finally:
        if temporary is not None:
            temporary.cleanup()
    return ScanTable(header, rows, outcome.records, None if temporary else outcome.out_dir)


# ---------------------------------------------------------------------------------------------
# limits and envelope


def limits(config: ConfigLike, overrides=None) -> dict:
    """The analytic limits of a config, as ``hcfplan limits --json`` prints them.

    Returns
    -------
    dict
        Flat dotted keys (``"limits.self_focusing.margin_input"``), SI values;
        ``"limits.checks"`` lists every check with its value, limit, margin, required margin,
        source and status; ``"limits.cautions"`` the cautions. These are estimates: the cell
        maker's rating, local codes and licensed practice come first.

    References
    ----------
    Sources per check in ``limits.checks[*].source`` (e.g. G. Fibich and A. L. Gaeta,
    Opt. Lett. 25, 335 (2000) for the critical power).
    """
    from hcfplan.io.results import json_ready
    from hcfplan.planning.reports.limits import limits_report

    return json_ready(limits_report(as_config(config, overrides)))


class Envelope:
    """The energy x pressure map of :func:`envelope`: ``data`` (the ``envelope --json``
    content), ``result`` (:class:`hcfplan.planning.envelope.EnvelopeResult`, SI arrays),
    ``check`` (the GNLSE check, or None) and :meth:`plot`."""

    figures = ("envelope",)

    def __init__(self, result, check, data: dict):
        self.result, self.check, self.data = result, check, data

    def plot(self, name: str = "envelope", ax=None, *, contours: str = "both"):
        """Draw the map (``envelope --plot``) into a new figure, or into ``ax``."""
        from hcfplan.plotting.envelope import plot_envelope

        if contours not in ("duration", "cutoff", "both"):
            raise ConfigError(f"contours = {contours!r}: must be one of duration, cutoff, both")

        def draw(fig, result):
            return plot_envelope(fig.subplots(), result, contours=contours, check=self.check)

        return draw_figure(name, [(Path("envelope.png"), draw, (self.result,))], ax)


def envelope(config: ConfigLike, overrides=None, *, check: bool = False) -> Envelope:
    """Energy x pressure map with the self-focusing and ionisation lines, the cell rating, the
    dispersion regimes and SPM-only estimates (``hcfplan envelope``); ``check=True`` runs the
    chain at 3 points of the map and compares (``--check``).

    References
    ----------
    As ``hcfplan.planning.envelope``: critical power after Fibich and Gaeta, Opt. Lett. 25,
    335 (2000); PPT ionisation rates (Perelomov, Popov, Terent'ev, Sov. Phys. JETP 23, 924
    (1966)).
    """
    from hcfplan.planning.envelope import envelope_json, envelope_map
    from hcfplan.planning.envelope_check import check_envelope

    cfg = as_config(config, overrides)
    result = envelope_map(cfg)
    checked = check_envelope(cfg, result) if check else None
    return Envelope(result, checked, envelope_json(result, checked))


# ---------------------------------------------------------------------------------------------
# recommend


class Recommendations:
    """The answer of :func:`recommend`: ``chosen`` (the best
    :class:`~hcfplan.planning.recommend.Recommendation` over the searched gases, or None),
    ``searches`` (one per gas) and :meth:`table` (every evaluated point)."""

    def __init__(self, searches, chosen):
        self.searches, self.chosen = tuple(searches), chosen

    @property
    def best(self) -> dict | None:
        """The chosen point's values, e.g. ``{"gas.pressure_bar": 3.2}``, or None."""
        if self.chosen is None or self.chosen.best is None:
            return None
        return dict(zip(self.chosen.keys, self.chosen.best.values, strict=True))

    def table(self) -> Table:
        """Every evaluated point: gas, values, status, verdict, objective, valid, reasons."""
        rows = []
        for rec in self.searches:
            for e in rec.evaluations:
                row = {"gas": rec.gas}
                row.update(zip(rec.keys, e.values, strict=True))
                row.update({"status": e.status, "verdict": e.verdict,
                            "objective": e.objective, "valid": e.valid,
                            "reasons": "; ".join(e.reasons)})
                rows.append(row)
        columns = list(dict.fromkeys(k for row in rows for k in row))
        return Table(columns, rows)


def recommend(config: ConfigLike, goal: str, *, vary=None, gases=(), target_thz=None,
              overrides=None, budget: int | None = None, coarse: int | None = None,
              workers: int = 1, min_eh11: float | None = None) -> Recommendations:
    """The pressure (or energy, or gas) that best meets ``goal`` within the limits.

    Parameters
    ----------
    goal : str
        ``"shortest"``, ``"peak_power"`` or ``"thz_cutoff"``.
    vary : str or list of str, optional
        Searched ranges, ``"gas.pressure_bar=LO:HI"`` and/or ``"laser.energy_uj=LO:HI"``.
    gases, target_thz, budget, coarse, workers
        As the options of ``hcfplan recommend``.
    min_eh11 : float, optional
        Smallest EH11 share of the exit energy a point may have (``--min-eh11``; a multimode
        config, ``fiber.modes`` > 1). [1]

    References
    ----------
    Each point is the chain of :func:`simulate`; the search is ``hcfplan.planning.recommend``.
    """
    from hcfplan.planning.recommend import overall_best
    from hcfplan.planning.recommend import recommend as search
    from hcfplan.planning.scan import release_workers, start_worker_server

    count = _worker_count(workers)
    with ConfigFile(config, overrides) as source:
        if count > 1:
            start_worker_server(count)
        try:
            recs = search(source.path, goal, search=vary, gases=tuple(gases),
                          target_thz=target_thz, overrides=source.overrides,
                          extra_gas_dirs=gas_dirs(), budget=budget, coarse=coarse,
                          workers=count, min_eh11=min_eh11)
        finally:
            release_workers()
    return Recommendations(recs, overall_best(recs))


# ---------------------------------------------------------------------------------------------
# compare


class Comparison:
    """Two runs side by side (:func:`compare`): ``a`` and ``b`` (:class:`Run`), ``labels``,
    ``rows`` (a :class:`Table`: label, key, unit, A, B, B - A, B / A in SI, and the verdict
    code voiding a side's number), ``margins`` of each side, :meth:`plot` and :meth:`save`."""

    def __init__(self, comparison, a: Run, b: Run):
        self.comparison = comparison
        self.a, self.b = a, b
        self.labels = (comparison.a.label, comparison.b.label)
        columns = ["label", "key", "unit", "scale", "a", "b", "difference", "ratio",
                   "a_void", "b_void"]
        self.rows = Table(columns, comparison.rows)
        self.margins = {"a": comparison.a.margins, "b": comparison.b.margins}

    def _jobs(self, folder: Path):
        from hcfplan.plotting.compare import FIGURES

        sides = (self.comparison.a, self.comparison.b)
        return [(folder / f"{stem}.png", draw, sides) for stem, draw in FIGURES.items()]

    @property
    def figures(self) -> tuple[str, ...]:
        return tuple(Path(p).stem for p, _, _ in self._jobs(Path(".")))

    def plot(self, name: str, ax=None):
        """Draw an overlaid figure (one of :attr:`figures`) into a new figure or ``ax``."""
        return draw_figure(name, self._jobs(Path(".")), ax)

    def data(self) -> dict:
        """The ``comparison.json`` content of a compare folder."""
        c = self.comparison
        return {"labels": list(self.labels), "rows": list(c.rows),
                "a": {"summary": c.a.summary, "margins": c.a.margins},
                "b": {"summary": c.b.summary, "margins": c.b.margins}, "spread": None}

    def save(self, folder, *, figures: bool = True, report: bool = True,
             force: bool = False) -> Path:
        """Write the compare folder (``compare --out``): the overlaid figures,
        ``comparison.json`` and ``report.html``."""
        from hcfplan.io.results import prepare_output_dir, write_figures, write_json

        out_dir = prepare_output_dir(Path(folder), force=force)
        if figures:
            write_figures(self._jobs(out_dir))
        write_json(out_dir / "comparison.json", self.data())
        if report:
            from hcfplan.report import write_compare_report

            write_compare_report(out_dir, command="hcfplan.compare(...)",
                                 configs=[self.a.config.resolved, self.b.config.resolved])
        return out_dir


def compare(config_a: ConfigLike, config_b: ConfigLike | None = None, *, overrides=None,
            overrides_b=None, labels: tuple[str, str] | None = None) -> Comparison:
    """Run two setups and tabulate them with B - A and B / A (``hcfplan compare``).

    ``config_b`` None means A with ``overrides_b`` applied (a pump upgrade:
    ``compare("a.toml", overrides_b={"laser.energy_uj": 2500})``).

    References
    ----------
    Both sides are the chain of :func:`simulate`; margins in the one convention of
    ``hcfplan.limits.margins``.
    """
    from hcfplan.planning.chain import summary_dict
    from hcfplan.planning.compare import compare_configs

    texts_b = override_texts(overrides_b)
    if config_b is None and not texts_b:
        raise ConfigError("compare: give config B or at least one override for B")
    cfg_a = as_config(config_a, overrides)
    cfg_b = (as_config(config_a, override_texts(overrides) + texts_b) if config_b is None
             else as_config(config_b, texts_b))
    if labels is None:
        name_a = str(config_a) if isinstance(config_a, (str, os.PathLike)) else "A"
        labels = (name_a, str(config_b) if config_b is not None and isinstance(
            config_b, (str, os.PathLike)) else
            (f"{name_a} with " + " ".join(texts_b) if config_b is None else "B"))
    result = compare_configs(cfg_a, cfg_b, labels)
    runs = []
    for side, cfg in ((result.a, cfg_a), (result.b, cfg_b)):
        nested = summary_dict(side.chain)
        nested["config"] = cfg.resolved
        runs.append(Run(cfg, side.chain, nested))
    return Comparison(result, *runs)
