"""TOML config -> validated, defaults-filled, frozen SI specs.

Loading runs in four steps, each of which reports the first problem as one
:class:`~hcfplan.errors.ConfigError` line naming the key path:

1. read and parse the file (:func:`hcfplan.io.tomlio.read_toml`);
2. apply ``--set section.key=value`` overrides (:func:`apply_overrides`);
3. check every section and key against :data:`hcfplan.io.schema.SCHEMA` (unknown keys get the
   nearest valid key suggested; types, finiteness and ranges are checked) and fill defaults;
4. cross-check keys that depend on each other and convert to SI once, into the frozen specs.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from hcfplan import units
from hcfplan.errors import ConfigError
from hcfplan.io.schema import REQUIRED, REQUIRED_SECTIONS, SCHEMA, Key
from hcfplan.io.tomlio import parse_toml_value, read_toml

#: Largest radial order m of an EH1m mode accepted in ``fiber.mode``.
MAX_MODE_ORDER = 1000
_MODE_PATTERN = re.compile(r"EH1([1-9][0-9]{0,3})", re.ASCII | re.IGNORECASE)
#: Section and key names shown as typed; anything else is shown quoted (repr).
_PLAIN_NAME = re.compile(r"[A-Za-z0-9_+\-]{1,64}", re.ASCII)

# ---------------------------------------------------------------------------------------------
# Specs (SI values only)


@dataclass(frozen=True)
class LaserSpec:
    wavelength: float  #: [m]
    duration_fwhm: float  #: intensity FWHM [s]
    shape: str
    energy: float  #: [J]
    repetition_rate: float | None  #: [Hz]
    gdd: float  #: [s^2]
    spectrum_csv: Path | None
    beam_waist: float | None  #: [m]


@dataclass(frozen=True)
class FiberSpec:
    kind: str
    length: float  #: [m]
    core_radius: float | None  #: [m]
    cladding: str
    wall_thickness: float | None  #: [m]
    bend_radius: float | None  #: [m]
    mode_order: int  #: m of EH1m
    betas: tuple[float, ...]  #: (beta2, beta3, ...) [s^n/m]
    gamma: float | None  #: [1/(W m)]
    loss: float  #: field attenuation [1/m]
    self_steepening: bool
    raman_fraction: float
    raman_tau1: float  #: [s]
    raman_tau2: float  #: [s]
    effective_area: float | None  #: [m^2]


@dataclass(frozen=True)
class GasSpec:
    components: tuple[tuple[str, float], ...]  #: (table name, mole fraction)
    pressure: float  #: [Pa]
    temperature: float  #: [K]
    equation_of_state: str
    ionization_model: str
    table_dirs: tuple[Path, ...]


@dataclass(frozen=True)
class CellSpec:
    rated_pressure: float | None  #: [Pa]
    window_material: str
    window_thickness: float | None  #: [m]
    window_clear_aperture: float | None  #: [m]


@dataclass(frozen=True)
class CompressorSpec:
    air_path: float  #: [m]
    mirror_gdd: float | None  #: per bounce [s^2]
    mirror_tod: float  #: per bounce [s^3]
    mirror_gdd_csv: Path | None
    mirror_band: tuple[float, float] | None  #: wavelengths [m]
    max_bounces: int
    bounces_in_pairs: bool
    objective: str
    wedge_material: str | None
    wedge_max_insertion: float  #: [m]


@dataclass(frozen=True)
class ThzSpec:
    crystal: str
    thickness: float  #: [m]
    cutoff_db: float
    cutoff_quantity: str
    detector_crystal: str | None
    detector_thickness: float | None  #: [m]
    probe_fwhm: float | None  #: [s]
    beam_waist: float | None  #: [m]
    d_eff: float | None  #: [m/V]
    damage_fluence: float | None  #: [J/m^2]


@dataclass(frozen=True)
class LimitsSpec:
    self_focusing_margin: float
    ionization_fraction_limit: float
    window_safety_factor: float
    window_mounting: str
    window_distance: float | None  #: [m]
    entrance_gas_path: float | None  #: [m]
    b_integral_limit: float  #: [rad]
    cladding_damage_fluence: float | None  #: [J/m^2]
    room_volume: float | None  #: [m^3]
    cylinder_volume: float | None  #: [m^3]
    cylinder_pressure: float | None  #: [Pa]


@dataclass(frozen=True)
class SpreadDefaults:
    energy_percent: float
    pressure_percent: float
    fwhm_percent: float


@dataclass(frozen=True)
class GridSpec:
    points: int | None
    time_window: float | None  #: [s]
    z_samples: int
    rtol: float
    stop_ionization_fraction: float


@dataclass(frozen=True)
class PlanConfig:
    """A validated config: SI specs plus the resolved user-unit table (for ``check``)."""

    laser: LaserSpec
    fiber: FiberSpec
    gas: GasSpec | None
    cell: CellSpec
    compressor: CompressorSpec
    thz: ThzSpec
    limits: LimitsSpec
    spread: SpreadDefaults
    grid: GridSpec
    resolved: dict[str, dict[str, Any]]
    present_sections: tuple[str, ...]
    source: Path | None = None
    overrides: tuple[str, ...] = field(default=())


# ---------------------------------------------------------------------------------------------
# Overrides


def parse_override(text: str) -> tuple[str, str, Any]:
    """Split ``section.key=value`` into its parts and parse the value as TOML."""
    if "=" not in text:
        raise ConfigError(f"--set {text!r}: expected section.key=value")
    path, _, raw = text.partition("=")
    path = path.strip()
    parts = path.split(".")
    if len(parts) != 2 or not all(parts):
        raise ConfigError(f"--set {text!r}: the key path must be section.key, got {path!r}")
    section, key = (part.strip() for part in parts)
    _known_key(section, key, prefix="--set ")
    try:
        value = parse_toml_value(raw)
    except ValueError as exc:
        raise ConfigError(f"--set {path}: {exc}") from None
    return section, key, value


def apply_overrides(raw: dict[str, Any], overrides: list[str] | tuple[str, ...]) -> dict:
    """Return a copy of the raw TOML mapping with each ``section.key=value`` applied."""
    data = {k: (dict(v) if isinstance(v, dict) else v) for k, v in raw.items()}
    for text in overrides:
        section, key, value = parse_override(text)
        table = data.setdefault(section, {})
        if not isinstance(table, dict):
            raise ConfigError(f"--set {section}.{key}: [{section}] in the file is not a table")
        table[key] = value
        if section == "gas" and key in ("species", "mixture"):
            table.pop("mixture" if key == "species" else "species", None)
    return data


# ---------------------------------------------------------------------------------------------
# Key checks


def _suggest(name: str, options) -> str:
    """'; did you mean ...?' with the closest option (case-insensitive), or ''."""
    by_lower = {str(option).lower(): option for option in options}
    close = difflib.get_close_matches(str(name).lower(), list(by_lower), n=1, cutoff=0.5)
    return f"; did you mean {by_lower[close[0]]!r}?" if close else ""


def _name(name: Any) -> str:
    """A section or key name for a message: as typed if plain, else quoted (one line)."""
    text = str(name)
    return text if _PLAIN_NAME.fullmatch(text) else repr(text[:64])


def _known_key(section: str, key: str, prefix: str = "") -> Key:
    if section not in SCHEMA:
        raise ConfigError(
            f"{prefix}{_name(section)}.{_name(key)}: unknown section [{_name(section)}]"
            f"{_suggest(section, SCHEMA)} (sections: {', '.join(SCHEMA)})"
        )
    if key not in SCHEMA[section]:
        raise ConfigError(
            f"{prefix}{section}.{_name(key)}: unknown key{_suggest(key, SCHEMA[section])} "
            f"(keys of [{section}]: {', '.join(SCHEMA[section])})"
        )
    return SCHEMA[section][key]


#: Longest rendering of a received value in a message. [characters]
_MAX_SHOWN = 120


def _describe(value: Any) -> str:
    """The received value for a message: one line, shortened if long."""
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) > 10**30:
        return f"{'-' if value < 0 else ''}~1e{int(abs(value).bit_length() * math.log10(2))}"
    try:
        text = repr(value) if isinstance(value, str) else str(value)
    except ValueError:  # e.g. a list holding an integer too long to print
        text = f"<{type(value).__name__}>"
    text = " ".join(text.split())
    return text if len(text) <= _MAX_SHOWN else text[:_MAX_SHOWN] + "..."


def _check_number(path: str, value: Any, spec: Key, integer: bool) -> float | int:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        kind = "an integer" if integer else "a number"
        raise ConfigError(f"{path} = {_describe(value)}: must be {kind}")
    if integer and not isinstance(value, int):
        raise ConfigError(f"{path} = {value}: must be an integer")
    if isinstance(value, float) and not math.isfinite(value):
        raise ConfigError(f"{path} = {value}: must be a finite number")
    shown = _describe(value)  # int/float comparisons below are exact, even for huge ints
    if spec.low is not None:
        if spec.low_open and not value > spec.low:
            raise ConfigError(f"{path} = {shown}: must be > {spec.low:g}")
        if not spec.low_open and not value >= spec.low:
            raise ConfigError(f"{path} = {shown}: must be >= {spec.low:g}")
    if spec.high is not None and value > spec.high:
        raise ConfigError(f"{path} = {shown}: must be <= {spec.high:g}")
    if integer:
        return value
    try:
        return float(value)
    except OverflowError:
        raise ConfigError(f"{path} = {shown}: too large for a floating-point number") from None


def _check_fractions(path: str, value: Any) -> dict[str, float]:
    if not isinstance(value, dict) or not value:
        raise ConfigError(f"{path}: must be a table of gas = mole fraction, e.g. "
                          "{ He = 0.7, Ar = 0.3 }")
    out = {}
    for name, frac in value.items():
        where = f"{path}.{_name(name)}"
        if not str(name).strip():
            raise ConfigError(f"{where}: the gas name must not be empty")
        if isinstance(frac, bool) or not isinstance(frac, (int, float)):
            raise ConfigError(f"{where} = {_describe(frac)}: must be a finite number")
        if isinstance(frac, float) and not math.isfinite(frac):
            raise ConfigError(f"{where} = {frac}: must be a finite number")
        if not 0.0 < frac <= 1.0:
            raise ConfigError(f"{where} = {_describe(frac)}: must be > 0 and <= 1")
        out[name] = float(frac)
    total = sum(out.values())
    if abs(total - 1.0) > 1e-6:
        raise ConfigError(f"{path}: mole fractions sum to {total:.6g}, must sum to 1")
    return out


def _finite_float(path: str, value: Any) -> float:
    """``value`` as a finite float, or a ConfigError naming ``path``."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ConfigError(f"{path} = {_describe(value)}: must be a finite number")
    try:
        number = float(value)
    except OverflowError:
        number = math.inf
    if not math.isfinite(number):
        raise ConfigError(f"{path} = {_describe(value)}: must be a finite number")
    return number


