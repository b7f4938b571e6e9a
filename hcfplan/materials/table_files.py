"""Reading the TOML files of the gas, solid and crystal tables (one place for the messages).

The materials layer does not import :mod:`hcfplan.io`; this is its own small reader. Every
failure becomes one :class:`~hcfplan.errors.ConfigError` line that names the file.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from hcfplan.errors import ConfigError

try:  # Python >= 3.11
    import tomllib
except ModuleNotFoundError:  # pragma: no cover - Python 3.10
    import tomli as tomllib


#: Parsed table files kept in this process, keyed by path, modification time and size (the
#: crystal tables were read again for every run of the chain: 5 ms of a warm demo call).
MAX_PARSED = 256
_parsed: dict[tuple[str, int, int], dict[str, Any]] = {}


def read_table_toml(path: str | Path, label: str | None = None) -> dict[str, Any]:
    """Parse the table file ``path``; messages start with ``label`` (default: the path).

    Raises
    ------
    ConfigError
        Not valid TOML, not UTF-8, or unreadable; one line naming the file.

    References
    ----------
    None: file reader (TOML via :mod:`tomllib`; no published model).
    """
    path = Path(path)
    name = str(path) if label is None else label
    try:
        stat = path.stat()
        key = (str(path), stat.st_mtime_ns, stat.st_size)
        if key not in _parsed:  # a file is parsed again only when it changed
            if len(_parsed) >= MAX_PARSED:
                _parsed.clear()
            _parsed[key] = tomllib.loads(path.read_text(encoding="utf-8"))
        return _copied(_parsed[key])  # a caller may change what it gets
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{name}: not valid TOML: {exc}") from None
    except UnicodeDecodeError as exc:
        raise ConfigError(f"{name}: not UTF-8 text ({exc.reason} at byte {exc.start})") from None
    except OSError as exc:
        raise ConfigError(f"{name}: cannot read ({exc.strerror})") from None
    except ValueError as exc:  # e.g. an integer literal longer than Python converts
        raise ConfigError(f"{name}: not valid TOML: {str(exc).splitlines()[0]}") from None


def _copied(value: Any) -> Any:
    """A copy of parsed TOML data: new dicts and lists all the way down; the leaves (str, int,
    float, bool and the date/time types of :mod:`tomllib`) are immutable and shared. What
    ``copy.deepcopy`` gives for such data, several times faster (no memo, no dispatch; the
    crystal tables are copied a dozen times per run of the chain)."""
    if isinstance(value, dict):
        return {k: _copied(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_copied(v) for v in value]
    return value
