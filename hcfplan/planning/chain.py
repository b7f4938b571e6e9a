"""The full chain for one config: fiber (GNLSE) -> compressor -> THz, and its summary.

``run_chain`` composes the physics modules; it does no I/O. ``summary_dict`` and
``field_arrays`` turn a :class:`ChainResult` into the ``summary.json`` and ``fields.npz``
contents (SI values, unit in the key names).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from hcfplan.constants import P_1ATM, T_ROOM
from hcfplan.constants import c as C_LIGHT
from hcfplan.planning.validity import (
    collect_warnings,
    light_band,
    quiet_validity,
    quiet_validity_of_materials,
    range_notes,
)

#: Ambient air assumed for the compressor's air path (dry air at 1 atm and 20 degC).
AIR_PRESSURE = P_1ATM
AIR_TEMPERATURE = T_ROOM


@dataclass(frozen=True, eq=False)
class ChainResult:
    """Everything one run of the chain produced (SI)."""

    config: Any
    grid: Any
    waveguide: Any
    medium: Any
    coupling_efficiency: float
    launched_energy: float
    input_peak_power: float
    propagation: Any
    compression: Any | None
    thz: Any | None
    phase_matching: Any | None
    fiber_report: dict  #: the analytic first-look numbers (:func:`fiber_report`) of the config
    warnings: tuple[str, ...]
    #: the convergence checks of the run and the grid refinements made
    #: (:class:`hcfplan.planning.convergence.Convergence`)
    convergence: Any = None
    #: cascaded stages (:mod:`hcfplan.planning.stages`): the result of every stage run, in
    #: order; this result is then the final stage's. Empty for a single-stage run.
    stages: tuple = ()
    #: multimode runs (``fiber.modes`` > 1): the launch and the whole-beam compressed pulse
    #: (:class:`hcfplan.planning.mode_run.ModeOutcome`); None for one mode
    modes: Any = None


def _broadening_estimate(report: dict) -> float:
    """Expected output/input spectral width from the first-look SPM estimate (>= 1)."""
    factor = report.get("estimate.spm_broadening_factor") or 1.0
    return float(max(1.0, factor))


def _input_field(config, grid, energy: float, given=None):
    """The launched envelope on ``grid`` carrying ``energy``: ``given`` (an input field such
    as :class:`hcfplan.planning.stages.HandoverField`, with ``on_grid(grid, energy)``), else
    the input of ``[laser]`` (:func:`hcfplan.planning.input_field.input_field`)."""
    from hcfplan.planning.input_field import input_field

    return input_field(config, grid, energy, given)


def run_chain(config, *, progress: Callable[[float, float, int], None] | None = None,
              workers: int = 1, input_field=None) -> ChainResult:
    """Run fiber -> compressor -> THz for a validated :class:`~hcfplan.io.config.PlanConfig`.

    ``input_field`` replaces the pulse of ``[laser]`` at the fiber entrance (an object with
    ``on_grid(grid, energy)`` returning the envelope and ``band``, the angular frequencies
    the grid must hold, or None); its energy is ``laser.energy`` times the coupling
    efficiency. A config with cascaded stages (``config.stages``) runs them in order
    (:func:`hcfplan.planning.stages.run_stages`) and returns the final stage's result with
    ``stages`` holding every stage's.

    Material fits are evaluated over the whole (broad) grid; their per-call range warnings are
    replaced by one range check against the -40 dB extent of the output spectrum
    (:mod:`hcfplan.planning.validity`). Other warnings raised on the way are kept as lines.
    A grid the user did not fix is refined until the convergence checks pass
    (:mod:`hcfplan.planning.convergence`); ``convergence`` of the result holds the checks.
    """
    from hcfplan.planning.convergence import refine_until_converged

    if config.stages and input_field is None:
        from hcfplan.planning.stages import run_staged

        return run_staged(config, run_chain, progress=progress, workers=workers)
    caught: list[str] = []

    def run_once(grid):
        with collect_warnings() as lines, quiet_validity_of_materials():
            chain = _run_chain(config, progress, workers, grid, input_field)
        caught[:] = lines  # the warnings of the last run only
        return chain

    fixed = config.grid.points is not None or config.grid.time_window is not None
    chain, convergence = refine_until_converged(run_once, fixed)
    with collect_warnings() as lines, quiet_validity_of_materials():
        chain = _with_thz(config, chain)  # on the accepted grid only, not on each attempt
    caught += lines
    extra = _grid_notes(chain, caught)
    grid, prop = chain.grid, chain.propagation
    from hcfplan.planning.mode_run import exit_density

    band = light_band(grid.frequency, exit_density(prop))  # multimode: the whole beam
    notes = range_notes(config, chain.medium, band, "the output spectrum at -40 dB")
    merged = tuple(dict.fromkeys(list(chain.warnings) + notes + extra))
    return dataclasses.replace(chain, warnings=merged, convergence=convergence)


def _grid_notes(chain: ChainResult, caught: list[str]) -> list[str]:
    """Keep the grid-size notes that matter for this run.

    The grid is sized from a first-look broadening estimate; when that estimate reaches beyond
    the highest frequency a window may have, ``choose_grid`` says so. That note is dropped
    when the run itself found no energy at the window edges (the solver's edge warning then
    carries the remedy).
    """
    edge = any("frequency window" in w for w in chain.propagation.warnings)
    return [w for w in caught if edge or not w.startswith("grid: the expected spectrum")]


def _first_grid(config, report: dict, omega0: float, given=None):
    """The grid of a run's first attempt: the broadening estimate, the dispersive wave and
    the band and duration of a given input field (:func:`~hcfplan.planning.stages.held`)."""
    from hcfplan.numerics.grid import choose_grid
    from hcfplan.planning.convergence import dispersive_wave_band
    from hcfplan.planning.stages import held

    band, input_band = dispersive_wave_band(report, omega0), getattr(given, "band", None)
    if input_band is not None:
        band = input_band if band is None else (min(band[0], input_band[0]),
                                                max(band[1], input_band[1]))
    return held(config, given, choose_grid(
        omega0, config.laser.duration_fwhm, broadening_factor=_broadening_estimate(report),
        band=band, points=config.grid.points, time_window=config.grid.time_window,
        center=_center_omega(config.grid.center_wavelength)))


def _center_omega(wavelength: float | None) -> float | None:
    """Angular frequency of a vacuum wavelength [m], or None. [rad/s]"""
    return None if wavelength is None else 2 * math.pi * C_LIGHT / wavelength


def _run_chain(config, progress, workers, grid=None, input_field=None) -> ChainResult:
    from hcfplan.planning.fiber_run import fiber_setup, run_fiber
    from hcfplan.planning.reports.fiber import fiber_report
    from hcfplan.pulse.metrics import peak_power

    setup = fiber_setup(config)
    omega0, medium, waveguide = setup.omega0, setup.medium, setup.waveguide
    efficiency, energy = setup.efficiency, setup.energy
    report = fiber_report(config)
    if grid is None:
        grid = _first_grid(config, report, omega0, input_field)
    field0 = _input_field(config, grid, energy, input_field)
    peak_in = peak_power(field0)
    result = run_fiber(config, setup, grid, field0, rtol=config.grid.rtol,
                       z_samples=config.grid.z_samples, workers=workers, progress=progress)
    warnings = list(report["warnings"]) + list(result.warnings)
    compression = None
    if result.success:
        compression = compress_output(config, grid, result.field_out_spectrum, peak_in)
        warnings += _compression_warnings(compression)
    from hcfplan.planning.mode_run import mode_outcome

    return ChainResult(config=config, grid=grid, waveguide=waveguide, medium=medium,
                       coupling_efficiency=efficiency, launched_energy=energy,
                       input_peak_power=peak_in, propagation=result, compression=compression,
                       thz=None, phase_matching=None, fiber_report=report,
                       warnings=tuple(dict.fromkeys(warnings)),
                       modes=mode_outcome(config, grid, result, compression, applied_phase))


def _with_thz(config, chain: ChainResult) -> ChainResult:
    """``chain`` with its THz estimate and phase-matching map (none without a compressed
    pulse or a ``[thz]`` section); the THz warnings join the chain's."""
    if chain.compression is None:
        return chain
    thz = thz_output(config, chain.grid, chain.compression)
    if thz is None:
        return chain
    return dataclasses.replace(chain, thz=thz, phase_matching=phase_matching_output(config, thz),
                               warnings=tuple(dict.fromkeys(list(chain.warnings)
                                                            + list(thz.warnings))))


