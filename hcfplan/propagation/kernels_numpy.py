"""The numpy twins of the solver's compiled kernels (:mod:`hcfplan.propagation.kernels`).

Each function has the signature, the in-place semantics and the formulas of the compiled kernel
of the same name, written as whole-array numpy operations; the results are equal to rounding
(the sums run in another order; products and differences are formed as in the kernel, on the
flat float views of the complex arrays where the kernel writes out a complex product in real
arithmetic, so NaN and Inf reach the same places). They need no compilation and no numba: a
short process on a small grid (one command of the command line) finishes sooner on them, see
:mod:`hcfplan.numerics.kernel_choice`, which says when they run. The arrays must be
C-contiguous, as for the compiled kernels.

References
----------
The steppers' stages: J. Hult, J. Lightwave Technol. 25, 3770 (2007); S. Balac and F. Mahé,
Comput. Phys. Commun. 184, 1211 (2013). The plasma terms: M. Geissler et al., Phys. Rev. Lett.
83, 2930 (1999). Each function names its source.
"""

from __future__ import annotations

import numpy as np

#: The compiled kernels never warn (NaN and Inf are results the solver checks): nor do the twins.
_quiet = np.errstate(all="ignore")


def _i_gain(g: np.ndarray, r: np.ndarray) -> np.ndarray:
    """i g r for real g, as the kernels form it: (-g r_im, g r_re) (a new array)."""
    out = np.empty_like(r)
    np.multiply(r.imag, g, out=out.real)
    np.negative(out.real, out=out.real)
    np.multiply(r.real, g, out=out.imag)
    return out


def _scale(a: np.ndarray, v: np.ndarray) -> None:
    """a *= v for real v, part by part (a complex product would turn an Inf into a NaN)."""
    np.multiply(a.real, v, out=a.real)
    np.multiply(a.imag, v, out=a.imag)


def _abs2(a: np.ndarray, out: np.ndarray | None = None) -> np.ndarray:
    """re^2 + im^2 of the complex array ``a`` (into ``out`` if given)."""
    re, im = a.real, a.imag
    out = np.multiply(re, re, out=out)
    out += im * im
    return out


def _norm2(a: np.ndarray) -> float:
    """sum |a|^2 (nan or inf where the kernel's sum is)."""
    flat = a.view(np.float64)
    # not np.dot: BLAS splits a long dot product over threads, which on a busy machine took
    # 5 ms a call at 8192 points (einsum sums on this thread)
    return float(np.einsum("i,i->", flat, flat))


@_quiet
def stage_first(ui, acc, x, d, u, g, nu, s):
    """ui = d u;  acc = k1 = d i g nu;  x = ui + s k1.  Returns sum |u|^2.

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    total = _norm2(u)
    np.multiply(d, u, out=ui)
    np.multiply(d, _i_gain(g, nu), out=acc)
    np.multiply(acc.view(np.float64), s, out=x.view(np.float64))
    x += ui
    return total


@_quiet
def stage_middle(x, acc, ui, g, r, s):
    """k = i g r;  acc += 2 k;  x = ui + s k.

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    k = _i_gain(g, r).view(np.float64)
    flat_acc = acc.view(np.float64)
    flat_acc += 2.0 * k
    np.multiply(k, s, out=x.view(np.float64))
    x += ui


@_quiet
def stage_last(x, acc, ui, g, r, s, d):
    """k = i g r;  acc += 2 k;  x = d (ui + s k).

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    y = _i_gain(g, r)
    k = y.view(np.float64)
    flat_acc = acc.view(np.float64)
    flat_acc += 2.0 * k
    k *= s
    y += ui
    np.multiply(d, y, out=x)


@_quiet
def stage_combine(u4, x, d, ui, acc, g, r, s):
    """u4 = x = d (ui + s acc) + s i g r.  Returns sum |u4|^2 (inf/nan if not finite).

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    y = np.empty_like(ui)
    np.multiply(acc.view(np.float64), s, out=y.view(np.float64))
    y += ui
    np.multiply(d, y, out=u4)
    k = _i_gain(g, r).view(np.float64)
    k *= s
    flat = u4.view(np.float64)
    flat += k
    x[...] = u4
    return _norm2(u4)


@_quiet
def difference_norm2(g, r4, r5):
    """sum |i g (r4 - r5)|^2.

    References
    ----------
    Local-error estimate of ERK4(3)-IP, S. Balac and F. Mahé, Comput. Phys. Commun. 184, 1211
    (2013).
    """
    return _norm2(_i_gain(g, r4 - r5))


