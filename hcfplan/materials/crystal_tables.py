"""Nonlinear-crystal tables: the frozen records, the TOML loader and its validation.

Each crystal is one TOML file (data only, a source string beside every number) in the shipped
folder ``hcfplan/materials/data/crystals`` or in a user folder. :func:`load_crystal` turns it into
a frozen :class:`CrystalTable` of SI values; :mod:`hcfplan.materials.crystals` evaluates it
(optical and THz indices, absorption, coherence length). Sellmeier coefficients are kept as
printed (micrometre units) and converted when a model is evaluated.
"""

from __future__ import annotations

import copy
import os
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import Any, Literal, get_args

import numpy as np

from hcfplan.constants import eV
from hcfplan.errors import ConfigError
from hcfplan.materials.table_files import read_table_toml

OpticalModelName = Literal["sellmeier_pole_um", "sellmeier_pole_um2", "tabulated_um", "constant"]
ThzModelName = Literal["lorentz", "constant"]
#: Model names a table may give; the evaluators are in :mod:`hcfplan.materials.crystals`.
OPTICAL_MODEL_NAMES: tuple[str, ...] = get_args(OpticalModelName)
THZ_MODEL_NAMES: tuple[str, ...] = get_args(ThzModelName)

_PACKAGE_DATA = "hcfplan.materials.data.crystals"
_LOCAL_DATA = Path(__file__).parent / "data" / "crystals"

#: Property keys allowed in ``[properties]`` -> (field name, factor to SI).
#: ``ev`` and ``cm_per_gw`` are not in :data:`hcfplan.units.SUFFIXES`, so they are converted here.
_PROPERTY_KEYS: dict[str, tuple[str, float]] = {
    "r41_pm_per_v": ("r41", 1e-12),
    "d_eff_pm_per_v": ("d_eff", 1e-12),
    "band_gap_direct_ev": ("band_gap_direct", eV),
    "band_gap_indirect_ev": ("band_gap_indirect", eV),
    "two_photon_absorption_cm_per_gw": ("two_photon_coefficient", 1e-2 / 1e9),  # cm/GW -> m/W
    "damage_fluence_j_per_cm2": ("damage_fluence", 1e4),  # J/cm^2 -> J/m^2
    "carrier_mobility_cm2_per_vs": ("carrier_mobility", 1e-4),  # cm^2/(V s) -> m^2/(V s)
}
#: Plausible ranges of the property values, in the file's units (a value outside is refused as
#: a typo or a unit slip; wide on purpose, common practice, no source).
_PROPERTY_RANGES: dict[str, tuple[float, float]] = {
    "r41_pm_per_v": (0.0, 1000.0),
    "d_eff_pm_per_v": (0.0, 1000.0),
    "band_gap_direct_ev": (0.1, 20.0),
    "band_gap_indirect_ev": (0.1, 20.0),
    "two_photon_absorption_cm_per_gw": (0.0, 1000.0),
    "damage_fluence_j_per_cm2": (1e-4, 100.0),
    "carrier_mobility_cm2_per_vs": (0.0, 1e5),
}
#: Range of the refractive indices a table may give, optical and THz (checked where the model
#: is evaluated at the ends of its stated range; common practice, no source).
INDEX_RANGE = (1.0, 30.0)
#: Environment variable naming user crystal folders (``:``-separated; read by io/cli only).
CRYSTAL_PATH_VARIABLE = "HCFPLAN_CRYSTAL_PATH"
#: Keys each block may hold (anything else is refused as a misspelling or a key without unit).
_KNOWN_KEYS: dict[str, frozenset[str]] = {
    "(top level)": frozenset({"name", "description", "check_only", "optical_index",
                              "thz_permittivity", "properties", "notes"}),
    "optical_index": frozenset({"model", "constant", "b", "pole_um", "pole_um2", "index",
                                "wavelength_um", "lambda_sq_term_per_um2", "source",
                                "valid_min_um", "valid_max_um", "range_source"}),
    "thz_permittivity": frozenset({"model", "eps_inf", "index", "oscillators", "source",
                                   "valid_max_thz", "range_source"}),
    "oscillator": frozenset({"frequency_thz", "strength", "damping_thz", "source"}),
}


