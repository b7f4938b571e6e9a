"""The ``hcfplan`` command line: parse, call ``planning``, print, set the exit code.

Exit codes: 0 success; 1 a run that did not succeed (solver fault; partial result saved) or a
fault of the machine met while writing (full disk, read-only folder: one line naming the path
and the cause); 2 bad input, including an output path found unusable before the work starts
(one line on stderr naming the key or option, no traceback); 3 ``simulate`` finished but the
verdict of its result is invalid (:mod:`hcfplan.planning.verdict`; results saved); 130
interrupted (Ctrl-C: one line on stderr saying what was kept, no traceback), 143 or 129 for
SIGTERM or SIGHUP (the same line).
Heavy modules (scipy, CoolProp, numba, matplotlib) are imported inside the commands so that
``hcfplan --help`` starts quickly. The commands run with the ``"auto"`` kernel policy
(:mod:`hcfplan.numerics.kernel_choice`): a run on a small grid takes the numpy twins of the
compiled kernels and never imports numba (its start-up, about 0.4 s, is more than such a run
gains from it); ``HCFPLAN_KERNELS`` overrides it. Imports of the command line flow one way:
app -> thz_command, calibrate_command, workflows -> common, output.
"""

from __future__ import annotations

import contextlib
import sys
from pathlib import Path

import typer

from hcfplan.cli.calibrate_command import register as register_calibrate
from hcfplan.cli.common import (
    JSON_HELP,
    NO_REPORT_HELP,
    SET_HELP,
    SPREAD_WORKERS_HELP,
    WRITTEN,
    check_plot,
    command_line,
    end_quietly,
    fault_message,
    gas_dirs,
    interrupted_message,
    load_cli_config,
    run_spread_corners,
    signals_as_interrupt,
    spread_plan,
    start_workers,
    stop_workers,
)
from hcfplan.cli.output import (
    TerminalBar,
    echo,
    print_cautions,
    print_envelope,
    print_fiber,
    print_gas,
    print_json,
    print_limits,
    print_simulation,
    print_warnings,
)
from hcfplan.cli.thz_command import register as register_thz
from hcfplan.cli.workflows import register as register_workflows
from hcfplan.errors import ConfigError, HcfplanError
from hcfplan.numerics.kernel_choice import policy_set as kernel_policy_set

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
    help="Plan pulse compression in gas-filled hollow-core fibers and the THz it drives.",
)


def _print_version(value: bool) -> None:
    if value:
        from hcfplan.version import __version__

        typer.echo(f"hcfplan {__version__}")
        raise typer.Exit(0)


@app.callback()
def _options(
    version: bool = typer.Option(False, "--version", callback=_print_version, is_eager=True,
                                 help="Print the version of hcfplan and exit."),
) -> None:
    pass


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
    from hcfplan.io.checks import check_option
    from hcfplan.io.crosschecks import check_triple_point
    from hcfplan.materials.gases import load_gas_table
    from hcfplan.planning.reports.gas import gas_report

    check_option("--pressure-bar", pressure_bar, "gas", "pressure_bar")
    check_option("--temperature-k", temperature_k, "gas", "temperature_k")
    if eos not in ("coolprop", "ideal"):
        raise ConfigError(f"--eos = {eos!r}: must be one of coolprop, ideal")
    wavelengths = wavelength_nm or [800.0, 1030.0]
    for wl in wavelengths:
        check_option("--wavelength-nm", wl, "laser", "wavelength_nm")
    check_triple_point(load_gas_table(name, gas_dirs()), temperature_k, "--temperature-k")
    report = gas_report(name, pressure_bar * 1e5, temperature_k, [w * 1e-9 for w in wavelengths],
                        eos=eos, search_dirs=gas_dirs())
    if as_json:
        print_json(report)
        return
    print_gas(report)


# ---------------------------------------------------------------------------------------------
# check


