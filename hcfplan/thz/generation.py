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

The sum over omega is done by :mod:`hcfplan.thz.mixing` (exact k(omega), or the group-velocity
approximation) on the samples of :mod:`hcfplan.thz.sampling` (a THz step of its own, at most
``setup.frequency_step``, and a window that holds the pulse dispersed in the crystal); the
cutoff, peak and widths by :mod:`hcfplan.thz.measures`. The spectrum is computed up to the
optical bandwidth, also beyond the range the crystal tables state for their THz models: that
part is needed to know whether the energy lies within the range, but a cutoff, peak or width
that lies beyond it (``model_limit``, generation and detection crystal) is reported as ``None``
and a note says why. The phase of the THz field is that of the continuous transforms
(independent of the grid). The set-up (crystal,
detector, levels, beam) arrives as one :class:`hcfplan.thz.setup.ThzSetup`. A measured spectrum
enters through :mod:`hcfplan.thz.measured`.

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

import dataclasses
import warnings
from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c, epsilon_0, eV, hbar
from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import (
    CrystalTable,
    coherence_length,
    optical_index,
    thz_index,
)
from hcfplan.numerics.grid import Grid
from hcfplan.thz.crystal_limits import CrystalLimits, crystal_fluence_limits, limit_warnings
from hcfplan.thz.detection import (
    EoDetector,
    eo_response,
    probe_gate,
    spectral_autocorrelation,
)
from hcfplan.thz.measures import band_above_level, model_limit, spectral_peak, thz_cutoff
from hcfplan.thz.mixing import PHASE_MATCHING
from hcfplan.thz.sampling import padded_spectrum, thz_sampling
from hcfplan.thz.setup import ThzSetup
from hcfplan.thz.tilted import (
    interaction_length,
    mixing_sum_tilted_front,
    tilt_angle,
    tilted_coherence_length,
)

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

    A figure that lies beyond ``model_limit`` (the THz model's range stated by the generation
    and, with a detector, the detection crystal table) is ``None``: it is not a result of the
    model, and ``warnings`` says so.

    Attributes
    ----------
    frequency : THz frequency axis, 0 ... optical bandwidth, step ``frequency_step``. [Hz]
    generated_power : generated power spectrum at the crystal exit, peak = 1. [-]
    generated_field : complex spectral field for d_eff = 1 pm/V and a flat-top area of 1 mm^2,
        phase in the pump-group frame. [V s/m]
    detected_power : power spectrum after the EO detector response, peak = 1, or ``None``. [-]
    peak_frequency, detected_peak_frequency : peak of the generated / detected spectrum, or
        ``None`` (beyond ``model_limit``, or no detector). [Hz]
    cutoff, detected_cutoff : cutoff of the generated / detected spectrum (definition in
        ``cutoff_definition``), or ``None`` (beyond ``model_limit``, or no detector). [Hz]
    cutoff_computed : the cutoff of the whole computed spectrum, also when it lies beyond
        ``model_limit`` (for figures and axis ranges; not a result of the model there). [Hz]
    cutoff_definition : text of the cutoff definition and the spectrum it applies to.
    model_limit : upper end of the THz model's range: generation ∩ detection crystal. [Hz]
    frequency_step : THz sample spacing (:mod:`hcfplan.thz.sampling`). [Hz]
    bandwidth_3db, bandwidth_10db : width of the region around the peak above -3 / -10 dB
        of the generated power spectrum, or ``None`` when it reaches beyond ``model_limit``.
        [Hz]
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
    detector_response : EO response R(Omega) on ``frequency`` (:func:`eo_response` with the
        probe gate), or ``None`` without a detector. [-]
    probe_frequency : mean probe frequency of the EO detection, or ``None``. [Hz]
    geometry : "collinear" or "tilted_front" (:mod:`hcfplan.thz.tilted`).
    tilt_angle : pulse-front tilt inside the crystal (tilted front only). [rad]
    interaction_length : THz path over which it is generated (the thickness, or for a tilted
        front the part of it that crosses the pump beam). [m]
    field_scale : factor from ``generated_field`` to the on-axis field at the exit face of a
        Gaussian pump beam (2 (d_eff / 1 pm/V) (1 mm^2 / (pi w^2))), or ``None`` without beam
        radius and d_eff. [-]
    crystal_limits : pump fluence and its damage, two-photon and free-carrier limits
        (:mod:`hcfplan.thz.crystal_limits`), or ``None`` without beam radius.
    """

    frequency: np.ndarray
    generated_power: np.ndarray
    generated_field: np.ndarray
    detected_power: np.ndarray | None
    peak_frequency: float | None
    detected_peak_frequency: float | None
    cutoff: float | None
    detected_cutoff: float | None
    cutoff_computed: float
    cutoff_definition: str
    model_limit: float
    frequency_step: float
    bandwidth_3db: float | None
    bandwidth_10db: float | None
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
    detector_response: np.ndarray | None = None
    probe_frequency: float | None = None
    geometry: str = "collinear"
    tilt_angle: float | None = None
    interaction_length: float | None = None
    field_scale: float | None = None
    crystal_limits: CrystalLimits | None = None


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
        Unused here: the fluence limits (damage, two-photon and free-carrier absorption) are
        :func:`hcfplan.thz.crystal_limits.crystal_fluence_limits`. [J/m^2]

    Returns
    -------
    list of str
        Warnings; peak intensity 2P/(pi w^2).

    References
    ----------
    None: comparisons of twice the photon energy with the band gaps of the crystal table
    (common practice, no source).
    """
    out = []
    two_photon = 2 * hbar * omega_pump
    gap, gap_ind = crystal.band_gap_direct, crystal.band_gap_indirect
    intensity = None if beam_radius is None else 2 * peak_power / (np.pi * beam_radius**2)
    if gap is not None and two_photon > gap:
        text = (f"{crystal.name}: the two-photon energy {two_photon / eV:.2f} eV exceeds "
                f"the direct gap {gap / eV:.2f} eV: two-photon absorption and free "
                "carriers absorb pump and THz")
        beta = crystal.two_photon_coefficient
        if beta is not None and intensity is not None:
            text += f" (beta I L = {beta * intensity * thickness:.2g}, beta from the table)"
        out.append(text)
    elif gap_ind is not None and two_photon > gap_ind:
        out.append(f"{crystal.name}: the two-photon energy {two_photon / eV:.2f} eV exceeds "
                   f"the indirect gap {gap_ind / eV:.2f} eV only (not the direct gap): weak "
                   "phonon-assisted two-photon absorption")
    if beam_radius is None:
        out.append("thz.beam_waist_um not given: fluence, intensity and damage checks of the "
                   "crystal skipped")
        return out
    return out


