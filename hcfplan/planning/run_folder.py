"""Writing one chain run to its output folder: fields.npz, compressed_field.csv (the compressed
pulse in the layout of ``laser.field_csv``), config.resolved.toml, the figures
and summary.json (last, so a folder with a summary is complete).

Every file is written atomically (:mod:`hcfplan.io.results`). The figures come from the caller
as jobs (:func:`hcfplan.plotting.report.figure_jobs`), since planning does not import plotting.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from hcfplan.io.results import FigureJob, write_figures, write_json
from hcfplan.io.tomlio import dump_toml
from hcfplan.numerics.storage import write_npz, write_text
from hcfplan.planning.chain import ChainResult, field_arrays, summary_dict
from hcfplan.planning.field_export import compressed_field_csv


def write_run(out_dir: Path, chain: ChainResult, *, figures: list[FigureJob] | None = None,
              spread=None, figure_writer: Callable[[list[FigureJob]], None] | None = None
              ) -> dict:
    """Write the run into ``out_dir`` and return the summary dict that was written.

    ``figures``: the figure jobs to draw (None: no figures and no ``figures`` key in the
    summary), with ``figure_writer`` (default :func:`~hcfplan.io.results.write_figures`; the
    CLI passes the helpers it started before the run, :mod:`hcfplan.plotting.helpers`).
    ``spread`` (a :class:`~hcfplan.planning.spread.SpreadResult`) adds ``spread.*``
    and the worst-case margins ``limits.worst_case.*`` to the summary.
    """
    out_dir = Path(out_dir)
    summary = summary_dict(chain)
    summary["config"] = chain.config.resolved
    if spread is not None:
        from hcfplan.planning.spread import spread_summary, worst_case_limits

        summary["spread"] = spread_summary(spread)
        summary.setdefault("limits", {}).update(worst_case_limits(spread, chain.config.limits))
    write_npz(out_dir / "fields.npz", field_arrays(chain))
    csv_text = compressed_field_csv(chain)
    if csv_text is not None:
        write_text(out_dir / "compressed_field.csv", csv_text)
    write_text(out_dir / "config.resolved.toml", dump_toml(chain.config.resolved))
    if figures is not None:
        (figure_writer or write_figures)(figures)
        summary["figures"] = sorted(path.name for path, _, _ in figures)
    write_json(out_dir / "summary.json", summary)
    return summary
