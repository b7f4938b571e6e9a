"""Command-line front of the planning workflows (scan, recommend, compare).

``register(app)`` adds the commands to the typer app of :mod:`hcfplan.cli`. Heavy modules
(numpy, scipy, matplotlib, the chain) are imported inside the commands only; the shared output
helpers of :mod:`hcfplan.cli` are looked up when a command runs.
"""

from __future__ import annotations

import contextlib
import sys
from pathlib import Path
from typing import Optional

import typer

SET_HELP = "Override one config value, e.g. --set gas.pressure_bar=3 (repeatable)."
VARY_HELP = ("Varied key: section.key=START:STOP:COUNT (COUNT linearly spaced values, both "
             "ends included; numeric keys) or section.key=a,b,c (any key). Give one or two.")
JSON_HELP = "Print machine-readable JSON (SI values, unit in the key name)."


def _cli():
    from . import cli

    return cli


def _gas_dirs():
    import os

    from .materials.gases import gas_search_dirs

    return tuple(gas_search_dirs(environ=os.environ))


def _fmt(value, scale: float = 1.0, digits: int = 4) -> str:
    return _cli()._fmt(value, scale, digits)


def _table(header: list[str], rows: list[list[str]]) -> None:
    widths = [max(len(h), *(len(r[i]) for r in rows)) for i, h in enumerate(header)]
    typer.echo("  " + "  ".join(h.ljust(w) for h, w in zip(header, widths, strict=True)))
    for row in rows:
        typer.echo("  " + "  ".join(v.ljust(w) for v, w in zip(row, widths, strict=True)))


@contextlib.contextmanager
def _sigterm_as_exit():
    """Turn SIGTERM into SystemExit so a scan stops its worker processes on the way out."""
    import signal

    def handler(signum, frame):
        raise SystemExit(128 + signum)

    try:
        previous = signal.signal(signal.SIGTERM, handler)
    except ValueError:  # not the main thread (e.g. called from a test runner thread)
        yield
        return
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)


class _ScanProgress:
    """Overall progress over the points on stderr, only when stderr is a terminal."""

    def __init__(self, enabled: bool):
        self.enabled = enabled and sys.stderr.isatty()

    def __call__(self, done: int, total: int, record: dict) -> None:
        if self.enabled:
            width = 30
            filled = int(width * done / max(total, 1))
            sys.stderr.write(f"\r  scan [{'#' * filled}{'.' * (width - filled)}] "
                             f"{done}/{total} points")
            sys.stderr.flush()

    def close(self) -> None:
        if self.enabled:
            sys.stderr.write("\n")
            sys.stderr.flush()


# ---------------------------------------------------------------------------------------------
# scan


def _scan_figures(out_dir: Path, plan, records) -> list[str]:
    from .io.results import write_figure
    from .plotting import scan as plots

    keys = tuple(v.key for v in plan.varies)
    values = tuple(v.values for v in plan.varies)
    names = []
    if len(keys) == 1:
        write_figure(out_dir / "spectrum_map.png", plots.draw_spectrum_map, keys[0], values[0],
                     records)
        write_figure(out_dir / "results.png", plots.draw_results_1d, keys[0], values[0], records)
        names = ["spectrum_map.png", "results.png"]
    else:
        write_figure(out_dir / "results_map.png", plots.draw_results_2d, keys, values, records)
        names = ["results_map.png"]
    return names


def _scan_rows(plan, records) -> tuple[list[str], list[list[str]]]:
    keys = [v.key for v in plan.varies]
    header = keys + ["status", "FWHM (fs)", "peak (GW)", "THz cutoff", "SF margin",
                     "ion. fraction", "beyond limits"]
    rows = []
    for r in records:
        s, m = r["summary"], r["margins"]
        comp, thz = s.get("compressed", {}), s.get("thz", {})
        rows.append([str(r["values"][k]) for k in keys] + [
            r["status"], _fmt(comp.get("fwhm_s"), 1e-15), _fmt(comp.get("peak_power_w"), 1e9),
            _fmt(thz.get("cutoff_hz"), 1e12), _fmt(m.get("self_focusing"), 1, 3),
            _fmt(m.get("ionization_fraction"), 1, 3),
            m.get("binding") or ("-" if r["status"] == "ok" else r["message"][:60])])
    return header, rows


