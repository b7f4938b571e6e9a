"""Multimode capillary runs (``fiber.modes`` = N > 1): the Gaussian launch on EH11...EH1N,
the multimode GNLSE run, the compressed pulse of the whole beam, and their summary keys and
``fields.npz`` arrays.

What each part of a multimode result describes
----------------------------------------------
* The launch: the focused Gaussian beam (waist ``laser.beam_waist_um``, default the EH11
  coupling optimum) of energy ``laser.energy_uj`` is projected on the modes
  (:func:`hcfplan.fibers.capillary_modes.eh_launch_amplitudes`): A_m(t) = c_m A(t), with A(t) the
  input pulse carrying the whole ``laser.energy_uj``. What the N modes do not take,
  1 - sum c_m^2 (higher EH1m modes, light outside the core), is lost and reported
  (``input.lost_fraction``).
* The fiber: :func:`hcfplan.propagation.multimode.propagate_modes`. Its result's base fields
  (:class:`~hcfplan.propagation.result.PropagationResult`) hold the whole beam's energy, peak
  power and on-axis intensity along z, and the EH11 mode's fields.
* The compressor and the THz stage act on the EH11 part (the ``compressed.*`` and ``thz.*``
  keys, as for one mode): the near-Gaussian part of the beam that focuses to the spot the
  compressor, THz and limit models assume (after a spatial filter, or the centre of the far
  field). The same compressor setting (bounces, trim) applied to every mode gives the
  whole-beam pulse (``compressed.beam_*``): the power summed over the orthogonal modes, what a
  detector integrating the whole beam sees.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

#: EH11 energy fraction at the exit below which a run's verdict carries the caution
#: ``eh11_fraction_low``: more than a tenth of the exit energy in higher modes changes the
#: focus, the compressed pulse and the THz estimate noticeably (common practice, no source).
EH11_FRACTION_FLOOR = 0.9
#: What the top-level compressed and THz keys describe in a multimode run.
COMPRESSED_PART = ("EH11 mode (compressed.beam_*: the whole beam, power summed over the "
                   "modes)")


@dataclass(frozen=True, eq=False)
class ModeLaunch:
    """The Gaussian launch on EH11...EH1N."""

    amplitudes: np.ndarray  #: signed c_m, shape (N,) [1]
    beam_waist: float  #: 1/e^2 intensity radius of the launched beam [m]

    @property
    def fractions(self) -> np.ndarray:
        """Power fraction of the launched beam in each mode, c_m^2. [1]"""
        return self.amplitudes**2

    @property
    def lost_fraction(self) -> float:
        """Share of the launched beam outside the N modes, 1 - sum c_m^2. [1]"""
        return float(max(1.0 - np.sum(self.fractions), 0.0))


@dataclass(frozen=True, eq=False)
class BeamPulse:
    """The whole beam after the compressor chosen for the EH11 part."""

    fields_t: np.ndarray  #: (N, points) compressed envelope of each mode, losses applied [sqrt(W)]
    power_t: np.ndarray  #: sum over the modes of abs(A_m(t))^2 on the grid [W]
    fwhm: float  #: FWHM of the band-limited summed power [s]
    peak_power: float  #: its peak [W]
    energy: float  #: [J]


@dataclass(frozen=True, eq=False)
class ModeOutcome:
    """The multimode part of a chain result."""

    launch: ModeLaunch
    beam: BeamPulse | None  #: None without a compressed pulse


def exit_density(result) -> np.ndarray:
    """Spectral energy density at the fiber exit, FFT order [J/Hz]: the whole beam's (the
    modes' densities summed) for a multimode result, abs(field_out_spectrum)^2 otherwise."""
    modes = getattr(result, "mode_spectra_out", None)
    if modes is None:
        return np.abs(np.asarray(result.field_out_spectrum)) ** 2
    return np.sum(np.abs(np.asarray(modes)) ** 2, axis=0)


def is_multimode(config) -> bool:
    """Whether a config runs several capillary modes (``fiber.modes`` > 1)."""
    return getattr(config.fiber, "modes", 1) > 1


def mode_launch(config) -> ModeLaunch:
    """The projection of the config's Gaussian beam on EH11...EH1N (``fiber.modes``).

    References
    ----------
    R. L. Abrams, IEEE J. Quantum Electron. QE-8, 838 (1972) [from memory]; the overlap
    integrals of :func:`hcfplan.fibers.capillary_modes.eh_launch_amplitudes`.
    """
    from hcfplan.fibers.capillary_modes import eh_launch_amplitudes
    from hcfplan.planning.build import coupling

    _, waist, _ = coupling(config)
    return ModeLaunch(eh_launch_amplitudes(waist, config.fiber.core_radius, config.fiber.modes),
                      waist)