@_quiet
def difference_scaled_rms(g, r4, r5, u4, u, s, rtol, atol):
    """RMS of s i g (r4 - r5) / (atol + rtol max(|u4|, |u|)).

    References
    ----------
    Local-error estimate of ERK4(3)-IP, S. Balac and F. Mahé, Comput. Phys. Commun. 184, 1211
    (2013).
    Scaled RMS norm: E. Hairer, S. P. Nørsett and G. Wanner, Solving Ordinary Differential Equations
    I, 2nd ed., Springer (1993), sec. II.4 [from memory].
    """
    big = _abs2(u4)
    other = _abs2(u)
    # the kernel's max(x, y) is y if y > x else x (a NaN in y is passed over, one in x kept)
    np.copyto(big, other, where=other > big)
    scale = atol + rtol * np.sqrt(big)
    terms = _abs2(_i_gain(g, r4 - r5))
    terms /= scale * scale
    return abs(s) * np.sqrt(terms.sum() / g.size)


@_quiet
def kerr_in_place(a):
    """a = a |a|^2.

    References
    ----------
    none: numerical helper
    """
    _scale(a, _abs2(a))


@_quiet
def power_of(a, power):
    """power = |a|^2; returns its highest value (nan if a value is nan).

    References
    ----------
    none: numerical helper
    """
    _abs2(a, power)
    return float(power.max())


@_quiet
def delayed_in_place(a, power, delayed, instantaneous):
    """a = a (f_i |a|^2 + delayed).

    References
    ----------
    none: numerical helper
    """
    v = instantaneous * power
    v += delayed
    _scale(a, v)


@_quiet
def table_rates(li, x, y, first, top, slope_top):
    """Rates of the log-log table (x, y)[first:top + 1] at the ln(intensity) values ``li``, all
    >= x[first] (the compiled kernel's ``table_rate`` for an array).

    References
    ----------
    none: numerical helper
    """
    # np.interp forms y[lo] + (y[hi] - y[lo]) / (x[hi] - x[lo]) (li - x[lo]) as the compiled
    # kernel does (the two terms added the other way round), and gives y[top] at x[top]
    rates = np.exp(np.interp(li, x[first:top + 1], y[first:top + 1]))
    above = li > x[top]
    if above.any():
        rates[above] = np.exp(y[top] + slope_top * (li[above] - x[top]))
    return rates


@_quiet
def plasma_in_place(a, p, power, delayed, instantaneous, log_i, log_w, starts, slopes,
                    densities, potentials, to_watt, area, dt, refraction):
    """Kerr and plasma terms of the field a = scale A(t) in one pass over time.

    The arguments, results and formulas of the compiled kernel of the same name, in whole-array
    form. Only the samples above the lowest rate table (``acting``, usually a few) have a rate:
    there a species' exposure before each sample is the running sum of its W dt over the acting
    samples before, from which the density before the sample, its increment, the mid-sample
    density rho and the ionisation loss follow. Between two acting samples rho is the compiled
    kernel's ``settled`` value, the same sum with the increment 0 (0 before the first), and the
    damping is 0.

    References
    ----------
    Plasma terms of M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999).
    in the envelope form of M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory].
    """
    count, n = densities.size, a.size
    watt_min = np.inf
    for s in range(count):
        watt_min = min(watt_min, area * np.exp(log_i[starts[s]]) * (1 - 1e-12))
    acting = np.flatnonzero(power * to_watt >= watt_min)  # the others (and NaN): no rate
    m, end = acting.size, 0.0
    if m == 0:  # rho 0 throughout (the kernel's settled sum of zeros), no damping
        np.multiply(a, complex(-0.0, -refraction * 0.0), out=p)
        delayed_in_place(a, power, delayed, instantaneous)
        return end
    watt = power[acting] * to_watt
    li = np.log(watt / area)
    rho, loss = 0.0, 0.0
    settled = 0.0  # after 0, 1, ..., m acting samples
    for s in range(count):
        first = starts[s]
        inside = li >= log_i[first]  # below this table the rate is 0
        if inside.all():
            w_dt = table_rates(li, log_i, log_w, first, starts[s + 1] - 1, slopes[s]) * dt
        else:
            w_dt = np.zeros(m)
            w_dt[inside] = table_rates(li[inside], log_i, log_w, first, starts[s + 1] - 1,
                                       slopes[s]) * dt
        acts = w_dt > 0
        if not acts.all():
            w_dt[~acts] = 0.0
        exposure = np.zeros(m + 1)  # sum of W dt over the acting samples before
        np.cumsum(w_dt, out=exposure[1:])
        before = densities[s] * (-np.expm1(-exposure))
        increment = densities[s] * np.exp(-exposure[:-1]) * (-np.expm1(-w_dt))
        rho = rho + (before[:-1] + 0.5 * increment)
        loss = loss + potentials[s] * increment
        settled = settled + (before + 0.5 * 0.0)
        end += before[-2] + increment[-1] if acting[-1] == n - 1 else before[-1] + 0.0
    # settled[j] holds from the j-th acting sample (exclusive) to the next (inclusive; the
    # acting sample itself is set after)
    lengths = np.empty(m + 1, np.int64)
    lengths[0] = acting[0] + 1
    np.subtract(acting[1:], acting[:-1], out=lengths[1:m])
    lengths[m] = n - 1 - acting[-1]
    c = np.empty(n, complex)  # the factor -damping - i refraction rho
    c.real = -0.0
    np.multiply(np.repeat(settled, lengths), -refraction, out=c.imag)
    damping = np.where(loss > 0, loss * (area / dt) / (2.0 * watt), 0.0)  # watt > 0 here
    c.real[acting] = -damping
    c.imag[acting] = rho * -refraction
    np.multiply(a, c, out=p)
    delayed_in_place(a, power, delayed, instantaneous)
    return end