@dataclass(frozen=True)
class OpticalIndexModel:
    """Optical refractive-index model of a crystal.

    Sellmeier coefficients are kept as printed (wavelength in micrometres); the evaluating
    functions convert. ``table_wavelength`` [m] and ``table_index`` hold tabulated data.
    ``wavelength_min``/``wavelength_max`` [m] bound the validity range.
    """

    model: OpticalModelName
    constant: float
    b: tuple[float, ...]
    poles: tuple[float, ...]
    table_wavelength: tuple[float, ...]
    table_index: tuple[float, ...]
    wavelength_min: float
    wavelength_max: float
    source: str
    lambda_sq_term: float = 0.0  #: coefficient of an extra + c lambda_um^2 term of n^2 [1/um^2]


@dataclass(frozen=True)
class LorentzOscillator:
    """One lattice oscillator: TO angular frequency ``omega`` [rad/s], dimensionless
    ``strength`` S, damping ``damping`` Gamma [rad/s]."""

    omega: float
    strength: float
    damping: float
    source: str


@dataclass(frozen=True)
class ThzDielectricModel:
    """THz dielectric function: ``eps_inf`` plus ``oscillators``, valid up to ``frequency_max``
    [Hz]."""

    model: ThzModelName
    eps_inf: float
    oscillators: tuple[LorentzOscillator, ...]
    frequency_max: float
    source: str


@dataclass(frozen=True)
class CrystalTable:
    """One crystal, all values SI. Optional properties are ``None`` when the table has none.

    Attributes: ``r41`` [m/V], ``d_eff`` [m/V] (optical rectification, P = eps0 d_eff |E|^2),
    ``band_gap_direct``/``band_gap_indirect`` [J], ``two_photon_coefficient`` [m/W] measured at
    ``two_photon_wavelength`` [m], ``damage_fluence`` [J/m^2], ``carrier_mobility`` [m^2/(V s)]
    (of the free carriers two-photon absorption makes). ``sources`` maps each property key of
    the file to its source string; ``notes`` are (key, text) pairs. ``check_only`` marks an
    ideal material for analytic checks, not offered in lists shown to users.
    """

    name: str
    description: str
    path: str
    optical: OpticalIndexModel
    thz: ThzDielectricModel
    r41: float | None = None
    d_eff: float | None = None
    band_gap_direct: float | None = None
    band_gap_indirect: float | None = None
    two_photon_coefficient: float | None = None
    two_photon_wavelength: float | None = None
    damage_fluence: float | None = None
    carrier_mobility: float | None = None
    sources: tuple[tuple[str, str], ...] = ()
    notes: tuple[tuple[str, str], ...] = ()
    check_only: bool = False

    def source(self, key: str) -> str:
        """Source string of a property key of the file (e.g. ``'r41_pm_per_v'``).

        References
        ----------
        None: look-up helper (returns the table's own source string).
        """
        return dict(self.sources).get(key, "")


# ----------------------------------------------------------------------------------------------
# Loading and validation
# ----------------------------------------------------------------------------------------------


def _shipped_files() -> dict[str, Any]:
    """Map lower-case crystal name -> readable file of the shipped folder."""
    try:
        folder = resources.files(_PACKAGE_DATA)
        entries = list(folder.iterdir())
    except (ModuleNotFoundError, FileNotFoundError, NotADirectoryError):
        entries = list(_LOCAL_DATA.glob("*.toml"))
    return {e.name[:-5].lower(): e for e in entries if e.name.endswith(".toml")}


