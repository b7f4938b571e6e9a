"""Checks between config keys, and of names against the shipped and user tables.

Run on the resolved table (user units, defaults filled in) before anything is converted to SI.
Each problem is one :class:`~hcfplan.errors.ConfigError` line naming every key involved, with
the values as the user wrote them. Single values are checked by :mod:`hcfplan.io.checks`.
"""

from __future__ import annotations

import math
import re
from pathlib import Path

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.io.checks import describe, suggest
from hcfplan.numerics.grid import LOWER_EDGE_FRACTION, UPPER_EDGE_MULTIPLE, estimated_band

#: Largest radial order m of an EH1m mode accepted in ``fiber.mode``.
MAX_MODE_ORDER = 1000
_MODE_PATTERN = re.compile(r"EH1([1-9][0-9]{0,3})", re.ASCII | re.IGNORECASE)
#: Fewest grid points the solver's grid accepts (``hcfplan.numerics.grid.Grid``).
MIN_GRID_POINTS = 16
#: Most values the saved spectra of a run may hold, ``grid.points`` x ``grid.z_samples``
#: (stored as float32, so 2 GiB); the schema bounds each key alone, this bounds the product
#: (common practice, no source).
MAX_SAVED_VALUES = 2**29


def mode_order(text: str) -> int:
    """Radial order m of an ``EH1m`` mode name, or a ConfigError naming ``fiber.mode``."""
    match = _MODE_PATTERN.fullmatch(text.strip())
    if match is None or int(match.group(1)) > MAX_MODE_ORDER:
        raise ConfigError(f"fiber.mode = {describe(text)}: must be EH1m with "
                          f"1 <= m <= {MAX_MODE_ORDER} (e.g. 'EH11')")
    return int(match.group(1))


def _require(resolved: dict, section: str, key: str, why: str) -> None:
    if resolved[section][key] is None:
        raise ConfigError(f"{section}.{key}: required {why}")


def check_fiber(resolved: dict) -> None:
    """Keys each fiber kind needs or refuses, the wall against the core, and the mode name."""
    fiber = resolved["fiber"]
    kind = fiber["kind"]
    if fiber["loss_db_per_m"] is not None and fiber["loss_csv"] is not None:
        raise ConfigError("fiber.loss_db_per_m and fiber.loss_csv: give one measured loss, "
                          "not both")
    if kind in ("capillary", "antiresonant"):
        _require(resolved, "fiber", "core_diameter_um", f"for kind = {kind!r}")
    if kind == "antiresonant":
        _require(resolved, "fiber", "wall_thickness_um", "for kind = 'antiresonant'")
        if fiber["wall_thickness_um"] >= fiber["core_diameter_um"] / 2:
            raise ConfigError(f"fiber.wall_thickness_um = {fiber['wall_thickness_um']}: must be "
                              "smaller than the core radius, half of fiber.core_diameter_um = "
                              f"{fiber['core_diameter_um']}")
    if kind == "taylor":
        _require(resolved, "fiber", "betas_fs_n_per_mm", "for kind = 'taylor'")
        _require(resolved, "fiber", "gamma_per_w_per_m", "for kind = 'taylor'")
    mode_order(fiber["mode"])


#: Keys a multimode run (``fiber.modes`` > 1) refuses: a measured loss or GVD is that of one
#: mode (the one measured); no rule carries it over to the higher modes.
_SINGLE_MODE_KEYS = ("loss_db_per_m", "loss_csv", "gvd_csv")


def check_modes(resolved: dict) -> None:
    """``fiber.modes`` > 1: the launch is projected on EH11...EH1N, so ``fiber.mode`` must
    be EH11; measured loss or GVD (one mode's) and a circularly polarised pump (the modes are
    linearly polarised) are refused, each naming ``fiber.modes``."""
    fiber = resolved["fiber"]
    count = fiber.get("modes", 1)
    if count is None or count <= 1:
        return
    head = f"fiber.modes = {count}"
    if mode_order(fiber["mode"]) != 1:
        raise ConfigError(f"{head}: needs fiber.mode = 'EH11' (the launch is projected on "
                          f"EH11...EH1{count}), got fiber.mode = {describe(fiber['mode'])}")
    given = [k for k in _SINGLE_MODE_KEYS if fiber.get(k) is not None]
    if given:
        raise ConfigError(f"{head} with fiber.{given[0]}: a measured loss or GVD is that of one "
                          "mode and is not carried over to the higher modes; drop it or use "
                          "fiber.modes = 1")
    if resolved.get("laser", {}).get("polarization") == "circular":
        raise ConfigError(f"{head} with laser.polarization = 'circular': the modes are "
                          "modelled linearly polarised")


