"""Linear and nonlinear terms of the single-mode envelope equation (frequency domain).

The equation (conventions of :mod:`hcfplan.numerics.grid`; :math:`\\tilde A` the grid spectrum,
``|A|^2`` the power) is

.. math::
    \\partial_z\\tilde A = \\hat L(\\omega)\\tilde A + \\hat N(\\tilde A),\\qquad
    \\hat L = i[\\beta(\\omega) - \\beta_0 - \\beta_1(\\omega-\\omega_p)] - \\alpha(\\omega)
              - \\alpha_{edge}(\\omega),

.. math::
    \\hat N = i\\gamma(\\omega)\\,\\mathcal F\\{A\\,[f_i|A|^2 + (h * |A|^2)]\\}
     + \\mathcal F\\Big\\{-i\\frac{e^2\\rho(t)}{2\\varepsilon_0 m_e c\\,\\omega_p}A
     - \\frac{A_I}{2|A|^2}\\sum_k I_{p,k}\\,\\partial_t\\rho_k\\,A\\Big\\}.

* **Dispersion and loss**: the full :math:`\\beta(\\omega)` and field loss :math:`\\alpha(\\omega)`
  of the waveguide, not a Taylor series; :math:`\\beta_1` from a Chebyshev derivative
  (:func:`hcfplan.numerics.derivatives.derivative`). Where the model gives no valid value
  (:math:`\\beta` or :math:`\\alpha` not finite) the field is removed: the initial field is set to
  zero there and :math:`\\hat L` is a strong loss. In the outer ``EDGE_FRACTION`` of the frequency
  window on each side a smooth absorber :math:`\\alpha_{edge}` (sin^2 ramp up to
  ``EDGE_ATTENUATION / length``) stops spectral components from wrapping round the window.
* **Kerr and self-steepening**: :math:`\\gamma(\\omega) = n_2\\omega/(cA_{eff}(\\omega))` as the
  waveguide returns it (interface item 4), i.e. the frequency-domain form of the shock term
  with an :math:`\\omega`-dependent effective area, as in Kibler et al. [1]. It reduces to
  :math:`\\gamma_p\\,\\omega/\\omega_p` for a constant area (:math:`\\omega` the true optical
  frequency of the sample, so the term does not depend on the window's reference frequency).
  For a ``TaylorFiber``, whose gamma is constant (given at the pump), the factor
  :math:`\\omega/\\omega_p` is applied when its ``self_steepening`` is set. With a constant
  area this form conserves the photon number :math:`\\sum|\\tilde A|^2/\\omega` exactly, with or
  without Raman [2]; with a varying area it does so only approximately (the pseudo-field of
  Lægsgaard [3] would make it exact).
* **Raman**: :math:`f_i` and the causal response h; damped oscillator of Blow & Wood [2] for a
  ``TaylorFiber`` (:math:`f_i = 1-f_R`, :math:`h = f_R h_{BW}`), and for molecular gases the
  rotational response of :mod:`hcfplan.propagation.raman` divided by the waveguide's n2 (the
  electronic n2 stays instantaneous, :math:`f_i = 1`). The response is sampled at :math:`\\tau =
  k\\,dt`, cut at half the time window with a cos^2 taper over its last ``RESPONSE_TAPER`` part (so
  the periodic convolution does not wrap) and applied by real FFTs.
* **Plasma** (Geissler et al. [4], in the envelope form of Saleh et al. [5]): for each gas
  component k with an ionisation table, the rate :math:`W_k(I)` at the on-axis intensity
  :math:`I = |A|^2/A_I` (``peak_intensity_area``; using the peak for the whole mode overestimates
  the mode-averaged ionisation) gives :math:`\\rho_k(t) = N_k[1-\\exp(-\\int_{-\\infty}^t W_k)]`.
  The free electrons lower the index (first term, :math:`\\omega_{pl}^2/(2\\omega_p^2)` at the
  pump frequency :math:`\\omega_p`, which conserves the energy), and the field loses
  :math:`I_p` per electron over the area :math:`A_I` (second term), so the energy lost per
  length is exactly :math:`A_I\\sum_k I_{p,k}\\rho_k(+\\infty)`. Cycle-averaged, single
  ionisation, no collisional absorption or avalanche.

References
----------
.. [1] B. Kibler, J. M. Dudley and S. Coen, "Supercontinuum generation and nonlinear pulse
       propagation in photonic crystal fiber: influence of the frequency-dependent effective
       mode area," Appl. Phys. B, vol. 81, pp. 337-342, 2005, doi:10.1007/s00340-005-1896-x.
       [from memory]
.. [2] K. J. Blow and D. Wood, "Theoretical description of transient stimulated Raman
       scattering in optical fibers," IEEE J. Quantum Electron., vol. 25, no. 12,
       pp. 2665-2673, 1989, doi:10.1109/3.40655.
.. [3] J. Lægsgaard, "Mode profile dispersion in the generalized nonlinear Schrödinger
       equation," Opt. Express, vol. 15, no. 24, pp. 16110-16123, 2007,
       doi:10.1364/OE.15.016110.
.. [4] M. Geissler, G. Tempea, A. Scrinzi, M. Schnürer, F. Krausz and T. Brabec, "Light
       propagation in field-ionizing media: extreme nonlinear optics," Phys. Rev. Lett.,
       vol. 83, no. 15, pp. 2930-2933, 1999, doi:10.1103/PhysRevLett.83.2930.
.. [5] M. F. Saleh, W. Chang, P. Hölzer, A. Nazarkin, J. C. Travers, N. Y. Joly,
       P. St.J. Russell and F. Biancalana, "Theory of photoionization-induced blueshift of
       ultrashort solitons in gas-filled hollow-core photonic crystal fibers," Phys. Rev. Lett.,
       vol. 107, 203902, 2011, doi:10.1103/PhysRevLett.107.203902. [from memory]
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c, e, epsilon_0, m_e
from hcfplan.numerics.derivatives import derivative
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.ionizing import IonizingSpecies
from hcfplan.propagation.kernel_sets import solver_kernels
from hcfplan.propagation.raman import raman_response_blowwood1989, rotational_raman_response

#: Part of the frequency window, on each side, covered by the edge absorber.
EDGE_FRACTION = 0.03
#: Field attenuation (in e-folds over the fiber length) at the outermost frequency bin.
EDGE_ATTENUATION = 30.0
#: Last fraction of the (half-window) delayed response that is tapered to zero.
RESPONSE_TAPER = 0.2
#: Relative half-width of the Chebyshev stencil for beta0, beta1 (see hcfplan.numerics.derivatives).
_BETA1_REL_WIDTH = 0.02


@dataclass(frozen=True)
class LinearTerms:
    """The diagonal linear operator and what was found building it."""

    operator: np.ndarray  #: L(omega), complex, FFT order [1/m]
    valid: np.ndarray  #: bool, where the waveguide model gave finite beta and alpha
    beta0: float  #: [rad/m]
    beta1: float  #: [s/m]


def edge_absorber(grid: Grid, length: float) -> np.ndarray:
    """Smooth field attenuation in the outer ``EDGE_FRACTION`` of the frequency window. [1/m]

    References
    ----------
    none: numerical helper (absorbing boundary; common practice, no source)
    """
    x = np.abs(grid.domega) / (np.pi / grid.dt)  # 0 at the window centre, 1 at its edge
    ramp = np.clip((x - (1 - 2 * EDGE_FRACTION)) / (2 * EDGE_FRACTION), 0.0, 1.0)
    return EDGE_ATTENUATION / length * np.sin(0.5 * np.pi * ramp) ** 2


def linear_terms(grid: Grid, waveguide, length: float) -> LinearTerms:
    """Build L(omega) from the waveguide's full beta(omega) and alpha(omega) (module notes).

    References
    ----------
    none: numerical helper (assembles the waveguide's beta and alpha; each fiber model cites its
    source)
    """
    with np.errstate(all="ignore"):
        beta = np.asarray(waveguide.propagation_constant(grid.omega), dtype=float)
        alpha = np.asarray(waveguide.attenuation(grid.omega), dtype=float)
    pump = grid.omega_pump  # the frame moves with the pump's group velocity (grid.py conv. 1)
    beta0 = float(np.asarray(waveguide.propagation_constant(np.array([pump])))[0])
    beta1 = float(
        derivative(waveguide.propagation_constant, pump, 1, rel_width=_BETA1_REL_WIDTH)
    )
    valid = np.isfinite(beta) & np.isfinite(alpha)
    absorber = edge_absorber(grid, length)
    phase = np.where(valid, beta - beta0 - beta1 * grid.domega_pump, 0.0)
    loss = np.where(valid, alpha, EDGE_ATTENUATION / length) + absorber
    return LinearTerms(1j * phase - loss, valid, beta0, beta1)


def kerr_coefficient_spectrum(grid: Grid, waveguide, valid: np.ndarray) -> np.ndarray:
    """gamma(omega) including the shock factor (module notes), zero where invalid. [1/(W m)]

    References
    ----------
    Frequency-dependent gamma and shock term: B. Kibler, J. M. Dudley and S. Coen, Appl. Phys. B 81,
    337 (2005) [from memory].
    """
    gamma = np.asarray(waveguide.nonlinear_coefficient(grid.omega), dtype=float)
    shock = getattr(waveguide, "self_steepening", None)
    if shock:  # TaylorFiber: constant gamma (given at the pump), shock term applied here
        gamma = gamma * grid.omega / grid.omega_pump
    return np.where(valid & np.isfinite(gamma), gamma, 0.0)


def _tapered_half_window(grid: Grid) -> tuple[np.ndarray, np.ndarray]:
    """Delays k dt (k = 0..N-1) and a window that is 1, tapers, and is 0 beyond N/2."""
    k = np.arange(grid.points)
    half = grid.points // 2
    start = (1 - RESPONSE_TAPER) * half
    x = np.clip((k - start) / (half - start), 0.0, 1.0)
    return k * grid.dt, np.cos(0.5 * np.pi * x) ** 2


def delayed_response(grid: Grid, waveguide, gas) -> tuple[float, np.ndarray | None, list[str]]:
    """Instantaneous fraction f_i and the sampled delayed response h_k (module notes).

    Returns
    -------
    f_i : float
        Weight of the instantaneous Kerr term. [1]
    response : ndarray or None
        h(k dt) dt for k = 0..N-1 (dimensionless weights), None without delayed response.
    notes : list of str
        Warnings for the result.

    References
    ----------
    Damped oscillator: K. J. Blow and D. Wood, IEEE J. Quantum Electron. 25, 2665 (1989).
    Rotational response: J. R. Peñano et al., Phys. Rev. E 68, 056502 (2003) [from memory].
    Y.-H. Chen, S. Varma, A. York and H. M. Milchberg, Opt. Express 15, 11341 (2007) [from memory].
    """
    delay, window = _tapered_half_window(grid)
    notes: list[str] = []
    fraction = float(getattr(waveguide, "raman_fraction", 0.0) or 0.0)
    if fraction > 0:
        h = raman_response_blowwood1989(delay, waveguide.raman_tau1, waveguide.raman_tau2)
        h = h * window
        return 1.0 - fraction, fraction * h / np.sum(h), notes  # discrete area = f_R
    species = _raman_species(gas)
    if not species:
        return 1.0, None, notes
    n2 = float(getattr(waveguide, "kerr_n2", np.nan))
    if not (np.isfinite(n2) and n2 > 0):
        notes.append("rotational Raman ignored: the waveguide's kerr_n2 is not > 0")
        return 1.0, None, notes
    total = np.zeros(grid.points)
    for sp, density in species:
        total += rotational_raman_response(delay, sp, density, gas.fill.temperature)
    return 1.0, total * window * grid.dt / n2, notes


def _raman_species(gas) -> list:
    """(species with pressure-scaled T2, molecule density) for every Raman-active molecule."""
    if gas is None:
        return []
    from dataclasses import replace

    found = []
    for component in gas.components:
        for sp in getattr(component.table, "raman", ()) or ():
            t2 = sp.dephasing_time * sp.dephasing_reference_pressure / gas.fill.pressure
            density = component.number_density * sp.mole_fraction
            found.append((replace(sp, dephasing_time=t2), density))
    return found


def plasma_refraction_coefficient(omega0: float) -> float:
    """e^2 / (2 eps0 m_e c omega0): phase rate per electron density. [m^2 rad]

    References
    ----------
    M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999).
    M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory].
    """
    return e**2 / (2 * epsilon_0 * m_e * c * omega0)


class NonlinearTerms:
    """N(u) -> dz u (nonlinear part, spectral) as ``N = gain * raw``, buffers allocated once.

    The fast interface of the steppers: fill :attr:`input` with a spectrum and call
    :meth:`evaluate(out) <evaluate>`, which writes the *raw* spectrum into ``out``; the steppers
    multiply by i :attr:`gain` inside their fused kernels (N = i gain raw; ``gain`` is real,
    so the kernels read half the bytes of a complex gain and do two products per sample
    instead of four and two sums). Without plasma, ``gain`` is gamma(omega) / (scale^2 N) (the
    Kerr/Raman term and the normalisation of the unnormalised inverse FFT) and ``raw`` is one
    inverse FFT; with plasma ``gain`` is 1 and ``raw`` is -i N. ``__call__(u, out)`` returns
    the full N(u) for other callers. After every evaluation :attr:`ionization_fraction` and
    :attr:`electron_line_density` hold the values for that field.
    """

    def __init__(
        self,
        grid: Grid,
        gamma: np.ndarray,
        instantaneous: float,
        response: np.ndarray | None,
        species: tuple[IonizingSpecies, ...] = (),
        intensity_area: float = np.nan,
        workers: int = 1,
        backend: str = "scipy",
    ) -> None:
        from hcfplan.numerics.fft import FFT_BACKENDS, work_array

        n, dt = grid.points, grid.dt
        self.kernels = solver_kernels(n, new_run=True)  # the steppers use this set too
        self.fft = FFT_BACKENDS[backend](n, workers)
        self.input = self.fft.spectrum_in
        self.scale = n * dt  # grid spectrum = scale * ifft(A)
        # N = i gamma scale ifft(A V) = i gamma / (scale^2 n) * bwd(a scale^2 V), a = fwd(u)
        self.kerr_gain = np.asarray(gamma, dtype=float) / (self.scale**2 * n)  # real
        self.gain = self.kerr_gain if not species else np.ones(n)  # N = i gain raw
        self.new_work = lambda: work_array(self.fft, n)
        self.instantaneous = instantaneous
        self.response_rfft = None if response is None else np.fft.rfft(response) / n
        self.species = species
        self.intensity_area = intensity_area
        self.dt = dt
        self.refraction = plasma_refraction_coefficient(grid.omega_pump)
        self.neutral_density = sum(s.number_density for s in species)
        self.ionization_fraction = 0.0
        self.electron_line_density = 0.0
        self.n_calls = 0
        self.no_delay = np.zeros(n)  # the delayed term without a delayed response
        if species:  # work arrays and packed rate tables of the fused plasma kernel
            self.plasma_time, self.plasma_spectrum = self.new_work(), self.new_work()
            self.tables = packed_tables(species)
            # the power [W] from which some rate of the tables is above 0: the plasma kernel's
            # own test (below it every rate is 0, no electrons, no plasma terms)
            log_i, starts = self.tables[0], self.tables[2]
            self.rate_floor = min(intensity_area * np.exp(log_i[k]) * (1 - 1e-12)
                                  for k in starts[:-1])

    def evaluate(self, out: np.ndarray) -> np.ndarray:
        """Raw nonlinear spectrum of the spectrum in :attr:`input` into ``out`` (N = i gain out).

        References
        ----------
        Kerr and shock term: B. Kibler, J. M. Dudley and S. Coen, Appl. Phys. B 81, 337 (2005) [from
        memory].
        Raman: K. J. Blow and D. Wood, IEEE J. Quantum Electron. 25, 2665 (1989).
        Plasma: M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999).
        M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory].
        """
        self.n_calls += 1
        kn, fft = self.kernels, self.fft
        a = fft.forward()  # = scale * A(t)
        if self.response_rfft is None and not self.species and self.instantaneous == 1.0:
            kn.kerr_in_place(a)  # a |a|^2
            fft.backward(a, out)
            return out
        power = fft.real_in
        top = kn.power_of(a, power)  # power = scale^2 |A|^2, top its highest value
        if self.response_rfft is None:
            delayed = self.no_delay
        else:
            half = fft.real_forward()
            half *= self.response_rfft
            delayed = fft.real_backward(half)
        # with plasma, no sample reaching the rate tables means plasma terms of 0 (the kernel's
        # result, without its pass, the plasma transform and the sum; a NaN takes the kernel)
        if not self.species or top * (1.0 / self.scale**2) < self.rate_floor:
            kn.delayed_in_place(a, power, delayed, self.instantaneous)
            fft.backward(a, out)
            if self.species:  # gain 1 with plasma: the Kerr gain goes into raw
                np.multiply(out, self.kerr_gain, out=out)
                self.ionization_fraction = self.electron_line_density = 0.0
            return out
        end = kn.plasma_in_place(a, self.plasma_time, power, delayed, self.instantaneous,
                                 *self.tables, 1.0 / self.scale**2, self.intensity_area,
                                 self.dt, self.refraction)
        self.ionization_fraction = end / self.neutral_density
        self.electron_line_density = end * self.intensity_area
        fft.backward(a, out)
        fft.backward(self.plasma_time, self.plasma_spectrum)
        # N = i kerr_gain raw_Kerr + grid spectrum of the plasma terms (ifft = backward / n),
        # and raw = -i N = kerr_gain raw_Kerr - i (plasma spectrum) / n
        kn.add_scaled_product(out, self.kerr_gain, self.plasma_spectrum, 1.0 / out.size)
        return out

    def __call__(self, u: np.ndarray, out: np.ndarray) -> np.ndarray:
        """Full N(u) into ``out`` (a convenience; the steppers use :meth:`evaluate`)."""
        self.input[...] = u
        raw = self.evaluate(self.new_work())
        np.multiply(raw, 1j * self.gain, out=out)
        return out

    def ionization_of(self, power: np.ndarray) -> tuple[float, float]:
        """Ionisation fraction and electron line density [1/m] left by the power [W] (fused
        kernel; also stored in :attr:`ionization_fraction` and :attr:`electron_line_density`).

        References
        ----------
        M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999).
        M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory].
        """
        if power.max() < self.rate_floor:  # no sample reaches the rate tables
            self.ionization_fraction = self.electron_line_density = 0.0
            return 0.0, 0.0
        end = self.kernels.plasma_in_place(
            self.plasma_spectrum, self.plasma_time, power, self.no_delay, 0.0, *self.tables, 1.0,
            self.intensity_area, self.dt, self.refraction)  # work arrays as scratch
        self.ionization_fraction = end / self.neutral_density
        self.electron_line_density = end * self.intensity_area
        return self.ionization_fraction, self.electron_line_density

    def _plasma_time(self, a: np.ndarray, power: np.ndarray) -> np.ndarray:
        """Time-domain plasma terms (times scale) for the field a = scale * A(t) (module notes).

        The numpy reference of the fused kernel :func:`~.kernels.plasma_in_place` (which
        :meth:`evaluate` uses; a test checks that both agree); ``power`` in W.
        """
        intensity = power / self.intensity_area
        rho, loss_power = self._ionization(intensity)
        with np.errstate(divide="ignore", invalid="ignore"):
            damping = np.where(power > 0, loss_power / (2 * power), 0.0)
        return a * (-1j * self.refraction * rho - damping)

    def _ionization(self, intensity: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Electron density rho(t) at mid-sample [1/m^3] and ionisation power loss [W]."""
        rho = np.zeros_like(intensity)
        loss = np.zeros_like(intensity)
        line = 0.0
        for sp in self.species:
            rho_k, drho_k = _electron_density(sp.rate(intensity), sp.number_density, self.dt)
            rho += rho_k
            loss += sp.potential * drho_k * (self.intensity_area / self.dt)
            line += float(rho_k[-1] + 0.5 * drho_k[-1])
        self.electron_line_density = line * self.intensity_area
        self.ionization_fraction = line / self.neutral_density
        return rho, loss


