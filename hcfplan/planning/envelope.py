"""Operating envelope: an energy x pressure map of the analytic limits and first estimates.

No GNLSE run here: every line and contour is a closed-form estimate, vectorised over the map
(:mod:`hcfplan.planning.envelope_check` compares the duration and THz contours with the real
chain at a few points). The
pressure axis needs one real-gas density per pressure (CoolProp) and one beta2 per pressure;
the ionisation rate is tabulated once. A 100 x 100 map takes well under a second
(``bench/envelope.py``).

Contents (:class:`EnvelopeResult`, SI): the self-focusing line (largest input energy at which
P_cr / P equals the required margin ``limits.self_focusing_margin``, vs pressure; margins as in
:mod:`hcfplan.limits.margins`), the ionisation line (input energy at which the PPT fraction
reaches the limit; the fraction per atom does not depend on density, so this line is flat), the
cell rating, beta2 at the pump vs pressure and the zero-dispersion pressure, and on the full map
the soliton order, the SPM-only estimate of the compressed duration (input transform limit /
SPM broadening factor, Pinault-Potasek estimate, dispersion neglected) and the thin-crystal THz
cutoff of that duration (:func:`thz_cutoff_gaussian_estimate`). Both contours are labelled
``ESTIMATE_KIND`` wherever they are shown: soliton self-compression, wave breaking, plasma and
the crystal's phase matching can move the real values far from them. The THz cutoff is a
cutoff only within the crystal model's range (``thz_model_limit``: the generation and detection
crystal tables' stated THz validity, as :func:`hcfplan.thz.measures.model_limit`); above it an
estimate is reported as "above the model's range (> X THz)"
(:func:`hcfplan.planning.thz_range.estimate_cutoff_text`), null in the JSON, and not drawn as a
contour.

Gradient fills (``gas.entrance_pressure_bar`` -> ``gas.exit_pressure_bar``): the pressure axis
is the exit pressure, the entrance pressure staying as configured. At each axis value the
first-look estimates (beta2, soliton order, duration, THz) are those of the profile's mean
pressure (:func:`hcfplan.propagation.profile.mean_pressure`), the self-focusing line that of the
highest pressure in the fiber, and the zero-dispersion pressure is the exit pressure at which
beta2 at the mean pressure changes sign.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.planning.build import (
    build_medium,
    build_waveguide,
    coupling,
    pump_omega,
    rate_model,
)
from hcfplan.planning.reports.limits_gas import (
    PRESSURE_SEARCH_MAX,
    RATE_TABLE_RANGE,
    ScaledGas,
    condensation_ceiling,
    gas_density_at,
    weighted_rates,
)
from hcfplan.planning.thz_range import beyond_model_text, within_model
from hcfplan.planning.validity import quiet_validity

#: Default energy axis: this range around the configured energy, log-spaced.
ENERGY_SPAN = (0.05, 5.0)
#: Default pressure axis: from this fraction of the configured pressure ...
PRESSURE_LOW = 0.05
#: ... up to the smallest of 3x configured, 1.2x the cell rating and the condensation ceiling.
PRESSURE_HIGH = 3.0
RATING_OVERSHOOT = 1.2
#: Fixed relative half-width of the Chebyshev stencil for beta2 along the pressure axis (the
#: adaptive rule costs 16 times more; at 1e-2 beta2 agrees with it to < 1e-3 relative for the
#: demo capillary and < 1e-5 for the anti-resonant fiber, away from resonances).
BETA2_REL_WIDTH = 1e-2
#: Chebyshev nodes at which a mixture's density is evaluated along the pressure axis.
MIXTURE_NODES = 16
__all__ = ["ESTIMATE_KIND", "ESTIMATE_NOTE", "TILTED_FRONT_NOTE", "EnvelopeResult",
           "envelope_json", "envelope_map", "thz_cutoff_gaussian_estimate", "thz_model_range"]
#: What the duration and THz contours are (JSON ``envelope.estimate_kind``).
ESTIMATE_KIND = "spm_only"
ESTIMATE_NOTE = ("SPM-only estimates: compressed duration = input FWHM / SPM broadening factor "
                 "(Gaussian rms estimate; dispersion, soliton dynamics, self-steepening and "
                 "plasma neglected; floored at one optical cycle); THz cutoff = that of a "
                 "perfectly compressed Gaussian of this duration in a thin crystal (no phase "
                 "mismatch, no phonon band, no detector)")

#: Said of the THz contours when ``thz.geometry = "tilted_front"`` (JSON ``envelope.notes``,
#: the figure's legend): the thin-crystal estimate has no geometry.
TILTED_FRONT_NOTE = ("thz.geometry = tilted_front: the THz contours are the thin-crystal "
                     "estimate, which has no geometry; the tilt, the interaction length across "
                     "the pump beam and the crystal's THz absorption that set a tilted front's "
                     "cutoff are not in them (simulate gives the tilted-front estimate)")


def thz_cutoff_gaussian_estimate(duration_fwhm, level_db: float = -20.0,
                                 quantity: str = "power"):
    """Cutoff frequency of optical rectification of a Gaussian pulse in a thin crystal.

    Parameters
    ----------
    duration_fwhm : float or ndarray
        Intensity FWHM tau of the (compressed) pump pulse. [s]
    level_db : float
        Share of the THz energy above the cutoff (< 0), as in
        :func:`hcfplan.thz.measures.thz_cutoff`. [dB]
    quantity : {"power", "field"}
        Spectrum whose integral the cutoff divides, as in
        :func:`hcfplan.thz.measures.thz_cutoff`.

    Returns
    -------
    float or ndarray
        The cutoff of the thin-crystal spectrum, by the definition of the chain's THz
        estimate. [Hz]

    Notes
    -----
    In a crystal much thinner than the coherence length, without absorption or dispersion, the
    radiated field is proportional to dI/dt, so the power spectrum is
    :math:`S(\\Omega) \\propto \\Omega^2 \\exp(-\\Omega^2\\tau^2/(8\\ln 2))`; its cutoff
    follows from the incomplete gamma function
    (:func:`hcfplan.thz.measures.gaussian_pulse_cutoff`); for -20 dB of the energy
    f = 0.8926 / tau. An optimistic estimate: a perfectly compressed pulse, no phase mismatch,
    no phonon band (GaP 11 THz, ZnTe 5.3 THz), no detector response.

    References
    ----------
    None: Gaussian integrals of a thin-crystal spectrum (common practice, no source).
    """
    from hcfplan.thz.measures import gaussian_pulse_cutoff

    return gaussian_pulse_cutoff(duration_fwhm, level_db, quantity)


@dataclass(frozen=True, eq=False)
class EnvelopeResult:
    """Energy x pressure map (arrays read-only; 2-D arrays have shape (energies, pressures)).

    Energies are the pulse energy before coupling [J]; pressures absolute fill pressures [Pa].
    ``zero_dispersion_pressure`` is nan if beta2 keeps its sign over the axis;
    ``rated_pressure`` is None if no rating was configured.
    """

    energies: np.ndarray  #: (nE,) [J]
    pressures: np.ndarray  #: (nP,) [Pa]
    self_focusing_max_energy: np.ndarray  #: (nP,) [J]
    ionization_max_energy: np.ndarray  #: (nP,) [J]
    beta2: np.ndarray  #: (nP,) at the pump [s^2/m]
    critical_power: np.ndarray  #: (nP,) [W]
    soliton_order: np.ndarray  #: (nE, nP) [-]
    compressed_duration: np.ndarray  #: (nE, nP) [s]
    thz_cutoff: np.ndarray  #: (nE, nP) [Hz]
    zero_dispersion_pressure: float  #: [Pa]
    rated_pressure: float | None  #: [Pa]
    pressure_ceiling: float  #: condensation ceiling of the fill (or the search limit) [Pa]
    config_energy: float  #: [J]
    config_pressure: float  #: [Pa]
    self_focusing_margin: float  #: required P_cr / P on the self-focusing line [-]
    ionization_fraction_limit: float
    thz_cutoff_db: float
    thz_cutoff_quantity: str
    notes: tuple[str, ...]
    #: upper end of the crystal model's THz range (generation ∩ detection crystal) [Hz]
    thz_model_limit: float = math.inf
    thz_model: str = ""  #: crystal(s) whose table sets ``thz_model_limit``, e.g. "GaP"
    #: ``thz.geometry`` of the config; the contours do not depend on it (TILTED_FRONT_NOTE)
    thz_geometry: str = "collinear"
    pressure_axis: str = "fill pressure"  #: what the pressures are (a gradient: exit pressure)

    def thz_cutoff_within_model(self) -> np.ndarray:
        """``thz_cutoff`` with nan wherever it lies above ``thz_model_limit`` (no cutoff of
        the model there). [Hz]"""
        return within_model(self.thz_cutoff, self.thz_model_limit)


def thz_model_range(config) -> tuple[float, str]:
    """(upper end of the THz model's range [Hz], crystal name(s) setting it) for the config's
    generation and detection crystals, as the chain's THz estimate uses
    (:func:`hcfplan.thz.measures.model_limit`)."""
    from hcfplan.materials.crystals import load_crystal
    from hcfplan.thz.measures import model_limit

    crystal = load_crystal(config.thz.crystal, config.thz.table_dirs)
    name = config.thz.detector_crystal
    detector = None if name is None else load_crystal(name, config.thz.table_dirs)
    limit = model_limit(crystal, detector)
    owners = [t.name for t in (crystal, detector)
              if t is not None and t.thz.frequency_max == limit]
    return limit, "/".join(dict.fromkeys(owners))


def _readonly(a) -> np.ndarray:
    a = np.array(a, dtype=float)
    a.setflags(write=False)
    return a


def axis_pressure(gas) -> float:
    """The configured value of the map's pressure axis: the fill pressure, or a gradient's exit
    pressure (its entrance pressure when the exit is evacuated). [Pa]"""
    if not gas.is_gradient:
        return gas.pressure
    return gas.exit_pressure if gas.exit_pressure > 0 else gas.entrance_pressure


def _default_pressures(config, ceiling: float, count: int) -> np.ndarray:
    base = axis_pressure(config.gas)
    top = PRESSURE_HIGH * base
    if config.cell.rated_pressure is not None:
        top = min(top, RATING_OVERSHOOT * config.cell.rated_pressure)
    return np.linspace(PRESSURE_LOW * base, min(top, ceiling), count)


def _fill_pressures(gas, pressures: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(pressure of the estimates, highest pressure in the fiber) at each axis value [Pa]: both
    the axis value for a static fill; the profile's mean and its higher end for a gradient."""
    fills = [gas.with_pressure(float(p)) for p in pressures]
    return (np.array([f.pressure for f in fills]), np.array([f.highest_pressure for f in fills]))


def _axes(config, medium, energies, pressures, points):
    energy = config.laser.energy
    if energies is None:
        energies = np.geomspace(ENERGY_SPAN[0] * energy, ENERGY_SPAN[1] * energy, points[0])
    ceiling = condensation_ceiling(medium, config.gas.temperature, PRESSURE_SEARCH_MAX)
    if pressures is None:
        pressures = _default_pressures(config, ceiling, points[1])
    energies, pressures = np.asarray(energies, dtype=float), np.asarray(pressures, dtype=float)
    for name, axis, unit in (("energies", energies, "J"), ("pressures", pressures, "Pa")):
        if axis.ndim != 1 or axis.size < 2 or not np.all(axis > 0) or np.any(np.diff(axis) <= 0):
            raise ConfigError(f"envelope {name}: need >= 2 increasing values > 0 {unit}")
    return energies, pressures, ceiling


@dataclass(frozen=True)
class _RowwiseGas:
    """GasLike whose density differs per leading index: row i of an omega array sees
    ``ratios[i]`` N_ref (see :class:`~hcfplan.planning.reports.limits_gas.ScaledGas`).

    Lets one vectorised waveguide evaluation cover the whole pressure axis: every fiber model
    evaluates the gas index element by element, so row i of beta(omega) belongs to pressure i.
    """

    reference: object
    ratios: np.ndarray

    @property
    def n2(self) -> np.ndarray:
        return self.reference.n2 * self.ratios

    def refractive_index(self, omega: np.ndarray) -> np.ndarray:
        omega = np.asarray(omega, dtype=float)
        n = self.reference.refractive_index(omega)
        ratio = self.ratios.reshape(self.ratios.shape + (1,) * (omega.ndim - 1))
        term = (n**2 - 1) / (n**2 + 2) * ratio
        return np.sqrt((1 + 2 * term) / (1 - term))


def _densities(config, medium, pressures: np.ndarray) -> np.ndarray:
    """Real-gas number density [1/m^3] at every pressure.

    Pure gas: one CoolProp call per pressure. Mixture (slower EOS path): the density at
    :data:`MIXTURE_NODES` Chebyshev nodes of the axis, and N/p interpolated between them (a
    smooth, slowly varying function of p away from condensation; tested to < 1e-6).
    """
    if len(medium.components) == 1 or pressures.size <= MIXTURE_NODES:
        return np.array([gas_density_at(config.gas, medium, float(p)) for p in pressures])
    lo, hi = float(pressures[0]), float(pressures[-1])
    x = np.cos(np.pi * (np.arange(MIXTURE_NODES) + 0.5) / MIXTURE_NODES)
    nodes = 0.5 * (lo + hi) + 0.5 * (hi - lo) * x
    per_pa = [gas_density_at(config.gas, medium, float(p)) / p for p in nodes]
    fit = np.polynomial.chebyshev.Chebyshev.fit(nodes, per_pa, MIXTURE_NODES - 1,
                                                 domain=[lo, hi])
    return fit(pressures) * pressures


def _pressure_axis(config, medium, pressures, omega0):
    """Arrays over the pressure axis: n0, n2 [m^2/W], beta2 [s^2/m], gamma [1/(W m)], alpha
    [1/m] at the pump, from one vectorised evaluation of the waveguide."""
    from hcfplan.numerics.derivatives import derivative_table

    gas = _RowwiseGas(medium, _densities(config, medium, pressures) / medium.number_density)
    wg = build_waveguide(config.fiber, gas, omega0)
    at_pump = np.full(pressures.shape, omega0)
    beta2 = derivative_table(wg.propagation_constant, at_pump, 2, rel_width=BETA2_REL_WIDTH)[2]
    area = float(wg.effective_area(np.array([omega0]))[0])
    gamma = gas.n2 * omega0 / (c * area)  # item 4 of hcfplan.fibers.base
    return (gas.refractive_index(at_pump), gas.n2, beta2, gamma, wg.attenuation(at_pump))


def _beta2_at(config, medium, omega0: float, pressure: float) -> float:
    """beta2 [s^2/m] at one pressure, same stencil as :func:`_pressure_axis`."""
    from hcfplan.numerics.derivatives import derivative_table

    fill = config.gas.with_pressure(float(pressure)).pressure  # a gradient: the mean
    gas = ScaledGas(medium, gas_density_at(config.gas, medium, fill))
    wg = build_waveguide(config.fiber, gas, omega0)
    return float(derivative_table(wg.propagation_constant, omega0, 2,
                                  rel_width=BETA2_REL_WIDTH)[2])


def _zero_dispersion_pressure(config, medium, omega0, pressures, beta2) -> float:
    """First sign change of beta2 along the axis, refined with Brent's method; nan if none."""
    from scipy.optimize import brentq

    change = np.flatnonzero(np.sign(beta2[:-1]) * np.sign(beta2[1:]) < 0)
    if change.size == 0:
        return math.nan
    i = int(change[0])

    def beta2(p: float) -> float:
        return _beta2_at(config, medium, omega0, p)

    lo, hi = pressures[i], pressures[i + 1]
    if beta2(lo) * beta2(hi) > 0:  # a zero within rounding of an axis point: one more each side
        lo, hi = pressures[max(i - 1, 0)], pressures[min(i + 2, pressures.size - 1)]
        if beta2(lo) * beta2(hi) > 0:
            return math.nan
    return float(brentq(beta2, lo, hi, rtol=1e-10))


def _map_estimates(config, energies, efficiency, beta2, gamma, alpha):
    """Soliton order, compressed duration [s] and THz cutoff [Hz] on the (E, p) grid."""
    from hcfplan.fibers import derived
    from hcfplan.pulse import fields as pulse

    laser = config.laser
    peak = pulse.peak_power_from_energy(1.0, laser.duration_fwhm, laser.shape) * efficiency
    power = energies[:, None] * peak  # coupled peak power, (nE, 1)
    t0 = derived.t0_from_fwhm(laser.duration_fwhm, laser.shape)
    with np.errstate(divide="ignore"):
        order = np.sqrt(gamma * power * t0**2 / np.abs(beta2))
    phi = gamma * power * derived.effective_length(config.fiber.length, alpha)
    # the estimate knows nothing of the carrier: below one optical cycle it is meaningless
    cycle = laser.wavelength / c
    duration = np.maximum(laser.duration_fwhm / derived.spm_broadening_factor(phi), cycle)
    cutoff = thz_cutoff_gaussian_estimate(duration, config.thz.cutoff_db,
                                          config.thz.cutoff_quantity)
    return order, duration, cutoff


def envelope_map(config, *, energies=None, pressures=None,
                 points: tuple[int, int] = (100, 100)) -> EnvelopeResult:
    """Energy x pressure map of the analytic limits and estimates (see the module docstring).

    Parameters
    ----------
    config : PlanConfig
        A validated config with a gas-filled fiber (capillary or anti-resonant).
    energies : array_like, optional
        Input pulse energies before coupling, increasing; default ``points[0]`` log-spaced from
        0.05x to 5x the configured energy. [J]
    pressures : array_like, optional
        Fill pressures, increasing; default ``points[1]`` linear from 0.05x the configured
        pressure to the smallest of 3x configured, 1.2x the cell rating and the condensation
        ceiling. [Pa]
    points : (int, int)
        Axis lengths (energies, pressures) of the default axes.

    Returns
    -------
    EnvelopeResult

    Raises
    ------
    ConfigError
        For a Taylor fiber (no gas, no pressure axis) or bad axes.
    """
    if config.gas is None or config.fiber.kind == "taylor":
        raise ConfigError(f"envelope: fiber.kind = {config.fiber.kind!r} has no gas fill and "
                          "no pressure axis; the map needs a capillary or anti-resonant fiber")
    if min(points) < 2:
        raise ConfigError(f"envelope points = {points}: need at least 2 per axis")
    with quiet_validity():
        return _envelope_map(config, energies, pressures, points)


def _envelope_map(config, energies, pressures, points) -> EnvelopeResult:
    from hcfplan.ionization.fraction import peak_intensity_for_fraction
    from hcfplan.limits import beam as limits

    laser, lim = config.laser, config.limits
    omega0 = pump_omega(laser)
    medium = build_medium(config.gas, laser.polarization)
    energies, pressures, ceiling = _axes(config, medium, energies, pressures, points)
    efficiency, _, _ = coupling(config)
    means, tops = _fill_pressures(config.gas, pressures)
    n0, _n2, beta2, gamma, alpha = _pressure_axis(config, medium, means, omega0)
    if not np.array_equal(tops, means):  # a gradient: self-focusing at its highest pressure
        n0, _n2 = _pressure_axis(config, medium, tops, omega0)[:2]
    from hcfplan.limits.rotational import self_focusing_n2

    sf_ratio = self_focusing_n2(medium, laser.duration_fwhm, laser.shape) / medium.n2
    critical = limits.self_focusing_power(laser.wavelength, n0, _n2 * sf_ratio)
    sf_energy = limits.max_energy_for_self_focusing(
        critical, laser.duration_fwhm, laser.shape, margin=lim.self_focusing_margin,
        coupling_efficiency=efficiency)
    rates = weighted_rates(medium, laser.wavelength, rate_model(config))
    i_lim = peak_intensity_for_fraction(lim.ionization_fraction_limit, laser.duration_fwhm,
                                        laser.shape, rates, RATE_TABLE_RANGE)
    area = build_waveguide(config.fiber, medium, omega0).peak_intensity_area
    ion_energy = limits.energy_from_peak_intensity(i_lim, area, laser.duration_fwhm, laser.shape,
                                                   efficiency)
    order, duration, cutoff = _map_estimates(config, energies, efficiency, beta2, gamma, alpha)
    thz_limit, thz_model = thz_model_range(config)
    notes = tuple(medium.warnings) + (
        "lines are analytic estimates (no propagation): self-focusing from Fibich & Gaeta's "
        "P_cr, ionisation from the PPT fraction of the input pulse",
        "duration and THz contours are " + ESTIMATE_NOTE)
    if config.gas.is_gradient:
        notes += (f"gradient fill: the pressure axis is the exit pressure, the entrance fixed at "
                  f"{config.gas.entrance_pressure / 1e5:.4g} bar; estimates at the profile's "
                  "mean pressure, the self-focusing line at the highest pressure in the fiber",)
    if config.thz.geometry == "tilted_front":
        notes += (TILTED_FRONT_NOTE,)
    if np.nanmax(cutoff) > thz_limit:
        notes += (f"THz cutoff estimates {beyond_model_text(thz_limit, thz_model)} are no "
                  "cutoffs of the model: not drawn as contours, null in the JSON",)
    return EnvelopeResult(
        energies=_readonly(energies), pressures=_readonly(pressures),
        self_focusing_max_energy=_readonly(sf_energy),
        ionization_max_energy=_readonly(np.full(pressures.shape, ion_energy)),
        beta2=_readonly(beta2), critical_power=_readonly(critical),
        soliton_order=_readonly(order), compressed_duration=_readonly(duration),
        thz_cutoff=_readonly(cutoff),
        zero_dispersion_pressure=_zero_dispersion_pressure(config, medium, omega0, pressures,
                                                           beta2),
        rated_pressure=config.cell.rated_pressure, pressure_ceiling=ceiling,
        config_energy=laser.energy, config_pressure=axis_pressure(config.gas),
        self_focusing_margin=lim.self_focusing_margin,
        ionization_fraction_limit=lim.ionization_fraction_limit,
        thz_cutoff_db=config.thz.cutoff_db, thz_cutoff_quantity=config.thz.cutoff_quantity,
        notes=notes, thz_model_limit=thz_limit, thz_model=thz_model,
        thz_geometry=config.thz.geometry,
        pressure_axis=("exit pressure (gradient, entrance fixed)" if config.gas.is_gradient
                       else "fill pressure"))


def _listed(a) -> list:
    return [None if not math.isfinite(v) else float(v) for v in np.asarray(a, dtype=float).ravel()]


def _nested(a) -> list:
    return [_listed(row) for row in np.asarray(a)]


def _maybe(x):
    return None if x is None or not math.isfinite(x) else float(x)


def envelope_json(result: EnvelopeResult, check=None) -> dict:
    """The map as a JSON-ready dict (SI, unit in the key names; 2-D arrays as [energy][pressure],
    non-finite values as null; THz cutoffs above the crystal model's range as null), with the
    ``check.*`` keys of ``check`` (an
    :class:`~hcfplan.planning.envelope_check.EnvelopeCheck`; None: ``check.status =
    "unchecked"``)."""
    from hcfplan.planning.envelope_check import check_json

    return {
        "envelope.energies_j": _listed(result.energies),
        "envelope.pressures_pa": _listed(result.pressures),
        "envelope.self_focusing_max_energy_j": _listed(result.self_focusing_max_energy),
        "envelope.ionization_max_energy_j": _listed(result.ionization_max_energy),
        "envelope.critical_power_w": _listed(result.critical_power),
        "envelope.beta2_s2_per_m": _listed(result.beta2),
        "envelope.zero_dispersion_pressure_pa": _maybe(result.zero_dispersion_pressure),
        "envelope.rated_pressure_pa": _maybe(result.rated_pressure),
        "envelope.pressure_ceiling_pa": _maybe(result.pressure_ceiling),
        "envelope.soliton_order": _nested(result.soliton_order),
        "envelope.estimate_kind": ESTIMATE_KIND,
        "envelope.estimate_note": ESTIMATE_NOTE,
        "envelope.compressed_duration_s": _nested(result.compressed_duration),
        "envelope.thz_cutoff_hz": _nested(result.thz_cutoff_within_model()),
        "envelope.thz_model_limit_hz": _maybe(result.thz_model_limit),
        "envelope.thz_model": result.thz_model or None,
        "envelope.thz_geometry": result.thz_geometry,
        "envelope.thz_cutoff_note": (
            "null where the estimate lies "
            f"{beyond_model_text(result.thz_model_limit, result.thz_model)}: no cutoff of "
            "the crystal model there"),
        "envelope.config_energy_j": result.config_energy,
        "envelope.config_pressure_pa": result.config_pressure,
        "envelope.self_focusing_required_margin": result.self_focusing_margin,
        "envelope.self_focusing_line": "input energy where P_cr/P equals the required margin",
        "envelope.ionization_fraction_limit": result.ionization_fraction_limit,
        "envelope.thz_cutoff_db": result.thz_cutoff_db,
        "envelope.thz_cutoff_quantity": result.thz_cutoff_quantity,
        "envelope.array_layout": "2-D arrays are [energy index][pressure index]",
        "envelope.pressure_axis": result.pressure_axis,
        "envelope.notes": list(result.notes),
        **check_json(check),
    }
