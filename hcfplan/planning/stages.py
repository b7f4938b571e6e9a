"""Cascaded stages: each stage's compressed pulse is the input of the next.

A config with ``[[stage]]`` tables (:mod:`hcfplan.io.stages`) holds one single-stage config
per stage. :func:`run_stages` runs them in order with a caller-given runner (the chain of
one stage, :func:`hcfplan.planning.chain.run_chain`), handing over between stages:

* **field**: stage k + 1 starts from stage k's compressed complex field, i.e. after its exit
  window, air path, chirped mirrors, band clipping and their losses
  (``CompressionResult.spectrum``), resampled onto stage k + 1's grid
  (:class:`HandoverField`); the grid of each stage is chosen for its own run as for any run;
* **energy**: stage k + 1's ``laser.energy`` is stage k's compressed energy; its coupling
  efficiency then takes its share, as for the first stage. The entrance window of stage
  k + 1 adds its dispersion; its reflection is not counted, as ``laser.energy_uj`` is the
  energy after the entrance window;
* **beam**: stage k + 1 is taken as refocused to its own coupling optimum (waist 0.64 a of its
  core); ``laser.beam_waist_um`` applies to the first stage only;
* **laser**: stage k + 1's laser spec takes the compressed FWHM as its duration (for the
  first-look estimates and the grid), no input chirp and no measured spectrum; the pump
  wavelength stays that of ``[laser]``.

THz is computed from the final stage only. The runner is passed in, so this module does not
import the chain (which calls it): imports flow one way.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from hcfplan.planning.verdict import STATUSES

#: Level below the spectral peak that bounds the band handed over to the next stage's grid
#: (the band the grid must hold; common practice, no source). [dB]
HANDOVER_BAND_DB = -40.0


@dataclass(frozen=True, eq=False)
class HandoverField:
    """A complex pulse given on absolute angular frequencies, put onto any grid.

    ``spectrum`` is the continuous spectral amplitude (grid.py convention 2 without the
    (-1)^j of a centred time axis) on ``omega``; :meth:`on_grid` interpolates its real and
    imaginary parts onto another grid's frequencies (zero outside) and rescales to the energy
    asked for, so the energy accounting of a hand-over is exact.
    """

    omega: np.ndarray  #: increasing absolute angular frequencies [rad/s]
    spectrum: np.ndarray  #: continuous complex spectral amplitude on ``omega`` [sqrt(J/Hz)]
    energy: float  #: energy of the pulse [J]
    band: tuple[float, float] | None  #: angular frequencies the next grid must hold [rad/s]
    time_window: float | None = None  #: shortest time window that holds the pulse [s]

    def on_grid(self, grid, energy: float) -> np.ndarray:
        """The envelope on ``grid`` (grid.py convention 1) carrying ``energy`` [J]."""
        sign = _centring_sign(grid.points)
        real = np.interp(grid.omega, self.omega, self.spectrum.real, left=0.0, right=0.0)
        imag = np.interp(grid.omega, self.omega, self.spectrum.imag, left=0.0, right=0.0)
        spectrum = (real + 1j * imag) * sign
        found = grid.energy_w(spectrum)
        if not found > 0:
            from hcfplan.errors import HcfplanError

            raise HcfplanError("stage hand-over: no light of the previous stage falls inside "
                               "the next stage's frequency window")
        return grid.to_time(spectrum * np.sqrt(energy / found))


def _centring_sign(points: int) -> np.ndarray:
    """(-1)^j in numpy FFT order: the factor between a centred grid's spectrum and the
    continuous transform (grid.py convention 2)."""
    j = np.fft.fftfreq(points, 1.0 / points).astype(int)
    return np.where(j % 2 == 0, 1.0, -1.0)


def handover_field(grid, spectrum: np.ndarray, energy: float) -> HandoverField:
    """The compressed pulse of a stage (``spectrum`` on ``grid``, FFT order) for the next one."""
    order = np.argsort(grid.omega)
    omega = np.asarray(grid.omega)[order]
    continuous = (np.asarray(spectrum) * _centring_sign(grid.points))[order]
    power = np.abs(continuous) ** 2
    lit = omega[power >= power.max() * 10 ** (HANDOVER_BAND_DB / 10)] if power.max() > 0 else []
    band = (float(lit[0]), float(lit[-1])) if len(lit) else None
    return HandoverField(omega=omega, spectrum=continuous, energy=float(energy), band=band,
                         time_window=_held_window(grid, grid.to_time(spectrum)))


#: Energy share a hand-over's time window may leave outside (both sides together), and the
#: margin on the span that holds the rest (common practice, no source). [1]
HANDOVER_TAIL_ENERGY = 1e-6
HANDOVER_WINDOW_MARGIN = 2.0


def _held_window(grid, field_t: np.ndarray) -> float | None:
    """Time window, centred on zero, that holds all but :data:`HANDOVER_TAIL_ENERGY` of the
    pulse, times :data:`HANDOVER_WINDOW_MARGIN`. [s]"""
    power = np.abs(field_t) ** 2
    total = power.sum()
    if not total > 0:
        return None
    cumulative = np.cumsum(power) / total
    t = np.asarray(grid.time)
    first = t[np.searchsorted(cumulative, HANDOVER_TAIL_ENERGY / 2)]
    last = t[min(np.searchsorted(cumulative, 1 - HANDOVER_TAIL_ENERGY / 2), t.size - 1)]
    return float(2 * max(abs(first), abs(last)) * HANDOVER_WINDOW_MARGIN)


def held(config, given, grid):
    """``grid``, lengthened (same step and centre, more points) to the time window a given
    input field needs (``given.time_window``), unless ``[grid]`` fixes the grid."""
    from hcfplan.numerics.grid import Grid, fft_friendly_size

    needed = getattr(given, "time_window", None)
    fixed = config.grid.points is not None or config.grid.time_window is not None
    if needed is None or fixed or needed <= grid.time_window:
        return grid
    points = fft_friendly_size(int(np.ceil(needed / grid.dt)))
    return Grid(points=points, dt=grid.dt, omega0=grid.omega0, omega_pump=grid.omega_pump)


def next_stage_config(config, previous) -> Any:
    """Stage config ``config`` with the laser spec of the pulse ``previous`` hands over.

    ``previous`` is the :class:`~hcfplan.planning.chain.ChainResult` of the stage before.
    """
    metrics = previous.compression.metrics
    laser = dataclasses.replace(config.laser, duration_fwhm=float(metrics.fwhm),
                                energy=float(metrics.energy), gdd=0.0, spectrum=None,
                                beam_waist=None)
    return dataclasses.replace(config, laser=laser)


def without_thz(config) -> Any:
    """``config`` without its ``[thz]`` section: THz comes from the final stage only."""
    present = tuple(s for s in config.present_sections if s != "thz")
    return dataclasses.replace(config, present_sections=present)


def run_stages(config, run_one: Callable[..., Any], *, progress=None,
               workers: int = 1) -> tuple[Any, ...]:
    """Run the stages of a ``[[stage]]`` config in order; return their chain results.

    Parameters
    ----------
    config : PlanConfig
        A staged config (``config.stages`` not empty).
    run_one : callable
        ``run_one(stage_config, input_field=..., progress=..., workers=...)`` runs one stage
        (:func:`hcfplan.planning.chain.run_chain`); ``input_field`` is None for the first stage
        and a :class:`HandoverField` after it.

    Returns
    -------
    tuple of ChainResult
        One per stage run. A stage whose fiber run stopped, or that has no compressed pulse,
        ends the cascade: the later stages are not run and the tuple is shorter.
    """
    results: list[Any] = []
    last = len(config.stages) - 1
    for index, stage in enumerate(config.stages):
        field = None
        if results:
            previous = results[-1]
            stage = next_stage_config(stage, previous)
            comp = previous.compression
            field = handover_field(previous.grid, comp.spectrum, comp.metrics.energy)
        if index != last:
            stage = without_thz(stage)
        chain = run_one(stage, input_field=field, progress=progress, workers=workers)
        results.append(chain)
        if not chain.propagation.success or chain.compression is None:
            break
    return tuple(results)


def handover_part(stages: tuple[Any, ...]) -> dict:
    """``handover.*`` of stage k + 1: the energy the previous stage gave and what was launched.

    The launched energy is the compressed energy of stage k times the coupling efficiency of
    stage k + 1 (:func:`hcfplan.planning.build.coupling`); ``handover.loss_fraction`` is the
    coupling loss, the only loss counted at a hand-over.
    """
    out = []
    for previous, chain in zip(stages[:-1], stages[1:], strict=True):
        given = float(previous.compression.metrics.energy)
        out.append({"handover.energy_in_j": given,
                    "handover.launched_energy_j": float(chain.launched_energy),
                    "handover.loss_fraction": 1.0 - float(chain.coupling_efficiency),
                    "handover.beam": "refocused to the coupling optimum (0.64 a)"})
    return {index + 1: part for index, part in enumerate(out)}


def run_staged(config, run_one: Callable[..., Any], *, progress=None, workers: int = 1):
    """:func:`run_stages`, returned as the final stage's result carrying the whole config (its
    ``resolved``, ``stages`` and overrides) and, in ``stages``, every stage's result."""
    results = run_stages(config, run_one, progress=progress, workers=workers)
    final = results[-1]
    whole = dataclasses.replace(final.config, resolved=config.resolved, stages=config.stages,
                                overrides=config.overrides)
    notes = list(final.warnings)
    if len(results) < len(config.stages):
        notes.append(f"stages: the cascade stopped after stage {len(results) - 1} (its fiber "
                     f"run did not finish); stages {len(results)} to {len(config.stages) - 1} "
                     "were not run and the results shown are those of the last stage run")
    return dataclasses.replace(final, config=whole, stages=results, warnings=tuple(notes))