# ---------------------------------------------------------------------------------------------
# compressor


def _air_index(omega: np.ndarray) -> np.ndarray:
    """Lab air (Ciddor 1996 standard-air fit) at :data:`AIR_PRESSURE`, :data:`AIR_TEMPERATURE`."""
    from hcfplan.materials import gas_density, gases

    table = gases.load_gas_table("air")
    density = gas_density.number_density(table, AIR_PRESSURE, AIR_TEMPERATURE, eos="ideal")
    return gases.refractive_index(table, omega, density, fit="ciddor1996", eos="ideal")


def _material_index(name: str, omega: np.ndarray) -> np.ndarray:
    from hcfplan.materials import solids

    # the broadened grid extends beyond the Sellmeier ranges far outside the spectrum; the
    # ranges are checked against the light itself by range_notes; nan where a fit has no real
    # index (far infrared of a wide grid) is handled by material_phase
    with quiet_validity(), np.errstate(invalid="ignore"):
        return solids.refractive_index(name, omega)


def fixed_phase(config, grid) -> np.ndarray:
    """Phase of the exit window and the air path on the grid (grid.py convention 4). [rad]"""
    from hcfplan.compression.elements import material_phase

    omega = grid.omega
    phase = np.zeros_like(omega)
    cell = config.cell
    if cell.window_thickness:
        n = _material_index(cell.window_material, omega)
        phase += material_phase(omega, grid.omega_pump, n, cell.window_thickness)
    if config.compressor.air_path > 0:
        with quiet_validity():
            n_air = _air_index(omega)
        phase += material_phase(omega, grid.omega_pump, n_air, config.compressor.air_path)
    return phase


