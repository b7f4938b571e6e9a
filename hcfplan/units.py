"""Units at the boundary: the only module where non-SI units appear.

Config keys and command-line options carry a lowercase unit suffix (``core_diameter_um``,
``pressure_bar``). :data:`SUFFIXES` maps each allowed suffix to the factor that converts a value
in that unit to SI. :func:`to_si` and :func:`from_si` are used by ``io`` and ``cli`` only.
"""

from __future__ import annotations

import math

#: suffix -> (factor to SI, SI unit, display name)
SUFFIXES: dict[str, tuple[float, str, str]] = {
    "m": (1.0, "m", "m"),
    "mm": (1e-3, "m", "mm"),
    "um": (1e-6, "m", "um"),
    "nm": (1e-9, "m", "nm"),
    "s": (1.0, "s", "s"),
    "ps": (1e-12, "s", "ps"),
    "fs": (1e-15, "s", "fs"),
    "fs2": (1e-30, "s^2", "fs^2"),
    "fs2_per_m": (1e-30, "s^2/m", "fs^2/m"),
    "fs3": (1e-45, "s^3", "fs^3"),
    "j": (1.0, "J", "J"),
    "mj": (1e-3, "J", "mJ"),
    "uj": (1e-6, "J", "uJ"),
    "nj": (1e-9, "J", "nJ"),
    "w": (1.0, "W", "W"),
    "kw": (1e3, "W", "kW"),
    "gw": (1e9, "W", "GW"),
    "pa": (1.0, "Pa", "Pa"),
    "bar": (1e5, "Pa", "bar"),
    "mbar": (1e2, "Pa", "mbar"),
    "mpa": (1e6, "Pa", "MPa"),
    "k": (1.0, "K", "K"),
    "hz": (1.0, "Hz", "Hz"),
    "khz": (1e3, "Hz", "kHz"),
    "mhz": (1e6, "Hz", "MHz"),
    "thz": (1e12, "Hz", "THz"),
    "m2": (1.0, "m^2", "m^2"),
    "um2": (1e-12, "m^2", "um^2"),
    "m3": (1.0, "m^3", "m^3"),
    "l": (1e-3, "m^3", "L"),
    "db": (1.0, "dB", "dB"),
    "rad": (1.0, "rad", "rad"),
    "percent": (0.01, "1", "%"),
    "per_m": (1.0, "1/m", "1/m"),
    "db_per_m": (1.0, "dB/m", "dB/m"),
    "per_w_per_m": (1.0, "1/(W m)", "1/(W m)"),
    "j_per_m2": (1.0, "J/m^2", "J/m^2"),
    "j_per_cm2": (1e4, "J/m^2", "J/cm^2"),
    "w_per_cm2": (1e4, "W/m^2", "W/cm^2"),
    "pm_per_v": (1e-12, "m/V", "pm/V"),
    "fs_n_per_mm": (float("nan"), "s^n/m", "fs^n/mm"),  # order-dependent, see taylor_betas_to_si
}


def to_si(value: float, suffix: str) -> float:
    """Convert ``value`` given in the unit named by ``suffix`` to SI."""
    factor = SUFFIXES[suffix][0]
    return value * factor


def from_si(value: float, suffix: str) -> float:
    """Convert an SI ``value`` to the unit named by ``suffix``."""
    factor = SUFFIXES[suffix][0]
    return value / factor


def suffix_of(key: str) -> str | None:
    """The longest known unit suffix ending ``key`` (``'core_diameter_um'`` -> ``'um'``)."""
    best = None
    for suffix in SUFFIXES:
        if key.endswith("_" + suffix) and (best is None or len(suffix) > len(best)):
            best = suffix
    return best


def taylor_betas_to_si(betas_fs_n_per_mm: list[float]) -> list[float]:
    """Convert ``[beta2, beta3, ...]`` given in fs^n/mm to SI s^n/m.

    ``betas[k]`` is beta_{k+2}; fs^n/mm = 1e-15^n s^n / 1e-3 m.
    """
    return [b * (1e-15 ** (k + 2)) / 1e-3 for k, b in enumerate(betas_fs_n_per_mm)]


def db_to_power_ratio(db: float) -> float:
    """Power ratio from a level in decibels (``-20 dB`` -> 0.01)."""
    return 10.0 ** (db / 10.0)


def power_loss_db_per_m_to_field_attenuation(loss_db_per_m: float) -> float:
    """Field attenuation alpha [1/m] from a power loss in dB/m (power ~ exp(-2 alpha z))."""
    return loss_db_per_m * math.log(10.0) / 20.0