# ----------------------------------------------------------------------------------------------
# Front end
# ----------------------------------------------------------------------------------------------


def _band(spectrum: np.ndarray, floor_db: float) -> tuple[int, int]:
    """Ascending-order index range [lo, hi) where the spectral power is above the floor."""
    power = np.abs(spectrum) ** 2
    above = np.nonzero(power >= 10.0 ** (floor_db / 10.0) * power.max())[0]
    return int(above[0]), int(above[-1]) + 1


def _band_edges(grid: Grid, spectrum: np.ndarray, floor_db: float) -> tuple[float, float]:
    """Angular frequencies bounding the band above the floor on the optical grid, widened by
    half a sample: the band of the THz samples is taken from the optical spectrum itself, so
    the weak spectral leakage of a field that does not vanish at its window edges, once padded
    (:mod:`hcfplan.thz.sampling`), is not mixed."""
    lo, hi = _band(grid.shifted(spectrum), floor_db)
    omega = grid.shifted(grid.omega)
    half = np.pi * grid.dnu
    return float(omega[lo] - half), float(omega[hi - 1] + half)


def _check_spectrum(grid: Grid, spectrum: np.ndarray) -> None:
    if spectrum.shape != (grid.points,):
        raise ConfigError(f"spectrum shape {spectrum.shape}: must be ({grid.points},) (the grid)")
    if not np.all(np.isfinite(spectrum)) or not np.any(spectrum):
        raise ConfigError("spectrum: must be finite and not all zero")


