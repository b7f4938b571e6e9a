"""Cell, window and gas-handling estimates: pressure rating, window plate, oxygen depletion.

Pure functions in SI. These are textbook estimates for planning, never approvals: the maker's
rated pressure of every part, local pressure-equipment codes and licensed practice come first
(see :mod:`hcfplan.limits.cautions`).

References
----------
.. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
       McGraw-Hill, 2002, Table 11.2, cases 10a (uniform load, simply supported edge) and 10b
       (uniform load, fixed edge) [case numbers from memory].
.. [2] S. Timoshenko, S. Woinowsky-Krieger, *Theory of Plates and Shells*, 2nd ed.,
       McGraw-Hill, 1959, Secs. 15-16 (uniformly loaded circular plates; the same formulas,
       derived from D nabla^4 w = q).
.. [3] EIGA Doc. 44/09, "Hazards of inert gases and oxygen depletion," European Industrial
       Gases Association, 2009 [from memory: the worst-case release estimate].
.. [4] US Code of Federal Regulations, 29 CFR 1910.134(b), definition of an oxygen-deficient
       atmosphere (below 19.5 % oxygen by volume) [from memory].
.. [5] M. J. Weber (ed.), *Handbook of Optical Materials*, CRC Press, 2003 (elastic constants
       of optical materials) [values from memory].
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Literal

import numpy as np

from hcfplan.constants import P_1ATM
from hcfplan.errors import ConfigError

WindowMounting = Literal["clamped", "unclamped"]
RatingStatus = Literal["within rating", "exceeds rating", "not checked"]
OxygenModel = Literal["instant_mixing", "continuous_mixing", "displacement"]

#: K in t = r sqrt(K dP SF / sigma_f): sigma_max = K q r^2 / t^2 of [1]. Clamped (fixed) edge:
#: 3/4 (case 10b). Unclamped (simply supported): 3 (3 + nu) / 8 (case 10a), which is 9/8 = 1.125
#: for nu = 0; real window materials (nu = 0.16-0.3) give 1.19-1.24, i.e. a 3-5 % thicker plate
#: (see :func:`simply_supported_stress_coefficient`).
WINDOW_STRESS_COEFFICIENTS: dict[str, float] = {"clamped": 0.75, "unclamped": 1.125}
#: Default safety factor on the modulus of rupture for brittle windows (common practice, no
#: source; values of 4 or more are usual for lab windows).
DEFAULT_WINDOW_SAFETY_FACTOR = 4.0
#: Oxygen mole fraction of dry air (CRC Handbook of Chemistry and Physics, composition of
#: dry air, 20.95 % [from memory]).
AIR_OXYGEN_FRACTION = 0.2095
#: Oxygen-deficient atmosphere below this fraction, 29 CFR 1910.134(b) [4] [from memory].
OXYGEN_ACTION_LEVEL = 0.195
#: Small-deflection plate theory holds while the centre deflection stays below about half the
#: thickness (common practice, no source).
SMALL_DEFLECTION_RATIO = 0.5

#: Young's modulus [Pa] and Poisson ratio [-] of window materials, for the deflection estimate
#: only ([5], values from memory; prefer the maker's datasheet).
WINDOW_ELASTIC_CONSTANTS: dict[str, tuple[float, float]] = {
    "fused_silica": (72.7e9, 0.16),
    "caf2": (75.8e9, 0.26),
    "mgf2_ordinary": (138.5e9, 0.27),
    "sapphire_ordinary": (345e9, 0.29),
}


def _positive(name: str, value, unit: str, *, allow_zero: bool = False) -> None:
    value = np.asarray(value, dtype=float)
    ok = (value >= 0) if allow_zero else (value > 0)
    if not np.all(ok & np.isfinite(value)):
        allowed = ">= 0" if allow_zero else "> 0"
        raise ConfigError(f"{name} = {value} {unit}: must be finite and {allowed}")


def _coefficient(mounting: str) -> float:
    if mounting not in WINDOW_STRESS_COEFFICIENTS:
        raise ConfigError(f"window mounting = {mounting!r}: unknown; allowed: "
                          f"{', '.join(WINDOW_STRESS_COEFFICIENTS)}")
    return WINDOW_STRESS_COEFFICIENTS[mounting]


def _scalar(value: np.ndarray):
    return float(value) if np.ndim(value) == 0 else value


def _check_plate_strength(clear_aperture, modulus_of_rupture: float, safety_factor: float) -> None:
    _positive("clear_aperture", clear_aperture, "m")
    _positive("modulus_of_rupture", modulus_of_rupture, "Pa")
    if not safety_factor >= 1:
        raise ConfigError(f"window safety factor = {safety_factor}: must be >= 1")


def _check_poisson_ratio(poisson_ratio: float) -> None:
    if not 0 <= poisson_ratio < 0.5:
        raise ConfigError(f"poisson_ratio = {poisson_ratio}: must be in [0, 0.5)")


# ----------------------------------------------------------------------------- cell rating
def pressure_rating_status(pressure: float, rated_pressure: float | None) -> RatingStatus:
    """Planned fill pressure against the cell maker's rated pressure (neutral wording).

    Parameters
    ----------
    pressure : float
        Planned absolute fill pressure. [Pa]
    rated_pressure : float or None
        Maker's rated maximum pressure of the cell (the lowest-rated part); None if unknown.
        [Pa]

    Returns
    -------
    str
        ``"within rating"``, ``"exceeds rating"`` or ``"not checked"`` (no rating given).

    References
    ----------
    None: a comparison with the maker's rating, no published model. The maker's rating, local
    pressure-equipment codes and licensed practice decide, not this comparison.
    """
    _positive("pressure", pressure, "Pa", allow_zero=True)
    if rated_pressure is None:
        return "not checked"
    _positive("rated_pressure", rated_pressure, "Pa")
    return "within rating" if pressure <= rated_pressure else "exceeds rating"


# ----------------------------------------------------------------------------- window plate
def window_pressure_difference(fill_pressure, outside_pressure: float = P_1ATM):
    """Load on a window: |p_fill - p_outside|. [Pa]

    Parameters
    ----------
    fill_pressure : float or ndarray
        Absolute pressure inside the cell. [Pa]
    outside_pressure : float
        Absolute pressure on the other side: 1 atm for a window to the lab (default), 0 for a
        window onto a vacuum beamline (then the full fill pressure loads it). [Pa]

    References
    ----------
    None: numerical helper (the load is the pressure difference across the plate).
    """
    _positive("fill_pressure", fill_pressure, "Pa", allow_zero=True)
    _positive("outside_pressure", outside_pressure, "Pa", allow_zero=True)
    return _scalar(np.abs(np.asarray(fill_pressure, dtype=float) - outside_pressure))


def simply_supported_stress_coefficient(poisson_ratio: float) -> float:
    """K = 3 (3 + nu) / 8 of a uniformly loaded, simply supported circular plate [1, 2]. [-]

    Parameters
    ----------
    poisson_ratio : float
        Poisson ratio nu of the plate, 0 <= nu < 0.5. [-]

    Notes
    -----
    Maximum stress (at the centre) sigma = 3 (3 + nu) q a^2 / (8 t^2), Table 11.2 case 10a of
    [1]; nu = 0 gives the 1.125 of :data:`WINDOW_STRESS_COEFFICIENTS`.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
           McGraw-Hill, 2002, Table 11.2, cases 10a (uniform load, simply supported edge) and
           10b (uniform load, fixed edge) [case numbers from memory].
    .. [2] S. Timoshenko, S. Woinowsky-Krieger, *Theory of Plates and Shells*, 2nd ed.,
           McGraw-Hill, 1959, Secs. 15-16 (uniformly loaded circular plates; the same formulas,
           derived from D nabla^4 w = q).
    """
    _check_poisson_ratio(poisson_ratio)
    return 3.0 * (3.0 + poisson_ratio) / 8.0


def window_min_thickness(
    pressure_difference,
    clear_aperture,
    modulus_of_rupture: float,
    *,
    safety_factor: float = DEFAULT_WINDOW_SAFETY_FACTOR,
    mounting: WindowMounting = "clamped",
):
    """Smallest window thickness for a uniform pressure load with a safety factor.

    Parameters
    ----------
    pressure_difference : float or ndarray
        Pressure load dP across the window (:func:`window_pressure_difference`). [Pa]
    clear_aperture : float or ndarray
        Unsupported (clear) diameter D = 2 r. [m]
    modulus_of_rupture : float
        Bending strength sigma_f of the material. [Pa]
    safety_factor : float
        SF >= 1 applied to the stress (default 4, common practice, no source).
    mounting : {"clamped", "unclamped"}
        Edge support; selects K of :data:`WINDOW_STRESS_COEFFICIENTS`.

    Returns
    -------
    float or ndarray
        :math:`t_{min} = r\\sqrt{K\\,\\Delta P\\,SF/\\sigma_f}`. [m]

    Notes
    -----
    From sigma_max = K dP r^2 / t^2 set equal to sigma_f / SF; K = 3/4 for a fixed edge
    (Table 11.2 case 10b of [1]: sigma = 3 q a^2 / (4 t^2) at the edge) and 9/8 for a simply
    supported edge with nu = 0 (case 10a). Thin-plate, small-deflection theory: valid for
    t << r and a centre deflection below about t/2 (:func:`window_center_deflection`). Brittle
    materials scatter in strength and weaken with surface damage and thermal shock; the
    safety factor covers only part of that.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
           McGraw-Hill, 2002, Table 11.2, cases 10a (uniform load, simply supported edge) and
           10b (uniform load, fixed edge) [case numbers from memory].
    .. [2] S. Timoshenko, S. Woinowsky-Krieger, *Theory of Plates and Shells*, 2nd ed.,
           McGraw-Hill, 1959, Secs. 15-16 (uniformly loaded circular plates; the same formulas,
           derived from D nabla^4 w = q).
    """
    _positive("pressure_difference", pressure_difference, "Pa", allow_zero=True)
    _check_plate_strength(clear_aperture, modulus_of_rupture, safety_factor)
    radius = 0.5 * np.asarray(clear_aperture, dtype=float)
    load = np.asarray(pressure_difference, dtype=float)
    return _scalar(radius * np.sqrt(_coefficient(mounting) * load * safety_factor
                                    / modulus_of_rupture))


def window_max_pressure_difference(
    thickness: float,
    clear_aperture: float,
    modulus_of_rupture: float,
    *,
    safety_factor: float = DEFAULT_WINDOW_SAFETY_FACTOR,
    mounting: WindowMounting = "clamped",
) -> float:
    """Largest pressure load a window of given thickness carries with the safety factor. [Pa]

    The inverse of :func:`window_min_thickness`: dP_max = sigma_f t^2 / (K SF r^2)
    (parameters as there; ``thickness`` [m]); the same plate formulas of [1], [2].

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
           McGraw-Hill, 2002, Table 11.2, cases 10a (uniform load, simply supported edge) and
           10b (uniform load, fixed edge) [case numbers from memory].
    .. [2] S. Timoshenko, S. Woinowsky-Krieger, *Theory of Plates and Shells*, 2nd ed.,
           McGraw-Hill, 1959, Secs. 15-16 (uniformly loaded circular plates; the same formulas,
           derived from D nabla^4 w = q).
    """
    _positive("thickness", thickness, "m")
    _check_plate_strength(clear_aperture, modulus_of_rupture, safety_factor)
    radius = 0.5 * clear_aperture
    return modulus_of_rupture * thickness**2 / (_coefficient(mounting) * safety_factor * radius**2)


def _deflection_clamped(nu: float) -> float:
    return 3.0 * (1.0 - nu**2) / 16.0  # Table 11.2 case 10b of [1]


def _deflection_simply_supported(nu: float) -> float:
    return 3.0 * (5.0 + nu) * (1.0 - nu) / 16.0  # Table 11.2 case 10a of [1]


#: mounting -> y_max E t^3 / (q r^4) as a function of the Poisson ratio.
_DEFLECTION_FACTORS: dict[str, Callable[[float], float]] = {
    "clamped": _deflection_clamped,
    "unclamped": _deflection_simply_supported,
}


def window_center_deflection(
    pressure_difference,
    clear_aperture: float,
    thickness: float,
    youngs_modulus: float,
    poisson_ratio: float,
    mounting: WindowMounting = "clamped",
):
    """Centre deflection of a uniformly loaded circular window (info value).

    Parameters
    ----------
    pressure_difference : float or ndarray
        Pressure load q. [Pa]
    clear_aperture : float
        Unsupported diameter 2 r. [m]
    thickness : float
        Plate thickness t. [m]
    youngs_modulus : float
        Young's modulus E. [Pa]
    poisson_ratio : float
        Poisson ratio nu, 0 <= nu < 0.5. [-]
    mounting : {"clamped", "unclamped"}
        Edge support.

    Returns
    -------
    float or ndarray
        :math:`y = c\\,q r^4/(E t^3)` with c = 3(1 - nu^2)/16 (fixed edge, case 10b of [1])
        or 3(5 + nu)(1 - nu)/16 (simply supported, case 10a). [m]

    Notes
    -----
    Small-deflection theory (valid for y below about t/2); a bowed window acts as a weak
    lens, which is why the value is shown.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
           McGraw-Hill, 2002, Table 11.2, cases 10a (uniform load, simply supported edge) and
           10b (uniform load, fixed edge) [case numbers from memory].
    .. [2] S. Timoshenko, S. Woinowsky-Krieger, *Theory of Plates and Shells*, 2nd ed.,
           McGraw-Hill, 1959, Secs. 15-16 (uniformly loaded circular plates; the same formulas,
           derived from D nabla^4 w = q).
    """
    for name, value, unit in (("clear_aperture", clear_aperture, "m"),
                              ("thickness", thickness, "m"),
                              ("youngs_modulus", youngs_modulus, "Pa")):
        _positive(name, value, unit)
    _positive("pressure_difference", pressure_difference, "Pa", allow_zero=True)
    _check_poisson_ratio(poisson_ratio)
    _coefficient(mounting)
    factor = _DEFLECTION_FACTORS[mounting](poisson_ratio)
    radius = 0.5 * clear_aperture
    load = np.asarray(pressure_difference, dtype=float)
    return _scalar(factor * load * radius**4 / (youngs_modulus * thickness**3))


# ----------------------------------------------------------------------------- gas handling
def released_gas_volume(cylinder_volume, cylinder_density, room_density):
    """Volume at room conditions of the gas in a cylinder: V_cyl N_cyl / N_room. [m^3]

    Parameters
    ----------
    cylinder_volume : float or ndarray
        Water (internal) volume of the cylinder(s). [m^3]
    cylinder_density : float
        Number density in the cylinder at its filling pressure and room temperature, from the
        real-gas EOS (CoolProp): at 200 bar argon is about 7 % denser than the ideal gas. [1/m^3]
    room_density : float
        Number density of the same gas at room pressure and temperature. [1/m^3]

    Notes
    -----
    The whole inventory at room conditions, the starting point of the worst-case release
    estimate of [1].

    References
    ----------
    .. [1] EIGA Doc. 44/09, "Hazards of inert gases and oxygen depletion," European Industrial
           Gases Association, 2009 [from memory: the worst-case release estimate].
    """
    _positive("cylinder_volume", cylinder_volume, "m^3", allow_zero=True)
    _positive("cylinder_density", cylinder_density, "1/m^3", allow_zero=True)
    _positive("room_density", room_density, "1/m^3")
    return _scalar(np.asarray(cylinder_volume, dtype=float) * cylinder_density / room_density)


def _share_instant(x: np.ndarray) -> np.ndarray:
    return x / (1.0 + x)  # all gas mixed in before any leaves: V_g / (V_room + V_g)


def _share_continuous(x: np.ndarray) -> np.ndarray:
    return -np.expm1(-x)  # slow release, mixture leaves as gas comes in: 1 - exp(-V_g/V_room)


def _share_displacement(x: np.ndarray) -> np.ndarray:
    return np.minimum(x, 1.0)  # no mixing: the gas pushes out an equal volume of room air


#: Room-release model -> fraction of the room's gas that is released gas, as a function of
#: x = V_g / V_room. Ordered from the least to the most pessimistic for the same release.
OXYGEN_DEPLETION_MODELS: dict[str, Callable[[np.ndarray], np.ndarray]] = {
    "instant_mixing": _share_instant,
    "continuous_mixing": _share_continuous,
    "displacement": _share_displacement,
}


def oxygen_fraction_after_release(
    room_volume: float,
    released_volume,
    *,
    model: OxygenModel = "instant_mixing",
    released_oxygen_fraction: float = 0.0,
    air_oxygen_fraction: float = AIR_OXYGEN_FRACTION,
):
    """Worst-case oxygen fraction in a closed room after the whole gas inventory escapes.

    Parameters
    ----------
    room_volume : float
        Free volume of the room. [m^3]
    released_volume : float or ndarray
        Released gas at room conditions (:func:`released_gas_volume`). [m^3]
    model : {"instant_mixing", "continuous_mixing", "displacement"}
        Release model (:data:`OXYGEN_DEPLETION_MODELS`). ``"instant_mixing"`` (default):
        :math:`x_{O_2} = 0.2095\\,V_{room}/(V_{room}+V_g)`, the gas mixes completely with the
        room air and the excess volume leaves as mixture; the kind of estimate of [1].
        ``"continuous_mixing"``: :math:`0.2095\\,e^{-V_g/V_{room}}`. ``"displacement"``:
        :math:`0.2095\\,(1 - V_g/V_{room})`, the released gas pushes out unmixed air (the most
        pessimistic of the three).
    released_oxygen_fraction : float
        Oxygen fraction of the released gas itself (0 for inert gases, 0.2095 for air). [-]
    air_oxygen_fraction : float
        Oxygen fraction of the room air before the release. [-]

    Returns
    -------
    float or ndarray
        Oxygen mole fraction after the release. [-]

    Notes
    -----
    No ventilation, one well-mixed room (or, for ``"displacement"``, none). Gases denser than
    air (Ar, Kr, Xe) pool near the floor and lighter ones (He) collect under the ceiling, so
    the local fraction can be lower than any of these room averages. Compare with
    :data:`OXYGEN_ACTION_LEVEL` [2].

    References
    ----------
    .. [1] EIGA Doc. 44/09, "Hazards of inert gases and oxygen depletion," European Industrial
           Gases Association, 2009 [from memory: the worst-case release estimate].
    .. [2] US Code of Federal Regulations, 29 CFR 1910.134(b), definition of an oxygen-deficient
           atmosphere (below 19.5 % oxygen by volume) [from memory].
    """
    _positive("room_volume", room_volume, "m^3")
    _positive("released_volume", released_volume, "m^3", allow_zero=True)
    if model not in OXYGEN_DEPLETION_MODELS:
        raise ConfigError(f"oxygen depletion model = {model!r}: unknown; allowed: "
                          f"{', '.join(OXYGEN_DEPLETION_MODELS)}")
    share = OXYGEN_DEPLETION_MODELS[model](np.asarray(released_volume, dtype=float) / room_volume)
    return _scalar(air_oxygen_fraction * (1.0 - share) + released_oxygen_fraction * share)


def max_release_for_oxygen_level(
    room_volume: float,
    oxygen_level: float = OXYGEN_ACTION_LEVEL,
    air_oxygen_fraction: float = AIR_OXYGEN_FRACTION,
) -> float:
    """Largest inert-gas release (room conditions) that keeps the instant-mixing fraction at
    ``oxygen_level``: V_g = V_room (x_air / x_level - 1). [m^3]

    Parameters
    ----------
    room_volume : float
        Free room volume. [m^3]
    oxygen_level : float
        Oxygen fraction not to go below (default 0.195 [2], from memory). [-]
    air_oxygen_fraction : float
        Oxygen fraction of the air. [-]

    References
    ----------
    .. [1] EIGA Doc. 44/09, "Hazards of inert gases and oxygen depletion," European Industrial
           Gases Association, 2009 [from memory: the worst-case release estimate].
    .. [2] US Code of Federal Regulations, 29 CFR 1910.134(b), definition of an oxygen-deficient
           atmosphere (below 19.5 % oxygen by volume) [from memory].
    """
    _positive("room_volume", room_volume, "m^3")
    if not 0 < oxygen_level < air_oxygen_fraction:
        raise ConfigError(f"oxygen_level = {oxygen_level}: must be in (0, {air_oxygen_fraction})")
    return room_volume * (air_oxygen_fraction / oxygen_level - 1.0)

