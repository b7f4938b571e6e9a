"""Gas dispersion records: the published fits, their forms, and fits combined by switch bands.

Built by :mod:`hcfplan.materials.gas_tables` from the checked TOML values; evaluated by
:mod:`hcfplan.materials.gases` (which scales them to the fill density). Coefficients are kept
as printed (micrometre units); the wavelength is converted when a fit is evaluated.

Combined dispersion
-------------------
A table may join several published fits into the index it uses by default
(``[dispersion_combined]``). Write T(lambda) = ((n^2-1)/(n^2+2)) / N_ref for the per-molecule
Lorentz-Lorenz term of a fit (N_ref its reference density). The table's default fit (the
anchor) is used exactly between the switch bands next to it. Across a switch band [lo, hi]
towards a neighbouring fit, the combined term T follows

    d^2 T / d lambda^2 = (1 - w) T_inner'' + w T_outer''

with w the weight :func:`switch_weight` (0 on the anchor's side, 1 beyond the band; first to
third derivatives continuous), and T and dT/dlambda continuous. So inside a band the second
wavelength derivative - and with it the GVD, which is lambda^3/(2 pi c^2) d^2n/dlambda^2 - is a
weighted mean of the two fits' values, never an artefact of the switch; beyond the band T is
the outer fit plus a + b lambda, the constant and slope that join it to the inner one. A term
a + b lambda changes n - 1 by (3/2) N (a + b lambda) to first order, i.e. beta by a constant
plus a term linear in omega: it changes no group-velocity dispersion or higher order, only the
absolute index (by less than the fits disagree; the gas tables state it). A band must lie inside
the stated ranges of both fits it joins (checked while loading), so every wavelength of the
combined range uses fits inside their stated ranges; the range runs from the first fit's lower
end to the last fit's upper end.

The integral form used (two integrations by parts of the definition above, for the band above
the anchor; mirrored below it), with Delta = T_outer - T_inner:

    D(lambda) = w Delta + int_lo^min(lambda, hi) [(lambda - s) w''(s) - 2 w'(s)] Delta(s) ds.

Delta is smooth across a band (both fits are analytic there), so it is interpolated by a
Chebyshev series at the band's Chebyshev points [3]; times the polynomial weights the integrand
is then a polynomial, integrated exactly, and the integral is one series evaluation per
wavelength. Where the series does not converge to rounding, Gauss-Legendre quadrature
(:data:`QUADRATURE_NODES` nodes) is used instead.

References
----------
.. [1] A. Borzsonyi, Z. Heiner, M. P. Kalashnikov, A. P. Kovacs, K. Osvay, Appl. Opt. 47,
       4856-4863 (2008), doi:10.1364/AO.47.004856 (form ``n2_minus_1_sellmeier``).
.. [2] P. E. Ciddor, Appl. Opt. 35, 1566-1573 (1996), doi:10.1364/AO.35.001566, Eq. (1)
       (form ``n_minus_1_inverse``).
.. [3] L. N. Trefethen, *Approximation Theory and Approximation Practice*, SIAM, 2013, ch. 8
       (geometric convergence of Chebyshev interpolants of analytic functions) [chapter from
       memory].
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class DispersionFit:
    """One published refractive-index fit at its reference state.

    ``coefficients`` holds pairs in the published micrometre units: ``(B_i, C_i [um^2])`` for
    ``"n2_minus_1_sellmeier"`` and ``(A_i [um^-2], B_i [um^-2])`` for ``"n_minus_1_inverse"``.
    Temperatures in [K], pressure in [Pa], ``valid_wavelength`` = (lo, hi) in [m].
    """

    form: str
    coefficients: tuple
    reference_temperature: float
    reference_pressure: float
    valid_wavelength: tuple[float, float]
    source: str
    key: str = ""
    constant: float = 0.0


@dataclass(frozen=True)
class CombinedDispersion:
    """Several fits joined by switch bands (module docstring, "Combined dispersion").

    ``fits`` in order of increasing wavelength; ``switches`` = one (lo, hi) band [m] between
    each neighbouring pair. ``reference_temperature`` [K] and ``reference_pressure`` [Pa] are
    those of the table's default record (the state :func:`refractive_index_reference` uses);
    ``anchor`` is the index in ``fits`` of that record, the fit used exactly next to it.
    """

    fits: tuple[DispersionFit, ...]
    switches: tuple[tuple[float, float], ...]
    source: str
    reference_temperature: float
    reference_pressure: float
    anchor: int
    key: str = "combined"

    @property
    def valid_wavelength(self) -> tuple[float, float]:
        """(first fit's lower end, last fit's upper end) [m]; no gap (bands lie in both ranges)."""
        return self.fits[0].valid_wavelength[0], self.fits[-1].valid_wavelength[1]

    @property
    def label(self) -> str:
        """Short name for messages: the fit keys joined by '+'."""
        return "+".join(dict.fromkeys(fit.key for fit in self.fits))


# --- dispersion forms ---------------------------------------------------------------------------


def _n_sellmeier(coefficients: tuple, wavelength: np.ndarray, constant: float = 0.0) -> np.ndarray:
    """n from n^2 - 1 = A + sum B_i lambda^2 / (lambda^2 - C_i), lambda in um (form of [1])."""
    wavelength_um = np.asarray(wavelength, dtype=float) * 1e6  # the fits take micrometres
    lam2 = wavelength_um**2
    n2_minus_1 = constant + sum(b * lam2 / (lam2 - c_um2) for b, c_um2 in coefficients)
    return np.sqrt(1.0 + n2_minus_1)


def _n_inverse(coefficients: tuple, wavelength: np.ndarray, constant: float = 0.0) -> np.ndarray:
    """n from n - 1 = A + sum A_i / (B_i - lambda^-2), lambda in um (form of Eq. (1) of [2])."""
    wavenumber2 = (1.0 / (np.asarray(wavelength, dtype=float) * 1e6)) ** 2  # [um^-2]
    return 1.0 + constant + sum(a / (b - wavenumber2) for a, b in coefficients)


#: form name -> evaluator(coefficients, wavelength [m], constant) -> n
DISPERSION_FORMS: dict[str, Callable[..., np.ndarray]] = {
    "n2_minus_1_sellmeier": _n_sellmeier,
    "n_minus_1_inverse": _n_inverse,
}


def refractive_index_from_fit(fit: DispersionFit, wavelength: np.ndarray) -> np.ndarray:
    """Refractive index of a fit at its own reference state.

    Parameters
    ----------
    fit : DispersionFit
        The fit record.
    wavelength : float or ndarray
        Vacuum wavelength. [m]

    Returns
    -------
    ndarray
        Refractive index n. [-]

    Notes
    -----
    ``"n2_minus_1_sellmeier"``: :math:`n^2 - 1 = A + \\sum_i B_i \\lambda^2/(\\lambda^2 - C_i)`,
    the form of [1]; ``"n_minus_1_inverse"``: :math:`n - 1 = A + \\sum_i A_i/(B_i - \\lambda^{-2})`,
    the form of Eq. (1) of [2]; :math:`\\lambda` in micrometres as printed, A the record's
    ``constant`` (0 unless the paper prints one, e.g. E. R. Peck, D. J. Fisher, J. Opt. Soc.
    Am. 54, 1362 (1964)). The coefficients and the
    reference state come from the record (its ``source`` names the paper). No range check here;
    :func:`hcfplan.materials.gases.refractive_index_reference` warns.

    References
    ----------
    .. [1] A. Borzsonyi, Z. Heiner, M. P. Kalashnikov, A. P. Kovacs, K. Osvay, Appl. Opt. 47,
           4856-4863 (2008), doi:10.1364/AO.47.004856.
    .. [2] P. E. Ciddor, Appl. Opt. 35, 1566-1573 (1996), doi:10.1364/AO.35.001566.
    """
    return DISPERSION_FORMS[fit.form](fit.coefficients, wavelength, fit.constant)


#: Gauss-Legendre nodes of the switch-band integrals (integrand: a degree-6 polynomial times
#: a smooth fit difference; 32 nodes reproduce it to rounding, see the tests).
QUADRATURE_NODES = 32
_GL_X, _GL_W = np.polynomial.legendre.leggauss(QUADRATURE_NODES)


def switch_weight(wavelength: np.ndarray, band: tuple[float, float],
                  derivative: int = 0) -> np.ndarray:
    """Weight of the outer fit across a switch band (0 below, 1 above), or its derivative.

    Parameters
    ----------
    wavelength : ndarray
        Vacuum wavelength. [m]
    band : (float, float)
        Switch band (lo, hi). [m]
    derivative : {0, 1, 2}
        Order of the derivative with respect to the wavelength. [1/m^derivative]

    Returns
    -------
    ndarray
        s(x) = 35 x^4 - 84 x^5 + 70 x^6 - 20 x^7 with x = (lambda - lo)/(hi - lo) clipped to
        [0, 1] (the septic smoothstep, whose first three derivatives vanish at both ends), or
        its first or second derivative with respect to lambda.

    References
    ----------
    None: smooth step polynomial (common practice, no source).
    """
    lo, hi = band
    width = hi - lo
    x = np.clip((np.asarray(wavelength, dtype=float) - lo) / width, 0.0, 1.0)
    if derivative == 0:
        return x**4 * (35.0 + x * (-84.0 + x * (70.0 - 20.0 * x)))
    if derivative == 1:
        return 140.0 * x**3 * (1.0 + x * (-3.0 + x * (3.0 - x))) / width
    return 420.0 * x**2 * (1.0 + x * (-4.0 + x * (5.0 - 2.0 * x))) / width**2


def fit_term(fit: DispersionFit, wavelength: np.ndarray, density_ref: float) -> np.ndarray:
    """Per-molecule Lorentz-Lorenz term (n^2 - 1)/(n^2 + 2)/N_ref of a fit. [m^3]

    References
    ----------
    M. Born, E. Wolf, *Principles of Optics*, 7th ed., Cambridge Univ. Press, 1999, Sec. 2.3
    (Lorentz-Lorenz formula) [section number from memory]; the fit: its ``source``.
    """
    n = refractive_index_from_fit(fit, wavelength)
    return (n**2 - 1) / (n**2 + 2) / density_ref


#: Degrees of the Chebyshev series of Delta over a switch band tried in turn; the first whose
#: last :data:`_TAIL` coefficients are below :data:`TAIL_LEVEL` times the size of the fits'
#: terms is used. Delta is a small difference of two terms, so its series ends in the terms'
#: rounding: (n^2 - 1) of a gas with n - 1 ~ 3e-4 keeps about 3e-13 of itself. Seen for the
#: bands of Ar, He, N2, Kr and air: coefficients below 1e-12 of the terms from degree 10-12 on,
#: then a floor of 1e-13 to 1e-12.
CHEBYSHEV_DEGREES = (16, 32, 64)
_TAIL = 3
TAIL_LEVEL = 1e-11

# the switch weight's derivatives in x = (lambda - lo) / (hi - lo), as polynomials in x
_W1_X = np.polynomial.Polynomial([0, 0, 0, 140.0, -420.0, 420.0, -140.0])  # 140 x^3 (1-x)^3
_W2_X = _W1_X.deriv()  # 420 x^2 (1 - 4x + 5x^2 - 2x^3)
_X_OF_T = np.polynomial.Polynomial([0.5, 0.5])  # x of t in [-1, 1]
_T = np.polynomial.Polynomial([0.0, 1.0])


def _band_series(delta: Callable[[np.ndarray], np.ndarray], band: tuple[float, float],
                 size: float):
    """Antiderivatives A(t), B(t) (Chebyshev coefficients on t in [-1, 1], 0 at t = -1) of the
    join integrand with s = c + t (hi - lo)/2 (c the band centre): the integral of the module
    docstring from lo to lambda is (lambda - c) A(t) - B(t). None when Delta's series does not
    converge at the largest of :data:`CHEBYSHEV_DEGREES` (the quadrature is used then); ``size``
    is the size of the terms whose difference Delta is. [m^3]"""
    lo, hi = band
    cheb = np.polynomial.chebyshev
    for degree in CHEBYSHEV_DEGREES:
        t = np.cos(np.pi * (np.arange(degree + 1) + 0.5) / (degree + 1))
        coefficients = cheb.chebfit(t, delta(0.5 * (lo + hi) + 0.5 * (hi - lo) * t), degree)
        if np.all(np.abs(coefficients[-_TAIL:]) <= TAIL_LEVEL * size):
            break
    else:
        return None
    w1, w2 = _W1_X(_X_OF_T), _W2_X(_X_OF_T)  # w'(s) (hi - lo) and w''(s) (hi - lo)^2 of t
    first = cheb.poly2cheb((w2 / (2.0 * (hi - lo))).coef)  # g1 = w''(s) ds/dt
    second = cheb.poly2cheb((_T * w2 / 4.0 + w1).coef)  # g2 = ((s - c) w''(s) + 2 w'(s)) ds/dt
    return (cheb.chebint(cheb.chebmul(first, coefficients), lbnd=-1),
            cheb.chebint(cheb.chebmul(second, coefficients), lbnd=-1))


def _join(delta: Callable[[np.ndarray], np.ndarray], band: tuple[float, float],
          wavelength: np.ndarray, upward: bool, size: float) -> np.ndarray:
    """D(lambda) of one switch band (module docstring); 0 on the anchor's side of it.

    The integral is the Chebyshev series of :func:`_band_series` (Delta interpolated at the
    Chebyshev points of the band, the polynomial weights multiplied in and the product
    integrated exactly), evaluated at every wavelength beyond ``lo``: one evaluation of the
    fits per wavelength instead of one per quadrature node (the zero-dispersion search
    evaluates the gas index at about 10^5 wavelengths, mostly inside the bands). Where Delta's
    series does not converge, Gauss-Legendre quadrature on [lo, min(lambda, hi)]
    (:data:`QUADRATURE_NODES` nodes, :func:`_quadrature_integral`). ``size``: as in
    :func:`_band_series`."""
    lo, hi = band
    if not upward:  # mirror: lambda -> -lambda turns the band below the anchor into one above
        def mirrored(x):
            return delta(-x)
        return _join(mirrored, (-hi, -lo), -wavelength, True, size)
    out = np.zeros_like(wavelength)
    beyond = wavelength > lo
    if not np.any(beyond):
        return out
    lam = wavelength[beyond]
    series = _band_series(delta, band, size)
    if series is None:
        integral = _quadrature_integral(delta, band, lam)
    else:
        centre, half_width = 0.5 * (lo + hi), 0.5 * (hi - lo)
        t = (np.minimum(lam, hi) - centre) / half_width
        cheb = np.polynomial.chebyshev
        integral = (lam - centre) * cheb.chebval(t, series[0]) - cheb.chebval(t, series[1])
    out[beyond] = switch_weight(lam, band) * delta(lam) + integral
    return out


def _quadrature_integral(delta: Callable[[np.ndarray], np.ndarray], band: tuple[float, float],
                         lam: np.ndarray) -> np.ndarray:
    """The integral of the join from lo to min(lambda, hi) for the wavelengths ``lam`` > lo of
    a band above the anchor, by Gauss-Legendre quadrature; the nodes of the wavelengths beyond
    the band (all the same) are evaluated once."""
    lo, hi = band
    top = np.minimum(lam, hi)
    half = 0.5 * (top - lo)
    # every point beyond the band has the same nodes (top = hi): the fits and the weights are
    # evaluated on one row of them, the same numbers as on each row (elementwise arithmetic)
    inside = lam < hi
    row = np.where(inside, np.cumsum(inside), 0)  # row 0: the nodes on the whole band
    first = np.concatenate(([np.argmin(inside) if not np.all(inside) else 0],
                            np.flatnonzero(inside)))
    half_rows = half[first]
    s_rows = lo + half_rows[:, None] * (1.0 + _GL_X[None, :])  # nodes on [lo, top]
    values = delta(s_rows.ravel()).reshape(s_rows.shape)[row]
    s = s_rows[row]
    kernel = ((lam[:, None] - s) * switch_weight(s_rows, band, 2)[row]
              - 2.0 * switch_weight(s_rows, band, 1)[row])
    return half * np.sum(_GL_W[None, :] * kernel * values, axis=1)


def combined_term(record: CombinedDispersion, wavelength: np.ndarray,
                  densities_ref: tuple[float, ...]) -> np.ndarray:
    """Per-molecule Lorentz-Lorenz term of a combined record (module docstring). [m^3]

    Parameters
    ----------
    record : CombinedDispersion
        The fits and switch bands.
    wavelength : ndarray
        Vacuum wavelengths, one-dimensional. [m]
    densities_ref : tuple of float
        Reference number density of each fit (same equation of state as the fill). [1/m^3]

    Returns
    -------
    ndarray
        T(lambda): the anchor's term plus one join D per switch band. [m^3]

    References
    ----------
    None: numerical construction stated in the module docstring (the fits cite theirs).
    """
    def term(i):
        return lambda lam: fit_term(record.fits[i], lam, densities_ref[i])

    def difference(outer, inner):
        return lambda lam: term(outer)(lam) - term(inner)(lam)

    def size(k, band):  # of the terms joined across the band (for the series' tail)
        return float(np.max(np.abs(term(k)(np.asarray(band)))))

    anchor = record.anchor
    total = term(anchor)(wavelength)
    for k, band in enumerate(record.switches):
        if k >= anchor:  # band between fit k (inner) and fit k + 1 (outer), above the anchor
            total = total + _join(difference(k + 1, k), band, wavelength, True, size(k, band))
        else:  # band between fit k (outer) and fit k + 1 (inner), below the anchor
            total = total + _join(difference(k, k + 1), band, wavelength, False,
                                  size(k, band))
    return total