@app.command("check")
def check_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    set_: list[str] | None = typer.Option(None, "--set", help=SET_HELP),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Validate a config (keys, ranges and the gas phase of the fill) and print what it resolves
    to, all defaults filled in; notes where the fill pressure exceeds the cell rating."""
    from hcfplan.io.tomlio import dump_toml

    cfg = load_cli_config(config, set_ or [])
    warnings = _check_gas_phase(cfg)  # a liquid or two-phase fill: one-line error, exit 2
    warnings += _nonlinearity_notes(cfg)
    notes = pressure_notes(cfg)
    if as_json:
        print_json(cfg.resolved)
        for line in notes + warnings:  # stdout stays the resolved config
            print(f"hcfplan: note: {line}", file=sys.stderr)
        return
    echo(f"# {config}: valid{' (see the notes below)' if notes else ''}. Resolved values "
         "(defaults filled in; units in the key names):")
    echo(dump_toml(cfg.resolved).rstrip())
    if notes:
        echo()
        echo("Notes (limits to report, not errors):")
        for line in notes:
            echo(f"  ! {line}")
    print_warnings(warnings)
    print_cautions()


#: A fill at or above this pressure is far beyond hollow-core fiber practice: hint at a unit
#: slip (mbar written as bar). [Pa]
IMPLAUSIBLE_FILL = 100e5


def _check_gas_phase(cfg) -> list[str]:
    """The phase check of the fill, as ``limits`` runs it: a refused phase raises the
    ConfigError naming gas.pressure_bar and gas.temperature_k; returns the fill's warnings."""
    if cfg.gas is None:
        return []
    from hcfplan.planning.build import build_medium

    return list(build_medium(cfg.gas).warnings)


def _nonlinearity_notes(cfg) -> list[str]:
    """A warning when the configured energy, fill and length give no nonlinearity."""
    from hcfplan.planning.reports import nonlinearity

    return nonlinearity.low_nonlinearity_notes(cfg, nonlinearity.nonlinear_phase_estimate(cfg))


def pressure_notes(cfg) -> list[str]:
    """Notes on the fill pressure against the cell rating and on implausible magnitudes.

    Not errors: a pressure above ``cell.rated_pressure_bar`` or above
    ``limits.rating_fraction`` x that rating is a limit to report (the cautions follow), and a
    fill of hundreds of bar is hinted as a possible unit slip.
    """
    if cfg.gas is None:
        return []
    notes = []
    gas = cfg.gas  # a gradient: its higher end
    p, rated = gas.highest_pressure, cfg.cell.rated_pressure
    key = "gas.pressure_bar" if not gas.is_gradient else (
        "gas.exit_pressure_bar" if gas.exit_pressure >= gas.entrance_pressure
        else "gas.entrance_pressure_bar")
    fraction = cfg.limits.rating_fraction
    if rated is not None and p > rated:
        notes.append(
            f"{key} = {p / 1e5:.4g} exceeds cell.rated_pressure_bar = "
            f"{rated / 1e5:.4g}: the fill is above the cell maker's rating; the maker's rating "
            "of every part and the local pressure-equipment codes come first (see the "
            "cautions)")
    elif rated is not None and p > fraction * rated:
        notes.append(
            f"{key} = {p / 1e5:.4g} is above limits.rating_fraction x "
            f"cell.rated_pressure_bar = {fraction:g} x {rated / 1e5:.4g} = "
            f"{fraction * rated / 1e5:.4g} bar: less margin below the cell maker's rating than "
            "the limits ask; the maker's rating and the local pressure-equipment codes come "
            "first (see the cautions)")
    if p >= IMPLAUSIBLE_FILL:
        notes.append(
            f"{key} = {p / 1e5:.4g}: a fill of hundreds of bar is far beyond "
            f"gas-filled hollow-core fiber practice; did you mean mbar "
            f"({key} = {p / 1e8:.4g})?")
    return notes


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

    check_plot(plot)
    cfg = load_cli_config(config, set_ or [])
    report = fiber_report(cfg)
    if plot is not None:
        _fiber_plot(cfg, plot)
        report["figure"] = str(plot)
    if as_json:
        print_json(report)
        return
    print_fiber(report)


def _fiber_plot(cfg, path: Path) -> None:
    import numpy as np

    from hcfplan.io.results import write_figure
    from hcfplan.planning.reports.fiber import dispersion_curves
    from hcfplan.plotting.fiber import plot_dispersion_and_loss

    lam0 = cfg.laser.wavelength
    wavelengths = np.linspace(0.4 * lam0, 2.2 * lam0, 800)
    curves = dispersion_curves(cfg, wavelengths)
    WRITTEN.watch(path)
    write_figure(path, plot_dispersion_and_loss, curves, cfg)


# ---------------------------------------------------------------------------------------------
# simulate


