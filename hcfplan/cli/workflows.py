"""Command-line front of the planning workflows (scan, recommend, compare).

``register(app)`` adds the commands to the typer app of :mod:`hcfplan.cli.app`. Heavy modules
(numpy, scipy, matplotlib, the chain) are imported inside the commands only. Imports of the
command line flow one way: app -> workflows -> common, output.
"""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer

from hcfplan.cli.common import (
    JSON_HELP,
    NO_REPORT_HELP,
    SET_HELP,
    SPREAD_WORKERS_HELP,
    WRITTEN,
    command_line,
    gas_dirs,
    load_cli_config,
    run_spread_corners,
    spread_plan,
    start_workers,
    stop_workers,
    worker_count,
)
from hcfplan.cli.output import (
    TerminalBar,
    fmt,
    print_cautions,
    print_json,
    print_spread,
    print_table,
    print_void_legend,
    verdict_lines,
)
from hcfplan.errors import ConfigError

VARY_HELP = ("Varied key: section.key=START:STOP:COUNT (COUNT linearly spaced values, both "
             "ends included; numeric keys) or section.key=a,b,c (any key). Give one or two.")


class _ScanProgress:
    """Overall progress over the points on stderr, only when stderr is a terminal."""

    def __init__(self, enabled: bool):
        self.bar = TerminalBar(enabled, "scan")

    def __call__(self, done: int, total: int, record: dict) -> None:
        self.bar.draw(done / max(total, 1), f"{done}/{total} points")

    def close(self) -> None:
        self.bar.close()


# ---------------------------------------------------------------------------------------------
# scan


def scan_figures(out_dir: Path, plan, records) -> list[str]:
    """Draw the figures of a finished scan into ``out_dir``; returns their file names."""
    from hcfplan.io.results import write_figures
    from hcfplan.plotting import scan as plots

    keys = tuple(v.key for v in plan.varies)
    values = tuple(v.values for v in plan.varies)
    if len(keys) == 1:
        jobs = [(out_dir / "spectrum_map.png", plots.draw_spectrum_map,
                 (keys[0], values[0], records)),
                (out_dir / "results.png", plots.draw_results_1d, (keys[0], values[0], records))]
    else:
        jobs = [(out_dir / "results_map.png", plots.draw_results_2d, (keys, values, records))]
    from hcfplan.plotting.modes import draw_eh11_fraction, has_eh11

    if has_eh11(records):  # multimode runs: the EH11 share against the varied keys
        jobs.append((out_dir / "eh11_fraction.png", draw_eh11_fraction, (keys, values, records)))
    write_figures(jobs)
    return [path.name for path, _, _ in jobs]


def void_code(verdict, key: str, value) -> str | None:
    """The code that voids a table cell: the number, or a null the verdict lists as void (e.g.
    a THz cutoff left out beyond the crystal model); None where the cell stands."""
    reason = verdict.void_reason(key)
    if reason is None or (value is None and key not in verdict.void_fields):
        return None
    return reason.code


def _void_codes(rows) -> list[str]:
    """The codes of the "void (code)" cells of table rows, in order of appearance."""
    import re

    return [m for row in rows for cell in row for m in re.findall(r"void \((\w+)\)", cell)]