def _user_files(search_dirs: Iterable[str | Path]) -> dict[str, Path]:
    found: dict[str, Path] = {}
    for folder in search_dirs:
        for path in sorted(Path(folder).glob("*.toml")):
            found.setdefault(path.stem.lower(), path)
    return found


def crystal_names(search_dirs: Sequence[str | Path] = ()) -> list[str]:
    """Sorted lower-case names of every crystal table in ``search_dirs`` and the shipped folder.

    References
    ----------
    None: file helper (no published model).
    """
    return sorted(set(_user_files(search_dirs)) | set(_shipped_files()))


def listed_crystal_names(search_dirs: Sequence[str | Path] = ()) -> list[str]:
    """The crystal names offered to users: :func:`crystal_names` without the check-only
    materials (tables with ``check_only = true``, such as ``thin``).

    References
    ----------
    None: file helper (no published model).
    """
    user, shipped = _user_files(search_dirs), _shipped_files()
    out = []
    for name in crystal_names(search_dirs):
        entry = user.get(name) or shipped[name]
        try:
            hidden = read_table_toml(entry, entry.name).get("check_only") is True
        except ConfigError:
            hidden = False  # a malformed file is listed; loading it names the problem
        if not hidden:
            out.append(name)
    return out


def crystal_search_dirs(extra: Sequence[str | Path] = (),
                        environ: Mapping[str, str] | None = None) -> list[Path]:
    """User crystal folders: ``extra`` (``thz.table_dir``) first, then the entries of
    ``HCFPLAN_CRYSTAL_PATH`` (``:``-separated) when ``environ`` is passed.

    Raises
    ------
    ConfigError
        A folder that does not exist, naming where it was set.

    References
    ----------
    None: file helper (no published model).
    """
    dirs = [Path(d) for d in extra]
    if environ is not None:
        dirs += [Path(p) for p in environ.get(CRYSTAL_PATH_VARIABLE, "").split(os.pathsep) if p]
    for d in dirs:
        if not d.is_dir():
            raise ConfigError(f"crystal table directory {str(d)!r}: does not exist (set by "
                              f"thz.table_dir or {CRYSTAL_PATH_VARIABLE})")
    return dirs


def validate_crystal_dirs(search_dirs: Sequence[str | Path]) -> list[str]:
    """Load and validate every ``*.toml`` file of the user folders ``search_dirs``.

    Returns
    -------
    list of str
        The lower-case names found.

    Raises
    ------
    ConfigError
        The first malformed file, naming the file and the key.

    References
    ----------
    None: file checks (no published model).
    """
    found = _user_files(search_dirs)
    for path in found.values():
        _table_from_dict(read_table_toml(path, path.name), str(path))
    return sorted(found)


def load_crystal(name: str, search_dirs: Sequence[str | Path] = ()) -> CrystalTable:
    """Load and validate the crystal table ``name`` (case-insensitive, the file stem).

    Parameters
    ----------
    name : str
        Crystal name, e.g. ``"GaP"``, ``"znte"``, ``"thin"``.
    search_dirs : sequence of path
        User folders searched first (a user file shadows a shipped file of the same name).

    Raises
    ------
    ConfigError
        Unknown crystal (the message lists the valid names) or an invalid table (the message
        names the file and the key).

    References
    ----------
    None: file reader (no published model); every number of a table has its source string
    beside it.
    """
    key = name.lower()
    user = _user_files(search_dirs)
    entry = user.get(key) or _shipped_files().get(key)
    if entry is None:
        raise ConfigError(
            f"crystal = {name!r}: unknown; valid names: "
            f"{', '.join(listed_crystal_names(search_dirs))}"
        )
    return _built_table(entry)


#: Validated tables kept in this process, keyed by path, modification time and size (a table
#: is immutable: tuples and numbers; a warm demo call loaded GaP five times, 0.16 ms each).
_built: dict[tuple[str, int, int], CrystalTable] = {}


