"""The ``hcfplan`` command line: parse, call ``planning``, print, set the exit code.

Exit codes: 0 success; 1 a run that did not succeed (solver fault; partial result saved);
2 bad input (one line on stderr naming the key, no traceback).
Heavy modules (scipy, CoolProp, numba, matplotlib) are imported inside the commands so that
``hcfplan --help`` starts quickly.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import typer

from hcfplan.cli.output import (
    JSON_HELP,
    SET_HELP,
    SPREAD_WORKERS_HELP,
    TerminalBar,
    _echo,
    _fmt,
    _print_cautions,
    _print_envelope,
    _print_fiber,
    _print_gas,
    _print_json,
    _print_limits,
    _print_rows,
    _print_simulation,
    _print_warnings,
)
from hcfplan.errors import HcfplanError

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
    help="Plan pulse compression in gas-filled hollow-core fibers and the THz it drives.",
)


# ---------------------------------------------------------------------------------------------
# config loading (output helpers: hcfplan.cli.output)


def _load(config: Path, overrides: list[str]):
    import os

    from hcfplan.io.config import load_config
    from hcfplan.materials.gases import gas_search_dirs

    dirs = gas_search_dirs(environ=os.environ)
    return load_config(config, overrides=overrides or (), extra_gas_dirs=dirs)


# ---------------------------------------------------------------------------------------------
# gas


@app.command("gas")
def gas_command(
    name: str = typer.Argument(..., help="Gas table name, e.g. Ar, Ne, N2, air."),
    pressure_bar: float = typer.Option(1.0, "--pressure-bar", help="Fill pressure (absolute)."),
    temperature_k: float = typer.Option(293.15, "--temperature-k", help="Gas temperature."),
    wavelength_nm: list[float] | None = typer.Option(
        None, "--wavelength-nm", help="Wavelength(s) to evaluate (repeatable); default 800, 1030."
    ),
    eos: str = typer.Option("coolprop", "--eos", help="Density model: coolprop or ideal."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Refractive index, group index, GVD, n2, density, Ip and self-focusing power of a gas."""
    import os

    from hcfplan.materials.gases import gas_search_dirs
    from hcfplan.planning.reports.gas import gas_report

    _check_cli_number("--pressure-bar", pressure_bar, 0.0, 1000.0)
    _check_cli_number("--temperature-k", temperature_k, 1.0, 2000.0)
    if eos not in ("coolprop", "ideal"):
        raise _cli_error(f"--eos = {eos!r}: must be one of coolprop, ideal")
    wavelengths = wavelength_nm or [800.0, 1030.0]
    for wl in wavelengths:
        _check_cli_number("--wavelength-nm", wl, 150.0, 20000.0)
    report = gas_report(name, pressure_bar * 1e5, temperature_k, [w * 1e-9 for w in wavelengths],
                        eos=eos, search_dirs=gas_search_dirs(environ=os.environ))
    if as_json:
        _print_json(report)
        return
    _print_gas(report)


def _check_cli_number(option: str, value: float, low: float, high: float) -> None:
    if not math.isfinite(value) or not low < value <= high:
        raise _cli_error(f"{option} = {value}: must be > {low:g} and <= {high:g}")


def _cli_error(message: str) -> HcfplanError:
    from hcfplan.errors import ConfigError

    return ConfigError(message)


# ---------------------------------------------------------------------------------------------
# check


