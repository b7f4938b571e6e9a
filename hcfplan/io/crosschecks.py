"""Checks between config keys, and of names against the shipped and user tables.

Run on the resolved table (user units, defaults filled in) before anything is converted to SI.
Each problem is one :class:`~hcfplan.errors.ConfigError` line naming every key involved, with
the values as the user wrote them. Single values are checked by :mod:`hcfplan.io.checks`.
"""

from __future__ import annotations

import re
from pathlib import Path

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.io.checks import describe, suggest
from hcfplan.numerics.grid import UPPER_EDGE_MULTIPLE

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
    else:
        taylor_only = ("betas_fs_n_per_mm", "gamma_per_w_per_m", "effective_area_um2")
        for key in taylor_only:
            if fiber[key] is not None:
                raise ConfigError(f"fiber.{key}: only allowed with kind = 'taylor' "
                                  f"(kind is {kind!r})")
    mode_order(fiber["mode"])


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
    if comp["wedge_max_insertion_mm"] > 0 and comp["wedge_material"] is None:
        raise ConfigError("compressor.wedge_material: required when wedge_max_insertion_mm > 0")
    thz = resolved["thz"]
    if (thz["detector_crystal"] is None) != (thz["detector_thickness_mm"] is None):
        raise ConfigError("thz.detector_crystal and thz.detector_thickness_mm: give both or "
                          "neither")


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


def check_measured_spectrum(wavelength, resolved: dict) -> None:
    """The measured input spectrum (wavelengths [m]) must hold the pump wavelength, which
    centres the simulation grid."""
    pump = resolved["laser"]["wavelength_nm"]
    lo, hi = float(wavelength[0]) * 1e9, float(wavelength[-1]) * 1e9
    if not lo <= pump <= hi:
        raise ConfigError(f"laser.wavelength_nm = {describe(pump)}: outside the measured "
                          f"spectrum of laser.spectrum_csv ({lo:.6g}-{hi:.6g} nm); the pump "
                          "wavelength centres the grid and must lie within the spectrum")


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
                     ("compressor", "wedge_material")]
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
