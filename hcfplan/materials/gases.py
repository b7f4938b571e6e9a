"""Gas optics: refractive index, Kerr coefficient, mixtures and the medium of a fill.

Pure functions in SI. The tables (published fits and constants with their sources) are loaded
by :mod:`hcfplan.materials.gas_tables`, the number density comes from
:mod:`hcfplan.materials.gas_density` and the phase check from :mod:`hcfplan.materials.gas_phase`;
the table names used most are re-exported here.

Density scaling (stated once, used by the index and the Kerr coefficient)
-------------------------------------------------------------------------
A fit or an n2 value holds at its reference state (T_ref, p_ref). At another state the
Lorentz-Lorenz quantity :math:`(n^2-1)/(n^2+2)` and n2 scale with the number density,
:math:`N / N_{ref}`, where :math:`N_{ref}` is computed **with the same equation of state** as
``N`` at (T_ref, p_ref). With ``eos="coolprop"`` the real-gas density is used on both sides, so
a fit is reproduced exactly at its own reference state.

References
----------
.. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid thermophysical
       property evaluation and the open-source thermophysical property library CoolProp,"
       Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
.. [2] M. Born, E. Wolf, *Principles of Optics*, 7th ed., Cambridge Univ. Press, 1999, Sec. 2.3
       (Lorentz-Lorenz formula) [section number from memory].
"""

from __future__ import annotations

import warnings
from collections import OrderedDict
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.materials.gas_density import (
    EosName,
    amagat_density,
    check_state,
    coolprop_mixture_density,
    dalton_density,
    eos_model,
    number_density,
    reference_density,
)
from hcfplan.materials.gas_phase import check_fill, fill_phase
from hcfplan.materials.gas_tables import (
    GAS_PATH_VARIABLE,
    CombinedDispersion,
    DispersionFit,
    GasTable,
    IonizationData,
    KerrData,
    RotationalRamanSpecies,
    available_gases,
    combined_term,
    fit_term,
    gas_search_dirs,
    load_gas_table,
    refractive_index_from_fit,
    shipped_gas_dir,
)

__all__ = [
    "GAS_PATH_VARIABLE",
    "CombinedDispersion",
    "DispersionFit",
    "GasComponent",
    "GasFill",
    "GasMedium",
    "GasTable",
    "IonizationData",
    "KerrData",
    "RotationalRamanSpecies",
    "available_gases",
    "fit_label",
    "gas_medium",
    "gas_search_dirs",
    "kerr_coefficient",
    "load_gas_table",
    "refractive_index",
    "refractive_index_reference",
    "shipped_gas_dir",
]

#: Mole fractions must sum to 1 within this.
FRACTION_SUM_TOLERANCE = 1e-6


# --- refractive index and Kerr coefficient ------------------------------------------------------


def _fit(table: GasTable, key: str | None) -> DispersionFit | CombinedDispersion:
    if key is None or key == table.dispersion.key:
        return table.dispersion
    fits = {fit.key: fit for fit in table.dispersion_fits or (table.dispersion,)}
    if key not in fits:
        allowed = list(dict.fromkeys([table.dispersion.key, *fits]))
        raise ConfigError(f"{table.name}: dispersion fit {key!r}: unknown; allowed: {allowed}")
    return fits[key]


def fit_label(record: DispersionFit | CombinedDispersion) -> str:
    """Short name of a dispersion record for messages: its key, or the keys it combines.

    References
    ----------
    None: text helper.
    """
    return record.label if isinstance(record, CombinedDispersion) else repr(record.key)


def _outside_message(fit, wavelength: np.ndarray, label: str) -> str:
    """One message if any wavelength lies outside the record's range, else ''."""
    lo, hi = fit.valid_wavelength
    outside = (wavelength < lo) | (wavelength > hi)
    if not np.any(outside):
        return ""
    what = "fits" if isinstance(fit, CombinedDispersion) else "fit"
    return (
        f"{label} dispersion {what} {fit_label(fit)} valid for {lo * 1e9:.0f}-{hi * 1e9:.0f} nm; "
        f"{int(np.count_nonzero(outside))} of {wavelength.size} wavelengths "
        f"({np.min(wavelength) * 1e9:.4g}-{np.max(wavelength) * 1e9:.4g} nm) are extrapolated"
    )


