"""Multimode propagation in a gas-filled capillary: :func:`propagate_modes`.

The radially symmetric hybrid modes EH11..EH1N of a capillary (linear polarisation, profiles
J0(u_1m r/a) of Marcatili & Schmeltzer [2]) are propagated together with the multimode GNLSE of
Poletti & Horak [1]: each mode has its own beta(omega) and alpha(omega) (from its
``CapillaryFiber(mode=(1, m))``), and the Kerr, Raman and plasma terms couple them through the
field on a radial grid (:mod:`.multimode_terms`, which explains the choice of that grid over
the overlap tensor and of the quadrature). The photoionisation acts on the local intensity
|E(r, t)|^2 at each node, so the plasma is strongest on axis.

The N spectra are stacked into one flat state, so the solver's interaction-picture steppers
(:mod:`.steppers`), step control and stepping loop (:func:`~.solve.run_stepping`, with its
faults: non-finite field, step collapse, step budget, ionisation stop) are the single-mode ones;
only the terms and the recorder are specific. The local error is measured over all modes
together (relative L2 norm: relative to the whole beam). The N spectra are transformed together,
as one planned multi-transform (:mod:`.multimode_fft`, the back end of ``options.fft_backend``).

Cost: besides N times the transforms and the plasma at every radial node, the step has to
follow the beat of the modes: the coupling terms oscillate as exp(i (beta_1m - beta_1n) z) in
the interaction picture, so a run takes about 15-20 steps per beat length 2 pi / (beta11 -
beta12) (e.g. 2.8 times the steps of one mode on the demo capillary config, where the beat
length is 6 cm in 1 m; 2.1 times with EH11 alone at the input, whose Kerr effect drives
EH12..EH1N at their own beats). That is set by the tolerance: the local error of those steps
lies mostly in the small EH12..EH14 parts (95 % of the error norm at N = 4), which the relative
L2 norm weighs as errors of the whole beam, as it should, while the single-mode run of that
config takes one step per record interval (its tolerance would allow longer ones). The run
therefore costs at least (steps ratio) x N single-mode runs (N times the transforms per
evaluation): about 11x for N = 4 there. ``bench/multimode.py`` measures the ratios and prints
this floor.

References
----------
.. [1] F. Poletti and P. Horak, "Description of ultrashort pulse propagation in multimode
       optical fibers," J. Opt. Soc. Am. B, vol. 25, no. 10, pp. 1645-1654, 2008,
       doi:10.1364/JOSAB.25.001645.
.. [2] E. A. J. Marcatili, R. A. Schmeltzer, "Hollow metallic and dielectric waveguides for
       long distance optical transmission and lasers," Bell Syst. Tech. J. 43, 1783-1809
       (1964), doi:10.1002/j.1538-7305.1964.tb04108.x.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.fibers.base import Waveguide
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.ionizing import ionizing_gas
from hcfplan.propagation.multimode_record import ModeRecorder
from hcfplan.propagation.multimode_terms import (
    PLASMA_PROFILES,
    ModeCoupling,
    mode_linear_terms,
)
from hcfplan.propagation.operators import delayed_response
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.result import PropagationResult
from hcfplan.propagation.solve import (
    DEFAULT_OPTIONS,
    INVALID_BAND_LIMIT,
    RunSettings,
    Stages,
    check_stretches,
    run_stepping,
)


@dataclass(frozen=True)
class ModeSegment:
    """One stretch of uniform fill of a gradient (``start`` to ``end`` [m]) for the multimode
    solver: the N waveguides EH11..EH1N of that stretch (dispersion, loss, Kerr) and its gas
    (Raman, ionisation)."""

    start: float  #: [m]
    end: float  #: [m]
    waveguide: tuple  #: the N mode waveguides of the stretch
    gas: object


@dataclass(frozen=True)
class MultimodeResult(PropagationResult):
    """Outcome of :func:`propagate_modes`: a :class:`~.result.PropagationResult` whose fields
    are those of the whole beam, except ``field_in_t``, ``field_out_t`` and
    ``field_out_spectrum``, which are the EH11 (first) mode's; plus the per-mode records.

    Attributes
    ----------
    spectrum_z : ndarray of float32, shape (len(z), points)
        Whole-beam spectral energy density, sum over the modes of |A~_m|^2. [J/Hz]
    peak_power_z : ndarray
        max over t of sum_m |A_m(t)|^2 (band-limited: each mode upsampled). [W]
    peak_intensity_z : ndarray
        max over t of |sum_m A_m(t) F_m(0)|^2, the on-axis intensity. [W/m^2]
    ionization_fraction_z : ndarray
        On axis (where it is largest). [1]
    electron_line_density_z : ndarray
        Integral of the electron density over the core cross-section. [1/m]
    mode_eigenvalues : ndarray, shape (N,)
        u_1m of the modes. [1]
    mode_energy_z : ndarray, shape (len(z), N)
        Energy per mode along z. [J]
    mode_spectra_out : ndarray of complex, shape (N, points)
        Exit grid spectra per mode, FFT order. [sqrt(J/Hz)]
    mode_fields_out_t : ndarray of complex, shape (N, points)
        Exit envelopes per mode. [sqrt(W)]
    mode_spectrum_z : ndarray of float32, shape (len(z), N, points), or None
        Spectral density per mode along z (only with ``mode_spectra_z=True``). [J/Hz]
    """

    mode_eigenvalues: np.ndarray = None
    mode_energy_z: np.ndarray = None
    mode_spectra_out: np.ndarray = None
    mode_fields_out_t: np.ndarray = None
    mode_spectrum_z: np.ndarray | None = None


def _check_number_of(waveguides) -> tuple:
    guides = tuple(waveguides) if isinstance(waveguides, Sequence) else ()
    if not guides:
        raise ConfigError("waveguides: must be a non-empty sequence of the N mode waveguides")
    for wg in guides:
        if not isinstance(wg, Waveguide):
            raise ConfigError(f"waveguides: {type(wg).__name__} lacks the Waveguide interface")
        if not (hasattr(wg, "core_radius") and hasattr(wg, "u")):
            raise ConfigError(f"waveguides: {type(wg).__name__} has no core_radius and u "
                              "(capillary modes EH1m are needed)")
    first = guides[0]
    length = first.length
    if isinstance(length, bool) or not (isinstance(length, (int, float))
                                        and math.isfinite(length) and length > 0):
        raise ConfigError(f"waveguides[0].length = {length!r} m: must be finite and > 0")
    for m, wg in enumerate(guides[1:], start=2):
        if not (math.isclose(wg.length, length, rel_tol=1e-12)
                and math.isclose(wg.core_radius, first.core_radius, rel_tol=1e-12)):
            raise ConfigError(f"waveguides[{m - 1}]: length and core_radius must be those of "
                              "waveguides[0] (one capillary)")
    u = [float(wg.u) for wg in guides]
    if len(set(u)) != len(u):
        raise ConfigError(f"waveguides: the mode eigenvalues {u} must be distinct")
    return guides


def _check_fields(fields0, grid, modes: int) -> np.ndarray:
    if not isinstance(grid, Grid):
        raise ConfigError(f"grid = {type(grid).__name__}: must be a hcfplan.numerics.grid.Grid")
    fields = np.asarray(fields0)
    if fields.shape != (modes, grid.points):
        raise ConfigError(f"fields0 shape = {fields.shape}: must be ({modes}, {grid.points}), "
                          "one envelope per waveguide")
    if not np.all(np.isfinite(fields)) or not np.any(fields != 0):
        raise ConfigError("fields0: must be finite and not all zero")
    return fields.astype(complex)


def _check_segments(segments, length: float, modes: int):
    segments = check_stretches(segments, length, ModeSegment)
    for s in segments or ():
        guides = _check_number_of(s.waveguide)
        if len(guides) != modes:
            raise ConfigError(f"segments: every stretch needs {modes} mode waveguides")
    return segments


def _builder(plasma_profile: str):
    """build(grid, waveguides, gas, options, length) for :class:`~.solve.Stages`."""

    def build(grid, waveguides, gas, options: SolverOptions, length: float):
        first = waveguides[0]
        lin = mode_linear_terms(grid, waveguides, length)
        f_inst, response, notes = delayed_response(grid, first, gas)
        plasma = ionizing_gas(grid, first, gas, options.ionization_model)
        n2 = float(getattr(first, "kerr_n2", 0.0) or 0.0)
        nonlinear = ModeCoupling(grid, n2, lin.valid, float(first.core_radius),
                                 [float(wg.u) for wg in waveguides], f_inst, response,
                                 plasma.species, options.workers, plasma_profile,
                                 options.fft_backend)
        return lin, nonlinear, notes + list(plasma.notes)

    return build


def propagate_modes(
    fields0: np.ndarray,
    grid: Grid,
    waveguides: Sequence,
    *,
    gas=None,
    options: SolverOptions | None = None,
    progress=None,
    segments=None,
    mode_spectra_z: bool = False,
    plasma_profile: str = "radial",
) -> MultimodeResult:
    """Propagate N capillary modes together (multimode GNLSE of Poletti & Horak [1]).

    Parameters
    ----------
    fields0 : ndarray of complex, shape (N, grid.points)
        Input envelopes A_m(t) on ``grid.time``; |A_m|^2 is the power in mode m. [sqrt(W)]
    grid : Grid
        Time/frequency grid.
    waveguides : sequence of CapillaryFiber
        The N modes EH11..EH1N of one capillary (e.g. ``[dataclasses.replace(fiber,
        mode=(1, m)) for m in 1..N]``); each gives beta, alpha, ``core_radius``, ``u``,
        ``length`` and ``kerr_n2``. The first sets the moving frame (group velocity at the
        pump) and the Kerr coefficient.
    gas : GasMedium, optional
        The fill, for photoionisation and rotational Raman, as in
        :func:`~.solve.propagate`.
    options : SolverOptions, optional
        As in :func:`~.solve.propagate`.
    progress : callable, optional
        Called as ``progress(z, length, n_steps)`` after every accepted step.
    segments : sequence of ModeSegment, optional
        A gradient fill: consecutive stretches from 0 to the length, each with its own N
        waveguides and gas (:class:`ModeSegment`; from the single-mode
        :class:`~.solve.FillSegment` s of a fill profile: ``ModeSegment(s.start, s.end,
        tuple(dataclasses.replace(s.waveguide, mode=(1, m)) for m in 1..N), s.gas)``). None:
        one uniform fill.
    mode_spectra_z : bool
        Also keep the spectrum of every mode at every record (``mode_spectrum_z``; N times the
        memory of ``spectrum_z``).
    plasma_profile : {"radial", "on_axis"}
        "radial": the plasma from the local intensity at every radial node (the model of this
        module). "on_axis": the single-mode approximation of :mod:`.operators` (rho from the
        on-axis intensity acting on the whole beam), for comparison with
        :func:`~.solve.propagate`.

    Returns
    -------
    MultimodeResult

    Raises
    ------
    ConfigError
        For invalid inputs (checked before any work starts).

    References
    ----------
    .. [1] F. Poletti and P. Horak, J. Opt. Soc. Am. B 25, 1645 (2008).
    .. [2] E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    Steppers: J. Hult, J. Lightwave Technol. 25, 3770 (2007); S. Balac and F. Mahé, Comput.
    Phys. Commun. 184, 1211 (2013).
    """
    options = DEFAULT_OPTIONS if options is None else options
    if not isinstance(options, SolverOptions):
        raise ConfigError(f"options = {type(options).__name__}: must be a "
                          "hcfplan.propagation.options.SolverOptions")
    if progress is not None and not callable(progress):
        raise ConfigError("progress: must be a callable progress(z, length, n_steps) or None")
    if plasma_profile not in PLASMA_PROFILES:
        raise ConfigError(f"plasma_profile = {plasma_profile!r}: allowed are "
                          f"{list(PLASMA_PROFILES)}")
    guides = _check_number_of(waveguides)
    modes, length = len(guides), float(guides[0].length)
    fields = _check_fields(fields0, grid, modes)
    segments = _check_segments(segments, length, modes)
    if segments is None:
        segments = (ModeSegment(0.0, length, guides, gas),)
    stages = Stages(grid, segments, options, length, build=_builder(plasma_profile))
    valid = stages.lin.valid
    u0 = np.array([grid.to_spectrum(f) for f in fields])
    total = float(np.sum(np.abs(u0) ** 2))
    removed = float(np.sum(np.abs(np.where(valid, 0, u0)) ** 2)) / total
    if removed > INVALID_BAND_LIMIT:
        stages.notes.append(f"{removed:.2e} of the input energy lies where the waveguide models "
                            "give no valid beta/alpha and was removed")
    u0 = np.where(valid, u0, 0).reshape(-1)
    stages.atol = options.absolute_tolerance(float(np.max(np.abs(u0))))
    nonlinear = stages.nonlinear
    recorder = ModeRecorder(grid, options.z_samples + 1, nonlinear, guides[0],
                            keep_mode_spectra=mode_spectra_z)
    state, counters, status, message = run_stepping(u0, length, stages, recorder,
                                                    RunSettings(options, progress))
    spectra = state.u.reshape(modes, grid.points).copy()
    fields_out = np.array([grid.to_time(s) for s in spectra])
    return MultimodeResult(
        grid=grid,
        **recorder.arrays(),
        field_in_t=fields[0].copy(),
        field_out_t=fields_out[0].copy(),
        field_out_spectrum=spectra[0].copy(),
        status=status,
        message=message,
        success=status == "completed",
        n_steps=counters.n_steps,
        n_rejected=counters.n_rejected,
        n_rhs_evals=stages.n_rhs_evals,
        warnings=tuple(stages.notes + recorder.edge_warnings()),
        **recorder.edge_fractions(),
        mode_eigenvalues=np.array([float(wg.u) for wg in guides]),
        mode_spectra_out=spectra,
        mode_fields_out_t=fields_out,
        **recorder.mode_arrays(),
    )