def _check_value(path: str, value: Any, spec: Key) -> Any:
    kind = spec.kind
    if kind in ("float", "int"):
        return _check_number(path, value, spec, integer=(kind == "int"))
    if kind == "bool":
        if not isinstance(value, bool):
            raise ConfigError(f"{path} = {_describe(value)}: must be true or false")
        return value
    if kind in ("str", "path", "choice"):
        if not isinstance(value, str) or not value.strip():
            raise ConfigError(f"{path} = {_describe(value)}: must be a non-empty string")
        if kind == "choice" and value not in spec.choices:
            raise ConfigError(f"{path} = {value!r}: must be one of {', '.join(spec.choices)}"
                              f"{_suggest(value, spec.choices)}")
        return value
    if kind == "float_list":
        if not isinstance(value, list) or not value:
            raise ConfigError(f"{path}: must be a non-empty list of numbers")
        return [_finite_float(f"{path}[{i}]", v) for i, v in enumerate(value)]
    if kind == "band":
        if (not isinstance(value, list) or len(value) != 2
                or any(isinstance(v, bool) or not isinstance(v, (int, float)) for v in value)):
            raise ConfigError(f"{path} = {_describe(value)}: must be [low, high]")
        lo, hi = (_finite_float(path, v) for v in value)
        if not 0.0 < lo < hi:
            raise ConfigError(f"{path} = {_describe(value)}: must be [low, high] with "
                              "0 < low < high")
        return [lo, hi]
    if kind == "fractions":
        return _check_fractions(path, value)
    raise AssertionError(f"schema kind {kind!r} not handled")  # a bug, not bad input