def check_staged_modes(counts) -> None:
    """Cascaded stages hand one field over: a stage with ``fiber.modes`` > 1 is refused."""
    for index, count in enumerate(counts):
        if count > 1:
            raise ConfigError(f"stage.{index}.fiber.modes = {count}: cascaded stages hand one "
                              "field to the next stage; multimode runs are single-stage "
                              "configs")


def check_gas(resolved: dict, present: set[str]) -> None:
    """A [gas] section for gas-filled fibers, with exactly one of species and mixture."""
    gas = resolved["gas"]
    kind = resolved["fiber"]["kind"]
    if "gas" not in present:
        if kind != "taylor":
            raise ConfigError(f"[gas]: required section is missing for fiber.kind = {kind!r}")
        return
    if gas["species"] is not None and gas["mixture"] is not None:
        raise ConfigError("gas.species and gas.mixture: give one of them, not both")
    if gas["species"] is None and gas["mixture"] is None:
        raise ConfigError("gas.species: required (or gas.mixture)")
    check_fill_pressure(gas)


def check_fill_pressure(gas: dict) -> None:
    """A static fill (``pressure_bar``) or a gradient (``entrance_pressure_bar`` and
    ``exit_pressure_bar``, not both ends 0), never both."""
    static, ends = gas["pressure_bar"], (gas["entrance_pressure_bar"], gas["exit_pressure_bar"])
    given = [f"gas.{key}" for key, value in zip(("entrance_pressure_bar", "exit_pressure_bar"),
                                                ends, strict=True) if value is not None]
    if static is not None and given:
        raise ConfigError(f"gas.pressure_bar and {' and '.join(given)}: give a static fill "
                          "(pressure_bar) or a gradient (entrance_pressure_bar and "
                          "exit_pressure_bar), not both")
    if static is not None:
        return
    if not given:
        raise ConfigError("gas.pressure_bar: required key is missing (or give "
                          "gas.entrance_pressure_bar and gas.exit_pressure_bar for a "
                          "gradient fill)")
    if len(given) == 1:
        other = "exit" if given[0].endswith("entrance_pressure_bar") else "entrance"
        raise ConfigError(f"gas.{other}_pressure_bar: required with {given[0]} (a gradient "
                          "fill needs the pressure at both ends)")
    if ends[0] == 0 and ends[1] == 0:
        raise ConfigError("gas.entrance_pressure_bar = 0, gas.exit_pressure_bar = 0: a "
                          "gradient fill needs gas at one end at least (> 0)")


def check_compressor(resolved: dict) -> None:
    """Mirror GDD given once, a mirror band that holds the pump, wedge and detector pairs."""
    comp = resolved["compressor"]
    if comp["mirror_gdd_fs2"] is not None and comp["mirror_gdd_csv"] is not None:
        raise ConfigError("compressor.mirror_gdd_fs2 and compressor.mirror_gdd_csv: give one "
                          "of them, not both")
    band = comp["mirror_band_nm"]
    pump = resolved["laser"]["wavelength_nm"]
    if band is not None and not band[0] < pump < band[1]:
        raise ConfigError(f"compressor.mirror_band_nm = {describe(band)}: must contain the pump, "
                          f"laser.wavelength_nm = {describe(pump)} (all light outside the band "
                          "is lost)")
    if (band is not None and resolved["laser"]["spectrum_csv"] is None
            and resolved["laser"]["field_csv"] is None):
        check_band_share(band, resolved, band_share_analytic(band, resolved["laser"]))
    if comp["wedge_max_insertion_mm"] > 0 and comp["wedge_material"] is None:
        raise ConfigError("compressor.wedge_material: required when wedge_max_insertion_mm > 0")
    _check_unused_companions(resolved)
    thz = resolved["thz"]
    if (thz["detector_crystal"] is None) != (thz["detector_thickness_mm"] is None):
        raise ConfigError("thz.detector_crystal and thz.detector_thickness_mm: give both or "
                          "neither")


