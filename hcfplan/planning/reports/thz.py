"""THz estimate from a measured spectrum file (the ``thz`` command)."""

from __future__ import annotations

from pathlib import Path

import numpy as np


def thz_report(spectrum_csv: Path, *, phase_csv: Path | None, crystal: str, thickness: float,
               energy: float, cutoff_db: float, cutoff_quantity: str,
               detector_crystal: str | None, detector_thickness: float):
    """Read the CSV file(s), run :func:`hcfplan.thz.generation.thz_from_measured_spectrum`,
    summarise.

    Parameters
    ----------
    thickness, detector_thickness : float
        Crystal thicknesses. [m]
    energy : float
        Pulse energy on the crystal. [J]

    Returns
    -------
    (ThzResult, dict)
        The result and its flat summary (SI, unit in the key names).
    """
    from hcfplan.io.csvdata import read_curve_csv, read_spectrum_csv
    from hcfplan.materials import crystals
    from hcfplan.planning.validity import quiet_validity
    from hcfplan.thz.detection import EoDetector
    from hcfplan.thz.generation import thz_from_measured_spectrum

    wavelength, intensity = read_spectrum_csv(spectrum_csv)
    phase = None
    if phase_csv is not None:
        wl_phase, phase_values = read_curve_csv(phase_csv, "phase_rad")
        phase = np.interp(wavelength, wl_phase, phase_values)
    detector = None
    if detector_crystal is not None:
        detector = EoDetector(crystal=crystals.load_crystal(detector_crystal),
                              thickness=detector_thickness)
    with quiet_validity():
        result = thz_from_measured_spectrum(
            wavelength, intensity, energy, crystals.load_crystal(crystal), thickness,
            phase=phase, cutoff_db=cutoff_db, cutoff_level=cutoff_quantity, detector=detector)
    report = {
        "crystal": result.crystal,
        "thickness_m": result.thickness,
        "pump_energy_j": result.pump_energy,
        "peak_hz": result.peak_frequency,
        "cutoff_hz": result.cutoff_frequency,
        "cutoff_definition": result.cutoff_definition,
        "bandwidth_3db_hz": result.bandwidth_3db,
        "bandwidth_10db_hz": result.bandwidth_10db,
        "relative_efficiency": result.relative_efficiency,
        "detected_peak_hz": result.detected_peak_frequency,
        "detected_cutoff_hz": result.detected_cutoff_frequency,
        "assumption": ("compressed to the transform limit of the measured spectrum"
                       if phase is None else "measured spectral phase applied"),
        "warnings": list(result.warnings),
    }
    return result, report