def _built_table(entry) -> CrystalTable:
    """The validated table of the file ``entry``, built again only when the file changed; each
    call gets an object of its own (a shallow copy: a generation and a detection crystal
    loaded from one file stay two crystals, as the THz notes name them)."""
    try:
        stat = Path(str(entry)).stat()
        key = (str(entry), stat.st_mtime_ns, stat.st_size)
    except OSError:
        key = None  # not a plain file: read it (read_table_toml names what is wrong)
    table = _built.get(key) if key is not None else None
    if table is None:
        table = _table_from_dict(read_table_toml(entry, entry.name), str(entry))
        if key is not None:
            if len(_built) >= 64:
                _built.clear()
            _built[key] = table
    return copy.copy(table)


def _fail(path: str, key: str, message: str) -> ConfigError:
    return ConfigError(f"{Path(path).name}: {key} {message}")


def _table(value: Any, path: str, where: str) -> dict:
    if not isinstance(value, dict):
        raise _fail(path, where, f"= {value!r}: must be a table")
    return value


def _require(section: dict, key: str, path: str, where: str) -> Any:
    if key not in section:
        raise _fail(path, f"{where}.{key}", "is missing")
    return section[key]


def _source(section: dict, path: str, where: str, key: str = "source") -> str:
    value = section.get(key)
    if not isinstance(value, str) or not value.strip():
        raise _fail(path, f"{where}.{key}", "is missing: every number needs a source string")
    return value


def _number(section: dict, key: str, path: str, where: str, *, positive: bool = False) -> float:
    value = _require(section, key, path, where)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not _finite(value):
        raise _fail(path, f"{where}.{key}", f"= {value!r}: must be a finite number")
    if value < 0 or (positive and value == 0):
        raise _fail(path, f"{where}.{key}", f"= {value!r}: must be {'>' if positive else '>='} 0")
    return float(value)


def _finite(value: int | float) -> bool:
    try:
        return bool(np.isfinite(float(value)))
    except OverflowError:  # an integer beyond the float range
        return False


def _numbers(section: dict, key: str, path: str, where: str) -> tuple[float, ...]:
    values = _require(section, key, path, where)
    if not isinstance(values, list) or not values:
        raise _fail(path, f"{where}.{key}", f"= {values!r}: must be a non-empty list of numbers")
    return tuple(_number({key: v}, key, path, where) for v in values)


def _range(section: dict, path: str, where: str, lo_key: str, hi_key: str) -> tuple[float, float]:
    lo = _number(section, lo_key, path, where)
    hi = _number(section, hi_key, path, where, positive=True)
    if not lo < hi:
        raise _fail(path, f"{where}.{lo_key}", f"= {lo} > {where}.{hi_key} = {hi}: need lo < hi")
    _source(section, path, where, "range_source")
    return lo, hi


def _known_keys(section: dict, path: str, where: str, kind: str) -> None:
    for key in section:
        if key not in _KNOWN_KEYS[kind]:
            raise _fail(path, f"{where}.{key}" if where != "(top level)" else key,
                        f"is not a known key; valid: {', '.join(sorted(_KNOWN_KEYS[kind]))}")


def _optical_n_sq(model: OpticalIndexModel, wavelength: float) -> float:
    """n^2 of a Sellmeier model at one wavelength [m] (for the range check of a table)."""
    l2 = (wavelength * 1e6) ** 2  # the coefficients are printed for lambda in um
    poles = model.poles if model.model == "sellmeier_pole_um2" else [p**2 for p in model.poles]
    return (model.constant + model.lambda_sq_term * l2
            + sum(b * l2 / (l2 - p) for b, p in zip(model.b, poles, strict=True)))