def _check_unused_companions(resolved: dict) -> None:
    """Refuse a key that only acts together with another one that is absent: the run would
    ignore it (the TOD per bounce of mirrors given by their GDD, a wedge trim without an
    insertion range, an EO probe duration without a detection crystal)."""
    comp, thz = resolved["compressor"], resolved["thz"]
    if comp["mirror_tod_fs3"] != 0 and comp["mirror_gdd_fs2"] is None:
        given = ("compressor.mirror_gdd_csv (which holds the measured GDD)"
                 if comp["mirror_gdd_csv"] is not None else "no mirrors")
        raise ConfigError(f"compressor.mirror_tod_fs3 = {describe(comp['mirror_tod_fs3'])}: "
                          "acts only with compressor.mirror_gdd_fs2, and the config has "
                          f"{given}; give mirror_gdd_fs2 or remove mirror_tod_fs3")
    if comp["wedge_material"] is not None and comp["wedge_max_insertion_mm"] == 0:
        raise ConfigError(f"compressor.wedge_material = {comp['wedge_material']!r} with "
                          "compressor.wedge_max_insertion_mm = 0: the wedge trim is off; give "
                          "the largest insertion (> 0) or remove wedge_material")
    if thz["probe_fwhm_fs"] is not None and thz["detector_crystal"] is None:
        raise ConfigError(f"thz.probe_fwhm_fs = {describe(thz['probe_fwhm_fs'])}: sets the "
                          "probe of EO detection, and the config has no thz.detector_crystal; "
                          "give the detection crystal and thickness or remove probe_fwhm_fs")


#: Least share of the input spectrum's energy the mirror band must hold: with less, the band
#: cuts away the pump itself and nothing is left to compress (common practice, no source).
MIN_BAND_SHARE = 0.5
#: Spectral intensity FWHM x temporal intensity FWHM of the transform-limited shapes:
#: 4 ln2 / (2 pi) = 0.4413 (Gaussian) and 4 arccosh(sqrt 2)^2 / pi^2 = 0.3148 (sech^2);
#: A. M. Weiner, *Ultrafast Optics*, Wiley (2009), Table 3.1 [table number from memory].
_TIME_BANDWIDTH = {"gaussian": 2 * math.log(2) / math.pi,
                   "sech2": 4 * math.acosh(math.sqrt(2)) ** 2 / math.pi**2}


def band_share_analytic(band_nm, laser: dict) -> float:
    """Share of the transform-limited input spectrum's energy inside the band [low, high] nm.

    The spectral intensity of a Gaussian pulse is a Gaussian and that of a sech^2 pulse a
    sech^2 in frequency, each with the FWHM ``TBP / fwhm`` (:data:`_TIME_BANDWIDTH`); their
    integrals are erf and tanh. An input chirp (``laser.gdd_fs2``) leaves the spectrum as it is.
    """
    f0 = c / (laser["wavelength_nm"] * 1e-9)
    width = _TIME_BANDWIDTH[laser["shape"]] / (laser["fwhm_fs"] * 1e-15)  # FWHM [Hz]
    lo, hi = c / (band_nm[1] * 1e-9) - f0, c / (band_nm[0] * 1e-9) - f0  # offsets [Hz]
    if laser["shape"] == "gaussian":
        scale = width / (2 * math.sqrt(math.log(2)))  # I ~ exp(-(f/scale)^2)
        return 0.5 * (math.erf(hi / scale) - math.erf(lo / scale))
    scale = width / (2 * math.acosh(math.sqrt(2)))  # I ~ sech^2(f/scale)
    return 0.5 * (math.tanh(hi / scale) - math.tanh(lo / scale))


