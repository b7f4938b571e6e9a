"""The launch of a Gaussian beam into the EH11...EH1N modes of a capillary, and those modes.

A centred, flat-phase Gaussian beam exp(-r^2/w0^2) at the entrance of a capillary of radius a
excites only the radially symmetric hybrid modes EH1m (its field has no azimuthal dependence);
their transverse fields are J0(u_1m r / a) in the core (Marcatili & Schmeltzer [1]). The
amplitude of mode m is the overlap integral of the beam with the mode, both normalised to unit
power [2]; its square is the power fraction coupled into that mode
(:func:`hcfplan.fibers.modes.gaussian_coupling_efficiency`). What the first N modes do not take
(the higher EH1m, the field outside the core) is lost to the model.

References
----------
.. [1] E. A. J. Marcatili, R. A. Schmeltzer, "Hollow metallic and dielectric waveguides for long
       distance optical transmission and lasers," Bell Syst. Tech. J. 43, 1783-1809 (1964),
       doi:10.1002/j.1538-7305.1964.tb04108.x.
.. [2] R. L. Abrams, "Coupling losses in hollow waveguide laser resonators," IEEE J. Quantum
       Electron. QE-8, 838-843 (1972), doi:10.1109/JQE.1972.1076867 [from memory].
"""

from __future__ import annotations

import dataclasses

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.fibers.modes import eh_eigenvalue, gaussian_coupling_efficiency
from hcfplan.numerics.bessel import bessel_j


def _check_count(n_modes) -> int:
    if isinstance(n_modes, bool) or not isinstance(n_modes, (int, np.integer)) or n_modes < 1:
        raise ConfigError(f"n_modes = {n_modes!r}: must be an integer >= 1")
    return int(n_modes)


def eh_launch_amplitudes(beam_waist: float, core_radius: float, n_modes: int) -> np.ndarray:
    """Signed real amplitudes c_m of a Gaussian beam on the modes EH11...EH1N.

    Parameters
    ----------
    beam_waist : float
        1/e field radius w0 of the centred, flat-phase Gaussian exp(-r^2/w0^2) at the fiber
        entrance (the 1/e^2 intensity radius). [m]
    core_radius : float
        Core radius a. [m]
    n_modes : int
        Number N of modes EH11...EH1N. [-]

    Returns
    -------
    ndarray, shape (N,)
        c_m = int E F_m dA / sqrt(int |E|^2 dA int |F_m|^2 dA), the Gaussian normalised over the
        whole plane and F_m = J0(u_1m r/a) over the core. c_m^2 is the power fraction coupled
        into EH1m (:func:`~hcfplan.fibers.modes.gaussian_coupling_efficiency`); the sign is that
        of the overlap integral (c_1 > 0). sum c_m^2 <= 1; the rest is lost. [-]

    Notes
    -----
    The modes are orthogonal over the core (the J0(u_1m r/a) are orthogonal on [0, a] with
    weight r, as zeros of J0 [1]), so the power of a field that is the sum of the modes with
    amplitudes c_m is sum c_m^2 and the fractions of different modes add. For w0 = 0.6436 a
    c_1^2 = 0.981, the coupling optimum of [2].

    References
    ----------
    .. [1] E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    .. [2] R. L. Abrams, IEEE J. Quantum Electron. QE-8, 838 (1972) [from memory].
    """
    count = _check_count(n_modes)
    fractions = np.array([float(gaussian_coupling_efficiency(beam_waist, core_radius,
                                                             eh_eigenvalue(m)))
                          for m in range(1, count + 1)])
    signs = np.array([_overlap_sign(beam_waist / core_radius, eh_eigenvalue(m))
                      for m in range(1, count + 1)])
    return signs * np.sqrt(fractions)


def _overlap_sign(ratio: float, u: float) -> float:
    """Sign of int_0^1 exp(-x^2/ratio^2) J0(u x) x dx (Gauss-Legendre, 400 nodes)."""
    x, w = np.polynomial.legendre.leggauss(400)
    x = 0.5 * (x + 1.0)
    value = np.sum(0.5 * w * x * np.exp(-(x / ratio) ** 2) * bessel_j(0, u * x))
    return 1.0 if value >= 0 else -1.0


def mode_waveguides(fiber, n_modes: int) -> tuple:
    """The capillary's modes EH11...EH1N as N capillary models of the same tube and fill.

    Parameters
    ----------
    fiber : CapillaryFiber
        The capillary (any mode). [-]
    n_modes : int
        Number N of modes. [-]

    Returns
    -------
    tuple of CapillaryFiber
        ``dataclasses.replace(fiber, mode=(1, m))`` for m = 1...N.

    References
    ----------
    EH1m modes of E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    from hcfplan.fibers.capillary import CapillaryFiber

    count = _check_count(n_modes)
    if not isinstance(fiber, CapillaryFiber):
        raise ConfigError(f"fiber model {type(fiber).__name__}: the EH1m modes are those of "
                          "a capillary")
    return tuple(dataclasses.replace(fiber, mode=(1, m)) for m in range(1, count + 1))