def scan_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    vary: list[str] = typer.Option(..., "--vary", help=VARY_HELP),
    workers: Optional[int] = typer.Option(  # noqa: UP007 (typer needs Optional)
        None, "--workers", help="Local worker processes (default: all cores); 1 runs the "
        "points in this process."),
    dask_scheduler: Optional[str] = typer.Option(  # noqa: UP007
        None, "--dask-scheduler", help="Run the points on a running Dask scheduler at this "
        "address (needs 'distributed'; the workers must have hcfplan installed)."),
    out: Optional[Path] = typer.Option(  # noqa: UP007
        None, "--out", help="Scan folder (default scans/<config stem>); rerunning the same "
        "scan there resumes it."),
    fresh: bool = typer.Option(False, "--fresh", help="Delete the saved points and start over."),
    force: bool = typer.Option(False, "--force", help="Use --out even if it holds another "
                               "scan or other files (matching points are reused)."),
    set_: Optional[list[str]] = typer.Option(None, "--set", help=SET_HELP),  # noqa: UP007
    no_figures: bool = typer.Option(False, "--no-figures", help="Skip the figures."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Run the full chain over one or two varied keys; saves every point as it finishes."""
    import os

    from .planning.scan import parse_vary, plan_scan, run_scan

    cli = _cli()
    varies = [parse_vary(text) for text in vary]
    plan = plan_scan(config, varies, overrides=tuple(set_ or ()), extra_gas_dirs=_gas_dirs())
    out_dir = out if out is not None else Path("scans") / config.stem
    bar = _ScanProgress(not as_json)
    try:
        with _sigterm_as_exit():
            outcome = run_scan(plan, out_dir, workers=workers or os.cpu_count() or 1,
                               address=dask_scheduler, fresh=fresh, force=force, on_point=bar)
    finally:
        bar.close()
    figures = [] if no_figures else _scan_figures(outcome.out_dir, plan, outcome.records)
    failed = [r for r in outcome.records if r["status"] != "ok"]
    if as_json:
        cli._print_json(_scan_json(outcome, figures, failed))
    else:
        _print_scan(outcome, figures, failed)
    if failed:
        typer.echo(f"hcfplan: {len(failed)} of {len(outcome.records)} scan points failed "
                   f"(see {outcome.out_dir / 'table.csv'})", err=True)
        raise typer.Exit(1)


def _scan_json(outcome, figures, failed) -> dict:
    from .planning.scan import point_row

    return {
        "out_dir": str(outcome.out_dir), "executor": outcome.executor,
        "points": len(outcome.records), "computed": len(outcome.computed),
        "reused": len(outcome.reused),
        "recomputed_damaged": [{"key": k, "reason": why} for k, why in outcome.damaged],
        "failed": [{"key": r["key"], "values": r["values"], "message": r["message"]}
                   for r in failed],
        "table": str(outcome.out_dir / "table.csv"), "figures": figures,
        "rows": [point_row(outcome.plan, r) for r in outcome.records],
        "cautions": _cautions(),
    }


def _cautions() -> list[str]:
    from .cautions import caution_lines

    return caution_lines()


def _print_scan(outcome, figures, failed) -> None:
    cli = _cli()
    header, rows = _scan_rows(outcome.plan, outcome.records)
    _table(header, rows)
    damaged = f", {len(outcome.damaged)} damaged point files recomputed" if outcome.damaged \
        else ""
    typer.echo(f"\n{len(outcome.computed)} points computed ({outcome.executor}), "
               f"{len(outcome.reused)} reused{damaged}; {len(failed)} failed.")
    typer.echo(f"Written to {outcome.out_dir}/: table.csv, points/"
               + (f", {', '.join(figures)}" if figures else ""))
    cli._print_cautions()


def register(app) -> None:
    """Add the workflow commands to ``app``."""
    app.command("scan")(scan_command)
