"""The ``hcfplan thz`` command: the THz estimate from a measured broadened spectrum, with its
absolute figures, waveforms and crystal limits (no fiber model needed)."""

from __future__ import annotations

import os
from pathlib import Path

import typer

from hcfplan.cli.common import JSON_HELP, WRITTEN, check_plot
from hcfplan.cli.output import print_json, print_thz_report
from hcfplan.errors import ConfigError


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
    geometry: str = typer.Option("collinear", "--geometry", help="collinear or tilted_front "
                                 "(velocity matching by a pulse-front tilt, e.g. LiNbO3)."),
    beam_waist_um: float | None = typer.Option(
        None, "--beam-waist-um", help="Pump 1/e^2 radius on the crystal: absolute energy, "
        "peak field and the crystal's fluence limits."),
    focus_f_number: float = typer.Option(2.0, "--focus-f-number",
                                         help="f-number of the THz focus of the peak field."),
    repetition_khz: float | None = typer.Option(None, "--repetition-khz",
                                                help="Repetition rate (THz average power)."),
    plot: Path | None = typer.Option(None, "--plot", help="Write the THz figure here."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """THz estimate from a measured broadened spectrum (no fiber model needed)."""
    from hcfplan.io.checks import check_option
    from hcfplan.materials.crystal_tables import (
        crystal_names,
        crystal_search_dirs,
        listed_crystal_names,
    )
    from hcfplan.planning.reports.thz import thz_report, thz_setup_from_options

    check_option("--thickness-mm", thickness_mm, "thz", "thickness_mm")
    check_option("--energy-uj", energy_uj, "laser", "energy_uj")
    check_option("--detector-thickness-mm", detector_thickness_mm, "thz", "detector_thickness_mm")
    check_option("--cutoff-db", cutoff_db, "thz", "cutoff_db")
    check_option("--cutoff-quantity", cutoff_quantity, "thz", "cutoff_quantity")
    check_option("--geometry", geometry, "thz", "geometry")
    check_option("--focus-f-number", focus_f_number, "thz", "focus_f_number")
    if beam_waist_um is not None:
        check_option("--beam-waist-um", beam_waist_um, "thz", "beam_waist_um")
    if repetition_khz is not None:
        check_option("--repetition-khz", repetition_khz, "laser", "repetition_khz")
    crystal_dirs = crystal_search_dirs(environ=os.environ)
    known = crystal_names(crystal_dirs)
    for option, name in (("--crystal", crystal), ("--detector-crystal", detector_crystal)):
        if name is not None and name.lower() not in known:
            raise ConfigError(f"{option} = {name!r}: unknown crystal (available: "
                              f"{', '.join(listed_crystal_names(crystal_dirs))})")
    check_plot(plot)
    setup = thz_setup_from_options(crystal=crystal, thickness=thickness_mm * 1e-3,
                                   cutoff_db=cutoff_db, cutoff_quantity=cutoff_quantity,
                                   detector_crystal=detector_crystal,
                                   detector_thickness=detector_thickness_mm * 1e-3,
                                   geometry=geometry,
                                   beam_waist=None if beam_waist_um is None
                                   else beam_waist_um * 1e-6,
                                   table_dirs=crystal_dirs)
    result, report = thz_report(spectrum_csv, setup, phase_csv=phase_csv,
                                energy=energy_uj * 1e-6, focus_f_number=focus_f_number,
                                repetition_rate=None if repetition_khz is None
                                else repetition_khz * 1e3)
    if plot is not None:
        from hcfplan.io.results import write_figure
        from hcfplan.planning.reports.thz_absolute import waveforms
        from hcfplan.plotting.report import draw_thz_result
        from hcfplan.plotting.thz_time import draw_thz_waveform

        WRITTEN.watch(plot)
        write_figure(plot, draw_thz_result, result)
        report["figure"] = str(plot)
        waveform_plot = plot.with_name(f"{plot.stem}_waveform{plot.suffix}")
        WRITTEN.watch(waveform_plot)
        write_figure(waveform_plot, draw_thz_waveform, result,
                     waveforms(result, setup, focus_f_number))
        report["waveform_figure"] = str(waveform_plot)
    if as_json:
        print_json(report)
        return
    print_thz_report(report, detector_crystal)


def register(app) -> None:
    """Add the ``thz`` command to ``app``."""
    app.command("thz")(thz_command)