@app.command("check")
def check_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    set_: list[str] | None = typer.Option(None, "--set", help=SET_HELP),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Validate a config and print what it resolves to, all defaults filled in."""
    from hcfplan.io.tomlio import dump_toml

    cfg = _load(config, set_ or [])
    if as_json:
        _print_json(cfg.resolved)
        return
    _echo(f"# {config}: valid. Resolved values (defaults filled in; units in the key names):")
    _echo(dump_toml(cfg.resolved).rstrip())
    _print_cautions()


# ---------------------------------------------------------------------------------------------
# fiber


@app.command("fiber")
def fiber_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    set_: list[str] | None = typer.Option(None, "--set", help=SET_HELP),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
    plot: Path | None = typer.Option(None, "--plot", help="Write a GVD/loss figure here."),
) -> None:
    """Linear and first nonlinear numbers of the configured fiber at the pump (no GNLSE run)."""
    from hcfplan.planning.reports.fiber import fiber_report

    cfg = _load(config, set_ or [])
    report = fiber_report(cfg)
    if plot is not None:
        _fiber_plot(cfg, plot)
        report["figure"] = str(plot)
    if as_json:
        _print_json(report)
        return
    _print_fiber(report)


def _fiber_plot(cfg, path: Path) -> None:
    import numpy as np

    from hcfplan.io.results import write_figure
    from hcfplan.planning.reports.fiber import dispersion_curves
    from hcfplan.plotting.fiber import plot_dispersion_and_loss

    lam0 = cfg.laser.wavelength
    wavelengths = np.linspace(0.4 * lam0, 2.2 * lam0, 800)
    curves = dispersion_curves(cfg, wavelengths)
    write_figure(path, plot_dispersion_and_loss, curves)


# ---------------------------------------------------------------------------------------------
# simulate


def _default_out_dir(config: Path) -> Path:
    """``runs/<config stem>``, or the first free ``runs/<stem>-2``, ``-3``... (never overwrite)."""
    base = Path("runs") / config.stem
    candidate, k = base, 2
    while candidate.exists() and any(candidate.iterdir()):
        candidate = base.with_name(f"{base.name}-{k}")
        k += 1
    return candidate


class _Progress(TerminalBar):
    """Progress over z of one propagation (the solver's ``progress`` callback)."""

    def __init__(self, enabled: bool):
        super().__init__(enabled, "fiber")

    def __call__(self, z: float, length: float, steps: int) -> None:
        self.draw(z / length if length > 0 else 1.0,
                  f"z = {z:.4g} / {length:.4g} m, {steps} steps")


@app.command("simulate")
def simulate_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    out: Path | None = typer.Option(None, "--out", help="Output folder (default runs/<name>)."),
    set_: list[str] | None = typer.Option(None, "--set", help=SET_HELP),
    as_json: bool = typer.Option(False, "--json", help="Print summary.json to stdout."),
    quiet: bool = typer.Option(False, "--quiet", help="No progress bar and no report text."),
    force: bool = typer.Option(False, "--force", help="Allow writing into an existing --out."),
    no_figures: bool = typer.Option(False, "--no-figures", help="Skip the figures."),
    spread: str | None = typer.Option(
        None, "--spread", help="Input uncertainty band, e.g. energy=5%,pressure=2%,fwhm=5%: the "
        "chain also runs at its corners and reports the ranges; 'default' uses the [spread] "
        "keys of the config."),
    workers: int = typer.Option(0, "--workers", help=SPREAD_WORKERS_HELP),
) -> None:
    """Run fiber (GNLSE) -> compressor -> THz and write summary.json, fields.npz and figures."""
    from hcfplan.io.results import prepare_output_dir
    from hcfplan.io.run_output import write_run
    from hcfplan.planning.chain import run_chain

    cfg = _load(config, set_ or [])
    spread_plan = _spread_plan(cfg, spread, set_ or [])
    out_dir = prepare_output_dir(out if out is not None else _default_out_dir(config),
                                 force=force)
    if spread_plan is not None:
        _start_worker_server(workers)  # imports on another core while the nominal chain runs
    bar = _Progress(not quiet and not as_json)
    try:
        chain = run_chain(cfg, progress=bar)
    finally:
        bar.close()
    spread_result = None
    if spread_plan is not None and chain.propagation.success:
        spread_result = _run_spread(cfg, chain, spread_plan, workers, quiet or as_json)
    if spread_plan is not None:
        from hcfplan.planning.scan import release_workers

        release_workers()  # no more points to compute
    summary = write_run(out_dir, chain, figures=not no_figures, spread=spread_result)
    if as_json:
        _print_json(summary)
    elif not quiet:
        _print_simulation(summary, out_dir)
    if not chain.propagation.success:
        typer.echo(f"hcfplan: run stopped: {chain.propagation.message} "
                   f"(partial result saved in {out_dir})", err=True)
        raise typer.Exit(1)