def _mirror_phase(config, grid) -> np.ndarray:
    from hcfplan.compression.elements import mirror_phase, phase_from_gdd_curve

    comp = config.compressor
    if comp.mirror_gdd_curve is not None:  # read while the config was loaded
        from hcfplan.constants import c

        wavelength, gdd_curve = comp.mirror_gdd_curve.wavelength, comp.mirror_gdd_curve.values
        omega_curve = 2 * math.pi * c / wavelength
        order = np.argsort(omega_curve)
        gdd = np.interp(grid.omega, omega_curve[order], gdd_curve[order])
        return phase_from_gdd_curve(grid.omega, grid.omega_pump, gdd)
    if comp.mirror_gdd is None:
        return np.zeros_like(grid.omega)
    return mirror_phase(grid.omega, grid.omega_pump, comp.mirror_gdd, comp.mirror_tod)


def applied_phase(config, grid, bounces: int, insertion: float) -> np.ndarray:
    """Phase of the whole compressor at a chosen setting: exit window, air path, ``bounces``
    chirped-mirror bounces and a trim ``insertion`` [m] of the wedge material. [rad]"""
    from hcfplan.compression.elements import material_phase

    phase = fixed_phase(config, grid) + bounces * _mirror_phase(config, grid)
    comp = config.compressor
    if insertion and comp.wedge_material is not None:
        n = _material_index(comp.wedge_material, grid.omega)
        phase = phase + material_phase(grid.omega, grid.omega_pump, n, insertion)
    return phase


def compress_output(config, grid, spectrum: np.ndarray, input_peak_power: float):
    """Best bounce count (and trim) for the fiber output, with the ideal references."""
    from hcfplan.compression.compressor import TrimSpec, optimize_bounces
    from hcfplan.compression.elements import band_from_wavelengths
    from hcfplan.planning.hardware import compressor_losses

    comp = config.compressor
    band = None if comp.mirror_band is None else band_from_wavelengths(*comp.mirror_band)
    trim = None
    if comp.wedge_material is not None and comp.wedge_max_insertion > 0:
        n = _material_index(comp.wedge_material, grid.omega)
        trim = TrimSpec.from_index(grid, n, 0.0, comp.wedge_max_insertion)
    has_mirrors = comp.mirror_gdd is not None or comp.mirror_gdd_curve is not None
    lossless = optimize_bounces(grid, spectrum, fixed_phase(config, grid),
                                _mirror_phase(config, grid),
                                max_bounces=comp.max_bounces if has_mirrors else 0,
                                in_pairs=comp.bounces_in_pairs, objective=comp.objective,
                                band=band, trim=trim, input_peak_power=input_peak_power)
    return compressor_losses(config, lossless)


#: Mirror-band loss above which the summary warns. [1]
BAND_LOSS_WARNING = 0.01


def _compression_warnings(comp) -> list[str]:
    out = [f"compressor: {note}" for note in comp.cautions]
    if comp.band_loss > BAND_LOSS_WARNING:
        out.append(f"compressor: {comp.band_loss:.1%} of the energy lies outside the mirror "
                   "band and is lost; clipped wings lengthen the pulse and cut peak power")
    return out


# ---------------------------------------------------------------------------------------------
# THz