def band_share_measured(band_nm, wavelength, intensity) -> float:
    """Share of a measured spectrum (wavelength [m], intensity per wavelength, linear between
    the samples) inside the band [low, high] nm (trapezoid rule, exact for the interpolant)."""
    import numpy as np

    wavelength, intensity = np.asarray(wavelength, dtype=float), np.asarray(intensity, dtype=float)
    total = float(np.trapezoid(intensity, wavelength))
    lo = min(max(band_nm[0] * 1e-9, wavelength[0]), wavelength[-1])
    hi = min(max(band_nm[1] * 1e-9, wavelength[0]), wavelength[-1])
    x = np.unique(np.concatenate(([lo, hi], wavelength[(wavelength > lo) & (wavelength < hi)])))
    if total <= 0 or hi <= lo:
        return 0.0
    return float(np.trapezoid(np.interp(x, wavelength, intensity), x)) / total


def check_band_share(band_nm, resolved: dict, share: float) -> None:
    """Refuse a mirror band that holds less than :data:`MIN_BAND_SHARE` of the input spectrum."""
    if share >= MIN_BAND_SHARE:
        return
    laser = resolved["laser"]
    measured = "spectrum_csv" if laser["spectrum_csv"] else "field_csv"
    source = (f"the measured spectrum of laser.{measured}"
              if laser["spectrum_csv"] or laser["field_csv"] else
              f"the input spectrum (laser.wavelength_nm = {describe(laser['wavelength_nm'])}, "
              f"laser.fwhm_fs = {describe(laser['fwhm_fs'])}, laser.shape = "
              f"{laser['shape']!r})")
    raise ConfigError(f"compressor.mirror_band_nm = {describe(band_nm)}: holds {share:.2%} of "
                      f"the energy of {source}; at least {MIN_BAND_SHARE:.0%} must lie inside "
                      "(all light outside the band is lost, nothing would be left to compress)")


def check_grid(resolved: dict) -> None:
    """An even point count, and a frequency window that fits where the grid may place it.

    The grid's frequency window has the full width ``2 pi N / T`` (``N`` points over the time
    window ``T``); it lies above zero frequency and, placed by
    :func:`hcfplan.numerics.grid.choose_grid`, below ``UPPER_EDGE_MULTIPLE`` times the pump
    angular frequency ``2 pi c / lambda``, so it can be no wider than that:
    ``T > N lambda / (UPPER_EDGE_MULTIPLE c)`` (``choose_grid`` checks the exact placement).
    Without ``points`` the grid shrinks to :data:`MIN_GRID_POINTS` at the least; without
    ``time_window_fs`` the window is chosen to fit.
    """
    grid = resolved["grid"]
    points, window_fs = grid["points"], grid["time_window_fs"]
    if points is not None and points % 2:
        raise ConfigError(f"grid.points = {points}: must be an even number (a power of two "
                          "is fastest)")
    if points is not None and points * grid["z_samples"] > MAX_SAVED_VALUES:
        raise ConfigError(f"grid.points = {points}, grid.z_samples = {grid['z_samples']}: "
                          f"the saved spectra would hold {points * grid['z_samples']:.3g} "
                          f"values; at most {MAX_SAVED_VALUES:.3g} (lower grid.z_samples)")
    if window_fs is None:
        return
    if points is not None and grid["center_wavelength_nm"] is not None:
        _check_fixed_window(resolved)
    wavelength_nm = resolved["laser"]["wavelength_nm"]
    count = MIN_GRID_POINTS if points is None else points
    span = UPPER_EDGE_MULTIPLE
    shortest_fs = count * wavelength_nm * 1e-9 / (span * c) * 1e15
    if not window_fs > shortest_fs:
        given = (f"grid.time_window_fs = {describe(window_fs)}" if points is None else
                 f"grid.points = {points}, grid.time_window_fs = {describe(window_fs)}")
        raise ConfigError(f"{given}: the frequency window is wider than the grid may span at "
                          f"laser.wavelength_nm = {describe(wavelength_nm)} "
                          f"(0 to {UPPER_EDGE_MULTIPLE:g} times the pump frequency); {count} "
                          "points "
                          f"need a time window > {shortest_fs:.4g} fs "
                          f"(points x wavelength / ({span:g} c))")


