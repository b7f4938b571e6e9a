"""Fused kernels (numba) of the multimode nonlinear terms on the radial grid.

The modes' temporal envelopes come as an (N, points) complex array ``a`` (each row the field
of one mode times the FFT scale, see :class:`~.multimode_terms.ModeCoupling`), passed as its
float view ``A`` of shape (N, 2 points) (re, im, re, im, ...; no copy). The mode profiles at
the K radial nodes are the real (K, N) matrix ``F``; ``WF`` = w_k F[k, p] carries the
quadrature weights (area elements). Multiplying a complex sample by a real number scales its
two floats alike, so the synthesis of the field at a node and the projection back on the modes
are plain multiply-adds over contiguous float rows, which LLVM vectorises (the loops run over
views indexed from 0, as in :mod:`.kernels`). :func:`mode_terms` (the solver's kernel) does
the time axis in blocks of :data:`BLOCK` samples, so the field of a block at all nodes stays in
the cache while it is built, raised to the Kerr term, ionises and is projected on every mode
(256 measured faster than 64, 128 and 512 on the demo capillary config);
:func:`radial_plasma_projection` is its per-node reference (whole rows, the single-mode plasma
kernel at each node), which the tests compare it with.

Only the multimode solver imports this module (lazily, like :mod:`.kernels`). Compiled code is
cached on disk (``cache=True``).
"""

from __future__ import annotations

import numpy as np
from numba import njit

from hcfplan.propagation.kernels import plasma_in_place, table_rate

_JIT = {"cache": True, "fastmath": False, "nogil": True}
#: Time samples per block of :func:`mode_terms`.
BLOCK = 256


@njit(**_JIT)
def radial_plasma_projection(A, F, WF, pairs, G, instantaneous, log_i, log_w, starts, slopes,
                             densities, potentials, to_watt, dt, refraction, Q, QP, ends, e,
                             p, power, d):  # pragma: no cover - compiled
    """Kerr, delayed and plasma terms at every node, projected on the modes, in one call.

    For node k: E_k = sum_m F[k, m] a_m into the complex row ``e``, its power |E_k|^2 and
    delayed index D_k = sum_j G[k, j] pairs[j] into ``power`` and ``d``, then
    :func:`~.kernels.plasma_in_place` with area 1 (so ``to_watt`` power is the intensity
    [W/m^2]) gives the Kerr term in ``e`` and the plasma term in ``p``, and
    Q[p] += WF[k, p] e, QP[p] += WF[k, p] p. ``ends[k]`` is the electron density at the
    window's end at node k [1/m^3]. ``A``, ``Q``, ``QP`` are float views (N, 2P); the rate
    tables as in :func:`~.kernels.plasma_in_place`. The per-node reference of
    :func:`mode_terms` (the solver uses that one; the tests compare the two).

    References
    ----------
    Plasma terms of M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999), in the envelope
    form of M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory], at the
    local intensity; projection on the modes as in F. Poletti and P. Horak, J. Opt. Soc.
    Am. B 25, 1645 (2008).
    """
    modes, two_p = A.shape
    E, P = e.view(np.float64), p.view(np.float64)
    for m in range(modes):
        qm, pm = Q[m], QP[m]
        for j in range(two_p):
            qm[j] = 0.0
            pm[j] = 0.0
    for k in range(F.shape[0]):
        for j in range(two_p):
            E[j] = 0.0
        for m in range(modes):
            f = F[k, m]
            am = A[m]
            for j in range(two_p):
                E[j] += f * am[j]
        for t in range(power.size):
            power[t] = E[2 * t] * E[2 * t] + E[2 * t + 1] * E[2 * t + 1]
            d[t] = 0.0
        for i in range(pairs.shape[0]):
            g = G[k, i]
            row = pairs[i]
            for t in range(d.size):
                d[t] += g * row[t]
        ends[k] = plasma_in_place(e, p, power, d, instantaneous, log_i, log_w, starts, slopes,
                                  densities, potentials, to_watt, 1.0, dt, refraction)
        for m in range(modes):
            w = WF[k, m]
            if w == 0.0:  # the axis node (weight 0) only gives the on-axis ionisation
                continue
            qm = Q[m]
            for j in range(two_p):
                qm[j] += w * E[j]
            if ends[k] > 0.0:  # no electrons at this node: its plasma term is exactly 0
                pm = QP[m]
                for j in range(two_p):
                    pm[j] += w * P[j]


