"""Photoionisation of atoms in a strong laser field: PPT and ADK rates, barrier suppression.

SI in and out: intensity [W/m^2] is the cycle-averaged intensity of a linearly polarised field,
:math:`I = \\tfrac12 c \\varepsilon_0 E_0^2` (:math:`E_0` the peak field); wavelength [m];
ionisation potential ``ip`` [J]; rates [1/s]. The published formulas are in Hartree atomic units;
each function converts its inputs first.

Validity (every rate here): single ionisation from one bound state (``l``, ``m``) of a neutral
atom or of an ion of charge ``charge - 1``, single active electron; linear polarisation, cycle
average (slowly varying envelope), except :func:`adk_rate_circular`; field below barrier suppression
(:func:`barrier_suppression_intensity`), above which the tunnelling formulas overestimate the
rate. ADK further needs the Keldysh parameter γ ≪ 1; PPT covers multiphoton (γ ≫ 1) and tunnel
regimes. Nothing here warns: the barrier-suppression check is made by
``hcfplan.planning.reports.limits``. The PPT sum is slow, so
the solver evaluates a :class:`~hcfplan.ionization.tables.RateTable` from
:func:`~hcfplan.ionization.tables.tabulate_rate`, not the formula.

References
----------
.. [1] M. V. Ammosov, N. B. Delone and V. P. Krainov, "Tunnel ionization of complex atoms and of
       atomic ions in an alternating electromagnetic field," Sov. Phys. JETP, vol. 64, no. 6,
       pp. 1191-1194, 1986. [from memory]
.. [2] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an alternating
       electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966. [from memory]
.. [3] F. A. Ilkov, J. E. Decker and S. L. Chin, "Ionization of atoms in the tunnelling regime
       with experimental evidence using Hg atoms," J. Phys. B, vol. 25, no. 19, pp. 4005-4020,
       1992, doi:10.1088/0953-4075/25/19/011. [from memory]
.. [4] S. Augst, D. Strickland, D. D. Meyerhofer, S. L. Chin and J. H. Eberly, "Tunneling
       ionization of noble gases in a high-intensity laser field," Phys. Rev. Lett., vol. 63,
       no. 20, pp. 2212-2215, 1989, doi:10.1103/PhysRevLett.63.2212.
.. [5] L. V. Keldysh, "Ionization in the field of a strong electromagnetic wave," Sov. Phys.
       JETP, vol. 20, no. 5, pp. 1307-1314, 1965. [from memory]
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable
from typing import Literal

import numpy as np
import numpy.typing as npt

from hcfplan.constants import au_energy, au_field, au_time, c, e, epsilon_0, m_e
from hcfplan.errors import ConfigError

RateModel = Literal["ppt", "adk", "adk_circular"]

#: The PPT multiphoton sum stops once exp(-alpha (kappa - nu)) falls below this value.
_SUM_TOLERANCE = 1e-12
#: Beyond max(this, 50/beta) terms the rest of the PPT sum is replaced by an integral.
_SUM_MIN_TERMS = 400
#: Gauss-Legendre order of that remainder integral.
_TAIL_NODES = 96
#: Below this Keldysh parameter the closed forms of g and alpha are replaced by their series.
_SMALL_GAMMA = 1e-2


# ----------------------------------------------------------------------------- input checks
def check_positive(name: str, value: float, unit: str) -> None:
    """Raise a ConfigError naming ``name`` unless ``value`` > 0.

    Parameters
    ----------
    name : str
        Name of the input as the caller knows it (shown in the message).
    value : float
        Value to check. [unit]
    unit : str
        Unit shown after the value ("" for none).

    Raises
    ------
    ConfigError
        ``value`` is not > 0 (NaN included).

    References
    ----------
    none: numerical helper.
    """
    if not value > 0:
        raise ConfigError(f"{name} = {value} {unit}: must be > 0")


def check_intensity(intensity: np.ndarray) -> None:
    """Raise a ConfigError naming the first intensity that is negative or NaN.

    Parameters
    ----------
    intensity : ndarray
        Intensities. [W/m^2]

    Raises
    ------
    ConfigError
        Some element is < 0 or NaN.

    References
    ----------
    none: numerical helper.
    """
    if intensity.size and not np.all(intensity >= 0):
        bad = intensity[~(intensity >= 0)].flat[0]
        raise ConfigError(f"intensity = {bad} W/m^2: must be >= 0 (and not NaN)")


def _check_charge(charge: int) -> None:
    if charge < 1:
        raise ConfigError(f"charge = {charge}: must be >= 1 (charge of the ion produced)")


def _check_state(l: int, m: int, charge: int) -> None:
    if not all(isinstance(q, (int, np.integer)) for q in (l, m, charge)):
        raise ConfigError(f"quantum numbers l = {l}, m = {m}, charge = {charge}: must be integers")
    if l < 0 or abs(m) > l:
        raise ConfigError(f"quantum numbers l = {l}, m = {m}: need l >= 0 and |m| <= l")
    _check_charge(charge)


def _checked(intensity, wavelength: float, ip: float) -> np.ndarray:
    intensity = np.asarray(intensity, dtype=float)
    check_intensity(intensity)
    check_positive("wavelength", wavelength, "m")
    check_positive("ip", ip, "J")
    return intensity


# ----------------------------------------------------------------------------- basics
def field_au(intensity: npt.ArrayLike) -> np.ndarray:
    """Peak field of a linearly polarised wave of cycle-averaged intensity I, in atomic units.

    Parameters
    ----------
    intensity : float or ndarray
        Cycle-averaged intensity. [W/m^2]

    Returns
    -------
    ndarray
        :math:`E_0/E_\\mathrm{au}` with :math:`I = \\tfrac12 c\\varepsilon_0 E_0^2` and
        :math:`E_\\mathrm{au}` = ``hcfplan.constants.au_field``. [-]

    References
    ----------
    none: unit conversion.
    """
    return np.sqrt(2.0 * np.asarray(intensity, dtype=float) / (c * epsilon_0)) / au_field


def omega_au(wavelength: float) -> float:
    """Angular frequency of light of a given vacuum wavelength, in atomic units.

    Parameters
    ----------
    wavelength : float
        Vacuum wavelength. [m]

    Returns
    -------
    float
        :math:`\\omega\\,t_\\mathrm{au}` with :math:`\\omega = 2\\pi c/\\lambda` and
        :math:`t_\\mathrm{au}` = ``hcfplan.constants.au_time``. [-]

    References
    ----------
    none: unit conversion.
    """
    return 2.0 * np.pi * c / wavelength * au_time


def keldysh_parameter(intensity: npt.ArrayLike, wavelength: float, ip: float) -> np.ndarray:
    """Keldysh parameter :math:`\\gamma = \\omega\\sqrt{2 m_e I_p}/(e E_0)` of [1].

    Parameters
    ----------
    intensity : float or ndarray
        Cycle-averaged intensity, linear polarisation. [W/m^2]
    wavelength : float
        Vacuum wavelength. [m]
    ip : float
        Ionisation potential. [J]

    Returns
    -------
    ndarray
        Keldysh parameter (dimensionless); ``inf`` at zero intensity. γ ≫ 1 is the multiphoton
        regime, γ ≪ 1 the tunnel regime. Equivalent to :math:`\\sqrt{I_p/(2U_p)}`.

    References
    ----------
    .. [1] L. V. Keldysh, "Ionization in the field of a strong electromagnetic wave," Sov. Phys.
           JETP, vol. 20, no. 5, pp. 1307-1314, 1965. [from memory]
    """
    intensity = _checked(intensity, wavelength, ip)
    omega = 2.0 * np.pi * c / wavelength
    field = np.sqrt(2.0 * intensity / (c * epsilon_0))
    with np.errstate(divide="ignore"):
        return (omega * np.sqrt(2.0 * m_e * ip) / (e * field))[()]


def barrier_suppression_intensity(ip: float, charge: int = 1) -> float:
    """Intensity at which the field lowers the Coulomb barrier to the bound level [1].

    Parameters
    ----------
    ip : float
        Ionisation potential. [J]
    charge : int
        Charge Z of the ion left behind (1 for a neutral atom).

    Returns
    -------
    float
        Barrier-suppression intensity, cycle-averaged, linear polarisation. [W/m^2]

    Notes
    -----
    The barrier of :math:`-Ze^2/(4\\pi\\varepsilon_0 x) - eEx` tops at
    :math:`-\\sqrt{Z e^3 E/(\\pi\\varepsilon_0)}`; setting it equal to :math:`-I_p` gives
    :math:`E = \\pi\\varepsilon_0 I_p^2/(Z e^3)` and with :math:`I = c\\varepsilon_0 E^2/2`

    .. math:: I_\\mathrm{BSI} = \\frac{c\\,\\pi^2\\varepsilon_0^3 I_p^4}{2 Z^2 e^6}
              \\approx 4.00\\times 10^{9}\\,\\frac{(I_p/\\mathrm{eV})^4}{Z^2}\\ \\mathrm{W/cm^2}.

    (A version without :math:`\\varepsilon_0^2` circulates; it is dimensionally wrong.)

    References
    ----------
    .. [1] S. Augst, D. Strickland, D. D. Meyerhofer, S. L. Chin and J. H. Eberly, "Tunneling
           ionization of noble gases in a high-intensity laser field," Phys. Rev. Lett., vol. 63,
           no. 20, pp. 2212-2215, 1989, doi:10.1103/PhysRevLett.63.2212.
    """
    check_positive("ip", ip, "J")
    _check_charge(charge)
    return c * np.pi**2 * epsilon_0**3 * ip**4 / (2.0 * charge**2 * e**6)


# ----------------------------------------------------------------------------- shared ADK/PPT
def _state_constants(ip_au: float, l: int, m: int, charge: int) -> tuple[float, float, float]:
    """Return (n*, ln(|C_{n*l*}|^2 f(l,m)), F0) of the ADK/PPT formulas [1], [3]."""
    kappa = math.sqrt(2.0 * ip_au)
    n_star = charge / kappa
    l_star = n_star - 1.0
    # |C_{n*l*}|^2 = 2^{2n*} / [n* Γ(n*+l*+1) Γ(n*-l*)], Eq. (3) of [1]
    log_c2 = (
        2.0 * n_star * math.log(2.0)
        - math.log(n_star)
        - math.lgamma(n_star + l_star + 1.0)
        - math.lgamma(n_star - l_star)
    )
    am = abs(m)
    # f(l,m) = (2l+1)(l+|m|)! / [2^|m| |m|! (l-|m|)!], Eq. (2) of [1]
    log_f = (
        math.log(2 * l + 1)
        + math.lgamma(l + am + 1)
        - am * math.log(2.0)
        - math.lgamma(am + 1)
        - math.lgamma(l - am + 1)
    )
    return n_star, log_c2 + log_f, kappa**3


def _log_static_rate(field, ip_au: float, l: int, m: int, charge: int) -> np.ndarray:
    """ln of the static (instantaneous-field) rate of Eq. (1) of [1] in atomic units, field F
    in atomic units (> 0), and ln(3F/(pi F0))/2, the log of the linear cycle average."""
    n_star, log_cf, f0 = _state_constants(ip_au, l, m, charge)
    with np.errstate(divide="ignore", invalid="ignore"):
        log_w = (log_cf + math.log(ip_au) + (2.0 * n_star - abs(m) - 1.0)
                 * np.log(2.0 * f0 / field) - 2.0 * f0 / (3.0 * field))
        return log_w, 0.5 * np.log(3.0 * field / (np.pi * f0))


def _log_adk_rate(intensity, wavelength, ip, l, m=0, charge=1) -> np.ndarray:
    intensity = _checked(intensity, wavelength, ip)
    _check_state(l, m, charge)
    field = field_au(intensity)
    log_static, log_average = _log_static_rate(field, ip / au_energy, l, m, charge)
    return np.where(field > 0, log_static + log_average, -np.inf) - math.log(au_time)


def _log_adk_rate_circular(intensity, wavelength, ip, l, m=0, charge=1) -> np.ndarray:
    intensity = _checked(intensity, wavelength, ip)
    _check_state(l, m, charge)
    field = field_au(intensity) / math.sqrt(2.0)  # constant magnitude, I = c eps0 F^2
    log_static, _ = _log_static_rate(field, ip / au_energy, l, m, charge)
    return np.where(field > 0, log_static, -np.inf) - math.log(au_time)


def adk_rate_circular(
    intensity: npt.ArrayLike, wavelength: float, ip: float, l: int, m: int = 0, charge: int = 1
) -> np.ndarray:
    """ADK tunnel-ionisation rate for circular polarisation [1], [2].

    Parameters and returns as :func:`adk_rate`; ``intensity`` is the intensity of the circular
    wave, :math:`I = c\\varepsilon_0 F^2` with F the constant field magnitude. [W/m^2]

    Notes
    -----
    The field of a circular wave turns at constant magnitude F, so in the tunnelling limit
    (γ ≪ 1) the rate is the static rate :math:`w_{st}(F)` of Eq. (1) of [1] (the formula of
    :func:`adk_rate` without the cycle-averaging factor :math:`\\sqrt{3F/(\\pi F_0)}`). At
    equal intensity :math:`F = E_0/\\sqrt2`, so
    :math:`w_{lin}/w_{circ} = \\sqrt{3E_0/(\\pi F_0)}\\,w_{st}(E_0)/w_{st}(E_0/\\sqrt2) \\gg 1`
    (ADK 1986 and PPT 1966 [from memory]). The nonadiabatic circular rate of PPT (γ ≳ 1, a
    different g(γ)) is not implemented: its formula was not available from a verified source;
    where γ is not small this rate is expected to fall below it, as the tunnel limit of the
    linear rate falls below PPT there. m is the magnetic number about the instantaneous
    field direction.

    References
    ----------
    .. [1] M. V. Ammosov, N. B. Delone and V. P. Krainov, "Tunnel ionization of complex atoms and
           of atomic ions in an alternating electromagnetic field," Sov. Phys. JETP, vol. 64,
           no. 6, pp. 1191-1194, 1986. [from memory]
    .. [2] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an
           alternating electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966.
           [from memory]
    """
    return np.exp(_log_adk_rate_circular(intensity, wavelength, ip, l, m, charge))[()]


def adk_rate(
    intensity: npt.ArrayLike, wavelength: float, ip: float, l: int, m: int = 0, charge: int = 1
) -> np.ndarray:
    """Cycle-averaged ADK tunnel-ionisation rate for linear polarisation [1].

    Parameters
    ----------
    intensity : float or ndarray
        Cycle-averaged intensity. [W/m^2]
    wavelength : float
        Vacuum wavelength; unused by ADK, kept so every rate model has one signature. [m]
    ip : float
        Ionisation potential. [J]
    l, m : int
        Orbital and magnetic quantum numbers of the ionised state (l = 1, m = 0 for the p shell
        of Ne, Ar, Kr, Xe; l = 0 for He). The m = 0 state dominates.
    charge : int
        Charge Z of the ion produced.

    Returns
    -------
    ndarray
        Ionisation rate. [1/s]

    Notes
    -----
    In atomic units, :math:`\\kappa=\\sqrt{2I_p}`, :math:`F_0=\\kappa^3`, :math:`n^*=Z/\\kappa`,
    :math:`l^* = n^*-1`:

    .. math:: w = |C_{n^*l^*}|^2 f(l,m)\\, I_p \\left(\\frac{2F_0}{F}\\right)^{2n^*-|m|-1}
              e^{-2F_0/(3F)} \\sqrt{\\frac{3F}{\\pi F_0}}

    with :math:`|C_{n^*l^*}|^2 = 2^{2n^*}/[n^*\\Gamma(n^*+l^*+1)\\Gamma(n^*-l^*)]` and
    :math:`f(l,m) = (2l+1)(l+|m|)!/[2^{|m|}|m|!(l-|m|)!]` (Eqs. (1)-(3) of [1]; the last factor
    is the cycle average for linear polarisation). For hydrogen it reduces to the static rate
    :math:`(4/F)e^{-2/(3F)}`. Valid for :math:`\\gamma \\ll 1` and below barrier suppression.

    References
    ----------
    .. [1] M. V. Ammosov, N. B. Delone and V. P. Krainov, "Tunnel ionization of complex atoms and
           of atomic ions in an alternating electromagnetic field," Sov. Phys. JETP, vol. 64,
           no. 6, pp. 1191-1194, 1986. [from memory]
    """
    return np.exp(_log_adk_rate(intensity, wavelength, ip, l, m, charge))[()]


# ----------------------------------------------------------------------------- PPT pieces
def _g_function(gamma: np.ndarray) -> np.ndarray:
    """g(γ) of the PPT exponent, Eq. (8) of [3]; series 1 - γ²/10 + 9γ⁴/280 for small γ."""
    gamma = np.asarray(gamma, dtype=float)
    small = gamma < _SMALL_GAMMA
    gs = np.where(small, 1.0, gamma)  # avoid 0/0 in the branch that is not used
    closed = (1.5 / gs) * ((1.0 + 0.5 / gs**2) * np.arcsinh(gs) - np.sqrt(1.0 + gs**2) / (2.0 * gs))
    series = 1.0 - gamma**2 / 10.0 + 9.0 * gamma**4 / 280.0
    return np.where(small, series, closed)


def _alpha_beta(gamma: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """α(γ) = 2[asinh γ - γ/√(1+γ²)] and β(γ) = 2γ/√(1+γ²) of the PPT sum [3].

    For small γ, α uses its series 2γ³/3 - 3γ⁵/5 + 15γ⁷/28 (the closed form cancels).
    """
    gamma = np.asarray(gamma, dtype=float)
    root = np.sqrt(1.0 + gamma**2)
    closed = 2.0 * (np.arcsinh(gamma) - gamma / root)
    series = 2.0 * gamma**3 / 3.0 - 0.6 * gamma**5 + 15.0 * gamma**7 / 28.0
    return np.where(gamma < _SMALL_GAMMA, series, closed), 2.0 * gamma / root


def _w_m(x: np.ndarray, m: int) -> np.ndarray:
    """w_m(x) = (x^{2|m|+1}/2) ∫_0^1 e^{-x²t} t^|m| (1-t)^{-1/2} dt of [3].

    m = 0: the Dawson function. |m| > 0: the closed form B(|m|+1, 1/2) 1F1(|m|+1; |m|+3/2; -x²)
    of the integral (checked against quadrature and the large-x limit |m|!/(2x) in the tests).
    """
    from scipy import special  # here: the rate tables are computed rarely (disk cache)

    am = abs(m)
    if am == 0:
        return special.dawsn(x)
    x = np.asarray(x, dtype=float)
    beta_fn = special.beta(am + 1, 0.5)
    return 0.5 * x ** (2 * am + 1) * beta_fn * special.hyp1f1(am + 1, am + 1.5, -x * x)


@functools.lru_cache(maxsize=4)
def _gauss_legendre(order: int) -> tuple[np.ndarray, np.ndarray]:
    nodes, weights = np.polynomial.legendre.leggauss(order)
    nodes.setflags(write=False)
    weights.setflags(write=False)
    return nodes, weights


def _photon_sum_tail(alpha: np.ndarray, beta: np.ndarray, a: np.ndarray, m: int) -> np.ndarray:
    """∫_a^∞ exp(-α n) w_m(√(β n)) dn by Gauss-Legendre in t = ln(n/a), cut at α n = 41."""
    nodes, weights = _gauss_legendre(_TAIL_NODES)
    t_max = np.log(41.0 / (alpha * a))[:, None]  # exp(-41) < 1e-17: the rest is negligible
    n = a[:, None] * np.exp(0.5 * t_max * (nodes + 1.0))
    integrand = n * np.exp(-alpha[:, None] * n) * _w_m(np.sqrt(beta[:, None] * n), m)
    return 0.5 * t_max[:, 0] * (integrand @ weights)


def _photon_sum(alpha, beta, nu, m: int, max_terms: int | None = None) -> np.ndarray:
    """Σ_{κ≥ν} exp[-α(κ-ν)] w_m(√(β(κ-ν))) of Eq. (9) of [3], for arrays α, β, ν.

    Terms are added until exp(-α(κ-ν)) < _SUM_TOLERANCE. If that needs more than ``max_terms``
    terms (default max(_SUM_MIN_TERMS, 50/β); small γ, where α ≈ 2γ³/3), the first N =
    ``max_terms`` are summed and the smooth remainder Σ_{j≥N} f(j+δ) is replaced by its
    midpoint-rule integral ∫_{N+δ-1/2}^∞ f(n) dn (error ≈ f'(N)/24, relative < 1e-7).
    """
    alpha, beta, nu = (np.atleast_1d(np.asarray(v, dtype=float)) for v in (alpha, beta, nu))
    cap = np.maximum(_SUM_MIN_TERMS, np.ceil(50.0 / beta)) if max_terms is None else max_terms
    delta = np.ceil(nu) - nu
    n_needed = np.ceil(-math.log(_SUM_TOLERANCE) / alpha) + 1
    n_explicit = np.minimum(n_needed, cap).astype(np.int64)
    total = np.zeros(alpha.size)
    order = np.argsort(n_explicit)
    start = 0
    while start < order.size:  # rows of similar length together, about 2^20 terms a block
        stop = start + 1
        while stop < order.size and (stop - start + 1) * n_explicit[order[stop]] <= 2**20:
            stop += 1
        rows = order[start:stop]
        j = np.arange(n_explicit[rows[-1]])
        n = delta[rows, None] + j
        terms = np.exp(-alpha[rows, None] * n) * _w_m(np.sqrt(beta[rows, None] * n), m)
        total[rows] = np.sum(terms * (j < n_explicit[rows, None]), axis=1)
        start = stop
    tail = n_needed > n_explicit
    if tail.any():
        a = delta[tail] + n_explicit[tail] - 0.5
        total[tail] += _photon_sum_tail(alpha[tail], beta[tail], a, m)
    return total


def _log_ppt_rate(intensity, wavelength, ip, l, m=0, charge=1) -> np.ndarray:
    intensity = _checked(intensity, wavelength, ip)
    _check_state(l, m, charge)
    ip_au = ip / au_energy
    omega = omega_au(wavelength)
    n_star, log_cf, f0 = _state_constants(ip_au, l, m, charge)
    am = abs(m)
    field = np.atleast_1d(field_au(intensity))
    on = field > 0
    f = field[on]
    gamma = omega * math.sqrt(2.0 * ip_au) / f  # Keldysh parameter [5]
    alpha, beta = _alpha_beta(gamma)
    nu = ip_au / omega * (1.0 + 0.5 / gamma**2)  # threshold photon number incl. U_p
    sums = _photon_sum(alpha, beta, nu, m)
    # A_m(ω, γ), Eq. (9) of [3]
    log_a_m = (
        math.log(4.0 / math.sqrt(3.0 * math.pi) / math.factorial(am))
        + np.log(gamma**2 / (1.0 + gamma**2))
        + np.log(sums)
    )
    log_w = np.full(field.shape, -np.inf)
    # Eq. (7) of [3] with the √(6/π) prefactor that makes γ → 0 give cycle-averaged ADK
    log_w[on] = (
        0.5 * math.log(6.0 / math.pi)
        + log_cf
        + math.log(ip_au)
        + (2.0 * n_star - am - 1.5) * np.log(2.0 * f0 / f)
        + (0.5 * am + 0.75) * np.log1p(gamma**2)
        + log_a_m
        - 2.0 * f0 / (3.0 * f) * _g_function(gamma)
    )
    return log_w.reshape(np.shape(intensity)) - math.log(au_time)


def ppt_rate(
    intensity: npt.ArrayLike, wavelength: float, ip: float, l: int, m: int = 0, charge: int = 1
) -> np.ndarray:
    """Cycle-averaged PPT photoionisation rate for linear polarisation [1], in the form of [2].

    Parameters
    ----------
    intensity : float or ndarray
        Cycle-averaged intensity. [W/m^2]
    wavelength : float
        Vacuum wavelength. [m]
    ip : float
        Ionisation potential. [J]
    l, m : int
        Orbital and magnetic quantum numbers of the ionised state.
    charge : int
        Charge Z of the ion produced.

    Returns
    -------
    ndarray
        Ionisation rate. [1/s]

    Notes
    -----
    In atomic units, with the constants of :func:`adk_rate` and γ the Keldysh parameter,

    .. math:: w = \\sqrt{\\tfrac{6}{\\pi}}\\,|C_{n^*l^*}|^2 f(l,m)\\, I_p
              \\left(\\frac{2F_0}{F}\\right)^{2n^*-|m|-3/2} (1+\\gamma^2)^{|m|/2+3/4}
              A_m(\\omega,\\gamma)\\, e^{-\\frac{2F_0}{3F} g(\\gamma)},

    .. math:: A_m = \\frac{4}{\\sqrt{3\\pi}}\\frac{1}{|m|!}\\frac{\\gamma^2}{1+\\gamma^2}
              \\sum_{\\kappa\\ge\\nu} e^{-\\alpha(\\kappa-\\nu)}
              w_m\\big(\\sqrt{\\beta(\\kappa-\\nu)}\\big),

    :math:`g = \\frac{3}{2\\gamma}[(1+\\frac{1}{2\\gamma^2})\\,\\mathrm{asinh}\\,\\gamma -
    \\frac{\\sqrt{1+\\gamma^2}}{2\\gamma}]`, :math:`\\alpha = 2[\\mathrm{asinh}\\,\\gamma -
    \\gamma/\\sqrt{1+\\gamma^2}]`, :math:`\\beta = 2\\gamma/\\sqrt{1+\\gamma^2}`,
    :math:`\\nu = (I_p/\\omega)(1 + 1/(2\\gamma^2))`, and :math:`w_m` the integral in
    :func:`_w_m` (the Dawson function for m = 0); Eqs. (7)-(9) of [2] [from memory]. As
    γ → 0, g → 1 and A_m → 1, and w becomes the cycle-averaged ADK rate exactly.

    The sum over photon numbers κ stops when :math:`e^{-\\alpha(\\kappa-\\nu)} < 10^{-12}`;
    beyond max(400, 50/β) terms (γ ≲ 0.5) the smooth remainder is replaced by its integral
    (see :func:`_photon_sum`; relative error < 1e-7, tested against the full sum).
    Valid for any γ below barrier suppression; single active electron, single ionisation. The
    tunnel-limit Coulomb factor :math:`(2F_0/F)^{2n^*}` is used at all γ, so in the deep
    multiphoton regime the slope :math:`d\\ln w/d\\ln I` is :math:`\\lceil\\nu\\rceil - n^*`
    rather than the photon number. Slow (long sums at small γ): use
    :func:`hcfplan.ionization.tables.tabulate_rate` for repeated calls.

    References
    ----------
    .. [1] A. M. Perelomov, V. S. Popov and M. V. Terent'ev, "Ionization of atoms in an
           alternating electric field," Sov. Phys. JETP, vol. 23, no. 5, pp. 924-934, 1966.
           [from memory]
    .. [2] F. A. Ilkov, J. E. Decker and S. L. Chin, "Ionization of atoms in the tunnelling
           regime with experimental evidence using Hg atoms," J. Phys. B, vol. 25, no. 19,
           pp. 4005-4020, 1992, doi:10.1088/0953-4075/25/19/011. [from memory]
    """
    return np.exp(_log_ppt_rate(intensity, wavelength, ip, l, m, charge))[()]


#: model key -> rate function (intensity [W/m^2], wavelength [m], ip [J], l, m, charge) -> [1/s]
RATE_MODELS: dict[str, Callable[..., np.ndarray]] = {"ppt": ppt_rate, "adk": adk_rate,
                                                     "adk_circular": adk_rate_circular}
#: model key -> natural log of the same rate [ln(1/s)] (-inf at zero intensity), for tables
LOG_RATE_MODELS: dict[str, Callable[..., np.ndarray]] = {
    "ppt": _log_ppt_rate,
    "adk": _log_adk_rate,
    "adk_circular": _log_adk_rate_circular,
}
#: linear-polarisation model key -> the rate used for circular polarisation (tunnelling limit
#: for both: the nonadiabatic circular PPT rate is not implemented, see adk_rate_circular)
CIRCULAR_MODELS: dict[str, str] = {"ppt": "adk_circular", "adk": "adk_circular"}


def rate_function(model: RateModel) -> Callable[..., np.ndarray]:
    """Return the rate function registered under ``model`` in :data:`RATE_MODELS`.

    Raises
    ------
    ConfigError
        If ``model`` is not a key of :data:`RATE_MODELS`; the message lists the valid keys.

    References
    ----------
    none: registry look-up (the models carry their own references).
    """
    try:
        return RATE_MODELS[model]
    except (KeyError, TypeError):
        raise ConfigError(
            f"ionization model = {model!r}: unknown; valid models are {sorted(RATE_MODELS)}"
        ) from None
