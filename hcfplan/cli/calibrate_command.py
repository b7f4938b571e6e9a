"""The ``hcfplan calibrate`` command: fit config parameters to measured output spectra and
write a calibrated config (:mod:`hcfplan.planning.calibrate`)."""

from __future__ import annotations

from pathlib import Path

import typer

from hcfplan.cli.common import JSON_HELP, WRITTEN, check_plot, gas_dirs
from hcfplan.cli.output import echo, print_cautions, print_json
from hcfplan.errors import ConfigError


def calibrate_command(
    config: Path = typer.Argument(..., help="Config TOML file (the start values)."),
    measured: list[Path] = typer.Option(..., "--measured", help="Measured output spectrum CSV: "
                                        "wavelength_nm, intensity (per unit wavelength); "
                                        "repeat for several spectra."),
    at: list[str] = typer.Option([], "--at", help="Settings of one spectrum, section.key=value "
                                 "(several joined by ';'); give one --at per --measured, in "
                                 "the same order, or none."),
    fit: str = typer.Option(..., "--fit", help="Comma-separated parameters to fit: energy, "
                            "fwhm, pressure (gas.density_scale), n2 (gas.n2_scale)."),
    out: Path = typer.Option(..., "--out", help="Write the calibrated config TOML here."),
    plot: Path | None = typer.Option(None, "--plot", help="Figure of measured against "
                                     "modelled spectra (default: beside --out, .png)."),
    max_evaluations: int = typer.Option(60, "--max-evaluations", help="Cap on the model "
                                        "evaluations of the fit."),
    set_: list[str] = typer.Option([], "--set", help="Override a config key: section.key=value "
                                   "(repeatable)."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Fit energy, duration, density or n2 so modelled output spectra match measured ones."""
    from hcfplan.io.results import check_output_file, write_figure
    from hcfplan.planning.calibrate import calibrate_files, parse_fit_names
    from hcfplan.plotting.calibration import draw_calibration

    names = parse_fit_names(fit)
    if at and len(at) != len(measured):
        raise ConfigError(f"--at given {len(at)} time(s) for {len(measured)} --measured "
                          "spectra: give one --at per spectrum (in the same order) or none")
    if max_evaluations < 2:
        raise ConfigError(f"--max-evaluations = {max_evaluations}: must be >= 2")
    settings = [tuple(s.strip() for s in text.split(";") if s.strip()) for text in at] \
        or [()] * len(measured)
    if out.suffix.lower() != ".toml":
        raise ConfigError(f"--out {out}: the calibrated config must be a .toml file")
    if out.resolve() == config.resolve():
        raise ConfigError(f"--out {out}: is the config itself; write the calibrated config to "
                          "another file")
    check_output_file("--out", out)
    plot = plot if plot is not None else out.with_suffix(".png")
    check_plot(plot)
    result, report = calibrate_files(config, list(zip(measured, settings, strict=True)),
                                     names, out, overrides=set_, extra_gas_dirs=gas_dirs(),
                                     max_evaluations=max_evaluations)
    WRITTEN.watch(plot)
    write_figure(plot, draw_calibration, result)
    report["figure"] = str(plot)
    if as_json:
        print_json(report)
        return
    _print_report(result, out, plot)


def _print_report(result, out: Path, plot: Path) -> None:
    from hcfplan.planning.calibrate import FIT_PARAMETERS

    echo("Calibration against measured output spectra")
    for name in result.names:
        p = FIT_PARAMETERS[name]
        echo(f"  {name:<9} {p.path:<18} {result.values[name]:.6g} +- "
             f"{result.uncertainties[name]:.2g}   (start {result.start[name]:.6g})")
    echo(f"  residual  {result.residual_db:.2f} dB RMS over {len(result.measurements)} "
         f"spectrum/spectra, {result.evaluations} model evaluations")
    echo(f"  fit quality: {result.quality}")
    for reason in result.reasons:
        echo(f"    - {reason}")
    if result.quality == "poor":
        echo("  The fitted values are not a confident answer: check the measurement, the "
             "settings (--at) and the model's assumptions before using the calibrated config.")
    echo(f"\nWritten: {out} (calibrated config), {plot} (figure)")
    print_cautions()


def register(app) -> None:
    """Add the ``calibrate`` command to ``app``."""
    app.command("calibrate")(calibrate_command)