def run_modes(config, setup, grid, field0: np.ndarray, options, progress=None):
    """The multimode GNLSE run of a config.

    ``field0`` is the EH11 part of the launch (the input pulse at laser.energy x c_1^2, as a
    single-mode run launches it); mode m starts as (c_m / c_1) ``field0``. A gradient fill
    runs as the stretches of uniform fill of the single-mode run
    (:func:`hcfplan.planning.build.build_fill_segments`), each with its N modes.

    References
    ----------
    none: composition; the solver cites its sources in
    :mod:`hcfplan.propagation.multimode`.
    """
    from hcfplan.fibers.capillary_modes import mode_waveguides
    from hcfplan.planning.build import build_fill_segments
    from hcfplan.propagation.multimode import ModeSegment, propagate_modes

    count = config.fiber.modes
    launch = mode_launch(config)
    amplitudes = launch.amplitudes / launch.amplitudes[0]
    fields0 = amplitudes[:, None] * np.asarray(field0)[None, :]
    segments = build_fill_segments(config, setup.omega0)
    if segments is not None:
        segments = tuple(ModeSegment(s.start, s.end, mode_waveguides(s.waveguide, count), s.gas)
                         for s in segments)
    return propagate_modes(fields0, grid, mode_waveguides(setup.waveguide, count),
                           gas=setup.medium, options=options, progress=progress,
                           segments=segments)


# ---------------------------------------------------------------------------------------------
# the whole beam after the compressor


def compress_beam(config, grid, compression, mode_spectra: np.ndarray,
                  phase_of) -> BeamPulse:
    """Every mode through the compressor chosen for the EH11 part; the power summed.

    Parameters
    ----------
    config : PlanConfig
        The validated config (compressor, windows, mirror band).
    grid : Grid
        The grid of the run.
    compression : CompressionResult
        The EH11 part's compressor (:func:`hcfplan.planning.chain.compress_output`): its
        bounce count and trim insertion are applied to every mode.
    mode_spectra : ndarray, shape (N, points)
        Exit spectra of the modes, FFT order. [sqrt(J/Hz)]
    phase_of : callable
        ``phase_of(config, grid, bounces, insertion)``, the phase of the whole compressor
        (:func:`hcfplan.planning.chain.applied_phase`). [rad]

    Returns
    -------
    BeamPulse
        The modes are orthogonal, so the power a detector integrating the whole beam sees is
        the sum of the modes' powers; its FWHM and peak are measured on the band-limited
        interpolants (:mod:`hcfplan.pulse.bandlimited`).

    References
    ----------
    Orthogonality of the EH1m modes: E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech.
    J. 43, 1783 (1964). The compressor's phase: :mod:`hcfplan.compression.compressor`.
    """
    from hcfplan.compression.elements import band_from_wavelengths, clip_to_band
    from hcfplan.compression.losses import mirror_throughput
    from hcfplan.planning.hardware import exit_window_transmission

    comp = config.compressor
    band = None if comp.mirror_band is None else band_from_wavelengths(*comp.mirror_band)
    with np.errstate(invalid="ignore"):
        phase = phase_of(config, grid, compression.bounces, compression.trim_insertion)
    phase = np.where(np.isfinite(phase), phase, 0.0)  # nan only where no fit holds: no light
    throughput = exit_window_transmission(config) * mirror_throughput(
        comp.mirror_reflectivity, compression.bounces)
    fields = np.array([grid.to_time(clip_to_band(grid, spectrum, band)[0] * np.exp(1j * phase))
                       for spectrum in np.asarray(mode_spectra)]) * np.sqrt(throughput)
    fwhm, peak = _summed_fwhm_and_peak(grid, fields)
    power = np.sum(np.abs(fields) ** 2, axis=0)
    return BeamPulse(fields, power, fwhm, peak, float(np.sum(power) * grid.dt))


def _summed_fwhm_and_peak(grid, fields: np.ndarray) -> tuple[float, float]:
    """FWHM [s] and peak [W] of the summed band-limited power of ``fields`` (N, points)."""
    from hcfplan.pulse import bandlimited
    from hcfplan.pulse.metrics import fwhm, width_at_level

    power = np.sum(np.abs(fields) ** 2, axis=0)
    factor = bandlimited.oversampling_factor(fwhm(grid.time, power) / grid.dt)
    fine = np.zeros(grid.points * factor)
    for field in fields:
        fine += np.abs(bandlimited.upsample(field, factor)) ** 2
    time = grid.time[0] + np.arange(fine.size) * (grid.dt / factor)
    return float(width_at_level(time, fine, 0.5)), float(fine.max())


