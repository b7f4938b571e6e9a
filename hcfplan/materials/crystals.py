"""Nonlinear crystals for THz generation and detection: optical and THz indices.

The tables (one TOML file per crystal, a source string beside every number) are loaded by
:mod:`hcfplan.materials.crystal_tables` into a frozen :class:`CrystalTable` of SI values; the
functions below evaluate it. The table names used most are re-exported here.

Conventions
-----------
Plane waves vary as exp(i(kz - omega t)) (see :mod:`hcfplan.numerics.grid`). The complex THz index
is n + i kappa with kappa >= 0 for an absorbing medium, so Im k = kappa Omega / c > 0 and the field
decays as exp(-Im k z); the *power* absorption coefficient is alpha = 2 kappa Omega / c.

The THz dielectric function is a sum of Lorentz oscillators,

.. math:: \\varepsilon(\\Omega) = \\varepsilon_\\infty
          + \\sum_j \\frac{S_j \\Omega_j^2}{\\Omega_j^2 - \\Omega^2 - i\\Gamma_j\\Omega},

whose sign of the damping term matches the exp(-i omega t) time dependence (Im eps > 0).

References
----------
.. [1] J. Opt. Soc. Am. B 36(11), 3039 (2019): GaP Sellmeier and THz oscillator model.
.. [2] D. T. F. Marple, "Refractive index of ZnSe, ZnTe, and CdTe," J. Appl. Phys. 35, 539 (1964).
.. [3] H. H. Li, J. Phys. Chem. Ref. Data 13, 103 (1984) (ZnTe lattice pole).
.. [4] G. Gallot, J. Zhang, R. W. McGowan, T.-I. Jeon, D. Grischkowsky, "Measurements of the THz
       absorption and dispersion of ZnTe and their relevance to the electro-optic detection of
       THz radiation," Appl. Phys. Lett. 74, 3450 (1999), doi:10.1063/1.124124 [DOI from memory].
"""

from __future__ import annotations

import warnings
from collections.abc import Callable

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.materials.crystal_tables import (
    OPTICAL_MODEL_NAMES,
    THZ_MODEL_NAMES,
    CrystalTable,
    LorentzOscillator,
    OpticalIndexModel,
    OpticalModelName,
    ThzDielectricModel,
    ThzModelName,
    crystal_names,
    crystal_search_dirs,
    listed_crystal_names,
    load_crystal,
)

__all__ = [
    "OPTICAL_MODEL_NAMES",
    "THZ_MODEL_NAMES",
    "CrystalTable",
    "LorentzOscillator",
    "OpticalIndexModel",
    "OpticalModelName",
    "ThzDielectricModel",
    "ThzModelName",
    "coherence_length",
    "crystal_names",
    "crystal_search_dirs",
    "listed_crystal_names",
    "load_crystal",
    "optical_group_index",
    "optical_index",
    "thz_absorption",
    "thz_index",
    "thz_permittivity",
]


# ----------------------------------------------------------------------------------------------
# Optical index: each model returns (n, dn/dlambda [1/m]) at vacuum wavelength [m]
# ----------------------------------------------------------------------------------------------


def _sellmeier(model: OpticalIndexModel, wavelength: np.ndarray, pole_sq: np.ndarray):
    lam_um = wavelength * 1e6  # the Sellmeier coefficients are printed for lambda in um
    l2 = lam_um**2
    n_sq = model.constant + model.lambda_sq_term * l2
    dn_sq = 2.0 * model.lambda_sq_term * lam_um  # d(n^2)/d(lambda_um)
    for b, p2 in zip(model.b, pole_sq, strict=True):
        n_sq = n_sq + b * l2 / (l2 - p2)
        dn_sq = dn_sq - 2.0 * b * lam_um * p2 / (l2 - p2) ** 2
    n = np.sqrt(n_sq)
    return n, dn_sq / (2.0 * n) * 1e6  # per um -> per m


def _sellmeier_pole_um(model: OpticalIndexModel, wavelength: np.ndarray):
    return _sellmeier(model, wavelength, np.asarray(model.poles) ** 2)


def _sellmeier_pole_um2(model: OpticalIndexModel, wavelength: np.ndarray):
    return _sellmeier(model, wavelength, np.asarray(model.poles))


def _tabulated(model: OpticalIndexModel, wavelength: np.ndarray):
    from scipy.interpolate import CubicSpline

    spline = CubicSpline(model.table_wavelength, model.table_index)
    return spline(wavelength), spline(wavelength, 1)


def _constant_index(model: OpticalIndexModel, wavelength: np.ndarray):
    return np.full_like(wavelength, model.constant), np.zeros_like(wavelength)