def _spread_plan(cfg, text: str | None, overrides: list[str]):
    """(spec, corner tasks) for ``--spread``, validated before any run; None without it."""
    if text is None:
        return None
    import os

    from hcfplan.materials.gases import gas_search_dirs
    from hcfplan.planning.spread import corner_tasks, parse_spread

    if text.strip() == "default":
        s = cfg.spread
        items = [f"energy={s.energy_percent}%", f"fwhm={s.fwhm_percent}%"]
        if cfg.gas is not None:
            items.append(f"pressure={s.pressure_percent}%")
        text = ",".join(items)
    spec = parse_spread(text)
    dirs = tuple(gas_search_dirs(environ=os.environ))
    return spec, corner_tasks(cfg, spec, overrides, dirs)


def _worker_count(workers: int | None) -> int:
    """Points or corners computed at a time for ``--workers`` (0 or not given: all cores)."""
    import os

    return workers or os.cpu_count() or 1


def _start_worker_server(workers: int | None) -> None:
    """Start the local worker processes' fork server now (see start_worker_server)."""
    from hcfplan.planning.scan import start_worker_server

    start_worker_server(_worker_count(workers))


def _run_spread(cfg, chain, plan, workers: int, quiet: bool):
    from hcfplan.planning.scan import run_summary
    from hcfplan.planning.spread import run_spread

    spec, tasks = plan
    summary, margins = run_summary(cfg, chain)
    if not quiet:
        typer.echo(f"  spread: {len(tasks)} corner runs ...", err=True)
    return run_spread(tasks, spec, {"summary": summary, "margins": margins},
                      workers=_worker_count(workers))


# ---------------------------------------------------------------------------------------------
# limits and envelope


