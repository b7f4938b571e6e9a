"""Reading small two-column CSV files: measured spectra and curves versus wavelength.

Format (our own): one sample per line, comma-separated (whitespace or ';' also accepted), lines
starting with ``#`` and blank lines ignored. The first non-comment line may be a header naming
the columns; then the columns ``wavelength_nm`` and the value column are found by name,
otherwise the first two columns are used. Wavelengths are in nanometres and must increase
strictly. Every problem raises :class:`~hcfplan.errors.ConfigError` naming the file (and the
line, where one line is at fault).

A first column that is plainly not nm is refused with the suspected unit named:

- a header without ``wavelength_nm`` whose names carry a unit word (``thz``, ``hz``,
  ``frequency``, ``cm-1``, ``wavenumber``, ``ev``, ``energy``, ``um``, ``micron``) names that
  unit;
- without a header, all values below :data:`MICROMETRE_SUSPICION` look like micrometres (or eV);
  otherwise the position of the intensity's peak (of a curve: its median wavelength) must lie
  in :data:`PLAUSIBLE_NM`, the pump range of ``laser.wavelength_nm``; if it does not, the
  message names the units (Hz, THz, cm^-1, eV, um) in which that position would lie inside.
  A file in THz or cm^-1 whose peak reads as a plausible nm value cannot be told apart here.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np

from hcfplan.constants import c, e, h
from hcfplan.errors import ConfigError
from hcfplan.units import SUFFIXES, suffix_of

#: Wavelengths all below this value are taken to be micrometres given by mistake. [nm]
MICROMETRE_SUSPICION = 20.0
#: Fewest samples of a measured spectrum (a shape needs a rise, a peak and a fall).
MIN_SPECTRUM_SAMPLES = 3
#: Fewest samples of a curve versus wavelength (two points define a line).
MIN_CURVE_SAMPLES = 2
WAVELENGTH_COLUMN = "wavelength_nm"
#: Largest file read: spectrometer exports are far smaller. [bytes]
MAX_CSV_BYTES = 50_000_000
#: Where the peak of a spectrum in nm may lie: the range of ``laser.wavelength_nm``. [nm]
PLAUSIBLE_NM = (150.0, 20000.0)
_SPLIT = re.compile(r"[,;\s]+")
_HC_NM_EV = h * c / e * 1e9  # photon energy 1 eV <-> 1239.84 nm (CODATA, hcfplan.constants)
_C_NM = c * 1e9  # [nm/s]
#: Units a first column may be in by mistake: (name, header words, wavelength in nm of x).
_UNITS = (
    ("frequency in THz", {"thz", "terahertz"}, lambda x: _C_NM / (x * 1e12)),
    ("wavenumber in cm^-1", {"cm", "wavenumber", "wavenumbers", "kayser"},
     lambda x: 1e7 / x),
    ("photon energy in eV", {"ev", "electronvolt", "electronvolts", "energy"},
     lambda x: _HC_NM_EV / x),
    ("micrometres", {"um", "\u00b5m", "micron", "microns", "micrometre", "micrometres",
                     "micrometer", "micrometers"}, lambda x: x * 1e3),
    ("frequency in Hz", {"hz", "frequency", "freq", "omega", "nu"}, lambda x: _C_NM / x),
)


def _rows(path: Path) -> list[tuple[int, list[str]]]:
    """Non-comment, non-blank lines as (line number, fields)."""
    try:
        size = path.stat().st_size
        if size > MAX_CSV_BYTES:
            raise ConfigError(f"{path}: {size} bytes; a CSV file holds at most "
                              f"{MAX_CSV_BYTES} bytes")
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
    if WAVELENGTH_COLUMN in missing:
        for name in names:
            words = set(re.findall(r"[a-z\u00b5]+", name))
            for unit, hints, _ in _UNITS:
                if words & hints:
                    raise ConfigError(
                        f"{path}:{number}: column {name!r} looks like {unit}, not wavelength "
                        f"in nm; convert it to a column '{WAVELENGTH_COLUMN}' (a spectrum also to "
                        "intensity per unit wavelength)")
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
            f"{wavelength_nm[-1]:g}): they look like micrometres (or photon energies in eV); "
            "the column must be in nm"
        )
    return wavelength_nm * 1e-9, values, path, data


def _check_unit(path: Path, x: float, what: str) -> None:
    """Refuse a first column whose ``x`` (the peak or the median) is no plausible nm value."""
    lo, hi = PLAUSIBLE_NM
    if lo <= x <= hi:
        return
    fits = [f"{unit} ({to_nm(x):.4g} nm)" for unit, _, to_nm in _UNITS
            if lo <= to_nm(x) <= hi]
    guess = f"it looks like {' or '.join(fits)}" if fits else "the column is not in nm"
    raise ConfigError(
        f"{path}: {what} lies at {x:.6g} in the first column, outside {lo:g}-{hi:g} nm "
        f"(the range of laser.wavelength_nm); {guess}; the column must be wavelength in nm"
    )


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
        unsorted or duplicated wavelengths, negative, all-zero or denormal intensity, or a
        first column that looks like another unit (module docstring); the message names the
        file.
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
    tiny = np.finfo(float).tiny
    if not np.max(intensity) >= tiny:
        raise ConfigError(f"{path}: the largest intensity is {np.max(intensity):g}, below "
                          f"{tiny:g} (denormal); the spectrum holds no usable signal")
    _check_count(path, intensity, MIN_SPECTRUM_SAMPLES)
    _check_unit(path, float(wavelength[np.argmax(intensity)]) * 1e9, "the intensity's peak")
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
    _check_unit(path, float(np.median(wavelength)) * 1e9, "the median wavelength")
    suffix = suffix_of(value_name.lower())
    if suffix is not None and np.isfinite(SUFFIXES[suffix][0]):
        values = values * SUFFIXES[suffix][0]
    return wavelength, values


# ---------------------------------------------------------------------------------------------
# A measured field: intensity and phase versus wavelength or time

#: The two layouts of a measured field, detected from the header: axis column -> axis kind.
FIELD_AXES = {"wavelength_nm": "wavelength", "time_fs": "time"}
FIELD_COLUMNS = ("intensity", "phase_rad")
#: Time columns in another unit than fs: header words -> the unit's name.
_TIME_UNITS = (({"ps", "picosecond", "picoseconds"}, "picoseconds"),
               ({"as", "attosecond", "attoseconds"}, "attoseconds"),
               ({"ns", "nanosecond", "nanoseconds"}, "nanoseconds"),
               ({"s", "sec", "second", "seconds"}, "seconds"))
#: Where the intensity FWHM of a pulse in fs may lie: the range of ``laser.fwhm_fs``. [fs]
PLAUSIBLE_FWHM_FS = (1.0, 1.0e5)


def _field_header(path: Path, number: int, first: list[str]) -> tuple[str, list[int]]:
    """Axis kind and the indices of the axis, intensity and phase columns of a field file."""
    names = [f.strip().lower() for f in first]
    if all(_is_number(f) for f in first):
        raise ConfigError(f"{path}:{number}: no header; a measured field needs one naming "
                          "the columns 'wavelength_nm,intensity,phase_rad' or "
                          "'time_fs,intensity,phase_rad'")
    axes = [name for name in FIELD_AXES if name in names]
    if not axes:
        for name in names:
            words = set(re.findall(r"[a-z\u00b5]+", name))
            if words & {"time", "delay", "t"}:
                for hints, unit in _TIME_UNITS:
                    if words & hints:
                        raise ConfigError(f"{path}:{number}: column {name!r} looks like time "
                                          f"in {unit}; convert it to a column 'time_fs'")
            for unit, hints, _ in _UNITS:
                if words & hints:
                    raise ConfigError(f"{path}:{number}: column {name!r} looks like {unit}; "
                                      "convert it to a column 'wavelength_nm' (the intensity "
                                      "to intensity per unit wavelength)")
        raise ConfigError(f"{path}:{number}: header {first} names neither 'wavelength_nm' nor "
                          "'time_fs'; expected 'wavelength_nm,intensity,phase_rad' or "
                          "'time_fs,intensity,phase_rad'")
    if len(axes) > 1:
        raise ConfigError(f"{path}:{number}: header {first} names both 'wavelength_nm' and "
                          "'time_fs'; give one axis")
    if "phase_deg" in names or "phase_degrees" in names:
        raise ConfigError(f"{path}:{number}: the phase column is in degrees; convert it to a "
                          "column 'phase_rad' (radians)")
    missing = [n for n in FIELD_COLUMNS if n not in names]
    if missing:
        raise ConfigError(f"{path}:{number}: header {first} lacks column(s) {missing}; "
                          f"expected '{axes[0]},intensity,phase_rad'")
    return FIELD_AXES[axes[0]], [names.index(n) for n in (axes[0], *FIELD_COLUMNS)]


def _field_rows(path: Path, rows: list, indices: list[int], unit: str) -> np.ndarray:
    """The data rows as an (n, 3) array; the axis (first index) must increase strictly."""
    width = max(indices) + 1
    out: list[list[float]] = []
    for number, fields in rows:
        if len(fields) < width:
            raise ConfigError(f"{path}:{number}: {len(fields)} column(s) {fields}; need the "
                              "axis, intensity and phase_rad on every line")
        try:
            values = [float(fields[i]) for i in indices]
        except ValueError:
            raise ConfigError(f"{path}:{number}: non-numeric value in {fields}") from None
        if not all(np.isfinite(values)):
            raise ConfigError(f"{path}:{number}: non-finite value in {fields}")
        if out and not values[0] > out[-1][0]:
            kind = "duplicated" if values[0] == out[-1][0] else "unsorted"
            raise ConfigError(f"{path}:{number}: {kind} axis value {values[0]} {unit} after "
                              f"{out[-1][0]} {unit}; the axis must increase strictly")
        if values[1] < 0:
            raise ConfigError(f"{path}:{number}: negative intensity {values[1]:g}; intensities "
                              "must be >= 0 (subtract the background and clip at zero)")
        out.append(values)
    return np.array(out, dtype=float)


def _check_time_unit(path: Path, time_fs: np.ndarray, intensity: np.ndarray) -> None:
    """Refuse a time column whose pulse FWHM is no plausible number of femtoseconds."""
    from hcfplan.pulse.metrics import fwhm

    width = fwhm(time_fs, intensity)
    lo, hi = PLAUSIBLE_FWHM_FS
    if np.isfinite(width) and lo <= width <= hi:
        return
    guess = ("picoseconds or nanoseconds" if width < lo else "attoseconds") \
        if np.isfinite(width) else "no single pulse"
    raise ConfigError(f"{path}: the intensity FWHM is {width:.4g} in the units of column "
                      f"time_fs, outside {lo:g}-{hi:g} fs (the range of laser.fwhm_fs); it "
                      f"looks like {guess}; the column must be time in fs")


def read_field_csv(path: str | Path) -> tuple[str, np.ndarray, np.ndarray, np.ndarray]:
    """Read a measured field: intensity and phase versus wavelength or versus time.

    Parameters
    ----------
    path : str or Path
        CSV file whose header names the columns ``wavelength_nm, intensity, phase_rad`` (a
        spectrum: intensity per unit wavelength and the spectral phase) or ``time_fs,
        intensity, phase_rad`` (the temporal intensity and phase of the envelope).

    Returns
    -------
    axis : {"wavelength", "time"}
        Which layout the header names.
    x : ndarray
        Strictly increasing vacuum wavelengths [m] or times [s].
    intensity : ndarray
        The intensity column as in the file, >= 0. [arb.]
    phase : ndarray
        The phase column. [rad]

    Raises
    ------
    ConfigError
        No header or a header naming neither or both axes, a column in another unit (time in
        ps, as or s; phase in degrees; wavelength in um, THz, cm^-1, eV), fewer than 3 samples,
        non-numeric or non-finite entries, an unsorted axis, negative or all-zero intensity,
        or a pulse whose peak (wavelength) or FWHM (time) lies outside the range of the
        matching ``laser`` key; the message names the file and, where one line is at fault,
        the line.
    """
    path = Path(path)
    rows = _rows(path)
    if not rows:
        raise ConfigError(f"{path}: empty (no data lines)")
    axis, indices = _field_header(path, *rows[0])
    unit = "nm" if axis == "wavelength" else "fs"
    if len(rows) < 2:
        raise ConfigError(f"{path}: header only, no data lines")
    data = _field_rows(path, rows[1:], indices, unit)
    x, intensity, phase = data[:, 0], data[:, 1], data[:, 2]
    _check_count(path, intensity, MIN_SPECTRUM_SAMPLES)
    if not np.max(intensity) >= np.finfo(float).tiny:
        raise ConfigError(f"{path}: every intensity is 0 (or denormal); the field holds no "
                          "light")
    if axis == "wavelength":
        if x[0] <= 0:
            raise ConfigError(f"{path}: wavelength {x[0]:g} nm: must be > 0")
        if x[-1] < MICROMETRE_SUSPICION:
            raise ConfigError(f"{path}: all wavelengths are < {MICROMETRE_SUSPICION:g} "
                              f"(largest {x[-1]:g}): they look like micrometres (or photon "
                              "energies in eV); the column must be in nm")
        _check_unit(path, float(x[np.argmax(intensity)]), "the intensity's peak")
        return axis, x * 1e-9, intensity, phase
    _check_time_unit(path, x, intensity)
    return axis, x * 1e-15, intensity, phase
