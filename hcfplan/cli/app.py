"""The ``hcfplan`` command line: parse, call ``planning``, print, set the exit code.

Exit codes: 0 success; 1 a run that did not succeed (solver fault; partial result saved);
2 bad input (one line on stderr naming the key, no traceback); 3 ``simulate`` finished but the
verdict of its result is invalid (:mod:`hcfplan.planning.verdict`; results saved); 130
interrupted (Ctrl-C: one line on stderr saying what was kept, no traceback).
Heavy modules (scipy, CoolProp, numba, matplotlib) are imported inside the commands so that
``hcfplan --help`` starts quickly. Imports of the command line flow one way:
app -> workflows -> common, output.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import typer

from hcfplan.cli.common import (
    JSON_HELP,
    SET_HELP,
    SPREAD_WORKERS_HELP,
    WRITTEN,
    gas_dirs,
    interrupted_message,
    load_cli_config,
    run_spread_corners,
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
    print_thz_report,
    print_warnings,
)
from hcfplan.cli.workflows import register as register_workflows
from hcfplan.errors import ConfigError, HcfplanError

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
    help="Plan pulse compression in gas-filled hollow-core fibers and the THz it drives.",
)


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
    from hcfplan.planning.reports.gas import gas_report

    _check_cli_number("--pressure-bar", pressure_bar, 0.0, 1000.0)
    _check_cli_number("--temperature-k", temperature_k, 1.0, 2000.0)
    if eos not in ("coolprop", "ideal"):
        raise ConfigError(f"--eos = {eos!r}: must be one of coolprop, ideal")
    wavelengths = wavelength_nm or [800.0, 1030.0]
    for wl in wavelengths:
        _check_cli_number("--wavelength-nm", wl, 150.0, 20000.0)
    report = gas_report(name, pressure_bar * 1e5, temperature_k, [w * 1e-9 for w in wavelengths],
                        eos=eos, search_dirs=gas_dirs())
    if as_json:
        print_json(report)
        return
    print_gas(report)


def _check_cli_number(option: str, value: float, low: float, high: float) -> None:
    if not math.isfinite(value) or not low < value <= high:
        raise ConfigError(f"{option} = {value}: must be > {low:g} and <= {high:g}")


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


def pressure_notes(cfg) -> list[str]:
    """Notes on the fill pressure against the cell rating and on implausible magnitudes.

    Not errors: a pressure above ``cell.rated_pressure_bar`` or above
    ``limits.rating_fraction`` x that rating is a limit to report (the cautions follow), and a
    fill of hundreds of bar is hinted as a possible unit slip.
    """
    if cfg.gas is None:
        return []
    notes = []
    p, rated = cfg.gas.pressure, cfg.cell.rated_pressure
    fraction = cfg.limits.rating_fraction
    if rated is not None and p > rated:
        notes.append(
            f"gas.pressure_bar = {p / 1e5:.4g} exceeds cell.rated_pressure_bar = "
            f"{rated / 1e5:.4g}: the fill is above the cell maker's rating; the maker's rating "
            "of every part and the local pressure-equipment codes come first (see the "
            "cautions)")
    elif rated is not None and p > fraction * rated:
        notes.append(
            f"gas.pressure_bar = {p / 1e5:.4g} is above limits.rating_fraction x "
            f"cell.rated_pressure_bar = {fraction:g} x {rated / 1e5:.4g} = "
            f"{fraction * rated / 1e5:.4g} bar: less margin below the cell maker's rating than "
            "the limits ask; the maker's rating and the local pressure-equipment codes come "
            "first (see the cautions)")
    if p >= IMPLAUSIBLE_FILL:
        notes.append(
            f"gas.pressure_bar = {p / 1e5:.4g}: a fill of hundreds of bar is far beyond "
            f"gas-filled hollow-core fiber practice; did you mean mbar "
            f"(gas.pressure_bar = {p / 1e8:.4g})?")
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
    from hcfplan.io.results import prepare_output_dir
    from hcfplan.planning.chain import run_chain
    from hcfplan.planning.run_folder import write_run

    cfg = load_cli_config(config, set_ or [])
    plan = spread_plan(cfg, spread, set_ or [])
    figure_names = helpers = None
    if not no_figures:
        from hcfplan.plotting.report import select_figures

        figure_names = select_figures(figures)
    out_dir = prepare_output_dir(out if out is not None else _default_out_dir(config),
                                 force=force)
    if figure_names and plan is None:
        from hcfplan.plotting.helpers import FigureHelpers

        # matplotlib is imported on the other core during the run; helpers that get no
        # figures (an error, Ctrl-C) end when the pipe closes with this process or its frame
        helpers = FigureHelpers.start()
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
    cutoff_db: float = typer.Option(-20.0, "--cutoff-db", help="Share of the THz energy above the "
                                   "cutoff (-20: 99 % of it lies below)."),
    cutoff_quantity: str = typer.Option("power", "--cutoff-quantity",
                                        help="Spectrum whose integral it divides: power or field."),
    detector_crystal: str | None = typer.Option(None, "--detector-crystal",
                                                   help="EO detection crystal (optional)."),
    detector_thickness_mm: float = typer.Option(0.3, "--detector-thickness-mm",
                                                help="EO detection crystal thickness."),
    plot: Path | None = typer.Option(None, "--plot", help="Write the THz figure here."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """THz estimate from a measured broadened spectrum (no fiber model needed)."""
    from hcfplan.planning.reports.thz import thz_report, thz_setup_from_options

    _check_cli_number("--thickness-mm", thickness_mm, 0.0, 50.0)
    _check_cli_number("--energy-uj", energy_uj, 0.0, 1e6)
    _check_cli_number("--detector-thickness-mm", detector_thickness_mm, 0.0, 50.0)
    if not (math.isfinite(cutoff_db) and -200.0 <= cutoff_db < 0.0):
        raise ConfigError(f"--cutoff-db = {cutoff_db}: must be < 0 and >= -200")
    if cutoff_quantity not in ("power", "field"):
        raise ConfigError(f"--cutoff-quantity = {cutoff_quantity!r}: must be one of power, field")
    setup = thz_setup_from_options(crystal=crystal, thickness=thickness_mm * 1e-3,
                                   cutoff_db=cutoff_db, cutoff_quantity=cutoff_quantity,
                                   detector_crystal=detector_crystal,
                                   detector_thickness=detector_thickness_mm * 1e-3)
    result, report = thz_report(spectrum_csv, setup, phase_csv=phase_csv,
                                energy=energy_uj * 1e-6)
    if plot is not None:
        from hcfplan.io.results import write_figure
        from hcfplan.plotting.report import draw_thz_result

        WRITTEN.watch(plot)
        write_figure(plot, draw_thz_result, result)
        report["figure"] = str(plot)
    if as_json:
        print_json(report)
        return
    print_thz_report(report, detector_crystal)


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


def main(argv: list[str] | None = None) -> int:
    """Console entry point: run the app and return the exit code.

    A HcfplanError becomes one stderr line and exit 2; Ctrl-C becomes one stderr line saying
    what the command kept (:func:`hcfplan.cli.common.interrupted_message`) and exit 130.
    """
    WRITTEN.clear()
    try:
        result = app(args=argv, prog_name="hcfplan", standalone_mode=False)
    except KeyboardInterrupt:  # outside a command (typer turns one inside into 130)
        result = INTERRUPTED
    except HcfplanError as exc:
        message = " ".join(str(exc).split())
        typer.echo(f"hcfplan: error: {message}", err=True)
        return 2
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
    if result == INTERRUPTED:
        typer.echo(f"hcfplan: {interrupted_message()}", err=True)
    return result if isinstance(result, int) else 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