def thz_output(config, grid, compression):
    """THz estimate from the compressed pulse (None when the config has no [thz] section)."""
    if "thz" not in config.present_sections:
        return None
    from hcfplan.planning.reports.thz import thz_setup
    from hcfplan.thz.generation import thz_estimate

    return thz_estimate(grid, compression.spectrum, thz_setup(config.thz, grid))


#: Pump-wavelength span (relative to the pump) and sample counts of the phase-matching map.
PM_MAP_WAVELENGTH_SPAN = (0.6, 1.6)
PM_MAP_POINTS = (60, 120)
#: The map spans THz frequencies up to this multiple of the spectral peak (at least 5 THz).
PM_MAP_PEAK_MULTIPLE = 3.0
PM_MAP_MIN_FREQUENCY = 5e12


def phase_matching_output(config, thz):
    """Coherence length of the generation crystal over pump wavelength and THz frequency (for
    a tilted front at the run's fixed tilt)."""
    from hcfplan.materials import crystals
    from hcfplan.thz.detection import phase_matching_map
    from hcfplan.thz.tilted import tilted_phase_matching_map

    lam0 = config.laser.wavelength
    wavelengths = np.linspace(PM_MAP_WAVELENGTH_SPAN[0] * lam0, PM_MAP_WAVELENGTH_SPAN[1] * lam0,
                              PM_MAP_POINTS[0])
    peak = thz.peak_frequency if thz.peak_frequency is not None else thz.model_limit
    f_max = max(min(2.0 * thz.cutoff_computed, PM_MAP_PEAK_MULTIPLE * peak), PM_MAP_MIN_FREQUENCY)
    frequency = np.linspace(f_max / PM_MAP_POINTS[1], f_max, PM_MAP_POINTS[1])
    crystal = crystals.load_crystal(config.thz.crystal, config.thz.table_dirs)
    if thz.geometry == "tilted_front" and thz.tilt_angle is not None:
        return tilted_phase_matching_map(crystal, wavelengths, frequency, thz.tilt_angle)
    return phase_matching_map(crystal, wavelengths, frequency)


# ---------------------------------------------------------------------------------------------
# summary and arrays


def _input_part(chain: ChainResult) -> dict:
    from hcfplan.pulse.metrics import envelope_fwhm

    grid, prop = chain.grid, chain.propagation
    return {
        "input.energy_j": chain.config.laser.energy,
        "input.launched_energy_j": chain.launched_energy,
        "input.coupling_efficiency": chain.coupling_efficiency,
        "input.peak_power_w": chain.input_peak_power,
        "input.fwhm_s": float(envelope_fwhm(grid, prop.field_in_t)),
    }


def _output_part(chain: ChainResult) -> dict:
    from hcfplan.pulse.metrics import peak_power, spectral_width, transform_limited_fwhm

    grid, prop = chain.grid, chain.propagation
    power = np.abs(prop.field_out_spectrum) ** 2
    return {
        "output.energy_j": float(prop.energy_z[-1]),
        "output.bandwidth_hz": float(spectral_width(grid.shifted(grid.frequency),
                                                    grid.shifted(power), -20.0)),
        "output.bandwidth_definition": "full width of the power spectrum at -20 dB of its peak",
        "output.transform_limit_fwhm_s": float(transform_limited_fwhm(
            grid, prop.field_out_spectrum)),
        "output.peak_power_w": peak_power(prop.field_out_t),
        "output.max_ionization_fraction": float(np.nanmax(prop.ionization_fraction_z)),
        "output.max_peak_intensity_w_per_m2": _finite_max(prop.peak_intensity_z),
        "output.max_peak_power_w": float(np.nanmax(prop.peak_power_z)),
    }


def _finite_max(values: np.ndarray) -> float | None:
    finite = np.asarray(values)[np.isfinite(values)]
    return float(finite.max()) if finite.size else None


def _fiber_part(chain: ChainResult, report: dict) -> dict:
    from hcfplan.planning.reports.fiber import fill_part

    prop = chain.propagation
    transmission = float(prop.energy_z[-1] / prop.energy_z[0]) if prop.energy_z[0] > 0 else 0.0
    return {
        **fill_part(chain.config.gas),
        "fiber.kind": chain.config.fiber.kind,
        "fiber.length_m": chain.config.fiber.length,
        "fiber.transmission": transmission,
        "fiber.linear_transmission": report["fiber.transmission"],
        "fiber.loss_model": report["fiber.loss_model"],
        "fiber.soliton_order": report["fiber.soliton_order"],
        "fiber.zdw_m": report["fiber.zdw_m"],
        "fiber.beta2_s2_per_m": report["fiber.beta2_s2_per_m"],
        "fiber.regime": report["fiber.regime"],
    }


