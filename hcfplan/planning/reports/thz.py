"""The THz set-up of a config or of the ``thz`` command, and the THz estimate from a measured
spectrum file (the ``thz`` command)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np

from hcfplan.io.config import ThzSpec
from hcfplan.thz.setup import ThzSetup


def thz_setup(spec: ThzSpec, grid: Any = None) -> ThzSetup:
    """The :class:`~hcfplan.thz.setup.ThzSetup` of a ``[thz]`` config section (or of options).

    Parameters
    ----------
    spec : ThzSpec
        The section, in SI (:mod:`hcfplan.io.config`).
    grid : Grid or None
        Grid of the simulated pulse; needed only for a given probe FWHM, which means a
        transform-limited Gaussian probe on that grid.

    Returns
    -------
    ThzSetup
        Crystals loaded; the detector only when ``spec.detector_crystal`` is given.
    """
    from hcfplan.errors import ConfigError
    from hcfplan.materials.crystals import load_crystal
    from hcfplan.thz.detection import EoDetector

    detector = None
    if spec.detector_crystal is not None:
        probe = None
        if spec.probe_fwhm is not None:
            if grid is None:
                raise ConfigError("thz.probe_fwhm_fs: needs a simulated pulse (not available "
                                  "for a measured spectrum)")
            from hcfplan.pulse.fields import pulse_field

            probe = grid.to_spectrum(pulse_field(grid, "gaussian", spec.probe_fwhm, 1e-9))
        detector = EoDetector(crystal=load_crystal(spec.detector_crystal, spec.table_dirs),
                              thickness=spec.detector_thickness, probe_spectrum=probe)
    return ThzSetup(crystal=load_crystal(spec.crystal, spec.table_dirs), thickness=spec.thickness,
                    detector=detector, cutoff_db=spec.cutoff_db,
                    cutoff_level=spec.cutoff_quantity, beam_radius=spec.beam_waist,
                    d_eff=spec.d_eff, damage_fluence=spec.damage_fluence,
                    geometry=spec.geometry)


def thz_spec_from_options(*, crystal: str, thickness: float, cutoff_db: float,
                          cutoff_quantity: str, detector_crystal: str | None,
                          detector_thickness: float, geometry: str = "collinear",
                          beam_waist: float | None = None, focus_f_number: float = 2.0,
                          table_dirs=()) -> ThzSpec:
    """The :class:`ThzSpec` of the ``thz`` command's options (SI; see
    :func:`thz_setup_from_options`)."""
    return ThzSpec(crystal=crystal, thickness=thickness, cutoff_db=cutoff_db,
                   cutoff_quantity=cutoff_quantity, detector_crystal=detector_crystal,
                   detector_thickness=None if detector_crystal is None else detector_thickness,
                   probe_fwhm=None, beam_waist=beam_waist, d_eff=None, damage_fluence=None,
                   geometry=geometry, focus_f_number=focus_f_number,
                   table_dirs=tuple(table_dirs))


def thz_setup_from_options(*, crystal: str, thickness: float, cutoff_db: float,
                           cutoff_quantity: str, detector_crystal: str | None,
                           detector_thickness: float, geometry: str = "collinear",
                           beam_waist: float | None = None, table_dirs=()) -> ThzSetup:
    """The set-up of the ``thz`` command's options, through the same :func:`thz_setup`.

    Parameters
    ----------
    crystal, detector_crystal : str, str or None
        Generation and (optional) EO detection crystal names.
    thickness, detector_thickness : float
        Crystal thicknesses. [m]
    cutoff_db : float
        Share of the THz energy above the cutoff (:func:`hcfplan.thz.measures.thz_cutoff`).
        [dB]
    cutoff_quantity : {"power", "field"}
        Spectrum whose integral the cutoff divides.
    geometry : {"collinear", "tilted_front"}
        Generation geometry.
    beam_waist : float or None
        Pump 1/e^2 radius on the crystal (absolute figures and fluence limits). [m]
    table_dirs : sequence of path
        User crystal folders, searched first.
    """
    return thz_setup(thz_spec_from_options(
        crystal=crystal, thickness=thickness, cutoff_db=cutoff_db,
        cutoff_quantity=cutoff_quantity, detector_crystal=detector_crystal,
        detector_thickness=detector_thickness, geometry=geometry, beam_waist=beam_waist,
        table_dirs=table_dirs))


def thz_report(spectrum_csv: Path, setup: ThzSetup, *, phase_csv: Path | None, energy: float,
               focus_f_number: float = 2.0, repetition_rate: float | None = None):
    """Read the CSV file(s), run :func:`hcfplan.thz.measured.thz_from_measured_spectrum`,
    summarise.

    Parameters
    ----------
    spectrum_csv, phase_csv : Path, Path or None
        Measured spectrum (wavelength_nm, intensity) and optional spectral phase.
    setup : ThzSetup
        Crystals, detector and levels (:func:`thz_setup_from_options`).
    energy : float
        Pulse energy on the crystal. [J]
    focus_f_number : float
        f-number of the THz focus of the peak field. [-]
    repetition_rate : float or None
        Pulse repetition rate for the THz average power. [Hz]

    Returns
    -------
    (ThzResult, dict)
        The result and its flat summary (SI, unit in the key names). A cutoff, peak or width
        beyond the crystal model's range (``model_limit_hz``) is ``None``; ``verdict`` holds
        the status, reasons and void keys of :func:`hcfplan.planning.verdict.verdict_of_thz_report`
        (``thz_beyond_crystal_model`` for such a cutoff).
    """
    from hcfplan.io.csvdata import read_curve_csv, read_spectrum_csv
    from hcfplan.planning.validity import quiet_validity
    from hcfplan.planning.verdict import verdict_of_thz_report
    from hcfplan.thz.measured import thz_from_measured_spectrum

    wavelength, intensity = read_spectrum_csv(spectrum_csv)
    phase = None
    if phase_csv is not None:
        wl_phase, phase_values = read_curve_csv(phase_csv, "phase_rad")
        phase = np.interp(wavelength, wl_phase, phase_values)
    with quiet_validity():
        result = thz_from_measured_spectrum(wavelength, intensity, energy, setup, phase=phase)
    report = {
        "crystal": result.crystal,
        "thickness_m": result.thickness,
        "pump_energy_j": result.pump_energy,
        "peak_hz": result.peak_frequency,
        "cutoff_hz": result.cutoff,
        "cutoff_definition": result.cutoff_definition,
        "model_limit_hz": result.model_limit,
        "frequency_step_hz": result.frequency_step,
        "bandwidth_3db_hz": result.bandwidth_3db,
        "bandwidth_10db_hz": result.bandwidth_10db,
        "relative_efficiency": result.relative_efficiency,
        "energy_estimate_j": result.thz_energy,
        "detected_peak_hz": result.detected_peak_frequency,
        "detected_cutoff_hz": result.detected_cutoff,
        "assumption": ("compressed to the transform limit of the measured spectrum"
                       if phase is None else "measured spectral phase applied"),
        "warnings": list(result.warnings),
    }
    from hcfplan.planning.reports.thz_absolute import absolute_part

    flat = absolute_part(result, setup, focus_f_number=focus_f_number,
                         repetition_rate=repetition_rate)
    report.update({k.removeprefix("thz."): v for k, v in flat.items()})
    report["verdict"] = verdict_of_thz_report(
        report, detector=result.detected_power is not None).as_dict()
    return result, report


def _config_setup(config):
    """The set-up of a config's ``[thz]`` section without its probe (not needed here)."""
    import dataclasses

    return thz_setup(dataclasses.replace(config.thz, probe_fwhm=None))


def chain_part(config, result) -> dict[str, Any]:
    """:func:`absolute_part` of a config's estimate (``laser.repetition_khz`` for the average
    power, ``thz.focus_f_number`` for the focus)."""
    from hcfplan.planning.reports.thz_absolute import absolute_part

    return absolute_part(result, _config_setup(config), focus_f_number=config.thz.focus_f_number,
                         repetition_rate=config.laser.repetition_rate)


def chain_arrays(config, result) -> dict[str, np.ndarray]:
    """:func:`waveform_arrays` of a config's estimate."""
    from hcfplan.planning.reports.thz_absolute import waveform_arrays

    return waveform_arrays(result, _config_setup(config), config.thz.focus_f_number)


def chain_waveforms(config, result):
    """:func:`waveforms` of a config's estimate (for the run's waveform figure)."""
    from hcfplan.planning.reports.thz_absolute import waveforms

    return waveforms(result, _config_setup(config), config.thz.focus_f_number)
