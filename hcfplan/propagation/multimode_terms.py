"""Linear and nonlinear terms of the multimode capillary GNLSE (Poletti & Horak [1]).

The state is the grid spectra of N modes EH11..EH1N stacked into one flat array of N x points
samples (mode p in ``u[p * points:(p + 1) * points]``), so the single-mode interaction-picture
steppers of :mod:`.steppers`, their error norms and the solver's loop work on it unchanged: the
linear operator is diagonal (each mode its own L_p(omega)) and the nonlinear term is one
object with the :class:`~.operators.NonlinearTerms` interface (``input``, ``gain``,
``evaluate``, ``new_work``).

Equation (conventions of :mod:`hcfplan.numerics.grid`, each A_p normalised so |A_p|^2 is the
power in mode p)

.. math::
    \\partial_z\\tilde A_p = i[\\beta_p(\\omega) - \\beta_{0} - \\beta_{1}(\\omega-\\omega_p)]
    \\tilde A_p - \\alpha_p(\\omega)\\tilde A_p
    + i\\frac{n_2\\omega}{c}\\mathcal F\\Big\\{\\int F_p\\,E\\,[f_i|E|^2 + (h*|E|^2)]\\,dA\\Big\\}
    + \\mathcal F\\Big\\{\\int F_p\\,E\\,\\big(-i\\,\\kappa\\rho
    - \\frac{\\sum_k I_{p,k}\\partial_t\\rho_k}{2|E|^2}\\big)\\,dA\\Big\\},

with E(r, t) = sum_m A_m(t) F_m(r) (|E|^2 the local intensity), F_m = J0(u_1m r / a)
normalised to int F_m^2 dA = 1 over the core (Marcatili & Schmeltzer [2]), beta_0, beta_1 of
EH11 at the pump (one common moving frame), kappa = e^2/(2 eps0 m_e c omega_p) and rho_k(r, t)
the electron density of gas component k from the local intensity. The Kerr, delayed (Raman)
and plasma terms are those of :mod:`.operators` at every point of the cross-section; for N = 1
the Kerr and Raman terms reduce exactly to the single-mode ones (int F^4 dA = 1/A_eff).

Radial grid instead of the overlap tensor (cost per time sample, complex multiply-adds)
----------------------------------------------------------------------------------------
The Kerr term can be written with the overlap tensor S_plmn = int F_p F_l F_m F_n dA as
Q_p = sum_lmn S_plmn A_l A_m A_n^*, or computed on a radial grid of K nodes: E at each node
(K N real x complex multiply-adds), E |E|^2 there, and the projection (K N again). With the
symmetries of S (products B_lm = A_l A_m for l <= m, then G_pn = sum S B, symmetric in p, n,
then sum_n G_pn A_n^*) the tensor costs about N(N+1)/2 x N(N+1)/2 + N^2 multiply-adds; the
grid 2 K N + K. With the K of :func:`radial_nodes` (quadrature error of S below 1e-7):

=====  ==  ==============  ============
N      K   tensor (~)      radial grid
=====  ==  ==============  ============
2      11  13              55
4      17  116             153
6      24  477             312
=====  ==  ==============  ============

(In flops the two are closer for N = 4 since the radial multiply-adds are real x complex and
vectorise over contiguous rows.) The tensor wins at N <= 4 by this count, the grid from N = 6
on; the grid is used throughout because the photoionisation rate is a strongly nonlinear
function of the local intensity, which the tensor cannot express: the plasma needs |E(r, t)|^2
at the nodes anyway, and one code path keeps the Kerr and plasma terms on the same quadrature
(which conserves the energy exactly: sum_p A_p^* Q_p = sum_k w_k |E_k|^4 is real). The
benchmark ``bench/multimode.py`` gives the measured cost. In fused multiply-adds per sample
the two are close for N = 4 (the grid about 360: 2 K N = 136 real x complex products, 272,
plus |E|^2 and the Kerr factor at 17 nodes; the tensor about 300), and with photoionisation
the pass over the nodes is needed anyway (on the demo capillary config every evaluation has
about 1300 of its 18 x 2048 node samples above the rate tables), so the tensor would add its
cost to that of the nodes rather than replace it.

All nodes are done in one compiled pass over blocks of time samples
(:func:`~.multimode_kernels.mode_terms`): the field at the nodes stays in the cache, the
electron density of each node is carried from block to block, and where no node reaches the
rate tables the plasma term is the N x N matrix sum_k w_k F_kp rho_k F_km applied to the mode
envelopes (nothing before the first electrons).

Radial quadrature: Gauss-Legendre in s = (r/a)^2 (dA = pi a^2 ds). Every integrand is a
product of J0(u r/a), an even, entire function of r, i.e. a power series in s; K Gauss nodes in
s integrate polynomials of degree 2K - 1 in s = 4K - 2 in r exactly, twice the degree of K
Gauss nodes in r with the weight r (which treats the even integrand as a general polynomial).
The product of four profiles of EH1N varies like cos(4 u_1N r / a), so K grows like u_1N:
K = ceil(u_1N) + 5 keeps the error of every S_plmn below 1e-7 of the largest for N <= 8 (6e-8
for N <= 6; with + 4 it reaches 2.5e-6, with + 6 8e-9 at one node more; checked for N = 1..6
against scipy.integrate.quad in tests/propagation/test_multimode_quadrature.py). That is below
the default rtol (1e-6) and far below the accuracy of the J0 profiles themselves (corrections
of order wavelength / a, Marcatili & Schmeltzer [2]).

Delayed (Raman) term through the mode products: the delayed index at node k is
h * |E_k|^2 = sum_{m<=n} c_mn F_km F_kn (h * Re(A_m A_n^*)) (c = 1 on the diagonal, 2 off it),
i.e. N(N+1)/2 real convolutions (one real FFT pair each) and a (K x N(N+1)/2) combination per
sample, instead of K convolutions at the nodes: 3, 10, 21 FFT pairs for N = 2, 4, 6 against
K = 11, 17, 24.

References
----------
.. [1] F. Poletti and P. Horak, "Description of ultrashort pulse propagation in multimode
       optical fibers," J. Opt. Soc. Am. B, vol. 25, no. 10, pp. 1645-1654, 2008,
       doi:10.1364/JOSAB.25.001645.
.. [2] E. A. J. Marcatili, R. A. Schmeltzer, "Hollow metallic and dielectric waveguides for
       long distance optical transmission and lasers," Bell Syst. Tech. J. 43, 1783-1809
       (1964), doi:10.1002/j.1538-7305.1964.tb04108.x.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.numerics.bessel import bessel_j
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.multimode_fft import ModeTransforms
from hcfplan.propagation.operators import (
    linear_terms,
    packed_tables,
    plasma_refraction_coefficient,
)

#: Radial nodes beyond ceil(u_1N) (module docstring: quadrature error of S below 1e-7).
EXTRA_NODES = 5
#: How the plasma is computed: from the local intensity at every radial node, or (the
#: single-mode approximation of :mod:`.operators`) from the on-axis intensity for the whole beam.
PLASMA_PROFILES = ("radial", "on_axis")
#: W dt below which a rate-table entry is dropped (:func:`trimmed_tables`). [1]
NEGLIGIBLE_IONIZATION = 1e-20
#: Empty rate tables (no ionising species) in the layout of
#: :func:`~.operators.packed_tables`.
NO_TABLES = (np.zeros(0), np.zeros(0), np.zeros(1, dtype=np.int64), np.zeros(0), np.zeros(0),
             np.zeros(0))


def trimmed_tables(tables: tuple[np.ndarray, ...], dt: float,
                   negligible: float = NEGLIGIBLE_IONIZATION) -> tuple[np.ndarray, ...]:
    """The rate tables of :func:`~.operators.packed_tables` without their lowest entries, where
    W dt < ``negligible``: below the first entry kept the rate is 0.

    The tables start far below any rate that matters (neon at 800 nm: W dt = 2.5e-43 at the
    first entry, 1e15 W/m^2, for dt = 1.34 fs), and on the demo capillary config 57 % of the
    samples of the radial nodes above the first entry have W dt < 1e-20: evaluating their
    rates (a logarithm, a table search and two exponentials each) was the largest part of the
    plasma's cost. The electrons so dropped are below ``negligible`` times the neutral density
    per sample, some 1e-18 of it per pulse: 1e-14 of the on-axis density there (ionisation
    fraction 1.5e-4), far below the solver tolerance (tested). The top slope is kept.

    Parameters
    ----------
    tables : tuple of ndarray
        (ln I, ln W, starts, top slopes, densities, potentials) as packed.
    dt : float
        Sample spacing. [s]
    negligible : float
        W dt below which a table entry is dropped. [1]

    Returns
    -------
    tuple of ndarray
        The same layout, each species keeping at least its last two entries.

    References
    ----------
    none: numerical helper
    """
    log_i, log_w, starts = tables[0], tables[1], tables[2]
    limit = math.log(negligible / dt) if negligible > 0 else -math.inf
    keep, new_starts = [], [0]
    for s in range(starts.size - 1):
        first, end = int(starts[s]), int(starts[s + 1])
        below = np.flatnonzero(log_w[first:end] < limit)  # the last one below, and all before
        cut = min(first + (int(below[-1]) + 1 if below.size else 0), end - 2)
        keep.append(np.arange(cut, end))
        new_starts.append(new_starts[-1] + end - cut)
    index = np.concatenate(keep)
    return (log_i[index], log_w[index], np.array(new_starts, dtype=np.int64)) + tuple(tables[3:])


def radial_nodes(eigenvalues) -> tuple[np.ndarray, np.ndarray]:
    """Radial nodes r_k / a and area weights of the core for the modes ``eigenvalues``.

    Parameters
    ----------
    eigenvalues : sequence of float
        u_1m of the modes (zeros of J0). [1]

    Returns
    -------
    x : ndarray
        r_k / a, K = ceil(max u) + :data:`EXTRA_NODES` nodes (Gauss-Legendre in s = x^2). [1]
    weights : ndarray
        w_k with int_core f dA = a^2 sum_k w_k f(r_k); they sum to pi. [1]

    References
    ----------
    none: numerical helper (Gauss-Legendre quadrature in (r/a)^2, module docstring)
    """
    nodes = int(math.ceil(max(float(u) for u in eigenvalues))) + EXTRA_NODES
    t, w = np.polynomial.legendre.leggauss(nodes)
    return np.sqrt(0.5 * (t + 1.0)), 0.5 * np.pi * w


def mode_profiles(x: np.ndarray, eigenvalues, core_radius: float) -> np.ndarray:
    """F_m(r) = J0(u_1m r/a) / sqrt(pi a^2 J1(u_1m)^2) (int F_m^2 dA = 1 over the core). [1/m]

    Parameters
    ----------
    x : ndarray
        r / a, in [0, 1]. [1]
    eigenvalues : sequence of float
        u_1m of the modes. [1]
    core_radius : float
        a. [m]

    Returns
    -------
    ndarray, shape (len(x), len(eigenvalues))
        The profiles normalised to unit power. [1/m]

    References
    ----------
    E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    u = np.asarray(eigenvalues, dtype=float)
    norm = np.sqrt(np.pi * core_radius**2 * bessel_j(1, u) ** 2)
    return bessel_j(0, np.outer(np.asarray(x, dtype=float), u)) / norm