#: model name -> evaluator(model, wavelength [m]) -> (n, dn/dlambda [1/m])
OPTICAL_MODELS: dict[str, Callable] = {
    "sellmeier_pole_um": _sellmeier_pole_um,
    "sellmeier_pole_um2": _sellmeier_pole_um2,
    "tabulated_um": _tabulated,
    "constant": _constant_index,
}


def _optical_n_dn(crystal: CrystalTable, omega) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    omega = np.asarray(omega, dtype=float)
    if np.any(omega <= 0):
        raise ConfigError(f"omega: {omega.min():.3e} rad/s: optical frequencies must be > 0")
    wavelength = 2 * np.pi * c / omega
    model = crystal.optical
    lo, hi = wavelength.min(), wavelength.max()
    if lo < model.wavelength_min * (1 - 1e-9) or hi > model.wavelength_max * (1 + 1e-9):
        warnings.warn(
            f"{crystal.name} optical index: wavelengths {lo * 1e9:.0f}-{hi * 1e9:.0f} nm outside "
            f"the validity range {model.wavelength_min * 1e9:.0f}-"
            f"{model.wavelength_max * 1e9:.0f} nm of its model",
            ValidityWarning,
            stacklevel=3,
        )
    n, dn = OPTICAL_MODELS[model.model](model, wavelength)
    return wavelength, n, dn


def optical_index(crystal: CrystalTable, omega: np.ndarray | float) -> np.ndarray:
    """Optical (phase) refractive index n(omega) of the crystal.

    Parameters
    ----------
    crystal : CrystalTable
        Crystal table from :func:`load_crystal`.
    omega : float or ndarray
        Angular frequency. [rad/s]

    Returns
    -------
    ndarray
        Refractive index. [-]

    Notes
    -----
    Sellmeier form n^2 = A + sum_j B_j lambda^2 / (lambda^2 - lambda_j^2) with lambda in um as
    printed by the source of the table; emits :class:`ValidityWarning` outside its range.

    References
    ----------
    .. [1] J. Opt. Soc. Am. B 36(11), 3039 (2019): GaP Sellmeier and THz oscillator model.
    .. [2] D. T. F. Marple, "Refractive index of ZnSe, ZnTe, and CdTe," J. Appl. Phys. 35, 539
           (1964).

    Any other table: the ``source`` string of its ``[optical_index]`` block.
    """
    return _optical_n_dn(crystal, omega)[1]


def optical_group_index(crystal: CrystalTable, omega: np.ndarray | float) -> np.ndarray:
    """Optical group index n_g = n - lambda dn/dlambda.

    Parameters
    ----------
    crystal : CrystalTable
        Crystal table.
    omega : float or ndarray
        Angular frequency. [rad/s]

    Returns
    -------
    ndarray
        Group index c / v_g. [-]

    Notes
    -----
    n and dn/dlambda from the table's optical model (see :func:`optical_index`); the group-index
    relation itself is common practice, no source.

    References
    ----------
    .. [1] J. Opt. Soc. Am. B 36(11), 3039 (2019): GaP Sellmeier and THz oscillator model.
    .. [2] D. T. F. Marple, "Refractive index of ZnSe, ZnTe, and CdTe," J. Appl. Phys. 35, 539
           (1964).

    Any other table: the ``source`` string of its ``[optical_index]`` block.
    """
    wavelength, n, dn = _optical_n_dn(crystal, omega)
    return n - wavelength * dn


# ----------------------------------------------------------------------------------------------
# THz dielectric function
# ----------------------------------------------------------------------------------------------


def _lorentz(model: ThzDielectricModel, Omega: np.ndarray) -> np.ndarray:
    eps = np.full(Omega.shape, model.eps_inf, dtype=complex)
    for osc in model.oscillators:
        w2 = osc.omega**2
        eps = eps + osc.strength * w2 / (w2 - Omega**2 - 1j * osc.damping * Omega)
    return eps


def _constant_eps(model: ThzDielectricModel, Omega: np.ndarray) -> np.ndarray:
    return np.full(Omega.shape, model.eps_inf, dtype=complex)


#: model name -> evaluator(model, Omega [rad/s]) -> complex relative permittivity
THZ_MODELS: dict[str, Callable] = {"lorentz": _lorentz, "constant": _constant_eps}