def scan_rows(plan, records) -> tuple[list[str], list[list[str]]]:
    keys = [v.key for v in plan.varies]
    required = records[0]["margins"].get("self_focusing_required") if records else None
    header = keys + ["status", "verdict", "FWHM (fs)", "peak (GW)", "THz cutoff",
                     "THz field (kV/cm)",
                     "SF margin P_cr/P" + (f" (req. >= {required:g})" if required else ""),
                     "ion. fraction", "beyond limits"]
    eh11 = any("eh11_fraction" in r["summary"].get("output", {}) for r in records)
    if eh11:  # multimode runs
        header.insert(len(keys) + 4, "EH11 share (%)")
    from hcfplan.planning.verdict import verdict_of_record

    rows = []
    for r in records:
        s, m = r["summary"], r["margins"]
        comp, thz = s.get("compressed", {}), s.get("thz", {})
        verdict = verdict_of_record(r)

        def shown(key, value, scale, verdict=verdict):
            code = void_code(verdict, key, value)
            return f"void ({code})" if code else fmt(value, scale)

        row = [str(r["values"][k]) for k in keys] + [
            r["status"], " ".join([verdict.status, *verdict.codes]),
            shown("compressed.fwhm_s", comp.get("fwhm_s"), 1e-15),
            shown("compressed.peak_power_w", comp.get("peak_power_w"), 1e9),
            shown("thz.cutoff_hz", thz.get("cutoff_hz"), 1e12),
            shown("thz.peak_field_v_per_m", thz.get("peak_field_v_per_m"), 1e5),
            fmt(m.get("self_focusing"), 1, 3),
            fmt(m.get("ionization_fraction"), 1, 3),
            m.get("binding") or ("-" if r["status"] == "ok" else r["message"][:60])]
        if eh11:
            row.insert(len(keys) + 4, shown("output.eh11_fraction",
                                            s.get("output", {}).get("eh11_fraction"), 1e-2))
        rows.append(row)
    return header, rows


