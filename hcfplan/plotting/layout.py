"""Layout helpers shared by the figure modules: legends that cover no data, human axis names
for config keys, the set-up line of a figure title, and data cut to the shown range.

Display only: nothing here is physics.
"""

from __future__ import annotations

import numpy as np

from hcfplan.units import SUFFIXES

#: Display names of the config sections (the first part of a dotted key).
_SECTIONS = {"laser": "Pump", "fiber": "Fiber", "gas": "Gas", "cell": "Cell",
             "compressor": "Compressor", "thz": "THz crystal", "limits": "Limit",
             "grid": "Grid", "spread": "Spread"}
#: Names of keys whose words alone would read badly.
_NAMES = {"laser.fwhm_fs": "Pump FWHM duration", "laser.energy_uj": "Pulse energy",
          "laser.gdd_fs2": "Input GDD", "laser.wavelength_nm": "Pump wavelength",
          "gas.pressure_bar": "Gas fill pressure", "gas.species": "Gas",
          "fiber.core_diameter_um": "Core diameter", "fiber.length_m": "Fiber length",
          "fiber.wall_thickness_um": "Wall thickness", "thz.thickness_mm": "Crystal thickness",
          "compressor.mirror_gdd_fs2": "Mirror GDD per bounce"}
#: Display units with symbols (the suffix table writes them in ASCII).
_UNITS = {"um": "µm", "uJ": "µJ", "fs^2": "fs²", "fs^3": "fs³", "um^2": "µm²"}


def key_name(key: str) -> str:
    """The human name of a config key without its unit, e.g. ``laser.energy_uj`` ->
    ``"Pulse energy"``."""
    label = key_label(key)
    return label.rsplit(" (", 1)[0] if label.endswith(")") else label


def key_label(key: str) -> str:
    """Axis label of a config key: a human name and its unit, e.g. ``gas.pressure_bar`` ->
    ``"Gas fill pressure (bar)"``. Unknown keys read as their words with the unit."""
    section, _, name = key.rpartition(".")
    suffix = next((s for s in sorted(SUFFIXES, key=len, reverse=True)
                   if name.endswith("_" + s)), None)
    words = name[: -len(suffix) - 1] if suffix else name
    human = _NAMES.get(key) or " ".join(
        filter(None, [_SECTIONS.get(section.split(".")[-1], section), words.replace("_", " ")]))
    human = human[:1].upper() + human[1:]
    if suffix is None:
        return human
    unit = SUFFIXES[suffix][2]
    return f"{human} ({_UNITS.get(unit, unit)})"


def legend_beside(ax, *, past_twin: bool = False, **kwargs):
    """Legend to the right of ``ax``, outside the data area, so it covers no curve.

    ``past_twin``: leave room for the tick labels and label of a right-hand twin axis.
    """
    x = 1.22 if past_twin else 1.02
    return ax.legend(loc="upper left", bbox_to_anchor=(x, 1.0), borderaxespad=0.0,
                     fontsize="small", **kwargs)


def setup_line(config) -> str:
    """Gas, pressure and core of a config in words, e.g. ``"Ar 1.2 bar, 50 µm core, 0.8 m ARF"``
    (parts that the config has not, e.g. no gas of a Taylor fiber, are left out)."""
    parts = []
    gas = getattr(config, "gas", None)
    if gas is not None:
        names = "+".join(f"{name} {frac:.0%}" if len(gas.components) > 1 else name
                         for name, frac in gas.components)
        parts.append(f"{names} {gas.pressure / 1e5:.3g} bar")
    fiber = getattr(config, "fiber", None)
    if fiber is not None:
        kind = {"capillary": "capillary", "antiresonant": "anti-resonant fiber"}.get(
            fiber.kind, f"{fiber.kind} fiber")
        core = (f"{2 * fiber.core_radius * 1e6:.3g} µm core, "
                if fiber.core_radius is not None else "")
        modes = getattr(fiber, "modes", 1)
        parts.append(f"{core}{fiber.length:.3g} m {kind}"
                     + (f", EH11-EH1{modes}" if modes > 1 else ""))
    return ", ".join(parts)


def shown(x: np.ndarray, lo: float, hi: float, *ys: np.ndarray, pad: int = 1):
    """``x`` and ``ys`` cut to the samples inside [lo, hi] (``x`` ascending) plus ``pad`` on
    each side, so that lines still reach the frame: drawing only what is shown."""
    x = np.asarray(x)
    i0 = max(int(np.searchsorted(x, lo, side="left")) - pad, 0)
    i1 = min(int(np.searchsorted(x, hi, side="right")) + pad, x.size)
    return (x[i0:i1], *(np.asarray(y)[..., i0:i1] for y in ys))


_SUPERSCRIPTS = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _power_of_ten(value: float, _pos=None) -> str:
    """Tick label 10ⁿ in plain text (mathtext costs a parse per label and figure)."""
    if value <= 0:
        return ""
    exponent = np.log10(value)
    if abs(exponent - round(exponent)) > 1e-6:
        return ""
    return "10" + str(int(round(exponent))).translate(_SUPERSCRIPTS)


def _plain_number(value: float) -> str:
    """A tick value in plain text: ``0.02``, ``5``, ``300``, or ``5×10⁻⁶`` far from 1."""
    exponent = int(np.floor(np.log10(value) + 1e-9))
    if -3 <= exponent <= 3:
        return f"{value:g}"
    mantissa = value / 10.0**exponent
    return f"{mantissa:.0f}×" + _power_of_ten(10.0**exponent)


def plain_log_ticks(axis) -> None:
    """Label a log ``axis`` (``ax.yaxis``/``ax.xaxis``) with plain-text powers of ten (no
    mathtext parse, which costs a parse per label and figure); where the axis spans less than
    two decades, the minor ticks at 2 and 5 times a power of ten are labelled too."""
    from matplotlib.ticker import FuncFormatter

    def narrow() -> bool:
        low, high = sorted(axis.get_view_interval())
        return low > 0 and high / low < 100

    def major(value: float, _pos=None) -> str:
        if value > 0 and narrow():
            return _plain_number(value)
        return _power_of_ten(value)

    def minor(value: float, _pos=None) -> str:
        if value <= 0 or not narrow():
            return ""
        mantissa = value / 10.0 ** np.floor(np.log10(value) + 1e-9)
        return _plain_number(value) if round(mantissa, 6) in (2.0, 5.0) else ""

    axis.set_major_formatter(FuncFormatter(major))
    axis.set_minor_formatter(FuncFormatter(minor))