# ---------------------------------------------------------------------------------------------
# summary keys and arrays


def _fractions(values) -> list[float]:
    return [float(v) for v in values]


def mode_summary(chain) -> dict:
    """The flat summary keys of a multimode run (none for a single-mode run).

    ``fiber.modes``; ``input.mode_fractions`` (c_m^2 of the launched beam),
    ``input.lost_fraction`` (1 - sum c_m^2), ``input.launched_beam_energy_j`` (into all
    modes); ``output.mode_fractions`` and ``output.mode_energies_j`` (of the exit energy),
    ``output.eh11_fraction``, ``output.eh11_fraction_lowest`` (the lowest EH11 share of the
    beam energy along the fiber: the higher modes lose energy faster than EH11, so energy
    coupled out of EH11 inside the fiber can leave the exit share high); ``compressed.part``
    (what the compressed and THz keys describe)
    and ``compressed.beam_fwhm_s``, ``compressed.beam_peak_power_w``,
    ``compressed.beam_energy_j`` (the whole beam).
    """
    outcome: ModeOutcome | None = getattr(chain, "modes", None)
    if outcome is None:
        return {}
    prop, launch = chain.propagation, outcome.launch
    energies = np.asarray(prop.mode_energy_z)[-1]
    total = float(np.sum(energies))
    shares = energies / total if total > 0 else np.full(energies.shape, np.nan)
    out: dict[str, Any] = {
        "fiber.modes": int(len(launch.amplitudes)),
        "input.mode_fractions": _fractions(launch.fractions),
        "input.lost_fraction": launch.lost_fraction,
        "input.launched_beam_energy_j": float(chain.config.laser.energy
                                              * np.sum(launch.fractions)),
        "input.beam_waist_m": launch.beam_waist,
        "output.mode_fractions": _fractions(shares),
        "output.mode_energies_j": _fractions(energies),
        "output.eh11_fraction": float(shares[0]),
        "output.eh11_fraction_lowest": _lowest_share(prop.mode_energy_z),
    }
    if outcome.beam is not None:
        beam = outcome.beam
        out.update({"compressed.part": COMPRESSED_PART, "compressed.beam_fwhm_s": beam.fwhm,
                    "compressed.beam_peak_power_w": beam.peak_power,
                    "compressed.beam_energy_j": beam.energy})
    return out


def _lowest_share(mode_energy_z) -> float:
    """Lowest EH11 share of the beam energy over the records along z (the launch included). [1]"""
    energies = np.asarray(mode_energy_z, dtype=float)
    totals = np.sum(energies, axis=1)
    kept = totals > 0
    return float(np.min(energies[kept, 0] / totals[kept])) if np.any(kept) else float("nan")


def mode_arrays(chain) -> dict[str, np.ndarray]:
    """The ``fields.npz`` arrays of a multimode run (none for a single-mode run).

    ``mode_energy_z_j`` (len(z), N) energy per mode along z [J]; ``mode_field_out_spectrum``
    (N, points) complex exit spectra, FFT order [sqrt(J/Hz)]; ``mode_field_out_t`` (N, points)
    exit envelopes [sqrt(W)]; ``beam_spectrum_out`` the whole beam's exit spectral energy
    density, sum of abs()^2 over the modes [J/Hz]; ``mode_launch_amplitudes`` c_m [1];
    with a compressor ``beam_compressed_power_w``, the whole beam's compressed power [W].
    """
    outcome: ModeOutcome | None = getattr(chain, "modes", None)
    if outcome is None:
        return {}
    prop = chain.propagation
    spectra = np.asarray(prop.mode_spectra_out)
    arrays = {"mode_energy_z_j": np.asarray(prop.mode_energy_z),
              "mode_field_out_spectrum": spectra,
              "mode_field_out_t": np.asarray(prop.mode_fields_out_t),
              "beam_spectrum_out": np.sum(np.abs(spectra) ** 2, axis=0),
              "mode_launch_amplitudes": outcome.launch.amplitudes}
    if outcome.beam is not None:
        arrays["beam_compressed_power_w"] = outcome.beam.power_t
    return arrays


def mode_outcome(config, grid, result, compression, phase_of) -> ModeOutcome | None:
    """The :class:`ModeOutcome` of a run (None for a single-mode config or result);
    ``phase_of``: :func:`compress_beam`."""
    if not is_multimode(config) or getattr(result, "mode_spectra_out", None) is None:
        return None
    beam = None
    if compression is not None:
        beam = compress_beam(config, grid, compression, result.mode_spectra_out, phase_of)
    return ModeOutcome(mode_launch(config), beam)