@_quiet
def spectrum_sums(u, rank, ascending, row, far, band, band_wavelength):
    """density = |u|^2 into ``row`` (FFT order, e.g. a float32 row) and into ``ascending`` at
    the positions ``rank`` (ascending frequency). Returns (sum of density, its sum where ``far``
    is True, its sum where ``band`` is True, sum of band_wavelength * density there).

    References
    ----------
    none: numerical helper
    """
    d = _abs2(u)
    row[...] = d
    ascending[rank] = d
    inside = d[band]
    return (float(d.sum()), float(d[far].sum()), float(inside.sum()),
            float(np.dot(band_wavelength[band], inside)))


@_quiet
def outermost_width(x, y, level):
    """Width of y(x) between its outermost samples at or above ``level`` times the refined
    peak, crossings interpolated: the compiled kernel of the same name (and so
    :func:`hcfplan.pulse.metrics.width_at_level` with ``extent="outermost"``), with the same
    arithmetic; nan where that kernel gives nan.

    References
    ----------
    none: numerical helper
    """
    n = y.size
    if n < 3 or np.isnan(y).any():
        return np.nan
    at = int(np.argmax(y))
    peak = y[at]
    if not peak > 0:
        return np.nan
    top = peak
    if 0 < at < n - 1:
        left, right = y[at - 1], y[at + 1]
        curvature = 2.0 * peak - left - right
        if curvature > 0:
            top = peak + (right - left) ** 2 / (8.0 * curvature)
    threshold = level * top
    reached = np.flatnonzero(y >= threshold)
    if reached.size == 0:
        return np.nan
    lo, hi = int(reached[0]), int(reached[-1])
    if lo == 0 or hi == n - 1:
        return np.nan
    i_out, i_in = lo - 1, lo
    x_lo = x[i_out] + (threshold - y[i_out]) / (y[i_in] - y[i_out]) * (x[i_in] - x[i_out])
    i_out, i_in = hi + 1, hi
    x_hi = x[i_out] + (threshold - y[i_out]) / (y[i_in] - y[i_out]) * (x[i_in] - x[i_out])
    return float(x_hi - x_lo)


@_quiet
def power_sums(a, power, scale, far):
    """power = scale |a|^2.  Returns (max of power, nan if any is nan; its sum where ``far``).

    References
    ----------
    none: numerical helper
    """
    _abs2(a, power)
    power *= scale
    peak = float(power.max()) if power.size else -np.inf
    return peak, float(power[far].sum())


@_quiet
def add_scaled_product(out, factor, extra, weight):
    """out = factor out - i weight extra (real factor and weight, complex arrays): the raw
    spectrum of the plasma case (the compiled kernel of the same name).

    References
    ----------
    none: numerical helper
    """
    re, im = out.real, out.imag
    np.multiply(re, factor, out=re)
    re += weight * extra.imag
    np.multiply(im, factor, out=im)
    im -= weight * extra.real
