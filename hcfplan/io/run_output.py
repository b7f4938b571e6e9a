"""Writing one chain run to its output folder: summary.json, fields.npz and the figures.

Every file is written atomically (:mod:`hcfplan.io.results`); the figures are made by
:mod:`hcfplan.plotting.report` from the result objects only.
"""

from __future__ import annotations

from pathlib import Path

from hcfplan.io.results import write_figures, write_json
from hcfplan.io.tomlio import dump_toml
from hcfplan.numerics.storage import write_npz, write_text
from hcfplan.planning.chain import ChainResult, field_arrays, summary_dict


def write_run(out_dir: Path, chain: ChainResult, *, figures: bool = True, spread=None) -> dict:
    """Write the run into ``out_dir`` and return the summary dict that was written.

    ``spread`` (a :class:`~hcfplan.planning.spread.SpreadResult`) adds ``spread.*``, the
    worst-case margins ``limits.worst_case.*`` and the ``spread.png`` figure.
    """
    out_dir = Path(out_dir)
    summary = summary_dict(chain)
    summary["config"] = chain.config.resolved
    if spread is not None:
        from hcfplan.planning.spread import spread_summary, worst_case_limits

        summary["spread"] = spread_summary(spread)
        summary.setdefault("limits", {}).update(worst_case_limits(spread, chain.config.limits))
    write_npz(out_dir / "fields.npz", field_arrays(chain))
    write_text(out_dir / "config.resolved.toml", dump_toml(chain.config.resolved))
    if figures:
        from hcfplan.plotting import report

        jobs = [(out_dir / f"{name}.png", draw, (chain,))
                for name, draw in report.FIGURES.items() if report.applies(name, chain)]
        if spread is not None and spread.corners:
            jobs.insert(2, (out_dir / "spread.png", report.draw_spread, (chain, spread)))
        write_figures(jobs)
        summary["figures"] = sorted(p.name for p in out_dir.glob("*.png"))
    write_json(out_dir / "summary.json", summary)
    return summary
