"""Fused kernels (numba) of the multimode nonlinear terms on the radial grid.

The modes' temporal envelopes come as an (N, points) complex array ``a`` (each row the field
of one mode times the FFT scale, see :class:`~.multimode_terms.ModeCoupling`), passed as its
float view ``A`` of shape (N, 2 points) (re, im, re, im, ...; no copy). The mode profiles at
the K radial nodes are the real (K, N) matrix ``F``; ``WF`` = w_k F[k, p] carries the
quadrature weights (area elements). Multiplying a complex sample by a real number scales its
two floats alike, so the synthesis of the field at a node and the projection back on the modes
are plain multiply-adds over contiguous float rows, which LLVM vectorises (the loops run over
views indexed from 0, as in :mod:`.kernels`). The time axis is done in blocks of
:data:`BLOCK` samples so the field at one node stays in the L1 cache while it is built, raised
to the Kerr term and projected on every mode.

Only the multimode solver imports this module (lazily, like :mod:`.kernels`). Compiled code is
cached on disk (``cache=True``).
"""

from __future__ import annotations

import numpy as np
from numba import njit

from hcfplan.propagation.kernels import plasma_in_place

_JIT = {"cache": True, "fastmath": False, "nogil": True}
#: Time samples per block of :func:`kerr_projection`.
BLOCK = 256


@njit(**_JIT)
def kerr_projection(A, F, WF, pairs, G, instantaneous, Q, work):  # pragma: no cover
    """Q[p] = sum_k WF[k, p] E_k (f_i |E_k|^2 + D_k), E_k = sum_m F[k, m] a_m.

    ``A`` (N, 2P) and ``Q`` (N, 2P) are float views of complex (N, P) arrays; ``pairs``
    (M, P) holds the delayed response convolved with the mode products (M = 0 without a
    delayed response) and ``G`` (K, M) their weights at the nodes, so that the delayed index
    at node k is D_k = sum_j G[k, j] pairs[j]; ``work`` is a float scratch array of at least
    3 * BLOCK.

    References
    ----------
    Kerr coupling of the modes through the overlap of their profiles: F. Poletti and P.
    Horak, J. Opt. Soc. Am. B 25, 1645 (2008), evaluated on a radial grid (module docstring of
    :mod:`hcfplan.propagation.multimode_terms`).
    """
    modes, two_p = A.shape
    nodes, n_pairs = F.shape[0], pairs.shape[0]
    points = two_p // 2
    e = work[:2 * BLOCK]
    d = work[2 * BLOCK:3 * BLOCK]
    for b0 in range(0, points, BLOCK):
        b1 = min(b0 + BLOCK, points)
        nb = b1 - b0
        for p in range(modes):
            q = Q[p, 2 * b0:2 * b1]
            for j in range(2 * nb):
                q[j] = 0.0
        for k in range(nodes):
            for j in range(2 * nb):
                e[j] = 0.0
            for m in range(modes):
                f = F[k, m]
                am = A[m, 2 * b0:2 * b1]
                for j in range(2 * nb):
                    e[j] += f * am[j]
            for t in range(nb):
                d[t] = 0.0
            for i in range(n_pairs):
                g = G[k, i]
                row = pairs[i, b0:b1]
                for t in range(nb):
                    d[t] += g * row[t]
            for t in range(nb):
                er, ei = e[2 * t], e[2 * t + 1]
                v = instantaneous * (er * er + ei * ei) + d[t]
                e[2 * t], e[2 * t + 1] = er * v, ei * v
            for p in range(modes):
                w = WF[k, p]
                q = Q[p, 2 * b0:2 * b1]
                for j in range(2 * nb):
                    q[j] += w * e[j]


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
    tables as in :func:`~.kernels.plasma_in_place`. One call for all nodes: calling that
    kernel per node from Python cost about 15 us of argument handling each (measured).

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
def beam_power_at(coefficients, first, step, count, out):  # pragma: no cover - compiled
    """out[o] = sum_m |sum_j c[m, j] first[j] step[j]^o|^2 for o = 0..count-1: the summed
    power of the band-limited envelopes at equally spaced instants (``first`` the phases of
    the first instant, ``step`` those of the spacing; ``phase`` is a work copy).

    References
    ----------
    Band-limited (sinc) interpolation: C. E. Shannon, Proc. IRE 37, 10 (1949).
    """
    modes, n = coefficients.shape
    phase = first.copy()
    for o in range(count):
        total = 0.0
        for m in range(modes):
            acc = 0.0 + 0.0j
            row = coefficients[m]
            for j in range(n):
                acc += row[j] * phase[j]
            total += acc.real * acc.real + acc.imag * acc.imag
        out[o] = total
        for j in range(n):
            phase[j] *= step[j]


def warm_kernels() -> None:
    """Call every kernel once with small arrays (loads or compiles the machine code).

    References
    ----------
    none: numerical helper
    """
    a = np.ones((2, 8))
    f = np.ones((3, 2))
    pairs, g = np.ones((3, 4)), np.ones((3, 3))
    q, work = np.zeros((2, 8)), np.zeros(3 * BLOCK)
    kerr_projection(a, f, f, pairs, g, 1.0, q, work)
    pair_products(a, pairs)
    beam_power_at(np.ones((2, 4), complex), np.ones(4, complex), np.ones(4, complex), 3,
                  np.zeros(3))
    table = (np.array([30.0, 31.0]), np.array([1.0, 2.0]), np.array([0, 2], dtype=np.int64),
             np.array([1.0]), np.array([1e25]), np.array([2.5e-18]))
    rows = np.ones(4, complex), np.ones(4, complex), np.ones(4), np.zeros(4)
    radial_plasma_projection(a, f, f, pairs, g, 1.0, *table, 1.0, 1e-15, 1e-3, q, q.copy(),
                             np.zeros(3), *rows)