def validate_raw(raw: dict[str, Any]) -> dict[str, dict[str, Any]]:
    """Check sections and keys, fill defaults; return the resolved table (user units).

    Problems are reported in reading order: unknown sections, then each present section's keys
    and values, then missing sections and missing required keys.
    """
    for section, table in raw.items():
        if section not in SCHEMA:
            raise ConfigError(f"[{_name(section)}]: unknown section{_suggest(section, SCHEMA)} "
                              f"(sections: {', '.join(SCHEMA)})")
        if not isinstance(table, dict):
            raise ConfigError(f"{section} = {_describe(table)}: must be a [{section}] table")
    checked: dict[str, dict[str, Any]] = {}
    for section, table in raw.items():
        checked[section] = {key: _check_value(f"{section}.{key}", value,
                                              _known_key(section, key))
                            for key, value in table.items()}
    for section in REQUIRED_SECTIONS:
        if section not in raw:
            raise ConfigError(f"[{section}]: required section is missing")
    taylor = checked["fiber"].get("kind") == "taylor"
    resolved: dict[str, dict[str, Any]] = {}
    for section, keys in SCHEMA.items():
        given = checked.get(section, {})
        out: dict[str, Any] = {}
        for key, spec in keys.items():
            if key in given:
                out[key] = given[key]
            elif spec.default is REQUIRED:
                if section in raw and not (section == "gas" and taylor):
                    raise ConfigError(f"{section}.{key}: required key is missing")
                out[key] = None
            else:
                out[key] = spec.default
        resolved[section] = out
    return resolved