def _check_fixed_window(resolved: dict) -> None:
    """A grid fixed by points, time window and centre must hold the pump above zero frequency
    (the window is centre -+ pi N / T in angular frequency, as
    :func:`hcfplan.numerics.grid.choose_grid` places it)."""
    grid = resolved["grid"]
    points, window_fs = grid["points"], grid["time_window_fs"]
    centre_nm = grid["center_wavelength_nm"]
    pump_nm = resolved["laser"]["wavelength_nm"]
    centre = 2 * math.pi * c / (centre_nm * 1e-9)
    half = math.pi * points / (window_fs * 1e-15)
    pump = 2 * math.pi * c / (pump_nm * 1e-9)
    if centre - half > 0 and centre - half < pump < centre + half:
        return
    lo_nm = 2 * math.pi * c / (centre + half) * 1e9
    hi = "infinity (zero frequency)" if centre - half <= 0 else \
        f"{2 * math.pi * c / (centre - half) * 1e9:.5g} nm"
    raise ConfigError(f"grid.center_wavelength_nm = {describe(centre_nm)}, grid.points = "
                      f"{points}, grid.time_window_fs = {describe(window_fs)}: the window "
                      f"spans {lo_nm:.5g} nm to {hi}; it must hold the pump, "
                      f"laser.wavelength_nm = {describe(pump_nm)}, and stay above zero "
                      "frequency")


def check_measured_spectrum(wavelength, resolved: dict) -> None:
    """The measured input spectrum (wavelengths [m]) must hold the pump wavelength, which
    centres the simulation grid."""
    pump = resolved["laser"]["wavelength_nm"]
    key = "spectrum_csv" if resolved["laser"]["spectrum_csv"] else "field_csv"
    lo, hi = float(wavelength[0]) * 1e9, float(wavelength[-1]) * 1e9
    if not lo <= pump <= hi:
        raise ConfigError(f"laser.wavelength_nm = {describe(pump)}: outside the measured "
                          f"spectrum of laser.{key} ({lo:.6g}-{hi:.6g} nm); the pump "
                          "wavelength centres the grid and must lie within the spectrum")


#: Largest relative difference between ``laser.fwhm_fs`` and the FWHM of ``laser.field_csv``
#: (common practice, no source: the grid sized for one must hold the other).
FIELD_FWHM_TOLERANCE = 0.2


def check_field_duration(field, resolved: dict) -> None:
    """``laser.fwhm_fs`` must match the intensity FWHM of the measured pulse of
    ``laser.field_csv`` (a :class:`~hcfplan.io.specs.MeasuredField`) within
    :data:`FIELD_FWHM_TOLERANCE`; only one of ``spectrum_csv`` and ``field_csv`` is given."""
    from hcfplan.pulse.fields import measured_field_fwhm

    laser = resolved["laser"]
    if laser["spectrum_csv"] is not None:
        raise ConfigError("laser.spectrum_csv and laser.field_csv: give one of them, not both")
    width_fs = measured_field_fwhm(field.axis, field.x, field.intensity, field.phase) * 1e15
    given = laser["fwhm_fs"]
    if not abs(given - width_fs) <= FIELD_FWHM_TOLERANCE * width_fs:
        raise ConfigError(f"laser.fwhm_fs = {describe(given)}: the pulse of laser.field_csv "
                          f"({field.source}) has an intensity FWHM of {width_fs:.4g} fs; set "
                          f"laser.fwhm_fs within {FIELD_FWHM_TOLERANCE:.0%} of it (it sizes "
                          "the grid and the first-look estimates)")


def check_mirror_curve(wavelength, resolved: dict) -> None:
    """The measured mirror GDD (wavelengths [m]) must cover the pump wavelength: outside its
    range the GDD per bounce would be the value at the nearest end, not a measurement."""
    pump = resolved["laser"]["wavelength_nm"]
    lo, hi = float(wavelength[0]) * 1e9, float(wavelength[-1]) * 1e9
    if not lo <= pump <= hi:
        raise ConfigError(f"compressor.mirror_gdd_csv covers {lo:.6g}-{hi:.6g} nm: "
                          f"laser.wavelength_nm = {describe(pump)} lies outside it (the mirrors' "
                          "GDD at the pump is not in the file)")


