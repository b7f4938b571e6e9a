"""Reading TOML (tomllib, or tomli before Python 3.11) and writing the small subset we emit."""

from __future__ import annotations

import math
import sys
from pathlib import Path
from typing import Any

from hcfplan.errors import ConfigError

if sys.version_info >= (3, 11):
    import tomllib as _toml
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as _toml

TOMLDecodeError = _toml.TOMLDecodeError

#: Largest TOML file read: configs are a few kB, so a larger file is not a config. [bytes]
MAX_TOML_BYTES = 1_000_000
#: Longest single ``--set``/``--vary`` value. [characters]
MAX_VALUE_CHARS = 10_000
#: Deepest nesting of arrays and inline tables accepted; configs need 2 (a list, a table).
#: Deeper input is refused before the parser's recursion can fail. [levels]
MAX_NESTING = 32


def read_toml(path: str | Path) -> dict[str, Any]:
    """Parse a TOML file; a missing file or a syntax error becomes one ConfigError line."""
    path = Path(path)
    try:
        size = path.stat().st_size
        if size > MAX_TOML_BYTES:
            raise ConfigError(f"{path}: {size} bytes; a config holds at most "
                              f"{MAX_TOML_BYTES} bytes")
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise ConfigError(f"{path}: file not found") from None
    except IsADirectoryError:
        raise ConfigError(f"{path}: is a directory, expected a TOML file") from None
    except UnicodeDecodeError as exc:
        raise ConfigError(f"{path}: not UTF-8 text ({exc.reason} at byte {exc.start})") from None
    except OSError as exc:
        raise ConfigError(f"{path}: cannot read ({exc.strerror})") from None
    return parse_toml(text, str(path))


def parse_toml(text: str, origin: str) -> dict[str, Any]:
    """Parse TOML text; ``origin`` names the file in the error message."""
    depth = _bracket_depth(text)
    if depth > MAX_NESTING:
        raise ConfigError(f"{origin}: arrays or inline tables nested {depth} deep; at most "
                          f"{MAX_NESTING}")
    try:
        return _toml.loads(text)
    except RecursionError:  # a fallback: _bracket_depth bounds the nesting first
        raise ConfigError(f"{origin}: nested too deeply") from None
    except _toml.TOMLDecodeError as exc:
        message = str(exc).splitlines()[0] if str(exc) else "syntax error"
        raise ConfigError(f"{origin}: TOML syntax error: {message}") from None
    except ValueError as exc:  # e.g. an integer literal longer than Python converts
        raise ConfigError(f"{origin}: TOML value error: {_first_line(exc)}") from None


def _bracket_depth(text: str) -> int:
    """Deepest nesting of ``[`` and ``{`` in ``text``, counted outside strings and comments.

    Brackets inside strings are skipped by tracking quotes (basic, literal and multi-line);
    an escaped quote in a basic string is honoured. Table headers (``[a]``, ``[[a]]``) count
    1-2 levels and never reach the limit. Text with at most :data:`MAX_NESTING` brackets in
    all is not scanned: their count, an upper bound of the depth, is returned.
    """
    if text.count("[") + text.count("{") <= MAX_NESTING:
        return text.count("[") + text.count("{")
    depth = deepest = 0
    i, n = 0, len(text)
    while i < n:
        ch = text[i]
        if ch in "\"'":
            quote = ch * 3 if text.startswith(ch * 3, i) else ch
            i += len(quote)
            while i < n and not text.startswith(quote, i):
                if ch == '"' and text[i] == "\\":
                    i += 1
                elif len(quote) == 1 and text[i] == "\n":
                    break
                i += 1
            i += len(quote)
            continue
        if ch == "#":
            end = text.find("\n", i)
            i = n if end < 0 else end
            continue
        if ch in "[{":
            depth += 1
            deepest = max(deepest, depth)
        elif ch in "]}":
            depth = max(depth - 1, 0)
        i += 1
    return deepest


def _first_line(exc: Exception) -> str:
    text = str(exc).strip()
    return text.splitlines()[0] if text else type(exc).__name__


def parse_toml_value(text: str) -> Any:
    """Parse one TOML value (``1.5``, ``"Ar"``, ``[1, 2]``, ``{ He = 0.7 }``, ``true``).

    A bare word that is not valid TOML (``Ar``) is returned as the string itself.
    Raises :class:`~hcfplan.errors.ConfigError` (a ``ValueError``) for text that looks like TOML
    but is malformed; callers prefix the option and key it came from.
    """
    stripped = text.strip()
    if stripped == "":
        raise ConfigError("empty value")
    if len(stripped) > MAX_VALUE_CHARS:
        raise ConfigError(f"{stripped[:40]!r}...: {len(stripped)} characters; a value holds "
                          f"at most {MAX_VALUE_CHARS}")
    if any(ch in stripped for ch in "\r\n"):
        raise ConfigError(f"{stripped!r}: the value must be on one line")
    depth = _bracket_depth(stripped)
    if depth > MAX_NESTING:
        raise ConfigError(f"{stripped[:40]!r}...: arrays or inline tables nested {depth} deep; "
                          f"at most {MAX_NESTING}")
    try:
        return _toml.loads(f"v = {stripped}")["v"]
    except RecursionError:  # a fallback: _bracket_depth bounds the nesting first
        raise ConfigError(f"{stripped[:40]!r}...: nested too deeply") from None
    except _toml.TOMLDecodeError:
        if stripped[0] in "[{\"'" or any(ch in stripped for ch in "=[]{}\"'"):
            raise ConfigError(f"cannot parse {stripped!r} as a TOML value") from None
        return stripped
    except ValueError as exc:  # e.g. an integer literal longer than Python converts
        raise ConfigError(f"cannot parse {stripped[:40]!r}...: {_first_line(exc)}") from None


def _format_value(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        escaped = value.replace("\\", "\\\\").replace('"', '\\"')
        return f'"{escaped}"'
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_format_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{k} = {_format_value(v)}" for k, v in value.items()) + " }"
    raise TypeError(f"cannot write {type(value).__name__} to TOML")


def dump_toml(data: dict[str, dict[str, Any]], comments: dict[str, str] | None = None) -> str:
    """Write a two-level mapping (sections of scalars/lists/inline tables) as TOML text.

    Values of ``None`` are written as comments (``# key = (not set)``) since TOML has no null.
    A list of mappings of sections (``stage``) is written as an array of tables:
    ``[[stage]]`` followed by ``[stage.fiber]``, ... for each item.
    """
    comments = comments or {}
    lines: list[str] = []
    for section, table in data.items():
        if isinstance(table, list):  # an array of tables of sections ([[stage]])
            for item in table:
                lines += ["", f"[[{section}]]"] if lines else [f"[[{section}]]"]
                for sub, sub_table in item.items():
                    _table_lines(lines, f"{section}.{sub}", sub_table, {})
            continue
        if lines:
            lines.append("")
        _table_lines(lines, section, table, comments)
    return "\n".join(lines) + "\n"


def _table_lines(lines: list[str], section: str, table: dict[str, Any],
                 comments: dict[str, str]) -> None:
    """Append ``[section]`` and its keys (None values as comments) to ``lines``."""
    lines.append(f"[{section}]")
    for key, value in table.items():
        note = comments.get(f"{section}.{key}")
        suffix = f"  # {note}" if note else ""
        if value is None:
            lines.append(f"# {key} = (not set){suffix}")
        else:
            lines.append(f"{key} = {_format_value(value)}{suffix}")