def stage_summaries(chain, summary: dict, summarize: Callable[[Any], dict]) -> dict:
    """The nested ``summary`` of a staged run's final stage with ``stages`` added.

    ``stages`` maps ``"0"``, ``"1"``, ... to the summary of each stage (``summarize``, i.e.
    :func:`hcfplan.planning.chain.summary_dict` of the stage) and, from stage 1 on, its
    ``handover``. The top-level keys stay the final stage's; the top-level verdict takes the
    worst status of all stages and lists the earlier stages' reasons too (prefixed with their
    stage), and their warnings join the top-level warnings the same way.
    """
    handover = handover_part(chain.stages)
    stages: dict[str, dict] = {}
    for index, stage in enumerate(chain.stages):
        part = summarize(stage)
        if index in handover:
            part["handover"] = {k.partition(".")[2]: v for k, v in handover[index].items()}
        stages[str(index)] = part
    out = dict(summary)
    out["stages"] = stages
    out["stages_run"] = len(chain.stages)
    out["stages_configured"] = len(chain.config.stages)
    verdict = dict(out.get("verdict", {}))
    reasons = list(verdict.get("reasons", []))
    warnings = list(out.get("warnings", []))
    earlier = [(k, stages[str(k)]) for k in range(len(chain.stages) - 1)]
    for index, part in earlier:
        reasons += [{**r, "message": f"stage {index}: {r.get('message', '')}"}
                    for r in part.get("verdict", {}).get("reasons", [])]
        warnings += [f"stage {index}: {w}" for w in part.get("warnings", [])]
    statuses = [verdict.get("status", "valid")] + [p.get("verdict", {}).get("status", "valid")
                                                   for _, p in earlier]
    verdict["status"] = max(statuses, key=STATUSES.index)
    verdict["reasons"] = reasons
    out["verdict"] = verdict
    out["warnings"] = list(dict.fromkeys(warnings))
    return out


def stage_arrays(stages: tuple[Any, ...]) -> dict[str, np.ndarray]:
    """``stage_K_*`` arrays of ``fields.npz``: each stage's grid, output spectrum and
    compressed pulse."""
    arrays: dict[str, np.ndarray] = {}
    for index, chain in enumerate(stages):
        prefix = f"stage_{index}_"
        arrays[prefix + "frequency_hz"] = chain.grid.frequency
        arrays[prefix + "time_s"] = chain.grid.time
        arrays[prefix + "field_in_t"] = chain.propagation.field_in_t
        arrays[prefix + "field_out_spectrum"] = chain.propagation.field_out_spectrum
        if chain.compression is not None:
            arrays[prefix + "field_compressed_t"] = chain.compression.field_t
    return arrays