def check_names(resolved: dict, present: set[str], table_dirs: tuple[Path, ...],
                crystal_dirs: tuple[Path, ...] = ()) -> None:
    """Check gas, material and crystal names against the shipped and user tables (user
    crystal folders ``crystal_dirs``; the check-only materials are accepted, not listed)."""
    from hcfplan.materials import crystals, gases, solids

    if "gas" in present:
        names = ([resolved["gas"]["species"]] if resolved["gas"]["species"]
                 else list(resolved["gas"]["mixture"]))
        key = "gas.species" if resolved["gas"]["species"] else "gas.mixture"
        for name in names:
            try:
                gases.load_gas_table(name, table_dirs)
            except ConfigError as exc:
                valid = gases.available_gases(table_dirs)
                if any(name.lower() == v.lower() for v in valid):
                    raise  # the table exists but is malformed: its own message names file/key
                raise ConfigError(f"{key} = {name!r}: unknown gas{suggest(name, valid)} "
                                  f"(available: {', '.join(valid)})") from exc
    material_keys = [("fiber", "cladding"), ("cell", "window_material"),
                     ("cell", "entrance_window_material"), ("compressor", "wedge_material")]
    valid_solids = solids.material_names()
    for section, key in material_keys:
        name = resolved[section][key]
        if name is not None and name not in valid_solids:
            raise ConfigError(f"{section}.{key} = {name!r}: unknown material"
                              f"{suggest(name, valid_solids)} "
                              f"(available: {', '.join(valid_solids)})")
    valid_crystals = crystals.listed_crystal_names(crystal_dirs)
    known = {v.lower() for v in crystals.crystal_names(crystal_dirs)}
    for key in ("crystal", "detector_crystal"):
        name = resolved["thz"][key]
        if name is not None and name.lower() not in known:
            raise ConfigError(f"thz.{key} = {name!r}: unknown crystal"
                              f"{suggest(name, valid_crystals)} "
                              f"(available: {', '.join(valid_crystals)})")


def needed_wavelengths(resolved: dict, spectrum_wavelength=None) -> tuple[float, float]:
    """Vacuum wavelengths [m] that every run of the config puts on its grid.

    The band of the unbroadened input pulse with the grid's margin
    (:func:`hcfplan.numerics.grid.estimated_band` at broadening 1), kept between the edges any
    grid may have (``LOWER_EDGE_FRACTION`` and ``UPPER_EDGE_MULTIPLE`` of the pump frequency),
    joined with the measured input spectrum (``spectrum_wavelength`` [m]) when one is given.
    """
    laser = resolved["laser"]
    omega = 2 * math.pi * c / (laser["wavelength_nm"] * 1e-9)
    low, high = estimated_band(omega, laser["fwhm_fs"] * 1e-15)
    low, high = max(low, LOWER_EDGE_FRACTION * omega), min(high, UPPER_EDGE_MULTIPLE * omega)
    shortest, longest = 2 * math.pi * c / high, 2 * math.pi * c / low
    if spectrum_wavelength is not None:
        shortest = min(shortest, float(spectrum_wavelength[0]))
        longest = max(longest, float(spectrum_wavelength[-1]))
    return shortest, longest


def check_gas_tables(resolved: dict, present: set[str], table_dirs, spectrum_wavelength=None
                     ) -> None:
    """The gas tables against the fill and the run: a temperature below a component's triple
    point (solid: named by ``gas.temperature_k``), and a dispersion fit with a pole or an
    index that is not real and > 1 inside the wavelengths the run needs (named by file and
    key). Call after :func:`check_names`."""
    if "gas" not in present:
        return
    from hcfplan.materials import gas_tables

    gas = resolved["gas"]
    names = [gas["species"]] if gas["species"] else list(gas["mixture"])
    low, high = needed_wavelengths(resolved, spectrum_wavelength)
    pump = resolved["laser"]["wavelength_nm"]
    what = (f"the wavelengths the run needs at laser.wavelength_nm = {describe(pump)}, "
            f"laser.fwhm_fs = {describe(resolved['laser']['fwhm_fs'])}"
            + (" and the measured spectrum" if spectrum_wavelength is not None else ""))
    for name in names:
        table = gas_tables.load_gas_table(name, table_dirs)
        check_triple_point(table, gas["temperature_k"])
        _check_fit_range(table, low, high, what)