def thz_permittivity(crystal: CrystalTable, Omega: np.ndarray | float) -> np.ndarray:
    """Complex relative permittivity eps(Omega) = eps' + i eps'' (eps'' >= 0 absorbs).

    Parameters
    ----------
    crystal : CrystalTable
        Crystal table.
    Omega : float or ndarray
        THz angular frequency (>= 0). [rad/s]

    Returns
    -------
    ndarray of complex
        Relative permittivity. [-]

    Notes
    -----
    eps = eps_inf + sum_j S_j Omega_j^2 / (Omega_j^2 - Omega^2 - i Gamma_j Omega) (module
    docstring); valid up to ``crystal.thz.frequency_max``.

    References
    ----------
    .. [1] J. Opt. Soc. Am. B 36(11), 3039 (2019): GaP Sellmeier and THz oscillator model.
    .. [3] H. H. Li, J. Phys. Chem. Ref. Data 13, 103 (1984) (ZnTe lattice pole).
    .. [4] G. Gallot, J. Zhang, R. W. McGowan, T.-I. Jeon, D. Grischkowsky, "Measurements of the
           THz absorption and dispersion of ZnTe and their relevance to the electro-optic
           detection of THz radiation," Appl. Phys. Lett. 74, 3450 (1999),
           doi:10.1063/1.124124 [DOI from memory].

    Any other table: the ``source`` strings of its ``[thz_permittivity]`` block and oscillators.
    """
    Omega = np.asarray(Omega, dtype=float)
    return THZ_MODELS[crystal.thz.model](crystal.thz, Omega)


def thz_index(crystal: CrystalTable, Omega: np.ndarray | float) -> np.ndarray:
    """Complex THz index n + i kappa = sqrt(eps), kappa >= 0 (exp(i(kz - omega t)) convention).

    Parameters
    ----------
    crystal : CrystalTable
        Crystal table.
    Omega : float or ndarray
        THz angular frequency. [rad/s]

    Returns
    -------
    ndarray of complex
        Complex refractive index; k = (n + i kappa) Omega / c. [-]

    References
    ----------
    The permittivity model of :func:`thz_permittivity` ([1], [3], [4] of the module docstring:
    J. Opt. Soc. Am. B 36(11), 3039 (2019); H. H. Li, J. Phys. Chem. Ref. Data 13, 103 (1984);
    G. Gallot et al., Appl. Phys. Lett. 74, 3450 (1999)). n + i kappa = sqrt(eps) is common
    practice, no source.
    """
    return np.sqrt(thz_permittivity(crystal, Omega))


def thz_absorption(crystal: CrystalTable, Omega: np.ndarray | float) -> np.ndarray:
    """Power absorption coefficient alpha = 2 kappa Omega / c (power ~ exp(-alpha z)).

    Parameters
    ----------
    crystal : CrystalTable
        Crystal table.
    Omega : float or ndarray
        THz angular frequency. [rad/s]

    Returns
    -------
    ndarray
        Power absorption coefficient. [1/m]

    References
    ----------
    The permittivity model of :func:`thz_permittivity` ([1], [3], [4] of the module docstring:
    J. Opt. Soc. Am. B 36(11), 3039 (2019); H. H. Li, J. Phys. Chem. Ref. Data 13, 103 (1984);
    G. Gallot et al., Appl. Phys. Lett. 74, 3450 (1999)). alpha = 2 kappa Omega / c is common
    practice, no source.
    """
    Omega = np.asarray(Omega, dtype=float)
    return 2.0 * thz_index(crystal, Omega).imag * Omega / c


def coherence_length(
    crystal: CrystalTable, omega_pump: np.ndarray | float, Omega: np.ndarray | float
) -> np.ndarray:
    """Coherence length of collinear optical rectification, l_c = c / (2 nu |n_g - n_THz|).

    Parameters
    ----------
    crystal : CrystalTable
        Crystal table.
    omega_pump : float or ndarray
        Pump angular frequency (sets the optical group index). [rad/s]
    Omega : float or ndarray
        THz angular frequency, broadcast against ``omega_pump``. [rad/s]

    Returns
    -------
    ndarray
        Coherence length; ``inf`` where velocity matching is exact. [m]

    Notes
    -----
    l_c = pi / |Delta k| with Delta k = Omega (n_g - n_THz) / c, i.e. lambda_THz / (2 |Delta n|);
    see [5]. n_THz is the real part of :func:`thz_index`.

    References
    ----------
    .. [5] N. C. J. van der Valk, P. C. M. Planken, A. N. Buijserd, H. J. Bakker, J. Opt. Soc.
           Am. B 22, 1714 (2005).
    """
    n_g = optical_group_index(crystal, omega_pump)
    Omega = np.asarray(Omega, dtype=float)
    mismatch = np.abs(n_g - thz_index(crystal, Omega).real)
    nu = Omega / (2 * np.pi)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(mismatch * nu > 0, c / (2.0 * nu * mismatch), np.inf)