def _wavelength(omega: np.ndarray) -> np.ndarray:
    omega = np.asarray(omega, dtype=float)
    if np.any(omega <= 0):
        raise ConfigError("omega: all angular frequencies must be > 0 rad/s")
    return 2 * np.pi * c / omega


#: Per-molecule terms kept by :func:`_term_per_molecule`, the most recent last: a run evaluates
#: the index of its fill on the same grid 10-15 times (waveguide, wall model, limits), and a
#: combined UV/IR record costs about 0.7 ms on the demo grid of 2048 points (measured).
_TERMS: OrderedDict = OrderedDict()
#: Most entries of :data:`_TERMS` (about 32 kB each on the demo grid: the term and, in its key,
#: the wavelengths).
TERM_CACHE_SIZE = 32


def _term_per_molecule(table: GasTable, record, wavelength: np.ndarray, eos: str) -> np.ndarray:
    """(n^2-1)/(n^2+2) / N_ref of a record [m^3]; a combined record mixes its fits' terms.

    A pure function of the record, its gas's equation of state and the wavelengths, kept for
    the last :data:`TERM_CACHE_SIZE` inputs (read-only arrays; the key holds the wavelengths'
    bytes, so only equal inputs share an entry)."""
    key = (table.coolprop_name, record, eos, wavelength.dtype.str, wavelength.tobytes())
    term = _TERMS.get(key)
    if term is not None:
        _TERMS.move_to_end(key)
        return term

    def density_ref(fit):
        return reference_density(table.coolprop_name, fit.reference_pressure,
                                 fit.reference_temperature, eos)

    if isinstance(record, CombinedDispersion):
        densities = tuple(density_ref(fit) for fit in record.fits)
        term = combined_term(record, wavelength, densities)
    else:
        term = fit_term(record, wavelength, density_ref(record))
    term = np.array(term, dtype=float)
    term.setflags(write=False)
    _TERMS[key] = term
    while len(_TERMS) > TERM_CACHE_SIZE:
        _TERMS.popitem(last=False)
    return term


def _lorentz_lorenz_term(
    table: GasTable, omega: np.ndarray, density: float, fit: str | None, eos: str
) -> tuple[np.ndarray, str]:
    """(n^2-1)/(n^2+2) at ``density`` by density scaling from the fit, and a range message."""
    record = _fit(table, fit)
    wavelength = _wavelength(omega)
    flat = np.atleast_1d(wavelength).astype(float).ravel()
    # Lorentz-Lorenz, Sec. 2.3 of [2]: (n^2-1)/(n^2+2) is proportional to N
    term = (_term_per_molecule(table, record, flat, eos) * density).reshape(np.shape(wavelength))
    return term, _outside_message(record, flat, table.label)


def _index_from_lorentz_lorenz(term: np.ndarray) -> np.ndarray:
    """n from L = (n^2-1)/(n^2+2): n = sqrt((1 + 2L)/(1 - L)); L = 0 gives exactly 1."""
    return np.sqrt((1 + 2 * term) / (1 - term))