def _claim_out_dir(out: Path | None, config: Path, force: bool) -> Path:
    """Claim ``--out`` (:func:`hcfplan.io.results.prepare_output_dir`), or by default
    ``runs/<config stem>``, or the first free ``runs/<stem>-2``, ``-3``... (never overwrite;
    a folder another command is writing into is passed over too)."""
    from hcfplan.io.results import OutputBusyError, prepare_output_dir

    if out is not None:
        return prepare_output_dir(out, force=force)
    base = Path("runs") / config.stem
    candidate, k = base, 2
    while True:
        if not (candidate.exists() and any(candidate.iterdir())):
            try:
                return prepare_output_dir(candidate, force=False)
            except OutputBusyError:
                pass
        candidate = base.with_name(f"{base.name}-{k}")
        k += 1


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
    no_report: bool = typer.Option(False, "--no-report", help=NO_REPORT_HELP),
    figures: str = typer.Option(
        "default", "--figures", help="Figures to draw: 'default' (spectrum_in_out, "
        "compressed_pulse, thz_spectrum), 'all', or comma-separated names."),
    spread: str | None = typer.Option(
        None, "--spread", help="Input uncertainty band, e.g. energy=5%,pressure=2%,fwhm=5%: the "
        "chain also runs at its corners and reports the ranges; 'default' uses the [spread] "
        "keys of the config."),
    workers: int = typer.Option(0, "--workers", help=SPREAD_WORKERS_HELP),
) -> None:
    """Run fiber (GNLSE) -> compressor -> THz and write summary.json, fields.npz and figures."""
    figure_names = helpers = None
    if not no_figures:
        from hcfplan.plotting.report import select_figures

        figure_names = select_figures(figures)
    if figure_names and spread is None:
        from hcfplan.plotting.helpers import FigureHelpers

        # forked first: matplotlib is imported on the other core while this process imports
        # the run's modules, reads the config and runs; helpers that get no figures (an error,
        # Ctrl-C) end when the pipe closes with this process or its frame
        helpers = FigureHelpers.start()
    from hcfplan.planning.chain import run_chain
    from hcfplan.planning.run_folder import write_run

    cfg = load_cli_config(config, set_ or [])
    plan = spread_plan(cfg, spread, set_ or [])
    out_dir = _claim_out_dir(out, config, force)
    if helpers is not None and plan is not None:  # a spread draws its figures the usual way
        helpers.close()
        helpers = None
    WRITTEN.watch(out_dir)
    if plan is not None:
        start_workers(workers)  # imports on another core while the nominal chain runs
    bar = _Progress(not quiet and not as_json)
    try:
        chain = run_chain(cfg, progress=bar)
    finally:
        bar.close()
    spread_result = None
    if plan is not None and chain.propagation.success:
        spread_result = run_spread_corners(cfg, chain, plan, workers, quiet or as_json)
    if plan is not None:
        stop_workers()  # no more points to compute
    jobs = None
    if figure_names is not None:
        from hcfplan.plotting.report import figure_jobs

        jobs = figure_jobs(out_dir, chain, spread_result, figure_names)
    summary = write_run(out_dir, chain, figures=jobs, spread=spread_result,
                        figure_writer=helpers.write if helpers is not None else None)
    if not no_report:
        from hcfplan.report import write_run_report

        write_run_report(out_dir, summary, command=command_line())
    if as_json:
        print_json(summary)
    elif not quiet:
        print_simulation(summary, out_dir)
    if not chain.propagation.success:
        typer.echo(f"hcfplan: run stopped: {chain.propagation.message} "
                   f"(partial result saved in {out_dir})", err=True)
        raise typer.Exit(1)
    verdict = summary.get("verdict", {})
    if verdict.get("status") == "invalid":
        from hcfplan.planning.verdict import CODES

        codes = ", ".join(r["code"] for r in verdict.get("reasons", [])
                          if CODES[r["code"]].status == "invalid")
        typer.echo(f"hcfplan: result invalid ({codes}); see verdict in {out_dir}/summary.json",
                   err=True)
        raise typer.Exit(INVALID_RESULT)


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

    cfg = load_cli_config(config, set_ or [])
    report = limits_report(cfg)
    if as_json:
        print_json(report)
        return
    print_limits(report)
    print_cautions()