def _check_optical_range(model: OpticalIndexModel, path: str) -> None:
    """The index at both ends of the stated range lies within :data:`INDEX_RANGE`."""
    if model.model not in ("sellmeier_pole_um", "sellmeier_pole_um2"):
        values = model.table_index or (model.constant,)
        ends = [(model.wavelength_min, min(values)), (model.wavelength_max, max(values))]
    else:
        ends = [(w, float(np.sqrt(max(_optical_n_sq(model, w), 0.0))))
                for w in (model.wavelength_min, model.wavelength_max)]
    lo, hi = INDEX_RANGE
    for wavelength, n in ends:
        if not (np.isfinite(n) and lo <= n <= hi):
            raise _fail(path, "optical_index", f"gives n = {n:.4g} at {wavelength * 1e6:.4g} um: "
                        f"outside {lo:g}-{hi:g} (check the coefficients and their units)")


def _check_thz_range(model: ThzDielectricModel, path: str) -> None:
    """Re n_THz within :data:`INDEX_RANGE` at 0.1 THz and at the stated upper limit's tenth."""
    for nu in (0.1e12, 0.1 * model.frequency_max):
        Omega = 2 * np.pi * nu
        eps = model.eps_inf + sum(o.strength * o.omega**2 / (o.omega**2 - Omega**2
                                                              - 1j * o.damping * Omega)
                                  for o in model.oscillators)
        n = float(np.sqrt(complex(eps)).real)
        lo, hi = INDEX_RANGE
        if not (np.isfinite(n) and lo <= n <= hi):
            raise _fail(path, "thz_permittivity", f"gives n = {n:.4g} at {nu * 1e-12:.3g} THz: "
                        f"outside {lo:g}-{hi:g} (check the coefficients and their units)")


def _model_name(section: dict, path: str, where: str, names) -> str:
    model = _require(section, "model", path, where)
    if not isinstance(model, str) or model not in names:
        raise _fail(path, f"{where}.model", f"= {model!r}: valid: {', '.join(names)}")
    return model


def _optical_from_dict(sec: dict, path: str) -> OpticalIndexModel:
    where = "optical_index"
    _known_keys(sec, path, where, where)
    model = _model_name(sec, path, where, OPTICAL_MODEL_NAMES)
    source = _source(sec, path, where)
    lo, hi = _range(sec, path, where, "valid_min_um", "valid_max_um")
    fields: dict[str, Any] = {"constant": 0.0, "b": (), "poles": (), "table_wavelength": (),
                              "table_index": ()}
    if model == "constant":
        fields["constant"] = _number(sec, "index", path, where, positive=True)
    elif model == "tabulated_um":
        wl = _numbers(sec, "wavelength_um", path, where)
        n = _numbers(sec, "index", path, where)
        if len(wl) != len(n) or len(wl) < 4:
            raise _fail(path, f"{where}.index", f"has {len(n)} values for {len(wl)} wavelengths"
                        ": need equal lengths, at least 4")
        if np.any(np.diff(wl) <= 0):
            raise _fail(path, f"{where}.wavelength_um", "is not strictly increasing")
        fields["table_wavelength"] = tuple(w * 1e-6 for w in wl)  # um -> m
        fields["table_index"] = n
    else:
        pole_key = "pole_um" if model == "sellmeier_pole_um" else "pole_um2"
        fields["constant"] = _number(sec, "constant", path, where)
        fields["b"] = _numbers(sec, "b", path, where)
        fields["poles"] = _numbers(sec, pole_key, path, where)
        if len(fields["b"]) != len(fields["poles"]):
            raise _fail(path, f"{where}.{pole_key}", "must have as many entries as b")
        if "lambda_sq_term_per_um2" in sec:  # signed: read as a number of either sign
            value = sec["lambda_sq_term_per_um2"]
            _number({"x": abs(value) if isinstance(value, (int, float)) else value}, "x", path,
                    f"{where}.lambda_sq_term_per_um2")
            fields["lambda_sq_term"] = float(value)
    out = OpticalIndexModel(model=model, wavelength_min=lo * 1e-6, wavelength_max=hi * 1e-6,
                            source=source, **fields)
    _check_optical_range(out, path)
    return out