def _check_fit_range(table, low: float, high: float, what: str) -> None:
    """Refuse a gas table whose default index has a pole, or an index not real and above 1,
    between ``low`` and ``high`` [m]; the message names the file, the ``[[dispersion]]`` record
    and its coefficient key, and ``what`` the range is. A combined index
    (``[dispersion_combined]``) is checked fit by fit over the wavelengths where each one is
    used (from the start of the switch band before it to the end of the band after it)."""
    from functools import partial

    from hcfplan.materials.gas_fit_checks import index_defect
    from hcfplan.materials.gas_tables import refractive_index_from_fit

    default = table.dispersion
    parts = [(default, low, high)]
    if hasattr(default, "switches"):  # CombinedDispersion
        edges = [-math.inf, *(band[0] for band in default.switches)]
        ends = [*(band[1] for band in default.switches), math.inf]
        spans = zip(default.fits, edges, ends, strict=True)
        parts = [(fit, max(low, a), min(high, b)) for fit, a, b in spans
                 if max(low, a) < min(high, b)]
    fits = list(table.dispersion_fits) or [default]
    for fit, lo, hi in parts:
        problem = index_defect(partial(refractive_index_from_fit, fit), fit.form,
                               fit.coefficients, lo, hi)
        if problem:
            index = fits.index(fit) if fit in fits else 0
            raise ConfigError(f"{table.path}: dispersion[{index}].{problem}, inside {what} "
                              f"({low * 1e9:.4g}-{high * 1e9:.4g} nm)")


def check_triple_point(table, temperature_k: float, key: str = "gas.temperature_k") -> None:
    """Refuse a temperature below the triple point, where the equation of state ends (the
    fluid is solid, or for helium superfluid), named by ``key`` (the config key or the
    command-line option of the temperature) alone, since no pressure helps; the phase check
    of :mod:`hcfplan.materials.gas_phase` covers the rest.

    References
    ----------
    I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Ind. Eng. Chem. Res. 53, 2498-2508 (2014),
    doi:10.1021/ie4033999 (CoolProp ``Ttriple``; the reference EOS of each fluid is cited in the
    [eos] block of its gas table).
    """
    from hcfplan.materials.coolprop_calls import props_si as PropsSI  # cached on disk

    triple = float(PropsSI("Ttriple", table.coolprop_name))
    if temperature_k < triple:
        raise ConfigError(f"{key} = {describe(temperature_k)}: below the triple point of "
                          f"{table.label}, {triple:.6g} K, where its equation of state "
                          f"(CoolProp {table.coolprop_name!r}) ends: no gas fill is modelled "
                          f"there, at any pressure; raise {key}")


def check_crystal_absorption(resolved: dict, present: set[str],
                             crystal_dirs: tuple[Path, ...] = ()) -> None:
    """Refuse a THz crystal that absorbs the pump (or, in EO detection, the probe at the pump
    wavelength) in a single photon: the photon energy ``h c / laser.wavelength_nm`` above the
    crystal table's direct band gap. Two-photon absorption (twice the photon energy above the
    gap) is a warning of the THz estimate, not an error.

    References
    ----------
    The band gaps are those of the crystal tables (``hcfplan/materials/data/crystals/``, each
    with its source); the comparison is common practice, no source.
    """
    if "thz" not in present:
        return
    from hcfplan.constants import eV, h
    from hcfplan.materials import crystals

    pump = resolved["laser"]["wavelength_nm"]
    photon = h * c / (pump * 1e-9)
    for key, role in (("crystal", "the generation crystal absorbs the pump"),
                      ("detector_crystal", "the EO detection crystal absorbs the probe (the "
                       "compressed pulse, at the pump wavelength)")):
        name = resolved["thz"][key]
        gap = None if name is None else crystals.load_crystal(name, crystal_dirs).band_gap_direct
        if gap is not None and photon > gap:
            raise ConfigError(
                f"thz.{key} = {name!r} with laser.wavelength_nm = {describe(pump)}: the photon "
                f"energy {photon / eV:.3g} eV exceeds the direct band gap of {name}, "
                f"{gap / eV:.3g} eV (crystal table): {role} within micrometres; use a pump "
                f"above {h * c / gap * 1e9:.4g} nm or another crystal")