def overlap_integral(indices, eigenvalues, core_radius: float) -> float:
    """int F_p F_l F_m F_n dA by the radial quadrature of the solver (indices into
    ``eigenvalues``, 0-based). For one mode, int F^4 dA = 1 / A_eff. [1/m^2]

    References
    ----------
    F. Poletti and P. Horak, J. Opt. Soc. Am. B 25, 1645 (2008) (overlap of the mode profiles).
    """
    x, w = radial_nodes(eigenvalues)
    f = mode_profiles(x, eigenvalues, core_radius)
    product = np.prod([f[:, i] for i in indices], axis=0)
    return float(core_radius**2 * np.sum(w * product))


@dataclass(frozen=True)
class ModeLinearTerms:
    """The diagonal linear operator of all modes (flat, mode after mode) and its frame."""

    operator: np.ndarray  #: L_p(omega) of every mode, flat (N points), FFT order [1/m]
    valid: np.ndarray  #: (N, points) bool, where each mode's model gives finite beta, alpha
    beta0: float  #: of the reference mode (the first) at the pump [rad/m]
    beta1: float  #: [s/m]


def mode_linear_terms(grid: Grid, waveguides, length: float) -> ModeLinearTerms:
    """L_p = i(beta_p - beta0 - beta1 (omega - omega_p)) - alpha_p - edge absorber for every
    mode, in the frame of the first mode (beta0, beta1 of EH11 at the pump).

    References
    ----------
    F. Poletti and P. Horak, J. Opt. Soc. Am. B 25, 1645 (2008) (one common frame); the
    single-mode operator of :func:`~.operators.linear_terms` per mode.
    """
    lins = [linear_terms(grid, wg, length) for wg in waveguides]
    ref = lins[0]
    rows = [ref.operator]
    for lin in lins[1:]:
        shift = (lin.beta0 - ref.beta0) + (lin.beta1 - ref.beta1) * grid.domega_pump
        rows.append(lin.operator + 1j * np.where(lin.valid, shift, 0.0))
    return ModeLinearTerms(np.concatenate(rows), np.array([lin.valid for lin in lins]),
                           ref.beta0, ref.beta1)