@njit(**_JIT)
def _node_rates(e, pw, row, k, nb, watt_min, to_watt, log_i, log_w, starts, slopes,
                densities, potentials, dt, refraction, survive, before, settled,
                ends):  # pragma: no cover - compiled
    """Plasma of node k over one time block: the electron density of every species carried in
    ``survive`` (exp(-int W dt)) and ``before`` (density at the sample's start) [1/m^3], the
    plasma term e (-i refraction rho - damping) into ``row`` (float view; of size 0: only the
    densities advance). Returns True when the node holds electrons.

    References
    ----------
    M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999); M. F. Saleh et al., Phys. Rev.
    Lett. 107, 203902 (2011) [from memory].
    """
    count = densities.size
    end = ends[k]
    for t in range(nb):
        watt = pw[t] * to_watt
        if not watt >= watt_min:  # below every table (or NaN): no rate, no logarithm
            rho, end, damping = settled[k], settled[k], 0.0
        else:
            li = np.log(watt)
            rho, loss, end = 0.0, 0.0, 0.0
            changed = False
            for s in range(count):
                first, w_dt = starts[s], 0.0
                if li >= log_i[first]:  # below this table the rate is 0
                    w_dt = table_rate(li, log_i, log_w, first, starts[s + 1] - 1,
                                       slopes[s]) * dt
                increment = 0.0
                if w_dt > 0:
                    lost = np.expm1(-w_dt)  # exp(-W dt) - 1
                    increment = densities[s] * survive[k, s] * (-lost)
                    survive[k, s] *= 1.0 + lost
                rho += before[k, s] + 0.5 * increment
                loss += potentials[s] * increment
                end += before[k, s] + increment
                if w_dt > 0:
                    before[k, s] += increment
                    changed = True
            if changed:
                total = 0.0
                for s in range(count):
                    total += before[k, s]
                settled[k] = total
            damping = loss * (1.0 / dt) / (2.0 * watt) if loss > 0 and watt > 0 else 0.0
        if row.size:
            er, ei = e[2 * t], e[2 * t + 1]
            cr, ci = -damping, -refraction * rho
            row[2 * t], row[2 * t + 1] = er * cr - ei * ci, er * ci + ei * cr
    ends[k] = end
    return settled[k] > 0.0


@njit(**_JIT)
def _mix(dst, src, c, lo, n):  # pragma: no cover - compiled
    """dst[j] = sum_i c[i] src[i, lo + j] for j < n, rows taken four (two, one) at a time, so
    ``dst`` is loaded and stored once per four rows (the loops over j vectorise)."""
    rows, i = c.size, 0
    for j in range(n):
        dst[j] = 0.0
    while i < rows:
        if rows - i >= 4:
            c0, c1, c2, c3 = c[i], c[i + 1], c[i + 2], c[i + 3]
            s0, s1 = src[i, lo:lo + n], src[i + 1, lo:lo + n]
            s2, s3 = src[i + 2, lo:lo + n], src[i + 3, lo:lo + n]
            for j in range(n):
                dst[j] += (c0 * s0[j] + c1 * s1[j]) + (c2 * s2[j] + c3 * s3[j])
            i += 4
        elif rows - i >= 2:
            c0, c1 = c[i], c[i + 1]
            s0, s1 = src[i, lo:lo + n], src[i + 1, lo:lo + n]
            for j in range(n):
                dst[j] += c0 * s0[j] + c1 * s1[j]
            i += 2
        else:
            c0, s0 = c[i], src[i, lo:lo + n]
            for j in range(n):
                dst[j] += c0 * s0[j]
            i += 1