def packed_tables(species: tuple[IonizingSpecies, ...]) -> tuple[np.ndarray, ...]:
    """Rate tables of the species for :func:`~.kernels.plasma_in_place`: the concatenated
    (ln I, ln W) nodes, the start index of each species (and the end), the top slopes, neutral
    densities [1/m^3] and ionisation potentials [J].

    References
    ----------
    none: numerical helper (the rates cite their sources in :mod:`hcfplan.ionization.rates`)
    """
    sizes = [sp.rate.log_intensity.size for sp in species]
    return (np.concatenate([sp.rate.log_intensity for sp in species]),
            np.concatenate([sp.rate.log_rate for sp in species]),
            np.concatenate([[0], np.cumsum(sizes)]).astype(np.int64),
            np.array([sp.rate.top_slope for sp in species]),
            np.array([sp.number_density for sp in species], dtype=float),
            np.array([sp.potential for sp in species], dtype=float))


def _electron_density(rate: np.ndarray, density: float, dt: float) -> tuple[np.ndarray, np.ndarray]:
    """Mid-sample electron density and its increment per sample (exact for piecewise-constant W).

    With S_k = sum_{j<k} W_j dt: rho_k = N (1 - exp(-S_k)) at the start of sample k and
    Delta_k = N exp(-S_k)(1 - exp(-W_k dt)), so sum_k Delta_k = rho at the pulse's end exactly.
    Returns (rho_k + Delta_k / 2, Delta_k). [1/m^3]
    """
    w_dt = rate * dt
    s = np.cumsum(w_dt) - w_dt
    survive = np.exp(-s)
    increment = density * survive * (-np.expm1(-w_dt))
    rho_start = density * (-np.expm1(-s))
    return rho_start + 0.5 * increment, increment
