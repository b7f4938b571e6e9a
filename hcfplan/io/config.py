"""TOML config -> validated, defaults-filled, frozen SI specs.

Loading runs in four steps, each of which reports the first problem as one
:class:`~hcfplan.errors.ConfigError` line naming the key path:

1. read and parse the file (:func:`hcfplan.io.tomlio.read_toml`);
2. apply ``--set section.key=value`` overrides (:func:`apply_overrides`);
3. check every section and key against :data:`hcfplan.io.schema.SCHEMA` (unknown keys get the
   nearest valid key suggested; types, finiteness and ranges are checked) and fill defaults
   (:mod:`hcfplan.io.checks`);
4. cross-check keys that depend on each other (:mod:`hcfplan.io.crosschecks`), read the CSV
   files the config names, and convert to SI once, into the frozen specs of
   :mod:`hcfplan.io.specs`. A run needs no file access after this.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path
from typing import Any

import numpy as np

from hcfplan import units
from hcfplan.errors import ConfigError
from hcfplan.io import crosschecks, stages
from hcfplan.io.checks import describe, known_key, shown_keys, validate_raw
from hcfplan.io.schema import REQUIRED_SECTIONS
from hcfplan.io.specs import (
    CellSpec,
    CompressorSpec,
    FiberSpec,
    GasSpec,
    GridSpec,
    LaserSpec,
    LimitsSpec,
    MeasuredCurve,
    MeasuredField,
    PlanConfig,
    SpreadDefaults,
    ThzSpec,
)
from hcfplan.io.tomlio import parse_toml_value, read_toml

#: The specs are re-exported here: ``from hcfplan.io.config import PlanConfig`` keeps working.
__all__ = ["CellSpec", "CompressorSpec", "FiberSpec", "GasSpec", "GridSpec", "LaserSpec",
           "LimitsSpec", "MeasuredCurve", "PlanConfig", "SpreadDefaults", "ThzSpec",
           "apply_overrides", "config_from_mapping", "load_config", "parse_override"]


# ---------------------------------------------------------------------------------------------
# Overrides


def parse_override(text: str) -> tuple[str, str, Any]:
    """Split ``section.key=value`` into its parts and parse the value as TOML.

    A key of one stage, ``stage.K.section.key=value``, returns the section as ``stage.K.section``.
    """
    if "=" not in text:
        raise ConfigError(f"--set {text!r}: expected section.key=value")
    path, _, raw = text.partition("=")
    path = path.strip()
    index, inner = stages.split_stage_path(path, "--set ")
    parts = inner.split(".")
    if len(parts) != 2 or not all(parts):
        raise ConfigError(f"--set {text!r}: the key path must be section.key (or "
                          f"stage.K.section.key), got {path!r}")
    section, key = (part.strip() for part in parts)
    known_key(section, key, prefix="--set " if index is None else f"--set stage.{index}.")
    if index is not None:
        section = stages.stage_label(index, section)
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
        index, inner = stages.split_stage_path(section)
        if index is not None:
            stages.stage_override(data, index, inner, key, value)
            continue
        stages.refuse_top_level_stage_key(data, section, key)
        table = data.setdefault(section, {})
        if not isinstance(table, dict):
            raise ConfigError(f"--set {section}.{key}: [{section}] in the file is not a table")
        table[key] = value
        if section == "gas" and key in ("species", "mixture"):
            table.pop("mixture" if key == "species" else "species", None)
    return data


# ---------------------------------------------------------------------------------------------
# Files named by the config


def _resolve_path(value: str | None, base: Path, key: str, must_be_dir: bool = False):
    if value is None:
        return None
    try:
        path = Path(value).expanduser()
        if not path.is_absolute():
            path = base / path
        found = path.is_dir() if must_be_dir else path.is_file()
    except (OSError, RuntimeError, ValueError) as exc:  # unknown ~user, name too long, NUL
        raise ConfigError(f"{key} = {describe(value)}: not a usable path ({exc})") from None
    if not found:
        what = "folder" if must_be_dir else "file"
        raise ConfigError(f"{key} = {describe(value)}: {what} not found ({path})")
    return path


def _measured_curve(value: str | None, base: Path, key: str,
                    column: str | None) -> MeasuredCurve | None:
    """Resolve a CSV path and read it now, so a bad file is reported before any run and the
    run itself reads no file.

    ``column`` names the value column (``None`` for a spectrum: ``intensity``, >= 0).
    """
    path = _resolve_path(value, base, key)
    if path is None:
        return None
    from hcfplan.io.csvdata import read_curve_csv, read_spectrum_csv

    try:
        if column is None:
            wavelength, values = read_spectrum_csv(path)
        else:
            wavelength, values = read_curve_csv(path, column)
    except ConfigError as exc:
        raise ConfigError(f"{key}: {exc}") from None
    return MeasuredCurve(source=path, wavelength=wavelength, values=values)


def _measured_field(value: str | None, base: Path, resolved: dict) -> MeasuredField | None:
    """``laser.field_csv`` read now; its FWHM must match ``laser.fwhm_fs`` (which sizes the
    grid and the first-look estimates)."""
    path = _resolve_path(value, base, "laser.field_csv")
    if path is None:
        return None
    from hcfplan.io.csvdata import read_field_csv

    try:
        field = MeasuredField(path, *read_field_csv(path))
    except ConfigError as exc:
        raise ConfigError(f"laser.field_csv: {exc}") from None
    crosschecks.check_field_duration(field, resolved)
    return field


# ---------------------------------------------------------------------------------------------
# SI specs


def _si(value, suffix):
    return None if value is None else units.to_si(value, suffix)


def _fiber_loss_curve(f: dict, base: Path) -> MeasuredCurve | None:
    """``fiber.loss_csv`` read now, losses >= 0, converted to field attenuation [1/m]."""
    curve = _measured_curve(f["loss_csv"], base, "fiber.loss_csv", "loss_db_per_m")
    if curve is None:
        return None
    negative = np.flatnonzero(curve.values < 0)
    if negative.size:
        raise ConfigError(f"fiber.loss_csv: {curve.source}: loss {curve.values[negative[0]]:g} "
                          f"dB/m at {curve.wavelength[negative[0]] * 1e9:g} nm: losses must "
                          "be >= 0")
    alpha = units.power_loss_db_per_m_to_field_attenuation(curve.values)
    return MeasuredCurve(source=curve.source, wavelength=curve.wavelength, values=alpha)


def _fiber_gvd_curve(f: dict, base: Path, pump_nm: float) -> MeasuredCurve | None:
    """``fiber.gvd_csv`` read now (beta2 in s^2/m); it must contain the pump."""
    curve = _measured_curve(f["gvd_csv"], base, "fiber.gvd_csv", "gvd_fs2_per_m")
    if curve is None:
        return None
    lo, hi = curve.wavelength[0] * 1e9, curve.wavelength[-1] * 1e9
    if not lo <= pump_nm <= hi:
        raise ConfigError(f"fiber.gvd_csv: {curve.source} covers {lo:g}-{hi:g} nm; it must "
                          f"contain the pump, laser.wavelength_nm = {pump_nm:g}, about which "
                          "it is integrated to beta(omega)")
    return curve


def _build_fiber(f: dict, base: Path, pump_nm: float) -> FiberSpec:
    core = _si(f["core_diameter_um"], "um")
    flat = f["loss_db_per_m"]
    return FiberSpec(
        kind=f["kind"], length=f["length_m"],
        core_radius=None if core is None else core / 2,
        cladding=f["cladding"], wall_thickness=_si(f["wall_thickness_um"], "um"),
        bend_radius=f["bend_radius_m"],
        mode_order=crosschecks.mode_order(f["mode"]),
        betas=tuple(units.taylor_betas_to_si(f["betas_fs_n_per_mm"] or [])),
        gamma=f["gamma_per_w_per_m"],
        loss=units.power_loss_db_per_m_to_field_attenuation(flat or 0.0),
        self_steepening=f["self_steepening"], raman_fraction=f["raman_fraction"],
        raman_tau1=units.to_si(f["raman_tau1_fs"], "fs"),
        raman_tau2=units.to_si(f["raman_tau2_fs"], "fs"),
        effective_area=_si(f["effective_area_um2"], "um2"),
        flat_loss=None if flat is None else units.power_loss_db_per_m_to_field_attenuation(flat),
        loss_curve=_fiber_loss_curve(f, base),
        gvd_curve=_fiber_gvd_curve(f, base, pump_nm),
        modes=f["modes"],
    )


def _build_gas(g: dict, present: set[str], table_dirs: tuple[Path, ...]) -> GasSpec | None:
    if "gas" not in present:
        return None
    if g["species"] is not None:
        components = ((g["species"], 1.0),)
    else:
        components = tuple(g["mixture"].items())
    ends: tuple[float | None, float | None] = (None, None)
    if g["pressure_bar"] is not None:
        pressure = units.to_si(g["pressure_bar"], "bar")
    else:  # a gradient (crosschecks.check_fill_pressure); the mean is the equivalent fill
        from hcfplan.propagation.profile import mean_pressure

        ends = (units.to_si(g["entrance_pressure_bar"], "bar"),
                units.to_si(g["exit_pressure_bar"], "bar"))
        pressure = mean_pressure(*ends)
    return GasSpec(components=components, pressure=pressure,
                   temperature=g["temperature_k"], equation_of_state=g["equation_of_state"],
                   ionization_model=g["ionization_model"], table_dirs=table_dirs,
                   entrance_pressure=ends[0], exit_pressure=ends[1],
                   density_scale=g["density_scale"], n2_scale=g["n2_scale"])


def _crystal_dirs(table_dir, base: Path) -> tuple[Path, ...]:
    """User crystal folders: ``thz.table_dir`` (relative to the config) first, then those of
    ``HCFPLAN_CRYSTAL_PATH``; every table in them is validated now."""
    import os

    from hcfplan.materials.crystal_tables import crystal_search_dirs, validate_crystal_dirs

    folder = _resolve_path(table_dir, base, "thz.table_dir", must_be_dir=True)
    dirs = tuple(crystal_search_dirs([folder] if folder else [], os.environ))
    validate_crystal_dirs(dirs)
    return dirs


def _build_specs(r: dict, present: set[str], base: Path, extra_gas_dirs) -> dict:
    las, cell, comp, thz, grid = r["laser"], r["cell"], r["compressor"], r["thz"], r["grid"]
    lim = r["limits"]
    gas_dir = _resolve_path(r["gas"]["table_dir"], base, "gas.table_dir", must_be_dir=True)
    table_dirs = tuple(([gas_dir] if gas_dir else []) + [Path(d) for d in extra_gas_dirs])
    crystal_dirs = _crystal_dirs(r["thz"]["table_dir"], base)
    crosschecks.check_names(r, present, table_dirs, crystal_dirs)
    crosschecks.check_crystal_absorption(r, present, crystal_dirs)
    band = comp["mirror_band_nm"]
    field = _measured_field(las["field_csv"], base, r)
    spectrum = _measured_curve(las["spectrum_csv"], base, "laser.spectrum_csv", None)
    if field is not None and field.axis == "wavelength":  # checked as a measured spectrum
        spectrum = MeasuredCurve(source=field.source, wavelength=field.x,
                                 values=field.intensity)
    if spectrum is not None:
        crosschecks.check_measured_spectrum(spectrum.wavelength, r)
        if band is not None:
            crosschecks.check_band_share(band, r, crosschecks.band_share_measured(
                band, spectrum.wavelength, spectrum.values))
    mirror_curve = _measured_curve(comp["mirror_gdd_csv"], base, "compressor.mirror_gdd_csv",
                                   "gdd_fs2")
    if mirror_curve is not None:
        crosschecks.check_mirror_curve(mirror_curve.wavelength, r)
    crosschecks.check_gas_tables(r, present, table_dirs,
                                 None if spectrum is None else spectrum.wavelength)
    return dict(
        laser=LaserSpec(
            wavelength=units.to_si(las["wavelength_nm"], "nm"),
            duration_fwhm=units.to_si(las["fwhm_fs"], "fs"), shape=las["shape"],
            energy=units.to_si(las["energy_uj"], "uj"),
            repetition_rate=_si(las["repetition_khz"], "khz"),
            gdd=units.to_si(las["gdd_fs2"], "fs2"),
            spectrum=None if field is not None else spectrum,
            beam_waist=_si(las["beam_waist_um"], "um"),
            polarization=las["polarization"], field=field),
        fiber=_build_fiber(r["fiber"], base, las["wavelength_nm"]),
        gas=_build_gas(r["gas"], present, table_dirs),
        cell=CellSpec(rated_pressure=_si(cell["rated_pressure_bar"], "bar"),
                      window_material=cell["window_material"],
                      window_thickness=_si(cell["window_thickness_mm"], "mm"),
                      window_clear_aperture=_si(cell["window_clear_aperture_mm"], "mm"),
                      entrance_window_material=cell["entrance_window_material"],
                      entrance_window_thickness=_si(cell["entrance_window_thickness_mm"], "mm"),
                      window_coating=cell["window_coating"]),
        compressor=CompressorSpec(
            air_path=comp["air_path_m"], mirror_gdd=_si(comp["mirror_gdd_fs2"], "fs2"),
            mirror_tod=units.to_si(comp["mirror_tod_fs3"], "fs3"),
            mirror_gdd_curve=mirror_curve,
            mirror_band=None if band is None else (band[0] * 1e-9, band[1] * 1e-9),
            max_bounces=comp["max_bounces"], bounces_in_pairs=comp["bounces_in_pairs"],
            objective=comp["objective"], wedge_material=comp["wedge_material"],
            wedge_max_insertion=units.to_si(comp["wedge_max_insertion_mm"], "mm"),
            mirror_reflectivity=comp["mirror_reflectivity"]),
        thz=ThzSpec(
            crystal=thz["crystal"], thickness=units.to_si(thz["thickness_mm"], "mm"),
            cutoff_db=thz["cutoff_db"], cutoff_quantity=thz["cutoff_quantity"],
            detector_crystal=thz["detector_crystal"],
            detector_thickness=_si(thz["detector_thickness_mm"], "mm"),
            probe_fwhm=_si(thz["probe_fwhm_fs"], "fs"), beam_waist=_si(thz["beam_waist_um"], "um"),
            d_eff=_si(thz["d_eff_pm_per_v"], "pm_per_v"),
            damage_fluence=_si(thz["damage_fluence_j_per_cm2"], "j_per_cm2"),
            geometry=thz["geometry"], focus_f_number=thz["focus_f_number"],
            table_dirs=crystal_dirs),
        limits=LimitsSpec(
            self_focusing_margin=lim["self_focusing_margin"],
            ionization_fraction_limit=lim["ionization_fraction_limit"],
            window_safety_factor=lim["window_safety_factor"],
            window_mounting=lim["window_mounting"], window_distance=lim["window_distance_m"],
            entrance_gas_path=lim["entrance_gas_path_m"],
            b_integral_limit=lim["b_integral_limit_rad"],
            cladding_damage_fluence=_si(lim["cladding_damage_fluence_j_per_cm2"], "j_per_cm2"),
            room_volume=lim["room_volume_m3"], cylinder_volume=_si(lim["cylinder_volume_l"], "l"),
            cylinder_pressure=_si(lim["cylinder_pressure_bar"], "bar"),
            rating_fraction=lim["rating_fraction"]),
        spread=SpreadDefaults(**r["spread"]),
        grid=GridSpec(points=grid["points"], time_window=_si(grid["time_window_fs"], "fs"),
                      z_samples=grid["z_samples"], rtol=grid["rtol"],
                      stop_ionization_fraction=grid["stop_ionization_fraction"],
                      center_wavelength=_si(grid["center_wavelength_nm"], "nm")),
    )


def config_from_mapping(raw: dict[str, Any], *, base_dir: Path | str = ".",
                        overrides=(), extra_gas_dirs=(), source: Path | None = None) -> PlanConfig:
    """Validate a parsed TOML mapping (after ``overrides``) and build the SI specs."""
    data = apply_overrides(raw, list(overrides))
    if stages.is_staged(data):
        return _staged_config(data, base_dir=Path(base_dir), overrides=tuple(overrides),
                              extra_gas_dirs=extra_gas_dirs, source=source)
    present = {s for s in data if isinstance(data[s], dict)}
    resolved = validate_raw(data)
    crosschecks.check_fiber(resolved)
    crosschecks.check_modes(resolved)
    crosschecks.check_gas(resolved, present)
    crosschecks.check_compressor(resolved)
    crosschecks.check_grid(resolved)
    specs = _build_specs(resolved, present, Path(base_dir), extra_gas_dirs)
    shown = {s: t for s, t in shown_keys(resolved).items()
             if s in present or s in REQUIRED_SECTIONS}
    return PlanConfig(**specs, resolved=shown, present_sections=tuple(sorted(present)),
                      source=source, overrides=tuple(overrides))


def _staged_config(data: dict, *, base_dir: Path, overrides: tuple, extra_gas_dirs,
                   source: Path | None) -> PlanConfig:
    """A ``[[stage]]`` config: each stage built as a single-stage config (the shared sections
    plus its own), returned as stage 0's config with ``stages`` holding all of them and
    ``resolved`` the whole staged table."""
    built = []
    for index, mapping in enumerate(stages.stage_mappings(data)):
        try:
            built.append(config_from_mapping(mapping, base_dir=base_dir,
                                             extra_gas_dirs=extra_gas_dirs, source=source))
        except ConfigError as exc:
            raise stages.prefixed_error(index, exc) from None
    crosschecks.check_staged_modes([c.fiber.modes for c in built])
    resolved = stages.staged_resolved(built[0].resolved, [c.resolved for c in built])
    return replace(built[0], resolved=resolved, stages=tuple(built), overrides=overrides)


def load_config(path: str | Path, overrides=(), extra_gas_dirs=()) -> PlanConfig:
    """Read, override, validate and convert a config file. Raises ConfigError (one line)."""
    path = Path(path)
    raw = read_toml(path)
    return config_from_mapping(raw, base_dir=path.parent, overrides=overrides,
                               extra_gas_dirs=extra_gas_dirs, source=path)