@njit(**_JIT)
def mode_terms(A, F, WF, pairs, G, instantaneous, project, log_i, log_w, starts, slopes,
               densities, potentials, to_watt, dt, refraction, Q, QP, ends, survive, before,
               settled, E, power, row, M, KE):  # pragma: no cover - compiled
    """Kerr, delayed and plasma terms at the K radial nodes, projected on the N modes, in one
    pass over blocks of :data:`BLOCK` time samples (the block of every node stays in the
    cache: the field at the nodes never goes to memory).

    Per block: E_k = sum_m F[k, m] a_m and |E_k|^2 at every node (``E`` (K, 2 BLOCK),
    ``power`` (K, BLOCK)); the Kerr and delayed term Q[p] += WF[k, p] E_k (f_i |E_k|^2 + D_k)
    (D_k = sum_j G[k, j] pairs[j]: ``pairs`` (M, points) holds the delayed response convolved
    with the mode products, ``G`` (K, M) their weights at the nodes); then the plasma (when the
    rate tables are not empty), with the density of each node carried from block to block in
    ``survive``, ``before`` (K, species) and ``settled`` (K,), which this call resets:

    * a block in which no node has a sample above the tables' first intensity: every node's
      density is its settled value, the damping is 0, and the plasma term is
      QP[p] += -i refraction sum_m M[p, m] a_m with M[p, m] = sum_k WF[k, p] settled_k F[k, m]
      (N^2 multiply-adds per sample instead of 2 K N; nothing at all before the first
      electrons);
    * otherwise the rates of :func:`~.kernels.plasma_in_place` at each node, sample by sample
      (the samples below the tables at the rate 0), and QP[p] += WF[k, p] P_k.

    The densities follow the piecewise-constant-rate solution of the single-mode kernel, with
    exp(-int W dt) kept as a running product and the density as a running sum of the
    increments (one exponential per sample and species instead of three; equal to rounding).
    With ``project`` False only the densities are computed (``ends`` [1/m^3], the density at
    the window's end at each node; Q and QP untouched). A node with WF[k] = 0 (the axis) gives
    only its density. ``row`` (2 BLOCK), ``M`` (N, N) and ``KE`` (K, 2 BLOCK) are work arrays.
    The sums over the modes (synthesis) and over the nodes (projection) take four rows at a
    time (:func:`_mix`).

    References
    ----------
    Kerr coupling through the mode profiles on a radial grid: F. Poletti and P. Horak, J. Opt.
    Soc. Am. B 25, 1645 (2008). Plasma terms of M. Geissler et al., Phys. Rev. Lett. 83, 2930
    (1999), in the envelope form of M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011)
    [from memory], at the local intensity.
    """
    modes, two_p = A.shape
    nodes, n_pairs = F.shape[0], pairs.shape[0]
    points = two_p // 2
    plasma = densities.size > 0
    watt_min = np.inf
    for s in range(densities.size):
        watt_min = min(watt_min, np.exp(log_i[starts[s]]) * (1 - 1e-12))
    for k in range(nodes):
        settled[k] = 0.0
        ends[k] = 0.0
        for s in range(densities.size):
            survive[k, s] = 1.0
            before[k, s] = 0.0
    stale = True  # M does not hold the settled densities
    charged = False  # some node holds electrons
    nothing = row[:0]
    WT = np.ascontiguousarray(WF.T)  # (N, K): the projection's coefficients per mode
    for b0 in range(0, points, BLOCK):
        b1 = min(b0 + BLOCK, points)
        nb = b1 - b0
        if project and plasma:
            for p in range(modes):
                q = QP[p, 2 * b0:2 * b1]
                for j in range(2 * nb):
                    q[j] = 0.0
        above = 0
        for k in range(nodes):
            e, pw = E[k], power[k]
            _mix(e, A, F[k], 2 * b0, 2 * nb)
            for t in range(nb):
                pw[t] = e[2 * t] * e[2 * t] + e[2 * t + 1] * e[2 * t + 1]
            if plasma:
                for t in range(nb):
                    if pw[t] * to_watt >= watt_min:
                        above += 1
        if project:
            for k in range(nodes):
                weighted = False
                for p in range(modes):
                    if WF[k, p] != 0.0:
                        weighted = True
                ke = KE[k]
                if not weighted:  # the axis node: only its density (its row weighs 0)
                    for j in range(2 * nb):
                        ke[j] = 0.0
                    continue
                e, pw = E[k], power[k]
                for t in range(nb):
                    row[t] = instantaneous * pw[t]
                for i in range(n_pairs):
                    g = G[k, i]
                    pair = pairs[i, b0:b1]
                    for t in range(nb):
                        row[t] += g * pair[t]
                for t in range(nb):
                    v = row[t]
                    ke[2 * t], ke[2 * t + 1] = e[2 * t] * v, e[2 * t + 1] * v
            for p in range(modes):
                _mix(Q[p, 2 * b0:2 * b1], KE, WT[p], 0, 2 * nb)
        if not plasma:
            continue
        if above == 0:
            for k in range(nodes):
                ends[k] = settled[k]
            if not (project and charged):
                continue
            if stale:
                for p in range(modes):
                    for m in range(modes):
                        total = 0.0
                        for k in range(nodes):
                            total += WF[k, p] * settled[k] * F[k, m]
                        M[p, m] = total
                stale = False
            for p in range(modes):
                qp = QP[p, 2 * b0:2 * b1]
                for m in range(modes):
                    c = refraction * M[p, m]
                    am = A[m, 2 * b0:2 * b1]
                    for t in range(nb):  # -i c a_m
                        qp[2 * t] += c * am[2 * t + 1]
                        qp[2 * t + 1] -= c * am[2 * t]
            continue
        stale = True
        for k in range(nodes):
            out = row if project else nothing
            holds = _node_rates(E[k], power[k], out, k, nb, watt_min, to_watt, log_i,
                                log_w, starts, slopes, densities, potentials, dt, refraction,
                                survive, before, settled, ends)
            charged = charged or holds
            if not (project and holds):
                continue
            for p in range(modes):
                w = WF[k, p]
                if w == 0.0:
                    continue
                qp = QP[p, 2 * b0:2 * b1]
                for j in range(2 * nb):
                    qp[j] += w * row[j]


