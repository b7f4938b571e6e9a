"""Configs for the Python API: a TOML file, a mapping or a loaded config, with overrides.

Every public function of :mod:`hcfplan.api` takes its config through :func:`as_config`, so a
path, a nested mapping (the TOML tables as dicts) and a :class:`~hcfplan.io.specs.PlanConfig`
from :func:`load_config` are accepted alike. Bad input raises
:class:`~hcfplan.errors.ConfigError` with one line naming the key, as on the command line.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Iterable, Mapping
from pathlib import Path
from typing import Any

from hcfplan.errors import ConfigError

#: What a config argument may be.
ConfigLike = Any  # str | os.PathLike | Mapping | PlanConfig


def gas_dirs(extra: Iterable[str | Path] = ()) -> tuple[Path, ...]:
    """Gas table folders: ``extra`` first, then those of ``HCFPLAN_GAS_PATH`` (as the command
    line reads them, so the API and the CLI resolve a config alike)."""
    from hcfplan.materials.gases import gas_search_dirs

    return tuple(Path(d) for d in extra) + tuple(gas_search_dirs(environ=os.environ))


def override_texts(overrides) -> tuple[str, ...]:
    """``section.key=value`` texts from a mapping ``{"section.key": value}``, from one such
    text or from an iterable of them (the ``--set`` form); None gives none."""
    if overrides is None:
        return ()
    if isinstance(overrides, str):
        return (overrides,)
    if isinstance(overrides, Mapping):
        from hcfplan.planning.scan import override_text

        texts = []
        for key, value in overrides.items():
            if not isinstance(key, str):
                raise ConfigError(f"overrides: key {key!r} must be a string 'section.key'")
            try:
                if isinstance(value, (list, tuple)):
                    items = (override_text(key, v).partition("=")[2] for v in value)
                    texts.append(f"{key}=[{', '.join(items)}]")
                else:
                    texts.append(override_text(key, value))
            except ConfigError:
                raise ConfigError(f"overrides {key}: value {value!r} cannot be set (numbers, "
                                  "strings, true/false and lists of them)") from None
        return tuple(texts)
    try:
        texts = tuple(overrides)
    except TypeError:
        raise ConfigError(f"overrides: expected a mapping {{'section.key': value}} or "
                          f"'section.key=value' texts, got {type(overrides).__name__}") from None
    for text in texts:
        if not isinstance(text, str):
            raise ConfigError(f"overrides: {text!r} is not a 'section.key=value' text")
    return texts


def _is_plan_config(value) -> bool:
    from hcfplan.io.specs import PlanConfig

    return isinstance(value, PlanConfig)


def load_config(path_or_mapping: ConfigLike, overrides=None, *, gas_dirs_extra=()):
    """Read and validate a config.

    Parameters
    ----------
    path_or_mapping : str, path-like, mapping or PlanConfig
        A TOML config file; or its tables as a nested mapping, e.g.
        ``{"laser": {"wavelength_nm": 1030, ...}, "fiber": {...}}`` (relative file names in it
        are taken from the current folder); or a config loaded before (the overrides are then
        applied on top of its own).
    overrides : mapping or iterable of str, optional
        Values changed without editing the file: ``{"gas.pressure_bar": 4}`` or
        ``["gas.pressure_bar=4"]`` (the command line's ``--set``).
    gas_dirs_extra : iterable of path, optional
        Gas table folders searched before ``HCFPLAN_GAS_PATH`` and the shipped tables.

    Returns
    -------
    PlanConfig
        The validated config: SI specs, and ``resolved`` with every default filled in
        (the ``check`` command's output).

    Raises
    ------
    ConfigError
        One line naming the key (or file) and what is wrong.

    References
    ----------
    The key set is the README's config reference (``hcfplan/io/schema.py``); no physics.
    """
    from hcfplan.io.config import config_from_mapping
    from hcfplan.io.config import load_config as load_file

    texts = override_texts(overrides)
    dirs = gas_dirs(gas_dirs_extra)
    if _is_plan_config(path_or_mapping):
        cfg = path_or_mapping
        if not texts:
            return cfg
        base = cfg.source.parent if cfg.source is not None else Path(".")
        raw = _raw_of(cfg)
        return config_from_mapping(raw, base_dir=base, overrides=cfg.overrides + texts,
                                   extra_gas_dirs=dirs, source=cfg.source)
    if isinstance(path_or_mapping, Mapping):
        raw = {str(k): (dict(v) if isinstance(v, Mapping) else v)
               for k, v in path_or_mapping.items()}
        return config_from_mapping(raw, base_dir=".", overrides=texts, extra_gas_dirs=dirs)
    if isinstance(path_or_mapping, (str, os.PathLike)):
        return load_file(Path(path_or_mapping), overrides=texts, extra_gas_dirs=dirs)
    raise ConfigError(f"config: expected a TOML file path, a mapping of its tables or a loaded "
                      f"config, got {type(path_or_mapping).__name__}")


def _raw_of(cfg) -> dict:
    """The TOML tables a loaded config came from (its file, read again, or its resolved
    tables when it came from a mapping)."""
    if cfg.source is not None:
        from hcfplan.io.tomlio import read_toml

        return read_toml(cfg.source)
    return {s: _set_keys(t) for s, t in cfg.resolved.items()}


def _set_keys(table):
    """A resolved table without its unset (None) keys; a list of stages (``stage``) item by
    item."""
    if isinstance(table, list):
        return [{s: _set_keys(t) for s, t in item.items()} for item in table]
    return {k: v for k, v in table.items() if v is not None}


def as_config(config: ConfigLike, overrides=None):
    """:func:`load_config` for the functions that take a config argument."""
    return load_config(config, overrides)


class ConfigFile:
    """A config as (TOML file, ``--set`` overrides), for the workflows that read a file (scan,
    recommend). A mapping, or a config loaded from one, is written to a temporary TOML file,
    removed by :meth:`close` (use as a context manager)."""

    def __init__(self, config: ConfigLike, overrides=None):
        self._tmp: tempfile.TemporaryDirectory | None = None
        texts = override_texts(overrides)
        if isinstance(config, (str, os.PathLike)):
            self.path, self.overrides = Path(config), texts
            load_config(self.path, texts)  # one line naming the key, before any work
            return
        cfg = load_config(config)  # validates a mapping
        if cfg.source is not None:
            self.path, self.overrides = Path(cfg.source), cfg.overrides + texts
            load_config(self.path, self.overrides)
            return
        from hcfplan.io.tomlio import dump_toml
        from hcfplan.numerics.storage import write_text

        self._tmp = tempfile.TemporaryDirectory(prefix="hcfplan-config-")
        self.path = Path(self._tmp.name) / "config.toml"
        write_text(self.path, dump_toml(_raw_of(cfg)))
        self.overrides = cfg.overrides + texts
        load_config(self.path, self.overrides)

    def close(self) -> None:
        if self._tmp is not None:
            self._tmp.cleanup()
            self._tmp = None

    def __enter__(self) -> ConfigFile:
        return self

    def __exit__(self, *exc) -> None:
        self.close()