@dataclass(frozen=True)
class _Generated:
    """Intermediate: the generated field on Omega and what the figures of merit need."""

    Omega: np.ndarray
    field: np.ndarray
    omega_c: float
    band: slice
    drive_peak: float  # peak of |Omega I~(Omega)|^2, the pump-limited (thin-crystal) spectrum [Hz]
    tilt: float | None  # pulse-front tilt (tilted front only) [rad]
    length: float  # interaction length [m]


def _generated_field(grid: Grid, shifted: np.ndarray, setup: ThzSetup,
                     edges: tuple[float, float]) -> _Generated:
    """E_T(Omega) [V s/m] for d_eff = 1 pm/V and a 1 mm^2 flat-top beam (module docstring);
    the optical band is the part of ``grid`` within ``edges`` [rad/s]."""
    crystal = setup.crystal
    omega = grid.shifted(grid.omega)
    lo, hi = np.searchsorted(omega, edges[0]), np.searchsorted(omega, edges[1], side="right")
    band, omega_band = shifted[lo:hi], omega[lo:hi]
    power_band = np.abs(band) ** 2
    omega_c = float(np.sum(omega_band * power_band) / np.sum(power_band))
    count = (len(band) if setup.max_frequency is None
             else int(setup.max_frequency / grid.dnu) + 1)
    Omega = 2 * np.pi * grid.dnu * np.arange(max(min(count, grid.points // 2), 2))
    tilt = length = None
    if setup.geometry == "tilted_front":
        tilt = tilt_angle(crystal, omega_c)
        length = interaction_length(setup.thickness, tilt, setup.beam_radius)
        mixed = mixing_sum_tilted_front(band, grid.dnu, Omega, crystal, length, omega_c, tilt)
    else:
        mixed = PHASE_MATCHING[setup.phase_matching](band, omega_band, grid.dnu, Omega, crystal,
                                                     setup.thickness, omega_c)
    n_thz, n_opt = thz_index(crystal, Omega), float(optical_index(crystal, omega_c))
    t_in = 4 * n_opt / (1 + n_opt) ** 2  # pump power transmission of the input face
    source = 2 * REFERENCE_D_EFF * t_in / (n_opt * c * REFERENCE_AREA) * mixed  # P(Omega) L
    field = 1j * Omega / (2 * epsilon_0 * c) * 2 / (n_thz + 1) * source  # (1/n_T) t = 2/(n_T+1)
    drive = np.abs(Omega * spectral_autocorrelation(band, len(Omega))) ** 2
    return _Generated(Omega, field, omega_c, slice(lo, hi),
                      spectral_peak(Omega / (2 * np.pi), drive), tilt,
                      setup.thickness if length is None else length)


def _continuous_phase(Omega: np.ndarray, delay: float) -> np.ndarray:
    """Factor that takes the THz field of a grid to the phase of the continuous transforms.

    The grid spectrum is the continuous one times (-1)^j (centred time axis, convention 2 of
    :mod:`hcfplan.numerics.grid`), so A~(w + W_m) A~*(w) carries (-1)^m; a field rotated by
    ``delay`` before padding (:mod:`hcfplan.thz.sampling`) carries exp(i W delay).
    """
    sign = np.where(np.arange(len(Omega)) % 2 == 0, 1.0, -1.0)
    return sign * np.exp(-1j * Omega * delay)


def _centred(gate: np.ndarray, Omega: np.ndarray) -> np.ndarray:
    """The probe gate referenced to the probe's own centre: without the linear phase
    exp(i Omega t_c) of the probe's place t_c in the time window (least-squares slope of the
    unwrapped phase where |gate| > 1/2), so that zero delay means probe and THz frames
    coincide; |gate| is unchanged."""
    strong = np.abs(gate) > 0.5
    if np.count_nonzero(strong) < 2:
        return gate
    phase = np.unwrap(np.angle(gate))
    slope = np.polyfit(Omega[strong], phase[strong], 1, w=np.abs(gate[strong]))[0]
    return gate * np.exp(-1j * slope * Omega)


def _detected_power(detector: EoDetector, grid: Grid, shifted, gen: _Generated,
                    probe_grid: Grid) -> tuple[np.ndarray, np.ndarray, float]:
    """(|E_T(Omega) R(Omega)|^2, R, probe centroid [rad/s]) with the EO response R of
    :func:`eo_response`."""
    if detector.probe_spectrum is None:
        probe = shifted[gen.band]
        omega = grid.shifted(grid.omega)[gen.band]
    else:
        probe_spectrum = np.asarray(detector.probe_spectrum, dtype=complex)
        if grid.points > probe_grid.points:  # on the THz samples, as the pump
            probe_spectrum = padded_spectrum(probe_grid, probe_spectrum, grid.points)[1]
        probe = grid.shifted(probe_spectrum)
        omega = grid.shifted(grid.omega)
    power = np.abs(probe) ** 2
    omega_probe = float(np.sum(omega * power) / np.sum(power))
    gate = _centred(probe_gate(probe, len(gen.Omega)), gen.Omega)
    response = eo_response(detector.crystal, detector.thickness, gen.Omega, omega_probe, gate)
    return np.abs(gen.field * response) ** 2, response, omega_probe


def _coherence_notes(crystal, thickness, frequency, l_c, drive_peak) -> list[str]:
    notes = []
    l_peak = float(np.interp(drive_peak, frequency, l_c))
    if thickness > l_peak:
        notes.append(f"{crystal.name}: thickness {thickness * 1e3:.3g} mm exceeds the coherence "
                     f"length {l_peak * 1e3:.3g} mm at {drive_peak * 1e-12:.3g} THz, the peak "
                     "of the pump-limited (thin-crystal) spectrum: phase matching limits the "
                     "bandwidth")
    return notes


def _within(value: float | None, limit: float) -> float | None:
    """``value`` if it lies within the model's range, else ``None``."""
    return None if value is None or not value <= limit else float(value)


def _model_notes(names: str, limit: float, frequency, power, cutoff, peak) -> list[str]:
    """What lies beyond the stated THz range of the crystal model(s)."""
    beyond = frequency > limit
    if not np.any(beyond):
        return []
    total = np.trapezoid(power, frequency)
    share = float(np.trapezoid(np.where(beyond, power, 0.0), frequency) / total)
    notes = []
    if cutoff > limit:
        notes.append(f"{names}: {100 * share:.3g} % of the THz energy lies above the range "
                     f"of the THz model (> {limit * 1e-12:.3g} THz, the crystal table's stated "
                     "limit): the cutoff is not reported")
    if peak > limit:
        notes.append(f"{names}: the THz spectrum peaks above the range of the THz model "
                     f"(> {limit * 1e-12:.3g} THz): peak and widths are not reported")
    return notes


def thz_estimate(grid: Grid, spectrum: np.ndarray, setup: ThzSetup) -> ThzResult:
    """THz spectrum and figures of merit generated by an optical pulse in a chi(2) crystal.

    Parameters
    ----------
    grid : Grid
        The hcfplan grid of ``spectrum``.
    spectrum : ndarray of complex
        Optical spectral amplitude after the compressor, FFT order, |A~|^2 in J/Hz.
    setup : ThzSetup
        Generation crystal and thickness, phase-matching method, detector, cutoff level, beam
        radius, d_eff, damage fluence, spectral floor and highest THz frequency.

    Returns
    -------
    ThzResult
        Spectra, cutoff, bandwidths, efficiencies and warnings.

    Notes
    -----
    Equations in the module docstring. Validity: plane wave, undepleted pump, chi(2) dispersion
    neglected; THz model of the crystal valid up to ``crystal.thz.frequency_max``.

    References
    ----------
    .. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation
           of terahertz pulses through optical rectification in organic DAST crystals: theory
           and experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not
           retrieved].
    .. [2] N. C. J. van der Valk, P. C. M. Planken, A. N. Buijserd, H. J. Bakker, "Influence of
           pump wavelength and crystal length on the phase matching of optical rectification,"
           J. Opt. Soc. Am. B 22, 1714 (2005).
    .. [3] R. W. Boyd, *Nonlinear Optics*, 3rd ed., Academic Press, 2008, ch. 2 (d = chi(2)/2).
    .. [4] T. O. Buchmann et al., "High-power few-cycle THz generation at MHz repetition rates
           in an organic crystal," APL Photonics 5, 106103 (2020) (GaP as reference,
           ~1e-5..1e-4).
    """
    spectrum = np.asarray(spectrum, dtype=complex)
    _check_spectrum(grid, spectrum)
    crystal, thickness = setup.crystal, setup.thickness
    sampling = thz_sampling(grid, spectrum, crystal, thickness, setup.frequency_step)
    fine = sampling.grid
    shifted = fine.shifted(sampling.spectrum)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        gen = _generated_field(fine, shifted, setup,
                               _band_edges(grid, spectrum, setup.band_floor_db))
        gen = dataclasses.replace(gen, field=gen.field * _continuous_phase(gen.Omega,
                                                                            sampling.delay))
        l_c = (coherence_length(crystal, gen.omega_c, gen.Omega) if gen.tilt is None
               else tilted_coherence_length(crystal, gen.omega_c, gen.tilt, gen.Omega))
        detected, response, omega_probe = ((None, None, None) if setup.detector is None
                                           else _detected_power(setup.detector, fine, shifted,
                                                                gen, grid))
    notes = list(dict.fromkeys(str(w.message) for w in caught)) + list(sampling.notes)
    frequency = gen.Omega / (2 * np.pi)
    power = np.abs(gen.field) ** 2
    limit = model_limit(crystal, None if setup.detector is None else setup.detector.crystal)
    names = crystal.name if setup.detector is None or setup.detector.crystal is crystal else (
        f"{crystal.name} / {setup.detector.crystal.name}")
    cutoff, definition = thz_cutoff(frequency, power, setup.cutoff_db, setup.cutoff_level)
    peak = spectral_peak(frequency, power)
    notes += _coherence_notes(crystal, gen.length, frequency, l_c, gen.drive_peak)
    notes += _model_notes(names, limit, frequency, power, cutoff, peak)
    detected_cutoff = detected_peak = None
    if detected is not None:
        detected_cutoff = thz_cutoff(frequency, detected, setup.cutoff_db, setup.cutoff_level)[0]
        detected_peak = spectral_peak(frequency, detected)
        if detected_cutoff > limit and cutoff <= limit:
            notes.append(f"{names}: the detected THz spectrum reaches above the range of the "
                         f"THz model (> {limit * 1e-12:.3g} THz): its cutoff is not reported")
    widths = [None if peak > limit else band_above_level(frequency, power, level)
              for level in (-3.0, -10.0)]
    pump_energy = grid.energy_w(spectrum)
    # A eps0 c int E^2 dt, trapezoidal on the THz samples (2 int_0^inf |E(nu)|^2 dnu)
    thz_ref = REFERENCE_AREA * epsilon_0 * c * 2 * float(np.trapezoid(power, frequency))
    energy, energy_notes = _absolute_energy(crystal, thz_ref, pump_energy, setup.beam_radius,
                                            setup.d_eff, setup.geometry)
    power_t = np.abs(grid.to_time(spectrum)) ** 2
    notes += energy_notes + pump_crystal_warnings(
        crystal, gen.length, pump_energy=pump_energy, peak_power=float(np.max(power_t)),
        omega_pump=gen.omega_c, beam_radius=setup.beam_radius)
    limits = None
    if setup.beam_radius is not None:
        limits = crystal_fluence_limits(
            crystal, gen.length, pump_energy=pump_energy, peak_power=float(np.max(power_t)),
            power_squared_integral=float(np.sum(power_t**2) * grid.dt), omega_pump=gen.omega_c,
            beam_radius=setup.beam_radius, damage_fluence=setup.damage_fluence)
        notes += list(limits.notes) + limit_warnings(crystal.name, limits)
    d = setup.d_eff if setup.d_eff is not None else crystal.d_eff
    scale = (None if energy is None else
             2 * (d / REFERENCE_D_EFF) * REFERENCE_AREA / (np.pi * setup.beam_radius**2))
    return ThzResult(
        frequency=frequency, generated_power=power / power.max(), generated_field=gen.field,
        detected_power=None if detected is None else detected / detected.max(),
        peak_frequency=_within(peak, limit),
        detected_peak_frequency=_within(detected_peak, limit),
        cutoff=_within(cutoff, limit),
        detected_cutoff=_within(detected_cutoff, limit),
        cutoff_computed=cutoff,
        cutoff_definition=f"{definition}; generated spectrum (the detected cutoff uses the same)",
        model_limit=limit, frequency_step=sampling.frequency_step,
        bandwidth_3db=None if widths[0] is None or widths[0][1] > limit else (
            widths[0][1] - widths[0][0]),
        bandwidth_10db=None if widths[1] is None or widths[1][1] > limit else (
            widths[1][1] - widths[1][0]),
        relative_efficiency=thz_ref / pump_energy, thz_energy=energy,
        thz_energy_caution=ENERGY_CAUTION, pump_energy=pump_energy,
        pump_frequency=gen.omega_c / (2 * np.pi), crystal=crystal.name, thickness=thickness,
        phase_matching=setup.phase_matching, coherence_length=l_c,
        optical_frequency=grid.shifted(grid.frequency),
        optical_spectrum=np.abs(grid.shifted(spectrum)) ** 2,
        warnings=tuple(notes), detector_response=response,
        probe_frequency=None if omega_probe is None else omega_probe / (2 * np.pi),
        geometry=setup.geometry, tilt_angle=gen.tilt, interaction_length=gen.length,
        field_scale=scale, crystal_limits=limits)


def _absolute_energy(crystal, thz_ref, pump_energy, beam_radius, d_eff, geometry="collinear"):
    """THz energy for a Gaussian beam (A_eff = pi w^2) and d_eff; scales as d_eff^2 / A_eff.

    With a Gaussian pump, the on-axis field is twice that of a flat-top beam of area pi w^2
    and the THz intensity profile exp(-4 r^2 / w^2) has the area pi w^2 / 4, which gives the
    same energy: the flat-top figure is the Gaussian-beam energy."""
    d = d_eff if d_eff is not None else crystal.d_eff
    if beam_radius is None or d is None:
        missing = ["thz.beam_waist_um"] if beam_radius is None else []
        if d is None:
            missing.append(f"thz.d_eff_pm_per_v (the {crystal.name} table gives none)")
        return None, ["absolute THz energy not estimated: set " + " and ".join(missing)]
    energy = thz_ref * (d / REFERENCE_D_EFF) ** 2 * REFERENCE_AREA / (np.pi * beam_radius**2)
    notes = []
    if geometry == "collinear" and energy > TYPICAL_EFFICIENCY[1] * pump_energy:
        notes.append(f"estimated THz efficiency {energy / pump_energy:.2g} is above the "
                     f"~{TYPICAL_EFFICIENCY[1]:.0e} seen for collinear GaP/ZnTe: the "
                     "undepleted plane-wave model overestimates here (2PA, Kerr, diffraction)")
    return float(energy), notes