@app.command("limits")
def limits_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    set_: list[str] | None = typer.Option(None, "--set", help=SET_HELP),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Self-focusing, ionisation, cell/window, static-fill and gas-handling checks (analytic)."""
    from hcfplan.planning.reports.limits import limits_report

    cfg = _load(config, set_ or [])
    report = limits_report(cfg)
    if as_json:
        _print_json(report)
        return
    _print_limits(report)
    _print_cautions()


@app.command("envelope")
def envelope_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    set_: list[str] | None = typer.Option(None, "--set", help=SET_HELP),
    plot: Path | None = typer.Option(None, "--plot", help="Write the map figure here."),
    contours: str = typer.Option("both", "--contours",
                                 help="Contours drawn: duration, cutoff or both."),
    as_json: bool = typer.Option(False, "--json", help="Print the map and its lines as JSON."),
) -> None:
    """Energy x pressure map: self-focusing and ionisation lines, rating, regimes, estimates."""
    from hcfplan.planning.envelope import envelope_json, envelope_map

    if contours not in ("duration", "cutoff", "both"):
        raise _cli_error(f"--contours = {contours!r}: must be one of duration, cutoff, both")
    cfg = _load(config, set_ or [])
    result = envelope_map(cfg)
    if plot is not None:
        from hcfplan.io.results import write_figure
        from hcfplan.plotting.envelope import plot_envelope

        write_figure(plot, lambda fig, r: plot_envelope(fig.subplots(), r, contours=contours),
                     result)
    if as_json:
        _print_json(envelope_json(result))
        return
    _print_envelope(result, plot)


# ---------------------------------------------------------------------------------------------
# thz (from a measured spectrum)


@app.command("thz")
def thz_command(
    spectrum_csv: Path = typer.Argument(..., help="Measured spectrum CSV: wavelength_nm, "
                                        "intensity (per unit wavelength)."),
    phase_csv: Path | None = typer.Option(
        None, "--phase-csv", help="Spectral phase CSV: wavelength_nm, phase_rad (default: the "
        "pulse is compressed to its transform limit)."),
    crystal: str = typer.Option("GaP", "--crystal", help="Generation crystal."),
    thickness_mm: float = typer.Option(0.3, "--thickness-mm", help="Crystal thickness."),
    energy_uj: float = typer.Option(1.0, "--energy-uj", help="Pulse energy on the crystal."),
    cutoff_db: float = typer.Option(-20.0, "--cutoff-db", help="Cutoff level below the peak."),
    cutoff_quantity: str = typer.Option("power", "--cutoff-quantity",
                                        help="Spectrum the level refers to: power or field."),
    detector_crystal: str | None = typer.Option(None, "--detector-crystal",
                                                   help="EO detection crystal (optional)."),
    detector_thickness_mm: float = typer.Option(0.3, "--detector-thickness-mm",
                                                help="EO detection crystal thickness."),
    plot: Path | None = typer.Option(None, "--plot", help="Write the THz figure here."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """THz estimate from a measured broadened spectrum (no fiber model needed)."""
    from hcfplan.planning.reports.thz import thz_report

    _check_cli_number("--thickness-mm", thickness_mm, 0.0, 50.0)
    _check_cli_number("--energy-uj", energy_uj, 0.0, 1e6)
    _check_cli_number("--detector-thickness-mm", detector_thickness_mm, 0.0, 50.0)
    if not (math.isfinite(cutoff_db) and -200.0 <= cutoff_db < 0.0):
        raise _cli_error(f"--cutoff-db = {cutoff_db}: must be < 0 and >= -200")
    if cutoff_quantity not in ("power", "field"):
        raise _cli_error(f"--cutoff-quantity = {cutoff_quantity!r}: must be one of power, field")
    result, report = thz_report(spectrum_csv, phase_csv=phase_csv, crystal=crystal,
                                thickness=thickness_mm * 1e-3, energy=energy_uj * 1e-6,
                                cutoff_db=cutoff_db, cutoff_quantity=cutoff_quantity,
                                detector_crystal=detector_crystal,
                                detector_thickness=detector_thickness_mm * 1e-3)
    if plot is not None:
        from hcfplan.io.results import write_figure
        from hcfplan.plotting.report import draw_thz_result

        write_figure(plot, draw_thz_result, result)
        report["figure"] = str(plot)
    if as_json:
        _print_json(report)
        return
    rows = [
        ("crystal", f"{report['crystal']} {report['thickness_m'] * 1e3:g} mm", ""),
        ("THz peak", f"{_fmt(report['peak_hz'], 1e12)} THz", ""),
        ("THz cutoff", f"{_fmt(report['cutoff_hz'], 1e12)} THz", report["cutoff_definition"]),
        ("-3 dB / -10 dB width", f"{_fmt(report['bandwidth_3db_hz'], 1e12)} / "
         f"{_fmt(report['bandwidth_10db_hz'], 1e12)} THz", ""),
        ("relative efficiency", f"{report['relative_efficiency']:.3g}",
         "for d_eff = 1 pm/V and 1 mm^2: compares spectra, not an absolute yield"),
    ]
    if report.get("detected_cutoff_hz") is not None:
        rows.append(("detected cutoff", f"{_fmt(report['detected_cutoff_hz'], 1e12)} THz",
                     f"EO detection in {detector_crystal}"))
    _print_rows(rows)
    if "figure" in report:
        _echo(f"\nFigure written: {report['figure']}")
    _print_warnings(report["warnings"])
    _print_cautions(("estimates", "laser"))


# ---------------------------------------------------------------------------------------------
# planning workflows (scan, recommend, compare) live in their own module

from hcfplan.cli.workflows import register as _register_workflows  # noqa: E402  (light import)

_register_workflows(app)


# ---------------------------------------------------------------------------------------------
# entry point


def main(argv: list[str] | None = None) -> int:
    """Console entry point: run the app; a HcfplanError becomes one stderr line and exit 2."""
    try:
        result = app(args=argv, prog_name="hcfplan", standalone_mode=False)
    except HcfplanError as exc:
        message = " ".join(str(exc).split())
        typer.echo(f"hcfplan: error: {message}", err=True)
        return 2
    except typer.Exit as exc:  # also Ctrl-C, which typer turns into Exit(130)
        return exc.exit_code
    except typer.TyperException as exc:  # usage: unknown option, missing or unparsable value
        if not (sys.argv[1:] if argv is None else argv):  # bare `hcfplan`: show the help
            exc.show()
            return exc.exit_code
        message = " ".join(exc.format_message().split())
        ctx = getattr(exc, "ctx", None)
        hint = f" (see '{ctx.command_path} --help')" if ctx is not None else ""
        typer.echo(f"hcfplan: error: {message}{hint}", err=True)
        return exc.exit_code
    except SystemExit as exc:
        code = exc.code
        return code if isinstance(code, int) else (0 if code is None else 1)
    return result if isinstance(result, int) else 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
