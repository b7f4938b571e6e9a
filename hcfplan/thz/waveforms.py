"""The THz field in time, its peak at a focus, and the EO-sampled waveform a delay scan records.

From the complex spectral field E(nu) of :func:`hcfplan.thz.generation.thz_estimate` on
nu_m = m d_nu (m >= 0; phase from generation, phase matching, absorption and the Fresnel exit
factor, in the frame of the pump):

* **range**: only the spectrum within the crystal model's stated range (``model_limit``) enters
  the fields (what lies beyond is an extrapolation; its share of the energy is reported by
  :func:`beyond_model_share`).
* **field in time** (real): E(t) = int E(nu) exp(-i 2 pi nu t) dnu over all nu with
  E(-nu) = E*(nu) (convention of :mod:`hcfplan.numerics.grid`), evaluated by an inverse real FFT
  on a zero-padded axis (band-limited interpolation; the window is 1 / d_nu).
* **absolute scale**: the on-axis field at the exit face of a Gaussian pump beam of 1/e^2 radius
  w is ``ThzResult.field_scale`` times the reference field (module docstring of
  :mod:`hcfplan.thz.generation`); without beam radius and d_eff the reference case (d_eff =
  1 pm/V, flat-top 1 mm^2) is reported, and said so.
* **focus**: every frequency is focused diffraction-limited to a Gaussian waist
  w0(nu) = 2 lambda F / pi (a beam whose 1/e^2 diameter fills the f-number F = f / D), with its
  energy conserved: the THz intensity profile at the exit, exp(-4 r^2 / w^2) (the field follows
  the pump intensity), has the area pi w^2 / 4, the focus pi w0^2 / 2, so the on-axis spectral
  field grows by w / (sqrt(2) w0) and takes the Gouy phase -i of a focus (Fresnel propagator
  1 / (i lambda z) for exp(i(kz - omega t))). The field at the focus is thus close to the time
  derivative of the field at the exit. Apertures, aberrations and the frequency dependence of
  the THz beam size before the optic are not modelled.
* **EO-sampled waveform**: the EO crystal sees the field of the crystal's exit face imaged onto
  it (1:1, no aperture loss), so its signal spectrum is E(nu) R(nu) with the detection response
  R of :func:`hcfplan.thz.detection.eo_response` (input Fresnel factor, velocity mismatch and
  absorption over the detector thickness d, probe gate), and its power spectrum is the
  reported detected spectrum. With the detector's r41 the signal is the probe's phase
  retardation of a <110> crystal at the optimal orientation [1], [2],
  Gamma(tau) = (omega_p n_p^3 r41 d / c) E_eff(tau), in rad; else it is normalised to a peak
  of 1.

References
----------
.. [1] P. C. M. Planken, H.-K. Nienhuys, H. J. Bakker, T. Wenckebach, "Measurement and
       calculation of the orientation dependence of terahertz pulse detection in ZnTe," J. Opt.
       Soc. Am. B 18, 313 (2001) [retardation formula from memory, not retrieved].
.. [2] G. Gallot and D. Grischkowsky, "Electro-optic detection of terahertz radiation," J. Opt.
       Soc. Am. B 16, 1204 (1999) [from memory, not retrieved].
.. [3] A. E. Siegman, *Lasers*, University Science Books, 1986, ch. 17 (Gaussian beam waist at a
       focus, w0 = lambda f / (pi w_lens)) [from memory].
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import CrystalTable, optical_index
from hcfplan.numerics.grid import smooth_fft_size

#: Zero padding of the THz spectrum before the inverse transform (smooth waveforms).
PADDING = 4


@dataclass(frozen=True, eq=False)
class ThzWaveforms:
    """Time-domain THz fields and the EO-sampled waveform (SI).

    Attributes
    ----------
    time : ndarray
        Time axis, centred on the field's peak. [s]
    exit_field : ndarray
        On-axis field at the crystal's exit face. [V/m]
    focus_field : ndarray
        On-axis field at the focus of f-number ``focus_f_number``. [V/m]
    peak_field_exit, peak_field : float
        Largest |E(t)| at the exit and at the focus. [V/m]
    focus_f_number : float
        f-number of the focusing. [-]
    absolute : bool
        True when the fields are for the given beam radius and d_eff; False for the reference
        case (d_eff = 1 pm/V, flat-top 1 mm^2).
    eo_delay : ndarray or None
        Probe delay axis (same as ``time``). [s]
    eo_signal : ndarray or None
        EO-sampled waveform: phase retardation [rad], or normalised to a peak of 1.
    eo_normalisation : str
        What ``eo_signal`` is.
    """

    time: np.ndarray
    exit_field: np.ndarray
    focus_field: np.ndarray
    peak_field_exit: float
    peak_field: float
    focus_f_number: float
    absolute: bool
    eo_delay: np.ndarray | None
    eo_signal: np.ndarray | None
    eo_normalisation: str


def real_waveform(frequency: np.ndarray, spectrum: np.ndarray,
                  padding: int = PADDING) -> tuple[np.ndarray, np.ndarray]:
    """Real signal x(t) = int X(nu) exp(-i 2 pi nu t) dnu, X(-nu) = X*(nu), on nu_m = m d_nu.

    Parameters
    ----------
    frequency : ndarray
        Equally spaced frequencies starting at 0. [Hz]
    spectrum : ndarray of complex
        X(nu_m). [unit s]
    padding : int
        The inverse FFT has at least ``padding`` x 2 len(frequency) points (band-limited
        interpolation), rounded up to a 5-smooth length
        (:func:`~hcfplan.numerics.grid.smooth_fft_size`).

    Returns
    -------
    (ndarray, ndarray)
        Time axis (window 1 / d_nu, centred on zero) and x(t). [s], [unit]

    References
    ----------
    None: inverse real FFT in the convention of :mod:`hcfplan.numerics.grid` (numerical helper).
    """
    frequency, spectrum = np.asarray(frequency, float), np.asarray(spectrum, complex)
    if frequency.size < 2 or frequency[0] != 0.0:
        raise ConfigError("real_waveform: frequencies must start at 0 with >= 2 samples")
    dnu = float(frequency[1] - frequency[0])
    n = smooth_fft_size(2 * padding * len(frequency))
    # numpy's irfft has exp(+i...) and 1/n: conj() gives exp(-i 2 pi nu t); n dnu gives dnu
    values = np.fft.irfft(np.conj(spectrum), n) * n * dnu
    time = (np.arange(n) - n // 2) / (n * dnu)
    return time, np.fft.fftshift(values)


def focus_factor(frequency: np.ndarray, beam_radius: float, f_number: float) -> np.ndarray:
    """On-axis spectral field at a diffraction-limited focus over that at the exit face.

    Parameters
    ----------
    frequency : ndarray
        THz frequencies. [Hz]
    beam_radius : float
        Pump 1/e^2 intensity radius on the crystal (the THz field follows the pump intensity,
        so its intensity has the 1/e^2 radius w / sqrt(2)). [m]
    f_number : float
        f-number f / D of the focusing optic. [-]

    Returns
    -------
    ndarray of complex
        -i w / (sqrt(2) w0(nu)) with w0 = 2 lambda F / pi (module docstring). [-]

    References
    ----------
    .. [3] A. E. Siegman, *Lasers*, 1986, ch. 17 [from memory]. Energy conservation per
       frequency and the Gouy phase: common practice, no source.
    """
    frequency = np.asarray(frequency, float)
    waist_inverse = np.pi * frequency / (2 * c * f_number)  # 1 / w0 = pi / (2 lambda F)
    return -1j * beam_radius / np.sqrt(2) * waist_inverse


def eo_retardation_factor(detector: CrystalTable, thickness: float,
                          probe_frequency: float) -> float | None:
    """omega_p n_p^3 r41 d / c: the phase retardation per unit effective THz field.

    Parameters
    ----------
    detector : CrystalTable
        Detection crystal (needs ``r41``).
    thickness : float
        Detector thickness d. [m]
    probe_frequency : float
        Mean probe frequency. [Hz]

    Returns
    -------
    float or None
        [rad m/V], ``None`` when the table gives no r41.

    References
    ----------
    .. [1] P. C. M. Planken et al., J. Opt. Soc. Am. B 18, 313 (2001) [from memory].
    """
    if detector.r41 is None:
        return None
    omega_p = 2 * np.pi * probe_frequency
    n_p = float(optical_index(detector, omega_p))
    return omega_p * n_p**3 * detector.r41 * thickness / c


def beyond_model_share(result) -> float:
    """Share of the generated THz energy above the crystal model's range (left out of the
    fields of :func:`thz_waveforms`). [-]

    References
    ----------
    None: trapezoidal integrals of the generated power spectrum (numerical measure).
    """
    power = np.abs(result.generated_field) ** 2
    total = np.trapezoid(power, result.frequency)
    beyond = np.trapezoid(np.where(result.frequency > result.model_limit, power, 0.0),
                          result.frequency)
    return float(beyond / total) if total > 0 else 0.0


def thz_waveforms(result, *, beam_radius: float | None, focus_f_number: float,
                  detector: CrystalTable | None = None,
                  detector_thickness: float | None = None) -> ThzWaveforms:
    """Fields in time, peak fields and the EO-sampled waveform of a THz estimate.

    Parameters
    ----------
    result : ThzResult
        From :func:`hcfplan.thz.generation.thz_estimate`.
    beam_radius : float or None
        Pump 1/e^2 radius on the crystal; ``None``: the reference case (1 mm^2 flat top, whose
        focus is taken for the radius sqrt(1 mm^2 / pi)). [m]
    focus_f_number : float
        f-number of the focusing optic. [-]
    detector : CrystalTable or None
        EO detection crystal (the one of ``result``'s set-up).
    detector_thickness : float or None
        Its thickness. [m]

    Returns
    -------
    ThzWaveforms

    References
    ----------
    .. [1] P. C. M. Planken et al., J. Opt. Soc. Am. B 18, 313 (2001) [from memory].
    .. [2] G. Gallot and D. Grischkowsky, J. Opt. Soc. Am. B 16, 1204 (1999) [from memory].
    """
    if not (np.isfinite(focus_f_number) and focus_f_number > 0):
        raise ConfigError(f"focus f-number = {focus_f_number}: must be > 0")
    absolute = result.field_scale is not None
    within = result.frequency <= result.model_limit  # the crystal model's stated range
    exit_spectrum = np.where(within, result.generated_field, 0.0) * (
        result.field_scale if absolute else 1.0)
    radius = beam_radius if absolute else float(np.sqrt(1e-6 / np.pi))
    time, exit_field = real_waveform(result.frequency, exit_spectrum)
    _, focus_field = real_waveform(
        result.frequency, exit_spectrum * focus_factor(result.frequency, radius, focus_f_number))
    shift = len(time) // 2 - int(np.argmax(np.abs(exit_field)))  # centre the exit field's peak
    exit_field, focus_field = np.roll(exit_field, shift), np.roll(focus_field, shift)
    delay = signal = None
    text = "no EO detector (thz.detector_crystal not given)"
    if result.detector_response is not None:
        _, signal = real_waveform(result.frequency, exit_spectrum * result.detector_response)
        signal, delay = np.roll(signal, shift), time
        factor = (None if detector is None or detector_thickness is None
                  else eo_retardation_factor(detector, detector_thickness,
                                             result.probe_frequency))
        where = ("the given beam" if absolute else
                 "the reference case d_eff = 1 pm/V, flat-top 1 mm^2 (no beam radius or d_eff)")
        if factor is None:
            signal = signal / np.max(np.abs(signal))
            text = "normalised to a peak of 1 (the detector table gives no r41)"
        else:
            signal = signal * factor
            text = (f"probe phase retardation Gamma in rad (omega_p n^3 r41 d / c times the "
                    f"effective field) for a probe at {result.probe_frequency * 1e-12:.4g} THz "
                    f"in {detector.name} {detector_thickness * 1e3:.3g} mm at the optimal "
                    f"orientation, the exit face imaged 1:1 onto it; fields for {where}")
    return ThzWaveforms(time, exit_field, focus_field, float(np.max(np.abs(exit_field))),
                        float(np.max(np.abs(focus_field))), float(focus_f_number), absolute,
                        delay, signal, text)