@app.command("envelope")
def envelope_command(
    config: Path = typer.Argument(..., help="Config TOML file."),
    set_: list[str] | None = typer.Option(None, "--set", help=SET_HELP),
    plot: Path | None = typer.Option(None, "--plot", help="Write the map figure here."),
    contours: str = typer.Option("both", "--contours",
                                 help="Contours drawn: duration, cutoff or both."),
    as_json: bool = typer.Option(False, "--json", help="Print the map and its lines as JSON."),
    check: bool = typer.Option(
        False, "--check", help="Run the GNLSE chain at 3 points of the map's sweet spot and "
        "compare it with the SPM-only estimates (converged runs: seconds to minutes; default: "
        "off, the estimates are shown as unchecked)."),
) -> None:
    """Energy x pressure map: self-focusing and ionisation lines, rating, regimes, estimates."""
    from hcfplan.planning.envelope import envelope_json, envelope_map
    from hcfplan.planning.envelope_check import check_envelope

    if contours not in ("duration", "cutoff", "both"):
        raise ConfigError(f"--contours = {contours!r}: must be one of duration, cutoff, both")
    check_plot(plot)
    cfg = load_cli_config(config, set_ or [])
    result = envelope_map(cfg)
    checked = check_envelope(cfg, result) if check else None
    if plot is not None:
        from hcfplan.io.results import write_figure
        from hcfplan.plotting.envelope import plot_envelope

        WRITTEN.watch(plot)
        write_figure(plot, lambda fig, r: plot_envelope(fig.subplots(), r, contours=contours,
                                                        check=checked), result)
    if as_json:
        print_json(envelope_json(result, checked))
        return
    print_envelope(result, plot, checked)


# ---------------------------------------------------------------------------------------------
# thz (from a measured spectrum) lives in its own module

register_thz(app)
register_calibrate(app)


# ---------------------------------------------------------------------------------------------
# planning workflows (scan, recommend, compare) live in their own module, listed after these

register_workflows(app)


# ---------------------------------------------------------------------------------------------
# entry point


#: Exit code of ``simulate`` when the result's verdict is invalid (results still saved).
INVALID_RESULT = 3

#: Exit code of an interrupted command: 128 + SIGINT, as a shell reports a job ended by Ctrl-C.
#: Common practice, no source. Typer returns it for a KeyboardInterrupt inside a command.
INTERRUPTED = 130

#: Exit code of a command stopped by a fault of the machine while it ran (an OSError: full
#: disk, read-only folder...); found before the work started, the fault is bad input (2).
RUN_FAULT = 1


def main(argv: list[str] | None = None) -> int:
    """Console entry point: run the app and return the exit code.

    A HcfplanError becomes one stderr line and exit 2; a fault of the machine met while the
    command ran (full disk, read-only folder: an OSError) one line naming the path and the
    cause, and what was kept, and exit 1; Ctrl-C, SIGTERM or SIGHUP one stderr line saying
    what the command kept (:func:`hcfplan.cli.common.interrupted_message`) and exit 130 (Ctrl-C)
    or 128 + the signal's number. ``argv`` None: the process's own command line, and a further
    signal during the exit ends the process quietly (:func:`hcfplan.cli.common.end_quietly`).
    """
    WRITTEN.clear()
    received: list[int] = []
    try:
        with signals_as_interrupt(received):
            result = _run(argv)
    except KeyboardInterrupt:  # outside a command (typer turns one inside into 130)
        result = INTERRUPTED
    finally:
        with contextlib.suppress(KeyboardInterrupt):
            WRITTEN.release()  # the output folders' locks; an unused new folder is removed
        if argv is None:
            end_quietly()
    if result == INTERRUPTED or received:
        typer.echo(f"hcfplan: {interrupted_message()}", err=True)
        return 128 + received[0] if received else INTERRUPTED  # 130 for Ctrl-C
    return result


def _run(argv: list[str] | None) -> int:
    """The command of ``argv``; its exit code (see :func:`main`)."""
    try:
        with kernel_policy_set("auto"):  # a one-shot command: numpy kernels on small problems
            result = app(args=argv, prog_name="hcfplan", standalone_mode=False)
    except HcfplanError as exc:
        message = " ".join(str(exc).split())
        typer.echo(f"hcfplan: error: {message}", err=True)
        return 2
    except OSError as exc:  # a fault of the machine (typer handles a broken stdout pipe)
        typer.echo(f"hcfplan: error: {fault_message(exc)}", err=True)
        return RUN_FAULT
    except typer.Exit as exc:
        result = exc.exit_code
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