def refractive_index_reference(
    table: GasTable, omega: np.ndarray, fit: str | None = None
) -> np.ndarray:
    """Refractive index of the gas at the fit's own reference state.

    Parameters
    ----------
    table : GasTable
        The gas.
    omega : float or ndarray
        Angular frequency. [rad/s]
    fit : str, optional
        Key of a dispersion record (e.g. ``"ciddor1996"`` for air); the table's default
        (its combined record if it has one) if None.

    Returns
    -------
    ndarray
        n at (``fit.reference_temperature``, ``fit.reference_pressure``); for a combined
        record, at the default fit's reference state, each fit scaled there by Lorentz-Lorenz
        with the CoolProp density. [-]

    Notes
    -----
    Issues one :class:`~hcfplan.errors.ValidityWarning` per call if any wavelength lies
    outside the fit's stated range (the values there are extrapolated).

    References
    ----------
    The fit named by the record's ``source``; the forms are cited in
    :func:`hcfplan.materials.gas_tables.refractive_index_from_fit` (A. Borzsonyi, Z. Heiner,
    M. P. Kalashnikov, A. P. Kovacs, K. Osvay, Appl. Opt. 47, 4856-4863 (2008),
    doi:10.1364/AO.47.004856; P. E. Ciddor, Appl. Opt. 35, 1566-1573 (1996),
    doi:10.1364/AO.35.001566).
    """
    record = _fit(table, fit)
    wavelength = _wavelength(omega)
    message = _outside_message(record, np.atleast_1d(wavelength), table.label)
    if message:
        warnings.warn(message, ValidityWarning, stacklevel=2)
    if isinstance(record, CombinedDispersion):
        density = reference_density(table.coolprop_name, record.reference_pressure,
                                    record.reference_temperature, "coolprop")
        term, _ = _lorentz_lorenz_term(table, omega, density, fit, "coolprop")
        return _index_from_lorentz_lorenz(term)
    return refractive_index_from_fit(record, wavelength)


def refractive_index(
    table: GasTable,
    omega: np.ndarray,
    number_density: float,
    fit: str | None = None,
    eos: EosName = "coolprop",
) -> np.ndarray:
    """Refractive index of a pure gas at a given number density (Lorentz-Lorenz scaling).

    Parameters
    ----------
    table : GasTable
        The gas.
    omega : float or ndarray
        Angular frequency. [rad/s]
    number_density : float
        Number density of the gas. [1/m^3]
    fit : str, optional
        Key of a dispersion record; the table's default (its combined record if it has one)
        if None.
    eos : {"coolprop", "ideal"}
        EOS used for the reference density; use the one that gave ``number_density``.

    Returns
    -------
    ndarray
        Refractive index n. [-]

    Notes
    -----
    .. math:: \\frac{n^2-1}{n^2+2} = \\frac{N}{N_{ref}}\\,\\frac{n_{ref}^2-1}{n_{ref}^2+2}

    (Lorentz-Lorenz, Sec. 2.3 of [2]), with :math:`N_{ref}` from ``eos`` at the fit's
    reference state. Valid over the fit's wavelength range (one ValidityWarning per call
    otherwise) and while the molecular polarisability does not depend on density.

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999
           (reference density, ``eos="coolprop"``).
    .. [2] M. Born, E. Wolf, *Principles of Optics*, 7th ed., Cambridge Univ. Press, 1999,
           Sec. 2.3 (Lorentz-Lorenz formula) [section number from memory].

    The fit itself: the record's ``source`` (see :func:`refractive_index_reference`).
    """
    if not number_density >= 0:
        raise ConfigError(f"number_density = {number_density!r} 1/m^3: must be >= 0")
    term, message = _lorentz_lorenz_term(table, omega, number_density, fit, eos)
    if message:
        warnings.warn(message, ValidityWarning, stacklevel=2)
    return _index_from_lorentz_lorenz(term)


def kerr_coefficient(table: GasTable, number_density: float, eos: EosName = "coolprop") -> float:
    """Kerr coefficient n2 of a pure gas at a given number density.

    Parameters
    ----------
    table : GasTable
        The gas.
    number_density : float
        Number density. [1/m^3]
    eos : {"coolprop", "ideal"}
        EOS used for the reference density of the Kerr record.

    Returns
    -------
    float
        n2 [m^2/W], :math:`n_2 = n_{2,ref} N / N_{ref}` with :math:`N_{ref}` at the Kerr
        record's reference state (n2 per molecule constant; valid while n - 1 << 1).

    References
    ----------
    n2 at the reference state: the table's ``[kerr]`` record, whose ``source`` names the
    measurement (e.g. J. K. Wahlstrand, Y.-H. Cheng, H. M. Milchberg, Phys. Rev. A 85, 043820
    (2012), doi:10.1103/PhysRevA.85.043820 for Ar). Scaling with N: common practice, no source.
    Reference density (``eos="coolprop"``):

    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
    """
    if not number_density >= 0:
        raise ConfigError(f"number_density = {number_density!r} 1/m^3: must be >= 0")
    kerr = table.kerr
    density_ref = reference_density(
        table.coolprop_name, kerr.reference_pressure, kerr.reference_temperature, eos
    )
    return kerr.n2 * number_density / density_ref