# ---------------------------------------------------------------------------------------------
# Cross-checks


def _require(resolved: dict, section: str, key: str, why: str) -> None:
    if resolved[section][key] is None:
        raise ConfigError(f"{section}.{key}: required {why}")


def _cross_check_fiber(resolved: dict) -> None:
    fiber = resolved["fiber"]
    kind = fiber["kind"]
    if kind in ("capillary", "antiresonant"):
        _require(resolved, "fiber", "core_diameter_um", f"for kind = {kind!r}")
    if kind == "antiresonant":
        _require(resolved, "fiber", "wall_thickness_um", "for kind = 'antiresonant'")
        if fiber["wall_thickness_um"] >= fiber["core_diameter_um"] / 2:
            raise ConfigError(f"fiber.wall_thickness_um = {fiber['wall_thickness_um']}: must be "
                              f"smaller than the core radius ({fiber['core_diameter_um'] / 2} um)")
    if kind == "taylor":
        _require(resolved, "fiber", "betas_fs_n_per_mm", "for kind = 'taylor'")
        _require(resolved, "fiber", "gamma_per_w_per_m", "for kind = 'taylor'")
    else:
        taylor_only = ("betas_fs_n_per_mm", "gamma_per_w_per_m", "effective_area_um2")
        for key in taylor_only:
            if fiber[key] is not None:
                raise ConfigError(f"fiber.{key}: only allowed with kind = 'taylor' "
                                  f"(kind is {kind!r})")
    mode = fiber["mode"]
    match = _MODE_PATTERN.fullmatch(mode.strip())
    if match is None or int(match.group(1)) > MAX_MODE_ORDER:
        raise ConfigError(f"fiber.mode = {_describe(mode)}: must be EH1m with "
                          f"1 <= m <= {MAX_MODE_ORDER} (e.g. 'EH11')")


def _cross_check_gas(resolved: dict, present: set[str]) -> None:
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


def _cross_check_compressor(resolved: dict) -> None:
    comp = resolved["compressor"]
    if comp["mirror_gdd_fs2"] is not None and comp["mirror_gdd_csv"] is not None:
        raise ConfigError("compressor.mirror_gdd_fs2 and compressor.mirror_gdd_csv: give one "
                          "of them, not both")
    if comp["wedge_max_insertion_mm"] > 0 and comp["wedge_material"] is None:
        raise ConfigError("compressor.wedge_material: required when wedge_max_insertion_mm > 0")
    thz = resolved["thz"]
    if (thz["detector_crystal"] is None) != (thz["detector_thickness_mm"] is None):
        raise ConfigError("thz.detector_crystal and thz.detector_thickness_mm: give both or "
                          "neither")


def _check_names(resolved: dict, present: set[str], table_dirs: tuple[Path, ...]) -> None:
    """Check gas, material and crystal names against the shipped and user tables."""
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
                raise ConfigError(f"{key} = {name!r}: unknown gas{_suggest(name, valid)} "
                                  f"(available: {', '.join(valid)})") from exc
    material_keys = [("fiber", "cladding"), ("cell", "window_material"),
                     ("compressor", "wedge_material")]
    valid_solids = solids.material_names()
    for section, key in material_keys:
        name = resolved[section][key]
        if name is not None and name not in valid_solids:
            raise ConfigError(f"{section}.{key} = {name!r}: unknown material"
                              f"{_suggest(name, valid_solids)} "
                              f"(available: {', '.join(valid_solids)})")
    valid_crystals = crystals.crystal_names()
    for key in ("crystal", "detector_crystal"):
        name = resolved["thz"][key]
        if name is not None and name.lower() not in {v.lower() for v in valid_crystals}:
            raise ConfigError(f"thz.{key} = {name!r}: unknown crystal"
                              f"{_suggest(name, valid_crystals)} "
                              f"(available: {', '.join(valid_crystals)})")


