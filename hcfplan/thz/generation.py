"""THz generation by optical rectification (intrapulse difference-frequency mixing) in a chi(2)
crystal, driven by the compressed optical pulse; figures of merit and pump-side checks.

Model (plane wave, undepleted pump, collinear, normal incidence)
----------------------------------------------------------------
The optical spectrum A~(omega) on the hcfplan grid (FFT order, |A~|^2 in J/Hz, conventions of
:mod:`hcfplan.numerics.grid`) drives the low-frequency polarisation P(z, t) = eps0 d_eff |E(z, t)|^2
= 2 d_eff I(z, t) / (n_opt c) (Boyd's convention, d = chi(2)/2). Solving the THz wave equation in
the slowly-varying-amplitude approximation for each THz frequency Omega gives the field at the exit
face

.. math:: E_T(\\Omega) = \\frac{i\\Omega}{2 n_T \\varepsilon_0 c}\\, t(\\Omega)
    \\frac{2 d_{eff} T_{in}}{n_{opt} c\\, A} \\int d\\nu\\; \\tilde A(\\omega+\\Omega)
    \\tilde A^*(\\omega)\\, \\mathcal{L}(\\omega, \\Omega),

.. math:: \\mathcal{L} = \\int_0^L e^{i[k(\\omega+\\Omega) - k(\\omega)] z'}
    e^{i k_T(\\Omega) (L - z')} dz' = e^{i k_T L}\\,\\frac{e^{i\\Delta k L} - 1}{i \\Delta k},
    \\qquad \\Delta k = k(\\omega+\\Omega) - k(\\omega) - k_T(\\Omega),

where k(omega) = n(omega) omega / c is the optical wavenumber from the Sellmeier, and the complex
k_T = (n_T + i kappa_T) Omega / c carries the THz absorption: the wave generated at z' is
attenuated as exp(-alpha (L - z') / 2) in field (alpha = 2 kappa_T Omega / c, power). Included:
t(Omega) = 2 n_T / (n_T + 1), the THz field transmission at the exit face, and T_in =
4 n_opt / (1 + n_opt)^2, the pump power transmission at the input face (at the pump centroid).
Not included: pump depletion, dispersion of the pump inside the crystal beyond Delta k (the
pump spectrum is not reshaped), two-photon and free-carrier absorption, Kerr effect,
diffraction, multiple reflections, d_eff dispersion. n_opt in the prefactor is taken at the
pump centroid. The returned phase is referenced to a frame moving with the pump group velocity.

This is the frequency-domain difference-frequency model of optical rectification of [1] (a
standard form, see also [2], [3]); the equation numbers of [1] were not checked.

Two ways to do the sum over omega (registry :data:`PHASE_MATCHING`):

* ``"full"``: L(omega, Omega) with the exact optical k(omega); a compiled sum over omega on the
  band-limited part of the grid for every THz sample.
* ``"group_velocity"``: k(omega + Omega) - k(omega) ~ Omega n_g(omega_c) / c, so L depends on
  Omega only and the sum is an autocorrelation done by FFT. Exact for a dispersion-free crystal;
  a good approximation when the group-velocity dispersion over the band times L is small.

References
----------
.. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation of
       terahertz pulses through optical rectification in organic DAST crystals: theory and
       experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not retrieved].
.. [2] N. C. J. van der Valk, P. C. M. Planken, A. N. Buijserd, H. J. Bakker, "Influence of pump
       wavelength and crystal length on the phase matching of optical rectification," J. Opt.
       Soc. Am. B 22, 1714 (2005).
.. [3] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, ch. 2 (d = chi(2)/2).
.. [4] T. O. Buchmann et al., "High-power few-cycle THz generation at MHz repetition rates in
       an organic crystal," APL Photonics 5, 106103 (2020) (GaP as reference, ~1e-5..1e-4).
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np

from hcfplan.constants import c, epsilon_0, eV, hbar
from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import (
    CrystalTable,
    coherence_length,
    optical_group_index,
    optical_index,
    thz_index,
)
from hcfplan.numerics.grid import Grid, fft_friendly_size
from hcfplan.thz.detection import (
    EoDetector,
    eo_response,
    phase_matching_integral,
    probe_gate,
    spectral_autocorrelation,
)

PhaseMatchingName = Literal["full", "group_velocity"]
CutoffLevelName = Literal["power", "field"]

#: Reference nonlinearity and flat-top beam area of :attr:`ThzResult.relative_efficiency`.
REFERENCE_D_EFF = 1e-12  # 1 pm/V [m/V]
REFERENCE_AREA = 1e-6  # 1 mm^2 [m^2]
#: Collinear GaP/ZnTe efficiencies seen in practice (Buchmann et al. 2020 [4], and Hoffmann &
#: Fulop, J. Phys. D 44, 083001 (2011) [from memory]); the estimate warns above the upper value.
TYPICAL_EFFICIENCY = (1e-5, 1e-4)

ENERGY_CAUTION = (
    "Order-of-magnitude estimate: plane-wave undepleted-pump model with a Gaussian beam of the "
    "given 1/e^2 radius (A_eff = pi w^2) and d_eff as stated; ignores diffraction, two-photon and "
    "free-carrier absorption, the Kerr effect and outcoupling optics. Uncertain by a factor of a "
    "few or more (d_eff values from memory). Collinear GaP/ZnTe typically give 1e-5..1e-4 of the "
    "pump energy (Buchmann et al., APL Photonics 5, 106103 (2020))."
)


@dataclass(frozen=True)
class ThzResult:
    """THz estimate from one optical spectrum and one crystal (all SI).

    Attributes
    ----------
    frequency : THz frequency axis, 0 ... optical bandwidth. [Hz]
    generated_power : generated power spectrum at the crystal exit, peak = 1. [-]
    generated_field : complex spectral field for d_eff = 1 pm/V and a flat-top area of 1 mm^2,
        phase in the pump-group frame. [V s/m]
    detected_power : power spectrum after the EO detector response, peak = 1, or ``None``. [-]
    peak_frequency, detected_peak_frequency : peak of the generated / detected spectrum. [Hz]
    cutoff_frequency, detected_cutoff_frequency : see ``cutoff_definition``. [Hz]
    cutoff_definition : text stating level, spectrum (power or field) and which spectrum.
    bandwidth_3db, bandwidth_10db : width of the region around the peak above -3 / -10 dB
        of the generated power spectrum. [Hz]
    relative_efficiency : THz energy / pump energy for d_eff = 1 pm/V and a 1 mm^2 flat-top
        beam: a RELATIVE figure of merit, proportional to int |E_T|^2 dOmega, comparable between
        configurations (it already contains the pump energy and crystal length). [-]
    thz_energy : absolute THz energy estimate, only with beam radius and d_eff, else ``None``. [J]
    thz_energy_caution : text on the uncertainty of ``thz_energy``.
    pump_energy : optical pulse energy. [J]
    pump_frequency : energy-weighted mean optical frequency. [Hz]
    coherence_length : c / (2 nu |n_g - n_T|) at the pump centroid on ``frequency``. [m]
    optical_frequency, optical_spectrum : the driving spectrum, ascending. [Hz], [J/Hz]
    warnings : pump-side checks and validity notes.
    """

    frequency: np.ndarray
    generated_power: np.ndarray
    generated_field: np.ndarray
    detected_power: np.ndarray | None
    peak_frequency: float
    detected_peak_frequency: float | None
    cutoff_frequency: float
    detected_cutoff_frequency: float | None
    cutoff_definition: str
    bandwidth_3db: float
    bandwidth_10db: float
    relative_efficiency: float
    thz_energy: float | None
    thz_energy_caution: str
    pump_energy: float
    pump_frequency: float
    crystal: str
    thickness: float
    phase_matching: str
    coherence_length: np.ndarray
    optical_frequency: np.ndarray
    optical_spectrum: np.ndarray
    warnings: tuple[str, ...]


# ----------------------------------------------------------------------------------------------
# Sum over omega: both return sum_k A(w_k + W_m) A*(w_k) L(w_k, W_m) dnu for m < count [J m]
# ----------------------------------------------------------------------------------------------


def _mixing_group_velocity(band, omega, dnu, Omega, crystal, thickness, omega_c):
    """Group-velocity approximation: L depends on Omega only; correlation by FFT."""
    k_thz = thz_index(crystal, Omega) * Omega / c
    q = optical_group_index(crystal, omega_c) * Omega / c  # k(w + W) - k(w) ~ W n_g / c
    factor = phase_matching_integral(q - k_thz, thickness, k_thz) * np.exp(-1j * q * thickness)
    return spectral_autocorrelation(band, len(Omega)) * factor * dnu


def _mixing_full(band, omega, dnu, Omega, crystal, thickness, omega_c):
    """Exact optical k(omega): sum over omega for every THz sample
    (:func:`~hcfplan.thz.kernels.mixing_sums`)."""
    from hcfplan.thz.kernels import mixing_sums  # numba: imported where the sum is done

    k_opt = optical_index(crystal, omega) * omega / c
    if not np.all(np.isfinite(k_opt)):
        raise ConfigError(
            f"{crystal.name}: optical index not finite over the spectrum "
            f"{2e9 * np.pi * c / omega[-1]:.0f}-{2e9 * np.pi * c / omega[0]:.0f} nm: raise "
            "band_floor_db or trim the spectrum"
        )
    k_thz = np.asarray(thz_index(crystal, Omega) * Omega / c, dtype=complex)
    frame = np.exp(-1j * optical_group_index(crystal, omega_c) * Omega / c * thickness)
    out = np.zeros(len(Omega), dtype=complex)
    mixing_sums(np.ascontiguousarray(band, dtype=complex), np.asarray(k_opt, dtype=float),
                k_thz, thickness, min(len(Omega), len(band)), out)
    return out * frame * dnu


PHASE_MATCHING: dict[str, Callable] = {
    "full": _mixing_full,
    "group_velocity": _mixing_group_velocity,
}


# ----------------------------------------------------------------------------------------------
# Figures of merit
# ----------------------------------------------------------------------------------------------


def _power_threshold(level_db: float) -> tuple[float, str]:
    return 10.0 ** (level_db / 10.0), f"power spectrum >= {level_db:g} dB of peak"


def _field_threshold(level_db: float) -> tuple[float, str]:
    ratio = 10.0 ** (level_db / 10.0)  # applied to the field amplitude
    return ratio**2, (
        f"field amplitude >= 10^({level_db:g}/10) = {ratio:.3g} of peak "
        f"({2 * level_db:g} dB in power)"
    )


#: Cutoff level definitions: key -> function(level_db) -> (power-ratio threshold, description).
CUTOFF_LEVELS: dict[str, Callable[[float], tuple[float, str]]] = {
    "power": _power_threshold,
    "field": _field_threshold,
}


def _log_crossing(f0: float, f1: float, p0: float, p1: float, ratio: float) -> float:
    lp0, lp1 = np.log(max(p0, 1e-300)), np.log(max(p1, 1e-300))
    if lp0 == lp1:
        return f0
    return f0 + (f1 - f0) * (lp0 - np.log(ratio)) / (lp0 - lp1)


def thz_cutoff(
    frequency: np.ndarray,
    power: np.ndarray,
    cutoff_db: float = -20.0,
    level: CutoffLevelName = "power",
) -> tuple[float, str]:
    """Highest frequency at which the spectrum is above a level relative to its peak.

    Parameters
    ----------
    frequency : ndarray
        Ascending frequency axis. [Hz]
    power : ndarray
        Power spectrum (any scale). [arb.]
    cutoff_db : float
        Level relative to the peak (negative). [dB]
    level : {"power", "field"}
        ``"power"``: power >= 10^(cutoff_db/10) of peak. ``"field"``: field amplitude >=
        10^(cutoff_db/10) of peak (e.g. -20 -> 1 % of the peak amplitude, -40 dB in power).

    Returns
    -------
    cutoff : float
        Cutoff frequency, interpolated linearly in log(power) between samples. [Hz]
    definition : str
        Text of the definition used.
    """
    if level not in CUTOFF_LEVELS:
        raise ConfigError(f"cutoff level = {level!r}: valid: {', '.join(CUTOFF_LEVELS)}")
    if not cutoff_db < 0:
        raise ConfigError(f"cutoff_db = {cutoff_db} dB: must be < 0")
    ratio, text = CUTOFF_LEVELS[level](cutoff_db)
    p = np.asarray(power, dtype=float) / np.max(power)
    i = int(np.nonzero(p >= ratio)[0][-1])
    if i == len(p) - 1:
        return float(frequency[-1]), f"highest frequency with {text} (at the end of the axis)"
    cut = _log_crossing(frequency[i], frequency[i + 1], p[i], p[i + 1], ratio)
    return float(cut), f"highest frequency with {text}"


def _peak(frequency: np.ndarray, power: np.ndarray) -> float:
    """Peak frequency, refined by a parabola through the three highest samples."""
    i = int(np.argmax(power))
    if i == 0 or i == len(power) - 1:
        return float(frequency[i])
    y0, y1, y2 = power[i - 1 : i + 2]
    denom = y0 - 2 * y1 + y2
    shift = 0.5 * (y0 - y2) / denom if denom != 0 else 0.0
    return float(frequency[i] + shift * (frequency[i + 1] - frequency[i]))


def _bandwidth(frequency: np.ndarray, power: np.ndarray, level_db: float) -> float:
    """Width of the contiguous region around the peak with power >= level_db. [Hz]"""
    p = power / np.max(power)
    ratio = 10.0 ** (level_db / 10.0)
    i = int(np.argmax(p))
    below = np.nonzero(p < ratio)[0]
    left, right = below[below < i], below[below > i]
    lo = frequency[0] if left.size == 0 else _log_crossing(
        frequency[left[-1] + 1], frequency[left[-1]], p[left[-1] + 1], p[left[-1]], ratio)
    hi = frequency[-1] if right.size == 0 else _log_crossing(
        frequency[right[0] - 1], frequency[right[0]], p[right[0] - 1], p[right[0]], ratio)
    return float(hi - lo)


# ----------------------------------------------------------------------------------------------
# Pump-side checks
# ----------------------------------------------------------------------------------------------


def pump_crystal_warnings(
    crystal: CrystalTable,
    thickness: float,
    *,
    pump_energy: float,
    peak_power: float,
    omega_pump: float,
    beam_radius: float | None = None,
    damage_fluence: float | None = None,
) -> list[str]:
    """Two-photon-absorption and damage checks of the pump on the crystal.

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal.
    thickness : float
        Crystal thickness. [m]
    pump_energy : float
        Pulse energy on the crystal. [J]
    peak_power : float
        Peak power. [W]
    omega_pump : float
        Pump centre angular frequency. [rad/s]
    beam_radius : float or None
        1/e^2 intensity radius of a Gaussian beam; ``None`` skips the intensity checks. [m]
    damage_fluence : float or None
        Damage (or working-limit) fluence; ``None`` uses the crystal table's value. [J/m^2]

    Returns
    -------
    list of str
        Warnings; peak fluence 2E/(pi w^2), peak intensity 2P/(pi w^2).
    """
    out = []
    two_photon = 2 * hbar * omega_pump
    gap, gap_ind = crystal.band_gap_direct, crystal.band_gap_indirect
    intensity = None if beam_radius is None else 2 * peak_power / (np.pi * beam_radius**2)
    if gap is not None and two_photon > gap:
        text = (f"{crystal.name}: 2 photon energies {two_photon / eV:.2f} eV exceed "
                f"the direct gap {gap / eV:.2f} eV: two-photon absorption and free "
                "carriers absorb pump and THz")
        beta = crystal.two_photon_coefficient
        if beta is not None and intensity is not None:
            text += f" (beta I L = {beta * intensity * thickness:.2g}, beta from the table)"
        out.append(text)
    elif gap_ind is not None and two_photon > gap_ind:
        out.append(f"{crystal.name}: 2 photon energies exceed the indirect gap only: weak "
                   "phonon-assisted two-photon absorption")
    if beam_radius is None:
        out.append("beam radius not given: fluence, intensity and damage checks skipped")
        return out
    fluence = 2 * pump_energy / (np.pi * beam_radius**2)
    limit = damage_fluence if damage_fluence is not None else crystal.damage_fluence
    if limit is not None and fluence > limit:
        out.append(f"{crystal.name}: peak fluence {fluence * 1e-4:.3g} J/cm^2 exceeds the damage "
                   f"fluence {limit * 1e-4:.3g} J/cm^2 (peak intensity {intensity * 1e-4:.3g} "
                   "W/cm^2)")
    return out


# ----------------------------------------------------------------------------------------------
# Front end
# ----------------------------------------------------------------------------------------------


def _band(spectrum: np.ndarray, floor_db: float) -> tuple[int, int]:
    """Ascending-order index range [lo, hi) where the spectral power is above the floor."""
    power = np.abs(spectrum) ** 2
    above = np.nonzero(power >= 10.0 ** (floor_db / 10.0) * power.max())[0]
    return int(above[0]), int(above[-1]) + 1


def _check_inputs(grid: Grid, spectrum: np.ndarray, thickness: float, method: str) -> None:
    if spectrum.shape != (grid.points,):
        raise ConfigError(f"spectrum shape {spectrum.shape}: must be ({grid.points},) (the grid)")
    if not np.all(np.isfinite(spectrum)) or not np.any(spectrum):
        raise ConfigError("spectrum: must be finite and not all zero")
    if not thickness > 0:
        raise ConfigError(f"crystal thickness = {thickness} m: must be > 0")
    if method not in PHASE_MATCHING:
        raise ConfigError(f"phase_matching = {method!r}: valid: {', '.join(PHASE_MATCHING)}")


@dataclass(frozen=True)
class _Generated:
    """Intermediate: the generated field on Omega and what the figures of merit need."""

    Omega: np.ndarray
    field: np.ndarray
    omega_c: float
    band: slice
    drive_peak: float  # peak of |Omega I~(Omega)|^2, the pump-limited (thin-crystal) spectrum [Hz]


def _generated_field(grid, shifted, crystal, thickness, method, floor_db, max_frequency):
    """E_T(Omega) [V s/m] for d_eff = 1 pm/V and a 1 mm^2 flat-top beam (module docstring)."""
    omega = grid.shifted(grid.omega)
    lo, hi = _band(shifted, floor_db)
    band, omega_band = shifted[lo:hi], omega[lo:hi]
    power_band = np.abs(band) ** 2
    omega_c = float(np.sum(omega_band * power_band) / np.sum(power_band))
    count = len(band) if max_frequency is None else int(max_frequency / grid.dnu) + 1
    Omega = 2 * np.pi * grid.dnu * np.arange(max(min(count, grid.points // 2), 2))
    mixed = PHASE_MATCHING[method](band, omega_band, grid.dnu, Omega, crystal, thickness, omega_c)
    n_thz, n_opt = thz_index(crystal, Omega), float(optical_index(crystal, omega_c))
    t_in = 4 * n_opt / (1 + n_opt) ** 2  # pump power transmission of the input face
    source = 2 * REFERENCE_D_EFF * t_in / (n_opt * c * REFERENCE_AREA) * mixed  # P(Omega) L
    field = 1j * Omega / (2 * epsilon_0 * c) * 2 / (n_thz + 1) * source  # (1/n_T) t = 2/(n_T+1)
    drive = np.abs(Omega * spectral_autocorrelation(band, len(Omega))) ** 2
    return _Generated(Omega, field, omega_c, slice(lo, hi),
                      _peak(Omega / (2 * np.pi), drive))


def _detected_power(detector: EoDetector, grid: Grid, shifted, gen: _Generated) -> np.ndarray:
    """|E_T(Omega) R(Omega)|^2 with the EO response R of :func:`eo_response`."""
    if detector.probe_spectrum is None:
        probe = shifted[gen.band]
        omega = grid.shifted(grid.omega)[gen.band]
    else:
        probe = grid.shifted(np.asarray(detector.probe_spectrum, dtype=complex))
        omega = grid.shifted(grid.omega)
    power = np.abs(probe) ** 2
    omega_probe = float(np.sum(omega * power) / np.sum(power))
    gate = probe_gate(probe, len(gen.Omega))
    response = eo_response(detector.crystal, detector.thickness, gen.Omega, omega_probe, gate)
    return np.abs(gen.field * response) ** 2


def _coherence_notes(crystal, thickness, frequency, l_c, drive_peak, cutoff) -> list[str]:
    notes = []
    l_peak = float(np.interp(drive_peak, frequency, l_c))
    if thickness > l_peak:
        notes.append(f"{crystal.name}: thickness {thickness * 1e3:.3g} mm exceeds the coherence "
                     f"length {l_peak * 1e3:.3g} mm at {drive_peak * 1e-12:.3g} THz, the peak "
                     "of the pump-limited (thin-crystal) spectrum: phase matching limits the "
                     "bandwidth")
    if cutoff > crystal.thz.frequency_max:
        notes.append(f"{crystal.name}: cutoff {cutoff * 1e-12:.3g} THz is above the THz model's "
                     f"validity limit {crystal.thz.frequency_max * 1e-12:.3g} THz")
    return notes


def thz_estimate(
    grid: Grid,
    spectrum: np.ndarray,
    crystal: CrystalTable,
    thickness: float,
    *,
    phase_matching: PhaseMatchingName = "full",
    detector: EoDetector | None = None,
    cutoff_db: float = -20.0,
    cutoff_level: CutoffLevelName = "power",
    beam_radius: float | None = None,
    d_eff: float | None = None,
    damage_fluence: float | None = None,
    band_floor_db: float = -60.0,
    max_frequency: float | None = None,
) -> ThzResult:
    """THz spectrum and figures of merit generated by an optical pulse in a chi(2) crystal.

    Parameters
    ----------
    grid : Grid
        The hcfplan grid of ``spectrum``.
    spectrum : ndarray of complex
        Optical spectral amplitude after the compressor, FFT order, |A~|^2 in J/Hz.
    crystal : CrystalTable
        Generation crystal.
    thickness : float
        Crystal thickness L. [m]
    phase_matching : {"full", "group_velocity"}
        Sum over omega with the exact k(omega) or in the group-velocity approximation.
    detector : EoDetector or None
        Electro-optic detector; gives ``detected_power``.
    cutoff_db : float
        Cutoff level relative to the peak. [dB]
    cutoff_level : {"power", "field"}
        Spectrum the level applies to (see :func:`thz_cutoff`).
    beam_radius : float or None
        1/e^2 intensity radius on the crystal; needed for ``thz_energy`` and the fluence
        checks. [m]
    d_eff : float or None
        Effective nonlinear coefficient; ``None`` uses the crystal table. [m/V]
    damage_fluence : float or None
        Damage fluence for the check; ``None`` uses the crystal table. [J/m^2]
    band_floor_db : float
        Optical spectral power below this level (relative to the peak) is not mixed. [dB]
    max_frequency : float or None
        Highest THz frequency computed (at most half the grid window); default the optical
        bandwidth above the floor, beyond which the generated spectrum vanishes. [Hz]

    Returns
    -------
    ThzResult
        Spectra, cutoff, bandwidths, efficiencies and warnings.

    Notes
    -----
    Equations in the module docstring. Validity: plane wave, undepleted pump, chi(2) dispersion
    neglected; THz model of the crystal valid up to ``crystal.thz.frequency_max``.
    """
    spectrum = np.asarray(spectrum, dtype=complex)
    _check_inputs(grid, spectrum, thickness, phase_matching)
    shifted = grid.shifted(spectrum)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        gen = _generated_field(grid, shifted, crystal, thickness, phase_matching, band_floor_db,
                               max_frequency)
        l_c = coherence_length(crystal, gen.omega_c, gen.Omega)
        detected = None if detector is None else _detected_power(detector, grid, shifted, gen)
    notes = list(dict.fromkeys(str(w.message) for w in caught))
    frequency = gen.Omega / (2 * np.pi)
    power = np.abs(gen.field) ** 2
    cutoff, definition = thz_cutoff(frequency, power, cutoff_db, cutoff_level)
    peak = _peak(frequency, power)
    notes += _coherence_notes(crystal, thickness, frequency, l_c, gen.drive_peak, cutoff)
    pump_energy = grid.energy_w(spectrum)
    thz_ref = REFERENCE_AREA * epsilon_0 * c * 2 * np.sum(power) * grid.dnu  # A eps0 c int E^2 dt
    energy, energy_notes = _absolute_energy(crystal, thz_ref, pump_energy, beam_radius, d_eff)
    notes += energy_notes + pump_crystal_warnings(
        crystal, thickness, pump_energy=pump_energy,
        peak_power=float(np.max(np.abs(grid.to_time(spectrum)) ** 2)), omega_pump=gen.omega_c,
        beam_radius=beam_radius, damage_fluence=damage_fluence)
    return ThzResult(
        frequency=frequency, generated_power=power / power.max(), generated_field=gen.field,
        detected_power=None if detected is None else detected / detected.max(),
        peak_frequency=peak,
        detected_peak_frequency=None if detected is None else _peak(frequency, detected),
        cutoff_frequency=cutoff,
        detected_cutoff_frequency=None if detected is None else thz_cutoff(
            frequency, detected, cutoff_db, cutoff_level)[0],
        cutoff_definition=f"{definition} (generated spectrum; the detected cutoff uses the same)",
        bandwidth_3db=_bandwidth(frequency, power, -3.0),
        bandwidth_10db=_bandwidth(frequency, power, -10.0),
        relative_efficiency=thz_ref / pump_energy, thz_energy=energy,
        thz_energy_caution=ENERGY_CAUTION, pump_energy=pump_energy,
        pump_frequency=gen.omega_c / (2 * np.pi), crystal=crystal.name, thickness=thickness,
        phase_matching=phase_matching, coherence_length=l_c,
        optical_frequency=grid.shifted(grid.frequency), optical_spectrum=np.abs(shifted) ** 2,
        warnings=tuple(notes))


def _absolute_energy(crystal, thz_ref, pump_energy, beam_radius, d_eff):
    """THz energy for a Gaussian beam (A_eff = pi w^2) and d_eff; scales as d_eff^2 / A_eff."""
    d = d_eff if d_eff is not None else crystal.d_eff
    if beam_radius is None or d is None:
        return None, ["absolute THz energy not estimated: needs beam_radius and d_eff"]
    if not beam_radius > 0:
        raise ConfigError(f"beam_radius = {beam_radius} m: must be > 0")
    energy = thz_ref * (d / REFERENCE_D_EFF) ** 2 * REFERENCE_AREA / (np.pi * beam_radius**2)
    notes = []
    if energy > TYPICAL_EFFICIENCY[1] * pump_energy:
        notes.append(f"estimated THz efficiency {energy / pump_energy:.2g} is above the "
                     f"~{TYPICAL_EFFICIENCY[1]:.0e} seen for collinear GaP/ZnTe: the "
                     "undepleted plane-wave model overestimates here (2PA, Kerr, diffraction)")
    return float(energy), notes


# ----------------------------------------------------------------------------------------------
# Measured spectra
# ----------------------------------------------------------------------------------------------


def _grid_from_measured(wavelength, intensity, pulse_energy, phase, density, frequency_step):
    """Grid for the THz correlation, and the measured spectrum on it.

    The window is 2.5 x the measured span (aliasing-free autocorrelation, below zero frequency)
    and the sample spacing is ``frequency_step`` (THz resolution); resampling is done by
    :func:`hcfplan.pulse.fields.field_from_measured_spectrum`.
    """
    from hcfplan.pulse.fields import field_from_measured_spectrum

    wavelength, intensity = np.asarray(wavelength, float), np.asarray(intensity, float)
    if wavelength.shape != intensity.shape or wavelength.size < 3 or np.any(wavelength <= 0):
        raise ConfigError(f"measured spectrum: wavelength ({wavelength.size}) and intensity "
                          f"({intensity.size}) must be equal-length arrays, >= 3 points, > 0 m")
    if density not in ("wavelength", "frequency"):
        raise ConfigError(f"density = {density!r}: valid: wavelength, frequency")
    order = np.argsort(wavelength)
    wavelength = wavelength[order]
    per_wavelength = np.clip(intensity[order], 0, None)  # negative noise -> 0
    if density == "frequency":
        per_wavelength = per_wavelength * c / wavelength**2  # S_lambda = S_nu c / lambda^2
    nu_lo, nu_hi = c / wavelength[-1], c / wavelength[0]
    window = min(2.5 * (nu_hi - nu_lo), 1.9 * 0.5 * (nu_lo + nu_hi))
    if window < 1.1 * (nu_hi - nu_lo):
        raise ConfigError(f"measured spectrum {nu_lo * 1e-12:.0f}-{nu_hi * 1e-12:.0f} THz is too "
                          "wide for one envelope grid")
    points = min(fft_friendly_size(int(np.ceil(window / frequency_step))), 1 << 17)
    grid = Grid(points=points, dt=1.0 / window, omega0=np.pi * (nu_lo + nu_hi))
    field = field_from_measured_spectrum(grid, wavelength, per_wavelength, pulse_energy)
    spectrum = grid.to_spectrum(field)
    if phase is not None:  # exp(i phi), grid.py convention 4; |exp(i phi)| = 1 keeps the energy
        phi = np.asarray(phase, float)[order]
        spectrum = spectrum * np.exp(1j * np.interp(grid.wavelength, wavelength, phi))
    return grid, spectrum


def thz_from_measured_spectrum(
    wavelength: np.ndarray,
    intensity: np.ndarray,
    pulse_energy: float,
    crystal: CrystalTable,
    thickness: float,
    *,
    phase: np.ndarray | None = None,
    density: Literal["wavelength", "frequency"] = "wavelength",
    frequency_step: float = 20e9,
    **options: Any,
) -> ThzResult:
    """THz estimate from a measured (broadened) optical spectrum.

    Parameters
    ----------
    wavelength : ndarray
        Vacuum wavelengths of the samples. [m]
    intensity : ndarray
        Measured spectral intensity (arbitrary scale, negative noise clipped to 0); resampled
        by :func:`hcfplan.pulse.fields.field_from_measured_spectrum`. [arb.]
    pulse_energy : float
        Pulse energy on the crystal. [J]
    crystal : CrystalTable
        Generation crystal.
    thickness : float
        Crystal thickness. [m]
    phase : ndarray or None
        Spectral phase at ``wavelength`` (multiplies the spectrum as exp(i phi), grid.py
        convention 4); ``None``: the pulse is assumed compressed to its transform limit. [rad]
    density : {"wavelength", "frequency"}
        Whether ``intensity`` is per unit wavelength (grating spectrometer; converted with
        lambda^2 / c) or per unit frequency.
    frequency_step : float
        Target spectral sample spacing of the grid (THz resolution). [Hz]
    **options
        Keyword arguments of :func:`thz_estimate`.

    Returns
    -------
    ThzResult
    """
    grid, spectrum = _grid_from_measured(wavelength, intensity, pulse_energy, phase, density,
                                         frequency_step)
    return thz_estimate(grid, spectrum, crystal, thickness, **options)