def _compressed_part(comp) -> dict:
    if comp is None:
        return {}
    m = comp.metrics
    return {
        "compressed.fwhm_s": m.fwhm,
        "compressed.peak_power_w": m.peak_power,
        "compressed.energy_j": m.energy,
        "compressed.bounces": comp.bounces,
        "compressed.gdd_s2": comp.total_gdd,
        "compressed.tod_s3": comp.total_tod,
        "compressed.trim_insertion_m": comp.trim_insertion,
        "compressed.band_loss_fraction": comp.band_loss,
        "compressed.main_lobe_energy_fraction": m.main_lobe_fraction,
        "compressed.transform_limit_fwhm_s": m.transform_limited_fwhm,
        "compressed.peak_to_transform_limit": m.peak_to_transform_limit,
        "compressed.peak_power_gain": m.peak_power_gain,
        "compressed.pre_pulse_energy_j": m.pre_pulse_energy,
        "compressed.post_pulse_energy_j": m.post_pulse_energy,
        "compressed.best_quadratic_fwhm_s": comp.quadratic.metrics.fwhm,
        "compressed.best_quadratic_gdd_s2": comp.quadratic.total_gdd,
        "compressed.best_quadratic_cubic_fwhm_s": comp.quadratic_cubic.metrics.fwhm,
        "compressed.best_quadratic_cubic_peak_power_w": comp.quadratic_cubic.metrics.peak_power,
        "compressed.transform_limit_peak_power_w": comp.transform_limit.metrics.peak_power,
    }


def _thz_part(config, thz) -> dict:
    if thz is None:
        return {}
    out = {
        "thz.crystal": config.thz.crystal,
        "thz.thickness_m": config.thz.thickness,
        "thz.peak_hz": thz.peak_frequency,
        "thz.cutoff_hz": thz.cutoff,  # None beyond the crystal model's range
        "thz.cutoff_definition": thz.cutoff_definition,
        "thz.model_limit_hz": thz.model_limit,
        "thz.frequency_step_hz": thz.frequency_step,
        "thz.bandwidth_3db_hz": thz.bandwidth_3db,
        "thz.bandwidth_10db_hz": thz.bandwidth_10db,
        "thz.relative_efficiency": thz.relative_efficiency,
    }
    if thz.detected_power is not None:
        out["thz.detected_peak_hz"] = thz.detected_peak_frequency
        out["thz.detected_cutoff_hz"] = thz.detected_cutoff
    if thz.thz_energy is not None:
        out["thz.energy_estimate_j"] = thz.thz_energy
        out["thz.energy_estimate_caution"] = thz.thz_energy_caution
    from hcfplan.planning.reports.thz import chain_part

    out.update(chain_part(config, thz))  # geometry, absolute figures, crystal fluence limits
    return out


@dataclass(frozen=True)
class RunPeaks:
    """What the limits need from a GNLSE run (see :func:`limits_report`)."""

    max_peak_power: float  #: highest peak power along the fiber [W]
    max_peak_intensity: float | None  #: highest on-axis peak intensity [W/m^2]
    output_peak_power: float  #: peak power at the fiber exit [W]
    z: Any = None  #: record positions of the run [m] (the limits along a gradient)
    peak_power_z: Any = None  #: peak power at each record [W]
    output_energy: float | None = None  #: pulse energy at the fiber exit [J]
    compressed_energy: float | None = None  #: after the compressor and its losses [J]


def limits_part(chain: ChainResult) -> dict:
    """``limits.*`` of the run: the analytic checks plus the peaks reached inside the fiber."""
    from hcfplan.planning.reports.limits import limits_report
    from hcfplan.pulse.metrics import peak_power

    prop = chain.propagation
    peaks = RunPeaks(max_peak_power=float(np.nanmax(prop.peak_power_z)),
                     max_peak_intensity=_finite_max(prop.peak_intensity_z),
                     output_peak_power=peak_power(prop.field_out_t),
                     z=prop.z, peak_power_z=prop.peak_power_z,
                     output_energy=float(prop.energy_z[-1]),
                     compressed_energy=(None if chain.compression is None
                                        else chain.compression.metrics.energy))
    with quiet_validity_of_materials():
        return limits_report(chain.config, run=peaks)