# --- mixtures -----------------------------------------------------------------------------------


@dataclass(frozen=True)
class GasFill:
    """A gas fill: components as (table name, mole fraction), pressure [Pa], temperature [K]."""

    components: tuple[tuple[str, float], ...]
    pressure: float
    temperature: float
    eos: EosName = "coolprop"

    def __post_init__(self) -> None:
        try:
            pairs = tuple((str(name), float(x)) for name, x in self.components)
        except (TypeError, ValueError) as err:
            raise ConfigError(
                f"gas fill components = {self.components!r}: must be (name, mole fraction) pairs"
            ) from err
        object.__setattr__(self, "components", pairs)
        _check_fill_spec(self)


def _check_fill_spec(fill: GasFill) -> None:
    eos_model(fill.eos)
    check_state(fill.pressure, fill.temperature, allow_zero_pressure=False)
    shown = ", ".join(f"{name}: {x:g}" for name, x in fill.components) or "none"
    names = [name.lower() for name, _ in fill.components]
    if not names or len(set(names)) != len(names):
        raise ConfigError(f"gas fill components ({shown}): need at least one, each only once")
    if any(not x > 0 for _, x in fill.components):
        raise ConfigError(f"gas fill mole fractions ({shown}): each must be > 0")
    total = sum(x for _, x in fill.components)
    if abs(total - 1) > FRACTION_SUM_TOLERANCE:
        raise ConfigError(
            f"gas fill mole fractions ({shown}) sum to {total:.9g}: must sum to 1 "
            f"within {FRACTION_SUM_TOLERANCE:g}"
        )


@dataclass(frozen=True)
class GasComponent:
    """One component of a medium: its table, mole fraction and partial number density [1/m^3]."""

    table: GasTable
    mole_fraction: float
    number_density: float


@dataclass(frozen=True)
class GasMedium:
    """A filled gas at its state: total number density [1/m^3], n2 [m^2/W], warnings.

    Satisfies :class:`hcfplan.fibers.base.GasLike`.
    """

    fill: GasFill
    components: tuple[GasComponent, ...]
    number_density: float
    n2: float
    warnings: tuple[str, ...]

    def refractive_index(self, omega: np.ndarray) -> np.ndarray:
        """Refractive index [-] at angular frequency ``omega`` [rad/s].

        Lorentz-Lorenz sum of the component terms at their partial densities,
        :math:`(n^2-1)/(n^2+2) = \\sum_i (N_i/N_{i,ref})(n_{i,ref}^2-1)/(n_{i,ref}^2+2)`;
        one ValidityWarning per call names every fit whose range the grid leaves.

        References
        ----------
        M. Born, E. Wolf, *Principles of Optics*, 7th ed., Cambridge Univ. Press, 1999,
        Sec. 2.3 (Lorentz-Lorenz formula) [section number from memory].
        """
        terms = [
            _lorentz_lorenz_term(k.table, omega, k.number_density, None, self.fill.eos)
            for k in self.components
        ]
        messages = [message for _, message in terms if message]
        if messages:
            warnings.warn("; ".join(messages), ValidityWarning, stacklevel=2)
        return _index_from_lorentz_lorenz(sum(term for term, _ in terms))


