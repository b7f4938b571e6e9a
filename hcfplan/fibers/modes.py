"""Transverse profile of the EH1m capillary modes and quantities derived from it.

The EH1m modes of a hollow dielectric tube of radius a (a >> wavelength) have, to leading order, the
transverse field J0(u_1m r / a) inside the core, with u_1m the m-th zero of J0 (Marcatili &
Schmeltzer [1]). The field outside the core is of relative order wavelength/a and is neglected here.

References
----------
.. [1] E. A. J. Marcatili, R. A. Schmeltzer, "Hollow metallic and dielectric waveguides for long
       distance optical transmission and lasers," Bell Syst. Tech. J. 43, 1783-1809 (1964),
       doi:10.1002/j.1538-7305.1964.tb04108.x.
.. [2] R. L. Abrams, "Coupling losses in hollow waveguide laser resonators," IEEE J. Quantum
       Electron. QE-8, 838-843 (1972), doi:10.1109/JQE.1972.1076867 [from memory].
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.numerics.bessel import bessel_j, bessel_j_zeros
from hcfplan.numerics.optimize import minimize_bounded

#: First zero of J0, the transverse eigenvalue u11 of the EH11 mode. [-]
U11 = float(bessel_j_zeros(0, 1)[0])

_QUADRATURE_NODES = 96  # Gauss-Legendre nodes on [0, 1]; integrands are smooth (J0, Gaussians)


def eh_eigenvalue(m: int) -> float:
    """u_1m, the m-th zero of J0 (EH1m eigenvalue of [1]). [-]

    References
    ----------
    E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    if not (isinstance(m, (int, np.integer)) and m >= 1):
        raise ConfigError(f"mode radial order m = {m!r}: must be an integer >= 1")
    return float(bessel_j_zeros(0, int(m))[-1])


def _check_radius(core_radius: float) -> None:
    if not core_radius > 0:
        raise ConfigError(f"core_radius = {core_radius} m: must be > 0")


def eh_mode_profile(r: float | np.ndarray, core_radius: float, u: float = U11) -> np.ndarray:
    """Normalised field J0(u r / a) of an EH1m mode (1 on axis, 0 outside the core).

    Parameters
    ----------
    r : float or ndarray
        Radial coordinate, >= 0. [m]
    core_radius : float
        Core radius a. [m]
    u : float
        Mode eigenvalue u_1m (default u11). [-]

    Returns
    -------
    ndarray
        Field amplitude relative to the axis. [-]

    References
    ----------
    E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    _check_radius(core_radius)
    r = np.asarray(r, dtype=float)
    return np.where(r <= core_radius, bessel_j(0, u * r / core_radius), 0.0)


@lru_cache(maxsize=1)
def _unit_disk_nodes() -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre nodes x on [0, 1] and weights of int_0^1 f(x) 2 pi x dx (read-only).

    numpy's ``leggauss`` solves an eigenproblem on each call (4-5 ms for 96 nodes, called
    several times per chain run before this cache)."""
    x, w = np.polynomial.legendre.leggauss(_QUADRATURE_NODES)
    x = 0.5 * (x + 1.0)
    weights = 0.5 * w * 2.0 * np.pi * x
    x.flags.writeable = False
    weights.flags.writeable = False
    return x, weights


def _unit_disk_integral(integrand) -> float:
    """int_0^1 f(x) 2 pi x dx by Gauss-Legendre quadrature (f vectorised)."""
    x, weights = _unit_disk_nodes()
    return float(np.sum(weights * integrand(x)))


@lru_cache(maxsize=8)
def _effective_area_unit(u: float) -> float:
    power = _unit_disk_integral(lambda x: bessel_j(0, u * x) ** 2)
    fourth = _unit_disk_integral(lambda x: bessel_j(0, u * x) ** 4)
    return power**2 / fourth