def _resolve_path(value: str | None, base: Path, key: str, must_be_dir: bool = False):
    if value is None:
        return None
    try:
        path = Path(value).expanduser()
        if not path.is_absolute():
            path = base / path
        found = path.is_dir() if must_be_dir else path.is_file()
    except (OSError, RuntimeError, ValueError) as exc:  # unknown ~user, name too long, NUL
        raise ConfigError(f"{key} = {_describe(value)}: not a usable path ({exc})") from None
    if not found:
        what = "folder" if must_be_dir else "file"
        raise ConfigError(f"{key} = {_describe(value)}: {what} not found ({path})")
    return path


def _checked_csv(value: str | None, base: Path, key: str, column: str | None):
    """Resolve a CSV path and read it once, so a bad file is reported before any run.

    ``column`` names the value column (``None`` for a spectrum: ``intensity``, >= 0).
    """
    path = _resolve_path(value, base, key)
    if path is None:
        return None
    from hcfplan.io.csvdata import read_curve_csv, read_spectrum_csv

    try:
        if column is None:
            read_spectrum_csv(path)
        else:
            read_curve_csv(path, column)
    except ConfigError as exc:
        raise ConfigError(f"{key}: {exc}") from None
    return path


# ---------------------------------------------------------------------------------------------
# SI specs


def _si(value, suffix):
    return None if value is None else units.to_si(value, suffix)


def _build_fiber(f: dict) -> FiberSpec:
    core = _si(f["core_diameter_um"], "um")
    return FiberSpec(
        kind=f["kind"], length=f["length_m"],
        core_radius=None if core is None else core / 2,
        cladding=f["cladding"], wall_thickness=_si(f["wall_thickness_um"], "um"),
        bend_radius=f["bend_radius_m"],
        mode_order=int(_MODE_PATTERN.fullmatch(f["mode"].strip()).group(1)),
        betas=tuple(units.taylor_betas_to_si(f["betas_fs_n_per_mm"] or [])),
        gamma=f["gamma_per_w_per_m"],
        loss=units.power_loss_db_per_m_to_field_attenuation(f["loss_db_per_m"]),
        self_steepening=f["self_steepening"], raman_fraction=f["raman_fraction"],
        raman_tau1=units.to_si(f["raman_tau1_fs"], "fs"),
        raman_tau2=units.to_si(f["raman_tau2_fs"], "fs"),
        effective_area=_si(f["effective_area_um2"], "um2"),
    )


def _build_gas(g: dict, present: set[str], table_dirs: tuple[Path, ...]) -> GasSpec | None:
    if "gas" not in present:
        return None
    if g["species"] is not None:
        components = ((g["species"], 1.0),)
    else:
        components = tuple(g["mixture"].items())
    return GasSpec(components=components, pressure=units.to_si(g["pressure_bar"], "bar"),
                   temperature=g["temperature_k"], equation_of_state=g["equation_of_state"],
                   ionization_model=g["ionization_model"], table_dirs=table_dirs)