def _combined_density(
    tables: Sequence[GasTable], fractions: Sequence[float], pressure: float, temperature: float
) -> tuple[float, str]:
    """Density by a mixing rule where CoolProp has no mixture model, and the warning saying so.

    Amagat's law of additive volumes while every pure component is gas-like at the total
    pressure, else Dalton's law of additive pressures.
    """
    names = "+".join(t.label for t in tables)
    phases = [fill_phase(t, pressure, temperature) for t in tables]
    if all(phase in ("gas", "supercritical") for phase in phases):
        density = amagat_density(tables, fractions, pressure, temperature)
        rule = "Amagat's law of additive volumes with the pure-fluid EOS"
    else:
        density = dalton_density(tables, fractions, pressure, temperature)
        rule = ("Dalton's law of additive pressures "
                "(a pure component would be liquid at the total p)")
    return density, f"{names}: CoolProp has no mixture model; density from {rule}"


def _mixture_density(
    tables: Sequence[GasTable], fractions: Sequence[float], fill: GasFill
) -> tuple[float, list[str]]:
    """Total number density [1/m^3] and the warnings on how it was obtained."""
    if len(tables) == 1:
        return number_density(tables[0], fill.pressure, fill.temperature, fill.eos), []
    if fill.eos == "ideal":
        return eos_model("ideal")("", fill.pressure, fill.temperature), []
    try:
        return coolprop_mixture_density(tables, fractions, fill.pressure, fill.temperature), []
    except ValueError:
        density, message = _combined_density(tables, fractions, fill.pressure, fill.temperature)
        return density, [message]


def _phase_warnings(tables: Sequence[GasTable], fractions: Sequence[float], fill: GasFill) -> list:
    """Phase check; a mixture component is checked at its partial pressure (Raoult estimate)."""
    if len(tables) == 1:
        return check_fill(tables[0], fill.pressure, fill.temperature)
    found = []
    for table, x in zip(tables, fractions, strict=True):
        found += [f"component {w}" for w in check_fill(table, x * fill.pressure, fill.temperature)]
    return found


def gas_medium(fill: GasFill, search_dirs: Sequence[str | Path] = ()) -> GasMedium:
    """Build the medium of a fill: tables, phase check, densities and n2.

    Parameters
    ----------
    fill : GasFill
        Components, pressure [Pa], temperature [K] and EOS.
    search_dirs : sequence of str or Path
        User gas-table directories, searched before the shipped tables.

    Returns
    -------
    GasMedium
        With n2 = sum_i n2_i(N_i) and the warnings collected on the way.

    Raises
    ------
    GasPhaseError
        A (component of the) fill would be liquid or two-phase.

    Notes
    -----
    Mixture density: CoolProp's HEOS mixture model where it evaluates (Ar-N2, Ar-Kr, N2-O2 have
    binary parameters); where it fails (missing binary parameters, or the phase-stability
    search fails as for He-Ar in CoolProp 6.8) Amagat's law of additive volumes with the
    pure-fluid EOS, or Dalton's law if a pure component would be liquid at the total pressure,
    with a warning. Where CoolProp's model exists, Amagat's law agrees with it to 1e-4 at 50 bar
    for Ar-N2 and to 7e-3 for Ar-Kr (our comparison), so the fallback is a percent-level
    estimate at tens of bar. A mixture's phase is checked per component at its partial
    pressure, which ignores the shift of the mixture's critical point.

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999
           (pure-fluid EOS and HEOS mixture model).

    Amagat's and Dalton's laws and the partial-pressure phase check: textbook rules, common
    practice, no source. The index and n2 cite theirs in :func:`refractive_index` and
    :func:`kerr_coefficient`.
    """
    tables = [load_gas_table(name, search_dirs) for name, _ in fill.components]
    fractions = [x for _, x in fill.components]
    found = _phase_warnings(tables, fractions, fill)
    total, density_warnings = _mixture_density(tables, fractions, fill)
    components = tuple(
        GasComponent(t, x, x * total) for t, x in zip(tables, fractions, strict=True)
    )
    n2 = sum(kerr_coefficient(k.table, k.number_density, fill.eos) for k in components)
    return GasMedium(fill, components, total, float(n2), tuple(found + density_warnings))
