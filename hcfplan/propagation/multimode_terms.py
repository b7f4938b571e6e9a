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
benchmark ``bench/multimode.py`` gives the measured cost.

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
from scipy import fft as sfft
from scipy import special

from hcfplan.constants import c
from hcfplan.numerics.grid import Grid
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
    norm = np.sqrt(np.pi * core_radius**2 * special.j1(u) ** 2)
    return special.j0(np.outer(np.asarray(x, dtype=float), u)) / norm


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
                 workers: int = 1, plasma_profile: str = "radial") -> None:
        from hcfplan.propagation import kernels, multimode_kernels

        self.kn, self.mk = kernels, multimode_kernels
        modes, n, dt = len(eigenvalues), grid.points, grid.dt
        self.modes, self.points, self.workers, self.dt = modes, n, workers, dt
        self.scale = n * dt
        gamma = n2 * grid.omega / c / (self.scale**2 * n)
        self.kerr_gain = np.where(valid, gamma[None, :], 0.0).reshape(-1)
        self.species = tuple(species)
        self.gain = self.kerr_gain if not self.species else np.ones(modes * n)
        self.input = np.zeros(modes * n, complex)
        self._input2 = self.input.reshape(modes, n)
        self.new_work = lambda: np.zeros(modes * n, complex)
        self.instantaneous = float(instantaneous)
        a = core_radius
        x, w = radial_nodes(eigenvalues)
        self.profiles = mode_profiles(x, eigenvalues, a)  # (K, N)
        self.weighted = (a**2 * w)[:, None] * self.profiles
        self.axis = mode_profiles(np.zeros(1), eigenvalues, a)[0]  # F_m(0), (N,)
        pairs = [(m, k) for m in range(modes) for k in range(m, modes)]
        self.response_rfft = None if response is None else sfft.rfft(response) / n
        self.pair_weights = np.zeros((x.size, 0))
        self.pairs = np.zeros((0, n))
        if response is not None:
            self.pair_weights = np.array([(1.0 if m == k else 2.0) * self.profiles[:, m]
                                          * self.profiles[:, k] for m, k in pairs]).T.copy()
            self.pairs = np.zeros((len(pairs), n))
        self.q = np.zeros((modes, n), complex)
        self.work = np.zeros(3 * multimode_kernels.BLOCK)
        self.ionization_fraction = 0.0
        self.electron_line_density = 0.0
        self.n_calls = 0
        self.intensity_area = float(1.0 / self.axis[0] ** 2)  # A_I of the first mode [m^2]
        if self.species:
            if plasma_profile not in PLASMA_PROFILES:
                raise ValueError(f"plasma_profile = {plasma_profile!r}: {PLASMA_PROFILES}")
            self.plasma_profile = plasma_profile
            self.tables = packed_tables(self.species)
            self.neutral_density = sum(s.number_density for s in self.species)
            self.refraction = plasma_refraction_coefficient(grid.omega_pump)
            self._plasma_buffers(np.concatenate([[0.0], x]), np.concatenate([[0.0], w]),
                                 eigenvalues, a, pairs)

    def _plasma_buffers(self, x, w, eigenvalues, a, pairs) -> None:
        """Node set with the axis first (weight 0: it gives the on-axis fraction) and the work
        rows of the plasma path."""
        n = self.points
        self.node_profiles = mode_profiles(x, eigenvalues, a)
        self.node_weighted = (a**2 * w)[:, None] * self.node_profiles
        self.node_area = a**2 * w
        self.node_pair_weights = np.zeros((x.size, 0))
        if self.pairs.size:
            self.node_pair_weights = np.array(
                [(1.0 if m == k else 2.0) * self.node_profiles[:, m] * self.node_profiles[:, k]
                 for m, k in pairs]).T.copy()
        self.ends = np.zeros(x.size)
        self.rows = (np.zeros(n, complex), np.zeros(n, complex), np.zeros(n), np.zeros(n))
        self.qp = np.zeros((self.modes, n), complex)

    def _delayed_pairs(self, a: np.ndarray) -> np.ndarray:
        """The delayed response convolved with Re(a_m a_n^*) for m <= n, (M, points)."""
        if self.response_rfft is None:
            return self.pairs
        self.mk.pair_products(a.view(np.float64), self.pairs)
        half = sfft.rfft(self.pairs, axis=-1, workers=self.workers)
        half *= self.response_rfft
        return sfft.irfft(half, n=self.points, axis=-1, norm="forward", overwrite_x=True,
                          workers=self.workers)

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
        a = sfft.fft(self._input2, axis=-1, workers=self.workers)  # = scale * A_m(t)
        pairs = self._delayed_pairs(a)
        out2 = out.reshape(self.modes, self.points)
        if self.species and self.plasma_profile == "radial":
            self._radial_plasma(a, pairs)
        else:
            self.mk.kerr_projection(a.view(np.float64), self.profiles, self.weighted, pairs,
                                    self.pair_weights, self.instantaneous,
                                    self.q.view(np.float64), self.work)
            if self.species:
                self._axis_plasma(a)
        out2[...] = sfft.ifft(self.q, axis=-1, norm="forward", overwrite_x=True,
                              workers=self.workers)
        if self.species:
            spectrum = sfft.ifft(self.qp, axis=-1, norm="forward", overwrite_x=True,
                                 workers=self.workers).reshape(-1)
            self.kn.add_scaled_product(out, self.kerr_gain, spectrum, 1.0 / self.points)
        return out

    def _radial_plasma(self, a: np.ndarray, pairs: np.ndarray) -> None:
        """Kerr, delayed and plasma terms at every node, projected into ``q`` and ``qp``
        (:func:`~.multimode_kernels.radial_plasma_projection`)."""
        self.mk.radial_plasma_projection(
            a.view(np.float64), self.node_profiles, self.node_weighted, pairs,
            self.node_pair_weights, self.instantaneous, *self.tables, 1.0 / self.scale**2,
            self.dt, self.refraction, self.q.view(np.float64), self.qp.view(np.float64),
            self.ends, *self.rows)
        self._store(self.ends[0], float(np.sum(self.node_area * self.ends)))

    def _axis_plasma(self, a: np.ndarray) -> None:
        """The single-mode approximation: rho from the on-axis intensity acts on the whole beam
        (c(t) = -i kappa rho - damping, the plasma term of every mode is a_p c)."""
        axis, c_t, power, zero = self.rows
        np.multiply(a[0], self.axis[0], out=axis)  # sum_m F_m(0) a_m
        for m in range(1, self.modes):
            axis += self.axis[m] * a[m]
        self.kn.power_of(axis, power)
        axis[...] = 1.0  # the kernel's "field" 1: its plasma output is c(t) itself
        end = self.kn.plasma_in_place(axis, c_t, power, zero, 0.0, *self.tables,
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
            self._radial_plasma(a, np.zeros((0, self.points)))
        else:
            self._axis_plasma(a)
        return self.ionization_fraction, self.electron_line_density

    def __call__(self, u: np.ndarray, out: np.ndarray) -> np.ndarray:
        """Full N(u) into ``out`` (a convenience; the steppers use :meth:`evaluate`)."""
        self.input[...] = u
        raw = self.evaluate(self.new_work())
        np.multiply(raw, 1j * self.gain, out=out)
        return out
