"""Reading small two-column CSV files: measured spectra and curves versus wavelength.

Format (our own): one sample per line, comma-separated (whitespace or ';' also accepted), lines
starting with ``#`` and blank lines ignored. The first non-comment line may be a header naming
the columns; then the columns ``wavelength_nm`` and the value column are found by name,
otherwise the first two columns are used. Wavelengths are in nanometres and must increase
strictly. Every problem raises :class:`~hcfplan.errors.ConfigError` naming ``file:line``.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.units import SUFFIXES, suffix_of

#: Wavelengths all below this value are taken to be micrometres given by mistake. [nm]
MICROMETRE_SUSPICION = 20.0
#: Fewest samples of a measured spectrum (a shape needs a rise, a peak and a fall).
MIN_SPECTRUM_SAMPLES = 3
#: Fewest samples of a curve versus wavelength (two points define a line).
MIN_CURVE_SAMPLES = 2
WAVELENGTH_COLUMN = "wavelength_nm"
_SPLIT = re.compile(r"[,;\s]+")


def _rows(path: Path) -> list[tuple[int, list[str]]]:
    """Non-comment, non-blank lines as (line number, fields)."""
    try:
        text = path.read_text(encoding="utf-8-sig")
    except OSError as exc:
        raise ConfigError(f"{path}: cannot read ({exc.strerror})") from None
    except UnicodeDecodeError as exc:
        raise ConfigError(f"{path}: not UTF-8 text ({exc.reason} at byte {exc.start}); save "
                          "the file as UTF-8 or plain ASCII") from None
    rows = []
    for number, line in enumerate(text.splitlines(), start=1):
        stripped = line.split("#", 1)[0].strip()
        if stripped:
            rows.append((number, [f for f in _SPLIT.split(stripped) if f]))
    return rows


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def _columns(path: Path, rows: list, value_name: str) -> tuple[int, int, list]:
    """Indices of the wavelength and value columns, and the data rows."""
    number, first = rows[0]
    if all(_is_number(f) for f in first):
        return 0, 1, rows
    names = [f.strip().lower() for f in first]
    missing = [n for n in (WAVELENGTH_COLUMN, value_name) if n not in names]
    if missing:
        raise ConfigError(
            f"{path}:{number}: header {first} lacks column(s) {missing}; "
            f"expected '{WAVELENGTH_COLUMN},{value_name}'"
        )
    return names.index(WAVELENGTH_COLUMN), names.index(value_name), rows[1:]


def _parse(path: Path, rows: list, i_wl: int, i_val: int) -> tuple[np.ndarray, np.ndarray]:
    width = max(i_wl, i_val) + 1
    wavelength, values = [], []
    for number, fields in rows:
        if len(fields) < width:
            raise ConfigError(
                f"{path}:{number}: {len(fields)} column(s) {fields}; need wavelength_nm and a "
                "value on every line"
            )
        try:
            wl, val = float(fields[i_wl]), float(fields[i_val])
        except ValueError:
            raise ConfigError(
                f"{path}:{number}: non-numeric value in {fields}"
            ) from None
        if not (np.isfinite(wl) and np.isfinite(val)):
            raise ConfigError(f"{path}:{number}: non-finite value in {fields}")
        if wavelength and not wl > wavelength[-1]:
            kind = "duplicated" if wl == wavelength[-1] else "unsorted"
            raise ConfigError(
                f"{path}:{number}: {kind} wavelength {wl} nm after {wavelength[-1]} nm; "
                "wavelengths must increase strictly"
            )
        wavelength.append(wl)
        values.append(val)
    return np.array(wavelength), np.array(values)


def _read(path: str | Path, value_name: str) -> tuple[np.ndarray, np.ndarray, Path, list]:
    path = Path(path)
    rows = _rows(path)
    if not rows:
        raise ConfigError(f"{path}: empty (no data lines)")
    i_wl, i_val, data = _columns(path, rows, value_name.lower())
    if not data:
        raise ConfigError(f"{path}: header only, no data lines")
    wavelength_nm, values = _parse(path, data, i_wl, i_val)
    if wavelength_nm[0] <= 0:
        raise ConfigError(f"{path}:{data[0][0]}: wavelength {wavelength_nm[0]} nm: must be > 0")
    if wavelength_nm[-1] < MICROMETRE_SUSPICION:
        raise ConfigError(
            f"{path}: all wavelengths are < {MICROMETRE_SUSPICION:g} (largest "
            f"{wavelength_nm[-1]:g}): they look like micrometres; the column must be in nm"
        )
    return wavelength_nm * 1e-9, values, path, data


def _check_count(path: Path, values: np.ndarray, min_samples: int) -> None:
    if values.size < min_samples:
        raise ConfigError(f"{path}: {values.size} data line(s); need at least {min_samples}")


def read_spectrum_csv(path: str | Path) -> tuple[np.ndarray, np.ndarray]:
    """Read a measured spectrum (columns ``wavelength_nm``, ``intensity``).

    Parameters
    ----------
    path : str or Path
        CSV file.

    Returns
    -------
    wavelength : ndarray
        Strictly increasing vacuum wavelengths. [m]
    intensity : ndarray
        Spectral intensity per unit wavelength as in the file, >= 0. [arb.]

    Raises
    ------
    ConfigError
        Empty or non-UTF-8 file, fewer than 3 samples, one column, non-numeric entries,
        unsorted or duplicated wavelengths, negative or all-zero intensity, or wavelengths that
        look like micrometres; the message names ``file:line``.
    """
    wavelength, intensity, path, data = _read(path, "intensity")
    negative = np.flatnonzero(intensity < 0)
    if negative.size:
        k = negative[0]
        raise ConfigError(
            f"{path}:{data[k][0]}: negative intensity {intensity[k]:g}; intensities must be "
            ">= 0 (subtract the background and clip at zero)"
        )
    if not np.any(intensity > 0):
        raise ConfigError(f"{path}: every intensity is 0; the spectrum holds no light")
    _check_count(path, intensity, MIN_SPECTRUM_SAMPLES)
    return wavelength, intensity


def read_curve_csv(path: str | Path, value_name: str) -> tuple[np.ndarray, np.ndarray]:
    """Read a curve versus wavelength (columns ``wavelength_nm`` and ``value_name``).

    Parameters
    ----------
    path : str or Path
        CSV file.
    value_name : str
        Name of the value column, with a unit suffix of :data:`hcfplan.units.SUFFIXES`
        (e.g. ``gdd_fs2``) or without one (e.g. ``phase_rad``, ``reflectance``).

    Returns
    -------
    wavelength : ndarray
        Strictly increasing vacuum wavelengths. [m]
    values : ndarray
        The column converted to SI if ``value_name`` ends in a known unit suffix, else as in
        the file. [SI unit of the suffix]

    Raises
    ------
    ConfigError
        As :func:`read_spectrum_csv` (without the sign checks; at least 2 samples).
    """
    wavelength, values, path, _ = _read(path, value_name)
    _check_count(path, values, MIN_CURVE_SAMPLES)
    suffix = suffix_of(value_name.lower())
    if suffix is not None and np.isfinite(SUFFIXES[suffix][0]):
        values = values * SUFFIXES[suffix][0]
    return wavelength, values