def _build_specs(r: dict, present: set[str], base: Path, extra_gas_dirs) -> dict:
    las, cell, comp, thz, grid = r["laser"], r["cell"], r["compressor"], r["thz"], r["grid"]
    lim = r["limits"]
    gas_dir = _resolve_path(r["gas"]["table_dir"], base, "gas.table_dir", must_be_dir=True)
    table_dirs = tuple(([gas_dir] if gas_dir else []) + [Path(d) for d in extra_gas_dirs])
    _check_names(r, present, table_dirs)
    band = comp["mirror_band_nm"]
    return dict(
        laser=LaserSpec(
            wavelength=units.to_si(las["wavelength_nm"], "nm"),
            duration_fwhm=units.to_si(las["fwhm_fs"], "fs"), shape=las["shape"],
            energy=units.to_si(las["energy_uj"], "uj"),
            repetition_rate=_si(las["repetition_khz"], "khz"),
            gdd=units.to_si(las["gdd_fs2"], "fs2"),
            spectrum_csv=_checked_csv(las["spectrum_csv"], base, "laser.spectrum_csv", None),
            beam_waist=_si(las["beam_waist_um"], "um")),
        fiber=_build_fiber(r["fiber"]),
        gas=_build_gas(r["gas"], present, table_dirs),
        cell=CellSpec(rated_pressure=_si(cell["rated_pressure_bar"], "bar"),
                      window_material=cell["window_material"],
                      window_thickness=_si(cell["window_thickness_mm"], "mm"),
                      window_clear_aperture=_si(cell["window_clear_aperture_mm"], "mm")),
        compressor=CompressorSpec(
            air_path=comp["air_path_m"], mirror_gdd=_si(comp["mirror_gdd_fs2"], "fs2"),
            mirror_tod=units.to_si(comp["mirror_tod_fs3"], "fs3"),
            mirror_gdd_csv=_checked_csv(comp["mirror_gdd_csv"], base,
                                        "compressor.mirror_gdd_csv", "gdd_fs2"),
            mirror_band=None if band is None else (band[0] * 1e-9, band[1] * 1e-9),
            max_bounces=comp["max_bounces"], bounces_in_pairs=comp["bounces_in_pairs"],
            objective=comp["objective"], wedge_material=comp["wedge_material"],
            wedge_max_insertion=units.to_si(comp["wedge_max_insertion_mm"], "mm")),
        thz=ThzSpec(
            crystal=thz["crystal"], thickness=units.to_si(thz["thickness_mm"], "mm"),
            cutoff_db=thz["cutoff_db"], cutoff_quantity=thz["cutoff_quantity"],
            detector_crystal=thz["detector_crystal"],
            detector_thickness=_si(thz["detector_thickness_mm"], "mm"),
            probe_fwhm=_si(thz["probe_fwhm_fs"], "fs"), beam_waist=_si(thz["beam_waist_um"], "um"),
            d_eff=_si(thz["d_eff_pm_per_v"], "pm_per_v"),
            damage_fluence=_si(thz["damage_fluence_j_per_cm2"], "j_per_cm2")),
        limits=LimitsSpec(
            self_focusing_margin=lim["self_focusing_margin"],
            ionization_fraction_limit=lim["ionization_fraction_limit"],
            window_safety_factor=lim["window_safety_factor"],
            window_mounting=lim["window_mounting"], window_distance=lim["window_distance_m"],
            entrance_gas_path=lim["entrance_gas_path_m"],
            b_integral_limit=lim["b_integral_limit_rad"],
            cladding_damage_fluence=_si(lim["cladding_damage_fluence_j_per_cm2"], "j_per_cm2"),
            room_volume=lim["room_volume_m3"], cylinder_volume=_si(lim["cylinder_volume_l"], "l"),
            cylinder_pressure=_si(lim["cylinder_pressure_bar"], "bar")),
        spread=SpreadDefaults(**r["spread"]),
        grid=GridSpec(points=grid["points"], time_window=_si(grid["time_window_fs"], "fs"),
                      z_samples=grid["z_samples"], rtol=grid["rtol"],
                      stop_ionization_fraction=grid["stop_ionization_fraction"]),
    )


def config_from_mapping(raw: dict[str, Any], *, base_dir: Path | str = ".",
                        overrides=(), extra_gas_dirs=(), source: Path | None = None) -> PlanConfig:
    """Validate a parsed TOML mapping (after ``overrides``) and build the SI specs."""
    data = apply_overrides(raw, list(overrides))
    present = {s for s in data if isinstance(data[s], dict)}
    resolved = validate_raw(data)
    _cross_check_fiber(resolved)
    _cross_check_gas(resolved, present)
    _cross_check_compressor(resolved)
    specs = _build_specs(resolved, present, Path(base_dir), extra_gas_dirs)
    shown = {s: t for s, t in resolved.items() if s in present or s in REQUIRED_SECTIONS}
    return PlanConfig(**specs, resolved=shown, present_sections=tuple(sorted(present)),
                      source=source, overrides=tuple(overrides))


def load_config(path: str | Path, overrides=(), extra_gas_dirs=()) -> PlanConfig:
    """Read, override, validate and convert a config file. Raises ConfigError (one line)."""
    path = Path(path)
    raw = read_toml(path)
    return config_from_mapping(raw, base_dir=path.parent, overrides=overrides,
                               extra_gas_dirs=extra_gas_dirs, source=path)