def scan_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    vary: list[str] = typer.Option(..., "--vary", help=VARY_HELP),
    workers: Optional[int] = typer.Option(  # noqa: UP007, UP045 (typer needs Optional)
        None, "--workers", help="Points computed at a time, by this process and local worker "
        "processes (default: all cores); 1 runs the points in this process only."),
    dask_scheduler: Optional[str] = typer.Option(  # noqa: UP007, UP045
        None, "--dask-scheduler", help="Run the points on a running Dask scheduler at this "
        "address (needs 'distributed'; the workers must have hcfplan installed)."),
    out: Optional[Path] = typer.Option(  # noqa: UP007, UP045
        None, "--out", help="Scan folder (default scans/<config stem>); rerunning the same "
        "scan there resumes it."),
    fresh: bool = typer.Option(False, "--fresh", help="Delete the saved points and start over."),
    force: bool = typer.Option(False, "--force", help="Use --out even if it holds another "
                               "scan or other files (matching points are reused)."),
    set_: Optional[list[str]] = typer.Option(None, "--set", help=SET_HELP),  # noqa: UP007, UP045
    no_figures: bool = typer.Option(False, "--no-figures", help="Skip the figures."),
    no_report: bool = typer.Option(False, "--no-report", help=NO_REPORT_HELP),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Run the full chain over one or two varied keys; saves every point as it finishes."""
    from hcfplan.io.results import lock_output_dir
    from hcfplan.planning.scan import parse_vary, plan_scan, run_scan

    varies = [parse_vary(text) for text in vary]
    if dask_scheduler is None:  # the fork server imports while the points are planned
        start_workers(workers)
    plan = plan_scan(config, varies, overrides=tuple(set_ or ()), extra_gas_dirs=gas_dirs())
    out_dir = out if out is not None else Path("scans") / config.stem
    WRITTEN.watch(out_dir, "the same scan command resumes from them")
    lock_output_dir(out_dir)  # until the command ends: the figures too
    bar = _ScanProgress(not as_json)
    try:
        outcome = run_scan(plan, out_dir, workers=worker_count(workers),
                           address=dask_scheduler, fresh=fresh, force=force, on_point=bar)
    finally:
        bar.close()
    stop_workers()  # no more points to compute
    figures = [] if no_figures else scan_figures(outcome.out_dir, plan, outcome.records)
    if not no_report:
        from hcfplan.report import write_scan_report

        write_scan_report(outcome.out_dir, command=command_line())
    failed = [r for r in outcome.records if r["status"] != "ok"]
    if as_json:
        print_json(_scan_json(outcome, figures, failed))
    else:
        _print_scan(outcome, figures, failed)
    if failed:
        typer.echo(f"hcfplan: {len(failed)} of {len(outcome.records)} scan points failed "
                   f"(see {outcome.out_dir / 'table.csv'})", err=True)
        raise typer.Exit(1)


def _scan_json(outcome, figures, failed) -> dict:
    from hcfplan.planning.scan import point_row

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
    from hcfplan.limits.cautions import caution_lines

    return caution_lines()


def _print_scan(outcome, figures, failed) -> None:
    header, rows = scan_rows(outcome.plan, outcome.records)
    print_table(header, rows)
    print_void_legend(_void_codes(rows))
    damaged = f", {len(outcome.damaged)} damaged point files recomputed" if outcome.damaged \
        else ""
    typer.echo(f"\n{len(outcome.computed)} points computed ({outcome.executor}), "
               f"{len(outcome.reused)} reused{damaged}; {len(failed)} failed.")
    typer.echo(f"Written to {outcome.out_dir}/: table.csv, points/"
               + (f", {', '.join(figures)}" if figures else ""))
    print_cautions()


# ---------------------------------------------------------------------------------------------
# recommend


def recommend_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    goal: str = typer.Option(..., "--goal", help="shortest (compressed FWHM), peak_power "
                             "(compressed peak power), thz_cutoff or thz_field (THz peak field "
                             "at the focus; needs thz.beam_waist_um, keeps the crystal fluence "
                             "below its binding limit)."),
    target_thz: Optional[float] = typer.Option(  # noqa: UP007, UP045
        None, "--target-thz", help="With --goal thz_cutoff: the smallest pressure (or energy) "
        "whose THz cutoff reaches this value."),
    min_eh11: Optional[float] = typer.Option(  # noqa: UP007, UP045
        None, "--min-eh11", help="Multimode configs (fiber.modes > 1): the smallest share of "
        "the exit energy in EH11 a point may have, e.g. 0.95."),
    vary: Optional[list[str]] = typer.Option(  # noqa: UP007, UP045
        None, "--vary", help="Searched range: gas.pressure_bar=LO:HI (a gradient fill: "
        "gas.exit_pressure_bar=LO:HI, entrance fixed) or laser.energy_uj=LO:HI; "
        "give both for a joint search (default: pressure from a tenth of the fill to the cell "
        "rating, or 3x the fill; the pressure stays at or below limits.rating_fraction of the "
        "rating)."),
    gases: Optional[str] = typer.Option(  # noqa: UP007, UP045
        None, "--gases", help="Comma list of fill gases searched one after the other, e.g. "
        "Ar,Kr,Ne."),
    coarse: Optional[int] = typer.Option(  # noqa: UP007, UP045
        None, "--coarse", help="Points of the coarse pass over the whole range, per searched "
        "key (default 12 for one key, 6 per key for two)."),
    budget: Optional[int] = typer.Option(  # noqa: UP007, UP045
        None, "--budget", help="Full chain runs per gas, at most, coarse pass included "
        "(default: the coarse pass + 12 for one key, + 16 for two)."),
    workers: Optional[int] = typer.Option(  # noqa: UP007, UP045
        None, "--workers", help="Points computed at a time, by this process and local worker "
        "processes (default: all cores); 1 runs the points in this process only."),
    set_: Optional[list[str]] = typer.Option(None, "--set", help=SET_HELP),  # noqa: UP007, UP045
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Search the allowed pressure (or energy) range for the point that best meets a goal."""
    from hcfplan.planning.recommend import overall_best, recommend

    gas_list = tuple(g.strip() for g in gases.split(",") if g.strip()) if gases else ()
    count = worker_count(workers)
    if workers is not None and workers < 1:
        raise ConfigError(f"--workers = {workers}: must be >= 1")
    if count > 1:  # the fork server imports while the allowed range is worked out
        start_workers(workers)
    bar = TerminalBar(not as_json, "recommend")
    try:
        recs = recommend(config, goal, search=vary, gases=gas_list, target_thz=target_thz,
                         overrides=tuple(set_ or ()), extra_gas_dirs=gas_dirs(),
                         budget=budget, coarse=coarse, workers=count, min_eh11=min_eh11,
                         on_batch=lambda done, size: bar.draw(
                             0.0, f"{done} runs done, {size} running"))
    finally:
        bar.close()
    stop_workers()
    chosen = overall_best(recs)
    if as_json:
        print_json({"chosen": _rec_json(chosen) if chosen else None,
                    "searches": [_rec_json(r) for r in recs], "cautions": _cautions()})
    else:
        for rec in recs:
            _print_recommendation(rec, rec is chosen and len(recs) > 1)
        print_cautions()
    if chosen is None:
        typer.echo("hcfplan: " + "; ".join(r.reason for r in recs), err=True)
        raise typer.Exit(1)


