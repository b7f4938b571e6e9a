"""Physical checks of a gas table: where a dispersion fit is unusable, and the EOS name.

A gas far from its absorption lines has a real refractive index above 1 that varies smoothly
with wavelength. A pole of a fit, a non-real index (n^2 < 0) or n <= 1 inside a range means the
coefficients are wrong there (a slip of units or sign, or a fit of another medium), and a run
would carry NaN or a meaningless dispersion. :func:`fit_poles` finds the poles of the published
forms exactly, :func:`index_defect` samples the index between them;
:mod:`hcfplan.materials.gas_tables` applies both over a fit's stated range while loading and
:mod:`hcfplan.io.crosschecks` over the wavelengths a run needs. :func:`check_eos_name` checks a
table's equation-of-state name against CoolProp.

The functions take the fit's form and coefficients (as printed, micrometre units) and the
index as a function, so they do not depend on where the fit records are defined.

References
----------
.. [1] A. Borzsonyi, Z. Heiner, M. P. Kalashnikov, A. P. Kovacs, K. Osvay, Appl. Opt. 47,
       4856-4863 (2008), doi:10.1364/AO.47.004856 (form ``n2_minus_1_sellmeier``).
.. [2] P. E. Ciddor, Appl. Opt. 35, 1566-1573 (1996), doi:10.1364/AO.35.001566, Eq. (1)
       (form ``n_minus_1_inverse``).
.. [3] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Ind. Eng. Chem. Res. 53, 2498-2508
       (2014), doi:10.1021/ie4033999 (CoolProp and its fluid list).
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Callable, Sequence

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.materials.gas_table_schema import DISPERSION_FORM_KEYS

#: Wavelengths sampled (log-spaced) when an index is checked over a range; the poles are found
#: exactly, the samples find where n is below 1 or not a real number.
INDEX_CHECK_SAMPLES = 400


def fit_poles(form: str, coefficients: Sequence[tuple[float, float]]
              ) -> list[tuple[str, int, float]]:
    """Wavelengths at which a term of a published dispersion form diverges.

    Parameters
    ----------
    form : str
        ``"n2_minus_1_sellmeier"`` or ``"n_minus_1_inverse"``.
    coefficients : sequence of (float, float)
        Pairs as printed: (B_i, C_i [um^2]) or (A_i [um^-2], B_i [um^-2]).

    Returns
    -------
    list of (coefficient key, index, wavelength [m])
        For ``"n2_minus_1_sellmeier"`` a term B lambda^2 / (lambda^2 - C) diverges at
        lambda = sqrt(C) (C > 0, key ``c_um2``); for ``"n_minus_1_inverse"`` a term
        A / (B - lambda^-2) at lambda = 1 / sqrt(B) (B > 0, key ``b_per_um2``). Terms with a
        zero numerator have no pole.

    References
    ----------
    The forms of [1] and Eq. (1) of [2] (module docstring).
    """
    found = []
    for i, (first, second) in enumerate(coefficients):
        if first == 0 or second <= 0:
            continue
        if form == "n2_minus_1_sellmeier":
            found.append(("c_um2", i, math.sqrt(second) * 1e-6))
        elif form == "n_minus_1_inverse":
            found.append(("b_per_um2", i, 1e-6 / math.sqrt(second)))
    return found


def index_defect(index: Callable[[np.ndarray], np.ndarray], form: str,
                 coefficients: Sequence[tuple[float, float]], low: float, high: float) -> str:
    """What makes a fit unusable for a gas between ``low`` and ``high`` [m], or ''.

    Parameters
    ----------
    index : callable
        The fit's refractive index n(wavelength [m]) at its reference state.
    form, coefficients
        The fit's form and coefficients as printed (see :func:`fit_poles`).
    low, high : float
        The wavelength range, 0 < low < high. [m]

    Returns
    -------
    str
        '' if the fit has no pole in the range and n is real and > 1 at
        :data:`INDEX_CHECK_SAMPLES` log-spaced wavelengths; otherwise the first coefficient key
        at fault (``c_um2[1] = 0.81: the fit has a pole at 900 nm ...``, or both keys of the
        form with the first wavelength where n fails).

    References
    ----------
    The forms of [1] and [2] (module docstring); the requirement n > 1: common practice for gases
    in the visible and infrared, no source.
    """
    for key, i, at in fit_poles(form, coefficients):
        if low <= at <= high:
            return (f"{key}[{i}] = {coefficients[i][1]:g}: the fit has a pole at "
                    f"{at * 1e9:.4g} nm (the index diverges there)")
    wavelength = np.geomspace(low, high, INDEX_CHECK_SAMPLES)
    with np.errstate(all="ignore"):
        n = np.asarray(index(wavelength), dtype=float)
    bad = ~(np.isfinite(n) & (n > 1.0))
    if not np.any(bad):
        return ""
    at, value = wavelength[bad], n[bad][0]
    shown = f"{value:.9g}" if np.isfinite(value) else "not a real number (n^2 < 0)"
    first, second = DISPERSION_FORM_KEYS[form]
    return (f"{first} and {second}: n = {shown} at {at[0] * 1e9:.4g} nm "
            f"({at.size} of {wavelength.size} sampled wavelengths in "
            f"{at.min() * 1e9:.4g}-{at.max() * 1e9:.4g} nm); a gas index must be real and > 1")


def check_eos_name(name: str, where: str, path: str) -> None:
    """Refuse an equation-of-state fluid name that CoolProp does not know.

    Parameters
    ----------
    name : str
        The fluid name of the table (``eos.coolprop_name``).
    where, path : str
        The key and the file, for the message.

    Raises
    ------
    ConfigError
        One line naming the file and the key, with the closest CoolProp name.

    References
    ----------
    [3] (module docstring): ``PropsSI("Tcrit", name)`` fails for a name CoolProp does not know;
    the suggestions come from its ``FluidsList``.
    """
    from hcfplan.materials.coolprop_calls import props_si  # cached on disk

    try:
        props_si("Tcrit", name)
        return
    except ValueError:
        pass
    from CoolProp.CoolProp import get_global_param_string  # lazy: 0.2-0.4 s

    fluids = get_global_param_string("FluidsList").split(",")
    close = difflib.get_close_matches(name, fluids, n=1, cutoff=0.5)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    raise ConfigError(f"{path}: {where} = {name!r}: not a fluid of the equation-of-state "
                      f"library CoolProp{hint} (e.g. 'Argon', 'Helium', 'Nitrogen', 'Air')")
