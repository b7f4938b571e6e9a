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
def node_fields(A, F, E):  # pragma: no cover - compiled
    """E[k] = sum_m F[k, m] a_m for every node k (float views (N, 2P) -> (K, 2P)).

    References
    ----------
    Field of the mode superposition: F. Poletti and P. Horak, J. Opt. Soc. Am. B 25, 1645
    (2008).
    """
    modes, two_p = A.shape
    for k in range(F.shape[0]):
        ek = E[k]
        for j in range(two_p):
            ek[j] = 0.0
        for m in range(modes):
            f = F[k, m]
            am = A[m]
            for j in range(two_p):
                ek[j] += f * am[j]


@njit(**_JIT)
def node_delays(pairs, G, D):  # pragma: no cover - compiled
    """D[k] = sum_j G[k, j] pairs[j] (the delayed index at every node; (M, P) -> (K, P)).

    References
    ----------
    none: numerical helper (the delayed response cites its source in :mod:`.operators`)
    """
    for k in range(G.shape[0]):
        dk = D[k]
        for t in range(dk.size):
            dk[t] = 0.0
        for i in range(pairs.shape[0]):
            g = G[k, i]
            row = pairs[i]
            for t in range(dk.size):
                dk[t] += g * row[t]


@njit(**_JIT)
def node_power(E, power):  # pragma: no cover - compiled
    """power[k, t] = |E[k, t]|^2 (E a float view (K, 2P)).

    References
    ----------
    none: numerical helper
    """
    for k in range(E.shape[0]):
        ek, pk = E[k], power[k]
        for t in range(pk.size):
            pk[t] = ek[2 * t] * ek[2 * t] + ek[2 * t + 1] * ek[2 * t + 1]


@njit(**_JIT)
def project(E, WF, Q):  # pragma: no cover - compiled
    """Q[p] = sum_k WF[k, p] E[k] (float views (K, 2P) -> (N, 2P)).

    References
    ----------
    Projection on the modes: F. Poletti and P. Horak, J. Opt. Soc. Am. B 25, 1645 (2008).
    """
    for p in range(Q.shape[0]):
        qp = Q[p]
        for j in range(qp.size):
            qp[j] = 0.0
        for k in range(E.shape[0]):
            w = WF[k, p]
            ek = E[k]
            for j in range(qp.size):
                qp[j] += w * ek[j]


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
    e, d, p = np.zeros((3, 8)), np.zeros((3, 4)), np.zeros((3, 4))
    node_fields(a, f, e)
    node_delays(pairs, g, d)
    node_power(e, p)
    project(e, f, q)
    pair_products(a, pairs)