def effective_area_j0(core_radius: float, u: float = U11) -> float:
    """Nonlinear effective area (int |F|^2 dA)^2 / int |F|^4 dA of the J0 core mode.

    Parameters
    ----------
    core_radius : float
        Core radius a. [m]
    u : float
        Mode eigenvalue (default u11). [-]

    Returns
    -------
    float
        A_eff; for EH11 this is 1.4972 a^2 (about 1.5 a^2, the value commonly quoted). [m^2]

    Notes
    -----
    Integrals over the core only, by 96-point Gauss-Legendre quadrature in r.

    References
    ----------
    J0 mode of E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    _check_radius(core_radius)
    return _effective_area_unit(float(u)) * core_radius**2


def peak_intensity_area(core_radius: float, u: float = U11) -> float:
    """Area A_I with on-axis intensity I0 = P / A_I for the J0 mode: pi a^2 J1(u)^2. [m^2]

    Parameters
    ----------
    core_radius : float
        Core radius a. [m]
    u : float
        Mode eigenvalue, a zero of J0 (default u11). [-]

    Notes
    -----
    :math:`\\int_0^a J_0^2(u r/a)\\, 2\\pi r\\, dr = \\pi a^2 J_1(u)^2` when :math:`J_0(u) = 0`
    (standard Bessel integral); for EH11 A_I = 0.8467 a^2.

    References
    ----------
    J0 mode of E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    _check_radius(core_radius)
    return float(np.pi * core_radius**2 * bessel_j(1, u) ** 2)


def gaussian_coupling_efficiency(
    beam_waist: float | np.ndarray, core_radius: float, u: float = U11
) -> np.ndarray:
    """Power fraction of a centred, flat-phase Gaussian beam coupled into the J0 mode.

    Parameters
    ----------
    beam_waist : float or ndarray
        1/e field radius w0 of the Gaussian exp(-r^2/w0^2) at the fiber entrance. [m]
    core_radius : float
        Core radius a. [m]
    u : float
        Mode eigenvalue (default u11). [-]

    Returns
    -------
    ndarray
        eta = |int E F dA|^2 / (int |E|^2 dA int |F|^2 dA), with the Gaussian normalised over the
        whole plane and the mode over the core. [-]

    Notes
    -----
    Maximum 0.9808 at w0/a = 0.6436 for EH11; this is the "w0 = 0.64 a, 98 %" result of [2].

    References
    ----------
    R. L. Abrams, IEEE J. Quantum Electron. QE-8, 838 (1972) [from memory].
    """
    _check_radius(core_radius)
    ratio = np.asarray(beam_waist, dtype=float) / core_radius
    if np.any(ratio <= 0):
        raise ConfigError(f"beam_waist = {np.min(beam_waist)} m: must be > 0")
    flat = ratio.reshape(-1)
    x, weights = _unit_disk_nodes()
    mode = bessel_j(0, u * x)
    overlap = np.exp(-(x[None, :] / flat[:, None]) ** 2) @ (weights * mode)
    gauss_power = 0.5 * np.pi * flat**2  # int exp(-2 r^2/w^2) dA over the plane, in units of a^2
    mode_power = np.sum(weights * mode**2)
    return (overlap**2 / (gauss_power * mode_power)).reshape(ratio.shape)


@lru_cache(maxsize=8)
def _optimum_ratio(u: float) -> float:
    x, _, _ = minimize_bounded(lambda q: -float(gaussian_coupling_efficiency(q, 1.0, u)),
                               0.2, 1.2, xatol=1e-8)
    return x


def optimum_beam_waist(core_radius: float, u: float = U11) -> float:
    """Gaussian waist w0 that maximises :func:`gaussian_coupling_efficiency`. [m]

    Parameters
    ----------
    core_radius : float
        Core radius a. [m]
    u : float
        Mode eigenvalue (default u11). [-]

    Returns
    -------
    float
        w0 = 0.6436 a for EH11 (1/e field radius). [m]

    References
    ----------
    R. L. Abrams, IEEE J. Quantum Electron. QE-8, 838 (1972) [from memory].
    """
    _check_radius(core_radius)
    return _optimum_ratio(float(u)) * core_radius