def _point_json(rec, e) -> dict | None:
    if e is None:
        return None
    return {"values": dict(zip(rec.keys, e.values, strict=True)), "objective": e.objective,
            "valid": e.valid, "verdict": e.verdict, "margins": e.record.get("margins"),
            "summary": e.record.get("summary")}


def _rec_json(rec) -> dict:
    return {
        "goal": rec.goal, "keys": list(rec.keys), "gas": rec.gas,
        "requested": {k: list(s) for k, s in zip(rec.keys, rec.requested, strict=True)},
        "allowed": ({k: list(s) for k, s in zip(rec.keys, rec.allowed, strict=True)}
                    if rec.allowed else None),
        "bound": rec.bound_reason, "rating_fraction": rec.rating_fraction,
        "pressure_cap_pa": None if rec.pressure_cap is None else rec.pressure_cap * 1e5,
        "tolerance": dict(zip(rec.keys, rec.tolerance, strict=True)),
        "target_thz": rec.target_thz, "min_eh11": rec.min_eh11, "reason": rec.reason,
        "coarse_points": rec.coarse,
        "runs": rec.runs, "best": _point_json(rec, rec.best), "binding": list(rec.binding),
        "closest": _point_json(rec, rec.closest),
        "excluded": [{"reason": why, "points": n} for why, n in rec.excluded],
        "excluded_ranges": list(rec.spans),
        "evaluations": [{"values": dict(zip(rec.keys, e.values, strict=True)),
                         "status": e.status, "verdict": e.verdict, "objective": e.objective,
                         "valid": e.valid, "reasons": list(e.reasons)}
                        for e in rec.evaluations],
    }


def _values_text(rec, values) -> str:
    return ", ".join(f"{k} = {v:.4g} {u}"
                     for k, v, u in zip(rec.keys, values, rec.units, strict=True))


def _print_recommendation(rec, chosen: bool) -> None:
    from hcfplan.planning.recommend_points import NOT_REACHED

    head = f"{rec.gas}: " if rec.gas else ""
    typer.echo(f"{head}goal {rec.goal}" + (f" (target {rec.target_thz:g} THz)"
                                           if rec.target_thz else "") + ", "
               + ", ".join(f"{k} in {lo:g}-{hi:g} {u}" for k, (lo, hi), u
                           in zip(rec.keys, rec.requested, rec.units, strict=True)))
    if rec.pressure_cap is not None:
        typer.echo(f"  pressure searched at or below {rec.rating_fraction:g} x the cell rating "
                   f"= {rec.pressure_cap:.4g} bar (limits.rating_fraction); the cell maker's "
                   "rating, local codes and licensed practice come first")
    else:
        typer.echo("  no cell rating given (cell.rated_pressure_bar): the search is not "
                   "bounded by one; give the lowest rating of cell, windows and fittings")
    if rec.allowed and rec.bound_reason:
        typer.echo(f"  allowed range cut: {rec.bound_reason}")
    if rec.min_eh11 is not None:
        typer.echo(f"  points need at least {rec.min_eh11:.3g} of the exit energy in EH11 "
                   "(--min-eh11)")
    best = rec.best
    if best is not None:
        from hcfplan.planning.verdict import verdict_of_record

        verdict = verdict_of_record(best.record)
        comp = best.record["summary"].get("compressed", {})
        thz = best.record["summary"].get("thz", {})

        def shown(section, name, scale, unit=""):
            reason = verdict.void_reason(f"{section}.{name}")
            value = (comp if section == "compressed" else thz).get(name)
            if reason is not None:  # a void number has no unit
                return f"void ({reason.code})"
            return f"{fmt(value, scale)} {unit}".rstrip()

        mark = "  <- best" if chosen else ""
        tol = ", ".join(f"{t:.2g} {u}" for t, u in zip(rec.tolerance, rec.units, strict=True))
        typer.echo(f"  chosen {_values_text(rec, best.values)} (search tolerance {tol}; "
                   f"verdict {best.verdict}){mark}")
        eh11 = best.record["summary"].get("output", {}).get("eh11_fraction")
        typer.echo(f"  compressed {shown('compressed', 'fwhm_s', 1e-15, 'fs')}, "
                   f"{shown('compressed', 'peak_power_w', 1e9, 'GW')}; THz cutoff "
                   f"{shown('thz', 'cutoff_hz', 1e12, 'THz')}"
                   + (f"; THz peak field {shown('thz', 'peak_field_v_per_m', 1e5, 'kV/cm')}, "
                      f"efficiency {shown('thz', 'efficiency', 1.0)}"
                      if thz.get("peak_field_v_per_m") is not None else "")
                   + (f"; EH11 share {fmt(eh11, 0.01, 4)} % of the exit energy"
                      if eh11 is not None else ""))
        for line in verdict_lines(verdict, "  ")[1:] if verdict.reasons else ():
            typer.echo(line)
        for i, c in enumerate(rec.binding):
            typer.echo(f"  {'binding:' if i == 0 else '        '} {c['text']}")
    elif rec.closest is not None:
        thz = rec.closest.record["summary"].get("thz", {})
        typer.echo(f"  closest valid point: {_values_text(rec, rec.closest.values)}, THz "
                   f"cutoff {fmt(thz.get('cutoff_hz'), 1e12)} THz (below the target)")
    if rec.evaluations:
        bad = sum(1 for e in rec.evaluations if not e.valid)
        why = ", ".join(f"{n} {reason}" for reason, n in rec.excluded if reason != NOT_REACHED)
        short = dict(rec.excluded).get(NOT_REACHED)
        typer.echo(f"  {len(rec.evaluations)} points ({rec.coarse} in the coarse pass, "
                   f"{rec.runs} full runs); {bad} excluded" + (f": {why}" if why else "")
                   + (f"; {short} valid but below the target" if short else ""))
        for span in rec.spans:
            typer.echo(f"    {span}")
    if rec.reason:
        typer.echo(f"  note: {rec.reason}")
    typer.echo()


