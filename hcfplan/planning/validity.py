"""Validity ranges of the data behind a run, reported as warning lines (never as errors).

Broad spectral grids evaluate every fit far beyond the light actually present, so the
per-call ``ValidityWarning`` of the material modules is silenced on those evaluations
(:func:`quiet_validity`) and the ranges are checked here instead, once, against the band that
carries light: the pump for the first-look reports, the -40 dB extent of the output spectrum
after a run.

This module is also the one place where warnings become text for the user's warning list
(:func:`collect_warnings`): hcfplan's own warnings keep their wording, and any other warning
(a numpy floating-point warning, a scipy warning, ...) says which library raised it and in
which hcfplan module, e.g. ``numpy (in hcfplan.fibers.antiresonant): invalid value encountered
in sqrt``.
"""

from __future__ import annotations

import contextlib
import inspect
import warnings
from collections.abc import Iterator
from types import FrameType

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ValidityWarning

#: Spectral level that defines "where the light is" for the range checks. [dB]
LIGHT_LEVEL_DB = -40.0


@contextlib.contextmanager
def quiet_validity() -> Iterator[None]:
    """Silence ValidityWarning inside the block (ranges are checked by :func:`range_notes`)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        yield


#: Modules whose ValidityWarnings are range notes of material fits (checked by range_notes).
MATERIAL_MODULES = r"hcfplan\.(materials|fibers)\..*"


@contextlib.contextmanager
def quiet_validity_of_materials() -> Iterator[None]:
    """Silence the material-fit range warnings only; other ValidityWarnings pass through."""
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", category=ValidityWarning, module=MATERIAL_MODULES)
        yield


#: Text of numpy's floating-point warnings ("invalid value encountered in sqrt"); numpy issues
#: them as plain RuntimeWarnings attributed to the calling line (common practice, no source).
NUMPY_FLOATING_POINT_TEXT = " encountered in "
#: Modules whose frames are skipped when looking for where a warning was raised.
_WARNING_MACHINERY = ("warnings", __name__)


def _module_of(frame: FrameType) -> str:
    return str(frame.f_globals.get("__name__", "?"))


def warning_line(message: Warning | str, category: type[Warning],
                 frame: FrameType | None) -> str:
    """One line for the user's warning list.

    Parameters
    ----------
    message : Warning or str
        The warning (or its text).
    category : type
        Its category.
    frame : frame or None
        The innermost stack frame at the time of the warning (outside the ``warnings``
        machinery); walked outwards to find the library and the hcfplan module involved.

    Returns
    -------
    str
        hcfplan's own warnings (categories defined in hcfplan, such as ``ValidityWarning``):
        the text as it is. Any other warning: ``"<library> (in <hcfplan module>): <text>"``,
        where the library is the package that defines the category or whose code raised it
        (numpy for its floating-point warnings), and the module is the innermost hcfplan
        module on the stack (or the raising module when hcfplan is not on it).
    """
    text = " ".join(str(message).split())
    if category.__module__.split(".")[0] == "hcfplan":
        return text
    modules = []
    while frame is not None:
        name = _module_of(frame)
        if name not in _WARNING_MACHINERY:
            modules.append(name)
        frame = frame.f_back
    raising = modules[0] if modules else "?"
    ours = next((m for m in modules if m.split(".")[0] == "hcfplan"), raising)
    if category.__module__ not in ("builtins", "warnings"):
        library = category.__module__.split(".")[0]
    elif issubclass(category, RuntimeWarning) and NUMPY_FLOATING_POINT_TEXT in text:
        library = "numpy"
    elif raising.split(".")[0] != "hcfplan":
        library = raising.split(".")[0]
    else:
        library = category.__name__
    return f"{library} (in {ours}): {text}"


@contextlib.contextmanager
def collect_warnings() -> Iterator[list[str]]:
    """Record every warning raised inside the block as a line (:func:`warning_line`).

    Yields the list the lines are appended to. Every warning is recorded each time it occurs
    (filters reset to ``always``; filters set inside the block, such as
    :func:`quiet_validity_of_materials`, still apply). The previous warning state is restored
    on exit.
    """
    lines: list[str] = []

    def record(message, category, filename, lineno, file=None, line=None) -> None:
        lines.append(warning_line(message, category, inspect.currentframe()))

    with warnings.catch_warnings():
        warnings.simplefilter("always")
        warnings.showwarning = record
        yield lines


def light_band(frequency: np.ndarray, power: np.ndarray,
               level_db: float = LIGHT_LEVEL_DB) -> tuple[float, float]:
    """Shortest and longest wavelength [m] where ``power`` is above ``level_db`` of its peak."""
    power = np.asarray(power, dtype=float)
    keep = (power >= power.max() * 10 ** (level_db / 10)) & (np.asarray(frequency) > 0)
    f = np.asarray(frequency)[keep]
    return float(c / f.max()), float(c / f.min())


def _note(what: str, lo: float, hi: float, band: tuple[float, float], where: str) -> str | None:
    b_lo, b_hi = band
    if b_lo >= lo and b_hi <= hi:
        return None
    return (f"{what} is valid for {_span_nm(lo, hi)}; {where} "
            f"({_span_nm(b_lo, b_hi)}) is extrapolated")


def _span_nm(lo: float, hi: float) -> str:
    """"800-1100 nm", or "1030 nm" when both ends round to the same nanometre."""
    a, b = f"{lo * 1e9:.0f}", f"{hi * 1e9:.0f}"
    return f"{a} nm" if a == b else f"{a}-{b} nm"


def _gas_fit_name(table) -> str:
    """"argon dispersion (combined fits bideau_mehu1981+borzsonyi2008+peck_fisher1964)", or
    "neon dispersion fit (A. Borzsonyi)" for a table with one fit."""
    from hcfplan.materials.gases import CombinedDispersion

    fit = table.dispersion
    if isinstance(fit, CombinedDispersion):
        return f"{table.name} dispersion (combined fits {fit.label})"
    return f"{table.name} dispersion fit ({fit.source.split(',')[0]})"


def _measured_notes(config, band: tuple[float, float], where: str) -> list[str]:
    """Notes where ``band`` leaves a measured fiber curve (the model is used there)."""
    fiber = config.fiber
    notes = []
    for curve, what, fallback in (
            (getattr(fiber, "gvd_curve", None), "fiber.gvd_csv", "the model's beta"),
            (getattr(fiber, "loss_curve", None), "fiber.loss_csv", "the model's loss")):
        if curve is None:
            continue
        lo, hi = float(curve.wavelength[0]), float(curve.wavelength[-1])
        if band[0] >= lo and band[1] <= hi:
            continue
        notes.append(f"{what} ({curve.source.name}) covers {_span_nm(lo, hi)}; {where} "
                     f"({_span_nm(*band)}) leaves it: {fallback} is used outside")
    return notes


def range_notes(config, medium, band: tuple[float, float], where: str) -> list[str]:
    """Warnings for every fit (gas components, cladding, window) that ``band`` [m] leaves, and
    for every measured fiber curve (``fiber.gvd_csv``, ``fiber.loss_csv``) it leaves.

    A gas whose table combines several fits is checked against the combined range (the first
    fit's lower end to the last fit's upper end; the switch bands lie inside both fits they
    join, so the range has no gap): the note appears only where the light leaves every fit.
    """
    from hcfplan.materials import solids

    notes = []
    if medium is not None:
        for comp in medium.components:
            notes.append(_note(_gas_fit_name(comp.table),
                               *comp.table.dispersion.valid_wavelength, band, where))
    materials = {config.fiber.cladding: "cladding"} if config.fiber.kind != "taylor" else {}
    if config.cell.window_thickness:
        materials.setdefault(config.cell.window_material, "window")
    for name, role in materials.items():
        fit = solids.load_material(name).dispersion
        notes.append(_note(f"{role} ({name}) Sellmeier fit", fit.wavelength_min,
                           fit.wavelength_max, band, where))
    return [n for n in notes if n] + _measured_notes(config, band, where)