def summary_dict(chain: ChainResult) -> dict:
    """The ``summary.json`` content (see the README's output reference)."""
    prop = chain.propagation
    report = chain.fiber_report
    summary: dict[str, Any] = {}
    summary.update(_input_part(chain))
    summary.update(_fiber_part(chain, report))
    summary.update(_output_part(chain))
    summary.update(_compressed_part(chain.compression))
    if chain.compression is not None:
        from hcfplan.planning.hardware import throughput_values

        summary.update(throughput_values(chain.config, chain.compression))
    summary.update(_thz_part(chain.config, chain.thz))
    summary.update(limits_part(chain))
    from hcfplan.planning.mode_run import mode_summary

    summary.update(mode_summary(chain))  # fiber.modes > 1 only
    summary.update({
        "solver.success": prop.success,
        "solver.status": prop.status,
        "solver.message": prop.message,
        "solver.steps": prop.n_steps,
        "solver.rejected_steps": prop.n_rejected,
        "solver.rhs_evaluations": prop.n_rhs_evals,
        "grid.points": chain.grid.points,
        "grid.time_window_s": chain.grid.time_window,
        "grid.dt_s": chain.grid.dt,
        **_grid_part(chain),
    })
    summary["warnings"] = list(chain.warnings)
    from hcfplan.planning.verdict import verdict_fields

    summary.update(verdict_fields(chain, summary))
    if chain.stages:  # stages.K.* of each stage (hcfplan.planning.stages)
        from hcfplan.planning.stages import stage_summaries

        return stage_summaries(chain, nest(summary), summary_dict)
    return nest(summary)


def _grid_part(chain: ChainResult) -> dict:
    grid, conv = chain.grid, chain.convergence
    out = {"grid.frequency_window_hz": [grid.omega_low / (2 * math.pi),
                                        grid.omega_high / (2 * math.pi)]}
    if conv is not None:
        out.update({"grid.refinements": conv.refinements,
                    "grid.refinement_reasons": list(conv.reasons),
                    "grid.converged": conv.converged,
                    "grid.checks": [check.as_dict() for check in conv.checks]})
    return out


def nest(flat: dict) -> dict:
    """``{"a.b": 1}`` -> ``{"a": {"b": 1}}`` (keys without a dot stay at the top)."""
    out: dict[str, Any] = {}
    for key, value in flat.items():
        head, _, tail = key.partition(".")
        if tail:
            out.setdefault(head, {})[tail] = value
        else:
            out[key] = value
    return out


def field_arrays(chain: ChainResult) -> dict[str, np.ndarray]:
    """The ``fields.npz`` content: grids, spectra along z, fields in and out, THz spectra."""
    grid, prop = chain.grid, chain.propagation
    arrays = {
        "frequency_hz": grid.frequency,
        "time_s": grid.time,
        "z_m": prop.z,
        "spectrum_z": prop.spectrum_z,
        "field_in_t": prop.field_in_t,
        "field_out_t": prop.field_out_t,
        "field_out_spectrum": prop.field_out_spectrum,
        "energy_z_j": prop.energy_z,
        "peak_intensity_z_w_per_m2": prop.peak_intensity_z,
        "ionization_fraction_z": prop.ionization_fraction_z,
        "bandwidth_z_hz": prop.bandwidth_z,
    }
    comp = chain.compression
    if comp is not None:
        arrays["field_compressed_t"] = comp.field_t
        arrays["field_transform_limit_t"] = comp.transform_limit.field_t
        arrays["residual_phase_rad"] = comp.residual_phase
        arrays["bounce_counts"] = comp.bounce_counts
        arrays["peak_power_vs_bounces_w"] = comp.peak_power_vs_bounces
    thz = chain.thz
    if thz is not None:
        arrays["thz_frequency_hz"] = thz.frequency
        arrays["thz_power_generated"] = thz.generated_power
        arrays["thz_power_detected"] = (thz.detected_power if thz.detected_power is not None
                                        else np.full_like(thz.frequency, np.nan))
        from hcfplan.planning.reports.thz import chain_arrays

        arrays.update(chain_arrays(chain.config, thz))  # E(t), the focus, the EO waveform
    from hcfplan.planning.mode_run import mode_arrays

    arrays.update(mode_arrays(chain))  # fiber.modes > 1 only
    if chain.stages:  # stage_K_* arrays of each stage (hcfplan.planning.stages)
        from hcfplan.planning.stages import stage_arrays

        arrays.update(stage_arrays(chain.stages))
    return arrays