# ---------------------------------------------------------------------------------------------
# compare


def compare_command(
    config_a: Path = typer.Argument(..., help="Config A (TOML)."),
    config_b: Optional[Path] = typer.Argument(  # noqa: UP007, UP045
        None, help="Config B (TOML); default: A with the --set-b overrides."),
    set_: Optional[list[str]] = typer.Option(None, "--set", help="Override for A (and for B "  # noqa: UP007, UP045
                                             "when B is A), repeatable."),
    set_b: Optional[list[str]] = typer.Option(  # noqa: UP007, UP045
        None, "--set-b", help="Override applied to B only, e.g. --set-b laser.energy_uj=500 "
        "(repeatable)."),
    out: Optional[Path] = typer.Option(  # noqa: UP007, UP045
        None, "--out", help="Folder for the overlaid figures and comparison.json."),
    force: bool = typer.Option(False, "--force", help="Allow writing into an existing --out."),
    spread: Optional[str] = typer.Option(  # noqa: UP007, UP045
        None, "--spread", help="Input uncertainty band for both setups, e.g. "
        "energy=5%,pressure=2%,fwhm=5% ('default': the [spread] keys of each config)."),
    workers: int = typer.Option(0, "--workers", help=SPREAD_WORKERS_HELP),
    no_report: bool = typer.Option(False, "--no-report", help=NO_REPORT_HELP),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Run two setups and show them side by side with B - A and B / A."""
    from hcfplan.planning.compare import compare_configs

    if config_b is None and not set_b:
        raise ConfigError("compare: give config B or at least one --set-b override")
    over_a = list(set_ or [])
    over_b = over_a + list(set_b or []) if config_b is None else list(set_b or [])
    cfg_a = load_cli_config(config_a, over_a)
    cfg_b = load_cli_config(config_b if config_b is not None else config_a, over_b)
    plans = [spread_plan(cfg, spread, over) for cfg, over in ((cfg_a, over_a), (cfg_b, over_b))]
    labels = (str(config_a), str(config_b) if config_b is not None else
              f"{config_a} with " + " ".join(set_b or []))
    if plans[0] is not None:  # the fork server imports while the nominal chains run
        start_workers(workers)
    comparison = compare_configs(cfg_a, cfg_b, labels)
    spreads = _compare_spreads(comparison, plans, workers, as_json)
    if plans[0] is not None:
        stop_workers()  # no more points to compute
    figures = _compare_outputs(out, comparison, force, spreads) if out is not None else []
    if out is not None and not no_report:
        from hcfplan.report import write_compare_report

        write_compare_report(out, command=command_line(),
                             configs=[side.chain.config.resolved
                                      for side in (comparison.a, comparison.b)])
    if as_json:
        print_json({"labels": list(labels), "rows": list(comparison.rows),
                    "margins": {"a": comparison.a.margins, "b": comparison.b.margins},
                    "verdict": {"a": comparison.a.verdict.as_dict(),
                                "b": comparison.b.verdict.as_dict()},
                    "spread": spreads, "figures": figures, "cautions": _cautions()})
    else:
        print_comparison(comparison, figures, out)
        for name, side in zip(("A", "B"), (spreads or {}).values(), strict=False):
            typer.echo(f"\n{name}:", nl=False)
            print_spread({"spread": side})
        print_cautions()


def _compare_spreads(comparison, plans, workers: int, quiet: bool) -> dict | None:
    """Corner runs of both sides (``--spread``): {"a": spread summary, "b": ...} or None."""
    if plans[0] is None:
        return None
    from hcfplan.planning.spread import spread_summary

    out = {}
    for key, side, plan in zip(("a", "b"), (comparison.a, comparison.b), plans, strict=True):
        if side.chain.propagation.success:
            result = run_spread_corners(side.chain.config, side.chain, plan, workers, quiet)
            out[key] = spread_summary(result)
    return out


def _compare_outputs(out: Path, comparison, force: bool, spreads=None) -> list[str]:
    from hcfplan.io.results import prepare_output_dir, write_figures, write_json
    from hcfplan.plotting.compare import FIGURES

    out_dir = prepare_output_dir(out, force=force)
    WRITTEN.watch(out_dir)
    write_figures([(out_dir / f"{stem}.png", draw, (comparison.a, comparison.b))
                   for stem, draw in FIGURES.items()])
    names = [f"{stem}.png" for stem in FIGURES]
    write_json(out_dir / "comparison.json", {
        "labels": [comparison.a.label, comparison.b.label], "rows": list(comparison.rows),
        "a": {"summary": comparison.a.summary, "margins": comparison.a.margins},
        "b": {"summary": comparison.b.summary, "margins": comparison.b.margins},
        "spread": spreads})
    return names


def print_comparison(comparison, figures, out) -> None:
    rows = []
    verdicts = (comparison.a.verdict, comparison.b.verdict)
    for r in comparison.rows:
        scale, unit = r["scale"], r["unit"]
        cells = []
        for side, verdict in zip(("a", "b"), verdicts, strict=True):
            code = r.get(f"{side}_void") or void_code(verdict, r["key"], r[side])
            cells.append(f"void ({code})" if code else fmt(r[side], scale))
        a, b = cells
        rows.append([r["label"] + (f" ({unit})" if unit else ""), a, b,
                     fmt(r["difference"], scale), fmt(r["ratio"], 1, 3)])
    typer.echo(f"A = {comparison.a.label}\nB = {comparison.b.label}\n")
    print_table(["quantity", "A", "B", "B - A", "B / A"], rows)
    print_void_legend(_void_codes(rows))
    from hcfplan.limits.margins import margin_text

    for side in (comparison.a, comparison.b):
        m = side.margins
        state = ("within the modelled limits" if m["acceptable"]
                 else f"BEYOND the modelled limits: {m['binding']}")
        typer.echo(f"\n{side.label}: {state}")
        typer.echo("  " + margin_text("self-focusing margin", m.get("self_focusing"),
                                      m.get("self_focusing_required", 1.0), "P_cr/P"))
        for line in verdict_lines(side.verdict, "  "):
            typer.echo(line)
    if figures:
        typer.echo(f"\nFigures written to {out}/: {', '.join(figures)}")


def register(app) -> None:
    """Add the workflow commands to ``app``."""
    app.command("scan")(scan_command)
    app.command("recommend")(recommend_command)
    app.command("compare")(compare_command)
