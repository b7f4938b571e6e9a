"""Delayed (Raman) nonlinear responses: damped-oscillator model and molecular rotation.

Two models, both as functions of the delay ``t`` >= 0 (zero for t < 0):

* :func:`raman_response_blowwood1989` -- the single damped oscillator of Blow & Wood [1], the
  usual model of silica fibers (``TaylorFiber``). Normalised to unit area; the solver weights it
  with the Raman fraction f_R.
* :func:`rotational_raman_response` -- the rotational response of a gas of linear molecules
  (N2, O2, air), the quantum sum over rotational lines J -> J+2 weighted by the thermal
  populations and the nuclear-spin statistics, with a dephasing time T2, as used by Peñano
  et al. [2] and Chen et al. [3]. It is returned as a refractive-index response: the index change
  is :math:`\\delta n_{rot}(t) = \\int_0^\\infty R(\\tau)\\, I(t-\\tau)\\, d\\tau` with R in
  m^2/(W s), i.e. directly comparable with the electronic Kerr term :math:`n_2 I`.

Derivation of the rotational prefactor (checked numerically in ``tests/propagation/test_raman.py``)
-------------------------------------------------------------------------------------
A linearly polarised field of cycle-averaged intensity I couples to the molecular axis through
:math:`V = -\\tfrac14\\Delta\\alpha_{SI}|E_0|^2\\cos^2\\theta
= -(2\\pi\\Delta\\alpha/c) I\\cos^2\\theta`
(Δα the polarisability anisotropy as a volume, :math:`\\Delta\\alpha_{SI} = 4\\pi\\varepsilon_0
\\Delta\\alpha`, :math:`I = \\tfrac12\\varepsilon_0 c|E_0|^2`). First-order perturbation theory
(linear response) gives :math:`\\delta\\langle\\cos^2\\theta\\rangle(t) = (2\\pi\\Delta\\alpha/c)
\\int\\chi(\\tau) I(t-\\tau)d\\tau` with

.. math:: \\chi(\\tau) = \\frac{2}{\\hbar}\\sum_J (p_J - p_{J+2})\\, S_J\\, \\sin(\\omega_J\\tau)\\,
          e^{-\\tau/T_2}, \\qquad S_J = \\sum_M |\\langle J+2,M|\\cos^2\\theta|J,M\\rangle|^2
          = \\frac{2(J+1)(J+2)}{15(2J+3)},

:math:`p_J = g_J e^{-E_J/k_BT}/Z` the population of one M sub-level,
:math:`Z = \\sum_J g_J(2J+1)e^{-E_J/k_BT}`, :math:`E_J = hc[BJ(J+1) - DJ^2(J+1)^2]` and
:math:`\\omega_J = (E_{J+2}-E_J)/\\hbar`. The index change of N molecules per volume is
:math:`\\delta n = 2\\pi N\\Delta\\alpha\\,\\delta\\langle\\cos^2\\theta\\rangle`, so
:math:`R(\\tau) = (4\\pi^2 N\\Delta\\alpha^2/c)\\,\\chi(\\tau)`. In the classical limit
(:math:`k_BT \\gg hcB`, no dephasing) :math:`\\int\\chi\\,d\\tau \\to 1/(15 k_BT)`, the
collision-free orientational response of free rotors (the isothermal value 4/(45 k_BT) minus the
part carried by the rotation-averaged, conserved alignment).

Validity: perturbative alignment (:math:`|V| \\ll k_BT`), linear molecules, one vibrational state;
the electronic n2 of the gas table is taken to be the instantaneous part only.

References
----------
.. [1] K. J. Blow and D. Wood, "Theoretical description of transient stimulated Raman
       scattering in optical fibers," IEEE J. Quantum Electron., vol. 25, no. 12,
       pp. 2665-2673, 1989, doi:10.1109/3.40655.
.. [2] J. R. Peñano, P. Sprangle, P. Serafim, B. Hafizi and A. Ting, "Stimulated Raman
       scattering of intense laser pulses in air," Phys. Rev. E, vol. 68, 056502, 2003,
       doi:10.1103/PhysRevE.68.056502. [from memory]
.. [3] Y.-H. Chen, S. Varma, A. York and H. M. Milchberg, "Single-shot, space- and
       time-resolved measurement of rotational wavepacket revivals in H2, D2, N2, O2, and N2O,"
       Opt. Express, vol. 15, no. 18, pp. 11341-11357, 2007, doi:10.1364/OE.15.011341.
       [from memory]
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.constants import c, h, hbar, k_B
from hcfplan.errors import ConfigError

#: Rotational levels are summed up to E_J / (k_B T) = this value (population < e^-40).
_ENERGY_CUTOFF = 40.0


def _check_positive(name: str, value, unit: str) -> None:
    """ConfigError naming ``name`` unless ``value`` is a finite number > 0 (values from gas
    tables and configs)."""
    try:
        ok = math.isfinite(value) and value > 0
    except TypeError:
        ok = False
    if not ok:
        raise ConfigError(f"{name} = {value!r} {unit}: must be finite and > 0")


def raman_response_blowwood1989(t: np.ndarray, tau1: float, tau2: float) -> np.ndarray:
    """Damped-oscillator Raman response of unit area.

    Parameters
    ----------
    t : ndarray
        Delay. [s]
    tau1 : float
        Inverse phonon angular frequency (12.2 fs for silica). [s]
    tau2 : float
        Damping time (32 fs for silica). [s]

    Returns
    -------
    ndarray
        h(t) = (tau1^2 + tau2^2)/(tau1 tau2^2) exp(-t/tau2) sin(t/tau1) for t >= 0, else 0. [1/s]

    Raises
    ------
    ConfigError
        When ``tau1`` or ``tau2`` is not a finite number > 0 (the message names it).

    Notes
    -----
    The damped-oscillator response of [1] (equation number not checked; also in Agrawal,
    *Nonlinear Fiber Optics*, ch. 2 [from memory]); the prefactor makes
    :math:`\\int_0^\\infty h\\,dt = 1`.

    References
    ----------
    K. J. Blow and D. Wood, IEEE J. Quantum Electron. 25, 2665 (1989).
    """
    _check_positive("raman_tau1", tau1, "s")
    _check_positive("raman_tau2", tau2, "s")
    t = np.asarray(t, dtype=float)
    tp = np.maximum(t, 0.0)
    value = (tau1**2 + tau2**2) / (tau1 * tau2**2) * np.exp(-tp / tau2) * np.sin(tp / tau1)
    return np.where(t >= 0, value, 0.0)


def rotational_lines(species, temperature: float) -> tuple[np.ndarray, np.ndarray]:
    """Angular frequencies and amplitudes of the J -> J+2 rotational coherences.

    Parameters
    ----------
    species : RotationalRamanSpecies
        Molecule with ``rotational_constant`` B and ``centrifugal_constant`` D [1/m] and
        ``spin_weights`` (even J, odd J).
    temperature : float
        Gas temperature. [K]

    Returns
    -------
    omega : ndarray
        Line angular frequencies :math:`\\omega_J = (E_{J+2}-E_J)/\\hbar`. [rad/s]
    amplitude : ndarray
        :math:`(2/\\hbar)(p_J - p_{J+2}) S_J` (module docstring). [1/(J s)]

    Raises
    ------
    ConfigError
        When ``temperature`` is not a finite number > 0.

    References
    ----------
    J. R. Peñano et al., Phys. Rev. E 68, 056502 (2003) [from memory].
    Y.-H. Chen, S. Varma, A. York and H. M. Milchberg, Opt. Express 15, 11341 (2007) [from memory].
    """
    _check_positive("temperature", temperature, "K")
    b, d = species.rotational_constant, species.centrifugal_constant
    kt = k_B * temperature
    j_max = int(np.sqrt(_ENERGY_CUTOFF * kt / (h * c * b))) + 4
    j = np.arange(j_max + 3, dtype=float)
    energy = h * c * (b * j * (j + 1) - d * (j * (j + 1)) ** 2)
    g_even, g_odd = species.spin_weights
    weight = np.where(j % 2 == 0, g_even, g_odd)
    boltzmann = weight * np.exp(-(energy - energy[0]) / kt)
    p = boltzmann / np.sum((2 * j + 1) * boltzmann)  # per M sub-level
    jl = j[:-2]
    s_j = 2 * (jl + 1) * (jl + 2) / (15 * (2 * jl + 3))
    omega = (energy[2:] - energy[:-2]) / hbar
    amplitude = 2.0 / hbar * (p[:-2] - p[2:]) * s_j
    return omega, amplitude


def _prefactor(species, number_density: float) -> float:
    """4 pi^2 N Delta-alpha^2 / c (module docstring). [m^4 / s ... per 1/(J s)]"""
    return 4 * np.pi**2 * number_density * species.polarizability_anisotropy**2 / c


def _dephasing_rate(species) -> float:
    t2 = getattr(species, "dephasing_time", None)
    return 0.0 if t2 is None or not np.isfinite(t2) else 1.0 / t2


def rotational_raman_response(
    t: np.ndarray, species, number_density: float, temperature: float
) -> np.ndarray:
    """Rotational index response R(t) of one molecular species.

    Parameters
    ----------
    t : ndarray
        Delay. [s]
    species : RotationalRamanSpecies
        Molecular constants (B, D, spin weights, polarisability anisotropy [m^3], T2 [s]).
    number_density : float
        Density of this molecule. [1/m^3]
    temperature : float
        Gas temperature. [K]

    Returns
    -------
    ndarray
        R(t), zero for t < 0; :math:`\\delta n(t) = \\int R(\\tau) I(t-\\tau) d\\tau`.
        [m^2/(W s)]

    Raises
    ------
    ConfigError
        When ``temperature`` is not a finite number > 0.

    References
    ----------
    J. R. Peñano et al., Phys. Rev. E 68, 056502 (2003) [from memory].
    Y.-H. Chen, S. Varma, A. York and H. M. Milchberg, Opt. Express 15, 11341 (2007) [from memory].
    """
    t = np.asarray(t, dtype=float)
    omega, amplitude = rotational_lines(species, temperature)
    tp = np.maximum(t, 0.0)
    chi = np.zeros_like(tp)
    for w, a in zip(omega, amplitude, strict=True):
        chi += a * np.sin(w * tp)
    chi *= np.exp(-_dephasing_rate(species) * tp)
    return np.where(t >= 0, _prefactor(species, number_density) * chi, 0.0)


def rotational_kerr_n2(species, number_density: float, temperature: float) -> float:
    """Rotational contribution to n2 for a pulse long compared with the rotational periods.

    Parameters
    ----------
    species, number_density, temperature :
        As in :func:`rotational_raman_response`. [-, 1/m^3, K]

    Returns
    -------
    float
        :math:`\\int_0^\\infty R\\,dt = (4\\pi^2N\\Delta\\alpha^2/c)\\sum_J a_J\\,
        \\omega_J/(\\omega_J^2 + T_2^{-2})`. [m^2/W]

    Raises
    ------
    ConfigError
        When ``temperature`` is not a finite number > 0.

    References
    ----------
    J. R. Peñano et al., Phys. Rev. E 68, 056502 (2003) [from memory].
    Y.-H. Chen, S. Varma, A. York and H. M. Milchberg, Opt. Express 15, 11341 (2007) [from memory].
    """
    omega, amplitude = rotational_lines(species, temperature)
    gamma = _dephasing_rate(species)
    weights = amplitude * omega / (omega**2 + gamma**2)
    return float(_prefactor(species, number_density) * np.sum(weights))