@njit(**_JIT)
def pair_products(A, out):  # pragma: no cover - compiled
    """out[j] = Re(a_m conj(a_n)) for the pairs m <= n in row-major order (A float view).

    References
    ----------
    none: numerical helper
    """
    modes, two_p = A.shape
    j = 0
    for m in range(modes):
        for n in range(m, modes):
            am, an, row = A[m], A[n], out[j]
            for t in range(two_p // 2):
                row[t] = am[2 * t] * an[2 * t] + am[2 * t + 1] * an[2 * t + 1]
            j += 1


@njit(**_JIT)
def beam_power_of(coefficients, row):  # pragma: no cover - compiled
    """sum_m |sum_j c[m, j] row[j]|^2: the summed power of the band-limited envelopes at the
    instant whose phases exp(-i dw_j t) are ``row``.

    References
    ----------
    Band-limited (sinc) interpolation: C. E. Shannon, Proc. IRE 37, 10 (1949).
    """
    modes, n = coefficients.shape
    total = 0.0
    for m in range(modes):
        acc = 0.0 + 0.0j
        c = coefficients[m]
        for j in range(n):
            acc += c[j] * row[j]
        total += acc.real * acc.real + acc.imag * acc.imag
    return total


def warm_kernels() -> None:
    """Call every kernel once with small arrays (loads or compiles the machine code).

    References
    ----------
    none: numerical helper
    """
    a = np.ones((2, 8))
    f = np.ones((3, 2))
    pairs, g = np.ones((3, 4)), np.ones((3, 3))
    q = np.zeros((2, 8))
    pair_products(a, pairs)
    beam_power_of(np.ones((2, 4), complex), np.ones(4, complex))
    table = (np.array([30.0, 31.0]), np.array([1.0, 2.0]), np.array([0, 2], dtype=np.int64),
             np.array([1.0]), np.array([1e25]), np.array([2.5e-18]))
    rows = np.ones(4, complex), np.ones(4, complex), np.ones(4), np.zeros(4)
    radial_plasma_projection(a, f, f, pairs, g, 1.0, *table, 1.0, 1e-15, 1e-3, q, q.copy(),
                             np.zeros(3), *rows)
    state = np.ones((3, 1)), np.zeros((3, 1)), np.zeros(3)
    blocks = (np.zeros((3, 2 * BLOCK)), np.zeros((3, BLOCK)), np.zeros(2 * BLOCK),
              np.zeros((2, 2)), np.zeros((3, 2 * BLOCK)))
    for project in (True, False):
        mode_terms(a, f, f, pairs, g, 1.0, project, *table, 1.0, 1e-15, 1e-3, q, q.copy(),
                   np.zeros(3), *state, *blocks)
    empty = (np.zeros(0), np.zeros(0), np.zeros(1, dtype=np.int64), np.zeros(0), np.zeros(0),
             np.zeros(0))
    mode_terms(a, f, f, pairs, g, 1.0, True, *empty, 1.0, 1e-15, 0.0, q, q, np.zeros(3),
               np.ones((3, 0)), np.zeros((3, 0)), np.zeros(3), *blocks)