def _oscillator_from_dict(sec: dict, path: str, where: str) -> LorentzOscillator:
    _known_keys(sec, path, where, "oscillator")
    return LorentzOscillator(
        omega=2 * np.pi * 1e12 * _number(sec, "frequency_thz", path, where, positive=True),
        strength=_number(sec, "strength", path, where),
        damping=2 * np.pi * 1e12 * _number(sec, "damping_thz", path, where),
        source=_source(sec, path, where),
    )


def _thz_from_dict(sec: dict, path: str) -> ThzDielectricModel:
    where = "thz_permittivity"
    _known_keys(sec, path, where, where)
    model = _model_name(sec, path, where, THZ_MODEL_NAMES)
    source = _source(sec, path, where)
    fmax = _number(sec, "valid_max_thz", path, where, positive=True) * 1e12
    _source(sec, path, where, "range_source")
    if model == "constant":
        eps_inf = _number(sec, "index", path, where, positive=True) ** 2
        oscillators: tuple[LorentzOscillator, ...] = ()
    else:
        eps_inf = _number(sec, "eps_inf", path, where, positive=True)
        raw = sec.get("oscillators", [])
        if not isinstance(raw, list):
            raise _fail(path, f"{where}.oscillators", "must be an array of [[...]] tables")
        oscillators = tuple(
            _oscillator_from_dict(_table(o, path, f"{where}.oscillators[{i}]"), path,
                                  f"{where}.oscillators[{i}]")
            for i, o in enumerate(raw)
        )
    out = ThzDielectricModel(model, eps_inf, oscillators, fmax, source)
    _check_thz_range(out, path)
    return out


def _properties_from_dict(sec: dict, path: str) -> tuple[dict[str, Any], tuple]:
    values: dict[str, Any] = {}
    sources = []
    for key, entry in sec.items():
        where = f"properties.{key}"
        if key not in _PROPERTY_KEYS:
            raise _fail(path, where, f"is not a known property; valid: {', '.join(_PROPERTY_KEYS)}")
        if not isinstance(entry, dict):
            raise _fail(path, where, "must be a table {value = ..., source = \"...\"}")
        field, factor = _PROPERTY_KEYS[key]
        value = _number(entry, "value", path, where)
        low, high = _PROPERTY_RANGES[key]
        if not low <= value <= high:
            raise _fail(path, f"{where}.value", f"= {value!r}: outside the plausible range "
                        f"{low:g}-{high:g} (unit: the key's suffix)")
        values[field] = value * factor
        sources.append((key, _source(entry, path, where)))
        if key.startswith("two_photon"):
            values["two_photon_wavelength"] = (
                _number(entry, "wavelength_nm", path, where, positive=True) * 1e-9
            )
    return values, tuple(sources)


def _table_from_dict(data: dict, path: str) -> CrystalTable:
    _known_keys(data, path, "(top level)", "(top level)")
    check_only = data.get("check_only", False)
    if not isinstance(check_only, bool):
        raise _fail(path, "check_only", f"= {check_only!r}: must be true or false")
    for section in ("optical_index", "thz_permittivity"):
        if not isinstance(data.get(section), dict):
            raise _fail(path, f"[{section}]", "is missing")
    props, sources = _properties_from_dict(
        _table(data.get("properties", {}), path, "[properties]"), path)
    notes = tuple((str(k), str(v)) for k, v in
                  _table(data.get("notes", {}), path, "[notes]").items())
    return CrystalTable(
        name=str(_require(data, "name", path, "(top level)")),
        description=str(data.get("description", "")),
        path=path,
        optical=_optical_from_dict(data["optical_index"], path),
        thz=_thz_from_dict(data["thz_permittivity"], path),
        sources=sources,
        notes=notes,
        check_only=check_only,
        **props,
    )