class ModeCoupling:
    """Nonlinear terms of N modes on the radial grid, with the interface of
    :class:`~.operators.NonlinearTerms` on the flat state (N = i gain raw).

    Without plasma, ``gain`` is n2 omega / c / (scale^2 points) per mode (zero where the mode's
    model is not valid) and ``raw`` the inverse FFT of the projected Kerr (and delayed) term;
    with plasma ``gain`` is 1 and raw = -i N. After every evaluation
    :attr:`ionization_fraction` (on axis) and :attr:`electron_line_density` (integral of rho
    over the core) hold the values for that field.
    """

    def __init__(self, grid: Grid, n2: float, valid: np.ndarray, core_radius: float,
                 eigenvalues, instantaneous: float = 1.0, response=None, species=(),
                 workers: int = 1, plasma_profile: str = "radial",
                 fft_backend: str | None = None) -> None:
        from hcfplan.propagation import kernels, multimode_kernels

        # the compiled set, as the mode terms are compiled anyway; the steppers take theirs
        # from here too (steppers.py)
        self.kernels, self.mk = kernels, multimode_kernels
        modes, n, dt = len(eigenvalues), grid.points, grid.dt
        self.modes, self.points, self.workers, self.dt = modes, n, workers, dt
        self.scale = n * dt
        gamma = n2 * grid.omega / c / (self.scale**2 * n)
        self.kerr_gain = np.where(valid, gamma[None, :], 0.0).reshape(-1)
        self.species = tuple(species)
        self.gain = self.kerr_gain if not self.species else np.ones(modes * n)
        pairs = [(m, k) for m in range(modes) for k in range(m, modes)]
        self.fft = ModeTransforms(modes, n, len(pairs) if response is not None else 0,
                                  fft_backend, workers)
        self.input = self.fft.spectrum_in.reshape(-1)  # a view: the transform's input
        self.new_work = lambda: self.fft.empty().reshape(-1)
        self.instantaneous = float(instantaneous)
        a = core_radius
        x, w = radial_nodes(eigenvalues)
        self.profiles = mode_profiles(x, eigenvalues, a)  # (K, N)
        self.weighted = (a**2 * w)[:, None] * self.profiles
        self.axis = mode_profiles(np.zeros(1), eigenvalues, a)[0]  # F_m(0), (N,)
        self.response_rfft = None if response is None else np.fft.rfft(response) / n
        self.pair_weights = np.zeros((x.size, 0))
        self.pairs = np.zeros((0, n))
        if response is not None:
            self.pair_weights = np.array([(1.0 if m == k else 2.0) * self.profiles[:, m]
                                          * self.profiles[:, k] for m, k in pairs]).T.copy()
        self.q = self.fft.empty()
        self.ionization_fraction = 0.0
        self.electron_line_density = 0.0
        self.n_calls = 0
        self.intensity_area = float(1.0 / self.axis[0] ** 2)  # A_I of the first mode [m^2]
        self.plasma_profile = plasma_profile
        self.refraction = 0.0
        self.tables = NO_TABLES
        # the nodes of the Kerr (and plasma) pass: profiles, weighted profiles, pair weights
        self.nodes = (self.profiles, self.weighted, self.pair_weights)
        if self.species:
            if plasma_profile not in PLASMA_PROFILES:
                raise ValueError(f"plasma_profile = {plasma_profile!r}: {PLASMA_PROFILES}")
            self.tables = trimmed_tables(packed_tables(self.species), dt)
            self.neutral_density = sum(s.number_density for s in self.species)
            self.refraction = plasma_refraction_coefficient(grid.omega_pump)
            self._plasma_buffers(np.concatenate([[0.0], x]), np.concatenate([[0.0], w]),
                                 eigenvalues, a, pairs)
        self._work(self.nodes[0].shape[0], self.tables[4].size if self.species else 0)

    def _plasma_buffers(self, x, w, eigenvalues, a, pairs) -> None:
        """Node set with the axis first (weight 0: it gives the on-axis fraction) and the work
        rows of the plasma path."""
        n = self.points
        self.node_profiles = mode_profiles(x, eigenvalues, a)
        self.node_weighted = (a**2 * w)[:, None] * self.node_profiles
        self.node_area = a**2 * w
        self.node_pair_weights = np.zeros((x.size, 0))
        if self.pair_weights.size:
            self.node_pair_weights = np.array(
                [(1.0 if m == k else 2.0) * self.node_profiles[:, m] * self.node_profiles[:, k]
                 for m, k in pairs]).T.copy()
        self.rows = (np.zeros(n, complex), np.zeros(n, complex), np.zeros(n), np.zeros(n))
        self.qp = self.fft.empty()
        self.qp_time = self.fft.empty().reshape(-1)
        if self.plasma_profile == "radial":
            self.nodes = (self.node_profiles, self.node_weighted, self.node_pair_weights)

    def _work(self, nodes: int, count: int) -> None:
        """Work arrays of :func:`~.multimode_kernels.mode_terms` for ``nodes`` nodes and
        ``count`` ionising species."""
        block = self.mk.BLOCK
        self.ends = np.zeros(nodes)
        self.state = (np.ones((nodes, count)), np.zeros((nodes, count)), np.zeros(nodes))
        self.blocks = (np.zeros((nodes, 2 * block)), np.zeros((nodes, block)),
                       np.zeros(2 * block), np.zeros((self.modes, self.modes)),
                       np.zeros((nodes, 2 * block)))

    def _delayed_pairs(self, a: np.ndarray) -> np.ndarray:
        """The delayed response convolved with Re(a_m a_n^*) for m <= n, (M, points)."""
        if self.response_rfft is None:
            return self.pairs
        self.mk.pair_products(a.view(np.float64), self.fft.real_in)
        half = self.fft.real_forward()
        half *= self.response_rfft
        return self.fft.real_backward(half)

    def evaluate(self, out: np.ndarray) -> np.ndarray:
        """Raw nonlinear spectrum of the flat spectrum in :attr:`input` into ``out``.

        References
        ----------
        Multimode Kerr and Raman terms: F. Poletti and P. Horak, J. Opt. Soc. Am. B 25, 1645
        (2008). Shock term: B. Kibler, J. M. Dudley and S. Coen, Appl. Phys. B 81, 337 (2005)
        [from memory]. Plasma: M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999); M. F.
        Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory].
        """
        self.n_calls += 1
        a = self.fft.forward()  # = scale * A_m(t)
        pairs = self._delayed_pairs(a)
        radial = self.species and self.plasma_profile == "radial"
        self._terms(a, pairs, True)
        if self.species and not radial:
            self._axis_plasma(a)
        self.fft.backward(self.q, out)
        if self.species and radial and not self.ends.any():
            # no electrons at any node (every sample below the rate tables): the plasma term
            # is 0, the raw spectrum the Kerr one times its gain (no transform of qp)
            np.multiply(out, self.kerr_gain, out=out)
        elif self.species:
            self.fft.backward(self.qp, self.qp_time)
            self.kernels.add_scaled_product(out, self.kerr_gain, self.qp_time, 1.0 / self.points)
        return out

    def _terms(self, a: np.ndarray, pairs: np.ndarray, project: bool) -> None:
        """Kerr, delayed and (radial) plasma terms at the nodes, projected into ``q`` and
        ``qp`` (:func:`~.multimode_kernels.mode_terms`); with ``project`` False only the
        electron densities at the nodes."""
        profiles, weighted, pair_weights = self.nodes
        qp = self.qp if self.species else self.q
        self.mk.mode_terms(
            a.view(np.float64), profiles, weighted, pairs, pair_weights, self.instantaneous,
            project, *self.tables, 1.0 / self.scale**2, self.dt, self.refraction,
            self.q.view(np.float64), qp.view(np.float64), self.ends, *self.state,
            *self.blocks)
        if self.species and self.plasma_profile == "radial":
            self._store(self.ends[0], float(np.sum(self.node_area * self.ends)))

    def _axis_plasma(self, a: np.ndarray) -> None:
        """The single-mode approximation: rho from the on-axis intensity acts on the whole beam
        (c(t) = -i kappa rho - damping, the plasma term of every mode is a_p c)."""
        axis, c_t, power, zero = self.rows
        np.multiply(a[0], self.axis[0], out=axis)  # sum_m F_m(0) a_m
        for m in range(1, self.modes):
            axis += self.axis[m] * a[m]
        self.kernels.power_of(axis, power)
        axis[...] = 1.0  # the kernel's "field" 1: its plasma output is c(t) itself
        end = self.kernels.plasma_in_place(axis, c_t, power, zero, 0.0, *self.tables,
                                      1.0 / self.scale**2, 1.0, self.dt, self.refraction)
        np.multiply(a, c_t[None, :], out=self.qp)
        self._store(end, end * self.intensity_area)

    def _store(self, axis_end: float, line: float) -> None:
        self.ionization_fraction = axis_end / self.neutral_density
        self.electron_line_density = line

    def ionization_of(self, a: np.ndarray) -> tuple[float, float]:
        """Ionisation fraction on axis and electron line density [1/m] left by the fields
        ``a`` (N, points) = scale * A_m(t) (work arrays as scratch; also stored).

        References
        ----------
        M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999).
        M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory].
        """
        if self.plasma_profile == "radial":
            self._terms(a, self.pairs[:0], False)
        else:
            self._axis_plasma(a)
        return self.ionization_fraction, self.electron_line_density

    def __call__(self, u: np.ndarray, out: np.ndarray) -> np.ndarray:
        """Full N(u) into ``out`` (a convenience; the steppers use :meth:`evaluate`)."""
        self.input[...] = u
        raw = self.evaluate(self.new_work())
        np.multiply(raw, 1j * self.gain, out=out)
        return out
